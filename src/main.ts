/**
 * The app: reads what was saved, mounts the workspaces ("Single lens" in ui/single, "Both
 * eyes" in ui/binocular, "Range" in ui/range) behind the header's switch, and starts saving
 * (ui/persist). Each
 * workspace owns its state, controls, panel and scene; this file only wires them together.
 */
import 'uplot/dist/uPlot.min.css';
import './ui/styles.css';
import { DEFAULT_DISPLAY, caseFromQuery } from './case/url.ts';
import { DEMO_CASE } from './demo/demoCase.ts';
import { COLORS, css } from './scene/palette.ts';
import { BinocularWorkspace } from './ui/binocular/workspace.ts';
import { RangeWorkspace } from './ui/range/workspace.ts';
import { setupWorkspaceSwitch } from './ui/binocular/switch.ts';
import { CaseStore } from './ui/caseStore.ts';
import { type Persistence, readSaved, startPersistence } from './ui/persist/index.ts';
import { SingleLensWorkspace } from './ui/single/workspace.ts';

const $ = <T extends HTMLElement = HTMLElement>(id: string): T => document.getElementById(id) as T;

for (const [name, hex] of Object.entries({
  exact: COLORS.exact, prentice: COLORS.prentice, paraxial: COLORS.paraxial, focimeter: COLORS.focimeter,
  undeviated: COLORS.undeviated, visual: COLORS.visualPoint,
})) document.documentElement.style.setProperty(`--c-${name}`, css(hex));

function toast(text: string): void {
  const t = $('toast');
  t.textContent = text;
  t.hidden = false;
  window.setTimeout(() => { t.hidden = true; }, 3500);
}

// what was saved before (docs/saving.md); a link that carries a single-lens case wins for that view
const saved = readSaved(location.search);
const parsed = caseFromQuery(saved.view.query, DEMO_CASE, DEFAULT_DISPLAY);
/** The binocular case: one store for the whole app ("Both eyes", saving), restored if autosaved. */
const caseStore = new CaseStore(saved.working?.doc);
let persistence: Persistence | null = null;

const single = new SingleLensWorkspace($('workspace-single'), {
  viewCase: parsed.viewCase,
  display: parsed.display,
  badge: { host: $('case-badge'), kind: $('case-kind'), desc: $('case-desc') },
  onQuery: (q) => persistence?.viewChanged(q),
  toast,
});
$('copy-link').addEventListener('click', () => single.copyLink());

/** What the end-to-end tests and the browser benchmark read (nothing else uses it). */
const hook = Object.assign(single.hook(), { parsedIgnored: parsed.ignored, caseStore });
(window as unknown as { __decentra: typeof hook }).__decentra = hook;

persistence = startPersistence({ saved, store: caseStore, menuHost: $('case-menu'), getViewCase: () => single.getCase() });
if (parsed.ignored.length) toast(`Some link values were not understood and were left at the demo's: ${parsed.ignored.join(', ')}`);
single.start();

// the workspace switch: "Single lens" (above), "Both eyes" (on the same caseStore) and "Range"
// (its cells open a lens in "Single lens"); the last two are built when first shown
let binocular: BinocularWorkspace | null = null;
let range: RangeWorkspace | null = null;
const workspaces = setupWorkspaceSwitch({
  single: { element: $('workspace-single') },
  both: { element: $('workspace-both'), mount: () => { binocular = new BinocularWorkspace($('workspace-both'), caseStore); } },
  range: {
    element: $('workspace-range'),
    mount: () => {
      range = new RangeWorkspace($('workspace-range'), {
        onOpen: (c) => { workspaces.show('single'); single.open(c); },
        exporter: persistence?.exports ?? null,
      });
    },
  },
}, Array.from(document.querySelectorAll<HTMLButtonElement>('#workspace-switch button')));
Object.assign(hook, {
  workspace: workspaces.current, showWorkspace: workspaces.show,
  binocular: () => binocular?.hook() ?? null, range: () => range?.hook() ?? null,
});
