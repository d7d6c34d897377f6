/**
 * Small scene furniture: the optical axis, the optical-centre marker, the draggable visual
 * point handle and millimetre rulers. Fixed-size buffers, updated in place; dispose() frees all.
 */
import {
  BufferAttribute, BufferGeometry, Group, LineBasicMaterial, LineSegments, Mesh, MeshBasicMaterial,
  SphereGeometry, TorusGeometry,
} from 'three';
import { CSS2DObject } from 'three/examples/jsm/renderers/CSS2DRenderer.js';
import { COLORS } from './palette.ts';

export function makeLabel(text: string, cls: string): CSS2DObject {
  const el = document.createElement('div');
  el.className = `scene-label ${cls}`;
  el.textContent = text;
  return new CSS2DObject(el);
}

const MAX_TICKS = 161;
const LABEL_EVERY_MM = 10;

/** A millimetre ruler along lens-frame x or z, ticks every mm, labels every 10 mm. */
export class Ruler {
  readonly group = new Group();
  private readonly lines: LineSegments;
  private readonly material: LineBasicMaterial;
  private readonly labels: CSS2DObject[] = [];
  private readonly axis: 'x' | 'z';

  constructor(axis: 'x' | 'z') {
    this.axis = axis;
    const g = new BufferGeometry();
    g.setAttribute('position', new BufferAttribute(new Float32Array(3 * 2 * (MAX_TICKS + 1)), 3));
    this.material = new LineBasicMaterial({ color: COLORS.ruler, transparent: true, opacity: 0.85 });
    this.lines = new LineSegments(g, this.material);
    this.lines.frustumCulled = false;
    this.group.add(this.lines);
    for (let i = 0; i < Math.ceil(MAX_TICKS / LABEL_EVERY_MM) + 1; i++) {
      const l = makeLabel('', 'scene-label--ruler');
      this.labels.push(l);
      this.group.add(l);
    }
  }

  /**
   * Ticks from `fromMm` to `toMm` (whole mm) along the ruler's axis, placed at fixed
   * (y, other) where `other` is z for an x ruler and x for a z ruler.
   */
  update(fromMm: number, toMm: number, y: number, other: number, unitNote: string): void {
    const a = Math.ceil(fromMm), b = Math.floor(toMm);
    const pos = this.lines.geometry.getAttribute('position') as BufferAttribute;
    const put = (k: number, along: number, yy: number): void => {
      if (this.axis === 'x') pos.setXYZ(k, along, yy, other);
      else pos.setXYZ(k, other, yy, along);
    };
    let k = 0;
    put(k++, a, y);
    put(k++, b, y);
    let ticks = 0;
    for (let v = a; v <= b && ticks < MAX_TICKS; v++, ticks++) {
      const len = v % 10 === 0 ? 2.4 : v % 5 === 0 ? 1.5 : 0.8;
      put(k++, v, y);
      put(k++, v, y + len);
    }
    pos.needsUpdate = true;
    this.lines.geometry.setDrawRange(0, k);
    let li = 0;
    const first = Math.ceil(a / LABEL_EVERY_MM) * LABEL_EVERY_MM;
    let last = first;
    for (let v = first; v <= b && li < this.labels.length; v += LABEL_EVERY_MM) last = v;
    for (let v = first; v <= b && li < this.labels.length; v += LABEL_EVERY_MM, li++) {
      const l = this.labels[li]!;
      l.visible = true;
      l.element.textContent = v === last ? `${v} ${unitNote}` : String(v);
      if (this.axis === 'x') l.position.set(v, y - 2.2, other);
      else l.position.set(other, y - 2.2, v);
    }
    for (; li < this.labels.length; li++) this.labels[li]!.visible = false;
  }

  setLabelsVisible(v: boolean): void {
    this.group.visible = v;
  }

  dispose(): void {
    this.lines.geometry.dispose();
    this.material.dispose();
    for (const l of this.labels) l.removeFromParent();
    this.group.removeFromParent();
  }
}

/** Optical-centre ring and visual-point handle (with an invisible, larger pick sphere). */
export class PointMarkers {
  readonly group = new Group();
  readonly handle: Mesh;
  /** the pointer picks the handle with this larger invisible sphere */
  readonly pick: Mesh;
  private readonly oc: Mesh;
  private readonly geometries: (SphereGeometry | TorusGeometry)[];
  private readonly materials: MeshBasicMaterial[];
  readonly ocLabel: CSS2DObject;
  readonly vpLabel: CSS2DObject;

  constructor() {
    const handleG = new SphereGeometry(0.75, 20, 14);
    const pickG = new SphereGeometry(3.2, 12, 8);
    const ocG = new TorusGeometry(1.1, 0.14, 8, 32);
    const handleM = new MeshBasicMaterial({ color: COLORS.visualPoint });
    const pickM = new MeshBasicMaterial({ visible: false });
    const ocM = new MeshBasicMaterial({ color: COLORS.oc });
    this.geometries = [handleG, pickG, ocG];
    this.materials = [handleM, pickM, ocM];
    this.handle = new Mesh(handleG, handleM);
    this.handle.name = 'visual-point';
    this.handle.renderOrder = 5;
    this.pick = new Mesh(pickG, pickM);
    this.pick.name = 'visual-point-pick';
    this.oc = new Mesh(ocG, ocM);
    this.oc.name = 'optical-centre';
    this.ocLabel = makeLabel('OC', 'scene-label--oc');
    this.vpLabel = makeLabel('visual point', 'scene-label--vp');
    this.group.add(this.handle, this.pick, this.oc, this.ocLabel, this.vpLabel);
  }

  update(bx: number, by: number, bz: number): void {
    this.handle.position.set(bx, by, bz);
    this.pick.position.set(bx, by, bz);
    // labels above and below, the visual point's on the side away from the optical centre
    const up = by > 0.05 ? 1 : -1;
    this.vpLabel.position.set(bx, by + 3 * up, bz);
    this.ocLabel.position.set(0, -3 * up, 0);
  }

  setLabelsVisible(v: boolean): void {
    this.ocLabel.visible = v;
    this.vpLabel.visible = v;
  }

  dispose(): void {
    for (const g of this.geometries) g.dispose();
    for (const m of this.materials) m.dispose();
    this.ocLabel.removeFromParent();
    this.vpLabel.removeFromParent();
    this.group.removeFromParent();
  }
}
