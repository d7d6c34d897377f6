// HL7 FHIR VisionPrescription in and out (docs/fhir.md). The published example of the FHIR
// specification (VisionPrescription 33123, "General Glasses Example", R4; tests/fixtures/fhir)
// must import as written; export then import must give the same prescription back; hostile
// resources are refused whole with one message naming the path.
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { readCase } from '../../src/case/caseFile.ts';
import {
  FhirError, caseFromPrescription, importVisionPrescriptionText, readVisionPrescription, visionPrescriptionFromCase,
} from '../../src/case/fhir.ts';
import { evaluateFit } from '../../src/case/fit.ts';

const example = readFileSync('tests/fixtures/fhir/visionprescription-example-33123.r4.json', 'utf8');

function refusal(raw: unknown): FhirError {
  try {
    readVisionPrescription(raw);
  } catch (e) {
    expect(e).toBeInstanceOf(FhirError);
    return e as FhirError;
  }
  throw new Error('the resource was accepted');
}

describe('the published FHIR example (VisionPrescription 33123)', () => {
  it('imports as written: OD -2.00 sph, 0.5 Δ base down; OS -1.00 / -0.50 x 180, 0.5 Δ base up; add +2.00', () => {
    const p = readVisionPrescription(JSON.parse(example));
    expect(p.right).toEqual({ sphere: -2, cyl: 0, axis: 0, prism: [{ amount: 0.5, base: 'down' }], add: 2 });
    // axis 180 is the same meridian as 0 (axes live in [0, 180), docs/conventions.md)
    expect(p.left).toEqual({ sphere: -1, cyl: -0.5, axis: 0, prism: [{ amount: 0.5, base: 'up' }], add: 2 });
  });
  it('becomes a case that decentra fit reads: the prescribed vertical prisms make 1.00 Δ, left eye base up', () => {
    const { doc, notes } = importVisionPrescriptionText(example, { pdMm: { right: 31, left: 32 } });
    const f = evaluateFit(readCase(doc));
    // right 0.5 Δ base down, left 0.5 Δ base up: right minus left = -0.5 - 0.5 = -1.0 (arithmetic)
    expect(f.marks.prescribedNet.verticalImbalance).toBeCloseTo(-1, 12);
    expect(f.marks.right.prescribed!.vertical).toEqual({ amount: 0.5, base: 'down' });
    expect(doc.right.pd).toBe(31);
    expect(doc.left.add).toBe(2);
    expect(notes.some((n) => /PD/.test(n))).toBe(false);
    expect(notes.some((n) => /add: \+2\.00 D kept/.test(n))).toBe(true);
  });
  it('says what the resource lacked and what was assumed', () => {
    const { notes } = importVisionPrescriptionText(example);
    for (const what of [/^PD: .*assumed 32 mm/, /^frame/, /^material and lens form/, /^target/]) {
      expect(notes.some((n) => what.test(n))).toBe(true);
    }
  });
  it('is found inside a Bundle; a Bundle with none or two is refused', () => {
    const res = JSON.parse(example);
    const bundle = { resourceType: 'Bundle', type: 'collection', entry: [{ resource: { resourceType: 'Patient' } }, { resource: res }] };
    expect(readVisionPrescription(bundle).left.cyl).toBe(-0.5);
    expect(refusal({ resourceType: 'Bundle', entry: [] }).message).toMatch(/no VisionPrescription/);
    expect(refusal({ resourceType: 'Bundle', entry: [{ resource: res }, { resource: res }] }).message).toMatch(/2 VisionPrescriptions/);
  });
});

describe('export then import is the identity on the prescription', () => {
  it('for the published example', () => {
    const { doc } = importVisionPrescriptionText(example, { pdMm: { right: 32, left: 32 } });
    const { resource } = visionPrescriptionFromCase(doc, '2026-12-02');
    const back = importVisionPrescriptionText(JSON.stringify(resource), { pdMm: { right: 32, left: 32 } }).doc;
    expect(back.right).toEqual(doc.right);
    expect(back.left).toEqual(doc.left);
  });
  it('property: any prescription with base-word prism and whole-degree axes', () => {
    const quarter = (lo: number, hi: number) => fc.integer({ min: lo * 4, max: hi * 4 }).map((q) => q / 4);
    const eye = fc.record({
      // powers the default lens form (Vogel front, thinnest lens on the blank) can make
      sphere: quarter(-12, 12), cyl: quarter(-4, 4), axis: fc.integer({ min: 1, max: 179 }),
      h: fc.option(fc.record({ amount: quarter(0.25, 10), base: fc.constantFrom('in', 'out') }), { nil: undefined }),
      v: fc.option(fc.record({ amount: quarter(0.25, 10), base: fc.constantFrom('up', 'down') }), { nil: undefined }),
      add: fc.option(quarter(0.75, 3.5), { nil: undefined }),
    });
    fc.assert(fc.property(eye, eye, (r, l) => {
      const side = (e: typeof r) => ({
        sphere: e.sphere, ...(e.cyl ? { cyl: e.cyl, axis: e.axis } : {}),
        ...(e.h || e.v ? { prism: [e.h, e.v].filter((x) => x !== undefined) } : {}),
        ...(e.add !== undefined ? { add: e.add } : {}), pd: 32, ct: 3,
      });
      const doc = readCase({ format: 'decentra-case', version: 2, target: { kind: 'distance' }, right: side(r), left: side(l) }).doc;
      const { resource } = visionPrescriptionFromCase(doc, '2026-12-02');
      const back = importVisionPrescriptionText(JSON.stringify(resource), { pdMm: { right: 32, left: 32 } }).doc;
      // the prescription only: FHIR carries no lens form (ct), which the import assumes anew
      const rx = (d: Record<string, unknown>) => ({ sphere: d.sphere, cyl: d.cyl, axis: d.axis, prism: d.prism, add: d.add });
      expect(rx(back.right)).toEqual(rx(doc.right));
      expect(rx(back.left)).toEqual(rx(doc.left));
    }), { numRuns: 100 });
  });
  it('a 360° prism is written as its components (FHIR has base words only): 2 Δ at 135°, left eye = 1.41 Δ in and up', () => {
    const doc = readCase({
      format: 'decentra-case', version: 2, target: { kind: 'distance' },
      right: { sphere: 1, pd: 32 }, left: { sphere: 1, pd: 32, prism: [{ amount: 2, angle: 135 }] },
    }).doc;
    const { resource, notes } = visionPrescriptionFromCase(doc, '2026-12-02');
    const left = (resource as { lensSpecification: { prism?: { amount: number; base: string }[] }[] }).lensSpecification[1]!;
    // 2 cos 45° = 1.414 Δ each way; 135° points to the observer's left, the left eye's nose (ISO 8429)
    expect(left.prism!.map((p) => p.base)).toEqual(['in', 'up']);
    expect(left.prism![0]!.amount).toBeCloseTo(Math.SQRT2, 12);
    expect(notes.join(' ')).toMatch(/left\.prism: the 360° entry/);
  });
});

describe('hostile resources are refused whole, naming the path', () => {
  const good = () => JSON.parse(example);
  const cases: [string, (r: any) => unknown, RegExp][] = [
    ['a wrong resourceType', (r) => ({ ...r, resourceType: 'Patient' }), /^resourceType: must be "VisionPrescription"/],
    ['eye "middle"', (r) => { r.lensSpecification[0].eye = 'middle'; return r; }, /^lensSpecification\.0\.eye: must be/],
    ['base "sideways"', (r) => { r.lensSpecification[1].prism[0].base = 'sideways'; return r; }, /^lensSpecification\.1\.prism\.0\.base: must be/],
    ['sphere "abc"', (r) => { r.lensSpecification[0].sphere = 'abc'; return r; }, /^lensSpecification\.0\.sphere: must be number/],
    ['axis 181', (r) => { r.lensSpecification[1].axis = 181; return r; }, /^lensSpecification\.1\.axis: must be between 0 and 180/],
    ['axis 90.5', (r) => { r.lensSpecification[1].axis = 90.5; return r; }, /^lensSpecification\.1\.axis: must be a whole number/],
    ['a second right eye', (r) => { r.lensSpecification[1].eye = 'right'; return r; }, /^lensSpecification\.1\.eye: gives a second right eye/],
    ['no left eye', (r) => { r.lensSpecification.pop(); return r; }, /^lensSpecification: has no left eye/],
    ['a contact lens (invented)', (r) => { r.lensSpecification[0].product.coding[0].code = 'contact'; return r; }, /^lensSpecification\.0\.product: is 'contact'/],
    ['a negative prism amount', (r) => { r.lensSpecification[0].prism[0].amount = -1; return r; }, /^lensSpecification\.0\.prism\.0\.amount/],
    ['a cylinder without an axis', (r) => { delete r.lensSpecification[1].axis; return r; }, /^lensSpecification\.1\.axis: is required with a cylinder/],
  ];
  it.each(cases)('%s', (_name, edit, why) => {
    const e = refusal(edit(good()));
    expect(e.message).toMatch(why);
    expect(e.message).not.toMatch(/\n/);
  });
  it('text that is not JSON, or 50 MB, is refused before anything else', () => {
    expect(() => importVisionPrescriptionText('{"resourceType":')).toThrow(/^resource: is not valid JSON/);
    expect(() => importVisionPrescriptionText(' '.repeat(50 * 1024 * 1024))).toThrow(/^resource: is longer than 1024 kB/);
  });
  it('a valid resource with a prescription Decentra cannot model is refused by the case rules', () => {
    const r = good();
    r.lensSpecification[0].sphere = -45;
    expect(refusal(r).message).toMatch(/^lensSpecification\.0\.sphere: must be between -30 and 30 D/);
  });
});

it('caseFromPrescription keeps the prescription and nothing else of the resource', () => {
  const p = readVisionPrescription(JSON.parse(example));
  const { doc } = caseFromPrescription(p);
  expect(JSON.stringify(doc)).not.toMatch(/Patient|Practitioner|happysight/);
  expect(doc.title).toBe('Imported VisionPrescription 33123, written 2014-06-15');
});

describe('decentra import and export', () => {
  it('import writes the case to stdout and says each assumption on its own line', async () => {
    const { run } = await import('../../src/cli/main.ts');
    const r = run(['import', 'tests/fixtures/fhir/visionprescription-example-33123.r4.json']);
    expect(r.code).toBe(0);
    expect(readCase(JSON.parse(r.out)).right.prism).toEqual([{ amount: 0.5, base: 'down' }]);
    expect(r.notes!.length).toBeGreaterThanOrEqual(4);
    for (const n of r.notes!) expect(n).toMatch(/^decentra import: assumed: [^\n]+$/);
  });
  it('a bad resource is one line naming the file and the path; nothing is written', async () => {
    const { run } = await import('../../src/cli/main.ts');
    const { mkdtempSync, writeFileSync, existsSync } = await import('node:fs');
    const dir = mkdtempSync('/tmp/decentra-fhir-');
    writeFileSync(`${dir}/rx.json`, JSON.stringify({ resourceType: 'VisionPrescription', lensSpecification: [{ eye: 'left', sphere: 1, axis: 181, cylinder: 1 }] }));
    const r = run(['import', `${dir}/rx.json`, '--out', `${dir}/case.json`]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/^decentra import: .*rx\.json: lensSpecification\.0\.axis: must be between 0 and 180 degrees, got 181$/);
    expect(existsSync(`${dir}/case.json`)).toBe(false);
  });
  it('export needs --fhir and writes a VisionPrescription that imports back', async () => {
    const { run } = await import('../../src/cli/main.ts');
    expect(run(['export', 'examples/wide-frame-minus.json']).err).toMatch(/--fhir: is required/);
    const r = run(['export', 'examples/wide-frame-minus.json', '--fhir', '--date', '2026-12-02']);
    const res = JSON.parse(r.out);
    expect(res).toMatchObject({ resourceType: 'VisionPrescription', created: '2026-12-02' });
    expect(readVisionPrescription(res).right).toEqual({ sphere: -9.5, cyl: 0, axis: 0, prism: [], add: null });
  });
});

it('decentra import refuses a file over 1 MB by its size, in a FHIR resource\'s words', async () => {
  const { run } = await import('../../src/cli/main.ts');
  const { mkdtempSync, truncateSync, writeFileSync } = await import('node:fs');
  const dir = mkdtempSync('/tmp/decentra-fhir-big-');
  writeFileSync(`${dir}/big.json`, '');
  truncateSync(`${dir}/big.json`, 2 * 1024 * 1024);
  const r = run(['import', `${dir}/big.json`]);
  expect(r.code).toBe(2);
  expect(r.err).toMatch(/big\.json: is 2\.0 MB; a FHIR resource file is at most 1\.0 MB$/);
});
