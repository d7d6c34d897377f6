// The power map's loop allocates nothing per point (DEVELOPERS.md, "The per-ray path allocates
// nothing"; docs/performance.md), checked as tests/unit/allocation.test.ts checks the traces:
// after a warm-up, maps totalling about 10^6 pencils (5 x 10^6 traces) run under a
// garbage-collection observer (node:perf_hooks 'gc' entries) and not one minor collection may
// start while they run. If this environment cannot observe collections at all, the test fails
// and says so. The lenses are invented scenarios.
import { describe, expect, it } from 'vitest';
import { settle, watchMinorGc } from './gcWatch.ts';
import {
  Placement, RayStatus, allocatePowerMap, fillPowerMap, frontForPower, makeLens, pencilSetup,
} from '../../src/optics/index.ts';

const { minor, entries, makeGarbage } = watchMinorGc();

const vogel = { kind: 'vogel' } as const;
const spherical = makeLens({ sphereD: -4, cylD: 0, axisDeg: 0, index: 1.6, frontD: frontForPower(vogel, -4), ctMm: 2, diameterMm: 65 });
const plusToric = makeLens({ sphereD: 4, cylD: -2, axisDeg: 120, index: 1.5, frontD: frontForPower(vogel, 4, -2), ctMm: 5, diameterMm: 60 });
const flat = new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm: 27, pantoDeg: 0, wrapDeg: 0, eye: 'R' });
const tilted = new Placement({ ocXMm: 1.5, ocYMm: -2, crDistanceMm: 27, pantoDeg: 8, wrapDeg: 5, eye: 'R' });

/** about 10^6 pencils: 25 maps of 201 x 201 */
const MAPS = 25;
const WARMUP_MAPS = 20;

const cases: [string, typeof spherical, Placement][] = [
  ['spherical, untilted', spherical, flat],
  ['plus toric, tilted and wrapped', plusToric, tilted],
];

describe('the power map loop allocates nothing', () => {
  it('this environment reports minor garbage collections (else the check below could not fail)', async () => {
    const { before, held } = await makeGarbage();
    expect(held.length).toBe(1024);
    if (minor.length === before) {
      throw new Error(`no minor garbage collection was reported (perf_hooks 'gc' entries seen: ${entries()}); this environment cannot observe allocation`);
    }
  }, 30_000);

  it.each(cases)('%s: no minor collection in 25 maps of 201 x 201 after warm-up', async (_name, lens, pl) => {
    const setup = pencilSetup(lens, pl, null);
    const map = allocatePowerMap({ size: 201, halfWidthMm: 20 });
    const small = allocatePowerMap({ size: 21, halfWidthMm: 20 });
    // many short calls first, so that the loop is optimised before the timed calls
    for (let w = 0; w < 200; w++) fillPowerMap(lens, pl, setup, small);
    for (let w = 0; w < WARMUP_MAPS; w++) fillPowerMap(lens, pl, setup, map);
    await settle(50);
    let sum = 0;
    const t0 = performance.now();
    for (let m = 0; m < MAPS; m++) {
      fillPowerMap(lens, pl, setup, map);
      sum += map.astigmaticError[(m * 7919) % map.astigmaticError.length]!;
    }
    const t1 = performance.now();
    await settle(100);
    const inside = minor.filter((t) => t >= t0 && t <= t1).length;
    let ok = 0;
    for (let i = 0; i < map.status.length; i++) if (map.status[i] === RayStatus.ok) ok++;
    // the pencils are ordinary ones (a map of failures would prove little)
    expect(ok).toBeGreaterThan(0.95 * map.status.length);
    expect(Number.isFinite(sum)).toBe(true);
    expect(inside, `${inside} minor collections while ${MAPS} maps ran (${(t1 - t0).toFixed(0)} ms)`).toBe(0);
  }, 120_000);
});
