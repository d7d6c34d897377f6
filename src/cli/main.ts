/**
 * The `decentra` command line. Thin: flags -> case -> optics -> print. A bad flag exits 2
 * with one line on stderr that names the flag and the reason.
 */
import { InputError } from '../case/input.ts';
import { DecentraError } from './api.ts';
import { MATERIALS } from '../optics/index.ts';
import { FIT_HELP, runFit } from './fit.ts';
import { LIMITS_HELP, runLimits } from './limits.ts';
import { SPEC_HELP, runSpec } from './spec.ts';
import { EXPORT_HELP, IMPORT_HELP, runExport, runImport } from './fhir.ts';
import { FORM_HELP, runForm } from './form.ts';
import { NEAR_HELP, runNear } from './near.ts';
import { runReport } from './report.ts';
import { oneLine } from './output.ts';
import { batchText } from './parallel.ts';
import { SWEEP_HELP, planSweep, runSweep } from './sweep.ts';
import { TRACE_HELP, runTrace } from './trace.ts';

const MAIN_HELP = `decentra: exact prism along the line of sight through a thick spectacle lens.

Usage: decentra <command> [flags]

Commands
  trace       the four answers (Prentice, first-order, exact, focimeter) at one visual point
  sweep       a table over powers and decentrations for a lens family (CSV or JSON)
  near        the visual point and prism for a target in front of the eye (exact trace)
  limits      the largest decentration within a prism tolerance, exactly and by Prentice
  form        the front curves free of oblique astigmatism or mean error (best forms, exact trace)
  spec        a printable spec sheet for a lens range: limits, where Prentice breaks down (HTML)
  fit         a whole binocular case (a case file, or flags): at the marks, the standard's verdict, the eyes
  report      a one-page printable summary of a case file for a referring clinician (HTML)
  import      a case file from an HL7 FHIR VisionPrescription (R4/R5 JSON)
  export      a case's prescription as an HL7 FHIR VisionPrescription (--fhir)
  materials   the lens materials known by name
  help        this text; "decentra <command> --help" explains a command

Run "decentra trace --help" for the lens flags.
`;

function materials(): string {
  return MATERIALS.map((m) => `${m.id.padEnd(14)} n_d ${m.nd.toFixed(3)}  V_d ${String(m.abbe).padEnd(4)}  ${m.name}; ${m.source}`).join('\n');
}

/** A command's result: its output, exit status, an error line, and notes for stderr (one line each). */
export interface RunResult {
  out: string;
  code: number;
  err?: string;
  notes?: string[];
}

export function run(argv: readonly string[]): RunResult {
  const [cmd, ...rest] = argv;
  try {
    switch (cmd) {
      case 'trace':
        return { out: runTrace(rest), code: 0 };
      case 'sweep':
        return { out: runSweep(rest), code: 0 };
      case 'near':
        return { out: runNear(rest), code: 0 };
      case 'spec':
        return { out: runSpec(rest), code: 0 };
      case 'import':
        return { ...runImport(rest), code: 0 };
      case 'export':
        return { ...runExport(rest), code: 0 };
      case 'limits':
        return { out: runLimits(rest), code: 0 };
      case 'fit':
        return { out: runFit(rest), code: 0 };
      case 'report':
        return { out: runReport(rest), code: 0 };
      case 'form':
        return { out: runForm(rest), code: 0 };
      case 'materials':
        return { out: materials(), code: 0 };
      case undefined:
      case 'help':
      case '--help':
      case '-h':
        return { out: MAIN_HELP, code: 0 };
      default:
        return { out: '', code: 2, err: oneLine(`decentra: unknown command '${cmd}' (try: decentra --help)`) };
    }
  } catch (e) {
    // a refusal by the library (src/cli/api.ts) names the flag as an InputError does
    if (e instanceof InputError || e instanceof DecentraError) return { out: '', code: 2, err: oneLine(`decentra ${cmd}: ${e.message}`) };
    throw e;
  }
}

export { FORM_HELP };
export { TRACE_HELP, SWEEP_HELP, NEAR_HELP, LIMITS_HELP, FIT_HELP, SPEC_HELP, IMPORT_HELP, EXPORT_HELP };

/** The installed command (bin/decentra.mjs): streams output, one-line errors, exit statuses. */
export { runCli } from './entry.ts';

/**
 * As run(), but a sweep is computed as the installed command computes it (blocks, worker
 * threads where they help; src/cli/parallel.ts) and collected into one string. `bundleUrl`
 * is the built file itself, which the workers load.
 */
export async function runAsync(argv: readonly string[], bundleUrl: URL): Promise<{ out: string; code: number; err?: string }> {
  if (argv[0] !== 'sweep') return run(argv);
  try {
    const plan = planSweep(argv.slice(1));
    if (!plan) return { out: SWEEP_HELP, code: 0 };
    return { out: await batchText(plan, { bundleUrl }), code: 0 };
  } catch (e) {
    if (e instanceof InputError) return { out: '', code: 2, err: oneLine(`decentra sweep: ${e.message}`) };
    throw e;
  }
}
