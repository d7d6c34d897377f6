/**
 * A 2-D Newton search on a traced quantity: find the point (x, y) at which f(x, y) equals a
 * target (tx, ty), with a forward-difference Jacobian. Used where a prism must be placed on a
 * lens: the decentration for a prism at the eye (limits.ts) and the point where a focimeter
 * reads a prism (marks.ts). Not on the per-ray path: a search costs a few dozen traces.
 */

export type Newton2Status = 'ok' | 'trace' | 'singular' | 'no-convergence';

export interface Newton2Result {
  x: number;
  y: number;
  status: Newton2Status;
}

export interface Newton2Options {
  /** stop when |f - target| is below this */
  tolerance?: number;
  maxIterations?: number;
  /** finite-difference step */
  step?: number;
  /** with a singular Jacobian (a meridian without power), correct each coordinate that has a
   *  derivative instead of giving up */
  byMeridian?: boolean;
}

/**
 * `f` writes f(x, y) into `out` and returns false where its trace fails ('trace'). Starts at
 * (x0, y0).
 */
export function newton2(
  f: (x: number, y: number, out: { x: number; y: number }) => boolean, tx: number, ty: number, x0: number, y0: number,
  opts: Newton2Options = {},
): Newton2Result {
  const tol = opts.tolerance ?? 1e-11, h = opts.step ?? 1e-5, maxIt = opts.maxIterations ?? 60;
  const v = { x: 0, y: 0 };
  let x = x0, y = y0;
  for (let it = 0; it < maxIt; it++) {
    if (!f(x, y, v)) return { x, y, status: 'trace' };
    const fx = v.x - tx, fy = v.y - ty;
    if (Math.hypot(fx, fy) < tol) return { x, y, status: 'ok' };
    if (!f(x + h, y, v)) return { x, y, status: 'trace' };
    const j11 = (v.x - tx - fx) / h, j21 = (v.y - ty - fy) / h;
    if (!f(x, y + h, v)) return { x, y, status: 'trace' };
    const j12 = (v.x - tx - fx) / h, j22 = (v.y - ty - fy) / h;
    const d = j11 * j22 - j12 * j21;
    if (Math.abs(d) > 1e-12) {
      x -= (j22 * fx - j12 * fy) / d;
      y -= (-j21 * fx + j11 * fy) / d;
      continue;
    }
    const hasX = Math.abs(j11) > 1e-9, hasY = Math.abs(j22) > 1e-9;
    if (!opts.byMeridian || (!hasX && !hasY)) return { x, y, status: 'singular' };
    if (hasX) x -= fx / j11;
    if (hasY) y -= fy / j22;
  }
  return { x, y, status: 'no-convergence' };
}
