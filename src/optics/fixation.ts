/**
 * Where the eye looks through the lens for a given target (docs/binocular.md): the visual
 * point whose exact line of sight, traced from the centre of rotation through the lens, leaves
 * towards the target. Solved by a 2-D Newton iteration on the exact trace (Jacobian by finite
 * differences), started from the straight line from the centre of rotation to the target.
 */
import { RayStatus } from './errors.ts';
import type { Lens } from './lens.ts';
import { type Placement, placedLineOfSight } from './placement.ts';
import { LineTrace } from './trace.ts';

/** A fixation target in the EYE frame (centre of rotation at the origin), mm. */
export type Target =
  | { kind: 'point'; x: number; y: number; z: number }
  /** a distant target in direction (x, y, z) (need not be unit) */
  | { kind: 'direction'; x: number; y: number; z: number };

export type FixationStatus = 'ok' | 'no-convergence' | 'tir' | 'miss' | 'geometry' | 'edge' | 'target';

export interface Fixation {
  status: FixationStatus;
  message: string;
  /** visual point on the back surface, lens frame, relative to the optical centre, mm */
  cx: number;
  cy: number;
  iterations: number;
  /** the final trace (lens frame; px, py in the eye frame) */
  trace: LineTrace;
}

const STATUS_NAMES: FixationStatus[] = ['ok', 'miss', 'tir', 'geometry', 'edge'];

/** A trace status as a fixation status. */
export function fixationStatusOf(st: RayStatus): FixationStatus {
  return STATUS_NAMES[st] ?? 'geometry';
}

/**
 * Largest start point (distance from the optical centre on the back vertex plane, mm) the
 * search begins from: far beyond any lens (diameters are at most 100 mm), and small enough
 * that every later sum and square stays finite.
 */
const MAX_START_MM = 1e6;

export interface FixationOptions {
  /** convergence: miss distance at the target (mm) or direction error (rad) */
  tolerance?: number;
  maxIterations?: number;
}

/**
 * Solve the visual point for a target. Never throws: a target behind the lens, a trace that
 * fails or an iteration that does not converge is reported in `status` and `message`.
 */
export function solveFixation(lens: Lens, pl: Placement, target: Target, opts: FixationOptions = {}): Fixation {
  const tol = opts.tolerance ?? 1e-10;
  const maxIt = opts.maxIterations ?? 40;
  const trace = new LineTrace();
  const res: Fixation = { status: 'ok', message: '', cx: 0, cy: 0, iterations: 0, trace };
  // target in the lens frame
  const isPoint = target.kind === 'point';
  let tx: number, ty: number, tz: number;
  if (isPoint) {
    const p = pl.toLensPoint(target.x, target.y, target.z);
    tx = p.x; ty = p.y; tz = p.z;
    if (!(tz > lens.ctMm + 1)) {
      return { ...res, status: 'target', message: 'the target must lie in front of the lens (more than 1 mm beyond its front surface)' };
    }
  } else {
    const len = Math.hypot(target.x, target.y, target.z);
    if (!(len > 0) || !(target.z > 0)) {
      return { ...res, status: 'target', message: 'a distant target must lie in front of the eye (positive z direction)' };
    }
    const r = pl.r;
    const dx = target.x / len, dy = target.y / len, dz = target.z / len;
    tx = r[0]! * dx + r[3]! * dy + r[6]! * dz;
    ty = r[1]! * dx + r[4]! * dy + r[7]! * dz;
    tz = r[2]! * dx + r[5]! * dy + r[8]! * dz;
  }
  const sx = pl.crLensX, sy = pl.crLensY, sz = pl.crLensZ;
  // residual of a visual point: how far the object-side ray passes from the target (point:
  // perpendicular offset in mm; direction: difference of unit directions, scaled to mm at 1 m)
  const r2 = { x: 0, y: 0 };
  const residual = (cx: number, cy: number): RayStatus => {
    const st = placedLineOfSight(lens, pl, cx, cy, trace);
    if (st !== RayStatus.ok) return st;
    if (isPoint) {
      const wx = tx - trace.fx, wy = ty - trace.fy, wz = tz - trace.fz;
      const along = wx * trace.ox + wy * trace.oy + wz * trace.oz;
      r2.x = wx - along * trace.ox;
      r2.y = wy - along * trace.oy;
    } else {
      r2.x = 1000 * (trace.ox - tx);
      r2.y = 1000 * (trace.oy - ty);
    }
    return st;
  };
  // paraxial start: the straight line from the centre of rotation towards the target, met
  // with the back vertex plane (z = 0 of the lens frame)
  let cx: number, cy: number;
  if (isPoint) {
    const k = -sz / (tz - sz);
    cx = sx + k * (tx - sx);
    cy = sy + k * (ty - sy);
  } else {
    const k = -sz / tz;
    cx = sx + k * tx;
    cy = sy + k * ty;
  }
  // a direction almost square to the lens axis (z = 5e-324, say) puts the start out of
  // range of any number: no line of sight reaches such a target through the lens. Every
  // number of a Fixation stays finite whatever its status.
  if (!(Math.abs(cx) <= MAX_START_MM && Math.abs(cy) <= MAX_START_MM)) {
    return { ...res, status: 'target', message: 'the target lies too far to the side to be seen through the lens' };
  }
  let st = residual(cx, cy);
  if (st !== RayStatus.ok) return fail(res, st, cx, cy, 0);
  let fx = r2.x, fy = r2.y;
  let norm = Math.hypot(fx, fy);
  const h = 1e-5; // mm, finite-difference step
  for (let it = 1; it <= maxIt; it++) {
    if (norm < (isPoint ? tol : tol * 1000)) {
      residual(cx, cy);
      return { ...res, cx, cy, iterations: it - 1, message: 'converged' };
    }
    if (residual(cx + h, cy) !== RayStatus.ok) return fail(res, trace.status, cx, cy, it);
    const j11 = (r2.x - fx) / h, j21 = (r2.y - fy) / h;
    if (residual(cx, cy + h) !== RayStatus.ok) return fail(res, trace.status, cx, cy, it);
    const j12 = (r2.x - fx) / h, j22 = (r2.y - fy) / h;
    const det = j11 * j22 - j12 * j21;
    if (!(Math.abs(det) > 1e-300)) break;
    let dx = -(j22 * fx - j12 * fy) / det;
    let dy = -(-j21 * fx + j11 * fy) / det;
    // damped step: halve until the residual falls
    let accepted = false;
    for (let k = 0; k < 30; k++) {
      st = residual(cx + dx, cy + dy);
      if (st === RayStatus.ok) {
        const n2 = Math.hypot(r2.x, r2.y);
        if (n2 < norm || n2 === 0) {
          cx += dx; cy += dy; fx = r2.x; fy = r2.y; norm = n2;
          accepted = true;
          break;
        }
      }
      dx /= 2; dy /= 2;
    }
    if (!accepted) {
      residual(cx, cy);
      if (norm < (isPoint ? 1e-7 : 1e-7 * 1000)) return { ...res, cx, cy, iterations: it, message: 'converged' };
      break;
    }
  }
  residual(cx, cy);
  return {
    ...res, cx, cy, status: 'no-convergence', iterations: maxIt,
    message: `the line of sight to this target could not be found (the search stopped ${norm.toExponential(2)} mm from it)`,
  };
}

function fail(res: Fixation, st: RayStatus, cx: number, cy: number, it: number): Fixation {
  const name = fixationStatusOf(st);
  const why: Record<string, string> = {
    miss: 'the line of sight towards this target misses a lens surface',
    tir: 'the line of sight towards this target is totally internally reflected',
    geometry: 'the line of sight towards this target crosses the lens where it has no thickness',
    edge: 'the line of sight towards this target passes beyond the lens edge',
  };
  return { ...res, status: name, message: why[name] ?? name, cx, cy, iterations: it };
}
