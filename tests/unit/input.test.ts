/**
 * readNumber and inRange (src/case/input.ts): units converted, never silently dropped, and
 * errors that name the field and the reason.
 */
import { describe, expect, test } from 'vitest';
import { InputError, inRange, readNumber } from '../../src/case/input.ts';

// Source: docs/conventions.md, "Units" ("a value given in cm is converted, never taken as
// mm"); SI prefixes (1 cm = 10 mm, 1 m = 1000 mm); errors that name the value and the reason
// (DEVELOPERS.md, "A miss is a status, not an exception"; the habit of mathjs).

/** Run f and return the InputError it throws (fails the test if it throws nothing else). */
function refusal(f: () => unknown): InputError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  throw new Error('expected an InputError, got a value');
}

describe('readNumber: lengths in mm, cm and m', () => {
  test.each([
    ['0.25 cm', 2.5],
    ['0.25cm', 2.5],
    ['2.5 mm', 2.5],
    ['2.5', 2.5],
    ['0.0025 m', 2.5],
    ['-3 mm', -3],
    ['+1.5 CM', 15],
    ['  4 mm ', 4],
    ['.5 cm', 5],
    ['2e1 mm', 20],
  ] as const)('%s -> %f mm', (raw, mm) => {
    expect(readNumber('--x', raw, 'length')).toBeCloseTo(mm, 12);
  });

  test('a number is taken as it is (already in the engine unit)', () => {
    expect(readNumber('--x', 2.5, 'length')).toBe(2.5);
  });
});

describe('readNumber: other quantities', () => {
  test('powers accept D, angles deg or °, prism Δ or pd', () => {
    expect(readNumber('--sphere', '-2.25 D', 'power')).toBe(-2.25);
    expect(readNumber('--sphere', '+4.00', 'power')).toBe(4);
    expect(readNumber('--axis', '90°', 'angle')).toBe(90);
    expect(readNumber('--axis', '45 deg', 'angle')).toBe(45);
    expect(readNumber('--prism', '2 Δ', 'prism')).toBe(2);
    expect(readNumber('--prism', '1.5pd', 'prism')).toBe(1.5);
  });

  test('a unit of the wrong kind is refused, naming the field and the unit', () => {
    const e = refusal(() => readNumber('--sphere', '2.5 cm', 'power'));
    expect(e.message).toContain('--sphere');
    expect(e.message).toContain('cm');
    expect(refusal(() => readNumber('--ct', '3 D', 'length')).message).toContain('--ct');
    expect(refusal(() => readNumber('--index', '1.5 mm', 'plain')).message).toContain('--index');
  });
});

describe('readNumber: refusals name the field, never NaN', () => {
  test.each([
    ['abc'], ['NaN'], [''], ['   '], ['1,5'], ['1.2.3'], ['mm'], ['1e999'], ['--2'],
  ] as const)("'%s' is refused", (raw) => {
    const e = refusal(() => readNumber('centre thickness', raw, 'length'));
    expect(e.field).toBe('centre thickness');
    expect(e.message.startsWith('centre thickness: ')).toBe(true);
    expect(e.reason.length).toBeGreaterThan(5);
    if (raw !== 'NaN') expect(e.message).not.toContain('NaN');
  });

  test('"abc" error names the field and quotes the value', () => {
    const e = refusal(() => readNumber('--front', 'abc', 'power'));
    expect(e.message).toContain('--front');
    expect(e.message).toContain("'abc'");
    expect(e.message).toContain('dioptres');
  });

  test.each([[NaN], [Infinity], [-Infinity], [null], [undefined], [true], [{}], [[2]]] as const)('%s is refused', (raw) => {
    expect(refusal(() => readNumber('--y', raw, 'length')).field).toBe('--y');
  });
});

describe('inRange', () => {
  test('inside passes; outside names the field, the range and the value', () => {
    expect(inRange('--cr', 27, { min: 5, max: 60 })).toBe(27);
    const e = refusal(() => inRange('--cr', 70, { min: 5, max: 60, unit: 'mm' }));
    expect(e.message).toBe('--cr: must be between 5 and 60 mm, got 70');
    expect(refusal(() => inRange('--index', 1, { min: 1, above: true })).message).toContain('greater than 1');
    expect(inRange('--index', 1.0001, { min: 1, above: true })).toBe(1.0001);
    expect(refusal(() => inRange('--ct', NaN, { min: 0, max: 30 })).field).toBe('--ct');
  });
});
