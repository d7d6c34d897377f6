/**
 * The range module (src/case/range.ts) and `decentra limits` for a table: validation that
 * names the flag, the row contract (keys, nulls with reasons, no NaN), readable decimals, the
 * largest makeable diameter, and the one-lens JSON contract with "limitedBy".
 */
import { describe, expect, test } from 'vitest';
import {
  RANGE_COLUMNS, breakdown, clearRangeCache, breakdownCsv, breakdownMarkdown, rangeCsv, rangeJson, rangeLenses, rangeMarkdown, rangeRows,
  readRangeSpec, readValueList,
} from '../../src/case/range.ts';
import { flagOf } from '../../src/case/flags.ts';
import { InputError } from '../../src/case/input.ts';
import { buildLens, readLensForm } from '../../src/case/lensCase.ts';
import { run } from '../../src/cli/main.ts';

const err = (f: () => unknown): string => {
  try { f(); } catch (e) { if (e instanceof InputError) return e.message; throw e; }
  throw new Error('no error');
};

describe('reading a range', () => {
  test('values, lists and ranges (items may mix); the count of a range is exact', () => {
    expect(readValueList('--cyl', '0:-2:-0.5', 'power')).toEqual([0, -0.5, -1, -1.5, -2]);
    expect(readValueList('--power', '-1,0:0.3:0.1,4', 'power')).toEqual([-1, 0, 0.1, 0.2, 0.3, 4]);
    expect(readValueList('--power', 2, 'power')).toEqual([2]);
  });
  test('errors name the flag and say why', () => {
    const base = { power: '0:2:1', maxPrism: '0.5', fields: {} };
    expect(err(() => readRangeSpec({ ...base, cyl: '0,,-1' }))).toMatch(/^--cyl: has an empty item/);
    expect(err(() => readRangeSpec({ ...base, cyl: '0:-2:0.5' }))).toMatch(/^--cyl: step 0.5 does not lead from 0 to -2/);
    expect(err(() => readRangeSpec({ ...base, dir: 'nasal,sideways' }))).toMatch(/^--dir: 'sideways' is not a direction: use nasal, temporal, up, down/);
    expect(err(() => readRangeSpec({ ...base, maxPrism: '0.5,0' }))).toMatch(/^--max-prism: must be greater than 0 and at most 50 Δ, got 0/);
    expect(err(() => readRangeSpec({ ...base, maxPrism: undefined }))).toMatch(/^--max-prism: is required/);
    expect(err(() => readRangeSpec({ ...base, power: '-40:0:1' }))).toMatch(/^--power: must be between -30 and 30 D, got -40/);
    expect(err(() => readRangeSpec({ ...base, axis: '200' }))).toMatch(/^--axis: must be between 0 and 180 degrees/);
    expect(err(() => readRangeSpec({ ...base, decimals: '2.5' }))).toMatch(/^--decimals: must be a whole number/);
    expect(err(() => readRangeSpec({ ...base, fields: { material: 'glass-9' } }))).toMatch(/^--material: unknown material 'glass-9'/);
    // another labeller (the app's field names)
    expect(err(() => readRangeSpec({ ...base, cyl: 'x' }, (k) => `range ${k}`))).toMatch(/^range cyl: must be a number in dioptres/);
  });
  test('one row per sphere x cyl x axis x direction x tolerance, in that order', () => {
    const spec = readRangeSpec({ power: '-2,2', cyl: '0,-1', axis: '10,100', dir: 'nasal,up,45', maxPrism: '0.25,0.5', fields: {} });
    const rows = rangeRows(spec);
    expect(rows).toHaveLength(2 * 2 * 2 * 3 * 2);
    expect(rows.slice(0, 3).map((r) => [r.sphere, r.cyl, r.axis, r.direction, r.maxPrism])).toEqual([
      [-2, 0, 10, 'nasal', 0.25], [-2, 0, 10, 'nasal', 0.5], [-2, 0, 10, 'up', 0.25],
    ]);
    expect(rows[6]!.axis).toBe(100);
    expect(rangeLenses(spec)).toHaveLength(8);
    // a share of the lenses (a worker's) gives exactly those rows
    const some = rangeRows(spec, { lenses: [3, 5] });
    expect(some).toEqual([...rows.slice(3 * 6, 4 * 6), ...rows.slice(5 * 6, 6 * 6)]); // 3 directions x 2 tolerances a lens
  });
});

describe('rows', () => {
  const spec = readRangeSpec({ power: '-20,0,6,14', cyl: '0', dir: 'nasal', maxPrism: '0.5,30', fields: {} });
  const rows = rangeRows(spec);
  test('keys of the JSON contract, in order; full precision; never NaN or Infinity', () => {
    const j = JSON.parse(rangeJson(rows));
    expect(Array.isArray(j)).toBe(true);
    for (const r of j) expect(Object.keys(r)).toEqual([...RANGE_COLUMNS]);
    expect(RANGE_COLUMNS.slice(0, 15)).toEqual(['sphere', 'cyl', 'axis', 'direction', 'dirDeg', 'maxPrism', 'exact', 'firstOrder', 'prentice',
      'focimeter', 'limitedBy', 'front', 'ct', 'edge', 'diameter']);
    expect(rangeJson(rows)).not.toMatch(/NaN|Infinity/);
    const six = j.find((r: any) => r.sphere === 6 && r.maxPrism === 0.5);
    expect(String(six.exact).length).toBeGreaterThan(8); // not rounded
  });
  test('every null has a reason; a lens that cannot be made gives the largest diameter that can', () => {
    for (const r of rows) {
      const nulls = (['exact', 'firstOrder', 'prentice', 'focimeter'] as const).filter((k) => r[k] === null);
      if (nulls.length) expect(r.reason).not.toBe('ok');
      else expect(r.reason).toBe('ok');
    }
    const far = rows.find((r) => r.sphere === 0 && r.maxPrism === 30)!;
    expect(far.exact).toBeNull();
    expect(far.limitedBy).toBe('edge');
    expect(far.reason).toMatch(/the exact prism at the eye stays within 30 Δ until the ray leaves through the lens edge/);
    const high = rows.find((r) => r.sphere === 14)!;
    expect(high.limitedBy).toBe('lens');
    expect(high.reason).toMatch(/^no lens: --diameter: no lens of this form spans a 65 mm diameter.*the largest diameter at which this power can be made is/);
    // the claim, checked by building the lens: at the largest diameter it can be made, 0.5 mm more it cannot
    const d = high.maxDiameter!;
    expect(d).toBeGreaterThan(10);
    expect(d).toBeLessThan(65);
    expect(() => buildLens(readLensForm({ sphere: 14, diameter: String(d) }, flagOf), flagOf)).not.toThrow();
    expect(() => buildLens(readLensForm({ sphere: 14, diameter: String(d + 0.5) }, flagOf), flagOf)).toThrow(InputError);
  });
  test('rows do not depend on the order lenses are computed in (a worker’s share, the remembered diameters)', () => {
    const s = readRangeSpec({ power: '9:16:0.5', cyl: '0,-2', maxPrism: '0.5', fields: {} });
    clearRangeCache();
    const forward = rangeRows(s);
    clearRangeCache();
    const n = rangeLenses(s).length;
    const backward = Array.from({ length: n }, (_, i) => n - 1 - i).map((i) => rangeRows(s, { lenses: [i] })).reverse().flat();
    expect(backward).toEqual(forward);
    expect(forward.filter((r) => r.maxDiameter !== null).length).toBeGreaterThan(5);
  });
  test('CSV and Markdown: computed values to --decimals, inputs as given, no 17-digit numbers', () => {
    const csv = rangeCsv(rows, 2);
    expect(csv.split('\n')[0]).toBe(RANGE_COLUMNS.join(','));
    expect(csv).not.toMatch(/\d\.\d{3,}/);
    expect(rangeCsv(rows, 4)).toMatch(/,\d+\.\d{4},/);
    const md = rangeMarkdown(rows, 1);
    expect(md.split('\n')).toHaveLength(2 + rows.length);
    expect(md).toMatch(/\| exact mm \|/);
    expect(md).toMatch(/no limit by Prentice's rule/);
    expect(md).not.toMatch(/\| -?\d+\.\d{2,} \|/); // cells; the notes' words keep their own numbers
  });
  test('a fixed --front or --ct applies to every lens of the range', () => {
    const r = rangeRows(readRangeSpec({ power: '-3,3', maxPrism: '1', fields: { front: '5', ct: '4', diameter: '50' } }));
    expect(r.map((x) => [x.front, x.ct, x.diameter])).toEqual([[5, 4, 50], [5, 4, 50]]);
  });
});

describe('breakdown', () => {
  test('a grid over sphere x decentration and a table per level; files with the levels', () => {
    const spec = readRangeSpec({ power: '-8:-4:2', maxPrism: '0.5', fields: {} });
    const b = breakdown(spec, [5, 10], { decentrationsMm: [2, 4, 40] });
    expect(b.percent).toHaveLength(3);
    expect(b.percent[0]).toHaveLength(3);
    expect(b.percent[0]![2]).toBeNull(); // 40 mm is beyond the 65 mm lens
    expect(b.rows.map((r) => r.within.length)).toEqual([2, 2, 2]);
    for (const r of b.rows) if (r.within[0] !== null && r.within[1] !== null) expect(r.within[0]).toBeLessThanOrEqual(r.within[1]!);
    expect(breakdownCsv(b).split('\n')[0]).toBe('sphere,within5pct_mm,within5pct_end,within10pct_mm,within10pct_end,reason');
    expect(breakdownMarkdown(b)).toMatch(/\| sphere D \| within 5 % \(mm\) \| within 10 % \(mm\) \|/);
  });
});

describe('decentra limits', () => {
  test('one lens --json keeps its keys, adds limitedBy per answer and a reason for every null', () => {
    const j = JSON.parse(run(['limits', '--sphere', '0', '--max-prism', '0.5', '--json']).out);
    expect(Object.keys(j)).toEqual(expect.arrayContaining(['exact', 'prentice', 'paraxial', 'difference', 'maxPrism', 'direction', 'reason', 'limitedBy', 'focimeter']));
    expect(j.prentice).toBeNull();
    expect(j.limitedBy).toEqual({ exact: 'prism', paraxial: 'prism', prentice: 'none', focimeter: expect.any(String) });
    expect(j.reason).toMatch(/no limit by Prentice's rule/);
  });
  test('a table from lists; --format json is an array of rows; md a Markdown table; words for directions', () => {
    const r = run(['limits', '--power', '-4:4:4', '--cyl', '0,-1', '--axis', '30', '--dir', 'nasal,temporal', '--max-prism', '0.5,1', '--eye', 'L', '--format', 'json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j).toHaveLength(3 * 2 * 2 * 2);
    expect(j.filter((x: any) => x.direction === 'nasal').every((x: any) => x.dirDeg === 180)).toBe(true);
    const md = run(['limits', '--sphere', '2', '--dir', 'up,down', '--max-prism', '0.5', '--format', 'md', '--decimals', '1']);
    expect(md.out.split('\n')).toHaveLength(4);
  });
  test('--breakdown prints the breakdown table of the same module, in each format', () => {
    const argv = ['limits', '--power', '-10:-6:2', '--dir', 'nasal', '--breakdown', '5,10'];
    const b = breakdown(readRangeSpec({ power: '-10:-6:2', dir: 'nasal', maxPrism: '1', fields: {} }), [5, 10]);
    expect(run([...argv, '--format', 'csv']).out).toBe(breakdownCsv(b, 2));
    expect(run([...argv, '--format', 'md']).out).toBe(breakdownMarkdown(b, 2));
    const j = JSON.parse(run([...argv, '--format', 'json']).out);
    expect(j.rows.map((r: any) => r.within)).toEqual(b.rows.map((r) => r.within));
    expect(j.percent).toHaveLength(3);
    expect(run(['limits', '--power', '-10:-6:2', '--breakdown', '5,0']).err).toMatch(/^decentra limits: --breakdown: must be greater than 0/);
  });
  test('bad lists exit 2 with one line naming the flag', () => {
    const r = run(['limits', '--power', '-4:4:0', '--max-prism', '0.5']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/^decentra limits: --power: step must not be 0$/);
    expect(run(['limits', '--sphere', '1', '--max-prism', '0.5', '--format', 'md']).err).toMatch(/--format: is for a range table/);
  });
});
