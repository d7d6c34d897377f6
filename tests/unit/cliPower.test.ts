/**
 * The power beside the prism on the command line (docs/cli.md): `trace`, `near` and `fit`
 * carry a `power` object inside each exact answer, `limits` takes power bounds. Expected
 * values come from outside the engine: on the optical axis the vergence is the back vertex
 * power (its definition); a near target's demand is the vergence of a point at its distance
 * (-1/d, the definition of vergence).
 */
import { describe, expect, it } from 'vitest';
import { run } from '../../src/cli/main.ts';

const json = (args: string[]): any => {
  const r = run(args);
  expect(r.err).toBeUndefined();
  expect(r.code).toBe(0);
  return JSON.parse(r.out);
};

describe('trace and near carry the power inside the exact answer', () => {
  it('through the optical centre the vergence is the prescription (back vertex power), toric too', () => {
    const p = json(['trace', '--sphere', '-3.5', '--cyl', '-1.25', '--axis', '30', '--json']).exact.power;
    // the prescription's minus-cylinder form: -3.50 / -1.25 x 30
    expect(p.sphere).toBeCloseTo(-3.5, 6);
    expect(p.cyl).toBeCloseTo(-1.25, 6);
    expect(p.axis).toBeCloseTo(30, 4);
    expect(Math.abs(p.meanError)).toBeLessThan(1e-6);
    expect(p.astigmaticError).toBeLessThan(1e-6);
    expect(p.demand).toBe(0);
    // a toric is not a lens of revolution: no Coddington values
    expect(p.tangential).toBeUndefined();
  });

  it('off the centre of a spherical lens: tangential and sagittal, and the text names the question', () => {
    const p = json(['trace', '--sphere', '6', '--x', '10', '--json']).exact.power;
    expect(typeof p.tangential).toBe('number');
    expect(typeof p.sagittal).toBe('number');
    expect(p.matrix).toHaveLength(2);
    const text = run(['trace', '--sphere', '6', '--x', '10']).out;
    expect(text).toContain('What power the eye gets here');
    expect(text).toMatch(/mean error [+-]?\d+\.\d\d D, astigmatic error \d+\.\d\d D/);
  });

  it('near: the demand is the vergence of the target at its distance from the vertex sphere', () => {
    const j = json(['near', '--sphere', '-2', '--at', '0,0,427', '--json']);
    // straight ahead: the vertex sphere point is the back vertex, 27 mm from the CR: d = 400 mm
    expect(j.exact.power.demand).toBeCloseTo(-1000 / 400, 6);
    // On the axis the pencil's vergence is the paraxial step-along result for a thick lens
    // (vergences stepped surface to surface, e.g. Keating, Geometric, Physical and Visual
    // Optics; from memory): not simply the back vertex power plus the target's vergence.
    const { front: f1, ct, index: n } = j.input;
    const t = ct / 1000;
    const backD = -2 - f1 / (1 - (t / n) * f1); // the back surface that gives the ordered back vertex power
    const l1 = f1 - 1000 / (400 - ct); // the target's vergence at the front vertex, plus F1
    const out = l1 / (1 - (t / n) * l1) + backD;
    expect(j.exact.power.sphere).toBeCloseTo(out, 6);
    expect(j.exact.power.meanError).toBeCloseTo(out - (-2 - 2.5), 6);
    // so a thick lens at near departs from "ordered power plus the target's vergence" (near effectivity)
    expect(Math.abs(j.exact.power.meanError)).toBeGreaterThan(0.01);
  });
});

describe('fit gives the power per eye at the marks and at the eyes', () => {
  it('keys in --json, and a line in the text', () => {
    const args = ['fit', '--right-sphere', '-4', '--left-sphere', '-4.5', '--pd', '32,32'];
    const j = json([...args, '--json']);
    for (const side of ['right', 'left']) {
      expect(j[side].exact.power.meanError).toEqual(expect.any(Number));
      expect(j.marks[side].exact.power.astigmaticError).toEqual(expect.any(Number));
    }
    expect(run(args).out).toContain('power there');
  });
});

describe('limits by power', () => {
  it('one lens: each bound, the combined limit and the bound that ended it', () => {
    const j = json(['limits', '--sphere', '-8', '--ct', '1.5', '--diameter', '70', '--max-prism', '6', '--max-astigmatism', '0.25', '--json']);
    expect(j.power.boundedBy).toBe('prism');
    expect(j.power.bounded).toBe(j.exact);
    expect(j.power.astigmatismLimit).toBeGreaterThan(j.exact);
    const alone = json(['limits', '--sphere', '-8', '--ct', '1.5', '--diameter', '70', '--max-astigmatism', '0.25', '--json']);
    expect(alone.power.boundedBy).toBe('astigmatism');
    expect(alone.power.bounded).toBe(j.power.astigmatismLimit);
  });

  it('bad bounds and a range without a prism tolerance are refused with one line', () => {
    for (const args of [
      ['limits', '--sphere', '-4', '--max-astigmatism', '-1'],
      ['limits', '--sphere', '-4', '--max-mean-error', 'x'],
      ['limits', '--power', '-4,-2', '--max-astigmatism', '0.5'],
    ]) {
      const r = run(args);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(/--max-(astigmatism|mean-error|prism)/);
      expect(r.err).not.toContain('\n');
    }
  });
});
