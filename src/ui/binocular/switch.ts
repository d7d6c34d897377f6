/**
 * The workspace switch in the header: "Single lens" (the visualiser of one lens) or "Both
 * eyes" (the binocular case). The "both eyes" workspace is built the first time it is shown
 * (its 3-D view needs its own WebGL context), and the choice is remembered for the browser
 * tab (sessionStorage), so a reload keeps it.
 */
import type { CaseStore } from '../caseStore.ts';
import { BinocularWorkspace } from './workspace.ts';

export type WorkspaceName = 'single' | 'both';

const STORAGE_KEY = 'decentra.workspace';

export interface WorkspaceSwitch {
  current(): WorkspaceName;
  show(name: WorkspaceName): void;
  /** the "both eyes" workspace, once built */
  binocular(): BinocularWorkspace | null;
}

/**
 * Wire the switch. `single` is the single-lens workspace's element, `both` the empty element
 * that receives the "both eyes" workspace, `buttons` the switch's buttons (data-workspace).
 */
export function setupWorkspaceSwitch(
  store: CaseStore, single: HTMLElement, both: HTMLElement, buttons: HTMLButtonElement[],
): WorkspaceSwitch {
  let ws: BinocularWorkspace | null = null;
  let current: WorkspaceName = 'single';
  const show = (name: WorkspaceName): void => {
    current = name;
    single.hidden = name !== 'single';
    both.hidden = name !== 'both';
    document.body.dataset.workspace = name;
    for (const b of buttons) {
      const on = b.dataset.workspace === name;
      b.setAttribute('aria-selected', String(on));
      b.tabIndex = on ? 0 : -1;
    }
    if (name === 'both' && !ws) ws = new BinocularWorkspace(both, store);
    try {
      sessionStorage.setItem(STORAGE_KEY, name);
    } catch {
      // storage refused (private mode): the choice is simply not remembered
    }
  };
  for (const b of buttons) {
    b.addEventListener('click', () => show(b.dataset.workspace as WorkspaceName));
    b.addEventListener('keydown', (e) => {
      if (e.key !== 'ArrowRight' && e.key !== 'ArrowLeft') return;
      const j = (buttons.indexOf(b) + 1) % buttons.length;
      buttons[j]!.focus();
      show(buttons[j]!.dataset.workspace as WorkspaceName);
    });
  }
  let saved: string | null = null;
  try {
    saved = sessionStorage.getItem(STORAGE_KEY);
  } catch {
    saved = null;
  }
  show(saved === 'both' ? 'both' : 'single');
  return { current: () => current, show, binocular: () => ws };
}
