/**
 * The clinician summary: one printable page (a standalone HTML document with inline CSS and
 * inline SVG, no script) that says what was assumed, what prism the spectacles induce at each
 * eye's visual point, the binocular result, the tolerance verdict and slab-off advice, with a
 * cross-section and a prism plot per eye, a short method note and the cautions.
 *
 * Glue and wording only: every number comes from the engine through evaluateFit (FitReport)
 * and prismProfile; every piece of text is escaped by html.ts, every number is formatted by
 * fmt() ('—' when missing, never NaN or Infinity). Sign conventions: shared/DESIGN.md §4-§8
 * (x towards the wearer's left, y up; net horizontal > 0 base in; vertical imbalance right
 * minus left > 0 right eye base up).
 */
import type { BinocularCase, EyeCase, EyeDocument } from '../case/caseFile.ts';
import type { FitReport } from '../case/fit.ts';
import {
  type Answer, type EyeResult, type Lens, type PrismDescription, type SignedPair, type Verdict, findMaterial,
  isFailure, prismWords,
} from '../optics/index.ts';
import { crossSectionSvg, directionWords } from './crossSection.ts';
import { DASH, type Markup, type Part, fmt, fmtSigned, html, trusted, withUnit } from './html.ts';
import { profilePlotSvg } from './profilePlot.ts';
import { REPORT_CSS } from './style.ts';

export interface SummaryOptions {
  /** the date printed on the summary (its calendar day in UTC) */
  date: Date;
}

/** The cautions every summary carries (computation aid; focimeter; regulations and practice). */
export const REPORT_CAUTIONS = [
  'Decentra is a computation aid, not a measurement and not a clinical judgement.',
  'Verify the prism of the finished spectacles with a focimeter.',
  'Defer to local regulations and to licensed professional practice.',
] as const;

/** A long note is shortened so that the summary stays on one page. */
export const NOTE_MAX_CHARS = 200;

type Side = 'right' | 'left';
const SIDES: readonly Side[] = ['right', 'left'];
const EYE_NAME: Record<Side, string> = { right: 'Right eye', left: 'Left eye' };
const EYE_CODE: Record<Side, 'R' | 'L'> = { right: 'R', left: 'L' };

/** The date as YYYY-MM-DD (UTC calendar day). */
export function isoDay(d: Date): string {
  if (!Number.isFinite(d.getTime())) return DASH;
  return d.toISOString().slice(0, 10);
}


/** 360° notation: "1.53 Δ base 102°" (whole degrees, 0-359). */
export function prism360(p: PrismDescription): string {
  if (fmt(p.magnitude) === '0.00') return '0.00 Δ';
  let deg = Math.round(p.baseAngle);
  if (deg >= 360) deg -= 360;
  return `${fmt(p.magnitude)} Δ base ${fmt(deg, 0)}°`;
}

/** Where on the lens: "10.35 mm below and 2.21 mm nasal" ('' at the point itself). */
export function offsetWords(x: number, y: number, eye: 'R' | 'L', decimals = 2): string {
  const nasal = eye === 'R' ? x : -x;
  const zero = fmt(0, decimals);
  const parts: string[] = [];
  if (fmt(Math.abs(y), decimals) !== zero) parts.push(`${fmt(Math.abs(y), decimals)} mm ${y > 0 ? 'above' : 'below'}`);
  if (fmt(Math.abs(x), decimals) !== zero) parts.push(`${fmt(Math.abs(x), decimals)} mm ${nasal > 0 ? 'nasal' : 'temporal'}`);
  return parts.join(' and ');
}

export function netHorizontalWords(p: SignedPair | null): string {
  if (!p) return DASH;
  const h = p.netHorizontal;
  return fmt(Math.abs(h)) === '0.00' ? 'none (under 0.005 Δ)' : `${fmt(Math.abs(h))} Δ base ${h > 0 ? 'in' : 'out'}`;
}

export function verticalImbalanceWords(p: SignedPair | null): string {
  if (!p) return DASH;
  const v = p.verticalImbalance;
  return fmt(Math.abs(v)) === '0.00' ? 'none (under 0.005 Δ)' : `${fmt(Math.abs(v))} Δ, ${v > 0 ? 'right' : 'left'} eye base up`;
}

function rxText(l: Lens): string {
  const s = l.spec;
  if (fmt(s.cylD) === '0.00') return `${fmtSigned(s.sphereD)} D sphere`;
  return `${fmtSigned(s.sphereD)} / ${fmtSigned(s.cylD)} × ${fmt(s.axisDeg, 0)}`;
}

const ASSUMED = trusted(' <span class="as">assumed</span>');

function lensFormCell(c: BinocularCase, side: Side, lens: Lens): Markup {
  const form = c[side].lens;
  const d = c.doc[side];
  let material: Markup;
  if (form.materialId) {
    const m = findMaterial(form.materialId);
    material = html`${m ? m.name : form.materialId}, n ${fmt(form.index, 3)}${d.material === undefined ? ASSUMED : ''}`;
  } else {
    material = html`index n ${fmt(form.index, 3)}`;
  }
  const how = form.front.kind === 'true' ? ''
    : form.front.kind === 'nominal' ? ` (base ${fmtSigned(form.front.nominalD)} D at tool index ${fmt(form.front.toolIndex, 3)})`
      : form.front.rule.kind === 'vogel' ? " (Vogel's rule)" : ' (power steps)';
  const asph: string[] = [];
  if (lens.spec.frontConic) asph.push(`front conic ${fmt(lens.spec.frontConic, 2)}`);
  if (lens.spec.backConic) asph.push(`back conic ${fmt(lens.spec.backConic, 2)}`);
  const th = form.thickness;
  const ct = th.kind === 'centre'
    ? html`centre ${withUnit(lens.ctMm, 'mm')}`
    : html`centre ${withUnit(lens.ctMm, 'mm')} (thinnest with edge ≥ ${withUnit(th.minEdgeMm, 'mm', 1)})`;
  const dia = Number.isFinite(lens.radiusMm)
    ? html`, ⌀ ${withUnit(2 * lens.radiusMm, 'mm', 0)}${th.kind === 'rule' && th.diameterIsDefault ? ASSUMED : ''}`
    : '';
  return html`${material}<br>front ${fmtSigned(lens.spec.frontD)} D${how}${form.front.kind === 'rule' && d.frontRule === undefined ? ASSUMED : ''}; ${ct}${dia}${asph.length ? `; aspheric: ${asph.join(', ')}` : ''}`;
}

function ocCell(ec: EyeCase, d: EyeDocument, eye: 'R' | 'L'): Markup {
  const w = offsetWords(ec.ocXMm, ec.ocYMm, eye, 1);
  const where = w ? `${w} of the pupil` : 'in front of the pupil';
  const fromFrame = !d.oc && (d.decentration !== undefined || d.fittingHeight !== undefined || d.ocHeight !== undefined);
  return html`${where}${fromFrame ? ' (from the frame)' : ''}${!d.oc && !fromFrame ? ASSUMED : ''}`;
}

function targetText(c: BinocularCase): string {
  const t = c.doc.target;
  if (t.kind === 'distance') return 'distance, straight ahead';
  const below = t.below ?? 0, lateral = t.lateral ?? 0;
  const parts = [`near: ${fmt(t.distance, 0)} mm in front of the eyes' centres of rotation`];
  if (fmt(below, 0) !== '0') parts.push(`${fmt(Math.abs(below), 0)} mm ${below > 0 ? 'below' : 'above'} their level`);
  parts.push(fmt(lateral, 0) !== '0' ? `${fmt(Math.abs(lateral), 0)} mm to the wearer's ${lateral > 0 ? 'left' : 'right'}` : 'centred');
  return parts.join(', ');
}

function signedUnit(v: number, unit: string): string {
  const s = fmtSigned(v);
  return s === DASH ? s : `${s} ${unit}`;
}

function verdictRow(v: Verdict, p: Verdict | null, f: FitReport, showPrentice: boolean): Markup {
  const rule = f.profile[v.component];
  const what = v.rule === 'prism'
    ? (v.component === 'horizontal' ? 'net horizontal prism' : 'vertical imbalance')
    : (v.component === 'horizontal' ? `centring: OC distance − PD (over ${fmt(rule.powerThresholdD)} D)` : `centring: OC height difference (over ${fmt(rule.powerThresholdD)} D)`);
  return html`<tr class="${v.pass ? 'pass' : 'out'}"><th>${v.component === 'horizontal' ? 'Horizontal' : 'Vertical'}</th><td class="what">${what}</td>
<td data-k="verdict-${v.component}-value">${withUnit(v.value, v.unit)}</td><td>${withUnit(v.limit, v.unit)}</td>
<td data-k="verdict-${v.component}-margin">${signedUnit(v.margin, v.unit)}</td>
<td data-k="verdict-${v.component}" class="vd">${v.pass ? 'within' : 'OUT'}</td>
${showPrentice ? html`<td>${p ? `${withUnit(p.value, p.unit)}, ${p.pass ? 'within' : 'OUT'}` : DASH}</td>` : ''}</tr>`;
}

function eyeSentence(side: Side, r: EyeResult): Markup {
  const name = EYE_NAME[side];
  if (!r.answers || r.fixation.status !== 'ok') {
    return html`<li class="fail" data-k="${EYE_CODE[side]}-short"><b>${name}:</b> no line of sight to the target was found (${r.fixation.message}); no prism is reported for this eye. Check the case.</li>`;
  }
  const a = r.answers;
  const where = offsetWords(r.fromOcMm.x, r.fromOcMm.y, r.eye);
  const exact = isFailure(a.exact)
    ? html`the exact value cannot be computed (${a.exact.message})`
    : html`the lens acts as a prism of <b>${prismWords(a.exact)}, ${name.toLowerCase()}</b>`;
  return html`<li data-k="${EYE_CODE[side]}-short"><b>${name}</b> looks through its lens ${where ? `${where} of` : 'at'} the optical centre (OC); there ${exact}.</li>`;
}

/** The binocular result in words, with what it asks of the eyes. */
function bothSentence(p: SignedPair): Markup {
  const v = p.verticalImbalance, h = p.netHorizontal;
  const hasV = fmt(Math.abs(v)) !== '0.00', hasH = fmt(Math.abs(h)) !== '0.00';
  const vText = hasV
    ? html`vertical imbalance <b>${verticalImbalanceWords(p)}</b>: the ${v > 0 ? 'left' : 'right'} eye's image sits higher than the ${v > 0 ? 'right' : 'left'} eye's, so the eyes must turn vertically by different amounts to see singly.`
    : html`no vertical imbalance (under 0.005 Δ).`;
  const hText = hasH
    ? html`Net horizontal prism <b>${netHorizontalWords(p)}</b>: ${h > 0 ? 'the eyes converge less than the target needs' : 'the eyes must converge more than the target needs'}.`
    : html`No net horizontal prism (under 0.005 Δ).`;
  return html`${vText} ${hText}`;
}

export function slabOffText(f: FitReport): string {
  const s = f.slabOff;
  if (!s) return 'Slab-off: not assessed (an eye has no exact value).';
  if (s.advice === 'not indicated') return `Slab-off: not indicated (vertical imbalance ${fmt(s.imbalanceDelta)} Δ, under 1 Δ).`;
  return `Slab-off: ${s.advice}: about ${fmt(s.amountDelta)} Δ base up on the ${s.eye === 'R' ? 'right' : 'left'} lens ` +
    `(imbalance ${fmt(s.imbalanceDelta)} Δ at these visual points, rounded to ${fmt(s.stepDelta)} Δ steps).`;
}

function verdictSentence(f: FitReport): string {
  if (!f.verdicts) return `Tolerance (${f.profile.name}): no verdict, because an eye has no exact value.`;
  const bad = f.verdicts.filter((v) => !v.pass);
  const head = bad.length === 0
    ? `Tolerance (${f.profile.name}): within tolerance, horizontally and vertically.`
    : `Tolerance (${f.profile.name}): OUT OF TOLERANCE, ${bad.map((v) => `${v.component} (${withUnit(v.value, v.unit)}; ${withUnit(v.limit, v.unit)} allowed)`).join(' and ')}.`;
  return f.verdicts.some((v) => v.rule === 'mm')
    ? `${head} At these powers the standard judges centring in mm, not the prism the prescription produces away from the optical centres.`
    : head;
}

function noteText(note: string | undefined): string {
  if (!note) return '';
  const t = note.trim();
  return t.length > NOTE_MAX_CHARS ? `${t.slice(0, NOTE_MAX_CHARS).trimEnd()}… (shortened; the full note is in the case file)` : t;
}

/** The summary page for a case and its evaluation (a complete HTML document). */
export function summaryHtml(c: BinocularCase, f: FitReport, opts: SummaryOptions): string {
  const day = isoDay(opts.date);
  const title = c.doc.title?.trim() || 'Untitled case';
  const note = noteText(c.doc.note);
  const rows = (label: string, cell: (s: Side) => Part, k?: string): Markup =>
    html`<tr><th>${label}</th>${SIDES.map((s) => html`<td${k ? trusted(` data-k="${EYE_CODE[s]}-${k}"`) : ''}>${cell(s)}</td>`)}</tr>`;
  const wide = (label: string, cell: Part, k: string): Markup =>
    html`<tr><th>${label}</th><td colspan="2"${trusted(` data-k="${k}"`)}>${cell}</td></tr>`;

  const inputs = html`<table class="t inputs">
<thead><tr><th></th><th>Right eye</th><th>Left eye</th></tr></thead><tbody>
${rows('Prescription (back vertex power)', (s) => rxText(f.lenses[s]), 'rx')}
${rows('Lens: material, front surface, thickness', (s) => lensFormCell(c, s, f.lenses[s]), 'lens')}
${rows('PD (monocular); lens to eye\'s CR', (s) => html`PD ${withUnit(c[s].pdMm, 'mm', 1)}; ${withUnit(c[s].crMm, 'mm', 1)}${c.doc[s].cr === undefined ? ASSUMED : ''}`, 'pd')}
${rows('Optical centre (OC)', (s) => ocCell(c[s], c.doc[s], EYE_CODE[s]), 'oc')}
${wide('Frame, tilt', html`${c.doc.frame ? `boxed A ${fmt(c.doc.frame.a, 1)}, B ${fmt(c.doc.frame.b, 1)}, DBL ${fmt(c.doc.frame.dbl, 1)} mm; ` : ''}pantoscopic tilt ${withUnit(c.pantoDeg, '°', 1)}${c.doc.pantoDeg === undefined ? ASSUMED : ''}, wrap ${withUnit(c.wrapDeg, '°', 1)}${c.doc.wrapDeg === undefined ? ASSUMED : ''}`, 'tilt')}
${wide('Target', targetText(c), 'target')}
${wide('Tolerance profile', html`${f.profile.name}${c.doc.tolerance ? '' : ASSUMED} <span class="src">· source: ${f.profile.source}</span>`, 'profile')}
</tbody></table>`;

  const ok = (r: EyeResult): boolean => r.answers !== null && r.fixation.status === 'ok';
  const answerCells = (a: Answer, key: string, strong: boolean): Markup => {
    if (isFailure(a)) return html`<td colspan="2" data-k="${key}" class="fail">no value: ${a.message}</td>`;
    return html`<td data-k="${key}"${strong ? trusted(' class="strong"') : ''}>${prismWords(a)}</td><td class="n360" data-k="${key}-360">${prism360(a)}</td>`;
  };
  const answerRow = (label: Markup, which: 'exact' | 'prentice' | 'paraxial' | 'focimeter'): Markup =>
    html`<tr${which === 'exact' ? trusted(' class="key-row"') : ''}><th>${label}</th>${SIDES.map((s) => {
      const r = f.result[s];
      return ok(r) ? answerCells(r.answers![which], `${EYE_CODE[s]}-${which}`, which === 'exact') : html`<td colspan="2" class="fail">no line of sight</td>`;
    })}</tr>`;
  const prisms = html`<table class="t prisms">
<thead><tr><th></th><th colspan="2">Right eye</th><th colspan="2">Left eye</th></tr></thead><tbody>
<tr><th>Visual point (VP), on the lens</th>${SIDES.map((s) => {
    const r = f.result[s];
    if (!ok(r)) return html`<td colspan="2" class="fail" data-k="${EYE_CODE[s]}-vp">none: ${r.fixation.message}</td>`;
    const w = offsetWords(r.fromOcMm.x, r.fromOcMm.y, r.eye);
    return html`<td colspan="2" data-k="${EYE_CODE[s]}-vp">${w ? `${w} of the OC` : 'at the OC'}</td>`;
  })}</tr>
${answerRow(html`<span class="k k-exact"></span>Exact: what the eye gets`, 'exact')}
${answerRow(html`<span class="k k-prentice"></span>Prentice's rule`, 'prentice')}
${answerRow(html`<span class="k k-paraxial"></span>First-order (thick lens)`, 'paraxial')}
${answerRow(html`<span class="k k-focimeter"></span>Focimeter reading there`, 'focimeter')}
<tr><th>Prentice's rule minus exact</th>${SIDES.map((s) => {
    const r = f.result[s];
    const e = ok(r) ? r.answers!.error : null;
    return html`<td colspan="2" data-k="${EYE_CODE[s]}-error">${e ? `${fmtSigned(e.prism)} Δ${e.percent === null ? '' : ` (${fmtSigned(e.percent, 0)} %)`}` : DASH}</td>`;
  })}</tr>
</tbody></table>`;

  const both = html`<table class="t both">
<thead><tr><th>Both eyes</th><th>exact</th><th>Prentice's rule</th></tr></thead><tbody>
<tr><th>Net horizontal</th><td data-k="net-h" class="strong">${netHorizontalWords(f.result.exact)}</td><td data-k="net-h-prentice">${netHorizontalWords(f.result.prentice)}</td></tr>
<tr><th>Vertical imbalance</th><td data-k="vert" class="strong">${verticalImbalanceWords(f.result.exact)}</td><td data-k="vert-prentice">${verticalImbalanceWords(f.result.prentice)}</td></tr>
</tbody></table>`;

  const pv = f.prenticeVerdicts;
  // Prentice's values change a verdict only where a prism rule applies (a centring rule is in mm)
  const showPrentice = f.verdicts !== null && f.verdicts.some((v) => v.rule === 'prism');
  const tolerance = f.verdicts
    ? html`<table class="t tol">
<thead><tr><th>Tolerance</th><th>what is judged</th><th>value</th><th>allowed</th><th>margin</th><th>verdict</th>${showPrentice ? html`<th>by Prentice</th>` : ''}</tr></thead><tbody>
${f.verdicts.map((v, i) => verdictRow(v, pv ? pv[i]! : null, f, showPrentice))}
</tbody></table>`
    : html`<p class="fail" data-k="verdict-none">No verdict: an eye has no exact value at this target.</p>`;

  const figures = SIDES.map((s) => {
    const r = f.result[s];
    // the plot runs from the OC towards the visual point (lens frame)
    const dirDeg = ok(r) ? (Math.atan2(r.fixation.trace.by, r.fixation.trace.bx) * 180) / Math.PI : 0;
    const a = (dirDeg * Math.PI) / 180;
    const words = ok(r) ? directionWords(Math.cos(a), Math.sin(a), r.eye) : '';
    const eyeName = s === 'right' ? 'Right' : 'Left';
    return {
      section: crossSectionSvg({ id: `sec-${EYE_CODE[s]}`, eyeName, lens: f.lenses[s], result: r, crMm: c[s].crMm }),
      plot: profilePlotSvg({
        id: `plot-${EYE_CODE[s]}`, eyeName, lens: f.lenses[s], result: r, crMm: c[s].crMm,
        directionDeg: dirDeg, directionWords: words,
      }),
    };
  });

  const inShort = html`<ul class="short">
${SIDES.map((s) => eyeSentence(s, f.result[s]))}
<li data-k="both-short"><b>Both eyes:</b> ${f.result.exact ? bothSentence(f.result.exact) : html`not available, because an eye has no exact value.`}</li>
<li data-k="verdict-short">${verdictSentence(f)}</li>
<li data-k="slab-off">${slabOffText(f)}</li>
</ul>`;

  const doc = html`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="Decentra">
<title>Prism summary: ${title}</title>
<style>${trusted(REPORT_CSS)}</style>
</head>
<body>
<main class="sheet">
<header>
<div class="head-row"><h1>Spectacle prism summary</h1><div class="date">Date: <span data-k="date">${day}</span></div></div>
<p class="case-title" data-k="title">${title}</p>
${note ? html`<p class="note" data-k="note">${note}</p>` : ''}
<p class="screen-only">To make a PDF, use the browser's Print command: the page is laid out for one A4 or Letter sheet.</p>
</header>
<section class="box"><h2>In short</h2>${inShort}</section>
<section><h2>What was entered, and what was assumed where nothing was entered</h2>${inputs}</section>
<section><h2>Prism at each eye's visual point (looking at the target through the lenses)</h2>${prisms}</section>
<div class="cols">
<section>${both}</section>
<section>${tolerance}</section>
</div>
<section class="figs"><h2>The line of sight through each lens, and how the prism grows away from the optical centre</h2>
<div class="grid">${figures.map((g) => [g.section, g.plot])}</div>
<p class="small">Sections: to scale, in the plane of the lens axis and the visual point (VP), from the lens surfaces and the traced line of sight (<span class="k k-exact"></span>darker inside the lens; thin dashes: the line without the lens); CR: the eye's centre of rotation. Plots: the four answers keyed as in the prism table, for the lens alone (untilted, CR on its axis); dots: this case at its VP.</p>
</section>
<div class="foot">
<section class="method"><h2>How to read the numbers</h2>
<p class="small"><b>Δ (prism dioptre):</b> 1 Δ moves an image 1 cm at 1 m. <b>Base</b> in, out, up, down: where the prism's thick edge points (in = towards the nose); the image moves the other way. <b>360°:</b> the base direction seen facing the wearer, anticlockwise from the wearer's left (base in 0° right eye, 180° left eye; base up 90°).
<b>Prentice's rule</b> (power × distance from the OC in cm) treats the lens as infinitely thin; <b>first-order</b> adds its thickness and the eye's centre of rotation, for small angles; <b>exact</b> traces a real ray through both surfaces along the eye's actual line of sight: what the wearer gets; the <b>focimeter</b> reads the same point with its light crossing the lens at another angle. They differ because real lenses are thick and are looked through obliquely, more so with more power, thickness and distance from the OC.</p>
</section>
<section class="caution"><h2>Cautions</h2>
<p class="small" data-k="cautions">${REPORT_CAUTIONS.join(' ')} Tolerance limits are only as reliable as the source named above.</p>
<p class="small made">Made with Decentra on ${day}.</p>
</section>
</div>
</main>
</body>
</html>
`;
  return doc.text;
}
