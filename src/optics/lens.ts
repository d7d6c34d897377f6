/**
 * Lens form from a prescription (docs/conventions.md, "The lens frame" and "Surfaces: the sign
 * of a curvature").
 *
 * Lens frame: origin at the back vertex, z along the optical axis towards the object, x and y
 * as in the wearer frame; the front vertex at z = t. True surface powers in dioptres:
 * F1 = (n - 1) κ1, F2 = (1 - n) κ2 (κ in 1/m). The back surface (or, on request, the front)
 * is solved per principal meridian so that the BACK VERTEX power is the prescription:
 *   Fv = F1 / (1 - (t/n) F1) + F2   (e.g. Jalie, The Principles of Ophthalmic Lenses).
 */
import { OpticsError } from './errors.ts';
import { type Mat2, powerMatrix, add, mul, scale } from './powerMatrix.ts';
import type { IndexRatio } from './refract.ts';
import { SagEval, Surface, SurfaceKind, type ToricForm } from './surface.ts';

export interface LensSpec {
  sphereD: number;
  cylD: number;
  axisDeg: number;
  /** refractive index of the lens material (at the design wavelength) */
  index: number;
  /** true front surface power in the lens material, D (along the cylinder axis if cylOn = 'front') */
  frontD: number;
  /** centre thickness, mm */
  ctMm: number;
  frontConic?: number;
  backConic?: number;
  /** surface that carries the cylinder; default 'back' */
  cylOn?: 'back' | 'front';
  toricForm?: ToricForm;
  /** round lens diameter, mm; optional (no edge checks without it) */
  diameterMm?: number;
}

export class Lens {
  readonly spec: Readonly<LensSpec>;
  readonly front: Surface;
  readonly back: Surface;
  readonly index: number;
  /** η for refraction into the glass (1/n) and out of it (n), as objects for the per-ray path */
  readonly intoGlass: IndexRatio;
  readonly outOfGlass: IndexRatio;
  readonly ctMm: number;
  /** semi-diameter, mm; Infinity when no diameter is given */
  readonly radiusMm: number;
  /** front surface power matrix, D */
  readonly frontMatrix: Mat2;
  /** back surface power matrix, D */
  readonly backMatrix: Mat2;
  /** back vertex power matrix (the prescription), D */
  readonly vertexMatrix: Mat2;
  /** principal surface powers along the axis meridian and at 90° to it, D */
  readonly frontPowers: readonly [number, number];
  readonly backPowers: readonly [number, number];

  constructor(spec: LensSpec) {
    this.spec = Object.freeze({ ...spec });
    const { sphereD, cylD, axisDeg, index: n, frontD, ctMm } = spec;
    this.index = n;
    this.intoGlass = { eta: 1 / n };
    this.outOfGlass = { eta: n };
    this.ctMm = ctMm;
    const tm = ctMm / 1000; // m
    const r = n - 1;
    const reduce = (f1: number, where: string): number => {
      const den = 1 - (tm / n) * f1;
      if (!(den > 0)) {
        throw new OpticsError(
          `front surface power ${fmt(f1)} D is too strong for a ${fmt(ctMm)} mm thick lens of index ${n} ` +
            `(its image falls inside the lens${where}); use a flatter front or a thinner lens`,
          'front',
        );
      }
      return f1 / den;
    };
    let f1a: number, f1b: number, f2a: number, f2b: number;
    if ((spec.cylOn ?? 'back') === 'back') {
      f1a = f1b = frontD;
      const v1 = reduce(frontD, '');
      f2a = sphereD - v1;
      f2b = sphereD + cylD - v1;
    } else {
      // back spherical, chosen from the axis meridian; front toric
      f1a = frontD;
      f2a = f2b = sphereD - reduce(frontD, '');
      const need = sphereD + cylD - f2a; // reduced front power needed in the other meridian
      f1b = need / (1 + (tm / n) * need);
      reduce(f1b, ' in the cylinder meridian');
    }
    this.frontPowers = [f1a, f1b];
    this.backPowers = [f2a, f2b];
    const k1a = f1a / r / 1000, k1b = f1b / r / 1000; // 1/mm
    const k2a = f2a / (1 - n) / 1000, k2b = f2b / (1 - n) / 1000;
    this.front = new Surface({
      curvature: k1a, curvature90: k1b, axisDeg, conic: spec.frontConic ?? 0,
      form: spec.toricForm, vertexZ: ctMm,
    });
    this.back = new Surface({
      curvature: k2a, curvature90: k2b, axisDeg, conic: spec.backConic ?? 0,
      form: spec.toricForm, vertexZ: 0,
    });
    // surface power matrices: a meridional power P_a along axisDeg and P_b at 90° is the
    // sphero-cylinder P_a / (P_b - P_a) x axisDeg
    this.frontMatrix = powerMatrix(f1a, f1b - f1a, axisDeg);
    this.backMatrix = powerMatrix(f2a, f2b - f2a, axisDeg);
    this.vertexMatrix = powerMatrix(sphereD, cylD, axisDeg);
    this.radiusMm = spec.diameterMm === undefined ? Infinity : spec.diameterMm / 2;
    if (this.radiusMm !== Infinity) this.checkEdge();
  }

  /**
   * Radius within which both surfaces exist and the lens has positive thickness, found by a
   * scan of meridians and kept 0.5 mm on the safe side; traces skip the thickness check of
   * their exit point inside it (a speed-up only: outside it the exact check runs).
   * Computed on first use (negative until then).
   */
  solidRadiusMm = -1.5;

  /** Fill solidRadiusMm (negative until then). A method without arguments or result: nothing is boxed. */
  findSolidRadius(): void {
    this.solidRadiusMm = this.scanSolidRadius();
  }

  private scanSolidRadius(): number {
    const step = 0.25;
    let solid = Math.min(this.radiusMm, 100);
    const a0 = this.spec.axisDeg;
    // surfaces here are symmetric under (x, y) -> (-x, -y): half a turn suffices; a lens of
    // revolution needs one meridian
    const symmetric = this.front.kind !== SurfaceKind.toric && this.back.kind !== SurfaceKind.toric;
    for (let i = symmetric ? 13 : 0; i < 14; i++) {
      const deg = i < 12 ? i * 15 : a0 + 90 * (i - 12);
      const c = Math.cos((deg * Math.PI) / 180), s = Math.sin((deg * Math.PI) / 180);
      for (let r = step; r <= solid; r += step) {
        if (!(this.thicknessAt(r * c, r * s) > 0)) {
          solid = r - step;
          break;
        }
      }
    }
    return Math.max(0, solid - 0.5);
  }

  /** Axial thickness (front z - back z) at lens-frame transverse (x, y), mm; NaN where a surface ends. */
  thicknessAt(x: number, y: number): number {
    const g = _sagEval;
    if (!this.back.sagAt(x, y, g)) return NaN;
    const back = -g.sag;
    if (!this.front.sagAt(x, y, g)) return NaN;
    return this.ctMm - g.sag - back;
  }

  /** Smallest and largest axial thickness on the edge circle (every degree and the principal meridians). */
  edgeThicknessRange(radiusMm = this.radiusMm): { min: number; max: number } {
    let min = Infinity, max = -Infinity;
    const a0 = this.spec.axisDeg;
    for (let i = 0; i < 364; i++) {
      const deg = i < 360 ? i : a0 + 90 * (i - 360);
      const a = (deg * Math.PI) / 180;
      const th = this.thicknessAt(radiusMm * Math.cos(a), radiusMm * Math.sin(a));
      if (Number.isNaN(th)) return { min: NaN, max: NaN };
      if (th < min) min = th;
      if (th > max) max = th;
    }
    return { min, max };
  }

  /**
   * The same lens (same surfaces and thickness) in a material of another index, for traces at
   * other wavelengths. Its power matrices still describe the design index.
   */
  withIndex(index: number): Lens {
    const copy = Object.create(Lens.prototype) as Lens;
    Object.assign(copy, this);
    const w = copy as { index: number; intoGlass: IndexRatio; outOfGlass: IndexRatio };
    w.index = index;
    w.intoGlass = { eta: 1 / index };
    w.outOfGlass = { eta: index };
    return copy;
  }

  /** Equivalent power matrix Fe = F1 + F2 - (t/n) F1 F2, D. */
  equivalentMatrix(): Mat2 {
    return add(add(this.frontMatrix, this.backMatrix), scale(mul(this.frontMatrix, this.backMatrix), -this.ctMm / 1000 / this.index));
  }

  private checkEdge(): void {
    const r = this.radiusMm;
    for (const [s, name] of [[this.front, 'front'], [this.back, 'back']] as const) {
      for (let i = 0; i < 360; i++) {
        const a = (i * Math.PI) / 180;
        if (!s.sagAt(r * Math.cos(a), r * Math.sin(a), _sagEval)) {
          throw new OpticsError(
            `the ${name} surface is too steeply curved to span a ${fmt(2 * r)} mm diameter; use a smaller diameter or a flatter curve`,
            'diameter',
          );
        }
      }
    }
    const { min } = this.edgeThicknessRange();
    if (!(min > 0)) {
      throw new OpticsError(
        `front and back surfaces cross inside the ${fmt(2 * r)} mm diameter (edge thickness ${fmt(min)} mm); ` +
          'increase the centre thickness or reduce the diameter',
        'ct',
      );
    }
  }
}

export function makeLens(spec: LensSpec): Lens {
  return new Lens(spec);
}

/** Back vertex power of a thick lens, D: Fv = F1 / (1 - (t/n) F1) + F2. */
export function backVertexPower(frontD: number, backD: number, index: number, ctMm: number): number {
  return frontD / (1 - (ctMm / 1000 / index) * frontD) + backD;
}

/** Equivalent power of a thick lens, D: Fe = F1 + F2 - (t/n) F1 F2. */
export function equivalentPower(frontD: number, backD: number, index: number, ctMm: number): number {
  return frontD + backD - (ctMm / 1000 / index) * frontD * backD;
}

/** True surface power in a material of index n from a nominal (tool-index) power. */
export function trueFromNominal(nominalD: number, index: number, toolIndex = 1.53): number {
  return (nominalD * (index - 1)) / (toolIndex - 1);
}

export interface ThicknessRule {
  diameterMm: number;
  /** smallest edge thickness anywhere on the edge, mm (governs plus lenses) */
  minEdgeMm: number;
  /** smallest centre thickness, mm (governs minus lenses) */
  minCentreMm: number;
}

/**
 * The thinnest lens of this form whose centre is at least minCentreMm and whose edge is at
 * least minEdgeMm everywhere on the given diameter. Edge thickness grows with centre
 * thickness, so a bisection on t finds it.
 */
export function solveCentreThickness(spec: Omit<LensSpec, 'ctMm'>, rule: ThicknessRule): number {
  const r = rule.diameterMm / 2;
  const edgeMin = (t: number): number => {
    try {
      return new Lens({ ...spec, ctMm: t, diameterMm: undefined }).edgeThicknessRange(r).min;
    } catch {
      return NaN;
    }
  };
  let lo = rule.minCentreMm;
  const e0 = edgeMin(lo);
  if (Number.isNaN(e0)) {
    throw new OpticsError(`no lens of this form spans a ${fmt(rule.diameterMm)} mm diameter`, 'diameter');
  }
  if (e0 >= rule.minEdgeMm) return lo;
  let hi = Math.max(2 * lo, 1);
  while (!(edgeMin(hi) >= rule.minEdgeMm)) {
    hi *= 1.5;
    if (hi > 100) {
      throw new OpticsError(
        `no centre thickness up to 100 mm gives a ${fmt(rule.minEdgeMm)} mm edge on a ${fmt(rule.diameterMm)} mm diameter`,
        'diameter',
      );
    }
  }
  for (let i = 0; i < 80 && hi - lo > 1e-9; i++) {
    const mid = 0.5 * (lo + hi);
    if (edgeMin(mid) >= rule.minEdgeMm) hi = mid;
    else lo = mid;
  }
  return hi;
}

const _sagEval = new SagEval();

function fmt(v: number): string {
  return Number.isFinite(v) ? String(Math.round(v * 1000) / 1000) : String(v);
}
