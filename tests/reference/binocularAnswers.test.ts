// The three binocular answers (docs/binocular.md): at the marks, the standard's verdict, what
// the eyes do at the target. Each check names where its expected value comes from; values the
// engine computes are compared with independent arithmetic or with the engine's lower-level
// traces at points this file chooses itself, never with a hand value passed into the code.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { type BinocularCase, readCase } from '../../src/case/caseFile.ts';
import { evaluateFit } from '../../src/case/fit.ts';
import {
  LineTrace, Placement, RayStatus, binocularDemand, centrationPoint, describePrism, findProfile, fourAnswersPlaced,
  horizontalGuidance, isFailure, makeLens, prescribedComponents, slabOff, tiltDropMm, traceFocimeter, verticalGuidance,
} from '../../src/optics/index.ts';

type Doc = Record<string, unknown>;
const doc = (over: Doc, right: Doc, left: Doc): BinocularCase =>
  readCase({ format: 'decentra-case', version: 2, target: { kind: 'distance' }, tolerance: { profile: 'ansi-z80.1' }, ...over, right, left });

/** The bundled wide-frame example: -9.50 D both eyes in 1.67 resin, optical centres 3 mm temporal of each pupil. */
const wideFrame = (target: Doc = { kind: 'distance' }) => doc(
  { frame: { a: 52, b: 40, dbl: 18 }, target },
  { sphere: -9.5, material: 'resin-1.67', front: 1.5, ct: 1.5, pd: 32, decentration: 0, fittingHeight: 20 },
  { sphere: -9.5, material: 'resin-1.67', front: 1.5, ct: 1.5, pd: 32, decentration: 0, fittingHeight: 20 },
);

/** An exact focimeter reading at a lens point, straight from the trace (no answers layer). */
function focimeterAt(lens: ReturnType<typeof makeLens>, x: number, y: number): { x: number; y: number } {
  const t = new LineTrace();
  expect(traceFocimeter(lens, x, y, t)).toBe(RayStatus.ok);
  return { x: t.px, y: t.py };
}

describe('at the marks: the wide-frame case (-9.50 D, centres 3 mm outside each pupil)', () => {
  const c = wideFrame();
  const f = evaluateFit(c);
  it('Prentice with the nominal decentration: 3 mm x 9.50 D = 2.85 Δ base in per eye, 5.70 Δ in all (Prentice 1890, arithmetic)', () => {
    for (const side of ['right', 'left'] as const) {
      const m = f.marks[side];
      // boxing: frame PD 52 + 18 = 70 mm, PD 64 mm, so each centre sits 3 mm temporal of its pupil (ISO 8624 arithmetic)
      expect(Math.abs(m.point!.x)).toBeCloseTo(3, 12);
      expect(m.answers!.prentice.horizontal.amount).toBeCloseTo(0.3 * 9.5, 12);
      expect(m.answers!.prentice.horizontal.base).toBe('in');
    }
    expect(f.marks.net.prentice!.netHorizontal).toBeCloseTo(2 * 0.3 * 9.5, 12);
    expect(f.marks.net.prentice!.verticalImbalance).toBeCloseTo(0, 12);
  });
  it('the focimeter and exact values at the marks are the traces at x = 3 mm from the optical centre', () => {
    const lens = f.lenses.right;
    const foc = focimeterAt(lens, 3, 0); // right eye: the pupil is 3 mm nasal (+x) of the optical centre
    const m = f.marks.right.answers!;
    expect(isFailure(m.focimeter)).toBe(false);
    expect((m.focimeter as { x: number }).x).toBeCloseTo(foc.x, 12);
    // a focimeter at the marks reads about 2.84 Δ (issue's bench value; here the exact trace)
    expect(Math.abs(foc.x)).toBeGreaterThan(2.83);
    expect(Math.abs(foc.x)).toBeLessThan(2.85);
    const pl = new Placement({ ocXMm: -3, ocYMm: 0, crDistanceMm: 27, pantoDeg: 0, wrapDeg: 0, eye: 'R' });
    const answers = fourAnswersPlaced(lens, pl, 3, 0, 'R');
    expect((m.exact as { x: number }).x).toBeCloseTo((answers.exact as { x: number }).x, 12);
  });
  it('at the eyes the visual points move towards the optical centres, so the exact values are smaller (docs/method.md)', () => {
    // a minus lens bends the line of sight away from its centre less than the straight line: the
    // eye turns outwards (base-in prism) and meets the lens nearer the optical centre
    for (const side of ['right', 'left'] as const) {
      const e = f.result[side];
      expect(Math.abs(e.fromOcMm.x)).toBeLessThan(3);
      const atEye = (e.answers!.exact as { horizontal: { amount: number } }).horizontal.amount;
      const atMark = (f.marks[side].answers!.exact as { horizontal: { amount: number } }).horizontal.amount;
      expect(atEye).toBeLessThan(atMark);
    }
    expect(f.result.exact!.netHorizontal).toBeLessThan(f.marks.net.exact!.netHorizontal);
  });
  it('the standard judges centring in mm above 2.75 D: 6 mm of 2.5 mm is outside (ANSI Z80.1-2015 horizontal row)', () => {
    const [h, v] = f.standard.verdicts!;
    expect(h).toMatchObject({ rule: 'mm', pass: false, limit: 2.5, thresholdD: 2.75 });
    expect(h!.value).toBeCloseTo(6, 9);
    expect(v).toMatchObject({ rule: 'mm', pass: true });
  });
  it('base in at distance asks the eyes to diverge (prism displaces images towards its apex; common practice, no source)', () => {
    expect(f.demand!.horizontal).toMatchObject({ base: 'in', asks: 'diverge' });
    expect(f.demand!.horizontal.amount).toBeCloseTo(f.result.exact!.netHorizontal, 12);
  });
});

describe('the standard judges the marks only', () => {
  const centred = (target: Doc, rs: number, ls: number) => doc({ target },
    { sphere: rs, material: 'resin-1.50', ct: 3, pd: 32 }, { sphere: ls, material: 'resin-1.50', ct: 4, pd: 32 });
  it('perfectly centred lenses R +0.50 / L +2.50 are within at distance, at a near point and at a reading level', () => {
    // the counter-example: at a near target 400 mm ahead, 150 mm below, the eyes meet
    // 0.95 Δ and 2.77 Δ there, yet the lenses were made and centred perfectly
    for (const t of [{ kind: 'distance' }, { kind: 'near', distance: 400, below: 150 }, { kind: 'level', below: 10 }]) {
      const f = evaluateFit(centred(t, 0.5, 2.5));
      expect(f.standard.verdicts!.every((v) => v.pass)).toBe(true);
      expect(f.standard.verdicts!.map((v) => v.value)).toEqual([0, 0]);
    }
    const near = evaluateFit(centred({ kind: 'near', distance: 400, below: 150 }, 0.5, 2.5));
    expect(Math.abs(near.result.exact!.verticalImbalance)).toBeGreaterThan(0.33); // what the eyes meet is not judged
  });
  it('property: centred lenses of any low power are within the standard at any target', () => {
    fc.assert(fc.property(
      fc.double({ min: -2.5, max: 2.5, noNaN: true }), fc.double({ min: -2.5, max: 2.5, noNaN: true }),
      fc.double({ min: 250, max: 2000, noNaN: true }), fc.double({ min: -100, max: 200, noNaN: true }),
      (rs, ls, dist, below) => {
        const f = evaluateFit(centred({ kind: 'near', distance: dist, below }, rs, ls));
        expect(f.standard.verdicts!.every((v) => v.pass && v.value === 0)).toBe(true);
      },
    ), { numRuns: 25 });
  });

  // the ANSI Z80.1-2015 rows: 0.67 Δ horizontal (total) up to 2.75 D, 0.33 Δ vertical up to 3.375 D
  const lowPower = (dxMm: number, dyMm: number, target: Doc = { kind: 'distance' }) => doc({ target },
    { sphere: 2, material: 'resin-1.50', ct: 3, pd: 32, oc: { x: -dxMm, y: dyMm } },
    { sphere: 2, material: 'resin-1.50', ct: 3, pd: 32, oc: { x: dxMm, y: 0 } });
  // the decentration at the limit is found below by bisection on the plain focimeter trace at
  // the marks (independent of the engine's marks and verdict code)
  it.each([
    ['horizontal', 0.67],
    ['vertical', 0.33],
  ] as const)('the %s prism row at its limit passes and 0.01 mm past it fails, whatever the target', (component, limit) => {
    const value = (d: number) => {
      const f = evaluateFit(component === 'horizontal' ? lowPower(d, 0) : lowPower(0, d));
      const lens = f.lenses.right;
      // independent reading: the focimeter trace at each mark (right pupil at +d nasal of its centre)
      const r = component === 'horizontal' ? focimeterAt(lens, d, 0) : focimeterAt(lens, 0, -d);
      const l = component === 'horizontal' ? focimeterAt(f.lenses.left, -d, 0) : { x: 0, y: 0 };
      return component === 'horizontal' ? Math.abs(r.x - l.x) : Math.abs(r.y - l.y);
    };
    let lo = 0, hi = 5;
    for (let i = 0; i < 80; i++) { const mid = (lo + hi) / 2; if (value(mid) <= limit) lo = mid; else hi = mid; }
    const at = lo;
    for (const target of [{ kind: 'distance' }, { kind: 'near', distance: 400, below: 120 }, { kind: 'level', below: 10, inset: 2 }]) {
      const idx = component === 'horizontal' ? 0 : 1;
      const inside = evaluateFit(component === 'horizontal' ? lowPower(at, 0, target) : lowPower(0, at, target)).standard.verdicts![idx]!;
      expect(inside.rule).toBe('prism');
      expect(inside.value).toBeCloseTo(value(at), 12);
      expect(inside.pass).toBe(true);
      const past = evaluateFit(component === 'horizontal' ? lowPower(at + 0.01, 0, target) : lowPower(0, at + 0.01, target)).standard.verdicts![idx]!;
      expect(past.pass).toBe(false);
    }
  });
  it('the mm rows at and just past 2.5 mm and 1.0 mm (ANSI Z80.1-2015, powers above 2.75 D and 3.375 D)', () => {
    const high = (dx: number, dy: number) => doc({},
      { sphere: -6, material: 'resin-1.60', ct: 1.8, pd: 32, oc: { x: -dx / 2, y: dy } },
      { sphere: -6, material: 'resin-1.60', ct: 1.8, pd: 32, oc: { x: dx / 2, y: 0 } });
    const v = (dx: number, dy: number) => evaluateFit(high(dx, dy)).standard.verdicts!;
    expect(v(2.5, 0)[0]).toMatchObject({ rule: 'mm', pass: true });
    expect(v(2.5, 0)[0]!.value).toBeCloseTo(2.5, 9);
    expect(v(2.51, 0)[0]!.pass).toBe(false);
    expect(v(0, 1)[1]).toMatchObject({ rule: 'mm', pass: true });
    expect(v(0, 1.01)[1]!.pass).toBe(false);
  });
  it('the verdict text names the rule and its threshold, not the lens power', () => {
    const [h] = evaluateFit(wideFrame()).standard.verdicts!;
    expect(h!.thresholdD).toBe(2.75);
    expect(h!.powerD).toBeCloseTo(9.5, 9);
  });
});

describe('prescribed prism', () => {
  it('ISO 8429 360° notation of combined components (checked by hand)', () => {
    // right eye 1.5 Δ base up with 2 Δ base in = 2.5 Δ at 37°; left eye 1.5 Δ base down with 2 Δ base in = 2.5 Δ at 217°
    // hand arithmetic: √(1.5² + 2²) = 2.5, atan(1.5 / 2) = 36.87°; base in is 0° for the right eye
    // and 180° for the left in ISO 8429's notation (docs/conventions.md), so 180° + 36.87° for L
    const p = { x: 0, y: 0 };
    prescribedComponents([{ amount: 2, base: 'in' }, { amount: 1.5, base: 'up' }], 'R', p);
    const r = describePrism(p.x, p.y, 'R');
    expect(r.magnitude).toBeCloseTo(2.5, 12);
    expect(Math.round(r.baseAngle)).toBe(37);
    prescribedComponents([{ amount: 2, base: 'in' }, { amount: 1.5, base: 'down' }], 'L', p);
    const l = describePrism(p.x, p.y, 'L');
    expect(Math.round(l.baseAngle)).toBe(217);
    prescribedComponents([{ amount: 2.5, angle: 217 }], 'L', p);
    expect(describePrism(p.x, p.y, 'L').horizontal.base).toBe('in');
  });
  it('+4.00 D, 2 Δ base out each eye, centres decentred 5 mm out (Prentice: c = P / F = 2 / 4 cm): within; not decentred: outside', () => {
    const pair = (dec: number) => doc({},
      { sphere: 4, material: 'resin-1.50', ct: 4.5, pd: 32, oc: { x: -dec, y: 0 }, prism: [{ amount: 2, base: 'out' }] },
      { sphere: 4, material: 'resin-1.50', ct: 4.5, pd: 32, oc: { x: dec, y: 0 }, prism: [{ amount: 2, base: 'out' }] });
    const good = evaluateFit(pair(5));
    // Prentice's hand value at the marks equals the prescription: residual zero
    expect(good.standard.prenticeResidual!.netHorizontal).toBeCloseTo(0, 12);
    expect(good.marks.prescribedNet.netHorizontal).toBeCloseTo(-4, 12);
    // the mm rule (4 D > 2.75 D): the reference points are where the focimeter reads 2 Δ base
    // out. Found here by bisection on the plain focimeter trace along x: a thick plus lens reads
    // more than Prentice per mm there, so they lie a little inside the 5 mm marks
    const lens = good.lenses.right;
    let lo = 0, hi = 10;
    for (let i = 0; i < 80; i++) { const mid = (lo + hi) / 2; if (-focimeterAt(lens, mid, 0).x < 2) lo = mid; else hi = mid; }
    const [h] = good.standard.verdicts!;
    expect(h).toMatchObject({ rule: 'mm', pass: true });
    expect(lo).toBeLessThan(5);
    expect(h!.value).toBeCloseTo(2 * (5 - lo), 6);
    const bad = evaluateFit(pair(0));
    expect(bad.standard.verdicts![0]).toMatchObject({ rule: 'mm', pass: false });
    // about 5 mm each eye: the reference points 10 mm apart from where they should be (Prentice: 2 Δ / 4 D = 5 mm)
    expect(bad.standard.verdicts![0]!.value).toBeGreaterThan(9);
    expect(bad.standard.verdicts![0]!.value).toBeLessThan(10.5);
  });
  it('the demand at the eyes is what is left beyond the prescribed prism', () => {
    const d = binocularDemand({ netHorizontal: 1.5, verticalImbalance: -0.5 }, { netHorizontal: 1.5, verticalImbalance: 0 });
    expect(d.horizontal).toEqual({ amount: 0, base: null, asks: null });
    expect(d.vertical).toEqual({ amount: 0.5, baseUpEye: 'L' });
  });
});

describe('reading level and slab-off: R +1.00 / L +4.50, 10 mm below the distance marks', () => {
  const reader = doc({ target: { kind: 'level', below: 10, inset: 0 } },
    { sphere: 1, material: 'resin-1.60', ct: 2.5, pd: 32 }, { sphere: 4.5, material: 'resin-1.60', ct: 5, pd: 32 });
  const f = evaluateFit(reader);
  it("Prentice: 1 cm x 1.00 D and 1 cm x 4.50 D base up, 3.50 Δ imbalance, left eye base up (Prentice 1890, arithmetic)", () => {
    expect(f.result.right.fromOcMm.y).toBeCloseTo(-10, 12);
    expect(f.result.prentice!.verticalImbalance).toBeCloseTo(-3.5, 12);
    expect(f.demand!.vertical.baseUpEye).toBe('L');
  });
  it('the thick plus lenses give more prism at the eye than Prentice (thick-lens effect, docs/method.md)', () => {
    expect(Math.abs(f.result.exact!.verticalImbalance)).toBeGreaterThan(3.5);
  });
  it('slab-off: ordered in focimeter terms, never more than the focimeter imbalance, base up on the right (least plus) lens', () => {
    const o = f.slabOff.order!;
    const rf = focimeterAt(f.lenses.right, 0, -10), lf = focimeterAt(f.lenses.left, 0, -10);
    expect(o.focimeterImbalance).toBeCloseTo(Math.abs(rf.y - lf.y), 12);
    expect(o.order).toBeLessThanOrEqual(o.focimeterImbalance);
    expect(o.focimeterImbalance - o.order).toBeLessThan(0.25);
    expect(o).toMatchObject({ eye: 'R', base: 'up', basis: 'focimeter', advice: 'indicated' });
    expect(o.eyeImbalance).toBeCloseTo(Math.abs(f.result.exact!.verticalImbalance), 12);
    expect(o.remaining).toBeCloseTo(o.eyeImbalance - o.order, 12);
    expect(f.slabOff.at).toBe('level');
  });
  it('the slab-off rule: from 1.5 Δ, 0.25 Δ steps rounded down, up to about 6 Δ (common practice, no source; docs/choices.md)', () => {
    expect(slabOff(-1.35, -1.4)).toMatchObject({ advice: 'not indicated', order: 0 });
    expect(slabOff(-1.5, -1.6)).toMatchObject({ advice: 'indicated', order: 1.5, eye: 'R' });
    expect(slabOff(2.49, 2.6)).toMatchObject({ order: 2.25, eye: 'L' });
    expect(slabOff(-6.4, -7)).toMatchObject({ advice: 'beyond the usual range' });
    fc.assert(fc.property(fc.double({ min: -10, max: 10, noNaN: true }), (v) => {
      const s = slabOff(v, v * 1.1);
      expect(s.order).toBeLessThanOrEqual(Math.abs(v) + 1e-12);
    }));
  });
  it('a distance case judges slab-off at the usual reading level, 10 mm below the marks (common practice, no source)', () => {
    const dist = evaluateFit(doc({}, { sphere: 1, material: 'resin-1.60', ct: 2.5, pd: 32 }, { sphere: 4.5, material: 'resin-1.60', ct: 5, pd: 32 }));
    expect(dist.slabOff.at).toBe('default-level');
    expect(dist.slabOff.order!.order).toBe(f.slabOff.order!.order);
  });
});

describe('guidance, never a verdict', () => {
  it('vertical: about 1 Δ tolerated by many (common practice, no source); fusional amplitudes about 2.5-3 Δ (Ogle and Prangen 1953)', () => {
    expect(verticalGuidance({ amount: 0.5, baseUpEye: 'R' }).band).toBe('small');
    expect(verticalGuidance({ amount: 1.5, baseUpEye: 'R' }).band).toBe('moderate');
    expect(verticalGuidance({ amount: 3, baseUpEye: 'L' }).band).toBe('large');
    expect(verticalGuidance({ amount: 3, baseUpEye: 'L' }).words).toMatch(/left eye must turn up/);
  });
  it("horizontal: against Morgan's break values (distance base in 7 ± 3 Δ, near base out 21 ± 6 Δ; Morgan 1944)", () => {
    expect(horizontalGuidance({ amount: 3, base: 'in', asks: 'diverge' }, false).band).toBe('small');
    expect(horizontalGuidance({ amount: 5, base: 'in', asks: 'diverge' }, false).band).toBe('moderate');
    expect(horizontalGuidance({ amount: 8, base: 'in', asks: 'diverge' }, false).band).toBe('large');
    expect(horizontalGuidance({ amount: 8, base: 'out', asks: 'converge' }, true).band).toBe('small');
    for (const g of [horizontalGuidance({ amount: 8, base: 'in', asks: 'diverge' }, false), verticalGuidance({ amount: 4, baseUpEye: 'R' })]) {
      expect(g.words).not.toMatch(/\b(pass|fail|out of tolerance)\b/i);
    }
  });
});

describe('one frame for all four answers of a tilted or wrapped lens (docs/conventions.md)', () => {
  // A line of sight from the back surface's centre of curvature meets it along its normal, so
  // it is not bent there (Snell's law at normal incidence): the exact line of sight and the
  // exact focimeter trace are then the same ray, and must give the same prism in one frame.
  const lens = makeLens({ sphereD: -10, cylD: 0, axisDeg: 0, index: 1.5, frontD: 2, ctMm: 2 });
  const rBack = 1000 * (1 - 1.5) / lens.backPowers[0]; // mm, > 0: centre on the eye side
  it.each([[0, 0], [20, 0], [0, 25], [12, 18]])('tilt %d°, wrap %d°', (panto, wrap) => {
    const probe = new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm: 1, pantoDeg: panto, wrapDeg: wrap, eye: 'L' });
    const r = probe.r;
    // put the centre of rotation (the eye frame's origin) at the centre of curvature: V = rBack · R e_z
    const pl = new Placement({ ocXMm: rBack * r[2]!, ocYMm: rBack * r[5]!, crDistanceMm: rBack * r[8]!, pantoDeg: panto, wrapDeg: wrap, eye: 'L' });
    const a = fourAnswersPlaced(lens, pl, 4, -6, 'L');
    const ex = a.exact as { x: number; y: number }, fo = a.focimeter as { x: number; y: number };
    expect(isFailure(a.exact) || isFailure(a.focimeter)).toBe(false);
    expect(Math.hypot(ex.x, ex.y)).toBeGreaterThan(0.5);
    expect(fo.x).toBeCloseTo(ex.x, 9);
    expect(fo.y).toBeCloseTo(ex.y, 9);
  });
  it('the centration point of an untilted lens is the pupil in front of the optical centre; the tilt drop puts the CR on the axis', () => {
    const pl = new Placement({ ocXMm: 2, ocYMm: -1, crDistanceMm: 27, pantoDeg: 0, wrapDeg: 0, eye: 'R' });
    expect(centrationPoint(lens, pl)!.lens).toEqual({ x: -2, y: 1 });
    // geometry: an axis through the back vertex at height -s·tan θ, tilted by θ, meets the CR
    const drop = tiltDropMm('centre-of-rotation', 10, 27);
    const tilted = new Placement({ ocXMm: 0, ocYMm: -drop, crDistanceMm: 27, pantoDeg: 10, wrapDeg: 0, eye: 'R' });
    expect(Math.hypot(tilted.crLensX, tilted.crLensY)).toBeLessThan(1e-12);
    expect(tiltDropMm('rule-of-thumb', 10, 27)).toBe(5); // 1 mm per 2° (common practice, no source)
  });
});

describe('tolerance profile rows are the published ones', () => {
  it('ANSI Z80.1-2015 thresholds 2.75 D and 3.375 D', () => {
    const p = findProfile('ansi-z80.1')!;
    expect([p.horizontal.powerThresholdD, p.vertical.powerThresholdD]).toEqual([2.75, 3.375]);
  });
});
