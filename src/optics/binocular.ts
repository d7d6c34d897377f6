/**
 * Both eyes looking at one target through their lenses (docs/binocular.md): what the eyes do.
 *
 * Binocular frame: the wearer frame with its origin midway between the two centres of
 * rotation: right CR at x = -pdR, left CR at x = +pdL (monocular PDs, mm). Each eye's own
 * frame is this one shifted to its CR.
 *
 * The target is a point or a direction (each eye's visual point is then solved exactly), or a
 * reading level: lens points a given depth below and inset from each eye's centration point,
 * the way opticians state a reading position (the visual points are then given, not solved).
 *
 * Per eye: the visual point, the four answers there. Binocular: net
 * horizontal prism (base in positive), vertical imbalance (right minus left), each eye's
 * change of rotation against looking at the same target without lenses, and the same
 * binocular values by Prentice's rule at the same visual points.
 */
import { type FourAnswers, fourAnswersPlaced, isFailure } from './answers.ts';
import type { Lens } from './lens.ts';
import type { Eye } from './notation.ts';
import { RayStatus, failureMessage } from './errors.ts';
import { type Fixation, type Target, fixationStatusOf, solveFixation } from './fixation.ts';
import { type Placement, centrationPoint, placedLineOfSight } from './placement.ts';
import { LineTrace } from './trace.ts';

/** A reading level: lens points below and inset (towards the nose) from each eye's centration point, mm. */
export interface LevelTarget {
  kind: 'level';
  belowMm: number;
  insetMm: number;
}

export type BinocularTarget = Target | LevelTarget;

export interface EyeSetup {
  lens: Lens;
  placement: Placement;
  /** monocular PD, mm */
  pdMm: number;
}

export interface EyeResult {
  eye: Eye;
  fixation: Fixation;
  /** visual point relative to the optical centre (lens frame), mm */
  fromOcMm: { x: number; y: number };
  /** visual point relative to the pupil's straight-ahead position (eye frame), mm */
  fromPupilMm: { x: number; y: number };
  answers: FourAnswers | null;
  /** change of the eye's rotation caused by the lens, degrees: + = turns towards +x / up */
  rotationChangeDeg: { horizontal: number; vertical: number };
  /** the eye's rotation from straight ahead, degrees: + = towards +x (the wearer's left) / up */
  rotationDeg: { horizontal: number; vertical: number };
}

export interface SignedPair {
  /** net horizontal prism, Δ: > 0 base in, < 0 base out */
  netHorizontal: number;
  /** vertical imbalance right minus left, Δ: > 0 the right eye is base up relative to the left */
  verticalImbalance: number;
}

export interface BinocularResult {
  right: EyeResult;
  left: EyeResult;
  /** exact values, null when an eye has no exact answer */
  exact: SignedPair | null;
  prentice: SignedPair | null;
}

/** Base-in component of a prism, Δ (positive base in), for one eye. */
export function baseInComponent(px: number, eye: Eye): number {
  return eye === 'R' ? px : -px;
}

/** The pair's signed values from each eye's components. */
export function pairValues(rx: number, ry: number, lx: number, ly: number): SignedPair {
  return { netHorizontal: baseInComponent(rx, 'R') + baseInComponent(lx, 'L'), verticalImbalance: ry - ly };
}

/** A target in the binocular frame, seen from one eye's frame. */
export function targetForEye(target: Target, eye: Eye, pdMm: number): Target {
  if (target.kind === 'direction') return target;
  const crX = eye === 'R' ? -pdMm : pdMm;
  return { kind: 'point', x: target.x - crX, y: target.y, z: target.z };
}

function solveEye(setup: EyeSetup, eye: Eye, target: BinocularTarget): EyeResult {
  let fix: Fixation;
  let d: Target | null = null;
  if (target.kind === 'level') {
    fix = levelFixation(setup, eye, target);
  } else {
    const t = targetForEye(target, eye, setup.pdMm);
    fix = solveFixation(setup.lens, setup.placement, t);
    d = t; // without lenses: straight at the target
  }
  const tr = fix.trace;
  let answers: FourAnswers | null = null;
  let fromPupil = { x: 0, y: 0 };
  let rotation = { horizontal: 0, vertical: 0 };
  let rotationDeg = { horizontal: 0, vertical: 0 };
  if (fix.status === 'ok') {
    // the power's demand: the target point itself; a distant target or a reading level (which
    // has no distance) is judged for a distant object (docs/method.md, "Power at the visual point")
    answers = fourAnswersPlaced(setup.lens, setup.placement, fix.cx, fix.cy, eye, d && d.kind === 'point' ? d : null);
    const pl = setup.placement;
    const b = pl.toEyePoint(tr.bx, tr.by, tr.bz);
    fromPupil = { x: b.x, y: b.y };
    // eye-side light direction reversed (from the CR outwards), in the eye frame
    const a = pl.toEyeDir(tr.ax, tr.ay, tr.az);
    // a reading level has no target point: the eye would look along the object-side ray
    const o = d ?? pl.toEyeDir(tr.ox, tr.oy, tr.oz);
    rotationDeg = { horizontal: angleDeg(Math.atan2(a.x, a.z)), vertical: angleDeg(Math.atan2(a.y, Math.hypot(a.x, a.z))) };
    rotation = {
      horizontal: rotationDeg.horizontal - angleDeg(Math.atan2(o.x, o.z)),
      vertical: rotationDeg.vertical - angleDeg(Math.atan2(o.y, Math.hypot(o.x, o.z))),
    };
  }
  return {
    eye, fixation: fix, fromOcMm: { x: fix.cx, y: fix.cy }, fromPupilMm: fromPupil, answers,
    rotationChangeDeg: rotation, rotationDeg,
  };
}

/** The line of sight through a reading-level point (given, not solved), as a Fixation. */
function levelFixation(setup: EyeSetup, eye: Eye, level: LevelTarget): Fixation {
  const trace = new LineTrace();
  const mark = centrationPoint(setup.lens, setup.placement);
  if (!mark) {
    return { status: 'miss', message: 'the straight-ahead line misses the lens, so the reading level has no origin', cx: 0, cy: 0, iterations: 0, trace };
  }
  const nasal = eye === 'R' ? 1 : -1;
  const cx = mark.lens.x + nasal * level.insetMm, cy = mark.lens.y - level.belowMm;
  const st = placedLineOfSight(setup.lens, setup.placement, cx, cy, trace);
  const status = fixationStatusOf(st);
  const message = st === RayStatus.ok ? 'given by the reading level'
    : `the line of sight through the reading point fails: ${failureMessage(st)}`;
  return { status, message, cx, cy, iterations: 0, trace };
}

function angleDeg(rad: number): number {
  return (rad * 180) / Math.PI;
}

export function binocular(right: EyeSetup, left: EyeSetup, target: BinocularTarget): BinocularResult {
  const r = solveEye(right, 'R', target);
  const l = solveEye(left, 'L', target);
  let exact: SignedPair | null = null;
  let prentice: SignedPair | null = null;
  if (r.answers && l.answers) {
    prentice = pairValues(r.answers.prentice.x, r.answers.prentice.y, l.answers.prentice.x, l.answers.prentice.y);
    const re = r.answers.exact, le = l.answers.exact;
    if (!isFailure(re) && !isFailure(le)) exact = pairValues(re.x, re.y, le.x, le.y);
  }
  return { right: r, left: l, exact, prentice };
}
