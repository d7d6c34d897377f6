/**
 * The power map: the pencil's mean error and astigmatic error (power.ts; docs/method.md,
 * "Power at the visual point") at every visual point of a square grid over the lens, as the
 * prism map (map.ts) gives the prism. Same grid (MapGrid, gridCoordinate: row along y bottom
 * first, column along x), same marking of failed points (a RayStatus per point, 0 in the
 * value arrays where it is not ok).
 *
 * Each point is the exact line of sight from the centre of rotation of the placement
 * (placedLine) followed by pencilPower, with one LineTrace, the caller's PencilSetup and one
 * PencilPower reused: nothing is allocated per point.
 */
import { RayStatus } from './errors.ts';
import type { Lens } from './lens.ts';
import { type MapGrid, gridCoordinate } from './map.ts';
import { type Placement, placedLine } from './placement.ts';
import { PencilPower, type PencilSetup, pencilPower } from './power.ts';
import { LineTrace } from './trace.ts';

/** Power map buffers: index i = row * size + col, row along y (bottom first), col along x. */
export interface PowerMap {
  size: number;
  halfWidthMm: number;
  /** mean error, D (0 where status is not ok) */
  meanError: Float64Array;
  /** astigmatic error, D, >= 0 (0 where status is not ok) */
  astigmaticError: Float64Array;
  /** RayStatus per point: the line of sight's, or the pencil's where the line of sight succeeded */
  status: Uint8Array;
}

export function allocatePowerMap(grid: MapGrid): PowerMap {
  const n = grid.size * grid.size;
  return {
    size: grid.size, halfWidthMm: grid.halfWidthMm,
    meanError: new Float64Array(n), astigmaticError: new Float64Array(n), status: new Uint8Array(n),
  };
}

const _t = new LineTrace();
const _p = new PencilPower();

/**
 * Fill a power map for a lens at placement `pl`, the pencil judged by `setup` (pencilSetup for
 * the same lens and placement; a near target in it applies to every point).
 */
export function fillPowerMap(lens: Lens, pl: Placement, setup: PencilSetup, map: PowerMap): PowerMap {
  const { size, halfWidthMm } = map;
  const t = _t, p = _p;
  for (let row = 0; row < size; row++) {
    const y = gridCoordinate(row, size, halfWidthMm);
    for (let col = 0; col < size; col++) {
      const i = row * size + col;
      // fields set directly (no call with number arguments): allocation-free
      t.bx = gridCoordinate(col, size, halfWidthMm); t.by = y;
      let st = placedLine(lens, pl, t);
      if (st === RayStatus.ok) st = pencilPower(lens, t, setup, p);
      map.status[i] = st;
      if (st === RayStatus.ok) {
        map.meanError[i] = p.meanError;
        map.astigmaticError[i] = p.astigmaticError;
      } else {
        map.meanError[i] = 0;
        map.astigmaticError[i] = 0;
      }
    }
  }
  return map;
}
