/* Plain C RK4 reference for test/bench/multipole.bench.ts: the same physics as
 * sim/stages/multipole/kernel.ts: ideal multipole of 2n rods, Φ = (U + V cos θ) Re(w^n),
 * w = (x + i y)/r0, so x'' = -k g Re w^(n-1), y'' = +k g Im w^(n-1), k = q n/(m r0); classic RK4 on
 * h = T/steps with a half-step cos/sin table and the ion's start phase by one rotation, w^(n-1) by
 * complex multiplication, free flight in z, exit time from the constant vz. Loss when
 * x² + y² >= r0². Plain C, single thread, built with cc -O2.
 * usage: multipole_rk4 N_IONS → prints "ion_steps seconds transmitted" */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static unsigned long long rng = 88172645463325252ULL;
static double uni(void) { rng ^= rng << 13; rng ^= rng >> 7; rng ^= rng << 17; return ((rng >> 11) + 0.5) / 9007199254740992.0; }
static double gauss(void) { double u1 = uni(), u2 = uni(); return sqrt(-2 * log(u1)) * cos(2 * M_PI * u2); }

int main(int argc, char **argv) {
  int nIons = argc > 1 ? atoi(argv[1]) : 5000;
  const double e = 1.602176634e-19, u = 1.66053906660e-27;
  const int poles = 8, n = poles / 2, pw = n - 1;
  const double m = 200 * u, q = e, r0 = 3e-3, L = 0.2, f = 2e6, V = 150, U = 0;
  const int spc = 40;
  const double h = 1 / f / spc, hh = 0.5 * h, h6 = h / 6, ir0 = 1 / r0, r0sq = r0 * r0;
  const double k = q * n / (m * r0), kU = k * U, kV = k * V;
  const double maxTime = 1e-3;
  double *cosT = malloc(sizeof(double) * (2 * spc + 1)), *sinT = malloc(sizeof(double) * (2 * spc + 1));
  for (int j = 0; j <= 2 * spc; j++) { cosT[j] = cos(M_PI * j / spc); sinT[j] = sin(M_PI * j / spc); }
  long long steps = 0; int transmitted = 0;
  struct timespec t0, t1;
  clock_gettime(CLOCK_MONOTONIC, &t0);
  for (int ion = 0; ion < nIons; ion++) {
    double x = 3e-4 * gauss(), y = 3e-4 * gauss();
    double ke = fabs(2 + 0.2 * gauss()) * e, speed = sqrt(2 * ke / m);
    double tx = 0.0349066 * gauss(), ty = 0.0349066 * gauss(), th = hypot(tx, ty), s = sin(th);
    double vx = th > 0 ? speed * s * tx / th : 0, vy = th > 0 ? speed * s * ty / th : 0, vz = speed * cos(th);
    double psi = 2 * M_PI * uni(), cp = cos(psi), sp = sin(psi);
    double tExit = L / vz, span = tExit < maxTime ? tExit : maxTime;
    long full = (long)floor(span / h);
    int j = 0, hit = 0;
    for (long st = 0; st < full; st++) {
      double g0 = kU + kV * (cosT[j] * cp - sinT[j] * sp);
      double g1 = kU + kV * (cosT[j + 1] * cp - sinT[j + 1] * sp);
      double g2 = kU + kV * (cosT[j + 2] * cp - sinT[j + 2] * sp);
      double X = x * ir0, Y = y * ir0, pr = X, pi = Y, t;
      for (int c = 1; c < pw; c++) { t = pr * X - pi * Y; pi = pr * Y + pi * X; pr = t; }
      double ax1 = -g0 * pr, ay1 = g0 * pi;
      double x2 = x + hh * vx, y2 = y + hh * vy, vx2 = vx + hh * ax1, vy2 = vy + hh * ay1;
      X = x2 * ir0; Y = y2 * ir0; pr = X; pi = Y;
      for (int c = 1; c < pw; c++) { t = pr * X - pi * Y; pi = pr * Y + pi * X; pr = t; }
      double ax2 = -g1 * pr, ay2 = g1 * pi;
      double x3 = x + hh * vx2, y3 = y + hh * vy2, vx3 = vx + hh * ax2, vy3 = vy + hh * ay2;
      X = x3 * ir0; Y = y3 * ir0; pr = X; pi = Y;
      for (int c = 1; c < pw; c++) { t = pr * X - pi * Y; pi = pr * Y + pi * X; pr = t; }
      double ax3 = -g1 * pr, ay3 = g1 * pi;
      double x4 = x + h * vx3, y4 = y + h * vy3, vx4 = vx + h * ax3, vy4 = vy + h * ay3;
      X = x4 * ir0; Y = y4 * ir0; pr = X; pi = Y;
      for (int c = 1; c < pw; c++) { t = pr * X - pi * Y; pi = pr * Y + pi * X; pr = t; }
      double ax4 = -g2 * pr, ay4 = g2 * pi;
      x += h6 * (vx + 2 * vx2 + 2 * vx3 + vx4);
      y += h6 * (vy + 2 * vy2 + 2 * vy3 + vy4);
      vx += h6 * (ax1 + 2 * ax2 + 2 * ax3 + ax4);
      vy += h6 * (ay1 + 2 * ay2 + 2 * ay3 + ay4);
      steps++;
      j += 2; if (j == 2 * spc) j = 0;
      if (x * x + y * y >= r0sq) { hit = 1; break; }
    }
    if (!hit) { steps++; transmitted++; }
  }
  clock_gettime(CLOCK_MONOTONIC, &t1);
  double sec = (t1.tv_sec - t0.tv_sec) + 1e-9 * (t1.tv_nsec - t0.tv_nsec);
  printf("%lld %.6f %d\n", steps, sec, transmitted);
  return 0;
}
