/**
 * A prism built as a "lens" of two tilted planes, traced with the engine's Surface.intersect
 * and refract(): minimum deviation (found with a general-purpose minimiser) and the thin-prism
 * deviation (n - 1) A.
 */
import { describe, expect, test } from 'vitest';
import { Hit, Ray, Surface, refract } from '../../src/optics/index.ts';
import { fmin } from './fmin.ts';

export const source =
  'Hecht, Optics, chapter on prisms (section number from memory): n = sin((A + Dmin)/2) / sin(A/2), ' +
  'worked value A = 60°, n = 1.5 -> Dmin = 37.18°; thin prism D ≈ (n - 1) A';
/** Dmin is given to 0.01° (by hand: 2 asin(1.5 sin 30°) - 60° = 37.181°), so half a unit in its last place. */
export const tolerance = 0.005;
export const cases = [{ apexDeg: 60, index: 1.5, dminDeg: 37.18, from: 'Hecht, Optics, minimum-deviation formula (worked value checked by hand)' }];

const DEG = Math.PI / 180;

interface Prism {
  faces: [Surface, Surface];
  /** half the apex angle, rad */
  half: number;
}

/** Two planes tilted by ±A/2 about x; they meet at an apex on the +y side, base towards -y. */
function makePrism(apexDeg: number): Prism {
  return {
    faces: [
      new Surface({ curvature: 0, vertexZ: 0, tiltXDeg: apexDeg / 2 }),
      new Surface({ curvature: 0, vertexZ: 10, tiltXDeg: -apexDeg / 2 }),
    ],
    half: (apexDeg / 2) * DEG,
  };
}

/**
 * Deviation (radians, positive towards the base) of a ray in the y-z plane travelling at angle
 * phi (from +z, towards +y) that meets the first face 3 mm below the axis. NaN on TIR or miss.
 * `record` receives the internal direction and the two face normals.
 */
function deviation(p: Prism, n: number, phi: number, record?: { dir: number[]; normals: number[][] }): number {
  const ray = new Ray();
  const hit = new Hit();
  const dy = Math.sin(phi), dz = Math.cos(phi);
  // face 1 (normal (0, -sin A/2, cos A/2) through the origin) is z = y tan(A/2); aim at its
  // point y = -3 from 20 mm back along the ray
  const y1 = -3, z1 = y1 * Math.tan(p.half);
  ray.set(0, y1 - 20 * dy, z1 - 20 * dz, 0, dy, dz);
  const d = { x: 0, y: 0, z: 0 };
  if (!p.faces[0].intersect(ray, hit) || !(hit.t > 0)) return NaN;
  record?.normals.push([hit.nx, hit.ny, hit.nz]);
  if (!refract(0, dy, dz, hit.nx, hit.ny, hit.nz, 1, n, d)) return NaN;
  if (record) record.dir = [d.x, d.y, d.z];
  ray.set(hit.x, hit.y, hit.z, d.x, d.y, d.z);
  if (!p.faces[1].intersect(ray, hit) || !(hit.t > 0)) return NaN;
  record?.normals.push([hit.nx, hit.ny, hit.nz]);
  const o = { x: 0, y: 0, z: 0 };
  if (!refract(d.x, d.y, d.z, hit.nx, hit.ny, hit.nz, n, 1, o)) return NaN;
  // signed angle from the incoming to the outgoing direction, positive towards -y (the base)
  return Math.atan2(dy * o.z - dz * o.y, dy * o.y + dz * o.z);
}

describe(`prism of two tilted planes (${source})`, () => {
  test('minimum deviation A = 60°, n = 1.5 is 37.18° (found by Nelder-Mead over the incidence angle)', () => {
    const c = cases[0]!;
    const faces = makePrism(c.apexDeg);
    const f = (x: number[]): number => {
      const d = deviation(faces, c.index, x[0]!);
      return Number.isNaN(d) ? 10 : d; // TIR/miss: a large penalty
    };
    const best = fmin.nelderMead(f, [0.6], { minErrorDelta: 1e-13, maxIterations: 2000 });
    const dminDeg = best.fx / DEG;
    expect(Math.abs(dminDeg - c.dminDeg)).toBeLessThan(tolerance);
    // The minimiser's own result must also satisfy Hecht's formula to its precision
    const nFromFormula = Math.sin(((c.apexDeg + dminDeg) * DEG) / 2) / Math.sin((c.apexDeg * DEG) / 2);
    expect(Math.abs(nFromFormula - c.index)).toBeLessThan(1e-9);
    // and at minimum deviation the ray crosses the prism symmetrically: parallel to the base,
    // i.e. at equal angles to the two face normals (Hecht)
    const inside = { dir: [0, 0, 0], normals: [] as number[][] };
    deviation(faces, c.index, best.x[0]!, inside);
    const [n1, n2] = inside.normals as [number[], number[]];
    const cos1 = Math.abs(inside.dir[0]! * n1[0]! + inside.dir[1]! * n1[1]! + inside.dir[2]! * n1[2]!);
    const cos2 = Math.abs(inside.dir[0]! * n2[0]! + inside.dir[1]! * n2[1]! + inside.dir[2]! * n2[2]!);
    expect(Math.abs(Math.acos(cos1) - Math.acos(cos2))).toBeLessThan(1e-5);
    // both internal angles are A/2 at the symmetric passage
    expect(Math.abs(Math.acos(cos1) - (c.apexDeg / 2) * DEG)).toBeLessThan(1e-5);
  });

  test('minimum deviation obeys n = sin((A + Dmin)/2) / sin(A/2) for other apex angles and indices', () => {
    for (const [apexDeg, n] of [[30, 1.523], [45, 1.586], [20, 1.74], [60, 1.6]] as const) {
      const faces = makePrism(apexDeg);
      const f = (x: number[]): number => {
        const d = deviation(faces, n, x[0]!);
        return Number.isNaN(d) ? 10 : d;
      };
      const best = fmin.nelderMead(f, [0.3], { minErrorDelta: 1e-13, maxIterations: 2000 });
      const expected = 2 * Math.asin(n * Math.sin((apexDeg * DEG) / 2)) - apexDeg * DEG;
      expect(Math.abs(best.fx - expected)).toBeLessThan(1e-9);
    }
  });

  test('thin prism: deviation ≈ (n - 1) A, the error shrinking like A² as A -> 0', () => {
    const n = 1.5;
    let lastErr = Infinity;
    for (const apexDeg of [4, 2, 1, 0.5, 0.25]) {
      const faces = makePrism(apexDeg);
      // normal incidence on the first face: the ray travels along that face's normal (-A/2 from z)
      const d = deviation(faces, n, (-apexDeg / 2) * DEG);
      const thin = (n - 1) * apexDeg * DEG;
      const rel = Math.abs(d / thin - 1);
      // series of asin(n sin A) - A: relative error n (n + 1) A² / 6 (= 0.625 A² here) < A²
      expect(rel).toBeLessThan((apexDeg * DEG) ** 2 + 1e-12);
      // and falls by about 4 when A halves
      if (lastErr !== Infinity) expect(rel).toBeLessThan(lastErr / 3.5);
      lastErr = rel;
    }
  });
});
