/**
 * Everything drawn in the 3-D view for one computed case: the lens, the eye, the optical
 * axis, the optical centre and visual point, the rays with their labels and the rulers.
 * It draws what src/optics computed (a FourAnswers and a Lens); it computes no optics.
 * The visual point can be dragged on the back surface (raycast) or double-clicked to.
 */
import { CylinderGeometry, Group, Raycaster, Vector2, Vector3 } from 'three';
import type { CSS2DObject } from 'three/examples/jsm/renderers/CSS2DRenderer.js';
import type { FourAnswers, Lens } from '../optics/index.ts';
import { EyeModel, GLOBE_RADIUS_MM } from './eyeModel.ts';
import { LensMesh } from './lensMesh.ts';
import { PointMarkers, Ruler, makeLabel } from './markers.ts';
import { type PencilGeometry, PencilView } from './pencil.ts';
import { COLORS } from './palette.ts';
import { RayTube } from './rayTube.ts';
import { type RayPaths, allocateRayPaths, buildRayPaths } from './rayPaths.ts';
import { type ViewName, Viewer } from './viewer.ts';

export interface SceneInput {
  lens: Lens;
  crMm: number;
  answers: FourAnswers;
  /** words for the labels, already formatted with units */
  labels: { exact: string; prentice: string; paraxial: string; focimeter: string };
  /** the pencil along the exact line of sight and its focal lines (null where it fails) */
  pencil?: PencilGeometry | null;
}

export interface SceneDisplay {
  mag: number;
  labels: boolean;
  focimeterRay: boolean;
  /** draw the pencil near the eye with its focal lines */
  pencil?: boolean;
}

const OBJECT_LENGTH_MM = 50;

/** The scene's content; rebuilt whole by DecentraScene.rebuildContent (tests check it leaks nothing). */
class Content {
  readonly root = new Group();
  readonly lens = new LensMesh();
  readonly eye = new EyeModel();
  readonly markers = new PointMarkers();
  readonly xRuler = new Ruler('x');
  readonly zRuler = new Ruler('z');
  readonly unit = new CylinderGeometry(1, 1, 1, 10, 1, true);
  readonly axis: RayTube;
  readonly eyeSide: RayTube;
  readonly glass: RayTube;
  readonly exactObj: RayTube;
  readonly prentice: RayTube;
  readonly paraxial: RayTube;
  readonly undeviated: RayTube;
  readonly focimeter: RayTube;
  readonly pencil = new PencilView();
  readonly rayLabels: Record<'exact' | 'prentice' | 'paraxial' | 'focimeter', CSS2DObject>;

  constructor() {
    const u = this.unit;
    this.axis = new RayTube(u, { color: COLORS.axis, radiusMm: 0.07, dashMm: 1.6, gapMm: 1.2 }, 200);
    this.eyeSide = new RayTube(u, { color: COLORS.exact, radiusMm: 0.24 });
    this.glass = new RayTube(u, { color: COLORS.exact, radiusMm: 0.24 });
    this.exactObj = new RayTube(u, { color: COLORS.exact, radiusMm: 0.24 });
    this.prentice = new RayTube(u, { color: COLORS.prentice, radiusMm: 0.19, dashMm: 2.4, gapMm: 1.2 });
    this.paraxial = new RayTube(u, { color: COLORS.paraxial, radiusMm: 0.19, dashMm: 1.0, gapMm: 1.0 });
    this.undeviated = new RayTube(u, { color: COLORS.undeviated, radiusMm: 0.08, dashMm: 0.6, gapMm: 1.2, opacity: 0.8 });
    this.focimeter = new RayTube(u, { color: COLORS.focimeter, radiusMm: 0.15 });
    this.rayLabels = {
      exact: makeLabel('', 'scene-label--ray scene-label--exact'),
      prentice: makeLabel('', 'scene-label--ray scene-label--prentice'),
      paraxial: makeLabel('', 'scene-label--ray scene-label--paraxial'),
      focimeter: makeLabel('', 'scene-label--ray scene-label--focimeter'),
    };
    // anchored at their left edge, just past the end of the ray
    for (const l of Object.values(this.rayLabels)) l.center.set(-0.04, 0.5);
    this.root.add(
      this.lens.group, this.eye.group, this.markers.group, this.xRuler.group, this.zRuler.group,
      this.axis.mesh, this.eyeSide.mesh, this.glass.mesh, this.exactObj.mesh, this.prentice.mesh,
      this.paraxial.mesh, this.undeviated.mesh, this.focimeter.mesh, ...Object.values(this.rayLabels),
      this.pencil.group,
    );
  }

  dispose(): void {
    for (const l of Object.values(this.rayLabels)) l.removeFromParent();
    this.lens.dispose();
    this.eye.dispose();
    this.markers.dispose();
    this.pencil.dispose();
    this.xRuler.dispose();
    this.zRuler.dispose();
    for (const t of [this.axis, this.eyeSide, this.glass, this.exactObj, this.prentice, this.paraxial, this.undeviated, this.focimeter]) {
      t.dispose();
    }
    this.unit.dispose();
    this.root.removeFromParent();
  }
}

export class DecentraScene {
  readonly viewer: Viewer;
  /** called while the visual point is dragged or double-clicked to: lens-frame x, y in mm */
  onPointPick: ((xMm: number, yMm: number, done: boolean) => void) | null = null;
  private content: Content;
  private readonly paths: RayPaths = allocateRayPaths();
  private last: { input: SceneInput; display: SceneDisplay } | null = null;
  private readonly raycaster = new Raycaster();
  private readonly ndc = new Vector2();
  private dragging = false;
  private radiusMm = 30;
  private readonly canvas: HTMLCanvasElement;
  private readonly listeners: [string, EventListener][] = [];

  constructor(container: HTMLElement) {
    this.viewer = new Viewer(container);
    this.content = new Content();
    // nothing to show until the first valid case arrives
    this.content.root.visible = false;
    this.viewer.scene.add(this.content.root);
    this.canvas = this.viewer.renderer.domElement;
    this.viewer.onView = (name) => this.showRulersFor(name);
    this.viewer.onBeforeLabels = (w, h) => this.layoutLabels(w, h);
    this.listen('pointerdown', (e) => this.pointerDown(e as PointerEvent));
    this.listen('pointermove', (e) => this.pointerMove(e as PointerEvent));
    this.listen('pointerup', (e) => this.pointerUp(e as PointerEvent));
    this.listen('dblclick', (e) => this.doubleClick(e as MouseEvent));
  }

  update(input: SceneInput, display: SceneDisplay): void {
    this.last = { input, display };
    const c = this.content;
    c.root.visible = true;
    const { lens, crMm, answers } = input;
    const r = lens.radiusMm;
    this.radiusMm = r;
    c.lens.update(lens);
    c.lens.setInvalid(false);
    const t = answers.exactTrace;
    c.eye.update(crMm, t.ax, t.ay, t.az);
    c.markers.update(t.bx, t.by, t.bz);
    const p = buildRayPaths(answers, display.mag, OBJECT_LENGTH_MM, this.paths);
    // the exact line of sight in its three parts
    c.eyeSide.setPolyline(p.exact, 2);
    if (p.exactOk) {
      c.glass.setPolyline(p.exact.subarray(3, 9), 2);
      c.exactObj.setPolyline(p.exact.subarray(6, 12), 2);
    } else {
      c.glass.clear();
      c.exactObj.clear();
    }
    c.prentice.setPolyline(p.prentice, 2);
    c.paraxial.setPolyline(p.paraxial, 2);
    c.undeviated.setPolyline(p.undeviated, 2);
    if (display.focimeterRay && p.focimeterOk) c.focimeter.setPolyline(p.focimeter, 4);
    else c.focimeter.clear();
    const zFront = lens.ctMm;
    const zEnd = zFront + OBJECT_LENGTH_MM;
    _axis[0] = 0; _axis[1] = 0; _axis[2] = -crMm - GLOBE_RADIUS_MM - 4;
    _axis[3] = 0; _axis[4] = 0; _axis[5] = zEnd;
    c.axis.setPolyline(_axis, 2);

    // labels staggered along their rays so they do not sit on each other
    const L = c.rayLabels;
    L.exact.element.textContent = input.labels.exact;
    L.prentice.element.textContent = input.labels.prentice;
    L.paraxial.element.textContent = input.labels.paraxial;
    L.focimeter.element.textContent = input.labels.focimeter;
    // labels at the ends of their rays, stacked on screen by CSS so close rays stay readable
    if (p.exactOk) placeAlong(L.exact, p.exact, 6, 9, 1.0);
    else placeAlong(L.exact, p.exact, 0, 3, 0.5);
    placeAlong(L.paraxial, p.paraxial, 0, 3, 1.0);
    placeAlong(L.prentice, p.prentice, 0, 3, 1.0);
    placeAlong(L.focimeter, p.focimeter, 6, 9, 0.6);
    L.exact.visible = display.labels;
    L.prentice.visible = display.labels;
    L.paraxial.visible = display.labels;
    L.focimeter.visible = display.labels && display.focimeterRay && p.focimeterOk;
    c.markers.setLabelsVisible(display.labels);
    c.eye.setLabelsVisible(display.labels);
    const pencilZ = c.pencil.update(input.pencil ?? null, display.pencil === true, display.labels);

    // rulers: x across the lens in the back-vertex plane, z along its side; they meet in a corner
    const yRule = -(r + 7);
    const xEnd = Math.ceil(r / 5) * 5;
    c.xRuler.update(-xEnd, xEnd, yRule, 0, 'mm (x)');
    c.zRuler.update(-Math.ceil((crMm + GLOBE_RADIUS_MM) / 10) * 10, Math.ceil(zFront / 10) * 10 + 10, yRule, -xEnd - 5, 'mm (z)');
    // frame the eye, the lens and the object-side rays with room for their labels
    const zRight = Math.max(zEnd + 30, pencilZ ? pencilZ.zMax + 30 : -Infinity);
    const zLeft = Math.min(-crMm - GLOBE_RADIUS_MM, pencilZ ? pencilZ.zMin : Infinity);
    this.viewer.setFrame(_v.set(0, 0, (zRight + zLeft) / 2), 1.05 * Math.max(2 * r + 20, zRight - zLeft), 2 * r + 26);
    this.viewer.requestRender();
  }

  /** The inputs no longer make a lens: keep the last valid drawing, tinted as invalid. */
  markInvalid(): void {
    this.content.lens.setInvalid(true);
    this.viewer.requestRender();
  }

  setView(name: ViewName): void {
    this.viewer.setView(name);
  }

  /** Frame the current preset view again (what is drawn grew: the pencil was switched on). */
  reframe(): void {
    this.viewer.setView(this.rulerView);
  }

  /** A ruler seen end-on is only clutter: show the ones that read in this view. */
  private rulerView: ViewName = 'oblique';
  private showRulersFor(name: ViewName): void {
    this.rulerView = name;
    const c = this.content;
    c.xRuler.group.visible = name !== 'side';
    c.zRuler.group.visible = name !== 'front' && name !== 'behind';
  }

  /** Dispose and recreate every scene object (used by the disposal test). */
  rebuildContent(): void {
    // the new objects are drawn once before the old are freed, so the shader programs they
    // share stay compiled (and nothing flickers)
    const old = this.content;
    this.content = new Content();
    this.viewer.scene.add(this.content.root);
    this.showRulersFor(this.rulerView);
    if (this.last) this.update(this.last.input, this.last.display);
    old.root.visible = false;
    this.viewer.renderNow();
    old.dispose();
  }

  /**
   * Keep the ray labels from covering each other: project their anchors, and where two would
   * overlap on screen push them apart vertically (a few pixels of CSS margin, centred on
   * their own anchors as far as possible).
   */
  private layoutLabels(w: number, h: number): void {
    const L = this.content.rayLabels;
    const items = _labels;
    items.length = 0;
    for (const l of [L.paraxial, L.exact, L.prentice, L.focimeter]) {
      if (!l.visible) continue;
      _v.setFromMatrixPosition(l.matrixWorld).project(this.viewer.camera);
      items.push({ l, x: ((_v.x + 1) / 2) * w, y: ((1 - _v.y) / 2) * h, y2: 0 });
    }
    items.sort((a, b) => a.y - b.y);
    const gap = 19;
    for (let i = 0; i < items.length; i++) {
      const it = items[i]!;
      it.y2 = it.y;
      for (let j = 0; j < i; j++) {
        const o = items[j]!;
        if (Math.abs(o.x - it.x) < 170 && it.y2 < o.y2 + gap) it.y2 = o.y2 + gap;
      }
    }
    // centre the shifts so the stack sits on its anchors rather than below them
    let mean = 0;
    for (const it of items) mean += it.y2 - it.y;
    mean = items.length ? mean / items.length : 0;
    for (const it of items) it.l.element.style.marginTop = `${Math.round(it.y2 - it.y - mean)}px`;
  }

  /** Client (CSS pixel) position of the visual point handle, for tests. */
  handleClientPosition(): { x: number; y: number } {
    const v = this.content.markers.handle.getWorldPosition(new Vector3()).project(this.viewer.camera);
    const rect = this.canvas.getBoundingClientRect();
    return { x: rect.left + ((v.x + 1) / 2) * rect.width, y: rect.top + ((1 - v.y) / 2) * rect.height };
  }

  private listen(type: string, fn: EventListener): void {
    this.canvas.addEventListener(type, fn);
    this.listeners.push([type, fn]);
  }

  private setRay(e: MouseEvent): void {
    const rect = this.canvas.getBoundingClientRect();
    this.ndc.set(((e.clientX - rect.left) / rect.width) * 2 - 1, -((e.clientY - rect.top) / rect.height) * 2 + 1);
    this.raycaster.setFromCamera(this.ndc, this.viewer.camera);
  }

  private pointerDown(e: PointerEvent): void {
    if (e.button !== 0) return;
    this.setRay(e);
    if (this.raycaster.intersectObject(this.content.markers.pick, false).length === 0) return;
    this.dragging = true;
    this.viewer.controls.enabled = false;
    this.canvas.setPointerCapture(e.pointerId);
    this.canvas.classList.add('dragging');
    e.preventDefault();
  }

  private pointerMove(e: PointerEvent): void {
    if (!this.dragging) {
      this.setRay(e);
      const over = this.raycaster.intersectObject(this.content.markers.pick, false).length > 0;
      this.canvas.classList.toggle('over-handle', over);
      return;
    }
    this.pickOnBack(e, false);
  }

  private pointerUp(e: PointerEvent): void {
    if (!this.dragging) return;
    this.dragging = false;
    this.viewer.controls.enabled = true;
    this.canvas.classList.remove('dragging');
    if (this.canvas.hasPointerCapture(e.pointerId)) this.canvas.releasePointerCapture(e.pointerId);
    this.pickOnBack(e, true);
  }

  private doubleClick(e: MouseEvent): void {
    this.pickOnBack(e, true);
  }

  /** Raycast onto the lens's back surface (either side) and report the point. */
  private pickOnBack(e: MouseEvent, done: boolean): void {
    this.setRay(e);
    const c = this.content.lens;
    const hits = this.raycaster.intersectObject(c.backMesh, false);
    const hit = hits[0] ?? this.raycaster.intersectObject(c.frontMesh, false)[0];
    if (!hit) return;
    // round to 0.1 mm: what a person can set by hand, and what the URL then carries
    let x = Math.round(hit.point.x * 10) / 10;
    let y = Math.round(hit.point.y * 10) / 10;
    const rr = Math.hypot(x, y), lim = this.radiusMm - 0.1;
    if (rr > lim) {
      x = Math.round((x * lim * 10) / rr) / 10;
      y = Math.round((y * lim * 10) / rr) / 10;
    }
    this.onPointPick?.(x + 0, y + 0, done);
  }

  dispose(): void {
    for (const [t, fn] of this.listeners) this.canvas.removeEventListener(t, fn);
    this.content.dispose();
    this.viewer.dispose();
  }
}

const _axis = new Float64Array(6);
const _labels: { l: CSS2DObject; x: number; y: number; y2: number }[] = [];
const _v = new Vector3();

function placeAlong(label: CSS2DObject, pts: Float64Array, i0: number, i1: number, f: number): void {
  label.position.set(
    pts[i0]! + f * (pts[i1]! - pts[i0]!),
    pts[i0 + 1]! + f * (pts[i1 + 1]! - pts[i0 + 1]!),
    pts[i0 + 2]! + f * (pts[i1 + 2]! - pts[i0 + 2]!),
  );
}
