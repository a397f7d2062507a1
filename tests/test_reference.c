/*
 * test_reference.c - the position stage of the Watt and Stephenson six-bars
 * against an independent reference: GSL's multiroot solver on absolute body
 * coordinates, a formulation that shares nothing with kinloop's loops.
 */
#include <check.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_multiroots.h>
#include <gsl/gsl_vector.h>
#include <math.h>

#include "suite.h"
#include "support.h"

#define TURN_STEPS 180 /* a full crank turn in steps of 2 degrees */
#define GSL_MAX_ITERATIONS 200

/*
 * The reference formulation (absolute body coordinates, common practice in
 * multibody kinematics, no source): every moving link i has the unknowns
 * (x_i, y_i, phi_i), its frame origin and angle, at x[3 (i - 1) + 0..2];
 * ground stays at (0, 0, 0). Each revolute joint j between links a and b
 * gives the two rows r_a + R(phi_a) pa_j - r_b - R(phi_b) pb_j = 0, and the
 * crank input gives phi_b - phi_a - u = 0 as the last row.
 */
typedef struct {
  const pin_linkage *p;
  double u; /* crank input, rad */
} body_system;

static size_t body_unknowns(const pin_linkage *p) {
  return 3 * (size_t)(p->nlinks - 1);
}

static void body_pose(const gsl_vector *x, int link, double pose[3]) {
  int k;
  for (k = 0; k < 3; k++)
    pose[k] = link == KL_GROUND
                  ? 0.0
                  : gsl_vector_get(x, 3 * (size_t)(link - 1) + (size_t)k);
}

/* Global position of the local point `local` of a link at `pose`. */
static void body_point(const double pose[3], const double local[2],
                       double xy[2]) {
  double c = cos(pose[2]), s = sin(pose[2]);
  xy[0] = pose[0] + c * local[0] - s * local[1];
  xy[1] = pose[1] + s * local[0] + c * local[1];
}

static int body_equations(const gsl_vector *x, void *params, gsl_vector *f) {
  const body_system *sys = params;
  const pin_linkage *p = sys->p;
  double pose_a[3], pose_b[3], at_a[2], at_b[2];
  int j;
  for (j = 0; j < p->njoints; j++) {
    body_pose(x, p->a[j], pose_a);
    body_pose(x, p->b[j], pose_b);
    body_point(pose_a, p->pa[j], at_a);
    body_point(pose_b, p->pb[j], at_b);
    gsl_vector_set(f, 2 * (size_t)j, at_a[0] - at_b[0]);
    gsl_vector_set(f, 2 * (size_t)j + 1, at_a[1] - at_b[1]);
  }
  body_pose(x, p->a[p->input_joint], pose_a);
  body_pose(x, p->b[p->input_joint], pose_b);
  gsl_vector_set(f, 2 * (size_t)p->njoints, pose_b[2] - pose_a[2] - sys->u);
  return GSL_SUCCESS;
}

/* kinloop's state in body coordinates: origins from kl_link_origin, angles
 * from kl_link_angle. */
static void kinloop_pose(const kl_solver *s, const pin_linkage *p,
                         gsl_vector *x) {
  int l;
  for (l = 1; l < p->nlinks; l++) {
    double xy[2];
    size_t at = 3 * (size_t)(l - 1);
    ck_assert_int_eq(kl_link_origin(s, l, xy), KL_OK);
    gsl_vector_set(x, at, xy[0]);
    gsl_vector_set(x, at + 1, xy[1]);
    gsl_vector_set(x, at + 2, kl_link_angle(s, l));
  }
}

/* A solver for the linkage's model, started from its sketch angles, which
 * choose the branch. */
static kl_solver *sketched_solver(const kl_model *m, const pin_linkage *p) {
  kl_solver *s = kl_solver_new(m);
  int l;
  ck_assert_ptr_nonnull(s);
  for (l = 1; l < p->nlinks; l++)
    ck_assert_int_eq(kl_set_link_angle(s, l, p->sketch[l]), KL_OK);
  return s;
}

static kl_model *finalized_model(const pin_linkage *p, int explicit_loops) {
  kl_model *m = build_pin_linkage(p, explicit_loops);
  ck_assert_ptr_nonnull(m);
  ck_assert_msg(kl_model_is_finalized(m), "%s", kl_model_error(m));
  ck_assert_int_eq(kl_model_dof(m), 1);
  ck_assert_int_eq(kl_model_loop_count(m), 2);
  /* the reference system is square: 2 rows per pin, 1 for the input */
  ck_assert_uint_eq(2 * (size_t)p->njoints + 1, body_unknowns(p));
  return m;
}

/*
 * GSL's finite-difference Jacobian (gsl_multiroot_fdjacobian) steps each
 * unknown by sqrt(eps) |x_j|, or by sqrt(eps) when x_j is exactly 0. A
 * coordinate that is zero in exact arithmetic (the crank's origin on its
 * ground pivot, a pivot on the x-axis) comes out of a solve as rounding noise
 * of 1e-28 or so; its step then vanishes in the residual's rounding, the
 * column comes out zero and hybrids stalls (GSL_ENOPROG, or GSL_ESING from
 * gsl_multiroot_fsolver_set). Noise below 1e-13 of the scale
 * (angles: 1e-13 rad), far below the 1e-12 the solve must reach, is set to
 * exactly 0 before the next start.
 */
static void flush_rounding_noise(gsl_vector *x, double scale) {
  size_t i;
  for (i = 0; i < x->size; i++) {
    double unit = i % 3 == 2 ? 1.0 : scale;
    if (fabs(gsl_vector_get(x, i)) < 1e-13 * unit)
      gsl_vector_set(x, i, 0.0);
  }
}

static double turn_input(int step) { return step * 2.0 * PI / 180.0; }

/* Runs GSL's hybrids solver from its current iterate until
 * gsl_multiroot_test_residual (sum of |F_i|, which bounds |F|inf) passes
 * `tolerance`; returns the iterations taken. */
static int gsl_converge(gsl_multiroot_fsolver *gs, double tolerance,
                        double u) {
  int iterations = 0;
  while (gsl_multiroot_test_residual(gs->f, tolerance) != GSL_SUCCESS) {
    int status = gsl_multiroot_fsolver_iterate(gs);
    ck_assert_msg(status == GSL_SUCCESS,
                  "GSL stopped at u = %.6f: %s", u, gsl_strerror(status));
    iterations++;
    ck_assert_msg(iterations <= GSL_MAX_ITERATIONS,
                  "GSL did not converge at u = %.6f", u);
  }
  return iterations;
}

/*
 * Source: GSL multiroots (Debian libgsl-dev), gsl_multiroot_fsolver_hybrids,
 * Powell's hybrid method with a finite-difference Jacobian, so nothing of
 * kinloop's analytic Jacobian enters the reference. Both solvers go round a
 * full crank turn in 2-degree steps, each continuing from its own previous
 * solution; GSL starts from kinloop's first solution perturbed by 0.05 rad
 * per angle and 1 length unit per position so that it has to iterate.
 */
static void check_turn_against_gsl(const pin_linkage *p) {
  kl_model *m = finalized_model(p, 0);
  kl_solver *s = sketched_solver(m, p);
  size_t n = body_unknowns(p), i;
  double scale = kl_model_scale(m);
  body_system sys;
  gsl_multiroot_function fn;
  gsl_multiroot_fsolver *gs =
      gsl_multiroot_fsolver_alloc(gsl_multiroot_fsolver_hybrids, n);
  gsl_vector *guess = gsl_vector_alloc(n), *ours = gsl_vector_alloc(n);
  int step;
  ck_assert_ptr_nonnull(gs);
  sys.p = p;
  fn.f = body_equations;
  fn.n = n;
  fn.params = &sys;
  for (step = 0; step <= TURN_STEPS; step++) {
    int iterations, l;
    sys.u = turn_input(step);
    ck_assert_msg(kl_solve_position(s, &sys.u) == KL_OK, "u = %.6f: %s",
                  sys.u, kl_solver_error(s));
    kinloop_pose(s, p, ours);
    if (step == 0) {
      gsl_vector_memcpy(guess, ours);
      for (i = 0; i < n; i++)
        gsl_vector_set(guess, i, gsl_vector_get(guess, i) +
                                     (i % 3 == 2 ? 0.05 : 1.0) *
                                         (i % 2 ? -1.0 : 1.0));
    } else {
      gsl_vector_memcpy(guess, gs->x);
      flush_rounding_noise(guess, scale);
    }
    ck_assert_int_eq(gsl_multiroot_fsolver_set(gs, &fn, guess), GSL_SUCCESS);
    /* |F|inf < 1e-12 (residual rows in length units and rad) */
    iterations = gsl_converge(gs, 1e-12, sys.u);
    if (step == 0)
      ck_assert_int_gt(iterations, 0);
    for (l = 1; l < p->nlinks; l++) {
      double ref[3], got[3];
      body_pose(gs->x, l, ref);
      body_pose(ours, l, got);
      ck_assert_msg(fabs(angle_diff(got[2], ref[2])) <= 1e-9,
                    "link %d angle at u = %.6f: kinloop %.15f, GSL %.15f", l,
                    sys.u, got[2], ref[2]);
      ck_assert_msg(fabs(got[0] - ref[0]) <= 1e-9 * scale &&
                        fabs(got[1] - ref[1]) <= 1e-9 * scale,
                    "link %d origin at u = %.6f: kinloop (%.12f, %.12f), "
                    "GSL (%.12f, %.12f)",
                    l, sys.u, got[0], got[1], ref[0], ref[1]);
    }
  }
  gsl_vector_free(guess);
  gsl_vector_free(ours);
  gsl_multiroot_fsolver_free(gs);
  kl_solver_free(s);
  kl_model_free(m);
}

START_TEST(watt_sixbar_matches_gsl_body_coordinates) {
  pin_linkage p = watt_sixbar();
  check_turn_against_gsl(&p);
}
END_TEST

START_TEST(stephenson_sixbar_matches_gsl_body_coordinates) {
  pin_linkage p = stephenson_sixbar();
  check_turn_against_gsl(&p);
}
END_TEST

/*
 * Registered loops and the loops kinloop finds describe the same linkage, so
 * the solutions agree to rounding (common practice, no source; 1e-11 rad
 * and 1e-11 of the scale leave room for the two equation sets' different
 * rounding).
 */
static void check_explicit_loops_agree(const pin_linkage *p) {
  kl_model *found = finalized_model(p, 0), *given = finalized_model(p, 1);
  kl_solver *sf = sketched_solver(found, p), *sg = sketched_solver(given, p);
  double scale = kl_model_scale(found);
  int step, l;
  ck_assert_double_eq(kl_model_scale(given), scale);
  for (step = 0; step <= TURN_STEPS; step++) {
    double u = turn_input(step);
    ck_assert_int_eq(kl_solve_position(sf, &u), KL_OK);
    ck_assert_int_eq(kl_solve_position(sg, &u), KL_OK);
    for (l = 1; l < p->nlinks; l++) {
      double of[2], og[2];
      ck_assert_msg(fabs(angle_diff(kl_link_angle(sf, l),
                                    kl_link_angle(sg, l))) <= 1e-11,
                    "link %d at u = %.6f: found loops %.15f, given %.15f", l,
                    u, kl_link_angle(sf, l), kl_link_angle(sg, l));
      ck_assert_int_eq(kl_link_origin(sf, l, of), KL_OK);
      ck_assert_int_eq(kl_link_origin(sg, l, og), KL_OK);
      ck_assert_double_le(fabs(of[0] - og[0]), 1e-11 * scale);
      ck_assert_double_le(fabs(of[1] - og[1]), 1e-11 * scale);
    }
  }
  kl_solver_free(sf);
  kl_solver_free(sg);
  kl_model_free(found);
  kl_model_free(given);
}

START_TEST(watt_sixbar_explicit_loops_agree) {
  pin_linkage p = watt_sixbar();
  check_explicit_loops_agree(&p);
}
END_TEST

START_TEST(stephenson_sixbar_explicit_loops_agree) {
  pin_linkage p = stephenson_sixbar();
  check_explicit_loops_agree(&p);
}
END_TEST

/*
 * kinloop's own residual is not the judge: its solution, read back through
 * kl_link_origin and kl_link_angle, must satisfy the body-coordinate
 * equations above to |F|inf < 1e-9 of the scale (common practice, no
 * source). The input row is an angle and is held to 1e-12 rad, since
 * kinloop sets the driven coordinate exactly.
 */
static void check_body_residual(const pin_linkage *p, int explicit_loops) {
  kl_model *m = finalized_model(p, explicit_loops);
  kl_solver *s = sketched_solver(m, p);
  size_t n = body_unknowns(p), i;
  double scale = kl_model_scale(m);
  gsl_vector *ours = gsl_vector_alloc(n), *f = gsl_vector_alloc(n);
  body_system sys;
  int step;
  sys.p = p;
  for (step = 0; step <= TURN_STEPS; step++) {
    sys.u = turn_input(step);
    ck_assert_int_eq(kl_solve_position(s, &sys.u), KL_OK);
    kinloop_pose(s, p, ours);
    body_equations(ours, &sys, f);
    for (i = 0; i + 1 < n; i++)
      ck_assert_msg(fabs(gsl_vector_get(f, i)) < 1e-9 * scale,
                    "pin row %u at u = %.6f: %g", (unsigned)i, sys.u,
                    gsl_vector_get(f, i));
    ck_assert_double_lt(fabs(gsl_vector_get(f, n - 1)), 1e-12);
  }
  gsl_vector_free(ours);
  gsl_vector_free(f);
  kl_solver_free(s);
  kl_model_free(m);
}

START_TEST(watt_sixbar_closes_body_equations) {
  pin_linkage p = watt_sixbar();
  check_body_residual(&p, 0);
  check_body_residual(&p, 1);
}
END_TEST

START_TEST(stephenson_sixbar_closes_body_equations) {
  pin_linkage p = stephenson_sixbar();
  check_body_residual(&p, 0);
  check_body_residual(&p, 1);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("reference");
  TCase *tc = tcase_create("body coordinates");
  /* GSL's default handler aborts; statuses are checked instead */
  gsl_set_error_handler_off();
  tcase_set_timeout(tc, 60);
  tcase_add_test(tc, watt_sixbar_matches_gsl_body_coordinates);
  tcase_add_test(tc, stephenson_sixbar_matches_gsl_body_coordinates);
  tcase_add_test(tc, watt_sixbar_explicit_loops_agree);
  tcase_add_test(tc, stephenson_sixbar_explicit_loops_agree);
  tcase_add_test(tc, watt_sixbar_closes_body_equations);
  tcase_add_test(tc, stephenson_sixbar_closes_body_equations);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
