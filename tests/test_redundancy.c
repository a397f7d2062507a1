/*
 * test_redundancy.c - models over-constrained by design: the declared
 * redundancy at finalize, positions and rates against closed forms (a
 * parallelogram with a third parallel crank, a four-bar with its coupler
 * doubled, both redundant for their special proportions only), the dropped
 * rows' check naming the loop, and every kernel on the kept system.
 */
#include <check.h>
#include <math.h>
#include <string.h>

#include "suite.h"
#include "support.h"

/* The parallelogram: cranks of 50 at ground pivots x = 0 and 100, the
 * coupler 100 long between their pins; the third crank (length `third`,
 * 50 for a true parallel) at x = 200, pinned to the coupler's far end.
 * Geometry chosen for the test. Input 0 drives crank 1. */
typedef struct {
  kl_model *m;
  int crank1, coupler, crank2, crank3;
} parallelogram;

static parallelogram build_parallelogram(double third, int redundancy) {
  parallelogram p;
  int pivot;
  p.m = kl_model_new();
  p.crank1 = kl_add_link(p.m, "crank 1");
  p.coupler = kl_add_link(p.m, "coupler");
  p.crank2 = kl_add_link(p.m, "crank 2");
  p.crank3 = kl_add_link(p.m, "crank 3");
  pivot = kl_add_revolute(p.m, KL_GROUND, 0, 0, p.crank1, 0, 0);
  kl_add_revolute(p.m, p.crank1, 50, 0, p.coupler, 0, 0);
  kl_add_revolute(p.m, p.coupler, 100, 0, p.crank2, 50, 0);
  kl_add_revolute(p.m, p.crank2, 0, 0, KL_GROUND, 100, 0);
  kl_add_revolute(p.m, p.coupler, 200, 0, p.crank3, third, 0);
  kl_add_revolute(p.m, p.crank3, 0, 0, KL_GROUND, 200, 0);
  kl_add_input(p.m, pivot);
  if (redundancy > 0)
    kl_model_set_redundancy(p.m, redundancy);
  return p;
}

static kl_solver *parallelogram_solver(const parallelogram *p, double u) {
  kl_solver *s = kl_solver_new(p->m);
  kl_set_link_angle(s, p->coupler, 0.01);
  kl_set_link_angle(s, p->crank2, u + 0.05);
  kl_set_link_angle(s, p->crank3, u - 0.05);
  return s;
}

/* Closed form of the parallelogram's open branch (common practice, no
 * source): every crank at the input angle, the coupler level, at unit crank
 * rate every crank turning at 1 and the coupler not at all. */
static void check_parallel(const kl_solver *s, const parallelogram *p,
                           double u) {
  ck_assert_msg(fabs(angle_diff(kl_link_angle(s, p->crank2), u)) < 1e-9 &&
                    fabs(angle_diff(kl_link_angle(s, p->crank3), u)) < 1e-9 &&
                    fabs(angle_diff(kl_link_angle(s, p->coupler), 0.0)) < 1e-9,
                "at %g: cranks %.12g %.12g, coupler %.3g", u,
                kl_link_angle(s, p->crank2), kl_link_angle(s, p->crank3),
                kl_link_angle(s, p->coupler));
}

static int check_parallel_step(const kl_solver *s, int step, double u,
                               void *user) {
  (void)step;
  check_parallel(s, user, u);
  ck_assert_msg(fabs(kl_link_rate(s, ((parallelogram *)user)->crank3) - 1.0) <
                    1e-8,
                "at %g the third crank turns at %g", u,
                kl_link_rate(s, ((parallelogram *)user)->crank3));
  return 0;
}

START_TEST(finalize_counts_the_declared_redundancy) {
  parallelogram p = build_parallelogram(50, 0);
  int joints, links;
  ck_assert_int_eq(kl_model_finalize(p.m), KL_EDOF);
  ck_assert_ptr_nonnull(strstr(kl_model_error(p.m), "0 degrees of freedom"));
  ck_assert_int_eq(kl_model_set_redundancy(p.m, 2), KL_OK);
  ck_assert_int_eq(kl_model_finalize(p.m), KL_EDOF);
  ck_assert_ptr_nonnull(strstr(kl_model_error(p.m), "plus 2 redundant"));
  ck_assert_int_eq(kl_model_set_redundancy(p.m, 1), KL_OK);
  ck_assert_int_eq(kl_model_finalize(p.m), KL_OK);
  ck_assert_int_eq(kl_model_dof(p.m), 1);
  ck_assert_int_eq(kl_model_redundancy(p.m), 1);
  /* 2 L loop rows, (links - 1) + slots - inputs unknowns (theory.md
   * section 3): r more rows than unknowns */
  joints = kl_model_joint_count(p.m);
  links = kl_model_link_count(p.m);
  ck_assert_int_eq(kl_model_loop_count(p.m), joints - links + 1);
  ck_assert_int_eq(2 * kl_model_loop_count(p.m) - ((links - 1) + 0 - 1), 1);
  kl_model_free(p.m);
}
END_TEST

/* Gruebler's count plus the redundancy still below zero. */
START_TEST(redundancy_does_not_hide_overconstraint) {
  kl_model *m = kl_model_new();
  int a = kl_add_link(m, "a"), b = kl_add_link(m, "b"), c = kl_add_link(m, "c");
  kl_add_revolute(m, KL_GROUND, 0, 0, a, 0, 0);
  kl_add_revolute(m, KL_GROUND, 10, 0, b, 0, 0);
  kl_add_revolute(m, KL_GROUND, 5, 9, c, 0, 0);
  kl_add_revolute(m, a, 10, 0, b, 5, 0);
  kl_add_revolute(m, b, 10, 0, c, 5, 0);
  kl_add_revolute(m, c, 10, 0, a, 5, 0);
  /* Gruebler: 3 x 3 - 2 x 6 = -3 */
  kl_model_set_redundancy(m, 1);
  ck_assert_int_eq(kl_model_finalize(m), KL_EOVERCONSTRAINED);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "even with the redundant"));
  kl_model_free(m);
}
END_TEST

START_TEST(parallelogram_with_a_third_crank) {
  parallelogram p = build_parallelogram(50, 1);
  kl_solver *s;
  double u, w = 1.0, a = 0.0;
  ck_assert_int_eq(kl_model_finalize(p.m), KL_OK);
  s = parallelogram_solver(&p, 0.3);
  for (u = 0.3; u < 2.9; u += 0.1) {
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    check_parallel(s, &p, u);
    ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(s, &a), KL_OK);
    ck_assert_double_eq_tol(kl_link_rate(s, p.crank2), 1.0, 1e-9);
    ck_assert_double_eq_tol(kl_link_rate(s, p.crank3), 1.0, 1e-9);
    ck_assert_double_eq_tol(kl_link_rate(s, p.coupler), 0.0, 1e-9);
    ck_assert_double_eq_tol(kl_link_accel(s, p.crank3), 0.0, 1e-8);
    ck_assert_double_eq_tol(kl_link_accel(s, p.coupler), 0.0, 1e-8);
  }
  kl_solver_free(s);
  kl_model_free(p.m);
}
END_TEST

/* A whole turn, through the parallelogram's two change points (where
 * every link lies on the ground line) on the branch with the same tangent:
 * the open one, which the third crank keeps anyway. */
START_TEST(parallelogram_sweeps_a_whole_turn) {
  parallelogram p = build_parallelogram(50, 1);
  kl_solver *s;
  kl_options o;
  kl_sweep_result r;
  double u = 0.3;
  ck_assert_int_eq(kl_model_finalize(p.m), KL_OK);
  s = parallelogram_solver(&p, u);
  kl_options_default(&o);
  o.pass_change_points = 1;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_OK);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  r.size = sizeof r;
  ck_assert_int_eq(kl_solver_sweep(s, 0, 0.3, 0.3 + 2 * PI, 360,
                                   check_parallel_step, &p, &r),
                   KL_OK);
  ck_assert_int_eq(r.steps_done, 361);
  ck_assert_int_eq(r.passages, 2);
  kl_solver_free(s);
  kl_model_free(p.m);
}
END_TEST

/* Proportions that are not the special ones: the third crank 51 long. The
 * kept rows solve, the dropped one does not close; the solve names the
 * loop and changes nothing. */
START_TEST(wrong_proportions_name_the_loop) {
  parallelogram p = build_parallelogram(51, 1);
  kl_solver *s;
  double u = 0.8;
  snapshot before, after;
  ck_assert_int_eq(kl_model_finalize(p.m), KL_OK);
  s = parallelogram_solver(&p, u);
  before = snap(s);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_ENOASSEMBLY);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "redundant constraints do "
                                                   "not close: loop 2"));
  after = snap(s);
  assert_same_state(&before, &after, "a failed redundant solve");
  kl_solver_free(s);
  kl_model_free(p.m);
}
END_TEST

/* The four-bar of support.c (ground 100, crank 40, coupler 120, rocker
 * 80) with a second coupler on the same pins: both couplers follow
 * Freudenstein's coupler angle over a whole crank turn, the twin passing
 * through every direction (a fixed kept row would be singular where it
 * stands level or upright). */
START_TEST(doubled_coupler) {
  kl_model *m = kl_model_new();
  fourbar f;
  int crank, coupler, twin, rocker, pivot, k;
  kl_solver *s;
  double t3, t4, w = 1.0;
  crank = kl_add_link(m, "crank");
  coupler = kl_add_link(m, "coupler");
  twin = kl_add_link(m, "coupler twin");
  rocker = kl_add_link(m, "rocker");
  pivot = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_revolute(m, crank, 40, 0, coupler, 0, 0);
  kl_add_revolute(m, coupler, 120, 0, rocker, 80, 0);
  kl_add_revolute(m, rocker, 0, 0, KL_GROUND, 100, 0);
  kl_add_revolute(m, crank, 40, 0, twin, 0, 0);
  kl_add_revolute(m, twin, 120, 0, rocker, 80, 0);
  kl_add_input(m, pivot);
  ck_assert_int_eq(kl_model_finalize(m), KL_EDOF);
  kl_model_set_redundancy(m, 1);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  memset(&f, 0, sizeof f);
  f.a = 40;
  f.b = 120;
  f.c = 80;
  f.d = 100;
  s = kl_solver_new(m);
  ck_assert(freudenstein(&f, 0.0, +1, &t3, &t4));
  kl_set_link_angle(s, coupler, t3 + 0.02);
  kl_set_link_angle(s, twin, t3 - 0.02);
  kl_set_link_angle(s, rocker, t4);
  for (k = 0; k <= 360; k++) {
    double u = k * PI / 180.0;
    ck_assert(freudenstein(&f, u, +1, &t3, &t4));
    ck_assert_msg(kl_solve_position(s, &u) == KL_OK, "at %g: %s", u,
                  kl_solver_error(s));
    ck_assert_double_eq_tol(angle_diff(kl_link_angle(s, coupler), t3), 0, 1e-9);
    ck_assert_double_eq_tol(angle_diff(kl_link_angle(s, twin), t3), 0, 1e-9);
    ck_assert_double_eq_tol(angle_diff(kl_link_angle(s, rocker), t4), 0, 1e-9);
    ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
    ck_assert_double_eq_tol(kl_link_rate(s, twin), kl_link_rate(s, coupler),
                            1e-9);
  }
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* A four-bar with both crank and rocker driven, declared one redundant
 * constraint: inputs that agree (Freudenstein's rocker angle) solve,
 * inputs that do not are refused. */
START_TEST(overprescribed_inputs) {
  fourbar f;
  kl_model *m = kl_model_new();
  int crank, coupler, rocker, pivot, rocker_pivot;
  kl_solver *s;
  double t3, t4, u[2];
  crank = kl_add_link(m, "crank");
  coupler = kl_add_link(m, "coupler");
  rocker = kl_add_link(m, "rocker");
  pivot = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_revolute(m, crank, 40, 0, coupler, 0, 0);
  kl_add_revolute(m, coupler, 120, 0, rocker, 80, 0);
  rocker_pivot = kl_add_revolute(m, KL_GROUND, 100, 0, rocker, 0, 0);
  kl_add_input(m, pivot);
  kl_add_input(m, rocker_pivot);
  kl_model_set_redundancy(m, 1);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  memset(&f, 0, sizeof f);
  f.a = 40;
  f.b = 120;
  f.c = 80;
  f.d = 100;
  ck_assert(freudenstein(&f, 0.7, +1, &t3, &t4));
  s = kl_solver_new(m);
  kl_set_link_angle(s, coupler, t3 + 0.05);
  u[0] = 0.7;
  u[1] = t4;
  ck_assert_int_eq(kl_solve_position(s, u), KL_OK);
  ck_assert_double_eq_tol(angle_diff(kl_link_angle(s, coupler), t3), 0, 1e-9);
  u[1] = t4 + 0.01;
  ck_assert_int_eq(kl_solve_position(s, u), KL_ENOASSEMBLY);
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* A chain of ten four-bar loops (build_chain's geometry) whose first
 * coupler is doubled: 21 unknowns on 22 rows, the kept system factored by
 * every kernel (the banded one on the kept pattern's single entries too),
 * all agreeing. */
START_TEST(every_kernel_on_the_kept_system) {
  static const int kernels[3] = {KL_KERNEL_SMALL, KL_KERNEL_DENSE,
                                 KL_KERNEL_BANDED};
  kl_model *m = kl_model_new();
  int crank, couplers[10], rockers[10], twin, pivot, driver, k, q;
  double angles[3][21];
  crank = kl_add_link(m, "crank");
  pivot = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_input(m, pivot);
  driver = crank;
  for (k = 0; k < 10; k++) {
    couplers[k] = kl_add_link(m, NULL);
    rockers[k] = kl_add_link(m, NULL);
    kl_add_revolute(m, driver, 40, 0, couplers[k], 0, 0);
    kl_add_revolute(m, couplers[k], 120, 0, rockers[k], 80, 0);
    kl_add_revolute(m, rockers[k], 0, 0, KL_GROUND, 100.0 * (k + 1), 0);
    driver = rockers[k];
  }
  twin = kl_add_link(m, "twin");
  kl_add_revolute(m, crank, 40, 0, twin, 0, 0);
  kl_add_revolute(m, twin, 120, 0, rockers[0], 80, 0);
  kl_model_set_redundancy(m, 1);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  for (q = 0; q < 3; q++) {
    kl_solver *s = kl_solver_new(m);
    kl_options o;
    kl_solve_stats st;
    fourbar f;
    double u = 0.0, t3, t4, x = 0.0, w = 1.0;
    memset(&f, 0, sizeof f);
    f.a = 40;
    f.b = 120;
    f.c = 80;
    f.d = 100;
    kl_options_default(&o);
    o.kernel = kernels[q];
    kl_solver_set_options(s, &o);
    for (k = 0; k < 10; k++) {
      freudenstein(&f, x, +1, &t3, &t4);
      kl_set_link_angle(s, couplers[k], t3 + 0.05);
      if (k == 0)
        kl_set_link_angle(s, twin, t3 - 0.05);
      kl_set_link_angle(s, rockers[k], t4 - 0.05);
      x = t4;
    }
    for (u = 0.0; u <= 1.0; u += 0.25)
      ck_assert_msg(kl_solve_position(s, &u) == KL_OK, "kernel %d at %g: %s",
                    kernels[q], u, kl_solver_error(s));
    st.size = sizeof st;
    kl_solver_stats(s, &st);
    ck_assert_int_eq(st.kernel, kernels[q]);
    ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
    for (k = 0; k < 10; k++) {
      angles[q][2 * k] = kl_link_angle(s, couplers[k]);
      angles[q][2 * k + 1] = kl_link_rate(s, rockers[k]);
    }
    angles[q][20] = kl_link_angle(s, twin);
    ck_assert_double_eq_tol(angles[q][20], angles[q][0], 1e-9);
    kl_solver_free(s);
  }
  for (q = 1; q < 3; q++)
    for (k = 0; k < 21; k++)
      ck_assert_double_eq_tol(angles[q][k], angles[0][k], 1e-11);
  kl_model_free(m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("redundancy");
  TCase *tc = tcase_create("redundancy");
  tcase_set_timeout(tc, 60);
  tcase_add_test(tc, finalize_counts_the_declared_redundancy);
  tcase_add_test(tc, redundancy_does_not_hide_overconstraint);
  tcase_add_test(tc, parallelogram_with_a_third_crank);
  tcase_add_test(tc, parallelogram_sweeps_a_whole_turn);
  tcase_add_test(tc, wrong_proportions_name_the_loop);
  tcase_add_test(tc, doubled_coupler);
  tcase_add_test(tc, overprescribed_inputs);
  tcase_add_test(tc, every_kernel_on_the_kept_system);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
