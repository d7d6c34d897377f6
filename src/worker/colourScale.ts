/**
 * Colour scales for the prism map (Decentra's own stops) and "nice" contour levels.
 * Plain numbers only, so the map worker and the legend share them.
 */

type Stop = readonly [number, number, number, number]; // t, r, g, b

/** Sequential: exact prism magnitude, low (deep blue-green) to high (cream). */
const SEQUENTIAL: readonly Stop[] = [
  [0, 16, 42, 67], [0.3, 31, 111, 139], [0.6, 87, 184, 148], [0.85, 233, 214, 107], [1, 255, 244, 214],
];
/** Diverging: Prentice error, negative (under-states) blue, zero pale, positive (over-states) red. */
const DIVERGING: readonly Stop[] = [
  [0, 36, 76, 146], [0.25, 104, 150, 205], [0.5, 246, 245, 238], [0.75, 232, 146, 108], [1, 170, 50, 38],
];

export type ScaleKind = 'sequential' | 'diverging';

/** RGB of t in [0, 1] (clamped) into out[offset..offset+2]. */
export function colourAt(kind: ScaleKind, t: number, out: Uint8ClampedArray | number[], offset: number): void {
  const stops = kind === 'sequential' ? SEQUENTIAL : DIVERGING;
  const x = t < 0 ? 0 : t > 1 ? 1 : t;
  let i = 1;
  while (i < stops.length - 1 && stops[i]![0] < x) i++;
  const a = stops[i - 1]!, b = stops[i]!;
  const f = b[0] === a[0] ? 0 : (x - a[0]) / (b[0] - a[0]);
  out[offset] = a[1] + f * (b[1] - a[1]);
  out[offset + 1] = a[2] + f * (b[2] - a[2]);
  out[offset + 2] = a[3] + f * (b[3] - a[3]);
}

export function cssColourAt(kind: ScaleKind, t: number): string {
  const c = [0, 0, 0];
  colourAt(kind, t, c, 0);
  return `rgb(${Math.round(c[0]!)}, ${Math.round(c[1]!)}, ${Math.round(c[2]!)})`;
}

/** A 1-2-2.5-5 step giving about `count` intervals over [lo, hi]. */
export function niceStep(lo: number, hi: number, count: number): number {
  const span = hi - lo;
  if (!(span > 0)) return 1;
  const raw = span / count;
  const p = 10 ** Math.floor(Math.log10(raw));
  for (const m of [1, 2, 2.5, 5, 10]) if (raw <= m * p) return m * p;
  return 10 * p;
}

/** Levels k * step strictly inside (lo, hi). */
export function niceLevels(lo: number, hi: number, count: number): number[] {
  const step = niceStep(lo, hi, count);
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v < hi; v += step) {
    const r = Math.round(v / step) * step;
    if (r > lo && r < hi) out.push(Number(r.toPrecision(12)));
  }
  return out;
}
