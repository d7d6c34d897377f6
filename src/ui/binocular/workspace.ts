/**
 * The "both eyes" workspace: the binocular controls on the left, the 3-D view of both eyes
 * with the limits view under it, and the binocular panel on the right. It edits the app's one
 * CaseStore: every edit builds a new document, which is checked whole (readCase, then
 * evaluateFit) before the store takes it; a refused value is shown at its field, and the last
 * valid result stays on screen, marked stale. A change made elsewhere (a file opened, the
 * demo restored) arrives through the store's subscription and refills the fields.
 */
import { type BinocularCase, frameBox } from '../../case/caseFile.ts';
import { InputError } from '../../case/input.ts';
import { BINOCULAR_VIEWS, type BinocularSceneInput, type BinocularViewName, BinocularScene, FRAME_COLOR } from '../../scene/binocular/binocularScene.ts';
import { COLORS, css } from '../../scene/palette.ts';
import { type CaseStore, DEMO_BINOCULAR } from '../caseStore.ts';
import { targetWords } from '../../case/fitWords.ts';
import { num } from '../format.ts';
import { type BinocularComputed, type BinocularOutcome, evaluateCase, evaluateDoc } from './compute.ts';
import { BinocularControls } from './controls.ts';
import { type BinocularForm, type FormField, docFromForm, fieldName, fieldOfPath, formFromCase } from './form.ts';
import { LimitsView } from './limitsView.ts';
import { BinocularPanel } from './panel.ts';
import { isFailed } from './words.ts';
import { el, invalidInputText } from '../resultsPane.ts';
import { bindUndoKeys, undoButtons } from '../history.ts';

export class BinocularWorkspace {
  readonly root: HTMLElement;
  readonly scene: BinocularScene;
  readonly controls: BinocularControls;
  readonly panel: BinocularPanel;
  readonly limits: LimitsView;
  private readonly stale: HTMLElement;
  private readonly unsubscribe: () => void;
  private readonly unbindKeys: () => void;
  private readonly syncUndo: (canUndo: boolean, canRedo: boolean) => void;
  private last: BinocularComputed | null = null;
  /** the result of an edit being handed to the store (its listener then reuses it) */
  private expecting: BinocularComputed | null = null;
  /** updates so far, and whether the last one was valid (tests read them) */
  updates = 0;
  valid = false;

  constructor(root: HTMLElement, private readonly store: CaseStore) {
    this.root = root;
    const controlsHost = el('aside', 'controls bi-controls');
    controlsHost.setAttribute('aria-label', 'Both eyes: case inputs');
    const centre = el('section', 'centre bi-centre');
    const viewport = el('div', 'viewport bi-viewport');
    const buttons = el('div', 'view-buttons');
    buttons.setAttribute('role', 'toolbar');
    buttons.setAttribute('aria-label', 'Preset views');
    this.stale = el('div', 'viewport-stale');
    this.stale.setAttribute('role', 'alert');
    this.stale.hidden = true;
    const left = el('div', 'viewport-left');
    const key = el('ul', 'ray-key');
    key.setAttribute('aria-label', 'Key to the 3-D view');
    for (const [cls, color, text] of [
      ['', COLORS.exact, 'exact line of sight (traced)'],
      ['dotted', COLORS.undeviated, 'without lenses'],
      ['', FRAME_COLOR, 'frame (boxed)'],
    ] as const) {
      const li = el('li');
      const sw = el('span', `swatch ${cls}`);
      sw.style.borderTopColor = css(color);
      li.append(sw, text);
      key.append(li);
    }
    left.append(key);
    const hint = el('p', 'viewport-hint', 'Drag to orbit, right-drag to pan, wheel to zoom. Seen facing the wearer: the right eye is on your left.');
    viewport.append(buttons, this.stale, left, hint);
    const limitsHost = el('div', 'bi-limits-host');
    limitsHost.setAttribute('aria-label', 'Decentration limits');
    centre.append(viewport, limitsHost);
    const results = el('aside', 'results bi-results');
    results.setAttribute('aria-label', 'Both eyes: computation panel');
    root.replaceChildren(controlsHost, centre, results);

    this.scene = new BinocularScene(viewport);
    for (const [name, label] of Object.entries(BINOCULAR_VIEWS) as [BinocularViewName, string][]) {
      const b = el('button', undefined, label);
      b.type = 'button';
      b.dataset.view = name;
      b.addEventListener('click', () => {
        this.scene.setView(name);
        for (const o of buttons.querySelectorAll('button')) o.setAttribute('aria-pressed', String(o === b));
      });
      buttons.append(b);
    }
    this.panel = new BinocularPanel(results);
    this.limits = new LimitsView(limitsHost);
    this.controls = new BinocularControls(controlsHost, formFromCase(store.get()), {
      onEdit: (form, field) => this.edit(form, field),
      onRestoreDemo: () => this.restoreDemo(),
    });
    // undo and redo of case edits (the store keeps the history): buttons above the controls, and the keys
    const undo = { undo: () => { store.undo(); }, redo: () => { store.redo(); } };
    this.syncUndo = undoButtons(controlsHost, undo, 'bi');
    this.unbindKeys = bindUndoKeys(root, undo);
    this.unsubscribe = store.subscribe((c) => this.fromStore(c));
    this.show(evaluateCase(store.get()), null);
  }

  /** An edit in the controls: build the document, check it whole, then hand it to the store. */
  private edit(form: BinocularForm, field: FormField): void {
    if (field === 'case.ocMode' && form.case.ocMode === 'direct') {
      // keep the optical centres where the frame put them (the last valid case's values)
      const now = formFromCase(this.store.get());
      for (const side of ['right', 'left'] as const) {
        form[side].ocX = now[side].ocX;
        form[side].ocY = now[side].ocY;
      }
      this.controls.setForm(form);
    }
    let doc;
    try {
      doc = docFromForm(form, this.store.doc());
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      this.show({ ok: false, path: e.field, message: e.message, reason: e.reason }, form);
      return;
    }
    const out = evaluateDoc(doc);
    if (!out.ok) {
      this.show(out, form);
      return;
    }
    this.expecting = out.result;
    try {
      this.store.set(doc, 'edit', field);
    } catch (e) {
      // checked above; should the store still refuse it, say why at the field
      this.expecting = null;
      if (!(e instanceof InputError)) throw e;
      this.show({ ok: false, path: e.field, message: e.message, reason: e.reason }, form);
      return;
    }
    // the store calls its listeners (this workspace among them) before it returns
    if (this.expecting) {
      const r = this.expecting;
      this.expecting = null;
      this.show({ ok: true, result: r }, form);
    }
  }

  private fromStore(c: BinocularCase): void {
    if (this.expecting) {
      const r = this.expecting;
      this.expecting = null;
      this.show({ ok: true, result: r }, null);
      return;
    }
    // changed elsewhere (opened, restored, the demo): show its values in the fields
    this.controls.setForm(formFromCase(c));
    this.show(evaluateCase(c), null);
  }

  private restoreDemo(): void {
    this.store.set(structuredClone(DEMO_BINOCULAR), 'demo');
  }

  /** Show a result, or a refusal (the last valid result stays, marked stale). */
  private show(out: BinocularOutcome, form: BinocularForm | null): void {
    this.updates++;
    this.syncUndo(this.store.canUndo, this.store.canRedo);
    if (out.ok) {
      const r = out.result;
      this.last = r;
      this.valid = true;
      this.controls.showError(null, null);
      this.stale.hidden = true;
      this.panel.render(r);
      this.scene.update(sceneInput(r));
      this.limits.update(r);
      return;
    }
    this.valid = false;
    const f = fieldOfPath(out.path, form ?? this.controls.getForm());
    const message = f ? `${fieldName(f)}: ${out.reason}` : out.message;
    this.controls.showError(f, message);
    this.stale.hidden = false;
    this.stale.textContent = invalidInputText(message, !!this.last, 'case');
    if (this.last) {
      this.panel.setStale(message);
      this.scene.markInvalid();
      this.limits.setStale(true);
    } else this.panel.setEmpty(message);
  }

  /** What the end-to-end tests read (nothing else uses it). */
  hook() {
    return {
      updates: () => this.updates,
      valid: () => this.valid,
      frames: () => this.scene.viewer.frames,
      renderNow: () => this.scene.viewer.renderNow(),
      memory: () => ({ ...this.scene.viewer.renderer.info.memory }),
      rebuildScene: (n: number) => {
        for (let i = 0; i < n; i++) {
          this.scene.rebuildContent();
          this.scene.viewer.renderNow();
        }
      },
      limitsComputed: () => this.limits.computed,
      clientPosition: (which: 'right-vp' | 'left-vp' | 'target') => this.scene.clientPosition(which),
      lensExtents: () => this.scene.lensExtents(),
    };
  }

  dispose(): void {
    this.unsubscribe();
    this.unbindKeys();
    this.controls.dispose();
    this.scene.dispose();
    this.limits.dispose();
    this.root.replaceChildren();
  }
}

/** What the scene draws for a result: placements, traces, the frame boxes, the target. */
function sceneInput(r: BinocularComputed): BinocularSceneInput {
  const { c, fit } = r;
  const frame = c.doc.frame;
  const eye = (side: 'right' | 'left') => {
    const e = fit.result[side];
    const v = r.eyes[side];
    const ex = e.answers?.exact;
    const words = !e.answers ? 'no line of sight' : ex && !isFailed(ex) ? `${num(ex.magnitude)} Δ exact` : 'no exact answer';
    return {
      eye: side === 'right' ? 'R' as const : 'L' as const,
      lens: v.drawLens,
      placement: v.placement,
      crXMm: v.crXMm,
      trace: e.fixation.status === 'ok' ? e.fixation.trace : null,
      label: `${side === 'right' ? 'Right' : 'Left'} eye · ${words}`,
    };
  };
  let boxes: BinocularSceneInput['frame'] = null;
  if (frame) {
    const box = (side: 'right' | 'left') => {
      const { xMin, xMax, yMin, yMax } = frameBox(frame, side, c.doc[side].fittingHeight);
      return { xMin, xMax, yMin, yMax };
    };
    boxes = { right: box('right'), left: box('left') };
  }
  const target = r.target;
  return {
    right: eye('right'),
    left: eye('left'),
    frame: boxes,
    // a reading level has no target point or direction: the scene draws each eye's line out
    target: target.kind === 'level' ? null : target,
    targetLabel: `${target.kind === 'level' ? '' : 'target: '}${targetWords(c)}`,
  };
}

