/*
 * test_cam.c - cams from motion programs: the follower's motion, pressure
 * angle and radius of curvature against closed forms, the outline as a
 * curve slot driving a follower in a model, undercutting and pressure
 * checks, bad input.
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
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

/* ---- cams in models: kl_add_cam, the cam statement, the follower's state
 * read from a solved model ---- */

/* An oscillating follower (arm 60 about the pivot (80, 0) of the ground
 * frame, the cam's bearing at the origin): a 3-4-5 rise of 0.3 rad over
 * half a turn and back. */
static kl_cam *swinging_cam(void) {
  kl_cam *c = kl_cam_new();
  kl_cam_follower f;
  kl_cam_segment seg[2] = {{PI, 0.3, KL_LAW_POLY345},
                           {PI, -0.3, KL_LAW_POLY345}};
  kl_cam_follower_init(&f);
  f.kind = KL_CAM_OSCILLATING;
  f.base_radius = 30;
  f.roller_radius = 6;
  f.pivot_x = 80;
  f.arm_length = 60;
  ck_assert_int_eq(kl_cam_set_follower(c, &f), KL_OK);
  ck_assert_int_eq(kl_cam_set_program(c, 2, seg), KL_OK);
  return c;
}

typedef struct {
  const kl_cam *cam;
  int joint, rows;
  double rest, worst[5];
} state_check;

/* The state against the program at the state's own cam angle. */
static void compare_state(state_check *k, const double st[KL_CAM_STATE_SIZE]) {
  double motion[4], sample[KL_CAM_SAMPLE_SIZE], theta = st[KL_CAM_STATE_ANGLE];
  int i;
  kl_cam_motion(k->cam, theta, motion);
  kl_cam_sample(k->cam, theta, sample);
  {
    double err[5] = {st[KL_CAM_STATE_RISE] - (k->rest + motion[0]),
                     st[KL_CAM_STATE_D1] - motion[1],
                     st[KL_CAM_STATE_D2] - motion[2],
                     st[KL_CAM_STATE_D3] - motion[3],
                     st[KL_CAM_STATE_PRESSURE] - sample[KL_CAM_PRESSURE]};
    for (i = 0; i < 5; i++)
      k->worst[i] = fmax(k->worst[i], fabs(err[i]));
  }
  k->rows++;
}

/* At each step of a sweep of the cam's own bearing (unit cam rate): the
 * cam angle is the input, the time rates the derivatives over it. */
static int check_state(const kl_solver *s, int step, double input,
                       void *user) {
  double st[KL_CAM_STATE_SIZE];
  (void)step;
  ck_assert_int_eq(kl_cam_follower_state(s, ((state_check *)user)->joint, st),
                   KL_OK);
  ck_assert_double_le(fabs(st[KL_CAM_STATE_ANGLE] - input), 1e-12);
  ck_assert_double_le(fabs(st[KL_CAM_STATE_RATE] - st[KL_CAM_STATE_D1]), 1e-12);
  ck_assert_double_le(fabs(st[KL_CAM_STATE_JERK] - st[KL_CAM_STATE_D3]), 1e-9);
  compare_state(user, st);
  return 0;
}

/* At each step of a sweep of another input: the cam's own rates vary. */
static int check_state_driven(const kl_solver *s, int step, double input,
                              void *user) {
  double st[KL_CAM_STATE_SIZE];
  (void)step;
  (void)input;
  ck_assert_int_eq(kl_cam_follower_state(s, ((state_check *)user)->joint, st),
                   KL_OK);
  compare_state(user, st);
  return 0;
}

/* A cam joint drives an oscillating follower in a model: read from the
 * solved model, the arm's angle and its first three derivatives over the
 * cam angle are the program's (within the pitch-curve spline's error at
 * 1440 points, growing with each derivative), and so is the pressure
 * angle. */
/* The worst differences of a sweep of 144 steps from the program: rise,
 * its three derivatives over the cam angle and the pressure angle.
 * Measured: 3e-12 rad, 2e-9, 4e-6, 6e-3 (of a peak third derivative of
 * the 3-4-5 law, 60 h / b^3 = 0.58, from memory), 3e-9 rad. */
static void assert_state_is_the_program(const state_check *k) {
  ck_assert_int_eq(k->rows, 145);
  ck_assert_double_le(k->worst[0], 1e-9);
  ck_assert_double_le(k->worst[1], 1e-7);
  ck_assert_double_le(k->worst[2], 1e-4);
  ck_assert_double_le(k->worst[3], 0.02);
  ck_assert_double_le(k->worst[4], 1e-7);
}

START_TEST(cam_joint_state_is_the_program) {
  kl_cam *c = swinging_cam();
  kl_model *m = kl_model_new();
  kl_solver *s;
  kl_sweep_result res;
  state_check k;
  double p0[KL_CAM_SAMPLE_SIZE], out[KL_CAM_STATE_SIZE], u = 0.0;
  int cam = kl_add_link(m, "cam"), arm = kl_add_link(m, "arm"), joint;
  int shaft = kl_add_revolute(m, KL_GROUND, 0, 0, cam, 0, 0);
  kl_add_revolute(m, KL_GROUND, 80, 0, arm, 0, 0);
  joint = kl_add_cam(m, shaft, arm, 60, 0, c, 1440, PI);
  ck_assert_int_eq(joint, 2);
  ck_assert_int_eq(kl_model_cam_bearing(m, joint), shaft);
  ck_assert_double_eq(kl_model_cam_limit(m, joint), PI);
  ck_assert_int_eq(kl_model_curve_count(m, joint), 1440);
  kl_add_input(m, shaft);
  /* the arm starts where the program puts the roller at cam angle 0 */
  kl_cam_sample(c, 0.0, p0);
  memset(&k, 0, sizeof k);
  k.cam = c;
  k.joint = joint;
  k.rest = atan2(p0[KL_CAM_PITCH_Y], p0[KL_CAM_PITCH_X] - 80);
  ck_assert_int_eq(kl_model_set_sketch_angle(m, arm, k.rest), KL_OK);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  /* before the jerk is solved there is no state */
  ck_assert_int_eq(kl_cam_follower_state(s, joint, out), KL_ESTAGE);
  ck_assert_int_eq(kl_cam_follower_state(s, shaft, out), KL_EKIND);
  ck_assert_int_eq(kl_cam_follower_state(s, 9, out), KL_EID);
  ck_assert_int_eq(kl_cam_follower_state(s, joint, NULL), KL_EINVAL);
  res.size = sizeof res;
  ck_assert_int_eq(kl_solver_sweep(s, 0, 0.0, 2 * PI, 144, check_state, &k, &res),
                   KL_OK);
  assert_state_is_the_program(&k);
  kl_solver_free(s);
  kl_model_free(m);
  kl_cam_free(c);
}
END_TEST

/* The same cam driven through a drag-link four-bar (ground 15, driving
 * crank 50, coupler 55, the cam as the driven crank 45: Grashof's
 * condition with ground the shortest link, so both cranks turn fully), so
 * that the cam turns at a varying rate: the derivatives over the cam angle,
 * by the chain rule from the time rates, are still the program's. */
START_TEST(cam_state_through_a_drag_link_is_the_program) {
  kl_cam *c = swinging_cam();
  kl_model *m = kl_model_new();
  kl_solver *s;
  kl_sweep_result res;
  state_check k;
  double p0[KL_CAM_SAMPLE_SIZE], motion[4], start = 1.5;
  int cam = kl_add_link(m, "cam"), arm = kl_add_link(m, "arm");
  int crank = kl_add_link(m, "crank"), coupler = kl_add_link(m, "coupler");
  int shaft = kl_add_revolute(m, KL_GROUND, 0, 0, cam, 0, 0), joint, motor;
  kl_add_revolute(m, KL_GROUND, 80, 0, arm, 0, 0);
  joint = kl_add_cam(m, shaft, arm, 60, 0, c, 1440, PI);
  motor = kl_add_revolute(m, KL_GROUND, -15, 0, crank, 0, 0);
  kl_add_revolute(m, crank, 50, 0, coupler, 0, 0);
  kl_add_revolute(m, coupler, 55, 0, cam, 45, 0);
  kl_add_input(m, motor);
  kl_cam_sample(c, 0.0, p0);
  kl_cam_motion(c, start, motion);
  memset(&k, 0, sizeof k);
  k.cam = c;
  k.joint = joint;
  k.rest = atan2(p0[KL_CAM_PITCH_Y], p0[KL_CAM_PITCH_X] - 80);
  /* the crank along +x puts the cam near 1.5 rad (a sketch to start from) */
  kl_model_set_sketch_angle(m, cam, start);
  kl_model_set_sketch_angle(m, coupler, 2.19);
  kl_model_set_sketch_angle(m, arm, k.rest + motion[0]);
  kl_model_set_sketch_slide(m, joint, 1440 * start / (2 * PI));
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  res.size = sizeof res;
  ck_assert_int_eq(kl_solver_sweep(s, 0, 0.0, 2 * PI, 144, check_state_driven,
                                   &k, &res),
                   KL_OK);
  assert_state_is_the_program(&k);
  kl_solver_free(s);
  kl_model_free(m);
  kl_cam_free(c);
}
END_TEST

/* kl_add_cam's refusals: each its status, the model unchanged. */
START_TEST(add_cam_refuses_and_changes_nothing) {
  kl_cam *c = swinging_cam(), *copy = kl_cam_new();
  kl_cam *steep = kl_cam_new();
  kl_cam_follower f;
  kl_cam_segment sharp[2] = {{PI / 6, 25.0, KL_LAW_CYCLOIDAL},
                             {11 * PI / 6, -25.0, KL_LAW_CYCLOIDAL}};
  kl_model *m = kl_model_new();
  int cam = kl_add_link(m, "cam"), arm = kl_add_link(m, "arm");
  int shaft = kl_add_revolute(m, KL_GROUND, 0, 0, cam, 0, 0);
  int pin = kl_add_revolute(m, cam, 10, 0, arm, 0, 0);
  kl_cam_follower_init(&f);
  f.base_radius = 5;
  f.roller_radius = 30;
  kl_cam_set_follower(steep, &f);
  kl_cam_set_program(steep, 2, sharp);
  ck_assert_int_eq(kl_add_cam(m, pin, arm, 0, 0, c, 360, 1.0), KL_EKIND);
  ck_assert_int_eq(kl_add_cam(m, 7, arm, 0, 0, c, 360, 1.0), KL_EID);
  ck_assert_int_eq(kl_add_cam(m, shaft, cam, 0, 0, c, 360, 1.0), KL_ESELFJOINT);
  ck_assert_int_eq(kl_add_cam(m, shaft, arm, 0, 0, NULL, 360, 1.0), KL_EINVAL);
  ck_assert_int_eq(kl_add_cam(m, shaft, arm, 0, 0, c, 7, 1.0), KL_EINVAL);
  ck_assert_int_eq(kl_add_cam(m, shaft, arm, 0, 0, c, 360, 0.0), KL_EINVAL);
  ck_assert_int_eq(kl_add_cam(m, shaft, arm, 0, 0, c, 360, NAN), KL_ENONFINITE);
  ck_assert_int_eq(kl_add_cam(m, shaft, arm, 0, 0, steep, 360, PI), KL_EUNDERCUT);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "undercuts the cam at cam angle"));
  ck_assert_int_eq(kl_add_cam(m, shaft, arm, 0, 0, c, 360, 0.01), KL_EPRESSURE);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "above the bound"));
  ck_assert_int_eq(kl_model_joint_count(m), 2);
  ck_assert_int_eq(kl_model_cam_bearing(m, shaft), KL_EKIND);
  ck_assert_int_eq(kl_model_cam_bearing(m, 5), KL_EID);
  ck_assert(isnan(kl_model_cam_limit(m, shaft)));
  ck_assert_int_eq(kl_cam_set_from_model(copy, m, shaft), KL_EKIND);
  ck_assert_int_eq(kl_cam_set_from_model(NULL, m, shaft), KL_EINVAL);
  kl_model_free(m);
  kl_cam_free(c);
  kl_cam_free(copy);
  kl_cam_free(steep);
}
END_TEST

/* A cam of `c` on a shaft at the origin whose follower runs on a guide
 * with ground at (gx, 0): a prismatic joint along `axis` (rad) with the
 * roller at the follower's origin when `sliding`, else a revolute pivot
 * with the roller at (arm, 0) of the follower link, sketched at `sketch`
 * (the guide's slide or the arm's angle). Gives kl_cam_guide_error's
 * status and out at the position solved at cam angle 0, or its refusal
 * before any solve. */
static int guide_error_of(const kl_cam *c, int sliding, double gx, double axis,
                          double arm, double sketch, double out[2]) {
  kl_model *m = kl_model_new();
  kl_solver *s;
  double u = 0.0;
  int cam = kl_add_link(m, "cam"), follower = kl_add_link(m, "follower");
  int shaft = kl_add_revolute(m, KL_GROUND, 0, 0, cam, 0, 0), guide, joint, st;
  guide = sliding ? kl_add_prismatic(m, KL_GROUND, gx, 0, axis, follower, 0, 0)
                  : kl_add_revolute(m, KL_GROUND, gx, 0, follower, 0, 0);
  joint = kl_add_cam(m, shaft, follower, sliding ? 0 : arm, 0, c, 720, PI);
  ck_assert_int_ge(joint, 0);
  kl_add_input(m, shaft);
  if (sliding)
    ck_assert_int_eq(kl_model_set_sketch_slide(m, guide, sketch), KL_OK);
  else
    ck_assert_int_eq(kl_model_set_sketch_angle(m, follower, sketch), KL_OK);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  ck_assert_int_eq(kl_cam_guide_error(s, shaft, out), KL_EKIND);
  ck_assert_int_eq(kl_cam_guide_error(s, 9, out), KL_EID);
  ck_assert_int_eq(kl_cam_guide_error(s, joint, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_cam_guide_error(NULL, joint, out), KL_EINVAL);
  /* a guide of the cam's kind has nothing to measure before a solve */
  st = kl_cam_guide_error(s, joint, out);
  if (st == KL_ESTAGE && (st = kl_solve_position(s, &u)) == KL_OK)
    st = kl_cam_guide_error(s, joint, out);
  kl_solver_free(s);
  kl_model_free(m);
  return st;
}

/* The guide the cam was made for measures 0; a guide moved, turned or of
 * another length measures what it was moved by (plane geometry: a line's
 * distance along x, the angle between two directions, a point's distance).
 * A translating cam on a revolute guide is of the wrong kind. */
START_TEST(guide_error_measures_the_follower_guide) {
  kl_cam *slide = rise_dwell_return(KL_LAW_CYCLOIDAL, 40, 10, 10);
  kl_cam *swing = swinging_cam();
  double out[2], p0[KL_CAM_SAMPLE_SIZE], rest;
  /* translating, stem line x = 10, roller at height sqrt(50^2 - 10^2) */
  ck_assert_int_eq(guide_error_of(slide, 1, 10, PI / 2, 0, sqrt(2400.0), out),
                   KL_OK);
  ck_assert_double_le(out[0], 1e-9);
  ck_assert_double_le(out[1], 1e-12);
  ck_assert_int_eq(guide_error_of(slide, 1, 12, PI / 2, 0, sqrt(2400.0), out),
                   KL_OK);
  ck_assert_double_le(fabs(out[0] - 2.0), 1e-9);
  ck_assert_double_le(out[1], 1e-12);
  /* an axis of -90 degrees is the same line */
  ck_assert_int_eq(guide_error_of(slide, 1, 10, -PI / 2, 0, -sqrt(2400.0), out),
                   KL_OK);
  ck_assert_double_le(out[0], 1e-9);
  ck_assert_double_le(out[1], 1e-12);
  ck_assert_int_eq(guide_error_of(slide, 1, 10, PI / 2 + PI / 36, 0,
                                  sqrt(2400.0), out), KL_OK);
  ck_assert_double_le(fabs(out[1] - PI / 36), 1e-12);
  ck_assert_int_eq(guide_error_of(slide, 0, 10, 0, 45, 1.5, out), KL_EKIND);
  /* oscillating: pivot (80, 0), arm 60 */
  kl_cam_sample(swing, 0.0, p0);
  rest = atan2(p0[KL_CAM_PITCH_Y], p0[KL_CAM_PITCH_X] - 80);
  ck_assert_int_eq(guide_error_of(swing, 0, 80, 0, 60, rest, out), KL_OK);
  ck_assert_double_le(out[0], 1e-9);
  ck_assert_double_eq(out[1], 0.0);
  ck_assert_int_eq(guide_error_of(swing, 0, 82, 0, 60, rest, out), KL_OK);
  ck_assert_double_le(fabs(out[0] - 2.0), 1e-9);
  ck_assert_int_eq(guide_error_of(swing, 0, 80, 0, 63, rest, out), KL_OK);
  ck_assert_double_le(fabs(out[0] - 3.0), 1e-9);
  ck_assert_int_eq(guide_error_of(swing, 1, 80, PI / 2, 0, 30, out), KL_EKIND);
  kl_cam_free(slide);
  kl_cam_free(swing);
}
END_TEST

static const char cam_text[] =
    "kinloop-model 1\n"
    "units length mm angle rad\n"
    "link cam\nlink arm\n"
    "revolute shaft ground 0 0 cam 0 0\n"
    "revolute pivot ground 80 0 arm 0 0\n"
    "cam lobe shaft arm 60 0 points 360 oscillating base 30 roller 6 pivot 80 "
    "0 arm 60 limit 1 program rise poly345 3.141592653589793 0.3 return "
    "poly345 3.141592653589793 0.3\n"
    "input shaft\n";

/* A cam joint is no pressure-angle site of the rod-and-guide kind: its
 * pressure angle is the follower's (kl_cam_follower_state), and the angle
 * from the cam joint's slide direction to a neighbouring link says nothing
 * (common practice, no source: the pressure angle of a cam is measured
 * between the follower's path and the pitch curve's normal). */
START_TEST(cam_joint_is_no_rod_pressure_site) {
  kl_io_error err;
  kl_model *m;
  kl_output sites[8];
  int n, i;
  memset(&err, 0, sizeof err);
  err.size = sizeof err;
  m = kl_model_read(cam_text, sizeof cam_text - 1, &err);
  ck_assert_msg(m != NULL, "%s (line %d)", err.message, err.line);
  ck_assert_int_eq(kl_model_cam_bearing(m, 2), 0);
  n = kl_model_pressure_sites(m, sites, 8);
  ck_assert_int_ge(n, 0);
  for (i = 0; i < n && i < 8; i++)
    ck_assert_int_ne(sites[i].id, 2);
  kl_model_free(m);
}
END_TEST

/* The cam statement reads into the cam kl_add_cam builds, and the writer
 * writes it back to the same text; its errors come at its line. */
START_TEST(cam_statement_round_trip) {
  kl_io_error err;
  kl_model *m, *again;
  kl_cam *c = swinging_cam(), *back = kl_cam_new();
  char out1[4096], out2[4096], bad[1024];
  size_t need;
  int k;
  memset(&err, 0, sizeof err);
  err.size = sizeof err;
  m = kl_model_read(cam_text, sizeof cam_text - 1, &err);
  ck_assert_msg(m != NULL, "%s (line %d)", err.message, err.line);
  ck_assert_int_eq(kl_model_cam_bearing(m, 2), 0);
  ck_assert_double_eq(kl_model_cam_limit(m, 2), 1.0);
  ck_assert_int_eq(kl_cam_set_from_model(back, m, 2), KL_OK);
  for (k = 0; k < 16; k++) {
    double a[KL_CAM_SAMPLE_SIZE], b[KL_CAM_SAMPLE_SIZE];
    kl_cam_sample(c, 0.4 * k, a);
    kl_cam_sample(back, 0.4 * k, b);
    ck_assert_int_eq(memcmp(a, b, sizeof a), 0);
  }
  ck_assert_int_eq(kl_model_write(m, out1, sizeof out1, &need), KL_OK);
  again = kl_model_read(out1, strlen(out1), &err);
  ck_assert_msg(again != NULL, "%s (line %d)\n%s", err.message, err.line, out1);
  ck_assert_int_eq(kl_model_write(again, out2, sizeof out2, &need), KL_OK);
  ck_assert_str_eq(out1, out2);
  ck_assert_ptr_nonnull(strstr(out1, "cam lobe shaft arm 60 0 points 360 oscillating base 30 roller 6 pivot 80 0 arm 60 limit 1 program rise poly345 3.1415926535897931 0.29999999999999999 return poly345"));
  kl_model_free(again);
  kl_model_free(m);
  /* each bad statement: its status, at line 7 */
  {
    static const struct {
      const char *from, *to;
      int status;
    } cases[] = {
        {"rise poly345", "rise poly346", KL_ESYNTAX},
        {"base 30", "base 0", KL_ERADIUS},
        {"rise poly345 3.141592653589793 0.3 return poly345 "
         "3.141592653589793 0.3",
         "rise cycloidal 0.3 0.5 return cycloidal 5.983185307179586 0.5",
         KL_EUNDERCUT},
        {"limit 1", "limit 0.05", KL_EPRESSURE},
        {"points 360", "points 4", KL_EINVAL},
        {"return poly345 3.141592653589793", "return poly345 3", KL_ESYNTAX},
        {"shaft arm 60", "pivot arm 60", KL_ESELFJOINT}};
    size_t i;
    for (i = 0; i < sizeof cases / sizeof cases[0]; i++) {
      const char *at = strstr(cam_text, cases[i].from);
      size_t head = (size_t)(at - cam_text);
      snprintf(bad, sizeof bad, "%.*s%s%s", (int)head, cam_text, cases[i].to,
               at + strlen(cases[i].from));
      ck_assert_ptr_null(kl_model_read(bad, strlen(bad), &err));
      ck_assert_msg(err.status == cases[i].status && err.line == 7,
                    "case %d: status %d line %d: %s", (int)i, err.status,
                    err.line, err.message);
    }
  }
  kl_cam_free(c);
  kl_cam_free(back);
}
END_TEST

/* Every allocation of reading a cam statement may fail: KL_ENOMEM, no
 * leak (the fault-injecting allocator of support.c). */
START_TEST(cam_statement_survives_every_failed_allocation) {
  long n;
  for (n = 1;; n++) {
    counting_alloc c;
    kl_model *read;
    kl_io_error err;
    memset(&c, 0, sizeof c);
    memset(&err, 0, sizeof err);
    err.size = sizeof err;
    c.fail_at = n;
    read = kl_model_read_with_alloc(cam_text, sizeof cam_text - 1,
                                    counting_alloc_fn, &c, &err);
    if (read == NULL)
      ck_assert_int_eq(err.status, KL_ENOMEM);
    kl_model_free(read);
    ck_assert_int_eq(c.live, 0);
    if (read != NULL)
      break;
  }
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
  tcase_add_test(tc, cam_joint_state_is_the_program);
  tcase_add_test(tc, cam_state_through_a_drag_link_is_the_program);
  tcase_add_test(tc, add_cam_refuses_and_changes_nothing);
  tcase_add_test(tc, cam_statement_round_trip);
  tcase_add_test(tc, cam_joint_is_no_rod_pressure_site);
  tcase_add_test(tc, guide_error_measures_the_follower_guide);
  tcase_add_test(tc, cam_statement_survives_every_failed_allocation);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
