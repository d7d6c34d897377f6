/**
 * The library (docs/api.md) as a user gets it: the package is built (npm run build:api) and
 * packed (npm pack), the tarball is unpacked into a scratch project's node_modules outside this
 * tree (so nothing of our node_modules can be found), and docs/api.md's example, taken from the
 * doc itself, runs there with node. A second script checks that invalid arguments throw the
 * documented DecentraError naming the argument, and a TypeScript consumer type-checks against
 * the shipped declarations with our own typescript.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const ROOT = resolve(import.meta.dirname, '../..');
let work = '';
let scratch = '';
let tarball = '';
let listing: string[] = [];

function node(file: string): { out: string; err: string; status: number | null } {
  const r = spawnSync(process.execPath, [file], { cwd: scratch, encoding: 'utf8', timeout: 60_000 });
  return { out: r.stdout, err: r.stderr, status: r.status };
}

/** The example between the markers in docs/api.md, without its code fence. */
function docExample(): string {
  const doc = readFileSync(join(ROOT, 'docs/api.md'), 'utf8');
  const m = /<!-- api-example: start -->\n```js\n([\s\S]*?)```\n<!-- api-example: end -->/.exec(doc);
  if (!m) throw new Error('docs/api.md has no example between the api-example markers');
  return m[1]!;
}

beforeAll(() => {
  execFileSync('npm', ['run', '-s', 'build:api'], { cwd: ROOT, stdio: 'pipe' });
  work = mkdtempSync(join(tmpdir(), 'decentra-api-'));
  // scripts are not run here: build:api ran just above, and `prepare` would also rebuild the
  // CLI bundle that other tests are using; that prepare builds the API is checked below
  const packed = JSON.parse(execFileSync('npm', ['pack', '--ignore-scripts', '--json', '--pack-destination', work], { cwd: ROOT, encoding: 'utf8' }));
  tarball = join(work, packed[0].filename as string);
  listing = execFileSync('tar', ['-tzf', tarball], { encoding: 'utf8' }).split('\n').filter(Boolean);
  scratch = join(work, 'scratch');
  const dest = join(scratch, 'node_modules', 'decentra');
  mkdirSync(dest, { recursive: true });
  execFileSync('tar', ['-xzf', tarball, '-C', dest, '--strip-components=1']);
  writeFileSync(join(scratch, 'package.json'), JSON.stringify({ name: 'scratch', private: true, type: 'module' }));
}, 180_000);

afterAll(() => {
  if (work) rmSync(work, { recursive: true, force: true });
});

describe('the packed package', () => {
  it('holds the library bundle and its declarations, and prepare builds them', () => {
    expect(listing).toContain('package/dist-api/index.mjs');
    expect(listing).toContain('package/dist-api/types/api/index.d.ts');
    expect(listing).toContain('package/bin/decentra.mjs');
    expect(listing.some((f) => f.startsWith('package/src/'))).toBe(false);
    const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8'));
    expect(pkg.scripts.prepare).toContain('build:api');
    expect(pkg.scripts.prepare).toContain('build:cli');
    expect(pkg.exports['.'].import).toBe('./dist-api/index.mjs');
  });

  it('bundles its dependencies and leaves out the app and mathjs: it imports only node built-ins', () => {
    const bundle = readFileSync(join(scratch, 'node_modules/decentra/dist-api/index.mjs'), 'utf8');
    const imports = [...bundle.matchAll(/^\s*import\s[^;]*?from\s*["']([^"']+)["']/gm)].map((m) => m[1]!);
    expect(imports.filter((s) => !s.startsWith('node:'))).toEqual([]);
    expect(bundle).not.toMatch(/lil-gui|from ["']three["']|mathjs/);
  });
});

describe('docs/api.md example in a scratch project', () => {
  it('runs and prints Prentice 8.00 Δ base out for 8.00 D at 10 mm, and the refusal', () => {
    writeFileSync(join(scratch, 'example.mjs'), docExample());
    const r = node('example.mjs');
    expect(r.err).toBe('');
    expect(r.status).toBe(0);
    const lines = r.out.trim().split('\n');
    // Prentice 1890: P = c F = 1 cm x 8.00 D = 8.00 Δ; a plus lens acts as prisms base towards
    // its optical centre, so a point nasal of it is base out (common practice, no source)
    expect(lines[0]).toBe('Prentice: 8.00 Δ base out');
    const exact = /^exact: (\d+\.\d\d) Δ base out$/.exec(lines[2]!);
    const firstOrder = /^first-order: (\d+\.\d\d) Δ base out$/.exec(lines[1]!);
    expect(exact).not.toBeNull();
    expect(firstOrder).not.toBeNull();
    // from memory: through a thick plus lens the prism along the line of sight from the
    // centre of rotation exceeds Prentice's c F (the ray meets the lens at an angle)
    expect(Number(exact![1])).toBeGreaterThan(8);
    expect(Number(firstOrder![1])).toBeGreaterThan(8);
    // the documented message (docs/api.md, "Errors")
    expect(lines[3]).toBe('refused: lens.index: must be greater than 1 and at most 2.2, got 0.9');
  });

  it('refuses invalid arguments with DecentraError naming the argument', () => {
    writeFileSync(join(scratch, 'invalid.mjs'), `
import { DecentraError, buildLens, prismAt, near, limits, readCaseFile } from 'decentra';
const lens = buildLens({ sphere: 8, index: 1.5, ct: 8, diameter: 50 });
const cases = {
  'index 1': () => buildLens({ sphere: 2, index: 1 }),
  'index 0.9': () => buildLens({ sphere: 2, index: 0.9 }),
  'ct 0': () => buildLens({ sphere: 2, ct: 0 }),
  'ct -1': () => buildLens({ sphere: 2, ct: -1 }),
  'sphere NaN': () => buildLens({ sphere: NaN }),
  'cyl Infinity': () => buildLens({ sphere: 1, cyl: Infinity }),
  'sphere text': () => buildLens({ sphere: '4,5' }),
  'beyond the lens': () => prismAt(lens, { x: 40, y: 0 }),
  'beyond the lens, y': () => prismAt(lens, { x: 3, y: -26 }),
  'x NaN': () => prismAt(lens, { x: NaN, y: 0 }),
  'eye middle': () => prismAt(lens, { x: 0, y: 0, eye: 'middle' }),
  'not a lens': () => prismAt({ sphere: 8 }, { x: 0, y: 0 }),
  'unknown option': () => buildLens({ sphere: 2, colour: 'red' }),
  'maxPrism 0': () => limits(lens, { maxPrism: 0, direction: 'nasal' }),
  'direction sideways': () => limits(lens, { maxPrism: 1, direction: 'sideways' }),
  'near target z NaN': () => near(lens, { at: { x: 0, y: 0, z: NaN } }),
  'case not JSON': () => readCaseFile('{'),
};
const out = {};
for (const [k, f] of Object.entries(cases)) {
  try { f(); out[k] = 'no error'; }
  catch (e) { out[k] = { isDecentra: e instanceof DecentraError, name: e.name, argument: e.argument, message: e.message }; }
}
console.log(JSON.stringify(out));
`);
    const r = node('invalid.mjs');
    expect(r.err).toBe('');
    const got = JSON.parse(r.out) as Record<string, { isDecentra: boolean; name: string; argument: string; message: string }>;
    const expected: Record<string, string> = {
      'index 1': 'lens.index', 'index 0.9': 'lens.index', 'ct 0': 'lens.ct', 'ct -1': 'lens.ct',
      'sphere NaN': 'lens.sphere', 'cyl Infinity': 'lens.cyl', 'sphere text': 'lens.sphere',
      'beyond the lens': 'point.x', 'beyond the lens, y': 'point.y', 'x NaN': 'point.x', 'eye middle': 'point.eye',
      'not a lens': 'lens', 'unknown option': 'lens.colour', 'maxPrism 0': 'options.maxPrism',
      'direction sideways': 'options.direction', 'near target z NaN': 'options.at.z', 'case not JSON': 'case.file',
    };
    for (const [k, argument] of Object.entries(expected)) {
      expect(got[k], k).toMatchObject({ isDecentra: true, name: 'DecentraError', argument });
      expect(got[k]!.message.startsWith(`${argument}: `), k).toBe(true);
    }
  });

  it('type-checks a TypeScript consumer against the shipped declarations', () => {
    writeFileSync(join(scratch, 'tsconfig.json'), JSON.stringify({
      compilerOptions: { target: 'ES2022', module: 'NodeNext', moduleResolution: 'NodeNext', strict: true, noEmit: true, types: [] },
      files: ['consumer.ts'],
    }));
    writeFileSync(join(scratch, 'consumer.ts'), `
import { DecentraError, buildLens, prismAt, limits, near, fitCase, readCaseFile, writeCaseFile, importFhir, exportFhir } from 'decentra';
import type { Answers, Failure, FitSummary, Lens, LensOptions, LimitResult, NearResult, Power, Prism } from 'decentra';
const options: LensOptions = { sphere: 8, index: 1.5, ct: 8, diameter: 50 };
const lens: Lens = buildLens(options);
const a: Answers = prismAt(lens, { x: 10, y: 0, eye: 'R' });
const exact: Prism | Failure = a.exact;
const size: number = 'failure' in exact ? 0 : exact.magnitude;
const l: LimitResult = limits(lens, { maxPrism: 1, direction: 'nasal' });
const n: NearResult = near(lens, { at: { x: 0, y: -40, z: 400 } });
const step: number = n.status === 'ok' ? n.visualPoint.y : 0;
const drop: number = near(lens, { at: { x: 0, y: -40, z: 400 }, panto: 8, tiltDrop: 'rule-of-thumb' }).placed.tiltDrop;
const atMark: Answers = prismAt(lens, { x: 0, y: -2, from: 'mark', ocX: 2, panto: 8 });
const markX: number = atMark.mark ? atMark.mark.x : 0;
const power: Power | Failure = atMark.power;
const sph: number = 'failure' in power ? 0 : power.sphere;
const f: (t: string) => FitSummary = (t) => fitCase(readCaseFile(t));
const w: (t: string) => string = (t) => writeCaseFile(importFhir(t, { pd: { right: 31, left: 32 } }).case);
const e: object = exportFhir(readCaseFile('{}')).resource;
const err: DecentraError = new DecentraError('x', 'why');
const why: string = err.argument + err.reason;
// @ts-expect-error the sphere is a number
buildLens({ sphere: '4' });
// @ts-expect-error the sphere is required
buildLens({ cyl: 1 });
// @ts-expect-error an eye is 'R' or 'L'
prismAt(lens, { x: 0, y: 0, eye: 'middle' });
// @ts-expect-error a lens summary is read-only
lens.index = 1.6;
// @ts-expect-error a tilt drop is one of three rules
near(lens, { at: { x: 0, y: 0, z: 400 }, tiltDrop: 'sideways' });
export { size, l, step, f, w, e, why, drop, markX, sph };
`);
    const tsc = join(ROOT, 'node_modules/typescript/bin/tsc');
    const r = spawnSync(process.execPath, [tsc, '-p', join(scratch, 'tsconfig.json')], { cwd: scratch, encoding: 'utf8', timeout: 120_000 });
    expect(r.stdout + r.stderr).toBe('');
    expect(r.status).toBe(0);
  }, 120_000);
});

// The same API in-process (src/api/index.ts), for the calls the scratch project does not run.
describe('the API over the case, FHIR and limits', async () => {
  const api = await import('../../src/api/index.ts');
  const wide = readFileSync(join(ROOT, 'examples/wide-frame-minus.json'), 'utf8');
  const fhirExample = readFileSync(join(ROOT, 'tests/fixtures/fhir/visionprescription-example-33123.r4.json'), 'utf8');

  it('limits: Prentice c = P / F = 1 Δ / 8.00 D = 1.25 mm (Prentice 1890, arithmetic)', () => {
    const r = api.limits(api.buildLens({ sphere: 8, index: 1.5, ct: 8, diameter: 50 }), { maxPrism: 1, direction: 'nasal' });
    expect(r.prentice).toBeCloseTo(1.25, 12);
    expect(r.exactReason).toBe('ok');
    expect(Number.isFinite(r.exact)).toBe(true);
  });

  it('fitCase: -9.50 D with each centre 3 mm out gives Prentice 2.85 Δ base in per eye, 5.70 Δ in all at the marks (Prentice 1890, arithmetic)', () => {
    // the invented example case: frame PD 52 + 18 = 70 mm, wearer 64 mm, centres not decentred
    const f = api.fitCase(api.readCaseFile(wide));
    expect(f.atMarks.prentice!.netHorizontal).toBeCloseTo(5.7, 9);
    expect(f.atMarks.prentice!.verticalImbalance).toBeCloseTo(0, 9);
    expect(f.atMarks.prescribed).toEqual({ netHorizontal: 0, verticalImbalance: 0 });
  });

  it('case files: write then read is the identity on the document', () => {
    const doc = api.readCaseFile(wide);
    expect(api.readCaseFile(api.writeCaseFile(doc))).toEqual(doc);
    expect(() => api.writeCaseFile({ ...doc, right: { ...(doc.right as object), sphere: 'abc' } })).toThrow(api.DecentraError);
  });

  it('FHIR: the published example 33123 imports as written and exports back (HL7 FHIR R4 VisionPrescription example)', () => {
    const r = api.importFhir(fhirExample, { pd: { right: 31, left: 32 } });
    const right = r.case.right as { sphere: number; prism: { amount: number; base: string }[]; pd: number };
    expect(right.sphere).toBe(-2);
    expect(right.pd).toBe(31);
    expect(right.prism).toEqual([{ amount: 0.5, base: 'down' }]);
    const back = api.importFhir(JSON.stringify(api.exportFhir(r.case, '2026-01-01').resource), { pd: { right: 31, left: 32 } });
    expect(back.case.right).toEqual(r.case.right);
    expect(back.case.left).toEqual(r.case.left);
  });

  it('FHIR: a bad resource or option is refused with DecentraError naming the path', () => {
    const bad = JSON.parse(fhirExample);
    bad.lensSpecification[0].eye = 'middle';
    const err = (f: () => unknown): InstanceType<typeof api.DecentraError> => {
      try { f(); } catch (e) { if (e instanceof api.DecentraError) return e; throw e; }
      throw new Error('no error');
    };
    expect(err(() => api.importFhir(JSON.stringify(bad))).argument).toBe('resource.lensSpecification.0.eye');
    expect(err(() => api.importFhir(fhirExample, { pd: { right: NaN, left: 32 } })).argument).toBe('options.pd.right');
    expect(err(() => api.exportFhir(api.readCaseFile(wide), 'yesterday')).argument).toBe('date');
  });

  it('near: a target straight ahead on the optical axis is seen through the optical centre with no prism (symmetry)', () => {
    const n = api.near(api.buildLens({ sphere: -4 }), { at: { x: 0, y: 0, z: 400 } });
    expect(n.status).toBe('ok');
    if (n.status !== 'ok') return;
    expect(Math.hypot(n.visualPoint.x, n.visualPoint.y)).toBeLessThan(1e-9);
    expect(n.answers.prentice.magnitude).toBeLessThan(1e-9);
  });
});
