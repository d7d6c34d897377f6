/**
 * The four answers for one visual point (docs/method.md, "The four answers"), as described prisms:
 * Prentice, first-order thick lens at the eye, exact line of sight, focimeter (exact, with
 * its first-order value beside it), and the Prentice error.
 *
 * This is the convenience layer the CLI and the UI call; loops (maps, sweeps) use trace.ts
 * and firstOrder.ts directly with reused scratch objects.
 */
import { FAILURE_NAMES, type FailureName, RayStatus, failureMessage } from './errors.ts';
import { eyePrismOffAxis, focimeterMatrix, prismFromMatrix } from './firstOrder.ts';
import type { Lens } from './lens.ts';
import { type Eye, type PrismDescription, describePrism } from './notation.ts';
import { Placement, placedLineOfSight, toWearerPrism } from './placement.ts';
import { type PowerAnswer, pencilSetup, powerOfLine } from './power.ts';
import { LineTrace, setPrismComponents, traceFocimeter } from './trace.ts';

export interface TraceFailure {
  failure: FailureName;
  message: string;
}

export type Answer = PrismDescription | TraceFailure;

export interface PrenticeError {
  /** |Prentice| - |exact|, Δ */
  prism: number;
  /** 100 (|Prentice| - |exact|) / |exact|, % (null where |exact| is 0) */
  percent: number | null;
}

/** The four prism answers at one point (fourAnswers adds the power; tables of prism alone use these). */
export interface PrismAnswers {
  eye: Eye;
  prentice: PrismDescription;
  paraxial: PrismDescription;
  exact: Answer;
  focimeter: Answer;
  focimeterFirstOrder: PrismDescription;
  error: PrenticeError | null;
  /** the traces themselves (lens frame), for drawing */
  exactTrace: LineTrace;
  focimeterTrace: LineTrace;
}

/** The four prism answers with the power beside them: what the eye gets at the point. */
export interface FourAnswers extends PrismAnswers {
  /**
   * The power the eye gets along the exact line of sight (power.ts): the pencil's vergence at
   * the vertex sphere and its errors against the prescription (and the target's demand).
   * A failure where the exact trace or the pencil fails.
   */
  power: PowerAnswer | TraceFailure;
}

export function isFailure(a: Answer): a is TraceFailure {
  return (a as TraceFailure).failure !== undefined;
}

export function failureOf(status: RayStatus): TraceFailure {
  return { failure: FAILURE_NAMES[status] as FailureName, message: failureMessage(status) };
}

/**
 * The four answers at visual point (cxMm, cyMm) relative to the optical centre, for an
 * untilted lens with the centre of rotation crDistanceMm behind the back vertex on its axis.
 */
export function fourAnswers(lens: Lens, crDistanceMm: number, cxMm: number, cyMm: number, eye: Eye): FourAnswers {
  return fourAnswersPlaced(lens, untilted(crDistanceMm, eye), cxMm, cyMm, eye);
}

/** fourAnswers without the power: the prism answers alone, for tables that print only prism (a sweep). */
export function prismAnswers(lens: Lens, crDistanceMm: number, cxMm: number, cyMm: number, eye: Eye): PrismAnswers {
  return prismAnswersPlaced(lens, untilted(crDistanceMm, eye), cxMm, cyMm, eye);
}

function untilted(crDistanceMm: number, eye: Eye): Placement {
  return new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm, pantoDeg: 0, wrapDeg: 0, eye });
}

/**
 * The four answers at back-surface point (cxMm, cyMm) of a placed lens (lens frame, relative
 * to the optical centre). The exact line of sight starts at the eye's centre of rotation
 * wherever the placement puts it. All four are reported in the wearer frame: the exact
 * trace's deviation is re-taken there, and Prentice's, the first-order and the focimeter
 * values (lens properties, computed in the lens frame; the first-order value takes the centre
 * of rotation's position in that frame, docs/method.md) are turned into it by toWearerPrism
 * (docs/conventions.md, "Tilted and wrapped lenses"). For an untilted lens the two frames agree.
 */
export function fourAnswersPlaced(
  lens: Lens, pl: Placement, cxMm: number, cyMm: number, eye: Eye,
  /** a near target in the eye frame (mm) for the power's demand; null or absent: distant */
  nearEye: { x: number; y: number; z: number } | null = null,
): FourAnswers {
  const a = prismAnswersPlaced(lens, pl, cxMm, cyMm, eye);
  let power: PowerAnswer | TraceFailure = failureOf(a.exactTrace.status === RayStatus.ok ? RayStatus.geometry : a.exactTrace.status);
  if (!isFailure(a.exact)) {
    const cylSign = lens.spec.cylD > 0 ? 'plus' : 'minus';
    const p = powerOfLine(lens, a.exactTrace, pencilSetup(lens, pl, nearEye), cylSign);
    power = typeof p === 'number' ? failureOf(p) : p;
  }
  return { ...a, power };
}

/** fourAnswersPlaced without the power. */
export function prismAnswersPlaced(lens: Lens, pl: Placement, cxMm: number, cyMm: number, eye: Eye): PrismAnswers {
  const v = { x: 0, y: 0 };
  const described = (): PrismDescription => {
    toWearerPrism(pl, v.x, v.y, v);
    return describePrism(v.x, v.y, eye);
  };
  prismFromMatrix(lens.vertexMatrix, cxMm, cyMm, v);
  const prentice = described();
  eyePrismOffAxis(lens, pl.crLensX, pl.crLensY, -pl.crLensZ, cxMm, cyMm, v);
  const paraxial = described();
  prismFromMatrix(focimeterMatrix(lens), cxMm, cyMm, v);
  const focimeterFirstOrder = described();

  const exactTrace = new LineTrace();
  const s1 = placedLineOfSight(lens, pl, cxMm, cyMm, exactTrace);
  const exact: Answer = s1 === RayStatus.ok ? describePrism(exactTrace.px, exactTrace.py, eye) : failureOf(s1);
  const focimeterTrace = new LineTrace();
  const s2 = traceFocimeter(lens, cxMm, cyMm, focimeterTrace);
  if (s2 === RayStatus.ok && pl.tilted) setPrismComponents(focimeterTrace, pl.r);
  const focimeter: Answer = s2 === RayStatus.ok ? describePrism(focimeterTrace.px, focimeterTrace.py, eye) : failureOf(s2);

  return {
    eye, prentice, paraxial, exact, focimeter, focimeterFirstOrder,
    error: isFailure(exact) ? null : prenticeError(prentice.magnitude, exact.magnitude),
    exactTrace, focimeterTrace,
  };
}

export function prenticeError(prenticeMag: number, exactMag: number): PrenticeError {
  return { prism: prenticeMag - exactMag, percent: exactMag === 0 ? null : prenticeErrorPercent(prenticeMag, exactMag) };
}

/** 100 (|Prentice| - |exact|) / |exact|, % (exactMag not 0); no allocation, for scans. */
export function prenticeErrorPercent(prenticeMag: number, exactMag: number): number {
  return (100 * (prenticeMag - exactMag)) / exactMag;
}
