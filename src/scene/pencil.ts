/**
 * The pencil near the eye: a bundle of rays around the exact line of sight at the vertex
 * sphere and its two focal lines (Sturm's conoid), drawn from what the engine computed
 * (power.ts: V, the light's direction there and focalLines). Nothing optical is computed
 * here: every drawn ray is the straight line through its point at V and the two focal lines,
 * which is what a focal line is.
 *
 * The pencil is drawn 2 * PENCIL_HALF_WIDTH_MM wide at V (a pupil's width; the engine's
 * pencil is infinitesimally narrow). Real focal lines (beyond V, towards the eye) are solid,
 * the rays to them solid; virtual ones (before V, where the light only seems to come from)
 * dashed and fainter, with the rays' backward extensions dashed. Lines farther than
 * MAX_DRAWN_MM from V are not drawn (their labels say where they are). Fixed-size buffers,
 * updated in place; dispose() frees all.
 */
import { BufferAttribute, BufferGeometry, CylinderGeometry, Group, LineBasicMaterial, LineDashedMaterial, LineSegments } from 'three';
import type { CSS2DObject } from 'three/examples/jsm/renderers/CSS2DRenderer.js';
import { fixed } from '../case/numberText.ts';
import type { PencilGeometry } from '../optics/index.ts';
import { makeLabel } from './markers.ts';
import { COLORS } from './palette.ts';
import { RayTube } from './rayTube.ts';

/** The pencil as the engine gives it (lens frame, mm). */
export type { PencilGeometry };

export const PENCIL_HALF_WIDTH_MM = 2;
/** focal lines farther than this from V are left out of the drawing, mm */
export const MAX_DRAWN_MM = 600;
/** how far the rays are drawn before V (towards the lens), mm */
const BEFORE_V_MM = 3;
/** how far the rays are drawn beyond V when no focal line is real, mm */
const BEYOND_V_MM = 45;
const RAYS = 16;

export class PencilView {
  readonly group = new Group();
  private readonly unit = new CylinderGeometry(1, 1, 1, 8, 1, true);
  private readonly real: LineSegments;
  private readonly virtual: LineSegments;
  private readonly realMaterial: LineBasicMaterial;
  private readonly virtualMaterial: LineDashedMaterial;
  /** per focal line: solid (real) and dashed (virtual) */
  private readonly lineTubes: [RayTube, RayTube][];
  private readonly labels: [CSS2DObject, CSS2DObject];
  private readonly seg = new Float64Array(6);

  constructor() {
    const make = (material: LineBasicMaterial | LineDashedMaterial): LineSegments => {
      const g = new BufferGeometry();
      g.setAttribute('position', new BufferAttribute(new Float32Array(3 * 2 * RAYS), 3));
      const l = new LineSegments(g, material);
      l.frustumCulled = false;
      return l;
    };
    this.realMaterial = new LineBasicMaterial({ color: COLORS.exact, transparent: true, opacity: 0.8 });
    this.virtualMaterial = new LineDashedMaterial({ color: COLORS.exact, transparent: true, opacity: 0.45, dashSize: 1.5, gapSize: 1.5 });
    this.real = make(this.realMaterial);
    this.virtual = make(this.virtualMaterial);
    this.lineTubes = [0, 1].map(() => [
      new RayTube(this.unit, { color: COLORS.visualPoint, radiusMm: 0.22 }, 4),
      new RayTube(this.unit, { color: COLORS.visualPoint, radiusMm: 0.16, dashMm: 0.8, gapMm: 0.6, opacity: 0.6 }, 40),
    ]) as [RayTube, RayTube][];
    this.labels = [makeLabel('', 'scene-label--pencil'), makeLabel('', 'scene-label--pencil')];
    // anchored at their left edge; the second a line lower, as the two lines often lie close together
    this.labels[0].center.set(-0.04, 0.5);
    this.labels[1].center.set(-0.04, -0.7);
    this.group.add(this.real, this.virtual, ...this.labels);
    for (const [a, b] of this.lineTubes) this.group.add(a.mesh, b.mesh);
    this.group.visible = false;
  }

  /**
   * Draw `p` (or hide everything when null or not shown). Returns the lowest and highest z
   * of what is drawn (for framing), or null when nothing is.
   */
  update(p: PencilGeometry | null, show: boolean, labels: boolean): { zMin: number; zMax: number } | null {
    this.group.visible = show && p !== null;
    if (!show || !p) return null;
    const [l1, l2] = p.lines;
    // section k's rays meet in line k; they lie along the OTHER line's direction
    const inv1 = l1.distanceMm === null ? 0 : 1 / l1.distanceMm;
    const inv2 = l2.distanceMm === null ? 0 : 1 / l2.distanceMm;
    const reals = p.lines.map((l) => l.distanceMm).filter((s): s is number => s !== null && s > 0 && s <= MAX_DRAWN_MM);
    const virtuals = p.lines.map((l) => l.distanceMm).filter((s): s is number => s !== null && s < 0 && -s <= MAX_DRAWN_MM);
    const sEnd = reals.length ? 1.1 * Math.max(...reals) : BEYOND_V_MM;
    const sBack = virtuals.length ? 1.1 * Math.min(...virtuals) : -BEFORE_V_MM;
    let zMin = Infinity, zMax = -Infinity;
    const at = (a: number, b: number, s: number, out: Float32Array | Float64Array, o: number): void => {
      // the ray through height a along line 2's direction and b along line 1's at V
      const f1 = a * (1 - s * inv1), f2 = b * (1 - s * inv2);
      for (let k = 0; k < 3; k++) {
        const u1 = k === 0 ? l2.x : k === 1 ? l2.y : l2.z;
        const u2 = k === 0 ? l1.x : k === 1 ? l1.y : l1.z;
        out[o + k] = p.v[k]! + s * p.d[k]! + f1 * u1 + f2 * u2;
      }
      zMin = Math.min(zMin, out[o + 2]!);
      zMax = Math.max(zMax, out[o + 2]!);
    };
    const rp = this.real.geometry.getAttribute('position') as BufferAttribute;
    const vp = this.virtual.geometry.getAttribute('position') as BufferAttribute;
    const ra = rp.array as Float32Array, va = vp.array as Float32Array;
    for (let j = 0; j < RAYS; j++) {
      const t = (2 * Math.PI * j) / RAYS;
      const a = PENCIL_HALF_WIDTH_MM * Math.cos(t), b = PENCIL_HALF_WIDTH_MM * Math.sin(t);
      at(a, b, -BEFORE_V_MM, ra, 6 * j);
      at(a, b, sEnd, ra, 6 * j + 3);
      at(a, b, -BEFORE_V_MM, va, 6 * j);
      at(a, b, Math.min(sBack, -BEFORE_V_MM), va, 6 * j + 3);
    }
    rp.needsUpdate = true;
    vp.needsUpdate = true;
    this.virtual.visible = virtuals.length > 0;
    this.virtual.computeLineDistances();

    // the focal lines: as long as the conoid is wide there
    for (let k = 0; k < 2; k++) {
      const line = p.lines[k]!, other = p.lines[1 - k]!;
      const [solid, dashed] = this.lineTubes[k]!;
      const label = this.labels[k]!;
      solid.clear();
      dashed.clear();
      const s = line.distanceMm;
      const words = s === null
        ? `${signedD(line.vergenceD)} focal line at infinity`
        : `${signedD(line.vergenceD)} focal line, ${fixed(Math.abs(s), 0)} mm ${s > 0 ? 'beyond' : 'before'}${s < 0 ? ' (virtual)' : ''}`;
      label.element.textContent = words;
      if (s === null || Math.abs(s) > MAX_DRAWN_MM) {
        // not drawn: its label sits at the end of the drawn pencil
        label.visible = labels;
        label.position.set(p.v[0] + sEnd * p.d[0], p.v[1] + sEnd * p.d[1] + (k === 0 ? 3 : -3), p.v[2] + sEnd * p.d[2]);
        continue;
      }
      const half = Math.max(0.6, PENCIL_HALF_WIDTH_MM * Math.abs(1 - s * (other.distanceMm === null ? 0 : 1 / other.distanceMm)));
      const seg = this.seg;
      const cx = p.v[0] + s * p.d[0], cy = p.v[1] + s * p.d[1], cz = p.v[2] + s * p.d[2];
      seg[0] = cx - half * line.x; seg[1] = cy - half * line.y; seg[2] = cz - half * line.z;
      seg[3] = cx + half * line.x; seg[4] = cy + half * line.y; seg[5] = cz + half * line.z;
      (s > 0 ? solid : dashed).setPolyline(seg, 2);
      label.visible = labels;
      label.position.set(seg[3], seg[4], seg[5]);
    }
    return { zMin, zMax };
  }

  dispose(): void {
    for (const l of this.labels) l.removeFromParent();
    this.real.geometry.dispose();
    this.virtual.geometry.dispose();
    this.realMaterial.dispose();
    this.virtualMaterial.dispose();
    for (const [a, b] of this.lineTubes) { a.dispose(); b.dispose(); }
    this.unit.dispose();
    this.group.removeFromParent();
  }
}

function signedD(v: number): string {
  const s = fixed(v, 2);
  return `${v > 0 && Number(s) !== 0 ? '+' : ''}${s} D`;
}
