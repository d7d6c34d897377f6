/**
 * `decentra import` and `decentra export`: prescriptions in and out through HL7 FHIR's
 * VisionPrescription (docs/fhir.md). Glue only: the library (src/cli/api.ts) reads, checks and
 * writes, with src/case/fhir.ts behind it.
 */
import { MAX_CASE_BYTES } from '../case/caseFile.ts';
import { MAX_FHIR_BYTES } from '../case/fhir.ts';
import { InputError } from '../case/input.ts';
import { api, fileNames } from './api.ts';
import { parseArgs } from './args.ts';
import { oneLine, writeFileSafely } from './output.ts';
import { readFileCapped } from './readFile.ts';
import { readDay, today } from './report.ts';

export const IMPORT_HELP = `decentra import: a case file from an HL7 FHIR VisionPrescription.

Usage: decentra import FILE.json [--pd R,L] [--out CASE.json]

Reads a VisionPrescription resource (FHIR R4 or R5 JSON), alone or inside a Bundle, and
writes a Decentra case file (docs/case-file.md) with its prescription: sphere, cylinder,
axis, prism and add for each eye. The resource carries no PD, frame, material or lens form:
each value assumed is said in one line on stderr. A resource that cannot be read is refused
with one line naming the path in it ("lensSpecification.1.axis") and nothing is written.

  --pd R,L      monocular PDs in mm (default 32,32, said on stderr)
  --out FILE    write the case there (otherwise to stdout); never leaves a partial file
`;

export const EXPORT_HELP = `decentra export: a case's prescription as an HL7 FHIR VisionPrescription.

Usage: decentra export CASE.json --fhir [--out FILE.json] [--date YYYY-MM-DD]

Writes the prescription of a case file (sphere, cylinder, axis, prism, add per eye) as a
FHIR VisionPrescription (JSON; the elements are the same in R4 and R5). A prism given in
360° notation is written as its base-in/out and up/down components (FHIR names bases only),
and an axis as whole degrees; what was changed is said on stderr.

  --fhir        the format (the only one so far; required, so that a script says what it wants)
  --out FILE    write the resource there (otherwise to stdout)
  --date DAY    the resource's created and dateWritten, YYYY-MM-DD (default: today)
`;

/** The result of a command that also has notes for stderr (one line each). */
export interface WithNotes {
  out: string;
  notes: string[];
}

/** --pd R,L as the library's pd option (the two values as typed; the library checks them). */
function readPds(raw: string | undefined): { right: string; left: string } | undefined {
  if (raw === undefined) return undefined;
  const parts = raw.split(',');
  if (parts.length !== 2) throw new InputError('--pd', `must be R,L in mm (e.g. 31.5,32), got '${oneLine(raw)}'`);
  return { right: parts[0]!, left: parts[1]! };
}

export function runImport(argv: readonly string[]): WithNotes {
  const args = parseArgs(argv, { values: ['pd', 'out'], switches: ['help'] });
  if (args.switches.has('help')) return { out: IMPORT_HELP, notes: [] };
  if (args.positional.length !== 1) throw new InputError('FILE.json', 'give exactly one FHIR resource file');
  const path = args.positional[0]!;
  const pd = readPds(args.values.get('pd'));
  const bytes = readFileCapped(path, MAX_FHIR_BYTES, oneLine(path), 'a FHIR resource file');
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw new InputError(oneLine(path), 'is not valid UTF-8 text');
  }
  const names = fileNames(oneLine(path), 'resource');
  const result = api.importFhir(names, text, pd ? { pd } : {});
  const caseText = api.writeCaseFile(names, result.case);
  const notes = result.notes.map((n) => `decentra import: assumed: ${n}`);
  const out = args.values.get('out');
  if (out === undefined) return { out: caseText, notes };
  writeFileSafely(out, caseText, '--out');
  return { out: '', notes: [...notes, `decentra import: wrote ${oneLine(out)}`] };
}

export function runExport(argv: readonly string[]): WithNotes {
  const args = parseArgs(argv, { values: ['out', 'date'], switches: ['fhir', 'help'] });
  if (args.switches.has('help')) return { out: EXPORT_HELP, notes: [] };
  if (args.positional.length !== 1) throw new InputError('CASE.json', 'give exactly one case file');
  if (!args.switches.has('fhir')) throw new InputError('--fhir', 'is required: the format to export (FHIR VisionPrescription is the only one)');
  const path = oneLine(args.positional[0]!);
  const bytes = readFileCapped(args.positional[0]!, MAX_CASE_BYTES, path, 'a case file');
  const day = args.values.has('date') ? readDay('--date', args.values.get('date')!) : today();
  const { resource, notes } = api.exportFhir(fileNames(path, 'case'), bytes, day.toISOString().slice(0, 10));
  const text = `${JSON.stringify(resource, null, 2)}\n`;
  const all = notes.map((n) => `decentra export: ${n}`);
  const out = args.values.get('out');
  if (out === undefined) return { out: text, notes: all };
  writeFileSafely(out, text, '--out');
  return { out: '', notes: [...all, `decentra export: wrote ${oneLine(out)}`] };
}
