/*
 * fourbar.c - benchmark part 1: a full turn of one four-bar in 0.1 degree
 * steps, by the closed form, by kinloop and by GSL's Jacobian solvers.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime */

#include <math.h>
#include <stdlib.h>

#include "bench.h"
#include "bench_gsl.h"

/* Geometry chosen for the benchmark: a crank-rocker (Grashof, crank
 * shortest), so the crank turns fully and one assembly mode lasts the turn. */
#define GROUND 100.0
#define CRANK 40.0
#define COUPLER 120.0
#define ROCKER 80.0

static double crank_angle(int step) {
  return (step + 1) * (FOURBAR_STEP_DEG * PI / 180.0);
}

static void run_init(fourbar_run *r, const fourbar *f, int steps,
                     int with_rates) {
  r->f = f;
  r->steps = steps;
  r->with_rates = with_rates;
  r->kernel = -1;
  r->t3 = bench_calloc((size_t)steps, sizeof *r->t3);
  r->t4 = bench_calloc((size_t)steps, sizeof *r->t4);
  if (with_rates) {
    r->w3 = bench_calloc((size_t)steps, sizeof *r->w3);
    r->w4 = bench_calloc((size_t)steps, sizeof *r->w4);
    r->a3 = bench_calloc((size_t)steps, sizeof *r->a3);
    r->a4 = bench_calloc((size_t)steps, sizeof *r->a4);
  }
}

static fourbar_run *run_new(const fourbar *f, int steps, int with_rates) {
  fourbar_run *r = bench_calloc(1, sizeof *r);
  run_init(r, f, steps, with_rates);
  return r;
}

static void run_release(fourbar_run *r) {
  kl_solver_free(r->s);
  free(r->t3);
  free(r->t4);
  free(r->w3);
  free(r->w4);
  free(r->a3);
  free(r->a4);
}

void fourbar_run_free(fourbar_run *r) {
  if (r == NULL)
    return;
  run_release(r);
  free(r);
}

/* ---- the closed form ---- */

BENCH_ENTRY static void bench_fourbar_closed_form(void *run) {
  fourbar_run *r = run;
  int i;
  r->failures = 0;
  for (i = 0; i < r->steps; i++)
    r->failures +=
        !freudenstein(r->f, crank_angle(i), +1, &r->t3[i], &r->t4[i]);
}

/* ---- kinloop ---- */

fourbar_run *fourbar_run_kinloop(const fourbar *f, const kl_solver *start,
                                 int kernel, int with_rates) {
  fourbar_run *r = run_new(f, FOURBAR_STEPS, with_rates);
  r->s = bench_solver_new(f->m, kernel);
  r->start = start;
  return r;
}

/* Each step is solved from the last; rates and accelerations are those of
 * a unit crank rate and no crank acceleration. The pass starts from the
 * solution at crank angle 0. */
void fourbar_kinloop_pass(fourbar_run *r) {
  static const double unit_rate = 1.0, no_accel = 0.0;
  const fourbar *f = r->f;
  kl_solve_stats st;
  int i;
  st.size = sizeof st;
  st.kernel = -1;
  kl_solver_copy_state(r->s, r->start);
  r->iterations = 0;
  r->failures = 0;
  for (i = 0; i < r->steps; i++) {
    double u = crank_angle(i);
    int status = kl_solve_position(r->s, &u);
    kl_solver_stats(r->s, &st);
    r->iterations += st.iterations;
    if (status == KL_OK && r->with_rates) {
      status = kl_solve_velocity(r->s, &unit_rate);
      if (status == KL_OK)
        status = kl_solve_acceleration(r->s, &no_accel);
      r->w3[i] = kl_link_rate(r->s, f->coupler);
      r->w4[i] = kl_link_rate(r->s, f->rocker);
      r->a3[i] = kl_link_accel(r->s, f->coupler);
      r->a4[i] = kl_link_accel(r->s, f->rocker);
    }
    r->failures += status != KL_OK;
    r->t3[i] = kl_link_angle(r->s, f->coupler);
    r->t4[i] = kl_link_angle(r->s, f->rocker);
  }
  r->kernel = st.kernel;
}

BENCH_ENTRY static void bench_fourbar_kinloop_small(void *run) {
  fourbar_kinloop_pass(run);
}
BENCH_ENTRY static void bench_fourbar_kinloop_dense(void *run) {
  fourbar_kinloop_pass(run);
}
BENCH_ENTRY static void bench_fourbar_kinloop_rates(void *run) {
  fourbar_kinloop_pass(run);
}

/* ---- the hand-written Newton iteration ---- */

/*
 * What a user writes by hand for this one linkage (textbook Newton-Raphson
 * on the two loop equations, common practice, no source): from the
 * previous solution, F(t3, t4) = a e(t2) + b e(t3) - c e(t4) - (d, 0), its
 * 2 x 2 Jacobian J = [-b sin t3, c sin t4; b cos t3, -c cos t4] solved by
 * Cramer's rule, until |F|inf < BENCH_RESIDUAL. The rates and
 * accelerations solve the same J against the loop equation differentiated
 * once and twice in time (unit crank rate, no crank acceleration):
 *   J (w3, w4) = (a sin t2, -a cos t2),
 *   J (a3, a4) = (a cos t2 + b w3^2 cos t3 - c w4^2 cos t4,
 *                 a sin t2 + b w3^2 sin t3 - c w4^2 sin t4).
 */
static void hand_pass(fourbar_run *r, double t3, double t4) {
  const fourbar *f = r->f;
  int i, iter;
  r->iterations = 0;
  r->failures = 0;
  for (i = 0; i < r->steps; i++) {
    double t2 = crank_angle(i), c2 = cos(t2), s2 = sin(t2);
    double c3 = cos(t3), s3 = sin(t3), c4 = cos(t4), s4 = sin(t4);
    double j00, j01, j10, j11, det;
    for (iter = 0;; iter++) {
      double fx = f->a * c2 + f->b * c3 - f->c * c4 - f->d;
      double fy = f->a * s2 + f->b * s3 - f->c * s4;
      j00 = -f->b * s3;
      j01 = f->c * s4;
      j10 = f->b * c3;
      j11 = -f->c * c4;
      det = j00 * j11 - j01 * j10;
      if (fmax(fabs(fx), fabs(fy)) < BENCH_RESIDUAL)
        break;
      if (iter == BENCH_GSL_MAX_ITERATIONS || det == 0.0) {
        r->failures++;
        break;
      }
      t3 -= (fx * j11 - j01 * fy) / det;
      t4 -= (j00 * fy - fx * j10) / det;
      c3 = cos(t3), s3 = sin(t3), c4 = cos(t4), s4 = sin(t4);
    }
    r->iterations += iter;
    r->t3[i] = t3;
    r->t4[i] = t4;
    if (r->with_rates) {
      double vx = f->a * s2, vy = -f->a * c2, w3, w4, ax, ay;
      w3 = (vx * j11 - j01 * vy) / det;
      w4 = (j00 * vy - vx * j10) / det;
      ax = f->a * c2 + f->b * w3 * w3 * c3 - f->c * w4 * w4 * c4;
      ay = f->a * s2 + f->b * w3 * w3 * s3 - f->c * w4 * w4 * s4;
      r->w3[i] = w3;
      r->w4[i] = w4;
      r->a3[i] = (ax * j11 - j01 * ay) / det;
      r->a4[i] = (j00 * ay - ax * j10) / det;
    }
  }
}

typedef struct {
  fourbar_run base;
  double start_t3, start_t4;
} hand_run;

BENCH_ENTRY static void bench_fourbar_hand_newton(void *run) {
  hand_run *h = run;
  hand_pass(&h->base, h->start_t3, h->start_t4);
}
BENCH_ENTRY static void bench_fourbar_hand_rates(void *run) {
  hand_run *h = run;
  hand_pass(&h->base, h->start_t3, h->start_t4);
}

/* ---- GSL ---- */

typedef struct {
  fourbar_run base;
  gsl_multiroot_fdfsolver *solver;
  gsl_multiroot_function_fdf fdf;
  gsl_vector *guess;
  double crank; /* the crank angle being solved */
  double start_t3, start_t4;
} gsl_run;

/* The loop equations in the coupler and rocker angles x = (t3, t4):
 * a e(t2) + b e(t3) - c e(t4) - (d, 0) = 0, and their analytic Jacobian;
 * f or J may be NULL. */
static int loop_equations(const gsl_vector *x, void *params, gsl_vector *f,
                          gsl_matrix *J) {
  const gsl_run *g = params;
  const fourbar *fb = g->base.f;
  double c3 = cos(gsl_vector_get(x, 0)), s3 = sin(gsl_vector_get(x, 0));
  double c4 = cos(gsl_vector_get(x, 1)), s4 = sin(gsl_vector_get(x, 1));
  if (f != NULL) {
    gsl_vector_set(f, 0,
                   fb->a * cos(g->crank) + fb->b * c3 - fb->c * c4 - fb->d);
    gsl_vector_set(f, 1, fb->a * sin(g->crank) + fb->b * s3 - fb->c * s4);
  }
  if (J != NULL) {
    gsl_matrix_set(J, 0, 0, -fb->b * s3);
    gsl_matrix_set(J, 0, 1, fb->c * s4);
    gsl_matrix_set(J, 1, 0, fb->b * c3);
    gsl_matrix_set(J, 1, 1, -fb->c * c4);
  }
  return GSL_SUCCESS;
}

static int loop_f(const gsl_vector *x, void *params, gsl_vector *f) {
  return loop_equations(x, params, f, NULL);
}
static int loop_df(const gsl_vector *x, void *params, gsl_matrix *J) {
  return loop_equations(x, params, NULL, J);
}
static int loop_fdf(const gsl_vector *x, void *params, gsl_vector *f,
                    gsl_matrix *J) {
  return loop_equations(x, params, f, J);
}

static gsl_run *gsl_run_new(const fourbar *f,
                            const gsl_multiroot_fdfsolver_type *type,
                            double start_t3, double start_t4) {
  gsl_run *g = bench_calloc(1, sizeof *g);
  run_init(&g->base, f, FOURBAR_STEPS, 0);
  g->solver = gsl_multiroot_fdfsolver_alloc(type, 2);
  g->guess = gsl_vector_alloc(2);
  g->fdf.f = loop_f;
  g->fdf.df = loop_df;
  g->fdf.fdf = loop_fdf;
  g->fdf.n = 2;
  g->fdf.params = g;
  g->start_t3 = start_t3;
  g->start_t4 = start_t4;
  return g;
}

static void gsl_run_free(gsl_run *g) {
  gsl_multiroot_fdfsolver_free(g->solver);
  gsl_vector_free(g->guess);
  run_release(&g->base);
  free(g);
}

/* Each step starts from the previous step's solution. */
static void gsl_pass(gsl_run *g) {
  fourbar_run *r = &g->base;
  int i;
  gsl_vector_set(g->guess, 0, g->start_t3);
  gsl_vector_set(g->guess, 1, g->start_t4);
  r->iterations = 0;
  r->failures = 0;
  for (i = 0; i < r->steps; i++) {
    const gsl_vector *root;
    g->crank = crank_angle(i);
    r->failures += gsl_solve_step(g->solver, &g->fdf, g->guess, &r->iterations);
    root = gsl_multiroot_fdfsolver_root(g->solver);
    r->t3[i] = gsl_vector_get(root, 0);
    r->t4[i] = gsl_vector_get(root, 1);
    gsl_vector_memcpy(g->guess, root);
  }
}

BENCH_ENTRY static void bench_fourbar_gsl_hybridsj(void *run) { gsl_pass(run); }
BENCH_ENTRY static void bench_fourbar_gsl_gnewton(void *run) { gsl_pass(run); }

/* ---- checks against the closed form ---- */

static double max_angle_error(const fourbar_run *r, const fourbar_run *ref) {
  double worst = 0.0;
  int i;
  for (i = 0; i < r->steps; i++) {
    worst = fmax(worst, fabs(angle_diff(r->t3[i], ref->t3[i])));
    worst = fmax(worst, fabs(angle_diff(r->t4[i], ref->t4[i])));
  }
  return worst;
}

/*
 * The rates and accelerations of the closed form's positions, by
 * differentiating the loop equation a e(t2) + b e(t3) - c e(t4) = (d, 0)
 * once and twice in time (derived here, unit crank rate, no crank
 * acceleration) and projecting on the normals of the coupler and rocker:
 *   w3 = -a sin(t2 - t4) / (b sin(t3 - t4)),
 *   w4 =  a sin(t2 - t3) / (c sin(t4 - t3)),
 * and with P = a e(t2) + b w3^2 e(t3) - c w4^2 e(t4),
 *   a3 = -(Px cos t4 + Py sin t4) / (b sin(t3 - t4)),
 *   a4 = -(Px cos t3 + Py sin t3) / (c sin(t3 - t4)).
 * Writes the largest rate and acceleration differences.
 */
static void rate_errors(const fourbar_run *r, const fourbar_run *ref,
                        double *rate_error, double *accel_error) {
  const fourbar *f = r->f;
  int i;
  *rate_error = *accel_error = 0.0;
  for (i = 0; i < r->steps; i++) {
    double t2 = crank_angle(i), t3 = ref->t3[i], t4 = ref->t4[i];
    double w3 = -f->a * sin(t2 - t4) / (f->b * sin(t3 - t4));
    double w4 = f->a * sin(t2 - t3) / (f->c * sin(t4 - t3));
    double px =
        f->a * cos(t2) + f->b * w3 * w3 * cos(t3) - f->c * w4 * w4 * cos(t4);
    double py =
        f->a * sin(t2) + f->b * w3 * w3 * sin(t3) - f->c * w4 * w4 * sin(t4);
    double a3 = -(px * cos(t4) + py * sin(t4)) / (f->b * sin(t3 - t4));
    double a4 = -(px * cos(t3) + py * sin(t3)) / (f->c * sin(t3 - t4));
    *rate_error =
        fmax(*rate_error, fmax(fabs(r->w3[i] - w3), fabs(r->w4[i] - w4)));
    *accel_error =
        fmax(*accel_error, fmax(fabs(r->a3[i] - a3), fabs(r->a4[i] - a4)));
  }
}

/* ---- the table ---- */

enum { CLOSED, SMALL, DENSE, RATES, HAND, HAND_RATES, HYBRIDSJ, GNEWTON,
       METHODS };

/* One row; kinloop rows name the kernel that factored, as the solver's
 * statistics report it. */
static void print_row(FILE *out, const char *name, const bench_method *m,
                      const bench_method *closed_method, const fourbar_run *r,
                      const fourbar_run *closed) {
  char label[80];
  if (r->s != NULL)
    snprintf(label, sizeof label, "%s -> %s", name,
             bench_kernel_name(r->kernel));
  else
    snprintf(label, sizeof label, "%s", name);
  fprintf(out, "%-40s %11.1f %10.2fx %6.0f%%", label,
          1e9 * m->median / r->steps, bench_ratio(m, closed_method),
          100.0 * m->spread);
  if (r == closed)
    fprintf(out, "  %9s  %15s", "-", "(reference)");
  else
    fprintf(out, "  %9.2f  %15.2e", (double)r->iterations / r->steps,
            max_angle_error(r, closed));
  fprintf(out, "  %6d\n", r->failures);
}

void bench_fourbar(FILE *out, const bench_plan *plan, fourbar_figures *fig) {
  static const char *const names[METHODS] = {
      "closed form (Freudenstein, support.c)",
      "kinloop position, AUTO",
      "kinloop position, DENSE",
      "kinloop pos+vel+acc, AUTO",
      "hand-written Newton (Cramer's rule)",
      "hand-written Newton pos+vel+acc",
      "GSL hybridsj (analytic Jacobian)",
      "GSL gnewton (analytic Jacobian)"};
  bench_method m[METHODS];
  fourbar_run *runs[METHODS];
  gsl_run *hybridsj, *gnewton;
  hand_run hand = {0}, hand_rates = {0};
  double t3, t4, u0 = 0.0, rate_error, accel_error;
  double hand_rate_error, hand_accel_error;
  int i;
  fig->f = build_fourbar(CRANK, COUPLER, ROCKER, GROUND);
  fig->start = bench_solver_new(fig->f.m, KL_KERNEL_AUTO);
  if (!freudenstein(&fig->f, 0.0, +1, &t3, &t4) ||
      kl_set_link_angle(fig->start, fig->f.coupler, t3) != KL_OK ||
      kl_set_link_angle(fig->start, fig->f.rocker, t4) != KL_OK ||
      kl_solve_position(fig->start, &u0) != KL_OK) {
    fprintf(stderr, "kinloop-bench: the four-bar does not solve at 0\n");
    exit(EXIT_FAILURE);
  }
  hybridsj = gsl_run_new(&fig->f, gsl_multiroot_fdfsolver_hybridsj, t3, t4);
  gnewton = gsl_run_new(&fig->f, gsl_multiroot_fdfsolver_gnewton, t3, t4);
  run_init(&hand.base, &fig->f, FOURBAR_STEPS, 0);
  run_init(&hand_rates.base, &fig->f, FOURBAR_STEPS, 1);
  hand.start_t3 = hand_rates.start_t3 = t3;
  hand.start_t4 = hand_rates.start_t4 = t4;
  fig->small = fourbar_run_kinloop(&fig->f, fig->start, KL_KERNEL_AUTO, 0);
  runs[CLOSED] = run_new(&fig->f, FOURBAR_STEPS, 0);
  runs[SMALL] = fig->small;
  runs[DENSE] = fourbar_run_kinloop(&fig->f, fig->start, KL_KERNEL_DENSE, 0);
  runs[RATES] = fourbar_run_kinloop(&fig->f, fig->start, KL_KERNEL_AUTO, 1);
  runs[HAND] = &hand.base;
  runs[HAND_RATES] = &hand_rates.base;
  runs[HYBRIDSJ] = &hybridsj->base;
  runs[GNEWTON] = &gnewton->base;
  m[CLOSED].fn = bench_fourbar_closed_form;
  m[SMALL].fn = bench_fourbar_kinloop_small;
  m[DENSE].fn = bench_fourbar_kinloop_dense;
  m[RATES].fn = bench_fourbar_kinloop_rates;
  m[HAND].fn = bench_fourbar_hand_newton;
  m[HAND_RATES].fn = bench_fourbar_hand_rates;
  m[HAND].ctx = &hand;
  m[HAND_RATES].ctx = &hand_rates;
  m[HYBRIDSJ].fn = bench_fourbar_gsl_hybridsj;
  m[GNEWTON].fn = bench_fourbar_gsl_gnewton;
  m[HYBRIDSJ].ctx = hybridsj;
  m[GNEWTON].ctx = gnewton;
  for (i = CLOSED; i <= RATES; i++)
    m[i].ctx = runs[i];
  bench_run(m, METHODS, CLOCK_PROCESS_CPUTIME_ID, plan);

  fprintf(out,
          "\n== Part 1: four-bar, ground %g, crank %g, coupler %g, "
          "rocker %g ==\n",
          GROUND, CRANK, COUPLER, ROCKER);
  fprintf(out,
          "%d crank steps of %g deg from 0, each from the previous "
          "solution; every method to |F|inf < %g (absolute)\n",
          FOURBAR_STEPS, FOURBAR_STEP_DEG, BENCH_RESIDUAL);
  fprintf(out, "ns/position: median of the rounds; /closed: median of the "
               "per-round ratios (rounds interleave the methods)\n");
  fprintf(out, "%-40s %11s %11s %7s  %9s  %15s  %6s\n", "method", "ns/position",
          "/closed", "spread", "iter/step", "max error rad", "failed");
  for (i = 0; i < METHODS; i++)
    print_row(out, names[i], &m[i], &m[CLOSED], runs[i], runs[CLOSED]);

  rate_errors(runs[RATES], runs[CLOSED], &rate_error, &accel_error);
  rate_errors(runs[HAND_RATES], runs[CLOSED], &hand_rate_error,
              &hand_accel_error);
  fig->small_ns = 1e9 * m[SMALL].median / FOURBAR_STEPS;
  fig->small_ratio = bench_ratio(&m[SMALL], &m[CLOSED]);
  fig->rates_ratio = bench_ratio(&m[RATES], &m[CLOSED]);
  fig->hybridsj_ratio = bench_ratio(&m[HYBRIDSJ], &m[SMALL]);
  fig->hand_ratio = bench_ratio(&m[SMALL], &m[HAND]);
  fig->hand_rates_ratio = bench_ratio(&m[RATES], &m[HAND_RATES]);
  fig->hand_valid =
      hand.base.failures == 0 && hand_rates.base.failures == 0 &&
      max_angle_error(&hand.base, runs[CLOSED]) <= BENCH_MAX_ERROR &&
      hand_rate_error <= BENCH_MAX_ERROR && hand_accel_error <= BENCH_MAX_ERROR;
  fig->small_valid =
      fig->small->failures == 0 &&
      max_angle_error(fig->small, runs[CLOSED]) <= BENCH_MAX_ERROR;
  fig->rates_valid =
      runs[RATES]->failures == 0 &&
      max_angle_error(runs[RATES], runs[CLOSED]) <= BENCH_MAX_ERROR &&
      rate_error <= BENCH_MAX_ERROR && accel_error <= BENCH_MAX_ERROR;
  fprintf(out,
          "kinloop's rates agree with the differentiated loop equation "
          "to %.2e rad/s, its accelerations to %.2e rad/s^2 (unit crank "
          "rate)\n",
          rate_error, accel_error);
  fprintf(out, ">> kinloop position / closed form:          %6.2fx\n",
          fig->small_ratio);
  fprintf(out, ">> kinloop pos+vel+acc / closed form:       %6.2fx\n",
          fig->rates_ratio);
  fprintf(out,
          "the hand-written rates agree with it to %.2e rad/s, its "
          "accelerations to %.2e rad/s^2\n",
          hand_rate_error, hand_accel_error);
  fprintf(out, ">> kinloop position / hand-written Newton:  %6.2fx\n",
          fig->hand_ratio);
  fprintf(out, ">> kinloop pos+vel+acc / hand-written:      %6.2fx\n",
          fig->hand_rates_ratio);
  fprintf(out, ">> GSL hybridsj / kinloop position:         %6.2fx\n",
          fig->hybridsj_ratio);
  fprintf(out, ">> GSL gnewton / kinloop position:          %6.2fx\n",
          bench_ratio(&m[GNEWTON], &m[SMALL]));
  fprintf(out, ">> kinloop DENSE / AUTO (small kernel):     %6.2fx\n",
          bench_ratio(&m[DENSE], &m[SMALL]));
  fprintf(out, ">> a four-bar solver's block (kl_solver_bytes): %zu bytes\n",
          kl_solver_bytes(fig->f.m));
  fourbar_run_free(runs[CLOSED]);
  fourbar_run_free(runs[DENSE]);
  fourbar_run_free(runs[RATES]);
  run_release(&hand.base);
  run_release(&hand_rates.base);
  gsl_run_free(hybridsj);
  gsl_run_free(gnewton);
}

void fourbar_done(fourbar_figures *fig) {
  fourbar_run_free(fig->small);
  kl_solver_free(fig->start);
  kl_model_free(fig->f.m);
}
