/**
 * End-to-end checks of two pieces of app friction (docs/visualiser.md and docs/binocular.md,
 * "Undo and redo" and "Decimal comma"), in Debian's Chromium with software WebGL:
 *
 * - undo and redo of case edits, by keyboard (Ctrl+Z, Shift+Ctrl+Z) and by the buttons, in
 *   the single-lens and the both-eyes workspaces: the fields and the panel follow;
 * - a decimal comma typed in a number field reads as the point ("6,5" is 6.5), and text where
 *   the comma is ambiguous ("1,234.5", "4,5,6") is refused with a hint at its field.
 *
 * Where an expected number is a formula it is Prentice's rule, P = c·F with c in cm (C. F.
 * Prentice, 1890, Archives of Ophthalmology, restated in M. Jalie, "Ophthalmic Lenses and
 * Dispensing"; from memory; docs/method.md),
 * on the demo case's visual point (x = 8 mm, y = −4 mm, an invented scenario). That the comma
 * and the point are both decimal signs is ISO 80000-1 (from memory: "the decimal sign is either
 * the comma on the line or the point on the line").
 */
import { type Page, expect, test } from '@playwright/test';
import type { CaseDocument } from '../../src/case/caseFile.ts';
import { SHOTS, expectNoNonFinite, field, openApp, panelValue, setField, watchErrors } from './helpers.ts';

let errors: string[] = [];
test.beforeEach(({ page }) => {
  errors = watchErrors(page);
});
test.afterEach(() => {
  expect(errors, 'console errors').toEqual([]);
});

/** Prentice's horizontal prism on screen, as shown (two decimals). */
const prenticeH = (page: Page) => page.locator('#workspace-single [data-answer="prentice"] [data-q="h"]');

/** Leave the field the way a person does (Tab), so that the case's undo is not the field's. */
async function typeAndLeave(page: Page, key: string, value: string): Promise<void> {
  await setField(page, key, value);
  await page.keyboard.press('Tab');
}

test('single lens: a decimal comma reads as the point; an ambiguous one is refused with a hint', async ({ page }) => {
  await openApp(page);
  await setField(page, 'sphere', '6,5');
  // what is read is shown: the comma becomes a point in the field
  await expect(field(page, 'sphere')).toHaveValue('6.5');
  // Prentice: 6.5 D × 0.8 cm = 5.20 Δ
  await expect(prenticeH(page)).toHaveText('5.20 Δ');
  const withComma = await panelValue(page, 'exact', 'mag');
  await setField(page, 'sphere', '6.5');
  await expect(prenticeH(page)).toHaveText('5.20 Δ');
  expect(await panelValue(page, 'exact', 'mag')).toBe(withComma);
  // a unit after the number still works: "0,8 cm" is 8 mm
  await setField(page, 'x', '0,8 cm');
  await expect(field(page, 'x')).toHaveValue('0.8 cm');
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'current');
  await expect(prenticeH(page)).toHaveText('5.20 Δ');

  await setField(page, 'sphere', '1,234.5');
  await expect(page.locator('#err-sphere')).toBeVisible();
  await expect(page.locator('#err-sphere')).toContainText('Sphere (D)');
  await expect(page.locator('#err-sphere')).toContainText('both a comma and a point');
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'stale');
  await expect(page.locator('#viewport-stale')).toBeVisible();
  // the refused text is not read: the last valid case (6.5 D) stays on screen, marked stale
  expect(await panelValue(page, 'exact', 'mag')).toBe(withComma);
  await page.screenshot({ path: `${SHOTS}/friction-single-comma-refused.png` });
  await setField(page, 'sphere', '4,5,6');
  await expect(page.locator('#err-sphere')).toContainText('more than one comma');
  await setField(page, 'sphere', '-2,25');
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'current');
  // Prentice: 2.25 D × 0.8 cm = 1.80 Δ
  await expect(prenticeH(page)).toHaveText('1.80 Δ');
  await expect(page.locator('.field-error:visible')).toHaveCount(0);
  await expectNoNonFinite(page);
});

test('single lens: undo and redo by keyboard and by button; the fields and the panel follow', async ({ page }) => {
  await openApp(page);
  const undo = page.locator('#single-undo'), redo = page.locator('#single-redo');
  await expect(undo).toBeDisabled();
  await expect(redo).toBeDisabled();
  // the demo: +8.00 D at 8 mm, Prentice 6.40 Δ
  await expect(prenticeH(page)).toHaveText('6.40 Δ');
  await typeAndLeave(page, 'sphere', '6');
  await expect(prenticeH(page)).toHaveText('4.80 Δ');
  await typeAndLeave(page, 'x', '5');
  // 6 D × 0.5 cm = 3.00 Δ
  await expect(prenticeH(page)).toHaveText('3.00 Δ');
  await expect(undo).toBeEnabled();
  await expect(redo).toBeDisabled();

  await page.keyboard.press('Control+z');
  await expect(field(page, 'x')).toHaveValue('8');
  await expect(prenticeH(page)).toHaveText('4.80 Δ');
  await page.keyboard.press('Control+z');
  await expect(field(page, 'sphere')).toHaveValue('+8.00');
  await expect(prenticeH(page)).toHaveText('6.40 Δ');
  await expect(undo).toBeDisabled();
  await page.keyboard.press('Control+Shift+z');
  await expect(field(page, 'sphere')).toHaveValue('6');
  await expect(prenticeH(page)).toHaveText('4.80 Δ');
  await page.screenshot({ path: `${SHOTS}/friction-single-undo.png` });

  // the buttons do the same
  await redo.click();
  await expect(field(page, 'x')).toHaveValue('5');
  await expect(prenticeH(page)).toHaveText('3.00 Δ');
  await expect(redo).toBeDisabled();
  await undo.click();
  await expect(prenticeH(page)).toHaveText('4.80 Δ');
  await expect(redo).toBeEnabled();

  // a new edit clears what redo had
  await typeAndLeave(page, 'y', '0');
  await expect(redo).toBeDisabled();

  // a refused value is not a step: undo goes back past it to the last valid case
  await typeAndLeave(page, 'sphere', 'abc');
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'stale');
  await undo.click();
  await expect(page.locator('.results-status')).toHaveAttribute('data-state', 'current');
  await expect(field(page, 'sphere')).toHaveValue('6');
  await expect(field(page, 'y')).toHaveValue('-4');
  await expect(prenticeH(page)).toHaveText('4.80 Δ');
  // the address bar follows the case undone to
  await expect.poll(() => page.evaluate(() => location.search)).toContain('sph=6');

  // while text typed in a field is not yet sent, Ctrl+Z is the field's own text undo, not the case's
  await typeAndLeave(page, 'x', '6');
  await field(page, 'sphere').focus();
  await page.keyboard.type('5');
  await page.keyboard.press('Control+z');
  // the case's undo would have brought x = 6 back into redo's reach; the field's undo did not
  await expect(redo).toBeDisabled();
  await expect(field(page, 'x')).toHaveValue('6');
  await expectNoNonFinite(page);
});

interface BothHook { updates(): number; valid(): boolean; frames(): number }
type Hooked = { __decentra: { caseStore: { doc(): CaseDocument }; binocular(): BothHook | null } };

async function openBoth(page: Page): Promise<void> {
  await openApp(page);
  await page.locator('#workspace-switch button[data-workspace="both"]').click();
  await page.waitForFunction(() => {
    const b = (window as unknown as Hooked).__decentra.binocular();
    return !!b && b.updates() > 0 && b.frames() > 1;
  });
}
const docOf = (page: Page): Promise<CaseDocument> =>
  page.evaluate(() => (window as unknown as Hooked).__decentra.caseStore.doc());
const bothField = (page: Page, key: string) => page.locator(`#workspace-both input[data-field="${key}"]`);

/** Every full-precision number of the both-eyes panel, keyed by its place. */
function panelNumbers(page: Page): Promise<Record<string, string>> {
  return page.evaluate(() => {
    const out: Record<string, string> = {};
    document.querySelectorAll<HTMLElement>('#workspace-both .bi-results [data-q][data-value]').forEach((e, i) => {
      out[`${i}:${e.closest<HTMLElement>('[data-answer]')?.dataset.answer ?? ''}:${e.dataset.q}`] = e.dataset.value!;
    });
    return out;
  });
}

test('both eyes: decimal comma, and undo and redo by keyboard and by button', async ({ page }) => {
  await openBoth(page);
  const undo = page.locator('#bi-undo'), redo = page.locator('#bi-redo');
  await expect(undo).toBeDisabled();
  const demo = await panelNumbers(page);
  expect(Object.keys(demo).length).toBeGreaterThan(5);
  expect((await docOf(page)).right.sphere).toBe(-9.5);

  // a decimal comma is read as the point, in the field and in the case
  await bothField(page, 'right.sphere').fill('-6,5');
  await expect(bothField(page, 'right.sphere')).toHaveValue('-6.5');
  await expect.poll(async () => (await docOf(page)).right.sphere).toBe(-6.5);
  await page.keyboard.press('Tab');
  const edited = await panelNumbers(page);
  expect(edited).not.toEqual(demo);
  await bothField(page, 'right.pd').fill('33,5');
  await page.keyboard.press('Tab');
  await expect.poll(async () => (await docOf(page)).right.pd).toBe(33.5);
  const edited2 = await panelNumbers(page);

  // an ambiguous one is refused with its hint; the case does not change
  await bothField(page, 'left.sphere').fill('1.234,5');
  await expect(page.locator('#workspace-both .field-error:visible')).toContainText('both a comma and a point');
  await expect(page.locator('#workspace-both .viewport-stale')).toBeVisible();
  expect((await docOf(page)).left.sphere).toBe(-8.75);
  await page.screenshot({ path: `${SHOTS}/friction-both-comma-refused.png` });
  await bothField(page, 'left.sphere').fill('-8,75');
  await page.keyboard.press('Tab');
  await expect(page.locator('#workspace-both .field-error:visible')).toHaveCount(0);

  // undo by keyboard: the whole case comes back, the fields and the panel follow
  await page.keyboard.press('Control+z');
  await expect.poll(async () => (await docOf(page)).right.pd).toBe(31.5);
  await expect(bothField(page, 'right.pd')).toHaveValue('31.5');
  await expect.poll(() => panelNumbers(page)).toEqual(edited);
  await page.keyboard.press('Control+z');
  await expect.poll(async () => (await docOf(page)).right.sphere).toBe(-9.5);
  await expect.poll(() => panelNumbers(page)).toEqual(demo);
  await expect(undo).toBeDisabled();
  await page.screenshot({ path: `${SHOTS}/friction-both-undo.png` });
  // redo by keyboard, then by button
  await page.keyboard.press('Control+Shift+z');
  await expect.poll(() => panelNumbers(page)).toEqual(edited);
  await redo.click();
  await expect.poll(() => panelNumbers(page)).toEqual(edited2);
  await expect(redo).toBeDisabled();
  // by button back, then a new edit clears redo
  await undo.click();
  await expect.poll(() => panelNumbers(page)).toEqual(edited);
  await expect(redo).toBeEnabled();
  await bothField(page, 'left.pd').fill('31');
  await page.keyboard.press('Tab');
  await expect(redo).toBeDisabled();
  await expect(undo).toBeEnabled();
  // another case opened (as the Case menu does) starts its own history: nothing to undo
  const opened = { ...(await docOf(page)), title: 'Invented scenario: another case' };
  await page.evaluate((d) => { (window as unknown as { __decentra: { caseStore: { set(x: unknown, o: string): void } } }).__decentra.caseStore.set(d, 'open'); }, opened);
  await expect(undo).toBeDisabled();
  await expect(redo).toBeDisabled();
  // the single-lens workspace's history is its own: Ctrl+Z here left it alone
  await page.locator('#workspace-switch button[data-workspace="single"]').click();
  await expect(page.locator('#single-undo')).toBeDisabled();
  await expectNoNonFinite(page);
});

test('range: a lens field takes a decimal comma; its list fields keep the comma as a separator', async ({ page }) => {
  await openApp(page);
  await page.locator('#workspace-switch button[data-workspace="range"]').click();
  const cr = page.locator('#workspace-range input[data-range-field="cr"]');
  await cr.fill('27,5');
  await expect(cr).toHaveValue('27.5');
  await cr.fill('2,7,5');
  await expect(page.locator('#range-err-cr')).toContainText('more than one comma');
  await cr.fill('27');
  await expect(page.locator('#range-err-cr')).toBeHidden();
  // "nasal,temporal,up,down" is a list (docs/range.md): not touched
  await expect(page.locator('#workspace-range input[data-range-field="dir"]')).toHaveValue('nasal,temporal,up,down');
});
