/** `decentra trace`: the four answers at one visual point (docs/cli.md). */
import { existsSync } from 'node:fs';
import { InputError } from '../case/input.ts';
import { readEye, readTraceCase } from '../case/lensCase.ts';
import { loadCaseFile } from './fit.ts';
import { type FourAnswers, Placement, centrationPoint, fourAnswers, fourAnswersPlaced, isFailure } from '../optics/index.ts';
import { placementOf } from '../case/fit.ts';
import { LENS_FLAGS, flagOf, parseArgs, rawFields, strayArgument } from './args.ts';
import { CAUTION, answersTable, fourAnswersJson, signed } from './format.ts';

export const TRACE_HELP = `decentra trace: prism at one visual point of a thick lens, four ways.

Usage: decentra trace --sphere D [options] [--json]
       decentra trace CASE.json [--eye R|L] [--x mm --y mm] [--json]   (lens from a case file)

With a case file the lens is that eye's (default R), placed as the case places it (optical
centre, tilt, wrap), and the visual point starts at the eye's mark, where its straight-ahead
line meets the lens; --x and --y move it from there.

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
  --json              one JSON object (the contract in docs/cli.md) instead of the table
  --help              this text
`;

const TRACE_FLAGS = { values: [...Object.keys(LENS_FLAGS), 'x', 'y'], switches: ['json', 'help'] };


export function runTrace(argv: readonly string[]): string {
  const args = parseArgs(argv, TRACE_FLAGS);
  if (args.switches.has('help')) return TRACE_HELP;
  if (args.positional.length > 1) throw strayArgument(args.positional[1]!);
  let f = rawFields(args);
  let fromCase: { placement: Placement; side: 'right' | 'left' } | null = null;
  if (args.positional.length === 1) {
    // a case file gives the lens of one eye (--eye, default R), its fitting distance and its
    // placement; the visual point starts at that eye's mark and --x/--y move it
    const given = Object.keys(f).filter((k) => k !== 'eye');
    // with lens flags, a word that is no file is a stray, not a case file
    if (given.length && !existsSync(args.positional[0]!)) throw strayArgument(args.positional[0]!);
    if (given.length) throw new InputError(flagOf(given[0]!), 'comes from the case file; give only --eye, --x and --y with a case file');
    const c = loadCaseFile(args.positional[0]!);
    const side = f.eye === undefined ? 'right' : readEye('--eye', f.eye) === 'R' ? 'right' : 'left';
    const eyeDoc = c.doc[side] as Record<string, unknown>;
    f = { eye: side === 'right' ? 'R' : 'L', cr: c[side].crMm };
    for (const k of Object.values(LENS_FLAGS)) if (k !== 'eye' && k !== 'cr' && eyeDoc[k] !== undefined) f[k] = eyeDoc[k];
    fromCase = { placement: placementOf(c, side), side };
  }
  f.x = args.values.get('x');
  f.y = args.values.get('y');
  const { tc, lens } = readTraceCase(f, flagOf);
  let x = tc.xMm, y = tc.yMm;
  let mark: { x: number; y: number } | null = null;
  let r: FourAnswers;
  if (fromCase) {
    const m = centrationPoint(lens, fromCase.placement);
    if (!m) throw new InputError('--eye', `the ${fromCase.side} eye's straight-ahead line misses its lens, so it has no mark`);
    mark = m.lens;
    x += m.lens.x; y += m.lens.y;
    if (Math.hypot(x, y) > lens.radiusMm) {
      throw new InputError(Math.abs(tc.xMm) >= Math.abs(tc.yMm) ? '--x' : '--y',
        `moves the visual point to (${fmt2(x)}, ${fmt2(y)}) mm from the optical centre, outside the ${fmt2(2 * lens.radiusMm)} mm lens`);
    }
    r = fourAnswersPlaced(lens, fromCase.placement, x, y, tc.eye);
  } else {
    r = fourAnswers(lens, tc.crMm, x, y, tc.eye);
  }
  const input = {
    sphere: tc.lens.sphereD, cyl: tc.lens.cylD, axis: tc.lens.axisDeg, index: lens.index,
    ...(tc.lens.materialId ? { material: tc.lens.materialId } : {}),
    front: lens.frontPowers[0], ct: lens.ctMm, frontK: tc.lens.frontConic, backK: tc.lens.backConic,
    ...(Number.isFinite(lens.radiusMm) ? { diameter: 2 * lens.radiusMm } : {}),
    x, y, cr: tc.crMm, eye: tc.eye,
    ...(mark ? { mark, placed: { ocX: fromCase!.placement.spec.ocXMm, ocY: fromCase!.placement.spec.ocYMm, panto: fromCase!.placement.spec.pantoDeg, wrap: fromCase!.placement.spec.wrapDeg } } : {}),
  };
  if (args.switches.has('json')) return JSON.stringify(fourAnswersJson(r, input));

  const rx = `${signed(tc.lens.sphereD)} / ${signed(tc.lens.cylD)} x ${tc.lens.axisDeg.toFixed(0)}`;
  const lines = [
    `${tc.eye === 'R' ? 'Right' : 'Left'} eye, ${rx}; index ${lens.index.toFixed(3)}, front ${signed(lens.frontPowers[0])} D, ` +
      `back ${signed(lens.backPowers[0])} / ${signed(lens.backPowers[1])} D, centre ${lens.ctMm.toFixed(2)} mm, CR ${tc.crMm.toFixed(1)} mm`,
    `Visual point ${x.toFixed(2)} mm x, ${y.toFixed(2)} mm y from the optical centre ` +
      `(${Math.hypot(x, y).toFixed(2)} mm)` +
      (mark ? `, the ${fromCase!.side} eye's mark at (${mark.x.toFixed(2)}, ${mark.y.toFixed(2)}) mm` +
        (tc.xMm || tc.yMm ? ` moved by (${tc.xMm}, ${tc.yMm}) mm` : '') + '; the lens placed as the case places it' : ''),
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

function fmt2(v: number): string {
  return v.toFixed(2);
}
