/**
 * Vertical imbalance at near for unequal lenses, and the slab-off (bicentric grinding) that
 * would equalise it.
 *
 * Clinical guidance (see docs/choices.md): slab-off is usually considered from about 1.5 Δ of
 * vertical imbalance and used up to about 6 Δ; its amount is about the imbalance at the
 * reading level; conventional slab-off is base up, on the lens with the most minus (least
 * plus) power in the vertical meridian. The amount is ordered in 0.5 Δ steps (common
 * practice, from memory; some laboratories work in 0.25 Δ steps).
 */

export interface SlabOff {
  /** imbalance to equalise, Δ (absolute) */
  imbalanceDelta: number;
  /** amount to order, rounded to the step, Δ */
  amountDelta: number;
  stepDelta: number;
  /** the lens that gets the slab-off (base up) */
  eye: 'R' | 'L';
  base: 'up';
  advice: 'not indicated' | 'consider' | 'usually indicated' | 'beyond the usual range';
}

/**
 * @param verticalImbalance right minus left vertical prism at the reading points, Δ
 * @param rightVerticalPowerD power of the right lens in its vertical meridian, D
 * @param leftVerticalPowerD power of the left lens in its vertical meridian, D
 */
export function slabOff(verticalImbalance: number, rightVerticalPowerD: number, leftVerticalPowerD: number, stepDelta = 0.5): SlabOff {
  const imbalance = Math.abs(verticalImbalance);
  const amount = Math.round(imbalance / stepDelta) * stepDelta;
  const eye = rightVerticalPowerD <= leftVerticalPowerD ? 'R' : 'L';
  const advice = imbalance < 1 ? 'not indicated' : imbalance < 1.5 ? 'consider' : imbalance <= 6 ? 'usually indicated' : 'beyond the usual range';
  return { imbalanceDelta: imbalance, amountDelta: amount, stepDelta, eye, base: 'up', advice };
}
