/**
 * The limits view: for one lens of the case (right or left), the largest decentration that
 * keeps the prism at the eye within a tolerance along a direction (exact, first-order and
 * Prentice's c = P / |F u|), the in-tolerance region drawn over the lens (exact against
 * Prentice, from toleranceOutline), and the decentration that gives a prescribed prism
 * (decentrationForPrism, with Prentice's impossibility when det F = 0) with the minimum
 * blank size for it (minimumBlankMm).
 *
 * As in the engine, these are for the lens untilted with the centre of rotation on its axis
 * at the case's back-vertex-to-CR distance. Lens frame: x towards the wearer's left, y up,
 * seen facing the wearer (right eye: +x nasal; left eye: -x nasal). All optics from
 * src/optics; this file reads inputs, calls it and draws.
 */
import { InputError, inRange } from '../../case/input.ts';
import { readTypedNumber } from '../numberInput.ts';
import {
  type Lens, type LimitResult, type PrescribedDecentration, decentrationForPrism, decentrationLimit,
  horizontalComponent, minimumBlankMm, toleranceOutline,
} from '../../optics/index.ts';
import { DASH, num, withUnit } from '../format.ts';
import type { BinocularComputed } from './compute.ts';
import { EYE_NAMES, type Side } from './form.ts';
import { nasalSign, offsetWords } from './words.ts';
import { el, svg } from '../resultsPane.ts';

const OUTLINE_DIRECTIONS = 72;
/** blank allowance added by minimumBlankMm, mm (its default; common practice) */
const BLANK_ALLOWANCE_MM = 2;

type InputKey = 'tol' | 'dir' | 'h' | 'v' | 'ed';

interface Inputs {
  tol: number;
  dir: number;
  h: number;
  hBase: 'in' | 'out';
  v: number;
  vBase: 'up' | 'down';
  ed: number;
}

const INPUT_SPECS: Record<InputKey, { label: string; quantity: 'prism' | 'angle' | 'length'; range: Parameters<typeof inRange>[2]; value: string }> = {
  tol: { label: 'tolerance', quantity: 'prism', range: { min: 0, max: 20, above: true, unit: 'Δ' }, value: '0.50' },
  dir: { label: 'direction', quantity: 'angle', range: { min: -360, max: 720, unit: 'degrees' }, value: '0' },
  h: { label: 'horizontal prism', quantity: 'prism', range: { min: 0, max: 20, unit: 'Δ' }, value: '1.00' },
  v: { label: 'vertical prism', quantity: 'prism', range: { min: 0, max: 20, unit: 'Δ' }, value: '0.00' },
  ed: { label: 'effective diameter (ED)', quantity: 'length', range: { min: 10, max: 100, unit: 'mm' }, value: '50' },
};

export class LimitsView {
  readonly root: HTMLElement;
  private side: Side = 'right';
  private last: BinocularComputed | null = null;
  private readonly figure: HTMLElement;
  private readonly svgEl: SVGSVGElement;
  private readonly inputs = new Map<InputKey, HTMLInputElement>();
  private readonly errors = new Map<InputKey, HTMLElement>();
  private readonly hBase: HTMLSelectElement;
  private readonly vBase: HTMLSelectElement;
  private readonly limitOut: HTMLElement;
  private readonly prismOut: HTMLElement;
  private readonly note: HTMLElement;
  private readonly sideButtons: HTMLButtonElement[] = [];
  private readonly paneButtons: HTMLButtonElement[] = [];
  private readonly panes: HTMLElement[] = [];
  private outlineKey = '';
  private outline: { angleDeg: number; limit: LimitResult }[] = [];
  /** the largest-decentration result last shown (tests read it through the page's data-value) */
  limit: LimitResult | null = null;
  prescribed: PrescribedDecentration | null = null;
  /** computations so far (tests wait on it) */
  computed = 0;

  constructor(host: HTMLElement) {
    this.root = host;
    host.classList.add('bi-limits');
    this.figure = el('div', 'bi-limits-figure');
    this.svgEl = svg('svg', { class: 'bi-limits-svg', role: 'img', 'aria-label': 'In-tolerance region over the lens' });
    this.figure.append(this.svgEl);
    const side = el('div', 'bi-limits-side');

    const head = el('div', 'bi-limits-head');
    head.append(el('span', 'bi-limits-title', 'Limits for the'));
    const seg = el('div', 'bi-seg');
    seg.setAttribute('role', 'radiogroup');
    seg.setAttribute('aria-label', 'Which lens');
    for (const s of ['right', 'left'] as const) {
      const b = el('button', undefined, s === 'right' ? 'right lens' : 'left lens');
      b.type = 'button';
      b.dataset.side = s;
      b.setAttribute('role', 'radio');
      b.addEventListener('click', () => this.setSide(s));
      this.sideButtons.push(b);
      seg.append(b);
    }
    head.append(seg);
    side.append(head);

    // two panes, one at a time: the largest decentration, and the decentration for a prism
    const tabs = el('div', 'bi-subtabs');
    tabs.setAttribute('role', 'tablist');
    tabs.setAttribute('aria-label', 'Limits');
    side.append(tabs);
    const pane = (name: string, label: string): HTMLElement => {
      const b = el('button', undefined, label);
      b.type = 'button';
      b.setAttribute('role', 'tab');
      b.dataset.pane = name;
      b.id = `bi-subtab-${name}`;
      const p = el('div', 'bi-pane');
      p.setAttribute('role', 'tabpanel');
      p.dataset.pane = name;
      p.setAttribute('aria-labelledby', b.id);
      b.addEventListener('click', () => this.showPane(name));
      b.addEventListener('keydown', (e) => {
        if (e.key !== 'ArrowRight' && e.key !== 'ArrowLeft') return;
        const other = this.paneButtons.find((o) => o !== b)!;
        other.focus();
        this.showPane(other.dataset.pane!);
      });
      this.paneButtons.push(b);
      this.panes.push(p);
      tabs.append(b);
      side.append(p);
      return p;
    };

    // largest decentration
    const lim = pane('limit', 'Largest decentration');
    const row1 = el('div', 'bi-row');
    row1.append(this.input('tol', 'Tolerance', 'Δ'), this.input('dir', 'Direction', '°'));
    lim.append(row1);
    const quick = el('div', 'bi-quick');
    quick.append('Direction: ');
    for (const [name, which] of [['nasal', 'nasal'], ['temporal', 'temporal'], ['up', 'up'], ['down', 'down']] as const) {
      const b = el('button', undefined, name);
      b.type = 'button';
      b.dataset.dir = which;
      b.addEventListener('click', () => {
        const n = nasalSign(this.side);
        const deg = which === 'up' ? 90 : which === 'down' ? 270 : (which === 'nasal') === (n > 0) ? 0 : 180;
        this.inputs.get('dir')!.value = String(deg);
        this.refresh();
      });
      quick.append(b);
    }
    lim.append(quick);
    this.limitOut = el('div', 'bi-out');
    this.limitOut.dataset.out = 'limit';
    lim.append(this.limitOut);

    // decentration for a prescribed prism
    const pre = pane('prescribed', 'Prism by decentration');
    const row2 = el('div', 'bi-row');
    this.hBase = this.select('hBase', { in: 'base in', out: 'base out' });
    this.vBase = this.select('vBase', { up: 'base up', down: 'base down' });
    row2.append(this.input('h', 'Horizontal', 'Δ', this.hBase), this.input('v', 'Vertical', 'Δ', this.vBase),
      this.input('ed', 'ED of the shape', 'mm'));
    pre.append(row2);
    this.prismOut = el('div', 'bi-out');
    this.prismOut.dataset.out = 'prescribed';
    pre.append(this.prismOut);

    this.note = el('p', 'bi-note');
    side.append(this.note);
    host.append(this.figure, side);
    this.setSide('right', false);
    this.showPane('limit');
  }

  /** Show one of the two panes ('limit' or 'prescribed'). */
  showPane(name: string): void {
    for (const b of this.paneButtons) {
      const on = b.dataset.pane === name;
      b.setAttribute('aria-selected', String(on));
      b.tabIndex = on ? 0 : -1;
    }
    for (const p of this.panes) p.hidden = p.dataset.pane !== name;
  }

  /** A new case (or the same case again): recompute what depends on the lens. */
  update(r: BinocularComputed): void {
    this.last = r;
    this.root.classList.remove('stale');
    this.refresh();
  }

  setStale(stale: boolean): void {
    this.root.classList.toggle('stale', stale);
  }

  private setSide(s: Side, refresh = true): void {
    this.side = s;
    for (const b of this.sideButtons) b.setAttribute('aria-checked', String(b.dataset.side === s));
    if (refresh) this.refresh();
  }

  private input(key: InputKey, label: string, unit: string, after?: HTMLElement): HTMLElement {
    const spec = INPUT_SPECS[key];
    const wrap = el('label', 'bi-field');
    wrap.append(el('span', 'bi-field-label', label));
    const box = el('span', 'bi-field-box');
    const inp = el('input');
    inp.type = 'text';
    inp.value = spec.value;
    inp.dataset.field = `limits.${key}`;
    inp.setAttribute('inputmode', 'decimal');
    inp.setAttribute('aria-describedby', `bi-lim-err-${key}`);
    inp.addEventListener('input', () => this.refresh());
    box.append(inp, el('span', 'bi-unit', unit));
    if (after) box.append(after);
    wrap.append(box);
    const err = el('div', 'field-error');
    err.id = `bi-lim-err-${key}`;
    err.setAttribute('role', 'alert');
    err.hidden = true;
    wrap.append(err);
    this.inputs.set(key, inp);
    this.errors.set(key, err);
    return wrap;
  }

  private select(key: string, options: Record<string, string>): HTMLSelectElement {
    const s = el('select');
    s.dataset.field = `limits.${key}`;
    for (const [v, t] of Object.entries(options)) {
      const o = el('option', undefined, t);
      o.value = v;
      s.append(o);
    }
    s.addEventListener('change', () => this.refresh());
    return s;
  }

  /** Read the inputs; a bad one gets its message, and the result stays, marked stale. */
  private read(): Inputs | null {
    let ok = true;
    const val = {} as Record<InputKey, number>;
    for (const [key, inp] of this.inputs) {
      const spec = INPUT_SPECS[key];
      const err = this.errors.get(key)!;
      try {
        val[key] = inRange(spec.label, readTypedNumber(spec.label, inp.value, spec.quantity), spec.range);
        err.hidden = true;
        inp.removeAttribute('aria-invalid');
      } catch (e) {
        if (!(e instanceof InputError)) throw e;
        err.textContent = e.message;
        err.hidden = false;
        inp.setAttribute('aria-invalid', 'true');
        ok = false;
      }
    }
    if (!ok) return null;
    return {
      tol: val.tol, dir: ((val.dir % 360) + 360) % 360, h: val.h, v: val.v, ed: val.ed,
      hBase: this.hBase.value as 'in' | 'out', vBase: this.vBase.value as 'up' | 'down',
    };
  }

  private refresh(): void {
    const r = this.last;
    const inp = this.read();
    this.root.classList.toggle('inputs-stale', !inp);
    if (!r || !inp) return;
    const side = this.side;
    const lens = r.fit.lenses[side];
    const crMm = r.c[side].crMm;
    const eye = side === 'right' ? 'R' : 'L';
    const key = JSON.stringify([lens.spec, crMm, inp.tol]);
    if (key !== this.outlineKey) {
      this.outlineKey = key;
      this.outline = toleranceOutline(lens, crMm, inp.tol, OUTLINE_DIRECTIONS);
    }
    this.limit = decentrationLimit(lens, crMm, inp.dir, inp.tol);
    const px = horizontalComponent(inp.h, inp.hBase, eye);
    const py = inp.vBase === 'up' ? inp.v : -inp.v;
    this.prescribed = decentrationForPrism(lens, crMm, px, py);
    this.showLimit(this.limit, inp, lens);
    this.showPrescribed(this.prescribed, inp, lens, side);
    const drawR = Number.isFinite(lens.radiusMm) ? lens.radiusMm : (r.eyes[side].drawLens?.radiusMm ?? 32.5);
    this.draw(inp, drawR, Number.isFinite(lens.radiusMm), r.fit.result[side].fixation.status === 'ok' ? r.fit.result[side].fromOcMm : null);
    this.note.textContent =
      `${EYE_NAMES[side]}’s lens untilted, centre of rotation on its axis ${withUnit(crMm, 'mm', 1)} behind the back vertex. ` +
      'Prentice: c = P / |F u|. First-order: the paraxial thick lens to the centre of rotation. Exact: real rays, scanned ' +
      'outwards and bisected.';
    this.computed++;
  }

  private showLimit(l: LimitResult, inp: Inputs, lens: Lens): void {
    const o = this.limitOut;
    o.replaceChildren();
    const t = el('table', 'bi-lim-table');
    const row = (name: string, q: string, v: number | null, note: string): void => {
      const tr = el('tr');
      tr.dataset.row = q;
      tr.append(el('th', undefined, name));
      const td = el('td');
      const s = el('span', 'v', v === null ? DASH : withUnit(v, 'mm', 2));
      s.dataset.q = q;
      if (v !== null && Number.isFinite(v)) s.dataset.value = String(v);
      td.append(s);
      if (note) td.append(el('span', 'bi-note', ` ${note}`));
      tr.append(td);
      t.append(tr);
    };
    const exactNote = l.exactReason === 'never-reached'
      ? `within ${num(inp.tol)} Δ as far as the search went (${withUnit(l.searchedToMm, 'mm', 1)}${Number.isFinite(lens.radiusMm) ? ', the lens edge' : ''})`
      : l.exactReason === 'trace-failed'
        ? `the exact trace fails beyond ${withUnit(l.exactMm ?? 0, 'mm', 2)} (the line of sight leaves the lens)`
        : '';
    row('Exact', 'limit-exact', l.exactReason === 'ok' ? l.exactMm : null, exactNote);
    row('First-order', 'limit-paraxial', l.paraxialMm, l.paraxialMm === null ? 'no limit (no power along this direction)' : '');
    row('Prentice', 'limit-prentice', l.prenticeMm, l.prenticeMm === null ? 'no limit: no power along this direction, so no prism by the rule' : '');
    o.append(t);
    if (l.exactReason === 'ok' && l.exactMm !== null && l.prenticeMm !== null) {
      const d = l.exactMm - l.prenticeMm;
      const p = el('p', 'bi-diff');
      const s = el('span', 'v', `${d > 0 ? '+' : ''}${num(d)} mm`);
      s.dataset.q = 'limit-diff';
      s.dataset.value = String(d);
      p.append('Exact − Prentice: ', s, d < -0.005 ? ' (Prentice’s rule allows too much decentration here)' : d > 0.005 ? ' (Prentice’s rule is on the safe side here)' : ' (they agree)');
      o.append(p);
    }
  }

  private showPrescribed(p: PrescribedDecentration, inp: Inputs, lens: Lens, side: Side): void {
    const o = this.prismOut;
    o.replaceChildren();
    const dia = Number.isFinite(lens.radiusMm) ? 2 * lens.radiusMm : null;
    const line = (name: string, q: string, c: { x: number; y: number } | null, message: string): void => {
      const div = el('div', 'bi-pres');
      div.dataset.row = q;
      div.append(el('strong', undefined, `${name}: `));
      if (!c) {
        div.append(el('span', 'failed', message));
        o.append(div);
        return;
      }
      const at = offsetWords(-c.x, -c.y, side);
      const s = el('span', 'v', at === 'at it' ? 'optical centre at the visual point' : `optical centre ${at} from the visual point`);
      s.dataset.q = q;
      div.append(s);
      for (const [k, v] of [['x', c.x], ['y', c.y]] as const) {
        const h = el('span');
        h.hidden = true;
        h.dataset.q = `${q}-${k}`;
        h.dataset.value = String(v);
        div.append(h);
      }
      const blank = minimumBlankMm(inp.ed, c.x, c.y, BLANK_ALLOWANCE_MM);
      const b = el('span', 'v', withUnit(blank, 'mm', 1));
      b.dataset.q = `${q}-blank`;
      b.dataset.value = String(blank);
      div.append('; minimum blank ', b);
      if (dia !== null) {
        div.append(blank <= dia + 1e-9
          ? ` (the ${withUnit(dia, 'mm', 0)} lens is big enough)`
          : el('span', 'failed', ` (the ${withUnit(dia, 'mm', 0)} lens is ${withUnit(blank - dia, 'mm', 1)} too small)`));
      }
      o.append(div);
    };
    line('Exact', 'pres-exact', p.exact, p.exactMessage);
    line('Prentice', 'pres-prentice', p.prentice, p.prenticeMessage);
    o.append(el('p', 'bi-note',
      `Minimum blank = ED + 2 × decentration + ${BLANK_ALLOWANCE_MM} mm (common practice).` +
      (dia === null ? ' The case gives no lens diameter to compare with.' : '')));
  }

  /** The lens outline, the exact and Prentice regions, the direction and the limits on it. */
  private draw(inp: Inputs, lensR: number, hasDiameter: boolean, vp: { x: number; y: number } | null): void {
    const s = this.svgEl;
    s.replaceChildren();
    const size = Math.max(120, Math.min(this.figure.clientWidth || 248, (this.figure.clientHeight || 284) - 36));
    s.setAttribute('width', String(size));
    s.setAttribute('height', String(size));
    s.setAttribute('viewBox', `0 0 ${size} ${size}`);
    // scale: the larger of the regions, with room, but never beyond the lens
    let reach = 0;
    for (const o of this.outline) {
      const e = o.limit.exactMm ?? o.limit.searchedToMm;
      reach = Math.max(reach, Math.min(e, lensR), Math.min(o.limit.prenticeMm ?? lensR, lensR));
    }
    if (this.limit?.exactMm) reach = Math.max(reach, Math.min(this.limit.exactMm, lensR));
    const half = Math.max(0.25, Math.min(lensR * 1.08, reach * 1.35));
    const k = size / (2 * half); // pixels per mm
    // lens-frame mm (x to the wearer's left, y up, seen facing the wearer) to pixels
    const X = (x: number): number => size / 2 + x * k;
    const Y = (y: number): number => size / 2 - y * k;
    const f = (v: number): string => v.toFixed(2);
    const defs = svg('defs', {});
    const clip = svg('clipPath', { id: 'bi-lens-clip' });
    clip.append(svg('circle', { cx: f(X(0)), cy: f(Y(0)), r: f(lensR * k) }));
    defs.append(clip);
    s.append(defs);
    // the lens
    s.append(svg('circle', { cx: f(X(0)), cy: f(Y(0)), r: f(lensR * k), class: 'bi-lens-rim' }));
    s.append(svg('line', { x1: 0, y1: f(Y(0)), x2: size, y2: f(Y(0)), class: 'bi-lens-axis' }));
    s.append(svg('line', { x1: f(X(0)), y1: 0, x2: f(X(0)), y2: size, class: 'bi-lens-axis' }));
    const poly = (pick: (l: LimitResult) => number, cls: string): void => {
      const pts = this.outline.map((o) => {
        const a = (o.angleDeg * Math.PI) / 180;
        const d = Math.min(pick(o.limit), lensR * 1.5);
        return `${f(X(d * Math.cos(a)))},${f(Y(d * Math.sin(a)))}`;
      });
      s.append(svg('polygon', { points: pts.join(' '), class: cls, 'clip-path': 'url(#bi-lens-clip)' }));
    };
    poly((l) => l.exactMm ?? l.searchedToMm, 'bi-region-exact');
    poly((l) => l.prenticeMm ?? lensR * 1.5, 'bi-region-prentice');
    // the direction and the limits on it
    const a = (inp.dir * Math.PI) / 180, ux = Math.cos(a), uy = Math.sin(a);
    const far = Math.min(lensR, 1.5 * half);
    s.append(svg('line', { x1: f(X(0)), y1: f(Y(0)), x2: f(X(far * ux)), y2: f(Y(far * uy)), class: 'bi-dir' }));
    const dot = (d: number | null, cls: string, r: number): void => {
      if (d === null || !(d <= 1.5 * half)) return;
      s.append(svg('circle', { cx: f(X(d * ux)), cy: f(Y(d * uy)), r, class: cls }));
    };
    if (this.limit) {
      dot(this.limit.prenticeMm, 'bi-dot-prentice', 4);
      dot(this.limit.paraxialMm, 'bi-dot-paraxial', 3);
      if (this.limit.exactReason === 'ok') dot(this.limit.exactMm, 'bi-dot-exact', 3.4);
    }
    s.append(svg('circle', { cx: f(X(0)), cy: f(Y(0)), r: 2.6, class: 'bi-oc' }));
    if (vp && Math.abs(vp.x) < half && Math.abs(vp.y) < half) {
      s.append(svg('circle', { cx: f(X(vp.x)), cy: f(Y(vp.y)), r: 3.5, class: 'bi-vp' }));
    }
    // words: the eye's sides, a scale bar, what is shown
    const text = (x: number, y: number, t: string, cls: string, anchor = 'middle'): void => {
      const e = svg('text', { x: f(x), y: f(y), class: cls, 'text-anchor': anchor });
      e.textContent = t;
      s.append(e);
    };
    const n = nasalSign(this.side);
    text(size - 4, Y(0) - 9, n > 0 ? 'nasal' : 'temporal', 'bi-svg-text', 'end');
    text(4, Y(0) - 9, n > 0 ? 'temporal' : 'nasal', 'bi-svg-text', 'start');
    text(X(0) + 5, 13, 'up', 'bi-svg-text', 'start');
    const bar = niceStep(half * 0.5);
    const y0 = size - 24, x0 = 8;
    s.append(svg('line', { x1: x0, y1: y0, x2: f(x0 + bar * k), y2: y0, class: 'bi-scale' }));
    text(x0 + (bar * k) / 2, y0 - 5, `${bar >= 1 ? num(bar, 0) : num(bar, bar >= 0.1 ? 1 : 2)} mm`, 'bi-svg-text');
    if (half < lensR) text(size - 4, size - 6, `zoomed in: the lens edge is at ${num(lensR, 1)} mm`, 'bi-svg-note', 'end');
    else if (!hasDiameter) text(size - 4, size - 6, `no diameter given: ${num(2 * lensR, 0)} mm drawn`, 'bi-svg-note', 'end');
    this.figure.querySelector('.bi-limits-key')?.remove();
    const key = el('div', 'bi-limits-key');
    for (const [cls, t] of [['exact', `exact, within ${num(inp.tol)} Δ`], ['prentice', 'Prentice'], ['vp', 'visual point at the target']] as const) {
      const i = el('span', `bi-key-${cls}`);
      i.append(el('i'), t);
      key.append(i);
    }
    this.figure.append(key);
  }

  dispose(): void {
    this.root.replaceChildren();
  }
}

/** 1, 2 or 5 times a power of ten, at most v. */
function niceStep(v: number): number {
  const p = 10 ** Math.floor(Math.log10(Math.max(v, 1e-6)));
  const m = v / p;
  return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * p;
}
