/**
 * The drawn shape of an edged lens in the both-eyes view (src/scene/binocular/edgedLens.ts):
 * a rounded rectangle the size of the frame's box. Expectations from the boxing system
 * (ISO 8624: the box is the rectangle A wide and B high that just encloses the lens shape, so
 * the drawn shape touches each side of its box and stays inside it) and from plane geometry
 * (a closed outline; unit outward normals; the perimeter of a rounded rectangle,
 * 2(w + h) - (8 - 2π) r). The boxes are invented.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CORNER_FRACTION, type Outline, boxOutline, outlinePoint } from '../../src/scene/binocular/edgedLens.ts';

const N = 2000;

function sample(o: Outline): Float64Array[] {
  const out: Float64Array[] = [];
  for (let j = 0; j <= N; j++) {
    const p = new Float64Array(4);
    outlinePoint(o, j / N, p);
    out.push(p);
  }
  return out;
}

describe('the edged lens outline', () => {
  it('just fills its box: touches each side, never leaves it, and closes on itself', () => {
    fc.assert(fc.property(
      fc.double({ min: 30, max: 70, noNaN: true }), fc.double({ min: 20, max: 55, noNaN: true }),
      fc.double({ min: 12, max: 24, noNaN: true }), fc.double({ min: -5, max: 5, noNaN: true }), fc.double({ min: 5, max: 30, noNaN: true }),
      (a, b, dbl, ox, fh) => {
        // a left-eye box as the case gives it (docs/case-file.md), in a lens frame whose origin is (ox, 0)
        const cx = (a + dbl) / 2;
        const box = { xMin: cx - a / 2, xMax: cx + a / 2, yMin: -fh, yMax: b - fh };
        const o = boxOutline(box, ox, 0, { cx: 0, cy: 0, hw: 0, hh: 0, r: 0 });
        expect(o.r).toBeCloseTo(CORNER_FRACTION * Math.min(a, b), 9);
        const pts = sample(o);
        let xMin = Infinity, xMax = -Infinity, yMin = Infinity, yMax = -Infinity;
        for (const p of pts) {
          xMin = Math.min(xMin, p[0]!); xMax = Math.max(xMax, p[0]!);
          yMin = Math.min(yMin, p[1]!); yMax = Math.max(yMax, p[1]!);
          expect(Math.hypot(p[2]!, p[3]!)).toBeCloseTo(1, 12);
        }
        expect(xMin).toBeCloseTo(box.xMin - ox, 9);
        expect(xMax).toBeCloseTo(box.xMax - ox, 9);
        expect(yMin).toBeCloseTo(box.yMin, 9);
        expect(yMax).toBeCloseTo(box.yMax, 9);
        expect(pts[N]![0]).toBeCloseTo(pts[0]![0]!, 12);
        expect(pts[N]![1]).toBeCloseTo(pts[0]![1]!, 12);
      },
    ), { numRuns: 60 });
  });

  it('has the perimeter of a rounded rectangle, points evenly along it, normals outward', () => {
    const o = boxOutline({ xMin: -27, xMax: 27, yMin: -20, yMax: 18 }, 0, 0, { cx: 0, cy: 0, hw: 0, hh: 0, r: 0 });
    const pts = sample(o);
    let len = 0;
    for (let j = 1; j <= N; j++) len += Math.hypot(pts[j]![0]! - pts[j - 1]![0]!, pts[j]![1]! - pts[j - 1]![1]!);
    const w = 54, h = 38;
    const want = 2 * (w + h) - (8 - 2 * Math.PI) * o.r;
    expect(Math.abs(len - want) / want).toBeLessThan(1e-5);
    // even steps along the perimeter (equal parameter steps are equal lengths)
    const step = want / N;
    for (let j = 1; j <= N; j++) {
      const d = Math.hypot(pts[j]![0]! - pts[j - 1]![0]!, pts[j]![1]! - pts[j - 1]![1]!);
      expect(Math.abs(d - step)).toBeLessThan(step * 0.01);
    }
    // outward: the normal points away from the shape's centre
    for (const p of pts) expect((p[0]! - o.cx) * p[2]! + (p[1]! - o.cy) * p[3]!).toBeGreaterThan(0);
    // the middle of each side, where t says
    const p = new Float64Array(4);
    outlinePoint(o, 0, p);
    expect([p[0], p[1], p[2], p[3]]).toEqual([27, o.cy, 1, 0]);
  });
});
