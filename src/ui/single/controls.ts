/**
 * The controls (lil-gui): prescription, lens, fitting, line of sight and display.
 *
 * Numeric fields are text fields read by src/case (so "2.5 mm" and "0.25 cm" both work and a
 * bad value gets a message naming the field), with the arrow keys stepping the value
 * (a decimal comma is read by decimalPoint in ../numberInput.ts; "1,234.5" is refused)
 * (Shift: ten steps). Choices are selects. Nothing here computes optics.
 */
import GUI, { type Controller } from 'lil-gui';
import { readNumber, type Quantity } from '../../case/input.ts';
import type { ViewCase, ViewDisplay, ViewField } from '../../case/url.ts';
import { MATERIALS } from '../../optics/index.ts';
import { InputError } from '../../case/input.ts';
import { FORM_NEAR_MM, FORM_ROTATION_DEG, type PointFocalAsk } from './pointFocal.ts';
import { decimalPoint, enableArrowSteps, errorSlot, folderHint, formatStep, pointInField, lensFormVisibility, showFieldError } from '../numberInput.ts';

interface NumberField {
  key: ViewField;
  label: string;
  quantity: Quantity;
  step: number;
  decimals: number;
}

const NUMBER_FIELDS: Record<string, NumberField> = {
  sphere: { key: 'sphere', label: 'Sphere (D)', quantity: 'power', step: 0.25, decimals: 2 },
  cyl: { key: 'cyl', label: 'Cylinder (D)', quantity: 'power', step: 0.25, decimals: 2 },
  axis: { key: 'axis', label: 'Axis (°)', quantity: 'angle', step: 5, decimals: 0 },
  index: { key: 'index', label: 'Refractive index', quantity: 'plain', step: 0.01, decimals: 3 },
  abbe: { key: 'abbe', label: 'Abbe number', quantity: 'plain', step: 1, decimals: 0 },
  front: { key: 'front', label: 'Front power, true (D)', quantity: 'power', step: 0.25, decimals: 2 },
  base: { key: 'base', label: 'Front power, nominal (D)', quantity: 'power', step: 0.25, decimals: 2 },
  toolIndex: { key: 'toolIndex', label: 'Tool index', quantity: 'plain', step: 0.01, decimals: 3 },
  ct: { key: 'ct', label: 'Centre thickness (mm)', quantity: 'length', step: 0.1, decimals: 1 },
  minEdge: { key: 'minEdge', label: 'Min edge (mm)', quantity: 'length', step: 0.1, decimals: 1 },
  minCt: { key: 'minCt', label: 'Min centre (mm)', quantity: 'length', step: 0.1, decimals: 1 },
  diameter: { key: 'diameter', label: 'Diameter (mm)', quantity: 'length', step: 1, decimals: 0 },
  frontK: { key: 'frontK', label: 'Front conic k', quantity: 'plain', step: 0.1, decimals: 2 },
  backK: { key: 'backK', label: 'Back conic k', quantity: 'plain', step: 0.1, decimals: 2 },
  cr: { key: 'cr', label: 'Back vertex to CR (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  x: { key: 'x', label: 'Visual point x (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  y: { key: 'y', label: 'Visual point y (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  dir: { key: 'dir', label: 'Direction (° from +x)', quantity: 'angle', step: 5, decimals: 0 },
  dist: { key: 'dist', label: 'Distance from OC (mm)', quantity: 'length', step: 0.5, decimals: 1 },
};

export interface ControlHandlers {
  onCase(c: ViewCase, field: ViewField): void;
  /** a number field holds text the decimal comma rule refuses (the case is not sent) */
  onRefused(field: ViewField, message: string): void;
  onDisplay(d: ViewDisplay): void;
  onRestoreDemo(): void;
  onCopyLink(): void;
  /** the pencil toggle of the 3-D view (a view setting of this page, not part of the link) */
  onPencil?(on: boolean): void;
  /** find the point-focal front for the case on screen and apply it (returns what to say) */
  onPointFocal?(ask: PointFocalAsk): { ok: boolean; message: string };
}

export class Controls {
  readonly gui: GUI;
  private readonly model: ViewCase;
  private readonly display: ViewDisplay;
  private readonly ctrl = new Map<ViewField, Controller>();
  private readonly errorEls = new Map<ViewField, HTMLElement>();
  private readonly handlers: ControlHandlers;
  private magNote: HTMLElement | null = null;
  /** view settings kept on this page only */
  private readonly view = { pencil: false };
  /** the point-focal control's inputs, as typed */
  private readonly pfAsk: PointFocalAsk = { rotation: String(FORM_ROTATION_DEG), target: 'distance', near: String(FORM_NEAR_MM) };

  constructor(container: HTMLElement, initial: ViewCase, display: ViewDisplay, handlers: ControlHandlers) {
    this.model = { ...initial };
    this.display = { ...display };
    this.handlers = handlers;
    this.gui = new GUI({ container, title: 'Case', width: 280 });
    this.gui.domElement.classList.add('controls-gui');

    const rx = this.gui.addFolder('Prescription');
    this.num(rx, 'sphere');
    this.num(rx, 'cyl');
    this.num(rx, 'axis');
    this.choice(rx, 'eye', 'Eye', { 'Right (R)': 'R', 'Left (L)': 'L' });

    const lens = this.gui.addFolder('Lens');
    const mats: Record<string, string> = {};
    for (const m of MATERIALS) mats[m.name.replace(/\s*\(.*\)$/, '')] = m.id;
    mats['custom index and Abbe'] = 'custom';
    this.choice(lens, 'material', 'Material', mats);
    this.num(lens, 'index');
    this.num(lens, 'abbe');
    this.choice(lens, 'frontMode', 'Front curve', {
      'Automatic (rule)': 'auto', 'True power': 'true', 'Nominal + tool index': 'nominal',
    });
    this.num(lens, 'front');
    this.num(lens, 'base');
    this.num(lens, 'toolIndex');
    this.choice(lens, 'thicknessMode', 'Thickness', {
      'Min edge / centre': 'rule', 'Centre thickness': 'centre',
    });
    this.num(lens, 'ct');
    this.num(lens, 'minEdge');
    this.num(lens, 'minCt');
    this.num(lens, 'diameter');
    this.num(lens, 'frontK');
    this.num(lens, 'backK');
    this.choice(lens, 'cylOn', 'Cylinder on', { 'Back surface': 'back', 'Front surface': 'front' });
    this.choice(lens, 'toric', 'Toric form', { Tyre: 'tyre', Barrel: 'barrel' });
    this.pointFocalControls(lens, handlers);

    const fit = this.gui.addFolder('Fitting');
    this.num(fit, 'cr');

    const los = this.gui.addFolder('Line of sight');
    this.choice(los, 'pointMode', 'Visual point as', { 'x, y': 'xy', 'Direction, distance': 'polar' });
    this.num(los, 'x');
    this.num(los, 'y');
    this.num(los, 'dir');
    this.num(los, 'dist');
    folderHint(los, 'x towards the wearer’s left, y up, seen facing the wearer. Drag the yellow point in the 3-D view, or click the map.');

    const disp = this.gui.addFolder('Display');
    disp.add(this.display, 'mag', { 'none (to scale)': 1, '×2': 2, '×5': 5, '×10': 10, '×20': 20, '×50': 50, '×100': 100 })
      .name('Magnify deviations').onChange(() => this.emitDisplay());
    this.magNote = folderHint(disp);
    disp.add(this.display, 'labels').name('Labels in 3-D view').onChange(() => this.emitDisplay());
    disp.add(this.display, 'focimeterRay').name('Show focimeter beam').onChange(() => this.emitDisplay());
    const pencil = disp.add(this.view, 'pencil').name('Show pencil, focal lines').onChange((on: boolean) => handlers.onPencil?.(on));
    pencil.domElement.setAttribute('data-field', 'pencil');
    pencil.domElement.querySelector('input')?.setAttribute('data-field', 'pencil');
    pencil.domElement.title = 'Draw the pencil of rays that reaches the eye along the line of sight (drawn 4 mm wide at the vertex sphere) and its two focal lines (dashed: virtual)';
    disp.add(this.display, 'mapQuantity', { 'Exact prism (Δ)': 'exact', 'Prentice error (%)': 'error' })
      .name('Map shows').onChange(() => this.emitDisplay());

    const act = this.gui.addFolder('Case');
    act.add({ restore: () => handlers.onRestoreDemo() }, 'restore').name('Restore the demo case');
    act.add({ copy: () => handlers.onCopyLink() }, 'copy').name('Copy a link to this case');

    this.gui.folders.forEach((f) => f.domElement.setAttribute('data-folder', f._title));
    this.refreshVisibility();
    this.updateMagNote();
  }

  /**
   * The point-focal form: an eye rotation, a distant or near target, and a button that asks
   * the workspace to find the front curve free of astigmatic error there and apply it.
   */
  private pointFocalControls(lens: GUI, handlers: ControlHandlers): void {
    const f = lens.addFolder('Point-focal front');
    f.domElement.setAttribute('data-folder', 'Point-focal front');
    const ask = this.pfAsk;
    const rot = f.add(ask, 'rotation').name('Eye rotation (°)');
    rot.domElement.querySelector('input')?.setAttribute('data-field', 'pfRotation');
    const target = f.add(ask, 'target', { Distance: 'distance', Near: 'near' }).name('Target');
    target.domElement.querySelector('select')?.setAttribute('data-field', 'pfTarget');
    const near = f.add(ask, 'near').name('Near distance (mm)');
    near.domElement.querySelector('input')?.setAttribute('data-field', 'pfNear');
    near.show(ask.target === 'near');
    target.onChange(() => near.show(ask.target === 'near'));
    const msg = document.createElement('p');
    msg.className = 'controls-hint pf-message';
    msg.setAttribute('role', 'status');
    msg.textContent = 'Finds the true front power that makes this spherical lens free of astigmatic error at the eye rotation (exact trace), and applies it.';
    const go = f.add({ go: () => {
      const out = handlers.onPointFocal?.({ ...ask });
      if (!out) return;
      msg.textContent = out.message;
      msg.classList.toggle('pf-refused', !out.ok);
    } }, 'go').name('Find and apply the point-focal front');
    go.domElement.setAttribute('data-action', 'point-focal');
    f.$children.appendChild(msg);
    f.close();
  }

  /** Put a whole case into the fields (restore, URL, or a point picked in a view). */
  setCase(c: ViewCase): void {
    Object.assign(this.model, c);
    for (const ctl of this.ctrl.values()) ctl.updateDisplay();
    this.refreshVisibility();
  }

  getCase(): ViewCase {
    return { ...this.model };
  }

  setDisplay(d: ViewDisplay): void {
    Object.assign(this.display, d);
    for (const c of this.gui.controllersRecursive()) c.updateDisplay();
    this.updateMagNote();
  }

  /** Show one message beside its field (or clear all messages when message is null). */
  showError(field: ViewField | null, message: string | null): void {
    showFieldError(this.errorEls, this.ctrl, field, message);
  }


  private num(folder: GUI, key: keyof typeof NUMBER_FIELDS): void {
    const spec = NUMBER_FIELDS[key]!;
    const c = folder.add(this.model, spec.key).name(spec.label);
    c.domElement.setAttribute('data-field', spec.key);
    const input = c.domElement.querySelector('input') as HTMLInputElement;
    input.setAttribute('data-field', spec.key);
    input.setAttribute('aria-describedby', `err-${spec.key}`);
    enableArrowSteps(input, spec, (text) => c.setValue(text));
    c.onChange(() => {
      pointInField(this.model as unknown as Record<string, unknown>, spec.key, spec.label, input);
      this.emitCase(spec.key);
    });
    this.attachError(spec.key, c);
  }

  private choice(folder: GUI, key: ViewField, label: string, options: Record<string, string>): void {
    const c = folder.add(this.model, key, options).name(label);
    c.domElement.setAttribute('data-field', key);
    c.domElement.querySelector('select')?.setAttribute('data-field', key);
    c.onChange(() => {
      if (key === 'pointMode') this.syncPointMode();
      this.refreshVisibility();
      this.emitCase(key);
    });
    this.attachError(key, c);
  }

  private attachError(key: ViewField, c: Controller): void {
    this.ctrl.set(key, c);
    this.errorEls.set(key, errorSlot(c.domElement, `err-${key}`));
  }

  /** Keep the visual point where it is when switching between x, y and direction, distance. */
  private syncPointMode(): void {
    const m = this.model;
    try {
      if (m.pointMode === 'polar') {
        const x = readNumber('x', m.x, 'length'), y = readNumber('y', m.y, 'length');
        let a = (Math.atan2(y, x) * 180) / Math.PI;
        if (a < 0) a += 360;
        m.dir = formatStep(Math.hypot(x, y) > 0 ? a : 0, { step: 0.1, decimals: 1 });
        m.dist = formatStep(Math.hypot(x, y), { step: 0.1, decimals: 1 });
      } else {
        const a = (readNumber('dir', m.dir, 'angle') * Math.PI) / 180, d = readNumber('dist', m.dist, 'length');
        m.x = formatStep(d * Math.cos(a), { step: 0.1, decimals: 1 });
        m.y = formatStep(d * Math.sin(a), { step: 0.1, decimals: 1 });
      }
    } catch {
      // the old fields were not valid numbers: leave the new ones as they were
    }
    for (const k of ['x', 'y', 'dir', 'dist'] as const) this.ctrl.get(k)?.updateDisplay();
  }

  refreshVisibility(): void {
    const m = this.model;
    const show = (k: ViewField, v: boolean): void => {
      this.ctrl.get(k)?.show(v);
      const el = this.errorEls.get(k);
      if (el && !v) el.hidden = true;
    };
    for (const [k, v] of lensFormVisibility(m)) show(k as ViewField, v);
    show('x', m.pointMode === 'xy');
    show('y', m.pointMode === 'xy');
    show('dir', m.pointMode === 'polar');
    show('dist', m.pointMode === 'polar');
  }

  private emitCase(field: ViewField): void {
    // a number field whose comma cannot be read keeps the case from being sent, with its hint
    for (const spec of Object.values(NUMBER_FIELDS)) {
      const raw = this.model[spec.key];
      if (typeof raw !== 'string' || !raw.includes(',') || this.ctrl.get(spec.key)?._hidden) continue;
      try {
        decimalPoint(spec.label, raw);
      } catch (e) {
        if (!(e instanceof InputError)) throw e;
        this.handlers.onRefused(spec.key, e.message);
        return;
      }
    }
    this.handlers.onCase({ ...this.model }, field);
  }

  private emitDisplay(): void {
    this.updateMagNote();
    this.handlers.onDisplay({ ...this.display });
  }

  private updateMagNote(): void {
    if (!this.magNote) return;
    this.magNote.textContent = this.display.mag === 1
      ? 'Ray angles are drawn to scale.'
      : `Angles between the object-side rays are drawn ×${this.display.mag}; the exact ray stays to scale.`;
  }

  dispose(): void {
    this.gui.destroy();
  }
}
