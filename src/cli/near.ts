/** `decentra near`: the visual point and the four answers for a target in front of one eye. */
import { InputError, inRange, readNumber } from '../case/input.ts';
import { LIMITS, readTraceCase } from '../case/lensCase.ts';
import { Placement, type TiltDrop, fourAnswersPlaced, solveFixation, tiltDropMm } from '../optics/index.ts';

const TILT_DROPS: readonly TiltDrop[] = ['none', 'rule-of-thumb', 'centre-of-rotation'];
import { LENS_FLAGS, flagOf, parseArgs, rawFields, strayArgument } from './args.ts';
import { CAUTION, answersTable, fourAnswersJson } from './format.ts';

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
  const opt = (flag: string, r: { min: number; max: number; unit: string }): number => {
    const v = args.values.get(flag);
    return v === undefined ? 0 : inRange(`--${flag}`, readNumber(`--${flag}`, v, r.unit === 'mm' ? 'length' : 'angle'), r);
  };
  const ocX = opt('oc-x', LIMITS.point), ocY = opt('oc-y', LIMITS.point);
  const panto = opt('panto', LIMITS.panto), wrap = opt('wrap', LIMITS.wrap);
  const dropRule = args.values.get('tilt-drop') ?? 'none';
  if (!TILT_DROPS.includes(dropRule as TiltDrop)) {
    throw new InputError('--tilt-drop', `must be one of ${TILT_DROPS.join(', ')}, got '${dropRule}'`);
  }
  const { tc, lens } = readTraceCase(rawFields(args), flagOf);
  const drop = tiltDropMm(dropRule as TiltDrop, panto, tc.crMm);
  const pl = new Placement({ ocXMm: ocX, ocYMm: ocY - drop, crDistanceMm: tc.crMm, pantoDeg: panto, wrapDeg: wrap, eye: tc.eye });
  const fix = solveFixation(lens, pl, { kind: 'point', x: tx, y: ty, z: tz });
  if (fix.status === 'target') throw new InputError('--at', fix.message);
  const input = {
    sphere: tc.lens.sphereD, cyl: tc.lens.cylD, axis: tc.lens.axisDeg, index: lens.index, front: lens.frontPowers[0],
    ct: lens.ctMm, frontK: tc.lens.frontConic, backK: tc.lens.backConic, cr: tc.crMm, eye: tc.eye,
    at: { x: tx, y: ty, z: tz }, ocX, ocY: ocY - drop, panto, wrap, tiltDropMm: drop,
  };
  if (fix.status !== 'ok') {
    if (args.switches.has('json')) return JSON.stringify({ visualPoint: null, eye: tc.eye, input, failure: fix.status, message: fix.message });
    return `No line of sight found: ${fix.message}.\n\n${CAUTION}`;
  }
  const r = fourAnswersPlaced(lens, pl, fix.cx, fix.cy, tc.eye);
  if (args.switches.has('json')) {
    return JSON.stringify({ visualPoint: { x: fix.cx, y: fix.cy }, ...fourAnswersJson(r, input), iterations: fix.iterations });
  }
  return [
    `Target (${tx}, ${ty}, ${tz}) mm from the centre of rotation; ${tc.eye === 'R' ? 'right' : 'left'} eye.`,
    `Visual point: ${fix.cx.toFixed(2)} mm x, ${fix.cy.toFixed(2)} mm y from the optical centre (found in ${fix.iterations} steps).`,
    '',
    answersTable(r, false),
    '',
    CAUTION,
  ].join('\n');
}
