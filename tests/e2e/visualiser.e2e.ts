/**
 * End-to-end checks of the visualiser in Debian's Chromium with software WebGL.
 *
 * Expected optics are computed here in Node by the project's own engine (readTraceCase,
 * fourAnswers) and by the built command line (`decentra trace --json`, the JSON
 * output of docs/cli.md): these tests check that the page shows what the engine computes for the case on
 * screen, not the engine itself (tests/reference does that against published values).
 */
import { type Page, expect, test } from '@playwright/test';
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { readTraceCase } from '../../src/case/lensCase.ts';
import { fourAnswers, type PrismDescription } from '../../src/optics/index.ts';
import {
  SHOTS, canvasStats, expectNoNonFinite, field, openApp, panelText, panelValue, selectField, setField, watchErrors,
} from './helpers.ts';

let errors: string[] = [];
test.beforeEach(({ page }) => {
  errors = watchErrors(page);
});
test.afterEach(() => {
  expect(errors, 'console errors').toEqual([]);
});

type Hooked = { __decentra: {
  updates: number; memory(): { geometries: number; textures: number }; frames(): number; renderNow(): void;
  rebuildScene(n: number): void; handlePosition(): { x: number; y: number }; viewCase(): Record<string, string>;
  valid(): boolean; mapDrawn(): number;
} };
const D = (page: Page) => ({
  memory: () => page.evaluate(() => (window as unknown as Hooked).__decentra.memory()),
  viewCase: () => page.evaluate(() => (window as unknown as Hooked).__decentra.viewCase()),
  handle: () => page.evaluate(() => (window as unknown as Hooked).__decentra.handlePosition()),
});

function expectPrism(page: Page, row: string, p: PrismDescription): Promise<void>[] {
  return [
    panelValue(page, row, 'h').then((v) => expect(v).toBeCloseTo(p.horizontal.amount, 9)),
    panelValue(page, row, 'v').then((v) => expect(v).toBeCloseTo(p.vertical.amount, 9)),
    panelValue(page, row, 'mag').then((v) => expect(v).toBeCloseTo(p.magnitude, 9)),
    panelText(page, row, 'mag').then((t) => expect(t).toBe(`${p.magnitude.toFixed(2)} Δ`)),
  ];
}

test('opens on the demo case with no console error, cautions and a drawn scene', async ({ page }) => {
  await openApp(page);
  await expect(page.locator('#case-kind')).toHaveText(/Demo case \(invented scenario\)/);
  await expect(page.locator('.caution')).toContainText('computation aid');
  await expect(page.locator('.caution')).toContainText('focimeter');
  await expect(page.locator('.caution')).toContainText('local regulations and licensed practice');
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'current');
  // the demo's exact answer, from the engine for the same fields
  const { tc, lens } = readTraceCase(
    { sphere: '+8.00', cyl: '0', axis: '0', material: 'resin-1.60', frontRule: 'vogel', minEdge: '1.0', minCt: '2.0', diameter: '60', x: '8', y: '-4', cr: '27', eye: 'R', frontK: '0', backK: '0' },
    (k) => k,
  );
  const a = fourAnswers(lens, tc.crMm, tc.xMm, tc.yMm, tc.eye);
  if ('failure' in a.exact) throw new Error('the demo case must have an exact answer');
  await Promise.all(expectPrism(page, 'exact', a.exact));
  await expect(page.locator('.scene-label--exact')).toContainText(`${a.exact.magnitude.toFixed(2)} Δ`);
  await expectNoNonFinite(page);
  // the WebGL canvas is not blank: many colours and real contrast
  const st = await canvasStats(page, '.viewport-canvas');
  expect(st.w).toBeGreaterThan(300);
  expect(st.distinct).toBeGreaterThan(200);
  expect(st.std).toBeGreaterThan(8);
  await page.screenshot({ path: `${SHOTS}/01-demo-overview.png` });
});

test('changing controls updates the panel to the engine values (rule-based lens, cylinder)', async ({ page }) => {
  await openApp(page);
  await setField(page, 'sphere', '+6.50');
  await setField(page, 'cyl', '-1.25');
  await setField(page, 'axis', '30');
  await setField(page, 'x', '-5');
  await setField(page, 'y', '3 mm');
  await setField(page, 'cr', '2.6 cm');
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'current');
  const { tc, lens } = readTraceCase(
    { sphere: '+6.50', cyl: '-1.25', axis: '30', material: 'resin-1.60', frontRule: 'vogel', minEdge: '1.0', minCt: '2.0', diameter: '60', x: '-5', y: '3', cr: '26', eye: 'R', frontK: '0', backK: '0' },
    (k) => k,
  );
  const a = fourAnswers(lens, tc.crMm, tc.xMm, tc.yMm, tc.eye);
  if ('failure' in a.exact || 'failure' in a.focimeter || !a.error || a.error.percent === null) throw new Error('case must trace');
  await Promise.all([
    ...expectPrism(page, 'prentice', a.prentice), ...expectPrism(page, 'paraxial', a.paraxial),
    ...expectPrism(page, 'exact', a.exact), ...expectPrism(page, 'focimeter', a.focimeter),
    panelValue(page, 'exact', 'angle').then((v) => expect(v).toBeCloseTo((a.exact as PrismDescription).baseAngle, 9)),
    panelValue(page, 'error', 'prism').then((v) => expect(v).toBeCloseTo(a.error!.prism, 9)),
    panelValue(page, 'error', 'percent').then((v) => expect(v).toBeCloseTo(a.error!.percent!, 9)),
  ]);
  // the lens data: centre thickness as the engine solved it
  const ct = Number(await page.locator('[data-q="ct"]').getAttribute('data-value'));
  expect(ct).toBeCloseTo(lens.ctMm, 9);
  // horizontal base words for the right eye follow docs/conventions.md (x < 0 is base out)
  const hRow = page.locator('[data-answer="exact"] td').first();
  await expect(hRow).toContainText(a.exact.horizontal.base === 'in' ? 'base in' : 'base out');
  await expectNoNonFinite(page);
});

test('the panel agrees with `decentra trace --json` for the same inputs', async ({ page }) => {
  if (!existsSync('dist-cli/decentra.mjs')) execFileSync('npm', ['run', 'build:cli'], { stdio: 'ignore' });
  await openApp(page);
  await selectField(page, 'material', 'custom index and Abbe');
  await setField(page, 'index', '1.67');
  await selectField(page, 'frontMode', 'True power');
  await setField(page, 'front', '3.5');
  await selectField(page, 'thicknessMode', 'Centre thickness');
  await setField(page, 'ct', '1.9');
  await setField(page, 'sphere', '-6.25');
  await setField(page, 'cyl', '-2.00');
  await setField(page, 'axis', '165');
  await selectField(page, 'eye', 'Left (L)');
  await setField(page, 'x', '-6');
  await setField(page, 'y', '-9');
  await setField(page, 'cr', '25');
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'current');
  const out = execFileSync('node', ['bin/decentra.mjs', 'trace', '--sphere', '-6.25', '--cyl', '-2.00', '--axis', '165',
    '--index', '1.67', '--front', '3.5', '--ct', '1.9', '--x', '-6', '--y', '-9', '--cr', '25', '--eye', 'L', '--json'], { encoding: 'utf8' });
  const cli = JSON.parse(out) as Record<string, PrismDescription> & { error: { prism: number; percent: number } };
  await Promise.all([
    ...expectPrism(page, 'prentice', cli.prentice!), ...expectPrism(page, 'paraxial', cli.paraxial!),
    ...expectPrism(page, 'exact', cli.exact!), ...expectPrism(page, 'focimeter', cli.focimeter!),
    panelValue(page, 'error', 'percent').then((v) => expect(v).toBeCloseTo(cli.error.percent, 9)),
  ]);
  // left eye, minus lens, visual point nasal (x < 0 for the left eye): base in, as in docs/conventions.md
  await expect(page.locator('[data-answer="exact"] td').first()).toContainText(`base ${cli.exact!.horizontal.base}`);
});

test('keyboard: arrow keys step a field and the panel follows', async ({ page }) => {
  await openApp(page);
  const before = await panelValue(page, 'prentice', 'h');
  await field(page, 'sphere').focus();
  await page.keyboard.press('ArrowUp');
  await expect(field(page, 'sphere')).toHaveValue('8.25');
  // Prentice horizontal = |F x| / 10 for a sphere: 8.25 D at 8 mm is 6.60 Δ (docs/method.md)
  await expect(page.locator('[data-answer="prentice"] [data-q="h"]')).toHaveText('6.60 Δ');
  expect(await panelValue(page, 'prentice', 'h')).not.toBeCloseTo(before, 6);
  await page.keyboard.press('Tab');
  await expect(field(page, 'cyl')).toBeFocused();
});

test('an invalid input shows a specific message and keeps the last result, marked stale', async ({ page }) => {
  await openApp(page);
  const exact = await panelValue(page, 'exact', 'mag');
  await setField(page, 'sphere', 'abc');
  await expect(page.locator('#err-sphere')).toBeVisible();
  await expect(page.locator('#err-sphere')).toContainText("sphere: must be a number in dioptres, got 'abc'");
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'stale');
  await expect(page.locator('#viewport-stale')).toBeVisible();
  expect(await panelValue(page, 'exact', 'mag')).toBe(exact);
  await setField(page, 'sphere', '8');
  await selectField(page, 'thicknessMode', 'Centre thickness');
  await setField(page, 'ct', '1');
  // a +8.00 D lens 1 mm thick cannot span 60 mm: the engine says so, naming the field
  await expect(page.locator('#err-ct')).toContainText('centre thickness');
  await expect(page.locator('#viewport-stale')).toContainText('stale');
  await page.screenshot({ path: `${SHOTS}/05-invalid-lens.png` });
  await setField(page, 'x', '40');
  await setField(page, 'ct', '8');
  await expect(page.locator('#err-x')).toContainText('outside the');
  await setField(page, 'x', '8');
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'current');
  await expect(page.locator('.field-error:visible')).toHaveCount(0);
  await expectNoNonFinite(page);
});

test('dragging the visual point in the 3-D view moves it', async ({ page }) => {
  await openApp(page);
  await page.getByRole('button', { name: 'Front', exact: true }).click();
  await page.waitForTimeout(100);
  const h = await D(page).handle();
  await page.mouse.move(h.x, h.y);
  await page.mouse.down();
  for (let i = 1; i <= 8; i++) await page.mouse.move(h.x + 8 * i, h.y - 3 * i);
  await page.mouse.up();
  const c = await D(page).viewCase();
  // front view: x to the right and y up on screen (docs/conventions.md, "The wearer frame")
  expect(Number(c.x)).toBeGreaterThan(10);
  expect(Number(c.y)).toBeGreaterThan(-4);
  await expect(field(page, 'x')).toHaveValue(c.x!);
  const h2 = await D(page).handle();
  expect(h2.x).toBeGreaterThan(h.x + 40);
  await expect(page.locator('.results-summary')).toContainText(`${Number(c.x).toFixed(1)} mm nasal`);
  await page.screenshot({ path: `${SHOTS}/02-front-view-dragged.png` });
});

test('the case round-trips through the URL and survives a reload', async ({ page, context }) => {
  await openApp(page);
  await setField(page, 'sphere', '-4.75');
  await setField(page, 'cyl', '-1.50');
  await setField(page, 'axis', '170');
  await selectField(page, 'eye', 'Left (L)');
  await selectField(page, 'material', 'polycarbonate');
  await selectField(page, 'frontMode', 'Nominal + tool index');
  await setField(page, 'base', '4');
  await setField(page, 'frontK', '-0.5');
  await selectField(page, 'pointMode', 'Direction, distance');
  await setField(page, 'dir', '200');
  await setField(page, 'dist', '12');
  await page.locator('select').filter({ has: page.locator('option', { hasText: '×10' }) }).selectOption({ label: '×10' });
  await expect(page.locator('#viewport-mag')).toBeVisible();
  await expect(page.locator('#viewport-mag')).toContainText('×10');
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'current');
  await expect.poll(() => page.url()).toContain('sph=-4.75');
  await expect.poll(() => page.url()).toContain('mag=10');
  const url = page.url();
  const exact = await panelValue(page, 'exact', 'mag');
  const summary = await page.locator('.results-summary').textContent();
  await expect(page.locator('#case-kind')).toHaveText('Your case');

  const other = await context.newPage();
  const errs2 = watchErrors(other);
  await other.goto(url);
  await other.waitForFunction(() => (window as unknown as Hooked).__decentra?.updates > 0);
  await expect(field(other, 'sphere')).toHaveValue('-4.75');
  await expect(field(other, 'eye').locator('option:checked')).toHaveText('Left (L)');
  await expect(field(other, 'material').locator('option:checked')).toHaveText('polycarbonate');
  await expect(field(other, 'dir')).toHaveValue('200');
  await expect(other.locator('#viewport-mag')).toContainText('×10');
  expect(await panelValue(other, 'exact', 'mag')).toBe(exact);
  expect(await other.locator('.results-summary').textContent()).toBe(summary);
  expect(errs2).toEqual([]);
  await other.close();

  await page.reload();
  await page.waitForFunction(() => (window as unknown as Hooked).__decentra?.updates > 0);
  expect(await panelValue(page, 'exact', 'mag')).toBe(exact);
  await expect(field(page, 'frontK')).toHaveValue('-0.5');
  await page.screenshot({ path: `${SHOTS}/03-from-link-magnified.png` });
});

test('the prism map appears, has contours and a legend, and a click moves the visual point', async ({ page }) => {
  await openApp(page);
  await page.getByRole('tab', { name: 'Prism map' }).click();
  const fig = page.locator('.map-figure');
  await expect(fig).toHaveAttribute('data-ready', 'true');
  const st = await canvasStats(page, '.map-canvas');
  expect(st.distinct).toBeGreaterThan(50);
  expect(await page.locator('.map-contours path').count()).toBeGreaterThan(3);
  await expect(page.locator('.legend-title')).toHaveText('Exact prism (Δ)');
  const box = (await page.locator('.map-canvas').boundingBox())!;
  // the map spans the 60 mm aperture: click where x = -10 mm, y = +6 mm
  const hw = 30;
  await page.mouse.click(box.x + ((-10 + hw) / (2 * hw)) * box.width, box.y + ((hw - 6) / (2 * hw)) * box.height);
  const c = await D(page).viewCase();
  expect(Number(c.x)).toBeCloseTo(-10, 0);
  expect(Number(c.y)).toBeCloseTo(6, 0);
  await expect(page.locator('.results-summary')).toContainText('temporal');
  await page.locator('select').filter({ has: page.locator('option', { hasText: 'Prentice error (%)' }) }).selectOption({ label: 'Prentice error (%)' });
  await expect(page.locator('.legend-title')).toHaveText('Prentice error (%)');
  await expect(fig).toHaveAttribute('data-ready', 'true');
  await expectNoNonFinite(page);
  await page.screenshot({ path: `${SHOTS}/04-map-error.png` });
  await page.getByRole('tab', { name: 'Prism along the direction' }).click();
  await expect(page.locator('.plot-prism canvas')).toBeVisible();
  await page.screenshot({ path: `${SHOTS}/06-profile.png` });
});

test('rebuilding the lens and the scene 20 times leaves renderer memory at its baseline', async ({ page }) => {
  await openApp(page);
  await page.evaluate(() => (window as unknown as Hooked).__decentra.renderNow());
  const base = await D(page).memory();
  expect(base.geometries).toBeGreaterThan(5);
  // 20 lenses through the sphere field's own input handler (each a new lens from the engine)
  const shown = await page.evaluate(() => {
    const input = document.querySelector('input[data-field="sphere"]') as HTMLInputElement;
    const seen: string[] = [];
    for (let i = 0; i < 20; i++) {
      input.value = (4 + i * 0.25).toFixed(2);
      input.dispatchEvent(new Event('input'));
      (window as unknown as Hooked).__decentra.renderNow();
      seen.push(document.querySelector('[data-answer="prentice"] [data-q="h"]')!.textContent!);
    }
    return seen;
  });
  // the panel followed every lens: Prentice horizontal = S x / 10 at x = 8 mm (docs/method.md)
  expect(shown[19]).toBe(`${((4 + 19 * 0.25) * 0.8).toFixed(2)} Δ`);
  expect(new Set(shown).size).toBe(20);
  expect(await D(page).memory()).toEqual(base);
  // 20 full teardowns: every scene object disposed and made again
  await page.evaluate(() => (window as unknown as Hooked).__decentra.rebuildScene(20));
  expect(await D(page).memory()).toEqual(base);
  // the labels of disposed objects leave the page too
  expect(await page.locator('.scene-label--exact').count()).toBe(1);
});
