/**
 * Vector form of Snell's law (e.g. Hecht, Optics, §4.4; Spencer & Murty 1962):
 *   t = η i + (η cosθi - cosθt) n,  η = n1/n2,  cosθt = sqrt(1 - η²(1 - cos²θi)),
 * with i the unit incident direction and n the unit normal turned against i (n·i < 0).
 * A negative radicand is total internal reflection.
 */

/** Refracted unit direction, written into a caller-owned 3-array. */
export type Vec3Out = { x: number; y: number; z: number };

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
  let cosi = -(dx * nx + dy * ny + dz * nz);
  if (cosi < 0) {
    nx = -nx; ny = -ny; nz = -nz;
    cosi = -cosi;
  }
  const eta = n1 / n2;
  const k = 1 - eta * eta * (1 - cosi * cosi);
  if (k < 0) return false;
  const g = eta * cosi - Math.sqrt(k);
  out.x = eta * dx + g * nx;
  out.y = eta * dy + g * ny;
  out.z = eta * dz + g * nz;
  return true;
}
