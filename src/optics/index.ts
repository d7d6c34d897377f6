// The optics engine: numbers in, numbers out. No DOM, no three, no lil-gui.
export * from './errors.ts';
export * from './surface.ts';
export * from './refract.ts';
export * from './powerMatrix.ts';
export * from './lens.ts';
export * from './trace.ts';
export * from './firstOrder.ts';
export * from './notation.ts';
export * from './answers.ts';
export * from './materials.ts';
export * from './map.ts';
export * from './forms.ts';
