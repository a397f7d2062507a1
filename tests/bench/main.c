/*
 * main.c - kinloop-bench: times kinloop against the closed form and GSL in
 * one run and reports each performance target as met or not met.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime */

#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "bench.h"

typedef struct {
  const char *what;
  double measured;
  double limit;
  int at_most; /* 1: measured <= limit is met; 0: measured >= limit */
  int valid;   /* the results behind the figure were right */
  const char *unit;
} target;

static void print_target(FILE *out, const target *t) {
  int met = t->valid &&
            (t->at_most ? t->measured <= t->limit : t->measured >= t->limit);
  char measured[32];
  snprintf(measured, sizeof measured, "%.2f%s", t->measured, t->unit);
  fprintf(out, "%-62s %10s  %s\n", t->what, measured,
          met        ? "met"
          : t->valid ? "not met"
                     : "not met (results wrong)");
}

static void usage(FILE *out) {
  fprintf(out, "usage: kinloop-bench [--quick] [--reader] [--couplings] [--inverse]\n"
               "  times kinloop against the closed form and GSL; never fails "
               "on time\n"
               "  --quick  one call per method and few chain steps (for "
               "valgrind and callgrind)\n"
               "  --reader the model reader's row alone (part 8)\n"
               "  --couplings the coupled linkages' rows alone (part 9)\n"
               "  --inverse the five-bar's inverse kinematics alone (part 10)\n");
}

int main(int argc, char **argv) {
  bench_plan plan = {11, 0.04, 0};
  fourbar_figures fourbar = {0};
  chain_figures chains = {0};
  thread_figures threads = {0};
  force_figures forces = {0};
  study_figures study = {0};
  check_figures checks = {0};
  jerk_figures jerk = {0};
  reader_figures reader = {0};
  coupling_figures couplings = {0};
  inverse_figures inverse = {0};
  target targets[12];
  size_t i;
  int arg;
  for (arg = 1; arg < argc; arg++) {
    if (strcmp(argv[arg], "--quick") == 0) {
      plan.quick = 1;
      plan.samples = 1;
    } else if (strcmp(argv[arg], "--reader") == 0) {
      bench_reader(stdout, &plan, &reader);
      return EXIT_SUCCESS;
    } else if (strcmp(argv[arg], "--couplings") == 0) {
      machine_report(stdout, &plan);
      bench_couplings(stdout, &plan, &couplings);
      machine_load(stdout, "at the end");
      return couplings.valid ? EXIT_SUCCESS : EXIT_FAILURE;
    } else if (strcmp(argv[arg], "--inverse") == 0) {
      machine_report(stdout, &plan);
      bench_inverse(stdout, &plan, &inverse);
      machine_load(stdout, "at the end");
      return inverse.valid ? EXIT_SUCCESS : EXIT_FAILURE;
    } else {
      usage(strcmp(argv[arg], "--help") == 0 ? stdout : stderr);
      return strcmp(argv[arg], "--help") == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
    }
  }
  gsl_set_error_handler_off(); /* GSL's default handler aborts */
  machine_report(stdout, &plan);
  bench_fourbar(stdout, &plan, &fourbar);
  fflush(stdout);
  bench_chain(stdout, &plan, &chains);
  fflush(stdout);
  bench_threads(stdout, &plan, &fourbar, &threads);
  fflush(stdout);
  bench_forces(stdout, &plan, &forces);
  fflush(stdout);
  bench_study(stdout, &plan, &study);
  bench_check(stdout, &plan, &checks);
  bench_jerk(stdout, &plan, &jerk);
  bench_reader(stdout, &plan, &reader);
  bench_couplings(stdout, &plan, &couplings);
  bench_inverse(stdout, &plan, &inverse);
  machine_load(stdout, "at the end");

  targets[0].what = "four-bar position solve <= 2.5x the closed form";
  targets[0].measured = fourbar.small_ratio;
  targets[0].limit = 2.5;
  targets[0].at_most = 1;
  targets[0].valid = fourbar.small_valid;
  targets[0].unit = "x";
  targets[1].what = "four-bar position solve >= 5x faster than GSL hybridsj";
  targets[1].measured = fourbar.hybridsj_ratio;
  targets[1].limit = 5.0;
  targets[1].at_most = 0;
  targets[1].valid = fourbar.small_valid;
  targets[1].unit = "x";
  targets[2].what = "four-bar position+velocity+acceleration <= 4x closed form";
  targets[2].measured = fourbar.rates_ratio;
  targets[2].limit = 4.0;
  targets[2].at_most = 1;
  targets[2].valid = fourbar.rates_valid;
  targets[2].unit = "x";
  targets[3].what = "chain N = 100 >= 150x faster than GSL hybridsj";
  targets[3].measured = chains.gsl_over_auto_100;
  targets[3].limit = 150.0;
  targets[3].at_most = 0;
  targets[3].valid = chains.kinloop_valid;
  targets[3].unit = "x";
  targets[4].what = "chain cost growth N = 10 to 100 <= N^1.1 (exponent p)";
  targets[4].measured = chains.growth_auto;
  targets[4].limit = 1.1;
  targets[4].at_most = 1;
  targets[4].valid = chains.kinloop_valid;
  targets[4].unit = "";
  targets[5].what = "four-bar force stage <= 1.5x one position solve";
  targets[5].measured = forces.fourbar_ratio;
  targets[5].limit = 1.5;
  targets[5].at_most = 1;
  targets[5].valid = forces.valid;
  targets[5].unit = "x";
  targets[6].what = "force stage growth N = 10 to 100 <= the position stage's";
  targets[6].measured = forces.growth_forces;
  targets[6].limit = forces.growth_position;
  targets[6].at_most = 1;
  targets[6].valid = forces.valid;
  targets[6].unit = "";
  targets[7].what = "four-bar position solve <= 1.25x hand-written Newton";
  targets[7].measured = fourbar.hand_ratio;
  targets[7].limit = 1.25;
  targets[7].at_most = 1;
  targets[7].valid = fourbar.small_valid && fourbar.hand_valid;
  targets[7].unit = "x";
  targets[8].what = "four-bar pos+vel+acc <= 1.25x hand-written pos+vel+acc";
  targets[8].measured = fourbar.hand_rates_ratio;
  targets[8].limit = 1.25;
  targets[8].at_most = 1;
  targets[8].valid = fourbar.rates_valid && fourbar.hand_valid;
  targets[8].unit = "x";
  targets[9].what = "study sample <= 3x a plain sweep (one thread)";
  targets[9].measured = study.sample_over_sweep;
  targets[9].limit = 3.0;
  targets[9].at_most = 1;
  targets[9].valid = study.valid;
  targets[9].unit = "x";
  targets[10].what = "kinloop check <= 10x one kinloop sweep at N = 500";
  targets[10].measured = checks.check_over_sweep_500;
  targets[10].limit = 10.0;
  targets[10].at_most = 1;
  targets[10].valid = checks.valid;
  targets[10].unit = "x";
  targets[11].what = "four-bar jerk stage's extra cost <= 0.3x one position";
  targets[11].measured = jerk.fourbar_ratio;
  targets[11].limit = 0.3;
  targets[11].at_most = 1;
  targets[11].valid = jerk.valid;
  targets[11].unit = "x";
  printf("\n== targets (ratios measured in this run%s) ==\n",
         plan.quick ? "; QUICK MODE: single samples, not for reporting" : "");
  printf("%-62s %10s  %s\n", "target", "measured", "verdict");
  for (i = 0; i < sizeof targets / sizeof targets[0]; i++)
    print_target(stdout, &targets[i]);
  printf("(not targets: 2 threads / 1 thread throughput %.2fx; thread "
         "results identical: %s; reader time per item at 900,000 items / "
         "at 1,000: %.2fx; five-bar inverse kinematics / closed form %.2fx, "
         "crank angles within %.2g rad%s)\n",
         threads.throughput_ratio, threads.results_identical ? "yes" : "NO",
         reader.ratio_largest, inverse.ratio, inverse.max_angle_difference,
         inverse.valid ? "" : " (RESULTS WRONG)");
  printf("(not targets: per unknown against the four-bar, geared five-bar "
         "%.2fx, cam and follower %.2fx; allocations after kl_solver_new "
         "%ld; results %s)\n",
         couplings.geared_per_unknown, couplings.cam_per_unknown,
         couplings.allocations, couplings.valid ? "right" : "WRONG");
  fourbar_done(&fourbar);
  return EXIT_SUCCESS;
}
