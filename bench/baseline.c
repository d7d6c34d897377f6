/*
 * Compiled baseline of Decentra's exact line of sight through a spherical lens, for
 * `npm run bench:baseline` (bench/baseline.ts, which compiles and runs it; see
 * docs/performance.md). The same trace as src/optics/trace.ts for a lens with two spherical,
 * untilted surfaces: the back-surface point and normal at the visual point, the ray from the
 * centre of rotation, Snell's law (vector form) into the glass, the stable quadric
 * intersection with the front, the edge and thickness checks, Snell's law out of the glass,
 * and the prism 100 tan(deviation) split along the base direction; the same outputs (every
 * field of a LineTrace), the same order of operations. It is written for this comparison
 * only; the engine itself is the TypeScript.
 *
 * Usage: baseline kFront kBack ctMm index radiusMm solidRadiusMm crZ halfWidthMm size passes
 * (curvatures in 1/mm). Traces a size x size grid of visual points over +-halfWidthMm,
 * `passes` times, from the centre of rotation (0, 0, crZ). Prints one JSON object: traces,
 * seconds (the trace loop only, CLOCK_MONOTONIC) and checksums of the outputs.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

enum { OK = 0, MISS = 1, TIR = 2, GEOMETRY = 3, EDGE = 4 };

typedef struct {
  int status;
  double px, py, prism;
  double sx, sy, sz, bx, by, bz, fx, fy, fz;
  double ax, ay, az, gx, gy, gz, ox, oy, oz;
} Trace;

typedef struct {
  double kF, kB, ct, etaIn, etaOut, radius, solid;
} Lens;

static int fail(Trace *o, int status) {
  o->status = status;
  o->px = 0; o->py = 0; o->prism = 0;
  return status;
}

/* Snell's law, vector form: d (unit) refracted at unit normal n (either orientation). */
static int refract(double *dx, double *dy, double *dz, double nx, double ny, double nz, double eta) {
  double x = *dx, y = *dy, z = *dz;
  double cosi = -(x * nx + y * ny + z * nz);
  if (cosi < 0) { nx = -nx; ny = -ny; nz = -nz; cosi = -cosi; }
  double k = 1 - eta * eta * (1 - cosi * cosi);
  if (k < 0) return 0;
  double g = eta * cosi - sqrt(k);
  *dx = eta * x + g * nx;
  *dy = eta * y + g * ny;
  *dz = eta * z + g * nz;
  return 1;
}

static int line_of_sight(const Lens *L, Trace *o) {
  /* the back-surface point and its normal (a sphere's (kx, ky, q) is of unit length) */
  double cx = o->bx, cy = o->by;
  if (cx * cx + cy * cy > L->radius * L->radius) return fail(o, EDGE);
  double kb = L->kB, r2 = cx * cx + cy * cy, q2 = 1 - kb * kb * r2;
  if (!(q2 > 0) && kb != 0) return fail(o, MISS);
  double q = sqrt(q2);
  double hz = 0 - (kb * r2) / (1 + q), hnx = kb * cx, hny = kb * cy, hnz = q;
  o->bz = hz;
  /* from the centre of rotation to the back point, into the glass */
  double ax = cx - o->sx, ay = cy - o->sy, az = hz - o->sz;
  double len = sqrt(ax * ax + ay * ay + az * az);
  if (!(az > 0)) return fail(o, GEOMETRY);
  double inv = 1 / len;
  ax *= inv; ay *= inv; az *= inv;
  o->ax = ax; o->ay = ay; o->az = az;
  double dx = ax, dy = ay, dz = az;
  if (!refract(&dx, &dy, &dz, hnx, hny, hnz, L->etaIn)) return fail(o, TIR);
  o->gx = dx; o->gy = dy; o->gz = dz;
  /* the front sphere: k(x^2 + y^2 + z^2) + 2z = 0 in its frame, the stable root */
  double k = L->kF;
  double px = o->bx, py = o->by, pz = o->bz - L->ct;
  double qa = k * (dx * dx + dy * dy + 1 * dz * dz);
  double qb = k * (px * dx + py * dy + 1 * pz * dz) + dz;
  double qc = k * (px * px + py * py + 1 * pz * pz) + 2 * pz;
  double disc = qb * qb - qa * qc;
  if (disc < 0) return fail(o, MISS);
  double den = qb >= 0 ? qb + sqrt(disc) : qb - sqrt(disc);
  if (den == 0) return fail(o, MISS);
  double t = -qc / den;
  double x = px + t * dx, y = py + t * dy, z = pz + t * dz;
  double qf = 1 + 1 * k * z;
  if (qf < 0) return fail(o, MISS);
  double nx = k * x, ny = k * y, nz = qf;
  z += L->ct;
  if (!(t > 0)) return fail(o, GEOMETRY);
  if (x * x + y * y > L->radius * L->radius) return fail(o, EDGE);
  o->fx = x; o->fy = y; o->fz = z;
  /* the exit point must lie where the lens has thickness */
  if (x * x + y * y >= L->solid * L->solid) {
    double s2 = x * x + y * y, sq2 = 1 - 1 * kb * kb * s2;
    if (sq2 < 0) return fail(o, GEOMETRY);
    double sq = sqrt(sq2);
    if (sq == 0 && kb != 0) return fail(o, GEOMETRY);
    double sag = (kb * s2) / (1 + sq);
    if (!(z > 0 - sag)) return fail(o, GEOMETRY);
  }
  if (!refract(&dx, &dy, &dz, nx, ny, nz, L->etaOut)) return fail(o, TIR);
  o->ox = dx; o->oy = dy; o->oz = dz;
  /* prism: 100 tan of the deviation between a and o, along the projection of o - a */
  double crx = ay * dz - az * dy, cry = az * dx - ax * dz, crz = ax * dy - ay * dx;
  double sn = sqrt(crx * crx + cry * cry + crz * crz);
  double cs = ax * dx + ay * dy + az * dz;
  if (!(cs > 0)) return fail(o, GEOMETRY);
  o->prism = (100 * sn) / cs;
  double hx = dx - ax, hy = dy - ay;
  double h = sqrt(hx * hx + hy * hy), mag = o->prism;
  if (h == 0 || mag == 0) { o->px = 0; o->py = 0; }
  else { o->px = (mag * hx) / h; o->py = (mag * hy) / h; }
  o->status = OK;
  return OK;
}

int main(int argc, char **argv) {
  if (argc != 11) {
    fprintf(stderr, "usage: baseline kFront kBack ctMm index radiusMm solidRadiusMm crZ halfWidthMm size passes\n");
    return 2;
  }
  double v[8];
  for (int i = 0; i < 8; i++) v[i] = strtod(argv[i + 1], NULL);
  int size = atoi(argv[9]), passes = atoi(argv[10]);
  Lens L = { v[0], v[1], v[2], 1 / v[3], v[3], v[4], v[5] };
  double crZ = v[6], half = v[7], step = 2 * half / (size - 1);
  Trace o = { 0 };
  o.az = 1; o.gz = 1; o.oz = 1;
  double sumPx = 0, sumPy = 0, sumF = 0;
  long ok = 0;
  struct timespec t0, t1;
  clock_gettime(CLOCK_MONOTONIC, &t0);
  for (int p = 0; p < passes; p++) {
    for (int iy = 0; iy < size; iy++) {
      double y = -half + iy * step;
      for (int ix = 0; ix < size; ix++) {
        o.sx = 0; o.sy = 0; o.sz = crZ; o.bx = -half + ix * step; o.by = y;
        if (line_of_sight(&L, &o) == OK) { ok++; sumPx += o.px; sumPy += o.py; sumF += o.fz + o.oz; }
      }
    }
  }
  clock_gettime(CLOCK_MONOTONIC, &t1);
  double seconds = (t1.tv_sec - t0.tv_sec) + 1e-9 * (t1.tv_nsec - t0.tv_nsec);
  printf("{\"traces\":%ld,\"seconds\":%.9f,\"ok\":%ld,\"sumPx\":%.17g,\"sumPy\":%.17g,\"sumF\":%.17g}\n",
         (long)size * size * passes, seconds, ok, sumPx, sumPy, sumF);
  return 0;
}
