/**
 * The installed command's whole life (bin/decentra.mjs calls runCli): run the command, write
 * its output through a StreamSink (tables stream as they are computed), and turn every
 * failure into one line on stderr and an exit status (docs/cli.md):
 *   0 done; 1 stdout could not be written (ENOSPC, EACCES, ...); 2 bad input (an --out
 *   file that cannot be written included); 141 the reader closed the pipe (EPIPE, as after
 *   `| head -1`): no message, as Unix tools end.
 * A failure of the program itself (a bug) still shows its stack.
 */
import { InputError } from '../case/input.ts';
import { run } from './main.ts';
import { EXIT_OUTPUT, EXIT_PIPE, OutputError, StreamSink, oneLine } from './output.ts';
import { ProgressBar, streamBatch, totalRows } from './parallel.ts';
import { SWEEP_HELP, planSweep } from './sweep.ts';

export interface CliStreams {
  stdout: NodeJS.WritableStream;
  stderr: NodeJS.WritableStream;
}

/** Runs `decentra argv...`; resolves to the exit status. `bundleUrl`: the built file (workers load it). */
export async function runCli(argv: readonly string[], bundleUrl: URL, io: CliStreams = process): Promise<number> {
  const cmd = argv[0];
  const out = new StreamSink(io.stdout);
  // a closed stderr (2>&1 | head) must not become an unhandled error either
  io.stderr.on('error', () => {});
  const say = (line: string): void => {
    io.stderr.write(`${oneLine(line)}\n`);
  };
  try {
    let code = 0;
    if (cmd === 'sweep') {
      const plan = planSweep(argv.slice(1));
      if (!plan) await out.write(SWEEP_HELP);
      else {
        const bar = new ProgressBar(totalRows(plan), 'sweep');
        const workers = workersFromEnv(process.env.DECENTRA_WORKERS);
        const newline = await streamBatch(plan, out, { bundleUrl, workers, onRows: (d) => bar.update(d) });
        if (!newline) await out.write('\n');
      }
    } else {
      const r = run(argv);
      if (r.out) await out.write(r.out.endsWith('\n') ? r.out : `${r.out}\n`);
      for (const n of r.notes ?? []) say(n);
      if (r.err) say(r.err);
      code = r.code;
    }
    await out.end();
    return code;
  } catch (e) {
    // stdout failed (an --out file that cannot be written is a bad flag value: run() gives 2)
    if (e instanceof OutputError) {
      if (e.code === 'EPIPE') return EXIT_PIPE;
      say(`decentra${cmd ? ` ${cmd}` : ''}: ${e.message}`);
      return EXIT_OUTPUT;
    }
    if (e instanceof InputError) {
      say(`decentra ${cmd}: ${e.message}`);
      return 2;
    }
    throw e;
  }
}

/**
 * DECENTRA_WORKERS: worker threads for a long table (0: this thread only); unset or empty:
 * chosen by the machine (src/cli/parallel.ts defaultWorkers).
 */
export function workersFromEnv(raw: string | undefined): number | undefined {
  if (raw === undefined || raw === '') return undefined;
  if (!/^\d{1,2}$/.test(raw.trim()) || Number(raw) > 64) {
    throw new InputError('DECENTRA_WORKERS', `must be a whole number of worker threads from 0 to 64, got '${raw}'`);
  }
  return Number(raw);
}
