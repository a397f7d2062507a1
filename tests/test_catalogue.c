/*
 * test_catalogue.c - a catalogue of bad input and misuse: each entry gets
 * its own status, a message naming the offending item, and leaves the
 * model or solver exactly as it was (solvers: every getter bit for bit;
 * models: the text they write).
 */
#include <check.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "suite.h"
#include "support.h"

/* A four-bar with a named coupler point, open (not finalized). */
static kl_model *open_fourbar(void) {
  kl_model *m = kl_model_new();
  int crank = kl_add_link(m, "crank"), coupler = kl_add_link(m, "coupler");
  int rocker = kl_add_link(m, "rocker");
  int pivot = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_revolute(m, crank, 40, 0, coupler, 0, 0);
  kl_add_revolute(m, coupler, 120, 0, rocker, 80, 0);
  kl_add_revolute(m, rocker, 0, 0, KL_GROUND, 100, 0);
  kl_add_point(m, coupler, 60, 30, "tip");
  kl_add_input(m, pivot);
  return m;
}

/* ---- builders on an open model ---- */

typedef struct {
  const char *what;
  int status;
  const char *says; /* the message names this */
} expectation;

static const expectation builder_cases[] = {
    {"revolute with a NaN coordinate", KL_ENONFINITE, "link 'crank'"},
    {"revolute with an infinite coordinate", KL_ENONFINITE, "NaN or infinite"},
    {"prismatic with a NaN axis", KL_ENONFINITE, "axis angle"},
    {"slot with an infinite attachment", KL_ENONFINITE, "link 'coupler'"},
    {"point with a NaN coordinate", KL_ENONFINITE, "link 'coupler'"},
    {"point on an unknown link", KL_EID, "link index 42 (0-based)"},
    {"revolute with a negative link id", KL_EID, "link index -3 (0-based)"},
    {"input on an unknown joint", KL_EID, "joint index 9 (0-based)"},
    {"input on a negative joint id", KL_EID, "joint index -1 (0-based)"},
    {"link with a name already used", KL_EDUPLICATE, "'crank'"},
    {"joint joining a link to itself", KL_ESELFJOINT, "link 'rocker'"},
    {"second revolute between the same links", KL_EDUPLICATE, "joint @1"},
    {"slide axis through two coincident points", KL_EZEROLENGTH, "zero length"},
    {"loop whose joints do not share links", KL_ELOOP, "do not share a link"},
    {"loop through an unknown joint", KL_EID, "joint index 17 (0-based)"},
    {"the same joint made an input twice", KL_EDUPLICATE, "already input 1 ("},
    {"name with a control character", KL_EINVAL, "control character"},
    {"sketch angle for ground", KL_EKIND, "ground"},
    {"sketch slide for a revolute joint", KL_EKIND, "has no slide"},
    {"sweep settings for an unknown input", KL_EID, "input index 4 (0-based)"},
    {"sweep settings with a NaN range", KL_ENONFINITE, "NaN or infinite"},
    {"sweep settings of no steps", KL_EINVAL, "at least 1"},
    {"loop whose walk does not close", KL_ELOOP, "does not come back"},
    {"joint name already used", KL_EDUPLICATE, "'motor'"},
};

static int run_builder(int i, kl_model *m) {
  static const int broken[3] = {0, 2, 3};
  static const int unknown[3] = {0, 1, 17};
  /* ground-crank then crank-coupler: each pair (the last with the first
   * too) shares the crank, but a walk from ground ends on the coupler */
  static const int back_and_forth[2] = {0, 1};
  kl_sweep_settings sw;
  switch (i) {
  case 0: return kl_add_revolute(m, 1, NAN, 0, 3, 1, 1);
  case 1: return kl_add_revolute(m, 1, 5, 5, 3, 0, INFINITY);
  case 2: return kl_add_prismatic(m, 0, 0, 0, NAN, 3, 0, 0);
  case 3: return kl_add_slot(m, 2, -INFINITY, 0, 0.0, 0, 0, 0);
  case 4: return kl_add_point(m, 2, NAN, 0, "p");
  case 5: return kl_add_point(m, 42, 0, 0, "p");
  case 6: return kl_add_revolute(m, -3, 0, 0, 1, 0, 0);
  case 7: return kl_add_input(m, 9);
  case 8: return kl_add_input(m, -1);
  case 9: return kl_add_link(m, "crank");
  case 10: return kl_add_revolute(m, 3, 0, 0, 3, 1, 0);
  case 11: return kl_add_revolute(m, 2, 5, 5, 1, 7, 7);
  case 12: return kl_add_prismatic_through(m, 0, 1, 2, 1, 2, 3, 0, 0);
  case 13: return kl_add_loop(m, 3, broken);
  case 14: return kl_add_loop(m, 3, unknown);
  case 15: return kl_add_input(m, 0);
  case 16: return kl_add_link(m, "bad\nname");
  case 17: return kl_model_set_sketch_angle(m, KL_GROUND, 1.0);
  case 18: return kl_model_set_sketch_slide(m, 1, 5.0);
  case 19:
  case 20:
  case 21:
    sw.size = sizeof sw;
    sw.input = i == 19 ? 4 : 0;
    sw.from = 0;
    sw.to = i == 20 ? NAN : 1;
    sw.steps = i == 21 ? 0 : 10;
    return kl_model_set_sweep(m, &sw);
  case 22: return kl_add_loop(m, 2, back_and_forth);
  default: return kl_model_set_joint_name(m, 1, "motor");
  }
}

static char *model_text(const kl_model *m) {
  size_t n;
  char *text;
  kl_model_write(m, NULL, 0, &n);
  text = malloc(n + 1);
  kl_model_write(m, text, n + 1, NULL);
  return text;
}

START_TEST(builders_refuse_bad_input_and_change_nothing) {
  const expectation *e = &builder_cases[_i];
  kl_model *m = open_fourbar();
  char *before, *after;
  int st;
  kl_model_set_joint_name(m, 0, "motor");
  before = model_text(m);
  st = run_builder(_i, m);
  after = model_text(m);
  ck_assert_msg(st == e->status, "%s: status %d (%s), expected %d", e->what,
                st, kl_model_error(m), e->status);
  ck_assert_msg(strstr(kl_model_error(m), e->says) != NULL,
                "%s: message '%s' lacks '%s'", e->what, kl_model_error(m),
                e->says);
  ck_assert_msg(strcmp(before, after) == 0, "%s changed the model", e->what);
  /* and the model still finalizes as it would have */
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  free(before);
  free(after);
  kl_model_free(m);
}
END_TEST

/* ---- finalize ---- */

static const expectation finalize_cases[] = {
    {"a link not connected to ground", KL_EDISCONNECTED, "link 'loose'"},
    {"a zero-length link", KL_EZEROLENGTH, "link 'stub'"},
    {"an under-driven model", KL_EDOF, "2 degrees of freedom but 1 input"},
    {"an over-driven model", KL_EDOF, "1 degree of freedom but 2 inputs"},
    {"registered loops short of a full set", KL_ELOOPSET, "1 loop is registered"},
    {"an over-constrained structure", KL_EOVERCONSTRAINED, "mobility -3"},
    {"a coordinate no loop determines", KL_EUNDETERMINED, "link 'flap'"},
};

static int run_finalize(int i, kl_model *m) {
  static const int loop[4] = {0, 1, 2, 3};
  int extra, j;
  switch (i) {
  case 0:
    kl_add_link(m, "loose");
    break;
  case 1: /* a dyad whose first link has both joints at one point */
    extra = kl_add_link(m, "stub");
    j = kl_add_link(m, "arm");
    kl_add_revolute(m, 2, 20, 0, extra, 0, 0);
    kl_add_revolute(m, extra, 0, 0, j, 0, 0);
    kl_add_revolute(m, j, 50, 0, KL_GROUND, 150, 0);
    break;
  case 2:
    extra = kl_add_link(m, "flap");
    kl_add_revolute(m, 2, 10, 0, extra, 0, 0);
    break;
  case 3:
    kl_add_input(m, 3);
    break;
  case 4: /* a dyad adds a second loop; only the first is registered */
    extra = kl_add_link(m, "arm");
    j = kl_add_link(m, "forearm");
    kl_add_revolute(m, 3, 40, 0, extra, 0, 0);
    kl_add_revolute(m, extra, 50, 0, j, 0, 0);
    kl_add_revolute(m, j, 50, 0, KL_GROUND, 150, 0);
    kl_add_loop(m, 4, loop);
    break;
  case 5:
    kl_add_revolute(m, 2, 60, 0, KL_GROUND, 50, 50);
    kl_add_revolute(m, 1, 20, 0, 3, 20, 0);
    break;
  default:
    extra = kl_add_link(m, "flap");
    kl_add_revolute(m, 2, 10, 0, extra, 0, 0);
    kl_add_input(m, 3);
  }
  return kl_model_finalize(m);
}

START_TEST(finalize_names_what_is_wrong) {
  const expectation *e = &finalize_cases[_i];
  kl_model *m = open_fourbar();
  int st = run_finalize(_i, m);
  ck_assert_msg(st == e->status, "%s: status %d (%s), expected %d", e->what,
                st, kl_model_error(m), e->status);
  ck_assert_msg(strstr(kl_model_error(m), e->says) != NULL,
                "%s: message '%s' lacks '%s'", e->what, kl_model_error(m),
                e->says);
  ck_assert(!kl_model_is_finalized(m));
  ck_assert_ptr_null(kl_solver_new(m)); /* solving before finalize */
  kl_model_free(m);
}
END_TEST

/* ---- the solver ---- */

static const expectation solver_cases[] = {
    {"position with a NaN input", KL_ENONFINITE, "input value for input 1"},
    {"position with an infinite input", KL_ENONFINITE, "input 1 ("},
    {"velocity with a NaN rate", KL_ENONFINITE,
     "input rate value for input 1"},
    {"acceleration with an infinite acceleration", KL_ENONFINITE,
     "input acceleration value for input 1"},
    {"velocity with no rates array", KL_EINVAL, "NULL"},
    {"sketch angle of ground", KL_EKIND, "ground"},
    {"sketch angle of an unknown link", KL_EID, "link index 99 (0-based)"},
    {"slide of a revolute joint", KL_EKIND, "has no slide"},
    {"NaN sketch angle", KL_ENONFINITE, "link 'coupler'"},
    {"options with a NaN tolerance", KL_ENONFINITE, "NaN"},
    {"options with an unknown kernel", KL_EINVAL, "kernel"},
    {"options with zero iterations", KL_EINVAL, "max_iterations"},
    {"sweep of an unknown input", KL_EID, "input index 3 (0-based)"},
    {"sweep over a NaN range", KL_ENONFINITE, "range of input 1"},
    {"sweep of no steps", KL_EINVAL, "0 steps"},
    {"output at an unknown point", KL_EID, "point index 8 (0-based)"},
    {"slide output of a revolute joint", KL_EKIND, "joint @1"},
    {"sensitivity to axis 2", KL_EINVAL, "axis 2"},
    {"effort of a load at an unknown point", KL_EID, "point index 5 (0-based)"},
    {"tolerance stack with a negative tolerance", KL_EINVAL, "negative"},
    {"state copied from a solver of another model", KL_EINVAL,
     "different models"},
    {"find assemblies with a foreign solver", KL_EINVAL, "modes[0]"},
};

static int run_solver(int i, kl_solver *s) {
  static kl_model *other_model;
  double bad = NAN, inf = INFINITY;
  kl_options o;
  kl_output out;
  kl_dimension dim;
  kl_load load;
  kl_range r;
  double d, t = -1.0;
  kl_options_default(&o);
  out.kind = KL_OUTPUT_POINT_X;
  out.id = 8;
  out.line_a = out.line_b = 0;
  switch (i) {
  case 0: return kl_solve_position(s, &bad);
  case 1: return kl_solve_position(s, &inf);
  case 2: return kl_solve_velocity(s, &bad);
  case 3: return kl_solve_acceleration(s, &inf);
  case 4: return kl_solve_velocity(s, NULL);
  case 5: return kl_set_link_angle(s, KL_GROUND, 0.1);
  case 6: return kl_set_link_angle(s, 99, 0.1);
  case 7: return kl_set_joint_slide(s, 1, 3.0);
  case 8: return kl_set_link_angle(s, 2, NAN);
  case 9:
    o.tolerance = NAN;
    return kl_solver_set_options(s, &o);
  case 10:
    o.kernel = 42;
    return kl_solver_set_options(s, &o);
  case 11:
    o.max_iterations = 0;
    return kl_solver_set_options(s, &o);
  case 12: return kl_solver_sweep(s, 3, 0, 1, 10, NULL, NULL, NULL);
  case 13: return kl_solver_sweep(s, 0, NAN, 1, 10, NULL, NULL, NULL);
  case 14: return kl_solver_sweep(s, 0, 0, 1, 0, NULL, NULL, NULL);
  case 15:
    r.size = sizeof r;
    return kl_output_range(s, 0, 0, 1, 4, &out, &r);
  case 16:
    out.kind = KL_OUTPUT_SLIDE;
    out.id = 1;
    return kl_output_deriv(s, &out, 0, &d);
  case 17:
    out.id = 0;
    dim.kind = KL_DIMENSION_JOINT_A;
    dim.id = 1;
    dim.axis = 2;
    return kl_output_sensitivity(s, &out, &dim, &d);
  case 18:
    load.kind = KL_LOAD_FORCE;
    load.id = 5;
    load.fx = load.fy = 1.0;
    load.torque = 0.0;
    return kl_input_effort(s, 1, &load, &d);
  case 19:
    out.id = 0;
    dim.kind = KL_DIMENSION_JOINT_A;
    dim.id = 1;
    dim.axis = 0;
    return kl_output_tolerance_stack(s, &out, 1, &dim, &t, &d, &d);
  case 20:
  case 21: {
    int st;
    kl_solver *foreign;
    fourbar other = build_fourbar(40, 120, 80, 100);
    other_model = other.m;
    foreign = kl_solver_new(other_model);
    st = i == 20 ? kl_solver_copy_state(s, foreign)
                 : kl_solver_find_assemblies(s, (double[]){1.0}, &foreign, 1);
    kl_solver_free(foreign);
    kl_model_free(other_model);
    return st;
  }
  default: return KL_OK;
  }
}

START_TEST(solver_refuses_misuse_and_keeps_its_state) {
  const expectation *e = &solver_cases[_i];
  kl_model *m = open_fourbar();
  kl_solver *s;
  double u = 1.0, w = 1.0, a = 0.0;
  snapshot before, after;
  int st;
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  kl_set_link_angle(s, 2, 0.3);
  kl_set_link_angle(s, 3, 1.5);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &a), KL_OK);
  ck_assert_int_eq(kl_solve_coefficients(s), KL_OK);
  before = snap(s);
  st = run_solver(_i, s);
  after = snap(s);
  ck_assert_msg(st == e->status, "%s: status %d (%s), expected %d", e->what,
                st, kl_solver_error(s), e->status);
  ck_assert_msg(strstr(kl_solver_error(s), e->says) != NULL,
                "%s: message '%s' lacks '%s'", e->what, kl_solver_error(s),
                e->says);
  ck_assert_msg(same_state(&before, &after), "%s changed the solver's state",
                e->what);
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* Wrong order: each stage before the one it needs, from a fresh solver. */
START_TEST(stages_out_of_order) {
  kl_model *m = open_fourbar();
  kl_solver *s;
  double u = 1.0, w = 1.0, beyond;
  snapshot before, after;
  fourbar ng = build_fourbar(70, 50, 60, 100);
  kl_solver *t = kl_solver_new(ng.m);
  kl_model_finalize(m);
  s = kl_solver_new(m);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_ESTAGE);
  ck_assert_int_eq(kl_solve_acceleration(s, &w), KL_ESTAGE);
  ck_assert_int_eq(kl_solve_coefficients(s), KL_ESTAGE);
  kl_set_link_angle(s, 2, 0.3);
  kl_set_link_angle(s, 3, 1.5);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &w), KL_ESTAGE);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "velocity"));
  /* an input beyond the motion limit of a non-Grashof four-bar (law of
   * cosines: its crank reaches 1.3694 rad), and its exact limit */
  kl_set_link_angle(t, ng.coupler, -0.2);
  kl_set_link_angle(t, ng.rocker, 1.5);
  ck_assert_int_eq(kl_solve_position(t, &u), KL_OK);
  before = snap(t);
  beyond = 1.6;
  ck_assert_int_eq(kl_solve_position(t, &beyond), KL_ENOASSEMBLY);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(t), "= 1.6 rad"));
  after = snap(t);
  ck_assert(same_state(&before, &after));
  beyond = acos((70.0 * 70 + 100.0 * 100 - 110.0 * 110) / (2 * 70.0 * 100));
  ck_assert_int_eq(kl_solve_position(t, &beyond), KL_ESINGULAR);
  after = snap(t);
  ck_assert(same_state(&before, &after));
  /* NULL handles */
  ck_assert_int_eq(kl_solve_position(NULL, &u), KL_EINVAL);
  ck_assert_int_eq(kl_add_link(NULL, "x"), KL_EINVAL);
  ck_assert_int_eq(kl_model_finalize(NULL), KL_EINVAL);
  kl_solver_free(s);
  kl_solver_free(t);
  kl_model_free(m);
  kl_model_free(ng.m);
}
END_TEST

/* Model files: every kind of error is in test_io.c's located-error table;
 * here the file-level misuse: truncated, oversized, and NUL bytes. */
START_TEST(model_files_out_of_bounds) {
  const char *good = "kinloop-model 1\nlink a\nrevolute j ground 0 0 a 0 0\n"
                     "input j\n";
  kl_io_error err;
  char *huge;
  err.size = sizeof err;
  ck_assert_ptr_null(kl_model_read(good, 30, &err));
  ck_assert_int_eq(err.status, KL_ESYNTAX);
  ck_assert_int_gt(err.line, 0);
  huge = calloc((16u << 20) + 2, 1);
  memset(huge, '#', (16u << 20) + 1);
  ck_assert_ptr_null(kl_model_read(huge, (16u << 20) + 1, &err));
  ck_assert_int_eq(err.status, KL_EINVAL);
  free(huge);
  ck_assert_ptr_null(kl_model_read("kinloop-model 1\0", 16, &err));
  ck_assert_int_eq(err.status, KL_ESYNTAX);
  ck_assert_ptr_nonnull(strstr(err.message, "NUL"));
}
END_TEST

int main(void) {
  Suite *suite = suite_create("catalogue");
  TCase *tc = tcase_create("catalogue");
  tcase_add_loop_test(tc, builders_refuse_bad_input_and_change_nothing, 0,
                      (int)(sizeof builder_cases / sizeof builder_cases[0]));
  tcase_add_loop_test(tc, finalize_names_what_is_wrong, 0,
                      (int)(sizeof finalize_cases / sizeof finalize_cases[0]));
  tcase_add_loop_test(tc, solver_refuses_misuse_and_keeps_its_state, 0,
                      (int)(sizeof solver_cases / sizeof solver_cases[0]));
  tcase_add_test(tc, stages_out_of_order);
  tcase_add_test(tc, model_files_out_of_bounds);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
