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
    ['unknown version', (d) => ({ ...d, version: 99 }), /^version: must be 2/],
    ['not a case', () => [1, 2, 3], /^case: must be a JSON object/],
    ['bad target', (d) => ({ ...d, target: { kind: 'near' } }), /^target\.distance: is required/],
  ];
  it.each(hostile)('%s is refused, naming the field', (_n, change, message) => {
    const e = refusal(change(base()));
    expect(`${e.field}: ${e.reason}`).toMatch(message);
  });

  it('a version 1 file still opens (migrated to version 2 with nothing else changed)', () => {
    const v1 = { ...base(), version: 1 };
    const c = readCase(v1);
    expect(c.doc.version).toBe(2);
    expect(c.doc.right).toEqual(base().right);
  });

  it('prescribed prism: base words or one 360° angle; contradictions and bad values name the entry', () => {
    const withPrism = (prism: unknown) => { const d = base(); d.right.prism = prism; return d; };
    expect(readCase(withPrism([{ amount: 2, base: 'in' }, { amount: 1, base: 'up' }])).right.prism).toHaveLength(2);
    expect(readCase(withPrism([{ amount: 2.5, angle: 37 }])).right.prism).toEqual([{ amount: 2.5, angle: 37 }]);
    expect(refusal(withPrism([{ amount: 2, base: 'in' }, { amount: 1, base: 'out' }])).message).toMatch(/right\.prism\.1.*second horizontal/);
    expect(refusal(withPrism([{ amount: 2, base: 'in' }, { amount: 1, angle: 90 }])).message).toMatch(/right\.prism\.1.*not both/);
    expect(refusal(withPrism([{ amount: -1, base: 'up' }])).message).toMatch(/right\.prism\.0\.amount/);
    expect(refusal(withPrism([{ amount: 1, angle: 400 }])).message).toMatch(/right\.prism\.0\.angle/);
    expect(refusal(withPrism([{ amount: 1, base: 'sideways' }])).field).toMatch(/right\.prism\.0/);
  });

  it('a reading-level target and the tilt drop are read and checked', () => {
    const d = base();
    d.target = { kind: 'level', below: 10, inset: 2 };
    d.pantoDeg = 10;
    d.tiltDrop = 'rule-of-thumb';
    const c = readCase(d);
    // 1 mm per 2° of tilt (common practice, no source): 5 mm lower than the frame puts it
    expect(c.right.tiltDropMm).toBe(5);
    expect(c.right.ocYMm).toBeCloseTo(-5, 12);
    d.target = { kind: 'level', below: 80 };
    expect(refusal(d).field).toBe('target.below');
    d.target = { kind: 'distance' };
    d.tiltDrop = 'a lot';
    expect(refusal(d).field).toBe('tiltDrop');
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
      const doc = { format: 'decentra-case', version: 2, target, right: r, left: l };
      const once = readCase(doc).doc;
      const again = readCaseText(writeCase(once)).doc;
      expect(again).toEqual(once);
      expect(JSON.parse(writeCase(once))).toEqual(doc);
    }), { numRuns: 60 });
  });
});

describe('decentra fit', () => {
  it('wide frame, -9.50 D, centres not decentred: base in for both eyes, horizontal verdict fails on the 2.5 mm rule', () => {
    // An invented scenario (docs/case-file.md, "Example"): minus lenses with centres outside the
    // pupils give base in (docs/conventions.md, "Prism: sign, base labels and the 360° notation"). ANSI Z80.1: above 2.75 D the horizontal rule is ±2.5 mm from the PD; 6 mm fails.
    const r = run(['fit', 'examples/wide-frame-minus.json', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.right.exact.horizontal.base).toBe('in');
    expect(j.left.exact.horizontal.base).toBe('in');
    expect(j.binocular.exact.netHorizontal.base).toBe('in');
    expect(j.binocular.exact.verticalImbalance.amount).toBe(0);
    const h = j.tolerance.verdicts.find((v: { component: string }) => v.component === 'horizontal');
    expect(h).toMatchObject({ rule: 'mm', pass: false, limit: 2.5 });
    expect(h.value).toBeCloseTo(6, 12);
    expect(r.out).not.toMatch(/NaN|Infinity/);
  });

  it('fit --json: the three answers under their own keys (docs/cli.md)', () => {
    const j = JSON.parse(run(['fit', 'examples/wide-frame-minus.json', '--json']).out);
    // at the marks: 3 mm x 9.50 D = 2.85 Δ base in per eye, 5.70 Δ in all (Prentice 1890, arithmetic)
    expect(j.marks.right.point.x).toBeCloseTo(3, 12);
    expect(j.marks.right.prentice.horizontal).toMatchObject({ base: 'in' });
    expect(j.marks.right.prentice.horizontal.amount).toBeCloseTo(2.85, 12);
    expect(j.marks.net.horizontal.prentice.amount).toBeCloseTo(5.7, 12);
    expect(j.marks.net.horizontal.focimeter.base).toBe('in');
    expect(j.marks.right.prescribed).toBeNull();
    for (const k of ['prentice', 'firstOrder', 'exact', 'focimeter']) expect(j.marks.left[k]).toHaveProperty('magnitude');
    expect(j.standard.horizontal).toMatchObject({ within: false, unit: 'mm', allowed: 2.5 });
    expect(j.standard.horizontal.rule).toMatch(/2\.5 mm from the specified PD \(powers above 2\.75 D\)/);
    expect(j.standard.vertical).toMatchObject({ within: true, unit: 'mm' });
    expect(j.eyes.demand.horizontal).toMatchObject({ base: 'in', asks: 'diverge' });
    expect(j.eyes.demand.vertical).toEqual({ amount: 0, baseUpEye: null });
    expect(j.slabOff).toMatchObject({ basis: 'focimeter', order: 0 });
  });

  it('fit text: three headings, and the verdict names the rule threshold, not the lens power', () => {
    const out = run(['fit', 'examples/wide-frame-minus.json']).out;
    const heads = ['1. At the marks', "2. The standard’s verdict", '3. What the eyes do at the target'].map((h) => out.indexOf(h));
    expect(heads.every((i) => i >= 0)).toBe(true);
    expect([...heads].sort((a, b) => a - b)).toEqual(heads);
    expect(out.replace(/\s+/g, ' ')).toMatch(/6\.00 mm of 2\.50 mm allowed; the standard's row: 2\.5 mm from the specified PD \(powers above 2\.75 D\)/);
    expect(out).not.toMatch(/centration rule above 9\.50 D/);
    expect(out).not.toMatch(/NaN|Infinity/);
  });

  it('fit on the reader example: 3.50 Δ by Prentice at the reading level, left eye base up; slab-off in focimeter terms', () => {
    const j = JSON.parse(run(['fit', 'examples/anisometropic-reader.json', '--json']).out);
    expect(j.target).toEqual({ kind: 'level', below: 10, inset: 0 });
    expect(j.binocular.prentice.verticalImbalance.amount).toBeCloseTo(3.5, 12); // Prentice 1890: 4.5 x 1 - 1 x 1
    expect(j.binocular.prentice.verticalImbalance.baseUpEye).toBe('L');
    expect(j.slabOff.eye).toBe('R');
    expect(j.slabOff.order).toBeLessThanOrEqual(j.slabOff.focimeterImbalance);
    expect(j.eyes.demand.vertical.baseUpEye).toBe('L');
  });

  it('trace CASE.json --eye R traces at the eye\'s mark, and --x/--y move it from there', () => {
    const a = JSON.parse(run(['trace', 'examples/wide-frame-minus.json', '--eye', 'R', '--json']).out);
    expect(a.input.x).toBeCloseTo(3, 12);
    expect(a.prentice.horizontal.amount).toBeCloseTo(2.85, 12); // 3 mm x 9.50 D (Prentice 1890)
    const b = JSON.parse(run(['trace', 'examples/wide-frame-minus.json', '--eye', 'L', '--y', '-5', '--json']).out);
    expect(b.input).toMatchObject({ x: -3, y: -5, mark: { x: -3, y: 0 } });
    expect(b.prentice.vertical).toMatchObject({ base: 'down' });
    expect(b.prentice.vertical.amount).toBeCloseTo(4.75, 12); // 5 mm x 9.50 D, minus lens below its centre: base down
  });

  it('a file that does not exist, or a bad field, is one line naming it', () => {
    const a = run(['fit', 'no-such-file.json']);
    expect(a.code).toBe(2);
    expect(a.err).toMatch(/no-such-file\.json: cannot be read/);
  });
});
