/**
 * Keeps the working binocular case safe: every change of the case store is written to the
 * browser's storage a moment later (debounced; at once when the page is hidden or closed),
 * and the case's entry in the recent list follows it. Opening a file, a recent case or a new
 * case starts a different entry, so the one before stays in the list: nothing is lost.
 * No DOM (timers only), so the tests drive it in Node with a fake storage and fake timers.
 */
import { type BinocularCase, type CaseDocument, writeCase } from '../../case/caseFile.ts';
import type { CaseOrigin } from '../caseStore.ts';
import {
  type KeyValueStore, type RecentEntry, type WorkingEntry, loadRecent, newCaseId, saveRecent, saveWorking, withRecent,
} from './storage.ts';

/** What the keeper needs of the case store (src/ui/caseStore.ts). */
export interface StoreLike {
  get(): BinocularCase;
  subscribe(l: (c: BinocularCase, origin: CaseOrigin) => void): () => void;
}

export type NoticeKind = 'info' | 'error';
export type Notify = (kind: NoticeKind, text: string, key?: string) => void;

export interface KeeperOptions {
  storage: KeyValueStore | null;
  store: StoreLike;
  /** the restored working entry, if any (its id continues) */
  restored: WorkingEntry | null;
  notify: Notify;
  /** the recent list changed (for the menu) */
  onRecent?: (list: readonly RecentEntry[]) => void;
  debounceMs?: number;
  now?: () => number;
}

export class CaseKeeper {
  private id: string;
  private pending: { id: string; doc: CaseDocument } | null = null;
  private timer: ReturnType<typeof setTimeout> | null = null;
  private nextId: string | null = null;
  private failing = false;
  private recent: RecentEntry[];
  private readonly unsubscribe: () => void;
  private readonly debounceMs: number;
  private readonly now: () => number;
  /** saves written so far (for the tests) */
  saves = 0;

  constructor(private readonly o: KeeperOptions) {
    this.id = o.restored?.id ?? newCaseId();
    this.debounceMs = o.debounceMs ?? 400;
    this.now = o.now ?? Date.now;
    const r = loadRecent(o.storage);
    this.recent = r.entries;
    if (r.problem) o.notify('error', r.problem, 'recent-read');
    this.unsubscribe = o.store.subscribe((c, origin) => this.changed(c, origin));
  }

  /** The recent cases, newest first. */
  recentList(): readonly RecentEntry[] {
    return this.recent;
  }

  currentId(): string {
    return this.id;
  }

  /** The next change (an open) continues this recent entry instead of starting a new one (null: undo). */
  continueEntry(id: string | null): void {
    this.nextId = id;
  }

  private changed(c: BinocularCase, origin: CaseOrigin): void {
    if (origin !== 'edit' && origin !== 'restore') {
      // a different case: the one before keeps its own entry (written now if it was pending);
      // a case identical to a recent one (a file saved and opened again) continues that entry
      this.flush();
      const text = writeCase(c.doc);
      this.id = this.nextId ?? this.recent.find((e) => writeCase(e.doc) === text)?.id ?? newCaseId();
    }
    this.nextId = null;
    this.pending = { id: this.id, doc: c.doc };
    if (origin === 'edit') this.schedule();
    else this.flush();
  }

  private schedule(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = setTimeout(() => this.flush(), this.debounceMs);
  }

  /** Write what is pending now (page hidden or closing, or a different case coming). */
  flush(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    const p = this.pending;
    if (!p) return;
    this.pending = null;
    const entry: WorkingEntry = { id: p.id, savedAt: this.now(), doc: p.doc };
    const w = saveWorking(this.o.storage, entry);
    this.recent = withRecent(this.recent, entry);
    const r = saveRecent(this.o.storage, this.recent);
    this.saves++;
    this.o.onRecent?.(this.recent);
    if (!w.ok || !r.ok) {
      const reason = !w.ok ? w.reason : (r as { reason: string }).reason;
      if (!this.failing) {
        this.o.notify('error', `Autosave failed: ${reason}. The case stays open in this tab; use Case › Save as file to keep a copy.`, 'autosave');
      }
      this.failing = true;
    } else {
      if (this.failing) this.o.notify('info', 'Autosave works again.', 'autosave');
      this.failing = false;
      if (r.kept < this.recent.length) {
        this.recent = this.recent.slice(0, r.kept);
        this.o.notify('info', `The browser’s storage is nearly full: only the ${r.kept} newest recent cases are kept.`, 'recent-trim');
      }
    }
  }

  dispose(): void {
    this.flush();
    this.unsubscribe();
  }
}
