/* Reference kernel for test/bench/gas.bench.ts: the same physics and algorithm as the bench's JS
 * loop — ideal 3D RF trap, x'' = -g x, y'' = -g y, z'' = +2g z, g = 2q(U + V cos θ)/(m d²), classic
 * RK4 on h = T/n with a half-step cos/sin table — optionally followed each step by the hard-sphere
 * gas step of sim/gas/hardsphere.ts (null-collision majorant n σ (V̂ + c̄) with a per-ion speed
 * bound V̂ checked as v² ≤ V̂², nine counter-based uniforms per candidate from the same lowbias32
 * mixer as sim/random/counter.ts).
 * Plain C, single thread, built with cc -O2.
 * usage: gas_trap N_IONS STEPS GAS(0|1) → prints "ion_steps seconds collisions" */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static uint32_t mix32(uint32_t h) {
  h ^= h >> 16; h *= 0x21f0aaadu; h ^= h >> 15; h *= 0x735a2d97u; h ^= h >> 15; return h;
}
static double uniformAt(uint32_t k0, uint32_t k1, double n) {
  uint32_t lo = (uint32_t)fmod(n, 4294967296.0), hi = (uint32_t)floor(n / 4294967296.0);
  uint32_t a = mix32(mix32(lo ^ k0) ^ mix32(hi + k1));
  uint32_t b = mix32(mix32(a ^ k1) + lo + 0x6a09e667u);
  return ((double)(a >> 5) * 67108864.0 + (double)(b >> 6) + 0.5) / 9007199254740992.0;
}

int main(int argc, char **argv) {
  int nIons = argc > 1 ? atoi(argv[1]) : 2000;
  long nSteps = argc > 2 ? atol(argv[2]) : 2000;
  int withGas = argc > 3 ? atoi(argv[3]) : 1;
  const double e = 1.602176634e-19, u = 1.66053906660e-27, kB = 1.380649e-23;
  const double m = 300 * u, q = e, r0 = 5e-3, z0 = r0 / sqrt(2.0), f = 1e6, qz = 0.4;
  const int spc = 20;
  const double omega = 2 * M_PI * f, h = 1 / f / spc, hh = 0.5 * h, h6 = h / 6;
  const double d2 = r0 * r0 + 2 * z0 * z0, V = qz * m * d2 * omega * omega / (8 * q);
  const double k = 2 * q / (m * d2), kV = k * V;
  const double T = 300, M = 4.002602 * u, p = 0.133322, sigma = 150e-20;
  const double nSigma = p / (kB * T) * sigma, sV = sqrt(kB * T / M), aGas = sqrt(2.0) * sV;
  const double cbar = sqrt(8 * kB * T / (M_PI * M)), wGas = M / (m + M), vFloor = 0.25 * cbar;
  double *cosT = malloc(sizeof(double) * (2 * spc + 1)), *sinT = malloc(sizeof(double) * (2 * spc + 1));
  for (int j = 0; j <= 2 * spc; j++) { cosT[j] = cos(M_PI * j / spc); sinT[j] = sin(M_PI * j / spc); }
  double hits = 0;
  long long steps = 0;
  struct timespec t0, t1;
  clock_gettime(CLOCK_MONOTONIC, &t0);
  for (int ion = 0; ion < nIons; ion++) {
    uint32_t k0 = mix32(ion * 2654435761u + 1), k1 = mix32(ion ^ 0x2545f491u);
    double x = 1e-4 * cos(ion), y = 1e-4 * sin(ion), z = 5e-5 * cos(3.0 * ion);
    double vx = 300 * sin(1.7 * ion), vy = 300 * cos(2.3 * ion), vz = 300 * sin(0.9 * ion);
    double psi = 0.37 * ion, cp = cos(psi), sp = sin(psi);
    double c = 0, depth = -log(uniformAt(k0, k1, c++)), lim = -1, rate = 0, vHat = 0;
    int j = 0;
    for (long n = 0; n < nSteps; n++) {
      double g0 = kV * (cosT[j] * cp - sinT[j] * sp);
      double g1 = kV * (cosT[j + 1] * cp - sinT[j + 1] * sp);
      double g2 = kV * (cosT[j + 2] * cp - sinT[j + 2] * sp);
      double ax1 = -g0 * x, x2 = x + hh * vx, vx2 = vx + hh * ax1, ax2 = -g1 * x2;
      double x3 = x + hh * vx2, vx3 = vx + hh * ax2, ax3 = -g1 * x3;
      double x4 = x + h * vx3, vx4 = vx + h * ax3, ax4 = -g2 * x4;
      x += h6 * (vx + 2 * vx2 + 2 * vx3 + vx4); vx += h6 * (ax1 + 2 * ax2 + 2 * ax3 + ax4);
      double ay1 = -g0 * y, y2 = y + hh * vy, vy2 = vy + hh * ay1, ay2 = -g1 * y2;
      double y3 = y + hh * vy2, vy3 = vy + hh * ay2, ay3 = -g1 * y3;
      double y4 = y + h * vy3, vy4 = vy + h * ay3, ay4 = -g2 * y4;
      y += h6 * (vy + 2 * vy2 + 2 * vy3 + vy4); vy += h6 * (ay1 + 2 * ay2 + 2 * ay3 + ay4);
      double az1 = 2 * g0 * z, z2 = z + hh * vz, vz2 = vz + hh * az1, az2 = 2 * g1 * z2;
      double z3 = z + hh * vz2, vz3 = vz + hh * az2, az3 = 2 * g1 * z3;
      double z4 = z + h * vz3, vz4 = vz + h * az3, az4 = 2 * g2 * z4;
      z += h6 * (vz + 2 * vz2 + 2 * vz3 + vz4); vz += h6 * (az1 + 2 * az2 + 2 * az3 + az4);
      j += 2; if (j == 2 * spc) j = 0;
      if (!withGas) continue;
      double v2 = vx * vx + vy * vy + vz * vz;
      if (v2 <= lim && depth - rate * h > 0) { depth -= rate * h; continue; }
      double speed = sqrt(v2);
      if (!(v2 <= lim)) { vHat = fmax(1.25 * speed, vFloor); lim = vHat * vHat; rate = nSigma * (vHat + cbar); }
      double left = h, s = depth;
      while (s <= rate * left) {
        left -= s / rate;
        double u0 = uniformAt(k0, k1, c), share = u0 * (vHat + cbar);
        if (share < speed + cbar) {
          double u1 = uniformAt(k0, k1, c + 1), u2 = uniformAt(k0, k1, c + 2);
          double u3 = uniformAt(k0, k1, c + 3), u4 = uniformAt(k0, k1, c + 4);
          double gx, gy, gz, ps;
          if (share < speed) {
            double r1 = sV * sqrt(-2 * log(u1)), r2 = sV * sqrt(-2 * log(u3));
            double wx = r1 * cos(2 * M_PI * u2), wy = r1 * sin(2 * M_PI * u2), wz = r2 * cos(2 * M_PI * u4);
            ps = sqrt(wx * wx + wy * wy + wz * wz); gx = vx - wx; gy = vy - wy; gz = vz - wz;
          } else {
            ps = aGas * sqrt(-log(u1) - log(u2));
            double ct = 2 * u3 - 1, st = sqrt(fmax(0, 1 - ct * ct)), ph = 2 * M_PI * u4;
            gx = vx - ps * st * cos(ph); gy = vy - ps * st * sin(ph); gz = vz - ps * ct;
          }
          double g = sqrt(gx * gx + gy * gy + gz * gz);
          if (uniformAt(k0, k1, c + 5) * (speed + ps) < g) {
            double ct = 2 * uniformAt(k0, k1, c + 6) - 1, st = sqrt(fmax(0, 1 - ct * ct));
            double ph = 2 * M_PI * uniformAt(k0, k1, c + 7);
            vx += wGas * (g * st * cos(ph) - gx); vy += wGas * (g * st * sin(ph) - gy); vz += wGas * (g * ct - gz);
            speed = sqrt(vx * vx + vy * vy + vz * vz);
            vHat = fmax(1.25 * speed, vFloor); lim = vHat * vHat; rate = nSigma * (vHat + cbar); hits++;
          }
        }
        s = -log(uniformAt(k0, k1, c + 8));
        c += 9;
      }
      depth = s - rate * left;
    }
    steps += nSteps;
  }
  clock_gettime(CLOCK_MONOTONIC, &t1);
  double sec = (t1.tv_sec - t0.tv_sec) + 1e-9 * (t1.tv_nsec - t0.tv_nsec);
  printf("%lld %.6f %.0f\n", steps, sec, hits);
  return 0;
}
