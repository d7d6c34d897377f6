/**
 * A lens placed in front of an eye (shared/DESIGN.md §4-5, §8).
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
 */
import { RayStatus } from './errors.ts';
import type { Lens } from './lens.ts';
import type { Eye } from './notation.ts';
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
  out.sx = pl.crLensX; out.sy = pl.crLensY; out.sz = pl.crLensZ;
  out.bx = cx; out.by = cy;
  const st = lineOfSight(lens, out);
  if (st === RayStatus.ok && pl.tilted) setPrismComponents(out, pl.r);
  return st;
}
