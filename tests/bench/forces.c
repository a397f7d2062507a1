/*
 * forces.c - benchmark part 4: the force stage after position, velocity
 * and acceleration, against one position solve, on the four-bar and on
 * chains of 10 and 100 four-bar loops.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime */

#include <math.h>
#include <stdlib.h>

#include "bench.h"
#include "machines.h"

/* Stages one pass runs at every step. */
enum { POSITION = 1, RATES = 3, FORCES = 4 };

typedef struct {
  kl_solver *s;
  const kl_solver *start;
  int steps, stages;
  double from, step, rate;
  int nloads;
  const kl_load *loads;
  int failures;
} force_run;

/* Each step solved from the last, from the run's start; rates at a
 * constant input speed. */
static void force_pass(force_run *r) {
  static const double no_accel = 0.0;
  int i;
  kl_solver_copy_state(r->s, r->start);
  r->failures = 0;
  for (i = 0; i < r->steps; i++) {
    double u = r->from + (i + 1) * r->step;
    int st = kl_solve_position(r->s, &u);
    if (st == KL_OK && r->stages >= RATES &&
        (st = kl_solve_velocity(r->s, &r->rate)) == KL_OK)
      st = kl_solve_acceleration(r->s, &no_accel);
    if (st == KL_OK && r->stages >= FORCES)
      st = kl_solve_forces(r->s, r->nloads, r->loads, NULL);
    r->failures += st != KL_OK;
  }
}

BENCH_ENTRY static void bench_forces_fourbar_position(void *run) {
  force_pass(run);
}
BENCH_ENTRY static void bench_forces_fourbar_rates(void *run) {
  force_pass(run);
}
BENCH_ENTRY static void bench_forces_fourbar_forces(void *run) {
  force_pass(run);
}
BENCH_ENTRY static void bench_forces_chain_position(void *run) {
  force_pass(run);
}
BENCH_ENTRY static void bench_forces_chain_rates(void *run) {
  force_pass(run);
}
BENCH_ENTRY static void bench_forces_chain_forces(void *run) {
  force_pass(run);
}

/* Per round, the force stage's time (the forces pass less the rates
 * pass) over the position pass's: the median. */
static double stage_ratio(const bench_method *m, double *per_step_ns,
                          int steps) {
  double ratios[BENCH_MAX_SAMPLES], costs[BENCH_MAX_SAMPLES];
  int round;
  for (round = 0; round < m[0].rounds; round++) {
    double force = m[2].seconds[round] - m[1].seconds[round];
    ratios[round] = force / m[0].seconds[round];
    costs[round] = 1e9 * force / steps;
  }
  *per_step_ns = bench_median(costs, m[0].rounds);
  return bench_median(ratios, m[0].rounds);
}

/* The three passes of one model from one start. */
static void measure(kl_solver *start, const kl_model *m, int steps,
                    double from, double step, double rate, int nloads,
                    const kl_load *loads, void (*const fns[3])(void *),
                    const bench_plan *plan, bench_method *methods,
                    int *failures) {
  static const int stages[3] = {POSITION, RATES, FORCES};
  force_run runs[3];
  int i;
  for (i = 0; i < 3; i++) {
    runs[i].s = bench_solver_new(m, KL_KERNEL_AUTO);
    runs[i].start = start;
    runs[i].steps = steps;
    runs[i].stages = stages[i];
    runs[i].from = from;
    runs[i].step = step;
    runs[i].rate = rate;
    runs[i].nloads = nloads;
    runs[i].loads = loads;
    methods[i].fn = fns[i];
    methods[i].ctx = &runs[i];
  }
  bench_run(methods, 3, CLOCK_PROCESS_CPUTIME_ID, plan);
  *failures = 0;
  for (i = 0; i < 3; i++) {
    *failures += runs[i].failures;
    kl_solver_free(runs[i].s);
  }
}

static void fourbar_forces(FILE *out, const bench_plan *plan,
                           force_figures *fig) {
  static void (*const fns[3])(void *) = {bench_forces_fourbar_position,
                                         bench_forces_fourbar_rates,
                                         bench_forces_fourbar_forces};
  machine mc = build_machine(MACHINE_FOURBAR, 1);
  kl_solver *start = bench_solver_new(mc.m, KL_KERNEL_AUTO);
  bench_method m[3];
  int k, failures, steps = FOURBAR_STEPS;
  double u0 = mc.from[0], h = FOURBAR_STEP_DEG * PI / 180.0;
  for (k = 0; k < mc.nsketch; k++)
    kl_set_link_angle(start, mc.sketch_link[k], mc.sketch_angle[k]);
  if (kl_solve_position(start, &u0) != KL_OK) {
    fprintf(stderr, "kinloop-bench: the four-bar machine does not start\n");
    exit(EXIT_FAILURE);
  }
  measure(start, mc.m, steps, u0, h, 12.0, mc.nloads, mc.loads, fns, plan, m,
          &failures);
  fig->fourbar_ratio = stage_ratio(m, &fig->fourbar_force_ns, steps);
  fig->fourbar_position_ns = 1e9 * m[0].median / steps;
  fig->valid = failures == 0;
  fprintf(out,
          "\n== Part 4: the force stage (four-bar of tests/machines.c with "
          "masses, gravity and loads) ==\n");
  fprintf(out, "%d crank steps of %g deg; each pass from the previous "
               "solution; rounds interleave the passes\n",
          steps, FOURBAR_STEP_DEG);
  fprintf(out, "%-44s %11s %7s\n", "pass", "ns/step", "spread");
  fprintf(out, "%-44s %11.1f %6.0f%%\n", "position", 1e9 * m[0].median / steps,
          100 * m[0].spread);
  fprintf(out, "%-44s %11.1f %6.0f%%\n", "position+velocity+acceleration",
          1e9 * m[1].median / steps, 100 * m[1].spread);
  fprintf(out, "%-44s %11.1f %6.0f%%\n",
          "position+velocity+acceleration+forces", 1e9 * m[2].median / steps,
          100 * m[2].spread);
  fprintf(out, ">> force stage: %.1f ns/step, %.2fx one position solve "
               "(median of the rounds' (forces - rates) / position)%s\n",
          fig->fourbar_force_ns, fig->fourbar_ratio,
          failures ? "; SOME STEPS FAILED" : "");
  kl_solver_free(start);
  kl_model_free(mc.m);
}

static void chain_forces(FILE *out, const bench_plan *plan,
                         force_figures *fig) {
  static void (*const fns[3])(void *) = {bench_forces_chain_position,
                                         bench_forces_chain_rates,
                                         bench_forces_chain_forces};
  static const int sizes[2] = {10, 100};
  int i;
  fprintf(out, "%4s %6s %14s %14s %10s\n", "N", "steps", "position ns",
          "forces ns", "forces/pos");
  for (i = 0; i < 2; i++) {
    chain c = build_massive_chain(sizes[i]);
    kl_solver *start = bench_solver_new(c.m, KL_KERNEL_AUTO);
    bench_method m[3];
    int failures, steps = plan->quick ? 10 : (sizes[i] <= 10 ? 360 : 36);
    double zero = 0.0, ratio;
    sketch_chain(&c, start, 0.0);
    if (kl_solve_position(start, &zero) != KL_OK) {
      fprintf(stderr, "kinloop-bench: the chain of %d loops does not start\n",
              sizes[i]);
      exit(EXIT_FAILURE);
    }
    measure(start, c.m, steps, 0.0, PI / 180.0, 12.0, 0, NULL, fns, plan, m,
            &failures);
    ratio = stage_ratio(m, &fig->chain_force_ns[i], steps);
    fig->chain_position_ns[i] = 1e9 * m[0].median / steps;
    fig->valid &= failures == 0;
    fprintf(out, "%4d %6d %14.0f %14.0f %9.2fx%s\n", sizes[i], steps,
            fig->chain_position_ns[i], fig->chain_force_ns[i], ratio,
            failures ? "  SOME STEPS FAILED" : "");
    kl_solver_free(start);
    kl_model_free(c.m);
  }
  fig->growth_position =
      log(fig->chain_position_ns[1] / fig->chain_position_ns[0]) / log(10.0);
  fig->growth_forces =
      log(fig->chain_force_ns[1] / fig->chain_force_ns[0]) / log(10.0);
  fprintf(out,
          ">> growth from N = 10 to 100, t ~ N^p: position p = %.2f, force "
          "stage p = %.2f\n",
          fig->growth_position, fig->growth_forces);
}

void bench_forces(FILE *out, const bench_plan *plan, force_figures *fig) {
  fourbar_forces(out, plan, fig);
  fprintf(out, "chains of N four-bar loops with masses (build_massive_chain), "
               "crank steps of 1 deg:\n");
  chain_forces(out, plan, fig);
}
