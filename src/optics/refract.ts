/**
 * Vector form of Snell's law (e.g. Hecht, Optics, §4.4; Spencer & Murty 1962):
 *   t = η i + (η cosθi - cosθt) n,  η = n1/n2,  cosθt = sqrt(1 - η²(1 - cos²θi)),
 * with i the unit incident direction and n the unit normal turned against i (n·i < 0).
 * A negative radicand is total internal reflection.
 */

/** Refracted unit direction, written into a caller-owned 3-array. */
export type Vec3Out = { x: number; y: number; z: number };

/** The ratio η = n1 / n2 at an interface, as an object (see refractVec). */
export interface IndexRatio {
  readonly eta: number;
}

/**
 * Snell's law on unboxed numbers, the one implementation: refract the unit direction at
 * v[d], v[d+1], v[d+2] (read and overwritten) at a surface with unit normal v[n], v[n+1],
 * v[n+2] (either orientation), with η = ratio.eta. Returns false on total internal reflection
 * (the direction untouched). The trace calls it on the working storage of rayWork.ts
 * (typed-array elements are raw doubles, without the box of a double-valued object field;
 * the offsets are small integers, which are never boxed; docs/performance.md).
 */
export function refractAt(v: Float64Array, d: number, n: number, ratio: IndexRatio): boolean {
  const dx = v[d]!, dy = v[d + 1]!, dz = v[d + 2]!;
  let nx = v[n]!, ny = v[n + 1]!, nz = v[n + 2]!;
  let cosi = -(dx * nx + dy * ny + dz * nz);
  if (cosi < 0) {
    nx = -nx; ny = -ny; nz = -nz;
    cosi = -cosi;
  }
  const eta = ratio.eta;
  const k = 1 - eta * eta * (1 - cosi * cosi);
  if (k < 0) return false;
  const g = eta * cosi - Math.sqrt(k);
  v[d] = eta * dx + g * nx;
  v[d + 1] = eta * dy + g * ny;
  v[d + 2] = eta * dz + g * nz;
  return true;
}

const _v = new Float64Array(6);
const _r = { eta: 1 };

/**
 * Refract unit direction `d` (read and overwritten) at a surface with unit normal
 * (n.nx, n.ny, n.nz) (either orientation), with η = ratio.eta. Returns false on total internal
 * reflection (d untouched). Objects only: the per-ray path passes no loose numbers to a call
 * the compiler might not inline (such numbers would be boxed, i.e. allocated). A thin wrapper
 * of refractAt.
 */
export function refractVec(d: Vec3Out, n: { nx: number; ny: number; nz: number }, ratio: IndexRatio): boolean {
  const v = _v;
  v[0] = d.x; v[1] = d.y; v[2] = d.z;
  v[3] = n.nx; v[4] = n.ny; v[5] = n.nz;
  if (!refractAt(v, 0, 3, ratio)) return false;
  d.x = v[0]!; d.y = v[1]!; d.z = v[2]!;
  return true;
}

/**
 * Refract unit direction (dx, dy, dz) at a surface with unit normal (nx, ny, nz) (either
 * orientation) from index n1 into index n2. Writes the new direction into `out` and returns
 * true, or returns false on total internal reflection (out untouched).
 */
export function refract(
  dx: number, dy: number, dz: number,
  nx: number, ny: number, nz: number,
  n1: number, n2: number,
  out: Vec3Out,
): boolean {
  const v = _v;
  v[0] = dx; v[1] = dy; v[2] = dz;
  v[3] = nx; v[4] = ny; v[5] = nz;
  _r.eta = n1 / n2;
  if (!refractAt(v, 0, 3, _r)) return false;
  out.x = v[0]!; out.y = v[1]!; out.z = v[2]!;
  return true;
}
