/**
 * Tables over a lens family: a sweep (powers x decentrations: the four answers) and a
 * limits table (powers: the largest decentration within a tolerance; its rows are the
 * range's, src/case/range.ts, for one direction and one tolerance). One home for the rows
 * and their file formats, used by the CLI (`decentra sweep`, `decentra limits --power`, with
 * worker threads) and by the app's export (in a Web Worker). No Node or DOM here.
 */
import { type Lens, isFailure, prismAnswers } from '../optics/index.ts';
import { flagOf } from './flags.ts';
import { InputError } from './input.ts';
import { type RawFields, buildLens, readLensForm } from './lensCase.ts';
import { type RangeRow, type RangeSpec, angleDirection, lensRows, rangeColumnsOf, rangeCsvLine, rangeJsonLine, rangeLens } from './range.ts';

export { rangeValues } from './rangeValues.ts';

export type Row = Record<string, number | string | null>;

/** A checked table request: everything needed to compute any subset of its rows. */
export interface BatchPlan {
  kind: 'sweep' | 'limits';
  /** the lens family's fields (the sphere is each power in turn) */
  fields: RawFields;
  powers: number[];
  /** sweep only: decentrations, mm */
  decs: number[];
  dirDeg: number;
  cr: number;
  eye: 'R' | 'L';
  /** limits only: tolerance, Δ */
  maxPrism: number;
  format: 'csv' | 'json';
}

/** The lens of one power of the family, or the reason there is none. */
function familyLens(plan: BatchPlan, p: number): { lens: Lens | null; sphereD: number; note: string } {
  const form = readLensForm({ ...plan.fields, sphere: p }, flagOf);
  try {
    return { lens: buildLens(form, flagOf), sphereD: form.sphereD, note: '' };
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    return { lens: null, sphereD: form.sphereD, note: e.message };
  }
}

/** The sweep rows of one power. */
export function sweepPowerRows(plan: BatchPlan, p: number): Row[] {
  const { decs, dirDeg, cr, eye } = plan;
  const ux = Math.cos((dirDeg * Math.PI) / 180), uy = Math.sin((dirDeg * Math.PI) / 180);
  const { lens, note } = familyLens(plan, p);
  return decs.map((d) => {
    const row: Row = {
      power_D: p, decentration_mm: d, front_D: lens ? lens.frontPowers[0] : null, ct_mm: lens ? lens.ctMm : null,
      prentice: null, paraxial: null, exact: null, focimeter: null, error_prism: null, error_percent: null,
      status: 'lens', note,
    };
    if (!lens) return row;
    if (Math.abs(d) > lens.radiusMm) {
      row.status = 'edge';
      row.note = `beyond the ${2 * lens.radiusMm} mm lens`;
      return row;
    }
    const r = prismAnswers(lens, cr, d * ux, d * uy, eye);
    row.prentice = r.prentice.magnitude;
    row.paraxial = r.paraxial.magnitude;
    row.exact = isFailure(r.exact) ? null : r.exact.magnitude;
    row.focimeter = isFailure(r.focimeter) ? null : r.focimeter.magnitude;
    row.error_prism = r.error ? r.error.prism : null;
    row.error_percent = r.error ? r.error.percent : null;
    row.status = isFailure(r.exact) ? r.exact.failure : 'ok';
    row.note = isFailure(r.exact) ? r.exact.message : '';
    return row;
  });
}

/**
 * A limits plan as a range (src/case/range.ts): its powers, the family's cylinder and axis,
 * one direction and one tolerance. The limits table's rows and files are the range's.
 */
export function limitsRangeSpec(plan: BatchPlan): RangeSpec {
  const fields: RawFields = { ...plan.fields };
  const form = readLensForm({ ...fields, sphere: plan.powers[0] ?? 0 }, flagOf);
  delete fields.sphere; delete fields.cyl; delete fields.axis;
  return {
    fields, spheres: plan.powers, cyls: [form.cylD], axes: [form.axisDeg], directions: [angleDirection(plan.dirDeg)],
    tolerances: [plan.maxPrism], powerBounds: null, eye: plan.eye, crMm: plan.cr, decimals: 2,
  };
}

/** The limits row of one power: the range row (src/case/range.ts) of that lens. */
export function limitsPowerRow(plan: BatchPlan, p: number): Row {
  const spec = limitsRangeSpec(plan);
  const r = lensRows(spec, rangeLens(spec, { sphere: p, cyl: spec.cyls[0]!, axis: spec.axes[0]! }))[0]!;
  return { ...r };
}

/** The rows of one power: a sweep's decentrations, or the one limits row. */
export function powerRows(plan: BatchPlan, p: number): Row[] {
  return plan.kind === 'sweep' ? sweepPowerRows(plan, p) : [limitsPowerRow(plan, p)];
}

/** Rows of the given powers (all by default), power by power; `onPower(done)` after each. */
export function batchRows(plan: BatchPlan, powers = plan.powers, onPower?: (done: number) => void): Row[] {
  const rows: Row[] = [];
  powers.forEach((p, i) => {
    for (const r of powerRows(plan, p)) rows.push(r);
    onPower?.(i + 1);
  });
  return rows;
}

/** Quote one word for a POSIX shell, only where needed (for a command line shown to a person). */
export function shellWord(s: string): string {
  return /^[A-Za-z0-9_.:,=+\-/]+$/.test(s) ? s : `'${s.replace(/'/g, `'\\''`)}'`;
}

/** A CSV cell: numbers as they are (finite only), text quoted when needed. */
export function csvCell(v: number | string | null): string {
  if (v === null) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  return /[",\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

/** The columns of the table (a sweep's from its first row; a limits table's the range's). */
export function batchCols(plan: BatchPlan, first: Row): string[] {
  return plan.kind === 'limits' ? [...rangeColumnsOf(first as unknown as RangeRow)] : Object.keys(first);
}

/** The file's head: the CSV header line, or the JSON text before the first row. */
export function batchHead(plan: BatchPlan, first: Row): string {
  if (plan.format === 'csv') return batchCols(plan, first).join(',');
  if (plan.kind === 'limits') return '[';
  return `${JSON.stringify({ direction: plan.dirDeg, eye: plan.eye, cr: plan.cr }).slice(0, -1)},"rows":[`;
}

/** Row `index`'s text, with the separator that goes before it. */
export function batchRowText(plan: BatchPlan, r: Row, index: number, cols: readonly string[]): string {
  if (plan.kind === 'limits') {
    const row = r as unknown as RangeRow;
    return plan.format === 'csv' ? `\n${rangeCsvLine(row, 2)}` : `${index ? ',' : ''}\n${rangeJsonLine(row)}`;
  }
  if (plan.format === 'csv') return `\n${cols.map((c) => csvCell(r[c] ?? null)).join(',')}`;
  return `${index ? ',' : ''}${JSON.stringify(r)}`;
}

/** The file's tail, after the last row. */
export function batchTail(plan: BatchPlan): string {
  if (plan.format === 'csv') return '';
  return plan.kind === 'limits' ? '\n]' : ']}';
}

/**
 * The table as a file. A sweep: CSV (a header, then a line per row) or one JSON object. A
 * limits table: the range's CSV (2 decimals) or JSON array (src/case/range.ts).
 */
export function formatBatch(plan: BatchPlan, rows: Row[]): string {
  const first = rows[0] ?? {};
  const cols = batchCols(plan, first);
  const parts = [batchHead(plan, first)];
  rows.forEach((r, i) => parts.push(batchRowText(plan, r, i, cols)));
  parts.push(batchTail(plan));
  return parts.join('');
}
