/**
 * Range worker: computes the range workspace's limits table and Prentice breakdown
 * (src/case/range.ts) off the page's thread, so the page never blocks. The page shares a
 * family's lenses between its workers (one per core, at most two), sends one job at a time to
 * each, and ends a busy worker when a newer family arrives before its answer. The range module
 * remembers built lenses, so a worker that keeps its share builds no lens twice.
 */
import { InputError } from '../case/input.ts';
import { breakdown, rangeRows, readLevels, readRangeSpec } from '../case/range.ts';
import { FAMILY_LABELS, familyLabel } from '../ui/range/family.ts';
import type { RangeJob, RangeMessage } from './rangeProtocol.ts';

const post = (m: RangeMessage) => (self as unknown as Worker).postMessage(m);

self.onmessage = (e: MessageEvent<RangeJob>) => {
  const { id, input, levels, chart, lenses } = e.data;
  try {
    const t0 = performance.now();
    const spec = readRangeSpec(input, familyLabel);
    const lv = readLevels(FAMILY_LABELS.levels, levels);
    let last = 0;
    const rows = rangeRows(spec, {
      label: familyLabel,
      lenses: lenses ?? undefined,
      onLens: (done, total) => {
        const now = performance.now();
        if (now - last >= 100 || done === total) {
          last = now;
          post({ id, type: 'progress', done, total });
        }
      },
    });
    const t1 = performance.now();
    const b = !e.data.breakdown ? null : breakdown(spec, lv, {
      cyl: spec.cyls[chart.cyl] ?? spec.cyls[0], axis: spec.axes[chart.axis] ?? spec.axes[0],
      direction: spec.directions[chart.dir] ?? spec.directions[0],
    });
    post({ id, type: 'done', rows, breakdown: b, rowsMs: t1 - t0, breakdownMs: performance.now() - t1 });
  } catch (err) {
    if (err instanceof InputError) post({ id, type: 'error', field: err.field, message: err.message });
    else post({ id, type: 'error', field: null, message: (err as Error).message ?? String(err) });
  }
};
