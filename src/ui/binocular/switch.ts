/**
 * The workspace switch in the header: "Single lens" (the visualiser of one lens), "Both
 * eyes" (the binocular case) and "Range" (the decentration limits of a product range). A
 * workspace may be built the first time it is shown (a 3-D view needs its own WebGL
 * context), and the choice is remembered for the browser tab (sessionStorage), so a reload
 * keeps it. The switch only shows and hides; each workspace owns its state and elements.
 */

export type WorkspaceName = 'single' | 'both' | 'range';

const NAMES: readonly WorkspaceName[] = ['single', 'both', 'range'];
const STORAGE_KEY = 'decentra.workspace';

export interface WorkspaceEntry {
  /** the workspace's element (hidden while another is shown) */
  element: HTMLElement;
  /** build the workspace into its element; called once, the first time it is shown */
  mount?: () => void;
  /** called each time the workspace is shown (after mount) */
  shown?: () => void;
}

export interface WorkspaceSwitch {
  current(): WorkspaceName;
  show(name: WorkspaceName): void;
}

/**
 * Wire the switch: `entries` gives each workspace's element (and how to build it), `buttons`
 * the switch's buttons (data-workspace). The workspace remembered for this tab is shown.
 */
export function setupWorkspaceSwitch(
  entries: Partial<Record<WorkspaceName, WorkspaceEntry>>, buttons: HTMLButtonElement[],
): WorkspaceSwitch {
  let current: WorkspaceName = 'single';
  const mounted = new Set<WorkspaceName>();
  const show = (name: WorkspaceName): void => {
    const e = entries[name];
    if (!e) return;
    current = name;
    for (const n of NAMES) {
      const other = entries[n];
      if (other) other.element.hidden = n !== name;
    }
    document.body.dataset.workspace = name;
    for (const b of buttons) {
      const on = b.dataset.workspace === name;
      b.setAttribute('aria-selected', String(on));
      b.tabIndex = on ? 0 : -1;
    }
    if (!mounted.has(name)) {
      mounted.add(name);
      e.mount?.();
    }
    e.shown?.();
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
      const n = buttons.length;
      const j = (buttons.indexOf(b) + (e.key === 'ArrowRight' ? 1 : n - 1)) % n;
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
  show(NAMES.includes(saved as WorkspaceName) && entries[saved as WorkspaceName] ? saved as WorkspaceName : 'single');
  return { current: () => current, show };
}
