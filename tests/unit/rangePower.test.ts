/**
 * Range tables with power bounds (src/case/range.ts, docs/range.md "Limits by power"): the
 * columns appear only when asked, each bound's limit is the engine's boundedLimit, and the
 * row's bounded limit is the smallest of its bounds, named. Behaviour of the table; the
 * limits themselves are checked against Coddington's equations in
 * tests/reference/powerLimits.test.ts.
 */
import { describe, expect, test } from 'vitest';
import { POWER_COLUMNS, RANGE_COLUMNS, rangeCsv, rangeJson, rangeMarkdown, rangeRows, readRangeSpec } from '../../src/case/range.ts';
import { InputError } from '../../src/case/input.ts';

const base = { power: '-8,-4,-2', dir: 'nasal,up', maxPrism: '1,10', fields: { material: 'resin-1.60', ct: '2', diameter: '65' } };

describe('range rows with power bounds', () => {
  test('without power bounds the contract is unchanged', () => {
    const rows = rangeRows(readRangeSpec(base));
    expect(Object.keys(JSON.parse(rangeJson(rows))[0])).toEqual([...RANGE_COLUMNS]);
    expect(rangeCsv(rows).split('\n')[0]).toBe(RANGE_COLUMNS.join(','));
  });

  test('with them: six more columns; bounded is the smallest limit and names its bound', () => {
    const rows = rangeRows(readRangeSpec({ ...base, maxMeanError: '0.25', maxAstigmatism: '0.25' }));
    const json = JSON.parse(rangeJson(rows)) as Record<string, number | string | null>[];
    expect(Object.keys(json[0]!)).toEqual([...RANGE_COLUMNS, ...POWER_COLUMNS]);
    let named = new Set<string>();
    for (const r of json) {
      const limits: [string, number | null][] = [
        ['prism', r.limitedBy === 'prism' ? (r.exact as number) : null],
        ['mean-error', r.meanErrorLimit as number | null],
        ['astigmatism', r.astigmatismLimit as number | null],
      ];
      const reached = limits.filter(([, v]) => v !== null) as [string, number][];
      if (reached.length === 0) {
        expect(r.bounded).toBeNull();
        continue;
      }
      const min = Math.min(...reached.map(([, v]) => v));
      expect(r.bounded).toBe(min);
      expect(reached.find(([, v]) => v === min)![0]).toBe(r.boundedBy);
      named.add(r.boundedBy as string);
    }
    // this family has rows ended by the prism and by a power bound
    expect(named.has('prism')).toBe(true);
    expect(named.has('astigmatism') || named.has('mean-error')).toBe(true);
    expect(rangeCsv(rows).split('\n')[0]).toBe([...RANGE_COLUMNS, ...POWER_COLUMNS].join(','));
    expect(rangeMarkdown(rows).split('\n')[0]).toContain('within all bounds mm');
  });

  test('a bad bound is refused naming the flag', () => {
    expect(() => readRangeSpec({ ...base, maxAstigmatism: '-1' })).toThrow(InputError);
    expect(() => readRangeSpec({ ...base, maxMeanError: 'abc' })).toThrow(/--max-mean-error/);
  });
});
