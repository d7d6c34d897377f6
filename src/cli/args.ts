/**
 * A small, strict flag reader: `--flag value` and `--flag=value`, negative numbers included
 * ("--x -5" takes -5 as the value). Unknown, repeated or value-less flags are errors that
 * name the flag. No library: the CLI must start fast (it is called thousands of times).
 */
import { LENS_FLAGS } from '../case/flags.ts';
import { InputError } from '../case/input.ts';
import type { FieldKey, RawFields } from '../case/lensCase.ts';

export interface FlagSpec {
  /** flags that take a value */
  values: readonly string[];
  /** flags that are switches */
  switches: readonly string[];
}

export interface ParsedArgs {
  values: Map<string, string>;
  switches: Set<string>;
  positional: string[];
}

export function parseArgs(argv: readonly string[], spec: FlagSpec): ParsedArgs {
  const values = new Map<string, string>();
  const switches = new Set<string>();
  const positional: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const tok = argv[i]!;
    if (!tok.startsWith('--') || tok === '--') {
      positional.push(tok);
      continue;
    }
    const eq = tok.indexOf('=');
    const name = eq < 0 ? tok.slice(2) : tok.slice(2, eq);
    const flag = `--${name}`;
    if (spec.switches.includes(name)) {
      if (eq >= 0) throw new InputError(flag, 'is a switch and takes no value');
      switches.add(name);
      continue;
    }
    if (!spec.values.includes(name)) {
      throw new InputError(flag, `is not a known flag here (see --help)`);
    }
    if (values.has(name)) throw new InputError(flag, 'is given more than once');
    let value: string | undefined;
    if (eq >= 0) value = tok.slice(eq + 1);
    else {
      value = argv[i + 1];
      if (value === undefined || value.startsWith('--')) throw new InputError(flag, 'needs a value');
      i++;
    }
    if (value.trim() === '') throw new InputError(flag, 'needs a value');
    values.set(name, value);
  }
  return { values, switches, positional };
}

export { LENS_FLAGS, flagOf } from '../case/flags.ts';

/** The lens fields given as flags (src/case/lensCase.ts FieldKey -> raw text). */
export function rawFields(args: ParsedArgs): RawFields {
  const f: RawFields = {};
  for (const [flag, key] of Object.entries(LENS_FLAGS)) {
    const v = args.values.get(flag);
    if (v !== undefined) f[key as FieldKey] = v;
  }
  return f;
}
