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
import {
  BufferAttribute, BufferGeometry, DoubleSide, Group, LineBasicMaterial, LineLoop, Mesh,
  MeshPhysicalMaterial, MeshStandardMaterial,
} from 'three';
import { type Lens, type Surface } from '../../optics/index.ts';
import { COLORS } from '../palette.ts';
import { edgeGeometry, rimGeometry, surfaceGeometry, surfaceVertex } from '../lensMesh.ts';

/** Points round the outline. */
export const OUTLINE_POINTS = 160;
/** Rings from the shape's centre out to its outline. */
const RINGS = 28;
/** Corner radius of the drawn shape, as a fraction of the box's smaller side (a drawing choice). */
export const CORNER_FRACTION = 0.28;

/** A rounded rectangle in the lens frame, mm: centre, half-width, half-height, corner radius. */
export interface Outline {
  cx: number;
  cy: number;
  hw: number;
  hh: number;
  r: number;
}

/** The drawn shape of a box xMin..xMax, yMin..yMax (binocular frame), in a lens frame whose origin is at (ox, oy). */
export function boxOutline(box: { xMin: number; xMax: number; yMin: number; yMax: number }, ox: number, oy: number, out: Outline): Outline {
  out.hw = 0.5 * (box.xMax - box.xMin);
  out.hh = 0.5 * (box.yMax - box.yMin);
  out.cx = 0.5 * (box.xMin + box.xMax) - ox;
  out.cy = 0.5 * (box.yMin + box.yMax) - oy;
  out.r = Math.min(CORNER_FRACTION * 2 * Math.min(out.hw, out.hh), out.hw, out.hh);
  return out;
}

/**
 * The point at fraction t (0..1, anticlockwise from the middle of the right-hand side, +x)
 * along the outline's perimeter, into out[0], out[1]; its outward normal into out[2], out[3].
 */
export function outlinePoint(o: Outline, t: number, out: Float64Array): void {
  const sx = o.hw - o.r, sy = o.hh - o.r;
  const arc = 0.5 * Math.PI * o.r;
  const per = 4 * sx + 4 * sy + 4 * arc;
  let s = (((t % 1) + 1) % 1) * per;
  // the path: half the right side, then (corner, top, corner, left, corner, bottom, corner, half the right side)
  const legs = [sy, arc, 2 * sx, arc, 2 * sy, arc, 2 * sx, arc, sy];
  let leg = 0;
  while (leg < legs.length - 1 && s > legs[leg]!) {
    s -= legs[leg]!;
    leg++;
  }
  let x: number, y: number, nx: number, ny: number;
  const corner = (cxs: number, cys: number, a0: number): void => {
    const a = a0 + (o.r > 0 ? s / o.r : 0);
    nx = Math.cos(a); ny = Math.sin(a);
    x = cxs + o.r * nx; y = cys + o.r * ny;
  };
  switch (leg) {
    case 0: x = o.hw; y = s; nx = 1; ny = 0; break;
    case 1: corner(sx, sy, 0); break;
    case 2: x = sx - s; y = o.hh; nx = 0; ny = 1; break;
    case 3: corner(-sx, sy, 0.5 * Math.PI); break;
    case 4: x = -o.hw; y = sy - s; nx = -1; ny = 0; break;
    case 5: corner(-sx, -sy, Math.PI); break;
    case 6: x = -sx + s; y = -o.hh; nx = 0; ny = -1; break;
    case 7: corner(sx, -sy, 1.5 * Math.PI); break;
    default: x = o.hw; y = -sy + s; nx = 1; ny = 0; break;
  }
  out[0] = o.cx + x!; out[1] = o.cy + y!; out[2] = nx!; out[3] = ny!;
}

const _p = new Float64Array(4);

export class EdgedLensMesh {
  readonly group = new Group();
  private readonly front: Mesh;
  private readonly back: Mesh;
  private readonly edge: Mesh;
  private readonly glass: MeshPhysicalMaterial;
  private readonly edgeMaterial: MeshStandardMaterial;
  private readonly rimMaterial: LineBasicMaterial;
  private readonly rims: LineLoop[];

  constructor() {
    this.glass = new MeshPhysicalMaterial({
      color: COLORS.glass, transparent: true, opacity: 0.3, roughness: 0.18, metalness: 0,
      clearcoat: 1, clearcoatRoughness: 0.12, side: DoubleSide, depthWrite: false,
    });
    this.edgeMaterial = new MeshStandardMaterial({
      color: COLORS.glass, transparent: true, opacity: 0.6, roughness: 0.5, metalness: 0,
      side: DoubleSide, depthWrite: false,
    });
    this.rimMaterial = new LineBasicMaterial({ color: COLORS.rim });
    this.front = new Mesh(surfaceGeometry(RINGS, OUTLINE_POINTS), this.glass);
    this.back = new Mesh(surfaceGeometry(RINGS, OUTLINE_POINTS), this.glass);
    this.edge = new Mesh(edgeGeometry(OUTLINE_POINTS), this.edgeMaterial);
    this.front.name = 'edged-lens-front';
    this.back.name = 'edged-lens-back';
    this.edge.name = 'edged-lens-edge';
    this.back.renderOrder = 1;
    this.front.renderOrder = 2;
    this.edge.renderOrder = 3;
    this.rims = [new LineLoop(rimGeometry(OUTLINE_POINTS), this.rimMaterial), new LineLoop(rimGeometry(OUTLINE_POINTS), this.rimMaterial)];
    this.group.add(this.back, this.front, this.edge, ...this.rims);
  }

  /** Rewrite every vertex: the lens's surfaces over the outline (lens frame). */
  update(lens: Lens, o: Outline): void {
    this.fill(this.front.geometry, lens.front, o, 1);
    this.fill(this.back.geometry, lens.back, o, -1);
    const fp = this.front.geometry.getAttribute('position') as BufferAttribute;
    const bp = this.back.geometry.getAttribute('position') as BufferAttribute;
    // where the surfaces cross (outside the lens's own edge) the glass is drawn with no thickness
    for (let k = 0; k < fp.count; k++) if (fp.getZ(k) < bp.getZ(k)) fp.setZ(k, bp.getZ(k));
    const ep = this.edge.geometry.getAttribute('position') as BufferAttribute;
    const en = this.edge.geometry.getAttribute('normal') as BufferAttribute;
    const rimF = this.rims[0]!.geometry.getAttribute('position') as BufferAttribute;
    const rimB = this.rims[1]!.geometry.getAttribute('position') as BufferAttribute;
    const outer = RINGS * (OUTLINE_POINTS + 1);
    for (let j = 0; j <= OUTLINE_POINTS; j++) {
      outlinePoint(o, j / OUTLINE_POINTS, _p);
      ep.setXYZ(j, fp.getX(outer + j), fp.getY(outer + j), fp.getZ(outer + j));
      ep.setXYZ(OUTLINE_POINTS + 1 + j, bp.getX(outer + j), bp.getY(outer + j), bp.getZ(outer + j));
      en.setXYZ(j, _p[2]!, _p[3]!, 0);
      en.setXYZ(OUTLINE_POINTS + 1 + j, _p[2]!, _p[3]!, 0);
      if (j < OUTLINE_POINTS) {
        rimF.setXYZ(j, fp.getX(outer + j), fp.getY(outer + j), fp.getZ(outer + j));
        rimB.setXYZ(j, bp.getX(outer + j), bp.getY(outer + j), bp.getZ(outer + j));
      }
    }
    fp.needsUpdate = true;
    for (const g of [this.edge.geometry, this.rims[0]!.geometry, this.rims[1]!.geometry, this.front.geometry]) {
      for (const name of ['position', 'normal']) {
        const at = g.getAttribute(name);
        if (at) at.needsUpdate = true;
      }
      g.computeBoundingSphere();
    }
  }

  /** Shown as invalid (the inputs do not make a case): tinted, the last valid shape kept. */
  setInvalid(invalid: boolean): void {
    const c = invalid ? COLORS.glassInvalid : COLORS.glass;
    this.glass.color.setHex(c);
    this.edgeMaterial.color.setHex(c);
    this.rimMaterial.color.setHex(invalid ? COLORS.glassInvalid : COLORS.rim);
  }

  private fill(g: BufferGeometry, surface: Surface, o: Outline, outward: 1 | -1): void {
    const pos = g.getAttribute('position') as BufferAttribute;
    const nor = g.getAttribute('normal') as BufferAttribute;
    for (let j = 0; j <= OUTLINE_POINTS; j++) {
      outlinePoint(o, j / OUTLINE_POINTS, _p);
      const ux = _p[0]! - o.cx, uy = _p[1]! - o.cy;
      for (let i = 0; i <= RINGS; i++) {
        // rings closer together towards the outline, where a steep surface bends most
        const f = Math.sin((0.5 * Math.PI * i) / RINGS);
        const x = o.cx + f * ux, y = o.cy + f * uy;
        const k = i * (OUTLINE_POINTS + 1) + j;
        surfaceVertex(surface, x, y, outward, pos, nor, k);
      }
    }
    pos.needsUpdate = true;
    nor.needsUpdate = true;
    g.computeBoundingSphere();
  }

  dispose(): void {
    for (const m of [this.front, this.back, this.edge]) m.geometry.dispose();
    for (const l of this.rims) l.geometry.dispose();
    this.glass.dispose();
    this.edgeMaterial.dispose();
    this.rimMaterial.dispose();
    this.group.removeFromParent();
  }
}
