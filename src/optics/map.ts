/**
 * Loops over many visual points: a prism map over the lens aperture and a profile along one
 * direction. Outputs go into caller-owned typed arrays; nothing is allocated per point.
 */
import { RayStatus } from './errors.ts';
import { eyeMatrix, focimeterMatrix, prismFromMatrix } from './firstOrder.ts';
import type { Mat2 } from './powerMatrix.ts';
import type { Lens } from './lens.ts';
import { LineTrace, lineOfSight, traceFocimeter, traceLineOfSight } from './trace.ts';

export interface MapGrid {
  /** number of points per side (odd keeps the optical centre on the grid) */
  size: number;
  /** half-width of the square grid, mm (the grid spans -halfWidth..+halfWidth in x and y) */
  halfWidthMm: number;
}

/** Prism map buffers: index i = row * size + col, row along y (bottom first), col along x. */
export interface PrismMap {
  size: number;
  halfWidthMm: number;
  /** exact prism components, Δ (0 where status is not ok) */
  px: Float64Array;
  py: Float64Array;
  /** Prentice prism magnitude, Δ */
  prentice: Float64Array;
  /** RayStatus per point */
  status: Uint8Array;
}

export function allocatePrismMap(grid: MapGrid): PrismMap {
  const n = grid.size * grid.size;
  return {
    size: grid.size, halfWidthMm: grid.halfWidthMm,
    px: new Float64Array(n), py: new Float64Array(n), prentice: new Float64Array(n), status: new Uint8Array(n),
  };
}

const _t = new LineTrace();
const _v = { x: 0, y: 0 };

function matrixPrism(m: Mat2, x: number, y: number): number {
  prismFromMatrix(m, x, y, _v);
  return Math.sqrt(_v.x * _v.x + _v.y * _v.y);
}

/** Grid coordinate of column or row i, mm. */
export function gridCoordinate(i: number, size: number, halfWidthMm: number): number {
  return size === 1 ? 0 : -halfWidthMm + (2 * halfWidthMm * i) / (size - 1);
}

/** Fill a prism map for an untilted lens with the centre of rotation on its axis. */
export function fillPrismMap(lens: Lens, crDistanceMm: number, map: PrismMap): PrismMap {
  const { size, halfWidthMm } = map;
  const f = lens.vertexMatrix;
  for (let row = 0; row < size; row++) {
    const y = gridCoordinate(row, size, halfWidthMm);
    for (let col = 0; col < size; col++) {
      const x = gridCoordinate(col, size, halfWidthMm);
      const i = row * size + col;
      // fields set directly (no call with number arguments): allocation-free
      _t.sx = 0; _t.sy = 0; _t.sz = -crDistanceMm; _t.bx = x; _t.by = y;
      const st = lineOfSight(lens, _t);
      map.status[i] = st;
      map.px[i] = _t.px;
      map.py[i] = _t.py;
      map.prentice[i] = matrixPrism(f, x, y);
    }
  }
  return map;
}

/** Prism magnitudes along one direction from the optical centre, Δ; NaN where no exact answer. */
export interface PrismProfile {
  decentrationMm: Float64Array;
  prentice: Float64Array;
  paraxial: Float64Array;
  exact: Float64Array;
  focimeter: Float64Array;
  /** Prentice error, % of exact (NaN where exact is 0 or missing) */
  errorPercent: Float64Array;
}

export function prismProfile(
  lens: Lens, crDistanceMm: number, directionDeg: number, maxMm: number, steps: number,
): PrismProfile {
  const n = steps + 1;
  const out: PrismProfile = {
    decentrationMm: new Float64Array(n), prentice: new Float64Array(n), paraxial: new Float64Array(n),
    exact: new Float64Array(n), focimeter: new Float64Array(n), errorPercent: new Float64Array(n),
  };
  const a = (directionDeg * Math.PI) / 180;
  const ux = Math.cos(a), uy = Math.sin(a);
  const fe = eyeMatrix(lens, crDistanceMm), ff = focimeterMatrix(lens);
  for (let i = 0; i < n; i++) {
    const d = (maxMm * i) / steps;
    out.decentrationMm[i] = d;
    out.prentice[i] = matrixPrism(lens.vertexMatrix, d * ux, d * uy);
    out.paraxial[i] = matrixPrism(fe, d * ux, d * uy);
    out.exact[i] = traceLineOfSight(lens, 0, 0, -crDistanceMm, d * ux, d * uy, _t) === RayStatus.ok ? _t.prism : NaN;
    out.focimeter[i] = traceFocimeter(lens, d * ux, d * uy, _t) === RayStatus.ok ? _t.prism : NaN;
    out.errorPercent[i] = out.exact[i] > 0 ? (100 * (out.prentice[i] - out.exact[i])) / out.exact[i] : NaN;
  }
  return out;
}
