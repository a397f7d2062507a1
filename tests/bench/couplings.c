/*
 * couplings.c - benchmark part 9: position solves of a geared five-bar
 * (three unknowns: two loop equations and a gear pair's) and of a cam and
 * follower (two unknowns: an eccentric disc cam turning a translating
 * roller follower, the roller in an arc slot) against the four-bar of part
 * 1 (two unknowns), per solve and per unknown, in the same run; and the
 * allocations every model's passes make after kl_solver_new, counted by
 * the allocator of tests/support.c.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime */

#include <math.h>
#include <stdlib.h>

#include "bench.h"

/* The four-bar of part 1. */
#define GROUND 100.0
#define CRANK 40.0
#define COUPLER 120.0
#define ROCKER 80.0
/* The geared five-bar (made up for the benchmark, as the tool's
 * cli_couplings test): cranks 30 and 35 on pivots 100 apart geared by an
 * external pair of pitch radii 40 and 60, arms 90 and 85 pinned at the
 * tip. The elbows stay 35 to 165 apart, inside what arms of 90 and 85
 * reach (5 to 175), so it assembles over whole turns. */
#define GEAR_LEFT 40.0
#define GEAR_RIGHT 60.0
/* The disc cam (as test_slots.c): eccentricity 12, disc radius 40, roller
 * radius 8, the follower's stem on x = 5. */
#define CAM_ECC 12.0
#define CAM_DISC 40.0
#define CAM_ROLLER 8.0
#define CAM_OFFSET 5.0

enum { FOURBAR, GEARED, CAM, MODELS };

typedef struct {
  kl_solver *s, *start;
  int unknowns;
  double from;    /* the input at the start; steps go up from it */
  int link;       /* the link whose angle each step records, or -1 */
  int joint;      /* else the joint whose slide it records */
  double *out;    /* per step */
  int failures;   /* steps not solved, last pass */
  long allocations; /* allocator calls during the passes */
} coupled_run;

static double input_at(const coupled_run *r, int step) {
  return r->from + (step + 1) * (FOURBAR_STEP_DEG * PI / 180.0);
}

static void coupled_pass(coupled_run *r) {
  int i;
  kl_solver_copy_state(r->s, r->start);
  r->failures = 0;
  for (i = 0; i < FOURBAR_STEPS; i++) {
    double u = input_at(r, i);
    r->failures += kl_solve_position(r->s, &u) != KL_OK;
    r->out[i] = r->link >= 0 ? kl_link_angle(r->s, r->link)
                             : kl_joint_slide(r->s, r->joint);
  }
}

BENCH_ENTRY static void bench_couplings_fourbar(void *run) {
  coupled_pass(run);
}
BENCH_ENTRY static void bench_couplings_geared_fivebar(void *run) {
  coupled_pass(run);
}
BENCH_ENTRY static void bench_couplings_cam_follower(void *run) {
  coupled_pass(run);
}

/* The geared five-bar in the empty model m, both cranks and the gear pair
 * sketched at 90 degrees (the meshing pose the pair counts from). Returns
 * the right crank's link. */
static int build_geared_fivebar(kl_model *m) {
  int left = kl_add_link(m, "left_crank"), right = kl_add_link(m, "right_crank");
  int left_arm = kl_add_link(m, "left_arm"), right_arm = kl_add_link(m, "right_arm");
  int motor = kl_add_revolute(m, KL_GROUND, 0, 0, left, 0, 0);
  int right_pivot = kl_add_revolute(m, KL_GROUND, 100, 0, right, 0, 0);
  kl_add_revolute(m, left, 30, 0, left_arm, 0, 0);
  kl_add_revolute(m, right, 35, 0, right_arm, 0, 0);
  kl_add_revolute(m, left_arm, 90, 0, right_arm, 85, 0);
  kl_add_input(m, motor);
  kl_add_gear_pair(m, motor, right_pivot, GEAR_LEFT, GEAR_RIGHT);
  kl_model_set_sketch_angle(m, left, PI / 2);
  kl_model_set_sketch_angle(m, right, PI / 2);
  kl_model_set_sketch_angle(m, left_arm, PI / 6);
  kl_model_set_sketch_angle(m, right_arm, 5 * PI / 6);
  return right;
}

/* The right crank's angle by the rolling condition of an external pair,
 * r1 dphi1 = -r2 dphi2 (common practice, no source), from the sketch. */
static double geared_right_crank(double motor) {
  return PI / 2 - GEAR_LEFT / GEAR_RIGHT * (motor - PI / 2);
}

/* The disc cam and its follower in the empty model m: joint 0 the cam's
 * shaft (the input), 1 the follower's guide (along +y), 2 the roller in an
 * arc slot of radius disc + roller about the disc's centre. */
static void build_cam_follower(kl_model *m) {
  int cam = kl_add_link(m, "cam"), follower = kl_add_link(m, "follower");
  int shaft = kl_add_revolute(m, KL_GROUND, 0, 0, cam, 0, 0);
  kl_add_prismatic(m, KL_GROUND, CAM_OFFSET, 0, PI / 2, follower, 0, 0);
  kl_add_arc_slot(m, cam, CAM_ECC, 0, CAM_DISC + CAM_ROLLER, follower, 0, 0);
  kl_add_input(m, shaft);
}

/* The follower's slide as the offset slider-crank's (crank ecc, rod disc +
 * roller; support.c's offset_slider_y, from Norton, from memory). */
static double cam_follower_slide(double t) {
  return offset_slider_y(CAM_ECC, CAM_DISC + CAM_ROLLER, CAM_OFFSET, t, NULL);
}

/* Makes run r's two solvers (the start and the timed one) on its model;
 * its unknowns are its equations: two per loop, one per coupling. */
static void start_run(coupled_run *r, const kl_model *m) {
  r->start = bench_solver_new(m, KL_KERNEL_AUTO);
  r->s = bench_solver_new(m, KL_KERNEL_AUTO);
  r->unknowns = 2 * kl_model_loop_count(m) + kl_model_coupling_count(m);
  r->out = bench_calloc(FOURBAR_STEPS, sizeof *r->out);
}

static void start_failed(const char *name) {
  fprintf(stderr, "kinloop-bench: the %s does not start\n", name);
  exit(EXIT_FAILURE);
}

void bench_couplings(FILE *out, const bench_plan *plan,
                     coupling_figures *fig) {
  static const char *const names[MODELS] = {
      "four-bar (part 1)", "geared five-bar", "disc cam, roller follower"};
  static void (*const fns[MODELS])(void *) = {bench_couplings_fourbar,
                                               bench_couplings_geared_fivebar,
                                               bench_couplings_cam_follower};
  counting_alloc alloc[MODELS] = {{0}};
  kl_model *m[MODELS];
  coupled_run runs[MODELS] = {{0}};
  bench_method methods[MODELS];
  long before[MODELS];
  double t3, t4, u, ns[MODELS], error[MODELS];
  fourbar f;
  int k, i;

  f = build_fourbar_in(counting_model(&alloc[FOURBAR]), CRANK, COUPLER,
                       ROCKER, GROUND);
  m[FOURBAR] = f.m;
  m[GEARED] = counting_model(&alloc[GEARED]);
  runs[GEARED].link = build_geared_fivebar(m[GEARED]);
  m[CAM] = counting_model(&alloc[CAM]);
  build_cam_follower(m[CAM]);
  if (kl_model_finalize(m[GEARED]) != KL_OK)
    start_failed(names[GEARED]);
  if (kl_model_finalize(m[CAM]) != KL_OK)
    start_failed(names[CAM]);
  for (k = 0; k < MODELS; k++)
    start_run(&runs[k], m[k]);

  runs[FOURBAR].link = f.rocker;
  runs[FOURBAR].from = 0.0;
  u = 0.0;
  if (!freudenstein(&f, 0.0, +1, &t3, &t4) ||
      kl_set_link_angle(runs[FOURBAR].start, f.coupler, t3) != KL_OK ||
      kl_set_link_angle(runs[FOURBAR].start, f.rocker, t4) != KL_OK ||
      kl_solve_position(runs[FOURBAR].start, &u) != KL_OK)
    start_failed(names[FOURBAR]);
  runs[GEARED].from = u = PI / 2;
  if (kl_solve_position(runs[GEARED].start, &u) != KL_OK)
    start_failed(names[GEARED]);
  /* the roller's place on the slot: its polar angle about the disc's
   * centre, in the cam's frame, at cam angle 0 */
  runs[CAM].link = -1;
  runs[CAM].joint = 1;
  runs[CAM].from = u = 0.0;
  {
    double y = cam_follower_slide(0.0);
    kl_set_joint_slide(runs[CAM].start, 1, y);
    kl_set_joint_slide(runs[CAM].start, 2,
                       atan2(y, CAM_OFFSET - CAM_ECC) * (CAM_DISC + CAM_ROLLER));
    if (kl_solve_position(runs[CAM].start, &u) != KL_OK)
      start_failed(names[CAM]);
  }

  for (k = 0; k < MODELS; k++) {
    methods[k].fn = fns[k];
    methods[k].ctx = &runs[k];
    before[k] = alloc[k].calls;
  }
  bench_run(methods, MODELS, CLOCK_PROCESS_CPUTIME_ID, plan);

  fig->valid = 1;
  for (k = 0; k < MODELS; k++) {
    runs[k].allocations = alloc[k].calls - before[k];
    ns[k] = 1e9 * methods[k].median / FOURBAR_STEPS;
    error[k] = 0.0;
    for (i = 0; i < FOURBAR_STEPS; i++) {
      double want, x = input_at(&runs[k], i), e;
      if (k == FOURBAR) {
        freudenstein(&f, x, +1, &t3, &want);
        e = fabs(angle_diff(runs[k].out[i], want));
      } else if (k == GEARED) {
        e = fabs(angle_diff(runs[k].out[i], geared_right_crank(x)));
      } else {
        /* a slide, as an angle about the cam's shaft at the roller */
        e = fabs(runs[k].out[i] - cam_follower_slide(x)) /
            (CAM_DISC + CAM_ROLLER);
      }
      error[k] = fmax(error[k], e);
    }
    fig->valid &= runs[k].failures == 0 && error[k] <= BENCH_MAX_ERROR &&
                  runs[k].allocations == 0;
  }
  fig->geared_per_unknown =
      bench_ratio(&methods[GEARED], &methods[FOURBAR]) *
      runs[FOURBAR].unknowns / runs[GEARED].unknowns;
  fig->cam_per_unknown = bench_ratio(&methods[CAM], &methods[FOURBAR]) *
                         runs[FOURBAR].unknowns / runs[CAM].unknowns;
  fig->allocations = runs[FOURBAR].allocations + runs[GEARED].allocations +
                     runs[CAM].allocations;

  fprintf(out, "\n== Part 9: coupled linkages against the four-bar, %d "
               "steps of %g deg ==\n",
          FOURBAR_STEPS, FOURBAR_STEP_DEG);
  fprintf(out, "time/unknown ratio: (ns per solve / unknowns) over the "
               "four-bar's, median of the per-round ratios; allocations: "
               "allocator calls in every pass after kl_solver_new\n");
  fprintf(out, "%-28s %8s %10s %12s %9s %12s %10s %6s %6s\n", "model",
          "unknowns", "ns/pos", "solves/s", "ratio", "per unknown",
          "max error", "failed", "allocs");
  for (k = 0; k < MODELS; k++) {
    double ratio = bench_ratio(&methods[k], &methods[FOURBAR]);
    fprintf(out, "%-28s %8d %10.1f %12.0f %8.2fx %11.2fx %10.2e %6d %6ld\n",
            names[k], runs[k].unknowns, ns[k], 1e9 / ns[k], ratio,
            ratio * runs[FOURBAR].unknowns / runs[k].unknowns, error[k],
            runs[k].failures, runs[k].allocations);
  }
  fprintf(out, "errors: the four-bar's rocker against Freudenstein's "
               "equation, the geared five-bar's right crank against the "
               "rolling condition, the follower against the offset "
               "slider-crank (over its 48 mm rod), rad\n");
  for (k = 0; k < MODELS; k++) {
    kl_solver_free(runs[k].s);
    kl_solver_free(runs[k].start);
    kl_model_free(m[k]);
    free(runs[k].out);
  }
}
