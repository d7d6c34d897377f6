/**
 * Typed access to the general-purpose minimiser library fmin (Nelder-Mead and friends,
 * B. Frederickson, BSD-3). Two quirks of fmin 0.0.4 are handled here, in one place:
 * - its package entry is a UMD bundle inside a "type": "module" package, so under ESM it
 *   exports nothing and instead sets `globalThis.fmin`;
 * - its Nelder-Mead shrink step assigns an undeclared loop variable `i` in strict mode,
 *   which throws a ReferenceError unless a global `i` exists; we provide one.
 */
import 'fmin';

export interface NelderMeadOptions {
  maxIterations?: number;
  /** stop when both the value spread and the simplex size fall below this (fmin uses it for both) */
  minErrorDelta?: number;
  /** initial simplex step for a zero coordinate */
  zeroDelta?: number;
  /** initial simplex scale for a non-zero coordinate */
  nonZeroDelta?: number;
}

interface Fmin {
  nelderMead(f: (x: number[]) => number, x0: number[], p?: NelderMeadOptions): { x: number[]; fx: number };
  bisect(f: (x: number) => number, a: number, b: number, p?: { maxIterations?: number; tolerance?: number }): number;
}

const g = globalThis as unknown as { fmin?: Fmin; i?: number };
if (!g.fmin) throw new Error('fmin did not load (expected its UMD bundle to set globalThis.fmin)');
if (g.i === undefined) g.i = 0;

export const fmin: Fmin = g.fmin;

/** Nelder-Mead restarted from its own result until it stops improving (a common safeguard). */
export function minimise(f: (x: number[]) => number, x0: number[], p: NelderMeadOptions = {}): { x: number[]; fx: number } {
  let best = fmin.nelderMead(f, x0.slice(), p);
  for (let k = 0; k < 8; k++) {
    const next = fmin.nelderMead(f, best.x.slice(), p);
    if (!(next.fx < best.fx)) break;
    best = next;
  }
  return { x: Array.from(best.x), fx: best.fx };
}
