/**
 * What the eyes must do at the target, in a clinician's words, and clinical guidance on it.
 *
 * Guidance, never pass/fail: the published figures are population averages and the clinician
 * decides (docs/binocular.md, "What the eyes do at the target").
 * - Vertical fusional amplitudes about 2.5-3 Δ (Ogle K.N., Prangen A. de H., AMA Archives of
 *   Ophthalmology, 1953).
 * - Many wearers cannot tolerate more than about 1 Δ of vertical imbalance for long (common
 *   practice, no source).
 * - Horizontal fusional reserves, break values (Morgan M.W., American Journal of Optometry,
 *   1944, "Morgan's expected findings", as tabulated in Scheiman M., Wick B., Clinical
 *   Management of Binocular Vision): distance base in 7 ± 3 Δ; near base in 21 ± 4 Δ; near
 *   base out 21 ± 6 Δ; distance base out 19 ± 8 Δ (this last from memory).
 * - Sheard's criterion (Sheard C., 1930): a fusional reserve at least twice the demand it must
 *   meet is usually comfortable; applied here to the demand the lenses add, by analogy.
 */
import type { SignedPair } from './binocular.ts';

export interface Demand {
  /** the net horizontal prism beyond the prescribed, and the change of vergence it asks for */
  horizontal: { amount: number; base: 'in' | 'out' | null; asks: 'converge' | 'diverge' | null };
  /** the vertical imbalance beyond the prescribed, and which eye is base up (that eye must look up) */
  vertical: { amount: number; baseUpEye: 'R' | 'L' | null };
}

/** Below this a demand is reported as none, Δ (rounding noise of the traces). */
const ZERO = 1e-10;

/**
 * The binocular demand: the pair's prism at the eyes minus the prescribed prism. Base in asks
 * the eyes to diverge (relative to looking at the target without the lenses), base out to
 * converge; with the right eye base up, the right eye must turn up relative to the left.
 */
export function binocularDemand(atEyes: SignedPair, prescribed: SignedPair): Demand {
  const h = atEyes.netHorizontal - prescribed.netHorizontal;
  const v = atEyes.verticalImbalance - prescribed.verticalImbalance;
  const hz = Math.abs(h) < ZERO, vz = Math.abs(v) < ZERO;
  return {
    horizontal: { amount: hz ? 0 : Math.abs(h), base: hz ? null : h > 0 ? 'in' : 'out', asks: hz ? null : h > 0 ? 'diverge' : 'converge' },
    vertical: { amount: vz ? 0 : Math.abs(v), baseUpEye: vz ? null : v > 0 ? 'R' : 'L' },
  };
}

export const GUIDANCE_SOURCES = {
  vertical: 'vertical fusional amplitudes about 2.5-3 Δ (Ogle and Prangen, 1953); many wearers tolerate about 1 Δ for long (common practice)',
  horizontal: "Morgan's expected findings (Morgan, 1944; in Scheiman and Wick); Sheard's criterion (Sheard, 1930), by analogy",
} as const;

/** Average fusional break values (mean, standard deviation), Δ; see the module header. */
export const FUSIONAL_BREAKS = {
  distance: { baseIn: { mean: 7, sd: 3 }, baseOut: { mean: 19, sd: 8 } },
  near: { baseIn: { mean: 21, sd: 4 }, baseOut: { mean: 21, sd: 6 } },
} as const;

export interface Guidance {
  band: 'none' | 'small' | 'moderate' | 'large';
  words: string;
}

function f2(v: number): string {
  return v.toFixed(2);
}

/** Guidance on a vertical imbalance the eyes must fuse. */
export function verticalGuidance(d: Demand['vertical']): Guidance {
  const a = d.amount;
  if (f2(a) === '0.00') return { band: 'none', words: 'No vertical imbalance to fuse (under 0.005 Δ).' };
  const who = d.baseUpEye === 'R' ? 'right' : 'left';
  const head = `${f2(a)} Δ of vertical imbalance: the ${who} eye must turn up relative to the other.`;
  if (a < 1) return { band: 'small', words: `${head} Below about 1 Δ, which many wearers tolerate.` };
  if (a < 2.5) {
    return {
      band: 'moderate',
      words: `${head} More than the about 1 Δ many wearers tolerate for long, within typical vertical fusional amplitudes (about 2.5-3 Δ, Ogle and Prangen 1953); some wearers will notice it.`,
    };
  }
  return {
    band: 'large',
    words: `${head} At or beyond typical vertical fusional amplitudes (about 2.5-3 Δ, Ogle and Prangen 1953): many wearers cannot fuse it comfortably, or at all.`,
  };
}

/** Guidance on a change of vergence, at distance or at near. */
export function horizontalGuidance(d: Demand['horizontal'], near: boolean): Guidance {
  const a = d.amount;
  if (f2(a) === '0.00' || !d.asks) return { band: 'none', words: 'No change of vergence (under 0.005 Δ).' };
  const where = near ? 'near' : 'distance';
  const reserve = d.asks === 'diverge' ? FUSIONAL_BREAKS[where].baseIn : FUSIONAL_BREAKS[where].baseOut;
  const kind = d.asks === 'diverge' ? 'base-in (divergence)' : 'base-out (convergence)';
  const head = `The lenses ask the eyes to ${d.asks} by ${f2(a)} Δ.`;
  const ref = `The average ${where} ${kind} break is ${reserve.mean} ± ${reserve.sd} Δ (Morgan 1944)`;
  if (a <= reserve.mean / 2) {
    return { band: 'small', words: `${head} ${ref}; this is within half of it, which many wearers manage (Sheard's criterion, by analogy).` };
  }
  if (a <= reserve.mean) {
    return { band: 'moderate', words: `${head} ${ref}; this is more than half of it: some wearers will find it tiring.` };
  }
  return { band: 'large', words: `${head} ${ref}; this is beyond it: many wearers cannot fuse it.` };
}
