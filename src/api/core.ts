/**
 * The library's work (docs/api.md), behind its public face (src/api/index.ts). Every check of
 * an argument lives here, once: the library calls these functions with its own argument names
 * ('lens.ct', 'point.x') and numbers only; the `decentra` command calls the same functions with
 * its flag names ('--ct', '--x') and the typed text of its flags (units allowed, as the case
 * layer reads them: "0.25cm"). So a value is checked the same way, with the same reason, in
 * both, and the message names it as its caller knows it.
 *
 * The checks run once per call; behind them the per-ray engine (src/optics) stays unchecked
 * and allocates nothing per ray. Signs, frames and units: docs/conventions.md.
 */
import {
  type Answer as EngineAnswer, type Eye, type FourAnswers, type Lens as EngineLens, type SignedPair, type TiltDrop,
  OpticsError, Placement, centrationPoint, decentrationLimit, fourAnswersPlaced, isFailure, solveFixation, tiltDropMm,
} from '../optics/index.ts';
import { InputError, type Quantity, type Range, inRange, readNumber } from '../case/input.ts';
import { LIMITS, type FieldKey, type RawFields, buildLens as buildCaseLens, outsideLens, readEye, readLensForm } from '../case/lensCase.ts';
import { type BinocularCase, type CaseDocument as EngineCaseDocument, readCase, readCaseBytes, readCaseText, writeCase } from '../case/caseFile.ts';
import { type FitReport, evaluateFit } from '../case/fit.ts';
import { importVisionPrescriptionText, visionPrescriptionFromCase } from '../case/fhir.ts';
import { type DirectionWord, DIRECTION_WORDS, angleDirection, directionDeg } from '../case/range.ts';
import {
  type Answers, type CaseDocument, type Failure, type FitSummary, type Lens, type LimitResult, type NearResult, type Pair,
  type Power, type Prism, DecentraError,
} from './index.ts';

/** How a caller names its arguments in messages, and whether it passes text. */
export interface Names {
  /** the name of the argument at an API path ('lens.ct', 'point.x', 'options.at.z') */
  name(path: string): string;
  /** true: values may be text with units, read as the case layer reads them (the CLI); false: numbers only (the library) */
  text: boolean;
}

/** The library's own names: the API path itself; numbers only. */
export const LIBRARY: Names = { name: (path) => path, text: false };

// ---------------------------------------------------------------------------------------------
// Checks

/**
 * Run a case-layer step, turning its errors (InputError, OpticsError) into DecentraError:
 * `rename` maps a field they name, `whole` names an OpticsError that names none.
 */
function guarded<T>(step: () => T, rename: (field: string) => string = (f) => f, whole = 'input'): T {
  try {
    return step();
  } catch (e) {
    if (e instanceof DecentraError) throw e;
    if (e instanceof InputError) throw new DecentraError(rename(e.field), e.reason);
    if (e instanceof OpticsError) throw new DecentraError(e.field ? rename(e.field) : whole, e.message);
    throw e;
  }
}

/** A field path of a case-layer step, put under `prefix` ('case', 'resource') and named. */
function under(n: Names, prefix: string): (field: string) => string {
  return (field) => n.name(field === prefix || field.startsWith(`${prefix}.`) ? field : `${prefix}.${field}`);
}

function plainObject(n: Names, path: string, raw: unknown): Record<string, unknown> {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) throw new DecentraError(n.name(path), 'must be an object');
  return raw as Record<string, unknown>;
}

function known(n: Names, path: string, o: Record<string, unknown>, keys: readonly string[]): void {
  for (const k of Object.keys(o)) {
    if (!keys.includes(k)) throw new DecentraError(n.name(`${path}.${k}`), `is not a known option; known: ${keys.join(', ')}`);
  }
}

/** A finite number within a range (the library: a number; the CLI: also text with a unit of its quantity). */
function num(n: Names, path: string, raw: unknown, quantity: Quantity, range: Range): number {
  const arg = n.name(path);
  if (!n.text && typeof raw !== 'number') throw new DecentraError(arg, `must be a number, got ${raw === null ? 'null' : typeof raw}`);
  return guarded(() => inRange(arg, readNumber(arg, raw, quantity), range));
}

function optNum(n: Names, path: string, raw: unknown, quantity: Quantity, range: Range, fallback: number): number {
  return raw === undefined ? fallback : num(n, path, raw, quantity, range);
}

function eyeOf(n: Names, path: string, raw: unknown): Eye {
  if (raw === undefined) return 'R';
  return guarded(() => readEye(n.name(path), raw));
}

// ---------------------------------------------------------------------------------------------
// Lenses

export const LENS_KEYS = ['sphere', 'cyl', 'axis', 'index', 'material', 'abbe', 'front', 'base', 'toolIndex', 'frontRule',
  'ct', 'minEdge', 'minCt', 'diameter', 'frontK', 'backK', 'cylOn', 'toric'] as const;
const TEXT_KEYS: readonly string[] = ['material', 'frontRule', 'cylOn', 'toric'];

/** The engine lens behind each public Lens (the public object is a plain, frozen summary). */
const engineLenses = new WeakMap<Lens, EngineLens>();

/** Build a lens from its prescription and form (the case file's names). */
export function buildLens(n: Names, options: unknown): Lens {
  const o = plainObject(n, 'lens', options);
  known(n, 'lens', o, LENS_KEYS);
  if (!n.text) {
    for (const k of LENS_KEYS) {
      const val = o[k];
      if (val === undefined) continue;
      const wanted = TEXT_KEYS.includes(k) ? 'string' : 'number';
      if (typeof val !== wanted) throw new DecentraError(n.name(`lens.${k}`), `must be a ${wanted}, got ${val === null ? 'null' : typeof val}`);
      if (typeof val === 'number' && !Number.isFinite(val)) throw new DecentraError(n.name(`lens.${k}`), `must be a finite number, got ${String(val)}`);
    }
  }
  const label = (k: FieldKey): string => n.name(`lens.${k}`);
  const form = guarded(() => readLensForm(o as RawFields, label));
  const engine = guarded(() => buildCaseLens(form, label));
  const lens: Lens = Object.freeze({
    sphere: form.sphereD, cyl: form.cylD, axis: form.axisDeg, index: engine.index,
    material: form.materialId ?? null, abbe: form.abbe ?? null,
    front: engine.frontPowers[0], back: Object.freeze([engine.backPowers[0], engine.backPowers[1]]) as readonly [number, number],
    ct: engine.ctMm, diameter: Number.isFinite(engine.radiusMm) ? 2 * engine.radiusMm : null,
    frontK: form.frontConic, backK: form.backConic, cylOn: form.cylOn, toric: form.toricForm,
  });
  engineLenses.set(lens, engine);
  return lens;
}

function engineOf(n: Names, lens: unknown): EngineLens {
  const e = typeof lens === 'object' && lens !== null ? engineLenses.get(lens as Lens) : undefined;
  if (!e) throw new DecentraError(n.name('lens'), 'must be a lens made by buildLens()');
  return e;
}

// ---------------------------------------------------------------------------------------------
// Placement and answers

const PLACING_KEYS = ['cr', 'eye', 'ocX', 'ocY', 'panto', 'wrap'] as const;

/** The placement options (cr, eye, ocX, ocY, panto, wrap) under `path`, checked, as the engine's Placement. */
function placementOf(n: Names, path: string, o: Record<string, unknown>, dropRule: TiltDrop = 'none'): { pl: Placement; eye: Eye; drop: number } {
  const crMm = optNum(n, `${path}.cr`, o.cr, 'length', LIMITS.cr, 27);
  const eye = eyeOf(n, `${path}.eye`, o.eye);
  const ocX = optNum(n, `${path}.ocX`, o.ocX, 'length', LIMITS.point, 0);
  const ocY = optNum(n, `${path}.ocY`, o.ocY, 'length', LIMITS.point, 0);
  const panto = optNum(n, `${path}.panto`, o.panto, 'angle', LIMITS.panto, 0);
  const wrap = optNum(n, `${path}.wrap`, o.wrap, 'angle', LIMITS.wrap, 0);
  const drop = tiltDropMm(dropRule, panto, crMm);
  return { pl: new Placement({ ocXMm: ocX, ocYMm: ocY - drop, crDistanceMm: crMm, pantoDeg: panto, wrapDeg: wrap, eye }), eye, drop };
}

function copyPrism(p: { x: number; y: number; magnitude: number; baseAngle: number; horizontal: Prism['horizontal']; vertical: Prism['vertical'] }): Prism {
  return {
    x: p.x, y: p.y, magnitude: p.magnitude, baseAngle: p.baseAngle,
    horizontal: { amount: p.horizontal.amount, base: p.horizontal.base }, vertical: { amount: p.vertical.amount, base: p.vertical.base },
  };
}

function copyAnswer(a: EngineAnswer): Prism | Failure {
  return isFailure(a) ? { failure: a.failure, message: a.message } : copyPrism(a);
}

function powerOf(r: FourAnswers): Power | Failure {
  const p = r.power;
  if ('failure' in p) return { failure: p.failure, message: p.message };
  const m = p.matrix;
  return {
    matrix: [[m[0][0], m[0][1]], [m[1][0], m[1][1]]], sphere: p.sphere, cyl: p.cyl, axis: p.axis,
    meanError: p.meanError, astigmaticError: p.astigmaticError, demand: p.demand,
    ...(p.tangential !== undefined ? { tangential: p.tangential } : {}), ...(p.sagittal !== undefined ? { sagittal: p.sagittal } : {}),
  };
}

function answersOf(r: FourAnswers, pl: Placement, x: number, y: number): Answers {
  return {
    eye: r.eye, point: { x, y }, mark: null, cr: pl.spec.crDistanceMm,
    prentice: copyPrism(r.prentice), firstOrder: copyPrism(r.paraxial),
    exact: copyAnswer(r.exact), focimeter: copyAnswer(r.focimeter), focimeterFirstOrder: copyPrism(r.focimeterFirstOrder),
    prenticeError: r.error ? { prism: r.error.prism, percent: r.error.percent } : null,
    power: powerOf(r),
  };
}

/**
 * The four answers at a visual point of a lens, placed as asked (default centred and
 * untilted): (x, y) from the optical centre, or with `from: 'mark'` from the eye's mark, where
 * its straight-ahead line meets the lens.
 */
export function prismAt(n: Names, lens: unknown, point: unknown): Answers {
  const engine = engineOf(n, lens);
  const p = plainObject(n, 'point', point);
  known(n, 'point', p, ['x', 'y', 'from', ...PLACING_KEYS]);
  const dx = num(n, 'point.x', p.x, 'length', LIMITS.point);
  const dy = num(n, 'point.y', p.y, 'length', LIMITS.point);
  const from = p.from ?? 'centre';
  if (from !== 'centre' && from !== 'mark') throw new DecentraError(n.name('point.from'), `must be 'centre' or 'mark', got '${String(from)}'`);
  const { pl, eye } = placementOf(n, 'point', p);
  let x = dx, y = dy;
  let m: { x: number; y: number } | null = null;
  if (from === 'mark') {
    const c = centrationPoint(engine, pl);
    if (!c) throw new DecentraError(n.name('point.eye'), `the ${eye === 'R' ? 'right' : 'left'} eye's straight-ahead line misses its lens, so it has no mark`);
    m = { x: c.lens.x + 0, y: c.lens.y + 0 }; // + 0: no -0 in a result
    x += m.x; y += m.y;
  }
  if (Math.hypot(x, y) > engine.radiusMm) {
    const d = 2 * engine.radiusMm;
    throw new DecentraError(n.name(Math.abs(dx) >= Math.abs(dy) ? 'point.x' : 'point.y'), m
      ? `moves the visual point to (${x.toFixed(2)}, ${y.toFixed(2)}) mm from the optical centre, outside the ${d.toFixed(2)} mm lens`
      : outsideLens(x, y, engine.radiusMm));
  }
  return { ...answersOf(fourAnswersPlaced(engine, pl, x, y, eye), pl, x, y), mark: m };
}

// ---------------------------------------------------------------------------------------------
// Near

const TILT_DROPS: readonly TiltDrop[] = ['none', 'rule-of-thumb', 'centre-of-rotation'];

/** The visual point for a target, solved with the exact trace, and the four answers there. */
export function near(n: Names, lens: unknown, options: unknown): NearResult {
  const engine = engineOf(n, lens);
  const o = plainObject(n, 'options', options);
  known(n, 'options', o, ['at', 'tiltDrop', ...PLACING_KEYS]);
  const at = plainObject(n, 'options.at', o.at);
  const t = {
    x: num(n, 'options.at.x', at.x, 'length', {}), y: num(n, 'options.at.y', at.y, 'length', {}), z: num(n, 'options.at.z', at.z, 'length', {}),
  };
  const dropRule = o.tiltDrop ?? 'none';
  if (!TILT_DROPS.includes(dropRule as TiltDrop)) {
    throw new DecentraError(n.name('options.tiltDrop'), `must be one of ${TILT_DROPS.join(', ')}, got '${String(dropRule)}'`);
  }
  const { pl, eye, drop } = placementOf(n, 'options', o, dropRule as TiltDrop);
  const s = pl.spec;
  const placed = { ocX: s.ocXMm, ocY: s.ocYMm, cr: s.crDistanceMm, panto: s.pantoDeg, wrap: s.wrapDeg, eye, tiltDrop: drop };
  const fix = solveFixation(engine, pl, { kind: 'point', ...t });
  if (fix.status === 'target') throw new DecentraError(n.name('options.at'), fix.message);
  if (fix.status !== 'ok') return { status: fix.status, message: fix.message, target: t, placed };
  const answers = answersOf(fourAnswersPlaced(engine, pl, fix.cx, fix.cy, eye, t), pl, fix.cx, fix.cy);
  return { status: 'ok', visualPoint: { x: fix.cx, y: fix.cy }, iterations: fix.iterations, answers, target: t, placed };
}

// ---------------------------------------------------------------------------------------------
// Limits

/** The largest decentration along a direction within a prism tolerance. */
export function limits(n: Names, lens: unknown, options: unknown): LimitResult {
  const engine = engineOf(n, lens);
  const o = plainObject(n, 'options', options);
  known(n, 'options', o, ['maxPrism', 'direction', 'cr', 'eye']);
  const maxPrism = num(n, 'options.maxPrism', o.maxPrism, 'prism', LIMITS.maxPrism);
  const crMm = optNum(n, 'options.cr', o.cr, 'length', LIMITS.cr, 27);
  const eye = eyeOf(n, 'options.eye', o.eye);
  let deg: number;
  if (typeof o.direction === 'string' && (DIRECTION_WORDS as readonly string[]).includes(o.direction)) {
    deg = directionDeg(o.direction as DirectionWord, eye);
  } else if (typeof o.direction === 'number' || (n.text && typeof o.direction === 'string' && /^[\s\d+\-.]/.test(o.direction))) {
    deg = angleDirection(num(n, 'options.direction', o.direction, 'angle', {})).deg;
  } else {
    throw new DecentraError(n.name('options.direction'), `must be ${DIRECTION_WORDS.join(', ')} or degrees, got '${String(o.direction)}'`);
  }
  const r = decentrationLimit(engine, crMm, deg, maxPrism);
  return { exact: r.exactMm, exactReason: r.exactReason, prentice: r.prenticeMm, firstOrder: r.paraxialMm, searchedTo: r.searchedToMm };
}

// ---------------------------------------------------------------------------------------------
// Cases

function pair(p: SignedPair | null): Pair | null {
  return p ? { netHorizontal: p.netHorizontal, verticalImbalance: p.verticalImbalance } : null;
}

/**
 * A case (a document, its JSON text, or a file's bytes: the CLI), read and checked; the case
 * layer's field paths go under `case.`.
 */
export function openCase(n: Names, doc: unknown): BinocularCase {
  if (doc instanceof Uint8Array) return guarded(() => readCaseBytes(doc), under(n, 'case'), n.name('case'));
  if (typeof doc === 'string') return guarded(() => readCaseText(doc), under(n, 'case'), n.name('case'));
  return guarded(() => readCase(plainObject(n, 'case', doc)), under(n, 'case'), n.name('case'));
}

/** A checked case evaluated as its three answers, in full (fitCase gives the library its summary; the CLI prints it all). */
export function evaluateCase(n: Names, c: BinocularCase): FitReport {
  return guarded(() => evaluateFit(c), under(n, 'case'), n.name('case'));
}

/** A whole binocular case as its three answers. */
export function fitCase(n: Names, doc: unknown): FitSummary {
  const f = evaluateCase(n, openCase(n, doc));
  const verdicts = f.standard.verdicts?.map((v) => ({ component: v.component, value: v.value, limit: v.limit, unit: v.unit, pass: v.pass })) ?? null;
  const eyeAnswer = (side: 'right' | 'left'): Prism | Failure | null => {
    const a = f.result[side].answers;
    return a ? copyAnswer(a.exact) : null;
  };
  return {
    atMarks: {
      prentice: pair(f.marks.net.prentice), firstOrder: pair(f.marks.net.paraxial), exact: pair(f.marks.net.exact),
      focimeter: pair(f.marks.net.focimeter), prescribed: pair(f.marks.prescribedNet)!,
    },
    standard: { pass: verdicts ? verdicts.every((v) => v.pass) : null, verdicts },
    atTarget: {
      exact: pair(f.result.exact), prentice: pair(f.result.prentice), right: eyeAnswer('right'), left: eyeAnswer('left'),
      demand: f.demand ? { horizontal: { ...f.demand.horizontal }, vertical: { ...f.demand.vertical } } : null,
    },
  };
}

/** A case file's text read and checked. */
export function readCaseFile(n: Names, text: unknown): CaseDocument {
  if (typeof text !== 'string') throw new DecentraError(n.name('text'), 'must be the case file as a string');
  return openCase(n, text).doc as CaseDocument;
}

/** A case file's text for a document (validated first). */
export function writeCaseFile(n: Names, doc: unknown): string {
  return writeCase(openCase(n, doc).doc);
}

// ---------------------------------------------------------------------------------------------
// HL7 FHIR VisionPrescription (docs/fhir.md)

/** A case from a VisionPrescription's JSON text, with one note per assumption. */
export function importFhir(n: Names, text: unknown, options: unknown = {}): { case: CaseDocument; notes: string[] } {
  if (typeof text !== 'string') throw new DecentraError(n.name('text'), 'must be the resource as JSON text');
  const o = plainObject(n, 'options', options);
  known(n, 'options', o, ['pd']);
  let pdMm: { right: number; left: number } | undefined;
  if (o.pd !== undefined) {
    const pd = plainObject(n, 'options.pd', o.pd);
    pdMm = { right: num(n, 'options.pd.right', pd.right, 'length', LIMITS.pd), left: num(n, 'options.pd.left', pd.left, 'length', LIMITS.pd) };
  }
  const r = guarded(() => importVisionPrescriptionText(text, pdMm ? { pdMm } : {}), under(n, 'resource'), n.name('resource'));
  return { case: r.doc as CaseDocument, notes: r.notes };
}

/** The case's prescription as a VisionPrescription resource, dated `date` (ISO 8601). */
export function exportFhir(n: Names, doc: unknown, date: unknown): { resource: object; notes: string[] } {
  if (typeof date !== 'string' || Number.isNaN(Date.parse(date))) throw new DecentraError(n.name('date'), `must be an ISO 8601 date, got '${String(date)}'`);
  const c = openCase(n, doc);
  return guarded(() => visionPrescriptionFromCase(c.doc as EngineCaseDocument, date), under(n, 'case'), n.name('case'));
}
