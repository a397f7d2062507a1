/*
 * test_time.c - motion profiles in time: segments against the motion laws'
 * boundary values, the table's spline against GSL's natural cubic spline,
 * a time sweep at constant speed against the coefficient sweep scaled by
 * the speed, its square and its cube, the input torque over a profile
 * against Newton's second law, and bad profiles refused with the model
 * unchanged.
 */
#include <check.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_spline.h>

#include "machines.h"
#include "suite.h"
#include "support.h"

/* An offset slider-crank (crank 30, rod 100, offset 12; chosen for the
 * tests), left open so that a profile can still be added. */
static kl_model *open_slider_crank(int *slide_joint) {
  kl_model *m = kl_model_new();
  int crank = kl_add_link(m, "crank"), rod = kl_add_link(m, "rod");
  int block = kl_add_link(m, "block"), pivot;
  pivot = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_revolute(m, crank, 30, 0, rod, 0, 0);
  kl_add_revolute(m, rod, 100, 0, block, 0, 0);
  *slide_joint = kl_add_prismatic(m, KL_GROUND, 0, 12, 0.0, block, 0, 0);
  kl_add_point(m, rod, 40, 9, "rod mark");
  kl_add_input(m, pivot);
  return m;
}

/* ------------------------------------------------------------------------
 * Segments against the motion laws
 * ------------------------------------------------------------------------ */

/*
 * Source: the published boundary values of the cam laws (a rise of h over
 * time T by a law s(x) has value h s, rate h s'/T, acceleration h s''/T^2
 * and jerk h s'''/T^3, x = t / T: the chain rule), with s from
 * kl_motion_law; the cycloidal law starts and ends with s' = s'' = 0 and
 * s''' = 4 pi^2 (x = 0), and peaks in rate at 2 h / T at mid-rise
 * (common practice, any cam design text).
 */
START_TEST(segments_follow_the_motion_laws) {
  int slide;
  kl_model *m = open_slider_crank(&slide);
  const double T = 0.25, h = 1.2; /* chosen for this test */
  double out[4], law[4];
  ck_assert_int_eq(kl_add_segment(m, 0, KL_SEGMENT_DWELL, 0, 0.1, 0.3, 0.3),
                   0);
  ck_assert_int_eq(kl_add_segment(m, 0, KL_SEGMENT_RISE, KL_LAW_CYCLOIDAL, T,
                                  0.3, 0.3 + h),
                   1);
  ck_assert_int_eq(kl_add_segment(m, 0, KL_SEGMENT_SPEED, 0, 0.5, 0.3 + h,
                                  0.3 + h + 2.0),
                   2);
  ck_assert_int_eq(kl_add_segment(m, 0, KL_SEGMENT_RETURN, KL_LAW_POLY345,
                                  0.4, 0.3 + h + 2.0, 0.3),
                   3);
  ck_assert_double_eq_tol(kl_model_profile_duration(m), 1.25, 1e-15);
  ck_assert_int_eq(kl_model_profile_input(m), 0);
  ck_assert_int_eq(kl_model_segment_count(m), 4);
  /* the dwell */
  ck_assert_int_eq(kl_model_profile_motion(m, 0.05, out), KL_OK);
  ck_assert_double_eq(out[0], 0.3);
  ck_assert_double_eq(out[1], 0.0);
  /* the rise's start: at rest, jerk 4 pi^2 h / T^3 */
  ck_assert_int_eq(kl_model_profile_motion(m, 0.1, out), KL_OK);
  ck_assert_double_eq_tol(out[0], 0.3, 1e-15);
  ck_assert_double_eq_tol(out[1], 0.0, 1e-12);
  ck_assert_double_eq_tol(out[2], 0.0, 1e-9);
  ck_assert_double_le(rel_diff(out[3], 4 * PI * PI * h / (T * T * T), 1.0),
                      1e-12);
  /* mid-rise: the rate peaks at 2 h / T; and agrees with the law there */
  ck_assert_int_eq(kl_model_profile_motion(m, 0.1 + 0.5 * T, out), KL_OK);
  ck_assert_double_le(rel_diff(out[1], 2 * h / T, 1.0), 1e-12);
  ck_assert_int_eq(kl_motion_law(KL_LAW_CYCLOIDAL, 0.5, law), KL_OK);
  ck_assert_double_le(rel_diff(out[0], 0.3 + h * law[0], 1.0), 1e-14);
  ck_assert_double_le(rel_diff(out[2], h * law[2] / (T * T), 1.0), 1e-12);
  /* the constant-speed segment, from its start (the later segment wins) */
  ck_assert_int_eq(kl_model_profile_motion(m, 0.1 + T, out), KL_OK);
  ck_assert_double_le(rel_diff(out[0], 0.3 + h, 1.0), 1e-14);
  ck_assert_double_le(rel_diff(out[1], 2.0 / 0.5, 1.0), 1e-14);
  ck_assert_double_eq(out[2], 0.0);
  /* the return's end: back at the start value, at rest (3-4-5: s'(1) =
   * s''(1) = 0, s'''(1) = 60, Source: the 3-4-5 polynomial's published
   * boundary values) */
  ck_assert_int_eq(kl_model_profile_motion(m, 1.25, out), KL_OK);
  ck_assert_double_le(rel_diff(out[0], 0.3, 1.0), 1e-14);
  ck_assert_double_le(fabs(out[1]) + fabs(out[2]), 1e-9);
  ck_assert_double_le(rel_diff(out[3], -(h + 2.0) * 60 / (0.4 * 0.4 * 0.4),
                               1.0),
                      1e-12);
  /* outside the profile */
  ck_assert_int_eq(kl_model_profile_motion(m, 1.2500001, out), KL_EINVAL);
  ck_assert_int_eq(kl_model_profile_motion(m, NAN, out), KL_ENONFINITE);
  kl_model_free(m);
}
END_TEST

/* ------------------------------------------------------------------------
 * Bad profiles: each its own status and message, the model unchanged
 * ------------------------------------------------------------------------ */

static void expect_refused(kl_model *m, int status, int want,
                           const char *words) {
  kl_segment seg;
  ck_assert_int_eq(status, want);
  ck_assert_msg(strstr(kl_model_error(m), words) != NULL, "message '%s'",
                kl_model_error(m));
  /* still the one rise added first */
  ck_assert_int_eq(kl_model_segment_count(m), 1);
  seg.size = sizeof seg;
  ck_assert_int_eq(kl_model_segment(m, 0, &seg), KL_OK);
  ck_assert_double_eq(seg.to, 1.0);
  ck_assert_double_eq(kl_model_profile_duration(m), 0.5);
}

START_TEST(bad_profiles_are_refused) {
  int slide;
  kl_model *m = open_slider_crank(&slide);
  double t[3] = {0.0, 0.2, 0.1}, v[3] = {0.0, 1.0, 2.0};
  ck_assert_int_eq(kl_add_segment(m, 0, KL_SEGMENT_RISE, KL_LAW_HARMONIC, 0.5,
                                  0.0, 1.0),
                   0);
  expect_refused(m, kl_add_segment(m, 0, KL_SEGMENT_DWELL, 0, 0.2, 1.1, 1.1),
                 KL_EJOIN, "ended at 1");
  ck_assert_str_eq(kl_status_str(KL_EJOIN),
                   "motion profile segments do not join");
  expect_refused(m, kl_add_segment(m, 0, KL_SEGMENT_DWELL, 0, -0.2, 1.0, 1.0),
                 KL_EINVAL, "not positive");
  expect_refused(m, kl_add_segment(m, 0, KL_SEGMENT_DWELL, 0, 0.0, 1.0, 1.0),
                 KL_EINVAL, "not positive");
  expect_refused(m, kl_add_segment(m, 0, KL_SEGMENT_DWELL, 0, NAN, 1.0, 1.0),
                 KL_ENONFINITE, "NaN or infinite");
  expect_refused(m,
                 kl_add_segment(m, 0, KL_SEGMENT_SPEED, 0, 1.0, 1.0, INFINITY),
                 KL_ENONFINITE, "NaN or infinite");
  expect_refused(m, kl_add_segment(m, 0, KL_SEGMENT_DWELL, 0, 0.2, 1.0, 2.0),
                 KL_EINVAL, "holds its value");
  expect_refused(m, kl_add_segment(m, 0, KL_SEGMENT_RISE, 0, 0.2, 1.0, 0.5),
                 KL_EINVAL, "goes up");
  expect_refused(m, kl_add_segment(m, 0, KL_SEGMENT_RETURN, 0, 0.2, 1.0, 1.5),
                 KL_EINVAL, "goes down");
  expect_refused(m, kl_add_segment(m, 0, KL_SEGMENT_RISE, 99, 0.2, 1.0, 1.5),
                 KL_EINVAL, "no motion law");
  expect_refused(m, kl_add_segment(m, 0, 7, 0, 0.2, 1.0, 1.5), KL_EINVAL,
                 "no segment kind");
  expect_refused(m, kl_add_segment(m, 3, KL_SEGMENT_DWELL, 0, 0.2, 1.0, 1.0),
                 KL_EID, "does not exist");
  expect_refused(m, kl_model_set_profile_table(m, 0, 2, t, v), KL_ESTATE,
                 "holds segments");
  kl_model_free(m);

  /* a table: times must increase, numbers be finite */
  m = open_slider_crank(&slide);
  ck_assert_int_eq(kl_model_set_profile_table(m, 0, 3, t, v), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "does not come after"));
  t[2] = 0.3;
  v[1] = NAN;
  ck_assert_int_eq(kl_model_set_profile_table(m, 0, 3, t, v), KL_ENONFINITE);
  ck_assert_int_eq(kl_model_set_profile_table(m, 0, 1, t, v), KL_EINVAL);
  ck_assert_int_eq(kl_model_table_count(m), 0);
  ck_assert_int_eq(kl_model_profile_input(m), KL_EID);
  ck_assert(isnan(kl_model_profile_duration(m)));
  v[1] = 1.0;
  ck_assert_int_eq(kl_model_set_profile_table(m, 0, 3, t, v), KL_OK);
  ck_assert_int_eq(kl_add_segment(m, 0, KL_SEGMENT_DWELL, 0, 0.2, 2.0, 2.0),
                   KL_ESTATE);
  /* after finalize the profile no longer changes */
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ck_assert_int_eq(kl_model_set_profile_table(m, 0, 3, t, v), KL_ESTATE);
  ck_assert_int_eq(kl_model_table_count(m), 3);
  kl_model_free(m);
}
END_TEST

/* ------------------------------------------------------------------------
 * The table's spline against GSL
 * ------------------------------------------------------------------------ */

/* Source: GSL's gsl_interp_cspline (the natural cubic spline): value and
 * first and second derivatives; the jerk, constant on each interval, is
 * the difference of GSL's second derivatives at its ends over its length. */
START_TEST(table_matches_gsl_natural_spline) {
  /* a servo move sampled unevenly (times in s, angles in rad; invented) */
  const double t[7] = {0.0, 0.05, 0.12, 0.2, 0.31, 0.4, 0.5};
  const double y[7] = {0.0, 0.02, 0.3, 0.9, 1.4, 1.55, 1.57};
  int slide, k;
  kl_model *m = open_slider_crank(&slide);
  gsl_interp_accel *acc = gsl_interp_accel_alloc();
  gsl_spline *sp = gsl_spline_alloc(gsl_interp_cspline, 7);
  gsl_spline_init(sp, t, y, 7);
  ck_assert_int_eq(kl_model_set_profile_table(m, 0, 7, t, y), KL_OK);
  ck_assert_double_eq(kl_model_profile_duration(m), 0.5);
  for (k = 0; k <= 100; k++) {
    double tk = 0.005 * k, out[4], lo, hi;
    int i = 0;
    ck_assert_int_eq(kl_model_profile_motion(m, tk, out), KL_OK);
    ck_assert_double_le(rel_diff(out[0], gsl_spline_eval(sp, tk, acc), 1.0),
                        1e-12);
    ck_assert_double_le(
        rel_diff(out[1], gsl_spline_eval_deriv(sp, tk, acc), 1.0), 1e-11);
    ck_assert_double_le(
        rel_diff(out[2], gsl_spline_eval_deriv2(sp, tk, acc), 1.0), 1e-10);
    while (i < 5 && tk >= t[i + 1])
      i++;
    lo = gsl_spline_eval_deriv2(sp, t[i], acc);
    hi = gsl_spline_eval_deriv2(sp, t[i + 1], acc);
    ck_assert_double_le(rel_diff(out[3], (hi - lo) / (t[i + 1] - t[i]), 1.0),
                        1e-9);
  }
  gsl_spline_free(sp);
  gsl_interp_accel_free(acc);
  kl_model_free(m);
}
END_TEST

/* ------------------------------------------------------------------------
 * A time sweep at constant speed is the coefficient sweep scaled
 * ------------------------------------------------------------------------ */

/*
 * Source: the chain rule (common practice, no source): at constant input
 * speed w, x(t) = x(u(t)) with u' = w, u'' = u''' = 0 gives xdot = x_u w,
 * xddot = x_uu w^2, xdddot = x_uuu w^3, the coefficients being what the
 * sweep delivers (unit rate, zero acceleration and jerk).
 */
START_TEST(constant_speed_is_the_scaled_coefficient_sweep) {
  int slide, k, size, q;
  kl_model *m = open_slider_crank(&slide);
  const double T = 0.4, turn = 2 * PI, w = turn / T; /* 150 rpm */
  const int steps = 72;
  static const int order[][2] = {
      {KL_QUANTITY_LINK_RATE, 1},        {KL_QUANTITY_LINK_ACCEL, 2},
      {KL_QUANTITY_LINK_JERK, 3},        {KL_QUANTITY_JOINT_SLIDE_RATE, 1},
      {KL_QUANTITY_JOINT_SLIDE_ACCEL, 2}, {KL_QUANTITY_JOINT_SLIDE_JERK, 3},
      {KL_QUANTITY_POINT_VX, 1},         {KL_QUANTITY_POINT_AY, 2},
      {KL_QUANTITY_POINT_JX, 3},         {KL_QUANTITY_POINT_JY, 3}};
  kl_solver *s, *sweeper;
  double *rows, *row;
  ck_assert_int_eq(kl_add_segment(m, 0, KL_SEGMENT_SPEED, 0, T, 0.0, turn), 0);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  size = kl_model_row_size(m);
  rows = malloc((size_t)(steps + 1) * (size_t)size * sizeof *rows);
  row = malloc((size_t)size * sizeof *row);
  s = kl_solver_new(m);
  sweeper = kl_solver_new(m);
  kl_set_link_angle(s, 2, 0.1);
  kl_set_joint_slide(s, slide, 125.0);
  kl_set_link_angle(sweeper, 2, 0.1);
  kl_set_joint_slide(sweeper, slide, 125.0);
  ck_assert_int_eq(kl_solver_sweep_rows(sweeper, 0, 0.0, turn, steps, rows,
                                        NULL),
                   KL_OK);
  for (k = 0; k <= steps; k++) {
    const double *ref = rows + (size_t)k * (size_t)size;
    ck_assert_int_eq(kl_solve_at_time(s, T * k / steps), KL_OK);
    ck_assert_int_eq(kl_solver_row(s, row), KL_OK);
    for (q = 0; q < (int)(sizeof order / sizeof order[0]); q++) {
      int count, first = kl_model_row_offset(m, order[q][0], &count), i;
      double scale = pow(w, order[q][1]);
      for (i = 0; i < count; i++) {
        double want = ref[first + i] * scale, got = row[first + i];
        if (isnan(want)) { /* a revolute joint's slide */
          ck_assert(isnan(got));
          continue;
        }
        ck_assert_msg(rel_diff(got, want, 30.0 * scale) <= 1e-9,
                      "step %d, %s %d: %.17g vs %.17g", k,
                      kl_quantity_str(order[q][0]), i, got, want);
      }
    }
  }
  /* outside the profile: refused, the solver as it was */
  ck_assert_int_eq(kl_solve_at_time(s, T * 1.01), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "outside the profile"));
  ck_assert_double_le(fabs(kl_input_value(s, 0) - turn), 1e-12);
  ck_assert(isfinite(kl_link_jerk(s, 2)));
  free(rows);
  free(row);
  kl_solver_free(s);
  kl_solver_free(sweeper);
  kl_model_free(m);
}
END_TEST

/* ------------------------------------------------------------------------
 * The motor torque over a servo move
 * ------------------------------------------------------------------------ */

/*
 * Source: Newton's second law for a rotor about a fixed axis, T = J alpha,
 * with the cycloidal law's acceleration h 2 pi sin(2 pi x) / T^2 (peak 2 pi
 * h / T^2 at x = 1/4; its RMS over the rise 2 pi h / (sqrt 2 T^2)); the
 * trapezoid rule on the 60 equal steps of the rise sums sin^2 exactly
 * over its period.
 */
START_TEST(servo_torque_follows_newtons_law) {
  kl_model *m = kl_model_new();
  const double J = 0.02, h = PI / 2, T = 0.3; /* kg m^2, rad, s; invented */
  double peak, at, rms, alpha_peak = 2 * PI * h / (T * T);
  int rotor = kl_add_link(m, "rotor");
  int pivot = kl_add_revolute(m, KL_GROUND, 0, 0, rotor, 0, 0);
  kl_solver *s;
  kl_add_input(m, pivot);
  ck_assert_int_eq(kl_set_link_mass(m, rotor, 3.0, 0.0, 0.0, J), KL_OK);
  ck_assert_int_eq(kl_add_segment(m, 0, KL_SEGMENT_RISE, KL_LAW_CYCLOIDAL, T,
                                  0.0, h),
                   0);
  ck_assert_int_eq(kl_add_segment(m, 0, KL_SEGMENT_DWELL, 0, 0.1, h, h), 1);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  ck_assert_int_eq(kl_solver_time_efforts(s, 0, 0, NULL, &peak, &at, &rms),
                   KL_EINVAL);
  /* 80 steps on the rise and its dwell: samples every 0.005 s */
  ck_assert_int_eq(kl_solver_time_efforts(s, 80, 0, NULL, &peak, &at, &rms),
                   KL_OK);
  ck_assert_double_le(rel_diff(peak, J * alpha_peak, 1.0), 1e-9);
  ck_assert_double_le(fabs(at - T / 4), 1e-12);
  /* over the whole 0.4 s: the rise's mean square, times T / 0.4 */
  ck_assert_double_le(
      rel_diff(rms, J * alpha_peak / sqrt(2.0) * sqrt(T / 0.4), 1.0), 1e-9);
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* ------------------------------------------------------------------------
 * Every machine's jerk against differences of its accelerations in time
 * ------------------------------------------------------------------------ */

/* Every stage at time tau of the motion u = u0 + ud tau + udd tau^2 / 2
 * (the machine's sample k of 12, its rates and accelerations), zero input
 * jerk; the row into `row`. */
static void solve_in_time(const machine *mc, kl_solver *s, int k, double tau,
                          double *row) {
  double u[MACHINE_MAX_INPUTS], ud[MACHINE_MAX_INPUTS];
  double udd[MACHINE_MAX_INPUTS], zero[MACHINE_MAX_INPUTS] = {0.0, 0.0};
  int i;
  machine_sample(mc, k, 12, u, ud, udd);
  for (i = 0; i < mc->ninputs; i++) {
    u[i] += ud[i] * tau + 0.5 * udd[i] * tau * tau;
    ud[i] += udd[i] * tau;
  }
  ck_assert_msg(kl_solve_position(s, u) == KL_OK, "%s sample %d: %s",
                mc->name, k, kl_solver_error(s));
  ck_assert_int_eq(kl_solve_velocity(s, ud), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, udd), KL_OK);
  ck_assert_int_eq(kl_solve_jerk(s, zero), KL_OK);
  kl_solver_row(s, row);
}

/*
 * Common practice, no source: a central difference in time of the
 * accelerations, (a(h) - a(-h)) / 2h, against the jerk at 0, along each
 * machine's own motion (rates and input accelerations of tests/machines.c,
 * so the cross terms in omega alpha and sdot alpha count). h moves the
 * inputs by about 1e-4 rad or 1e-4 of the length scale; truncation h^2
 * |x''''| / 6 and rounding eps |a| / h stay near 1e-8 of the row's largest
 * jerk; the tolerance 1e-6 of it keeps a factor of a hundred, while a wrong
 * coefficient of a third-order term shows at 1e-2 or more.
 */
START_TEST(every_machine_jerk_matches_differences_of_accelerations) {
  static const int pairs[][2] = {
      {KL_QUANTITY_LINK_ACCEL, KL_QUANTITY_LINK_JERK},
      {KL_QUANTITY_JOINT_SLIDE_ACCEL, KL_QUANTITY_JOINT_SLIDE_JERK},
      {KL_QUANTITY_POINT_AX, KL_QUANTITY_POINT_JX},
      {KL_QUANTITY_POINT_AY, KL_QUANTITY_POINT_JY}};
  machine mc = build_machine(_i, 0);
  kl_solver *s = machine_solver(&mc);
  int size = kl_model_row_size(mc.m), k, p, i;
  double *at = malloc(3 * (size_t)size * sizeof *at);
  double *minus = at + size, *plus = minus + size;
  double speed = fmax(fabs(mc.rate[0]), fabs(mc.rate[1]));
  double h = 1e-4 / fmax(speed, 1.0);
  for (k = 0; k <= 12; k += 3) {
    double largest = 0.0;
    solve_in_time(&mc, s, k, -h, minus);
    solve_in_time(&mc, s, k, h, plus);
    solve_in_time(&mc, s, k, 0.0, at);
    for (p = 0; p < 4; p++) {
      int count, jerk = kl_model_row_offset(mc.m, pairs[p][1], &count);
      for (i = 0; i < count; i++)
        if (isfinite(at[jerk + i]))
          largest = fmax(largest, fabs(at[jerk + i]));
    }
    for (p = 0; p < 4; p++) {
      int count, accel = kl_model_row_offset(mc.m, pairs[p][0], &count);
      int jerk = kl_model_row_offset(mc.m, pairs[p][1], NULL);
      for (i = 0; i < count; i++) {
        double fd = (plus[accel + i] - minus[accel + i]) / (2 * h);
        if (isnan(at[jerk + i]))
          continue; /* a revolute joint's slide */
        ck_assert_msg(fabs(fd - at[jerk + i]) <= 1e-6 * largest,
                      "%s sample %d, %s %d: jerk %.12g, difference %.12g",
                      mc.name, k, kl_quantity_str(pairs[p][1]), i,
                      at[jerk + i], fd);
      }
    }
  }
  free(at);
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("time");
  TCase *tc = tcase_create("time");
  tcase_set_timeout(tc, 60);
  tcase_add_test(tc, segments_follow_the_motion_laws);
  tcase_add_test(tc, bad_profiles_are_refused);
  tcase_add_test(tc, table_matches_gsl_natural_spline);
  tcase_add_test(tc, constant_speed_is_the_scaled_coefficient_sweep);
  tcase_add_test(tc, servo_torque_follows_newtons_law);
  tcase_add_loop_test(
      tc, every_machine_jerk_matches_differences_of_accelerations, 0,
      MACHINE_COUNT);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
