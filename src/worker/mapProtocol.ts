/** Messages between the page and the map worker (the prism map and the power maps). */
import type { Eye, LensSpec } from '../optics/index.ts';

export type MapQuantity = 'exact' | 'error';

export interface MapRequest {
  id: number;
  spec: LensSpec;
  crMm: number;
  eye: Eye;
  size: number;
  quantity: MapQuantity;
  /** also the power maps (mean and astigmatic error, distant target), as a second answer */
  power?: boolean;
}

export interface MapContour {
  level: number;
  /** SVG path in image coordinates (0..size, y down) */
  d: string;
}

/** One coloured map: values, colours, scale and contours. */
export interface MapLayer {
  /** RGBA, row 0 at the top (y = +halfWidth) */
  rgba: Uint8ClampedArray;
  /** the mapped value per pixel (same order), NaN where there is no answer */
  values: Float32Array;
  /** colour scale range */
  lo: number;
  hi: number;
  /** where lo and hi sit on the colour scale, 0..1 */
  tLo: number;
  tHi: number;
  contours: MapContour[];
  /** outline of the region with an answer (for clipping contours) */
  validPath: string;
  /** share of aperture points without an answer */
  failedShare: number;
}

export interface MapResult extends MapLayer {
  id: number;
  ok: true;
  kind: 'prism';
  size: number;
  halfWidthMm: number;
  quantity: MapQuantity;
  /** time spent in the worker, ms */
  workerMs: number;
}

/**
 * The two power maps over the same grid as the prism map, D: the worker's second answer to
 * a request with `power`, posted after the prism map so that the prism map is never kept waiting.
 */
export interface PowerResult {
  id: number;
  ok: true;
  kind: 'power';
  size: number;
  halfWidthMm: number;
  /** mean error (diverging scale, white at zero) */
  mean: MapLayer;
  /** astigmatic error (sequential scale from zero) */
  astigmatism: MapLayer;
  /** time of the engine's fillPowerMap, ms (about 0 when cached) */
  fillMs: number;
  /** the engine's map was the previous request's (same lens, CR distance and eye) */
  cached: boolean;
  /** time of the power maps in the worker, ms */
  workerMs: number;
}

export interface MapFailure {
  id: number;
  ok: false;
  message: string;
}

export type MapResponse = MapResult | PowerResult | MapFailure;
