// The clinician summary (src/report, `decentra report`): every required part is there, its
// numbers are the engine's, user text cannot become markup, nothing non-finite is printed, the
// SVG is well-formed XML, and the page prints to exactly one A4 or Letter sheet in Chromium.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { type BinocularCase, readCase } from '../../src/case/caseFile.ts';
import { type FitReport, evaluateFit } from '../../src/case/fit.ts';
import { pairJson } from '../../src/cli/fit.ts';
import { run } from '../../src/cli/main.ts';
import { type PrismDescription, isFailure } from '../../src/optics/index.ts';
import { esc, fmt, html } from '../../src/report/html.ts';
import { REPORT_CAUTIONS, summaryHtml } from '../../src/report/summary.ts';

const EXAMPLES = ['examples/anisometropic-reader.json', 'examples/wide-frame-minus.json'];
const DATE = new Date(Date.UTC(2025, 2, 14));

const exampleDoc = (path: string): Record<string, any> => JSON.parse(readFileSync(path, 'utf8'));

/** Invented: the left lens is cut too small (16 mm) for a reading point about 12 mm below its centre. */
const NO_SIGHT_DOC = {
  format: 'decentra-case', version: 1,
  title: 'Invented scenario: the left lens is too small for the reading point, so its line of sight misses it',
  note: 'Made up to test the summary; not a real wearer.',
  target: { kind: 'near', distance: 400, below: 150 },
  right: { sphere: 1.0, material: 'resin-1.60', ct: 2.5, pd: 32 },
  left: { sphere: 4.5, material: 'resin-1.60', ct: 5.0, diameter: 16, pd: 32 },
};

/** Invented: every field filled, long title and note, toric lenses, tilt, custom tolerance. */
const LONG_DOC = {
  format: 'decentra-case', version: 1,
  title: ('Invented scenario: a long description of a made-up wearer with a toric prescription, a tilted frame, ' +
    'a custom tolerance and a right lens that is just big enough, written to fill the title field to its limit').slice(0, 200),
  note: 'A long invented note. '.repeat(180),
  frame: { a: 54, b: 38, dbl: 17 }, pantoDeg: 10, wrapDeg: 5,
  target: { kind: 'near', distance: 350, below: 120, lateral: -20 },
  tolerance: { profile: 'custom', horizontal: 0.5, vertical: 0.25 },
  right: {
    sphere: -2.25, cyl: -1.5, axis: 175, index: 1.59, abbe: 31, base: 4, minEdge: 1.2, minCt: 1.8, diameter: 62,
    frontK: -0.4, pd: 31.5, cr: 25, decentration: 2, fittingHeight: 19, ocHeight: 21,
  },
  left: { sphere: 3.75, cyl: -2, axis: 10, material: 'polycarbonate', frontRule: 'steps:-20=0.5,-4=3,0=6,4=9', pd: 33, decentration: 1.5, fittingHeight: 18 },
};

interface Made { name: string; c: BinocularCase; f: FitReport; page: string }

function make(name: string, doc: unknown): Made {
  const c = readCase(doc);
  const f = evaluateFit(c);
  return { name, c, f, page: summaryHtml(c, f, { date: DATE }) };
}

const CASES: Made[] = [
  ...EXAMPLES.map((p) => make(p, exampleDoc(p))),
  make('invented: no line of sight for the left eye', NO_SIGHT_DOC),
  make('invented: long title and note, every field', LONG_DOC),
];

/** Text content of the element carrying data-k="key" (tags removed, entities of esc() decoded). */
function cell(page: string, key: string): string {
  const m = new RegExp(`<(td|li|p|span)\\b[^>]*data-k="${key}"[^>]*>([\\s\\S]*?)</\\1>`).exec(page);
  if (!m) throw new Error(`no element with data-k="${key}"`);
  return decode(m[2]!.replace(/<[^>]*>/g, ' ')).replace(/\s+/g, ' ').replace(/ ([;,.)])/g, '$1').trim();
}

function decode(s: string): string {
  return s.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&amp;/g, '&');
}

// Expected wording built here from the engine's described prism with toFixed: an independent
// formatting of the same numbers (DESIGN §6 base labels; 360° notation whole degrees).
function expectedWords(p: PrismDescription): string {
  const parts: string[] = [];
  if (p.horizontal.base && p.horizontal.amount.toFixed(2) !== '0.00') parts.push(`${p.horizontal.amount.toFixed(2)} Δ base ${p.horizontal.base}`);
  if (p.vertical.base && p.vertical.amount.toFixed(2) !== '0.00') parts.push(`${p.vertical.amount.toFixed(2)} Δ base ${p.vertical.base}`);
  return parts.join(', ');
}
const expected360 = (p: PrismDescription): string => `${p.magnitude.toFixed(2)} Δ base ${Math.round(p.baseAngle) % 360}°`;

/**
 * A small XML well-formedness check (no library in the project parses XML): every tag is
 * closed in order, attributes are quoted and unique, character data has no raw '<' and only
 * the entities that esc() writes. `voids` lists HTML elements without an end tag.
 */
function checkWellFormed(text: string, voids: readonly string[] = []): { elements: number } {
  const stack: string[] = [];
  let elements = 0;
  const tag = /<(\/?)([a-zA-Z][\w:-]*)((?:\s+[\w:-]+(?:="[^"<]*")?)*)\s*(\/?)>|<!DOCTYPE html>|<!--[\s\S]*?-->/g;
  let last = 0;
  const checkText = (t: string, at: number): void => {
    if (t.includes('<')) throw new Error(`raw '<' in text at ${at}: ${t.slice(0, 60)}`);
    for (const m of t.matchAll(/&[^;\s]*;?/g)) {
      if (!/^&(amp|lt|gt|quot|#39);$/.test(m[0])) throw new Error(`bad entity ${m[0]} at ${at}`);
    }
  };
  for (const m of text.matchAll(tag)) {
    checkText(text.slice(last, m.index), last);
    last = m.index! + m[0].length;
    if (!m[2]) continue; // doctype or comment
    const [, close, name, attrs, selfClose] = m;
    const seen = new Set<string>();
    for (const a of attrs!.matchAll(/([\w:-]+)(=("[^"]*"))?/g)) {
      if (!a[3] && !voids.includes(name!)) throw new Error(`attribute ${a[1]} of <${name}> has no quoted value`);
      if (a[3]) checkText(a[3].slice(1, -1), m.index!);
      if (seen.has(a[1]!)) throw new Error(`attribute ${a[1]} repeated in <${name}>`);
      seen.add(a[1]!);
    }
    if (close) {
      const open = stack.pop();
      if (open !== name) throw new Error(`</${name}> closes <${open}> at ${m.index}`);
    } else {
      elements++;
      if (!selfClose && !voids.includes(name!.toLowerCase())) stack.push(name!);
    }
  }
  checkText(text.slice(last), last);
  if (stack.length) throw new Error(`unclosed: ${stack.join(' > ')}`);
  return { elements };
}

const svgs = (page: string): string[] => page.match(/<svg[\s\S]*?<\/svg>/g) ?? [];

describe('html.ts: one escape, one number format', () => {
  it('escapes the five XML-significant characters (W3C XML 1.0 §2.4, predefined entities)', () => {
    expect(esc(`<a href="x">&'`)).toBe('&lt;a href=&quot;x&quot;&gt;&amp;&#39;');
  });

  it('html`` escapes interpolated text and refuses raw numbers', () => {
    expect(html`<p>${'<b>'}</p>`.text).toBe('<p>&lt;b&gt;</p>');
    expect(() => html`<p>${3 as unknown as string}</p>`).toThrow(/format numbers/);
  });

  it('fmt prints a dash for missing and non-finite values and never "-0.00"', () => {
    expect(fmt(NaN)).toBe('—');
    expect(fmt(Infinity)).toBe('—');
    expect(fmt(-Infinity)).toBe('—');
    expect(fmt(null)).toBe('—');
    expect(fmt(undefined)).toBe('—');
    expect(fmt(-0.001)).toBe('0.00');
    expect(fmt(2.345, 1)).toBe('2.3');
  });
});

describe.each(CASES)('summary of $name', ({ c, f, page }) => {
  it('is a complete standalone HTML document with no script and no external resource', () => {
    expect(page.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(page).toMatch(/<meta charset="utf-8">/);
    expect(page).toMatch(/<style>[\s\S]*@page[\s\S]*<\/style>/);
    expect(page).toMatch(/@media print/);
    expect(page).not.toMatch(/<script/i);
    expect(page).not.toMatch(/\b(src|href)=/i);
    expect(page).not.toMatch(/<[^>]+\son\w+=/i); // no event-handler attribute
    checkWellFormed(page, ['meta', 'br']);
  });

  it('has every required part', () => {
    for (const heading of ['In short', 'What was entered', 'Prism at each eye', 'The line of sight through each lens', 'How to read the numbers', 'Cautions']) {
      expect(page).toContain(`<h2>${heading}`);
    }
    expect(cell(page, 'date')).toBe('2025-03-14');
    expect(cell(page, 'title')).toBe(c.doc.title);
    for (const k of ['R-rx', 'L-rx', 'R-lens', 'L-lens', 'R-pd', 'L-pd', 'R-oc', 'L-oc', 'tilt', 'target', 'profile']) expect(cell(page, k)).not.toBe('');
    expect(cell(page, 'profile')).toContain(f.profile.name);
    expect(cell(page, 'profile')).toContain(f.profile.source);
    expect(cell(page, 'slab-off')).toMatch(/^Slab-off: /);
    for (const t of REPORT_CAUTIONS) expect(cell(page, 'cautions')).toContain(t);
    // method note: which answer is which
    for (const w of ["Prentice's rule", 'first-order', 'exact', 'focimeter']) expect(page).toContain(`<b>${w}</b>`);
    // two cross-sections and two plots
    expect(svgs(page)).toHaveLength(4);
  });

  it('prints the engine\'s lens form: prescription, index, front power, centre thickness, PD', () => {
    for (const [s, e] of [['right', 'R'], ['left', 'L']] as const) {
      const lens = f.lenses[s];
      expect(cell(page, `${e}-rx`)).toContain(Math.abs(lens.spec.sphereD).toFixed(2));
      expect(cell(page, `${e}-lens`)).toContain(`n ${lens.index.toFixed(3)}`);
      expect(cell(page, `${e}-lens`)).toContain(`${Math.abs(lens.spec.frontD).toFixed(2)} D`);
      expect(cell(page, `${e}-lens`)).toContain(`centre ${lens.ctMm.toFixed(2)} mm`);
      expect(cell(page, `${e}-pd`)).toContain(`PD ${c[s].pdMm.toFixed(1)} mm`);
      expect(cell(page, `${e}-pd`)).toContain(`${c[s].crMm.toFixed(1)} mm`);
    }
  });

  it('prints each eye\'s four answers exactly as the engine gives them, in words and in 360° notation', () => {
    for (const [s, e] of [['right', 'R'], ['left', 'L']] as const) {
      const r = f.result[s];
      if (!r.answers) {
        expect(cell(page, `${e}-vp`)).toContain(r.fixation.message);
        expect(cell(page, `${e}-short`)).toContain('no line of sight');
        continue;
      }
      for (const which of ['prentice', 'paraxial', 'exact', 'focimeter'] as const) {
        const a = r.answers[which];
        if (isFailure(a)) {
          expect(cell(page, `${e}-${which}`)).toContain(a.message);
          continue;
        }
        expect(cell(page, `${e}-${which}`)).toBe(expectedWords(a));
        expect(cell(page, `${e}-${which}-360`)).toBe(expected360(a));
      }
      if (!isFailure(r.answers.exact)) {
        expect(cell(page, `${e}-short`)).toContain(`${expectedWords(r.answers.exact)}, ${s} eye`);
      }
    }
  });

  it('Prentice\'s rule on the page is power × decentration in cm at the visual point (Prentice\'s rule, P = c F)', () => {
    // spherical lenses only: |P| = |F| · |c| / 10 with c in mm (any ophthalmic optics handbook)
    for (const [s, e] of [['right', 'R'], ['left', 'L']] as const) {
      const r = f.result[s];
      const lens = f.lenses[s];
      if (!r.answers || lens.spec.cylD !== 0) continue;
      const p = (Math.abs(lens.spec.sphereD) * Math.hypot(r.fromOcMm.x, r.fromOcMm.y)) / 10;
      expect(cell(page, `${e}-prentice-360`)).toMatch(new RegExp(`^${p.toFixed(2)} Δ`));
    }
  });

  it('prints the binocular values and verdicts of `decentra fit`', () => {
    const pair = (p: any): string[] => !p ? ['—', '—'] : [
      p.netHorizontal.base ? `${p.netHorizontal.amount.toFixed(2)} Δ base ${p.netHorizontal.base}` : 'none (under 0.005 Δ)',
      p.verticalImbalance.baseUpEye ? `${p.verticalImbalance.amount.toFixed(2)} Δ, ${p.verticalImbalance.baseUpEye === 'R' ? 'right' : 'left'} eye base up` : 'none (under 0.005 Δ)',
    ];
    const [h, v] = pair(pairJson(f.result.exact));
    const [hp, vp] = pair(pairJson(f.result.prentice));
    expect(cell(page, 'net-h')).toBe(h);
    expect(cell(page, 'vert')).toBe(v);
    expect(cell(page, 'net-h-prentice')).toBe(hp);
    expect(cell(page, 'vert-prentice')).toBe(vp);
    if (!f.verdicts) {
      expect(cell(page, 'verdict-none')).toMatch(/No verdict/);
      return;
    }
    for (const vd of f.verdicts) {
      expect(cell(page, `verdict-${vd.component}-value`)).toBe(`${vd.value.toFixed(2)} ${vd.unit}`);
      expect(cell(page, `verdict-${vd.component}-margin`).replace('\u2212', '-')).toBe(`${vd.margin > 0 ? '+' : ''}${vd.margin.toFixed(2)} ${vd.unit}`);
      expect(cell(page, `verdict-${vd.component}`)).toBe(vd.pass ? 'within' : 'OUT');
    }
  });

  it('never prints NaN, Infinity, undefined or null', () => {
    expect(page).not.toMatch(/NaN|Infinity|undefined|\bnull\b/);
  });

  it('has well-formed SVG: drawings to scale, one ray path per eye that has a line of sight', () => {
    const all = svgs(page);
    for (const s of all) expect(checkWellFormed(s).elements).toBeGreaterThanOrEqual(3);
    for (const [i, side] of [[0, 'right'], [2, 'left']] as const) {
      const sec = all[i]!, plot = all[i + 1]!;
      const r = f.result[side];
      expect(sec).toMatch(/class="lens" points="/);
      const bar = /class="bar" x1="([\d.]+)"[^>]*x2="([\d.]+)"/.exec(sec)!;
      const mmPerUnit = 10 / (Number(bar[2]) - Number(bar[1]));
      if (!r.answers) {
        expect(sec).not.toMatch(/class="ray/);
        expect(plot).not.toMatch(/<path/);
        continue;
      }
      expect(sec.match(/class="ray(-glass)?"/g)).toHaveLength(3); // eye side, in the lens, object side
      expect(plot.match(/<path class="c-/g)).toHaveLength(4); // Prentice, first-order, exact, focimeter
      // to scale: the centre of rotation is drawn crMm behind the back vertex (plus any offset from tilt)
      const cr = /class="cr" cx="([\d.]+)"/.exec(sec)!, oc = /class="oc" cx="([\d.]+)"/.exec(sec)!;
      const drawnMm = (Number(oc[1]) - Number(cr[1])) * mmPerUnit;
      expect(drawnMm).toBeCloseTo(-r.fixation.trace.sz, 1);
    }
  });
});

describe('user text cannot become markup', () => {
  const hostile = {
    ...NO_SIGHT_DOC,
    title: '<img src=x onerror=alert(1)>',
    note: '</p><script>alert("n")</script><svg onload=alert(2)> & "quotes" \'single\'',
  };
  const page = make('hostile', hostile).page;

  it('shows the title and note as text, escaped', () => {
    expect(page).toContain('&lt;img src=x onerror=alert(1)&gt;');
    expect(page).not.toContain('<img');
    expect(page).not.toMatch(/<script/i);
    expect(page).not.toMatch(/<svg onload/i);
    expect(cell(page, 'title')).toBe(hostile.title);
    expect(cell(page, 'note')).toBe(hostile.note);
    expect(page).toContain('<title>Prism summary: &lt;img src=x onerror=alert(1)&gt;</title>');
    checkWellFormed(page, ['meta', 'br']);
  });

  it('shortens a long note and says so; an untitled case is called so', () => {
    const long = make('long', LONG_DOC).page;
    expect(cell(long, 'note')).toMatch(/… \(shortened; the full note is in the case file\)$/);
    const { title: _t, ...untitled } = NO_SIGHT_DOC;
    expect(cell(make('untitled', untitled).page, 'title')).toBe('Untitled case');
  });
});

describe('decentra report', () => {
  const dir = mkdtempSync(join(tmpdir(), 'decentra-report-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('prints the page to stdout, dated as asked, the same as summaryHtml', () => {
    const r = run(['report', EXAMPLES[0]!, '--date', '2025-03-14']);
    expect(r.code).toBe(0);
    expect(r.out).toBe(CASES[0]!.page);
  });

  it('writes the page with --out (also as --out=FILE)', () => {
    const out = join(dir, 'summary.html');
    const r = run(['report', EXAMPLES[1]!, `--out=${out}`, '--date=2025-03-14']);
    expect(r.code).toBe(0);
    expect(r.out).toContain(out);
    expect(readFileSync(out, 'utf8')).toBe(CASES[1]!.page);
  });

  it('dates the page today without --date', () => {
    const now = new Date();
    const day = `${now.getFullYear()}-${String(now.getMonth() + 1).padStart(2, '0')}-${String(now.getDate()).padStart(2, '0')}`;
    expect(cell(run(['report', EXAMPLES[0]!]).out, 'date')).toBe(day);
  });

  it('refuses bad input with one line naming the flag or field', () => {
    const cases: [string[], RegExp][] = [
      [['report', EXAMPLES[0]!, '--date', '2025-02-30'], /--date: is not a calendar date/],
      [['report', EXAMPLES[0]!, '--date', '14/03/2025'], /--date: must be a date as YYYY-MM-DD/],
      [['report', EXAMPLES[0]!, '--out'], /--out: needs a value/],
      [['report', EXAMPLES[0]!, '--pdf'], /--pdf: is not a known flag/],
      [['report'], /CASE\.json: give exactly one case file/],
      [['report', join(dir, 'missing.json')], /missing\.json: cannot be read/],
      [['report', EXAMPLES[0]!, '--out', join(dir, 'no-such-dir', 'x.html')], /--out: cannot write/],
    ];
    for (const [argv, msg] of cases) {
      const r = run(argv);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(msg);
      expect(r.err!.split('\n')).toHaveLength(1);
    }
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, JSON.stringify({ ...NO_SIGHT_DOC, right: { ...NO_SIGHT_DOC.right, pd: 'wide' } }));
    expect(run(['report', bad]).err).toMatch(/bad\.json: right\.pd/);
  });

  it('has --help and is listed in the main help', () => {
    expect(run(['report', '--help']).out).toMatch(/Usage: decentra report CASE\.json/);
    expect(run(['--help']).out).toMatch(/\n {2}report /);
  });
});

// Print check: Chromium prints the page to PDF; poppler's pdfinfo counts the pages. CI installs
// both (npm run setup:browser); there a missing tool is a failure, not a skip.
const CHROMIUM = '/usr/bin/chromium';
const havePrint = existsSync(CHROMIUM) && spawnSync('pdfinfo', ['-v']).error === undefined;
const PRINT_MISSING = `the print check needs ${CHROMIUM} and pdfinfo (poppler-utils): run "npm run setup:browser"`;

describe('printing', () => {
  if (!havePrint && process.env.CI) {
    it('has Chromium and pdfinfo in CI', () => {
      throw new Error(PRINT_MISSING);
    });
    return;
  }
  const dir = havePrint ? mkdtempSync(join(tmpdir(), 'decentra-print-')) : '';
  afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

  function printPages(name: string, page: string, pageCss: string): { pages: number; size: string } {
    const html = join(dir, `${name}.html`), pdf = join(dir, `${name}.pdf`);
    writeFileSync(html, page.replace('</style>', `${pageCss}</style>`));
    const r = spawnSync(CHROMIUM, [
      '--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', `--user-data-dir=${join(dir, `profile-${name}`)}`,
      '--no-pdf-header-footer', `--print-to-pdf=${pdf}`, pathToFileURL(html).href,
    ], { encoding: 'utf8', timeout: 60_000 });
    if (!existsSync(pdf)) throw new Error(`chromium printed nothing (status ${r.status}): ${r.stderr.slice(-400)}`);
    const info = spawnSync('pdfinfo', [pdf], { encoding: 'utf8' }).stdout;
    return { pages: Number(/^Pages:\s+(\d+)/m.exec(info)?.[1]), size: /^Page size:\s+(.*)$/m.exec(info)?.[1] ?? '' };
  }

  const jobs = [
    ...CASES.map((k, i) => ({ name: `letter-${i}`, k, css: '@page { size: letter portrait; }', size: /612 x 792/ })),
    ...CASES.map((k, i) => ({ name: `a4-${i}`, k, css: '@page { size: A4 portrait; }', size: /59[45](\.\d+)? x 841/ })),
  ];
  it.runIf(havePrint).each(jobs)('$k.name prints on one sheet ($css)', ({ name, k, css, size }) => {
    const r = printPages(name, k.page, css);
    expect(r.size).toMatch(size);
    expect(r.pages).toBe(1);
  }, 90_000);
});
