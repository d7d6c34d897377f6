/**
 * The range (src/case/range.ts) against things outside it: Prentice's rule in power-matrix
 * form, the engine's single-lens limits and the CLI's one-lens answer, the ordering a
 * tolerance imposes, the thin-lens limit, and a direct bisection on Prentice's error.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { breakdown, directionDeg, rangeRows, readRangeSpec } from '../../src/case/range.ts';
import { flagOf } from '../../src/case/flags.ts';
import { buildLens, readLensForm } from '../../src/case/lensCase.ts';
import { run } from '../../src/cli/main.ts';
import { decentrationLimit, fourAnswers, isFailure } from '../../src/optics/index.ts';

export const source =
  "Prentice's rule c = P / |F u| with the dioptric power matrix F = [[S + C sin²θ, -C sinθ cosθ], " +
  '[-C sinθ cosθ, S + C cos²θ]] (Long, Am J Optom Physiol Opt 1976;53:27-33); directions per eye from ' +
  'docs/conventions.md ("The wearer frame": x towards the wearer\'s left, so nasal is +x for the right eye); ' +
  'the thin-lens limit of the thick-lens formulas (Fv -> F1 + F2 as t -> 0; e.g. Jalie, The Principles of ' +
  'Ophthalmic Lenses); the order of first crossings (a smaller tolerance is crossed no later)';

/** Long (1976), written out here independently of src/optics/powerMatrix.ts. */
function longMatrix(s: number, c: number, axisDeg: number): [number, number, number, number] {
  const t = (axisDeg * Math.PI) / 180, sn = Math.sin(t), cs = Math.cos(t);
  return [s + c * sn * sn, -c * sn * cs, -c * sn * cs, s + c * cs * cs];
}

/** Prentice's limit, mm, by hand: P (Δ) / |F u| (D), in cm, times 10. */
function prenticeByHand(s: number, c: number, axis: number, dirDeg: number, p: number): number | null {
  const f = longMatrix(s, c, axis);
  const ux = Math.cos((dirDeg * Math.PI) / 180), uy = Math.sin((dirDeg * Math.PI) / 180);
  const fu = Math.hypot(f[0] * ux + f[1] * uy, f[2] * ux + f[3] * uy);
  return fu < 1e-12 ? null : (10 * p) / fu;
}

describe(`range rows against independent values (${source})`, () => {
  test('the direction words per eye follow docs/conventions.md: nasal is +x for the right eye, -x for the left', () => {
    expect(directionDeg('nasal', 'R')).toBe(0);
    expect(directionDeg('temporal', 'R')).toBe(180);
    expect(directionDeg('nasal', 'L')).toBe(180);
    expect(directionDeg('temporal', 'L')).toBe(0);
    expect(directionDeg('up', 'L')).toBe(90);
    expect(directionDeg('down', 'R')).toBe(270);
  });

  test.each(['R', 'L'])('Prentice limits are P / |F u| (Long 1976) for oblique cylinders and the four named directions, eye %s', (eye) => {
    const spec = readRangeSpec({
      power: '-6,-1.5,2.25', cyl: '-0.75,-2.5,+1.25', axis: '20,45,135,170', dir: 'nasal,temporal,up,down', maxPrism: '0.25,1',
      fields: { eye, ct: '3', diameter: '40', front: '7' },
    });
    const rows = rangeRows(spec);
    expect(rows).toHaveLength(3 * 3 * 4 * 4 * 2);
    const words = { nasal: eye === 'R' ? 0 : 180, temporal: eye === 'R' ? 180 : 0, up: 90, down: 270 } as Record<string, number>;
    let checked = 0;
    for (const r of rows) {
      expect(r.dirDeg).toBe(words[r.direction]);
      const want = prenticeByHand(r.sphere, r.cyl, r.axis, words[r.direction]!, r.maxPrism);
      if (r.limitedBy === 'lens') continue;
      expect(r.prentice).not.toBeNull();
      expect(Math.abs(r.prentice! - want!)).toBeLessThan(1e-9 * want!);
      checked++;
    }
    expect(checked).toBeGreaterThan(200);
  });

  test('a zero-power meridian: no limit by Prentice, and the row says so; the exact limit is given with its reason', () => {
    // a plano-cylinder -2.00 x 90: no power along the axis (up/down, 90° and 270°)
    const spec = readRangeSpec({ power: '0', cyl: '-2', axis: '90', dir: 'up,nasal', maxPrism: '0.5', fields: { ct: '2', front: '6', diameter: '60' } });
    const [up, nasal] = rangeRows(spec);
    expect(prenticeByHand(0, -2, 90, 90, 0.5)).toBeNull();
    expect(up!.prentice).toBeNull();
    expect(up!.reason).toMatch(/no limit by Prentice's rule/);
    expect(nasal!.prentice).toBeCloseTo(prenticeByHand(0, -2, 90, 0, 0.5)!, 12);
    // the plano sphere of the default family: the thick meniscus's small effective power gives an exact limit
    const plano = rangeRows(readRangeSpec({ power: '0', maxPrism: '0.5', fields: {} }))[0]!;
    expect(plano.prentice).toBeNull();
    expect(plano.exact).not.toBeNull();
    expect(plano.reason).toMatch(/thick meniscus has a small effective power/);
  });

  test('exact limits of rows equal the single-lens limits (engine and `decentra limits --json`)', () => {
    const fields = { material: 'resin-1.60', cr: '25' };
    const spec = readRangeSpec({ power: '-7,3.5,9', cyl: '0,-1.75', axis: '60', dir: 'nasal,down,37', maxPrism: '0.5,2', fields });
    const rows = rangeRows(spec);
    for (const r of rows) {
      const lens = buildLens(readLensForm({ ...fields, sphere: r.sphere, cyl: r.cyl, axis: r.axis }, flagOf), flagOf);
      const one = decentrationLimit(lens, 25, r.dirDeg, r.maxPrism);
      expect(r.exact).toBe(one.exactReason === 'ok' ? one.exactMm : null);
      expect(r.prentice).toBe(one.prenticeMm);
      expect(r.firstOrder).toBe(one.paraxialMm);
    }
    for (const r of rows.filter((_, i) => i % 7 === 0)) {
      const out = run(['limits', '--sphere', String(r.sphere), '--cyl', String(r.cyl), '--axis', String(r.axis), '--material', 'resin-1.60',
        '--cr', '25', '--dir', String(r.dirDeg), '--max-prism', String(r.maxPrism), '--json']);
      const j = JSON.parse(out.out);
      expect(j.exact).toBe(r.exact);
      expect(j.prentice).toBe(r.prentice);
      expect(j.paraxial).toBe(r.firstOrder);
      expect(j.focimeter).toBe(r.focimeter);
      expect(j.limitedBy.exact).toBe(r.limitedBy);
    }
  });

  test('property: no limit grows when the tolerance shrinks (first crossings are ordered)', () => {
    fc.assert(fc.property(
      fc.double({ min: -12, max: 8, noNaN: true }), fc.constantFrom(0, -0.5, -2, -3.5), fc.integer({ min: 0, max: 179 }),
      fc.integer({ min: 0, max: 359 }), fc.double({ min: 0.1, max: 3, noNaN: true }), fc.double({ min: 0.2, max: 0.95, noNaN: true }),
      (s, c, axis, dir, big, ratio) => {
        const tols = [big * ratio, big];
        const spec = readRangeSpec({ power: s.toFixed(2), cyl: String(c), axis: String(axis), dir: String(dir), maxPrism: tols.map(String).join(','), fields: { diameter: '50' } });
        const [small, large] = rangeRows(spec);
        if (small!.limitedBy === 'lens') return;
        for (const k of ['exact', 'firstOrder', 'prentice', 'focimeter'] as const) {
          const a = small![k], b = large![k];
          if (b !== null) expect(a).not.toBeNull(); // the larger tolerance is reached: so is the smaller
          if (a !== null && b !== null) expect(a).toBeLessThanOrEqual(b + 1e-9);
        }
      }), { numRuns: 40 });
  });

  test('thin-lens limit: the exact and Prentice limits converge as power, thickness and decentration fall', () => {
    // a nearly flat biconvex lens (front = half the power), thinner as the power falls; the
    // tolerance puts Prentice's limit at 2 mm per dioptre, so the line of sight's obliquity
    // (a ray from the centre of rotation) falls too: the paraxial thin lens is Prentice's rule
    const gaps: number[] = [];
    for (const [s, ct] of [[4, 4], [2, 2], [1, 1], [0.5, 0.5], [0.25, 0.25], [0.1, 0.1], [0.05, 0.05]] as const) {
      const spec = readRangeSpec({ power: String(s), dir: '0', maxPrism: String((s * s) / 5), fields: { front: String(s / 2), ct: String(ct), diameter: '40' } });
      const r = rangeRows(spec)[0]!;
      expect(r.prentice).toBeCloseTo(2 * s, 12);
      gaps.push(Math.abs(r.exact! - r.prentice!) / r.prentice!);
    }
    for (let i = 1; i < gaps.length; i++) expect(gaps[i]).toBeLessThan(gaps[i - 1]!);
    expect(gaps[0]).toBeGreaterThan(0.01); // a real thick-lens difference at 4 D, 4 mm ...
    // ... and shrinking in proportion (the thick-lens and centre-of-rotation terms are first
    // order in t F, the obliquity second order in c): below 0.1 % at 0.05 D, 0.05 mm
    expect(gaps[gaps.length - 1]).toBeLessThan(0.001);
  });

  test('the 10 % breakdown contour agrees with a direct bisection on the error', () => {
    const spec = readRangeSpec({ power: '-10,-8,-6', maxPrism: '0.5', dir: 'nasal', fields: {} });
    const b = breakdown(spec, [10]);
    /** |Prentice error| in percent at d mm nasal, from the engine's four answers (right eye: nasal is +x). */
    const err = (lens: ReturnType<typeof buildLens>, d: number): number => {
      const a = fourAnswers(lens, 27, d, 0, 'R');
      if (isFailure(a.exact)) throw new Error('trace failed');
      return Math.abs(100 * (a.prentice.magnitude - a.exact.magnitude) / a.exact.magnitude);
    };
    b.rows.forEach((row) => {
      const lens = buildLens(readLensForm({ sphere: row.sphere }, flagOf), flagOf);
      // a fine scan (0.05 mm) for the first crossing, then a bisection
      let lo = 0.05;
      expect(err(lens, lo)).toBeLessThan(10);
      let hi = lo;
      while (err(lens, hi) <= 10) { lo = hi; hi += 0.05; if (hi > 32) throw new Error('no crossing'); }
      for (let i = 0; i < 50; i++) { const m = (lo + hi) / 2; if (err(lens, m) > 10) hi = m; else lo = m; }
      expect(row.ends[0]).toBe('prism');
      expect(Math.abs(row.within[0]! - lo)).toBeLessThan(1e-6);
    });
  });
});
