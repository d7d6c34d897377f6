/**
 * Best forms by the exact trace (docs/method.md, "Best forms"): for a spherical lens of a
 * given power, material, centre thickness and centre-of-rotation distance, the true front
 * powers at which the pencil along an eye rotation has no astigmatic error (a point-focal
 * form) or no mean error, for a distant target or one at a near distance.
 *
 * The eye turns in the horizontal meridian of an untilted lens centred on its straight-ahead
 * line; the pencil is judged at the vertex sphere (power.ts). Each form is a root of the
 * signed error (tangential minus sagittal vergence, or the mean error) as a function of the
 * front power, found by a scan and bisection on the exact trace. Off the per-ray path.
 */
import { OpticsError, RayStatus } from './errors.ts';
import { type Lens, makeLens } from './lens.ts';
import { Placement, placedLine } from './placement.ts';
import { PencilPower, pencilPower, pencilSetup, targetOnLine } from './power.ts';
import { Hit, Ray } from './surface.ts';
import { LineTrace } from './trace.ts';

export interface FormQuery {
  /** back vertex power, D (spherical) */
  sphereD: number;
  index: number;
  ctMm: number;
  /** back vertex to centre of rotation, mm */
  crMm: number;
  /** eye rotation at which the error vanishes, degrees (> 0) */
  rotationDeg: number;
  /** target distance from the vertex sphere, mm; null: distant */
  nearMm: number | null;
  /** which error vanishes */
  goal: 'astigmatism' | 'mean';
  /** scanned range of true front power, D (default 0 to 25) */
  frontMinD?: number;
  frontMaxD?: number;
}

/** Scan step of the front power, D, and the root's tolerance, D. */
export const FORM_SCAN_STEP_D = 0.25;
export const FORM_TOLERANCE_D = 1e-6;

/**
 * Every front power in the range where the chosen error vanishes, flattest first (the
 * flatter, Ostwalt-branch form first where both exist). Empty if none does.
 */
export function formFronts(q: FormQuery): number[] {
  if (!(q.rotationDeg > 0 && q.rotationDeg < 60)) throw new OpticsError(`eye rotation ${q.rotationDeg}° must be above 0 and below 60°`, 'rotation');
  const lo = q.frontMinD ?? 0, hi = q.frontMaxD ?? 25;
  const roots: number[] = [];
  let prevF = lo, prevE = formError(q, lo);
  for (let f = lo + FORM_SCAN_STEP_D; f <= hi + 1e-9; f += FORM_SCAN_STEP_D) {
    const e = formError(q, f);
    if (Number.isFinite(prevE) && Number.isFinite(e) && (prevE === 0 || (prevE < 0) !== (e < 0))) {
      roots.push(prevE === 0 ? prevF : bisect(q, prevF, prevE, f));
    }
    prevF = f; prevE = e;
  }
  return roots;
}

function bisect(q: FormQuery, a: number, ea: number, b: number): number {
  for (let i = 0; i < 80 && b - a > FORM_TOLERANCE_D / 4; i++) {
    const m = 0.5 * (a + b);
    const em = formError(q, m);
    if (!Number.isFinite(em)) return NaN;
    if ((em < 0) === (ea < 0)) { a = m; ea = em; } else b = m;
  }
  return 0.5 * (a + b);
}

/**
 * The signed error at front power `frontD`: tangential minus sagittal vergence (the eye turns
 * in the horizontal meridian, so e1 is the tangential section) or the mean error; NaN where
 * the lens cannot be made or the trace fails.
 */
export function formError(q: FormQuery, frontD: number): number {
  let lens: Lens;
  try {
    lens = makeLens({ sphereD: q.sphereD, cylD: 0, axisDeg: 0, index: q.index, frontD, ctMm: q.ctMm });
  } catch (e) {
    if (e instanceof OpticsError) return NaN;
    throw e;
  }
  const pl = new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm: q.crMm, pantoDeg: 0, wrapDeg: 0, eye: 'R' });
  const th = (q.rotationDeg * Math.PI) / 180;
  const ray = new Ray().set(pl.crLensX, pl.crLensY, pl.crLensZ, Math.sin(th), 0, Math.cos(th));
  const hit = new Hit();
  if (!lens.back.intersect(ray, hit)) return NaN;
  const chief = new LineTrace();
  chief.bx = hit.x; chief.by = hit.y;
  if (placedLine(lens, pl, chief) !== RayStatus.ok) return NaN;
  const setup = pencilSetup(lens, pl, null);
  if (q.nearMm !== null) targetOnLine(chief, setup, q.nearMm);
  const p = new PencilPower();
  if (pencilPower(lens, chief, setup, p) !== RayStatus.ok) return NaN;
  return q.goal === 'astigmatism' ? p.vXX - p.vYY : p.meanError;
}
