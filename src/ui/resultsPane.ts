/**
 * What the single-lens and both-eyes result panels share: element helpers (HTML and SVG), a status line
 * ("Up to date", or stale with the reason), and a body the panel fills. User text only ever
 * goes in through textContent.
 */

export function el<K extends keyof HTMLElementTagNameMap>(tag: K, cls?: string, text?: string): HTMLElementTagNameMap[K] {
  const e = document.createElement(tag);
  if (cls) e.className = cls;
  if (text !== undefined) e.textContent = text;
  return e;
}

/** An SVG element with its attributes (and text): the one SVG helper of the app's drawings. */
export function svg<K extends keyof SVGElementTagNameMap>(
  tag: K, attrs: Record<string, string | number> = {}, text?: string,
): SVGElementTagNameMap[K] {
  const e = document.createElementNS('http://www.w3.org/2000/svg', tag);
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, String(v));
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

/** The status line of a refused input: what was refused, and whether the last valid result stays on screen (stale). */
export function invalidInputText(message: string, keptLast: boolean, what: 'lens' | 'case' | 'family'): string {
  return keptLast ? `Invalid input (${message}). Showing the last valid ${what}, stale.` : `Invalid input: ${message}.`;
}
