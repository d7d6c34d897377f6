/**
 * From the case on screen to everything the views draw: validation (src/case), the lens,
 * the four answers, the profile along the current direction and the lens data. All optics
 * come from src/optics; this file only calls it and names the fields.
 */
import { type FieldKey, readTraceCase, type TraceCase } from '../../case/lensCase.ts';
import { InputError } from '../../case/input.ts';
import type { PencilGeometry } from '../../scene/pencil.ts';
import { type ViewCase, type ViewField, toRawFields } from '../../case/url.ts';
import {
  type FourAnswers, type Lens, type PrismProfile, type SpheroCyl, findMaterial, fourAnswers, prismProfile, toSpheroCyl,
} from '../../optics/index.ts';

/** How each field is named in messages (and on screen). */
export const FIELD_LABELS: Record<FieldKey, string> = {
  sphere: 'sphere', cyl: 'cylinder', axis: 'axis', eye: 'eye',
  index: 'refractive index', material: 'material', abbe: 'Abbe number',
  front: 'front surface power', base: 'nominal front power', toolIndex: 'tool index', frontRule: 'front curve rule',
  ct: 'centre thickness', minEdge: 'minimum edge thickness', minCt: 'minimum centre thickness', diameter: 'lens diameter',
  frontK: 'front conic', backK: 'back conic', cylOn: 'cylinder on', toric: 'toric form',
  x: 'visual point x', y: 'visual point y', cr: 'CR distance',
};
export const POLAR_LABELS = { dir: 'direction', dist: 'distance from OC' } as const;

const label = (k: FieldKey): string => FIELD_LABELS[k];

/** The visualiser field that holds a message's field, given the case's modes. */
export function fieldOfMessage(messageField: string, c: ViewCase): ViewField | null {
  if (messageField === POLAR_LABELS.dir) return 'dir';
  if (messageField === POLAR_LABELS.dist) return 'dist';
  const key = (Object.keys(FIELD_LABELS) as FieldKey[]).find((k) => FIELD_LABELS[k] === messageField);
  if (!key) return null;
  if ((key === 'x' || key === 'y') && c.pointMode === 'polar') return 'dist';
  if (key === 'frontRule') return 'frontMode';
  if (key === 'toolIndex') return 'toolIndex';
  return key as ViewField;
}

export interface Computed {
  tc: TraceCase;
  lens: Lens;
  answers: FourAnswers;
  /** direction of the visual point from the optical centre, degrees (0 when at the OC) */
  directionDeg: number;
  /** distance of the visual point from the optical centre, mm */
  decentrationMm: number;
  profile: PrismProfile;
  edge: { min: number; max: number };
  equivalent: SpheroCyl;
  frontD: readonly [number, number];
  backD: readonly [number, number];
  abbe: number | null;
  materialName: string;
  warnings: string[];
  /** the pencil along the exact line of sight, for drawing (null where it fails) */
  pencil: PencilDrawing | null;
}

/** The pencil at the vertex sphere as the scene draws it (lens frame, mm). */
export type PencilDrawing = PencilGeometry;

export type ComputeOutcome =
  | { ok: true; result: Computed }
  | { ok: false; field: ViewField | null; message: string };

export const PROFILE_STEPS = 120;

export function computeCase(c: ViewCase, fallbackDirectionDeg = 0): ComputeOutcome {
  let tc: TraceCase, lens: Lens;
  try {
    ({ tc, lens } = readTraceCase(toRawFields(c, POLAR_LABELS), label));
  } catch (e) {
    if (e instanceof InputError) return { ok: false, field: fieldOfMessage(e.field, c), message: e.message };
    return { ok: false, field: null, message: `this lens cannot be built: ${(e as Error).message}` };
  }
  const answers = fourAnswers(lens, tc.crMm, tc.xMm, tc.yMm, tc.eye);
  const decentrationMm = Math.hypot(tc.xMm, tc.yMm);
  let directionDeg = decentrationMm > 0 ? (Math.atan2(tc.yMm, tc.xMm) * 180) / Math.PI : fallbackDirectionDeg;
  if (directionDeg < 0) directionDeg += 360;
  const profile = prismProfile(lens, tc.crMm, directionDeg, lens.radiusMm, PROFILE_STEPS);
  const edge = lens.edgeThicknessRange();
  const warnings: string[] = [];
  const ex = answers.exact;
  if ('failure' in ex) warnings.push(`Exact answer: ${ex.message}.`);
  const fo = answers.focimeter;
  if ('failure' in fo) warnings.push(`Focimeter: ${fo.message}.`);
  const t = answers.exactTrace;
  if (!('failure' in ex)) {
    const exitR = Math.hypot(t.fx, t.fy);
    if (exitR > 0.92 * lens.radiusMm) {
      warnings.push(`The line of sight leaves the front surface ${fmt(exitR)} mm from the axis, close to the ${fmt(lens.radiusMm)} mm lens edge.`);
    }
  }
  if (decentrationMm > 0.85 * lens.radiusMm) {
    warnings.push(`The visual point is ${fmt(decentrationMm)} mm from the optical centre, near the edge of the ${fmt(2 * lens.radiusMm)} mm aperture.`);
  }
  const mat = c.material === 'custom' ? undefined : findMaterial(c.material);
  return {
    ok: true,
    result: {
      tc, lens, answers, directionDeg, decentrationMm, profile, edge,
      equivalent: toSpheroCyl(lens.equivalentMatrix(), tc.lens.cylD > 0 ? 'plus' : 'minus'),
      frontD: lens.frontPowers, backD: lens.backPowers,
      abbe: tc.lens.abbe ?? null,
      materialName: mat ? mat.name : `custom material, n = ${fmt(lens.index, 3)}`,
      warnings,
      pencil: 'failure' in answers.power ? null : answers.power.geometry,
    },
  };
}

function fmt(v: number, d = 1): string {
  return v.toFixed(d);
}
