/**
 * Where Prentice's rule breaks down for the family: Prentice's error (percent of the exact
 * prism at the eye) over sphere x decentration, as coloured cells with contour lines at the
 * chosen levels (d3-contour). The numbers are the range module's (src/case/range.ts,
 * `breakdown`); this file only draws them. Clicking the chart opens that sphere at that
 * decentration in the single-lens view.
 */
import { contours } from 'd3-contour';
import type { Breakdown } from '../../case/range.ts';
import { cssColourAt, niceStep } from '../../worker/colourScale.ts';
import { num } from '../format.ts';
import { el, svg } from '../resultsPane.ts';

const W = 720, H = 290;
const M = { left: 52, right: 96, top: 14, bottom: 40 };
/** stroke patterns of the contour levels, in order */
const DASHES = ['', '6 3', '2 3', '10 3 2 3'];

/** A level for people: 5 %, 12.5 %. */
export function levelText(l: number): string {
  return `${Number.isInteger(l) ? String(l) : num(l, 1)} %`;
}

export class BreakdownChart {
  readonly element: HTMLElement;
  private readonly svgEl: SVGSVGElement;
  private readonly note: HTMLElement;
  private readonly readout: HTMLElement;
  private data: Breakdown | null = null;
  /** clicking asks for this sphere (a value of the family) at this decentration, mm */
  onPick: ((sphere: number, decentrationMm: number) => void) | null = null;

  constructor(host: HTMLElement) {
    this.element = el('figure', 'range-chart');
    this.svgEl = svg('svg', { viewBox: `0 0 ${W} ${H}`, class: 'range-chart-svg', role: 'img' });
    this.svgEl.setAttribute('aria-label', 'Prentice’s error over sphere and decentration, with contour lines');
    this.readout = el('p', 'range-chart-readout', 'Point at the chart to read the error; click to open that lens in the single-lens view.');
    this.note = el('figcaption', 'range-chart-note');
    this.element.append(this.svgEl, this.readout, this.note);
    host.append(this.element);
    this.svgEl.addEventListener('pointermove', (e) => this.hover(e));
    this.svgEl.addEventListener('click', (e) => this.click(e));
  }

  setStale(stale: boolean): void {
    this.element.classList.toggle('stale', stale);
  }

  /** the grid cell under a pointer event, or null */
  private cellAt(e: MouseEvent): { i: number; j: number; d: number } | null {
    const b = this.data;
    if (!b || b.spheres.length < 2) return null;
    const r = this.svgEl.getBoundingClientRect();
    // viewBox with "meet": the drawing is scaled uniformly and centred
    const s = Math.min(r.width / W, r.height / H);
    const x = (e.clientX - r.left - (r.width - W * s) / 2) / s;
    const y = (e.clientY - r.top - (r.height - H * s) / 2) / s;
    const pw = W - M.left - M.right, ph = H - M.top - M.bottom;
    const fx = (x - M.left) / pw, fy = 1 - (y - M.top) / ph;
    if (fx < -0.02 || fx > 1.02 || fy < -0.02 || fy > 1.02) return null;
    const n = b.spheres.length;
    const i = Math.min(n - 1, Math.max(0, Math.round(fx * (n - 1))));
    const decs = b.decentrationsMm;
    const d = decs[0]! + Math.min(1, Math.max(0, fy)) * (decs[decs.length - 1]! - decs[0]!);
    let j = 0;
    for (let k = 1; k < decs.length; k++) if (Math.abs(decs[k]! - d) < Math.abs(decs[j]! - d)) j = k;
    return { i, j, d: Math.round(d * 10) / 10 };
  }

  private hover(e: PointerEvent): void {
    const c = this.cellAt(e);
    const b = this.data;
    if (!c || !b) return;
    const p = b.percent[c.i]![c.j];
    const pr = b.prism[c.i]![c.j];
    this.readout.textContent = `sphere ${num(b.spheres[c.i]!, 2)} D at ${num(b.decentrationsMm[c.j]!, 1)} mm: ` +
      (p === null || p === undefined || pr === null || pr === undefined
        ? 'no answer (beyond the lens, or the trace fails)'
        : `Prentice’s error ${p > 0 ? '+' : ''}${num(p, 1)} % (${pr > 0 ? '+' : ''}${num(pr, 3)} Δ)`);
  }

  private click(e: MouseEvent): void {
    const c = this.cellAt(e);
    if (c && this.data && this.onPick) this.onPick(this.data.spheres[c.i]!, c.d);
  }

  update(b: Breakdown): void {
    this.data = b;
    this.setStale(false);
    const root = this.svgEl;
    root.replaceChildren();
    const n = b.spheres.length, m = b.decentrationsMm.length;
    const pw = W - M.left - M.right, ph = H - M.top - M.bottom;
    const s0 = b.spheres[0]!, s1 = b.spheres[n - 1]!;
    const d0 = b.decentrationsMm[0]!, d1 = b.decentrationsMm[m - 1]!;
    const xOf = (i: number): number => M.left + (n > 1 ? (i / (n - 1)) * pw : pw / 2);
    const yOf = (j: number): number => M.top + ph - (m > 1 ? (j / (m - 1)) * ph : ph / 2);
    const dirWords = `${b.direction.label}${/°$/.test(b.direction.label) ? '' : ` (${num(b.direction.deg, 0)}°)`}`;
    this.note.textContent = `Prentice’s error in percent of the exact prism at the eye, along ${dirWords}, cylinder ${num(b.cyl, 2)} D × ${num(b.axis, 0)}°. ` +
      'Red: Prentice’s rule over-states the prism; blue: it under-states it. Grey: no lens there (beyond its edge) or the trace fails. ' +
      `Lines: |error| = ${b.levels.map(levelText).join(', ')}.`;
    if (n < 2 || m < 2) {
      root.append(svg('text', { x: W / 2, y: H / 2, 'text-anchor': 'middle', class: 'range-chart-empty' },
        'The chart needs two spheres or more: give the spheres as a range or a list.'));
      return;
    }

    // the colour scale: symmetric about 0, to the largest |error| shown (at least the top level)
    let maxAbs = Math.max(...b.levels);
    for (const col of b.percent) for (const v of col) if (v !== null && Math.abs(v) > maxAbs) maxAbs = Math.abs(v);
    maxAbs = Math.min(maxAbs, 4 * Math.max(...b.levels));
    const colour = (v: number): string => cssColourAt('diverging', 0.5 + v / (2 * maxAbs));

    // cells: each grid value owns the rectangle half-way to its neighbours
    const cells = svg('g', { class: 'range-cells' });
    const cw = pw / (n - 1), chh = ph / (m - 1);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < m; j++) {
        const v = b.percent[i]![j];
        const x = Math.max(M.left, xOf(i) - cw / 2), x2 = Math.min(M.left + pw, xOf(i) + cw / 2);
        const y = Math.max(M.top, yOf(j) - chh / 2), y2 = Math.min(M.top + ph, yOf(j) + chh / 2);
        cells.append(svg('rect', {
          x: x.toFixed(2), y: y.toFixed(2), width: (x2 - x + 0.3).toFixed(2), height: (y2 - y + 0.3).toFixed(2),
          fill: v === null || v === undefined ? '#c9cdd1' : colour(v),
        }));
      }
    }
    root.append(cells);

    // contour lines of |error| at the levels; cells without an answer take their neighbour's
    // value (along the decentration, then across) so the lines end at the grey region's edge
    const grid = new Float64Array(n * m);
    const valid = new Float64Array(n * m);
    for (let i = 0; i < n; i++) {
      let lastV = NaN;
      for (let j = 0; j < m; j++) {
        const v = b.percent[i]![j];
        if (v !== null && v !== undefined) { lastV = Math.abs(v); valid[j * n + i] = 1; }
        grid[j * n + i] = v !== null && v !== undefined ? Math.abs(v) : lastV;
      }
    }
    for (let j = 0; j < m; j++) {
      for (let i = 0; i < n; i++) {
        if (grid[j * n + i] === grid[j * n + i]) continue;
        for (let k = 1; k < n; k++) {
          const a = grid[j * n + i - k], c = grid[j * n + i + k];
          if (i - k >= 0 && a === a) { grid[j * n + i] = a!; break; }
          if (i + k < n && c === c) { grid[j * n + i] = c!; break; }
        }
        if (grid[j * n + i] !== grid[j * n + i]) grid[j * n + i] = 0;
      }
    }
    const toX = (gx: number): number => M.left + (Math.min(n - 1, Math.max(0, gx - 0.5)) / (n - 1)) * pw;
    const toY = (gy: number): number => M.top + ph - (Math.min(m - 1, Math.max(0, gy - 0.5)) / (m - 1)) * ph;
    // a line's label goes at its point farthest inside the plot (away from the frame), and
    // away from the labels already placed
    const placed: [number, number][] = [];
    const pathOf = (coords: number[][][][]): { d: string; label: [number, number] | null } => {
      let d = '';
      let label: [number, number] | null = null;
      let room = -Infinity;
      for (const poly of coords) {
        for (const ring of poly) {
          ring.forEach((pt, k) => {
            const x = toX(pt[0]!), y = toY(pt[1]!);
            d += `${k ? 'L' : 'M'}${x.toFixed(1)} ${y.toFixed(1)}`;
            let r = Math.min(x - M.left, M.left + pw - x - 30, y - M.top - 12, M.top + ph - y, 60);
            for (const [px, py] of placed) if (Math.abs(px - x) < 44 && Math.abs(py - y) < 16) r -= 1000;
            if (r > room) { room = r; label = [x, y]; }
          });
          d += 'Z';
        }
      }
      if (label) placed.push(label);
      return { d, label };
    };
    const clipId = 'range-valid';
    const defs = svg('defs');
    const clip = svg('clipPath', { id: clipId });
    const validPoly = contours().size([n, m]).thresholds([0.5])(valid as unknown as number[]);
    clip.append(svg('path', { d: validPoly[0] ? pathOf(validPoly[0].coordinates).d : '' }));
    placed.length = 0;
    defs.append(clip);
    root.append(defs);
    const lines = svg('g', { class: 'range-contours', 'clip-path': `url(#${clipId})` });
    const labels = svg('g', { class: 'range-contour-labels' });
    b.levels.forEach((level, k) => {
      const [c] = contours().size([n, m]).thresholds([level])(grid as unknown as number[]);
      if (!c || !c.coordinates.length) return;
      const p = pathOf(c.coordinates);
      lines.append(svg('path', { d: p.d, class: 'range-contour', 'stroke-dasharray': DASHES[k % DASHES.length]!, 'data-level': level }));
      if (p.label) labels.append(svg('text', { x: p.label[0].toFixed(1), y: (p.label[1] - 3).toFixed(1), class: 'range-contour-label' }, levelText(level)));
    });
    root.append(lines, labels);

    // axes
    const axes = svg('g', { class: 'range-axes' });
    axes.append(svg('rect', { x: M.left, y: M.top, width: pw, height: ph, class: 'range-frame' }));
    const xStep = niceStep(s0, s1, 8);
    for (let v = Math.ceil(s0 / xStep - 1e-9) * xStep; v <= s1 + 1e-9; v += xStep) {
      const x = M.left + ((v - s0) / (s1 - s0)) * pw;
      axes.append(svg('line', { x1: x, x2: x, y1: M.top + ph, y2: M.top + ph + 4, class: 'range-tick' }));
      axes.append(svg('text', { x, y: M.top + ph + 15, 'text-anchor': 'middle' }, num(Math.abs(v) < 1e-9 ? 0 : v, Number.isInteger(xStep) ? 0 : xStep * 10 === Math.round(xStep * 10) ? 1 : 2)));
    }
    axes.append(svg('text', { x: M.left + pw / 2, y: H - 6, 'text-anchor': 'middle', class: 'range-axis-title' }, 'sphere (D)'));
    const yStep = niceStep(0, d1, 6);
    for (let v = Math.ceil(d0 / yStep) * yStep; v <= d1 + 1e-9; v += yStep) {
      const y = M.top + ph - ((v - d0) / (d1 - d0)) * ph;
      axes.append(svg('line', { x1: M.left - 4, x2: M.left, y1: y, y2: y, class: 'range-tick' }));
      axes.append(svg('text', { x: M.left - 7, y: y + 4, 'text-anchor': 'end' }, num(v, Number.isInteger(yStep) ? 0 : 1)));
    }
    const yt = svg('text', { x: 14, y: M.top + ph / 2, 'text-anchor': 'middle', class: 'range-axis-title', transform: `rotate(-90 14 ${M.top + ph / 2})` }, 'decentration (mm)');
    axes.append(yt);

    // the key: the colour bar and the line styles
    const kx = M.left + pw + 16;
    const key = svg('g', { class: 'range-key' });
    key.append(svg('text', { x: kx, y: M.top + 8 }, 'error %'));
    const barTop = M.top + 16, barH = 100;
    for (let t = 0; t < 20; t++) {
      key.append(svg('rect', { x: kx, y: barTop + (t * barH) / 20, width: 12, height: barH / 20 + 0.5, fill: cssColourAt('diverging', 1 - t / 19) }));
    }
    key.append(svg('text', { x: kx + 16, y: barTop + 8 }, `+${num(maxAbs, 0)}`));
    key.append(svg('text', { x: kx + 16, y: barTop + barH / 2 + 4 }, '0'));
    key.append(svg('text', { x: kx + 16, y: barTop + barH }, `−${num(maxAbs, 0)}`));
    b.levels.forEach((level, k) => {
      const y = barTop + barH + 22 + k * 16;
      key.append(svg('line', { x1: kx, x2: kx + 22, y1: y - 4, y2: y - 4, class: 'range-contour', 'stroke-dasharray': DASHES[k % DASHES.length]! }));
      key.append(svg('text', { x: kx + 27, y }, levelText(level)));
    });
    root.append(axes, key);
  }
}
