/**
 * Prism notation (docs/conventions.md, "Prism: sign, base labels and the 360° notation"):
 * components in the wearer frame (x towards the wearer's left, y up), base labels per eye, and
 * 360° base notation (ISO 8429: the angle of the base direction counter-clockwise from the
 * observer's right, seen facing the wearer).
 */

export type Eye = 'R' | 'L';

export interface PrismComponent<B extends string> {
  /** absolute amount, Δ */
  amount: number;
  base: B | null;
}

export interface PrismDescription {
  /** signed components, Δ */
  x: number;
  y: number;
  magnitude: number;
  /** base direction, degrees in [0, 360) */
  baseAngle: number;
  horizontal: PrismComponent<'in' | 'out'>;
  vertical: PrismComponent<'up' | 'down'>;
}

/** Components smaller than this are rounding noise and reported as exactly zero, Δ. */
export const ZERO_PRISM = 1e-10;

export function describePrism(px: number, py: number, eye: Eye): PrismDescription {
  const x = Math.abs(px) < ZERO_PRISM ? 0 : px;
  const y = Math.abs(py) < ZERO_PRISM ? 0 : py;
  const magnitude = Math.sqrt(x * x + y * y);
  let baseAngle = magnitude === 0 ? 0 : (Math.atan2(y, x) * 180) / Math.PI;
  if (baseAngle < 0) baseAngle += 360;
  if (baseAngle >= 360) baseAngle -= 360;
  // right eye: +x is nasal (base in); left eye: -x is nasal
  const nasal = eye === 'R' ? x > 0 : x < 0;
  return {
    x: x + 0, // no negative zero
    y: y + 0,
    magnitude,
    baseAngle,
    horizontal: { amount: Math.abs(x), base: x === 0 ? null : nasal ? 'in' : 'out' },
    vertical: { amount: Math.abs(y), base: y === 0 ? null : y > 0 ? 'up' : 'down' },
  };
}

/** Signed x component of a horizontal prism given as amount and base, for one eye. */
export function horizontalComponent(amount: number, base: 'in' | 'out', eye: Eye): number {
  const sign = (base === 'in') === (eye === 'R') ? 1 : -1;
  return sign * amount;
}

/**
 * The components in words: "0.32 Δ base out, 1.50 Δ base up"; a component that rounds to zero
 * at this many decimals is left out, and "no prism (under 0.005 Δ)" when both are.
 */
export function prismWords(p: PrismDescription, decimals = 2): string {
  const zero = (0).toFixed(decimals);
  const parts: string[] = [];
  const h = p.horizontal.amount.toFixed(decimals), v = p.vertical.amount.toFixed(decimals);
  if (p.horizontal.base && h !== zero) parts.push(`${h} Δ base ${p.horizontal.base}`);
  if (p.vertical.base && v !== zero) parts.push(`${v} Δ base ${p.vertical.base}`);
  return parts.length ? parts.join(', ') : `no prism (under ${(0.5 * 10 ** -decimals).toFixed(decimals + 1)} Δ)`;
}

/** Words for a prism with its eye: "1.25 Δ base in, 0.50 Δ base up (right eye)". */
export function prismInWords(p: PrismDescription, eye: Eye, decimals = 2): string {
  return `${prismWords(p, decimals)} (${eye === 'R' ? 'right' : 'left'} eye)`;
}

/** One prescribed prism as written on a prescription: an amount with a base word, or in 360° notation. */
export type PrismEntry =
  | { amount: number; base: 'in' | 'out' | 'up' | 'down' }
  | { amount: number; angle: number };

/**
 * The prescribed prism of one eye as signed wearer-frame components (Δ): the vector sum of
 * its entries (a horizontal and a vertical part, or one 360° entry). Base in is +x for the
 * right eye and -x for the left; up is +y; 360° angles are counter-clockwise from +x (ISO 8429).
 */
export function prescribedComponents(entries: readonly PrismEntry[], eye: Eye, out: { x: number; y: number }): void {
  let x = 0, y = 0;
  for (const e of entries) {
    if ('angle' in e) {
      const a = (e.angle * Math.PI) / 180;
      x += e.amount * Math.cos(a);
      y += e.amount * Math.sin(a);
    } else if (e.base === 'in' || e.base === 'out') {
      x += horizontalComponent(e.amount, e.base, eye);
    } else {
      y += e.base === 'up' ? e.amount : -e.amount;
    }
  }
  out.x = x;
  out.y = y;
}
