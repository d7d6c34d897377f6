/** Messages between the page and the prism-map worker. */
import type { Eye, LensSpec } from '../optics/index.ts';

export type MapQuantity = 'exact' | 'error';

export interface MapRequest {
  id: number;
  spec: LensSpec;
  crMm: number;
  eye: Eye;
  size: number;
  quantity: MapQuantity;
}

export interface MapContour {
  level: number;
  /** SVG path in image coordinates (0..size, y down) */
  d: string;
}

export interface MapResult {
  id: number;
  ok: true;
  size: number;
  halfWidthMm: number;
  quantity: MapQuantity;
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
  /** share of aperture points without an exact answer */
  failedShare: number;
  /** time spent in the worker, ms */
  workerMs: number;
}

export interface MapFailure {
  id: number;
  ok: false;
  message: string;
}

export type MapResponse = MapResult | MapFailure;
