/**
 * Tolerance profiles for prism imbalance in mounted spectacles, and verdicts.
 *
 * The standards judge how well a pair was made and centred: prism measured at the prescribed
 * centration points against the prism prescribed there. They say nothing about the prism a
 * correctly made pair induces when the eyes look elsewhere; callers pass the values at the
 * marks (marks.ts), never those at a target.
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
  /** the profile's power threshold for this component, D (Infinity: the prism rule at any power) */
  thresholdD: number;
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
  return { component, rule: useMm ? 'mm' : 'prism', value, limit, margin, pass: margin >= -1e-9, unit: useMm ? 'mm' : 'Δ', powerD, thresholdD: rule.powerThresholdD };
}

/**
 * The row of the profile that applied, as the standard words it: "0.67 Δ total for the pair
 * (powers up to 2.75 D)" or "2.5 mm from the specified PD (powers above 2.75 D)".
 */
export function ruleText(v: Verdict): string {
  const th = trimD(v.thresholdD);
  if (v.rule === 'mm') {
    return v.component === 'horizontal'
      ? `${v.limit} mm from the specified PD (powers above ${th} D)`
      : `${v.limit} mm difference in reference-point heights (powers above ${th} D)`;
  }
  const what = v.component === 'horizontal' ? 'total for the pair' : 'difference between the eyes';
  return Number.isFinite(v.thresholdD) ? `${v.limit} Δ ${what} (powers up to ${th} D)` : `${v.limit} Δ ${what} (user-defined, any power)`;
}

/** A threshold as a standard writes it: 2.75, 3.375 (two decimals, three where needed). */
function trimD(v: number): string {
  const s = v.toFixed(3);
  return s.endsWith('0') ? v.toFixed(2) : s;
}
