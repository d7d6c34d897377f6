/**
 * Invariants of the four answers over random valid lenses and visual points (fast-check):
 * nothing non-finite ever escapes; c -> -c flips the prism of a rotationally symmetric lens;
 * the left eye's lens is the right eye's mirrored.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { type Answer, type Eye, Lens, type LensSpec, OpticsError, fourAnswers, isFailure } from '../../src/optics/index.ts';

// Source of the symmetry properties: the mirror and point symmetry of the lens geometry
// (a lens of revolution is symmetric under (x, y) -> (-x, -y); mirroring x -> -x maps a
// cylinder axis θ to 180° - θ); the labels follow docs/conventions.md (nasal is +x for the right eye,
// -x for the left).

const specArb = fc.record({
  sphereD: fc.double({ min: -20, max: 20, noNaN: true }),
  cylD: fc.double({ min: -6, max: 0, noNaN: true }),
  axisDeg: fc.double({ min: 0, max: 180, noNaN: true, maxExcluded: true }),
  index: fc.double({ min: 1.45, max: 1.9, noNaN: true }),
  frontD: fc.double({ min: -2, max: 22, noNaN: true }),
  ctMm: fc.double({ min: 0.5, max: 15, noNaN: true }),
  frontConic: fc.oneof(fc.constant(0), fc.double({ min: -5, max: 2, noNaN: true })),
  backConic: fc.oneof(fc.constant(0), fc.double({ min: -2, max: 1, noNaN: true })),
  cylOn: fc.constantFrom<'back' | 'front'>('back', 'front'),
  toricForm: fc.constantFrom<'tyre' | 'barrel'>('tyre', 'barrel'),
  diameterMm: fc.option(fc.double({ min: 20, max: 80, noNaN: true }), { nil: undefined }),
});

/** A lens, or null where the engine rightly refuses the form (OpticsError: an impossible lens). */
function build(spec: LensSpec): Lens | null {
  try {
    return new Lens(spec);
  } catch (e) {
    if (e instanceof OpticsError) return null;
    throw e;
  }
}

/** Every number anywhere in the value is finite (null and strings allowed). */
function allFinite(v: unknown, path = '$', bad: string[] = []): string[] {
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) bad.push(`${path} = ${v}`);
  } else if (v && typeof v === 'object') {
    for (const [k, x] of Object.entries(v)) allFinite(x, `${path}.${k}`, bad);
  }
  return bad;
}

const point = fc.double({ min: -60, max: 60, noNaN: true });

describe('fourAnswers never lets NaN or Infinity escape (project rule: no NaN reaches a screen or file)', () => {
  test('every number is finite, and an uncomputable answer is a failure object', () => {
    fc.assert(
      fc.property(specArb, point, point, fc.double({ min: 5, max: 60, noNaN: true }), fc.constantFrom<Eye>('R', 'L'), (spec, x, y, cr, eye) => {
        const lens = build(spec);
        if (!lens) return;
        const a = fourAnswers(lens, cr, x, y, eye);
        expect(allFinite(a)).toEqual([]);
        for (const ans of [a.exact, a.focimeter]) {
          if (isFailure(ans)) {
            expect(['miss', 'tir', 'geometry', 'edge']).toContain(ans.failure);
            expect(ans.message.length).toBeGreaterThan(10);
          }
        }
        expect(a.error === null).toBe(isFailure(a.exact));
      }),
      { numRuns: 600, seed: 4242 },
    );
  });

  test('extreme but legal points: the optical centre, the far rim, tiny decentrations', () => {
    fc.assert(
      fc.property(specArb, fc.constantFrom(0, 1e-300, 5e-324, 1e-9, 49.999, -50), fc.constantFrom(0, -1e-12, 30), (spec, x, y) => {
        const lens = build(spec);
        if (!lens) return;
        expect(allFinite(fourAnswers(lens, 27, x, y, 'R'))).toEqual([]);
      }),
      { numRuns: 200, seed: 99 },
    );
  });
});

const validSpec = specArb.filter((s) => build({ ...s, diameterMm: undefined }) !== null).map((s) => ({ ...s, diameterMm: undefined }));
const near = fc.double({ min: -20, max: 20, noNaN: true });

describe('c -> -c flips the prism of a spherical lens (point symmetry of a lens of revolution)', () => {
  test('exact and focimeter: p(-c) = -p(c), failures alike', () => {
    let compared = 0;
    fc.assert(
      fc.property(validSpec, near, near, (s, x, y) => {
        const lens = new Lens({ ...s, cylD: 0 });
        const a = fourAnswers(lens, 27, x, y, 'R'), b = fourAnswers(lens, 27, -x, -y, 'R');
        for (const [p, q] of [[a.exact, b.exact], [a.focimeter, b.focimeter]] as [Answer, Answer][]) {
          expect(isFailure(p)).toBe(isFailure(q));
          if (isFailure(p) || isFailure(q)) continue;
          const tol = 1e-9 * Math.max(1, p.magnitude);
          expect(Math.abs(p.x + q.x)).toBeLessThan(tol);
          expect(Math.abs(p.y + q.y)).toBeLessThan(tol);
          compared++;
        }
        expect(Math.abs(a.paraxial.x + b.paraxial.x)).toBeLessThan(1e-12);
      }),
      { numRuns: 300, seed: 7 },
    );
    expect(compared).toBeGreaterThan(300); // most of the 600 answers were numbers, not failures
  });
});

describe('right and left eyes mirror (x -> -x, axis -> 180° - axis)', () => {
  test('mirrored lens and point: px -> -px, py unchanged, same base-in/out and up/down labels', () => {
    let compared = 0;
    fc.assert(
      fc.property(validSpec, near, near, (s, x, y) => {
        const right = new Lens(s);
        const left = new Lens({ ...s, axisDeg: s.axisDeg === 0 ? 0 : 180 - s.axisDeg });
        const a = fourAnswers(right, 27, x, y, 'R'), b = fourAnswers(left, 27, -x, y, 'L');
        const pairs: [Answer, Answer][] = [[a.prentice, b.prentice], [a.paraxial, b.paraxial], [a.exact, b.exact], [a.focimeter, b.focimeter], [a.focimeterFirstOrder, b.focimeterFirstOrder]];
        for (const [p, q] of pairs) {
          expect(isFailure(p)).toBe(isFailure(q));
          if (isFailure(p) || isFailure(q)) continue;
          const tol = 1e-9 * Math.max(1, p.magnitude);
          expect(Math.abs(p.x + q.x)).toBeLessThan(tol);
          expect(Math.abs(p.y - q.y)).toBeLessThan(tol);
          if (Math.abs(p.x) > 1e-6) expect(q.horizontal.base).toBe(p.horizontal.base);
          if (Math.abs(p.y) > 1e-6) expect(q.vertical.base).toBe(p.vertical.base);
          if (p === a.exact) compared++;
        }
      }),
      { numRuns: 300, seed: 11 },
    );
    expect(compared).toBeGreaterThan(150);
  });
});
