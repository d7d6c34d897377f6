/**
 * Lens materials by generic name (no brand names). n_d at 587.56 nm and Abbe number V_d.
 * Sources are named per row; H/M/L is the confidence given in the project's reference list
 * (H: a primary text or two sources; M: one secondary source; L: from memory).
 */

export interface Material {
  id: string;
  name: string;
  nd: number;
  abbe: number;
  source: string;
}

export const MATERIALS: readonly Material[] = [
  { id: 'resin-1.50', name: 'standard hard resin (allyl diglycol carbonate)', nd: 1.498, abbe: 58, source: 'common handbook value (H)' },
  { id: 'crown-1.52', name: 'ophthalmic crown glass', nd: 1.523, abbe: 58.5, source: 'common handbook value, V 58-59 (H)' },
  { id: 'resin-1.53', name: 'urethane-based 1.53 resin', nd: 1.532, abbe: 44, source: 'one secondary source, V 43-45 (M)' },
  { id: 'resin-1.56', name: '1.56 mid-index resin', nd: 1.56, abbe: 37, source: 'one secondary source (M)' },
  { id: 'polycarbonate', name: 'polycarbonate', nd: 1.586, abbe: 30, source: 'common handbook value (H)' },
  { id: 'resin-1.60', name: '1.60 high-index resin', nd: 1.6, abbe: 42, source: 'one secondary source, about 1.60 and V 41-42 (M)' },
  { id: 'resin-1.67', name: '1.67 high-index resin', nd: 1.665, abbe: 32, source: 'one secondary source, about 1.665 (M)' },
  { id: 'resin-1.74', name: '1.74 high-index resin', nd: 1.735, abbe: 33, source: 'one secondary source, about 1.735 (M)' },
];

export function findMaterial(id: string): Material | undefined {
  const key = id.trim().toLowerCase();
  return MATERIALS.find((m) => m.id === key);
}

/** Fraunhofer lines, nm (d, F, C). */
export const LINES_NM = { d: 587.56, F: 486.13, C: 656.27 } as const;
