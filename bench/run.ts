/**
 * Engine benchmark: exact line-of-sight traces per second (spherical and toric lens), the
 * time of a 201 x 201 prism map, pencils per second (the power at the visual point) and the
 * time of a 201 x 201 power map. Run with `npm run bench` (human-readable) or
 * `npm run bench -- --json` (one JSON object on stdout, nothing else).
 *
 * Method: every figure is the median of RUNS timed runs after WARMUP or more untimed runs (see warmUp), in this
 * one JavaScript thread (the engine is single-threaded; V8's compiler and garbage collector
 * threads may still use the machine's other core). The reported figures are wall-clock. Each
 * run also records the process's CPU time: when the two differ, other processes took the
 * core from us, and the human-readable output says so and shows the CPU-time rate beside the
 * wall-clock one (a warning goes to stderr in --json mode).
 *
 * Allocation check: the per-ray path must allocate nothing, so no minor garbage collection
 * should fall inside a timed run. The benchmark counts them (perf_hooks 'gc' entries) and
 * reports any (JSON field gcInTimedRuns); any count above zero fails the benchmark (exit
 * status 1), because it means something on the path allocates (typically numbers boxed on a
 * call that the compiler did not inline; docs/performance.md). The traces reuse one LineTrace, as every
 * loop in the product does, and cycle through POINTS visual points spread evenly over the
 * aperture (a sunflower pattern), so branch prediction and the toric Newton start see the
 * variety of a real map rather than one repeated ray.
 *
 * The lenses are scenarios of our own choosing, not anyone's prescription.
 */
import os from 'node:os';
import { PerformanceObserver, constants as perfConstants, performance } from 'node:perf_hooks';
import {
  Lens, LineTrace, PencilPower, Placement, RayStatus, allocatePowerMap, allocatePrismMap, fillPowerMap, fillPrismMap,
  frontForPower, lineOfSight, pencilPower, pencilSetup, placedLine, traceLineOfSight,
} from '../src/optics/index.ts';
import { computePowerMaps } from '../src/worker/mapCompute.ts';
import { type RangeInput, clearRangeCache, rangeRows, readRangeSpec } from '../src/case/range.ts';

const json = process.argv.includes('--json');
const RUNS = 9;
const WARMUP = 3;
const POINTS = 4096;
/** target length of one timed run of traces, ms */
const RUN_MS = 250;
const CR_MM = 27;
const DIAMETER_MM = 65;
/** visual points lie within this radius of the optical centre, mm */
const APERTURE_MM = 25;
const MAP_SIZE = 201;
/** half-width of the map grid, mm: its corners (28.3 mm out) and the front exit points of their lines of sight stay inside the 65 mm lens */
const MAP_HALF_WIDTH_MM = 20;

function lensOf(sphereD: number, cylD: number, axisDeg: number, cylOn: 'back' | 'front' = 'back'): Lens {
  const index = 1.6;
  return new Lens({
    sphereD, cylD, axisDeg, index, frontD: frontForPower({ kind: 'vogel' }, sphereD, cylD),
    ctMm: 2, diameterMm: DIAMETER_MM, cylOn,
  });
}

// spherical: -4.00 D. Toric: -2.00 / -1.50 x 30, tyre formation. A line of sight meets the
// back surface at a given point (no intersection needed) and is intersected with the front,
// so only a FRONT toric runs the toric intersection (safeguarded Newton): that lens gives the
// reported toric figure. The default form (cylinder on the back) is timed too, for reference.
const spherical = lensOf(-4, 0, 0);
const toric = lensOf(-2, -1.5, 30, 'front');
const toricBack = lensOf(-2, -1.5, 30, 'back');

// sunflower points: even density over the disc, no two on one radius
const xs = new Float64Array(POINTS);
const ys = new Float64Array(POINTS);
const GOLDEN = Math.PI * (3 - Math.sqrt(5));
for (let i = 0; i < POINTS; i++) {
  const r = APERTURE_MM * Math.sqrt((i + 0.5) / POINTS);
  xs[i] = r * Math.cos(i * GOLDEN);
  ys[i] = r * Math.sin(i * GOLDEN);
}

const trace = new LineTrace();
/** keeps the optimiser from dropping the work; checked at the end */
let sink = 0;

function traceLoop(lens: Lens, n: number): number {
  let acc = 0;
  for (let i = 0; i < n; i++) {
    const j = i & (POINTS - 1);
    // the allocation-free form: inputs in the trace's fields, no loose numbers passed
    trace.sx = 0; trace.sy = 0; trace.sz = -CR_MM; trace.bx = xs[j]!; trace.by = ys[j]!;
    lineOfSight(lens, trace);
    acc += trace.px;
  }
  return acc;
}

function checkAllOk(lens: Lens, name: string): void {
  let bad = 0;
  for (let i = 0; i < POINTS; i++) {
    if (traceLineOfSight(lens, 0, 0, -CR_MM, xs[i]!, ys[i]!, trace) !== RayStatus.ok) bad++;
  }
  if (bad > 0) process.stderr.write(`warning: ${bad} of ${POINTS} ${name} traces did not succeed; the rate is not representative\n`);
}

function median(v: number[]): number {
  const s = [...v].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : 0.5 * (s[m - 1]! + s[m]!);
}

interface Rate {
  /** wall-clock median, and the range */
  median: number;
  min: number;
  max: number;
  /** median of the same quantity measured in this process's CPU time */
  cpuMedian: number;
  /** fraction of wall-clock time this process was on a core (CPU time / wall time), median */
  share: number;
}

/** Timed windows [start, end] on the performance clock, per measurement, for the GC count. */
const windows: { name: string; start: number; end: number }[] = [];

/** Time one call: wall-clock and process CPU time, ms; the window is kept under `name`. */
function timed(name: string, f: () => void): { wallMs: number; cpuMs: number } {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  f();
  const t1 = performance.now();
  const c = process.cpuUsage(c0);
  windows.push({ name, start: t0, end: t1 });
  return { wallMs: t1 - t0, cpuMs: (c.user + c.system) / 1000 };
}

// garbage collections, delivered asynchronously; counted against the windows at the end
const gcs: { start: number; minor: boolean }[] = [];
const gcObserver = new PerformanceObserver((list) => {
  for (const e of list.getEntries()) {
    const kind = ((e as unknown as { detail?: { kind?: number } }).detail)?.kind;
    gcs.push({ start: e.startTime, minor: kind === perfConstants.NODE_PERFORMANCE_GC_MINOR });
  }
});
gcObserver.observe({ entryTypes: ['gc'] });

/** Minor GCs that started inside the timed windows of one measurement. */
function minorGcsIn(name: string): number {
  let n = 0;
  for (const w of windows) {
    if (w.name !== name) continue;
    for (const g of gcs) if (g.minor && g.start >= w.start && g.start <= w.end) n++;
  }
  return n;
}

function summarise(wall: number[], cpu: number[], shares: number[]): Rate {
  return { median: median(wall), min: Math.min(...wall), max: Math.max(...wall), cpuMedian: median(cpu), share: median(shares) };
}

/** Traces per second: calibrate a run to about RUN_MS, warm up, then time RUNS runs. */
/**
 * Warm-up: at least WARMUP untimed runs, and on (at most MAX_WARMUP) until one run has no
 * minor collection. Until the compiler's background thread has optimised the loop, the
 * interpreter boxes every intermediate number, and on a busy machine that can take several
 * runs: those collections are the warm-up's, not the trace's. A path that really allocates
 * collects in every run, so the timed runs still catch it.
 */
const MAX_WARMUP = 15;
const SHORT_CALLS = 50;
async function warmUp(run: () => void): Promise<void> {
  for (let i = 0; i < MAX_WARMUP; i++) {
    const t0 = performance.now();
    run();
    const t1 = performance.now();
    await new Promise((r) => setTimeout(r, 20)); // the 'gc' entries arrive asynchronously
    if (i + 1 >= WARMUP && !gcs.some((g) => g.minor && g.start >= t0 && g.start <= t1)) return;
  }
}

async function tracesPerSecond(lens: Lens, name: string): Promise<Rate> {
  checkAllOk(lens, name);
  // many short calls first, so that the loop function has type feedback for all of its code
  // before it is optimised: with only a few long calls, V8 optimised it without feedback for
  // its first line, deoptimised it on the next call, and from then on began every timed run
  // in the interpreter (boxing every number) until on-stack replacement: 20 to 60 minor
  // collections in the timed runs (docs/performance.md)
  for (let i = 0; i < 2 * SHORT_CALLS; i++) sink += traceLoop(lens, 1);
  for (let i = 0; i < SHORT_CALLS; i++) sink += traceLoop(lens, POINTS);
  await new Promise((r) => setTimeout(r, 50)); // the background compiler finishes
  let n = POINTS;
  for (;;) {
    const t0 = performance.now();
    sink += traceLoop(lens, n);
    const dt = performance.now() - t0;
    if (dt > RUN_MS / 4) {
      n = Math.max(POINTS, Math.round((n * RUN_MS) / dt / POINTS) * POINTS);
      break;
    }
    n *= 4;
  }
  await warmUp(() => { sink += traceLoop(lens, n); });
  const wall: number[] = [], cpu: number[] = [], shares: number[] = [];
  for (let i = 0; i < RUNS; i++) {
    const t = timed(name, () => { sink += traceLoop(lens, n); });
    wall.push(n / (t.wallMs / 1000));
    cpu.push(n / (t.cpuMs / 1000));
    shares.push(t.cpuMs / t.wallMs);
  }
  return summarise(wall, cpu, shares);
}

async function mapMs(lens: Lens): Promise<Rate> {
  const map = allocatePrismMap({ size: MAP_SIZE, halfWidthMm: MAP_HALF_WIDTH_MM });
  fillPrismMap(lens, CR_MM, map);
  let bad = 0;
  for (let i = 0; i < map.status.length; i++) if (map.status[i] !== RayStatus.ok) bad++;
  if (bad > 0) process.stderr.write(`warning: ${bad} map points did not succeed\n`);
  await warmUp(() => fillPrismMap(lens, CR_MM, map));
  const wall: number[] = [], cpu: number[] = [], shares: number[] = [];
  for (let i = 0; i < RUNS; i++) {
    const t = timed('map', () => fillPrismMap(lens, CR_MM, map));
    wall.push(t.wallMs);
    cpu.push(t.cpuMs);
    shares.push(t.cpuMs / t.wallMs);
    sink += map.px[(i * 7919) % map.px.length]!;
  }
  return summarise(wall, cpu, shares);
}

// The power at the visual point (src/optics/power.ts): pencils per second through pencilPower
// (the chief ray by placedLine, then the pencil's four rays), one reused LineTrace and
// PencilPower, on the spherical lens; and a 201 x 201 power map (mean and astigmatic error)
// by fillPowerMap, and the same maps as the app's worker returns them (computePowerMaps: the
// engine's map, colours and contours).
const flat = new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm: CR_MM, pantoDeg: 0, wrapDeg: 0, eye: 'R' });
const pencil = new PencilPower();
function pencilLoop(lens: Lens, n: number): number {
  const setup = powerSetup;
  let acc = 0;
  for (let i = 0; i < n; i++) {
    const j = i & (POINTS - 1);
    trace.bx = xs[j]!; trace.by = ys[j]!;
    if (placedLine(lens, flat, trace) === RayStatus.ok && pencilPower(lens, trace, setup, pencil) === RayStatus.ok) acc += pencil.meanError;
  }
  return acc;
}
const powerSetup = pencilSetup(spherical, flat, null);

async function pencilsPerSecond(lens: Lens): Promise<Rate> {
  for (let i = 0; i < 2 * SHORT_CALLS; i++) sink += pencilLoop(lens, 1);
  for (let i = 0; i < SHORT_CALLS; i++) sink += pencilLoop(lens, POINTS);
  await new Promise((r) => setTimeout(r, 50));
  let n = POINTS;
  for (;;) {
    const t0 = performance.now();
    sink += pencilLoop(lens, n);
    const dt = performance.now() - t0;
    if (dt > RUN_MS / 4) {
      n = Math.max(POINTS, Math.round((n * RUN_MS) / dt / POINTS) * POINTS);
      break;
    }
    n *= 4;
  }
  await warmUp(() => { sink += pencilLoop(lens, n); });
  const wall: number[] = [], cpu: number[] = [], shares: number[] = [];
  for (let i = 0; i < RUNS; i++) {
    const t = timed('power', () => { sink += pencilLoop(lens, n); });
    wall.push(n / (t.wallMs / 1000));
    cpu.push(n / (t.cpuMs / 1000));
    shares.push(t.cpuMs / t.wallMs);
  }
  return summarise(wall, cpu, shares);
}

async function powerMapMs(lens: Lens): Promise<Rate> {
  const map = allocatePowerMap({ size: MAP_SIZE, halfWidthMm: MAP_HALF_WIDTH_MM });
  const setup = pencilSetup(lens, flat, null);
  fillPowerMap(lens, flat, setup, map);
  let bad = 0;
  for (let i = 0; i < map.status.length; i++) if (map.status[i] !== RayStatus.ok) bad++;
  if (bad > 0) process.stderr.write(`warning: ${bad} power map points did not succeed\n`);
  for (let i = 0; i < SHORT_CALLS; i++) fillPowerMap(lens, flat, setup, allocatePowerMap({ size: 9, halfWidthMm: MAP_HALF_WIDTH_MM }));
  await warmUp(() => fillPowerMap(lens, flat, setup, map));
  const wall: number[] = [], cpu: number[] = [], shares: number[] = [];
  for (let i = 0; i < RUNS; i++) {
    const t = timed('powerMap', () => fillPowerMap(lens, flat, setup, map));
    wall.push(t.wallMs);
    cpu.push(t.cpuMs);
    shares.push(t.cpuMs / t.wallMs);
    sink += map.meanError[(i * 7919) % map.meanError.length]!;
  }
  return summarise(wall, cpu, shares);
}

/**
 * The worker's power maps: computePowerMaps (src/worker/mapCompute.ts) as the app's worker
 * runs it after the prism map, 201 x 201 over the lens's aperture (the engine's map, colours
 * and contours), with a new lens each run so that the engine's map is never reused. Not part
 * of the allocation check (colours and contours allocate their arrays); medians of RUNS runs
 * after WARMUP.
 */
function workerPowerMs(): Rate {
  const spec = spherical.spec;
  const wall: number[] = [], cpu: number[] = [], shares: number[] = [];
  for (let i = 0; i < WARMUP + RUNS; i++) {
    const req = { id: i, spec: { ...spec, ctMm: spec.ctMm + i * 1e-6 }, crMm: CR_MM, eye: 'R' as const, size: MAP_SIZE, quantity: 'exact' as const, power: true };
    const t = timed('powerWorker', () => {
      const res = computePowerMaps(req);
      if (res.cached) throw new Error('the worker benchmark reused the engine\'s map');
    });
    if (i < WARMUP) continue;
    wall.push(t.wallMs);
    cpu.push(t.cpuMs);
    shares.push(t.cpuMs / t.wallMs);
  }
  return summarise(wall, cpu, shares);
}

const sph = await tracesPerSecond(spherical, 'spherical');
const tor = await tracesPerSecond(toric, 'toric (front)');
const torBack = json ? null : await tracesPerSecond(toricBack, 'toric (back)');
const map = await mapMs(spherical);
const power = await pencilsPerSecond(spherical);
const powerMap = await powerMapMs(spherical);
const powerWorker = workerPowerMs();

// The designer's range (src/case/range.ts, docs/range.md): the issue's full range (sphere
// -20..+20 step 0.25, cylinder 0..-4 step 0.5, 8 directions, 3 tolerances: 34 776 rows) and
// the app's typical range (sphere step 0.5, the same cylinders, 4 directions, one tolerance:
// 2 916 rows), each computed cold (no lens remembered from a previous run), one thread.
// Medians of RANGE_RUNS runs after one warm-up: each run takes seconds.
const RANGE_RUNS = 5;
function rangeTime(name: string, input: RangeInput): Rate & { rows: number } {
  const spec = readRangeSpec(input);
  let rows = rangeRows(spec).length; // warm-up
  const wall: number[] = [], cpu: number[] = [], shares: number[] = [];
  for (let i = 0; i < RANGE_RUNS; i++) {
    clearRangeCache();
    const t = timed(name, () => { rows = rangeRows(spec).length; });
    wall.push(t.wallMs); cpu.push(t.cpuMs); shares.push(t.cpuMs / t.wallMs);
  }
  return { ...summarise(wall, cpu, shares), rows };
}
const range = rangeTime('range', { power: '-20:20:0.25', cyl: '0:-4:-0.5', dir: '0:315:45', maxPrism: '0.25,0.5,1', fields: {} });
const rangeApp = rangeTime('rangeApp', { power: '-20:20:0.5', cyl: '0:-4:-0.5', dir: 'nasal,temporal,up,down', maxPrism: '0.5', fields: {} });
if (!Number.isFinite(sink)) throw new Error('benchmark produced a non-finite prism; the engine has a bug');

// let the GC entries arrive, then count those inside the timed runs
await new Promise((r) => setTimeout(r, 50));
gcObserver.disconnect();
const gcCounts = {
  spherical: minorGcsIn('spherical'), toric: minorGcsIn('toric (front)'), toricBack: minorGcsIn('toric (back)'), map: minorGcsIn('map'),
  power: minorGcsIn('power'), powerMap: minorGcsIn('powerMap'),
};
const gcTotal = gcCounts.spherical + gcCounts.toric + gcCounts.toricBack + gcCounts.map + gcCounts.power + gcCounts.powerMap;
const gcNote =
  `${gcTotal} minor garbage collections fell inside the timed runs (spherical ${gcCounts.spherical}, ` +
  `toric ${gcCounts.toric}${json ? '' : `, toric on back ${gcCounts.toricBack}`}, map ${gcCounts.map}, ` +
  `pencils ${gcCounts.power}, power map ${gcCounts.powerMap}); ` +
  'the per-ray path should allocate nothing, so expect 0';

const machine = {
  cpu: os.cpus()[0]?.model ?? 'unknown',
  cores: os.cpus().length,
  node: process.version,
  os: `${os.type()} ${os.release()} ${os.arch()}`,
};

// below this share of wall-clock time on a core, other processes disturbed the measurement
const BUSY_SHARE = 0.9;
const minShare = Math.min(sph.share, tor.share, map.share, torBack?.share ?? 1, power.share, powerMap.share);
const busyNote =
  `the machine was busy: this process had a core only ${Math.round(100 * minShare)} % of the time in some runs, ` +
  'so the wall-clock figures are low; rerun on a quiet machine or compare the CPU-time figures';

if (json) {
  process.stdout.write(
    `${JSON.stringify({
      sphericalTracesPerSecond: Math.round(sph.median),
      toricTracesPerSecond: Math.round(tor.median),
      map201Ms: Math.round(map.median * 1000) / 1000,
      rangeMs: Math.round(range.median),
      rangeAppMs: Math.round(rangeApp.median),
      powerPerSecond: Math.round(power.median),
      powerMapMs: Math.round(powerMap.median * 1000) / 1000,
      powerMapWorkerMs: Math.round(powerWorker.median * 1000) / 1000,
      gcInTimedRuns: gcTotal,
      machine,
    })}\n`,
  );
  if (minShare < BUSY_SHARE) process.stderr.write(`warning: ${busyNote}\n`);
  if (gcTotal > 0) process.stderr.write(`error: ${gcNote}\n`);
} else {
  const m = (v: number): string => `${(v / 1e6).toFixed(2)} M/s`;
  const ms = (v: number): string => `${v.toFixed(1)} ms`;
  const line = (label: string, r: Rate, f: (v: number) => string, goal: string): string =>
    `${label.padEnd(40)} ${f(r.median).padStart(10)}  (range ${f(r.min)} .. ${f(r.max)}; ` +
    `CPU time ${f(r.cpuMedian)})${goal}`;
  console.log(`Decentra engine benchmark: median of ${RUNS} runs after at least ${WARMUP} warm-up runs, one thread, wall-clock`);
  console.log(`machine: ${machine.cpu}, ${machine.cores} logical cores, ${machine.os}, node ${machine.node}`);
  console.log('');
  console.log(line('exact traces, spherical -4.00 D', sph, m, '   goal >= 5 M/s'));
  console.log(line('exact traces, toric, cylinder on front', tor, m, '   goal >= 1 M/s'));
  if (torBack) console.log(line('exact traces, toric, cylinder on back', torBack, m, '   (default form)'));
  console.log(line(`prism map ${MAP_SIZE} x ${MAP_SIZE} (±${MAP_HALF_WIDTH_MM} mm)`, map, ms, ''));
  console.log(line('pencils (power at the visual point)', power, m, ''));
  console.log(line(`power map ${MAP_SIZE} x ${MAP_SIZE} (±${MAP_HALF_WIDTH_MM} mm), engine`, powerMap, ms, ''));
  console.log(line(`power maps ${MAP_SIZE} x ${MAP_SIZE}, as the worker returns them`, powerWorker, ms, '   goal < 100 ms'));
  console.log(line(`range, full (${range.rows} rows, cold)`, range, ms, '   goal < 2000 ms (here one thread)'));
  console.log(line(`range, app's typical (${rangeApp.rows} rows, cold)`, rangeApp, ms, '   goal < 1000 ms'));
  console.log('');
  console.log(`lenses: -4.00 D and -2.00 / -1.50 x 30 (tyre toric), index 1.6, front by the Vogel rule, ct 2 mm, ` +
    `${DIAMETER_MM} mm round, CR ${CR_MM} mm;`);
  console.log(`traces cycle through ${POINTS} visual points within ${APERTURE_MM} mm of the optical centre; ` +
    'the maps and the pencils use the spherical lens');
  console.log(`allocation check: ${gcNote}`);
  if (minShare < BUSY_SHARE) console.log(`note: ${busyNote}`);
  if (gcTotal > 0) console.log('allocation check FAILED: something on the per-ray path allocates (docs/performance.md)');
}
// the allocation check is a pass/fail: any minor collection inside a timed run fails the benchmark
if (gcTotal > 0) process.exitCode = 1;
