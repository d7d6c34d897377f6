/**
 * The range workspace's family (src/ui/range/family.ts) and its files (src/ui/exports/range.ts):
 * the command line the app shows prints the file the app writes (the CLI contract, docs/cli.md
 * and docs/range.md); a refused value names the form's field; a cell opens the very lens of its
 * row. Expected values come from the CLI's own entry points (src/cli/limits.ts, spec.ts) run on
 * the words the app shows, and from Prentice's rule (P = c F, c in cm; C. F. Prentice, 1890,
 * Archives of Ophthalmology; from memory), never from copied output.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/case/input.ts';
import { readTraceCase } from '../../src/case/lensCase.ts';
import { rangeLens, readRangeSpec } from '../../src/case/range.ts';
import { toRawFields } from '../../src/case/url.ts';
import { runLimits } from '../../src/cli/limits.ts';
import { runSpec } from '../../src/cli/spec.ts';
import { rangeExportText } from '../../src/ui/exports/range.ts';
import {
  DEFAULT_FAMILY, type FamilyForm, type FamilyKey, cellDecentrationMm, commandWords, familyLabel, familyViewCase, fieldOfLabel, rangeInput,
} from '../../src/ui/range/family.ts';

const small = (f: Partial<FamilyForm>): FamilyForm => ({ ...DEFAULT_FAMILY, power: '-4:4:2', ...f });
const DAY = Date.UTC(2026, 0, 15);

describe('the app’s range files are what its command line prints', () => {
  const families: [string, FamilyForm][] = [
    ['the example family, thinned', small({})],
    ['cylinders of both signs, oblique axes, angles and words, three tolerances, left eye', small({
      power: '-2,0,3', cyl: '-1.5,0.75', axis: '20:160:70', dir: 'nasal,45,up', maxPrism: '0.25,0.5,1', eye: 'L',
    })],
    ['a fixed centre thickness and true front power, custom index', small({
      thicknessMode: 'centre', ct: '4', frontMode: 'true', front: '7', material: 'custom', index: '1.67', abbe: '32', decimals: '3',
    })],
    ['powers that cannot be made at 75 mm (the largest diameter is given)', small({ power: '10,14', diameter: '75', dir: 'temporal' })],
  ];
  for (const [name, f] of families) {
    it(`CSV and JSON: ${name}`, () => {
      const words = commandWords(f, 'limits');
      for (const format of ['csv', 'json'] as const) {
        const app = rangeExportText({ kind: 'range', form: f, chart: { cyl: 0, axis: 0, dir: 0 }, format, dateMs: DAY }).text;
        expect(app).toBe(runLimits([...words.slice(1), '--format', format]));
      }
    });
  }
  it('the spec sheet', () => {
    const f = families[1]![1];
    const app = rangeExportText({ kind: 'range', form: f, chart: { cyl: 1, axis: 1, dir: 1 }, format: 'spec', dateMs: DAY }).text;
    expect(app).toBe(runSpec([...commandWords(f, 'spec').slice(1), '--date', '2026-01-15']));
    expect(app).not.toMatch(/<script/i);
  });
  it('property: any small family of spheres, cylinders and tolerances', () => {
    const q = (n: number) => String(n / 4);
    fc.assert(fc.property(
      fc.integer({ min: -40, max: 40 }), fc.integer({ min: 1, max: 3 }), fc.integer({ min: -12, max: 12 }),
      fc.integer({ min: 0, max: 180 }), fc.constantFrom('nasal', 'temporal,down', '30,210', 'up'), fc.constantFrom('0.25', '0.5,1', '2'),
      fc.constantFrom<'R' | 'L'>('R', 'L'),
      (p, n, c, axis, dir, tol, eye) => {
        const f = small({ power: `${q(p)}:${q(p + 4 * n)}:1`, cyl: q(c), axis: String(axis), dir, maxPrism: tol, eye });
        const app = rangeExportText({ kind: 'range', form: f, chart: { cyl: 0, axis: 0, dir: 0 }, format: 'json', dateMs: DAY }).text;
        expect(app).toBe(runLimits([...commandWords(f, 'limits').slice(1), '--format', 'json']));
      },
    ), { numRuns: 12 });
  });
});

describe('a refused value names the form’s field', () => {
  const cases: [Partial<FamilyForm>, FamilyKey][] = [
    [{ power: '2:6:0' }, 'power'],
    [{ power: '' }, 'power'],
    [{ cyl: 'x' }, 'cyl'],
    [{ axis: '200' }, 'axis'],
    [{ dir: 'sideways' }, 'dir'],
    [{ maxPrism: '0' }, 'maxPrism'],
    [{ minEdge: 'thin' }, 'minEdge'],
    [{ diameter: '-5' }, 'diameter'],
    [{ cr: '500' }, 'cr'],
    [{ decimals: '1.5' }, 'decimals'],
  ];
  for (const [change, field] of cases) {
    it(`${Object.keys(change)[0]} = '${Object.values(change)[0]}'`, () => {
      let err: unknown = null;
      try {
        readRangeSpec(rangeInput({ ...DEFAULT_FAMILY, ...change }), familyLabel);
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(InputError);
      expect(fieldOfLabel((err as InputError).field)).toBe(field);
    });
  }
});

describe('a cell opens the lens of its row', () => {
  it('the single-lens case of a row builds the same lens, at the direction and distance asked', () => {
    const f = small({ power: '-6,5', cyl: '-2', axis: '30' });
    const spec = readRangeSpec(rangeInput(f), familyLabel);
    for (const sphere of spec.spheres) {
      const rl = rangeLens(spec, { sphere, cyl: -2, axis: 30 });
      const vc = familyViewCase(f, { sphere: String(sphere), cyl: '-2', axis: '30' }, { dirDeg: 180, distMm: 7.25 });
      const { tc, lens } = readTraceCase(toRawFields(vc, { dir: 'direction', dist: 'distance' }), (k) => k);
      expect(lens.ctMm).toBe(rl.lens!.ctMm);
      expect(lens.frontPowers).toEqual(rl.lens!.frontPowers);
      expect(tc.crMm).toBe(spec.crMm);
      // 7.25 mm towards 180°: plane geometry
      expect(tc.xMm).toBeCloseTo(-7.25, 9);
      expect(tc.yMm).toBeCloseTo(0, 9);
    }
  });
  it('the decentration is the limit rounded down to 0.01 mm; no limit opens nothing', () => {
    const row = { exact: 2.0469, firstOrder: 3, prentice: null, focimeter: 0.004 } as unknown as Parameters<typeof cellDecentrationMm>[0];
    expect(cellDecentrationMm(row, 'exact')).toBe(2.04);
    expect(cellDecentrationMm(row, 'firstOrder')).toBe(3);
    expect(cellDecentrationMm(row, 'prentice')).toBeNull();
    expect(cellDecentrationMm(row, 'focimeter')).toBe(0);
  });
  it('Prentice’s limit of a spherical row is 10 P / |F| mm (P = c F, c in cm)', () => {
    const f = small({ power: '-6,-2.5,4', maxPrism: '0.25,1' });
    const rows = rangeExportText({ kind: 'range', form: f, chart: { cyl: 0, axis: 0, dir: 0 }, format: 'json', dateMs: DAY }).text;
    for (const r of JSON.parse(rows) as { sphere: number; maxPrism: number; prentice: number }[]) {
      expect(r.prentice).toBeCloseTo((10 * r.maxPrism) / Math.abs(r.sphere), 9);
    }
  });
});
