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
import { refractVec } from './refract.ts';
import { Hit, Ray, SagEval } from './surface.ts';

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

const _hit = new Hit();
const _sag = new SagEval();
const _ray = new Ray();
const _dir = { x: 0, y: 0, z: 0 };
const _base = { x: 0, y: 0 };

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
  const h = _hit;
  const st = backPoint(lens, out);
  if (st !== RayStatus.ok) return st;
  const cx = out.bx, cy = out.by;
  let ax = cx - out.sx, ay = cy - out.sy, az = h.z - out.sz;
  const len = Math.sqrt(ax * ax + ay * ay + az * az);
  if (!(az > 0)) return fail(out, RayStatus.geometry);
  const inv = 1 / len;
  ax *= inv; ay *= inv; az *= inv;
  out.ax = ax; out.ay = ay; out.az = az;
  _dir.x = ax; _dir.y = ay; _dir.z = az;
  if (!refractVec(_dir, h, lens.intoGlass)) return fail(out, RayStatus.tir);
  out.gx = _dir.x; out.gy = _dir.y; out.gz = _dir.z;
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
  const h = _hit;
  const st = backPoint(lens, out);
  if (st !== RayStatus.ok) return st;
  const cx = out.bx, cy = out.by;
  out.ax = h.nx; out.ay = h.ny; out.az = h.nz;
  out.gx = h.nx; out.gy = h.ny; out.gz = h.nz;
  // a start point 10 mm behind along the normal, for drawing only
  out.sx = cx - 10 * h.nx; out.sy = cy - 10 * h.ny; out.sz = h.z - 10 * h.nz;
  return throughFront(lens, out);
}

/** The back-surface point at (out.bx, out.by): out.bz, and its normal in _hit. */
function backPoint(lens: Lens, out: LineTrace): RayStatus {
  const cx = out.bx, cy = out.by;
  if (cx * cx + cy * cy > lens.radiusMm * lens.radiusMm) return fail(out, RayStatus.beyondEdge);
  _hit.x = cx; _hit.y = cy;
  if (!lens.back.fillPoint(_hit)) return fail(out, RayStatus.miss);
  out.bz = _hit.z;
  return RayStatus.ok;
}

/**
 * From the back-surface point (out.b*) along out.g* inside the glass, out through the front,
 * and the prism of the deviation between out.a* and the object-side direction.
 * (The tail that lineOfSight and focimeter share. It reads each LineTrace field once and keeps
 * the values in locals; the compiler inlines the surface's closed-form intersection and
 * Snell's law into it; see docs/performance.md.)
 */
function throughFront(lens: Lens, out: LineTrace): RayStatus {
  const h = _hit;
  const ray = _ray;
  const gx = out.gx, gy = out.gy, gz = out.gz;
  ray.px = out.bx; ray.py = out.by; ray.pz = out.bz;
  ray.dx = gx; ray.dy = gy; ray.dz = gz;
  if (!lens.front.intersect(ray, h)) return fail(out, RayStatus.miss);
  if (!(h.t > 0)) return fail(out, RayStatus.geometry);
  const fx = h.x, fy = h.y, fz = h.z;
  const r = lens.radiusMm;
  if (fx * fx + fy * fy > r * r) return fail(out, RayStatus.beyondEdge);
  out.fx = fx; out.fy = fy; out.fz = fz;
  // the exit point must lie where the lens has thickness: the back surface behind it
  if (lens.solidRadiusMm < 0) lens.findSolidRadius();
  const solid = lens.solidRadiusMm;
  if (fx * fx + fy * fy >= solid * solid && !solidAt(lens, out)) return fail(out, RayStatus.geometry);
  const d = _dir;
  d.x = gx; d.y = gy; d.z = gz;
  if (!refractVec(d, h, lens.outOfGlass)) return fail(out, RayStatus.tir);
  const bx = d.x, by = d.y, bz = d.z;
  out.ox = bx; out.oy = by; out.oz = bz;
  // the prism of the deviation between the reverse unit directions a (eye side) and o
  // (object side): 100 tan δ towards the projection of o - a on the x-y plane
  const ax = out.ax, ay = out.ay, az = out.az;
  const cx = ay * bz - az * by, cy = az * bx - ax * bz, cz = ax * by - ay * bx;
  const sin = Math.sqrt(cx * cx + cy * cy + cz * cz);
  const cos = ax * bx + ay * by + az * bz;
  if (!(cos > 0)) return fail(out, RayStatus.geometry);
  out.prism = (100 * sin) / cos;
  _base.x = bx - ax; _base.y = by - ay;
  splitPrism(out);
  out.status = RayStatus.ok;
  return RayStatus.ok;
}

/** Whether the lens has thickness at the exit point (out.fx, out.fy, out.fz): the back surface lies behind it. */
function solidAt(lens: Lens, out: LineTrace): boolean {
  _sag.x = out.fx; _sag.y = out.fy;
  return lens.back.evalSag(_sag) && out.fz > lens.back.vertexZ - _sag.sag;
}

/** Components of out.prism along the base direction in _base. */
function splitPrism(out: LineTrace): void {
  const hx = _base.x, hy = _base.y;
  const h = Math.sqrt(hx * hx + hy * hy);
  const mag = out.prism;
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
  _base.x = r[0]! * dx + r[1]! * dy + r[2]! * dz;
  _base.y = r[3]! * dx + r[4]! * dy + r[5]! * dz;
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
