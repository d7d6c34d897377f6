/**
 * Prentice's rule and the first-order (paraxial) thick-lens prism (docs/conventions.md, "Power
 * matrix"; docs/method.md, "The four answers", 1, 2 and 4).
 *
 * Both have the form p = -M c with M a 2x2 matrix in dioptres, c the decentration of the
 * visual point from the optical centre and p in prism dioptres towards the base:
 *   Prentice (Prentice, Arch Ophthalmol 1890; vector form with the power matrix of Long 1976):
 *     M = Fv, the back vertex power matrix; p = -Fv c with c in cm.
 *   First order, for a ray through a point at distance s behind the back vertex (a paraxial
 *   (y, nu) trace from that point through both surfaces, derived in docs/method.md):
 *     M = F2 + F1 (I - (t/n)(F2 - K)),  K = I/s.
 *   With s = the back surface's radius (K = its curvature matrix, F2 / (1 - n)) the ray
 *   meets the back surface at normal incidence, which is the focimeter's first-order value
 *     M = F1 + F2 - (t/(n - 1)) F1 F2.
 * c in mm here, so p = -M c / 10.
 */
import type { Lens } from './lens.ts';
import { type Mat2, IDENTITY, add, mul, scale, scalarMatrix } from './powerMatrix.ts';

/** p = -M c, c in mm, p in Δ. */
export function prismFromMatrix(m: Mat2, cxMm: number, cyMm: number, out: { x: number; y: number }): void {
  out.x = -(m[0] * cxMm + m[1] * cyMm) / 10;
  out.y = -(m[2] * cxMm + m[3] * cyMm) / 10;
}

/**
 * The inverse of p = -M c: the decentration c (mm) at which the linear rule gives prism p (Δ),
 * c = -10 M⁻¹ p, into out. Returns false (out untouched) when det M = 0 (no power in one
 * meridian, e.g. a plano-cylinder: prism only across its axis).
 */
export function decentrationFromMatrix(m: Mat2, px: number, py: number, out: { x: number; y: number }): boolean {
  const dt = m[0] * m[3] - m[1] * m[2];
  if (Math.abs(dt) < 1e-12) return false;
  out.x = (-10 * (m[3] * px - m[1] * py)) / dt;
  out.y = (-10 * (-m[2] * px + m[0] * py)) / dt;
  return true;
}

/** Matrix of the first-order prism for a ray through the point whose vergence matrix is K (D). */
export function firstOrderMatrix(lens: Lens, k: Mat2): Mat2 {
  const tn = lens.ctMm / 1000 / lens.index; // reduced thickness, m
  const inner = add(IDENTITY, scale(add(lens.backMatrix, scale(k, -1)), -tn));
  return add(lens.backMatrix, mul(lens.frontMatrix, inner));
}

/**
 * First-order prism at the eye when the centre of rotation is not on the lens axis: at
 * lens-frame transverse position q (mm) and s mm behind the back vertex. The paraxial trace
 * of docs/method.md gives p = -[Fe c + (t/n)(F1/s)(c - q)], Fe the equivalent power matrix,
 * i.e. the on-axis value plus (t/n)(F1/s) q. c and q in mm, p in Δ, into out.
 */
export function eyePrismOffAxis(
  lens: Lens, qxMm: number, qyMm: number, crDistanceMm: number, cxMm: number, cyMm: number,
  out: { x: number; y: number },
): void {
  prismFromMatrix(eyeMatrix(lens, crDistanceMm), cxMm, cyMm, out);
  const k = (lens.ctMm / lens.index / crDistanceMm) / 10; // (t/n)/s, and mm -> cm
  const f = lens.frontMatrix;
  out.x += k * (f[0] * qxMm + f[1] * qyMm);
  out.y += k * (f[2] * qxMm + f[3] * qyMm);
}

/** First-order prism matrix at the eye, for a centre of rotation s mm behind the back vertex. */
export function eyeMatrix(lens: Lens, crDistanceMm: number): Mat2 {
  return firstOrderMatrix(lens, scalarMatrix(1000 / crDistanceMm));
}

/** First-order focimeter matrix: F1 + F2 - (t/(n-1)) F1 F2, via K = back curvature matrix. */
export function focimeterMatrix(lens: Lens): Mat2 {
  return firstOrderMatrix(lens, scale(lens.backMatrix, 1 / (1 - lens.index)));
}

/** Prentice's matrix: the back vertex power matrix. */
export function prenticeMatrix(lens: Lens): Mat2 {
  return lens.vertexMatrix;
}
