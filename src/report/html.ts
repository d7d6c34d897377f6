/**
 * Markup for the printed summary, built so that user text cannot become markup and no
 * NaN or Infinity can reach the page:
 * - `html` is a tagged template: every interpolated string goes through `esc` (the one
 *   escape function); only values already built by `html` (class Markup) pass unchanged;
 *   a number cannot be interpolated at all (the type forbids it and the tag throws), so every
 *   number goes through `fmt` (text) or `coord` (SVG geometry) first.
 * - `fmt` prints fixed decimals and '—' for a missing or non-finite value.
 * - `coord` is for drawing coordinates only: it throws on a non-finite value (a bug, never
 *   shown as a broken drawing).
 */

/** Markup that is already safe (built by `html`). */
import { DASH, fixed as fmt } from '../case/numberText.ts';

export { DASH };

export class Markup {
  constructor(readonly text: string) {}
  toString(): string {
    return this.text;
  }
}

export type Part = Markup | string | readonly Part[] | null | undefined | false;

const ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/** The one escape function: text to HTML/XML character data or a quoted attribute value. */
export function esc(text: string): string {
  return text.replace(/[&<>"']/g, (ch) => ESCAPES[ch]!);
}

function render(v: Part): string {
  if (v === null || v === undefined || v === false) return '';
  if (v instanceof Markup) return v.text;
  if (typeof v === 'string') return esc(v);
  if (Array.isArray(v)) return v.map(render).join('');
  throw new TypeError(`report markup: cannot insert a ${typeof v}; format numbers with fmt() or coord() first`);
}

/** Tagged template: html`<p>${userText}</p>` escapes userText. */
export function html(strings: TemplateStringsArray, ...values: Part[]): Markup {
  let out = strings[0]!;
  for (let i = 0; i < values.length; i++) out += render(values[i]!) + strings[i + 1]!;
  return new Markup(out);
}

/** Markup from a trusted constant (a style sheet written in this folder); never user text. */
export function trusted(constant: string): Markup {
  return new Markup(constant);
}


/**
 * The opening of a standalone printable page: doctype, a Content-Security-Policy that allows
 * no script and no external file, the title and the inline style sheet; the body follows.
 */
export function pageHead(title: Part, css: string): Markup {
  return html`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="Decentra">
<title>${title}</title>
<style>${trusted(css)}</style>
</head>`;
}

/** A number for people (src/case/numberText.ts): fixed decimals, no "-0.00", '—' when missing or not finite. */
export { fmt };

/** Signed, as the trade writes powers: +1.00, -9.50, 0.00 (with a real minus sign). */
export function fmtSigned(v: number | null | undefined, decimals = 2): string {
  const s = fmt(v, decimals);
  if (s === DASH) return s;
  if (s.startsWith('-')) return `\u2212${s.slice(1)}`;
  return Number(s) === 0 ? s : `+${s}`;
}

/** A value with its unit, or '—'. */
export function withUnit(v: number | null | undefined, unit: string, decimals = 2): string {
  const s = fmt(v, decimals);
  if (s === DASH) return s;
  return unit === '°' ? `${s}°` : `${s} ${unit}`;
}

export class ReportError extends Error {}

/** An SVG coordinate (user units, 2 decimals). Throws on a non-finite value. */
export function coord(v: number): string {
  if (!Number.isFinite(v)) throw new ReportError(`internal error: a drawing coordinate is not a finite number (${String(v)})`);
  return fmt(v, 2);
}
