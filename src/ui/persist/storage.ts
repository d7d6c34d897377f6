/**
 * What the app keeps in the browser's storage (docs/saving.md): the working binocular case,
 * the single-lens view (its link query) and the recent cases. Pure: it talks to any object
 * with getItem/setItem/removeItem (the page's localStorage, or a fake in the tests), so it
 * runs in Node.
 *
 * Everything read back is checked before it is used: the small wrapper here with a schema
 * (valibot), the case document with readCase (the same checks as opening a file), the view
 * with caseFromQuery. An entry that fails is not used at all, never in part; it is set aside
 * under REJECTED_KEY (one slot, so that a newer app's data, say, is not destroyed) and the
 * caller gets the reason, naming the field, to show. Writing never throws: a full or blocked
 * storage comes back as a reason to show, and the app carries on.
 */
import * as v from 'valibot';
import { type CaseDocument, CaseError, readCase } from '../../case/caseFile.ts';
import { DEFAULT_DISPLAY, caseFromQuery, caseToQuery } from '../../case/url.ts';
import { DEMO_CASE } from '../../demo/demoCase.ts';

/** The part of the Web Storage interface used here. */
export interface KeyValueStore {
  getItem(key: string): string | null;
  setItem(key: string, value: string): void;
  removeItem(key: string): void;
}

export const WORKING_KEY = 'decentra.working.v1';
export const RECENT_KEY = 'decentra.recent.v1';
export const VIEW_KEY = 'decentra.view.v1';
/** Where an entry that could not be read is moved (the last one only). */
export const REJECTED_KEY = 'decentra.rejected.v1';

/** How many recent cases are kept. */
export const RECENT_MAX = 10;
/** Longest stored texts read back (a case file is at most 256 kB; the wrapper adds little). */
const MAX_WORKING_CHARS = 300 * 1024;
const MAX_RECENT_CHARS = (RECENT_MAX + 1) * MAX_WORKING_CHARS;
const MAX_VIEW_CHARS = 4096;

/** The autosaved working case: which case it is (for the recent list), when, and the document. */
export interface WorkingEntry {
  id: string;
  /** ms since 1970 */
  savedAt: number;
  doc: CaseDocument;
  /**
   * Revision of this case: 1 at its first save, one more at each save by any tab. A tab that
   * finds a higher revision in storage than the one it last saw knows another tab changed the
   * case meanwhile (docs/saving.md, "Several tabs"). Absent in entries of older versions (0).
   */
  rev?: number;
}

/** A recent case, newest first in the list. */
export type RecentEntry = WorkingEntry;

export type Outcome = { ok: true } | { ok: false; reason: string };

const Id = v.pipe(v.string(), v.regex(/^[A-Za-z0-9_-]{1,64}$/));
const Time = v.pipe(v.number(), v.finite(), v.minValue(0));
const Rev = v.pipe(v.number(), v.integer(), v.minValue(0), v.maxValue(Number.MAX_SAFE_INTEGER));
const EntrySchema = v.strictObject({ id: Id, savedAt: Time, rev: v.optional(Rev), doc: v.unknown() });
const WorkingSchema = v.strictObject({ format: v.literal('decentra-autosave'), version: v.literal(1), ...EntrySchema.entries });
const RecentSchema = v.strictObject({
  format: v.literal('decentra-recent'), version: v.literal(1), entries: v.pipe(v.array(v.unknown()), v.maxLength(100)),
});
const ViewSchema = v.strictObject({ format: v.literal('decentra-view'), version: v.literal(1), query: v.pipe(v.string(), v.maxLength(MAX_VIEW_CHARS)) });

/** A new id for a case (random; only used to tell the recent cases apart). */
export function newCaseId(): string {
  const c = (globalThis as { crypto?: { randomUUID?: () => string } }).crypto;
  if (c?.randomUUID) return c.randomUUID();
  return `${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 12)}`;
}

/** A storage error in words a person can act on. */
export function storageProblem(e: unknown): string {
  const name = (e as { name?: string } | null)?.name ?? '';
  if (name === 'QuotaExceededError' || name === 'NS_ERROR_DOM_QUOTA_REACHED') return 'the browser’s storage for this page is full';
  if (name === 'SecurityError') return 'the browser does not allow this page to store data';
  return `the browser’s storage failed (${e instanceof Error ? e.message : String(e)})`;
}

function write(s: KeyValueStore | null, key: string, value: string): Outcome {
  if (!s) return { ok: false, reason: 'the browser does not allow this page to store data' };
  try {
    s.setItem(key, value);
    return { ok: true };
  } catch (e) {
    return { ok: false, reason: storageProblem(e) };
  }
}

function read(s: KeyValueStore | null, key: string): { text: string | null; problem?: string } {
  if (!s) return { text: null };
  try {
    return { text: s.getItem(key) };
  } catch (e) {
    return { text: null, problem: storageProblem(e) };
  }
}

/** Move an unreadable entry aside (best effort) so that it is neither used nor reported again. */
function setAside(s: KeyValueStore | null, key: string, text: string): void {
  if (!s) return;
  try {
    s.setItem(REJECTED_KEY, JSON.stringify({ key, at: Date.now(), text: text.slice(0, MAX_RECENT_CHARS) }));
  } catch {
    // no room for it: it is dropped below all the same
  }
  try {
    s.removeItem(key);
  } catch {
    // nothing more can be done; the next save replaces it
  }
}

/** "field: reason" of a refused value (CaseError, schema issue, JSON error). */
function why(e: unknown): string {
  if (e instanceof CaseError) return e.message;
  return e instanceof Error ? e.message : String(e);
}

function parseJson(text: string, max: number): unknown {
  if (text.length > max) throw new Error(`is ${Math.round(text.length / 1024)} kB, more than the ${Math.round(max / 1024)} kB expected`);
  try {
    return JSON.parse(text);
  } catch {
    throw new Error('is not valid JSON');
  }
}

function schemaWhy(issues: readonly v.BaseIssue<unknown>[]): string {
  const i = issues[0]!;
  const path = v.getDotPath(i) ?? 'entry';
  if (i.kind === 'schema' && i.type === 'strict_object' && i.expected === 'never') return `${path}: is not expected here`;
  if (i.received === 'undefined') return `${path}: is missing`;
  return `${path}: must be ${i.expected ?? 'valid'}, got ${i.received}`;
}

/** The stored value must be one JSON object (an array or a number is not an entry). */
function objectOnly(raw: unknown): unknown {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) {
    throw new Error(`entry: must be one JSON object, got ${raw === null ? 'null' : Array.isArray(raw) ? 'an array' : typeof raw}`);
  }
  return raw;
}

/** Check one stored entry's document; the validated document or a CaseError. */
function readEntry(raw: unknown): WorkingEntry {
  const r = v.safeParse(EntrySchema, objectOnly(raw));
  if (!r.success) throw new Error(schemaWhy(r.issues));
  const e: WorkingEntry = { id: r.output.id, savedAt: r.output.savedAt, doc: readCase(r.output.doc).doc };
  if (r.output.rev !== undefined) e.rev = r.output.rev;
  return e;
}

/** The stored form of an entry (the revision only where there is one). */
function entryFields(e: WorkingEntry): object {
  return e.rev === undefined ? { id: e.id, savedAt: e.savedAt, doc: e.doc } : { id: e.id, savedAt: e.savedAt, rev: e.rev, doc: e.doc };
}

// ---------------------------------------------------------------------------------------------
// the working case

export function saveWorking(s: KeyValueStore | null, e: WorkingEntry): Outcome {
  return write(s, WORKING_KEY, JSON.stringify({ format: 'decentra-autosave', version: 1, ...entryFields(e) }));
}

/** The autosaved case, checked; null (with the reason) when there is none or it is unreadable. */
export function loadWorking(s: KeyValueStore | null): { entry: WorkingEntry | null; problem?: string } {
  const { text, problem } = read(s, WORKING_KEY);
  if (text === null) return { entry: null, problem };
  try {
    const raw = objectOnly(parseJson(text, MAX_WORKING_CHARS));
    const w = v.safeParse(WorkingSchema, raw);
    if (!w.success) throw new Error(schemaWhy(w.issues));
    const { format: _f, version: _v, ...fields } = w.output;
    return { entry: readEntry(fields) };
  } catch (e) {
    setAside(s, WORKING_KEY, text);
    return { entry: null, problem: `The autosaved case could not be restored and was set aside (${why(e)}).` };
  }
}

// ---------------------------------------------------------------------------------------------
// the recent cases

/** The list with `e` first (replacing the entry with the same id), at most `max` long. */
export function withRecent(list: readonly RecentEntry[], e: RecentEntry, max = RECENT_MAX): RecentEntry[] {
  return [e, ...list.filter((x) => x.id !== e.id)].slice(0, max);
}

/** Is `a` a later state of its case than `b` (higher revision; then later save)? */
function laterThan(a: RecentEntry, b: RecentEntry): boolean {
  const ra = a.rev ?? 0, rb = b.rev ?? 0;
  return ra !== rb ? ra > rb : a.savedAt > b.savedAt;
}

/**
 * Two recent lists as one: every case of either (by id), each in its latest state, newest
 * first, at most `max`. Used so that a tab's write never drops a case another tab stored
 * (`stored`: what storage holds now) nor one this tab could not store (`mine`).
 */
export function mergeRecent(stored: readonly RecentEntry[], mine: readonly RecentEntry[], max = RECENT_MAX): RecentEntry[] {
  const byId = new Map<string, RecentEntry>();
  for (const e of [...stored, ...mine]) {
    const had = byId.get(e.id);
    if (!had || laterThan(e, had)) byId.set(e.id, e);
  }
  return [...byId.values()].sort((a, b) => b.savedAt - a.savedAt).slice(0, max);
}

/** What a tab writes for one save of case `id`: the merged list, the entry, and any conflict. */
export interface WritePlan {
  entry: RecentEntry;
  list: RecentEntry[];
  /**
   * The other tab's state of the same case, when another tab saved it after this tab last
   * saw it (its revision is above `seenRev`): it keeps its place and id in the list, and this
   * tab's state is written as a separate case (`entry.id` is then a new id). Null otherwise.
   */
  conflict: RecentEntry | null;
}

/**
 * Plan one save of case `id` by a tab that last saw it at revision `seenRev` (0: never
 * saved): read-modify-write against what storage holds now (`stored`).
 */
export function planWrite(
  stored: readonly RecentEntry[], mine: readonly RecentEntry[], save: { id: string; savedAt: number; doc: CaseDocument },
  seenRev: number, freshId: () => string = newCaseId,
): WritePlan {
  const theirs = stored.find((e) => e.id === save.id) ?? null;
  const conflict = theirs && (theirs.rev ?? 0) > seenRev ? theirs : null;
  const entry: RecentEntry = conflict
    ? { id: freshId(), savedAt: save.savedAt, doc: save.doc, rev: 1 }
    : { id: save.id, savedAt: save.savedAt, doc: save.doc, rev: Math.max(seenRev, theirs?.rev ?? 0) + 1 };
  // this tab's stale copy of the conflicting case must not hide the other tab's state
  const own = conflict ? mine.filter((e) => e.id !== conflict.id) : mine;
  return { entry, list: withRecent(mergeRecent(stored, own), entry), conflict };
}

/** Save the list; when the storage is full, keep as many of the newest as fit. */
export function saveRecent(s: KeyValueStore | null, list: readonly RecentEntry[]): Outcome & { kept: number } {
  let n = list.length;
  let last: Outcome = { ok: true };
  for (;;) {
    const entries = list.slice(0, n).map(entryFields);
    last = write(s, RECENT_KEY, JSON.stringify({ format: 'decentra-recent', version: 1, entries }));
    if (last.ok || n === 0 || !/full/.test(last.reason)) return { ...last, kept: last.ok ? n : 0 };
    n = Math.floor(n / 2);
  }
}

/**
 * The recent cases, checked one by one: an unreadable entry is left out (whole), and the
 * problem says which and why.
 */
export function loadRecent(s: KeyValueStore | null): { entries: RecentEntry[]; problem?: string } {
  const { text, problem } = read(s, RECENT_KEY);
  if (text === null) return { entries: [], problem };
  let list: unknown[];
  try {
    const raw = objectOnly(parseJson(text, MAX_RECENT_CHARS));
    const r = v.safeParse(RecentSchema, raw);
    if (!r.success) throw new Error(schemaWhy(r.issues));
    list = r.output.entries;
  } catch (e) {
    setAside(s, RECENT_KEY, text);
    return { entries: [], problem: `The list of recent cases could not be read and was set aside (${why(e)}).` };
  }
  const entries: RecentEntry[] = [];
  const bad: string[] = [];
  const seen = new Set<string>();
  list.forEach((raw, i) => {
    try {
      const e = readEntry(raw);
      if (seen.has(e.id)) throw new Error(`id: repeats an earlier entry`);
      seen.add(e.id);
      if (entries.length < RECENT_MAX) entries.push(e);
    } catch (err) {
      bad.push(`entry ${i + 1}: ${why(err)}`);
    }
  });
  entries.sort((a, b) => b.savedAt - a.savedAt);
  if (!bad.length) return { entries };
  setAside(s, RECENT_KEY, text);
  saveRecent(s, entries);
  return {
    entries,
    problem: `${bad.length === 1 ? 'One recent case' : `${bad.length} recent cases`} could not be read and ${bad.length === 1 ? 'was' : 'were'} left out (${bad.join('; ')}).`,
  };
}

// ---------------------------------------------------------------------------------------------
// the single-lens view (its link query)

/** Query keys the single-lens view reads (derived from url.ts itself, not listed twice). */
const VIEW_QUERY_KEYS: ReadonlySet<string> = new Set([
  ...new URLSearchParams(caseToQuery(DEMO_CASE, DEFAULT_DISPLAY)).keys(), 'labels', 'foc',
]);

/** Does this link query carry (any part of) a single-lens case or its display? */
export function queryCarriesView(query: string): boolean {
  for (const k of new URLSearchParams(query).keys()) if (VIEW_QUERY_KEYS.has(k)) return true;
  return false;
}

export function saveView(s: KeyValueStore | null, query: string): Outcome {
  if (query.length > MAX_VIEW_CHARS) return { ok: false, reason: 'the view is too long to store' };
  return write(s, VIEW_KEY, JSON.stringify({ format: 'decentra-view', version: 1, query }));
}

/**
 * The stored view's query, checked the way a link is read (caseFromQuery): if any value of it
 * would be ignored, none of it is used.
 */
export function loadView(s: KeyValueStore | null): { query: string | null; problem?: string } {
  const { text, problem } = read(s, VIEW_KEY);
  if (text === null) return { query: null, problem };
  try {
    const raw = objectOnly(parseJson(text, MAX_VIEW_CHARS * 2));
    const r = v.safeParse(ViewSchema, raw);
    if (!r.success) throw new Error(schemaWhy(r.issues));
    const q = r.output.query;
    if (!queryCarriesView(q)) throw new Error('query: holds no single-lens case');
    const parsed = caseFromQuery(q, DEMO_CASE, DEFAULT_DISPLAY);
    if (parsed.ignored.length) throw new Error(`query: values not understood: ${parsed.ignored.join(', ')}`);
    return { query: q };
  } catch (e) {
    setAside(s, VIEW_KEY, text);
    return { query: null, problem: `The saved single-lens view could not be restored and was set aside (${why(e)}).` };
  }
}

/** Which query the single-lens view starts from: the link's if it carries a case, else the stored one. */
export function chooseViewQuery(locationSearch: string, stored: string | null): { query: string; from: 'link' | 'storage' | 'none' } {
  if (queryCarriesView(locationSearch)) return { query: locationSearch, from: 'link' };
  if (stored !== null) return { query: stored, from: 'storage' };
  return { query: locationSearch, from: 'none' };
}
