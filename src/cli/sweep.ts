/**
 * `decentra sweep`: a grid over back vertex power and decentration for a lens family, as CSV
 * (default) or JSON. Each power gets its own lens from the family's front-curve and
 * thickness rules; each decentration is traced exactly. The rows come from src/case/batch.ts,
 * which the app's export uses too.
 */
import { type BatchPlan, type Row, batchRows, formatBatch, rangeValues } from '../case/batch.ts';
import { InputError, inRange, readNumber } from '../case/input.ts';
import { LIMITS, readEye, readLensForm } from '../case/lensCase.ts';
import { LENS_FLAGS, flagOf, parseArgs, rawFields, strayArgument } from './args.ts';

export const SWEEP_HELP = `decentra sweep: prism over a grid of powers and decentrations for a lens family.

Usage: decentra sweep --power START:STOP:STEP --decentration START:STOP:STEP [options]

  --power D:D:D          back vertex (sphere) powers, inclusive, e.g. 6:12:0.5
  --decentration mm:mm:mm decentrations from the optical centre, e.g. 0:20:2
  --dir deg              direction of decentration, counter-clockwise from +x, the wearer's
                         left (default 0; with --eye R that is nasal)
  --format csv|json      output (default csv)
Lens family (as for decentra trace): --cyl --axis --index|--material --front|--base|--front-rule
  --ct | --min-edge --min-ct --diameter   --front-k --back-k --cyl-on --toric --cr --eye
  --help                 this text

Columns: power_D, decentration_mm, front_D, ct_mm, then for prentice, paraxial (first-order
thick lens), exact and focimeter: the prism magnitude in Δ, and error_prism (|Prentice| -
|exact|, Δ), error_percent, status (ok, or why there is no exact value). An empty cell
means no value.

Rows are written as they are computed, so a long table starts at once and uses little
memory; from 50000 rows the work is shared by worker threads, one per core, unless the
machine is heavily loaded (set DECENTRA_WORKERS=N to choose, 0 for this thread only). A
progress bar shows on stderr when it is a terminal. Ctrl-C stops at once.
`;

const SWEEP_FLAGS = {
  values: [...Object.keys(LENS_FLAGS).filter((k) => k !== 'sphere'), 'power', 'decentration', 'dir', 'format'],
  switches: ['help'],
};

/** Inclusive range START:STOP:STEP. */
export function readRange(flag: string, raw: string | undefined, quantity: 'power' | 'length'): number[] {
  if (raw === undefined) throw new InputError(flag, 'is required, as START:STOP:STEP');
  const parts = raw.split(':');
  if (parts.length !== 3) throw new InputError(flag, `must be START:STOP:STEP, got '${raw}'`);
  const [a, b, s] = parts.map((p) => readNumber(flag, p, quantity)) as [number, number, number];
  return rangeValues(flag, a, b, s);
}

export type SweepPlan = BatchPlan;
export type SweepRow = Row;

/** Read and check the flags; null for --help. */
export function planSweep(argv: readonly string[]): SweepPlan | null {
  const args = parseArgs(argv, SWEEP_FLAGS);
  if (args.switches.has('help')) return null;
  if (args.positional.length) throw strayArgument(args.positional[0]!);
  const powers = readRange('--power', args.values.get('power'), 'power');
  for (const p of powers) inRange('--power', p, LIMITS.sphere);
  const decs = readRange('--decentration', args.values.get('decentration'), 'length');
  for (const d of decs) inRange('--decentration', d, LIMITS.point);
  const dirRaw = args.values.get('dir');
  const dirDeg = dirRaw === undefined ? 0 : readNumber('--dir', dirRaw, 'angle');
  const format = args.values.get('format') ?? 'csv';
  if (format !== 'csv' && format !== 'json') throw new InputError('--format', `must be csv or json, got '${format}'`);
  const f = rawFields(args);
  const cr = f.cr === undefined ? 27 : inRange('--cr', readNumber('--cr', f.cr, 'length'), LIMITS.cr);
  const eye = f.eye === undefined ? 'R' : readEye('--eye', f.eye);
  // validate the family once (with the first power); each power is checked again when built
  readLensForm({ ...f, sphere: powers[0] }, flagOf);
  return { kind: 'sweep', fields: f, powers, decs, dirDeg, cr, eye, maxPrism: 0, format };
}

/** The rows of some of the plan's powers (all by default), in order. */
export function sweepRows(plan: SweepPlan, powers = plan.powers, onPower?: (done: number) => void): SweepRow[] {
  return batchRows(plan, powers, onPower);
}

export const formatSweep = formatBatch;

export function runSweep(argv: readonly string[]): string {
  const plan = planSweep(argv);
  if (!plan) return SWEEP_HELP;
  return formatSweep(plan, sweepRows(plan));
}
