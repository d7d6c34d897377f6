// Engine fuzz (fast-check): for valid input, no NaN and no Infinity anywhere in a result of
// solveFixation, fourAnswersPlaced or binocular, whatever the status (a miss is a status, and
// every number beside it is still a number). DEVELOPERS.md, house rule "No NaN or Infinity
// reaches a screen or a file"; the ranges are the case limits (src/case/lensCase.ts LIMITS).
//
// Runs: 10^4 here (CI). For a nightly-size run set DECENTRA_FUZZ_RUNS, e.g.
//   DECENTRA_FUZZ_RUNS=100000 npx vitest run tests/property/finite.fuzz.test.ts
// (docs/performance.md, "Engine fuzz").
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  type BinocularTarget, type Lens, OpticsError, Placement, binocular, fourAnswersPlaced, frontForPower, makeLens, solveFixation,
} from '../../src/optics/index.ts';
import { LIMITS } from '../../src/case/lensCase.ts';

const RUNS = Number(process.env.DECENTRA_FUZZ_RUNS ?? 10_000);
if (!(Number.isInteger(RUNS) && RUNS > 0)) throw new Error(`DECENTRA_FUZZ_RUNS: must be a positive whole number, got '${process.env.DECENTRA_FUZZ_RUNS}'`);
/** per-run cost varies with the lens; allow about 2 ms a run on a slow machine */
const TIMEOUT_MS = Math.max(60_000, RUNS * 3);

/** Paths of every number in `v` that is not finite (objects, arrays and typed arrays walked). */
function nonFinite(v: unknown, path = 'result', out: string[] = [], seen = new Set<unknown>()): string[] {
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) out.push(`${path} = ${v}`);
  } else if (v !== null && typeof v === 'object' && !seen.has(v)) {
    seen.add(v);
    if (ArrayBuffer.isView(v)) {
      const a = v as unknown as Float64Array;
      for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i]!)) out.push(`${path}[${i}] = ${a[i]}`);
    } else {
      for (const [k, x] of Object.entries(v)) nonFinite(x, `${path}.${k}`, out, seen);
    }
  }
  return out;
}

const within = (l: { min: number; max: number }) => fc.double({ min: l.min, max: l.max, noNaN: true, noDefaultInfinity: true });

/** A valid lens form: the prescription within the case limits, a front by Vogel's rule or given. */
const lensArb = fc.record({
  sphereD: within(LIMITS.sphere),
  cylD: fc.oneof(fc.constant(0), within(LIMITS.cyl)),
  axisDeg: within(LIMITS.axis),
  index: fc.double({ min: 1.45, max: 1.9, noNaN: true }),
  front: fc.oneof(fc.constant(null), within(LIMITS.front)),
  ctMm: fc.oneof(fc.constant(null), fc.double({ min: 0.5, max: LIMITS.ct.max, noNaN: true })),
  diameterMm: within(LIMITS.diameter),
  cylOn: fc.constantFrom('back' as const, 'front' as const),
  frontConic: fc.oneof(fc.constant(0), within(LIMITS.conic)),
});

/** The lens, or null when the form is impossible (the engine refuses it with an OpticsError, as it should). */
function build(l: typeof lensArb extends fc.Arbitrary<infer T> ? T : never): Lens | null {
  const frontD = l.front ?? frontForPower({ kind: 'vogel' }, l.sphereD, l.cylD);
  // a plus lens needs centre thickness to keep an edge; a rough form of it (common practice, no source)
  const ctMm = l.ctMm ?? Math.max(1.5, 2 + 0.35 * Math.max(0, l.sphereD) * (l.diameterMm / 60) ** 2);
  try {
    return makeLens({ sphereD: l.sphereD, cylD: l.cylD, axisDeg: l.axisDeg, index: l.index, frontD, ctMm, diameterMm: l.diameterMm, cylOn: l.cylOn, frontConic: l.frontConic });
  } catch (e) {
    if (e instanceof OpticsError) return null;
    throw e;
  }
}

const placementArb = (eye: 'R' | 'L') => fc.record({
  ocXMm: fc.double({ min: -10, max: 10, noNaN: true }),
  ocYMm: fc.double({ min: -10, max: 10, noNaN: true }),
  crDistanceMm: within(LIMITS.cr),
  pantoDeg: within(LIMITS.panto),
  wrapDeg: within(LIMITS.wrap),
}).map((p) => new Placement({ ...p, eye }));

/** z of a distant direction: ordinary, tiny (5e-324 is the smallest double), zero or behind. */
const dirZ = fc.oneof(
  fc.double({ min: 0.05, max: 1, noNaN: true }),
  fc.constantFrom(5e-324, 1e-320, 1e-300, 1e-12, 1e-6, 0, -1e-9, -1),
);
const targetArb: fc.Arbitrary<BinocularTarget> = fc.oneof(
  fc.record({ kind: fc.constant('direction' as const), x: fc.double({ min: -1, max: 1, noNaN: true }), y: fc.double({ min: -1, max: 1, noNaN: true }), z: dirZ }),
  fc.record({
    kind: fc.constant('point' as const), x: fc.double({ min: -300, max: 300, noNaN: true }), y: fc.double({ min: -400, max: 300, noNaN: true }),
    z: fc.oneof(fc.double({ min: 100, max: 6000, noNaN: true }), fc.double({ min: -50, max: 100, noNaN: true })),
  }),
  fc.record({ kind: fc.constant('level' as const), belowMm: within(LIMITS.levelBelow), insetMm: within(LIMITS.levelInset) }),
);

describe(`no NaN or Infinity in any engine result for valid input (${RUNS} runs)`, () => {
  it('the self-check sees a NaN and an Infinity (so the property below can fail)', () => {
    expect(nonFinite({ a: [1, { b: NaN }], c: new Float64Array([0, Infinity]) })).toEqual(['result.a.1.b = NaN', 'result.c[1] = Infinity']);
  });

  it('the issue\'s case: a distant direction with z = 5e-324 gives a status and finite numbers', () => {
    const lens = makeLens({ sphereD: -4, cylD: 0, axisDeg: 0, index: 1.6, frontD: 3, ctMm: 2, diameterMm: 60 });
    const pl = new Placement({ ocXMm: 0, ocYMm: 0, crDistanceMm: 27, pantoDeg: 0, wrapDeg: 0, eye: 'R' });
    const f = solveFixation(lens, pl, { kind: 'direction', x: 1, y: 0, z: 5e-324 });
    expect(f.status).not.toBe('ok');
    expect(nonFinite(f)).toEqual([]);
  });

  it('solveFixation, fourAnswersPlaced and binocular', () => {
    let lenses = 0;
    fc.assert(fc.property(
      lensArb, lensArb, placementArb('R'), placementArb('L'), targetArb,
      fc.double({ min: 25, max: 40, noNaN: true }), fc.double({ min: -30, max: 30, noNaN: true }), fc.double({ min: -30, max: 30, noNaN: true }),
      (ls, lsL, plR, plL, target, pd, cx, cy) => {
        const lens = build(ls);
        if (!lens) return;
        lenses++;
        // one eye's answers at any point of the lens's neighbourhood
        const a = fourAnswersPlaced(lens, plR, cx, cy, 'R');
        expect(nonFinite(a, 'fourAnswersPlaced')).toEqual([]);
        if (target.kind !== 'level') {
          const f = solveFixation(lens, plR, target);
          expect(nonFinite(f, 'solveFixation')).toEqual([]);
        }
        // both eyes: the left lens may be the same form or another one
        const lensL = build(lsL) ?? lens;
        const b = binocular({ lens, placement: plR, pdMm: pd }, { lens: lensL, placement: plL, pdMm: pd }, target);
        expect(nonFinite(b, 'binocular')).toEqual([]);
      },
    ), { numRuns: RUNS });
    // most generated forms must be real lenses, or the property tested little
    expect(lenses).toBeGreaterThan(RUNS / 2);
  }, TIMEOUT_MS);
});
