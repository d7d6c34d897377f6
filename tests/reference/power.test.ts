/**
 * The power the eye gets at a visual point (src/optics/power.ts) against laws and published
 * values outside the project:
 * - on the optical axis the pencil's vergence at the vertex sphere IS the back vertex power
 *   (the definition of back vertex power: the vergence leaving the back vertex for a distant
 *   object), for every lens form, toric or not;
 * - a plane-parallel plate leaves a plane wave plane at any obliquity (Snell's law at two
 *   parallel planes keeps every ray parallel to the incident one): zero vergence;
 * - Coddington's equations (Coddington 1829, as given in standard ophthalmic optics texts,
 *   e.g. Jalie, The Principles of Ophthalmic Lenses; the equations from memory), evaluated by
 *   the engine's own implementation, against the real-ray pencil; the two methods share only
 *   the chief ray, so an error in either shows;
 * - published point-focal forms (Jalie, The Indian Optician, Nov-Dec 2021, p. 104).
 */
import { describe, expect, test } from 'vitest';
import {
  FORM_TOLERANCE_D, Hit, Lens, type LensSpec, LineTrace, MeridionalPower, OpticsError, PencilPower, Placement, Ray,
  coddington, formFronts, pencilPower, pencilSetup, placedLine,
} from '../../src/optics/index.ts';
import { rng } from './rng.ts';

function build(spec: LensSpec): Lens | null {
  try {
    return new Lens(spec);
  } catch (e) {
    if (e instanceof OpticsError) return null;
    throw e;
  }
}

function placement(crMm: number, ocXMm = 0, ocYMm = 0, eye: 'R' | 'L' = 'R'): Placement {
  return new Placement({ ocXMm, ocYMm, crDistanceMm: crMm, pantoDeg: 0, wrapDeg: 0, eye });
}

/** The chief ray from the CR through back-surface point (x, y). */
function chiefAt(lens: Lens, pl: Placement, x: number, y: number): LineTrace {
  const t = new LineTrace();
  t.bx = x; t.by = y;
  placedLine(lens, pl, t);
  return t;
}

const random = rng(20261202);
const between = (a: number, b: number): number => a + (b - a) * random();

describe('on the optical axis the vergence is the back vertex power (definition of back vertex power)', () => {
  test('200 random lenses: spherical, aspheric, toric on either surface; 1e-6 D', () => {
    let checked = 0;
    while (checked < 200) {
      const spec: LensSpec = {
        sphereD: between(-15, 12), cylD: random() < 0.5 ? 0 : between(-5, 0), axisDeg: between(0, 180),
        index: between(1.49, 1.8), frontD: between(0.5, 14), ctMm: between(1, 8),
        frontConic: random() < 0.5 ? 0 : between(-2, 1), backConic: random() < 0.5 ? 0 : between(-1, 1),
        cylOn: random() < 0.5 ? 'back' : 'front',
      };
      const lens = build(spec);
      if (!lens) continue;
      const pl = placement(between(20, 32));
      const chief = chiefAt(lens, pl, 0, 0);
      const p = new PencilPower();
      expect(pencilPower(lens, chief, pencilSetup(lens, pl, null), p)).toBe(0);
      const m = lens.vertexMatrix;
      expect(Math.abs(p.vXX - m[0])).toBeLessThan(1e-6);
      expect(Math.abs(p.vXY - m[1])).toBeLessThan(1e-6);
      expect(Math.abs(p.vYY - m[3])).toBeLessThan(1e-6);
      // and so the errors against the prescription vanish there
      expect(Math.abs(p.meanError)).toBeLessThan(1e-6);
      expect(p.astigmaticError).toBeLessThan(2e-6);
      checked++;
    }
  });

  test('a plane-parallel plate: zero vergence at every obliquity (Snell at parallel planes)', () => {
    const lens = new Lens({ sphereD: 0, cylD: 0, axisDeg: 0, index: 1.6, frontD: 0, ctMm: 3 });
    const pl = placement(27);
    for (const [x, y] of [[0, 0], [10, 0], [0, -15], [12, 9], [-20, 14]] as const) {
      const p = new PencilPower();
      expect(pencilPower(lens, chiefAt(lens, pl, x, y), pencilSetup(lens, pl, null), p)).toBe(0);
      expect(Math.abs(p.vXX) + Math.abs(p.vXY) + Math.abs(p.vYY)).toBeLessThan(1e-9);
    }
  });
});

describe("Coddington's equations (Coddington 1829) against the real-ray pencil, to 1e-6 D", () => {
  test('300 random lenses of revolution and points in a meridian through the axis, distant and near targets', () => {
    let checked = 0;
    while (checked < 300) {
      const spec: LensSpec = {
        sphereD: between(-15, 10), cylD: 0, axisDeg: 0, index: between(1.49, 1.8), frontD: between(0.5, 12),
        ctMm: between(1, 7), frontConic: random() < 0.5 ? 0 : between(-3, 1), backConic: random() < 0.5 ? 0 : between(-1, 1),
      };
      const lens = build(spec);
      if (!lens) continue;
      // the CR on the axis, or off it with the visual point in the CR's meridian
      const off = random() < 0.3 ? between(-4, 4) : 0;
      const angle = between(0, 2 * Math.PI);
      const pl = placement(between(22, 30), -off * Math.cos(angle), -off * Math.sin(angle));
      const r = between(0, 18);
      const chief = chiefAt(lens, pl, r * Math.cos(angle), r * Math.sin(angle));
      if (chief.status !== 0) continue;
      const setup = pencilSetup(lens, pl, null);
      if (random() < 0.4) {
        // a near target on the chief ray's object-side line, 250 to 500 mm out
        const l = between(250, 500);
        setup.near = true;
        setup.qx = chief.fx + l * chief.ox; setup.qy = chief.fy + l * chief.oy; setup.qz = chief.fz + l * chief.oz;
      }
      const p = new PencilPower();
      if (pencilPower(lens, chief, setup, p) !== 0) continue;
      const m = new MeridionalPower();
      expect(coddington(lens, chief, setup, p, m)).toBe(true);
      // the pencil's matrix in the tangential / sagittal frame
      const t1 = m.t1, t2 = m.t2;
      const vt = p.vXX * t1 * t1 + 2 * p.vXY * t1 * t2 + p.vYY * t2 * t2;
      const vs = p.vXX * t2 * t2 - 2 * p.vXY * t1 * t2 + p.vYY * t1 * t1;
      const cross = (p.vYY - p.vXX) * t1 * t2 + p.vXY * (t1 * t1 - t2 * t2);
      expect(Math.abs(vt - m.tangential)).toBeLessThan(1e-6);
      expect(Math.abs(vs - m.sagittal)).toBeLessThan(1e-6);
      expect(Math.abs(cross)).toBeLessThan(1e-6);
      checked++;
    }
  });

  test('they are not used where they do not apply: a toric surface, or a chief ray skew to the axis', () => {
    const toric = new Lens({ sphereD: -3, cylD: -2, axisDeg: 30, index: 1.6, frontD: 4, ctMm: 2 });
    const pl = placement(27);
    const m = new MeridionalPower();
    const p = new PencilPower();
    let chief = chiefAt(toric, pl, 8, 3);
    pencilPower(toric, chief, pencilSetup(toric, pl, null), p);
    expect(coddington(toric, chief, pencilSetup(toric, pl, null), p, m)).toBe(false);
    const sphere = new Lens({ sphereD: -3, cylD: 0, axisDeg: 0, index: 1.6, frontD: 4, ctMm: 2 });
    const skew = placement(27, 3, 0);
    chief = chiefAt(sphere, skew, 0, 8);
    pencilPower(sphere, chief, pencilSetup(sphere, skew, null), p);
    expect(coddington(sphere, chief, pencilSetup(sphere, skew, null), p, m)).toBe(false);
  });
});

describe('point-focal forms (Jalie, The Indian Optician, Nov-Dec 2021, p. 104)', () => {
  // Jalie: a +4.00 D lens in CR39 (n 1.498) with spherical surfaces is free of oblique
  // astigmatism for distance with a front curve "in the region of +9.62 D", and for a near
  // object at 33.33 cm with about +7.50 D. He gives no thickness, centre-of-rotation distance
  // or eye rotation; ours (our choice, stated): 4.5 mm centre thickness (a typical +4.00 D
  // uncut blank), 27 mm to the centre of rotation (docs/choices.md default), 30° of rotation,
  // and the near target 333.3 mm from the vertex sphere along the line of sight.
  const q = { sphereD: 4, index: 1.498, ctMm: 4.5, crMm: 27, rotationDeg: 30, goal: 'astigmatism' as const };

  test('distance: the flatter (Ostwalt) root is +9.62 D within 0.10 D', () => {
    // 0.10 D: the root moves by about 0.02 D per degree of rotation and 0.19 D per mm of
    // thickness about our choices, and Jalie's "in the region of" gives no closer figure
    const fronts = formFronts({ ...q, nearMm: null });
    expect(fronts.length).toBeGreaterThanOrEqual(1);
    expect(Math.abs(fronts[0]! - 9.62)).toBeLessThan(0.1);
  });

  test('near at 33.33 cm: the flatter root is +7.50 D within 0.30 D, and flatter than the distance form', () => {
    // 0.30 D: at near the root moves more with the unstated rotation (about 0.035 D per degree
    // between 20° and 30°) and with where the 33.33 cm is measured from
    const near = formFronts({ ...q, nearMm: 333.33 });
    const far = formFronts({ ...q, nearMm: null });
    expect(Math.abs(near[0]! - 7.5)).toBeLessThan(0.3);
    expect(near[0]!).toBeLessThan(far[0]! - 1.5);
  });

  test('at the root the astigmatic error of the exact pencil vanishes (to the root tolerance)', () => {
    const front = formFronts({ ...q, nearMm: null })[0]!;
    const lens = new Lens({ sphereD: 4, cylD: 0, axisDeg: 0, index: 1.498, frontD: front, ctMm: 4.5 });
    const pl = placement(27);
    const ray = new Ray().set(0, 0, -27, Math.sin(Math.PI / 6), 0, Math.cos(Math.PI / 6));
    const hit = new Hit();
    expect(lens.back.intersect(ray, hit)).toBe(true);
    const p = new PencilPower();
    pencilPower(lens, chiefAt(lens, pl, hit.x, hit.y), pencilSetup(lens, pl, null), p);
    // d(astigmatism)/d(front) is about 0.15 D per D here
    expect(p.astigmaticError).toBeLessThan(10 * FORM_TOLERANCE_D);
  });
});
