/**
 * Batch-export worker: computes a sweep or a limits table (exports/batch.ts), or a range's
 * file (exports/range.ts), off the page's thread and formats the file text here too, so the
 * page never waits. Progress goes out after each power or lens (at most every 50 ms). Cancelling terminates the worker (the page starts a new
 * one for the next export), so a long table stops at once.
 */
import { InputError } from '../../case/input.ts';
import { batchRows, formatBatch, planBatch } from './batch.ts';
import { rangeExportText } from './range.ts';
import type { BatchJob, BatchMessage } from './protocol.ts';

const post = (m: BatchMessage) => (self as unknown as Worker).postMessage(m);

self.onmessage = (e: MessageEvent<BatchJob>) => {
  const { id, request } = e.data;
  const t0 = performance.now();
  try {
    if (request.kind === 'range') {
      let last = 0;
      const { text, rows } = rangeExportText(request, (done, total) => {
        const now = performance.now();
        if (now - last >= 50 || done === total) {
          last = now;
          post({ id, type: 'progress', done, total });
        }
      });
      post({ id, type: 'done', text, rows, ms: performance.now() - t0 });
      return;
    }
    const plan = planBatch(request);
    const total = plan.powers.length;
    let last = 0;
    post({ id, type: 'progress', done: 0, total });
    const rows = batchRows(plan, plan.powers, (done) => {
      const now = performance.now();
      if (now - last >= 50 || done === total) {
        last = now;
        post({ id, type: 'progress', done, total });
      }
    });
    post({ id, type: 'done', text: formatBatch(plan, rows), rows: rows.length, ms: performance.now() - t0 });
  } catch (err) {
    if (err instanceof InputError) post({ id, type: 'error', field: err.field, message: err.message });
    else post({ id, type: 'error', field: null, message: (err as Error).message ?? String(err) });
  }
};
