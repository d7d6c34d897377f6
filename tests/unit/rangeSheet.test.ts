/**
 * The range's spec sheet (src/report/specSheet.ts, `decentra spec`): a standalone page with no
 * script, the cautions, and at most two printed A4 or Letter pages (Chromium's print to PDF,
 * counted by poppler's pdfinfo, as tests/unit/report.test.ts does for the clinician summary).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { breakdown, rangeRows, readRangeSpec } from '../../src/case/range.ts';
import { run } from '../../src/cli/main.ts';
import { specSheetHtml } from '../../src/report/specSheet.ts';
import { REPORT_CAUTIONS } from '../../src/report/summary.ts';
import { esc } from '../../src/report/html.ts';

const DATE = new Date(Date.UTC(2026, 11, 2));
// invented scenarios: a full product range (the issue's), a small one, and a fixed-form one with many tolerances
const SHEETS = [
  { name: 'full', input: { power: '-20:20:0.25', cyl: '0:-4:-0.5', dir: '0:315:45', maxPrism: '0.25,0.5,1', fields: {} } },
  { name: 'small', input: { power: '-4:4:1', dir: 'nasal,up', maxPrism: '0.5', fields: { material: 'resin-1.67' } } },
  { name: 'fixed', input: { power: '-8:8:0.5', cyl: '-0.5,-1.25,-3', axis: '15,95', dir: 'temporal', maxPrism: '0.1,0.25,0.5,1,2', fields: { front: '5', ct: '3', diameter: '55', eye: 'L' } } },
].map((s) => {
  const spec = readRangeSpec(s.input);
  return { ...s, page: specSheetHtml(spec, rangeRows(spec), breakdown(spec), { date: DATE, title: `Range ${s.name} (invented scenario)` }) };
});

describe.each(SHEETS)('spec sheet $name', ({ page }) => {
  it('is a standalone page: no script, no external reference, a CSP', () => {
    expect(page.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(page).toMatch(/<meta http-equiv="Content-Security-Policy" content="default-src 'none';/);
    expect(page).not.toMatch(/<script/i);
    expect(page).not.toMatch(/\b(src|href)=/i);
    expect(page).not.toMatch(/<[^>]+\son\w+=/i);
    expect(page).not.toMatch(/NaN|Infinity/);
  });
  it('shows the cautions, the method, the range and the breakdown', () => {
    for (const c of REPORT_CAUTIONS) expect(page).toContain(esc(c));
    for (const k of ['definition', 'method', 'breakdown-chart', 'breakdown-table', 'cautions', 'short']) expect(page).toContain(`data-k="${k}"`);
    expect(page).toContain('2026-12-02');
  });
});

describe('decentra spec', () => {
  it('writes the sheet with --out; a bad flag names itself', () => {
    const dir = mkdtempSync(join(tmpdir(), 'decentra-spec-'));
    try {
      const out = join(dir, 'sheet.html');
      const r = run(['spec', '--power', '-6:6:2', '--max-prism', '0.5,1', '--dir', 'nasal', '--date', '2026-12-02', '--out', out]);
      expect(r.code).toBe(0);
      const page = readFileSync(out, 'utf8');
      expect(page).toContain('decentra spec --power -6:6:2 --max-prism 0.5,1 --dir nasal');
      expect(run(['spec', '--power', '-6:6:2', '--max-prism', '0.5', '--levels', '10,-5']).err).toMatch(/^decentra spec: --levels: must be greater than 0/);
    } finally { rmSync(dir, { recursive: true, force: true }); }
  });
});

const CHROMIUM = '/usr/bin/chromium';
const havePrint = existsSync(CHROMIUM) && spawnSync('pdfinfo', ['-v']).error === undefined;

describe('printing', () => {
  if (!havePrint && process.env.CI) {
    it('has Chromium and pdfinfo in CI', () => { throw new Error(`the print check needs ${CHROMIUM} and pdfinfo (poppler-utils)`); });
    return;
  }
  const dir = havePrint ? mkdtempSync(join(tmpdir(), 'decentra-spec-print-')) : '';
  afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });
  const jobs = SHEETS.flatMap((s) => [
    { name: `${s.name}-letter`, page: s.page, css: '@page { size: letter portrait; }', size: /612 x 792/ },
    { name: `${s.name}-a4`, page: s.page, css: '@page { size: A4 portrait; }', size: /59[45](\.\d+)? x 841/ },
  ]);
  it.runIf(havePrint).each(jobs)('$name prints on at most two sheets', ({ name, page, css, size }) => {
    const html = join(dir, `${name}.html`), pdf = join(dir, `${name}.pdf`);
    writeFileSync(html, page.replace('</style>', `${css}</style>`));
    const r = spawnSync(CHROMIUM, [
      '--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', `--user-data-dir=${join(dir, `profile-${name}`)}`,
      '--no-pdf-header-footer', `--print-to-pdf=${pdf}`, pathToFileURL(html).href,
    ], { encoding: 'utf8', timeout: 60_000 });
    if (!existsSync(pdf)) throw new Error(`chromium printed nothing (status ${r.status}): ${r.stderr.slice(-400)}`);
    const info = spawnSync('pdfinfo', [pdf], { encoding: 'utf8' }).stdout;
    expect(/^Page size:\s+(.*)$/m.exec(info)?.[1]).toMatch(size);
    const pages = Number(/^Pages:\s+(\d+)/m.exec(info)?.[1]);
    expect(pages).toBeGreaterThanOrEqual(1);
    expect(pages).toBeLessThanOrEqual(2);
  }, 90_000);
});
