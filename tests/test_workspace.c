/*
 * test_workspace.c - the workspace of a point against the five-bar's closed
 * form (annuli, their intersection's area by GSL quadrature), and bad input.
 */
#include <check.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_integration.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "suite.h"
#include "support.h"

/*
 * The five-bar's workspace in closed form (derived here; the two-dyad
 * argument is common practice, no source). Cranks a1 about A1 = (0, 0) and
 * a2 about A2 = (d, 0), arms b1 and b2 meeting at the tip P. With P held,
 * the left dyad A1-B1-P is a triangle of sides a1, b1 and |P - A1|, which
 * closes (in two elbow modes) exactly when
 *     |a1 - b1| <= |P - A1| <= a1 + b1,
 * the triangle inequality: P in the annulus of those radii about A1. The
 * right dyad likewise puts P in the annulus |a2 - b2| .. a2 + b2 about A2,
 * and the two dyads share nothing but P, so the tip reaches exactly the
 * intersection of the two annuli (the union over the four elbow choices of
 * the assemblies). Its boundary lies on the four circles, and where the
 * tip is on one of them a dyad is stretched or folded straight, which is
 * where d(x, y)/d(u1, u2) loses rank: the fold curves kinloop traces.
 *
 * The geometry is chosen for the test: a1 = 1, b1 = 1.5, a2 = 0.8,
 * b2 = 1.4, d = 1.2. The outer circles (2.5 about A1, 2.2 about A2) cross,
 * so the outer boundary is two arcs meeting at two corners; each inner
 * circle (0.5 about A1, 0.6 about A2) lies wholly inside the other annulus
 * and apart from the other (1.2 > 0.5 + 0.6), so the workspace has two
 * round holes.
 */
#define A1 1.0
#define B1 1.5
#define A2 0.8
#define B2 1.4
#define D 1.2

static const double centre_x[4] = {0.0, 0.0, D, D};
static const double radius[4] = {A1 + B1, B1 - A1, A2 + B2, B2 - A2};

/* How far q is from the nearest of the four circles. */
static double circle_miss(const double *q) {
  double best = INFINITY;
  for (int c = 0; c < 4; c++)
    best = fmin(best, fabs(hypot(q[0] - centre_x[c], q[1]) - radius[c]));
  return best;
}

static int in_annuli(double x, double y) {
  double r1 = hypot(x, y), r2 = hypot(x - D, y);
  return r1 >= radius[1] && r1 <= radius[0] && r2 >= radius[3] &&
         r2 <= radius[2];
}

/* The intersection's width at height y, exactly: each annulus at y covers
 * at most two intervals of x; the intersection's length is added up over
 * the pairs. */
static int annulus_row(double c, double ri, double ro, double y,
                       double iv[4]) {
  double outer, inner;
  if (fabs(y) >= ro)
    return 0;
  outer = sqrt(ro * ro - y * y);
  if (fabs(y) >= ri) {
    iv[0] = c - outer;
    iv[1] = c + outer;
    return 1;
  }
  inner = sqrt(ri * ri - y * y);
  iv[0] = c - outer;
  iv[1] = c - inner;
  iv[2] = c + inner;
  iv[3] = c + outer;
  return 2;
}

static double row_width(double y, void *unused) {
  double p[4], q[4], w = 0.0;
  int np = annulus_row(0.0, radius[1], radius[0], y, p);
  int nq = annulus_row(D, radius[3], radius[2], y, q);
  (void)unused;
  for (int i = 0; i < np; i++)
    for (int j = 0; j < nq; j++)
      w += fmax(0.0, fmin(p[2 * i + 1], q[2 * j + 1]) -
                         fmax(p[2 * i], q[2 * j]));
  return w;
}

/* The intersection's area by GSL's adaptive quadrature of the row width
 * (QAGS, which copes with the square-root ends of the circles). */
static double reference_area(void) {
  gsl_integration_workspace *gw = gsl_integration_workspace_alloc(2000);
  gsl_function f = {row_width, NULL};
  double area, err;
  ck_assert_int_eq(gsl_integration_qags(&f, -radius[0], radius[0], 1e-13,
                                        1e-12, 2000, gw, &area, &err),
                   GSL_SUCCESS);
  gsl_integration_workspace_free(gw);
  return area;
}

#define CAP 20000

typedef struct {
  double xy[2 * CAP];
  int curves[CAP], kinds[CAP];
  kl_workspace_result res;
} traced;

static traced *trace_fivebar(fivebar *f, kl_solver **s) {
  traced *t = calloc(1, sizeof *t);
  kl_workspace_options o;
  *f = build_fivebar(A1, A2, B1, B2, D);
  *s = kl_solver_new(f->m);
  kl_workspace_options_default(&o);
  t->res.size = sizeof t->res;
  ck_assert_int_eq(kl_solver_workspace(*s, f->tip, &o, t->xy, t->curves,
                                       t->kinds, CAP, &t->res),
                   KL_OK);
  return t;
}

/* Every vertex lies on one of the four circles, to the corrector's
 * tolerance, and in the closed region; every stretch of a fold is on the
 * boundary (the five-bar has no fold inside). */
static void boundary_on_the_circles(const traced *t) {
  int boundary = 0;
  for (int k = 0; k < t->res.vertices; k++) {
    const double *q = t->xy + 2 * k;
    ck_assert_msg(circle_miss(q) < 1e-9, "vertex %d (%g, %g) off by %g", k,
                  q[0], q[1], circle_miss(q));
    ck_assert_msg(in_annuli(q[0] * (1 - 1e-9), q[1] * (1 - 1e-9)) ||
                      in_annuli(q[0], q[1]) || circle_miss(q) < 1e-9,
                  "vertex %d outside", k);
    boundary += t->kinds[k] == KL_WORKSPACE_BOUNDARY;
  }
  ck_assert_int_gt(t->res.vertices, 100);
  /* a stretch at a corner, where two circles meet, may be classed by
   * probes standing beyond the corner */
  ck_assert_int_ge(boundary, t->res.vertices - 4);
}

/* Every point of the closed-form boundary is near a traced boundary
 * stretch: the curves cover all four circles' boundary arcs. */
static void boundary_covers_the_closed_form(const traced *t) {
  for (int c = 0; c < 4; c++)
    for (int i = 0; i < 360; i++) {
      double a = 2.0 * PI * (i + 0.5) / 360.0, best = INFINITY;
      double q[2] = {centre_x[c] + radius[c] * cos(a), radius[c] * sin(a)};
      /* points of a circle outside the other annulus are no boundary */
      if (!in_annuli(q[0] * (1 - 1e-12), q[1] * (1 - 1e-12)) &&
          !in_annuli(q[0] * (1 + 1e-12), q[1] * (1 + 1e-12)))
        continue;
      for (int k = 0; k < t->res.vertices; k++)
        best = fmin(best, hypot(t->xy[2 * k] - q[0], t->xy[2 * k + 1] - q[1]));
      ck_assert_msg(best < 0.02 * 2.5, "circle %d at %g: nearest %g", c, a,
                    best);
    }
}

/* The area against GSL's quadrature of the intersection, and against the
 * lens formula (the area two crossing disks share, common practice, no
 * source) less the two holes: the polygon of chords of at most 0.01 of
 * the scale loses about (0.01)^2 / 12 of the area of a circle, 1e-5. */
static void area_matches_quadrature(const traced *t) {
  double r1 = radius[0], r2 = radius[2];
  double lens = r1 * r1 * acos((D * D + r1 * r1 - r2 * r2) / (2 * D * r1)) +
                r2 * r2 * acos((D * D + r2 * r2 - r1 * r1) / (2 * D * r2)) -
                0.5 * sqrt((-D + r1 + r2) * (D + r1 - r2) * (D - r1 + r2) *
                           (D + r1 + r2));
  double closed = lens - PI * radius[1] * radius[1] -
                  PI * radius[3] * radius[3];
  double quad = reference_area();
  ck_assert_double_eq_tol(quad, closed, 1e-9);
  ck_assert_msg(fabs(t->res.area - quad) < 1e-4 * quad, "area %.9g, GSL %.9g",
                t->res.area, quad);
  /* the extent: leftmost on the outer circle about A2, rightmost on the
   * outer circle about A1, top and bottom at the corners where the outer
   * circles cross, x = (r1^2 - r2^2 + d^2) / (2 d) */
  {
    double xc = (r1 * r1 - r2 * r2 + D * D) / (2 * D);
    ck_assert_double_eq_tol(t->res.xmin, D - r2, 1e-6);
    ck_assert_double_eq_tol(t->res.xmax, r1, 1e-6);
    /* the corners fall between two vertices: within a step (0.01 of the
     * scale 1.5) */
    ck_assert_double_eq_tol(t->res.ymax, sqrt(r1 * r1 - xc * xc), 0.015);
    ck_assert_double_eq_tol(t->res.ymin, -sqrt(r1 * r1 - xc * xc), 0.015);
  }
}

/* The five-bar traced once (the checks above on one trace, which is the
 * slow part under valgrind), and the solver left as it was. */
START_TEST(fivebar_against_closed_form) {
  fivebar f;
  kl_solver *s;
  traced *t = trace_fivebar(&f, &s);
  boundary_on_the_circles(t);
  boundary_covers_the_closed_form(t);
  area_matches_quadrature(t);
  ck_assert(isnan(kl_input_value(s, 0)));
  free(t);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* Bad input: each its own status and message, the solver unchanged. */
START_TEST(bad_input) {
  fivebar f = build_fivebar(A1, A2, B1, B2, D);
  fourbar fb = build_fourbar(2, 7, 9, 6);
  kl_solver *s = kl_solver_new(f.m), *s4 = kl_solver_new(fb.m);
  kl_workspace_options o;
  double xy[8];
  int curves[4], kinds[4];
  kl_model *g = kl_model_new();
  int ground_point;
  kl_workspace_options_default(&o);
  ck_assert_int_eq(kl_solver_workspace(s4, fb.coupler_point, &o, xy, curves,
                                       kinds, 4, NULL),
                   KL_EDOF);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s4), "two inputs"));
  ck_assert_int_eq(kl_solver_workspace(s, 99, &o, xy, curves, kinds, 4, NULL),
                   KL_EID);
  o.step = NAN;
  ck_assert_int_eq(kl_solver_workspace(s, f.tip, &o, xy, curves, kinds, 4,
                                       NULL),
                   KL_ENONFINITE);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "step"));
  kl_workspace_options_default(&o);
  o.grid = 3;
  ck_assert_int_eq(kl_solver_workspace(s, f.tip, &o, xy, curves, kinds, 4,
                                       NULL),
                   KL_EINVAL);
  kl_workspace_options_default(&o);
  ck_assert_int_eq(kl_solver_workspace(s, f.tip, NULL, xy, curves, kinds, 4,
                                       NULL),
                   KL_EINVAL);
  ck_assert_int_eq(kl_solver_workspace(s, f.tip, &o, NULL, curves, kinds, 4,
                                       NULL),
                   KL_EINVAL);
  ck_assert_int_eq(kl_solver_workspace(NULL, f.tip, &o, xy, curves, kinds, 4,
                                       NULL),
                   KL_EINVAL);
  /* too small arrays: what fits is traced, and the status says so */
  ck_assert_int_eq(kl_solver_workspace(s, f.tip, &o, xy, curves, kinds, 4,
                                       NULL),
                   KL_ETRUNCATED);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "4 vertices"));
  ck_assert(isnan(kl_input_value(s, 0)));
  kl_model_free(g);
  /* a point on ground: the same five-bar with a ground point */
  {
    kl_model *m = kl_model_new();
    int c1 = kl_add_link(m, "c1"), c2 = kl_add_link(m, "c2");
    int l1 = kl_add_link(m, "l1"), l2 = kl_add_link(m, "l2");
    int p1 = kl_add_revolute(m, KL_GROUND, 0, 0, c1, 0, 0);
    int p2 = kl_add_revolute(m, KL_GROUND, D, 0, c2, 0, 0);
    kl_solver *sg;
    kl_add_revolute(m, c1, A1, 0, l1, 0, 0);
    kl_add_revolute(m, c2, A2, 0, l2, 0, 0);
    kl_add_revolute(m, l1, B1, 0, l2, B2, 0);
    ground_point = kl_add_point(m, KL_GROUND, 3, 4, "post");
    kl_add_input(m, p1);
    kl_add_input(m, p2);
    ck_assert_int_eq(kl_model_finalize(m), KL_OK);
    sg = kl_solver_new(m);
    ck_assert_int_eq(kl_solver_workspace(sg, ground_point, &o, xy, curves,
                                         kinds, 4, NULL),
                     KL_EKIND);
    ck_assert_ptr_nonnull(strstr(kl_solver_error(sg), "'post'"));
    kl_solver_free(sg);
    kl_model_free(m);
  }
  kl_solver_free(s);
  kl_solver_free(s4);
  kl_model_free(f.m);
  kl_model_free(fb.m);
}
END_TEST

/* A slide input: the workspace takes turning inputs only (documented). */
START_TEST(sliding_input_is_refused) {
  kl_model *m = kl_model_new();
  int cart = kl_add_link(m, "cart"), arm = kl_add_link(m, "arm");
  int slide = kl_add_prismatic(m, KL_GROUND, 0, 0, 0.0, cart, 0, 0);
  int pin = kl_add_revolute(m, cart, 0, 0, arm, 0, 0);
  int tip = kl_add_point(m, arm, 1, 0, "tip");
  kl_solver *s;
  kl_workspace_options o;
  double xy[8];
  int curves[4], kinds[4];
  kl_add_input(m, slide);
  kl_add_input(m, pin);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  kl_workspace_options_default(&o);
  ck_assert_int_eq(kl_solver_workspace(s, tip, &o, xy, curves, kinds, 4,
                                       NULL),
                   KL_EKIND);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "sliding"));
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* Every allocation goes through the model's hook and comes back; a
 * failing one is a clean KL_ENOMEM. */
START_TEST(allocations_are_returned) {
  counting_alloc c = {0};
  kl_model *m = counting_model(&c);
  fivebar f;
  kl_solver *s;
  kl_workspace_options o;
  static double xy[2 * CAP];
  static int curves[CAP], kinds[CAP];
  long live;
  kl_model_free(m);
  (void)f;
  m = counting_model(&c);
  {
    int c1 = kl_add_link(m, "c1"), c2 = kl_add_link(m, "c2");
    int l1 = kl_add_link(m, "l1"), l2 = kl_add_link(m, "l2");
    int p1 = kl_add_revolute(m, KL_GROUND, 0, 0, c1, 0, 0);
    int p2 = kl_add_revolute(m, KL_GROUND, D, 0, c2, 0, 0);
    kl_add_revolute(m, c1, A1, 0, l1, 0, 0);
    kl_add_revolute(m, c2, A2, 0, l2, 0, 0);
    kl_add_revolute(m, l1, B1, 0, l2, B2, 0);
    kl_add_point(m, l1, B1, 0, "tip");
    kl_add_input(m, p1);
    kl_add_input(m, p2);
    ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  }
  s = kl_solver_new(m);
  kl_workspace_options_default(&o);
  o.grid = 8;
  live = c.live;
  ck_assert_int_eq(kl_solver_workspace(s, 0, &o, xy, curves, kinds, CAP,
                                       NULL),
                   KL_OK);
  ck_assert_int_eq(c.live, live);
  c.fail_at = c.calls + 3;
  ck_assert_int_eq(kl_solver_workspace(s, 0, &o, xy, curves, kinds, CAP,
                                       NULL),
                   KL_ENOMEM);
  ck_assert_int_eq(c.live, live);
  c.fail_at = 0;
  kl_solver_free(s);
  kl_model_free(m);
  ck_assert_int_eq(c.live, 0);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("workspace");
  TCase *tc = tcase_create("workspace");
  tcase_set_timeout(tc, 600);
  tcase_add_test(tc, fivebar_against_closed_form);
  tcase_add_test(tc, bad_input);
  tcase_add_test(tc, sliding_input_is_refused);
  tcase_add_test(tc, allocations_are_returned);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
