/**
 * The batch-export panel: a sweep table (powers x decentrations) or a limits table (powers,
 * tolerance, direction) for the lens family of the single-lens view, downloaded as CSV or
 * JSON. The rows are computed in a module worker (batch.worker.ts) with a progress bar and a
 * Cancel button; the page stays live meanwhile. The panel also shows the `decentra` command
 * that prints the same table. The range workspace exports its limits table through the same
 * panel (exportRange): the family is the workspace's, the file the one `decentra limits` prints.
 */
import { InputError } from '../../case/input.ts';
import { type ViewCase, toRawFields } from '../../case/url.ts';
import { download } from '../persist/files.ts';
import type { Notify } from '../persist/keeper.ts';
import { commandLine, commandWords } from '../range/family.ts';
import { type BatchRequest, type RangeText, equivalentCommand, planBatch } from './batch.ts';
import type { BatchJob, BatchMessage } from './protocol.ts';
import { type RangeExportRequest, type RangeExportSource, type RangeFileFormat, rangeExportSize, todayMs } from './range.ts';

export interface ExportPanelOptions {
  getViewCase: () => ViewCase;
  notify: Notify;
}

type Kind = 'sweep' | 'limits' | 'range';

interface Inputs {
  powerFrom: HTMLInputElement;
  powerTo: HTMLInputElement;
  powerStep: HTMLInputElement;
  decFrom: HTMLInputElement;
  decTo: HTMLInputElement;
  decStep: HTMLInputElement;
  maxPrism: HTMLInputElement;
  dir: HTMLInputElement;
  format: HTMLSelectElement;
}

/** Which input an error's field names. */
const FIELD_INPUT: Record<string, keyof Inputs> = {
  'powers from': 'powerFrom', 'powers to': 'powerTo', 'powers step': 'powerStep', powers: 'powerTo',
  'decentrations from': 'decFrom', 'decentrations to': 'decTo', 'decentrations step': 'decStep', decentrations: 'decTo',
  tolerance: 'maxPrism', direction: 'dir',
};

const TITLES: Record<Kind, string> = { sweep: 'Export a sweep table', limits: 'Export a limits table', range: 'Export the range’s limits' };
const INTROS: Record<Kind, string> = {
  sweep: 'Prism at each decentration along one direction, for each power of the lens family: Prentice’s rule, first-order, exact and focimeter, and Prentice’s error.',
  limits: 'For each power of the lens family: the largest decentration along one direction that keeps the prism at the eye within the tolerance, exactly, by first-order optics and by Prentice’s rule.',
  range: 'For each sphere, cylinder, axis, direction and tolerance of the range: the exact, first-order, Prentice and focimeter limits, what ends the exact one, and the lens form used (CSV or JSON); or the printable spec sheet, whose breakdown chart is for the first cylinder, axis and direction, as decentra spec draws it.',
};
const FAMILY_SINGLE = 'Lens family: the lens of the single-lens view (material, front surface, thickness, cylinder, centre of rotation, eye), with each power below as its sphere.';
const FAMILY_RANGE = 'Lens family and range: those of the Range workspace, as typed there now.';

export class ExportPanel {
  readonly element: HTMLElement;
  private kind: Kind = 'sweep';
  private readonly inputs: Inputs;
  private readonly title: HTMLElement;
  private readonly intro: HTMLElement;
  private readonly decRow: HTMLElement;
  private readonly tolRow: HTMLElement;
  private readonly powRow: HTMLElement;
  private readonly dirRow: HTMLElement;
  private readonly family: HTMLElement;
  /** the range workspace's family, while the panel exports it */
  private rangeSource: RangeExportSource | null = null;
  private readonly command: HTMLElement;
  private readonly error: HTMLElement;
  private readonly status: HTMLElement;
  private readonly progress: HTMLProgressElement;
  private readonly startButton: HTMLButtonElement;
  private readonly cancelButton: HTMLButtonElement;
  private worker: Worker | null = null;
  private jobId = 0;
  private startedAt = 0;

  constructor(private readonly o: ExportPanelOptions, parent: HTMLElement = document.body) {
    const el = document.createElement('section');
    el.className = 'export-panel';
    el.id = 'export-panel';
    el.setAttribute('role', 'dialog');
    el.setAttribute('aria-modal', 'false');
    el.setAttribute('aria-labelledby', 'export-title');
    el.hidden = true;
    this.element = el;

    const head = document.createElement('div');
    head.className = 'export-head';
    this.title = document.createElement('h2');
    this.title.id = 'export-title';
    const close = this.button('Close', 'export-close', () => this.hide());
    close.textContent = '×';
    close.setAttribute('aria-label', 'Close the export panel (cancels a running export)');
    close.title = 'Close (cancels a running export)';
    head.append(this.title, close);

    this.intro = document.createElement('p');
    this.intro.className = 'export-intro';
    const family = document.createElement('p');
    family.className = 'export-family';
    family.textContent = FAMILY_SINGLE;
    this.family = family;

    const input = (key: string, value: string, label: string): HTMLInputElement => {
      const i = document.createElement('input');
      i.type = 'text';
      i.value = value;
      i.dataset.export = key;
      i.setAttribute('aria-label', label);
      i.spellcheck = false;
      i.autocomplete = 'off';
      i.addEventListener('input', () => this.refresh());
      return i;
    };
    this.inputs = {
      powerFrom: input('power-from', '6', 'powers from, D'),
      powerTo: input('power-to', '12', 'powers to, D'),
      powerStep: input('power-step', '0.5', 'powers step, D'),
      decFrom: input('dec-from', '0', 'decentrations from, mm'),
      decTo: input('dec-to', '20', 'decentrations to, mm'),
      decStep: input('dec-step', '2', 'decentrations step, mm'),
      maxPrism: input('max-prism', '0.5', 'tolerance, prism dioptres'),
      dir: input('dir', '0', 'direction, degrees'),
      format: document.createElement('select'),
    };
    for (const [f, label] of [['csv', 'CSV'], ['json', 'JSON'], ['spec', 'Spec sheet (HTML)']]) {
      const opt = document.createElement('option');
      opt.value = f!;
      opt.textContent = label!;
      this.inputs.format.append(opt);
    }
    this.inputs.format.dataset.export = 'format';
    this.inputs.format.setAttribute('aria-label', 'file format');
    this.inputs.format.addEventListener('change', () => this.refresh());

    const row = (label: string, ...parts: (Node | string)[]): HTMLElement => {
      const r = document.createElement('div');
      r.className = 'export-row';
      const l = document.createElement('span');
      l.className = 'export-label';
      l.textContent = label;
      const c = document.createElement('span');
      c.className = 'export-inputs';
      c.append(...parts);
      r.append(l, c);
      return r;
    };
    const i = this.inputs;
    const powRow = row('Powers, D', 'from', i.powerFrom, 'to', i.powerTo, 'step', i.powerStep);
    this.powRow = powRow;
    this.decRow = row('Decentration, mm', 'from', i.decFrom, 'to', i.decTo, 'step', i.decStep);
    this.tolRow = row('Tolerance, Δ', i.maxPrism);
    const dirNote = document.createElement('span');
    dirNote.className = 'export-note';
    dirNote.textContent = 'counter-clockwise from the wearer’s left (0° is nasal for a right eye, temporal for a left)';
    const dirRow = row('Direction, °', i.dir, dirNote);
    this.dirRow = dirRow;
    const fmtRow = row('File', i.format);

    const cmdLabel = document.createElement('p');
    cmdLabel.className = 'export-note';
    cmdLabel.textContent = 'The same table from the command line:';
    this.command = document.createElement('code');
    this.command.className = 'export-command';
    this.command.id = 'export-command';

    this.error = document.createElement('p');
    this.error.className = 'export-error';
    this.error.id = 'export-error';
    this.error.setAttribute('role', 'alert');
    this.error.hidden = true;

    const actions = document.createElement('div');
    actions.className = 'export-actions';
    this.startButton = this.button('Export', 'export-start', () => this.start());
    this.cancelButton = this.button('Cancel', 'export-cancel', () => this.cancel());
    this.cancelButton.disabled = true;
    this.progress = document.createElement('progress');
    this.progress.id = 'export-progress';
    this.progress.max = 1;
    this.progress.value = 0;
    this.progress.setAttribute('aria-label', 'export progress');
    actions.append(this.startButton, this.cancelButton, this.progress);
    this.status = document.createElement('p');
    this.status.className = 'export-status';
    this.status.id = 'export-status';
    this.status.setAttribute('role', 'status');

    el.append(head, this.intro, family, powRow, this.decRow, this.tolRow, dirRow, fmtRow, cmdLabel, this.command, this.error, actions, this.status);
    el.addEventListener('keydown', (e) => {
      if (e.key === 'Escape') this.hide();
      if (e.key === 'Enter' && e.target instanceof HTMLInputElement && !this.worker) this.start();
    });
    parent.append(el);
  }

  private button(label: string, id: string, run: () => void): HTMLButtonElement {
    const b = document.createElement('button');
    b.type = 'button';
    b.id = id;
    b.textContent = label;
    b.addEventListener('click', run);
    return b;
  }

  show(kind: Kind): void {
    if (this.worker && kind !== this.kind) this.cancel();
    this.kind = kind;
    this.title.textContent = TITLES[kind];
    this.intro.textContent = INTROS[kind];
    this.decRow.hidden = kind !== 'sweep';
    this.tolRow.hidden = kind !== 'limits';
    this.powRow.hidden = kind === 'range';
    this.dirRow.hidden = kind === 'range';
    this.family.textContent = kind === 'range' ? FAMILY_RANGE : FAMILY_SINGLE;
    if (kind !== 'range') this.rangeSource = null;
    // the spec sheet is the range's only
    const specOption = this.inputs.format.querySelector<HTMLOptionElement>('option[value="spec"]')!;
    specOption.hidden = kind !== 'range';
    specOption.disabled = kind !== 'range';
    if (kind !== 'range' && this.inputs.format.value === 'spec') this.inputs.format.value = 'csv';
    this.element.dataset.kind = kind;
    this.element.hidden = false;
    this.refresh();
    if (kind === 'range') this.startButton.focus();
    else this.inputs.powerFrom.focus();
  }

  /** Export the range workspace's limits table (its family as typed when Export is pressed). */
  exportRange(format: RangeFileFormat, source: RangeExportSource): void {
    if (this.worker) this.cancel();
    this.rangeSource = source;
    this.inputs.format.value = format;
    this.show('range');
  }

  hide(): void {
    if (this.worker) this.cancel();
    this.element.hidden = true;
  }

  /** The request the inputs describe, for the single-lens view's lens family (or the range's) now. */
  request(): BatchRequest | RangeExportRequest {
    const i = this.inputs;
    if (this.kind === 'range') {
      const f = this.rangeSource?.form();
      if (!f) throw new InputError('range', 'open the Range workspace to export its table');
      if (!f.ok) throw new InputError('range', f.message);
      const format: RangeFileFormat = i.format.value === 'json' ? 'json' : i.format.value === 'spec' ? 'spec' : 'csv';
      return { kind: 'range', form: f.form, chart: f.chart, format, dateMs: todayMs() };
    }
    const fields = toRawFields({ ...this.o.getViewCase(), pointMode: 'xy' }, { dir: 'direction', dist: 'distance' });
    const power: RangeText = { from: i.powerFrom.value, to: i.powerTo.value, step: i.powerStep.value };
    const format = i.format.value === 'json' ? 'json' : 'csv';
    if (this.kind === 'sweep') {
      return { kind: 'sweep', fields, power, decentration: { from: i.decFrom.value, to: i.decTo.value, step: i.decStep.value }, dir: i.dir.value, format };
    }
    return { kind: 'limits', fields, power, maxPrism: i.maxPrism.value, dir: i.dir.value, format };
  }

  /** Check the inputs (marking the field at fault) and show the equivalent command. */
  private refresh(): BatchRequest | RangeExportRequest | null {
    for (const el of Object.values(this.inputs)) el.removeAttribute('aria-invalid');
    try {
      const req = this.request();
      if (req.kind === 'range') {
        rangeExportSize(req);
        this.command.textContent = commandLine(req.format === 'spec'
          ? commandWords(req.form, 'spec')
          : [...commandWords(req.form, 'limits'), '--format', req.format]);
        this.error.hidden = true;
        return req;
      }
      const plan = planBatch(req);
      this.command.textContent = equivalentCommand(plan, req);
      this.error.hidden = true;
      return req;
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      const key = FIELD_INPUT[e.field];
      if (key) this.inputs[key].setAttribute('aria-invalid', 'true');
      this.error.textContent = key ? e.message : this.kind === 'range'
        ? `The Range workspace’s family: ${e.field === 'range' ? e.reason : e.message}`
        : `The single-lens view’s lens: ${e.message}`;
      this.error.hidden = false;
      this.command.textContent = '—';
      return null;
    }
  }

  private start(): void {
    if (this.worker) return;
    const req = this.refresh();
    if (!req) return;
    const id = ++this.jobId;
    const w = new Worker(new URL('./batch.worker.ts', import.meta.url), { type: 'module' });
    this.worker = w;
    this.startedAt = performance.now();
    this.setRunning(true);
    this.progress.max = 1;
    this.progress.value = 0;
    this.status.textContent = 'Starting…';
    w.onmessage = (e: MessageEvent<BatchMessage>) => this.receive(e.data, req);
    w.onerror = (e) => {
      this.stopWorker();
      this.status.textContent = `The export failed: ${e.message}`;
    };
    w.postMessage({ id, request: req } satisfies BatchJob);
  }

  private receive(m: BatchMessage, req: BatchRequest | RangeExportRequest): void {
    if (m.id !== this.jobId || !this.worker) return;
    if (m.type === 'progress') {
      this.progress.max = m.total;
      this.progress.value = m.done;
      const secs = (performance.now() - this.startedAt) / 1000;
      this.status.textContent = `Computing: ${m.done} of ${m.total} ${req.kind === 'range' ? 'lenses' : 'powers'} (${secs.toFixed(1)} s)`;
      return;
    }
    this.stopWorker();
    if (m.type === 'error') {
      this.error.textContent = m.message;
      this.error.hidden = false;
      this.status.textContent = 'Nothing was exported.';
      return;
    }
    const name = req.format === 'spec' ? 'decentra-spec.html' : `decentra-${req.kind}.${req.format}`;
    const mime = req.format === 'csv' ? 'text/csv' : req.format === 'spec' ? 'text/html' : 'application/json';
    // the CLI's bytes: its output and one final newline (a page that ends in one keeps it)
    download(req.kind === 'range' && m.text.endsWith('\n') ? m.text : `${m.text}\n`, name, mime);
    this.progress.value = this.progress.max;
    this.status.textContent = `Done: ${m.rows} rows in ${(m.ms / 1000).toFixed(1)} s, saved as ${name}.`;
    this.element.dataset.done = String(Number(this.element.dataset.done ?? '0') + 1);
  }

  cancel(): void {
    if (!this.worker) return;
    this.stopWorker();
    this.jobId++;
    this.status.textContent = 'Cancelled; nothing was exported.';
  }

  private stopWorker(): void {
    this.worker?.terminate();
    this.worker = null;
    this.setRunning(false);
  }

  private setRunning(on: boolean): void {
    this.startButton.disabled = on;
    this.cancelButton.disabled = !on;
    this.element.dataset.running = String(on);
  }

  running(): boolean {
    return this.worker !== null;
  }
}
