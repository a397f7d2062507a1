/*
 * check.c - benchmark part 6: what `kinloop check` costs against one
 * `kinloop sweep` of the same model file, on chains of 10 to 500 four-bar
 * loops (the geometry of part 2), both run as the tool is run, in a
 * process of their own.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime, mkdtemp */

#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "bench.h"

static const int check_sizes[] = {10, 20, 50, 100, 200, 500};
#define NSIZES ((int)(sizeof check_sizes / sizeof check_sizes[0]))

/* The chain of part 2 as a model file: loop k's coupler from the driver's
 * pin at 40 (the crank, then rocker k - 1) to rocker k's pin at 80, rocker
 * k pivoted at (100 (k + 1), 0); sketched near the open branch; swept over
 * a turn in 72 steps, as the tool's users sweep. */
static void write_chain(const char *path, int n) {
  FILE *f = fopen(path, "w");
  int k;
  if (f == NULL) {
    perror(path);
    exit(EXIT_FAILURE);
  }
  fprintf(f, "kinloop-model 1\nunits length mm angle deg\nlink crank\n");
  for (k = 0; k < n; k++)
    fprintf(f, "link coupler%d\nlink rocker%d\n", k, k);
  fprintf(f, "revolute motor ground 0 0 crank 0 0\n");
  for (k = 0; k < n; k++) {
    char driver[32];
    if (k == 0)
      snprintf(driver, sizeof driver, "crank");
    else
      snprintf(driver, sizeof driver, "rocker%d", k - 1);
    fprintf(f,
            "revolute pin%d %s 40 0 coupler%d 0 0\n"
            "revolute rocker_pin%d coupler%d 120 0 rocker%d 80 0\n"
            "revolute pivot%d rocker%d 0 0 ground %d 0\n"
            "sketch angle coupler%d 40\nsketch angle rocker%d 100\n",
            k, driver, k, k, k, k, k, k, 100 * (k + 1), k, k);
  }
  fprintf(f, "input motor\nsweep motor from 0 to 360 steps 72\n");
  if (fclose(f) != 0) {
    perror(path);
    exit(EXIT_FAILURE);
  }
}

typedef struct {
  char command[1024];
  int failures;
} tool_run;

static void run_tool(void *ctx) {
  tool_run *r = ctx;
  r->failures += system(r->command) != 0;
}

BENCH_ENTRY static void bench_check_tool_check(void *run) { run_tool(run); }
BENCH_ENTRY static void bench_check_tool_sweep(void *run) { run_tool(run); }

void bench_check(FILE *out, const bench_plan *plan, check_figures *fig) {
  char dir[] = "/tmp/kinloop-bench-XXXXXX", path[256];
  bench_plan few = *plan;
  int i;
  /* a check of 500 loops takes seconds: five rounds tell the median */
  if (!few.quick && few.samples > 5)
    few.samples = 5;
  if (mkdtemp(dir) == NULL) {
    perror("mkdtemp");
    exit(EXIT_FAILURE);
  }
  fprintf(out, "\n== part 6: kinloop check against one kinloop sweep (chains "
               "of N four-bar loops, 72 steps, whole processes, wall time) "
               "==\n");
  fprintf(out, "%6s %12s %12s %14s\n", "N", "sweep s", "check s",
          "check / sweep");
  fig->valid = 1;
  for (i = 0; i < NSIZES; i++) {
    tool_run check, sweep;
    bench_method methods[2];
    double ratio;
    snprintf(path, sizeof path, "%s/chain%d.kinloop", dir, check_sizes[i]);
    write_chain(path, check_sizes[i]);
    memset(&check, 0, sizeof check);
    memset(&sweep, 0, sizeof sweep);
    snprintf(check.command, sizeof check.command,
             "'%s' check '%s' > /dev/null", KINLOOP_TOOL, path);
    snprintf(sweep.command, sizeof sweep.command,
             "'%s' sweep '%s' > /dev/null", KINLOOP_TOOL, path);
    memset(methods, 0, sizeof methods);
    methods[0].fn = bench_check_tool_sweep;
    methods[0].ctx = &sweep;
    methods[1].fn = bench_check_tool_check;
    methods[1].ctx = &check;
    bench_run(methods, 2, CLOCK_MONOTONIC, &few);
    ratio = bench_ratio(&methods[1], &methods[0]);
    fig->valid &= check.failures == 0 && sweep.failures == 0;
    fprintf(out, "%6d %12.3f %12.3f %13.2fx%s\n", check_sizes[i],
            methods[0].median, methods[1].median, ratio,
            check.failures || sweep.failures ? "  (a run FAILED)" : "");
    if (check_sizes[i] == 500)
      fig->check_over_sweep_500 = ratio;
    remove(path);
  }
  rmdir(dir);
}
