/**
 * The range workspace's files, made in the export worker: the limits table as CSV or JSON,
 * byte for byte what `decentra limits ... --format csv|json` prints for the same family
 * (the rows and formats are src/case/range.ts's, the functions the CLI calls), and the
 * spec sheet as `decentra spec` writes it. Pure: no DOM; runs in a worker and in Node.
 */
import { type RangeRow, breakdown, rangeCsv, rangeJson, rangeLenses, rangeRows, readLevels, readRangeSpec } from '../../case/range.ts';
import { specSheetHtml } from '../../report/specSheet.ts';
import { FAMILY_LABELS, type FamilyForm, commandLine, commandWords, familyLabel, rangeInput } from '../range/family.ts';

/** The limits table as CSV or JSON (`decentra limits`), or the spec sheet (`decentra spec`). */
export type RangeFileFormat = 'csv' | 'json' | 'spec';

export interface RangeExportRequest {
  kind: 'range';
  form: FamilyForm;
  /** the breakdown chart's choice (indices into the family's cylinders, axes, directions) */
  chart: { cyl: number; axis: number; dir: number };
  format: RangeFileFormat;
  /** the spec sheet's date: its UTC calendar day, ms since 1970 (as `decentra spec --date`) */
  dateMs: number;
}

/** Today's calendar day where the person is, as the sheet's date (what `decentra spec` prints by default). */
export function todayMs(now = new Date()): number {
  return Date.UTC(now.getFullYear(), now.getMonth(), now.getDate());
}

/** What a file export needs from the range workspace: the family as typed now, checked. */
export interface RangeExportSource {
  form(): { ok: true; form: FamilyForm; chart: RangeExportRequest['chart'] } | { ok: false; message: string };
}

/** The export path as the range workspace sees it (the export panel: worker, progress, cancel). */
export interface RangeExporter {
  exportRange(format: RangeFileFormat, source: RangeExportSource): void;
}

/** How many lenses the request computes (the progress bar's total); an InputError names the field. */
export function rangeExportSize(req: RangeExportRequest): number {
  const n = rangeLenses(readRangeSpec(rangeInput(req.form), familyLabel)).length;
  if (req.format === 'spec') readLevels(FAMILY_LABELS.levels, req.form.levels);
  return n;
}

/**
 * The file's text, as the CLI's output before its final newline (the page adds it). Messages about
 * the family name the workspace's fields; the rows' own words are the CLI's.
 */
export function rangeExportText(req: RangeExportRequest, onLens?: (done: number, total: number) => void): { text: string; rows: number } {
  const spec = readRangeSpec(rangeInput(req.form), familyLabel);
  const rows: RangeRow[] = rangeRows(spec, { onLens });
  if (req.format === 'spec') {
    // the sheet charts the breakdown for the first cylinder, axis and direction, as `decentra spec` does
    const levels = readLevels(FAMILY_LABELS.levels, req.form.levels);
    const page = specSheetHtml(spec, rows, breakdown(spec, levels), {
      date: new Date(req.dateMs), command: commandLine(commandWords(req.form, 'spec')),
    });
    return { text: page, rows: rows.length };
  }
  const text = req.format === 'json' ? rangeJson(rows) : rangeCsv(rows, spec.decimals);
  return { text, rows: rows.length };
}
