/*
 * inverse.c - benchmark part 10: the inverse kinematics of the two-input
 * five-bar, its tool point driven by two point inputs along a path of 1000
 * points (each solved from the one before), against the closed form of two
 * circle intersections in the same run, and the largest difference of the
 * crank angles between the two.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime */

#include <math.h>
#include <stdlib.h>

#include "bench.h"

/* The five-bar of tests/test_couplings.c (its point-input case): cranks a1
 * about O1 = (0, 0) and a2 about O2 = (d, 0), arms b1 and b2 meeting at the
 * tool point, elbows out. */
#define IK_A1 40.0
#define IK_A2 45.0
#define IK_B1 90.0
#define IK_B2 85.0
#define IK_D 60.0
/* The path, a scenario of the benchmark's own: an ellipse about (30, 95)
 * with half-axes 15 and 10, well inside the workspace and away from its
 * singular positions. */
#define IK_CX 30.0
#define IK_CY 95.0
#define IK_RX 15.0
#define IK_RY 10.0

typedef struct {
  int points;
  const double *x, *y; /* the path */
  /* kinloop: the solver, and its state at the path's first point that
   * every pass starts from */
  kl_solver *s;
  const kl_solver *start;
  int crank1, crank2;
  /* results of the last pass: the crank angles at each point */
  double *t1, *t2;
  int failures;
} ik_run;

/* The closed form (common practice, no source): the pin of a crank of
 * length r1 about centre c1, joined by an arm of length r2 to the tool
 * point c2, is where the circles (c1, r1) and (c2, r2) meet; `side` +1
 * takes the meeting point on the left of c1 -> c2, -1 on the right. Returns
 * 0 where the circles do not meet. */
static int circle_meet(double c1x, double c1y, double r1, double c2x,
                       double c2y, double r2, int side, double out[2]) {
  double dx = c2x - c1x, dy = c2y - c1y, d = hypot(dx, dy);
  double a = (r1 * r1 - r2 * r2 + d * d) / (2 * d), h2 = r1 * r1 - a * a;
  double h;
  if (!(h2 >= 0.0))
    return 0;
  h = sqrt(h2);
  out[0] = c1x + (a * dx - side * h * dy) / d;
  out[1] = c1y + (a * dy + side * h * dx) / d;
  return 1;
}

/* The crank angles with the tool point at (x, y), elbows out (the left pin
 * on the left of O1 -> T, the right pin on the right of O2 -> T). */
static int closed_form(double x, double y, double *t1, double *t2) {
  double a[2], b[2];
  if (!circle_meet(0.0, 0.0, IK_A1, x, y, IK_B1, +1, a) ||
      !circle_meet(IK_D, 0.0, IK_A2, x, y, IK_B2, -1, b))
    return 0;
  *t1 = atan2(a[1], a[0]);
  *t2 = atan2(b[1], b[0] - IK_D);
  return 1;
}

BENCH_ENTRY static void bench_inverse_closed_form(void *run) {
  ik_run *r = run;
  int i;
  r->failures = 0;
  for (i = 0; i < r->points; i++)
    r->failures += !closed_form(r->x[i], r->y[i], &r->t1[i], &r->t2[i]);
}

BENCH_ENTRY static void bench_inverse_kinloop(void *run) {
  ik_run *r = run;
  int i;
  kl_solver_copy_state(r->s, r->start);
  r->failures = 0;
  for (i = 0; i < r->points; i++) {
    double u[2];
    u[0] = r->x[i];
    u[1] = r->y[i];
    if (kl_solve_position(r->s, u) != KL_OK) {
      r->failures++;
      continue;
    }
    r->t1[i] = kl_link_angle(r->s, r->crank1);
    r->t2[i] = kl_link_angle(r->s, r->crank2);
  }
}

/* The five-bar driven by its tool point, sketched in the closed form's pose
 * at (x0, y0); ends the program if it cannot be built. */
static kl_model *tool_driven_fivebar(double x0, double y0, int *crank1,
                                     int *crank2) {
  kl_model *m = kl_model_new();
  double a[2], b[2];
  int arm1, arm2, tool;
  if (m == NULL || !circle_meet(0.0, 0.0, IK_A1, x0, y0, IK_B1, +1, a) ||
      !circle_meet(IK_D, 0.0, IK_A2, x0, y0, IK_B2, -1, b)) {
    fprintf(stderr, "kinloop-bench: cannot build the five-bar\n");
    exit(EXIT_FAILURE);
  }
  *crank1 = kl_add_link(m, "left crank");
  *crank2 = kl_add_link(m, "right crank");
  arm1 = kl_add_link(m, "left arm");
  arm2 = kl_add_link(m, "right arm");
  kl_add_revolute(m, KL_GROUND, 0, 0, *crank1, 0, 0);
  kl_add_revolute(m, KL_GROUND, IK_D, 0, *crank2, 0, 0);
  kl_add_revolute(m, *crank1, IK_A1, 0, arm1, 0, 0);
  kl_add_revolute(m, *crank2, IK_A2, 0, arm2, 0, 0);
  kl_add_revolute(m, arm1, IK_B1, 0, arm2, IK_B2, 0);
  tool = kl_add_point(m, arm1, IK_B1, 0, "tool");
  kl_add_point_input(m, tool, 0);
  kl_add_point_input(m, tool, 1);
  kl_model_set_sketch_angle(m, *crank1, atan2(a[1], a[0]));
  kl_model_set_sketch_angle(m, *crank2, atan2(b[1], b[0] - IK_D));
  kl_model_set_sketch_angle(m, arm1, atan2(y0 - a[1], x0 - a[0]));
  kl_model_set_sketch_angle(m, arm2, atan2(y0 - b[1], x0 - b[0]));
  if (kl_model_finalize(m) != KL_OK || kl_model_dof(m) != 2) {
    fprintf(stderr, "kinloop-bench: the five-bar does not finalize: %s\n",
            kl_model_error(m));
    exit(EXIT_FAILURE);
  }
  return m;
}

/* The difference of two angles, wrapped into [-pi, pi]. */
static double angle_difference(double a, double b) {
  return remainder(a - b, 2 * PI);
}

void bench_inverse(FILE *out, const bench_plan *plan, inverse_figures *fig) {
  double *x = bench_calloc(IK_POINTS, sizeof *x);
  double *y = bench_calloc(IK_POINTS, sizeof *y);
  ik_run runs[2] = {{0}};
  bench_method methods[2];
  kl_model *m;
  kl_solver *start;
  int i, crank1, crank2;
  for (i = 0; i < IK_POINTS; i++) {
    double phi = i * 2 * PI / IK_POINTS;
    x[i] = IK_CX + IK_RX * cos(phi);
    y[i] = IK_CY + IK_RY * sin(phi);
  }
  m = tool_driven_fivebar(x[0], y[0], &crank1, &crank2);
  start = bench_solver_new(m, KL_KERNEL_AUTO);
  {
    double u[2];
    u[0] = x[0];
    u[1] = y[0];
    if (kl_solve_position(start, u) != KL_OK) {
      fprintf(stderr, "kinloop-bench: the five-bar does not start: %s\n",
              kl_solver_error(start));
      exit(EXIT_FAILURE);
    }
  }
  for (i = 0; i < 2; i++) {
    runs[i].points = IK_POINTS;
    runs[i].x = x;
    runs[i].y = y;
    runs[i].t1 = bench_calloc(IK_POINTS, sizeof *runs[i].t1);
    runs[i].t2 = bench_calloc(IK_POINTS, sizeof *runs[i].t2);
    methods[i].ctx = &runs[i];
  }
  methods[0].fn = bench_inverse_closed_form;
  methods[1].fn = bench_inverse_kinloop;
  runs[1].s = bench_solver_new(m, KL_KERNEL_AUTO);
  runs[1].start = start;
  runs[1].crank1 = crank1;
  runs[1].crank2 = crank2;
  bench_run(methods, 2, CLOCK_PROCESS_CPUTIME_ID, plan);

  fig->max_angle_difference = 0.0;
  for (i = 0; i < IK_POINTS; i++) {
    double d1 = fabs(angle_difference(runs[1].t1[i], runs[0].t1[i]));
    double d2 = fabs(angle_difference(runs[1].t2[i], runs[0].t2[i]));
    if (!(d1 <= fig->max_angle_difference)) /* NaN counts as the largest */
      fig->max_angle_difference = d1;
    if (!(d2 <= fig->max_angle_difference))
      fig->max_angle_difference = d2;
  }
  fig->kinloop_ns = 1e9 * methods[1].median / IK_POINTS;
  fig->closed_form_ns = 1e9 * methods[0].median / IK_POINTS;
  fig->ratio = bench_ratio(&methods[1], &methods[0]);
  fig->valid = runs[0].failures == 0 && runs[1].failures == 0 &&
               fig->max_angle_difference <= BENCH_MAX_ERROR;

  fprintf(out, "\n== Part 9: five-bar inverse kinematics along a path of %d "
               "points ==\n",
          IK_POINTS);
  fprintf(out, "the tool point on an ellipse about (%g, %g), half-axes %g "
               "and %g; each point solved from the one before\n",
          IK_CX, IK_CY, IK_RX, IK_RY);
  fprintf(out, "%-36s %14s %12s %10s\n", "method", "ns per point",
          "/ closed", "spread");
  fprintf(out, "%-36s %14.1f %11.2fx %9.0f%%%s\n",
          "closed form (2 circle intersections)", fig->closed_form_ns, 1.0,
          100 * methods[0].spread,
          runs[0].failures ? "  SOME POINTS FAILED" : "");
  fprintf(out, "%-36s %14.1f %11.2fx %9.0f%%%s\n",
          "kinloop, two point inputs", fig->kinloop_ns, fig->ratio,
          100 * methods[1].spread,
          runs[1].failures ? "  SOME POINTS FAILED" : "");
  fprintf(out, "largest crank angle difference, kinloop - closed form: "
               "%.3g rad\n",
          fig->max_angle_difference);

  for (i = 0; i < 2; i++) {
    free(runs[i].t1);
    free(runs[i].t2);
  }
  kl_solver_free(runs[1].s);
  kl_solver_free(start);
  kl_model_free(m);
  free(x);
  free(y);
}
