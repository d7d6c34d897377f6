/**
 * The "both eyes" case as the person types it, and its round trip with the case document
 * (docs/case-file.md). Values stay text until an edit is sent: then every number is read by
 * src/case (readNumber, after the app's decimal comma, decimalPoint in ../numberInput.ts: "2.5 mm",
 * "2,5 mm" and "0.25 cm" all work, a bad value names its field) and
 * the document is built; the store validates the whole of it (readCase). Pure: no DOM.
 *
 * A document field the form does not show (title, note, conic constants, cylinder surface,
 * toric form) is carried over unchanged from the document the edit started from. A prescribed
 * prism written in 360° notation (an `angle` entry) is shown read-only and carried over
 * unchanged until the person types a prism in base words, which then replaces it.
 */
import type { BinocularCase, CaseDocument, EyeDocument } from '../../case/caseFile.ts';
import { InputError, type Quantity, type Range, describeRange } from '../../case/input.ts';
import { readTypedNumber } from '../numberInput.ts';
import { LIMITS } from '../../case/lensCase.ts';
import { type PrismEntry, TOLERANCE_PROFILES, describePrism, prescribedComponents, prismWords } from '../../optics/index.ts';

export type Side = 'right' | 'left';
export const SIDES: readonly Side[] = ['right', 'left'];

export interface EyeForm {
  sphere: string;
  cyl: string;
  axis: string;
  /** a material id, or 'custom' with index and Abbe number */
  material: string;
  index: string;
  abbe: string;
  /** front surface: a rule (Vogel or steps), a true power, or a nominal power with tool index */
  frontMode: 'rule' | 'true' | 'nominal';
  frontRule: string;
  front: string;
  base: string;
  toolIndex: string;
  thicknessMode: 'centre' | 'rule';
  ct: string;
  minEdge: string;
  minCt: string;
  diameter: string;
  pd: string;
  cr: string;
  /** optical centre given directly, relative to the pupil */
  ocX: string;
  ocY: string;
  /** or from the frame */
  decentration: string;
  fittingHeight: string;
  ocHeight: string;
  /** prescribed prism in base words: horizontal amount (blank: none) with in/out, vertical with up/down */
  prismH: string;
  prismHBase: 'in' | 'out';
  prismV: string;
  prismVBase: 'up' | 'down';
  /**
   * A prism the document gives in 360° notation, in words (read-only); '' when there is none.
   * While it is not '' the document's prism is carried over unchanged; typing a prism in base
   * words clears it (controls.ts) and the base-word fields then replace it.
   */
  prism360: string;
  /** the order of the document's base-word entries (kept so that the document round-trips) */
  prismOrder: 'hv' | 'vh';
}

export interface BinocularForm {
  right: EyeForm;
  left: EyeForm;
  case: {
    frame: 'none' | 'boxed';
    a: string;
    b: string;
    dbl: string;
    ocMode: 'direct' | 'frame';
    panto: string;
    wrap: string;
    /** lower the optical centres for the pantoscopic tilt */
    tiltDrop: 'none' | 'rule-of-thumb' | 'centre-of-rotation';
    target: 'distance' | 'near' | 'level';
    distance: string;
    below: string;
    lateral: string;
    /** a reading level: below and inset from the distance centration points */
    levelBelow: string;
    levelInset: string;
    profile: string;
    tolH: string;
    tolV: string;
    /** the clinician summary's free text (optional) */
    recipient: string;
    practice: string;
    reference: string;
  };
}

/** The eye form's fields (prismOrder is bookkeeping, not a field). */
export type EyeKey = Exclude<keyof EyeForm, 'prismOrder'>;
export type CaseKey = keyof BinocularForm['case'];
/** A form field: 'right.sphere', 'left.ocX', 'case.target', ... */
export type FormField = `${Side}.${EyeKey}` | `case.${CaseKey}`;

/** The eye fields the form writes (everything else in an eye's document is carried over). */
const EYE_DOC_KEYS = [
  'sphere', 'cyl', 'axis', 'material', 'index', 'abbe', 'front', 'base', 'toolIndex', 'frontRule', 'ct',
  'minEdge', 'minCt', 'diameter', 'pd', 'cr', 'oc', 'decentration', 'fittingHeight', 'ocHeight', 'prism',
] as const;

export interface FieldSpec {
  label: string;
  quantity: Quantity;
  step: number;
  decimals: number;
  /** the range src/case accepts, shown as a hint (the check itself is src/case's) */
  range?: Range;
}

/** How each field is named on screen and in messages. */
export const EYE_LABELS: Record<EyeKey, FieldSpec> = {
  sphere: { label: 'Sphere (D)', quantity: 'power', step: 0.25, decimals: 2 },
  cyl: { label: 'Cylinder (D)', quantity: 'power', step: 0.25, decimals: 2 },
  axis: { label: 'Axis (°)', quantity: 'angle', step: 5, decimals: 0 },
  material: { label: 'Material', quantity: 'plain', step: 0, decimals: 0 },
  index: { label: 'Refractive index', quantity: 'plain', step: 0.01, decimals: 3 },
  abbe: { label: 'Abbe number', quantity: 'plain', step: 1, decimals: 0 },
  frontMode: { label: 'Front curve', quantity: 'plain', step: 0, decimals: 0 },
  frontRule: { label: 'Front curve rule', quantity: 'plain', step: 0, decimals: 0 },
  front: { label: 'Front power, true (D)', quantity: 'power', step: 0.25, decimals: 2 },
  base: { label: 'Front power, nominal (D)', quantity: 'power', step: 0.25, decimals: 2 },
  toolIndex: { label: 'Tool index', quantity: 'plain', step: 0.01, decimals: 3 },
  thicknessMode: { label: 'Thickness', quantity: 'plain', step: 0, decimals: 0 },
  ct: { label: 'Centre thickness (mm)', quantity: 'length', step: 0.1, decimals: 1 },
  minEdge: { label: 'Min edge (mm)', quantity: 'length', step: 0.1, decimals: 1 },
  minCt: { label: 'Min centre (mm)', quantity: 'length', step: 0.1, decimals: 1 },
  diameter: { label: 'Lens diameter (mm)', quantity: 'length', step: 1, decimals: 0 },
  pd: { label: 'Monocular PD (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  cr: { label: 'Back vertex to CR (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  ocX: { label: 'OC x from pupil (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  ocY: { label: 'OC y from pupil (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  decentration: { label: 'Decentration in (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  fittingHeight: { label: 'Fitting height (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  ocHeight: { label: 'OC height (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  prismH: { label: 'Prism, horizontal (Δ)', quantity: 'prism', step: 0.25, decimals: 2, range: LIMITS.prism },
  prismHBase: { label: 'Horizontal base', quantity: 'plain', step: 0, decimals: 0 },
  prismV: { label: 'Prism, vertical (Δ)', quantity: 'prism', step: 0.25, decimals: 2, range: LIMITS.prism },
  prismVBase: { label: 'Vertical base', quantity: 'plain', step: 0, decimals: 0 },
  prism360: { label: 'Prism (360° notation)', quantity: 'plain', step: 0, decimals: 0 },
};

export const CASE_LABELS: Record<CaseKey, FieldSpec> = {
  frame: { label: 'Frame', quantity: 'plain', step: 0, decimals: 0 },
  a: { label: 'A, box width (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  b: { label: 'B, box depth (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  dbl: { label: 'DBL (mm)', quantity: 'length', step: 0.5, decimals: 1 },
  ocMode: { label: 'Optical centres', quantity: 'plain', step: 0, decimals: 0 },
  panto: { label: 'Pantoscopic tilt (°)', quantity: 'angle', step: 1, decimals: 0, range: LIMITS.panto },
  wrap: { label: 'Wrap (°)', quantity: 'angle', step: 1, decimals: 0, range: LIMITS.wrap },
  tiltDrop: { label: 'OCs lowered for tilt', quantity: 'plain', step: 0, decimals: 0 },
  target: { label: 'Target', quantity: 'plain', step: 0, decimals: 0 },
  distance: { label: 'Distance from CRs (mm)', quantity: 'length', step: 10, decimals: 0 },
  below: { label: 'Below the CRs (mm)', quantity: 'length', step: 5, decimals: 0 },
  lateral: { label: 'To the left (mm)', quantity: 'length', step: 5, decimals: 0 },
  levelBelow: { label: 'Below the marks (mm)', quantity: 'length', step: 1, decimals: 1, range: LIMITS.levelBelow },
  levelInset: { label: 'Inset, nasal (mm)', quantity: 'length', step: 0.5, decimals: 1, range: LIMITS.levelInset },
  profile: { label: 'Tolerance', quantity: 'plain', step: 0, decimals: 0 },
  tolH: { label: 'Horizontal, pair (Δ)', quantity: 'prism', step: 0.05, decimals: 2 },
  tolV: { label: 'Vertical imbalance (Δ)', quantity: 'prism', step: 0.05, decimals: 2 },
  recipient: { label: 'Recipient', quantity: 'plain', step: 0, decimals: 0 },
  practice: { label: 'Practice', quantity: 'plain', step: 0, decimals: 0 },
  reference: { label: 'Reference', quantity: 'plain', step: 0, decimals: 0 },
};

/** The choices of the tilt drop (the rules are the engine's tiltDropMm). */
export const TILT_DROP_CHOICES: Record<string, BinocularForm['case']['tiltDrop']> = {
  'None': 'none',
  '1 mm per 2° (common practice)': 'rule-of-thumb',
  'CR on the axis (s·tan tilt)': 'centre-of-rotation',
};

/** "between -20 and 30 degrees": a field's accepted range in words, for its hint. */
export function rangeHint(spec: FieldSpec): string | null {
  return spec.range ? `accepted: ${describeRange(spec.range)}` : null;
}

export const EYE_NAMES: Record<Side, string> = { right: 'Right eye', left: 'Left eye' };

/** The spec of a form field (label, quantity, arrow-key step). */
export function fieldSpec(f: FormField): FieldSpec {
  const [group, key] = f.split('.') as [string, string];
  return group === 'case' ? CASE_LABELS[key as CaseKey] : EYE_LABELS[key as EyeKey];
}

/** "Right eye, sphere (D)" / "Pantoscopic tilt (°)": how a message names its field. */
export function fieldName(f: FormField): string {
  const [group] = f.split('.') as [string];
  const label = fieldSpec(f).label;
  return group === 'case' ? label : `${EYE_NAMES[group as Side]}, ${label.charAt(0).toLowerCase()}${label.slice(1)}`;
}

/** A number as the field shows it: the trade's decimals when they are exact, else every digit. */
export function showNumber(v: number | undefined, decimals: number, signedPower = false): string {
  if (v === undefined) return '';
  const s = v.toFixed(decimals);
  const t = Number(s) === v ? s : String(v);
  const clean = /^-0\.?0*$/.test(t) ? t.slice(1) : t;
  return signedPower && v > 0 ? `+${clean}` : clean;
}

/** The form that shows a validated case (the computed OC positions fill the direct fields). */
export function formFromCase(c: BinocularCase): BinocularForm {
  const d = c.doc;
  const eye = (side: Side): EyeForm => {
    const e = d[side];
    const ec = c[side];
    const custom = e.index !== undefined;
    const frontMode: EyeForm['frontMode'] = e.front !== undefined ? 'true' : e.base !== undefined ? 'nominal' : 'rule';
    return {
      sphere: showNumber(e.sphere, 2, true),
      cyl: showNumber(e.cyl ?? 0, 2, true),
      axis: showNumber(e.axis ?? 0, 0),
      material: custom ? 'custom' : (e.material ?? ec.lens.materialId ?? 'resin-1.50'),
      index: showNumber(ec.lens.index, 3),
      abbe: showNumber(ec.lens.abbe, 0),
      frontMode,
      frontRule: e.frontRule ?? 'vogel',
      front: showNumber(e.front ?? 0, 2, true),
      base: showNumber(e.base ?? 0, 2, true),
      toolIndex: showNumber(e.toolIndex ?? 1.53, 3),
      thicknessMode: e.ct !== undefined ? 'centre' : 'rule',
      ct: showNumber(e.ct ?? 2, 1),
      minEdge: showNumber(e.minEdge ?? 1, 1),
      minCt: showNumber(e.minCt ?? 2, 1),
      diameter: showNumber(e.diameter, 0),
      pd: showNumber(e.pd, 1),
      cr: showNumber(e.cr ?? 27, 1),
      // the direct fields hold the centre before any tilt drop (the document's oc; the drop is
      // applied again by src/case), so that a round trip does not lower it twice
      ocX: showNumber(ec.ocXMm, 1),
      ocY: showNumber(ec.ocYMm + ec.tiltDropMm, 1),
      decentration: showNumber(e.decentration ?? 0, 1),
      fittingHeight: showNumber(e.fittingHeight, 1),
      ocHeight: showNumber(e.ocHeight, 1),
      ...prismFields(e.prism ?? [], side),
    };
  };
  const t = d.target;
  const tol = d.tolerance ?? { profile: 'ansi-z80.1' as const };
  const anyDirect = SIDES.some((s) => d[s].oc !== undefined);
  return {
    right: eye('right'),
    left: eye('left'),
    case: {
      frame: d.frame ? 'boxed' : 'none',
      a: showNumber(d.frame?.a ?? 52, 1),
      b: showNumber(d.frame?.b ?? 40, 1),
      dbl: showNumber(d.frame?.dbl ?? 18, 1),
      ocMode: d.frame && !anyDirect ? 'frame' : 'direct',
      panto: showNumber(d.pantoDeg ?? 0, 1),
      wrap: showNumber(d.wrapDeg ?? 0, 1),
      tiltDrop: d.tiltDrop ?? 'none',
      target: t.kind,
      distance: showNumber(t.kind === 'near' ? t.distance : 400, 0),
      below: showNumber(t.kind === 'near' ? (t.below ?? 0) : 0, 0),
      lateral: showNumber(t.kind === 'near' ? (t.lateral ?? 0) : 0, 0),
      levelBelow: showNumber(t.kind === 'level' ? t.below : 10, 1),
      levelInset: t.kind === 'level' ? showNumber(t.inset, 1) : '',
      profile: tol.profile,
      tolH: showNumber(tol.profile === 'custom' ? tol.horizontal : 0.67, 2),
      tolV: showNumber(tol.profile === 'custom' ? tol.vertical : 0.33, 2),
      recipient: d.report?.recipient ?? '',
      practice: d.report?.practice ?? '',
      reference: d.report?.reference ?? '',
    },
  };
}

type PrismFields = Pick<EyeForm, 'prismH' | 'prismHBase' | 'prismV' | 'prismVBase' | 'prism360' | 'prismOrder'>;

/**
 * The prism fields for a document's prism entries: base words fill the fields; a 360° entry
 * is shown read-only, in the document's notation and in base words (the engine's reading of
 * it), and the base-word fields stay blank.
 */
export function prismFields(entries: readonly PrismEntry[], side: Side): PrismFields {
  const out: PrismFields = { prismH: '', prismHBase: 'in', prismV: '', prismVBase: 'up', prism360: '', prismOrder: 'hv' };
  if (entries.some((e) => 'angle' in e)) {
    const eye = side === 'right' ? 'R' : 'L';
    const p = { x: 0, y: 0 };
    prescribedComponents(entries, eye, p);
    const notation = entries.map((e) => ('angle' in e ? `${showNumber(e.amount, 2)} Δ base ${showNumber(e.angle, 1)}°` : '')).filter(Boolean).join(', ');
    out.prism360 = `${notation} (${prismWords(describePrism(p.x, p.y, eye))})`;
    return out;
  }
  entries.forEach((e, i) => {
    if ('angle' in e) return;
    if (e.base === 'in' || e.base === 'out') {
      out.prismH = showNumber(e.amount, 2);
      out.prismHBase = e.base;
    } else {
      out.prismV = showNumber(e.amount, 2);
      out.prismVBase = e.base;
      if (i === 0) out.prismOrder = 'vh';
    }
  });
  return out;
}

/**
 * Build the document for a form, starting from the current document (whose fields the form
 * does not show are kept). Throws an InputError whose field is the FormField at fault when a
 * number cannot be read; the ranges are checked afterwards by the store (readCase).
 */
export function docFromForm(form: BinocularForm, base: CaseDocument): CaseDocument {
  const num = (f: FormField, raw: string): number => {
    try {
      return readTypedNumber(f, raw, fieldSpec(f).quantity);
    } catch (e) {
      if (e instanceof InputError) throw new InputError(f, e.reason);
      throw e;
    }
  };
  const opt = (f: FormField, raw: string): number | undefined => (raw.trim() === '' ? undefined : num(f, raw));
  const c = form.case;
  const frame = c.frame === 'boxed'
    ? { a: num('case.a', c.a), b: num('case.b', c.b), dbl: num('case.dbl', c.dbl) }
    : undefined;
  const eye = (side: Side): EyeDocument => {
    const e = form[side];
    const f = (k: EyeKey): FormField => `${side}.${k}`;
    const prev = base[side] as Record<string, unknown>;
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(prev)) {
      if (!(EYE_DOC_KEYS as readonly string[]).includes(k)) out[k] = v;
    }
    out.sphere = num(f('sphere'), e.sphere);
    const cyl = opt(f('cyl'), e.cyl);
    if (cyl !== undefined) out.cyl = cyl;
    const axis = opt(f('axis'), e.axis);
    if (axis !== undefined) out.axis = axis;
    if (e.material === 'custom') {
      out.index = num(f('index'), e.index);
      const abbe = opt(f('abbe'), e.abbe);
      if (abbe !== undefined) out.abbe = abbe;
    } else {
      out.material = e.material;
      // an Abbe number given beside a named material in the document is kept
      if (prev.material !== undefined && prev.abbe !== undefined) out.abbe = prev.abbe;
    }
    if (e.frontMode === 'true') out.front = num(f('front'), e.front);
    else if (e.frontMode === 'nominal') {
      out.base = num(f('base'), e.base);
      const ti = opt(f('toolIndex'), e.toolIndex);
      if (ti !== undefined) out.toolIndex = ti;
    } else if (e.frontRule.trim() !== '' && e.frontRule.trim().toLowerCase() !== 'vogel') {
      out.frontRule = e.frontRule.trim();
    }
    if (e.thicknessMode === 'centre') out.ct = num(f('ct'), e.ct);
    else {
      const me = opt(f('minEdge'), e.minEdge);
      const mc = opt(f('minCt'), e.minCt);
      if (me !== undefined) out.minEdge = me;
      if (mc !== undefined) out.minCt = mc;
    }
    const dia = opt(f('diameter'), e.diameter);
    if (dia !== undefined) out.diameter = dia;
    out.pd = num(f('pd'), e.pd);
    const cr = opt(f('cr'), e.cr);
    if (cr !== undefined) out.cr = cr;
    if (c.ocMode === 'direct') {
      out.oc = { x: opt(f('ocX'), e.ocX) ?? 0, y: opt(f('ocY'), e.ocY) ?? 0 };
    } else {
      out.decentration = opt(f('decentration'), e.decentration) ?? 0;
      const fh = opt(f('fittingHeight'), e.fittingHeight);
      const oh = opt(f('ocHeight'), e.ocHeight);
      if (fh !== undefined) out.fittingHeight = fh;
      if (oh !== undefined) out.ocHeight = oh;
    }
    if (e.prism360 !== '') {
      // a 360° prism the person has not replaced: carried over as the document gives it
      if (prev.prism !== undefined) out.prism = prev.prism;
    } else {
      const entries = prismEntries(e, f);
      if (entries.length || Array.isArray(prev.prism)) out.prism = entries;
    }
    return out as EyeDocument;
  };
  const right = eye('right');
  const left = eye('left');
  const doc: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(base)) {
    if (!['frame', 'pantoDeg', 'wrapDeg', 'tiltDrop', 'target', 'tolerance', 'report', 'right', 'left'].includes(k)) doc[k] = v;
  }
  if (frame) doc.frame = frame;
  const panto = opt('case.panto', c.panto);
  const wrap = opt('case.wrap', c.wrap);
  if (panto !== undefined && panto !== 0) doc.pantoDeg = panto;
  if (wrap !== undefined && wrap !== 0) doc.wrapDeg = wrap;
  // 'none' is the default: written only when the document said so already
  if (c.tiltDrop !== 'none' || base.tiltDrop !== undefined) doc.tiltDrop = c.tiltDrop;
  if (c.target === 'distance') doc.target = { kind: 'distance' };
  else if (c.target === 'near') {
    doc.target = {
      kind: 'near',
      distance: num('case.distance', c.distance),
      below: opt('case.below', c.below) ?? 0,
      lateral: opt('case.lateral', c.lateral) ?? 0,
    };
  } else {
    const inset = opt('case.levelInset', c.levelInset);
    doc.target = { kind: 'level', below: num('case.levelBelow', c.levelBelow), ...(inset === undefined ? {} : { inset }) };
  }
  doc.tolerance = c.profile === 'custom'
    ? { profile: 'custom', horizontal: num('case.tolH', c.tolH), vertical: num('case.tolV', c.tolV) }
    : { profile: c.profile };
  // the summary's free text, as typed; a blank field is left out, and so is an empty report
  const report: Record<string, string> = {};
  for (const k of ['recipient', 'practice', 'reference'] as const) if (c[k].trim() !== '') report[k] = c[k];
  if (Object.keys(report).length) doc.report = report;
  doc.right = right;
  doc.left = left;
  return doc as CaseDocument;
}

/** The base-word prism entries of an eye's fields (blank amount: no entry), in the form's order. */
function prismEntries(e: EyeForm, f: (k: EyeKey) => FormField): PrismEntry[] {
  const read = (k: 'prismH' | 'prismV'): number | undefined => {
    const raw = e[k];
    if (raw.trim() === '') return undefined;
    try {
      return readTypedNumber(f(k), raw, 'prism');
    } catch (err) {
      if (err instanceof InputError) throw new InputError(f(k), err.reason);
      throw err;
    }
  };
  const h = read('prismH'), v = read('prismV');
  const hEntry: PrismEntry[] = h === undefined ? [] : [{ amount: h, base: e.prismHBase }];
  const vEntry: PrismEntry[] = v === undefined ? [] : [{ amount: v, base: e.prismVBase }];
  return e.prismOrder === 'vh' ? [...vEntry, ...hEntry] : [...hEntry, ...vEntry];
}

/**
 * The form field that shows a document path from a validation message ("right.ct",
 * "frame.a", "target.distance", "right.oc.x"), or null when no field shows it.
 */
export function fieldOfPath(path: string, form: BinocularForm): FormField | null {
  const p = path.trim();
  if (p.startsWith('case.')) return p.slice(5) in CASE_LABELS ? (p as FormField) : null;
  const m = /^(right|left)\.(.+)$/.exec(p);
  if (m) return eyeField(m[1] as Side, m[2]!, form);
  if (p === 'frame') return 'case.frame';
  const level = form.case.target === 'level';
  const top: Record<string, FormField> = {
    'frame.a': 'case.a', 'frame.b': 'case.b', 'frame.dbl': 'case.dbl', pantoDeg: 'case.panto', wrapDeg: 'case.wrap',
    tiltDrop: 'case.tiltDrop',
    'target.distance': 'case.distance', 'target.below': level ? 'case.levelBelow' : 'case.below', 'target.lateral': 'case.lateral',
    'target.inset': 'case.levelInset',
    target: 'case.target', 'target.kind': 'case.target', tolerance: 'case.profile', 'tolerance.profile': 'case.profile',
    'tolerance.horizontal': 'case.tolH', 'tolerance.vertical': 'case.tolV',
    report: 'case.recipient', 'report.recipient': 'case.recipient', 'report.practice': 'case.practice',
    'report.reference': 'case.reference',
  };
  return top[p] ?? null;
}

/**
 * The field that shows a prism entry's path ("prism", "prism.1", "prism.0.amount"): the
 * read-only 360° line while the document's prism is carried over, else the amount field of
 * the entry at that index in the order docFromForm wrote them.
 */
function prismField(side: Side, key: string, form: BinocularForm): FormField | null {
  const e = form[side];
  if (e.prism360 !== '') return `${side}.prism360`;
  const m = /^prism(?:\.(\d+))?(?:\.(amount|base|angle))?$/.exec(key);
  if (!m) return null;
  const groups: ('prismH' | 'prismV')[] = [];
  if (e.prismOrder === 'vh') {
    if (e.prismV.trim() !== '') groups.push('prismV');
    if (e.prismH.trim() !== '') groups.push('prismH');
  } else {
    if (e.prismH.trim() !== '') groups.push('prismH');
    if (e.prismV.trim() !== '') groups.push('prismV');
  }
  const g = groups[m[1] === undefined ? 0 : Number(m[1])] ?? 'prismH';
  if (m[2] === 'base') return `${side}.${g === 'prismH' ? 'prismHBase' : 'prismVBase'}`;
  return `${side}.${g}`;
}

function eyeField(side: Side, key: string, form: BinocularForm): FormField | null {
  const e = form[side];
  if (key === 'prism' || key.startsWith('prism.')) return prismField(side, key, form);
  const map: Record<string, EyeKey> = {
    'oc.x': 'ocX', 'oc.y': 'ocY', oc: 'ocX', frontRule: e.frontMode === 'rule' ? 'frontRule' : 'frontMode',
    front: e.frontMode === 'true' ? 'front' : 'frontMode', base: e.frontMode === 'nominal' ? 'base' : 'frontMode',
    toolIndex: 'toolIndex', index: e.material === 'custom' ? 'index' : 'material',
    abbe: e.material === 'custom' ? 'abbe' : 'material',
    ct: e.thicknessMode === 'centre' ? 'ct' : 'thicknessMode',
    minEdge: e.thicknessMode === 'rule' ? 'minEdge' : 'thicknessMode',
    minCt: e.thicknessMode === 'rule' ? 'minCt' : 'thicknessMode',
  };
  const k = map[key] ?? (key in EYE_LABELS ? (key as EyeKey) : null);
  return k ? `${side}.${k}` : null;
}

/** The tolerance profiles offered, with the standards' names as the engine labels them. */
export function profileChoices(): Record<string, string> {
  const out: Record<string, string> = {};
  for (const p of TOLERANCE_PROFILES) out[p.name] = p.id;
  out['User-defined (Δ)'] = 'custom';
  return out;
}
