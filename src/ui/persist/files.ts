/**
 * Files in and out of the page: a case saved as a .decentra.json download, a file read as
 * bytes and checked whole by readCaseBytes before anything is applied, and the clinician
 * summary opened in a new tab from a Blob URL, or printed. The summary page is never put into
 * this page's document: printing loads it, unchanged and still script-free under its own
 * Content-Security-Policy, into a hidden frame and asks that frame's window to print.
 */
import { type BinocularCase, CaseError, readCaseBytes, writeCase } from '../../case/caseFile.ts';
import { evaluateFit } from '../../case/fit.ts';
import { summaryHtml } from '../../report/summary.ts';

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
  download(writeCase(c.doc), name, 'application/json');
  return name;
}

/** Read a chosen file and check it whole; throws a CaseError naming the field (nothing is applied). */
export async function readCaseFile(file: File): Promise<BinocularCase> {
  if (file.size > READ_LIMIT_BYTES) {
    throw new CaseError('file', `is ${Math.round(file.size / 1024)} kB; a case file is at most 256 kB`);
  }
  const bytes = new Uint8Array(await file.arrayBuffer());
  return readCaseBytes(bytes);
}

let summaryUrl: string | null = null;

/**
 * Open the clinician summary of a case in a new tab. The page is made by summaryHtml (text
 * escaped there, no script, its own Content-Security-Policy) and handed over as a Blob URL.
 * Throws an InputError naming the field if the case cannot be evaluated (an impossible lens).
 */
export function openSummary(c: BinocularCase, date = new Date()): void {
  const page = summaryHtml(c, evaluateFit(c), { date });
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
 * that the dialog can still read it. Returns the frame. Throws an InputError naming the field
 * if the case cannot be evaluated.
 */
export function printSummary(c: BinocularCase, date = new Date()): HTMLIFrameElement {
  const page = summaryHtml(c, evaluateFit(c), { date });
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
