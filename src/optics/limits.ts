/**
 * Decentration limits and decentration for a prescribed prism, exactly and by Prentice.
 *
 * A limit is the largest decentration from the optical centre, along a direction, at which
 * the prism at the eye stays within a tolerance. Prentice gives it in closed form,
 * c = P / |F u| (u the unit direction); the exact and first-order limits are found by a scan
 * outwards and a bisection on the exact trace (untilted lens, centre of rotation on the axis).
 */
import { RayStatus } from './errors.ts';
import { decentrationFromMatrix, eyeMatrix, prismFromMatrix } from './firstOrder.ts';
import type { Lens } from './lens.ts';
import type { Mat2 } from './powerMatrix.ts';
import { LineTrace, lineOfSight } from './trace.ts';

export interface LimitResult {
  /** largest decentration with exact prism within the tolerance, mm; null if the exact prism
   *  stays within it as far as the lens (or 50 mm) goes — see `exactReason` */
  exactMm: number | null;
  exactReason: 'ok' | 'never-reached' | 'trace-failed';
  /** Prentice's c = P / |F u|, mm; null when the power along u is zero (no limit) */
  prenticeMm: number | null;
  /** first-order thick-lens limit, mm; null when unlimited */
  paraxialMm: number | null;
  /** how far the search went, mm */
  searchedToMm: number;
}

const _t = new LineTrace();
const _v = { x: 0, y: 0 };

/** Exact prism magnitude at decentration d along (ux, uy), or NaN where the trace fails. */
function exactAt(lens: Lens, crMm: number, ux: number, uy: number, d: number): number {
  _t.sx = 0; _t.sy = 0; _t.sz = -crMm; _t.bx = d * ux; _t.by = d * uy;
  return lineOfSight(lens, _t) === RayStatus.ok ? _t.prism : NaN;
}

/** Closed-form limit of a linear rule p = -M c along u. */
function linearLimit(m: Mat2, ux: number, uy: number, maxPrism: number): number | null {
  prismFromMatrix(m, ux, uy, _v); // prism per mm
  const perMm = Math.hypot(_v.x, _v.y);
  return perMm === 0 ? null : maxPrism / perMm;
}

export function decentrationLimit(lens: Lens, crMm: number, directionDeg: number, maxPrism: number): LimitResult {
  const a = (directionDeg * Math.PI) / 180;
  const ux = Math.cos(a), uy = Math.sin(a);
  const prenticeMm = linearLimit(lens.vertexMatrix, ux, uy, maxPrism);
  const paraxialMm = linearLimit(eyeMatrix(lens, crMm), ux, uy, maxPrism);
  const reach = Math.min(lens.radiusMm, 50);
  // scan outwards in steps, then bisect the first crossing
  const step = 0.25;
  let lo = 0;
  let hi = -1;
  for (let d = step; d <= reach + 1e-12; d += step) {
    const p = exactAt(lens, crMm, ux, uy, d);
    if (Number.isNaN(p)) {
      return { exactMm: lo, exactReason: 'trace-failed', prenticeMm, paraxialMm, searchedToMm: d };
    }
    if (p > maxPrism) { hi = d; break; }
    lo = d;
  }
  if (hi < 0) return { exactMm: null, exactReason: 'never-reached', prenticeMm, paraxialMm, searchedToMm: reach };
  for (let i = 0; i < 60 && hi - lo > 1e-10; i++) {
    const mid = 0.5 * (lo + hi);
    if (exactAt(lens, crMm, ux, uy, mid) > maxPrism) hi = mid;
    else lo = mid;
  }
  return { exactMm: 0.5 * (lo + hi), exactReason: 'ok', prenticeMm, paraxialMm, searchedToMm: hi };
}

/** The in-tolerance region's outline: the limit in each of n directions (exact and Prentice). */
export function toleranceOutline(lens: Lens, crMm: number, maxPrism: number, directions = 72): { angleDeg: number; limit: LimitResult }[] {
  const out: { angleDeg: number; limit: LimitResult }[] = [];
  for (let i = 0; i < directions; i++) {
    const ang = (360 * i) / directions;
    out.push({ angleDeg: ang, limit: decentrationLimit(lens, crMm, ang, maxPrism) });
  }
  return out;
}

export interface PrescribedDecentration {
  /** exact decentration (visual point relative to the OC) giving the prism at the eye, mm; null if not found */
  exact: { x: number; y: number } | null;
  exactMessage: string;
  /** Prentice: c = -F⁻¹ p; null when det F = 0 (e.g. a plano-cylinder: prism only across its axis) */
  prentice: { x: number; y: number } | null;
  prenticeMessage: string;
}

/**
 * The decentration that gives prism (px, py) (Δ, wearer frame, towards the base) at the eye:
 * Prentice's c = -F⁻¹ p (det F ≠ 0), and exactly by 2-D Newton on the exact trace from it.
 */
export function decentrationForPrism(lens: Lens, crMm: number, px: number, py: number): PrescribedDecentration {
  let prentice: { x: number; y: number } | null = { x: 0, y: 0 };
  let prenticeMessage = 'ok';
  if (!decentrationFromMatrix(lens.vertexMatrix, px, py, prentice)) {
    prentice = null;
    prenticeMessage = 'the lens has no power in one meridian (det F = 0): decentration cannot give prism along that meridian';
  }
  // Newton from Prentice's answer (or from the centre when there is none)
  let cx = prentice?.x ?? 0, cy = prentice?.y ?? 0;
  const res = (x: number, y: number): boolean => {
    _t.sx = 0; _t.sy = 0; _t.sz = -crMm; _t.bx = x; _t.by = y;
    return lineOfSight(lens, _t) === RayStatus.ok;
  };
  let exact: { x: number; y: number } | null = null;
  let exactMessage = 'the exact decentration could not be found';
  const h = 1e-5;
  for (let it = 0; it < 60; it++) {
    if (!res(cx, cy)) { exactMessage = 'the exact trace fails on the way to this prism (lens too small or too steep)'; break; }
    const fx = _t.px - px, fy = _t.py - py;
    if (Math.hypot(fx, fy) < 1e-11) { exact = { x: cx, y: cy }; exactMessage = 'ok'; break; }
    if (!res(cx + h, cy)) break;
    const j11 = (_t.px - px - fx) / h, j21 = (_t.py - py - fy) / h;
    if (!res(cx, cy + h)) break;
    const j12 = (_t.px - px - fx) / h, j22 = (_t.py - py - fy) / h;
    const d = j11 * j22 - j12 * j21;
    if (Math.abs(d) < 1e-300) { exactMessage = prenticeMessage; break; }
    cx -= (j22 * fx - j12 * fy) / d;
    cy -= (-j21 * fx + j11 * fy) / d;
  }
  return { exact, exactMessage, prentice, prenticeMessage };
}

/**
 * Minimum uncut blank diameter for a decentred lens: effective diameter plus twice the
 * decentration plus an allowance (common practice; with both components, ED + 2·sqrt(dx² + dy²)
 * + allowance), mm.
 */
export function minimumBlankMm(effectiveDiameterMm: number, dxMm: number, dyMm: number, allowanceMm = 2): number {
  return effectiveDiameterMm + 2 * Math.hypot(dxMm, dyMm) + allowanceMm;
}
