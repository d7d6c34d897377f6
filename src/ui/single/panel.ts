/**
 * The computation panel: the four answers at the visual point, the Prentice error, the power
 * the eye gets there (the pencil along the exact line of sight), the lens data and the warnings. Every number carries its unit; a value that cannot be computed is
 * said in words, never shown as NaN or Infinity. When the inputs are invalid the last valid
 * result stays, marked stale.
 */
import { POWER_QUESTION, isPowerFailure, powerPlainWords } from '../../case/powerWords.ts';
import type { Answer, PrismDescription } from '../../optics/index.ts';
import type { Computed } from './compute.ts';
import { DASH, dioptres, num, signed, spheroCyl, withUnit } from '../format.ts';
import { ResultsPane, el } from '../resultsPane.ts';

const ROWS: { key: 'prentice' | 'paraxial' | 'exact' | 'focimeter'; name: string; note: string }[] = [
  { key: 'prentice', name: 'Prentice', note: 'thin-lens rule, −F·c' },
  { key: 'paraxial', name: 'First-order', note: 'thick lens, paraxial, to the CR' },
  { key: 'exact', name: 'Exact', note: 'real ray along the line of sight' },
  { key: 'focimeter', name: 'Focimeter', note: 'what the instrument reads here' },
];


/** A number with its unit, its full value in data-value for tests and copy/paste. */
function valueSpan(v: number, unit: string, decimals: number, q: string): HTMLSpanElement {
  const s = el('span', 'v', withUnit(v, unit, decimals));
  s.dataset.q = q;
  if (Number.isFinite(v)) s.dataset.value = String(v);
  return s;
}

export class Panel extends ResultsPane {
  render(r: Computed): void {
    const b = this.begin();
    const eyeWord = r.tc.eye === 'R' ? 'Right eye' : 'Left eye';
    const rx = `${signed(r.tc.lens.sphereD)} / ${signed(r.tc.lens.cylD)} × ${num(r.tc.lens.axisDeg, 0)}°`;
    b.append(el('h2', 'results-title', 'Prism and power at the visual point'));
    const sum = el('p', 'results-summary');
    sum.append(
      `${eyeWord}, ${rx}. Visual point `,
      pointWords(r.tc.xMm, r.tc.yMm, r.tc.eye),
      ` (${withUnit(r.decentrationMm, 'mm', 1)} from the OC towards ${num(r.directionDeg, 1)}°).`,
    );
    b.append(sum);

    const table = el('table', 'answers');
    table.setAttribute('aria-label', 'The four answers');
    const head = el('tr');
    for (const h of ['', 'Horizontal', 'Vertical', 'Resultant']) head.append(el('th', undefined, h));
    table.append(el('thead'));
    table.tHead!.append(head);
    const tb = el('tbody');
    for (const row of ROWS) {
      const a = r.answers[row.key];
      const tr = el('tr');
      tr.dataset.answer = row.key;
      const th = el('th');
      th.scope = 'row';
      th.append(el('span', 'answer-name', row.name));
      th.title = row.note;
      tr.append(th);
      if (isFail(a)) {
        const td = el('td', 'failed', a.message);
        td.colSpan = 3;
        tr.append(td);
      } else {
        tr.append(component(a.horizontal.amount, a.horizontal.base, 'h'), component(a.vertical.amount, a.vertical.base, 'v'));
        const td = el('td', 'resultant');
        td.append(valueSpan(a.magnitude, 'Δ', 2, 'mag'));
        if (a.magnitude > 0) {
          const at = el('span', 'angle');
          at.append('at ', valueSpan(a.baseAngle, '°', 1, 'angle'));
          td.append(at);
        }
        tr.append(td);
      }
      tb.append(tr);
      if (row.key === 'focimeter') {
        const f = r.answers.focimeterFirstOrder;
        const sub = el('tr', 'subrow');
        sub.dataset.answer = 'focimeter-first-order';
        const sth = el('th');
        sth.scope = 'row';
        sth.append(el('span', 'answer-note', 'first-order'));
        sub.append(sth, component(f.horizontal.amount, f.horizontal.base, 'h'), component(f.vertical.amount, f.vertical.base, 'v'));
        const td = el('td', 'resultant');
        td.append(valueSpan(f.magnitude, 'Δ', 2, 'mag'));
        sub.append(td);
        tb.append(sub);
      }
    }
    table.append(tb);
    b.append(table);
    b.append(el('p', 'answers-key',
      'Prentice: −F·c with the back vertex power. First-order: paraxial thick lens, ray to the CR. ' +
      'Exact: real ray traced along the line of sight. Focimeter: what the instrument reads with the lens ' +
      'on its support at this point. Resultant base direction in 360° notation.'));

    const err = el('div', 'error-box');
    err.dataset.answer = 'error';
    if (r.answers.error) {
      const e = r.answers.error;
      err.append(el('span', 'error-label', 'Prentice error '));
      err.append(valueSpan(e.prism, 'Δ', 2, 'prism'));
      if (e.percent !== null) {
        err.append(' (');
        err.append(valueSpan(e.percent, '% of exact', 1, 'percent'));
        err.append(')');
      }
      const verdict = Math.abs(e.prism) < 0.005 ? 'Prentice’s rule agrees with the exact trace here.'
        : e.prism < 0 ? 'Prentice’s rule under-states the prism the eye gets here.'
          : 'Prentice’s rule over-states the prism the eye gets here.';
      err.append(el('span', 'error-verdict', verdict));
    } else {
      err.append(el('span', 'error-label', 'Prentice error '), `${DASH} (no exact answer at this point)`);
    }
    b.append(err);
    b.append(powerBox(r));

    b.append(el('h3', undefined, 'Lens'));
    const dl = el('dl', 'lens-data');
    const add = (term: string, ...value: (string | Node)[]): void => {
      dl.append(el('dt', undefined, term));
      const dd = el('dd');
      dd.append(...value);
      dl.append(dd);
    };
    const L = r.lens;
    add('Material', `${r.materialName}; n = ${num(L.index, 3)}`, r.abbe !== null ? `, Abbe V = ${num(r.abbe, 0)}` : '');
    add('Front surface', meridians(r.frontD));
    add('Back surface', meridians(r.backD));
    add('Back vertex power', `${spheroCyl({ sphereD: r.tc.lens.sphereD, cylD: r.tc.lens.cylD, axisDeg: r.tc.lens.axisDeg })}`);
    add('Equivalent power', spheroCyl(r.equivalent));
    const ct = valueSpan(L.ctMm, 'mm', 2, 'ct');
    add('Centre thickness', ct);
    const edge = el('span');
    if (Number.isFinite(r.edge.min)) {
      edge.append(valueSpan(r.edge.min, 'mm', 2, 'edgeMin'));
      if (r.edge.max - r.edge.min > 0.005) edge.append(' to ', valueSpan(r.edge.max, 'mm', 2, 'edgeMax'));
    } else edge.append(DASH);
    add('Edge thickness', edge);
    add('Diameter', withUnit(2 * L.radiusMm, 'mm', 1));
    add('Back vertex to CR', withUnit(r.tc.crMm, 'mm', 1));
    b.append(dl);

    b.append(el('h3', undefined, 'Warnings'));
    const ul = el('ul', 'warnings');
    if (r.warnings.length === 0) ul.append(el('li', 'none', 'None for this point.'));
    for (const w of r.warnings) ul.append(el('li', 'warn', w));
    b.append(ul);
  }
}

/**
 * The power beside the prism: the pencil's vergence at the vertex sphere along the exact line
 * of sight (distant target) as sphere / cylinder x axis, its mean and astigmatic errors against
 * the prescription, and Coddington's tangential and sagittal vergences where they apply.
 */
function powerBox(r: Computed): HTMLElement {
  const box = el('div', 'power-box');
  box.dataset.answer = 'power';
  const head = el('div', 'power-head', 'Power the eye gets');
  head.title = POWER_QUESTION;
  box.append(head, el('span', 'power-question', `${POWER_QUESTION}, distant target.`));
  const p = r.answers.power;
  if (isPowerFailure(p)) {
    box.append(el('span', 'failed', `No answer: ${p.message}.`));
    return box;
  }
  const dl = el('dl', 'power-data');
  const add = (term: string, note: string, ...value: (string | Node)[]): void => {
    const dt = el('dt', undefined, term);
    dt.title = note;
    dl.append(dt);
    const dd = el('dd');
    dd.append(...value);
    dl.append(dd);
  };
  const d = (v: number, q: string, sign = true): HTMLSpanElement => {
    const s = el('span', 'v', sign ? dioptres(v) : withUnit(v, 'D', 2));
    s.dataset.q = q;
    if (Number.isFinite(v)) s.dataset.value = String(v);
    return s;
  };
  const sc = el('span', 'v', spheroCyl({ sphereD: p.sphere, cylD: p.cyl, axisDeg: p.axis }));
  sc.dataset.q = 'vergence';
  for (const [k, v] of [['sphere', p.sphere], ['cyl', p.cyl], ['axis', p.axis]] as const) sc.dataset[k] = String(v);
  add('Vergence', 'the pencil\'s vergence at the vertex sphere, as sphere / cylinder × axis (axis in the plane normal to the line of sight, docs/method.md)', sc);
  add('Mean error', 'half the trace of (vergence − prescription): positive is more plus than prescribed', d(p.meanError, 'mean'));
  add('Astigmatic error', 'the cylinder of (vergence − prescription), never negative', d(p.astigmaticError, 'astig', false));
  if (p.tangential !== undefined && p.sagittal !== undefined) {
    const ts = el('span');
    ts.append(d(p.tangential, 'tangential'), ' / ', d(p.sagittal, 'sagittal'));
    add('Tangential / sagittal', 'Coddington’s equations along the exact ray (lens of revolution, eye on its axis)', ts);
  }
  box.append(dl, el('span', 'power-verdict', powerPlainWords(p, r.tc.eye === 'R' ? 'right' : 'left')));
  return box;
}

function isFail(a: Answer): a is { failure: 'miss' | 'tir' | 'geometry' | 'edge'; message: string } {
  return 'failure' in a;
}

function component(amount: number, base: string | null, q: string): HTMLTableCellElement {
  const td = el('td');
  td.append(valueSpan(amount, 'Δ', 2, q));
  td.append(el('span', 'base', base ? `base ${base}` : 'none'));
  return td;
}

function meridians(p: readonly [number, number]): string {
  if (Math.abs(p[0] - p[1]) < 0.005) return dioptres(p[0]);
  return `${dioptres(p[0])} and ${dioptres(p[1])} (principal meridians)`;
}

/** "8.0 mm nasal and 4.0 mm down" for the eye's own sides. */
function pointWords(x: number, y: number, eye: 'R' | 'L'): string {
  const parts: string[] = [];
  if (Math.abs(x) >= 0.05) {
    const nasal = eye === 'R' ? x > 0 : x < 0;
    parts.push(`${num(Math.abs(x), 1)} mm ${nasal ? 'nasal' : 'temporal'}`);
  }
  if (Math.abs(y) >= 0.05) parts.push(`${num(Math.abs(y), 1)} mm ${y > 0 ? 'up' : 'down'}`);
  return parts.length ? parts.join(' and ') : 'at the optical centre';
}

export type { PrismDescription };
