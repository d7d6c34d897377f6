/**
 * The app: reads what was saved, mounts the workspaces ("Single lens" in ui/single, "Both
 * eyes" in ui/binocular, "Range" in ui/range) behind the header's switch, and starts saving
 * (ui/persist). Each
 * workspace owns its state, controls, panel and scene; this file only wires them together.
 */
import 'uplot/dist/uPlot.min.css';
import './ui/styles.css';
import './ui/controls.css';
import { DEFAULT_DISPLAY, binocularFromQuery, binocularToQuery, caseFromQuery } from './case/url.ts';
import { DEMO_CASE } from './demo/demoCase.ts';
import { COLORS, css } from './scene/palette.ts';
import { BinocularWorkspace } from './ui/binocular/workspace.ts';
import { RangeWorkspace } from './ui/range/workspace.ts';
import { setupWorkspaceSwitch } from './ui/binocular/switch.ts';
import { CaseStore } from './ui/caseStore.ts';
import { copyLink, pageLink } from './ui/copyLink.ts';
import { caseTitle } from './ui/persist/caseMenu.ts';
import { type Persistence, readSaved, startPersistence } from './ui/persist/index.ts';
import { Notices } from './ui/persist/notices.ts';
import { SingleLensWorkspace } from './ui/single/workspace.ts';

const $ = <T extends HTMLElement = HTMLElement>(id: string): T => document.getElementById(id) as T;

for (const [name, hex] of Object.entries({
  exact: COLORS.exact, prentice: COLORS.prentice, paraxial: COLORS.paraxial, focimeter: COLORS.focimeter,
  undeviated: COLORS.undeviated, visual: COLORS.visualPoint,
})) document.documentElement.style.setProperty(`--c-${name}`, css(hex));

/** The page's notices, in the notice line under the header: they cover nothing (ui/persist/notices.ts). */
const notices = new Notices($('notice-area'));
/** A short message to the person (goes after a few seconds; a newer one replaces it). */
function toast(text: string): void {
  notices.show('info', text, 'toast');
}

// what was saved before (docs/saving.md); a link that carries a single-lens case wins for that view
const saved = readSaved(location.search);
const parsed = caseFromQuery(saved.view.query, DEMO_CASE, DEFAULT_DISPLAY);
// a link that carries a both-eyes case opens it in "Both eyes" (checked whole, as a file is)
const linked = binocularFromQuery(location.search);
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

/** What the end-to-end tests and the browser benchmark read (nothing else uses it). */
const hook = Object.assign(single.hook(), { parsedIgnored: parsed.ignored, caseStore });
(window as unknown as { __decentra: typeof hook }).__decentra = hook;

persistence = startPersistence({ saved, store: caseStore, menuHost: $('case-menu'), getViewCase: () => single.getCase(), notices });
if (linked?.ok) {
  // opened as a file is: the case before keeps its own recent entry, this one starts its own
  caseStore.set(linked.case.doc, 'open');
  notices.show('info', `Opened the both-eyes case from the link: “${caseTitle(linked.case.doc)}”.`, 'restore');
} else if (linked) {
  const e = linked.error;
  notices.show('error', `The both-eyes case in the link was not opened: ${e.field === 'file' ? `it ${e.reason}` : e.message}. Nothing of it was used.`, 'link');
}
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
if (linked?.ok) workspaces.show('both');

// "Copy link": the single-lens case, or the both-eyes case (the store's, the last valid one)
$('copy-link').addEventListener('click', () => {
  if (workspaces.current() !== 'both') {
    single.copyLink();
    return;
  }
  const pending = binocular && !binocular.valid ? ' (the last valid case: the value in error is not in it)' : '';
  copyLink(pageLink(binocularToQuery(caseStore.get().doc)), `the both-eyes case${pending}`, toast);
});
Object.assign(hook, {
  workspace: workspaces.current, showWorkspace: workspaces.show,
  binocular: () => binocular?.hook() ?? null, range: () => range?.hook() ?? null,
});
