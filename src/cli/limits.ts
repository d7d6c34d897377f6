/**
 * `decentra limits`: the largest decentration that keeps the prism at the eye within a
 * tolerance, for one lens or for a whole range (src/case/range.ts, docs/range.md).
 */
import { InputError, inRange, readNumber } from '../case/input.ts';
import { LIMITS, buildLens, readLensForm } from '../case/lensCase.ts';
import {
  type RangeInput, type RangeRow, type RangeSpec, breakdown, breakdownCsv, breakdownJson, breakdownMarkdown, lensRows, powerColumns, readLevels, rangeCsv, rangeJson, rangeLens, rangeMarkdown, rangeRows, readRangeSpec,
} from '../case/range.ts';
import { type Lens, boundedLimit, directionLimits } from '../optics/index.ts';
import { LENS_FLAGS, type ParsedArgs, flagOf, parseArgs, rawFields } from './args.ts';
import { CAUTION, table } from './format.ts';

export const LIMITS_HELP = `decentra limits: how far a lens may be decentred before the prism leaves a tolerance.

Usage: decentra limits --sphere D --max-prism P [--dir DIR] [lens flags] [--json]
       decentra limits --power LIST --max-prism LIST [--cyl LIST] [--axis LIST] [--dir LIST]
                       [lens flags] [--format csv|json|md] [--decimals N]

  --max-prism P     tolerance, prism dioptres (e.g. 0.5); a list gives several (0.25,0.5,1)
  --max-mean-error D, --max-astigmatism D
                    bounds on the power the eye gets along the same lines of sight (the
                    pencil's mean and astigmatic errors at the vertex sphere, 0 to 10 D); one
                    lens may give them alone; a range adds the columns maxMeanError,
                    maxAstigmatism, meanErrorLimit, astigmatismLimit, bounded (mm, within every
                    bound) and boundedBy (prism, mean-error, astigmatism, or what ended the scan)
  --dir DIR         direction of decentration: nasal, temporal, up, down (for the eye of
                    --eye), or degrees counter-clockwise from +x, the wearer's left (default 0);
                    a list gives several (nasal,temporal,up,down or 0:315:45)
  --power LIST      sphere powers of a range instead of one lens
  --cyl LIST        cylinders (either sign) of the range; --axis LIST their axes
                    LIST is a value, a list a,b,c, or START:STOP:STEP (items may be ranges)
  --format F        csv (default), json (an array of rows, full precision) or md (Markdown)
  --decimals N      decimals of computed values in csv, md and the text answer (default 2)
  --breakdown L     instead of the limits: where Prentice's rule breaks down, per sphere the
                    largest decentration (mm) at which its error stays within each level L
                    (percent, e.g. 5,10,20), along the first direction, for the first cyl and axis
Lens flags as for decentra trace (--cr for the centre of rotation distance). A fixed --front
or --ct applies to every lens of a range; otherwise the family's rules choose them.

One lens, --json: {"exact", "paraxial", "prentice", "focimeter": mm, "difference": mm
(Prentice - exact), "limitedBy": {per answer: prism, edge, geometry, search or none},
"maxPrism", "direction": degrees, "reason"}: a value is null where the prism never reaches the
tolerance, and "reason" says why for each null.

A range: one row per sphere x cyl x axis x direction x tolerance, with keys sphere, cyl, axis,
direction, dirDeg, maxPrism, exact, firstOrder, prentice, focimeter (mm), limitedBy (what ends
the exact limit: prism, edge, geometry, search, or lens when the lens cannot be made), front
(D), ct, edge, diameter, maxDiameter (mm; the largest diameter that can be made where the asked
one cannot) and reason. See docs/range.md.
`;

const LIMIT_FLAGS = {
  values: [...Object.keys(LENS_FLAGS), 'max-prism', 'max-mean-error', 'max-astigmatism', 'dir', 'power', 'format', 'decimals', 'breakdown'],
  switches: ['json', 'help'],
};

/** Range flags (for `decentra spec` too): the lens flags and the range's lists. */
export const RANGE_FLAG_NAMES = [...Object.keys(LENS_FLAGS), 'max-prism', 'dir', 'power', 'decimals'] as const;

const isList = (v: string | undefined): boolean => v !== undefined && /[,:]/.test(v);

/** The range input of parsed flags (the sphere list from --power, or --sphere). */
export function rangeInputOf(args: ParsedArgs): RangeInput {
  const f = rawFields(args);
  const power = args.values.get('power');
  if (power !== undefined && f.sphere !== undefined) throw new InputError('--power', 'give either --sphere or --power, not both');
  if (power === undefined && f.sphere === undefined) throw new InputError('--power', 'is required (the sphere powers of the range)');
  return {
    power: power ?? f.sphere, cyl: f.cyl, axis: f.axis, dir: args.values.get('dir') ?? '0',
    // the breakdown needs no tolerance: any valid one stands in
    maxPrism: args.values.get('max-prism') ?? (args.values.has('breakdown') ? '1' : undefined), decimals: args.values.get('decimals'), fields: f,
    maxMeanError: args.values.get('max-mean-error'), maxAstigmatism: args.values.get('max-astigmatism'),
  };
}

/** Read the range flags into a checked range. */
export function readRangeFlags(args: ParsedArgs): RangeSpec {
  return readRangeSpec(rangeInputOf(args));
}

export function runLimits(argv: readonly string[]): string {
  const args = parseArgs(argv, LIMIT_FLAGS);
  if (args.switches.has('help')) return LIMITS_HELP;
  if (args.positional.length) throw new InputError(args.positional[0]!, 'unexpected argument (flags start with --)');
  const v = args.values;
  const byPower = v.has('max-mean-error') || v.has('max-astigmatism');
  if (v.get('max-prism') === undefined && !v.has('breakdown') && !byPower) {
    throw new InputError('--max-prism', 'is required (the tolerance in prism dioptres), or give --max-mean-error or --max-astigmatism');
  }
  const f = rawFields(args);
  const table_ = v.has('power') || v.has('breakdown') || [v.get('max-prism'), v.get('dir'), f.cyl, f.axis].some((x) => isList(x as string | undefined));
  if (table_) {
    if (v.get('max-prism') === undefined && !v.has('breakdown')) {
      throw new InputError('--max-prism', 'is required for a range table (each row is one prism tolerance; the power bounds add columns)');
    }
    const format = v.get('format') ?? (args.switches.has('json') ? 'json' : 'csv');
    if (format !== 'csv' && format !== 'json' && format !== 'md') throw new InputError('--format', `must be csv, json or md, got '${format}'`);
    const spec = readRangeFlags(args);
    if (v.has('breakdown')) {
      const b = breakdown(spec, readLevels('--breakdown', v.get('breakdown')));
      return format === 'json' ? breakdownJson(b) : format === 'md' ? breakdownMarkdown(b, spec.decimals) : breakdownCsv(b, spec.decimals);
    }
    const rows = rangeRows(spec);
    return format === 'json' ? rangeJson(rows) : format === 'md' ? rangeMarkdown(rows, spec.decimals) : rangeCsv(rows, spec.decimals);
  }
  if (v.has('format')) throw new InputError('--format', 'is for a range table (--power); one lens prints text, or JSON with --json');
  return v.get('max-prism') === undefined ? powerOnlyLens(args) : oneLens(args);
}

/** The power columns of one lens's row, as the JSON object of docs/range.md ("Limits by power"). */
function powerJsonOf(r: RangeRow): object {
  return {
    maxMeanError: r.maxMeanError, maxAstigmatism: r.maxAstigmatism, meanErrorLimit: r.meanErrorLimit,
    astigmatismLimit: r.astigmatismLimit, bounded: r.bounded, boundedBy: r.boundedBy,
  };
}

/** The power lines of one lens's text answer. */
function powerTextOf(r: RangeRow, d: number, withPrism: boolean): string[] {
  const mm = (x: number | null | undefined) => (x === null || x === undefined ? 'no limit within the lens' : `${x.toFixed(d)} mm`);
  const ended = r.boundedBy === 'prism' ? 'the prism' : r.boundedBy === 'mean-error' ? 'the mean error'
    : r.boundedBy === 'astigmatism' ? 'the astigmatic error' : `no bound (${r.boundedBy})`;
  return [
    `The power the eye gets along the same lines of sight (docs/method.md, "Power at the visual point"):`,
    table([
      ...(r.maxMeanError !== null && r.maxMeanError !== undefined ? [[`mean error within ${r.maxMeanError} D`, mm(r.meanErrorLimit)]] : []),
      ...(r.maxAstigmatism !== null && r.maxAstigmatism !== undefined ? [[`astigmatic error within ${r.maxAstigmatism} D`, mm(r.astigmatismLimit)]] : []),
      [withPrism ? 'within every bound, prism included' : 'within every bound', `${mm(r.bounded)}, ended by ${ended}`],
    ]),
  ];
}

/** One lens bounded by power only (no --max-prism): the largest decentration within the power bounds. */
function powerOnlyLens(args: ParsedArgs): string {
  const v = args.values;
  const f = rawFields(args);
  const form = readLensForm(f, flagOf);
  // the range layer reads the bounds and the direction; a prism tolerance stands in and is not reported
  const spec = readRangeSpec({
    power: form.sphereD, cyl: form.cylD, axis: form.axisDeg, dir: v.get('dir') ?? '0', maxPrism: LIMITS.maxPrism.max,
    decimals: v.get('decimals'), fields: f, maxMeanError: v.get('max-mean-error'), maxAstigmatism: v.get('max-astigmatism'),
  });
  const dir = spec.directions[0]!;
  const rl = rangeLens(spec, { sphere: form.sphereD, cyl: form.cylD, axis: form.axisDeg });
  if (!rl.lens) buildLens(form, flagOf); // the engine's refusal, naming the value
  const row = powerColumns(spec, boundedLimit(rl.lens!, spec.crMm, dir.deg, spec.powerBounds!), null) as RangeRow;
  if (args.switches.has('json')) return JSON.stringify({ direction: dir.deg, power: powerJsonOf(row) });
  const named = dir.label.endsWith('°') ? `${dir.label}` : `${dir.label} (${dir.deg}°)`;
  return [
    `Largest decentration towards ${named} within the power bounds at the eye:`,
    ...powerTextOf(row, spec.decimals, false),
    CAUTION,
  ].join('\n');
}

/** One lens: a lens that cannot be made is an error here, not a row. */
function oneLens(args: ParsedArgs): string {
  const v = args.values;
  const maxPrism = inRange('--max-prism', readNumber('--max-prism', v.get('max-prism'), 'prism'), LIMITS.maxPrism);
  const f = rawFields(args);
  const form = readLensForm(f, flagOf);
  const spec = readRangeSpec({
    power: form.sphereD, cyl: form.cylD, axis: form.axisDeg, dir: v.get('dir') ?? '0', maxPrism, decimals: v.get('decimals'), fields: f,
    maxMeanError: v.get('max-mean-error'), maxAstigmatism: v.get('max-astigmatism'),
  });
  const dir = spec.directions[0]!;
  const rl = rangeLens(spec, { sphere: form.sphereD, cyl: form.cylD, axis: form.axisDeg });
  if (!rl.lens) {
    // the engine's refusal, with the diameter that would work
    try {
      buildLens(form, flagOf);
    } catch (e) {
      if (e instanceof InputError && rl.maxDiameterMm !== null) {
        throw new InputError(e.field, `${e.reason}; the largest diameter at which this lens can be made is ${rl.maxDiameterMm.toFixed(1)} mm`);
      }
      throw e;
    }
  }
  const r = lensRows(spec, rl)[0]!;
  const difference = r.exact !== null && r.prentice !== null ? r.prentice - r.exact : null;
  if (args.switches.has('json')) {
    return JSON.stringify({
      exact: r.exact, prentice: r.prentice, paraxial: r.firstOrder, focimeter: r.focimeter, difference,
      maxPrism, direction: dir.deg, limitedBy: limitedByOf(r, rl.lens!, spec.crMm), reason: r.reason,
      ...(spec.powerBounds ? { power: powerJsonOf(r) } : {}),
    });
  }
  const d = spec.decimals;
  const mm = (x: number | null) => (x === null ? '-' : `${x.toFixed(d)} mm`);
  const named = dir.label.endsWith('°') ? `${dir.label}` : `${dir.label} (${dir.deg}°)`;
  return [
    `Largest decentration towards ${named} with at most ${maxPrism} Δ at the eye (${r.limitedBy === 'prism' ? 'ended by the prism' : `no limit within the lens: ${r.limitedBy}`}):`,
    table([
      ['exact (line of sight)', mm(r.exact)],
      ['first-order thick lens', mm(r.firstOrder)],
      ["Prentice's rule", mm(r.prentice)],
      ['Prentice minus exact', mm(difference)],
      ['exact focimeter reading', mm(r.focimeter)],
    ]),
    `Lens: front ${r.front!.toFixed(2)} D, centre ${r.ct!.toFixed(2)} mm` +
      (r.edge !== null ? `, thinnest edge ${r.edge.toFixed(2)} mm on ${r.diameter} mm` : ''),
    r.reason === 'ok' ? '' : `Note: ${r.reason}.`,
    ...(spec.powerBounds ? powerTextOf(r, d, true) : []),
    CAUTION,
  ].filter(Boolean).join('\n');
}

/** What ends each answer of one lens: the exact and focimeter scans' ends, and the closed forms' ('prism', or 'none' for no power). */
function limitedByOf(r: RangeRow, lens: Lens, crMm: number): Record<'exact' | 'paraxial' | 'prentice' | 'focimeter', string> {
  const foc = directionLimits(lens, crMm, r.dirDeg, [r.maxPrism], true).focimeter[0]!;
  return {
    exact: r.limitedBy,
    paraxial: r.firstOrder === null ? 'none' : 'prism',
    prentice: r.prentice === null ? 'none' : 'prism',
    focimeter: foc.end,
  };
}
