/**
 * The maps over the lens aperture, side by side: the prism map (exact prism in Δ or Prentice
 * error in %) and the two power maps (mean error and astigmatic error of the pencil, D,
 * distant target, at the vertex sphere; src/optics/power.ts), each a colour map with contour
 * lines and a legend. The work is done in one module worker (worker/map.worker.ts); only the
 * newest case is computed (a request made while one is running waits and replaces any older
 * waiting one). Clicking a map moves the visual point.
 */
import type { Eye, LensSpec } from '../../optics/index.ts';
import { type ScaleKind, cssColourAt } from '../../worker/colourScale.ts';
import type { MapLayer, MapQuantity, MapRequest, MapResponse, MapResult, PowerResult } from '../../worker/mapProtocol.ts';
import { num } from '../format.ts';
import { el, svg } from '../resultsPane.ts';

export const MAP_SIZE = 201;

export interface MapCase {
  spec: LensSpec;
  crMm: number;
  eye: Eye;
  quantity: MapQuantity;
}

/** What one map shows: its title, unit, scale and the words for its values. */
interface LayerText {
  title: string;
  unit: string;
  kind: ScaleKind;
  decimals: number;
  /** under the legend */
  key: string;
  /** read out where there is no value */
  none: string;
}

const POWER_TEXT: Record<'mean' | 'astigmatism', LayerText> = {
  mean: {
    title: 'Mean error (D)', unit: 'D', kind: 'diverging', decimals: 2,
    key: 'Red: more plus; blue: more minus.', none: 'no pencil here',
  },
  astigmatism: {
    title: 'Astigmatic error (D)', unit: 'D', kind: 'sequential', decimals: 2,
    key: 'Unwanted cylinder.', none: 'no pencil here',
  },
};

function prismText(q: MapQuantity): LayerText {
  return q === 'exact'
    ? { title: 'Exact prism (Δ)', unit: 'Δ', kind: 'sequential', decimals: 2, key: '', none: 'no exact answer' }
    : {
      title: 'Prentice error (%)', unit: '%', kind: 'diverging', decimals: 1,
      key: 'Blue: Prentice’s rule under-states the prism; red: over-states.', none: 'no exact answer, or zero prism at the OC',
    };
}

/** One map: figure (canvas, contours, markers) and its legend. */
class MapCell {
  readonly cell: HTMLElement;
  readonly figure: HTMLElement;
  readonly canvas: HTMLCanvasElement;
  private readonly overlay: SVGSVGElement;
  private readonly legend: HTMLElement;
  private readonly heading: HTMLElement;
  layer: MapLayer | null = null;
  text: LayerText | null = null;

  /** `prefix`: 'map' for the prism map (its class names are the page's and the tests'), else its own */
  constructor(host: HTMLElement, private readonly prefix: string, private readonly clipId: string, aria: string, headingClass: string) {
    this.cell = el('div', `map-cell ${prefix}-cell`);
    this.heading = el('div', headingClass);
    this.figure = el('div', `${prefix}-figure map-fig`);
    this.canvas = document.createElement('canvas');
    this.canvas.width = MAP_SIZE;
    this.canvas.height = MAP_SIZE;
    this.canvas.className = `${prefix}-canvas map-img`;
    this.overlay = svg('svg', { class: 'map-overlay', viewBox: `0 0 ${MAP_SIZE} ${MAP_SIZE}`, preserveAspectRatio: 'none' });
    this.figure.append(this.canvas, this.overlay);
    this.figure.tabIndex = 0;
    this.figure.setAttribute('role', 'img');
    this.figure.setAttribute('aria-label', aria);
    this.legend = el('div', 'map-legend');
    this.cell.append(this.heading, this.figure, this.legend);
    host.append(this.cell);
  }

  setStale(stale: boolean): void {
    this.figure.classList.toggle('stale', stale);
  }

  draw(r: MapLayer, size: number, text: LayerText, point: { x: number; y: number }, halfWidthMm: number): void {
    this.layer = r;
    this.text = text;
    const ctx = this.canvas.getContext('2d')!;
    ctx.putImageData(new ImageData(r.rgba as Uint8ClampedArray<ArrayBuffer>, size, size), 0, 0);
    const o = this.overlay;
    o.replaceChildren();
    const defs = svg('defs', {});
    const clip = svg('clipPath', { id: this.clipId });
    clip.append(svg('path', { d: r.validPath }));
    defs.append(clip);
    o.append(defs);
    const g = svg('g', { 'clip-path': `url(#${this.clipId})`, class: `map-contours ${this.prefix}-contours` });
    for (const c of r.contours) {
      const p = svg('path', { d: c.d, class: c.level === 0 ? 'contour zero' : 'contour' });
      const t = svg('title');
      t.textContent = `${num(c.level, 2)} ${text.unit}`;
      p.append(t);
      g.append(p);
    }
    o.append(g);
    const c = (size - 1) / 2 + 0.5;
    o.append(svg('circle', { cx: c, cy: c, r: c - 0.5, class: 'map-rim' }));
    o.append(svg('g', { class: 'map-markers' }));
    this.drawMarkers(point, size, halfWidthMm);
    this.heading.textContent = text.title;
    this.drawLegend(r, text);
    this.figure.dataset.ready = 'true';
  }

  /** A horizontal legend: the scale's colours from lo to hi, with the contour levels as ticks. */
  private drawLegend(r: MapLayer, text: LayerText): void {
    const stops: string[] = [];
    for (let i = 0; i <= 10; i++) stops.push(`${cssColourAt(text.kind, r.tLo + (i / 10) * (r.tHi - r.tLo))} ${i * 10}%`);
    const L = this.legend;
    L.replaceChildren();
    const bar = el('div', 'legend-bar');
    bar.style.background = `linear-gradient(to right, ${stops.join(', ')})`;
    const ticks = el('div', 'legend-ticks');
    const levels = r.contours.map((c) => c.level).filter((v, i, a) => a.indexOf(v) === i);
    const span = r.hi - r.lo;
    // the ends and about three levels between them (every level would crowd a small bar)
    const every = Math.max(1, Math.ceil(levels.length / 3));
    const inner = levels.filter((_, i) => i % every === every - 1 || levels.length <= 3);
    const far = (v: number): boolean => inner.every((l) => Math.abs(l - v) > 0.24 * span);
    const marks = [...(far(r.lo) ? [r.lo] : []), ...inner, ...(far(r.hi) ? [r.hi] : [])];
    const decimals = Math.abs(span) < 5 ? 2 : 1;
    for (const v of marks) {
      const t = el('span', undefined, `${num(v, decimals).replace('-', '−')}`);
      const at = (100 * (v - r.lo)) / span;
      t.style.left = `${at}%`;
      // the end labels stay within the bar
      if (at < 8) t.style.transform = 'none';
      else if (at > 92) t.style.transform = 'translateX(-100%)';
      ticks.append(t);
    }
    const box = el('div', 'legend-box');
    box.append(bar, ticks);
    const lines = el('div', 'legend-note');
    lines.textContent = (levels.length > 1 ? `Contours every ${num(levels[1]! - levels[0]!, 2)} ${text.unit}. ` : '') + text.key;
    L.append(box, lines);
  }

  drawMarkers(point: { x: number; y: number }, size: number, halfWidthMm: number): void {
    const g = this.overlay.querySelector('.map-markers');
    if (!this.layer || !g) return;
    g.replaceChildren();
    const toPx = (x: number, y: number): [number, number] => [
      ((x + halfWidthMm) / (2 * halfWidthMm)) * (size - 1) + 0.5,
      ((halfWidthMm - y) / (2 * halfWidthMm)) * (size - 1) + 0.5,
    ];
    const [ox, oy] = toPx(0, 0);
    g.append(svg('path', { d: `M${ox - 5} ${oy}H${ox + 5}M${ox} ${oy - 5}V${oy + 5}`, class: 'map-oc' }));
    const [px, py] = toPx(point.x, point.y);
    g.append(svg('circle', { cx: px, cy: py, r: 4, class: 'map-vp' }));
  }
}

export class MapView {
  private readonly worker: Worker;
  private readonly prism: MapCell;
  private readonly mean: MapCell;
  private readonly astig: MapCell;
  private readonly readout: HTMLElement;
  private readonly note: HTMLElement;
  private readonly status: HTMLElement;
  private nextId = 1;
  private running: MapRequest | null = null;
  private waiting: MapRequest | null = null;
  private sentAt = new Map<number, number>();
  private result: MapResult | null = null;
  private point = { x: 0, y: 0 };
  /** clicking a map asks for this visual point (lens-frame mm) */
  onPick: ((xMm: number, yMm: number) => void) | null = null;
  /** after each result: id, round trip ms (post to drawn), worker ms */
  onResult: ((id: number, roundTripMs: number, workerMs: number) => void) | null = null;
  /** results drawn so far (prism maps, power maps) */
  drawn = 0;
  powerDrawn = 0;
  /** the newest request that asked for the power maps */
  private newest = 0;
  private prismNote = '';

  constructor(host: HTMLElement) {
    this.worker = new Worker(new URL('../../worker/map.worker.ts', import.meta.url), { type: 'module' });
    this.worker.onmessage = (e: MessageEvent<MapResponse>) => this.receive(e.data);
    this.worker.onerror = (e) => { this.status.textContent = `The maps could not be computed: ${e.message}`; };
    const wrap = el('div', 'map-wrap');
    const cells = el('div', 'map-cells');
    this.prism = new MapCell(cells, 'map', 'map-valid', 'Prism map over the lens aperture; click to move the visual point', 'legend-title');
    const powerGroup = el('div', 'power-maps');
    powerGroup.setAttribute('role', 'group');
    powerGroup.setAttribute('aria-label', 'Power maps: what power the eye gets at each visual point, at the vertex sphere, distant target');
    this.mean = new MapCell(powerGroup, 'power-mean', 'power-mean-valid', 'Map of the mean power error over the lens aperture; click to move the visual point', 'power-title');
    this.astig = new MapCell(powerGroup, 'power-astig', 'power-astig-valid', 'Map of the astigmatic error over the lens aperture; click to move the visual point', 'power-title');
    cells.append(powerGroup);
    const info = el('div', 'map-info');
    this.status = el('p', 'map-status');
    this.status.setAttribute('role', 'status');
    this.readout = el('p', 'map-readout', 'Point at a map to read a value; click to move the visual point there.');
    this.note = el('p', 'map-note');
    this.note.textContent = 'Computing the maps…';
    info.append(this.status, this.readout, this.note);
    wrap.append(cells, info);
    host.append(wrap);
    for (const [cell, which] of [[this.prism, 'prism'], [this.mean, 'mean'], [this.astig, 'astigmatism']] as const) {
      cell.figure.addEventListener('click', (e) => this.click(e, cell));
      cell.figure.addEventListener('pointermove', (e) => this.hover(e, cell, which));
    }
  }

  /**
   * Ask for new maps; returns the request id. The prism map comes first; the power maps (when
   * `withPower`) follow from the same worker as a second message.
   */
  request(c: MapCase, withPower = true): number {
    const req: MapRequest = { id: this.nextId++, spec: c.spec, crMm: c.crMm, eye: c.eye, size: MAP_SIZE, quantity: c.quantity, power: withPower };
    if (withPower) this.newest = req.id;
    if (this.running) {
      this.waiting = req;
    } else {
      this.send(req);
    }
    return req.id;
  }

  setPoint(xMm: number, yMm: number): void {
    this.point = { x: xMm, y: yMm };
    const r = this.result;
    if (!r) return;
    for (const c of [this.prism, this.mean, this.astig]) c.drawMarkers(this.point, r.size, r.halfWidthMm);
  }

  setStale(stale: boolean): void {
    for (const c of [this.prism, this.mean, this.astig]) c.setStale(stale);
  }

  private send(req: MapRequest): void {
    this.running = req;
    this.sentAt.set(req.id, performance.now());
    this.worker.postMessage(req);
  }

  private receive(res: MapResponse): void {
    if (res.ok && res.kind === 'power') {
      // the second answer to a request: drawn only for the newest case
      if (res.id === this.newest) this.drawPower(res);
      return;
    }
    if (!res.ok && this.running?.id !== res.id) {
      // the power maps of a request whose prism map has come failed
      if (res.id === this.newest) this.status.textContent = `The power maps could not be computed: ${res.message}`;
      return;
    }
    const t0 = this.sentAt.get(res.id) ?? performance.now();
    this.sentAt.delete(res.id);
    this.running = null;
    const next = this.waiting;
    this.waiting = null;
    if (next) this.send(next);
    if (!res.ok) {
      this.status.textContent = `The maps could not be computed: ${res.message}`;
      return;
    }
    if (next) return; // a newer case is on its way; skip drawing this one
    this.result = res;
    this.draw(res);
    this.drawn++;
    this.onResult?.(res.id, performance.now() - t0, res.workerMs);
  }

  private draw(r: MapResult): void {
    this.prism.draw(r, r.size, prismText(r.quantity), this.point, r.halfWidthMm);
    this.status.textContent = '';
    const what = r.quantity === 'exact' ? 'exact prism' : 'Prentice error';
    const about =
      `Left: ${what}. Right: the power the eye gets at each visual point (distant target, at the vertex sphere). ` +
      `${r.size} × ${r.size} points over the ${num(2 * r.halfWidthMm, 0)} mm aperture.`;
    for (const c of [this.prism, this.mean, this.astig]) c.figure.title = about;
    this.prismNote = `${r.failedShare > 0
      ? `Hatched: ${num(100 * r.failedShare, 1)} % of the aperture has no exact answer (the ray leaves beyond the edge or cannot pass). `
      : ''}${r.size} × ${r.size} points; worker: prism ${num(r.workerMs, 0)} ms`;
    this.writeNote('');
  }

  private drawPower(p: PowerResult): void {
    this.mean.draw(p.mean, p.size, POWER_TEXT.mean, this.point, p.halfWidthMm);
    this.astig.draw(p.astigmatism, p.size, POWER_TEXT.astigmatism, this.point, p.halfWidthMm);
    this.powerDrawn++;
    this.writeNote(`, power ${num(p.workerMs, 0)} ms${p.cached ? ' (pencils reused)' : ''}`);
  }

  private writeNote(power: string): void {
    this.note.textContent = `${this.prismNote}${power}.`;
    this.note.title = this.note.textContent;
  }

  private toMm(e: MouseEvent, cell: MapCell): { x: number; y: number } | null {
    const r = this.result;
    if (!r) return null;
    const rect = cell.canvas.getBoundingClientRect();
    const fx = (e.clientX - rect.left) / rect.width, fy = (e.clientY - rect.top) / rect.height;
    return { x: -r.halfWidthMm + 2 * r.halfWidthMm * fx, y: r.halfWidthMm - 2 * r.halfWidthMm * fy };
  }

  private click(e: MouseEvent, cell: MapCell): void {
    const p = this.toMm(e, cell);
    const r = this.result;
    if (!p || !r) return;
    if (Math.hypot(p.x, p.y) > r.halfWidthMm) return;
    this.onPick?.(Math.round(p.x * 10) / 10 + 0, Math.round(p.y * 10) / 10 + 0);
  }

  private hover(e: PointerEvent, cell: MapCell, which: 'prism' | 'mean' | 'astigmatism'): void {
    const p = this.toMm(e, cell);
    const r = this.result;
    const layer = cell.layer, text = cell.text;
    if (!p || !r || !layer || !text) return;
    if (Math.hypot(p.x, p.y) > r.halfWidthMm) {
      this.readout.textContent = 'Outside the lens.';
      return;
    }
    const col = Math.round(((p.x + r.halfWidthMm) / (2 * r.halfWidthMm)) * (r.size - 1));
    const row = Math.round(((r.halfWidthMm - p.y) / (2 * r.halfWidthMm)) * (r.size - 1));
    const v = layer.values[row * r.size + col];
    const at = `x ${num(p.x, 1)} mm, y ${num(p.y, 1)} mm`;
    const name = which === 'prism' ? (r.quantity === 'exact' ? 'exact prism' : 'Prentice error') : which === 'mean' ? 'mean error' : 'astigmatic error';
    if (v === undefined || !Number.isFinite(v)) {
      this.readout.textContent = `${at}: no value here (${text.none}).`;
    } else {
      this.readout.textContent = `${at}: ${name} ${num(v, text.decimals)} ${text.unit}`;
    }
  }

  dispose(): void {
    this.worker.terminate();
  }
}
