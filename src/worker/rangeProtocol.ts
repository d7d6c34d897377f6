/** Messages between the range workspace and its worker (range.worker.ts). */
import type { Breakdown, RangeInput, RangeRow } from '../case/range.ts';

export interface RangeJob {
  id: number;
  input: RangeInput;
  /** the breakdown's levels, percent, as typed */
  levels: string;
  /** which cylinder, axis and direction the breakdown charts (indices into the family's lists) */
  chart: { cyl: number; axis: number; dir: number };
  /** this worker's share of the lenses (indices into rangeLenses), or null for all */
  lenses: number[] | null;
  /** whether this worker also computes the breakdown */
  breakdown: boolean;
}

export type RangeMessage =
  | { id: number; type: 'progress'; done: number; total: number }
  | { id: number; type: 'done'; rows: RangeRow[]; breakdown: Breakdown | null; rowsMs: number; breakdownMs: number }
  | { id: number; type: 'error'; field: string | null; message: string };
