/* Reference kernel for test/bench/scene3d.bench.ts: the same algorithm as
 * render/scene3d/raster/sceneRaster.ts rasteriseBatch + raster/polylines.ts — project each point
 * with the 4×4 view-projection matrix (column-major, as three.js stores it), skip points closer
 * than 0.6 px to the last kept one, cover each segment's capsule with clamp(hw + 0.5 − d, 0, 1)
 * keeping the maximum per pixel, then blend the polyline once (over/under by depth).
 * Plain C, single thread, built with cc -O2.
 * usage: scene3d_polylines INPUT.bin → prints "points seconds alpha_sum"
 * INPUT.bin: int32 W, H, nLines; float32 hw, opacity; float64 m[16]; int32 start[nLines+1];
 *            float32 rgb[3 nLines]; float32 xyz[3 nPoints]. */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static int W, H, nT = 0;
static float *cover, *pdepth, *lc, *la, *ld;
static int *touched;

static void segment(double x0, double y0, double z0, double x1, double y1, double z1, double hw) {
  double dx = x1 - x0, dy = y1 - y0, len2 = dx * dx + dy * dy, inv = len2 > 0 ? 1 / len2 : 0;
  double reach = hw + 1;
  int xMajor = fabs(dx) >= fabs(dy);
  double a0 = xMajor ? fmin(x0, x1) : fmin(y0, y1), a1 = xMajor ? fmax(x0, x1) : fmax(y0, y1);
  double slope = xMajor ? (dx != 0 ? dy / dx : 0) : (dy != 0 ? dx / dy : 0);
  double span = reach * sqrt(1 + slope * slope);
  int lo = (int)fmax(0, floor(a0 - reach)), hi = (int)fmin((xMajor ? W : H) - 1, ceil(a1 + reach));
  for (int m = lo; m <= hi; m++) {
    double cm = m + 0.5, along = fmin(a1, fmax(a0, cm));
    double c = xMajor ? y0 + (along - x0) * slope : x0 + (along - y0) * slope;
    int n0 = (int)fmax(0, floor(c - span)), n1 = (int)fmin((xMajor ? H : W) - 1, ceil(c + span));
    for (int n = n0; n <= n1; n++) {
      double px = xMajor ? cm : n + 0.5, py = xMajor ? n + 0.5 : cm;
      double t = ((px - x0) * dx + (py - y0) * dy) * inv;
      t = t < 0 ? 0 : t > 1 ? 1 : t;
      double ex = px - (x0 + t * dx), ey = py - (y0 + t * dy);
      double cov = hw + 0.5 - sqrt(ex * ex + ey * ey);
      if (cov <= 0) continue;
      int p = xMajor ? n * W + m : m * W + n;
      float cv = cov > 1 ? 1 : (float)cov;
      if (cover[p] == 0) touched[nT++] = p;
      if (cv > cover[p]) cover[p] = cv;
      float z = (float)(z0 + t * (z1 - z0));
      if (z < pdepth[p]) pdepth[p] = z;
    }
  }
}

static void flush(float r, float g, float b, float op) {
  for (int i = 0; i < nT; i++) {
    int p = touched[i];
    float a = cover[p] * op, z = pdepth[p];
    if (z <= ld[p]) {
      float k = 1 - a;
      lc[3 * p] = a * r + k * lc[3 * p]; lc[3 * p + 1] = a * g + k * lc[3 * p + 1]; lc[3 * p + 2] = a * b + k * lc[3 * p + 2];
      la[p] = a + k * la[p]; ld[p] = z;
    } else {
      float k = (1 - la[p]) * a;
      lc[3 * p] += k * r; lc[3 * p + 1] += k * g; lc[3 * p + 2] += k * b; la[p] += k;
    }
    cover[p] = 0; pdepth[p] = INFINITY;
  }
  nT = 0;
}

int main(int argc, char **argv) {
  FILE *f = fopen(argv[1], "rb");
  if (!f) return 1;
  int32_t hdr[3]; float st[2]; double m[16];
  if (fread(hdr, 4, 3, f) != 3 || fread(st, 4, 2, f) != 2 || fread(m, 8, 16, f) != 16) return 1;
  W = hdr[0]; H = hdr[1]; int nL = hdr[2];
  int32_t *start = malloc(4 * (nL + 1)); float *rgb = malloc(12 * nL);
  if (fread(start, 4, nL + 1, f) != (size_t)(nL + 1) || fread(rgb, 4, 3 * nL, f) != (size_t)(3 * nL)) return 1;
  int nP = start[nL];
  float *P = malloc(12 * (size_t)nP);
  if (fread(P, 4, 3 * (size_t)nP, f) != 3 * (size_t)nP) return 1;
  fclose(f);
  int n = W * H, longest = 1;
  for (int k = 0; k < nL; k++) if (start[k + 1] - start[k] > longest) longest = start[k + 1] - start[k];
  cover = calloc(n, 4); pdepth = malloc(4 * n); lc = calloc(3 * n, 4); la = calloc(n, 4); ld = malloc(4 * n);
  touched = malloc(4 * n);
  double *s = malloc(24 * (size_t)longest);
  for (int i = 0; i < n; i++) { pdepth[i] = INFINITY; ld[i] = INFINITY; }
  struct timespec t0, t1;
  clock_gettime(CLOCK_MONOTONIC, &t0);
  double hw = st[0], min2 = 0.6 * 0.6;
  for (int k = 0; k < nL; k++) {
    int a = start[k], b = start[k + 1], kept = 0;
    double lx = NAN, ly = NAN;
    for (int i = a; i < b; i++) {
      double x = P[3 * i], y = P[3 * i + 1], z = P[3 * i + 2];
      double cw = m[3] * x + m[7] * y + m[11] * z + m[15];
      if (!(cw > 1e-9)) continue;
      double sx = ((m[0] * x + m[4] * y + m[8] * z + m[12]) / cw + 1) * 0.5 * W;
      double sy = (1 - (m[1] * x + m[5] * y + m[9] * z + m[13]) / cw) * 0.5 * H;
      double sz = (m[2] * x + m[6] * y + m[10] * z + m[14]) / cw;
      double ddx = sx - lx, ddy = sy - ly;
      if (kept > 0 && i < b - 1 && ddx * ddx + ddy * ddy < min2) continue;
      s[3 * kept] = sx; s[3 * kept + 1] = sy; s[3 * kept + 2] = sz; lx = sx; ly = sy; kept++;
    }
    for (int j = 0; j + 1 < kept; j++) segment(s[3 * j], s[3 * j + 1], s[3 * j + 2], s[3 * j + 3], s[3 * j + 4], s[3 * j + 5], hw);
    if (kept == 1) segment(s[0], s[1], s[2], s[0], s[1], s[2], hw);
    flush(rgb[3 * k], rgb[3 * k + 1], rgb[3 * k + 2], st[1]);
  }
  clock_gettime(CLOCK_MONOTONIC, &t1);
  double sum = 0;
  for (int i = 0; i < n; i++) sum += la[i];
  printf("%d %.6f %.6f\n", nP, (t1.tv_sec - t0.tv_sec) + 1e-9 * (t1.tv_nsec - t0.tv_nsec), sum);
  return 0;
}
