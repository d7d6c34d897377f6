/**
 * The printed plot of prism against decentration for one eye (inline SVG): the four answers
 * along the direction of the eye's visual point, from the engine's prismProfile, with the
 * case's own values at its visual point as dots. Scales, ticks and paths come from d3-scale
 * and d3-shape.
 */
import { scaleLinear } from 'd3-scale';
import { line } from 'd3-shape';
import { type EyeResult, type Lens, isFailure, prismProfile } from '../optics/index.ts';
import { type Markup, coord, fmt, html } from './html.ts';

export const PLOT_W = 212;
export const PLOT_H = 130;
const W = PLOT_W;
const H = PLOT_H;
const STEPS = 80;

/** The four curves: key, label, css class (colour and dash, so the print is readable in grey). */
export const CURVES = [
  { key: 'prentice', label: "Prentice's rule", cls: 'c-prentice' },
  { key: 'paraxial', label: 'first-order', cls: 'c-paraxial' },
  { key: 'exact', label: 'exact (line of sight)', cls: 'c-exact' },
  { key: 'focimeter', label: 'focimeter reading', cls: 'c-focimeter' },
] as const;

/** Range of the plot, mm: a little beyond the visual point, at least 15 mm, within the lens. */
export function plotRangeMm(lens: Lens, decentrationMm: number): number {
  const wanted = Math.max(15, Math.ceil((1.6 * decentrationMm) / 5) * 5);
  const edge = Number.isFinite(lens.radiusMm) ? lens.radiusMm : lens.solidRadiusMm;
  return Math.max(2, Math.min(wanted, edge));
}

export interface PlotOptions {
  id: string;
  eyeName: string;
  lens: Lens;
  result: EyeResult;
  crMm: number;
  /** direction of the plot in the lens frame, degrees, and its words ("down, nose side") */
  directionDeg: number;
  directionWords: string;
}

export function profilePlotSvg(o: PlotOptions): Markup {
  const r = o.result;
  const a = r.answers;
  const c = Math.hypot(r.fromOcMm.x, r.fromOcMm.y);
  if (!a || r.fixation.status !== 'ok') {
    return html`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${coord(W)} ${coord(H)}" class="fig" role="img" aria-label="${o.eyeName}: no plot">
<text class="fig-title" x="1" y="9">${o.eyeName} lens: prism against decentration</text>
<text class="warn" x="${coord(W / 2)}" y="${coord(H / 2)}" text-anchor="middle">not drawn: no line of sight</text>
</svg>`;
  }
  const maxMm = plotRangeMm(o.lens, c);
  const prof = prismProfile(o.lens, o.crMm, o.directionDeg, maxMm, STEPS);
  const here = {
    prentice: a.prentice.magnitude,
    paraxial: a.paraxial.magnitude,
    exact: isFailure(a.exact) ? NaN : a.exact.magnitude,
    focimeter: isFailure(a.focimeter) ? NaN : a.focimeter.magnitude,
  };
  let top = 0;
  for (const cv of CURVES) {
    for (const v of prof[cv.key]) if (Number.isFinite(v) && v > top) top = v;
    if (Number.isFinite(here[cv.key]) && here[cv.key] > top) top = here[cv.key];
  }
  const m = { l: 30, r: 6, t: 26, b: 22 };
  const x = scaleLinear().domain([0, maxMm]).range([m.l, W - m.r]);
  const y = scaleLinear().domain([0, Math.max(top * 1.05, 0.5)]).range([H - m.b, m.t]).nice();
  const xs = x.ticks(5), ys = y.ticks(5);
  const xf = x.tickFormat(5), yf = y.tickFormat(5);
  type P = { d: number; v: number };
  const path = line<P>().x((p) => x(p.d)).y((p) => y(p.v)).defined((p) => Number.isFinite(p.v)).digits(2);
  const paths = CURVES.map((cv) => {
    const pts: P[] = Array.from(prof.decentrationMm, (d, i) => ({ d, v: prof[cv.key][i]! }));
    const d = path(pts) ?? '';
    return d ? html`<path class="${cv.cls}" d="${d}"/>` : '';
  });
  const clip = `${o.id}-clip`;
  const x0 = x.range()[0]!, x1 = x.range()[1]!, y0 = y.range()[0]!, y1 = y.range()[1]!;
  const dots = CURVES.map((cv) =>
    Number.isFinite(here[cv.key]) && here[cv.key] <= y.domain()[1]! ? html`<circle class="dot ${cv.cls}" cx="${coord(x(c))}" cy="${coord(y(here[cv.key]))}" r="2.4"/>` : '');
  const exactHere = here.exact;
  // the case's label on the roomier side of its line (the curves' key is the prism table's)
  const hereLeft = x1 - x(c) < 62;
  return html`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${coord(W)} ${coord(H)}" class="fig" role="img" aria-label="${o.eyeName}: prism against decentration, four answers">
<defs><clipPath id="${clip}"><rect x="${coord(x0)}" y="${coord(y1)}" width="${coord(x1 - x0)}" height="${coord(y0 - y1)}"/></clipPath></defs>
<text class="fig-title" x="1" y="9">${o.eyeName} lens: prism against decentration</text>
<text class="end" x="1" y="19">from the OC through the VP${o.directionWords ? ` (${o.directionWords})` : ''}</text>
${ys.map((v) => html`<line class="grid" x1="${coord(x0)}" y1="${coord(y(v))}" x2="${coord(x1)}" y2="${coord(y(v))}"/><text class="tick" x="${coord(x0 - 4)}" y="${coord(y(v) + 3)}" text-anchor="end">${yf(v)}</text>`)}
${xs.map((v) => html`<line class="grid" x1="${coord(x(v))}" y1="${coord(y0)}" x2="${coord(x(v))}" y2="${coord(y1)}"/><text class="tick" x="${coord(x(v))}" y="${coord(y0 + 11)}" text-anchor="middle">${xf(v)}</text>`)}
<line class="frame" x1="${coord(x0)}" y1="${coord(y0)}" x2="${coord(x1)}" y2="${coord(y0)}"/>
<line class="frame" x1="${coord(x0)}" y1="${coord(y0)}" x2="${coord(x0)}" y2="${coord(y1)}"/>
<text class="tick" x="${coord((x0 + x1) / 2)}" y="${coord(H - 1)}" text-anchor="middle">distance from the optical centre, mm</text>
<text class="tick" transform="translate(7 ${coord((y0 + y1) / 2)}) rotate(-90)" text-anchor="middle">prism, Δ</text>
<g clip-path="url(#${clip})">${paths}</g>
<line class="here" x1="${coord(x(c))}" y1="${coord(y0)}" x2="${coord(x(c))}" y2="${coord(y1)}"/>
${dots}
<text class="tick" x="${coord(x(c) + (hereLeft ? -3 : 3))}" y="${coord(y0 - 4)}" text-anchor="${hereLeft ? 'end' : 'start'}">VP: ${fmt(exactHere, 2)} Δ exact</text>
</svg>`;
}
