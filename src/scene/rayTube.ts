/**
 * A polyline drawn as thin tubes (solid or dashed) with one InstancedMesh: updating it only
 * rewrites the instance matrices, so a ray that moves allocates no GPU memory.
 */
import {
  CylinderGeometry, InstancedMesh, Matrix4, MeshBasicMaterial, Quaternion, Vector3,
} from 'three';

const _m = new Matrix4();
const _q = new Quaternion();
const _p = new Vector3();
const _s = new Vector3();
const _d = new Vector3();
const _up = new Vector3(0, 1, 0);

export interface TubeStyle {
  color: number;
  radiusMm: number;
  /** dash and gap lengths, mm; solid when absent */
  dashMm?: number;
  gapMm?: number;
  opacity?: number;
}

export class RayTube {
  readonly mesh: InstancedMesh;
  private readonly material: MeshBasicMaterial;
  private readonly style: TubeStyle;
  private readonly capacity: number;

  /** `unit` is a shared open cylinder of radius 1, height 1 along y (owned by the caller). */
  constructor(unit: CylinderGeometry, style: TubeStyle, capacity = 160) {
    this.style = style;
    this.capacity = capacity;
    this.material = new MeshBasicMaterial({
      color: style.color, transparent: (style.opacity ?? 1) < 1, opacity: style.opacity ?? 1,
    });
    this.mesh = new InstancedMesh(unit, this.material, capacity);
    this.mesh.count = 0;
    this.mesh.frustumCulled = false;
  }

  /** Draw the polyline through points [x0, y0, z0, x1, y1, z1, ...] (n points). */
  setPolyline(pts: ArrayLike<number>, n: number): void {
    let k = 0;
    for (let i = 0; i + 1 < n && k < this.capacity; i++) {
      const ax = pts[3 * i], ay = pts[3 * i + 1], az = pts[3 * i + 2];
      const bx = pts[3 * i + 3], by = pts[3 * i + 4], bz = pts[3 * i + 5];
      const len = Math.hypot(bx - ax, by - ay, bz - az);
      if (!(len > 1e-9)) continue;
      const { dashMm, gapMm } = this.style;
      if (!dashMm) {
        k = this.put(k, ax, ay, az, bx, by, bz);
        continue;
      }
      const period = dashMm + (gapMm ?? dashMm);
      for (let s = 0; s < len && k < this.capacity; s += period) {
        const e = Math.min(len, s + dashMm);
        const t0 = s / len, t1 = e / len;
        k = this.put(k, ax + (bx - ax) * t0, ay + (by - ay) * t0, az + (bz - az) * t0,
          ax + (bx - ax) * t1, ay + (by - ay) * t1, az + (bz - az) * t1);
      }
    }
    this.mesh.count = k;
    this.mesh.instanceMatrix.needsUpdate = true;
  }

  clear(): void {
    this.mesh.count = 0;
  }

  setColor(hex: number): void {
    this.material.color.setHex(hex);
  }

  private put(k: number, ax: number, ay: number, az: number, bx: number, by: number, bz: number): number {
    _d.set(bx - ax, by - ay, bz - az);
    const len = _d.length();
    _d.divideScalar(len);
    _q.setFromUnitVectors(_up, _d);
    _p.set((ax + bx) / 2, (ay + by) / 2, (az + bz) / 2);
    _s.set(this.style.radiusMm, len, this.style.radiusMm);
    _m.compose(_p, _q, _s);
    this.mesh.setMatrixAt(k, _m);
    return k + 1;
  }

  dispose(): void {
    this.material.dispose();
    this.mesh.dispose();
  }
}
