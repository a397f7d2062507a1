/*
 * test_alloc.c - memory through the allocator hook: every allocation of
 * building, finalizing and creating a solver is refused in turn; each time
 * the call fails cleanly, changes nothing, and every block is given back;
 * nothing allocates after kl_solver_new.
 */
#include <check.h>
#include <math.h>
#include <string.h>

#include "suite.h"
#include "support.h"

/* Builds a six-bar with a slider, a point and named links, step by step;
 * returns the first failing status, or KL_OK with the model finalized. */
static int build_steps(kl_model *m) {
  int st, crank, coupler, rocker, rod, block;
  int j0, loop[4];
  if ((st = crank = kl_add_link(m, "crank")) < 0 ||
      (st = coupler = kl_add_link(m, "coupler")) < 0 ||
      (st = rocker = kl_add_link(m, "rocker")) < 0 ||
      (st = rod = kl_add_link(m, "rod")) < 0 ||
      (st = block = kl_add_link(m, "block")) < 0)
    return st;
  if ((st = j0 = kl_add_revolute(m, 0, 0, 0, crank, 0, 0)) < 0 ||
      (st = loop[1] = kl_add_revolute(m, crank, 60, 0, coupler, 0, 0)) < 0 ||
      (st = loop[2] = kl_add_revolute(m, coupler, 200, 0, rocker, 150, 0)) < 0 ||
      (st = loop[3] = kl_add_revolute(m, rocker, 0, 0, 0, 220, 0)) < 0 ||
      (st = kl_add_revolute(m, rocker, 250, 0, rod, 0, 0)) < 0 ||
      (st = kl_add_revolute(m, rod, 180, 0, block, 0, 0)) < 0 ||
      (st = kl_add_prismatic(m, 0, 0, 260, 0.0, block, 0, 0)) < 0)
    return st;
  loop[0] = j0;
  if ((st = kl_add_point(m, coupler, 100, 40, "tucker")) < 0 ||
      (st = kl_add_input(m, j0)) < 0 || (st = kl_add_loop(m, 4, loop)) < 0)
    return st;
  return KL_OK;
}

START_TEST(every_allocation_failure_is_clean) {
  long n;
  int completed = 0;
  for (n = 1; !completed && n < 1000; n++) {
    counting_alloc c;
    kl_model *m;
    int st;
    memset(&c, 0, sizeof c);
    c.fail_at = n;
    m = counting_model(&c);
    if (m == NULL) {
      ck_assert_int_eq(c.live, 0);
      continue;
    }
    st = build_steps(m);
    if (st == KL_OK) {
      /* the second loop is found, not registered: register it too */
      static const int second[4] = {4, 5, 6, 3};
      st = kl_add_loop(m, 4, second);
      st = st < 0 ? st : kl_model_finalize(m);
    }
    if (st == KL_OK) {
      kl_solver *s = kl_solver_new(m);
      if (s != NULL) {
        double u = 0.3;
        kl_set_link_angle(s, 2, 0.5);
        kl_set_link_angle(s, 3, 1.8);
        kl_set_link_angle(s, 4, 0.3);
        ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
        completed = c.failed == 0;
        kl_solver_free(s);
      }
    } else {
      ck_assert_int_eq(st, KL_ENOMEM);
      ck_assert_ptr_nonnull(strstr(kl_model_error(m), "out of memory"));
    }
    ck_assert_int_le(c.failed, 1);
    kl_model_free(m);
    ck_assert_msg(c.live == 0, "run %ld leaks %ld blocks", n, c.live);
    ck_assert_uint_eq(c.live_bytes, 0);
  }
  ck_assert(completed);
}
END_TEST

/* A refused allocation leaves the model as it was: the same call succeeds
 * when memory is back, and finalize can be retried. */
START_TEST(failed_calls_change_nothing) {
  counting_alloc c;
  kl_model *m;
  long n;
  memset(&c, 0, sizeof c);
  m = counting_model(&c);
  ck_assert_int_eq(build_steps(m), KL_OK);
  {
    static const int second[4] = {4, 5, 6, 3};
    ck_assert_int_ge(kl_add_loop(m, 4, second), 0);
  }
  for (n = 1;; n++) {
    int st;
    c.fail_at = c.calls + n;
    st = kl_model_finalize(m);
    if (st == KL_OK)
      break;
    ck_assert_int_eq(st, KL_ENOMEM);
    ck_assert(!kl_model_is_finalized(m));
    ck_assert_int_eq(kl_model_link_count(m), 6);
  }
  ck_assert_int_eq(kl_model_loop_count(m), 2);
  /* a solver that cannot get its block is simply not made */
  c.fail_at = c.calls + 1;
  ck_assert_ptr_null(kl_solver_new(m));
  c.fail_at = 0;
  kl_model_free(m);
  ck_assert_int_eq(c.live, 0);
}
END_TEST

START_TEST(builders_keep_the_model_on_failure) {
  counting_alloc c;
  kl_model *m;
  int crank, i;
  memset(&c, 0, sizeof c);
  m = counting_model(&c);
  crank = kl_add_link(m, "crank");
  /* grow the joint array until a growth step is refused */
  for (i = 0; i < 40; i++) {
    int before = kl_model_joint_count(m), st;
    c.fail_at = c.calls + 1;
    st = kl_add_slot(m, 0, i, 0, 0.0, crank, 0, 0);
    if (st == KL_ENOMEM) {
      ck_assert_int_eq(kl_model_joint_count(m), before);
      c.fail_at = 0;
      ck_assert_int_eq(kl_add_slot(m, 0, i, 0, 0.0, crank, 0, 0), before);
      break;
    }
    /* a slot between the same links twice is a duplicate: use new links */
    c.fail_at = 0;
    crank = kl_add_link(m, NULL);
  }
  ck_assert_int_lt(i, 40);
  c.fail_at = c.calls + 1;
  ck_assert_int_eq(kl_add_point(m, crank, 0, 0, "named"), KL_ENOMEM);
  ck_assert_int_eq(kl_model_point_count(m), 0);
  c.fail_at = 0;
  kl_model_free(m);
  ck_assert_int_eq(c.live, 0);
}
END_TEST

/* After kl_solver_new nothing allocates: the force stage (its factors
 * kept and reused), its getters, the cycle figures, their refusals, and
 * a redundant model's position stage and refusal. */
START_TEST(forces_never_allocate) {
  counting_alloc c;
  kl_model *m, *r;
  kl_solver *s, *t;
  int crank, coupler, rocker, pivot, tool, third, k;
  long calls;
  double u = 0.4, w = 7.0, a = 2.0, e[1], f[2], g[3], rows[400];
  kl_load loads[2], bad;
  kl_cycle cycle;
  kl_cycle_summary sum;
  kl_cycle_peak inputs[1], joints[4];
  memset(&c, 0, sizeof c);
  m = counting_model(&c);
  crank = kl_add_link(m, "crank");
  coupler = kl_add_link(m, "coupler");
  rocker = kl_add_link(m, "rocker");
  pivot = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_revolute(m, crank, 40, 0, coupler, 0, 0);
  kl_add_revolute(m, coupler, 120, 0, rocker, 80, 0);
  kl_add_revolute(m, rocker, 0, 0, KL_GROUND, 100, 0);
  kl_add_input(m, pivot);
  tool = kl_add_point(m, coupler, 100, 30, "tool");
  ck_assert_int_eq(kl_set_link_mass(m, coupler, 1.1, 60, 12, 1600), KL_OK);
  ck_assert_int_eq(kl_set_link_mass(m, rocker, 0.8, 40, 3, 500), KL_OK);
  ck_assert_int_eq(kl_model_set_gravity(m, 0, -9810), KL_OK);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  /* a redundant model: the parallelogram with a third crank */
  r = counting_model(&c);
  kl_add_link(r, NULL);
  kl_add_link(r, NULL);
  kl_add_link(r, NULL);
  third = kl_add_link(r, NULL);
  kl_add_input(r, kl_add_revolute(r, KL_GROUND, 0, 0, 1, 0, 0));
  kl_add_revolute(r, 1, 50, 0, 2, 0, 0);
  kl_add_revolute(r, 2, 100, 0, 3, 50, 0);
  kl_add_revolute(r, 3, 0, 0, KL_GROUND, 100, 0);
  kl_add_revolute(r, 2, 200, 0, third, 50, 0);
  kl_add_revolute(r, third, 0, 0, KL_GROUND, 200, 0);
  kl_model_set_redundancy(r, 1);
  ck_assert_int_eq(kl_model_finalize(r), KL_OK);
  s = kl_solver_new(m);
  t = kl_solver_new(r);
  ck_assert_ptr_nonnull(s);
  ck_assert_ptr_nonnull(t);
  calls = c.calls;
  memset(loads, 0, sizeof loads);
  loads[0].kind = KL_LOAD_FORCE;
  loads[0].id = tool;
  loads[0].fx = 25000;
  loads[1].kind = KL_LOAD_TORQUE;
  loads[1].id = rocker;
  loads[1].torque = -3e5;
  bad = loads[0];
  bad.fy = NAN;
  kl_set_link_angle(s, coupler, 0.5);
  kl_set_link_angle(s, rocker, 1.8);
  ck_assert_int_eq(kl_solve_forces(s, 2, loads, e), KL_ESTAGE);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &a), KL_OK);
  for (k = 0; k < 3; k++)
    ck_assert_int_eq(kl_solve_forces(s, 2 - k, loads, e), KL_OK);
  ck_assert_int_eq(kl_solve_forces(s, 1, &bad, e), KL_ENONFINITE);
  ck_assert_int_eq(kl_joint_force(s, 1, f), KL_OK);
  ck_assert(isfinite(kl_joint_moment(s, 0)));
  ck_assert_int_eq(kl_ground_force(s, g), KL_OK);
  kl_cycle_default(&cycle);
  cycle.steps = 18;
  cycle.speed = 10;
  cycle.speed_fluctuation = 0.05;
  sum.size = sizeof sum;
  ck_assert_int_eq(kl_cycle_table(s, &cycle, 2, loads, rows, 400, NULL), KL_OK);
  ck_assert_int_eq(kl_cycle_summarize(s, &cycle, 2, loads, &sum, inputs,
                                      joints),
                   KL_OK);
  cycle.steps = 0;
  ck_assert_int_eq(kl_cycle_summarize(s, &cycle, 2, loads, &sum, inputs,
                                      joints),
                   KL_EINVAL);
  kl_set_link_angle(t, 2, 0.0);
  kl_set_link_angle(t, 3, 0.5);
  kl_set_link_angle(t, third, 0.5);
  ck_assert_int_eq(kl_solve_position(t, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(t, &w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(t, &a), KL_OK);
  ck_assert_int_eq(kl_solve_forces(t, 0, NULL, NULL), KL_EINDETERMINATE);
  ck_assert_msg(c.calls == calls, "%ld allocations after kl_solver_new",
                c.calls - calls);
  kl_solver_free(s);
  kl_solver_free(t);
  kl_model_free(m);
  kl_model_free(r);
  ck_assert_int_eq(c.live, 0);
}
END_TEST

START_TEST(allocator_hook_is_required) {
  counting_alloc c;
  memset(&c, 0, sizeof c);
  ck_assert_ptr_null(kl_model_new_with_alloc(NULL, NULL));
  c.fail_at = 1;
  ck_assert_ptr_null(counting_model(&c));
  ck_assert_int_eq(c.live, 0);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("alloc");
  TCase *tc = tcase_create("alloc");
  tcase_set_timeout(tc, 120);
  tcase_add_test(tc, every_allocation_failure_is_clean);
  tcase_add_test(tc, failed_calls_change_nothing);
  tcase_add_test(tc, builders_keep_the_model_on_failure);
  tcase_add_test(tc, allocator_hook_is_required);
  tcase_add_test(tc, forces_never_allocate);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
