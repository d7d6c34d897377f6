/**
 * Numbers for people: fixed decimals, a unit on every number, and never NaN or Infinity
 * (a value that is not finite is shown as a dash with a reason nearby).
 */
import type { SpheroCyl } from '../optics/index.ts';

import { DASH, fixed as num } from '../case/numberText.ts';

export { DASH, num };

/** Signed, as the trade writes powers: +8.00, -1.25, 0.00. */
export function signed(v: number, decimals = 2): string {
  if (!Number.isFinite(v)) return DASH;
  const s = num(v, decimals);
  return v > 0 && Number(s) !== 0 ? `+${s}` : s;
}

export function withUnit(v: number, unit: string, decimals = 2): string {
  const s = num(v, decimals);
  return s === DASH ? s : unit === '°' ? `${s}°` : `${s} ${unit}`;
}

export function dioptres(v: number, decimals = 2): string {
  const s = signed(v, decimals);
  return s === DASH ? s : `${s} D`;
}

export function spheroCyl(sc: SpheroCyl): string {
  if (Math.abs(sc.cylD) < 0.005) return `${signed(sc.sphereD)} DS`;
  return `${signed(sc.sphereD)} / ${signed(sc.cylD)} × ${num(sc.axisDeg, 0)}°`;
}

/** A finite number or null, for data attributes and charts. */
export function finiteOrNull(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}
