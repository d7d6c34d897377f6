// Saving in the app (src/ui/persist, src/ui/exports): what is stored comes back the same,
// what comes back wrong is refused whole and said, a full or blocked storage never stops the
// app, link values never become markup, and the app's batch tables are the CLI's.
// Sources: Web Storage (WHATWG HTML Living Standard, "Web storage": setItem throws a
// QuotaExceededError DOMException when full; a SecurityError when storage is denied).
import { readFileSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { type CaseDocument, readCase, writeCase } from '../../src/case/caseFile.ts';
import { InputError } from '../../src/case/input.ts';
import { readTraceCase } from '../../src/case/lensCase.ts';
import { DEFAULT_DISPLAY, type ViewCase, caseFromQuery, caseToQuery, toRawFields } from '../../src/case/url.ts';
import { runLimits } from '../../src/cli/limits.ts';
import { formatSweep, planSweep, readRange, sweepRows } from '../../src/cli/sweep.ts';
import { DEMO_CASE } from '../../src/demo/demoCase.ts';
import { CaseStore, DEMO_BINOCULAR } from '../../src/ui/caseStore.ts';
import { type BatchRequest, batchRows, equivalentCommand, formatBatch, planBatch, readRangeParts } from '../../src/ui/exports/batch.ts';
import { CaseKeeper } from '../../src/ui/persist/keeper.ts';
import {
  type KeyValueStore, RECENT_KEY, RECENT_MAX, REJECTED_KEY, VIEW_KEY, WORKING_KEY, chooseViewQuery, loadRecent, loadView,
  loadWorking, mergeRecent, planWrite, saveRecent, saveView, saveWorking,
} from '../../src/ui/persist/storage.ts';

/** An in-memory Web Storage; `quota` (characters) and `deny` imitate a full or blocked store. */
class FakeStorage implements KeyValueStore {
  readonly map = new Map<string, string>();
  constructor(private readonly opts: { quota?: number; deny?: boolean } = {}) {}
  private used(except?: string): number {
    let n = 0;
    for (const [k, v] of this.map) if (k !== except) n += k.length + v.length;
    return n;
  }
  getItem(k: string): string | null {
    if (this.opts.deny) throw new DOMException('denied', 'SecurityError');
    return this.map.get(k) ?? null;
  }
  setItem(k: string, v: string): void {
    if (this.opts.deny) throw new DOMException('denied', 'SecurityError');
    if (this.opts.quota !== undefined && this.used(k) + k.length + v.length > this.opts.quota) {
      throw new DOMException('full', 'QuotaExceededError');
    }
    this.map.set(k, v);
  }
  removeItem(k: string): void {
    if (this.opts.deny) throw new DOMException('denied', 'SecurityError');
    this.map.delete(k);
  }
}

// ---- valid case documents (docs/case-file.md), every optional part sometimes present ----
const n0 = (a: fc.Arbitrary<number>) => a.map((n) => n + 0); // JSON has no -0
const dbl = (min: number, max: number) => n0(fc.double({ min, max, noNaN: true }));
const arbLens = fc.record({
  sphere: dbl(-12, 12),
  cyl: dbl(-4, 4),
  axis: fc.integer({ min: 0, max: 180 }),
  material: fc.constantFrom('resin-1.50', 'resin-1.60', 'polycarbonate', 'resin-1.67'),
  abbe: dbl(20, 60),
  front: dbl(0.5, 12),
  ct: dbl(1, 12),
  frontK: dbl(-2, 2),
  backK: dbl(-2, 2),
  cylOn: fc.constantFrom('back', 'front'),
  toric: fc.constantFrom('tyre', 'barrel'),
  pd: dbl(25, 40),
  cr: dbl(20, 35),
}, { requiredKeys: ['sphere', 'pd', 'ct'] }); // a centre thickness and no diameter: every lens can be made
const arbOc = fc.record({ x: dbl(-5, 5), y: dbl(-5, 5) });
const arbFrameEye = fc.record({ decentration: dbl(-5, 5), fittingHeight: dbl(10, 25), ocHeight: dbl(10, 25) }, { requiredKeys: [] });
const arbDoc: fc.Arbitrary<CaseDocument> = fc.record({
  title: fc.string({ maxLength: 200 }),
  note: fc.string({ maxLength: 400 }),
  frame: fc.option(fc.record({ a: dbl(40, 60), b: dbl(30, 50), dbl: dbl(14, 22) }), { nil: undefined }),
  pantoDeg: dbl(-10, 20),
  wrapDeg: dbl(-5, 20),
  target: fc.oneof(
    fc.constant({ kind: 'distance' as const }),
    fc.record({ kind: fc.constant('near' as const), distance: dbl(250, 800), below: dbl(-50, 200), lateral: dbl(-50, 50) }, { requiredKeys: ['kind', 'distance'] }),
  ),
  tolerance: fc.oneof(
    fc.constantFrom({ profile: 'ansi-z80.1' as const }, { profile: 'iso-21987' as const }),
    fc.record({ profile: fc.constant('custom' as const), horizontal: dbl(0.1, 5), vertical: dbl(0.1, 5) }),
  ),
  right: arbLens, left: arbLens, rOc: arbOc, lOc: arbOc, rFit: arbFrameEye, lFit: arbFrameEye,
}, { requiredKeys: ['target', 'right', 'left', 'rOc', 'lOc', 'rFit', 'lFit', 'frame'] }).map((r) => {
  const { rOc, lOc, rFit, lFit, frame, ...rest } = r;
  const doc: Record<string, unknown> = { format: 'decentra-case', version: 2, ...rest };
  // the optical centre is given either directly or from the frame (never both)
  if (frame) {
    doc.frame = frame;
    const b = frame.b;
    const clampH = (e: Record<string, number>) => Object.fromEntries(Object.entries(e).map(([k, v]) => [k, k === 'decentration' ? v : Math.min(v, b)]));
    doc.right = { ...rest.right, ...clampH(rFit) };
    doc.left = { ...rest.left, ...clampH(lFit) };
  } else {
    doc.right = { ...rest.right, oc: rOc };
    doc.left = { ...rest.left, oc: lOc };
  }
  return doc as CaseDocument;
});

describe('the working case in storage', () => {
  it('save then restore gives the same document (property; any valid case)', () => {
    fc.assert(fc.property(arbDoc, fc.integer({ min: 0, max: 2 ** 42 }), (doc, savedAt) => {
      const valid = readCase(doc).doc; // the generator makes valid cases only
      const s = new FakeStorage();
      expect(saveWorking(s, { id: 'case-1', savedAt, doc: valid })).toEqual({ ok: true });
      const back = loadWorking(s);
      expect(back.problem).toBeUndefined();
      expect(back.entry).toEqual({ id: 'case-1', savedAt, doc: valid });
      expect(writeCase(back.entry!.doc)).toBe(writeCase(valid));
      // and through the app's store: what the store holds after a restore is what was saved
      expect(new CaseStore(back.entry!.doc).doc()).toEqual(doc);
    }), { numRuns: 150 });
  });

  const good = () => JSON.parse(JSON.stringify(DEMO_BINOCULAR)) as Record<string, any>;
  const wrap = (doc: unknown, extra: Record<string, unknown> = {}) =>
    JSON.stringify({ format: 'decentra-autosave', version: 1, id: 'abc', savedAt: 1, doc, ...extra });
  const hostile: [string, string, RegExp][] = [
    ['not JSON', '{"format": "decentra-autosave", ', /not valid JSON/],
    ['JSON null', 'null', /entry: must be one JSON object, got null/],
    ['an array', '[1,2]', /entry: must be one JSON object, got an array/],
    ['a missing wrapper field', JSON.stringify({ format: 'decentra-autosave', version: 1, savedAt: 1, doc: good() }), /id: is missing/],
    ['a wrapper key too many', wrap(good(), { run: 'x' }), /^.*run: is not expected here/],
    ['a newer wrapper', JSON.stringify({ format: 'decentra-autosave', version: 2, id: 'a', savedAt: 1, doc: good() }), /version: must be 1/],
    ['a bad id', wrap(good(), { id: '<b>x</b>' }), /id: must be/],
    ['NaN time as text', wrap(good(), { savedAt: 'NaN' }), /savedAt: must be number/],
    ['an extra case key', wrap({ ...good(), colour: 'red' }), /colour: is not a field of a Decentra case/],
    ['a __proto__ key', wrap(good()).replace('"title"', '"__proto__"'), /__proto__: is not a field/],
    ['a wrong type', wrap({ ...good(), right: { ...good().right, pd: 'NaN' } }), /right\.pd: must be number/],
    ['a huge number', wrap({ ...good(), left: { ...good().left, ct: 1e308 } }), /left\.ct: must be greater than 0 and at most 30 mm/],
    ['a missing field', wrap({ ...good(), target: undefined }), /target: is required/],
    ['a newer case version', wrap({ ...good(), version: 3 }), /version: must be 2/],
    ['400 kB of text', wrap({ ...good(), note: 'x'.repeat(400 * 1024) }), /is 40\d kB, more than the 300 kB/],
  ];
  it.each(hostile)('%s: refused whole, said with the field, set aside', (_name, text, why) => {
    const s = new FakeStorage();
    s.setItem(WORKING_KEY, text);
    const r = loadWorking(s);
    expect(r.entry).toBeNull();
    expect(r.problem).toMatch(/^The autosaved case could not be restored and was set aside \(/);
    expect(r.problem).toMatch(why);
    // nothing is lost: the entry is kept aside, and no longer read as the working case
    expect(JSON.parse(s.getItem(REJECTED_KEY)!)).toMatchObject({ key: WORKING_KEY, text: text.slice(0, 4 * 1024 * 1024) });
    expect(s.getItem(WORKING_KEY)).toBeNull();
  });

  it('a case autosaved as version 1 is restored, migrated to version 2 (docs/case-file.md, "Versions")', () => {
    const s = new FakeStorage();
    const old = { ...good(), version: 1 };
    s.setItem(WORKING_KEY, wrap(old));
    const r = loadWorking(s);
    expect(r.problem).toBeUndefined();
    expect(r.entry!.doc).toEqual({ ...old, version: 2 });
  });

  it('a refused entry is not applied in part: the store keeps the case it had', () => {
    const s = new FakeStorage();
    s.setItem(WORKING_KEY, wrap({ ...good(), title: 'half', right: { ...good().right, sphere: 'x' } }));
    const restored = loadWorking(s).entry;
    const store = new CaseStore(restored?.doc);
    expect(store.doc()).toEqual(DEMO_BINOCULAR);
  });

  it('blocked storage (SecurityError) and full storage (QuotaExceededError) are said, never thrown', () => {
    const denied = new FakeStorage({ deny: true });
    expect(loadWorking(denied)).toEqual({ entry: null, problem: 'the browser does not allow this page to store data' });
    expect(saveWorking(denied, { id: 'a', savedAt: 1, doc: DEMO_BINOCULAR })).toEqual({ ok: false, reason: 'the browser does not allow this page to store data' });
    const full = new FakeStorage({ quota: 100 });
    expect(saveWorking(full, { id: 'a', savedAt: 1, doc: DEMO_BINOCULAR })).toEqual({ ok: false, reason: 'the browser’s storage for this page is full' });
    expect(saveWorking(null, { id: 'a', savedAt: 1, doc: DEMO_BINOCULAR }).ok).toBe(false);
  });
});

describe('the recent cases', () => {
  const doc = (title: string): CaseDocument => ({ ...DEMO_BINOCULAR, title });

  it('an unreadable entry is left out whole and named; the others stay', () => {
    const s = new FakeStorage();
    const entries = [
      { id: 'a', savedAt: 3, doc: doc('first') },
      { id: 'b', savedAt: 2, doc: { ...doc('second'), right: { ...DEMO_BINOCULAR.right, sphere: '-9.5' } } },
      { id: 'c', savedAt: 1, doc: doc('third') },
    ];
    s.setItem(RECENT_KEY, JSON.stringify({ format: 'decentra-recent', version: 1, entries }));
    const r = loadRecent(s);
    expect(r.entries.map((e) => e.doc.title)).toEqual(['first', 'third']);
    expect(r.problem).toMatch(/One recent case could not be read and was left out \(entry 2: right\.sphere: must be number/);
    // the readable ones are written back; the original text is set aside
    expect(loadRecent(s)).toEqual({ entries: r.entries });
    expect(JSON.parse(s.getItem(REJECTED_KEY)!).key).toBe(RECENT_KEY);
  });

  it('a full storage keeps as many of the newest as fit', () => {
    const list = Array.from({ length: 8 }, (_, i) => ({ id: `c${i}`, savedAt: 100 - i, doc: doc(`case ${i}`) }));
    const one = JSON.stringify({ format: 'decentra-recent', version: 1, entries: list.slice(0, 2) }).length;
    const s = new FakeStorage({ quota: one + RECENT_KEY.length + 10 });
    const r = saveRecent(s, list);
    expect(r).toEqual({ ok: true, kept: 2 });
    expect(loadRecent(s).entries.map((e) => e.id)).toEqual(['c0', 'c1']);
  });
});

describe('the keeper: the store autosaved', () => {
  beforeEach(() => { vi.useFakeTimers(); });
  afterEach(() => { vi.useRealTimers(); });

  const setup = (storage: KeyValueStore | null = new FakeStorage()) => {
    const notices: string[] = [];
    const store = new CaseStore();
    let t = 1000;
    const keeper = new CaseKeeper({ storage, store, restored: null, notify: (_k, text) => notices.push(text), debounceMs: 300, now: () => t++ });
    return { storage, store, keeper, notices };
  };

  it('edits are saved a moment after the last one, and restore to the same case', () => {
    const { storage, store, keeper } = setup();
    for (let i = 1; i <= 5; i++) store.set({ ...store.doc(), pantoDeg: i }, 'edit');
    expect(keeper.saves).toBe(0);
    vi.advanceTimersByTime(299);
    expect(keeper.saves).toBe(0);
    vi.advanceTimersByTime(1);
    expect(keeper.saves).toBe(1);
    const back = loadWorking(storage).entry!;
    expect(back.doc).toEqual(store.doc());
    expect(back.id).toBe(keeper.currentId());
    expect(keeper.recentList().map((e) => e.id)).toEqual([keeper.currentId()]);
  });

  it('opening or starting a case keeps the one before in the recent list (nothing lost)', () => {
    const { store, keeper } = setup();
    store.set({ ...store.doc(), title: 'edited, not yet saved' }, 'edit');
    const firstId = keeper.currentId();
    store.set({ ...DEMO_BINOCULAR, title: 'opened' }, 'open'); // before the debounce ran
    expect(keeper.currentId()).not.toBe(firstId);
    expect(keeper.recentList().map((e) => e.doc.title)).toEqual(['opened', 'edited, not yet saved']);
    // reopening a recent case continues its entry
    keeper.continueEntry(firstId);
    store.set(keeper.recentList()[1]!.doc, 'open');
    expect(keeper.currentId()).toBe(firstId);
    expect(keeper.recentList().map((e) => e.doc.title)).toEqual(['edited, not yet saved', 'opened']);
  });

  it('opening a case identical to a recent one continues that entry (no duplicates)', () => {
    const { store, keeper } = setup();
    store.set({ ...DEMO_BINOCULAR, title: 'A' }, 'open');
    const a = keeper.currentId();
    store.set({ ...DEMO_BINOCULAR, title: 'B' }, 'new');
    store.set({ ...DEMO_BINOCULAR, title: 'A' }, 'open');
    expect(keeper.currentId()).toBe(a);
    expect(keeper.recentList().map((e) => e.doc.title)).toEqual(['A', 'B']);
  });

  it(`keeps the last ${RECENT_MAX} cases`, () => {
    const { store, keeper } = setup();
    for (let i = 0; i < RECENT_MAX + 4; i++) store.set({ ...DEMO_BINOCULAR, title: `case ${i}` }, 'new');
    const titles = keeper.recentList().map((e) => e.doc.title);
    expect(titles).toHaveLength(RECENT_MAX);
    expect(titles[0]).toBe(`case ${RECENT_MAX + 3}`);
  });

  it('a full storage is said once, and the app carries on', () => {
    const { store, keeper, notices } = setup(new FakeStorage({ quota: 50 }));
    store.set({ ...store.doc(), pantoDeg: 2 }, 'edit');
    store.set({ ...store.doc(), pantoDeg: 3 }, 'edit');
    keeper.flush();
    store.set({ ...store.doc(), pantoDeg: 4 }, 'edit');
    keeper.flush();
    expect(notices).toHaveLength(1);
    expect(notices[0]).toMatch(/^Autosave failed: the browser’s storage for this page is full\. .*Save as file/);
    expect(store.get().pantoDeg).toBe(4);
    expect(keeper.recentList()).toHaveLength(1); // still offered in this tab
  });
});

describe('several tabs: each save merges with what storage holds (docs/saving.md, "Several tabs")', () => {
  beforeEach(() => { vi.useFakeTimers(); });
  afterEach(() => { vi.useRealTimers(); });

  const doc = (title: string, sphere = 0): CaseDocument => ({ ...DEMO_BINOCULAR, title, right: { ...DEMO_BINOCULAR.right, sphere } } as CaseDocument);
  const entry = (id: string, savedAt: number, rev?: number, title = id) => ({ id, savedAt, doc: doc(title), ...(rev === undefined ? {} : { rev }) });

  it('mergeRecent keeps every case of both lists, each in its latest revision, newest first', () => {
    const stored = [entry('b', 50, 3, 'b from storage'), entry('a', 40, 1)];
    const mine = [entry('c', 60, 1), entry('b', 55, 2, 'b stale in this tab')];
    const m = mergeRecent(stored, mine);
    expect(m.map((e) => e.id)).toEqual(['c', 'b', 'a']);
    expect(m[1]!.doc.title).toBe('b from storage'); // revision 3 beats 2, though saved earlier
    expect(mergeRecent([], Array.from({ length: RECENT_MAX + 3 }, (_, i) => entry(`x${i}`, i)))).toHaveLength(RECENT_MAX);
  });

  it('planWrite: a save continues the revision; a higher revision in storage is a conflict, and both states are kept', () => {
    const stored = [entry('x', 10, 4, 'their state'), entry('y', 5, 1)];
    const ok = planWrite(stored, [], { id: 'x', savedAt: 20, doc: doc('mine') }, 4);
    expect(ok.conflict).toBeNull();
    expect(ok.entry).toMatchObject({ id: 'x', rev: 5 });
    expect(ok.list.map((e) => [e.id, e.doc.title])).toEqual([['x', 'mine'], ['y', 'y']]);

    const clash = planWrite(stored, [entry('x', 8, 3, 'my old copy')], { id: 'x', savedAt: 20, doc: doc('mine') }, 3, () => 'fresh');
    expect(clash.conflict?.doc.title).toBe('their state');
    expect(clash.entry).toMatchObject({ id: 'fresh', rev: 1 });
    expect(clash.list.map((e) => [e.id, e.doc.title])).toEqual([['fresh', 'mine'], ['x', 'their state'], ['y', 'y']]);
  });

  /** Two tabs: two keepers and two stores on one storage, both opened on the same saved case. */
  const twoTabs = () => {
    const storage = new FakeStorage();
    let t = 1000;
    const now = () => (t += 10);
    // the saved case both tabs open on
    const first = new CaseStore(doc('shared case'));
    const k0 = new CaseKeeper({ storage, store: first, restored: null, notify: () => {}, now });
    first.set(doc('shared case', 1), 'edit');
    k0.flush();
    k0.dispose();
    const tab = (name: string) => {
      const restored = loadWorking(storage).entry!;
      const store = new CaseStore(restored.doc);
      const notices: string[] = [];
      const conflicts: { theirs: string; mine: string }[] = [];
      const keeper = new CaseKeeper({
        storage, store, restored, now, notify: (_k, text) => notices.push(text),
        onConflict: (c) => conflicts.push({ theirs: c.theirs.doc.title!, mine: c.mine.doc.title! }),
      });
      return { name, store, keeper, notices, conflicts };
    };
    return { storage, a: tab('A'), b: tab('B') };
  };

  it('the issue\'s sequence: A starts a new case and sets a sphere, B makes one edit: both cases stay', () => {
    const { storage, a, b } = twoTabs();
    expect(a.keeper.currentId()).toBe(b.keeper.currentId());
    a.store.set(doc('new in A'), 'new');
    a.store.set(doc('new in A', -2.5), 'edit');
    vi.advanceTimersByTime(1000);
    b.store.set(doc('shared case', 1.25), 'edit'); // B's memory still holds the list from before A's new case
    vi.advanceTimersByTime(1000);
    const stored = loadRecent(storage).entries;
    expect(stored.map((e) => e.doc.title).sort()).toEqual(['new in A', 'shared case']);
    expect(stored.find((e) => e.doc.title === 'new in A')!.doc.right.sphere).toBe(-2.5);
    expect(stored.find((e) => e.doc.title === 'shared case')!.doc.right.sphere).toBe(1.25);
    // B's own list now shows A's case too; no conflict: they edited different cases
    expect(b.keeper.recentList().map((e) => e.doc.title)).toContain('new in A');
    expect([...a.conflicts, ...b.conflicts]).toEqual([]);
    // closing A (its pending edits flushed) brings nothing back that was lost, and drops nothing
    a.keeper.dispose();
    expect(loadRecent(storage).entries).toHaveLength(2);
  });

  it('two tabs editing one case: the second to save is told, and neither state is lost', () => {
    const { storage, a, b } = twoTabs();
    const shared = a.keeper.currentId();
    a.store.set({ ...a.store.doc(), note: 'A was here' }, 'edit');
    a.keeper.flush();
    b.store.set({ ...b.store.doc(), note: 'B was here' }, 'edit');
    b.keeper.flush();
    expect(a.conflicts).toEqual([]);
    expect(b.conflicts).toEqual([{ theirs: 'shared case', mine: 'shared case' }]);
    const stored = loadRecent(storage).entries;
    expect(stored.find((e) => e.id === shared)!.doc.note).toBe('A was here');
    expect(b.keeper.currentId()).not.toBe(shared);
    expect(stored.find((e) => e.id === b.keeper.currentId())!.doc.note).toBe('B was here');
    // both go on without a further conflict: A on the shared entry, B on its own
    a.store.set({ ...a.store.doc(), note: 'A again' }, 'edit');
    a.keeper.flush();
    b.store.set({ ...b.store.doc(), note: 'B again' }, 'edit');
    b.keeper.flush();
    expect(b.conflicts).toHaveLength(1);
    expect(a.conflicts).toHaveLength(0);
    const after = loadRecent(storage).entries;
    expect(after.map((e) => e.doc.note).sort()).toEqual(['A again', 'B again']);
  });

  it('a tab that saw the other tab\'s save (reopened it from the list) continues it without a conflict', () => {
    const { a, b } = twoTabs();
    const shared = a.keeper.currentId();
    a.store.set({ ...a.store.doc(), note: 'A was here' }, 'edit');
    a.keeper.flush();
    b.store.set(doc('other'), 'new');
    b.keeper.refresh();
    const latest = b.keeper.recentList().find((e) => e.id === shared)!;
    b.keeper.continueEntry(shared);
    b.store.set(latest.doc, 'open');
    b.store.set({ ...b.store.doc(), note: 'B continues A' }, 'edit');
    b.keeper.flush();
    expect(b.conflicts).toEqual([]);
    expect(b.keeper.currentId()).toBe(shared);
  });

  it('continuous edits are saved at least every 2 s, not only after 0.4 s of quiet', () => {
    const storage = new FakeStorage();
    const store = new CaseStore();
    const keeper = new CaseKeeper({ storage, store, restored: null, notify: () => {} });
    // an edit every 100 ms for 5 s: never 0.4 s of quiet
    for (let i = 1; i <= 50; i++) {
      store.set({ ...store.doc(), pantoDeg: i % 20 }, 'edit');
      vi.advanceTimersByTime(100);
      if (i === 19) expect(keeper.saves).toBe(0); // 1.9 s in
      if (i === 20) expect(keeper.saves).toBe(1); // 2.0 s in
    }
    expect(keeper.saves).toBe(2); // at 2 s and 4 s
    vi.advanceTimersByTime(400); // the quiet after the last edit
    expect(keeper.saves).toBe(3);
    expect(loadWorking(storage).entry!.doc.pantoDeg).toBe(50 % 20);
  });
});

describe('the single-lens view in storage', () => {
  it('round trip of any view query (property)', () => {
    const text = fc.string({ maxLength: 12 });
    const arbView = fc.record({
      sphere: text, cyl: text, axis: text, eye: fc.constantFrom('R', 'L'), x: text, y: text,
      frontMode: fc.constantFrom('auto', 'true', 'nominal'), thicknessMode: fc.constantFrom('centre', 'rule'),
    });
    fc.assert(fc.property(arbView, (part) => {
      const q = caseToQuery({ ...DEMO_CASE, ...part } as ViewCase, DEFAULT_DISPLAY);
      const s = new FakeStorage();
      expect(saveView(s, q)).toEqual({ ok: true });
      const back = loadView(s);
      expect(back).toEqual({ query: q });
      expect(caseFromQuery(back.query!, DEMO_CASE).viewCase).toEqual(caseFromQuery(q, DEMO_CASE).viewCase);
    }), { numRuns: 100 });
  });

  it('a stored view with a value the page does not know is refused whole', () => {
    const s = new FakeStorage();
    s.setItem(VIEW_KEY, JSON.stringify({ format: 'decentra-view', version: 1, query: 'sph=-4&eye=X&fm=true' }));
    const r = loadView(s);
    expect(r.query).toBeNull();
    expect(r.problem).toMatch(/query: values not understood: eye=X/);
    s.setItem(VIEW_KEY, JSON.stringify({ format: 'decentra-view', version: 1, query: 'sph=1', extra: 1 }));
    expect(loadView(s).problem).toMatch(/extra: is not expected here/);
  });

  it('a link that carries a case wins over the stored view; otherwise the stored view is used', () => {
    expect(chooseViewQuery('?sph=-2', 'sph=5')).toEqual({ query: '?sph=-2', from: 'link' });
    expect(chooseViewQuery('?tab=map', 'sph=5')).toEqual({ query: '?tab=map', from: 'link' });
    expect(chooseViewQuery('?utm=1', 'sph=5')).toEqual({ query: 'sph=5', from: 'storage' });
    expect(chooseViewQuery('', null)).toEqual({ query: '', from: 'none' });
  });
});

describe('link and stored values never become markup', () => {
  const markup = '<img src=x onerror="window.__pwned=1">';

  it('a value in the link stays text: kept for validation, refused with a message that quotes it as text', () => {
    const q = new URLSearchParams({ sph: markup, x: '<script>alert(1)</script>' }).toString();
    const v = caseFromQuery(q, DEMO_CASE).viewCase;
    expect(v.sphere).toBe(markup.slice(0, 40));
    expect(() => readTraceCase(toRawFields(v, { dir: 'direction', dist: 'distance' }), (k) => k))
      .toThrow(new InputError('sphere', 'must be a number in dioptres, got \'<img src=x onerror="window.__pwned=1">\''));
  });

  // the guarantee above holds only if no page code parses text as HTML: checked on the source
  // (the summary builds its page as text in src/report, escaped there; tested in report.test.ts,
  // and the app hands it to a new tab as a Blob URL, never into its own document)
  it('no page code uses an HTML-parsing sink', () => {
    const files: string[] = [];
    const walk = (d: string) => {
      for (const f of readdirSync(d)) {
        const p = join(d, f);
        if (statSync(p).isDirectory()) walk(p);
        else if (/\.(ts|html)$/.test(f)) files.push(p);
      }
    };
    for (const d of ['src/ui', 'src/scene', 'src/case', 'src/worker', 'src/demo']) walk(d);
    files.push('src/main.ts', 'index.html');
    expect(files.length).toBeGreaterThan(20);
    const sink = /\.(innerHTML|outerHTML)\s*=|insertAdjacentHTML|document\.write|createContextualFragment|DOMParser|srcdoc|new Function\(|\beval\(/;
    // clearing an element with an empty string parses nothing; it is the one use allowed
    const found = files.filter((f) => sink.test(readFileSync(f, 'utf8').replace(/\.innerHTML\s*=\s*(''|"")/g, '.cleared')));
    expect(found).toEqual([]);
  });
});

/** Words of a command line with POSIX single quotes (what equivalentCommand writes). */
function shellWords(line: string): string[] {
  return [...line.matchAll(/'((?:[^']|'\\'')*)'|(\S+)/g)].map((m) => (m[1] !== undefined ? m[1].replace(/'\\''/g, "'") : m[2]!));
}

describe('batch tables: the app gives what the CLI gives', () => {
  it('ranges: the same values as decentra sweep (property)', () => {
    const dec = fc.integer({ min: -2000, max: 2000 }).map((n) => n / 100);
    fc.assert(fc.property(dec, fc.integer({ min: 0, max: 60 }), fc.constantFrom(0.01, 0.1, 0.25, 0.5, 1, 2.5), (a, k, step) => {
      const b = Number((a + k * step).toFixed(2));
      const mine = readRangeParts('powers', { from: String(a), to: String(b), step: String(step) }, 'power');
      expect(mine).toEqual(readRange('--power', `${a}:${b}:${step}`, 'power'));
    }), { numRuns: 200 });
  });

  const families = fc.record({
    material: fc.constantFrom('resin-1.50', 'resin-1.60', 'polycarbonate', 'resin-1.74'),
    cyl: fc.constantFrom('0', '-1.25', '+2'),
    axis: fc.constantFrom('0', '45', '90', '170'),
    eye: fc.constantFrom('R', 'L'),
    cr: fc.constantFrom('25', '27', '3 cm'),
    thickness: fc.constantFrom('rule', 'ct'),
    front: fc.constantFrom('auto', 'true'),
  });
  const familyFields = (f: { material: string; cyl: string; axis: string; eye: string; cr: string; thickness: string; front: string }) => {
    const v: ViewCase = {
      ...DEMO_CASE, material: f.material, cyl: f.cyl, axis: f.axis, eye: f.eye as 'R' | 'L', cr: f.cr,
      thicknessMode: f.thickness === 'rule' ? 'rule' : 'centre', ct: '4.5', minEdge: '1', diameter: '60',
      frontMode: f.front === 'true' ? 'true' : 'auto', front: '9',
    };
    return toRawFields(v, { dir: 'direction', dist: 'distance' });
  };
  const argvOf = (fields: Record<string, unknown>) => {
    const flags: Record<string, string> = {
      material: '--material', cyl: '--cyl', axis: '--axis', eye: '--eye', cr: '--cr', ct: '--ct', minEdge: '--min-edge',
      minCt: '--min-ct', diameter: '--diameter', front: '--front', frontRule: '--front-rule', frontK: '--front-k',
      backK: '--back-k', cylOn: '--cyl-on', toric: '--toric',
    };
    const out: string[] = [];
    for (const [k, v] of Object.entries(fields)) if (flags[k] && v !== undefined && v !== '') out.push(flags[k]!, String(v));
    return out;
  };

  it('sweep: the same CSV and JSON as decentra sweep (property)', () => {
    fc.assert(fc.property(families, fc.integer({ min: -8, max: 8 }), fc.integer({ min: 0, max: 3 }), fc.constantFrom('0', '90', '200'),
      fc.constantFrom('csv' as const, 'json' as const), (fam, p0, np, dir, format) => {
        const fields = familyFields(fam);
        const req: BatchRequest = {
          kind: 'sweep', fields, power: { from: String(p0), to: String(p0 + np), step: '1' },
          decentration: { from: '0', to: '40', step: '8' }, dir, format,
        };
        const argv = ['--power', `${p0}:${p0 + np}:1`, '--decentration', '0:40:8', '--dir', dir, '--format', format, ...argvOf(fields)];
        const cli = planSweep(argv)!;
        const plan = planBatch(req);
        expect(formatBatch(plan, batchRows(plan))).toBe(formatSweep(cli, sweepRows(cli)));
        // the command the panel shows is the one that prints it
        const shown = shellWords(equivalentCommand(plan, req)).slice(2);
        expect(formatSweep(planSweep(shown)!, sweepRows(planSweep(shown)!))).toBe(formatBatch(plan, batchRows(plan)));
      }), { numRuns: 25 });
  });

  it('limits: the same CSV and JSON as decentra limits --power (property)', () => {
    fc.assert(fc.property(families, fc.integer({ min: -10, max: 10 }), fc.constantFrom('0.25', '0.5', '1 Δ'), fc.constantFrom('0', '90', '180'),
      fc.constantFrom('csv' as const, 'json' as const), (fam, p0, maxPrism, dir, format) => {
        const fields = familyFields(fam);
        const req: BatchRequest = { kind: 'limits', fields, power: { from: String(p0), to: String(p0 + 2), step: '1' }, maxPrism, dir, format };
        const argv = ['--power', `${p0}:${p0 + 2}:1`, '--max-prism', maxPrism, '--dir', dir, '--format', format, ...argvOf(fields)];
        const plan = planBatch(req);
        expect(formatBatch(plan, batchRows(plan))).toBe(runLimits(argv));
      }), { numRuns: 25 });
  });

  it('a bad range names its field; a table too large for a tab is refused before any work', () => {
    const base = { kind: 'sweep' as const, fields: familyFields({ material: 'resin-1.60', cyl: '0', axis: '0', eye: 'R', cr: '27', thickness: 'rule', front: 'auto' }), dir: '0', format: 'csv' as const };
    expect(() => planBatch({ ...base, power: { from: '6', to: '12', step: '-1' }, decentration: { from: '0', to: '1', step: '1' } }))
      .toThrow(new InputError('powers step', '-1 does not lead from 6 to 12'));
    expect(() => planBatch({ ...base, power: { from: 'six', to: '12', step: '1' }, decentration: { from: '0', to: '1', step: '1' } }))
      .toThrow(/^powers from: must be a number in dioptres/);
    expect(() => planBatch({ ...base, power: { from: '-20', to: '20', step: '0.01' }, decentration: { from: '0', to: '20', step: '0.01' } }))
      .toThrow(/^decentrations: powers x decentrations give 8006001 rows; the app makes at most 250000/);
  });
});
