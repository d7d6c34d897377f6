/**
 * Reading numbers from people: a field name, a raw value (number or text, optionally with a
 * unit), and a clear error that names the field and the reason. Used by the CLI and the UI.
 *
 * Lengths accept "2.5", "2.5 mm", "0.25 cm" or "0.0025 m" and are returned in mm: a value
 * typed in cm is converted, never silently taken as mm. Powers accept an optional "D",
 * angles an optional "deg" or "°", prism an optional "Δ" or "pd".
 */

export class InputError extends Error {
  constructor(
    /** the field or flag, as the person knows it ("--ct", "centre thickness") */
    readonly field: string,
    /** why it was refused */
    readonly reason: string,
  ) {
    super(`${field}: ${reason}`);
    this.name = 'InputError';
  }
}

export type Quantity = 'length' | 'power' | 'angle' | 'prism' | 'plain';

const UNIT_FACTORS: Record<Quantity, Record<string, number>> = {
  length: { '': 1, mm: 1, cm: 10, m: 1000 },
  power: { '': 1, d: 1, dpt: 1 },
  angle: { '': 1, deg: 1, '°': 1 },
  prism: { '': 1, 'δ': 1, '∆': 1, pd: 1 },
  plain: { '': 1 },
};

const UNIT_NAMES: Record<Quantity, string> = {
  length: 'millimetres (or a value with mm, cm or m)',
  power: 'dioptres',
  angle: 'degrees',
  prism: 'prism dioptres',
  plain: 'a plain number',
};

const NUMBER_WITH_UNIT = /^([+-]?(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?)\s*([a-zA-Z°Δ∆]*)$/;

/** A finite number from a number or text, converted to the engine's unit for its quantity. */
export function readNumber(field: string, raw: unknown, quantity: Quantity = 'plain'): number {
  if (typeof raw === 'number') {
    if (!Number.isFinite(raw)) throw new InputError(field, `must be a finite number, got ${String(raw)}`);
    return raw;
  }
  if (typeof raw !== 'string' || raw.trim() === '') {
    throw new InputError(field, `needs a number in ${UNIT_NAMES[quantity]}`);
  }
  const m = NUMBER_WITH_UNIT.exec(raw.trim());
  if (!m) throw new InputError(field, `must be a number in ${UNIT_NAMES[quantity]}, got '${clip(raw)}'`);
  const unit = m[2]!.toLowerCase();
  const factor = UNIT_FACTORS[quantity][unit];
  if (factor === undefined) {
    throw new InputError(field, `unit '${m[2]}' is not accepted here; give ${UNIT_NAMES[quantity]}`);
  }
  const v = Number(m[1]) * factor;
  if (!Number.isFinite(v)) throw new InputError(field, `must be a finite number, got '${clip(raw)}'`);
  return v;
}

export interface Range {
  min?: number;
  max?: number;
  /** min itself is not allowed */
  above?: boolean;
  unit?: string;
}

/** Check a number against a range; the message says what was expected. */
export function inRange(field: string, v: number, r: Range): number {
  const low = r.min === undefined ? undefined : r.above ? !(v > r.min) : !(v >= r.min);
  const high = r.max === undefined ? undefined : !(v <= r.max);
  if (low || high) throw new InputError(field, `must be ${describeRange(r)}, got ${v}`);
  return v;
}

/** "between 0 and 30 mm", "greater than 1", "greater than 0 and at most 30 mm". */
export function describeRange(r: Range): string {
  const u = r.unit ? ` ${r.unit}` : '';
  if (r.min !== undefined && r.max !== undefined) {
    return r.above ? `greater than ${r.min} and at most ${r.max}${u}` : `between ${r.min} and ${r.max}${u}`;
  }
  if (r.min !== undefined) return `${r.above ? 'greater than' : 'at least'} ${r.min}${u}`;
  if (r.max !== undefined) return `at most ${r.max}${u}`;
  return 'a finite number';
}

function clip(s: string): string {
  return s.length > 40 ? `${s.slice(0, 37)}...` : s;
}
