/**
 * Words for the "both eyes" views that only the app needs: prisms in 360° notation, positions
 * as nasal/temporal and up/down for each eye, and eye rotations. Everything the command line,
 * the app and the clinician summary all say (the three answers' headings and questions, the
 * pair's values, the verdicts, the demand, slab-off) is src/case/fitWords.ts, re-exported
 * here so that the app has one place to import from and no second copy of any of it.
 *
 * Sign conventions (docs/conventions.md; docs/binocular.md, "Frame and signs"): x towards the
 * wearer's left, y up; for the right eye +x is nasal, for the left eye -x; net horizontal > 0
 * is base in; vertical imbalance is right minus left, > 0 the right eye base up. Every number
 * has its unit and goes through format.ts (a dash, never NaN or Infinity).
 */
import { type PrismDescription, isFailure, prismWords } from '../../optics/index.ts';
import { num } from '../format.ts';
import type { Side } from './form.ts';

import { offsetWords as sharedOffsetWords, rotationWords as sharedRotationWords } from '../../case/fitWords.ts';

export {
  GUIDANCE_NOT_VERDICT, THREE_ANSWERS, demandWords, imbalanceWords, judgedWords, netHorizontalWords, prenticeVerdictWords,
  slabOffWords, standardSummary, targetWords,
} from '../../case/fitWords.ts';
export { prismWords };
/** A failed answer (a status with its message), the engine's own test. */
export const isFailed = isFailure;

/** 360° notation: "8.88 Δ base 305.3°". */
export function prism360(p: PrismDescription): string {
  if (num(p.magnitude) === '0.00') return '0.00 Δ';
  return `${num(p.magnitude)} Δ base ${num(p.baseAngle, 1)}°`;
}

export function nasalSign(side: Side): 1 | -1 {
  return side === 'right' ? 1 : -1;
}

/** Where a point lies, in the shared wording ("7.12 mm below and 5.24 mm nasal"); `at` when both round to 0. */
export function offsetWords(x: number, y: number, side: Side, decimals = 2, at = 'at it'): string {
  return sharedOffsetWords(x, y, side === 'right' ? 'R' : 'L', undefined, decimals) || at;
}

/** An eye's rotation (or its change), in the shared wording: "3.89° up, 2.83° outwards". */
export function rotationWords(h: number, v: number, side: Side): string {
  return sharedRotationWords({ horizontal: h, vertical: v }, side === 'right' ? 'R' : 'L', 'none (under 0.005°)', 2);
}
