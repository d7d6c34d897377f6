/**
 * Shared steps for the visualiser's end-to-end tests (Playwright, Debian Chromium).
 */
import { type Page, expect } from '@playwright/test';
import { mkdirSync } from 'node:fs';

export const SHOTS = 'test-results/screenshots';
mkdirSync(SHOTS, { recursive: true });

/** The test hook the app exposes on window (see src/main.ts). */
export interface Hook {
  updates: number;
  lastUpdateMs: number;
  memory(): { geometries: number; textures: number };
  frames(): number;
  renderNow(): void;
  rebuildScene(n: number): void;
  handlePosition(): { x: number; y: number };
  viewCase(): Record<string, string>;
  valid(): boolean;
  mapDrawn(): number;
}

/** Collect console errors and page errors from the moment the page is created. */
export function watchErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(`console: ${m.text()}`);
  });
  page.on('pageerror', (e) => errors.push(`page: ${e.message}`));
  page.on('requestfailed', (r) => errors.push(`request failed: ${r.url()}`));
  return errors;
}

/** Open the app (optionally with a query) and wait until the first case is drawn. */
export async function openApp(page: Page, query = ''): Promise<void> {
  await page.goto(`/${query}`);
  await page.waitForFunction(() => {
    const h = (window as unknown as { __decentra?: Hook }).__decentra;
    return !!h && h.updates > 0 && h.frames() > 1;
  });
}

export function field(page: Page, key: string) {
  return page.locator(`input[data-field="${key}"], select[data-field="${key}"]`);
}

/** Type a value into a text field the way a person does (select all, type). */
export async function setField(page: Page, key: string, value: string): Promise<void> {
  const f = field(page, key);
  await f.fill(value);
}

/** Choose an option of a select by its visible label (lil-gui's option values are indices). */
export async function selectField(page: Page, key: string, label: string): Promise<void> {
  await field(page, key).selectOption({ label });
}

/** Full-precision value of a panel number: answer row and quantity (h, v, mag, angle, prism, percent). */
export async function panelValue(page: Page, answer: string, q: string): Promise<number> {
  const s = page.locator(`[data-answer="${answer}"] [data-q="${q}"]`).first();
  const v = await s.getAttribute('data-value');
  expect(v, `panel value ${answer}/${q}`).not.toBeNull();
  return Number(v);
}

export async function panelText(page: Page, answer: string, q: string): Promise<string> {
  return (await page.locator(`[data-answer="${answer}"] [data-q="${q}"]`).first().textContent()) ?? '';
}

/** Pixel statistics of the WebGL canvas (drawn into a 2-D canvas). */
export async function canvasStats(page: Page, selector: string): Promise<{ distinct: number; std: number; w: number; h: number }> {
  return page.evaluate((sel) => {
    const c = document.querySelector(sel) as HTMLCanvasElement;
    const t = document.createElement('canvas');
    t.width = c.width;
    t.height = c.height;
    const ctx = t.getContext('2d')!;
    ctx.drawImage(c, 0, 0);
    const d = ctx.getImageData(0, 0, t.width, t.height).data;
    const seen = new Set<number>();
    let sum = 0, sum2 = 0, n = 0;
    for (let i = 0; i < d.length; i += 4 * 7) {
      const lum = 0.299 * d[i]! + 0.587 * d[i + 1]! + 0.114 * d[i + 2]!;
      sum += lum; sum2 += lum * lum; n++;
      seen.add((d[i]! << 16) | (d[i + 1]! << 8) | d[i + 2]!);
    }
    const mean = sum / n;
    return { distinct: seen.size, std: Math.sqrt(Math.max(0, sum2 / n - mean * mean)), w: t.width, h: t.height };
  }, selector);
}

/** Nothing on screen may read NaN or Infinity. */
export async function expectNoNonFinite(page: Page): Promise<void> {
  const text = await page.locator('body').innerText();
  expect(text).not.toMatch(/\bNaN\b|Infinity/);
}
