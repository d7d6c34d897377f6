/**
 * Tables over a lens family: a sweep (powers x decentrations: the four answers) and a
 * limits table (powers: the largest decentration within a tolerance). One home for the rows
 * and their file formats, used by the CLI (`decentra sweep`, `decentra limits --power`, with
 * worker threads) and by the app's export (in a Web Worker). No Node or DOM here.
 */
import { type Lens, decentrationLimit, fourAnswers, isFailure } from '../optics/index.ts';
import { flagOf } from './flags.ts';
import { InputError } from './input.ts';
import { type RawFields, buildLens, readLensForm } from './lensCase.ts';

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

/**
 * The values of an inclusive range start..stop by step: the count is exact, and each value
 * is rounded to the inputs' decimals (0.1 steps give 0.3, not 0.30000000000000004).
 * Errors name `field` (or `stepField` for the step).
 */
export function rangeValues(field: string, a: number, b: number, s: number, stepField = field): number[] {
  const what = stepField === field ? 'step ' : '';
  if (s === 0 && a !== b) throw new InputError(stepField, `${what}must not be 0`);
  if (a !== b && Math.sign(b - a) !== Math.sign(s)) throw new InputError(stepField, `${what}${s} does not lead from ${a} to ${b}`);
  const n = a === b ? 1 : Math.floor((b - a) / s + 1e-9) + 1;
  if (n > 100000) throw new InputError(field, `gives ${n} values; at most 100000`);
  const dec = Math.min(10, Math.max(...[a, b, s].map((v) => (String(v).split('.')[1] ?? '').length)));
  return Array.from({ length: n }, (_, i) => Number((a + i * s).toFixed(dec)));
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
    const r = fourAnswers(lens, cr, d * ux, d * uy, eye);
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

/** The limits row of one power. */
export function limitsPowerRow(plan: BatchPlan, p: number): Row {
  const { lens, sphereD, note } = familyLens(plan, p);
  if (!lens) return { power: sphereD, exact: null, prentice: null, paraxial: null, difference: null, reason: note };
  const { maxPrism } = plan;
  const r = decentrationLimit(lens, plan.cr, plan.dirDeg, maxPrism);
  const reason = r.exactReason === 'ok' ? 'ok' : r.exactReason === 'never-reached'
    ? `the exact prism stays within ${maxPrism} Δ out to ${r.searchedToMm} mm`
    : `the exact trace fails beyond ${r.searchedToMm} mm`;
  const exact = r.exactReason === 'ok' ? r.exactMm : null;
  return {
    power: sphereD, front: lens.frontPowers[0], ct: lens.ctMm, exact, prentice: r.prenticeMm, paraxial: r.paraxialMm,
    difference: exact !== null && r.prenticeMm !== null ? r.prenticeMm - exact : null, reason,
  };
}

/** Rows of the given powers (all by default), power by power; `onPower(done)` after each. */
export function batchRows(plan: BatchPlan, powers = plan.powers, onPower?: (done: number) => void): Row[] {
  const rows: Row[] = [];
  powers.forEach((p, i) => {
    if (plan.kind === 'sweep') for (const r of sweepPowerRows(plan, p)) rows.push(r);
    else rows.push(limitsPowerRow(plan, p));
    onPower?.(i + 1);
  });
  return rows;
}

/** A CSV cell: numbers as they are (finite only), text quoted when needed. */
export function csvCell(v: number | string | null): string {
  if (v === null) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  return /[",\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

const LIMIT_COLS = ['power', 'front', 'ct', 'exact', 'paraxial', 'prentice', 'difference', 'reason'];
const LIMIT_HEAD = ['power_D', 'front_D', 'ct_mm', 'exact_mm', 'paraxial_mm', 'prentice_mm', 'prentice_minus_exact_mm', 'note'];

/** The table as a file: CSV (a header, then a line per row) or one JSON object. */
export function formatBatch(plan: BatchPlan, rows: Row[]): string {
  if (plan.kind === 'sweep') {
    if (plan.format === 'json') return JSON.stringify({ direction: plan.dirDeg, eye: plan.eye, cr: plan.cr, rows });
    const cols = Object.keys(rows[0]!);
    return [cols.join(','), ...rows.map((r) => cols.map((c) => csvCell(r[c] ?? null)).join(','))].join('\n');
  }
  if (plan.format === 'json') return JSON.stringify({ maxPrism: plan.maxPrism, direction: plan.dirDeg, cr: plan.cr, rows });
  return [LIMIT_HEAD.join(','), ...rows.map((r) => LIMIT_COLS.map((c) => csvCell(r[c] ?? null)).join(','))].join('\n');
}
