// Case files: everything is checked before anything is used; errors name the field.
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CaseError, readCase, readCaseBytes, readCaseText, writeCase } from '../../src/case/caseFile.ts';
import { evaluateFit } from '../../src/case/fit.ts';
import { run } from '../../src/cli/main.ts';

const base = () => JSON.parse(readFileSync('examples/wide-frame-minus.json', 'utf8'));

function refusal(doc: unknown): CaseError {
  try {
    readCase(doc);
  } catch (e) {
    expect(e).toBeInstanceOf(CaseError);
    return e as CaseError;
  }
  throw new Error('the case was accepted');
}

describe('reading a case file', () => {
  it('accepts the bundled examples', () => {
    for (const f of ['examples/wide-frame-minus.json', 'examples/anisometropic-reader.json']) {
      expect(() => readCaseBytes(readFileSync(f))).not.toThrow();
    }
  });

  it('derives optical-centre positions from the boxed frame: frame PD = A + DBL (ISO 8624 boxing)', () => {
    // A 52 + DBL 18 = 70 mm frame PD; PD 2 x 32 = 64: each centre 3 mm temporal of its pupil
    const c = readCase(base());
    expect(c.right.ocXMm).toBeCloseTo(-3, 12); // right eye: temporal is -x
    expect(c.left.ocXMm).toBeCloseTo(3, 12);
    expect(c.right.ocYMm).toBe(0);
  });

  const hostile: [string, (d: any) => unknown, RegExp][] = [
    ['wrong type', (d) => ({ ...d, right: { ...d.right, sphere: '-9.5' } }), /^right\.sphere: must be number/],
    ['NaN as text', (d) => ({ ...d, left: { ...d.left, pd: 'NaN' } }), /^left\.pd: must be number/],
    ['missing field', (d) => { const { pd, ...rest } = d.right; return { ...d, right: rest }; }, /^right\.pd: is required/],
    ['extra key', (d) => ({ ...d, colour: 'red' }), /^colour: is not a field/],
    ['__proto__ key', (d) => JSON.parse(JSON.stringify(d).replace('"title"', '"__proto__"')), /^__proto__: is not a field/],
    ['huge number', (d) => ({ ...d, right: { ...d.right, ct: 1e308 } }), /^right\.ct: must be greater than 0 and at most 30 mm/],
    ['out of range', (d) => ({ ...d, left: { ...d.left, pd: 80 } }), /^left\.pd: must be between 20 and 45 mm/],
    ['unknown version', (d) => ({ ...d, version: 99 }), /^version: must be 1/],
    ['not a case', () => [1, 2, 3], /^case: must be a JSON object/],
    ['bad target', (d) => ({ ...d, target: { kind: 'near' } }), /^target\.distance: is required/],
  ];
  it.each(hostile)('%s is refused, naming the field', (_n, change, message) => {
    const e = refusal(change(base()));
    expect(`${e.field}: ${e.reason}`).toMatch(message);
  });

  it('a lens that cannot be made is refused on loading, naming the eye and field', () => {
    const e = refusal({ ...base(), right: { ...base().right, sphere: 12, front: 14, ct: 2, diameter: 60 } });
    expect(`${e.field}: ${e.reason}`).toMatch(/^right\.ct: front and back surfaces cross/);
    // and so every case that loads can be evaluated
    expect(() => evaluateFit(readCase(base()))).not.toThrow();
  });

  it('refuses a 20 MB file before parsing it, and invalid UTF-8', () => {
    const big = new Uint8Array(20 * 1024 * 1024).fill(32);
    expect(() => readCaseBytes(big)).toThrow(/at most 256 kB/);
    expect(() => readCaseBytes(new Uint8Array([0x7b, 0xff, 0xfe, 0x7d]))).toThrow(/not valid UTF-8/);
    expect(() => readCaseText('{ "format": ')).toThrow(/not valid JSON/);
  });

  it('round trip: writing then reading gives the same document (property)', () => {
    // JSON has no negative zero: -0 is written as 0, the same value
    const arbEye = fc.record({
      sphere: fc.double({ min: -12, max: 12, noNaN: true }).map((n) => n + 0),
      cyl: fc.double({ min: -4, max: 0, noNaN: true }).map((n) => n + 0),
      axis: fc.integer({ min: 0, max: 179 }),
      material: fc.constantFrom('resin-1.50', 'resin-1.60', 'polycarbonate'),
      ct: fc.double({ min: 1, max: 12, noNaN: true }).map((n) => n + 0),
      pd: fc.double({ min: 25, max: 38, noNaN: true }).map((n) => n + 0),
      oc: fc.record({ x: fc.double({ min: -5, max: 5, noNaN: true }).map((n) => n + 0), y: fc.double({ min: -5, max: 5, noNaN: true }).map((n) => n + 0) }),
    });
    fc.assert(fc.property(arbEye, arbEye, fc.constantFrom({ kind: 'distance' }, { kind: 'near', distance: 400, below: 100 }), (r, l, target) => {
      const doc = { format: 'decentra-case', version: 1, target, right: r, left: l };
      const once = readCase(doc).doc;
      const again = readCaseText(writeCase(once)).doc;
      expect(again).toEqual(once);
      expect(JSON.parse(writeCase(once))).toEqual(doc);
    }), { numRuns: 60 });
  });
});

describe('decentra fit', () => {
  it('wide frame, -9.50 D, centres not decentred: base in for both eyes, horizontal verdict fails on the 2.5 mm rule', () => {
    // USERS scenario 2 (invented): minus lenses with centres outside the pupils give base in
    // (DESIGN §6). ANSI Z80.1: above 2.75 D the horizontal rule is ±2.5 mm from the PD; 6 mm fails.
    const r = run(['fit', 'examples/wide-frame-minus.json', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.right.exact.horizontal.base).toBe('in');
    expect(j.left.exact.horizontal.base).toBe('in');
    expect(j.binocular.exact.netHorizontal.base).toBe('in');
    expect(j.binocular.exact.verticalImbalance.amount).toBe(0);
    const h = j.tolerance.verdicts.find((v: any) => v.component === 'horizontal');
    expect(h).toMatchObject({ rule: 'mm', pass: false, limit: 2.5 });
    expect(h.value).toBeCloseTo(6, 12);
    expect(r.out).not.toMatch(/NaN|Infinity/);
  });

  it('a file that does not exist, or a bad field, is one line naming it', () => {
    const a = run(['fit', 'no-such-file.json']);
    expect(a.code).toBe(2);
    expect(a.err).toMatch(/no-such-file\.json: cannot be read/);
  });
});
