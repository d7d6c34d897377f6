/**
 * The power the eye gets at a visual point: the vergence of the narrow pencil that reaches the
 * rotating eye along its exact line of sight, and its errors against the prescription
 * (docs/method.md, "Power at the visual point").
 *
 * Where it is measured: on the vertex sphere, the sphere about the eye's centre of rotation
 * (CR) through the back-surface point on the eye's straight-ahead line (radius: the fitting
 * distance). At the point V where the line of sight crosses it, the pencil's wavefront has a
 * curvature; as a 2x2 symmetric vergence matrix (D, converging positive) in the plane normal
 * to the line of sight it gives sphere, cylinder and axis. Axes of that plane (docs/method.md):
 * e1 = the wearer's vertical x the line of sight, normalised (horizontal, towards the
 * wearer's left at straight-ahead gaze), e2 = line of sight x e1 (upwards). Angles are
 * counter-clockwise from e1 as seen facing the wearer, like a prescription's axis.
 *
 * Errors: E = V - (Rx + D I), with Rx the lens's back vertex power matrix taken in (e1, e2)
 * as if they were (x, y), and D the demand of the target at V: 0 for a distant target,
 * -1/|QV| for a target Q at a finite distance (its vergence at V without a lens). Mean
 * error = trace(E) / 2; astigmatic error = the cylinder of E, >= 0.
 *
 * Two methods:
 * - pencilPower: a general one. Four real rays a small step either side of the chief ray, in
 *   two directions, traced forwards from the object through both surfaces; their heights and
 *   slopes on the plane normal to the line of sight at V give the vergence matrix by central
 *   differences, V = -(ds/dq)(dh/dq)^-1 (the Jacobians of slope and height on the step).
 *   Valid for every surface and placement the trace handles (torics, conics off axis, tilt,
 *   wrap, an eye off the lens axis).
 * - coddington: Coddington's equations (Coddington 1829) along the exact chief ray, with the
 *   surfaces' meridional and sagittal curvatures at the hit points. Valid where the chief ray
 *   lies in a plane through the lens axis and both surfaces are of revolution and untilted
 *   (the CR on the axis, or the visual point in the CR's meridian); it gives the tangential
 *   and sagittal vergences.
 *
 * Frame: the LENS frame of trace.ts (origin at the back vertex, z towards the object).
 * Per-ray path: no allocation; results go into a caller-owned PencilPower.
 */
import { RayStatus } from './errors.ts';
import type { Lens } from './lens.ts';
import type { Placement } from './placement.ts';
import { toSpheroCyl } from './powerMatrix.ts';
import { refractVec } from './refract.ts';
import { Hit, Ray, SurfaceKind, type Surface } from './surface.ts';
import type { LineTrace } from './trace.ts';

/** Where the pencil comes from and what it is judged against; one per lens and eye, reused per ray. */
export class PencilSetup {
  /** vertex sphere radius (CR to the back surface along the straight-ahead line), mm */
  radiusMm = 27;
  /** the wearer's vertical in the lens frame (unit) */
  upX = 0; upY = 1; upZ = 0;
  /** the prescription's matrix, D (xx, xy, yy) */
  rxXX = 0; rxXY = 0; rxYY = 0;
  /** true: a target at (qx, qy, qz) (lens frame, mm); false: a distant target along the chief ray */
  near = false;
  qx = 0; qy = 0; qz = 0;
  /** half the step between the finite-difference rays, mm */
  stepMm = 0.001;
}

/** Result of one pencil; reuse one instance per loop. */
export class PencilPower {
  status: RayStatus = RayStatus.ok;
  /** vergence matrix at the vertex sphere, D, in (e1, e2) */
  vXX = 0; vXY = 0; vYY = 0;
  /** the demand subtracted with the prescription: the target's vergence at V, D (0 distant) */
  demand = 0;
  /** error matrix V - (Rx + demand I), D */
  eXX = 0; eXY = 0; eYY = 0;
  /** trace(E) / 2, D */
  meanError = 0;
  /** the cylinder of E (difference of its principal values), D, >= 0 */
  astigmaticError = 0;
  /** V, the point on the vertex sphere, lens frame, mm */
  vx = 0; vy = 0; vz = 0;
  /** the axes of the plane normal to the line of sight, lens frame (unit) */
  e1x = 1; e1y = 0; e1z = 0;
  e2x = 0; e2y = 1; e2z = 0;
  /** the forward (light) direction of the line of sight at V, lens frame (unit; = -a of the trace) */
  dx = 0; dy = 0; dz = -1;
}

/** Coddington's tangential and sagittal vergences at V along a meridional chief ray. */
export class MeridionalPower {
  /** false where the equations do not apply (see coddington) */
  valid = false;
  /** D, converging positive */
  tangential = 0;
  sagittal = 0;
  /** unit direction of the tangential section in the plane normal to the line of sight, in (e1, e2) */
  t1 = 1; t2 = 0;
}

const _ray = new Ray();
const _hit = new Hit();
const _dir = { x: 0, y: 0, z: 0 };
/** heights (h1, h2) and slopes (s1, s2) of the four rays: +u1, -u1, +u2, -u2 */
const _fd = new Float64Array(16);

/**
 * The vergence matrix and errors of the pencil along the traced chief ray `chief` (a finished,
 * ok line of sight from the CR in chief.s*, lens frame). Returns the status (also in out.status).
 */
export function pencilPower(lens: Lens, chief: LineTrace, setup: PencilSetup, out: PencilPower): RayStatus {
  if (chief.status !== RayStatus.ok) return failPencil(out, chief.status);
  if (!setFrame(chief, setup, out)) return failPencil(out, RayStatus.geometry);
  // the incoming chief ray (forward, object space) and two unit steps normal to it
  let dx: number, dy: number, dz: number, qx: number, qy: number, qz: number;
  if (setup.near) {
    qx = setup.qx; qy = setup.qy; qz = setup.qz;
    dx = chief.fx - qx; dy = chief.fy - qy; dz = chief.fz - qz;
    const l = Math.sqrt(dx * dx + dy * dy + dz * dz);
    if (!(l > 0)) return failPencil(out, RayStatus.geometry);
    dx /= l; dy /= l; dz /= l;
  } else {
    dx = -chief.ox; dy = -chief.oy; dz = -chief.oz;
    // start 10 mm before the front-surface point, on the chief ray
    qx = chief.fx - 10 * dx; qy = chief.fy - 10 * dy; qz = chief.fz - 10 * dz;
  }
  // u1 = normalise(up x d), u2 = d x u1
  let u1x = setup.upY * dz - setup.upZ * dy, u1y = setup.upZ * dx - setup.upX * dz, u1z = setup.upX * dy - setup.upY * dx;
  const ul = Math.sqrt(u1x * u1x + u1y * u1y + u1z * u1z);
  if (!(ul > 1e-9)) return failPencil(out, RayStatus.geometry);
  u1x /= ul; u1y /= ul; u1z /= ul;
  const u2x = dy * u1z - dz * u1y, u2y = dz * u1x - dx * u1z, u2z = dx * u1y - dy * u1x;
  const h = setup.stepMm;
  for (let k = 0; k < 4; k++) {
    const sign = k % 2 === 0 ? h : -h;
    const ux = k < 2 ? u1x : u2x, uy = k < 2 ? u1y : u2y, uz = k < 2 ? u1z : u2z;
    const ray = _ray;
    if (setup.near) {
      // from the target towards a point beside the front-surface point
      let rx = chief.fx + sign * ux - qx, ry = chief.fy + sign * uy - qy, rz = chief.fz + sign * uz - qz;
      const rl = Math.sqrt(rx * rx + ry * ry + rz * rz);
      rx /= rl; ry /= rl; rz /= rl;
      ray.px = qx; ray.py = qy; ray.pz = qz; ray.dx = rx; ray.dy = ry; ray.dz = rz;
    } else {
      ray.px = qx + sign * ux; ray.py = qy + sign * uy; ray.pz = qz + sign * uz;
      ray.dx = dx; ray.dy = dy; ray.dz = dz;
    }
    const st = forwardThrough(lens, ray);
    if (st !== RayStatus.ok) return failPencil(out, st);
    // meet the plane through V normal to the line of sight
    const fx = out.dx, fy = out.dy, fz = out.dz;
    const cosr = ray.dx * fx + ray.dy * fy + ray.dz * fz;
    if (!(cosr > 0)) return failPencil(out, RayStatus.geometry);
    const t = ((out.vx - ray.px) * fx + (out.vy - ray.py) * fy + (out.vz - ray.pz) * fz) / cosr;
    const px = ray.px + t * ray.dx - out.vx, py = ray.py + t * ray.dy - out.vy, pz = ray.pz + t * ray.dz - out.vz;
    const j = 4 * k;
    _fd[j] = px * out.e1x + py * out.e1y + pz * out.e1z;
    _fd[j + 1] = px * out.e2x + py * out.e2y + pz * out.e2z;
    _fd[j + 2] = (ray.dx * out.e1x + ray.dy * out.e1y + ray.dz * out.e1z) / cosr;
    _fd[j + 3] = (ray.dx * out.e2x + ray.dy * out.e2y + ray.dz * out.e2z) / cosr;
  }
  // Jacobians on the step (columns: step along u1, along u2); the 1/(2h) cancels in S H^-1
  const h11 = _fd[0]! - _fd[4]!, h21 = _fd[1]! - _fd[5]!, h12 = _fd[8]! - _fd[12]!, h22 = _fd[9]! - _fd[13]!;
  const s11 = _fd[2]! - _fd[6]!, s21 = _fd[3]! - _fd[7]!, s12 = _fd[10]! - _fd[14]!, s22 = _fd[11]! - _fd[15]!;
  const det = h11 * h22 - h12 * h21;
  if (!(Math.abs(det) > 0)) return failPencil(out, RayStatus.geometry);
  // V = -S H^-1, H^-1 = [[h22, -h12], [-h21, h11]] / det; 1/mm -> D
  const k = -1000 / det;
  const a = k * (s11 * h22 - s12 * h21), b = k * (-s11 * h12 + s12 * h11);
  const c = k * (s21 * h22 - s22 * h21), d = k * (-s21 * h12 + s22 * h11);
  out.vXX = a; out.vXY = 0.5 * (b + c); out.vYY = d;
  setDemand(setup, out);
  return setErrors(setup, out);
}

/**
 * Coddington's equations along the chief ray (see the header): fills `out` and returns true
 * where they apply; false (out.valid false) where they do not. `pencil` must have been filled
 * by pencilPower for the same chief ray (it supplies V, the axes and the demand's target).
 */
export function coddington(lens: Lens, chief: LineTrace, setup: PencilSetup, pencil: PencilPower, out: MeridionalPower): boolean {
  out.valid = false;
  if (chief.status !== RayStatus.ok || pencil.status !== RayStatus.ok) return false;
  const front = lens.front, back = lens.back;
  if (front.kind === SurfaceKind.toric || back.kind === SurfaceKind.toric || front.tilted || back.tilted) return false;
  // the chief ray in a plane through the z axis: S x a has no z component
  const sx = chief.sx, sy = chief.sy, ax = chief.ax, ay = chief.ay;
  const cross = sx * ay - sy * ax;
  const scale = Math.hypot(sx, sy) * Math.hypot(ax, ay);
  if (Math.abs(cross) > 1e-12 * (scale + 1)) return false;
  const n = lens.index;
  // object vergence at the front point, 1/mm (reduced, air)
  let t: number, s: number;
  if (setup.near) {
    const l = Math.hypot(chief.fx - setup.qx, chief.fy - setup.qy, chief.fz - setup.qz);
    t = s = -1 / l;
  } else {
    t = s = 0;
  }
  // front: air (forward direction -o) into glass (forward -g); normal at the exit point
  if (!refractSurface(front, chief.fx, chief.fy, -chief.ox, -chief.oy, -chief.oz, -chief.gx, -chief.gy, -chief.gz, 1, n)) return false;
  t = (t * _c.cos2i + _c.power * _c.kt) / _c.cos2r;
  s = s + _c.power * _c.ks;
  // transfer inside the glass along the chief ray
  const dIn = Math.hypot(chief.fx - chief.bx, chief.fy - chief.by, chief.fz - chief.bz);
  t = t / (1 - (dIn / n) * t);
  s = s / (1 - (dIn / n) * s);
  if (!refractSurface(back, chief.bx, chief.by, -chief.gx, -chief.gy, -chief.gz, -chief.ax, -chief.ay, -chief.az, n, 1)) return false;
  t = (t * _c.cos2i + _c.power * _c.kt) / _c.cos2r;
  s = s + _c.power * _c.ks;
  // transfer to V: from the back point along the eye-side ray
  const toV = Math.hypot(chief.bx - chief.sx, chief.by - chief.sy, chief.bz - chief.sz) - setup.radiusMm;
  t = t / (1 - toV * t);
  s = s / (1 - toV * s);
  out.tangential = 1000 * t;
  out.sagittal = 1000 * s;
  // the tangential section: the radial direction (away from the axis) normal to the line of sight
  const rx = chief.bx, ry = chief.by;
  const rl = Math.hypot(rx, ry);
  if (rl === 0) { out.t1 = 1; out.t2 = 0; } else {
    const c1 = (rx * pencil.e1x + ry * pencil.e1y) / rl, c2 = (rx * pencil.e2x + ry * pencil.e2y) / rl;
    const cl = Math.hypot(c1, c2);
    if (cl > 1e-12) { out.t1 = c1 / cl; out.t2 = c2 / cl; } else { out.t1 = 1; out.t2 = 0; }
  }
  out.valid = Number.isFinite(out.tangential) && Number.isFinite(out.sagittal);
  return out.valid;
}

/** Per-surface terms of Coddington's equations, filled by refractSurface. */
const _c = { cos2i: 1, cos2r: 1, power: 0, kt: 0, ks: 0 };

/**
 * At the point (x, y) of an untilted surface of revolution, with forward incident direction
 * (ix, iy, iz) in index n1 and refracted direction (rx, ry, rz) in n2: cos² of both angles,
 * the oblique power factor n2 cos θ' - n1 cos θ and the meridional and sagittal curvatures
 * (1/mm, positive with the centre of curvature on the side the light goes to). With reduced
 * vergences T = n/t along the ray, Coddington's equations are then
 *   tangential: T' cos²θ' = T cos²θ + (n2 cos θ' - n1 cos θ) κ_t
 *   sagittal:   S' = S + (n2 cos θ' - n1 cos θ) κ_s.
 */
function refractSurface(
  surf: Surface, x: number, y: number, ix: number, iy: number, iz: number, rx: number, ry: number, rz: number, n1: number, n2: number,
): boolean {
  if (!surf.pointAt(x, y, _hit)) return false;
  const ci = Math.abs(ix * _hit.nx + iy * _hit.ny + iz * _hit.nz);
  const cr = Math.abs(rx * _hit.nx + ry * _hit.ny + rz * _hit.nz);
  _c.cos2i = ci * ci;
  _c.cos2r = cr * cr;
  _c.power = n2 * cr - n1 * ci;
  // a conic of revolution (Spencer & Murty 1962; sphere: k = 0): with w = 1 - k κ² r²,
  // sagittal κ_s = κ / sqrt(w), meridional κ_t = κ / w^(3/2)
  const k = surf.curvature, w = 1 - surf.conic * k * k * (x * x + y * y);
  if (!(w > 0)) return false;
  _c.ks = k / Math.sqrt(w);
  _c.kt = _c.ks / w;
  return true;
}

/** The forward ray (p, d) in `ray` through front then back; on return `ray` is the eye-side ray. */
function forwardThrough(lens: Lens, ray: Ray): RayStatus {
  const h = _hit, dir = _dir;
  if (!lens.front.intersect(ray, h)) return RayStatus.miss;
  dir.x = ray.dx; dir.y = ray.dy; dir.z = ray.dz;
  if (!refractVec(dir, h, lens.intoGlass)) return RayStatus.tir;
  ray.px = h.x; ray.py = h.y; ray.pz = h.z;
  ray.dx = dir.x; ray.dy = dir.y; ray.dz = dir.z;
  if (!lens.back.intersect(ray, h)) return RayStatus.miss;
  if (!(h.t > 0)) return RayStatus.geometry;
  if (!refractVec(dir, h, lens.outOfGlass)) return RayStatus.tir;
  ray.px = h.x; ray.py = h.y; ray.pz = h.z;
  ray.dx = dir.x; ray.dy = dir.y; ray.dz = dir.z;
  return RayStatus.ok;
}

/** V, the plane's axes and the line of sight's forward direction, from the chief ray. */
function setFrame(chief: LineTrace, setup: PencilSetup, out: PencilPower): boolean {
  const ax = chief.ax, ay = chief.ay, az = chief.az;
  const r = setup.radiusMm;
  out.vx = chief.sx + r * ax; out.vy = chief.sy + r * ay; out.vz = chief.sz + r * az;
  out.dx = -ax; out.dy = -ay; out.dz = -az;
  // e1 = up x a, normalised; e2 = a x e1
  let e1x = setup.upY * az - setup.upZ * ay, e1y = setup.upZ * ax - setup.upX * az, e1z = setup.upX * ay - setup.upY * ax;
  const l = Math.sqrt(e1x * e1x + e1y * e1y + e1z * e1z);
  if (!(l > 1e-9)) return false;
  e1x /= l; e1y /= l; e1z /= l;
  out.e1x = e1x; out.e1y = e1y; out.e1z = e1z;
  out.e2x = ay * e1z - az * e1y; out.e2y = az * e1x - ax * e1z; out.e2z = ax * e1y - ay * e1x;
  return true;
}

function setDemand(setup: PencilSetup, out: PencilPower): void {
  if (!setup.near) { out.demand = 0; return; }
  const dx = setup.qx - out.vx, dy = setup.qy - out.vy, dz = setup.qz - out.vz;
  out.demand = -1000 / Math.sqrt(dx * dx + dy * dy + dz * dz);
}

function setErrors(setup: PencilSetup, out: PencilPower): RayStatus {
  const eXX = out.vXX - setup.rxXX - out.demand, eXY = out.vXY - setup.rxXY, eYY = out.vYY - setup.rxYY - out.demand;
  out.eXX = eXX; out.eXY = eXY; out.eYY = eYY;
  out.meanError = 0.5 * (eXX + eYY);
  const half = 0.5 * (eXX - eYY);
  out.astigmaticError = 2 * Math.sqrt(half * half + eXY * eXY);
  if (!(Number.isFinite(out.meanError) && Number.isFinite(out.astigmaticError) && Number.isFinite(out.vXY))) {
    return failPencil(out, RayStatus.geometry);
  }
  out.status = RayStatus.ok;
  return RayStatus.ok;
}

function failPencil(out: PencilPower, status: RayStatus): RayStatus {
  out.status = status;
  out.vXX = 0; out.vXY = 0; out.vYY = 0;
  out.eXX = 0; out.eXY = 0; out.eYY = 0;
  out.meanError = 0; out.astigmaticError = 0; out.demand = 0;
  return status === RayStatus.ok ? RayStatus.geometry : status;
}

/** The power at one visual point, described (off the per-ray path). */
export interface PowerAnswer {
  /** vergence matrix at the vertex sphere, D, [[e1e1, e1e2], [e2e1, e2e2]] */
  matrix: [[number, number], [number, number]];
  sphere: number;
  cyl: number;
  /** degrees, [0, 180), counter-clockwise from e1 facing the wearer */
  axis: number;
  meanError: number;
  astigmaticError: number;
  /** the target's vergence at the vertex sphere that the errors allow for, D (0 distant) */
  demand: number;
  /** Coddington's tangential and sagittal vergences, D, where they apply (else absent) */
  tangential?: number;
  sagittal?: number;
  /** where the pencil is, for drawing (lens frame, mm): V, the light's unit direction there, the focal lines */
  geometry: PencilGeometry;
}

/** The pencil's place for drawing, lens frame, mm. */
export interface PencilGeometry {
  /** V, where the line of sight crosses the vertex sphere */
  v: readonly [number, number, number];
  /** the light's direction at V (towards the eye), unit */
  d: readonly [number, number, number];
  /** the two focal lines (focalLines) */
  lines: readonly [FocalLine, FocalLine];
}

/**
 * The setup for a lens placed before an eye (placement.ts): vertex sphere radius (the CR to
 * the back surface along the eye's straight-ahead line), the wearer's vertical and the
 * prescription in the lens frame, and the target: `nearEye` a point in the EYE frame (mm),
 * or null for a distant one.
 */
export function pencilSetup(lens: Lens, pl: Placement, nearEye: { x: number; y: number; z: number } | null, out = new PencilSetup()): PencilSetup {
  const r = pl.r;
  out.upX = r[3]!; out.upY = r[4]!; out.upZ = r[5]!;
  const m = lens.vertexMatrix;
  out.rxXX = m[0]; out.rxXY = 0.5 * (m[1] + m[2]); out.rxYY = m[3];
  out.radiusMm = fittingDistanceMm(lens, pl);
  if (nearEye) {
    const q = pl.toLensPoint(nearEye.x, nearEye.y, nearEye.z);
    out.near = true; out.qx = q.x; out.qy = q.y; out.qz = q.z;
  } else {
    out.near = false;
  }
  return out;
}

/** The CR to the back surface along the eye's straight-ahead line, mm (the vertex sphere's radius). */
export function fittingDistanceMm(lens: Lens, pl: Placement): number {
  const r = pl.r;
  const ray = new Ray();
  ray.set(pl.crLensX, pl.crLensY, pl.crLensZ, r[6]!, r[7]!, r[8]!);
  const hit = new Hit();
  if (!lens.back.intersect(ray, hit) || !(hit.t > 0)) return pl.spec.crDistanceMm;
  return hit.t;
}

/**
 * The power at the end of a finished line of sight `chief` (lens frame, from placedLine or
 * solveFixation): the pencil's vergence and errors, with Coddington's tangential and sagittal
 * vergences where they apply. Returns the failure status instead where the pencil fails.
 */
export function powerOfLine(lens: Lens, chief: LineTrace, setup: PencilSetup, cylSign: 'minus' | 'plus' = 'minus'): PowerAnswer | RayStatus {
  const p = new PencilPower();
  const st = pencilPower(lens, chief, setup, p);
  if (st !== RayStatus.ok) return st;
  const sc = toSpheroCyl([p.vXX, p.vXY, p.vXY, p.vYY], cylSign);
  const ans: PowerAnswer = {
    matrix: [[p.vXX, p.vXY], [p.vXY, p.vYY]],
    sphere: sc.sphereD, cyl: sc.cylD, axis: sc.axisDeg,
    meanError: p.meanError, astigmaticError: p.astigmaticError, demand: p.demand,
    geometry: { v: [p.vx, p.vy, p.vz], d: [p.dx, p.dy, p.dz], lines: focalLines(p) },
  };
  const m = new MeridionalPower();
  if (coddington(lens, chief, setup, p, m)) {
    ans.tangential = m.tangential;
    ans.sagittal = m.sagittal;
  }
  return ans;
}

/** Below this vergence, D, a focal line is at infinity (10^12 mm away and more; 1000 / a denormal vergence would overflow). */
export const FOCAL_LINE_MIN_VERGENCE_D = 1e-9;

/** One focal line of an astigmatic pencil, for drawing. */
export interface FocalLine {
  /** from V along the light's direction (towards the eye), mm; negative: a virtual line before V;
   *  null: at infinity (a vergence under FOCAL_LINE_MIN_VERGENCE_D) */
  distanceMm: number | null;
  /** principal vergence whose rays meet there, D */
  vergenceD: number;
  /** the line's direction, lens frame (unit): the other principal section's direction */
  x: number; y: number; z: number;
}

/**
 * The two focal lines of a finished pencil (Sturm's conoid): the rays of the principal
 * section with vergence λ meet 1000 / λ mm beyond V, where the pencil narrows to a line along
 * the other principal section. Off the per-ray path (allocates).
 */
export function focalLines(p: PencilPower): [FocalLine, FocalLine] {
  const a = p.vXX, b = p.vXY, d = p.vYY;
  const mean = 0.5 * (a + d), half = Math.hypot(0.5 * (a - d), b);
  // eigen-direction of the larger principal vergence, in (e1, e2)
  const phi = half === 0 ? 0 : 0.5 * Math.atan2(2 * b, a - d);
  const c = Math.cos(phi), s = Math.sin(phi);
  const dir = (u: number, v: number) => ({
    x: u * p.e1x + v * p.e2x, y: u * p.e1y + v * p.e2y, z: u * p.e1z + v * p.e2z,
  });
  const line = (vergence: number, along: { x: number; y: number; z: number }): FocalLine => ({
    distanceMm: Math.abs(vergence) < FOCAL_LINE_MIN_VERGENCE_D ? null : 1000 / vergence, vergenceD: vergence, ...along,
  });
  // the section along (c, s) has vergence mean + half; its rays meet in a line along (-s, c)
  return [line(mean + half, dir(-s, c)), line(mean - half, dir(c, s))];
}

/**
 * Put the pencil's target on the chief ray's object-side line at `distanceMm` from V (the
 * vertex-sphere point), so that its demand is exactly -1000 / distanceMm D. The form search
 * (pointFocal.ts) judges near vision this way.
 */
export function targetOnLine(chief: LineTrace, setup: PencilSetup, distanceMm: number): void {
  const r = setup.radiusMm;
  const wx = chief.fx - (chief.sx + r * chief.ax), wy = chief.fy - (chief.sy + r * chief.ay), wz = chief.fz - (chief.sz + r * chief.az);
  const wo = wx * chief.ox + wy * chief.oy + wz * chief.oz;
  const l = -wo + Math.sqrt(Math.max(0, wo * wo - (wx * wx + wy * wy + wz * wz) + distanceMm * distanceMm));
  setup.near = true;
  setup.qx = chief.fx + l * chief.ox; setup.qy = chief.fy + l * chief.oy; setup.qz = chief.fz + l * chief.oz;
}
