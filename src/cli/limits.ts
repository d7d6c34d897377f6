/** `decentra limits`: the largest decentration that keeps the prism at the eye within a tolerance. */
import { type BatchPlan, type Row, batchRows, formatBatch, limitsPowerRow } from '../case/batch.ts';
import { InputError, inRange, readNumber } from '../case/input.ts';
import { LIMITS, buildLens, readEye, readLensForm } from '../case/lensCase.ts';
import { LENS_FLAGS, flagOf, parseArgs, rawFields } from './args.ts';
import { CAUTION, table } from './format.ts';
import { readRange } from './sweep.ts';

export const LIMITS_HELP = `decentra limits: how far a lens may be decentred before the prism leaves a tolerance.

Usage: decentra limits --sphere D --max-prism P [--dir deg] [lens flags] [--json]
       decentra limits --power START:STOP:STEP --max-prism P [--dir deg] [lens flags] [--format csv|json]

  --max-prism P     tolerance, prism dioptres (e.g. 0.5)
  --dir deg         direction of decentration, counter-clockwise from +x, the wearer's left (default 0)
  --power D:D:D     a table over back vertex powers of a lens family instead of one lens
Lens flags as for decentra trace (--cr for the centre of rotation distance).

JSON for one lens: {"exact": mm, "prentice": mm, "paraxial": mm, "difference": mm (Prentice - exact)};
a value is null where the prism never reaches the tolerance (no power along that direction, or
not within the lens), and then "reason" says which.
`;

const LIMIT_FLAGS = {
  values: [...Object.keys(LENS_FLAGS), 'max-prism', 'dir', 'power', 'format'],
  switches: ['json', 'help'],
};

export function runLimits(argv: readonly string[]): string {
  const args = parseArgs(argv, LIMIT_FLAGS);
  if (args.switches.has('help')) return LIMITS_HELP;
  if (args.positional.length) throw new InputError(args.positional[0]!, 'unexpected argument (flags start with --)');
  const rawP = args.values.get('max-prism');
  if (rawP === undefined) throw new InputError('--max-prism', 'is required (the tolerance in prism dioptres)');
  const maxPrism = inRange('--max-prism', readNumber('--max-prism', rawP, 'prism'), { min: 0, max: 50, above: true, unit: 'Δ' });
  const dirRaw = args.values.get('dir');
  const dir = dirRaw === undefined ? 0 : readNumber('--dir', dirRaw, 'angle');
  const f = rawFields(args);
  const cr = f.cr === undefined ? 27 : inRange('--cr', readNumber('--cr', f.cr, 'length'), LIMITS.cr);
  const powerRange = args.values.get('power');
  if (powerRange !== undefined && f.sphere !== undefined) throw new InputError('--power', 'give either --sphere or --power, not both');
  const powers = powerRange === undefined ? null : readRange('--power', powerRange, 'power');
  if (powers) for (const p of powers) inRange('--power', p, LIMITS.sphere);
  const format = args.values.get('format') ?? (args.switches.has('json') ? 'json' : 'csv');
  if (format !== 'csv' && format !== 'json') throw new InputError('--format', `must be csv or json, got '${format}'`);
  const eye = f.eye === undefined ? 'R' : readEye('--eye', f.eye);
  const plan: BatchPlan = { kind: 'limits', fields: f, powers: powers ?? [], decs: [], dirDeg: dir, cr, eye, maxPrism, format };
  let rows: Row[];
  if (powers) {
    readLensForm({ ...f, sphere: powers[0] }, flagOf);
    rows = batchRows(plan);
  } else {
    // one lens: a lens that cannot be made is an error here, not a row
    const form = readLensForm(f, flagOf);
    buildLens(form, flagOf);
    rows = [limitsPowerRow(plan, form.sphereD)];
  }
  if (!powers) {
    const r = rows[0]!;
    if (args.switches.has('json')) {
      return JSON.stringify({ exact: r.exact, prentice: r.prentice, paraxial: r.paraxial, difference: r.difference, maxPrism, direction: dir, reason: r.reason });
    }
    const mm = (v: unknown) => (typeof v === 'number' ? `${v.toFixed(2)} mm` : '-');
    return [
      `Largest decentration along ${dir}° with at most ${maxPrism} Δ at the eye:`,
      table([
        ['exact (line of sight)', mm(r.exact)],
        ['first-order thick lens', mm(r.paraxial)],
        ["Prentice's rule", mm(r.prentice)],
        ['Prentice minus exact', mm(r.difference)],
      ]),
      r.reason === 'ok' ? '' : `Note: ${r.reason}.`,
      CAUTION,
    ].filter(Boolean).join('\n');
  }
  return formatBatch(plan, rows);
}
