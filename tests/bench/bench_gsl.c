/*
 * bench_gsl.c - one continuation step of a GSL fdf solver, converged on
 * the same residual test as kinloop (|f|inf, absolute).
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime */

#include <math.h>

#include "bench.h"
#include "bench_gsl.h"

static double max_abs(const gsl_vector *v) {
  double m = 0.0;
  size_t i;
  for (i = 0; i < v->size; i++)
    m = fmax(m, fabs(gsl_vector_get(v, i)));
  return m;
}

int gsl_solve_step(gsl_multiroot_fdfsolver *s, gsl_multiroot_function_fdf *fdf,
                   const gsl_vector *guess, long *iterations) {
  int taken = 0, failed = 0;
  gsl_multiroot_fdfsolver_set(s, fdf, guess);
  while (!(max_abs(s->f) < BENCH_RESIDUAL)) {
    if (taken == BENCH_GSL_MAX_ITERATIONS) {
      failed = 1;
      break;
    }
    taken++;
    if (gsl_multiroot_fdfsolver_iterate(s) != GSL_SUCCESS) {
      /* no progress possible: a failure unless already converged */
      failed = !(max_abs(s->f) < BENCH_RESIDUAL);
      break;
    }
  }
  *iterations += taken;
  return failed;
}
