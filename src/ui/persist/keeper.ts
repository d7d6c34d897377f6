/**
 * Keeps the working binocular case safe: every change of the case store is written to the
 * browser's storage a moment later (debounced, and at least every MAX_WAIT_MS during
 * continuous edits; at once when the page is hidden or closed), and the case's entry in the
 * recent list follows it. Opening a file, a recent case or a new case starts a different
 * entry, so the one before stays in the list: nothing is lost.
 *
 * Several tabs (docs/saving.md, "Several tabs"): each save is a read-modify-write of what
 * storage holds at that moment (planWrite), never a rewrite from this tab's copy in memory,
 * so a tab never drops another tab's case. Each case carries a revision; when another tab
 * saved this case after this tab last saw it, the two tabs edited one case: the other tab's
 * state keeps the entry, this tab's is saved as a separate case, and the person is told
 * (onConflict) and offered the other state. Nothing is resolved silently.
 *
 * No DOM (timers only), so the tests drive it in Node with a fake storage and fake timers.
 */
import { type BinocularCase, type CaseDocument, writeCase } from '../../case/caseFile.ts';
import type { CaseOrigin } from '../caseStore.ts';
import {
  type KeyValueStore, type RecentEntry, type WorkingEntry, loadRecent, mergeRecent, newCaseId, planWrite, saveRecent, saveWorking,
} from './storage.ts';

/** What the keeper needs of the case store (src/ui/caseStore.ts). */
export interface StoreLike {
  get(): BinocularCase;
  subscribe(l: (c: BinocularCase, origin: CaseOrigin) => void): () => void;
}

/** Quiet time after an edit before it is saved, ms. */
export const DEBOUNCE_MS = 400;
/** Longest time an edit waits to be saved while edits go on, ms. */
export const MAX_WAIT_MS = 2000;

export type NoticeKind = 'info' | 'error';
/** A button on a notice: its label and what it does. */
export interface NoticeAction {
  label: string;
  run: () => void;
}
export type Notify = (kind: NoticeKind, text: string, key?: string, action?: NoticeAction) => void;

/** Two tabs edited one case: the other tab's state (kept under the case's entry) and this tab's (saved as a new case). */
export interface Conflict {
  theirs: RecentEntry;
  mine: RecentEntry;
}

export interface KeeperOptions {
  storage: KeyValueStore | null;
  store: StoreLike;
  /** the restored working entry, if any (its id continues) */
  restored: WorkingEntry | null;
  notify: Notify;
  /** the recent list changed (for the menu) */
  onRecent?: (list: readonly RecentEntry[]) => void;
  /** another tab saved the case open here after this tab last saw it (say so; offer theirs) */
  onConflict?: (c: Conflict) => void;
  debounceMs?: number;
  maxWaitMs?: number;
  now?: () => number;
}

export class CaseKeeper {
  private id: string;
  private pending: { id: string; doc: CaseDocument } | null = null;
  private timer: ReturnType<typeof setTimeout> | null = null;
  /** runs MAX_WAIT_MS after the first edit not yet saved */
  private maxTimer: ReturnType<typeof setTimeout> | null = null;
  private nextId: string | null = null;
  /** the revision of the open case this tab last saved or opened (0: not yet saved) */
  private seenRev: number;
  private failing = false;
  private recent: RecentEntry[];
  private readonly unsubscribe: () => void;
  private readonly debounceMs: number;
  private readonly maxWaitMs: number;
  private readonly now: () => number;
  /** saves written so far (for the tests) */
  saves = 0;

  constructor(private readonly o: KeeperOptions) {
    this.id = o.restored?.id ?? newCaseId();
    this.seenRev = o.restored?.rev ?? 0;
    this.debounceMs = o.debounceMs ?? DEBOUNCE_MS;
    this.maxWaitMs = o.maxWaitMs ?? MAX_WAIT_MS;
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
      this.refresh();
      const same = this.nextId !== null ? this.recent.find((e) => e.id === this.nextId) : this.recent.find((e) => writeCase(e.doc) === text);
      this.id = this.nextId ?? same?.id ?? newCaseId();
      this.seenRev = same?.rev ?? 0;
    }
    this.nextId = null;
    this.pending = { id: this.id, doc: c.doc };
    if (origin === 'edit') this.schedule();
    else this.flush();
  }

  private schedule(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = setTimeout(() => this.flush(), this.debounceMs);
    // steady typing never leaves a quiet moment: save at least every maxWaitMs all the same
    if (this.maxTimer === null) this.maxTimer = setTimeout(() => this.flush(), this.maxWaitMs);
  }

  /**
   * Read the recent list again from storage (another tab wrote it: the page's 'storage'
   * event), keeping this tab's cases that storage could not take.
   */
  refresh(): void {
    const r = loadRecent(this.o.storage);
    if (r.problem) this.o.notify('error', r.problem, 'recent-read');
    const before = this.recent;
    this.recent = mergeRecent(r.entries, this.recent);
    if (this.recent.length !== before.length || this.recent.some((e, i) => e !== before[i])) this.o.onRecent?.(this.recent);
  }

  /** Write what is pending now (page hidden or closing, or a different case coming). */
  flush(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    if (this.maxTimer !== null) clearTimeout(this.maxTimer);
    this.timer = null;
    this.maxTimer = null;
    const p = this.pending;
    if (!p) return;
    this.pending = null;
    // read-modify-write: merge with what storage holds now, not with this tab's old copy
    const stored = loadRecent(this.o.storage);
    if (stored.problem) this.o.notify('error', stored.problem, 'recent-read');
    const seen = p.id === this.id ? this.seenRev : 0;
    const plan = planWrite(stored.entries, this.recent, { id: p.id, savedAt: this.now(), doc: p.doc }, seen);
    const entry: WorkingEntry = plan.entry;
    if (p.id === this.id) {
      this.id = entry.id;
      this.seenRev = entry.rev ?? 0;
    }
    const w = saveWorking(this.o.storage, entry);
    this.recent = plan.list;
    const r = saveRecent(this.o.storage, this.recent);
    this.saves++;
    this.o.onRecent?.(this.recent);
    if (plan.conflict) this.o.onConflict?.({ theirs: plan.conflict, mine: entry });
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
