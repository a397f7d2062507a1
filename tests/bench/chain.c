/*
 * chain.c - benchmark part 2: chains of N four-bar loops (2N unknowns) by
 * kinloop's kernels and by GSL hybridsj on the same loop equations.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime */

#include <math.h>
#include <stdlib.h>

#include "bench.h"
#include "bench_gsl.h"

/* The loop of support.c's build_chain: the driver's pin at 40 on it, the
 * coupler 120, the rocker 80 (which carries the next driver pin at 40), the
 * ground pivots 100 apart. */
#define DRIVER 40.0
#define COUPLER 120.0
#define ROCKER 80.0
#define PITCH 100.0

static const int chain_sizes[] = {1, 2, 5, 10, 20, 50, 100};
#define NSIZES ((int)(sizeof chain_sizes / sizeof chain_sizes[0]))

/* Fewer steps for long chains keep the run near a minute (GSL's dense
 * solve grows fast); every size takes at least a tenth of a turn. */
static int steps_for(int n, const bench_plan *plan) {
  int steps = n <= 10 ? 360 : 3600 / n;
  if (plan->quick)
    return 10;
  return steps < 10 ? 10 : steps;
}

static double crank_angle(int step) { return (step + 1) * (PI / 180.0); }

/* One method's pass over the steps of one chain. */
typedef struct {
  const chain *c;
  int steps;
  double *angles; /* per step: coupler_0, rocker_0, coupler_1, ... */
  long iterations;
  int failures;
  int kernel;
  kl_solver *s; /* kinloop */
  const kl_solver *start;
} chain_run;

static void run_init(chain_run *r, const chain *c, int steps) {
  r->c = c;
  r->steps = steps;
  r->kernel = -1;
  r->angles = bench_calloc((size_t)steps * 2 * (size_t)c->n, sizeof(double));
}

/* The chained closed form (Freudenstein per loop, the previous rocker's
 * angle as the crank angle) at crank angle u into x[0 .. 2n). */
static int closed_form(int n, double u, double *x) {
  fourbar loop = {0};
  int k, ok = 1;
  loop.a = DRIVER;
  loop.b = COUPLER;
  loop.c = ROCKER;
  loop.d = PITCH;
  for (k = 0; k < n; k++) {
    ok &= freudenstein(&loop, u, +1, &x[2 * k], &x[2 * k + 1]);
    u = x[2 * k + 1];
  }
  return ok;
}

static double max_error(const chain_run *r, const double *reference) {
  size_t i, count = (size_t)r->steps * 2 * (size_t)r->c->n;
  double worst = 0.0;
  for (i = 0; i < count; i++)
    worst = fmax(worst, fabs(angle_diff(r->angles[i], reference[i])));
  return worst;
}

/* ---- kinloop ---- */

static void kinloop_init(chain_run *r, const chain *c, int steps,
                         const kl_solver *start, int kernel) {
  run_init(r, c, steps);
  r->start = start;
  r->s = bench_solver_new(c->m, kernel);
}

static void kinloop_pass(chain_run *r) {
  const chain *c = r->c;
  kl_solve_stats st;
  double *x = r->angles;
  int i, k;
  st.size = sizeof st;
  st.kernel = -1;
  kl_solver_copy_state(r->s, r->start);
  r->iterations = 0;
  r->failures = 0;
  for (i = 0; i < r->steps; i++) {
    double u = crank_angle(i);
    r->failures += kl_solve_position(r->s, &u) != KL_OK;
    kl_solver_stats(r->s, &st);
    r->iterations += st.iterations;
    for (k = 0; k < c->n; k++) {
      *x++ = kl_link_angle(r->s, c->couplers[k]);
      *x++ = kl_link_angle(r->s, c->rockers[k]);
    }
  }
  r->kernel = st.kernel;
}

BENCH_ENTRY static void bench_chain_kinloop_auto(void *run) {
  kinloop_pass(run);
}
BENCH_ENTRY static void bench_chain_kinloop_dense(void *run) {
  kinloop_pass(run);
}

/* ---- GSL ---- */

typedef struct {
  chain_run base;
  gsl_multiroot_fdfsolver *solver;
  gsl_multiroot_function_fdf fdf;
  gsl_vector *guess, *start;
  double crank;
} gsl_run;

/*
 * The 2N loop equations in the body angles x = (coupler_0, rocker_0,
 * coupler_1, ...): loop k closes the driver's pin + 120 e(coupler_k)
 * - 80 e(rocker_k) - (100 (k + 1), 0) = 0, the driver being the crank
 * (its pin at 40 e(crank) from the origin) for k = 0 and rocker_{k-1} (its
 * pin at 40 e(rocker_{k-1}) from its pivot (100 k, 0)) after. The pivots'
 * x, 100 k - 100 (k + 1) = -100, are combined exactly before the sum, so
 * that the residual of the last loops is not floored by rounding at
 * 1e4 * eps, about 2e-12, above the tolerance. The analytic dense Jacobian
 * has each loop's six nonzeros; f or J may be NULL.
 */
static int chain_equations(const gsl_vector *x, void *params, gsl_vector *f,
                           gsl_matrix *J) {
  const gsl_run *g = params;
  size_t k, n = (size_t)g->base.c->n;
  double cd = cos(g->crank), sd = sin(g->crank);
  if (J != NULL)
    gsl_matrix_set_zero(J);
  for (k = 0; k < n; k++) {
    double cc = cos(gsl_vector_get(x, 2 * k));
    double sc = sin(gsl_vector_get(x, 2 * k));
    double cr = cos(gsl_vector_get(x, 2 * k + 1));
    double sr = sin(gsl_vector_get(x, 2 * k + 1));
    if (f != NULL) {
      gsl_vector_set(f, 2 * k,
                     DRIVER * cd + COUPLER * cc - ROCKER * cr - PITCH);
      gsl_vector_set(f, 2 * k + 1, DRIVER * sd + COUPLER * sc - ROCKER * sr);
    }
    if (J != NULL) {
      gsl_matrix_set(J, 2 * k, 2 * k, -COUPLER * sc);
      gsl_matrix_set(J, 2 * k + 1, 2 * k, COUPLER * cc);
      gsl_matrix_set(J, 2 * k, 2 * k + 1, ROCKER * sr);
      gsl_matrix_set(J, 2 * k + 1, 2 * k + 1, -ROCKER * cr);
      if (k > 0) {
        gsl_matrix_set(J, 2 * k, 2 * k - 1, -DRIVER * sd);
        gsl_matrix_set(J, 2 * k + 1, 2 * k - 1, DRIVER * cd);
      }
    }
    cd = cr; /* this rocker drives the next loop */
    sd = sr;
  }
  return GSL_SUCCESS;
}

static int chain_f(const gsl_vector *x, void *params, gsl_vector *f) {
  return chain_equations(x, params, f, NULL);
}
static int chain_df(const gsl_vector *x, void *params, gsl_matrix *J) {
  return chain_equations(x, params, NULL, J);
}
static int chain_fdf(const gsl_vector *x, void *params, gsl_vector *f,
                     gsl_matrix *J) {
  return chain_equations(x, params, f, J);
}

static void gsl_init(gsl_run *g, const chain *c, int steps,
                     const double *start) {
  size_t i, n = 2 * (size_t)c->n;
  run_init(&g->base, c, steps);
  g->solver =
      gsl_multiroot_fdfsolver_alloc(gsl_multiroot_fdfsolver_hybridsj, n);
  g->guess = gsl_vector_alloc(n);
  g->start = gsl_vector_alloc(n);
  for (i = 0; i < n; i++)
    gsl_vector_set(g->start, i, start[i]);
  g->fdf.f = chain_f;
  g->fdf.df = chain_df;
  g->fdf.fdf = chain_fdf;
  g->fdf.n = n;
  g->fdf.params = g;
}

BENCH_ENTRY static void bench_chain_gsl_hybridsj(void *run) {
  gsl_run *g = run;
  chain_run *r = &g->base;
  double *x = r->angles;
  size_t k, n = 2 * (size_t)r->c->n;
  int i;
  gsl_vector_memcpy(g->guess, g->start);
  r->iterations = 0;
  r->failures = 0;
  for (i = 0; i < r->steps; i++) {
    const gsl_vector *root;
    g->crank = crank_angle(i);
    r->failures += gsl_solve_step(g->solver, &g->fdf, g->guess, &r->iterations);
    root = gsl_multiroot_fdfsolver_root(g->solver);
    for (k = 0; k < n; k++)
      *x++ = gsl_vector_get(root, k);
    gsl_vector_memcpy(g->guess, root);
  }
}

/* ---- one chain, three methods ---- */

enum { AUTO, DENSE, GSL, METHODS };

typedef struct {
  int n, steps, auto_kernel;
  double ns[METHODS], spread[METHODS], iterations[METHODS], error[METHODS];
  int failures[METHODS];
  /* paired over the interleaved rounds */
  double gsl_over_auto, gsl_over_dense, dense_over_auto;
} chain_row;

static void chain_measure(int n, const bench_plan *plan, chain_row *row) {
  chain c = build_chain(n);
  int steps = steps_for(n, plan), i;
  size_t width = 2 * (size_t)n;
  double *reference = bench_calloc((size_t)steps * width, sizeof(double));
  double *at_zero = bench_calloc(width, sizeof(double)), zero = 0.0;
  kl_solver *start = bench_solver_new(c.m, KL_KERNEL_AUTO);
  chain_run kinloop_auto = {0}, kinloop_dense = {0};
  gsl_run hybridsj = {0};
  const chain_run *runs[METHODS];
  bench_method m[METHODS];
  int ok = closed_form(n, 0.0, at_zero);
  for (i = 0; i < steps; i++)
    ok &= closed_form(n, crank_angle(i), reference + (size_t)i * width);
  if (ok) {
    sketch_chain(&c, start, 0.0);
    ok = kl_solve_position(start, &zero) == KL_OK;
  }
  if (!ok) {
    fprintf(stderr, "kinloop-bench: the chain of %d loops does not start\n", n);
    exit(EXIT_FAILURE);
  }
  kinloop_init(&kinloop_auto, &c, steps, start, KL_KERNEL_AUTO);
  kinloop_init(&kinloop_dense, &c, steps, start, KL_KERNEL_DENSE);
  gsl_init(&hybridsj, &c, steps, at_zero);
  m[AUTO].fn = bench_chain_kinloop_auto;
  m[AUTO].ctx = &kinloop_auto;
  m[DENSE].fn = bench_chain_kinloop_dense;
  m[DENSE].ctx = &kinloop_dense;
  m[GSL].fn = bench_chain_gsl_hybridsj;
  m[GSL].ctx = &hybridsj;
  runs[AUTO] = &kinloop_auto;
  runs[DENSE] = &kinloop_dense;
  runs[GSL] = &hybridsj.base;
  bench_run(m, METHODS, CLOCK_PROCESS_CPUTIME_ID, plan);
  row->n = n;
  row->steps = steps;
  row->auto_kernel = kinloop_auto.kernel;
  for (i = 0; i < METHODS; i++) {
    row->ns[i] = 1e9 * m[i].median / steps;
    row->spread[i] = m[i].spread;
    row->iterations[i] = (double)runs[i]->iterations / steps;
    row->error[i] = max_error(runs[i], reference);
    row->failures[i] = runs[i]->failures;
  }
  row->gsl_over_auto = bench_ratio(&m[GSL], &m[AUTO]);
  row->gsl_over_dense = bench_ratio(&m[GSL], &m[DENSE]);
  row->dense_over_auto = bench_ratio(&m[DENSE], &m[AUTO]);
  kl_solver_free(kinloop_auto.s);
  kl_solver_free(kinloop_dense.s);
  free(kinloop_auto.angles);
  free(kinloop_dense.angles);
  gsl_multiroot_fdfsolver_free(hybridsj.solver);
  gsl_vector_free(hybridsj.guess);
  gsl_vector_free(hybridsj.start);
  free(hybridsj.base.angles);
  kl_solver_free(start);
  kl_model_free(c.m);
  free(reference);
  free(at_zero);
}

static double growth(const chain_row *rows, int method) {
  const chain_row *r10 = NULL, *r100 = NULL;
  int i;
  for (i = 0; i < NSIZES; i++) {
    if (rows[i].n == 10)
      r10 = &rows[i];
    if (rows[i].n == 100)
      r100 = &rows[i];
  }
  return log(r100->ns[method] / r10->ns[method]) / log(10.0);
}

void bench_chain(FILE *out, const bench_plan *plan, chain_figures *fig) {
  chain_row rows[NSIZES];
  int i, m, valid = 1;
  fprintf(out, "\n== Part 2: chains of N four-bar loops (build_chain(N)), "
               "crank steps of 1 deg from 0 ==\n");
  fprintf(out,
          "each step from the previous solution; every method to "
          "|F|inf < %g (absolute)\n",
          BENCH_RESIDUAL);
  fprintf(out, "ns/pos: median of the rounds; ratios: median of the "
               "per-round ratios (rounds interleave the three methods)\n");
  fprintf(out, "%4s %8s %6s  %-13s %12s %12s %12s  %9s %9s %10s\n", "N",
          "unknowns", "steps", "AUTO kernel", "AUTO ns/pos", "DENSE ns/pos",
          "GSL ns/pos", "GSL/AUTO", "GSL/DENSE", "DENSE/AUTO");
  for (i = 0; i < NSIZES; i++) {
    chain_row *r = &rows[i];
    chain_measure(chain_sizes[i], plan, r);
    fprintf(out,
            "%4d %8d %6d  %-13s %12.0f %12.0f %12.0f  %8.1fx %8.1fx "
            "%9.2fx\n",
            r->n, 2 * r->n, r->steps, bench_kernel_name(r->auto_kernel),
            r->ns[AUTO], r->ns[DENSE], r->ns[GSL], r->gsl_over_auto,
            r->gsl_over_dense, r->dense_over_auto);
    fflush(out);
  }
  fprintf(out, "checks (AUTO / DENSE / GSL hybridsj): iterations per step, "
               "max error against the chained closed form, failed steps, "
               "timing spread\n");
  fprintf(out, "%4s  %-20s  %-32s  %-12s  %s\n", "N", "iter/step",
          "max error rad", "failed", "spread");
  for (i = 0; i < NSIZES; i++) {
    const chain_row *r = &rows[i];
    fprintf(out,
            "%4d  %6.2f %6.2f %6.2f  %10.2e %10.2e %10.2e  %3d %3d %3d  "
            "%3.0f%% %3.0f%% %3.0f%%\n",
            r->n, r->iterations[AUTO], r->iterations[DENSE], r->iterations[GSL],
            r->error[AUTO], r->error[DENSE], r->error[GSL], r->failures[AUTO],
            r->failures[DENSE], r->failures[GSL], 100 * r->spread[AUTO],
            100 * r->spread[DENSE], 100 * r->spread[GSL]);
    for (m = AUTO; m <= DENSE; m++)
      valid &= r->failures[m] == 0 && r->error[m] <= BENCH_MAX_ERROR;
  }
  fig->gsl_over_auto_100 = rows[NSIZES - 1].gsl_over_auto;
  fig->growth_auto = growth(rows, AUTO);
  fig->growth_dense = growth(rows, DENSE);
  fig->growth_gsl = growth(rows, GSL);
  fig->kinloop_valid = valid;
  fprintf(out, ">> GSL hybridsj / kinloop AUTO at N = 100:  %6.1fx\n",
          fig->gsl_over_auto_100);
  fprintf(out, ">> GSL hybridsj / kinloop DENSE at N = 100: %6.1fx\n",
          rows[NSIZES - 1].gsl_over_dense);
  fprintf(out,
          ">> growth from N = 10 to 100, t ~ N^p: kinloop AUTO p = "
          "%.2f, kinloop DENSE p = %.2f, GSL hybridsj p = %.2f\n",
          fig->growth_auto, fig->growth_dense, fig->growth_gsl);
}
