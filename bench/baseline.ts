/**
 * A caller's own loop through the public API against a compiled C baseline of the same trace,
 * side by side in one run (`npm run bench:baseline`; docs/performance.md).
 *
 * The JavaScript side is what a designer would write with the engine: a 201 x 201 grid of
 * visual points over +-20 mm, PASSES passes, through `lineOfSight` (src/optics/index.ts) with
 * one reused LineTrace. The C side (bench/baseline.c) is the same trace of the same spherical
 * lens (the same surfaces, Snell's law at both, the same checks and outputs), compiled with
 * CFLAGS below. Runs alternate (JavaScript, C, JavaScript, C, ...) so that both see the same
 * machine load; each figure is the median of RUNS runs after warm-up. Both sides' checksums
 * must agree, or the comparison is void.
 *
 * Needs a C compiler (`cc`); without one it says so and exits 0 (skipped): continuous
 * integration does not need it. With --json: one JSON object on stdout.
 *
 * The lens is a scenario of our own choosing (-4.00 D, index 1.6, Vogel front, ct 2 mm,
 * 65 mm round, centre of rotation 27 mm behind the back vertex), the benchmark's spherical
 * lens (bench/run.ts).
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Lens, LineTrace, RayStatus, frontForPower, lineOfSight } from '../src/optics/index.ts';

const json = process.argv.includes('--json');
const RUNS = 9;
const WARMUP = 3;
const SIZE = 201;
const HALF_WIDTH_MM = 20;
const PASSES = 100;
const CR_MM = 27;
/** the goal: the JavaScript loop at least this fraction of the C rate (docs/performance.md) */
const GOAL = 0.8;
export const CFLAGS = ['-O2', '-march=native', '-ffp-contract=off'];

const say = (s: string) => (json ? process.stderr : process.stdout).write(`${s}\n`);

function compiler(): string | null {
  const r = spawnSync('cc', ['--version'], { encoding: 'utf8' });
  return r.status === 0 ? r.stdout.split('\n')[0]! : null;
}

const cc = compiler();
if (!cc) {
  say('bench:baseline skipped: no C compiler (cc) on this machine; install one (e.g. apt-get install gcc) to compare with the C baseline');
  if (json) process.stdout.write(`${JSON.stringify({ skipped: 'no C compiler (cc)' })}\n`);
  process.exit(0);
}

const dir = mkdtempSync(join(os.tmpdir(), 'decentra-baseline-'));
const exe = join(dir, 'baseline');
const source = fileURLToPath(new URL('./baseline.c', import.meta.url));
try {
  execFileSync('cc', [...CFLAGS, '-o', exe, source, '-lm'], { stdio: ['ignore', 'inherit', 'inherit'] });

  const index = 1.6;
  const lens = new Lens({ sphereD: -4, cylD: 0, axisDeg: 0, index, frontD: frontForPower({ kind: 'vogel' }, -4, 0), ctMm: 2, diameterMm: 65 });
  if (lens.solidRadiusMm < 0) lens.findSolidRadius();
  const step = (2 * HALF_WIDTH_MM) / (SIZE - 1);

  // the caller's loop: one reused LineTrace, the allocation-free form (inputs in its fields)
  const out = new LineTrace();
  const jsRun = (passes: number) => {
    let ok = 0, sumPx = 0, sumPy = 0, sumF = 0;
    const t0 = performance.now();
    for (let p = 0; p < passes; p++) {
      for (let iy = 0; iy < SIZE; iy++) {
        const y = -HALF_WIDTH_MM + iy * step;
        for (let ix = 0; ix < SIZE; ix++) {
          out.sx = 0; out.sy = 0; out.sz = -CR_MM; out.bx = -HALF_WIDTH_MM + ix * step; out.by = y;
          if (lineOfSight(lens, out) === RayStatus.ok) { ok++; sumPx += out.px; sumPy += out.py; sumF += out.fz + out.oz; }
        }
      }
    }
    const seconds = (performance.now() - t0) / 1000;
    return { traces: SIZE * SIZE * passes, seconds, ok, sumPx, sumPy, sumF };
  };
  const cArgs = [lens.front.curvature, lens.back.curvature, lens.ctMm, index, lens.radiusMm, lens.solidRadiusMm, -CR_MM, HALF_WIDTH_MM, SIZE, PASSES]
    .map((v) => String(v));
  const cRun = () => JSON.parse(execFileSync(exe, cArgs, { encoding: 'utf8' })) as ReturnType<typeof jsRun>;

  // short calls first, so that V8 optimises the whole loop function with full type feedback
  // (not only its loop); see docs/performance.md, "Warm-up matters"
  for (let i = 0; i < 20; i++) jsRun(1);
  for (let i = 0; i < WARMUP; i++) { jsRun(PASSES); cRun(); }
  const js: number[] = [], c: number[] = [];
  let last: { js: ReturnType<typeof jsRun>; c: ReturnType<typeof jsRun> } | null = null;
  for (let i = 0; i < RUNS; i++) {
    const a = jsRun(PASSES);
    const b = cRun();
    js.push(a.traces / a.seconds);
    c.push(b.traces / b.seconds);
    last = { js: a, c: b };
  }
  // the same trace: the same successes and the same outputs (to rounding)
  const same = (x: number, y: number) => Math.abs(x - y) <= 1e-9 * Math.max(1, Math.abs(x), Math.abs(y));
  const agree = last!.js.ok === last!.c.ok && same(last!.js.sumPx, last!.c.sumPx) && same(last!.js.sumPy, last!.c.sumPy) && same(last!.js.sumF, last!.c.sumF);
  const median = (v: number[]) => { const s = [...v].sort((p, q) => p - q); return s.length % 2 ? s[s.length >> 1]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2; };
  const jsRate = median(js), cRate = median(c), ratio = jsRate / cRate;
  const machine = { cpu: os.cpus()[0]?.model ?? 'unknown', cores: os.cpus().length, node: process.version, os: `${os.type()} ${os.release()} ${os.arch()}` };
  if (json) {
    process.stdout.write(`${JSON.stringify({
      jsTracesPerSecond: Math.round(jsRate), cTracesPerSecond: Math.round(cRate), ratio: Math.round(ratio * 1000) / 1000,
      goal: GOAL, outputsAgree: agree, compiler: cc, cflags: CFLAGS.join(' '), machine,
    })}\n`);
  } else {
    const m = (v: number) => `${(v / 1e6).toFixed(2)} M/s`;
    say(`Decentra: a caller's loop through the public API against compiled C, side by side (median of ${RUNS} alternating runs after ${WARMUP} warm-up runs)`);
    say(`machine: ${machine.cpu}, ${machine.cores} logical cores, ${machine.os}, node ${machine.node}; C: ${cc}, cc ${CFLAGS.join(' ')} -lm`);
    say('');
    say(`JavaScript, lineOfSight with a reused LineTrace   ${m(jsRate).padStart(11)}  (range ${m(Math.min(...js))} .. ${m(Math.max(...js))})`);
    say(`C baseline, the same trace                         ${m(cRate).padStart(11)}  (range ${m(Math.min(...c))} .. ${m(Math.max(...c))})`);
    say(`ratio JavaScript / C                               ${ratio.toFixed(2).padStart(11)}  goal >= ${GOAL}`);
    say('');
    say(`grid ${SIZE} x ${SIZE} visual points over +-${HALF_WIDTH_MM} mm, ${PASSES} passes a run; lens -4.00 D, index 1.6, Vogel front, ct 2 mm, 65 mm round, CR ${CR_MM} mm`);
    say(`outputs agree: ${agree ? 'yes' : 'NO'} (successes ${last!.js.ok} / ${last!.c.ok}; sum of px ${last!.js.sumPx} / ${last!.c.sumPx})`);
  }
  if (!agree) {
    process.stderr.write('error: the JavaScript and C traces disagree; the comparison is void\n');
    process.exitCode = 1;
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
