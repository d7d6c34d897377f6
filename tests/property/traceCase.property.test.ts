/**
 * readTraceCase (src/case/lensCase.ts) over random inputs: an invalid value in any one field
 * always gives an InputError whose message names that field; never NaN, never a raw exception.
 * Random in-range inputs give either a usable case (finite answers) or an InputError.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { InputError } from '../../src/case/input.ts';
import { type FieldKey, LIMITS, type RawFields, readTraceCase } from '../../src/case/lensCase.ts';
import { fourAnswers } from '../../src/optics/index.ts';

// Source: DEVELOPERS.md house rules (errors "each naming the value and the reason"; "No NaN or
// Infinity reaches a screen or a file") and the errors-name-the-argument habit of mathjs. Labels carry brackets so one field's label is never part of another's.
const label = (k: FieldKey): string => `«${k}»`;

type Q = 'power' | 'angle' | 'length' | 'plain';
const numeric: { key: FieldKey; q: Q; range: { min: number; max: number; above?: boolean } }[] = [
  { key: 'sphere', q: 'power', range: LIMITS.sphere },
  { key: 'cyl', q: 'power', range: LIMITS.cyl },
  { key: 'axis', q: 'angle', range: LIMITS.axis },
  { key: 'index', q: 'plain', range: LIMITS.index },
  { key: 'abbe', q: 'plain', range: LIMITS.abbe },
  { key: 'front', q: 'power', range: LIMITS.front },
  { key: 'base', q: 'power', range: LIMITS.front },
  { key: 'toolIndex', q: 'plain', range: LIMITS.toolIndex },
  { key: 'ct', q: 'length', range: LIMITS.ct },
  { key: 'minEdge', q: 'length', range: LIMITS.minEdge },
  { key: 'minCt', q: 'length', range: LIMITS.minCt },
  { key: 'diameter', q: 'length', range: LIMITS.diameter },
  { key: 'frontK', q: 'plain', range: LIMITS.conic },
  { key: 'backK', q: 'plain', range: LIMITS.conic },
  { key: 'x', q: 'length', range: LIMITS.point },
  { key: 'y', q: 'length', range: LIMITS.point },
  { key: 'cr', q: 'length', range: LIMITS.cr },
];

/** A valid starting case (our own invented scenario); one field at a time is then spoiled. */
function baseFor(key: FieldKey): RawFields {
  const f: RawFields = { sphere: '-2.00', cyl: '-0.50', axis: '90', eye: 'R', x: '2 mm', y: '-3' };
  if (key === 'toolIndex') f.base = '6';
  return f;
}

/** Text that cannot start a number (after trimming), so readNumber must refuse it. */
const notANumber = fc.oneof(
  fc.string({ maxLength: 12 }).filter((s) => !/^\s*[+-]?(\d|\.\d)/.test(s) && s !== ''),
  fc.constantFrom('abc', 'NaN', 'Infinity', '-Infinity', 'two', ' ', '\t', '1,5', '--1', '+-2', 'e5', '.', '1e999', '-1e400', '0x1A', '1/2'),
);
const badType = fc.constantFrom<unknown>(true, false, {}, [], [1], { value: 1 }, NaN, Infinity, -Infinity);
const wrongUnit: Record<Q, fc.Arbitrary<string>> = {
  power: fc.constantFrom('2 mm', '1 cm', '3 deg', '0.5 m', '2 pd', '1 Δ'),
  angle: fc.constantFrom('90 rad', '45 mm', '2 D', '30 grad'),
  length: fc.constantFrom('2 D', '3 deg', '4 in', '5 px', '1 pd', '2 km'),
  plain: fc.constantFrom('1.5 mm', '2 D', '1 cm', '3 deg'),
};
function outOfRange(r: { min: number; max: number; above?: boolean }): fc.Arbitrary<unknown> {
  const span = r.max - r.min;
  const lo = fc.double({ min: r.min - 10 * span, max: r.min, noNaN: true }).filter((v) => (r.above ? v <= r.min : v < r.min));
  const hi = fc.double({ min: r.max, max: r.max + 10 * span, noNaN: true }).filter((v) => v > r.max);
  return fc.oneof(lo, hi, lo.map(String), hi.map((v) => `${v}`));
}

/** The call must throw an InputError naming `key`, with no NaN of its own making. */
function expectNamedError(fields: RawFields, key: FieldKey, raw: unknown): void {
  let err: unknown;
  try {
    readTraceCase(fields, label);
  } catch (e) {
    err = e;
  }
  expect(err, `no error for ${key} = ${String(raw)}`).toBeInstanceOf(InputError);
  const msg = (err as InputError).message;
  expect(msg, msg).toContain(label(key));
  if (!String(raw).includes('NaN')) expect(msg).not.toContain('NaN');
  expect((err as InputError).field).toBe(label(key));
}

describe('readTraceCase: an invalid value in one field is refused with an error naming that field', () => {
  for (const { key, q, range } of numeric) {
    test(`numeric field ${key}`, () => {
      fc.assert(
        fc.property(fc.oneof(notANumber, badType, wrongUnit[q], outOfRange(range)), (raw) => {
          expectNamedError({ ...baseFor(key), [key]: raw }, key, raw);
        }),
        { numRuns: 120, seed: key.length * 31 },
      );
    });
  }

  const enumerated: { key: FieldKey; ok: RegExp }[] = [
    { key: 'eye', ok: /^(r|l|right|left|od|os)$/i },
    { key: 'cylOn', ok: /^(back|front)$/i },
    { key: 'toric', ok: /^(tyre|barrel)$/i },
    { key: 'material', ok: /^(resin-1\.50|crown-1\.52|resin-1\.53|resin-1\.56|polycarbonate|resin-1\.60|resin-1\.67|resin-1\.74)$/i },
    { key: 'frontRule', ok: /^vogel$/i },
  ];
  for (const { key, ok } of enumerated) {
    test(`choice field ${key}`, () => {
      const raws = fc.oneof(
        fc.string({ maxLength: 10 }).filter((s) => s !== '' && !ok.test(s.trim()) && !s.trim().toLowerCase().startsWith('steps:')),
        fc.constantFrom<unknown>('X', 'both', 'torus', 'glass', 'steps:', 'steps:abc', 'steps:1=abc', 'steps:=', 'steps:1=2,x', 42, true),
      ).filter((s) => !(typeof s === 'string' && ok.test(s.trim())));
      fc.assert(
        fc.property(raws, (raw) => {
          expectNamedError({ ...baseFor(key), [key]: raw }, key, raw);
        }),
        { numRuns: 100, seed: 5 },
      );
    });
  }

  test('conflicting fields are refused by name (index with material; ct with a thickness rule; two front curves)', () => {
    expectNamedError({ ...baseFor('index'), index: '1.6', material: 'polycarbonate' }, 'index', '');
    expectNamedError({ ...baseFor('ct'), ct: '3', minEdge: '1' }, 'ct', '');
    expectNamedError({ ...baseFor('base'), front: '4', base: '5' }, 'base', '');
    expectNamedError({ sphere: '' }, 'sphere', '');
  });
});

describe('readTraceCase: random in-range inputs give a usable case or an InputError, nothing else', () => {
  const inRange = (r: { min: number; max: number }): fc.Arbitrary<number> => fc.double({ min: r.min, max: r.max, noNaN: true });
  test('finite answers or a named refusal', () => {
    let usable = 0, refused = 0;
    fc.assert(
      fc.property(
        fc.record(
          {
            sphere: inRange(LIMITS.sphere), cyl: inRange(LIMITS.cyl), axis: inRange(LIMITS.axis),
            index: fc.double({ min: 1.01, max: 2.2, noNaN: true }), front: inRange(LIMITS.front),
            ct: fc.double({ min: 0.01, max: 30, noNaN: true }), diameter: inRange(LIMITS.diameter),
            frontK: inRange(LIMITS.conic), backK: inRange(LIMITS.conic), x: inRange(LIMITS.point),
            y: inRange(LIMITS.point), cr: inRange(LIMITS.cr), eye: fc.constantFrom('R', 'L'),
            cylOn: fc.constantFrom('back', 'front'), toric: fc.constantFrom('tyre', 'barrel'),
          },
          { requiredKeys: ['sphere'] },
        ),
        (f) => {
          let out: ReturnType<typeof readTraceCase> | undefined;
          try {
            out = readTraceCase(f as RawFields, label);
          } catch (e) {
            expect(e).toBeInstanceOf(InputError);
            const msg = (e as InputError).message;
            // it names a field: one that was given, or one whose default was used (e.g. the
            // default diameter when no lens of the given form can span it)
            const keys = [...Object.keys(f), 'diameter', 'minEdge', 'minCt', 'frontRule'];
            expect(keys.some((k) => msg.includes(label(k as FieldKey))), msg).toBe(true);
            expect(msg).not.toContain('NaN');
            refused++;
            return;
          }
          const a = fourAnswers(out.lens, out.tc.crMm, out.tc.xMm, out.tc.yMm, out.tc.eye);
          const nums = JSON.stringify(a, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? `BAD ${v}` : v));
          expect(nums).not.toContain('BAD');
          usable++;
        },
      ),
      { numRuns: 300, seed: 17 },
    );
    // both branches are exercised
    expect(usable).toBeGreaterThan(30);
    expect(refused).toBeGreaterThan(30);
  });
});
