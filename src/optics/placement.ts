/**
 * A lens placed in front of an eye (docs/conventions.md: the wearer and lens frames, "Tilted and wrapped lenses").
 *
 * Eye frame: the wearer frame with the eye's centre of rotation (CR) at the origin: x towards
 * the wearer's left, y up, z forwards. Lens frame: origin at the back vertex, z along the
 * optical axis (lens.ts). A placement maps the lens frame into the eye frame:
 *   eye = R · lens + V,   V = the back vertex (the optical centre) in the eye frame,
 *   R = Ry(wrap) · Rx(pantoscopic): pantoscopic tilt turns the lens about a horizontal axis
 *   through its back vertex, lower edge towards the face; wrap (face form) about a vertical
 *   axis through the back vertex, temporal edge towards the face. The optical centre's
 *   position V is given before tilting (the tilt turns the lens about it).
 *
 * Traces run in the lens frame; prism components are then taken in the eye (wearer) frame.
 * All four answers of a placed lens are reported in the wearer frame (docs/conventions.md,
 * "Tilted and wrapped lenses").
 */
import { RayStatus } from './errors.ts';
import type { Lens } from './lens.ts';
import type { Eye } from './notation.ts';
import { Hit, Ray } from './surface.ts';
import { LineTrace, lineOfSight, setPrismComponents } from './trace.ts';

export interface PlacementSpec {
  /** optical centre (back vertex) in the eye frame, mm: x, y of the OC relative to the CR's straight-ahead line */
  ocXMm: number;
  ocYMm: number;
  /** back vertex to CR distance along z, mm */
  crDistanceMm: number;
  /** pantoscopic tilt, degrees (lower edge towards the face) */
  pantoDeg: number;
  /** wrap (face form), degrees (temporal edge towards the face) */
  wrapDeg: number;
  eye: Eye;
}

export class Placement {
  readonly spec: Readonly<PlacementSpec>;
  /** lens -> eye rotation, row-major 3x3 */
  readonly r: Float64Array;
  /** back vertex in the eye frame, mm */
  readonly vx: number;
  readonly vy: number;
  readonly vz: number;
  readonly tilted: boolean;
  /** the CR in the lens frame, mm */
  readonly crLensX: number;
  readonly crLensY: number;
  readonly crLensZ: number;

  constructor(spec: PlacementSpec) {
    this.spec = Object.freeze({ ...spec });
    const p = (spec.pantoDeg * Math.PI) / 180;
    // temporal is -x for the right eye, +x for the left: turn so that it comes towards -z
    const w = ((spec.eye === 'R' ? -1 : 1) * spec.wrapDeg * Math.PI) / 180;
    const cp = Math.cos(p), sp = Math.sin(p), cw = Math.cos(w), sw = Math.sin(w);
    // Rx(p) = [[1,0,0],[0,cp,-sp],[0,sp,cp]];  Ry(w) = [[cw,0,sw],[0,1,0],[-sw,0,cw]]
    this.r = new Float64Array([cw, sw * sp, sw * cp, 0, cp, -sp, -sw, cw * sp, cw * cp]);
    this.tilted = spec.pantoDeg !== 0 || spec.wrapDeg !== 0;
    this.vx = spec.ocXMm;
    this.vy = spec.ocYMm;
    this.vz = spec.crDistanceMm;
    const c = this.toLensPoint(0, 0, 0);
    this.crLensX = c.x; this.crLensY = c.y; this.crLensZ = c.z;
  }

  /** An eye-frame point in the lens frame (allocates: not for the per-ray path). */
  toLensPoint(x: number, y: number, z: number): { x: number; y: number; z: number } {
    const r = this.r, dx = x - this.vx, dy = y - this.vy, dz = z - this.vz;
    return { x: r[0]! * dx + r[3]! * dy + r[6]! * dz, y: r[1]! * dx + r[4]! * dy + r[7]! * dz, z: r[2]! * dx + r[5]! * dy + r[8]! * dz };
  }

  /** A lens-frame point in the eye frame (allocates). */
  toEyePoint(x: number, y: number, z: number): { x: number; y: number; z: number } {
    const r = this.r;
    return { x: r[0]! * x + r[1]! * y + r[2]! * z + this.vx, y: r[3]! * x + r[4]! * y + r[5]! * z + this.vy, z: r[6]! * x + r[7]! * y + r[8]! * z + this.vz };
  }

  /** A lens-frame direction in the eye frame (allocates). */
  toEyeDir(x: number, y: number, z: number): { x: number; y: number; z: number } {
    const r = this.r;
    return { x: r[0]! * x + r[1]! * y + r[2]! * z, y: r[3]! * x + r[4]! * y + r[5]! * z, z: r[6]! * x + r[7]! * y + r[8]! * z };
  }
}

/**
 * Exact line of sight of a placed lens through the back-surface point (cx, cy) of the lens
 * frame (relative to the optical centre, perpendicular to the optical axis). On return the
 * trace's points and directions are in the LENS frame, and out.px, out.py are the prism
 * components in the EYE (wearer) frame.
 */
export function placedLineOfSight(lens: Lens, pl: Placement, cx: number, cy: number, out: LineTrace): RayStatus {
  out.bx = cx; out.by = cy;
  return placedLine(lens, pl, out);
}

/**
 * placedLineOfSight's work, reading the visual point from (out.bx, out.by): the form for
 * loops. It takes objects only, so it allocates nothing even where the compiler declines to
 * inline the call (numbers passed to such a call are boxed; docs/performance.md).
 */
export function placedLine(lens: Lens, pl: Placement, out: LineTrace): RayStatus {
  out.sx = pl.crLensX; out.sy = pl.crLensY; out.sz = pl.crLensZ;
  const st = lineOfSight(lens, out);
  if (st === RayStatus.ok && pl.tilted) setPrismComponents(out, pl.r);
  return st;
}

/**
 * A lens-frame prism (px, py) (a deviation in the lens's own x-y plane) in the wearer frame:
 * the same magnitude, with the base direction of its projection on the wearer's x-y plane.
 * This is the rule the exact trace follows (setPrismComponents), applied to the prisms that
 * are lens properties (Prentice, first order, focimeter). Identity for an untilted lens.
 */
export function toWearerPrism(pl: Placement, px: number, py: number, out: { x: number; y: number }): void {
  if (!pl.tilted) { out.x = px; out.y = py; return; }
  const r = pl.r;
  const hx = r[0]! * px + r[1]! * py, hy = r[3]! * px + r[4]! * py;
  const h = Math.hypot(hx, hy), m = Math.hypot(px, py);
  if (h === 0 || m === 0) { out.x = 0; out.y = 0; return; }
  out.x = (m * hx) / h;
  out.y = (m * hy) / h;
}

/** The inverse of toWearerPrism: a wearer-frame prism as a lens-frame one. */
export function toLensPrism(pl: Placement, wx: number, wy: number, out: { x: number; y: number }): void {
  if (!pl.tilted) { out.x = wx; out.y = wy; return; }
  const r = pl.r;
  // the lens-frame direction whose projection has direction (wx, wy): solve the top-left 2x2
  const a = r[0]!, b = r[1]!, c = r[3]!, d = r[4]!;
  const det = a * d - b * c;
  const lx = (d * wx - b * wy) / det, ly = (-c * wx + a * wy) / det;
  const l = Math.hypot(lx, ly), m = Math.hypot(wx, wy);
  if (l === 0 || m === 0) { out.x = 0; out.y = 0; return; }
  out.x = (m * lx) / l;
  out.y = (m * ly) / l;
}

/**
 * The centration point of a placed lens: where the eye's straight-ahead line (from the centre
 * of rotation along +z of the eye frame, the pupil in primary gaze) meets the back surface.
 * `lens` is the lens-frame position (what a focimeter is centred on, and where the line of
 * sight passes in primary gaze); `wearer` the same point from the optical centre in the wearer
 * frame (for an untilted lens both are (-ocX, -ocY)). Null if the line misses the surface.
 */
export function centrationPoint(lens: Lens, pl: Placement): { lens: { x: number; y: number }; wearer: { x: number; y: number } } | null {
  const r = pl.r;
  if (!pl.tilted) {
    return { lens: { x: -pl.vx, y: -pl.vy }, wearer: { x: -pl.vx, y: -pl.vy } };
  }
  const ray = new Ray();
  // eye-frame +z in the lens frame: the third row of R read as a column (R^T e_z)
  ray.set(pl.crLensX, pl.crLensY, pl.crLensZ, r[6]!, r[7]!, r[8]!);
  const hit = new Hit();
  if (!lens.back.intersect(ray, hit)) return null;
  const e = pl.toEyePoint(hit.x, hit.y, hit.z);
  return { lens: { x: hit.x, y: hit.y }, wearer: { x: e.x - pl.vx, y: e.y - pl.vy } };
}

/** How the optical centre is lowered for pantoscopic tilt (docs/conventions.md). */
export type TiltDrop = 'none' | 'rule-of-thumb' | 'centre-of-rotation';

/**
 * The optical-centre drop for a pantoscopic tilt, mm (positive: lower the OC):
 * 'rule-of-thumb' 1 mm per 2° of tilt (common practice, no source);
 * 'centre-of-rotation' s·tan(tilt), which puts the centre of rotation on the optical axis
 * (geometry: the axis through the back vertex at height -drop, tilted by the angle, meets
 * the centre of rotation s behind it).
 */
export function tiltDropMm(rule: TiltDrop, pantoDeg: number, crDistanceMm: number): number {
  if (rule === 'rule-of-thumb') return pantoDeg / 2;
  if (rule === 'centre-of-rotation') return crDistanceMm * Math.tan((pantoDeg * Math.PI) / 180);
  return 0;
}
