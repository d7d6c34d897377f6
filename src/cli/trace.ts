/** `decentra trace`: the four answers at one visual point (DESIGN §9). */
import { InputError } from '../case/input.ts';
import { readEye, readTraceCase } from '../case/lensCase.ts';
import { loadCaseFile } from './fit.ts';
import { fourAnswers, isFailure } from '../optics/index.ts';
import { LENS_FLAGS, flagOf, parseArgs, rawFields } from './args.ts';
import { CAUTION, answersTable, fourAnswersJson, signed } from './format.ts';

export const TRACE_HELP = `decentra trace: prism at one visual point of a thick lens, four ways.

Usage: decentra trace --sphere D [options] [--json]
       decentra trace CASE.json [--eye R|L] [--x mm --y mm] [--json]   (lens from a case file)

The lens is untilted and the centre of rotation lies on its optical axis. Lengths are in mm
(a value may carry a unit: "0.25cm"), powers in dioptres, angles in degrees.

Prescription
  --sphere D          sphere power (required)
  --cyl D             cylinder power, either sign (default 0)
  --axis deg          cylinder axis, 0-180 (default 0)
  --eye R|L           which eye, for base in/out (default R)
Lens form
  --index n           refractive index, or
  --material NAME     a material by generic name (default resin-1.50; see decentra materials)
  --abbe V            Abbe number, for colour fringes (default: the material's)
  --front D           true front surface power in the lens material, or
  --base D            nominal front curve at --tool-index (default 1.53), or
  --front-rule RULE   vogel (default) or steps:POWER=FRONT,... (front chosen per power)
  --ct mm             centre thickness, or derive it from the rule:
  --min-edge mm       thinnest edge allowed (default 1.0)
  --min-ct mm         thinnest centre allowed (default 2.0)
  --diameter mm       lens diameter (default 65 with the rule; none with --ct)
  --front-k k         front conic constant (default 0, a sphere)
  --back-k k          back conic constant (default 0)
  --cyl-on back|front surface carrying the cylinder (default back)
  --toric tyre|barrel toric formation (default tyre)
Fitting and line of sight
  --cr mm             back vertex to centre of rotation (default 27)
  --x mm  --y mm      visual point relative to the optical centre, wearer frame:
                      x towards the wearer's left, y up (default 0)
Output
  --json              one JSON object (DESIGN §9 contract) instead of the table
  --help              this text
`;

const TRACE_FLAGS = { values: [...Object.keys(LENS_FLAGS), 'x', 'y'], switches: ['json', 'help'] };


export function runTrace(argv: readonly string[]): string {
  const args = parseArgs(argv, TRACE_FLAGS);
  if (args.switches.has('help')) return TRACE_HELP;
  if (args.positional.length > 1) throw new InputError(args.positional[1]!, 'unexpected argument (flags start with --)');
  let f = rawFields(args);
  if (args.positional.length === 1) {
    // a case file gives the lens of one eye (--eye, default R) and its fitting distance
    const given = Object.keys(f).filter((k) => k !== 'eye');
    if (given.length) throw new InputError(flagOf(given[0]!), 'comes from the case file; give only --eye, --x and --y with a case file');
    const c = loadCaseFile(args.positional[0]!);
    const side = f.eye === undefined ? 'right' : readEye('--eye', f.eye) === 'R' ? 'right' : 'left';
    const eyeDoc = c.doc[side] as Record<string, unknown>;
    f = { eye: side === 'right' ? 'R' : 'L', cr: c[side].crMm };
    for (const k of Object.values(LENS_FLAGS)) if (k !== 'eye' && k !== 'cr' && eyeDoc[k] !== undefined) f[k] = eyeDoc[k];
  }
  f.x = args.values.get('x');
  f.y = args.values.get('y');
  const { tc, lens } = readTraceCase(f, flagOf);
  const r = fourAnswers(lens, tc.crMm, tc.xMm, tc.yMm, tc.eye);
  const input = {
    sphere: tc.lens.sphereD, cyl: tc.lens.cylD, axis: tc.lens.axisDeg, index: lens.index,
    ...(tc.lens.materialId ? { material: tc.lens.materialId } : {}),
    front: lens.frontPowers[0], ct: lens.ctMm, frontK: tc.lens.frontConic, backK: tc.lens.backConic,
    ...(Number.isFinite(lens.radiusMm) ? { diameter: 2 * lens.radiusMm } : {}),
    x: tc.xMm, y: tc.yMm, cr: tc.crMm, eye: tc.eye,
  };
  if (args.switches.has('json')) return JSON.stringify(fourAnswersJson(r, input));

  const rx = `${signed(tc.lens.sphereD)} / ${signed(tc.lens.cylD)} x ${tc.lens.axisDeg.toFixed(0)}`;
  const lines = [
    `${tc.eye === 'R' ? 'Right' : 'Left'} eye, ${rx}; index ${lens.index.toFixed(3)}, front ${signed(lens.frontPowers[0])} D, ` +
      `back ${signed(lens.backPowers[0])} / ${signed(lens.backPowers[1])} D, centre ${lens.ctMm.toFixed(2)} mm, CR ${tc.crMm.toFixed(1)} mm`,
    `Visual point ${tc.xMm.toFixed(2)} mm x, ${tc.yMm.toFixed(2)} mm y from the optical centre ` +
      `(${Math.hypot(tc.xMm, tc.yMm).toFixed(2)} mm)`,
    '',
    answersTable(r),
    '',
    r.error
      ? `Prentice error: ${signed(r.error.prism, 3)} Δ` +
        (r.error.percent === null ? '' : ` (${signed(r.error.percent, 1)} % of the exact value)`)
      : `Prentice error: not available (${isFailure(r.exact) ? r.exact.message : ''})`,
    '',
    CAUTION,
  ];
  return lines.join('\n');
}
