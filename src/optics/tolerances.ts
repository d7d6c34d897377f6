/**
 * Tolerance profiles for prism imbalance in mounted spectacles, and verdicts.
 *
 * Each profile row carries its source. Above a power threshold the standards switch from a
 * prism limit to a centration limit in millimetres; the verdict then uses the centration
 * error, not the prism.
 */

export interface ComponentRule {
  /** the prism rule applies while the power in that meridian is at most this (absolute), D */
  powerThresholdD: number;
  /** prism allowed: horizontal = total for the pair, vertical = difference between the eyes, Δ */
  prismDelta: number;
  /** above the threshold: centration error allowed, mm (horizontal: from the specified PD;
   *  vertical: difference in optical-centre heights); null = the prism rule applies at any power */
  mmAbove: number | null;
}

export interface ToleranceProfile {
  id: string;
  name: string;
  source: string;
  horizontal: ComponentRule;
  vertical: ComponentRule;
}

export const TOLERANCE_PROFILES: readonly ToleranceProfile[] = [
  {
    id: 'ansi-z80.1',
    name: 'ANSI Z80.1-2015, mounted spectacles',
    source:
      'ANSI Z80.1-2015 prism imbalance rows (the 2020 edition is believed to keep them; that belief is from memory)',
    horizontal: { powerThresholdD: 2.75, prismDelta: 0.67, mmAbove: 2.5 },
    vertical: { powerThresholdD: 3.375, prismDelta: 0.33, mmAbove: 1.0 },
  },
  {
    id: 'iso-21987',
    name: 'ISO 21987, mounted spectacles (values from memory)',
    source: 'ISO 21987, from memory (not checked against the standard text): verify before relying on it',
    horizontal: { powerThresholdD: 3.25, prismDelta: 0.67, mmAbove: 2.0 },
    vertical: { powerThresholdD: 5.0, prismDelta: 0.5, mmAbove: 1.0 },
  },
];

export function findProfile(id: string): ToleranceProfile | undefined {
  return TOLERANCE_PROFILES.find((p) => p.id === id.trim().toLowerCase());
}

/** A user-defined profile: prism limits at any power. */
export function customProfile(horizontalDelta: number, verticalDelta: number): ToleranceProfile {
  return {
    id: 'custom',
    name: 'user-defined',
    source: 'set by the user',
    horizontal: { powerThresholdD: Infinity, prismDelta: horizontalDelta, mmAbove: null },
    vertical: { powerThresholdD: Infinity, prismDelta: verticalDelta, mmAbove: null },
  };
}

export interface Verdict {
  component: 'horizontal' | 'vertical';
  /** which rule applied */
  rule: 'prism' | 'mm';
  /** the measured quantity: Δ for the prism rule, mm for the centration rule (absolute) */
  value: number;
  limit: number;
  /** limit - value: positive inside the tolerance */
  margin: number;
  pass: boolean;
  unit: 'Δ' | 'mm';
  /** the power that selected the rule (largest absolute meridional power of the two lenses), D */
  powerD: number;
}

/**
 * Verdict for one component. `prism` is the pair's value (net horizontal or vertical
 * imbalance, Δ, sign ignored); `centrationMm` the centration error in mm for the mm rule;
 * `powersD` the two lenses' powers in that meridian.
 */
export function verdict(
  profile: ToleranceProfile, component: 'horizontal' | 'vertical', prism: number, centrationMm: number,
  powersD: readonly [number, number],
): Verdict {
  const rule = profile[component];
  const powerD = Math.max(Math.abs(powersD[0]), Math.abs(powersD[1]));
  const useMm = rule.mmAbove !== null && powerD > rule.powerThresholdD;
  const value = Math.abs(useMm ? centrationMm : prism);
  const limit = useMm ? (rule.mmAbove as number) : rule.prismDelta;
  // compare at a resolution of 1e-9 so that a value equal to its limit passes
  const margin = limit - value;
  return { component, rule: useMm ? 'mm' : 'prism', value, limit, margin, pass: margin >= -1e-9, unit: useMm ? 'mm' : 'Δ', powerD };
}
