/*
 * test_io.c - model files: writing then reading gives the same model; every
 * error names its line and column; truncated, random and oversized input
 * never crash, hang or leak; reading survives refused allocations.
 */
#define _POSIX_C_SOURCE 200809L /* mkstemp, close, unlink */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "suite.h"
#include "support.h"

/* A model using every statement of the format but 'redundant' (see
 * redundancy_reads_back): units, named and unnamed links, joints and
 * points, every joint kind, names needing quotes, registered loops,
 * sketches, sweep settings, mass properties, gravity, loads of both kinds
 * (one at an unnamed point) and the working speed. Geometry chosen for the
 * test (it is only written and read, not solved): the Watt six-bar of
 * support.c, a rod driving a block on a slanted rail from its second
 * coupler, and a carrier pinned to its output rocker running in a slot. */
static kl_model *full_model(void) {
  pin_linkage p = watt_sixbar();
  kl_model *m = kl_model_new();
  kl_sweep_settings sw;
  int l, j;
  static const int loops[4][5] = {
      {0, 1, 2, 3}, {3, 4, 5, 6}, {7, 8, 9, 6, 5}, {10, 11, 6}};
  static const int sizes[4] = {4, 4, 5, 3};
  kl_model_set_units(m, KL_LENGTH_MM, KL_ANGLE_DEG);
  for (l = 1; l < p.nlinks; l++)
    kl_add_link(m, l == 2 ? "coupler \"B\"" : NULL);
  kl_add_link(m, "rod");            /* 6 */
  kl_add_link(m, "block");          /* 7 */
  kl_add_link(m, "pin carrier #8"); /* 8 */
  for (j = 0; j < p.njoints; j++)
    kl_add_revolute(m, p.a[j], p.pa[j][0], p.pa[j][1], p.b[j], p.pb[j][0],
                    p.pb[j][1]);
  kl_model_set_joint_name(m, 0, "motor");
  kl_model_set_joint_name(m, 4, "arm\\pin");
  kl_add_revolute(m, 4, 40, 5, 6, 0, 0);                        /* 7 */
  kl_add_revolute(m, 6, 120, 0, 7, 0, 0);                       /* 8 */
  kl_add_prismatic(m, KL_GROUND, 0, -30, 0.25, 7, 0, 0);        /* 9 */
  kl_model_set_joint_name(m, 9, "rail");
  kl_add_revolute(m, 5, 30, 0, 8, 0, 0);                        /* 10 */
  kl_add_slot_through(m, KL_GROUND, 150, 80, 190, 100, 8, 40, 0); /* 11 */
  kl_add_point(m, 2, 45, 20, "tip");
  kl_add_point(m, 7, 10, -3, NULL);
  kl_add_point(m, KL_GROUND, 5, 5, "datum");
  kl_add_input(m, 0);
  for (l = 0; l < 4; l++)
    kl_add_loop(m, sizes[l], loops[l]);
  kl_model_set_sketch_angle(m, 2, 1.0);
  kl_model_set_sketch_angle(m, 3, 1.9);
  kl_model_set_sketch_slide(m, 9, 77.5);
  sw.size = sizeof sw;
  sw.input = 0;
  sw.from = 0.0;
  sw.to = 2.0;
  sw.steps = 40;
  kl_model_set_sweep(m, &sw);
  {
    /* masses, loads and speed chosen for the test */
    kl_load l;
    kl_set_link_mass(m, 1, 0.25, 10.0, 0.0, 12.5);
    kl_set_link_mass(m, 2, 1.0 / 3.0, 45.0, -2.0, 800.0);
    kl_set_link_mass(m, 7, 0.0, 0.0, 0.0, 0.0); /* given, and massless */
    kl_model_set_gravity(m, 0.1, -9810.0);
    memset(&l, 0, sizeof l);
    l.kind = KL_LOAD_FORCE;
    l.id = 0;
    l.fx = 12.0;
    l.fy = -1e-3;
    kl_add_load(m, &l);
    l.id = 1; /* the unnamed point */
    l.fx = -7.5;
    kl_add_load(m, &l);
    memset(&l, 0, sizeof l);
    l.kind = KL_LOAD_TORQUE;
    l.id = 8;
    l.torque = 2.0 / 7.0;
    kl_add_load(m, &l);
    kl_model_set_speed(m, 0, 3.0, 0.04);
  }
  return m;
}

static char *write_text(const kl_model *m, size_t *len) {
  char *text;
  ck_assert_int_eq(kl_model_write(m, NULL, 0, len), KL_OK);
  text = malloc(*len + 1);
  ck_assert_int_eq(kl_model_write(m, text, *len + 1, NULL), KL_OK);
  ck_assert_uint_eq(strlen(text), *len);
  return text;
}

/* Two models are the same when every recorded item agrees; angles given in
 * degrees come back within a rounding of the conversion. */
static void assert_same_model(const kl_model *a, const kl_model *b) {
  int i, k, la, lb, ua, ub;
  kl_sweep_settings sa, sb;
  ck_assert_int_eq(kl_model_link_count(a), kl_model_link_count(b));
  ck_assert_int_eq(kl_model_joint_count(a), kl_model_joint_count(b));
  ck_assert_int_eq(kl_model_point_count(a), kl_model_point_count(b));
  ck_assert_int_eq(kl_model_input_count(a), kl_model_input_count(b));
  kl_model_units(a, &la, &ua);
  kl_model_units(b, &lb, &ub);
  ck_assert_int_eq(la, lb);
  ck_assert_int_eq(ua, ub);
  for (i = 0; i < kl_model_link_count(a); i++) {
    const char *na = kl_model_link_name(a, i), *nb = kl_model_link_name(b, i);
    ck_assert((na == NULL) == (nb == NULL));
    if (na != NULL)
      ck_assert_str_eq(na, nb);
    ck_assert(isnan(kl_model_sketch_angle(a, i)) == isnan(kl_model_sketch_angle(b, i)));
    if (!isnan(kl_model_sketch_angle(a, i)))
      ck_assert_double_le(fabs(kl_model_sketch_angle(a, i) - kl_model_sketch_angle(b, i)),
                          1e-15);
  }
  for (i = 0; i < kl_model_joint_count(a); i++) {
    int links_a[2], links_b[2];
    double pa[2][2], pb[2][2];
    const char *na = kl_model_joint_name(a, i), *nb = kl_model_joint_name(b, i);
    ck_assert_int_eq(kl_model_joint_kind(a, i), kl_model_joint_kind(b, i));
    kl_model_joint_links(a, i, links_a, pa[0], pa[1]);
    kl_model_joint_links(b, i, links_b, pb[0], pb[1]);
    ck_assert_int_eq(links_a[0], links_b[0]);
    ck_assert_int_eq(links_a[1], links_b[1]);
    for (k = 0; k < 4; k++)
      ck_assert_double_eq(pa[k / 2][k % 2], pb[k / 2][k % 2]);
    if (kl_model_joint_kind(a, i) != KL_JOINT_REVOLUTE)
      ck_assert_double_le(fabs(kl_model_joint_axis(a, i) - kl_model_joint_axis(b, i)),
                          1e-15);
    ck_assert((na == NULL) == (nb == NULL));
    if (na != NULL)
      ck_assert_str_eq(na, nb);
    ck_assert(isnan(kl_model_sketch_slide(a, i)) == isnan(kl_model_sketch_slide(b, i)));
  }
  for (i = 0; i < kl_model_point_count(a); i++) {
    double xa[2], xb[2];
    ck_assert_int_eq(kl_model_point_link(a, i, xa), kl_model_point_link(b, i, xb));
    ck_assert_double_eq(xa[0], xb[0]);
    ck_assert_double_eq(xa[1], xb[1]);
  }
  for (i = 0; i < kl_model_input_count(a); i++)
    ck_assert_int_eq(kl_model_input_joint(a, i), kl_model_input_joint(b, i));
  ck_assert_int_eq(kl_model_loop_count(a), kl_model_loop_count(b));
  for (i = 0; i < kl_model_loop_count(a); i++) {
    int ja[16], jb[16], n = kl_model_loop(a, i, ja, 16);
    ck_assert_int_eq(kl_model_loop(b, i, jb, 16), n);
    for (k = 0; k < n; k++)
      ck_assert_int_eq(ja[k], jb[k]);
  }
  for (i = 0; i < kl_model_link_count(a); i++) {
    double ma, mb, ca[2], cb[2], ia, ib;
    kl_model_link_mass(a, i, &ma, ca, &ia);
    kl_model_link_mass(b, i, &mb, cb, &ib);
    ck_assert(ma == mb && ca[0] == cb[0] && ca[1] == cb[1] && ia == ib);
  }
  {
    double ga[2], gb[2], wa, wb, csa, csb;
    int ia, ib;
    kl_model_gravity(a, ga);
    kl_model_gravity(b, gb);
    ck_assert(ga[0] == gb[0] && ga[1] == gb[1]);
    ck_assert_int_eq(kl_model_load_count(a), kl_model_load_count(b));
    for (i = 0; i < kl_model_load_count(a); i++) {
      kl_load x, y;
      kl_model_load(a, i, &x);
      kl_model_load(b, i, &y);
      ck_assert(x.kind == y.kind && x.id == y.id);
      if (x.kind == KL_LOAD_FORCE)
        ck_assert(x.fx == y.fx && x.fy == y.fy);
      else
        ck_assert(x.torque == y.torque);
    }
    ck_assert_int_eq(kl_model_speed(a, &ia, &wa, &csa), kl_model_speed(b, &ib, &wb, &csb));
    if (kl_model_speed(a, NULL, NULL, NULL) == KL_OK) {
      ck_assert_int_eq(ia, ib);
      ck_assert_double_le(fabs(wa - wb), 1e-15 * fabs(wa));
      ck_assert(csa == csb);
    }
    ck_assert_int_eq(kl_model_redundancy(a), kl_model_redundancy(b));
  }
  sa.size = sb.size = sizeof sa;
  ck_assert_int_eq(kl_model_sweep(a, &sa), kl_model_sweep(b, &sb));
  if (kl_model_sweep(a, &sa) == KL_OK) {
    kl_model_sweep(b, &sb);
    ck_assert_int_eq(sa.input, sb.input);
    ck_assert_int_eq(sa.steps, sb.steps);
    ck_assert_double_le(fabs(sa.from - sb.from), 1e-15);
    ck_assert_double_le(fabs(sa.to - sb.to), 1e-15);
  }
}

START_TEST(writing_then_reading_gives_the_same_model) {
  kl_model *m = full_model(), *back, *again;
  kl_io_error err;
  size_t len, len2;
  char *text, *text2;
  ck_assert_msg(kl_model_finalize(m) == KL_OK, "%s", kl_model_error(m));
  text = write_text(m, &len);
  err.size = sizeof err;
  back = kl_model_read(text, len, &err);
  ck_assert_msg(back != NULL, "line %d col %d: %s\n%s", err.line, err.column,
                err.message, text);
  ck_assert_int_eq(err.status, KL_OK);
  assert_same_model(m, back);
  /* the writer is canonical: the text of what was read is the same text,
   * and reading that once more still gives the same model */
  text2 = write_text(back, &len2);
  again = kl_model_read(text2, len2, &err);
  ck_assert_ptr_nonnull(again);
  assert_same_model(back, again);
  free(text);
  text = write_text(again, &len);
  ck_assert_uint_eq(len, len2);
  ck_assert_int_eq(memcmp(text, text2, len), 0);
  kl_model_free(m);
  kl_model_free(back);
  kl_model_free(again);
  free(text);
  free(text2);
}
END_TEST

/* The sketch recorded in a file chooses the branch of a new solver: a
 * four-bar sketched on its crossed branch (rocker below the ground line),
 * written and read back, solves on that branch, as the original does. */
START_TEST(a_read_model_solves_like_the_original) {
  static const char *crossed =
      "kinloop-model 1\nlink crank\nlink coupler\nlink rocker\n"
      "revolute motor ground 0 0 crank 0 0\n"
      "revolute a crank 40 0 coupler 0 0\n"
      "revolute b coupler 120 0 rocker 80 0\n"
      "revolute c rocker 0 0 ground 100 0\n"
      "input motor\nsketch angle coupler -1.1\nsketch angle rocker -1.9\n";
  kl_model *m = kl_model_read(crossed, strlen(crossed), NULL), *back;
  kl_solver *s, *t;
  double u = 0.4;
  size_t len;
  char *text;
  int l;
  ck_assert_ptr_nonnull(m);
  ck_assert_double_eq(kl_model_sketch_angle(m, 2), -1.1);
  text = write_text(m, &len);
  back = kl_model_read(text, len, NULL);
  ck_assert_ptr_nonnull(back);
  s = kl_solver_new(m);
  t = kl_solver_new(back);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_position(t, &u), KL_OK);
  ck_assert_double_lt(sin(kl_link_angle(t, 3)), 0.0);
  for (l = 0; l < kl_model_link_count(m); l++)
    ck_assert_double_eq(kl_link_angle(s, l), kl_link_angle(t, l));
  kl_solver_free(s);
  kl_solver_free(t);
  kl_model_free(m);
  kl_model_free(back);
  free(text);
}
END_TEST

/* The declared redundancy reads back too: a parallelogram with a third
 * parallel crank (geometry chosen for the test), one constraint redundant. */
START_TEST(redundancy_reads_back) {
  static const char *text =
      "kinloop-model 1\nlink crank\nlink middle\nlink third\nlink bar\n"
      "revolute motor ground 0 0 crank 0 0\n"
      "revolute - ground 50 0 middle 0 0\nrevolute - ground 100 0 third 0 0\n"
      "revolute - crank 30 0 bar 0 0\nrevolute - middle 30 0 bar 50 0\n"
      "revolute - third 30 0 bar 100 0\ninput motor\nredundant 1\n";
  kl_io_error err;
  kl_model *m, *back;
  size_t len;
  char *written;
  err.size = sizeof err;
  m = kl_model_read(text, strlen(text), &err);
  ck_assert_msg(m != NULL, "%d:%d %s", err.line, err.column, err.message);
  ck_assert_int_eq(kl_model_redundancy(m), 1);
  ck_assert_int_eq(kl_model_dof(m), 1);
  written = write_text(m, &len);
  ck_assert_ptr_nonnull(strstr(written, "\nredundant 1\n"));
  back = kl_model_read(written, len, &err);
  ck_assert_ptr_nonnull(back);
  assert_same_model(m, back);
  kl_model_free(m);
  kl_model_free(back);
  free(written);
}
END_TEST

/* `hold` gives the start value of an input other than the swept one: read
 * in degrees, held in radians, reported by kl_model_start_inputs, written
 * and read back; a sweep statement above KL_MAX_STEPS is refused
 * with the limit and the exact count, and so is kl_model_set_sweep. */
#define RAD_PER_DEG (3.14159265358979323846 / 180.0)
START_TEST(held_inputs_and_the_step_limit) {
  static const char *text =
      "kinloop-model 1\nunits length mm angle deg\nlink a\nlink b\n"
      "revolute m1 ground 0 0 a 0 0\nrevolute m2 ground 10 0 b 0 0\n"
      "input m1\ninput m2\nhold m2 at 30\nsweep m1 from 10 to 20 steps 4\n";
  static const char *too_many =
      "kinloop-model 1\nlink a\nrevolute m1 ground 0 0 a 0 0\ninput m1\n"
      "sweep m1 from 0 to 1 steps 1000000001\n";
  kl_io_error err;
  kl_sweep_settings sw;
  kl_model *m, *back;
  double u[2];
  size_t len;
  char *written;
  err.size = sizeof err;
  m = kl_model_read(text, strlen(text), &err);
  ck_assert_msg(m != NULL, "%d:%d %s", err.line, err.column, err.message);
  ck_assert_int_eq(kl_model_start_inputs(m, u), KL_OK);
  ck_assert_double_eq_tol(u[0], 10 * RAD_PER_DEG, 1e-15);
  ck_assert_double_eq_tol(u[1], 30 * RAD_PER_DEG, 1e-15);
  ck_assert(isnan(kl_model_input_hold(m, 0)));
  written = write_text(m, &len);
  ck_assert_ptr_nonnull(strstr(written, "\nhold m2 at "));
  back = kl_model_read(written, len, &err);
  ck_assert_ptr_nonnull(back);
  ck_assert_double_eq_tol(kl_model_input_hold(back, 1), 30 * RAD_PER_DEG,
                          1e-15);
  kl_model_free(back);
  free(written);
  kl_model_free(m);
  ck_assert_ptr_null(kl_model_read(too_many, strlen(too_many), &err));
  ck_assert_ptr_nonnull(strstr(err.message, "at most 10000000"));
  ck_assert_ptr_nonnull(strstr(err.message, "1000000001"));
  m = kl_model_new();
  kl_add_link(m, "a");
  kl_add_input(m, kl_add_revolute(m, KL_GROUND, 0, 0, 1, 0, 0));
  sw.size = sizeof sw;
  sw.input = 0;
  sw.from = 0;
  sw.to = 1;
  sw.steps = KL_MAX_STEPS + 1;
  ck_assert_int_eq(kl_model_set_sweep(m, &sw), KL_ETOOLARGE);
  sw.steps = KL_MAX_STEPS;
  ck_assert_int_eq(kl_model_set_sweep(m, &sw), KL_OK);
  ck_assert_int_eq(kl_model_set_input_hold(m, 1, 0.5), KL_EID);
  ck_assert_int_eq(kl_model_set_input_hold(m, 0, NAN), KL_ENONFINITE);
  kl_model_free(m);
}
END_TEST

/* `transmission JOINT between JOINT and JOINT` means
 * kl_model_set_transmission_lines: read (lines in either order), written
 * back with the line on the joint's link a first, read back alike; a
 * refused one names its line and the builder's reason. */
START_TEST(named_transmission_lines_read_and_write_back) {
  static const char *text =
      "kinloop-model 1\nunits length mm angle deg\nlink crank\nlink rod\n"
      "link lever\nrevolute shaft ground 0 0 crank 0 0\n"
      "revolute crank_pin crank 25 0 rod 0 0\n"
      "revolute elbow rod 90 0 lever 60 0\n"
      "revolute fulcrum lever 0 0 ground 80 10\ninput shaft\n"
      "transmission crank_pin between elbow and shaft\n";
  static const char *refused =
      "kinloop-model 1\nlink crank\nlink rod\nlink lever\n"
      "revolute shaft ground 0 0 crank 0 0\n"
      "revolute crank_pin crank 25 0 rod 0 0\n"
      "revolute elbow rod 90 0 lever 60 0\n"
      "revolute fulcrum lever 0 0 ground 80 10\ninput shaft\n"
      "transmission crank_pin between fulcrum and shaft\n";
  kl_io_error err;
  kl_model *m, *back;
  int shaft, elbow, pin, a = -1, b = -1;
  size_t len;
  char *written;
  err.size = sizeof err;
  m = kl_model_read(text, strlen(text), &err);
  ck_assert_msg(m != NULL, "%d:%d %s", err.line, err.column, err.message);
  shaft = kl_model_find_joint(m, "shaft");
  elbow = kl_model_find_joint(m, "elbow");
  pin = kl_model_find_joint(m, "crank_pin");
  ck_assert_int_eq(kl_model_transmission_lines(m, pin, &a, &b), KL_OK);
  ck_assert_int_eq(a, shaft);
  ck_assert_int_eq(b, elbow);
  written = write_text(m, &len);
  ck_assert_ptr_nonnull(
      strstr(written, "\ntransmission crank_pin between shaft and elbow\n"));
  back = kl_model_read(written, len, &err);
  ck_assert_msg(back != NULL, "%d:%d %s", err.line, err.column, err.message);
  a = b = -1;
  ck_assert_int_eq(kl_model_transmission_lines(back, pin, &a, &b), KL_OK);
  ck_assert_int_eq(a, shaft);
  ck_assert_int_eq(b, elbow);
  ck_assert_int_eq(kl_model_transmission_lines(back, elbow, &a, &b), KL_EID);
  kl_model_free(back);
  free(written);
  kl_model_free(m);
  ck_assert_ptr_null(kl_model_read(refused, strlen(refused), &err));
  ck_assert_int_eq(err.status, KL_EKIND);
  ck_assert_int_eq(err.line, 10);
  ck_assert_ptr_nonnull(strstr(err.message, "set transmission lines"));
}
END_TEST

/* The force statements mean what the calls they stand for mean: the cycle
 * figures of a read model, with its recorded cycle and loads, are those of
 * the same model built by calls, bit for bit (angles in radians: no
 * conversion between the two). */
START_TEST(force_statements_mean_their_calls) {
  static const char *text =
      "kinloop-model 1\nlink crank\nlink coupler\nlink rocker\n"
      "revolute motor ground 0 0 crank 0 0\nrevolute a crank 40 0 coupler 0 0\n"
      "revolute b coupler 120 0 rocker 80 0\nrevolute c rocker 0 0 ground 100 0\n"
      "point tip coupler 60 30\ninput motor\n"
      "sketch angle coupler 0.3\nsketch angle rocker 1.5\n"
      "sweep motor from 0 to 6 steps 60\n"
      "mass crank 0.2 at 20 0 inertia 30\nmass coupler 0.5 at 60 10 inertia 700\n"
      "mass rocker 0.4 at 40 0 inertia 250\ngravity 0 -9810\n"
      "load force tip 1500 -800\nload torque rocker 2e4\n"
      "speed motor 8 fluctuation 0.04\n";
  kl_model *read = kl_model_read(text, strlen(text), NULL), *built;
  kl_solver *s, *t;
  kl_cycle c, d;
  kl_cycle_summary a, b;
  kl_cycle_peak ja[4], jb[4];
  kl_load loads[2], recorded[2];
  double u = 0.0;
  int k;
  ck_assert_ptr_nonnull(read);
  built = kl_model_new();
  kl_add_link(built, "crank");
  kl_add_link(built, "coupler");
  kl_add_link(built, "rocker");
  kl_add_revolute(built, 0, 0, 0, 1, 0, 0);
  kl_add_revolute(built, 1, 40, 0, 2, 0, 0);
  kl_add_revolute(built, 2, 120, 0, 3, 80, 0);
  kl_add_revolute(built, 3, 0, 0, 0, 100, 0);
  kl_add_point(built, 2, 60, 30, "tip");
  kl_add_input(built, 0);
  kl_set_link_mass(built, 1, 0.2, 20, 0, 30);
  kl_set_link_mass(built, 2, 0.5, 60, 10, 700);
  kl_set_link_mass(built, 3, 0.4, 40, 0, 250);
  kl_model_set_gravity(built, 0, -9810);
  ck_assert_int_eq(kl_model_finalize(built), KL_OK);
  memset(loads, 0, sizeof loads);
  loads[0].kind = KL_LOAD_FORCE;
  loads[0].fx = 1500;
  loads[0].fy = -800;
  loads[1].kind = KL_LOAD_TORQUE;
  loads[1].id = 3;
  loads[1].torque = 2e4;
  for (k = 0; k < 2; k++)
    ck_assert_int_eq(kl_model_load(read, k, &recorded[k]), KL_OK);
  kl_cycle_default(&c);
  ck_assert_int_eq(kl_model_cycle(read, &c), KL_OK);
  kl_cycle_default(&d);
  d.to = 6;
  d.steps = 60;
  d.speed = 8;
  d.speed_fluctuation = 0.04;
  s = kl_solver_new(read);
  t = kl_solver_new(built);
  kl_set_link_angle(t, 2, 0.3);
  kl_set_link_angle(t, 3, 1.5);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_position(t, &u), KL_OK);
  a.size = b.size = sizeof a;
  ck_assert_int_eq(kl_cycle_summarize(s, &c, 2, recorded, &a, NULL, ja), KL_OK);
  ck_assert_int_eq(kl_cycle_summarize(t, &d, 2, loads, &b, NULL, jb), KL_OK);
  ck_assert_int_eq(a.steps_done, 61);
  ck_assert(a.flywheel_inertia == b.flywheel_inertia);
  ck_assert(a.shaking_force.rms == b.shaking_force.rms);
  for (k = 0; k < 4; k++)
    ck_assert(ja[k].peak == jb[k].peak && ja[k].rms == jb[k].rms);
  kl_solver_free(s);
  kl_solver_free(t);
  kl_model_free(read);
  kl_model_free(built);
}
END_TEST

static const char *good =
    "kinloop-model 1\n"
    "units length mm angle deg\n"
    "link crank\nlink coupler\nlink rocker\n"
    "revolute motor ground 0 0 crank 0 0\n"
    "revolute a crank 40 0 coupler 0 0\n"
    "revolute b coupler 120 0 rocker 80 0\n"
    "revolute c rocker 0 0 ground 100 0\n"
    "point tip coupler 60 30\n"
    "input motor\n"
    "sketch angle coupler 17\n"
    "sketch angle rocker 86\n"
    "mass crank 0.2 at 20 0 inertia 30\n"
    "gravity 0 -9810\n"
    "load force tip 1500 -800\n"
    "load torque coupler 2e4\n"
    "speed motor 360 fluctuation 0.05\n";

typedef struct {
  const char *text;
  int status, line, column;
  const char *says;
} bad_case;

/* Every kind of syntax error, and model errors, with where they are. */
static const bad_case bad_cases[] = {
    /* the text as a whole: line 0, as docs/model-format.md says */
    {"", KL_ESYNTAX, 0, 0, "empty model"},
    {"# only a comment\n", KL_ESYNTAX, 0, 0, "empty model"},
    {"link a\n", KL_ESYNTAX, 1, 1, "expected 'kinloop-model 1'"},
    {"kinloop-model 2\n", KL_ESYNTAX, 1, 15, "format version 2"},
    {"kinloop-model one\n", KL_ESYNTAX, 1, 15, "expected a number"},
    {"kinloop-model 1 extra\n", KL_ESYNTAX, 1, 17, "expected the end"},
    {"kinloop-model 1\nwidget a\n", KL_ESYNTAX, 2, 1, "unknown statement"},
    {"kinloop-model 1\n\"link\" a\n", KL_ESYNTAX, 2, 1, "quoted name"},
    {"kinloop-model 1\nlink 9lives\n", KL_ESYNTAX, 2, 6, "link's name"},
    {"kinloop-model 1\nlink \"open\n", KL_ESYNTAX, 2, 6, "no closing quote"},
    {"kinloop-model 1\nlink \"a\\qb\"\n", KL_ESYNTAX, 2, 8, "backslash"},
    {"kinloop-model 1\nlink a\nlink a\n", KL_EDUPLICATE, 3, 6, "already used"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 zero a 0 0\n", KL_ESYNTAX,
     3, 21, "expected a number (y on the first link)"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0\n", KL_ESYNTAX, 3,
     26, "expected a number (y on the second link), found 'the end of the "
         "line'"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 b 0 0\n", KL_ESYNTAX, 3,
     23, "no link is named 'b'"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 @5 0 0\n", KL_ESYNTAX, 3,
     23, "not the id of a link"},
    {"kinloop-model 1\nlink a\nrevolute j a 0 0 a 1 1\n", KL_ESELFJOINT, 3,
     10, "to itself"},
    {"kinloop-model 1\nlink a\nrevolute j ground 1e999 0 a 0 0\n", KL_ESYNTAX,
     3, 19, "out of range"},
    {"kinloop-model 1\nlink a\nrevolute j ground nan 0 a 0 0\n", KL_ESYNTAX, 3,
     19, "expected a number"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0x10 0 a 0 0\n", KL_ESYNTAX,
     3, 19, "expected a number"},
    {"kinloop-model 1\nlink a\nprismatic p ground 0 0 0 a 0 0\n", KL_ESYNTAX,
     3, 24, "expected 'axis'"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput k\n",
     KL_ESYNTAX, 4, 7, "no joint is named 'k'"},
    {"kinloop-model 1\nlink a\nunits length mm angle deg\n", KL_ESYNTAX, 3, 1,
     "before the first link"},
    {"kinloop-model 1\nunits length cubits angle deg\n", KL_ESYNTAX, 2, 14,
     "length unit"},
    {"kinloop-model 1\nunits length mm angle grad\n", KL_ESYNTAX, 2, 23,
     "angle unit"},
    {"kinloop-model 1\nlink a\nsketch speed a 1\n", KL_ESYNTAX, 3, 8,
     "'angle' or 'slide'"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\nsweep j from 0 to 1 steps 4\n",
     KL_ESYNTAX, 4, 1, "not an input"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput j\nsweep j from 0 to 1 steps 2.5\n",
     KL_ESYNTAX, 5, 27, "whole number"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput j\nloop j\n",
     KL_EINVAL, 5, 1, "at least 2 joints"},
    {"kinloop-model 1\nlink a\nlink b\nrevolute j ground 0 0 a 0 0\n",
     KL_EDISCONNECTED, 0, 0, "link 'b' is not connected"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\n", KL_EDOF, 0, 0,
     "1 degree of freedom but 0 inputs"},
    /* the force stage's statements: each bad value its own status, where
     * it stands */
    {"kinloop-model 1\nlink a\nmass a -1 at 0 0 inertia 1\n", KL_EINVAL, 3, 8,
     "negative mass"},
    {"kinloop-model 1\nlink a\nmass a 1 at 0 0 inertia -0.5\n", KL_EINVAL, 3,
     25, "negative moment of inertia"},
    {"kinloop-model 1\nlink a\nmass ground 1 at 0 0 inertia 1\n", KL_EKIND, 3,
     6, "ground"},
    {"kinloop-model 1\nlink a\nmass b 1 at 0 0 inertia 1\n", KL_ESYNTAX, 3, 6,
     "no link is named 'b'"},
    {"kinloop-model 1\nlink a\nmass a 1 0 0 inertia 1\n", KL_ESYNTAX, 3, 10,
     "expected 'at'"},
    {"kinloop-model 1\nlink a\nmass a 1 at 0 0\n", KL_ESYNTAX, 3, 16,
     "expected 'inertia'"},
    {"kinloop-model 1\nlink a\nmass a 1 at 0 0 inertia 1e999\n", KL_ESYNTAX, 3,
     25, "out of range"},
    {"kinloop-model 1\ngravity 0\n", KL_ESYNTAX, 2, 10, "gravity's y"},
    {"kinloop-model 1\ngravity 0 -9.81 down\n", KL_ESYNTAX, 2, 17,
     "expected the end"},
    {"kinloop-model 1\nlink a\nload push a 1\n", KL_ESYNTAX, 3, 6,
     "'force' or 'torque'"},
    {"kinloop-model 1\nlink a\nload force a 1 2\n", KL_ESYNTAX, 3, 12,
     "no point is named 'a'"},
    {"kinloop-model 1\nlink a\npoint p a 1 0\nload force p 1\n", KL_ESYNTAX, 4,
     15, "the force's y"},
    {"kinloop-model 1\nlink a\nload torque a nan\n", KL_ESYNTAX, 3, 15,
     "expected a number (the torque)"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\nspeed j 2\n",
     KL_EKIND, 4, 7, "not an input"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput j\n"
     "speed j 2 fluctuation -0.1\n",
     KL_EINVAL, 5, 23, "speed fluctuation"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput j\n"
     "speed j 2 wobble 0.1\n",
     KL_ESYNTAX, 5, 11, "expected 'fluctuation'"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput j\n"
     "speed j fast\n",
     KL_ESYNTAX, 5, 9, "the working speed"},
    {"kinloop-model 1\nredundant -2\n", KL_EINVAL, 2, 11, "-2 redundant"},
    {"kinloop-model 1\nredundant 1.5\n", KL_ESYNTAX, 2, 11, "whole number"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput j\n"
     "redundant 1\n",
     KL_EDOF, 0, 0, "plus 1 redundant constraint declared"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput j\n"
     "segment j rise 0.2 0 90\n",
     KL_ESYNTAX, 5, 16, "expected a motion law"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput j\n"
     "segment j climb 0.2 0 90\n",
     KL_ESYNTAX, 5, 11, "expected dwell, rise"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput j\n"
     "segment j rise cycloidal 0.2 0 90\nsegment j dwell 0.1 80\n",
     KL_EJOIN, 6, 9, "starts at 80 rad, but the one before ended at 90 rad"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput j\n"
     "segment j dwell -0.1 0\n",
     KL_EINVAL, 5, 9, "not positive"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\n"
     "segment j dwell 0.1 0\n",
     KL_EKIND, 4, 9, "not an input"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput j\n"
     "timetable j 0 0 0.1\n",
     KL_ESYNTAX, 5, 20, "the value at that time"},
    {"kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\ninput j\n"
     "timetable j 0 0 0.2 5 0.1 9\n",
     KL_EINVAL, 5, 11, "does not come after"},
    {"kinloop-model 1\nlink a\x01\n", KL_ESYNTAX, 2, 7, "control character"},
    {"kinloop-model 1\nlink a\n\0link b\n", KL_ESYNTAX, 3, 1, "NUL byte"},
};

/* The profile statements mean their calls (values in the file's degrees
 * come in as radians), and a written model reads back to the same
 * profile, within a rounding of the degree conversion. */
START_TEST(profile_statements_read_and_write_back) {
  static const char text[] =
      "kinloop-model 1\nunits length mm angle deg\nlink crank\n"
      "revolute motor ground 0 0 crank 0 0\ninput motor\n"
      "segment motor dwell 0.1 0\n"
      "segment motor rise mod-sine 0.25 0 120\n"
      "segment motor speed 0.2 120 180\n"
      "segment motor return poly4567 0.3 180 0\n";
  static const char table[] =
      "kinloop-model 1\nlink slider\n"
      "prismatic ram ground 0 0 axis 0 slider 0 0\ninput ram\n"
      "timetable ram 0 0 0.1 4 0.25 30 0.4 32\n";
  kl_io_error err;
  kl_model *m, *back;
  kl_segment seg;
  double out[4], again[4], t, v;
  char *written;
  size_t len;
  int k;
  err.size = sizeof err;
  m = kl_model_read(text, sizeof text - 1, &err);
  ck_assert_msg(m != NULL, "%s", err.message);
  ck_assert_int_eq(kl_model_segment_count(m), 4);
  seg.size = sizeof seg;
  ck_assert_int_eq(kl_model_segment(m, 1, &seg), KL_OK);
  ck_assert_int_eq(seg.kind, KL_SEGMENT_RISE);
  ck_assert_int_eq(seg.law, KL_LAW_MOD_SINE);
  ck_assert_double_eq_tol(seg.to, 120 * PI / 180, 1e-15);
  ck_assert_int_eq(kl_model_segment(m, 3, &seg), KL_OK);
  ck_assert_int_eq(seg.law, KL_LAW_POLY4567);
  ck_assert_double_eq_tol(kl_model_profile_duration(m), 0.85, 1e-15);
  written = write_text(m, &len);
  ck_assert_ptr_nonnull(written);
  ck_assert_ptr_nonnull(strstr(written, "segment motor return poly4567 "));
  back = kl_model_read(written, strlen(written), &err);
  ck_assert_msg(back != NULL, "%s", err.message);
  for (k = 0; k <= 17; k++) {
    ck_assert_int_eq(kl_model_profile_motion(m, 0.05 * k, out), KL_OK);
    ck_assert_int_eq(kl_model_profile_motion(back, 0.05 * k, again), KL_OK);
    ck_assert_double_le(rel_diff(again[0], out[0], 1.0), 1e-14);
    ck_assert_double_le(rel_diff(again[3], out[3], fabs(out[3]) + 1.0),
                        1e-13);
  }
  free(written);
  kl_model_free(back);
  kl_model_free(m);

  m = kl_model_read(table, sizeof table - 1, &err);
  ck_assert_msg(m != NULL, "%s", err.message);
  ck_assert_int_eq(kl_model_table_count(m), 4);
  ck_assert_int_eq(kl_model_table_point(m, 2, &t, &v), KL_OK);
  ck_assert_double_eq(t, 0.25);
  ck_assert_double_eq(v, 30.0);
  written = write_text(m, &len);
  ck_assert_ptr_nonnull(strstr(written, "timetable ram 0 0 0.10000000000000001 4"));
  back = kl_model_read(written, strlen(written), &err);
  ck_assert_msg(back != NULL, "%s", err.message);
  ck_assert_int_eq(kl_model_profile_motion(back, 0.3, again), KL_OK);
  ck_assert_int_eq(kl_model_profile_motion(m, 0.3, out), KL_OK);
  ck_assert_double_eq(again[2], out[2]);
  free(written);
  kl_model_free(back);
  kl_model_free(m);
}
END_TEST

START_TEST(every_error_names_line_and_column) {
  const bad_case *c = &bad_cases[_i];
  size_t len = strlen(c->text);
  kl_io_error err;
  kl_model *m;
  if (strstr(c->says, "NUL") != NULL)
    len = 25; /* the literal runs on past its NUL */
  err.size = sizeof err;
  m = kl_model_read(c->text, len, &err);
  ck_assert_ptr_null(m);
  ck_assert_int_eq(err.status, c->status);
  ck_assert_msg(err.line == c->line && err.column == c->column,
                "case %d: at %d:%d, expected %d:%d (%s)", _i, err.line,
                err.column, c->line, c->column, err.message);
  ck_assert_msg(strstr(err.message, c->says) != NULL,
                "case %d: '%s' lacks '%s'", _i, err.message, c->says);
}
END_TEST

/* Every prefix of a good file is read without a crash; most are errors. */
START_TEST(truncated_input_never_crashes) {
  size_t len = strlen(good), cut;
  int models = 0;
  for (cut = 0; cut <= len; cut++) {
    kl_io_error err;
    kl_model *m;
    err.size = sizeof err;
    m = kl_model_read(good, cut, &err);
    if (m != NULL) {
      models++;
      ck_assert_int_eq(err.status, KL_OK);
      kl_model_free(m);
    } else {
      ck_assert_int_lt(err.status, 0);
      ck_assert_int_gt(strlen(err.message), 0);
    }
  }
  ck_assert_int_ge(models, 1); /* the whole file, at least */
}
END_TEST

/* A small deterministic generator, so failures repeat. */
static unsigned long next_random(unsigned long *state) {
  *state = *state * 6364136223846793005UL + 1442695040888963407UL;
  return *state >> 33;
}

/* Random bytes and random edits of a good file: never a crash, always a
 * model or a status with a message. */
START_TEST(random_and_mutated_input_never_crashes) {
  unsigned long state = 12345;
  char buf[600];
  size_t base = strlen(good);
  int round;
  for (round = 0; round < 4000; round++) {
    size_t len, k;
    kl_io_error err;
    kl_model *m;
    if (round % 2 == 0) {
      len = next_random(&state) % sizeof buf;
      for (k = 0; k < len; k++)
        buf[k] = (char)(next_random(&state) & 0xff);
    } else {
      int edits = 1 + (int)(next_random(&state) % 4), e;
      memcpy(buf, good, base);
      len = base;
      for (e = 0; e < edits; e++) {
        size_t at = next_random(&state) % len;
        static const char pool[] = " \n\t\"#@-.0123456789eaxis\\";
        buf[at] = (round & 4) ? pool[next_random(&state) % (sizeof pool - 1)]
                              : (char)(next_random(&state) & 0xff);
      }
    }
    err.size = sizeof err;
    m = kl_model_read(buf, len, &err);
    if (m != NULL)
      kl_model_free(m);
    else
      ck_assert_int_lt(err.status, 0);
  }
}
END_TEST

START_TEST(oversized_and_odd_input) {
  size_t big = (16u << 20) + 1;
  char *huge = malloc(big);
  kl_io_error err;
  memset(huge, ' ', big);
  err.size = sizeof err;
  ck_assert_ptr_null(kl_model_read(huge, big, &err));
  ck_assert_int_eq(err.status, KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(err.message, "at most"));
  /* the text as a whole: line 0, column 0 (docs/model-format.md) */
  ck_assert_int_eq(err.line, 0);
  ck_assert_int_eq(err.column, 0);
  free(huge);
  ck_assert_ptr_null(kl_model_read(NULL, 10, &err));
  ck_assert_int_eq(err.status, KL_EINVAL);
  ck_assert_int_eq(err.line, 0);
  /* a line of one enormous word is refused at the word's limit */
  huge = malloc(5000);
  memcpy(huge, "kinloop-model 1\nlink ", 21);
  memset(huge + 21, 'w', 5000 - 21);
  ck_assert_ptr_null(kl_model_read(huge, 5000, &err));
  ck_assert_int_eq(err.status, KL_ESYNTAX);
  ck_assert_ptr_nonnull(strstr(err.message, "at most 255"));
  free(huge);
  /* CR LF line ends and a last line without one are fine */
  {
    const char *crlf = "kinloop-model 1\r\nlink a\r\nrevolute j ground 0 0 a "
                       "0 0\r\ninput j";
    kl_model *m = kl_model_read(crlf, strlen(crlf), &err);
    ck_assert_ptr_nonnull(m);
    kl_model_free(m);
  }
}
END_TEST

/* Line ends: LF, CR LF and a CR alone each end a line, so the same model
 * reads the same in all three (and an error is at the same line). */
START_TEST(every_line_end_reads_alike) {
  static const char *const ends[] = {"\n", "\r\n", "\r"};
  static const char *const lines[] = {
      "kinloop-model 1", "# a comment", "link crank", "link coupler",
      "link rocker", "revolute a ground 0 0 crank 0 0",
      "revolute b crank 1 0 coupler 0 0", "revolute c coupler 3 0 rocker 0 0",
      "revolute d rocker 2 0 ground 3 0", "input a",
      "sweep a from 0 to 1 steps 4"};
  kl_model *first = NULL;
  size_t e, k;
  for (e = 0; e < 3; e++) {
    char text[512], bad[512];
    kl_io_error err;
    kl_model *m;
    text[0] = '\0';
    for (k = 0; k < sizeof lines / sizeof *lines; k++) {
      strcat(text, lines[k]);
      strcat(text, ends[e]);
    }
    err.size = sizeof err;
    m = kl_model_read(text, strlen(text), &err);
    ck_assert_msg(m != NULL, "line end %lu: %s", (unsigned long)e, err.message);
    ck_assert_int_eq(kl_model_link_count(m), 4);
    ck_assert_int_eq(kl_model_joint_count(m), 4);
    if (first == NULL)
      first = m;
    else {
      assert_same_model(first, m);
      kl_model_free(m);
    }
    /* an error on line 3 is on line 3 whatever ends the lines */
    snprintf(bad, sizeof bad, "kinloop-model 1%s%slink 7x%s", ends[e], ends[e],
             ends[e]);
    ck_assert_ptr_null(kl_model_read(bad, strlen(bad), &err));
    ck_assert_int_eq(err.line, 3);
    ck_assert_int_eq(err.column, 6);
    /* and a NUL byte is located across them too */
    snprintf(bad, sizeof bad, "kinloop-model 1%slink a%s@", ends[e], ends[e]);
    bad[strlen(bad) - 1] = '\0';
    ck_assert_ptr_null(kl_model_read(bad, strlen(bad) + 1, &err));
    ck_assert_int_eq(err.line, 3);
    ck_assert_int_eq(err.column, 1);
  }
  kl_model_free(first);
}
END_TEST

/* Numbers: only overflow is an error (model-format.md); a subnormal value
 * or one that underflows to zero reads as strtod gives it. */
START_TEST(only_overflow_is_out_of_range) {
  const char *fmt = "kinloop-model 1\nlink a\nrevolute j ground 0 0 a %s 0\n"
                    "input j\n";
  static const char *const small[] = {"4.9e-324", "2.2250738585072009e-308",
                                      "1e-320", "-1e-400"};
  char text[256];
  kl_io_error err;
  size_t k;
  err.size = sizeof err;
  for (k = 0; k < sizeof small / sizeof *small; k++) {
    kl_model *m;
    double at[2];
    int links[2];
    snprintf(text, sizeof text, fmt, small[k]);
    m = kl_model_read(text, strlen(text), &err);
    ck_assert_msg(m != NULL, "%s: %s", small[k], err.message);
    ck_assert_int_eq(kl_model_joint_links(m, 0, links, NULL, at), KL_OK);
    ck_assert(at[0] == strtod(small[k], NULL));
    kl_model_free(m);
  }
  snprintf(text, sizeof text, fmt, "1e309");
  ck_assert_ptr_null(kl_model_read(text, strlen(text), &err));
  ck_assert_int_eq(err.status, KL_ESYNTAX);
  ck_assert_ptr_nonnull(strstr(err.message, "out of range"));
}
END_TEST

/* Steps: one limit, KL_MAX_STEPS, named in the message with the number as
 * written (not 1e+09 for 1000000001). */
START_TEST(steps_have_one_limit) {
  const char *fmt = "kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\n"
                    "input j\nsweep j from %s to %s steps %s\n";
  char text[256], limit[32];
  kl_io_error err;
  kl_model *m;
  kl_sweep_settings sw;
  err.size = sizeof err;
  snprintf(text, sizeof text, fmt, "0", "1", "1000000001");
  ck_assert_ptr_null(kl_model_read(text, strlen(text), &err));
  ck_assert_int_eq(err.status, KL_ETOOLARGE);
  ck_assert_int_eq(err.line, 5);
  ck_assert_int_eq(err.column, 27);
  ck_assert_ptr_nonnull(strstr(err.message, "1000000001 steps"));
  snprintf(limit, sizeof limit, "at most %d", KL_MAX_STEPS);
  ck_assert_ptr_nonnull(strstr(err.message, limit));
  snprintf(limit, sizeof limit, "%d", KL_MAX_STEPS);
  snprintf(text, sizeof text, fmt, "0", "1", limit);
  m = kl_model_read(text, strlen(text), &err);
  ck_assert_ptr_nonnull(m);
  sw.size = sizeof sw;
  ck_assert_int_eq(kl_model_sweep(m, &sw), KL_OK);
  ck_assert_int_eq(sw.steps, KL_MAX_STEPS);
  kl_model_free(m);
  snprintf(text, sizeof text, fmt, "0", "1", "0");
  ck_assert_ptr_null(kl_model_read(text, strlen(text), &err));
  ck_assert_int_eq(err.status, KL_ESYNTAX);
  ck_assert_ptr_nonnull(strstr(err.message, "from 1 to 10000000"));
  /* a range whose length overflows a double, as kl_model_set_sweep says */
  snprintf(text, sizeof text, fmt, "-1e308", "1e308", "4");
  ck_assert_ptr_null(kl_model_read(text, strlen(text), &err));
  ck_assert_int_eq(err.status, KL_ENONFINITE);
}
END_TEST

START_TEST(files_on_disk) {
  char path[] = "/tmp/kinloop-io-XXXXXX";
  kl_io_error err;
  kl_model *m, *back;
  int fd = mkstemp(path);
  ck_assert_int_ge(fd, 0);
  close(fd);
  m = kl_model_read(good, strlen(good), NULL);
  ck_assert_ptr_nonnull(m);
  err.size = sizeof err;
  ck_assert_int_eq(kl_model_write_file(m, path, &err), KL_OK);
  back = kl_model_read_file(path, &err);
  ck_assert_ptr_nonnull(back);
  assert_same_model(m, back);
  kl_model_free(back);
  unlink(path);
  ck_assert_ptr_null(kl_model_read_file(path, &err));
  ck_assert_int_eq(err.status, KL_EIO);
  ck_assert_ptr_nonnull(strstr(err.message, "cannot open"));
  ck_assert_int_eq(kl_model_write_file(m, "/nonexistent-dir/x.kinloop", &err),
                   KL_EIO);
  ck_assert_ptr_nonnull(strstr(err.message, "cannot create"));
  kl_model_free(m);
}
END_TEST

START_TEST(writer_says_what_it_needs) {
  kl_model *m = kl_model_read(good, strlen(good), NULL);
  char small[16];
  size_t need = 0;
  ck_assert_int_eq(kl_model_write(m, small, sizeof small, &need), KL_ETRUNCATED);
  ck_assert_uint_gt(need, sizeof small);
  ck_assert_uint_eq(strlen(small), sizeof small - 1); /* NUL-terminated */
  ck_assert_int_eq(kl_model_write(NULL, small, sizeof small, &need), KL_EINVAL);
  ck_assert_int_eq(kl_model_write(m, NULL, 5, &need), KL_EINVAL);
  kl_model_free(m);
}
END_TEST

/* Every allocation of reading a file refused in turn: a clean failure each
 * time, and every block given back. */
START_TEST(reading_survives_refused_allocations) {
  long n;
  int completed = 0;
  for (n = 1; !completed && n < 2000; n++) {
    counting_alloc c;
    kl_io_error err;
    kl_model *m;
    memset(&c, 0, sizeof c);
    c.fail_at = n;
    err.size = sizeof err;
    m = kl_model_read_with_alloc(good, strlen(good), counting_alloc_fn, &c,
                                 &err);
    if (m != NULL) {
      completed = c.failed == 0;
      kl_model_free(m);
    } else {
      ck_assert_int_eq(err.status, KL_ENOMEM);
    }
    ck_assert_msg(c.live == 0, "run %ld leaks %ld blocks", n, c.live);
  }
  ck_assert(completed);
}
END_TEST

/* The text of a file, NUL-terminated (NULL if unreadable). */
static char *slurp(const char *path) {
  FILE *f = fopen(path, "rb");
  char *text;
  long n;
  if (f == NULL)
    return NULL;
  fseek(f, 0, SEEK_END);
  n = ftell(f);
  fseek(f, 0, SEEK_SET);
  text = malloc((size_t)n + 1);
  if (fread(text, 1, (size_t)n, f) != (size_t)n)
    n = 0;
  text[n] = '\0';
  fclose(f);
  return text;
}

static void assert_sweeps(kl_model *m) {
  kl_solver *s = kl_solver_new(m);
  kl_sweep_settings sw;
  kl_sweep_result r;
  sw.size = sizeof sw;
  r.size = sizeof r;
  ck_assert_int_eq(kl_model_sweep(m, &sw), KL_OK);
  ck_assert_int_eq(kl_solver_sweep(s, sw.input, sw.from, sw.to, sw.steps, NULL, NULL,
                            &r),
                   KL_OK);
  ck_assert_int_eq(r.steps_done, sw.steps + 1);
  kl_solver_free(s);
}

/* The format document's example and the demo's model file read, and
 * sweep over their recorded range on the branch their sketch chooses. */
START_TEST(documented_examples_read_and_sweep) {
  char *doc = slurp(KINLOOP_SOURCE_DIR "/docs/model-format.md");
  char *demo = slurp(KINLOOP_SOURCE_DIR "/examples/models/flap-tucker.kinloop");
  const char *start, *end;
  kl_io_error err;
  kl_model *m;
  ck_assert_ptr_nonnull(doc);
  ck_assert_ptr_nonnull(demo);
  start = strstr(doc, "```\n");
  ck_assert_ptr_nonnull(start);
  start += 4;
  end = strstr(start, "```");
  ck_assert_ptr_nonnull(end);
  err.size = sizeof err;
  m = kl_model_read(start, (size_t)(end - start), &err);
  ck_assert_msg(m != NULL, "doc example: %d:%d %s", err.line, err.column,
                err.message);
  ck_assert_int_eq(kl_model_grashof(m), KL_GRASHOF_CRANK_ROCKER);
  assert_sweeps(m);
  kl_model_free(m);
  m = kl_model_read(demo, strlen(demo), &err);
  ck_assert_msg(m != NULL, "demo: %d:%d %s", err.line, err.column,
                err.message);
  assert_sweeps(m);
  kl_model_free(m);
  free(doc);
  free(demo);
}
END_TEST

/*
 * A four-bar that rocks (geometry chosen for the test): ground 100, crank
 * 80, coupler 30, rocker 90. The crank pin lies d = sqrt(80^2 + 100^2 -
 * 2 80 100 cos t) from the rocker's pivot (law of cosines) and coupler and
 * rocker span 60 to 120, so the crank rocks between acos(0.8) and
 * acos(0.125) = 82.82 deg; 170 deg lies beyond. Messages give the input as
 * the model's file gives it: in degrees under 'units ... angle deg', in
 * radians with the units unstated, and lengths with a stated unit only.
 */
START_TEST(messages_speak_the_models_units) {
  const double deg = PI / 180.0, limit = acos(0.125);
  int in_degrees;
  for (in_degrees = 0; in_degrees < 2; in_degrees++) {
    double factor = in_degrees ? 1.0 / deg : 1.0, u, at;
    char text[1024];
    const char *msg, *where;
    kl_sweep_result r;
    kl_model *m;
    kl_solver *s;
    snprintf(text, sizeof text,
             "kinloop-model 1\n%s"
             "link crank\nlink coupler\nlink rocker\n"
             "revolute motor ground 0 0 crank 0 0\n"
             "revolute crank_pin crank 80 0 coupler 0 0\n"
             "revolute rocker_pin coupler 30 0 rocker 90 0\n"
             "revolute pivot rocker 0 0 ground 100 0\n"
             "input motor\n"
             "sketch angle coupler %.17g\nsketch angle rocker %.17g\n",
             in_degrees ? "units length mm angle deg\n" : "",
             -30.0 * deg * factor, 100.0 * deg * factor);
    m = kl_model_read(text, strlen(text), NULL);
    ck_assert_ptr_nonnull(m);
    s = kl_solver_new(m);
    u = 170.0 * deg;
    ck_assert_int_eq(kl_solve_position(s, &u), KL_ENOASSEMBLY);
    msg = kl_solver_error(s);
    ck_assert_msg(strstr(msg, in_degrees ? "input 1 (motor) = 170 deg"
                                         : "input 1 (motor) = 2.967059728 rad")
                      != NULL,
                  "%s", msg);
    ck_assert_msg(strstr(msg, "loop 1 furthest") != NULL, "%s", msg);
    ck_assert_msg((strstr(msg, " mm apart") != NULL) == in_degrees, "%s", msg);
    ck_assert_msg(in_degrees == (strstr(msg, "2.967") == NULL), "%s", msg);
    /* a sweep toward the limit names it in the same unit */
    u = 60.0 * deg;
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    r.size = sizeof r;
    ck_assert_int_eq(kl_solver_sweep(s, 0, u, 100.0 * deg, 8, NULL, NULL, &r),
                     KL_LIMIT);
    msg = kl_solver_error(s);
    where = strstr(msg, "input 1 (motor) reaches a motion limit at ");
    ck_assert_msg(where != NULL, "%s", msg);
    where += strlen("input 1 (motor) reaches a motion limit at ");
    at = strtod(where, (char **)&where);
    ck_assert_msg(fabs(at - limit * factor) < 1e-8 * factor, "%s", msg);
    ck_assert_msg(strncmp(where, in_degrees ? " deg" : " rad", 4) == 0, "%s",
                  msg);
    kl_solver_free(s);
    kl_model_free(m);
  }
}
END_TEST

int main(void) {
  Suite *suite = suite_create("io");
  TCase *tc = tcase_create("io");
  tcase_set_timeout(tc, 120);
  tcase_add_test(tc, writing_then_reading_gives_the_same_model);
  tcase_add_test(tc, a_read_model_solves_like_the_original);
  tcase_add_test(tc, redundancy_reads_back);
  tcase_add_test(tc, held_inputs_and_the_step_limit);
  tcase_add_test(tc, named_transmission_lines_read_and_write_back);
  tcase_add_test(tc, force_statements_mean_their_calls);
  tcase_add_test(tc, profile_statements_read_and_write_back);
  tcase_add_test(tc, messages_speak_the_models_units);
  tcase_add_loop_test(tc, every_error_names_line_and_column, 0,
                      (int)(sizeof bad_cases / sizeof bad_cases[0]));
  tcase_add_test(tc, truncated_input_never_crashes);
  tcase_add_test(tc, random_and_mutated_input_never_crashes);
  tcase_add_test(tc, oversized_and_odd_input);
  tcase_add_test(tc, every_line_end_reads_alike);
  tcase_add_test(tc, only_overflow_is_out_of_range);
  tcase_add_test(tc, steps_have_one_limit);
  tcase_add_test(tc, files_on_disk);
  tcase_add_test(tc, writer_says_what_it_needs);
  tcase_add_test(tc, reading_survives_refused_allocations);
  tcase_add_test(tc, documented_examples_read_and_sweep);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
