/**
 * Power matrices and sphero-cylinder conversions: powerMatrix, toSpheroCyl and transpose
 * round trips, with the eigen-structure the references give (eigenvalues S and S + C, the
 * axis meridian having power S).
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { eigs } from 'mathjs';
import { type SpheroCyl, det, normaliseAxis, powerMatrix, toSpheroCyl, transpose } from '../../src/optics/index.ts';

// Source: dioptric power matrix (Long, Am J Optom Physiol Opt 1976;53:27-33; Harris), eigenvalues S
// and S + C; transposition S / C x θ = (S + C) / -C x (θ ± 90) (M. Jalie, "The Principles of
// Ophthalmic Lenses"; from memory).

const rx = fc.record({
  sphereD: fc.double({ min: -25, max: 25, noNaN: true }),
  cylD: fc.double({ min: -8, max: 8, noNaN: true }).filter((c) => Math.abs(c) > 1e-3),
  axisDeg: fc.double({ min: 0, max: 180, noNaN: true, maxExcluded: true }),
});

/** Same lens? Compare power matrices (axis ambiguities drop out). */
function sameLens(a: SpheroCyl, b: SpheroCyl): void {
  const m = powerMatrix(a.sphereD, a.cylD, a.axisDeg), n = powerMatrix(b.sphereD, b.cylD, b.axisDeg);
  for (let i = 0; i < 4; i++) expect(Math.abs(m[i]! - n[i]!)).toBeLessThan(1e-9);
}

/** Axis difference modulo 180°. */
const axisGap = (a: number, b: number): number => {
  const d = Math.abs(normaliseAxis(a) - normaliseAxis(b));
  return Math.min(d, 180 - d);
};

describe('power matrix (Long 1976)', () => {
  test('hand value: -2.00 / -1.50 x 30 = [[-2.375, 0.6495], [0.6495, -3.125]]', () => {
    // sin²30 = 0.25, cos²30 = 0.75, sin cos = 0.4330127; -C sin cos = 1.5 × 0.4330127 = 0.649519
    const m = powerMatrix(-2, -1.5, 30);
    expect(m[0]).toBeCloseTo(-2.375, 12);
    expect(m[1]).toBeCloseTo(0.649519052838329, 12);
    expect(m[2]).toBeCloseTo(0.649519052838329, 12);
    expect(m[3]).toBeCloseTo(-3.125, 12);
  });

  test('eigenvalues are S and S + C (checked with mathjs eigs); det = S (S + C); symmetric', () => {
    fc.assert(
      fc.property(rx, (r) => {
        const m = powerMatrix(r.sphereD, r.cylD, r.axisDeg);
        expect(m[1]).toBe(m[2]);
        const ev = (eigs([[m[0], m[1]], [m[2], m[3]]]).values as number[]).slice().sort((a, b) => a - b);
        const want = [r.sphereD, r.sphereD + r.cylD].sort((a, b) => a - b);
        expect(Math.abs(ev[0]! - want[0]!)).toBeLessThan(1e-9);
        expect(Math.abs(ev[1]! - want[1]!)).toBeLessThan(1e-9);
        expect(Math.abs(det(m) - r.sphereD * (r.sphereD + r.cylD))).toBeLessThan(1e-8);
        // the axis meridian has power S: F (cos θ, sin θ) = S (cos θ, sin θ)
        const t = (r.axisDeg * Math.PI) / 180;
        expect(Math.abs(m[0] * Math.cos(t) + m[1] * Math.sin(t) - r.sphereD * Math.cos(t))).toBeLessThan(1e-9);
        expect(Math.abs(m[2] * Math.cos(t) + m[3] * Math.sin(t) - r.sphereD * Math.sin(t))).toBeLessThan(1e-9);
      }),
      { numRuns: 300, seed: 1 },
    );
  });
});

describe('toSpheroCyl and transpose round trips', () => {
  test('powerMatrix -> toSpheroCyl gives back the prescription in the asked cylinder sign', () => {
    fc.assert(
      fc.property(rx, (r) => {
        const m = powerMatrix(r.sphereD, r.cylD, r.axisDeg);
        const minus = toSpheroCyl(m, 'minus'), plus = toSpheroCyl(m, 'plus');
        expect(minus.cylD).toBeLessThanOrEqual(0);
        expect(plus.cylD).toBeGreaterThanOrEqual(0);
        sameLens(minus, r);
        sameLens(plus, r);
        // the same sign comes back unchanged (axis modulo 180)
        const same = r.cylD < 0 ? minus : plus;
        expect(Math.abs(same.sphereD - r.sphereD)).toBeLessThan(1e-9);
        expect(Math.abs(same.cylD - r.cylD)).toBeLessThan(1e-9);
        // the axis is well defined only when the cylinder is not tiny
        expect(axisGap(same.axisDeg, r.axisDeg)).toBeLessThan(1e-6 / Math.abs(r.cylD));
        expect(same.axisDeg).toBeGreaterThanOrEqual(0);
        expect(same.axisDeg).toBeLessThan(180);
      }),
      { numRuns: 400, seed: 2 },
    );
  });

  test('transpose is the same lens, flips the cylinder sign, and twice is the identity', () => {
    fc.assert(
      fc.property(rx, (r) => {
        const t = transpose(r);
        sameLens(t, r);
        expect(Math.sign(t.cylD)).toBe(-Math.sign(r.cylD));
        expect(Math.abs(t.sphereD - (r.sphereD + r.cylD))).toBeLessThan(1e-12);
        expect(axisGap(t.axisDeg, r.axisDeg + 90)).toBeLessThan(1e-9);
        const back = transpose(t);
        expect(Math.abs(back.sphereD - r.sphereD)).toBeLessThan(1e-12);
        expect(Math.abs(back.cylD - r.cylD)).toBeLessThan(1e-12);
        expect(axisGap(back.axisDeg, r.axisDeg)).toBeLessThan(1e-9);
      }),
      { numRuns: 300, seed: 3 },
    );
  });

  test('hand transposition: +1.00 / -2.00 x 170 = -1.00 / +2.00 x 80 (standard rule)', () => {
    const t = transpose({ sphereD: 1, cylD: -2, axisDeg: 170 });
    expect(t.sphereD).toBeCloseTo(-1, 12);
    expect(t.cylD).toBeCloseTo(2, 12);
    expect(t.axisDeg).toBeCloseTo(80, 9);
  });

  test('a sphere has no axis: toSpheroCyl gives cylinder 0 at axis 0', () => {
    const s = toSpheroCyl(powerMatrix(-3.25, 0, 77));
    expect(s.sphereD).toBeCloseTo(-3.25, 12);
    expect(s.cylD).toBe(0);
    expect(s.axisDeg).toBe(0);
  });

  test('normaliseAxis maps any angle into [0, 180)', () => {
    for (const [a, want] of [[180, 0], [-10, 170], [360, 0], [181, 1], [90, 90], [-180, 0]] as const) {
      expect(normaliseAxis(a)).toBeCloseTo(want, 12);
    }
  });
});
