/**
 * `decentra fit` without a file: the common case given as flags, built into a case document
 * (docs/case-file.md) and validated whole by readCase, so that it is exactly the case a file
 * with the same fields would be. The flags are the case file's field names in kebab-case,
 * with `right-` or `left-` for an eye's fields; a pair flag (`--pd R,L`) gives both eyes at
 * once. An error names the flag the value came from, never the case file's path.
 */
import { type BinocularCase, CASE_FORMAT, CASE_VERSION, readCase } from '../case/caseFile.ts';
import { InputError, type Quantity, readNumber } from '../case/input.ts';
import type { ParsedArgs } from './args.ts';

type Side = 'right' | 'left';
const SIDES: readonly Side[] = ['right', 'left'];

/** Per-eye number fields: case-file key, flag stem, quantity. */
const EYE_NUMBERS: readonly [key: string, flag: string, q: Quantity][] = [
  ['sphere', 'sphere', 'power'],
  ['cyl', 'cyl', 'power'],
  ['axis', 'axis', 'angle'],
  ['add', 'add', 'power'],
  ['pd', 'pd', 'length'],
  ['decentration', 'decentration', 'length'],
  ['fittingHeight', 'fitting-height', 'length'],
  ['ocHeight', 'oc-height', 'length'],
  ['ct', 'ct', 'length'],
  ['front', 'front', 'power'],
  ['index', 'index', 'plain'],
];

/** Fields that can also be given for both eyes at once: `--pd R,L`, `--fitting-height 20` or `20,21`. */
const PAIR_FLAGS: readonly string[] = ['pd', 'decentration', 'fitting-height', 'oc-height', 'material'];

/** Every value flag of the quick fit (the `fit` command adds `--json`, `--print-case`, `--help`). */
export const FIT_VALUE_FLAGS: readonly string[] = [
  ...SIDES.flatMap((s) => [...EYE_NUMBERS.map(([, f]) => `${s}-${f}`), `${s}-material`, `${s}-oc`, `${s}-prism`]),
  ...PAIR_FLAGS,
  'frame', 'target', 'tolerance', 'panto', 'wrap', 'title',
];

export const FIT_FLAGS_HELP = `Quick fit without a file: give the case as flags (the case file's field names,
docs/case-file.md; "right-"/"left-" for one eye). Units: D, mm, degrees, Δ.

  --right-sphere D --left-sphere D       required
  --right-cyl D --right-axis DEG         and --left-cyl, --left-axis (either cylinder sign)
  --right-add D                          kept in the case (not used by the trace)
  --pd R,L                               monocular PDs, e.g. --pd 32,31.5 (required), or
                                         --right-pd MM --left-pd MM
  --frame A,B,DBL                        boxed frame, e.g. --frame 52,40,18
  --decentration MM|R,L                  optical centres inwards from the boxed centres (needs
                                         --frame; default 0); or --right-decentration MM ...
  --fitting-height MM|R,L                pupil height above the lower box line (needs --frame;
                                         default B/2); or --right-fitting-height MM ...
  --oc-height MM|R,L                     optical-centre height above the lower box line
                                         (default the fitting height)
  --right-oc X,Y                         or the optical centre from the pupil directly, mm
                                         (x towards the wearer's left, y up); --left-oc X,Y
  --right-prism 2:in,1:up                prescribed prism, AMOUNT:BASE (in, out, up, down)
  --material NAME|R,L                    a material name (decentra materials); or --right-material,
                                         --right-index N; --right-ct MM, --right-front D
  --target distance                      default; or near:DIST,BELOW[,LATERAL] (mm from the
                                         centres of rotation) or level:BELOW[,INSET] (mm on the lenses)
  --tolerance ansi-z80.1                 or iso-21987, or custom:H,V (Δ)
  --panto DEG --wrap DEG                 pantoscopic tilt and wrap
  --title TEXT                           shown above the answers
  --print-case                           print the case file these flags make, instead of the answers

Example (an invented scenario):
  decentra fit --right-sphere -4.25 --right-cyl -0.75 --right-axis 10 --left-sphere -3.50 \\
    --pd 31,31.5 --frame 50,36,19 --decentration 1.5 --fitting-height 18 --target near:400,120
`;

/** True when any quick-fit flag was given. */
export function hasFitFlags(args: ParsedArgs): boolean {
  return FIT_VALUE_FLAGS.some((f) => args.values.has(f));
}

/** "a,b" split into exactly `n` parts (trimmed, none empty), or an error naming the flag. */
function parts(flag: string, text: string, n: readonly number[], form: string): string[] {
  const p = text.split(',').map((s) => s.trim());
  if (!n.includes(p.length) || p.some((s) => s === '')) throw new InputError(flag, `must be ${form}, got '${text}'`);
  return p;
}

/** One prescribed-prism entry list from "2:in,1:up". */
function prismList(flag: string, text: string): object[] {
  return text.split(',').map((entry) => {
    const m = /^\s*([^:]+):\s*([a-z]+)\s*$/i.exec(entry);
    if (!m) throw new InputError(flag, `must be AMOUNT:BASE entries such as 2:in,1:up, got '${text}'`);
    const base = m[2]!.toLowerCase();
    if (!['in', 'out', 'up', 'down'].includes(base)) throw new InputError(flag, `base must be in, out, up or down, got '${m[2]!}'`);
    return { amount: readNumber(flag, m[1]!, 'prism'), base };
  });
}

function target(flag: string, text: string): object {
  const t = text.trim();
  const [kind, rest] = t.includes(':') ? [t.slice(0, t.indexOf(':')), t.slice(t.indexOf(':') + 1)] : [t, ''];
  if (kind === 'distance' && rest === '') return { kind: 'distance' };
  if (kind === 'near') {
    const [d, below, lateral] = parts(flag, rest, [1, 2, 3], 'near:DIST,BELOW[,LATERAL] in mm (for example near:400,120)');
    return {
      kind: 'near', distance: readNumber(flag, d, 'length'),
      ...(below !== undefined ? { below: readNumber(flag, below, 'length') } : {}),
      ...(lateral !== undefined ? { lateral: readNumber(flag, lateral, 'length') } : {}),
    };
  }
  if (kind === 'level') {
    const [below, inset] = parts(flag, rest, [1, 2], 'level:BELOW[,INSET] in mm (for example level:10,2)');
    return { kind: 'level', below: readNumber(flag, below!, 'length'), ...(inset !== undefined ? { inset: readNumber(flag, inset, 'length') } : {}) };
  }
  throw new InputError(flag, `must be distance, near:DIST,BELOW or level:BELOW,INSET, got '${text}'`);
}

function tolerance(flag: string, text: string): object {
  const t = text.trim();
  if (t.startsWith('custom:')) {
    const [h, v] = parts(flag, t.slice(7), [2], 'custom:H,V in prism dioptres (for example custom:0.67,0.33)');
    return { profile: 'custom', horizontal: readNumber(flag, h!, 'prism'), vertical: readNumber(flag, v!, 'prism') };
  }
  if (t !== 'ansi-z80.1' && t !== 'iso-21987') throw new InputError(flag, `must be ansi-z80.1, iso-21987 or custom:H,V, got '${text}'`);
  return { profile: t };
}

/** The case-file path a value came from → the flag that gave it (for error messages). */
type Origins = Map<string, string>;

function kebab(key: string): string {
  return key.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`);
}

/** The flag for a case-file path: the one that gave the value, or the one that would have. */
function flagFor(path: string, origins: Origins): string {
  const segs = path.split('.');
  for (let n = segs.length; n > 0; n--) {
    const o = origins.get(segs.slice(0, n).join('.'));
    if (o) return o;
  }
  const [head, key] = segs as [string, string | undefined];
  if ((head === 'right' || head === 'left') && key) return `--${head}-${kebab(key)}`;
  const top: Record<string, string> = { frame: '--frame', target: '--target', tolerance: '--tolerance', pantoDeg: '--panto', wrapDeg: '--wrap', title: '--title' };
  return top[head] ?? `--${kebab(head)}`;
}

/**
 * The case document the flags describe, validated by readCase. Throws an InputError naming
 * the flag (with "(right)" or "(left)" when a pair flag gave that eye's value) and the reason.
 */
export function caseFromFitFlags(args: ParsedArgs): BinocularCase {
  const v = args.values;
  const origins: Origins = new Map();
  const eyes: Record<Side, Record<string, unknown>> = { right: {}, left: {} };
  const doc: Record<string, unknown> = { format: CASE_FORMAT, version: CASE_VERSION };

  const set = (side: Side, key: string, value: unknown, flag: string) => {
    eyes[side][key] = value;
    origins.set(`${side}.${key}`, flag);
  };

  for (const stem of PAIR_FLAGS) {
    const text = v.get(stem);
    if (text === undefined) continue;
    const flag = `--${stem}`;
    for (const s of SIDES) {
      if (v.has(`${s}-${stem}`)) throw new InputError(flag, `and --${s}-${stem} both give the ${s} eye's value: give one`);
    }
    const key = stem === 'fitting-height' ? 'fittingHeight' : stem === 'oc-height' ? 'ocHeight' : stem;
    const p = stem === 'pd'
      ? parts(flag, text, [2], 'R,L: the two monocular PDs in mm (for example 32,31.5; a binocular PD of 64 is 32,32)')
      : parts(flag, text, [1, 2], 'one value for both eyes, or R,L');
    SIDES.forEach((s, i) => {
      const raw = p[Math.min(i, p.length - 1)]!;
      const shown = `${flag} (${s})`;
      set(s, key, stem === 'material' ? raw : readNumber(shown, raw, 'length'), shown);
    });
  }

  for (const s of SIDES) {
    for (const [key, stem, q] of EYE_NUMBERS) {
      const text = v.get(`${s}-${stem}`);
      if (text !== undefined) set(s, key, readNumber(`--${s}-${stem}`, text, q), `--${s}-${stem}`);
    }
    const material = v.get(`${s}-material`);
    if (material !== undefined) set(s, 'material', material.trim(), `--${s}-material`);
    const oc = v.get(`${s}-oc`);
    if (oc !== undefined) {
      const flag = `--${s}-oc`;
      const [x, y] = parts(flag, oc, [2], 'X,Y in mm (x towards the wearer\'s left, y up)');
      set(s, 'oc', { x: readNumber(flag, x!, 'length'), y: readNumber(flag, y!, 'length') }, flag);
    }
    const prism = v.get(`${s}-prism`);
    if (prism !== undefined) set(s, 'prism', prismList(`--${s}-prism`, prism), `--${s}-prism`);
  }

  const title = v.get('title');
  if (title !== undefined) doc.title = title;
  const frame = v.get('frame');
  if (frame !== undefined) {
    const [a, b, dbl] = parts('--frame', frame, [3], 'A,B,DBL in mm (for example 52,40,18)');
    doc.frame = { a: readNumber('--frame', a!, 'length'), b: readNumber('--frame', b!, 'length'), dbl: readNumber('--frame', dbl!, 'length') };
  }
  const panto = v.get('panto');
  if (panto !== undefined) doc.pantoDeg = readNumber('--panto', panto, 'angle');
  const wrap = v.get('wrap');
  if (wrap !== undefined) doc.wrapDeg = readNumber('--wrap', wrap, 'angle');
  doc.target = target('--target', v.get('target') ?? 'distance');
  const tol = v.get('tolerance');
  if (tol !== undefined) doc.tolerance = tolerance('--tolerance', tol);
  doc.right = eyes.right;
  doc.left = eyes.left;

  try {
    return readCase(doc);
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    throw new InputError(flagFor(e.field, origins), e.reason);
  }
}
