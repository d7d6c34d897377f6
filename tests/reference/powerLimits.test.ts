/**
 * Decentration limits by power (limits.ts boundedLimit) and best forms on the command line,
 * checked against things outside the scan:
 * - the astigmatism bound's limit is where Coddington's equations (Coddington 1829; an
 *   independent method from the real-ray pencil the scan uses) give that astigmatic error;
 * - a plane-parallel plate has no power error anywhere (Snell's law at parallel planes), so a
 *   power bound never ends its scan;
 * - the point-focal form of a +4.00 D CR39 lens (Jalie, The Indian Optician, Nov-Dec 2021,
 *   p. 104: "in the region of +9.62 D"), and the absence of any spherical point-focal form for
 *   strong plus lenses (Tscherning's ellipse: no real root above about +7.5 D for distance,
 *   from memory of its usual plot).
 */
import { describe, expect, test } from 'vitest';
import { Lens, LineTrace, MeridionalPower, PencilPower, Placement, boundedLimit, coddington, decentrationLimit, lineOfSight, pencilPower, pencilSetup } from '../../src/optics/index.ts';
import { run } from '../../src/cli/main.ts';

function coddingtonAstigmatism(lens: Lens, crMm: number, dMm: number): number {
  const pl = new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm: crMm, pantoDeg: 0, wrapDeg: 0, eye: 'R' });
  const t = new LineTrace();
  t.sx = 0; t.sy = 0; t.sz = -crMm; t.bx = dMm; t.by = 0;
  expect(lineOfSight(lens, t)).toBe(0);
  const setup = pencilSetup(lens, pl, null);
  const p = new PencilPower();
  pencilPower(lens, t, setup, p);
  const m = new MeridionalPower();
  expect(coddington(lens, t, setup, p, m)).toBe(true);
  // astigmatic error of a spherical prescription: |T - S| (the prescription has no cylinder)
  return Math.abs(m.tangential - m.sagittal);
}

describe('decentration limits by power', () => {
  const lens = new Lens({ sphereD: -8, cylD: 0, axisDeg: 0, index: 1.6, frontD: 2, ctMm: 1.5, diameterMm: 70 });

  test('the astigmatism limit is where Coddington gives the bound (0.25 D), to 1e-6 D', () => {
    const r = boundedLimit(lens, 27, 0, { maxAstigmatism: 0.25 });
    expect(r.endedBy).toBe('astigmatism');
    expect(Math.abs(coddingtonAstigmatism(lens, 27, r.mm!) - 0.25)).toBeLessThan(1e-6);
  });

  test('with several bounds the smallest limit wins and is named; the prism bound agrees with decentrationLimit', () => {
    const all = boundedLimit(lens, 27, 0, { maxPrism: 6, maxMeanError: 0.25, maxAstigmatism: 0.25 });
    const each = Object.fromEntries(all.each.map((e) => [e.bound, e.limit.mm]));
    expect(all.mm).toBe(Math.min(...Object.values(each).map((v) => v ?? Infinity)));
    expect(each.prism).toBe(decentrationLimit(lens, 27, 0, 6).exactMm);
    expect(all.endedBy).toBe(Object.entries(each).find(([, v]) => v === all.mm)![0]);
  });

  test('a plane-parallel plate: no power bound is ever reached (Snell at parallel planes)', () => {
    const plate = new Lens({ sphereD: 0, cylD: 0, axisDeg: 0, index: 1.5, frontD: 0, ctMm: 2, diameterMm: 60 });
    const r = boundedLimit(plate, 27, 45, { maxMeanError: 0.01, maxAstigmatism: 0.01 });
    expect(r.mm).toBeNull();
    expect(r.endedBy).toBeNull();
    expect(r.end).toBe('edge');
  });
});

describe('decentra form', () => {
  test('+4.00 D in CR39 (n 1.498), 4.5 mm, 30°: point-focal for distance near +9.62 D (Jalie 2021)', () => {
    const r = run(['form', '--sphere', '4', '--index', '1.498', '--ct', '4.5', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(Math.abs(j.distance.pointFocal[0] - 9.62)).toBeLessThan(0.1);
  });

  test('+10.00 D: no spherical point-focal form for distance (Tscherning\'s ellipse ends near +7.5 D; from memory)', () => {
    const r = run(['form', '--sphere', '10', '--index', '1.5', '--ct', '9', '--json']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out).distance.pointFocal).toEqual([]);
    expect(run(['form', '--sphere', '10', '--index', '1.5', '--ct', '9']).out).toContain('none in 0 to +25 D');
  });

  test('bad input is refused with one line naming the flag', () => {
    for (const [args, flag] of [[['--rotation', '0'], '--rotation'], [['--near', '50'], '--near'], [['--cyl', '-1'], '--cyl']] as const) {
      const r = run(['form', '--sphere', '2', '--ct', '3', ...args]);
      expect(r.code).toBe(2);
      expect(r.err).toContain(flag);
      expect(r.err).not.toContain('\n');
    }
  });
});
