/**
 * The range workspace's family as the person typed it, and its translation into the range
 * module's request (src/case/range.ts, docs/range.md), the command line that prints the same
 * table, and the single-lens case of one cell. Pure: no DOM; the page and the range worker
 * both use it, so a message names the same field in both.
 */
import type { FieldKey } from '../../case/lensCase.ts';
import { shellWord } from '../../case/batch.ts';
import { flagOf } from '../../case/flags.ts';
import type { RangeInput, RangeKey, RangeLabeller, RangeRow } from '../../case/range.ts';
import { type ViewCase, toRawFields } from '../../case/url.ts';
import { DEMO_CASE } from '../../demo/demoCase.ts';

/** The lens fields of a family: those of the single-lens case that are not the prescription or the point. */
export type FamilyLensKey =
  | 'eye' | 'material' | 'index' | 'abbe' | 'frontMode' | 'front' | 'base' | 'toolIndex'
  | 'thicknessMode' | 'ct' | 'minEdge' | 'minCt' | 'diameter' | 'cylOn' | 'cr';

/** The range fields: lists and ranges in the command line's syntax. */
export type FamilyRangeKey = 'power' | 'cyl' | 'axis' | 'dir' | 'maxPrism' | 'levels' | 'decimals';

export type FamilyKey = FamilyLensKey | FamilyRangeKey;

/** The whole form: every value text, as typed. */
export type FamilyForm = Pick<ViewCase, FamilyLensKey> & Record<FamilyRangeKey, string>;

/**
 * The family the workspace opens on (an invented scenario, as the demo case): the demo's
 * lens (1.60 resin, the thinnest a 60 mm blank allows with a 1.0 mm edge, 27 mm to the centre
 * of rotation) over spheres −8 to +8 D in 0.5 D steps, in the four named directions, with a
 * 0.5 Δ tolerance.
 */
export const DEFAULT_FAMILY: Readonly<FamilyForm> = Object.freeze({
  eye: DEMO_CASE.eye, material: DEMO_CASE.material, index: DEMO_CASE.index, abbe: DEMO_CASE.abbe,
  frontMode: DEMO_CASE.frontMode, front: DEMO_CASE.front, base: DEMO_CASE.base, toolIndex: DEMO_CASE.toolIndex,
  thicknessMode: DEMO_CASE.thicknessMode, ct: DEMO_CASE.ct, minEdge: DEMO_CASE.minEdge, minCt: DEMO_CASE.minCt,
  diameter: DEMO_CASE.diameter, cylOn: DEMO_CASE.cylOn, cr: DEMO_CASE.cr,
  power: '-8:8:0.5', cyl: '0', axis: '0', dir: 'nasal,temporal,up,down', maxPrism: '0.5', levels: '5,10,20', decimals: '2',
});

/** Each field's name in messages (unique, so a message leads back to its field). */
export const FAMILY_LABELS: Record<FamilyKey, string> = {
  eye: 'eye', material: 'material', index: 'refractive index', abbe: 'Abbe number',
  frontMode: 'front curve', front: 'front power', base: 'nominal front power', toolIndex: 'tool index',
  thicknessMode: 'thickness', ct: 'centre thickness', minEdge: 'min edge', minCt: 'min centre', diameter: 'diameter',
  cylOn: 'cylinder on', cr: 'back vertex to CR',
  power: 'spheres', cyl: 'cylinders', axis: 'axes', dir: 'directions', maxPrism: 'tolerances',
  levels: 'breakdown levels', decimals: 'decimals',
};

/** The engine's field keys that are edited in another form field. */
const FIELD_OF_KEY: Partial<Record<FieldKey | RangeKey, FamilyKey>> = {
  sphere: 'power', cyl: 'cyl', axis: 'axis', dir: 'dir', maxPrism: 'maxPrism', decimals: 'decimals',
  frontRule: 'frontMode', power: 'power',
};

/** The form field a range or lens key is typed in. */
export function familyFieldOf(key: FieldKey | RangeKey): FamilyKey | null {
  const mapped = FIELD_OF_KEY[key];
  if (mapped) return mapped;
  return key in FAMILY_LABELS ? (key as FamilyKey) : null;
}

/** Messages name the form's fields (readRangeSpec's labeller). */
export const familyLabel: RangeLabeller = (key) => {
  const f = familyFieldOf(key);
  return f ? FAMILY_LABELS[f] : key;
};

/** The form field a message names (the InputError's field), or null. */
export function fieldOfLabel(label: string): FamilyKey | null {
  for (const [k, v] of Object.entries(FAMILY_LABELS)) if (v === label) return k as FamilyKey;
  return null;
}

/**
 * The family's lens as a single-lens case (the demo's conics and toric form, which the range
 * form does not edit), with the given prescription and point.
 */
export function familyViewCase(f: FamilyForm, rx: { sphere: string; cyl: string; axis: string }, point: { dirDeg: number; distMm: number } | null): ViewCase {
  const c: ViewCase = {
    ...DEMO_CASE,
    eye: f.eye, material: f.material, index: f.index, abbe: f.abbe,
    frontMode: f.frontMode, front: f.front, base: f.base, toolIndex: f.toolIndex,
    thicknessMode: f.thicknessMode, ct: f.ct, minEdge: f.minEdge, minCt: f.minCt, diameter: f.diameter,
    cylOn: f.cylOn, cr: f.cr,
    sphere: rx.sphere, cyl: rx.cyl, axis: rx.axis,
    pointMode: 'xy', x: '0', y: '0', dir: '0', dist: '0',
  };
  if (point) {
    c.pointMode = 'polar';
    c.dir = String(Number(point.dirDeg.toFixed(4)));
    c.dist = String(point.distMm);
  }
  return c;
}

/** The range module's request for the form (not yet checked: readRangeSpec does that). */
export function rangeInput(f: FamilyForm): RangeInput {
  const fields = toRawFields(familyViewCase(f, { sphere: '0', cyl: '0', axis: '0' }, null), { dir: 'direction', dist: 'distance' });
  return { power: f.power, cyl: f.cyl, axis: f.axis, dir: f.dir, maxPrism: f.maxPrism, decimals: f.decimals, fields };
}


/**
 * The command line's words for the family: `decentra limits` (or `spec`) with the range
 * flags and the lens flags, as the CLI reads them (docs/cli.md).
 */
export function commandWords(f: FamilyForm, command: 'limits' | 'spec'): string[] {
  const inp = rangeInput(f);
  const words: string[] = [command, '--power', f.power.trim()];
  if (f.cyl.trim() !== '') words.push('--cyl', f.cyl.trim());
  if (f.axis.trim() !== '') words.push('--axis', f.axis.trim());
  if (f.dir.trim() !== '') words.push('--dir', f.dir.trim());
  words.push('--max-prism', f.maxPrism.trim());
  for (const [k, v] of Object.entries(inp.fields)) {
    if (k === 'sphere' || k === 'cyl' || k === 'axis' || k === 'x' || k === 'y') continue;
    if (v === undefined || v === null || String(v).trim() === '') continue;
    words.push(flagOf(k), String(v).trim());
  }
  if (command === 'spec' && f.levels.trim() !== '') words.push('--levels', f.levels.trim());
  if (f.decimals.trim() !== '') words.push('--decimals', f.decimals.trim());
  return words;
}

/** The command line, for a person to copy. */
export function commandLine(words: readonly string[]): string {
  return ['decentra', ...words].map(shellWord).join(' ');
}

/** The decentration a cell opens the single-lens view at: the cell's limit, to 0.01 mm below. */
export function cellDecentrationMm(row: RangeRow, column: 'exact' | 'firstOrder' | 'prentice' | 'focimeter'): number | null {
  const v = row[column];
  if (v === null || !Number.isFinite(v)) return null;
  return Math.max(0, Math.floor(v * 100 + 1e-9) / 100);
}
