/**
 * Surface.sagAt against the published sag formulas (sources in `source` below): sphere s = r - sqrt(r² - y²), paraboloid
 * (k = -1) s = κ r² / 2, general conic s = κ r² / (1 + sqrt(1 - (1 + k) κ² r²)).
 */
import { describe, expect, test } from 'vitest';
import { SagEval, Surface } from '../../src/optics/index.ts';

export const source =
  'sag of a sphere s = r - sqrt(r² - y²) and of a conic z = c r² / (1 + sqrt(1 - (1 + k) c² r²)) ' +
  '(M. Jalie, The Principles of Ophthalmic Lenses, for the sphere; the conic as in the aspheric ' +
  'surface equation of ISO 10110-12; both from memory)';
/** Relative to the sag, near double precision; the formulas are evaluated directly. */
export const tolerance = 1e-12;

/** Each case: radius (mm), conic, a transverse point, and the sag from its own formula. */
export const cases = [
  // sphere by the "r - sqrt(r² - y²)" form (not the conic form the engine uses)
  ...[[100, 20, 0], [-80, 10, 15], [50, 30, 35], [250, -40, 12], [33, 0, 32]].map(([R, x, y]) => ({
    R: R!, k: 0, x: x!, y: y!,
    expected: Math.sign(R!) * (Math.abs(R!) - Math.sqrt(R! * R! - x! * x! - y! * y!)),
    from: 'sphere s = r - sqrt(r² - y²)',
  })),
  // paraboloid: s = κ r² / 2 = r² / (2R)
  ...[[100, 20, 0], [-60, 25, 25], [40, 35, -30]].map(([R, x, y]) => ({
    R: R!, k: -1, x: x!, y: y!, expected: (x! * x! + y! * y!) / (2 * R!), from: 'paraboloid s = κ r² / 2',
  })),
  // general conic: hyperboloid, prolate and oblate ellipses
  ...[[80, -3, 20, 10], [80, -0.5, 15, -25], [120, 0.8, 30, 30], [-70, 0.3, -20, 5]].map(([R, k, x, y]) => {
    const c = 1 / R!, r2 = x! * x! + y! * y!;
    return { R: R!, k: k!, x: x!, y: y!, expected: (c * r2) / (1 + Math.sqrt(1 - (1 + k!) * c * c * r2)), from: 'conic formula' };
  }),
];

describe(`sag formulas (${source})`, () => {
  test.each(cases)('$from: R $R mm, k $k at ($x, $y)', (c) => {
    const s = new Surface({ curvature: 1 / c.R, conic: c.k, vertexZ: 0 });
    const out = new SagEval();
    expect(s.sagAt(c.x, c.y, out)).toBe(true);
    expect(Math.abs(out.sag - c.expected)).toBeLessThan(tolerance * Math.max(1, Math.abs(c.expected)));
  });

  test('a sphere does not exist beyond its hemisphere (r > |R|); a plane has zero sag', () => {
    const out = new SagEval();
    expect(new Surface({ curvature: 1 / 30, vertexZ: 0 }).sagAt(25, 20, out)).toBe(false);
    expect(new Surface({ curvature: 0, vertexZ: 0 }).sagAt(1e3, -1e3, out)).toBe(true);
    expect(out.sag).toBe(0);
  });

  test('slope of the sphere: dz/dy = y / sqrt(R² - y²) (differentiating the sphere sag)', () => {
    const out = new SagEval();
    for (const [R, y] of [[100, 20], [-50, 30], [35, 34]] as const) {
      new Surface({ curvature: 1 / R, vertexZ: 0 }).sagAt(0, y, out);
      expect(Math.abs(out.dy - (Math.sign(R) * y) / Math.sqrt(R * R - y * y))).toBeLessThan(1e-12 * Math.max(1, Math.abs(out.dy)));
    }
  });

  test('toric: each principal meridian has the sag of its own curve (tube: conic; swept: circle)', () => {
    // tyre formation, tube along the stronger meridian (src/optics/surface.ts header):
    // along the stronger meridian the sag is the tube's conic; along the weaker, a circle of
    // radius 1/κ_weaker (the tube's vertex sweeps a circle about the sweep axis)
    const out = new SagEval();
    const rWeak = 120, rStrong = 60, k = -0.4;
    for (const axisDeg of [0, 30, 90, 145]) {
      const s = new Surface({ curvature: 1 / rWeak, curvature90: 1 / rStrong, conic: k, axisDeg, vertexZ: 0 });
      const a = (axisDeg * Math.PI) / 180;
      const d = 25;
      s.sagAt(d * Math.cos(a), d * Math.sin(a), out); // along the axis meridian (weaker)
      expect(Math.abs(out.sag - (rWeak - Math.sqrt(rWeak * rWeak - d * d)))).toBeLessThan(1e-12);
      s.sagAt(-d * Math.sin(a), d * Math.cos(a), out); // along the perpendicular (stronger) meridian
      const c = 1 / rStrong;
      expect(Math.abs(out.sag - (c * d * d) / (1 + Math.sqrt(1 - (1 + k) * c * c * d * d)))).toBeLessThan(1e-12);
    }
  });
});
