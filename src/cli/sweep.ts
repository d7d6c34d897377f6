/**
 * `decentra sweep`: a grid over back vertex power and decentration for a lens family, as CSV
 * (default) or JSON. Each power gets its own lens from the family's front-curve and
 * thickness rules; each decentration is traced exactly.
 */
import { InputError, inRange, readNumber } from '../case/input.ts';
import { type Labeller, type LensForm, LIMITS, type RawFields, buildLens, readEye, readLensForm } from '../case/lensCase.ts';
import { type Lens, fourAnswers, isFailure } from '../optics/index.ts';
import { LENS_FLAGS, flagOf, parseArgs } from './args.ts';
import { csvCell } from './format.ts';
import { rawFields } from './trace.ts';

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
  if (s === 0 && a !== b) throw new InputError(flag, 'step must not be 0');
  if (a !== b && Math.sign(b - a) !== Math.sign(s)) throw new InputError(flag, `step ${s} does not lead from ${a} to ${b}`);
  const n = a === b ? 1 : Math.floor((b - a) / s + 1e-9) + 1;
  if (n > 100000) throw new InputError(flag, `gives ${n} values; at most 100000`);
  // round to the step's decimals so that 0.1 steps print as 0.3, not 0.30000000000000004
  const dec = Math.min(10, Math.max(...[a, b, s].map((v) => (String(v).split('.')[1] ?? '').length)));
  return Array.from({ length: n }, (_, i) => Number((a + i * s).toFixed(dec)));
}

export type SweepRow = Record<string, number | string | null>;

/** A validated sweep: everything needed to compute any subset of its rows. */
export interface SweepPlan {
  fields: RawFields;
  powers: number[];
  decs: number[];
  dirDeg: number;
  cr: number;
  eye: 'R' | 'L';
  format: 'csv' | 'json';
}

/** Read and check the flags; null for --help. */
export function planSweep(argv: readonly string[]): SweepPlan | null {
  const args = parseArgs(argv, SWEEP_FLAGS);
  if (args.switches.has('help')) return null;
  if (args.positional.length) throw new InputError(args.positional[0]!, 'unexpected argument (flags start with --)');
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
  return { fields: f, powers, decs, dirDeg, cr, eye, format };
}

/** The rows of some of the plan's powers (all by default), in order. */
export function sweepRows(plan: SweepPlan, powers = plan.powers, onPower?: (done: number) => void): SweepRow[] {
  const { fields: f, decs, dirDeg, cr, eye } = plan;
  const label: Labeller = flagOf;
  const ux = Math.cos((dirDeg * Math.PI) / 180), uy = Math.sin((dirDeg * Math.PI) / 180);
  const rows: SweepRow[] = [];
  powers.forEach((p, i) => {
    const form: LensForm = readLensForm({ ...f, sphere: p }, label);
    let lens: Lens | null = null;
    let note = '';
    try {
      lens = buildLens(form, label);
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      note = e.message;
    }
    for (const d of decs) {
      const row: SweepRow = {
        power_D: p, decentration_mm: d, front_D: lens ? lens.frontPowers[0] : null, ct_mm: lens ? lens.ctMm : null,
        prentice: null, paraxial: null, exact: null, focimeter: null, error_prism: null, error_percent: null,
        status: 'lens', note,
      };
      if (lens) {
        if (Math.abs(d) > lens.radiusMm) {
          row.status = 'edge';
          row.note = `beyond the ${2 * lens.radiusMm} mm lens`;
        } else {
          const r = fourAnswers(lens, cr, d * ux, d * uy, eye);
          row.prentice = r.prentice.magnitude;
          row.paraxial = r.paraxial.magnitude;
          row.exact = isFailure(r.exact) ? null : r.exact.magnitude;
          row.focimeter = isFailure(r.focimeter) ? null : r.focimeter.magnitude;
          row.error_prism = r.error ? r.error.prism : null;
          row.error_percent = r.error ? r.error.percent : null;
          row.status = isFailure(r.exact) ? r.exact.failure : 'ok';
          row.note = isFailure(r.exact) ? r.exact.message : '';
        }
      }
      rows.push(row);
    }
    onPower?.(i + 1);
  });
  return rows;
}

export function formatSweep(plan: SweepPlan, rows: SweepRow[]): string {
  if (plan.format === 'json') return JSON.stringify({ direction: plan.dirDeg, eye: plan.eye, cr: plan.cr, rows });
  const cols = Object.keys(rows[0]!);
  return [cols.join(','), ...rows.map((r) => cols.map((c) => csvCell(r[c] ?? null)).join(','))].join('\n');
}

export function runSweep(argv: readonly string[]): string {
  const plan = planSweep(argv);
  if (!plan) return SWEEP_HELP;
  return formatSweep(plan, sweepRows(plan));
}
