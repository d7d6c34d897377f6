/**
 * Batch tables for the app: a sweep (powers x decentrations) and a limits table (powers) of a
 * single-lens family, as CSV or JSON, row for row and byte for byte what `decentra sweep` and
 * `decentra limits --power` print for the same inputs (tests/unit/persist.test.ts compares
 * them with the CLI's own functions; tests/e2e/persist.e2e.ts with the built command).
 *
 * The rows and file formats are src/case/batch.ts's, the same functions the CLI calls; this
 * file only reads the export panel's text fields into a plan (with the CLI's field names in
 * messages) and shows the equivalent command. Pure: no DOM, runs in a worker and in Node.
 */
import { type BatchPlan, type Row, batchRows, formatBatch, limitsPowerRow, rangeValues, shellWord, sweepPowerRows } from '../../case/batch.ts';
import { flagOf } from '../../case/flags.ts';
import { InputError, inRange, readNumber } from '../../case/input.ts';
import { LIMITS, type RawFields, readEye, readLensForm } from '../../case/lensCase.ts';

export { type BatchPlan, type Row, batchRows, formatBatch, limitsPowerRow, sweepPowerRows };

/** One range as the person typed it: first, last, step (text, a unit allowed). */
export interface RangeText {
  from: string;
  to: string;
  step: string;
}

export interface SweepRequest {
  kind: 'sweep';
  /** the lens family: the lens fields of the single-lens view (its sphere is replaced by each power) */
  fields: RawFields;
  power: RangeText;
  decentration: RangeText;
  dir: string;
  format: 'csv' | 'json';
}

export interface LimitsRequest {
  kind: 'limits';
  fields: RawFields;
  power: RangeText;
  maxPrism: string;
  dir: string;
  format: 'csv' | 'json';
}

export type BatchRequest = SweepRequest | LimitsRequest;

/** Largest table the app computes (rows); the CLI has no such limit, a browser tab does. */
export const MAX_ROWS = 250_000;

/**
 * An inclusive range, as `decentra sweep` reads START:STOP:STEP: the same count, and each
 * value rounded to the inputs' decimals (0.1 steps give 0.3, not 0.30000000000000004).
 */
export function readRangeParts(field: string, r: RangeText, quantity: 'power' | 'length'): number[] {
  const a = readNumber(`${field} from`, r.from, quantity);
  const b = readNumber(`${field} to`, r.to, quantity);
  const s = readNumber(`${field} step`, r.step, quantity);
  return rangeValues(field, a, b, s, `${field} step`);
}

/** Check a request (fast: builds no lens but the first); an InputError names the field. */
export function planBatch(req: BatchRequest): BatchPlan {
  const f: RawFields = { ...req.fields };
  delete f.sphere;
  delete f.x;
  delete f.y;
  const powers = readRangeParts('powers', req.power, 'power');
  for (const p of powers) inRange('powers', p, LIMITS.sphere);
  let decs: number[] = [];
  let maxPrism = 0;
  if (req.kind === 'sweep') {
    decs = readRangeParts('decentrations', req.decentration, 'length');
    for (const d of decs) inRange('decentrations', d, LIMITS.point);
    if (powers.length * decs.length > MAX_ROWS) {
      throw new InputError('decentrations', `powers x decentrations give ${powers.length * decs.length} rows; the app makes at most ${MAX_ROWS} (the command line has no limit)`);
    }
  } else {
    maxPrism = inRange('tolerance', readNumber('tolerance', req.maxPrism, 'prism'), LIMITS.maxPrism);
  }
  const dirDeg = req.dir.trim() === '' ? 0 : readNumber('direction', req.dir, 'angle');
  const cr = f.cr === undefined || f.cr === '' ? 27 : inRange(flagOf('cr'), readNumber(flagOf('cr'), f.cr, 'length'), LIMITS.cr);
  const eye = f.eye === undefined || f.eye === '' ? 'R' : readEye(flagOf('eye'), f.eye);
  readLensForm({ ...f, sphere: powers[0] }, flagOf);
  return { kind: req.kind, fields: f, powers, decs, dirDeg, cr, eye, maxPrism, format: req.format };
}


/**
 * The command line that prints the same table (shown in the export panel, so that a table
 * made in the app can be made again, or checked, with the CLI).
 */
export function equivalentCommand(plan: BatchPlan, req: BatchRequest): string {
  const range = (r: RangeText) => `${r.from.trim()}:${r.to.trim()}:${r.step.trim()}`;
  const words: string[] = ['decentra', plan.kind];
  words.push('--power', range(req.power));
  if (req.kind === 'sweep') words.push('--decentration', range(req.decentration));
  else words.push('--max-prism', req.maxPrism.trim());
  if (req.dir.trim() !== '') words.push('--dir', req.dir.trim());
  for (const [k, val] of Object.entries(plan.fields)) {
    if (val === undefined || val === null || String(val).trim() === '') continue;
    words.push(flagOf(k), String(val).trim());
  }
  words.push('--format', plan.format);
  return words.map(shellWord).join(' ');
}
