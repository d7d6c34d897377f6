/**
 * Lens-family rules a designer applies across a power range: the front curve chosen for a
 * back vertex power. Thickness rules live in lens.ts (solveCentreThickness).
 */

export type FrontRule =
  | { kind: 'fixed'; frontD: number }
  /**
   * Vogel's rule of thumb for the base curve (from memory, common practice, no source):
   * plus lenses SE + 6 D, minus lenses SE / 2 + 6 D, SE the spherical equivalent. We take
   * the result as the true front power in the lens material and never let it fall below
   * +0.50 D (our choice: a meniscus form throughout).
   */
  | { kind: 'vogel' }
  /** steps: the front power of the last step whose `fromD` is <= the spherical equivalent */
  | { kind: 'steps'; steps: readonly { fromD: number; frontD: number }[] };

export const MIN_RULE_FRONT_D = 0.5;

export function frontForPower(rule: FrontRule, sphereD: number, cylD = 0): number {
  const se = sphereD + cylD / 2;
  switch (rule.kind) {
    case 'fixed':
      return rule.frontD;
    case 'vogel':
      return Math.max(MIN_RULE_FRONT_D, se >= 0 ? se + 6 : se / 2 + 6);
    case 'steps': {
      let f = rule.steps[0]?.frontD ?? MIN_RULE_FRONT_D;
      for (const s of rule.steps) if (se >= s.fromD) f = s.frontD;
      return f;
    }
  }
}
