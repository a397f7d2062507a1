/*
 * test_position.c - the position stage against closed forms: Freudenstein's
 * equation, the slider-crank, the inverted slider-crank and the five-bar;
 * branch keeping, statuses, options and transactional failure.
 */
#include <check.h>
#include <math.h>
#include <stddef.h>
#include <string.h>

#include "suite.h"
#include "support.h"


static void check_fourbar_turn(fourbar *f, int branch) {
  kl_solver *s = kl_solver_new(f->m);
  double t3, t4, u = 0.0;
  int k;
  ck_assert_ptr_nonnull(s);
  ck_assert(freudenstein(f, u, branch, &t3, &t4));
  /* a rough sketch near the branch chooses it */
  kl_set_link_angle(s, f->coupler, t3 + 0.15);
  kl_set_link_angle(s, f->rocker, t4 - 0.15);
  for (k = 0; k <= 360; k++) {
    u = k * PI / 180.0;
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    ck_assert(freudenstein(f, u, branch, &t3, &t4));
    ck_assert_double_le(fabs(angle_diff(kl_link_angle(s, f->coupler), t3)), 1e-10);
    ck_assert_double_le(fabs(angle_diff(kl_link_angle(s, f->rocker), t4)), 1e-10);
    ck_assert_double_eq(kl_link_angle(s, f->crank), u);
  }
  kl_solver_free(s);
}

/* Crank-rocker (Grashof: 40 + 120 <= 80 + 100): both branches, a full turn
 * each, each step starting from the previous one. */
START_TEST(fourbar_matches_freudenstein_both_branches) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  check_fourbar_turn(&f, +1);
  check_fourbar_turn(&f, -1);
  kl_model_free(f.m);
}
END_TEST

/* Explicit and automatic loops are the same equations: same answers. */
START_TEST(explicit_and_found_loops_agree) {
  fourbar fa = build_fourbar(40, 120, 80, 100);
  fourbar fe = build_fourbar_explicit(40, 120, 80, 100);
  kl_solver *sa = kl_solver_new(fa.m), *se = kl_solver_new(fe.m);
  int k, loop[8];
  ck_assert_int_eq(kl_model_loop_count(fe.m), 1);
  ck_assert_int_eq(kl_model_loop(fe.m, 0, loop, 8), 4);
  kl_set_link_angle(sa, fa.coupler, 0.5);
  kl_set_link_angle(sa, fa.rocker, 1.5);
  kl_set_link_angle(se, fe.coupler, 0.5);
  kl_set_link_angle(se, fe.rocker, 1.5);
  for (k = 0; k < 36; k++) {
    double u = k * 10 * PI / 180;
    ck_assert_int_eq(kl_solve_position(sa, &u), KL_OK);
    ck_assert_int_eq(kl_solve_position(se, &u), KL_OK);
    ck_assert_double_le(fabs(angle_diff(kl_link_angle(sa, fa.rocker),
                                        kl_link_angle(se, fe.rocker))), 1e-11);
    ck_assert_double_le(fabs(angle_diff(kl_link_angle(sa, fa.coupler),
                                        kl_link_angle(se, fe.coupler))), 1e-11);
  }
  kl_solver_free(sa);
  kl_solver_free(se);
  kl_model_free(fa.m);
  kl_model_free(fe.m);
}
END_TEST

/*
 * Offset slider-crank closed form (standard kinematics; the slider lies on
 * y = e): x = r cos t + branch sqrt(l^2 - (e - r sin t)^2), rod angle
 * atan2(e - r sin t, x - r cos t).
 */
START_TEST(slider_crank_matches_closed_form) {
  slider_crank sc = build_slider_crank(30, 100, 12);
  int branch;
  for (branch = 1; branch >= -1; branch -= 2) {
    kl_solver *s = kl_solver_new(sc.m);
    int k;
    kl_set_link_angle(s, sc.rod, branch > 0 ? -0.1 : PI + 0.1);
    kl_set_joint_slide(s, sc.slide_joint, branch * 120.0);
    for (k = 0; k <= 72; k++) {
      double t = k * 5 * PI / 180, h = sc.e - sc.r * sin(t);
      double x = sc.r * cos(t) + branch * sqrt(sc.l * sc.l - h * h);
      double phi = atan2(h, x - sc.r * cos(t));
      double pin[2];
      ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
      ck_assert_double_le(fabs(kl_joint_slide(s, sc.slide_joint) - x), 1e-10 * sc.l);
      ck_assert_double_le(fabs(angle_diff(kl_link_angle(s, sc.rod), phi)), 1e-10);
      ck_assert_double_le(fabs(angle_diff(kl_link_angle(s, sc.block), 0.0)), 1e-15);
      ck_assert_int_eq(kl_link_origin(s, sc.block, pin), KL_OK);
      ck_assert_double_le(fabs(pin[0] - x), 1e-10 * sc.l);
      ck_assert_double_le(fabs(pin[1] - sc.e), 1e-10 * sc.l);
    }
    kl_solver_free(s);
  }
  kl_model_free(sc.m);
}
END_TEST

/*
 * Inverted slider-crank closed form: the guide through O4 = (d, 0) points
 * at the crank pin, so its angle is atan2(r sin t, r cos t - d) and the
 * slide is the distance sqrt(r^2 + d^2 - 2 r d cos t) (law of cosines); the
 * other branch turns the guide by pi and negates the slide.
 */
START_TEST(inverted_slider_crank_matches_closed_form) {
  inverted_slider_crank is = build_inverted_slider_crank(35, 90);
  int branch;
  for (branch = 1; branch >= -1; branch -= 2) {
    kl_solver *s = kl_solver_new(is.m);
    int k;
    kl_set_link_angle(s, is.guide, branch > 0 ? PI - 0.2 : -0.2);
    kl_set_joint_slide(s, is.slide_joint, branch * 50.0);
    for (k = 0; k <= 72; k++) {
      double t = k * 5 * PI / 180;
      double ang = atan2(is.r * sin(t), is.r * cos(t) - is.d);
      double dist = sqrt(is.r * is.r + is.d * is.d - 2 * is.r * is.d * cos(t));
      if (branch < 0)
        ang += PI;
      ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
      ck_assert_double_le(fabs(angle_diff(kl_link_angle(s, is.guide), ang)), 1e-10);
      ck_assert_double_le(fabs(kl_joint_slide(s, is.slide_joint) - branch * dist),
                          1e-10 * is.d);
      /* the block keeps the guide's angle (prismatic lock) */
      ck_assert_double_eq(kl_link_angle(s, is.block), kl_link_angle(s, is.guide));
    }
    kl_solver_free(s);
  }
  kl_model_free(is.m);
}
END_TEST

/*
 * Two-input five-bar against circle intersection: the tip lies at distance
 * b1 from crank tip A1 and b2 from crank tip A2; with D = |A2 - A1|,
 * along = (b1^2 - b2^2 + D^2) / (2 D) and h = sqrt(b1^2 - along^2), the tip
 * is A1 + along e + branch h e_perp (elementary geometry).
 */
START_TEST(fivebar_matches_circle_intersection) {
  /* crank tips stay 20 to 140 apart, inside (|b1 - b2|, b1 + b2) = (10, 150):
   * every input pair assembles, far from the arms' toggles */
  fivebar f = build_fivebar(35, 25, 70, 80, 80);
  kl_solver *s = kl_solver_new(f.m);
  int i, j;
  kl_set_link_angle(s, f.link1, 1.0);
  kl_set_link_angle(s, f.link2, 2.0);
  for (i = 0; i <= 24; i++)
    for (j = 0; j <= 24; j++) {
      double u[2], a1[2], a2[2], e[2], dd, along, h, tip[2], got[2];
      u[0] = i * PI / 12;
      u[1] = (i % 2 ? 24 - j : j) * PI / 12; /* snake: small steps */
      a1[0] = f.a1 * cos(u[0]);
      a1[1] = f.a1 * sin(u[0]);
      a2[0] = f.d + f.a2 * cos(u[1]);
      a2[1] = f.a2 * sin(u[1]);
      dd = hypot(a2[0] - a1[0], a2[1] - a1[1]);
      e[0] = (a2[0] - a1[0]) / dd;
      e[1] = (a2[1] - a1[1]) / dd;
      along = (f.b1 * f.b1 - f.b2 * f.b2 + dd * dd) / (2 * dd);
      h = sqrt(f.b1 * f.b1 - along * along);
      /* the upper branch: e_perp = (-e_y, e_x) */
      tip[0] = a1[0] + along * e[0] - h * e[1];
      tip[1] = a1[1] + along * e[1] + h * e[0];
      ck_assert_int_eq(kl_solve_position(s, u), KL_OK);
      ck_assert_int_eq(kl_point_position(s, f.tip, got), KL_OK);
      ck_assert_double_le(fabs(got[0] - tip[0]), 1e-10 * f.b1);
      ck_assert_double_le(fabs(got[1] - tip[1]), 1e-10 * f.b1);
    }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* The driven coordinate is set exactly: no 6-radian Newton step from a
 * sketch at -2.5 to an input of 3.7, and whole turns in the sketch of an
 * unknown angle do not matter. */
START_TEST(inputs_are_exact_and_whole_turns_do_not_matter) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_solve_stats st;
  double u = 3.7, t3, t4;
  int turns;
  st.size = sizeof st;
  kl_set_link_angle(s, f.crank, -2.5);
  ck_assert(freudenstein(&f, u, +1, &t3, &t4));
  for (turns = -3; turns <= 3; turns++) {
    kl_set_link_angle(s, f.coupler, t3 + 0.1 + 2 * PI * turns);
    kl_set_link_angle(s, f.rocker, t4 - 0.1 - 2 * PI * turns);
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    ck_assert_double_eq(kl_link_angle(s, f.crank), 3.7);
    ck_assert_double_le(fabs(angle_diff(kl_link_angle(s, f.rocker), t4)), 1e-10);
    kl_solver_stats(s, &st);
    ck_assert_int_le(st.iterations, 6);
  }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* Statistics of a solve: converged residual within tolerance, a sane
 * condition estimate, counts that add up. */
START_TEST(stats_describe_the_solve) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_solve_stats st;
  double u = 1.0;
  memset(&st, 0, sizeof st);
  st.size = sizeof st;
  kl_set_link_angle(s, f.coupler, 0.3);
  kl_set_link_angle(s, f.rocker, 1.6);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solver_stats(s, &st), KL_OK);
  ck_assert_int_eq(st.status, KL_OK);
  ck_assert_int_ge(st.iterations, 1);
  ck_assert_int_ge(st.factorizations, st.iterations);
  ck_assert_int_ge(st.residual_evaluations, st.iterations + 1);
  ck_assert_double_le(st.residual, 1e-12 * kl_model_scale(f.m));
  ck_assert_double_gt(st.rcond, 1e-3);
  ck_assert_double_le(st.rcond, 1.0);
  /* a short struct is filled only as far as it reaches */
  st.size = offsetof(kl_solve_stats, iterations);
  st.iterations = -7;
  ck_assert_int_eq(kl_solver_stats(s, &st), KL_OK);
  ck_assert_int_eq(st.iterations, -7);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* Non-Grashof four-bar (50 + 100 > 70 + 60): the crank reaches only
 * |t| <= acos((a^2 + d^2 - (b + c)^2) / (2 a d)) (law of cosines). */
static fourbar non_grashof(void) { return build_fourbar(70, 50, 60, 100); }

static double non_grashof_limit(const fourbar *f) {
  return acos((f->a * f->a + f->d * f->d - (f->b + f->c) * (f->b + f->c)) /
              (2 * f->a * f->d));
}


START_TEST(beyond_a_limit_is_no_assembly_and_state_is_kept) {
  fourbar f = non_grashof();
  kl_solver *s = kl_solver_new(f.m);
  double lim = non_grashof_limit(&f), u = 1.0, rate = 1.0;
  double beyond[] = {lim + 1e-6, lim + 0.01, 1.6, 2.5, PI, -2.0};
  unsigned k;
  kl_set_link_angle(s, f.coupler, -0.2);
  kl_set_link_angle(s, f.rocker, 1.5);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &rate), KL_OK);
  for (k = 0; k < sizeof beyond / sizeof beyond[0]; k++) {
    snapshot before = snap(s), after;
    ck_assert_int_eq(kl_solve_position(s, &beyond[k]), KL_ENOASSEMBLY);
    ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "cannot close"));
    after = snap(s);
    assert_same_state(&before, &after, "a failed solve");
    /* the rates of the failed inputs are not handed out */
    ck_assert_int_eq(kl_solve_velocity(s, &rate), KL_ESTAGE);
  }
  /* and the solver goes on from its last good state */
  u = 1.2;
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* At the non-Grashof limit itself the Jacobian is singular (coupler and
 * rocker in line); a parallelogram at its change point likewise. */
START_TEST(toggle_and_change_point_are_singular) {
  fourbar f = non_grashof();
  fourbar p = build_fourbar(40, 100, 40, 100); /* parallelogram */
  kl_solver *s = kl_solver_new(f.m), *sp = kl_solver_new(p.m);
  double lim = non_grashof_limit(&f), u = lim - 0.05, rate = 1.0;
  snapshot before, after;
  kl_set_link_angle(s, f.coupler, -0.6);
  kl_set_link_angle(s, f.rocker, 1.5);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  before = snap(s);
  ck_assert_int_eq(kl_solve_position(s, &lim), KL_ESINGULAR);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "singular"));
  after = snap(s);
  assert_same_state(&before, &after, "a failed solve");
  ck_assert_int_eq(kl_solve_velocity(s, &rate), KL_ESINGULAR);
  ck_assert_int_eq(kl_solve_coefficients(s), KL_ESINGULAR);

  /* parallelogram: all four links in line at crank angle 0 */
  kl_set_link_angle(sp, p.coupler, 0.02);
  kl_set_link_angle(sp, p.rocker, 0.03);
  u = 0.0;
  ck_assert_int_eq(kl_solve_position(sp, &u), KL_ESINGULAR);
  kl_solver_free(s);
  kl_solver_free(sp);
  kl_model_free(f.m);
  kl_model_free(p.m);
}
END_TEST

START_TEST(iteration_limit_is_its_own_status) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_options o;
  double u = 2.0;
  kl_options_default(&o);
  o.max_iterations = 1;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_OK);
  kl_set_link_angle(s, f.coupler, 1.5);
  kl_set_link_angle(s, f.rocker, 2.8);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_EMAXITER);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "within 1 iterations"));
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

START_TEST(options_are_checked) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_options o, back;
  kl_options_default(&o);
  ck_assert_double_eq(o.tolerance, 1e-12);
  ck_assert_int_eq(o.max_iterations, 50);
  o.tolerance = 1e-10;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_OK);
  back.size = sizeof back;
  ck_assert_int_eq(kl_solver_options(s, &back), KL_OK);
  ck_assert_double_eq(back.tolerance, 1e-10);
  o.tolerance = NAN;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_ENONFINITE);
  o.tolerance = -1;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "tolerance"));
  kl_options_default(&o);
  o.max_iterations = 0;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_EINVAL);
  kl_options_default(&o);
  o.max_step = 0;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_EINVAL);
  /* each range of the header's kl_solver_set_options, just outside */
  kl_options_default(&o);
  o.step_tolerance = 0;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "step_tolerance"));
  kl_options_default(&o);
  o.max_backtracks = 101;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "max_backtracks"));
  kl_options_default(&o);
  o.singular_rcond = 1e-3;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "singular_rcond"));
  kl_options_default(&o);
  o.size = 3;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_EINVAL);
  ck_assert_int_eq(kl_solver_set_options(s, NULL), KL_EINVAL);
  /* a caller built against the first options struct (before `kernel`):
   * its struct is filled only so far, and the library takes only so far */
  {
    union {
      kl_options o;
      unsigned char bytes[sizeof(kl_options) + 8];
    } old;
    size_t first = offsetof(kl_options, kernel);
    memset(old.bytes, 0xa5, sizeof old.bytes);
    kl_options_init(&old.o, first);
    ck_assert_uint_eq(old.o.size, first);
    ck_assert_double_eq(old.o.tolerance, 1e-12);
    ck_assert_int_eq(old.bytes[first], 0xa5); /* nothing written past it */
    old.o.tolerance = 1e-10;
    ck_assert_int_eq(kl_solver_set_options(s, &old.o), KL_OK);
    ck_assert_int_eq(kl_solver_options(s, &back), KL_OK);
    ck_assert_int_eq(back.kernel, KL_KERNEL_AUTO); /* defaulted, not 0xa5.. */
  }
  /* the failures left the last good options in place */
  ck_assert_int_eq(kl_solver_options(s, &back), KL_OK);
  ck_assert_double_eq(back.tolerance, 1e-10);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

START_TEST(bad_solve_arguments) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  double bad[] = {NAN, INFINITY, -INFINITY};
  unsigned k;
  ck_assert_int_eq(kl_solve_position(NULL, bad), KL_EINVAL);
  ck_assert_int_eq(kl_solve_position(s, NULL), KL_EINVAL);
  for (k = 0; k < 3; k++) {
    ck_assert_int_eq(kl_solve_position(s, &bad[k]), KL_ENONFINITE);
    ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "input 1"));
  }
  ck_assert_int_eq(kl_set_link_angle(s, 0, 1.0), KL_EKIND);
  ck_assert_int_eq(kl_set_link_angle(s, 9, 1.0), KL_EID);
  ck_assert_int_eq(kl_set_link_angle(s, -1, 1.0), KL_EID);
  ck_assert_int_eq(kl_set_link_angle(s, 1, NAN), KL_ENONFINITE);
  ck_assert_int_eq(kl_set_joint_slide(s, 0, 1.0), KL_EKIND);
  ck_assert_int_eq(kl_set_joint_slide(s, 42, 1.0), KL_EID);
  ck_assert(isnan(kl_link_angle(s, 99)));
  ck_assert(isnan(kl_joint_slide(s, 0)));
  ck_assert(isnan(kl_input_value(s, 0))); /* nothing solved yet */
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* A solver lives in a caller's block; the block's size is a query. */
START_TEST(solver_in_a_callers_block) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  size_t need = kl_solver_bytes(f.m);
  static double block[4096];
  kl_solver *s;
  double u = 0.5;
  ck_assert_uint_gt(need, 0);
  ck_assert_uint_le(need, sizeof block);
  ck_assert_ptr_null(kl_solver_new_in(f.m, block, need - 1));
  s = kl_solver_new_in(f.m, block, sizeof block);
  ck_assert_ptr_nonnull(s);
  kl_set_link_angle(s, f.coupler, 0.5);
  kl_set_link_angle(s, f.rocker, 1.5);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  kl_solver_free(s); /* frees nothing: the block is the caller's */
  kl_model_free(f.m);
}
END_TEST

/* A structure (mobility 0, no inputs) and a model of ground alone solve. */
START_TEST(structures_without_inputs) {
  kl_model *m = kl_model_new();
  kl_solver *s;
  int l1 = kl_add_link(m, "left"), l2 = kl_add_link(m, "right");
  double xy[2];
  kl_add_revolute(m, KL_GROUND, 0, 0, l1, 0, 0);
  kl_add_revolute(m, KL_GROUND, 60, 0, l2, 0, 0);
  kl_add_revolute(m, l1, 50, 0, l2, 50, 0);
  kl_add_point(m, l1, 50, 0, "apex");
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ck_assert_int_eq(kl_model_dof(m), 0);
  s = kl_solver_new(m);
  kl_set_link_angle(s, l1, 0.8);
  kl_set_link_angle(s, l2, 2.3);
  ck_assert_int_eq(kl_solve_position(s, NULL), KL_OK);
  kl_point_position(s, 0, xy);
  /* isosceles triangle 50-50-60: apex at (30, 40) */
  ck_assert_double_le(fabs(xy[0] - 30), 1e-10);
  ck_assert_double_le(fabs(xy[1] - 40), 1e-10);
  kl_solver_free(s);
  kl_model_free(m);

  m = kl_model_new();
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  ck_assert_int_eq(kl_solve_position(s, NULL), KL_OK);
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* The same slider-crank in nanometres and in kilometres-sized units: a
 * consistent unit of length must not change the answers or the singular
 * test (the condition estimate is taken with slide columns in lengths). */
START_TEST(length_unit_does_not_matter) {
  double units[] = {1e-7, 1.0, 1e9}, rcond[3], slide[3];
  int k;
  for (k = 0; k < 3; k++) {
    slider_crank sc = build_slider_crank(0.05 * units[k], 0.2 * units[k],
                                         0.01 * units[k]);
    kl_solver *s = kl_solver_new(sc.m);
    kl_solve_stats st;
    double u = 1.0;
    st.size = sizeof st;
    kl_set_link_angle(s, sc.rod, -0.2);
    kl_set_joint_slide(s, sc.slide_joint, 0.22 * units[k]);
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    kl_solver_stats(s, &st);
    rcond[k] = st.rcond;
    slide[k] = kl_joint_slide(s, sc.slide_joint) / units[k];
    kl_solver_free(s);
    kl_model_free(sc.m);
  }
  ck_assert_double_le(fabs(rcond[0] - rcond[1]), 1e-12);
  ck_assert_double_le(fabs(rcond[2] - rcond[1]), 1e-12);
  ck_assert_double_le(fabs(slide[0] - slide[1]), 1e-13);
  ck_assert_double_le(fabs(slide[2] - slide[1]), 1e-13);
}
END_TEST

START_TEST(solver_needs_a_finalized_model) {
  kl_model *m = kl_model_new();
  kl_add_link(m, "loose");
  ck_assert_ptr_null(kl_solver_new(m));
  ck_assert_ptr_null(kl_solver_new(NULL));
  ck_assert_uint_eq(kl_solver_bytes(m), 0);
  kl_model_free(m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("position");
  TCase *tc = tcase_create("position");
  tcase_set_timeout(tc, 60);
  tcase_add_test(tc, fourbar_matches_freudenstein_both_branches);
  tcase_add_test(tc, explicit_and_found_loops_agree);
  tcase_add_test(tc, slider_crank_matches_closed_form);
  tcase_add_test(tc, inverted_slider_crank_matches_closed_form);
  tcase_add_test(tc, fivebar_matches_circle_intersection);
  tcase_add_test(tc, inputs_are_exact_and_whole_turns_do_not_matter);
  tcase_add_test(tc, stats_describe_the_solve);
  tcase_add_test(tc, beyond_a_limit_is_no_assembly_and_state_is_kept);
  tcase_add_test(tc, toggle_and_change_point_are_singular);
  tcase_add_test(tc, iteration_limit_is_its_own_status);
  tcase_add_test(tc, options_are_checked);
  tcase_add_test(tc, bad_solve_arguments);
  tcase_add_test(tc, solver_in_a_callers_block);
  tcase_add_test(tc, structures_without_inputs);
  tcase_add_test(tc, solver_needs_a_finalized_model);
  tcase_add_test(tc, length_unit_does_not_matter);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
