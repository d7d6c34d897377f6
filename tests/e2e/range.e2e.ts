/**
 * End-to-end checks of the "Range" workspace in Debian's Chromium.
 *
 * What the page shows is checked against: Prentice's rule itself (prism = decentration x
 * power, P = c F with c in cm; for a spherical lens the limit is 10 P / |F| mm; C. F.
 * Prentice, 1890, Archives of Ophthalmology, restated in M. Jalie, "The Principles of
 * Ophthalmic Lenses"; from memory); the meaning of an
 * exact limit (the exact prism at the eye there equals the tolerance: read back from the
 * single-lens view the cell opens); the range module run here in Node on the same family
 * (src/case/range.ts, the rows the CLI prints); and the built command `decentra limits`, whose
 * bytes the export must equal.
 */
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { type Page, expect, test } from '@playwright/test';
import { type RangeRow, rangeRows, readRangeSpec } from '../../src/case/range.ts';
import { DEFAULT_FAMILY, type FamilyForm, rangeInput } from '../../src/ui/range/family.ts';
import { SHOTS, expectNoNonFinite, openApp, panelValue, watchErrors } from './helpers.ts';

let errors: string[] = [];
test.beforeEach(({ page }) => {
  errors = watchErrors(page);
});
test.afterEach(() => {
  expect(errors, 'console errors').toEqual([]);
});

interface RangeHook {
  updates: number;
  valid: boolean;
  lastAnswerMs: number;
  rows(): number;
  form(): FamilyForm;
  commandWords(c: 'limits' | 'spec'): string[];
}
type Hooked = { __decentra: { range(): RangeHook | null; viewCase(): Record<string, string>; updates: number; workspace(): string } };

/** The range workspace's state as the test hook reports it. */
const state = (page: Page): Promise<{ updates: number; valid: boolean; rows: number; form: FamilyForm }> =>
  page.evaluate(() => {
    const h = (window as unknown as Hooked).__decentra.range()!;
    return { updates: h.updates, valid: h.valid, rows: h.rows(), form: h.form() };
  });

/** Open the app on the Range tab and wait for its first table. */
async function openRange(page: Page): Promise<void> {
  await openApp(page);
  await page.locator('#workspace-switch button[data-workspace="range"]').click();
  await page.waitForFunction(() => {
    const r = (window as unknown as Hooked).__decentra.range();
    return !!r && r.updates > 0 && r.valid;
  });
}

function rangeField(page: Page, key: string) {
  return page.locator(`#workspace-range input[data-range-field="${key}"]`);
}

/** Type into a family field and wait for the table that answers it. */
async function setFamily(page: Page, key: string, value: string): Promise<void> {
  const before = (await state(page)).updates;
  await rangeField(page, key).fill(value);
  await page.waitForFunction((n) => (window as unknown as Hooked).__decentra.range()!.updates > n, before);
}

/** The limits the page shows, as full-precision numbers (null for a dash), row by row. */
async function shownLimits(page: Page, col: 'exact' | 'firstOrder' | 'prentice' | 'focimeter'): Promise<(number | null)[]> {
  return page.locator(`#workspace-range table.range-table tbody td.limit-${col}`).evaluateAll((tds) =>
    tds.map((td) => {
      const b = td.querySelector('button');
      return b ? Number(b.dataset.value) : null;
    }));
}

function expectedRows(f: FamilyForm): RangeRow[] {
  return rangeRows(readRangeSpec(rangeInput(f)));
}

function cli(args: string[]): string {
  return execFileSync('node', ['bin/decentra.mjs', ...args], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
}

test('the Range tab opens on the example family: its rows, Prentice’s rule, the chart and the cautions', async ({ page }) => {
  await openRange(page);
  await expect(page.locator('#workspace-range')).toBeVisible();
  await expect(page.locator('#workspace-single')).toBeHidden();
  // the example family: spheres -8 to +8 in 0.5 steps (33), four directions, one tolerance
  expect((await state(page)).rows).toBe(33 * 4);
  await expect(page.locator('#workspace-range table.range-table tbody tr')).toHaveCount(132);

  // the range module in Node on the same family gives the same limits (rows in the same order)
  const rows = expectedRows(DEFAULT_FAMILY);
  for (const col of ['exact', 'firstOrder', 'prentice', 'focimeter'] as const) {
    const shown = await shownLimits(page, col);
    expect(shown).toHaveLength(rows.length);
    shown.forEach((v, i) => {
      const e = rows[i]![col];
      if (e === null) expect(v, `${col} row ${i}`).toBeNull();
      else expect(v!, `${col} row ${i}`).toBeCloseTo(e, 9);
    });
  }

  // Prentice's rule, P = c F (c in cm): a 0.5 Δ tolerance on a spherical lens of F dioptres
  // allows c = 10 x 0.5 / |F| mm in every direction; plano has no limit by the rule
  const prentice = await shownLimits(page, 'prentice');
  const spheres = Array.from({ length: 33 }, (_, i) => -8 + 0.5 * i);
  spheres.forEach((F, i) => {
    for (let d = 0; d < 4; d++) {
      const v = prentice[4 * i + d]!;
      if (F === 0) expect(v).toBeNull();
      else expect(v).toBeCloseTo(5 / Math.abs(F), 9);
    }
  });
  const planoNote = page.locator('#workspace-range table.range-table tbody tr').nth(16 * 4).locator('td.note');
  await expect(planoNote).toContainText('no limit by Prentice');

  // the breakdown chart has its contour lines and the table its levels (default 5, 10, 20 %)
  await expect(page.locator('#workspace-range .range-breakdown thead th')).toHaveText(['sphere D', 'within 5 %', 'within 10 %', 'within 20 %']);
  expect(await page.locator('#workspace-range .range-contour[data-level]').count()).toBeGreaterThan(0);
  await expect(page.locator('#workspace-range .range-caution')).toContainText('computation aid');
  await expect(page.locator('#workspace-range .range-caution')).toContainText('focimeter');
  await expect(page.locator('#workspace-range .range-caution')).toContainText('local regulations and licensed practice');
  await expect(page.locator('.caution')).toBeVisible();
  await expectNoNonFinite(page);
  await page.screenshot({ path: `${SHOTS}/range-open.png` });
});

test('a change of family updates the table; a bad value names its field and keeps the last table', async ({ page }) => {
  await openRange(page);
  await setFamily(page, 'power', '2:6:1');
  await setFamily(page, 'dir', 'nasal,up');
  await setFamily(page, 'maxPrism', '0.25,1');
  // 5 spheres x 2 directions x 2 tolerances
  await expect(page.locator('#workspace-range table.range-table tbody tr')).toHaveCount(20);
  const form = (await state(page)).form;
  const rows = expectedRows(form);
  expect(rows).toHaveLength(20);
  const exact = await shownLimits(page, 'exact');
  exact.forEach((v, i) => expect(v!).toBeCloseTo(rows[i]!.exact!, 9));
  // a tolerance four times larger never gives a smaller limit (row pairs: 0.25 then 1)
  for (let i = 0; i < 20; i += 2) expect(exact[i + 1]!).toBeGreaterThan(exact[i]!);
  const first = page.locator('#workspace-range table.range-table tbody tr').first().locator('td');
  await expect(first.nth(0)).toHaveText('2.00');
  await expect(first.nth(3)).toHaveText('nasal');
  await expect(first.nth(4)).toHaveText('0.25');

  // a thicker family (centre thickness fixed at 6 mm) moves the exact limits, not Prentice's
  await page.locator('#workspace-range select[data-range-field="thicknessMode"]').selectOption({ label: 'Centre thickness' });
  await setFamily(page, 'ct', '6');
  const rows6 = expectedRows((await state(page)).form);
  const exact6 = await shownLimits(page, 'exact');
  exact6.forEach((v, i) => expect(v!).toBeCloseTo(rows6[i]!.exact!, 9));
  expect(exact6).not.toEqual(exact);
  expect(rows6.every((r) => r.ct === 6)).toBe(true);

  // a bad value: the message names the field and the reason; the last table stays, marked stale
  await rangeField(page, 'power').fill('2:6:0');
  await expect(page.locator('#range-err-power')).toBeVisible();
  await expect(page.locator('#range-err-power')).toContainText('spheres');
  await expect(page.locator('#workspace-range .range-status')).toHaveAttribute('data-state', 'invalid');
  await expect(page.locator('#workspace-range .range-table-wrap')).toHaveClass(/stale/);
  await expect(page.locator('#workspace-range table.range-table tbody tr')).toHaveCount(20);
  await page.screenshot({ path: `${SHOTS}/range-invalid.png` });
  await setFamily(page, 'power', '2:6:2');
  await expect(page.locator('#range-err-power')).toBeHidden();
  await expect(page.locator('#workspace-range table.range-table tbody tr')).toHaveCount(12);
  await expectNoNonFinite(page);
});

test('a cell opens that lens in the single-lens view at that decentration, where the exact prism is the tolerance', async ({ page }) => {
  await openRange(page);
  await setFamily(page, 'power', '4:8:2');
  await setFamily(page, 'cyl', '-2');
  await setFamily(page, 'axis', '30');
  await setFamily(page, 'dir', 'temporal');
  // rows: +4, +6, +8 / -2.00 x 30, temporal (180° for a right eye), 0.5 Δ
  const rows = expectedRows((await state(page)).form);
  expect(rows).toHaveLength(3);
  const r = rows[1]!;
  expect(r.sphere).toBe(6);
  expect(r.exact).not.toBeNull();
  const cell = page.locator('#workspace-range table.range-table tbody tr').nth(1).locator('td.limit-exact button');
  const updates = await page.evaluate(() => (window as unknown as Hooked).__decentra.updates);
  await cell.click();
  await page.waitForFunction((n) => (window as unknown as Hooked).__decentra.updates > n, updates);
  await expect(page.locator('#workspace-single')).toBeVisible();
  await expect(page.locator('#workspace-range')).toBeHidden();
  expect(await page.evaluate(() => (window as unknown as Hooked).__decentra.workspace())).toBe('single');
  const vc = await page.evaluate(() => (window as unknown as Hooked).__decentra.viewCase());
  expect([vc.sphere, vc.cyl, vc.axis, vc.eye, vc.material, vc.pointMode, vc.dir]).toEqual(['6', '-2', '30', 'R', 'resin-1.60', 'polar', '180']);
  const dist = Number(vc.dist);
  expect(dist).toBeLessThanOrEqual(r.exact!);
  expect(dist).toBeGreaterThan(r.exact! - 0.011);
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'current');
  // the exact limit is where the exact prism at the eye reaches the tolerance: the single-lens
  // view shows 0.5 Δ there (a little less: the point is the limit rounded down to 0.01 mm)
  const exactPrism = await panelValue(page, 'exact', 'mag');
  expect(exactPrism).toBeLessThanOrEqual(0.5 + 1e-9);
  expect(exactPrism).toBeGreaterThan(0.49);
  await expect(page.locator('.results-summary')).toContainText('temporal');
  await page.screenshot({ path: `${SHOTS}/range-opened-single.png` });

  // back to the range: the family is still there
  await page.locator('#workspace-switch button[data-workspace="range"]').click();
  await expect(page.locator('#workspace-range table.range-table tbody tr')).toHaveCount(3);
});

test('the export path writes the bytes `decentra limits` and `decentra spec` print for the same family (CSV, JSON, spec sheet)', async ({ page }) => {
  await openRange(page);
  await setFamily(page, 'power', '-6:6:1');
  await setFamily(page, 'cyl', '0,-1.5');
  await setFamily(page, 'axis', '90');
  await setFamily(page, 'maxPrism', '0.25,0.5');
  // the same family on the command line, written out here (docs/cli.md; the demo lens of
  // src/demo/demoCase.ts: 1.60 resin, thinnest on a 60 mm blank with 1.0 mm edge and 2.0 mm centre)
  const args = [
    'limits', '--power', '-6:6:1', '--cyl', '0,-1.5', '--axis', '90', '--dir', 'nasal,temporal,up,down', '--max-prism', '0.25,0.5',
    '--eye', 'R', '--material', 'resin-1.60', '--front-rule', 'vogel', '--min-edge', '1.0', '--min-ct', '2.0', '--diameter', '60',
    '--front-k', '0', '--back-k', '0', '--cyl-on', 'back', '--toric', 'tyre', '--cr', '27', '--decimals', '2',
  ];
  const panel = page.locator('#export-panel');
  for (const fmt of ['csv', 'json'] as const) {
    await page.locator(`#workspace-range button[data-export="${fmt}"]`).click();
    await expect(panel).toBeVisible();
    await expect(page.locator('#export-command')).toContainText('decentra limits --power -6:6:1');
    const [dl] = await Promise.all([page.waitForEvent('download'), page.locator('#export-start').click()]);
    expect(dl.suggestedFilename()).toBe(`decentra-range.${fmt}`);
    const text = readFileSync(await dl.path(), 'utf8');
    const expected = cli([...args, '--format', fmt]);
    expect(text).toBe(expected);
    // the command the panel shows prints the same file
    const shown = await page.evaluate(() => (window as unknown as Hooked).__decentra.range()!.commandWords('limits'));
    expect(cli([...shown, '--format', fmt])).toBe(text);
    await expect(page.locator('#export-status')).toContainText('Done: 208 rows');
    if (fmt === 'csv') {
      expect(text.split('\n')).toHaveLength(1 + 13 * 2 * 4 * 2 + 1);
      await page.screenshot({ path: `${SHOTS}/range-export.png` });
    } else expect(JSON.parse(text)).toHaveLength(208);
    await page.locator('#export-close').click();
  }

  // the spec sheet: the bytes `decentra spec` writes for the command the panel shows (the
  // sheet prints its command, so the words and their order are the panel's), dated today
  await page.locator('#workspace-range button[data-export="spec"]').click();
  await expect(page.locator('#export-command')).toContainText('decentra spec --power -6:6:1');
  const [dl] = await Promise.all([page.waitForEvent('download'), page.locator('#export-start').click()]);
  expect(dl.suggestedFilename()).toBe('decentra-spec.html');
  const sheet = readFileSync(await dl.path(), 'utf8');
  const words = await page.evaluate(() => (window as unknown as Hooked).__decentra.range()!.commandWords('spec'));
  // the same flags and values as the limits command above (in the panel's order), and the levels
  const pairs = (w: string[]) => Array.from({ length: (w.length - 1) / 2 }, (_, i) => `${w[1 + 2 * i]} ${w[2 + 2 * i]}`).sort();
  expect(pairs(words)).toEqual(pairs(['spec', ...args.slice(1), '--levels', '5,10,20']));
  const now = new Date();
  const day = `${now.getFullYear()}-${String(now.getMonth() + 1).padStart(2, '0')}-${String(now.getDate()).padStart(2, '0')}`;
  expect(sheet).toBe(cli([...words, '--date', day]));
  expect(sheet).not.toMatch(/<script/i);
  expect(sheet).toContain('focimeter');
  expect(sheet).toContain('local regulations');
  await expect(page.locator('#export-status')).toContainText('Done: 208 rows');
});
