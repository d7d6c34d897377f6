/** `decentra spec`: the range's printable spec sheet (docs/range.md). */
import { shellWord } from '../case/batch.ts';
import { InputError } from '../case/input.ts';
import { breakdown, rangeRows, readLevels } from '../case/range.ts';
import { specSheetHtml } from '../report/specSheet.ts';
import { parseArgs } from './args.ts';
import { RANGE_FLAG_NAMES, readRangeFlags } from './limits.ts';
import { oneLine, writeFileSafely } from './output.ts';
import { readDay, today } from './report.ts';

export const SPEC_HELP = `decentra spec: a printable spec sheet for a lens range (HTML, one or two A4/Letter pages).

Usage: decentra spec --power LIST --max-prism LIST [--cyl LIST] [--axis LIST] [--dir LIST]
                     [lens flags] [--levels 5,10,20] [--out FILE.html] [--date YYYY-MM-DD]

The range flags are those of "decentra limits" for a table (LIST: a value, a list a,b,c or
START:STOP:STEP). The sheet shows the range definition; per tolerance the smallest exact limit
of each sphere and cylinder over the directions and axes; where Prentice's rule breaks down
(its error over sphere and decentration along the first direction, for the first cylinder and
axis, with contours at --levels percent, default 5,10,20, and their table); the method, the
assumptions and the cautions. No script, no external files; print it from a browser.

  --levels L    Prentice-error levels, percent (default 5,10,20)
  --out FILE    write the sheet to FILE (otherwise it is printed to stdout)
  --date DAY    the date printed on the sheet, YYYY-MM-DD (default: today)
  --decimals N  decimals of the limits shown (default 2)
`;

const SPEC_FLAGS = {
  values: [...RANGE_FLAG_NAMES, 'levels', 'out', 'date'],
  switches: ['help'],
};


export function runSpec(argv: readonly string[]): string {
  const args = parseArgs(argv, SPEC_FLAGS);
  if (args.switches.has('help')) return SPEC_HELP;
  if (args.positional.length) throw new InputError(args.positional[0]!, 'unexpected argument (flags start with --)');
  if (args.values.get('max-prism') === undefined) throw new InputError('--max-prism', 'is required (the tolerances in prism dioptres, e.g. 0.25,0.5,1)');
  const spec = readRangeFlags(args);
  const levels = readLevels('--levels', args.values.get('levels'));
  const rawDate = args.values.get('date');
  const date = rawDate !== undefined ? readDay('--date', rawDate) : today();
  const shown = argv.filter((_, i) => !['--out', '--date'].includes(argv[i]!) && !['--out', '--date'].includes(argv[i - 1] ?? ''))
    .filter((w) => !/^--(out|date)=/.test(w));
  const page = specSheetHtml(spec, rangeRows(spec), breakdown(spec, levels), {
    date, command: ['decentra', 'spec', ...shown].map(shellWord).join(' '),
  });
  const out = args.values.get('out');
  if (out === undefined) return page;
  writeFileSafely(out, page, '--out');
  return `decentra spec: wrote ${oneLine(out)}`;
}
