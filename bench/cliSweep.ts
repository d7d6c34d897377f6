/**
 * The command line's long-table speed: `decentra sweep` over 10^6 rows (1000 powers x 1000
 * decentrations), in one thread (DECENTRA_WORKERS=0) and on worker threads
 * (DECENTRA_WORKERS=2 by default), runs alternating, output to /dev/null. Run with
 * `npm run -s bench:sweep` after `npm run -s build:cli`; `-- --runs 5 --workers 2`.
 *
 * For each setting: the median wall-clock time, the median CPU time of the whole process
 * (all threads, from process.resourceUsage() at exit) and the median peak resident memory.
 * The load average before and after is printed: on a busy machine the wall-clock figures
 * compare badly (other processes take the cores), and the CPU times are the better guide to
 * the work each setting does. The lens family is the CLI's default (a scenario, not anyone's
 * prescription).
 */
import { spawnSync } from 'node:child_process';
import os from 'node:os';
import { resolve } from 'node:path';

const ROOT = resolve(import.meta.dirname, '..');
const arg = (name: string, dflt: number): number => {
  const i = process.argv.indexOf(`--${name}`);
  const v = i < 0 ? dflt : Number(process.argv[i + 1]);
  if (!Number.isInteger(v) || v < 0) throw new Error(`--${name}: must be a whole number, got '${process.argv[i + 1]}'`);
  return v;
};
const RUNS = arg('runs', 3);
const WORKERS = arg('workers', 2);
const SWEEP = ['sweep', '--power', '-5:4.99:0.01', '--decentration', '0:19.98:0.02'];
const REPORT = "data:text/javascript,process.on('exit',()=>{const u=process.resourceUsage();process.stderr.write('usage '+(u.userCPUTime+u.systemCPUTime)+' '+u.maxRSS+'\\n')})";

interface Run { wallS: number; cpuS: number; rssMb: number }

function once(workers: number): Run {
  const t0 = performance.now();
  const r = spawnSync('node', ['--import', REPORT, resolve(ROOT, 'bin/decentra.mjs'), ...SWEEP], {
    env: { ...process.env, DECENTRA_WORKERS: String(workers) }, stdio: ['ignore', 'ignore', 'pipe'], encoding: 'utf8',
  });
  const wallS = (performance.now() - t0) / 1000;
  const m = /usage (\d+) (\d+)/.exec(r.stderr);
  if (r.status !== 0 || !m) throw new Error(`sweep failed (${r.status}): ${r.stderr}`);
  return { wallS, cpuS: Number(m[1]) / 1e6, rssMb: Number(m[2]) / 1024 };
}

const median = (xs: number[]): number => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2;
};

const loadBefore = os.loadavg()[0]!;
const runs: Record<number, Run[]> = { 0: [], [WORKERS]: [] };
for (let i = 0; i < RUNS; i++) for (const w of [0, WORKERS]) runs[w]!.push(once(w));
const loadAfter = os.loadavg()[0]!;

console.log(`decentra sweep, 10^6 rows, ${RUNS} runs each, alternating; output to /dev/null`);
console.log(`machine: ${os.cpus()[0]?.model ?? 'unknown'}, ${os.cpus().length} logical cores, ${os.type()} ${os.release()}, node ${process.versions.node}`);
console.log(`load average (1 min): ${loadBefore.toFixed(2)} before, ${loadAfter.toFixed(2)} after`);
for (const w of [0, WORKERS]) {
  const rs = runs[w]!;
  console.log(
    `${w === 0 ? 'one thread      ' : `${w} worker threads`}: wall ${median(rs.map((r) => r.wallS)).toFixed(2)} s ` +
      `(runs ${rs.map((r) => r.wallS.toFixed(2)).join(', ')}), CPU ${median(rs.map((r) => r.cpuS)).toFixed(2)} s, ` +
      `peak RSS ${median(rs.map((r) => r.rssMb)).toFixed(0)} MB`,
  );
}
const ratio = median(runs[0]!.map((r) => r.wallS)) / median(runs[WORKERS]!.map((r) => r.wallS));
console.log(`speed-up of ${WORKERS} workers over one thread (wall-clock medians): ${ratio.toFixed(2)}x`);
