/**
 * Transverse chromatic aberration at a visual point: the difference between the exact prism
 * for blue (F line, 486.13 nm) and red (C line, 656.27 nm) light, beside the rule P / V
 * (Jalie, The Principles of Ophthalmic Lenses).
 *
 * Indices from n_d and the Abbe number: n_F - n_C = (n_d - 1) / V_d (definition of V_d), split
 * with n_F - n_d = 0.7 (n_F - n_C), a typical relative partial dispersion of optical
 * materials (from memory). The lens keeps its shape (surfaces designed at n_d).
 */
import { RayStatus } from './errors.ts';
import type { Lens } from './lens.ts';
import { Placement, placedLineOfSight } from './placement.ts';
import { LineTrace } from './trace.ts';

export const PARTIAL_DISPERSION_F = 0.7;

export function lineIndices(nd: number, abbe: number): { nF: number; nC: number } {
  const span = (nd - 1) / abbe;
  return { nF: nd + PARTIAL_DISPERSION_F * span, nC: nd - (1 - PARTIAL_DISPERSION_F) * span };
}

export interface Tca {
  /** |p_F - p_C| from exact traces, Δ; null when a trace fails */
  exactDelta: number | null;
  /** the rule P / V with P the exact prism at n_d, Δ */
  ruleDelta: number | null;
}

/**
 * TCA at back-surface point (cx, cy) of a placed lens (or of an untilted lens with the centre
 * of rotation crMm behind it on its axis, when a number is given).
 */
export function transverseChromatic(lens: Lens, abbe: number, where: Placement | number, cx: number, cy: number): Tca {
  const { nF, nC } = lineIndices(lens.index, abbe);
  const pl = typeof where === 'number'
    ? new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm: where, pantoDeg: 0, wrapDeg: 0, eye: 'R' })
    : where;
  const t = new LineTrace();
  const at = (l: Lens): { x: number; y: number; m: number } | null =>
    placedLineOfSight(l, pl, cx, cy, t) === RayStatus.ok ? { x: t.px, y: t.py, m: t.prism } : null;
  const d = at(lens), f = at(lens.withIndex(nF)), c = at(lens.withIndex(nC));
  return {
    exactDelta: f && c ? Math.hypot(f.x - c.x, f.y - c.y) : null,
    ruleDelta: d ? d.m / abbe : null,
  };
}
