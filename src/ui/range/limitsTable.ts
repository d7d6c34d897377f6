/**
 * The range's limits table: one row per sphere x cylinder x axis x direction x tolerance,
 * the rows of src/case/range.ts (`rangeRows`) as they are, with the exact, first-order,
 * Prentice and focimeter limits as buttons: a click opens that lens in the single-lens view
 * at that decentration. A missing value shows a dash and says why (the row's reason).
 */
import type { RangeRow } from '../../case/range.ts';
import { DASH, num } from '../format.ts';
import { el } from '../resultsPane.ts';

export type LimitColumn = 'exact' | 'firstOrder' | 'prentice' | 'focimeter';

const LIMIT_COLUMNS: [LimitColumn, string][] = [
  ['exact', 'exact'], ['firstOrder', '1st-order'], ['prentice', 'Prentice'], ['focimeter', 'focimeter'],
];

/** Words for what ends an exact limit. */
const ENDS: Record<RangeRow['limitedBy'], string> = {
  prism: 'prism', edge: 'lens edge', geometry: 'geometry', search: 'search end', lens: 'no lens',
};

/** Most rows drawn on the page; the files carry them all. */
export const MAX_SHOWN_ROWS = 3000;
/** Rows drawn at once; the rest follow a chunk per animation frame, so a change is answered quickly. */
const FIRST_ROWS = 300;
const CHUNK_ROWS = 500;

export class LimitsTable {
  readonly element: HTMLElement;
  private readonly caption: HTMLElement;
  private readonly table: HTMLTableElement;
  private rows: RangeRow[] = [];
  private frame = 0;
  /** a click on a limit: the row and which limit */
  onPick: ((row: RangeRow, column: LimitColumn) => void) | null = null;

  constructor(host: HTMLElement) {
    this.element = el('div', 'range-table-wrap');
    this.caption = el('p', 'range-table-caption');
    this.table = el('table', 'range-table');
    this.element.append(this.caption, this.table);
    host.append(this.element);
    this.table.addEventListener('click', (e) => {
      const b = (e.target as HTMLElement).closest('button[data-row]') as HTMLButtonElement | null;
      if (!b || !this.onPick) return;
      const row = this.rows[Number(b.dataset.row)];
      if (row) this.onPick(row, b.dataset.col as LimitColumn);
    });
  }

  setStale(stale: boolean): void {
    this.element.classList.toggle('stale', stale);
  }

  update(rows: RangeRow[], decimals: number): void {
    this.rows = rows;
    this.setStale(false);
    const shown = Math.min(rows.length, MAX_SHOWN_ROWS);
    this.caption.textContent = `${rows.length} row${rows.length === 1 ? '' : 's'}` +
      (shown < rows.length ? `; the first ${shown} are shown (the files carry them all)` : '') +
      '. Limits in mm from the optical centre. Click a limit to open that lens in the single-lens view at that decentration.';
    const head = el('thead');
    const hr = el('tr');
    for (const h of ['sphere D', 'cyl D', 'axis °', 'direction', 'tol. Δ', ...LIMIT_COLUMNS.map(([, t]) => `${t} mm`), 'limited by', 'front D', 'ct mm', 'edge mm', 'dia. mm', 'note']) {
      hr.append(el('th', undefined, h));
    }
    head.append(hr);
    const body = el('tbody');
    const d = Math.max(0, Math.min(4, decimals));
    cancelAnimationFrame(this.frame);
    this.appendRows(body, 0, Math.min(shown, FIRST_ROWS), d);
    this.table.replaceChildren(head, body);
    const more = (from: number): void => {
      if (from >= shown) return;
      this.frame = requestAnimationFrame(() => {
        this.appendRows(body, from, Math.min(shown, from + CHUNK_ROWS), d);
        more(from + CHUNK_ROWS);
      });
    };
    more(FIRST_ROWS);
  }

  /** Rows from..to-1 of the table, appended to body. */
  private appendRows(body: HTMLElement, from: number, to: number, d: number): void {
    const rows = this.rows;
    const frag = document.createDocumentFragment();
    for (let i = from; i < to; i++) {
      const r = rows[i]!;
      const tr = el('tr');
      tr.dataset.row = String(i);
      tr.dataset.limitedBy = r.limitedBy;
      const td = (text: string, cls?: string): HTMLTableCellElement => {
        const c = el('td', cls, text);
        tr.append(c);
        return c;
      };
      td(num(r.sphere, 2));
      td(num(r.cyl, 2));
      td(num(r.axis, 0));
      td(r.direction);
      td(String(r.maxPrism));
      for (const [col, title] of LIMIT_COLUMNS) {
        const v = r[col];
        const c = td('', `limit limit-${col}`);
        c.dataset.col = col;
        if (v === null || !Number.isFinite(v)) {
          c.textContent = DASH;
          c.title = r.reason;
          continue;
        }
        const b = el('button', 'range-cell', num(v, d));
        b.type = 'button';
        b.dataset.row = String(i);
        b.dataset.col = col;
        b.dataset.value = String(v);
        b.title = `Open sphere ${num(r.sphere, 2)} D, cylinder ${num(r.cyl, 2)} D × ${num(r.axis, 0)}° in the single-lens view, ${num(v, 2)} mm ${r.direction} (the ${title} limit)`;
        c.append(b);
      }
      td(ENDS[r.limitedBy] ?? r.limitedBy);
      td(r.front === null ? DASH : num(r.front, 2));
      td(r.ct === null ? DASH : num(r.ct, 2));
      td(r.edge === null ? DASH : num(r.edge, 2));
      td(r.diameter === null ? (r.maxDiameter !== null ? `${DASH} (≤ ${num(r.maxDiameter, 1)})` : DASH) : num(r.diameter, 1));
      const note = td(r.reason === 'ok' ? '' : r.reason, 'note');
      if (r.reason !== 'ok') note.title = r.reason;
      frag.append(tr);
    }
    body.append(frag);
  }
}
