/**
 * The clinician summary: one printable page (a standalone HTML document with inline CSS and
 * inline SVG, no script). A binocular case has three answers that are never mixed
 * (docs/binocular.md), each under its own heading with the question it answers:
 *
 * 1. at the marks: what the lab measures at each lens's centration point;
 * 2. the standard's verdict: the tolerance profile applied to the marks only (making and centring);
 * 3. what the eyes do at the target: visual points, rotation, prism there, the binocular
 *    demand and clinical guidance (never a pass or fail).
 *
 * In a clinician's order: in short, what was entered, the three answers, the figures, a method
 * note and the cautions (docs/report.md).
 *
 * Glue and wording only: every number comes from the engine through evaluateFit (FitReport)
 * and prismProfile; the wording of the three answers is the one shared with the command line
 * and the app (src/case/fitWords.ts). Every piece of text is escaped by html.ts, every number
 * of our own is formatted by fmt() ('—' when missing, never NaN or Infinity). Signs
 * (docs/conventions.md): x towards the wearer's left, y up; net horizontal > 0 base in;
 * vertical imbalance right minus left > 0 right eye base up.
 */
import { POWER_AT_EYES, powerBrief } from '../case/powerWords.ts';
import type { BinocularCase, EyeCase, EyeDocument } from '../case/caseFile.ts';
import type { FitReport } from '../case/fit.ts';
import {
  GUIDANCE_NOT_VERDICT, THREE_ANSWERS, demandWords, offsetWords, rotationWords, imbalanceWords, judgedWords, netHorizontalWords, slabOffWords, standardSummary, targetWords,
} from '../case/fitWords.ts';
import {
  type Answer, type EyeResult, type Guidance, type Lens, type MarkEye, type PrismDescription, type SignedPair, type Verdict,
  findMaterial, isFailure, prismWords, ruleText,
} from '../optics/index.ts';
import { crossSectionSvg, directionWords } from './crossSection.ts';
import { DASH, type Markup, type Part, fmt, fmtSigned, html, pageHead, trusted, withUnit } from './html.ts';
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

/** What the guidance is, said wherever it appears. */

/** A long note is shortened so that the summary stays on one page. */
export const NOTE_MAX_CHARS = 120;

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

/** A lens point relative to the optical centre, in words: "10.00 mm below the OC", "at the OC". */
function fromOcWords(x: number, y: number, eye: 'R' | 'L'): string {
  return offsetWords(x, y, eye, 'the OC');
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
  return html`${material}; front ${fmtSigned(lens.spec.frontD)} D${how}${form.front.kind === 'rule' && d.frontRule === undefined ? ASSUMED : ''}; ${ct}${dia}${asph.length ? `; aspheric: ${asph.join(', ')}` : ''}`;
}

const TILT_DROP_WORDS: Record<string, string> = {
  'rule-of-thumb': 'lowered 1 mm per 2° of pantoscopic tilt (rule of thumb)',
  'centre-of-rotation': "lowered so that the lens axis passes through the eye's centre of rotation",
};

function ocCell(ec: EyeCase, d: EyeDocument, eye: 'R' | 'L'): Markup {
  const w = offsetWords(ec.ocXMm, ec.ocYMm, eye, undefined, 1);
  const where = w ? `${w} of the pupil` : 'in front of the pupil';
  const fromFrame = !d.oc && (d.decentration !== undefined || d.fittingHeight !== undefined || d.ocHeight !== undefined);
  const drop = fmt(ec.tiltDropMm, 1) !== '0.0' ? `, incl. ${withUnit(ec.tiltDropMm, 'mm', 1)} lowered for the tilt` : '';
  return html`${where}${fromFrame ? ' (from the frame)' : ''}${drop}${!d.oc && !fromFrame ? ASSUMED : ''}`;
}

function signedUnit(v: number, unit: string): string {
  const s = fmtSigned(v);
  return s === DASH ? s : `${s} ${unit}`;
}

/** An answer in words, or why there is none. */
function answerText(a: Answer | null | undefined): Markup {
  if (!a) return html`<span class="fail">no value</span>`;
  if (isFailure(a)) return html`<span class="fail">no value: ${a.message}</span>`;
  return html`${prismWords(a)}`;
}

function verdictRow(v: Verdict, p: Verdict | null, showPrentice: boolean): Markup {
  return html`<tr class="${v.pass ? 'pass' : 'out'}"><th>${v.component === 'horizontal' ? 'Horizontal' : 'Vertical'}</th><td class="what">${judgedWords(v)}</td>
<td data-k="verdict-${v.component}-value">${withUnit(v.value, v.unit)}</td><td data-k="verdict-${v.component}-limit">${withUnit(v.limit, v.unit)}</td>
<td data-k="verdict-${v.component}-margin">${signedUnit(v.margin, v.unit)}</td>
<td data-k="verdict-${v.component}" class="vd">${v.pass ? 'within' : 'OUT'}</td>
<td class="what" data-k="verdict-${v.component}-rule">${ruleText(v)}</td>
${showPrentice ? html`<td data-k="verdict-${v.component}-prentice">${p && p.rule === 'prism' ? `${withUnit(p.value, p.unit)}, ${p.pass ? 'within' : 'OUT'}` : DASH}</td>` : ''}</tr>`;
}

const BAND_RANK: Record<Guidance['band'], number> = { large: 0, moderate: 1, small: 2, none: 3 };

function noteText(note: string | undefined): string {
  if (!note) return '';
  const t = note.trim();
  return t.length > NOTE_MAX_CHARS ? `${t.slice(0, NOTE_MAX_CHARS).trimEnd()}… (shortened; the full note is in the case file)` : t;
}

/** The optional free-text header fields, in order; absent or blank ones are left out. */
function headerFields(c: BinocularCase): { label: string; key: string; text: string }[] {
  const r = c.doc.report;
  const fields = [
    { label: 'For:', key: 'recipient', text: r?.recipient?.trim() ?? '' },
    { label: 'From:', key: 'practice', text: r?.practice?.trim() ?? '' },
    { label: 'Ref.:', key: 'reference', text: r?.reference?.trim() ?? '' },
  ];
  return fields.filter((f) => f.text !== '');
}

const ok = (r: EyeResult): boolean => r.answers !== null && r.fixation.status === 'ok';

/** Why the eyes' answers are missing: the eye(s) without a line of sight, and why. */
function missingEyes(f: FitReport): string {
  const why = SIDES.filter((s) => !ok(f.result[s])).map((s) => `the ${s} eye has no line of sight to the target (${f.result[s].fixation.message})`);
  return why.length ? why.join('; ') : 'an eye has no exact value at its visual point';
}

/** The summary page for a case and its evaluation (a complete HTML document). */
export function summaryHtml(c: BinocularCase, f: FitReport, opts: SummaryOptions): string {
  const day = isoDay(opts.date);
  const title = c.doc.title?.trim() || 'Untitled case';
  const note = noteText(c.doc.note);
  const target = targetWords(c);
  const m = f.marks;
  const anyPrescribed = m.right.prescribed !== null || m.left.prescribed !== null;
  const rows = (label: string, cell: (s: Side) => Part): Markup =>
    html`<tr><th>${label}</th>${SIDES.map((s) => html`<td>${cell(s)}</td>`)}</tr>`;

  // ---- header
  const who = headerFields(c);
  const header = html`<header>
<div class="head-row"><h1>Spectacle prism summary</h1><div class="date">Date: <span data-k="date">${day}</span></div></div>
${who.length ? html`<p class="who">${who.map((w, i) => html`${i ? ' · ' : ''}<b>${w.label}</b> <span data-k="${w.key}">${w.text}</span>`)}</p>` : ''}
<p class="case-title" data-k="title">${title}</p>
${note ? html`<p class="note" data-k="note">${note}</p>` : ''}
<p class="screen-only">To make a PDF, use the browser's Print command: the page is laid out for one A4 or Letter sheet.</p>
</header>`;

  // ---- in short: the eyes' demand and guidance first, then the standard's verdict, then slab-off
  const g = f.guidance;
  const guidanceItems = g
    ? ([['vertical', g.vertical], ['horizontal', g.horizontal]] as const)
      .slice().sort((a, b) => BAND_RANK[a[1].band] - BAND_RANK[b[1].band])
      .map(([k, gd]) => html` <span data-k="short-${k}">${gd.words}</span>`)
    : html` <span class="fail" data-k="short-none">Not available: ${missingEyes(f)}.</span>`;
  const inShort = html`<ul class="short">
<li data-k="short-eyes"><b>What the eyes do at the target:</b>${guidanceItems}${g ? html` <i>${GUIDANCE_NOT_VERDICT}</i>` : ''}</li>
<li data-k="short-standard"><b>The standard’s verdict on making and centring</b> (at the marks, not at the target): ${standardSummary(f)}</li>
<li data-k="slab-off">${slabOffWords(f.slabOff)}</li>
</ul>`;

  // ---- inputs
  const prescribedText = (s: Side): string => {
    const p = m[s].prescribed;
    return p ? `${prismWords(p)} (${prism360(p)})` : 'none';
  };
  const tiltDrop = c.doc.tiltDrop && c.doc.tiltDrop !== 'none' ? `; optical centres ${TILT_DROP_WORDS[c.doc.tiltDrop] ?? c.doc.tiltDrop}` : '';
  const inputs = html`<table class="t inputs">
<thead><tr><th></th><th>Right eye</th><th>Left eye</th></tr></thead><tbody>
${rows('Prescription (back vertex); prism', (s) => html`<span data-k="${EYE_CODE[s]}-rx">${rxText(f.lenses[s])}</span>; prism <span data-k="${EYE_CODE[s]}-prism">${prescribedText(s)}</span>`)}
${rows('Lens', (s) => html`<span data-k="${EYE_CODE[s]}-lens">${lensFormCell(c, s, f.lenses[s])}</span>`)}
${rows('PD; lens to CR; optical centre', (s) => html`<span data-k="${EYE_CODE[s]}-pd">PD ${withUnit(c[s].pdMm, 'mm', 1)}; CR ${withUnit(c[s].crMm, 'mm', 1)}${c.doc[s].cr === undefined ? ASSUMED : ''}</span>; OC <span data-k="${EYE_CODE[s]}-oc">${ocCell(c[s], c.doc[s], EYE_CODE[s])}</span>`)}
</tbody></table>
<p class="facts"><b>Frame and tilt:</b> <span data-k="tilt">${c.doc.frame ? `boxed A ${fmt(c.doc.frame.a, 1)}, B ${fmt(c.doc.frame.b, 1)}, DBL ${fmt(c.doc.frame.dbl, 1)} mm; ` : 'no frame given; '}pantoscopic tilt ${withUnit(c.pantoDeg, '°', 1)}${c.doc.pantoDeg === undefined ? ASSUMED : ''}, wrap ${withUnit(c.wrapDeg, '°', 1)}${c.doc.wrapDeg === undefined ? ASSUMED : ''}${tiltDrop}</span>. <b>Target:</b> <span data-k="target">${target}</span>. <b>Tolerance profile:</b> <span data-k="profile">${f.profile.name}</span>${c.doc.tolerance ? '' : ASSUMED} (its source under 2).</p>`;

  // ---- 1. at the marks: one row per eye and two for the pair, one column per answer
  const ANSWERS = ['focimeter', 'prentice', 'paraxial', 'exact'] as const;
  const markEyeRow = (s: Side): Markup => html`<tr><th>${EYE_NAME[s]}</th>${ANSWERS.map((w) =>
    html`<td data-k="mk-${EYE_CODE[s]}-${w}"${w === 'focimeter' ? trusted(' class="strong"') : ''}>${answerText(m[s].answers?.[w])}</td>`)}<td data-k="mk-${EYE_CODE[s]}-prescribed">${m[s].prescribed ? prismWords(m[s].prescribed) : 'none'}</td></tr>`;
  const markPairRow = (label: string, k: 'h' | 'v'): Markup => {
    const words = (p: SignedPair | null): string => !p ? DASH : k === 'h' ? netHorizontalWords(p.netHorizontal) : imbalanceWords(p.verticalImbalance);
    return html`<tr class="pair"><th>${label}</th>${ANSWERS.map((w) =>
      html`<td data-k="mk-${w}-${k}"${w === 'focimeter' ? trusted(' class="strong"') : ''}>${words(m.net[w])}</td>`)}<td data-k="mk-prescribed-${k}">${anyPrescribed ? words(m.prescribedNet) : 'none'}</td></tr>`;
  };
  const markPoint = (e: MarkEye): string => e.point ? fromOcWords(e.point.x, e.point.y, e.eye) : 'none: the straight-ahead line misses the lens';
  const marks = html`<table class="t marks">
<thead><tr><th></th><th><span class="k k-focimeter"></span>Focimeter (exact)</th><th><span class="k k-prentice"></span>Prentice's rule (nominal)</th><th><span class="k k-paraxial"></span>First-order (eye)</th><th><span class="k k-exact"></span>Exact (eye)</th><th>Prescribed</th></tr></thead><tbody>
${markEyeRow('right')}
${markEyeRow('left')}
${markPairRow('Pair: net horizontal', 'h')}
${markPairRow('Pair: vertical imbalance', 'v')}
</tbody></table>
<p class="facts">(eye): along the eye's straight-ahead line. Centration points: right <span data-k="mk-R-point">${markPoint(m.right)}</span>; left <span data-k="mk-L-point">${markPoint(m.left)}</span>.</p>`;

  // ---- 2. the standard's verdict
  const vs = f.standard.verdicts;
  const pv = f.standard.prenticeVerdicts;
  // Prentice's hand value changes a verdict only where a prism rule applies (a centring rule is in mm)
  const showPrentice = vs !== null && vs.some((v) => v.rule === 'prism');
  const standard = vs
    ? html`<table class="t tol">
<thead><tr><th></th><th>what is judged</th><th>value</th><th>allowed</th><th>margin</th><th>verdict</th><th>the standard's row</th>${showPrentice ? html`<th>Prentice's hand value</th>` : ''}</tr></thead><tbody>
${vs.map((v, i) => verdictRow(v, pv ? pv[i]! : null, showPrentice))}
</tbody></table>`
    : html`<p class="fail" data-k="verdict-none">No verdict: a lens has no reading at its mark, or its prism reference point cannot be found.</p>`;

  // ---- 3. what the eyes do at the target: one row per eye and two for the pair
  const r = f.result;
  const errorText = (e: EyeResult): string => {
    const er = e.answers!.error;
    return er ? `${fmtSigned(er.prism)} Δ${er.percent === null ? '' : `, ${fmtSigned(er.percent, 0)} %`}` : DASH;
  };
  const eyeRow = (s: Side): Markup => {
    const e = r[s], k = EYE_CODE[s];
    if (!ok(e)) return html`<tr><th>${EYE_NAME[s]}</th><td colspan="4" class="fail" data-k="${k}-vp">no line of sight: ${e.fixation.message}</td></tr>`;
    const a = e.answers!;
    return html`<tr><th>${EYE_NAME[s]}</th><td data-k="${k}-vp">${fromOcWords(e.fromOcMm.x, e.fromOcMm.y, e.eye)}</td><td data-k="${k}-rot">${rotationWords(e.rotationDeg, e.eye)}</td>
<td data-k="${k}-exact" class="strong">${answerText(a.exact)}</td><td><span data-k="${k}-prentice">${answerText(a.prentice)}</span> <span class="sub">(<span data-k="${k}-error">${errorText(e)}</span>)</span></td></tr>`;
  };
  const eyePairRow = (label: string, k: 'h' | 'v'): Markup => {
    const words = (p: SignedPair | null): string => !p ? DASH : k === 'h' ? netHorizontalWords(p.netHorizontal) : imbalanceWords(p.verticalImbalance);
    return html`<tr class="pair"><th>${label}</th><td></td><td></td><td data-k="eyes-exact-${k}" class="strong">${words(r.exact)}</td><td data-k="eyes-prentice-${k}">${words(r.prentice)}</td></tr>`;
  };
  const eyes = html`<table class="t eyes">
<thead><tr><th></th><th>Visual point (VP)</th><th>Eye's rotation</th><th><span class="k k-exact"></span>Exact prism there</th><th><span class="k k-prentice"></span>Prentice's rule there (minus exact)</th></tr></thead><tbody>
${eyeRow('right')}
${eyeRow('left')}
${eyePairRow('Pair: net horizontal', 'h')}
${eyePairRow('Pair: vertical imbalance', 'v')}
</tbody></table>`;
  // the power beside the prism: one plain line for the pair (docs/method.md, "Power at the visual point")
  const powerParts = SIDES.filter((s) => ok(r[s])).map((s) => `${s} eye ${powerBrief(r[s].answers!.power)}`);
  const power = powerParts.length
    ? html`<p class="facts small" data-k="eyes-power"><b>${POWER_AT_EYES}:</b> ${powerParts.join('; ')}.</p>`
    : html``;
  const dw = f.demand ? demandWords(f.demand, Boolean(f.marks.right.prescribed || f.marks.left.prescribed)) : null;
  const demand = dw && g
    ? html`<ul class="demand">
<li><b>Vergence${anyPrescribed ? ' (beyond the prescribed prism)' : ''}:</b> <span data-k="demand-horizontal">${dw.horizontal}</span>. <i>Guidance:</i> <span class="guide" data-k="guidance-horizontal">${g.horizontal.words}</span></li>
<li><b>Vertical${anyPrescribed ? ' (beyond the prescribed prism)' : ''}:</b> <span data-k="demand-vertical">${dw.vertical}</span>. <i>Guidance:</i> <span class="guide" data-k="guidance-vertical">${g.vertical.words}</span></li>
</ul>`
    : html`<p class="fail" data-k="demand-none">What the pair asks of the eyes: not available: ${missingEyes(f)}.</p>`;

  // ---- figures
  const figures = SIDES.map((s) => {
    const e = r[s];
    // the plot runs from the OC towards the visual point (lens frame)
    const dirDeg = ok(e) ? (Math.atan2(e.fixation.trace.by, e.fixation.trace.bx) * 180) / Math.PI : 0;
    const a = (dirDeg * Math.PI) / 180;
    const words = ok(e) ? directionWords(Math.cos(a), Math.sin(a), e.eye) : '';
    const eyeName = s === 'right' ? 'Right' : 'Left';
    return [
      crossSectionSvg({ id: `sec-${EYE_CODE[s]}`, eyeName, lens: f.lenses[s], result: e, crMm: c[s].crMm }),
      profilePlotSvg({ id: `plot-${EYE_CODE[s]}`, eyeName, lens: f.lenses[s], result: e, crMm: c[s].crMm, directionDeg: dirDeg, directionWords: words }),
    ];
  });

  const doc = html`${pageHead(html`Prism summary: ${title}`, REPORT_CSS)}
<body>
<main class="sheet">
${header}
<section class="box"><h2>In short</h2>${inShort}</section>
<section><h2>What was entered, and what was assumed where nothing was entered</h2>${inputs}</section>
<section data-k="answer-marks"><div class="qh"><h2>1. ${THREE_ANSWERS.marks.heading}</h2> <span class="q">${THREE_ANSWERS.marks.question}</span></div>${marks}</section>
<section data-k="answer-standard"><div class="qh"><h2>2. ${THREE_ANSWERS.standard.heading}</h2> <span class="q">${THREE_ANSWERS.standard.question}</span></div>${standard}
<p class="facts src" data-k="standard-source">Source of the limits: ${f.profile.source}.</p></section>
<section data-k="answer-eyes"><div class="qh"><h2>3. ${THREE_ANSWERS.eyes.heading}: ${target}</h2> <span class="q">${THREE_ANSWERS.eyes.question}</span></div>${eyes}${power}${demand}</section>
<section class="figs">
<div class="figrow"><div class="grid">${figures}</div>
<p class="small cap">Sections: to scale, with the traced line of sight (darker inside the lens; thin dashes: without the lens). Plots: the lens alone (untilted, CR on its axis): <span class="k k-prentice"></span>Prentice's rule, <span class="k k-paraxial"></span>first-order, <span class="k k-exact"></span>exact, <span class="k k-focimeter"></span>focimeter; dots: this case at its VP.</p></div>
</section>
<div class="foot">
<section class="method"><h2>How to read the numbers</h2>
<p class="small"><b>Δ (prism dioptre):</b> 1 Δ moves an image 1 cm at 1 m. <b>Base</b> in, out, up, down: where the prism's thick edge points (in = towards the nose). <b>Prentice's rule</b> (power × distance from the OC in cm) treats the lens as thin; <b>first-order</b> adds its thickness and the eye's centre of rotation (CR); <b>exact</b> traces a real ray along the line of sight; the <b>focimeter</b> reads the lens on its support, its light crossing the lens at another angle. They part more with more power, thickness and distance from the OC.</p>
</section>
<section class="caution"><h2>Cautions</h2>
<p class="small" data-k="cautions">${REPORT_CAUTIONS.join(' ')} ${GUIDANCE_NOT_VERDICT} <span class="made">Made with Decentra on ${day}.</span></p>
</section>
</div>
</main>
</body>
</html>
`;
  return doc.text;
}
