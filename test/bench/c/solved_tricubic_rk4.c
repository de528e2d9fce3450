/* Plain C reference for test/bench/solved.bench.ts: ions through a solved 3D electrode field, the
 * same arithmetic as sim/fields/interpolate.ts (cubic Hermite per axis whose node derivatives are
 * five-point differences, a 6-tap filter per axis, 216 nodes per point, two interleaved fields:
 * the dc and the rf sums, combined node by node as dc + cr·rf before the sums, the even and odd
 * x taps summed apart, as GridInterpolant.gradientOfPair and its SIMD form pair3.wat do) and sim/stages/electrodes/kernel.ts (classic RK4 on h = T/n, RF phase from
 * a half-step cos/sin table, exit on the end plane along the step's cubic Hermite path). The
 * ions of the benchmark stay clear of the electrodes, so no inside test is written here (the
 * TypeScript kernel still pays its near-mask lookup per step). Single thread, cc -O2.
 * usage: solved_tricubic_rk4 FILE  (written by the benchmark)  → prints "ion_steps seconds checksum" */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

typedef struct { int n; double origin, h; int rlo, rhi; int *cellBase; double *cellStencil; } Axis;
static const double CEN[5] = {1, -8, 0, 8, -1}, NODE0[5] = {-25, 48, -36, 16, -3}, NODE1[5] = {-3, -10, 18, -6, 1};

static void stencil(const Axis *a, int i, int base, double *s) {
  int n = a->n;
  for (int k = 0; k < 6; k++) s[k] = 0;
  if ((i >= 2 || a->rlo) && (i <= n - 3 || a->rhi)) {
    for (int k = 0; k < 5; k++) {
      int j = i - 2 + k;
      if (j < 0) j = -j; else if (j > n - 1) j = 2 * (n - 1) - j;
      s[j - base] += CEN[k] / 12;
    }
  } else if (i <= 1) {
    const double *row = i == 0 ? NODE0 : NODE1;
    for (int k = 0; k < 5; k++) s[k - base] += row[k] / 12;
  } else {
    const double *row = i == n - 1 ? NODE0 : NODE1;
    for (int k = 0; k < 5; k++) s[n - 1 - k - base] -= row[k] / 12;
  }
}

static int weights(const Axis *a, double c, int *bo, double *wv, double *wd) {
  double u = (c - a->origin) / a->h;
  if (!(u >= -1e-9 && u <= a->n - 1 + 1e-9)) return 0;
  int i = (int)floor(u);
  if (i > a->n - 2) i = a->n - 2;
  if (i < 0) i = 0;
  double t = u - i;
  /* The cell's window base and node stencils, computed once per axis (as interpolate.ts does). */
  int base = a->cellBase[i];
  *bo = base;
  const double *sa = a->cellStencil + 12 * i, *sb = sa + 6;
  double t2 = t * t, t3 = t2 * t;
  double h00 = 2 * t3 - 3 * t2 + 1, h10 = t3 - 2 * t2 + t, h01 = -2 * t3 + 3 * t2, h11 = t3 - t2;
  double d00 = 6 * t2 - 6 * t, d10 = 3 * t2 - 4 * t + 1, d01 = -6 * t2 + 6 * t, d11 = 3 * t2 - 2 * t;
  double inv = 1 / a->h;
  for (int k = 0; k < 6; k++) { wv[k] = h10 * sa[k] + h11 * sb[k]; wd[k] = (d10 * sa[k] + d11 * sb[k]) * inv; }
  wv[i - base] += h00; wv[i + 1 - base] += h01;
  wd[i - base] += d00 * inv; wd[i + 1 - base] += d01 * inv;
  return 1;
}

static Axis ax[3];
static double *F;
static int s1, s2;
static double zPlane;
static int mirX, mirY, mirZ;

/* Gradient of the superposition dc + cr·rf at (x, y, z) into g[0..2]; 0 outside. The two node
 * values are combined first, then one pass with three sums (as GridInterpolant.gradientOfPair). */
static int grad(double x, double y, double z, double cr, double *g) {
  double sx = 1, sy = 1, sz = 1;
  if (mirX && x < 0) { x = -x; sx = -1; }
  if (mirY && y < 0) { y = -y; sy = -1; }
  if (mirZ && z < zPlane) { z = 2 * zPlane - z; sz = -1; }
  int b0, b1, b2;
  double v0[6], d0[6], v1[6], d1[6], v2[6], d2[6];
  if (!weights(&ax[0], x, &b0, v0, d0) || !weights(&ax[1], y, &b1, v1, d1) || !weights(&ax[2], z, &b2, v2, d2)) return 0;
  double gx = 0, gy = 0, gz = 0;
  for (int k = 0; k < 6; k++) {
    double pv = 0, px = 0, py = 0;
    for (int j = 0; j < 6; j++) {
      const double *q = F + 2 * ((b2 + k) * s2 + (b1 + j) * s1 + b0);
      /* Even and odd taps summed apart, as the lanes of sim/fields/simd/pair3.wat. */
      double n[6];
      for (int i = 0; i < 6; i++) n[i] = q[2 * i] + cr * q[2 * i + 1];
      double a = (v0[0] * n[0] + v0[2] * n[2] + v0[4] * n[4]) + (v0[1] * n[1] + v0[3] * n[3] + v0[5] * n[5]);
      double e = (d0[0] * n[0] + d0[2] * n[2] + d0[4] * n[4]) + (d0[1] * n[1] + d0[3] * n[3] + d0[5] * n[5]);
      pv += v1[j] * a; px += v1[j] * e; py += d1[j] * a;
    }
    gx += v2[k] * px; gy += v2[k] * py; gz += d2[k] * pv;
  }
  g[0] = sx * gx; g[1] = sy * gy; g[2] = sz * gz;
  return 1;
}

int main(int argc, char **argv) {
  FILE *fp = fopen(argv[1], "rb");
  if (!fp) return 1;
  double hd[24];
  if (fread(hd, sizeof(double), 24, fp) != 24) return 1;
  for (int a = 0; a < 3; a++) { ax[a].n = (int)hd[a]; ax[a].origin = hd[3 + a]; ax[a].h = hd[6]; ax[a].rlo = (int)hd[14 + a]; ax[a].rhi = (int)hd[17 + a]; }
  double L = hd[7], freq = hd[8], V = hd[9], qm = hd[10];
  int spc = (int)hd[11];
  double maxTime = hd[12];
  int nIons = (int)hd[13];
  zPlane = hd[20]; mirX = (int)hd[21]; mirY = (int)hd[22]; mirZ = (int)hd[23];
  double *ions = malloc(sizeof(double) * 7 * nIons);
  if (fread(ions, sizeof(double), 7 * nIons, fp) != (size_t)(7 * nIons)) return 1;
  long nodes = (long)ax[0].n * ax[1].n * ax[2].n;
  F = malloc(sizeof(double) * 2 * nodes);
  if (fread(F, sizeof(double), 2 * nodes, fp) != (size_t)(2 * nodes)) return 1;
  fclose(fp);
  s1 = ax[0].n; s2 = ax[0].n * ax[1].n;
  for (int a = 0; a < 3; a++) {
    Axis *A = &ax[a];
    A->cellBase = malloc(sizeof(int) * (A->n - 1));
    A->cellStencil = malloc(sizeof(double) * 12 * (A->n - 1));
    for (int c = 0; c < A->n - 1; c++) {
      int base = c - 2;
      if (base < 0) base = 0;
      if (base > A->n - 6) base = A->n - 6;
      A->cellBase[c] = base;
      stencil(A, c, base, A->cellStencil + 12 * c);
      stencil(A, c + 1, base, A->cellStencil + 12 * c + 6);
    }
  }
  double h = 1 / freq / spc, omega = 2 * M_PI * freq;
  double *cosT = malloc(sizeof(double) * (2 * spc + 1)), *sinT = malloc(sizeof(double) * (2 * spc + 1));
  for (int j = 0; j <= 2 * spc; j++) { cosT[j] = cos(M_PI * j / spc); sinT[j] = sin(M_PI * j / spc); }
  long long steps = 0;
  double checksum = 0;
  struct timespec t0, t1;
  clock_gettime(CLOCK_MONOTONIC, &t0);
  for (int ion = 0; ion < nIons; ion++) {
    double *p = ions + 7 * ion;
    double x = p[0], y = p[1], z = p[2], vx = p[3], vy = p[4], vz = p[5], tau = p[6];
    double psi = omega * tau, cp = cos(psi), sp = sin(psi);
    long full = (long)floor(maxTime / h);
    int j = 0;
    double g[3];
    for (long n = 0; n < full; n++) {
      double r0 = V * (cosT[j] * cp - sinT[j] * sp), r1 = V * (cosT[j + 1] * cp - sinT[j + 1] * sp), r2 = V * (cosT[j + 2] * cp - sinT[j + 2] * sp);
      double hh = 0.5 * h, h6 = h / 6;
      double zz;
#define ACC(X, Y, Z, R, AX, AY, AZ) zz = (Z) > L ? L : ((Z) < 0 ? 0 : (Z)); if (!grad(X, Y, zz, R, g)) goto lost; AX = -qm * g[0]; AY = -qm * g[1]; AZ = -qm * g[2];
      double k1x, k1y, k1z, k2x, k2y, k2z, k3x, k3y, k3z, k4x, k4y, k4z;
      ACC(x, y, z, r0, k1x, k1y, k1z);
      double x2 = x + hh * vx, y2 = y + hh * vy, z2 = z + hh * vz, u2 = vx + hh * k1x, w2 = vy + hh * k1y, s2v = vz + hh * k1z;
      ACC(x2, y2, z2, r1, k2x, k2y, k2z);
      double x3 = x + hh * u2, y3 = y + hh * w2, z3 = z + hh * s2v, u3 = vx + hh * k2x, w3 = vy + hh * k2y, s3 = vz + hh * k2z;
      ACC(x3, y3, z3, r1, k3x, k3y, k3z);
      double x4 = x + h * u3, y4 = y + h * w3, z4 = z + h * s3, u4 = vx + h * k3x, w4 = vy + h * k3y, s4 = vz + h * k3z;
      ACC(x4, y4, z4, r2, k4x, k4y, k4z);
      double px = x, py = y, pz = z, pvx = vx, pvy = vy, pvz = vz;
      x += h6 * (vx + 2 * u2 + 2 * u3 + u4); y += h6 * (vy + 2 * w2 + 2 * w3 + w4); z += h6 * (vz + 2 * s2v + 2 * s3 + s4);
      vx += h6 * (k1x + 2 * k2x + 2 * k3x + k4x); vy += h6 * (k1y + 2 * k2y + 2 * k3y + k4y); vz += h6 * (k1z + 2 * k2z + 2 * k3z + k4z);
      steps++;
      j += 2; if (j == 2 * spc) j = 0;
      if (z >= L) {
        /* Onto the exit plane along the step's cubic Hermite path, its crossing by Newton's method from the chord's (as kernel.ts). */
        double f = (L - pz) / (z - pz);
        for (int it = 0; it < 4; it++) {
          double f2 = f * f, f3 = f2 * f;
          double zf = (2 * f3 - 3 * f2 + 1) * pz + (f3 - 2 * f2 + f) * h * pvz + (-2 * f3 + 3 * f2) * z + (f3 - f2) * h * vz;
          double dz = (6 * f2 - 6 * f) * pz + (3 * f2 - 4 * f + 1) * h * pvz + (-6 * f2 + 6 * f) * z + (3 * f2 - 2 * f) * h * vz;
          if (!(dz != 0)) break;
          double g = f - (zf - L) / dz;
          f = g < 0 ? 0 : g > 1 ? 1 : g;
        }
        double f2 = f * f, f3 = f2 * f;
        double a0 = 2 * f3 - 3 * f2 + 1, b0 = (f3 - 2 * f2 + f) * h, a1 = -2 * f3 + 3 * f2, b1 = (f3 - f2) * h;
        x = a0 * px + b0 * pvx + a1 * x + b1 * vx; y = a0 * py + b0 * pvy + a1 * y + b1 * vy; z = L;
        break;
      }
    }
    lost:
    checksum += x + y + z;
  }
  clock_gettime(CLOCK_MONOTONIC, &t1);
  printf("%lld %.6f %.17g\n", steps, (t1.tv_sec - t0.tv_sec) + 1e-9 * (t1.tv_nsec - t0.tv_nsec), checksum);
  return 0;
}
