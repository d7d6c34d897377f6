/**
 * Prescriptions in and out through HL7 FHIR's VisionPrescription resource (R4 and R5 JSON),
 * docs/fhir.md. Import: a lone VisionPrescription, or one inside a Bundle, becomes a Decentra
 * case document with each assumption said in a note (the resource carries no PD, frame,
 * material or lens form). Export: the prescription of a case as a VisionPrescription.
 *
 * Validation with the case file's schema library (valibot). A resource is refused whole, with
 * one message naming the path ("lensSpecification.1.eye") and the reason; nothing is written.
 * Unknown FHIR elements are allowed and ignored (a resource carries many we do not use).
 * Pure: no DOM, no Node, so the app imports the same files.
 */
import * as v from 'valibot';
import { type PrismEntry, describePrism, prescribedComponents } from '../optics/index.ts';
import { CASE_FORMAT, CASE_VERSION, type CaseDocument, CaseError, readCase } from './caseFile.ts';
import { InputError, inRange } from './input.ts';
import { DEFAULTS, LIMITS } from './lensCase.ts';

/** Larger resources are refused before parsing (a prescription is a few kilobytes). */
export const MAX_FHIR_BYTES = 1024 * 1024;

/** The FHIR code system of the example product codes (lens, contact). */
export const PRODUCT_SYSTEM = 'http://terminology.hl7.org/CodeSystem/ex-visionprescriptionproduct';

const num = v.pipe(v.number(), v.finite());

const PrismSchema = v.looseObject({ amount: num, base: v.picklist(['up', 'down', 'in', 'out']) });

const LensSpecSchema = v.looseObject({
  product: v.optional(v.looseObject({
    coding: v.optional(v.array(v.looseObject({ system: v.optional(v.string()), code: v.optional(v.string()) }))),
    text: v.optional(v.string()),
  })),
  eye: v.picklist(['right', 'left']),
  sphere: v.optional(num),
  cylinder: v.optional(num),
  axis: v.optional(v.pipe(v.number(), v.integer())),
  prism: v.optional(v.array(PrismSchema)),
  add: v.optional(num),
});

const ResourceSchema = v.looseObject({
  resourceType: v.literal('VisionPrescription'),
  id: v.optional(v.string()),
  dateWritten: v.optional(v.string()),
  lensSpecification: v.pipe(v.array(LensSpecSchema), v.minLength(1)),
});

type LensSpec = v.InferOutput<typeof LensSpecSchema>;

export interface EyePrescription {
  sphere: number;
  cyl: number;
  axis: number;
  prism: PrismEntry[];
  add: number | null;
}

export interface ImportedPrescription {
  /** the resource's id and date, where given */
  id: string | null;
  dateWritten: string | null;
  right: EyePrescription;
  left: EyePrescription;
}

export class FhirError extends CaseError {}

/** Find the VisionPrescription: the resource itself, or the one inside a Bundle. */
function locate(raw: unknown): { resource: unknown; prefix: string } {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) {
    throw new FhirError('resource', 'must be a JSON object (a FHIR VisionPrescription or a Bundle holding one)');
  }
  const r = raw as Record<string, unknown>;
  if (r.resourceType !== 'Bundle') return { resource: raw, prefix: '' };
  const entries = Array.isArray(r.entry) ? r.entry : [];
  const found = entries
    .map((e, i) => ({ res: (e as Record<string, unknown> | null)?.resource, i }))
    .filter((x) => (x.res as Record<string, unknown> | undefined)?.resourceType === 'VisionPrescription');
  if (found.length !== 1) {
    throw new FhirError('entry', found.length === 0
      ? 'the Bundle holds no VisionPrescription'
      : `the Bundle holds ${found.length} VisionPrescriptions; give a file with one`);
  }
  return { resource: found[0]!.res, prefix: `entry.${found[0]!.i}.resource.` };
}

function explain(issue: v.BaseIssue<unknown>): string {
  if (issue.received === 'undefined') return `is required (${issue.expected ?? 'a value'})`;
  if (issue.type === 'integer') return `must be a whole number of degrees, got ${issue.received}`;
  if (issue.type === 'finite') return `must be a finite number, got ${issue.received}`;
  return `must be ${issue.expected ?? 'valid'}, got ${issue.received}`;
}

/** Read a resource (already parsed JSON) into a prescription, or throw naming the path. */
export function readVisionPrescription(raw: unknown): ImportedPrescription {
  const { resource, prefix } = locate(raw);
  const r = v.safeParse(ResourceSchema, resource);
  if (!r.success) {
    const issue = r.issues[0];
    throw new FhirError(`${prefix}${v.getDotPath(issue) ?? 'resource'}`, explain(issue));
  }
  const res = r.output;
  const eyes: Partial<Record<'right' | 'left', EyePrescription>> = {};
  res.lensSpecification.forEach((spec, i) => {
    const at = (k: string) => `${prefix}lensSpecification.${i}.${k}`;
    const code = spec.product?.coding?.find((c) => c.system === PRODUCT_SYSTEM)?.code;
    if (code !== undefined && code !== 'lens') {
      throw new FhirError(at('product'), `is '${code}': Decentra models spectacle lenses, not contact lenses`);
    }
    if (eyes[spec.eye]) throw new FhirError(at('eye'), `gives a second ${spec.eye} eye; give one lens specification per eye`);
    try {
      eyes[spec.eye] = readEye(spec, at);
    } catch (e) {
      if (e instanceof InputError && !(e instanceof FhirError)) throw new FhirError(e.field, e.reason);
      throw e;
    }
  });
  if (!eyes.right || !eyes.left) {
    throw new FhirError(`${prefix}lensSpecification`, `has no ${eyes.right ? 'left' : 'right'} eye; Decentra needs both eyes`);
  }
  return { id: res.id ?? null, dateWritten: res.dateWritten ?? null, right: eyes.right, left: eyes.left };
}

function readEye(spec: LensSpec, at: (k: string) => string): EyePrescription {
  if (spec.sphere === undefined) throw new FhirError(at('sphere'), 'is required for a spectacle lens (the sphere power in dioptres)');
  const sphere = inRange(at('sphere'), spec.sphere, LIMITS.sphere);
  const cyl = spec.cylinder === undefined ? 0 : inRange(at('cylinder'), spec.cylinder, LIMITS.cyl);
  if (cyl !== 0 && spec.axis === undefined) throw new FhirError(at('axis'), 'is required with a cylinder (0 to 180 degrees)');
  const axisRaw = spec.axis === undefined ? 0 : inRange(at('axis'), spec.axis, LIMITS.axis);
  const prism: PrismEntry[] = [];
  const groups = new Set<string>();
  (spec.prism ?? []).forEach((p, j) => {
    inRange(at(`prism.${j}.amount`), p.amount, LIMITS.prism);
    const g = p.base === 'in' || p.base === 'out' ? 'horizontal' : 'vertical';
    if (groups.has(g)) throw new FhirError(at(`prism.${j}`), `gives a second ${g} prism; give at most one ${g} entry`);
    groups.add(g);
    prism.push({ amount: p.amount, base: p.base });
  });
  const add = spec.add === undefined ? null : inRange(at('add'), spec.add, { min: 0, max: 6, unit: 'D' });
  return { sphere, cyl, axis: axisRaw === 180 ? 0 : axisRaw, prism, add };
}

export interface ImportOptions {
  /** monocular PDs, mm (assumed 32 each when not given) */
  pdMm?: { right: number; left: number };
}

/**
 * A Decentra case from an imported prescription. Returns the document (validated) and one
 * note per assumption: what the resource lacked and what was assumed instead.
 */
export function caseFromPrescription(p: ImportedPrescription, opts: ImportOptions = {}): { doc: CaseDocument; notes: string[] } {
  const notes: string[] = [];
  const pd = opts.pdMm ?? { right: 32, left: 32 };
  if (!opts.pdMm) notes.push('PD: the resource has none (FHIR carries no fitting data); assumed 32 mm per eye: give --pd R,L');
  notes.push('frame and optical centres: none in the resource; the optical centres are assumed in front of the pupils');
  notes.push('material and lens form: none in the resource; assumed standard resin (n 1.498), Vogel front curve, thinnest lens on a 65 mm blank (docs/choices.md)');
  notes.push('target: distance, straight ahead (the resource gives none)');
  const eye = (side: 'right' | 'left') => {
    const e = p[side];
    if (e.add !== null) {
      notes.push(`${side}.add: +${e.add.toFixed(2)} D kept in the case; for a reading target, set a near target or a reading level`);
    }
    return {
      sphere: e.sphere,
      ...(e.cyl !== 0 ? { cyl: e.cyl, axis: e.axis } : {}),
      ...(e.prism.length ? { prism: e.prism.map((x) => ({ ...x })) } : {}),
      ...(e.add !== null ? { add: e.add } : {}),
      pd: pd[side],
    };
  };
  const raw = {
    format: CASE_FORMAT,
    version: CASE_VERSION,
    title: `Imported VisionPrescription${p.id ? ` ${p.id}` : ''}${p.dateWritten ? `, written ${p.dateWritten}` : ''}`.slice(0, 200),
    target: { kind: 'distance' },
    right: eye('right') as Record<string, unknown>,
    left: eye('left') as Record<string, unknown>,
  };
  // a strong prescription may not make a lens on the thickness rule's default blank: take the
  // largest blank, in 5 mm steps, on which it does, and say so
  for (let tries = 0; ; tries++) {
    try {
      return { doc: readCase(raw).doc, notes };
    } catch (e) {
      const m = e instanceof InputError ? /^(right|left)\.diameter$/.exec(e.field) : null;
      if (!m || tries > 24) throw e;
      const side = m[1] as 'right' | 'left';
      const now = (raw[side].diameter as number | undefined) ?? DEFAULTS.diameterMm;
      if (now - 5 < LIMITS.diameter.min) throw e;
      raw[side] = { ...raw[side], diameter: now - 5 };
      if (!notes.some((n) => n.startsWith(`${side}.diameter`))) {
        notes.push(`${side}.diameter: this power cannot be made ${DEFAULTS.diameterMm} mm across on the default thickness rule; a smaller blank is used`);
      }
    }
  }
}

/** Import from text: parse, locate, validate, build the case. */
export function importVisionPrescriptionText(text: string, opts: ImportOptions = {}): { doc: CaseDocument; notes: string[] } {
  if (text.length > MAX_FHIR_BYTES) throw new FhirError('resource', `is longer than ${MAX_FHIR_BYTES / 1024} kB; a prescription is at most that`);
  let raw: unknown;
  try {
    raw = JSON.parse(text.replace(/^\uFEFF/, ''));
  } catch (e) {
    throw new FhirError('resource', `is not valid JSON (${(e as Error).message})`);
  }
  return caseFromPrescription(readVisionPrescription(raw), opts);
}

/**
 * The case's prescription as a FHIR VisionPrescription (R4 and R5 share these elements).
 * A prism in 360° notation is written as its base-in/out and up/down components (FHIR has
 * only base words); an axis is written as a whole number of degrees, 180 for 0.
 */
export function visionPrescriptionFromCase(doc: CaseDocument, dateIso: string): { resource: object; notes: string[] } {
  const c = readCase(doc);
  const notes: string[] = [];
  const spec = (side: 'right' | 'left') => {
    const d = c.doc[side];
    const f = c[side].lens;
    const code = side === 'right' ? 'R' : 'L';
    const out: Record<string, unknown> = {
      product: { coding: [{ system: PRODUCT_SYSTEM, code: 'lens' }] },
      eye: side,
      sphere: f.sphereD,
    };
    if (f.cylD !== 0) {
      const axis = Math.round(f.axisDeg);
      if (axis !== f.axisDeg) notes.push(`${side}.axis: ${f.axisDeg}° written as ${axis === 0 ? 180 : axis}° (FHIR axes are whole degrees)`);
      out.cylinder = f.cylD;
      out.axis = axis === 0 ? 180 : axis;
    }
    const entries = c[side].prism;
    if (entries.length) {
      const p = { x: 0, y: 0 };
      prescribedComponents(entries, code, p);
      const dsc = describePrism(p.x, p.y, code);
      const prism: { amount: number; base: string }[] = [];
      if (dsc.horizontal.base) prism.push({ amount: dsc.horizontal.amount, base: dsc.horizontal.base });
      if (dsc.vertical.base) prism.push({ amount: dsc.vertical.amount, base: dsc.vertical.base });
      if (entries.some((e) => 'angle' in e)) notes.push(`${side}.prism: the 360° entry is written as its base-in/out and up/down components`);
      if (prism.length) out.prism = prism;
    }
    if (d.add !== undefined) out.add = d.add;
    return out;
  };
  return {
    resource: {
      resourceType: 'VisionPrescription',
      status: 'active',
      created: dateIso,
      dateWritten: dateIso,
      patient: { display: 'not held by Decentra' },
      prescriber: { display: 'not held by Decentra' },
      lensSpecification: [spec('right'), spec('left')],
    },
    notes,
  };
}
