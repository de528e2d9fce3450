/* Plain C reference for the iontrail space-charge benchmark: direct Coulomb field with Plummer
 * softening, symmetric pair loop (one inverse distance per pair, Newton's third law), the same
 * physics and loop shape as sim/spacecharge/direct.ts. Built with `cc -O2` by
 * test/bench/spacecharge.bench.ts. Usage: spacecharge N SECONDS -> prints "pairs_per_s checksum". */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static double now(void) {
  struct timespec t;
  clock_gettime(CLOCK_MONOTONIC, &t);
  return t.tv_sec + 1e-9 * t.tv_nsec;
}

static void field(int n, const double *x, const double *y, const double *z, const double *q,
                  double eps2, double *ex, double *ey, double *ez) {
  for (int i = 0; i < n; i++) ex[i] = ey[i] = ez[i] = 0.0;
  for (int i = 0; i < n; i++) {
    double xi = x[i], yi = y[i], zi = z[i], qi = q[i];
    double fx = ex[i], fy = ey[i], fz = ez[i];
    for (int j = i + 1; j < n; j++) {
      double dx = xi - x[j], dy = yi - y[j], dz = zi - z[j];
      double r2 = dx * dx + dy * dy + dz * dz + eps2;
      double inv3 = 1.0 / (r2 * sqrt(r2));
      double gx = dx * inv3, gy = dy * inv3, gz = dz * inv3;
      double qj = q[j];
      fx += gx * qj; fy += gy * qj; fz += gz * qj;
      ex[j] -= gx * qi; ey[j] -= gy * qi; ez[j] -= gz * qi;
    }
    ex[i] = fx; ey[i] = fy; ez[i] = fz;
  }
}

int main(int argc, char **argv) {
  if (argc < 3) { fprintf(stderr, "usage: spacecharge N SECONDS\n"); return 2; }
  int n = atoi(argv[1]);
  double secs = atof(argv[2]);
  double *b = malloc(sizeof(double) * 7 * (size_t)n);
  double *x = b, *y = b + n, *z = b + 2 * n, *q = b + 3 * n, *ex = b + 4 * n, *ey = b + 5 * n, *ez = b + 6 * n;
  const double R = 1e-4, e = 1.602176634e-19;
  for (int i = 0; i < n; i++) {
    x[i] = R * sin(0.7 * i + 0.1); y[i] = R * sin(1.3 * i + 0.2); z[i] = R * sin(2.9 * i + 0.3); q[i] = e;
  }
  double eps2 = 1e-18;
  long reps = 0;
  double best = 1e300;
  double t0 = now();
  while (now() - t0 < secs || reps < 3) {
    double a = now();
    field(n, x, y, z, q, eps2, ex, ey, ez);
    double dt = now() - a;
    if (dt < best) best = dt;
    reps++;
  }
  double s = 0;
  for (int i = 0; i < n; i++) s += fabs(ex[i]) + fabs(ey[i]) + fabs(ez[i]);
  printf("%.6e %.17e\n", 0.5 * (double)n * (n - 1) / best, s);
  free(b);
  return 0;
}
