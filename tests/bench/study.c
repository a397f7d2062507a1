/*
 * study.c - benchmark part 5: what one sample of a design study costs
 * against a plain sweep of the same model over the same steps, on one
 * thread.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime */

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "bench.h"

/* Samples timed per call of the study (a sample's cost is the call's over
 * this many). */
#define STUDY_SAMPLES 20
#define STUDY_SAMPLES_TEXT "20"

/* The benchmark's four-bar (part 1) as a model file: a crank-rocker
 * invented for the benchmark, swept over a turn in 10-degree steps. */
static const char model_text[] =
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

/* One tolerance on the rocker's pin hole, the rocker's swing judged. */
static const char study_text[] = "kinloop-study 1\n"
                                 "seed 7\n"
                                 "samples " STUDY_SAMPLES_TEXT "\n"
                                 "vary joint rocker_pin b x tolerance 0.05 "
                                 "normal\n"
                                 "output swing swing angle rocker\n";

typedef struct {
  kl_solver *s;
  const kl_solver *start;
  int rocker;
  double low, high; /* the rocker's swing over the last pass */
  int status;
} sweep_run;

static int track_rocker(const kl_solver *s, int step, double input,
                        void *user) {
  sweep_run *r = user;
  double angle = kl_link_angle(s, r->rocker);
  (void)step;
  (void)input;
  r->low = fmin(r->low, angle);
  r->high = fmax(r->high, angle);
  return 0;
}

BENCH_ENTRY static void bench_study_plain_sweep(void *run) {
  sweep_run *r = run;
  kl_sweep_result result;
  result.size = sizeof result;
  kl_solver_copy_state(r->s, r->start);
  r->low = HUGE_VAL;
  r->high = -HUGE_VAL;
  r->status = kl_solver_sweep(r->s, 0, 10 * PI / 180, 370 * PI / 180, 36,
                              track_rocker, r, &result);
}

typedef struct {
  kl_study *st;
  double values[STUDY_SAMPLES];
  int status[STUDY_SAMPLES];
  int result;
} study_run;

BENCH_ENTRY static void bench_study_samples(void *run) {
  study_run *r = run;
  r->result =
      kl_study_run(r->st, 0, STUDY_SAMPLES, 1, r->values, r->status, NULL);
}

void bench_study(FILE *out, const bench_plan *plan, study_figures *fig) {
  kl_io_error err;
  kl_model *m;
  sweep_run sweep = {0};
  study_run study = {0};
  bench_method methods[2];
  int i, assembled = 0;
  double mean = 0.0;
  err.size = sizeof err;
  m = kl_model_read(model_text, sizeof model_text - 1, &err);
  study.st = m != NULL ? kl_study_read(study_text, sizeof study_text - 1, m,
                                       &err)
                       : NULL;
  if (study.st == NULL || kl_study_prepare(study.st) != KL_OK) {
    fprintf(stderr, "kinloop-bench: the study does not start: %s\n",
            err.message);
    exit(EXIT_FAILURE);
  }
  sweep.s = kl_solver_new(m);
  sweep.start = kl_solver_new(m);
  sweep.rocker = kl_model_find_link(m, "rocker");
  methods[0].fn = bench_study_plain_sweep;
  methods[0].ctx = &sweep;
  methods[1].fn = bench_study_samples;
  methods[1].ctx = &study;
  bench_run(methods, 2, CLOCK_PROCESS_CPUTIME_ID, plan);
  for (i = 0; i < STUDY_SAMPLES; i++) {
    assembled += study.status[i] == KL_SAMPLE_OK;
    mean += study.values[i] / STUDY_SAMPLES;
  }
  fig->sample_over_sweep = bench_ratio(&methods[1], &methods[0]) /
                           STUDY_SAMPLES;
  fig->valid = sweep.status == KL_OK && study.result == KL_OK &&
               assembled == STUDY_SAMPLES;
  fprintf(out, "\n== Part 5: a design study's sample against a plain sweep, "
               "one thread ==\n");
  fprintf(out,
          "the benchmark four-bar over 36 steps of 10 deg; the study: %d "
          "tolerance samples of the rocker's pin, its swing judged\n",
          STUDY_SAMPLES);
  fprintf(out, "%-40s %12s %7s\n", "method", "us/sweep", "spread");
  fprintf(out, "%-40s %12.1f %6.0f%%\n", "plain sweep (kl_solver_sweep)",
          1e6 * methods[0].median, 100 * methods[0].spread);
  fprintf(out, "%-40s %12.1f %6.0f%%\n", "one study sample (kl_study_run)",
          1e6 * methods[1].median / STUDY_SAMPLES, 100 * methods[1].spread);
  fprintf(out,
          "rocker swing: the plain sweep's steps %.4f deg, the samples' "
          "mean %.4f deg (a sample also locates the extremes between "
          "steps); %d of %d samples assembled\n",
          (sweep.high - sweep.low) * 180 / PI, mean, assembled,
          STUDY_SAMPLES);
  fprintf(out, ">> study sample / plain sweep:              %6.2fx\n",
          fig->sample_over_sweep);
  kl_solver_free(sweep.s);
  kl_solver_free((kl_solver *)sweep.start);
  kl_study_free(study.st);
  kl_model_free(m);
}
