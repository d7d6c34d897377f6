/**
 * The case file: a whole binocular case as a versioned JSON document of our own design
 * (docs/case-file.md). Loading checks everything first (structure with a schema, then every
 * value with the same rules as the CLI and the UI) and returns nothing unless all is valid;
 * an error names the field by its path ("right.ct") and says why.
 */
import * as v from 'valibot';
import { type PrismEntry, type TiltDrop, findProfile, tiltDropMm } from '../optics/index.ts';
import { InputError, inRange } from './input.ts';
import { type FieldKey, LIMITS, type LensForm, type RawFields, buildLens, readLensForm } from './lensCase.ts';

export const CASE_FORMAT = 'decentra-case';
export const CASE_VERSION = 2;
/** Larger files are refused before parsing (a case is a few kilobytes). */
export const MAX_CASE_BYTES = 256 * 1024;

const num = v.pipe(v.number(), v.finite());
const text = (max: number) => v.pipe(v.string(), v.maxLength(max));

const lensEntries = {
  sphere: num, cyl: v.optional(num), axis: v.optional(num),
  material: v.optional(text(40)), index: v.optional(num), abbe: v.optional(num),
  front: v.optional(num), base: v.optional(num), toolIndex: v.optional(num), frontRule: v.optional(text(200)),
  ct: v.optional(num), minEdge: v.optional(num), minCt: v.optional(num), diameter: v.optional(num),
  frontK: v.optional(num), backK: v.optional(num), cylOn: v.optional(v.picklist(['back', 'front'])),
  toric: v.optional(v.picklist(['tyre', 'barrel'])),
};

/** A prescribed prism: an amount with a base word, or an amount at a 360° base angle. */
const PrismEntrySchema = v.union([
  v.strictObject({ amount: num, base: v.picklist(['in', 'out', 'up', 'down']) }),
  v.strictObject({ amount: num, angle: num }),
]);

const EyeSchema = v.strictObject({
  ...lensEntries,
  /** prescribed prism: up to two entries (a horizontal and a vertical base word), or one 360° entry */
  prism: v.optional(v.pipe(v.array(PrismEntrySchema), v.maxLength(2))),
  /** reading addition, D (kept from an imported prescription; not used by the single-vision trace) */
  add: v.optional(num),
  /** monocular PD, mm */
  pd: num,
  /** back vertex to centre of rotation, mm */
  cr: v.optional(num),
  /** optical centre relative to the pupil's straight-ahead position, mm (x to the wearer's left, y up) */
  oc: v.optional(v.strictObject({ x: num, y: num })),
  /** or from the frame: decentration inwards from the boxed centre, and heights above the lower box line */
  decentration: v.optional(num),
  fittingHeight: v.optional(num),
  ocHeight: v.optional(num),
});

const TargetSchema = v.variant('kind', [
  v.strictObject({ kind: v.literal('distance') }),
  /** distance from the centres of rotation, mm; below and lateral offsets of the target, mm */
  v.strictObject({ kind: v.literal('near'), distance: num, below: v.optional(num), lateral: v.optional(num) }),
  /** a reading level: lens points `below` mm below and `inset` mm towards the nose from each
   *  eye's distance centration point */
  v.strictObject({ kind: v.literal('level'), below: num, inset: v.optional(num) }),
]);

const ToleranceSchema = v.variant('profile', [
  v.strictObject({ profile: v.picklist(['ansi-z80.1', 'iso-21987']) }),
  v.strictObject({ profile: v.literal('custom'), horizontal: num, vertical: num }),
]);

export const CaseSchema = v.strictObject({
  format: v.literal(CASE_FORMAT),
  version: v.literal(CASE_VERSION),
  title: v.optional(text(200)),
  note: v.optional(text(4000)),
  /** boxed frame: A (horizontal box), B (vertical box), DBL, mm */
  frame: v.optional(v.strictObject({ a: num, b: num, dbl: num })),
  pantoDeg: v.optional(num),
  wrapDeg: v.optional(num),
  /** lower the optical centres for the pantoscopic tilt (docs/conventions.md) */
  tiltDrop: v.optional(v.picklist(['none', 'rule-of-thumb', 'centre-of-rotation'])),
  target: TargetSchema,
  tolerance: v.optional(ToleranceSchema),
  /** free text for the clinician summary (no real data in examples) */
  report: v.optional(v.strictObject({ recipient: v.optional(text(200)), practice: v.optional(text(200)), reference: v.optional(text(100)) })),
  right: EyeSchema,
  left: EyeSchema,
});

export type CaseDocument = v.InferOutput<typeof CaseSchema>;
export type EyeDocument = CaseDocument['right'];

export interface EyeCase {
  lens: LensForm;
  pdMm: number;
  crMm: number;
  /** optical centre relative to the pupil, mm (with the tilt drop applied) */
  ocXMm: number;
  ocYMm: number;
  /** prescribed prism entries (empty: none) */
  prism: PrismEntry[];
  /** how far the optical centre was lowered for the tilt, mm (0 unless tiltDrop asks) */
  tiltDropMm: number;
}

/** A validated case: the document (as saved) and its values, checked. */
export interface BinocularCase {
  doc: CaseDocument;
  right: EyeCase;
  left: EyeCase;
  pantoDeg: number;
  wrapDeg: number;
}

export class CaseError extends InputError {}

/**
 * One lens's box in the boxing system (ISO 8624), in the binocular frame: x from the middle
 * of the bridge (the boxed centres are (A + DBL)/2 either side), y from the pupils' height
 * (the box's lower line lies a fitting height below it), mm.
 */
export function frameBox(
  frame: { a: number; b: number; dbl: number }, side: 'right' | 'left', fittingHeightMm = frame.b / 2,
): { centreX: number; xMin: number; xMax: number; yMin: number; yMax: number } {
  const centreX = ((side === 'right' ? -1 : 1) * (frame.a + frame.dbl)) / 2;
  return {
    centreX, xMin: centreX - frame.a / 2, xMax: centreX + frame.a / 2,
    yMin: -fittingHeightMm, yMax: frame.b - fittingHeightMm,
  };
}

/** Read a case from file bytes: UTF-8 (strict), size-limited, JSON, schema, values. */
export function readCaseBytes(bytes: Uint8Array): BinocularCase {
  if (bytes.length > MAX_CASE_BYTES) {
    throw new CaseError('file', `is ${Math.round(bytes.length / 1024)} kB; a case file is at most ${MAX_CASE_BYTES / 1024} kB`);
  }
  let textContent: string;
  try {
    textContent = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw new CaseError('file', 'is not valid UTF-8 text');
  }
  return readCaseText(textContent);
}

export function readCaseText(textContent: string): BinocularCase {
  if (textContent.length > MAX_CASE_BYTES) {
    throw new CaseError('file', `is longer than ${MAX_CASE_BYTES / 1024} kB; a case file is at most that`);
  }
  let raw: unknown;
  try {
    raw = JSON.parse(textContent.replace(/^\uFEFF/, ''));
  } catch (e) {
    throw new CaseError('file', `is not valid JSON (${(e as Error).message})`);
  }
  return readCase(raw);
}

/** Validate a parsed document (migrating older versions first). */
export function readCase(raw: unknown): BinocularCase {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) {
    throw new CaseError('case', 'must be a JSON object (a Decentra case document)');
  }
  const migrated = migrate(raw);
  const r = v.safeParse(CaseSchema, migrated);
  if (!r.success) {
    const issue = r.issues[0];
    const path = v.getDotPath(issue) ?? 'case';
    throw new CaseError(path, explainIssue(issue));
  }
  try {
    return checkValues(r.output);
  } catch (e) {
    if (e instanceof InputError && !(e instanceof CaseError)) throw new CaseError(e.field, e.reason);
    throw e;
  }
}

function explainIssue(issue: v.BaseIssue<unknown>): string {
  if (issue.kind === 'schema' && issue.type === 'strict_object' && issue.expected === 'never') {
    return `is not a field of a Decentra case (remove it)`;
  }
  if (issue.received === 'undefined') return `is required (${issue.expected ?? 'a value'})`;
  if (issue.type === 'finite') return `must be a finite number, got ${issue.received}`;
  return `must be ${issue.expected ?? 'valid'}, got ${issue.received}`;
}

/**
 * Older documents are brought to the current version here, one step at a time. Version 1 is
 * the first; a document without a version is refused (it may be anything).
 * 1 -> 2: version 2 only adds optional fields (prescribed prism, a reading-level target, the
 * tilt drop, the summary's free text), so a version 1 document is a valid version 2 one.
 */
const MIGRATIONS: Record<number, (doc: Record<string, unknown>) => Record<string, unknown>> = {
  1: (doc) => ({ ...doc, version: 2 }),
};

export function migrate(raw: unknown): unknown {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) return raw;
  let doc = raw as Record<string, unknown>;
  let ver = doc.version;
  while (typeof ver === 'number' && ver < CASE_VERSION && MIGRATIONS[ver]) {
    doc = MIGRATIONS[ver]!(doc);
    ver = doc.version;
  }
  return doc;
}

function checkValues(doc: CaseDocument): BinocularCase {
  const pantoDeg = doc.pantoDeg === undefined ? 0 : inRange('pantoDeg', doc.pantoDeg, LIMITS.panto);
  const wrapDeg = doc.wrapDeg === undefined ? 0 : inRange('wrapDeg', doc.wrapDeg, LIMITS.wrap);
  const eye = (side: 'right' | 'left'): EyeCase => {
    const d = doc[side];
    const label = (k: FieldKey | string) => `${side}.${k}`;
    const fields: RawFields = {};
    for (const k of Object.keys(lensEntries) as FieldKey[]) {
      const val = (d as Record<string, unknown>)[k];
      if (val !== undefined) fields[k] = val;
    }
    const lens = readLensForm(fields, label);
    const pdMm = inRange(label('pd'), d.pd, LIMITS.pd);
    const crMm = d.cr === undefined ? 27 : inRange(label('cr'), d.cr, LIMITS.cr);
    let ocXMm: number, ocYMm: number;
    const fromFrame = d.decentration !== undefined || d.fittingHeight !== undefined || d.ocHeight !== undefined;
    if (d.oc && fromFrame) {
      throw new CaseError(label('oc'), 'give the optical centre either directly (oc) or from the frame (decentration, heights), not both');
    }
    if (d.oc) {
      ocXMm = inRange(label('oc.x'), d.oc.x, LIMITS.point);
      ocYMm = inRange(label('oc.y'), d.oc.y, LIMITS.point);
    } else if (fromFrame || doc.frame) {
      if (!doc.frame) throw new CaseError('frame', `is required when ${side} gives a decentration or heights`);
      const { a, b, dbl } = doc.frame;
      inRange('frame.a', a, { min: 20, max: 80, unit: 'mm' });
      inRange('frame.b', b, { min: 10, max: 70, unit: 'mm' });
      inRange('frame.dbl', dbl, { min: 5, max: 30, unit: 'mm' });
      const dec = inRange(label('decentration'), d.decentration ?? 0, { min: -20, max: 20, unit: 'mm' });
      const fit = inRange(label('fittingHeight'), d.fittingHeight ?? b / 2, { min: 0, max: b, unit: 'mm' });
      const och = inRange(label('ocHeight'), d.ocHeight ?? fit, { min: 0, max: b, unit: 'mm' });
      // decentration moves the OC inwards (towards the nose) from the boxed centre
      const box = frameBox(doc.frame, side, fit);
      const inward = side === 'right' ? 1 : -1;
      const pupilX = side === 'right' ? -pdMm : pdMm;
      ocXMm = box.centreX + inward * dec - pupilX;
      ocYMm = och - fit;
    } else {
      ocXMm = 0;
      ocYMm = 0;
    }
    if (d.add !== undefined) inRange(label('add'), d.add, { min: 0, max: 6, unit: 'D' });
    const drop = tiltDropMm((doc.tiltDrop ?? 'none') as TiltDrop, pantoDeg, crMm);
    return { lens, pdMm, crMm, ocXMm, ocYMm: ocYMm - drop, prism: readPrism(label('prism'), d.prism ?? []), tiltDropMm: drop };
  };
  const right = eye('right');
  const left = eye('left');
  // a lens that cannot be made (surfaces crossing, a front too strong) is refused here too,
  // so that a case that loads is a case that can be evaluated
  buildLens(right.lens, (k) => `right.${k}`);
  buildLens(left.lens, (k) => `left.${k}`);
  const t = doc.target;
  if (t.kind === 'near') {
    inRange('target.distance', t.distance, { min: 100, max: 10000, unit: 'mm' });
    inRange('target.below', t.below ?? 0, { min: -300, max: 300, unit: 'mm' });
    inRange('target.lateral', t.lateral ?? 0, { min: -300, max: 300, unit: 'mm' });
  } else if (t.kind === 'level') {
    inRange('target.below', t.below, LIMITS.levelBelow);
    inRange('target.inset', t.inset ?? 0, LIMITS.levelInset);
  }
  if (doc.tolerance?.profile === 'custom') {
    inRange('tolerance.horizontal', doc.tolerance.horizontal, { min: 0, max: 20, above: true, unit: 'Δ' });
    inRange('tolerance.vertical', doc.tolerance.vertical, { min: 0, max: 20, above: true, unit: 'Δ' });
  } else if (doc.tolerance && !findProfile(doc.tolerance.profile)) {
    throw new CaseError('tolerance.profile', `unknown profile '${doc.tolerance.profile}'`);
  }
  return { doc, right, left, pantoDeg, wrapDeg };
}

/** Check one eye's prescribed prism entries: amounts, angles, and no contradictory bases. */
function readPrism(field: string, entries: readonly PrismEntry[]): PrismEntry[] {
  const seen = new Set<string>();
  entries.forEach((e, i) => {
    inRange(`${field}.${i}.amount`, e.amount, LIMITS.prism);
    const group = 'angle' in e ? 'angle' : e.base === 'in' || e.base === 'out' ? 'horizontal' : 'vertical';
    if ('angle' in e) inRange(`${field}.${i}.angle`, e.angle, LIMITS.prismAngle);
    if (seen.has(group) || (group === 'angle' && seen.size) || (group !== 'angle' && seen.has('angle'))) {
      throw new CaseError(`${field}.${i}`, group === 'angle' || seen.has('angle')
        ? 'give either base words (in/out, up/down) or one 360° angle, not both'
        : `gives a second ${group} prism; give at most one ${group} entry (in or out, up or down)`);
    }
    seen.add(group);
  });
  return entries.map((e) => ({ ...e }));
}

/** The document as saved: stable key order, two-space indentation, a final newline. */
export function writeCase(doc: CaseDocument): string {
  return `${JSON.stringify(doc, null, 2)}\n`;
}
