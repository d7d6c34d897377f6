/**
 * An INDEPENDENT reference implementation of the exact line-of-sight and focimeter prism
 * and of the first-order (paraxial) prism, written from docs/method.md and
 * docs/conventions.md (lens form, power matrix and base labels, the four answers) and
 * Snell's law in vector form (E. Hecht, "Optics", ch. 4), without the engine's code. It exists only to check the engine.
 *
 * Deliberate differences from the engine, so that a shared mistake is unlikely:
 * - frame: the wearer frame of docs/conventions.md (centre of rotation at the origin, back
 *   vertex at z = s, front vertex at z = s + t), not the engine's lens frame (back vertex at 0);
 * - arithmetic: mathjs BigNumber with 40 significant digits (decimal.js underneath);
 * - surfaces: one sag function z = z_vertex - sag(x, y) per surface; every intersection
 *   (sphere, conic and toric alike) is found by marching along the ray to the first sign
 *   change and closing the bracket with the Illinois false-position method (a safeguarded
 *   secant; Dowell & Jarratt, BIT 1971); no closed-form quadric root, no Newton;
 * - normals: central differences of the sag in 40-digit arithmetic, not analytic slopes;
 * - refraction: Snell's law as conservation of the tangential component of n·d
 *   (n1 d1 × N = n2 d2 × N; Hecht, Optics, ch. 4), not the engine's vector formula;
 * - paraxial: a 4x4 (y, nu) transfer-matrix trace with mathjs matrices, with the back
 *   surface's power matrix built from its principal meridians (spectral form), not the
 *   sphero-cylinder formula.
 *
 * Toric model (the one documented in src/optics/surface.ts, "tyre" formation): the profile
 * along the STRONGER principal meridian (larger |curvature|, a conic with the surface's conic
 * constant) is the tube; it is swept about an axis parallel to that meridian, lying on the
 * lens axis at distance 1/κ_weaker from the vertex. Derivation used here: a profile point at
 * depth a(w) is at signed distance ρ = 1/κS - a(w) from the sweep axis; turning it through the
 * swept meridian's coordinate s puts it at depth a + ρ - sqrt(ρ² - s²)
 * = a + κ' s² / (1 + sqrt(1 - κ'² s²)) with κ' = 1/ρ = κS / (1 - κS a).
 */
import { all, create, type BigNumber, type Matrix } from 'mathjs';
import { rng } from './rng.ts';

export { rng };

const M = create(all, { number: 'BigNumber', precision: 40 });
/** Plain-number mathjs for the 4x4 paraxial matrices. */
const P = create(all, { number: 'number' });

type B = BigNumber;
const big = (v: number | string): B => M.bignumber(v) as unknown as B;
const ZERO = big(0);
const ONE = big(1);
const TWO = big(2);
const HUNDRED = big(100);
const THOUSAND = big(1000);
const PI = M.pi as unknown as B;

/** Inputs of one case, as a dispenser gives them (docs/cli.md, `decentra trace`). */
export interface RefCase {
  sphereD: number;
  cylD: number;
  axisDeg: number;
  index: number;
  /** true front surface power, D */
  frontD: number;
  ctMm: number;
  frontConic: number;
  backConic: number;
  /** back vertex to centre of rotation, mm */
  crMm: number;
  /** visual point relative to the optical centre, mm */
  xMm: number;
  yMm: number;
  eye: 'R' | 'L';
}

export type RefFailure = 'miss' | 'tir' | 'geometry';
export interface RefPrism {
  x: number;
  y: number;
  magnitude: number;
  horizontal: 'in' | 'out' | null;
  vertical: 'up' | 'down' | null;
}
export type RefAnswer = RefPrism | { failure: RefFailure };

/** One refracting surface, z = zVertex - sag(x, y), curvatures in 1/mm. */
interface RefSurface {
  zVertex: B;
  /** curvature along the meridian at angle theta, and at theta + 90° */
  kA: B;
  kB: B;
  conic: B;
  cos: B;
  sin: B;
}

export interface RefLens {
  front: RefSurface;
  back: RefSurface;
  index: B;
  /** back vertex z (= s) and centre thickness, mm */
  s: B;
  t: B;
  /** principal back surface powers along the axis meridian and at 90° to it, D */
  backA: number;
  backB: number;
}

/**
 * The lens form of docs/conventions.md ("Surfaces: the sign of a curvature"): front spherical
 * (or conic) of true power F1 = (n - 1) κ1; back toric with F2 = Fv - F1 / (1 - (t/n) F1) in
 * each principal meridian, Fv = S along the cylinder axis and S + C at 90° to it;
 * κ2 = F2 / (1 - n).
 */
export function refLens(c: RefCase): RefLens {
  const n = big(c.index);
  const tMm = big(c.ctMm);
  const tM = tMm.div(THOUSAND);
  const f1 = big(c.frontD);
  const reduced = f1.div(ONE.minus(tM.div(n).times(f1)));
  const f2a = big(c.sphereD).minus(reduced);
  const f2b = big(c.sphereD).plus(big(c.cylD)).minus(reduced);
  const theta = big(c.axisDeg).times(PI).div(180);
  const cos = theta.cos();
  const sin = theta.sin();
  const k1 = f1.div(n.minus(1)).div(THOUSAND);
  const s = big(c.crMm);
  return {
    front: { zVertex: s.plus(tMm), kA: k1, kB: k1, conic: big(c.frontConic), cos, sin },
    back: {
      zVertex: s,
      kA: f2a.div(ONE.minus(n)).div(THOUSAND),
      kB: f2b.div(ONE.minus(n)).div(THOUSAND),
      conic: big(c.backConic),
      cos, sin,
    },
    index: n, s, t: tMm,
    backA: f2a.toNumber(), backB: f2b.toNumber(),
  };
}

/**
 * Conic sag κ r² / (1 + sqrt(1 - (1 + k) κ² r²)) (docs/method.md, "Sphere and conic of
 * revolution"); null outside its domain.
 */
function conicSag(k: B, conic: B, r2: B): B | null {
  const q2 = ONE.minus(ONE.plus(conic).times(k).times(k).times(r2));
  if (q2.isNeg()) return null;
  return k.times(r2).div(ONE.plus(q2.sqrt()));
}

/** Sag of a surface at transverse (x, y) measured from its vertex; null where it does not exist. */
export function refSag(sf: RefSurface, x: B, y: B): B | null {
  if (sf.kA.eq(sf.kB)) return conicSag(sf.kA, sf.conic, x.times(x).plus(y.times(y)));
  // u along the meridian at theta (curvature kA), v at theta + 90° (curvature kB)
  const u = x.times(sf.cos).plus(y.times(sf.sin));
  const v = y.times(sf.cos).minus(x.times(sf.sin));
  const uIsWeaker = sf.kA.abs().lte(sf.kB.abs());
  const sw = uIsWeaker ? u : v; // coordinate along the swept (weaker) meridian
  const w = uIsWeaker ? v : u; // coordinate along the tube (stronger) meridian
  const kS = uIsWeaker ? sf.kA : sf.kB;
  const kT = uIsWeaker ? sf.kB : sf.kA;
  const a = conicSag(kT, sf.conic, w.times(w));
  if (a === null) return null;
  const den = ONE.minus(kS.times(a));
  if (!den.isPos()) return null;
  const kp = kS.div(den);
  const rest = conicSag(kp, ZERO, sw.times(sw));
  return rest === null ? null : a.plus(rest);
}

/** Surface height z at (x, y) in the wearer frame. */
function zAt(sf: RefSurface, x: B, y: B): B | null {
  const sg = refSag(sf, x, y);
  return sg === null ? null : sf.zVertex.minus(sg);
}

const H = big('1e-12');
/** Unit normal pointing to +z at (x, y): (∂sag/∂x, ∂sag/∂y, 1) normalised, by central differences. */
function normalAt(sf: RefSurface, x: B, y: B): [B, B, B] | null {
  const xp = refSag(sf, x.plus(H), y), xm = refSag(sf, x.minus(H), y);
  const yp = refSag(sf, x, y.plus(H)), ym = refSag(sf, x, y.minus(H));
  if (!xp || !xm || !yp || !ym) return null;
  const gx = xp.minus(xm).div(TWO.times(H));
  const gy = yp.minus(ym).div(TWO.times(H));
  return unit([gx, gy, ONE]);
}

type V = [B, B, B];
const dot = (a: V, b: V): B => a[0].times(b[0]).plus(a[1].times(b[1])).plus(a[2].times(b[2]));
function unit(a: V): V {
  const l = dot(a, a).sqrt();
  return [a[0].div(l), a[1].div(l), a[2].div(l)];
}

/**
 * Snell's law as conservation of the tangential component (Hecht, Optics, ch. 4): the part of
 * n1·d1 along the surface equals that of n2·d2; the normal part makes d2 a unit vector on the
 * same side of the surface as d1. Null when the tangential part is too large (TIR).
 */
function snell(d: V, nrm: V, n1: B, n2: B): V | null {
  const dn = dot(d, nrm);
  const tan: V = [d[0].minus(dn.times(nrm[0])), d[1].minus(dn.times(nrm[1])), d[2].minus(dn.times(nrm[2]))];
  const r = n1.div(n2);
  const tt: V = [tan[0].times(r), tan[1].times(r), tan[2].times(r)];
  const rest = ONE.minus(dot(tt, tt));
  if (rest.isNeg()) return null;
  const along = dn.isNeg() ? rest.sqrt().neg() : rest.sqrt();
  return [tt[0].plus(along.times(nrm[0])), tt[1].plus(along.times(nrm[1])), tt[2].plus(along.times(nrm[2]))];
}

const STEP = big('0.25');
const TOL = big('1e-33');
/**
 * First crossing of the ray p + τ d (τ > 0) with a surface, starting BELOW it (z < surface).
 * March in 0.25 mm steps to the first sign change, then Illinois false position.
 */
function crossFromBelow(sf: RefSurface, p: V, d: V): V | 'miss' {
  const f = (tau: B): B | null => {
    const zs = zAt(sf, p[0].plus(tau.times(d[0])), p[1].plus(tau.times(d[1])));
    return zs === null ? null : p[2].plus(tau.times(d[2])).minus(zs);
  };
  let a = ZERO;
  let fa = f(a);
  if (fa === null) return 'miss';
  let b = ZERO;
  let fb: B | null = fa;
  for (let i = 1; i <= 800; i++) {
    b = STEP.times(i);
    fb = f(b);
    if (fb === null) return 'miss';
    if (!fb.isNeg()) break;
    a = b; fa = fb;
  }
  if (fb === null || fb.isNeg()) return 'miss';
  // Illinois: false position, halving the retained end's value when it is kept twice
  let side = 0;
  for (let i = 0; i < 300 && b.minus(a).abs().gt(TOL); i++) {
    const c = b.minus(fb.times(b.minus(a)).div(fb.minus(fa)));
    const fc = f(c);
    if (fc === null) return 'miss';
    if (fc.isZero()) { a = b = c; break; }
    if (fc.isNeg() === fb.isNeg()) {
      b = c; fb = fc;
      if (side === -1) fa = fa.div(2);
      side = -1;
    } else {
      a = c; fa = fc;
      if (side === 1) fb = fb.div(2);
      side = 1;
    }
    if (fc.abs().lt(big('1e-36'))) { a = b = c; break; }
  }
  const tau = a.plus(b).div(2);
  return [p[0].plus(tau.times(d[0])), p[1].plus(tau.times(d[1])), p[2].plus(tau.times(d[2]))];
}

/** Thickness (front z - back z) at (x, y); null where a surface does not exist. */
function thickness(L: RefLens, x: B, y: B): B | null {
  const zf = zAt(L.front, x, y), zb = zAt(L.back, x, y);
  return zf === null || zb === null ? null : zf.minus(zb);
}

/**
 * Prism of docs/conventions.md ("The exact prism of a ray") from the reverse eye-side
 * direction a and the reverse object-side direction b (light travels the other way:
 * d_eye = -a, d_obj = -b): 100 tan δ, δ the angle between them, towards the x-y projection
 * of d_eye - d_obj = b - a; labels per docs/conventions.md (base-label table).
 */
function prismOf(a: V, b: V, eye: 'R' | 'L'): RefAnswer {
  const cx = a[1].times(b[2]).minus(a[2].times(b[1]));
  const cy = a[2].times(b[0]).minus(a[0].times(b[2]));
  const cz = a[0].times(b[1]).minus(a[1].times(b[0]));
  const sinD = cx.times(cx).plus(cy.times(cy)).plus(cz.times(cz)).sqrt();
  const cosD = dot(a, b);
  if (!cosD.isPos()) return { failure: 'geometry' };
  const mag = HUNDRED.times(sinD).div(cosD);
  const hx = b[0].minus(a[0]), hy = b[1].minus(a[1]);
  const h = hx.times(hx).plus(hy.times(hy)).sqrt();
  const px = h.isZero() ? ZERO : mag.times(hx).div(h);
  const py = h.isZero() ? ZERO : mag.times(hy).div(h);
  const x = px.toNumber(), y = py.toNumber();
  // right eye: +x is towards the nose (base in); left eye: -x is (docs/conventions.md)
  const nasal = eye === 'R' ? x > 0 : x < 0;
  return {
    x, y, magnitude: mag.toNumber(),
    horizontal: Math.abs(x) < 1e-10 ? null : nasal ? 'in' : 'out',
    vertical: Math.abs(y) < 1e-10 ? null : y > 0 ? 'up' : 'down',
  };
}

/** From a back-surface point along d inside the glass, out through the front (docs/method.md, answers 3-4). */
function outThroughFront(L: RefLens, pb: V, inside: V, a: V, eye: 'R' | 'L'): RefAnswer {
  const thB = thickness(L, pb[0], pb[1]);
  if (thB === null) return { failure: 'miss' };
  if (!thB.isPos()) return { failure: 'geometry' };
  const pf = crossFromBelow(L.front, pb, inside);
  if (pf === 'miss') return { failure: 'miss' };
  const thF = thickness(L, pf[0], pf[1]);
  if (thF === null || !thF.isPos()) return { failure: 'geometry' };
  const nf = normalAt(L.front, pf[0], pf[1]);
  if (nf === null) return { failure: 'miss' };
  const b = snell(inside, nf, L.index, ONE);
  if (b === null) return { failure: 'tir' };
  return prismOf(a, b, eye);
}

/** Exact line of sight (docs/method.md, answer 3): from the centre of rotation through the visual point. */
export function refExact(c: RefCase, L: RefLens = refLens(c)): RefAnswer {
  const x = big(c.xMm), y = big(c.yMm);
  const zb = zAt(L.back, x, y);
  if (zb === null) return { failure: 'miss' };
  const pb: V = [x, y, zb];
  if (!zb.isPos()) return { failure: 'geometry' };
  const a = unit(pb); // the centre of rotation is the origin
  const nb = normalAt(L.back, x, y);
  if (nb === null) return { failure: 'miss' };
  const inside = snell(a, nb, ONE, L.index);
  if (inside === null) return { failure: 'tir' };
  return outThroughFront(L, pb, inside, a, c.eye);
}

/** Exact focimeter reading (docs/method.md, answer 4): along the back-surface normal, bent at the front only. */
export function refFocimeter(c: RefCase, L: RefLens = refLens(c)): RefAnswer {
  const x = big(c.xMm), y = big(c.yMm);
  const zb = zAt(L.back, x, y);
  if (zb === null) return { failure: 'miss' };
  const nb = normalAt(L.back, x, y);
  if (nb === null) return { failure: 'miss' };
  return outThroughFront(L, [x, y, zb], nb, nb, c.eye);
}

// ---------------------------------------------------------------------------------------
// Paraxial (first-order) prism: a (y, nu) trace with 4x4 transfer matrices (mathjs), per
// docs/method.md, answer 2. State [y; nu] with y (m) and nu = n·u (u the angle, rad) as 2-vectors.
// Refraction: nu' = nu - F y; translation by reduced thickness d = t/n: y' = y + d nu.
// A surface's power is the same for light in either direction, so the trace can run from the
// eye outwards. The prism is 100 (u_object - u_eye) in Δ (the deviation of the reversed ray,
// towards the base; small angles).

/** Power matrix from principal powers pA along the meridian at `axisDeg` and pB at 90° to it. */
export function meridionalMatrix(pA: number, pB: number, axisDeg: number): Matrix {
  const t = (axisDeg * Math.PI) / 180;
  const ea = P.matrix([[Math.cos(t)], [Math.sin(t)]]);
  const eb = P.matrix([[-Math.sin(t)], [Math.cos(t)]]);
  return P.add(
    P.multiply(pA, P.multiply(ea, P.transpose(ea))),
    P.multiply(pB, P.multiply(eb, P.transpose(eb))),
  ) as Matrix;
}

function block(a: Matrix, b: Matrix, c: Matrix, d: Matrix): Matrix {
  const g = (m: Matrix, i: number, j: number): number => m.get([i, j]) as number;
  const rows: number[][] = [];
  for (let i = 0; i < 4; i++) {
    const top = i < 2;
    const r = i % 2;
    const L = top ? a : c, R = top ? b : d;
    rows.push([g(L, r, 0), g(L, r, 1), g(R, r, 0), g(R, r, 1)]);
  }
  return P.matrix(rows);
}
const I2 = (): Matrix => P.identity(2) as Matrix;
const Z2 = (): Matrix => P.zeros(2, 2) as Matrix;
const refraction = (f: Matrix): Matrix => block(I2(), Z2(), P.multiply(-1, f) as Matrix, I2());
const translation = (d: number): Matrix => block(I2(), P.multiply(d, I2()) as Matrix, Z2(), I2());

/**
 * First-order prism (Δ) of a ray that meets the back surface at c (mm) with reverse eye-side
 * angle vector u0 = K c (K in D: I/s for a centre of rotation s behind the back vertex, the
 * back surface's curvature matrix for the focimeter's normal incidence), through a lens of
 * back and front power matrices f2, f1 (D), thickness t (mm) and index n.
 */
export function paraxialPrism(
  f1: Matrix, f2: Matrix, tMm: number, n: number, k: Matrix, cxMm: number, cyMm: number,
): [number, number] {
  const c = P.matrix([[cxMm / 1000], [cyMm / 1000]]);
  const u0 = P.multiply(k, c) as Matrix;
  const state = P.matrix([[c.get([0, 0])], [c.get([1, 0])], [u0.get([0, 0])], [u0.get([1, 0])]]);
  const system = P.multiply(refraction(f1), P.multiply(translation(tMm / 1000 / n), refraction(f2))) as Matrix;
  const out = P.multiply(system, state) as Matrix;
  return [100 * ((out.get([2, 0]) as number) - (u0.get([0, 0]) as number)), 100 * ((out.get([3, 0]) as number) - (u0.get([1, 0]) as number))];
}

/** The first-order prism at the eye and at the focimeter for a reference case. */
export function refParaxial(c: RefCase): { eye: [number, number]; focimeter: [number, number] } {
  const L = refLens(c);
  const f1 = P.multiply(c.frontD, I2()) as Matrix;
  const f2 = meridionalMatrix(L.backA, L.backB, c.axisDeg);
  const eyeK = P.multiply(1000 / c.crMm, I2()) as Matrix;
  // back surface curvature matrix (1/m) = F2 / (1 - n)
  const backK = P.multiply(1 / (1 - c.index), f2) as Matrix;
  return {
    eye: paraxialPrism(f1, f2, c.ctMm, c.index, eyeK, c.xMm, c.yMm),
    focimeter: paraxialPrism(f1, f2, c.ctMm, c.index, backK, c.xMm, c.yMm),
  };
}

// ---------------------------------------------------------------------------------------
// Random valid cases (a seeded generator, so any failure can be replayed).

/** The same sag in doubles (only for picking a centre thickness, never for the answers). */
function sagNum(kA: number, kB: number, conic: number, th: number, x: number, y: number): number {
  const cs = (k: number, e: number, r2: number): number => {
    const q2 = 1 - (1 + e) * k * k * r2;
    return q2 < 0 ? NaN : (k * r2) / (1 + Math.sqrt(q2));
  };
  if (kA === kB) return cs(kA, conic, x * x + y * y);
  const u = x * Math.cos(th) + y * Math.sin(th), v = y * Math.cos(th) - x * Math.sin(th);
  const uWeak = Math.abs(kA) <= Math.abs(kB);
  const a = cs(uWeak ? kB : kA, conic, (uWeak ? v : u) ** 2);
  const den = 1 - (uWeak ? kA : kB) * a;
  return den > 0 ? a + cs((uWeak ? kA : kB) / den, 0, (uWeak ? u : v) ** 2) : NaN;
}

/** Smallest thickness over a disc of radius `radiusMm` (NaN where a surface ends), doubles. */
function minThicknessOnDisc(c: RefCase, radiusMm: number): number {
  const L = refLens(c);
  const th = (c.axisDeg * Math.PI) / 180;
  const k1 = L.front.kA.toNumber();
  const k2a = L.back.kA.toNumber(), k2b = L.back.kB.toNumber();
  let min = Infinity;
  for (let ri = 0; ri <= 8; ri++) {
    const r = (radiusMm * ri) / 8;
    for (let ai = 0; ai < 72; ai++) {
      const an = (ai * Math.PI) / 36;
      const x = r * Math.cos(an), y = r * Math.sin(an);
      const t = c.ctMm - sagNum(k1, k1, c.frontConic, 0, x, y) + sagNum(k2a, k2b, c.backConic, th, x, y);
      if (Number.isNaN(t)) return NaN;
      min = Math.min(min, t);
    }
  }
  return min;
}

/**
 * A random case: sphere -20..+20 D, cylinder 0..-4 D at any axis, index 1.5..1.74, a meniscus
 * front (plus lenses: 1-4 D steeper than the sphere; minus lenses +0.5..+6 D), front conic
 * -3..1 in half the cases, a back conic in a quarter, decentration up to 20 mm in any
 * direction, either eye; the centre thickness is raised until the lens is at least 1 mm thick
 * out to 1.3 |c| + 3 mm (so most cases are valid; the rest must fail in both).
 */
export function randomCase(r: () => number): RefCase {
  const q = (v: number): number => Math.round(v * 100) / 100;
  const sphereD = q(-20 + 40 * r());
  const cylD = q(-4 * r());
  const axisDeg = q(180 * r());
  const index = q(1.5 + 0.24 * r());
  const se = sphereD + cylD / 2;
  const frontD = q(se > 0 ? se + 1 + 3 * r() : 0.5 + 5.5 * r());
  const frontConic = r() < 0.5 ? q(-3 + 4 * r()) : 0;
  const backConic = r() < 0.25 ? q(-1 + 1.5 * r()) : 0;
  const dec = 20 * Math.sqrt(r());
  const dir = 2 * Math.PI * r();
  const c: RefCase = {
    sphereD, cylD, axisDeg, index, frontD, ctMm: 1.5 + r(), frontConic, backConic,
    crMm: q(24 + 6 * r()), xMm: q(dec * Math.cos(dir)), yMm: q(dec * Math.sin(dir)), eye: r() < 0.5 ? 'R' : 'L',
  };
  const radius = 1.3 * dec + 3;
  for (let i = 0; i < 8; i++) {
    const m = minThicknessOnDisc(c, radius);
    if (Number.isNaN(m) || m >= 0.999) break;
    c.ctMm = Math.min(25, c.ctMm + (1 - m) + 0.05);
  }
  c.ctMm = q(c.ctMm + 0.005);
  return c;
}
