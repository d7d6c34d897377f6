/**
 * Tscherning's ellipse: the thin-lens, third-order condition for a spectacle lens free of
 * oblique astigmatism, written INDEPENDENTLY of the engine (it calls nothing in src/) so that
 * tests/reference/tscherning.test.ts can check the exact trace's point-focal forms
 * (src/optics/pointFocal.ts) in the thin-lens, small-angle limit.
 *
 * Sources. The route is Seidel's third-order theory with the stop-shift rule, as in Welford,
 * Aberrations of Optical Systems (Adam Hilger, 1986): the surface sums S_I..S_IV in terms of
 * the refraction invariants A, Ā and Δ(u/n), and the astigmatic field curvatures 3 S_III + S_IV
 * (tangential) and S_III + S_IV (sagittal). Those formulas are from memory (chapter and equation
 * numbers not checked); every step after them is derived below. The distance result is the
 * form printed in ophthalmic optics texts (Tscherning 1904; e.g. Bennett & Rabbetts, Clinical
 * Visual Optics; Jalie, The Principles of Ophthalmic Lenses), which we also quote from memory:
 * our derivation reproduces it, and the tests check it on properties that do not depend on
 * memory (a surface concentric with the stop adds no astigmatism; the stop in contact with a
 * thin lens makes the astigmatism independent of the bending).
 *
 * Symbols and signs (dioptres and metres; light travels left to right, towards the eye):
 *   n   index of the lens, in air;
 *   F1  front surface power (n - 1) c1, F2 = (1 - n) c2 the back surface power, c the
 *       curvatures (positive: centre of curvature on the eye side);
 *   F   = F1 + F2, the thin lens's power;
 *   z   the distance from the lens to the stop, the eye's centre of rotation (positive, eye side);
 *   L   the object's vergence at the lens: 0 for a distant object, -1/d for a target d metres
 *       in front; L' = L + F.
 *
 * Derivation. Paraxial rays, Welford's refraction n'u' = n u - h (n' - n) c, with the
 * invariant A = n (h c + u) = n' (h c + u'). The marginal ray has height h at the thin lens:
 *   in air u1 = -h L;  in the glass n u_g = -h (L + F1);  after the lens u' = -h L'.
 * Refraction invariants and Δ(u/n) = u'/n' - u/n at the two surfaces, divided by h:
 *   a1 = c1 - L,    d1 = L - (L + F1)/n²,
 *   a2 = c2 - L',   d2 = (L + F1)/n² - L',     c1 = F1/(n - 1),  c2 = (F1 - F)/(n - 1).
 * The chief ray. With the stop AT the thin lens the chief ray has height 0 there, so it is not
 * refracted and Ā = ū at both surfaces. Moving the stop adds k times the marginal ray to the
 * chief ray (paraxial rays superpose; this is the stop-shift rule): Ā_j = ū + k A_j, height
 * k h at the lens and slope ū - k h L' after it. It must cross the axis at the stop, z behind:
 *   k h + z (ū - k h L') = 0   =>   k h = -z ū / (1 - z L').
 * Astigmatism. S_III = -Σ Ā_j² h Δ(u/n)_j; the tangential and sagittal image surfaces differ by
 * 2 S_III, so the pencil is free of astigmatism (to third order) exactly where S_III = 0:
 *   G(F1) = Σ_j (1 + q a_j)² d_j = 0,   q = -z / (1 - z L').                       (1)
 * Expanded, the F1³ terms of (1) cancel (their coefficients are q²/(n-1)² · (∓1/n²)) and the
 * whole of G has the factor F (a thin lens of zero power is no lens at all). Multiplying by
 * -n (n - 1)² (1 - z L')² / (z² F) gives a quadratic in F1:
 *   (n + 2) F1²
 *     - F1 [ (n + 2) F + 2 (n² - 1) (1/z + L) ]
 *     + n (F + (n - 1)/z)² - (n - 2)(n² - 1) F L + 2 (n - 1)² (n + 1) L / z  =  0.        (2)
 * For a distant object (L = 0) this is the classical form
 *   (n + 2) F1² - F1 [ (n + 2) F + 2 (n² - 1)/z ] + n (F + (n - 1)/z)² = 0.
 * In the (F, F1) plane its quadratic part (n+2) F1² - (n+2) F F1 + n F² has discriminant
 * (n + 2)² - 4 n (n + 2) = (n + 2)(2 - 3n) < 0 for n > 2/3: an ellipse, Tscherning's ellipse.
 * Its lower (flatter) branch is called the Ostwalt branch, its upper (steeper) branch the
 * Wollaston branch (Millodot, Dictionary of Optometry and Vision Science, "Ostwalt curve").
 *
 * The expansion of (1) into (2) was done by computer algebra (sympy) and is re-checked
 * numerically in the test (the two must agree at any F1, F, n, z, L).
 */

/** One lens case for the formula: power F (D), index n, stop distance z (m), object vergence L (D). */
export interface EllipseCase {
  powerD: number;
  index: number;
  stopM: number;
  /** object vergence at the lens, D; 0 for a distant object */
  objectD?: number;
}

/** Coefficients of (2), a F1² + b F1 + c = 0. */
export function ellipseQuadratic(k: EllipseCase): { a: number; b: number; c: number } {
  const F = k.powerD, n = k.index, z = k.stopM, L = k.objectD ?? 0;
  const a = n + 2;
  const b = -((n + 2) * F + 2 * (n * n - 1) * (1 / z + L));
  const c = n * (F + (n - 1) / z) ** 2 - (n - 2) * (n * n - 1) * F * L + (2 * (n - 1) ** 2 * (n + 1) * L) / z;
  return { a, b, c };
}

/**
 * The front surface powers of the two point-focal forms, D: Ostwalt (flatter) and Wollaston
 * (steeper); null where (2) has no real root (no form is free of astigmatism).
 */
export function tscherningFronts(k: EllipseCase): { ostwalt: number; wollaston: number } | null {
  const { a, b, c } = ellipseQuadratic(k);
  const disc = b * b - 4 * a * c;
  if (disc < 0) return null;
  const s = Math.sqrt(disc);
  // the stable pair of roots (no cancellation between -b and s)
  const qq = -0.5 * (b + Math.sign(b || 1) * s);
  const r1 = qq / a, r2 = c / qq;
  return { ostwalt: Math.min(r1, r2), wollaston: Math.max(r1, r2) };
}

/**
 * The Seidel astigmatism sum (1) as derived, before expansion: zero exactly where the form is
 * free of third-order astigmatism. Used to check the algebra that led to (2).
 */
export function seidelAstigmatismSum(frontD: number, k: EllipseCase): number {
  const F = k.powerD, n = k.index, z = k.stopM, L = k.objectD ?? 0;
  const Lp = L + F;
  const c1 = frontD / (n - 1), c2 = (frontD - F) / (n - 1);
  const a1 = c1 - L, d1 = L - (L + frontD) / (n * n);
  const a2 = c2 - Lp, d2 = (L + frontD) / (n * n) - Lp;
  const q = -z / (1 - z * Lp);
  return (1 + q * a1) ** 2 * d1 + (1 + q * a2) ** 2 * d2;
}

/**
 * The powers between which the distance ellipse has real roots (its extreme points in F), D:
 * where the discriminant of (2) with L = 0 vanishes. As a function of F that discriminant is
 *   (n + 2)(2 - 3n) F² - 4 (n + 2)(n - 1)² F / z + 4 (n - 1)² / z²,
 * expanded by hand from (2) (the test checks it against the discriminant computed from
 * ellipseQuadratic).
 */
export function ellipsePowerRange(index: number, stopM: number): { minD: number; maxD: number } {
  const n = index, u = 1 / stopM;
  const A = (n + 2) * (2 - 3 * n), B = -4 * (n + 2) * (n - 1) ** 2 * u, C = 4 * (n - 1) ** 2 * u * u;
  const s = Math.sqrt(B * B - 4 * A * C);
  const r1 = (-B - s) / (2 * A), r2 = (-B + s) / (2 * A);
  return { minD: Math.min(r1, r2), maxD: Math.max(r1, r2) };
}
