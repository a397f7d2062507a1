/*
 * test_rates.c - the velocity, acceleration and jerk stages and the
 * kinematic coefficients against closed forms, finite differences of the
 * position stage and superposition; stage order, bad rates, and no
 * allocation.
 */
#include <check.h>
#include <math.h>
#include <string.h>

#include "suite.h"
#include "support.h"

#define DEG (PI / 180.0)

/* ---- reading every result of one stage ---- */

enum stage { POSITION, VELOCITY, ACCELERATION, JERK, NSTAGES };

static double (*const link_getter[NSTAGES])(const kl_solver *, int) = {
    kl_link_angle, kl_link_rate, kl_link_accel, kl_link_jerk};
static double (*const slide_getter[NSTAGES])(const kl_solver *, int) = {
    kl_joint_slide, kl_joint_slide_rate, kl_joint_slide_accel,
    kl_joint_slide_jerk};
static int (*const point_getter[NSTAGES])(const kl_solver *, int, double *) = {
    kl_point_position, kl_point_velocity, kl_point_acceleration,
    kl_point_jerk};

/* What the getters of one stage hand out, in a fixed order: links 1..,
 * the slides of the sliding joints, then x and y of each point. `unit` is
 * the size below which an entry is compared absolutely: 1 for angles, the
 * model's length scale for lengths. */
#define MAX_READ 48
typedef struct {
  double v[MAX_READ], unit[MAX_READ];
  int is_angle[MAX_READ];
  int n;
} readout;

static void put(readout *r, double v, double unit, int is_angle) {
  ck_assert_int_lt(r->n, MAX_READ);
  r->v[r->n] = v;
  r->unit[r->n] = unit;
  r->is_angle[r->n] = is_angle;
  r->n++;
}

static readout read_stage(const kl_solver *s, enum stage st) {
  const kl_model *m = kl_solver_model(s);
  double scale = kl_model_scale(m);
  readout r;
  int l, j, p;
  r.n = 0;
  for (l = 1; l < kl_model_link_count(m); l++)
    put(&r, link_getter[st](s, l), 1.0, st == POSITION);
  for (j = 0; j < kl_model_joint_count(m); j++)
    if (kl_model_joint_kind(m, j) != KL_JOINT_REVOLUTE)
      put(&r, slide_getter[st](s, j), scale, 0);
  for (p = 0; p < kl_model_point_count(m); p++) {
    double xy[2] = {NAN, NAN};
    int status = point_getter[st](s, p, xy);
    put(&r, status == KL_OK ? xy[0] : NAN, scale, 0);
    put(&r, status == KL_OK ? xy[1] : NAN, scale, 0);
  }
  return r;
}

/* Bit-for-bit equality of two readouts (NaN equals NaN). */
static void assert_same_readout(const readout *a, const readout *b,
                                const char *what) {
  ck_assert_int_eq(a->n, b->n);
  ck_assert_msg(memcmp(a->v, b->v, (size_t)a->n * sizeof(double)) == 0,
                "%s changed", what);
}

/* ---- the mechanisms, each with a sketch near one branch ---- */

enum { FOURBAR, SLIDER_CRANK, INVERTED, FIVEBAR, WATT, STEPHENSON, NMECH };

typedef struct {
  const char *name;
  kl_model *m;
  int ninputs;
  int nsketch;
  int sketch_link[6];
  double sketch_angle[6];
  int sketch_joint; /* -1 for none */
  double sketch_slide;
  double start[2]; /* inputs the sketch is near */
  double dir[2];   /* the sweep runs through start + tau dir */
} mechanism;

static void sketch_link(mechanism *mc, int link, double angle) {
  mc->sketch_link[mc->nsketch] = link;
  mc->sketch_angle[mc->nsketch] = angle;
  mc->nsketch++;
}

static mechanism pin_mechanism(const char *name, pin_linkage p) {
  mechanism mc;
  int l;
  memset(&mc, 0, sizeof mc);
  mc.name = name;
  mc.m = build_pin_linkage(&p, 0);
  for (l = 2; l < p.nlinks; l++) /* link 1 is the crank: the input sets it */
    sketch_link(&mc, l, p.sketch[l]);
  return mc;
}

/* Geometry of the support builders (chosen for the tests). Each sketch
 * picks one branch at zero input: the branches test_position.c checks, and
 * for the six-bars the sketch angles of support.c. */
static mechanism mechanism_make(int which) {
  mechanism mc;
  memset(&mc, 0, sizeof mc);
  switch (which) {
  case FOURBAR: {
    fourbar f = build_fourbar(40, 120, 80, 100);
    mc.name = "four-bar";
    mc.m = f.m;
    sketch_link(&mc, f.coupler, 0.6);
    sketch_link(&mc, f.rocker, 1.1);
    break;
  }
  case SLIDER_CRANK: {
    slider_crank sc = build_slider_crank(30, 100, 12);
    mc.name = "slider-crank";
    mc.m = sc.m;
    sketch_link(&mc, sc.rod, 0.1);
    mc.sketch_joint = sc.slide_joint;
    mc.sketch_slide = 125.0;
    break;
  }
  case INVERTED: {
    inverted_slider_crank is = build_inverted_slider_crank(35, 90);
    mc.name = "inverted slider-crank";
    mc.m = is.m;
    sketch_link(&mc, is.guide, PI - 0.2);
    mc.sketch_joint = is.slide_joint;
    mc.sketch_slide = 50.0;
    break;
  }
  case FIVEBAR: {
    fivebar f = build_fivebar(35, 25, 70, 80, 80);
    mc.name = "five-bar";
    mc.m = f.m;
    sketch_link(&mc, f.link1, 1.0);
    sketch_link(&mc, f.link2, 2.0);
    break;
  }
  case WATT:
    mc = pin_mechanism("Watt six-bar", watt_sixbar());
    break;
  default:
    mc = pin_mechanism("Stephenson six-bar", stephenson_sixbar());
    break;
  }
  if (which != SLIDER_CRANK && which != INVERTED)
    mc.sketch_joint = -1;
  mc.ninputs = kl_model_input_count(mc.m);
  mc.dir[0] = 1.0;
  if (which == FIVEBAR)
    mc.dir[1] = -0.6; /* both cranks turn at once; chosen for this test */
  ck_assert_msg(kl_model_is_finalized(mc.m), "%s: %s", mc.name,
                kl_model_error(mc.m));
  return mc;
}

static kl_solver *mechanism_solver(const mechanism *mc) {
  kl_solver *s = kl_solver_new(mc->m);
  int i;
  ck_assert_ptr_nonnull(s);
  for (i = 0; i < mc->nsketch; i++)
    ck_assert_int_eq(kl_set_link_angle(s, mc->sketch_link[i], mc->sketch_angle[i]),
                     KL_OK);
  if (mc->sketch_joint >= 0)
    ck_assert_int_eq(kl_set_joint_slide(s, mc->sketch_joint, mc->sketch_slide),
                     KL_OK);
  return s;
}

/* Solves every stage at start + tau dir, with input rates dir and zero
 * input accelerations and jerks, so the results are d/dtau, d^2/dtau^2 and
 * d^3/dtau^3. */
static void solve_along(kl_solver *s, const mechanism *mc, double tau,
                        readout out[NSTAGES]) {
  double u[2], zero[2] = {0.0, 0.0};
  int i;
  for (i = 0; i < mc->ninputs; i++)
    u[i] = mc->start[i] + tau * mc->dir[i];
  ck_assert_msg(kl_solve_position(s, u) == KL_OK, "%s at tau %g: %s", mc->name,
                tau, kl_solver_error(s));
  ck_assert_int_eq(kl_solve_velocity(s, mc->dir), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, zero), KL_OK);
  ck_assert_int_eq(kl_solve_jerk(s, zero), KL_OK);
  for (i = 0; i < NSTAGES; i++)
    out[i] = read_stage(s, (enum stage)i);
}

/* ------------------------------------------------------------------------
 * 1. Four-bar against the derivatives of its loop-closure equation
 * ------------------------------------------------------------------------ */

/*
 * Source: differentiating the loop-closure equation a e2 + b e3 - c e4 - d
 * = 0 (e_k = (cos t_k, sin t_k)) once and twice in time, the standard
 * textbook derivation of four-bar rates, done by hand here.
 * Once: a w2 e2' + b w3 e3' - c w4 e4' = 0 with e_k' = (-sin t_k, cos t_k);
 * dotting with e4 and with e3 (e_i' . e_j = sin(t_j - t_i)) gives
 *   w3 = a w2 sin(t4 - t2) / (b sin(t3 - t4)),
 *   w4 = a w2 sin(t2 - t3) / (c sin(t4 - t3)).
 * Twice: a (al2 e2' - w2^2 e2) + b (al3 e3' - w3^2 e3) - c (al4 e4' -
 * w4^2 e4) = 0, whose x and y rows are
 *   -b sin t3 al3 + c sin t4 al4 = Rx = a al2 s2 + a w2^2 c2 + b w3^2 c3 - c w4^2 c4
 *    b cos t3 al3 - c cos t4 al4 = Ry = -a al2 c2 + a w2^2 s2 + b w3^2 s3 - c w4^2 s4
 * with determinant D = b c sin(t3 - t4); by Cramer's rule
 *   al3 = -c (Rx cos t4 + Ry sin t4) / D,  al4 = -b (Rx cos t3 + Ry sin t3) / D.
 */
typedef struct {
  double w3, w4, al3, al4;
} fourbar_rates;

static fourbar_rates fourbar_closed_form(const fourbar *f, double t2,
                                         double t3, double t4, double w2,
                                         double al2) {
  double a = f->a, b = f->b, c = f->c;
  double c2 = cos(t2), s2 = sin(t2), c3 = cos(t3), s3 = sin(t3);
  double c4 = cos(t4), s4 = sin(t4), rx, ry, det;
  fourbar_rates r;
  r.w3 = a * w2 * sin(t4 - t2) / (b * sin(t3 - t4));
  r.w4 = a * w2 * sin(t2 - t3) / (c * sin(t4 - t3));
  rx = a * al2 * s2 + a * w2 * w2 * c2 + b * r.w3 * r.w3 * c3 -
       c * r.w4 * r.w4 * c4;
  ry = -a * al2 * c2 + a * w2 * w2 * s2 + b * r.w3 * r.w3 * s3 -
       c * r.w4 * r.w4 * s4;
  det = b * c * sin(t3 - t4);
  r.al3 = -c * (rx * c4 + ry * s4) / det;
  r.al4 = -b * (rx * c3 + ry * s3) / det;
  return r;
}

/* 1e-9 relative: the stages solve one 2x2 system in double precision from
 * a position converged to about 1e-13 rad, so agreement should be near
 * 1e-13; the margin allows for the conditioning near the smallest
 * transmission angle (about 26 degrees here). */
#define CLOSED_FORM_TOL 1e-9

START_TEST(fourbar_rates_match_differentiated_loop) {
  fourbar f = build_fourbar(40, 120, 80, 100); /* crank-rocker */
  kl_solver *s = kl_solver_new(f.m);
  const double w2 = 2.5, al2 = -1.7; /* chosen for this test */
  const double rate_floor = fabs(w2), accel_floor = fabs(al2) + w2 * w2;
  int k;
  ck_assert_ptr_nonnull(s);
  kl_set_link_angle(s, f.coupler, 0.6);
  kl_set_link_angle(s, f.rocker, 1.1);
  for (k = 0; k <= 72; k++) {
    double t2 = k * 5 * DEG, t3, t4, ex, ey, vp[2], ap[2];
    double va[2], aa[2], rap[2], vref[2], aref[2];
    fourbar_rates cf;
    ck_assert_int_eq(kl_solve_position(s, &t2), KL_OK);
    ck_assert_int_eq(kl_solve_velocity(s, &w2), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(s, &al2), KL_OK);
    t3 = kl_link_angle(s, f.coupler);
    t4 = kl_link_angle(s, f.rocker);
    /* the angles fed to the closed forms really close the loop (the loop
     * equation itself) */
    ex = f.a * cos(t2) + f.b * cos(t3) - f.c * cos(t4) - f.d;
    ey = f.a * sin(t2) + f.b * sin(t3) - f.c * sin(t4);
    ck_assert_double_le(hypot(ex, ey), 1e-10 * f.d);
    cf = fourbar_closed_form(&f, t2, t3, t4, w2, al2);

    /* the driven crank moves exactly as told (the input's meaning) */
    ck_assert_double_eq(kl_link_rate(s, f.crank), w2);
    ck_assert_double_eq(kl_link_accel(s, f.crank), al2);
    /* source: the differentiated loop equation above */
    ck_assert_msg(rel_diff(kl_link_rate(s, f.coupler), cf.w3, rate_floor) <=
                      CLOSED_FORM_TOL,
                  "coupler rate at %d deg: %.17g vs %.17g", k * 5,
                  kl_link_rate(s, f.coupler), cf.w3);
    ck_assert_msg(rel_diff(kl_link_rate(s, f.rocker), cf.w4, rate_floor) <=
                      CLOSED_FORM_TOL,
                  "rocker rate at %d deg: %.17g vs %.17g", k * 5,
                  kl_link_rate(s, f.rocker), cf.w4);
    ck_assert_msg(rel_diff(kl_link_accel(s, f.coupler), cf.al3, accel_floor) <=
                      CLOSED_FORM_TOL,
                  "coupler acceleration at %d deg: %.17g vs %.17g", k * 5,
                  kl_link_accel(s, f.coupler), cf.al3);
    ck_assert_msg(rel_diff(kl_link_accel(s, f.rocker), cf.al4, accel_floor) <=
                      CLOSED_FORM_TOL,
                  "rocker acceleration at %d deg: %.17g vs %.17g", k * 5,
                  kl_link_accel(s, f.rocker), cf.al4);

    /* Coupler point P at (b/2, b/4) on the coupler (support.h), A the crank
     * pin. Source: rigid-body kinematics in the plane (textbook),
     * v_P = v_A + w x r_AP, a_P = a_A + al x r_AP - w^2 r_AP, with
     * v_A = a w2 e2', a_A = a al2 e2' - a w2^2 e2 and the closed-form w3,
     * al3 of the coupler. */
    rap[0] = f.b / 2 * cos(t3) - f.b / 4 * sin(t3);
    rap[1] = f.b / 2 * sin(t3) + f.b / 4 * cos(t3);
    va[0] = -f.a * w2 * sin(t2);
    va[1] = f.a * w2 * cos(t2);
    aa[0] = -f.a * al2 * sin(t2) - f.a * w2 * w2 * cos(t2);
    aa[1] = f.a * al2 * cos(t2) - f.a * w2 * w2 * sin(t2);
    vref[0] = va[0] - cf.w3 * rap[1];
    vref[1] = va[1] + cf.w3 * rap[0];
    aref[0] = aa[0] - cf.al3 * rap[1] - cf.w3 * cf.w3 * rap[0];
    aref[1] = aa[1] + cf.al3 * rap[0] - cf.w3 * cf.w3 * rap[1];
    ck_assert_int_eq(kl_point_velocity(s, f.coupler_point, vp), KL_OK);
    ck_assert_int_eq(kl_point_acceleration(s, f.coupler_point, ap), KL_OK);
    ck_assert_double_le(rel_diff(vp[0], vref[0], f.a * rate_floor), CLOSED_FORM_TOL);
    ck_assert_double_le(rel_diff(vp[1], vref[1], f.a * rate_floor), CLOSED_FORM_TOL);
    ck_assert_double_le(rel_diff(ap[0], aref[0], f.a * accel_floor), CLOSED_FORM_TOL);
    ck_assert_double_le(rel_diff(ap[1], aref[1], f.a * accel_floor), CLOSED_FORM_TOL);
  }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 2. Offset slider-crank against its closed form differentiated by hand
 * ------------------------------------------------------------------------ */

/*
 * Source: the offset slider-crank closed form (standard kinematics, as in
 * test_position.c) x(t) = r cos t + S, S = sqrt(l^2 - h^2), h = e - r sin t,
 * differentiated here: h' = -r cos t, h'' = r sin t,
 *   S' = -h h' / S,  S'' = -(h'^2 + h h'') / S - (h h')^2 / S^3,
 *   x' = -r sin t + S',  x'' = -r cos t + S'',
 * and in time (chain rule) xdot = x' w, xddot = x'' w^2 + x' al.
 * The jerk: a third time from S S' = -h h' (so S S'' = -(h'^2 + h h'' +
 * S'^2), the same S'' as above), with h''' = r cos t:
 *   S S''' + 3 S' S'' = -(3 h' h'' + h h''')
 *   S''' = -(3 h' h'' + h h''' + 3 S' S'') / S,  x''' = r sin t + S''',
 * and in time, differentiating xddot once more (w' = al, al' = ze):
 *   xdddot = x''' w^3 + 3 x'' w al + x' ze.
 */
START_TEST(slider_crank_rates_match_closed_form) {
  slider_crank sc = build_slider_crank(30, 100, 12);
  kl_solver *s = kl_solver_new(sc.m);
  const double w = 3.1, al = 2.2, ze = -4.3; /* chosen for this test */
  int k;
  ck_assert_ptr_nonnull(s);
  kl_set_link_angle(s, sc.rod, 0.1);
  kl_set_joint_slide(s, sc.slide_joint, 125.0);
  for (k = 0; k <= 36; k++) {
    double t = k * 10 * DEG, h = sc.e - sc.r * sin(t);
    double dh = -sc.r * cos(t), ddh = sc.r * sin(t);
    double S = sqrt(sc.l * sc.l - h * h);
    double dS = -h * dh / S;
    double ddS = -(dh * dh + h * ddh) / S - (h * dh) * (h * dh) / (S * S * S);
    double dddh = sc.r * cos(t);
    double dddS = -(3 * dh * ddh + h * dddh + 3 * dS * ddS) / S;
    double dx = -sc.r * sin(t) + dS, ddx = -sc.r * cos(t) + ddS;
    double dddx = sc.r * sin(t) + dddS;
    double v_ref = dx * w, a_ref = ddx * w * w + dx * al;
    double j_ref = dddx * w * w * w + 3 * ddx * w * al + dx * ze;
    ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
    ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(s, &al), KL_OK);
    ck_assert_int_eq(kl_solve_jerk(s, &ze), KL_OK);
    /* the branch the closed form describes (slider right of the crank) */
    ck_assert_double_le(fabs(kl_joint_slide(s, sc.slide_joint) -
                             (sc.r * cos(t) + S)),
                        1e-10 * sc.l);
    /* source: the differentiated closed form above */
    ck_assert_msg(rel_diff(kl_joint_slide_rate(s, sc.slide_joint), v_ref,
                           sc.r * fabs(w)) <= CLOSED_FORM_TOL,
                  "slide rate at %d deg: %.17g vs %.17g", k * 10,
                  kl_joint_slide_rate(s, sc.slide_joint), v_ref);
    ck_assert_msg(rel_diff(kl_joint_slide_accel(s, sc.slide_joint), a_ref,
                           sc.r * (fabs(al) + w * w)) <= CLOSED_FORM_TOL,
                  "slide acceleration at %d deg: %.17g vs %.17g", k * 10,
                  kl_joint_slide_accel(s, sc.slide_joint), a_ref);
    ck_assert_msg(rel_diff(kl_joint_slide_jerk(s, sc.slide_joint), j_ref,
                           sc.r * (fabs(ze) + 3 * w * fabs(al) +
                                   w * w * w)) <= CLOSED_FORM_TOL,
                  "slide jerk at %d deg: %.17g vs %.17g", k * 10,
                  kl_joint_slide_jerk(s, sc.slide_joint), j_ref);
    /* the block keeps ground's angle (prismatic lock): it never turns */
    ck_assert_double_eq(kl_link_rate(s, sc.block), 0.0);
    ck_assert_double_eq(kl_link_accel(s, sc.block), 0.0);
    ck_assert_double_eq(kl_link_jerk(s, sc.block), 0.0);
  }
  kl_solver_free(s);
  kl_model_free(sc.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 3. Inverted slider-crank: the Coriolis term
 * ------------------------------------------------------------------------ */

/*
 * Differences of the position stage at unit crank rate and zero crank
 * acceleration, so d/dt = d/dt2. Common practice, no source: the central
 * first difference (f(t+h) - f(t-h)) / 2h errs by h^2 |f'''| / 6 + e / h,
 * the central second difference (f(t+h) - 2 f(t) + f(t-h)) / h^2 by
 * h^2 |f''''| / 12 + 4 e / h^2, where e is the error of a solved position
 * (rounding and Newton's remainder, about 1e-13 of the scale 90 with the
 * tightened tolerance below, so e ~ 1e-11). With h = 1e-3 rad and the
 * slide's derivatives of the order of r = 35: truncation about 1e-7
 * relative, noise 4e-11 / 1e-6 = 4e-5 length units, about 1e-6 of r
 * (measured worst: 1e-6 for the guide's acceleration, 3e-7 for the slide).
 * The tolerance 1e-5 keeps a factor ten over that and stays far below the
 * Coriolis term (order r w^2) whose loss the test must catch.
 */
#define SECOND_DIFF_STEP 1e-3
#define SECOND_DIFF_TOL 1e-5
/* Position tolerance for the difference tests: residual <= 1e-14 scale,
 * two decades above the rounding of the loop sums (about 1e-16 * 4 terms
 * of the scale), so Newton's last error stays far below the difference
 * quotients' own errors. */
#define TIGHT_POSITION_TOL 1e-14

static void tighten(kl_solver *s) {
  kl_options o;
  kl_options_default(&o);
  o.tolerance = TIGHT_POSITION_TOL;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_OK);
}

START_TEST(inverted_slider_crank_has_the_coriolis_term) {
  inverted_slider_crank is = build_inverted_slider_crank(35, 90);
  kl_solver *s = kl_solver_new(is.m);
  const double w2 = 1.3, al2 = 0.8; /* chosen for this test */
  const double accel_scale = is.r * (fabs(al2) + w2 * w2);
  const double h = SECOND_DIFF_STEP, unit = 1.0, zero = 0.0;
  int k;
  ck_assert_ptr_nonnull(s);
  tighten(s);
  kl_set_link_angle(s, is.guide, PI - 0.2);
  kl_set_joint_slide(s, is.slide_joint, 50.0);
  /* 5, 15, ..., 355 degrees: away from 0 and 180, where the slide is at its
   * extremes (law of cosines), sdot = 0 and the Coriolis term vanishes */
  for (k = 0; k < 36; k++) {
    double t = (10 * k + 5) * DEG, tm = t - h, tp = t + h;
    double s_m, s_0, s_p, g_m, g_p, fd_rate, fd_accel, fd_guide_accel;
    double th, sl, sd, sdd, wg, ag, eg[2], ng[2], acc_a[2];
    double along, across, coriolis, naive_guide_accel;

    /* (a) against differences of the position stage, unit crank rate */
    ck_assert_int_eq(kl_solve_position(s, &tm), KL_OK);
    s_m = kl_joint_slide(s, is.slide_joint);
    ck_assert_int_eq(kl_solve_velocity(s, &unit), KL_OK);
    g_m = kl_link_rate(s, is.guide);
    ck_assert_int_eq(kl_solve_position(s, &tp), KL_OK);
    s_p = kl_joint_slide(s, is.slide_joint);
    ck_assert_int_eq(kl_solve_velocity(s, &unit), KL_OK);
    g_p = kl_link_rate(s, is.guide);
    ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
    s_0 = kl_joint_slide(s, is.slide_joint);
    ck_assert_int_eq(kl_solve_velocity(s, &unit), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(s, &zero), KL_OK);
    fd_rate = (s_p - s_m) / (2 * h);
    fd_accel = (s_p - 2 * s_0 + s_m) / (h * h);
    fd_guide_accel = (g_p - g_m) / (2 * h);
    /* common practice, no source: central differences, errors as above */
    ck_assert_msg(rel_diff(kl_joint_slide_rate(s, is.slide_joint), fd_rate,
                           is.r) <= SECOND_DIFF_TOL,
                  "slide rate at %d deg: %.15g vs difference %.15g",
                  10 * k + 5, kl_joint_slide_rate(s, is.slide_joint), fd_rate);
    ck_assert_msg(rel_diff(kl_joint_slide_accel(s, is.slide_joint), fd_accel,
                           is.r) <= SECOND_DIFF_TOL,
                  "slide acceleration at %d deg: %.15g vs difference %.15g",
                  10 * k + 5, kl_joint_slide_accel(s, is.slide_joint), fd_accel);
    ck_assert_msg(rel_diff(kl_link_accel(s, is.guide), fd_guide_accel, 1.0) <=
                      SECOND_DIFF_TOL,
                  "guide acceleration at %d deg: %.15g vs difference %.15g",
                  10 * k + 5, kl_link_accel(s, is.guide), fd_guide_accel);

    /* (b) the Coriolis term, at a general crank rate and acceleration.
     * Source: differentiating the loop r e2 = (d, 0) + s eg twice (eg the
     * guide direction, ng its normal, wg and ag the guide's rate and
     * acceleration; textbook relative-motion analysis):
     *   a_A = r al2 e2' - r w2^2 e2
     *       = sddot eg + (2 sdot wg + s ag) ng - s wg^2 eg,
     * so along the guide sddot = a_A . eg + s wg^2 and across it
     * s ag = a_A . ng - 2 sdot wg. The Coriolis term 2 sdot wg lies across
     * the guide: it sets the guide's angular acceleration, while the slide
     * acceleration itself (the along-guide row) does not contain it. */
    ck_assert_int_eq(kl_solve_velocity(s, &w2), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(s, &al2), KL_OK);
    th = kl_link_angle(s, is.guide);
    sl = kl_joint_slide(s, is.slide_joint);
    sd = kl_joint_slide_rate(s, is.slide_joint);
    sdd = kl_joint_slide_accel(s, is.slide_joint);
    wg = kl_link_rate(s, is.guide);
    ag = kl_link_accel(s, is.guide);
    eg[0] = cos(th);
    eg[1] = sin(th);
    ng[0] = -eg[1];
    ng[1] = eg[0];
    acc_a[0] = -is.r * al2 * sin(t) - is.r * w2 * w2 * cos(t);
    acc_a[1] = is.r * al2 * cos(t) - is.r * w2 * w2 * sin(t);
    along = acc_a[0] * eg[0] + acc_a[1] * eg[1];
    across = acc_a[0] * ng[0] + acc_a[1] * ng[1];
    coriolis = 2 * sd * wg;
    ck_assert_double_le(rel_diff(sdd, along + sl * wg * wg, accel_scale),
                        CLOSED_FORM_TOL);
    ck_assert_double_le(rel_diff(sl * ag + coriolis, across, accel_scale),
                        CLOSED_FORM_TOL);
    /* without the Coriolis term the guide's acceleration would be
     * a_A . ng / s: the library's differs from that by exactly 2 sdot wg / s,
     * and the term is no rounding-sized remainder here */
    naive_guide_accel = across / sl;
    ck_assert_double_le(rel_diff(sl * (naive_guide_accel - ag), coriolis,
                                 accel_scale),
                        CLOSED_FORM_TOL);
    ck_assert_double_ge(fabs(coriolis), 0.01 * accel_scale);
  }
  kl_solver_free(s);
  kl_model_free(is.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 4. Every mechanism: differences of positions and rates
 * ------------------------------------------------------------------------ */

/*
 * Common practice, no source: central differences along the input path
 * start + tau dir, with the rates dir and zero input accelerations, so the
 * stages give d/dtau and d^2/dtau^2 exactly. Step h = 1e-4 (rad of input).
 * Truncation h^2 |x'''| / 6 = 1.7e-9 |x'''|; rounding and Newton's
 * remainder eps |x| / h with eps |x| ~ 1e-13 of the scale (tight tolerance)
 * give 1e-9 of the scale. Away from toggles |x'''| stays within tens of
 * (1 or the scale), so both stay below 1e-7 relative (measured worst over
 * all six mechanisms: 6e-8); the tolerance 1e-6 (relative to the rate, or
 * to 1 rad / the length scale when smaller) keeps a factor ten, while a
 * missing or wrong term shows at 1e-3 or more.
 */
#define FIRST_DIFF_STEP 1e-4
#define FIRST_DIFF_TOL 1e-6
/* Sweep: 24 stations, 15 degrees of the first input apart. */
#define SWEEP_STATIONS 24
#define SWEEP_STEP (15 * DEG)

static void expect_difference(const mechanism *mc, double tau,
                              const char *what, const readout *minus,
                              const readout *plus, const readout *stage) {
  int i;
  ck_assert_int_eq(minus->n, stage->n);
  ck_assert_int_eq(plus->n, stage->n);
  for (i = 0; i < stage->n; i++) {
    double diff = minus->is_angle[i] ? angle_diff(plus->v[i], minus->v[i])
                                     : plus->v[i] - minus->v[i];
    double quotient = diff / (2 * FIRST_DIFF_STEP);
    ck_assert_msg(rel_diff(stage->v[i], quotient, stage->unit[i]) <=
                      FIRST_DIFF_TOL,
                  "%s at tau %g: %s entry %d is %.15g, difference %.15g",
                  mc->name, tau, what, i, stage->v[i], quotient);
  }
}

START_TEST(differences_match_the_rate_stages) {
  mechanism mc = mechanism_make(_i);
  kl_solver *s = mechanism_solver(&mc);
  int k;
  tighten(s);
  for (k = 0; k < SWEEP_STATIONS; k++) {
    double tau = k * SWEEP_STEP;
    readout minus[NSTAGES], plus[NSTAGES], at[NSTAGES];
    solve_along(s, &mc, tau - FIRST_DIFF_STEP, minus);
    solve_along(s, &mc, tau + FIRST_DIFF_STEP, plus);
    solve_along(s, &mc, tau, at);
    expect_difference(&mc, tau, "velocity", &minus[POSITION], &plus[POSITION],
                      &at[VELOCITY]);
    expect_difference(&mc, tau, "acceleration", &minus[VELOCITY],
                      &plus[VELOCITY], &at[ACCELERATION]);
    expect_difference(&mc, tau, "jerk", &minus[ACCELERATION],
                      &plus[ACCELERATION], &at[JERK]);
  }
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 5. Kinematic coefficients
 * ------------------------------------------------------------------------ */

/* 1e-12: coefficients and rates are the same linear solves with the same
 * factors, so they may differ only by the rounding of a few sums. */
#define COEFF_TOL 1e-12

/* The coefficients of every coordinate and point, in the order of
 * read_stage: order 1 for input i, or order 2 for inputs i and j. */
static readout read_coefficients(const kl_solver *s, int order, int i, int j) {
  const kl_model *m = kl_solver_model(s);
  double scale = kl_model_scale(m);
  readout r;
  int l, jt, p;
  r.n = 0;
  for (l = 1; l < kl_model_link_count(m); l++)
    put(&r, order == 1 ? kl_link_angle_deriv(s, l, i)
                       : kl_link_angle_deriv2(s, l, i, j),
        1.0, 0);
  for (jt = 0; jt < kl_model_joint_count(m); jt++)
    if (kl_model_joint_kind(m, jt) != KL_JOINT_REVOLUTE)
      put(&r, order == 1 ? kl_joint_slide_deriv(s, jt, i)
                         : kl_joint_slide_deriv2(s, jt, i, j),
          scale, 0);
  for (p = 0; p < kl_model_point_count(m); p++) {
    double xy[2];
    ck_assert_int_eq(order == 1 ? kl_point_deriv(s, p, i, xy)
                                : kl_point_deriv2(s, p, i, j, xy),
                     KL_OK);
    put(&r, xy[0], scale, 0);
    put(&r, xy[1], scale, 0);
  }
  return r;
}

static void expect_close(const mechanism *mc, const char *what,
                         const readout *got, const readout *want,
                         const readout *floor, double tol) {
  int i;
  ck_assert_int_eq(got->n, want->n);
  for (i = 0; i < want->n; i++)
    ck_assert_msg(rel_diff(got->v[i], want->v[i], floor->unit[i]) <= tol,
                  "%s: %s entry %d is %.17g, expected %.17g", mc->name, what,
                  i, got->v[i], want->v[i]);
}

/* One input: by definition (chain rule with u = t) the first-order
 * coefficients are the rates at unit input rate, the second-order ones the
 * accelerations at unit rate and zero input acceleration. */
START_TEST(one_input_coefficients_are_unit_rates) {
  static const int one_input[] = {FOURBAR, SLIDER_CRANK, INVERTED, WATT,
                                  STEPHENSON};
  mechanism mc = mechanism_make(one_input[_i]);
  kl_solver *s = mechanism_solver(&mc);
  const double unit = 1.0, zero = 0.0, other_rate = 2.7;
  int k;
  ck_assert_int_eq(mc.ninputs, 1);
  for (k = 0; k < 12; k++) {
    double u = k * 30 * DEG;
    readout vel, acc, c1, c2, vel_other;
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    /* coefficients leave the velocity results alone (kinloop.h) */
    ck_assert_int_eq(kl_solve_velocity(s, &other_rate), KL_OK);
    vel_other = read_stage(s, VELOCITY);
    ck_assert_int_eq(kl_solve_coefficients(s), KL_OK);
    vel = read_stage(s, VELOCITY);
    assert_same_readout(&vel_other, &vel, "velocity after coefficients");
    ck_assert_int_eq(kl_solve_velocity(s, &unit), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(s, &zero), KL_OK);
    vel = read_stage(s, VELOCITY);
    acc = read_stage(s, ACCELERATION);
    c1 = read_coefficients(s, 1, 0, 0);
    c2 = read_coefficients(s, 2, 0, 0);
    expect_close(&mc, "first-order coefficient", &c1, &vel, &vel, COEFF_TOL);
    expect_close(&mc, "second-order coefficient", &c2, &acc, &acc, COEFF_TOL);
  }
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

/*
 * Two inputs: by the chain rule, q(t) = q(u(t)) gives
 *   qdot = sum_i q_i w_i,  qddot = sum_i q_i a_i + sum_ij q_ij w_i w_j
 * (q_i = dq/du_i, q_ij = d2q/du_i du_j). The floor of each comparison is
 * the sum of the magnitudes of the terms, the size their rounding scales
 * with.
 */
START_TEST(fivebar_coefficients_superpose) {
  fivebar f = build_fivebar(35, 25, 70, 80, 80);
  kl_solver *s = kl_solver_new(f.m);
  const double w[2] = {1.7, -0.9}, a[2] = {0.4, 1.3}; /* chosen for this test */
  int k;
  ck_assert_ptr_nonnull(s);
  kl_set_link_angle(s, f.link1, 1.0);
  kl_set_link_angle(s, f.link2, 2.0);
  for (k = 0; k < 12; k++) {
    double u[2], xy[2], vel[2], acc[2];
    int links[4], l, i, j, c;
    u[0] = k * 30 * DEG;
    u[1] = 40 * DEG - k * 20 * DEG;
    links[0] = f.crank1;
    links[1] = f.crank2;
    links[2] = f.link1;
    links[3] = f.link2;
    ck_assert_int_eq(kl_solve_position(s, u), KL_OK);
    ck_assert_int_eq(kl_solve_velocity(s, w), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(s, a), KL_OK);
    ck_assert_int_eq(kl_solve_coefficients(s), KL_OK);
    for (l = 0; l < 4; l++) {
      double sv = 0, sv_abs = 0, sa = 0, sa_abs = 0;
      for (i = 0; i < 2; i++) {
        double qi = kl_link_angle_deriv(s, links[l], i);
        sv += qi * w[i];
        sv_abs += fabs(qi * w[i]);
        sa += qi * a[i];
        sa_abs += fabs(qi * a[i]);
        for (j = 0; j < 2; j++) {
          double qij = kl_link_angle_deriv2(s, links[l], i, j);
          sa += qij * w[i] * w[j];
          sa_abs += fabs(qij * w[i] * w[j]);
        }
      }
      ck_assert_msg(rel_diff(kl_link_rate(s, links[l]), sv, sv_abs) <= COEFF_TOL,
                    "link %d rate %.17g vs superposed %.17g", links[l],
                    kl_link_rate(s, links[l]), sv);
      ck_assert_msg(rel_diff(kl_link_accel(s, links[l]), sa, sa_abs) <=
                        COEFF_TOL,
                    "link %d acceleration %.17g vs superposed %.17g", links[l],
                    kl_link_accel(s, links[l]), sa);
    }
    /* mixed second derivatives do not depend on the order (Schwarz) */
    ck_assert_double_eq(kl_link_angle_deriv2(s, f.link1, 0, 1),
                        kl_link_angle_deriv2(s, f.link1, 1, 0));
    ck_assert_int_eq(kl_point_velocity(s, f.tip, vel), KL_OK);
    ck_assert_int_eq(kl_point_acceleration(s, f.tip, acc), KL_OK);
    for (c = 0; c < 2; c++) {
      double sv = 0, sv_abs = 0, sa = 0, sa_abs = 0;
      for (i = 0; i < 2; i++) {
        ck_assert_int_eq(kl_point_deriv(s, f.tip, i, xy), KL_OK);
        sv += xy[c] * w[i];
        sv_abs += fabs(xy[c] * w[i]);
        sa += xy[c] * a[i];
        sa_abs += fabs(xy[c] * a[i]);
        for (j = 0; j < 2; j++) {
          ck_assert_int_eq(kl_point_deriv2(s, f.tip, i, j, xy), KL_OK);
          sa += xy[c] * w[i] * w[j];
          sa_abs += fabs(xy[c] * w[i] * w[j]);
        }
      }
      ck_assert_msg(rel_diff(vel[c], sv, sv_abs) <= COEFF_TOL,
                    "tip velocity %d: %.17g vs superposed %.17g", c, vel[c], sv);
      ck_assert_msg(rel_diff(acc[c], sa, sa_abs) <= COEFF_TOL,
                    "tip acceleration %d: %.17g vs superposed %.17g", c, acc[c],
                    sa);
    }
  }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 6. Stage order and bad rates (the contract of kinloop.h)
 * ------------------------------------------------------------------------ */

static void assert_rates_unreadable(const kl_solver *s, const fourbar *f) {
  double xy[2];
  int l;
  for (l = 0; l < kl_model_link_count(f->m); l++) {
    ck_assert(isnan(kl_link_rate(s, l)));
    ck_assert(isnan(kl_link_accel(s, l)));
    ck_assert(isnan(kl_link_angle_deriv(s, l, 0)));
    ck_assert(isnan(kl_link_angle_deriv2(s, l, 0, 0)));
    ck_assert(isnan(kl_link_jerk(s, l)));
  }
  ck_assert_int_eq(kl_point_jerk(s, f->coupler_point, xy), KL_ESTAGE);
  ck_assert_int_eq(kl_point_velocity(s, f->coupler_point, xy), KL_ESTAGE);
  ck_assert_int_eq(kl_point_acceleration(s, f->coupler_point, xy), KL_ESTAGE);
  ck_assert_int_eq(kl_point_deriv(s, f->coupler_point, 0, xy), KL_ESTAGE);
  ck_assert_int_eq(kl_point_deriv2(s, f->coupler_point, 0, 0, xy), KL_ESTAGE);
}

static void solve_all(kl_solver *s, double u, double w, double al) {
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &al), KL_OK);
  ck_assert_int_eq(kl_solve_jerk(s, &al), KL_OK);
  ck_assert_int_eq(kl_solve_coefficients(s), KL_OK);
}

static void expect_stage_error(kl_solver *s, int status, const char *stage,
                               const char *needs) {
  ck_assert_int_eq(status, KL_ESTAGE);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), stage));
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), needs));
}

START_TEST(stages_in_the_wrong_order) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  double w = 1.5, al = 0.5, u = 1.0, xy[2];
  readout before, after;
  ck_assert_ptr_nonnull(s);
  kl_set_link_angle(s, f.coupler, 0.3);
  kl_set_link_angle(s, f.rocker, 1.6);

  /* before any position */
  expect_stage_error(s, kl_solve_velocity(s, &w), "solve velocity", "position");
  expect_stage_error(s, kl_solve_acceleration(s, &al), "solve acceleration",
                     "position");
  expect_stage_error(s, kl_solve_coefficients(s), "solve coefficients",
                     "position");
  assert_rates_unreadable(s, &f);

  /* acceleration before velocity */
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  expect_stage_error(s, kl_solve_acceleration(s, &al), "solve acceleration",
                     "velocity");
  ck_assert(isnan(kl_link_accel(s, f.rocker)));
  ck_assert_int_eq(kl_point_acceleration(s, f.coupler_point, xy), KL_ESTAGE);
  /* jerk before acceleration: refused, and nothing becomes readable */
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  expect_stage_error(s, kl_solve_jerk(s, &al), "solve jerk", "acceleration");
  ck_assert(isnan(kl_link_jerk(s, f.rocker)));
  ck_assert_int_eq(kl_point_jerk(s, f.coupler_point, xy), KL_ESTAGE);

  /* a new position makes every rate stale: NaN, never the old numbers */
  solve_all(s, u, w, al);
  ck_assert(isfinite(kl_link_rate(s, f.rocker)));
  u = 1.1;
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  assert_rates_unreadable(s, &f);
  expect_stage_error(s, kl_solve_acceleration(s, &al), "solve acceleration",
                     "velocity");

  /* new rates make the accelerations of the old rates stale (kinloop.h:
   * accelerations are solved "at the position and rates last solved") */
  solve_all(s, u, w, al);
  w = -0.5;
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert(isnan(kl_link_accel(s, f.rocker)));
  ck_assert_int_eq(kl_point_acceleration(s, f.coupler_point, xy), KL_ESTAGE);
  /* ... and new accelerations the jerks of the old ones */
  expect_stage_error(s, kl_solve_jerk(s, &al), "solve jerk", "acceleration");
  solve_all(s, u, w, al);
  ck_assert_int_eq(kl_solve_acceleration(s, &w), KL_OK);
  ck_assert(isnan(kl_link_jerk(s, f.rocker)));
  ck_assert_int_eq(kl_point_jerk(s, f.coupler_point, xy), KL_ESTAGE);

  /* a sketch change leaves no solved position */
  solve_all(s, u, w, al);
  ck_assert_int_eq(kl_set_link_angle(s, f.rocker, 1.7), KL_OK);
  assert_rates_unreadable(s, &f);
  before = read_stage(s, POSITION);
  expect_stage_error(s, kl_solve_velocity(s, &w), "solve velocity", "position");
  expect_stage_error(s, kl_solve_acceleration(s, &al), "solve acceleration",
                     "position");
  expect_stage_error(s, kl_solve_coefficients(s), "solve coefficients",
                     "position");
  /* the refused calls left the sketch as it was */
  after = read_stage(s, POSITION);
  assert_same_readout(&before, &after, "the sketch after refused stages");
  ck_assert_double_eq(kl_link_angle(s, f.rocker), 1.7);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* After a singular solve, a sketch change makes the state a sketch: the
 * rate stages then want a position, they do not report the old singular
 * attempt. The limit is the law-of-cosines toggle of a non-Grashof
 * four-bar, acos((a^2 + d^2 - (b + c)^2) / (2 a d)). */
START_TEST(sketch_after_singular_wants_a_position) {
  fourbar f = build_fourbar(70, 50, 60, 100);
  kl_solver *s = kl_solver_new(f.m);
  double lim = acos((70.0 * 70 + 100.0 * 100 - 110.0 * 110) / (2 * 70.0 * 100));
  double u = lim - 0.05, w = 1.0;
  kl_set_link_angle(s, f.coupler, -0.6);
  kl_set_link_angle(s, f.rocker, 1.5);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_position(s, &lim), KL_ESINGULAR);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_ESINGULAR);
  kl_set_link_angle(s, f.rocker, 1.4);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_ESTAGE);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "sketch"));
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

START_TEST(nonfinite_rates_change_nothing) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  const double bad[] = {NAN, INFINITY, -INFINITY};
  unsigned k;
  ck_assert_ptr_nonnull(s);
  kl_set_link_angle(s, f.coupler, 0.3);
  kl_set_link_angle(s, f.rocker, 1.6);
  solve_all(s, 1.0, 1.5, 0.5);
  for (k = 0; k < sizeof bad / sizeof bad[0]; k++) {
    readout before[NSTAGES], after[NSTAGES];
    int st;
    for (st = 0; st < NSTAGES; st++)
      before[st] = read_stage(s, (enum stage)st);
    ck_assert_int_eq(kl_solve_velocity(s, &bad[k]), KL_ENONFINITE);
    ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "input rate value for input 1"));
    ck_assert_int_eq(kl_solve_acceleration(s, &bad[k]), KL_ENONFINITE);
    ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "input acceleration value for input 1"));
    for (st = 0; st < NSTAGES; st++) {
      after[st] = read_stage(s, (enum stage)st);
      assert_same_readout(&before[st], &after[st], "a result after a bad rate");
    }
    ck_assert(isfinite(kl_link_accel(s, f.rocker)));
  }
  ck_assert_int_eq(kl_solve_velocity(NULL, bad), KL_EINVAL);
  ck_assert_int_eq(kl_solve_velocity(s, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_solve_acceleration(s, NULL), KL_EINVAL);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* ------------------------------------------------------------------------
 * 7. No allocation after kl_solver_new (ARCHITECTURE.md section 4)
 * ------------------------------------------------------------------------ */

/* The joints of build_fourbar(40, 120, 80, 100), through a counting model
 * (support.c builds on the default allocator). */
static kl_model *counted_fourbar(counting_alloc *c) {
  fourbar f = build_fourbar_in(counting_model(c), 40, 120, 80, 100);
  ck_assert(kl_model_is_finalized(f.m));
  return f.m;
}

/* Calls every getter; `solved` says whether all stages are solved at the
 * current position (kinloop.h: otherwise rates read NaN or KL_ESTAGE). The
 * four-bar has revolute joints only, whose slide getters read NaN. */
static void call_every_getter(const kl_solver *s, int solved) {
  const kl_model *m = kl_solver_model(s);
  const int stage_status = solved ? KL_OK : KL_ESTAGE;
  double xy[2];
  kl_solve_stats st;
  kl_options o;
  int l, j, p;
  for (l = 0; l < kl_model_link_count(m); l++) {
    ck_assert(isfinite(kl_link_angle(s, l)));
    ck_assert_int_eq(isfinite(kl_link_rate(s, l)) != 0, solved);
    ck_assert_int_eq(isfinite(kl_link_accel(s, l)) != 0, solved);
    ck_assert_int_eq(isfinite(kl_link_jerk(s, l)) != 0, solved);
    ck_assert_int_eq(kl_link_origin_jerk(s, l, xy), stage_status);
    ck_assert_int_eq(isfinite(kl_link_angle_deriv(s, l, 0)) != 0, solved);
    ck_assert_int_eq(isfinite(kl_link_angle_deriv2(s, l, 0, 0)) != 0, solved);
    ck_assert_int_eq(kl_link_origin(s, l, xy), KL_OK);
  }
  for (j = 0; j < kl_model_joint_count(m); j++) {
    ck_assert(isfinite(kl_joint_angle(s, j)));
    ck_assert(isnan(kl_joint_slide(s, j)));
    ck_assert(isnan(kl_joint_slide_rate(s, j)));
    ck_assert(isnan(kl_joint_slide_accel(s, j)));
    ck_assert(isnan(kl_joint_slide_jerk(s, j)));
    ck_assert(isnan(kl_joint_slide_deriv(s, j, 0)));
    ck_assert(isnan(kl_joint_slide_deriv2(s, j, 0, 0)));
  }
  for (p = 0; p < kl_model_point_count(m); p++) {
    ck_assert_int_eq(kl_point_position(s, p, xy), KL_OK);
    ck_assert_int_eq(kl_point_velocity(s, p, xy), stage_status);
    ck_assert_int_eq(kl_point_acceleration(s, p, xy), stage_status);
    ck_assert_int_eq(kl_point_jerk(s, p, xy), stage_status);
    ck_assert_int_eq(kl_point_deriv(s, p, 0, xy), stage_status);
    ck_assert_int_eq(kl_point_deriv2(s, p, 0, 0, xy), stage_status);
  }
  st.size = sizeof st;
  ck_assert_int_eq(kl_solver_stats(s, &st), KL_OK);
  o.size = sizeof o;
  ck_assert_int_eq(kl_solver_options(s, &o), KL_OK);
  ck_assert_int_eq(isfinite(kl_input_value(s, 0)) != 0, solved);
  ck_assert_ptr_nonnull(kl_solver_error(s));
}

START_TEST(rate_stages_never_allocate) {
  counting_alloc c = {0, 0, 0, 0, 0};
  kl_model *m = counted_fourbar(&c);
  kl_solver *s = kl_solver_new(m);
  const double bad = NAN, al = 0.3;
  long calls, live;
  int k;
  ck_assert_ptr_nonnull(s);
  calls = c.calls;
  live = c.live;
  /* the failure paths format messages: they must not allocate either */
  ck_assert_int_eq(kl_solve_velocity(s, &al), KL_ESTAGE);
  ck_assert_int_eq(kl_solve_coefficients(s), KL_ESTAGE);
  ck_assert_int_eq(kl_solve_jerk(s, &al), KL_ESTAGE);
  call_every_getter(s, 0);
  kl_set_link_angle(s, 2, 0.6);
  kl_set_link_angle(s, 3, 1.1);
  for (k = 0; k <= 36; k++) {
    double u = k * 10 * DEG, w = 1.0 + 0.1 * k;
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(s, &al), KL_OK);
    ck_assert_int_eq(kl_solve_jerk(s, &al), KL_OK);
    ck_assert_int_eq(kl_solve_coefficients(s), KL_OK);
    ck_assert_int_eq(kl_solve_velocity(s, &bad), KL_ENONFINITE);
    ck_assert_int_eq(kl_solve_jerk(s, &bad), KL_ENONFINITE);
    call_every_getter(s, 1);
  }
  /* source: the contract in kinloop.h, "no call on a solver allocates
   * after kl_solver_new" */
  ck_assert_int_eq(c.calls, calls);
  ck_assert_int_eq(c.live, live);
  kl_solver_free(s);
  kl_model_free(m);
  ck_assert_int_eq(c.live, 0);
  ck_assert_uint_eq(c.live_bytes, 0);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("rates");
  TCase *tc = tcase_create("rates");
  tcase_set_timeout(tc, 120);
  tcase_add_test(tc, fourbar_rates_match_differentiated_loop);
  tcase_add_test(tc, slider_crank_rates_match_closed_form);
  tcase_add_test(tc, inverted_slider_crank_has_the_coriolis_term);
  tcase_add_loop_test(tc, differences_match_the_rate_stages, 0, NMECH);
  tcase_add_loop_test(tc, one_input_coefficients_are_unit_rates, 0, 5);
  tcase_add_test(tc, fivebar_coefficients_superpose);
  tcase_add_test(tc, stages_in_the_wrong_order);
  tcase_add_test(tc, sketch_after_singular_wants_a_position);
  tcase_add_test(tc, nonfinite_rates_change_nothing);
  tcase_add_test(tc, rate_stages_never_allocate);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
