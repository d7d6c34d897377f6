/**
 * The lens folder's point-focal control: for the case on screen (its power, material,
 * thickness rule and centre-of-rotation distance), the true front power at which the pencil
 * reaching the eye turned by a chosen rotation has no astigmatic error, for a distant target
 * or a near one (src/case/bestForm.ts over the engine's formFronts, docs/method.md "Best
 * forms"), as the case edit that applies it. Nothing optical is computed here.
 */
import { InputError, inRange, readNumber } from '../../case/input.ts';
import { DEFAULTS, LIMITS, readTraceCase } from '../../case/lensCase.ts';
import { fixed } from '../../case/numberText.ts';
import { type ViewCase, toRawFields } from '../../case/url.ts';
import { OpticsError } from '../../optics/index.ts';
import { bestFronts } from '../../case/bestForm.ts';
import { FIELD_LABELS, POLAR_LABELS } from './compute.ts';
import type { FieldKey } from '../../case/lensCase.ts';

/** The default eye rotation and near distance, as `decentra form` has them (docs/cli.md). */
export const FORM_ROTATION_DEG = DEFAULTS.formRotationDeg;
export const FORM_NEAR_MM = DEFAULTS.formNearMm;

export interface PointFocalAsk {
  /** eye rotation as typed, degrees */
  rotation: string;
  /** 'distance' or 'near' */
  target: 'distance' | 'near';
  /** near target's distance from the vertex sphere as typed, mm */
  near: string;
}

export type PointFocalOutcome =
  | { ok: true; case: ViewCase; frontD: number; message: string }
  | { ok: false; field: 'rotation' | 'near' | null; message: string };

const label = (k: FieldKey): string => FIELD_LABELS[k];

/** The point-focal front for case `c` and the edit that applies it (front curve as a true power). */
export function pointFocalEdit(c: ViewCase, ask: PointFocalAsk): PointFocalOutcome {
  let rotationDeg: number, nearMm: number | null = null;
  try {
    rotationDeg = inRange('eye rotation', readNumber('eye rotation', ask.rotation, 'angle'), LIMITS.formRotation);
    if (ask.target === 'near') nearMm = inRange('near distance', readNumber('near distance', ask.near, 'length'), LIMITS.formNear);
  } catch (e) {
    if (e instanceof InputError) return { ok: false, field: e.field === 'eye rotation' ? 'rotation' : 'near', message: e.message };
    throw e;
  }
  let tc;
  try {
    ({ tc } = readTraceCase(toRawFields(c, POLAR_LABELS), label));
  } catch (e) {
    if (e instanceof InputError || e instanceof OpticsError) return { ok: false, field: null, message: `the case on screen is not a valid lens (${e.message})` };
    throw e;
  }
  const L = tc.lens;
  if (Math.abs(L.cylD) > 0) return { ok: false, field: null, message: 'point-focal forms are found here for spherical lenses; this lens has a cylinder' };
  if (L.frontConic !== 0 || L.backConic !== 0) return { ok: false, field: null, message: 'point-focal forms are found here for spherical surfaces; set both conics to 0 first' };
  const where = nearMm === null ? 'a distant target' : `a target ${fixed(nearMm, 0)} mm away`;
  const rot = `${fixed(rotationDeg, 0)}°`;
  // the centre thickness follows the front where a rule sets it (bestFronts)
  let roots: number[], ctMm: number;
  try {
    ({ fronts: roots, ctMm } = bestFronts(L, label, { crMm: tc.crMm, rotationDeg, nearMm, goal: 'astigmatism' }));
  } catch (e) {
    if (e instanceof OpticsError) return { ok: false, field: 'rotation', message: e.message };
    if (e instanceof InputError) {
      return { ok: false, field: null, message: `the point-focal front cannot be made with this lens's thickness and diameter: ${e.message}` };
    }
    throw e;
  }
  const frontD = roots[0];
  if (frontD === undefined) {
    return { ok: false, field: null, message: `no front curve from 0 to +25 D makes this lens free of astigmatic error at ${rot} for ${where}; the front is unchanged` };
  }
  const next: ViewCase = { ...c, frontMode: 'true', front: fixed(frontD, 2) };
  const steeper = roots.filter((v) => v > frontD + 0.01);
  const other = steeper.length ? ` (a steeper form also exists, ${fixed(steeper[0]!, 2)} D)` : '';
  return {
    ok: true, case: next, frontD,
    message: `Applied a true front power of ${fixed(frontD, 2)} D: free of astigmatic error at ${rot} eye rotation for ${where}, ` +
      `centre thickness ${fixed(ctMm, 2)} mm, CR ${fixed(tc.crMm, 1)} mm${other}. Undo restores the previous front.`,
  };
}
