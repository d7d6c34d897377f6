// The decentra command line: the contract of docs/cli.md (flags, JSON shape, failures, errors).
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { run } from '../../src/cli/main.ts';
import { fourAnswers, makeLens } from '../../src/optics/index.ts';

const CONTRACT = ['--sphere', '8', '--cyl', '0', '--axis', '0', '--index', '1.5', '--front', '12', '--ct', '7', '--x', '10', '--y', '0', '--cr', '27', '--eye', 'R', '--json'];

function traceJson(args: string[]): any {
  const r = run(['trace', ...args]);
  expect(r.err).toBeUndefined();
  expect(r.code).toBe(0);
  return JSON.parse(r.out);
}

describe('decentra trace --json (docs/cli.md)', () => {
  it('prints one object with exactly the contract keys', () => {
    const j = traceJson(CONTRACT);
    expect(Object.keys(j).sort()).toEqual(['error', 'exact', 'eye', 'focimeter', 'input', 'paraxial', 'prentice']);
    for (const k of ['prentice', 'paraxial', 'exact', 'focimeter']) {
      // the exact answer also carries the power the eye gets there (docs/cli.md)
      const power = k === 'exact' ? ['power'] : [];
      expect(Object.keys(j[k]).sort()).toEqual(['baseAngle', 'horizontal', 'magnitude', ...power, 'vertical', 'x', 'y']);
      expect(j[k].baseAngle).toBeGreaterThanOrEqual(0);
      expect(j[k].baseAngle).toBeLessThan(360);
    }
    expect(Object.keys(j.error).sort()).toEqual(['percent', 'prism']);
  });

  it('gives the engine values for the same lens (the CLI computes nothing itself)', () => {
    const j = traceJson(CONTRACT);
    const r = fourAnswers(makeLens({ sphereD: 8, cylD: 0, axisDeg: 0, index: 1.5, frontD: 12, ctMm: 7 }), 27, 10, 0, 'R');
    expect(j.exact.x).toBe((r.exact as any).x);
    expect(j.focimeter.x).toBe((r.focimeter as any).x);
    expect(j.paraxial.x).toBe(r.paraxial.x);
  });

  it('Prentice on the design example: +8.00 D, 10 mm towards the wearer\'s left of the OC, right eye = 8 Δ base out', () => {
    // docs/conventions.md (prism signs): p = -F c, c = +1 cm along x (nasal for the right eye) -> px = -8: base out
    const j = traceJson(CONTRACT);
    expect(j.prentice.x).toBeCloseTo(-8, 12);
    expect(j.prentice.horizontal).toEqual({ amount: 8, base: 'out' });
    expect(j.prentice.vertical).toEqual({ amount: 0, base: null });
    expect(j.prentice.baseAngle).toBe(180);
  });

  it('error = |Prentice| - |exact|, in Δ and in % of |exact|', () => {
    const j = traceJson(CONTRACT);
    expect(j.error.prism).toBeCloseTo(j.prentice.magnitude - j.exact.magnitude, 12);
    expect(j.error.percent).toBeCloseTo((100 * (j.prentice.magnitude - j.exact.magnitude)) / j.exact.magnitude, 10);
  });

  it('accepts --flag=value and negative numbers as values', () => {
    const a = traceJson(['--sphere=-6', '--index=1.5', '--front=2', '--ct=2', '--x=-3', '--y', '-4', '--json']);
    const b = traceJson(['--sphere', '-6', '--index', '1.5', '--front', '2', '--ct', '2', '--x', '-3', '--y=-4', '--json']);
    expect(a).toEqual(b);
    expect(a.input.x).toBe(-3);
    expect(a.input.y).toBe(-4);
  });

  it('reports an uncomputable point as a failure object with exit status 0', () => {
    // +20 D with a thin centre: at 20 mm the surfaces have crossed (no thickness there)
    const j = traceJson(['--sphere', '20', '--index', '1.5', '--front', '24', '--ct', '3', '--x', '20', '--json']);
    expect(j.exact.failure).toMatch(/^(geometry|miss|tir)$/);
    expect(typeof j.exact.message).toBe('string');
    expect(j.error).toBeNull();
    expect(j.prentice.magnitude).toBeCloseTo(40, 10); // Prentice still answers: 2 cm x 20 D
  });

  it('left eye: base labels follow the eye', () => {
    const j = traceJson(['--sphere', '-6', '--index', '1.5', '--front', '2', '--ct', '2', '--x', '-2', '--eye', 'L', '--json']);
    // docs/conventions.md (base labels): left eye, px < 0 is base in; -6 D with c = -0.2 cm: px = -(-6)(-0.2) = -1.2
    expect(j.prentice.horizontal).toEqual({ amount: expect.closeTo(1.2, 12), base: 'in' });
  });

  it('converts a value typed in cm, never taking it as mm', () => {
    const a = traceJson(['--sphere', '5', '--index', '1.5', '--front', '8', '--ct', '4', '--y', '-0.3cm', '--json']);
    expect(a.input.y).toBeCloseTo(-3, 12);
    expect(a.prentice.vertical.amount).toBeCloseTo(1.5, 12); // Prentice 1890: +5 D, 3 mm below: 1.5 Δ base up
    expect(a.prentice.vertical.base).toBe('up');
  });
});

describe('bad input: exit non-zero with one line naming the flag and the reason', () => {
  const cases: [string, string[], RegExp][] = [
    ['index <= 1', ['--sphere', '2', '--index', '0.9', '--front', '6', '--ct', '3'], /--index: must be greater than 1/],
    ['negative thickness', ['--sphere', '2', '--index', '1.5', '--front', '6', '--ct', '-1'], /--ct: must be greater than 0/],
    ['not a number', ['--sphere', 'abc'], /--sphere: must be a number/],
    ['unknown flag', ['--sphere', '2', '--colour', 'red'], /--colour: is not a known flag/],
    ['missing value', ['--sphere'], /--sphere: needs a value/],
    ['repeated flag', ['--sphere', '2', '--sphere', '3'], /--sphere: is given more than once/],
    ['wrong unit', ['--sphere', '2', '--x', '3 D'], /--x: unit 'D' is not accepted/],
    ['bad eye', ['--sphere', '2', '--eye', 'X'], /--eye: must be R or L/],
    ['sphere missing', ['--index', '1.5'], /--sphere: is required/],
    ['visual point outside the lens', ['--sphere', '2', '--index', '1.5', '--front', '6', '--ct', '3', '--diameter', '50', '--x', '30'], /--x: the visual point .* outside the 50 mm lens/],
    ['surfaces cross inside the diameter', ['--sphere', '10', '--index', '1.5', '--front', '14', '--ct', '3', '--diameter', '60'], /--ct: front and back surfaces cross/],
    ['index and material both', ['--sphere', '2', '--index', '1.5', '--material', 'polycarbonate'], /--index: give either/],
    ['unknown material', ['--sphere', '2', '--material', 'unobtainium'], /--material: unknown material/],
  ];
  it.each(cases)('%s', (_name, args, message) => {
    const r = run(['trace', ...args]);
    expect(r.code).not.toBe(0);
    expect(r.out).toBe('');
    expect(r.err).toMatch(message);
    expect(r.err!.split('\n')).toHaveLength(1);
  });

  it('an unknown command is an error', () => {
    const r = run(['frobnicate']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/unknown command 'frobnicate'/);
  });
});

describe('help', () => {
  it.each([['trace'], ['sweep']])('%s --help explains the command', (cmd) => {
    const r = run([cmd, '--help']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(new RegExp(`^decentra ${cmd}:`));
  });
  it('decentra --help lists the commands', () => {
    expect(run(['--help']).out).toMatch(/trace[\s\S]*sweep/);
  });
});

describe('decentra sweep', () => {
  it('CSV: one header and one row per power x decentration, no NaN anywhere', () => {
    const r = run(['sweep', '--material', 'resin-1.60', '--power', '6:8:1', '--decentration', '0:10:5', '--min-edge', '1', '--diameter', '60']);
    expect(r.code).toBe(0);
    const lines = r.out.trim().split('\n');
    expect(lines[0]).toBe('power_D,decentration_mm,front_D,ct_mm,prentice,paraxial,exact,focimeter,error_prism,error_percent,status,note');
    expect(lines).toHaveLength(1 + 3 * 3);
    expect(r.out).not.toMatch(/NaN|Infinity/);
    // Prentice column: |c| F with c in cm (Prentice 1890)
    const row = lines.find((l) => l.startsWith('8,10,'))!.split(',');
    expect(Number(row[4])).toBeCloseTo(8, 10);
  });

  it('JSON rows agree with trace for the same lens', () => {
    const s = JSON.parse(run(['sweep', '--index', '1.5', '--front', '12', '--ct', '7', '--power', '8:8:1', '--decentration', '10:10:1', '--format', 'json']).out);
    const t = traceJson(['--sphere', '8', '--index', '1.5', '--front', '12', '--ct', '7', '--x', '10', '--json']);
    expect(s.rows[0].exact).toBe(t.exact.magnitude);
    expect(s.rows[0].focimeter).toBe(t.focimeter.magnitude);
  });

  it('rejects a malformed range', () => {
    const r = run(['sweep', '--power', '6:12', '--decentration', '0:10:1']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--power: must be START:STOP:STEP/);
  });
});

describe('the built command (npm ci builds it)', () => {
  const bin = 'bin/decentra.mjs';
  it('exists', () => expect(existsSync('dist-cli/decentra.mjs')).toBe(true));
  it('runs as plain JavaScript and exits 2 with one stderr line on a bad flag', () => {
    const ok = execFileSync('node', [bin, 'trace', ...CONTRACT], { encoding: 'utf8' });
    expect(JSON.parse(ok).eye).toBe('R');
    const bad = spawnSync('node', [bin, 'trace', '--sphere', '2', '--ct', '-1'], { encoding: 'utf8' });
    expect(bad.status).toBe(2);
    expect(bad.stdout).toBe('');
    expect(bad.stderr.trim().split('\n')).toHaveLength(1);
    expect(bad.stderr).toMatch(/--ct/);
  });
});

describe('decentra trace CASE.json', () => {
  it('takes the lens of the chosen eye from the case file, and agrees with the same lens given by flags', () => {
    const fromFile = traceJson(['examples/anisometropic-reader.json', '--eye', 'L', '--y', '-10', '--json']);
    const byFlags = traceJson(['--sphere', '4.5', '--material', 'resin-1.60', '--ct', '5', '--eye', 'L', '--y', '-10', '--json']);
    expect(fromFile.exact).toEqual(byFlags.exact);
    expect(fromFile.prentice.vertical).toEqual({ amount: expect.closeTo(4.5, 12), base: 'up' });
  });
  it('refuses lens flags beside a case file', () => {
    const r = run(['trace', 'examples/anisometropic-reader.json', '--sphere', '3']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--sphere: comes from the case file/);
  });
});

describe('long sweeps use all cores', () => {
  it('the parallel sweep (worker threads) gives exactly the serial rows, in order', async () => {
    const { pathToFileURL } = await import('node:url');
    const { runAsync } = await import('../../src/cli/main.ts');
    const args = ['sweep', '--material', 'resin-1.60', '--power', '4:12:0.5', '--decentration', '0:20:0.1'];
    const serial = run(args).out;
    const parallel = await runAsync(args, pathToFileURL('dist-cli/decentra.mjs'));
    expect(parallel.code).toBe(0);
    expect(parallel.out).toBe(serial);
    expect(serial.split('\n')).toHaveLength(1 + 17 * 201);
  });
});

describe('decentra near', () => {
  it('solves the visual point for a target and gives the four answers there', () => {
    const r = run(['near', '--sphere', '-4', '--index', '1.6', '--front', '2', '--ct', '2', '--at', '0,-150,400', '--json']);
    expect(r.code).toBe(0);
    const n = JSON.parse(r.out);
    expect(Object.keys(n)).toEqual(expect.arrayContaining(['visualPoint', 'prentice', 'paraxial', 'exact', 'focimeter', 'error']));
    // the straight line from the centre of rotation to the target crosses the back vertex
    // plane 27·150/400 = 10.1 mm below. Below its centre a minus lens is base down; light is
    // bent towards the base, so the target's image moves up (towards the apex) and the eye
    // turns down less: minus lenses reduce ocular rotation (derived here from the base
    // direction of Prentice's rule, Prentice 1890; from memory). The visual point is therefore less than 10.1 mm below.
    expect(n.visualPoint.y).toBeGreaterThan(-27 * 150 / 400);
    expect(n.visualPoint.y).toBeLessThan(-7);
    // the answers at that point equal a trace at the same visual point
    const t = traceJson(['--sphere', '-4', '--index', '1.6', '--front', '2', '--ct', '2', '--x', String(n.visualPoint.x), '--y', String(n.visualPoint.y), '--json']);
    expect(n.exact.y).toBeCloseTo(t.exact.y, 12);
    expect(n.exact.vertical.base).toBe('down');
  });
  it('a target behind the eye is a one-line error naming --at', () => {
    const r = run(['near', '--sphere', '2', '--at', '0,0,-100']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--at: the target must lie in front of the lens/);
  });
});

describe('decentra limits', () => {
  it('Prentice limit is P/F (Prentice 1890); exact is smaller for a thick high-plus lens', () => {
    const r = run(['limits', '--sphere', '10', '--material', 'resin-1.60', '--front', '16', '--ct', '9.5', '--max-prism', '0.5', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.prentice).toBeCloseTo(0.5, 12); // 0.5 Δ / 10 D = 0.05 cm
    expect(j.exact).toBeLessThan(j.prentice);
    expect(j.difference).toBeCloseTo(j.prentice - j.exact, 12);
  });
  it('a table over a power range', () => {
    const r = run(['limits', '--power', '6:8:1', '--material', 'resin-1.60', '--max-prism', '0.5', '--format', 'json']);
    const j = JSON.parse(r.out); // a table is an array of rows (docs/range.md)
    expect(j.map((x: any) => x.sphere)).toEqual([6, 7, 8]);
    for (const row of j) expect(row.prentice).toBeCloseTo(0.5 / row.sphere * 10, 12);
  });
});
