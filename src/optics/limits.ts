/**
 * Decentration limits and decentration for a prescribed prism, exactly and by Prentice.
 *
 * A limit is the largest decentration from the optical centre, along a direction, at which
 * the prism at the eye stays within a tolerance. Prentice gives it in closed form,
 * c = P / |F u| (u the unit direction), and the first-order limit likewise; the exact limits
 * (at the eye, and for a focimeter reading) are found by a scan outwards and a bisection on the
 * exact trace (untilted lens, centre of rotation on the axis). One scan answers several
 * tolerances (directionLimits), and says what ends it (the prism, the lens edge, the geometry).
 * The same scan finds where Prentice's error leaves a level (prenticeBreakdownLimits). Also: the
 * largest diameter at which a lens form can be made (largestDiameterMm). docs/range.md.
 */
import { prenticeError, prenticeErrorPercent } from './answers.ts';
import { newton2 } from './newton2.ts';
import { OpticsError, RayStatus } from './errors.ts';
import { decentrationFromMatrix, eyeMatrix, prismFromMatrix } from './firstOrder.ts';
import { Lens, type LensSpec, type ThicknessRule, solveCentreThickness } from './lens.ts';
import type { Mat2 } from './powerMatrix.ts';
import { PencilPower, PencilSetup, pencilPower } from './power.ts';
import { LineTrace, focimeter, lineOfSight } from './trace.ts';

export interface LimitResult {
  /** largest decentration with exact prism within the tolerance, mm; null if the exact prism
   *  stays within it as far as the lens (or 50 mm) goes — see `exactReason` */
  exactMm: number | null;
  exactReason: 'ok' | 'never-reached' | 'trace-failed';
  /** Prentice's c = P / |F u|, mm; null when the power along u is zero (no limit) */
  prenticeMm: number | null;
  /** first-order thick-lens limit, mm; null when unlimited */
  paraxialMm: number | null;
  /** how far the search went, mm */
  searchedToMm: number;
}

const _t = new LineTrace();
const _v = { x: 0, y: 0 };

/** What ends a decentration limit's search (docs/range.md, "What ends a limit"). */
export type LimitEnd =
  /** the prism (or, for the breakdown, the Prentice error) reaches the tolerance: a limit */
  | 'prism'
  /** the whole lens, out to its edge, stays within the tolerance */
  | 'edge'
  /** the trace fails before the tolerance is reached (surfaces cross, a miss, total internal reflection) */
  | 'geometry'
  /** no diameter: the search stopped at 50 mm */
  | 'search';

/** One tolerance's answer from a scan along a direction. */
export interface ScanLimit {
  /** largest decentration within the tolerance, mm; null unless `end` is 'prism' */
  mm: number | null;
  end: LimitEnd;
  /** how far the search went, mm (the failing point for 'geometry') */
  searchedToMm: number;
  /** the last scanned decentration at which the trace succeeded and stayed within, mm */
  lastGoodMm: number;
  /** the ray status that ended the scan ('geometry' or 'edge' ends), else RayStatus.ok */
  status: RayStatus;
}

/** What a scan measures at each decentration. */
export const ScanQuantity = {
  /** the exact prism at the eye (line of sight from the centre of rotation), Δ */
  eye: 0,
  /** the exact focimeter reading at the back-surface point, Δ */
  focimeter: 1,
  /** |Prentice error| in percent of the exact prism at the eye (answers.ts, prenticeErrorPercent) */
  prenticeErrorPercent: 2,
  /** |mean error| of the pencil along the line of sight (power.ts), D */
  meanError: 3,
  /** astigmatic error of the pencil along the line of sight (power.ts), D */
  astigmatism: 4,
} as const;
export type ScanQuantity = (typeof ScanQuantity)[keyof typeof ScanQuantity];

/** The limits along one direction for several tolerances at once. */
export interface DirectionLimits {
  /** Prentice's prism per mm along the direction, |F u| / 10, Δ/mm */
  prenticePerMm: number;
  /** the first-order thick-lens prism per mm at the eye, Δ/mm */
  firstOrderPerMm: number;
  /** exact limits at the eye, one per tolerance in the order given */
  exact: ScanLimit[];
  /** exact focimeter limits, one per tolerance (empty unless asked for) */
  focimeter: ScanLimit[];
}

/** The scan step, mm: limits are found by a scan outwards in these steps, then a bisection. */
export const LIMIT_SCAN_STEP_MM = 0.25;
/** How far a search goes on a lens without a diameter, mm. */
export const LIMIT_SEARCH_MM = 50;

// the scan's state: module scratch (the per-ray path allocates nothing)
const _s = { lens: null as Lens | null, crMm: 0, ux: 0, uy: 0, q: 0 as ScanQuantity, perMm: 0, status: 0 as RayStatus };
const _setup = new PencilSetup();
const _pencil = new PencilPower();

/** The scanned quantity at decentration d along the scan's direction, or NaN where the trace fails (status in _s). */
function quantityAt(d: number): number {
  const lens = _s.lens!;
  _t.bx = d * _s.ux; _t.by = d * _s.uy;
  let st: RayStatus;
  if (_s.q === ScanQuantity.focimeter) st = focimeter(lens, _t);
  else { _t.sx = 0; _t.sy = 0; _t.sz = -_s.crMm; st = lineOfSight(lens, _t); }
  _s.status = st;
  if (st !== RayStatus.ok) return NaN;
  if (_s.q === ScanQuantity.meanError || _s.q === ScanQuantity.astigmatism) {
    st = pencilPower(lens, _t, _setup, _pencil);
    _s.status = st;
    if (st !== RayStatus.ok) return NaN;
    return _s.q === ScanQuantity.meanError ? Math.abs(_pencil.meanError) : _pencil.astigmaticError;
  }
  if (_s.q !== ScanQuantity.prenticeErrorPercent) return _t.prism;
  const pr = _s.perMm * d;
  if (_t.prism === 0) return pr === 0 ? 0 : Infinity;
  return Math.abs(prenticeErrorPercent(pr, _t.prism));
}

/** Closed-form limit of a linear rule with `perMm` Δ per mm: tolerance / perMm, null when perMm is 0. */
export function linearLimitMm(perMm: number, tolerance: number): number | null {
  return perMm === 0 ? null : tolerance / perMm;
}

/** Prism per mm of a linear rule p = -M c along the unit direction (ux, uy), Δ/mm. */
function perMmAlong(m: Mat2, ux: number, uy: number): number {
  prismFromMatrix(m, ux, uy, _v);
  return Math.hypot(_v.x, _v.y);
}

/**
 * One scan outwards along (ux, uy) in LIMIT_SCAN_STEP_MM steps, answering every tolerance:
 * each tolerance's crossing is the first scanned point above it, refined by bisection. The
 * answer for one tolerance is the same whichever others are asked with it.
 */
function scan(lens: Lens, crMm: number, ux: number, uy: number, q: ScanQuantity, perMm: number, tolerances: readonly number[]): ScanLimit[] {
  if (q === ScanQuantity.meanError || q === ScanQuantity.astigmatism) {
    // the untilted lens before the eye, CR on the axis: the vertex sphere's radius is crMm
    const m = lens.vertexMatrix;
    _setup.radiusMm = crMm; _setup.near = false;
    _setup.upX = 0; _setup.upY = 1; _setup.upZ = 0;
    _setup.rxXX = m[0]; _setup.rxXY = 0.5 * (m[1] + m[2]); _setup.rxYY = m[3];
  }
  _s.lens = lens; _s.crMm = crMm; _s.ux = ux; _s.uy = uy; _s.q = q; _s.perMm = perMm;
  const n = tolerances.length;
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => tolerances[a]! - tolerances[b]!);
  const out: ScanLimit[] = new Array<ScanLimit>(n);
  const reach = Math.min(lens.radiusMm, LIMIT_SEARCH_MM);
  const step = LIMIT_SCAN_STEP_MM;
  let j = 0;
  let lo = 0;
  for (let k = 1; j < n; k++) {
    const d = k * step;
    if (!(d <= reach + 1e-12)) break;
    const p = quantityAt(d);
    if (Number.isNaN(p)) {
      const end: LimitEnd = _s.status === RayStatus.beyondEdge ? 'edge' : 'geometry';
      for (; j < n; j++) out[order[j]!] = { mm: null, end, searchedToMm: d, lastGoodMm: lo, status: _s.status };
      break;
    }
    while (j < n && p > tolerances[order[j]!]!) {
      const i = order[j]!;
      out[i] = { mm: bisect(lo, d, tolerances[i]!), end: 'prism', searchedToMm: d, lastGoodMm: lo, status: RayStatus.ok };
      j++;
    }
    lo = d;
  }
  const end: LimitEnd = reach === lens.radiusMm ? 'edge' : 'search';
  for (; j < n; j++) out[order[j]!] = { mm: null, end, searchedToMm: reach, lastGoodMm: lo, status: RayStatus.ok };
  return out;
}

/** Bisection of the first crossing of `tol` between lo (within) and hi (above); returns the midpoint. */
function bisect(lo: number, hi: number, tol: number): number {
  for (let i = 0; i < 60 && hi - lo > 1e-10; i++) {
    const mid = 0.5 * (lo + hi);
    if (quantityAt(mid) > tol) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * The limits along one direction (degrees counter-clockwise from +x, the wearer's left) for
 * several tolerances (Δ) at once: Prentice's and the first-order rates, and the exact limits
 * at the eye (and, when asked, at a focimeter) from one scan each. Untilted lens, centre of
 * rotation crMm behind the back vertex on the axis.
 */
export function directionLimits(lens: Lens, crMm: number, directionDeg: number, tolerances: readonly number[], withFocimeter = false): DirectionLimits {
  const a = (directionDeg * Math.PI) / 180;
  const ux = Math.cos(a), uy = Math.sin(a);
  const prenticePerMm = perMmAlong(lens.vertexMatrix, ux, uy);
  const firstOrderPerMm = perMmAlong(eyeMatrix(lens, crMm), ux, uy);
  const exact = scan(lens, crMm, ux, uy, ScanQuantity.eye, 0, tolerances);
  const foci = withFocimeter ? scan(lens, crMm, ux, uy, ScanQuantity.focimeter, 0, tolerances) : [];
  return { prenticePerMm, firstOrderPerMm, exact, focimeter: foci };
}

/**
 * Where Prentice's rule breaks down along a direction: for each level (percent), the largest
 * decentration out to which |Prentice error| (answers.ts, prenticeErrorPercent) stays within it,
 * scanning outwards from the centre (a level already exceeded next to the centre gives a
 * limit near 0).
 */
export function prenticeBreakdownLimits(lens: Lens, crMm: number, directionDeg: number, levelsPercent: readonly number[]): ScanLimit[] {
  const a = (directionDeg * Math.PI) / 180;
  const ux = Math.cos(a), uy = Math.sin(a);
  return scan(lens, crMm, ux, uy, ScanQuantity.prenticeErrorPercent, perMmAlong(lens.vertexMatrix, ux, uy), levelsPercent);
}

/**
 * The Prentice error at decentration d (mm) along a direction: Prentice's magnitude and the
 * exact one at the eye, into out (percent null where the exact prism is 0); false where the
 * exact trace fails (out.status says why).
 */
export function prenticeErrorAlong(
  lens: Lens, crMm: number, directionDeg: number, dMm: number,
  out: { prentice: number; exact: number; prism: number; percent: number | null; status: RayStatus },
): boolean {
  const a = (directionDeg * Math.PI) / 180;
  const ux = Math.cos(a), uy = Math.sin(a);
  out.prentice = perMmAlong(lens.vertexMatrix, ux, uy) * dMm;
  _t.sx = 0; _t.sy = 0; _t.sz = -crMm; _t.bx = dMm * ux; _t.by = dMm * uy;
  out.status = lineOfSight(lens, _t);
  if (out.status !== RayStatus.ok) { out.exact = 0; out.prism = 0; out.percent = null; return false; }
  out.exact = _t.prism;
  const e = prenticeError(out.prentice, out.exact);
  out.prism = e.prism; out.percent = e.percent;
  return true;
}

/** Bounds on a decentration: the prism at the eye (Δ) and the pencil's errors there (D); any may be absent. */
export interface DecentrationBounds {
  maxPrism?: number;
  maxMeanError?: number;
  maxAstigmatism?: number;
}

export type BoundName = 'prism' | 'mean-error' | 'astigmatism';

/** The largest decentration within every bound given, and which bound ended it. */
export interface BoundedLimit {
  /** mm; null when no bound is reached before the scan ends (see `end`) */
  mm: number | null;
  /** the bound reached first; null when none is */
  endedBy: BoundName | null;
  /** what ended the scan when no bound did: the edge, the geometry or the search's reach */
  end: LimitEnd;
  /** how far the scans went, mm */
  searchedToMm: number;
  /** each bound's own limit, in the order prism, mean error, astigmatism (only those given) */
  each: { bound: BoundName; tolerance: number; limit: ScanLimit }[];
}

/**
 * The largest decentration along a direction within several bounds at once: the exact prism
 * at the eye, and the pencil's mean and astigmatic errors (power.ts) along the same lines of
 * sight. Each bound is scanned as in directionLimits; the smallest limit wins and is named.
 */
export function boundedLimit(lens: Lens, crMm: number, directionDeg: number, bounds: DecentrationBounds): BoundedLimit {
  const a = (directionDeg * Math.PI) / 180;
  const ux = Math.cos(a), uy = Math.sin(a);
  const asked: [BoundName, ScanQuantity, number | undefined][] = [
    ['prism', ScanQuantity.eye, bounds.maxPrism],
    ['mean-error', ScanQuantity.meanError, bounds.maxMeanError],
    ['astigmatism', ScanQuantity.astigmatism, bounds.maxAstigmatism],
  ];
  const each: BoundedLimit['each'] = [];
  for (const [bound, q, tol] of asked) {
    if (tol === undefined) continue;
    if (!(tol >= 0) || !Number.isFinite(tol)) throw new OpticsError(`the ${bound} bound ${tol} must be a finite number of at least 0`, bound);
    each.push({ bound, tolerance: tol, limit: scan(lens, crMm, ux, uy, q, 0, [tol])[0]! });
  }
  if (each.length === 0) throw new OpticsError('give at least one bound: prism, mean error or astigmatism', 'bounds');
  return combineBounds(each);
}

/**
 * Several bounds' own limits along one direction as one answer: the smallest limit wins and
 * is named; where no bound is reached, the scan that stopped first says why.
 */
export function combineBounds(each: BoundedLimit['each']): BoundedLimit {
  let best: BoundedLimit['each'][number] | null = null;
  for (const e of each) if (e.limit.end === 'prism' && (!best || e.limit.mm! < best.limit.mm!)) best = e;
  if (best) return { mm: best.limit.mm, endedBy: best.bound, end: 'prism', searchedToMm: best.limit.searchedToMm, each };
  let first = each[0]!;
  for (const e of each) if (e.limit.searchedToMm < first.limit.searchedToMm) first = e;
  return { mm: null, endedBy: null, end: first.limit.end, searchedToMm: first.limit.searchedToMm, each };
}

export function decentrationLimit(lens: Lens, crMm: number, directionDeg: number, maxPrism: number): LimitResult {
  const r = directionLimits(lens, crMm, directionDeg, [maxPrism]);
  const e = r.exact[0]!;
  const prenticeMm = linearLimitMm(r.prenticePerMm, maxPrism);
  const paraxialMm = linearLimitMm(r.firstOrderPerMm, maxPrism);
  if (e.end === 'prism') return { exactMm: e.mm, exactReason: 'ok', prenticeMm, paraxialMm, searchedToMm: e.searchedToMm };
  if (e.end === 'edge' || e.end === 'search') {
    if (e.status === RayStatus.ok) return { exactMm: null, exactReason: 'never-reached', prenticeMm, paraxialMm, searchedToMm: e.searchedToMm };
  }
  return { exactMm: e.lastGoodMm, exactReason: 'trace-failed', prenticeMm, paraxialMm, searchedToMm: e.searchedToMm };
}

/**
 * The largest round diameter (mm, a multiple of `resolutionMm`, at least `minMm`) at which a
 * lens of this form can be made: with a fixed centre thickness (`ctMm`), or with the
 * thickness rule solved at each diameter (solveCentreThickness). Null when even `minMm`
 * fails. A smaller diameter is never harder to make (a shorter span of each surface, and a
 * thicker edge for a given centre), so a bisection finds it.
 */
export function largestDiameterMm(
  spec: Omit<LensSpec, 'ctMm' | 'diameterMm'>, thickness: { ctMm: number } | Omit<ThicknessRule, 'diameterMm'>,
  upToMm: number, minMm = 10, resolutionMm = 0.1, hintMm?: number,
): number | null {
  const ok = (dia: number): boolean => {
    try {
      const ctMm = 'ctMm' in thickness ? thickness.ctMm : solveCentreThickness(spec, { ...thickness, diameterMm: dia });
      new Lens({ ...spec, ctMm, diameterMm: dia });
      return true;
    } catch (e) {
      if (e instanceof OpticsError) return false;
      throw e;
    }
  };
  // The search itself asks only whether solveCentreThickness's bracket exists (a centre
  // thickness up to 100 mm whose thinnest edge meets the rule), which is all its bisection
  // needs and far cheaper; the answer is then confirmed with the full construction.
  const quick = 'ctMm' in thickness ? ok : (dia: number): boolean => {
    const r = dia / 2;
    const edgeMin = (t: number): number => {
      try {
        return new Lens({ ...spec, ctMm: t }).edgeThicknessRange(r).min;
      } catch {
        return NaN;
      }
    };
    const lo = thickness.minCentreMm;
    const e0 = edgeMin(lo);
    if (Number.isNaN(e0)) return false;
    if (e0 >= thickness.minEdgeMm) return true;
    for (let hi = Math.max(2 * lo, 1); hi <= 100; hi *= 1.5) if (edgeMin(hi) >= thickness.minEdgeMm) return true;
    return false;
  };
  // Where the rule asks for a positive edge, the bracket is the whole question: the solved
  // centre lies between two thicknesses at which both surfaces span the diameter and the
  // front's image stays outside the lens, and its edge meets the rule, so the lens is made.
  // With a zero edge the full construction decides (it asks for an edge above zero).
  const sure = 'ctMm' in thickness || thickness.minEdgeMm > 0 ? quick : (dia: number): boolean => quick(dia) && ok(dia);
  if (sure(upToMm)) return upToMm;
  let lo = minMm, hi = upToMm;
  // a hint (e.g. the neighbouring lens's answer) narrows the bracket; the answer does not depend on it
  const near = 4 * resolutionMm;
  if (hintMm !== undefined && hintMm > minMm && hintMm < upToMm) {
    if (quick(hintMm)) {
      lo = hintMm;
      const up = Math.min(upToMm, hintMm + near);
      if (!quick(up)) hi = up; else lo = up;
    } else {
      hi = hintMm;
      const down = Math.max(minMm, hintMm - near);
      if (down > minMm && quick(down)) lo = down; else hi = down === minMm ? hi : down;
    }
  }
  if (lo === minMm && !quick(minMm)) return null;
  while (hi - lo > resolutionMm / 4) {
    const mid = 0.5 * (lo + hi);
    if (quick(mid)) lo = mid;
    else hi = mid;
  }
  // lo is within a quarter step below the boundary: the answer is its step or the next one up
  let k = Math.floor(lo / resolutionMm + 1e-9);
  if ((k + 1) * resolutionMm <= upToMm && sure(Number(((k + 1) * resolutionMm).toFixed(6)))) k++;
  // confirm (stepping down should it be refused)
  for (; k * resolutionMm >= minMm - 1e-9; k--) {
    const d = Number((k * resolutionMm).toFixed(6));
    if (sure(d)) return d;
  }
  return null;
}

/** The in-tolerance region's outline: the limit in each of n directions (exact and Prentice). */
export function toleranceOutline(lens: Lens, crMm: number, maxPrism: number, directions = 72): { angleDeg: number; limit: LimitResult }[] {
  const out: { angleDeg: number; limit: LimitResult }[] = [];
  for (let i = 0; i < directions; i++) {
    const ang = (360 * i) / directions;
    out.push({ angleDeg: ang, limit: decentrationLimit(lens, crMm, ang, maxPrism) });
  }
  return out;
}

export interface PrescribedDecentration {
  /** exact decentration (visual point relative to the OC) giving the prism at the eye, mm; null if not found */
  exact: { x: number; y: number } | null;
  exactMessage: string;
  /** Prentice: c = -F⁻¹ p; null when det F = 0 (e.g. a plano-cylinder: prism only across its axis) */
  prentice: { x: number; y: number } | null;
  prenticeMessage: string;
}

/**
 * The decentration that gives prism (px, py) (Δ, wearer frame, towards the base) at the eye:
 * Prentice's c = -F⁻¹ p (det F ≠ 0), and exactly by 2-D Newton on the exact trace from it.
 */
export function decentrationForPrism(lens: Lens, crMm: number, px: number, py: number): PrescribedDecentration {
  let prentice: { x: number; y: number } | null = { x: 0, y: 0 };
  let prenticeMessage = 'ok';
  if (!decentrationFromMatrix(lens.vertexMatrix, px, py, prentice)) {
    prentice = null;
    prenticeMessage = 'the lens has no power in one meridian (det F = 0): decentration cannot give prism along that meridian';
  }
  // Newton from Prentice's answer (or from the centre when there is none)
  const r = newton2((x, y, out) => {
    _t.sx = 0; _t.sy = 0; _t.sz = -crMm; _t.bx = x; _t.by = y;
    if (lineOfSight(lens, _t) !== RayStatus.ok) return false;
    out.x = _t.px; out.y = _t.py;
    return true;
  }, px, py, prentice?.x ?? 0, prentice?.y ?? 0);
  const exact = r.status === 'ok' ? { x: r.x, y: r.y } : null;
  const exactMessage = r.status === 'ok' ? 'ok'
    : r.status === 'trace' ? 'the exact trace fails on the way to this prism (lens too small or too steep)'
      : r.status === 'singular' ? prenticeMessage : 'the exact decentration could not be found';
  return { exact, exactMessage, prentice, prenticeMessage };
}

/**
 * Minimum uncut blank diameter for a decentred lens: effective diameter plus twice the
 * decentration plus an allowance (common practice; with both components, ED + 2·sqrt(dx² + dy²)
 * + allowance), mm.
 */
export function minimumBlankMm(effectiveDiameterMm: number, dxMm: number, dyMm: number, allowanceMm = 2): number {
  return effectiveDiameterMm + 2 * Math.hypot(dxMm, dyMm) + allowanceMm;
}
