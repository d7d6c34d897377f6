/**
 * Refracting surfaces stored by vertex curvature: plane, sphere, conic asphere, toric.
 *
 * Frame (docs/conventions.md, "The lens frame"; docs/method.md, "Surface models"): each surface has a local frame with its
 * vertex at the origin, z along the lens's optical axis towards the object (+z), x and y as
 * in the wearer frame. The surface is z = -sag(x, y): a positive curvature κ = 1/R means the
 * surface is convex towards +z, its centre of curvature on the eye side at z = -R.
 * Lengths are in millimetres and curvatures in 1/mm inside the engine.
 *
 * Every method here is on the per-ray path: no allocation, results go into caller-owned
 * objects, and a geometric miss is a returned status, never an exception. The intersection
 * and the point-and-normal evaluation each have one core (`intersectWork`, `fillPointWork`)
 * that works in the unboxed scratch of rayWork.ts; `intersect` and `fillPoint` copy in and out.
 */
import { work } from './rayWork.ts';

/** Surface kinds. A plane is a sphere of curvature 0; it has its own tag only for speed. */
export const SurfaceKind = {
  /** sphere or plane (curvature 0) */
  sphere: 0,
  /** conic of revolution: sag = κr² / (1 + sqrt(1 - (1 + k)κ²r²)) */
  conic: 1,
  /** toric: a conic "tube" profile swept about an axis (see docs/method.md §toric) */
  toric: 2,
} as const;
export type SurfaceKind = (typeof SurfaceKind)[keyof typeof SurfaceKind];

/** Toric formation: which principal meridian is the swept (equator) curve. */
export type ToricForm = 'tyre' | 'barrel';

/** A point and unit direction; reused as scratch, never reallocated on the hot path. */
export class Ray {
  px = 0;
  py = 0;
  pz = 0;
  dx = 0;
  dy = 0;
  dz = 1;
  set(px: number, py: number, pz: number, dx: number, dy: number, dz: number): this {
    this.px = px;
    this.py = py;
    this.pz = pz;
    this.dx = dx;
    this.dy = dy;
    this.dz = dz;
    return this;
  }
}

/** Surface hit: point, parameter along the ray and unit normal (pointing towards +z). */
export class Hit {
  x = 0;
  y = 0;
  z = 0;
  /** distance along the ray, mm */
  t = 0;
  nx = 0;
  ny = 0;
  nz = 1;
}

/** Sag with its first derivatives, for the toric Newton step and for normals. */
export class SagEval {
  /** where: local transverse position, mm (input of evalSag) */
  x = 0;
  y = 0;
  sag = 0;
  dx = 0;
  dy = 0;
}

export interface SurfaceSpec {
  /** vertex curvature, 1/mm (sphere, conic; for a toric the curvature along meridian `axisDeg`) */
  curvature: number;
  /** conic constant k (0 = sphere) */
  conic?: number;
  /** toric only: curvature along the meridian perpendicular to `axisDeg`, 1/mm */
  curvature90?: number;
  /** toric only: direction of the first principal meridian, degrees counter-clockwise from +x */
  axisDeg?: number;
  /** toric only: which meridian is swept (tyre: the weaker one, the ophthalmic default) */
  form?: ToricForm;
  /** vertex position along the lens axis, mm */
  vertexZ: number;
  /** optional tilt of the surface about its vertex: rotation about x, then about y, degrees */
  tiltXDeg?: number;
  tiltYDeg?: number;
}

const NEWTON_TOL_MM = 1e-13;
const NEWTON_MAX = 40;

export class Surface {
  readonly kind: SurfaceKind;
  /** vertex curvature, 1/mm, along the first principal meridian for a toric */
  readonly curvature: number;
  readonly curvature90: number;
  readonly conic: number;
  readonly axisDeg: number;
  readonly form: ToricForm;
  readonly vertexZ: number;
  // toric model: tube profile (conic, curvature kT) swept about an axis at radius 1/kS,
  // in a frame (u, v) turned by axisDeg (u along the first principal meridian)
  private readonly kS: number;
  private readonly kT: number;
  private readonly sweepAlongU: boolean;
  private readonly cosA: number;
  private readonly sinA: number;
  // optional surface tilt: local = Rᵀ (lens - vertex); lens = R local + vertex
  readonly tilted: boolean;
  private readonly rot: Float64Array;
  /** an untilted sphere, plane or conic: intersect goes straight to the closed form */
  private readonly quadricFast: boolean;

  constructor(spec: SurfaceSpec) {
    this.curvature = spec.curvature;
    this.conic = spec.conic ?? 0;
    this.curvature90 = spec.curvature90 ?? spec.curvature;
    this.axisDeg = spec.axisDeg ?? 0;
    this.form = spec.form ?? 'tyre';
    this.vertexZ = spec.vertexZ;
    const toric = this.curvature90 !== this.curvature;
    this.kind = toric ? SurfaceKind.toric : this.conic !== 0 ? SurfaceKind.conic : SurfaceKind.sphere;
    const a = (this.axisDeg * Math.PI) / 180;
    this.cosA = Math.cos(a);
    this.sinA = Math.sin(a);
    // tyre: the weaker meridian is swept, the stronger is the tube; barrel: the reverse
    const uWeaker = Math.abs(this.curvature) <= Math.abs(this.curvature90);
    this.sweepAlongU = this.form === 'tyre' ? uWeaker : !uWeaker;
    this.kS = this.sweepAlongU ? this.curvature : this.curvature90;
    this.kT = this.sweepAlongU ? this.curvature90 : this.curvature;
    const tx = ((spec.tiltXDeg ?? 0) * Math.PI) / 180;
    const ty = ((spec.tiltYDeg ?? 0) * Math.PI) / 180;
    this.tilted = tx !== 0 || ty !== 0;
    // R = Ry(ty) · Rx(tx), row-major
    const cx = Math.cos(tx), sx = Math.sin(tx), cy = Math.cos(ty), sy = Math.sin(ty);
    this.rot = new Float64Array([cy, sy * sx, sy * cx, 0, cx, -sx, -sy, cy * sx, cy * cx]);
    this.quadricFast = !this.tilted && this.kind !== SurfaceKind.toric;
  }

  /**
   * Sag at local (x, y) with its gradient; returns false where the surface does not exist
   * (beyond a sphere's hemisphere, a conic's domain or a torus's tube).
   * (A small wrapper: the work is in evalSag, which takes only objects, so that no number is
   * boxed on a call that the compiler does not inline.)
   */
  sagAt(x: number, y: number, out: SagEval): boolean {
    out.x = x;
    out.y = y;
    return this.evalSag(out);
  }

  /** Sag and gradient at (out.x, out.y), written into out; false where there is no surface. */
  evalSag(out: SagEval): boolean {
    const x = out.x, y = out.y;
    if (this.kind !== SurfaceKind.toric) {
      const k = this.curvature;
      const r2 = x * x + y * y;
      const q2 = 1 - (1 + this.conic) * k * k * r2;
      if (q2 < 0) return false;
      const q = Math.sqrt(q2);
      if (q === 0 && k !== 0 && this.conic !== -1) {
        // rim of a hemisphere: slope is infinite there
        return false;
      }
      out.sag = (k * r2) / (1 + q);
      // d sag / dr = k r / q
      const g = q === 0 ? 0 : k / q;
      out.dx = g * x;
      out.dy = g * y;
      return true;
    }
    // toric: u along the first principal meridian, v perpendicular
    const u0 = x * this.cosA + y * this.sinA;
    const v0 = -x * this.sinA + y * this.cosA;
    // s: coordinate along the swept meridian, w: along the tube meridian
    const s = this.sweepAlongU ? u0 : v0;
    const w = this.sweepAlongU ? v0 : u0;
    const kT = this.kT;
    const qt2 = 1 - (1 + this.conic) * kT * kT * w * w;
    if (qt2 <= 0) return false;
    const qt = Math.sqrt(qt2);
    const a = (kT * w * w) / (1 + qt);
    const da = (kT * w) / qt;
    const den = 1 - this.kS * a;
    if (den <= 0) return false;
    const kp = this.kS / den;
    const q2 = 1 - kp * kp * s * s;
    if (q2 <= 0) return false;
    const q = Math.sqrt(q2);
    out.sag = a + (kp * s * s) / (1 + q);
    // ∂sag/∂s = κ' s / q ; ∂sag/∂w = a'(w) / q  (derivation: docs/method.md, toric surfaces)
    const ds = (kp * s) / q;
    const dw = da / q;
    const du = this.sweepAlongU ? ds : dw;
    const dv = this.sweepAlongU ? dw : ds;
    out.dx = du * this.cosA - dv * this.sinA;
    out.dy = du * this.sinA + dv * this.cosA;
    return true;
  }

  /**
   * Intersect a ray given in the LENS frame (unit direction). On success fills `hit` (lens
   * frame, unit normal towards +z, `t` the signed distance along the ray, which the caller
   * checks) and returns true; returns false on a miss (hit untouched).
   * (A thin wrapper: the ray is copied into the unboxed working storage (rayWork.ts), the one
   * core `intersectWork` runs there, and the hit is copied out.)
   */
  intersect(ray: Ray, hit: Hit): boolean {
    const w = work;
    // slots (rayWork.ts): 0-5 the ray, 6-12 the hit
    w[0] = ray.px; w[1] = ray.py; w[2] = ray.pz;
    w[3] = ray.dx; w[4] = ray.dy; w[5] = ray.dz;
    if (!this.intersectWork()) return false;
    hit.x = w[6]!; hit.y = w[7]!; hit.z = w[8]!; hit.t = w[9]!;
    hit.nx = w[10]!; hit.ny = w[11]!; hit.nz = w[12]!;
    return true;
  }

  /**
   * intersect's work: the ray from `work` (0-5, lens frame, left unchanged), the hit into
   * `work` (6-12, lens frame); false on a miss. The per-ray path calls this directly.
   * (Slots of `work`: rayWork.ts.)
   * (Small on purpose, so that the compiler inlines it: an untilted sphere, plane or conic,
   * the spectacle lens's usual surfaces, goes straight to the closed form.)
   */
  intersectWork(): boolean {
    if (this.quadricFast) return this.intersectQuadric(0);
    return this.intersectFramed();
  }

  /** intersectWork for a tilted surface or a toric: the ray into the surface frame and back. */
  private intersectFramed(): boolean {
    const w = work;
    // slots (rayWork.ts): 13-18 the ray in the surface frame, 6-12 the hit
    w[13] = w[0]!; w[14] = w[1]!; w[15] = w[2]! - this.vertexZ;
    w[16] = w[3]!; w[17] = w[4]!; w[18] = w[5]!;
    const R = this.rot;
    if (this.tilted) {
      const px = w[13]!, py = w[14]!, pz = w[15]!, dx = w[16]!, dy = w[17]!, dz = w[18]!;
      w[13] = R[0]! * px + R[3]! * py + R[6]! * pz;
      w[14] = R[1]! * px + R[4]! * py + R[7]! * pz;
      w[15] = R[2]! * px + R[5]! * py + R[8]! * pz;
      w[16] = R[0]! * dx + R[3]! * dy + R[6]! * dz;
      w[17] = R[1]! * dx + R[4]! * dy + R[7]! * dz;
      w[18] = R[2]! * dx + R[5]! * dy + R[8]! * dz;
    }
    if (this.kind !== SurfaceKind.toric) {
      if (!this.intersectQuadric(13)) return false;
    } else if (!this.intersectToric()) {
      return false;
    }
    if (this.tilted) {
      const x = w[6]!, y = w[7]!, z = w[8]!;
      w[6] = R[0]! * x + R[1]! * y + R[2]! * z;
      w[7] = R[3]! * x + R[4]! * y + R[5]! * z;
      w[8] = R[6]! * x + R[7]! * y + R[8]! * z;
      const a = w[10]!, b = w[11]!, c = w[12]!;
      w[10] = R[0]! * a + R[1]! * b + R[2]! * c;
      w[11] = R[3]! * a + R[4]! * b + R[5]! * c;
      w[12] = R[6]! * a + R[7]! * b + R[8]! * c;
    }
    w[8] = w[8]! + this.vertexZ;
    return true;
  }

  /**
   * Sphere or conic: the quadric κ(x² + y² + (1+k) z²) + 2z = 0, solved with the stable root
   * continuous with the vertex plane (Spencer & Murty, J Opt Soc Am 1962):
   * t = -c / (b + sign(b) sqrt(b² - ac)).
   * `o` is where the ray starts in `work` (rayWork.ts): 0, the ray in the lens frame of an
   * untilted surface (from intersectWork; the hit is then in the lens frame), or 13, already
   * in the surface frame (from intersectFramed; the hit is then in the surface frame). Values stay in
   * locals and the hit is written once.
   */
  private intersectQuadric(o: number): boolean {
    const w = work;
    const framed = o !== 0;
    const oz = framed ? 0 : this.vertexZ;
    const px = w[o]!, py = w[o + 1]!, pz = w[o + 2]! - oz, dx = w[o + 3]!, dy = w[o + 4]!, dz = w[o + 5]!;
    const k = this.curvature;
    const e = 1 + this.conic;
    const a = k * (dx * dx + dy * dy + e * dz * dz);
    const b = k * (px * dx + py * dy + e * pz * dz) + dz;
    const c = k * (px * px + py * py + e * pz * pz) + 2 * pz;
    const disc = b * b - a * c;
    if (disc < 0) return false;
    const den = b >= 0 ? b + Math.sqrt(disc) : b - Math.sqrt(disc);
    if (den === 0) return false;
    let t = -c / den;
    let x = px + t * dx, y = py + t * dy, z = pz + t * dz;
    let q = 1 + e * k * z; // = sqrt(1 - (1+k)κ²r²) on the vertex branch
    if (q < 0) {
      // a ray that starts beyond the centre of curvature (inside the sphere, or outside it on
      // the far side): the stable root above is the far branch; the vertex branch is the
      // other root, -den / a (the roots' product is c / a)
      if (a === 0) return false;
      t = -den / a;
      x = px + t * dx; y = py + t * dy; z = pz + t * dz;
      q = 1 + e * k * z;
      if (q < 0) return false;
    }
    // the hit: point 6-8, t 9, normal 10-12
    w[6] = x; w[7] = y; w[8] = framed ? z : z + oz; w[9] = t;
    w[10] = k * x; w[11] = k * y; w[12] = q;
    // a sphere's (κx, κy, 1 + κz) is of unit length on the surface; a conic's is not
    if (this.kind !== SurfaceKind.sphere) normaliseWork();
    return true;
  }

  /**
   * Point and unit normal (towards +z) of the surface at lens-frame transverse position
   * (x, y) of an untilted surface. Returns false where the surface does not exist.
   */
  pointAt(x: number, y: number, hit: Hit): boolean {
    hit.x = x;
    hit.y = y;
    return this.fillPoint(hit);
  }

  /** pointAt's work, reading (hit.x, hit.y) (a thin wrapper of fillPointWork). */
  fillPoint(hit: Hit): boolean {
    const w = work;
    w[6] = hit.x; w[7] = hit.y;
    if (!this.fillPointWork()) return false;
    hit.z = w[8]!; hit.t = w[9]!;
    hit.nx = w[10]!; hit.ny = w[11]!; hit.nz = w[12]!;
    return true;
  }

  /**
   * fillPoint's work in `work`: reads x, y (6, 7), writes z (8), t = 0 (9) and the normal
   * (10-12); false where
   * the surface does not exist (nothing written). The per-ray path calls this directly.
   */
  fillPointWork(): boolean {
    if (this.kind !== SurfaceKind.sphere) return this.fillFromSag();
    // a sphere's normal (κx, κy, q) is already of unit length: κ²r² + q² = 1
    const w = work;
    const k = this.curvature, x = w[6]!, y = w[7]!;
    const r2 = x * x + y * y;
    const q2 = 1 - k * k * r2;
    if (!(q2 > 0) && k !== 0) return false;
    const q = Math.sqrt(q2);
    w[8] = this.vertexZ - (k * r2) / (1 + q);
    w[9] = 0;
    w[10] = k * x;
    w[11] = k * y;
    w[12] = q;
    return true;
  }

  /** fillPointWork for a conic or a toric, from evalSag. */
  private fillFromSag(): boolean {
    const w = work;
    const g = _sag;
    g.x = w[6]!;
    g.y = w[7]!;
    if (!this.evalSag(g)) return false;
    const inv = 1 / Math.sqrt(g.dx * g.dx + g.dy * g.dy + 1);
    w[8] = this.vertexZ - g.sag;
    w[9] = 0;
    w[10] = g.dx * inv;
    w[11] = g.dy * inv;
    w[12] = inv;
    return true;
  }

  /**
   * Toric intersection in the surface frame: safeguarded Newton on g(t) = z(t) + sag(x(t), y(t))
   * from the vertex-plane hit; if Newton leaves the surface's domain or stalls, a bracket is
   * searched outwards from the vertex plane and closed by Newton steps kept inside it
   * (rtsafe, Press et al., Numerical Recipes §9.4). Fills hit (surface frame) or returns false.
   */
  private intersectToric(): boolean {
    const w = work;
    // the ray in the surface frame (13-18); the hit goes to 6-12
    const lpx = w[13]!, lpy = w[14]!, lpz = w[15]!, ldx = w[16]!, ldy = w[17]!, ldz = w[18]!;
    if (ldz === 0) return false;
    const g = _sag;
    const t0 = -lpz / ldz;
    let t = t0;
    let ok = false;
    for (let i = 0; i < NEWTON_MAX; i++) {
      g.x = lpx + t * ldx;
      g.y = lpy + t * ldy;
      if (!this.evalSag(g)) break;
      const f = lpz + t * ldz + g.sag;
      const fp = ldz + g.dx * ldx + g.dy * ldy;
      if (fp === 0) break;
      const step = f / fp;
      t -= step;
      if (Math.abs(step) < NEWTON_TOL_MM) {
        ok = true;
        break;
      }
    }
    if (ok) {
      g.x = lpx + t * ldx;
      g.y = lpy + t * ldy;
      ok = this.evalSag(g);
    }
    if (!ok) {
      _solve.t = t0;
      if (!this.bracketToric()) return false;
      t = _solve.t;
      g.x = lpx + t * ldx;
      g.y = lpy + t * ldy;
      if (!this.evalSag(g)) return false;
    }
    const inv = 1 / Math.sqrt(g.dx * g.dx + g.dy * g.dy + 1);
    w[6] = g.x; w[7] = g.y; w[8] = -g.sag; w[9] = t;
    w[10] = g.dx * inv; w[11] = g.dy * inv; w[12] = inv;
    return true;
  }

  /** g(t) = z(t) + sag at the ray's point t; NaN where there is no surface. */
  private gAt(t: number): number {
    const w = work;
    _sag.x = w[13]! + t * w[16]!;
    _sag.y = w[14]! + t * w[17]!;
    return this.evalSag(_sag) ? w[15]! + t * w[18]! + _sag.sag : NaN;
  }

  /**
   * From _solve.t (the vertex-plane hit), find the nearest root; result in _solve.t. The
   * vertex-plane point may lie outside the surface's domain (a steep torus met obliquely):
   * each side then starts from its first point where the surface exists.
   */
  private bracketToric(): boolean {
    const S = _solve;
    const t0 = S.t;
    const f0 = this.gAt(t0);
    if (f0 === 0) return true;
    // walk outwards both ways from the vertex plane; the first sign change between two
    // points where the surface exists is the hit nearest the vertex plane
    let tp = t0, fp = f0, tm = t0, fm = f0;
    for (let h = 0.25; h < 1e4; h *= 2) {
      const t1 = t0 + h;
      const f1 = this.gAt(t1);
      if (!Number.isNaN(f1)) {
        if (f1 === 0) { S.t = t1; return true; }
        if (!Number.isNaN(fp) && f1 > 0 !== fp > 0) {
          S.lo = tp; S.flo = fp; S.hi = t1;
          return this.refineToric();
        }
        tp = t1; fp = f1;
      }
      const t2 = t0 - h;
      const f2 = this.gAt(t2);
      if (!Number.isNaN(f2)) {
        if (f2 === 0) { S.t = t2; return true; }
        if (!Number.isNaN(fm) && f2 > 0 !== fm > 0) {
          S.lo = tm; S.flo = fm; S.hi = t2;
          return this.refineToric();
        }
        tm = t2; fm = f2;
      }
    }
    return false;
  }

  /** Newton steps kept inside the bracket [S.lo, S.hi] (g(lo) = S.flo, g(hi) of the other sign). */
  private refineToric(): boolean {
    const w = work;
    const lpx = w[13]!, lpy = w[14]!, lpz = w[15]!, ldx = w[16]!, ldy = w[17]!, ldz = w[18]!;
    const S = _solve;
    let lo = S.lo, flo = S.flo, hi = S.hi;
    let t = 0.5 * (lo + hi);
    const g = _sag;
    for (let i = 0; i < 200; i++) {
      g.x = lpx + t * ldx;
      g.y = lpy + t * ldy;
      const ok = this.evalSag(g);
      const f = ok ? lpz + t * ldz + g.sag : NaN;
      if (f === 0) {
        S.t = t;
        return true;
      }
      if (!ok) hi = t; // the domain ends inside the bracket: the live end is lo's side
      else if (f > 0 === flo > 0) { lo = t; flo = f; } else hi = t;
      const fp = ok ? ldz + g.dx * ldx + g.dy * ldy : 0;
      let tn = fp !== 0 ? t - f / fp : NaN;
      const lower = lo < hi ? lo : hi, upper = lo < hi ? hi : lo;
      if (!(tn > lower && tn < upper)) tn = 0.5 * (lo + hi);
      if (Math.abs(tn - t) < NEWTON_TOL_MM || Math.abs(hi - lo) < NEWTON_TOL_MM) {
        S.t = tn;
        return true;
      }
      t = tn;
    }
    return false;
  }
}

/** Scale the hit's normal in `work` to unit length (a conic's (κx, κy, 1 + (1+k)κz) is not). */
function normaliseWork(): void {
  const w = work;
  const nx = w[10]!, ny = w[11]!, nz = w[12]!;
  const inv = 1 / Math.sqrt(nx * nx + ny * ny + nz * nz);
  w[10] = nx * inv; w[11] = ny * inv; w[12] = nz * inv;
}

/** Scratch state of the toric root search. */
class RootState {
  t = 0.5;
  lo = 0.5;
  flo = 0.5;
  hi = 0.5;
}

const _solve = new RootState();
const _sag = new SagEval();
