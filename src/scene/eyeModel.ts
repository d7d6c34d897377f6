/**
 * The eye as a simple globe turning about its centre of rotation (CR) to look along the
 * line of sight. Drawing only: a 12 mm globe with a corneal cap whose apex is 13.5 mm in
 * front of the CR (typical figures, common practice, no source); the optics use only the CR.
 */
import {
  CircleGeometry, DoubleSide, Group, Mesh, MeshBasicMaterial, MeshStandardMaterial, Quaternion,
  RingGeometry, SphereGeometry, Vector3,
} from 'three';
import { CSS2DObject } from 'three/examples/jsm/renderers/CSS2DRenderer.js';
import { COLORS } from './palette.ts';

export const GLOBE_RADIUS_MM = 12;
export const CORNEA_APEX_MM = 13.5;
const CORNEA_RADIUS_MM = 7.8;

const _z = new Vector3(0, 0, 1);
const _v = new Vector3();
const _q = new Quaternion();

export class EyeModel {
  readonly group = new Group();
  private readonly gaze = new Group();
  private readonly geometries: (SphereGeometry | RingGeometry | CircleGeometry)[] = [];
  private readonly materials: (MeshStandardMaterial | MeshBasicMaterial)[] = [];
  private readonly label: CSS2DObject;

  constructor() {
    const globeG = new SphereGeometry(GLOBE_RADIUS_MM, 48, 32);
    const globeM = new MeshStandardMaterial({
      color: COLORS.eye, transparent: true, opacity: 0.22, roughness: 0.6, depthWrite: false, side: DoubleSide,
    });
    // corneal cap: a sphere segment around +z whose apex is CORNEA_APEX_MM from the CR
    const c = CORNEA_APEX_MM - CORNEA_RADIUS_MM; // cap centre on the gaze axis
    // the cap ends where it meets the globe
    const capAngle = Math.acos((GLOBE_RADIUS_MM ** 2 - c * c - CORNEA_RADIUS_MM ** 2) / (2 * c * CORNEA_RADIUS_MM));
    const corneaG = new SphereGeometry(CORNEA_RADIUS_MM, 32, 12, 0, 2 * Math.PI, 0, capAngle);
    corneaG.rotateX(Math.PI / 2);
    corneaG.translate(0, 0, c);
    const corneaM = new MeshStandardMaterial({
      color: 0xffffff, transparent: true, opacity: 0.28, roughness: 0.1, depthWrite: false, side: DoubleSide,
    });
    const irisZ = Math.sqrt(GLOBE_RADIUS_MM ** 2 - 5.6 ** 2) + 0.2;
    const irisG = new RingGeometry(1.9, 5.6, 40);
    irisG.translate(0, 0, irisZ);
    const irisM = new MeshStandardMaterial({ color: COLORS.iris, roughness: 0.8, side: DoubleSide });
    const pupilG = new CircleGeometry(1.9, 32);
    pupilG.translate(0, 0, irisZ);
    const pupilM = new MeshBasicMaterial({ color: 0x0b0f14, side: DoubleSide });
    const crG = new SphereGeometry(0.7, 16, 12);
    const crM = new MeshBasicMaterial({ color: COLORS.cr });
    this.geometries.push(globeG, corneaG, irisG, pupilG, crG);
    this.materials.push(globeM, corneaM, irisM, pupilM, crM);

    const globe = new Mesh(globeG, globeM);
    globe.renderOrder = 0;
    this.gaze.add(globe, new Mesh(corneaG, corneaM), new Mesh(irisG, irisM), new Mesh(pupilG, pupilM));
    const cr = new Mesh(crG, crM);
    cr.name = 'centre-of-rotation';
    const el = document.createElement('div');
    el.className = 'scene-label scene-label--cr';
    el.textContent = 'CR';
    this.label = new CSS2DObject(el);
    this.label.position.set(0, -2.2, 0);
    this.group.add(this.gaze, cr, this.label);
  }

  /** Place the CR at lens-frame z = -crMm and turn the eye towards (dx, dy, dz). */
  update(crMm: number, dx: number, dy: number, dz: number): void {
    this.group.position.set(0, 0, -crMm);
    _v.set(dx, dy, dz).normalize();
    _q.setFromUnitVectors(_z, _v);
    this.gaze.quaternion.copy(_q);
  }

  setLabelsVisible(v: boolean): void {
    this.label.visible = v;
  }

  dispose(): void {
    for (const g of this.geometries) g.dispose();
    for (const m of this.materials) m.dispose();
    this.group.removeFromParent();
    this.label.removeFromParent();
  }
}
