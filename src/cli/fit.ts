/** `decentra fit case.json`: a whole binocular case, both eyes, verdicts. */
import { readFileSync } from 'node:fs';
import { type BinocularCase, CaseError, readCaseBytes } from '../case/caseFile.ts';
import { type FitReport, evaluateFit } from '../case/fit.ts';
import { InputError } from '../case/input.ts';
import { type EyeResult, type SignedPair, type Verdict, isFailure } from '../optics/index.ts';
import { parseArgs } from './args.ts';
import { CAUTION, answerCells, answerJson, table } from './format.ts';

export const FIT_HELP = `decentra fit: a whole binocular case from a case file.

Usage: decentra fit CASE.json [--json]

Reads a Decentra case file (docs/case-file.md): both prescriptions and lens forms, PDs,
optical-centre positions (direct or from the frame), tilt and wrap, the target (distance or
near) and the tolerance profile. Solves each eye's line of sight to the target exactly and
prints each eye's prism, the net horizontal prism, the vertical imbalance, the tolerance
verdicts, slab-off advice and colour fringes (TCA).
`;

export function loadCaseFile(path: string): BinocularCase {
  let bytes: Uint8Array;
  try {
    bytes = readFileSync(path);
  } catch (e) {
    throw new InputError(path, `cannot be read (${(e as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  try {
    return readCaseBytes(bytes);
  } catch (e) {
    if (e instanceof CaseError) throw new InputError(`${path}: ${e.field}`, e.reason);
    throw e;
  }
}

export function pairJson(p: SignedPair | null): object | null {
  if (!p) return null;
  const h = Math.abs(p.netHorizontal) < 1e-10 ? 0 : p.netHorizontal;
  const v = Math.abs(p.verticalImbalance) < 1e-10 ? 0 : p.verticalImbalance;
  return {
    netHorizontal: { amount: Math.abs(h), base: h === 0 ? null : h > 0 ? 'in' : 'out' },
    verticalImbalance: { amount: Math.abs(v), baseUpEye: v === 0 ? null : v > 0 ? 'R' : 'L' },
  };
}

function eyeJson(r: EyeResult): object {
  if (!r.answers) return { visualPoint: null, failure: r.fixation.status, message: r.fixation.message };
  return {
    visualPoint: { x: r.fromOcMm.x, y: r.fromOcMm.y },
    fromPupil: r.fromPupilMm,
    prentice: answerJson(r.answers.prentice),
    paraxial: answerJson(r.answers.paraxial),
    exact: answerJson(r.answers.exact),
    focimeter: answerJson(r.answers.focimeter),
    error: r.answers.error,
    rotationChangeDeg: r.rotationChangeDeg,
  };
}

export function fitJson(c: BinocularCase, f: FitReport): object {
  return {
    title: c.doc.title ?? null,
    target: c.doc.target,
    right: { ...eyeJson(f.result.right), tca: f.tca.right },
    left: { ...eyeJson(f.result.left), tca: f.tca.left },
    binocular: { exact: pairJson(f.result.exact), prentice: pairJson(f.result.prentice) },
    centration: f.centration,
    tolerance: { profile: f.profile.id, source: f.profile.source, verdicts: f.verdicts, prenticeVerdicts: f.prenticeVerdicts },
    slabOff: f.slabOff,
  };
}

function pairText(p: SignedPair | null): string[] {
  if (!p) return ['-', '-'];
  const h = p.netHorizontal, v = p.verticalImbalance;
  return [
    Math.abs(h) < 0.005 ? 'none' : `${Math.abs(h).toFixed(2)} Δ base ${h > 0 ? 'in' : 'out'}`,
    Math.abs(v) < 0.005 ? 'none' : `${Math.abs(v).toFixed(2)} Δ, ${v > 0 ? 'right' : 'left'} eye base up`,
  ];
}

function verdictText(v: Verdict): string {
  const what = v.rule === 'prism' ? `${v.value.toFixed(2)} Δ of ${v.limit} Δ allowed` : `${v.value.toFixed(2)} mm of ${v.limit} mm allowed (centration rule above ${v.powerD.toFixed(2)} D)`;
  return `${v.component}: ${v.pass ? 'within tolerance' : 'OUT OF TOLERANCE'} (${what})`;
}

export function runFit(argv: readonly string[]): string {
  const args = parseArgs(argv, { values: [], switches: ['json', 'help'] });
  if (args.switches.has('help')) return FIT_HELP;
  if (args.positional.length !== 1) throw new InputError('CASE.json', 'give exactly one case file');
  const c = loadCaseFile(args.positional[0]!);
  const f = evaluateFit(c);
  if (args.switches.has('json')) return JSON.stringify(fitJson(c, f));
  const eyeRows = (name: string, r: EyeResult): string[][] => {
    if (!r.answers) return [[name, `no line of sight: ${r.fixation.message}`]];
    const a = r.answers;
    return [
      [`${name}: visual point ${r.fromOcMm.x.toFixed(2)}, ${r.fromOcMm.y.toFixed(2)} mm from the OC`, '', '', ''],
      ["  Prentice's rule", ...answerCells(a.prentice, 2)],
      ['  exact, line of sight', ...answerCells(a.exact, 2)],
      ['  focimeter, exact', ...answerCells(a.focimeter, 2)],
    ];
  };
  const t = c.doc.target;
  const lines = [
    c.doc.title ? c.doc.title : 'Decentra case',
    t.kind === 'distance' ? 'Target: distance, straight ahead' : `Target: near, ${t.distance} mm ahead, ${t.below ?? 0} mm below, ${t.lateral ?? 0} mm to the left`,
    '',
    table([['', 'horizontal', 'vertical', 'resultant'], ...eyeRows('Right eye', f.result.right), ...eyeRows('Left eye', f.result.left)]),
    '',
    table([
      ['binocular', 'net horizontal', 'vertical imbalance'],
      ['exact', ...pairText(f.result.exact)],
      ["Prentice's rule", ...pairText(f.result.prentice)],
    ]),
    '',
    `Tolerance: ${f.profile.name}`,
    ...(f.verdicts ? f.verdicts.map((v) => `  ${verdictText(v)}`) : ['  no verdict: an eye has no exact answer']),
    f.slabOff && f.slabOff.advice !== 'not indicated'
      ? `Slab-off: ${f.slabOff.advice}; ${f.slabOff.amountDelta.toFixed(2)} Δ base up on the ${f.slabOff.eye === 'R' ? 'right' : 'left'} lens`
      : '',
    '',
    CAUTION,
  ];
  if (f.result.right.answers && isFailure(f.result.right.answers.exact)) lines.push('Right eye: no exact answer.');
  return lines.filter((l, i, all) => !(l === '' && all[i - 1] === '')).join('\n');
}
