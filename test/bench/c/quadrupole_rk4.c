/* Plain C RK4 reference for test/bench/engine.bench.ts: the same physics as
 * sim/engine/kernels/quadrupole.ts — ideal quadrupole, x'' = -g x, y'' = +g y,
 * g = 2q(U + V cos θ)/(m r0²), classic RK4 on h = T/n with a half-step cos/sin table, exact exit
 * time from the constant vz; the four RK4 stages written out per step, in scaled variables with a
 * per-ion table of g·h² (the TypeScript kernel applies each step as its amplification matrix
 * instead; quadrupole_rk4_matrix.c does the same in C).
 * Loss when x² + y² >= r0². Plain C, single thread, built with cc -O2.
 * usage: quadrupole_rk4 N_IONS  → prints "ion_steps seconds detected" */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static unsigned long long rng = 88172645463325252ULL;
static double uni(void) { rng ^= rng << 13; rng ^= rng >> 7; rng ^= rng << 17; return ((rng >> 11) + 0.5) / 9007199254740992.0; }
static double gauss(void) { double u1 = uni(), u2 = uni(); return sqrt(-2 * log(u1)) * cos(2 * M_PI * u2); }

int main(int argc, char **argv) {
  int nIons = argc > 1 ? atoi(argv[1]) : 20000;
  const double e = 1.602176634e-19, u = 1.66053906660e-27;
  const double m = 502 * u, q = e, r0 = 4e-3, L = 0.150, f = 1.2e6, V = 600, U = 40;
  const int spc = 40;
  const double h = 1 / f / spc;
  const double kh = 2 * q * h * h / (m * r0 * r0);
  double G[2 * 40 + 1];
  const double maxTime = 300e-6;
  double *cosT = malloc(sizeof(double) * (2 * spc + 1)), *sinT = malloc(sizeof(double) * (2 * spc + 1));
  for (int j = 0; j <= 2 * spc; j++) { cosT[j] = cos(M_PI * j / spc); sinT[j] = sin(M_PI * j / spc); }
  long long steps = 0; int detected = 0;
  struct timespec t0, t1;
  clock_gettime(CLOCK_MONOTONIC, &t0);
  for (int ion = 0; ion < nIons; ion++) {
    double x = 1e-4 * gauss(), y = 1e-4 * gauss();
    double ke = fabs(5 + 0.2 * gauss()) * e, speed = sqrt(2 * ke / m);
    double tx = 0.0174533 * gauss(), ty = 0.0174533 * gauss(), th = hypot(tx, ty), s = sin(th);
    double vx = th > 0 ? speed * s * tx / th : 0, vy = th > 0 ? speed * s * ty / th : 0, vz = speed * cos(th), z = 0;
    double psi = 2 * M_PI * uni(), cp = cos(psi), sp = sin(psi);
    double tExit = (L - z) / vz, span = tExit < maxTime ? tExit : maxTime;
    long full = (long)floor(span / h);
    /* Scaled variables as in the TypeScript kernel: X = x/r0, P = h vx/r0, G = g h^2 per half step. */
    for (int j = 0; j <= 2 * spc; j++) G[j] = kh * (U + V * (cosT[j] * cp - sinT[j] * sp));
    double X = x / r0, Y = y / r0, PX = vx * h / r0, PY = vy * h / r0;
    int j = 0, hit = 0;
    for (long n = 0; n < full; n++) {
      double g0 = G[j], g1 = G[j + 1], g2 = G[j + 2];
      double ax1 = -g0 * X;
      double X2 = X + 0.5 * PX, P2 = PX + 0.5 * ax1, ax2 = -g1 * X2;
      double X3 = X + 0.5 * P2, P3 = PX + 0.5 * ax2, ax3 = -g1 * X3;
      double X4 = X + P3, P4 = PX + ax3, ax4 = -g2 * X4;
      X += (PX + 2 * P2 + 2 * P3 + P4) * (1.0 / 6);
      PX += (ax1 + 2 * ax2 + 2 * ax3 + ax4) * (1.0 / 6);
      double ay1 = g0 * Y;
      double Y2 = Y + 0.5 * PY, Q2 = PY + 0.5 * ay1, ay2 = g1 * Y2;
      double Y3 = Y + 0.5 * Q2, Q3 = PY + 0.5 * ay2, ay3 = g1 * Y3;
      double Y4 = Y + Q3, Q4 = PY + ay3, ay4 = g2 * Y4;
      Y += (PY + 2 * Q2 + 2 * Q3 + Q4) * (1.0 / 6);
      PY += (ay1 + 2 * ay2 + 2 * ay3 + ay4) * (1.0 / 6);
      steps++;
      j += 2; if (j == 2 * spc) j = 0;
      if (X * X + Y * Y >= 1) { hit = 1; break; }
    }
    z += full * h * vz;
    if (!hit) { steps++; if (X * X + Y * Y < 1) detected++; }
  }
  clock_gettime(CLOCK_MONOTONIC, &t1);
  double sec = (t1.tv_sec - t0.tv_sec) + 1e-9 * (t1.tv_nsec - t0.tv_nsec);
  printf("%lld %.6f %d\n", steps, sec, detected);
  return 0;
}
