/*
 * test_study.c - design studies: a grid against the slider-crank's closed
 * form, the random stream's distributions, Monte Carlo against the
 * first-order estimate, determinism over threads and split runs, counted
 * failures, the summary's statistics, located errors, reading apart from
 * preparing, and a study that holds its model.
 */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "suite.h"
#include "support.h"

/* An offset slider-crank (geometry chosen for the test): crank 30 at the
 * origin, rod 100, the block on a rail at height 12 in +x. */
static const char *slider_model =
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
    "sweep motor from 0 to 360 steps 36\n";

static char dir[64];
static kl_model *slider; /* slider_model, read in setup */

static void write_file(const char *name, const char *text) {
  char path[128];
  FILE *f;
  snprintf(path, sizeof path, "%s/%s", dir, name);
  f = fopen(path, "w");
  ck_assert_ptr_nonnull(f);
  fputs(text, f);
  fclose(f);
}

static void remove_file(const char *name) {
  char path[128];
  snprintf(path, sizeof path, "%s/%s", dir, name);
  unlink(path);
}

static kl_model *read_model(const char *text) {
  kl_io_error err;
  kl_model *m;
  err.size = sizeof err;
  m = kl_model_read(text, strlen(text), &err);
  ck_assert_msg(m != NULL, "%d:%d %s", err.line, err.column, err.message);
  return m;
}

static void setup(void) {
  strcpy(dir, "/tmp/kinloop-study-XXXXXX");
  ck_assert_ptr_nonnull(mkdtemp(dir));
  write_file("slider.kinloop", slider_model);
  slider = read_model(slider_model);
}

static void teardown(void) {
  kl_model_free(slider);
  remove_file("slider.kinloop");
  rmdir(dir);
}

/* A study of model m, read and prepared. */
static kl_study *read_study_of(const char *text, const kl_model *m) {
  kl_io_error err;
  kl_study *st;
  int status;
  err.size = sizeof err;
  st = kl_study_read(text, strlen(text), m, &err);
  ck_assert_msg(st != NULL, "%d:%d %s", err.line, err.column, err.message);
  status = kl_study_prepare(st);
  ck_assert_msg(status == KL_OK, "prepare: %s", kl_study_error(st));
  return st;
}

static kl_study *read_study(const char *text) {
  return read_study_of(text, slider);
}

typedef struct {
  double *values, *dims;
  int *status;
  long n;
} run;

static run run_all(const kl_study *st, int threads) {
  run r;
  r.n = kl_study_sample_count(st);
  r.values = malloc((size_t)r.n * (size_t)kl_study_output_count(st) * sizeof(double));
  r.dims = malloc((size_t)r.n * (size_t)kl_study_dimension_count(st) *
                  sizeof(double) + sizeof(double));
  r.status = malloc((size_t)r.n * sizeof(int));
  ck_assert_int_eq(kl_study_run(st, 0, r.n, threads, r.values, r.status, r.dims),
                   KL_OK);
  return r;
}

static void free_run(run *r) {
  free(r->values);
  free(r->dims);
  free(r->status);
}

/*
 * A grid over crank length r and rail offset e; the stroke of an offset
 * slider-crank is sqrt((l + r)^2 - e^2) - sqrt((l - r)^2 - e^2) (the two
 * dead centres, crank and rod in line; standard kinematics).
 */
START_TEST(grid_matches_the_slider_crank_closed_form) {
  kl_study *st = read_study("kinloop-study 1\n"
                            "model slider.kinloop\n"
                            "grid joint pin a x from 20 to 40 steps 4\n"
                            "grid joint rail a y from 0 to 10 steps 2\n"
                            "output stroke swing slide rail\n");
  run r = run_all(st, 2);
  long i;
  ck_assert_int_eq(r.n, 5 * 3);
  ck_assert_int_eq(kl_study_dimension_count(st), 2);
  ck_assert_str_eq(kl_study_dimension_name(st, 0), "pin a x");
  for (i = 0; i < r.n; i++) {
    double crank = r.dims[2 * i], offset = r.dims[2 * i + 1], l = 100;
    double stroke = sqrt((l + crank) * (l + crank) - offset * offset) -
                    sqrt((l - crank) * (l - crank) - offset * offset);
    /* the grid's values, the first dimension fastest */
    ck_assert_double_eq(crank, 20 + 5 * (i % 5));
    ck_assert_double_eq(offset, 5 * (i / 5));
    ck_assert_int_eq(r.status[i], KL_SAMPLE_OK);
    ck_assert_double_le(fabs(r.values[i] - stroke), 1e-9);
  }
  free_run(&r);
  kl_study_free(st);
}
END_TEST

/*
 * A torque load and a joint-angle output, over a grid of crank lengths.
 * Effort: a torque T on the crank itself is balanced by an input torque -T
 * at every position (virtual work: (T_in + T) dtheta = 0), so the largest
 * in size is -T. Joint angle at the wrist (block minus rod, the header's
 * definition) at a crank angle of 90 degrees: the crank pin is at (0, r),
 * the block's pin at height 12 a rod's length away, so the rod's angle is
 * asin((12 - r) / 100) and the block's is 0 (elementary geometry).
 */
START_TEST(torque_loads_and_joint_angles) {
  kl_study *st = read_study("kinloop-study 1\n"
                            "model slider.kinloop\n"
                            "grid joint pin a x from 20 to 40 steps 2\n"
                            "load torque crank 5\n"
                            "output hold effort\n"
                            "output wrist at 90 joint-angle wrist\n");
  run r = run_all(st, 1);
  long i;
  for (i = 0; i < r.n; i++) {
    double crank = r.dims[i];
    double wrist_deg = -asin((12 - crank) / 100) * 180 / PI;
    ck_assert_int_eq(r.status[i], KL_SAMPLE_OK);
    ck_assert_double_le(fabs(r.values[2 * i] + 5), 1e-9);
    ck_assert_msg(fabs(r.values[2 * i + 1] - wrist_deg) <= 1e-9,
                  "crank %g: wrist %.15g deg, geometry %.15g", crank,
                  r.values[2 * i + 1], wrist_deg);
  }
  free_run(&r);
  kl_study_free(st);
}
END_TEST

/*
 * A grid over a crank-rocker's coupler: 120, and 140, where ground 100,
 * crank 40, coupler 140, rocker 80 meet the Grashof change point (s + l =
 * p + q: 40 + 140 = 80 + 100), all four pins in line at crank angle 0. The
 * sweep from 10 to 370 degrees passes it, where continuation cannot choose
 * a branch: that sample counts as not assembled, its output NaN. The other
 * sample's rocker swing is the angle between the rocker's two dead-centre
 * positions, crank and coupler in line (pin at a + b and b - a from the
 * crank pivot): by the law of cosines cos psi = (c^2 + d^2 - r^2) / (2 c d)
 * (standard kinematics).
 */
static const char fourbar_model[] =
    "kinloop-model 1\n"
    "units length mm angle deg\n"
    "link crank\nlink coupler\nlink rocker\n"
    "revolute motor ground 0 0 crank 0 0\n"
    "revolute crank_pin crank 40 0 coupler 0 0\n"
    "revolute rocker_pin coupler 120 0 rocker 80 0\n"
    "revolute pivot rocker 0 0 ground 100 0\n"
    "input motor\n"
    "sketch angle coupler 36\nsketch angle rocker 63\n"
    "sweep motor from 10 to 370 steps 36\n";

START_TEST(a_change_point_sample_is_not_assembled) {
  const double a = 40, b = 120, c = 80, d = 100;
  const double swing = (acos((c * c + d * d - (a + b) * (a + b)) / (2 * c * d)) -
                        acos((c * c + d * d - (b - a) * (b - a)) / (2 * c * d))) *
                       180 / PI;
  kl_model *m = read_model(fourbar_model);
  kl_study *st;
  run r;
  st = read_study_of("kinloop-study 1\n"
                     "model fourbar.kinloop\n"
                     "grid joint rocker_pin a x from 120 to 140 steps 1\n"
                     "output swing swing angle rocker\n",
                     m);
  kl_model_free(m); /* the study holds it */
  r = run_all(st, 1);
  ck_assert_int_eq(r.status[0], KL_SAMPLE_OK);
  ck_assert_msg(fabs(fabs(r.values[0]) - fabs(swing)) <= 1e-8,
                "swing %.12g deg, law of cosines %.12g", r.values[0], swing);
  ck_assert_int_eq(r.status[1], KL_SAMPLE_NO_ASSEMBLY);
  ck_assert(isnan(r.values[1]));
  free_run(&r);
  kl_study_free(st);
}
END_TEST

/* The random stream: uniform dimensions stay within their tolerance with
 * variance t^2 / 3; normal ones have sd t / 3 and about 99.73 % within
 * +-3 sd (statistics of the distributions; the tolerances below allow four
 * standard errors at n = 4000). */
START_TEST(the_random_stream_has_the_stated_distributions) {
  kl_study *st = read_study("kinloop-study 1\n"
                            "model slider.kinloop\n"
                            "seed 7\nsamples 4000\n"
                            "vary joint pin a x tolerance 0.3 uniform\n"
                            "vary point nose y tolerance 0.6 normal\n"
                            "output nose at 90 y nose\n");
  run r = run_all(st, 0);
  double su = 0, suu = 0, sn = 0, snn = 0, n = (double)r.n;
  long i, inside = 0;
  for (i = 0; i < r.n; i++) {
    double du = r.dims[2 * i] - 30.0, dn = r.dims[2 * i + 1];
    ck_assert_double_le(fabs(du), 0.3);
    su += du;
    suu += du * du;
    sn += dn;
    snn += dn * dn;
    inside += fabs(dn) <= 0.6;
  }
  ck_assert_double_le(fabs(su / n), 4 * 0.3 / sqrt(3 * n));
  ck_assert_double_le(fabs(suu / n / (0.09 / 3) - 1), 4 * sqrt(0.8 / n));
  ck_assert_double_le(fabs(sn / n), 4 * 0.2 / sqrt(n));
  ck_assert_double_le(fabs(sqrt(snn / n) / 0.2 - 1), 4 / sqrt(2 * n));
  ck_assert_double_le(fabs(inside / n - 0.9973), 4 * sqrt(0.0027 / n));
  free_run(&r);
  kl_study_free(st);
}
END_TEST

/* With small tolerances the output is nearly linear in them: the Monte
 * Carlo standard deviation agrees with the first-order estimate from the
 * sensitivities (within 10 %: the sampling error of a standard deviation
 * is about 1 / sqrt(2 n), 1.6 % at n = 2000). */
START_TEST(monte_carlo_agrees_with_first_order) {
  kl_study *st = read_study("kinloop-study 1\n"
                            "model slider.kinloop\n"
                            "seed 99\nsamples 2000\n"
                            "vary joint pin a x tolerance 0.05 normal\n"
                            "vary joint wrist a x tolerance 0.05 normal\n"
                            "vary joint rail a y tolerance 0.1 uniform\n"
                            "output stroke swing slide rail\n"
                            "output at90 at 90 slide rail\n"
                            "output rod_max max angle rod\n");
  run r = run_all(st, 0);
  int k;
  for (k = 0; k < 3; k++) {
    kl_study_summary s;
    s.size = sizeof s;
    ck_assert_int_eq(kl_study_summarize(st, k, r.values, r.status, r.n, &s),
                     KL_OK);
    ck_assert_int_eq(s.assembled, r.n);
    ck_assert_msg(fabs(s.std / s.first_order_std - 1) < 0.10,
                  "%s: Monte Carlo %g, first order %g", kl_study_output_name(st, k),
                  s.std, s.first_order_std);
    ck_assert_double_le(fabs(s.mean - s.nominal), 4 * s.std / sqrt((double)r.n) +
                                                     1e-3 * s.std);
  }
  free_run(&r);
  kl_study_free(st);
}
END_TEST

/* The same numbers on any number of threads, and in pieces. */
START_TEST(results_do_not_depend_on_threads_or_splits) {
  kl_study *st = read_study("kinloop-study 1\n"
                            "model slider.kinloop\n"
                            "seed 3\nsamples 60\n"
                            "vary joint pin a x tolerance 0.5 normal\n"
                            "vary joint rail a y tolerance 1 uniform\n"
                            "output stroke swing slide rail\n"
                            "output reach reach\n");
  run one = run_all(st, 1), three = run_all(st, 3);
  double values[60 * 2];
  int status[60];
  ck_assert_int_eq(memcmp(one.values, three.values, sizeof values), 0);
  ck_assert_int_eq(memcmp(one.status, three.status, sizeof status), 0);
  ck_assert_int_eq(kl_study_run(st, 0, 25, 2, values, status, NULL), KL_OK);
  ck_assert_int_eq(kl_study_run(st, 25, 35, 1, values + 50, status + 25, NULL),
                   KL_OK);
  ck_assert_int_eq(memcmp(one.values, values, sizeof values), 0);
  ck_assert_int_eq(kl_study_run(st, 50, 11, 1, values, status, NULL), KL_EINVAL);
  free_run(&one);
  free_run(&three);
  kl_study_free(st);
}
END_TEST

/* Ranges of samples are checked without overflow: a count near LONG_MAX,
 * or a first sample near it, is refused (KL_EINVAL), never wrapped into a
 * range that passes (and writes past the arrays, or runs samples that do
 * not exist); nothing is written. */
START_TEST(sample_ranges_never_wrap) {
  kl_study *st = read_study("kinloop-study 1\n"
                            "model slider.kinloop\n"
                            "seed 3\nsamples 8\n"
                            "vary joint pin a x tolerance 0.5 normal\n"
                            "output stroke swing slide rail\n");
  static const long bad[][2] = {
      {10, LONG_MAX},         {0, LONG_MAX},          {LONG_MAX - 5, 10},
      {LONG_MAX, LONG_MAX},   {LONG_MAX, 0},          {9, 0},
      {8, 1},                 {1, 8},                 {-1, 2},
      {0, -1},                {LONG_MIN, LONG_MAX},   {LONG_MAX - 1, 2}};
  double values[8], dims[8];
  int status[8], k;
  for (k = 0; k < 8; k++) {
    values[k] = dims[k] = 42.0;
    status[k] = 42;
  }
  for (k = 0; k < (int)(sizeof bad / sizeof *bad); k++) {
    ck_assert_msg(kl_study_run(st, bad[k][0], bad[k][1], 1, values, status,
                               dims) == KL_EINVAL,
                  "first %ld count %ld", bad[k][0], bad[k][1]);
  }
  for (k = 0; k < 8; k++)
    ck_assert(values[k] == 42.0 && dims[k] == 42.0 && status[k] == 42);
  /* the edges themselves are fine: the last sample, and none after it */
  ck_assert_int_eq(kl_study_run(st, 7, 1, 1, values, status, dims), KL_OK);
  ck_assert_int_eq(kl_study_run(st, 8, 0, 1, values, status, dims), KL_OK);
  kl_study_free(st);
}
END_TEST

/* An 'at' output outside the sweep but within the step limit is judged
 * there (reached by continuation in the sweep's step length): the slide
 * at 720 degrees is the slide at 0, one full turn later (the motion is
 * periodic; common practice, no source). */
START_TEST(an_at_output_beyond_the_sweep_within_the_limit) {
  kl_study *st = read_study("kinloop-study 1\n"
                            "model slider.kinloop\n"
                            "samples 1\n"
                            "output home at 0 slide rail\n"
                            "output twice at 720 slide rail\n");
  double values[2];
  int status;
  ck_assert_int_eq(kl_study_run(st, 0, 1, 1, values, &status, NULL), KL_OK);
  ck_assert_int_eq(status, KL_SAMPLE_OK);
  ck_assert_double_eq_tol(values[1], values[0], 1e-9);
  kl_study_free(st);
}
END_TEST

/* Tolerances large enough that some cranks cannot turn fully: the crank
 * reaches up to 30 + 3 * 25 mm against a 100 mm rod on a 12 mm offset, and
 * a crank longer than rod - offset = 88 mm locks before a full turn (the
 * slider-crank's rotatability condition, common practice, no source). Those
 * samples are counted as limited, never dropped, and never within limits;
 * their stroke covers the part of the turn they reach. */
START_TEST(samples_that_cannot_turn_are_counted) {
  kl_study *st = read_study("kinloop-study 1\n"
                            "model slider.kinloop\n"
                            "seed 11\nsamples 300\n"
                            "vary joint pin a x tolerance 75 normal\n"
                            "output stroke swing slide rail\n"
                            "output reach reach\n"
                            "limit stroke 0 1000\n");
  run r = run_all(st, 0);
  kl_study_summary s;
  long i, limited = 0, failed = 0;
  for (i = 0; i < r.n; i++) {
    if (r.status[i] == KL_SAMPLE_LIMITED) {
      limited++;
      ck_assert_double_gt(r.dims[i], 100 - 12 - 1e-6);
      ck_assert_double_lt(r.values[2 * i + 1], 360.0); /* reach, in degrees */
    } else if (r.status[i] == KL_SAMPLE_OK) {
      ck_assert_double_lt(r.dims[i], 100 - 12 + 1e-6);
      ck_assert_double_eq(r.values[2 * i + 1], 360.0);
    } else {
      failed++;
      ck_assert(isnan(r.values[2 * i]));
    }
  }
  s.size = sizeof s;
  kl_study_summarize(st, 0, r.values, r.status, r.n, &s);
  ck_assert_int_gt(limited, 0);
  ck_assert_int_eq(s.samples, 300);
  ck_assert_int_eq(s.limited, limited);
  ck_assert_int_eq(s.assembled, 300 - failed);
  ck_assert_int_eq(s.within_limits, 300 - failed - limited);
  free_run(&r);
  kl_study_free(st);
}
END_TEST

static int compare(const void *a, const void *b) {
  double x = *(const double *)a, y = *(const double *)b;
  return x < y ? -1 : x > y;
}

/* Mean, sample standard deviation, linear-interpolation percentiles, the
 * worst case with and without limits, recomputed independently here. */
START_TEST(summary_statistics) {
  kl_study *st = read_study("kinloop-study 1\n"
                            "model slider.kinloop\n"
                            "samples 9\n"
                            "vary joint pin a x tolerance 1 normal\n"
                            "output stroke swing slide rail\n"
                            "output free swing slide rail\n"
                            "limit stroke 59.5 60.5\n");
  double values[12], v[6], mean, ss = 0, at, worst = -1;
  int status[6] = {KL_SAMPLE_OK, KL_SAMPLE_OK, KL_SAMPLE_NO_ASSEMBLY,
                   KL_SAMPLE_OK, KL_SAMPLE_OK, KL_SAMPLE_OK};
  static const double given[6] = {60.2, 59.1, 0.0, 60.0, 61.3, 59.9};
  kl_study_summary s, t;
  int i, n = 0, worst_i = -1;
  for (i = 0; i < 6; i++) {
    values[2 * i] = values[2 * i + 1] = given[i];
    if (status[i] == KL_SAMPLE_OK)
      v[n++] = given[i];
  }
  s.size = t.size = sizeof s;
  ck_assert_int_eq(kl_study_summarize(st, 0, values, status, 6, &s), KL_OK);
  ck_assert_int_eq(kl_study_summarize(st, 1, values, status, 6, &t), KL_OK);
  mean = (v[0] + v[1] + v[2] + v[3] + v[4]) / 5;
  for (i = 0; i < 5; i++)
    ss += (v[i] - mean) * (v[i] - mean);
  qsort(v, 5, sizeof v[0], compare);
  ck_assert_int_eq(s.assembled, 5);
  ck_assert_double_le(fabs(s.mean - mean), 1e-12);
  ck_assert_double_le(fabs(s.std - sqrt(ss / 4)), 1e-12);
  ck_assert_double_eq(s.min, 59.1);
  ck_assert_double_eq(s.max, 61.3);
  at = 0.95 * 4; /* p95 between the 4th and 5th sorted values */
  ck_assert_double_le(fabs(s.p95 - (v[3] + (at - 3) * (v[4] - v[3]))), 1e-12);
  ck_assert_double_eq(s.p50, v[2]);
  /* with limits: the value furthest outside them, 61.3 (0.8 above) */
  ck_assert_double_eq(s.worst, 61.3);
  ck_assert_int_eq(s.worst_sample, 4);
  ck_assert_int_eq(s.within_limits, 3); /* 60.2, 60.0 and 59.9 */
  /* without: the value furthest from the nominal stroke */
  for (i = 0; i < 6; i++)
    if (status[i] == KL_SAMPLE_OK &&
        fabs(given[i] - t.nominal) > worst) {
      worst = fabs(given[i] - t.nominal);
      worst_i = i;
    }
  ck_assert_int_eq(t.worst_sample, worst_i);
  ck_assert_int_eq(t.within_limits, 5);
  ck_assert_int_eq(kl_study_summarize(st, 2, values, status, 6, &s), KL_EID);
  kl_study_free(st);
}
END_TEST

typedef struct {
  const char *text;
  int status, line;
  const char *says;
} bad_study;

static const bad_study bad_studies[] = {
    {"model slider.kinloop\n", KL_ESYNTAX, 1, "kinloop-study 1"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "vary joint pin a x tolerance 0.1 normal\n"
     "vary joint pin a x tolerance 5 normal\n",
     KL_ESYNTAX, 5, "varies already, on line 4"},
    {"kinloop-study 1\nmodel slider.kinloop\n"
     "grid point nose y from 0 to 1 steps 2\n"
     "grid point nose y from 1 to 2 steps 2\n",
     KL_ESYNTAX, 4, "varies already, on line 3"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "output s swing slide rail\nlimit s 0 1\nlimit s 0 2\n",
     KL_ESYNTAX, 6, "this output's 'limit' is given already, on line 5"},
    {"", KL_ESYNTAX, 0, "empty study"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n", KL_ESYNTAX, 0,
     "judges no output"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "vary joint pin a x tolerance 0.1 normal\n"
     "grid joint rail a y from 0 to 1 steps 2\noutput s swing slide rail\n",
     KL_ESYNTAX, 0, "mixes 1 grid and 1 tolerance"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "grid joint rail a y from 0 to 1 steps 2\noutput s swing slide rail\n",
     KL_ESYNTAX, 0, "leave 'samples' out"},
    {"kinloop-study 1\nmodel slider.kinloop\n"
     "grid joint rail a y from 0 to 1 steps 100000\n"
     "grid joint pin a x from 20 to 40 steps 100000\n"
     "output s swing slide rail\n",
     KL_ESYNTAX, 0, "at most 1e9"},
    {"kinloop-study 1\nmodel slider.kinloop\nmodel slider.kinloop\n", KL_ESYNTAX,
     3, "a study has one 'model'"},
    {"kinloop-study 1\nmodel\n", KL_ESYNTAX, 2, "expected the model file's path"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\nload weight nose 1\n",
     KL_ESYNTAX, 4, "force"},
    {"kinloop-study 1\nmodel slider.kinloop\nseed 1\nseed 2\n", KL_ESYNTAX,
     4, "'seed' is given already, on line 3"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\nsamples 50\n",
     KL_ESYNTAX, 4, "'samples' is given already"},
    {"kinloop-study 1\nmodel slider.kinloop\n"
     "sweep motor from 0 to 360 steps 36\n"
     "sweep motor from 0 to 180 steps 36\n",
     KL_ESYNTAX, 4, "'sweep' is given already, on line 3"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "vary joint nobody a x tolerance 1 normal\noutput s swing slide rail\n",
     KL_ESYNTAX, 4, "no joint is named 'nobody'"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "vary joint pin c x tolerance 1 normal\n",
     KL_ESYNTAX, 4, "a or b"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "vary joint pin a x tolerance 1 gaussian\n",
     KL_ESYNTAX, 4, "normal or uniform"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "vary joint pin a x tolerance -1 normal\n",
     KL_ESYNTAX, 4, "not negative"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "output s swing speed rail\n",
     KL_ESYNTAX, 4, "what to measure"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "output s swing slide rail\noutput s min slide rail\n",
     KL_ESYNTAX, 5, "already used"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\nlimit t 0 1\n",
     KL_ESYNTAX, 4, "no output is named 't'"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "output s swing slide rail\nlimit s 2 1\n",
     KL_ESYNTAX, 5, "below the lower"},
    {"kinloop-study 1\nmodel slider.kinloop\n"
     "grid joint pin a x from 20 to 40 steps 4\n"
     "vary joint rail a y tolerance 1 normal\noutput s swing slide rail\n",
     KL_ESYNTAX, 0, "mixes"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "output e effort\n",
     KL_ESYNTAX, 0, "no 'load'"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n", KL_ESYNTAX, 0,
     "judges no output"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "output s swing slide pin\n",
     KL_EKIND, 0, "revolute"},
    /* one step limit (KL_MAX_STEPS) for the study's sweep and grid, and
     * for the steps an 'at' output takes from the sweep's start: the
     * slider's sweep is 36 steps over 360 degrees, so 1e8 degrees would
     * take 1e7 + 1 steps, and 1e300 a count beyond any int */
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "sweep motor from 0 to 360 steps 10000001\noutput s swing slide rail\n",
     KL_ETOOLARGE, 4, "at most 10000000"},
    {"kinloop-study 1\nmodel slider.kinloop\n"
     "grid joint pin a x from 20 to 40 steps 1e12\noutput s swing slide rail\n",
     KL_ETOOLARGE, 3, "1000000000000 steps"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "output s at 1e300 slide rail\n",
     KL_ETOOLARGE, 0, "at most 10000000"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "output s at -1.7e308 slide rail\n",
     KL_ETOOLARGE, 0, "so far outside the sweep"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "output s at 100000010 slide rail\n",
     KL_ETOOLARGE, 0, "1e+07 steps"},
};

static void assert_error(const kl_io_error *err, const bad_study *b, int i) {
  ck_assert_msg(err->status == b->status && err->line == b->line,
                "case %d: status %d line %d (%s)", i, err->status, err->line,
                err->message);
  ck_assert_msg(strstr(err->message, b->says) != NULL,
                "case %d: '%s' lacks '%s'", i, err->message, b->says);
}

START_TEST(study_errors_are_located) {
  const bad_study *b = &bad_studies[_i];
  kl_io_error err;
  err.size = sizeof err;
  ck_assert_ptr_null(kl_study_read(b->text, strlen(b->text), slider, &err));
  assert_error(&err, b, _i);
}
END_TEST

/* What a study file adds: its model must be found, named before it is
 * needed, and read; the statements before the 'model' line are read as
 * kl_study_read reads them, those after it by kl_study_read itself. */
static const bad_study bad_study_files[] = {
    {"kinloop-study 1\nsamples 5\n", KL_ESYNTAX, 0, "names no model"},
    {"kinloop-study 1\nvary joint pin a x tolerance 1 normal\n"
     "model slider.kinloop\n",
     KL_ESYNTAX, 2, "'model' must come first"},
    {"kinloop-study 1\nmodel nowhere.kinloop\n", KL_EIO, 2,
     "cannot open '"},
    {"kinloop-study 1\nmodel broken.kinloop\n", KL_ESYNTAX, 2,
     "broken.kinloop', line 3, column 33: expected a number"},
    {"kinloop-study 1\nseed 1\nseed 2\nmodel slider.kinloop\n", KL_ESYNTAX,
     3, "'seed' is given already, on line 2"},
    {"", KL_ESYNTAX, 0, "empty study"},
    {"kinloop-model 1\nmodel slider.kinloop\n", KL_ESYNTAX, 1,
     "kinloop-study 1"},
    {"kinloop-study 1\nmodel slider.kinloop\nsamples 5\n"
     "output s swing speed rail\n",
     KL_ESYNTAX, 4, "what to measure"},
};

START_TEST(study_file_errors_are_located) {
  const bad_study *b = &bad_study_files[_i];
  char path[128];
  kl_io_error err;
  err.size = sizeof err;
  write_file("broken.kinloop", "kinloop-model 1\nlink crank\n"
                               "revolute motor ground 0 0 crank zero 0\n");
  write_file("bad.study", b->text);
  snprintf(path, sizeof path, "%s/bad.study", dir);
  ck_assert_ptr_null(kl_study_read_file(path, &err));
  assert_error(&err, b, _i);
  if (b->status == KL_EIO) /* at the path in the 'model' statement */
    ck_assert_int_eq(err.column, 7);
  remove_file("bad.study");
  remove_file("broken.kinloop");
}
END_TEST

/* The demo study of the examples reads, its nominal is the demo's, and it
 * prepares. */
START_TEST(the_demo_study_reads) {
  kl_io_error err;
  kl_study *st;
  err.size = sizeof err;
  st = kl_study_read_file(KINLOOP_SOURCE_DIR "/examples/models/flap-tucker.study",
                          &err);
  ck_assert_msg(st != NULL, "%d:%d %s", err.line, err.column, err.message);
  ck_assert_int_eq(kl_study_sample_count(st), 2000);
  ck_assert_int_eq(kl_study_output_count(st), 4);
  ck_assert_str_eq(kl_study_output_name(st, 0), "stroke");
  ck_assert_int_eq(kl_model_loop_count(kl_study_model(st)), 2);
  ck_assert_str_eq(kl_study_model_path(st), "flap-tucker.kinloop");
  ck_assert_msg(kl_study_prepare(st) == KL_OK, "%s", kl_study_error(st));
  kl_study_free(st);
}
END_TEST

/* A NUL byte is located as the model reader locates it: no text file. */
START_TEST(a_nul_byte_is_located) {
  static const char text[] = "kinloop-study 1\nmodel slider.kinloop\nsam\0ples 5\n";
  kl_io_error err;
  err.size = sizeof err;
  ck_assert_ptr_null(kl_study_read(text, sizeof text - 1, slider, &err));
  ck_assert_int_eq(err.status, KL_ESYNTAX);
  ck_assert_int_eq(err.line, 3);
  ck_assert_int_eq(err.column, 4);
  ck_assert_ptr_nonnull(strstr(err.message, "NUL"));
}
END_TEST

/* The model's path is taken relative to the study's directory, however
 * the study is named; a path too long for the reader is an error at the
 * path, never a cut-down path. */
START_TEST(the_model_is_found_beside_the_study) {
  static const char study_text[] = "kinloop-study 1\n"
                                   "model slider.kinloop\n"
                                   "grid joint pin a x from 20 to 40 steps 1\n"
                                   "output stroke swing slide rail\n";
  char path[1200], deep[1100], cwd[1024], long_model[240];
  kl_io_error err;
  kl_study *st;
  int level;
  FILE *f;
  err.size = sizeof err;
  write_file("nominal.study", study_text);
  snprintf(path, sizeof path, "%s/nominal.study", dir);
  st = kl_study_read_file(path, &err);
  ck_assert_msg(st != NULL, "%s", err.message);
  ck_assert_str_eq(kl_study_model_path(st), "slider.kinloop");
  ck_assert_int_eq(kl_model_link_count(kl_study_model(st)), 4);
  kl_study_free(st);
  /* a bare file name: the working directory */
  ck_assert_ptr_nonnull(getcwd(cwd, sizeof cwd));
  ck_assert_int_eq(chdir(dir), 0);
  st = kl_study_read_file("nominal.study", &err);
  ck_assert_int_eq(chdir(cwd), 0);
  ck_assert_msg(st != NULL, "%s", err.message);
  kl_study_free(st);
  remove_file("nominal.study");
  /* a study four folders of 220 characters deep whose model's name has
   * 230: the joined path is longer than the reader's 1023 */
  snprintf(deep, sizeof deep, "%s", dir);
  for (level = 0; level < 4; level++) {
    size_t n = strlen(deep);
    deep[n] = '/';
    memset(deep + n + 1, 'd', 220);
    deep[n + 221] = '\0';
    ck_assert_int_eq(mkdir(deep, 0700), 0);
  }
  memset(long_model, 'm', 230);
  long_model[230] = '\0';
  snprintf(path, sizeof path, "%s/long.study", deep);
  f = fopen(path, "w");
  ck_assert_ptr_nonnull(f);
  fprintf(f, "kinloop-study 1\nmodel %s\noutput s swing slide rail\n",
          long_model);
  fclose(f);
  ck_assert_ptr_null(kl_study_read_file(path, &err));
  ck_assert_int_eq(err.status, KL_EIO);
  ck_assert_int_eq(err.line, 2);
  ck_assert_int_eq(err.column, 7);
  ck_assert_msg(strstr(err.message, "longer than") != NULL, "%s", err.message);
  unlink(path);
  for (level = 0; level < 4; level++) {
    ck_assert_int_eq(rmdir(deep), 0);
    *strrchr(deep, '/') = '\0';
  }
}
END_TEST

/* The 'model' statement is recorded as written, never opened: a study
 * text without one reads too, and one naming a file that does not exist
 * reads against the model given. */
START_TEST(the_model_statement_is_recorded_not_opened) {
  static const char *const texts[3] = {
      "kinloop-study 1\nsamples 3\n"
      "vary joint pin a x tolerance 0.1 normal\n"
      "output stroke swing slide rail\n",
      "kinloop-study 1\nmodel \"no such folder/slider.kinloop\"\nsamples 3\n"
      "vary joint pin a x tolerance 0.1 normal\n"
      "output stroke swing slide rail\n",
      /* statements before 'model' name the model's items: allowed here,
       * since the model is given */
      "kinloop-study 1\nsamples 3\n"
      "vary joint pin a x tolerance 0.1 normal\n"
      "output stroke swing slide rail\nmodel slider.kinloop\n"};
  static const char *const recorded[3] = {NULL, "no such folder/slider.kinloop",
                                          "slider.kinloop"};
  int i;
  for (i = 0; i < 3; i++) {
    kl_study *st = read_study(texts[i]);
    if (recorded[i] == NULL)
      ck_assert_ptr_null(kl_study_model_path(st));
    else
      ck_assert_str_eq(kl_study_model_path(st), recorded[i]);
    ck_assert_ptr_eq(kl_study_model(st), slider);
    kl_study_free(st);
  }
  ck_assert_ptr_null(kl_study_model_path(NULL));
}
END_TEST

/* A slider-crank whose crank (95) is longer than rod - offset (100 - 12)
 * cannot turn fully (the rotatability condition above), so its nominal
 * cannot be judged over a full turn. Reading it solves nothing and
 * succeeds; preparing fails, says why and changes nothing; runs and
 * summaries wait for a prepared study. */
START_TEST(reading_solves_nothing_and_preparing_says_why) {
  static const char text[] = "kinloop-study 1\nsamples 4\n"
                             "vary joint pin a x tolerance 0.1 normal\n"
                             "output stroke swing slide rail\n";
  char long_crank[512];
  const char *pin = strstr(slider_model, "crank 30 0 rod");
  double values[4];
  int status[4];
  kl_study_summary summary;
  kl_io_error err;
  kl_model *m;
  kl_study *st;
  ck_assert_ptr_nonnull(pin);
  snprintf(long_crank, sizeof long_crank, "%.*scrank 95 0 rod%s",
           (int)(pin - slider_model), slider_model,
           pin + strlen("crank 30 0 rod"));
  m = read_model(long_crank);
  err.size = sizeof err;
  st = kl_study_read(text, strlen(text), m, &err);
  kl_model_free(m);
  ck_assert_msg(st != NULL, "%s", err.message);
  ck_assert_str_eq(kl_study_error(st), "");
  summary.size = sizeof summary;
  ck_assert_int_eq(kl_study_run(st, 0, 4, 1, values, status, NULL), KL_ESTAGE);
  ck_assert_int_eq(kl_study_summarize(st, 0, values, status, 0, &summary),
                   KL_ESTAGE);
  ck_assert_int_eq(kl_study_prepare(st), KL_ENOASSEMBLY);
  ck_assert_msg(strstr(kl_study_error(st), "the nominal model: it cannot "
                                           "move through the whole sweep"),
                "%s", kl_study_error(st));
  ck_assert_int_eq(kl_study_run(st, 0, 4, 1, values, status, NULL), KL_ESTAGE);
  ck_assert_int_eq(kl_study_prepare(st), KL_ENOASSEMBLY); /* the same again */
  kl_study_free(st);
  /* the same study of the standard slider-crank prepares, once */
  st = read_study(text);
  ck_assert_int_eq(kl_study_prepare(st), KL_OK);
  ck_assert_int_eq(kl_study_run(st, 0, 4, 1, values, status, NULL), KL_OK);
  kl_study_free(st);
}
END_TEST

/* The study holds its model: the caller's handle may go at once, and the
 * study gives the numbers of one whose model's handle stays. */
START_TEST(a_study_outlives_its_models_handle) {
  static const char text[] = "kinloop-study 1\nseed 5\nsamples 20\n"
                             "vary joint pin a x tolerance 0.5 normal\n"
                             "output stroke swing slide rail\n"
                             "output rod_max max angle rod\n";
  kl_model *m = read_model(slider_model);
  kl_study *kept = read_study(text), *alone;
  run a, b;
  int k;
  alone = read_study_of(text, m);
  kl_model_free(m);
  ck_assert_int_eq(kl_model_link_count(kl_study_model(alone)), 4);
  a = run_all(kept, 2);
  b = run_all(alone, 2);
  ck_assert_int_eq(memcmp(a.values, b.values, 40 * sizeof(double)), 0);
  for (k = 0; k < 2; k++) {
    kl_study_summary sa, sb;
    sa.size = sb.size = sizeof sa;
    ck_assert_int_eq(kl_study_summarize(kept, k, a.values, a.status, a.n, &sa),
                     KL_OK);
    ck_assert_int_eq(kl_study_summarize(alone, k, b.values, b.status, b.n, &sb),
                     KL_OK);
    ck_assert_double_eq(sa.nominal, sb.nominal);
    ck_assert_double_eq(sa.first_order_std, sb.first_order_std);
  }
  free_run(&a);
  free_run(&b);
  kl_study_free(alone);
  kl_study_free(kept);
}
END_TEST

/* Arguments the reader refuses, and the getters' answers for no study. */
START_TEST(bad_arguments) {
  static const char text[] = "kinloop-study 1\nsamples 1\n"
                             "output stroke swing slide rail\n";
  kl_model *open = kl_model_new();
  kl_io_error err;
  err.size = sizeof err;
  ck_assert_ptr_null(kl_study_read(text, strlen(text), NULL, &err));
  ck_assert_int_eq(err.status, KL_EINVAL);
  ck_assert_ptr_null(kl_study_read(text, strlen(text), open, &err));
  ck_assert_int_eq(err.status, KL_ESTATE);
  ck_assert_ptr_nonnull(strstr(err.message, "not finalized"));
  ck_assert_int_eq(kl_study_prepare(NULL), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_study_error(NULL), "NULL"));
  ck_assert_int_eq(kl_study_run(NULL, 0, 0, 1, NULL, NULL, NULL), KL_EINVAL);
  kl_study_free(NULL);
  kl_model_free(open);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("study");
  TCase *tc = tcase_create("study");
  tcase_set_timeout(tc, 240);
  tcase_add_checked_fixture(tc, setup, teardown);
  tcase_add_test(tc, grid_matches_the_slider_crank_closed_form);
  tcase_add_test(tc, torque_loads_and_joint_angles);
  tcase_add_test(tc, a_change_point_sample_is_not_assembled);
  tcase_add_test(tc, the_random_stream_has_the_stated_distributions);
  tcase_add_test(tc, monte_carlo_agrees_with_first_order);
  tcase_add_test(tc, results_do_not_depend_on_threads_or_splits);
  tcase_add_test(tc, sample_ranges_never_wrap);
  tcase_add_test(tc, an_at_output_beyond_the_sweep_within_the_limit);
  tcase_add_test(tc, samples_that_cannot_turn_are_counted);
  tcase_add_test(tc, summary_statistics);
  tcase_add_loop_test(tc, study_errors_are_located, 0,
                      (int)(sizeof bad_studies / sizeof bad_studies[0]));
  tcase_add_test(tc, the_demo_study_reads);
  tcase_add_loop_test(tc, study_file_errors_are_located, 0,
                      (int)(sizeof bad_study_files / sizeof bad_study_files[0]));
  tcase_add_test(tc, the_model_is_found_beside_the_study);
  tcase_add_test(tc, the_model_statement_is_recorded_not_opened);
  tcase_add_test(tc, reading_solves_nothing_and_preparing_says_why);
  tcase_add_test(tc, a_study_outlives_its_models_handle);
  tcase_add_test(tc, bad_arguments);
  tcase_add_test(tc, a_nul_byte_is_located);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
