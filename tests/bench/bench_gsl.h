/*
 * bench_gsl.h - the benchmark's use of GSL: the accessors inlined as GSL
 * advises for speed, and one continuation step of an fdf solver.
 */
#ifndef KINLOOP_BENCH_GSL_H
#define KINLOOP_BENCH_GSL_H

/* GSL's own advice for speed (GSL manual, "Inline functions" and "Range
 * checking"): inline accessors without range checks, so that the equations
 * written here cost GSL no more than kinloop's equations cost kinloop. */
#define HAVE_INLINE
#define GSL_RANGE_CHECK_OFF

#include <gsl/gsl_errno.h>
#include <gsl/gsl_matrix.h>
#include <gsl/gsl_multiroots.h>
#include <gsl/gsl_vector.h>

/* Solves from `guess` (gsl_multiroot_fdfsolver_set, then iterations) until
 * |f|inf < BENCH_RESIDUAL, adding the iterations taken to *iterations.
 * Returns 0 when converged, 1 when GSL gave up or the iteration limit was
 * reached. The solution (or the last iterate) is the solver's root. */
int gsl_solve_step(gsl_multiroot_fdfsolver *s, gsl_multiroot_function_fdf *fdf,
                   const gsl_vector *guess, long *iterations);

#endif
