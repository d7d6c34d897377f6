/**
 * Best forms of a lens form as a person asks for them (docs/method.md, "Best forms"): the
 * engine's formFronts for the form's power and material, with the centre thickness the form
 * gives. Where a thickness rule sets it (minimum edge and centre over a diameter), the
 * thickness follows the front: search, rebuild the lens on the front found, search again with
 * its thickness, until the two agree (to 0.005 mm). One rule for `decentra form` and the app's
 * point-focal control. Glue only: the roots are the engine's.
 */
import { type FormQuery, formFronts } from '../optics/index.ts';
import { type Labeller, type LensForm, buildLens } from './lensCase.ts';

export interface FormAnswer {
  /** true front powers, D, flattest first (empty: none from 0 to +25 D) */
  fronts: number[];
  /** the centre thickness they hold for, mm */
  ctMm: number;
}

/** Agreement of the thickness between two rounds, mm, and the rounds at most. */
const CT_AGREE_MM = 0.005;
const ROUNDS = 6;

/**
 * The fronts of `form` (spherical; its front setting is replaced by each candidate) for an
 * eye rotation, a target and a goal. A form that cannot be made on the front found throws
 * the lens layer's InputError, naming the field.
 */
export function bestFronts(form: LensForm, label: Labeller, q: Omit<FormQuery, 'sphereD' | 'index' | 'ctMm'>): FormAnswer {
  let ctMm = buildLens(form, label).ctMm;
  let fronts: number[] = [];
  for (let i = 0; i < ROUNDS; i++) {
    fronts = formFronts({ ...q, sphereD: form.sphereD, index: form.index, ctMm });
    if (form.thickness.kind === 'centre' || fronts.length === 0) break;
    const ct2 = buildLens({ ...form, front: { kind: 'true', frontD: fronts[0]! } }, label).ctMm;
    if (Math.abs(ct2 - ctMm) < CT_AGREE_MM) break;
    ctMm = ct2;
  }
  return { fronts, ctMm };
}
