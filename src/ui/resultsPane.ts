/**
 * What the single-lens and both-eyes result panels share: an element helper, a status line
 * ("Up to date", or stale with the reason), and a body the panel fills. User text only ever
 * goes in through textContent.
 */

export function el<K extends keyof HTMLElementTagNameMap>(tag: K, cls?: string, text?: string): HTMLElementTagNameMap[K] {
  const e = document.createElement(tag);
  if (cls) e.className = cls;
  if (text !== undefined) e.textContent = text;
  return e;
}

export class ResultsPane {
  readonly root: HTMLElement;
  protected readonly status: HTMLElement;
  protected readonly body: HTMLElement;

  constructor(root: HTMLElement) {
    this.root = root;
    this.status = el('div', 'results-status');
    this.status.setAttribute('role', 'status');
    this.status.setAttribute('aria-live', 'polite');
    this.body = el('div', 'results-body');
    root.append(this.status, this.body);
  }

  /** Start a fresh, current result: the body, emptied. */
  protected begin(): HTMLElement {
    this.root.classList.remove('stale');
    this.status.dataset.state = 'current';
    this.status.textContent = 'Up to date';
    this.body.replaceChildren();
    return this.body;
  }

  /** Keep the last valid result, marked stale, with the reason. */
  setStale(message: string): void {
    this.root.classList.add('stale');
    this.status.dataset.state = 'stale';
    this.status.textContent = `Stale: ${message}. The figures below are the last valid result.`;
  }

  /** No valid result yet (e.g. a link whose case is invalid from the start). */
  setEmpty(message: string): void {
    this.root.classList.add('stale');
    this.status.dataset.state = 'stale';
    this.status.textContent = `Invalid input: ${message}.`;
    this.body.replaceChildren(el('p', 'results-summary', 'Correct the highlighted field to see the answers.'));
  }
}
