/**
 * The case <-> URL serialisation (src/case/url.ts), in Node: no browser needed. The page-level
 * round trip (link, reload) is in visualiser.e2e.ts.
 */
import { expect, test } from '@playwright/test';
import { DEFAULT_DISPLAY, type ViewCase, caseFromQuery, caseToQuery, toRawFields } from '../../src/case/url.ts';
import { InputError } from '../../src/case/input.ts';
import { DEMO_CASE } from '../../src/demo/demoCase.ts';

const labels = { dir: 'direction', dist: 'distance from OC' };

test('every field and the display survive a round trip', () => {
  const c: ViewCase = {
    ...DEMO_CASE, sphere: '-4.75', cyl: '-1.50', axis: '170', eye: 'L', material: 'custom', index: '1.67', abbe: '32',
    frontMode: 'nominal', base: '4', toolIndex: '1.53', thicknessMode: 'centre', ct: '0.22 cm', frontK: '-0.5',
    cylOn: 'front', toric: 'barrel', cr: '26', pointMode: 'polar', dir: '200', dist: '12',
  };
  const d = { mag: 10, mapQuantity: 'error' as const, tab: 'map' as const, labels: false, focimeterRay: true };
  const back = caseFromQuery(caseToQuery(c, d), DEMO_CASE);
  expect(back.viewCase).toEqual(c);
  expect(back.display).toEqual(d);
  expect(back.ignored).toEqual([]);
});

test('unknown choices are ignored and named; text is kept for validation, clipped', () => {
  const q = 'eye=X&fm=magic&tm=centre&sph=abc&mag=7&tab=nowhere&x=' + '9'.repeat(80);
  const r = caseFromQuery(q, DEMO_CASE);
  expect(r.viewCase.eye).toBe(DEMO_CASE.eye);
  expect(r.viewCase.frontMode).toBe(DEMO_CASE.frontMode);
  expect(r.viewCase.thicknessMode).toBe('centre');
  expect(r.viewCase.sphere).toBe('abc');
  expect(r.viewCase.x).toHaveLength(40);
  expect(r.display.mag).toBe(DEFAULT_DISPLAY.mag);
  expect(r.display.tab).toBe(DEFAULT_DISPLAY.tab);
  expect(r.ignored).toEqual(['eye=X', 'fm=magic', 'mag=7', 'tab=nowhere']);
});

test('an empty query is the base case', () => {
  expect(caseFromQuery('', DEMO_CASE).viewCase).toEqual(DEMO_CASE);
});

test('raw fields follow the modes; polar points become x, y (plane geometry)', () => {
  const f = toRawFields({ ...DEMO_CASE, pointMode: 'polar', dir: '90', dist: '5 mm', material: 'custom', index: '1.7' }, labels);
  expect(f.x).toBe(0);
  expect(f.y).toBe(5);
  expect(f.index).toBe('1.7');
  expect(f.material).toBeUndefined();
  expect(f.frontRule).toBe('vogel');
  expect(f.minEdge).toBe(DEMO_CASE.minEdge);
  expect(f.ct).toBeUndefined();
  // direction 180°, 1 cm: 10 mm towards -x (a value in cm is converted, never taken as mm)
  const g = toRawFields({ ...DEMO_CASE, pointMode: 'polar', dir: '180', dist: '1 cm' }, labels);
  expect(g.x).toBe(-10);
  expect(g.y).toBe(0);
});

test('a bad direction or distance names its field', () => {
  expect(() => toRawFields({ ...DEMO_CASE, pointMode: 'polar', dir: '400', dist: '5' }, labels))
    .toThrow(new InputError('direction', 'must be between 0 and 360 degrees, got 400'));
  expect(() => toRawFields({ ...DEMO_CASE, pointMode: 'polar', dir: '10', dist: 'far' }, labels)).toThrow(/distance from OC/);
});
