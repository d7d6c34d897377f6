/**
 * A whole binocular case evaluated, as three answers that are never mixed (docs/binocular.md):
 *
 * 1. at the marks: what the lab measures at each lens's centration point;
 * 2. the standard's verdict: the tolerance profile applied to the marks only;
 * 3. what the eyes do at the target: the solved (or given) visual points, the prism there,
 *    the binocular demand and clinical guidance on it;
 *
 * and the slab-off order, in focimeter terms at the reading level. Glue only: every number
 * comes from src/optics.
 */
import {
  type BinocularResult, type BinocularTarget, type Demand, type Guidance, type Lens, type MarkSetup, type MarksResult,
  type SlabOff, type StandardResult, type Tca, type ToleranceProfile, Placement, atMarks, binocular, binocularDemand,
  customProfile, findProfile, horizontalGuidance, slabOff, standardVerdicts, transverseChromatic, verticalGuidance,
} from '../optics/index.ts';
import type { BinocularCase } from './caseFile.ts';
import { buildLens } from './lensCase.ts';

/** The reading level slab-off is judged at when the case's target is at distance (common practice). */
export const DEFAULT_READING_LEVEL = { kind: 'level', belowMm: 10, insetMm: 0 } as const;

export interface SlabOffReport {
  /** where the reading points come from: the case's reading level, its near target, or the
   *  default level 10 mm below the distance centration points (a distance case) */
  at: 'level' | 'near' | 'default-level';
  /** the reading points used (the target's result itself unless at = 'default-level') */
  reading: BinocularResult;
  order: SlabOff | null;
}

export interface FitReport {
  lenses: { right: Lens; left: Lens };
  profile: ToleranceProfile;
  /** 1. at the marks */
  marks: MarksResult;
  /** 2. the standard's verdict, from the marks only */
  standard: StandardResult;
  /** 3. what the eyes do at the target */
  result: BinocularResult;
  /** the demand beyond the prescribed prism (null when an eye has no exact answer) */
  demand: Demand | null;
  guidance: { horizontal: Guidance; vertical: Guidance } | null;
  slabOff: SlabOffReport;
  tca: { right: Tca | null; left: Tca | null };
  /** optical-centre errors: OC distance minus PD (mm), and OC height difference right minus left (mm) */
  centration: { horizontalMm: number; verticalMm: number };
}

export function targetOf(c: BinocularCase): BinocularTarget {
  const t = c.doc.target;
  if (t.kind === 'distance') return { kind: 'direction', x: 0, y: 0, z: 1 };
  if (t.kind === 'level') return { kind: 'level', belowMm: t.below, insetMm: t.inset ?? 0 };
  return { kind: 'point', x: t.lateral ?? 0, y: -(t.below ?? 0), z: t.distance };
}

export function placementOf(c: BinocularCase, side: 'right' | 'left'): Placement {
  const ec = c[side];
  return new Placement({ ocXMm: ec.ocXMm, ocYMm: ec.ocYMm, crDistanceMm: ec.crMm, pantoDeg: c.pantoDeg, wrapDeg: c.wrapDeg, eye: side === 'right' ? 'R' : 'L' });
}

export function evaluateFit(c: BinocularCase): FitReport {
  const lenses = { right: buildLens(c.right.lens, (k) => `right.${k}`), left: buildLens(c.left.lens, (k) => `left.${k}`) };
  const setup = (side: 'right' | 'left'): MarkSetup => ({
    lens: lenses[side], placement: placementOf(c, side), pdMm: c[side].pdMm, prescribed: c[side].prism,
  });
  const right = setup('right'), left = setup('left');
  const target = targetOf(c);
  const result = binocular(right, left, target);
  const tol = c.doc.tolerance;
  const profile = !tol ? findProfile('ansi-z80.1')! : tol.profile === 'custom' ? customProfile(tol.horizontal, tol.vertical) : findProfile(tol.profile)!;
  const marks = atMarks(right, left);
  const standard = standardVerdicts(profile, marks, right, left);
  const demand = result.exact ? binocularDemand(result.exact, marks.prescribedNet) : null;
  const near = c.doc.target.kind !== 'distance';

  const at: SlabOffReport['at'] = target.kind === 'level' ? 'level' : target.kind === 'point' ? 'near' : 'default-level';
  const reading = at === 'default-level' ? binocular(right, left, DEFAULT_READING_LEVEL) : result;
  const rf = reading.right.answers?.focimeter, lf = reading.left.answers?.focimeter;
  const order = reading.exact && rf && lf && !('failure' in rf) && !('failure' in lf)
    ? slabOff(rf.y - lf.y, reading.exact.verticalImbalance)
    : null;

  const tcaOf = (side: 'right' | 'left', abbe: number | undefined): Tca | null => {
    const r = result[side];
    if (abbe === undefined || r.fixation.status !== 'ok') return null;
    return transverseChromatic(lenses[side], abbe, placementOf(c, side), r.fromOcMm.x, r.fromOcMm.y);
  };
  return {
    lenses, profile, marks, standard, result, demand,
    guidance: demand ? { horizontal: horizontalGuidance(demand.horizontal, near), vertical: verticalGuidance(demand.vertical) } : null,
    slabOff: { at, reading, order },
    tca: { right: tcaOf('right', c.right.lens.abbe), left: tcaOf('left', c.left.lens.abbe) },
    centration: { horizontalMm: c.left.ocXMm - c.right.ocXMm, verticalMm: c.right.ocYMm - c.left.ocYMm },
  };
}
