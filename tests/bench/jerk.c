/*
 * jerk.c - benchmark part 7: the jerk stage's extra cost over the
 * acceleration stage, against one position solve, on the four-bar of
 * tests/machines.c and on a chain of 100 four-bar loops.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime */

#include <stdlib.h>

#include "bench.h"
#include "machines.h"

/* Stages one pass runs at every step. */
enum { POSITION = 1, ACCELERATION = 3, JERK = 4 };

typedef struct {
  kl_solver *s;
  const kl_solver *start;
  int steps, stages;
  double from, step, rate;
  int failures;
} jerk_run;

/* Each step solved from the last, from the run's start; rates at a
 * constant input speed. */
static void jerk_pass(jerk_run *r) {
  static const double zero = 0.0;
  int i;
  kl_solver_copy_state(r->s, r->start);
  r->failures = 0;
  for (i = 0; i < r->steps; i++) {
    double u = r->from + (i + 1) * r->step;
    int st = kl_solve_position(r->s, &u);
    if (st == KL_OK && r->stages >= ACCELERATION &&
        (st = kl_solve_velocity(r->s, &r->rate)) == KL_OK)
      st = kl_solve_acceleration(r->s, &zero);
    if (st == KL_OK && r->stages >= JERK)
      st = kl_solve_jerk(r->s, &zero);
    r->failures += st != KL_OK;
  }
}

BENCH_ENTRY static void bench_jerk_fourbar_position(void *run) {
  jerk_pass(run);
}
BENCH_ENTRY static void bench_jerk_fourbar_accel(void *run) { jerk_pass(run); }
BENCH_ENTRY static void bench_jerk_fourbar_jerk(void *run) { jerk_pass(run); }
BENCH_ENTRY static void bench_jerk_chain_position(void *run) { jerk_pass(run); }
BENCH_ENTRY static void bench_jerk_chain_accel(void *run) { jerk_pass(run); }
BENCH_ENTRY static void bench_jerk_chain_jerk(void *run) { jerk_pass(run); }

/* Times the three passes of one model from `start`; returns the median of
 * the rounds' (jerk pass - acceleration pass) / position pass, and the
 * jerk stage's ns per step into *jerk_ns. */
static double measure(kl_solver *start, const kl_model *m, int steps,
                      double from, double step, void (*const fns[3])(void *),
                      const bench_plan *plan, double *position_ns,
                      double *jerk_ns, int *failures) {
  static const int stages[3] = {POSITION, ACCELERATION, JERK};
  double ratios[BENCH_MAX_SAMPLES], costs[BENCH_MAX_SAMPLES];
  bench_method methods[3];
  jerk_run runs[3];
  int i, round;
  for (i = 0; i < 3; i++) {
    runs[i].s = bench_solver_new(m, KL_KERNEL_AUTO);
    runs[i].start = start;
    runs[i].steps = steps;
    runs[i].stages = stages[i];
    runs[i].from = from;
    runs[i].step = step;
    runs[i].rate = 12.0;
    methods[i].fn = fns[i];
    methods[i].ctx = &runs[i];
  }
  bench_run(methods, 3, CLOCK_PROCESS_CPUTIME_ID, plan);
  *failures = 0;
  for (i = 0; i < 3; i++) {
    *failures += runs[i].failures;
    kl_solver_free(runs[i].s);
  }
  for (round = 0; round < methods[0].rounds; round++) {
    double extra = methods[2].seconds[round] - methods[1].seconds[round];
    ratios[round] = extra / methods[0].seconds[round];
    costs[round] = 1e9 * extra / steps;
  }
  *position_ns = 1e9 * methods[0].median / steps;
  *jerk_ns = bench_median(costs, methods[0].rounds);
  return bench_median(ratios, methods[0].rounds);
}

void bench_jerk(FILE *out, const bench_plan *plan, jerk_figures *fig) {
  static void (*const fourbar_fns[3])(void *) = {
      bench_jerk_fourbar_position, bench_jerk_fourbar_accel,
      bench_jerk_fourbar_jerk};
  static void (*const chain_fns[3])(void *) = {bench_jerk_chain_position,
                                               bench_jerk_chain_accel,
                                               bench_jerk_chain_jerk};
  machine mc = build_machine(MACHINE_FOURBAR, 0);
  chain c = build_massive_chain(100);
  kl_solver *start = bench_solver_new(mc.m, KL_KERNEL_AUTO);
  kl_solver *chain_start = bench_solver_new(c.m, KL_KERNEL_AUTO);
  double u0 = mc.from[0], zero = 0.0, position_ns, chain_position_ns;
  int k, failures, chain_failures;
  int chain_steps = plan->quick ? 10 : 36;
  for (k = 0; k < mc.nsketch; k++)
    kl_set_link_angle(start, mc.sketch_link[k], mc.sketch_angle[k]);
  sketch_chain(&c, chain_start, 0.0);
  if (kl_solve_position(start, &u0) != KL_OK ||
      kl_solve_position(chain_start, &zero) != KL_OK) {
    fprintf(stderr, "kinloop-bench: the jerk part's models do not start\n");
    exit(EXIT_FAILURE);
  }
  fig->fourbar_ratio =
      measure(start, mc.m, FOURBAR_STEPS, u0, FOURBAR_STEP_DEG * PI / 180.0,
              fourbar_fns, plan, &position_ns, &fig->fourbar_jerk_ns,
              &failures);
  fig->chain_ratio = measure(chain_start, c.m, chain_steps, 0.0, PI / 180.0,
                             chain_fns, plan, &chain_position_ns,
                             &fig->chain_jerk_ns, &chain_failures);
  fig->valid = failures == 0 && chain_failures == 0;
  fprintf(out, "\n== Part 5: the jerk stage's extra cost over acceleration "
               "==\n");
  fprintf(out, "passes: position; +velocity+acceleration; +jerk; rounds "
               "interleave the passes\n");
  fprintf(out, "%-36s %14s %14s %12s\n", "model", "position ns", "jerk ns",
          "jerk/pos");
  fprintf(out, "%-36s %14.1f %14.1f %11.2fx%s\n", "four-bar, 3600 steps",
          position_ns, fig->fourbar_jerk_ns, fig->fourbar_ratio,
          failures ? "  SOME STEPS FAILED" : "");
  fprintf(out, "%-36s %14.0f %14.0f %11.2fx%s\n", "chain of 100 loops",
          chain_position_ns, fig->chain_jerk_ns, fig->chain_ratio,
          chain_failures ? "  SOME STEPS FAILED" : "");
  kl_solver_free(start);
  kl_solver_free(chain_start);
  kl_model_free(mc.m);
  kl_model_free(c.m);
}
