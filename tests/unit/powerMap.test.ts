// fillPowerMap (src/optics/powerMap.ts): the loop gives, at every grid point, what the engine's
// single-point path gives (pencilPower after placedLineOfSight, and fourAnswers' power), and
// the map of a lens with rotational symmetry has that symmetry. The lenses are invented
// scenarios, not anyone's prescription.
import { describe, expect, it } from 'vitest';
import {
  LineTrace, PencilPower, Placement, RayStatus, allocatePowerMap, allocatePrismMap, fillPowerMap, fillPrismMap,
  fourAnswers, frontForPower, gridCoordinate, makeLens, pencilPower, pencilSetup, placedLineOfSight,
} from '../../src/optics/index.ts';

const vogel = { kind: 'vogel' } as const;
const plus = makeLens({ sphereD: 6, cylD: 0, axisDeg: 0, index: 1.5, frontD: frontForPower(vogel, 6), ctMm: 8, diameterMm: 60 });
const toric = makeLens({ sphereD: -3, cylD: -1.5, axisDeg: 30, index: 1.6, frontD: frontForPower(vogel, -3, -1.5), ctMm: 2, diameterMm: 60 });
const flat = { ocXMm: 0, ocYMm: 0, crDistanceMm: 27, pantoDeg: 0, wrapDeg: 0 } as const;

describe('fillPowerMap', () => {
  it('equals pencilPower after placedLineOfSight at every sampled grid point, exactly', () => {
    // the same engine path, called point by point with fresh objects: the loop adds nothing
    for (const [lens, spec] of [
      [toric, { ...flat, eye: 'R' as const }],
      [plus, { ...flat, ocXMm: 1, pantoDeg: 8, wrapDeg: 5, eye: 'L' as const }],
    ] as const) {
      const pl = new Placement(spec);
      const setup = pencilSetup(lens, pl, null);
      const map = fillPowerMap(lens, pl, setup, allocatePowerMap({ size: 21, halfWidthMm: 24 }));
      let checked = 0;
      for (let row = 0; row < 21; row += 3) {
        for (let col = 0; col < 21; col += 2) {
          const i = row * 21 + col;
          const t = new LineTrace(), p = new PencilPower();
          let st = placedLineOfSight(lens, pl, gridCoordinate(col, 21, 24), gridCoordinate(row, 21, 24), t);
          if (st === RayStatus.ok) st = pencilPower(lens, t, setup, p);
          expect(map.status[i]).toBe(st);
          if (st === RayStatus.ok) {
            expect(map.meanError[i]).toBe(p.meanError);
            expect(map.astigmaticError[i]).toBe(p.astigmaticError);
            checked++;
          } else {
            expect(map.meanError[i]).toBe(0);
            expect(map.astigmaticError[i]).toBe(0);
          }
        }
      }
      expect(checked).toBeGreaterThan(40);
    }
  });

  it('equals the power of fourAnswers (the panel\'s path) at grid points', () => {
    const pl = new Placement({ ...flat, eye: 'R' });
    const map = fillPowerMap(toric, pl, pencilSetup(toric, pl, null), allocatePowerMap({ size: 11, halfWidthMm: 15 }));
    for (const [row, col] of [[5, 5], [0, 3], [8, 10], [2, 7]] as const) {
      const a = fourAnswers(toric, 27, gridCoordinate(col, 11, 15), gridCoordinate(row, 11, 15), 'R');
      if ('failure' in a.power) throw new Error(a.power.message);
      expect(map.meanError[row * 11 + col]).toBe(a.power.meanError);
      expect(map.astigmaticError[row * 11 + col]).toBe(a.power.astigmaticError);
    }
  });

  it('marks failed points as the prism map does (same line of sight), with zeros in the values', () => {
    // a grid wider than the 60 mm lens: its corners have no line of sight
    const grid = { size: 25, halfWidthMm: 32 };
    const pl = new Placement({ ...flat, eye: 'R' });
    const pm = fillPowerMap(plus, pl, pencilSetup(plus, pl, null), allocatePowerMap(grid));
    const prism = fillPrismMap(plus, 27, allocatePrismMap(grid));
    let failed = 0;
    for (let i = 0; i < pm.status.length; i++) {
      if (prism.status[i] !== RayStatus.ok) {
        expect(pm.status[i]).toBe(prism.status[i]);
        expect(pm.meanError[i]).toBe(0);
        failed++;
      }
    }
    expect(failed).toBeGreaterThan(0);
  });

  it('a lens of revolution on its axis gives a map even in x and in y, and the same along x as along y', () => {
    // physical symmetry: an untilted spherical lens with the centre of rotation on its axis is
    // symmetric under x -> -x, y -> -y and a quarter turn, so its errors must be too
    const n = 41, hw = 20;
    const pl = new Placement({ ...flat, eye: 'R' });
    const map = fillPowerMap(plus, pl, pencilSetup(plus, pl, null), allocatePowerMap({ size: n, halfWidthMm: hw }));
    const at = (a: Float64Array, row: number, col: number) => a[row * n + col]!;
    let maxAst = 0;
    for (let row = 0; row < n; row++) {
      for (let col = 0; col < n; col++) {
        expect(map.status[row * n + col]).toBe(RayStatus.ok);
        for (const a of [map.meanError, map.astigmaticError]) {
          const v = at(a, row, col);
          expect(Math.abs(at(a, row, n - 1 - col) - v)).toBeLessThan(1e-6);
          expect(Math.abs(at(a, n - 1 - row, col) - v)).toBeLessThan(1e-6);
          expect(Math.abs(at(a, col, row) - v)).toBeLessThan(1e-6);
        }
        maxAst = Math.max(maxAst, at(map.astigmaticError, row, col));
      }
    }
    // and the map is not trivially symmetric: a +6 D lens 20 mm off axis has oblique astigmatism
    expect(maxAst).toBeGreaterThan(0.05);
    // on the axis the pencil's vergence is the back vertex power (its definition): no error
    const c = (n - 1) / 2;
    expect(Math.abs(at(map.meanError, c, c))).toBeLessThan(1e-4);
    expect(at(map.astigmaticError, c, c)).toBeLessThan(1e-4);
  });
});
