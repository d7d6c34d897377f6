/**
 * Browser benchmark of the visualiser (`npm run bench:browser`): builds the app, serves it
 * with vite preview, drives headless Chromium (software WebGL) and prints medians of
 *   (a) a control change -> the panel and the 3-D scene updated (goal: within one animation
 *       frame, i.e. the change is drawn in the very next frame), for a lens change (sphere,
 *       which rebuilds and re-solves the lens) and a visual-point change (one trace);
 *   (b) the 201 x 201 prism map (traces, colour map, contours) round trip through the worker
 *       (goal: under 30 ms).
 * Flags: --no-build (serve the existing dist/), --runs N (default 40).
 */
import { chromium } from '@playwright/test';
import { build, preview } from 'vite';
import { CHROMIUM_ARGS, CHROMIUM_PATH, VIEWPORT } from './browserChromium.ts';

const args = process.argv.slice(2);
const runs = Number(args[args.indexOf('--runs') + 1]) || 40;
const FRAME_MS = 1000 / 60;

function median(a: number[]): number {
  const s = [...a].sort((x, y) => x - y);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}
function p90(a: number[]): number {
  const s = [...a].sort((x, y) => x - y);
  return s[Math.min(s.length - 1, Math.floor(0.9 * s.length))]!;
}

if (!args.includes('--no-build')) await build({ logLevel: 'warn' });
const server = await preview({ preview: { port: 4391, strictPort: false, host: '127.0.0.1' }, logLevel: 'warn' });
const url = server.resolvedUrls?.local[0] ?? 'http://127.0.0.1:4391/';
const browser = await chromium.launch({ executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS });
try {
  const page = await browser.newPage({ viewport: VIEWPORT });
  await page.goto(url);
  await page.waitForFunction(() => {
    const d = (window as unknown as { __decentra?: { updates: number; frames(): number; mapDrawn(): number } }).__decentra;
    return !!d && d.updates > 0 && d.frames() > 1 && d.mapDrawn() > 0;
  });

  // (a) control change -> panel and scene, measured inside the page
  type Sample = { syncMs: number; paintedMs: number; nextFrame: boolean };
  const measure = (fieldKey: string, values: string[]) => page.evaluate(async ({ fieldKey, values }) => {
    const d = (window as unknown as { __decentra: { frames(): number } }).__decentra;
    const input = document.querySelector(`input[data-field="${fieldKey}"]`) as HTMLInputElement;
    const cell = document.querySelector('.results') as HTMLElement;
    const out: { syncMs: number; paintedMs: number; nextFrame: boolean }[] = [];
    for (const v of values) {
      // start just after a frame, as a person's key press lands at a random time in one
      await new Promise((r) => requestAnimationFrame(r));
      const before = cell.textContent;
      const f0 = d.frames();
      const t0 = performance.now();
      input.value = v;
      input.dispatchEvent(new Event('input'));
      const t1 = performance.now();
      if (cell.textContent === before) throw new Error(`the panel did not change for ${fieldKey} = ${v}`);
      // this callback is queued after the app's own frame request, so it runs after the draw
      await new Promise((r) => requestAnimationFrame(r));
      const t2 = performance.now();
      out.push({ syncMs: t1 - t0, paintedMs: t2 - t0, nextFrame: d.frames() === f0 + 1 });
    }
    return out;
  }, { fieldKey, values });

  const sph: string[] = [], xs: string[] = [];
  for (let i = 0; i < runs; i++) {
    sph.push((6 + (i % 16) * 0.25).toFixed(2));
    xs.push((4 + (i % 20) * 0.5).toFixed(1));
  }
  await measure('sphere', sph.slice(0, 5)); // warm-up
  const lensRuns: Sample[] = await measure('sphere', sph);
  await measure('sphere', ['+8.00']);
  const pointRuns: Sample[] = await measure('x', xs);

  // (b) map round trips through the worker
  const mapRuns = await page.evaluate(async (n) => {
    const d = (window as unknown as { __decentra: { mapRoundTrip(): Promise<{ roundTripMs: number; workerMs: number }> } }).__decentra;
    const out: { roundTripMs: number; workerMs: number }[] = [];
    for (let i = 0; i < n + 3; i++) {
      const r = await d.mapRoundTrip();
      if (i >= 3) out.push(r); // the first runs warm the worker's compiler
    }
    return out;
  }, Math.max(10, Math.round(runs / 2)));

  const row = (name: string, s: Sample[]): string => {
    const sync = s.map((x) => x.syncMs), painted = s.map((x) => x.paintedMs);
    const share = (100 * s.filter((x) => x.nextFrame).length) / s.length;
    return `${name.padEnd(34)} ${median(sync).toFixed(1).padStart(7)} ${p90(sync).toFixed(1).padStart(7)} ` +
      `${median(painted).toFixed(1).padStart(9)} ${share.toFixed(0).padStart(8)} %`;
  };
  console.log(`Decentra browser benchmark (Chromium, software WebGL, ${VIEWPORT.width}x${VIEWPORT.height}, ${runs} runs)`);
  console.log('');
  console.log('(a) control change -> panel + scene     update ms    p90   drawn ms   in next frame');
  console.log(row('lens change (sphere field)', lensRuns));
  console.log(row('visual point change (x field)', pointRuns));
  console.log(`    goal: drawn in the next animation frame (one frame = ${FRAME_MS.toFixed(1)} ms)`);
  console.log('');
  const rt = mapRuns.map((r) => r.roundTripMs), wk = mapRuns.map((r) => r.workerMs);
  console.log('(b) 201 x 201 map through the worker     median ms    p90');
  console.log(`${'round trip (post -> drawn)'.padEnd(38)} ${median(rt).toFixed(1).padStart(7)} ${p90(rt).toFixed(1).padStart(7)}`);
  console.log(`${'of which in the worker'.padEnd(38)} ${median(wk).toFixed(1).padStart(7)} ${p90(wk).toFixed(1).padStart(7)}`);
  console.log(`    goal: round trip under 30 ms: ${median(rt) < 30 ? 'met' : 'NOT met'} (median)`);
  console.log('');
  console.log(JSON.stringify({
    lensChange: { updateMsMedian: median(lensRuns.map((x) => x.syncMs)), drawnMsMedian: median(lensRuns.map((x) => x.paintedMs)), nextFrameShare: lensRuns.filter((x) => x.nextFrame).length / lensRuns.length },
    pointChange: { updateMsMedian: median(pointRuns.map((x) => x.syncMs)), drawnMsMedian: median(pointRuns.map((x) => x.paintedMs)), nextFrameShare: pointRuns.filter((x) => x.nextFrame).length / pointRuns.length },
    map: { roundTripMsMedian: median(rt), workerMsMedian: median(wk) },
  }));
} finally {
  await browser.close();
  await server.close();
}
