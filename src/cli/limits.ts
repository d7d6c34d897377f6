/** `decentra limits`: the largest decentration that keeps the prism at the eye within a tolerance. */
import { InputError, inRange, readNumber } from '../case/input.ts';
import { LIMITS, buildLens, readLensForm } from '../case/lensCase.ts';
import { decentrationLimit } from '../optics/index.ts';
import { LENS_FLAGS, flagOf, parseArgs } from './args.ts';
import { CAUTION, csvCell, table } from './format.ts';
import { readRange } from './sweep.ts';
import { rawFields } from './trace.ts';

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
  const rows = (powers ?? [undefined]).map((p) => {
    const form = readLensForm(p === undefined ? f : { ...f, sphere: p }, flagOf);
    if (powers) inRange('--power', form.sphereD, LIMITS.sphere);
    let lens;
    try {
      lens = buildLens(form, flagOf);
    } catch (e) {
      if (powers && e instanceof InputError) return { power: form.sphereD, exact: null, prentice: null, paraxial: null, difference: null, reason: e.message };
      throw e;
    }
    const r = decentrationLimit(lens, cr, dir, maxPrism);
    const reason = r.exactReason === 'ok' ? 'ok' : r.exactReason === 'never-reached'
      ? `the exact prism stays within ${maxPrism} Δ out to ${r.searchedToMm} mm`
      : `the exact trace fails beyond ${r.searchedToMm} mm`;
    const exact = r.exactReason === 'ok' ? r.exactMm : null;
    return {
      power: form.sphereD, front: lens.frontPowers[0], ct: lens.ctMm, exact, prentice: r.prenticeMm, paraxial: r.paraxialMm,
      difference: exact !== null && r.prenticeMm !== null ? r.prenticeMm - exact : null, reason,
    };
  });
  if (!powers) {
    const r = rows[0]!;
    if (args.switches.has('json')) {
      return JSON.stringify({ exact: r.exact, prentice: r.prentice, paraxial: r.paraxial, difference: r.difference, maxPrism, direction: dir, reason: r.reason });
    }
    const mm = (v: number | null | undefined) => (v === null || v === undefined ? '-' : `${v.toFixed(2)} mm`);
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
  const format = args.values.get('format') ?? (args.switches.has('json') ? 'json' : 'csv');
  if (format !== 'csv' && format !== 'json') throw new InputError('--format', `must be csv or json, got '${format}'`);
  if (format === 'json') return JSON.stringify({ maxPrism, direction: dir, cr, rows });
  const cols = ['power', 'front', 'ct', 'exact', 'paraxial', 'prentice', 'difference', 'reason'];
  const head = ['power_D', 'front_D', 'ct_mm', 'exact_mm', 'paraxial_mm', 'prentice_mm', 'prentice_minus_exact_mm', 'note'];
  return [head.join(','), ...rows.map((r) => cols.map((c) => csvCell((r as Record<string, number | string | null>)[c] ?? null)).join(','))].join('\n');
}
