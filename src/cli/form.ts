/**
 * `decentra form`: the best forms of a spherical lens by the exact trace (docs/method.md,
 * "Best forms"): the true front powers free of astigmatic error (point-focal) and of mean
 * error at an eye rotation, for a distant target and for a near one.
 */
import { InputError, inRange, readNumber } from '../case/input.ts';
import { DEFAULTS, LIMITS, buildLens, readLensForm } from '../case/lensCase.ts';
import { fixed } from '../case/numberText.ts';
import { type FormQuery, formFronts } from '../optics/index.ts';
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
                  decentra trace at the Vogel front: 65 mm, 1.0 mm edge, 2.0 mm centre)
  --cr mm         back vertex to the eye's centre of rotation (default 27)
  --rotation deg  eye rotation, above 0 and at most 60 (default ${DEFAULT_ROTATION_DEG})
  --near mm       the near target's distance, 100 to 2000 (default ${DEFAULT_NEAR_MM}, a common
                  reading distance)
  --json          {"input", "distance": {"pointFocal", "zeroMean"}, "near": {...}}: lists of
                  true front powers in D, flattest first (empty: none in 0 to +25 D)
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
  const ctMm = buildLens(form, flagOf).ctMm;
  const num = (flag: string, def: number, r: { min: number; max: number; unit: string }): number => {
    const v = args.values.get(flag);
    return v === undefined ? def : inRange(`--${flag}`, readNumber(`--${flag}`, v, r.unit === 'mm' ? 'length' : 'angle'), r);
  };
  const crMm = num('cr', 27, LIMITS.cr);
  const rotationDeg = num('rotation', DEFAULT_ROTATION_DEG, LIMITS.formRotation);
  const nearMm = num('near', DEFAULT_NEAR_MM, LIMITS.formNear);
  if (!(ctMm > 0)) throw new InputError('--ct', 'must be above 0 mm');
  const base = { sphereD: form.sphereD, index: form.index, ctMm, crMm, rotationDeg };
  const find = (near: number | null, goal: FormQuery['goal']): number[] => formFronts({ ...base, nearMm: near, goal });
  const distance = { pointFocal: find(null, 'astigmatism'), zeroMean: find(null, 'mean') };
  const near = { distanceMm: nearMm, pointFocal: find(nearMm, 'astigmatism'), zeroMean: find(nearMm, 'mean') };
  const input = { sphere: form.sphereD, index: form.index, ct: ctMm, cr: crMm, rotation: rotationDeg, near: nearMm };
  if (args.switches.has('json')) return JSON.stringify({ input, distance, near });
  const cell = (fronts: number[]): string =>
    fronts.length === 0 ? 'none in 0 to +25 D' : fronts.map((f, i) => (i === 0 ? `+${fixed(f)} D` : `(also +${fixed(f)} D)`)).join(' ');
  const sign = form.sphereD > 0 ? '+' : '';
  return [
    `Best forms of a ${sign}${fixed(form.sphereD)} D spherical lens, index ${fixed(form.index, 3)}, centre thickness ` +
      `${fixed(ctMm)} mm, centre of rotation ${fixed(crMm, 1)} mm, eye turned ${fixed(rotationDeg, 1)}° (exact trace):`,
    '',
    table([
      ['front curve (true power) for', 'distant target', `target at ${fixed(nearMm, 0)} mm`],
      ['no astigmatic error (point-focal)', cell(distance.pointFocal), cell(near.pointFocal)],
      ['no mean error', cell(distance.zeroMean), cell(near.zeroMean)],
    ]),
    '',
    'Errors are judged at the vertex sphere against the prescription (and, at near, the target\'s vergence); see docs/method.md.',
    CAUTION,
  ].join('\n');
}
