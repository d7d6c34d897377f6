/**
 * The power at the visual point (docs/method.md, "Power at the visual point") in words and in
 * the JSON shape of docs/cli.md: one wording for the command line, the app and the clinician
 * summary. Numbers are finite or a dash, never NaN or Infinity.
 */
import type { PowerAnswer } from '../optics/index.ts';

/** A power, or why there is none (the engine's and the library's shapes alike). */
type PowerValues = Omit<PowerAnswer, 'geometry'>;
type PowerOr = PowerValues | { failure: string; message: string };
type TraceFailure = { failure: string; message: string };
import { fixed } from './numberText.ts';

/** The question the power answers, for headings and labels at one visual point. */
export const POWER_QUESTION = 'What power the eye gets here (the pencil along the line of sight, at the vertex sphere)';
/** The same question for a pair of eyes at their visual points (the summary, `fit`). */
export const POWER_QUESTION_EYES = 'What power each eye gets at its visual point (along its line of sight, at the vertex sphere)';
/** Its short label, for the printed summary. */
export const POWER_AT_EYES = 'Power at the visual points (vertex sphere, against the prescription)';

export function isPowerFailure(p: PowerOr): p is TraceFailure {
  return 'failure' in p;
}

/** The docs/cli.md `power` object, or the failure. */
export function powerJson(p: PowerOr): object {
  if (isPowerFailure(p)) return { failure: p.failure === 'edge' ? 'geometry' : p.failure, message: p.message };
  return {
    matrix: p.matrix, sphere: p.sphere, cyl: p.cyl, axis: p.axis,
    meanError: p.meanError, astigmaticError: p.astigmaticError, demand: p.demand,
    ...(p.tangential === undefined ? {} : { tangential: p.tangential, sagittal: p.sagittal }),
  };
}

/** A signed dioptre value, e.g. "+3.79 D". */
function dioptres(v: number, decimals = 2): string {
  const s = fixed(v, decimals);
  return s.startsWith('-') || s === fixed(0, decimals) ? `${s} D` : `+${s} D`;
}

/** The vergence as a sphero-cylinder, e.g. "+3.79 / -0.12 x 90", or "+3.79 DS" when the cylinder rounds to 0. */
export function spheroCylText(p: PowerValues, decimals = 2): string {
  const cyl = fixed(p.cyl, decimals);
  const sphere = dioptres(p.sphere, decimals).slice(0, -2);
  if (cyl === fixed(0, decimals)) return `${sphere} DS`;
  return `${sphere} / ${cyl.startsWith('-') ? cyl : `+${cyl}`} x ${fixed(p.axis, 0)}`;
}

/** One line for tables and panels: the vergence, then the two errors. */
export function powerLine(p: PowerOr, decimals = 2): string {
  if (isPowerFailure(p)) return `no answer: ${p.message}`;
  const ts = p.tangential === undefined ? '' : `; tangential ${dioptres(p.tangential, decimals)}, sagittal ${dioptres(p.sagittal!, decimals)}`;
  return `${spheroCylText(p, decimals)}; mean error ${dioptres(p.meanError, decimals)}, astigmatic error ${fixed(p.astigmaticError, decimals)} D${ts}`;
}

/** A table cell: the vergence and both errors, e.g. "+7.96 / -0.10 x 155 (mean -0.09, astigmatic 0.10 D)". */
export function powerCell(p: PowerOr, decimals = 2): string {
  if (isPowerFailure(p)) return `no answer: ${p.message}`;
  return `${spheroCylText(p, decimals)} (mean ${dioptres(p.meanError, decimals).slice(0, -2)}, astigmatic ${fixed(p.astigmaticError, decimals)} D)`;
}

/** The demand line, where a near target set one. */
export function demandLine(p: PowerOr): string | null {
  if (isPowerFailure(p) || p.demand === 0) return null;
  return `The target's vergence at the vertex sphere (${dioptres(p.demand)}) is allowed for: the errors are against the prescription plus it.`;
}

/** The errors in brief, e.g. "0.03 D more minus on average, 0.07 D unwanted cylinder" (against the prescription;
 *  a near target's vergence at the vertex sphere is allowed for: docs/method.md). */
export function powerBrief(p: PowerOr): string {
  if (isPowerFailure(p)) return `none (${p.message})`;
  const m = p.meanError;
  const mean = fixed(Math.abs(m)) === fixed(0) ? 'the prescribed mean power' : `${fixed(Math.abs(m))} D ${m > 0 ? 'more plus' : 'more minus'} on average`;
  const astig = fixed(p.astigmaticError) === fixed(0) ? 'no unwanted cylinder' : `${fixed(p.astigmaticError)} D unwanted cylinder`;
  return `${mean}, ${astig}`;
}

/**
 * The clinician's sentence: what the eye gets compared with the prescription, in plain words,
 * e.g. "The right eye gets 0.21 D more minus than prescribed on average, and 0.35 D of
 * unwanted cylinder."
 */
export function powerPlainWords(p: PowerOr, eyeName: string): string {
  if (isPowerFailure(p)) return `No power could be found for the ${eyeName} eye: ${p.message}.`;
  const m = p.meanError;
  const mean = fixed(Math.abs(m)) === fixed(0)
    ? 'the prescribed mean power'
    : `${fixed(Math.abs(m))} D ${m > 0 ? 'more plus' : 'more minus'} than prescribed on average`;
  const astig = fixed(p.astigmaticError) === fixed(0) ? 'no unwanted cylinder' : `${fixed(p.astigmaticError)} D of unwanted cylinder`;
  return `The ${eyeName} eye gets ${mean}, and ${astig}.`;
}
