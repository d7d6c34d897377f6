/** `decentra trace`: the four answers at one visual point (docs/cli.md), through the library (src/cli/api.ts). */
import { existsSync } from 'node:fs';
import { InputError } from '../case/input.ts';
import { readEye } from '../case/lensCase.ts';
import { placementOf } from '../case/fit.ts';
import { loadCaseFile } from './fit.ts';
import { FLAGS, api, lensFlags } from './api.ts';
import { LENS_FLAGS, flagOf, parseArgs, rawFields, strayArgument } from './args.ts';
import { CAUTION, answersTable, fourAnswersJson, powerText, signed } from './format.ts';

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
  const f = rawFields(args);
  let lensOptions: Record<string, unknown> = lensFlags(args);
  const point: Record<string, unknown> = { x: args.values.get('x') ?? 0, y: args.values.get('y') ?? 0, cr: f.cr, eye: f.eye };
  let side: 'right' | 'left' | null = null;
  if (args.positional.length === 1) {
    // a case file gives the lens of one eye (--eye, default R), its fitting distance and its
    // placement; the visual point starts at that eye's mark and --x/--y move it
    const given = Object.keys(f).filter((k) => k !== 'eye');
    // with lens flags, a word that is no file is a stray, not a case file
    if (given.length && !existsSync(args.positional[0]!)) throw strayArgument(args.positional[0]!);
    if (given.length) throw new InputError(flagOf(given[0]!), 'comes from the case file; give only --eye, --x and --y with a case file');
    const c = loadCaseFile(args.positional[0]!);
    side = f.eye === undefined ? 'right' : readEye('--eye', f.eye) === 'R' ? 'right' : 'left';
    const eyeDoc = c.doc[side] as Record<string, unknown>;
    lensOptions = {};
    for (const k of Object.keys(eyeDoc)) if ((api.LENS_KEYS as readonly string[]).includes(k)) lensOptions[k] = eyeDoc[k];
    const pl = placementOf(c, side).spec;
    Object.assign(point, {
      from: 'mark', cr: c[side].crMm, eye: side === 'right' ? 'R' : 'L', ocX: pl.ocXMm, ocY: pl.ocYMm, panto: pl.pantoDeg, wrap: pl.wrapDeg,
    });
  }
  const lens = api.buildLens(FLAGS, lensOptions);
  const r = api.prismAt(FLAGS, lens, point);
  const { x, y } = r.point;
  const input = {
    sphere: lens.sphere, cyl: lens.cyl, axis: lens.axis, index: lens.index,
    ...(lens.material !== null ? { material: lens.material } : {}),
    front: lens.front, ct: lens.ct, frontK: lens.frontK, backK: lens.backK,
    ...(lens.diameter !== null ? { diameter: lens.diameter } : {}),
    x, y, cr: r.cr, eye: r.eye,
    ...(r.mark ? { mark: r.mark, placed: { ocX: point.ocX, ocY: point.ocY, panto: point.panto, wrap: point.wrap } } : {}),
  };
  if (args.switches.has('json')) return JSON.stringify(fourAnswersJson(r, input));

  const moved = r.mark ? { x: x - r.mark.x, y: y - r.mark.y } : null;
  const rx = `${signed(lens.sphere)} / ${signed(lens.cyl)} x ${lens.axis.toFixed(0)}`;
  const lines = [
    `${r.eye === 'R' ? 'Right' : 'Left'} eye, ${rx}; index ${lens.index.toFixed(3)}, front ${signed(lens.front)} D, ` +
      `back ${signed(lens.back[0])} / ${signed(lens.back[1])} D, centre ${lens.ct.toFixed(2)} mm, CR ${r.cr.toFixed(1)} mm`,
    `Visual point ${x.toFixed(2)} mm x, ${y.toFixed(2)} mm y from the optical centre ` +
      `(${Math.hypot(x, y).toFixed(2)} mm)` +
      (r.mark ? `, the ${side} eye's mark at (${r.mark.x.toFixed(2)}, ${r.mark.y.toFixed(2)}) mm` +
        (moved!.x || moved!.y ? ` moved by (${fmtOffset(moved!.x)}, ${fmtOffset(moved!.y)}) mm` : '') + '; the lens placed as the case places it' : ''),
    '',
    answersTable(r),
    '',
    r.prenticeError
      ? `Prentice error: ${signed(r.prenticeError.prism, 3)} Δ` +
        (r.prenticeError.percent === null ? '' : ` (${signed(r.prenticeError.percent, 1)} % of the exact value)`)
      : `Prentice error: not available (${'failure' in r.exact ? r.exact.message : ''})`,
    '',
    powerText(r),
    '',
    CAUTION,
  ];
  return lines.join('\n');
}

/** An offset as typed in mm, without the float noise of the sum it was taken from. */
function fmtOffset(v: number): string {
  return String(Math.round(v * 1e9) / 1e9);
}
