/*
 * sweep_bench.c - the C side of the bindings' sweep benchmark: the time of
 * one sweep read in bulk (kl_solver_sweep_rows), as a C caller makes it, for
 * bindings/python/tests/bench_sweep.py and bindings/octave/tests/
 * bench_sweep.m to divide their own time by, measured in the same run.
 *
 *   kinloop-sweep-bench MODEL INPUT FROM TO STEPS REPEATS
 *
 * Reads the model file, solves the position at FROM, then sweeps input
 * INPUT from FROM to TO in STEPS steps REPEATS times, each from where the
 * last ended (a full turn ends where it began), and prints the fastest and
 * the median sweep in seconds: "best <s> median <s>". The rows' buffer is
 * allocated once, before the timing: the reference is the sweep alone.
 */
#define _POSIX_C_SOURCE 199309L
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

#include "kinloop.h"

static double now(void) {
  struct timespec t;
  clock_gettime(CLOCK_MONOTONIC, &t);
  return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

static int by_value(const void *a, const void *b) {
  double x = *(const double *)a, y = *(const double *)b;
  return (x > y) - (x < y);
}

/* A failed call ends the run with the library's word for it. */
static void check(int status, const char *what, const char *message) {
  if (status < 0) {
    fprintf(stderr, "kinloop-sweep-bench: %s: %s (%s)\n", what,
            kl_status_str(status), message);
    exit(1);
  }
}

int main(int argc, char **argv) {
  if (argc != 7) {
    fprintf(stderr, "usage: kinloop-sweep-bench MODEL INPUT FROM TO STEPS REPEATS\n");
    return 2;
  }
  int input = atoi(argv[2]), steps = atoi(argv[5]), repeats = atoi(argv[6]);
  double from = atof(argv[3]), to = atof(argv[4]);
  if (steps < 1 || repeats < 1) {
    fprintf(stderr, "kinloop-sweep-bench: STEPS and REPEATS must be at least 1\n");
    return 2;
  }
  kl_io_error err = {0};
  err.size = sizeof err;
  kl_model *m = kl_model_read_file(argv[1], &err);
  if (m == NULL) {
    fprintf(stderr, "kinloop-sweep-bench: %s: %s\n", argv[1], err.message);
    return 1;
  }
  kl_solver *s = kl_solver_new(m);
  int n = kl_model_input_count(m);
  double *inputs = calloc((size_t)(n > 0 ? n : 1), sizeof *inputs);
  double *rows = malloc((size_t)(steps + 1) * (size_t)kl_model_row_size(m) * sizeof *rows);
  double *times = malloc((size_t)repeats * sizeof *times);
  if (s == NULL || inputs == NULL || rows == NULL || times == NULL) {
    fprintf(stderr, "kinloop-sweep-bench: out of memory\n");
    return 1;
  }
  inputs[input < n && input >= 0 ? input : 0] = from;
  check(kl_solve_position(s, inputs), "kl_solve_position", kl_solver_error(s));
  for (int k = 0; k < repeats; k++) {
    double start = now();
    check(kl_solver_sweep_rows(s, input, from, to, steps, rows, NULL),
          "kl_solver_sweep_rows", kl_solver_error(s));
    times[k] = now() - start;
  }
  qsort(times, (size_t)repeats, sizeof *times, by_value);
  printf("best %.9f median %.9f\n", times[0], times[repeats / 2]);
  free(times);
  free(rows);
  free(inputs);
  kl_solver_free(s);
  kl_model_free(m);
  return 0;
}
