/**
 * The "both eyes" 3-D view: both lenses where their placements put them (meshes from the
 * engine's surfaces), edged to the frame's shape when the case has a frame (a rounded
 * rectangle of the box size on the boxed centre, edgedLens.ts; round blanks without one), the
 * frame's outline along their edges, both eyes turned along their lines of sight,
 * both exact lines of sight from each centre of rotation through its lens to the target, the
 * straight lines the eyes would take without lenses, and the target.
 *
 * Binocular frame (docs/conventions.md, "The wearer frame"; docs/binocular.md, "Frame and
 * signs"), mm: origin midway between the centres of
 * rotation, right CR at x = -PD_R, left CR at x = +PD_L, x towards the wearer's left, y up,
 * z towards the object; three.js's own frame seen by an observer facing the wearer. Each
 * eye's traces are in its lens frame; Placement.toEyePoint / toEyeDir take them to the eye
 * frame, and the eye's CR offset to the binocular frame. Nothing here computes optics.
 *
 * Buffers are fixed-size and updated in place; dispose() frees every geometry and material
 * (rebuildContent() recreates them all, and a test checks that nothing is left behind).
 */
import {
  Box3, CylinderGeometry, Group, Matrix4, Mesh, MeshBasicMaterial, SphereGeometry, TorusGeometry, Vector3,
} from 'three';
import type { CSS2DObject } from 'three/examples/jsm/renderers/CSS2DRenderer.js';
import { Hit, type Lens, type LineTrace, type Placement, type Target } from '../../optics/index.ts';
import { EyeModel } from '../eyeModel.ts';
import { LensMesh } from '../lensMesh.ts';
import { makeLabel } from '../markers.ts';
import { COLORS } from '../palette.ts';
import { RayTube } from '../rayTube.ts';
import { Viewer } from '../viewer.ts';
import { EdgedLensMesh, type Outline, boxOutline, outlinePoint } from './edgedLens.ts';

/** The frame outline's colour (a warm grey, apart from the glass and the rays). */
export const FRAME_COLOR = 0xc8b9a0;
/** Object-side length drawn towards a distant target, mm. */
const DISTANCE_RAY_MM = 260;
/**
 * Object-side length drawn for a reading level, mm: a reading level gives the points on the
 * lenses, not a target, so each line of sight is drawn this far beyond its lens (a drawing
 * length about a reading distance, not a computed one).
 */
const LEVEL_RAY_MM = 330;
/** Points of the frame's outline drawn round each lens. */
const FRAME_POINTS = 64;

export interface EyeDrawing {
  eye: 'R' | 'L';
  /** the lens to draw (with a finite diameter), or null to draw none */
  lens: Lens | null;
  placement: Placement;
  /** the centre of rotation's x in the binocular frame, mm */
  crXMm: number;
  /** the exact line of sight to the target (lens frame), or null when there is none */
  trace: LineTrace | null;
  /** words under the lens, already formatted with units */
  label: string;
}

/** A boxed lens shape in the binocular frame before tilting, mm. */
export interface FrameBox {
  xMin: number;
  xMax: number;
  yMin: number;
  yMax: number;
}

export interface BinocularSceneInput {
  right: EyeDrawing;
  left: EyeDrawing;
  frame: { right: FrameBox; left: FrameBox } | null;
  /**
   * the target in the binocular frame: a point, a direction for a distant target, or null for
   * a reading level (no target: each line of sight is drawn out along its own object-side ray)
   */
  target: Target | null;
  targetLabel: string;
}

export type BinocularViewName = 'overview' | 'front' | 'top' | 'side';

export const BINOCULAR_VIEWS: Record<BinocularViewName, string> = {
  overview: 'Overview',
  front: 'Front',
  top: 'Top',
  side: 'Side',
};

class EyeContent {
  readonly lensGroup = new Group();
  readonly lens = new LensMesh();
  /** the lens edged to the frame's shape (shown instead of the round blank when there is a frame) */
  readonly edged = new EdgedLensMesh();
  readonly outline: Outline = { cx: 0, cy: 0, hw: 1, hh: 1, r: 0 };
  readonly ocRing: Mesh;
  readonly eyeHolder = new Group();
  readonly eye = new EyeModel();
  readonly sight: RayTube;
  readonly noLens: RayTube;
  readonly vp: Mesh;
  readonly frameTube: RayTube;
  readonly label: CSS2DObject;

  constructor(unit: CylinderGeometry, ocG: TorusGeometry, ocM: MeshBasicMaterial, vpG: SphereGeometry, vpM: MeshBasicMaterial) {
    this.lensGroup.matrixAutoUpdate = false;
    this.ocRing = new Mesh(ocG, ocM);
    this.ocRing.name = 'optical-centre';
    this.lensGroup.add(this.lens.group, this.edged.group, this.ocRing);
    this.eyeHolder.add(this.eye.group);
    this.sight = new RayTube(unit, { color: COLORS.exact, radiusMm: 0.32 }, 8);
    this.noLens = new RayTube(unit, { color: COLORS.undeviated, radiusMm: 0.16, dashMm: 2, gapMm: 3, opacity: 0.85 }, 400);
    this.frameTube = new RayTube(unit, { color: FRAME_COLOR, radiusMm: 0.45 }, FRAME_POINTS + 2);
    this.vp = new Mesh(vpG, vpM);
    this.vp.name = 'visual-point';
    this.label = makeLabel('', 'scene-label--eye');
    this.label.center.set(0.5, 0);
  }

  get objects() {
    return [this.lensGroup, this.eyeHolder, this.sight.mesh, this.noLens.mesh, this.frameTube.mesh, this.vp, this.label];
  }

  dispose(): void {
    this.label.removeFromParent();
    this.lens.dispose();
    this.edged.dispose();
    this.eye.dispose();
    this.sight.dispose();
    this.noLens.dispose();
    this.frameTube.dispose();
    this.lensGroup.removeFromParent();
    this.eyeHolder.removeFromParent();
  }
}

/** The scene's content; rebuilt whole by rebuildContent (tests check it leaks nothing). */
class Content {
  readonly root = new Group();
  readonly unit = new CylinderGeometry(1, 1, 1, 10, 1, true);
  readonly ocG = new TorusGeometry(1.1, 0.16, 8, 32);
  readonly ocM = new MeshBasicMaterial({ color: COLORS.oc });
  readonly vpG = new SphereGeometry(0.8, 16, 12);
  readonly vpM = new MeshBasicMaterial({ color: COLORS.visualPoint });
  readonly targetG = new SphereGeometry(3, 20, 14);
  readonly targetM = new MeshBasicMaterial({ color: COLORS.visualPoint });
  readonly target: Mesh;
  readonly targetLabel: CSS2DObject;
  readonly bridge: RayTube;
  readonly right: EyeContent;
  readonly left: EyeContent;

  constructor() {
    this.right = new EyeContent(this.unit, this.ocG, this.ocM, this.vpG, this.vpM);
    this.left = new EyeContent(this.unit, this.ocG, this.ocM, this.vpG, this.vpM);
    this.bridge = new RayTube(this.unit, { color: FRAME_COLOR, radiusMm: 0.45 }, 4);
    this.target = new Mesh(this.targetG, this.targetM);
    this.target.name = 'target';
    this.targetLabel = makeLabel('', 'scene-label--target');
    // to the left of the target, a little below it
    this.targetLabel.center.set(1.04, -0.2);
    this.root.add(...this.right.objects, ...this.left.objects, this.bridge.mesh, this.target, this.targetLabel);
  }

  dispose(): void {
    this.targetLabel.removeFromParent();
    this.right.dispose();
    this.left.dispose();
    this.bridge.dispose();
    for (const g of [this.unit, this.ocG, this.vpG, this.targetG]) g.dispose();
    for (const m of [this.ocM, this.vpM, this.targetM]) m.dispose();
    this.root.removeFromParent();
  }
}

const _m = new Matrix4();
const _v = new Vector3();
const _hit = new Hit();
const _pts = new Float64Array(3 * (FRAME_POINTS + 1));
const _op = new Float64Array(4);
const _line = new Float64Array(12);
const _end = new Float64Array(3);

export class BinocularScene {
  readonly viewer: Viewer;
  private content = new Content();
  private last: BinocularSceneInput | null = null;
  private framed = false;
  private view: BinocularViewName = 'overview';
  /** extents for the preset views, mm (binocular frame) */
  private spanX = 120;
  private lensZ = 27;
  private nearZ = -40;
  private farZ = 300;
  private lowY = -60;
  private highY = 30;

  constructor(container: HTMLElement) {
    this.viewer = new Viewer(container);
    this.viewer.renderer.domElement.setAttribute('aria-label', '3-D view of both eyes, both lenses and the lines of sight to the target');
    this.content.root.visible = false;
    this.viewer.scene.add(this.content.root);
  }

  update(input: BinocularSceneInput): void {
    this.last = input;
    const c = this.content;
    c.root.visible = true;
    const t = input.target;
    let maxR = 20;
    // the far ends of the drawn lines (for the preset views and a reading level's label)
    let endX = 0, endY = 0, endZ = 0, lowEnd = 0, farEnd = 0, ends = 0;
    const boxes = input.frame;
    for (const [d, e, box] of [[input.right, c.right, boxes?.right ?? null], [input.left, c.left, boxes?.left ?? null]] as const) {
      if (this.updateEye(d, e, t, box)) {
        endX += _end[0]!; endY += _end[1]!; endZ += _end[2]!;
        lowEnd = Math.min(lowEnd, _end[1]!);
        farEnd = Math.max(farEnd, _end[2]!);
        ends++;
      }
      if (d.lens && !box) maxR = Math.max(maxR, d.lens.radiusMm);
      if (box) maxR = Math.max(maxR, box.yMax, -box.yMin);
    }
    // the frame: its outline round each lens, and a bridge between their upper inner corners
    if (input.frame) {
      const r = this.frameOn(input.right, c.right);
      const l = this.frameOn(input.left, c.left);
      _line.set(r, 0);
      _line.set(l, 3);
      c.bridge.setPolyline(_line, 2);
    } else {
      c.right.frameTube.clear();
      c.left.frameTube.clear();
      c.bridge.clear();
    }
    // the target
    // beside a target (to its left, a little below); for a reading level, ending under the lines' ends
    if (t) c.targetLabel.center.set(1.04, -0.2);
    else c.targetLabel.center.set(1, -0.4);
    if (t && t.kind === 'point') {
      c.target.visible = true;
      c.target.position.set(t.x, t.y, t.z);
      c.targetLabel.position.set(t.x, t.y, t.z);
    } else if (t) {
      c.target.visible = false;
      const n = Math.hypot(t.x, t.y, t.z);
      c.targetLabel.position.set((t.x / n) * DISTANCE_RAY_MM, (t.y / n) * DISTANCE_RAY_MM - 6, (t.z / n) * DISTANCE_RAY_MM);
    } else {
      // a reading level: no target; the label sits between the ends of the two lines
      c.target.visible = false;
      if (ends) c.targetLabel.position.set(endX / ends, endY / ends - 6, endZ / ends);
      else c.targetLabel.position.set(0, -20, LEVEL_RAY_MM);
    }
    c.targetLabel.element.textContent = input.targetLabel;
    // extents for the preset views
    this.spanX = boxes
      ? 2 * Math.max(-boxes.right.xMin, boxes.left.xMax, -boxes.left.xMin, boxes.right.xMax) + 16
      : 2 * (Math.max(Math.abs(input.right.crXMm), Math.abs(input.left.crXMm)) + maxR) + 16;
    this.lensZ = 0.5 * (input.right.placement.vz + input.left.placement.vz);
    this.nearZ = -22;
    this.farZ = t?.kind === 'point' ? t.z + 20 : t ? DISTANCE_RAY_MM + 10 : Math.max(farEnd, 60) + 20;
    this.lowY = Math.min(-maxR - 8, t?.kind === 'point' ? t.y - 20 : t ? -maxR - 8 : lowEnd - 20);
    this.highY = Math.max(maxR + 8, t?.kind === 'point' ? t.y + 20 : maxR + 8);
    if (!this.framed) {
      this.framed = true;
      this.setView(this.view);
    }
    this.viewer.requestRender();
  }

  /**
   * Draw one eye, its lens and its lines. Returns true with the far end of its line of sight
   * in _end when it has one.
   */
  private updateEye(d: EyeDrawing, e: EyeContent, t: Target | null, box: FrameBox | null): boolean {
    const pl = d.placement;
    const r = pl.r;
    // lens frame -> binocular frame: rotate, then move to the back vertex and the eye's CR
    _m.set(r[0]!, r[1]!, r[2]!, pl.vx + d.crXMm, r[3]!, r[4]!, r[5]!, pl.vy, r[6]!, r[7]!, r[8]!, pl.vz, 0, 0, 0, 1);
    e.lensGroup.matrix.copy(_m);
    e.lensGroup.matrixWorldNeedsUpdate = true;
    // the OC in the binocular frame, before tilting: the lens frame's origin for the box
    if (box) boxOutline(box, d.crXMm + pl.vx, pl.vy, e.outline);
    e.lens.group.visible = d.lens !== null && !box;
    e.edged.group.visible = d.lens !== null && !!box;
    if (d.lens && box) {
      e.edged.update(d.lens, e.outline);
      e.edged.setInvalid(false);
    } else if (d.lens) {
      e.lens.update(d.lens);
      e.lens.setInvalid(false);
    }
    e.eyeHolder.position.set(d.crXMm, 0, 0);
    e.label.element.textContent = d.label;
    // under the lens: under the frame's shape, or under the round blank
    const labelX = box ? e.outline.cx : 0;
    const labelY = box ? e.outline.cy - e.outline.hh - 4 : -(d.lens ? d.lens.radiusMm : 25) - 4;
    const lp = pl.toEyePoint(labelX, labelY, 0);
    e.label.position.set(lp.x + d.crXMm, lp.y, lp.z);
    const tr = d.trace;
    // without lenses: straight from the CR at the target; for a reading level (no target),
    // along the object-side ray, the way the eye would look at the same object without lenses
    _line[0] = d.crXMm; _line[1] = 0; _line[2] = 0;
    if (t && t.kind === 'point') {
      _line[3] = t.x; _line[4] = t.y; _line[5] = t.z;
      e.noLens.setPolyline(_line, 2);
    } else if (t) {
      const n = Math.hypot(t.x, t.y, t.z);
      _line[3] = d.crXMm + (t.x / n) * DISTANCE_RAY_MM; _line[4] = (t.y / n) * DISTANCE_RAY_MM; _line[5] = (t.z / n) * DISTANCE_RAY_MM;
      e.noLens.setPolyline(_line, 2);
    } else if (tr) {
      const o = pl.toEyeDir(tr.ox, tr.oy, tr.oz);
      _line[3] = d.crXMm + o.x * LEVEL_RAY_MM; _line[4] = o.y * LEVEL_RAY_MM; _line[5] = o.z * LEVEL_RAY_MM;
      e.noLens.setPolyline(_line, 2);
    } else {
      // a reading level without a line of sight: straight ahead, nothing to compare with
      _line[3] = d.crXMm; _line[4] = 0; _line[5] = LEVEL_RAY_MM;
      e.noLens.clear();
    }
    if (!tr) {
      e.sight.clear();
      e.vp.visible = false;
      const n = Math.hypot(_line[3]! - _line[0]!, _line[4]!, _line[5]!);
      e.eye.update(0, (_line[3]! - _line[0]!) / n, _line[4]! / n, _line[5]! / n);
      return false;
    }
    const g = pl.toEyeDir(tr.ax, tr.ay, tr.az);
    e.eye.update(0, g.x, g.y, g.z);
    const b = pl.toEyePoint(tr.bx, tr.by, tr.bz);
    const f = pl.toEyePoint(tr.fx, tr.fy, tr.fz);
    const o = pl.toEyeDir(tr.ox, tr.oy, tr.oz);
    let len = t ? DISTANCE_RAY_MM : LEVEL_RAY_MM;
    if (t && t.kind === 'point') {
      // to the target: the object-side ray passes through it (the fixation converged)
      len = (t.x - d.crXMm - f.x) * o.x + (t.y - f.y) * o.y + (t.z - f.z) * o.z;
      if (!(len > 0)) len = DISTANCE_RAY_MM;
    }
    _line[0] = d.crXMm; _line[1] = 0; _line[2] = 0;
    _line[3] = b.x + d.crXMm; _line[4] = b.y; _line[5] = b.z;
    _line[6] = f.x + d.crXMm; _line[7] = f.y; _line[8] = f.z;
    _line[9] = f.x + d.crXMm + o.x * len; _line[10] = f.y + o.y * len; _line[11] = f.z + o.z * len;
    e.sight.setPolyline(_line, 4);
    e.vp.visible = true;
    e.vp.position.set(b.x + d.crXMm, b.y, b.z);
    _end[0] = _line[9]!; _end[1] = _line[10]!; _end[2] = _line[11]!;
    return true;
  }

  /**
   * Draw the frame's outline round its lens (the edged lens's own outline, each point halfway
   * between the surfaces), and return its upper inner corner in the binocular frame.
   */
  private frameOn(d: EyeDrawing, e: EyeContent): [number, number, number] {
    const o = e.outline;
    for (let k = 0; k <= FRAME_POINTS; k++) {
      outlinePoint(o, k / FRAME_POINTS, _op);
      this.onLens(d, _op[0]!, _op[1]!, k);
    }
    e.frameTube.setPolyline(_pts, FRAME_POINTS + 1);
    // the upper inner (nasal) end of the straight side, for the bridge: the right eye's nasal
    // side is towards +x, the left eye's towards -x
    const nasal = d.eye === 'R' ? 1 : -1;
    this.onLens(d, o.cx + nasal * o.hw, o.cy + o.hh - o.r, 0);
    return [_pts[0]!, _pts[1]!, _pts[2]!];
  }

  /** A lens-frame point (x, y) halfway through the lens, in the binocular frame, into _pts[k]. */
  private onLens(d: EyeDrawing, x: number, y: number, k: number): void {
    let z = 0;
    const lens = d.lens;
    if (lens) {
      let zf = lens.ctMm, zb = 0;
      if (lens.front.pointAt(x, y, _hit)) zf = _hit.z;
      if (lens.back.pointAt(x, y, _hit)) zb = _hit.z;
      z = 0.5 * (zf + zb);
    }
    const p = d.placement.toEyePoint(x, y, z);
    _pts[3 * k] = p.x + d.crXMm;
    _pts[3 * k + 1] = p.y;
    _pts[3 * k + 2] = p.z;
  }

  /** The inputs no longer make a case: keep the last drawing, the glass tinted as invalid. */
  markInvalid(): void {
    for (const e of [this.content.right, this.content.left]) {
      e.lens.setInvalid(true);
      e.edged.setInvalid(true);
    }
    this.viewer.requestRender();
  }

  setView(name: BinocularViewName): void {
    this.view = name;
    const cam = this.viewer.camera;
    const vfov = (cam.fov * Math.PI) / 180;
    const tanV = Math.tan(vfov / 2), aspect = Math.max(0.2, cam.aspect);
    // distance at which a w x h area (mm, across and up the screen) fills the view
    const fit = (w: number, h: number): number => Math.max(h / 2 / tanV, w / 2 / (tanV * aspect));
    const focus = new Vector3();
    const dir = new Vector3();
    let dist: number;
    cam.up.set(0, 1, 0);
    switch (name) {
      case 'front':
        focus.set(0, 0, this.lensZ);
        dir.set(0, 0, 1);
        dist = fit(this.spanX * 1.05, this.spanX * 0.6) + this.lensZ;
        break;
      case 'top':
        focus.set(0, 0, (this.nearZ + this.farZ) / 2);
        dir.set(0, 1, 0.0001);
        cam.up.set(0, 0, -1);
        dist = fit(this.spanX * 1.1, (this.farZ - this.nearZ) * 1.1);
        break;
      case 'side':
        focus.set(0, (this.lowY + this.highY) / 2, (this.nearZ + this.farZ) / 2);
        dir.set(-1, 0, 0);
        dist = fit((this.farZ - this.nearZ) * 1.1, (this.highY - this.lowY) * 1.15);
        break;
      default:
        focus.set(0, -4, this.lensZ * 0.55);
        dir.set(-0.55, 0.42, 0.72);
        dist = fit(this.spanX * 1.25, this.spanX * 0.9);
        break;
    }
    dir.normalize();
    cam.position.copy(focus).addScaledVector(dir, dist);
    cam.far = Math.max(4000, dist * 4);
    cam.updateProjectionMatrix();
    this.viewer.controls.target.copy(focus);
    cam.lookAt(focus);
    this.viewer.controls.update();
    this.showLabelsFor(name);
    this.viewer.requestRender();
  }

  /** Seen from above or from the side the two eyes' labels fall on each other: show them from the front. */
  private showLabelsFor(name: BinocularViewName): void {
    const on = name === 'overview' || name === 'front';
    this.content.right.label.visible = on;
    this.content.left.label.visible = on;
  }

  /** Dispose and recreate every scene object (the disposal test). */
  rebuildContent(): void {
    const old = this.content;
    this.content = new Content();
    this.viewer.scene.add(this.content.root);
    this.showLabelsFor(this.view);
    if (this.last) this.update(this.last);
    old.root.visible = false;
    this.viewer.renderNow();
    old.dispose();
  }

  /** Screen position (CSS px) of a named point, for tests: 'right-vp', 'left-vp', 'target'. */
  clientPosition(which: 'right-vp' | 'left-vp' | 'target'): { x: number; y: number } {
    const o = which === 'target' ? this.content.target : which === 'right-vp' ? this.content.right.vp : this.content.left.vp;
    o.getWorldPosition(_v).project(this.viewer.camera);
    const rect = this.viewer.renderer.domElement.getBoundingClientRect();
    return { x: rect.left + ((_v.x + 1) / 2) * rect.width, y: rect.top + ((1 - _v.y) / 2) * rect.height };
  }

  /**
   * For tests: how each lens is drawn ('edged' to the frame, a 'round' blank, or 'none') and
   * the extent of the drawn glass in the binocular frame, mm.
   */
  lensExtents(): Record<'right' | 'left', { shape: 'edged' | 'round' | 'none'; xMin: number; xMax: number; yMin: number; yMax: number }> {
    const one = (e: EyeContent) => {
      const g = e.edged.group.visible ? e.edged.group : e.lens.group.visible ? e.lens.group : null;
      e.lensGroup.updateMatrixWorld(true);
      const b = new Box3();
      if (g) b.setFromObject(g);
      return {
        shape: g === e.edged.group ? 'edged' as const : g ? 'round' as const : 'none' as const,
        xMin: g ? b.min.x : 0, xMax: g ? b.max.x : 0, yMin: g ? b.min.y : 0, yMax: g ? b.max.y : 0,
      };
    };
    return { right: one(this.content.right), left: one(this.content.left) };
  }

  dispose(): void {
    this.content.dispose();
    this.viewer.dispose();
  }
}
