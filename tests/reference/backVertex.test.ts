/**
 * Worked back-vertex-power problems (thick lens in air), checked against backVertexPower and
 * against the Lens built from them (its solved back surface).
 *
 * Where the numbers come from: two worked problems from an opticianry teaching web page whose
 * address was not recorded, so the page cannot be cited. Each expected Fv was therefore
 * checked by hand against the thick-lens formula Fv = F1 / (1 - (t/n) F1) + F2 (Jalie, The
 * Principles of Ophthalmic Lenses; from memory): 10.25 / (1 - 0.004/1.586 × 10.25) - 3.00
 * = 7.522 D, and 15.00 / (1 - 0.0065/1.523 × 15.00) - 6.00 = 10.026 D, each 7.52 and 10.03 D
 * to the 0.01 D the problems give.
 */
import { describe, expect, test } from 'vitest';
import { Lens, backVertexPower, equivalentPower } from '../../src/optics/index.ts';

export const source =
  'worked back-vertex-power problems (web page not recorded), checked by hand against ' +
  'Fv = F1 / (1 - (t/n) F1) + F2 (Jalie, The Principles of Ophthalmic Lenses; from memory)';
/** The problems' answers are rounded to 0.01 D: half a unit in the last place. */
export const tolerance = 0.005;
export const cases = [
  { what: 'polycarbonate', n: 1.586, f1: 10.25, f2: -3.0, tMm: 4, fv: 7.52 },
  { what: 'crown glass', n: 1.523, f1: 15.0, f2: -6.0, tMm: 6.5, fv: 10.03 },
];

describe(`back vertex power (${source})`, () => {
  test.each(cases)('$what n $n, F1 $f1, F2 $f2, t $tMm mm -> Fv $fv D', (c) => {
    expect(Math.abs(backVertexPower(c.f1, c.f2, c.n, c.tMm) - c.fv)).toBeLessThan(tolerance);
  });

  test.each(cases)('$what: the Lens for Fv $fv D on front $f1 D solves the back surface to $f2 D', (c) => {
    const lens = new Lens({ sphereD: c.fv, cylD: 0, axisDeg: 0, index: c.n, frontD: c.f1, ctMm: c.tMm });
    // dF2 = dFv, so the rounding of the given Fv carries over unchanged
    expect(Math.abs(lens.backPowers[0] - c.f2)).toBeLessThan(tolerance);
    expect(Math.abs(lens.backPowers[1] - c.f2)).toBeLessThan(tolerance);
    // the surfaces' curvatures are the true powers divided by the index step (F = (n' - n) / r)
    expect(Math.abs(lens.front.curvature * 1000 * (c.n - 1) - c.f1)).toBeLessThan(1e-12);
    expect(Math.abs(lens.back.curvature * 1000 * (1 - c.n) - lens.backPowers[0])).toBeLessThan(1e-12);
    expect(lens.back.vertexZ).toBe(0);
    expect(lens.front.vertexZ).toBe(c.tMm);
  });

  test.each(cases)('$what: Fv = Fe / (1 - (t/n) F1) (Jalie), equivalent power consistent', (c) => {
    const fe = equivalentPower(c.f1, c.f2, c.n, c.tMm);
    const fv = backVertexPower(c.f1, c.f2, c.n, c.tMm);
    expect(Math.abs(fv - fe / (1 - (c.tMm / 1000 / c.n) * c.f1))).toBeLessThan(1e-12);
  });
});
