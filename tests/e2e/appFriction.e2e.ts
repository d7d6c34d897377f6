/**
 * The app as a new user finds it (docs/visualiser.md, docs/binocular.md, docs/range.md,
 * docs/saving.md), in Debian's Chromium with software WebGL:
 * - notices sit in their own line under the header and cover nothing (view buttons, the
 *   results' status, the controls), in every workspace, at 1280 x 800 and 1920 x 1080;
 * - "Copy link" in "Both eyes" gives a link that opens the same both-eyes case;
 * - the both-eyes lenses are edged to the frame's box (not round blanks overlapping at the
 *   bridge): checked against the boxing system's geometry (ISO 8624: each lens's box is A
 *   wide, the boxes DBL apart, so the boxed centres are A + DBL apart);
 * - the control column's text meets WCAG 2.1 AA contrast (success criterion 1.4.3: at least
 *   4.5:1 for normal text; relative luminance and contrast ratio as WCAG 2.1 defines them);
 * - undo and redo in "Range", by keyboard and by button.
 * The cases are the app's demo cases (invented scenarios) and edits of them.
 */
import { type Page, expect, test } from '@playwright/test';
import type { CaseDocument } from '../../src/case/caseFile.ts';
import { rangeRows, readRangeSpec } from '../../src/case/range.ts';
import { type FamilyForm, rangeInput } from '../../src/ui/range/family.ts';
import { SHOTS, expectNoNonFinite, openApp, watchErrors } from './helpers.ts';

let errors: string[] = [];
test.beforeEach(async ({ page }) => {
  errors = watchErrors(page);
  // what "Copy link" puts on the clipboard, kept where the test can read it
  await page.addInitScript(() => {
    const w = window as unknown as { __copied: string[] };
    w.__copied = [];
    Object.defineProperty(navigator, 'clipboard', {
      configurable: true,
      value: { writeText: (t: string) => { w.__copied.push(t); return Promise.resolve(); } },
    });
  });
});
test.afterEach(() => {
  expect(errors, 'console errors').toEqual([]);
});

type Extent = { shape: 'edged' | 'round' | 'none'; xMin: number; xMax: number; yMin: number; yMax: number };
interface BothHook { updates(): number; valid(): boolean; frames(): number; lensExtents(): Record<'right' | 'left', Extent> }
interface RangeHook { updates: number; valid: boolean; rows(): number; form(): FamilyForm; canUndo(): boolean; canRedo(): boolean }
type Hooked = {
  __copied: string[];
  __decentra: { caseStore: { doc(): CaseDocument }; binocular(): BothHook | null; range(): RangeHook | null; workspace(): string };
};

async function showWorkspace(page: Page, name: 'single' | 'both' | 'range'): Promise<void> {
  await page.locator(`#workspace-switch button[data-workspace="${name}"]`).click();
  if (name === 'both') {
    await page.waitForFunction(() => {
      const b = (window as unknown as Hooked).__decentra.binocular();
      return !!b && b.updates() > 0 && b.frames() > 1;
    });
  }
  if (name === 'range') {
    await page.waitForFunction(() => {
      const r = (window as unknown as Hooked).__decentra.range();
      return !!r && r.updates > 0 && r.valid;
    });
  }
}

const docOf = (page: Page): Promise<CaseDocument> => page.evaluate(() => (window as unknown as Hooked).__decentra.caseStore.doc());
const copied = (page: Page): Promise<string[]> => page.evaluate(() => (window as unknown as Hooked).__copied);

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

/**
 * The things a notice must not cover, in the shown workspace, each with the area (px²) a
 * notice covers of it.
 */
function coveredByNotices(page: Page): Promise<{ what: string; area: number }[]> {
  return page.evaluate(() => {
    const shown = document.querySelector<HTMLElement>('main.app-main:not([hidden])')!;
    const notices = Array.from(document.querySelectorAll<HTMLElement>('.persist-notice')).map((n) => n.getBoundingClientRect());
    const targets: [string, Element][] = [];
    for (const sel of ['.view-buttons button', '.results-status', '.range-status', '.undo-bar', '.lil-gui.lil-root > .lil-title', '.viewport-hint', '.tabs', '.bi-limits-head']) {
      shown.querySelectorAll(sel).forEach((e) => targets.push([sel, e]));
    }
    document.querySelectorAll('.app-header button').forEach((e) => targets.push(['header button', e]));
    const out: { what: string; area: number }[] = [];
    for (const [what, e] of targets) {
      const r = e.getBoundingClientRect();
      if (r.width === 0 || r.height === 0) continue;
      let area = 0;
      for (const n of notices) {
        const w = Math.min(r.right, n.right) - Math.max(r.left, n.left);
        const h = Math.min(r.bottom, n.bottom) - Math.max(r.top, n.top);
        if (w > 0 && h > 0) area += w * h;
      }
      out.push({ what, area });
    }
    return out;
  });
}

for (const size of [{ width: 1280, height: 800 }, { width: 1920, height: 1080 }]) {
  test(`notices cover nothing, in every workspace, at ${size.width} x ${size.height}`, async ({ page }) => {
    await page.setViewportSize(size);
    // a link with a damaged both-eyes case: an error notice that stays until dismissed
    await openApp(page, '?case=%7B%22format%22%3A%22decentra-case%22');
    const err = page.locator('.persist-notice--error');
    await expect(err).toContainText('The both-eyes case in the link was not opened');
    await expect(err).toContainText('not valid JSON');
    for (const ws of ['single', 'both', 'range'] as const) {
      await showWorkspace(page, ws);
      if (ws !== 'range') {
        await page.locator('#copy-link').click();
        await expect(page.locator('.persist-notice--info').last()).toContainText('copied');
      }
      const list = await coveredByNotices(page);
      expect(list.length, `things checked in ${ws}`).toBeGreaterThan(4);
      expect(list.filter((x) => x.area > 0), `covered in ${ws}`).toEqual([]);
      // the notices sit between the header and the workspace, and the workspace still fits the page
      const header = await page.locator('.app-header').boundingBox();
      const area = await page.locator('#notice-area').boundingBox();
      const main = await page.locator(`#workspace-${ws}`).boundingBox();
      const footer = await page.locator('footer.caution').boundingBox();
      expect(area!.y).toBeGreaterThanOrEqual(header!.y + header!.height - 0.5);
      expect(main!.y).toBeGreaterThanOrEqual(area!.y + area!.height - 0.5);
      expect(main!.y + main!.height).toBeLessThanOrEqual(footer!.y + 0.5);
      expect(footer!.y + footer!.height).toBeLessThanOrEqual(size.height + 0.5);
      await page.screenshot({ path: `${SHOTS}/notices-${ws}-${size.width}.png` });
    }
    // dismissed: the line takes no room, and the workspace grows back under the header
    await err.locator('.persist-notice-close').click();
    await expect(page.locator('.persist-notice')).toHaveCount(0, { timeout: 10_000 });
    const header = await page.locator('.app-header').boundingBox();
    const main = await page.locator('#workspace-range').boundingBox();
    expect(Math.abs(main!.y - (header!.y + header!.height))).toBeLessThan(0.5);
  });
}

test('both eyes: Copy link opens the same case in "Both eyes", in a new tab', async ({ page, context }) => {
  await openApp(page);
  await showWorkspace(page, 'both');
  // edit the demo (an invented scenario): right sphere and the frame's bridge
  await page.locator('#workspace-both input[data-field="right.sphere"]').fill('-6.25');
  await page.keyboard.press('Tab');
  await page.locator('#workspace-both input[data-field="case.dbl"]').fill('20');
  await page.keyboard.press('Tab');
  await expect.poll(async () => (await docOf(page)).frame?.dbl).toBe(20);
  const doc = await docOf(page);
  expect(doc.right.sphere).toBe(-6.25);
  const numbers = await panelNumbers(page);
  await expect(page.locator('#copy-link')).toBeVisible();
  await page.locator('#copy-link').click();
  await expect(page.locator('.persist-notice--info').last()).toContainText('Link to the both-eyes case copied.');
  const links = await copied(page);
  expect(links).toHaveLength(1);
  const link = new URL(links[0]!);
  expect([...link.searchParams.keys()]).toEqual(['case']);

  // a new tab (same browser: the autosave holds the edited case too; the link must win, not it)
  const other = await context.newPage();
  const otherErrors = watchErrors(other);
  await other.goto(link.pathname + link.search);
  await other.waitForFunction(() => {
    const h = (window as unknown as Hooked).__decentra;
    const b = h?.binocular();
    return !!b && b.updates() > 0 && b.frames() > 1;
  });
  expect(await other.evaluate(() => (window as unknown as Hooked).__decentra.workspace())).toBe('both');
  expect(await docOf(other)).toEqual(doc);
  await expect(other.locator('#workspace-both input[data-field="right.sphere"]')).toHaveValue('-6.25');
  await expect(other.locator('#workspace-both input[data-field="case.dbl"]')).toHaveValue('20.0');
  await expect.poll(() => panelNumbers(other)).toEqual(numbers);
  await expect(other.locator('.persist-notice').last()).toContainText('Opened the both-eyes case from the link');
  await expectNoNonFinite(other);
  await other.screenshot({ path: `${SHOTS}/link-both-opened.png` });
  expect(otherErrors).toEqual([]);

  // a link whose case has a value out of range is refused whole, naming the field
  const bad = structuredClone(doc);
  bad.left.axis = 181;
  const third = await context.newPage();
  await third.goto(`/?case=${encodeURIComponent(JSON.stringify(bad))}`);
  await expect(third.locator('.persist-notice--error')).toContainText('left.axis');
  await expect(third.locator('.persist-notice--error')).toContainText('Nothing of it was used');
  expect((await docOf(third)).left.axis).not.toBe(181);
});

test('both eyes: the lenses are edged to the frame’s box, the bridge between them', async ({ page }) => {
  await openApp(page);
  await showWorkspace(page, 'both');
  const doc = await docOf(page);
  const frame = doc.frame!;
  // the demo's frame (an invented scenario): A 54, B 38, DBL 18 mm
  expect(frame).toEqual({ a: 54, b: 38, dbl: 18 });
  const ext = await page.evaluate(() => (window as unknown as Hooked).__decentra.binocular()!.lensExtents());
  for (const side of ['right', 'left'] as const) {
    expect(ext[side].shape).toBe('edged');
    // each lens is A wide (the box's width, ISO 8624); untilted across, so exact to rounding
    expect(ext[side].xMax - ext[side].xMin).toBeCloseTo(frame.a, 1);
  }
  // the boxes are DBL apart, either side of the middle of the bridge (x = 0): the lenses do not overlap
  expect(-ext.right.xMax).toBeCloseTo(frame.dbl / 2, 1);
  expect(ext.left.xMin).toBeCloseTo(frame.dbl / 2, 1);
  // boxed centres A + DBL apart
  const centre = (e: Extent) => (e.xMin + e.xMax) / 2;
  expect(centre(ext.left) - centre(ext.right)).toBeCloseTo(frame.a + frame.dbl, 1);
  // B tall, less the tilt's foreshortening (pantoscopic 8°: cos 8° = 0.990), plus the glass's depth
  for (const side of ['right', 'left'] as const) {
    const h = ext[side].yMax - ext[side].yMin;
    expect(h).toBeGreaterThan(frame.b * Math.cos((8 * Math.PI) / 180) - 0.5);
    expect(h).toBeLessThan(frame.b + 3);
  }
  await page.locator('.bi-viewport .view-buttons button[data-view="front"]').click();
  await page.screenshot({ path: `${SHOTS}/both-framed-front.png` });

  // a wider bridge moves the lenses apart, the scene following the case
  await page.locator('#workspace-both input[data-field="case.dbl"]').fill('24');
  await page.keyboard.press('Tab');
  await expect.poll(async () => (await page.evaluate(() => (window as unknown as Hooked).__decentra.binocular()!.lensExtents())).left.xMin, { timeout: 10_000 })
    .toBeCloseTo(12, 1);
  // without a frame the lenses are round blanks again
  await page.locator('#workspace-both select[data-field="case.ocMode"]').selectOption({ label: 'Direct: x, y from each pupil' });
  await page.locator('#workspace-both select[data-field="case.frame"]').selectOption({ label: 'None given' });
  await expect.poll(async () => (await docOf(page)).frame).toBeUndefined();
  await expect.poll(async () => (await page.evaluate(() => (window as unknown as Hooked).__decentra.binocular()!.lensExtents())).right.shape)
    .toBe('round');
  await page.locator('.bi-viewport .view-buttons button[data-view="overview"]').click();
  await page.screenshot({ path: `${SHOTS}/both-after-frame-edit.png` });
});

/** WCAG 2.1's relative luminance of an sRGB colour and the contrast ratio of two. */
function contrast(fg: [number, number, number], bg: [number, number, number]): number {
  const lum = ([r, g, b]: [number, number, number]) => {
    const c = (v: number) => {
      const s = v / 255;
      return s <= 0.03928 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
    };
    return 0.2126 * c(r) + 0.7152 * c(g) + 0.0722 * c(b);
  };
  const a = lum(fg), b = lum(bg);
  return (Math.max(a, b) + 0.05) / (Math.min(a, b) + 0.05);
}

test('the control column: the app’s own theme, readable (WCAG 2.1 AA contrast)', async ({ page }) => {
  await openApp(page);
  for (const ws of ['single', 'both', 'range'] as const) {
    await showWorkspace(page, ws);
    const pairs = await page.evaluate((w) => {
      const root = document.querySelector(`#workspace-${w} .controls`)!;
      const rgb = (s: string): [number, number, number, number] => {
        const m = s.match(/[\d.]+/g)!.map(Number);
        return [m[0]!, m[1]!, m[2]!, m[3] ?? 1];
      };
      /** the colour behind an element: the first ancestor with an opaque background */
      const behind = (e: Element | null): [number, number, number, number] => {
        for (let x = e; x; x = x.parentElement) {
          const c = rgb(getComputedStyle(x).backgroundColor);
          if (c[3] > 0.99) return c;
        }
        return [255, 255, 255, 1];
      };
      const out: { what: string; fg: number[]; bg: number[]; size: string }[] = [];
      const take = (what: string, sel: string) => {
        const e = root.querySelector(sel);
        if (!e) return;
        out.push({ what, fg: rgb(getComputedStyle(e).color), bg: behind(e), size: getComputedStyle(e).fontSize });
      };
      take('column heading', '.lil-gui.lil-root > .lil-title');
      take('group heading', '.lil-gui.lil-root > .lil-children > .lil-gui > .lil-title');
      take('field name', '.lil-controller > .lil-name');
      take('typed value', '.lil-controller.lil-string input');
      take('choice', '.lil-controller.lil-option .lil-display');
      take('hint', '.controls-hint');
      take('undo (enabled or not)', '.undo-button');
      return out;
    }, ws);
    expect(pairs.length, `checked in ${ws}`).toBeGreaterThanOrEqual(5);
    for (const p of pairs) {
      const r = contrast(p.fg.slice(0, 3) as [number, number, number], p.bg.slice(0, 3) as [number, number, number]);
      // a disabled control is exempt from 1.4.3 (WCAG 2.1, "Incidental"), but ours keeps 3:1 all the same
      const need = p.what.startsWith('undo') ? 3 : 4.5;
      expect(r, `${ws}: ${p.what} ${JSON.stringify(p)}`).toBeGreaterThanOrEqual(need);
    }
    // the theme, not the library's stock look: the app's paper, chrome and accent colours
    const look = await page.evaluate((w) => {
      const gui = document.querySelector<HTMLElement>(`#workspace-${w} .controls .lil-gui.lil-root`)!;
      const title = gui.querySelector<HTMLElement>(':scope > .lil-title')!;
      const group = gui.querySelector<HTMLElement>(':scope > .lil-children > .lil-gui > .lil-title')!;
      const cs = getComputedStyle(document.documentElement);
      return {
        bg: getComputedStyle(gui).backgroundColor,
        titleColor: getComputedStyle(title).color,
        titleRule: getComputedStyle(title).borderBottomColor,
        groupRule: getComputedStyle(group).borderBottomWidth,
        font: getComputedStyle(gui).fontFamily,
        panel: cs.getPropertyValue('--panel').trim(),
      };
    }, ws);
    expect(look.bg).toBe('rgb(241, 243, 241)'); // --panel, #f1f3f1
    expect(look.titleColor).toBe('rgb(18, 52, 59)'); // --chrome, #12343b
    expect(look.titleRule).toBe('rgb(18, 52, 59)');
    expect(look.groupRule).toBe('1px');
    expect(look.font).toMatch(/system-ui/);
    await page.locator(`#workspace-${ws} .controls`).screenshot({ path: `${SHOTS}/theme-${ws}.png` });
  }
});

test('range: undo and redo by keyboard and by button; the fields and the table follow', async ({ page }) => {
  await openApp(page);
  await showWorkspace(page, 'range');
  const undo = page.locator('#range-undo'), redo = page.locator('#range-redo');
  await expect(undo).toBeDisabled();
  await expect(redo).toBeDisabled();
  const hook = () => page.evaluate(() => {
    const r = (window as unknown as Hooked).__decentra.range()!;
    return { updates: r.updates, valid: r.valid, rows: r.rows(), form: r.form() };
  });
  const first = await hook();
  const field = (k: string) => page.locator(`#workspace-range input[data-range-field="${k}"]`);
  /** the rows the range module gives for a family (src/case/range.ts, the rows the CLI prints) */
  const rowsOf = (f: FamilyForm) => rangeRows(readRangeSpec(rangeInput(f))).length;
  const settle = async (n: number) => {
    await page.waitForFunction((k) => {
      const r = (window as unknown as Hooked).__decentra.range()!;
      return r.updates > k && r.valid;
    }, n);
  };
  expect(first.rows).toBe(rowsOf(first.form));

  let n = (await hook()).updates;
  await field('power').fill('-4:4:1');
  await page.keyboard.press('Tab');
  await settle(n);
  n = (await hook()).updates;
  await field('maxPrism').fill('1');
  await page.keyboard.press('Tab');
  await settle(n);
  const second = await hook();
  expect(second.form.power).toBe('-4:4:1');
  expect(second.form.maxPrism).toBe('1');
  expect(second.rows).toBe(rowsOf(second.form));
  await expect(undo).toBeEnabled();

  // a refused value is not a step
  await field('power').fill('-4:abc:1');
  await page.keyboard.press('Tab');
  await expect(page.locator('#workspace-range .field-error:visible')).toHaveCount(1);

  // undo by keyboard: back past the refused value to the last valid family, the table following
  n = (await hook()).updates;
  await page.keyboard.press('Control+z');
  await settle(n);
  await expect(field('power')).toHaveValue('-4:4:1');
  await expect(field('maxPrism')).toHaveValue('0.5');
  await expect(page.locator('#workspace-range .field-error:visible')).toHaveCount(0);
  n = (await hook()).updates;
  await page.keyboard.press('Control+z');
  await settle(n);
  const back = await hook();
  expect(back.form).toEqual(first.form);
  expect(back.rows).toBe(first.rows);
  await expect(undo).toBeDisabled();
  await expect(redo).toBeEnabled();
  await page.screenshot({ path: `${SHOTS}/range-undo.png` });

  // redo by keyboard, then by button
  n = (await hook()).updates;
  await page.keyboard.press('Control+Shift+z');
  await settle(n);
  await expect(field('power')).toHaveValue('-4:4:1');
  n = (await hook()).updates;
  await redo.click();
  await settle(n);
  expect((await hook()).form).toEqual(second.form);
  await expect(redo).toBeDisabled();
  // by button back, then a new edit clears redo
  n = (await hook()).updates;
  await undo.click();
  await settle(n);
  await expect(redo).toBeEnabled();
  n = (await hook()).updates;
  await field('cyl').fill('-1');
  await page.keyboard.press('Tab');
  await settle(n);
  await expect(redo).toBeDisabled();
  await expect(undo).toBeEnabled();
  // the keys reach only the workspace shown: in "Single lens", Ctrl+Z leaves the family alone
  await showWorkspace(page, 'single');
  const before = (await hook()).form;
  await page.locator('body').click({ position: { x: 640, y: 10 } });
  await page.keyboard.press('Control+z');
  await page.waitForTimeout(300);
  expect((await hook()).form).toEqual(before);
  await expectNoNonFinite(page);
});
