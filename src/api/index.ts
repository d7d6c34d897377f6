/**
 * Decentra as a library: `import { ... } from 'decentra'` (docs/api.md). A small public API over
 * the engine (src/optics) and the case (src/case): build a lens, the four answers at a visual
 * point, the visual point for a near target, decentration limits, a whole binocular case, case
 * files and HL7 FHIR VisionPrescriptions.
 *
 * Every argument is validated, with the case layer's own checks and ranges (LIMITS), by the
 * functions of src/api/core.ts, which the `decentra` command calls too (with its flag names);
 * a bad one throws a DecentraError naming the argument and the reason, and nothing else is
 * thrown for bad input. Behind this layer the per-ray engine stays fast and unchecked. A ray
 * that misses, or is totally internally reflected, is a status in the result, not an error.
 *
 * The public types are declared in this file and use only plain numbers, strings and objects,
 * so that the emitted declarations (dist-api/types/api/index.d.ts) stand alone. Signs, frames
 * and units are those of docs/conventions.md: x towards the wearer's left, y up, mm, D, Δ.
 */
import * as core from './core.ts';

// ---------------------------------------------------------------------------------------------
// The one error type

/** Every refusal of the API: `argument` names what was wrong ("lens.index", "point.x"), `reason` says why. */
export class DecentraError extends Error {
  constructor(
    /** the argument at fault, as a path into what was passed ("lens.ct", "case.right.sphere") */
    readonly argument: string,
    /** why it was refused */
    readonly reason: string,
  ) {
    super(`${argument}: ${reason}`);
    this.name = 'DecentraError';
  }
}

// ---------------------------------------------------------------------------------------------
// Lenses

/**
 * A lens: the prescription and its form, with the case file's names (docs/case-file.md). Only
 * `sphere` is required; the defaults are those of docs/choices.md (resin 1.50, Vogel front
 * curve, thinnest lens on a 65 mm blank with 1 mm edge and 2 mm centre).
 */
export interface LensOptions {
  /** sphere power, D */
  sphere: number;
  /** cylinder power, D, either sign */
  cyl?: number;
  /** cylinder axis, degrees 0-180 */
  axis?: number;
  /** refractive index (give this or `material`) */
  index?: number;
  /** a material by its generic name, e.g. 'resin-1.50', 'polycarbonate' */
  material?: string;
  /** Abbe number */
  abbe?: number;
  /** true front surface power in the lens material, D (give one of front, base, frontRule) */
  front?: number;
  /** nominal front curve at toolIndex, D */
  base?: number;
  toolIndex?: number;
  /** 'vogel' or 'steps:POWER=FRONT,...' */
  frontRule?: string;
  /** centre thickness, mm (or the thickness rule: minEdge, minCt with diameter) */
  ct?: number;
  minEdge?: number;
  minCt?: number;
  /** lens diameter, mm */
  diameter?: number;
  /** conic constants of the front and back surfaces */
  frontK?: number;
  backK?: number;
  cylOn?: 'back' | 'front';
  toric?: 'tyre' | 'barrel';
}

/** A built lens: what it is, in numbers. Pass it to prismAt, near and limits. */
export interface Lens {
  readonly sphere: number;
  readonly cyl: number;
  readonly axis: number;
  readonly index: number;
  /** the material's generic name when chosen by name (or by default), null when given by index */
  readonly material: string | null;
  /** Abbe number (the material's, or as given; null: not known) */
  readonly abbe: number | null;
  /** true front surface power, D */
  readonly front: number;
  /** back surface powers along its two principal meridians, D */
  readonly back: readonly [number, number];
  /** centre thickness, mm */
  readonly ct: number;
  /** diameter, mm (null: no edge) */
  readonly diameter: number | null;
  /** conic constants of the front and back surfaces */
  readonly frontK: number;
  readonly backK: number;
  readonly cylOn: 'back' | 'front';
  readonly toric: 'tyre' | 'barrel';
}

/** Build a lens from its prescription and form. Throws DecentraError naming `lens.FIELD`. */
export function buildLens(options: LensOptions): Lens {
  return core.buildLens(core.LIBRARY, options);
}

// ---------------------------------------------------------------------------------------------
// Answers

/** A prism in the wearer frame (docs/conventions.md): components, size, base direction and base words. */
export interface Prism {
  /** signed components, Δ: x towards the wearer's left, y up */
  x: number;
  y: number;
  magnitude: number;
  /** base direction in 360° notation, degrees [0, 360) */
  baseAngle: number;
  horizontal: { amount: number; base: 'in' | 'out' | null };
  vertical: { amount: number; base: 'up' | 'down' | null };
}

/** A trace that found no answer: 'miss', 'tir', 'geometry' or 'edge', with a sentence. */
export interface Failure {
  failure: 'miss' | 'tir' | 'geometry' | 'edge';
  message: string;
}

/** The four answers at one visual point (docs/method.md, "The four answers"). */
export interface Answers {
  eye: 'R' | 'L';
  /** the visual point, mm from the optical centre (lens frame) */
  point: { x: number; y: number };
  /** the eye's mark, mm from the optical centre, when the point was given from it (prismAt with from: 'mark'); else null */
  mark: { x: number; y: number } | null;
  /** back vertex to centre of rotation, mm */
  cr: number;
  prentice: Prism;
  /** the first-order thick-lens value at the eye */
  firstOrder: Prism;
  /** the exact line of sight through the lens, or why it failed */
  exact: Prism | Failure;
  /** what a focimeter reads at that point (exact), or why it failed */
  focimeter: Prism | Failure;
  /** what a focimeter reads at that point, to first order */
  focimeterFirstOrder: Prism;
  /** |Prentice| - |exact| in Δ and in % of the exact value (null when the exact trace failed) */
  prenticeError: { prism: number; percent: number | null } | null;
  /** the power the eye gets along the exact line of sight (docs/method.md), or why there is none */
  power: Power | Failure;
}

/** The power along the exact line of sight: the pencil's vergence at the vertex sphere and its errors, D. */
export interface Power {
  /** vergence matrix at the vertex sphere, D, [[e1e1, e1e2], [e2e1, e2e2]] */
  matrix: [[number, number], [number, number]];
  sphere: number;
  cyl: number;
  /** degrees, [0, 180) */
  axis: number;
  /** against the prescription (and the target's demand) */
  meanError: number;
  astigmaticError: number;
  /** the target's vergence at the vertex sphere that the errors allow for, D (0: distant) */
  demand: number;
  /** Coddington's tangential and sagittal vergences, D, where they apply */
  tangential?: number;
  sagittal?: number;
}

/** Where the lens sits before the eye. */
export interface Fitting {
  /** back vertex to the eye's centre of rotation, mm (default 27) */
  cr?: number;
  /** which eye, for base in/out: 'R' or 'L' (default 'R') */
  eye?: 'R' | 'L';
}

/** Where the lens sits, in full: the fitting and its placement (default: centred, untilted). */
export interface Placing extends Fitting {
  /** optical centre from the eye's straight-ahead line, mm, x towards the wearer's left, y up (default 0) */
  ocX?: number;
  ocY?: number;
  /** pantoscopic tilt (lower edge towards the face) and wrap (temporal edge towards the face), degrees (default 0) */
  panto?: number;
  wrap?: number;
}

/** A visual point on the lens, mm, and where the lens sits. */
export interface PointOptions extends Placing {
  /** from the optical centre, or from the eye's mark with `from: 'mark'`; x towards the wearer's left, y up */
  x: number;
  y: number;
  /**
   * 'centre' (default): (x, y) is from the optical centre; 'mark': from the eye's mark, where its
   * straight-ahead line meets the placed lens (what the lab marks)
   */
  from?: 'centre' | 'mark';
}

/** Prentice, first-order, exact and focimeter prism at a visual point of a lens (untilted unless placed). */
export function prismAt(lens: Lens, point: PointOptions): Answers {
  return core.prismAt(core.LIBRARY, lens, point);
}

// ---------------------------------------------------------------------------------------------
// Near

export interface NearOptions extends Placing {
  /** the target, mm, eye frame: centre of rotation at the origin, x left, y up, z forwards */
  at: { x: number; y: number; z: number };
  /**
   * lower the optical centre for the pantoscopic tilt (docs/conventions.md): 'none' (default),
   * 'rule-of-thumb' (1 mm per 2°) or 'centre-of-rotation' (so that the optical axis passes through it)
   */
  tiltDrop?: 'none' | 'rule-of-thumb' | 'centre-of-rotation';
}

/** The placement used: ocY after the tilt drop, which is given (mm) beside it. */
export interface Placed {
  ocX: number;
  ocY: number;
  cr: number;
  panto: number;
  wrap: number;
  eye: 'R' | 'L';
  tiltDrop: number;
}

/** Where the eye looks through the lens at a target, and the four answers there. */
export type NearResult =
  | { status: 'ok'; visualPoint: { x: number; y: number }; iterations: number; answers: Answers; target: { x: number; y: number; z: number }; placed: Placed }
  | { status: 'miss' | 'tir' | 'geometry' | 'edge' | 'no-convergence'; message: string; target: { x: number; y: number; z: number }; placed: Placed };

/** The visual point for a near target, solved with the exact trace (docs/binocular.md). */
export function near(lens: Lens, options: NearOptions): NearResult {
  return core.near(core.LIBRARY, lens, options);
}

// ---------------------------------------------------------------------------------------------
// Limits

export interface LimitOptions extends Fitting {
  /** the most prism allowed, Δ (greater than 0, at most 50) */
  maxPrism: number;
  /** direction of decentration: 'nasal', 'temporal', 'up', 'down', or degrees from +x (the wearer's left) towards +y (up) */
  direction: 'nasal' | 'temporal' | 'up' | 'down' | number;
}

export interface LimitResult {
  /** largest decentration with exact prism within maxPrism, mm; null when never reached */
  exact: number | null;
  /** 'ok', 'never-reached' (the lens stays within as far as it goes) or 'trace-failed' (exact is the last good point) */
  exactReason: 'ok' | 'never-reached' | 'trace-failed';
  /** Prentice's c = P / F, mm (null: no power along the direction) */
  prentice: number | null;
  /** first-order thick-lens limit, mm (null: unlimited) */
  firstOrder: number | null;
  /** how far the search went, mm */
  searchedTo: number;
}

/** The largest decentration along a direction within a prism tolerance (docs/range.md). */
export function limits(lens: Lens, options: LimitOptions): LimitResult {
  return core.limits(core.LIBRARY, lens, options);
}

// ---------------------------------------------------------------------------------------------
// Cases

/** A Decentra case document (docs/case-file.md), as read from and written to a case file. */
export interface CaseDocument {
  format: 'decentra-case';
  version: number;
  [field: string]: unknown;
}

/** The pair's prism: net horizontal (> 0 base in) and vertical imbalance (> 0 right eye base up), Δ. */
export interface Pair {
  netHorizontal: number;
  verticalImbalance: number;
}

/** A binocular case's three answers, never mixed (docs/binocular.md). */
export interface FitSummary {
  /** 1. at the marks (prism reference points), per answer; null where an eye has no value */
  atMarks: { prentice: Pair | null; firstOrder: Pair | null; exact: Pair | null; focimeter: Pair | null; prescribed: Pair };
  /** 2. the standard's verdict on the focimeter values minus the prescribed (null: no value) */
  standard: {
    pass: boolean | null;
    verdicts: { component: 'horizontal' | 'vertical'; value: number; limit: number; unit: 'Δ' | 'mm'; pass: boolean }[] | null;
  };
  /** 3. what the eyes meet at the case's target */
  atTarget: {
    exact: Pair | null;
    prentice: Pair | null;
    right: Prism | Failure | null;
    left: Prism | Failure | null;
    /** the demand beyond the prescribed prism (null: an eye has no exact answer) */
    demand: {
      horizontal: { amount: number; base: 'in' | 'out' | null; asks: 'converge' | 'diverge' | null };
      vertical: { amount: number; baseUpEye: 'R' | 'L' | null };
    } | null;
  };
}

/** Validate a case (a document or its JSON text) and evaluate it as its three answers. */
export function fitCase(doc: CaseDocument | string): FitSummary {
  return core.fitCase(core.LIBRARY, doc);
}

/** Read a case file's text: JSON, schema and values checked (older versions migrated). */
export function readCaseFile(text: string): CaseDocument {
  return core.readCaseFile(core.LIBRARY, text);
}

/** A case file's text for a document (validated first): stable key order, a final newline. */
export function writeCaseFile(doc: CaseDocument): string {
  return core.writeCaseFile(core.LIBRARY, doc);
}

// ---------------------------------------------------------------------------------------------
// HL7 FHIR VisionPrescription (docs/fhir.md)

export interface FhirImportOptions {
  /** monocular PDs, mm (32 each assumed when not given) */
  pd?: { right: number; left: number };
}

/** A case from a VisionPrescription (R4/R5 JSON; lone or in a Bundle), with one note per assumption. */
export function importFhir(text: string, options: FhirImportOptions = {}): { case: CaseDocument; notes: string[] } {
  return core.importFhir(core.LIBRARY, text, options);
}

/** The case's prescription as a VisionPrescription resource, dated `date` (ISO 8601; default now). */
export function exportFhir(doc: CaseDocument | string, date: string = new Date().toISOString()): { resource: object; notes: string[] } {
  return core.exportFhir(core.LIBRARY, doc, date);
}
