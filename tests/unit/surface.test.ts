/**
 * Surface.intersect for spheres, conics and torics agrees with Surface.sagAt: the hit lies on
 * the ray and on the surface, and its normal is the normalised gradient (∂sag/∂x, ∂sag/∂y, 1),
 * whose slopes in turn match central differences of the sag. Toric intersection from awkward
 * starts, where Newton from the vertex plane cannot work and the bracketing fallback must.
 */
import { describe, expect, it, test } from 'vitest';
import { Hit, Lens, Ray, SagEval, Surface, type SurfaceSpec, fourAnswers, isFailure } from '../../src/optics/index.ts';
import { rng } from '../reference/rng.ts';

const g = new SagEval();
const hit = new Hit();
const ray = new Ray();

/** Check a hit against the surface definition z = vertexZ - sag(x, y) (untilted surfaces). */
function checkHit(s: Surface, r: Ray, h: Hit): void {
  // on the ray
  expect(Math.abs(r.px + h.t * r.dx - h.x)).toBeLessThan(1e-9);
  expect(Math.abs(r.py + h.t * r.dy - h.y)).toBeLessThan(1e-9);
  expect(Math.abs(r.pz + h.t * r.dz - h.z)).toBeLessThan(1e-9);
  // on the surface
  expect(s.sagAt(h.x, h.y, g)).toBe(true);
  expect(Math.abs(s.vertexZ - g.sag - h.z)).toBeLessThan(1e-9);
  // normal = (∂sag/∂x, ∂sag/∂y, 1) normalised
  const inv = 1 / Math.hypot(g.dx, g.dy, 1);
  expect(Math.abs(h.nx - g.dx * inv)).toBeLessThan(1e-9);
  expect(Math.abs(h.ny - g.dy * inv)).toBeLessThan(1e-9);
  expect(Math.abs(h.nz - inv)).toBeLessThan(1e-9);
  expect(Math.abs(Math.hypot(h.nx, h.ny, h.nz) - 1)).toBeLessThan(1e-12);
}

/** sagAt's slopes against central differences of its own sag (step 1e-5 mm: error ~1e-9). */
function checkSlopes(s: Surface, x: number, y: number): void {
  const e = 1e-5;
  const at = (u: number, v: number): number => (s.sagAt(u, v, g) ? g.sag : NaN);
  const fx = (at(x + e, y) - at(x - e, y)) / (2 * e);
  const fy = (at(x, y + e) - at(x, y - e)) / (2 * e);
  s.sagAt(x, y, g);
  expect(Math.abs(g.dx - fx)).toBeLessThan(1e-7);
  expect(Math.abs(g.dy - fy)).toBeLessThan(1e-7);
}

const surfaces: [string, SurfaceSpec][] = [
  ['convex sphere R 80', { curvature: 1 / 80, vertexZ: 3 }],
  ['concave-to-object sphere R -60', { curvature: -1 / 60, vertexZ: 0 }],
  ['plane', { curvature: 0, vertexZ: 2 }],
  ['hyperboloid k -3', { curvature: 1 / 70, conic: -3, vertexZ: 5 }],
  ['paraboloid k -1', { curvature: 1 / 50, conic: -1, vertexZ: 0 }],
  ['oblate k 0.8', { curvature: 1 / 90, conic: 0.8, vertexZ: 1 }],
  ['toric tyre 1/120 & 1/40 x 30', { curvature: 1 / 120, curvature90: 1 / 40, axisDeg: 30, vertexZ: 0 }],
  ['toric tyre, stronger along the axis, x 150', { curvature: 1 / 35, curvature90: 1 / 90, axisDeg: 150, vertexZ: 4 }],
  ['toric barrel 1/100 & 1/45 x 75', { curvature: 1 / 100, curvature90: 1 / 45, axisDeg: 75, form: 'barrel', vertexZ: 0 }],
  ['toric with conic tube k -0.5', { curvature: 1 / 110, curvature90: 1 / 50, axisDeg: 10, conic: -0.5, vertexZ: 2 }],
  ['plano-cylinder (flat weaker meridian)', { curvature: 0, curvature90: 1 / 60, axisDeg: 45, vertexZ: 0 }],
  ['mixed toric (one meridian concave)', { curvature: -1 / 200, curvature90: 1 / 70, axisDeg: 120, vertexZ: 1 }],
];

describe('Surface.intersect agrees with Surface.sagAt', () => {
  test.each(surfaces)('%s: random rays from both sides', (_name, spec) => {
    const s = new Surface(spec);
    const r = rng(spec.axisDeg ?? 17);
    let hits = 0;
    for (let i = 0; i < 300; i++) {
      // aim at a point within 25 mm of the vertex from 30 mm in front of or behind the surface
      const tx = 50 * r() - 25, ty = 50 * r() - 25;
      const side = i % 2 === 0 ? 1 : -1;
      const sx = tx + 20 * (r() - 0.5), sy = ty + 20 * (r() - 0.5), sz = s.vertexZ + side * 30;
      let dx = tx - sx, dy = ty - sy, dz = s.vertexZ - sz;
      const l = Math.hypot(dx, dy, dz);
      dx /= l; dy /= l; dz /= l;
      ray.set(sx, sy, sz, dx, dy, dz);
      if (!s.intersect(ray, hit)) continue;
      hits++;
      checkHit(s, ray, hit);
      checkSlopes(s, hit.x, hit.y);
    }
    expect(hits).toBeGreaterThan(200);
  });

  test('a tilted sphere: the hit lies on the tilted surface (local = Rx(-tilt) (p - vertex))', () => {
    const tilt = 12, s = new Surface({ curvature: 1 / 60, vertexZ: 5, tiltXDeg: tilt });
    const a = (tilt * Math.PI) / 180;
    const r = rng(3);
    for (let i = 0; i < 50; i++) {
      ray.set(20 * r() - 10, 20 * r() - 10, 40, 0.1 * (r() - 0.5), 0.1 * (r() - 0.5), -1);
      const l = Math.hypot(ray.dx, ray.dy, ray.dz);
      ray.dx /= l; ray.dy /= l; ray.dz /= l;
      expect(s.intersect(ray, hit)).toBe(true);
      // into the surface frame: rotate (y, z) by -tilt about x
      const y = hit.y, z = hit.z - 5;
      const ly = Math.cos(a) * y + Math.sin(a) * z, lz = -Math.sin(a) * y + Math.cos(a) * z;
      const sphereSag = 60 - Math.sqrt(60 * 60 - hit.x * hit.x - ly * ly);
      expect(Math.abs(lz + sphereSag)).toBeLessThan(1e-9);
    }
  });

  test('a ray that passes beside a small sphere misses (returns false)', () => {
    const s = new Surface({ curvature: 1 / 10, vertexZ: 0 });
    ray.set(30, 0, 20, 0, 0, -1);
    expect(s.intersect(ray, hit)).toBe(false);
  });
});

describe('toric intersection from awkward starts (bracketing fallback)', () => {
  // Tube along y of radius 25 mm (the stronger meridian), swept about an axis 100 mm behind:
  // the surface exists only for |y| < 25. A ray along (0, -1, -1)/√2 through (0, 30, 0) meets
  // the vertex plane at y = 30, where there is no surface, so Newton from the vertex plane
  // cannot even start. It crosses the surface where s = sag(30 - s), at s = 10: on the tube
  // meridian sag(20) = 25 - sqrt(25² - 20²) = 10. Expected hit (0, 20, -10).
  // (The surface.ts doc promises a bracket "searched outwards from the vertex plane" when
  // Newton cannot proceed; at the time of writing the search gives up when the vertex-plane
  // point itself has no surface, so these three fail: reported to the lead as an engine bug.)
  for (const axisDeg of [0, 30, 111]) {
    test(`vertex-plane start outside the surface's domain, axis ${axisDeg}°`, () => {
      const s = new Surface({ curvature: 1 / 100, curvature90: 1 / 25, axisDeg, vertexZ: 0 });
      const a = (axisDeg * Math.PI) / 180;
      // the construction is in the surface's principal frame; turn it by the axis angle
      const rot = (u: number, v: number): [number, number] => [u * Math.cos(a) - v * Math.sin(a), u * Math.sin(a) + v * Math.cos(a)];
      const [px, py] = rot(0, 40), [dx, dy] = rot(0, -Math.SQRT1_2);
      ray.set(px, py, 10, dx, dy, -Math.SQRT1_2);
      expect(s.intersect(ray, hit)).toBe(true);
      const [ex, ey] = rot(0, 20);
      expect(Math.abs(hit.x - ex)).toBeLessThan(1e-9);
      expect(Math.abs(hit.y - ey)).toBeLessThan(1e-9);
      expect(Math.abs(hit.z - -10)).toBeLessThan(1e-9);
      expect(Math.abs(hit.t - 20 * Math.SQRT2)).toBeLessThan(1e-9);
      checkHit(s, ray, hit);
      // the normal of the tube at y = 20 points away from the tube's centre (0, 0, -25) in
      // the principal frame: (0, 20, 15)/25
      const [nx, ny] = rot(0, 0.8);
      expect(Math.abs(hit.nx - nx)).toBeLessThan(1e-9);
      expect(Math.abs(hit.ny - ny)).toBeLessThan(1e-9);
      expect(Math.abs(hit.nz - 0.6)).toBeLessThan(1e-9);
    });
  }

  test('steep oblique rays on a strong toric: every reported hit is a true crossing', () => {
    const s = new Surface({ curvature: 1 / 60, curvature90: 1 / 22, axisDeg: 63, conic: 0.4, vertexZ: 0 });
    const r = rng(99);
    let hits = 0;
    for (let i = 0; i < 400; i++) {
      // rays from far off to the side, at 40-85° to the axis, aimed near the surface
      const th = ((40 + 45 * r()) * Math.PI) / 180, ph = 2 * Math.PI * r();
      const dx = -Math.sin(th) * Math.cos(ph), dy = -Math.sin(th) * Math.sin(ph), dz = -Math.cos(th);
      const tx = 30 * r() - 15, ty = 30 * r() - 15;
      ray.set(tx - 60 * dx, ty - 60 * dy, -60 * dz, dx, dy, dz);
      if (!s.intersect(ray, hit)) continue;
      hits++;
      checkHit(s, ray, hit);
    }
    expect(hits).toBeGreaterThan(100);
  });

  test('a ray that never meets the torus is a miss, not a wrong point', () => {
    const s = new Surface({ curvature: 1 / 100, curvature90: 1 / 25, axisDeg: 0, vertexZ: 0 });
    ray.set(0, 40, 10, 0, 0, -1); // straight down at y = 40, beyond the tube
    expect(s.intersect(ray, hit)).toBe(false);
  });

  test('the same situation in a lens: a line of sight through a steep toric front is not a miss', () => {
    // Our own scenario: +11.43 / -1.75 x 110.3, toric front of +16.15 D (cylinder on the
    // front), n 1.516, 11.9 mm thick, visual point (-17.88, 16.41) mm. Inside the glass the
    // line of sight meets the front about 3.4 mm beyond the back surface, where the lens is
    // about 3.5 mm thick (found below by marching along the ray with sagAt); its vertex-plane
    // crossing lies 36 mm off axis, beyond the front's 32 mm tube, so Newton cannot start.
    const lens = new Lens({ sphereD: 11.43, cylD: -1.75, axisDeg: 110.3, index: 1.516, frontD: 16.15, ctMm: 11.9, cylOn: 'front' });
    const a = fourAnswers(lens, 27, -17.88, 16.41, 'R');
    const t = a.exactTrace;
    let crossing = NaN, prev = -1;
    for (let s = 0; s < 20; s += 1e-3) {
      if (!lens.front.sagAt(t.bx + s * t.gx, t.by + s * t.gy, g)) break;
      const f = t.bz + s * t.gz - (lens.ctMm - g.sag);
      if (f >= 0 && prev < 0) { crossing = s; break; }
      prev = f;
    }
    expect(crossing).toBeGreaterThan(3);
    expect(lens.thicknessAt(t.bx + crossing * t.gx, t.by + crossing * t.gy)).toBeGreaterThan(3);
    expect(isFailure(a.exact) ? a.exact.failure : 'ok').toBe('ok');
  });
});

describe('a ray that starts beyond the centre of curvature meets the vertex branch (geometry of the sphere)', () => {
  // Found by the Tscherning reference test: the stable root of the quadric is the far side of
  // the sphere when the ray starts beyond its centre; the vertex branch is the other root.
  it('from inside a convex-to-object sphere (centre between the start and the vertex)', () => {
    const s = new Surface({ curvature: 1 / 25, vertexZ: 0 });
    const h = new Hit();
    expect(s.intersect(new Ray().set(0, 0, -27, 0, 0, 1), h)).toBe(true);
    expect(h.z).toBe(0);
    expect(h.t).toBe(27);
    // an oblique ray: the hit lies on the sphere of radius 25 about (0, 0, -25), on the vertex side
    expect(s.intersect(new Ray().set(3, 1, -27, 0.1, 0, Math.sqrt(0.99)), h)).toBe(true);
    expect(Math.hypot(h.x, h.y, h.z + 25)).toBeCloseTo(25, 12);
    expect(h.z).toBeGreaterThan(-25);
  });

  it('from a far target towards a concave front whose centre lies between them', () => {
    const s = new Surface({ curvature: -1 / 100, vertexZ: 2 });
    const h = new Hit();
    expect(s.intersect(new Ray().set(1, 0, 333, 0, 0, -1), h)).toBe(true);
    // z = vertex - sag, sag = R - sqrt(R² - r²) with R = -100 mm, r = 1 mm
    expect(h.z).toBeCloseTo(2 - (-100 + Math.sqrt(100 * 100 - 1)), 12);
  });
});
