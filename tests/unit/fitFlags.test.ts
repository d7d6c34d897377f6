// `decentra fit` without a file (docs/cli.md, "Quick fit without a file"): the flags make the
// same case as a case file with the same fields (docs/case-file.md), and every refusal names
// the flag the value came from.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { run } from '../../src/cli/main.ts';

function fit(args: string[]): { out: string; err?: string; code: number } {
  return run(['fit', ...args]);
}

function ok(args: string[]): string {
  const r = fit(args);
  expect(r.err).toBeUndefined();
  expect(r.code).toBe(0);
  return r.out;
}

function refused(args: string[]): string {
  const r = fit(args);
  expect(r.code).not.toBe(0);
  expect(r.err).toBeDefined();
  expect(r.err!.split('\n').filter(Boolean)).toHaveLength(1);
  return r.err!;
}

const example = (name: string) => JSON.parse(readFileSync(`examples/${name}.json`, 'utf8'));

describe('fit flags make the case a file with the same fields makes', () => {
  it('the bundled invented scenario examples/wide-frame-minus.json, as flags', () => {
    const file = example('wide-frame-minus');
    const flags = [
      '--title', file.title, '--frame', '52,40,18', '--tolerance', 'ansi-z80.1', '--target', 'distance',
      '--right-sphere', '-9.5', '--left-sphere', '-9.50', '--material', 'resin-1.67', '--right-front', '1.5', '--left-front', '1.5',
      '--right-ct', '1.5', '--left-ct', '1.5', '--pd', '32,32', '--decentration', '0', '--fitting-height', '20',
    ];
    const { note: _note, ...withoutNote } = file;
    expect(JSON.parse(ok([...flags, '--print-case']))).toEqual(withoutNote);
    // and the answers are the file's answers
    expect(ok([...flags, '--json'])).toBe(ok(['examples/wide-frame-minus.json', '--json']));
  });

  it('the bundled invented scenario examples/anisometropic-reader.json: a reading level and OCs given directly', () => {
    const file = example('anisometropic-reader');
    const flags = [
      '--title', file.title, '--target', 'level:10,0', '--right-sphere', '+1.00', '--left-sphere', '4.5',
      '--material', 'resin-1.60', '--right-ct', '2.5', '--left-ct', '5', '--right-pd', '32', '--left-pd', '32',
      '--right-oc', '0,0', '--left-oc', '0,0', '--tolerance', 'ansi-z80.1',
    ];
    expect(ok([...flags, '--json'])).toBe(ok(['examples/anisometropic-reader.json', '--json']));
  });

  it("a reading level 10 mm below: Prentice's rule P = cF gives 2.00 Δ base down for -2.00 D", () => {
    // Prentice's rule, P = c F with c in cm (C. F. Prentice, 1890, Archives of Ophthalmology,
    // restated in M. Jalie, "The Principles of Ophthalmic Lenses"; from memory): 1.0 cm × 2.00 D = 2.00 Δ, and a
    // minus lens seen below its optical centre is base down (thicker edge below).
    const j = JSON.parse(ok(['--right-sphere', '-2', '--left-sphere', '-2', '--pd', '32,32', '--target', 'level:10', '--json']));
    expect(j.right.prentice.vertical.amount).toBeCloseTo(2, 12);
    expect(j.right.prentice.vertical.base).toBe('down');
    expect(j.target).toEqual({ kind: 'level', below: 10 });
  });

  it('a pair flag gives each eye its own value (R,L), or one value to both', () => {
    const doc = JSON.parse(ok(['--right-sphere', '1', '--left-sphere', '1', '--pd', '31,32.5', '--frame', '50,36,19',
      '--fitting-height', '18,19', '--decentration', '2', '--right-prism', '1:in,0.5:up', '--target', 'near:400,120,3', '--print-case']));
    expect(doc.right).toMatchObject({ pd: 31, fittingHeight: 18, decentration: 2, prism: [{ amount: 1, base: 'in' }, { amount: 0.5, base: 'up' }] });
    expect(doc.left).toMatchObject({ pd: 32.5, fittingHeight: 19, decentration: 2 });
    expect(doc.target).toEqual({ kind: 'near', distance: 400, below: 120, lateral: 3 });
  });
});

describe('refusals name the flag and say why, on one line', () => {
  const base = ['--right-sphere', '-2', '--left-sphere', '-1', '--pd', '32,32'];
  const cases: [string, string[], RegExp][] = [
    ['a binocular PD in --pd', ['--right-sphere', '-2', '--left-sphere', '-1', '--pd', '64'], /--pd: must be R,L.*a binocular PD of 64 is 32,32/],
    ['a non-numeric sphere', ['--right-sphere', 'abc', '--left-sphere', '-1', '--pd', '32,32'], /--right-sphere: must be a number in dioptres, got 'abc'/],
    ['a missing eye', ['--right-sphere', '-2', '--pd', '32,32'], /--left-sphere: is required/],
    ['an axis outside 0-180', [...base, '--right-cyl', '-1', '--right-axis', '181'], /--right-axis: must be between 0 and 180/],
    ['a PD out of range, from the pair flag', ['--right-sphere', '-2', '--left-sphere', '-1', '--pd', '32,-5'], /--pd \(left\): must be between/],
    ['decentration without a frame', [...base, '--decentration', '2'], /--frame: is required/],
    ['a short frame', [...base, '--frame', '50,36'], /--frame: must be A,B,DBL/],
    ['an unknown target', [...base, '--target', 'far'], /--target: must be distance, near:DIST,BELOW or level:BELOW,INSET, got 'far'/],
    ['an unknown prism base', [...base, '--right-prism', '2:sideways'], /--right-prism: base must be in, out, up or down, got 'sideways'/],
    ['an unknown tolerance', [...base, '--tolerance', 'strict'], /--tolerance: must be ansi-z80.1, iso-21987 or custom:H,V/],
    ['both a pair flag and an eye flag', [...base, '--right-pd', '31'], /--pd: and --right-pd both give the right eye's value/],
    ['a zero centre thickness', [...base, '--right-ct', '0'], /--right-ct: must be greater than 0/],
    ['a file and flags together', ['examples/wide-frame-minus.json', ...base], /give a case file or the case as flags, not both/],
    ['neither a file nor flags', [], /give exactly one case file, or the case as flags/],
  ];
  for (const [what, args, why] of cases) {
    it(what, () => {
      expect(refused(args)).toMatch(why);
    });
  }

  it('fit --help documents the flags', () => {
    const help = ok(['--help']);
    for (const f of ['--right-sphere', '--left-sphere', '--pd R,L', '--frame A,B,DBL', '--decentration', '--fitting-height', '--target distance', 'level:BELOW', '--print-case']) {
      expect(help).toContain(f);
    }
  });
});
