/*
 * study.c - the study command: reads a design study, runs its samples on threads, prints the summary, writes the CSV.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime, isatty */
#include <signal.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "cli.h"
#include "study_report.h"

#define SAMPLES_PER_THREAD 64  /* a chunk between progress reports */
#define PROGRESS_AFTER_S 1.0   /* quicker studies finish before it helps */

static double seconds_now(void) {
  struct timespec t;
  clock_gettime(CLOCK_MONOTONIC, &t);
  return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

/* The study, read and prepared (its nominal solved); NULL after saying
 * why, with the exit code in *exit_code. */
static kl_study *read_study(const char *path, int *exit_code) {
  kl_io_error err;
  kl_study *st;
  int status;
  err.size = sizeof err;
  st = kl_study_read_file(path, &err);
  if (st == NULL)
    *exit_code = study_read_failed("kinloop", path, &err);
  if (st != NULL && (status = kl_study_prepare(st)) != KL_OK) {
    *exit_code = study_prepare_failed("kinloop", path, st, status);
    kl_study_free(st);
    st = NULL;
  }
  return st;
}

/* The signal (SIGINT, SIGTERM) that asked the study to stop, 0 if none:
 * the run ends after the chunk under way, and the samples done so far are
 * summarized as a partial study. */
static volatile sig_atomic_t stop_signal = 0;

static void ask_to_stop(int sig) { stop_signal = sig; }

/* Runs the samples in chunks, showing the progress (samples, rate, time
 * left) on a terminal once the study has taken a while, until all are done
 * or a signal asks it to stop. Returns the samples done in *done, the wall
 * time in *seconds and a KL status. */
static int run_all(const kl_study *st, int threads, double *values,
                   int *status, double *dims, long *done, double *seconds) {
  long n = kl_study_sample_count(st);
  long chunk = (long)SAMPLES_PER_THREAD * threads;
  int nout = kl_study_output_count(st), ndim = kl_study_dimension_count(st);
  int terminal = isatty(fileno(stderr)), shown = 0, result = KL_OK;
  double start = seconds_now();
  struct sigaction stop, old_int, old_term;
  memset(&stop, 0, sizeof stop);
  stop.sa_handler = ask_to_stop;
  sigemptyset(&stop.sa_mask);
  sigaction(SIGINT, &stop, &old_int);
  sigaction(SIGTERM, &stop, &old_term);
  *done = 0;
  while (*done < n && result == KL_OK && stop_signal == 0) {
    long count = n - *done < chunk ? n - *done : chunk;
    double elapsed, rate;
    result = kl_study_run(st, *done, count, threads, values + *done * nout,
                          status + *done,
                          dims == NULL ? NULL : dims + *done * ndim);
    *done += count;
    elapsed = seconds_now() - start;
    rate = (double)*done / elapsed;
    if (terminal && elapsed >= PROGRESS_AFTER_S)
      shown = fprintf(stderr,
                      "\rkinloop: study, %ld of %ld samples (%3.0f%%), "
                      "%.0f samples/s, %.0f s left   ",
                      *done, n, 100.0 * (double)*done / (double)n, rate,
                      (double)(n - *done) / rate);
  }
  sigaction(SIGINT, &old_int, NULL);
  sigaction(SIGTERM, &old_term, NULL);
  *seconds = seconds_now() - start;
  if (shown > 0) /* the line's width, blanked */
    fprintf(stderr, "\r%*s\r", shown, "");
  return result;
}

/* The CSV of every sample: index, status, dimensions, outputs; an output
 * empty where the sample has no value of it. */
static int write_csv(const cli_study_samples *s, const char *path) {
  const kl_model *m = kl_study_model(s->st);
  int nout = kl_study_output_count(s->st);
  int ndim = kl_study_dimension_count(s->st), k, length_unit;
  FILE *f = cli_open_output(path);
  long i;
  if (f == NULL)
    return CLI_EXIT_OUTPUT;
  kl_model_units(m, &length_unit, NULL);
  fputs("sample,status", f);
  for (k = 0; k < ndim; k++) {
    char name[160];
    snprintf(name, sizeof name, "%s (%s)", kl_study_dimension_name(s->st, k),
             length_unit == KL_LENGTH_UNSTATED
                 ? "len"
                 : kl_length_unit_str(length_unit));
    fputc(',', f);
    cli_csv_field(f, name);
  }
  for (k = 0; k < nout; k++) {
    char titled[300];
    cli_study_output_titled(s->st, k, titled, sizeof titled);
    fputc(',', f);
    cli_csv_field(f, titled);
  }
  fputc('\n', f);
  for (i = 0; i < s->n && !ferror(f); i++) {
    fprintf(f, "%ld,%s", i,
            s->status[i] == KL_SAMPLE_OK       ? "ok"
            : s->status[i] == KL_SAMPLE_LIMITED ? "stopped"
                                                : "no assembly");
    for (k = 0; k < ndim; k++)
      fprintf(f, ",%.17g", s->dims[i * ndim + k]);
    for (k = 0; k < nout; k++)
      if (cli_study_has_value(s, i, k))
        fprintf(f, ",%.17g", s->values[i * nout + k]);
      else
        fputc(',', f);
    fputc('\n', f);
  }
  return cli_close_output(f, path);
}

int cli_cmd_study(const cli_options *o) {
  int exit_code = CLI_EXIT_OK, threads = study_threads(o->threads), nout, ndim;
  int want_dims = o->csv != NULL || o->charts != NULL, histograms, scatters;
  kl_study *st = read_study(o->model_path, &exit_code);
  const char *label = o->model_path;
  double *values = NULL, *dims = NULL, seconds;
  int *status = NULL;
  long n, planned;
  size_t widest;
  FILE *f;
  cli_study_samples s;
  if (st == NULL)
    return exit_code;
  n = planned = kl_study_sample_count(st);
  nout = kl_study_output_count(st);
  ndim = kl_study_dimension_count(st);
  widest = (size_t)(nout > ndim ? nout : ndim);
  if ((unsigned long)n > SIZE_MAX / sizeof(double) / widest) {
    cli_error("%s has %ld samples, too many to hold in memory", label, n);
    exit_code = CLI_EXIT_MEMORY;
    goto done;
  }
  values = malloc((size_t)(n > 0 ? n : 1) * (size_t)nout * sizeof *values);
  status = malloc((size_t)(n > 0 ? n : 1) * sizeof *status);
  if (want_dims)
    dims = malloc((size_t)(n > 0 ? n : 1) * widest * sizeof *dims);
  if (values == NULL || status == NULL || (want_dims && dims == NULL) ||
      run_all(st, threads, values, status, dims, &n, &seconds) != KL_OK) {
    cli_error("out of memory running %ld samples of %s", n, label);
    exit_code = CLI_EXIT_MEMORY;
    goto done;
  }
  if ((f = cli_open_output(o->output)) == NULL) {
    exit_code = CLI_EXIT_OUTPUT;
    goto done;
  }
  if (n < planned) /* stopped by a signal: every file holds what was done */
    fprintf(f,
            "PARTIAL STUDY: stopped by %s after %ld of %ld samples; the "
            "summary, CSV and charts cover those samples only\n",
            stop_signal == SIGINT ? "an interrupt (SIGINT)" : "SIGTERM", n,
            planned);
  if (study_report_print(f, st, label, values, status, n) != KL_OK) {
    cli_error("out of memory summarizing %s", label);
    cli_close_output(f, o->output);
    exit_code = CLI_EXIT_MEMORY;
    goto done;
  }
  s.st = st;
  s.label = label;
  s.n = n;
  s.values = values;
  s.status = status;
  s.dims = dims;
  if (o->csv != NULL && (exit_code = write_csv(&s, o->csv)) == CLI_EXIT_OK)
    fprintf(f, "samples written to %s, one row each\n", o->csv);
  if (exit_code == CLI_EXIT_OK && o->charts != NULL &&
      (exit_code = cli_study_charts(&s, o->charts, &histograms, &scatters)) ==
          CLI_EXIT_OK)
    fprintf(f, "charts written in %s/: %d histogram%s, %d scatter plot%s\n",
            o->charts, histograms, histograms == 1 ? "" : "s", scatters,
            scatters == 1 ? "" : "s");
  study_report_throughput(f, n, seconds, 1, threads);
  {
    int closed = cli_close_output(f, o->output);
    if (exit_code == CLI_EXIT_OK)
      exit_code = closed;
  }
done:
  free(values);
  free(status);
  free(dims);
  kl_study_free(st);
  /* a stopped study ends as the shell expects of the signal: 128 + its
   * number (130 for Ctrl-C), after writing what it did */
  return stop_signal != 0 && exit_code == CLI_EXIT_OK ? 128 + stop_signal
                                                       : exit_code;
}
