/**
 * Long tables (`decentra sweep`): computed block by block and written as they are computed,
 * in order, so memory stays flat however many rows there are. Large tables may be spread
 * over worker threads (the workers run this same bundle); a progress bar shows on stderr
 * when stderr is a terminal (or DECENTRA_PROGRESS=1).
 *
 * The file is cut into blocks of about BLOCK_ROWS rows in row order. A block's text (CSV
 * lines or JSON objects, with their separators) is made where its rows are computed, by
 * src/case/batch.ts's one formatter, and crosses from a worker as one string: one message
 * per block, nothing per row. (Transferred byte buffers were tried: they cost the same time
 * and left ~50 MB more resident, as the writing thread collects their wrappers late.) The
 * writer keeps at most a few blocks ahead of the output, and waits for stdout when the
 * reader is slow.
 *
 * Ctrl-C: no handler is installed, so SIGINT ends the process (workers included) at once.
 */
import { availableParallelism, loadavg } from 'node:os';
import { Worker, isMainThread, parentPort, workerData } from 'node:worker_threads';
import { type BatchPlan, type Row, batchCols, batchHead, batchRowText, batchTail, powerRows, sweepPowerRows } from '../case/batch.ts';
import { InputError } from '../case/input.ts';
import { type Sink, StringSink } from './output.ts';

/** Rows per block: large enough that a block's message costs nothing beside its work. */
export const BLOCK_ROWS = 4096;
/** Tables with fewer rows than this are not worth starting workers for (each costs ~50 ms). */
export const PARALLEL_MIN_ROWS = 50_000;

/** The number of rows of each power (a sweep's decentrations; one for limits). */
function rowsPerPower(plan: BatchPlan): number {
  return plan.kind === 'sweep' ? plan.decs.length : 1;
}

export function totalRows(plan: BatchPlan): number {
  return plan.powers.length * rowsPerPower(plan);
}

/** How many blocks the table is cut into. */
export function blockCount(plan: BatchPlan): number {
  const per = rowsPerPower(plan);
  if (per >= BLOCK_ROWS) return plan.powers.length * Math.ceil(per / BLOCK_ROWS);
  return Math.ceil(plan.powers.length / Math.floor(BLOCK_ROWS / per));
}

/**
 * Block `i`'s text: the file's head first if i is 0, then its rows, each with the
 * separator that goes before it. Rows are computed here (see batch.ts).
 */
export function blockText(plan: BatchPlan, i: number): { text: string; rows: number } {
  const per = rowsPerPower(plan);
  let rows: Row[];
  let firstRowIndex: number;
  if (per >= BLOCK_ROWS) {
    const sub = Math.ceil(per / BLOCK_ROWS);
    const p = Math.floor(i / sub), d0 = (i % sub) * BLOCK_ROWS, d1 = Math.min(per, d0 + BLOCK_ROWS);
    rows = sweepPowerRows({ ...plan, decs: plan.decs.slice(d0, d1) }, plan.powers[p]!);
    firstRowIndex = p * per + d0;
  } else {
    const k = Math.floor(BLOCK_ROWS / per);
    const p0 = i * k, p1 = Math.min(plan.powers.length, p0 + k);
    rows = [];
    for (let p = p0; p < p1; p++) for (const r of powerRows(plan, plan.powers[p]!)) rows.push(r);
    firstRowIndex = p0 * per;
  }
  const cols = batchCols(plan, rows[0]!);
  const parts: string[] = i === 0 ? [batchHead(plan, rows[0]!)] : [];
  for (let k = 0; k < rows.length; k++) parts.push(batchRowText(plan, rows[k]!, firstRowIndex + k, cols));
  return { text: parts.join(''), rows: rows.length };
}

interface Job { decentraBatch: true; plan: BatchPlan }

/**
 * Heap sizes for a table worker, MB. A block's garbage is small and short-lived; V8's default
 * young generation lets each worker grow by tens of MB before it collects (measured: 10^6
 * rows on 2 workers peaked at 147-153 MB resident with 16 MB, 128-129 MB with 8 MB).
 */
const WORKER_LIMITS = { maxYoungGenerationSizeMb: 8, maxOldGenerationSizeMb: 64 };
type Reply = { i: number; text: string; rows: number } | { i: number; field: string; reason: string };

/** In a worker: make the blocks asked for, one reply each. */
if (!isMainThread && (workerData as Job | undefined)?.decentraBatch) {
  const { plan } = workerData as Job;
  parentPort!.on('message', ({ i }: { i: number }) => {
    let reply: Reply;
    try {
      const { text, rows } = blockText(plan, i);
      reply = { i, text, rows };
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      reply = { i, field: e.field, reason: e.reason };
    }
    parentPort!.postMessage(reply);
  });
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

/**
 * Worker threads for a table of this size on this machine now: one per core, or 0 (compute
 * in this thread) below PARALLEL_MIN_ROWS, on one core, or when the machine is heavily
 * loaded (1-minute load average at least cores + 1). The writing thread does little (it
 * orders blocks and writes them), so it needs no core of its own. Measured on 2 cores
 * (docs/cli.md, "Streaming and speed"): 2 workers cost 10-25 % more CPU time than one
 * thread; at load 1.3-3.0 they were 1.30-1.34x faster, from load 3-4 on 0.86-1.01x,
 * so from load cores + 1 one thread is used. DECENTRA_WORKERS overrides the choice.
 */
export function defaultWorkers(plan: BatchPlan, cores = availableParallelism(), load = loadavg()[0] ?? 0): number {
  if (totalRows(plan) < PARALLEL_MIN_ROWS || cores < 2 || load >= cores + 1) return 0;
  return Math.min(cores, blockCount(plan));
}

export interface StreamOptions {
  /** worker threads: 0 computes in this thread; default defaultWorkers(plan) */
  workers?: number;
  /** the built bundle, which the workers load (needed when workers > 0) */
  bundleUrl?: URL;
  /** called with the number of rows written so far */
  onRows?: (done: number) => void;
}

/**
 * Writes the whole table file to `sink`, in order, as it is computed: head, rows, tail.
 * Returns whether the last byte written was a newline (the CLI ends its output with one).
 */
export async function streamBatch(plan: BatchPlan, sink: Sink, opts: StreamOptions = {}): Promise<boolean> {
  const workers = opts.workers ?? defaultWorkers(plan);
  const endsWithNewline = { value: false };
  const write = (chunk: string | Uint8Array): void | Promise<void> => {
    if (chunk.length) endsWithNewline.value = typeof chunk === 'string' ? chunk.endsWith('\n') : chunk[chunk.length - 1] === 10;
    return sink.write(chunk);
  };
  if (workers > 0 && opts.bundleUrl) await streamWithWorkers(plan, write, workers, opts.bundleUrl, opts.onRows);
  else await streamHere(plan, write, opts.onRows);
  const tail = batchTail(plan);
  if (tail) await write(tail);
  return endsWithNewline.value;
}

const nextTurn = (): Promise<void> => new Promise((resolve) => setImmediate(resolve));

async function streamHere(plan: BatchPlan, write: Sink['write'], onRows?: (done: number) => void): Promise<void> {
  const n = blockCount(plan);
  let done = 0;
  for (let i = 0; i < n; i++) {
    const { text, rows } = blockText(plan, i);
    const wait = write(text);
    done += rows;
    onRows?.(done);
    // let the stream report an error (a closed pipe) and Ctrl-C act between blocks
    await (wait ?? nextTurn());
  }
}

function streamWithWorkers(plan: BatchPlan, write: Sink['write'], threads: number, bundleUrl: URL, onRows?: (done: number) => void): Promise<void> {
  const n = blockCount(plan);
  // blocks computed ahead of the output: enough that one slow worker does not stall the
  // others (~0.5 MB of text each), few enough that memory stays flat
  const window = 4 * threads + 4;
  const pool = Array.from({ length: Math.min(threads, n) }, () => new Worker(bundleUrl, { workerData: { decentraBatch: true, plan } satisfies Job, resourceLimits: WORKER_LIMITS }));
  return new Promise<void>((resolve, reject) => {
    const ready = new Map<number, { text: string; rows: number }>();
    const idle: Worker[] = [...pool];
    let next = 0, written = 0, rowsDone = 0, flushing = false, over = false;
    const finish = (e?: unknown): void => {
      if (over) return;
      over = true;
      for (const w of pool) void w.terminate();
      if (e) reject(e);
      else resolve();
    };
    const dispatch = (): void => {
      while (!over && idle.length && next < n && next - written < window) idle.pop()!.postMessage({ i: next++ });
    };
    const flush = async (): Promise<void> => {
      if (flushing) return;
      flushing = true;
      try {
        while (!over && ready.has(written)) {
          const block = ready.get(written)!;
          ready.delete(written);
          written++;
          const wait = write(block.text);
          rowsDone += block.rows;
          onRows?.(rowsDone);
          dispatch();
          if (wait) await wait;
        }
      } catch (e) {
        finish(e);
      } finally {
        flushing = false;
      }
      if (written === n) finish();
      else dispatch();
    };
    for (const w of pool) {
      w.on('message', (m: Reply) => {
        if ('field' in m) return finish(new InputError(m.field, m.reason));
        idle.push(w);
        ready.set(m.i, { text: m.text, rows: m.rows });
        void flush();
      });
      w.on('error', finish);
      w.on('exit', (code) => { if (!over) finish(new Error(`a table worker stopped (exit ${code})`)); });
    }
    dispatch();
  });
}

/** The whole table file as text, computed as the CLI computes it (tests, small callers). */
export async function batchText(plan: BatchPlan, opts: StreamOptions = {}): Promise<string> {
  const sink = new StringSink();
  await streamBatch(plan, sink, opts);
  return sink.text();
}
