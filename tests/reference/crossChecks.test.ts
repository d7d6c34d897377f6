/**
 * Physical cross-checks of the exact trace that do not depend on any formula of the engine:
 * Fermat's principle, reversibility of light paths, the thin-lens and small-decentration
 * limits, and the paraxial focus of a thick lens at 1/Fv behind its back vertex.
 */
import { describe, expect, test } from 'vitest';
import {
  Hit, Lens, type LensSpec, LineTrace, Ray, RayStatus, SagEval, fourAnswers, isFailure, refract,
  traceFocimeter, traceLineOfSight,
} from '../../src/optics/index.ts';
import { minimise } from './fmin.ts';

export const source =
  "Fermat's principle and the reversibility of light paths (Hecht, Optics, ch. 4; from memory); Prentice's rule as the " +
  'thin-lens, small-decentration limit; back vertex focal length 1/Fv (Jalie, The Principles of Ophthalmic Lenses)';

export const cases: { what: string; spec: LensSpec; points: [number, number][] }[] = [
  {
    what: '+6.00 D sphere, prolate front k -0.6, 1.60, 6.5 mm',
    spec: { sphereD: 6, cylD: 0, axisDeg: 0, index: 1.6, frontD: 10, ctMm: 6.5, frontConic: -0.6 },
    points: [[5, -8], [-12, 3], [0, 10]],
  },
  {
    what: '-8.00 / -2.50 x 35, toric back, 1.67, 1.5 mm',
    spec: { sphereD: -8, cylD: -2.5, axisDeg: 35, index: 1.67, frontD: 2, ctMm: 1.5 },
    points: [[5, -8], [-12, 3], [15, 15]],
  },
  {
    what: '+3.00 / -3.00 x 120, toric FRONT, 1.50, 4.5 mm',
    spec: { sphereD: 3, cylD: -3, axisDeg: 120, index: 1.5, frontD: 7, ctMm: 4.5, cylOn: 'front' },
    points: [[5, -8], [-12, 3], [0, 10]],
  },
  {
    what: '-3.00 / -1.00 x 80, toric front, 1.586, 2 mm',
    spec: { sphereD: -3, cylD: -1, axisDeg: 80, index: 1.586, frontD: 4, ctMm: 2, cylOn: 'front' },
    points: [[5, -8], [-14, 6], [10, 12]],
  },
  {
    what: '+12.00 / -1.50 x 10, toric back with conic tube k 0.3, 1.74, 9 mm',
    spec: { sphereD: 12, cylD: -1.5, axisDeg: 10, index: 1.74, frontD: 15, ctMm: 9, backConic: 0.3 },
    points: [[5, -8], [-10, 3], [0, 12]],
  },
];

const CR = 27;

function traced(lens: Lens, x: number, y: number): LineTrace {
  const t = new LineTrace();
  expect(traceLineOfSight(lens, 0, 0, -CR, x, y, t)).toBe(RayStatus.ok);
  return t;
}

describe(`Fermat's principle: the traced path makes the optical path length stationary (${source})`, () => {
  // Optical path from the centre of rotation to a point 200 mm along the object-side ray, as a
  // function of the transverse positions of the two surface crossings (4 parameters); the
  // surfaces are placed with the engine's sagAt (checked against the published sag formulas
  // in tests/reference/sag.test.ts).
  const g = new SagEval();
  const opl = (lens: Lens, far: number[], v: number[]): number => {
    if (!lens.back.sagAt(v[0]!, v[1]!, g)) return Infinity;
    const bz = lens.back.vertexZ - g.sag;
    if (!lens.front.sagAt(v[2]!, v[3]!, g)) return Infinity;
    const fz = lens.front.vertexZ - g.sag;
    const l1 = Math.hypot(v[0]!, v[1]!, bz + CR);
    const l2 = Math.hypot(v[2]! - v[0]!, v[3]! - v[1]!, fz - bz);
    const l3 = Math.hypot(far[0]! - v[2]!, far[1]! - v[3]!, far[2]! - fz);
    return l1 + lens.index * l2 + l3;
  };
  for (const c of cases) {
    test(c.what, () => {
      const lens = new Lens(c.spec);
      for (const [x, y] of c.points) {
        const t = traced(lens, x, y);
        const far = [t.fx + 200 * t.ox, t.fy + 200 * t.oy, t.fz + 200 * t.oz];
        const at = [t.bx, t.by, t.fx, t.fy];
        // the gradient of the OPL at the traced crossings is zero (central differences; the
        // rounding noise of a 230 mm path over a 2e-5 mm step is about 1e-9)
        const h = 1e-5;
        for (let i = 0; i < 4; i++) {
          const p = at.slice(), m = at.slice();
          p[i]! += h; m[i]! -= h;
          const grad = (opl(lens, far, p) - opl(lens, far, m)) / (2 * h);
          expect(Math.abs(grad), `dOPL/dv${i} at (${x}, ${y})`).toBeLessThan(1e-7);
        }
        // a general-purpose minimiser started 0.3 mm away lands on the traced crossings
        const start = [t.bx + 0.3, t.by - 0.2, t.fx - 0.3, t.fy + 0.25];
        const f = (v: number[]): number => opl(lens, far, [start[0]! + v[0]!, start[1]! + v[1]!, start[2]! + v[2]!, start[3]! + v[3]!]);
        const best = minimise(f, [0, 0, 0, 0], { zeroDelta: 0.1, minErrorDelta: 1e-15, maxIterations: 3000 });
        for (let i = 0; i < 4; i++) {
          expect(Math.abs(start[i]! + best.x[i]! - at[i]!), `crossing coordinate ${i} at (${x}, ${y})`).toBeLessThan(1e-5);
        }
      }
    });
  }
});

describe('reversibility: the object-side ray, sent back through the lens, passes through the centre of rotation', () => {
  // Light paths are reversible (Hecht, Optics, ch. 4). The forward trace uses Surface.intersect
  // and refract directly: front from outside (Newton from afar for a toric front), then the back
  // from inside the glass (Newton for a toric back).
  const ray = new Ray(), hit = new Hit(), d = { x: 0, y: 0, z: 0 };
  for (const c of cases) {
    test(c.what, () => {
      const lens = new Lens(c.spec);
      for (const [x, y] of c.points) {
        const t = traced(lens, x, y);
        ray.set(t.fx + 50 * t.ox, t.fy + 50 * t.oy, t.fz + 50 * t.oz, -t.ox, -t.oy, -t.oz);
        expect(lens.front.intersect(ray, hit)).toBe(true);
        expect(hit.t).toBeGreaterThan(0);
        expect(refract(ray.dx, ray.dy, ray.dz, hit.nx, hit.ny, hit.nz, 1, lens.index, d)).toBe(true);
        ray.set(hit.x, hit.y, hit.z, d.x, d.y, d.z);
        expect(lens.back.intersect(ray, hit)).toBe(true);
        expect(hit.t).toBeGreaterThan(0);
        expect(refract(ray.dx, ray.dy, ray.dz, hit.nx, hit.ny, hit.nz, lens.index, 1, d)).toBe(true);
        // distance from the centre of rotation (0, 0, -CR) to the emerging line: |(CR - P) x d|
        const wx = 0 - hit.x, wy = 0 - hit.y, wz = -CR - hit.z;
        const cx = wy * d.z - wz * d.y, cy = wz * d.x - wx * d.z, cz = wx * d.y - wy * d.x;
        expect(Math.hypot(cx, cy, cz), `miss distance at (${x}, ${y})`).toBeLessThan(1e-9);
        // and it heads towards the eye (light travels towards -z)
        expect(d.z).toBeLessThan(0);
      }
    });
  }
});

const rel = (a: { x: number; y: number }, b: { x: number; y: number }): number =>
  Math.hypot(a.x - b.x, a.y - b.y) / Math.hypot(b.x, b.y);

describe("thin-lens limit: first-order equals Prentice at t = 0, and exact/Prentice -> 1 as c -> 0 (Prentice's rule)", () => {
  const forms: Omit<LensSpec, 'ctMm'>[] = [
    { sphereD: 4, cylD: 0, axisDeg: 0, index: 1.5, frontD: 8 },
    { sphereD: -6, cylD: -2, axisDeg: 25, index: 1.6, frontD: 3 },
    { sphereD: 2, cylD: -1.5, axisDeg: 100, index: 1.74, frontD: 6, frontConic: -1 },
  ];
  test('t = 0: the first-order matrix is the back vertex power matrix (docs/method.md, answer 2)', () => {
    for (const f of forms) {
      const a = fourAnswers(new Lens({ ...f, ctMm: 0 }), CR, 7, -4, 'R');
      expect(Math.abs(a.paraxial.x - a.prentice.x)).toBeLessThan(1e-12);
      expect(Math.abs(a.paraxial.y - a.prentice.y)).toBeLessThan(1e-12);
    }
  });
  test('first-order minus Prentice shrinks in proportion to t', () => {
    for (const f of forms) {
      const diff = (t: number): number => {
        const a = fourAnswers(new Lens({ ...f, ctMm: t }), CR, 7, -4, 'R');
        return Math.hypot(a.paraxial.x - a.prentice.x, a.paraxial.y - a.prentice.y);
      };
      for (const t of [2, 1, 0.5]) expect(Math.abs(diff(t) / diff(t / 2) - 2)).toBeLessThan(0.02);
    }
  });
  test('exact/Prentice -> 1 along t ∝ c² (both error terms are second order there, so the error falls by 4 per halving)', () => {
    for (const f of forms) {
      let last = NaN;
      for (let k = 0; k < 6; k++) {
        const c = 0.4 / 2 ** k, t = 0.02 / 4 ** k;
        const a = fourAnswers(new Lens({ ...f, ctMm: t }), CR, 0.6 * c, -0.8 * c, 'L');
        expect(isFailure(a.exact)).toBe(false);
        if (isFailure(a.exact)) return;
        const e = rel(a.exact, a.prentice);
        if (k > 0) expect(last / e).toBeGreaterThan(3.5);
        last = e;
      }
      expect(last).toBeLessThan(1e-5);
    }
  });
});

describe('exact -> first-order as c -> 0 for thick lenses (prism/c converges; error O(c²))', () => {
  for (const c of cases) {
    test(c.what, () => {
      const lens = new Lens(c.spec);
      for (const dir of [0, 70, 200]) {
        const ux = Math.cos((dir * Math.PI) / 180), uy = Math.sin((dir * Math.PI) / 180);
        let lastE = NaN, lastF = NaN;
        for (let k = 0; k < 6; k++) {
          const d = 2 / 2 ** k;
          const a = fourAnswers(lens, CR, d * ux, d * uy, 'R');
          if (isFailure(a.exact) || isFailure(a.focimeter)) throw new Error('trace failed');
          const e = rel(a.exact, a.paraxial), f = rel(a.focimeter, a.focimeterFirstOrder);
          if (k > 0) {
            expect(lastE / e, `line of sight, direction ${dir}°, c ${d}`).toBeGreaterThan(3.5);
            expect(lastF / f, `focimeter, direction ${dir}°, c ${d}`).toBeGreaterThan(3.5);
          }
          lastE = e; lastF = f;
        }
        expect(lastE).toBeLessThan(1e-5);
        expect(lastF).toBeLessThan(1e-5);
      }
    });
  }
});

describe('a paraxial ray parallel to the axis focuses 1/Fv behind the back vertex (back vertex focal length)', () => {
  // Forward exact trace (light towards -z) of a ray 0.01 mm from the axis in each principal
  // meridian: it must cross the axis at z = -1000 / Fv mm (lens frame, back vertex at 0), with
  // Fv = S along the cylinder axis and S + C at 90° to it (the prescription the lens was
  // built for). Aberration at 0.01 mm shifts the crossing by ~(h/f)² relative: 1e-6 is ample.
  const ray = new Ray(), hit = new Hit(), d = { x: 0, y: 0, z: 0 };
  for (const c of cases) {
    test(c.what, () => {
      const lens = new Lens(c.spec);
      const th = (c.spec.axisDeg * Math.PI) / 180;
      for (const [ex, ey, fv] of [
        [Math.cos(th), Math.sin(th), c.spec.sphereD],
        [-Math.sin(th), Math.cos(th), c.spec.sphereD + c.spec.cylD],
      ] as const) {
        const h = 0.01;
        ray.set(h * ex, h * ey, lens.ctMm + 20, 0, 0, -1);
        expect(lens.front.intersect(ray, hit)).toBe(true);
        expect(refract(0, 0, -1, hit.nx, hit.ny, hit.nz, 1, lens.index, d)).toBe(true);
        ray.set(hit.x, hit.y, hit.z, d.x, d.y, d.z);
        expect(lens.back.intersect(ray, hit)).toBe(true);
        expect(refract(ray.dx, ray.dy, ray.dz, hit.nx, hit.ny, hit.nz, lens.index, 1, d)).toBe(true);
        // the ray stays in its principal meridian plane
        expect(Math.abs(d.x * -ey + d.y * ex)).toBeLessThan(1e-12);
        // where it meets the axis: component along the meridian = 0
        const along = hit.x * ex + hit.y * ey, slope = d.x * ex + d.y * ey;
        if (fv === 0) {
          // a plano meridian: the ray leaves parallel to the axis (relative to its height)
          expect(Math.abs(slope / d.z) / h).toBeLessThan(1e-9);
          continue;
        }
        const zFocus = hit.z - (along / slope) * d.z;
        expect(Math.abs(zFocus / (-1000 / fv) - 1)).toBeLessThan(1e-6);
      }
    });
  }
});

describe('focimeter trace sanity: at the optical centre the beam passes undeviated', () => {
  test('zero prism at c = 0 for every case lens', () => {
    for (const c of cases) {
      const t = new LineTrace();
      expect(traceFocimeter(new Lens(c.spec), 0, 0, t)).toBe(RayStatus.ok);
      expect(Math.hypot(t.px, t.py)).toBeLessThan(1e-12);
    }
  });
});
