/**
 * The range workspace's controls (lil-gui): the family's lens (material, front curve,
 * thickness and diameter, centre of rotation, eye) and the range (spheres, cylinders, axes,
 * directions, tolerances), then the breakdown's levels. Every value is text, read by
 * src/case/range.ts; a refused value is shown under its field. Nothing here computes optics.
 */
import GUI, { type Controller } from 'lil-gui';
import { MATERIALS } from '../../optics/index.ts';
import { InputError } from '../../case/input.ts';
import { decimalPoint, errorSlot, pointInField, lensFormVisibility, showFieldError } from '../numberInput.ts';
import { FAMILY_LABELS, type FamilyForm, type FamilyKey } from './family.ts';

/** Placeholder-like hints beside the range fields. */
const HINTS: Partial<Record<FamilyKey, string>> = {
  power: 'start:stop:step, or a list a,b,c',
  cyl: 'start:stop:step or a list; either sign',
  axis: 'a list or start:stop:step',
  dir: 'nasal, temporal, up, down and/or degrees',
  maxPrism: 'a list gives several, e.g. 0.25,0.5,1',
  levels: 'percent, e.g. 5,10,20',
};

const LABELS: Record<FamilyKey, string> = {
  eye: 'Eye', material: 'Material', index: 'Refractive index', abbe: 'Abbe number',
  frontMode: 'Front curve', front: 'Front power, true (D)', base: 'Front power, nominal (D)', toolIndex: 'Tool index',
  thicknessMode: 'Thickness', ct: 'Centre thickness (mm)', minEdge: 'Min edge (mm)', minCt: 'Min centre (mm)',
  diameter: 'Diameter (mm)', cylOn: 'Cylinder on', cr: 'Back vertex to CR (mm)',
  power: 'Spheres (D)', cyl: 'Cylinders (D)', axis: 'Axes (°)', dir: 'Directions', maxPrism: 'Tolerances (Δ)',
  levels: 'Breakdown levels (%)', decimals: 'Decimals in files',
};

/** The lens fields that hold one number each (the others are choices or lists). */
const SINGLE_NUMBER: ReadonlySet<FamilyKey> = new Set<FamilyKey>(['index', 'abbe', 'front', 'base', 'toolIndex', 'ct', 'minEdge', 'minCt', 'diameter', 'cr']);

export class RangeControls {
  readonly gui: GUI;
  private readonly model: FamilyForm;
  private readonly ctrl = new Map<FamilyKey, Controller>();
  private readonly errorEls = new Map<FamilyKey, HTMLElement>();

  constructor(container: HTMLElement, initial: FamilyForm, private readonly onChange: (f: FamilyForm, field: FamilyKey) => void, onReset: () => void) {
    this.model = { ...initial };
    this.gui = new GUI({ container, title: 'Lens family', width: 280 });
    this.gui.domElement.classList.add('controls-gui');

    const range = this.gui.addFolder('Range');
    for (const k of ['power', 'cyl', 'axis', 'dir', 'maxPrism'] as const) this.text(range, k);
    this.choice(range, 'eye', { 'Right (R)': 'R', 'Left (L)': 'L' });

    const lens = this.gui.addFolder('Lens');
    const mats: Record<string, string> = {};
    for (const m of MATERIALS) mats[m.name.replace(/\s*\(.*\)$/, '')] = m.id;
    mats['custom index and Abbe'] = 'custom';
    this.choice(lens, 'material', mats);
    this.text(lens, 'index');
    this.text(lens, 'abbe');
    this.choice(lens, 'frontMode', { 'Automatic (rule)': 'auto', 'True power': 'true', 'Nominal + tool index': 'nominal' });
    this.text(lens, 'front');
    this.text(lens, 'base');
    this.text(lens, 'toolIndex');
    this.choice(lens, 'thicknessMode', { 'Min edge / centre': 'rule', 'Centre thickness': 'centre' });
    this.text(lens, 'ct');
    this.text(lens, 'minEdge');
    this.text(lens, 'minCt');
    this.text(lens, 'diameter');
    this.choice(lens, 'cylOn', { 'Back surface': 'back', 'Front surface': 'front' });
    this.text(lens, 'cr');

    const out = this.gui.addFolder('Breakdown and files');
    this.text(out, 'levels');
    this.text(out, 'decimals');

    const act = this.gui.addFolder('Actions');
    act.add({ reset: onReset }, 'reset').name('Restore the example family');

    this.gui.folders.forEach((f) => f.domElement.setAttribute('data-folder', f._title));
    this.refreshVisibility();
  }

  /** Put a whole family into the fields. */
  setForm(f: FamilyForm): void {
    Object.assign(this.model, f);
    for (const c of this.ctrl.values()) c.updateDisplay();
    this.refreshVisibility();
  }

  getForm(): FamilyForm {
    return { ...this.model };
  }

  /** Show one message under its field (or clear all when message is null). */
  showError(field: FamilyKey | null, message: string | null): void {
    showFieldError(this.errorEls, this.ctrl, field, message);
  }


  private text(folder: GUI, key: FamilyKey): void {
    const c = folder.add(this.model, key).name(LABELS[key]);
    c.domElement.setAttribute('data-range-field', key);
    const input = c.domElement.querySelector('input') as HTMLInputElement;
    input.setAttribute('data-range-field', key);
    input.setAttribute('aria-describedby', `range-err-${key}`);
    input.spellcheck = false;
    input.autocomplete = 'off';
    const hint = HINTS[key];
    if (hint) input.title = `${FAMILY_LABELS[key]}: ${hint}`;
    c.onChange(() => {
      // a lens field holds one number: its decimal comma is the app's (decimalPoint); the
      // range fields are lists in the command line's syntax, where a comma separates items
      if (SINGLE_NUMBER.has(key)) {
        pointInField(this.model as unknown as Record<string, unknown>, key, FAMILY_LABELS[key], input);
        try {
          decimalPoint(FAMILY_LABELS[key], String(this.model[key]));
        } catch (e) {
          if (!(e instanceof InputError)) throw e;
          this.showError(key, e.message);
          return;
        }
      }
      this.onChange({ ...this.model }, key);
    });
    this.attach(key, c);
  }

  private choice(folder: GUI, key: FamilyKey, options: Record<string, string>): void {
    const c = folder.add(this.model, key, options).name(LABELS[key]);
    c.domElement.setAttribute('data-range-field', key);
    c.domElement.querySelector('select')?.setAttribute('data-range-field', key);
    c.onChange(() => {
      this.refreshVisibility();
      this.onChange({ ...this.model }, key);
    });
    this.attach(key, c);
  }

  private attach(key: FamilyKey, c: Controller): void {
    this.ctrl.set(key, c);
    this.errorEls.set(key, errorSlot(c.domElement, `range-err-${key}`));
  }

  private refreshVisibility(): void {
    const m = this.model;
    const show = (k: FamilyKey, v: boolean): void => {
      this.ctrl.get(k)?.show(v);
      const el = this.errorEls.get(k);
      if (el && !v) el.hidden = true;
    };
    for (const [k, v] of lensFormVisibility(m)) show(k as FamilyKey, v);
  }

  dispose(): void {
    this.gui.destroy();
  }
}
