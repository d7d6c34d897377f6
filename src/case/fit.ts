/**
 * A whole binocular case evaluated: each eye's lens and visual point, the four answers, the
 * binocular values, the tolerance verdicts, slab-off advice and colour fringes. Glue only:
 * every number comes from src/optics.
 */
import {
  type BinocularResult, type Lens, type Target, type ToleranceProfile, type Verdict, Placement, binocular,
  customProfile, findProfile, slabOff, transverseChromatic, verdict, type SlabOff, type Tca,
} from '../optics/index.ts';
import type { BinocularCase } from './caseFile.ts';
import { buildLens } from './lensCase.ts';

export interface FitReport {
  lenses: { right: Lens; left: Lens };
  result: BinocularResult;
  profile: ToleranceProfile;
  /** verdicts on the exact values (null when an eye has no exact answer) */
  verdicts: Verdict[] | null;
  /** the same verdicts on Prentice's values at the same visual points */
  prenticeVerdicts: Verdict[] | null;
  slabOff: SlabOff | null;
  tca: { right: Tca | null; left: Tca | null };
  /** centration errors: OC distance minus PD (mm), and OC height difference right minus left (mm) */
  centration: { horizontalMm: number; verticalMm: number };
}

export function targetOf(c: BinocularCase): Target {
  const t = c.doc.target;
  if (t.kind === 'distance') return { kind: 'direction', x: 0, y: 0, z: 1 };
  return { kind: 'point', x: t.lateral ?? 0, y: -(t.below ?? 0), z: t.distance };
}

export function evaluateFit(c: BinocularCase): FitReport {
  const right = buildLens(c.right.lens, (k) => `right.${k}`);
  const left = buildLens(c.left.lens, (k) => `left.${k}`);
  const place = (e: 'R' | 'L') => {
    const ec = e === 'R' ? c.right : c.left;
    return new Placement({ ocXMm: ec.ocXMm, ocYMm: ec.ocYMm, crDistanceMm: ec.crMm, pantoDeg: c.pantoDeg, wrapDeg: c.wrapDeg, eye: e });
  };
  const result = binocular(
    { lens: right, placement: place('R'), pdMm: c.right.pdMm },
    { lens: left, placement: place('L'), pdMm: c.left.pdMm },
    targetOf(c),
  );
  const tol = c.doc.tolerance;
  const profile = !tol ? findProfile('ansi-z80.1')! : tol.profile === 'custom' ? customProfile(tol.horizontal, tol.vertical) : findProfile(tol.profile)!;
  const centration = { horizontalMm: c.left.ocXMm - c.right.ocXMm, verticalMm: c.right.ocYMm - c.left.ocYMm };
  const hPowers = [right.vertexMatrix[0], left.vertexMatrix[0]] as const;
  const vPowers = [right.vertexMatrix[3], left.vertexMatrix[3]] as const;
  const judge = (p: { netHorizontal: number; verticalImbalance: number } | null): Verdict[] | null =>
    p && [
      verdict(profile, 'horizontal', p.netHorizontal, centration.horizontalMm, hPowers),
      verdict(profile, 'vertical', p.verticalImbalance, centration.verticalMm, vPowers),
    ];
  const tcaOf = (lens: Lens, abbe: number | undefined, eye: 'right' | 'left'): Tca | null => {
    const r = result[eye];
    if (abbe === undefined || r.fixation.status !== 'ok') return null;
    return transverseChromatic(lens, abbe, place(eye === 'right' ? 'R' : 'L'), r.fromOcMm.x, r.fromOcMm.y);
  };
  return {
    lenses: { right, left },
    result,
    profile,
    verdicts: judge(result.exact),
    prenticeVerdicts: judge(result.prentice),
    slabOff: result.exact ? slabOff(result.exact.verticalImbalance, vPowers[0], vPowers[1]) : null,
    tca: { right: tcaOf(right, c.right.lens.abbe, 'right'), left: tcaOf(left, c.left.lens.abbe, 'left') },
    centration,
  };
}
