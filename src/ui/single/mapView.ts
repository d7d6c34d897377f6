/**
 * The prism map over the lens aperture: exact prism (Δ) or Prentice error (%), as a colour
 * map with contour lines and a legend. The work is done in a module worker
 * (worker/map.worker.ts); only the newest case is computed (a request made while one is
 * running waits and replaces any older waiting one). Clicking the map moves the visual point.
 */
import type { Eye, LensSpec } from '../../optics/index.ts';
import { cssColourAt } from '../../worker/colourScale.ts';
import type { MapQuantity, MapRequest, MapResponse, MapResult } from '../../worker/mapProtocol.ts';
import { num } from '../format.ts';
import { svg } from '../resultsPane.ts';

export const MAP_SIZE = 201;

export interface MapCase {
  spec: LensSpec;
  crMm: number;
  eye: Eye;
  quantity: MapQuantity;
}

export class MapView {
  private readonly worker: Worker;
  private readonly figure: HTMLElement;
  private readonly canvas: HTMLCanvasElement;
  private readonly overlay: SVGSVGElement;
  private readonly legend: HTMLElement;
  private readonly readout: HTMLElement;
  private readonly note: HTMLElement;
  private readonly status: HTMLElement;
  private nextId = 1;
  private running: MapRequest | null = null;
  private waiting: MapRequest | null = null;
  private sentAt = new Map<number, number>();
  private result: MapResult | null = null;
  private point = { x: 0, y: 0 };
  /** clicking the map asks for this visual point (lens-frame mm) */
  onPick: ((xMm: number, yMm: number) => void) | null = null;
  /** after each result: id, round trip ms (post to drawn), worker ms */
  onResult: ((id: number, roundTripMs: number, workerMs: number) => void) | null = null;
  /** results drawn so far */
  drawn = 0;

  constructor(host: HTMLElement) {
    this.worker = new Worker(new URL('../../worker/map.worker.ts', import.meta.url), { type: 'module' });
    this.worker.onmessage = (e: MessageEvent<MapResponse>) => this.receive(e.data);
    this.worker.onerror = (e) => { this.status.textContent = `The map could not be computed: ${e.message}`; };
    const wrap = document.createElement('div');
    wrap.className = 'map-wrap';
    this.figure = document.createElement('div');
    this.figure.className = 'map-figure';
    this.canvas = document.createElement('canvas');
    this.canvas.width = MAP_SIZE;
    this.canvas.height = MAP_SIZE;
    this.canvas.className = 'map-canvas';
    this.overlay = svg('svg', { class: 'map-overlay', viewBox: `0 0 ${MAP_SIZE} ${MAP_SIZE}`, preserveAspectRatio: 'none' });
    this.figure.append(this.canvas, this.overlay);
    this.figure.tabIndex = 0;
    this.figure.setAttribute('role', 'img');
    this.figure.setAttribute('aria-label', 'Prism map over the lens aperture; click to move the visual point');
    const side = document.createElement('div');
    side.className = 'map-side';
    this.status = document.createElement('p');
    this.status.className = 'map-status';
    this.status.textContent = 'Computing the map…';
    this.legend = document.createElement('div');
    this.legend.className = 'map-legend';
    this.readout = document.createElement('p');
    this.readout.className = 'map-readout';
    this.readout.textContent = 'Point at the map to read a value; click to move the visual point there.';
    this.note = document.createElement('p');
    this.note.className = 'map-note';
    side.append(this.status, this.legend, this.readout, this.note);
    wrap.append(this.figure, side);
    host.append(wrap);
    this.figure.addEventListener('click', (e) => this.click(e));
    this.figure.addEventListener('pointermove', (e) => this.hover(e));
  }

  /** Ask for a new map; returns the request id. */
  request(c: MapCase): number {
    const req: MapRequest = { id: this.nextId++, spec: c.spec, crMm: c.crMm, eye: c.eye, size: MAP_SIZE, quantity: c.quantity };
    if (this.running) {
      this.waiting = req;
    } else {
      this.send(req);
    }
    return req.id;
  }

  setPoint(xMm: number, yMm: number): void {
    this.point = { x: xMm, y: yMm };
    this.drawMarkers();
  }

  setStale(stale: boolean): void {
    this.figure.classList.toggle('stale', stale);
  }

  private send(req: MapRequest): void {
    this.running = req;
    this.sentAt.set(req.id, performance.now());
    this.worker.postMessage(req);
  }

  private receive(res: MapResponse): void {
    const t0 = this.sentAt.get(res.id) ?? performance.now();
    this.sentAt.delete(res.id);
    this.running = null;
    const next = this.waiting;
    this.waiting = null;
    if (next) this.send(next);
    if (!res.ok) {
      this.status.textContent = `The map could not be computed: ${res.message}`;
      return;
    }
    if (next) return; // a newer case is on its way; skip drawing this one
    this.result = res;
    this.draw(res);
    this.drawn++;
    this.onResult?.(res.id, performance.now() - t0, res.workerMs);
  }

  private draw(r: MapResult): void {
    const ctx = this.canvas.getContext('2d')!;
    ctx.putImageData(new ImageData(r.rgba as Uint8ClampedArray<ArrayBuffer>, r.size, r.size), 0, 0);
    const o = this.overlay;
    o.replaceChildren();
    const defs = svg('defs', {});
    const clip = svg('clipPath', { id: 'map-valid' });
    clip.append(svg('path', { d: r.validPath }));
    defs.append(clip);
    o.append(defs);
    const g = svg('g', { 'clip-path': 'url(#map-valid)', class: 'map-contours' });
    for (const c of r.contours) {
      const p = svg('path', { d: c.d, class: c.level === 0 ? 'contour zero' : 'contour' });
      const t = svg('title');
      t.textContent = `${num(c.level, 2)} ${r.quantity === 'exact' ? 'Δ' : '%'}`;
      p.append(t);
      g.append(p);
    }
    o.append(g);
    const c = (r.size - 1) / 2 + 0.5;
    o.append(svg('circle', { cx: c, cy: c, r: c - 0.5, class: 'map-rim' }));
    o.append(svg('g', { class: 'map-markers' }));
    this.drawMarkers();
    this.drawLegend(r);
    const what = r.quantity === 'exact' ? 'Exact prism at each visual point' : 'Prentice error, % of the exact prism';
    this.status.textContent = `${what} (${r.size} × ${r.size} points over the ${num(2 * r.halfWidthMm, 0)} mm aperture).`;
    const failed = r.failedShare > 0
      ? `Hatched: ${num(100 * r.failedShare, 1)} % of the aperture has no exact answer (the ray leaves beyond the edge or cannot pass). `
      : '';
    this.note.textContent = `${failed}Computed in a worker in ${num(r.workerMs, 1)} ms.`;
    this.figure.dataset.ready = 'true';
  }

  private drawLegend(r: MapResult): void {
    const unit = r.quantity === 'exact' ? 'Δ' : '%';
    const kind = r.quantity === 'exact' ? 'sequential' : 'diverging';
    const stops: string[] = [];
    for (let i = 0; i <= 10; i++) stops.push(`${cssColourAt(kind, r.tLo + (i / 10) * (r.tHi - r.tLo))} ${i * 10}%`);
    const L = this.legend;
    L.replaceChildren();
    const title = document.createElement('div');
    title.className = 'legend-title';
    title.textContent = r.quantity === 'exact' ? 'Exact prism (Δ)' : 'Prentice error (%)';
    const bar = document.createElement('div');
    bar.className = 'legend-bar';
    bar.style.background = `linear-gradient(to top, ${stops.join(', ')})`;
    const ticks = document.createElement('div');
    ticks.className = 'legend-ticks';
    const levels = r.contours.map((c) => c.level).filter((v, i, a) => a.indexOf(v) === i);
    // the ends of the scale, unless a contour level sits close enough to crowd them
    const span = r.hi - r.lo;
    const far = (v: number): boolean => levels.every((l) => Math.abs(l - v) > 0.09 * span);
    const marks = [...(far(r.lo) ? [r.lo] : []), ...levels, ...(far(r.hi) ? [r.hi] : [])];
    for (const v of marks) {
      const t = document.createElement('span');
      t.style.bottom = `${(100 * (v - r.lo)) / (r.hi - r.lo)}%`;
      t.textContent = `${num(v, Math.abs(r.hi - r.lo) < 5 ? 2 : 1).replace('-', '−')} ${unit}`;
      ticks.append(t);
    }
    const box = document.createElement('div');
    box.className = 'legend-box';
    box.append(bar, ticks);
    const lines = document.createElement('div');
    lines.className = 'legend-note';
    lines.textContent = levels.length > 1 ? `Contours every ${num(levels[1]! - levels[0]!, 2)} ${unit}.` : '';
    if (r.quantity === 'error') lines.textContent += ' Blue: Prentice’s rule under-states the prism; red: over-states.';
    L.append(title, box, lines);
  }

  private drawMarkers(): void {
    const r = this.result;
    const g = this.overlay.querySelector('.map-markers');
    if (!r || !g) return;
    g.replaceChildren();
    const toPx = (x: number, y: number): [number, number] => [
      ((x + r.halfWidthMm) / (2 * r.halfWidthMm)) * (r.size - 1) + 0.5,
      ((r.halfWidthMm - y) / (2 * r.halfWidthMm)) * (r.size - 1) + 0.5,
    ];
    const [ox, oy] = toPx(0, 0);
    g.append(svg('path', { d: `M${ox - 5} ${oy}H${ox + 5}M${ox} ${oy - 5}V${oy + 5}`, class: 'map-oc' }));
    const [px, py] = toPx(this.point.x, this.point.y);
    g.append(svg('circle', { cx: px, cy: py, r: 4, class: 'map-vp' }));
  }

  private toMm(e: MouseEvent): { x: number; y: number } | null {
    const r = this.result;
    if (!r) return null;
    const rect = this.canvas.getBoundingClientRect();
    const fx = (e.clientX - rect.left) / rect.width, fy = (e.clientY - rect.top) / rect.height;
    return { x: -r.halfWidthMm + 2 * r.halfWidthMm * fx, y: r.halfWidthMm - 2 * r.halfWidthMm * fy };
  }

  private click(e: MouseEvent): void {
    const p = this.toMm(e);
    const r = this.result;
    if (!p || !r) return;
    if (Math.hypot(p.x, p.y) > r.halfWidthMm) return;
    this.onPick?.(Math.round(p.x * 10) / 10 + 0, Math.round(p.y * 10) / 10 + 0);
  }

  private hover(e: PointerEvent): void {
    const p = this.toMm(e);
    const r = this.result;
    if (!p || !r) return;
    if (Math.hypot(p.x, p.y) > r.halfWidthMm) {
      this.readout.textContent = 'Outside the lens.';
      return;
    }
    const col = Math.round(((p.x + r.halfWidthMm) / (2 * r.halfWidthMm)) * (r.size - 1));
    const row = Math.round(((r.halfWidthMm - p.y) / (2 * r.halfWidthMm)) * (r.size - 1));
    const v = r.values[row * r.size + col];
    const at = `x ${num(p.x, 1)} mm, y ${num(p.y, 1)} mm`;
    if (v === undefined || !Number.isFinite(v)) {
      this.readout.textContent = `${at}: no value here (no exact answer${r.quantity === 'error' ? ', or zero prism at the OC' : ''}).`;
    } else {
      this.readout.textContent = `${at}: ${num(v, r.quantity === 'exact' ? 2 : 1)} ${r.quantity === 'exact' ? 'Δ' : '%'}`;
    }
  }

  dispose(): void {
    this.worker.terminate();
  }
}
