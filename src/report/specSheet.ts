/**
 * The range's spec sheet (docs/range.md): a printable page for a lens designer, at most two
 * A4 or Letter sheets, a standalone HTML document with inline CSS and SVG and no script.
 *
 * Page 1: the range definition, and per tolerance the smallest exact limit over the range's
 * directions and axes for each sphere and cylinder. Page 2: where Prentice's rule breaks down
 * (its error over power x decentration with the contours of the chosen levels, and the table
 * of the largest decentration within each level), the method, the assumptions and the cautions.
 *
 * Glue and wording only: every number comes from src/case/range.ts (rangeRows, breakdown);
 * text is escaped and numbers formatted by html.ts (never NaN or Infinity).
 */
import { scaleLinear } from 'd3-scale';
import { line } from 'd3-shape';
import type { FrontSpec, ThicknessSpec } from '../case/lensCase.ts';
import { readLensForm } from '../case/lensCase.ts';
import { type Breakdown, type RangeRow, type RangeSpec, flagLabel } from '../case/range.ts';
import { REPORT_CAUTIONS } from './summary.ts';
import { type Markup, type Part, coord, fmt, fmtSigned, html, pageHead } from './html.ts';
import { REPORT_CSS } from './style.ts';

export interface SpecSheetOptions {
  /** the date printed on the sheet (its UTC calendar day) */
  date: Date;
  /** the command that makes the same sheet, printed for reproducibility (optional) */
  command?: string;
  /** a title (default: "Decentration limits of a lens range") */
  title?: string;
}

/** Most sphere lines a limits table shows (more are thinned to every k-th, and the sheet says so). */
export const SHEET_MAX_SPHERES = 41;
/** Most cylinder columns per tolerance, and tolerances side by side. */
export const SHEET_MAX_CYLS = 9;
export const SHEET_MAX_TOLERANCES = 3;

const SHEET_CSS = `
.sheet { font-size: 6.6pt; }
.p2 { break-before: page; page-break-before: always; }
.def { display: grid; grid-template-columns: 1fr 1fr; column-gap: 4mm; }
.lim { display: grid; column-gap: 2mm; margin-top: 1mm; }
table.lt { border-collapse: collapse; width: 100%; font-variant-numeric: tabular-nums; }
table.lt th, table.lt td { padding: 0 .5mm; text-align: right; border-bottom: .15mm solid #e3e8ed; font-size: 6pt; line-height: 1.12; white-space: nowrap; }
table.lt thead th { font-weight: 600; color: #40505f; border-bottom: .3mm solid #9fb2c1; }
table.lt caption { text-align: left; font-weight: 700; font-size: 7pt; color: #1d3f57; padding-bottom: .4mm; }
table.lt td.na { color: #8d9aa6; }
table.lt td.edge { color: #1c6b2f; }
.bd { display: grid; grid-template-columns: 118fr 72fr; column-gap: 3mm; align-items: start; }
svg .cell0 { fill: #f4f8fb; } svg .cell1 { fill: #d7e7f1; } svg .cell2 { fill: #a9c9de; } svg .cell3 { fill: #6d9fc2; } svg .celln { fill: #ffffff; }
svg .contour { fill: none; stroke: #a31616; stroke-width: 1.2; }
svg .contour.l1 { stroke-dasharray: 4 2; } svg .contour.l2 { stroke-dasharray: 1.5 1.5; }
svg .clbl { font-size: 7px; fill: #a31616; font-weight: 600; }
`;

function frontText(f: FrontSpec): string {
  if (f.kind === 'true') return `fixed true front ${fmtSigned(f.frontD)} D for every lens`;
  if (f.kind === 'nominal') return `fixed nominal base ${fmtSigned(f.nominalD)} D (tool index ${fmt(f.toolIndex, 3)}) for every lens`;
  if (f.rule.kind === 'vogel') return 'Vogel’s rule of thumb (SE + 6 D for plus, SE / 2 + 6 D for minus; at least +0.50 D)';
  if (f.rule.kind === 'fixed') return `fixed ${fmtSigned(f.rule.frontD)} D`;
  return `steps: ${f.rule.steps.map((s) => `from ${fmtSigned(s.fromD)} D: ${fmtSigned(s.frontD)} D`).join('; ')}`;
}

function thicknessText(t: ThicknessSpec): string {
  if (t.kind === 'centre') return `fixed centre thickness ${fmt(t.ctMm)} mm${t.diameterMm ? ` on ${fmt(t.diameterMm, 1)} mm` : ', no diameter (searches stop at 50 mm)'}`;
  return `thinnest centre ${fmt(t.minCentreMm)} mm and thinnest edge ${fmt(t.minEdgeMm)} mm on a ${fmt(t.diameterMm, 1)} mm round lens${t.diameterIsDefault ? ' (the default diameter)' : ''}`;
}

/** A list of values for the definition: "−20.00 to +20.00 D in 0.25 steps (161)" or the values. */
function listText(v: readonly number[], unit: string, decimals = 2): string {
  if (v.length === 1) return `${fmt(v[0]!, decimals)}${unit}`;
  const steps = v.slice(1).map((x, i) => x - v[i]!);
  const even = steps.every((s) => Math.abs(s - steps[0]!) < 1e-9);
  if (even && v.length > 3) return `${fmt(v[0]!, decimals)} to ${fmt(v[v.length - 1]!, decimals)}${unit} in steps of ${fmt(steps[0]!, decimals)} (${v.length} values)`;
  return `${v.map((x) => fmt(x, decimals)).join(', ')}${unit}`;
}

/** Every k-th value so that at most `max` remain (the last always kept). */
function thin<T>(v: readonly T[], max: number): { kept: T[]; every: number } {
  if (v.length <= max) return { kept: [...v], every: 1 };
  const every = Math.ceil((v.length - 1) / (max - 1));
  const kept = v.filter((_, i) => i % every === 0);
  if ((v.length - 1) % every !== 0) kept.push(v[v.length - 1]!);
  return { kept, every };
}

/** The smallest exact limit over directions and axes of one sphere, cyl and tolerance: a cell. */
interface Cell { mm: number | null; kind: 'prism' | 'edge' | 'lens' | 'none' }

function worstCell(rows: readonly RangeRow[]): Cell {
  let best: Cell = { mm: null, kind: 'none' };
  let edgeMin = Infinity, lens = false;
  for (const r of rows) {
    if (r.limitedBy === 'lens') { lens = true; continue; }
    if (r.exact !== null) { if (best.mm === null || r.exact < best.mm) best = { mm: r.exact, kind: 'prism' }; }
    else if (r.diameter !== null) edgeMin = Math.min(edgeMin, r.diameter / 2);
  }
  if (best.mm !== null) return best;
  if (edgeMin < Infinity) return { mm: edgeMin, kind: 'edge' };
  return { mm: null, kind: lens ? 'lens' : 'none' };
}

function limitsTables(spec: RangeSpec, rows: readonly RangeRow[], decimals: number): { tables: Markup; notes: string[] } {
  const notes: string[] = [];
  const sph = thin(spec.spheres, SHEET_MAX_SPHERES);
  const cyl = thin(spec.cyls, SHEET_MAX_CYLS);
  const tols = spec.tolerances.slice(0, SHEET_MAX_TOLERANCES);
  if (sph.every > 1) notes.push(`every ${sph.every}th sphere shown`);
  if (cyl.every > 1) notes.push(`every ${cyl.every}th cylinder shown`);
  if (spec.tolerances.length > tols.length) notes.push(`the first ${tols.length} of ${spec.tolerances.length} tolerances shown`);
  // index rows: sphere -> cyl -> tolerance -> rows (all axes and directions)
  const key = (s: number, c: number, t: number) => `${s}|${c}|${t}`;
  const groups = new Map<string, RangeRow[]>();
  for (const r of rows) {
    const k = key(r.sphere, r.cyl, r.maxPrism);
    const g = groups.get(k);
    if (g) g.push(r); else groups.set(k, [r]);
  }
  const tables = tols.map((t) => {
    const head = html`<tr><th>sphere D</th>${cyl.kept.map((c) => html`<th>${fmtSigned(c)}</th>`)}</tr>`;
    const body = sph.kept.map((s) => html`<tr><th>${fmtSigned(s)}</th>${cyl.kept.map((c) => {
      const cell = worstCell(groups.get(key(s, c, t)) ?? []);
      if (cell.kind === 'prism') return html`<td>${fmt(cell.mm, decimals)}</td>`;
      if (cell.kind === 'edge') return html`<td class="edge">≥${fmt(cell.mm, 0)}</td>`;
      return html`<td class="na">${cell.kind === 'lens' ? '×' : '—'}</td>`;
    })}</tr>`);
    return html`<table class="lt" data-k="limits-${fmt(t, 2)}"><caption>${fmt(t, 2)} Δ: smallest exact limit, mm (columns: cylinder, D)</caption><thead>${head}</thead><tbody>${body}</tbody></table>`;
  });
  const cols = tols.map(() => '1fr').join(' ');
  return { tables: html`<div class="lim" style="grid-template-columns: ${cols}">${tables}</div>`, notes };
}

// ---------------------------------------------------------------- the breakdown chart

const CW = 330, CH = 258, M = { l: 30, r: 8, t: 24, b: 26 };

function bandClass(p: number | null, levels: readonly number[]): string {
  if (p === null) return 'celln';
  const a = Math.abs(p);
  let k = 0;
  for (const l of levels) if (a > l) k++;
  return `cell${Math.min(k, 3)}`;
}

/** Prentice's error over sphere x decentration as bands of the levels, and each level's contour. */
export function breakdownChartSvg(b: Breakdown): Markup {
  const sph = b.spheres, decs = b.decentrationsMm;
  const x0 = sph[0]!, x1 = sph[sph.length - 1]!;
  const half = sph.length > 1 ? Math.abs(sph[1]! - sph[0]!) / 2 : 0.5;
  const x = scaleLinear().domain([Math.min(x0, x1) - half, Math.max(x0, x1) + half]).range([M.l, CW - M.r]);
  const dTop = decs[decs.length - 1]!;
  const dStep = decs.length > 1 ? decs[1]! - decs[0]! : dTop;
  const y = scaleLinear().domain([0, dTop + dStep / 2]).range([CH - M.b, M.t]);
  const cells: Markup[] = [];
  sph.forEach((s, i) => {
    decs.forEach((d, j) => {
      const p = b.percent[i]![j]!;
      const xa = x(s - half), xb = x(s + half), ya = y(d + dStep / 2), yb = y(Math.max(0, d - dStep / 2));
      cells.push(html`<rect class="${bandClass(p, b.levels)}" x="${coord(xa)}" y="${coord(ya)}" width="${coord(Math.max(0.1, xb - xa))}" height="${coord(Math.max(0.1, yb - ya))}"/>`);
    });
  });
  const contours = b.levels.map((l, li) => {
    const pts: [number, number][] = [];
    const segs: Markup[] = [];
    const flush = () => {
      if (pts.length > 1) segs.push(html`<path class="contour l${String(Math.min(li, 2))}" d="${line()(pts) ?? ''}"/>`);
      pts.length = 0;
    };
    b.rows.forEach((r) => {
      const mm = r.within[li];
      if (mm !== null && mm !== undefined && Number.isFinite(mm) && mm <= dTop) pts.push([x(r.sphere), y(mm)]);
      else flush();
    });
    flush();
    return segs;
  });
  const xt = x.ticks(8).map((t) => html`<line class="grid" x1="${coord(x(t))}" x2="${coord(x(t))}" y1="${coord(M.t)}" y2="${coord(CH - M.b)}"/><text class="tick" x="${coord(x(t))}" y="${coord(CH - M.b + 9)}" text-anchor="middle">${fmt(t, 0)}</text>`);
  const yt = y.ticks(6).map((t) => html`<text class="tick" x="${coord(M.l - 3)}" y="${coord(y(t) + 3)}" text-anchor="end">${fmt(t, 0)}</text>`);
  const key = b.levels.slice(0, 3).map((l, i) => html`<line class="contour l${String(i)}" x1="${coord(M.l + 4 + i * 52)}" x2="${coord(M.l + 18 + i * 52)}" y1="${coord(7)}" y2="${coord(7)}"/><text class="clbl" x="${coord(M.l + 20 + i * 52)}" y="${coord(9.5)}">${fmt(l, 0)} %</text>`);
  const bandNames = [`≤ ${fmt(b.levels[0], 0)} %`, ...b.levels.slice(1, 3).map((l, i) => `${fmt(b.levels[i], 0)}–${fmt(l, 0)} %`), `> ${fmt(b.levels[Math.min(2, b.levels.length - 1)], 0)} %`]
    .slice(0, Math.min(4, b.levels.length + 1));
  const swatches = bandNames.map((t, i) => html`<rect class="cell${String(i)} frame" x="${coord(M.l + 4 + i * 56)}" y="${coord(13)}" width="${coord(7)}" height="${coord(6)}"/><text class="tick" x="${coord(M.l + 13 + i * 56)}" y="${coord(18.5)}">${t}</text>`);
  return html`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${coord(CW)} ${coord(CH)}" class="fig" role="img" aria-label="Prentice error over sphere and decentration" data-k="breakdown-chart">
${cells}
${xt}${yt}
<rect class="frame" x="${coord(M.l)}" y="${coord(M.t)}" width="${coord(CW - M.l - M.r)}" height="${coord(CH - M.t - M.b)}" fill="none"/>
${contours}
${key}${swatches}
<text class="lbl" x="${coord((M.l + CW - M.r) / 2)}" y="${coord(CH - 4)}" text-anchor="middle">sphere, D</text>
<text class="lbl" transform="translate(9 ${coord((M.t + CH - M.b) / 2)}) rotate(-90)" text-anchor="middle">decentration, mm</text>
</svg>`;
}

function breakdownTable(b: Breakdown, decimals: number): Markup {
  const kept = thin(b.rows, SHEET_MAX_SPHERES).kept;
  const cellText = (r: Breakdown['rows'][number], i: number): string => {
    const mm = r.within[i];
    if (mm !== null && mm !== undefined) return mm < 1e-3 ? '0' : fmt(mm, decimals);
    if (r.ends[i] === 'edge') return `≥${fmt(r.searchedToMm[i], 0)}`;
    if (r.ends[i] === 'lens') return '×';
    return '—';
  };
  return html`<table class="lt" data-k="breakdown-table"><caption>Largest decentration, mm, with Prentice within</caption>
<thead><tr><th>sphere D</th>${b.levels.map((l) => html`<th>${fmt(l, 0)} %</th>`)}</tr></thead>
<tbody>${kept.map((r) => html`<tr><th>${fmtSigned(r.sphere)}</th>${b.levels.map((_, i) => html`<td>${cellText(r, i)}</td>`)}</tr>`)}</tbody></table>`;
}

/** The spec sheet as a standalone HTML document. */
export function specSheetHtml(spec: RangeSpec, rows: readonly RangeRow[], b: Breakdown, opts: SpecSheetOptions): string {
  const day = Number.isFinite(opts.date.getTime()) ? opts.date.toISOString().slice(0, 10) : '—';
  const title = opts.title?.trim() || 'Decentration limits of a lens range';
  const form = readLensForm({ ...spec.fields, sphere: spec.spheres[0], cyl: spec.cyls[0], axis: spec.axes[0] }, flagLabel);
  const material = form.materialId ? `${form.materialId} (n = ${fmt(form.index, 3)})` : `index ${fmt(form.index, 3)}`;
  const d = spec.decimals;
  const { tables, notes } = limitsTables(spec, rows, Math.min(d, 2));
  const made = rows.filter((r) => r.limitedBy !== 'lens');
  const exacts = made.map((r) => r.exact).filter((v): v is number => v !== null);
  const notMade = new Set(rows.filter((r) => r.limitedBy === 'lens').map((r) => `${r.sphere}|${r.cyl}|${r.axis}`));
  const maxDia = rows.filter((r) => r.maxDiameter !== null);
  const within10 = b.levels.indexOf(10);
  const def: [string, Part][] = [
    ['Material', material],
    ['Front curve', frontText(form.front)],
    ['Thickness', thicknessText(form.thickness)],
    ['Spheres', listText(spec.spheres, ' D')],
    ['Cylinders', listText(spec.cyls, ' D')],
    ['Axes', listText(spec.axes, '°', 0)],
    ['Directions', `${spec.directions.map((x) => (x.label.endsWith('°') ? x.label : `${x.label} (${fmt(x.deg, 0)}°)`)).join(', ')}; ${spec.eye === 'R' ? 'right' : 'left'} eye`],
    ['Tolerances', `${spec.tolerances.map((t) => fmt(t, 2)).join(', ')} Δ`],
    ['Centre of rotation', `${fmt(spec.crMm, 1)} mm behind the back vertex, on the lens axis; lens untilted`],
  ];
  const short: Part[] = [
    html`<li>${String(rows.length)} rows: ${String(rangeLensCount(spec))} lenses × ${String(spec.directions.length)} directions × ${String(spec.tolerances.length)} tolerances.</li>`,
    exacts.length ? html`<li>Exact limits from ${fmt(Math.min(...exacts), d)} to ${fmt(Math.max(...exacts), d)} mm where the tolerance is reached inside the lens.</li>` : null,
    notMade.size ? html`<li>${String(notMade.size)} lenses cannot be made as specified (× in the tables)${maxDia.length ? html`; the largest diameter that can is given per lens in the full table, e.g. ${fmtSigned(maxDia[0]!.sphere)} / ${fmtSigned(maxDia[0]!.cyl)}: ${fmt(maxDia[0]!.maxDiameter, 1)} mm` : ''}.</li>` : null,
    within10 >= 0 ? html`<li>Prentice’s rule within 10 % of the exact prism (${b.direction.label}, cyl ${fmtSigned(b.cyl)}): ${breakdownSummary(b, within10, d)}.</li>` : null,
  ];
  const doc = html`${pageHead(html`Spec sheet: ${title}`, REPORT_CSS + SHEET_CSS)}
<body>
<main class="sheet">
<header><div class="head-row"><h1 data-k="title">${title}</h1><span class="date" data-k="date">${day}</span></div>
<p class="note">Decentration limits at the eye and at the focimeter, and where Prentice’s rule stops being good enough, for every lens of the range.</p></header>
<section class="box"><h2>In short</h2><ul class="short" data-k="short">${short}</ul></section>
<section><h2>The range</h2><div class="def" data-k="definition">${def.map(([k, v]) => html`<p class="facts"><b>${k}:</b> ${v}</p>`)}</div></section>
<section><h2>Limits per tolerance</h2>
<p class="facts sub">Each cell: the smallest exact limit (line of sight from the centre of rotation) over the range’s directions and axes, mm. ≥ r: the prism stays within the tolerance out to the lens edge (radius r); ×: the lens cannot be made as specified; —: no limit found.${notes.length ? ` Shown: ${notes.join('; ')}; the full table comes from decentra limits with the same flags.` : ''}</p>
${tables}</section>
<section class="p2"><h2>Where Prentice’s rule breaks down</h2>
<p class="facts sub">Error of Prentice’s rule, 100 (|Prentice| − |exact|) / |exact|, over sphere and decentration ${b.direction.label.endsWith('°') ? `along ${b.direction.label}` : `towards ${b.direction.label}`} (cyl ${fmtSigned(b.cyl)} × ${fmt(b.axis, 0)}). Bands: within ${b.levels.map((l) => `${fmt(l, 0)} %`).join(', ')}, and beyond; white: outside the lens or no lens. Lines: the largest decentration, scanning out from the centre, at which the error stays within each level (the table).</p>
<div class="bd"><div>${breakdownChartSvg(b)}</div><div>${breakdownTable(b, 1)}</div></div></section>
<div class="foot">
<section class="method"><h2>Method</h2>
<p class="small" data-k="method">For each lens the front curve and centre thickness come from the family’s rules (or the fixed values), the back surface is solved for the back vertex power, and the lens is traced exactly: a real ray from the eye’s centre of rotation through the back-surface point at each decentration, refracted at both surfaces. The exact limit is the first decentration, scanning outwards in ${fmt(0.25, 2)} mm steps and refined by bisection, at which the prism at the eye exceeds the tolerance; the focimeter limit is found the same way with the instrument’s ray (normal to the back surface). Prentice’s limit is P / |F u| with F the power matrix (Long 1976) and u the direction; the first-order limit uses the thick lens and the centre of rotation to first order (docs/method.md). A lens that cannot be made at the asked diameter is reported with the largest diameter that can (to 0.5 mm). Assumptions: the lens is untilted with the centre of rotation on its axis at the distance given (27 mm unless set; docs/choices.md); thickness rules as in “The range”; one wavelength (the material’s n<sub>d</sub>).</p>
${opts.command ? html`<p class="small src" data-k="command">Made by: ${opts.command}</p>` : null}
</section>
<section class="caution"><h2>Cautions</h2>
<p class="small" data-k="cautions">${REPORT_CAUTIONS.join(' ')} <span class="made">Made with Decentra on ${day}.</span></p>
</section>
</div>
</main>
</body>
</html>
`;
  return doc.text;
}

function rangeLensCount(spec: RangeSpec): number {
  return spec.spheres.length * spec.cyls.length * spec.axes.length;
}

/** One line on the 10 % contour: where Prentice is within it at 10 mm, and where not at all. */
function breakdownSummary(b: Breakdown, li: number, d: number): string {
  const at = (mm: number) => b.rows.filter((r) => r.ends[li] !== 'lens' && (r.within[li] === null || (r.within[li] ?? 0) >= mm)).map((r) => r.sphere);
  const ok10 = at(10);
  const never = b.rows.filter((r) => r.within[li] !== null && r.within[li]! < 1e-3).length;
  const span = ok10.length ? `out to at least 10 mm for spheres ${fmtSigned(Math.min(...ok10), d)} to ${fmtSigned(Math.max(...ok10), d)} D (${ok10.length} of ${b.rows.length})` : 'nowhere out to 10 mm';
  return `${span}; already beyond 10 % next to the centre for ${String(never)} spheres`;
}
