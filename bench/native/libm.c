/*
 * Cost of the C library's transcendental functions on this machine, for comparison with V8's
 * Math.* (measured by bench/src/suites/throughput.ts with the same loops). Prints one JSON object:
 * nanoseconds per call (process CPU time), best of `reps` repetitions of `n` calls each.
 *
 * Build: gcc -O2 -ffp-contract=off -o libm libm.c -lm
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static double cpu_s(void) {
  struct timespec t;
  clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &t);
  return t.tv_sec + t.tv_nsec * 1e-9;
}

static volatile double sink;

#define BENCH(NAME, EXPR, SCALE)                                       \
  static double bench_##NAME(long n) {                                 \
    double s = 0;                                                      \
    const double t0 = cpu_s();                                         \
    for (long i = 0; i < n; i++) {                                     \
      const double a = (double)i * (SCALE);                            \
      s += EXPR;                                                       \
    }                                                                  \
    const double t = cpu_s() - t0;                                     \
    sink = s;                                                          \
    return t / (double)n * 1e9;                                        \
  }

BENCH(sin, sin(a), 1e-3)
BENCH(cos, cos(a), 1e-3)
BENCH(tan, tan(a), 1e-7)
BENCH(atan, atan(a), 1e-6)
BENCH(exp, exp(-a), 1e-6)
BENCH(log, log(1 + a), 1e-6)

int main(int argc, char **argv) {
  const long n = argc > 1 ? atol(argv[1]) : 2000000;
  const int reps = argc > 2 ? atoi(argv[2]) : 5;
  double best[6] = {1e30, 1e30, 1e30, 1e30, 1e30, 1e30};
  for (int r = 0; r < reps; r++) {
    const double v[6] = {bench_sin(n), bench_cos(n), bench_tan(n),
                         bench_atan(n), bench_exp(n), bench_log(n)};
    for (int i = 0; i < 6; i++)
      if (v[i] < best[i]) best[i] = v[i];
  }
  printf("{\"sin\":%.3f,\"cos\":%.3f,\"tan\":%.3f,\"atan\":%.3f,\"exp\":%.3f,\"log\":%.3f}\n", best[0],
         best[1], best[2], best[3], best[4], best[5]);
  return 0;
}
