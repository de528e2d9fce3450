/* Same-algorithm C kernel for test/bench/engine.bench.ts: the same physics and arithmetic as
 * sim/engine/kernels/quadrupole.ts — ideal quadrupole, x'' = -g x, y'' = +g y,
 * g = 2q(U + V cos θ)/(m r0²), classic RK4 on h = T/n with a half-step cos/sin table, exact exit
 * time from the constant vz; the loop in scaled variables with a per-ion table of g·h², and each
 * step applied as its RK4 amplification matrix (the stages on the unit vectors), as there.
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
  double G[2 * 40 + 1], M[8 * 40];
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
    for (int p = 0; p < spc; p++) {
      for (int ax = 0; ax < 2; ax++) {
        double sg = ax == 0 ? -1 : 1, g0 = G[2 * p], g1 = G[2 * p + 1], g2 = G[2 * p + 2];
        for (int col = 0; col < 2; col++) {
          double X = col == 0, P = col == 1;
          double a1 = sg * g0 * X;
          double X2 = X + 0.5 * P, P2 = P + 0.5 * a1, a2 = sg * g1 * X2;
          double X3 = X + 0.5 * P2, P3 = P + 0.5 * a2, a3 = sg * g1 * X3;
          double X4 = X + P3, P4 = P + a3, a4 = sg * g2 * X4;
          M[8 * p + 4 * ax + col] = X + (P + 2 * P2 + 2 * P3 + P4) * (1.0 / 6);
          M[8 * p + 4 * ax + 2 + col] = P + (a1 + 2 * a2 + 2 * a3 + a4) * (1.0 / 6);
        }
      }
    }
    double X = x / r0, Y = y / r0, PX = vx * h / r0, PY = vy * h / r0;
    int j = 0, hit = 0;
    for (long n = 0; n < full; n++) {
      const double *m = M + 8 * j;
      double nX = m[0] * X + m[1] * PX, nP = m[2] * X + m[3] * PX;
      double nY = m[4] * Y + m[5] * PY, nQ = m[6] * Y + m[7] * PY;
      X = nX; PX = nP; Y = nY; PY = nQ;
      steps++;
      if (++j == spc) j = 0;
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
