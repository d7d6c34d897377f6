/**
 * The lens as a mesh built from the engine's real surfaces (lens frame: origin at the back
 * vertex, z towards the object, mm). Points and normals come from Surface.pointAt, so a
 * toric or aspheric surface is drawn exactly as it is traced. The lens is cut to an outline:
 * its round edge (the single-lens view), or a frame's shape (the both-eyes view,
 * binocular/edgedLens.ts). The grid (rings from the outline's centre out to it x points round
 * it) has a fixed size: update() rewrites the buffers in place and allocates nothing on the
 * GPU; dispose() frees everything.
 */
import {
  BufferAttribute, BufferGeometry, DoubleSide, Group, LineBasicMaterial, LineLoop, Mesh,
  MeshPhysicalMaterial, MeshStandardMaterial,
} from 'three';
import { Hit, type Lens, type Surface } from '../optics/index.ts';
import { COLORS } from './palette.ts';

const RINGS = 36;
const SEGMENTS = 120;
const _hit = new Hit();

/**
 * Vertex k of a surface mesh at transverse (x, y): the surface's point and its normal turned
 * `outward` (+1 or -1); where the surface does not exist there (a very steep curve), the
 * vertex stays on the vertex plane.
 */
export function surfaceVertex(
  surface: Surface, x: number, y: number, outward: number, pos: BufferAttribute, nor: BufferAttribute, k: number,
): void {
  if (surface.pointAt(x, y, _hit)) {
    pos.setXYZ(k, _hit.x, _hit.y, _hit.z);
    nor.setXYZ(k, outward * _hit.nx, outward * _hit.ny, outward * _hit.nz);
  } else {
    pos.setXYZ(k, x, y, surface.vertexZ);
    nor.setXYZ(k, 0, 0, outward);
  }
}

/** A grid of `rings` x `segments` quads (positions and normals filled later), shared by the round and edged lenses. */
export function surfaceGeometry(rings = RINGS, segments = SEGMENTS): BufferGeometry {
  const g = new BufferGeometry();
  const nv = (rings + 1) * (segments + 1);
  g.setAttribute('position', new BufferAttribute(new Float32Array(3 * nv), 3));
  g.setAttribute('normal', new BufferAttribute(new Float32Array(3 * nv), 3));
  const idx: number[] = [];
  for (let i = 0; i < rings; i++) {
    for (let j = 0; j < segments; j++) {
      const a = i * (segments + 1) + j, b = a + 1, c = a + segments + 1, d = c + 1;
      idx.push(a, c, b, b, c, d);
    }
  }
  g.setIndex(idx);
  return g;
}

/** A band of `segments` quads between two outlines (the lens edge). */
export function edgeGeometry(segments = SEGMENTS): BufferGeometry {
  const g = new BufferGeometry();
  const nv = 2 * (segments + 1);
  g.setAttribute('position', new BufferAttribute(new Float32Array(3 * nv), 3));
  g.setAttribute('normal', new BufferAttribute(new Float32Array(3 * nv), 3));
  const idx: number[] = [];
  for (let j = 0; j < segments; j++) {
    const a = j, b = j + 1, c = segments + 1 + j, d = c + 1;
    idx.push(a, c, b, b, c, d);
  }
  g.setIndex(idx);
  return g;
}

/** A closed outline of `segments` points. */
export function rimGeometry(segments = SEGMENTS): BufferGeometry {
  const g = new BufferGeometry();
  g.setAttribute('position', new BufferAttribute(new Float32Array(3 * segments), 3));
  return g;
}

/** A rounded rectangle in the lens frame, mm: centre, half-width, half-height, corner radius (a circle when hw = hh = r). */
export interface Outline {
  cx: number;
  cy: number;
  hw: number;
  hh: number;
  r: number;
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

/** How a lens mesh is built: its grid and how it is named and drawn. */
export interface LensMeshOptions {
  /** rings from the outline's centre out to it */
  rings?: number;
  /** points round the outline */
  segments?: number;
  /** prefix of the meshes' names ('<name>-front', '-back', '-edge') */
  name?: string;
  /** opacity of the edge band */
  edgeOpacity?: number;
}

export class LensMesh {
  readonly group = new Group();
  /** the back (eye-side) surface: the pointer drags the visual point on it */
  readonly backMesh: Mesh;
  readonly frontMesh: Mesh;
  private readonly edgeMesh: Mesh;
  private readonly glass: MeshPhysicalMaterial;
  private readonly edgeMaterial: MeshStandardMaterial;
  private readonly rimMaterial: LineBasicMaterial;
  private readonly rims: LineLoop[];
  private readonly rings: number;
  private readonly segments: number;
  /** the round outline of update(lens) without one */
  private readonly round: Outline = { cx: 0, cy: 0, hw: 1, hh: 1, r: 1 };

  constructor(options: LensMeshOptions = {}) {
    const rings = (this.rings = options.rings ?? RINGS);
    const segments = (this.segments = options.segments ?? SEGMENTS);
    const name = options.name ?? 'lens';
    this.glass = new MeshPhysicalMaterial({
      color: COLORS.glass, transparent: true, opacity: 0.3, roughness: 0.18, metalness: 0,
      clearcoat: 1, clearcoatRoughness: 0.12, side: DoubleSide, depthWrite: false,
    });
    this.edgeMaterial = new MeshStandardMaterial({
      color: COLORS.glass, transparent: true, opacity: options.edgeOpacity ?? 0.55, roughness: 0.5, metalness: 0,
      side: DoubleSide, depthWrite: false,
    });
    this.rimMaterial = new LineBasicMaterial({ color: COLORS.rim });
    this.frontMesh = new Mesh(surfaceGeometry(rings, segments), this.glass);
    this.backMesh = new Mesh(surfaceGeometry(rings, segments), this.glass);
    this.edgeMesh = new Mesh(edgeGeometry(segments), this.edgeMaterial);
    this.frontMesh.name = `${name}-front`;
    this.backMesh.name = `${name}-back`;
    this.edgeMesh.name = `${name}-edge`;
    this.rims = [new LineLoop(rimGeometry(segments), this.rimMaterial), new LineLoop(rimGeometry(segments), this.rimMaterial)];
    this.frontMesh.renderOrder = 2;
    this.backMesh.renderOrder = 1;
    this.edgeMesh.renderOrder = 3;
    this.group.add(this.backMesh, this.frontMesh, this.edgeMesh, ...this.rims);
  }

  /**
   * Rewrite every vertex from the lens's surfaces, cut to `outline` (lens frame), or to the
   * lens's own round edge when none is given.
   */
  update(lens: Lens, outline?: Outline): void {
    let o = outline;
    if (!o) {
      o = this.round;
      o.hw = o.hh = o.r = lens.radiusMm;
    }
    const n = this.segments;
    this.fillSurface(this.frontMesh.geometry, lens.front, o, 1);
    this.fillSurface(this.backMesh.geometry, lens.back, o, -1);
    const fp = this.frontMesh.geometry.getAttribute('position') as BufferAttribute;
    const bp = this.backMesh.geometry.getAttribute('position') as BufferAttribute;
    // where the surfaces cross (outside the lens's own edge) the glass is drawn with no thickness
    for (let k = 0; k < fp.count; k++) if (fp.getZ(k) < bp.getZ(k)) fp.setZ(k, bp.getZ(k));
    const ep = this.edgeMesh.geometry.getAttribute('position') as BufferAttribute;
    const en = this.edgeMesh.geometry.getAttribute('normal') as BufferAttribute;
    const rimF = this.rims[0]!.geometry.getAttribute('position') as BufferAttribute;
    const rimB = this.rims[1]!.geometry.getAttribute('position') as BufferAttribute;
    const outer = this.rings * (n + 1);
    for (let j = 0; j <= n; j++) {
      outlinePoint(o, j / n, _p);
      ep.setXYZ(j, fp.getX(outer + j), fp.getY(outer + j), fp.getZ(outer + j));
      ep.setXYZ(n + 1 + j, bp.getX(outer + j), bp.getY(outer + j), bp.getZ(outer + j));
      en.setXYZ(j, _p[2]!, _p[3]!, 0);
      en.setXYZ(n + 1 + j, _p[2]!, _p[3]!, 0);
      if (j < n) {
        rimF.setXYZ(j, fp.getX(outer + j), fp.getY(outer + j), fp.getZ(outer + j));
        rimB.setXYZ(j, bp.getX(outer + j), bp.getY(outer + j), bp.getZ(outer + j));
      }
    }
    for (const g of [this.edgeMesh.geometry, this.rims[0]!.geometry, this.rims[1]!.geometry, this.frontMesh.geometry]) {
      for (const name of ['position', 'normal']) {
        const at = g.getAttribute(name);
        if (at) at.needsUpdate = true;
      }
      g.computeBoundingSphere();
    }
  }

  /** Shown as invalid (the inputs do not make a lens): tinted, the last valid shape kept. */
  setInvalid(invalid: boolean): void {
    const c = invalid ? COLORS.glassInvalid : COLORS.glass;
    this.glass.color.setHex(c);
    this.edgeMaterial.color.setHex(c);
    this.rimMaterial.color.setHex(invalid ? COLORS.glassInvalid : COLORS.rim);
  }

  private fillSurface(g: BufferGeometry, surface: Surface, o: Outline, outward: 1 | -1): void {
    const pos = g.getAttribute('position') as BufferAttribute;
    const nor = g.getAttribute('normal') as BufferAttribute;
    const n = this.segments;
    for (let j = 0; j <= n; j++) {
      outlinePoint(o, j / n, _p);
      const ux = _p[0]! - o.cx, uy = _p[1]! - o.cy;
      for (let i = 0; i <= this.rings; i++) {
        // rings closer together towards the outline, where a steep surface bends most
        const f = Math.sin((0.5 * Math.PI * i) / this.rings);
        const k = i * (n + 1) + j;
        surfaceVertex(surface, o.cx + f * ux, o.cy + f * uy, outward, pos, nor, k);
      }
    }
    pos.needsUpdate = true;
    nor.needsUpdate = true;
    g.computeBoundingSphere();
    g.computeBoundingBox();
  }

  dispose(): void {
    for (const m of [this.frontMesh, this.backMesh, this.edgeMesh]) m.geometry.dispose();
    for (const l of this.rims) l.geometry.dispose();
    this.glass.dispose();
    this.edgeMaterial.dispose();
    this.rimMaterial.dispose();
    this.group.removeFromParent();
  }
}
