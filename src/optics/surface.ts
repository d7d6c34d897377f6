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
 * objects, and a geometric miss is a returned status, never an exception.
 */

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
   * checks) and returns true; returns false on a miss.
   * (Small on purpose, so that the compiler inlines it: an untilted sphere, plane or conic,
   * the spectacle lens's usual surfaces, goes straight to the closed form.)
   */
  intersect(ray: Ray, hit: Hit): boolean {
    if (this.quadricFast) return this.intersectQuadric(ray, hit);
    return this.intersectFramed(ray, hit);
  }

  /** intersect for a tilted surface or a toric: the ray into the surface frame and back. */
  private intersectFramed(ray: Ray, hit: Hit): boolean {
    const L = _local;
    L.px = ray.px; L.py = ray.py; L.pz = ray.pz - this.vertexZ;
    L.dx = ray.dx; L.dy = ray.dy; L.dz = ray.dz;
    const R = this.rot;
    if (this.tilted) {
      const px = L.px, py = L.py, pz = L.pz, dx = L.dx, dy = L.dy, dz = L.dz;
      L.px = R[0] * px + R[3] * py + R[6] * pz;
      L.py = R[1] * px + R[4] * py + R[7] * pz;
      L.pz = R[2] * px + R[5] * py + R[8] * pz;
      L.dx = R[0] * dx + R[3] * dy + R[6] * dz;
      L.dy = R[1] * dx + R[4] * dy + R[7] * dz;
      L.dz = R[2] * dx + R[5] * dy + R[8] * dz;
    }
    if (this.kind !== SurfaceKind.toric) {
      if (!this.intersectQuadric(L, hit)) return false;
    } else if (!this.intersectToric(L, hit)) {
      return false;
    }
    if (this.tilted) {
      const x = hit.x, y = hit.y, z = hit.z;
      hit.x = R[0] * x + R[1] * y + R[2] * z;
      hit.y = R[3] * x + R[4] * y + R[5] * z;
      hit.z = R[6] * x + R[7] * y + R[8] * z;
      const a = hit.nx, b = hit.ny, c = hit.nz;
      hit.nx = R[0] * a + R[1] * b + R[2] * c;
      hit.ny = R[3] * a + R[4] * b + R[5] * c;
      hit.nz = R[6] * a + R[7] * b + R[8] * c;
    }
    hit.z += this.vertexZ;
    return true;
  }

  /**
   * Sphere or conic: the quadric κ(x² + y² + (1+k) z²) + 2z = 0, solved with the stable root
   * continuous with the vertex plane (Spencer & Murty, J Opt Soc Am 1962):
   * t = -c / (b + sign(b) sqrt(b² - ac)).
   * `L` is either the ray in the lens frame of an untilted surface (from intersect; the hit is
   * then in the lens frame) or `_local`, already in the surface frame (from intersectFramed;
   * the hit is then in the surface frame). Values stay in locals and `hit` is written once.
   */
  private intersectQuadric(L: Ray, hit: Hit): boolean {
    const framed = L === _local;
    const oz = framed ? 0 : this.vertexZ;
    const px = L.px, py = L.py, pz = L.pz - oz, dx = L.dx, dy = L.dy, dz = L.dz;
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
    hit.x = x; hit.y = y; hit.z = framed ? z : z + oz; hit.t = t;
    hit.nx = k * x; hit.ny = k * y; hit.nz = q;
    // a sphere's (κx, κy, 1 + κz) is of unit length on the surface; a conic's is not
    if (this.kind !== SurfaceKind.sphere) normalise(hit);
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

  /** pointAt's work, reading (hit.x, hit.y). */
  fillPoint(hit: Hit): boolean {
    if (this.kind !== SurfaceKind.sphere) return this.fillFromSag(hit);
    // a sphere's normal (κx, κy, q) is already of unit length: κ²r² + q² = 1
    const k = this.curvature, x = hit.x, y = hit.y;
    const r2 = x * x + y * y;
    const q2 = 1 - k * k * r2;
    if (!(q2 > 0) && k !== 0) return false;
    const q = Math.sqrt(q2);
    hit.z = this.vertexZ - (k * r2) / (1 + q);
    hit.t = 0;
    hit.nx = k * x;
    hit.ny = k * y;
    hit.nz = q;
    return true;
  }

  /** fillPoint for a conic or a toric, from evalSag. */
  private fillFromSag(hit: Hit): boolean {
    const g = _sag;
    g.x = hit.x;
    g.y = hit.y;
    if (!this.evalSag(g)) return false;
    const inv = 1 / Math.sqrt(g.dx * g.dx + g.dy * g.dy + 1);
    hit.z = this.vertexZ - g.sag;
    hit.t = 0;
    hit.nx = g.dx * inv;
    hit.ny = g.dy * inv;
    hit.nz = inv;
    return true;
  }

  /**
   * Toric intersection in the surface frame: safeguarded Newton on g(t) = z(t) + sag(x(t), y(t))
   * from the vertex-plane hit; if Newton leaves the surface's domain or stalls, a bracket is
   * searched outwards from the vertex plane and closed by Newton steps kept inside it
   * (rtsafe, Press et al., Numerical Recipes §9.4). Fills hit (surface frame) or returns false.
   */
  private intersectToric(L: Ray, hit: Hit): boolean {
    if (L.dz === 0) return false;
    const g = _sag;
    const t0 = -L.pz / L.dz;
    let t = t0;
    let ok = false;
    for (let i = 0; i < NEWTON_MAX; i++) {
      g.x = L.px + t * L.dx;
      g.y = L.py + t * L.dy;
      if (!this.evalSag(g)) break;
      const f = L.pz + t * L.dz + g.sag;
      const fp = L.dz + g.dx * L.dx + g.dy * L.dy;
      if (fp === 0) break;
      const step = f / fp;
      t -= step;
      if (Math.abs(step) < NEWTON_TOL_MM) {
        ok = true;
        break;
      }
    }
    if (ok) {
      g.x = L.px + t * L.dx;
      g.y = L.py + t * L.dy;
      ok = this.evalSag(g);
    }
    if (!ok) {
      _solve.t = t0;
      if (!this.bracketToric(L)) return false;
      t = _solve.t;
      g.x = L.px + t * L.dx;
      g.y = L.py + t * L.dy;
      if (!this.evalSag(g)) return false;
    }
    const inv = 1 / Math.sqrt(g.dx * g.dx + g.dy * g.dy + 1);
    hit.x = g.x; hit.y = g.y; hit.z = -g.sag; hit.t = t;
    hit.nx = g.dx * inv; hit.ny = g.dy * inv; hit.nz = inv;
    return true;
  }

  /** g(t) = z(t) + sag at the ray's point t; NaN where there is no surface. */
  private gAt(L: Ray, t: number): number {
    _sag.x = L.px + t * L.dx;
    _sag.y = L.py + t * L.dy;
    return this.evalSag(_sag) ? L.pz + t * L.dz + _sag.sag : NaN;
  }

  /**
   * From _solve.t (the vertex-plane hit), find the nearest root; result in _solve.t. The
   * vertex-plane point may lie outside the surface's domain (a steep torus met obliquely):
   * each side then starts from its first point where the surface exists.
   */
  private bracketToric(L: Ray): boolean {
    const S = _solve;
    const t0 = S.t;
    const f0 = this.gAt(L, t0);
    if (f0 === 0) return true;
    // walk outwards both ways from the vertex plane; the first sign change between two
    // points where the surface exists is the hit nearest the vertex plane
    let tp = t0, fp = f0, tm = t0, fm = f0;
    for (let h = 0.25; h < 1e4; h *= 2) {
      const t1 = t0 + h;
      const f1 = this.gAt(L, t1);
      if (!Number.isNaN(f1)) {
        if (f1 === 0) { S.t = t1; return true; }
        if (!Number.isNaN(fp) && f1 > 0 !== fp > 0) {
          S.lo = tp; S.flo = fp; S.hi = t1;
          return this.refineToric(L);
        }
        tp = t1; fp = f1;
      }
      const t2 = t0 - h;
      const f2 = this.gAt(L, t2);
      if (!Number.isNaN(f2)) {
        if (f2 === 0) { S.t = t2; return true; }
        if (!Number.isNaN(fm) && f2 > 0 !== fm > 0) {
          S.lo = tm; S.flo = fm; S.hi = t2;
          return this.refineToric(L);
        }
        tm = t2; fm = f2;
      }
    }
    return false;
  }

  /** Newton steps kept inside the bracket [S.lo, S.hi] (g(lo) = S.flo, g(hi) of the other sign). */
  private refineToric(L: Ray): boolean {
    const S = _solve;
    let lo = S.lo, flo = S.flo, hi = S.hi;
    let t = 0.5 * (lo + hi);
    const g = _sag;
    for (let i = 0; i < 200; i++) {
      g.x = L.px + t * L.dx;
      g.y = L.py + t * L.dy;
      const ok = this.evalSag(g);
      const f = ok ? L.pz + t * L.dz + g.sag : NaN;
      if (f === 0) {
        S.t = t;
        return true;
      }
      if (!ok) hi = t; // the domain ends inside the bracket: the live end is lo's side
      else if (f > 0 === flo > 0) { lo = t; flo = f; } else hi = t;
      const fp = ok ? L.dz + g.dx * L.dx + g.dy * L.dy : 0;
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

/** Scale the normal in `hit` to unit length (a conic's (κx, κy, 1 + (1+k)κz) is not). */
function normalise(hit: Hit): void {
  const nx = hit.nx, ny = hit.ny, nz = hit.nz;
  const inv = 1 / Math.sqrt(nx * nx + ny * ny + nz * nz);
  hit.nx = nx * inv; hit.ny = ny * inv; hit.nz = nz * inv;
}

/** Scratch state of the toric root search. */
class RootState {
  t = 0.5;
  lo = 0.5;
  flo = 0.5;
  hi = 0.5;
}

const _local = new Ray();
const _solve = new RootState();
const _sag = new SagEval();
