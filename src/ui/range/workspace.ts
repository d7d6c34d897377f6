/**
 * The "Range" workspace (docs/range.md, "The range workspace"): a lens family on the left,
 * its limits table and the chart of where Prentice's rule breaks down in the centre, the
 * breakdown table and the files on the right. Every change of the family is checked at once
 * (src/case/range.ts, a message under the field at fault) and computed in module workers
 * (worker/range.worker.ts, the lenses shared between two), so the page never waits; a newer
 * family ends an older job. A
 * limit in the table, or a point of the chart, opens that lens at that decentration in the
 * single-lens view (through the `onOpen` it is given). Undo and redo (buttons above the
 * controls, Ctrl/Cmd+Z and Shift+Ctrl/Cmd+Z) step through the valid families shown
 * (src/ui/history.ts; docs/range.md, "Undo and redo").
 */
import { InputError } from '../../case/input.ts';
import { type Breakdown, type RangeRow, type RangeSpec, readLevels, readRangeSpec, rowsPerLens, withinText } from '../../case/range.ts';
import type { ViewCase } from '../../case/url.ts';
import type { RangeJob, RangeMessage } from '../../worker/rangeProtocol.ts';
import type { RangeExportSource, RangeExporter } from '../exports/range.ts';
import { num } from '../format.ts';
import { History, bindUndoKeys, undoButtons } from '../history.ts';
import { el, invalidInputText } from '../resultsPane.ts';
import { BreakdownChart, levelText } from './breakdownChart.ts';
import { RangeControls } from './controls.ts';
import {
  DEFAULT_FAMILY, FAMILY_LABELS, type FamilyForm, type FamilyKey, cellDecentrationMm, commandLine, commandWords,
  familyLabel, familyViewCase, fieldOfLabel, rangeInput,
} from './family.ts';
import { LimitsTable } from './limitsTable.ts';
import './range.css';

export interface RangeWorkspaceOptions {
  /** open a lens in the single-lens view (and show that view) */
  onOpen: (c: ViewCase) => void;
  /** the export panel (the app's one export path) */
  exporter: RangeExporter | null;
}

/** Wait this long after the last keystroke before computing (ms). */
const SETTLE_MS = 120;

interface Shown {
  form: FamilyForm;
  spec: RangeSpec;
  rows: RangeRow[];
  breakdown: Breakdown;
}

export class RangeWorkspace {
  readonly root: HTMLElement;
  readonly controls: RangeControls;
  readonly table: LimitsTable;
  readonly chart: BreakdownChart;
  private readonly status: HTMLElement;
  private readonly progress: HTMLProgressElement;
  private readonly chartPick: { cyl: HTMLSelectElement; axis: HTMLSelectElement; dir: HTMLSelectElement };
  private readonly breakdownBody: HTMLElement;
  private readonly command: HTMLElement;
  private form: FamilyForm;
  private shown: Shown | null = null;
  /** the valid families, for undo and redo (a refused value is never a step) */
  private readonly history: History<FamilyForm>;
  private readonly syncUndo: (canUndo: boolean, canRedo: boolean) => void;
  private readonly unbindKeys: () => void;
  /** the computing workers (one per core, at most two; built when first needed) */
  private readonly workers: (Worker | null)[] = new Array(Math.max(1, Math.min(2, navigator.hardwareConcurrency || 1))).fill(null);
  private readonly busy: boolean[] = this.workers.map(() => false);
  private jobId = 0;
  private settleTimer = 0;
  /** when the change being answered was made (performance.now()) */
  private changedAt = 0;
  private pending: { form: FamilyForm; spec: RangeSpec } | null = null;
  /** what the end-to-end tests read (see hook()) */
  private readonly counters = { updates: 0, lastAnswerMs: 0, lastRowsMs: 0, lastBreakdownMs: 0, valid: true, jobs: 0 };

  constructor(root: HTMLElement, private readonly o: RangeWorkspaceOptions) {
    this.root = root;
    this.form = { ...DEFAULT_FAMILY };

    const controlsHost = el('aside', 'controls range-controls');
    controlsHost.setAttribute('aria-label', 'Range: the lens family');
    const centre = el('section', 'centre range-centre');
    const top = el('div', 'range-top');
    const head = el('div', 'range-head');
    head.append(el('h2', undefined, 'Decentration limits'));
    this.status = el('p', 'range-status');
    this.status.setAttribute('role', 'status');
    this.status.setAttribute('aria-live', 'polite');
    this.progress = el('progress', 'range-progress');
    this.progress.max = 1;
    this.progress.value = 0;
    this.progress.hidden = true;
    this.progress.setAttribute('aria-label', 'computing the range');
    head.append(this.status, this.progress);
    top.append(head);
    this.table = new LimitsTable(top);

    const bottom = el('div', 'range-bottom');
    const chartHead = el('div', 'range-head');
    chartHead.append(el('h2', undefined, 'Where Prentice’s rule breaks down'));
    const pick = (label: string, key: string): HTMLSelectElement => {
      const s = el('select');
      s.dataset.chart = key;
      s.setAttribute('aria-label', `chart: ${label}`);
      const l = el('label', 'range-pick', `${label} `);
      l.append(s);
      chartHead.append(l);
      s.addEventListener('change', () => this.changed(null));
      return s;
    };
    this.chartPick = { cyl: pick('cylinder', 'cyl'), axis: pick('axis', 'axis'), dir: pick('direction', 'dir') };
    bottom.append(chartHead);
    this.chart = new BreakdownChart(bottom);
    centre.append(top, bottom);

    const results = el('aside', 'results range-results');
    results.setAttribute('aria-label', 'Range: breakdown table and files');
    results.append(el('h2', undefined, 'Prentice within a level'));
    const intro = el('p', 'range-intro', 'For each sphere, the largest decentration (mm, along the chart’s direction) at which Prentice’s rule stays within each level of the exact prism at the eye.');
    const bt = el('table', 'range-breakdown');
    this.breakdownBody = bt;
    results.append(intro, bt);
    results.append(el('h2', undefined, 'Files'));
    const files = el('div', 'range-files');
    for (const [fmt, label] of [['csv', 'Limits as CSV'], ['json', 'Limits as JSON'], ['spec', 'Spec sheet (HTML)']] as const) {
      const b = el('button', 'range-file', label);
      b.type = 'button';
      b.dataset.export = fmt;
      b.disabled = !o.exporter;
      b.addEventListener('click', () => o.exporter?.exportRange(fmt, { form: () => this.exportForm() }));
      files.append(b);
    }
    results.append(files);
    results.append(el('p', 'export-note', 'The same table from the command line:'));
    this.command = el('code', 'export-command range-command');
    results.append(this.command);
    const caution = el('p', 'range-caution');
    caution.setAttribute('role', 'note');
    caution.append(el('strong', undefined, 'Caution: '), 'these limits are a computation aid for an untilted lens, the centre of rotation on its axis; they are not a measurement. Verify every lens with a focimeter, and defer to local regulations and licensed practice.');
    results.append(caution);
    root.replaceChildren(controlsHost, centre, results);

    this.controls = new RangeControls(controlsHost, this.form, (f, field) => { this.form = f; this.changed(field); }, () => {
      this.form = { ...DEFAULT_FAMILY };
      this.controls.setForm(this.form);
      this.changed(null);
    });
    this.history = new History<FamilyForm>({ ...this.form }, sameFamily);
    const undo = { undo: () => this.step('undo'), redo: () => this.step('redo') };
    this.syncUndo = undoButtons(controlsHost, undo, 'range');
    this.unbindKeys = bindUndoKeys(root, undo);
    this.table.onPick = (row, col) => {
      const d = cellDecentrationMm(row, col);
      if (d === null || !this.shown) return;
      this.open(this.shown.form, row.sphere, row.cyl, row.axis, row.dirDeg, d);
    };
    this.chart.onPick = (sphere, d) => {
      const s = this.shown;
      if (!s) return;
      const b = s.breakdown;
      this.open(s.form, sphere, b.cyl, b.axis, b.direction.deg, d);
    };
    this.changed(null);
  }

  private open(form: FamilyForm, sphere: number, cyl: number, axis: number, dirDeg: number, distMm: number): void {
    this.o.onOpen(familyViewCase(form, { sphere: String(sphere), cyl: String(cyl), axis: String(axis) }, { dirDeg, distMm }));
  }

  /** the chart's choices (indices), as selected */
  private chartChoice(): { cyl: number; axis: number; dir: number } {
    const v = (s: HTMLSelectElement) => Math.max(0, Number(s.value) || 0);
    return { cyl: v(this.chartPick.cyl), axis: v(this.chartPick.axis), dir: v(this.chartPick.dir) };
  }

  /** Refill a chart select when the family's list changes (keeping the choice if it is still there). */
  private fillPick(s: HTMLSelectElement, labels: string[]): void {
    const now = Array.from(s.options).map((o) => o.textContent).join('|');
    if (now === labels.join('|')) return;
    const keep = s.selectedOptions[0]?.textContent ?? '';
    s.replaceChildren(...labels.map((l, i) => {
      const o = el('option', undefined, l);
      o.value = String(i);
      return o;
    }));
    const k = labels.indexOf(keep);
    s.value = String(k >= 0 ? k : 0);
    s.disabled = labels.length < 2;
  }

  /** Check the family now; compute it a moment after the last change. */
  private changed(field: FamilyKey | null): void {
    void field;
    if (!this.settleTimer) this.changedAt = performance.now();
    window.clearTimeout(this.settleTimer);
    let spec: RangeSpec;
    try {
      spec = this.check(this.form);
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      this.settleTimer = 0;
      this.refuse(e);
      return;
    }
    this.controls.showError(null, null);
    // a valid family is a step (edits of one field in quick succession are one)
    this.history.record({ ...this.form }, field);
    this.syncUndo(this.history.canUndo, this.history.canRedo);
    this.fillPick(this.chartPick.cyl, spec.cyls.map((c) => `${num(c, 2)} D`));
    this.fillPick(this.chartPick.axis, spec.axes.map((a) => `${num(a, 0)}°`));
    this.fillPick(this.chartPick.dir, spec.directions.map((d) => d.label));
    this.command.textContent = commandLine([...commandWords(this.form, 'limits'), '--format', 'csv']);
    this.pending = { form: { ...this.form }, spec };
    this.settleTimer = window.setTimeout(() => {
      this.settleTimer = 0;
      this.run();
    }, this.shown ? SETTLE_MS : 0);
  }

  /** Undo or redo: the whole family comes back, in the fields, the table and the chart. */
  private step(which: 'undo' | 'redo'): void {
    const f = which === 'undo' ? this.history.undo() : this.history.redo();
    if (!f) return;
    this.form = { ...f };
    this.controls.setForm(this.form);
    this.changed(null);
  }

  /** The family's checks (fast: the first lens's form only). */
  private check(f: FamilyForm): RangeSpec {
    const spec = readRangeSpec(rangeInput(f), familyLabel);
    readLevels(FAMILY_LABELS.levels, f.levels);
    return spec;
  }

  private refuse(e: InputError): void {
    const field = fieldOfLabel(e.field);
    this.controls.showError(field, e.message);
    this.counters.valid = false;
    this.counters.updates++;
    this.status.textContent = invalidInputText(e.message, !!this.shown, 'family');
    this.status.dataset.state = 'invalid';
    this.table.setStale(!!this.shown);
    this.chart.setStale(!!this.shown);
    this.breakdownBody.classList.toggle('stale', !!this.shown);
    this.command.textContent = '—';
    this.stopWorker();
  }

  /** End the workers still busy with an older job (the idle ones keep their remembered lenses). */
  private stopWorker(): void {
    this.workers.forEach((w, k) => {
      if (w && this.busy[k]) {
        w.terminate();
        this.workers[k] = null;
      }
    });
    this.busy.fill(false);
    this.progress.hidden = true;
  }

  private run(): void {
    const p = this.pending;
    if (!p) return;
    this.pending = null;
    this.stopWorker();
    const id = ++this.jobId;
    const lensCount = p.spec.spheres.length * p.spec.cyls.length * p.spec.axes.length;
    // share the lenses between the workers, interleaved (neighbouring powers cost alike)
    const n = Math.min(this.workers.length, lensCount);
    const parts: (Extract<RangeMessage, { type: 'done' }> | null)[] = new Array(n).fill(null);
    const done: number[] = new Array(n).fill(0);
    const input = rangeInput(p.form);
    const chart = this.chartChoice();
    for (let k = 0; k < n; k++) {
      let w = this.workers[k];
      if (!w) {
        w = new Worker(new URL('../../worker/range.worker.ts', import.meta.url), { type: 'module' });
        w.onerror = (e) => {
          this.stopWorker();
          this.status.textContent = `The range could not be computed: ${e.message}`;
          this.status.dataset.state = 'invalid';
        };
        this.workers[k] = w;
      }
      // a job's own form, spec and parts travel with its handler
      w.onmessage = (e: MessageEvent<RangeMessage>) => {
        const m = e.data;
        if (m.id !== this.jobId) return;
        if (m.type === 'progress') {
          done[k] = m.done;
          this.showProgress(done.reduce((x, y) => x + y, 0), lensCount);
          return;
        }
        this.busy[k] = false;
        if (m.type === 'error') {
          this.stopWorker();
          this.refuse(new InputError(m.field ?? 'range', m.message.replace(/^[^:]*: /, '')));
          return;
        }
        parts[k] = m;
        if (parts.every((x) => x)) this.receive(parts as Extract<RangeMessage, { type: 'done' }>[], p.form, p.spec);
      };
      const lenses: number[] = [];
      for (let i = k; i < lensCount; i += n) lenses.push(i);
      this.busy[k] = true;
      const job: RangeJob = { id, input, levels: p.form.levels, chart, lenses: n === 1 ? null : lenses, breakdown: k === 0 };
      w.postMessage(job);
    }
    this.counters.jobs++;
    this.status.textContent = 'Computing…';
    this.status.dataset.state = 'computing';
  }

  private showProgress(doneLenses: number, total: number): void {
    // show the bar only for a job long enough to notice
    if (performance.now() - this.changedAt < 300) return;
    this.progress.hidden = false;
    this.progress.max = total;
    this.progress.value = doneLenses;
    this.status.textContent = `Computing: ${doneLenses} of ${total} lenses…`;
  }

  /** All the workers' parts are in: put the rows back in lens order and show them. */
  private receive(parts: Extract<RangeMessage, { type: 'done' }>[], form: FamilyForm, spec: RangeSpec): void {
    this.progress.hidden = true;
    const n = parts.length;
    const per = rowsPerLens(spec);
    const lensCount = spec.spheres.length * spec.cyls.length * spec.axes.length;
    const rows: RangeRow[] = [];
    for (let i = 0; i < lensCount; i++) {
      const part = parts[i % n]!.rows;
      const at = Math.floor(i / n) * per;
      for (let j = 0; j < per; j++) rows.push(part[at + j]!);
    }
    const b = parts[0]!.breakdown!;
    this.shown = { form, spec, rows, breakdown: b };
    this.table.update(rows, spec.decimals);
    this.chart.update(b);
    this.drawBreakdown(b);
    this.breakdownBody.classList.remove('stale');
    const rowsMs = Math.max(...parts.map((m) => m.rowsMs));
    this.counters.lastAnswerMs = performance.now() - this.changedAt;
    this.counters.lastRowsMs = rowsMs;
    this.counters.lastBreakdownMs = parts[0]!.breakdownMs;
    this.counters.valid = true;
    this.counters.updates++;
    this.status.textContent = `${lensCount} lens${lensCount === 1 ? '' : 'es'}, ${rows.length} rows; computed in ${(rowsMs + parts[0]!.breakdownMs).toFixed(0)} ms` +
      `${n > 1 ? ` on ${n} workers` : ''}.`;
    this.status.dataset.state = 'current';
  }

  private drawBreakdown(b: Breakdown): void {
    const t = this.breakdownBody;
    const head = el('thead');
    const hr = el('tr');
    hr.append(el('th', undefined, 'sphere D'));
    for (const l of b.levels) hr.append(el('th', undefined, `within ${levelText(l)}`));
    head.append(hr);
    const body = el('tbody');
    for (const r of b.rows) {
      const tr = el('tr');
      tr.append(el('td', undefined, num(r.sphere, 2)));
      b.levels.forEach((_, i) => {
        const c = el('td', undefined, withinText(r, i, 1));
        c.dataset.level = String(b.levels[i]);
        if (r.reason !== 'ok') c.title = r.reason;
        tr.append(c);
      });
      body.append(tr);
    }
    const cap = el('caption', undefined, `Along ${b.direction.label}, cylinder ${num(b.cyl, 2)} D × ${num(b.axis, 0)}°.`);
    t.replaceChildren(cap, head, body);
  }

  /** The family for a file export: the form as typed now, checked. */
  private exportForm(): ReturnType<RangeExportSource['form']> {
    try {
      this.check(this.form);
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      return { ok: false, message: e.message };
    }
    return { ok: true, form: { ...this.form }, chart: this.chartChoice() };
  }

  /** Put a family into the fields (tests, and a restored family) and compute it. */
  setForm(f: FamilyForm): void {
    this.form = { ...f };
    this.controls.setForm(this.form);
    this.changed(null);
  }

  /** What the end-to-end tests read (nothing else uses it). */
  hook() {
    const c = this.counters;
    const self = this;
    return {
      get updates() { return c.updates; },
      get lastAnswerMs() { return c.lastAnswerMs; },
      get lastRowsMs() { return c.lastRowsMs; },
      get lastBreakdownMs() { return c.lastBreakdownMs; },
      get valid() { return c.valid; },
      get jobs() { return c.jobs; },
      rows: () => self.shown?.rows.length ?? 0,
      form: () => ({ ...self.form }),
      setForm: (f: Partial<FamilyForm>) => self.setForm({ ...self.form, ...f }),
      commandWords: (command: 'limits' | 'spec') => commandWords(self.form, command),
      canUndo: () => self.history.canUndo,
      canRedo: () => self.history.canRedo,
    };
  }

  dispose(): void {
    window.clearTimeout(this.settleTimer);
    this.unbindKeys();
    for (const w of this.workers) w?.terminate();
    this.controls.dispose();
    this.root.replaceChildren();
  }
}

/** Two families are the same step when every field reads the same. */
function sameFamily(a: FamilyForm, b: FamilyForm): boolean {
  return JSON.stringify(a) === JSON.stringify(b);
}
