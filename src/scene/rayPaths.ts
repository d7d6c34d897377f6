/**
 * The polylines to draw for one visual point, in the lens frame (mm), shared by the 3-D
 * scene and the 2-D cross-section so the two always agree.
 *
 * - exact: centre of rotation -> visual point on the back surface -> exit point on the front
 *   -> object side along the traced direction (the engine's LineTrace);
 * - prentice, paraxial: the object-side directions those answers predict, from the engine's
 *   deviatedDirection applied to the eye-side direction, drawn from the same exit point;
 * - undeviated: the eye-side line continued as if there were no lens.
 *
 * Deviation magnification m (display only): the predicted rays are drawn with their angle
 * from the exact answer's direction multiplied by m (d = normalise(r + m (p - r))), so a
 * difference of a few minutes of arc can be seen; the exact ray is always to scale.
 */
import { type FourAnswers, type LineTrace, deviatedDirection } from '../optics/index.ts';

export interface RayPaths {
  /** whether the exact trace reached object space */
  exactOk: boolean;
  /** 4 points: CR, back, front, object end (only the first 2 when the trace failed) */
  exact: Float64Array;
  exactCount: number;
  prentice: Float64Array;
  paraxial: Float64Array;
  undeviated: Float64Array;
  /** focimeter beam: start, back, front, object end */
  focimeter: Float64Array;
  focimeterOk: boolean;
}

export function allocateRayPaths(): RayPaths {
  return {
    exactOk: false, exact: new Float64Array(12), exactCount: 0,
    prentice: new Float64Array(6), paraxial: new Float64Array(6), undeviated: new Float64Array(6),
    focimeter: new Float64Array(12), focimeterOk: false,
  };
}

const _d = { x: 0, y: 0, z: 0 };

/** Angle from ref to dir multiplied by m (both unit vectors), written to out as a unit vector. */
export function magnifyFrom(
  rx: number, ry: number, rz: number, dx: number, dy: number, dz: number, m: number,
  out: { x: number; y: number; z: number },
): void {
  let x = rx + m * (dx - rx), y = ry + m * (dy - ry), z = rz + m * (dz - rz);
  const l = Math.hypot(x, y, z) || 1;
  x /= l; y /= l; z /= l;
  out.x = x; out.y = y; out.z = z;
}

/**
 * Fill the paths for the answers; objectLengthMm is how far the object-side rays run past
 * the front surface.
 */
export function buildRayPaths(a: FourAnswers, mag: number, objectLengthMm: number, out: RayPaths): RayPaths {
  const t: LineTrace = a.exactTrace;
  const e = out.exact;
  e[0] = t.sx; e[1] = t.sy; e[2] = t.sz;
  e[3] = t.bx; e[4] = t.by; e[5] = t.bz;
  out.exactOk = !('failure' in a.exact);
  // where the predicted rays start: the exact exit point, or the visual point if none
  let px = t.bx, py = t.by, pz = t.bz;
  // reference direction for magnification: the exact object-side ray, or the eye-side one
  let rx = t.ax, ry = t.ay, rz = t.az;
  if (out.exactOk) {
    e[6] = t.fx; e[7] = t.fy; e[8] = t.fz;
    e[9] = t.fx + objectLengthMm * t.ox; e[10] = t.fy + objectLengthMm * t.oy; e[11] = t.fz + objectLengthMm * t.oz;
    out.exactCount = 4;
    px = t.fx; py = t.fy; pz = t.fz;
    // the exact answer's prism turned back into a direction, so that magnification acts on
    // the differences between the prism values alone (with m = 1 nothing changes)
    const ex = a.exact as { x: number; y: number };
    deviatedDirection(t.ax, t.ay, t.az, ex.x, ex.y, _d);
    rx = _d.x; ry = _d.y; rz = _d.z;
  } else {
    out.exactCount = 2;
  }
  const bothPredicted: [Float64Array, { x: number; y: number }][] = [[out.prentice, a.prentice], [out.paraxial, a.paraxial]];
  for (const [arr, p] of bothPredicted) {
    deviatedDirection(t.ax, t.ay, t.az, p.x, p.y, _d);
    magnifyFrom(rx, ry, rz, _d.x, _d.y, _d.z, mag, _d);
    arr[0] = px; arr[1] = py; arr[2] = pz;
    arr[3] = px + objectLengthMm * _d.x; arr[4] = py + objectLengthMm * _d.y; arr[5] = pz + objectLengthMm * _d.z;
  }
  // the undeviated line runs on to the same z as the exact object-side end
  const zEnd = out.exactOk ? e[11]! : t.bz + objectLengthMm;
  const s = (zEnd - t.bz) / (t.az || 1);
  const u = out.undeviated;
  u[0] = t.bx; u[1] = t.by; u[2] = t.bz;
  u[3] = t.bx + s * t.ax; u[4] = t.by + s * t.ay; u[5] = t.bz + s * t.az;

  const f = a.focimeterTrace;
  const fo = out.focimeter;
  out.focimeterOk = !('failure' in a.focimeter);
  fo[0] = f.sx; fo[1] = f.sy; fo[2] = f.sz;
  fo[3] = f.bx; fo[4] = f.by; fo[5] = f.bz;
  fo[6] = f.fx; fo[7] = f.fy; fo[8] = f.fz;
  fo[9] = f.fx + objectLengthMm * f.ox; fo[10] = f.fy + objectLengthMm * f.oy; fo[11] = f.fz + objectLengthMm * f.oz;
  return out;
}
