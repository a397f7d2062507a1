/*
 * test_slots.c - curved slots (arc and curve) against closed forms: a pin
 * in a circular slot is a four-bar (Freudenstein's equation), an eccentric
 * disc cam is an offset slider-crank, the spline converges to an ellipse at
 * fourth order; rates by finite differences, an open curve's end located
 * as a sweep's limit, bad input.
 */
#include <check.h>
#include <math.h>
#include <string.h>

#include "suite.h"
#include "support.h"

/* A pin in a circular slot of radius c centred at the rocker's pivot
 * (d, 0): the four-bar with rocker c (crank a from the origin, coupler b
 * from the crank's end to the pin). */
static kl_model *slotted_fourbar(const fourbar *f) {
  kl_model *m = kl_model_new();
  int crank = kl_add_link(m, "crank"), coupler = kl_add_link(m, "coupler");
  int drive = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_revolute(m, crank, f->a, 0, coupler, 0, 0);
  ck_assert_int_ge(kl_add_arc_slot(m, KL_GROUND, f->d, 0, f->c, coupler, f->b, 0), 0);
  kl_add_input(m, drive);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  return m;
}

/* Freudenstein's equation (F. Freudenstein, "Approximate synthesis of
 * four-bar linkages", Trans. ASME 77, 1955), solved in closed form by
 * support.c: the coupler angle and the rocker angle phi = slide / c. */
START_TEST(arc_slot_is_a_fourbar_by_freudenstein) {
  fourbar f = {0};
  kl_model *m;
  kl_solver *s;
  int k;
  f.a = 40, f.b = 120, f.c = 80, f.d = 100;
  m = slotted_fourbar(&f);
  s = kl_solver_new(m);
  for (k = 0; k < 24; k++) {
    double t2 = 2 * PI * k / 24, t3, t4, u = t2;
    ck_assert(freudenstein(&f, t2, +1, &t3, &t4));
    if (k == 0) {
      kl_set_link_angle(s, 2, t3 + 0.05);
      kl_set_joint_slide(s, 2, f.c * (t4 - 0.05));
    }
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    ck_assert_double_le(fabs(angle_diff(kl_link_angle(s, 2), t3)), 1e-10);
    ck_assert_double_le(fabs(angle_diff(kl_joint_slide(s, 2) / f.c, t4)), 1e-10);
  }
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* An eccentric circular disc (radius rd, centre at e from the cam's
 * axis) turning a translating roller follower (roller rr, stem on x =
 * offset) as an arc slot of radius rd + rr about the disc's centre, or as
 * a closed curve slot through n points of that circle. */
typedef struct {
  double ecc, rd, rr, offset;
} disc_cam;

static kl_model *disc_cam_model(const disc_cam *c, int npoints) {
  kl_model *m = kl_model_new();
  int cam = kl_add_link(m, "cam"), follower = kl_add_link(m, "follower");
  int drive = kl_add_revolute(m, KL_GROUND, 0, 0, cam, 0, 0);
  double radius = c->rd + c->rr, xy[2 * 512];
  int k;
  ck_assert_int_ge(kl_add_prismatic(m, KL_GROUND, c->offset, 0, PI / 2, follower, 0, 0), 0);
  if (npoints == 0) {
    ck_assert_int_ge(kl_add_arc_slot(m, cam, c->ecc, 0, radius, follower, 0, 0), 0);
  } else {
    for (k = 0; k < npoints; k++) {
      xy[2 * k] = c->ecc + radius * cos(2 * PI * k / npoints);
      xy[2 * k + 1] = radius * sin(2 * PI * k / npoints);
    }
    ck_assert_int_ge(kl_add_curve_slot(m, cam, npoints, xy, 1, follower, 0, 0), 0);
  }
  kl_add_point(m, follower, 0, 0, "roller");
  kl_add_input(m, drive);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  return m;
}

/* The offset slider-crank's closed form (crank ecc, connecting rod
 * rd + rr, offset; support.c's offset_slider_y, from Norton, from memory). */
static double slider_y(const disc_cam *c, double t, double *dy) {
  return offset_slider_y(c->ecc, c->rd + c->rr, c->offset, t, dy);
}

/* The pin's place on the slot at the start: its polar angle about the
 * disc's centre, for the sketch. */
static void sketch_disc(const disc_cam *c, kl_solver *s, double t, int curve,
                        int npoints) {
  double dy, y = slider_y(c, t, &dy);
  /* roller centre in the cam's frame */
  double gx = cos(t) * c->offset + sin(t) * y, gy = -sin(t) * c->offset + cos(t) * y;
  double phi = atan2(gy, gx - c->ecc);
  kl_set_joint_slide(s, 1, y);
  kl_set_joint_slide(s, 2, curve ? phi / (2 * PI) * npoints : phi * (c->rd + c->rr));
}

static void check_rates_by_differences(kl_model *m, kl_solver *s, double t,
                                       double tol);

START_TEST(eccentric_disc_cam_is_an_offset_slider_crank) {
  disc_cam c = {12.0, 40.0, 8.0, 5.0};
  kl_model *m = disc_cam_model(&c, 0);
  kl_solver *s = kl_solver_new(m);
  int k;
  sketch_disc(&c, s, 0.0, 0, 0);
  for (k = 0; k <= 36; k++) {
    double t = 2 * PI * k / 36, rate = 1.0, dy, y = slider_y(&c, t, &dy);
    ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
    ck_assert_int_eq(kl_solve_velocity(s, &rate), KL_OK);
    ck_assert_double_le(fabs(kl_joint_slide(s, 1) - y), 1e-11 * 60);
    ck_assert_double_le(fabs(kl_joint_slide_rate(s, 1) - dy), 1e-10 * 60);
    if (k % 6 == 1)
      check_rates_by_differences(m, s, t, 1e-6);
  }
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* Rates by central differences (common practice, no source): velocity
 * against positions at t +- h, acceleration against velocities, jerk
 * against accelerations (the path's third derivative included). */
static void check_rates_by_differences(kl_model *m, kl_solver *s, double t,
                                       double tol) {
  const double h = 1e-5;
  int n = kl_model_link_count(m), nj = kl_model_joint_count(m), i;
  double up[16], down[16], vup[16], vdown[16], aup[16], adown[16], v[16],
      a[16], one = 1.0, zero = 0.0, u;
  for (i = 0; i < 2; i++) {
    int j;
    u = t + (i == 0 ? h : -h);
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    ck_assert_int_eq(kl_solve_velocity(s, &one), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(s, &zero), KL_OK);
    for (j = 0; j < n + nj; j++) {
      double pos = j < n ? kl_link_angle(s, j) : kl_joint_slide(s, j - n);
      double rate = j < n ? kl_link_rate(s, j) : kl_joint_slide_rate(s, j - n);
      double acc = j < n ? kl_link_accel(s, j) : kl_joint_slide_accel(s, j - n);
      (i == 0 ? up : down)[j] = isnan(pos) ? 0.0 : pos;
      (i == 0 ? vup : vdown)[j] = isnan(rate) ? 0.0 : rate;
      (i == 0 ? aup : adown)[j] = isnan(acc) ? 0.0 : acc;
    }
  }
  ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &one), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &zero), KL_OK);
  ck_assert_int_eq(kl_solve_jerk(s, &zero), KL_OK);
  for (i = 0; i < n + nj; i++) {
    double rate = i < n ? kl_link_rate(s, i) : kl_joint_slide_rate(s, i - n);
    double acc = i < n ? kl_link_accel(s, i) : kl_joint_slide_accel(s, i - n);
    double jerk = i < n ? kl_link_jerk(s, i) : kl_joint_slide_jerk(s, i - n);
    if (isnan(jerk))
      jerk = 0.0;
    ck_assert_msg(fabs(jerk - (aup[i] - adown[i]) / (2 * h)) <= tol,
                  "jerk %d at %g: %.12g against %.12g", i, t, jerk,
                  (aup[i] - adown[i]) / (2 * h));
    v[i] = isnan(rate) ? 0.0 : rate;
    a[i] = isnan(acc) ? 0.0 : acc;
    ck_assert_msg(fabs(v[i] - (up[i] - down[i]) / (2 * h)) <= tol,
                  "rate %d at %g: %.12g against %.12g", i, t, v[i],
                  (up[i] - down[i]) / (2 * h));
    ck_assert_msg(fabs(a[i] - (vup[i] - vdown[i]) / (2 * h)) <= tol,
                  "acceleration %d at %g: %.12g against %.12g", i, t, a[i],
                  (vup[i] - vdown[i]) / (2 * h));
  }
}

/* The same cam with its circle as a closed spline of 256 points: the
 * slide of the follower within the spline's error of the closed form, and
 * every rate of the model (the spline's curvature term included) against
 * finite differences. */
START_TEST(curve_slot_cam_matches_and_its_rates_are_the_slopes) {
  disc_cam c = {12.0, 40.0, 8.0, 5.0};
  kl_model *m = disc_cam_model(&c, 256);
  kl_solver *s = kl_solver_new(m);
  int k;
  sketch_disc(&c, s, 0.0, 1, 256);
  for (k = 0; k <= 12; k++) {
    double t = 2 * PI * k / 12 + 0.1, dy, y = slider_y(&c, t, &dy);
    ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
    /* a periodic cubic spline's error at this spacing (h = 2 pi 48 / 256)
     * is about 48 h^4 / 384: below 1e-5 */
    ck_assert_double_le(fabs(kl_joint_slide(s, 1) - y), 1e-5);
    check_rates_by_differences(m, s, t, 1e-6);
  }
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* The force stage through both curved kinds: with the follower pushed
 * down by a spring force F, the motor's torque is what virtual work gives
 * (torque = -F . v at unit crank rate: the principle of virtual work, for
 * massless links), and the slot's force is normal to its path at the pin. */
START_TEST(forces_through_curved_slots_do_virtual_work) {
  disc_cam c = {12.0, 40.0, 8.0, 5.0};
  int kind;
  for (kind = 0; kind < 2; kind++) {
    kl_model *m = disc_cam_model(&c, kind == 0 ? 0 : 256);
    kl_solver *s;
    kl_load load = {KL_LOAD_FORCE, 0, 0.0, -300.0, 0.0};
    int k;
    for (k = 0; k < 8; k++) {
      double t = 2 * PI * k / 8 + 0.2, one = 1.0, zero = 0.0, effort, v[2],
             f[2], path[6];
      int lk[2];
      s = kl_solver_new(m);
      sketch_disc(&c, s, t, kind, 256);
      ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
      ck_assert_int_eq(kl_solve_velocity(s, &one), KL_OK);
      ck_assert_int_eq(kl_solve_acceleration(s, &zero), KL_OK);
      ck_assert_int_eq(kl_point_velocity(s, 0, v), KL_OK);
      ck_assert_int_eq(kl_solve_forces(s, 1, &load, &effort), KL_OK);
      ck_assert_double_le(fabs(effort + (load.fx * v[0] + load.fy * v[1])),
                          1e-9 * 300 * 60);
      /* the slot's force on the follower is normal to the path (in the
       * cam's frame, turned by the cam's angle) */
      ck_assert_int_eq(kl_joint_force(s, 2, f), KL_OK);
      ck_assert_int_eq(kl_model_joint_links(m, 2, lk, NULL, NULL), KL_OK);
      kl_model_slot_point(m, 2, kl_joint_slide(s, 2), path);
      {
        double a = kl_link_angle(s, lk[0]);
        double dx = cos(a) * path[2] - sin(a) * path[3];
        double dy = sin(a) * path[2] + cos(a) * path[3];
        ck_assert_double_le(fabs(f[0] * dx + f[1] * dy),
                            1e-9 * hypot(f[0], f[1]) * hypot(dx, dy));
      }
      kl_solver_free(s);
    }
    kl_model_free(m);
  }
}
END_TEST

/* The largest distance over the curve between the closed spline through n
 * points of the ellipse (a cos u, b sin u), u = 2 pi k / n, and the
 * ellipse at the same parameter. */
static double ellipse_error(int n) {
  const double a = 3.0, b = 1.5;
  double xy[2 * 256], worst = 0.0;
  kl_model *m = kl_model_new();
  int slider = kl_add_link(m, "pin"), j, k;
  for (k = 0; k < n; k++) {
    xy[2 * k] = a * cos(2 * PI * k / n);
    xy[2 * k + 1] = b * sin(2 * PI * k / n);
  }
  j = kl_add_curve_slot(m, KL_GROUND, n, xy, 1, slider, 0, 0);
  ck_assert_int_ge(j, 0);
  for (k = 0; k < 40 * n; k++) {
    double t = k / 40.0 + 0.0125, out[6], u = 2 * PI * t / n;
    ck_assert_int_eq(kl_model_slot_point(m, j, t, out), KL_OK);
    worst = fmax(worst, hypot(out[0] - a * cos(u), out[1] - b * sin(u)));
  }
  kl_model_free(m);
  return worst;
}

/* Cubic spline interpolation of a smooth function converges at order h^4
 * (C. de Boor, A Practical Guide to Splines, the error bound of complete
 * and periodic cubic spline interpolation; from memory): the error falls
 * about 16-fold each time the points double. */
START_TEST(spline_slot_converges_to_an_ellipse_at_fourth_order) {
  double e16 = ellipse_error(16), e32 = ellipse_error(32),
         e64 = ellipse_error(64), e128 = ellipse_error(128);
  double o1 = log2(e16 / e32), o2 = log2(e32 / e64), o3 = log2(e64 / e128);
  ck_assert_msg(o1 > 3.6 && o1 < 4.4 && o2 > 3.8 && o2 < 4.2 && o3 > 3.8 &&
                    o3 < 4.2,
                "orders %.3f %.3f %.3f (errors %.3g %.3g %.3g %.3g)", o1, o2,
                o3, e16, e32, e64, e128);
}
END_TEST

/* An open spline through collinear, equally spaced points is their line
 * with t = k at point k, and runs only from point 0 to point n - 1. A
 * slider-crank (crank 1, coupler 2) whose pin runs in such a slot along
 * y = 0 from x = 1.5 to x = 2.8: the pin's x = cos t + sqrt(4 - sin^2 t)
 * (the slider-crank's closed form) reaches 2.8 where cos t = 4.84 / 5.6.
 * A sweep towards it stops there with KL_LIMIT, located to 1e-9. */
START_TEST(open_curve_end_is_a_located_limit) {
  double xy[10], t, where = acos(4.84 / 5.6);
  kl_model *m = kl_model_new();
  kl_solver *s;
  kl_sweep_result r;
  int crank = kl_add_link(m, "crank"), coupler = kl_add_link(m, "coupler"), k;
  int drive = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0), slot;
  kl_add_revolute(m, crank, 1, 0, coupler, 0, 0);
  for (k = 0; k < 5; k++) {
    xy[2 * k] = 1.5 + 1.3 * k / 4;
    xy[2 * k + 1] = 0.0;
  }
  slot = kl_add_curve_slot(m, KL_GROUND, 5, xy, 0, coupler, 2, 0);
  kl_add_input(m, drive);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  t = PI / 2;
  kl_set_link_angle(s, crank, t);
  kl_set_link_angle(s, coupler, -asin(0.5));
  kl_set_joint_slide(s, slot, (sqrt(3.0) - 1.5) / 0.325);
  ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
  ck_assert_double_le(fabs(kl_joint_slide(s, slot) - (sqrt(3.0) - 1.5) / 0.325), 1e-10);
  memset(&r, 0, sizeof r);
  r.size = sizeof r;
  ck_assert_int_eq(kl_solver_sweep(s, 0, PI / 2, 0.0, 20, NULL, NULL, &r), KL_LIMIT);
  ck_assert_double_le(fabs(r.limit_input - where), 1e-9);
  /* beyond the end the loops do not close: the pin would leave the slot */
  t = 0.2;
  ck_assert_int_eq(kl_solve_position(s, &t), KL_ENOASSEMBLY);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "beyond its open curve's ends"));
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* Each bad curve or radius has its own status and message, and leaves
 * the model as it was. */
START_TEST(bad_slots_are_refused_and_change_nothing) {
  kl_model *m = kl_model_new();
  int a = kl_add_link(m, "a");
  double line[6] = {0, 0, 1, 0, 2, 0}, twice[6] = {0, 0, 1, 0, 1, 0},
         loop[6] = {0, 0, 1, 0, 0, 0}, bad[6] = {0, 0, NAN, 0, 2, 0};
  ck_assert_int_eq(kl_add_curve_slot(m, KL_GROUND, 1, line, 0, a, 0, 0), KL_EFEWPOINTS);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "needs at least 2"));
  ck_assert_int_eq(kl_add_curve_slot(m, KL_GROUND, 2, line, 1, a, 0, 0), KL_EFEWPOINTS);
  ck_assert_int_eq(kl_add_curve_slot(m, KL_GROUND, 3, twice, 0, a, 0, 0), KL_EREPEATED);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "point indices 1 and 2 (0-based)"));
  /* closed: the last point repeats the first */
  ck_assert_int_eq(kl_add_curve_slot(m, KL_GROUND, 3, loop, 1, a, 0, 0), KL_EREPEATED);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "point indices 2 and 0 (0-based)"));
  ck_assert_int_eq(kl_add_curve_slot(m, KL_GROUND, 3, bad, 0, a, 0, 0), KL_ENONFINITE);
  ck_assert_int_eq(kl_add_curve_slot(m, KL_GROUND, 3, NULL, 0, a, 0, 0), KL_EINVAL);
  ck_assert_int_eq(kl_add_arc_slot(m, KL_GROUND, 0, 0, 0.0, a, 0, 0), KL_ERADIUS);
  ck_assert_int_eq(kl_add_arc_slot(m, KL_GROUND, 0, 0, -2.0, a, 0, 0), KL_ERADIUS);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "radius -2 is not positive"));
  /* with the model's length unit recorded, the radius carries its symbol */
  ck_assert_int_eq(kl_model_set_units(m, KL_LENGTH_MM, KL_ANGLE_DEG), KL_OK);
  ck_assert_int_eq(kl_add_arc_slot(m, KL_GROUND, 0, 0, -2.0, a, 0, 0), KL_ERADIUS);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "radius -2 mm is not positive"));
  ck_assert_int_eq(kl_add_arc_slot(m, KL_GROUND, 0, 0, NAN, a, 0, 0), KL_ENONFINITE);
  ck_assert_int_eq(kl_add_arc_slot(m, a, 0, 0, 1.0, a, 0, 0), KL_ESELFJOINT);
  ck_assert_int_eq(kl_add_curve_slot(m, KL_GROUND, 3, line, 0, 7, 0, 0), KL_EID);
  ck_assert_int_eq(kl_model_joint_count(m), 0);
  /* a good one, then its duplicate */
  ck_assert_int_eq(kl_add_curve_slot(m, KL_GROUND, 3, line, 0, a, 0, 0), 0);
  ck_assert_int_eq(kl_add_curve_slot(m, KL_GROUND, 3, line, 0, a, 0, 0), KL_EDUPLICATE);
  ck_assert_int_eq(kl_model_joint_count(m), 1);
  ck_assert_int_eq(kl_model_joint_kind(m, 0), KL_JOINT_CURVE_SLOT);
  ck_assert(isnan(kl_model_joint_axis(m, 0)));
  ck_assert_str_eq(kl_status_str(KL_EREPEATED), "a curve repeats a point");
  kl_model_free(m);
}
END_TEST

/* Reading back: the points, the radius, and the path at a slide. */
/* A point input whose chain runs through an arc slot starts where the
 * sketch puts the point: on the circle, x = cx + r cos(s / r) plus the
 * point's arm (the slot's own path, not a straight slide). */
START_TEST(point_input_through_an_arc_slot_starts_on_the_circle) {
  kl_model *m = kl_model_new();
  int carriage = kl_add_link(m, "carriage");
  int slot = kl_add_arc_slot(m, KL_GROUND, 5, -3, 50, carriage, 0, 0);
  int pen = kl_add_point(m, carriage, 10, 0, "pen");
  double u[2];
  ck_assert_int_ge(slot, 0);
  ck_assert_int_eq(kl_add_input(m, slot), 0);
  ck_assert_int_eq(kl_add_point_input(m, pen, 1), 1);
  ck_assert_int_eq(kl_model_set_sketch_slide(m, slot, 25.0), KL_OK);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ck_assert_int_eq(kl_model_start_inputs(m, u), KL_OK);
  /* the carriage's sketch angle is 0: the pen's arm adds (10, 0) */
  ck_assert_double_eq_tol(u[1], -3 + 50 * sin(0.5), 1e-12);
  kl_model_free(m);
}
END_TEST

START_TEST(slots_read_back) {
  kl_model *m = kl_model_new();
  int a = kl_add_link(m, "a"), b = kl_add_link(m, "b"), closed;
  double sq[8] = {0, 0, 1, 0, 1, 1, 0, 1}, got[8], out[6];
  ck_assert_int_eq(kl_add_arc_slot(m, KL_GROUND, 1, 2, 3, a, 0, 0), 0);
  ck_assert_int_eq(kl_add_curve_slot(m, a, 4, sq, 1, b, 0, 0), 1);
  ck_assert_double_eq(kl_model_slot_radius(m, 0), 3.0);
  ck_assert(isnan(kl_model_slot_radius(m, 1)));
  ck_assert_int_eq(kl_model_curve_count(m, 1), 4);
  ck_assert_int_eq(kl_model_curve_closed(m, 1), 1);
  for (closed = 0; closed < 4; closed++)
    ck_assert_int_eq(kl_model_curve_point(m, 1, closed, got + 2 * closed), KL_OK);
  ck_assert_int_eq(memcmp(got, sq, sizeof sq), 0);
  ck_assert_int_eq(kl_model_curve_point(m, 1, 4, got), KL_EID);
  ck_assert_int_eq(kl_model_curve_count(m, 0), KL_EKIND);
  ck_assert_int_eq(kl_model_curve_closed(m, 9), KL_EID);
  /* the arc at slide r pi / 2: a quarter turn from the x axis */
  ck_assert_int_eq(kl_model_slot_point(m, 0, 3 * PI / 2, out), KL_OK);
  ck_assert_double_le(fabs(out[0] - 1.0), 1e-15);
  ck_assert_double_le(fabs(out[1] - 5.0), 1e-15);
  ck_assert_double_le(fabs(out[2] + 1.0), 1e-15);
  ck_assert_double_le(fabs(out[4]), 1e-15);
  ck_assert_double_le(fabs(out[5] + 1.0 / 3), 1e-15);
  /* the closed spline passes its points, and wraps: t = 5 is point 1 */
  ck_assert_int_eq(kl_model_slot_point(m, 1, 2.0, out), KL_OK);
  ck_assert_double_le(fabs(out[0] - 1) + fabs(out[1] - 1), 1e-15);
  ck_assert_int_eq(kl_model_slot_point(m, 1, 5.0, out), KL_OK);
  ck_assert_double_le(fabs(out[0] - 1) + fabs(out[1]), 1e-15);
  ck_assert_int_eq(kl_model_slot_point(m, 1, NAN, out), KL_ENONFINITE);
  kl_model_free(m);
}
END_TEST

/* The model file: arc-slot and curve-slot statements read into the same
 * joints, and written back to the same text (a round trip). */
START_TEST(slot_statements_round_trip) {
  static const char text[] =
      "kinloop-model 1\n"
      "units length mm angle deg\n"
      "link crank\nlink coupler\nlink block\n"
      "revolute drive ground 0 0 crank 0 0\n"
      "revolute - crank 40 0 coupler 0 0\n"
      "arc-slot guide ground 100 0 radius 80 coupler 120 0\n"
      "curve-slot track ground open 3 block 0 0 through 0 -50 60 -45 120 -50\n"
      "revolute - coupler 60 0 block 0 10\n"
      "input drive\n";
  kl_io_error err;
  kl_model *m, *again;
  char out1[4096], out2[4096];
  size_t need;
  double xy[2];
  memset(&err, 0, sizeof err);
  err.size = sizeof err;
  m = kl_model_read(text, sizeof text - 1, &err);
  ck_assert_msg(m != NULL, "%s (line %d)", err.message, err.line);
  ck_assert_int_eq(kl_model_joint_kind(m, 2), KL_JOINT_ARC_SLOT);
  ck_assert_double_eq(kl_model_slot_radius(m, 2), 80.0);
  ck_assert_int_eq(kl_model_curve_count(m, 3), 3);
  ck_assert_int_eq(kl_model_curve_closed(m, 3), 0);
  ck_assert_int_eq(kl_model_curve_point(m, 3, 1, xy), KL_OK);
  ck_assert_double_eq(xy[1], -45.0);
  ck_assert_int_eq(kl_model_write(m, out1, sizeof out1, &need), KL_OK);
  again = kl_model_read(out1, strlen(out1), &err);
  ck_assert_msg(again != NULL, "%s (line %d)\n%s", err.message, err.line, out1);
  ck_assert_int_eq(kl_model_write(again, out2, sizeof out2, &need), KL_OK);
  ck_assert_str_eq(out1, out2);
  ck_assert_ptr_nonnull(strstr(out1, "curve-slot track ground open 3 block 0 0 through 0 -50 60 -45 120 -50\n"));
  kl_model_free(again);
  kl_model_free(m);
  /* bad statements: their own messages, at their line */
  {
    static const char flat[] = "kinloop-model 1\nlink a\narc-slot - ground 0 0 radius 0 a 0 0\n";
    static const char twice[] = "kinloop-model 1\nlink a\ncurve-slot - ground open 3 a 0 0 through 0 0 1 1 1 1\n";
    static const char few[] = "kinloop-model 1\nlink a\ncurve-slot - ground closed 2 a 0 0 through 0 0 1 1\n";
    static const char huge[] = "kinloop-model 1\nlink a\ncurve-slot - ground open 999999999 a 0 0 through 0 0\n";
    static const char shape[] = "kinloop-model 1\nlink a\ncurve-slot - ground round 3 a 0 0 through 0 0\n";
    ck_assert_ptr_null(kl_model_read(flat, sizeof flat - 1, &err));
    ck_assert_int_eq(err.status, KL_ERADIUS);
    ck_assert_int_eq(err.line, 3);
    ck_assert_ptr_null(kl_model_read(twice, sizeof twice - 1, &err));
    ck_assert_int_eq(err.status, KL_EREPEATED);
    ck_assert_ptr_null(kl_model_read(few, sizeof few - 1, &err));
    ck_assert_int_eq(err.status, KL_EFEWPOINTS);
    ck_assert_ptr_null(kl_model_read(huge, sizeof huge - 1, &err));
    ck_assert_int_eq(err.status, KL_ESYNTAX);
    ck_assert_ptr_null(kl_model_read(shape, sizeof shape - 1, &err));
    ck_assert_int_eq(err.status, KL_ESYNTAX);
    ck_assert_ptr_nonnull(strstr(err.message, "'open' or 'closed'"));
  }
}
END_TEST

/* Every allocation of a curve slot and of reading one may fail: each
 * failure gives KL_ENOMEM, leaves the model as it was, and leaks nothing
 * (the fault-injecting allocator of support.c). */
START_TEST(curve_slot_survives_every_failed_allocation) {
  static const char text[] =
      "kinloop-model 1\nlink a\nlink b\n"
      "revolute - ground 0 0 a 0 0\nrevolute - a 1 0 b 0 0\n"
      "curve-slot - ground closed 4 b 2 0 through 0 0 3 0 3 3 0 3\n"
      "input @0\n";
  double sq[8] = {0, 0, 1, 0, 1, 1, 0, 1};
  long n;
  for (n = 1;; n++) {
    counting_alloc c;
    kl_model *m, *read;
    int a, st;
    kl_io_error err;
    memset(&c, 0, sizeof c);
    m = counting_model(&c);
    ck_assert_ptr_nonnull(m);
    a = kl_add_link(m, "a");
    c.fail_at = c.calls + n;
    st = kl_add_curve_slot(m, KL_GROUND, 4, sq, 1, a, 0, 0);
    ck_assert(st == 0 || st == KL_ENOMEM);
    ck_assert_int_eq(kl_model_joint_count(m), st == 0 ? 1 : 0);
    kl_model_free(m);
    ck_assert_int_eq(c.live, 0);
    memset(&err, 0, sizeof err);
    err.size = sizeof err;
    c.fail_at = c.calls + n;
    read = kl_model_read_with_alloc(text, sizeof text - 1, counting_alloc_fn, &c, &err);
    if (read == NULL)
      ck_assert_int_eq(err.status, KL_ENOMEM);
    kl_model_free(read);
    ck_assert_int_eq(c.live, 0);
    if (st == 0 && read != NULL)
      break;
  }
}
END_TEST

int main(void) {
  Suite *suite = suite_create("slots");
  TCase *tc = tcase_create("slots");
  tcase_set_timeout(tc, 60);
  tcase_add_test(tc, arc_slot_is_a_fourbar_by_freudenstein);
  tcase_add_test(tc, eccentric_disc_cam_is_an_offset_slider_crank);
  tcase_add_test(tc, curve_slot_cam_matches_and_its_rates_are_the_slopes);
  tcase_add_test(tc, forces_through_curved_slots_do_virtual_work);
  tcase_add_test(tc, spline_slot_converges_to_an_ellipse_at_fourth_order);
  tcase_add_test(tc, open_curve_end_is_a_located_limit);
  tcase_add_test(tc, bad_slots_are_refused_and_change_nothing);
  tcase_add_test(tc, slots_read_back);
  tcase_add_test(tc, point_input_through_an_arc_slot_starts_on_the_circle);
  tcase_add_test(tc, slot_statements_round_trip);
  tcase_add_test(tc, curve_slot_survives_every_failed_allocation);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
