/**
 * The app's decimal comma (src/ui/numberInput.ts, decimalPoint and readTypedNumber;
 * docs/visualiser.md, "Decimal comma"). ISO 80000-1 (from memory: "the decimal sign is
 * either the comma on the line or the point on the line") makes "4,5" and "4.5" the same
 * number; text that could be read two ways (a comma and a point, several commas) is refused
 * with a hint naming the field, never guessed.
 */
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/case/input.ts';
import { decimalPoint, readTypedNumber } from '../../src/ui/numberInput.ts';

describe('decimalPoint', () => {
  it('reads a decimal comma as the point (ISO 80000-1)', () => {
    expect(readTypedNumber('sphere', '4,5', 'power')).toBe(4.5);
    expect(readTypedNumber('sphere', '-0,25', 'power')).toBe(-0.25);
    expect(readTypedNumber('sphere', '+6,50 D', 'power')).toBe(6.5);
    expect(readTypedNumber('ct', '0,25 cm', 'length')).toBe(2.5);
    expect(readTypedNumber('ct', ',5', 'length')).toBe(0.5);
    expect(decimalPoint('ct', '2,5 mm')).toBe('2.5 mm');
  });

  it('leaves text without a comma as it is', () => {
    expect(decimalPoint('x', '4.5')).toBe('4.5');
    expect(decimalPoint('x', 'abc')).toBe('abc');
    expect(readTypedNumber('x', '4.5', 'plain')).toBe(4.5);
  });

  it.each([
    ['1,234.5', 'both a comma and a point'],
    ['1.234,5', 'both a comma and a point'],
    ['4,5,6', 'more than one comma'],
    ['1,,5', 'more than one comma'],
  ])('refuses %s with a hint naming the field', (raw, hint) => {
    let err: unknown;
    try {
      readTypedNumber('Sphere (D)', raw, 'power');
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(InputError);
    expect((err as InputError).field).toBe('Sphere (D)');
    expect((err as InputError).message).toContain(hint);
    expect((err as InputError).message).toContain(raw);
  });

  it('a comma that is not a decimal mark is still refused by the number reader', () => {
    expect(() => readTypedNumber('axis', '4,', 'angle')).not.toThrow();
    expect(() => readTypedNumber('axis', 'a,b', 'angle')).toThrow(InputError);
  });
});
