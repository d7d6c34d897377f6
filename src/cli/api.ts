/**
 * The library (src/api/core.ts, docs/api.md) as the `decentra` command calls it: the same
 * functions and the same checks, with the command's flag names in messages ('--ct', '--x') and
 * the typed text of its flags accepted (units allowed: "0.25cm"). A refusal is a DecentraError
 * whose argument is the flag; src/cli/main.ts prints it as the one-line error of any bad flag.
 */
import type { Names } from '../api/core.ts';
import { LENS_KEYS } from '../api/core.ts';
import type { ParsedArgs } from './args.ts';
import { flagOf } from './args.ts';

export * as api from '../api/core.ts';
export { DecentraError } from '../api/index.ts';

/**
 * The flag of an API argument path: its last name, as a flag ('lens.frontK' -> '--front-k',
 * 'point.x' -> '--x', 'options.tiltDrop' -> '--tilt-drop'); a target's coordinate is the
 * target's flag ('options.at.z' -> '--at').
 */
export function flagOfPath(path: string): string {
  const parts = path.split('.');
  if (parts.length < 2) return path;
  return `--${parts[1]!.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)}`;
}

/** The command's names for the library's arguments: its flags, and text as typed. */
export const FLAGS: Names = { name: flagOfPath, text: true };

/** The lens options given as flags (the case file's names, text as typed). */
export function lensFlags(args: ParsedArgs): Record<string, string> {
  const o: Record<string, string> = {};
  for (const k of LENS_KEYS) {
    const flag = flagOf(k).slice(2);
    const v = args.values.get(flag);
    if (v !== undefined) o[k] = v;
  }
  return o;
}

/**
 * Names for what was read from a file: a path under `root` ('case.right.sphere',
 * 'resource.lensSpecification.1.axis') is the file and the path in it ("case.json:
 * right.sphere"); other arguments are flags.
 */
export function fileNames(file: string, root: 'case' | 'resource'): Names {
  return {
    text: true,
    name: (path) => (path === root ? `${file}: ${root}` : path.startsWith(`${root}.`) ? `${file}: ${path.slice(root.length + 1)}` : flagOfPath(path)),
  };
}

/** Names for a case already read (fit, report): a field of the case is its path in the case file ('right.ct'). */
export const CASE_FIELDS: Names = {
  text: true,
  name: (path) => (path === 'case' ? path : path.startsWith('case.') ? path.slice(5) : flagOfPath(path)),
};
