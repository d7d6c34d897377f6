/** `decentra report case.json --out summary.html`: the one-page clinician summary (docs/report.md). */
import { InputError } from '../case/input.ts';
import { summaryHtml } from '../report/summary.ts';
import { CASE_FIELDS, api } from './api.ts';
import { parseArgs } from './args.ts';
import { loadCaseFile } from './fit.ts';
import { oneLine, writeFileSafely } from './output.ts';

export const REPORT_HELP = `decentra report: a one-page summary of a case for a referring clinician.

Usage: decentra report CASE.json [--out FILE.html] [--date YYYY-MM-DD]

Reads a Decentra case file (docs/case-file.md), evaluates it as "decentra fit" does, and
writes a standalone HTML page (no script, no external files) laid out for one A4 or Letter
sheet: in short; what was entered and assumed; the three answers, each under its own
heading (1. at the marks: what the lab measures; 2. the standard's verdict on making and
centring; 3. what the eyes do at the target, with the binocular demand and clinical
guidance); the slab-off order; a cross-section of each lens with the line of sight and
prism-against-decentration plots; a method note and the cautions. The case file's optional
"report" fields (recipient, practice, reference) head the page. Print it from a browser to
get a PDF.

  --out FILE    write the page to FILE (otherwise it is printed to stdout)
  --date DAY    the date printed on the page, YYYY-MM-DD (default: today), for
                reproducible output
`;

/** A calendar day "YYYY-MM-DD" as a Date at 00:00 UTC; an InputError naming the flag otherwise. */
export function readDay(flag: string, raw: string): Date {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(raw.trim());
  if (!m) throw new InputError(flag, `must be a date as YYYY-MM-DD, got '${raw.length > 40 ? `${raw.slice(0, 37)}...` : raw}'`);
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const date = new Date(Date.UTC(y, mo - 1, d));
  if (date.getUTCFullYear() !== y || date.getUTCMonth() !== mo - 1 || date.getUTCDate() !== d || y < 1900) {
    throw new InputError(flag, `is not a calendar date from 1900 on, got '${raw}'`);
  }
  return date;
}

/** Today's local calendar day, as readDay gives it. */
export function today(): Date {
  const now = new Date();
  return new Date(Date.UTC(now.getFullYear(), now.getMonth(), now.getDate()));
}

/**
 * Runs the command. With --out the page is written and a one-line confirmation returned;
 * without it the page itself is returned (for stdout).
 */
export function runReport(argv: readonly string[]): string {
  const args = parseArgs(argv, { values: ['out', 'date'], switches: ['help'] });
  if (args.switches.has('help')) return REPORT_HELP;
  if (args.positional.length !== 1) throw new InputError('CASE.json', 'give exactly one case file');
  const date = args.values.has('date') ? readDay('--date', args.values.get('date')!) : today();
  const c = loadCaseFile(args.positional[0]!);
  const page = summaryHtml(c, api.evaluateCase(CASE_FIELDS, c), { date });
  const out = args.values.get('out');
  if (out === undefined) return page;
  writeFileSafely(out, page, '--out');
  return `decentra report: wrote ${oneLine(out)}`;
}
