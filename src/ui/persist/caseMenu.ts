/**
 * The header's "Case" menu: new case, open a file (a case file or a FHIR prescription), save as a file, the clinician summary
 * (opened in a tab, or printed), the batch exports, and the recent cases. Every case change goes through the case store
 * (set(doc, origin)), which checks the document whole first; nothing here edits a case.
 * All text from cases and files is set with textContent.
 */
import { DecentraError } from '../../api/index.ts';
import { type CaseDocument, CaseError } from '../../case/caseFile.ts';
import { InputError } from '../../case/input.ts';
import type { CaseStore } from '../caseStore.ts';
import { openSummary, printSummary, readCaseOrPrescriptionFile, saveCaseFile } from './files.ts';
import type { CaseKeeper, Notify } from './keeper.ts';
import type { RecentEntry } from './storage.ts';

/** A new case: plano lenses, PD 32 mm each, looking into the distance (edit from there). */
export const NEW_CASE: CaseDocument = {
  format: 'decentra-case',
  version: 2,
  title: 'New case',
  target: { kind: 'distance' },
  tolerance: { profile: 'ansi-z80.1' },
  right: { sphere: 0, pd: 32 },
  left: { sphere: 0, pd: 32 },
} as CaseDocument;

export interface CaseMenuOptions {
  host: HTMLElement;
  store: CaseStore;
  keeper: CaseKeeper;
  notify: Notify;
  onExport: (kind: 'sweep' | 'limits') => void;
}

const timeFormat = new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'short' });

export function caseTitle(doc: CaseDocument): string {
  return doc.title?.trim() || 'Untitled case';
}

export function whenSaved(ms: number): string {
  return timeFormat.format(new Date(ms));
}

export class CaseMenu {
  private readonly button: HTMLButtonElement;
  private readonly list: HTMLElement;
  private readonly current: HTMLElement;
  private readonly recentBox: HTMLElement;
  private readonly fileInput: HTMLInputElement;

  constructor(private readonly o: CaseMenuOptions) {
    const host = o.host;
    host.classList.add('case-menu');
    this.button = document.createElement('button');
    this.button.type = 'button';
    this.button.className = 'header-button case-menu-button';
    this.button.id = 'case-menu-button';
    this.button.textContent = 'Case ▾';
    this.button.title = 'New, open, save, summary, export, recent cases';
    this.button.setAttribute('aria-haspopup', 'menu');
    this.button.setAttribute('aria-expanded', 'false');
    this.button.setAttribute('aria-controls', 'case-menu-list');

    this.list = document.createElement('div');
    this.list.className = 'case-menu-list';
    this.list.id = 'case-menu-list';
    this.list.setAttribute('role', 'menu');
    this.list.setAttribute('aria-label', 'Case');
    this.list.hidden = true;

    this.current = document.createElement('div');
    this.current.className = 'case-menu-current';
    this.current.id = 'case-menu-current';

    this.fileInput = document.createElement('input');
    this.fileInput.type = 'file';
    this.fileInput.accept = '.json,application/json,application/fhir+json';
    this.fileInput.id = 'case-file-input';
    this.fileInput.hidden = true;
    this.fileInput.addEventListener('change', () => {
      const f = this.fileInput.files?.[0];
      this.fileInput.value = '';
      if (f) void this.openFile(f);
    });

    this.recentBox = document.createElement('div');
    this.recentBox.className = 'case-menu-recent';
    this.recentBox.id = 'case-menu-recent';

    this.list.append(
      this.current,
      this.item('new', 'New case', 'Start from plano lenses; the case before stays under Recent cases', () => this.newCase()),
      this.item('open', 'Open or import a file…', 'A .decentra.json case file, or an HL7 FHIR VisionPrescription (R4 or R5 JSON); it is checked whole before it is used', () => this.fileInput.click()),
      this.item('save', 'Save as file', 'Download the case as a .decentra.json file', () => this.save()),
      this.item('summary', 'Clinician summary', 'One printable page for a referring clinician, in a new tab', () => this.summary()),
      this.item('print-summary', 'Print the clinician summary…', 'The same page, straight to the browser’s print dialog', () => this.summary(true)),
      this.separator(),
      this.item('export-sweep', 'Export a sweep table…', 'CSV or JSON over powers and decentrations, for the single-lens family', () => o.onExport('sweep')),
      this.item('export-limits', 'Export a limits table…', 'CSV or JSON: the largest decentration within a tolerance, per power', () => o.onExport('limits')),
      this.separator(),
      this.heading('Recent cases'),
      this.recentBox,
    );
    host.append(this.button, this.list, this.fileInput);

    this.button.addEventListener('click', () => this.toggle());
    this.button.addEventListener('keydown', (e) => {
      if (e.key === 'ArrowDown') {
        e.preventDefault();
        this.open();
      }
    });
    this.list.addEventListener('keydown', (e) => this.keys(e));
    document.addEventListener('pointerdown', (e) => {
      if (!this.list.hidden && !host.contains(e.target as Node)) this.close(false);
    });
    o.store.subscribe(() => this.renderCurrent());
    this.renderCurrent();
    this.renderRecent(o.keeper.recentList());
  }

  private item(action: string, label: string, hint: string, run: () => void): HTMLButtonElement {
    const b = document.createElement('button');
    b.type = 'button';
    b.setAttribute('role', 'menuitem');
    b.className = 'case-menu-item';
    b.dataset.action = action;
    b.textContent = label;
    b.title = hint;
    b.tabIndex = -1;
    b.addEventListener('click', () => {
      this.close(false);
      run();
    });
    return b;
  }

  private separator(): HTMLElement {
    const s = document.createElement('div');
    s.setAttribute('role', 'separator');
    s.className = 'case-menu-sep';
    return s;
  }

  private heading(text: string): HTMLElement {
    const h = document.createElement('div');
    h.className = 'case-menu-heading';
    h.textContent = text;
    return h;
  }

  private items(): HTMLButtonElement[] {
    return Array.from(this.list.querySelectorAll<HTMLButtonElement>('[role="menuitem"]'));
  }

  private keys(e: KeyboardEvent): void {
    const items = this.items();
    const i = items.indexOf(document.activeElement as HTMLButtonElement);
    if (e.key === 'Escape') {
      e.preventDefault();
      this.close(true);
    } else if (e.key === 'ArrowDown' || e.key === 'ArrowUp') {
      e.preventDefault();
      const j = e.key === 'ArrowDown' ? (i + 1) % items.length : (i + items.length - 1) % items.length;
      items[j]?.focus();
    } else if (e.key === 'Home' || e.key === 'End') {
      e.preventDefault();
      items[e.key === 'Home' ? 0 : items.length - 1]?.focus();
    } else if (e.key === 'Tab') {
      this.close(false);
    }
  }

  toggle(): void {
    if (this.list.hidden) this.open();
    else this.close(true);
  }

  open(): void {
    this.renderCurrent();
    this.list.hidden = false;
    this.button.setAttribute('aria-expanded', 'true');
    this.items()[0]?.focus();
  }

  close(focusButton: boolean): void {
    if (this.list.hidden) return;
    this.list.hidden = true;
    this.button.setAttribute('aria-expanded', 'false');
    if (focusButton) this.button.focus();
  }

  private renderCurrent(): void {
    const doc = this.o.store.get().doc;
    const entry = this.o.keeper.recentList().find((e) => e.id === this.o.keeper.currentId());
    const label = document.createElement('span');
    label.className = 'case-menu-label';
    label.textContent = 'Open now (both eyes)';
    const title = document.createElement('span');
    title.className = 'case-menu-title';
    title.textContent = caseTitle(doc);
    const when = document.createElement('span');
    when.className = 'case-menu-time';
    when.textContent = entry ? `autosaved ${whenSaved(entry.savedAt)}` : 'not changed yet';
    this.current.replaceChildren(label, title, when);
  }

  /** The recent list (newest first; the open case is marked). */
  renderRecent(list: readonly RecentEntry[]): void {
    const rows: HTMLElement[] = list.map((e) => {
      const b = this.item('recent', '', 'Open this case (the case open now stays in the list)', () => this.openRecent(e));
      b.dataset.id = e.id;
      const t = document.createElement('span');
      t.className = 'case-menu-title';
      t.textContent = caseTitle(e.doc);
      const w = document.createElement('span');
      w.className = 'case-menu-time';
      w.textContent = `${whenSaved(e.savedAt)}${e.id === this.o.keeper.currentId() ? ' · open now' : ''}`;
      b.replaceChildren(t, w);
      if (e.id === this.o.keeper.currentId()) b.setAttribute('aria-current', 'true');
      return b;
    });
    if (!rows.length) {
      const none = document.createElement('p');
      none.className = 'case-menu-none';
      none.textContent = 'None yet: cases appear here as they are edited, opened or saved.';
      rows.push(none);
    }
    this.recentBox.replaceChildren(...rows);
    this.renderCurrent();
  }

  newCase(): void {
    this.o.store.set(structuredClone(NEW_CASE), 'new');
    this.o.notify('info', 'A new case is open. The case before is under Case › Recent cases.', 'case');
  }

  save(): void {
    this.o.keeper.flush();
    const name = saveCaseFile(this.o.store.get());
    this.o.notify('info', `Saved as ${name} (in the browser’s downloads).`, 'case');
  }

  /** Open the clinician summary in a new tab, or (print) send it to the print dialog. */
  summary(print = false): void {
    try {
      if (print) printSummary(this.o.store.get());
      else openSummary(this.o.store.get());
    } catch (e) {
      if (!(e instanceof InputError) && !(e instanceof DecentraError)) throw e;
      this.o.notify('error', `The summary cannot be made: ${e.message}.`, 'case');
    }
  }

  async openFile(f: File): Promise<void> {
    try {
      const opened = await readCaseOrPrescriptionFile(f);
      this.o.store.set(opened.case.doc, 'open');
      if (opened.kind === 'fhir') {
        const assumed = opened.notes.map((n) => `\n• ${n}`).join('');
        this.o.notify('info', `Imported the prescription in ${f.name} (HL7 FHIR VisionPrescription). It carries only the prescription; check what was assumed (kept in the case’s note, on the clinician summary):${assumed}\nThe case before is under Case › Recent cases.`, 'case');
      } else {
        this.o.notify('info', `Opened ${f.name}. The case before is under Case › Recent cases.`, 'case');
      }
    } catch (e) {
      // a refusal names the field or the resource's path (a DecentraError from the library, src/ui/persist/files.ts)
      const refused = e instanceof InputError || e instanceof DecentraError;
      const reason = refused ? e.message : `could not be read (${(e as Error).message})`;
      this.o.notify('error', `${f.name} was not opened: ${reason}. Nothing was changed.`, 'case');
      if (!(e instanceof CaseError) && !refused) console.warn(e);
    }
  }

  openRecent(listed: RecentEntry): void {
    if (listed.id === this.o.keeper.currentId()) return;
    // the latest state of that case: another tab may have saved it since this menu was drawn
    this.o.keeper.refresh();
    const e = this.o.keeper.recentList().find((x) => x.id === listed.id) ?? listed;
    try {
      this.o.keeper.continueEntry(e.id);
      this.o.store.set(e.doc, 'open');
      this.o.notify('info', `Opened “${caseTitle(e.doc)}” from the recent cases.`, 'case');
    } catch (err) {
      this.o.keeper.continueEntry(null);
      const reason = err instanceof InputError ? err.message : String(err);
      this.o.notify('error', `That recent case was not opened: ${reason}. Nothing was changed.`, 'case');
    }
  }
}
