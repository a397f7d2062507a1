/*
 * test_couplings.c - the rows beyond loop closure: gear pairs, racks, ratio
 * couplings and point inputs, against Willis' formula, closed forms of the
 * geared and the two-input five-bar, s = r theta, Freudenstein's equation,
 * and finite differences; the mobility count and bad input.
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "suite.h"
#include "support.h"

static void solve_at(kl_solver *s, const double *u) {
  int st = kl_solve_position(s, u);
  ck_assert_msg(st == KL_OK, "solve at %g: %s", u[0], kl_solver_error(s));
}

/* The intersection of the circles (c1, r1) and (c2, r2) on the left of the
 * line from c1 to c2 (branch +1) or on its right (-1): the foot of the
 * common chord at distance (r1^2 - r2^2 + d^2) / 2d from c1, plus or minus
 * its half-length along the normal (plane geometry, no source needed). */
static void circle_meet(const double c1[2], double r1, const double c2[2],
                        double r2, int branch, double out[2]) {
  double dx = c2[0] - c1[0], dy = c2[1] - c1[1], d = hypot(dx, dy);
  double a = (r1 * r1 - r2 * r2 + d * d) / (2 * d), h = sqrt(r1 * r1 - a * a);
  double ux = dx / d, uy = dy / d;
  out[0] = c1[0] + a * ux - branch * h * uy;
  out[1] = c1[1] + a * uy + branch * h * ux;
}

/* ---- planetary train: Willis' formula ---- */

/* Willis' formula for an epicyclic train (R. Willis, Principles of
 * Mechanism, 1841; in every machine-design text): with the carrier c, the
 * train value from sun to ring seen from the carrier is
 *   (w_ring - w_c) / (w_sun - w_c) = -r_sun / r_ring,
 * and from sun to planet (w_p - w_c) / (w_sun - w_c) = -r_sun / r_planet.
 * The held gear is part of ground: its mesh is a gear pair on the carrier's
 * ground pivot. Sun 20, planet 15, ring 50 (= 20 + 2 x 15). */
#define R_SUN 20.0
#define R_PLANET 15.0
#define R_RING 50.0

typedef struct {
  kl_model *m;
  int carrier, planet, moving; /* moving: the ring (sun held) or the sun */
} planetary;

static planetary build_planetary(int sun_held) {
  planetary p;
  int pivot, planet_pin, centre;
  p.m = kl_model_new();
  p.carrier = kl_add_link(p.m, "carrier");
  p.planet = kl_add_link(p.m, "planet");
  p.moving = kl_add_link(p.m, sun_held ? "ring" : "sun");
  pivot = kl_add_revolute(p.m, KL_GROUND, 0, 0, p.carrier, 0, 0);
  planet_pin = kl_add_revolute(p.m, p.carrier, R_SUN + R_PLANET, 0, p.planet,
                               0, 0);
  centre = kl_add_revolute(p.m, p.carrier, 0, 0, p.moving, 0, 0);
  if (sun_held) {
    /* the held sun meshes with the planet; the ring with the planet inside */
    ck_assert_int_eq(kl_add_gear_pair(p.m, pivot, planet_pin, R_SUN, R_PLANET),
                     0);
    ck_assert_int_eq(kl_add_gear_pair(p.m, centre, planet_pin, R_RING,
                                      R_PLANET),
                     1);
  } else {
    ck_assert_int_eq(kl_add_gear_pair(p.m, centre, planet_pin, R_SUN,
                                      R_PLANET),
                     0);
    ck_assert_int_eq(kl_add_gear_pair(p.m, pivot, planet_pin, R_RING,
                                      R_PLANET),
                     1);
  }
  kl_add_input(p.m, pivot);
  ck_assert_int_eq(kl_model_finalize(p.m), KL_OK);
  return p;
}

static void check_willis(int sun_held) {
  planetary p = build_planetary(sun_held);
  kl_solver *s = kl_solver_new(p.m);
  kl_coupling_info info;
  /* sun held: w_ring = w_c (1 + r_sun / r_ring), w_planet = w_c (1 +
   * r_sun / r_planet); ring held: w_sun = w_c (1 + r_ring / r_sun),
   * w_planet = w_c (1 - r_ring / r_planet) */
  double moving_ratio = sun_held ? 1 + R_SUN / R_RING : 1 + R_RING / R_SUN;
  double planet_ratio =
      sun_held ? 1 + R_SUN / R_PLANET : 1 - R_RING / R_PLANET;
  double u, rate = 2.5, accel = -4.0;
  info.size = sizeof info;
  ck_assert_int_eq(kl_model_coupling(p.m, 1, &info), KL_OK);
  ck_assert_int_eq(info.internal, 1);
  ck_assert_int_eq(info.kind, KL_COUPLING_GEAR);
  ck_assert_int_eq(kl_model_coupling(p.m, 0, &info), KL_OK);
  ck_assert_int_eq(info.internal, 0);
  ck_assert_int_eq(info.carrier, p.carrier);
  ck_assert_int_eq(kl_model_dof(p.m), 1);
  for (u = -3.0; u <= 3.0; u += 0.75) {
    solve_at(s, &u);
    ck_assert_double_eq_tol(kl_link_angle(s, p.moving), moving_ratio * u,
                            1e-12);
    ck_assert_double_eq_tol(kl_link_angle(s, p.planet), planet_ratio * u,
                            1e-12);
    ck_assert_int_eq(kl_solve_velocity(s, &rate), KL_OK);
    ck_assert_double_eq_tol(kl_link_rate(s, p.moving), moving_ratio * rate,
                            1e-12);
    ck_assert_double_eq_tol(kl_link_rate(s, p.planet), planet_ratio * rate,
                            1e-12);
    ck_assert_int_eq(kl_solve_acceleration(s, &accel), KL_OK);
    ck_assert_double_eq_tol(kl_link_accel(s, p.moving), moving_ratio * accel,
                            1e-12);
  }
  kl_solver_free(s);
  kl_model_free(p.m);
}

START_TEST(planetary_sun_held_follows_willis) { check_willis(1); }
END_TEST

START_TEST(planetary_ring_held_follows_willis) { check_willis(0); }
END_TEST

/* ---- geared five-bar ---- */

/* Five-bar with cranks a1 about O1 = (0, 0) and a2 about O2 = (d, 0) whose
 * ground pivots carry an external gear pair r1 + r2 = d: one input.
 * Closed form (derived here): the mesh gives r1 (t1 - t1_0) = -r2 (t2 -
 * t2_0), so t2 = t2_0 - (r1 / r2)(t1 - t1_0); the crank pins are A = a1
 * e(t1) and B = O2 + a2 e(t2), and the tip T is where the circles (A, b1)
 * and (B, b2) meet, above the line AB; then t3 = atan2(T - A) and t4 =
 * atan2(T - B). With AB playing the ground, it is a four-bar whose ground
 * turns with the input: one Freudenstein-type solution per t1. */
#define GF_D 100.0
#define GF_R1 40.0
#define GF_R2 60.0
#define GF_A1 30.0
#define GF_A2 35.0
#define GF_B1 90.0
#define GF_B2 85.0
#define GF_T1 (PI / 2)
#define GF_T2 (PI / 2)

typedef struct {
  kl_model *m;
  int crank1, crank2, link1, link2, tip;
} geared_fivebar;

static void geared_closed_form(double t1, double angles[4]) {
  double t2 = GF_T2 - GF_R1 / GF_R2 * (t1 - GF_T1), a[2], b[2], t[2];
  a[0] = GF_A1 * cos(t1);
  a[1] = GF_A1 * sin(t1);
  b[0] = GF_D + GF_A2 * cos(t2);
  b[1] = GF_A2 * sin(t2);
  circle_meet(a, GF_B1, b, GF_B2, +1, t);
  angles[0] = t1;
  angles[1] = t2;
  angles[2] = atan2(t[1] - a[1], t[0] - a[0]);
  angles[3] = atan2(t[1] - b[1], t[0] - b[0]);
}

static geared_fivebar build_geared_fivebar(void) {
  geared_fivebar g;
  double sketch[4];
  int p1, p2;
  g.m = kl_model_new();
  g.crank1 = kl_add_link(g.m, "left crank");
  g.crank2 = kl_add_link(g.m, "right crank");
  g.link1 = kl_add_link(g.m, "left arm");
  g.link2 = kl_add_link(g.m, "right arm");
  p1 = kl_add_revolute(g.m, KL_GROUND, 0, 0, g.crank1, 0, 0);
  p2 = kl_add_revolute(g.m, KL_GROUND, GF_D, 0, g.crank2, 0, 0);
  kl_add_revolute(g.m, g.crank1, GF_A1, 0, g.link1, 0, 0);
  kl_add_revolute(g.m, g.crank2, GF_A2, 0, g.link2, 0, 0);
  kl_add_revolute(g.m, g.link1, GF_B1, 0, g.link2, GF_B2, 0);
  g.tip = kl_add_point(g.m, g.link1, GF_B1, 0, "tip");
  ck_assert_int_eq(kl_add_gear_pair(g.m, p1, p2, GF_R1, GF_R2), 0);
  kl_add_input(g.m, p1);
  geared_closed_form(GF_T1, sketch);
  kl_model_set_sketch_angle(g.m, g.crank1, sketch[0]);
  kl_model_set_sketch_angle(g.m, g.crank2, sketch[1]);
  kl_model_set_sketch_angle(g.m, g.link1, sketch[2]);
  kl_model_set_sketch_angle(g.m, g.link2, sketch[3]);
  ck_assert_int_eq(kl_model_finalize(g.m), KL_OK);
  return g;
}

START_TEST(geared_fivebar_matches_its_closed_form) {
  geared_fivebar g = build_geared_fivebar();
  kl_solver *s = kl_solver_new(g.m);
  int k, links[4];
  links[0] = g.crank1;
  links[1] = g.crank2;
  links[2] = g.link1;
  links[3] = g.link2;
  /* Gruebler with higher pairs: 3 x 4 - 2 x 5 - 1 gear = 1 */
  ck_assert_int_eq(kl_model_dof(g.m), 1);
  /* three turns of the input: the right crank makes two */
  for (k = 0; k <= 360; k++) {
    double u = GF_T1 + k * (6 * PI / 360), expect[4];
    int i;
    solve_at(s, &u);
    geared_closed_form(u, expect);
    for (i = 0; i < 4; i++)
      ck_assert_msg(fabs(angle_diff(kl_link_angle(s, links[i]), expect[i])) <
                        1e-10,
                    "link %d at %g: %.15g, closed form %.15g", links[i], u,
                    kl_link_angle(s, links[i]), expect[i]);
  }
  kl_solver_free(s);
  kl_model_free(g.m);
}
END_TEST

/* Rates and accelerations against central differences of the closed form
 * (step 1e-4: truncation about 1e-8 relative, rounding far below). */
START_TEST(geared_fivebar_rates_are_the_slopes) {
  geared_fivebar g = build_geared_fivebar();
  kl_solver *s = kl_solver_new(g.m);
  const double h = 1e-4, w = 1.7, alpha = 0.0;
  int links[4], k, i;
  links[0] = g.crank1;
  links[1] = g.crank2;
  links[2] = g.link1;
  links[3] = g.link2;
  for (k = 0; k < 12; k++) {
    double u = GF_T1 + k * 0.5, lo[4], mid[4], hi[4];
    solve_at(s, &u);
    ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(s, &alpha), KL_OK);
    geared_closed_form(u - h, lo);
    geared_closed_form(u, mid);
    geared_closed_form(u + h, hi);
    for (i = 0; i < 4; i++) {
      double d1 = angle_diff(hi[i], lo[i]) / (2 * h);
      double d2 = (angle_diff(hi[i], mid[i]) - angle_diff(mid[i], lo[i])) /
                  (h * h);
      ck_assert_double_eq_tol(kl_link_rate(s, links[i]), w * d1, 1e-7);
      ck_assert_double_eq_tol(kl_link_accel(s, links[i]), w * w * d2, 1e-5);
    }
  }
  kl_solver_free(s);
  kl_model_free(g.m);
}
END_TEST

/* ---- rack and pinion: s = r theta ---- */

START_TEST(rack_follows_s_equals_r_theta) {
  kl_model *m = kl_model_new();
  int pinion = kl_add_link(m, "pinion"), rack = kl_add_link(m, "rack");
  int pivot = kl_add_revolute(m, KL_GROUND, 0, 0, pinion, 0, 0);
  int slide = kl_add_prismatic(m, KL_GROUND, 0, -12.5, 0.0, rack, 0, 0);
  kl_solver *s;
  double u, w = 3.0, alpha = -2.0;
  /* the pitch line of a rack under a pinion of radius 12.5 runs in -x as
   * the pinion turns counter-clockwise (s = r theta with r = -12.5; the
   * rolling condition of the pitch circle on the pitch line) */
  ck_assert_int_eq(kl_add_rack_pinion(m, pivot, slide, -12.5), 0);
  kl_add_input(m, pivot);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ck_assert_int_eq(kl_model_dof(m), 1);
  s = kl_solver_new(m);
  for (u = -7.0; u <= 7.0; u += 0.5) {
    solve_at(s, &u);
    ck_assert_double_eq_tol(kl_joint_slide(s, slide), -12.5 * u, 1e-12);
    ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
    ck_assert_double_eq_tol(kl_joint_slide_rate(s, slide), -12.5 * w, 1e-12);
    ck_assert_int_eq(kl_solve_acceleration(s, &alpha), KL_OK);
    ck_assert_double_eq_tol(kl_joint_slide_accel(s, slide), -12.5 * alpha,
                            1e-12);
  }
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* A ratio coupling between a slider's slide (the driver) and a crank's
 * angle (a screw of lead 2 pi / 0.05 per unit of slide): the angle is
 * 0.05 times the slide, counted from the sketch. */
START_TEST(ratio_coupling_counts_from_the_sketch) {
  kl_model *m = kl_model_new();
  int block = kl_add_link(m, "block"), wheel = kl_add_link(m, "wheel");
  int slide = kl_add_prismatic(m, KL_GROUND, 0, 0, 0.0, block, 0, 0);
  int pivot = kl_add_revolute(m, KL_GROUND, 50, 0, wheel, 0, 0);
  kl_solver *s;
  double u;
  ck_assert_int_eq(kl_add_coupling(m, slide, pivot, 0.05), 0);
  kl_add_input(m, slide);
  kl_model_set_sketch_slide(m, slide, 10.0);
  kl_model_set_sketch_angle(m, wheel, 1.0);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  for (u = -20; u <= 40; u += 5) {
    solve_at(s, &u);
    ck_assert_double_eq_tol(kl_link_angle(s, wheel), 1.0 + 0.05 * (u - 10.0),
                            1e-12);
  }
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* ---- point inputs: the two-input five-bar driven by its tip ---- */

/* Inverse kinematics of the five-bar (the closed form of two circle
 * intersections): the left crank pin lies where the circles (O1, a1) and
 * (T, b1) meet, the right one where (O2, a2) and (T, b2) meet, each on the
 * side the start pose gives. */
#define PF_A1 40.0
#define PF_A2 45.0
#define PF_B1 90.0
#define PF_B2 85.0
#define PF_D 60.0

/* The tip driven around the circle of radius 15 about (30, 95) at unit
 * angular rate: the cranks' jerks (the point rows' third-order terms
 * included) against central differences of their accelerations (common
 * practice, no source). */
static void tip_motion(double phi, int order, double u[2]) {
  /* d^order/dphi^order of (30 + 15 cos phi, 95 + 15 sin phi) */
  double c = cos(phi + order * PI / 2), s = sin(phi + order * PI / 2);
  u[0] = (order == 0 ? 30.0 : 0.0) + 15.0 * c;
  u[1] = (order == 0 ? 95.0 : 0.0) + 15.0 * s;
}

static void solve_motion_at(kl_solver *s, double phi, int jerk) {
  double u[2], ud[2], udd[2], uddd[2];
  tip_motion(phi, 0, u);
  tip_motion(phi, 1, ud);
  tip_motion(phi, 2, udd);
  tip_motion(phi, 3, uddd);
  solve_at(s, u);
  ck_assert_int_eq(kl_solve_velocity(s, ud), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, udd), KL_OK);
  if (jerk)
    ck_assert_int_eq(kl_solve_jerk(s, uddd), KL_OK);
}

static void check_jerk_along_circle(kl_solver *s, double phi, int c1, int c2) {
  const double h = 1e-5;
  double up[2], down[2];
  solve_motion_at(s, phi + h, 0);
  up[0] = kl_link_accel(s, c1);
  up[1] = kl_link_accel(s, c2);
  solve_motion_at(s, phi - h, 0);
  down[0] = kl_link_accel(s, c1);
  down[1] = kl_link_accel(s, c2);
  solve_motion_at(s, phi, 1);
  ck_assert_double_eq_tol(kl_link_jerk(s, c1), (up[0] - down[0]) / (2 * h),
                          1e-6);
  ck_assert_double_eq_tol(kl_link_jerk(s, c2), (up[1] - down[1]) / (2 * h),
                          1e-6);
}

START_TEST(fivebar_point_inputs_match_two_circle_intersections) {
  kl_model *m = kl_model_new();
  int c1 = kl_add_link(m, "left crank"), c2 = kl_add_link(m, "right crank");
  int l1 = kl_add_link(m, "left arm"), l2 = kl_add_link(m, "right arm");
  const double o1[2] = {0, 0}, o2[2] = {PF_D, 0};
  double tip0[2] = {45.0, 95.0}, a[2], b[2];
  int tip, k, side1, side2;
  kl_solver *s;
  kl_add_revolute(m, KL_GROUND, 0, 0, c1, 0, 0);
  kl_add_revolute(m, KL_GROUND, PF_D, 0, c2, 0, 0);
  kl_add_revolute(m, c1, PF_A1, 0, l1, 0, 0);
  kl_add_revolute(m, c2, PF_A2, 0, l2, 0, 0);
  kl_add_revolute(m, l1, PF_B1, 0, l2, PF_B2, 0);
  tip = kl_add_point(m, l1, PF_B1, 0, "tip");
  ck_assert_int_eq(kl_add_point_input(m, tip, 0), 0);
  ck_assert_int_eq(kl_add_point_input(m, tip, 1), 1);
  /* a point input has no hold, no time profile (they drive a joint) */
  ck_assert_int_eq(kl_model_set_input_hold(m, 0, 1.0), KL_EKIND);
  ck_assert(isnan(kl_model_input_hold(m, 0)));
  ck_assert_int_eq(kl_add_segment(m, 1, KL_SEGMENT_DWELL, 0, 1.0, 0.0, 0.0),
                   KL_EKIND);
  /* the elbows out: the left pin on the left of O1 -> T, the right pin on
   * the right of O2 -> T */
  side1 = +1;
  side2 = -1;
  circle_meet(o1, PF_A1, tip0, PF_B1, side1, a);
  circle_meet(o2, PF_A2, tip0, PF_B2, side2, b);
  kl_model_set_sketch_angle(m, c1, atan2(a[1], a[0]));
  kl_model_set_sketch_angle(m, c2, atan2(b[1], b[0] - PF_D));
  kl_model_set_sketch_angle(m, l1, atan2(tip0[1] - a[1], tip0[0] - a[0]));
  kl_model_set_sketch_angle(m, l2, atan2(tip0[1] - b[1], tip0[0] - b[0]));
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ck_assert_int_eq(kl_model_dof(m), 2);
  ck_assert_int_eq(kl_model_input_point(m, 1), tip);
  ck_assert_int_eq(kl_model_input_axis(m, 1), 1);
  ck_assert_int_eq(kl_model_input_joint(m, 0), KL_EKIND);
  s = kl_solver_new(m);
  {
    /* the workspace takes two turning inputs: point inputs are refused */
    double xy[8];
    int curve[4], kind[4];
    kl_workspace_options o;
    kl_workspace_options_default(&o);
    ck_assert_int_eq(kl_solver_workspace(s, tip, &o, xy, curve, kind, 4, NULL),
                     KL_EKIND);
    ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "point input"));
  }
  /* the tip around a circle of radius 15 about (30, 95) */
  for (k = 0; k <= 72; k++) {
    double phi = k * 2 * PI / 72, t[2], xy[2];
    t[0] = 30.0 + 15.0 * cos(phi);
    t[1] = 95.0 + 15.0 * sin(phi);
    solve_at(s, t);
    circle_meet(o1, PF_A1, t, PF_B1, side1, a);
    circle_meet(o2, PF_A2, t, PF_B2, side2, b);
    ck_assert_double_eq_tol(kl_link_angle(s, c1), atan2(a[1], a[0]), 1e-10);
    ck_assert_double_eq_tol(kl_link_angle(s, c2), atan2(b[1], b[0] - PF_D),
                            1e-10);
    ck_assert_int_eq(kl_point_position(s, tip, xy), KL_OK);
    ck_assert_double_eq_tol(xy[0], t[0], 1e-9);
    ck_assert_double_eq_tol(xy[1], t[1], 1e-9);
    if (k % 9 == 4)
      check_jerk_along_circle(s, phi, c1, c2);
  }
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* ---- point inputs: a four-bar driven by its coupler point's x ---- */

static double coupler_x(const fourbar *f, double t2, int branch,
                        double *t3, double *t4) {
  ck_assert(freudenstein(f, t2, branch, t3, t4));
  return f->a * cos(t2) + f->b / 2 * cos(*t3) - f->b / 4 * sin(*t3);
}

/* The four-bar of support.c (a crank-rocker: crank 40, coupler 120, rocker
 * 80, ground 100) with its coupler point's global x as the input. */
static fourbar build_point_driven_fourbar(double t2, int branch) {
  fourbar f;
  double t3, t4;
  memset(&f, 0, sizeof f);
  f.m = kl_model_new();
  f.a = 40;
  f.b = 120;
  f.c = 80;
  f.d = 100;
  f.crank = kl_add_link(f.m, "crank");
  f.coupler = kl_add_link(f.m, "coupler");
  f.rocker = kl_add_link(f.m, "rocker");
  f.pivot = kl_add_revolute(f.m, KL_GROUND, 0, 0, f.crank, 0, 0);
  f.crank_pin = kl_add_revolute(f.m, f.crank, f.a, 0, f.coupler, 0, 0);
  f.rocker_pin = kl_add_revolute(f.m, f.coupler, f.b, 0, f.rocker, f.c, 0);
  f.rocker_pivot = kl_add_revolute(f.m, f.rocker, 0, 0, KL_GROUND, f.d, 0);
  f.coupler_point = kl_add_point(f.m, f.coupler, f.b / 2, f.b / 4, "coupler");
  ck_assert_int_eq(kl_add_point_input(f.m, f.coupler_point, 0), 0);
  coupler_x(&f, t2, branch, &t3, &t4);
  kl_model_set_sketch_angle(f.m, f.crank, t2);
  kl_model_set_sketch_angle(f.m, f.coupler, t3);
  kl_model_set_sketch_angle(f.m, f.rocker, t4);
  ck_assert_int_eq(kl_model_finalize(f.m), KL_OK);
  return f;
}

/* The crank angles of the least and the greatest coupler x over a turn. */
static void x_extremes(const fourbar *f, int branch, double *t_min,
                       double *t_max) {
  double lo = INFINITY, hi = -INFINITY, t3, t4;
  int k;
  *t_min = *t_max = 0.0;
  for (k = 0; k < 36000; k++) {
    double t2 = k * 2 * PI / 36000, x = coupler_x(f, t2, branch, &t3, &t4);
    if (x < lo) {
      lo = x;
      *t_min = t2;
    }
    if (x > hi) {
      hi = x;
      *t_max = t2;
    }
  }
}

START_TEST(fourbar_driven_by_coupler_x_reproduces_freudenstein) {
  fourbar probe;
  double t_min, t_max, span, t3, t4;
  int k, branch = +1, n = 400;
  kl_solver *s;
  fourbar f;
  probe.a = 40;
  probe.b = 120;
  probe.c = 80;
  probe.d = 100;
  x_extremes(&probe, branch, &t_min, &t_max);
  /* from the least x forward to the greatest: x rises monotonically (the
   * samples below check it); keep 2% of the span off each end, where dx /
   * dt2 -> 0 and the crank angle is ill-determined by x */
  span = t_max - t_min;
  if (span < 0)
    span += 2 * PI;
  f = build_point_driven_fourbar(t_min + 0.02 * span, branch);
  s = kl_solver_new(f.m);
  {
    double previous = -INFINITY;
    for (k = 0; k <= n; k++) {
      double t2 = t_min + (0.02 + 0.96 * k / n) * span;
      double x = coupler_x(&probe, t2, branch, &t3, &t4);
      ck_assert_msg(x > previous, "x not monotone at %g", t2);
      previous = x;
      solve_at(s, &x);
      ck_assert_msg(fabs(angle_diff(kl_link_angle(s, f.crank), t2)) < 1e-9,
                    "crank at x %g: %.12g, forward %.12g", x,
                    kl_link_angle(s, f.crank), t2);
      ck_assert(fabs(angle_diff(kl_link_angle(s, f.coupler), t3)) < 1e-9);
      ck_assert(fabs(angle_diff(kl_link_angle(s, f.rocker), t4)) < 1e-9);
    }
  }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* Rates against the forward solution: with x = x(t2), dt2/dx = 1 /
 * (dx/dt2), by central differences of Freudenstein's closed form; the
 * second derivative d2t2/dx2 = -x'' / x'^3. */
START_TEST(point_input_rates_invert_the_forward_slopes) {
  fourbar probe;
  double t_min, t_max, span, t3, t4;
  const double h = 1e-4;
  int k, branch = +1;
  kl_solver *s;
  fourbar f;
  probe.a = 40;
  probe.b = 120;
  probe.c = 80;
  probe.d = 100;
  x_extremes(&probe, branch, &t_min, &t_max);
  span = t_max - t_min;
  if (span < 0)
    span += 2 * PI;
  f = build_point_driven_fourbar(t_min + 0.1 * span, branch);
  s = kl_solver_new(f.m);
  for (k = 0; k <= 8; k++) {
    double t2 = t_min + (0.1 + 0.1 * k) * span, one = 1.0, zero = 0.0;
    double x = coupler_x(&probe, t2, branch, &t3, &t4);
    double xl = coupler_x(&probe, t2 - h, branch, &t3, &t4);
    double xh = coupler_x(&probe, t2 + h, branch, &t3, &t4);
    double d1 = (xh - xl) / (2 * h), d2 = (xh - 2 * x + xl) / (h * h);
    solve_at(s, &x);
    ck_assert_int_eq(kl_solve_velocity(s, &one), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(s, &zero), KL_OK);
    ck_assert(rel_diff(kl_link_rate(s, f.crank), 1 / d1, 1e-6) < 1e-6);
    ck_assert(rel_diff(kl_link_accel(s, f.crank), -d2 / (d1 * d1 * d1),
                       1e-6) < 1e-5);
    /* the coefficients agree with the rates */
    ck_assert_int_eq(kl_solve_coefficients(s), KL_OK);
    ck_assert_double_eq_tol(kl_link_angle_deriv(s, f.crank, 0),
                            kl_link_rate(s, f.crank), 1e-12);
    ck_assert_double_eq_tol(kl_link_angle_deriv2(s, f.crank, 0, 0),
                            kl_link_accel(s, f.crank), 1e-9);
  }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* A sweep of the coupler x past its greatest value stops there: the
 * workspace boundary is the point input's motion limit, located like any
 * other; the greatest x from the forward solution refined by golden
 * section on Freudenstein's closed form. */
START_TEST(point_input_limit_is_the_workspace_boundary) {
  fourbar probe;
  double t_min, t_max, lo, hi, x_max, start, t3, t4;
  const double g = 0.5 * (sqrt(5.0) - 1.0);
  int k, branch = +1;
  kl_sweep_result r;
  kl_solver *s;
  fourbar f;
  probe.a = 40;
  probe.b = 120;
  probe.c = 80;
  probe.d = 100;
  x_extremes(&probe, branch, &t_min, &t_max);
  lo = t_max - 0.01;
  hi = t_max + 0.01;
  for (k = 0; k < 100; k++) {
    double p = hi - g * (hi - lo), q = lo + g * (hi - lo);
    if (coupler_x(&probe, p, branch, &t3, &t4) >
        coupler_x(&probe, q, branch, &t3, &t4))
      hi = q;
    else
      lo = p;
  }
  x_max = coupler_x(&probe, 0.5 * (lo + hi), branch, &t3, &t4);
  f = build_point_driven_fourbar(t_max - 0.5, branch);
  start = coupler_x(&probe, t_max - 0.5, branch, &t3, &t4);
  s = kl_solver_new(f.m);
  solve_at(s, &start);
  r.size = sizeof r;
  ck_assert_int_eq(kl_solver_sweep(s, 0, start, x_max + 5.0, 50, NULL, NULL,
                                   &r),
                   KL_LIMIT);
  ck_assert_double_eq_tol(r.limit_input, x_max, 1e-7);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* ---- bad input: each its own status and message, the model unchanged ---- */

START_TEST(bad_couplings_are_refused) {
  kl_model *m = kl_model_new();
  int a = kl_add_link(m, "a"), b = kl_add_link(m, "b"), c = kl_add_link(m, "c");
  int ja = kl_add_revolute(m, KL_GROUND, 0, 0, a, 0, 0);
  int jb = kl_add_revolute(m, KL_GROUND, 30, 0, b, 0, 0);
  int jc = kl_add_revolute(m, a, 10, 0, c, 0, 0);
  int slide = kl_add_prismatic(m, b, 0, 0, 0.0, c, 5, 0);
  int ground_point = kl_add_point(m, KL_GROUND, 1, 1, "mark");
  int tip = kl_add_point(m, c, 3, 0, "tip");
  ck_assert_int_eq(kl_add_gear_pair(m, ja, jb, 12, 12), KL_ENOMESH);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "30"));
  /* the distances in the model's length unit: 30 apart, 12 + 12 = 24 */
  ck_assert_int_eq(kl_model_set_units(m, KL_LENGTH_MM, KL_ANGLE_DEG), KL_OK);
  ck_assert_int_eq(kl_add_gear_pair(m, ja, jb, 12, 12), KL_ENOMESH);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "lie 30 mm apart"));
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "mesh at 24 mm (external)"));
  /* internal: |r1 - r2| = 30 meshes, equal radii never do */
  ck_assert_int_eq(kl_add_gear_pair(m, ja, ja, 10, 20), KL_ESELFCOUPLING);
  ck_assert_int_eq(kl_add_gear_pair(m, jb, jc, 10, 20), KL_ENOCOMMON);
  ck_assert_int_eq(kl_add_gear_pair(m, ja, jb, 0, 30), KL_ERADIUS);
  ck_assert_int_eq(kl_add_gear_pair(m, ja, jb, -10, 40), KL_ERADIUS);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "not -10 mm and 40 mm"));
  ck_assert_int_eq(kl_add_gear_pair(m, ja, jb, NAN, 20), KL_ENONFINITE);
  ck_assert_int_eq(kl_add_gear_pair(m, ja, 99, 10, 20), KL_EID);
  ck_assert_int_eq(kl_add_gear_pair(m, jb, slide, 10, 20), KL_EKIND);
  ck_assert_int_eq(kl_add_rack_pinion(m, jc, slide, 0.0), KL_ERADIUS);
  ck_assert_int_eq(kl_add_rack_pinion(m, slide, jc, 2.0), KL_EKIND);
  ck_assert_int_eq(kl_add_rack_pinion(m, ja, slide, 2.0), KL_ENOCOMMON);
  ck_assert_int_eq(kl_add_coupling(m, jc, jc, 2.0), KL_ESELFCOUPLING);
  ck_assert_int_eq(kl_add_coupling(m, ja, jc, 0.0), KL_EINVAL);
  ck_assert_int_eq(kl_add_point_input(m, ground_point, 0), KL_EKIND);
  ck_assert_int_eq(kl_add_point_input(m, tip, 2), KL_EINVAL);
  ck_assert_int_eq(kl_add_point_input(m, 17, 0), KL_EID);
  ck_assert_int_eq(kl_model_coupling_count(m), 0);
  ck_assert_int_eq(kl_add_point_input(m, tip, 0), 0);
  ck_assert_int_eq(kl_add_point_input(m, tip, 0), KL_EDUPLICATE);
  /* what does mesh: external 12 + 18 = 30, internal 40 - 10 = 30 */
  ck_assert_int_eq(kl_add_gear_pair(m, ja, jb, 12, 18), 0);
  ck_assert_int_eq(kl_add_gear_pair(m, ja, jb, 40, 10), 1);
  ck_assert_int_eq(kl_model_coupling_count(m), 2);
  ck_assert_int_eq(kl_add_gear_pair(m, ja, jb, 20, 20), KL_ENOMESH);
  ck_assert_int_eq(kl_model_coupling_count(m), 2);
  kl_model_free(m);
}
END_TEST

/* A coupling takes a freedom: the five-bar with one gear pair and two
 * inputs has one input too many. */
START_TEST(couplings_enter_the_mobility_count) {
  kl_model *m = kl_model_new();
  int c1 = kl_add_link(m, "c1"), c2 = kl_add_link(m, "c2");
  int l1 = kl_add_link(m, "l1"), l2 = kl_add_link(m, "l2");
  int p1 = kl_add_revolute(m, KL_GROUND, 0, 0, c1, 0, 0);
  int p2 = kl_add_revolute(m, KL_GROUND, 100, 0, c2, 0, 0);
  kl_add_revolute(m, c1, 30, 0, l1, 0, 0);
  kl_add_revolute(m, c2, 35, 0, l2, 0, 0);
  kl_add_revolute(m, l1, 90, 0, l2, 85, 0);
  kl_add_gear_pair(m, p1, p2, 40, 60);
  kl_add_input(m, p1);
  kl_add_input(m, p2);
  ck_assert_int_eq(kl_model_finalize(m), KL_EDOF);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "1 degree"));
  kl_model_free(m);
}
END_TEST

/* ---- the force stage: tooth forces, coupling forces, point efforts ---- */

static void solve_motion(kl_solver *s, double u, double w, double a) {
  solve_at(s, &u);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &a), KL_OK);
}

/* A massless train with a load torque T on the ring (sun held): by the
 * power balance T_in w_c + T w_r = 0 with Willis' w_r = w_c (1 + r_s /
 * r_r), the carrier's torque is -T (1 + r_s / r_r); the ring takes T from
 * the tooth force at r_r, so |F| = |T| / r_r; the free planet takes equal
 * tooth forces from sun and ring; and the frame takes the load torque
 * (what the moving links exert on ground balances what acts on them). */
START_TEST(planetary_tooth_forces_balance) {
  planetary p = build_planetary(1);
  kl_solver *s = kl_solver_new(p.m);
  kl_load load;
  double effort, ground[3];
  memset(&load, 0, sizeof load);
  load.kind = KL_LOAD_TORQUE;
  load.id = p.moving;
  load.torque = 30.0;
  solve_motion(s, 0.4, 2.0, 0.0);
  ck_assert_int_eq(kl_solve_forces(s, 1, &load, &effort), KL_OK);
  ck_assert_double_eq_tol(effort, -30.0 * (1 + R_SUN / R_RING), 1e-9);
  ck_assert_double_eq_tol(fabs(kl_coupling_force(s, 1)), 30.0 / R_RING, 1e-12);
  ck_assert_double_eq_tol(fabs(kl_coupling_force(s, 0)),
                          fabs(kl_coupling_force(s, 1)), 1e-12);
  ck_assert_int_eq(kl_ground_force(s, ground), KL_OK);
  ck_assert_double_eq_tol(ground[0], 0.0, 1e-9);
  ck_assert_double_eq_tol(ground[1], 0.0, 1e-9);
  ck_assert_double_eq_tol(ground[2], 30.0, 1e-8);
  ck_assert(isnan(kl_coupling_force(s, 2)));
  kl_solver_free(s);
  kl_model_free(p.m);
}
END_TEST

/* Rack and pinion, massless, a force F along x on the rack: by virtual
 * work T dtheta + F ds = 0 with ds = r dtheta, the pinion's torque is
 * -F r; the rack's teeth take -F (equilibrium of the rack along x); the
 * pinion's teeth take +F, which its bearing holds: ground pushes the
 * pinion with (-F, 0). */
START_TEST(rack_tooth_force_by_virtual_work) {
  kl_model *m = kl_model_new();
  int pinion = kl_add_link(m, "pinion"), rack = kl_add_link(m, "rack");
  int pivot = kl_add_revolute(m, KL_GROUND, 0, 0, pinion, 0, 0);
  int slide = kl_add_prismatic(m, KL_GROUND, 0, -12.5, 0.0, rack, 0, 0);
  int face = kl_add_point(m, rack, 30, 0, "face");
  kl_solver *s;
  kl_load load;
  double effort, f[2];
  kl_add_rack_pinion(m, pivot, slide, -12.5);
  kl_add_input(m, pivot);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  memset(&load, 0, sizeof load);
  load.kind = KL_LOAD_FORCE;
  load.id = face;
  load.fx = 8.0;
  solve_motion(s, 0.7, 1.0, 0.0);
  ck_assert_int_eq(kl_solve_forces(s, 1, &load, &effort), KL_OK);
  ck_assert_double_eq_tol(effort, -8.0 * -12.5, 1e-9);
  ck_assert_double_eq_tol(kl_coupling_force(s, 0), -8.0, 1e-9);
  ck_assert_int_eq(kl_joint_force(s, pivot, f), KL_OK);
  ck_assert_double_eq_tol(f[0], -8.0, 1e-9);
  ck_assert_double_eq_tol(f[1], 0.0, 1e-9);
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* The two-input five-bar driven by its tip, massless, a force (Fx, Fy) at
 * the tip: the actuators along x and y at the tip hold it, efforts (-Fx,
 * -Fy) (equilibrium of the tip, no source needed). */
START_TEST(point_input_efforts_hold_the_tip) {
  kl_model *m = kl_model_new();
  int c1 = kl_add_link(m, "c1"), c2 = kl_add_link(m, "c2");
  int l1 = kl_add_link(m, "l1"), l2 = kl_add_link(m, "l2"), tip;
  double u[2] = {45.0, 95.0}, w[2] = {1.0, -2.0}, a[2] = {0.0, 0.0};
  double efforts[2], ground[3];
  kl_solver *s;
  kl_load load;
  kl_add_revolute(m, KL_GROUND, 0, 0, c1, 0, 0);
  kl_add_revolute(m, KL_GROUND, PF_D, 0, c2, 0, 0);
  kl_add_revolute(m, c1, PF_A1, 0, l1, 0, 0);
  kl_add_revolute(m, c2, PF_A2, 0, l2, 0, 0);
  kl_add_revolute(m, l1, PF_B1, 0, l2, PF_B2, 0);
  tip = kl_add_point(m, l1, PF_B1, 0, "tip");
  kl_add_point_input(m, tip, 0);
  kl_add_point_input(m, tip, 1);
  kl_model_set_sketch_angle(m, c1, 2.2);
  kl_model_set_sketch_angle(m, c2, 0.9);
  kl_model_set_sketch_angle(m, l1, 0.9);
  kl_model_set_sketch_angle(m, l2, 2.2);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  solve_at(s, u);
  ck_assert_int_eq(kl_solve_velocity(s, w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, a), KL_OK);
  memset(&load, 0, sizeof load);
  load.kind = KL_LOAD_FORCE;
  load.id = tip;
  load.fx = 3.0;
  load.fy = -5.0;
  ck_assert_int_eq(kl_solve_forces(s, 1, &load, efforts), KL_OK);
  ck_assert_double_eq_tol(efforts[0], -3.0, 1e-9);
  ck_assert_double_eq_tol(efforts[1], 5.0, 1e-9);
  /* the actuators take the load: the pivots carry nothing */
  ck_assert_int_eq(kl_ground_force(s, ground), KL_OK);
  ck_assert_double_eq_tol(ground[0], 3.0, 1e-9);
  ck_assert_double_eq_tol(ground[1], -5.0, 1e-9);
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* The geared five-bar, massless, with a force F at the tip and a load
 * torque Q on the geared right crank: by virtual work (the power balance)
 * T w1 + Q w2 + F . v_tip = 0 with w2 / w1 = -r1 / r2 from the mesh, the
 * motor's torque is T = Q r1 / r2 - F . dtip/dt1, the tip's slope from
 * kinloop's coefficients. */
START_TEST(geared_fivebar_effort_by_virtual_work) {
  geared_fivebar g = build_geared_fivebar();
  kl_solver *s = kl_solver_new(g.m);
  kl_load loads[2];
  int k;
  memset(loads, 0, sizeof loads);
  loads[0].kind = KL_LOAD_FORCE;
  loads[0].id = g.tip;
  loads[0].fx = 2.0;
  loads[0].fy = 7.0;
  loads[1].kind = KL_LOAD_TORQUE;
  loads[1].id = g.crank2;
  loads[1].torque = -40.0;
  for (k = 0; k < 8; k++) {
    double u = GF_T1 + 0.7 * k, effort, dtip[2];
    solve_motion(s, u, 1.0, 0.0);
    ck_assert_int_eq(kl_solve_coefficients(s), KL_OK);
    ck_assert_int_eq(kl_point_deriv(s, g.tip, 0, dtip), KL_OK);
    ck_assert_int_eq(kl_solve_forces(s, 2, loads, &effort), KL_OK);
    ck_assert_double_eq_tol(effort,
                            -40.0 * GF_R1 / GF_R2 -
                                (2.0 * dtip[0] + 7.0 * dtip[1]),
                            1e-8);
  }
  kl_solver_free(s);
  kl_model_free(g.m);
}
END_TEST


/* ---- the model file: gears, rack, couple and drive statements ---- */

static const char geared_text[] =
    "kinloop-model 1\n"
    "units length mm angle deg\n"
    "link carrier\nlink planet\nlink ring\nlink pinion\nlink rack\n"
    "link arm\n"
    "revolute pivot ground 0 0 carrier 0 0\n"
    "revolute planet_pin carrier 35 0 planet 0 0\n"
    "revolute centre carrier 0 0 ring 0 0\n"
    "revolute pinion_pivot ground 200 0 pinion 0 0\n"
    "prismatic slide ground 200 -10 axis 0 rack 0 0\n"
    "revolute arm_pivot ground 0 100 arm 0 0\n"
    "point tip arm 50 0\n"
    "input pivot\n"
    "drive tip y\n"
    "input pinion_pivot\n"
    "gears pivot planet_pin 20 15\n"
    "gears centre planet_pin 50 15\n"
    "rack pinion_pivot slide -10\n"
    "sketch angle arm 30\n";

START_TEST(model_file_round_trip) {
  kl_io_error err;
  kl_model *m, *again;
  char first[4096], second[4096];
  size_t need;
  kl_coupling_info info;
  err.size = sizeof err;
  m = kl_model_read(geared_text, sizeof geared_text - 1, &err);
  ck_assert_msg(m != NULL, "line %d: %s", err.line, err.message);
  ck_assert_int_eq(kl_model_coupling_count(m), 3);
  ck_assert_int_eq(kl_model_input_point(m, 1), 0);
  ck_assert_int_eq(kl_model_input_axis(m, 1), 1);
  ck_assert_int_eq(kl_model_dof(m), 3);
  info.size = sizeof info;
  ck_assert_int_eq(kl_model_coupling(m, 2, &info), KL_OK);
  ck_assert_int_eq(info.kind, KL_COUPLING_RACK);
  ck_assert_double_eq(info.value1, -10.0);
  ck_assert_int_eq(kl_model_write(m, first, sizeof first, &need), KL_OK);
  ck_assert_ptr_nonnull(strstr(first, "drive tip y\n"));
  ck_assert_ptr_nonnull(strstr(first, "gears centre planet_pin 50 15\n"));
  again = kl_model_read(first, need, &err);
  ck_assert_msg(again != NULL, "line %d: %s", err.line, err.message);
  ck_assert_int_eq(kl_model_write(again, second, sizeof second, &need),
                   KL_OK);
  ck_assert_str_eq(first, second);
  kl_model_free(again);
  kl_model_free(m);
}
END_TEST

START_TEST(model_file_bad_statements) {
  static const char *bad[] = {
      "drive tip z\n",          /* no such axis */
      "gears pivot planet_pin 20 16\n", /* does not mesh */
      "gears pivot pivot 20 15\n",      /* coupled with itself */
      "rack pivot planet_pin 5\n",      /* planet_pin is no prismatic */
      "couple pivot planet_pin\n",      /* no ratio */
  };
  static const int status[] = {KL_ESYNTAX, KL_ENOMESH, KL_ESELFCOUPLING,
                               KL_EKIND, KL_ESYNTAX};
  size_t k;
  for (k = 0; k < sizeof bad / sizeof bad[0]; k++) {
    char text[2048];
    kl_io_error err;
    kl_model *m;
    err.size = sizeof err;
    snprintf(text, sizeof text,
             "kinloop-model 1\nlink carrier\nlink planet\nlink arm\n"
             "revolute pivot ground 0 0 carrier 0 0\n"
             "revolute planet_pin carrier 35 0 planet 0 0\n"
             "revolute arm_pivot ground 0 100 arm 0 0\n"
             "point tip arm 50 0\n%s",
             bad[k]);
    m = kl_model_read(text, strlen(text), &err);
    ck_assert_ptr_null(m);
    ck_assert_msg(err.status == status[k], "%s: %d (%s)", bad[k], err.status,
                  err.message);
    ck_assert_int_eq(err.line, 9);
  }
}
END_TEST

/* ---- sensitivities: to gear radii, to a driven point's place ---- */

/* From the mesh t2 = t2_0 - (r1 / r2)(t1 - t1_0) with the centres held
 * (derived from the rolling condition): dt2/dr1 = -(t1 - t1_0) / r2 and
 * dt2/dr2 = r1 (t1 - t1_0) / r2^2. The arms move only through the right
 * crank, so their sensitivities to r2 and r1 stand in the crank's ratio,
 * -r1 / r2. */
START_TEST(sensitivity_to_gear_radii) {
  geared_fivebar g = build_geared_fivebar();
  kl_solver *s = kl_solver_new(g.m);
  kl_output o;
  kl_dimension dim;
  double u = GF_T1 + 0.8, deriv;
  memset(&o, 0, sizeof o);
  o.kind = KL_OUTPUT_LINK_ANGLE;
  o.id = g.crank2;
  dim.kind = KL_DIMENSION_RADIUS;
  dim.id = 0;
  dim.axis = 0;
  solve_at(s, &u);
  ck_assert_int_eq(kl_output_sensitivity(s, &o, &dim, &deriv), KL_OK);
  ck_assert_double_eq_tol(deriv, -0.8 / GF_R2, 1e-12);
  dim.axis = 1;
  ck_assert_int_eq(kl_output_sensitivity(s, &o, &dim, &deriv), KL_OK);
  ck_assert_double_eq_tol(deriv, GF_R1 * 0.8 / (GF_R2 * GF_R2), 1e-12);
  {
    double d_arm, d_arm2;
    o.id = g.link1;
    dim.axis = 0;
    kl_output_sensitivity(s, &o, &dim, &d_arm);
    dim.axis = 1;
    kl_output_sensitivity(s, &o, &dim, &d_arm2);
    ck_assert_double_eq_tol(d_arm2 / d_arm, -GF_R1 / GF_R2, 1e-10);
  }
  dim.kind = KL_DIMENSION_RADIUS;
  dim.id = 3;
  ck_assert_int_eq(kl_output_sensitivity(s, &o, &dim, &deriv), KL_EID);
  kl_solver_free(s);
  kl_model_free(g.m);
}
END_TEST

/* The crank of the coupler-x-driven four-bar against the coupler point's
 * local x: a central difference over two models with that coordinate
 * moved (step 1e-5), solved at the same input. */
START_TEST(sensitivity_to_a_driven_points_place) {
  const double h = 1e-5;
  double t3, t4, x, deriv, lo, hi;
  fourbar probe, f = build_point_driven_fourbar(1.0, +1);
  kl_solver *s = kl_solver_new(f.m);
  kl_output o;
  kl_dimension dim;
  int k;
  probe.a = 40;
  probe.b = 120;
  probe.c = 80;
  probe.d = 100;
  x = coupler_x(&probe, 1.0, +1, &t3, &t4);
  solve_at(s, &x);
  memset(&o, 0, sizeof o);
  o.kind = KL_OUTPUT_LINK_ANGLE;
  o.id = f.crank;
  dim.kind = KL_DIMENSION_POINT;
  dim.id = f.coupler_point;
  dim.axis = 0;
  ck_assert_int_eq(kl_output_sensitivity(s, &o, &dim, &deriv), KL_OK);
  for (k = 0; k < 2; k++) {
    kl_model *m = kl_model_new();
    kl_solver *t;
    int crank = kl_add_link(m, "crank"), coupler = kl_add_link(m, "coupler");
    int rocker = kl_add_link(m, "rocker"), point;
    kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
    kl_add_revolute(m, crank, 40, 0, coupler, 0, 0);
    kl_add_revolute(m, coupler, 120, 0, rocker, 80, 0);
    kl_add_revolute(m, rocker, 0, 0, KL_GROUND, 100, 0);
    point = kl_add_point(m, coupler, 60 + (k ? h : -h), 30, "coupler");
    kl_add_point_input(m, point, 0);
    kl_model_finalize(m);
    t = kl_solver_new(m);
    kl_set_link_angle(t, crank, kl_link_angle(s, f.crank));
    kl_set_link_angle(t, coupler, kl_link_angle(s, f.coupler));
    kl_set_link_angle(t, rocker, kl_link_angle(s, f.rocker));
    solve_at(t, &x);
    if (k)
      hi = kl_link_angle(t, crank);
    else
      lo = kl_link_angle(t, crank);
    kl_solver_free(t);
    kl_model_free(m);
  }
  ck_assert(rel_diff(deriv, (hi - lo) / (2 * h), 1e-3) < 1e-6);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* A coupling beside declared redundant constraints: a parallelogram with
 * a third, redundant crank (its coupler stays level, common practice, no
 * source) whose motor also turns a wheel at twice its angle through a
 * ratio coupling; the extra row follows the kept loop rows. */
START_TEST(coupling_beside_redundant_constraints) {
  kl_model *m = kl_model_new();
  int c1 = kl_add_link(m, "c1"), c2 = kl_add_link(m, "c2");
  int c3 = kl_add_link(m, "c3"), bar = kl_add_link(m, "bar");
  int wheel = kl_add_link(m, "wheel"), motor, wheel_pivot;
  kl_solver *s;
  double u, w = 1.5;
  motor = kl_add_revolute(m, KL_GROUND, 0, 0, c1, 0, 0);
  kl_add_revolute(m, KL_GROUND, 100, 0, c2, 0, 0);
  kl_add_revolute(m, KL_GROUND, 50, 0, c3, 0, 0);
  kl_add_revolute(m, c1, 40, 0, bar, 0, 0);
  kl_add_revolute(m, c2, 40, 0, bar, 100, 0);
  kl_add_revolute(m, c3, 40, 0, bar, 50, 0);
  wheel_pivot = kl_add_revolute(m, KL_GROUND, 200, 0, wheel, 0, 0);
  ck_assert_int_eq(kl_add_coupling(m, motor, wheel_pivot, 2.0), 0);
  kl_add_input(m, motor);
  kl_model_set_redundancy(m, 1);
  kl_model_set_sketch_angle(m, c1, 1.0);
  kl_model_set_sketch_angle(m, c2, 1.0);
  kl_model_set_sketch_angle(m, c3, 1.0);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ck_assert_int_eq(kl_model_dof(m), 1);
  s = kl_solver_new(m);
  /* within (0, pi): a parallelogram meets its change points at 0 and pi */
  for (u = 0.3; u < 2.9; u += 0.25) {
    solve_at(s, &u);
    ck_assert_double_eq_tol(kl_link_angle(s, wheel), 2.0 * (u - 1.0), 1e-12);
    ck_assert_double_eq_tol(angle_diff(kl_link_angle(s, bar), 0.0), 0.0,
                            1e-10);
    ck_assert_double_eq_tol(kl_link_angle(s, c3), u, 1e-10);
    ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
    ck_assert_double_eq_tol(kl_link_rate(s, wheel), 2.0 * w, 1e-12);
  }
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* ---- the path follower ---- */

static kl_model *tip_driven_fivebar(int *c1, int *c2, int *tip) {
  kl_model *m = kl_model_new();
  int l1, l2;
  *c1 = kl_add_link(m, "c1");
  *c2 = kl_add_link(m, "c2");
  l1 = kl_add_link(m, "l1");
  l2 = kl_add_link(m, "l2");
  kl_add_revolute(m, KL_GROUND, 0, 0, *c1, 0, 0);
  kl_add_revolute(m, KL_GROUND, PF_D, 0, *c2, 0, 0);
  kl_add_revolute(m, *c1, PF_A1, 0, l1, 0, 0);
  kl_add_revolute(m, *c2, PF_A2, 0, l2, 0, 0);
  kl_add_revolute(m, l1, PF_B1, 0, l2, PF_B2, 0);
  *tip = kl_add_point(m, l1, PF_B1, 0, "tip");
  kl_add_point_input(m, *tip, 0);
  kl_add_point_input(m, *tip, 1);
  kl_model_set_sketch_angle(m, *c1, 2.2);
  kl_model_set_sketch_angle(m, *c2, 0.9);
  kl_model_set_sketch_angle(m, l1, 0.9);
  kl_model_set_sketch_angle(m, l2, 2.2);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  return m;
}

/* Around a square of side 20 at 30 mm/s: at every sample the cranks are
 * the two circle intersections' (closed form) and the tip moves at the
 * speed along the side it is on. */
START_TEST(path_follower_traces_a_square) {
  static const double px[5] = {35, 55, 55, 35, 35}, py[5] = {85, 85, 105,
                                                             105, 85};
  const double o1[2] = {0, 0}, o2[2] = {PF_D, 0};
  int c1, c2, tip, k, n = 80;
  kl_model *m = tip_driven_fivebar(&c1, &c2, &tip);
  kl_solver *s = kl_solver_new(m);
  kl_path_result r;
  double start[2] = {35, 85}, previous = 0.0;
  solve_at(s, start);
  r.size = sizeof r;
  for (k = 0; k <= n; k++) {
    double arc = 80.0 * k / n, t[2], a[2], b[2], v[2];
    int side = k == n ? 3 : (int)(arc / 20.0);
    ck_assert_int_eq(kl_solver_follow_path(s, 0, 1, 5, px, py, previous, arc,
                                           30.0, &r),
                     KL_OK);
    ck_assert_double_eq_tol(r.arc_done, arc, 1e-12);
    previous = arc;
    t[0] = kl_input_value(s, 0);
    t[1] = kl_input_value(s, 1);
    circle_meet(o1, PF_A1, t, PF_B1, +1, a);
    circle_meet(o2, PF_A2, t, PF_B2, -1, b);
    ck_assert_double_eq_tol(kl_link_angle(s, c1), atan2(a[1], a[0]), 1e-10);
    ck_assert_double_eq_tol(kl_link_angle(s, c2), atan2(b[1], b[0] - PF_D),
                            1e-10);
    ck_assert_int_eq(kl_point_velocity(s, tip, v), KL_OK);
    ck_assert_double_eq_tol(v[0], 30.0 * (px[side + 1] - px[side]) / 20.0,
                            1e-9);
    ck_assert_double_eq_tol(v[1], 30.0 * (py[side + 1] - py[side]) / 20.0,
                            1e-9);
  }
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* Straight up from (20, 95): the right chain (O2 = (60, 0), reach a2 +
 * b2 = 130) stretches out at y = sqrt(130^2 - 40^2), before the left one
 * (sqrt(130^2 - 20^2)): the workspace's edge, where the follower stops. */
START_TEST(path_follower_stops_at_the_workspace_edge) {
  static const double px[2] = {20, 20}, py[2] = {95, 160};
  int c1, c2, tip;
  kl_model *m = tip_driven_fivebar(&c1, &c2, &tip);
  kl_solver *s = kl_solver_new(m);
  kl_path_result r;
  double start[2] = {20, 95};
  solve_at(s, start);
  r.size = sizeof r;
  ck_assert_int_eq(kl_solver_follow_path(s, 0, 1, 2, px, py, 0.0, 65.0, 1.0,
                                         &r),
                   KL_LIMIT);
  ck_assert_double_eq_tol(r.limit_arc, sqrt(130.0 * 130.0 - 40.0 * 40.0) - 95,
                          1e-5);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "leaves the workspace"));
  /* bad calls: a joint input, the axes swapped, one point */
  ck_assert_int_eq(kl_solver_follow_path(s, 1, 0, 2, px, py, 0, 1, 1, &r),
                   KL_EINVAL);
  ck_assert_int_eq(kl_solver_follow_path(s, 0, 1, 1, px, py, 0, 1, 1, &r),
                   KL_EINVAL);
  ck_assert_int_eq(kl_solver_follow_path(s, 0, 5, 2, px, py, 0, 1, 1, &r),
                   KL_EID);
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* A point input starts where the sketch puts its point: the chain of the
 * sketch angles (crank 40 at 2.2 rad, arm 90 at 0.9 rad). */
START_TEST(point_inputs_start_at_the_sketch) {
  int c1, c2, tip;
  kl_model *m = tip_driven_fivebar(&c1, &c2, &tip);
  double u[2];
  ck_assert_int_eq(kl_model_start_inputs(m, u), KL_OK);
  ck_assert_double_eq_tol(u[0], 40 * cos(2.2) + 90 * cos(0.9), 1e-12);
  ck_assert_double_eq_tol(u[1], 40 * sin(2.2) + 90 * sin(0.9), 1e-12);
  kl_model_free(m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("couplings");
  TCase *tc = tcase_create("couplings");
  tcase_set_timeout(tc, 60);
  tcase_add_test(tc, planetary_sun_held_follows_willis);
  tcase_add_test(tc, planetary_ring_held_follows_willis);
  tcase_add_test(tc, geared_fivebar_matches_its_closed_form);
  tcase_add_test(tc, geared_fivebar_rates_are_the_slopes);
  tcase_add_test(tc, rack_follows_s_equals_r_theta);
  tcase_add_test(tc, ratio_coupling_counts_from_the_sketch);
  tcase_add_test(tc, fivebar_point_inputs_match_two_circle_intersections);
  tcase_add_test(tc, fourbar_driven_by_coupler_x_reproduces_freudenstein);
  tcase_add_test(tc, point_input_rates_invert_the_forward_slopes);
  tcase_add_test(tc, point_input_limit_is_the_workspace_boundary);
  tcase_add_test(tc, bad_couplings_are_refused);
  tcase_add_test(tc, couplings_enter_the_mobility_count);
  tcase_add_test(tc, planetary_tooth_forces_balance);
  tcase_add_test(tc, rack_tooth_force_by_virtual_work);
  tcase_add_test(tc, point_input_efforts_hold_the_tip);
  tcase_add_test(tc, geared_fivebar_effort_by_virtual_work);
  tcase_add_test(tc, model_file_round_trip);
  tcase_add_test(tc, path_follower_traces_a_square);
  tcase_add_test(tc, point_inputs_start_at_the_sketch);
  tcase_add_test(tc, path_follower_stops_at_the_workspace_edge);
  tcase_add_test(tc, coupling_beside_redundant_constraints);
  tcase_add_test(tc, sensitivity_to_gear_radii);
  tcase_add_test(tc, sensitivity_to_a_driven_points_place);
  tcase_add_test(tc, model_file_bad_statements);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
