/**
 * Saving in the app, wired (docs/saving.md): read what was saved before the page starts
 * (readSaved), then keep the binocular case and the single-lens view saved, and mount the
 * header's Case menu, the notices and the export panel (startPersistence).
 */
import type { ViewCase } from '../../case/url.ts';
import type { CaseStore } from '../caseStore.ts';
import { ExportPanel } from '../exports/exportPanel.ts';
import { CaseMenu, caseTitle, whenSaved } from './caseMenu.ts';
import { CaseKeeper } from './keeper.ts';
import { Notices } from './notices.ts';
import {
  type KeyValueStore, RECENT_KEY, type WorkingEntry, chooseViewQuery, loadView, loadWorking, saveView, storageProblem,
} from './storage.ts';

export interface SavedState {
  storage: KeyValueStore | null;
  working: WorkingEntry | null;
  /** the query the single-lens view starts from, and where it came from */
  view: { query: string; from: 'link' | 'storage' | 'none' };
  /** problems found while reading (shown once the page is up; a notice with the same key replaces it) */
  problems: { key: string; text: string }[];
}

/** The page's localStorage, if the browser lets this page use it. */
function pageStorage(): { storage: KeyValueStore | null; problem?: string } {
  try {
    const s = window.localStorage;
    const probe = 'decentra.probe';
    s.setItem(probe, '1');
    s.removeItem(probe);
    return { storage: s };
  } catch (e) {
    let s: KeyValueStore | null = null;
    try {
      s = window.localStorage; // full, but still readable
      s.getItem('decentra.probe');
    } catch {
      s = null;
    }
    return {
      storage: s,
      problem: `Autosave is not available: ${storageProblem(e)}. Your work stays open in this tab; use Case › Save as file to keep it.`,
    };
  }
}

/** Read the saved state (before the page builds its views). */
export function readSaved(locationSearch: string): SavedState {
  const problems: { key: string; text: string }[] = [];
  const { storage, problem } = pageStorage();
  if (problem) problems.push({ key: 'autosave', text: problem });
  const w = loadWorking(storage);
  if (w.problem) problems.push({ key: 'working-read', text: w.problem });
  const v = loadView(storage);
  if (v.problem) problems.push({ key: 'view-read', text: v.problem });
  return { storage, working: w.entry, view: chooseViewQuery(locationSearch, v.query), problems };
}

export interface PersistenceOptions {
  saved: SavedState;
  store: CaseStore;
  /** the header element that becomes the Case menu */
  menuHost: HTMLElement;
  getViewCase: () => ViewCase;
  /** where notices go (the page's notice line); a new stack at the end of the page if absent */
  notices?: Notices;
}

export interface Persistence {
  /** the single-lens view's query changed (called where the address bar is written) */
  viewChanged(query: string): void;
  keeper: CaseKeeper;
  menu: CaseMenu;
  exports: ExportPanel;
  notices: Notices;
}

export function startPersistence(o: PersistenceOptions): Persistence {
  const notices = o.notices ?? new Notices();
  const notify = notices.show.bind(notices);
  for (const p of o.saved.problems) notify('error', p.text, p.key);
  const storage = o.saved.storage;
  let menu: CaseMenu | null = null;
  const keeper = new CaseKeeper({
    storage, store: o.store, restored: o.saved.working, notify, onRecent: (list) => menu?.renderRecent(list),
    // two tabs edited one case: say which state is where, and offer the other tab's here
    onConflict: ({ theirs, mine }) => notify(
      'error',
      `“${caseTitle(theirs.doc)}” was also changed in another tab (saved ${whenSaved(theirs.savedAt)}). Both versions are kept: ` +
      `the other tab's under its own entry in Case › Recent cases, and this tab's, which stays open here, as a separate recent case (saved ${whenSaved(mine.savedAt)}).`,
      'conflict',
      { label: 'Open the other tab’s version', run: () => menu?.openRecent(theirs) },
    ),
  });
  const exportsPanel = new ExportPanel({ getViewCase: o.getViewCase, notify });
  menu = new CaseMenu({ host: o.menuHost, store: o.store, keeper, notify, onExport: (k) => exportsPanel.show(k) });
  if (o.saved.working) {
    notify('info', `Restored the autosaved case “${caseTitle(o.saved.working.doc)}” (saved ${whenSaved(o.saved.working.savedAt)}).`, 'restore');
  }
  if (o.saved.view.from === 'storage') notify('info', 'Restored the single-lens case you were working on.', 'restore-view');

  const flush = () => keeper.flush();
  window.addEventListener('pagehide', flush);
  // another tab wrote the recent list: show its cases too (each save merges in any case)
  window.addEventListener('storage', (e) => {
    if (e.key === RECENT_KEY || e.key === null) keeper.refresh();
  });
  document.addEventListener('visibilitychange', () => {
    if (document.visibilityState === 'hidden') flush();
  });

  // a storage known to be unusable at start-up is said once already
  let viewFailing = o.saved.problems.some((p) => p.key === 'autosave');
  let lastView = '';
  return {
    viewChanged(query: string) {
      if (query === lastView) return;
      lastView = query;
      const r = saveView(storage, query);
      // one notice about the storage at a time (the key is shared with the case's autosave)
      if (!r.ok && !viewFailing) notify('error', `Autosave failed: ${r.reason}. The single-lens case stays in the address bar (Copy link keeps it); use Case › Save as file for the binocular case.`, 'autosave');
      viewFailing = !r.ok;
    },
    keeper,
    menu,
    exports: exportsPanel,
    notices,
  };
}
