/*
 * test_laws.c - the published motion laws against their formulas: ends,
 * peaks, the derivatives by finite differences, which derivative jumps,
 * and bad arguments.
 */
#include <check.h>
#include <math.h>

#include "suite.h"
#include "support.h"

static const int laws[] = {KL_LAW_HARMONIC,  KL_LAW_CYCLOIDAL,
                           KL_LAW_POLY345,   KL_LAW_POLY4567,
                           KL_LAW_MOD_TRAPEZOID, KL_LAW_MOD_SINE};
#define NLAWS ((int)(sizeof laws / sizeof laws[0]))

static void at(int law, double x, double out[4]) {
  ck_assert_int_eq(kl_motion_law(law, x, out), KL_OK);
}

/* Every law rises from 0 to 1 with zero velocity at both ends (by
 * definition of a rise between dwells), and is symmetric about its middle:
 * s(x) + s(1 - x) = 1. */
START_TEST(every_law_rises_from_0_to_1) {
  int k, i;
  for (k = 0; k < NLAWS; k++) {
    double a[4], b[4];
    at(laws[k], 0.0, a);
    at(laws[k], 1.0, b);
    ck_assert_double_eq_tol(a[0], 0.0, 1e-15);
    ck_assert_double_eq_tol(b[0], 1.0, 1e-14);
    ck_assert_double_eq_tol(a[1], 0.0, 1e-14);
    ck_assert_double_eq_tol(b[1], 0.0, 1e-13);
    for (i = 0; i <= 20; i++) {
      double x = i / 20.0;
      at(laws[k], x, a);
      at(laws[k], 1.0 - x, b);
      ck_assert_msg(fabs(a[0] + b[0] - 1.0) <= 1e-14, "%s at %g",
                    kl_motion_law_str(laws[k]), x);
    }
  }
}
END_TEST

/* The peaks of velocity and acceleration the handbooks tabulate for each
 * law (from memory; each also follows from the formulas in kinloop.h):
 * simple harmonic pi/2 and pi^2/2; cycloidal 2 and 2 pi; 3-4-5 15/8 and
 * 10/sqrt(3); 4-5-6-7 35/16 and 7.5132 (at x = (1 - 1/sqrt 5)/2);
 * modified trapezoidal 2 and 8 pi/(pi + 2) = 4.888; modified sine
 * 4 pi/(pi + 4) = 1.760 and 4 pi^2/(pi + 4) = 5.528. */
START_TEST(peaks_are_the_tabulated_ones) {
  const double x4567 = 0.5 * (1.0 - 1.0 / sqrt(5.0));
  static double peak_v[NLAWS], peak_a[NLAWS];
  double out[4], expect_v[NLAWS], expect_a[NLAWS];
  int k, i;
  expect_v[0] = PI / 2, expect_a[0] = PI * PI / 2;
  expect_v[1] = 2.0, expect_a[1] = 2 * PI;
  expect_v[2] = 15.0 / 8, expect_a[2] = 10 / sqrt(3.0);
  at(KL_LAW_POLY4567, x4567, out);
  expect_v[3] = 35.0 / 16, expect_a[3] = out[2];
  ck_assert_double_eq_tol(expect_a[3], 7.5132, 1e-4);
  expect_v[4] = 2.0, expect_a[4] = 8 * PI / (PI + 2);
  expect_v[5] = 4 * PI / (PI + 4), expect_a[5] = 4 * PI * PI / (PI + 4);
  ck_assert_double_eq_tol(expect_a[4], 4.888, 1e-3);
  ck_assert_double_eq_tol(expect_a[5], 5.528, 1e-3);
  for (k = 0; k < NLAWS; k++) {
    peak_v[k] = peak_a[k] = 0.0;
    for (i = 0; i <= 200000; i++) {
      at(laws[k], i / 200000.0, out);
      peak_v[k] = fmax(peak_v[k], fabs(out[1]));
      peak_a[k] = fmax(peak_a[k], fabs(out[2]));
    }
    ck_assert_msg(fabs(peak_v[k] - expect_v[k]) <= 1e-8, "%s: peak velocity %.10g",
                  kl_motion_law_str(laws[k]), peak_v[k]);
    ck_assert_msg(fabs(peak_a[k] - expect_a[k]) <= 1e-6, "%s: peak acceleration %.10g",
                  kl_motion_law_str(laws[k]), peak_a[k]);
  }
}
END_TEST

/* Each derivative is the central difference of the one before (h = 1e-5:
 * error of order h^2 times the next derivative, below 1e-6 here), away
 * from the joints where a derivative jumps. */
START_TEST(derivatives_are_the_slopes) {
  const double h = 1e-5;
  int k, i, d;
  for (k = 0; k < NLAWS; k++)
    for (i = 1; i < 64; i++) {
      double x = (i + 0.37) / 64.5, lo[4], hi[4], mid[4];
      at(laws[k], x, mid);
      at(laws[k], x - h, lo);
      at(laws[k], x + h, hi);
      for (d = 0; d < 3; d++) {
        double slope = (hi[d] - lo[d]) / (2 * h);
        ck_assert_msg(fabs(slope - mid[d + 1]) <= 1e-5 * (1 + fabs(mid[d + 1])),
                      "%s at %g: derivative %d is %.10g, slope %.10g",
                      kl_motion_law_str(laws[k]), x, d + 1, mid[d + 1], slope);
      }
    }
}
END_TEST

/* Which derivative jumps (common practice, no source): the simple harmonic
 * law's acceleration at the ends (pi^2/2, not 0); the cycloidal, 3-4-5 and
 * modified laws' jerk at the ends; the 4-5-6-7 polynomial none. Inside,
 * every law's acceleration is continuous: at the modified laws' joints
 * (1/8, 3/8, 1/2, 5/8, 7/8) its values from both sides agree. */
START_TEST(which_derivative_jumps) {
  static const double joints[] = {0.125, 0.375, 0.5, 0.625, 0.875};
  double out[4], left[4], right[4];
  int k, i;
  at(KL_LAW_HARMONIC, 0.0, out);
  ck_assert_double_eq_tol(out[2], PI * PI / 2, 1e-14);
  at(KL_LAW_CYCLOIDAL, 0.0, out);
  ck_assert_double_eq_tol(out[2], 0.0, 1e-14);
  ck_assert_double_eq_tol(out[3], 4 * PI * PI, 1e-12);
  at(KL_LAW_POLY345, 0.0, out);
  ck_assert_double_eq_tol(out[3], 60.0, 1e-12);
  at(KL_LAW_POLY4567, 0.0, out);
  ck_assert_double_eq_tol(out[2], 0.0, 1e-14);
  ck_assert_double_eq_tol(out[3], 0.0, 1e-14);
  at(KL_LAW_POLY4567, 1.0, out);
  ck_assert_double_eq_tol(out[3], 0.0, 1e-10);
  for (k = 4; k < NLAWS; k++)
    for (i = 0; i < 5; i++) {
      at(laws[k], joints[i] - 1e-12, left);
      at(laws[k], joints[i] + 1e-12, right);
      ck_assert_msg(fabs(left[2] - right[2]) <= 1e-9 && fabs(left[1] - right[1]) <= 1e-9,
                    "%s: acceleration jumps at %g", kl_motion_law_str(laws[k]),
                    joints[i]);
    }
}
END_TEST

START_TEST(bad_arguments) {
  double out[4];
  ck_assert_int_eq(kl_motion_law(KL_LAW_CYCLOIDAL, 0.5, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_motion_law(KL_LAW_CYCLOIDAL, -1e-9, out), KL_EINVAL);
  ck_assert_int_eq(kl_motion_law(KL_LAW_CYCLOIDAL, 1.0 + 1e-9, out), KL_EINVAL);
  ck_assert_int_eq(kl_motion_law(KL_LAW_CYCLOIDAL, NAN, out), KL_ENONFINITE);
  ck_assert_int_eq(kl_motion_law(-1, 0.5, out), KL_EINVAL);
  ck_assert_int_eq(kl_motion_law(6, 0.5, out), KL_EINVAL);
  ck_assert_str_eq(kl_motion_law_str(KL_LAW_MOD_SINE), "modified sine");
  ck_assert_str_eq(kl_motion_law_str(6), "not a law");
}
END_TEST

int main(void) {
  Suite *suite = suite_create("laws");
  TCase *tc = tcase_create("laws");
  tcase_set_timeout(tc, 60);
  tcase_add_test(tc, every_law_rises_from_0_to_1);
  tcase_add_test(tc, peaks_are_the_tabulated_ones);
  tcase_add_test(tc, derivatives_are_the_slopes);
  tcase_add_test(tc, which_derivative_jumps);
  tcase_add_test(tc, bad_arguments);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
