/**
 * The visualiser's case as the person typed it, and its round trip through a URL query.
 *
 * Values stay as text (a length may be typed "2.5 mm" or "0.25 cm"); they are validated by
 * readTraceCase when the case is computed, so a link with a bad value shows the same clear
 * error as typing it. The query uses short keys; every case field is written, so a link
 * reproduces the case even if the defaults change later. Pure: no DOM.
 *
 * A link can instead carry a both-eyes case (binocularToQuery, binocularFromQuery): the case
 * document itself (docs/case-file.md), compact JSON in one `case` value, read back by the
 * case file's own reader, so a link and a file hold a case the same way and are checked the
 * same way (docs/saving.md, "Links").
 */
import { type BinocularCase, type CaseDocument, readCaseText } from './caseFile.ts';
import { InputError } from './input.ts';
import type { RawFields } from './lensCase.ts';
import { inRange, readNumber } from './input.ts';

export type FrontMode = 'auto' | 'true' | 'nominal';
export type ThicknessMode = 'centre' | 'rule';
export type PointMode = 'xy' | 'polar';

/** One monocular case in the form the visualiser edits it. */
export interface ViewCase {
  // prescription
  sphere: string;
  cyl: string;
  axis: string;
  eye: 'R' | 'L';
  // lens material: a generic material id, or 'custom' with index and Abbe number
  material: string;
  index: string;
  abbe: string;
  // front surface: automatic (lens-family rule), true power, or nominal power with tool index
  frontMode: FrontMode;
  front: string;
  base: string;
  toolIndex: string;
  // thickness: centre thickness, or the thinnest lens with min edge / min centre
  thicknessMode: ThicknessMode;
  ct: string;
  minEdge: string;
  minCt: string;
  diameter: string;
  frontK: string;
  backK: string;
  cylOn: 'back' | 'front';
  toric: 'tyre' | 'barrel';
  // fitting
  cr: string;
  // line of sight: visual point as x, y or as direction and distance from the optical centre
  pointMode: PointMode;
  x: string;
  y: string;
  dir: string;
  dist: string;
}

/** Display settings that also travel in the link (optional there). */
export interface ViewDisplay {
  /** angles between the object-side rays drawn this many times larger */
  mag: number;
  mapQuantity: 'exact' | 'error';
  tab: 'section' | 'profile' | 'map';
  labels: boolean;
  focimeterRay: boolean;
}

/** The deviation magnifications offered (display only). */
export const MAG_CHOICES = [1, 2, 5, 10, 20, 50, 100] as const;

export const DEFAULT_DISPLAY: ViewDisplay = { mag: 1, mapQuantity: 'exact', tab: 'section', labels: true, focimeterRay: false };

/** Query keys for each field (short, stable: links depend on them). */
const KEYS: Record<keyof ViewCase, string> = {
  sphere: 'sph', cyl: 'cyl', axis: 'ax', eye: 'eye',
  material: 'mat', index: 'n', abbe: 'v',
  frontMode: 'fm', front: 'f1', base: 'nb', toolIndex: 'ti',
  thicknessMode: 'tm', ct: 'ct', minEdge: 'me', minCt: 'mc', diameter: 'dia',
  frontK: 'k1', backK: 'k2', cylOn: 'co', toric: 'tor',
  cr: 'cr',
  pointMode: 'pm', x: 'x', y: 'y', dir: 'dir', dist: 'd',
};

const CHOICES: Partial<Record<keyof ViewCase, readonly string[]>> = {
  eye: ['R', 'L'],
  frontMode: ['auto', 'true', 'nominal'],
  thicknessMode: ['centre', 'rule'],
  cylOn: ['back', 'front'],
  toric: ['tyre', 'barrel'],
  pointMode: ['xy', 'polar'],
};

/** Longest text accepted from a link for one field (a number with a unit is far shorter). */
const MAX_TEXT = 40;

export function caseToQuery(c: ViewCase, d?: ViewDisplay): string {
  const q = new URLSearchParams();
  for (const k of Object.keys(KEYS) as (keyof ViewCase)[]) q.set(KEYS[k], String(c[k]).trim());
  if (d) {
    q.set('mag', String(d.mag));
    q.set('map', d.mapQuantity);
    q.set('tab', d.tab);
    if (!d.labels) q.set('labels', '0');
    if (d.focimeterRay) q.set('foc', '1');
  }
  return q.toString();
}

export interface ParsedQuery {
  viewCase: ViewCase;
  display: ViewDisplay;
  /** link values that were not understood and were replaced by the base case's */
  ignored: string[];
}

/**
 * Read a case from a query string, starting from `base` for anything the link lacks.
 * Choice fields must be one of their choices; text fields are kept for readTraceCase to
 * validate (with a visible message), only clipped to a sane length.
 */
export function caseFromQuery(query: string, base: ViewCase, baseDisplay: ViewDisplay = DEFAULT_DISPLAY): ParsedQuery {
  const q = new URLSearchParams(query);
  const out: ViewCase = { ...base };
  const ignored: string[] = [];
  for (const k of Object.keys(KEYS) as (keyof ViewCase)[]) {
    const raw = q.get(KEYS[k]);
    if (raw === null) continue;
    const choices = CHOICES[k];
    if (choices) {
      const v = k === 'eye' ? raw.trim().toUpperCase() : raw.trim().toLowerCase();
      if (choices.includes(v)) (out as unknown as Record<string, string>)[k] = v;
      else ignored.push(`${KEYS[k]}=${raw.slice(0, MAX_TEXT)}`);
    } else {
      (out as unknown as Record<string, string>)[k] = raw.slice(0, MAX_TEXT);
    }
  }
  const display: ViewDisplay = { ...baseDisplay };
  const mag = q.get('mag');
  if (mag !== null) {
    const m = Number(mag);
    if ((MAG_CHOICES as readonly number[]).includes(m)) display.mag = m;
    else ignored.push(`mag=${mag.slice(0, MAX_TEXT)}`);
  }
  const map = q.get('map');
  if (map === 'exact' || map === 'error') display.mapQuantity = map;
  else if (map !== null) ignored.push(`map=${map.slice(0, MAX_TEXT)}`);
  const tab = q.get('tab');
  if (tab === 'section' || tab === 'profile' || tab === 'map') display.tab = tab;
  else if (tab !== null) ignored.push(`tab=${tab.slice(0, MAX_TEXT)}`);
  if (q.get('labels') === '0') display.labels = false;
  if (q.get('foc') === '1') display.focimeterRay = true;
  return { viewCase: out, display, ignored };
}

/** Which visualiser field a readTraceCase field key is edited in. */
export type ViewField = keyof ViewCase;

/**
 * The raw fields readTraceCase validates, from a view case. In polar mode the direction and
 * distance are validated here (errors name them) and turned into x, y (plain plane geometry).
 */
export function toRawFields(c: ViewCase, labels: { dir: string; dist: string }): RawFields {
  const f: RawFields = {
    sphere: c.sphere, cyl: c.cyl, axis: c.axis, eye: c.eye,
    diameter: c.diameter, frontK: c.frontK, backK: c.backK, cylOn: c.cylOn, toric: c.toric, cr: c.cr,
  };
  if (c.material === 'custom') {
    f.index = c.index;
    f.abbe = c.abbe;
  } else {
    f.material = c.material;
  }
  if (c.frontMode === 'true') f.front = c.front;
  else if (c.frontMode === 'nominal') {
    f.base = c.base;
    f.toolIndex = c.toolIndex;
  } else f.frontRule = 'vogel';
  if (c.thicknessMode === 'centre') f.ct = c.ct;
  else {
    f.minEdge = c.minEdge;
    f.minCt = c.minCt;
  }
  if (c.pointMode === 'polar') {
    const dirDeg = inRange(labels.dir, readNumber(labels.dir, c.dir, 'angle'), { min: 0, max: 360, unit: 'degrees' });
    const distMm = inRange(labels.dist, readNumber(labels.dist, c.dist, 'length'), { min: 0, max: 50, unit: 'mm' });
    const a = (dirDeg * Math.PI) / 180;
    f.x = roundMm(distMm * Math.cos(a));
    f.y = roundMm(distMm * Math.sin(a));
  } else {
    f.x = c.x;
    f.y = c.y;
  }
  return f;
}

/** Keep sub-nanometre noise (cos 90° = 6e-17) out of the visual point. */
function roundMm(v: number): number {
  const r = Math.round(v * 1e9) / 1e9;
  return r === 0 ? 0 : r;
}

/** The query key that carries a both-eyes case. */
export const BINOCULAR_QUERY_KEY = 'case';

/**
 * A both-eyes case as a link query: the document as compact JSON. The clinician summary's
 * free text (`report`: recipient, practice, reference) stays out, because a link is pasted
 * into messages and histories where a file is not; the file keeps it.
 */
export function binocularToQuery(doc: CaseDocument): string {
  const { report: _report, ...rest } = doc;
  void _report;
  return new URLSearchParams({ [BINOCULAR_QUERY_KEY]: JSON.stringify(rest) }).toString();
}

/** Does this query carry a both-eyes case? */
export function queryCarriesBinocular(query: string): boolean {
  return new URLSearchParams(query).has(BINOCULAR_QUERY_KEY);
}

/**
 * The both-eyes case a link carries: null when it carries none; otherwise the validated case,
 * or the reason it was refused (a CaseError, naming the field by its path, e.g.
 * "right.sphere"). Checked whole, as a file is: nothing of a refused case is used.
 */
export function binocularFromQuery(query: string): { ok: true; case: BinocularCase } | { ok: false; error: InputError } | null {
  const text = new URLSearchParams(query).get(BINOCULAR_QUERY_KEY);
  if (text === null) return null;
  try {
    return { ok: true, case: readCaseText(text) };
  } catch (e) {
    if (e instanceof InputError) return { ok: false, error: e };
    throw e;
  }
}
