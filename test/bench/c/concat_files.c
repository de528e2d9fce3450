/* Reference for test/bench/merge.bench.ts: the I/O floor of a merge, every input file's bytes
 * read in 1 MiB pieces and written one after another to OUTPUT (what `cat` does), no parsing.
 * Plain C, built with cc -O2.
 * usage: concat_files OUTPUT INPUT... → prints "bytes seconds" */
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

int main(int argc, char **argv) {
  if (argc < 3) { fprintf(stderr, "usage: concat_files OUTPUT INPUT...\n"); return 2; }
  static char buf[1 << 20];
  struct timespec t0, t1;
  clock_gettime(CLOCK_MONOTONIC, &t0);
  FILE *out = fopen(argv[1], "wb");
  if (!out) { perror(argv[1]); return 1; }
  long long total = 0;
  for (int i = 2; i < argc; i++) {
    FILE *in = fopen(argv[i], "rb");
    if (!in) { perror(argv[i]); return 1; }
    size_t n;
    while ((n = fread(buf, 1, sizeof buf, in)) > 0) {
      if (fwrite(buf, 1, n, out) != n) { perror(argv[1]); return 1; }
      total += (long long)n;
    }
    fclose(in);
  }
  if (fclose(out) != 0) { perror(argv[1]); return 1; }
  clock_gettime(CLOCK_MONOTONIC, &t1);
  printf("%lld %.6f\n", total, (t1.tv_sec - t0.tv_sec) + 1e-9 * (t1.tv_nsec - t0.tv_nsec));
  return 0;
}
