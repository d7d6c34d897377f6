/** Inclusive ranges of values, as people type them (START:STOP:STEP). No Node or DOM here. */
import { InputError } from './input.ts';

/**
 * The values of an inclusive range start..stop by step: the count is exact, and each value
 * is rounded to the inputs' decimals (0.1 steps give 0.3, not 0.30000000000000004).
 * Errors name `field` (or `stepField` for the step).
 */
export function rangeValues(field: string, a: number, b: number, s: number, stepField = field): number[] {
  const what = stepField === field ? 'step ' : '';
  if (s === 0 && a !== b) throw new InputError(stepField, `${what}must not be 0`);
  if (a !== b && Math.sign(b - a) !== Math.sign(s)) throw new InputError(stepField, `${what}${s} does not lead from ${a} to ${b}`);
  const n = a === b ? 1 : Math.floor((b - a) / s + 1e-9) + 1;
  if (n > 100000) throw new InputError(field, `gives ${n} values; at most 100000`);
  const dec = Math.min(10, Math.max(...[a, b, s].map((v) => (String(v).split('.')[1] ?? '').length)));
  return Array.from({ length: n }, (_, i) => Number((a + i * s).toFixed(dec)));
}
