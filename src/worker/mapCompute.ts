/**
 * The maps' work, apart from the worker wiring so it can be timed and tested in Node: trace
 * the whole aperture with the engine (fillPrismMap for the prism map, computeMap;
 * fillPowerMap for the two power maps, computePowerMaps), colour it, and draw contour lines
 * (d3-contour). The engine's map buffers are reused between calls of the same size.
 */
import { contours } from 'd3-contour';
import {
  type PowerMap, type PrismMap, Placement, RayStatus, allocatePowerMap, allocatePrismMap, fillPowerMap,
  fillPrismMap, makeLens, pencilSetup, prenticeError,
} from '../optics/index.ts';
import { type ScaleKind, colourAt, niceLevels } from './colourScale.ts';
import type { MapContour, MapLayer, MapRequest, MapResult, PowerResult } from './mapProtocol.ts';

let map: PrismMap | null = null;

export function computeMap(req: MapRequest): MapResult {
  const t0 = performance.now();
  const lens = makeLens(req.spec);
  const hw = lens.radiusMm;
  const n = req.size;
  if (!map || map.size !== n) map = allocatePrismMap({ size: n, halfWidthMm: hw });
  map.halfWidthMm = hw;
  fillPrismMap(lens, req.crMm, map);

  const values = new Float32Array(n * n);
  const valid = new Uint8Array(n * n);
  const exact = req.quantity === 'exact';
  const px = map.px, py = map.py, prentice = map.prentice;
  const layer = colourLayer(n, hw, map.status, values, valid, exact ? 'magnitude' : 'signed', (i) => {
    const m = Math.sqrt(px[i]! * px[i]! + py[i]! * py[i]!);
    return exact ? m : prenticeError(prentice[i]!, m).percent ?? NaN;
  });
  return { id: req.id, ok: true, kind: 'prism', size: n, halfWidthMm: hw, quantity: req.quantity, ...layer, workerMs: performance.now() - t0 };
}

/**
 * The power maps (mean error and astigmatic error) of the pencil along each line of sight,
 * distant target, by the engine's fillPowerMap for an untilted lens with the centre of
 * rotation on its axis, as the prism map is. The engine's map is kept for the next request:
 * a new prism quantity, or the same lens again, reuses it.
 */
let power: { key: string; map: PowerMap } | null = null;

/** Below half the panel's last digit (0.01 D), a mean error counts as zero for the colour scale. */
const POWER_ZERO_D = 0.005;

export function computePowerMaps(req: MapRequest): PowerResult {
  const t0 = performance.now();
  const lens = makeLens(req.spec);
  const hw = lens.radiusMm;
  const n = req.size;
  const key = JSON.stringify([req.spec, req.crMm, req.eye, n]);
  const cached = power !== null && power.key === key;
  if (!cached) {
    const map = power && power.map.size === n ? power.map : allocatePowerMap({ size: n, halfWidthMm: hw });
    map.halfWidthMm = hw;
    const pl = new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm: req.crMm, pantoDeg: 0, wrapDeg: 0, eye: req.eye });
    fillPowerMap(lens, pl, pencilSetup(lens, pl, null), map);
    power = { key, map };
  }
  const m = power!.map;
  const fillMs = performance.now() - t0;
  const mean = colourLayer(n, hw, m.status, new Float32Array(n * n), new Uint8Array(n * n), 'signed', (i) => m.meanError[i]!, POWER_ZERO_D);
  const astig = colourLayer(n, hw, m.status, new Float32Array(n * n), new Uint8Array(n * n), 'magnitude', (i) => m.astigmaticError[i]!);
  return {
    id: req.id, ok: true, kind: 'power', size: n, halfWidthMm: hw, mean, astigmatism: astig, fillMs, cached,
    workerMs: performance.now() - t0,
  };
}

/**
 * One coloured layer of a map: the value of each grid point with an answer (status ok) in
 * image order, its colour on the project's scales and its contour lines. A 'magnitude' runs
 * the whole sequential scale from 0; a 'signed' value the diverging scale with white at zero,
 * symmetric when the values change sign, otherwise only the half (blue or red) they fall in,
 * spread over their own range. `values` and `valid` are the caller's buffers (n x n).
 */
function colourLayer(
  n: number, hw: number, status: Uint8Array, values: Float32Array, valid: Uint8Array,
  kind: 'magnitude' | 'signed', valueAt: (i: number) => number, zeroTolerance = 0,
): MapLayer {
  // values in image order: image row 0 is the top of the lens (y = +hw), map row 0 the bottom
  const inside = new Uint8Array(n * n);
  let lo = Infinity, hi = -Infinity, failed = 0, apertureCount = 0;
  const step = (2 * hw) / (n - 1);
  for (let row = 0; row < n; row++) {
    const y = -hw + row * step;
    const irow = n - 1 - row;
    for (let col = 0; col < n; col++) {
      const x = -hw + col * step;
      const i = row * n + col;
      const k = irow * n + col;
      const inAperture = x * x + y * y <= hw * hw;
      inside[k] = inAperture ? 1 : 0;
      if (inAperture) apertureCount++;
      let v = NaN;
      if (status[i] === RayStatus.ok) {
        v = valueAt(i);
        valid[k] = 1;
      } else if (inAperture) failed++;
      values[k] = v;
      if (v === v) {
        if (v < lo) lo = v;
        if (v > hi) hi = v;
      }
    }
  }
  if (!(hi >= lo)) { lo = 0; hi = 1; }
  // values within the tolerance of zero count as zero for the choice of scale (the pencil's
  // finite differences leave a few 1e-6 D at the optical centre)
  if (kind === 'signed' && hi > 0 && hi < zeroTolerance) hi = 0;
  if (kind === 'signed' && lo < 0 && lo > -zeroTolerance) lo = 0;
  let tLo = 0, tHi = 1;
  if (kind === 'magnitude') lo = 0;
  else if (lo < 0 && hi > 0) {
    const m = Math.max(-lo, hi);
    lo = -m; hi = m;
  } else if (hi <= 0) { tLo = 0; tHi = 0.46; }
  else { tLo = 0.54; tHi = 1; }
  if (hi - lo < 1e-9) { lo -= 0.5; hi += 0.5; }

  // colours from a 256-step table: the scale where there is an answer, hatching where the
  // aperture has none, transparent outside it
  const lut = colourTable(kind === 'magnitude' ? 'sequential' : 'diverging', tLo, tHi);
  const rgba = new Uint8ClampedArray(4 * n * n);
  const scale = 255 / (hi - lo);
  for (let r = 0; r < n; r++) {
    for (let c = 0; c < n; c++) {
      const k = r * n + c;
      const o = 4 * k;
      if (valid[k]) {
        const v = values[k]!;
        let j = v === v ? Math.round((v - lo) * scale) : 128;
        j = j < 0 ? 0 : j > 255 ? 255 : j;
        rgba[o] = lut[3 * j]!; rgba[o + 1] = lut[3 * j + 1]!; rgba[o + 2] = lut[3 * j + 2]!; rgba[o + 3] = 255;
      } else if (inside[k]) {
        const g = (r + c) % 8 < 3 ? 120 : 84;
        rgba[o] = g; rgba[o + 1] = g; rgba[o + 2] = g + 6; rgba[o + 3] = 255;
      }
    }
  }

  // contour lines (d3-contour) through every second row and column of the traced grid: the
  // same traced values, a quarter of the cells, lines indistinguishable at screen size. Gaps
  // (the optical centre of the error map, a rim without answers) are filled from their
  // neighbours a few cells out so the lines end cleanly under the clip of the valid region.
  const m = (n + 1) >> 1;
  const cv = new Float64Array(m * m);
  const cvalid = new Uint8Array(m * m);
  for (let r = 0; r < m; r++) {
    for (let c = 0; c < m; c++) {
      const k = Math.min(2 * r, n - 1) * n + Math.min(2 * c, n - 1);
      cv[r * m + c] = values[k]!;
      cvalid[r * m + c] = valid[k]!;
    }
  }
  fillGaps(cv, m, 3);
  const levels = niceLevels(lo, hi, 7);
  const f = (n - 1) / (m - 1);
  const out: MapContour[] = [];
  for (const p of contours().size([m, m]).thresholds(levels)(cv as unknown as number[])) {
    const d = pathOf(p.coordinates, f);
    if (d) out.push({ level: p.value, d });
  }
  const validPoly = contours().size([m, m]).thresholds([0.5])(cvalid as unknown as number[]);
  const validPath = validPoly[0] ? pathOf(validPoly[0].coordinates, f) : '';
  return { rgba, values, lo, hi, tLo, tHi, contours: out, validPath, failedShare: apertureCount ? failed / apertureCount : 0 };
}

/**
 * SVG path of d3-contour rings, from the coarse grid to image pixels: d3 puts grid value j at
 * j + 0.5, and coarse point j is image column f j, whose centre is at f j + 0.5.
 */
function pathOf(coords: number[][][][], f: number): string {
  let d = '';
  for (const polygon of coords) {
    for (const ring of polygon) {
      for (let j = 0; j < ring.length; j++) {
        const pt = ring[j]!;
        const x = f * (pt[0]! - 0.5) + 0.5, y = f * (pt[1]! - 0.5) + 0.5;
        d += `${j === 0 ? 'M' : 'L'}${Math.round(x * 100) / 100} ${Math.round(y * 100) / 100}`;
      }
      d += 'Z';
    }
  }
  return d;
}

/** Fill NaN cells from their valid 4-neighbours, `passes` cells out. */
function fillGaps(v: Float64Array, m: number, passes: number): void {
  const next = new Float64Array(v.length);
  for (let pass = 0; pass < passes; pass++) {
    next.set(v);
    for (let r = 0; r < m; r++) {
      for (let c = 0; c < m; c++) {
        const k = r * m + c;
        if (v[k] === v[k]) continue;
        let s = 0, q = 0;
        if (c > 0 && v[k - 1] === v[k - 1]) { s += v[k - 1]!; q++; }
        if (c < m - 1 && v[k + 1] === v[k + 1]) { s += v[k + 1]!; q++; }
        if (r > 0 && v[k - m] === v[k - m]) { s += v[k - m]!; q++; }
        if (r < m - 1 && v[k + m] === v[k + m]) { s += v[k + m]!; q++; }
        if (q) next[k] = s / q;
      }
    }
    v.set(next);
  }
}

/** 256 RGB steps of the scale between palette positions tLo and tHi. */
const _tables = new Map<string, Uint8ClampedArray>();
function colourTable(kind: ScaleKind, tLo: number, tHi: number): Uint8ClampedArray {
  const key = `${kind}:${tLo}:${tHi}`;
  let t = _tables.get(key);
  if (!t) {
    t = new Uint8ClampedArray(3 * 256);
    for (let j = 0; j < 256; j++) colourAt(kind, tLo + (j / 255) * (tHi - tLo), t, 3 * j);
    _tables.set(key, t);
  }
  return t;
}

