/*
 * study_report.c - the text report of a design study: errors in reading
 * it, the summary of its samples per output, and the throughput line.
 */
#define _POSIX_C_SOURCE 200809L /* sysconf */
#include <math.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"
#include "study_report.h"

#define LABEL_WIDTH 15  /* "within limits" and the like */
#define VALUE_WIDTH 16  /* a value with 8 significant digits, and room */
#define LABEL2_WIDTH 13 /* "first order" and the like */
#define WRAP_AT 78      /* the list of dimensions wraps here */

int study_read_failed(const char *program, const char *label,
                      const kl_io_error *err) {
  if (err->line > 0)
    fprintf(stderr, "%s: %s:%d:%d: %s\n", program, label, err->line,
            err->column, err->message);
  else
    fprintf(stderr, "%s: %s: %s\n", program, label, err->message);
  return study_read_exit_code(err);
}

int study_prepare_failed(const char *program, const char *label,
                         const kl_study *st, int status) {
  fprintf(stderr, "%s: %s: %s\n", program, label, kl_study_error(st));
  return study_exit_code(status);
}

int study_read_exit_code(const kl_io_error *err) {
  return study_exit_code(err->status);
}

int study_exit_code(int status) {
  switch (status) {
  case KL_ENOMEM:
    return CLI_EXIT_MEMORY;
  case KL_ENOASSEMBLY:
  case KL_ESINGULAR:
  case KL_EMAXITER:
    return CLI_EXIT_SOLVE;
  default:
    return CLI_EXIT_MODEL;
  }
}

/* A value with 8 significant digits; "-" where there is none (NaN, or
 * the infinite extremes of an empty set), so that an empty summary reads
 * "-" throughout. */
static const char *number(char *buf, size_t cap, double v) {
  if (!isfinite(v))
    snprintf(buf, cap, "-");
  else
    snprintf(buf, cap, "%.8g", v);
  return buf;
}

/* One line of two label-value pairs; the second pair may be left out. */
static void row(FILE *f, const char *label, const char *value,
                const char *label2, const char *value2) {
  if (label2 == NULL)
    fprintf(f, "  %-*s%s\n", LABEL_WIDTH, label, value);
  else
    fprintf(f, "  %-*s%-*s%-*s%s\n", LABEL_WIDTH, label, VALUE_WIDTH, value,
            LABEL2_WIDTH, label2, value2);
}

static void row_values(FILE *f, const char *label, double v,
                       const char *label2, double v2) {
  char a[32], b[32];
  row(f, label, number(a, sizeof a, v), label2,
      label2 == NULL ? NULL : number(b, sizeof b, v2));
}

/* The standard deviation of the samples beside the first-order estimate
 * from the sensitivities at the nominal, where the library makes one. */
static void row_std(FILE *f, const kl_study_summary *s) {
  char a[32], b[32];
  row(f, "std", number(a, sizeof a, s->std), "first order",
      isnan(s->first_order_std) ? "not estimated"
                                : number(b, sizeof b, s->first_order_std));
}

/* "N of M" and its percentage of M. */
static void row_count(FILE *f, const char *label, long count, long of) {
  char a[64], b[32];
  snprintf(a, sizeof a, "%ld of %ld", count, of);
  if (of > 0)
    snprintf(b, sizeof b, "%.2f%%", 100.0 * (double)count / (double)of);
  else
    snprintf(b, sizeof b, "-");
  fprintf(f, "  %-*s%-*s%s\n", LABEL_WIDTH, label, VALUE_WIDTH, a, b);
}

/* Where the worst value stands: against the limit it is nearest to (or
 * beyond), or against the nominal when there are none. */
static void row_worst(FILE *f, const kl_study_summary *s) {
  char value[32], where[160];
  if (s->worst_sample < 0) {
    row(f, "worst", "-", "no sample has a value", "");
    return;
  }
  number(value, sizeof value, s->worst);
  if (s->has_limits) {
    double below = s->worst - s->lower, above = s->upper - s->worst;
    int lower = below <= above;
    double margin = lower ? below : above;
    snprintf(where, sizeof where, "sample %ld, %.6g %s the %s limit",
             s->worst_sample, fabs(margin), margin >= 0 ? "inside" : "outside",
             lower ? "lower" : "upper");
  } else {
    snprintf(where, sizeof where, "sample %ld, %.6g from the nominal",
             s->worst_sample, s->worst - s->nominal);
  }
  fprintf(f, "  %-*s%-*s%s\n", LABEL_WIDTH, "worst", VALUE_WIDTH, value,
          where);
}

/* One output's block; `valued` samples have a value of it (the
 * statistics are over those). */
static void print_output(FILE *f, const char *name, long valued,
                         const kl_study_summary *s) {
  char lo[32], hi[32];
  if (s->has_limits)
    fprintf(f, "\noutput %s: limits %s to %s\n", name,
            number(lo, sizeof lo, s->lower), number(hi, sizeof hi, s->upper));
  else
    fprintf(f, "\noutput %s: no limits\n", name);
  row_values(f, "nominal", s->nominal, NULL, 0);
  row_count(f, "summarized", valued, s->samples);
  row_values(f, "mean", s->mean, "median", s->p50);
  row_std(f, s);
  row_values(f, "min", s->min, "max", s->max);
  row_values(f, "percentile 1%", s->p01, "99%", s->p99);
  row_values(f, "percentile 5%", s->p05, "95%", s->p95);
  row_worst(f, s);
  if (s->has_limits)
    row_count(f, "within limits", s->within_limits, s->samples);
  else
    row(f, "within limits", "-", "no limits given", "");
  row_count(f, "not assembled", s->samples - s->assembled, s->samples);
  row_count(f, "motion stopped", s->limited, s->samples);
}

/* The names of the dimensions that vary, wrapped under the first. */
static void print_dimensions(FILE *f, const kl_study *st) {
  int d, count = kl_study_dimension_count(st);
  int column = fprintf(f, "  %-*s%d vary", LABEL_WIDTH, "dimensions", count);
  for (d = 0; d < count; d++) {
    const char *name = kl_study_dimension_name(st, d);
    int width = (int)strlen(name);
    if (d == 0) {
      column += fprintf(f, ": ");
    } else if (column + 2 + width > WRAP_AT) {
      column = fprintf(f, ",\n  %*s", LABEL_WIDTH, "") - 2;
    } else {
      column += fprintf(f, ", ");
    }
    fputs(name, f);
    column += width;
  }
  fputc('\n', f);
}

int study_report_print(FILE *f, const kl_study *st, const char *label,
                       const double *values, const int *status, long n) {
  const kl_model *m = kl_study_model(st);
  int k, nout = kl_study_output_count(st), length_unit, angle_unit;
  long i, failed = 0, stopped = 0;
  char text[64];
  for (i = 0; i < n; i++) {
    failed += status[i] == KL_SAMPLE_NO_ASSEMBLY;
    stopped += status[i] == KL_SAMPLE_LIMITED;
  }
  kl_model_units(m, &length_unit, &angle_unit);
  fprintf(f, "study %s\n", label);
  snprintf(text, sizeof text, "%ld", n);
  row(f, "samples", text, NULL, NULL);
  row_count(f, "not assembled", failed, n);
  row_count(f, "motion stopped", stopped, n);
  print_dimensions(f, st);
  fprintf(f, "  %-*s%d judged, in the model's units (lengths in %s, angles "
             "in %s)\n",
          LABEL_WIDTH, "outputs", nout,
          length_unit == KL_LENGTH_UNSTATED ? "its length unit"
                                            : kl_length_unit_str(length_unit),
          kl_angle_unit_str(angle_unit));
  for (k = 0; k < nout; k++) {
    kl_study_summary s;
    long valued = 0;
    int st_k;
    s.size = sizeof s;
    st_k = kl_study_summarize(st, k, values, status, n, &s);
    if (st_k != KL_OK)
      return st_k;
    for (i = 0; i < n; i++)
      valued += status[i] != KL_SAMPLE_NO_ASSEMBLY && !isnan(values[i * nout + k]);
    print_output(f, kl_study_output_name(st, k), valued, &s);
  }
  fputc('\n', f);
  return KL_OK;
}

int study_threads(int requested) {
  long cores;
  if (requested > 0)
    return requested > 64 ? 64 : requested;
  cores = sysconf(_SC_NPROCESSORS_ONLN);
  return cores < 1 ? 1 : cores > 64 ? 64 : (int)cores;
}

void study_report_throughput(FILE *f, long samples, double seconds,
                             int processes, int threads) {
  int workers = processes * threads;
  double rate = seconds > 0.0 ? (double)samples / seconds : 0.0;
  fprintf(f,
          "%s %ld samples in %.3f s: %.1f samples/s, %.1f per worker "
          "(%d process%s x %d thread%s)\n",
          STUDY_THROUGHPUT_WORD, samples, seconds, rate,
          rate / (double)workers, processes, processes == 1 ? "" : "es",
          threads, threads == 1 ? "" : "s");
}
