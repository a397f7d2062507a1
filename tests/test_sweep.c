/*
 * test_sweep.c - sweeps and assembly modes against closed forms: motion
 * limits, change points, branch keeping, the coefficients a sweep delivers,
 * the modes at one input, bad arguments, and no allocation.
 */
#include <check.h>
#include <limits.h>
#include <math.h>
#include <string.h>

#include "suite.h"
#include "support.h"


/* Puts a four-bar's solver near `branch` at crank angle u: a rough sketch
 * near the closed form chooses it (as in test_position.c). */
static void sketch_branch(kl_solver *s, const fourbar *f, double u,
                          int branch) {
  double t3, t4;
  ck_assert(freudenstein(f, u, branch, &t3, &t4));
  ck_assert_int_eq(kl_set_link_angle(s, f->coupler, t3 + 0.15), KL_OK);
  ck_assert_int_eq(kl_set_link_angle(s, f->rocker, t4 - 0.15), KL_OK);
}

/* Closed-form angle tolerance, as in test_position.c: a position converged
 * to 1e-12 of the scale leaves angles within about 1e-13 rad. */
#define ANGLE_TOL 1e-10

/* ---- what a sweep delivers ---- */

/* Up to this many delivered steps are kept. */
#define MAX_TRACE 1500
/* Links whose angle, rate and acceleration are kept per step. */
#define TRACKED 3

typedef struct {
  int links[TRACKED];
  int stop_at;         /* return non-zero on this call (1-based); 0 never */
  int calls;
  int out_of_order;    /* a call whose step number was not the call count */
  double last_input;
  double input[MAX_TRACE];
  double angle[TRACKED][MAX_TRACE], rate[TRACKED][MAX_TRACE],
      accel[TRACKED][MAX_TRACE];
  double input_rate[MAX_TRACE], input_accel[MAX_TRACE];
} trace;

static void trace_links(trace *t, int l0, int l1, int l2) {
  memset(t, 0, sizeof *t);
  t->links[0] = l0;
  t->links[1] = l1;
  t->links[2] = l2;
}

/* No assertions inside: the callback runs inside the library. */
static int record(const kl_solver *s, int step, double input, void *user) {
  trace *t = user;
  int k = t->calls, i;
  if (step != k)
    t->out_of_order++;
  if (k < MAX_TRACE) {
    t->input[k] = input;
    for (i = 0; i < TRACKED; i++) {
      t->angle[i][k] = kl_link_angle(s, t->links[i]);
      t->rate[i][k] = kl_link_rate(s, t->links[i]);
      t->accel[i][k] = kl_link_accel(s, t->links[i]);
    }
    t->input_rate[k] = kl_link_rate(s, t->links[0]);
    t->input_accel[k] = kl_link_accel(s, t->links[0]);
  }
  t->last_input = input;
  t->calls++;
  return t->stop_at != 0 && t->calls == t->stop_at;
}

static kl_sweep_result new_result(void) {
  kl_sweep_result r;
  memset(&r, 0, sizeof r);
  r.size = sizeof r;
  return r;
}

/* ---- everything a caller can read back, to compare states bit for bit ---- */


/* ------------------------------------------------------------------------
 * 1. Motion limits of a non-Grashof four-bar
 * ------------------------------------------------------------------------ */

/* Non-Grashof (50 + 100 > 70 + 60, geometry chosen for this test). With
 * coupler and rocker in line, the crank pin is b + c from O4, so the law of
 * cosines gives the crank's limits |t2| = acos((a^2 + d^2 - (b + c)^2) /
 * (2 a d)) (elementary geometry). */
static double non_grashof_limit(const fourbar *f) {
  return acos((f->a * f->a + f->d * f->d - (f->b + f->c) * (f->b + f->c)) /
              (2 * f->a * f->d));
}

/* The sweep promises the limit to 1e-10 (kinloop.h); 1e-9 keeps a factor ten
 * for the closed form's own rounding (acos near 0.2 loses nothing). */
#define LIMIT_TOL 1e-9

START_TEST(non_grashof_sweeps_stop_at_both_limits) {
  fourbar f = build_fourbar(70, 50, 60, 100);
  const double lim = non_grashof_limit(&f);
  const int steps = 40;
  int sense;
  for (sense = 1; sense >= -1; sense -= 2) {
    kl_solver *s = kl_solver_new(f.m);
    kl_sweep_result r = new_result();
    static trace t;
    const double to = sense * PI;
    int expect_done, k, st;
    ck_assert_ptr_nonnull(s);
    kl_set_link_angle(s, f.coupler, -0.2);
    kl_set_link_angle(s, f.rocker, 1.5);
    trace_links(&t, f.crank, f.coupler, f.rocker);
    st = kl_solver_sweep(s, 0, 0.0, to, steps, record, &t, &r);
    ck_assert_msg(st == KL_LIMIT, "sense %d: %s (%s)", sense,
                  kl_status_str(st), kl_solver_error(s));
    ck_assert_int_eq(r.status, KL_LIMIT);
    /* source: the law-of-cosines limit above */
    ck_assert_msg(fabs(r.limit_input - sense * lim) <= LIMIT_TOL,
                  "sense %d: limit %.15g, closed form %.15g", sense,
                  r.limit_input, sense * lim);
    /* the steps before the limit, 0, pi/40, ... up to |u| < lim, and no
     * more: floor(lim / (pi / 40)) + 1 of them */
    expect_done = (int)floor(lim / (PI / steps)) + 1;
    ck_assert_int_eq(r.steps_done, expect_done);
    ck_assert_int_eq(t.calls, r.steps_done);
    ck_assert_int_eq(t.out_of_order, 0);
    for (k = 0; k < t.calls; k++)
      ck_assert_double_lt(fabs(t.input[k]), lim);
    ck_assert_int_ge(r.substeps, r.steps_done - 1);
    ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "limit"));
    /* the solver holds the last delivered step */
    ck_assert_double_eq(kl_link_angle(s, f.crank), t.last_input);
    ck_assert_double_eq(kl_input_value(s, 0), t.last_input);
    ck_assert_double_eq(kl_link_angle(s, f.coupler), t.angle[1][t.calls - 1]);
    ck_assert_double_eq(kl_link_angle(s, f.rocker), t.angle[2][t.calls - 1]);
    ck_assert_double_eq(kl_link_rate(s, f.rocker), t.rate[2][t.calls - 1]);
    ck_assert_double_eq(kl_link_accel(s, f.rocker), t.accel[2][t.calls - 1]);
    kl_solver_free(s);
  }
  kl_model_free(f.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 2. A crank-rocker's full turn keeps its branch
 * ------------------------------------------------------------------------ */

START_TEST(full_turn_returns_on_the_same_branch) {
  fourbar f = build_fourbar(40, 120, 80, 100); /* Grashof: 40 + 120 < 80 + 100 */
  const int steps = 72;
  int branch, sense;
  for (branch = 1; branch >= -1; branch -= 2)
    for (sense = 1; sense >= -1; sense -= 2) {
      kl_solver *s = kl_solver_new(f.m);
      kl_sweep_result r = new_result();
      static trace t;
      double t3, t4, start3, start4;
      int k, st;
      sketch_branch(s, &f, 0.0, branch);
      trace_links(&t, f.crank, f.coupler, f.rocker);
      st = kl_solver_sweep(s, 0, 0.0, sense * 2 * PI, steps, record, &t, &r);
      ck_assert_msg(st == KL_OK, "branch %d sense %d: %s", branch, sense,
                    kl_solver_error(s));
      ck_assert_int_eq(r.status, KL_OK);
      ck_assert_int_eq(r.steps_done, steps + 1);
      ck_assert_int_eq(t.calls, steps + 1);
      ck_assert(isnan(r.limit_input));
      /* 5 degree steps of a crank-rocker are easy: one sub-step each, none
       * spent on the rounding between a step's end and its target */
      ck_assert_int_eq(r.substeps, steps);
      start3 = t.angle[1][0];
      start4 = t.angle[2][0];
      for (k = 0; k < t.calls; k++) {
        /* source: Freudenstein's closed form of the starting branch */
        ck_assert(freudenstein(&f, t.input[k], branch, &t3, &t4));
        ck_assert_msg(fabs(angle_diff(t.angle[2][k], t4)) <= ANGLE_TOL,
                      "branch %d sense %d step %d: rocker %.15g, closed "
                      "form %.15g",
                      branch, sense, k, t.angle[2][k], t4);
        ck_assert_double_le(fabs(angle_diff(t.angle[1][k], t3)), ANGLE_TOL);
        /* the driven crank is set exactly to the step's input, and the
         * steps are equally spaced (to rounding) */
        ck_assert_double_eq(t.angle[0][k], t.input[k]);
        ck_assert_double_le(fabs(t.input[k] - sense * 2 * PI * k / steps),
                            1e-14);
      }
      /* back at the start: the loop closes on the same assembly */
      ck_assert_double_eq(kl_link_angle(s, f.crank), sense * 2 * PI);
      ck_assert_double_le(fabs(angle_diff(kl_link_angle(s, f.coupler), start3)),
                          1e-10);
      ck_assert_double_le(fabs(angle_diff(kl_link_angle(s, f.rocker), start4)),
                          1e-10);
      kl_solver_free(s);
    }
  kl_model_free(f.m);
}
END_TEST

/*
 * A sweep's work is bounded (the header's contract for kl_solver_sweep): a hundred
 * turns in one step still arrive, on the starting branch (Freudenstein's
 * closed form as above); a slide swept over 1e207 length units, a linkage
 * the API fuzzer built, is refused with KL_EMAXITER after its first step
 * instead of running for ever, the solver left at that step.
 */
static const char far_slide_model[] =
    "kinloop-model 1\n"
    "units length unstated angle rad\n"
    "link n\n"
    "link -\n"
    "slot - ground 77.27 15.76 axis 1.5707963267948966 n -3.2e-277 -3.2e-277\n"
    "revolute - n -3.1e-277 -1.0548162982523977e+144 @2 1.5e-57 -62.62\n"
    "prismatic - ground 65.05 -2.9e-179 axis -73.73 @2 -67.89 -39.61\n"
    "input @0\n";

START_TEST(sweep_work_is_bounded) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_sweep_result r = new_result();
  kl_io_error err;
  kl_model *far;
  double t3, t4;
  int st;
  sketch_branch(s, &f, 0.0, 1);
  ck_assert_msg(kl_solver_sweep(s, 0, 0.0, 200 * PI, 1, NULL, NULL, &r) == KL_OK, "%s",
                kl_solver_error(s));
  ck_assert_int_eq(r.steps_done, 2);
  ck_assert(freudenstein(&f, 200 * PI, 1, &t3, &t4));
  ck_assert_double_le(fabs(angle_diff(kl_link_angle(s, f.rocker), t4)), ANGLE_TOL);
  kl_solver_free(s);
  kl_model_free(f.m);

  err.size = sizeof err;
  far = kl_model_read(far_slide_model, strlen(far_slide_model), &err);
  ck_assert_msg(far != NULL, "%s", err.message);
  s = kl_solver_new(far);
  /* a step of 5e206 length units in a model of scale 1e144: the sweep
   * ends with an error (where its sub-steps give out, or at a singular
   * position it meets far out) after a bounded number of sub-steps, the
   * solver back at the one step delivered */
  st = kl_solver_sweep(s, 0, -73.11, -1.08e207, 2, NULL, NULL, &r);
  ck_assert_msg(st == KL_EMAXITER || st == KL_ESINGULAR || st == KL_LIMIT,
                "%s", kl_status_str(st));
  ck_assert_int_eq(r.status, st);
  ck_assert_int_le(r.substeps, 40000);
  ck_assert_int_eq(r.steps_done, 1);
  ck_assert_double_eq(kl_input_value(s, 0), -73.11);
  ck_assert_int_eq(kl_solve_velocity(s, (const double[]){1.0}), KL_OK);
  kl_solver_free(s);
  kl_model_free(far);
}
END_TEST

/* ------------------------------------------------------------------------
 * 3. The callback reads kinematic coefficients through the getters
 * ------------------------------------------------------------------------ */

/*
 * Source: the velocity ratios of the four-bar from its differentiated loop
 * equation, as derived in test_rates.c, at unit crank rate:
 *   d t3 / d t2 = a sin(t4 - t2) / (b sin(t3 - t4)),
 *   d t4 / d t2 = a sin(t2 - t3) / (c sin(t4 - t3)).
 * 1e-9 relative (floor 1): the tolerance of test_rates.c's closed forms.
 *
 * The accelerations, second-order coefficients d^2 t / d t2^2, against the
 * five-point central difference of the delivered rates,
 *   (-w[k+2] + 8 w[k+1] - 8 w[k-1] + w[k-2]) / (12 h)
 * (common practice, no source), whose truncation error is h^4 |w^(5)| / 30.
 * With 1440 steps over a turn, h = 0.25 deg = 4.4e-3 rad, h^4 / 30 = 1.2e-11;
 * the rates' rounding (about 1e-13, from positions converged to 1e-13 rad)
 * adds only 1.5e-13 / h = 3e-11. Measured worst: 5.6e-9, near the smallest
 * transmission angle where |w^(5)| reaches some hundreds; it falls 16-fold
 * per halving of h (8.9e-8 at 720 steps, 4.2e-10 at 2880), so it is the
 * truncation. 1e-7 (relative, floor 1) keeps a factor 18 over it, while a
 * wrong second-order term errs by the size of the term itself (order 1).
 */
#define RATE_TOL 1e-9
#define COEFF_STEPS 1440
#define FIVE_POINT_TOL 1e-7

START_TEST(callback_reads_kinematic_coefficients) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_sweep_result r = new_result();
  static trace t;
  const double h = 2 * PI / COEFF_STEPS;
  int k, i;
  sketch_branch(s, &f, 0.0, 1);
  trace_links(&t, f.crank, f.coupler, f.rocker);
  ck_assert_int_eq(kl_solver_sweep(s, 0, 0.0, 2 * PI, COEFF_STEPS, record, &t, &r),
                   KL_OK);
  ck_assert_int_eq(t.calls, COEFF_STEPS + 1);
  for (k = 0; k < t.calls; k++) {
    double t2 = t.input[k], t3 = t.angle[1][k], t4 = t.angle[2][k];
    double w3 = f.a * sin(t4 - t2) / (f.b * sin(t3 - t4));
    double w4 = f.a * sin(t2 - t3) / (f.c * sin(t4 - t3));
    /* the swept input moves at unit rate and zero acceleration (kinloop.h) */
    ck_assert_double_eq(t.input_rate[k], 1.0);
    ck_assert_double_eq(t.input_accel[k], 0.0);
    ck_assert_msg(rel_diff(t.rate[1][k], w3, 1.0) <= RATE_TOL,
                  "coupler rate at step %d: %.17g vs %.17g", k, t.rate[1][k],
                  w3);
    ck_assert_msg(rel_diff(t.rate[2][k], w4, 1.0) <= RATE_TOL,
                  "rocker rate at step %d: %.17g vs %.17g", k, t.rate[2][k],
                  w4);
  }
  /* the steps are equally spaced, so the stencil applies */
  for (k = 2; k + 2 < t.calls; k++)
    for (i = 1; i < TRACKED; i++) {
      const double *w = t.rate[i];
      double fd = (-w[k + 2] + 8 * w[k + 1] - 8 * w[k - 1] + w[k - 2]) / (12 * h);
      ck_assert_msg(rel_diff(t.accel[i][k], fd, 1.0) <= FIVE_POINT_TOL,
                    "link %d acceleration at step %d: %.15g, difference %.15g",
                    t.links[i], k, t.accel[i][k], fd);
    }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 4. The callback stops the sweep
 * ------------------------------------------------------------------------ */

START_TEST(callback_stops_the_sweep) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  const int stops[] = {1, 2, 7};
  unsigned n;
  for (n = 0; n < sizeof stops / sizeof stops[0]; n++) {
    kl_solver *s = kl_solver_new(f.m);
    kl_sweep_result r = new_result();
    static trace t;
    int st, last;
    sketch_branch(s, &f, 0.3, 1);
    trace_links(&t, f.crank, f.coupler, f.rocker);
    t.stop_at = stops[n];
    st = kl_solver_sweep(s, 0, 0.3, 2.3, 20, record, &t, &r);
    ck_assert_int_eq(st, KL_STOPPED);
    ck_assert_int_eq(r.status, KL_STOPPED);
    ck_assert_int_eq(t.calls, stops[n]);
    ck_assert_int_eq(r.steps_done, stops[n]);
    ck_assert(isnan(r.limit_input));
    /* the solver is at the step that stopped it, rates and all */
    last = t.calls - 1;
    ck_assert_double_le(fabs(t.input[last] - (0.3 + 2.0 * last / 20)), 1e-14);
    ck_assert_double_eq(kl_link_angle(s, f.crank), t.input[last]);
    ck_assert_double_eq(kl_link_angle(s, f.rocker), t.angle[2][last]);
    ck_assert_double_eq(kl_link_rate(s, f.rocker), t.rate[2][last]);
    ck_assert_double_eq(kl_link_accel(s, f.coupler), t.accel[1][last]);
    kl_solver_free(s);
  }
  kl_model_free(f.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 5. A change point is reported, not passed
 * ------------------------------------------------------------------------ */

/* Parallelogram (a = c, b = d; Grashof's equality case s + l = p + q, geometry
 * chosen for this test): at crank angle 0 all four links lie in line and the
 * parallelogram and crossed branches meet (common practice, no source: the
 * change point of a Grashof equality linkage). On the parallelogram branch
 * t3 = 0 and t4 = t2 (the loop a e2 + b e3 = d + c e4 with a = c, b = d). */
START_TEST(change_point_is_reported_not_passed) {
  fourbar f = build_fourbar(40, 100, 40, 100);
  int sense;
  for (sense = 1; sense >= -1; sense -= 2) {
    kl_solver *s = kl_solver_new(f.m);
    kl_sweep_result r = new_result();
    static trace t;
    /* from 0.55 rad toward -0.45 in steps of 0.1: no step lands on 0 */
    const double from = sense * 0.55, to = -sense * 0.45;
    int st, k;
    kl_set_link_angle(s, f.coupler, 0.05);
    kl_set_link_angle(s, f.rocker, from - 0.05);
    trace_links(&t, f.crank, f.coupler, f.rocker);
    st = kl_solver_sweep(s, 0, from, to, 10, record, &t, &r);
    ck_assert_msg(st == KL_ESINGULAR, "sense %d: %s (%s)", sense,
                  kl_status_str(st), kl_solver_error(s));
    ck_assert_int_eq(r.status, KL_ESINGULAR);
    ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "change point"));
    /* 0.55, 0.45, ..., 0.05 delivered; -0.05 is past the change point */
    ck_assert_int_eq(r.steps_done, 6);
    ck_assert_int_eq(t.calls, 6);
    for (k = 0; k < t.calls; k++) {
      ck_assert_double_gt(sense * t.input[k], 0.0);
      /* the parallelogram branch throughout */
      ck_assert_double_le(fabs(angle_diff(t.angle[1][k], 0.0)), ANGLE_TOL);
      ck_assert_double_le(fabs(angle_diff(t.angle[2][k], t.input[k])), ANGLE_TOL);
    }
    /* not passed: the solver holds the last step before it */
    ck_assert_double_eq(kl_link_angle(s, f.crank), t.last_input);
    ck_assert_double_gt(sense * kl_link_angle(s, f.crank), 0.0);
    /* located to 1e-9 (kinloop.h) */
    ck_assert_msg(fabs(r.limit_input) <= 1e-9,
                  "sense %d: change point located at %.3g, not 0", sense,
                  r.limit_input);
    kl_solver_free(s);
  }
  kl_model_free(f.m);
}
END_TEST

/* The two Freudenstein roots of a parallelogram four-bar at crank angle
 * t2: the parallel one (t4 = t2) and the crossed one; 0 if they cannot be
 * told apart there (within `near` of a change point, where they meet). */
static int crossed_root(const fourbar *f, double t2, double near, double *t3,
                        double *t4) {
  double p3, p4, q3, q4;
  /* at the change point the discriminant is zero to rounding */
  if (!freudenstein(f, t2, +1, &p3, &p4) ||
      !freudenstein(f, t2, -1, &q3, &q4) || fabs(angle_diff(p4, q4)) < near)
    return 0;
  /* the parallel root has t4 = t2 */
  if (fabs(angle_diff(p4, t2)) < fabs(angle_diff(q4, t2))) {
    *t3 = q3, *t4 = q4;
  } else {
    *t3 = p3, *t4 = p4;
  }
  return 1;
}

/* Sketches a parallelogram's solver on its parallel (crossed 0) or crossed
 * (crossed 1) branch at crank angle u, away from a change point. */
static void sketch_parallelogram(kl_solver *s, const fourbar *f, double u,
                                 int crossed) {
  double t3 = 0.0, t4 = u;
  if (crossed)
    ck_assert(crossed_root(f, u, 1e-3, &t3, &t4));
  ck_assert_int_eq(kl_set_link_angle(s, f->coupler, t3 + 0.02), KL_OK);
  ck_assert_int_eq(kl_set_link_angle(s, f->rocker, t4 - 0.02), KL_OK);
}

/* A change point is found to 1e-9 (kinloop.h) from either side, on either
 * branch, whatever the step count: steps that land on it exactly (50, 100,
 * 200 from pi/2 toward 3 pi/2 put a target on pi) and steps that do not.
 * Parallelograms of two sizes (geometry chosen for this test); the change
 * points of a parallelogram are at crank angles 0 and pi, where all four
 * links lie in line (common practice, no source). */
START_TEST(change_point_located_from_either_side) {
  static const double sizes[2][2] = {{40, 100}, {60, 200}};
  static const int step_counts[] = {3, 7, 10, 37, 50, 100, 200, 300, 301,
                                    1000};
  int z, crossed, sense, n;
  for (z = 0; z < 2; z++) {
    fourbar f = build_fourbar(sizes[z][0], sizes[z][1], sizes[z][0],
                              sizes[z][1]);
    kl_solver *s = kl_solver_new(f.m);
    for (crossed = 0; crossed < 2; crossed++)
      for (sense = 1; sense >= -1; sense -= 2)
        for (n = 0; n < (int)(sizeof step_counts / sizeof step_counts[0]);
             n++) {
          const double from = PI - sense * PI / 2, to = PI + sense * PI / 2;
          kl_sweep_result r = new_result();
          int st;
          sketch_parallelogram(s, &f, from, crossed);
          st = kl_solver_sweep(s, 0, from, to, step_counts[n], NULL, NULL,
                               &r);
          ck_assert_msg(st == KL_ESINGULAR,
                        "size %d branch %d sense %d steps %d: %s (%s)", z,
                        crossed, sense, step_counts[n], kl_status_str(st),
                        kl_solver_error(s));
          ck_assert_msg(fabs(r.limit_input - PI) <= 1e-9,
                        "size %d branch %d sense %d steps %d: change point "
                        "at %.17g, off by %.3g",
                        z, crossed, sense, step_counts[n], r.limit_input,
                        r.limit_input - PI);
          /* every step before it delivered, the solver at the last */
          ck_assert_double_lt(sense * (kl_link_angle(s, f.crank) - PI), 0.0);
          ck_assert_int_eq(r.passages, 0);
        }
    kl_solver_free(s);
    kl_model_free(f.m);
  }
}
END_TEST

/* What a passing sweep delivers, compared with the closed forms as it
 * goes (no assertions inside the callback). */
typedef struct {
  const fourbar *f;
  int crossed;
  double worst_angle, worst_rate, worst_accel; /* against the closed form */
  int calls, passages_seen, last_passages;
  double passage_at[8];
} passage_check;

static int check_passage_step(const kl_solver *s, int step, double u,
                              void *user) {
  passage_check *c = user;
  const fourbar *f = c->f;
  double t3, t4, last;
  int passages = -1;
  kl_solver_passages(s, &passages, &last);
  (void)step;
  c->calls++;
  if (passages != c->last_passages && c->passages_seen < 8)
    c->passage_at[c->passages_seen++] = last;
  c->last_passages = passages;
  if (!c->crossed) {
    /* parallel branch: t3 = 0, t4 = t2, so omega3 = 0, omega4 = 1 per unit
     * crank rate and both accelerations 0. Near a change point the
     * Jacobian's condition number grows as 1/d (d the distance in crank
     * angle), and a position converged to 1e-12 of the scale is known only
     * to about 1e-12 / d along the branches' crossing direction: the rates
     * inherit that, the accelerations its square. Steps within the
     * crossing samples' inner span (5e-4 rad) come from the samples,
     * polished to the rounding floor (kinloop.h, kl_solver_sweep). */
    double d = fabs(remainder(u, PI));
    double rate_allowed = d < 5e-4 ? 1e-8 : 1e-9 + 1e-10 / d;
    double accel_allowed = d < 5e-4 ? 1e-4 : 1e-8 + 1e-9 / (d * d);
    c->worst_angle = fmax(c->worst_angle,
                          fmax(fabs(angle_diff(kl_link_angle(s, f->coupler), 0)),
                               fabs(angle_diff(kl_link_angle(s, f->rocker), u))));
    c->worst_rate = fmax(c->worst_rate,
                         fmax(fabs(kl_link_rate(s, f->coupler)),
                              fabs(kl_link_rate(s, f->rocker) - 1.0)) /
                             rate_allowed);
    c->worst_accel = fmax(c->worst_accel,
                          fmax(fabs(kl_link_accel(s, f->coupler)),
                               fabs(kl_link_accel(s, f->rocker))) /
                              accel_allowed);
  } else if (crossed_root(f, u, 1e-3, &t3, &t4)) {
    c->worst_angle = fmax(c->worst_angle,
                          fmax(fabs(angle_diff(kl_link_angle(s, f->coupler), t3)),
                               fabs(angle_diff(kl_link_angle(s, f->rocker), t4))));
  }
  return 0;
}

/* With pass_change_points the sweep goes through the change points on the
 * branch that continues with the same tangent: the parallel branch stays
 * parallel (t4 = t2 at every step, rates and accelerations of the closed
 * form), the crossed one crossed (Freudenstein's other root), through two
 * full turns; each passage counted and located, seen by the callback.
 * Steps of pi/50 from pi/2 land on every change point exactly. */
START_TEST(change_points_passed_on_the_same_branch) {
  fourbar f = build_fourbar(40, 100, 40, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_options o;
  int crossed, k;
  kl_options_default(&o);
  o.pass_change_points = 1;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_OK);
  for (crossed = 0; crossed < 2; crossed++) {
    passage_check c;
    kl_sweep_result r = new_result();
    int st;
    memset(&c, 0, sizeof c);
    c.f = &f;
    c.crossed = crossed;
    sketch_parallelogram(s, &f, PI / 2, crossed);
    st = kl_solver_sweep(s, 0, PI / 2, PI / 2 + 4 * PI, 200,
                         check_passage_step, &c, &r);
    ck_assert_msg(st == KL_OK, "branch %d: %s (%s)", crossed,
                  kl_status_str(st), kl_solver_error(s));
    ck_assert_int_eq(c.calls, 201);
    ck_assert_double_le(c.worst_angle, ANGLE_TOL);
    if (!crossed) {
      /* within the allowances above */
      ck_assert_double_le(c.worst_rate, 1.0);
      ck_assert_double_le(c.worst_accel, 1.0);
    }
    /* crossings at pi, 2 pi, 3 pi and 4 pi */
    ck_assert_int_eq(r.passages, 4);
    ck_assert_int_eq(c.passages_seen, 4);
    for (k = 0; k < 4; k++)
      ck_assert_msg(fabs(c.passage_at[k] - (k + 1) * PI) <= 1e-9,
                    "branch %d: passage %d at %.17g", crossed, k,
                    c.passage_at[k]);
    ck_assert_double_le(fabs(r.passage_input - 4 * PI), 1e-9);
  }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* The option is checked, and read back as the caller set it inside a sweep
 * (the sweep's own singular test is not the caller's option). */
static int read_options(const kl_solver *s, int step, double u, void *user) {
  kl_options *o = user;
  (void)step;
  (void)u;
  kl_solver_options(s, o);
  return 0;
}

START_TEST(sweep_options_read_back_unchanged) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_options o, seen;
  kl_options_default(&o);
  o.pass_change_points = 2;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_EINVAL);
  o.pass_change_points = 1;
  o.singular_rcond = 1e-6;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_OK);
  sketch_branch(s, &f, 0.0, 1);
  kl_options_default(&seen);
  ck_assert_int_eq(kl_solver_sweep(s, 0, 0.0, 1.0, 4, read_options, &seen,
                                   NULL),
                   KL_OK);
  ck_assert_double_eq(seen.singular_rcond, 1e-6);
  ck_assert_int_eq(seen.pass_change_points, 1);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 6. Assembly modes
 * ------------------------------------------------------------------------ */

static int in_reduced_range(double a) { return a > -PI && a <= PI; }

START_TEST(fourbar_has_its_two_closed_form_modes) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m), *modes[2];
  const double angles[] = {0.0, 0.7, 2.0, -2.5, PI};
  unsigned n;
  modes[0] = kl_solver_new(f.m);
  modes[1] = kl_solver_new(f.m);
  /* the workspace starts solved at some other state, rates included */
  sketch_branch(s, &f, 1.0, -1);
  {
    double u = 1.0, w = 1.0;
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  }
  for (n = 0; n < sizeof angles / sizeof angles[0]; n++) {
    double u = angles[n];
    snapshot before = snap(s), after;
    int found[2] = {0, 0}, i, branch;
    ck_assert_int_eq(kl_solver_find_assemblies(s, &u, modes, 2), 2);
    after = snap(s);
    assert_same_state(&before, &after, "find assemblies' workspace");
    for (i = 0; i < 2; i++) {
      double t3 = kl_link_angle(modes[i], f.coupler);
      double t4 = kl_link_angle(modes[i], f.rocker), c3, c4;
      ck_assert(in_reduced_range(t3));
      ck_assert(in_reduced_range(t4));
      ck_assert_double_eq(kl_input_value(modes[i], 0), u);
      /* source: Freudenstein's two closed-form branches */
      for (branch = -1; branch <= 1; branch += 2) {
        ck_assert(freudenstein(&f, u, branch, &c3, &c4));
        if (fabs(angle_diff(t3, c3)) <= ANGLE_TOL &&
            fabs(angle_diff(t4, c4)) <= ANGLE_TOL)
          found[(branch + 1) / 2]++;
      }
    }
    ck_assert_msg(found[0] == 1 && found[1] == 1,
                  "crank %g: modes match branches -1: %d times, +1: %d times",
                  u, found[0], found[1]);
  }
  kl_solver_free(modes[0]);
  kl_solver_free(modes[1]);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* Source: the offset slider-crank closed form (standard kinematics, as in
 * test_position.c): slide = r cos t +- sqrt(l^2 - (e - r sin t)^2). */
START_TEST(slider_crank_has_its_two_closed_form_modes) {
  slider_crank sc = build_slider_crank(30, 100, 12);
  kl_solver *s = kl_solver_new(sc.m), *modes[2];
  unsigned k;
  modes[0] = kl_solver_new(sc.m);
  modes[1] = kl_solver_new(sc.m);
  for (k = 0; k < 8; k++) {
    double t = -PI + (k + 0.5) * PI / 4, hgt = sc.e - sc.r * sin(t);
    double root = sqrt(sc.l * sc.l - hgt * hgt);
    int found[2] = {0, 0}, i, branch;
    ck_assert_int_eq(kl_solver_find_assemblies(s, &t, modes, 2), 2);
    for (i = 0; i < 2; i++) {
      double x = kl_joint_slide(modes[i], sc.slide_joint);
      for (branch = -1; branch <= 1; branch += 2) {
        double want = sc.r * cos(t) + branch * root;
        double phi = atan2(hgt, want - sc.r * cos(t));
        if (fabs(x - want) <= 1e-10 * sc.l &&
            fabs(angle_diff(kl_link_angle(modes[i], sc.rod), phi)) <= ANGLE_TOL)
          found[(branch + 1) / 2]++;
      }
      ck_assert(in_reduced_range(kl_link_angle(modes[i], sc.rod)));
    }
    ck_assert_msg(found[0] == 1 && found[1] == 1,
                  "crank %g: modes match branches -1: %d times, +1: %d times",
                  t, found[0], found[1]);
  }
  kl_solver_free(modes[0]);
  kl_solver_free(modes[1]);
  kl_solver_free(s);
  kl_model_free(sc.m);
}
END_TEST

/* A mode is a solved state: a sweep goes on from it and keeps its branch
 * (Freudenstein's closed form at every step). */
START_TEST(a_mode_is_a_state_to_continue_from) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m), *modes[2];
  const double u = 0.7;
  int i;
  modes[0] = kl_solver_new(f.m);
  modes[1] = kl_solver_new(f.m);
  ck_assert_int_eq(kl_solver_find_assemblies(s, &u, modes, 2), 2);
  for (i = 0; i < 2; i++) {
    kl_sweep_result r = new_result();
    static trace t;
    double c3, c4, w = 1.0;
    int branch, k;
    /* which branch this mode is */
    ck_assert(freudenstein(&f, u, 1, &c3, &c4));
    branch = fabs(angle_diff(kl_link_angle(modes[i], f.rocker), c4)) <= ANGLE_TOL
                 ? 1
                 : -1;
    /* its rates are there to be solved, without another position solve */
    ck_assert_int_eq(kl_solve_velocity(modes[i], &w), KL_OK);
    trace_links(&t, f.crank, f.coupler, f.rocker);
    ck_assert_int_eq(kl_solver_sweep(modes[i], 0, u, u + 2 * PI, 72, record, &t, &r),
                     KL_OK);
    ck_assert_int_eq(t.calls, 73);
    for (k = 0; k < t.calls; k++) {
      ck_assert(freudenstein(&f, t.input[k], branch, &c3, &c4));
      ck_assert_msg(fabs(angle_diff(t.angle[2][k], c4)) <= ANGLE_TOL,
                    "mode %d (branch %d) step %d: rocker %.15g vs %.15g", i,
                    branch, k, t.angle[2][k], c4);
    }
  }
  kl_solver_free(modes[0]);
  kl_solver_free(modes[1]);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

START_TEST(mode_arguments_are_checked) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  fourbar other = build_fourbar(40, 120, 80, 100); /* another model */
  kl_solver *s = kl_solver_new(f.m), *mine = kl_solver_new(f.m);
  kl_solver *spare = kl_solver_new(f.m), *foreign = kl_solver_new(other.m);
  kl_solver *modes[2];
  double u = 0.7, spare_u = 2.0, bad = NAN;
  snapshot ws, kept, untouched, now;
  sketch_branch(spare, &f, 2.0, 1);
  ck_assert_int_eq(kl_solve_position(spare, &spare_u), KL_OK);
  ws = snap(s);
  kept = snap(spare);
  untouched = snap(mine);

  /* a solver of another model among the modes */
  modes[0] = mine;
  modes[1] = foreign;
  ck_assert_int_eq(kl_solver_find_assemblies(s, &u, modes, 2), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "modes[1]"));
  now = snap(s);
  assert_same_state(&ws, &now, "workspace after a foreign mode solver");
  /* checked before anything is written */
  now = snap(mine);
  assert_same_state(&untouched, &now, "modes[0] beside a foreign modes[1]");

  /* cap below the count: only cap written, the full count returned */
  modes[0] = mine;
  modes[1] = spare;
  ck_assert_int_eq(kl_solver_find_assemblies(s, &u, modes, 1), 2);
  ck_assert_double_eq(kl_input_value(mine, 0), u);
  now = snap(spare);
  assert_same_state(&kept, &now, "a solver beyond cap");
  ck_assert_int_eq(kl_solver_find_assemblies(s, &u, NULL, 0), 2);

  /* bad arguments */
  ck_assert_int_eq(kl_solver_find_assemblies(s, &u, modes, -1), KL_EINVAL);
  ck_assert_int_eq(kl_solver_find_assemblies(s, &u, NULL, 1), KL_EINVAL);
  ck_assert_int_eq(kl_solver_find_assemblies(NULL, &u, modes, 1), KL_EINVAL);
  ck_assert_int_eq(kl_solver_find_assemblies(s, NULL, modes, 1), KL_EINVAL);
  ck_assert_int_eq(kl_solver_find_assemblies(s, &bad, modes, 1), KL_ENONFINITE);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "input 1"));
  modes[0] = NULL;
  ck_assert_int_eq(kl_solver_find_assemblies(s, &u, modes, 1), KL_EINVAL);
  now = snap(s);
  assert_same_state(&ws, &now, "workspace after bad arguments");
  now = snap(spare);
  assert_same_state(&kept, &now, "a mode solver after bad arguments");

  kl_solver_free(s);
  kl_solver_free(mine);
  kl_solver_free(spare);
  kl_solver_free(foreign);
  kl_model_free(f.m);
  kl_model_free(other.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 7. Bad arguments
 * ------------------------------------------------------------------------ */

START_TEST(bad_sweep_arguments) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_sweep_result r;
  static trace t;
  double u = 0.4, w = 1.0;
  snapshot before, after;
  struct {
    int input;
    double from, to;
    int steps, status;
    const char *names;
  } bad[] = {
      {1, 0.0, 1.0, 10, KL_EID, "input index 1 (0-based)"},
      {-1, 0.0, 1.0, 10, KL_EID, "input index -1 (0-based)"},
      {0, NAN, 1.0, 10, KL_ENONFINITE, "range of input 1"},
      {0, 0.0, NAN, 10, KL_ENONFINITE, "range of input 1"},
      {0, 0.0, INFINITY, 10, KL_ENONFINITE, "range of input 1"},
      {0, 0.0, 1.0, 0, KL_EINVAL, "0 steps"},
      {0, 0.0, 1.0, -3, KL_EINVAL, "-3 steps"},
      /* one step limit, named in the message; a count that would wrap
       * steps + 1 (INT_MAX) is refused before any arithmetic on it */
      {0, 0.0, 1.0, KL_MAX_STEPS + 1, KL_ETOOLARGE, "at most 10000000"},
      {0, 0.0, 1.0, INT_MAX, KL_ETOOLARGE, "at most 10000000"},
      /* ends that are finite, a length that is not */
      {0, -1e308, 1e308, 10, KL_ENONFINITE, "longer than a double"},
  };
  unsigned k;
  sketch_branch(s, &f, u, 1);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  before = snap(s);
  for (k = 0; k < sizeof bad / sizeof bad[0]; k++) {
    int st;
    r = new_result();
    r.steps_done = 99;
    trace_links(&t, f.crank, f.coupler, f.rocker);
    st = kl_solver_sweep(s, bad[k].input, bad[k].from, bad[k].to, bad[k].steps,
                  record, &t, &r);
    ck_assert_msg(st == bad[k].status, "case %u: %s", k, kl_status_str(st));
    ck_assert_int_eq(r.status, bad[k].status);
    ck_assert_int_eq(r.steps_done, 0);
    ck_assert_int_eq(t.calls, 0);
    ck_assert_msg(strstr(kl_solver_error(s), bad[k].names) != NULL,
                  "case %u: message '%s' does not name '%s'", k,
                  kl_solver_error(s), bad[k].names);
    after = snap(s);
    assert_same_state(&before, &after, "a refused sweep");
  }
  ck_assert_int_eq(kl_solver_sweep(NULL, 0, 0.0, 1.0, 10, record, &t, &r), KL_EINVAL);

  /* NULL result and NULL callback are accepted */
  ck_assert_int_eq(kl_solver_sweep(s, 0, 0.4, 1.4, 10, NULL, NULL, NULL), KL_OK);
  ck_assert_double_eq(kl_link_angle(s, f.crank), 1.4);
  trace_links(&t, f.crank, f.coupler, f.rocker);
  ck_assert_int_eq(kl_solver_sweep(s, 0, 1.4, 0.4, 10, record, &t, NULL), KL_OK);
  ck_assert_int_eq(t.calls, 11);
  ck_assert_double_eq(kl_link_angle(s, f.crank), 0.4);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* Every call that sweeps takes its steps under the one limit: refused
 * with KL_ETOOLARGE, the solver unchanged, and kl_solver_sweep_rows
 * writes no row (it cannot know how many the caller has). */
START_TEST(every_sweep_has_one_step_limit) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_output o;
  kl_range range;
  kl_cycle c;
  kl_sweep_settings sw;
  double u = 0.4, w = 1.0, rows[4] = {42.0, 42.0, 42.0, 42.0};
  int done = 7;
  snapshot before, after;
  sketch_branch(s, &f, u, 1);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  before = snap(s);
  memset(&o, 0, sizeof o);
  o.kind = KL_OUTPUT_LINK_ANGLE;
  o.id = f.rocker;
  range.size = sizeof range;
  ck_assert_int_eq(kl_output_range(s, 0, 0.0, 1.0, KL_MAX_STEPS + 1, &o,
                                   &range),
                   KL_ETOOLARGE);
  ck_assert_int_eq(kl_solver_sweep_rows(s, 0, 0.0, 1.0, INT_MAX, rows, NULL),
                   KL_ETOOLARGE);
  ck_assert(rows[0] == 42.0 && rows[3] == 42.0);
  kl_cycle_default(&c);
  c.steps = INT_MAX;
  ck_assert_int_eq(kl_cycle_table(s, &c, 0, NULL, rows, 4, &done),
                   KL_ETOOLARGE);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "at most 10000000"));
  after = snap(s);
  assert_same_state(&before, &after, "a sweep refused for its steps");
  kl_solver_free(s);
  /* the model's sweep settings: the same limit, the same status */
  kl_model_free(f.m);
  f.m = kl_model_new();
  ck_assert_int_ge(kl_add_link(f.m, "a"), 1);
  ck_assert_int_ge(kl_add_revolute(f.m, 0, 0, 0, 1, 0, 0), 0);
  ck_assert_int_ge(kl_add_input(f.m, 0), 0);
  sw.size = sizeof sw;
  sw.input = 0;
  sw.from = 0.0;
  sw.to = 1.0;
  sw.steps = KL_MAX_STEPS + 1;
  ck_assert_int_eq(kl_model_set_sweep(f.m, &sw), KL_ETOOLARGE);
  sw.steps = KL_MAX_STEPS;
  ck_assert_int_eq(kl_model_set_sweep(f.m, &sw), KL_OK);
  sw.from = -1e308;
  sw.to = 1e308;
  ck_assert_int_eq(kl_model_set_sweep(f.m, &sw), KL_ENONFINITE);
  kl_model_free(f.m);
}
END_TEST

START_TEST(copy_state_needs_the_same_model) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  fourbar other = build_fourbar(40, 120, 80, 100); /* another model */
  kl_solver *s = kl_solver_new(f.m), *to = kl_solver_new(f.m);
  kl_solver *foreign = kl_solver_new(other.m);
  double u = 0.9, w = 1.0;
  snapshot from_state, to_state, foreign_state, now;
  sketch_branch(s, &f, u, 1);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  from_state = snap(s);
  to_state = snap(to);
  foreign_state = snap(foreign);
  ck_assert_int_eq(kl_solver_copy_state(foreign, s), KL_EINVAL);
  ck_assert_int_eq(kl_solver_copy_state(s, foreign), KL_EINVAL);
  ck_assert_int_eq(kl_solver_copy_state(NULL, s), KL_EINVAL);
  ck_assert_int_eq(kl_solver_copy_state(to, NULL), KL_EINVAL);
  now = snap(foreign);
  assert_same_state(&foreign_state, &now, "a refused copy's target");
  now = snap(s);
  assert_same_state(&from_state, &now, "a refused copy's source");
  now = snap(to);
  assert_same_state(&to_state, &now, "an untouched solver");
  /* within one model the whole state goes across */
  ck_assert_int_eq(kl_solver_copy_state(to, s), KL_OK);
  now = snap(to);
  assert_same_state(&from_state, &now, "the copy");
  kl_solver_free(s);
  kl_solver_free(to);
  kl_solver_free(foreign);
  kl_model_free(f.m);
  kl_model_free(other.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 8. No allocation in sweeps, mode searches and design figures
 * ------------------------------------------------------------------------ */

START_TEST(sweeps_modes_and_figures_never_allocate) {
  counting_alloc c;
  fourbar cr, ng, par;
  kl_solver *s, *sn, *sp, *modes[2];
  long calls, live;
  memset(&c, 0, sizeof c);
  cr = build_fourbar_in(counting_model(&c), 40, 120, 80, 100);
  ng = build_fourbar_in(counting_model(&c), 70, 50, 60, 100);
  par = build_fourbar_in(counting_model(&c), 40, 100, 40, 100);
  ck_assert(kl_model_is_finalized(cr.m) && kl_model_is_finalized(ng.m) &&
            kl_model_is_finalized(par.m));
  s = kl_solver_new(cr.m);
  modes[0] = kl_solver_new(cr.m);
  modes[1] = kl_solver_new(cr.m);
  sn = kl_solver_new(ng.m);
  sp = kl_solver_new(par.m);
  ck_assert(s && modes[0] && modes[1] && sn && sp);
  calls = c.calls;
  live = c.live;
  {
    static trace t;
    kl_sweep_result r = new_result();
    kl_output rocker = {KL_OUTPUT_LINK_ANGLE, 0, 0, 0};
    kl_output trans = {KL_OUTPUT_TRANSMISSION, 0, 0, 0};
    kl_output wrong = {KL_OUTPUT_SLIDE, 0, 0, 0};
    kl_load load = {KL_LOAD_TORQUE, 0, 0.0, 0.0, 5.0};
    kl_load bad_load = {KL_LOAD_FORCE, 42, 1.0, 0.0, 0.0};
    kl_dimension dims[2] = {{KL_DIMENSION_JOINT_A, 0, 0}, {KL_DIMENSION_POINT, 0, 1}};
    kl_dimension bad_dim = {KL_DIMENSION_JOINT_B, 0, 2};
    double tol[2] = {0.01, 0.02}, v, worst, rss, effort, u = 0.5;
    kl_range range;
    rocker.id = cr.rocker;
    trans.id = cr.rocker_pin;
    trans.line_a = cr.crank_pin;
    trans.line_b = cr.rocker_pivot;
    wrong.id = cr.pivot;
    load.id = cr.rocker;
    range.size = sizeof range;

    /* every way a sweep ends */
    sketch_branch(s, &cr, 0.0, 1);
    trace_links(&t, cr.crank, cr.coupler, cr.rocker);
    ck_assert_int_eq(kl_solver_sweep(s, 0, 0.0, 2 * PI, 72, record, &t, &r), KL_OK);
    t.calls = 0;
    t.stop_at = 3;
    ck_assert_int_eq(kl_solver_sweep(s, 0, 0.0, 1.0, 10, record, &t, &r), KL_STOPPED);
    kl_set_link_angle(sn, ng.coupler, -0.2);
    kl_set_link_angle(sn, ng.rocker, 1.5);
    ck_assert_int_eq(kl_solver_sweep(sn, 0, 0.0, PI, 20, NULL, NULL, &r), KL_LIMIT);
    kl_set_link_angle(sp, par.coupler, 0.05);
    kl_set_link_angle(sp, par.rocker, 0.5);
    ck_assert_int_eq(kl_solver_sweep(sp, 0, 0.55, -0.45, 10, NULL, NULL, &r),
                     KL_ESINGULAR);
    ck_assert_int_eq(kl_solver_sweep(s, 3, 0.0, 1.0, 10, NULL, NULL, &r), KL_EID);

    /* modes */
    ck_assert_int_eq(kl_solver_find_assemblies(s, &u, modes, 2), 2);

    /* design figures, their failures included */
    ck_assert_int_eq(kl_model_grashof(cr.m), KL_GRASHOF_CRANK_ROCKER);
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    ck_assert_int_eq(kl_output_value(s, &trans, &v), KL_OK);
    ck_assert_int_eq(kl_output_deriv(s, &rocker, 0, &v), KL_OK);
    ck_assert_int_eq(kl_output_mechanical_advantage(s, &rocker, 0, &v), KL_OK);
    ck_assert_int_eq(kl_input_effort(s, 1, &load, &effort), KL_OK);
    ck_assert_int_eq(kl_input_effort(s, 1, &bad_load, &effort), KL_EID);
    ck_assert_int_eq(kl_output_sensitivity(s, &trans, &dims[0], &v), KL_OK);
    ck_assert_int_eq(kl_output_sensitivity(s, &trans, &bad_dim, &v), KL_EINVAL);
    ck_assert_int_eq(kl_output_deriv(s, &wrong, 0, &v), KL_EKIND);
    ck_assert_int_eq(kl_output_tolerance_stack(s, &rocker, 2, dims, tol, &worst, &rss),
                     KL_OK);
    ck_assert_int_eq(kl_output_range(s, 0, 0.0, 2 * PI, 36, &trans, &range),
                     KL_OK);
    ck_assert_int_eq(kl_output_range(sn, 0, 0.0, PI, 20, &rocker, &range),
                     KL_LIMIT);
    ck_assert_int_eq(kl_range_time_ratio(&range, &v), KL_OK);
  }
  /* source: the contract in kinloop.h, "no call on a solver allocates
   * after kl_solver_new" */
  ck_assert_int_eq(c.calls, calls);
  ck_assert_int_eq(c.live, live);
  kl_solver_free(s);
  kl_solver_free(modes[0]);
  kl_solver_free(modes[1]);
  kl_solver_free(sn);
  kl_solver_free(sp);
  kl_model_free(cr.m);
  kl_model_free(ng.m);
  kl_model_free(par.m);
  ck_assert_int_eq(c.live, 0);
  ck_assert_uint_eq(c.live_bytes, 0);
}
END_TEST

/* ------------------------------------------------------------------------
 * 9. A slide input stops at the dead centres
 * ------------------------------------------------------------------------ */

/* The offset slider-crank of support.c (crank r about (0, 0), rod l, block
 * sliding on y = e), driven by the block's slide instead of the crank. */
typedef struct {
  kl_model *m;
  int crank, rod, block;
  double r, l, e;
} slide_driven;

static slide_driven build_slide_driven(double r, double l, double e) {
  slide_driven d;
  int slide;
  d.m = kl_model_new();
  d.r = r;
  d.l = l;
  d.e = e;
  d.crank = kl_add_link(d.m, "crank");
  d.rod = kl_add_link(d.m, "rod");
  d.block = kl_add_link(d.m, "block");
  kl_add_revolute(d.m, KL_GROUND, 0, 0, d.crank, 0, 0);
  kl_add_revolute(d.m, d.crank, r, 0, d.rod, 0, 0);
  kl_add_revolute(d.m, d.rod, l, 0, d.block, 0, 0);
  slide = kl_add_prismatic(d.m, KL_GROUND, 0, e, 0.0, d.block, 0, 0);
  kl_add_input(d.m, slide);
  ck_assert_int_eq(kl_model_finalize(d.m), KL_OK);
  return d;
}

/*
 * Source: the slider-crank's dead centres (standard kinematics): crank and
 * rod in line, the block's pin is l + r (extended) or l - r (folded) from
 * the crank pivot, and on y = e its slide is sqrt((l + r)^2 - e^2) or
 * sqrt((l - r)^2 - e^2) (Pythagoras). Beyond them the loop cannot close.
 */
START_TEST(slide_input_stops_at_the_dead_centres) {
  slide_driven d = build_slide_driven(30, 100, 12);
  const double outer = sqrt((d.l + d.r) * (d.l + d.r) - d.e * d.e);
  const double inner = sqrt((d.l - d.r) * (d.l - d.r) - d.e * d.e);
  const double ends[2] = {140.0, 50.0}, limits[2] = {outer, inner};
  int k;
  for (k = 0; k < 2; k++) {
    kl_solver *s = kl_solver_new(d.m);
    kl_sweep_result r = new_result();
    static trace t;
    int st, i;
    /* near the upper crank position at slide 100 (crank about 1.52 rad) */
    kl_set_link_angle(s, d.crank, 1.5);
    kl_set_link_angle(s, d.rod, -0.18);
    trace_links(&t, d.crank, d.rod, d.block);
    st = kl_solver_sweep(s, 0, 100.0, ends[k], 40, record, &t, &r);
    /* source: the dead centres above; promised to 1e-10 length units, 1e-9
     * leaves the closed form's rounding a factor ten */
    ck_assert_msg(fabs(r.limit_input - limits[k]) <= 1e-9,
                  "toward %g: limit %.15g, closed form %.15g", ends[k],
                  r.limit_input, limits[k]);
    /* the steps of size |end - 100| / 40 short of the dead centre */
    ck_assert_int_eq(r.steps_done,
                     (int)floor(fabs(limits[k] - 100.0) /
                                (fabs(ends[k] - 100.0) / 40)) + 1);
    ck_assert_int_eq(t.calls, r.steps_done);
    for (i = 0; i < t.calls; i++)
      ck_assert(t.input[i] > inner && t.input[i] < outer);
    ck_assert_double_eq(kl_input_value(s, 0), t.last_input);
    /* a dead centre of the driven slide is a motion limit: no assembly
     * beyond it (not a change point, where the motion could go on) */
    ck_assert_msg(st == KL_LIMIT && r.status == KL_LIMIT,
                  "toward %g: %s (%s)", ends[k], kl_status_str(st),
                  kl_solver_error(s));
    kl_solver_free(s);
  }
  kl_model_free(d.m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("sweep");
  TCase *tc = tcase_create("sweep");
  tcase_set_timeout(tc, 120);
  tcase_add_test(tc, non_grashof_sweeps_stop_at_both_limits);
  tcase_add_test(tc, full_turn_returns_on_the_same_branch);
  tcase_add_test(tc, sweep_work_is_bounded);
  tcase_add_test(tc, callback_reads_kinematic_coefficients);
  tcase_add_test(tc, callback_stops_the_sweep);
  tcase_add_test(tc, change_point_is_reported_not_passed);
  tcase_add_test(tc, change_point_located_from_either_side);
  tcase_add_test(tc, change_points_passed_on_the_same_branch);
  tcase_add_test(tc, sweep_options_read_back_unchanged);
  tcase_add_test(tc, fourbar_has_its_two_closed_form_modes);
  tcase_add_test(tc, slider_crank_has_its_two_closed_form_modes);
  tcase_add_test(tc, a_mode_is_a_state_to_continue_from);
  tcase_add_test(tc, mode_arguments_are_checked);
  tcase_add_test(tc, bad_sweep_arguments);
  tcase_add_test(tc, every_sweep_has_one_step_limit);
  tcase_add_test(tc, copy_state_needs_the_same_model);
  tcase_add_test(tc, sweeps_modes_and_figures_never_allocate);
  tcase_add_test(tc, slide_input_stops_at_the_dead_centres);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
