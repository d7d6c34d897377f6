/**
 * The "both eyes" controls (lil-gui): each eye's prescription (with any prescribed prism),
 * lens and fitting; the frame and where the optical centres sit; tilt, wrap and the tilt
 * drop; the target (distance, a near point or a reading level); the tolerance profile; the
 * clinician summary's free text.
 *
 * Numeric fields are text read by src/case (so "2.5 mm" and "0.25 cm" both work), with the
 * arrow keys stepping the value (Shift: ten steps). Every edit hands the whole form to
 * onEdit, which builds a document and gives it to the store; a refused value comes back
 * through showError and is shown under its field. Nothing here computes optics.
 */
import GUI, { type Controller } from 'lil-gui';
import { MATERIALS } from '../../optics/index.ts';
import { enableArrowSteps, errorSlot, folderHint, pointInField } from '../numberInput.ts';
import {
  type BinocularForm, type CaseKey, type EyeKey, type FormField, SIDES, type Side, EYE_NAMES, TILT_DROP_CHOICES, fieldSpec,
  profileChoices, rangeHint,
} from './form.ts';

export interface BinocularControlHandlers {
  onEdit(form: BinocularForm, field: FormField): void;
  onRestoreDemo(): void;
}

export class BinocularControls {
  readonly gui: GUI;
  private readonly form: BinocularForm;
  private readonly ctrl = new Map<FormField, Controller>();
  private readonly errorEls = new Map<FormField, HTMLElement>();
  private readonly general: HTMLElement;
  private levelHint: HTMLElement | null = null;
  /** per eye: the note and the button shown while a 360° prism is carried over */
  private readonly prism360Extras = new Map<Side, { note: HTMLElement; clear: Controller }>();

  constructor(container: HTMLElement, initial: BinocularForm, private readonly handlers: BinocularControlHandlers) {
    this.form = structuredClone(initial);
    this.gui = new GUI({ container, title: 'Both eyes: the case', width: 280 });
    this.gui.domElement.classList.add('controls-gui', 'bi-controls-gui');
    this.general = document.createElement('div');
    this.general.className = 'field-error bi-general-error';
    this.general.setAttribute('role', 'alert');
    this.general.hidden = true;
    this.gui.$children.prepend(this.general);

    for (const side of SIDES) this.eyeFolder(side);

    const fr = this.gui.addFolder('Frame and optical centres');
    this.choice(fr, 'case.frame', { 'None given': 'none', 'Boxed frame (A, B, DBL)': 'boxed' });
    this.num(fr, 'case.a');
    this.num(fr, 'case.b');
    this.num(fr, 'case.dbl');
    this.choice(fr, 'case.ocMode', { 'Direct: x, y from each pupil': 'direct', 'From the frame': 'frame' });
    folderHint(fr, 'Each eye’s folder holds its optical-centre fields. Direct: x towards the wearer’s left (nasal for the right eye, temporal for the left), y up. From the frame: decentration inwards from the boxed centre; heights above the lower box line (blank: B/2, and the OC at the fitting height).');
    this.num(fr, 'case.panto');
    this.num(fr, 'case.wrap');
    this.choice(fr, 'case.tiltDrop', TILT_DROP_CHOICES);
    folderHint(fr, 'Lowers both optical centres for the pantoscopic tilt: 1 mm per 2° of tilt (common practice), or by s·tan(tilt) so that the centre of rotation lies on the optical axis (s: back vertex to CR). Each eye’s direct OC y field holds the centre before this drop.');

    const tg = this.gui.addFolder('Target');
    this.choice(tg, 'case.target', { 'Distance, straight ahead': 'distance', 'Near point': 'near', 'Reading level (on the lenses)': 'level' });
    this.num(tg, 'case.distance');
    this.num(tg, 'case.below');
    this.num(tg, 'case.lateral');
    this.num(tg, 'case.levelBelow');
    this.num(tg, 'case.levelInset');
    this.ctrl.get('case.levelInset')?.domElement.querySelector('input')?.setAttribute('placeholder', '0');
    const levelHint = folderHint(tg, 'A reading level is where the eyes look through the lenses, given rather than solved: each visual point lies this far below its distance mark (the centration point), and inset towards the nose.');
    levelHint.dataset.hint = 'level';
    this.levelHint = levelHint;

    const tol = this.gui.addFolder('Tolerance');
    this.choice(tol, 'case.profile', profileChoices());
    this.num(tol, 'case.tolH');
    this.num(tol, 'case.tolV');

    const rep = this.gui.addFolder('Clinician summary');
    this.text(rep, 'case.recipient');
    this.text(rep, 'case.practice');
    this.text(rep, 'case.reference');
    folderHint(rep, 'Optional free text for the summary’s heading (Case › Clinician summary), kept in the case file. Leave out anything a shared file should not carry.');
    rep.close();

    const act = this.gui.addFolder('Case');
    act.add({ restore: () => handlers.onRestoreDemo() }, 'restore').name('Restore the demo case');

    this.gui.folders.forEach((f) => f.domElement.setAttribute('data-folder', f._title));
    this.refreshVisibility();
  }

  /** Show another case (opened, restored, or changed elsewhere). */
  setForm(form: BinocularForm): void {
    for (const side of SIDES) Object.assign(this.form[side], form[side]);
    Object.assign(this.form.case, form.case);
    for (const c of this.ctrl.values()) c.updateDisplay();
    this.refreshVisibility();
  }

  getForm(): BinocularForm {
    return structuredClone(this.form);
  }

  /**
   * Show one message beside its field (or clear all when message is null). A message for
   * no field on screen goes at the top of the controls.
   */
  showError(field: FormField | null, message: string | null): void {
    for (const [k, el] of this.errorEls) {
      el.hidden = true;
      el.textContent = '';
      const d = this.ctrl.get(k)?.domElement;
      d?.classList.remove('invalid');
      d?.querySelector('input, select')?.removeAttribute('aria-invalid');
    }
    this.general.hidden = true;
    this.general.textContent = '';
    if (!message) return;
    const ctl = field ? this.ctrl.get(field) : undefined;
    const el = field ? this.errorEls.get(field) : undefined;
    if (!ctl || !el || !this.isShown(field!)) {
      this.general.textContent = message;
      this.general.hidden = false;
      return;
    }
    ctl.domElement.classList.add('invalid');
    ctl.domElement.querySelector('input, select')?.setAttribute('aria-invalid', 'true');
    el.textContent = message;
    el.hidden = false;
    // open its folders so that the message can be seen
    for (let g: GUI | undefined = ctl.parent; g; g = g.parent) g.open();
    el.scrollIntoView({ block: 'nearest' });
  }

  private isShown(f: FormField): boolean {
    const d = this.ctrl.get(f)?.domElement;
    return !!d && d.style.display !== 'none';
  }

  private eyeFolder(side: Side): void {
    const eye = this.gui.addFolder(EYE_NAMES[side]);
    eye.domElement.dataset.side = side;
    const f = (k: EyeKey): FormField => `${side}.${k}`;
    this.num(eye, f('sphere'));
    this.num(eye, f('cyl'));
    this.num(eye, f('axis'));
    const mats: Record<string, string> = {};
    for (const m of MATERIALS) mats[m.name.replace(/\s*\(.*\)$/, '')] = m.id;
    mats['custom index and Abbe'] = 'custom';
    this.choice(eye, f('material'), mats);
    this.num(eye, f('index'));
    this.num(eye, f('abbe'));
    this.choice(eye, f('frontMode'), { 'Rule (Vogel or steps)': 'rule', 'True power': 'true', 'Nominal + tool index': 'nominal' });
    this.text(eye, f('frontRule'));
    this.num(eye, f('front'));
    this.num(eye, f('base'));
    this.num(eye, f('toolIndex'));
    this.choice(eye, f('thicknessMode'), { 'Centre thickness': 'centre', 'Min edge / centre': 'rule' });
    this.num(eye, f('ct'));
    this.num(eye, f('minEdge'));
    this.num(eye, f('minCt'));
    this.num(eye, f('diameter'));
    this.num(eye, f('pd'));
    this.num(eye, f('cr'));
    this.num(eye, f('ocX'));
    this.num(eye, f('ocY'));
    this.num(eye, f('decentration'));
    this.num(eye, f('fittingHeight'));
    this.num(eye, f('ocHeight'));
    for (const k of ['diameter', 'fittingHeight', 'ocHeight'] as const) {
      const input = this.ctrl.get(f(k))?.domElement.querySelector('input');
      input?.setAttribute('placeholder', k === 'diameter' ? 'none' : k === 'fittingHeight' ? 'B/2' : 'fitting height');
    }

    // the prescribed prism: base words; a 360° prism from a file is shown read-only
    const pr = eye.addFolder('Prescribed prism');
    pr.domElement.dataset.prism = side;
    this.readOnly(pr, f('prism360'));
    const note = folderHint(pr, '', 'bi-prism360-note');
    const clear = pr.add({ clear: () => this.replace360(side) }, 'clear').name('Remove the 360° prism');
    clear.domElement.setAttribute('data-action', `${side}-clear-prism360`);
    this.prism360Extras.set(side, { note, clear });
    this.num(pr, f('prismH'));
    this.choice(pr, f('prismHBase'), { 'Base in': 'in', 'Base out': 'out' });
    this.num(pr, f('prismV'));
    this.choice(pr, f('prismVBase'), { 'Base up': 'up', 'Base down': 'down' });
    for (const k of ['prismH', 'prismV'] as const) this.ctrl.get(f(k))?.domElement.querySelector('input')?.setAttribute('placeholder', 'none');
  }

  /** The person replaces a 360° prism: from now on the base-word fields say what is prescribed. */
  private replace360(side: Side): void {
    if (this.form[side].prism360 === '') return;
    this.form[side].prism360 = '';
    this.ctrl.get(`${side}.prism360`)?.updateDisplay();
    this.refreshVisibility();
    this.emit(`${side}.prismH`);
  }

  /** A value shown but not edited (a 360° prism from a file). */
  private readOnly(folder: GUI, field: FormField): void {
    const [obj, key] = this.target(field);
    const c = folder.add(obj, key).name(fieldSpec(field).label).disable();
    c.domElement.setAttribute('data-field', field);
    c.domElement.querySelector('input')?.setAttribute('data-field', field);
    c.domElement.querySelector('input')?.setAttribute('readonly', '');
    this.attachError(field, c);
  }

  private target(field: FormField): [Record<string, string>, string] {
    const [g, k] = field.split('.') as [string, string];
    const obj = (g === 'case' ? this.form.case : this.form[g as Side]) as unknown as Record<string, string>;
    return [obj, k];
  }

  private num(folder: GUI, field: FormField): void {
    const spec = fieldSpec(field);
    const [obj, key] = this.target(field);
    const c = folder.add(obj, key).name(spec.label);
    c.domElement.setAttribute('data-field', field);
    const input = c.domElement.querySelector('input') as HTMLInputElement;
    input.setAttribute('data-field', field);
    input.setAttribute('aria-describedby', `bi-err-${field.replace('.', '-')}`);
    const hint = rangeHint(spec);
    if (hint) input.title = hint;
    enableArrowSteps(input, spec, (text) => c.setValue(text));
    c.onChange(() => {
      pointInField(obj as unknown as Record<string, unknown>, key as string, spec.label, input);
      this.emitPrismAware(field);
    });
    this.attachError(field, c);
  }

  /** An edit; typing a prism amount replaces a 360° prism carried over from the file. */
  private emitPrismAware(field: FormField): void {
    const [side, key] = field.split('.') as [string, string];
    if ((key === 'prismH' || key === 'prismV') && side !== 'case') {
      const e = this.form[side as Side];
      if (e.prism360 !== '' && e[key].trim() !== '') {
        this.replace360(side as Side);
        return;
      }
    }
    this.emit(field);
  }

  private text(folder: GUI, field: FormField): void {
    const [obj, key] = this.target(field);
    const c = folder.add(obj, key).name(fieldSpec(field).label);
    c.domElement.setAttribute('data-field', field);
    c.domElement.querySelector('input')?.setAttribute('data-field', field);
    c.onChange(() => this.emit(field));
    this.attachError(field, c);
  }

  private choice(folder: GUI, field: FormField, options: Record<string, string>): void {
    const [obj, key] = this.target(field);
    const c = folder.add(obj, key, options).name(fieldSpec(field).label);
    c.domElement.setAttribute('data-field', field);
    c.domElement.querySelector('select')?.setAttribute('data-field', field);
    c.onChange(() => {
      this.refreshVisibility();
      this.emit(field);
    });
    this.attachError(field, c);
  }

  private attachError(field: FormField, c: Controller): void {
    this.ctrl.set(field, c);
    this.errorEls.set(field, errorSlot(c.domElement, `bi-err-${field.replace('.', '-')}`));
  }

  refreshVisibility(): void {
    const show = (f: FormField, v: boolean): void => {
      this.ctrl.get(f)?.show(v);
      const el = this.errorEls.get(f);
      if (el && !v) el.hidden = true;
    };
    const c = this.form.case;
    const framed = c.frame === 'boxed';
    for (const k of ['a', 'b', 'dbl'] as CaseKey[]) show(`case.${k}`, framed);
    const near = c.target === 'near';
    for (const k of ['distance', 'below', 'lateral'] as CaseKey[]) show(`case.${k}`, near);
    const level = c.target === 'level';
    show('case.levelBelow', level);
    show('case.levelInset', level);
    if (this.levelHint) this.levelHint.hidden = !level;
    const custom = c.profile === 'custom';
    show('case.tolH', custom);
    show('case.tolV', custom);
    for (const side of SIDES) {
      const e = this.form[side];
      const f = (k: EyeKey): FormField => `${side}.${k}`;
      show(f('index'), e.material === 'custom');
      show(f('abbe'), e.material === 'custom');
      show(f('frontRule'), e.frontMode === 'rule');
      show(f('front'), e.frontMode === 'true');
      show(f('base'), e.frontMode === 'nominal');
      show(f('toolIndex'), e.frontMode === 'nominal');
      show(f('ct'), e.thicknessMode === 'centre');
      show(f('minEdge'), e.thicknessMode === 'rule');
      show(f('minCt'), e.thicknessMode === 'rule');
      const direct = c.ocMode === 'direct';
      show(f('ocX'), direct);
      show(f('ocY'), direct);
      show(f('decentration'), !direct);
      show(f('fittingHeight'), !direct);
      show(f('ocHeight'), !direct);
      const has360 = e.prism360 !== '';
      show(f('prism360'), has360);
      const extra = this.prism360Extras.get(side);
      if (extra) {
        extra.note.hidden = !has360;
        extra.note.textContent = has360
          ? `${e.prism360}: the case file gives this prism in 360° notation, and it is kept as it is. Typing an amount below replaces it with base words.`
          : '';
        extra.clear.show(has360);
        this.ctrl.get(f('prism360'))?.domElement.querySelector('input')?.setAttribute('title', e.prism360);
      }
    }
  }

  private emit(field: FormField): void {
    this.handlers.onEdit(structuredClone(this.form), field);
  }

  dispose(): void {
    this.gui.destroy();
  }
}
