/*
 * check_study.c - checks what `kinloop study` writes: its CSV against the
 * library's own run of the study, its summary table against the library's
 * summaries and against GSL's statistics of the CSV, and which samples of
 * a four-bar assemble and turn fully against the triangle inequality and
 * Grashof's condition.
 *
 * usage: check_study csv STUDY CSV
 *        check_study summary STUDY TABLE CSV
 *        check_study assembly CSV COLUMN GROUND CRANK ROCKER MARGIN
 *   csv       the header names the sample, its status, every dimension
 *             (with the model's length unit) and every output; one row per
 *             sample, every number the library's to the last bit
 *   summary   each output's block in TABLE holds the library's summary to
 *             the 8 digits printed, which GSL's mean, standard deviation,
 *             quantiles and extremes of the CSV confirm, and the worst
 *             sample, the count within limits and the count that did not
 *             assemble agree with the CSV
 *   assembly  a four-bar swept through a full turn of its crank from the
 *             crank along the ground towards the rocker's pivot, its
 *             coupler length in column COLUMN: a sample assembles when
 *             its dyad spans the gap (the triangle inequality), and turns
 *             fully (status ok, else stopped) when Grashof's condition
 *             makes its crank a crank; samples within MARGIN of either
 *             boundary are not judged
 */
#include <gsl/gsl_sort.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "check_support.h"

#define MAX_COLS 512
#define PRINTED 1e-7 /* relative error of a value printed with 8 digits */

/* The CSV as numbers: every field but the status, NaN where empty. */
enum { ROW_OK, ROW_NO_ASSEMBLY, ROW_STOPPED };
typedef struct {
  long rows;
  int cols;
  char *text; /* the file, which the header's fields point into */
  char *header_text;
  char *header[MAX_COLS];
  double *cell; /* rows x cols */
  int *status;  /* rows: ROW_* as the status field says */
} table;

/* The library's own run of a study, on one thread. */
typedef struct {
  kl_study *st;
  long n;
  int nout, ndim;
  double *values, *dims;
  int *status;
} run;

/* Cuts the next line off *cursor (NULL at the end). */
static char *next_line(char **cursor) {
  char *line = *cursor, *end;
  if (line == NULL || *line == '\0')
    return NULL;
  end = strchr(line, '\n');
  if (end != NULL) {
    *end = '\0';
    *cursor = end + 1;
  } else {
    *cursor = line + strlen(line);
  }
  return line;
}

static void read_csv(const char *path, table *t) {
  char *text = check_read_file(path, NULL), *cursor = text, *line;
  long cap = 1024;
  t->text = text;
  t->rows = 0;
  t->header_text = next_line(&cursor);
  if (t->header_text == NULL) {
    fprintf(stderr, "%s is empty\n", path);
    exit(2);
  }
  t->cols = check_split_csv(t->header_text, t->header, MAX_COLS);
  t->cell = malloc((size_t)cap * (size_t)t->cols * sizeof *t->cell);
  t->status = malloc((size_t)cap * sizeof *t->status);
  while ((line = next_line(&cursor)) != NULL) {
    char *fields[MAX_COLS];
    int n = check_split_csv(line, fields, MAX_COLS), c;
    if (t->rows == cap) {
      cap *= 2;
      t->cell = realloc(t->cell, (size_t)cap * (size_t)t->cols *
                                     sizeof *t->cell);
      t->status = realloc(t->status, (size_t)cap * sizeof *t->status);
    }
    if (t->cell == NULL || t->status == NULL) {
      fprintf(stderr, "out of memory reading %s\n", path);
      exit(2);
    }
    if (n != t->cols)
      check_fail("%s row %ld has %d fields, the header %d", path, t->rows + 1,
                 n, t->cols);
    t->status[t->rows] = ROW_NO_ASSEMBLY;
    if (n > 1 && strcmp(fields[1], "ok") == 0)
      t->status[t->rows] = ROW_OK;
    else if (n > 1 && strcmp(fields[1], "stopped") == 0)
      t->status[t->rows] = ROW_STOPPED;
    else if (n < 2 || strcmp(fields[1], "no assembly") != 0)
      check_fail("%s row %ld: status '%s' is not 'ok', 'stopped' or 'no "
                 "assembly'",
                 path, t->rows + 1, n > 1 ? fields[1] : "");
    for (c = 0; c < t->cols; c++) {
      double *cell = &t->cell[t->rows * t->cols + c];
      char *end;
      *cell = NAN;
      if (c == 1 || c >= n || fields[c][0] == '\0')
        continue;
      *cell = strtod(fields[c], &end);
      if (*end != '\0')
        check_fail("%s row %ld column %d: '%s' is not a number", path,
                   t->rows + 1, c + 1, fields[c]);
    }
    t->rows++;
  }
}

static void run_study(const char *path, run *r) {
  kl_io_error err;
  long n;
  err.size = sizeof err;
  r->st = kl_study_read_file(path, &err);
  if (r->st == NULL) {
    fprintf(stderr, "%s:%d:%d: %s\n", path, err.line, err.column,
            err.message);
    exit(2);
  }
  if (kl_study_prepare(r->st) != KL_OK) {
    fprintf(stderr, "%s: %s\n", path, kl_study_error(r->st));
    exit(2);
  }
  r->n = n = kl_study_sample_count(r->st);
  r->nout = kl_study_output_count(r->st);
  r->ndim = kl_study_dimension_count(r->st);
  r->values = malloc((size_t)(n > 0 ? n : 1) * (size_t)r->nout *
                     sizeof *r->values);
  r->dims = malloc((size_t)(n > 0 ? n : 1) * (size_t)(r->ndim + 1) *
                   sizeof *r->dims);
  r->status = malloc((size_t)(n > 0 ? n : 1) * sizeof *r->status);
  if (r->values == NULL || r->dims == NULL || r->status == NULL ||
      kl_study_run(r->st, 0, n, 1, r->values, r->status, r->dims) != KL_OK) {
    fprintf(stderr, "the library could not run %s\n", path);
    exit(2);
  }
}

static void free_csv(table *t) {
  free(t->text);
  free(t->cell);
  free(t->status);
}

/* The CSV's status word of a library status. */
static const char *status_word(int row_status) {
  return row_status == ROW_OK        ? "ok"
         : row_status == ROW_STOPPED ? "stopped"
                                     : "no assembly";
}

static int row_status(int sample_status) {
  return sample_status == KL_SAMPLE_OK        ? ROW_OK
         : sample_status == KL_SAMPLE_LIMITED ? ROW_STOPPED
                                              : ROW_NO_ASSEMBLY;
}

static void free_run(run *r) {
  kl_study_free(r->st);
  free(r->values);
  free(r->dims);
  free(r->status);
}

/* Bit for bit, NaN matching NaN. */
static int same(double a, double b) {
  return (isnan(a) && isnan(b)) || a == b;
}

static int near(double got, double want, double rel) {
  if (isnan(got) || isnan(want))
    return isnan(got) && isnan(want);
  return fabs(got - want) <= rel * fmax(fabs(got), fabs(want)) + 1e-300;
}

static int check_csv(const char *study, const char *csv) {
  run r;
  table t;
  int k, length_unit;
  long i;
  run_study(study, &r);
  read_csv(csv, &t);
  kl_model_units(kl_study_model(r.st), &length_unit, NULL);
  if (t.cols != 2 + r.ndim + r.nout)
    check_fail("%d columns, expected 2 + %d dimensions + %d outputs", t.cols,
               r.ndim, r.nout);
  if (t.cols >= 2 && (strcmp(t.header[0], "sample") != 0 ||
                      strcmp(t.header[1], "status") != 0))
    check_fail("the header starts '%s,%s', not 'sample,status'", t.header[0],
               t.header[1]);
  for (k = 0; k < r.ndim && 2 + k < t.cols; k++) {
    char want[300];
    snprintf(want, sizeof want, "%s (%s)", kl_study_dimension_name(r.st, k),
             length_unit == KL_LENGTH_UNSTATED
                 ? "len"
                 : kl_length_unit_str(length_unit));
    if (strcmp(t.header[2 + k], want) != 0)
      check_fail("header column %d is '%s', expected '%s'", 3 + k,
                 t.header[2 + k], want);
  }
  for (k = 0; k < r.nout && 2 + r.ndim + k < t.cols; k++) {
    /* the name, then its unit in parentheses (which the shell tests spell
     * out for known studies) */
    const char *name = kl_study_output_name(r.st, k),
               *field = t.header[2 + r.ndim + k];
    size_t len = strlen(name);
    if (strncmp(field, name, len) != 0 || strncmp(field + len, " (", 2) != 0 ||
        field[strlen(field) - 1] != ')')
      check_fail("header column %d is '%s', expected '%s (UNIT)'",
                 3 + r.ndim + k, field, name);
  }
  if (t.rows != r.n)
    check_fail("%ld rows, expected one per sample: %ld", t.rows, r.n);
  if (t.cols != 2 + r.ndim + r.nout) {
    free_csv(&t);
    free_run(&r);
    return 1;
  }
  for (i = 0; i < t.rows && i < r.n; i++) {
    const double *row = &t.cell[i * t.cols];
    int assembled = r.status[i] != KL_SAMPLE_NO_ASSEMBLY;
    if (row[0] != (double)i)
      check_fail("row %ld is numbered %g", i + 1, row[0]);
    if (t.status[i] != row_status(r.status[i]))
      check_fail("sample %ld: status %s, the library says %s", i,
                 status_word(t.status[i]),
                 status_word(row_status(r.status[i])));
    for (k = 0; k < r.ndim; k++)
      if (!same(row[2 + k], r.dims[i * r.ndim + k]))
        check_fail("sample %ld, %s: %.17g, the library drew %.17g", i,
                   kl_study_dimension_name(r.st, k), row[2 + k],
                   r.dims[i * r.ndim + k]);
    for (k = 0; k < r.nout; k++) {
      double want = assembled ? r.values[i * r.nout + k] : NAN;
      if (!same(row[2 + r.ndim + k], want))
        check_fail("sample %ld, %s: %.17g, the library gives %.17g", i,
                   kl_study_output_name(r.st, k), row[2 + r.ndim + k], want);
    }
  }
  printf("%ld rows of %d columns match the library's run\n", t.rows, t.cols);
  free_csv(&t);
  free_run(&r);
  return check_failures() != 0;
}

/* One output's block of the summary table, as printed. */
typedef struct {
  int seen, has_limits, first_order_given;
  double lower, upper, nominal, mean, median, std, first_order;
  double min, max, p01, p99, p05, p95, worst;
  long worst_sample, within, within_of, failed, failed_of;
  long valued, valued_of, stopped, stopped_of;
} block;

static void parse_table(const char *path, const run *r, block *blocks,
                        long *samples, long *failed, long *stopped) {
  char *text = check_read_file(path, NULL), *cursor = text, *line;
  block *b = NULL;
  *samples = *failed = *stopped = -1;
  while ((line = next_line(&cursor)) != NULL) {
    char word[16];
    int k;
    if (strncmp(line, "output ", 7) == 0) {
      char *colon = strrchr(line, ':');
      b = NULL;
      if (colon == NULL)
        continue;
      *colon = '\0';
      for (k = 0; k < r->nout; k++)
        if (strcmp(line + 7, kl_study_output_name(r->st, k)) == 0)
          b = &blocks[k];
      if (b == NULL) {
        check_fail("the table has an output '%s' the study lacks", line + 7);
        continue;
      }
      b->seen = 1;
      b->has_limits = sscanf(colon + 1, " limits %lf to %lf", &b->lower,
                             &b->upper) == 2;
      if (!b->has_limits && strcmp(colon + 1, " no limits") != 0)
        check_fail("output %s: '%s' says neither its limits nor 'no limits'",
                   line + 7, colon + 1);
      continue;
    }
    if (b == NULL) { /* the outline above the first output */
      sscanf(line, "  samples %ld", samples);
      sscanf(line, "  not assembled %ld of", failed);
      sscanf(line, "  motion stopped %ld of", stopped);
      continue;
    }
    sscanf(line, "  nominal %lf", &b->nominal);
    sscanf(line, "  summarized %ld of %ld", &b->valued, &b->valued_of);
    sscanf(line, "  mean %lf median %lf", &b->mean, &b->median);
    if (sscanf(line, "  std %lf first order %lf", &b->std, &b->first_order) ==
        2)
      b->first_order_given = 1;
    sscanf(line, "  min %lf max %lf", &b->min, &b->max);
    sscanf(line, "  percentile 1%% %lf 99%% %lf", &b->p01, &b->p99);
    sscanf(line, "  percentile 5%% %lf 95%% %lf", &b->p05, &b->p95);
    sscanf(line, "  worst %lf sample %ld", &b->worst, &b->worst_sample);
    if (sscanf(line, "  within limits %ld of %ld", &b->within,
               &b->within_of) != 2 &&
        sscanf(line, "  within limits %15s", word) == 1)
      b->within = -1;
    sscanf(line, "  not assembled %ld of %ld", &b->failed, &b->failed_of);
    sscanf(line, "  motion stopped %ld of %ld", &b->stopped, &b->stopped_of);
  }
  free(text);
}

static void expect_value(const char *output, const char *what, double got,
                         double want, double rel, const char *source) {
  if (!near(got, want, rel))
    check_fail("%s %s: %.17g, %s gives %.17g", output, what, got, source,
               want);
}

/* The summary of one output from the CSV, by GSL and by definition. */
static void check_output(const run *r, const table *t, int k, const block *b,
                         const kl_study_summary *s) {
  const char *name = kl_study_output_name(r->st, k);
  int col = 2 + r->ndim + k;
  double *v = malloc((size_t)(t->rows > 0 ? t->rows : 1) * sizeof *v);
  double badness = -HUGE_VAL, worst = NAN;
  long i, m = 0, within = 0, worst_sample = -1, failed = 0, stopped = 0;
  if (v == NULL) {
    fprintf(stderr, "out of memory\n");
    exit(2);
  }
  if (!b->seen) {
    check_fail("the table has no block for output %s", name);
    free(v);
    return;
  }
  /* the table holds the library's summary, to the digits printed */
  expect_value(name, "nominal", b->nominal, s->nominal, PRINTED, "the library");
  expect_value(name, "mean", b->mean, s->mean, PRINTED, "the library");
  expect_value(name, "median", b->median, s->p50, PRINTED, "the library");
  expect_value(name, "std", b->std, s->std, PRINTED, "the library");
  if (b->first_order_given)
    expect_value(name, "first-order std", b->first_order, s->first_order_std,
                 PRINTED, "the library");
  else if (!isnan(s->first_order_std))
    check_fail("%s: the table gives no first-order std; the library %.17g",
               name, s->first_order_std);
  expect_value(name, "min", b->min, s->min, PRINTED, "the library");
  expect_value(name, "max", b->max, s->max, PRINTED, "the library");
  expect_value(name, "1%", b->p01, s->p01, PRINTED, "the library");
  expect_value(name, "5%", b->p05, s->p05, PRINTED, "the library");
  expect_value(name, "95%", b->p95, s->p95, PRINTED, "the library");
  expect_value(name, "99%", b->p99, s->p99, PRINTED, "the library");
  if (b->has_limits != s->has_limits ||
      (b->has_limits && (!near(b->lower, s->lower, PRINTED) ||
                         !near(b->upper, s->upper, PRINTED))))
    check_fail("%s: the table's limits differ from the study's", name);
  /* the CSV's values by GSL (its quantile interpolates linearly between
   * order statistics at (n - 1) q, as the library's percentiles do) */
  for (i = 0; i < t->rows; i++) {
    double x = t->cell[i * t->cols + col], bad;
    failed += t->status[i] == ROW_NO_ASSEMBLY;
    stopped += t->status[i] == ROW_STOPPED;
    /* statistics over the samples with a value; within limits only those
     * that moved through the whole sweep */
    if (t->status[i] != ROW_NO_ASSEMBLY && !isnan(x)) {
      v[m++] = x;
      if (t->status[i] == ROW_OK && s->has_limits && x >= s->lower &&
          x <= s->upper)
        within++;
      bad = s->has_limits ? fmax(s->lower - x, x - s->upper)
                          : fabs(x - s->nominal);
      if (bad > badness) { /* by the library's definition of the worst */
        badness = bad;
        worst = x;
        worst_sample = i;
      }
    }
  }
  if (b->valued != m || b->valued_of != t->rows)
    check_fail("%s: %ld of %ld summarized; the CSV has values in %ld of %ld",
               name, b->valued, b->valued_of, m, t->rows);
  if (m > 1) {
    double lo, hi;
    expect_value(name, "mean", s->mean, gsl_stats_mean(v, 1, (size_t)m),
                 1e-12, "GSL");
    expect_value(name, "std", s->std, gsl_stats_sd(v, 1, (size_t)m), 1e-9,
                 "GSL");
    gsl_stats_minmax(&lo, &hi, v, 1, (size_t)m);
    expect_value(name, "min", s->min, lo, 0, "GSL");
    expect_value(name, "max", s->max, hi, 0, "GSL");
    gsl_sort(v, 1, (size_t)m);
    expect_value(name, "1%", s->p01,
                 gsl_stats_quantile_from_sorted_data(v, 1, (size_t)m, 0.01),
                 1e-12, "GSL");
    expect_value(name, "5%", s->p05,
                 gsl_stats_quantile_from_sorted_data(v, 1, (size_t)m, 0.05),
                 1e-12, "GSL");
    expect_value(name, "median", s->p50, gsl_stats_median_from_sorted_data(
                                             v, 1, (size_t)m),
                 1e-12, "GSL");
    expect_value(name, "95%", s->p95,
                 gsl_stats_quantile_from_sorted_data(v, 1, (size_t)m, 0.95),
                 1e-12, "GSL");
    expect_value(name, "99%", s->p99,
                 gsl_stats_quantile_from_sorted_data(v, 1, (size_t)m, 0.99),
                 1e-12, "GSL");
  }
  if (m > 0) {
    expect_value(name, "worst", b->worst, worst, PRINTED, "the CSV");
    if (b->worst_sample != worst_sample)
      check_fail("%s: the worst is sample %ld, the CSV's is %ld", name,
                 b->worst_sample, worst_sample);
  }
  if (s->has_limits && (b->within != within || b->within_of != t->rows))
    check_fail("%s: %ld of %ld within limits; the CSV has %ld of %ld", name,
               b->within, b->within_of, within, t->rows);
  if (!s->has_limits && b->within != -1)
    check_fail("%s has no limits, but the table counts %ld within them", name,
               b->within);
  if (b->failed != failed || b->failed_of != t->rows)
    check_fail("%s: %ld of %ld did not assemble; the CSV has %ld of %ld", name,
               b->failed, b->failed_of, failed, t->rows);
  if (b->stopped != stopped || b->stopped_of != t->rows)
    check_fail("%s: %ld of %ld stopped; the CSV has %ld of %ld", name,
               b->stopped, b->stopped_of, stopped, t->rows);
  /* the law of propagation of uncertainty to first order (JCGM 100:2008,
   * the GUM, 5.1.2, from memory) predicts the standard deviation of small
   * tolerances; a few hundred samples estimate it to some 5%, so a quarter
   * leaves room for the sampling and for curvature. Where samples fail to
   * assemble, the tolerances are not small and the others are a cut-off
   * part of the spread: no prediction. */
  if (!isnan(s->first_order_std) && m > 100 && m == t->rows &&
      !(fabs(s->first_order_std / s->std - 1) < 0.25))
    check_fail("%s: first-order std %.6g, the samples' %.6g", name,
               s->first_order_std, s->std);
  free(v);
}

static int check_summary(const char *study, const char *table_path,
                         const char *csv) {
  run r;
  table t;
  block *blocks;
  long samples, failed, stopped, i, csv_failed = 0, csv_stopped = 0;
  int k;
  run_study(study, &r);
  read_csv(csv, &t);
  if (t.rows != r.n || t.cols != 2 + r.ndim + r.nout) {
    check_fail("%s is not the CSV of %s (check_study csv tells why)", csv,
               study);
    free_csv(&t);
    free_run(&r);
    return 1;
  }
  blocks = calloc((size_t)r.nout, sizeof *blocks);
  if (blocks == NULL) {
    fprintf(stderr, "out of memory\n");
    exit(2);
  }
  parse_table(table_path, &r, blocks, &samples, &failed, &stopped);
  for (i = 0; i < t.rows; i++) {
    csv_failed += t.status[i] == ROW_NO_ASSEMBLY;
    csv_stopped += t.status[i] == ROW_STOPPED;
  }
  if (samples != r.n)
    check_fail("the table says %ld samples, the study has %ld", samples, r.n);
  if (failed != csv_failed)
    check_fail("the table says %ld did not assemble, the CSV %ld", failed,
               csv_failed);
  if (stopped != csv_stopped)
    check_fail("the table says %ld stopped short, the CSV %ld", stopped,
               csv_stopped);
  for (k = 0; k < r.nout; k++) {
    kl_study_summary s;
    s.size = sizeof s;
    if (kl_study_summarize(r.st, k, r.values, r.status, r.n, &s) != KL_OK) {
      check_fail("the library cannot summarize output %d", k);
      continue;
    }
    check_output(&r, &t, k, &blocks[k], &s);
  }
  printf("%d outputs of %ld samples checked (%ld did not assemble, %ld "
         "stopped short)\n",
         r.nout, r.n, csv_failed, csv_stopped);
  free(blocks);
  free_csv(&t);
  free_run(&r);
  return check_failures() != 0;
}

/* What a four-bar sample does over a full turn of its crank, started with
 * the crank along the ground line towards the rocker's pivot; `room` is
 * how far its coupler length is from changing the answer. */
static int fourbar_fate(double ground, double crank, double coupler,
                        double rocker, double *room) {
  double distance = ground - crank;
  double l[4], shortest, longest, others;
  int k;
  /* the triangle inequality (elementary geometry): the dyad of coupler
   * and rocker spans `distance` when neither too long folded nor too
   * short stretched */
  double close = fmin(distance - fabs(coupler - rocker),
                      coupler + rocker - distance);
  if (close < 0) {
    *room = -close;
    return ROW_NO_ASSEMBLY;
  }
  /* Grashof's condition: the crank turns fully when it is the shortest
   * link and s + l < p + q */
  l[0] = ground;
  l[1] = crank;
  l[2] = coupler;
  l[3] = rocker;
  shortest = longest = l[0];
  for (k = 1; k < 4; k++) {
    shortest = fmin(shortest, l[k]);
    longest = fmax(longest, l[k]);
  }
  others = ground + crank + coupler + rocker - shortest - longest;
  *room = fmin(close, fabs(others - shortest - longest));
  return crank == shortest && shortest + longest < others ? ROW_OK
                                                          : ROW_STOPPED;
}

static int check_assembly(const char *csv, const char *column, double ground,
                          double crank, double rocker, double margin) {
  table t;
  int col, c;
  long i, judged[3] = {0, 0, 0};
  read_csv(csv, &t);
  for (col = -1, c = 0; c < t.cols; c++)
    if (strcmp(t.header[c], column) == 0)
      col = c;
  if (col < 0) {
    check_fail("%s has no column '%s'", csv, column);
    free_csv(&t);
    return 1;
  }
  for (i = 0; i < t.rows; i++) {
    double coupler = t.cell[i * t.cols + col], room;
    int fate = fourbar_fate(ground, crank, coupler, rocker, &room);
    if (room < margin)
      continue;
    judged[fate]++;
    if (t.status[i] != fate)
      check_fail("sample %ld, coupler %.9g: %s, but the geometry says %s", i,
                 coupler, status_word(t.status[i]), status_word(fate));
  }
  if (judged[ROW_OK] < 10 || judged[ROW_NO_ASSEMBLY] < 10 ||
      judged[ROW_STOPPED] < 10)
    check_fail("too few samples judged: %ld ok, %ld stopped, %ld not "
               "assembled",
               judged[ROW_OK], judged[ROW_STOPPED], judged[ROW_NO_ASSEMBLY]);
  printf("%ld samples turn fully, %ld stop, %ld do not assemble, as the "
         "geometry says\n",
         judged[ROW_OK], judged[ROW_STOPPED], judged[ROW_NO_ASSEMBLY]);
  free_csv(&t);
  return check_failures() != 0;
}

int main(int argc, char **argv) {
  if (argc == 4 && strcmp(argv[1], "csv") == 0)
    return check_csv(argv[2], argv[3]);
  if (argc == 5 && strcmp(argv[1], "summary") == 0)
    return check_summary(argv[2], argv[3], argv[4]);
  if (argc == 8 && strcmp(argv[1], "assembly") == 0)
    return check_assembly(argv[2], argv[3], atof(argv[4]), atof(argv[5]),
                          atof(argv[6]), atof(argv[7]));
  fprintf(stderr, "usage: check_study csv STUDY CSV\n"
                  "       check_study summary STUDY TABLE CSV\n"
                  "       check_study assembly CSV COLUMN GROUND CRANK "
                  "ROCKER MARGIN\n");
  return 2;
}
