/**
 * Dioptric power matrices of sphero-cylinders (Long, Am J Optom Physiol Opt 1976;53:27-33):
 *   F = [[S + C sin²θ, -C sinθ cosθ], [-C sinθ cosθ, S + C cos²θ]],  eigenvalues S and S + C.
 * Angles are counter-clockwise from +x as seen facing the wearer (docs/conventions.md, "The
 * wearer frame"), the
 * same for both eyes. Powers in dioptres. Off the per-ray path: small arrays are fine here.
 */

/** A 2x2 matrix, row-major [m00, m01, m10, m11]. */
export type Mat2 = readonly [number, number, number, number];

export interface SpheroCyl {
  sphereD: number;
  cylD: number;
  /** degrees, [0, 180) */
  axisDeg: number;
}

const DEG = Math.PI / 180;

export function powerMatrix(sphereD: number, cylD: number, axisDeg: number): Mat2 {
  const s = Math.sin(axisDeg * DEG);
  const c = Math.cos(axisDeg * DEG);
  const off = -cylD * s * c;
  return [sphereD + cylD * s * s, off, off, sphereD + cylD * c * c];
}

export function scalarMatrix(v: number): Mat2 {
  return [v, 0, 0, v];
}

export const IDENTITY: Mat2 = [1, 0, 0, 1];

export function mul(a: Mat2, b: Mat2): Mat2 {
  return [
    a[0] * b[0] + a[1] * b[2],
    a[0] * b[1] + a[1] * b[3],
    a[2] * b[0] + a[3] * b[2],
    a[2] * b[1] + a[3] * b[3],
  ];
}

export function add(a: Mat2, b: Mat2): Mat2 {
  return [a[0] + b[0], a[1] + b[1], a[2] + b[2], a[3] + b[3]];
}

export function scale(a: Mat2, k: number): Mat2 {
  return [a[0] * k, a[1] * k, a[2] * k, a[3] * k];
}

export function det(a: Mat2): number {
  return a[0] * a[3] - a[1] * a[2];
}

/** Matrix times vector: writes [m x] into out. */
export function apply(a: Mat2, x: number, y: number, out: { x: number; y: number }): void {
  out.x = a[0] * x + a[1] * y;
  out.y = a[2] * x + a[3] * y;
}

/**
 * Sphero-cylinder of a symmetric power matrix, in the cylinder sign asked for.
 * (Inverse of powerMatrix; e.g. Harris, Optom Vis Sci 1997.)
 */
export function toSpheroCyl(f: Mat2, cylSign: 'minus' | 'plus' = 'minus'): SpheroCyl {
  const a = f[0], b = 0.5 * (f[1] + f[2]), d = f[3];
  const mean = 0.5 * (a + d);
  const half = Math.hypot(0.5 * (a - d), b);
  // With F = S I + C (sin², ...), the axis meridian has power S. For minus cylinder S is the
  // larger eigenvalue and the axis is its eigen-direction.
  const big = mean + half, small = mean - half;
  const axisOfBig = normaliseAxis(angleOfEigen(a, b, d, big));
  const axisOfSmall = normaliseAxis(axisOfBig + 90);
  const phi = cylSign === 'minus' ? axisOfBig : axisOfSmall;
  const sphereD = cylSign === 'minus' ? big : small;
  const cylD = cylSign === 'minus' ? small - big : big - small;
  return { sphereD, cylD, axisDeg: half === 0 ? 0 : phi };
}

function angleOfEigen(a: number, b: number, d: number, lambda: number): number {
  // (a - λ) x + b y = 0  or  b x + (d - λ) y = 0, whichever is better conditioned
  let x: number, y: number;
  if (Math.abs(a - lambda) + Math.abs(b) >= Math.abs(d - lambda) + Math.abs(b)) {
    x = -b; y = a - lambda;
  } else {
    x = d - lambda; y = -b;
  }
  return Math.atan2(y, x) / DEG;
}

/** An axis in [0, 180). */
export function normaliseAxis(deg: number): number {
  let a = deg % 180;
  if (a < 0) a += 180;
  if (a >= 180 - 1e-12 || a === 0) a = 0; // also turns -0 into 0
  return a;
}

/** Transposition: the same lens written with the cylinder of the other sign. */
export function transpose(rx: SpheroCyl): SpheroCyl {
  if (rx.cylD === 0) return { ...rx };
  return { sphereD: rx.sphereD + rx.cylD, cylD: -rx.cylD, axisDeg: normaliseAxis(rx.axisDeg + 90) };
}
