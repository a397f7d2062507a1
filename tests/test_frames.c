/*
 * test_frames.c - the frames of links and joints: local points placed in
 * the global frame, joint positions, and the velocity and acceleration of
 * a link's frame origin, against the four-bar's and the slider-crank's
 * closed forms.
 */
#include <check.h>
#include <math.h>
#include <string.h>

#include "suite.h"
#include "support.h"

#define DEG (PI / 180.0)

/* Agreement with a closed form: positions converged to 1e-12 of the
 * scale, rates one linear solve further (as in test_rates.c). */
#define CLOSED_FORM_TOL 1e-9

static void assert_near(const double got[2], double x, double y,
                        double scale, const char *what, double at) {
  ck_assert_msg(fabs(got[0] - x) <= CLOSED_FORM_TOL * scale &&
                    fabs(got[1] - y) <= CLOSED_FORM_TOL * scale,
                "%s at crank %g deg: (%.15g, %.15g), closed form (%.15g, "
                "%.15g)",
                what, at / DEG, got[0], got[1], x, y);
}

/*
 * The four-bar of support.c: each link's x-axis runs from its first joint
 * to its second, so by Freudenstein's angles the coupler's frame sits at
 * the crank pin A = a (cos t2, sin t2), turned by t3, and the rocker pin is
 * B = A + b (cos t3, sin t3). The crank pin moves on a circle: velocity
 * a w (-sin t2, cos t2), acceleration a (-w^2 cos t2 - al sin t2,
 * -w^2 sin t2 + al cos t2).
 */
START_TEST(fourbar_frames_match_freudenstein) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  const double w = 1.7, al = -0.6; /* chosen for the test */
  int k;
  for (k = 0; k < 12; k++) {
    double t2 = (30 * k + 5) * DEG, t3, t4, xy[2], local[2], ax, ay;
    ck_assert(freudenstein(&f, t2, +1, &t3, &t4));
    kl_set_link_angle(s, f.coupler, t3 + 0.02);
    kl_set_link_angle(s, f.rocker, t4 - 0.02);
    ck_assert_int_eq(kl_solve_position(s, &t2), KL_OK);
    ax = f.a * cos(t2);
    ay = f.a * sin(t2);
    /* a local point of the coupler: (b/2, b/4), the builder's coupler
     * point, so kl_point_position must agree as well */
    local[0] = f.b / 2;
    local[1] = f.b / 4;
    ck_assert_int_eq(kl_link_to_global(s, f.coupler, local, xy), KL_OK);
    assert_near(xy, ax + cos(t3) * local[0] - sin(t3) * local[1],
                ay + sin(t3) * local[0] + cos(t3) * local[1], f.d,
                "coupler point", t2);
    {
      double p[2];
      ck_assert_int_eq(kl_point_position(s, f.coupler_point, p), KL_OK);
      assert_near(xy, p[0], p[1], f.d, "the coupler point's getter", t2);
    }
    /* in place: local and xy the same array */
    ck_assert_int_eq(kl_link_to_global(s, f.coupler, local, local), KL_OK);
    ck_assert_int_eq(memcmp(local, xy, sizeof xy), 0);
    ck_assert_int_eq(kl_joint_position(s, f.rocker_pin, xy), KL_OK);
    assert_near(xy, ax + f.b * cos(t3), ay + f.b * sin(t3), f.d, "rocker pin",
                t2);
    assert_near(xy, f.d + f.c * cos(t4), f.c * sin(t4), f.d,
                "rocker pin from O4", t2);
    ck_assert_int_eq(kl_joint_position(s, f.crank_pin, xy), KL_OK);
    assert_near(xy, ax, ay, f.d, "crank pin", t2);
    ck_assert_int_eq(kl_joint_position(s, f.rocker_pivot, xy), KL_OK);
    assert_near(xy, f.d, 0, f.d, "ground pivot", t2);
    /* the coupler's origin is the crank pin */
    ck_assert_int_eq(kl_link_origin_velocity(s, f.coupler, xy), KL_ESTAGE);
    ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
    ck_assert_int_eq(kl_link_origin_accel(s, f.coupler, xy), KL_ESTAGE);
    ck_assert_int_eq(kl_solve_acceleration(s, &al), KL_OK);
    ck_assert_int_eq(kl_link_origin_velocity(s, f.coupler, xy), KL_OK);
    assert_near(xy, -f.a * w * sin(t2), f.a * w * cos(t2), f.d * w,
                "coupler origin velocity", t2);
    ck_assert_int_eq(kl_link_origin_accel(s, f.coupler, xy), KL_OK);
    assert_near(xy, f.a * (-w * w * cos(t2) - al * sin(t2)),
                f.a * (-w * w * sin(t2) + al * cos(t2)), f.d * w * w,
                "coupler origin acceleration", t2);
    /* the rocker's origin is its ground pivot: at rest */
    ck_assert_int_eq(kl_link_origin_velocity(s, f.rocker, xy), KL_OK);
    assert_near(xy, 0, 0, f.d * w, "rocker origin velocity", t2);
    ck_assert_int_eq(kl_link_origin_accel(s, f.rocker, xy), KL_OK);
    assert_near(xy, 0, 0, f.d * w * w, "rocker origin acceleration", t2);
  }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/*
 * The slider-crank of support.c (crank r, rod l, the block's pin at its
 * frame origin on the line y = e): the block's origin is at (x, e) with
 * x = r cos t + l cos phi, r sin t + l sin phi = e, and moves along the
 * line at dx/dt w = -r w sin(t - phi) / cos(phi) (the statics result of
 * test_metrics.c, by the same differentiation).
 */
START_TEST(slider_block_frame_matches_the_closed_form) {
  slider_crank sc = build_slider_crank(30, 100, 12);
  kl_solver *s = kl_solver_new(sc.m);
  const double w = 2.0, zero = 0.0;
  int k;
  kl_set_link_angle(s, sc.rod, -0.1);
  kl_set_joint_slide(s, sc.slide_joint, 120.0);
  for (k = 0; k < 12; k++) {
    double t = (30 * k + 10) * DEG, xy[2], phi, x;
    ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
    phi = asin((sc.e - sc.r * sin(t)) / sc.l);
    x = sc.r * cos(t) + sc.l * cos(phi);
    ck_assert_int_eq(kl_joint_position(s, sc.slide_joint, xy), KL_OK);
    assert_near(xy, x, sc.e, sc.l, "block on its guide", t);
    ck_assert_int_eq(kl_link_origin(s, sc.block, xy), KL_OK);
    assert_near(xy, x, sc.e, sc.l, "block origin", t);
    ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
    ck_assert_int_eq(kl_link_origin_velocity(s, sc.block, xy), KL_OK);
    assert_near(xy, -sc.r * w * sin(t - phi) / cos(phi), 0, sc.l * w,
                "block velocity", t);
    ck_assert_int_eq(kl_solve_acceleration(s, &zero), KL_OK);
    ck_assert_int_eq(kl_link_origin_accel(s, sc.block, xy), KL_OK);
    ck_assert_double_le(fabs(xy[1]), CLOSED_FORM_TOL * sc.l * w * w);
  }
  kl_solver_free(s);
  kl_model_free(sc.m);
}
END_TEST

START_TEST(frames_refuse_bad_ids) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  double xy[2] = {7, 7}, local[2] = {1, 2};
  ck_assert_int_eq(kl_link_to_global(s, 4, local, xy), KL_EID);
  ck_assert_int_eq(kl_link_to_global(s, -1, local, xy), KL_EID);
  ck_assert_int_eq(kl_link_to_global(s, 1, NULL, xy), KL_EINVAL);
  ck_assert_int_eq(kl_link_to_global(s, 1, local, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_link_to_global(NULL, 1, local, xy), KL_EINVAL);
  ck_assert_int_eq(kl_joint_position(s, 4, xy), KL_EID);
  ck_assert_int_eq(kl_joint_position(s, 0, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_link_origin_velocity(s, 4, xy), KL_EID);
  ck_assert_int_eq(kl_link_origin_velocity(NULL, 1, xy), KL_EINVAL);
  ck_assert_int_eq(kl_link_origin_accel(s, -1, xy), KL_EID);
  ck_assert_int_eq(kl_link_origin_accel(s, 1, NULL), KL_EINVAL);
  ck_assert_double_eq(xy[0], 7);
  /* ground's frame is the global one */
  ck_assert_int_eq(kl_link_to_global(s, KL_GROUND, local, xy), KL_OK);
  ck_assert_double_eq(xy[0], 1);
  ck_assert_double_eq(xy[1], 2);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("frames");
  TCase *tc = tcase_create("frames");
  tcase_add_test(tc, fourbar_frames_match_freudenstein);
  tcase_add_test(tc, slider_block_frame_matches_the_closed_form);
  tcase_add_test(tc, frames_refuse_bad_ids);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
