/*
 * test_alloc.c - memory through the allocator hook: every allocation of
 * building, finalizing and creating a solver is refused in turn; each time
 * the call fails cleanly, changes nothing, and every block is given back;
 * a model freed before its solvers gives its blocks back with the last;
 * a study's every allocation goes through its model's hook, likewise;
 * and the calls made after kl_solver_new allocate nothing.
 */
#include <check.h>
#include <math.h>
#include <string.h>

#include "suite.h"
#include "support.h"

/* Builds a six-bar with a slider, a point, named links and recorded loads,
 * step by step;
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
  {
    kl_load loads[2];
    memset(loads, 0, sizeof loads);
    loads[0].kind = KL_LOAD_FORCE;
    loads[0].id = 0;
    loads[0].fy = -15.0;
    loads[1].kind = KL_LOAD_TORQUE;
    loads[1].id = rocker;
    loads[1].torque = 800.0;
    if ((st = kl_add_load(m, &loads[0])) < 0 ||
        (st = kl_add_load(m, &loads[1])) < 0)
      return st;
  }
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

/* An offset slider-crank and a tolerance study of it (geometry and numbers
 * chosen for this test): every kind of output, so that each allocation a
 * study makes is reached. */
static const char slider_text[] =
    "kinloop-model 1\n"
    "units length mm angle deg\n"
    "link crank\nlink rod\nlink block\n"
    "revolute motor ground 0 0 crank 0 0\n"
    "revolute pin crank 30 0 rod 0 0\n"
    "revolute wrist rod 100 0 block 0 0\n"
    "prismatic rail ground 0 12 axis 0 block 0 0\n"
    "point nose block 5 0\n"
    "input motor\n"
    "sketch angle rod -7\n"
    "sketch slide rail 120\n"
    "sweep motor from 0 to 360 steps 12\n";
static const char study_text[] = "kinloop-study 1\n"
                                 "model slider.kinloop\n"
                                 "seed 3\nsamples 3\n"
                                 "vary joint pin a x tolerance 0.1 normal\n"
                                 "vary point nose y tolerance 0.2 uniform\n"
                                 "output stroke swing slide rail\n"
                                 "output nose at 90 y nose\n"
                                 "output reach reach\n"
                                 "output hold effort\n"
                                 "load torque crank 5\n"
                                 "limit stroke 50 70\n";
#define STUDY_OUTPUTS 4
#define STUDY_SAMPLES 3

/* Reads, prepares, runs and summarizes the study with the counting hook
 * refusing allocation c->fail_at: KL_OK with the values, or the first
 * failure's status (every call's failure checked to be KL_ENOMEM and
 * clean). A refused allocation in preparing is retried with memory back,
 * which must then succeed: the failed call changed nothing. */
static int study_steps(counting_alloc *c, double *values) {
  kl_io_error err;
  kl_model *m;
  kl_study *st;
  int status[STUDY_SAMPLES], k, result;
  err.size = sizeof err;
  m = kl_model_read_with_alloc(slider_text, sizeof slider_text - 1,
                               counting_alloc_fn, c, &err);
  if (m == NULL) {
    ck_assert_int_eq(err.status, KL_ENOMEM);
    return KL_ENOMEM;
  }
  st = kl_study_read(study_text, sizeof study_text - 1, m, &err);
  kl_model_free(m); /* the study holds it */
  if (st == NULL) {
    ck_assert_int_eq(err.status, KL_ENOMEM);
    ck_assert_ptr_nonnull(strstr(err.message, "out of memory"));
    return KL_ENOMEM;
  }
  result = kl_study_prepare(st);
  if (result == KL_ENOMEM) {
    ck_assert_ptr_nonnull(strstr(kl_study_error(st), "out of memory"));
    c->fail_at = 0;
    ck_assert_int_eq(kl_study_prepare(st), KL_OK);
  } else {
    ck_assert_int_eq(result, KL_OK);
    result = kl_study_run(st, 0, STUDY_SAMPLES, 1, values, status, NULL);
    if (result == KL_OK)
      for (k = 0; k < STUDY_SAMPLES; k++)
        ck_assert_int_eq(status[k], KL_SAMPLE_OK);
    for (k = 0; k < STUDY_OUTPUTS && result == KL_OK; k++) {
      kl_study_summary summary;
      summary.size = sizeof summary;
      result = kl_study_summarize(st, k, values, status, STUDY_SAMPLES,
                                  &summary);
    }
    ck_assert(result == KL_OK || result == KL_ENOMEM);
  }
  kl_study_free(st);
  return result;
}

/* Every allocation of reading a study (against a model read with the hook),
 * preparing, running and summarizing it is refused in turn: each time the
 * call fails with KL_ENOMEM (a sample whose copy could not be made is no
 * sample "not assembled"), and every block is given back. */
START_TEST(every_study_allocation_failure_is_clean) {
  double reference[STUDY_SAMPLES * STUDY_OUTPUTS];
  counting_alloc c;
  long n;
  int completed = 0;
  memset(&c, 0, sizeof c);
  ck_assert_int_eq(study_steps(&c, reference), KL_OK);
  ck_assert_int_eq(c.live, 0);
  ck_assert_int_gt(c.calls, 30);
  for (n = 1; !completed && n < 10000; n++) {
    double values[STUDY_SAMPLES * STUDY_OUTPUTS];
    int result;
    memset(&c, 0, sizeof c);
    c.fail_at = n;
    result = study_steps(&c, values);
    ck_assert_int_le(c.failed, 1);
    ck_assert_msg(c.live == 0, "run %ld leaks %ld blocks", n, c.live);
    ck_assert_uint_eq(c.live_bytes, 0);
    if (result == KL_OK && c.failed == 0) {
      completed = 1;
      ck_assert_int_eq(memcmp(values, reference, sizeof values), 0);
    }
  }
  ck_assert(completed);
}
END_TEST

/* The rocker angle of a solver of four-bar f at crank angle u, against
 * Freudenstein's equation (either branch): 1 if it agrees to 1e-9 rad. */
static int solves_as_freudenstein(kl_solver *s, const fourbar *f, double u) {
  double t3, t4, branch_t4[2];
  int b;
  kl_set_link_angle(s, f->coupler, 0.5);
  kl_set_link_angle(s, f->rocker, 1.5);
  if (kl_solve_position(s, &u) != KL_OK)
    return 0;
  for (b = 0; b < 2; b++) {
    if (!freudenstein(f, u, b == 0 ? 1 : -1, &t3, &t4))
      return 0;
    branch_t4[b] = t4;
  }
  return fabs(angle_diff(kl_link_angle(s, f->rocker), branch_t4[0])) <= 1e-9 ||
         fabs(angle_diff(kl_link_angle(s, f->rocker), branch_t4[1])) <= 1e-9;
}

/* kl_model_free with solvers left lets go of the caller's handle alone:
 * every block of the model stays while a solver (on the heap or in the
 * caller's block) holds it, the solvers keep solving, and the last one to
 * go gives the model's blocks back. */
START_TEST(solvers_keep_a_freed_model) {
  static double block[4096];
  counting_alloc c;
  kl_solver *heap, *placed;
  fourbar f;
  long model_blocks;
  memset(&c, 0, sizeof c);
  f = build_fourbar_in(counting_model(&c), 40, 120, 80, 100);
  ck_assert(kl_model_is_finalized(f.m));
  model_blocks = c.live;
  ck_assert_uint_le(kl_solver_bytes(f.m), sizeof block);
  heap = kl_solver_new(f.m);
  placed = kl_solver_new_in(f.m, block, sizeof block);
  ck_assert(heap != NULL && placed != NULL);
  kl_model_free(f.m);
  ck_assert_int_eq(c.live, model_blocks + 1); /* the heap solver's block */
  ck_assert_ptr_eq(kl_solver_model(heap), f.m);
  ck_assert(solves_as_freudenstein(heap, &f, 0.5));
  kl_solver_free(heap);
  ck_assert_int_eq(c.live, model_blocks);
  ck_assert_int_eq(kl_model_loop_count(kl_solver_model(placed)), 1);
  ck_assert(solves_as_freudenstein(placed, &f, 2.0));
  kl_solver_free(placed);
  ck_assert_int_eq(c.live, 0);
  ck_assert_uint_eq(c.live_bytes, 0);
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

/* Source: the contract in kinloop.h, "no call on a solver allocates after
 * kl_solver_new"; the model's readers allocate nothing either. Each call
 * below runs its success and its failure paths (messages included). */
START_TEST(calls_after_solver_new_never_allocate) {
  counting_alloc c;
  kl_model *m;
  kl_solver *s;
  static const int second[4] = {4, 5, 6, 3};
  double u = 0.3, far = 1e100, bad = NAN, xy[2], local[2] = {10, 5};
  double start[1], *rows;
  kl_reach_result reach;
  kl_range range;
  kl_fourbar fb;
  kl_output sites[8];
  kl_transmission_skip skips[8];
  kl_load load;
  long calls, live;
  int size;
  memset(&c, 0, sizeof c);
  m = counting_model(&c);
  ck_assert_int_eq(build_steps(m), KL_OK);
  ck_assert_int_ge(kl_add_loop(m, 4, second), 0);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  ck_assert_ptr_nonnull(s);
  size = kl_model_row_size(m);
  /* the caller's rows, before counting starts: 13 steps */
  rows = counting_alloc_fn(&c, NULL, 0, (size_t)(13 * size) * sizeof *rows);
  calls = c.calls;
  live = c.live;
  kl_set_link_angle(s, 2, 0.5);
  kl_set_link_angle(s, 3, 1.8);
  kl_set_link_angle(s, 4, 0.3);
  reach.size = sizeof reach;
  ck_assert_int_eq(kl_solver_reach(s, &u, &reach), KL_OK);
  ck_assert_int_eq(kl_solver_reach(s, &bad, &reach), KL_ENONFINITE);
  ck_assert_int_lt(kl_solver_reach(s, &far, &reach), 0);
  ck_assert_int_eq(kl_solver_reset(s), KL_OK);
  kl_set_link_angle(s, 2, 0.5);
  kl_set_link_angle(s, 3, 1.8);
  kl_set_link_angle(s, 4, 0.3);
  ck_assert_int_eq(kl_solver_reach(s, &u, &reach), KL_OK);
  ck_assert_int_eq(kl_link_to_global(s, 2, local, xy), KL_OK);
  ck_assert_int_eq(kl_joint_position(s, 6, xy), KL_OK);
  ck_assert_int_eq(kl_joint_position(s, 60, xy), KL_EID);
  ck_assert_int_eq(kl_link_origin_velocity(s, 2, xy), KL_ESTAGE);
  ck_assert_int_eq(kl_solve_velocity(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &u), KL_OK);
  ck_assert_int_eq(kl_link_origin_velocity(s, 2, xy), KL_OK);
  ck_assert_int_eq(kl_link_origin_accel(s, 2, xy), KL_OK);
  ck_assert_int_eq(kl_solver_row(s, rows), KL_OK);
  ck_assert_int_eq(kl_solver_sweep_rows(s, 0, u, u + 1.2, 12, rows, NULL),
                   KL_OK);
  memset(&load, 0, sizeof load);
  load.kind = KL_LOAD_FORCE;
  load.fy = -10;
  range.size = sizeof range;
  ck_assert_int_eq(kl_input_effort_range(s, 0, u, u + 1.2, 12, 1, &load, 0,
                                         &range),
                   KL_OK);
  load.id = 9;
  ck_assert_int_eq(kl_input_effort_range(s, 0, u, u + 1.2, 12, 1, &load, 0,
                                         &range),
                   KL_EID);
  ck_assert_int_eq(kl_model_start_inputs(m, start), KL_OK);
  fb.size = sizeof fb;
  ck_assert_int_eq(kl_model_loop_fourbar(m, 0, &fb), KL_OK);
  ck_assert_int_eq(kl_model_loop_fourbar(m, 1, &fb), KL_EKIND);
  ck_assert_int_ge(kl_model_transmissions(m, sites, 8), 1);
  ck_assert_int_ge(kl_model_transmission_skips(m, skips, 8), 1);
  /* the jerks' blocks come last, the points' y jerks closing the row */
  ck_assert_int_eq(kl_model_row_offset(m, KL_QUANTITY_POINT_JY, NULL) +
                       kl_model_point_count(m),
                   size);
  ck_assert_ptr_nonnull(kl_quantity_str(KL_QUANTITY_RCOND));
  ck_assert_int_eq(c.calls, calls);
  ck_assert_int_eq(c.live, live);
  counting_alloc_fn(&c, rows, (size_t)(13 * size) * sizeof *rows, 0);
  kl_solver_free(s);
  kl_model_free(m);
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
  tcase_add_test(tc, solvers_keep_a_freed_model);
  tcase_add_test(tc, every_study_allocation_failure_is_clean);
  tcase_add_test(tc, allocator_hook_is_required);
  tcase_add_test(tc, calls_after_solver_new_never_allocate);
  tcase_add_test(tc, forces_never_allocate);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
