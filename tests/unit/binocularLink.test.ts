/**
 * A both-eyes case in a link (src/case/url.ts; docs/saving.md, "Links"): the link carries the
 * case document and is read back by the case file's own reader. The expectation is the
 * identity: what goes into a link comes out of it unchanged (a round trip needs no outside
 * source), except the clinician summary's free text, which a link leaves out on purpose. The
 * cases are invented scenarios, not real wearers.
 */
import { describe, expect, it } from 'vitest';
import { type CaseDocument, readCase } from '../../src/case/caseFile.ts';
import {
  BINOCULAR_QUERY_KEY, binocularFromQuery, binocularToQuery, caseFromQuery, queryCarriesBinocular,
} from '../../src/case/url.ts';
import { queryCarriesView } from '../../src/ui/persist/storage.ts';

/** Invented scenario: a near case with prism, a frame, a custom tolerance and odd characters in its title. */
const INVENTED: CaseDocument = {
  format: 'decentra-case',
  version: 2,
  title: 'Invented scenario: R +4.25 & L +3.75 #2 — “near” 100% test',
  note: 'Made up for a test.\nSecond line; a+b=c?',
  frame: { a: 52, b: 36, dbl: 19 },
  pantoDeg: 9,
  wrapDeg: 3,
  tiltDrop: 'rule-of-thumb',
  target: { kind: 'near', distance: 380, below: 120, lateral: -5 },
  tolerance: { profile: 'custom', horizontal: 0.6, vertical: 0.3 },
  right: {
    sphere: 4.25, cyl: -1.25, axis: 12, material: 'resin-1.60', ct: 4.2, pd: 31, decentration: 1.5, fittingHeight: 19,
    prism: [{ amount: 1, base: 'in' }, { amount: 0.5, base: 'up' }],
  },
  left: { sphere: 3.75, cyl: -0.75, axis: 170, index: 1.6, abbe: 42, front: 8, ct: 4, pd: 32.5, oc: { x: -1.2, y: 0.4 }, add: 2 },
};

describe('a both-eyes case in a link', () => {
  it('comes back from its link exactly as it went in (the identity on the document)', () => {
    expect(readCase(INVENTED).doc).toEqual(INVENTED); // the scenario is a valid case
    const q = binocularToQuery(INVENTED);
    const back = binocularFromQuery(q);
    expect(back?.ok).toBe(true);
    if (!back?.ok) return;
    expect(back.case.doc).toEqual(INVENTED);
    // and through a whole address, as a browser hands the query back
    const url = new URL(`http://127.0.0.1:4317/?${q}`);
    const again = binocularFromQuery(url.search);
    expect(again?.ok && again.case.doc).toEqual(INVENTED);
  });

  it('leaves the clinician summary’s free text out of the link', () => {
    const withReport: CaseDocument = { ...INVENTED, report: { recipient: 'Invented recipient', practice: 'Invented practice', reference: 'X-1' } };
    const q = binocularToQuery(withReport);
    expect(q).not.toContain('Invented+recipient');
    expect(decodeURIComponent(q)).not.toContain('recipient');
    const back = binocularFromQuery(q);
    expect(back?.ok && back.case.doc).toEqual(INVENTED);
  });

  it('is one value under its own key, which the single-lens view does not read', () => {
    const q = binocularToQuery(INVENTED);
    expect([...new URLSearchParams(q).keys()]).toEqual([BINOCULAR_QUERY_KEY]);
    expect(queryCarriesBinocular(q)).toBe(true);
    expect(queryCarriesBinocular('sph=-2&cyl=0')).toBe(false);
    // the single-lens view ignores it: its case stays as saved, nothing reported as not understood
    expect(queryCarriesView(q)).toBe(false);
    const base = caseFromQuery('', { sphere: '-2' } as never);
    expect(caseFromQuery(q, { sphere: '-2' } as never)).toEqual(base);
  });

  it('says so when a link carries no both-eyes case', () => {
    expect(binocularFromQuery('')).toBeNull();
    expect(binocularFromQuery('sph=-2')).toBeNull();
  });

  it('refuses a damaged or invalid case whole, naming the field', () => {
    const bad = (doc: unknown) => new URLSearchParams({ [BINOCULAR_QUERY_KEY]: JSON.stringify(doc) }).toString();
    const axis = binocularFromQuery(bad({ ...INVENTED, right: { ...INVENTED.right, axis: 181 } }));
    expect(axis?.ok).toBe(false);
    if (axis && !axis.ok) expect(axis.error.message).toMatch(/^right\.axis: /);
    const pd = binocularFromQuery(bad({ ...INVENTED, left: { ...INVENTED.left, pd: 'wide' } }));
    expect(pd?.ok).toBe(false);
    if (pd && !pd.ok) expect(pd.error.message).toMatch(/left\.pd/);
    // a link cut short in a message: not JSON
    const cut = binocularToQuery(INVENTED).slice(0, 60);
    const c = binocularFromQuery(cut);
    expect(c?.ok).toBe(false);
    if (c && !c.ok) expect(c.error.reason).toMatch(/not valid JSON/);
  });
});
