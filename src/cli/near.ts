/** `decentra near`: the visual point and the four answers for a target in front of one eye, through the library (src/cli/api.ts). */
import { InputError, readNumber } from '../case/input.ts';
import { FLAGS, api, lensFlags } from './api.ts';
import { LENS_FLAGS, parseArgs, strayArgument } from './args.ts';
import { CAUTION, answersTable, fourAnswersJson, powerText } from './format.ts';

export const NEAR_HELP = `decentra near: where the eye looks through the lens at a target, and the prism there.

Usage: decentra near --sphere D --at X,Y,Z [lens flags] [--json]

  --at X,Y,Z      the target in mm, wearer frame with the eye's centre of rotation at the
                  origin: x towards the wearer's left, y up, z forwards (e.g. 0,-40,400 for a
                  page 40 cm ahead and 4 cm below)
  --oc-x mm --oc-y mm   optical centre relative to the eye's straight-ahead line (default 0)
  --panto deg     pantoscopic tilt, lower edge towards the face, -20 to 30 (default 0)
  --wrap deg      wrap (face form), temporal edge towards the face, -10 to 35 (default 0)
  --tilt-drop none|rule-of-thumb|centre-of-rotation
                  lower the optical centre for the tilt: 1 mm per 2° (common practice), or
                  s·tan(tilt) so that the optical axis passes through the centre of rotation
                  (default none); tilt first, then wrap (docs/conventions.md)
Lens flags as for decentra trace (see decentra trace --help); --x and --y are not used: the
visual point is solved with the exact trace (2-D Newton from the straight line to the target).

JSON: {"visualPoint": {"x", "y"} (mm from the optical centre, lens frame), "eye", "input",
"prentice", "paraxial", "exact", "focimeter", "error", "iterations"}; if no line of sight
reaches the target: {"visualPoint": null, "failure", "message"} (exit status 0).
`;

const NEAR_FLAGS = {
  values: [...Object.keys(LENS_FLAGS), 'at', 'oc-x', 'oc-y', 'panto', 'wrap', 'tilt-drop'],
  switches: ['json', 'help'],
};

export function readPoint(flag: string, raw: string | undefined): [number, number, number] {
  if (raw === undefined) throw new InputError(flag, 'is required, as X,Y,Z in mm');
  const parts = raw.split(',');
  if (parts.length !== 3) throw new InputError(flag, `must be X,Y,Z in mm, got '${raw}'`);
  return parts.map((p) => readNumber(flag, p, 'length')) as [number, number, number];
}

export function runNear(argv: readonly string[]): string {
  const args = parseArgs(argv, NEAR_FLAGS);
  if (args.switches.has('help')) return NEAR_HELP;
  if (args.positional.length) throw strayArgument(args.positional[0]!);
  const [tx, ty, tz] = readPoint('--at', args.values.get('at'));
  const lens = api.buildLens(FLAGS, lensFlags(args));
  const v = args.values;
  const n = api.near(FLAGS, lens, {
    at: { x: tx, y: ty, z: tz }, cr: v.get('cr'), eye: v.get('eye'), ocX: v.get('oc-x'), ocY: v.get('oc-y'),
    panto: v.get('panto'), wrap: v.get('wrap'), tiltDrop: v.get('tilt-drop'),
  });
  const p = n.placed;
  const input = {
    sphere: lens.sphere, cyl: lens.cyl, axis: lens.axis, index: lens.index, front: lens.front,
    ct: lens.ct, frontK: lens.frontK, backK: lens.backK, cr: p.cr, eye: p.eye,
    at: n.target, ocX: p.ocX, ocY: p.ocY, panto: p.panto, wrap: p.wrap, tiltDropMm: p.tiltDrop,
  };
  if (n.status !== 'ok') {
    if (args.switches.has('json')) return JSON.stringify({ visualPoint: null, eye: p.eye, input, failure: n.status, message: n.message });
    return `No line of sight found: ${n.message}.\n\n${CAUTION}`;
  }
  if (args.switches.has('json')) {
    return JSON.stringify({ visualPoint: n.visualPoint, ...fourAnswersJson(n.answers, input), iterations: n.iterations });
  }
  return [
    `Target (${tx}, ${ty}, ${tz}) mm from the centre of rotation; ${p.eye === 'R' ? 'right' : 'left'} eye.`,
    `Visual point: ${n.visualPoint.x.toFixed(2)} mm x, ${n.visualPoint.y.toFixed(2)} mm y from the optical centre (found in ${n.iterations} steps).`,
    '',
    answersTable(n.answers, false),
    '',
    powerText(n.answers),
    '',
    CAUTION,
  ].join('\n');
}
