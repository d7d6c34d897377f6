/**
 * The prism map's work, apart from the worker wiring so it can be timed and tested in Node:
 * trace the whole aperture with the engine (fillPrismMap), colour it, and draw contour
 * lines (d3-contour). The map buffers are reused between calls of the same size.
 */
import { contours } from 'd3-contour';
import { type PrismMap, RayStatus, allocatePrismMap, fillPrismMap, makeLens, prenticeError } from '../optics/index.ts';
import { type ScaleKind, colourAt, niceLevels } from './colourScale.ts';
import type { MapContour, MapRequest, MapResult } from './mapProtocol.ts';

let map: PrismMap | null = null;

export function computeMap(req: MapRequest): MapResult {
  const t0 = performance.now();
  const lens = makeLens(req.spec);
  const hw = lens.radiusMm;
  const n = req.size;
  if (!map || map.size !== n) map = allocatePrismMap({ size: n, halfWidthMm: hw });
  map.halfWidthMm = hw;
  fillPrismMap(lens, req.crMm, map);

  // values in image order: image row 0 is the top of the lens (y = +hw), map row 0 the bottom
  const values = new Float32Array(n * n);
  const valid = new Uint8Array(n * n);
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
      if (map.status[i] === RayStatus.ok) {
        const px = map.px[i]!, py = map.py[i]!;
        const exact = Math.sqrt(px * px + py * py);
        if (req.quantity === 'exact') v = exact;
        else v = prenticeError(map.prentice[i]!, exact).percent ?? NaN;
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
  // palette positions of lo and hi: exact prism runs the whole sequential scale from 0; the
  // error uses the diverging scale with white at zero, symmetric when the values change sign,
  // otherwise only the half (blue or red) they fall in, spread over their own range
  let tLo = 0, tHi = 1;
  if (req.quantity === 'exact') lo = 0;
  else if (lo < 0 && hi > 0) {
    const m = Math.max(-lo, hi);
    lo = -m; hi = m;
  } else if (hi <= 0) { tLo = 0; tHi = 0.46; }
  else { tLo = 0.54; tHi = 1; }
  if (hi - lo < 1e-9) { lo -= 0.5; hi += 0.5; }

  // colours from a 256-step table: the scale where there is an answer, hatching where the
  // aperture has none, transparent outside it
  const kind = req.quantity === 'exact' ? 'sequential' : 'diverging';
  const lut = colourTable(kind, tLo, tHi);
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

  return {
    id: req.id, ok: true, size: n, halfWidthMm: hw, quantity: req.quantity, rgba, values, lo, hi, tLo, tHi,
    contours: out, validPath, failedShare: apertureCount ? failed / apertureCount : 0,
    workerMs: performance.now() - t0,
  };
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

