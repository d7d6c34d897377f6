/**
 * Words for the "both eyes" views: prisms with their base in words and in 360° notation,
 * positions as nasal/temporal and up/down for each eye, the pair's values and the verdicts.
 * Sign conventions (shared/DESIGN.md §4, §6, §8): x towards the wearer's left, y up; for the
 * right eye +x is nasal, for the left eye -x; net horizontal > 0 is base in; vertical
 * imbalance is right minus left, > 0 the right eye base up. Every number has its unit and
 * goes through format.ts (a dash, never NaN or Infinity).
 */
import { type Answer, type PrismDescription, type Verdict, prismWords } from '../../optics/index.ts';

export { prismWords };
import { num } from '../format.ts';
import type { Side } from './form.ts';

export function isFailed(a: Answer): a is { failure: 'miss' | 'tir' | 'geometry' | 'edge'; message: string } {
  return 'failure' in a;
}


/** 360° notation: "8.88 Δ base 305.3°". */
export function prism360(p: PrismDescription): string {
  if (num(p.magnitude) === '0.00') return '0.00 Δ';
  return `${num(p.magnitude)} Δ base ${num(p.baseAngle, 1)}°`;
}

export function nasalSign(side: Side): 1 | -1 {
  return side === 'right' ? 1 : -1;
}

/** "5.24 mm nasal, 7.12 mm down" (x, y in the wearer frame, mm). */
export function offsetWords(x: number, y: number, side: Side, decimals = 2): string {
  const parts: string[] = [];
  if (num(Math.abs(x), decimals) !== num(0, decimals)) parts.push(`${num(Math.abs(x), decimals)} mm ${x * nasalSign(side) > 0 ? 'nasal' : 'temporal'}`);
  if (num(Math.abs(y), decimals) !== num(0, decimals)) parts.push(`${num(Math.abs(y), decimals)} mm ${y > 0 ? 'up' : 'down'}`);
  return parts.length ? parts.join(', ') : 'at it';
}

/** An eye's change of rotation: "2.83° outwards (temporal), 3.89° up". */
export function rotationWords(h: number, v: number, side: Side): string {
  const parts: string[] = [];
  if (num(Math.abs(h)) !== '0.00') parts.push(`${num(Math.abs(h))}° ${h * nasalSign(side) > 0 ? 'inwards (nasal)' : 'outwards (temporal)'}`);
  if (num(Math.abs(v)) !== '0.00') parts.push(`${num(Math.abs(v))}° ${v > 0 ? 'up' : 'down'}`);
  return parts.length ? parts.join(', ') : 'none (under 0.005°)';
}

/** Net horizontal prism: "9.59 Δ base in". */
export function netHorizontalWords(h: number): string {
  return num(Math.abs(h)) === '0.00' ? 'none (under 0.005 Δ)' : `${num(Math.abs(h))} Δ base ${h > 0 ? 'in' : 'out'}`;
}

/** Vertical imbalance: "0.56 Δ, left eye base up". */
export function imbalanceWords(v: number): string {
  return num(Math.abs(v)) === '0.00' ? 'none (under 0.005 Δ)' : `${num(Math.abs(v))} Δ, ${v > 0 ? 'right' : 'left'} eye base up`;
}

/** What a verdict measured and against what, in words. */
export function verdictWords(v: Verdict): string {
  const what = v.component === 'horizontal'
    ? v.rule === 'prism' ? 'net horizontal prism' : 'distance between the optical centres minus the PD'
    : v.rule === 'prism' ? 'vertical imbalance' : 'difference in optical-centre height';
  return `${what}: ${num(v.value)} ${v.unit} of ${num(v.limit)} ${v.unit} allowed`;
}

export function ruleWords(v: Verdict, threshold: number): string {
  if (v.rule === 'mm') {
    return `the centration rule in mm: the larger ${v.component} power, ${num(v.powerD)} D, is above ${trim(threshold)} D`;
  }
  return Number.isFinite(threshold)
    ? `the prism rule: the larger ${v.component} power, ${num(v.powerD)} D, is at most ${trim(threshold)} D`
    : 'the prism rule (user-defined limits apply at any power)';
}

/** A limit as the standard writes it: 2.75, 3.375 (two decimals at least, three if needed). */
function trim(v: number): string {
  const s = num(v, 3);
  return s.endsWith('0') ? num(v, 2) : s;
}
