/**
 * The lens as a mesh built from the engine's real surfaces (lens frame: origin at the back
 * vertex, z towards the object, mm). Points and normals come from Surface.pointAt, so a
 * toric or aspheric surface is drawn exactly as it is traced. The grid (polar rings x
 * segments) has a fixed size: update() rewrites the buffers in place and allocates nothing
 * on the GPU; dispose() frees everything.
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

  constructor() {
    this.glass = new MeshPhysicalMaterial({
      color: COLORS.glass, transparent: true, opacity: 0.3, roughness: 0.18, metalness: 0,
      clearcoat: 1, clearcoatRoughness: 0.12, side: DoubleSide, depthWrite: false,
    });
    this.edgeMaterial = new MeshStandardMaterial({
      color: COLORS.glass, transparent: true, opacity: 0.55, roughness: 0.5, metalness: 0,
      side: DoubleSide, depthWrite: false,
    });
    this.rimMaterial = new LineBasicMaterial({ color: COLORS.rim });
    this.frontMesh = new Mesh(surfaceGeometry(), this.glass);
    this.backMesh = new Mesh(surfaceGeometry(), this.glass);
    this.edgeMesh = new Mesh(edgeGeometry(), this.edgeMaterial);
    this.frontMesh.name = 'lens-front';
    this.backMesh.name = 'lens-back';
    this.edgeMesh.name = 'lens-edge';
    this.rims = [new LineLoop(rimGeometry(), this.rimMaterial), new LineLoop(rimGeometry(), this.rimMaterial)];
    this.frontMesh.renderOrder = 2;
    this.backMesh.renderOrder = 1;
    this.edgeMesh.renderOrder = 3;
    this.group.add(this.backMesh, this.frontMesh, this.edgeMesh, ...this.rims);
  }

  /** Rewrite every vertex from the lens's surfaces. */
  update(lens: Lens): void {
    const r = lens.radiusMm;
    this.fillSurface(this.frontMesh.geometry, lens.front, r, 1);
    this.fillSurface(this.backMesh.geometry, lens.back, r, -1);
    const ep = this.edgeMesh.geometry.getAttribute('position') as BufferAttribute;
    const en = this.edgeMesh.geometry.getAttribute('normal') as BufferAttribute;
    const fp = this.frontMesh.geometry.getAttribute('position') as BufferAttribute;
    const bp = this.backMesh.geometry.getAttribute('position') as BufferAttribute;
    const rimF = this.rims[0]!.geometry.getAttribute('position') as BufferAttribute;
    const rimB = this.rims[1]!.geometry.getAttribute('position') as BufferAttribute;
    const outer = RINGS * (SEGMENTS + 1);
    for (let j = 0; j <= SEGMENTS; j++) {
      const a = (2 * Math.PI * j) / SEGMENTS;
      const c = Math.cos(a), s = Math.sin(a);
      ep.setXYZ(j, fp.getX(outer + j), fp.getY(outer + j), fp.getZ(outer + j));
      ep.setXYZ(SEGMENTS + 1 + j, bp.getX(outer + j), bp.getY(outer + j), bp.getZ(outer + j));
      en.setXYZ(j, c, s, 0);
      en.setXYZ(SEGMENTS + 1 + j, c, s, 0);
      if (j < SEGMENTS) {
        rimF.setXYZ(j, fp.getX(outer + j), fp.getY(outer + j), fp.getZ(outer + j));
        rimB.setXYZ(j, bp.getX(outer + j), bp.getY(outer + j), bp.getZ(outer + j));
      }
    }
    for (const g of [this.edgeMesh.geometry, this.rims[0]!.geometry, this.rims[1]!.geometry]) {
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

  private fillSurface(g: BufferGeometry, surface: Surface, radius: number, outward: 1 | -1): void {
    const pos = g.getAttribute('position') as BufferAttribute;
    const nor = g.getAttribute('normal') as BufferAttribute;
    for (let i = 0; i <= RINGS; i++) {
      // rings closer together towards the edge, where a steep surface bends most
      const rr = radius * Math.sin((0.5 * Math.PI * i) / RINGS);
      for (let j = 0; j <= SEGMENTS; j++) {
        const a = (2 * Math.PI * j) / SEGMENTS;
        const k = i * (SEGMENTS + 1) + j;
        const x = rr * Math.cos(a), y = rr * Math.sin(a);
        surfaceVertex(surface, x, y, outward, pos, nor, k);
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
