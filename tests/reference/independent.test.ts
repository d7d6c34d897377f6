/**
 * The engine's exact line-of-sight and focimeter prism against the independent 40-digit
 * reference of ./independent.ts (written from docs/method.md and docs/conventions.md and
 * Snell's law in vector form, E. Hecht, "Optics", ch. 4), its
 * first-order values against an independent (y, nu) matrix trace, and Prentice against a
 * general-purpose matrix product (mathjs multiply(F, c)).
 */
import { describe, expect, test } from 'vitest';
import { matrix, multiply, type Matrix } from 'mathjs';
import { type Answer, type FourAnswers, Lens, fourAnswers, isFailure } from '../../src/optics/index.ts';
import { type RefAnswer, type RefCase, randomCase, refExact, refFocimeter, refParaxial, rng } from './independent.ts';

export const source =
  'independent 40-digit real-ray trace (tests/reference/independent.ts, from docs/method.md and ' +
  'docs/conventions.md, Snell\'s law in vector form as in ' +
  'Hecht, Optics ch. 4, Illinois root finding) and an independent paraxial (y, nu) matrix trace';
/** The reference is good to ~1e-25 Δ; this is the engine's double-precision budget. */
export const tolerance = 1e-9;

const SEED = 20240601;
const r = rng(SEED);
export const cases: RefCase[] = Array.from({ length: 150 }, () => randomCase(r));

function lensOf(c: RefCase): Lens {
  return new Lens({
    sphereD: c.sphereD, cylD: c.cylD, axisDeg: c.axisDeg, index: c.index, frontD: c.frontD, ctMm: c.ctMm,
    frontConic: c.frontConic, backConic: c.backConic,
  });
}

const label = (c: RefCase): string =>
  `${c.eye} ${c.sphereD}/${c.cylD}x${c.axisDeg} n${c.index} F1 ${c.frontD} k1 ${c.frontConic} k2 ${c.backConic} ` +
  `t ${c.ctMm} s ${c.crMm} at (${c.xMm}, ${c.yMm})`;

/** Engine and reference results per case, computed once (the summary tests reuse them). */
const memo = new Map<number, { engine: FourAnswers; exact: RefAnswer; focimeter: RefAnswer }>();
function outcome(i: number): { engine: FourAnswers; exact: RefAnswer; focimeter: RefAnswer } {
  let o = memo.get(i);
  if (!o) {
    const c = cases[i]!;
    o = { engine: fourAnswers(lensOf(c), c.crMm, c.xMm, c.yMm, c.eye), exact: refExact(c), focimeter: refFocimeter(c) };
    memo.set(i, o);
  }
  return o;
}
const failed = (a: Answer | RefAnswer): string => ('failure' in a ? a.failure : 'ok');

/** Compare an engine answer with the reference; returns whether both computed a prism. */
function agree(engine: Answer, ref: RefAnswer, what: string): boolean {
  if (isFailure(engine) || 'failure' in ref) {
    // both must fail (whether for the same reason is checked in its own test below)
    expect({ what, engineFailed: isFailure(engine) }).toEqual({ what, engineFailed: 'failure' in ref });
    return false;
  }
  expect(Math.abs(engine.x - ref.x), `${what} x: engine ${engine.x}, reference ${ref.x}`).toBeLessThanOrEqual(tolerance);
  expect(Math.abs(engine.y - ref.y), `${what} y: engine ${engine.y}, reference ${ref.y}`).toBeLessThanOrEqual(tolerance);
  expect(Math.abs(engine.magnitude - ref.magnitude)).toBeLessThanOrEqual(tolerance);
  // base labels from docs/conventions.md, judged away from a zero component
  if (Math.abs(ref.x) > 1e-6) expect(engine.horizontal.base).toBe(ref.horizontal);
  if (Math.abs(ref.y) > 1e-6) expect(engine.vertical.base).toBe(ref.vertical);
  return true;
}

describe(`exact and focimeter prism vs the independent reference (${source})`, () => {
  test.each(cases.map((c, i) => [i, label(c)] as const))('case %i: %s', (i) => {
    const o = outcome(i);
    agree(o.engine.exact, o.exact, 'exact');
    agree(o.engine.focimeter, o.focimeter, 'focimeter');
  });

  test('most random cases give an answer (the comparison is not vacuous)', () => {
    const both = cases.filter((_c, i) => failed(outcome(i).exact) === 'ok' && failed(outcome(i).focimeter) === 'ok');
    expect(both.length).toBeGreaterThanOrEqual(Math.floor(0.85 * cases.length));
  });

  test('engine and reference give the same failure kind (tir / miss / geometry) wherever both fail', () => {
    // A ray whose exit point on the front has no back surface behind it has left the lens
    // body before reaching that point: the reference calls that 'geometry' (docs/method.md, "Status
    // codes": "the lens has no thickness where the ray leaves it"), whatever the front would have done.
    const mismatches: string[] = [];
    cases.forEach((c, i) => {
      const o = outcome(i);
      for (const [what, e, r] of [['exact', o.engine.exact, o.exact], ['focimeter', o.engine.focimeter, o.focimeter]] as const) {
        if (isFailure(e) && 'failure' in r && e.failure !== r.failure) {
          mismatches.push(`${what}: engine '${e.failure}', reference '${r.failure}' for ${label(c)}`);
        }
      }
    });
    expect(mismatches).toEqual([]);
  });

  test('the case set spans the working range: ±20 D, cyl to -4, conic fronts, 20 mm, both eyes', () => {
    const s = cases.map((c) => c.sphereD);
    expect(Math.min(...s)).toBeLessThan(-17);
    expect(Math.max(...s)).toBeGreaterThan(17);
    expect(Math.min(...cases.map((c) => c.cylD))).toBeLessThan(-3.5);
    expect(cases.filter((c) => c.frontConic !== 0).length).toBeGreaterThan(40);
    expect(Math.max(...cases.map((c) => Math.hypot(c.xMm, c.yMm)))).toBeGreaterThan(18);
    expect(new Set(cases.map((c) => c.eye)).size).toBe(2);
  });
});

describe('hand-picked awkward cases vs the independent reference', () => {
  const picks: RefCase[] = [
    // a flat-backed high plus lens (back power almost 0) with a strong prolate front
    { sphereD: 8, cylD: -2, axisDeg: 17, index: 1.6, frontD: 8.3, ctMm: 7.2, frontConic: -0.8, backConic: 0, crMm: 27, xMm: -6, yMm: 9, eye: 'L' },
    // plano-cylinder (back meridian along the axis at the front's curvature)
    { sphereD: 0, cylD: -3, axisDeg: 90, index: 1.5, frontD: 4, ctMm: 2.5, frontConic: 0, backConic: 0, crMm: 27, xMm: 10, yMm: -5, eye: 'R' },
    // cylinder axis at 0 and 180 meet; strong oblique decentration
    { sphereD: -12, cylD: -4, axisDeg: 179.99, index: 1.74, frontD: 1, ctMm: 1.5, frontConic: 0, backConic: 0.5, crMm: 25, xMm: 15, yMm: 12, eye: 'R' },
    // visual point on the optical centre: no prism at all
    { sphereD: 5, cylD: -1.5, axisDeg: 60, index: 1.523, frontD: 9, ctMm: 5, frontConic: -2, backConic: 0, crMm: 27, xMm: 0, yMm: 0, eye: 'R' },
    // hyperbolic back on a spherical minus lens
    { sphereD: -8, cylD: 0, axisDeg: 0, index: 1.67, frontD: 2, ctMm: 1.8, frontConic: 0, backConic: -2, crMm: 28, xMm: -12, yMm: 3, eye: 'L' },
  ];
  test.each(picks.map((c) => [label(c), c] as const))('%s', (_l, c) => {
    const a = fourAnswers(lensOf(c), c.crMm, c.xMm, c.yMm, c.eye);
    expect(agree(a.exact, refExact(c), 'exact')).toBe(true);
    expect(agree(a.focimeter, refFocimeter(c), 'focimeter')).toBe(true);
  });
});

describe('first-order (paraxial) prism vs an independent (y, nu) 4x4 matrix trace (docs/method.md, answers 2 and 4)', () => {
  // Linear algebra in doubles on both sides: 1e-11 Δ.
  test.each(cases.slice(0, 60).map((c, i) => [i, label(c), c] as const))('case %i: %s', (_i, _l, c) => {
    const a = fourAnswers(lensOf(c), c.crMm, c.xMm, c.yMm, c.eye);
    const p = refParaxial(c);
    expect(Math.abs(a.paraxial.x - p.eye[0])).toBeLessThan(1e-11);
    expect(Math.abs(a.paraxial.y - p.eye[1])).toBeLessThan(1e-11);
    expect(Math.abs(a.focimeterFirstOrder.x - p.focimeter[0])).toBeLessThan(1e-11);
    expect(Math.abs(a.focimeterFirstOrder.y - p.focimeter[1])).toBeLessThan(1e-11);
  });
});

describe("Prentice vs mathjs multiply(F, c) with F from Long's power matrix (Long 1976; Prentice 1890)", () => {
  test.each(cases.slice(0, 60).map((c, i) => [i, label(c), c] as const))('case %i: %s', (_i, _l, c) => {
    const th = (c.axisDeg * Math.PI) / 180;
    const sn = Math.sin(th), cs = Math.cos(th);
    // Long 1976 (docs/conventions.md, "Power matrix"): F = [[S + C sin²θ, -C sinθ cosθ], [-C sinθ cosθ, S + C cos²θ]]
    const F = matrix([
      [c.sphereD + c.cylD * sn * sn, -c.cylD * sn * cs],
      [-c.cylD * sn * cs, c.sphereD + c.cylD * cs * cs],
    ]);
    const p = multiply(-1, multiply(F, matrix([[c.xMm / 10], [c.yMm / 10]]))) as Matrix;
    const a = fourAnswers(lensOf(c), c.crMm, c.xMm, c.yMm, c.eye);
    expect(Math.abs(a.prentice.x - (p.get([0, 0]) as number))).toBeLessThan(1e-12);
    expect(Math.abs(a.prentice.y - (p.get([1, 0]) as number))).toBeLessThan(1e-12);
  });
});
