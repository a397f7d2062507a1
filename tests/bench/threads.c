/*
 * threads.c - benchmark part 3: solvers on two threads sharing one
 * finalized model, their throughput against one thread's.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime, threads */

#include <math.h>
#include <pthread.h>
#include <stdlib.h>
#include <string.h>

#include "bench.h"

typedef struct {
  fourbar_run *run;
  int passes;
} worker;

static void *work(void *arg) {
  worker *w = arg;
  int i;
  for (i = 0; i < w->passes; i++)
    fourbar_kinloop_pass(w->run);
  return NULL;
}

/* Wall-clock seconds for `nthreads` workers to finish, each on a thread of
 * its own; the process CPU time used meanwhile into *cpu. */
static double wall_time(worker *w, int nthreads, double *cpu) {
  pthread_t threads[2];
  double begin = bench_clock(CLOCK_MONOTONIC);
  double cpu_begin = bench_clock(CLOCK_PROCESS_CPUTIME_ID);
  int i;
  for (i = 0; i < nthreads; i++)
    if (pthread_create(&threads[i], NULL, work, &w[i]) != 0) {
      fprintf(stderr, "kinloop-bench: cannot start a thread\n");
      exit(EXIT_FAILURE);
    }
  for (i = 0; i < nthreads; i++)
    pthread_join(threads[i], NULL);
  *cpu = bench_clock(CLOCK_PROCESS_CPUTIME_ID) - cpu_begin;
  return bench_clock(CLOCK_MONOTONIC) - begin;
}

static int same_results(const fourbar_run *a, const fourbar_run *b) {
  size_t bytes = (size_t)a->steps * sizeof(double);
  return a->failures == b->failures && memcmp(a->t3, b->t3, bytes) == 0 &&
         memcmp(a->t4, b->t4, bytes) == 0;
}

void bench_threads(FILE *out, const bench_plan *plan,
                   const fourbar_figures *fourbar, thread_figures *fig) {
  worker w[2];
  double pass = 1e-9 * fourbar->small_ns * FOURBAR_STEPS;
  int samples = plan->quick ? 1 : plan->samples, i, same;
  double *one = bench_calloc((size_t)samples, sizeof(double));
  double *two = bench_calloc((size_t)samples, sizeof(double));
  double *one_cpu = bench_calloc((size_t)samples, sizeof(double));
  double *two_cpu = bench_calloc((size_t)samples, sizeof(double));
  double t1, t2, positions;
  /* each thread's work lasts about ten samples of the other parts */
  int passes = plan->quick ? 1 : (int)ceil(10 * plan->sample_seconds / pass);
  positions = (double)passes * FOURBAR_STEPS;
  for (i = 0; i < 2; i++) {
    w[i].run =
        fourbar_run_kinloop(&fourbar->f, fourbar->start, KL_KERNEL_AUTO, 0);
    w[i].passes = passes;
  }
  /* one and two threads in turn, so that both meet the same background */
  for (i = 0; i < samples; i++) {
    one[i] = wall_time(w, 1, &one_cpu[i]);
    two[i] = wall_time(w, 2, &two_cpu[i]);
  }
  t1 = bench_median(one, samples);
  t2 = bench_median(two, samples);
  fig->throughput_ratio = 2.0 * t1 / t2;
  same = same_results(w[0].run, fourbar->small) &&
         same_results(w[1].run, fourbar->small);
  fprintf(out, "\n== Part 3: threads, each with its own solver on the one "
               "finalized four-bar model ==\n");
  fprintf(out,
          "each thread: %d pass(es) of the %d-step turn (kinloop "
          "position, AUTO); medians of %d\n",
          passes, FOURBAR_STEPS, samples);
  fprintf(out, "%-10s %12s %32s %24s\n", "threads", "wall ms",
          "wall ns/position (all threads)", "CPU ns/position");
  fprintf(out, "%-10d %12.1f %32.1f %24.1f\n", 1, 1e3 * t1,
          1e9 * t1 / positions,
          1e9 * bench_median(one_cpu, samples) / positions);
  fprintf(out, "%-10d %12.1f %32.1f %24.1f\n", 2, 1e3 * t2,
          1e9 * t2 / (2 * positions),
          1e9 * bench_median(two_cpu, samples) / (2 * positions));
  fprintf(out,
          "results on both threads identical to the single-threaded "
          "pass of part 1: %s\n",
          same ? "yes" : "NO");
  fprintf(out,
          ">> throughput (wall clock), 2 threads / 1 thread: %5.2fx "
          "(ideal 2 with 2 free cores; this machine's 2 cores are "
          "shared with other work)\n",
          fig->throughput_ratio);
  fig->results_identical = same;
  for (i = 0; i < 2; i++)
    fourbar_run_free(w[i].run);
  free(one);
  free(two);
  free(one_cpu);
  free(two_cpu);
}
