/*
 * study_report.h - the text report of a design study, shared by `kinloop
 * study` and kinloop-study-mpi so that both print it byte for byte alike.
 */
#ifndef KINLOOP_STUDY_REPORT_H
#define KINLOOP_STUDY_REPORT_H

#include <stdio.h>

#include "kinloop.h"

/* The word that starts the one line whose numbers depend on the machine
 * (timing); every other line depends on the study's samples alone. */
#define STUDY_THROUGHPUT_WORD "throughput"

/* Prints why reading the study `label` failed, as "PROGRAM: LABEL:LINE:
 * COLUMN: message" (or "PROGRAM: LABEL: message" for the study as a whole),
 * and returns the tool's exit code for it: 1 out of memory, 4 a nominal
 * that does not solve, 3 anything else. */
int study_read_failed(const char *program, const char *label,
                      const kl_io_error *err);
/* The exit code study_read_failed returns, without the message. */
int study_read_exit_code(const kl_io_error *err);
/* Prints why kl_study_prepare failed with `status` ("PROGRAM: LABEL:
 * message") and returns the tool's exit code for it, as
 * study_read_failed. */
int study_prepare_failed(const char *program, const char *label,
                         const kl_study *st, int status);
/* The tool's exit code for a study's failure status: 1 out of memory, 4
 * a nominal that does not solve, 3 anything else. */
int study_exit_code(int status);

/* Prints the summary of samples 0 .. n - 1 (values and statuses as
 * kl_study_run wrote them, in sample order) into f: the study's outline,
 * then one block per output, then an empty line. Returns KL_OK, or
 * KL_ENOMEM. */
int study_report_print(FILE *f, const kl_study *st, const char *label,
                       const double *values, const int *status, long n);

/* The number of threads kl_study_run runs on when asked for `requested`
 * (0: one per core, at most 64). */
int study_threads(int requested);

/* The throughput line: `samples` run in `seconds` of wall time by
 * `processes` processes of `threads` threads each. */
void study_report_throughput(FILE *f, long samples, double seconds,
                             int processes, int threads);

#endif
