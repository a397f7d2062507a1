/*
 * test_metrics.c - the design figures against closed forms and finite
 * differences: Grashof classes, transmission angle, stroke and time ratio,
 * static input effort, mechanical advantage, sensitivities, tolerance stacks.
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "suite.h"
#include "support.h"

#define DEG (PI / 180.0)

/* Closed-form tolerance of the figures, as in test_rates.c: each is one or
 * two linear solves at a position converged to about 1e-13, so agreement
 * should be near 1e-13; 1e-9 leaves room for the conditioning of the
 * linkages used here. */
#define CLOSED_FORM_TOL 1e-9

/* Position tolerance for the difference tests (as in test_rates.c):
 * residual <= 1e-14 scale, so Newton's last error stays far below the
 * difference quotients' own errors. */
#define TIGHT_POSITION_TOL 1e-14

static void tighten(kl_solver *s) {
  kl_options o;
  kl_options_default(&o);
  o.tolerance = TIGHT_POSITION_TOL;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_OK);
}

static kl_output output(int kind, int id, int line_a, int line_b) {
  kl_output o;
  o.kind = kind;
  o.id = id;
  o.line_a = line_a;
  o.line_b = line_b;
  return o;
}

static kl_load force_at(int point, double fx, double fy) {
  kl_load l;
  memset(&l, 0, sizeof l);
  l.kind = KL_LOAD_FORCE;
  l.id = point;
  l.fx = fx;
  l.fy = fy;
  return l;
}

static kl_load torque_on(int link, double torque) {
  kl_load l;
  memset(&l, 0, sizeof l);
  l.kind = KL_LOAD_TORQUE;
  l.id = link;
  l.torque = torque;
  return l;
}

static kl_range new_range(void) {
  kl_range r;
  memset(&r, 0, sizeof r);
  r.size = sizeof r;
  return r;
}

/* The crank-rocker's transmission angle: at the coupler-rocker pin, between
 * the coupler's line to the crank pin and the rocker's line to its pivot. */
static kl_output transmission(const fourbar *f) {
  return output(KL_OUTPUT_TRANSMISSION, f->rocker_pin, f->crank_pin,
                f->rocker_pivot);
}

/* ---- everything a caller can read back, to compare states bit for bit ---- */


/* ---- mechanisms of this suite ---- */

static void sketch_slider(kl_solver *s, const slider_crank *sc) {
  ck_assert_int_eq(kl_set_link_angle(s, sc->rod, -0.1), KL_OK);
  ck_assert_int_eq(kl_set_joint_slide(s, sc->slide_joint, 120.0), KL_OK);
}

/* A six-bar of support.c from its pin_linkage data, with a point on link 4
 * added before finalize (position chosen for this test). */
#define SIXBAR_POINT_LINK 4
static kl_model *build_sixbar_with_point(const pin_linkage *p) {
  kl_model *m = kl_model_new();
  int l, j;
  for (l = 1; l < p->nlinks; l++)
    kl_add_link(m, NULL);
  for (j = 0; j < p->njoints; j++)
    kl_add_revolute(m, p->a[j], p->pa[j][0], p->pa[j][1], p->b[j],
                    p->pb[j][0], p->pb[j][1]);
  kl_add_point(m, SIXBAR_POINT_LINK, 40.0, 15.0, "load point");
  kl_add_input(m, p->input_joint);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  return m;
}

/* ------------------------------------------------------------------------
 * 1. Grashof classes
 * ------------------------------------------------------------------------ */

/*
 * Source: the Grashof condition (standard kinematics): with s the shortest
 * link, l the longest and p, q the others, s + l < p + q lets the shortest
 * link turn fully against all others; then the shortest link's place names
 * the class (input: crank-rocker, output: rocker-crank, ground: double-crank,
 * coupler: double-rocker). s + l = p + q is the change point case, s + l >
 * p + q non-Grashof (triple-rocker). A longest link at least as long as the
 * other three together cannot close the loop at all (the polygon
 * inequality: elementary geometry). Lengths chosen for this test; the
 * arguments are (ground, input, coupler, output).
 */
START_TEST(grashof_classes_from_lengths) {
  static const struct {
    double g, in, cp, out;
    int cls;
    const char *name;
  } cases[] = {
      {100, 40, 120, 80, KL_GRASHOF_CRANK_ROCKER, "crank-rocker"},   /* 160 < 180, input s */
      {100, 80, 120, 40, KL_GRASHOF_ROCKER_CRANK, "rocker-crank"},   /* output s */
      {40, 100, 120, 80, KL_GRASHOF_DOUBLE_CRANK, "double-crank"},   /* ground s */
      {100, 80, 40, 120, KL_GRASHOF_DOUBLE_ROCKER, "double-rocker"}, /* coupler s */
      {100, 40, 100, 40, KL_GRASHOF_CHANGE_POINT, "change point"},   /* 140 = 140 */
      {80, 50, 70, 100, KL_GRASHOF_CHANGE_POINT, "change point"},    /* 150 = 150 */
      {100, 70, 50, 60, KL_GRASHOF_TRIPLE_ROCKER, "triple-rocker"},  /* 150 > 130 */
      {100, 100, 100, 100, KL_GRASHOF_CHANGE_POINT, "change point"}, /* all equal */
      {300, 40, 120, 80, KL_GRASHOF_NO_ASSEMBLY, "no assembly"},     /* 300 > 240 */
      {100, 250, 40, 60, KL_GRASHOF_NO_ASSEMBLY, "no assembly"},     /* 250 > 200 */
      {240, 40, 120, 80, KL_GRASHOF_NO_ASSEMBLY, "no assembly"},     /* 240 = 240: in line */
      {239, 40, 120, 80, KL_GRASHOF_TRIPLE_ROCKER, "triple-rocker"}, /* 279 > 160 */
  };
  unsigned k;
  for (k = 0; k < sizeof cases / sizeof cases[0]; k++) {
    int cls = kl_grashof(cases[k].g, cases[k].in, cases[k].cp, cases[k].out);
    ck_assert_msg(cls == cases[k].cls, "case %u: class %d, expected %d", k, cls,
                  cases[k].cls);
    ck_assert_str_eq(kl_grashof_str(cls), cases[k].name);
  }
  /* equality within rounding is the change point; a clear excess is not */
  ck_assert_int_eq(kl_grashof(100 * (1 + 1e-15), 40, 100, 40), KL_GRASHOF_CHANGE_POINT);
  ck_assert_int_eq(kl_grashof(100 * (1 + 1e-9), 40, 100, 40), KL_GRASHOF_TRIPLE_ROCKER);
  ck_assert_int_eq(kl_grashof(100, 40 * (1 + 1e-9), 100, 40), KL_GRASHOF_ROCKER_CRANK);
  ck_assert_str_eq(kl_grashof_str(0), "not a class");
  ck_assert_str_eq(kl_grashof_str(8), "not a class");
}
END_TEST

START_TEST(grashof_rejects_bad_lengths) {
  const double bad[] = {0.0, -1.0, -0.0, NAN, INFINITY, -INFINITY};
  const int status[] = {KL_EINVAL, KL_EINVAL, KL_EINVAL, KL_ENONFINITE,
                        KL_ENONFINITE, KL_ENONFINITE};
  unsigned k;
  int at;
  for (k = 0; k < sizeof bad / sizeof bad[0]; k++)
    for (at = 0; at < 4; at++) {
      double len[4] = {100, 40, 120, 80};
      len[at] = bad[k];
      ck_assert_msg(kl_grashof(len[0], len[1], len[2], len[3]) == status[k],
                    "length %d = %g", at, bad[k]);
    }
}
END_TEST

/* build_fourbar(a, b, c, d): crank a, coupler b, rocker c, ground d. */
START_TEST(model_grashof_of_each_class) {
  static const struct {
    double a, b, c, d;
    int cls;
  } cases[] = {
      {40, 120, 80, 100, KL_GRASHOF_CRANK_ROCKER}, {80, 120, 40, 100, KL_GRASHOF_ROCKER_CRANK},
      {100, 120, 80, 40, KL_GRASHOF_DOUBLE_CRANK}, {80, 40, 120, 100, KL_GRASHOF_DOUBLE_ROCKER},
      {40, 100, 40, 100, KL_GRASHOF_CHANGE_POINT}, {70, 50, 60, 100, KL_GRASHOF_TRIPLE_ROCKER},
  };
  unsigned k;
  kl_model *unfinished;
  for (k = 0; k < sizeof cases / sizeof cases[0]; k++) {
    fourbar f = build_fourbar(cases[k].a, cases[k].b, cases[k].c, cases[k].d);
    ck_assert(kl_model_is_finalized(f.m));
    ck_assert_msg(kl_model_grashof(f.m) == cases[k].cls, "case %u: %d", k,
                  kl_model_grashof(f.m));
    /* the model's class is the class of its lengths */
    ck_assert_int_eq(kl_model_grashof(f.m),
                     kl_grashof(cases[k].d, cases[k].a, cases[k].b, cases[k].c));
    kl_model_free(f.m);
  }
  {
    slider_crank sc = build_slider_crank(30, 100, 12);
    inverted_slider_crank is = build_inverted_slider_crank(35, 90);
    pin_linkage watt = watt_sixbar(), steph = stephenson_sixbar();
    kl_model *mw = build_pin_linkage(&watt, 0), *ms = build_pin_linkage(&steph, 0);
    fivebar fb = build_fivebar(35, 25, 70, 80, 80);
    ck_assert_int_eq(kl_model_grashof(sc.m), KL_EKIND);
    ck_assert_int_eq(kl_model_grashof(is.m), KL_EKIND);
    ck_assert_int_eq(kl_model_grashof(mw), KL_EKIND);
    ck_assert_int_eq(kl_model_grashof(ms), KL_EKIND);
    ck_assert_int_eq(kl_model_grashof(fb.m), KL_EKIND);
    kl_model_free(sc.m);
    kl_model_free(is.m);
    kl_model_free(mw);
    kl_model_free(ms);
    kl_model_free(fb.m);
  }
  unfinished = kl_model_new();
  kl_add_link(unfinished, "loose");
  ck_assert_int_eq(kl_model_grashof(unfinished), KL_ESTATE);
  ck_assert_int_eq(kl_model_grashof(NULL), KL_EINVAL);
  kl_model_free(unfinished);
}
END_TEST

/* ------------------------------------------------------------------------
 * 2. Transmission angle of the crank-rocker
 * ------------------------------------------------------------------------ */

/*
 * Source: the law of cosines (standard four-bar kinematics) in the triangle
 * crank pin A, rocker pin B, rocker pivot O4: |A O4|^2 = a^2 + d^2 -
 * 2 a d cos t2 = b^2 + c^2 - 2 b c cos mu, so
 *   mu(t2) = acos((b^2 + c^2 - a^2 - d^2 + 2 a d cos t2) / (2 b c)),
 * smallest at t2 = 0 (|A O4| = d - a) and largest at t2 = pi (d + a):
 *   mu = acos((b^2 + c^2 - (d -+ a)^2) / (2 b c)).
 * Here 26.4 and 86.4 degrees: the minimum is below the 40 degree rule of
 * thumb (common practice, no source), a poor linkage but a fine test.
 */
static double law_of_cosines_mu(const fourbar *f, double t2) {
  return acos((f->b * f->b + f->c * f->c - f->a * f->a - f->d * f->d +
               2 * f->a * f->d * cos(t2)) /
              (2 * f->b * f->c));
}

typedef struct {
  const fourbar *f;
  kl_output o;
  int calls, failures;
  double worst;
} mu_check;

static int check_mu(const kl_solver *s, int step, double input, void *user) {
  mu_check *c = user;
  double mu;
  (void)step;
  c->calls++;
  if (kl_output_value(s, &c->o, &mu) != KL_OK) {
    c->failures++;
    return 1;
  }
  c->worst = fmax(c->worst, fabs(mu - law_of_cosines_mu(c->f, input)));
  return 0;
}

START_TEST(transmission_angle_extremes_match_the_law_of_cosines) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  const kl_output mu = transmission(&f);
  const double mu_min = acos((f.b * f.b + f.c * f.c - (f.d - f.a) * (f.d - f.a)) /
                             (2 * f.b * f.c));
  const double mu_max = acos((f.b * f.b + f.c * f.c - (f.d + f.a) * (f.d + f.a)) /
                             (2 * f.b * f.c));
  kl_range r = new_range();
  mu_check c;
  int sense, steps;
  kl_set_link_angle(s, f.coupler, 0.6);
  kl_set_link_angle(s, f.rocker, 1.1);
  /* the value along a turn: the law of cosines at every step */
  memset(&c, 0, sizeof c);
  c.f = &f;
  c.o = mu;
  ck_assert_int_eq(kl_solver_sweep(s, 0, 0.0, 2 * PI, 72, check_mu, &c, NULL), KL_OK);
  ck_assert_int_eq(c.calls, 73);
  ck_assert_int_eq(c.failures, 0);
  ck_assert_msg(c.worst <= CLOSED_FORM_TOL, "worst %.3g", c.worst);
  /* extremes over a turn starting at -1 rad, 37 steps: 0 and pi fall
   * between samples, so the refinement must find them */
  for (sense = 1; sense >= -1; sense -= 2) {
    double from = -1.0 * sense, to = from + sense * 2 * PI;
    ck_assert_int_eq(kl_output_range(s, 0, from, to, 37, &mu, &r), KL_OK);
    ck_assert_int_eq(r.sweep_status, KL_OK);
    ck_assert(isnan(r.limit_input));
    ck_assert_msg(fabs(r.min - mu_min) <= CLOSED_FORM_TOL, "min %.15g vs %.15g",
                  r.min, mu_min);
    ck_assert_msg(fabs(r.max - mu_max) <= CLOSED_FORM_TOL, "max %.15g vs %.15g",
                  r.max, mu_max);
    /* at the collinear positions: the slope's zero, found to about
     * 1e-12 (slope rounding over a curvature of order 0.1); 1e-9 */
    ck_assert_msg(fabs(angle_diff(r.input_at_min, 0.0)) <= 1e-9,
                  "minimum at %.15g", r.input_at_min);
    ck_assert_msg(fabs(angle_diff(r.input_at_max, PI)) <= 1e-9,
                  "maximum at %.15g", r.input_at_max);
    /* left at the end of the sweep */
    ck_assert_double_eq(kl_input_value(s, 0), to);
  }
  /* an even number of steps from 0: both extremes land on samples (0 an
   * end, pi the middle step), where the slope's sign is rounding */
  for (steps = 2; steps <= 100; steps += 2) {
    ck_assert_int_eq(kl_output_range(s, 0, 0.0, 2 * PI, steps, &mu, &r), KL_OK);
    ck_assert_msg(fabs(r.max - mu_max) <= CLOSED_FORM_TOL,
                  "%d steps: max %.15g vs %.15g", steps, r.max, mu_max);
    ck_assert_msg(fabs(r.min - mu_min) <= CLOSED_FORM_TOL,
                  "%d steps: min %.15g vs %.15g", steps, r.min, mu_min);
    ck_assert_msg(fabs(angle_diff(r.input_at_max, PI)) <= 1e-7,
                  "%d steps: maximum at %.15g", steps, r.input_at_max);
  }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 3. Stroke and time ratio of the offset slider-crank
 * ------------------------------------------------------------------------ */

/*
 * Source: the slider-crank's dead centres (standard kinematics). The block's
 * pin B = (x, e) is farthest when crank and rod are in line and extended,
 * B = (l + r)(cos t, sin t): x_max = sqrt((l + r)^2 - e^2) at
 * sin t = e / (l + r), t = asin(e / (l + r)). It is nearest when they are
 * folded with the crank pivot between crank pin and B: A = -r u and
 * B = (l - r) u for the unit vector u toward B, x_min = sqrt((l - r)^2 -
 * e^2), and u's angle is asin(e / (l - r)), so t = pi + asin(e / (l - r)).
 * Stroke x_max - x_min. With the crank turning positively, the block goes
 * out from min to max through A = t_max - t_min + 2 pi = pi + asin(e /
 * (l + r)) - asin(e / (l - r)) of crank angle and back through 2 pi - A:
 * time ratio A / (2 pi - A) (derived here from those angles).
 */
START_TEST(stroke_and_time_ratio_match_the_dead_centres) {
  slider_crank sc = build_slider_crank(30, 100, 12);
  kl_solver *s = kl_solver_new(sc.m);
  const kl_output slide = output(KL_OUTPUT_SLIDE, sc.slide_joint, 0, 0);
  const double r = sc.r, l = sc.l, e = sc.e;
  const double x_max = sqrt((l + r) * (l + r) - e * e);
  const double x_min = sqrt((l - r) * (l - r) - e * e);
  const double t_max = asin(e / (l + r)), t_min = PI + asin(e / (l - r));
  const double out = PI + asin(e / (l + r)) - asin(e / (l - r));
  kl_range range = new_range(), wrong;
  double ratio;
  kl_set_link_angle(s, sc.rod, -0.1);
  kl_set_joint_slide(s, sc.slide_joint, 120.0);
  ck_assert_int_eq(kl_output_range(s, 0, 0.0, 2 * PI, 72, &slide, &range), KL_OK);
  ck_assert_msg(fabs((range.max - range.min) - (x_max - x_min)) <= 1e-9,
                "stroke %.15g, closed form %.15g", range.max - range.min,
                x_max - x_min);
  ck_assert_double_le(fabs(range.max - x_max), 1e-9);
  ck_assert_double_le(fabs(range.min - x_min), 1e-9);
  /* the dead centres, from the slope's zero (curvature of order r) */
  ck_assert_msg(fabs(range.input_at_max - t_max) <= 1e-9, "max at %.15g vs %.15g",
                range.input_at_max, t_max);
  ck_assert_msg(fabs(range.input_at_min - t_min) <= 1e-9, "min at %.15g vs %.15g",
                range.input_at_min, t_min);
  ck_assert_int_eq(kl_range_time_ratio(&range, &ratio), KL_OK);
  ck_assert_msg(fabs(ratio - out / (2 * PI - out)) <= 1e-9,
                "time ratio %.15g, closed form %.15g", ratio,
                out / (2 * PI - out));

  /* the trade's convention: slower stroke over faster, >= 1; with this
   * offset the block returns (max to min) through 2 pi - A > pi, so the
   * return is the slower stroke and the raw ratio above is below 1 */
  {
    double quick, angle;
    int slower;
    ck_assert_double_lt(ratio, 1.0);
    ck_assert_int_eq(kl_range_quick_return(&range, &quick, &slower, &angle),
                     KL_OK);
    ck_assert_msg(fabs(quick - (2 * PI - out) / out) <= 1e-9,
                  "quick return %.15g, closed form %.15g", quick,
                  (2 * PI - out) / out);
    ck_assert_int_eq(slower, KL_STROKE_FALLING);
    ck_assert_double_le(fabs(angle - (2 * PI - out)), 1e-9);
    ck_assert_str_eq(kl_stroke_str(slower), "falling");
    ck_assert_int_eq(kl_range_quick_return(&range, &quick, NULL, NULL), KL_OK);
    ck_assert_int_eq(kl_range_quick_return(&range, NULL, NULL, NULL),
                     KL_EINVAL);
    wrong = range;
    wrong.input_at_max = wrong.input_at_min + PI;
    ck_assert_int_eq(kl_range_quick_return(&wrong, &quick, &slower, NULL),
                     KL_OK);
    ck_assert_int_eq(slower, KL_STROKE_EQUAL);
    ck_assert_double_le(fabs(quick - 1.0), 1e-12);
    wrong.input_at_max = wrong.input_at_min + 4.0;
    ck_assert_int_eq(kl_range_quick_return(&wrong, &quick, &slower, NULL),
                     KL_OK);
    ck_assert_int_eq(slower, KL_STROKE_RISING);
    ck_assert_double_le(fabs(quick - 4.0 / (2 * PI - 4.0)), 1e-12);
  }

  /* bad ranges */
  ratio = -7.0;
  ck_assert_int_eq(kl_range_time_ratio(NULL, &ratio), KL_EINVAL);
  ck_assert_int_eq(kl_range_time_ratio(&range, NULL), KL_EINVAL);
  wrong = range;
  wrong.input_at_max = wrong.input_at_min;
  ck_assert_int_eq(kl_range_time_ratio(&wrong, &ratio), KL_EINVAL);
  wrong.input_at_max = NAN;
  ck_assert_int_eq(kl_range_time_ratio(&wrong, &ratio), KL_ENONFINITE);
  ck_assert_double_eq(ratio, -7.0);
  /* a whole turn apart is equal modulo 2 pi, even when the sum rounds */
  wrong.input_at_max = wrong.input_at_min + 2 * PI;
  ck_assert_msg(kl_range_time_ratio(&wrong, &ratio) == KL_EINVAL,
                "extremes at %.17g and %.17g: ratio %g", wrong.input_at_min,
                wrong.input_at_max, ratio);
  kl_solver_free(s);
  kl_model_free(sc.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 4. A range that meets a motion limit
 * ------------------------------------------------------------------------ */

/*
 * Non-Grashof four-bar (50 + 100 > 70 + 60, geometry chosen for this test).
 * Source, elementary geometry: the crank's limit has coupler and rocker in
 * line, |A O4| = b + c, t2 = acos((a^2 + d^2 - (b + c)^2) / (2 a d)), where
 * the rocker points from O4 at the crank pin A: t4 = atan2(a sin t2,
 * a cos t2 - d). The rocker's smallest angle comes with crank and coupler
 * extended in line, |O2 B| = a + b: d^2 + c^2 + 2 d c cos t4 = (a + b)^2.
 */
START_TEST(range_up_to_a_motion_limit) {
  fourbar f = build_fourbar(70, 50, 60, 100);
  kl_solver *s = kl_solver_new(f.m);
  const kl_output rocker = output(KL_OUTPUT_LINK_ANGLE, f.rocker, 0, 0);
  const double a = f.a, b = f.b, c = f.c, d = f.d;
  const double lim = acos((a * a + d * d - (b + c) * (b + c)) / (2 * a * d));
  const double t4_toggle = atan2(a * sin(lim), a * cos(lim) - d);
  const double t4_min = acos(((a + b) * (a + b) - d * d - c * c) / (2 * d * c));
  kl_range r = new_range();
  kl_set_link_angle(s, f.coupler, -0.2);
  kl_set_link_angle(s, f.rocker, 1.5);
  ck_assert_int_eq(kl_output_range(s, 0, 0.0, PI, 40, &rocker, &r), KL_LIMIT);
  ck_assert_int_eq(r.sweep_status, KL_LIMIT);
  ck_assert_msg(fabs(r.limit_input - lim) <= 1e-9, "limit %.15g vs %.15g",
                r.limit_input, lim);
  ck_assert_msg(fabs(r.min - t4_min) <= CLOSED_FORM_TOL, "min %.15g vs %.15g",
                r.min, t4_min);
  /* the largest reachable angle is at the limit. Near a toggle the output
   * moves as the square root of the input's distance from it (the two
   * branches meet there), so a value taken within 1e-10 of the limit may
   * differ by C sqrt(1e-10) = 1e-5 C, with C of order 1 here */
  ck_assert_msg(fabs(r.max - t4_toggle) <= 1e-4, "max %.15g vs toggle %.15g",
                r.max, t4_toggle);
  ck_assert_double_le(r.max, t4_toggle);
  ck_assert_double_le(fabs(r.input_at_max - lim), 1e-9);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 4b. Many outputs' ranges from one sweep (kl_output_ranges)
 * ------------------------------------------------------------------------ */

/*
 * Source: the law of cosines for the transmission angle's extremes (as in
 * section 2) and the slider-crank's dead centres (section 3); with 37 steps
 * from -1 rad the extremes fall between samples, so the shared refinement
 * must find them.
 */
START_TEST(ranges_from_one_sweep_match_the_closed_forms) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  slider_crank sc = build_slider_crank(30, 100, 12);
  kl_solver *s = kl_solver_new(f.m), *t = kl_solver_new(sc.m);
  kl_output outs[2];
  kl_range r[2];
  const double mu_min = acos((f.b * f.b + f.c * f.c - (f.d - f.a) * (f.d - f.a)) /
                             (2 * f.b * f.c));
  const double mu_max = acos((f.b * f.b + f.c * f.c - (f.d + f.a) * (f.d + f.a)) /
                             (2 * f.b * f.c));
  const double l = sc.l, rr = sc.r, e = sc.e;
  const double x_max = sqrt((l + rr) * (l + rr) - e * e);
  const double x_min = sqrt((l - rr) * (l - rr) - e * e);
  int sense;
  outs[0] = transmission(&f);
  outs[1] = output(KL_OUTPUT_LINK_ANGLE, f.rocker, 0, 0);
  kl_set_link_angle(s, f.coupler, 0.6);
  kl_set_link_angle(s, f.rocker, 1.1);
  for (sense = 1; sense >= -1; sense -= 2) {
    double from = -1.0 * sense, to = from + sense * 2 * PI;
    r[0] = new_range();
    r[1] = new_range();
    ck_assert_int_eq(kl_output_ranges(s, 0, from, to, 37, 2, outs, r), KL_OK);
    ck_assert_int_eq(r[0].sweep_status, KL_OK);
    ck_assert_msg(fabs(r[0].min - mu_min) <= CLOSED_FORM_TOL, "min %.15g vs %.15g",
                  r[0].min, mu_min);
    ck_assert_msg(fabs(r[0].max - mu_max) <= CLOSED_FORM_TOL, "max %.15g vs %.15g",
                  r[0].max, mu_max);
    ck_assert_msg(fabs(angle_diff(r[0].input_at_min, 0.0)) <= 1e-9,
                  "minimum at %.15g", r[0].input_at_min);
    ck_assert_msg(fabs(angle_diff(r[0].input_at_max, PI)) <= 1e-9,
                  "maximum at %.15g", r[0].input_at_max);
    ck_assert_double_eq(kl_input_value(s, 0), to);
  }
  outs[0] = output(KL_OUTPUT_SLIDE, sc.slide_joint, 0, 0);
  r[0] = new_range();
  kl_set_link_angle(t, sc.rod, -0.1);
  kl_set_joint_slide(t, sc.slide_joint, 120.0);
  ck_assert_int_eq(kl_output_ranges(t, 0, 0.0, 2 * PI, 72, 1, outs, r), KL_OK);
  ck_assert_double_le(fabs(r[0].max - x_max), 1e-9);
  ck_assert_double_le(fabs(r[0].min - x_min), 1e-9);
  ck_assert_double_le(fabs(r[0].input_at_max - asin(e / (l + rr))), 1e-9);
  ck_assert_double_le(fabs(r[0].input_at_min - (PI + asin(e / (l - rr)))), 1e-9);
  /* refused: NULL, a size unset, a bad output (nothing moves) */
  ck_assert_int_eq(kl_output_ranges(t, 0, 0.0, 1.0, 4, 1, NULL, r), KL_EINVAL);
  r[0].size = 0;
  ck_assert_int_eq(kl_output_ranges(t, 0, 0.0, 1.0, 4, 1, outs, r), KL_EINVAL);
  r[0] = new_range();
  outs[0].id = 99;
  ck_assert_int_eq(kl_output_ranges(t, 0, 0.0, 1.0, 4, 1, outs, r), KL_EID);
  kl_solver_free(s);
  kl_solver_free(t);
  kl_model_free(f.m);
  kl_model_free(sc.m);
}
END_TEST

/* Every rocker angle and transmission angle of a chain of 12 loops from one
 * sweep agrees with kl_output_range of each alone (whose refinement is
 * checked against closed forms above), in values and where they occur;
 * and a range up to a motion limit (section 4's four-bar) too. */
START_TEST(ranges_from_one_sweep_match_one_range_each) {
  enum { LOOPS = 12 };
  chain c = build_chain(LOOPS);
  fourbar f = build_fourbar(70, 50, 60, 100);
  kl_solver *s = kl_solver_new(c.m), *one = kl_solver_new(c.m);
  kl_solver *lim = kl_solver_new(f.m);
  kl_output outs[3 * LOOPS];
  kl_range r[3 * LOOPS], each = new_range();
  int n = 0, k, sites;
  for (k = 0; k < LOOPS; k++)
    outs[n++] = output(KL_OUTPUT_LINK_ANGLE, c.rockers[k], 0, 0);
  sites = kl_model_transmissions(c.m, outs + n, 2 * LOOPS);
  ck_assert_int_ge(sites, LOOPS);
  n += sites;
  for (k = 0; k < n; k++)
    r[k] = new_range();
  sketch_chain(&c, s, 0.3);
  ck_assert_int_eq(kl_solve_position(s, (const double[]){0.3}), KL_OK);
  ck_assert_int_eq(kl_solver_copy_state(one, s), KL_OK);
  ck_assert_int_eq(kl_output_ranges(s, 0, 0.3, 0.3 + 2 * PI, 90, n, outs, r),
                   KL_OK);
  for (k = 0; k < n; k++) {
    kl_solver *fresh = kl_solver_new(c.m);
    kl_solver_copy_state(fresh, one);
    ck_assert_int_eq(kl_output_range(fresh, 0, 0.3, 0.3 + 2 * PI, 90, &outs[k],
                                     &each),
                     KL_OK);
    ck_assert_msg(fabs(r[k].min - each.min) <= 1e-10 &&
                      fabs(r[k].max - each.max) <= 1e-10,
                  "output %d: %.15g..%.15g vs %.15g..%.15g", k, r[k].min,
                  r[k].max, each.min, each.max);
    ck_assert_msg(fabs(r[k].input_at_min - each.input_at_min) <= 1e-7 &&
                      fabs(r[k].input_at_max - each.input_at_max) <= 1e-7,
                  "output %d: at %.15g, %.15g vs %.15g, %.15g", k,
                  r[k].input_at_min, r[k].input_at_max, each.input_at_min,
                  each.input_at_max);
    kl_solver_free(fresh);
  }
  outs[0] = output(KL_OUTPUT_LINK_ANGLE, f.rocker, 0, 0);
  kl_set_link_angle(lim, f.coupler, -0.2);
  kl_set_link_angle(lim, f.rocker, 1.5);
  r[0] = new_range();
  ck_assert_int_eq(kl_output_ranges(lim, 0, 0.0, PI, 40, 1, outs, r), KL_LIMIT);
  kl_set_link_angle(lim, f.coupler, -0.2);
  kl_set_link_angle(lim, f.rocker, 1.5);
  ck_assert_int_eq(kl_output_range(lim, 0, 0.0, PI, 40, &outs[0], &each),
                   KL_LIMIT);
  ck_assert_double_le(fabs(r[0].min - each.min), 1e-10);
  ck_assert_double_le(fabs(r[0].max - each.max), 1e-10);
  ck_assert_double_le(fabs(r[0].limit_input - each.limit_input), 1e-12);
  kl_solver_free(s);
  kl_solver_free(one);
  kl_solver_free(lim);
  kl_model_free(c.m);
  kl_model_free(f.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 5. Static input effort by virtual work
 * ------------------------------------------------------------------------ */

/*
 * Source: the standard slider-crank statics result, derived here by virtual
 * work. The block's x = r cos t + l cos phi with r sin t + l sin phi = e
 * (phi the rod's absolute angle, counter-clockwise from the slide axis), so
 * phi' = -r cos t / (l cos phi) and
 *   dx/dt = -r sin t - l sin phi phi' = -r sin(t - phi) / cos phi.
 * A force F along +x on the block is held by the crank torque T with
 * T dt + F dx = 0:  T = F r sin(t - phi) / cos phi, counter-clockwise
 * positive. With the rod angle measured the other way, psi = -phi, this is
 * the textbook T = F r sin(t + psi) / cos psi. A force across the slide
 * does no virtual work: the guide takes it.
 */
/* A range that fails inside (here at a parallelogram's change point, a
 * four-bar chosen for this test) leaves the solver exactly as it was: its
 * position, the rates solved at rate 7, and the coefficients. */
START_TEST(failed_range_changes_nothing) {
  fourbar f = build_fourbar(40, 100, 40, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_output o;
  kl_range r;
  snapshot before, after;
  double u = 0.5, w = 7.0, a = 0.0;
  memset(&o, 0, sizeof o);
  o.kind = KL_OUTPUT_LINK_ANGLE;
  o.id = f.rocker;
  r.size = sizeof r;
  kl_set_link_angle(s, f.coupler, 0.02);
  kl_set_link_angle(s, f.rocker, 0.48);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &a), KL_OK);
  ck_assert_int_eq(kl_solve_coefficients(s), KL_OK);
  before = snap(s);
  r.min = r.max = NAN;
  ck_assert_int_eq(kl_output_range(s, 0, 0.3, -0.3, 6, &o, &r),
                   KL_ESINGULAR);
  after = snap(s);
  assert_same_state(&before, &after, "kl_output_range at a change point");
  /* the range swept before the change point is kept, with its location:
   * the parallel branch's output angle equals the input angle (common
   * practice, no source), the change point is at input 0 */
  ck_assert_int_eq(r.sweep_status, KL_ESINGULAR);
  ck_assert_msg(fabs(r.limit_input) <= 1e-9, "change point at %.15g",
                r.limit_input);
  ck_assert_double_le(fabs(r.max - 0.3), 1e-9);
  ck_assert_double_le(fabs(r.input_at_max - 0.3), 1e-12);
  ck_assert_double_le(fabs(r.min - r.input_at_min), 1e-9);
  ck_assert(r.input_at_min >= 0.0 && r.input_at_min < 0.3);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "change point"));
  ck_assert_double_eq(kl_link_rate(s, f.crank), 7.0);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

START_TEST(slider_crank_torque_matches_statics) {
  slider_crank sc = build_slider_crank(30, 100, 12);
  kl_solver *s = kl_solver_new(sc.m);
  const double force = 250.0; /* chosen for this test */
  const double angles[] = {20, 70, 100, 130, 165, 220, 250, 290, 320, 350};
  unsigned k;
  sketch_slider(s, &sc);
  for (k = 0; k < sizeof angles / sizeof angles[0]; k++) {
    double t = angles[k] * DEG, phi, want, effort;
    kl_load along = force_at(sc.block_point, force, 0.0);
    kl_load across = force_at(sc.block_point, 0.0, force);
    ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
    phi = kl_link_angle(s, sc.rod);
    want = force * sc.r * sin(t - phi) / cos(phi);
    ck_assert_int_eq(kl_input_effort(s, 1, &along, &effort), KL_OK);
    ck_assert_msg(rel_diff(effort, want, 1e-3 * force * sc.r) <= CLOSED_FORM_TOL,
                  "crank at %g deg: torque %.15g, closed form %.15g", angles[k],
                  effort, want);
    ck_assert_int_eq(kl_input_effort(s, 1, &across, &effort), KL_OK);
    ck_assert_double_le(fabs(effort), 1e-12 * force * sc.r);
    /* no loads, no effort */
    ck_assert_int_eq(kl_input_effort(s, 0, NULL, &effort), KL_OK);
    ck_assert_double_eq(effort, 0.0);
  }
  kl_solver_free(s);
  kl_model_free(sc.m);
}
END_TEST

/*
 * The extremes of that torque over a turn, at the sweep's steps, against
 * the closed form at the same crank angles: the rod angle from the loop's
 * y component, r sin t + l sin phi = e, on the branch with the block ahead
 * of the crank (cos phi > 0), which the sketch chooses.
 */
START_TEST(slider_crank_torque_range_matches_statics) {
  slider_crank sc = build_slider_crank(30, 100, 12);
  kl_solver *s = kl_solver_new(sc.m);
  const double force = 250.0; /* chosen for this test */
  const int steps = 72;
  kl_load along = force_at(sc.block_point, force, 0.0);
  kl_range r = new_range();
  double lo = HUGE_VAL, hi = -HUGE_VAL, at_lo = NAN, at_hi = NAN, u;
  int k;
  sketch_slider(s, &sc);
  for (k = 0; k <= steps; k++) {
    double t = 2 * PI * k / steps;
    double phi = asin((sc.e - sc.r * sin(t)) / sc.l);
    double want = force * sc.r * sin(t - phi) / cos(phi);
    if (want < lo)
      lo = want, at_lo = t;
    if (want > hi)
      hi = want, at_hi = t;
  }
  ck_assert_int_eq(kl_input_effort_range(s, 0, 0.0, 2 * PI, steps, 1, &along,
                                         0, &r),
                   KL_OK);
  ck_assert_int_eq(r.sweep_status, KL_OK);
  ck_assert(isnan(r.limit_input));
  ck_assert_msg(fabs(r.min - lo) <= CLOSED_FORM_TOL * force * sc.r,
                "min %.15g, closed form %.15g", r.min, lo);
  ck_assert_msg(fabs(r.max - hi) <= CLOSED_FORM_TOL * force * sc.r,
                "max %.15g, closed form %.15g", r.max, hi);
  ck_assert_double_le(fabs(r.input_at_min - at_lo), 1e-12);
  ck_assert_double_le(fabs(r.input_at_max - at_hi), 1e-12);
  /* the solver is left at the end of the sweep */
  u = kl_input_value(s, 0);
  ck_assert_double_eq(u, 2 * PI);
  kl_solver_free(s);
  kl_model_free(sc.m);
}
END_TEST

/*
 * Another input's effort while one input sweeps: the two-input five-bar
 * holding a force at its tip, the right crank's torque while the left one
 * turns. The reference is kl_input_effort (checked against statics above)
 * after each step of a one-step-at-a-time sweep, the same positions.
 */
START_TEST(fivebar_other_input_effort_range) {
  fivebar f = build_fivebar(40, 40, 90, 90, 60);
  kl_solver *s = kl_solver_new(f.m), *ref = kl_solver_new(f.m);
  kl_load tip = force_at(f.tip, 3.0, -20.0);
  const int steps = 20;
  const double from = 80 * DEG, to = 120 * DEG;
  double u[2] = {from, 95 * DEG}, lo = HUGE_VAL, hi = -HUGE_VAL;
  double at_lo = NAN, at_hi = NAN;
  kl_range r = new_range();
  int k;
  kl_set_link_angle(s, f.crank1, from);
  kl_set_link_angle(s, f.crank2, u[1]);
  kl_set_link_angle(s, f.link1, 30 * DEG);
  kl_set_link_angle(s, f.link2, 150 * DEG);
  ck_assert_int_eq(kl_solve_position(s, u), KL_OK);
  kl_solver_copy_state(ref, s);
  for (k = 0; k <= steps; k++) {
    double e[2], at = from + (to - from) * ((double)k / steps);
    double was = from + (to - from) * ((double)(k - 1) / steps);
    ck_assert_int_eq(k == 0 ? kl_solve_position(ref, u)
                            : kl_solver_sweep(ref, 0, was, at, 1, NULL, NULL,
                                              NULL),
                     KL_OK);
    ck_assert_int_eq(kl_input_effort(ref, 1, &tip, e), KL_OK);
    if (e[1] < lo)
      lo = e[1], at_lo = at;
    if (e[1] > hi)
      hi = e[1], at_hi = at;
  }
  ck_assert_int_eq(
      kl_input_effort_range(s, 0, from, to, steps, 1, &tip, 1, &r), KL_OK);
  ck_assert_msg(rel_diff(r.min, lo, 1.0) <= 1e-12, "min %.17g, steps %.17g",
                r.min, lo);
  ck_assert_msg(rel_diff(r.max, hi, 1.0) <= 1e-12, "max %.17g, steps %.17g",
                r.max, hi);
  ck_assert_double_le(fabs(r.input_at_min - at_lo), 1e-12);
  ck_assert_double_le(fabs(r.input_at_max - at_hi), 1e-12);
  ck_assert(lo < hi); /* the torque does change over the range */
  kl_solver_free(s);
  kl_solver_free(ref);
  kl_model_free(f.m);
}
END_TEST

/*
 * A sweep that meets a motion limit (the non-Grashof four-bar of section
 * 4, its limit by elementary geometry) gives the extremes of the part
 * reached, KL_LIMIT and where it stopped; a change point (ground 100,
 * crank 40, coupler 140, rocker 80: s + l = p + q, all four pins in line
 * at crank angle 0) fails, and the failure leaves the state as it was,
 * coefficients included.
 */
START_TEST(effort_range_at_limits_and_failures) {
  fourbar f = build_fourbar(70, 50, 60, 100), cp = build_fourbar(40, 140, 80, 100);
  kl_solver *s = kl_solver_new(f.m), *c = kl_solver_new(cp.m);
  const double lim = acos((f.a * f.a + f.d * f.d - (f.b + f.c) * (f.b + f.c)) /
                          (2 * f.a * f.d));
  kl_load hold = torque_on(f.rocker, 4.0), bad = torque_on(9, 1.0);
  kl_range r = new_range();
  double t3, t4, start = 10 * DEG;
  snapshot before, after;
  int st;
  kl_set_link_angle(s, f.coupler, -0.2);
  kl_set_link_angle(s, f.rocker, 1.5);
  ck_assert_int_eq(kl_input_effort_range(s, 0, 0.0, PI, 40, 1, &hold, 0, &r),
                   KL_LIMIT);
  ck_assert_int_eq(r.sweep_status, KL_LIMIT);
  ck_assert_msg(fabs(r.limit_input - lim) <= 1e-9, "limit %.15g vs %.15g",
                r.limit_input, lim);
  ck_assert_double_le(r.input_at_min, lim);
  ck_assert_double_le(r.input_at_max, lim);
  ck_assert_double_lt(r.min, r.max);
  ck_assert_double_lt(kl_input_value(s, 0), lim);
  /* the change point */
  ck_assert(freudenstein(&cp, start, +1, &t3, &t4));
  kl_set_link_angle(c, cp.coupler, t3);
  kl_set_link_angle(c, cp.rocker, t4);
  ck_assert_int_eq(kl_solve_position(c, &start), KL_OK);
  ck_assert_int_eq(kl_solve_coefficients(c), KL_OK);
  before = snap(c);
  r = new_range();
  r.min = -1.0;
  /* how the sweep fails there depends on the side it comes from (a
   * singular position, or sub-steps that run out): the failure is what
   * this checks */
  st = kl_input_effort_range(c, 0, start, start + 2 * PI, 36, 1, &hold, 0, &r);
  ck_assert_msg(st == KL_ESINGULAR || st == KL_EMAXITER, "status %d", st);
  after = snap(c);
  assert_same_state(&before, &after, "a change point on the way");
  ck_assert_double_eq(r.min, -1.0); /* not written */
  /* refused before sweeping */
  ck_assert_int_eq(kl_input_effort_range(c, 0, 0, 1, 4, 1, &hold, 1, &r),
                   KL_EID);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(c), "input index 1 (0-based)"));
  ck_assert_int_eq(kl_input_effort_range(c, 0, 0, 1, 4, 1, &bad, 0, &r),
                   KL_EID);
  ck_assert_int_eq(kl_input_effort_range(c, 3, 0, 1, 4, 1, &hold, 0, &r),
                   KL_EID);
  ck_assert_int_eq(kl_input_effort_range(c, 0, 0, 1, 0, 1, &hold, 0, &r),
                   KL_EINVAL);
  ck_assert_int_eq(kl_input_effort_range(c, 0, 0, 1, 4, 1, NULL, 0, &r),
                   KL_EINVAL);
  ck_assert_int_eq(kl_input_effort_range(c, 0, 0, 1, 4, 1, &hold, 0, NULL),
                   KL_EINVAL);
  after = snap(c);
  assert_same_state(&before, &after, "refused arguments");
  kl_solver_free(s);
  kl_solver_free(c);
  kl_model_free(f.m);
  kl_model_free(cp.m);
}
END_TEST

/*
 * Common practice, no source: the energy balance by central differences.
 * With the crank at u +- h, the loads' work -(F . (p(u+h) - p(u-h)) +
 * T (theta(u+h) - theta(u-h))) / (2h) approximates the holding torque with
 * truncation h^2 |W'''| / 6 and rounding e / h (W the loads' work, e the
 * error of a solved position, about 1e-14 of the scale 150 times |F| with
 * the tight tolerance). With h = 1e-4: 1.7e-9 |W'''| and 2e-8 |F|, both
 * below 1e-7 of |F| scale + |T| (measured worst: 3.2e-9, Stephenson); the
 * tolerance 1e-6 of that keeps a wide margin, while a missing load or a
 * wrong sign errs by order 1.
 */
#define ENERGY_STEP 1e-4
#define ENERGY_TOL 1e-6

START_TEST(sixbar_effort_matches_the_energy_balance) {
  pin_linkage p = _i == 0 ? watt_sixbar() : stephenson_sixbar();
  kl_model *m = build_sixbar_with_point(&p);
  kl_solver *s = kl_solver_new(m);
  const double fx = 3.0, fy = -7.0, torque = 110.0; /* chosen for this test */
  const double work_scale = hypot(fx, fy) * kl_model_scale(m) + fabs(torque);
  kl_load loads[2];
  int k, l;
  /* the added point, and link 5, pivoted on ground in both six-bars */
  loads[0] = force_at(0, fx, fy);
  loads[1] = torque_on(5, torque);
  tighten(s);
  for (l = 2; l < p.nlinks; l++)
    kl_set_link_angle(s, l, p.sketch[l]);
  for (k = 0; k < 12; k++) {
    double u = k * 30 * DEG, um = u - ENERGY_STEP, up = u + ENERGY_STEP;
    double pm[2], pp[2], thm, thp, balance, effort;
    ck_assert_int_eq(kl_solve_position(s, &um), KL_OK);
    ck_assert_int_eq(kl_point_position(s, 0, pm), KL_OK);
    thm = kl_link_angle(s, 5);
    ck_assert_int_eq(kl_solve_position(s, &up), KL_OK);
    ck_assert_int_eq(kl_point_position(s, 0, pp), KL_OK);
    thp = kl_link_angle(s, 5);
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    balance = -(fx * (pp[0] - pm[0]) + fy * (pp[1] - pm[1]) +
                torque * (thp - thm)) /
              (2 * ENERGY_STEP);
    ck_assert_int_eq(kl_input_effort(s, 2, loads, &effort), KL_OK);
    ck_assert_msg(rel_diff(effort, balance, work_scale) <= ENERGY_TOL,
                  "%s at %d deg: effort %.15g, energy balance %.15g",
                  _i == 0 ? "Watt" : "Stephenson", k * 30, effort, balance);
  }
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 6. Mechanical advantage
 * ------------------------------------------------------------------------ */

/*
 * Source: virtual work for an ideal linkage (standard statics): the input
 * effort T_in holding an output load L satisfies T_in du + L dO = 0, and the
 * output delivers -L, so MA = -L / T_in = 1 / (dO / du). For the four-bar,
 * dO/du is the closed-form velocity ratio d t4 / d t2 = a sin(t2 - t3) /
 * (c sin(t4 - t3)) (test_rates.c); for the slider-crank, dx/dt =
 * -r sin(t - phi) / cos phi (above).
 */
START_TEST(mechanical_advantage_is_the_inverse_velocity_ratio) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  slider_crank sc = build_slider_crank(30, 100, 12);
  kl_solver *s = kl_solver_new(f.m), *ss = kl_solver_new(sc.m);
  const kl_output rocker = output(KL_OUTPUT_LINK_ANGLE, f.rocker, 0, 0);
  const kl_output slide = output(KL_OUTPUT_SLIDE, sc.slide_joint, 0, 0);
  const double load = -35.0; /* chosen for this test */
  int k;
  kl_set_link_angle(s, f.coupler, 0.6);
  kl_set_link_angle(s, f.rocker, 1.1);
  sketch_slider(ss, &sc);
  for (k = 0; k < 12; k++) {
    /* 15, 45, ... degrees: away from the rocker's and the block's rests */
    double u = (30 * k + 15) * DEG, t3, t4, ratio, deriv, ma, effort, phi;
    kl_load on_rocker = torque_on(f.rocker, load);
    kl_load on_block = force_at(sc.block_point, load, 0.0);
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    t3 = kl_link_angle(s, f.coupler);
    t4 = kl_link_angle(s, f.rocker);
    ratio = f.a * sin(u - t3) / (f.c * sin(t4 - t3));
    ck_assert_int_eq(kl_output_deriv(s, &rocker, 0, &deriv), KL_OK);
    ck_assert_double_le(rel_diff(deriv, ratio, 1e-3), CLOSED_FORM_TOL);
    ck_assert_int_eq(kl_output_mechanical_advantage(s, &rocker, 0, &ma), KL_OK);
    ck_assert_double_le(rel_diff(ma, 1.0 / ratio, 1.0), CLOSED_FORM_TOL);
    ck_assert_int_eq(kl_input_effort(s, 1, &on_rocker, &effort), KL_OK);
    ck_assert_msg(rel_diff(ma, -load / effort, 1.0) <= 1e-12,
                  "four-bar at %d deg: MA %.15g, effort ratio %.15g",
                  30 * k + 15, ma, -load / effort);

    ck_assert_int_eq(kl_solve_position(ss, &u), KL_OK);
    phi = kl_link_angle(ss, sc.rod);
    ratio = -sc.r * sin(u - phi) / cos(phi);
    ck_assert_int_eq(kl_output_mechanical_advantage(ss, &slide, 0, &ma), KL_OK);
    ck_assert_double_le(rel_diff(ma, 1.0 / ratio, 1.0 / sc.r), CLOSED_FORM_TOL);
    ck_assert_int_eq(kl_input_effort(ss, 1, &on_block, &effort), KL_OK);
    ck_assert_msg(rel_diff(ma, -load / effort, 1.0 / sc.r) <= 1e-12,
                  "slider-crank at %d deg: MA %.15g, effort ratio %.15g",
                  30 * k + 15, ma, -load / effort);
  }
  kl_solver_free(s);
  kl_solver_free(ss);
  kl_model_free(f.m);
  kl_model_free(sc.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 7. Dimensional sensitivities against perturbed models
 * ------------------------------------------------------------------------ */

/*
 * A copy of model `src`, read back through the public getters, with one
 * coordinate of one attachment or point moved by `delta`; finalized.
 */
static kl_model *rebuild_moved(const kl_model *src, const kl_dimension *dim,
                               double delta) {
  kl_model *m = kl_model_new();
  int l, j, p, i;
  for (l = 1; l < kl_model_link_count(src); l++)
    ck_assert_int_eq(kl_add_link(m, kl_model_link_name(src, l)), l);
  for (j = 0; j < kl_model_joint_count(src); j++) {
    int links[2], kind = kl_model_joint_kind(src, j), id;
    double at[2][2];
    ck_assert_int_eq(kl_model_joint_links(src, j, links, at[0], at[1]), KL_OK);
    if (dim->kind != KL_DIMENSION_POINT && dim->id == j)
      at[dim->kind == KL_DIMENSION_JOINT_A ? 0 : 1][dim->axis] += delta;
    if (kind == KL_JOINT_REVOLUTE)
      id = kl_add_revolute(m, links[0], at[0][0], at[0][1], links[1], at[1][0],
                           at[1][1]);
    else if (kind == KL_JOINT_PRISMATIC)
      id = kl_add_prismatic(m, links[0], at[0][0], at[0][1],
                            kl_model_joint_axis(src, j), links[1], at[1][0], at[1][1]);
    else
      id = kl_add_slot(m, links[0], at[0][0], at[0][1], kl_model_joint_axis(src, j),
                       links[1], at[1][0], at[1][1]);
    ck_assert_int_eq(id, j);
  }
  for (p = 0; p < kl_model_point_count(src); p++) {
    double xy[2];
    int link = kl_model_point_link(src, p, xy);
    if (dim->kind == KL_DIMENSION_POINT && dim->id == p)
      xy[dim->axis] += delta;
    ck_assert_int_eq(kl_add_point(m, link, xy[0], xy[1], kl_model_point_name(src, p)),
                     p);
  }
  for (i = 0; i < kl_model_input_count(src); i++)
    ck_assert_int_eq(kl_add_input(m, kl_model_input_joint(src, i)), i);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  return m;
}

/* Solves model m at the inputs of `from`, starting from from's state. */
static kl_solver *solve_like(const kl_model *m, const kl_solver *from) {
  kl_solver *s = kl_solver_new(m);
  const kl_model *fm = kl_solver_model(from);
  double u[4];
  int l, j, i;
  ck_assert_ptr_nonnull(s);
  tighten(s);
  for (l = 1; l < kl_model_link_count(fm); l++)
    ck_assert_int_eq(kl_set_link_angle(s, l, kl_link_angle(from, l)), KL_OK);
  for (j = 0; j < kl_model_joint_count(fm); j++)
    if (kl_model_joint_kind(fm, j) != KL_JOINT_REVOLUTE)
      ck_assert_int_eq(kl_set_joint_slide(s, j, kl_joint_slide(from, j)), KL_OK);
  for (i = 0; i < kl_model_input_count(fm); i++)
    u[i] = kl_input_value(from, i);
  ck_assert_int_eq(kl_solve_position(s, u), KL_OK);
  return s;
}

/*
 * Common practice, no source: central differences over the moved
 * coordinate, (v(+h) - v(-h)) / 2h, with h = 1e-3 length units (1e-5 of the
 * scales here). Truncation h^2 |v'''| / 6: an angle's third derivative in a
 * length is of order 1 / scale^3, a length's 1 / scale^2, so below 1e-10 of
 * the derivative's size. Rounding: positions solved to 1e-14 of the scale
 * (about 1e-12 length units, 1e-14 rad) give 1e-9 length / length and
 * 1e-11 rad / length. Sensitivities are compared relative to their own
 * size, or to 1 (lengths) and 1 / scale (angles) when smaller (measured
 * worst over the three mechanisms: 5e-10); 1e-6 leaves a wide margin over
 * both, while a missing term errs by order 1.
 */
#define DIM_STEP 1e-3
#define DIM_TOL 1e-6

static int output_is_length(const kl_output *o) {
  return o->kind == KL_OUTPUT_SLIDE || o->kind == KL_OUTPUT_POINT_X ||
         o->kind == KL_OUTPUT_POINT_Y;
}

/* Every attachment coordinate of every joint and every point's own. */
static int all_dimensions(const kl_model *m, kl_dimension *dims, int cap) {
  int n = 0, j, p, side, axis;
  for (j = 0; j < kl_model_joint_count(m); j++)
    for (side = 0; side < 2; side++)
      for (axis = 0; axis < 2; axis++) {
        ck_assert_int_lt(n, cap);
        dims[n].kind = side == 0 ? KL_DIMENSION_JOINT_A : KL_DIMENSION_JOINT_B;
        dims[n].id = j;
        dims[n].axis = axis;
        n++;
      }
  for (p = 0; p < kl_model_point_count(m); p++)
    for (axis = 0; axis < 2; axis++) {
      ck_assert_int_lt(n, cap);
      dims[n].kind = KL_DIMENSION_POINT;
      dims[n].id = p;
      dims[n].axis = axis;
      n++;
    }
  return n;
}

#define MAX_DIMS 24

/* Checks every output against every dimension at the solver's position. */
static void expect_sensitivities(kl_solver *s, const char *name,
                                 const kl_output *outs, int nouts) {
  const kl_model *m = kl_solver_model(s);
  const double scale = kl_model_scale(m);
  kl_dimension dims[MAX_DIMS];
  int nd = all_dimensions(m, dims, MAX_DIMS), d, o;
  for (d = 0; d < nd; d++) {
    kl_model *mp = rebuild_moved(m, &dims[d], DIM_STEP);
    kl_model *mm = rebuild_moved(m, &dims[d], -DIM_STEP);
    kl_solver *sp = solve_like(mp, s), *sm = solve_like(mm, s);
    for (o = 0; o < nouts; o++) {
      double vp, vm, got, fd, floor;
      ck_assert_int_eq(kl_output_value(sp, &outs[o], &vp), KL_OK);
      ck_assert_int_eq(kl_output_value(sm, &outs[o], &vm), KL_OK);
      fd = (vp - vm) / (2 * DIM_STEP);
      floor = output_is_length(&outs[o]) ? 1.0 : 1.0 / scale;
      ck_assert_int_eq(kl_output_sensitivity(s, &outs[o], &dims[d], &got), KL_OK);
      ck_assert_msg(rel_diff(got, fd, floor) <= DIM_TOL,
                    "%s at u = %g: output %d (kind %d) against dimension "
                    "(kind %d, id %d, axis %d): %.12g, difference %.12g",
                    name, kl_input_value(s, 0), o, outs[o].kind, dims[d].kind,
                    dims[d].id, dims[d].axis, got, fd);
    }
    kl_solver_free(sp);
    kl_solver_free(sm);
    kl_model_free(mp);
    kl_model_free(mm);
  }
}

START_TEST(fourbar_sensitivities_match_perturbed_models) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_output outs[6];
  const double angles[] = {0.4, 2.1, 4.4};
  unsigned k;
  outs[0] = output(KL_OUTPUT_LINK_ANGLE, f.rocker, 0, 0);
  outs[1] = output(KL_OUTPUT_LINK_ANGLE, f.coupler, 0, 0);
  outs[2] = output(KL_OUTPUT_POINT_X, f.coupler_point, 0, 0);
  outs[3] = output(KL_OUTPUT_POINT_Y, f.coupler_point, 0, 0);
  outs[4] = transmission(&f);
  outs[5] = output(KL_OUTPUT_JOINT_ANGLE, f.rocker_pin, 0, 0);
  tighten(s);
  kl_set_link_angle(s, f.coupler, 0.6);
  kl_set_link_angle(s, f.rocker, 1.1);
  for (k = 0; k < sizeof angles / sizeof angles[0]; k++) {
    double u = angles[k];
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    expect_sensitivities(s, "four-bar", outs, 6);
  }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* The prismatic joint's attachments included: moving the ground point of
 * the slide line (JOINT_A) or the block's point on it (JOINT_B). */
START_TEST(slider_crank_sensitivities_match_perturbed_models) {
  slider_crank sc = build_slider_crank(30, 100, 12);
  kl_solver *s = kl_solver_new(sc.m);
  kl_output outs[6];
  const double angles[] = {0.7, 2.5, 4.0};
  unsigned k;
  outs[0] = output(KL_OUTPUT_SLIDE, sc.slide_joint, 0, 0);
  outs[1] = output(KL_OUTPUT_LINK_ANGLE, sc.rod, 0, 0);
  outs[2] = output(KL_OUTPUT_POINT_X, sc.rod_point, 0, 0);
  outs[3] = output(KL_OUTPUT_POINT_Y, sc.rod_point, 0, 0);
  outs[4] = output(KL_OUTPUT_POINT_X, sc.block_point, 0, 0);
  /* the angle between crank and rod at the crank pin */
  outs[5] = output(KL_OUTPUT_TRANSMISSION, sc.crank_pin, sc.pivot, sc.block_pin);
  tighten(s);
  sketch_slider(s, &sc);
  for (k = 0; k < sizeof angles / sizeof angles[0]; k++) {
    double u = angles[k];
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    expect_sensitivities(s, "slider-crank", outs, 6);
  }
  kl_solver_free(s);
  kl_model_free(sc.m);
}
END_TEST

START_TEST(inverted_slider_crank_sensitivities_match_perturbed_models) {
  inverted_slider_crank is = build_inverted_slider_crank(35, 90);
  kl_solver *s = kl_solver_new(is.m);
  kl_output outs[3];
  const double angles[] = {0.5, 1.9, 3.8};
  unsigned k;
  outs[0] = output(KL_OUTPUT_LINK_ANGLE, is.guide, 0, 0);
  outs[1] = output(KL_OUTPUT_SLIDE, is.slide_joint, 0, 0);
  outs[2] = output(KL_OUTPUT_LINK_ANGLE, is.block, 0, 0);
  tighten(s);
  kl_set_link_angle(s, is.guide, PI - 0.2);
  kl_set_joint_slide(s, is.slide_joint, 50.0);
  for (k = 0; k < sizeof angles / sizeof angles[0]; k++) {
    double u = angles[k];
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    expect_sensitivities(s, "inverted slider-crank", outs, 3);
  }
  kl_solver_free(s);
  kl_model_free(is.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 8. Tolerance stack-up
 * ------------------------------------------------------------------------ */

/* Source: first-order stack-up (standard tolerance analysis): worst case
 * sum |d_k| t_k, root-sum-square sqrt(sum (d_k t_k)^2), d_k the
 * sensitivities. The same sensitivities summed here: only the rounding of
 * the sums may differ (1e-14 relative). */
START_TEST(tolerance_stack_sums_the_sensitivities) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  const kl_output mu = transmission(&f);
  kl_dimension dims[5];
  const double tol[5] = {0.05, 0.02, 0.1, 0.01, 0.03}; /* chosen for this test */
  double worst = 0, squares = 0, got_worst, got_rss, u = 1.2, keep_w, keep_r;
  double bad_tol[5];
  int k;
  snapshot before, after;
  dims[0].kind = KL_DIMENSION_JOINT_B, dims[0].id = f.pivot, dims[0].axis = 0;
  dims[1].kind = KL_DIMENSION_JOINT_A, dims[1].id = f.crank_pin, dims[1].axis = 0;
  dims[2].kind = KL_DIMENSION_JOINT_A, dims[2].id = f.rocker_pin, dims[2].axis = 1;
  dims[3].kind = KL_DIMENSION_JOINT_B, dims[3].id = f.rocker_pivot, dims[3].axis = 0;
  dims[4].kind = KL_DIMENSION_POINT, dims[4].id = f.coupler_point, dims[4].axis = 1;
  kl_set_link_angle(s, f.coupler, 0.6);
  kl_set_link_angle(s, f.rocker, 1.1);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  for (k = 0; k < 5; k++) {
    double d;
    ck_assert_int_eq(kl_output_sensitivity(s, &mu, &dims[k], &d), KL_OK);
    worst += fabs(d) * tol[k];
    squares += (d * tol[k]) * (d * tol[k]);
  }
  ck_assert_double_gt(worst, 0.0);
  ck_assert_int_eq(kl_output_tolerance_stack(s, &mu, 5, dims, tol, &got_worst, &got_rss),
                   KL_OK);
  ck_assert_double_le(rel_diff(got_worst, worst, 0.0), 1e-14);
  ck_assert_double_le(rel_diff(got_rss, sqrt(squares), 0.0), 1e-14);
  /* either result may be left out; none at all is zero */
  ck_assert_int_eq(kl_output_tolerance_stack(s, &mu, 5, dims, tol, NULL, &got_rss), KL_OK);
  ck_assert_int_eq(kl_output_tolerance_stack(s, &mu, 5, dims, tol, &got_worst, NULL), KL_OK);
  ck_assert_int_eq(kl_output_tolerance_stack(s, &mu, 0, NULL, NULL, &got_worst, &got_rss),
                   KL_OK);
  ck_assert_double_eq(got_worst, 0.0);
  ck_assert_double_eq(got_rss, 0.0);

  /* bad tolerances: rejected, results untouched, state unchanged */
  before = snap(s);
  for (k = 0; k < 4; k++) {
    const double bad[4] = {-0.01, NAN, INFINITY, -INFINITY};
    const int status[4] = {KL_EINVAL, KL_ENONFINITE, KL_ENONFINITE,
                           KL_ENONFINITE};
    memcpy(bad_tol, tol, sizeof tol);
    bad_tol[3] = bad[k];
    keep_w = got_worst = -1.0;
    keep_r = got_rss = -2.0;
    ck_assert_int_eq(kl_output_tolerance_stack(s, &mu, 5, dims, bad_tol, &got_worst,
                                        &got_rss),
                     status[k]);
    ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "tolerance index 3 (0-based)"));
    ck_assert_double_eq(got_worst, keep_w);
    ck_assert_double_eq(got_rss, keep_r);
    after = snap(s);
    assert_same_state(&before, &after, "a refused tolerance stack");
  }
  ck_assert_int_eq(kl_output_tolerance_stack(s, &mu, -1, dims, tol, &got_worst, &got_rss),
                   KL_EINVAL);
  ck_assert_int_eq(kl_output_tolerance_stack(s, &mu, 2, NULL, tol, &got_worst, &got_rss),
                   KL_EINVAL);
  ck_assert_int_eq(kl_output_tolerance_stack(s, &mu, 2, dims, NULL, &got_worst, &got_rss),
                   KL_EINVAL);
  ck_assert_int_eq(kl_output_tolerance_stack(NULL, &mu, 2, dims, tol, &got_worst, &got_rss),
                   KL_EINVAL);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 9. Bad arguments: status, message, and nothing changed
 * ------------------------------------------------------------------------ */

typedef struct {
  kl_output o;
  int status;
  const char *names; /* what the message must name */
} bad_output;

/* Runs every solver call that takes an output with `bad` and checks the
 * status, the message and that the state stayed as it was. */
static void expect_output_refused(kl_solver *s, const bad_output *bad,
                                  const char *label) {
  kl_dimension dim = {KL_DIMENSION_JOINT_A, 1, 0};
  const double tol = 0.01;
  double v = -5.0, w = -6.0;
  kl_range r = new_range();
  snapshot before = snap(s), after;
  int st, call;
  st = kl_output_value(s, &bad->o, &v);
  ck_assert_msg(st == bad->status, "%s, output value: status %d, expected %d",
                label, st, bad->status);
  for (call = 0; call < 5; call++) {
    switch (call) {
    case 0:
      st = kl_output_deriv(s, &bad->o, 0, &v);
      break;
    case 1:
      st = kl_output_mechanical_advantage(s, &bad->o, 0, &v);
      break;
    case 2:
      st = kl_output_sensitivity(s, &bad->o, &dim, &v);
      break;
    case 3:
      st = kl_output_tolerance_stack(s, &bad->o, 1, &dim, &tol, &v, &w);
      break;
    default:
      st = kl_output_range(s, 0, 0.0, 1.0, 4, &bad->o, &r);
      break;
    }
    ck_assert_msg(st == bad->status, "%s, call %d: status %d, expected %d",
                  label, call, st, bad->status);
    ck_assert_msg(strstr(kl_solver_error(s), bad->names) != NULL,
                  "%s, call %d: message '%s' does not name '%s'", label, call,
                  kl_solver_error(s), bad->names);
    after = snap(s);
    assert_same_state(&before, &after, label);
  }
  ck_assert_double_eq(v, -5.0);
  ck_assert_double_eq(w, -6.0);
}

/* A four-bar solved at u = 0.8 with rates, accelerations and coefficients,
 * so that every part of the state can be compared. */
static kl_solver *solved_fourbar(const fourbar *f) {
  kl_solver *s = kl_solver_new(f->m);
  double u = 0.8, w = 1.3, al = -0.4;
  kl_set_link_angle(s, f->coupler, 0.6);
  kl_set_link_angle(s, f->rocker, 1.1);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &al), KL_OK);
  ck_assert_int_eq(kl_solve_coefficients(s), KL_OK);
  return s;
}

START_TEST(bad_outputs_are_refused) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  slider_crank sc = build_slider_crank(30, 100, 12);
  kl_solver *s = solved_fourbar(&f), *ss = kl_solver_new(sc.m);
  const bad_output bad[] = {
      {{KL_OUTPUT_LINK_ANGLE, 9, 0, 0}, KL_EID, "link index 9 (0-based)"},
      {{KL_OUTPUT_LINK_ANGLE, -1, 0, 0}, KL_EID, "link index -1 (0-based)"},
      {{KL_OUTPUT_SLIDE, 9, 0, 0}, KL_EID, "joint index 9 (0-based)"},
      {{KL_OUTPUT_JOINT_ANGLE, 9, 0, 0}, KL_EID, "joint index 9 (0-based)"},
      {{KL_OUTPUT_POINT_X, 3, 0, 0}, KL_EID, "point index 3 (0-based)"},
      {{KL_OUTPUT_POINT_Y, -2, 0, 0}, KL_EID, "point index -2 (0-based)"},
      {{KL_OUTPUT_TRANSMISSION, 9, 1, 3}, KL_EID, "joint index 9 (0-based)"},
      /* a slide of a revolute joint */
      {{KL_OUTPUT_SLIDE, 0, 0, 0}, KL_EKIND, "joint @0"},
      /* lines not on the joint's links: joint 3 is not on the coupler
       * (link a of joint 2), joint 1 not on the rocker (its link b) */
      {{KL_OUTPUT_TRANSMISSION, 2, 3, 3}, KL_EKIND, "line_a (joint @3)"},
      {{KL_OUTPUT_TRANSMISSION, 2, 1, 1}, KL_EKIND, "line_b (joint @1)"},
      /* a line from the joint to itself */
      {{KL_OUTPUT_TRANSMISSION, 2, 2, 3}, KL_EKIND, "line_a (joint @2)"},
      {{KL_OUTPUT_LINK_ANGLE + 42, 1, 0, 0}, KL_EINVAL, "kind 42"},
  };
  /* unknown joints as the lines of a transmission angle are unknown ids
   * (kinloop.h: KL_EID for unknown ids, KL_EKIND for lines that exist but
   * are not on the joint's links) */
  const bad_output unknown_lines[] = {
      {{KL_OUTPUT_TRANSMISSION, 2, 9, 3}, KL_EID, "joint index 9 (0-based)"},
      {{KL_OUTPUT_TRANSMISSION, 2, 1, -4}, KL_EID, "joint index -4 (0-based)"},
  };
  unsigned k;
  char label[64];
  /* the builder's joint ids the table assumes */
  ck_assert_int_eq(f.pivot, 0);
  ck_assert_int_eq(f.crank_pin, 1);
  ck_assert_int_eq(f.rocker_pin, 2);
  ck_assert_int_eq(f.rocker_pivot, 3);
  for (k = 0; k < sizeof bad / sizeof bad[0]; k++) {
    sprintf(label, "bad output %u", k);
    expect_output_refused(s, &bad[k], label);
  }
  /* a transmission angle at a prismatic joint */
  {
    bad_output at_slider = {{KL_OUTPUT_TRANSMISSION, 0, 0, 0}, KL_EKIND, ""};
    double u = 1.0;
    at_slider.o.id = sc.slide_joint;
    at_slider.o.line_a = sc.block_pin;
    at_slider.o.line_b = sc.block_pin;
    at_slider.names = "joint @3";
    sketch_slider(ss, &sc);
    ck_assert_int_eq(kl_solve_position(ss, &u), KL_OK);
    expect_output_refused(ss, &at_slider, "transmission at a slider");
  }
  {
    double v;
    snapshot before = snap(s), after;
    ck_assert_int_eq(kl_output_value(s, NULL, &v), KL_EINVAL);
    ck_assert_int_eq(kl_output_value(NULL, &bad[0].o, &v), KL_EINVAL);
    ck_assert_int_eq(kl_output_deriv(s, NULL, 0, &v), KL_EINVAL);
    ck_assert_int_eq(kl_output_sensitivity(s, NULL, NULL, &v), KL_EINVAL);
    /* an unknown input */
    {
      kl_output rocker = output(KL_OUTPUT_LINK_ANGLE, f.rocker, 0, 0);
      ck_assert_int_eq(kl_output_deriv(s, &rocker, 1, &v), KL_EID);
      ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "input index 1 (0-based)"));
      ck_assert_int_eq(kl_output_mechanical_advantage(s, &rocker, -1, &v), KL_EID);
      ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "input index -1 (0-based)"));
      ck_assert_int_eq(kl_output_deriv(s, &rocker, 0, NULL), KL_EINVAL);
    }
    after = snap(s);
    assert_same_state(&before, &after, "NULL arguments");
  }
  for (k = 0; k < sizeof unknown_lines / sizeof unknown_lines[0]; k++) {
    sprintf(label, "unknown line %u", k);
    expect_output_refused(s, &unknown_lines[k], label);
  }
  kl_solver_free(s);
  kl_solver_free(ss);
  kl_model_free(f.m);
  kl_model_free(sc.m);
}
END_TEST

START_TEST(bad_dimensions_are_refused) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = solved_fourbar(&f), *fresh = kl_solver_new(f.m);
  const kl_output mu = transmission(&f);
  static const struct {
    kl_dimension d;
    int status;
    const char *names;
  } bad[] = {
      {{KL_DIMENSION_POINT + 5, 1, 0}, KL_EINVAL, "kind 7"},
      {{KL_DIMENSION_JOINT_A, 1, 2}, KL_EINVAL, "axis 2"},
      {{KL_DIMENSION_JOINT_B, 1, -1}, KL_EINVAL, "axis -1"},
      {{KL_DIMENSION_JOINT_B, 9, 0}, KL_EID, "joint index 9 (0-based)"},
      {{KL_DIMENSION_JOINT_A, -1, 0}, KL_EID, "joint index -1 (0-based)"},
      {{KL_DIMENSION_POINT, 4, 1}, KL_EID, "point index 4 (0-based)"},
  };
  const double tol = 0.02;
  unsigned k;
  snapshot before = snap(s), after;
  for (k = 0; k < sizeof bad / sizeof bad[0]; k++) {
    double v = -5.0, w = -6.0;
    ck_assert_int_eq(kl_output_sensitivity(s, &mu, &bad[k].d, &v), bad[k].status);
    ck_assert_msg(strstr(kl_solver_error(s), bad[k].names) != NULL,
                  "dimension %u: message '%s' does not name '%s'", k,
                  kl_solver_error(s), bad[k].names);
    ck_assert_int_eq(kl_output_tolerance_stack(s, &mu, 1, &bad[k].d, &tol, &v, &w),
                     bad[k].status);
    ck_assert_ptr_nonnull(strstr(kl_solver_error(s), bad[k].names));
    ck_assert_double_eq(v, -5.0);
    ck_assert_double_eq(w, -6.0);
    after = snap(s);
    assert_same_state(&before, &after, "a refused dimension");
  }
  {
    double v;
    ck_assert_int_eq(kl_output_sensitivity(s, &mu, NULL, &v), KL_EINVAL);
    ck_assert_int_eq(kl_output_sensitivity(s, &mu, &bad[0].d, NULL), KL_EINVAL);
    /* no position solved yet */
    ck_assert_int_eq(kl_output_sensitivity(fresh, &mu, &bad[1].d, &v), KL_ESTAGE);
  }
  after = snap(s);
  assert_same_state(&before, &after, "NULL dimensions");
  kl_solver_free(s);
  kl_solver_free(fresh);
  kl_model_free(f.m);
}
END_TEST

START_TEST(bad_loads_are_refused) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = solved_fourbar(&f);
  static const struct {
    kl_load l;
    int status;
    const char *names;
  } bad[] = {
      {{KL_LOAD_TORQUE + 2, 1, 0, 0, 1}, KL_EKIND, "kind 3"},
      {{KL_LOAD_FORCE, 7, 1, 0, 0}, KL_EID, "point index 7 (0-based)"},
      {{KL_LOAD_FORCE, -1, 1, 0, 0}, KL_EID, "point index -1 (0-based)"},
      {{KL_LOAD_TORQUE, 9, 0, 0, 1}, KL_EID, "link index 9 (0-based)"},
      {{KL_LOAD_FORCE, 0, NAN, 0, 0}, KL_ENONFINITE, "point 'coupler'"},
      {{KL_LOAD_FORCE, 0, 0, INFINITY, 0}, KL_ENONFINITE, "point 'coupler'"},
      {{KL_LOAD_TORQUE, 3, 0, 0, NAN}, KL_ENONFINITE, "link 'rocker'"},
  };
  unsigned k;
  snapshot before = snap(s), after;
  for (k = 0; k < sizeof bad / sizeof bad[0]; k++) {
    /* the bad load second, after a good one: the message names its index */
    kl_load loads[2];
    double effort = -5.0;
    loads[0] = torque_on(f.rocker, 2.0);
    loads[1] = bad[k].l;
    ck_assert_int_eq(kl_input_effort(s, 2, loads, &effort), bad[k].status);
    ck_assert_msg(strstr(kl_solver_error(s), "load index 1 (0-based)") != NULL &&
                      strstr(kl_solver_error(s), bad[k].names) != NULL,
                  "load %u: message '%s' does not name load index 1 and '%s'", k,
                  kl_solver_error(s), bad[k].names);
    ck_assert_double_eq(effort, -5.0);
    after = snap(s);
    assert_same_state(&before, &after, "a refused load");
  }
  {
    kl_load good = torque_on(f.rocker, 2.0);
    double effort = -5.0;
    ck_assert_int_eq(kl_input_effort(s, -1, &good, &effort), KL_EINVAL);
    ck_assert_int_eq(kl_input_effort(s, 1, NULL, &effort), KL_EINVAL);
    ck_assert_int_eq(kl_input_effort(s, 1, &good, NULL), KL_EINVAL);
    ck_assert_int_eq(kl_input_effort(NULL, 1, &good, &effort), KL_EINVAL);
    ck_assert_double_eq(effort, -5.0);
  }
  after = snap(s);
  assert_same_state(&before, &after, "NULL loads");
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("metrics");
  TCase *tc = tcase_create("metrics");
  tcase_set_timeout(tc, 120);
  tcase_add_test(tc, grashof_classes_from_lengths);
  tcase_add_test(tc, grashof_rejects_bad_lengths);
  tcase_add_test(tc, model_grashof_of_each_class);
  tcase_add_test(tc, transmission_angle_extremes_match_the_law_of_cosines);
  tcase_add_test(tc, stroke_and_time_ratio_match_the_dead_centres);
  tcase_add_test(tc, range_up_to_a_motion_limit);
  tcase_add_test(tc, ranges_from_one_sweep_match_the_closed_forms);
  tcase_add_test(tc, ranges_from_one_sweep_match_one_range_each);
  tcase_add_test(tc, failed_range_changes_nothing);
  tcase_add_test(tc, slider_crank_torque_matches_statics);
  tcase_add_test(tc, slider_crank_torque_range_matches_statics);
  tcase_add_test(tc, fivebar_other_input_effort_range);
  tcase_add_test(tc, effort_range_at_limits_and_failures);
  tcase_add_loop_test(tc, sixbar_effort_matches_the_energy_balance, 0, 2);
  tcase_add_test(tc, mechanical_advantage_is_the_inverse_velocity_ratio);
  tcase_add_test(tc, fourbar_sensitivities_match_perturbed_models);
  tcase_add_test(tc, slider_crank_sensitivities_match_perturbed_models);
  tcase_add_test(tc, inverted_slider_crank_sensitivities_match_perturbed_models);
  tcase_add_test(tc, tolerance_stack_sums_the_sensitivities);
  tcase_add_test(tc, bad_outputs_are_refused);
  tcase_add_test(tc, bad_dimensions_are_refused);
  tcase_add_test(tc, bad_loads_are_refused);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
