/* Monodromy trace of the Mathieu equation u'' + (a - 2q cos 2x) u = 0 over one period pi by classic
 * RK4 (Hairer, Norsett & Wanner I, Table II.1.2), both fundamental solutions, cosines by rotation
 * recurrence re-seeded every 256 steps: the same arithmetic as sim/mathieu/floquet.ts (mathieuRk4).
 * usage: mathieu_monodromy A Q STEPS REPS  ->  prints "trace seconds_per_monodromy mean" */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static double trace(double a, double q, int steps) {
  const double h = M_PI / steps, h2 = h / 2, h6 = h / 6, cr = cos(h), sr = sin(h);
  double u1 = 1, v1 = 0, u2 = 0, v2 = 1, c = 1, s = 0;
  for (int k = 0; k < steps; k++) {
    if ((k & 255) == 0) { c = cos(2.0 * k * h); s = sin(2.0 * k * h); }
    double cm = c * cr - s * sr, sm = s * cr + c * sr;
    double ce = cm * cr - sm * sr, se = sm * cr + cm * sr;
    double w0 = a - 2 * q * c, wm = a - 2 * q * cm, w1 = a - 2 * q * ce;
    double ku1 = v1, kv1 = -w0 * u1, ku2 = v1 + h2 * kv1, kv2 = -wm * (u1 + h2 * ku1);
    double ku3 = v1 + h2 * kv2, kv3 = -wm * (u1 + h2 * ku2), ku4 = v1 + h * kv3, kv4 = -w1 * (u1 + h * ku3);
    u1 += h6 * (ku1 + 2 * (ku2 + ku3) + ku4); v1 += h6 * (kv1 + 2 * (kv2 + kv3) + kv4);
    ku1 = v2; kv1 = -w0 * u2; ku2 = v2 + h2 * kv1; kv2 = -wm * (u2 + h2 * ku1);
    ku3 = v2 + h2 * kv2; kv3 = -wm * (u2 + h2 * ku2); ku4 = v2 + h * kv3; kv4 = -w1 * (u2 + h * ku3);
    u2 += h6 * (ku1 + 2 * (ku2 + ku3) + ku4); v2 += h6 * (kv1 + 2 * (kv2 + kv3) + kv4);
    c = ce; s = se;
  }
  return u1 + v2;
}

int main(int argc, char **argv) {
  if (argc != 5) { fprintf(stderr, "usage: %s A Q STEPS REPS\n", argv[0]); return 2; }
  double a = atof(argv[1]), q = atof(argv[2]);
  int steps = atoi(argv[3]), reps = atoi(argv[4]);
  struct timespec t0, t1;
  double acc = 0;
  clock_gettime(CLOCK_MONOTONIC, &t0);
  for (int r = 0; r < reps; r++) acc += trace(a + 1e-12 * r, q, steps);
  clock_gettime(CLOCK_MONOTONIC, &t1);
  double sec = (t1.tv_sec - t0.tv_sec) + 1e-9 * (t1.tv_nsec - t0.tv_nsec);
  /* acc keeps the timed loop from being optimised away; the printed trace is at a itself. */
  printf("%.17g %.6e %g\n", trace(a, q, steps), sec / reps, acc / reps);
  return 0;
}
