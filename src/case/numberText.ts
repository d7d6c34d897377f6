/**
 * A number for people, the one rule the command line, the app and the printed pages share:
 * fixed decimals, '—' where there is no finite value (never NaN or Infinity), no "-0.00".
 */

export const DASH = '—';

export function fixed(v: number | null | undefined, decimals = 2): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return DASH;
  const s = v.toFixed(decimals);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}
