/**
 * Exact real-ray traces along the line of sight and at a focimeter (docs/method.md, "The four
 * answers", 3 and 4).
 *
 * All positions and directions are in the LENS frame (lens.ts): origin at the back vertex,
 * z towards the object. The traces run in reverse, from the eye side out to object space;
 * light travels the other way, so the eye-side light direction is d_eye = -a and the
 * object-side one d_obj = -b for the reverse directions a (eye side) and b (object side).
 *
 * Prism of a deviation (docs/conventions.md, "The exact prism of a ray"): magnitude 100 tan δ with δ the angle between d_obj and
 * d_eye; base direction the projection of d_eye - d_obj = b - a on the x-y plane.
 *
 * Per-ray path: no allocation. Results go into a caller-owned LineTrace.
 */
import { RayStatus } from './errors.ts';
import type { Lens } from './lens.ts';
import { work } from './rayWork.ts';
import { refractAt } from './refract.ts';
import { SagEval } from './surface.ts';

/** Result of one trace; reuse one instance per loop. */
export class LineTrace {
  status: RayStatus = RayStatus.ok;
  /** prism, Δ, components along lens-frame x and y (base direction, docs/conventions.md) */
  px = 0;
  py = 0;
  /** magnitude 100 tan δ, Δ */
  prism = 0;
  /** start of the eye-side ray (the centre of rotation for a line of sight) */
  sx = 0; sy = 0; sz = 0;
  /** visual point on the back surface */
  bx = 0; by = 0; bz = 0;
  /** exit point on the front surface */
  fx = 0; fy = 0; fz = 0;
  /** reverse direction on the eye side (from the start towards the back surface), unit */
  ax = 0; ay = 0; az = 1;
  /** reverse direction inside the lens, unit */
  gx = 0; gy = 0; gz = 1;
  /** reverse direction in object space, unit */
  ox = 0; oy = 0; oz = 1;
}

const _sag = new SagEval();
/**
 * The trace's own unboxed scratch: the reverse eye-side direction a, which the
 * prism needs at the end, and the prism's magnitude and base direction. The ray,
 * the hits and the directions in and out of the glass pass through `work` (rayWork.ts).
 */
const _t = new Float64Array(6); // a: 0-2; the prism: 3; its base direction: 4, 5

/**
 * Exact line of sight: the ray from the centre of rotation (crX, crY, crZ) through the point
 * of the back surface at transverse position (cx, cy), refracted at both surfaces.
 * Returns the status (also in out.status).
 *
 * The exported functions are small wrappers that store their numbers in `out` and call a
 * worker that takes only objects: a number passed to a call the compiler does not inline is
 * boxed, i.e. allocated; this keeps the per-ray path free of allocation.
 */
export function traceLineOfSight(
  lens: Lens, crX: number, crY: number, crZ: number, cx: number, cy: number, out: LineTrace,
): RayStatus {
  out.sx = crX; out.sy = crY; out.sz = crZ;
  out.bx = cx; out.by = cy;
  return lineOfSight(lens, out);
}

/** traceLineOfSight's work: start (out.sx..sz) and visual point (out.bx, out.by) in `out`. */
export function lineOfSight(lens: Lens, out: LineTrace): RayStatus {
  const w = work;
  const st = backPoint(lens, out);
  if (st !== RayStatus.ok) return st;
  // slots of `work` (rayWork.ts): the back point 6-8 and its normal 10-12; then the ray 0-5
  const cx = w[6]!, cy = w[7]!, bz = w[8]!;
  let ax = cx - out.sx, ay = cy - out.sy, az = bz - out.sz;
  const len = Math.sqrt(ax * ax + ay * ay + az * az);
  if (!(az > 0)) return fail(out, RayStatus.geometry);
  const inv = 1 / len;
  ax *= inv; ay *= inv; az *= inv;
  out.ax = ax; out.ay = ay; out.az = az;
  const t = _t;
  t[0] = ax; t[1] = ay; t[2] = az;
  w[3] = ax; w[4] = ay; w[5] = az;
  if (!refractAt(w, 3, 10, lens.intoGlass)) return fail(out, RayStatus.tir);
  out.gx = w[3]!; out.gy = w[4]!; out.gz = w[5]!;
  w[0] = cx; w[1] = cy; w[2] = bz;
  return throughFront(lens, out);
}

/**
 * Exact focimeter reading at back-surface point (cx, cy): the instrument's beam meets the
 * back surface along its normal (no bending there) and is bent at the front only
 * (docs/method.md, "4. Focimeter, exact and first order").
 * The eye-side direction `a` is that normal.
 */
export function traceFocimeter(lens: Lens, cx: number, cy: number, out: LineTrace): RayStatus {
  out.bx = cx; out.by = cy;
  return focimeter(lens, out);
}

/** traceFocimeter's work, reading the point from (out.bx, out.by). */
export function focimeter(lens: Lens, out: LineTrace): RayStatus {
  const w = work;
  const st = backPoint(lens, out);
  if (st !== RayStatus.ok) return st;
  const cx = w[6]!, cy = w[7]!, bz = w[8]!;
  const nx = w[10]!, ny = w[11]!, nz = w[12]!;
  out.ax = nx; out.ay = ny; out.az = nz;
  out.gx = nx; out.gy = ny; out.gz = nz;
  // a start point 10 mm behind along the normal, for drawing only
  out.sx = cx - 10 * nx; out.sy = cy - 10 * ny; out.sz = bz - 10 * nz;
  const t = _t;
  t[0] = nx; t[1] = ny; t[2] = nz;
  w[0] = cx; w[1] = cy; w[2] = bz;
  w[3] = nx; w[4] = ny; w[5] = nz;
  return throughFront(lens, out);
}

/** The back-surface point at (out.bx, out.by): out.bz, and the point (6-8) and its normal (10-12) in `work` (rayWork.ts). */
function backPoint(lens: Lens, out: LineTrace): RayStatus {
  const cx = out.bx, cy = out.by;
  if (cx * cx + cy * cy > lens.radiusMm * lens.radiusMm) return fail(out, RayStatus.beyondEdge);
  const w = work;
  w[6] = cx; w[7] = cy;
  if (!lens.back.fillPointWork()) return fail(out, RayStatus.miss);
  out.bz = w[8]!;
  return RayStatus.ok;
}

/**
 * From the back-surface point along the direction inside the glass (the ray in `work`, 0-5,
 * set by lineOfSight or focimeter, with the eye-side direction a in _t), out through the front,
 * and the prism of the deviation between a and the object-side direction.
 * (The tail that lineOfSight and focimeter share. It reads no LineTrace field: the values pass
 * in the unboxed scratch and in locals; the compiler inlines the surface's closed-form
 * intersection and Snell's law into it; see docs/performance.md.)
 */
function throughFront(lens: Lens, out: LineTrace): RayStatus {
  const w = work;
  if (!lens.front.intersectWork()) return fail(out, RayStatus.miss);
  if (!(w[9]! > 0)) return fail(out, RayStatus.geometry);
  const fx = w[6]!, fy = w[7]!, fz = w[8]!;
  const r = lens.radiusMm;
  if (fx * fx + fy * fy > r * r) return fail(out, RayStatus.beyondEdge);
  out.fx = fx; out.fy = fy; out.fz = fz;
  // the exit point must lie where the lens has thickness: the back surface behind it
  // (findSolidRadius and solidAt use sagAt and evalSag only, which leave `work` alone)
  if (lens.solidRadiusMm < 0) lens.findSolidRadius();
  const solid = lens.solidRadiusMm;
  if (fx * fx + fy * fy >= solid * solid && !solidAt(lens, out)) return fail(out, RayStatus.geometry);
  // the direction inside the glass is still the ray's (3-5): the intersection only reads it
  if (!refractAt(w, 3, 10, lens.outOfGlass)) return fail(out, RayStatus.tir);
  const bx = w[3]!, by = w[4]!, bz = w[5]!;
  out.ox = bx; out.oy = by; out.oz = bz;
  // the prism of the deviation between the reverse unit directions a (eye side) and o
  // (object side): 100 tan δ towards the projection of o - a on the x-y plane
  const t = _t;
  const ax = t[0]!, ay = t[1]!, az = t[2]!;
  const cx = ay * bz - az * by, cy = az * bx - ax * bz, cz = ax * by - ay * bx;
  const sin = Math.sqrt(cx * cx + cy * cy + cz * cz);
  const cos = ax * bx + ay * by + az * bz;
  if (!(cos > 0)) return fail(out, RayStatus.geometry);
  const prism = (100 * sin) / cos;
  out.prism = prism;
  t[3] = prism; t[4] = bx - ax; t[5] = by - ay;
  splitPrism(out);
  out.status = RayStatus.ok;
  return RayStatus.ok;
}

/** Whether the lens has thickness at the exit point (out.fx, out.fy, out.fz): the back surface lies behind it. */
function solidAt(lens: Lens, out: LineTrace): boolean {
  _sag.x = out.fx; _sag.y = out.fy;
  return lens.back.evalSag(_sag) && out.fz > lens.back.vertexZ - _sag.sag;
}

/** Components of the prism magnitude _t[3] along the base direction (_t[4], _t[5]), into out. */
function splitPrism(out: LineTrace): void {
  const t = _t;
  const hx = t[4]!, hy = t[5]!;
  const h = Math.sqrt(hx * hx + hy * hy);
  const mag = t[3]!;
  if (h === 0 || mag === 0) {
    out.px = 0; out.py = 0;
  } else {
    out.px = (mag * hx) / h;
    out.py = (mag * hy) / h;
  }
}

/**
 * Re-take the prism components of a finished trace in another frame: `r` (row-major 3x3)
 * turns lens-frame directions into that frame (a tilted lens's eye frame).
 */
export function setPrismComponents(out: LineTrace, r: Float64Array): void {
  const dx = out.ox - out.ax, dy = out.oy - out.ay, dz = out.oz - out.az;
  const t = _t;
  t[3] = out.prism;
  t[4] = r[0]! * dx + r[1]! * dy + r[2]! * dz;
  t[5] = r[3]! * dx + r[4]! * dy + r[5]! * dz;
  splitPrism(out);
}

function fail(out: LineTrace, status: RayStatus): RayStatus {
  out.status = status;
  out.px = 0; out.py = 0; out.prism = 0;
  return status;
}

/**
 * The reverse object-side direction that a given prism (px, py in Δ) would produce from the
 * reverse eye-side unit direction a: turned by δ = atan(|p| / 100) towards the base
 * direction. Used to draw the rays that Prentice's rule and the first-order value predict.
 */
export function deviatedDirection(
  ax: number, ay: number, az: number, px: number, py: number, out: { x: number; y: number; z: number },
): void {
  const m = Math.sqrt(px * px + py * py);
  if (m === 0) { out.x = ax; out.y = ay; out.z = az; return; }
  // unit vector perpendicular to a, in the plane of a and the base direction
  const wx = px / m, wy = py / m;
  const dot = wx * ax + wy * ay;
  let ex = wx - dot * ax, ey = wy - dot * ay, ez = -dot * az;
  const el = Math.sqrt(ex * ex + ey * ey + ez * ez);
  ex /= el; ey /= el; ez /= el;
  const d = Math.atan(m / 100);
  const c = Math.cos(d), s = Math.sin(d);
  out.x = c * ax + s * ex;
  out.y = c * ay + s * ey;
  out.z = c * az + s * ez;
}
