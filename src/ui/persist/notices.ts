/**
 * The app's notices (saving, opening, exporting, copied links): a stack in the notice line
 * between the header and the workspace (#notice-area in index.html). The line takes room in
 * the page's layout only while it holds a notice, so a notice covers nothing: not the view
 * buttons, not the results' status, not a control (docs/visualiser.md, "Notices"). A problem
 * stays until it is dismissed (or replaced by a notice with the same key); news goes after a
 * few seconds. Text only (textContent): nothing from a file or the storage is ever read as
 * markup.
 */
import type { NoticeAction, NoticeKind } from './keeper.ts';

/** How long news stays (ms); a problem stays until dismissed. */
export const INFO_MS = 6000;

export class Notices {
  readonly element: HTMLElement;
  private readonly byKey = new Map<string, HTMLElement>();

  constructor(parent: HTMLElement = document.body) {
    this.element = document.createElement('div');
    this.element.className = 'persist-notices';
    this.element.id = 'persist-notices';
    parent.append(this.element);
  }

  show(kind: NoticeKind, text: string, key?: string, action?: NoticeAction): void {
    if (key) this.byKey.get(key)?.remove();
    const n = document.createElement('div');
    n.className = `persist-notice persist-notice--${kind}`;
    n.setAttribute('role', kind === 'error' ? 'alert' : 'status');
    if (key) n.dataset.key = key;
    const p = document.createElement('p');
    p.textContent = text;
    const close = document.createElement('button');
    close.type = 'button';
    close.className = 'persist-notice-close';
    close.textContent = '×';
    close.title = 'Dismiss';
    close.setAttribute('aria-label', 'Dismiss this notice');
    close.addEventListener('click', () => n.remove());
    if (action) {
      // one action on the notice (e.g. open the other tab's version); the notice goes with it
      const act = document.createElement('button');
      act.type = 'button';
      act.className = 'persist-notice-action';
      act.textContent = action.label;
      act.addEventListener('click', () => { n.remove(); action.run(); });
      p.append(' ', act);
    }
    n.append(p, close);
    this.element.append(n);
    if (key) this.byKey.set(key, n);
    if (kind === 'info') {
      window.setTimeout(() => {
        n.remove();
        if (key && this.byKey.get(key) === n) this.byKey.delete(key);
      }, INFO_MS);
    }
  }
}
