/**
 * Undo and redo of case edits (docs/visualiser.md, "Undo and redo"): one bounded history per
 * workspace, of valid case states only (a refused value is never a state), the buttons that
 * drive it and the keyboard shortcuts. Pure state here, the DOM in the two helpers below.
 */
import { el } from './resultsPane.ts';

/** How many states back undo can go. */
export const HISTORY_DEPTH = 100;
/** Edits of one field closer together than this (ms) are one step, as typing is. */
export const GROUP_MS = 1000;

export class History<T> {
  private readonly past: T[] = [];
  private readonly future: T[] = [];
  private lastGroup: string | null = null;
  private lastAt = -Infinity;

  constructor(
    private present: T,
    private readonly same: (a: T, b: T) => boolean,
    private readonly depth = HISTORY_DEPTH,
  ) {}

  /**
   * A new valid state. The same state as now is no step; an edit of the same group (field)
   * within GROUP_MS of the last one replaces it; any new step clears what redo had.
   */
  record(state: T, group: string | null = null, now = Date.now()): void {
    if (this.same(state, this.present)) return;
    const merge = group !== null && group === this.lastGroup && now - this.lastAt < GROUP_MS && this.past.length > 0;
    if (!merge) {
      this.past.push(this.present);
      if (this.past.length > this.depth) this.past.shift();
    }
    this.present = state;
    this.future.length = 0;
    this.lastGroup = group;
    this.lastAt = now;
  }

  /** Start again from `state`, with nothing to undo or redo (another case was opened). */
  reset(state: T): void {
    this.present = state;
    this.past.length = 0;
    this.future.length = 0;
    this.lastGroup = null;
  }

  /** The state before the present one (which redo can bring back), or null at the start. */
  undo(): T | null {
    const p = this.past.pop();
    if (p === undefined) return null;
    this.future.push(this.present);
    this.present = p;
    this.lastGroup = null;
    return p;
  }

  redo(): T | null {
    const n = this.future.pop();
    if (n === undefined) return null;
    this.past.push(this.present);
    this.present = n;
    this.lastGroup = null;
    return n;
  }

  get canUndo(): boolean { return this.past.length > 0; }
  get canRedo(): boolean { return this.future.length > 0; }
}

export interface UndoActions {
  undo(): void;
  redo(): void;
}

/** The Undo and Redo buttons of a workspace, at the top of `host`; sync() sets their state. */
export function undoButtons(host: HTMLElement, actions: UndoActions, idPrefix: string): (canUndo: boolean, canRedo: boolean) => void {
  const bar = el('div', 'undo-bar');
  bar.setAttribute('role', 'toolbar');
  bar.setAttribute('aria-label', 'Case edits');
  const mac = /Mac|iPhone|iPad/.test(navigator.platform);
  const mod = mac ? '⌘' : 'Ctrl+';
  const make = (what: 'undo' | 'redo', text: string, keys: string, shortcut: string): HTMLButtonElement => {
    const b = el('button', 'undo-button', text);
    b.type = 'button';
    b.id = `${idPrefix}-${what}`;
    b.dataset.action = what;
    b.title = `${what === 'undo' ? 'Undo the last case edit' : 'Redo the case edit undone'} (${keys})`;
    b.setAttribute('aria-keyshortcuts', shortcut);
    b.disabled = true;
    b.addEventListener('click', () => actions[what]());
    bar.append(b);
    return b;
  };
  const u = make('undo', '↶ Undo', `${mod}Z`, mac ? 'Meta+Z' : 'Control+Z');
  const r = make('redo', 'Redo ↷', `${mod}Shift+Z`, mac ? 'Meta+Shift+Z' : 'Control+Shift+Z');
  host.prepend(bar);
  return (canUndo, canRedo) => {
    u.disabled = !canUndo;
    r.disabled = !canRedo;
  };
}

/** The value each text field had when it took the focus (see typingInField). */
const atFocus = new WeakMap<HTMLElement, string>();
let tracking = false;

function isTextField(t: EventTarget | null): t is HTMLInputElement | HTMLTextAreaElement {
  return t instanceof HTMLTextAreaElement || (t instanceof HTMLInputElement && (t.type === 'text' || t.type === 'search' || t.type === ''));
}

/**
 * Whether the focus is in a text field whose text changed since it took the focus: there the
 * browser's own text undo runs, and the case's undo waits until the field is left (or Enter).
 */
function typingInField(): boolean {
  const a = document.activeElement;
  return isTextField(a) && atFocus.has(a) && atFocus.get(a) !== a.value;
}

/** After the case's undo, the focused field's text counts as untouched again. */
function rebaseFocused(): void {
  const a = document.activeElement;
  if (isTextField(a)) atFocus.set(a, a.value);
}

/**
 * Ctrl/Cmd+Z undoes and Shift+Ctrl/Cmd+Z (or Ctrl+Y) redoes a case edit of the workspace in
 * `root` while it is shown, except while text is being typed in a field (typingInField).
 */
export function bindUndoKeys(root: HTMLElement, actions: UndoActions): () => void {
  if (!tracking) {
    tracking = true;
    document.addEventListener('focusin', (e) => {
      if (isTextField(e.target)) atFocus.set(e.target, e.target.value);
    });
  }
  const onKey = (e: KeyboardEvent): void => {
    if (!(e.ctrlKey || e.metaKey) || e.altKey || e.defaultPrevented) return;
    const k = e.key.toLowerCase();
    const redo = (k === 'z' && e.shiftKey) || (k === 'y' && !e.shiftKey && e.ctrlKey);
    if (!redo && !(k === 'z' && !e.shiftKey)) return;
    if (root.hidden || root.closest('[hidden]') || !root.isConnected) return;
    if (typingInField()) return;
    e.preventDefault();
    if (redo) actions.redo();
    else actions.undo();
    rebaseFocused();
  };
  // in the capture phase: lil-gui stops key events from leaving its panel, and the browser's
  // own undo (which reaches any field of the page) must be prevented before it runs
  window.addEventListener('keydown', onKey, true);
  return () => window.removeEventListener('keydown', onKey, true);
}
