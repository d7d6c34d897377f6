/**
 * Slab-off (bicentric grinding) for a vertical imbalance at the reading level, ordered in the
 * terms the laboratory grinds and verifies it: the focimeter imbalance at the reading points.
 *
 * One rule, stated in docs/choices.md ("Slab-off"):
 * - considered from SLAB_OFF_RULE.fromDelta (1.5 Δ) of focimeter imbalance and used up to
 *   about 6 Δ (common practice; slab-off is typically considered above 1.5 Δ and used up to
 *   about 6 Δ, and its amount is about the imbalance at the reading level);
 * - the amount is the focimeter imbalance rounded DOWN to 0.25 Δ steps, so that it is never
 *   more than the imbalance (common practice, no source: laboratories work in 0.25 Δ or
 *   0.5 Δ steps);
 * - base up, on the lens whose reading point has the less base-up prism (for reading below
 *   the centres this is the lens with the most minus, least plus, vertical power, the
 *   conventional statement).
 */

export const SLAB_OFF_RULE = { fromDelta: 1.5, upToDelta: 6, stepDelta: 0.25 } as const;

export interface SlabOff {
  /** amount to order, base up, Δ (0 when not indicated) */
  order: number;
  /** the lens that gets it */
  eye: 'R' | 'L';
  base: 'up';
  basis: 'focimeter';
  /** |right - left| vertical focimeter prism at the reading points, Δ */
  focimeterImbalance: number;
  /** |right - left| exact vertical prism at the eyes there, Δ */
  eyeImbalance: number;
  /** the exact imbalance the eyes keep after the slab-off (its prism taken at its focimeter value), Δ */
  remaining: number;
  stepDelta: number;
  advice: 'not indicated' | 'indicated' | 'beyond the usual range';
}

/**
 * @param focimeterImbalance right minus left vertical focimeter prism at the reading points, Δ
 * @param eyeImbalance right minus left vertical exact prism at the eyes there, Δ
 */
export function slabOff(focimeterImbalance: number, eyeImbalance: number): SlabOff {
  const { fromDelta, upToDelta, stepDelta } = SLAB_OFF_RULE;
  const foc = Math.abs(focimeterImbalance);
  // right minus left < 0: the left reading point is more base up, so the right lens needs base up
  const eye = focimeterImbalance <= 0 ? 'R' : 'L';
  const advice = foc < fromDelta ? 'not indicated' : foc <= upToDelta ? 'indicated' : 'beyond the usual range';
  // a tiny allowance so that 3.5 computed as 3.4999999999 still orders 3.5
  const order = advice === 'not indicated' ? 0 : Math.floor(foc / stepDelta + 1e-9) * stepDelta;
  const remaining = Math.abs(eyeImbalance + (eye === 'R' ? order : -order));
  return { order, eye, base: 'up', basis: 'focimeter', focimeterImbalance: foc, eyeImbalance: Math.abs(eyeImbalance), remaining, stepDelta, advice };
}
