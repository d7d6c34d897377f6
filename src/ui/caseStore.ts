/**
 * The app's binocular case: one validated case document (docs/case-file.md), shared by the
 * "both eyes" workspace (views, panel, limits) and by saving, opening and autosaving.
 * A new document is checked whole before it replaces the current one: on any error nothing
 * changes and the error (naming the field) is thrown to the caller.
 */
import { type BinocularCase, type CaseDocument, readCase } from '../case/caseFile.ts';

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

  constructor(initial: unknown = DEMO_BINOCULAR) {
    this.current = readCase(initial);
  }

  get(): BinocularCase {
    return this.current;
  }

  /** The current document (a deep copy: edit it, then set it). */
  doc(): CaseDocument {
    return structuredClone(this.current.doc);
  }

  /** Replace the case; throws a CaseError (nothing changes) if the document is not valid. */
  set(doc: unknown, origin: CaseOrigin = 'edit'): BinocularCase {
    const next = readCase(doc);
    this.current = next;
    for (const l of this.listeners) l(next, origin);
    return next;
  }

  subscribe(l: Listener): () => void {
    this.listeners.add(l);
    return () => this.listeners.delete(l);
  }
}
