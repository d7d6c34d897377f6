// The per-ray path allocates nothing (DEVELOPERS.md, "The per-ray path allocates nothing";
// docs/performance.md). A caller's own loops through the public API (src/optics/index.ts)
// run 2 x 10^6 traces each after a warm-up, under a garbage-collection observer
// (node:perf_hooks 'gc' entries; --expose-gc is not needed): not one minor collection may
// start while they run. One allocated number per trace would be 32 MB over such a loop, many
// times V8's young generation, so an allocation cannot hide. If this environment cannot
// observe collections at all, the test fails and says so: it never passes unobserved.
import { describe, expect, it } from 'vitest';
import { settle, watchMinorGc } from './gcWatch.ts';
import {
  LineTrace, Placement, RayStatus, focimeter, frontForPower, lineOfSight, makeLens, placedLine,
} from '../../src/optics/index.ts';

const TRACES = 2_000_000;
/**
 * Warm-up: many short calls, so that each loop function itself is optimised (not only its
 * loop, on-stack replacement) before the timed call starts; until then, the interpreter boxes
 * every intermediate number, which is the warm-up's allocation, not the trace's.
 */
const WARMUP_CALLS = 40;
const WARMUP_TRACES = 50_000;
const POINTS = 4096; // a power of two, for the index mask

const { minor, entries, makeGarbage } = watchMinorGc();

// the lenses: invented forms, not anyone's prescription. A front toric runs the toric
// intersection (Newton) on a line of sight; a back toric and a sphere the closed forms.
const vogel = { kind: 'vogel' } as const;
const spherical = makeLens({ sphereD: -4, cylD: 0, axisDeg: 0, index: 1.6, frontD: frontForPower(vogel, -4), ctMm: 2, diameterMm: 65 });
const toricFront = makeLens({ sphereD: -2, cylD: -1.5, axisDeg: 30, index: 1.6, frontD: frontForPower(vogel, -2, -1.5), ctMm: 2, diameterMm: 65, cylOn: 'front' });
const plusToric = makeLens({ sphereD: 4, cylD: -2, axisDeg: 120, index: 1.5, frontD: frontForPower(vogel, 4, -2), ctMm: 5, diameterMm: 60 });
const tilted = new Placement({ ocXMm: 1.5, ocYMm: -2, crDistanceMm: 27, pantoDeg: 8, wrapDeg: 5, eye: 'R' });

// visual points spread over the aperture (a sunflower pattern), 20 mm at most from the centre
const xs = new Float64Array(POINTS);
const ys = new Float64Array(POINTS);
for (let i = 0; i < POINTS; i++) {
  const r = 20 * Math.sqrt((i + 0.5) / POINTS);
  xs[i] = r * Math.cos(i * 2.399963229728653);
  ys[i] = r * Math.sin(i * 2.399963229728653);
}

const out = new LineTrace();

// a caller's loops, as DEVELOPERS.md describes them: one reused LineTrace, inputs in its fields
function lineLoop(lens: typeof spherical, n: number): number {
  let acc = 0;
  for (let i = 0; i < n; i++) {
    const j = i & (POINTS - 1);
    out.sx = 0; out.sy = 0; out.sz = -27; out.bx = xs[j]!; out.by = ys[j]!;
    if (lineOfSight(lens, out) === RayStatus.ok) acc += out.px;
  }
  return acc;
}
function placedLoop(lens: typeof spherical, n: number): number {
  let acc = 0;
  for (let i = 0; i < n; i++) {
    const j = i & (POINTS - 1);
    out.bx = xs[j]!; out.by = ys[j]!;
    if (placedLine(lens, tilted, out) === RayStatus.ok) acc += out.py;
  }
  return acc;
}
function focimeterLoop(lens: typeof spherical, n: number): number {
  let acc = 0;
  for (let i = 0; i < n; i++) {
    const j = i & (POINTS - 1);
    out.bx = xs[j]!; out.by = ys[j]!;
    if (focimeter(lens, out) === RayStatus.ok) acc += out.px;
  }
  return acc;
}

const loops: [string, (n: number) => number][] = [
  ['lineOfSight, spherical', (n) => lineLoop(spherical, n)],
  ['lineOfSight, front toric', (n) => lineLoop(toricFront, n)],
  ['placedLine, tilted plus toric', (n) => placedLoop(plusToric, n)],
  ['focimeter, front toric', (n) => focimeterLoop(toricFront, n)],
];

describe('the per-ray path allocates nothing', () => {
  it('this environment reports minor garbage collections (else the check below could not fail)', async () => {
    const { before, held } = await makeGarbage();
    expect(held.length).toBe(1024);
    if (minor.length === before) {
      throw new Error(`no minor garbage collection was reported (perf_hooks 'gc' entries seen: ${entries()}); this environment cannot observe allocation, so the allocation check cannot run`);
    }
  }, 30_000);

  it.each(loops)('%s: no minor collection in 2 x 10^6 traces after warm-up', async (_name, loop) => {
    // the traces themselves are ordinary (a loop of misses would prove little)
    let sum = 0;
    for (let w = 0; w < WARMUP_CALLS; w++) sum += loop(WARMUP_TRACES);
    await settle(50); // the compiler's background thread finishes
    const t0 = performance.now();
    sum += loop(TRACES);
    const t1 = performance.now();
    await settle(100); // the entries arrive asynchronously
    const inside = minor.filter((t) => t >= t0 && t <= t1).length;
    expect(Number.isFinite(sum) && sum !== 0).toBe(true);
    expect(inside, `${inside} minor collections while ${TRACES} traces ran (${(t1 - t0).toFixed(0)} ms)`).toBe(0);
  }, 120_000);

  it('the loops trace real rays (most succeed)', () => {
    let ok = 0;
    for (let j = 0; j < POINTS; j++) {
      out.bx = xs[j]!; out.by = ys[j]!;
      if (placedLine(plusToric, tilted, out) === RayStatus.ok) ok++;
    }
    expect(ok).toBeGreaterThan(0.95 * POINTS);
  });
});
