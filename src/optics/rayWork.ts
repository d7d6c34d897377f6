/**
 * Unboxed working storage of the per-ray path (docs/performance.md, "Where the time goes").
 *
 * The values that pass between the back-point evaluation and the intersections
 * (surface.ts), Snell's law (refract.ts) and the trace (trace.ts) live here, as the elements
 * of one Float64Array: typed-array elements are raw doubles, read and written without the
 * heap-number box that every double-valued object field has in V8. The public, object-based
 * functions (`Surface.intersect`, `fillPoint`, `refractVec`, ...) copy their arguments in,
 * call the one core that works here, and copy the results out.
 *
 * Layout (index: meaning):
 *   0-2   ray point, lens frame (px, py, pz)
 *   3-5   ray unit direction, lens frame (dx, dy, dz)
 *   6-8   hit point (x, y, z), as in `Hit`
 *   9     hit distance along the ray (t)
 *   10-12 hit unit normal towards +z (nx, ny, nz)
 *   13-15 the ray's point in a surface's own frame (tilted surfaces, torics)
 *   16-18 the ray's direction in that frame
 * surface.ts and trace.ts index it with these numbers written out: an imported constant is a
 * module-variable load in V8 that the optimising compiler does not fold, and named constants
 * measured slower (docs/performance.md). A slot read in the wrong place gives wrong numbers at
 * once, which the reference and property tests catch.
 *
 * Not part of the public API: src/optics/index.ts does not re-export this module. Single
 * threaded, like every module-level scratch object of the engine: a core's results are valid
 * until the next core runs.
 */
export const work = new Float64Array(19);
