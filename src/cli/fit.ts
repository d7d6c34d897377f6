/**
 * `decentra fit case.json`: a whole binocular case as three answers that are never mixed
 * (docs/binocular.md): at the marks, the standard's verdict, and what the eyes do at the target.
 */
import { powerCell, powerJson } from '../case/powerWords.ts';
import { type BinocularCase, writeCase } from '../case/caseFile.ts';
import type { FitReport } from '../case/fit.ts';
import {
  THREE_ANSWERS, demandWords, fixed, imbalanceWords, netHorizontalWords, offsetWords, prenticeVerdictWords, rotationWords,
  slabOffWords, targetWords, verdictLine,
} from '../case/fitWords.ts';
import { InputError } from '../case/input.ts';
import {
  type Answer, type EyeResult, type MarkEye, type SignedPair, type Verdict, isFailure, prismWords, ruleText,
} from '../optics/index.ts';
import { CASE_FIELDS, api } from './api.ts';
import { parseArgs } from './args.ts';
import { FIT_FLAGS_HELP, FIT_VALUE_FLAGS, caseFromFitFlags, hasFitFlags } from './fitFlags.ts';
import { CAUTION, answerJson, table } from './format.ts';
import { loadCaseFile } from './readFile.ts';

export const FIT_HELP = `decentra fit: a whole binocular case, from a case file or from flags, as three answers.

Usage: decentra fit CASE.json [--json]
       decentra fit --right-sphere D --left-sphere D --pd R,L [more flags below] [--json]

Reads a Decentra case file (docs/case-file.md): both prescriptions (with any prescribed
prism) and lens forms, PDs, optical-centre positions (direct or from the frame), tilt and
wrap, the target (distance, a near point, or a reading level) and the tolerance profile.
Prints three answers, each under its own heading (docs/binocular.md):

  1. At the marks: what the lab measures at each lens's centration point (Prentice with the
     nominal decentration, the focimeter, first-order and exact values, the prescribed prism)
     and the pair's net values per answer.
  2. The standard's verdict: the tolerance profile applied to the marks only (focimeter
     minus prescribed, or the centring error in mm above the profile's power thresholds).
  3. What the eyes do at the target: the solved visual points, each eye's rotation, the exact
     prism there with Prentice beside it, the binocular demand and clinical guidance.

Then the slab-off order (focimeter terms, at the reading level) and colour fringes (TCA).
--json prints one object; its keys are listed in docs/cli.md.

${FIT_FLAGS_HELP}`;

export { loadCaseFile };

const ZERO = 1e-10;

export function pairJson(p: SignedPair | null): object | null {
  if (!p) return null;
  const h = Math.abs(p.netHorizontal) < ZERO ? 0 : p.netHorizontal;
  const v = Math.abs(p.verticalImbalance) < ZERO ? 0 : p.verticalImbalance;
  return {
    netHorizontal: { amount: Math.abs(h), base: h === 0 ? null : h > 0 ? 'in' : 'out' },
    verticalImbalance: { amount: Math.abs(v), baseUpEye: v === 0 ? null : v > 0 ? 'R' : 'L' },
  };
}

function horizontalJson(p: SignedPair | null): object | null {
  if (!p) return null;
  const h = Math.abs(p.netHorizontal) < ZERO ? 0 : p.netHorizontal;
  return { amount: Math.abs(h), base: h === 0 ? null : h > 0 ? 'in' : 'out' };
}

function verticalJson(p: SignedPair | null): object | null {
  if (!p) return null;
  const v = Math.abs(p.verticalImbalance) < ZERO ? 0 : p.verticalImbalance;
  return { amount: Math.abs(v), baseUpEye: v === 0 ? null : v > 0 ? 'R' : 'L' };
}

function eyeJson(r: EyeResult): object {
  if (!r.answers) return { visualPoint: null, failure: r.fixation.status, message: r.fixation.message };
  return {
    visualPoint: { x: r.fromOcMm.x, y: r.fromOcMm.y },
    fromPupil: r.fromPupilMm,
    prentice: answerJson(r.answers.prentice),
    paraxial: answerJson(r.answers.paraxial),
    exact: { ...answerJson(r.answers.exact), power: powerJson(r.answers.power) },
    focimeter: answerJson(r.answers.focimeter),
    error: r.answers.error,
    rotationDeg: r.rotationDeg,
    rotationChangeDeg: r.rotationChangeDeg,
  };
}

function markJson(m: MarkEye): object {
  const a = m.answers;
  return {
    point: m.point,
    prentice: a ? answerJson(a.prentice) : null,
    firstOrder: a ? answerJson(a.paraxial) : null,
    exact: a ? { ...answerJson(a.exact), power: powerJson(a.power) } : null,
    focimeter: a ? answerJson(a.focimeter) : null,
    prescribed: m.prescribed ? answerJson(m.prescribed) : null,
    // where the optical centre must sit relative to the mark to produce the prescribed prism (lens frame, mm)
    decentrationForPrescribed: m.decentration,
  };
}

function verdictJson(v: Verdict): object {
  return { within: v.pass, value: v.value, allowed: v.limit, unit: v.unit === 'Δ' ? 'prism' : 'mm', rule: ruleText(v) };
}

export function fitJson(c: BinocularCase, f: FitReport): object {
  const n = f.marks.net;
  const so = f.slabOff.order;
  const vs = f.standard.verdicts;
  return {
    title: c.doc.title ?? null,
    target: c.doc.target,
    // what the eyes do at the target (kept from earlier versions)
    right: { ...eyeJson(f.result.right), tca: f.tca.right },
    left: { ...eyeJson(f.result.left), tca: f.tca.left },
    binocular: { exact: pairJson(f.result.exact), prentice: pairJson(f.result.prentice) },
    centration: f.centration,
    tolerance: {
      profile: f.profile.id, source: f.profile.source, judged: 'at the marks: focimeter minus prescribed',
      verdicts: f.standard.verdicts, prenticeVerdicts: f.standard.prenticeVerdicts,
    },
    marks: {
      right: markJson(f.marks.right),
      left: markJson(f.marks.left),
      net: {
        horizontal: { prentice: horizontalJson(n.prentice), focimeter: horizontalJson(n.focimeter), exact: horizontalJson(n.exact) },
        vertical: { prentice: verticalJson(n.prentice), focimeter: verticalJson(n.focimeter), exact: verticalJson(n.exact) },
      },
    },
    standard: {
      profile: f.profile.id,
      horizontal: vs ? verdictJson(vs[0]!) : null,
      vertical: vs ? verdictJson(vs[1]!) : null,
      residual: pairJson(f.standard.residual),
      centrationMm: f.standard.centration,
    },
    eyes: {
      demand: f.demand,
      guidance: f.guidance && { horizontal: f.guidance.horizontal.words, vertical: f.guidance.vertical.words },
    },
    slabOff: so
      ? { order: so.order, eye: so.eye, basis: so.basis, eyeImbalance: so.eyeImbalance, remaining: so.remaining, focimeterImbalance: so.focimeterImbalance, advice: so.advice, at: f.slabOff.at }
      : null,
  };
}

function cell(a: Answer | null | undefined): string {
  if (!a) return '-';
  if (isFailure(a)) return `no value: ${a.message}`;
  return prismWords(a);
}

function pairCells(p: SignedPair | null): string[] {
  return p ? [netHorizontalWords(p.netHorizontal), imbalanceWords(p.verticalImbalance)] : ['-', '-'];
}

/** Where the optical centre must sit, from the mark, for the prescribed prism. */
function ocFor(m: MarkEye, how: 'focimeter' | 'prentice'): string {
  if (!m.decentration) return '';
  const d = m.decentration[how];
  if (!d) return how === 'prentice' ? 'not possible (det F = 0)' : 'not found';
  return offsetWords(d.x, d.y, m.eye, 'the mark');
}

function indent(s: string, by = '  '): string {
  return s.split('\n').map((l) => (l ? by + l : l)).join('\n');
}

export function fitText(c: BinocularCase, f: FitReport): string {
  const m = f.marks;
  const markRow = (name: string, pick: (e: MarkEye) => Answer | null | undefined, pair: SignedPair | null): string[] =>
    [name, cell(pick(m.right)), cell(pick(m.left)), ...pairCells(pair)];
  const marksTable = table([
    ['', 'right eye', 'left eye', 'pair: net horizontal', 'vertical imbalance'],
    ['mark', m.right.point ? offsetWords(m.right.point.x, m.right.point.y, 'R', 'the OC') : 'none', m.left.point ? offsetWords(m.left.point.x, m.left.point.y, 'L', 'the OC') : 'none', '', ''],
    markRow("Prentice's rule", (e) => e.answers?.prentice, m.net.prentice),
    markRow('focimeter, exact', (e) => e.answers?.focimeter, m.net.focimeter),
    markRow('first-order, line of sight', (e) => e.answers?.paraxial, m.net.paraxial),
    markRow('exact, line of sight', (e) => e.answers?.exact, m.net.exact),
    ['  power there', m.right.answers ? powerCell(m.right.answers.power) : '', m.left.answers ? powerCell(m.left.answers.power) : '', '', ''],
    [
      'prescribed', m.right.prescribed ? prismWords(m.right.prescribed) : 'none', m.left.prescribed ? prismWords(m.left.prescribed) : 'none',
      ...(m.right.prescribed || m.left.prescribed ? pairCells(m.prescribedNet) : ['', '']),
    ],
    ...(m.right.decentration || m.left.decentration
      ? [
        ['  OC for it (focimeter)', ocFor(m.right, 'focimeter'), ocFor(m.left, 'focimeter'), '', ''],
        ["  OC for it (Prentice)", ocFor(m.right, 'prentice'), ocFor(m.left, 'prentice'), '', ''],
      ]
      : []),
  ]);

  const vs = f.standard.verdicts;
  const standard = vs ? vs.map((v) => verdictLine(v)) : ['no verdict: a lens has no reading at its mark, or its prism reference point cannot be found'];
  const pv = f.standard.prenticeVerdicts;
  if (vs && pv) {
    vs.forEach((v, i) => {
      const w = prenticeVerdictWords(v, pv[i]!);
      if (w) standard.push(w);
    });
  }

  const r = f.result;
  const eyeCol = (e: EyeResult): string[] => {
    if (!e.answers) return [`no line of sight: ${e.fixation.message}`, '', '', '', ''];
    const rotWords = rotationWords(e.rotationDeg, e.eye);
    return [offsetWords(e.fromOcMm.x, e.fromOcMm.y, e.eye, 'the OC'), rotWords, cell(e.answers.exact), cell(e.answers.prentice), powerCell(e.answers.power)];
  };
  const rc = eyeCol(r.right), lc = eyeCol(r.left);
  const eyesTable = table([
    ['', 'right eye', 'left eye'],
    ['visual point', rc[0]!, lc[0]!],
    ['eye rotation', rc[1]!, lc[1]!],
    ['exact prism there', rc[2]!, lc[2]!],
    ["Prentice's rule there", rc[3]!, lc[3]!],
    ['power there (vertex sphere)', rc[4]!, lc[4]!],
  ]);
  const pairTable = table([
    ['the pair at the target', 'net horizontal', 'vertical imbalance'],
    ['exact', ...pairCells(r.exact)],
    ["Prentice's rule", ...pairCells(r.prentice)],
  ]);
  const demand = f.demand ? demandWords(f.demand, Boolean(m.right.prescribed || m.left.prescribed)) : null;
  const q = (s: string) => indent(wrap(s, 94));

  const lines = [
    c.doc.title ? c.doc.title : 'Decentra case',
    `Target: ${targetWords(c)}. Tolerance profile: ${f.profile.name}.`,
    '',
    `1. ${THREE_ANSWERS.marks.heading}`,
    q(THREE_ANSWERS.marks.question),
    '',
    indent(marksTable),
    '',
    `2. ${THREE_ANSWERS.standard.heading}`,
    q(THREE_ANSWERS.standard.question),
    '',
    ...standard.map((l) => q(l)),
    `  source: ${f.profile.source}`,
    '',
    `3. ${THREE_ANSWERS.eyes.heading}: ${targetWords(c)}`,
    q(THREE_ANSWERS.eyes.question),
    '',
    indent(eyesTable),
    '',
    indent(pairTable),
    '',
    ...(demand && f.guidance
      ? [
        `  Horizontal demand: ${demand.horizontal}.`,
        q(`Guidance: ${f.guidance.horizontal.words}`),
        `  Vertical demand: ${demand.vertical}.`,
        q(`Guidance: ${f.guidance.vertical.words}`),
      ]
      : ['  Demand: not available (an eye has no exact line of sight).']),
    '',
    wrap(slabOffWords(f.slabOff), 96),
    ...(f.tca.right || f.tca.left
      ? [`Colour fringes (TCA, exact F-C) at the visual points: right ${fixed(f.tca.right?.exactDelta ?? null)} Δ, left ${fixed(f.tca.left?.exactDelta ?? null)} Δ.`]
      : []),
    '',
    wrap(CAUTION, 96),
  ];
  return lines.join('\n');
}

/** Wrap text at word boundaries. */
function wrap(s: string, width: number): string {
  const out: string[] = [];
  let line = '';
  for (const w of s.split(' ')) {
    if (line && line.length + 1 + w.length > width) { out.push(line); line = w; } else line = line ? `${line} ${w}` : w;
  }
  if (line) out.push(line);
  return out.join('\n');
}

export function runFit(argv: readonly string[]): string {
  const args = parseArgs(argv, { values: FIT_VALUE_FLAGS, switches: ['json', 'help', 'print-case'] });
  if (args.switches.has('help')) return FIT_HELP;
  const quick = hasFitFlags(args);
  if (quick && args.positional.length) {
    throw new InputError(`'${args.positional[0]!}'`, 'give a case file or the case as flags, not both (see fit --help)');
  }
  if (!quick && args.positional.length !== 1) {
    throw new InputError('CASE.json', 'give exactly one case file, or the case as flags (--right-sphere, --left-sphere, --pd R,L, ...; see fit --help)');
  }
  if (!quick && args.switches.has('print-case')) throw new InputError('--print-case', 'prints the case made from flags; with a case file, the file is the case');
  const c = quick ? caseFromFitFlags(args) : loadCaseFile(args.positional[0]!);
  if (args.switches.has('print-case')) return writeCase(c.doc).trimEnd();
  const f = api.evaluateCase(CASE_FIELDS, c);
  if (args.switches.has('json')) return JSON.stringify(fitJson(c, f));
  return fitText(c, f);
}
