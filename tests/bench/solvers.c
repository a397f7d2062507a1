/*
 * solvers.c - kinloop as every part of the benchmark sets it up: solvers
 * held to the common residual with a chosen kernel, and the kernels' names.
 */
#define _POSIX_C_SOURCE 200809L /* clockid_t in bench.h */

#include <stdlib.h>

#include "bench.h"

kl_solver *bench_solver_new(const kl_model *m, int kernel) {
  kl_solver *s = kl_solver_new(m);
  kl_options o;
  kl_options_default(&o);
  /* kinloop's tolerance is relative to the model's scale */
  o.tolerance = BENCH_RESIDUAL / kl_model_scale(m);
  o.kernel = kernel;
  if (s == NULL || kl_solver_set_options(s, &o) != KL_OK) {
    fprintf(stderr, "kinloop-bench: cannot make a solver: %s\n",
            s != NULL ? kl_solver_error(s) : "out of memory");
    exit(EXIT_FAILURE);
  }
  return s;
}

const char *bench_kernel_name(int kernel) {
  switch (kernel) {
  case KL_KERNEL_SMALL:
    return "small";
  case KL_KERNEL_DENSE:
    return "dense LAPACK";
  case KL_KERNEL_BANDED:
    return "banded";
  default:
    return "?";
  }
}
