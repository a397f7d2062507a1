/*
 * test_cam.c - cams from motion programs: the follower's motion, pressure
 * angle and radius of curvature against closed forms, the outline as a
 * curve slot driving a follower in a model, undercutting and pressure
 * checks, bad input.
 */
#include <check.h>
#include <math.h>
#include <string.h>

#include "suite.h"
#include "support.h"

/* rise 20 over 120 deg, dwell 60 deg, return over 120 deg, dwell 60 deg */
static kl_cam *rise_dwell_return(int law, double base, double roller,
                                 double offset) {
  kl_cam *c = kl_cam_new();
  kl_cam_follower f;
  kl_cam_segment seg[4] = {{2 * PI / 3, 20.0, 0},
                           {PI / 3, 0.0, 0},
                           {2 * PI / 3, -20.0, 0},
                           {PI / 3, 0.0, 0}};
  seg[0].law = seg[2].law = law;
  kl_cam_follower_init(&f);
  f.base_radius = base;
  f.roller_radius = roller;
  f.offset = offset;
  ck_assert_int_eq(kl_cam_set_follower(c, &f), KL_OK);
  ck_assert_int_eq(kl_cam_set_program(c, 4, seg), KL_OK);
  return c;
}

/* The follower's motion is the law scaled to the segment: a rise h over
 * span b gives h s(x), h s'(x) / b, ... at x = theta / b; a return falls
 * from h. */
START_TEST(motion_is_the_scaled_law) {
  kl_cam *c = rise_dwell_return(KL_LAW_CYCLOIDAL, 40, 10, 0);
  double out[4], law[4], b = 2 * PI / 3;
  ck_assert_int_eq(kl_cam_motion(c, 0.3 * b, out), KL_OK);
  kl_motion_law(KL_LAW_CYCLOIDAL, 0.3, law);
  ck_assert_double_le(fabs(out[0] - 20 * law[0]), 1e-13);
  ck_assert_double_le(fabs(out[1] - 20 * law[1] / b), 1e-13);
  ck_assert_double_le(fabs(out[2] - 20 * law[2] / (b * b)), 1e-12);
  ck_assert_double_le(fabs(out[3] - 20 * law[3] / (b * b * b)), 1e-12);
  /* in the return, 0.3 of the way */
  ck_assert_int_eq(kl_cam_motion(c, b + PI / 3 + 0.3 * b, out), KL_OK);
  ck_assert_double_le(fabs(out[0] - (20 - 20 * law[0])), 1e-12);
  /* the dwells, and a turn later the same */
  ck_assert_int_eq(kl_cam_motion(c, b + 0.5, out), KL_OK);
  ck_assert_double_eq(out[0], 20.0);
  ck_assert_double_eq(out[1], 0.0);
  ck_assert_int_eq(kl_cam_motion(c, 2 * PI + 0.3 * b, out), KL_OK);
  ck_assert_double_le(fabs(out[0] - 20 * law[0]), 1e-12);
  kl_cam_free(c);
}
END_TEST

/* A translating roller follower with offset e over a cam of prime radius
 * Rp: tan(pressure angle) = (s' - e) / (sqrt(Rp^2 - e^2) + s) (Norton,
 * Design of Machinery, the pressure angle of an offset translating roller
 * follower; from memory). For the in-line follower the pitch curve is the
 * polar curve r = Rp + s(theta), whose radius of curvature is
 * (r^2 + r'^2)^(3/2) / (r^2 + 2 r'^2 - r r'') (the calculus textbooks'
 * formula for a curve in polar form). */
START_TEST(pressure_and_curvature_match_closed_forms) {
  int k, off;
  for (off = 0; off < 2; off++) {
    double e = off ? 8.0 : 0.0, rp = 50.0;
    kl_cam *c = rise_dwell_return(KL_LAW_HARMONIC, 40, 10, e);
    for (k = 0; k < 72; k++) {
      double th = 2 * PI * k / 72 + 0.01, s[4], out[KL_CAM_SAMPLE_SIZE];
      double r, want_rho, want_phi;
      kl_cam_motion(c, th, s);
      ck_assert_int_eq(kl_cam_sample(c, th, out), KL_OK);
      want_phi = atan2(s[1] - e, sqrt(rp * rp - e * e) + s[0]);
      ck_assert_double_le(fabs(out[KL_CAM_PRESSURE] - want_phi), 1e-13);
      /* the roller centre stays on the follower's line: |P| is the same
       * in the cam's frame */
      ck_assert_double_le(fabs(hypot(out[0], out[1]) -
                               hypot(e, sqrt(rp * rp - e * e) + s[0])), 1e-12);
      if (off)
        continue;
      r = rp + s[0];
      want_rho = pow(r * r + s[1] * s[1], 1.5) /
                 (r * r + 2 * s[1] * s[1] - r * s[2]);
      ck_assert_double_le(fabs(out[KL_CAM_CURVATURE] - want_rho),
                          1e-11 * fabs(want_rho));
      /* the surface lies a roller radius inside the pitch curve */
      ck_assert_double_le(fabs(hypot(out[0] - out[2], out[1] - out[3]) - 10.0), 1e-12);
    }
    kl_cam_free(c);
  }
}
END_TEST

/* An oscillating follower: the roller centre stays an arm's length from
 * the pivot, and the pitch curve's curvature agrees with the circle
 * through three nearby samples (common practice, no source). */
START_TEST(oscillating_follower_geometry) {
  kl_cam *c = kl_cam_new();
  kl_cam_follower f;
  kl_cam_segment seg[2] = {{PI, 0.3, KL_LAW_POLY345}, {PI, -0.3, KL_LAW_POLY345}};
  int k;
  kl_cam_follower_init(&f);
  f.kind = KL_CAM_OSCILLATING;
  f.base_radius = 30;
  f.roller_radius = 6;
  f.pivot_x = 80;
  f.pivot_y = 0;
  f.arm_length = 60;
  ck_assert_int_eq(kl_cam_set_follower(c, &f), KL_OK);
  ck_assert_int_eq(kl_cam_set_program(c, 2, seg), KL_OK);
  for (k = 0; k < 36; k++) {
    double th = 2 * PI * k / 36 + 0.05, h = 1e-4, p[3][KL_CAM_SAMPLE_SIZE];
    double ax, ay, bx, by, cx, cy, d, ux, uy, rho;
    int i;
    for (i = 0; i < 3; i++)
      kl_cam_sample(c, th + (i - 1) * h, p[i]);
    /* turned back to the global frame, the roller is an arm away */
    ux = cos(th) * p[1][0] - sin(th) * p[1][1];
    uy = sin(th) * p[1][0] + cos(th) * p[1][1];
    ck_assert_double_le(fabs(hypot(ux - 80, uy) - 60), 1e-11);
    ax = p[0][0], ay = p[0][1], bx = p[1][0], by = p[1][1], cx = p[2][0], cy = p[2][1];
    d = 2 * (ax * (by - cy) + bx * (cy - ay) + cx * (ay - by));
    rho = hypot(ax - bx, ay - by) * hypot(bx - cx, by - cy) *
          hypot(cx - ax, cy - ay) / fabs(d);
    ck_assert_double_le(fabs(fabs(p[1][KL_CAM_CURVATURE]) - rho), 1e-5 * rho);
  }
  kl_cam_free(c);
}
END_TEST

/* The outline's pitch curve as a closed curve slot on a turning cam link,
 * the follower on a prismatic joint: the follower's slide follows the
 * program, within the spline's error at 720 points. */
START_TEST(outline_drives_a_follower_in_a_model) {
  enum { N = 720 };
  static double pitch[2 * N];
  kl_cam *c = rise_dwell_return(KL_LAW_CYCLOIDAL, 40, 10, 0);
  kl_model *m = kl_model_new();
  kl_solver *s;
  int cam = kl_add_link(m, "cam"), follower = kl_add_link(m, "follower"), k;
  int drive = kl_add_revolute(m, KL_GROUND, 0, 0, cam, 0, 0);
  ck_assert_int_eq(kl_cam_outline(c, N, pitch, NULL), KL_OK);
  kl_add_prismatic(m, KL_GROUND, 0, 0, PI / 2, follower, 0, 0);
  ck_assert_int_eq(kl_add_curve_slot(m, cam, N, pitch, 1, follower, 0, 0), 2);
  kl_add_input(m, drive);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  kl_set_joint_slide(s, 1, 50.0);
  for (k = 0; k < 48; k++) {
    double th = 2 * PI * k / 48, motion[4];
    kl_set_joint_slide(s, 2, N * th / (2 * PI));
    ck_assert_int_eq(kl_solve_position(s, &th), KL_OK);
    kl_cam_motion(c, th, motion);
    ck_assert_double_le(fabs(kl_joint_slide(s, 1) - (50.0 + motion[0])), 1e-6);
  }
  kl_solver_free(s);
  kl_model_free(m);
  kl_cam_free(c);
}
END_TEST

/* A small cam with a steep rise: the check names the cam angle where the
 * roller undercuts, or where the pressure angle passes the bound. */
START_TEST(undercut_and_pressure_are_reported_with_the_angle) {
  kl_cam *c = kl_cam_new();
  kl_cam_follower f;
  kl_cam_segment seg[2] = {{PI / 4, 15.0, KL_LAW_CYCLOIDAL},
                           {7 * PI / 4, -15.0, KL_LAW_CYCLOIDAL}};
  kl_cam_report r;
  kl_cam_follower_init(&f);
  f.base_radius = 20;
  f.roller_radius = 14;
  ck_assert_int_eq(kl_cam_set_follower(c, &f), KL_OK);
  ck_assert_int_eq(kl_cam_set_program(c, 2, seg), KL_OK);
  memset(&r, 0, sizeof r);
  r.size = sizeof r;
  ck_assert_int_eq(kl_cam_check(c, 360, PI / 2, &r), KL_EUNDERCUT);
  ck_assert_ptr_nonnull(strstr(kl_cam_error(c), "undercuts the cam at cam angle"));
  ck_assert_double_lt(r.min_convex_radius, 14.0);
  ck_assert_double_gt(r.min_convex_angle, 0.0);
  ck_assert_double_lt(r.min_convex_angle, PI / 4 + 0.01);
  /* a small roller passes the undercut check; 30 deg is passed */
  f.roller_radius = 1;
  ck_assert_int_eq(kl_cam_set_follower(c, &f), KL_OK);
  ck_assert_int_eq(kl_cam_check(c, 360, PI / 6, &r), KL_EPRESSURE);
  ck_assert_ptr_nonnull(strstr(kl_cam_error(c), "above the bound 30.0000 deg"));
  ck_assert_double_gt(r.max_pressure, PI / 6);
  /* with the bound above the maximum, OK; the maximum is that of the
   * samples to within the refinement */
  ck_assert_int_eq(kl_cam_check(c, 360, r.max_pressure + 1e-9, &r), KL_OK);
  {
    double out[KL_CAM_SAMPLE_SIZE];
    kl_cam_sample(c, r.max_pressure_angle, out);
    ck_assert_double_le(fabs(fabs(out[KL_CAM_PRESSURE]) - r.max_pressure), 1e-15);
  }
  kl_cam_free(c);
}
END_TEST

START_TEST(bad_cams_are_refused_and_change_nothing) {
  kl_cam *c = rise_dwell_return(KL_LAW_POLY345, 40, 10, 0);
  kl_cam_follower f;
  kl_cam_segment short_turn[2] = {{PI, 5.0, KL_LAW_POLY345}, {PI / 2, -5.0, KL_LAW_POLY345}};
  kl_cam_segment open[2] = {{PI, 5.0, KL_LAW_POLY345}, {PI, -4.0, KL_LAW_POLY345}};
  kl_cam_segment nan_span[1] = {{NAN, 0.0, 0}};
  double before[KL_CAM_SAMPLE_SIZE], after[KL_CAM_SAMPLE_SIZE];
  kl_cam_sample(c, 1.0, before);
  kl_cam_follower_init(&f);
  f.roller_radius = 0.0;
  ck_assert_int_eq(kl_cam_set_follower(c, &f), KL_ERADIUS);
  ck_assert_ptr_nonnull(strstr(kl_cam_error(c), "roller radius 0 is not positive"));
  f.roller_radius = 1.0;
  f.base_radius = -1.0;
  ck_assert_int_eq(kl_cam_set_follower(c, &f), KL_ERADIUS);
  f.base_radius = INFINITY;
  ck_assert_int_eq(kl_cam_set_follower(c, &f), KL_ENONFINITE);
  f.base_radius = 1.0;
  f.offset = 3.0;
  ck_assert_int_eq(kl_cam_set_follower(c, &f), KL_EINVAL);
  f.kind = KL_CAM_OSCILLATING;
  f.pivot_x = 1.5;
  f.arm_length = 1.0;
  ck_assert_int_eq(kl_cam_set_follower(c, &f), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_cam_error(c), "inside the prime circle"));
  f.pivot_x = 10;
  ck_assert_int_eq(kl_cam_set_follower(c, &f), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_cam_error(c), "cannot reach"));
  ck_assert_int_eq(kl_cam_set_program(c, 2, short_turn), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_cam_error(c), "not one turn"));
  ck_assert_int_eq(kl_cam_set_program(c, 2, open), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_cam_error(c), "come back"));
  ck_assert_int_eq(kl_cam_set_program(c, 1, nan_span), KL_ENONFINITE);
  ck_assert_int_eq(kl_cam_set_program(c, 0, open), KL_EINVAL);
  ck_assert_int_eq(kl_cam_check(c, 4, 0.5, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_cam_check(c, 64, -0.5, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_cam_outline(c, 2, NULL, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_cam_sample(c, NAN, after), KL_ENONFINITE);
  kl_cam_sample(c, 1.0, after);
  ck_assert_int_eq(memcmp(before, after, sizeof before), 0);
  kl_cam_free(c);
  kl_cam_free(NULL);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("cam");
  TCase *tc = tcase_create("cam");
  tcase_set_timeout(tc, 60);
  tcase_add_test(tc, motion_is_the_scaled_law);
  tcase_add_test(tc, pressure_and_curvature_match_closed_forms);
  tcase_add_test(tc, oscillating_follower_geometry);
  tcase_add_test(tc, outline_drives_a_follower_in_a_model);
  tcase_add_test(tc, undercut_and_pressure_are_reported_with_the_angle);
  tcase_add_test(tc, bad_cams_are_refused_and_change_nothing);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
