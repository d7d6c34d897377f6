/**
 * The visualiser: wires the case (URL, controls), the engine (through ui/compute.ts), the
 * 3-D scene, the panel, the cross-section, the plots and the map worker.
 */
import 'uplot/dist/uPlot.min.css';
import './ui/styles.css';
import { type ViewCase, type ViewDisplay, type ViewField, DEFAULT_DISPLAY, caseFromQuery, caseToQuery } from './case/url.ts';
import { DEMO_CASE, DEMO_DESCRIPTION, DEMO_TITLE } from './demo/demoCase.ts';
import { DecentraScene } from './scene/decentraScene.ts';
import { COLORS, css } from './scene/palette.ts';
import { allocateRayPaths, buildRayPaths } from './scene/rayPaths.ts';
import { VIEW_NAMES, type ViewName } from './scene/viewer.ts';
import { CaseStore } from './ui/caseStore.ts';
import { type Computed, computeCase } from './ui/compute.ts';
import { Controls } from './ui/controls.ts';
import { CrossSection } from './ui/crossSection.ts';
import { num } from './ui/format.ts';
import { MapView } from './ui/mapView.ts';
import { Panel } from './ui/panel.ts';
import { type Persistence, readSaved, startPersistence } from './ui/persist/index.ts';
import { ProfilePlot } from './ui/profilePlot.ts';
import { setupWorkspaceSwitch } from './ui/binocular/switch.ts';

const $ = <T extends HTMLElement = HTMLElement>(id: string): T => document.getElementById(id) as T;

for (const [name, hex] of Object.entries({
  exact: COLORS.exact, prentice: COLORS.prentice, paraxial: COLORS.paraxial, focimeter: COLORS.focimeter,
  undeviated: COLORS.undeviated, visual: COLORS.visualPoint,
})) document.documentElement.style.setProperty(`--c-${name}`, css(hex));

// what was saved before (docs/saving.md); a link that carries a single-lens case wins for that view
const saved = readSaved(location.search);
const parsed = caseFromQuery(saved.view.query, DEMO_CASE, DEFAULT_DISPLAY);
/** The binocular case: one store for the whole app ("Both eyes", saving), restored if autosaved. */
const caseStore = new CaseStore(saved.working?.doc);
let persistence: Persistence | null = null;
let viewCase: ViewCase = parsed.viewCase;
let display: ViewDisplay = parsed.display;
let last: Computed | null = null;
let lastMapKey = '';
let lastDirection = 0;

const scene = new DecentraScene($('viewport'));
const panel = new Panel($('results'));
const section = new CrossSection($('pane-section'));
const profile = new ProfilePlot($('pane-profile'));
const map = new MapView($('pane-map'));
const paths = allocateRayPaths();
const controls = new Controls($('controls'), viewCase, display, {
  onCase: (c, field) => { viewCase = c; update(field); },
  onDisplay: (d) => { display = { ...d, tab: display.tab }; dirty.section = true; update(null); },
  onRestoreDemo: () => { viewCase = { ...DEMO_CASE }; controls.setCase(viewCase); update(null); },
  onCopyLink: copyLink,
});

// preset views
const viewButtons = $('view-buttons');
for (const [name, label] of Object.entries(VIEW_NAMES) as [ViewName, string][]) {
  const b = document.createElement('button');
  b.type = 'button';
  b.textContent = label;
  b.dataset.view = name;
  b.title = name === 'side' ? 'Side view, from the wearer’s right' : name === 'top' ? 'From above' : label;
  b.addEventListener('click', () => {
    scene.setView(name);
    for (const o of viewButtons.querySelectorAll('button')) o.setAttribute('aria-pressed', String(o === b));
  });
  viewButtons.append(b);
}

// key to the rays
const key = $('ray-key');
for (const [cls, color, text] of [
  ['', COLORS.exact, 'exact line of sight (traced)'],
  ['dashed', COLORS.prentice, 'Prentice’s rule, predicted'],
  ['dotted', COLORS.paraxial, 'first-order thick lens, predicted'],
  ['dotted', COLORS.undeviated, 'no lens (eye-side line continued)'],
] as const) {
  const li = document.createElement('li');
  const sw = document.createElement('span');
  sw.className = `swatch ${cls}`;
  sw.style.borderTopColor = css(color);
  li.append(sw, text);
  key.append(li);
}

/** Draw the cross-section or the profile if it is on screen and out of date. */
const dirty = { section: true, profile: true };
function drawTabs(): void {
  const r = last;
  if (!r) return;
  const a = r.answers;
  if (display.tab === 'section' && dirty.section) {
    dirty.section = false;
    buildRayPaths(a, display.mag, 70, paths);
    section.draw({ lens: r.lens, crMm: r.tc.crMm, directionDeg: r.directionDeg, decentrationMm: r.decentrationMm, paths, mag: display.mag });
  }
  if (display.tab === 'profile' && dirty.profile) {
    dirty.profile = false;
    profile.update({
      profile: r.profile, directionDeg: r.directionDeg, decentrationMm: r.decentrationMm,
      current: {
        prentice: a.prentice.magnitude, paraxial: a.paraxial.magnitude,
        exact: 'failure' in a.exact ? null : a.exact.magnitude,
        focimeter: 'failure' in a.focimeter ? null : a.focimeter.magnitude,
        errorPercent: a.error?.percent ?? null,
      },
    });
  }
}

// tabs
const tabs = Array.from(document.querySelectorAll<HTMLButtonElement>('.tabs button'));
function showTab(name: ViewDisplay['tab']): void {
  display = { ...display, tab: name };
  for (const t of tabs) {
    const on = t.dataset.tab === name;
    t.setAttribute('aria-selected', String(on));
    t.tabIndex = on ? 0 : -1;
    $(`pane-${t.dataset.tab}`).hidden = !on;
  }
  if (name === 'profile') profile.resize();
  drawTabs();
  writeUrl();
}
for (const t of tabs) {
  t.addEventListener('click', () => showTab(t.dataset.tab as ViewDisplay['tab']));
  t.addEventListener('keydown', (e) => {
    if (e.key !== 'ArrowRight' && e.key !== 'ArrowLeft') return;
    const i = tabs.indexOf(t), j = (i + (e.key === 'ArrowRight' ? 1 : tabs.length - 1)) % tabs.length;
    tabs[j]!.focus();
    showTab(tabs[j]!.dataset.tab as ViewDisplay['tab']);
  });
}

// picking the visual point in the scene, on the map or on the profile chart
function setPoint(x: number, y: number): void {
  const c = { ...viewCase };
  if (c.pointMode === 'polar') {
    let a = (Math.atan2(y, x) * 180) / Math.PI;
    if (a < 0) a += 360;
    c.dir = num(Math.hypot(x, y) > 0 ? a : 0, 1);
    c.dist = num(Math.hypot(x, y), 1);
  } else {
    c.x = num(x, 1);
    c.y = num(y, 1);
  }
  viewCase = c;
  controls.setCase(c);
  update(c.pointMode === 'polar' ? 'dist' : 'x');
}
scene.onPointPick = (x, y) => setPoint(x, y);
map.onPick = (x, y) => setPoint(x, y);
profile.onPick = (d) => {
  if (!last) return;
  const a = (last.directionDeg * Math.PI) / 180;
  const dd = Math.min(d, last.lens.radiusMm - 0.1);
  setPoint(Math.round(dd * Math.cos(a) * 10) / 10, Math.round(dd * Math.sin(a) * 10) / 10);
};

$('copy-link').addEventListener('click', copyLink);

/** Recompute and redraw everything for the current case (synchronously; the 3-D frame follows). */
function update(_field: ViewField | null): void {
  const t0 = performance.now();
  const out = computeCase(viewCase, lastDirection);
  const stale = $('viewport-stale');
  if (out.ok) {
    const r = out.result;
    last = r;
    lastDirection = r.directionDeg;
    controls.showError(null, null);
    stale.hidden = true;
    map.setStale(false);
    const a = r.answers;
    const label = (name: string, d: { magnitude: number } | { failure: string }): string =>
      'failure' in d ? `${name}: no answer` : `${name} ${num(d.magnitude, 2)} Δ`;
    scene.update({
      lens: r.lens, crMm: r.tc.crMm, answers: a,
      labels: {
        exact: label('exact', a.exact),
        prentice: `${label('Prentice', a.prentice)}${a.error ? ` (${a.error.prism > 0 ? '+' : ''}${num(a.error.prism, 2)} Δ)` : ''}`,
        paraxial: label('first-order', a.paraxial),
        focimeter: label('focimeter', a.focimeter),
      },
    }, { mag: display.mag, labels: display.labels, focimeterRay: display.focimeterRay });
    panel.render(r);
    // the cross-section and the profile are drawn when their tab is shown
    dirty.section = true;
    dirty.profile = true;
    drawTabs();
    const mapKey = JSON.stringify([r.lens.spec, r.tc.crMm, r.tc.eye, display.mapQuantity]);
    if (mapKey !== lastMapKey) {
      lastMapKey = mapKey;
      map.request({ spec: r.lens.spec, crMm: r.tc.crMm, eye: r.tc.eye, quantity: display.mapQuantity });
    }
    map.setPoint(r.tc.xMm, r.tc.yMm);
  } else {
    controls.showError(out.field, out.message);
    stale.hidden = false;
    stale.textContent = last
      ? `Invalid input (${out.message}). Showing the last valid lens, stale.`
      : `Invalid input: ${out.message}.`;
    if (last) {
      panel.setStale(out.message);
      scene.markInvalid();
    } else panel.setEmpty(out.message);
    map.setStale(true);
  }
  const mag = $('viewport-mag');
  mag.hidden = display.mag === 1;
  mag.textContent = `Deviations drawn ×${display.mag}, not to scale`;
  updateBadge();
  writeUrl();
  hook.lastUpdateMs = performance.now() - t0;
  hook.updates++;
}

function updateBadge(): void {
  const isDemo = caseToQuery(viewCase) === caseToQuery(DEMO_CASE);
  const kind = $('case-kind');
  kind.textContent = isDemo ? DEMO_TITLE : 'Your case';
  kind.classList.toggle('own', !isDemo);
  $('case-desc').textContent = isDemo ? DEMO_DESCRIPTION : 'Edited from the controls; the link in the address bar reproduces it.';
  $('case-badge').title = isDemo ? DEMO_DESCRIPTION : '';
}

/** The address bar follows the case, a moment after the last change (replaceState is not free). */
let urlTimer = 0;
function writeUrl(): void {
  if (urlTimer) return;
  urlTimer = window.setTimeout(writeUrlNow, 120);
}
function writeUrlNow(): void {
  if (urlTimer) window.clearTimeout(urlTimer);
  urlTimer = 0;
  const q = caseToQuery(viewCase, display);
  persistence?.viewChanged(q);
  if (location.search.slice(1) !== q) history.replaceState(null, '', `${location.pathname}?${q}`);
}
window.addEventListener('pagehide', writeUrlNow);

function toast(text: string): void {
  const t = $('toast');
  t.textContent = text;
  t.hidden = false;
  window.setTimeout(() => { t.hidden = true; }, 3500);
}

function copyLink(): void {
  writeUrlNow();
  const href = location.href;
  if (navigator.clipboard?.writeText) {
    navigator.clipboard.writeText(href).then(() => toast('Link to this case copied.'), () => toast(`Link to this case: ${href}`));
  } else toast(`Link to this case: ${href}`);
}

/** What the end-to-end tests and the browser benchmark read (nothing else uses it). */
const hook = {
  updates: 0,
  lastUpdateMs: 0,
  memory: () => ({ ...scene.viewer.renderer.info.memory }),
  frames: () => scene.viewer.frames,
  renderNow: () => scene.viewer.renderNow(),
  /** dispose and recreate the scene's objects n times, rendering after each */
  rebuildScene: (n: number) => {
    for (let i = 0; i < n; i++) {
      scene.rebuildContent();
      scene.viewer.renderNow();
    }
  },
  handlePosition: () => scene.handleClientPosition(),
  viewCase: () => ({ ...viewCase }),
  valid: () => $('viewport-stale').hidden,
  mapDrawn: () => map.drawn,
  /** request the current map again and resolve with its round trip (post to drawn), ms */
  mapRoundTrip: () => new Promise<{ roundTripMs: number; workerMs: number }>((resolve) => {
    if (!last) throw new Error('no valid case');
    const id = map.request({ spec: last.lens.spec, crMm: last.tc.crMm, eye: last.tc.eye, quantity: display.mapQuantity });
    const prev = map.onResult;
    map.onResult = (rid, rt, wm) => {
      if (rid !== id) return;
      map.onResult = prev;
      resolve({ roundTripMs: rt, workerMs: wm });
    };
  }),
  parsedIgnored: parsed.ignored,
  caseStore,
};
(window as unknown as { __decentra: typeof hook }).__decentra = hook;

persistence = startPersistence({ saved, store: caseStore, menuHost: $('case-menu'), getViewCase: () => ({ ...viewCase }) });
if (parsed.ignored.length) toast(`Some link values were not understood and were left at the demo's: ${parsed.ignored.join(', ')}`);
showTab(display.tab);
update(null);

// the workspace switch: "Single lens" (above) or "Both eyes" (ui/binocular, on the same caseStore)
const workspaces = setupWorkspaceSwitch(
  caseStore, $('workspace-single'), $('workspace-both'),
  Array.from(document.querySelectorAll<HTMLButtonElement>('#workspace-switch button')),
);
Object.assign(hook, { workspace: workspaces.current, showWorkspace: workspaces.show, binocular: () => workspaces.binocular()?.hook() ?? null });
