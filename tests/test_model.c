/*
 * test_model.c - building and finalizing models: every bad input gets its
 * own status and a message naming the ids and names involved; loops found
 * or registered; mobility by Gruebler's count.
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "suite.h"
#include "support.h"

#define assert_message_has(m, text)                                            \
  ck_assert_msg(strstr(kl_model_error(m), (text)) != NULL,                     \
                "message '%s' lacks '%s'", kl_model_error(m), (text))

START_TEST(version_and_status_texts) {
  int st, other;
  ck_assert_str_eq(kl_version(), KINLOOP_VERSION);
  ck_assert_int_eq(kl_version_number(), KINLOOP_VERSION_NUMBER);
  for (st = KL_EIO; st <= KL_STOPPED; st++) {
    ck_assert_str_ne(kl_status_str(st), "unknown status");
    for (other = KL_EIO; other < st; other++)
      ck_assert_str_ne(kl_status_str(st), kl_status_str(other));
  }
  ck_assert_str_eq(kl_status_str(12345), "unknown status");
}
END_TEST

START_TEST(ground_exists_from_the_start) {
  kl_model *m = kl_model_new();
  ck_assert_int_eq(kl_model_link_count(m), 1);
  ck_assert_str_eq(kl_model_link_name(m, KL_GROUND), "ground");
  ck_assert_int_eq(kl_model_find_link(m, "ground"), KL_GROUND);
  ck_assert_str_eq(kl_model_error(m), "");
  kl_model_free(m);
  kl_model_free(NULL);
  ck_assert_ptr_nonnull(kl_model_error(NULL));
}
END_TEST

START_TEST(link_names_are_checked) {
  kl_model *m = kl_model_new();
  char long_name[300];
  memset(long_name, 'x', sizeof long_name - 1);
  long_name[sizeof long_name - 1] = '\0';
  ck_assert_int_eq(kl_add_link(m, "crank"), 1);
  ck_assert_int_eq(kl_add_link(m, NULL), 2);
  ck_assert_ptr_null(kl_model_link_name(m, 2));
  ck_assert_int_eq(kl_add_link(m, "crank"), KL_EDUPLICATE);
  assert_message_has(m, "'crank' is already used by @1");
  ck_assert_int_eq(kl_add_link(m, "ground"), KL_EDUPLICATE);
  ck_assert_int_eq(kl_add_link(m, ""), KL_EINVAL);
  ck_assert_int_eq(kl_add_link(m, "tab\there"), KL_EINVAL);
  assert_message_has(m, "control character");
  ck_assert_int_eq(kl_add_link(m, long_name), KL_EINVAL);
  ck_assert_int_eq(kl_add_link(NULL, "x"), KL_EINVAL);
  /* failures added nothing */
  ck_assert_int_eq(kl_model_link_count(m), 3);
  ck_assert_int_eq(kl_model_find_link(m, "crank"), 1);
  ck_assert_int_eq(kl_model_find_link(m, "nobody"), KL_EID);
  kl_model_free(m);
}
END_TEST

START_TEST(joint_arguments_are_checked) {
  kl_model *m = kl_model_new();
  int crank = kl_add_link(m, "crank"), rod = kl_add_link(m, "rod");
  double bad[] = {NAN, INFINITY, -INFINITY};
  unsigned k;
  ck_assert_int_eq(kl_add_revolute(m, -1, 0, 0, crank, 0, 0), KL_EID);
  assert_message_has(m, "link index -1 (0-based) does not exist");
  ck_assert_int_eq(kl_add_revolute(m, 0, 0, 0, 99, 0, 0), KL_EID);
  assert_message_has(m, "link index 99 (0-based) does not exist");
  ck_assert_int_eq(kl_add_revolute(m, crank, 0, 0, crank, 1, 0), KL_ESELFJOINT);
  assert_message_has(m, "link 'crank' to itself");
  for (k = 0; k < 3; k++) {
    ck_assert_int_eq(kl_add_revolute(m, 0, bad[k], 0, crank, 0, 0), KL_ENONFINITE);
    ck_assert_int_eq(kl_add_revolute(m, 0, 0, bad[k], crank, 0, 0), KL_ENONFINITE);
    ck_assert_int_eq(kl_add_revolute(m, 0, 0, 0, crank, bad[k], 0), KL_ENONFINITE);
    ck_assert_int_eq(kl_add_revolute(m, 0, 0, 0, crank, 0, bad[k]), KL_ENONFINITE);
    ck_assert_int_eq(kl_add_prismatic(m, 0, 0, 0, bad[k], rod, 0, 0), KL_ENONFINITE);
    ck_assert_int_eq(kl_add_slot(m, 0, 0, 0, bad[k], rod, 0, 0), KL_ENONFINITE);
    ck_assert_int_eq(kl_add_slot_through(m, 0, 0, 0, bad[k], 1, rod, 0, 0),
                     KL_ENONFINITE);
    ck_assert_int_eq(kl_add_point(m, crank, bad[k], 0, NULL), KL_ENONFINITE);
  }
  assert_message_has(m, "link 'crank'");
  ck_assert_int_eq(kl_model_joint_count(m), 0);
  ck_assert_int_eq(kl_add_revolute(m, 0, 0, 0, crank, 0, 0), 0);
  /* the same kind of joint between the same two links, in either order */
  ck_assert_int_eq(kl_add_revolute(m, crank, 5, 0, 0, 1, 1), KL_EDUPLICATE);
  assert_message_has(m, "joint @0 is already a revolute joint between link "
                        "'crank' and link 'ground'");
  /* a different kind between the same links is a different joint */
  ck_assert_int_eq(kl_add_slot(m, 0, 0, 0, 0.0, crank, 10, 0), 1);
  kl_model_free(m);
}
END_TEST

START_TEST(slide_axis_through_two_points) {
  kl_model *m = kl_model_new();
  int block = kl_add_link(m, "block");
  int j;
  ck_assert_int_eq(kl_add_prismatic_through(m, 0, 3, 4, 3, 4, block, 0, 0),
                   KL_EZEROLENGTH);
  assert_message_has(m, "zero length");
  assert_message_has(m, "link 'ground'");
  j = kl_add_prismatic_through(m, 0, 1, 1, 4, 5, block, 0, 0);
  ck_assert_int_ge(j, 0);
  ck_assert_double_eq_tol(kl_model_joint_axis(m, j), atan2(4.0, 3.0), 1e-15);
  ck_assert_int_eq(kl_model_joint_kind(m, j), KL_JOINT_PRISMATIC);
  ck_assert(isnan(kl_model_joint_axis(m, 99)));
  kl_model_free(m);
}
END_TEST

START_TEST(points_and_inputs_are_checked) {
  kl_model *m = kl_model_new();
  int crank = kl_add_link(m, "crank");
  int j = kl_add_revolute(m, 0, 0, 0, crank, 0, 0);
  double xy[2];
  ck_assert_int_eq(kl_add_point(m, 7, 0, 0, "tip"), KL_EID);
  ck_assert_int_eq(kl_add_point(m, crank, 10, 2, "tip"), 0);
  ck_assert_int_eq(kl_add_point(m, KL_GROUND, 1, 1, "tip"), KL_EDUPLICATE);
  ck_assert_int_eq(kl_model_find_point(m, "tip"), 0);
  ck_assert_int_eq(kl_model_point_link(m, 0, xy), crank);
  ck_assert_double_eq(xy[0], 10);
  ck_assert_double_eq(xy[1], 2);
  ck_assert_int_eq(kl_model_point_link(m, 1, xy), KL_EID);
  ck_assert_str_eq(kl_model_point_name(m, 0), "tip");
  ck_assert_int_eq(kl_add_input(m, 5), KL_EID);
  assert_message_has(m, "joint index 5 (0-based) does not exist");
  ck_assert_int_eq(kl_add_input(m, j), 0);
  ck_assert_int_eq(kl_add_input(m, j), KL_EDUPLICATE);
  assert_message_has(m, "already input 1 (@0)");
  ck_assert_int_eq(kl_model_input_joint(m, 0), j);
  ck_assert_int_eq(kl_model_input_joint(m, 1), KL_EID);
  ck_assert_int_eq(kl_model_input_count(m), 1);
  kl_model_free(m);
}
END_TEST

START_TEST(registered_loops_must_be_simple_cycles) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_model *m = kl_model_new();
  int l1 = kl_add_link(m, "a"), l2 = kl_add_link(m, "b"), l3 = kl_add_link(m, "c");
  int j0 = kl_add_revolute(m, 0, 0, 0, l1, 0, 0);
  int j1 = kl_add_revolute(m, l1, 1, 0, l2, 0, 0);
  int j2 = kl_add_revolute(m, l2, 1, 0, l3, 0, 0);
  int j3 = kl_add_revolute(m, l3, 1, 0, 0, 2, 0);
  int ok[4], broken[3], repeated[3];
  ok[0] = j0;
  ok[1] = j1;
  ok[2] = j2;
  ok[3] = j3;
  ck_assert_int_eq(kl_add_loop(m, 1, ok), KL_EINVAL);
  ck_assert_int_eq(kl_add_loop(m, 3, NULL), KL_EINVAL);
  broken[0] = j0;
  broken[1] = j2; /* j0 (ground-a) and j2 (b-c) share no link */
  broken[2] = j3;
  ck_assert_int_eq(kl_add_loop(m, 3, broken), KL_ELOOP);
  assert_message_has(m, "do not share a link");
  repeated[0] = j0;
  repeated[1] = j1;
  repeated[2] = j0;
  ck_assert_int_eq(kl_add_loop(m, 3, repeated), KL_ELOOP);
  assert_message_has(m, "appears twice");
  repeated[2] = 17;
  ck_assert_int_eq(kl_add_loop(m, 3, repeated), KL_EID);
  /* j0 j1 j2 walks ground-a-b-c but j2 does not lead back to ground */
  ck_assert_int_eq(kl_add_loop(m, 3, ok), KL_ELOOP);
  ck_assert_int_eq(kl_add_loop(m, 4, ok), 0);
  kl_model_free(m);
  kl_model_free(f.m);
}
END_TEST

/* A closed walk through ground twice (two triangles joined at ground) is a
 * figure eight, not a simple cycle. */
START_TEST(figure_eight_is_not_a_loop) {
  kl_model *m = kl_model_new();
  int a = kl_add_link(m, "a"), b = kl_add_link(m, "b");
  int c = kl_add_link(m, "c"), d = kl_add_link(m, "d");
  int eight[6];
  eight[0] = kl_add_revolute(m, 0, 0, 0, a, 0, 0);
  eight[1] = kl_add_revolute(m, a, 5, 0, b, 0, 0);
  eight[2] = kl_add_revolute(m, b, 5, 0, 0, 8, 0);
  eight[3] = kl_add_revolute(m, 0, 0, 9, c, 0, 0);
  eight[4] = kl_add_revolute(m, c, 5, 0, d, 0, 0);
  eight[5] = kl_add_revolute(m, d, 5, 0, 0, 8, 9);
  ck_assert_int_eq(kl_add_loop(m, 6, eight), KL_ELOOP);
  assert_message_has(m, "visits link 'ground' twice");
  kl_model_free(m);
}
END_TEST

START_TEST(registered_loops_must_be_a_full_independent_set) {
  pin_linkage p = watt_sixbar();
  kl_model *m = kl_model_new();
  static const int first[4] = {0, 1, 2, 3};
  int l, j;
  for (l = 1; l < p.nlinks; l++)
    kl_add_link(m, NULL);
  for (j = 0; j < p.njoints; j++)
    kl_add_revolute(m, p.a[j], p.pa[j][0], p.pa[j][1], p.b[j], p.pb[j][0],
                    p.pb[j][1]);
  kl_add_input(m, 0);
  kl_add_loop(m, 4, first);
  ck_assert_int_eq(kl_model_finalize(m), KL_ELOOPSET);
  assert_message_has(m, "1 loop is registered, but the model has 2");
  ck_assert(!kl_model_is_finalized(m));
  kl_add_loop(m, 4, first); /* the same loop again: not independent */
  ck_assert_int_eq(kl_model_finalize(m), KL_ELOOPSET);
  assert_message_has(m, "not independent");
  kl_model_free(m);

  m = build_pin_linkage(&p, 1);
  ck_assert(kl_model_is_finalized(m));
  ck_assert_int_eq(kl_model_loop_count(m), 2);
  kl_model_free(m);
}
END_TEST

/* Ten links and thirteen pins with four independent registered loops (rank
 * 4 of the signed incidence rows, checked with SVD outside the project):
 * elimination that meets fractional entries must still see all four. */
START_TEST(independent_loops_with_fractional_pivots) {
  static const int e[13][2] = {{0, 1}, {3, 8}, {9, 0}, {3, 4}, {6, 8},
                               {4, 6}, {5, 7}, {2, 3}, {4, 5}, {0, 2},
                               {1, 7}, {6, 9}, {7, 8}};
  static const int loops[4][9] = {{0, 10, 6, 8, 3, 1, 4, 11, 2},
                                  {1, 12, 6, 8, 3},
                                  {0, 10, 6, 8, 5, 4, 1, 7, 9},
                                  {2, 11, 4, 12, 6, 8, 3, 7, 9}};
  static const int len[4] = {9, 5, 9, 9};
  kl_model *m = kl_model_new();
  int i;
  for (i = 1; i < 10; i++)
    kl_add_link(m, NULL);
  for (i = 0; i < 13; i++)
    kl_add_revolute(m, e[i][0], (double)i, 0.5 * i, e[i][1], 1.0 + i,
                    -0.25 * i);
  kl_add_input(m, 0);
  for (i = 0; i < 4; i++)
    ck_assert_int_eq(kl_add_loop(m, len[i], loops[i]), i);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ck_assert_int_eq(kl_model_loop_count(m), 4);
  kl_model_free(m);
}
END_TEST

/* Loops found from the spanning tree: L = J - N + 1, each a cycle. */
START_TEST(loops_are_found_when_none_are_registered) {
  pin_linkage p = stephenson_sixbar();
  kl_model *m = build_pin_linkage(&p, 0);
  int loop, joints[16], n, i;
  ck_assert(kl_model_is_finalized(m));
  ck_assert_int_eq(kl_model_loop_count(m), 7 - 6 + 1);
  ck_assert_int_eq(kl_model_dof(m), 1);
  for (loop = 0; loop < kl_model_loop_count(m); loop++) {
    n = kl_model_loop(m, loop, joints, 16);
    ck_assert_int_ge(n, 3);
    /* consecutive joints share a link */
    for (i = 0; i < n; i++) {
      int a[2], b[2];
      kl_model_joint_links(m, joints[i], a, NULL, NULL);
      kl_model_joint_links(m, joints[(i + 1) % n], b, NULL, NULL);
      ck_assert(a[0] == b[0] || a[0] == b[1] || a[1] == b[0] || a[1] == b[1]);
    }
  }
  ck_assert_int_eq(kl_model_loop(m, 2, joints, 16), KL_EID);
  ck_assert_int_eq(kl_model_loop(m, 0, NULL, 4), KL_EINVAL);
  /* with no room, the count alone */
  ck_assert_int_ge(kl_model_loop(m, 0, NULL, 0), 3);
  kl_model_free(m);
}
END_TEST

START_TEST(disconnected_links_are_named) {
  kl_model *m = kl_model_new();
  int crank = kl_add_link(m, "crank");
  int loose = kl_add_link(m, "loose plate");
  int j = kl_add_revolute(m, 0, 0, 0, crank, 0, 0);
  kl_add_input(m, j);
  ck_assert_int_eq(kl_model_finalize(m), KL_EDISCONNECTED);
  assert_message_has(m, "link 'loose plate' is not connected to ground");
  /* the model is still open: mend it and finalize again */
  ck_assert_int_eq(kl_add_revolute(m, crank, 10, 0, loose, 0, 0), 1);
  ck_assert_int_eq(kl_add_input(m, 1), 1);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ck_assert_int_eq(kl_model_dof(m), 2);
  kl_model_free(m);
}
END_TEST

/* Gruebler's count (3 (N - 1) - 2 J1 - J2) against the number of inputs. */
START_TEST(inputs_must_match_the_degrees_of_freedom) {
  kl_model *m = kl_model_new();
  int a = kl_add_link(m, "crank"), b = kl_add_link(m, "coupler"),
      c = kl_add_link(m, "rocker");
  int j0 = kl_add_revolute(m, 0, 0, 0, a, 0, 0);
  int j1 = kl_add_revolute(m, a, 40, 0, b, 0, 0);
  kl_add_revolute(m, b, 120, 0, c, 80, 0);
  kl_add_revolute(m, c, 0, 0, 0, 100, 0);
  ck_assert_int_eq(kl_model_dof(m), KL_ESTATE);
  ck_assert_int_eq(kl_model_loop_count(m), KL_ESTATE);
  ck_assert_int_eq(kl_model_finalize(m), KL_EDOF);
  assert_message_has(m, "1 degree of freedom but 0 inputs");
  kl_add_input(m, j0);
  kl_add_input(m, j1);
  ck_assert_int_eq(kl_model_finalize(m), KL_EDOF);
  assert_message_has(m, "1 degree of freedom but 2 inputs");
  kl_model_free(m);
}
END_TEST

START_TEST(over_constrained_models) {
  /* a rigid triangle with one more link pinned to all three of its links:
   * 3 x 3 - 2 x 6 = -3 */
  kl_model *m = kl_model_new();
  int a = kl_add_link(m, "a"), b = kl_add_link(m, "b"), c = kl_add_link(m, "c");
  kl_add_revolute(m, 0, 0, 0, a, 0, 0);
  kl_add_revolute(m, 0, 10, 0, b, 0, 0);
  kl_add_revolute(m, a, 8, 0, b, 8, 0);
  kl_add_revolute(m, c, 0, 0, a, 4, 0);
  kl_add_revolute(m, c, 5, 0, b, 4, 0);
  kl_add_revolute(m, c, 2, 3, 0, 5, 5);
  ck_assert_int_eq(kl_model_finalize(m), KL_EOVERCONSTRAINED);
  assert_message_has(m, "mobility -3");
  kl_model_free(m);

  /* three prismatic joints in one loop lock the same rotation twice */
  m = kl_model_new();
  a = kl_add_link(m, "slide one");
  b = kl_add_link(m, "slide two");
  kl_add_prismatic(m, 0, 0, 0, 0.0, a, 0, 0);
  kl_add_prismatic(m, a, 0, 0, 1.0, b, 0, 0);
  kl_add_prismatic(m, b, 0, 0, 2.0, 0, 3, 0);
  ck_assert_int_eq(kl_model_finalize(m), KL_EOVERCONSTRAINED);
  assert_message_has(m, "joint @2 (prismatic, link 'slide two' to link "
                        "'ground')");
  kl_model_free(m);
}
END_TEST

START_TEST(zero_length_links) {
  kl_model *m = kl_model_new();
  int a = kl_add_link(m, "crank"), b = kl_add_link(m, "stub"),
      c = kl_add_link(m, "rocker");
  int j0 = kl_add_revolute(m, 0, 0, 0, a, 0, 0);
  kl_add_revolute(m, a, 40, 0, b, 0, 0);
  kl_add_revolute(m, b, 0, 0, c, 80, 0); /* both of stub's joints at (0, 0) */
  kl_add_revolute(m, c, 0, 0, 0, 100, 0);
  kl_add_input(m, j0);
  ck_assert_int_eq(kl_model_finalize(m), KL_EZEROLENGTH);
  assert_message_has(m, "link 'stub' has zero length");
  kl_model_free(m);

  /* a driven crank whose two pins coincide: its angle is known (the
   * input), but it carries no motion; refused rather than a "stroke 0" */
  m = kl_model_new();
  a = kl_add_link(m, "crank");
  b = kl_add_link(m, "rod");
  c = kl_add_link(m, "block");
  j0 = kl_add_revolute(m, 0, 0, 0, a, 0, 0);
  kl_add_revolute(m, a, 0, 0, b, 0, 0); /* the crank pin on the pivot */
  kl_add_revolute(m, b, 120, 0, c, 0, 0);
  kl_add_prismatic(m, 0, 0, 0, 0.0, c, 0, 0);
  kl_add_input(m, j0);
  ck_assert_int_eq(kl_model_finalize(m), KL_EZEROLENGTH);
  assert_message_has(m, "link 'crank' has zero length");
  kl_model_free(m);

  /* a slider block pinned on its slide point is a whole link */
  m = kl_model_new();
  a = kl_add_link(m, "crank");
  b = kl_add_link(m, "rod");
  c = kl_add_link(m, "block");
  j0 = kl_add_revolute(m, 0, 0, 0, a, 0, 0);
  kl_add_revolute(m, a, 40, 0, b, 0, 0);
  kl_add_revolute(m, b, 120, 0, c, 0, 0);
  kl_add_prismatic(m, 0, 0, 0, 0.0, c, 0, 0);
  kl_add_input(m, j0);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  kl_model_free(m);
}
END_TEST

START_TEST(undetermined_coordinates) {
  /* a four-bar driven at crank and rocker, with a flap hanging free from
   * the coupler: the count matches but nothing determines the flap */
  kl_model *m = kl_model_new();
  int a = kl_add_link(m, "crank"), b = kl_add_link(m, "coupler"),
      c = kl_add_link(m, "rocker"), flap = kl_add_link(m, "flap");
  int j0 = kl_add_revolute(m, 0, 0, 0, a, 0, 0);
  int j3;
  kl_add_revolute(m, a, 40, 0, b, 0, 0);
  kl_add_revolute(m, b, 120, 0, c, 80, 0);
  j3 = kl_add_revolute(m, c, 0, 0, 0, 100, 0);
  kl_add_revolute(m, b, 60, 0, flap, 0, 0);
  kl_add_input(m, j0);
  kl_add_input(m, j3);
  ck_assert_int_eq(kl_model_finalize(m), KL_EUNDETERMINED);
  assert_message_has(m, "link 'flap'");
  kl_model_free(m);

  /* the same with a slider block loose on a ground rail */
  m = kl_model_new();
  a = kl_add_link(m, "crank");
  b = kl_add_link(m, "coupler");
  c = kl_add_link(m, "rocker");
  flap = kl_add_link(m, "carriage");
  j0 = kl_add_revolute(m, 0, 0, 0, a, 0, 0);
  kl_add_revolute(m, a, 40, 0, b, 0, 0);
  kl_add_revolute(m, b, 120, 0, c, 80, 0);
  j3 = kl_add_revolute(m, c, 0, 0, 0, 100, 0);
  kl_add_prismatic(m, 0, 0, -50, 0.0, flap, 0, 0);
  kl_add_input(m, j0);
  kl_add_input(m, j3);
  ck_assert_int_eq(kl_model_finalize(m), KL_EUNDETERMINED);
  assert_message_has(m, "slide of joint @4 (prismatic, link 'ground' to "
                        "link 'carriage')");
  kl_model_free(m);
}
END_TEST

/* Names are found by table, not by search: thousands of items of each
 * kind, renamed joints, and the names a rename frees. */
START_TEST(names_found_among_many) {
  kl_model *m = kl_model_new();
  char name[32];
  int k, j;
  for (k = 1; k <= 3000; k++) {
    snprintf(name, sizeof name, "link %d", k);
    ck_assert_int_eq(kl_add_link(m, name), k);
  }
  for (k = 1; k < 3000; k++) {
    j = kl_add_revolute(m, k, 10, 0, k + 1, 0, 0);
    snprintf(name, sizeof name, "pin %d", k);
    ck_assert_int_eq(kl_model_set_joint_name(m, j, name), KL_OK);
    snprintf(name, sizeof name, "tip %d", k);
    ck_assert_int_eq(kl_add_point(m, k, 5, 1, name), k - 1);
  }
  for (k = 1; k <= 3000; k += 7) {
    snprintf(name, sizeof name, "link %d", k);
    ck_assert_int_eq(kl_model_find_link(m, name), k);
  }
  ck_assert_int_eq(kl_model_find_joint(m, "pin 1234"), 1233);
  ck_assert_int_eq(kl_model_find_point(m, "tip 2999"), 2998);
  /* a rename frees the old name and takes the new one */
  ck_assert_int_eq(kl_model_set_joint_name(m, 1233, "middle pin"), KL_OK);
  ck_assert_int_eq(kl_model_find_joint(m, "pin 1234"), KL_EID);
  ck_assert_int_eq(kl_model_find_joint(m, "middle pin"), 1233);
  ck_assert_int_eq(kl_model_find_joint(m, "pin 1235"), 1234);
  ck_assert_int_eq(kl_model_set_joint_name(m, 1234, "middle pin"),
                   KL_EDUPLICATE);
  ck_assert_int_eq(kl_model_set_joint_name(m, 1, "pin 1234"), KL_OK);
  ck_assert_int_eq(kl_model_find_joint(m, "pin 1234"), 1);
  /* a second joint of the same kind between the same links, either way */
  ck_assert_int_eq(kl_add_revolute(m, 1501, 0, 0, 1500, 3, 0),
                   KL_EDUPLICATE);
  assert_message_has(m, "joint 'pin 1500' is already a revolute joint");
  ck_assert_int_ne(kl_add_slot(m, 1500, 0, 0, 0.0, 1501, 0, 0),
                   KL_EDUPLICATE);
  ck_assert_int_eq(kl_add_input(m, 0), 0);
  ck_assert_int_eq(kl_add_input(m, 0), KL_EDUPLICATE);
  assert_message_has(m, "is already input 1 (pin 1)");
  kl_model_free(m);
}
END_TEST

/* Size limits, each its own status: registered loops past 1024, and a
 * model whose tree is so deep that its chains would take memory quadratic
 * in its size (3000 links in one open chain, each joint an input: the
 * paths from ground hold 3000^2 / 2 terms). */
START_TEST(size_limits) {
  kl_model *m = kl_model_new();
  int crank = kl_add_link(m, "crank"), coupler = kl_add_link(m, "coupler"),
      rocker = kl_add_link(m, "rocker"), k, walk[4];
  walk[0] = kl_add_revolute(m, 0, 0, 0, crank, 0, 0);
  walk[1] = kl_add_revolute(m, crank, 40, 0, coupler, 0, 0);
  walk[2] = kl_add_revolute(m, coupler, 120, 0, rocker, 80, 0);
  walk[3] = kl_add_revolute(m, rocker, 0, 0, 0, 100, 0);
  for (k = 0; k < 1024; k++)
    ck_assert_int_eq(kl_add_loop(m, 4, walk), k);
  ck_assert_int_eq(kl_add_loop(m, 4, walk), KL_ETOOLARGE);
  assert_message_has(m, "1024 loops are registered already");
  kl_model_free(m);

  m = kl_model_new();
  for (k = 1; k <= 3000; k++) {
    int link = kl_add_link(m, NULL);
    int joint = kl_add_revolute(m, link - 1, 10, 0, link, 0, 0);
    ck_assert_int_eq(kl_add_input(m, joint), k - 1);
  }
  ck_assert_int_eq(kl_model_finalize(m), KL_ETOOLARGE);
  assert_message_has(m, "too large or too deep");
  ck_assert_int_eq(kl_model_is_finalized(m), 0);
  kl_model_free(m);
}
END_TEST

START_TEST(builders_fail_after_finalize) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  int loop[4] = {0, 1, 2, 3};
  ck_assert(kl_model_is_finalized(f.m));
  ck_assert_int_eq(kl_add_link(f.m, "late"), KL_ESTATE);
  assert_message_has(f.m, "finalized");
  ck_assert_int_eq(kl_add_revolute(f.m, 0, 1, 1, 1, 2, 2), KL_ESTATE);
  ck_assert_int_eq(kl_add_prismatic(f.m, 0, 1, 1, 0.0, 2, 2, 2), KL_ESTATE);
  ck_assert_int_eq(kl_add_slot(f.m, 0, 1, 1, 0.0, 2, 2, 2), KL_ESTATE);
  ck_assert_int_eq(kl_add_prismatic_through(f.m, 0, 1, 1, 1, 1, 2, 2, 2),
                   KL_ESTATE);
  ck_assert_int_eq(kl_add_point(f.m, 1, 0, 0, "late"), KL_ESTATE);
  ck_assert_int_eq(kl_add_input(f.m, 1), KL_ESTATE);
  ck_assert_int_eq(kl_add_loop(f.m, 4, loop), KL_ESTATE);
  ck_assert_int_eq(kl_model_finalize(f.m), KL_OK); /* a second time is fine */
  ck_assert_int_eq(kl_model_link_count(f.m), 4);
  ck_assert_int_eq(kl_model_joint_count(f.m), 4);
  kl_model_free(f.m);
}
END_TEST

START_TEST(reading_the_model_back) {
  slider_crank sc = build_slider_crank(30, 100, 12);
  int links[2];
  double pa[2], pb[2];
  ck_assert_int_eq(kl_model_joint_links(sc.m, sc.slide_joint, links, pa, pb), KL_OK);
  ck_assert_int_eq(links[0], KL_GROUND);
  ck_assert_int_eq(links[1], sc.block);
  ck_assert_double_eq(pa[1], 12);
  ck_assert_double_eq(kl_model_joint_axis(sc.m, sc.slide_joint), 0.0);
  ck_assert_int_eq(kl_model_joint_links(sc.m, 9, links, pa, pb), KL_EID);
  ck_assert_int_eq(kl_model_joint_links(NULL, 0, links, pa, pb), KL_EINVAL);
  ck_assert_int_eq(kl_model_joint_kind(sc.m, 0), KL_JOINT_REVOLUTE);
  ck_assert_int_eq(kl_model_joint_kind(sc.m, -1), KL_EID);
  ck_assert_double_eq(kl_model_scale(sc.m), 100);
  ck_assert(isnan(kl_model_scale(NULL)));
  ck_assert_int_eq(kl_model_link_count(NULL), KL_EINVAL);
  ck_assert_int_eq(kl_model_dof(NULL), KL_EINVAL);
  kl_model_free(sc.m);
}
END_TEST

/* The model's scale is its largest link's farthest pair of attachment
 * points. A ground carrying many pivots (more than the all-pairs limit)
 * takes the convex hull's way: the result must be the all-pairs maximum
 * computed here to the bit, for pivots on a circle (every one on the
 * hull), inside it, and on a line. */
static void check_scale_of_pivots(int n, int shape) {
  kl_model *m = kl_model_new();
  double xy[2 * 400], best = 0.0;
  int k, i;
  unsigned seed = 12345u;
  for (k = 0; k < n; k++) {
    double r, a;
    seed = seed * 1103515245u + 12345u;
    r = (double)(seed >> 8) / 16777216.0;
    a = 2 * PI * k / n + 0.01 * r;
    xy[2 * k] = shape == 0 ? 50 * cos(a) : shape == 1 ? 50 * r * cos(7 * a) : 3 * k - 0.5 * n;
    xy[2 * k + 1] = shape == 0 ? 50 * sin(a) : shape == 1 ? 50 * r * sin(7 * a) : 2 * k + 1.0;
    kl_add_input(m, kl_add_revolute(m, KL_GROUND, xy[2 * k], xy[2 * k + 1],
                                    kl_add_link(m, NULL), 0, 0));
  }
  for (k = 0; k < n; k++)
    for (i = k + 1; i < n; i++)
      best = fmax(best, hypot(xy[2 * k] - xy[2 * i], xy[2 * k + 1] - xy[2 * i + 1]));
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ck_assert_double_eq(kl_model_scale(m), best);
  kl_model_free(m);
}

START_TEST(scale_is_the_farthest_pair_on_a_link) {
  int shape;
  for (shape = 0; shape < 3; shape++) {
    check_scale_of_pivots(20, shape);
    check_scale_of_pivots(33, shape);
    check_scale_of_pivots(400, shape);
  }
}
END_TEST

int main(void) {
  Suite *suite = suite_create("model");
  TCase *tc = tcase_create("model");
  tcase_add_test(tc, version_and_status_texts);
  tcase_add_test(tc, ground_exists_from_the_start);
  tcase_add_test(tc, link_names_are_checked);
  tcase_add_test(tc, joint_arguments_are_checked);
  tcase_add_test(tc, slide_axis_through_two_points);
  tcase_add_test(tc, points_and_inputs_are_checked);
  tcase_add_test(tc, registered_loops_must_be_simple_cycles);
  tcase_add_test(tc, figure_eight_is_not_a_loop);
  tcase_add_test(tc, registered_loops_must_be_a_full_independent_set);
  tcase_add_test(tc, loops_are_found_when_none_are_registered);
  tcase_add_test(tc, independent_loops_with_fractional_pivots);
  tcase_add_test(tc, disconnected_links_are_named);
  tcase_add_test(tc, inputs_must_match_the_degrees_of_freedom);
  tcase_add_test(tc, over_constrained_models);
  tcase_add_test(tc, zero_length_links);
  tcase_add_test(tc, undetermined_coordinates);
  tcase_add_test(tc, names_found_among_many);
  tcase_add_test(tc, size_limits);
  tcase_add_test(tc, builders_fail_after_finalize);
  tcase_add_test(tc, reading_the_model_back);
  tcase_add_test(tc, scale_is_the_farthest_pair_on_a_link);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
