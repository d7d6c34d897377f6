/**
 * A lens edged to its frame's shape, for the "both eyes" view: the case's lens surfaces
 * (Surface.pointAt, the engine's own, so the glass is drawn exactly as it is traced) cut to a
 * rounded rectangle the size of the frame's box (A x B, docs/case-file.md), centred on the
 * boxed centre; the two lenses then sit apart by the bridge (DBL) as in the frame, instead of
 * two round blanks that overlap there. The corner rounding is a drawing choice, not a
 * measurement (the case has only the box). Lens frame: origin at the back vertex, z towards
 * the object, mm.
 *
 * Fixed-size buffers, rewritten in place by update(); dispose() frees every geometry and
 * material. Nothing here computes optics.
 */
import { LensMesh, type Outline, outlinePoint } from '../lensMesh.ts';

export { type Outline, outlinePoint };

/** Points round the outline. */
export const OUTLINE_POINTS = 160;
/** Rings from the shape's centre out to its outline. */
const RINGS = 28;
/** Corner radius of the drawn shape, as a fraction of the box's smaller side (a drawing choice). */
export const CORNER_FRACTION = 0.28;

/** The drawn shape of a box xMin..xMax, yMin..yMax (binocular frame), in a lens frame whose origin is at (ox, oy). */
export function boxOutline(box: { xMin: number; xMax: number; yMin: number; yMax: number }, ox: number, oy: number, out: Outline): Outline {
  out.hw = 0.5 * (box.xMax - box.xMin);
  out.hh = 0.5 * (box.yMax - box.yMin);
  out.cx = 0.5 * (box.xMin + box.xMax) - ox;
  out.cy = 0.5 * (box.yMin + box.yMax) - oy;
  out.r = Math.min(CORNER_FRACTION * 2 * Math.min(out.hw, out.hh), out.hw, out.hh);
  return out;
}

/** The lens mesh of the both-eyes view: LensMesh with its grid, cut by update(lens, outline). */
export class EdgedLensMesh extends LensMesh {
  constructor() {
    super({ rings: RINGS, segments: OUTLINE_POINTS, name: 'edged-lens', edgeOpacity: 0.6 });
  }
}
