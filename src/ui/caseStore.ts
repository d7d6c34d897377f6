/**
 * The app's binocular case: one validated case document (docs/case-file.md), shared by the
 * "both eyes" workspace (views, panel, limits) and by saving, opening and autosaving.
 * A new document is checked whole before it replaces the current one: on any error nothing
 * changes and the error (naming the field) is thrown to the caller.
 *
 * The store keeps the history of the current case's valid edits (src/ui/history.ts): undo and
 * redo bring a whole case back and tell the listeners as an edit does, so that the form, the
 * views, the panel and the autosave follow (docs/binocular.md, "Undo and redo"). Opening
 * another case (a file, a new case, the demo) starts its history afresh.
 */
import { type BinocularCase, type CaseDocument, readCase } from '../case/caseFile.ts';
import { History } from './history.ts';

/** Where a change came from, so that listeners can tell a user's edit from a file opened. */
export type CaseOrigin = 'edit' | 'open' | 'restore' | 'demo' | 'new';

type Listener = (c: BinocularCase, origin: CaseOrigin) => void;

/** An invented scenario for the "both eyes" workspace (not a real wearer). */
export const DEMO_BINOCULAR: CaseDocument = {
  format: 'decentra-case',
  version: 2,
  title: 'Invented scenario: R -9.50 / L -8.75 D in a frame wider than the PD, reading at 40 cm',
  note: 'A made-up example for trying Decentra; not a real wearer.',
  frame: { a: 54, b: 38, dbl: 18 },
  pantoDeg: 8,
  target: { kind: 'near', distance: 400, below: 140, lateral: 0 },
  tolerance: { profile: 'ansi-z80.1' },
  right: { sphere: -9.5, cyl: -0.75, axis: 175, material: 'resin-1.67', front: 1.5, ct: 1.4, pd: 31.5, decentration: 0, fittingHeight: 20 },
  left: { sphere: -8.75, cyl: -0.5, axis: 5, material: 'resin-1.67', front: 1.5, ct: 1.4, pd: 32, decentration: 0, fittingHeight: 20 },
} as CaseDocument;

export class CaseStore {
  private current: BinocularCase;
  private readonly listeners = new Set<Listener>();
  private readonly history: History<BinocularCase>;

  constructor(initial: unknown = DEMO_BINOCULAR) {
    this.current = readCase(initial);
    this.history = new History(this.current, (a, b) => JSON.stringify(a.doc) === JSON.stringify(b.doc));
  }

  get(): BinocularCase {
    return this.current;
  }

  /** The current document (a deep copy: edit it, then set it). */
  doc(): CaseDocument {
    return structuredClone(this.current.doc);
  }

  /**
   * Replace the case; throws a CaseError (nothing changes) if the document is not valid.
   * `group` (the field edited) makes quick edits of one field a single undo step.
   */
  set(doc: unknown, origin: CaseOrigin = 'edit', group: string | null = null): BinocularCase {
    const next = readCase(doc);
    this.current = next;
    // an edit is a step; another case (opened, new, the demo) starts a history of its own, as it
    // starts its own autosave entry (src/ui/persist/keeper.ts), so undo never carries one
    // case's values into another's entry
    if (origin === 'edit') this.history.record(next, group);
    else this.history.reset(next);
    for (const l of this.listeners) l(next, origin);
    return next;
  }

  /** Bring back the case before the last change (false: nothing to undo). */
  undo(): boolean {
    return this.step(this.history.undo());
  }

  /** Bring back the case the last undo left (false: nothing to redo). */
  redo(): boolean {
    return this.step(this.history.redo());
  }

  get canUndo(): boolean { return this.history.canUndo; }
  get canRedo(): boolean { return this.history.canRedo; }

  private step(c: BinocularCase | null): boolean {
    if (!c) return false;
    this.current = c;
    for (const l of this.listeners) l(c, 'edit');
    return true;
  }

  subscribe(l: Listener): () => void {
    this.listeners.add(l);
    return () => this.listeners.delete(l);
  }
}
