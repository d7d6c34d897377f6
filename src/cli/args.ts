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

/** A short flag ("-x", "-h", "-x=5"), which decentra does not use; "-5" and "-.5" are numbers. */
const SHORT_FLAG = /^-[^-\d.]/;

/**
 * Reads `argv` against `spec`. Everything else is positional (a case file), except `--` and
 * short flags, which are refused with their own names. Errors are InputErrors naming the
 * token; the CLI prints them on one line with control characters escaped (output.ts oneLine).
 */
export function parseArgs(argv: readonly string[], spec: FlagSpec): ParsedArgs {
  const values = new Map<string, string>();
  const switches = new Set<string>();
  const positional: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const tok = argv[i]!;
    if (tok === '--') {
      throw new InputError("'--'", "is not used by decentra: give flags and case files in any order, and a negative value right after its flag (--x -5)");
    }
    if (SHORT_FLAG.test(tok)) {
      const name = tok.slice(1).split('=')[0]!;
      const long = name === 'h' ? '--help' : `--${name}`;
      const known = [...spec.values, ...spec.switches].includes(long.slice(2));
      throw new InputError(tok.split('=')[0]!, known ? `is not a flag; did you mean ${long}?` : 'is not a flag: flags are long, as --name (see --help)');
    }
    if (!tok.startsWith('--')) {
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

/** The error for a word that is neither a flag, nor a flag's value, nor an expected case file. */
export function strayArgument(tok: string): InputError {
  return new InputError(`'${tok}'`, 'unexpected argument: not a flag or the value of one (flags start with --)');
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
