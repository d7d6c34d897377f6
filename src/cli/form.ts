/**
 * `decentra form`: the best forms of a spherical lens by the exact trace (docs/method.md,
 * "Best forms"): the true front powers free of astigmatic error (point-focal) and of mean
 * error at an eye rotation, for a distant target and for a near one.
 */
import { inRange, readNumber } from '../case/input.ts';
import { bestFronts } from '../case/bestForm.ts';
import { DEFAULTS, LIMITS, readLensForm } from '../case/lensCase.ts';
import { fixed } from '../case/numberText.ts';
import type { FormQuery } from '../optics/index.ts';
import { flagOf, parseArgs, rawFields, strayArgument } from './args.ts';
import { CAUTION, table } from './format.ts';

const DEFAULT_NEAR_MM = DEFAULTS.formNearMm;
const DEFAULT_ROTATION_DEG = DEFAULTS.formRotationDeg;

export const FORM_HELP = `decentra form: the front curves that keep a spherical lens free of oblique errors.

Usage: decentra form --sphere D [--index n | --material ID] [--ct mm] [--cr mm]
                     [--rotation deg] [--near mm] [--json]

For the lens power and material, searches the true front power (0 to +25 D, exact trace) at
which the pencil reaching the eye turned by --rotation has
  no astigmatic error (a point-focal form), and
  no mean error,
for a distant target and for a target --near mm away (from the vertex sphere, along the line
of sight). Where two forms exist the flatter is given first.

  --sphere D      back vertex power (spherical lenses only)
  --index n | --material ID   as for decentra trace (default resin-1.50)
  --ct mm         centre thickness, kept for every front (default: the thickness rule of
                  decentra trace, 65 mm, 1.0 mm edge, 2.0 mm centre, solved with each front)
  --cr mm         back vertex to the eye's centre of rotation (default 27)
  --rotation deg  eye rotation, above 0 and at most 60 (default ${DEFAULT_ROTATION_DEG})
  --near mm       the near target's distance, 100 to 2000 (default ${DEFAULT_NEAR_MM}, a common
                  reading distance)
  --json          {"input", "distance": {"pointFocal", "zeroMean", "pointFocalCt",
                  "zeroMeanCt"}, "near": {...}}: lists of true front powers in D, flattest
                  first (empty: none in 0 to +25 D), and the centre thickness in mm
`;

const FORM_FLAGS = {
  values: ['sphere', 'index', 'material', 'ct', 'diameter', 'min-edge', 'min-ct', 'cr', 'rotation', 'near'],
  switches: ['json', 'help'],
};

export function runForm(argv: readonly string[]): string {
  const args = parseArgs(argv, FORM_FLAGS);
  if (args.switches.has('help')) return FORM_HELP;
  if (args.positional.length) throw strayArgument(args.positional[0]!);
  const form = readLensForm(rawFields(args), flagOf);
  const num = (flag: string, def: number, r: { min: number; max: number; unit: string }): number => {
    const v = args.values.get(flag);
    return v === undefined ? def : inRange(`--${flag}`, readNumber(`--${flag}`, v, r.unit === 'mm' ? 'length' : 'angle'), r);
  };
  const crMm = num('cr', 27, LIMITS.cr);
  const rotationDeg = num('rotation', DEFAULT_ROTATION_DEG, LIMITS.formRotation);
  const nearMm = num('near', DEFAULT_NEAR_MM, LIMITS.formNear);
  const fixedCt = form.thickness.kind === 'centre';
  // each form with the centre thickness it is made with (a thickness rule follows the front)
  const find = (near: number | null, goal: FormQuery['goal']) => bestFronts(form, flagOf, { crMm, rotationDeg, nearMm: near, goal });
  const pair = (near: number | null) => {
    const pf = find(near, 'astigmatism'), zm = find(near, 'mean');
    return { pointFocal: pf.fronts, pointFocalCt: pf.ctMm, zeroMean: zm.fronts, zeroMeanCt: zm.ctMm };
  };
  const distance = pair(null);
  const near = { distanceMm: nearMm, ...pair(nearMm) };
  const input = { sphere: form.sphereD, index: form.index, ...(fixedCt ? { ct: distance.pointFocalCt } : {}), cr: crMm, rotation: rotationDeg, near: nearMm };
  if (args.switches.has('json')) return JSON.stringify({ input, distance, near });
  const cell = (fronts: number[], ct: number): string =>
    fronts.length === 0 ? 'none in 0 to +25 D'
      : fronts.map((f, i) => (i === 0 ? `+${fixed(f)} D` : `(also +${fixed(f)} D)`)).join(' ') + (fixedCt ? '' : `, ct ${fixed(ct)} mm`);
  const sign = form.sphereD > 0 ? '+' : '';
  const thickness = fixedCt ? `centre thickness ${fixed(distance.pointFocalCt)} mm` : 'centre thickness by the thickness rule (ct: for the flatter form)';
  return [
    `Best forms of a ${sign}${fixed(form.sphereD)} D spherical lens, index ${fixed(form.index, 3)}, ${thickness}, ` +
      `centre of rotation ${fixed(crMm, 1)} mm, eye turned ${fixed(rotationDeg, 1)}° (exact trace):`,
    '',
    table([
      ['front curve (true power) for', 'distant target', `target at ${fixed(nearMm, 0)} mm`],
      ['no astigmatic error (point-focal)', cell(distance.pointFocal, distance.pointFocalCt), cell(near.pointFocal, near.pointFocalCt)],
      ['no mean error', cell(distance.zeroMean, distance.zeroMeanCt), cell(near.zeroMean, near.zeroMeanCt)],
    ]),
    '',
    'Errors are judged at the vertex sphere against the prescription (and, at near, the target\'s vergence); see docs/method.md.',
    CAUTION,
  ].join('\n');
}
