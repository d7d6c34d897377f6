/**
 * The designer's range (docs/range.md): decentration limits over a whole lens family, and
 * where Prentice's rule breaks down for it. One module for the CLI (`decentra limits`,
 * `decentra spec`), the app's range workspace (in a Web Worker) and the spec sheet.
 * Pure: no DOM, no Node imports.
 *
 * A family is a material, a front-curve rule and a thickness rule (or a fixed front or centre
 * thickness) over every sphere x cylinder x axis it offers. For each lens, each direction and
 * each tolerance a row gives the exact limit at the eye, the first-order thick-lens limit,
 * Prentice's limit and the focimeter limit, what ends the exact one, and the lens form used.
 *
 * Entry points:
 *   readRangeSpec(input, label?)  -> RangeSpec     validation; errors name the flag or field
 *   rangeLenses(spec)             -> RangeLensKey[] the lenses, in row order
 *   rangeRows(spec, options?)     -> RangeRow[]     one row per sphere x cyl x axis x direction x tolerance
 *   breakdown(spec, levels?, options?) -> Breakdown  Prentice's error over power x decentration,
 *                                                    and the largest decentration per power within each level
 *   rangeCsv / rangeJson / rangeMarkdown(rows, decimals)   the table as a file
 *   breakdownCsv / breakdownMarkdown(b, decimals), breakdownJson(b)   the breakdown as a file
 */
import {
  type BoundedLimit, type Eye, type Lens, type LimitEnd, type ScanLimit, boundedLimit, combineBounds, directionLimits, failureMessage,
  largestDiameterMm, linearLimitMm, prenticeBreakdownLimits, prenticeErrorAlong, RayStatus,
} from '../optics/index.ts';
import { fixed } from './fitWords.ts';
import { flagOf } from './flags.ts';
import { InputError, inRange, readNumber } from './input.ts';
import { DEFAULTS, type FieldKey, LIMITS, type LensForm, type RawFields, buildLens, frontPowerOf, readEye, readLensForm } from './lensCase.ts';
import { rangeValues } from './rangeValues.ts';

/** Direction words; what they mean depends on the eye (docs/conventions.md: x towards the wearer's left). */
export const DIRECTION_WORDS = ['nasal', 'temporal', 'up', 'down'] as const;
export type DirectionWord = (typeof DIRECTION_WORDS)[number];

/** A direction of decentration: as the person named it, and its angle counter-clockwise from +x. */
export interface RangeDirection {
  /** 'nasal', 'temporal', 'up', 'down', or the angle as `30°` */
  label: string;
  /** degrees counter-clockwise from +x (the wearer's left), [0, 360) */
  deg: number;
}

/** The fields of a range request besides the lens family's own (names for messages: RANGE_FLAGS). */
export type RangeKey = 'power' | 'cyl' | 'axis' | 'dir' | 'maxPrism' | 'maxMeanError' | 'maxAstigmatism' | 'decimals';

/** A range request as typed: every value text (or numbers), validated by readRangeSpec. */
export interface RangeInput {
  /** sphere powers, D: a value, a list `a,b,c`, or `start:stop:step` (list items may be ranges) */
  power: unknown;
  /** cylinders, D, either sign: as `power`; default 0 */
  cyl?: unknown;
  /** cylinder axes, degrees: as `power`; default 0 */
  axis?: unknown;
  /** directions: words (nasal, temporal, up, down) and/or angles in degrees (`start:stop:step` allowed); default nasal */
  dir?: unknown;
  /** tolerances, Δ: a list, e.g. `0.25,0.5,1` */
  maxPrism: unknown;
  /** optional bounds on the pencil's mean and astigmatic errors at the eye, D (one value each) */
  maxMeanError?: unknown;
  maxAstigmatism?: unknown;
  /** decimals for what people read (CSV, Markdown, the sheet); default 2 */
  decimals?: unknown;
  /**
   * The family's other lens fields (material or index, front or base or front rule, ct or the
   * thickness rule and diameter, conics, cylOn, toric, cr, eye) as for one lens. A fixed
   * front or ct applies to every lens; otherwise the family's rules choose them. Sphere, cyl
   * and axis here are ignored (they come from the lists above).
   */
  fields: RawFields;
}

/** A checked range: everything needed to compute any of its rows. */
export interface RangeSpec {
  /** the family's lens fields, without sphere, cyl and axis */
  fields: RawFields;
  spheres: number[];
  cyls: number[];
  axes: number[];
  directions: RangeDirection[];
  /** Δ, in the order given */
  tolerances: number[];
  /** bounds on the power errors (docs/range.md, "Limits by power"); null when none is asked */
  powerBounds: { maxMeanError?: number; maxAstigmatism?: number } | null;
  eye: Eye;
  /** back vertex to centre of rotation, mm */
  crMm: number;
  decimals: number;
}

/** One lens of the range. */
export interface RangeLensKey {
  sphere: number;
  cyl: number;
  axis: number;
}

/** What ends a row's exact limit: the engine's LimitEnd, or 'lens' when the lens cannot be made. */
export type RowEnd = LimitEnd | 'lens';

/**
 * One row. Limits in mm, null where there is none, and then `reason` says why. Keys and
 * their order are the JSON contract (docs/cli.md, docs/range.md).
 */
export interface RangeRow {
  sphere: number;
  cyl: number;
  axis: number;
  direction: string;
  dirDeg: number;
  maxPrism: number;
  /** exact limit at the eye (line of sight from the centre of rotation), mm */
  exact: number | null;
  /** first-order thick-lens limit, mm */
  firstOrder: number | null;
  /** Prentice's limit P / |F u|, mm (power-matrix form, Long 1976) */
  prentice: number | null;
  /** the decentration at which an exact focimeter reading reaches the tolerance, mm */
  focimeter: number | null;
  /** what ends the exact limit */
  limitedBy: RowEnd;
  /** true front surface power (along the cylinder axis meridian), D */
  front: number | null;
  /** centre thickness, mm */
  ct: number | null;
  /** thinnest edge thickness on the round edge, mm */
  edge: number | null;
  /** round diameter of the lens used, mm */
  diameter: number | null;
  /** where the lens cannot be made at the asked diameter: the largest that can, mm */
  maxDiameter: number | null;
  /** 'ok', or why each null is null (and a note on a zero-power meridian) */
  reason: string;
  // ---- present only when the range asks for power bounds (POWER_COLUMNS)
  /** the bounds, D (null where not asked) */
  maxMeanError?: number | null;
  maxAstigmatism?: number | null;
  /** the largest decentration with the pencil's |mean error| (or astigmatic error) within its bound, mm */
  meanErrorLimit?: number | null;
  astigmatismLimit?: number | null;
  /** the largest decentration within every bound of the row (the prism tolerance and the power bounds), mm */
  bounded?: number | null;
  /** which bound ended it (prism, mean-error, astigmatism), or what ended the scans (edge, geometry, search, lens) */
  boundedBy?: string;
}

/** The row keys, in order (CSV header and JSON key order). */
export const RANGE_COLUMNS = [
  'sphere', 'cyl', 'axis', 'direction', 'dirDeg', 'maxPrism', 'exact', 'firstOrder', 'prentice', 'focimeter',
  'limitedBy', 'front', 'ct', 'edge', 'diameter', 'maxDiameter', 'reason',
] as const satisfies readonly (keyof RangeRow)[];

/** The columns a row has when the range asks for power bounds, after RANGE_COLUMNS. */
export const POWER_COLUMNS = [
  'maxMeanError', 'maxAstigmatism', 'meanErrorLimit', 'astigmatismLimit', 'bounded', 'boundedBy',
] as const satisfies readonly (keyof RangeRow)[];

export type RangeColumn = (typeof RANGE_COLUMNS)[number] | (typeof POWER_COLUMNS)[number];

/** A row's columns: RANGE_COLUMNS, and POWER_COLUMNS where the range asked for power bounds. */
export function rangeColumnsOf(r: RangeRow | undefined): readonly RangeColumn[] {
  return r !== undefined && r.boundedBy !== undefined ? [...RANGE_COLUMNS, ...POWER_COLUMNS] : RANGE_COLUMNS;
}

/** Computed columns: rounded to `decimals` in CSV and Markdown (inputs are printed as given). */
const COMPUTED = new Set<string>(['exact', 'firstOrder', 'prentice', 'focimeter', 'front', 'ct', 'edge', 'maxDiameter', 'meanErrorLimit', 'astigmatismLimit', 'bounded']);

/** The command line's names for the range fields (the default labeller). */
export const RANGE_FLAGS: Record<RangeKey, string> = {
  power: '--power', cyl: '--cyl', axis: '--axis', dir: '--dir', maxPrism: '--max-prism', decimals: '--decimals',
  maxMeanError: '--max-mean-error', maxAstigmatism: '--max-astigmatism',
};

export type RangeLabeller = (key: RangeKey | FieldKey) => string;

/** The default labeller: command-line flags. */
export const flagLabel: RangeLabeller = (key) => (key in RANGE_FLAGS ? RANGE_FLAGS[key as RangeKey] : flagOf(key));

/** Most rows one request may ask for (a slip of a step, not a real range). */
export const MAX_RANGE_ROWS = 2_000_000;

/** The largest makeable diameter is found to this step, mm (blanks come in whole millimetres at best). */
export const MAX_DIAMETER_STEP_MM = 0.5;

/** Default Prentice-error levels of the breakdown, percent. */
export const DEFAULT_LEVELS = [5, 10, 20] as const;

function present(v: unknown): boolean {
  return v !== undefined && v !== null && String(v).trim() !== '';
}

/**
 * Numbers from a value, a list `a,b,c` or `start:stop:step` (each list item may be a range).
 * Errors name `field`.
 */
export function readValueList(field: string, raw: unknown, quantity: 'power' | 'angle' | 'prism' | 'length' | 'plain'): number[] {
  if (typeof raw === 'number') return [readNumber(field, raw, quantity)];
  if (!present(raw)) throw new InputError(field, 'needs a value, a list a,b,c or a range start:stop:step');
  const out: number[] = [];
  for (const item of String(raw).split(',')) {
    const t = item.trim();
    if (t === '') throw new InputError(field, `has an empty item in '${String(raw)}'`);
    if (t.includes(':')) {
      const parts = t.split(':');
      if (parts.length !== 3) throw new InputError(field, `a range is START:STOP:STEP, got '${t}'`);
      const [a, b, s] = parts.map((p) => readNumber(field, p, quantity)) as [number, number, number];
      for (const v of rangeValues(field, a, b, s)) out.push(v);
    } else out.push(readNumber(field, t, quantity));
    if (out.length > 100000) throw new InputError(field, 'gives more than 100000 values');
  }
  return out;
}

/** The angle of a direction word for an eye: nasal is +x for the right eye, -x for the left. */
export function directionDeg(word: DirectionWord, eye: Eye): number {
  switch (word) {
    case 'nasal': return eye === 'R' ? 0 : 180;
    case 'temporal': return eye === 'R' ? 180 : 0;
    case 'up': return 90;
    case 'down': return 270;
  }
}

/** A direction given as an angle (degrees, any turn): labelled `30°`. */
export function angleDirection(deg: number): RangeDirection {
  const d = ((deg % 360) + 360) % 360;
  return { label: `${Number(d.toFixed(10))}°`, deg: d + 0 };
}

/** Directions from words and/or angles (a list; an angle item may be `start:stop:step`). */
export function readDirections(field: string, raw: unknown, eye: Eye): RangeDirection[] {
  if (!present(raw)) throw new InputError(field, `needs directions: ${DIRECTION_WORDS.join(', ')} or angles in degrees`);
  const out: RangeDirection[] = [];
  for (const item of String(raw).split(',')) {
    const t = item.trim().toLowerCase();
    if ((DIRECTION_WORDS as readonly string[]).includes(t)) {
      out.push({ label: t, deg: directionDeg(t as DirectionWord, eye) });
      continue;
    }
    if (!/^[+\-.\d]/.test(t)) {
      throw new InputError(field, `'${item.trim()}' is not a direction: use ${DIRECTION_WORDS.join(', ')} or an angle in degrees`);
    }
    for (const d of readValueList(field, t, 'angle')) out.push(angleDirection(d));
  }
  return out;
}

/**
 * Validate a range request. Errors name the flag or field (by `label`, the CLI's flags by
 * default) and the reason; the family is checked with its first lens's form (each lens is
 * built when its rows are computed, and a lens that cannot be made becomes rows that say so).
 */
export function readRangeSpec(input: RangeInput, label: RangeLabeller = flagLabel): RangeSpec {
  const fields: RawFields = { ...input.fields };
  delete fields.sphere; delete fields.cyl; delete fields.axis; delete fields.x; delete fields.y;
  const spheres = readValueList(label('power'), input.power, 'power');
  for (const p of spheres) inRange(label('power'), p, LIMITS.sphere);
  const cyls = present(input.cyl) ? readValueList(label('cyl'), input.cyl, 'power') : [DEFAULTS.cylD];
  for (const c of cyls) inRange(label('cyl'), c, LIMITS.cyl);
  const axes = present(input.axis) ? readValueList(label('axis'), input.axis, 'angle') : [DEFAULTS.axisDeg];
  for (const a of axes) inRange(label('axis'), a, LIMITS.axis);
  const eye = present(fields.eye) ? readEye(label('eye'), fields.eye) : DEFAULTS.eye;
  const directions = present(input.dir) ? readDirections(label('dir'), input.dir, eye) : [{ label: 'nasal', deg: directionDeg('nasal', eye) }];
  if (!present(input.maxPrism)) throw new InputError(label('maxPrism'), 'is required (the tolerance in prism dioptres; a list gives several)');
  const tolerances = readValueList(label('maxPrism'), input.maxPrism, 'prism');
  for (const t of tolerances) inRange(label('maxPrism'), t, LIMITS.maxPrism);
  const bound = (k: 'maxMeanError' | 'maxAstigmatism'): number | undefined =>
    present(input[k]) ? inRange(label(k), readNumber(label(k), input[k], 'power'), LIMITS.maxPowerError) : undefined;
  const maxMeanError = bound('maxMeanError'), maxAstigmatism = bound('maxAstigmatism');
  const powerBounds = maxMeanError === undefined && maxAstigmatism === undefined ? null
    : { ...(maxMeanError === undefined ? {} : { maxMeanError }), ...(maxAstigmatism === undefined ? {} : { maxAstigmatism }) };
  const decimals = present(input.decimals)
    ? inRange(label('decimals'), readNumber(label('decimals'), input.decimals), { min: 0, max: 10 })
    : 2;
  if (!Number.isInteger(decimals)) throw new InputError(label('decimals'), `must be a whole number, got ${decimals}`);
  const crMm = present(fields.cr) ? inRange(label('cr'), readNumber(label('cr'), fields.cr, 'length'), LIMITS.cr) : DEFAULTS.crMm;
  const n = spheres.length * cyls.length * axes.length * directions.length * tolerances.length;
  if (n > MAX_RANGE_ROWS) throw new InputError(label('power'), `the range gives ${n} rows; at most ${MAX_RANGE_ROWS}`);
  // the family's fields, checked once (the first lens's form)
  readLensForm({ ...fields, sphere: spheres[0], cyl: cyls[0], axis: axes[0] }, label);
  return { fields, spheres, cyls, axes, directions, tolerances, powerBounds, eye, crMm, decimals };
}

/** The lenses of the range, in row order (sphere, then cylinder, then axis). */
export function rangeLenses(spec: RangeSpec): RangeLensKey[] {
  const out: RangeLensKey[] = [];
  for (const sphere of spec.spheres) for (const cyl of spec.cyls) for (const axis of spec.axes) out.push({ sphere, cyl, axis });
  return out;
}

/** Rows per lens: directions x tolerances. */
export function rowsPerLens(spec: RangeSpec): number {
  return spec.directions.length * spec.tolerances.length;
}

/** One lens of the family: the engine lens, or why it cannot be made (and the largest diameter that can). */
export interface RangeLens {
  key: RangeLensKey;
  lens: Lens | null;
  form: LensForm;
  /** why there is no lens ('' when there is one) */
  note: string;
  /** the asked diameter, mm (null when none was given) */
  askedDiameterMm: number | null;
  /** when there is no lens: the largest diameter at which it can be made, mm */
  maxDiameterMm: number | null;
}

/**
 * Lenses already built, per labeller (their notes name fields by it), keyed by the family's
 * fields and the lens: a change of direction, tolerance or levels, or a range that overlaps
 * the last, builds no lens twice. Lenses are immutable once built. Bounded: cleared when full.
 */
const lensCache = new WeakMap<RangeLabeller, Map<string, RangeLens>>();
/** Most lenses kept per labeller. */
export const RANGE_LENS_CACHE_MAX = 20_000;

/** Forget the lenses built so far (for a cold measurement). */
export function clearRangeCache(): void {
  diameterHints.clear();
  lensCache.delete(flagLabel);
  cacheLabels.forEach((l) => lensCache.delete(l));
  cacheLabels.length = 0;
}
const cacheLabels: RangeLabeller[] = [];

/** The last largest diameter found per family, cylinder and axis: a starting point only. */
const diameterHints = new Map<string, number>();

/** Build one lens of the family (a lens that cannot be made is a result, not an exception); remembered. */
export function rangeLens(spec: RangeSpec, key: RangeLensKey, label: RangeLabeller = flagLabel): RangeLens {
  let cache = lensCache.get(label);
  if (!cache) {
    cache = new Map();
    lensCache.set(label, cache);
    if (label !== flagLabel) {
      cacheLabels.push(label);
      // a caller that makes a new labeller each time must not grow the cache without bound
      if (cacheLabels.length > 4) lensCache.delete(cacheLabels.shift()!);
    }
  }
  const id = `${JSON.stringify(spec.fields)}|${key.sphere}|${key.cyl}|${key.axis}`;
  const hit = cache.get(id);
  if (hit) return hit;
  const made = buildRangeLens(spec, key, label);
  if (cache.size >= RANGE_LENS_CACHE_MAX) cache.clear();
  cache.set(id, made);
  return made;
}

function buildRangeLens(spec: RangeSpec, key: RangeLensKey, label: RangeLabeller): RangeLens {
  const form = readLensForm({ ...spec.fields, sphere: key.sphere, cyl: key.cyl, axis: key.axis }, label);
  const th = form.thickness;
  const askedDiameterMm = th.diameterMm ?? null;
  try {
    return { key, lens: buildLens(form, label), form, note: '', askedDiameterMm, maxDiameterMm: null };
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    let maxDiameterMm: number | null = null;
    if (askedDiameterMm !== null) {
      const base = {
        sphereD: form.sphereD, cylD: form.cylD, axisDeg: form.axisDeg, index: form.index, frontD: frontPowerOf(form),
        frontConic: form.frontConic, backConic: form.backConic, cylOn: form.cylOn, toricForm: form.toricForm,
      };
      // the last answer for this family's cylinder and axis starts the search (neighbouring spheres differ little)
      const hintKey = `${JSON.stringify(spec.fields)}|${key.cyl}|${key.axis}`;
      const m = largestDiameterMm(base, th.kind === 'centre' ? { ctMm: th.ctMm } : { minEdgeMm: th.minEdgeMm, minCentreMm: th.minCentreMm },
        askedDiameterMm, LIMITS.diameter.min, MAX_DIAMETER_STEP_MM, diameterHints.get(hintKey));
      if (m !== null) {
        if (diameterHints.size > 1000) diameterHints.clear();
        diameterHints.set(hintKey, m);
      }
      maxDiameterMm = m !== null && m < askedDiameterMm ? m : null;
    }
    return { key, lens: null, form, note: e.message, askedDiameterMm, maxDiameterMm };
  }
}

/** A number to `decimals` places for reasons and tables (tiny values print as 0): the case's one formatter. */
function fx(v: number, decimals = 2): string {
  return fixed(v, decimals);
}

/** Why a scan gave no limit, in words. */
function scanWhy(s: ScanLimit, tol: number, where: string): string {
  switch (s.end) {
    case 'edge':
      return s.status === RayStatus.ok
        ? `${where} stays within ${tol} Δ out to the lens edge (${fx(s.searchedToMm)} mm)`
        : `${where} stays within ${tol} Δ until the ray leaves through the lens edge (by ${fx(s.searchedToMm)} mm)`;
    case 'search':
      return `${where} stays within ${tol} Δ out to ${fx(s.searchedToMm)} mm (no diameter given; the search stops there)`;
    case 'geometry':
      return `${where} stays within ${tol} Δ until the trace fails at ${fx(s.searchedToMm)} mm: ${failureMessage(s.status)}`;
    default:
      return 'ok';
  }
}

/**
 * The power columns of a row (none when the range asks for no power bound): each power
 * bound's limit and the largest decentration within all of the row's bounds, with the one
 * that ended it (limits.ts combineBounds). `byPower` is null when there is no lens; `prism`
 * is the row's exact prism scan and its tolerance, null for a lens bounded by power alone.
 */
export function powerColumns(spec: RangeSpec, byPower: BoundedLimit | null, prism: { scan: ScanLimit; tolerance: number } | null): Partial<RangeRow> {
  const b = spec.powerBounds;
  if (!b) return {};
  const limitOf = (name: 'mean-error' | 'astigmatism'): number | null => byPower?.each.find((x) => x.bound === name)?.limit.mm ?? null;
  const cols = {
    maxMeanError: b.maxMeanError ?? null, maxAstigmatism: b.maxAstigmatism ?? null,
    meanErrorLimit: limitOf('mean-error'), astigmatismLimit: limitOf('astigmatism'),
  };
  if (!byPower) return { ...cols, bounded: null, boundedBy: 'lens' };
  const all = prism ? [{ bound: 'prism' as const, tolerance: prism.tolerance, limit: prism.scan }, ...byPower.each] : byPower.each;
  const c = combineBounds(all);
  return { ...cols, bounded: c.mm, boundedBy: c.endedBy ?? c.end };
}

/** The rows of one lens (all directions and tolerances). */
export function lensRows(spec: RangeSpec, rl: RangeLens): RangeRow[] {
  const { key, lens } = rl;
  const rows: RangeRow[] = [];
  if (!lens) {
    const dia = rl.askedDiameterMm;
    const reason = `no lens: ${rl.note}` + (rl.maxDiameterMm !== null
      ? `; the largest diameter at which this power can be made is ${fx(rl.maxDiameterMm, 1)} mm (to ${MAX_DIAMETER_STEP_MM} mm)`
      : dia !== null ? `; no diameter from ${LIMITS.diameter.min} mm to ${dia} mm makes it` : '');
    for (const dir of spec.directions) {
      for (const tol of spec.tolerances) {
        rows.push({
          sphere: key.sphere, cyl: key.cyl, axis: key.axis, direction: dir.label, dirDeg: dir.deg, maxPrism: tol,
          exact: null, firstOrder: null, prentice: null, focimeter: null, limitedBy: 'lens',
          front: null, ct: null, edge: null, diameter: null, maxDiameter: rl.maxDiameterMm, reason,
          ...powerColumns(spec, null, null),
        });
      }
    }
    return rows;
  }
  const front = lens.frontPowers[0];
  const diameter = Number.isFinite(lens.radiusMm) ? 2 * lens.radiusMm : null;
  const edge = diameter === null ? null : lens.edgeThicknessRange().min;
  for (const dir of spec.directions) {
    const r = directionLimits(lens, spec.crMm, dir.deg, spec.tolerances, true);
    const byPower = spec.powerBounds ? boundedLimit(lens, spec.crMm, dir.deg, spec.powerBounds) : null;
    spec.tolerances.forEach((tol, i) => {
      const e = r.exact[i]!, f = r.focimeter[i]!;
      const prentice = linearLimitMm(r.prenticePerMm, tol);
      const firstOrder = linearLimitMm(r.firstOrderPerMm, tol);
      const why: string[] = [];
      if (prentice === null) why.push(`no limit by Prentice's rule: the lens has no power in the ${dir.label} direction`);
      if (firstOrder === null) why.push(`no first-order limit: no effective power in the ${dir.label} direction`);
      if (e.mm === null) why.push(scanWhy(e, tol, 'the exact prism at the eye'));
      else if (prentice === null) {
        why.push('the exact limit comes from the thickness and form: seen from the centre of rotation a thick meniscus has a small effective power');
      }
      if (f.mm === null) why.push(scanWhy(f, tol, 'the focimeter reading'));
      rows.push({
        sphere: key.sphere, cyl: key.cyl, axis: key.axis, direction: dir.label, dirDeg: dir.deg, maxPrism: tol,
        exact: e.mm, firstOrder, prentice, focimeter: f.mm, limitedBy: e.end,
        front, ct: lens.ctMm, edge, diameter, maxDiameter: null, reason: why.length ? why.join('; ') : 'ok',
        ...powerColumns(spec, byPower, { scan: e, tolerance: tol }),
      });
    });
  }
  return rows;
}

export interface RangeRowsOptions {
  /** indices into rangeLenses(spec) to compute (all by default), e.g. a worker's share */
  lenses?: readonly number[];
  /** after each lens: how many of the asked lenses are done, of how many */
  onLens?: (done: number, total: number) => void;
  label?: RangeLabeller;
}

/** The rows of the range (or of some of its lenses), in row order. */
export function rangeRows(spec: RangeSpec, options: RangeRowsOptions = {}): RangeRow[] {
  const keys = rangeLenses(spec);
  const which = options.lenses ?? keys.map((_, i) => i);
  const rows: RangeRow[] = [];
  which.forEach((li, k) => {
    const key = keys[li];
    if (!key) throw new RangeError(`no lens ${li} in this range`);
    for (const r of lensRows(spec, rangeLens(spec, key, options.label))) rows.push(r);
    options.onLens?.(k + 1, which.length);
  });
  return rows;
}

// ---------------------------------------------------------------- where Prentice breaks down

export interface BreakdownOptions {
  /** the cylinder and axis of the family to chart (default: the first of each) */
  cyl?: number;
  axis?: number;
  /** the direction (default: the first of the spec) */
  direction?: RangeDirection;
  /** the decentrations of the chart's grid, mm (default 0.5 to 30 in 0.5 steps) */
  decentrationsMm?: readonly number[];
}

/** One power's line of the breakdown table. */
export interface BreakdownRow {
  sphere: number;
  /** per level: the largest decentration with |Prentice error| within it, mm; null where none (see ends) */
  within: (number | null)[];
  /** per level: what ends it ('prism' = the error reaches the level) */
  ends: RowEnd[];
  /** per level: how far the search went, mm */
  searchedToMm: number[];
  /** 'ok', or why a value is missing */
  reason: string;
}

/** Prentice's error over power x decentration for one cylinder, axis and direction. */
export interface Breakdown {
  levels: number[];
  cyl: number;
  axis: number;
  direction: RangeDirection;
  spheres: number[];
  decentrationsMm: number[];
  /** [sphere][decentration]: signed error 100 (|Prentice| - |exact|) / |exact|, %; null beyond the lens or where the trace fails */
  percent: (number | null)[][];
  /** [sphere][decentration]: |Prentice| - |exact|, Δ; null likewise */
  prism: (number | null)[][];
  rows: BreakdownRow[];
}

/** The default chart grid: 0.5 to 30 mm in 0.5 mm steps. */
export const BREAKDOWN_DECENTRATIONS_MM: readonly number[] = Array.from({ length: 60 }, (_, i) => 0.5 * (i + 1));

/** Read breakdown levels (percent): a list such as `5,10,20`. */
export function readLevels(field: string, raw: unknown): number[] {
  const levels = present(raw) ? readValueList(field, raw, 'plain') : [...DEFAULT_LEVELS];
  for (const l of levels) inRange(field, l, { min: 0, max: 1000, above: true, unit: '%' });
  return levels;
}

/**
 * Where Prentice's rule breaks down for the family: its error over power x decentration (the
 * chart), and per power the largest decentration at which it stays within each level (the
 * table: the contour of each level, found by scan and bisection on the exact trace).
 */
export function breakdown(spec: RangeSpec, levels: readonly number[] = DEFAULT_LEVELS, options: BreakdownOptions = {}): Breakdown {
  const cyl = options.cyl ?? spec.cyls[0]!;
  const axis = options.axis ?? spec.axes[0]!;
  const direction = options.direction ?? spec.directions[0]!;
  const decs = [...(options.decentrationsMm ?? BREAKDOWN_DECENTRATIONS_MM)];
  const percent: (number | null)[][] = [];
  const prism: (number | null)[][] = [];
  const rows: BreakdownRow[] = [];
  const cell = { prentice: 0, exact: 0, prism: 0, percent: null as number | null, status: RayStatus.ok as RayStatus };
  for (const sphere of spec.spheres) {
    const rl = rangeLens(spec, { sphere, cyl, axis });
    const lens = rl.lens;
    const pc: (number | null)[] = [], pp: (number | null)[] = [];
    for (const d of decs) {
      if (lens && d <= lens.radiusMm && prenticeErrorAlong(lens, spec.crMm, direction.deg, d, cell)) {
        pc.push(cell.percent); pp.push(cell.prism);
      } else { pc.push(null); pp.push(null); }
    }
    percent.push(pc); prism.push(pp);
    if (!lens) {
      rows.push({ sphere, within: levels.map(() => null), ends: levels.map(() => 'lens'), searchedToMm: levels.map(() => 0), reason: `no lens: ${rl.note}` });
      continue;
    }
    const lim = prenticeBreakdownLimits(lens, spec.crMm, direction.deg, levels);
    const why: string[] = [];
    lim.forEach((s, i) => {
      if (s.mm === null) why.push(`${levels[i]} %: ${scanWhy(s, levels[i]!, "Prentice's error").replace(/ Δ/, ' %')}`);
      else if (s.mm < 1e-3) why.push(`${levels[i]} %: Prentice's error exceeds it at any decentration (the thick-lens effect)`);
    });
    rows.push({
      sphere, within: lim.map((s) => s.mm), ends: lim.map((s) => s.end), searchedToMm: lim.map((s) => s.searchedToMm),
      reason: why.length ? why.join('; ') : 'ok',
    });
  }
  return { levels: [...levels], cyl, axis, direction, spheres: [...spec.spheres], decentrationsMm: decs, percent, prism, rows };
}

// ---------------------------------------------------------------- files

/** A CSV cell: finite numbers, text quoted when needed, '' for null. */
function csvText(v: string): string {
  return /[",\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

/** A number for people: computed values to `decimals` places; inputs as given; '' for null or non-finite. */
function readable(v: number | null, decimals: number, computed: boolean): string {
  if (v === null || !Number.isFinite(v)) return '';
  return computed ? fx(v, decimals) : String(v);
}

function cellOf(r: RangeRow, c: RangeColumn, decimals: number): string {
  const v = r[c];
  return typeof v === 'number' || v === null || v === undefined ? readable(v ?? null, decimals, COMPUTED.has(c)) : v;
}

/** One row as a CSV line (no newline); computed values to `decimals` places. */
export function rangeCsvLine(r: RangeRow, decimals = 2): string {
  return rangeColumnsOf(r).map((c) => csvText(cellOf(r, c, decimals))).join(',');
}

/** The rows as CSV: a header of the JSON keys, then a line per row; computed values to `decimals` places. */
export function rangeCsv(rows: readonly RangeRow[], decimals = 2): string {
  return [rangeColumnsOf(rows[0]).join(','), ...rows.map((r) => rangeCsvLine(r, decimals))].join('\n');
}

/** One row as a JSON object on one line, keys in RANGE_COLUMNS order, full precision (never NaN). */
export function rangeJsonLine(r: RangeRow): string {
  return JSON.stringify(Object.fromEntries(rangeColumnsOf(r).map((c) => {
    const v = r[c] ?? null;
    return [c, typeof v === 'number' && !Number.isFinite(v) ? null : v];
  })));
}

/** The rows as a JSON array, one row a line, full precision (null where there is no value; never NaN). */
export function rangeJson(rows: readonly RangeRow[]): string {
  return rows.length ? `[\n${rows.map(rangeJsonLine).join(',\n')}\n]` : '[]';
}

/** Headings of the Markdown table (units in the heading). */
const MD_HEAD: Record<RangeColumn, string> = {
  maxMeanError: 'mean error bound D', maxAstigmatism: 'astigmatism bound D', meanErrorLimit: 'by mean error mm',
  astigmatismLimit: 'by astigmatism mm', bounded: 'within all bounds mm', boundedBy: 'bounded by',
  sphere: 'sphere D', cyl: 'cyl D', axis: 'axis °', direction: 'direction', dirDeg: 'dir °', maxPrism: 'tolerance Δ',
  exact: 'exact mm', firstOrder: 'first-order mm', prentice: 'Prentice mm', focimeter: 'focimeter mm', limitedBy: 'limited by',
  front: 'front D', ct: 'ct mm', edge: 'edge mm', diameter: 'diameter mm', maxDiameter: 'largest diameter mm', reason: 'note',
};

function mdCell(s: string): string {
  return s.replace(/\|/g, '\\|').replace(/\n/g, ' ');
}

/** The rows as a Markdown table; '—' where there is no value, the note only where it is not 'ok'. */
export function rangeMarkdown(rows: readonly RangeRow[], decimals = 2): string {
  const cols = rangeColumnsOf(rows[0]);
  const head = `| ${cols.map((c) => MD_HEAD[c]).join(' | ')} |`;
  const rule = `|${cols.map((c) => (c === 'direction' || c === 'limitedBy' || c === 'reason' || c === 'boundedBy' ? ' --- ' : ' ---: ')).join('|')}|`;
  const body = rows.map((r) => `| ${cols.map((c) => {
    if (c === 'reason') return mdCell(r.reason === 'ok' ? '' : r.reason);
    const s = cellOf(r, c, decimals);
    return s === '' ? '—' : mdCell(s);
  }).join(' | ')} |`);
  return [head, rule, ...body].join('\n');
}

/** One breakdown cell in words: the decentration, or what ends the search. */
export function withinText(row: BreakdownRow, i: number, decimals = 1): string {
  const mm = row.within[i];
  if (mm !== null && mm !== undefined) return mm < 1e-3 ? '0 (exceeded at once)' : fx(mm, decimals);
  switch (row.ends[i]) {
    case 'edge': return `to the edge (${fx(row.searchedToMm[i]!, decimals)})`;
    case 'search': return `beyond ${fx(row.searchedToMm[i]!, 0)}`;
    case 'geometry': return `to ${fx(row.searchedToMm[i]!, decimals)} (trace fails)`;
    default: return 'no lens';
  }
}

/** The breakdown table as CSV: sphere, then per level the largest decentration (mm) and what ends it. */
export function breakdownCsv(b: Breakdown, decimals = 2): string {
  const head = ['sphere', ...b.levels.flatMap((l) => [`within${l}pct_mm`, `within${l}pct_end`]), 'reason'];
  const lines = b.rows.map((r) => [
    String(r.sphere),
    ...b.levels.flatMap((_, i) => [readable(r.within[i] ?? null, decimals, true), r.ends[i]!]),
    csvText(r.reason),
  ].join(','));
  return [head.join(','), ...lines].join('\n');
}

/** The breakdown as JSON: the grid (percent and Δ, null outside the lens) and the table, full precision. */
export function breakdownJson(b: Breakdown): string {
  const finite = (v: number | null | undefined): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
  return JSON.stringify({
    levels: b.levels, cyl: b.cyl, axis: b.axis, direction: b.direction.label, dirDeg: b.direction.deg,
    spheres: b.spheres, decentrationsMm: b.decentrationsMm,
    percent: b.percent.map((r) => r.map(finite)), prism: b.prism.map((r) => r.map(finite)),
    rows: b.rows.map((r) => ({ sphere: r.sphere, within: r.within.map(finite), ends: r.ends, searchedToMm: r.searchedToMm.map(finite), reason: r.reason })),
  });
}

/** The breakdown table as Markdown: sphere, then per level the largest decentration within it, mm. */
export function breakdownMarkdown(b: Breakdown, decimals = 1): string {
  const head = `| sphere D | ${b.levels.map((l) => `within ${l} % (mm)`).join(' | ')} |`;
  const rule = `| ---: | ${b.levels.map(() => '---:').join(' | ')} |`;
  const body = b.rows.map((r) => `| ${r.sphere} | ${b.levels.map((_, i) => withinText(r, i, decimals)).join(' | ')} |`);
  return [head, rule, ...body].join('\n');
}
