/**
 * The "both eyes" panel: the case's three answers, never mixed, each under its own heading
 * with the question it answers (THREE_ANSWERS, the same words as `decentra fit` and the
 * clinician summary; docs/binocular.md):
 *
 * 1. At the marks (fit.marks): per eye, at its centration point, Prentice's rule with the
 *    nominal decentration, the exact focimeter reading, the first-order and exact values on
 *    the straight-ahead line, and the prescribed prism; the pair's net horizontal prism and
 *    vertical imbalance for each.
 * 2. The standard's verdict (fit.standard): the profile applied to the marks only, with the
 *    value against the allowance, the standard's row, the margin, the source, and whether
 *    Prentice's hand value would judge differently.
 * 3. What the eyes do at the target (fit.result, fit.demand, fit.guidance): visual points,
 *    eye rotations, the exact prism there with Prentice beside it, the pair, the demand and
 *    the clinical guidance (guidance, never pass/fail), colour fringes.
 *
 * Then slab-off in focimeter terms at the reading level (fit.slabOff). Every number carries its
 * unit, and its full signed value in data-value (data-q names it); nothing shown is NaN or
 * Infinity. When the inputs are invalid the last valid result stays, marked stale.
 */
import { powerCell } from '../../case/powerWords.ts';
import { GUIDANCE_SOURCES, type Answer, type Guidance, type MarkEye, type PrismDescription, type SignedPair, type Verdict, ruleText } from '../../optics/index.ts';
import type { FitReport } from '../../case/fit.ts';
import { DASH, num } from '../format.ts';
import { ResultsPane, el } from '../resultsPane.ts';
import type { BinocularComputed } from './compute.ts';
import { EYE_NAMES, SIDES, type Side } from './form.ts';
import {
  GUIDANCE_NOT_VERDICT, THREE_ANSWERS, demandWords, prenticeVerdictWords, imbalanceWords, isFailed, judgedWords, netHorizontalWords, offsetWords, prism360,
  prismWords, rotationWords, slabOffWords, standardSummary, targetWords,
} from './words.ts';

/** A span with text, its full value in data-value (for tests and copying) and a name in data-q. */
function valueSpan(text: string, q: string, value: number | null): HTMLSpanElement {
  const s = el('span', 'v', text);
  s.dataset.q = q;
  if (value !== null && Number.isFinite(value)) s.dataset.value = String(value);
  return s;
}

/** A value carried for tests and copying only (not shown). */
function hidden(q: string, v: number): HTMLSpanElement {
  const s = valueSpan('', q, v);
  s.hidden = true;
  return s;
}

/** A row header: the name, and a note under it. */
function rowHead(name: string, note = ''): HTMLTableCellElement {
  const th = el('th');
  th.scope = 'row';
  th.append(el('span', 'answer-name', name));
  if (note) th.append(el('span', 'answer-note', note));
  return th;
}

/** A prism in words and in 360° notation, with its components in data-value. */
function prismCell(a: Answer): Node {
  if (isFailed(a)) return el('span', 'failed', `${DASH} ${a.message}`);
  const p = a as PrismDescription;
  const d = el('span', 'bi-prism');
  d.append(valueSpan(prismWords(p), 'words', null));
  d.append(el('span', 'angle', prism360(p)));
  d.append(hidden('x', p.x), hidden('y', p.y), hidden('mag', p.magnitude));
  return d;
}

/** The pair's two values, in words, each with its signed value. */
function pairCells(p: SignedPair | null, why: string, prefix = true): HTMLTableCellElement[] {
  if (!p) {
    const td = el('td', 'failed', `${DASH} ${why}`);
    td.colSpan = 2;
    return [td];
  }
  const h = el('td');
  h.dataset.pair = 'h';
  if (prefix) h.append(el('span', 'bi-pair-label', 'net horizontal '));
  h.append(valueSpan(netHorizontalWords(p.netHorizontal), 'net-h', p.netHorizontal));
  const v = el('td');
  v.dataset.pair = 'v';
  if (prefix) v.append(el('span', 'bi-pair-label', 'vertical imbalance '));
  v.append(valueSpan(imbalanceWords(p.verticalImbalance), 'vi', p.verticalImbalance));
  return [h, v];
}

/** A section for one of the three answers: its number, heading and question. */
function answerSection(key: keyof typeof THREE_ANSWERS, n: number, extra = ''): HTMLElement {
  const s = el('section', 'bi-answer');
  s.dataset.section = key;
  const h = el('h3', 'bi-answer-head');
  h.append(el('span', 'bi-answer-num', String(n)), `${THREE_ANSWERS[key].heading}${extra}`);
  s.setAttribute('aria-label', THREE_ANSWERS[key].heading);
  s.append(h, el('p', 'bi-question', THREE_ANSWERS[key].question));
  return s;
}

const MARK_ANSWERS = [
  ['prentice', 'Prentice’s rule', 'nominal decentration'],
  ['focimeter', 'Focimeter', 'exact, lens on its support'],
  ['paraxial', 'First-order', 'line of sight, paraxial'],
  ['exact', 'Exact', 'line of sight, real rays'],
] as const;

export class BinocularPanel extends ResultsPane {
  render(r: BinocularComputed): void {
    const b = this.begin();
    const { c, fit } = r;
    b.append(el('h2', 'results-title', 'Both eyes: three answers'));
    const sum = el('p', 'results-summary');
    sum.dataset.q = 'case-summary';
    if (c.doc.title) sum.append(`${c.doc.title}. `);
    sum.append(`Target: ${targetWords(c)}.`);
    if (c.pantoDeg !== 0 || c.wrapDeg !== 0) sum.append(` Pantoscopic tilt ${num(c.pantoDeg, 1)}°, wrap ${num(c.wrapDeg, 1)}°.`);
    const drop = c.right.tiltDropMm;
    if (num(drop) !== '0.00') {
      sum.append(' Optical centres lowered ', valueSpan(`${num(drop)} mm`, 'tilt-drop', drop),
        ` for the tilt (${c.doc.tiltDrop === 'centre-of-rotation' ? 'centre of rotation on the axis' : '1 mm per 2°, common practice'}).`);
    }
    b.append(sum);
    b.append(this.marks(fit), this.standard(fit), this.eyes(r), this.slabOff(fit));
    b.append(el('p', 'answers-key',
      'Right eye: +x is nasal; left eye: −x is nasal. 360° notation: the base direction counter-clockwise from the ' +
      'observer’s right, facing the wearer. Net horizontal prism is the sum of the base-in parts; vertical imbalance is ' +
      'right minus left. A TCA above about 0.1 Δ is often quoted as noticeable (from memory).'));
  }

  /** 1. At the marks: what the lab measures. */
  private marks(fit: FitReport): HTMLElement {
    const m = fit.marks;
    const s = answerSection('marks', 1);
    const t = el('table', 'bi-marks');
    t.setAttribute('aria-label', 'At the marks: each eye and the pair, per answer');
    const head = el('tr');
    head.append(el('th'), el('th', undefined, EYE_NAMES.right), el('th', undefined, EYE_NAMES.left));
    t.append(el('thead'));
    t.tHead!.append(head);

    const where = el('tbody', 'bi-mark-where');
    const pos = el('tr');
    pos.dataset.row = 'mark';
    pos.append(rowHead('Mark', 'centration point, from the OC'));
    const pres = el('tr');
    pres.dataset.row = 'prescribed';
    pres.append(rowHead('Prescribed', 'prism ordered'));
    for (const side of SIDES) {
      const e: MarkEye = m[side];
      const td = el('td');
      td.dataset.eye = side;
      if (e.point) {
        td.append(valueSpan(offsetWords(e.point.x, e.point.y, side, 2, 'at the OC'), 'mark', null), hidden('mark-x', e.point.x), hidden('mark-y', e.point.y));
      } else {
        td.className = 'failed';
        td.textContent = `${DASH} the straight-ahead line misses the lens`;
      }
      pos.append(td);
      const tp = el('td');
      tp.dataset.eye = side;
      if (e.prescribed) tp.append(prismCell(e.prescribed));
      else tp.append(valueSpan('none', 'words', null), hidden('x', 0), hidden('y', 0));
      pres.append(tp);
    }
    where.append(pos, pres);
    if (m.right.prescribed || m.left.prescribed) {
      const pp = el('tr', 'subrow');
      pp.dataset.row = 'prescribed-pair';
      pp.append(rowHead('pair'), ...pairCells(m.prescribedNet, ''));
      where.append(pp);
    }
    t.append(where);

    for (const [key, name, note] of MARK_ANSWERS) {
      const tb = el('tbody', 'bi-mark-answer');
      tb.dataset.answer = key;
      const eyes = el('tr');
      eyes.dataset.row = 'eyes';
      eyes.append(rowHead(name, note));
      for (const side of SIDES) {
        const a = m[side].answers;
        const td = el('td');
        td.dataset.eye = side;
        if (!a) {
          td.className = 'failed';
          td.textContent = `${DASH} no mark on this lens`;
        } else td.append(prismCell(a[key]));
        eyes.append(td);
      }
      const pair = el('tr', 'subrow');
      pair.dataset.row = 'pair';
      pair.append(rowHead('pair'), ...pairCells(m.net[key], 'an eye has no value here'));
      tb.append(eyes, pair);
      t.append(tb);
    }
    s.append(t);
    return s;
  }

  /** 2. The standard's verdict, from the marks only. */
  private standard(fit: FitReport): HTMLElement {
    const st = fit.standard;
    const s = answerSection('standard', 2);
    const verdicts = st.verdicts;
    const sum = el('p', `bi-standard-summary ${!verdicts ? 'none' : verdicts.every((v) => v.pass) ? 'pass' : 'fail'}`);
    sum.dataset.q = 'standard-summary';
    sum.textContent = standardSummary(fit);
    s.append(sum);

    const res = el('p', 'bi-note bi-residual');
    res.dataset.row = 'residual';
    if (st.residual) {
      res.append('Focimeter at the marks minus prescribed: ',
        valueSpan(netHorizontalWords(st.residual.netHorizontal), 'res-h', st.residual.netHorizontal), ' net horizontal; ',
        valueSpan(imbalanceWords(st.residual.verticalImbalance), 'res-v', st.residual.verticalImbalance), ' vertical.');
    } else res.append(`Focimeter at the marks minus prescribed: ${DASH} (a lens has no reading at its mark).`);
    s.append(res);
    const cen = el('p', 'bi-note bi-centring');
    cen.dataset.row = 'centring';
    if (st.centration) {
      cen.append('Prism reference points: separation minus the PD ',
        valueSpan(`${num(st.centration.horizontalMm)} mm`, 'cent-h', st.centration.horizontalMm),
        '; heights, right minus left ',
        valueSpan(`${num(st.centration.verticalMm)} mm`, 'cent-v', st.centration.verticalMm), '.');
    } else cen.append(`Prism reference points: ${DASH} (a point where the focimeter reads the prescribed prism cannot be found).`);
    s.append(cen);

    if (verdicts) {
      const list = el('ul', 'bi-verdict-list');
      verdicts.forEach((v, i) => list.append(verdictItem(v, st.prenticeVerdicts?.[i] ?? null)));
      s.append(list);
    }
    s.append(el('p', 'bi-source', `Source: ${fit.profile.source}.`));
    return s;
  }

  /** 3. What the eyes do at the target. */
  private eyes(r: BinocularComputed): HTMLElement {
    const { c, fit } = r;
    const res = fit.result;
    const s = answerSection('eyes', 3);
    s.querySelector('.bi-question')!.before(el('p', 'bi-target', `Target: ${targetWords(c)}.`));
    const t = el('table', 'bi-eyes');
    t.setAttribute('aria-label', 'Each eye at its visual point for the target');
    const eh = el('tr');
    eh.append(el('th'));
    for (const side of SIDES) eh.append(el('th', undefined, EYE_NAMES[side]));
    t.append(el('thead'));
    t.tHead!.append(eh);
    const tb = el('tbody');
    const level = r.target.kind === 'level';
    const row = (key: string, name: string, note: string, cell: (side: Side) => Node | string): void => {
      const tr = el('tr');
      tr.dataset.row = key;
      tr.append(rowHead(name, note));
      for (const side of SIDES) {
        const e = res[side];
        const td = el('td');
        td.dataset.eye = side;
        if (!e.answers) {
          td.className = 'failed';
          td.textContent = key === 'vp-oc' ? `${DASH} no line of sight: ${e.fixation.message}.` : DASH;
        } else td.append(cell(side));
        tr.append(td);
      }
      tb.append(tr);
    };
    row('vp-oc', 'Visual point', level ? 'given by the reading level; from the OC' : 'solved; from the optical centre', (side) => {
      const e = res[side];
      const d = el('span');
      d.append(valueSpan(offsetWords(e.fromOcMm.x, e.fromOcMm.y, side, 2, 'at the OC'), 'vp', null), hidden('vp-x', e.fromOcMm.x), hidden('vp-y', e.fromOcMm.y));
      return d;
    });
    row('vp-pupil', '', 'from the pupil (straight ahead)', (side) => {
      const e = res[side];
      const d = el('span');
      d.append(valueSpan(offsetWords(e.fromPupilMm.x, e.fromPupilMm.y, side), 'vp-pupil', null), hidden('vp-pupil-x', e.fromPupilMm.x), hidden('vp-pupil-y', e.fromPupilMm.y));
      return d;
    });
    row('rotation', 'Eye rotation', 'from straight ahead', (side) => {
      const rot = res[side].rotationDeg;
      const d = el('span');
      d.append(valueSpan(rotationWords(rot.horizontal, rot.vertical, side), 'rot', null), hidden('rot-h', rot.horizontal), hidden('rot-v', rot.vertical));
      return d;
    });
    row('rotation-change', '', 'change the lens causes', (side) => {
      const rot = res[side].rotationChangeDeg;
      const d = el('span');
      d.append(valueSpan(rotationWords(rot.horizontal, rot.vertical, side), 'rot-change', null), hidden('rot-change-h', rot.horizontal), hidden('rot-change-v', rot.vertical));
      return d;
    });
    row('exact', 'Exact', 'prism there, real rays', (side) => prismCell(res[side].answers!.exact));
    row('prentice', 'Prentice', '−F·c at the same point', (side) => prismCell(res[side].answers!.prentice));
    row('power', 'Power there', 'what the eye gets, at the vertex sphere', (side) => {
      const p = res[side].answers!.power;
      const d = el('span');
      if ('failure' in p) {
        d.className = 'failed';
        d.textContent = `${DASH} ${p.message}`;
        return d;
      }
      d.append(valueSpan(powerCell(p), 'power', null), hidden('power-mean', p.meanError), hidden('power-astig', p.astigmaticError));
      return d;
    });
    row('tca', 'Colour fringe', 'TCA exact (F−C) | P/V', (side) => {
      const tc = fit.tca[side];
      if (!tc) return `${DASH} (no Abbe number)`;
      const d = el('span');
      d.append(valueSpan(tc.exactDelta === null ? `${DASH} (no trace)` : `${num(tc.exactDelta)} Δ`, 'tca', tc.exactDelta));
      d.append(' | ', valueSpan(tc.ruleDelta === null ? DASH : `${num(tc.ruleDelta)} Δ`, 'tca-rule', tc.ruleDelta));
      return d;
    });
    t.append(tb);
    s.append(t);

    // the pair at the target
    const pair = el('table', 'bi-pair');
    pair.setAttribute('aria-label', 'The pair at the target: net horizontal prism and vertical imbalance');
    const ph = el('tr');
    for (const h of ['The pair', 'Net horizontal', 'Vertical imbalance']) ph.append(el('th', undefined, h));
    pair.append(el('thead'));
    pair.tHead!.append(ph);
    const pb = el('tbody');
    for (const [key, name] of [['exact', 'Exact'], ['prentice', 'Prentice']] as const) {
      const tr = el('tr');
      tr.dataset.pair = key;
      tr.append(rowHead(name), ...pairCells(res[key], 'an eye has no line of sight (see above)', false));
      pb.append(tr);
    }
    if (res.exact && res.prentice) {
      const tr = el('tr', 'subrow');
      tr.dataset.pair = 'difference';
      const dh = Math.abs(res.prentice.netHorizontal) - Math.abs(res.exact.netHorizontal);
      const dv = Math.abs(res.prentice.verticalImbalance) - Math.abs(res.exact.verticalImbalance);
      const h = el('td');
      h.append(valueSpan(`${dh > 0 ? '+' : ''}${num(dh)} Δ`, 'net-h-diff', dh));
      const v = el('td');
      v.append(valueSpan(`${dv > 0 ? '+' : ''}${num(dv)} Δ`, 'vi-diff', dv));
      tr.append(rowHead('|Prentice| − |exact|'), h, v);
      pb.append(tr);
    }
    pair.append(pb);
    s.append(pair);

    // what the pair asks of the eyes, and guidance on it
    const dm = el('div', 'bi-demand');
    dm.append(el('h4', undefined, 'What the pair asks of the eyes (beyond the prescribed prism)'));
    if (!fit.demand || !fit.guidance) {
      dm.append(el('p', 'failed', `${DASH} Not available: an eye has no exact line of sight to the target.`));
      s.append(dm);
      return s;
    }
    const d = fit.demand;
    const w = demandWords(d, Boolean(fit.marks.right.prescribed || fit.marks.left.prescribed));
    const hSigned = d.horizontal.base === 'out' ? -d.horizontal.amount : d.horizontal.amount;
    const vSigned = d.vertical.baseUpEye === 'L' ? -d.vertical.amount : d.vertical.amount;
    const dl = el('dl', 'bi-demand-list');
    dl.append(el('dt', undefined, 'Horizontal'), el('dd'), el('dt', undefined, 'Vertical'), el('dd'));
    dl.children[1]!.append(valueSpan(w.horizontal, 'demand-h', hSigned));
    dl.children[3]!.append(valueSpan(w.vertical, 'demand-v', vSigned));
    dm.append(dl);
    s.append(dm);

    const g = el('div', 'bi-guidance');
    g.setAttribute('role', 'note');
    g.append(el('h4', undefined, `Clinical guidance. ${GUIDANCE_NOT_VERDICT}`));
    const line = (q: string, gd: Guidance): HTMLElement => {
      const p = el('p', 'bi-guidance-line', gd.words);
      p.dataset.q = q;
      p.dataset.band = gd.band;
      return p;
    };
    g.append(line('guidance-h', fit.guidance.horizontal), line('guidance-v', fit.guidance.vertical));
    g.append(el('p', 'bi-source', `Sources: ${GUIDANCE_SOURCES.horizontal}; ${GUIDANCE_SOURCES.vertical}. Population averages: an individual's reserves differ.`));
    s.append(g);
    return s;
  }

  /** Slab-off, ordered in focimeter terms at the reading level. */
  private slabOff(fit: FitReport): HTMLElement {
    const box = el('section', 'bi-slab');
    box.dataset.section = 'slab-off';
    box.setAttribute('aria-label', 'Slab-off');
    const o = fit.slabOff.order;
    const p = el('p', `bi-slab-words ${o && o.advice !== 'not indicated' ? 'indicated' : ''}`);
    p.dataset.q = 'slab-off';
    if (o) {
      p.dataset.value = String(o.order);
      p.dataset.advice = o.advice;
      p.dataset.lens = o.eye;
    }
    p.textContent = slabOffWords(fit.slabOff);
    box.append(p);
    return box;
  }
}

/** One verdict of the standard: badge, value against the allowance, margin, the row, Prentice's. */
function verdictItem(v: Verdict, pv: Verdict | null): HTMLElement {
  const li = el('li', v.pass ? 'pass' : 'fail');
  li.dataset.verdict = v.component;
  li.dataset.pass = String(v.pass);
  li.dataset.rule = v.rule;
  const head = el('div', 'bi-verdict-head');
  head.append(
    el('span', `bi-badge ${v.pass ? 'pass' : 'fail'}`, v.pass ? 'Within' : 'Outside'),
    el('span', 'bi-verdict-what', v.component === 'horizontal' ? 'Horizontal' : 'Vertical'),
  );
  li.append(head);
  const what = el('div');
  what.append(`${judgedWords(v)}: `, valueSpan(`${num(v.value)} ${v.unit}`, `value-${v.component}`, v.value), ' of ',
    valueSpan(`${num(v.limit)} ${v.unit}`, `limit-${v.component}`, v.limit), ' allowed');
  li.append(what);
  const m = el('div');
  m.append('Margin ', valueSpan(`${v.margin > 0 ? '+' : ''}${num(v.margin)} ${v.unit}`, `margin-${v.component}`, v.margin),
    v.pass ? ' (inside)' : ' (outside)');
  li.append(m);
  const row = el('div', 'bi-note');
  row.append(`The standard’s row: ${ruleText(v)}; the larger lens power in this meridian is `,
    valueSpan(`${num(v.powerD)} D`, `power-${v.component}`, v.powerD), '.');
  li.append(row);
  if (pv && v.rule === 'prism') {
    const differs = pv.pass !== v.pass;
    const pr = el('div', differs ? 'bi-prentice-differs' : 'bi-note');
    pr.dataset.q = `prentice-verdict-${v.component}`;
    pr.dataset.pass = String(pv.pass);
    pr.dataset.value = String(pv.value);
    pr.textContent = prenticeVerdictWords(v, pv) ?? `Prentice’s hand value at the marks, ${num(pv.value)} Δ, gives the same verdict.`;
    li.append(pr);
  }
  return li;
}
