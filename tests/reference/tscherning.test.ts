/**
 * The exact trace's point-focal forms (formFronts, src/optics/pointFocal.ts) against the
 * thin-lens third-order theory of oblique astigmatism, Tscherning's ellipse, implemented
 * independently in tests/reference/tscherning.ts (derivation, symbols and sources there).
 *
 * Why the two can be compared: the ellipse is exact for a lens of zero thickness in the limit
 * of small angles (third order), and its roots do not depend on the angle. The exact trace
 * differs from it by terms of first order in the centre thickness t and of second order in the
 * eye rotation θ (the next, fifth-order astigmatism; Miks & Novak, Optom Vis Sci 2011, "Fifth-
 * order theory of astigmatism of thin spherical spectacle lenses"). So the tests check
 *   1. the formula's own properties (algebra, a concentric surface, the stop in contact, the
 *      ellipse's extent and branches);
 *   2. that the difference between the trace and the ellipse IS first order in t and second
 *      order in θ (the ratio laws below), i.e. it is an approximation error, not a disagreement;
 *   3. that with both first-order terms removed (Richardson extrapolation to t = 0, θ = 0) the
 *      trace's roots equal the ellipse's within 0.001 D (tolerance argued below);
 *   4. that a realistic very thin lens (0.2 mm, 5°) is already within a quarter dioptre.
 *
 * Setting: z = 27 mm from the back vertex to the centre of rotation (the trace's crMm; in the
 * thin limit the same as the ellipse's z), indices 1.5 and 1.6, a distant object and a target
 * at 333.33 mm (the trace measures it from the vertex sphere, the ellipse from the lens: the
 * same in the thin, small-angle limit). No diameter, so no edge check.
 *
 * The Wollaston (steep) branch of minus lenses has a back surface steeper than a sphere centred
 * on the centre of rotation; the trace from the centre of rotation then starts beyond the back
 * surface's centre of curvature. Surface.intersect once reported a miss there (it took the far
 * branch of the sphere); this test found it, and the distant -10 D and all -4 D cases now carry
 * both branches. Left out: F = 0, where a zero-power thin lens has no astigmatism at any
 * bending, so the ellipse says nothing there.
 */
import { describe, expect, test } from 'vitest';
import { formFronts, type FormQuery } from '../../src/optics/index.ts';
import { rng } from './rng.ts';
import { type EllipseCase, ellipsePowerRange, ellipseQuadratic, seidelAstigmatismSum, tscherningFronts } from './tscherning.ts';

export const source =
  'Tscherning ellipse, third-order thin-lens theory (Seidel sums with the stop shift, Welford, Aberrations of Optical Systems, 1986; ' +
  'classical form in Bennett & Rabbetts, Clinical Visual Optics, and Jalie, The Principles of Ophthalmic Lenses; from memory), ' +
  'derived in tests/reference/tscherning.ts';

/** Extrapolated trace vs ellipse, D; the raw thin-lens check, D (see the tests). */
export const tolerance = { extrapolatedD: 0.001, thinLensD: 0.25 };

const Z_MM = 27;
const NEAR_MM = 333.33;

interface Case {
  powerD: number;
  index: number;
  nearMm: number | null;
  /** the branches checked (the -10 D near case: the Ostwalt branch only) */
  branches: ('ostwalt' | 'wollaston')[];
}

const both: Case['branches'] = ['ostwalt', 'wollaston'];
const flat: Case['branches'] = ['ostwalt'];

export const cases: Case[] = [
  { powerD: -10, index: 1.5, nearMm: null, branches: both },
  { powerD: -4, index: 1.5, nearMm: null, branches: both },
  { powerD: 2, index: 1.5, nearMm: null, branches: both },
  { powerD: 4, index: 1.5, nearMm: null, branches: both },
  { powerD: 6, index: 1.5, nearMm: null, branches: both },
  { powerD: -4, index: 1.6, nearMm: null, branches: both },
  { powerD: 4, index: 1.6, nearMm: null, branches: both },
  { powerD: -10, index: 1.5, nearMm: NEAR_MM, branches: flat },
  { powerD: -4, index: 1.5, nearMm: NEAR_MM, branches: both },
  { powerD: 2, index: 1.5, nearMm: NEAR_MM, branches: both },
  { powerD: 4, index: 1.5, nearMm: NEAR_MM, branches: both },
];

const label = (c: Case): string => `${c.powerD > 0 ? '+' : ''}${c.powerD} D, n ${c.index}, ${c.nearMm === null ? 'distance' : `near ${c.nearMm} mm`}`;

function ellipseOf(c: Case): EllipseCase {
  return { powerD: c.powerD, index: c.index, stopM: Z_MM / 1000, objectD: c.nearMm === null ? 0 : -1000 / c.nearMm };
}

/** The trace's roots at thickness t (mm) and eye rotation θ (degrees), by branch. */
function traced(c: Case, ctMm: number, rotationDeg: number): { ostwalt: number; wollaston: number } {
  const q: FormQuery = {
    sphereD: c.powerD, index: c.index, ctMm, crMm: Z_MM, rotationDeg, nearMm: c.nearMm, goal: 'astigmatism',
    frontMinD: -5, frontMaxD: 30,
  };
  const roots = formFronts(q);
  // flattest first (formFronts' order)
  expect(roots.length, `${label(c)}: roots found at ${ctMm} mm, ${rotationDeg}°`).toBeGreaterThanOrEqual(c.branches.length);
  return { ostwalt: roots[0]!, wollaston: roots[roots.length - 1]! };
}

const random = rng(20261210);
const between = (a: number, b: number): number => a + (b - a) * random();

describe('Tscherning ellipse: the formula and its published properties', () => {
  test('the expanded quadratic equals the Seidel sum it came from (algebra check, 500 random cases)', () => {
    for (let i = 0; i < 500; i++) {
      const k: EllipseCase = {
        powerD: between(-20, 10), index: between(1.45, 1.9), stopM: between(0.015, 0.035),
        objectD: random() < 0.3 ? 0 : between(-5, 0),
      };
      if (Math.abs(k.powerD) < 0.1) continue;
      const f1 = between(-10, 30);
      const { a, b, c } = ellipseQuadratic(k);
      const n = k.index, z = k.stopM, Lp = (k.objectD ?? 0) + k.powerD;
      const fromSum = (seidelAstigmatismSum(f1, k) * -n * (n - 1) ** 2 * (1 - z * Lp) ** 2) / (z * z * k.powerD);
      const quad = a * f1 * f1 + b * f1 + c;
      expect(Math.abs(fromSum - quad), `F ${k.powerD}, F1 ${f1}`).toBeLessThan(1e-9 * (Math.abs(quad) + a * f1 * f1 + 1));
    }
  });

  test('sign check: a surface centred on the stop adds no astigmatism, so as F → 0 one root is F1 = (n - 1)/z (law of refraction at normal incidence)', () => {
    // The chief ray through the stop meets a surface centred on the stop along its normal, so
    // it is not refracted there and its pencil stays symmetric about it. As F → 0 both surfaces
    // of that form are centred on the stop. A sign slip in (2) moves this root.
    for (const n of [1.5, 1.6, 1.74]) {
      for (const zMm of [20, 27, 32]) {
        for (const objectD of [0, -3]) {
          const z = zMm / 1000;
          const r = tscherningFronts({ powerD: 0, index: n, stopM: z, objectD });
          expect(r, `n ${n}, z ${zMm} mm`).not.toBeNull();
          expect(r!.wollaston).toBeCloseTo((n - 1) / z, 9);
        }
      }
    }
  });

  test('stop in contact with a thin lens: the astigmatism does not depend on the bending (Welford 1986, from memory)', () => {
    // With z = 0 the sum (1) is d1 + d2 = L - L' = -F whatever F1 is.
    for (const powerD of [-8, -2, 3, 7]) {
      for (const f1 of [-4, 0, 5, 12, 20]) {
        expect(seidelAstigmatismSum(f1, { powerD, index: 1.523, stopM: 0, objectD: -2 })).toBeCloseTo(-powerD, 12);
      }
    }
  });

  test('an ellipse: real roots only within a range of powers, roughly -23 D to +7 D for crown glass (n 1.523), z 27 mm (from memory)', () => {
    // the range as remembered from the ophthalmic texts; a loose band, the figures being rounded
    const crown = ellipsePowerRange(1.523, 0.027);
    expect(crown.minD).toBeGreaterThan(-24);
    expect(crown.minD).toBeLessThan(-22);
    expect(crown.maxD).toBeGreaterThan(6.5);
    expect(crown.maxD).toBeLessThan(8);
    const range = ellipsePowerRange(1.5, 0.027);
    // the hand-expanded discriminant agrees with the quadratic's: real roots just inside, none just outside,
    // one double root at each end (the branches meet)
    const k = (powerD: number): EllipseCase => ({ powerD, index: 1.5, stopM: 0.027 });
    expect(tscherningFronts(k(range.minD + 0.01))).not.toBeNull();
    expect(tscherningFronts(k(range.maxD - 0.01))).not.toBeNull();
    expect(tscherningFronts(k(range.minD - 0.01))).toBeNull();
    expect(tscherningFronts(k(range.maxD + 0.01))).toBeNull();
    for (const end of [range.minD, range.maxD]) {
      const { a, b, c } = ellipseQuadratic(k(end));
      expect(Math.abs(b * b - 4 * a * c)).toBeLessThan(1e-9 * b * b);
    }
    // an ellipse, not a hyperbola: the quadratic part's discriminant (n+2)(2-3n) is negative
    for (const n of [1.5, 1.6, 1.74]) expect((n + 2) ** 2 - 4 * n * (n + 2)).toBeLessThan(0);
  });

  test('two branches: Ostwalt (flatter) below Wollaston; near forms flatter than distance ones (as in Jalie 2021: +4.00 D, +9.62 D distance, +7.50 D near)', () => {
    for (const powerD of [-10, -4, 2, 4, 6]) {
      const far = tscherningFronts({ powerD, index: 1.5, stopM: 0.027 })!;
      const near = tscherningFronts({ powerD, index: 1.5, stopM: 0.027, objectD: -1000 / NEAR_MM })!;
      expect(far.ostwalt).toBeLessThan(far.wollaston);
      expect(near.ostwalt).toBeLessThan(far.ostwalt);
    }
  });
});

describe('the exact trace (formFronts) in the thin-lens, small-angle limit', () => {
  test('first order in thickness: halving t halves the change, ratio 2 ± 0.1 (every case, 0.2, 0.1 and 0.05 mm at 0.5°)', () => {
    // r(t) = r0 + α t + O(t²), so (r(4s) - r(2s)) / (r(2s) - r(s)) = 2 + O(s): a few per cent
    // at these thicknesses. Checked where the change is at least 1e-3 D, a thousand times the
    // root solver's tolerance (the -10 D Ostwalt forms hardly depend on thickness).
    let checked = 0;
    for (const c of cases) {
      const a = traced(c, 0.2, 0.5), b = traced(c, 0.1, 0.5), d = traced(c, 0.05, 0.5);
      for (const br of c.branches) {
        const d1 = a[br] - b[br], d2 = b[br] - d[br];
        if (Math.abs(d1) < 1e-3) continue;
        checked++;
        expect(d1 / d2, `${label(c)} ${br}: ${d1} / ${d2}`).toBeGreaterThan(1.9);
        expect(d1 / d2, `${label(c)} ${br}: ${d1} / ${d2}`).toBeLessThan(2.1);
      }
    }
    // 20 branches in the table; all but a few -10 D ones carry a measurable thickness term
    expect(checked).toBeGreaterThanOrEqual(14);
  });

  test('second order in the angle: the change from 4° to 8° is 4 times that from 2° to 4°, ± 0.2 (every case, 0.2 mm)', () => {
    // r(θ) = r0 + β θ² + O(θ⁴), so (r(2θ) - r(θ)) / (r(θ) - r(θ/2)) = (4 - 1) / (1 - 1/4) = 4,
    // up to O(θ²) (θ² = 0.02 at 8°). Checked where the change is at least 1e-3 D (the
    // Wollaston forms of weak plus lenses hardly depend on the angle).
    let checked = 0;
    for (const c of cases) {
      const a = traced(c, 0.2, 8), b = traced(c, 0.2, 4), d = traced(c, 0.2, 2);
      for (const br of c.branches) {
        const d1 = a[br] - b[br], d2 = b[br] - d[br];
        if (Math.abs(d1) < 1e-3) continue;
        checked++;
        expect(d1 / d2, `${label(c)} ${br}: ${d1} / ${d2}`).toBeGreaterThan(3.8);
        expect(d1 / d2, `${label(c)} ${br}: ${d1} / ${d2}`).toBeLessThan(4.2);
      }
    }
    // every Ostwalt form (11) and at least the +6 D Wollaston one
    expect(checked).toBeGreaterThanOrEqual(12);
  });

  test.each(cases)('extrapolated to t = 0 and θ = 0 the roots are the ellipse\'s within 0.001 D ($powerD D, n $index, near $nearMm)', (c) => {
    // Richardson extrapolation: R(θ) = 2 r(t/2, θ) - r(t, θ) removes the O(t) term; then
    // (4 R(θ/2) - R(θ)) / 3 removes the O(θ²) term. What is left is second order (t², t θ², θ⁴)
    // and the bisection's 1e-6 D times the weights (at most 5e-6 D). The raw first-order terms
    // are at most a few hundredths of a dioptre at t = 0.02 mm and θ = 1° (checked below), and
    // the second-order ones a further factor t / (1 mm) or θ² (about 0.02 and 3e-4) smaller; so
    // 0.001 D leaves a wide margin for them while a real disagreement (a wrong surface power,
    // a wrong stop distance, a slip in Coddington's equations) would show by tenths of a dioptre.
    const e = tscherningFronts(ellipseOf(c));
    expect(e, label(c)).not.toBeNull();
    const r11 = traced(c, 0.02, 1), r21 = traced(c, 0.01, 1), r12 = traced(c, 0.02, 0.5), r22 = traced(c, 0.01, 0.5);
    for (const br of c.branches) {
      const raw = r22[br] - e![br];
      expect(Math.abs(raw), `${label(c)} ${br}: raw difference at 0.01 mm, 0.5°`).toBeLessThan(0.05);
      const R1 = 2 * r21[br] - r11[br], R2 = 2 * r22[br] - r12[br];
      const limit = (4 * R2 - R1) / 3;
      expect(Math.abs(limit - e![br]), `${label(c)} ${br}: trace limit ${limit} vs ellipse ${e![br]}`).toBeLessThan(tolerance.extrapolatedD);
    }
  });

  test.each(cases)('a realistic very thin lens, 0.2 mm at 5°, is within a quarter dioptre of the ellipse (0.25 D, the smallest prescription step: common practice, no source) ($powerD D, n $index, near $nearMm)', (c) => {
    const e = tscherningFronts(ellipseOf(c))!;
    const r = traced(c, 0.2, 5);
    for (const br of c.branches) expect(Math.abs(r[br] - e[br]), `${label(c)} ${br}`).toBeLessThan(tolerance.thinLensD);
  });
});
