/*
 * measure.c - the timing harness: methods timed in interleaved rounds on a
 * chosen clock, medians and paired ratios that resist a noisy machine.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime */

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "bench.h"

double bench_clock(clockid_t clock) {
  struct timespec t;
  clock_gettime(clock, &t);
  return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

void *bench_calloc(size_t n, size_t size) {
  void *p = calloc(n, size);
  if (p == NULL) {
    fprintf(stderr, "kinloop-bench: out of memory\n");
    exit(EXIT_FAILURE);
  }
  return p;
}

static int by_value(const void *a, const void *b) {
  double x = *(const double *)a, y = *(const double *)b;
  return (x > y) - (x < y);
}

double bench_median(double *values, int n) {
  qsort(values, (size_t)n, sizeof *values, by_value);
  return n % 2 ? values[n / 2] : 0.5 * (values[n / 2 - 1] + values[n / 2]);
}

static double one_sample(bench_method *m, clockid_t clock) {
  double begin = bench_clock(clock);
  int call;
  for (call = 0; call < m->calls; call++)
    m->fn(m->ctx);
  return (bench_clock(clock) - begin) / m->calls;
}

void bench_run(bench_method *methods, int n, clockid_t clock,
               const bench_plan *plan) {
  double sorted[BENCH_MAX_SAMPLES];
  int i, round;
  for (i = 0; i < n; i++) {
    bench_method *m = &methods[i];
    m->rounds = plan->samples;
    m->calls = 1;
    if (!plan->quick) {
      /* the first call warms up and tells how many calls fill a sample */
      double first = one_sample(m, clock);
      if (first > 0.0 && first < plan->sample_seconds)
        m->calls = (int)ceil(plan->sample_seconds / first);
    }
  }
  /* every round runs each method once, so that all of them meet the same
   * background load, which on this machine drifts over seconds */
  for (round = 0; round < plan->samples; round++)
    for (i = 0; i < n; i++)
      methods[i].seconds[round] = one_sample(&methods[i], clock);
  for (i = 0; i < n; i++) {
    bench_method *m = &methods[i];
    memcpy(sorted, m->seconds, (size_t)m->rounds * sizeof *sorted);
    m->median = bench_median(sorted, m->rounds);
    m->spread = (sorted[m->rounds - 1] - sorted[0]) / m->median;
  }
}

double bench_ratio(const bench_method *a, const bench_method *b) {
  double ratios[BENCH_MAX_SAMPLES];
  int round;
  for (round = 0; round < a->rounds; round++)
    ratios[round] = a->seconds[round] / b->seconds[round];
  return bench_median(ratios, a->rounds);
}
