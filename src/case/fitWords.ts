/**
 * The three binocular answers in words (docs/binocular.md), one wording for the command line,
 * the app and the clinician summary: each heading says which question its numbers answer.
 * Numbers are finite or shown as a dash, never NaN or Infinity. Signs: net horizontal > 0
 * base in; vertical imbalance right minus left > 0 the right eye base up (docs/conventions.md).
 */
import { type Demand, SLAB_OFF_RULE, type Verdict, ruleText } from '../optics/index.ts';
import type { BinocularCase } from './caseFile.ts';
import type { FitReport, SlabOffReport } from './fit.ts';
import { DASH, fixed } from './numberText.ts';

export { DASH, fixed };

/** The three answers: a heading and the question each answers. */
export const THREE_ANSWERS = {
  marks: {
    heading: 'At the marks: what the lab measures',
    question:
      'The prism each lens has at its centration point (the pupil mark, placed by the fitting height), as a ' +
      'focimeter reads it with the lens on its support, by Prentice’s rule with the nominal decentration, and as ' +
      'the eye gets it looking straight ahead.',
  },
  standard: {
    heading: 'The standard’s verdict: were the lenses made and centred within tolerance?',
    question:
      'Judges making and centring only: the focimeter reading at the marks minus the prescribed prism (or, above ' +
      'the standard’s power threshold, the centring error in mm). It says nothing about the prism a correctly made ' +
      'pair induces when the eyes look elsewhere.',
  },
  eyes: {
    heading: 'What the eyes do at the target',
    question:
      'Where each eye looks through its lens for this target, the prism there, and what the pair asks of the eyes. ' +
      'Clinical guidance, not a pass or fail: the clinician decides.',
  },
} as const;

/** The target in words. */
export function targetWords(c: BinocularCase): string {
  const t = c.doc.target;
  if (t.kind === 'distance') return 'distance, straight ahead';
  if (t.kind === 'level') {
    const inset = t.inset ?? 0;
    return `reading level ${fixed(t.below, 1)} mm below the distance marks` +
      (fixed(inset, 1) === '0.0' ? ', no inset' : `, ${fixed(Math.abs(inset), 1)} mm ${inset > 0 ? 'inset (towards the nose)' : 'outset (away from the nose)'}`);
  }
  const below = t.below ?? 0, lateral = t.lateral ?? 0;
  const parts = [`near point ${fixed(t.distance, 0)} mm in front of the centres of rotation`];
  if (fixed(below, 0) !== '0') parts.push(`${fixed(Math.abs(below), 0)} mm ${below > 0 ? 'below' : 'above'} them`);
  if (fixed(lateral, 0) !== '0') parts.push(`${fixed(Math.abs(lateral), 0)} mm to the wearer's ${lateral > 0 ? 'left' : 'right'}`);
  return parts.join(', ');
}

/** "5.70 Δ base in" (net horizontal, > 0 base in). */
export function netHorizontalWords(h: number): string {
  return fixed(Math.abs(h)) === '0.00' ? 'none (under 0.005 Δ)' : `${fixed(Math.abs(h))} Δ base ${h > 0 ? 'in' : 'out'}`;
}

/** "3.50 Δ, left eye base up" (right minus left, > 0 right eye base up). */
export function imbalanceWords(v: number): string {
  return fixed(Math.abs(v)) === '0.00' ? 'none (under 0.005 Δ)' : `${fixed(Math.abs(v))} Δ, ${v > 0 ? 'right' : 'left'} eye base up`;
}

/** What a verdict measured: "net horizontal prism at the marks minus prescribed" or the centring error. */
export function judgedWords(v: Verdict): string {
  if (v.rule === 'mm') {
    return v.component === 'horizontal'
      ? 'centring: distance between the prism reference points minus the PD'
      : 'centring: difference in prism-reference-point heights';
  }
  return v.component === 'horizontal' ? 'net horizontal prism at the marks, minus prescribed' : 'vertical imbalance at the marks, minus prescribed';
}

/** "horizontal: within tolerance (0.52 Δ of 0.67 Δ allowed; rule: 0.67 Δ total for the pair (powers up to 2.75 D))". */
export function verdictLine(v: Verdict): string {
  const unit = v.unit;
  return `${v.component}: ${v.pass ? 'within tolerance' : 'OUT OF TOLERANCE'} (${judgedWords(v)}: ${fixed(v.value)} ${unit} of ` +
    `${fixed(v.limit)} ${unit} allowed; the standard's row: ${ruleText(v)}; the larger lens power in this meridian is ${fixed(v.powerD)} D)`;
}

/**
 * The demand in a clinician's words. `withPrescribed`: the case prescribes prism, so the demand
 * is what the lenses ask beyond it.
 */
export function demandWords(d: Demand, withPrescribed = false): { horizontal: string; vertical: string } {
  const h = d.horizontal, v = d.vertical;
  const than = withPrescribed ? 'than the prescribed prism asks' : 'than without these lenses';
  return {
    horizontal: !h.asks || fixed(h.amount) === '0.00'
      ? 'no change of vergence (under 0.005 Δ)'
      : `${fixed(h.amount)} Δ base ${h.base}: the eyes must ${h.asks} ${fixed(h.amount)} Δ more ${than}`,
    vertical: !v.baseUpEye || fixed(v.amount) === '0.00'
      ? 'no vertical imbalance (under 0.005 Δ)'
      : `${fixed(v.amount)} Δ, ${v.baseUpEye === 'R' ? 'right' : 'left'} eye base up: the ${v.baseUpEye === 'R' ? 'right' : 'left'} eye must look up relative to the other` +
        (withPrescribed ? ', beyond the prescribed prism' : ''),
  };
}

const SLAB_AT: Record<SlabOffReport['at'], string> = {
  level: 'at the case’s reading level',
  near: 'at the near target’s visual points',
  'default-level': 'at a reading level 10 mm below the distance marks (the usual assumption; the case’s target is at distance)',
};

/** The slab-off order in one sentence, in focimeter terms with the eye's figure beside it. */
export function slabOffWords(s: SlabOffReport): string {
  const o = s.order;
  if (!o) return 'Slab-off: not assessed (an eye has no value at the reading points).';
  const where = SLAB_AT[s.at];
  const foc = `focimeter imbalance ${fixed(o.focimeterImbalance)} Δ ${where}; the eyes feel ${fixed(o.eyeImbalance)} Δ there`;
  if (o.advice === 'not indicated') return `Slab-off: not indicated (${foc}; considered from ${fixed(SLAB_OFF_RULE.fromDelta)} Δ).`;
  const lens = o.eye === 'R' ? 'right' : 'left';
  return `Slab-off: order ${fixed(o.order)} Δ base up on the ${lens} lens, to be verified with a focimeter (${foc}; ` +
    `${fixed(o.remaining)} Δ would remain at the eyes)` + (o.advice === 'beyond the usual range' ? `. This is beyond the usual range of about ${SLAB_OFF_RULE.upToDelta} Δ.` : '.');
}

/** Words for the standard's verdict as a whole. */
export function standardSummary(f: FitReport): string {
  const vs = f.standard.verdicts;
  if (!vs) return `${f.profile.name}: no verdict (a lens has no reading at its mark, or its prism reference point cannot be found).`;
  const bad = vs.filter((v) => !v.pass);
  return bad.length === 0
    ? `${f.profile.name}: within tolerance horizontally and vertically, as made and centred.`
    : `${f.profile.name}: OUT OF TOLERANCE ${bad.map((v) => `${v.component}ly (${fixed(v.value)} ${v.unit}; ${fixed(v.limit)} ${v.unit} allowed)`).join(' and ')}.`;
}

/**
 * Where a lens point lies from a reference point, per eye (x towards the wearer's left: nasal
 * for the right eye): "10.00 mm below and 2.21 mm nasal"; '' when both round to zero. With
 * `of`: "10.00 mm below the OC", "3.00 mm nasal of the OC", "at the OC".
 */
export function offsetWords(x: number, y: number, eye: 'R' | 'L', of?: string, decimals = 2): string {
  const nasal = eye === 'R' ? x : -x;
  const zero = fixed(0, decimals);
  const parts: string[] = [];
  if (fixed(Math.abs(y), decimals) !== zero) parts.push(`${fixed(Math.abs(y), decimals)} mm ${y > 0 ? 'above' : 'below'}`);
  if (fixed(Math.abs(x), decimals) !== zero) parts.push(`${fixed(Math.abs(x), decimals)} mm ${nasal > 0 ? 'nasal' : 'temporal'}`);
  const w = parts.join(' and ');
  if (of === undefined) return w;
  if (!w) return `at ${of}`;
  // "2.00 mm below the OC", "3.00 mm nasal of the OC"
  return parts.length === 1 && (w.endsWith('above') || w.endsWith('below')) ? `${w} ${of}` : `${w} of ${of}`;
}

/**
 * An eye's rotation (or a change of it), degrees, + horizontal towards the wearer's left:
 * "20.7° down, 1.3° outwards"; `none` when both round to zero.
 */
export function rotationWords(rot: { horizontal: number; vertical: number }, eye: 'R' | 'L', none = 'straight ahead', decimals = 1): string {
  const zero = fixed(0, decimals);
  const parts: string[] = [];
  if (fixed(Math.abs(rot.vertical), decimals) !== zero) parts.push(`${fixed(Math.abs(rot.vertical), decimals)}° ${rot.vertical > 0 ? 'up' : 'down'}`);
  const inwards = eye === 'R' ? rot.horizontal : -rot.horizontal;
  if (fixed(Math.abs(rot.horizontal), decimals) !== zero) parts.push(`${fixed(Math.abs(rot.horizontal), decimals)}° ${inwards > 0 ? 'inwards' : 'outwards'}`);
  return parts.length ? parts.join(', ') : none;
}

/** Said where Prentice's hand value at the marks would judge a component differently. */
export function prenticeVerdictWords(v: Verdict, prentice: Verdict): string | null {
  if (v.rule !== 'prism' || prentice.pass === v.pass) return null;
  return `Prentice’s hand value at the marks, ${fixed(prentice.value)} Δ, would be ${prentice.pass ? 'within' : 'outside'} ` +
    `tolerance ${v.component === 'horizontal' ? 'horizontally' : 'vertically'}: a different verdict from the focimeter’s.`;
}

/** Guidance is never a verdict. */
export const GUIDANCE_NOT_VERDICT = 'Guidance, not a pass or fail: the clinician decides.';
