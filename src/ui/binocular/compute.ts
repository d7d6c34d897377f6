/**
 * From the store's case to what the "both eyes" views show: the fit report (evaluateFit,
 * the same as `decentra fit`), each eye's placement, and a lens with a finite diameter for
 * drawing. Glue only: every number comes from src/case and src/optics.
 */
import { type BinocularCase, type CaseDocument, readCase } from '../../case/caseFile.ts';
import { type FitReport, evaluateFit, placementOf, targetOf } from '../../case/fit.ts';
import { InputError } from '../../case/input.ts';
import { type BinocularTarget, Lens, OpticsError, type Placement } from '../../optics/index.ts';
import type { Side } from './form.ts';

export interface EyeView {
  side: Side;
  placement: Placement;
  /** the centre of rotation in the binocular frame, mm (right at -PD, left at +PD) */
  crXMm: number;
  /** a lens to draw: the case's own, or the same lens with a diameter when it has none
   *  (null when no diameter of 10 mm or more makes a lens) */
  drawLens: Lens | null;
  /** true when drawLens was given a diameter only for drawing */
  drawnDiameterOnly: boolean;
}

export interface BinocularComputed {
  c: BinocularCase;
  fit: FitReport;
  /** the target as the engine takes it: a point, a direction, or a reading level (no point) */
  target: BinocularTarget;
  eyes: Record<Side, EyeView>;
}

export type BinocularOutcome =
  | { ok: true; result: BinocularComputed }
  | { ok: false; path: string; message: string; reason: string };

/** Uncut diameter drawn when the case gives none (the thickness rule's usual 65 mm, docs/choices.md). */
export const DRAWN_DIAMETER_MM = 65;

export function failureOf(e: unknown): { path: string; message: string; reason: string } {
  if (e instanceof InputError) return { path: e.field, message: e.message, reason: e.reason };
  if (e instanceof OpticsError) return { path: e.field ?? 'case', message: e.message, reason: e.message };
  const m = (e as Error)?.message ?? String(e);
  return { path: 'case', message: `this case cannot be computed: ${m}`, reason: m };
}

/** Validate a document and evaluate it (nothing is thrown: a failure names its field). */
export function evaluateDoc(doc: CaseDocument | unknown): BinocularOutcome {
  let c: BinocularCase;
  try {
    c = readCase(doc);
  } catch (e) {
    return { ok: false, ...failureOf(e) };
  }
  return evaluateCase(c);
}

export function evaluateCase(c: BinocularCase): BinocularOutcome {
  let fit: FitReport;
  try {
    fit = evaluateFit(c);
  } catch (e) {
    return { ok: false, ...failureOf(e) };
  }
  const eyes = {} as Record<Side, EyeView>;
  for (const side of ['right', 'left'] as const) {
    const ec = c[side];
    const placement = placementOf(c, side);
    const lens = fit.lenses[side];
    const finite = Number.isFinite(lens.radiusMm);
    eyes[side] = {
      side, placement, crXMm: side === 'right' ? -ec.pdMm : ec.pdMm,
      drawLens: finite ? lens : withDrawnDiameter(lens, DRAWN_DIAMETER_MM),
      drawnDiameterOnly: !finite,
    };
  }
  return { ok: true, result: { c, fit, target: targetOf(c), eyes } };
}

/**
 * The same lens with a diameter, for drawing only: the largest of `wantMm`, wantMm - 5, ...
 * 10 mm at which the lens still has an edge (the engine refuses a diameter where the surfaces
 * cross); null if none does.
 */
export function withDrawnDiameter(lens: Lens, wantMm: number): Lens | null {
  for (let d = wantMm; d >= 10; d -= 5) {
    try {
      return new Lens({ ...lens.spec, diameterMm: d });
    } catch (e) {
      if (!(e instanceof OpticsError)) throw e;
    }
  }
  return null;
}
