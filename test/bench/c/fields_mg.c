/* Plain C reference of the field solver's algorithm (sim/fields): the 5-point Laplacian on an n × n
 * grid with a grounded box whose top side is at 1 V, solved by BiCGSTAB (right-preconditioned, r̂ = b)
 * with one multigrid V(2,2)-cycle as preconditioner: red–black Gauss–Seidel (red, black before;
 * black, red after), residual restricted by the transpose of bilinear interpolation, bilinear
 * interpolation, banded LU on the coarsest level (n ≤ 5). Vectors have a zero guard of one row.
 * Usage: fields_mg N REPEATS -> prints "seconds iterations residual centre cpu_seconds" (best wall
 * time, and the best CPU time of this process: on a shared machine the CPU time is what compares). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

typedef struct { int n, g, len; double *d, *b, *x; } Level;

static double now(void) { struct timespec t; clock_gettime(CLOCK_MONOTONIC, &t); return t.tv_sec + 1e-9 * t.tv_nsec; }
static double cpu(void) { struct timespec t; clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &t); return t.tv_sec + 1e-9 * t.tv_nsec; }

static void apply_a(const Level *L, const double *x, double *out) {
  int n = L->n;
  for (int j = 0; j < n; j++) for (int i = 0; i < n; i++) {
    int k = L->g + j * n + i; double dn = L->d[k];
    out[k] = dn == 0 ? 0 : dn * x[k] - (x[k - 1] + x[k + 1] + x[k - n] + x[k + n]);
  }
}

static void relax(const Level *L, const double *b, double *x, int colour) {
  int n = L->n;
  for (int j = 0; j < n; j++) for (int i = (colour + j) & 1; i < n; i += 2) {
    int k = L->g + j * n + i; double dn = L->d[k];
    if (dn <= 0) continue;
    x[k] = (b[k] + x[k - 1] + x[k + 1] + x[k - n] + x[k + n]) / dn;
  }
}

static void restrict_res(const Level *f, const double *b, const double *x, const Level *c, double *rc) {
  int n = f->n, nc = c->n;
  memset(rc, 0, sizeof(double) * c->len);
  for (int j = 0; j < n; j++) {
    int jc[2], nj; double wj[2];
    if ((j & 1) == 0) { jc[0] = j >> 1; wj[0] = 1; nj = 1; } else { jc[0] = j >> 1; jc[1] = (j >> 1) + 1; wj[0] = wj[1] = 0.5; nj = 2; }
    for (int i = 0; i < n; i++) {
      int k = f->g + j * n + i; double dn = f->d[k];
      if (dn <= 0) continue;
      double r = b[k] - dn * x[k] + x[k - 1] + x[k + 1] + x[k - n] + x[k + n];
      int ic = i >> 1;
      for (int q = 0; q < nj; q++) {
        int base = c->g + jc[q] * nc;
        if ((i & 1) == 0) rc[base + ic] += wj[q] * r;
        else { rc[base + ic] += wj[q] * 0.5 * r; rc[base + ic + 1] += wj[q] * 0.5 * r; }
      }
    }
  }
  for (int k = 0; k < c->len; k++) if (c->d[k] == 0) rc[k] = 0;
}

static void prolong_add(const Level *f, double *x, const Level *c, const double *ec) {
  int n = f->n, nc = c->n;
  for (int j = 0; j < n; j++) {
    int jc[2], nj; double wj[2];
    if ((j & 1) == 0) { jc[0] = j >> 1; wj[0] = 1; nj = 1; } else { jc[0] = j >> 1; jc[1] = (j >> 1) + 1; wj[0] = wj[1] = 0.5; nj = 2; }
    for (int i = 0; i < n; i++) {
      int k = f->g + j * n + i;
      if (f->d[k] == 0) continue;
      int ic = i >> 1; double v = 0;
      for (int q = 0; q < nj; q++) {
        int base = c->g + jc[q] * nc;
        v += (i & 1) == 0 ? wj[q] * ec[base + ic] : wj[q] * 0.5 * (ec[base + ic] + ec[base + ic + 1]);
      }
      x[k] += v;
    }
  }
}

static double *LU; static int LUbw, LUN;
static void lu_build(const Level *L) {
  int n = L->n, N = n * n, bw = n, W = 2 * bw + 1;
  LU = calloc((size_t)N * W, sizeof(double)); LUbw = bw; LUN = N;
  for (int k = 0; k < N; k++) {
    double dn = L->d[L->g + k];
    LU[k * W + bw] = dn == 0 ? 1 : dn;
    if (dn == 0) continue;
    int off[4] = { -1, 1, -n, n };
    for (int s = 0; s < 4; s++) if (L->d[L->g + k + off[s]] != 0) LU[k * W + bw + off[s]] = -1;
  }
  for (int p = 0; p < N; p++) for (int i = p + 1; i <= (N - 1 < p + bw ? N - 1 : p + bw); i++) {
    double l = LU[i * W + (p - i + bw)] / LU[p * W + bw];
    if (l == 0) continue;
    LU[i * W + (p - i + bw)] = l;
    for (int j = p + 1; j <= (N - 1 < p + bw ? N - 1 : p + bw); j++) LU[i * W + (j - i + bw)] -= l * LU[p * W + (j - p + bw)];
  }
}
static void lu_solve(const Level *L, const double *b, double *x) {
  int bw = LUbw, N = LUN, W = 2 * bw + 1, g = L->g;
  for (int i = 0; i < N; i++) { double s = b[g + i]; for (int q = i - bw < 0 ? 0 : i - bw; q < i; q++) s -= LU[i * W + (q - i + bw)] * x[g + q]; x[g + i] = s; }
  for (int i = N - 1; i >= 0; i--) { double s = x[g + i]; for (int q = i + 1; q <= (N - 1 < i + bw ? N - 1 : i + bw); q++) s -= LU[i * W + (q - i + bw)] * x[g + q]; x[g + i] = s / LU[i * W + bw]; }
}

static Level lv[32]; static int nl;

static void cycle(int l, const double *b, double *x) {
  if (l == nl - 1) { lu_solve(&lv[l], b, x); return; }
  for (int s = 0; s < 2; s++) { relax(&lv[l], b, x, 0); relax(&lv[l], b, x, 1); }
  restrict_res(&lv[l], b, x, &lv[l + 1], lv[l + 1].b);
  memset(lv[l + 1].x, 0, sizeof(double) * lv[l + 1].len);
  cycle(l + 1, lv[l + 1].b, lv[l + 1].x);
  prolong_add(&lv[l], x, &lv[l + 1], lv[l + 1].x);
  for (int s = 0; s < 2; s++) { relax(&lv[l], b, x, 1); relax(&lv[l], b, x, 0); }
}

static void precond(const double *r, double *z) { memset(z, 0, sizeof(double) * lv[0].len); cycle(0, r, z); }

static double dot(const double *a, const double *b, int n) { double s = 0; for (int i = 0; i < n; i++) s += a[i] * b[i]; return s; }

int main(int argc, char **argv) {
  int n = argc > 1 ? atoi(argv[1]) : 1025, reps = argc > 2 ? atoi(argv[2]) : 3;
  for (int m = n; ; m = (m - 1) / 2 + 1) {
    Level *L = &lv[nl++]; L->n = m; L->g = m; L->len = m * m + 2 * m;
    L->d = calloc(L->len, sizeof(double)); L->b = calloc(L->len, sizeof(double)); L->x = calloc(L->len, sizeof(double));
    for (int j = 1; j < m - 1; j++) for (int i = 1; i < m - 1; i++) L->d[L->g + j * m + i] = 4;
    if (m <= 5) break;
  }
  lu_build(&lv[nl - 1]);
  int len = lv[0].len, g = lv[0].g;
  double *x = calloc(len, 8), *r = calloc(len, 8), *p = calloc(len, 8), *v = calloc(len, 8), *t = calloc(len, 8), *y = calloc(len, 8), *hat = calloc(len, 8);
  double best = 1e30, bestCpu = 1e30, res = 0; int iters = 0;
  for (int rep = 0; rep < reps; rep++) {
    double t0 = now(), c0 = cpu();
    memset(r, 0, 8 * len);
    for (int i = 1; i < n - 1; i++) r[g + (n - 2) * n + i] = 1; /* the top side at 1 V */
    memcpy(hat, r, 8 * len); memcpy(p, r, 8 * len); memset(x, 0, 8 * len);
    double bn = sqrt(dot(r, r, len)), rho = dot(hat, r, len);
    for (iters = 1; iters <= 200; iters++) {
      precond(p, y); apply_a(&lv[0], y, v);
      double alpha = rho / dot(hat, v, len), ss = 0;
      for (int i = 0; i < len; i++) { x[i] += alpha * y[i]; r[i] -= alpha * v[i]; ss += r[i] * r[i]; }
      if ((res = sqrt(ss) / bn) <= 1e-10) break;
      precond(r, y); apply_a(&lv[0], y, t);
      double omega = dot(t, r, len) / dot(t, t, len), rr = 0;
      for (int i = 0; i < len; i++) { x[i] += omega * y[i]; r[i] -= omega * t[i]; rr += r[i] * r[i]; }
      if ((res = sqrt(rr) / bn) <= 1e-10) break;
      double rn = dot(hat, r, len), beta = rn / rho * (alpha / omega); rho = rn;
      for (int i = 0; i < len; i++) p[i] = r[i] + beta * (p[i] - omega * v[i]);
    }
    double el = now() - t0, ec = cpu() - c0;
    if (el < best) best = el;
    if (ec < bestCpu) bestCpu = ec;
  }
  printf("%.6f %d %.3e %.12f %.6f\n", best, iters, res, x[g + (n / 2) * n + n / 2], bestCpu);
  return 0;
}
