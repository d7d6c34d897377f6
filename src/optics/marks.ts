/**
 * At the marks: what the lab measures (docs/binocular.md). Each lens is judged at its
 * centration point, where the eye's straight-ahead line meets the back surface (the pupil
 * mark in primary gaze; a case's fitting height places it), with the four answers there, the
 * prescribed prism, and the pair's net values per answer.
 *
 * The standard's verdict (tolerances.ts) is taken from these values only: the exact focimeter
 * reading at the marks minus the prescribed prism, or, above a standard's power threshold, the
 * centring error in mm of the prism reference points (where the focimeter reads the prescribed
 * prism; the optical centres when none is prescribed).
 *
 * Frames: wearer frame throughout (docs/conventions.md), signs as in binocular.ts.
 */
import { type FourAnswers, fourAnswersPlaced } from './answers.ts';
import { type EyeSetup, type SignedPair, pairValues } from './binocular.ts';
import { RayStatus } from './errors.ts';
import { decentrationFromMatrix, focimeterMatrix } from './firstOrder.ts';
import { newton2 } from './newton2.ts';
import type { Lens } from './lens.ts';
import { type Eye, type PrismDescription, type PrismEntry, describePrism, prescribedComponents } from './notation.ts';
import { type Placement, centrationPoint, toLensPrism } from './placement.ts';
import { type ToleranceProfile, type Verdict, verdict } from './tolerances.ts';
import { LineTrace, setPrismComponents, traceFocimeter } from './trace.ts';

export interface MarkEye {
  eye: Eye;
  /** the centration point from the optical centre: wearer frame (reported) and lens frame (traced), mm */
  point: { x: number; y: number } | null;
  lensPoint: { x: number; y: number } | null;
  /** the four answers at the point (null when the straight-ahead line misses the lens) */
  answers: FourAnswers | null;
  /** the prescribed prism (null when none is prescribed) */
  prescribed: PrismDescription | null;
  /** where the optical centre must sit relative to the mark for the prescribed prism (lens
   *  frame, mm), exactly (focimeter) and by Prentice; null when none is prescribed */
  decentration: { focimeter: { x: number; y: number } | null; prentice: { x: number; y: number } | null } | null;
}

export interface MarksResult {
  right: MarkEye;
  left: MarkEye;
  /** the pair's values at the marks, per answer (null where an eye has no value) */
  net: { prentice: SignedPair | null; paraxial: SignedPair | null; exact: SignedPair | null; focimeter: SignedPair | null };
  /** the pair's prescribed values */
  prescribedNet: SignedPair;
}

export interface MarkSetup extends EyeSetup {
  prescribed: readonly PrismEntry[];
}

function markEye(s: MarkSetup, eye: Eye): MarkEye {
  const p = { x: 0, y: 0 };
  prescribedComponents(s.prescribed, eye, p);
  const prescribed = s.prescribed.length ? describePrism(p.x, p.y, eye) : null;
  const decentration = prescribed ? decentrationForPrescribed(s.lens, s.placement, prescribed.x, prescribed.y) : null;
  const c = centrationPoint(s.lens, s.placement);
  if (!c) return { eye, point: null, lensPoint: null, answers: null, prescribed, decentration };
  return {
    eye, point: c.wearer, lensPoint: c.lens, answers: fourAnswersPlaced(s.lens, s.placement, c.lens.x, c.lens.y, eye),
    prescribed, decentration,
  };
}

export function atMarks(right: MarkSetup, left: MarkSetup): MarksResult {
  const r = markEye(right, 'R');
  const l = markEye(left, 'L');
  const pair = (pick: (a: FourAnswers) => PrismDescription | { failure: string }): SignedPair | null => {
    if (!r.answers || !l.answers) return null;
    const a = pick(r.answers), b = pick(l.answers);
    if ('failure' in a || 'failure' in b) return null;
    return pairValues(a.x, a.y, b.x, b.y);
  };
  const pr = r.prescribed ?? { x: 0, y: 0 }, pl = l.prescribed ?? { x: 0, y: 0 };
  return {
    right: r, left: l,
    net: {
      prentice: pair((a) => a.prentice), paraxial: pair((a) => a.paraxial),
      exact: pair((a) => a.exact), focimeter: pair((a) => a.focimeter),
    },
    prescribedNet: pairValues(pr.x, pr.y, pl.x, pl.y),
  };
}

const _t = new LineTrace();

/** Exact focimeter prism at lens point (cx, cy), wearer frame, into out; false if the trace fails. */
function focimeterAt(lens: Lens, pl: Placement, cx: number, cy: number, out: { x: number; y: number }): boolean {
  if (traceFocimeter(lens, cx, cy, _t) !== RayStatus.ok) return false;
  if (pl.tilted) setPrismComponents(_t, pl.r);
  out.x = _t.px; out.y = _t.py;
  return true;
}

/**
 * Where on the lens the exact focimeter reads the prism (px, py) (wearer frame, Δ): the lens
 * point (lens frame, from the optical centre, mm), found by 2-D Newton on the exact focimeter
 * trace from the first-order point (-10 M⁻¹ p with M the first-order focimeter matrix,
 * meridian by meridian where M is singular: a meridian without power cannot place prism and
 * keeps the centre's coordinate). The optical centre for zero prism. Null if the trace fails.
 */
export function focimeterPointForPrism(lens: Lens, pl: Placement, px: number, py: number): { x: number; y: number } | null {
  if (px === 0 && py === 0) return { x: 0, y: 0 };
  const lp = { x: 0, y: 0 };
  toLensPrism(pl, px, py, lp);
  const m = focimeterMatrix(lens);
  const c = { x: 0, y: 0 };
  if (!decentrationFromMatrix(m, lp.x, lp.y, c)) {
    c.x = Math.abs(m[0]) > 1e-9 ? (-10 * lp.x) / m[0] : 0;
    c.y = Math.abs(m[3]) > 1e-9 ? (-10 * lp.y) / m[3] : 0;
  }
  const r = newton2((x, y, out) => focimeterAt(lens, pl, x, y, out), px, py, c.x, c.y, { maxIterations: 40, byMeridian: true });
  if (r.status === 'trace') return null;
  return { x: r.x, y: r.y };
}

/**
 * The prism reference point: where the exact focimeter reads the prism (px, py), in the eye
 * frame (x, y from the eye's straight-ahead line), mm; the optical centre for zero prism.
 */
export function prismReferencePoint(lens: Lens, pl: Placement, px: number, py: number): { x: number; y: number } | null {
  const c = focimeterPointForPrism(lens, pl, px, py);
  if (!c) return null;
  const e = pl.toEyePoint(c.x, c.y, 0);
  return { x: e.x, y: e.y };
}

/**
 * How to produce the prescribed prism by decentration: where the optical centre must sit
 * relative to the mark (lens frame, mm) for the exact focimeter to read the prescribed prism
 * at the mark, and the same by Prentice's c = -F⁻¹ p (null when det F = 0).
 */
export function decentrationForPrescribed(lens: Lens, pl: Placement, px: number, py: number): {
  focimeter: { x: number; y: number } | null; prentice: { x: number; y: number } | null;
} {
  const c = focimeterPointForPrism(lens, pl, px, py);
  const lp = { x: 0, y: 0 };
  toLensPrism(pl, px, py, lp);
  const pc = { x: 0, y: 0 };
  const hasPrentice = decentrationFromMatrix(lens.vertexMatrix, lp.x, lp.y, pc);
  // the mark must lie at c from the optical centre, so the centre lies at -c from the mark
  return {
    focimeter: c && { x: -c.x + 0, y: -c.y + 0 },
    prentice: hasPrentice ? { x: -pc.x + 0, y: -pc.y + 0 } : null,
  };
}

export interface StandardResult {
  /** measured at the marks (exact focimeter) minus prescribed, for the pair */
  residual: SignedPair | null;
  /** the same by Prentice's rule (the technician's hand value) minus prescribed */
  prenticeResidual: SignedPair | null;
  /** centring errors of the prism reference points, mm: horizontal = their separation minus the
   *  PD (> 0 wider), vertical = right minus left height; null if a point cannot be found */
  centration: { horizontalMm: number; verticalMm: number } | null;
  /** the profile's rows on the focimeter values, and on Prentice's values (null: no value) */
  verdicts: Verdict[] | null;
  prenticeVerdicts: Verdict[] | null;
}

/**
 * The standard's verdict, from the marks only: each row of the profile applied to (measured -
 * prescribed) in Δ, or above its power threshold to the centring error in mm.
 */
export function standardVerdicts(
  profile: ToleranceProfile, marks: MarksResult, right: EyeSetup, left: EyeSetup,
): StandardResult {
  const pres = marks.prescribedNet;
  const minus = (p: SignedPair | null): SignedPair | null => p && {
    netHorizontal: p.netHorizontal - pres.netHorizontal, verticalImbalance: p.verticalImbalance - pres.verticalImbalance,
  };
  const residual = minus(marks.net.focimeter);
  const prenticeResidual = minus(marks.net.prentice);
  const ref = (s: EyeSetup, m: MarkEye) => prismReferencePoint(s.lens, s.placement, m.prescribed?.x ?? 0, m.prescribed?.y ?? 0);
  const rr = ref(right, marks.right), lr = ref(left, marks.left);
  const centration = rr && lr ? { horizontalMm: lr.x - rr.x, verticalMm: rr.y - lr.y } : null;
  const hPowers = [right.lens.vertexMatrix[0], left.lens.vertexMatrix[0]] as const;
  const vPowers = [right.lens.vertexMatrix[3], left.lens.vertexMatrix[3]] as const;
  const judge = (p: SignedPair | null): Verdict[] | null => {
    if (!p) return null;
    const h = verdict(profile, 'horizontal', p.netHorizontal, centration?.horizontalMm ?? 0, hPowers);
    const v = verdict(profile, 'vertical', p.verticalImbalance, centration?.verticalMm ?? 0, vPowers);
    // a centring rule without a centring value cannot be judged
    if ((h.rule === 'mm' || v.rule === 'mm') && !centration) return null;
    return [h, v];
  };
  return { residual, prenticeResidual, centration, verdicts: judge(residual), prenticeVerdicts: judge(prenticeResidual) };
}
