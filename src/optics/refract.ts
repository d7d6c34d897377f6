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
 * Refract unit direction `d` (read and overwritten) at a surface with unit normal
 * (n.nx, n.ny, n.nz) (either orientation), with η = ratio.eta. Returns false on total internal
 * reflection (d untouched). Objects only: the per-ray path passes no loose numbers to a call
 * the compiler might not inline (such numbers would be boxed, i.e. allocated).
 */
export function refractVec(d: Vec3Out, n: { nx: number; ny: number; nz: number }, ratio: IndexRatio): boolean {
  const dx = d.x, dy = d.y, dz = d.z;
  let nx = n.nx, ny = n.ny, nz = n.nz;
  let cosi = -(dx * nx + dy * ny + dz * nz);
  if (cosi < 0) {
    nx = -nx; ny = -ny; nz = -nz;
    cosi = -cosi;
  }
  const eta = ratio.eta;
  const k = 1 - eta * eta * (1 - cosi * cosi);
  if (k < 0) return false;
  const g = eta * cosi - Math.sqrt(k);
  d.x = eta * dx + g * nx;
  d.y = eta * dy + g * ny;
  d.z = eta * dz + g * nz;
  return true;
}

const _d = { x: 0, y: 0, z: 0 };
const _n = { nx: 0, ny: 0, nz: 0 };
const _r = { eta: 1 };

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
  _d.x = dx; _d.y = dy; _d.z = dz;
  _n.nx = nx; _n.ny = ny; _n.nz = nz;
  _r.eta = n1 / n2;
  if (!refractVec(_d, _n, _r)) return false;
  out.x = _d.x; out.y = _d.y; out.z = _d.z;
  return true;
}
