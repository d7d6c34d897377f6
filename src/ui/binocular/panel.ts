/**
 * The "both eyes" panel: each eye's visual point (from the optical centre and from the
 * pupil), its prism by Prentice's rule, exactly and at the focimeter (in words and in 360°
 * notation), the change of rotation and the colour fringe; the pair's net horizontal prism
 * and vertical imbalance, exactly and by Prentice; the tolerance verdicts with their margins
 * and the rule used; slab-off advice. Every number carries its unit, and its full signed value
 * in data-value; nothing shown is NaN or Infinity. When the inputs are invalid the last valid
 * result stays, marked stale.
 */
import type { Answer, EyeResult, PrismDescription, Verdict } from '../../optics/index.ts';
import { DASH, num, withUnit } from '../format.ts';
import type { BinocularComputed } from './compute.ts';
import { EYE_NAMES, SIDES, type Side } from './form.ts';
import { ResultsPane, el } from '../resultsPane.ts';
import {
  imbalanceWords, isFailed, netHorizontalWords, offsetWords, prism360, prismWords, rotationWords, ruleWords,
  verdictWords,
} from './words.ts';


/** A span with text, its full value in data-value (for tests and copying) and a name in data-q. */
function valueSpan(text: string, q: string, value: number | null): HTMLSpanElement {
  const s = el('span', 'v', text);
  s.dataset.q = q;
  if (value !== null && Number.isFinite(value)) s.dataset.value = String(value);
  return s;
}

export class BinocularPanel extends ResultsPane {
  render(r: BinocularComputed): void {
    const b = this.begin();
    const { c, fit } = r;
    const res = fit.result;
    b.append(el('h2', 'results-title', 'Both eyes at the target'));
    const t = c.doc.target;
    const sum = el('p', 'results-summary');
    sum.append(
      c.doc.title ? `${c.doc.title}. ` : '',
      t.kind === 'distance'
        ? 'Target: far away, straight ahead.'
        : `Target: ${withUnit(t.distance, 'mm', 0)} ahead of the centres of rotation, ${withUnit(t.below ?? 0, 'mm', 0)} below and ${withUnit(t.lateral ?? 0, 'mm', 0)} to the left.`,
    );
    if (c.pantoDeg !== 0 || c.wrapDeg !== 0) sum.append(` Pantoscopic tilt ${num(c.pantoDeg, 1)}°, wrap ${num(c.wrapDeg, 1)}°.`);
    b.append(sum);

    // both eyes: the pair first, it is what the wearer feels
    b.append(el('h3', undefined, 'The pair'));
    const pair = el('table', 'bi-pair');
    pair.setAttribute('aria-label', 'Net horizontal prism and vertical imbalance');
    const ph = el('tr');
    for (const h of ['', 'Net horizontal', 'Vertical imbalance']) ph.append(el('th', undefined, h));
    pair.append(el('thead'));
    pair.tHead!.append(ph);
    const pb = el('tbody');
    const pairRow = (key: 'exact' | 'prentice', name: string): void => {
      const tr = el('tr');
      tr.dataset.pair = key;
      const th = el('th', undefined, name);
      th.scope = 'row';
      tr.append(th);
      const p = res[key];
      if (!p) {
        const td = el('td', 'failed', 'no answer: an eye has no line of sight (see below)');
        td.colSpan = 2;
        tr.append(td);
      } else {
        const h = el('td');
        h.append(valueSpan(netHorizontalWords(p.netHorizontal), 'net-h', p.netHorizontal));
        const v = el('td');
        v.append(valueSpan(imbalanceWords(p.verticalImbalance), 'vi', p.verticalImbalance));
        tr.append(h, v);
      }
      pb.append(tr);
    };
    pairRow('exact', 'Exact');
    pairRow('prentice', 'Prentice');
    if (res.exact && res.prentice) {
      const tr = el('tr', 'subrow');
      tr.dataset.pair = 'difference';
      const th = el('th', undefined, 'Prentice − exact');
      th.scope = 'row';
      const dh = Math.abs(res.prentice.netHorizontal) - Math.abs(res.exact.netHorizontal);
      const dv = Math.abs(res.prentice.verticalImbalance) - Math.abs(res.exact.verticalImbalance);
      const h = el('td');
      h.append(valueSpan(`${dh > 0 ? '+' : ''}${num(dh)} Δ`, 'net-h-diff', dh));
      const v = el('td');
      v.append(valueSpan(`${dv > 0 ? '+' : ''}${num(dv)} Δ`, 'vi-diff', dv));
      tr.append(th, h, v);
      pb.append(tr);
    }
    pair.append(pb);
    b.append(pair);

    // verdicts
    b.append(this.verdicts(r));

    // slab-off
    b.append(el('h3', undefined, 'Slab-off (bicentric grinding)'));
    const so = fit.slabOff;
    const sp = el('p', 'bi-slab');
    sp.dataset.q = 'slab-off';
    if (!so) sp.textContent = `${DASH} (no exact vertical imbalance: an eye has no line of sight)`;
    else if (so.advice === 'not indicated') {
      sp.textContent = `Not indicated: the vertical imbalance at this target is ${num(so.imbalanceDelta)} Δ (slab-off is usually considered from about 1.5 Δ).`;
    } else {
      sp.append(
        el('strong', undefined, `${so.advice.charAt(0).toUpperCase()}${so.advice.slice(1)}: `),
        `${num(so.amountDelta, 2)} Δ base up on the ${so.eye === 'R' ? 'right' : 'left'} lens (the one with the most minus, least plus, vertical power), for ${num(so.imbalanceDelta)} Δ of imbalance at this target. `,
        el('span', 'bi-note', `Rounded to ${num(so.stepDelta, 2)} Δ steps (common practice, from memory; some laboratories use 0.25 Δ). Usually considered from about 1.5 Δ and used up to about 6 Δ.`),
      );
    }
    b.append(sp);

    // each eye
    b.append(el('h3', undefined, 'Each eye'));
    const eyes = el('table', 'bi-eyes');
    eyes.setAttribute('aria-label', 'Each eye at its visual point');
    const eh = el('tr');
    eh.append(el('th'));
    for (const side of SIDES) eh.append(el('th', undefined, EYE_NAMES[side]));
    eyes.append(el('thead'));
    eyes.tHead!.append(eh);
    const eb = el('tbody');
    const row = (key: string, name: string, note: string, cell: (e: EyeResult, side: Side) => Node | string): void => {
      const tr = el('tr');
      tr.dataset.row = key;
      const th = el('th');
      th.scope = 'row';
      th.append(el('span', 'answer-name', name));
      if (note) th.append(el('span', 'answer-note', note));
      tr.append(th);
      for (const side of SIDES) {
        const e = res[side];
        const td = el('td');
        td.dataset.eye = side;
        if (!e.answers) {
          td.className = 'failed';
          td.textContent = key === 'vp-oc' ? `No line of sight: ${e.fixation.message}.` : DASH;
        } else td.append(cell(e, side));
        tr.append(td);
      }
      eb.append(tr);
    };
    row('vp-oc', 'Visual point', 'from the optical centre', (e, side) => {
      const d = el('span');
      d.append(valueSpan(offsetWords(e.fromOcMm.x, e.fromOcMm.y, side), 'vp', null));
      d.append(hidden('vp-x', e.fromOcMm.x), hidden('vp-y', e.fromOcMm.y));
      return d;
    });
    row('vp-pupil', '', 'from the pupil (straight ahead)', (e, side) => valueSpan(offsetWords(e.fromPupilMm.x, e.fromPupilMm.y, side), 'vp-pupil', null));
    row('prentice', 'Prentice', '−F·c at that point', (e) => prismCell(e.answers!.prentice));
    row('exact', 'Exact', 'real ray to the target', (e) => prismCell(e.answers!.exact));
    row('focimeter', 'Focimeter', 'what it reads there', (e) => prismCell(e.answers!.focimeter));
    row('error', 'Prentice error', '|Prentice| − |exact|', (e) => {
      const er = e.answers!.error;
      if (!er) return `${DASH} (no exact answer)`;
      const d = el('span');
      d.append(valueSpan(`${er.prism > 0 ? '+' : ''}${num(er.prism)} Δ`, 'err', er.prism));
      if (er.percent !== null) d.append(` (${num(er.percent, 1)} %)`);
      return d;
    });
    row('rotation', 'Eye rotation', 'change caused by the lens', (e, side) =>
      valueSpan(rotationWords(e.rotationChangeDeg.horizontal, e.rotationChangeDeg.vertical, side), 'rot', null));
    row('tca', 'Colour fringe', 'TCA exact (F−C) | P/V', (_e, side) => {
      const t = fit.tca[side];
      if (!t) return `${DASH} (no Abbe number or no line of sight)`;
      const d = el('span');
      d.append(valueSpan(t.exactDelta === null ? DASH : `${num(t.exactDelta)} Δ`, 'tca', t.exactDelta));
      d.append(' | ', valueSpan(t.ruleDelta === null ? DASH : `${num(t.ruleDelta)} Δ`, 'tca-rule', t.ruleDelta));
      return d;
    });
    eyes.append(eb);
    b.append(eyes);
    b.append(el('p', 'answers-key',
      'Visual points are solved on the exact line of sight from each centre of rotation to the target. Prentice and ' +
      'the focimeter are taken at the same points. Right eye: +x is nasal; left eye: −x is nasal. 360° notation: the base ' +
      'direction counter-clockwise from the observer’s right, facing the wearer. A TCA above about 0.1 Δ is often quoted ' +
      'as noticeable (from memory).'));
  }

  private verdicts(r: BinocularComputed): HTMLElement {
    const { fit } = r;
    const box = el('section', 'bi-verdicts');
    box.append(el('h3', undefined, `Tolerance: ${fit.profile.name}`));
    if (!fit.verdicts) {
      box.append(el('p', 'failed', 'No verdict: an eye has no exact line of sight to the target.'));
      return box;
    }
    const list = el('ul', 'bi-verdict-list');
    fit.verdicts.forEach((v, i) => {
      const rule = fit.profile[v.component];
      const li = el('li', v.pass ? 'pass' : 'fail');
      li.dataset.verdict = v.component;
      li.dataset.pass = String(v.pass);
      const head = el('div', 'bi-verdict-head');
      head.append(
        el('span', `bi-badge ${v.pass ? 'pass' : 'fail'}`, v.pass ? 'Within' : 'Outside'),
        el('span', 'bi-verdict-what', v.component === 'horizontal' ? 'Horizontal' : 'Vertical'),
      );
      li.append(head);
      li.append(el('div', undefined, verdictWords(v)));
      const m = el('div');
      m.append('Margin ', valueSpan(`${v.margin > 0 ? '+' : ''}${num(v.margin)} ${v.unit}`, `margin-${v.component}`, v.margin),
        v.pass ? ' (inside)' : ' (outside)');
      li.append(m);
      li.append(el('div', 'bi-note', `Rule used: ${ruleWords(v, rule.powerThresholdD)}.`));
      const pv = fit.prenticeVerdicts?.[i];
      if (pv && pv.rule === 'prism') li.append(el('div', 'bi-note', prenticeVerdictWords(v, pv)));
      list.append(li);
    });
    box.append(list);
    const cen = el('p', 'bi-note');
    cen.append(
      'Centration: distance between the optical centres minus the PD ',
      valueSpan(`${num(fit.centration.horizontalMm)} mm`, 'cent-h', fit.centration.horizontalMm),
      '; optical-centre heights, right minus left ',
      valueSpan(`${num(fit.centration.verticalMm)} mm`, 'cent-v', fit.centration.verticalMm),
      '.',
    );
    box.append(cen);
    box.append(el('p', 'bi-source', `Source: ${fit.profile.source}.`));
    return box;
  }
}

function hidden(q: string, v: number): HTMLSpanElement {
  const s = valueSpan('', q, v);
  s.hidden = true;
  return s;
}

function prismCell(a: Answer): Node {
  if (isFailed(a)) return el('span', 'failed', a.message);
  const p = a as PrismDescription;
  const d = el('span', 'bi-prism');
  d.append(valueSpan(prismWords(p), 'words', null));
  d.append(el('span', 'angle', prism360(p)));
  d.append(hidden('x', p.x), hidden('y', p.y), hidden('mag', p.magnitude));
  return d;
}

function prenticeVerdictWords(exact: Verdict, pv: Verdict): string {
  const same = exact.pass === pv.pass;
  return `By Prentice’s values at the same points: ${num(pv.value)} Δ, ${pv.pass ? 'within' : 'outside'}` +
    (same ? ' (the same verdict).' : ' — a different verdict from the exact value.');
}
