/**
 * The bundled demo case: a scenario of our own invention (no real wearer or lens).
 * A +8.00 D high-plus single-vision lens in 1.60 resin for a right eye, made as thin as a
 * 60 mm round blank allows (1.0 mm minimum edge), fitted 27 mm in front of the centre of
 * rotation; the wearer reads through a point 8 mm nasal of the optical centre and 4 mm below
 * it, where Prentice's rule and the real ray part company.
 */
import type { ViewCase } from '../case/url.ts';

export const DEMO_CASE: Readonly<ViewCase> = Object.freeze({
  sphere: '+8.00', cyl: '0', axis: '0', eye: 'R',
  material: 'resin-1.60', index: '1.6', abbe: '42',
  frontMode: 'auto', front: '14', base: '12', toolIndex: '1.53',
  thicknessMode: 'rule', ct: '7.8', minEdge: '1.0', minCt: '2.0', diameter: '60',
  frontK: '0', backK: '0', cylOn: 'back', toric: 'tyre',
  cr: '27',
  pointMode: 'xy', x: '8', y: '-4', dir: '333.4', dist: '8.9',
});

export const DEMO_TITLE = 'Demo case (invented scenario)';
export const DEMO_DESCRIPTION =
  'An invented scenario: +8.00 D high-plus lens in 1.60 resin, right eye, 60 mm blank with a 1.0 mm minimum edge; ' +
  'the wearer looks through a point 8 mm nasal and 4 mm below the optical centre.';
