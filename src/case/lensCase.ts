/**
 * The monocular case: a prescription, a lens form, the fitting distance and a visual point.
 * Raw fields (CLI flags, UI inputs) are validated here, with errors that name the field,
 * then turned into an engine Lens. Defaults are the trade's usual assumptions, each with its
 * reason in docs/choices.md.
 */
import {
  type Eye, type FrontRule, Lens, OpticsError, findMaterial, frontForPower, MATERIALS,
  normaliseAxis, solveCentreThickness, trueFromNominal,
} from '../optics/index.ts';
import { InputError, inRange, readNumber } from './input.ts';

export type FrontSpec =
  | { kind: 'true'; frontD: number }
  | { kind: 'nominal'; nominalD: number; toolIndex: number }
  | { kind: 'rule'; rule: FrontRule };

export type ThicknessSpec =
  | { kind: 'centre'; ctMm: number; diameterMm?: number }
  | { kind: 'rule'; diameterMm: number; minEdgeMm: number; minCentreMm: number; diameterIsDefault?: boolean };

export interface LensForm {
  sphereD: number;
  cylD: number;
  axisDeg: number;
  index: number;
  /** the material's id when chosen by name */
  materialId?: string;
  abbe?: number;
  front: FrontSpec;
  thickness: ThicknessSpec;
  frontConic: number;
  backConic: number;
  cylOn: 'back' | 'front';
  toricForm: 'tyre' | 'barrel';
}

export interface TraceCase {
  eye: Eye;
  lens: LensForm;
  /** back vertex to centre of rotation, mm */
  crMm: number;
  /** visual point relative to the optical centre, wearer frame, mm */
  xMm: number;
  yMm: number;
}

/** Assumptions used when a field is not given (see docs/choices.md). */
export const DEFAULTS = {
  cylD: 0,
  axisDeg: 0,
  materialId: 'resin-1.50',
  crMm: 27,
  eye: 'R' as Eye,
  frontConic: 0,
  backConic: 0,
  toolIndex: 1.53,
  diameterMm: 65,
  minEdgeMm: 1.0,
  minCentreMm: 2.0,
  xMm: 0,
  yMm: 0,
  /** best forms (decentra form, the app's point-focal control): the eye rotation, and a
   *  common reading distance from the vertex sphere (common practice, no source) */
  formRotationDeg: 30,
  formNearMm: 400,
} as const;

/** Field keys shared by the CLI and the UI. */
export type FieldKey =
  | 'sphere' | 'cyl' | 'axis' | 'index' | 'material' | 'abbe' | 'front' | 'base' | 'toolIndex' | 'frontRule'
  | 'ct' | 'minEdge' | 'minCt' | 'diameter' | 'frontK' | 'backK' | 'cylOn' | 'toric' | 'x' | 'y' | 'cr' | 'eye';

export type RawFields = Partial<Record<FieldKey, unknown>>;
export type Labeller = (key: FieldKey) => string;

/** Ranges: wide enough for any spectacle lens, narrow enough to catch a slip of units. */
export const LIMITS = {
  sphere: { min: -30, max: 30, unit: 'D' },
  cyl: { min: -10, max: 10, unit: 'D' },
  axis: { min: 0, max: 180, unit: 'degrees' },
  index: { min: 1, max: 2.2, above: true },
  abbe: { min: 10, max: 100 },
  front: { min: -20, max: 30, unit: 'D' },
  toolIndex: { min: 1, max: 2.2, above: true },
  ct: { min: 0, max: 30, above: true, unit: 'mm' },
  minEdge: { min: 0, max: 20, unit: 'mm' },
  minCt: { min: 0, max: 30, above: true, unit: 'mm' },
  diameter: { min: 10, max: 100, unit: 'mm' },
  conic: { min: -50, max: 50 },
  point: { min: -50, max: 50, unit: 'mm' },
  cr: { min: 5, max: 60, unit: 'mm' },
  /** monocular PD */
  pd: { min: 20, max: 45, unit: 'mm' },
  /** pantoscopic tilt and wrap: one range everywhere (docs/conventions.md, "Tilted and wrapped lenses") */
  panto: { min: -20, max: 30, unit: 'degrees' },
  wrap: { min: -10, max: 35, unit: 'degrees' },
  /** a prescribed prism, per entry */
  prism: { min: 0, max: 20, unit: 'Δ' },
  /** best forms: the eye rotation and the near target's distance from the vertex sphere */
  formRotation: { min: 0, max: 60, above: true, unit: 'degrees' },
  formNear: { min: 100, max: 2000, unit: 'mm' },
  /** a bound on the pencil's mean or astigmatic error for decentration limits (docs/range.md) */
  maxPowerError: { min: 0, max: 10, above: true, unit: 'D' },
  /** a prism tolerance for decentration limits (docs/range.md) */
  maxPrism: { min: 0, max: 50, above: true, unit: 'Δ' },
  prismAngle: { min: 0, max: 360, unit: 'degrees' },
  /** a reading level: depth below and inset from the distance centration point */
  levelBelow: { min: -20, max: 40, unit: 'mm' },
  levelInset: { min: -10, max: 10, unit: 'mm' },
} as const;

function present(v: unknown): boolean {
  return v !== undefined && v !== null && v !== '';
}

export function readEye(field: string, raw: unknown): Eye {
  const s = String(raw ?? '').trim().toUpperCase();
  if (s === 'R' || s === 'RIGHT' || s === 'OD') return 'R';
  if (s === 'L' || s === 'LEFT' || s === 'OS') return 'L';
  throw new InputError(field, `must be R or L, got '${String(raw)}'`);
}

/** Parse a front-curve rule: "vogel" or "steps:-20=0.5,-4=3,0=6,4=9". */
export function readFrontRule(field: string, raw: unknown): FrontRule {
  const s = String(raw ?? '').trim().toLowerCase();
  if (s === 'vogel') return { kind: 'vogel' };
  if (s.startsWith('steps:')) {
    const steps = s.slice(6).split(',').map((part) => {
      const [from, front] = part.split('=');
      if (from === undefined || front === undefined) {
        throw new InputError(field, `each step is POWER=FRONT in dioptres, got '${part}'`);
      }
      return { fromD: readNumber(field, from, 'power'), frontD: readNumber(field, front, 'power') };
    });
    steps.sort((a, b) => a.fromD - b.fromD);
    return { kind: 'steps', steps };
  }
  throw new InputError(field, `must be 'vogel' or 'steps:POWER=FRONT,...', got '${String(raw)}'`);
}

/** Validate the lens fields into a LensForm (nothing is built yet). */
export function readLensForm(f: RawFields, label: Labeller): LensForm {
  const num = (k: FieldKey, q: Parameters<typeof readNumber>[2], r: Parameters<typeof inRange>[2]): number =>
    inRange(label(k), readNumber(label(k), f[k], q), r);
  if (!present(f.sphere)) throw new InputError(label('sphere'), 'is required (the sphere power in dioptres)');
  const sphereD = num('sphere', 'power', LIMITS.sphere);
  const cylD = present(f.cyl) ? num('cyl', 'power', LIMITS.cyl) : DEFAULTS.cylD;
  const axisDeg = present(f.axis) ? normaliseAxis(num('axis', 'angle', LIMITS.axis)) : DEFAULTS.axisDeg;

  let index: number;
  let materialId: string | undefined;
  let abbe: number | undefined;
  if (present(f.index) && present(f.material)) {
    throw new InputError(label('index'), `give either ${label('index')} or ${label('material')}, not both`);
  }
  if (present(f.index)) {
    index = num('index', 'plain', LIMITS.index);
  } else {
    const id = present(f.material) ? String(f.material) : DEFAULTS.materialId;
    const m = findMaterial(id);
    if (!m) {
      throw new InputError(label('material'), `unknown material '${id}'; known: ${MATERIALS.map((x) => x.id).join(', ')}`);
    }
    index = m.nd;
    abbe = m.abbe;
    materialId = m.id;
  }
  if (present(f.abbe)) abbe = num('abbe', 'plain', LIMITS.abbe);

  const fronts = (['front', 'base', 'frontRule'] as const).filter((k) => present(f[k]));
  if (fronts.length > 1) {
    throw new InputError(label(fronts[1]!), `give only one of ${label('front')}, ${label('base')} or ${label('frontRule')}`);
  }
  let front: FrontSpec;
  if (present(f.front)) front = { kind: 'true', frontD: num('front', 'power', LIMITS.front) };
  else if (present(f.base)) {
    front = {
      kind: 'nominal',
      nominalD: num('base', 'power', LIMITS.front),
      toolIndex: present(f.toolIndex) ? num('toolIndex', 'plain', LIMITS.toolIndex) : DEFAULTS.toolIndex,
    };
  } else if (present(f.frontRule)) front = { kind: 'rule', rule: readFrontRule(label('frontRule'), f.frontRule) };
  else front = { kind: 'rule', rule: { kind: 'vogel' } };

  let thickness: ThicknessSpec;
  const diameter = present(f.diameter) ? num('diameter', 'length', LIMITS.diameter) : undefined;
  if (present(f.ct)) {
    if (present(f.minEdge) || present(f.minCt)) {
      throw new InputError(label('ct'), `give either ${label('ct')} or the thickness rule (${label('minEdge')}, ${label('minCt')}), not both`);
    }
    thickness = { kind: 'centre', ctMm: num('ct', 'length', LIMITS.ct), diameterMm: diameter };
  } else {
    thickness = {
      kind: 'rule',
      diameterMm: diameter ?? DEFAULTS.diameterMm,
      ...(diameter === undefined ? { diameterIsDefault: true } : {}),
      minEdgeMm: present(f.minEdge) ? num('minEdge', 'length', LIMITS.minEdge) : DEFAULTS.minEdgeMm,
      minCentreMm: present(f.minCt) ? num('minCt', 'length', LIMITS.minCt) : DEFAULTS.minCentreMm,
    };
  }
  const cylOn = present(f.cylOn) ? String(f.cylOn).toLowerCase() : 'back';
  if (cylOn !== 'back' && cylOn !== 'front') throw new InputError(label('cylOn'), `must be 'back' or 'front', got '${String(f.cylOn)}'`);
  const toric = present(f.toric) ? String(f.toric).toLowerCase() : 'tyre';
  if (toric !== 'tyre' && toric !== 'barrel') throw new InputError(label('toric'), `must be 'tyre' or 'barrel', got '${String(f.toric)}'`);
  return {
    sphereD, cylD, axisDeg, index, materialId, abbe, front, thickness,
    frontConic: present(f.frontK) ? num('frontK', 'plain', LIMITS.conic) : DEFAULTS.frontConic,
    backConic: present(f.backK) ? num('backK', 'plain', LIMITS.conic) : DEFAULTS.backConic,
    cylOn, toricForm: toric,
  };
}

/** True front surface power of a lens form, D. */
export function frontPowerOf(form: LensForm): number {
  const fr = form.front;
  if (fr.kind === 'true') return fr.frontD;
  if (fr.kind === 'nominal') return trueFromNominal(fr.nominalD, form.index, fr.toolIndex);
  return frontForPower(fr.rule, form.sphereD, form.cylD);
}

/** Build the engine lens; an impossible lens becomes an InputError naming the field at fault. */
export function buildLens(form: LensForm, label: Labeller): Lens {
  const frontD = frontPowerOf(form);
  const base = {
    sphereD: form.sphereD, cylD: form.cylD, axisDeg: form.axisDeg, index: form.index, frontD,
    frontConic: form.frontConic, backConic: form.backConic, cylOn: form.cylOn, toricForm: form.toricForm,
  };
  const th = form.thickness;
  try {
    if (th.kind === 'centre') return new Lens({ ...base, ctMm: th.ctMm, diameterMm: th.diameterMm });
    const ctMm = solveCentreThickness(base, th);
    return new Lens({ ...base, ctMm, diameterMm: th.diameterMm });
  } catch (e) {
    if (e instanceof OpticsError) {
      const key: FieldKey = e.field === 'front' ? (form.front.kind === 'true' ? 'front' : form.front.kind === 'nominal' ? 'base' : 'frontRule')
        : e.field === 'diameter' ? 'diameter' : th.kind === 'centre' ? 'ct' : 'minEdge';
      const hint = key === 'diameter' && th.kind === 'rule' && th.diameterIsDefault
        ? ` (${th.diameterMm} mm is the default diameter of the thickness rule; give ${label('ct')} or ${label('diameter')})`
        : '';
      throw new InputError(label(key), e.message + hint);
    }
    throw e;
  }
}

/** Validate a whole monocular trace case and build its lens. */
export function readTraceCase(f: RawFields, label: Labeller): { tc: TraceCase; lens: Lens } {
  const lensForm = readLensForm(f, label);
  const eye = present(f.eye) ? readEye(label('eye'), f.eye) : DEFAULTS.eye;
  const crMm = present(f.cr) ? inRange(label('cr'), readNumber(label('cr'), f.cr, 'length'), LIMITS.cr) : DEFAULTS.crMm;
  const xMm = present(f.x) ? inRange(label('x'), readNumber(label('x'), f.x, 'length'), LIMITS.point) : DEFAULTS.xMm;
  const yMm = present(f.y) ? inRange(label('y'), readNumber(label('y'), f.y, 'length'), LIMITS.point) : DEFAULTS.yMm;
  const lens = buildLens(lensForm, label);
  if (Math.hypot(xMm, yMm) > lens.radiusMm) throw new InputError(label(Math.abs(xMm) >= Math.abs(yMm) ? 'x' : 'y'), outsideLens(xMm, yMm, lens.radiusMm));
  return { tc: { eye, lens: lensForm, crMm, xMm, yMm }, lens };
}

/** Why a visual point (mm from the optical centre) beyond the lens's edge is refused (here and in src/api). */
export function outsideLens(xMm: number, yMm: number, radiusMm: number): string {
  return `the visual point (${fmt(xMm)}, ${fmt(yMm)}) mm is ${fmt(Math.hypot(xMm, yMm))} mm from the optical centre, outside the ` +
    `${fmt(2 * radiusMm)} mm lens`;
}

function fmt(v: number): string {
  return String(Math.round(v * 100) / 100);
}
