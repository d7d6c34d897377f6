// The map worker's power maps (src/worker/mapCompute.ts, computePowerMaps): the values it
// sends are the engine's fillPowerMap values in image order (row 0 at the top of the lens),
// and its colour scales follow the prism map's rules (docs/visualiser.md, "Power maps"): the
// astigmatic error from zero on the sequential scale, the mean error on the diverging scale's
// half that its sign selects. The lenses are invented scenarios.
import { describe, expect, it } from 'vitest';
import {
  Placement, RayStatus, allocatePowerMap, fillPowerMap, frontForPower, makeLens, pencilSetup,
} from '../../src/optics/index.ts';
import { computePowerMaps } from '../../src/worker/mapCompute.ts';

const vogel = { kind: 'vogel' } as const;
const spec = (sphereD: number) => ({
  sphereD, cylD: 0, axisDeg: 0, index: 1.6, frontD: frontForPower(vogel, sphereD), ctMm: sphereD > 0 ? 7 : 2, diameterMm: 60,
});

describe('computePowerMaps', () => {
  it('sends the engine\'s values, top row first, NaN where the pencil fails', () => {
    const s = spec(-5);
    const n = 31;
    const res = computePowerMaps({ id: 1, spec: s, crMm: 27, eye: 'R', size: n, quantity: 'exact', power: true });
    const lens = makeLens(s);
    const pl = new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm: 27, pantoDeg: 0, wrapDeg: 0, eye: 'R' });
    const map = fillPowerMap(lens, pl, pencilSetup(lens, pl, null), allocatePowerMap({ size: n, halfWidthMm: lens.radiusMm }));
    let ok = 0;
    for (let row = 0; row < n; row++) {
      for (let col = 0; col < n; col++) {
        const i = row * n + col, k = (n - 1 - row) * n + col;
        if (map.status[i] === RayStatus.ok) {
          // Float32 in the message
          expect(res.mean.values[k]).toBeCloseTo(map.meanError[i]!, 5);
          expect(res.astigmatism.values[k]).toBeCloseTo(map.astigmaticError[i]!, 5);
          ok++;
        } else {
          expect(Number.isNaN(res.mean.values[k])).toBe(true);
        }
      }
    }
    // the aperture is the disc inscribed in the square grid (pi / 4 of it), less its rim
    expect(ok).toBeGreaterThan(0.5 * n * n);
  });

  it('puts the astigmatic error on a scale from zero and the mean error on the half its sign selects', () => {
    for (const sphereD of [6, -6]) {
      const res = computePowerMaps({ id: 2, spec: spec(sphereD), crMm: 27, eye: 'R', size: 41, quantity: 'exact', power: true });
      expect(res.astigmatism.lo).toBe(0);
      expect(res.astigmatism.hi).toBeGreaterThan(0);
      expect([res.astigmatism.tLo, res.astigmatism.tHi]).toEqual([0, 1]);
      // one sign over the lens (beyond 0.005 D at the centre): one half of the diverging scale
      const m = res.mean;
      const signs = new Set<number>();
      for (const v of m.values) if (Math.abs(v) > 0.005) signs.add(Math.sign(v));
      if (signs.size === 1) {
        expect([m.tLo, m.tHi]).toEqual(signs.has(1) ? [0.54, 1] : [0, 0.46]);
      } else {
        expect(m.lo).toBe(-m.hi);
      }
      expect(m.contours.length).toBeGreaterThan(0);
    }
  });

  it('reuses the engine\'s map for the same lens, CR distance and eye, and only then', () => {
    const s = spec(3);
    const a = computePowerMaps({ id: 3, spec: s, crMm: 25, eye: 'R', size: 21, quantity: 'exact', power: true });
    const b = computePowerMaps({ id: 4, spec: s, crMm: 25, eye: 'R', size: 21, quantity: 'error', power: true });
    const c = computePowerMaps({ id: 5, spec: s, crMm: 26, eye: 'R', size: 21, quantity: 'error', power: true });
    expect([a.cached, b.cached, c.cached]).toEqual([false, true, false]);
    expect(Array.from(b.mean.values)).toEqual(Array.from(a.mean.values));
    expect(Array.from(c.mean.values)).not.toEqual(Array.from(a.mean.values));
  });
});
