/*
 * test_kernels.c - every factorization kernel gives the same answers to
 * rounding on every test mechanism, and the rates, taken with the factors
 * at the converged position, agree with closed forms to 1e-12.
 */
#include <check.h>
#include <math.h>
#include <string.h>

#include "suite.h"
#include "support.h"

static const int kernels[3] = {KL_KERNEL_SMALL, KL_KERNEL_DENSE,
                               KL_KERNEL_BANDED};

static kl_solver *solver_with_kernel(const kl_model *m, int kernel) {
  kl_solver *s = kl_solver_new(m);
  kl_options o;
  kl_options_default(&o);
  o.kernel = kernel;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_OK);
  return s;
}

/* One position, velocity and acceleration of every coordinate and point. */
#define MAX_VALUES 256
typedef struct {
  double v[MAX_VALUES];
  int n;
} solution;

static void record(const kl_solver *s, solution *out) {
  const kl_model *m = kl_solver_model(s);
  int l, j, p;
  out->n = 0;
  for (l = 0; l < kl_model_link_count(m) && out->n + 3 <= MAX_VALUES; l++) {
    out->v[out->n++] = kl_link_angle(s, l);
    out->v[out->n++] = kl_link_rate(s, l);
    out->v[out->n++] = kl_link_accel(s, l);
  }
  for (j = 0; j < kl_model_joint_count(m) && out->n + 3 <= MAX_VALUES; j++)
    if (kl_model_joint_kind(m, j) != KL_JOINT_REVOLUTE) {
      out->v[out->n++] = kl_joint_slide(s, j);
      out->v[out->n++] = kl_joint_slide_rate(s, j);
      out->v[out->n++] = kl_joint_slide_accel(s, j);
    }
  for (p = 0; p < kl_model_point_count(m) && out->n + 6 <= MAX_VALUES; p++) {
    double xy[2];
    kl_point_position(s, p, xy);
    out->v[out->n++] = xy[0];
    out->v[out->n++] = xy[1];
    kl_point_velocity(s, p, xy);
    out->v[out->n++] = xy[0];
    out->v[out->n++] = xy[1];
    kl_point_acceleration(s, p, xy);
    out->v[out->n++] = xy[0];
    out->v[out->n++] = xy[1];
  }
}

/*
 * Solves the same path of inputs with each kernel from the same sketch and
 * compares everything: the kernels differ only in the order of rounding,
 * so they agree to a few units in the last place of the largest values.
 * `sketch` sets the starting state; inputs[k * ninputs ...] is step k.
 */
static void same_with_every_kernel(const kl_model *m,
                                   void (*sketch)(kl_solver *, const void *),
                                   const void *ctx, const double *inputs,
                                   int steps) {
  int ni = kl_model_input_count(m), k, i, c;
  double rates[8], accels[8];
  kl_solver *s[3];
  for (i = 0; i < ni; i++) {
    rates[i] = 1.0 + 0.5 * i;
    accels[i] = -0.7 + 0.3 * i;
  }
  for (c = 0; c < 3; c++) {
    s[c] = solver_with_kernel(m, kernels[c]);
    sketch(s[c], ctx);
  }
  for (k = 0; k < steps; k++) {
    solution sol[3];
    for (c = 0; c < 3; c++) {
      kl_solve_stats st;
      st.size = sizeof st;
      ck_assert_msg(kl_solve_position(s[c], inputs + (size_t)k * ni) == KL_OK,
                    "kernel %d step %d: %s", kernels[c], k,
                    kl_solver_error(s[c]));
      kl_solver_stats(s[c], &st);
      ck_assert_int_eq(st.kernel, kernels[c]);
      ck_assert_int_eq(kl_solve_velocity(s[c], rates), KL_OK);
      ck_assert_int_eq(kl_solve_acceleration(s[c], accels), KL_OK);
      record(s[c], &sol[c]);
    }
    for (c = 1; c < 3; c++)
      for (i = 0; i < sol[0].n; i++) {
        double a = sol[0].v[i], b = sol[c].v[i];
        ck_assert_msg(fabs(a - b) <= 1e-10 * (1.0 + fabs(a)),
                      "kernel %d differs at value %d of step %d: %.17g vs "
                      "%.17g",
                      kernels[c], i, k, b, a);
      }
  }
  for (c = 0; c < 3; c++)
    kl_solver_free(s[c]);
}

static void sketch_fourbar(kl_solver *s, const void *ctx) {
  const fourbar *f = ctx;
  kl_set_link_angle(s, f->coupler, 0.3);
  kl_set_link_angle(s, f->rocker, 1.5);
}

static void sketch_slider(kl_solver *s, const void *ctx) {
  const slider_crank *sc = ctx;
  kl_set_link_angle(s, sc->rod, -0.1);
  kl_set_joint_slide(s, sc->slide_joint, 120);
}

static void sketch_inverted(kl_solver *s, const void *ctx) {
  const inverted_slider_crank *is = ctx;
  kl_set_link_angle(s, is->guide, 3.0);
  kl_set_joint_slide(s, is->slide_joint, 60);
}

static void sketch_fivebar(kl_solver *s, const void *ctx) {
  const fivebar *f = ctx;
  kl_set_link_angle(s, f->link1, 1.0);
  kl_set_link_angle(s, f->link2, 2.0);
}

static void sketch_pins(kl_solver *s, const void *ctx) {
  const pin_linkage *p = ctx;
  int l;
  for (l = 1; l < p->nlinks; l++)
    kl_set_link_angle(s, l, p->sketch[l]);
}

static void sketch_chain_at_zero(kl_solver *s, const void *ctx) {
  sketch_chain(ctx, s, 0.0);
}

/* a full turn in 10-degree steps for one input */
static void turn(double *inputs, int steps) {
  int k;
  for (k = 0; k < steps; k++)
    inputs[k] = k * 2 * PI / (steps - 1);
}

START_TEST(one_input_mechanisms_agree_across_kernels) {
  double inputs[37];
  fourbar f = build_fourbar(40, 120, 80, 100);
  slider_crank sc = build_slider_crank(30, 100, 12);
  inverted_slider_crank is = build_inverted_slider_crank(35, 90);
  pin_linkage watt = watt_sixbar(), steph = stephenson_sixbar();
  kl_model *mw = build_pin_linkage(&watt, 0), *ms = build_pin_linkage(&steph, 0);
  turn(inputs, 37);
  same_with_every_kernel(f.m, sketch_fourbar, &f, inputs, 37);
  same_with_every_kernel(sc.m, sketch_slider, &sc, inputs, 37);
  same_with_every_kernel(is.m, sketch_inverted, &is, inputs, 37);
  same_with_every_kernel(mw, sketch_pins, &watt, inputs, 37);
  same_with_every_kernel(ms, sketch_pins, &steph, inputs, 37);
  kl_model_free(f.m);
  kl_model_free(sc.m);
  kl_model_free(is.m);
  kl_model_free(mw);
  kl_model_free(ms);
}
END_TEST

START_TEST(fivebar_and_chains_agree_across_kernels) {
  double inputs[2 * 25], chain_inputs[37];
  fivebar f = build_fivebar(35, 25, 70, 80, 80);
  int k, n;
  for (k = 0; k < 25; k++) {
    inputs[2 * k] = k * PI / 12;
    inputs[2 * k + 1] = 2 * k * PI / 12 + 0.4;
  }
  same_with_every_kernel(f.m, sketch_fivebar, &f, inputs, 25);
  kl_model_free(f.m);
  turn(chain_inputs, 37);
  for (n = 1; n <= 20; n *= 4) {
    chain c = build_chain(n);
    same_with_every_kernel(c.m, sketch_chain_at_zero, &c, chain_inputs, 37);
    kl_model_free(c.m);
  }
}
END_TEST

/* The reported rcond with the kernel forced to `kernel`, after solving
 * from `from` at input u (KL_OK asserted). */
static double rcond_with(const kl_model *m, const kl_solver *from, int kernel,
                         double u) {
  kl_solver *s = solver_with_kernel(m, kernel);
  kl_solve_stats st;
  st.size = sizeof st;
  kl_solver_copy_state(s, from);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  kl_solver_stats(s, &st);
  ck_assert_int_eq(st.kernel, kernel);
  kl_solver_free(s);
  return st.rcond;
}

/*
 * The four-bar's 2 x 2 loop Jacobian in the coupler and rocker angles,
 * J = [-b sin t3, c sin t4; b cos t3, -c cos t4] (the loop equation
 * differentiated, common practice, no source), has the exact 1-norm
 * condition |det J| / (|J|_1 |J|_inf), since J^-1 is its adjugate over
 * det J. The small kernel reports it (to 1e-4: the factors may be one
 * quadratically converged step, below 1e-5 rad, from the closed form's
 * angles, kl_solve_stats); the LAPACK kernels report at most it
 * (a lower bound from the factors, or LAPACK's estimate where the bound is
 * low) and, this far from a singular position, at least 1e-6.
 */
START_TEST(rcond_of_the_fourbar_is_exact_or_a_lower_bound) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *start = kl_solver_new(f.m);
  double u, t3, t4, zero = 0.0;
  int k, step;
  ck_assert(freudenstein(&f, 0.0, +1, &t3, &t4));
  kl_set_link_angle(start, f.coupler, t3);
  kl_set_link_angle(start, f.rocker, t4);
  ck_assert_int_eq(kl_solve_position(start, &zero), KL_OK);
  for (step = 1; step < 36; step++) {
    double j00, j01, j10, j11, exact;
    u = step * PI / 18;
    ck_assert(freudenstein(&f, u, +1, &t3, &t4));
    j00 = -f.b * sin(t3), j01 = f.c * sin(t4);
    j10 = f.b * cos(t3), j11 = -f.c * cos(t4);
    exact = fabs(j00 * j11 - j01 * j10) /
            (fmax(fabs(j00) + fabs(j10), fabs(j01) + fabs(j11)) *
             fmax(fabs(j00) + fabs(j01), fabs(j10) + fabs(j11)));
    for (k = 0; k < 3; k++) {
      double r = rcond_with(f.m, start, kernels[k], u);
      if (kernels[k] == KL_KERNEL_SMALL)
        ck_assert_msg(fabs(r - exact) <= 1e-4 * exact,
                      "small %.17g exact %.17g", r, exact);
      else
        ck_assert_msg(r <= exact * (1 + 1e-4) && r >= 1e-6,
                      "kernel %d: %.17g, exact %.17g", kernels[k], r, exact);
    }
  }
  kl_solver_free(start);
  kl_model_free(f.m);
}
END_TEST

/* A chain of 5 loops (10 unknowns): the small kernel's rcond is exact (the
 * inverse column by column); the LAPACK kernels' never exceeds it. */
START_TEST(rcond_of_a_chain_never_exceeds_the_exact_one) {
  chain c = build_chain(5);
  kl_solver *start = kl_solver_new(c.m);
  double zero = 0.0, u;
  int k, step;
  sketch_chain(&c, start, 0.0);
  ck_assert_int_eq(kl_solve_position(start, &zero), KL_OK);
  for (step = 1; step < 36; step++) {
    double exact;
    u = step * PI / 18;
    exact = rcond_with(c.m, start, KL_KERNEL_SMALL, u);
    for (k = 1; k < 3; k++) {
      double r = rcond_with(c.m, start, kernels[k], u);
      ck_assert_msg(r <= exact * (1 + 1e-9) && r > 0.0,
                    "kernel %d at %g: %.17g, exact %.17g", kernels[k], u, r,
                    exact);
    }
  }
  kl_solver_free(start);
  kl_model_free(c.m);
}
END_TEST

/* A parallelogram at its change point (all four links in line) is singular
 * whichever kernel factors it: the cheaper condition watch keeps the
 * verdict. */
START_TEST(change_point_is_singular_with_every_kernel) {
  fourbar p = build_fourbar(40, 100, 40, 100);
  double u = 0.0;
  int k;
  for (k = 0; k < 3; k++) {
    kl_solver *s = solver_with_kernel(p.m, kernels[k]);
    kl_set_link_angle(s, p.coupler, 0.02);
    kl_set_link_angle(s, p.rocker, 0.03);
    ck_assert_int_eq(kl_solve_position(s, &u), KL_ESINGULAR);
    kl_solver_free(s);
  }
  kl_model_free(p.m);
}
END_TEST

/*
 * Rates from the factors at the converged position agree with the closed
 * forms of the differentiated loop (see test_rates.c for their derivation)
 * to 1e-12 relative, with every kernel; factors of the last Newton iterate
 * would cost about 1e-7.
 */
START_TEST(rates_agree_with_closed_form_to_1e_12) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  int c, k;
  for (c = 0; c < 3; c++) {
    kl_solver *s = solver_with_kernel(f.m, kernels[c]);
    double worst = 0.0;
    sketch_fourbar(s, &f);
    for (k = 0; k < 360; k++) {
      double t2 = k * PI / 180, w2 = 1.7, a2 = -0.4, t3, t4;
      double w3, w4, A, B, C, D, E, F, al3, al4;
      ck_assert_int_eq(kl_solve_position(s, &t2), KL_OK);
      ck_assert_int_eq(kl_solve_velocity(s, &w2), KL_OK);
      ck_assert_int_eq(kl_solve_acceleration(s, &a2), KL_OK);
      t3 = kl_link_angle(s, f.coupler);
      t4 = kl_link_angle(s, f.rocker);
      w3 = f.a * w2 * sin(t4 - t2) / (f.b * sin(t3 - t4));
      w4 = f.a * w2 * sin(t2 - t3) / (f.c * sin(t4 - t3));
      A = f.c * sin(t4);
      B = f.b * sin(t3);
      C = f.a * a2 * sin(t2) + f.a * w2 * w2 * cos(t2) +
          f.b * w3 * w3 * cos(t3) - f.c * w4 * w4 * cos(t4);
      D = f.c * cos(t4);
      E = f.b * cos(t3);
      F = f.a * a2 * cos(t2) - f.a * w2 * w2 * sin(t2) -
          f.b * w3 * w3 * sin(t3) + f.c * w4 * w4 * sin(t4);
      al3 = (C * D - A * F) / (A * E - B * D);
      al4 = (C * E - B * F) / (A * E - B * D);
      worst = fmax(worst, rel_diff(kl_link_rate(s, f.coupler), w3, 1.0));
      worst = fmax(worst, rel_diff(kl_link_rate(s, f.rocker), w4, 1.0));
      worst = fmax(worst, rel_diff(kl_link_accel(s, f.coupler), al3, 1.0));
      worst = fmax(worst, rel_diff(kl_link_accel(s, f.rocker), al4, 1.0));
    }
    ck_assert_msg(worst <= 1e-12, "kernel %d: rates off by %.2e relative",
                  kernels[c], worst);
    kl_solver_free(s);
  }
  kl_model_free(f.m);
}
END_TEST

/*
 * The flat evaluation plan (lib/plan.c) serves models of revolute loops
 * only; the same four-bar beside a driven slider, whose sliding joint
 * keeps the model on the general code, must give the same positions,
 * rates and accelerations to rounding, and both Freudenstein's closed
 * form (support.c) to 1e-12 rad.
 */
START_TEST(flat_plan_agrees_with_general_code) {
  fourbar plain = build_fourbar(40, 120, 80, 100);
  fourbar mixed = build_fourbar_open(40, 120, 80, 100);
  int slider = kl_add_link(mixed.m, "slider"), k, r;
  int slide = kl_add_prismatic(mixed.m, KL_GROUND, 0, -50, 0.0, slider, 0, 0);
  kl_solver *s[2];
  double worst = 0.0, closed = 0.0, t3, t4;
  int branch = +1;
  ck_assert_int_ge(slide, 0);
  ck_assert_int_eq(kl_add_input(mixed.m, slide), 1);
  ck_assert_int_eq(kl_model_finalize(mixed.m), KL_OK);
  s[0] = kl_solver_new(plain.m);
  s[1] = kl_solver_new(mixed.m);
  sketch_fourbar(s[0], &plain);
  sketch_fourbar(s[1], &mixed);
  /* the sketch's assembly mode: the closed form's branch at the start */
  ck_assert_int_eq(kl_solve_position(s[0], (double[]){0.0}), KL_OK);
  ck_assert(freudenstein(&plain, 0.0, branch, &t3, &t4));
  if (fabs(angle_diff(kl_link_angle(s[0], plain.rocker), t4)) > 1e-6)
    branch = -1;
  for (k = 0; k < 720; k++) {
    double u[2] = {k * PI / 360, 3.0 + k * 0.01}, ud[2] = {1.3, 0.5};
    double udd[2] = {-0.7, 0.0};
    const int links[2] = {plain.coupler, plain.rocker};
    for (r = 0; r < 2; r++) {
      ck_assert_int_eq(kl_solve_position(s[r], u), KL_OK);
      ck_assert_int_eq(kl_solve_velocity(s[r], ud), KL_OK);
      ck_assert_int_eq(kl_solve_acceleration(s[r], udd), KL_OK);
    }
    for (r = 0; r < 2; r++) {
      worst = fmax(worst, fabs(angle_diff(kl_link_angle(s[0], links[r]),
                                          kl_link_angle(s[1], links[r]))));
      worst = fmax(worst, rel_diff(kl_link_rate(s[0], links[r]),
                                   kl_link_rate(s[1], links[r]), 1.0));
      worst = fmax(worst, rel_diff(kl_link_accel(s[0], links[r]),
                                   kl_link_accel(s[1], links[r]), 1.0));
    }
    ck_assert(freudenstein(&plain, u[0], branch, &t3, &t4));
    closed = fmax(closed, fabs(angle_diff(kl_link_angle(s[0], plain.coupler), t3)));
    closed = fmax(closed, fabs(angle_diff(kl_link_angle(s[0], plain.rocker), t4)));
    ck_assert(fabs(kl_joint_slide(s[1], slide) - u[1]) <= 1e-12);
  }
  ck_assert_msg(worst <= 1e-12, "plan and general code differ by %.2e", worst);
  ck_assert_msg(closed <= 1e-12, "plan off the closed form by %.2e", closed);
  kl_solver_free(s[0]);
  kl_solver_free(s[1]);
  kl_model_free(plain.m);
  kl_model_free(mixed.m);
}
END_TEST

/* AUTO chooses by size and structure; forcing and reading back works. */
START_TEST(auto_chooses_by_size_and_band) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  chain c = build_chain(50);
  kl_solver *s = kl_solver_new(f.m), *t = kl_solver_new(c.m);
  kl_solve_stats st;
  kl_options o;
  double u = 0.3;
  st.size = sizeof st;
  sketch_fourbar(s, &f);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  kl_solver_stats(s, &st);
  ck_assert_int_eq(st.kernel, KL_KERNEL_SMALL);
  sketch_chain(&c, t, 0.3);
  ck_assert_int_eq(kl_solve_position(t, &u), KL_OK);
  kl_solver_stats(t, &st);
  ck_assert_int_eq(st.kernel, KL_KERNEL_BANDED);
  kl_options_default(&o);
  o.kernel = 7;
  ck_assert_int_eq(kl_solver_set_options(t, &o), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(t), "kernel"));
  kl_solver_free(s);
  kl_solver_free(t);
  kl_model_free(f.m);
  kl_model_free(c.m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("kernels");
  TCase *tc = tcase_create("kernels");
  tcase_set_timeout(tc, 120);
  tcase_add_test(tc, one_input_mechanisms_agree_across_kernels);
  tcase_add_test(tc, fivebar_and_chains_agree_across_kernels);
  tcase_add_test(tc, rates_agree_with_closed_form_to_1e_12);
  tcase_add_test(tc, flat_plan_agrees_with_general_code);
  tcase_add_test(tc, auto_chooses_by_size_and_band);
  tcase_add_test(tc, rcond_of_the_fourbar_is_exact_or_a_lower_bound);
  tcase_add_test(tc, rcond_of_a_chain_never_exceeds_the_exact_one);
  tcase_add_test(tc, change_point_is_singular_with_every_kernel);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
