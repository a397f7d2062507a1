/*
 * test_reach.c - going to a position: the model's start inputs, a reset to
 * the state of a new solver, and continuation to target inputs, against
 * Freudenstein's equation, the slider-crank's and the five-bar's geometry,
 * and a motion limit located by elementary geometry.
 */
#include <check.h>
#include <math.h>
#include <string.h>

#include "suite.h"
#include "support.h"

#define DEG (PI / 180.0)

/* Agreement of a solved position with a closed form: the position is
 * converged to 1e-12 of the scale on well-conditioned linkages. */
#define CLOSED_FORM_TOL 1e-9

static kl_model *read_model(const char *text) {
  kl_io_error err;
  kl_model *m;
  err.size = sizeof err;
  m = kl_model_read(text, strlen(text), &err);
  ck_assert_msg(m != NULL, "model: %s", err.message);
  return m;
}

static kl_reach_result new_result(void) {
  kl_reach_result r;
  memset(&r, 0x5a, sizeof r);
  r.size = sizeof r;
  return r;
}

/* ---- the start position ---- */

START_TEST(start_inputs_follow_the_sweep_settings) {
  kl_model *m = read_model("kinloop-model 1\n"
                           "units length mm angle deg\n"
                           "link left\nlink right\nlink larm\nlink rarm\n"
                           "revolute m1 ground 0 0 left 0 0\n"
                           "revolute m2 ground 60 0 right 0 0\n"
                           "revolute p1 left 40 0 larm 0 0\n"
                           "revolute p2 right 40 0 rarm 0 0\n"
                           "revolute tip larm 90 0 rarm 90 0\n"
                           "input m1\ninput m2\n"
                           "sweep m2 from 20 to 60 steps 4\n");
  kl_model *open = kl_model_new();
  fourbar f = build_fourbar(40, 120, 80, 100);
  double u[2] = {7, 7};
  ck_assert_int_eq(kl_model_start_inputs(m, u), KL_OK);
  ck_assert_double_eq(u[0], 0.0);
  ck_assert_double_eq(u[1], 20 * DEG);
  /* without sweep settings every input starts at 0 */
  ck_assert_int_eq(kl_model_start_inputs(f.m, u), KL_OK);
  ck_assert_double_eq(u[0], 0.0);
  /* no inputs, before finalize: nothing to write, NULL allowed */
  ck_assert_int_eq(kl_model_start_inputs(open, NULL), KL_OK);
  ck_assert_int_eq(kl_model_start_inputs(m, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_model_start_inputs(NULL, u), KL_EINVAL);
  kl_model_free(m);
  kl_model_free(open);
  kl_model_free(f.m);
}
END_TEST

/* ---- reset ---- */

START_TEST(reset_gives_the_state_of_a_new_solver) {
  kl_model *m = read_model("kinloop-model 1\n"
                           "link crank\nlink coupler\nlink rocker\n"
                           "revolute motor ground 0 0 crank 0 0\n"
                           "revolute a crank 40 0 coupler 0 0\n"
                           "revolute b coupler 120 0 rocker 80 0\n"
                           "revolute c rocker 0 0 ground 100 0\n"
                           "point p coupler 60 30\n"
                           "input motor\n"
                           "sketch angle coupler 0.6\n"
                           "sketch angle rocker 1.1\n");
  kl_solver *s = kl_solver_new(m), *fresh = kl_solver_new(m);
  kl_solve_stats a, b;
  double u = 1.3, w = 2.0, al = 0.5;
  snapshot want, got;
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &al), KL_OK);
  ck_assert_int_eq(kl_solve_coefficients(s), KL_OK);
  kl_set_link_angle(s, 2, 2.5); /* a sketch of its own, forgotten too */
  ck_assert_int_eq(kl_solver_reset(s), KL_OK);
  want = snap(fresh);
  got = snap(s);
  assert_same_state(&want, &got, "reset");
  a.size = b.size = sizeof a;
  kl_solver_stats(s, &a);
  kl_solver_stats(fresh, &b);
  ck_assert_int_eq(memcmp(&a, &b, sizeof a), 0);
  /* and it goes on exactly as a new solver would */
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_position(fresh, &u), KL_OK);
  want = snap(fresh);
  got = snap(s);
  assert_same_state(&want, &got, "the first solve after a reset");
  ck_assert_int_eq(kl_solver_reset(NULL), KL_EINVAL);
  kl_solver_free(s);
  kl_solver_free(fresh);
  kl_model_free(m);
}
END_TEST

/* ---- reach ---- */

/* The Freudenstein branch (+1 or -1) the solver's four-bar is on. */
static int branch_of(const fourbar *f, const kl_solver *s) {
  double t2 = kl_input_value(s, 0), t3, t4;
  ck_assert(freudenstein(f, t2, +1, &t3, &t4));
  return fabs(angle_diff(kl_link_angle(s, f->rocker), t4)) < 1e-6 ? +1 : -1;
}

static void assert_on_branch(const fourbar *f, const kl_solver *s,
                             int branch) {
  double t2 = kl_input_value(s, 0), t3, t4;
  ck_assert(freudenstein(f, t2, branch, &t3, &t4));
  ck_assert_msg(fabs(angle_diff(kl_link_angle(s, f->coupler), t3)) <
                        CLOSED_FORM_TOL &&
                    fabs(angle_diff(kl_link_angle(s, f->rocker), t4)) <
                        CLOSED_FORM_TOL,
                "crank %.6g: coupler %.15g rocker %.15g, Freudenstein %.15g "
                "%.15g",
                t2, kl_link_angle(s, f->coupler), kl_link_angle(s, f->rocker),
                t3, t4);
}

START_TEST(reach_keeps_the_crank_rockers_branch) {
  /* a crank-rocker (geometry chosen for the test) keeps its circuit over
   * whole turns: continuation must land on the start's branch of
   * Freudenstein's equation at every target, the long way round too */
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  const double targets[] = {100, 250, -170, 725, 3};
  kl_reach_result r = new_result();
  double zero = 0.0;
  int branch, k;
  kl_set_link_angle(s, f.coupler, -0.6); /* the crossed-looking circuit */
  kl_set_link_angle(s, f.rocker, -1.1);
  ck_assert_int_eq(kl_solver_reach(s, &zero, &r), KL_OK);
  branch = branch_of(&f, s);
  assert_on_branch(&f, s, branch);
  for (k = 0; k < (int)(sizeof targets / sizeof targets[0]); k++) {
    double u = targets[k] * DEG;
    r = new_result();
    /* from the last position, and again from the model's start */
    ck_assert_int_eq(kl_solver_reach(s, &u, &r), KL_OK);
    ck_assert_double_eq(kl_input_value(s, 0), u);
    assert_on_branch(&f, s, branch);
    ck_assert_int_eq(r.status, KL_OK);
    ck_assert_int_eq(r.input, -1);
    ck_assert(isnan(r.from) && isnan(r.limit_input));
    ck_assert_int_ge(r.substeps, (int)ceil(fabs(targets[k] - (k ? targets[k - 1] : 0)) / 2));
    /* no rates are solved there */
    ck_assert(isnan(kl_link_rate(s, f.rocker)));
  }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/*
 * Non-Grashof four-bar (ground 100, crank 70, coupler 50, rocker 60: 50 +
 * 100 > 70 + 60). By elementary geometry its crank stops where coupler and
 * rocker line up, |A O4| = b + c: t2 = acos((a^2 + d^2 - (b + c)^2) /
 * (2 a d)). Reaching past it fails there and changes nothing.
 */
START_TEST(reach_stops_at_a_motion_limit) {
  fourbar f = build_fourbar(70, 50, 60, 100);
  kl_solver *s = kl_solver_new(f.m);
  const double lim = acos((f.a * f.a + f.d * f.d - (f.b + f.c) * (f.b + f.c)) /
                          (2 * f.a * f.d));
  kl_reach_result r = new_result();
  double u = 0.5, beyond = 2.0, w = 1.5, al = 0.0;
  snapshot before, after;
  kl_set_link_angle(s, f.coupler, -0.2);
  kl_set_link_angle(s, f.rocker, 1.5);
  ck_assert_int_eq(kl_solver_reach(s, &u, NULL), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_coefficients(s), KL_OK);
  before = snap(s);
  ck_assert_int_eq(kl_solver_reach(s, &beyond, &r), KL_ENOASSEMBLY);
  after = snap(s);
  assert_same_state(&before, &after, "a reach that stops");
  ck_assert_int_eq(r.status, KL_ENOASSEMBLY);
  ck_assert_int_eq(r.input, 0);
  ck_assert_double_eq(r.from, u);
  ck_assert_msg(fabs(r.limit_input - lim) <= 1e-9, "limit %.15g vs %.15g",
                r.limit_input, lim);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "input 1"));
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "motion limit"));
  /* the rates solved before are still there and still usable */
  ck_assert(!isnan(kl_link_rate(s, f.rocker)));
  ck_assert_int_eq(kl_solve_acceleration(s, &al), KL_OK);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* The same non-Grashof four-bar, its sweep settings starting where it
 * does not assemble (170 deg): a target it can reach is solved directly
 * from the sketch, one it cannot fails. */
static const char *const limited_start =
    "kinloop-model 1\n"
    "units length mm angle deg\n"
    "link crank\nlink coupler\nlink rocker\n"
    "revolute motor ground 0 0 crank 0 0\n"
    "revolute a crank 70 0 coupler 0 0\n"
    "revolute b coupler 50 0 rocker 60 0\n"
    "revolute c rocker 0 0 ground 100 0\n"
    "input motor\n"
    "sketch angle coupler -11\n"
    "sketch angle rocker 86\n"
    "sweep motor from 170 to 180 steps 1\n";

START_TEST(reach_without_a_start_solves_the_target) {
  kl_model *m = read_model(limited_start);
  kl_solver *s = kl_solver_new(m);
  fourbar f;
  kl_reach_result r = new_result();
  double start[1], u = 30 * DEG, far = 120 * DEG;
  snapshot before, after;
  memset(&f, 0, sizeof f);
  f.m = m, f.crank = 1, f.coupler = 2, f.rocker = 3;
  f.a = 70, f.b = 50, f.c = 60, f.d = 100;
  kl_model_start_inputs(m, start);
  ck_assert_int_eq(kl_solve_position(s, start), KL_ENOASSEMBLY);
  ck_assert_int_eq(kl_solver_reset(s), KL_OK);
  before = snap(s);
  ck_assert_int_eq(kl_solver_reach(s, &far, &r), KL_ENOASSEMBLY);
  ck_assert_int_eq(r.input, -1);
  after = snap(s);
  assert_same_state(&before, &after, "no position anywhere");
  ck_assert_int_eq(kl_solver_reach(s, &u, &r), KL_OK);
  ck_assert_int_eq(r.substeps, 0);
  /* on a branch of Freudenstein's equation: the sketch's, rocker up */
  assert_on_branch(&f, s, branch_of(&f, s));
  ck_assert_double_gt(kl_link_angle(s, f.rocker), 0.0);
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* Ground 100, crank 40, coupler 140, rocker 80 (geometry chosen for the
 * test): s + l = p + q, so at crank angle 0 all four pins line up, a change
 * point continuation cannot pass without choosing a branch. */
START_TEST(reach_refuses_to_cross_a_change_point) {
  fourbar f = build_fourbar(40, 140, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_reach_result r = new_result();
  double t3, t4, start = 10 * DEG, target = -10 * DEG;
  snapshot before, after;
  int st;
  ck_assert(freudenstein(&f, start, +1, &t3, &t4));
  kl_set_link_angle(s, f.coupler, t3);
  kl_set_link_angle(s, f.rocker, t4);
  ck_assert_int_eq(kl_solve_position(s, &start), KL_OK);
  before = snap(s);
  st = kl_solver_reach(s, &target, &r);
  ck_assert_msg(st == KL_ESINGULAR, "status %d", st);
  ck_assert_int_eq(r.status, st);
  ck_assert_int_eq(r.input, 0);
  ck_assert_double_eq(r.from, start);
  /* where: the sweep's location of a change point, to 1e-9 (kinloop.h) */
  ck_assert_double_le(fabs(r.limit_input), 1e-9);
  after = snap(s);
  assert_same_state(&before, &after, "a change point on the way");
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/*
 * A sliding input: the slider-crank driven at its block (crank 40, rod
 * 120, guide 10 above the crank's pivot; geometry chosen for the test).
 * Elementary geometry: with the block's pin at B = (x, e), the crank pin
 * A = r (cos t, sin t) lies on the circle |B - A| = l, so
 * t = atan2(e, x) +- acos((x^2 + e^2 + r^2 - l^2) / (2 r |B|)).
 */
START_TEST(reach_along_a_sliding_input) {
  kl_model *m = read_model("kinloop-model 1\n"
                           "link crank\nlink rod\nlink block\n"
                           "revolute pivot ground 0 0 crank 0 0\n"
                           "revolute a crank 40 0 rod 0 0\n"
                           "revolute b rod 120 0 block 0 0\n"
                           "prismatic guide ground 0 10 axis 0 block 0 0\n"
                           "input guide\n"
                           "sketch angle crank 1.2\n"
                           "sketch angle rod -0.4\n"
                           "sweep guide from 150 to 100 steps 5\n");
  kl_solver *s = kl_solver_new(m);
  const double r = 40, l = 120, e = 10, targets[] = {130, 95, 155};
  kl_reach_result res = new_result();
  int k;
  for (k = 0; k < 3; k++) {
    double x = targets[k], bx = hypot(x, e);
    double up = atan2(e, x) + acos((x * x + e * e + r * r - l * l) / (2 * r * bx));
    ck_assert_int_eq(kl_solver_reset(s), KL_OK);
    ck_assert_int_eq(kl_solver_reach(s, &x, &res), KL_OK);
    ck_assert_double_eq(kl_joint_slide(s, 3), x);
    /* the sketch put the crank above: the + root all the way */
    ck_assert_msg(fabs(angle_diff(kl_link_angle(s, 1), up)) < CLOSED_FORM_TOL,
                  "slide %g: crank %.15g, geometry %.15g", x,
                  kl_link_angle(s, 1), up);
  }
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/*
 * Two inputs: the five-bar (cranks 40 about (0, 0) and (60, 0), arms 90
 * each; geometry chosen for the test) reached input by input. Its tip is
 * where the circles of radius 90 about the two crank pins meet, on the
 * side above the line between the pins, which the sketch chose.
 */
START_TEST(reach_moves_each_input_in_turn) {
  fivebar f = build_fivebar(40, 40, 90, 90, 60);
  kl_solver *s = kl_solver_new(f.m);
  const double target[2] = {110 * DEG, 70 * DEG};
  double p1[2], p2[2], mid[2], dx, dy, dist, h, tip[2], want[2];
  kl_reach_result r = new_result();
  kl_set_link_angle(s, f.link1, 60 * DEG);
  kl_set_link_angle(s, f.link2, 120 * DEG);
  ck_assert_int_eq(kl_solver_reach(s, target, &r), KL_OK);
  ck_assert_double_eq(kl_input_value(s, 0), target[0]);
  ck_assert_double_eq(kl_input_value(s, 1), target[1]);
  p1[0] = f.a1 * cos(target[0]);
  p1[1] = f.a1 * sin(target[0]);
  p2[0] = f.d + f.a2 * cos(target[1]);
  p2[1] = f.a2 * sin(target[1]);
  dx = p2[0] - p1[0];
  dy = p2[1] - p1[1];
  dist = hypot(dx, dy);
  h = sqrt(f.b1 * f.b1 - dist * dist / 4); /* equal arms: the midpoint */
  mid[0] = p1[0] + dx / 2;
  mid[1] = p1[1] + dy / 2;
  want[0] = mid[0] - h * dy / dist;
  want[1] = mid[1] + h * dx / dist;
  ck_assert_int_eq(kl_point_position(s, f.tip, tip), KL_OK);
  ck_assert_msg(hypot(tip[0] - want[0], tip[1] - want[1]) < CLOSED_FORM_TOL * 100,
                "tip (%.15g, %.15g), circles (%.15g, %.15g)", tip[0], tip[1],
                want[0], want[1]);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

START_TEST(reach_refuses_bad_targets) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_reach_result r = new_result();
  double bad = NAN, u = 0.4;
  snapshot before, after;
  kl_set_link_angle(s, f.coupler, 0.6);
  kl_set_link_angle(s, f.rocker, 1.1);
  ck_assert_int_eq(kl_solver_reach(s, &u, NULL), KL_OK);
  before = snap(s);
  ck_assert_int_eq(kl_solver_reach(s, &bad, &r), KL_ENONFINITE);
  ck_assert_int_eq(r.status, KL_ENONFINITE);
  ck_assert_int_eq(kl_solver_reach(s, NULL, &r), KL_EINVAL);
  ck_assert_int_eq(kl_solver_reach(NULL, &u, &r), KL_EINVAL);
  after = snap(s);
  assert_same_state(&before, &after, "refused targets");
  /* a result struct of size 0 is left alone */
  r = new_result();
  r.size = 0;
  ck_assert_int_eq(kl_solver_reach(s, &u, &r), KL_OK);
  ck_assert_int_eq(r.status, 0x5a5a5a5a);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("reach");
  TCase *tc = tcase_create("reach");
  tcase_set_timeout(tc, 120);
  tcase_add_test(tc, start_inputs_follow_the_sweep_settings);
  tcase_add_test(tc, reset_gives_the_state_of_a_new_solver);
  tcase_add_test(tc, reach_keeps_the_crank_rockers_branch);
  tcase_add_test(tc, reach_stops_at_a_motion_limit);
  tcase_add_test(tc, reach_without_a_start_solves_the_target);
  tcase_add_test(tc, reach_refuses_to_cross_a_change_point);
  tcase_add_test(tc, reach_along_a_sliding_input);
  tcase_add_test(tc, reach_moves_each_input_in_turn);
  tcase_add_test(tc, reach_refuses_bad_targets);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
