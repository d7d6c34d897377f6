/**
 * The 2-D cross-section (SVG): the lens, the eye and the rays in the plane that holds the
 * optical axis and the visual point, at true scale, with dimensions. The lens outline comes
 * from the engine's surfaces (Surface.pointAt) and the rays from the same paths as the 3-D
 * scene (scene/rayPaths.ts). Eye side on the left, object side on the right.
 */
import { Hit, type Lens } from '../../optics/index.ts';
import { GLOBE_RADIUS_MM } from '../../scene/eyeModel.ts';
import type { RayPaths } from '../../scene/rayPaths.ts';
import { num } from '../format.ts';
import { svg } from '../resultsPane.ts';

const SAMPLES = 121;
const OBJECT_SHOWN_MM = 38;
const _hit = new Hit();

export interface SectionInput {
  lens: Lens;
  crMm: number;
  directionDeg: number;
  decentrationMm: number;
  paths: RayPaths;
  mag: number;
}

export class CrossSection {
  readonly root: SVGSVGElement;
  private last: SectionInput | null = null;
  private readonly resizeObserver: ResizeObserver;
  private readonly host: HTMLElement;
  /** the host's size, kept by the observer so drawing never forces a layout */
  private size = { w: 0, h: 0 };

  constructor(host: HTMLElement) {
    this.host = host;
    this.root = svg('svg', { class: 'section-svg', role: 'img' });
    this.root.setAttribute('aria-label', 'Cross-section of the lens and the line of sight, with dimensions');
    host.append(this.root);
    this.resizeObserver = new ResizeObserver((entries) => {
      const r = entries[entries.length - 1]!.contentRect;
      if (r.width === this.size.w && r.height === this.size.h) return;
      this.size = { w: r.width, h: r.height };
      if (this.last && r.width > 0) this.draw(this.last);
    });
    this.resizeObserver.observe(host);
  }

  draw(inp: SectionInput): void {
    this.last = inp;
    if (this.size.w === 0) this.size = { w: this.host.clientWidth, h: this.host.clientHeight };
    const W = Math.max(240, this.size.w), H = Math.max(160, this.size.h);
    const g = this.root;
    g.setAttribute('viewBox', `0 0 ${W} ${H}`);
    g.setAttribute('width', String(W));
    g.setAttribute('height', String(H));
    g.replaceChildren();
    const { lens, crMm, paths } = inp;
    const R = lens.radiusMm;
    const a = (inp.directionDeg * Math.PI) / 180;
    const ux = Math.cos(a), uy = Math.sin(a);
    // section coordinates: z (along the axis) to the right, s (along u, towards the visual point) up
    const zMin = -crMm - GLOBE_RADIUS_MM - 2, zMax = lens.ctMm + OBJECT_SHOWN_MM;
    const sMin = -R - 3, sMax = R + 9;
    const side = W >= 520 ? 216 : 0; // a column for the key and the dimension list
    const pad = { l: 8, r: 8 + side, t: 22, b: 6 };
    const k = Math.min((W - pad.l - pad.r) / (zMax - zMin), (H - pad.t - pad.b) / (sMax - sMin));
    const ox = pad.l + ((W - pad.l - pad.r) - k * (zMax - zMin)) / 2;
    const oy = pad.t + ((H - pad.t - pad.b) - k * (sMax - sMin)) / 2;
    const X = (z: number): number => ox + (z - zMin) * k;
    const Y = (s: number): number => oy + (sMax - s) * k;
    const proj = (p: ArrayLike<number>, i: number): [number, number] => [X(p[3 * i + 2]!), Y(p[3 * i]! * ux + p[3 * i + 1]! * uy)];

    const defs = svg('defs', {});
    defs.append(arrowMarker('dim-arrow', '#52606d'));
    const clip = svg('clipPath', { id: 'section-clip' });
    clip.append(svg('rect', { x: 0, y: 22, width: W - side, height: H - 22 }));
    defs.append(clip);
    g.append(defs);
    g.append(svg('text', { x: 10, y: 15, class: 'sec-title' }, `Section through the axis and the visual point (${num(inp.directionDeg, 1)}°), true scale`));

    // optical axis
    g.append(svg('line', { x1: X(zMin), y1: Y(0), x2: X(zMax), y2: Y(0), class: 'sec-axis' }));

    // eye: globe and CR
    const t = paths.exact;
    g.append(svg('circle', { cx: X(-crMm), cy: Y(0), r: GLOBE_RADIUS_MM * k, class: 'sec-eye' }));
    g.append(svg('circle', { cx: X(-crMm), cy: Y(0), r: 2.6, class: 'sec-cr' }));
    g.append(svg('text', { x: X(-crMm), y: Y(0) + 14, class: 'sec-label', 'text-anchor': 'middle' }, 'CR'));

    // lens outline from the real surfaces
    const front: string[] = [], back: string[] = [];
    for (let i = 0; i < SAMPLES; i++) {
      const s = -R + (2 * R * i) / (SAMPLES - 1);
      const fz = lens.front.pointAt(s * ux, s * uy, _hit) ? _hit.z : lens.ctMm;
      front.push(`${X(fz).toFixed(2)},${Y(s).toFixed(2)}`);
      const bz = lens.back.pointAt(s * ux, s * uy, _hit) ? _hit.z : 0;
      back.push(`${X(bz).toFixed(2)},${Y(s).toFixed(2)}`);
    }
    g.append(svg('polygon', { points: [...front, ...back.reverse()].join(' '), class: 'sec-lens' }));

    // rays (clipped to the drawing)
    const rays = svg('g', { 'clip-path': 'url(#section-clip)' });
    const line = (p: ArrayLike<number>, n: number, cls: string): void => {
      const pts: string[] = [];
      for (let i = 0; i < n; i++) pts.push(proj(p, i).map((v) => v.toFixed(2)).join(','));
      rays.append(svg('polyline', { points: pts.join(' '), class: cls }));
    };
    line(paths.undeviated, 2, 'sec-ray sec-undeviated');
    line(paths.prentice, 2, 'sec-ray sec-prentice');
    line(paths.paraxial, 2, 'sec-ray sec-paraxial');
    line(t, paths.exactCount, 'sec-ray sec-exact');
    g.append(rays);

    // dimensions: centre thickness above the lens, CR distance below the eye
    const edges: number[] = [];
    for (const sd of [1, -1]) {
      const s = sd * R;
      const bz = lens.back.pointAt(s * ux, s * uy, _hit) ? _hit.z : 0;
      const fz = lens.front.pointAt(s * ux, s * uy, _hit) ? _hit.z : lens.ctMm;
      edges.push(fz - bz);
    }
    dimH(g, X(0), X(lens.ctMm), Y(R + 5), Y(0), `t ${num(lens.ctMm, 2)} mm`);
    dimH(g, X(-crMm), X(0), Y(-GLOBE_RADIUS_MM - 4), Y(0), `${num(crMm, 1)} mm`, true);
    // decentration: from the axis up to the visual point, just behind the lens
    const zc = Math.min(t[5]!, 0) - 3;
    if (inp.decentrationMm > 0.05) dimV(g, X(zc), Y(0), Y(inp.decentrationMm), `c ${num(inp.decentrationMm, 1)} mm`);

    // OC, visual point and exit point
    g.append(svg('circle', { cx: X(0), cy: Y(0), r: 3, class: 'sec-oc' }));
    g.append(svg('text', { x: X(0) + 5, y: Y(0) + 13, class: 'sec-label' }, 'OC'));
    const [vx, vy] = proj(t, 1);
    g.append(svg('circle', { cx: vx, cy: vy, r: 3.4, class: 'sec-vp' }));
    let sF = NaN;
    if (paths.exactCount === 4) {
      const [fx, fy] = proj(t, 2);
      sF = t[6]! * ux + t[7]! * uy;
      g.append(svg('circle', { cx: fx, cy: fy, r: 2.4, class: 'sec-exit' }));
    }

    // key and dimension list
    if (side) {
      const x0 = W - side + 6;
      let y = 34;
      const keyItems: [string, string][] = [
        ['sec-exact', 'exact line of sight'], ['sec-prentice', 'Prentice, predicted'],
        ['sec-paraxial', 'first-order, predicted'], ['sec-undeviated', 'no lens'],
      ];
      for (const [cls, name] of keyItems) {
        g.append(svg('line', { x1: x0, y1: y - 4, x2: x0 + 22, y2: y - 4, class: `sec-ray ${cls}` }));
        g.append(svg('text', { x: x0 + 28, y, class: 'sec-note' }, name));
        y += 16;
      }
      y += 6;
      const rows: [string, string][] = [
        ['centre thickness t', `${num(lens.ctMm, 2)} mm`],
        ['edges in this section', `${num(edges[0]!, 2)}, ${num(edges[1]!, 2)} mm`],
        ['decentration c', `${num(inp.decentrationMm, 1)} mm`],
        ['ray exits front at', Number.isFinite(sF) ? `${num(sF, 1)} mm` : 'no exit'],
        ['back vertex to CR', `${num(crMm, 1)} mm`],
      ];
      for (const [name, v] of rows) {
        g.append(svg('text', { x: x0, y, class: 'sec-note' }, name));
        g.append(svg('text', { x: W - 8, y, class: 'sec-dim-text', 'text-anchor': 'end' }, v));
        y += 16;
      }
      if (inp.mag !== 1) {
        g.append(svg('text', { x: x0, y: y + 6, class: 'sec-mag' }, `angles from exact ×${inp.mag}`));
      }
    } else if (inp.mag !== 1) {
      g.append(svg('text', { x: 10, y: H - 8, class: 'sec-mag' }, `Angles from the exact ray drawn ×${inp.mag}`));
    }
  }

  dispose(): void {
    this.resizeObserver.disconnect();
    this.root.remove();
  }
}

function arrowMarker(id: string, color: string): SVGMarkerElement {
  const m = svg('marker', { id, viewBox: '0 0 10 10', refX: 9, refY: 5, markerWidth: 7, markerHeight: 7, orient: 'auto-start-reverse' });
  m.append(svg('path', { d: 'M0,1 L9,5 L0,9 z', fill: color }));
  return m;
}

/** Horizontal dimension between x1 and x2 at height y, with extension lines up to yRef. */
function dimH(g: SVGElement, x1: number, x2: number, y: number, yRef: number, label: string, textBelow = false): void {
  const over = y < yRef ? -3 : 3;
  g.append(svg('line', { x1, y1: yRef, x2: x1, y2: y + over, class: 'sec-ext' }));
  g.append(svg('line', { x1: x2, y1: yRef, x2, y2: y + over, class: 'sec-ext' }));
  g.append(svg('line', { x1, y1: y, x2, y2: y, class: 'sec-dim', 'marker-start': 'url(#dim-arrow)', 'marker-end': 'url(#dim-arrow)' }));
  const narrow = Math.abs(x2 - x1) < label.length * 6.5;
  const tx = narrow ? Math.max(x1, x2) + 6 : (x1 + x2) / 2;
  g.append(svg('text', {
    x: tx, y: textBelow ? y + 13 : y - 4, class: 'sec-dim-text', 'text-anchor': narrow ? 'start' : 'middle',
  }, label));
}

function dimV(g: SVGElement, x: number, y1: number, y2: number, label: string): void {
  g.append(svg('line', { x1: x, y1, x2: x, y2, class: 'sec-dim', 'marker-start': 'url(#dim-arrow)', 'marker-end': 'url(#dim-arrow)' }));
  g.append(svg('text', { x: x - 5, y: (y1 + y2) / 2 + 4, class: 'sec-dim-text', 'text-anchor': 'end' }, label));
}

