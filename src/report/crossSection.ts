/**
 * The printed cross-section of one lens with the eye's line of sight (inline SVG, true scale).
 *
 * Everything drawn comes from the engine: the lens outline from the lens's own surfaces
 * (Surface.sagAt: a surface point at transverse (x, y) sits at z = vertexZ - sag, the back
 * surface's vertex at z = 0, the front's at z = ct), and the line of sight from the solved
 * fixation's trace (lens frame: centre of rotation S, visual point B on the back surface,
 * exit point F on the front, reverse directions a (eye side) and o (object side)).
 *
 * The section is the plane through the lens axis and the visual point; points off that plane
 * (e.g. a centre of rotation off the axis in a tilted fit) are projected onto it. The z axis
 * (eye to object) runs left to right, the section direction bottom to top, both at the same
 * scale.
 */
import { type EyeResult, type Lens, SagEval } from '../optics/index.ts';
import { type Markup, coord, html } from './html.ts';

/** Eye globe radius drawn around the centre of rotation, mm (a schematic eye; common practice, no source). */
const EYE_RADIUS_MM = 12;
/** How much of the object side is drawn beyond the front vertex, mm. */
const OBJECT_SIDE_MM = 16;
/** Half-width drawn when the lens has no diameter, at least, mm. */
const MIN_HALF_WIDTH_MM = 20;
const SAMPLES = 97;
export const SECTION_W = 150;
export const SECTION_H = 130;
const W = SECTION_W;
const H = SECTION_H;

const _sag = new SagEval();

export interface SectionDirection {
  /** unit direction of the section's upward axis in the lens frame */
  ux: number;
  uy: number;
  /** words for the top and bottom ends of the drawing */
  top: string;
  bottom: string;
}

/**
 * The section's upward direction: through the visual point; pointed up when the section is
 * closer to vertical, towards the nose when closer to horizontal.
 */
export function sectionDirection(cx: number, cy: number, eye: 'R' | 'L'): SectionDirection {
  const len = Math.hypot(cx, cy);
  let ux = len > 0.05 ? cx / len : 0;
  let uy = len > 0.05 ? cy / len : 1;
  const nasalSign = eye === 'R' ? 1 : -1; // +x is towards the wearer's left: nasal for the right eye
  const flip = Math.abs(uy) >= Math.abs(ux) ? uy < 0 : ux * nasalSign < 0;
  if (flip) { ux = -ux; uy = -uy; }
  return { ux, uy, top: directionWords(ux, uy, eye), bottom: directionWords(-ux, -uy, eye) };
}

/** Words for a direction on the lens (unit x, y; x towards the wearer's left): "down, nose side". */
export function directionWords(x: number, y: number, eye: 'R' | 'L'): string {
  const parts: string[] = [];
  if (y > 0.38) parts.push('up'); else if (y < -0.38) parts.push('down');
  const n = eye === 'R' ? x : -x;
  if (n > 0.38) parts.push('nose side'); else if (n < -0.38) parts.push('temple side');
  return parts.join(', ');
}

/** Half-width of the lens drawn, mm: its edge, or (no diameter given) enough around the visual point. */
export function drawnHalfWidthMm(lens: Lens, decentrationMm: number): number {
  if (Number.isFinite(lens.radiusMm)) return lens.radiusMm;
  const wanted = Math.max(MIN_HALF_WIDTH_MM, Math.ceil((Math.abs(decentrationMm) + 8) / 5) * 5);
  return Math.max(1, Math.min(wanted, lens.solidRadiusMm));
}

export interface SectionOptions {
  id: string;
  eyeName: string;
  lens: Lens;
  result: EyeResult;
  /** back vertex to centre of rotation, mm (for the case without a line of sight) */
  crMm: number;
}

export function crossSectionSvg(o: SectionOptions): Markup {
  const { lens, result } = o;
  const ok = result.fixation.status === 'ok' && result.answers !== null;
  const t = result.fixation.trace;
  const dir = ok ? sectionDirection(t.bx, t.by, result.eye) : sectionDirection(0, 0, result.eye);
  const { ux, uy } = dir;
  const sOf = (x: number, y: number): number => x * ux + y * uy;
  const half = drawnHalfWidthMm(lens, ok ? Math.hypot(t.bx, t.by) : 0);

  // lens outline from the surfaces, where both exist
  const front: [number, number][] = [];
  const back: [number, number][] = [];
  for (let i = 0; i < SAMPLES; i++) {
    const s = -half + (2 * half * i) / (SAMPLES - 1);
    if (!lens.back.sagAt(s * ux, s * uy, _sag)) continue;
    const zb = lens.back.vertexZ - _sag.sag;
    if (!lens.front.sagAt(s * ux, s * uy, _sag)) continue;
    const zf = lens.front.vertexZ - _sag.sag;
    if (!(zf > zb)) continue;
    back.push([zb, s]);
    front.push([zf, s]);
  }

  // extent (mm): eye globe on the left, a stretch of object space on the right
  const crZ = ok ? t.sz : -o.crMm;
  const crS = ok ? sOf(t.sx, t.sy) : 0;
  let zMax = lens.ctMm + OBJECT_SIDE_MM;
  for (const p of front) zMax = Math.max(zMax, p[0] + 6);
  const zMin = crZ - EYE_RADIUS_MM - 1;
  const sMin = Math.min(-half, crS - EYE_RADIUS_MM) - 1.5;
  const sMax = Math.max(half, crS + EYE_RADIUS_MM) + 1.5;
  const box = { l: 2, r: W - 2, t: 22, b: H - 14 };
  const k = Math.min((box.r - box.l) / (zMax - zMin), (box.b - box.t) / (sMax - sMin));
  const ox = box.l + (box.r - box.l - k * (zMax - zMin)) / 2;
  const oy = box.t + (box.b - box.t - k * (sMax - sMin)) / 2;
  const X = (z: number): number => ox + (z - zMin) * k;
  const Y = (s: number): number => oy + (sMax - s) * k;
  const pt = (z: number, s: number): string => `${coord(X(z))},${coord(Y(s))}`;
  const clip = `${o.id}-clip`;

  const outline = front.length > 1
    ? html`<polygon class="lens" points="${[...front, ...back.slice().reverse()].map(([z, s]) => pt(z, s)).join(' ')}"/>`
    : html`<text class="warn" x="${coord(W / 2)}" y="${coord(H / 2)}" text-anchor="middle">lens outline not available</text>`;

  let rays: Markup | string = '';
  let marks: Markup | string = '';
  const vpBelow = ok && sOf(t.bx, t.by) < 0;
  if (ok) {
    const sB = sOf(t.bx, t.by), sF = sOf(t.fx, t.fy), sS = crS;
    const L = (zMax - t.fz) / t.oz;
    const zEnd = t.fz + L * t.oz, sEnd = sOf(t.fx + L * t.ox, t.fy + L * t.oy);
    const Ls = (zMax - t.bz) / t.az;
    const zStraight = t.bz + Ls * t.az, sStraight = sOf(t.bx + Ls * t.ax, t.by + Ls * t.ay);
    rays = html`<g clip-path="url(#${clip})">
<line class="ray-none" x1="${coord(X(t.bz))}" y1="${coord(Y(sB))}" x2="${coord(X(zStraight))}" y2="${coord(Y(sStraight))}"/>
<line class="ray" x1="${coord(X(t.sz))}" y1="${coord(Y(sS))}" x2="${coord(X(t.bz))}" y2="${coord(Y(sB))}"/>
<line class="ray-glass" x1="${coord(X(t.bz))}" y1="${coord(Y(sB))}" x2="${coord(X(t.fz))}" y2="${coord(Y(sF))}"/>
<line class="ray" x1="${coord(X(t.fz))}" y1="${coord(Y(sF))}" x2="${coord(X(zEnd))}" y2="${coord(Y(sEnd))}"/>
</g>`;
    marks = html`<circle class="vp" cx="${coord(X(t.bz))}" cy="${coord(Y(sB))}" r="2.2"/>
<text class="lbl" x="${coord(X(t.bz) - 4)}" y="${coord(Y(sB) + (vpBelow ? 9 : -4))}" text-anchor="end">VP</text>`;
  } else {
    marks = html`<text class="warn" x="${coord(W / 2)}" y="${coord(box.t + 8)}" text-anchor="middle">no line of sight</text>`;
  }

  return html`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${coord(W)} ${coord(H)}" class="fig sec" role="img" aria-label="${o.eyeName} lens cross-section with the line of sight, to scale">
<defs><clipPath id="${clip}"><rect x="0" y="${coord(box.t)}" width="${coord(W)}" height="${coord(box.b - box.t)}"/></clipPath></defs>
<text class="fig-title" x="1" y="9">${o.eyeName} lens, to scale</text>
<text class="end" x="1" y="19">${dir.top ? `↑ ${dir.top}` : ''}</text>
<line class="axis" x1="${coord(X(zMin))}" y1="${coord(Y(0))}" x2="${coord(X(zMax))}" y2="${coord(Y(0))}"/>
<circle class="eye" cx="${coord(X(crZ))}" cy="${coord(Y(crS))}" r="${coord(EYE_RADIUS_MM * k)}"/>
<circle class="cr" cx="${coord(X(crZ))}" cy="${coord(Y(crS))}" r="1.6"/>
<text class="lbl" x="${coord(X(crZ) - 3)}" y="${coord(Y(crS) + (vpBelow ? -3 : 9))}" text-anchor="end">CR</text>
${outline}
${rays}
<circle class="oc" cx="${coord(X(0))}" cy="${coord(Y(0))}" r="1.6"/>
<text class="lbl" x="${coord(X(0) - 4)}" y="${coord(Y(0) + (vpBelow ? -4 : 9))}" text-anchor="end">OC</text>
${marks}
<text class="end" x="1" y="${coord(H - 8)}">${dir.bottom ? `↓ ${dir.bottom}` : ''}</text>
<text class="end" x="1" y="${coord(H - 1)}">eye ← → object</text>
<line class="bar" x1="${coord(W - 2 - 10 * k)}" y1="${coord(H - 4)}" x2="${coord(W - 2)}" y2="${coord(H - 4)}"/>
<text class="end" x="${coord(W - 4 - 10 * k)}" y="${coord(H - 1)}" text-anchor="end">10 mm</text>
</svg>`;
}
