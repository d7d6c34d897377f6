/**
 * End-to-end checks of the power the eye gets at the visual point (docs/visualiser.md): the
 * panel's power lines, the power maps beside the prism map, the pencil in the 3-D view and the
 * point-focal control of the lens folder, in Debian's Chromium with software WebGL.
 *
 * Expected values come from outside the page: the built command line (`decentra trace
 * --json`, its `exact.power` object of docs/cli.md), the engine run here in Node (the back
 * surface's point for a 30° eye rotation), and physical facts named beside each check (the
 * symmetry of a lens of revolution, the definition of vergence and of back vertex power). The
 * cases are invented scenarios.
 */
import { type Page, expect, test } from '@playwright/test';
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync } from 'node:fs';
import { readTraceCase } from '../../src/case/lensCase.ts';
import { Hit, Placement, Ray } from '../../src/optics/index.ts';
import {
  SHOTS, canvasStats, expectNoNonFinite, field, openApp, panelValue, selectField, setField, watchErrors,
} from './helpers.ts';

const OWN_SHOTS = '/tmp/shots-h10';
mkdirSync(OWN_SHOTS, { recursive: true });
const shot = async (page: Page, name: string): Promise<void> => {
  await page.screenshot({ path: `${SHOTS}/${name}.png` });
  await page.screenshot({ path: `${OWN_SHOTS}/${name}.png` });
};

let errors: string[] = [];
test.beforeEach(({ page }) => {
  errors = watchErrors(page);
});
test.afterEach(() => {
  expect(errors, 'console errors').toEqual([]);
});

type Hooked = { __decentra: { viewCase(): Record<string, string>; renderNow(): void } };
const viewCase = (page: Page) => page.evaluate(() => (window as unknown as Hooked).__decentra.viewCase());

/** Hover a map at lens-frame (x, y) mm and return the readout's text. */
async function readAt(page: Page, canvas: string, x: number, y: number, hw: number): Promise<string> {
  const box = (await page.locator(canvas).boundingBox())!;
  await page.mouse.move(box.x + ((x + hw) / (2 * hw)) * box.width, box.y + ((hw - y) / (2 * hw)) * box.height);
  return (await page.locator('.map-readout').textContent()) ?? '';
}

test('the power maps appear beside the prism map, read out symmetric values and move the visual point', async ({ page }) => {
  await openApp(page);
  await page.getByRole('tab', { name: 'Prism map' }).click();
  for (const f of ['.map-figure', '.power-mean-figure', '.power-astig-figure']) await expect(page.locator(f)).toHaveAttribute('data-ready', 'true');
  await expect(page.locator('.power-title')).toHaveText(['Mean error (D)', 'Astigmatic error (D)']);
  for (const c of ['.power-mean-canvas', '.power-astig-canvas']) expect((await canvasStats(page, c)).distinct).toBeGreaterThan(20);
  expect(await page.locator('.power-astig-contours path').count()).toBeGreaterThan(2);
  expect(await page.locator('.power-mean-contours path').count()).toBeGreaterThan(2);
  // the demo lens is a sphere, untilted, the centre of rotation on its axis: a lens of
  // revolution, so the errors at mirrored points are equal (physical symmetry), and on the
  // axis the eye gets the back vertex power (its definition): no astigmatic error there
  const hw = 30;
  for (const [canvas, name] of [['.power-astig-canvas', 'astigmatic error'], ['.power-mean-canvas', 'mean error']] as const) {
    const a = await readAt(page, canvas, 12, 6, hw), b = await readAt(page, canvas, -12, -6, hw), c = await readAt(page, canvas, 6, -12, hw);
    const value = (t: string) => t.replace(/^.*: /, '');
    expect(a).toContain(name);
    expect(value(a)).toBe(value(b));
    expect(value(a)).toBe(value(c));
  }
  expect(await readAt(page, '.power-astig-canvas', 0, 0, hw)).toMatch(/astigmatic error 0\.00 D$/);
  // the mean error of this +8.00 D lens grows away from the centre: not one value everywhere
  expect(await readAt(page, '.power-mean-canvas', 24, 0, hw)).not.toBe(await readAt(page, '.power-mean-canvas', 4, 0, hw));
  await shot(page, 'power-maps');
  // a click on a power map moves the visual point there, as on the prism map
  const box = (await page.locator('.power-astig-canvas').boundingBox())!;
  await page.mouse.click(box.x + ((-10 + hw) / (2 * hw)) * box.width, box.y + ((hw - 6) / (2 * hw)) * box.height);
  const c = await viewCase(page);
  expect(Number(c.x)).toBeCloseTo(-10, 0);
  expect(Number(c.y)).toBeCloseTo(6, 0);
  await expect(page.locator('[data-answer="power"]')).toBeVisible();
  await expectNoNonFinite(page);
});

test('the panel\'s power equals `decentra trace --json` for the same lens and point', async ({ page }) => {
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
  const args = ['--sphere', '-6.25', '--cyl', '-2.00', '--axis', '165', '--index', '1.67', '--front', '3.5', '--ct', '1.9',
    '--x', '-6', '--y', '-9', '--cr', '25', '--eye', 'L'];
  const cli = JSON.parse(execFileSync('node', ['bin/decentra.mjs', 'trace', ...args, '--json'], { encoding: 'utf8' })) as {
    exact: { power?: { sphere: number; cyl: number; axis: number; meanError: number; astigmaticError: number; tangential?: number } };
  };
  // the command line's power (docs/cli.md: an object `power` inside `exact`)
  const expected = cli.exact.power;
  expect(expected, 'decentra trace --json has exact.power').toBeDefined();
  if (!expected) return;
  expect(await panelValue(page, 'power', 'mean')).toBeCloseTo(expected.meanError, 9);
  expect(await panelValue(page, 'power', 'astig')).toBeCloseTo(expected.astigmaticError, 9);
  const v = page.locator('[data-answer="power"] [data-q="vergence"]');
  expect(Number(await v.getAttribute('data-sphere'))).toBeCloseTo(expected.sphere, 9);
  expect(Number(await v.getAttribute('data-cyl'))).toBeCloseTo(expected.cyl, 9);
  expect(Number(await v.getAttribute('data-axis'))).toBeCloseTo(expected.axis, 9);
  // a toric lens: Coddington's tangential and sagittal values do not apply, in neither place
  expect(expected.tangential).toBeUndefined();
  await expect(page.locator('[data-answer="power"] [data-q="tangential"]')).toHaveCount(0);
  await expectNoNonFinite(page);
  await shot(page, 'power-panel');
});

test('for a spherical lens the panel also shows Coddington\'s tangential and sagittal vergences, as `decentra trace --json`', async ({ page }) => {
  if (!existsSync('dist-cli/decentra.mjs')) execFileSync('npm', ['run', 'build:cli'], { stdio: 'ignore' });
  // the demo case (+8.00 D in 1.60 resin, Vogel front, thickness rule on 60 mm, 8 mm nasal and 4 mm down)
  await openApp(page);
  const cli = JSON.parse(execFileSync('node', ['bin/decentra.mjs', 'trace', '--sphere', '8', '--material', 'resin-1.60',
    '--diameter', '60', '--x', '8', '--y', '-4', '--json'], { encoding: 'utf8' })) as {
    exact: { power?: { meanError: number; astigmaticError: number; tangential?: number; sagittal?: number } };
  };
  const p = cli.exact.power;
  expect(p?.tangential, 'decentra trace --json has exact.power.tangential').toBeDefined();
  expect(await panelValue(page, 'power', 'tangential')).toBeCloseTo(p!.tangential!, 9);
  expect(await panelValue(page, 'power', 'sagittal')).toBeCloseTo(p!.sagittal!, 9);
  expect(await panelValue(page, 'power', 'mean')).toBeCloseTo(p!.meanError, 9);
  // for a lens of revolution the astigmatic error is the difference of the two (Sturm's
  // interval: the two principal vergences are the tangential and the sagittal)
  expect(await panelValue(page, 'power', 'astig')).toBeCloseTo(Math.abs(p!.tangential! - p!.sagittal!), 4);
});

test('the pencil toggle draws the pencil and its focal lines at 1000 / vergence mm from the vertex sphere', async ({ page }) => {
  await openApp(page);
  const labels = page.locator('.scene-label--pencil');
  await expect(labels.first()).toBeHidden();
  const before = await canvasStats(page, '#viewport canvas');
  await field(page, 'pencil').check();
  await expect(labels).toHaveCount(2);
  await expect(labels.first()).toBeVisible();
  await page.evaluate(() => (window as unknown as Hooked).__decentra.renderNow());
  const after = await canvasStats(page, '#viewport canvas');
  expect(after.distinct).not.toBe(before.distinct);
  // each label names its principal vergence and where its focal line lies: the definition of
  // vergence puts the line 1000 / F mm from the vertex sphere (to the whole mm shown)
  const expectLines = async (where: 'beyond' | 'before'): Promise<void> => {
    for (const t of await labels.allTextContents()) {
      const m = /^([+-]?\d+\.\d+) D focal line, (\d+) mm (beyond|before)/.exec(t);
      expect(m, t).not.toBeNull();
      const f = Number(m![1]), mm = Number(m![2]) * (m![3] === 'beyond' ? 1 : -1);
      expect(Math.abs(mm - 1000 / f)).toBeLessThanOrEqual(0.5 + 1000 * 0.005 / (f * f));
      expect(m![3]).toBe(where);
      if (where === 'before') expect(t).toContain('(virtual)');
    }
  };
  // the demo lens is +8.00 D: a converging pencil, real focal lines beyond the vertex sphere
  await expectLines('beyond');
  await page.locator('button[data-view="top"]').click({ force: true });
  await shot(page, 'power-pencil');
  // a minus lens: a diverging pencil, virtual focal lines before it, drawn dashed
  await setField(page, 'sphere', '-6');
  await setField(page, 'cyl', '-2');
  await setField(page, 'axis', '20');
  await setField(page, 'y', '6');
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'current');
  await expectLines('before');
  await page.locator('button[data-view="top"]').click({ force: true });
  await shot(page, 'power-pencil-virtual');
  await field(page, 'pencil').uncheck();
  await expect(labels.first()).toBeHidden();
});

test('the point-focal control applies a front free of astigmatic error at 30°, as an undoable edit', async ({ page }) => {
  await openApp(page, '?sph=4&mat=resin-1.50&x=0&y=0');
  await page.locator('[data-folder="Point-focal front"] .lil-title').click();
  await page.locator('[data-action="point-focal"] button').click();
  const msg = page.locator('.pf-message');
  await expect(msg).toContainText('Applied a true front power of');
  const c = await viewCase(page);
  expect(c.frontMode).toBe('true');
  // where the eye turned 30° meets the back surface (the engine's surface, untilted, CR on the
  // axis), the panel's astigmatic error is nearly zero: that is what point-focal means
  const { tc, lens } = readTraceCase({ sphere: '4', material: 'resin-1.50', front: c.front, cr: c.cr, minEdge: c.minEdge, minCt: c.minCt, diameter: c.diameter }, (k) => k);
  const pl = new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm: tc.crMm, pantoDeg: 0, wrapDeg: 0, eye: 'R' });
  const ray = new Ray().set(pl.crLensX, pl.crLensY, pl.crLensZ, Math.sin(Math.PI / 6), 0, Math.cos(Math.PI / 6));
  const hit = new Hit();
  expect(lens.back.intersect(ray, hit)).toBe(true);
  await setField(page, 'x', hit.x.toFixed(3));
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'current');
  // the front is applied to 0.01 D, so a few thousandths of a dioptre may remain
  expect(await panelValue(page, 'power', 'astig')).toBeLessThan(0.01);
  await shot(page, 'power-point-focal');
  // the automatic front, for comparison, leaves more astigmatism at the same point
  await page.locator('#single-undo').click();
  await page.locator('#single-undo').click();
  await expect.poll(async () => (await viewCase(page)).frontMode).toBe('auto');
  await setField(page, 'x', hit.x.toFixed(3));
  expect(await panelValue(page, 'power', 'astig')).toBeGreaterThan(0.02);
  // a lens with a cylinder is refused, with the reason, and nothing changes
  await setField(page, 'cyl', '-1');
  const before = await viewCase(page);
  await page.locator('[data-action="point-focal"] button').click();
  await expect(msg).toContainText('Not applied');
  await expect(msg).toContainText('cylinder');
  expect(await viewCase(page)).toEqual(before);
});
