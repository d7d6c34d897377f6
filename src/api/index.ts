/**
 * Decentra as a library: `import { ... } from 'decentra'` (docs/api.md). A small public API over
 * the engine (src/optics) and the case (src/case): build a lens, the four answers at a visual
 * point, the visual point for a near target, decentration limits, a whole binocular case, case
 * files and HL7 FHIR VisionPrescriptions.
 *
 * Every argument is validated here, with the case layer's own checks and ranges (LIMITS); a
 * bad one throws a DecentraError naming the argument and the reason, and nothing else is
 * thrown for bad input. Behind this layer the per-ray engine stays fast and unchecked. A ray
 * that misses, or is totally internally reflected, is a status in the result, not an error.
 *
 * The public types are declared in this file and use only plain numbers, strings and objects,
 * so that the emitted declarations (dist-api/types/api/index.d.ts) stand alone. Signs, frames
 * and units are those of docs/conventions.md: x towards the wearer's left, y up, mm, D, Δ.
 */
import {
  type Answer as EngineAnswer, type Eye, type Lens as EngineLens, type SignedPair, OpticsError, Placement,
  decentrationLimit, fourAnswersPlaced, isFailure, solveFixation,
} from '../optics/index.ts';
import { InputError, inRange, readNumber } from '../case/input.ts';
import { LIMITS, type FieldKey, type RawFields, buildLens as buildCaseLens, readEye, readLensForm } from '../case/lensCase.ts';
import { type CaseDocument as EngineCaseDocument, readCase, readCaseText, writeCase } from '../case/caseFile.ts';
import { evaluateFit } from '../case/fit.ts';
import { importVisionPrescriptionText, visionPrescriptionFromCase } from '../case/fhir.ts';
import { type DirectionWord, DIRECTION_WORDS, angleDirection, directionDeg } from '../case/range.ts';

// ---------------------------------------------------------------------------------------------
// The one error type

/** Every refusal of the API: `argument` names what was wrong ("lens.index", "point.x"), `reason` says why. */
export class DecentraError extends Error {
  constructor(
    /** the argument at fault, as a path into what was passed ("lens.ct", "case.right.sphere") */
    readonly argument: string,
    /** why it was refused */
    readonly reason: string,
  ) {
    super(`${argument}: ${reason}`);
    this.name = 'DecentraError';
  }
}

/** Run a case-layer step, turning its errors (InputError and its kinds, OpticsError) into DecentraError. */
function guarded<T>(prefix: string, step: () => T): T {
  try {
    return step();
  } catch (e) {
    if (e instanceof DecentraError) throw e;
    if (e instanceof InputError) throw new DecentraError(e.field.startsWith(prefix) ? e.field : `${prefix}${e.field}`, e.reason);
    if (e instanceof OpticsError) throw new DecentraError(e.field ? `${prefix}${e.field}` : prefix.replace(/\.$/, '') || 'input', e.message);
    throw e;
  }
}

function plainObject(argument: string, raw: unknown): Record<string, unknown> {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) throw new DecentraError(argument, 'must be an object');
  return raw as Record<string, unknown>;
}

function known(argument: string, o: Record<string, unknown>, keys: readonly string[]): void {
  for (const k of Object.keys(o)) {
    if (!keys.includes(k)) throw new DecentraError(`${argument}.${k}`, `is not a known option; known: ${keys.join(', ')}`);
  }
}

/** A finite number (a number, not text: a library caller passes numbers) within a range. */
function num(argument: string, raw: unknown, range: { min?: number; max?: number; above?: boolean; unit?: string }): number {
  if (typeof raw !== 'number') throw new DecentraError(argument, `must be a number, got ${typeof raw}`);
  return guarded('', () => inRange(argument, readNumber(argument, raw), range));
}

function optNum(argument: string, raw: unknown, range: Parameters<typeof num>[2], fallback: number): number {
  return raw === undefined ? fallback : num(argument, raw, range);
}

function eyeOf(argument: string, raw: unknown): Eye {
  if (raw === undefined) return 'R';
  return guarded('', () => readEye(argument, raw));
}

// ---------------------------------------------------------------------------------------------
// Lenses

/**
 * A lens: the prescription and its form, with the case file's names (docs/case-file.md). Only
 * `sphere` is required; the defaults are those of docs/choices.md (resin 1.50, Vogel front
 * curve, thinnest lens on a 65 mm blank with 1 mm edge and 2 mm centre).
 */
export interface LensOptions {
  /** sphere power, D */
  sphere: number;
  /** cylinder power, D, either sign */
  cyl?: number;
  /** cylinder axis, degrees 0-180 */
  axis?: number;
  /** refractive index (give this or `material`) */
  index?: number;
  /** a material by its generic name, e.g. 'resin-1.50', 'polycarbonate' */
  material?: string;
  /** Abbe number */
  abbe?: number;
  /** true front surface power in the lens material, D (give one of front, base, frontRule) */
  front?: number;
  /** nominal front curve at toolIndex, D */
  base?: number;
  toolIndex?: number;
  /** 'vogel' or 'steps:POWER=FRONT,...' */
  frontRule?: string;
  /** centre thickness, mm (or the thickness rule: minEdge, minCt with diameter) */
  ct?: number;
  minEdge?: number;
  minCt?: number;
  /** lens diameter, mm */
  diameter?: number;
  /** conic constants of the front and back surfaces */
  frontK?: number;
  backK?: number;
  cylOn?: 'back' | 'front';
  toric?: 'tyre' | 'barrel';
}

/** A built lens: what it is, in numbers. Pass it to prismAt, near and limits. */
export interface Lens {
  readonly sphere: number;
  readonly cyl: number;
  readonly axis: number;
  readonly index: number;
  /** true front surface power, D */
  readonly front: number;
  /** back surface powers along its two principal meridians, D */
  readonly back: readonly [number, number];
  /** centre thickness, mm */
  readonly ct: number;
  /** diameter, mm (null: no edge) */
  readonly diameter: number | null;
}

const LENS_KEYS = ['sphere', 'cyl', 'axis', 'index', 'material', 'abbe', 'front', 'base', 'toolIndex', 'frontRule',
  'ct', 'minEdge', 'minCt', 'diameter', 'frontK', 'backK', 'cylOn', 'toric'] as const;
const TEXT_KEYS = ['material', 'frontRule', 'cylOn', 'toric'] as const;

/** The engine lens behind each public Lens (the public object is a plain, frozen summary). */
const engineLenses = new WeakMap<Lens, EngineLens>();

/** Build a lens from its prescription and form. Throws DecentraError naming `lens.FIELD`. */
export function buildLens(options: LensOptions): Lens {
  const o = plainObject('lens', options);
  known('lens', o, LENS_KEYS);
  for (const k of LENS_KEYS) {
    const val = o[k];
    if (val === undefined) continue;
    const wanted = (TEXT_KEYS as readonly string[]).includes(k) ? 'string' : 'number';
    if (typeof val !== wanted) throw new DecentraError(`lens.${k}`, `must be a ${wanted}, got ${val === null ? 'null' : typeof val}`);
    if (typeof val === 'number' && !Number.isFinite(val)) throw new DecentraError(`lens.${k}`, `must be a finite number, got ${String(val)}`);
  }
  const label = (k: FieldKey): string => `lens.${k}`;
  const form = guarded('', () => readLensForm(o as RawFields, label));
  const engine = guarded('', () => buildCaseLens(form, label));
  const lens: Lens = Object.freeze({
    sphere: form.sphereD, cyl: form.cylD, axis: form.axisDeg, index: engine.index,
    front: engine.frontPowers[0], back: Object.freeze([engine.backPowers[0], engine.backPowers[1]]) as readonly [number, number],
    ct: engine.ctMm, diameter: Number.isFinite(engine.radiusMm) ? 2 * engine.radiusMm : null,
  });
  engineLenses.set(lens, engine);
  return lens;
}

function engineOf(argument: string, lens: unknown): EngineLens {
  const e = typeof lens === 'object' && lens !== null ? engineLenses.get(lens as Lens) : undefined;
  if (!e) throw new DecentraError(argument, 'must be a lens made by buildLens()');
  return e;
}

// ---------------------------------------------------------------------------------------------
// Answers

/** A prism in the wearer frame (docs/conventions.md): components, size, base direction and base words. */
export interface Prism {
  /** signed components, Δ: x towards the wearer's left, y up */
  x: number;
  y: number;
  magnitude: number;
  /** base direction in 360° notation, degrees [0, 360) */
  baseAngle: number;
  horizontal: { amount: number; base: 'in' | 'out' | null };
  vertical: { amount: number; base: 'up' | 'down' | null };
}

/** A trace that found no answer: 'miss', 'tir', 'geometry' or 'edge', with a sentence. */
export interface Failure {
  failure: 'miss' | 'tir' | 'geometry' | 'edge';
  message: string;
}

/** The four answers at one visual point (docs/method.md, "The four answers"). */
export interface Answers {
  eye: 'R' | 'L';
  prentice: Prism;
  /** the first-order thick-lens value at the eye */
  firstOrder: Prism;
  /** the exact line of sight through the lens, or why it failed */
  exact: Prism | Failure;
  /** what a focimeter reads at that point (exact), or why it failed */
  focimeter: Prism | Failure;
  /** |Prentice| - |exact| in Δ and in % of the exact value (null when the exact trace failed) */
  prenticeError: { prism: number; percent: number | null } | null;
}

/** Where the lens sits before the eye. */
export interface Fitting {
  /** back vertex to the eye's centre of rotation, mm (default 27) */
  cr?: number;
  /** which eye, for base in/out: 'R' or 'L' (default 'R') */
  eye?: 'R' | 'L';
}

/** A visual point on the lens, relative to the optical centre, mm. */
export interface PointOptions extends Fitting {
  x: number;
  y: number;
}

function copyPrism(p: { x: number; y: number; magnitude: number; baseAngle: number; horizontal: Prism['horizontal']; vertical: Prism['vertical'] }): Prism {
  return { x: p.x, y: p.y, magnitude: p.magnitude, baseAngle: p.baseAngle, horizontal: { ...p.horizontal }, vertical: { ...p.vertical } };
}

function copyAnswer(a: EngineAnswer): Prism | Failure {
  return isFailure(a) ? { failure: a.failure, message: a.message } : copyPrism(a);
}

function fitting(f: Record<string, unknown>): { crMm: number; eye: Eye } {
  return { crMm: optNum('point.cr', f.cr, LIMITS.cr, 27), eye: eyeOf('point.eye', f.eye) };
}

/** Prentice, first-order, exact and focimeter prism at a visual point of an untilted lens. */
export function prismAt(lens: Lens, point: PointOptions): Answers {
  const engine = engineOf('lens', lens);
  const p = plainObject('point', point);
  known('point', p, ['x', 'y', 'cr', 'eye']);
  const x = num('point.x', p.x, LIMITS.point);
  const y = num('point.y', p.y, LIMITS.point);
  const { crMm, eye } = fitting(p);
  if (Math.hypot(x, y) > engine.radiusMm) {
    throw new DecentraError(Math.abs(x) >= Math.abs(y) ? 'point.x' : 'point.y',
      `the visual point (${x}, ${y}) mm lies outside the ${2 * engine.radiusMm} mm lens`);
  }
  const pl = new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm: crMm, pantoDeg: 0, wrapDeg: 0, eye });
  const r = fourAnswersPlaced(engine, pl, x, y, eye);
  return {
    eye, prentice: copyPrism(r.prentice), firstOrder: copyPrism(r.paraxial),
    exact: copyAnswer(r.exact), focimeter: copyAnswer(r.focimeter),
    prenticeError: r.error ? { ...r.error } : null,
  };
}

// ---------------------------------------------------------------------------------------------
// Near

export interface NearOptions extends Fitting {
  /** the target, mm, eye frame: centre of rotation at the origin, x left, y up, z forwards */
  at: { x: number; y: number; z: number };
  /** optical centre from the eye's straight-ahead line, mm (default 0) */
  ocX?: number;
  ocY?: number;
  /** pantoscopic tilt and wrap, degrees (default 0) */
  panto?: number;
  wrap?: number;
}

/** Where the eye looks through the lens at a target, and the four answers there. */
export type NearResult =
  | { status: 'ok'; visualPoint: { x: number; y: number }; iterations: number; answers: Answers }
  | { status: 'miss' | 'tir' | 'geometry' | 'edge' | 'no-convergence'; message: string };

/** The visual point for a near target, solved with the exact trace (docs/binocular.md). */
export function near(lens: Lens, options: NearOptions): NearResult {
  const engine = engineOf('lens', lens);
  const o = plainObject('options', options);
  known('options', o, ['at', 'cr', 'eye', 'ocX', 'ocY', 'panto', 'wrap']);
  const at = plainObject('options.at', o.at);
  const t = { x: num('options.at.x', at.x, {}), y: num('options.at.y', at.y, {}), z: num('options.at.z', at.z, {}) };
  const crMm = optNum('options.cr', o.cr, LIMITS.cr, 27);
  const eye = eyeOf('options.eye', o.eye);
  const ocX = optNum('options.ocX', o.ocX, LIMITS.point, 0), ocY = optNum('options.ocY', o.ocY, LIMITS.point, 0);
  const panto = optNum('options.panto', o.panto, LIMITS.panto, 0), wrap = optNum('options.wrap', o.wrap, LIMITS.wrap, 0);
  const pl = new Placement({ ocXMm: ocX, ocYMm: ocY, crDistanceMm: crMm, pantoDeg: panto, wrapDeg: wrap, eye });
  const fix = solveFixation(engine, pl, { kind: 'point', ...t });
  if (fix.status === 'target') throw new DecentraError('options.at', fix.message);
  if (fix.status !== 'ok') return { status: fix.status, message: fix.message };
  const r = fourAnswersPlaced(engine, pl, fix.cx, fix.cy, eye);
  return {
    status: 'ok', visualPoint: { x: fix.cx, y: fix.cy }, iterations: fix.iterations,
    answers: {
      eye, prentice: copyPrism(r.prentice), firstOrder: copyPrism(r.paraxial),
      exact: copyAnswer(r.exact), focimeter: copyAnswer(r.focimeter), prenticeError: r.error ? { ...r.error } : null,
    },
  };
}

// ---------------------------------------------------------------------------------------------
// Limits

export interface LimitOptions extends Fitting {
  /** the most prism allowed, Δ (greater than 0) */
  maxPrism: number;
  /** direction of decentration: 'nasal', 'temporal', 'up', 'down', or degrees from +x (the wearer's left) towards +y (up) */
  direction: 'nasal' | 'temporal' | 'up' | 'down' | number;
}

export interface LimitResult {
  /** largest decentration with exact prism within maxPrism, mm; null when never reached */
  exact: number | null;
  /** 'ok', 'never-reached' (the lens stays within as far as it goes) or 'trace-failed' (exact is the last good point) */
  exactReason: 'ok' | 'never-reached' | 'trace-failed';
  /** Prentice's c = P / F, mm (null: no power along the direction) */
  prentice: number | null;
  /** first-order thick-lens limit, mm (null: unlimited) */
  firstOrder: number | null;
  /** how far the search went, mm */
  searchedTo: number;
}

/** The largest decentration along a direction within a prism tolerance (docs/range.md). */
export function limits(lens: Lens, options: LimitOptions): LimitResult {
  const engine = engineOf('lens', lens);
  const o = plainObject('options', options);
  known('options', o, ['maxPrism', 'direction', 'cr', 'eye']);
  // the range layer's tolerance range (src/case/range.ts, readRangeSpec)
  const maxPrism = num('options.maxPrism', o.maxPrism, { min: 0, max: 50, above: true, unit: 'Δ' });
  const crMm = optNum('options.cr', o.cr, LIMITS.cr, 27);
  const eye = eyeOf('options.eye', o.eye);
  let deg: number;
  if (typeof o.direction === 'string') {
    if (!(DIRECTION_WORDS as readonly string[]).includes(o.direction)) {
      throw new DecentraError('options.direction', `must be ${DIRECTION_WORDS.join(', ')} or degrees, got '${o.direction}'`);
    }
    deg = directionDeg(o.direction as DirectionWord, eye);
  } else {
    deg = angleDirection(num('options.direction', o.direction, {})).deg;
  }
  const r = decentrationLimit(engine, crMm, deg, maxPrism);
  return { exact: r.exactMm, exactReason: r.exactReason, prentice: r.prenticeMm, firstOrder: r.paraxialMm, searchedTo: r.searchedToMm };
}

// ---------------------------------------------------------------------------------------------
// Cases

/** A Decentra case document (docs/case-file.md), as read from and written to a case file. */
export interface CaseDocument {
  format: 'decentra-case';
  version: number;
  [field: string]: unknown;
}

/** The pair's prism: net horizontal (> 0 base in) and vertical imbalance (> 0 right eye base up), Δ. */
export interface Pair {
  netHorizontal: number;
  verticalImbalance: number;
}

/** A binocular case's three answers, never mixed (docs/binocular.md). */
export interface FitSummary {
  /** 1. at the marks (prism reference points), per answer; null where an eye has no value */
  atMarks: { prentice: Pair | null; firstOrder: Pair | null; exact: Pair | null; focimeter: Pair | null; prescribed: Pair };
  /** 2. the standard's verdict on the focimeter values minus the prescribed (null: no value) */
  standard: {
    pass: boolean | null;
    verdicts: { component: 'horizontal' | 'vertical'; value: number; limit: number; unit: 'Δ' | 'mm'; pass: boolean }[] | null;
  };
  /** 3. what the eyes meet at the case's target */
  atTarget: {
    exact: Pair | null;
    prentice: Pair | null;
    right: Prism | Failure | null;
    left: Prism | Failure | null;
    /** the demand beyond the prescribed prism (null: an eye has no exact answer) */
    demand: {
      horizontal: { amount: number; base: 'in' | 'out' | null; asks: 'converge' | 'diverge' | null };
      vertical: { amount: number; baseUpEye: 'R' | 'L' | null };
    } | null;
  };
}

function pair(p: SignedPair | null): Pair | null {
  return p ? { netHorizontal: p.netHorizontal, verticalImbalance: p.verticalImbalance } : null;
}

function caseOf(argument: string, doc: unknown) {
  if (typeof doc === 'string') return guarded(`${argument}.`, () => readCaseText(doc));
  return guarded(`${argument}.`, () => readCase(plainObject(argument, doc)));
}

/** Validate a case (a document or its JSON text) and evaluate it as its three answers. */
export function fitCase(doc: CaseDocument | string): FitSummary {
  const c = caseOf('case', doc);
  const f = guarded('case.', () => evaluateFit(c));
  const verdicts = f.standard.verdicts?.map((v) => ({ component: v.component, value: v.value, limit: v.limit, unit: v.unit, pass: v.pass })) ?? null;
  const eyeAnswer = (side: 'right' | 'left'): Prism | Failure | null => {
    const a = f.result[side].answers;
    return a ? copyAnswer(a.exact) : null;
  };
  return {
    atMarks: {
      prentice: pair(f.marks.net.prentice), firstOrder: pair(f.marks.net.paraxial), exact: pair(f.marks.net.exact),
      focimeter: pair(f.marks.net.focimeter), prescribed: pair(f.marks.prescribedNet)!,
    },
    standard: { pass: verdicts ? verdicts.every((v) => v.pass) : null, verdicts },
    atTarget: {
      exact: pair(f.result.exact), prentice: pair(f.result.prentice), right: eyeAnswer('right'), left: eyeAnswer('left'),
      demand: f.demand ? { horizontal: { ...f.demand.horizontal }, vertical: { ...f.demand.vertical } } : null,
    },
  };
}

/** Read a case file's text: JSON, schema and values checked (older versions migrated). */
export function readCaseFile(text: string): CaseDocument {
  if (typeof text !== 'string') throw new DecentraError('text', 'must be the case file as a string');
  return caseOf('case', text).doc as CaseDocument;
}

/** A case file's text for a document (validated first): stable key order, a final newline. */
export function writeCaseFile(doc: CaseDocument): string {
  return writeCase(caseOf('case', doc).doc);
}

// ---------------------------------------------------------------------------------------------
// HL7 FHIR VisionPrescription (docs/fhir.md)

export interface FhirImportOptions {
  /** monocular PDs, mm (32 each assumed when not given) */
  pd?: { right: number; left: number };
}

/** A case from a VisionPrescription (R4/R5 JSON; lone or in a Bundle), with one note per assumption. */
export function importFhir(text: string, options: FhirImportOptions = {}): { case: CaseDocument; notes: string[] } {
  if (typeof text !== 'string') throw new DecentraError('text', 'must be the resource as JSON text');
  const o = plainObject('options', options);
  known('options', o, ['pd']);
  let pdMm: { right: number; left: number } | undefined;
  if (o.pd !== undefined) {
    const pd = plainObject('options.pd', o.pd);
    // finite here; the case's own check (20-45 mm) applies when the case is built
    pdMm = { right: num('options.pd.right', pd.right, {}), left: num('options.pd.left', pd.left, {}) };
  }
  const r = guarded('resource.', () => importVisionPrescriptionText(text, pdMm ? { pdMm } : {}));
  return { case: r.doc as CaseDocument, notes: r.notes };
}

/** The case's prescription as a VisionPrescription resource, dated `date` (ISO 8601; default now). */
export function exportFhir(doc: CaseDocument | string, date: string = new Date().toISOString()): { resource: object; notes: string[] } {
  if (typeof date !== 'string' || Number.isNaN(Date.parse(date))) throw new DecentraError('date', `must be an ISO 8601 date, got '${String(date)}'`);
  const c = caseOf('case', doc);
  return guarded('case.', () => visionPrescriptionFromCase(c.doc as EngineCaseDocument, date));
}
