/**
 * Symmetries of the power at the visual point (fast-check). Source: the geometry itself. An
 * untilted lens of revolution with the centre of rotation on its axis is symmetric under a
 * half turn about the axis, (x, y) -> (-x, -y), so the pencil through -c is the pencil through
 * c turned by 180°, which leaves a vergence matrix unchanged: the errors are even in the
 * visual point. Mirroring x -> -x maps the right eye's lens and placement onto the left
 * eye's (docs/conventions.md: both eyes share one frame, the cylinder axis θ mirrors to
 * 180° - θ), so the left eye at (-x, y) sees the right eye's errors at (x, y).
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { Lens, type LensSpec, LineTrace, OpticsError, PencilPower, Placement, pencilPower, pencilSetup, placedLine } from '../../src/optics/index.ts';

function build(spec: LensSpec): Lens | null {
  try {
    return new Lens(spec);
  } catch (e) {
    if (e instanceof OpticsError) return null;
    throw e;
  }
}

function errorsAt(lens: Lens, pl: Placement, x: number, y: number): PencilPower | null {
  const t = new LineTrace();
  t.bx = x; t.by = y;
  if (placedLine(lens, pl, t) !== 0) return null;
  const p = new PencilPower();
  return pencilPower(lens, t, pencilSetup(lens, pl, null), p) === 0 ? p : null;
}

const revolution = fc.record({
  sphereD: fc.double({ min: -15, max: 10, noNaN: true }),
  index: fc.double({ min: 1.49, max: 1.8, noNaN: true }),
  frontD: fc.double({ min: 0.5, max: 12, noNaN: true }),
  ctMm: fc.double({ min: 1, max: 7, noNaN: true }),
  frontConic: fc.oneof(fc.constant(0), fc.double({ min: -3, max: 1, noNaN: true })),
});
const point = fc.tuple(fc.double({ min: -18, max: 18, noNaN: true }), fc.double({ min: -18, max: 18, noNaN: true }));

describe('power at the visual point: symmetries of the geometry', () => {
  test('even in the visual point for an untilted lens of revolution, CR on the axis', () => {
    fc.assert(fc.property(revolution, point, fc.double({ min: 20, max: 32, noNaN: true }), (s, [x, y], cr) => {
      const lens = build({ ...s, cylD: 0, axisDeg: 0 });
      if (!lens) return;
      const pl = new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm: cr, pantoDeg: 0, wrapDeg: 0, eye: 'R' });
      const a = errorsAt(lens, pl, x, y), b = errorsAt(lens, pl, -x, -y);
      if (!a || !b) { expect(a === null && b === null).toBe(true); return; }
      expect(Math.abs(a.meanError - b.meanError)).toBeLessThan(1e-7);
      expect(Math.abs(a.astigmaticError - b.astigmaticError)).toBeLessThan(1e-7);
    }), { numRuns: 300 });
  });

  test('mirror between eyes: the left eye at (-x, y) gets the right eye\'s errors at (x, y), torics and tilt included', () => {
    const spec = fc.record({
      sphereD: fc.double({ min: -12, max: 8, noNaN: true }),
      cylD: fc.double({ min: -4, max: 0, noNaN: true }),
      axisDeg: fc.double({ min: 0, max: 179, noNaN: true }),
      index: fc.double({ min: 1.49, max: 1.75, noNaN: true }),
      frontD: fc.double({ min: 1, max: 10, noNaN: true }),
      ctMm: fc.double({ min: 1.5, max: 6, noNaN: true }),
    });
    const place = fc.record({
      ocXMm: fc.double({ min: -5, max: 5, noNaN: true }), ocYMm: fc.double({ min: -5, max: 5, noNaN: true }),
      crDistanceMm: fc.double({ min: 22, max: 30, noNaN: true }),
      pantoDeg: fc.double({ min: -5, max: 15, noNaN: true }), wrapDeg: fc.double({ min: 0, max: 15, noNaN: true }),
    });
    fc.assert(fc.property(spec, place, point, (s, p, [x, y]) => {
      const right = build(s);
      const left = build({ ...s, axisDeg: s.axisDeg === 0 ? 0 : 180 - s.axisDeg });
      if (!right || !left) return;
      const pr = new Placement({ ...p, eye: 'R' });
      const pLeft = new Placement({ ...p, ocXMm: -p.ocXMm, eye: 'L' });
      const a = errorsAt(right, pr, x, y), b = errorsAt(left, pLeft, -x, y);
      if (!a || !b) { expect(a === null && b === null).toBe(true); return; }
      expect(Math.abs(a.meanError - b.meanError)).toBeLessThan(1e-7);
      expect(Math.abs(a.astigmaticError - b.astigmaticError)).toBeLessThan(1e-7);
      // the matrix mirrors: the off-diagonal term changes sign
      expect(Math.abs(a.vXY + b.vXY)).toBeLessThan(1e-7);
    }), { numRuns: 300 });
  });
});
