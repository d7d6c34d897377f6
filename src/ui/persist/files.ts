/**
 * Files in and out of the page, through the library (src/api/core.ts, docs/api.md): a case
 * saved as a .decentra.json download (writeCaseFile), a file read as bytes and checked whole
 * (readCaseFile) before anything is applied (or, if it is a FHIR VisionPrescription, imported
 * by importFhir with its assumptions listed), and the clinician
 * summary opened in a new tab from a Blob URL, or printed. The summary page is never put into
 * this page's document: printing loads it, unchanged and still script-free under its own
 * Content-Security-Policy, into a hidden frame and asks that frame's window to print.
 */
import type { Names } from '../../api/core.ts';
import * as api from '../../api/core.ts';
import { type BinocularCase, CaseError } from '../../case/caseFile.ts';
import { MAX_FHIR_BYTES } from '../../case/fhir.ts';
import { summaryHtml } from '../../report/summary.ts';

/**
 * The library's names (src/api/core.ts, docs/api.md) for what a file held: the path in the
 * file ('right.sphere', 'lensSpecification.0.eye'), as a refusal has always named it here.
 */
const IN_FILE: Names = { text: false, name: (path) => path.replace(/^(case|resource)\./, '') };

/** Files larger than this are refused without being read at all (a case is a few kB). */
const READ_LIMIT_BYTES = 32 * 1024 * 1024;

/** A file name from a case title: letters, digits and dashes only. */
export function caseFileName(title: string | undefined): string {
  const slug = (title ?? '').normalize('NFKD').toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 60).replace(/-+$/, '');
  return `${slug || 'case'}.decentra.json`;
}

/** Offer text as a download (a Blob URL and an <a download>; the URL is freed afterwards). */
export function download(text: string, name: string, type: string): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  a.rel = 'noopener';
  a.hidden = true;
  document.body.append(a);
  a.click();
  a.remove();
  window.setTimeout(() => URL.revokeObjectURL(url), 60_000);
}

export function saveCaseFile(c: BinocularCase): string {
  const name = caseFileName(c.doc.title);
  download(api.writeCaseFile(IN_FILE, c.doc), name, 'application/json');
  return name;
}

/** What a chosen file held: a case file, or a FHIR prescription turned into a case (with its assumptions). */
export interface OpenedFile {
  kind: 'case' | 'fhir';
  case: BinocularCase;
  /** for an import: one line per value the resource lacked and what was assumed (docs/fhir.md) */
  notes: string[];
}

/** A JSON object with a `resourceType` key is a FHIR resource (a case file never has that key). */
function fhirText(bytes: Uint8Array): string | null {
  if (bytes.length > MAX_FHIR_BYTES) return null;
  try {
    const text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
    const raw: unknown = JSON.parse(text.replace(/^\uFEFF/, ''));
    return typeof raw === 'object' && raw !== null && !Array.isArray(raw) && Object.hasOwn(raw, 'resourceType') ? text : null;
  } catch {
    return null; // not UTF-8 or not JSON: reading it as a case file says so
  }
}

/** The import's notes name the CLI's flag for the PDs; in the app the PDs are set in the case. */
function appNote(note: string): string {
  return note.replace(': give --pd R,L', ': set each eye’s PD in the case');
}

/**
 * Read a chosen file: a Decentra case file (checked whole), or a FHIR VisionPrescription (R4
 * or R5, alone or in a Bundle; docs/fhir.md) imported into a case with the same rules as
 * `decentra import`. Throws a CaseError (a file too large to read) or a DecentraError naming
 * the field or the resource's path; nothing is applied.
 */
export async function readCaseOrPrescriptionFile(file: File): Promise<OpenedFile> {
  if (file.size > READ_LIMIT_BYTES) {
    throw new CaseError('file', `is ${Math.round(file.size / 1024)} kB; a case file is at most 256 kB`);
  }
  const bytes = new Uint8Array(await file.arrayBuffer());
  const text = fhirText(bytes);
  if (text === null) return { kind: 'case', case: api.openCase(IN_FILE, bytes), notes: [] };
  const imported = api.importFhir(IN_FILE, text);
  const notes = imported.notes.map(appNote);
  // the assumptions stay with the case (its note, printed on the clinician summary), not only in a passing notice
  const note = `Imported from an HL7 FHIR VisionPrescription. Assumed: ${notes.join('; ')}.`.slice(0, 4000);
  return { kind: 'fhir', case: api.openCase(IN_FILE, { ...imported.case, note }), notes };
}

let summaryUrl: string | null = null;

/**
 * Open the clinician summary of a case in a new tab. The page is made by summaryHtml (text
 * escaped there, no script, its own Content-Security-Policy) and handed over as a Blob URL.
 * Throws a DecentraError naming the field if the case cannot be evaluated (an impossible lens).
 */
export function openSummary(c: BinocularCase, date = new Date()): void {
  const page = summaryHtml(c, api.evaluateCase(IN_FILE, c), { date });
  if (summaryUrl) URL.revokeObjectURL(summaryUrl);
  summaryUrl = URL.createObjectURL(new Blob([page], { type: 'text/html' }));
  const a = document.createElement('a');
  a.href = summaryUrl;
  a.target = '_blank';
  a.rel = 'noopener';
  a.hidden = true;
  document.body.append(a);
  a.click();
  a.remove();
}

let printFrame: HTMLIFrameElement | null = null;
let printUrl: string | null = null;

/**
 * Print the clinician summary of a case: the same page as openSummary, loaded from a Blob URL
 * into a hidden frame whose window is asked to print once it has loaded (the browser's print
 * dialog opens; the page itself runs no script). The frame stays until the next print, so
 * that the dialog can still read it. Returns the frame. Throws a DecentraError naming the field
 * if the case cannot be evaluated.
 */
export function printSummary(c: BinocularCase, date = new Date()): HTMLIFrameElement {
  const page = summaryHtml(c, api.evaluateCase(IN_FILE, c), { date });
  printFrame?.remove();
  if (printUrl) URL.revokeObjectURL(printUrl);
  printUrl = URL.createObjectURL(new Blob([page], { type: 'text/html' }));
  const frame = document.createElement('iframe');
  frame.className = 'summary-print-frame';
  frame.title = 'Clinician summary, for printing';
  frame.tabIndex = -1;
  frame.setAttribute('aria-hidden', 'true');
  frame.addEventListener('load', () => {
    const w = frame.contentWindow;
    if (!w) return;
    w.focus();
    w.print();
  }, { once: true });
  frame.src = printUrl;
  document.body.append(frame);
  printFrame = frame;
  return frame;
}
