/**
 * Long CLI runs: spread a sweep's powers over all cores with worker_threads, and show a
 * progress bar on stderr (when stderr is a terminal). The workers run this same bundle.
 */
import { availableParallelism } from 'node:os';
import { Worker, isMainThread, parentPort, workerData } from 'node:worker_threads';
import { type SweepPlan, type SweepRow, sweepRows } from './sweep.ts';

/** Sweeps with at least this many traces are split over workers. */
export const PARALLEL_MIN_TRACES = 4000;

interface Job { decentraSweep: true; plan: SweepPlan; powers: number[] }

/** In a worker: compute the rows of the given powers, reporting each power done. */
if (!isMainThread && (workerData as Job | undefined)?.decentraSweep) {
  const job = workerData as Job;
  const rows = sweepRows(job.plan, job.powers, (done) => parentPort!.postMessage({ progress: done }));
  parentPort!.postMessage({ rows });
}

export class ProgressBar {
  private last = -1;
  constructor(private readonly total: number, private readonly label: string, private readonly out: NodeJS.WriteStream = process.stderr) {}
  update(done: number): void {
    if (!this.out.isTTY && process.env.DECENTRA_PROGRESS !== '1') return;
    const pct = Math.floor((100 * done) / this.total);
    if (pct === this.last) return;
    this.last = pct;
    const width = 30, fill = Math.round((width * done) / this.total);
    this.out.write(`\r${this.label} [${'#'.repeat(fill)}${'-'.repeat(width - fill)}] ${pct}% ${done}/${this.total}`);
    if (done >= this.total) this.out.write('\n');
  }
}

/** The sweep's rows, in order, computed over all cores when it is large. */
export async function sweepRowsParallel(plan: SweepPlan, bundleUrl: URL, threads = availableParallelism()): Promise<SweepRow[]> {
  const total = plan.powers.length;
  const bar = new ProgressBar(total, 'sweep');
  const traces = total * plan.decs.length;
  if (threads < 2 || total < 2 || traces < PARALLEL_MIN_TRACES) {
    return sweepRows(plan, plan.powers, (d) => bar.update(d));
  }
  const n = Math.min(threads, total);
  // interleave powers so that each worker gets a similar mix of easy and hard lenses
  const chunks: number[][] = Array.from({ length: n }, () => []);
  const index: number[][] = Array.from({ length: n }, () => []);
  plan.powers.forEach((p, i) => { chunks[i % n]!.push(p); index[i % n]!.push(i); });
  const doneBy = new Array<number>(n).fill(0);
  const results = await Promise.all(chunks.map((powers, w) => new Promise<SweepRow[]>((resolve, reject) => {
    const worker = new Worker(bundleUrl, { workerData: { decentraSweep: true, plan, powers } satisfies Job });
    worker.on('message', (m: { progress?: number; rows?: SweepRow[] }) => {
      if (m.progress !== undefined) {
        doneBy[w] = m.progress;
        bar.update(doneBy.reduce((a, b) => a + b, 0));
      }
      if (m.rows) { resolve(m.rows); void worker.terminate(); }
    });
    worker.on('error', reject);
    worker.on('exit', (code) => { if (code !== 0 && code !== 1) reject(new Error(`sweep worker stopped (${code})`)); });
  })));
  // put the rows back in power order
  const perPower = plan.decs.length;
  const rows: SweepRow[] = new Array(total * perPower);
  results.forEach((chunkRows, w) => {
    index[w]!.forEach((pi, k) => {
      for (let j = 0; j < perPower; j++) rows[pi * perPower + j] = chunkRows[k * perPower + j]!;
    });
  });
  return rows;
}
