/** Messages between the page and the batch-export worker (exports/batch.worker.ts). */
import type { BatchRequest } from './batch.ts';
import type { RangeExportRequest } from './range.ts';

export interface BatchJob {
  id: number;
  request: BatchRequest | RangeExportRequest;
}

export type BatchMessage =
  | { id: number; type: 'progress'; done: number; total: number }
  | { id: number; type: 'done'; text: string; rows: number; ms: number }
  | { id: number; type: 'error'; field: string | null; message: string };
