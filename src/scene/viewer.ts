/**
 * The 3-D viewport: renderer, camera, orbit controls, labels, lights and preset views.
 * Renders on demand (a change or a camera move asks for one frame). Scene units are mm in
 * the lens frame (origin at the back vertex, x towards the wearer's left, y up, z towards
 * the object), which is three.js's own frame seen by an observer facing the wearer.
 */
import {
  AmbientLight, Color, DirectionalLight, HemisphereLight, PerspectiveCamera, PointLight, Scene, Vector3,
  WebGLRenderer,
} from 'three';
import { OrbitControls } from 'three/examples/jsm/controls/OrbitControls.js';
import { CSS2DRenderer } from 'three/examples/jsm/renderers/CSS2DRenderer.js';
import { COLORS } from './palette.ts';

export type ViewName = 'oblique' | 'front' | 'top' | 'side' | 'behind';

export const VIEW_NAMES: Record<ViewName, string> = {
  oblique: 'Overview',
  front: 'Front',
  top: 'Top',
  side: 'Side',
  behind: 'Behind the eye',
};

const _f = new Vector3();

export class Viewer {
  readonly scene = new Scene();
  readonly camera: PerspectiveCamera;
  readonly renderer: WebGLRenderer;
  readonly labels: CSS2DRenderer;
  readonly controls: OrbitControls;
  /** frames rendered so far (tests and the benchmark read it) */
  frames = 0;
  /** called after each frame */
  onAfterRender: (() => void) | null = null;
  /** called before the labels are placed, with the viewport's size in CSS pixels */
  onBeforeLabels: ((width: number, height: number) => void) | null = null;
  private width = 1;
  private height = 1;
  private readonly container: HTMLElement;
  private readonly resizeObserver: ResizeObserver;
  private pending = 0;
  private focus = new Vector3(0, 0, 0);
  private sizeMm = 60;
  private framed = false;
  private view: ViewName = 'oblique';

  constructor(container: HTMLElement) {
    this.container = container;
    this.renderer = new WebGLRenderer({ antialias: true, preserveDrawingBuffer: true });
    this.renderer.setPixelRatio(Math.min(window.devicePixelRatio, 2));
    this.renderer.domElement.className = 'viewport-canvas';
    this.renderer.domElement.setAttribute('aria-label', '3-D view of the lens, the eye and the line of sight');
    this.renderer.domElement.setAttribute('role', 'img');
    container.appendChild(this.renderer.domElement);
    this.labels = new CSS2DRenderer();
    this.labels.domElement.className = 'viewport-labels';
    container.appendChild(this.labels.domElement);

    this.scene.background = new Color(COLORS.background);
    this.scene.add(new HemisphereLight(0xdfeeff, 0x1a2230, 0.9), new AmbientLight(0xffffff, 0.25));
    const key = new DirectionalLight(0xffffff, 1.6);
    key.position.set(60, 90, 120);
    const rim = new DirectionalLight(0xbfd8ff, 0.8);
    rim.position.set(-80, -40, -60);
    // a soft light near the viewer's side gives the glass its highlights (no environment map:
    // prefiltering one costs seconds of start-up under software WebGL)
    const fill = new PointLight(0xffffff, 2.2, 0, 0);
    fill.position.set(-120, 60, 90);
    this.scene.add(key, rim, fill);

    this.camera = new PerspectiveCamera(30, 1, 1, 4000);
    this.controls = new OrbitControls(this.camera, this.renderer.domElement);
    this.controls.enableDamping = false;
    this.controls.screenSpacePanning = true;
    this.controls.addEventListener('change', () => this.requestRender());
    this.setView('oblique');

    this.resizeObserver = new ResizeObserver(() => this.resize());
    this.resizeObserver.observe(container);
    this.resize();
  }

  /** Called when a preset view is chosen (the scene shows or hides furniture for it). */
  onView: ((name: ViewName) => void) | null = null;
  private lensSizeMm = 60;

  /** What the preset views frame: a point and the scene's size, and the lens's size (mm). */
  setFrame(focus: Vector3, sizeMm: number, lensSizeMm: number): void {
    this.focus.copy(focus);
    this.sizeMm = sizeMm;
    this.lensSizeMm = lensSizeMm;
    // the first frame places the camera; later ones leave the person's camera alone
    if (!this.framed) {
      this.framed = true;
      this.setView(this.view);
    }
  }

  setView(name: ViewName): void {
    this.view = name;
    const f = name === 'front' || name === 'behind' ? _f.set(0, 0, 0) : this.focus;
    const fov = (this.camera.fov * Math.PI) / 180;
    // looking along the axis the lens fills the view; from other sides the whole scene does
    const along = name === 'front' || name === 'behind';
    const d = (0.5 * (along ? this.lensSizeMm : this.sizeMm)) / Math.tan(fov / 2);
    const dir = new Vector3();
    switch (name) {
      case 'front': dir.set(0, 0, 1); break;
      case 'top': dir.set(0, 1, 0.0001); break;
      case 'side': dir.set(-1, 0, 0); break;
      case 'behind': dir.set(0, 0, -1); break;
      default: dir.set(-0.85, 0.42, 0.42); break;
    }
    dir.normalize();
    this.camera.up.set(0, 1, 0);
    if (name === 'top') this.camera.up.set(0, 0, -1);
    this.camera.position.copy(f).addScaledVector(dir, d);
    this.controls.target.copy(f);
    this.camera.lookAt(f);
    this.controls.update();
    this.onView?.(name);
    this.requestRender();
  }

  requestRender(): void {
    if (this.pending) return;
    this.pending = requestAnimationFrame(() => {
      this.pending = 0;
      this.renderNow();
    });
  }

  renderNow(): void {
    this.renderer.render(this.scene, this.camera);
    this.onBeforeLabels?.(this.width, this.height);
    this.labels.render(this.scene, this.camera);
    this.frames++;
    this.onAfterRender?.();
  }

  resize(): void {
    const w = Math.max(1, this.container.clientWidth);
    const h = Math.max(1, this.container.clientHeight);
    this.width = w;
    this.height = h;
    this.renderer.setSize(w, h, false);
    this.labels.setSize(w, h);
    this.camera.aspect = w / h;
    this.camera.updateProjectionMatrix();
    this.renderNow();
  }

  dispose(): void {
    if (this.pending) cancelAnimationFrame(this.pending);
    this.resizeObserver.disconnect();
    this.controls.dispose();
    this.renderer.dispose();
    this.renderer.domElement.remove();
    this.labels.domElement.remove();
  }
}
