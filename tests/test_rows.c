/*
 * test_rows.c - the row of every quantity: its layout, and each value
 * against the single getter it stands for, for a state at every stage and
 * for every step of a sweep.
 */
#include <check.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "suite.h"
#include "support.h"

/* A four-bar whose rocker drives a slider through a rod, with a point on
 * the coupler and one on the slider (geometry chosen for the test). */
static const char *const model_text =
    "kinloop-model 1\n"
    "link crank\nlink coupler\nlink rocker\nlink rod\nlink block\n"
    "revolute motor ground 0 0 crank 0 0\n"
    "revolute a crank 60 0 coupler 0 0\n"
    "revolute b coupler 200 0 rocker 150 0\n"
    "revolute pivot rocker 0 0 ground 220 0\n"
    "revolute arm rocker 250 0 rod 0 0\n"
    "revolute c rod 180 0 block 0 0\n"
    "prismatic rail ground 0 260 axis 0 block 0 0\n"
    "point tip coupler 100 40\n"
    "point nose block 35 0\n"
    "input motor\n"
    "sketch angle coupler 0.5\n"
    "sketch angle rocker 1.8\n"
    "sketch angle rod 0.1\n"
    "sketch slide rail 340\n";

static kl_model *read_model(const char *text) {
  kl_io_error err;
  kl_model *m;
  err.size = sizeof err;
  m = kl_model_read(text, strlen(text), &err);
  ck_assert_msg(m != NULL, "model: %s", err.message);
  return m;
}

static int block(const kl_model *m, int q, int *count) {
  int offset = kl_model_row_offset(m, q, count);
  ck_assert_int_ge(offset, 0);
  return offset;
}

/* The same number, NaN included. */
static int same(double a, double b) {
  return (isnan(a) && isnan(b)) || memcmp(&a, &b, sizeof a) == 0;
}

#define CHECK(q, i, getter_value)                                              \
  do {                                                                         \
    double want_ = (getter_value), got_ = row[block(m, (q), NULL) + (i)];      \
    ck_assert_msg(same(got_, want_), "%s %d: row %.17g, getter %.17g",        \
                  kl_quantity_str(q), (i), got_, want_);                       \
  } while (0)

/* Every value of `row` against the getters of s; the input rates,
 * accelerations and jerks against what the stages were given (`rate`,
 * `accel`, `jerk`, NULL when not solved). */
static void check_row(const kl_solver *s, const double *row,
                      const double *rate, const double *accel,
                      const double *jerk) {
  const kl_model *m = kl_solver_model(s);
  int (*const point_getter[3])(const kl_solver *, int, double *) = {
      kl_point_position, kl_point_velocity, kl_point_acceleration};
  double xy[2];
  kl_output sites[16];
  kl_solve_stats st;
  int i, g, nsites = kl_model_transmissions(m, sites, 16);
  for (i = 0; i < kl_model_input_count(m); i++) {
    CHECK(KL_QUANTITY_INPUT_VALUE, i, kl_input_value(s, i));
    CHECK(KL_QUANTITY_INPUT_RATE, i, rate != NULL ? rate[i] : NAN);
    CHECK(KL_QUANTITY_INPUT_ACCEL, i, accel != NULL ? accel[i] : NAN);
    CHECK(KL_QUANTITY_INPUT_JERK, i, jerk != NULL ? jerk[i] : NAN);
  }
  for (i = 0; i < kl_model_link_count(m); i++) {
    CHECK(KL_QUANTITY_LINK_ANGLE, i, kl_link_angle(s, i));
    CHECK(KL_QUANTITY_LINK_RATE, i, kl_link_rate(s, i));
    CHECK(KL_QUANTITY_LINK_ACCEL, i, kl_link_accel(s, i));
    CHECK(KL_QUANTITY_LINK_JERK, i, kl_link_jerk(s, i));
  }
  for (i = 0; i < kl_model_joint_count(m); i++) {
    CHECK(KL_QUANTITY_JOINT_ANGLE, i, kl_joint_angle(s, i));
    CHECK(KL_QUANTITY_JOINT_SLIDE, i, kl_joint_slide(s, i));
    CHECK(KL_QUANTITY_JOINT_SLIDE_RATE, i, kl_joint_slide_rate(s, i));
    CHECK(KL_QUANTITY_JOINT_SLIDE_ACCEL, i, kl_joint_slide_accel(s, i));
    CHECK(KL_QUANTITY_JOINT_SLIDE_JERK, i, kl_joint_slide_jerk(s, i));
  }
  for (i = 0; i < kl_model_point_count(m); i++)
    for (g = 0; g < 3; g++) {
      if (point_getter[g](s, i, xy) != KL_OK)
        xy[0] = xy[1] = NAN;
      CHECK(KL_QUANTITY_POINT_X + 2 * g, i, xy[0]);
      CHECK(KL_QUANTITY_POINT_Y + 2 * g, i, xy[1]);
    }
  for (i = 0; i < kl_model_point_count(m); i++) {
    if (kl_point_jerk(s, i, xy) != KL_OK)
      xy[0] = xy[1] = NAN;
    CHECK(KL_QUANTITY_POINT_JX, i, xy[0]);
    CHECK(KL_QUANTITY_POINT_JY, i, xy[1]);
  }
  for (i = 0; i < nsites; i++) {
    double v;
    ck_assert_int_eq(kl_output_value(s, &sites[i], &v), KL_OK);
    CHECK(KL_QUANTITY_TRANSMISSION, i, v);
  }
  st.size = sizeof st;
  kl_solver_stats(s, &st);
  if (isnan(kl_input_value(s, 0)))
    CHECK(KL_QUANTITY_RCOND, 0, NAN);
  else
    ck_assert_msg(row[block(m, KL_QUANTITY_RCOND, NULL)] > 0.0,
                  "rcond %g", row[block(m, KL_QUANTITY_RCOND, NULL)]);
}

START_TEST(layout_blocks_follow_each_other) {
  kl_model *m = read_model(model_text), *open = kl_model_new();
  const int counts[23] = {1, 1, 1, 6, 6, 6, 7, 7, 7, 7, 2, 2,
                          2, 2, 2, 2, 2, 1, 1, 6, 7, 2, 2};
  int q, next = 0, count;
  for (q = 0; kl_quantity_str(q) != NULL; q++) {
    ck_assert_int_lt(q, 23);
    ck_assert_int_eq(kl_model_row_offset(m, q, &count), next);
    ck_assert_msg(count == counts[q], "%s: %d values", kl_quantity_str(q),
                  count);
    next += count;
  }
  ck_assert_int_eq(q, 23);
  ck_assert_int_eq(kl_model_row_size(m), next);
  ck_assert_int_eq(kl_model_row_offset(m, q, &count), KL_EID);
  ck_assert_int_eq(kl_model_row_offset(m, -1, NULL), KL_EID);
  ck_assert_str_eq(kl_quantity_str(KL_QUANTITY_INPUT_VALUE), "input_value");
  ck_assert_str_eq(kl_quantity_str(KL_QUANTITY_JOINT_SLIDE_ACCEL),
                   "joint_slide_accel");
  ck_assert_str_eq(kl_quantity_str(KL_QUANTITY_POINT_VY), "point_vy");
  ck_assert_str_eq(kl_quantity_str(KL_QUANTITY_RCOND), "rcond");
  ck_assert_str_eq(kl_quantity_str(KL_QUANTITY_POINT_JY), "point_jy");
  ck_assert_ptr_null(kl_quantity_str(-1));
  ck_assert_int_eq(kl_model_row_size(open), KL_ESTATE);
  ck_assert_int_eq(kl_model_row_offset(open, 0, NULL), KL_ESTATE);
  ck_assert_int_eq(kl_model_row_size(NULL), KL_EINVAL);
  ck_assert_int_eq(kl_model_row_offset(NULL, 0, NULL), KL_EINVAL);
  kl_model_free(m);
  kl_model_free(open);
}
END_TEST

START_TEST(row_holds_each_getters_value_at_every_stage) {
  kl_model *m = read_model(model_text);
  kl_solver *s = kl_solver_new(m);
  double *row = malloc((size_t)kl_model_row_size(m) * sizeof *row);
  double u = 0.7, w = 6.3, al = -2.0, ze = 4.5;
  ck_assert_int_eq(kl_solver_row(s, row), KL_OK); /* the sketch */
  check_row(s, row, NULL, NULL, NULL);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  kl_solver_row(s, row);
  check_row(s, row, NULL, NULL, NULL);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  kl_solver_row(s, row);
  check_row(s, row, &w, NULL, NULL);
  ck_assert_int_eq(kl_solve_acceleration(s, &al), KL_OK);
  kl_solver_row(s, row);
  check_row(s, row, &w, &al, NULL);
  ck_assert_int_eq(kl_solve_jerk(s, &ze), KL_OK);
  kl_solver_row(s, row);
  check_row(s, row, &w, &al, &ze);
  /* a sketch after a solve: the position is the sketch's, rates gone */
  kl_set_link_angle(s, 2, 0.6);
  kl_solver_row(s, row);
  ck_assert(isnan(row[block(m, KL_QUANTITY_RCOND, NULL)]));
  ck_assert(isnan(row[block(m, KL_QUANTITY_LINK_RATE, NULL) + 2]));
  ck_assert_int_eq(kl_solver_row(s, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_solver_row(NULL, row), KL_EINVAL);
  free(row);
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

typedef struct {
  double *rows;
  int size, calls;
} recorder;

static int record(const kl_solver *s, int step, double input, void *user) {
  recorder *r = user;
  double one = 1.0, zero = 0.0;
  (void)input;
  kl_solver_row(s, r->rows + (size_t)step * (size_t)r->size);
  check_row(s, r->rows + (size_t)step * (size_t)r->size, &one, &zero, &zero);
  r->calls++;
  return 0;
}

START_TEST(sweep_rows_are_the_rows_of_each_step) {
  kl_model *m = read_model(model_text);
  kl_solver *s = kl_solver_new(m), *t = kl_solver_new(m);
  const int steps = 36, size = kl_model_row_size(m);
  double *rows = malloc((size_t)(steps + 1) * (size_t)size * sizeof *rows);
  double *want = malloc((size_t)(steps + 1) * (size_t)size * sizeof *want);
  kl_sweep_result a, b;
  recorder r;
  int k;
  a.size = b.size = sizeof a;
  r.rows = want;
  r.size = size;
  r.calls = 0;
  kl_solver_copy_state(t, s);
  ck_assert_int_eq(kl_solver_sweep(t, 0, 0.0, 2 * PI, steps, record, &r, &a),
                   KL_OK);
  ck_assert_int_eq(r.calls, steps + 1);
  ck_assert_int_eq(kl_solver_sweep_rows(s, 0, 0.0, 2 * PI, steps, rows, &b),
                   KL_OK);
  ck_assert_int_eq(b.steps_done, a.steps_done);
  for (k = 0; k < (steps + 1) * size; k++)
    ck_assert_msg(same(rows[k], want[k]), "value %d: %.17g, %.17g", k,
                  rows[k], want[k]);
  free(rows);
  free(want);
  kl_solver_free(s);
  kl_solver_free(t);
  kl_model_free(m);
}
END_TEST

/* Non-Grashof four-bar (ground 100, crank 70, coupler 50, rocker 60): its
 * crank stops short of pi, so the rows past the limit are NaN. */
START_TEST(sweep_rows_after_a_limit_are_nan) {
  fourbar f = build_fourbar(70, 50, 60, 100);
  kl_solver *s = kl_solver_new(f.m);
  const int steps = 40, size = kl_model_row_size(f.m);
  double *rows = malloc((size_t)(steps + 1) * (size_t)size * sizeof *rows);
  int k, angle = kl_model_row_offset(f.m, KL_QUANTITY_LINK_ANGLE, NULL);
  kl_sweep_result res;
  res.size = sizeof res;
  kl_set_link_angle(s, f.coupler, -0.2);
  kl_set_link_angle(s, f.rocker, 1.5);
  ck_assert_int_eq(kl_solver_sweep_rows(s, 0, 0.0, PI, steps, rows, &res),
                   KL_LIMIT);
  ck_assert_int_gt(res.steps_done, 0);
  ck_assert_int_lt(res.steps_done, steps + 1);
  for (k = 0; k <= steps; k++) {
    double v = rows[(size_t)k * (size_t)size + (size_t)angle + 3];
    ck_assert_msg(k < res.steps_done ? !isnan(v) : isnan(v),
                  "step %d of %d delivered: rocker %g", k, res.steps_done, v);
  }
  for (k = (res.steps_done) * size; k < (steps + 1) * size; k++)
    ck_assert(isnan(rows[k]));
  ck_assert_int_eq(kl_solver_sweep_rows(s, 0, 0.0, PI, steps, NULL, &res),
                   KL_EINVAL);
  ck_assert_int_eq(kl_solver_sweep_rows(NULL, 0, 0.0, PI, steps, rows, &res),
                   KL_EINVAL);
  ck_assert_int_eq(kl_solver_sweep_rows(s, 4, 0.0, PI, steps, rows, &res),
                   KL_EID);
  free(rows);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("rows");
  TCase *tc = tcase_create("rows");
  tcase_add_test(tc, layout_blocks_follow_each_other);
  tcase_add_test(tc, row_holds_each_getters_value_at_every_stage);
  tcase_add_test(tc, sweep_rows_are_the_rows_of_each_step);
  tcase_add_test(tc, sweep_rows_after_a_limit_are_nan);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
