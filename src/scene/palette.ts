/**
 * Decentra's own colours for the scene, the cross-section and the plots (one place, so the
 * three views always agree on which colour is which answer).
 */
export const COLORS = {
  background: 0x16202a,
  glass: 0xa9d8ee,
  glassInvalid: 0xe0686b,
  rim: 0x7fc4e0,
  eye: 0xe9e4da,
  iris: 0x4d6b7d,
  cr: 0xf2f2f2,
  axis: 0x8593a3,
  ruler: 0x9aa8b6,
  exact: 0xffb547,
  prentice: 0xf06bb0,
  paraxial: 0x5cd3e6,
  focimeter: 0x9be27a,
  undeviated: 0x8a96a3,
  visualPoint: 0xffe9a8,
  oc: 0xd6f0ff,
} as const;

export function css(hex: number): string {
  return `#${hex.toString(16).padStart(6, '0')}`;
}
