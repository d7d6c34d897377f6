/**
 * Lens construction: the centre-thickness solver gives the edge thickness asked for, and an
 * impossible lens is refused with an OpticsError naming the input at fault.
 */
import { describe, expect, test } from 'vitest';
import { Lens, type LensSpec, OpticsError, solveCentreThickness } from '../../src/optics/index.ts';

// Sources: back vertex power Fv = F1/(1 - (t/n)F1) + F2 and F = (n - 1)/r (Jalie, The Principles
// of Ophthalmic Lenses); sphere sag s = r - sqrt(r² - y²). Edge thickness of a spherical lens
// = t - s1 + s2 at the edge radius (sags with their signs).

/** Edge thickness of a spherical lens of centre thickness t at radius y, from its own formulas. */
function edgeOfSphericalLens(sphereD: number, frontD: number, n: number, tMm: number, y: number): number {
  const f2 = sphereD - frontD / (1 - (tMm / 1000 / n) * frontD);
  const r1 = ((n - 1) / frontD) * 1000, r2 = ((1 - n) / f2) * 1000;
  const sag = (r: number): number => Math.sign(r) * (Math.abs(r) - Math.sqrt(r * r - y * y));
  return tMm - sag(r1) + sag(r2);
}

function refusal(f: () => unknown): OpticsError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(OpticsError);
    return e as OpticsError;
  }
  throw new Error('expected an OpticsError');
}

describe('solveCentreThickness', () => {
  test.each([
    [4, 8, 1.5, 60, 1],
    [8, 11, 1.6, 55, 0.8],
    [2, 6, 1.74, 70, 1.2],
  ])('plus sphere %f D on front %f, n %f, %f mm: edge = the minimum asked for', (s, f, n, d, minEdge) => {
    const t = solveCentreThickness({ sphereD: s, cylD: 0, axisDeg: 0, index: n, frontD: f }, { diameterMm: d, minEdgeMm: minEdge, minCentreMm: 1.5 });
    expect(Math.abs(edgeOfSphericalLens(s, f, n, t, d / 2) - minEdge)).toBeLessThan(1e-6);
    expect(t).toBeGreaterThan(1.5);
  });

  test('minus sphere: the centre minimum governs and the edge is thicker', () => {
    const t = solveCentreThickness({ sphereD: -4, cylD: 0, axisDeg: 0, index: 1.6, frontD: 3 }, { diameterMm: 60, minEdgeMm: 1, minCentreMm: 1.8 });
    expect(t).toBe(1.8);
    expect(edgeOfSphericalLens(-4, 3, 1.6, t, 30)).toBeGreaterThan(1);
  });

  test('plus toric: the thinnest point of the edge circle is the minimum asked for', () => {
    const spec: Omit<LensSpec, 'ctMm'> = { sphereD: 5, cylD: -2.5, axisDeg: 35, index: 1.6, frontD: 8 };
    const t = solveCentreThickness(spec, { diameterMm: 62, minEdgeMm: 1, minCentreMm: 1.5 });
    const lens = new Lens({ ...spec, ctMm: t });
    let min = Infinity;
    for (let i = 0; i < 7200; i++) {
      const a = (i * Math.PI) / 3600;
      min = Math.min(min, lens.thicknessAt(31 * Math.cos(a), 31 * Math.sin(a)));
    }
    expect(Math.abs(min - 1)).toBeLessThan(1e-6);
    // a plus lens's edge is thinnest where its power is highest: along the axis meridian
    // (power S = +5.00) rather than at 90° to it (S + C = +2.50)
    const along = lens.thicknessAt(31 * Math.cos((35 * Math.PI) / 180), 31 * Math.sin((35 * Math.PI) / 180));
    const across = lens.thicknessAt(31 * Math.cos((125 * Math.PI) / 180), 31 * Math.sin((125 * Math.PI) / 180));
    expect(Math.abs(along - 1)).toBeLessThan(1e-6);
    expect(across).toBeGreaterThan(along);
  });

  test('no lens of the form spans the diameter: OpticsError naming the diameter', () => {
    const e = refusal(() => solveCentreThickness({ sphereD: 10, cylD: 0, axisDeg: 0, index: 1.5, frontD: 20 }, { diameterMm: 70, minEdgeMm: 1, minCentreMm: 2 }));
    expect(e.field).toBe('diameter');
  });
});

describe('Lens refuses impossible lenses with an OpticsError naming the field', () => {
  test('surfaces cross inside the diameter -> ct', () => {
    // +6.00 D on a +10 D front, 1 mm thick, 60 mm round: the edge would be negative
    expect(edgeOfSphericalLens(6, 10, 1.5, 1, 30)).toBeLessThan(0);
    const e = refusal(() => new Lens({ sphereD: 6, cylD: 0, axisDeg: 0, index: 1.5, frontD: 10, ctMm: 1, diameterMm: 60 }));
    expect(e.field).toBe('ct');
    expect(e.message).toMatch(/cross/);
    expect(e.message).toContain('60');
  });

  test('the same lens is accepted once it is thick enough (edge > 0)', () => {
    expect(edgeOfSphericalLens(6, 10, 1.5, 7, 30)).toBeGreaterThan(0);
    expect(() => new Lens({ sphereD: 6, cylD: 0, axisDeg: 0, index: 1.5, frontD: 10, ctMm: 7, diameterMm: 60 })).not.toThrow();
  });

  test('a toric that crosses only in one meridian is still refused', () => {
    // plano / +4.00 x 90: thin enough to cross along the 0° meridian (power +4) only
    const e = refusal(() => new Lens({ sphereD: 0, cylD: 4, axisDeg: 90, index: 1.5, frontD: 6, ctMm: 2, diameterMm: 60 }));
    expect(e.field).toBe('ct');
  });

  test('a surface too steep for the diameter -> diameter', () => {
    // front +20 D in n 1.5: R = 25 mm, cannot span 60 mm
    const e = refusal(() => new Lens({ sphereD: 18, cylD: 0, axisDeg: 0, index: 1.5, frontD: 20, ctMm: 20, diameterMm: 60 }));
    expect(e.field).toBe('diameter');
  });

  test('a front whose image falls inside the lens (1 - (t/n) F1 <= 0) -> front', () => {
    const e = refusal(() => new Lens({ sphereD: 0, cylD: 0, axisDeg: 0, index: 1.5, frontD: 30, ctMm: 60 }));
    expect(e.field).toBe('front');
    expect(e.message).toContain('30');
  });
});
