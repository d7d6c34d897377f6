/**
 * refract() against Snell's law n1 sin θ1 = n2 sin θ2, with the refracted ray in the plane of
 * incidence, and total internal reflection beyond the critical angle sin θc = n2 / n1.
 */
import { describe, expect, test } from 'vitest';
import { refract } from '../../src/optics/index.ts';
import { rng } from './rng.ts';

export const source = "Snell's law and the critical angle (Hecht, Optics, ch. 4; section numbers from memory)";
/** Double precision on unit vectors: 1e-12 leaves room for a few rounding steps. */
export const tolerance = 1e-12;

type V = [number, number, number];
const cross = (a: V, b: V): V => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
const dot = (a: V, b: V): number => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
const norm = (a: V): number => Math.sqrt(dot(a, a));
const unit = (a: V): V => { const l = norm(a); return [a[0] / l, a[1] / l, a[2] / l]; };

/** Random unit normal and a unit incident direction at angle θ1 to it (towards the surface). */
function setUp(r: () => number, theta1: number): { n: V; d: V } {
  const n = unit([r() - 0.5, r() - 0.5, 1]);
  // any unit vector perpendicular to n
  const e = unit(cross(n, unit([r() - 0.5, r() - 0.5, r() - 0.5])));
  // incident direction travels against the normal: d = -cos θ1 n + sin θ1 e
  const d: V = [
    -Math.cos(theta1) * n[0] + Math.sin(theta1) * e[0],
    -Math.cos(theta1) * n[1] + Math.sin(theta1) * e[1],
    -Math.cos(theta1) * n[2] + Math.sin(theta1) * e[2],
  ];
  return { n, d };
}

export const cases = [
  { n1: 1, n2: 1.5, what: 'air into crown-like glass' },
  { n1: 1.74, n2: 1, what: 'high-index resin into air' },
  { n1: 1.586, n2: 1, what: 'polycarbonate into air' },
  { n1: 1.333, n2: 1.523, what: 'water into crown glass' },
];

describe("refract() obeys Snell's law (" + source + ')', () => {
  const r = rng(7);
  for (const c of cases) {
    test(`${c.what}: n1 sin θ1 = n2 sin θ2, coplanar, unit length, either normal orientation`, () => {
      const crit = c.n1 > c.n2 ? Math.asin(c.n2 / c.n1) : Math.PI / 2;
      for (let k = 0; k < 200; k++) {
        const theta1 = 0.999 * crit * r();
        const { n, d } = setUp(r, theta1);
        const out = { x: 0, y: 0, z: 0 };
        const flip = k % 2 === 1 ? -1 : 1; // the engine accepts the normal either way round
        expect(refract(d[0], d[1], d[2], flip * n[0], flip * n[1], flip * n[2], c.n1, c.n2, out)).toBe(true);
        const t: V = [out.x, out.y, out.z];
        expect(Math.abs(norm(t) - 1)).toBeLessThan(tolerance);
        // sin θ = |d × n| for unit vectors
        const sin1 = norm(cross(d, n)), sin2 = norm(cross(t, n));
        expect(Math.abs(c.n1 * sin1 - c.n2 * sin2)).toBeLessThan(tolerance);
        // the refracted ray lies in the plane of incidence and continues through the surface
        expect(Math.abs(dot(t, cross(d, n)))).toBeLessThan(tolerance);
        expect(dot(t, n)).toBeLessThan(0);
        // and bends towards the normal when entering the denser medium
        if (c.n2 > c.n1) expect(sin2).toBeLessThan(sin1);
      }
    });
  }

  test('total internal reflection: refused just beyond the critical angle, refracted just inside it', () => {
    for (const [n1, n2] of [[1.5, 1], [1.74, 1], [1.523, 1.333]] as const) {
      const crit = Math.asin(n2 / n1);
      const out = { x: 7, y: 7, z: 7 };
      for (const beyond of [1e-7, 0.01, 0.3]) {
        const { n, d } = setUp(r, Math.min(crit + beyond, Math.PI / 2 - 1e-9));
        expect(refract(d[0], d[1], d[2], n[0], n[1], n[2], n1, n2, out)).toBe(false);
        expect(out).toEqual({ x: 7, y: 7, z: 7 }); // untouched on failure
      }
      const { n, d } = setUp(r, crit - 1e-7);
      expect(refract(d[0], d[1], d[2], n[0], n[1], n[2], n1, n2, out)).toBe(true);
      // just inside the critical angle the refracted ray grazes the surface: θ2 near 90°
      expect(Math.abs(dot([out.x, out.y, out.z], n))).toBeLessThan(1e-3);
    }
  });

  test('normal incidence passes straight through (θ1 = 0 gives θ2 = 0)', () => {
    const out = { x: 0, y: 0, z: 0 };
    expect(refract(0, 0, -1, 0, 0, 1, 1, 1.6, out)).toBe(true);
    expect(out.x).toBe(0);
    expect(out.y).toBe(0);
    expect(out.z).toBeCloseTo(-1, 14);
  });
});
