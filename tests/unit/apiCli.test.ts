/**
 * The library's checks are the command's checks (src/api/core.ts, src/cli/api.ts): the same
 * functions refuse a value in both, named as each caller knows it (lens.ct / --ct), and the
 * API's placement, mark, tilt drop and power answers that `decentra trace` and `decentra near`
 * print. Expected values come from Prentice's rule, the definitions of the mark and of back
 * vertex power, and the tilt-drop rule of thumb; each check names its source.
 */
import { describe, expect, it } from 'vitest';
import * as lib from '../../src/api/index.ts';
import { FLAGS, api, flagOfPath } from '../../src/cli/api.ts';
import { run } from '../../src/cli/main.ts';

function refusal(f: () => unknown): InstanceType<typeof lib.DecentraError> {
  try {
    f();
  } catch (e) {
    if (e instanceof lib.DecentraError) return e;
    throw e;
  }
  throw new Error('no error');
}

describe('one check, two names', () => {
  it('a bad value gets the same reason from the library and from the command, named lens.FIELD and --flag', () => {
    const cases: [Record<string, unknown>, string[], string, string][] = [
      [{ sphere: 2, ct: -1 }, ['--sphere', '2', '--ct', '-1'], 'lens.ct', '--ct'],
      [{ sphere: 2, index: 0.9 }, ['--sphere', '2', '--index', '0.9'], 'lens.index', '--index'],
      [{ sphere: 2, frontK: 99 }, ['--sphere', '2', '--front-k', '99'], 'lens.frontK', '--front-k'],
      [{ sphere: 2, minCt: 0 }, ['--sphere', '2', '--min-ct', '0'], 'lens.minCt', '--min-ct'],
    ];
    for (const [options, argv, argument, flag] of cases) {
      const e = refusal(() => lib.buildLens(options as unknown as lib.LensOptions));
      expect(e.argument).toBe(argument);
      const r = run(['trace', ...argv]);
      expect(r.code).toBe(2);
      expect(r.err).toBe(`decentra trace: ${flag}: ${e.reason}`);
    }
  });

  it('a reason that names other fields names them as the caller does (give either --ct or the thickness rule)', () => {
    expect(refusal(() => lib.buildLens({ sphere: 2, ct: 3, minEdge: 1 })).message)
      .toBe('lens.ct: give either lens.ct or the thickness rule (lens.minEdge, lens.minCt), not both');
    expect(run(['trace', '--sphere', '2', '--ct', '3', '--min-edge', '1']).err)
      .toBe('decentra trace: --ct: give either --ct or the thickness rule (--min-edge, --min-ct), not both');
  });

  it('the command passes text with units, the library numbers only', () => {
    // 0.25 cm = 2.5 mm (SI prefixes)
    expect(api.buildLens(FLAGS, { sphere: '2', ct: '0.25cm' }).ct).toBe(2.5);
    expect(refusal(() => lib.buildLens({ sphere: 2, ct: '0.25cm' } as unknown as lib.LensOptions)).message).toBe('lens.ct: must be a number, got string');
  });

  it('API paths become flags', () => {
    expect(flagOfPath('lens.frontK')).toBe('--front-k');
    expect(flagOfPath('point.x')).toBe('--x');
    expect(flagOfPath('options.tiltDrop')).toBe('--tilt-drop');
    expect(flagOfPath('options.at.z')).toBe('--at');
    expect(flagOfPath('options.ocY')).toBe('--oc-y');
  });
});

describe('placement, mark, tilt drop and power through the library', () => {
  const minus = lib.buildLens({ sphere: -9.5 });

  it("the mark of an untilted lens is where the eye's straight-ahead line crosses it: the optical centre 3 mm away the other way (definition)", () => {
    const a = lib.prismAt(minus, { x: 0, y: 0, from: 'mark', ocX: 3 });
    expect(a.mark).toEqual({ x: -3, y: 0 });
    expect(a.point).toEqual({ x: -3, y: 0 });
    // Prentice 1890: P = c F = 0.3 cm x 9.50 D = 2.85 Δ; a minus lens acts as prisms base
    // towards its edge, so 3 mm temporal of the centre is base out for the right eye (common practice, no source)
    expect(a.prentice.horizontal.amount).toBeCloseTo(2.85, 12);
    expect(a.prentice.horizontal.base).toBe('out');
    // the same point given from the optical centre is the same answer (the definition of the mark)
    expect(lib.prismAt(minus, { x: -3, y: 0, ocX: 3 }).exact).toEqual(a.exact);
  });

  it('a point moved beyond the lens from the mark is refused, naming the offset that moved it', () => {
    const e = refusal(() => lib.prismAt(lib.buildLens({ sphere: 2, ct: 3, diameter: 50 }), { x: -20, y: 1, from: 'mark', ocX: 10 }));
    expect(e.argument).toBe('point.x');
    expect(e.reason).toMatch(/^moves the visual point to \(-30\.00, 1\.00\) mm from the optical centre, outside the 50\.00 mm lens$/);
  });

  it("the rule of thumb lowers the optical centre 1 mm per 2° of pantoscopic tilt (common practice, no source)", () => {
    const n = lib.near(minus, { at: { x: 0, y: -40, z: 400 }, panto: 10, tiltDrop: 'rule-of-thumb' });
    expect(n.placed.tiltDrop).toBe(5);
    expect(n.placed.ocY).toBe(-5);
    expect(refusal(() => lib.near(minus, { at: { x: 0, y: 0, z: 400 }, tiltDrop: 'sideways' as 'none' })).argument).toBe('options.tiltDrop');
  });

  it('through the optical centre, along the axis, the eye gets the back vertex power (its definition; distant target)', () => {
    const a = lib.prismAt(lib.buildLens({ sphere: 8, index: 1.5, ct: 8, diameter: 50 }), { x: 0, y: 0 });
    expect('failure' in a.power).toBe(false);
    if ('failure' in a.power) return;
    expect(a.power.sphere).toBeCloseTo(8, 5);
    expect(a.power.cyl).toBeCloseTo(0, 9);
    expect(a.power.demand).toBe(0);
  });
});

describe('ranges from LIMITS, one place', () => {
  it('the centre-of-rotation tilt drop is s·tan(tilt), which puts the centre of rotation on the optical axis (geometry)', () => {
    const n = lib.near(lib.buildLens({ sphere: 2 }), { at: { x: 0, y: -40, z: 400 }, panto: 10, cr: 27, tiltDrop: 'centre-of-rotation' });
    expect(n.placed.tiltDrop).toBeCloseTo(27 * Math.tan((10 * Math.PI) / 180), 12);
  });

  it('a PD outside 20-45 mm (LIMITS.pd) is refused by the library and by decentra import with the same reason', () => {
    const text = JSON.stringify({ resourceType: 'VisionPrescription' });
    const e = refusal(() => lib.importFhir(text, { pd: { right: 50, left: 32 } }));
    expect(e.argument).toBe('options.pd.right');
    expect(e.reason).toBe('must be between 20 and 45 mm, got 50');
  });

  it('a prism tolerance of 0 or above 50 Δ (LIMITS.maxPrism) is refused by limits()', () => {
    const lens = lib.buildLens({ sphere: 4 });
    expect(refusal(() => lib.limits(lens, { maxPrism: 0, direction: 'nasal' })).reason).toBe('must be greater than 0 and at most 50 Δ, got 0');
    expect(refusal(() => lib.limits(lens, { maxPrism: 51, direction: 'up' })).argument).toBe('options.maxPrism');
    expect(run(['limits', '--sphere', '4', '--max-prism', '51']).err).toBe('decentra limits: --max-prism: must be greater than 0 and at most 50 Δ, got 51');
  });
});
