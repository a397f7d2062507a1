/*
 * test_loops.c - what the model's loops say to a designer: four-bar loops
 * with their link lengths and Grashof class, and the joints where the
 * transmission angle is measured, against the Grashof condition and the
 * four-bar's law-of-cosines transmission angle.
 */
#include <check.h>
#include <math.h>
#include <string.h>

#include "suite.h"
#include "support.h"

#define DEG (PI / 180.0)

/* Agreement of a transmission angle with its closed form: one position
 * solve to 1e-12 of the scale on well-conditioned four-bars (the value
 * is an atan2 of the converged link directions). */
#define CLOSED_FORM_TOL 1e-9

static kl_fourbar new_fourbar(void) {
  kl_fourbar fb;
  memset(&fb, 0xff, sizeof fb);
  fb.size = sizeof fb;
  return fb;
}

/* A four-bar with its input at the second ground pivot of its walk: the
 * model file lists the rocker's pivot first, and the input drives the other
 * pivot (geometry chosen for the test: ground 100, crank 40, coupler 120,
 * rocker 80, a crank-rocker by Grashof's condition). */
static kl_model *fourbar_driven_second(int *crank, int *rocker,
                                       int *coupler) {
  kl_model *m = kl_model_new();
  int loop[4], motor;
  *crank = kl_add_link(m, "crank");
  *coupler = kl_add_link(m, "coupler");
  *rocker = kl_add_link(m, "rocker");
  loop[0] = kl_add_revolute(m, *rocker, 0, 0, KL_GROUND, 100, 0);
  loop[1] = motor = kl_add_revolute(m, KL_GROUND, 0, 0, *crank, 0, 0);
  loop[2] = kl_add_revolute(m, *crank, 40, 0, *coupler, 0, 0);
  loop[3] = kl_add_revolute(m, *coupler, 120, 0, *rocker, 80, 0);
  kl_add_input(m, motor);
  kl_add_loop(m, 4, loop);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  return m;
}

START_TEST(fourbar_loop_reads_links_lengths_and_class) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_fourbar fb = new_fourbar();
  ck_assert_int_eq(kl_model_loop_fourbar(f.m, 0, &fb), KL_OK);
  ck_assert_uint_eq(fb.size, sizeof fb);
  ck_assert_int_eq(fb.loop, 0);
  ck_assert_int_eq(fb.input, 0);
  ck_assert_int_eq(fb.input_joint, f.pivot);
  ck_assert_int_eq(fb.output_joint, f.rocker_pivot);
  ck_assert_int_eq(fb.input_link, f.crank);
  ck_assert_int_eq(fb.coupler_link, f.coupler);
  ck_assert_int_eq(fb.output_link, f.rocker);
  /* the lengths the builder gave, exactly: each is the distance of two
   * points on one axis */
  ck_assert_double_eq(fb.ground_length, f.d);
  ck_assert_double_eq(fb.input_length, f.a);
  ck_assert_double_eq(fb.coupler_length, f.b);
  ck_assert_double_eq(fb.output_length, f.c);
  /* Grashof's condition: s + l = 40 + 120 < p + q = 80 + 100, the input
   * link shortest: a crank-rocker */
  ck_assert_int_eq(fb.grashof, KL_GRASHOF_CRANK_ROCKER);
  ck_assert_int_eq(kl_model_grashof(f.m), fb.grashof);
  kl_model_free(f.m);
}
END_TEST

START_TEST(fourbar_loop_driven_at_either_pivot) {
  int crank, rocker, coupler;
  kl_model *m = fourbar_driven_second(&crank, &rocker, &coupler);
  kl_fourbar fb = new_fourbar();
  ck_assert_int_eq(kl_model_loop_fourbar(m, 0, &fb), KL_OK);
  ck_assert_int_eq(fb.input_link, crank);
  ck_assert_int_eq(fb.coupler_link, coupler);
  ck_assert_int_eq(fb.output_link, rocker);
  ck_assert_int_eq(fb.input_joint, 1);
  ck_assert_int_eq(fb.output_joint, 0);
  ck_assert_double_eq(fb.ground_length, 100);
  ck_assert_double_eq(fb.input_length, 40);
  ck_assert_double_eq(fb.coupler_length, 120);
  ck_assert_double_eq(fb.output_length, 80);
  ck_assert_int_eq(fb.grashof, KL_GRASHOF_CRANK_ROCKER);
  ck_assert_int_eq(kl_model_grashof(m), KL_GRASHOF_CRANK_ROCKER);
  kl_model_free(m);
}
END_TEST

/* The classes of Grashof's condition (s + l against p + q, and which link
 * is shortest), each from a four-bar built with those lengths (geometry
 * chosen for the test). */
START_TEST(fourbar_loop_classes_follow_grashof) {
  static const struct {
    double a, b, c, d;
    int cls;
  } cases[] = {
      {40, 120, 80, 100, KL_GRASHOF_CRANK_ROCKER},   /* crank shortest */
      {100, 80, 120, 40, KL_GRASHOF_DOUBLE_CRANK},   /* ground shortest */
      {80, 40, 100, 120, KL_GRASHOF_DOUBLE_ROCKER},  /* coupler shortest */
      {100, 120, 40, 80, KL_GRASHOF_ROCKER_CRANK},   /* rocker shortest */
      {70, 50, 60, 100, KL_GRASHOF_TRIPLE_ROCKER},   /* 50 + 100 > 70 + 60 */
      {40, 100, 40, 100, KL_GRASHOF_CHANGE_POINT},   /* 40 + 100 = 40 + 100 */
  };
  unsigned k;
  for (k = 0; k < sizeof cases / sizeof cases[0]; k++) {
    fourbar f = build_fourbar(cases[k].a, cases[k].b, cases[k].c, cases[k].d);
    kl_fourbar fb = new_fourbar();
    ck_assert_int_eq(kl_model_loop_fourbar(f.m, 0, &fb), KL_OK);
    ck_assert_msg(fb.grashof == cases[k].cls, "case %u: class %d", k,
                  fb.grashof);
    ck_assert_int_eq(kl_model_grashof(f.m), cases[k].cls);
    kl_model_free(f.m);
  }
}
END_TEST

START_TEST(fourbar_loop_in_a_larger_model) {
  /* the chain's first loop is a four-bar driven at ground; the others are
   * driven through the rocker before them, not by an input */
  chain c = build_chain(3);
  kl_fourbar fb = new_fourbar();
  int loop, fourbars = 0;
  for (loop = 0; loop < kl_model_loop_count(c.m); loop++) {
    int st = kl_model_loop_fourbar(c.m, loop, &fb);
    ck_assert(st == KL_OK || st == KL_EKIND);
    if (st != KL_OK)
      continue;
    fourbars++;
    ck_assert_int_eq(fb.input_link, c.crank);
    ck_assert_int_eq(fb.coupler_link, c.couplers[0]);
    ck_assert_int_eq(fb.output_link, c.rockers[0]);
    ck_assert_int_eq(fb.grashof, KL_GRASHOF_CRANK_ROCKER);
  }
  ck_assert_int_eq(fourbars, 1);
  /* a whole model of several loops is no four-bar */
  ck_assert_int_eq(kl_model_grashof(c.m), KL_EKIND);
  kl_model_free(c.m);
}
END_TEST

START_TEST(fourbar_loop_refuses_what_it_cannot_read) {
  slider_crank sc = build_slider_crank(40, 120, 10);
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_model *open = kl_model_new();
  kl_fourbar fb = new_fourbar();
  struct {
    size_t size;
    int loop;
  } small;
  /* a loop with a prismatic joint */
  ck_assert_int_eq(kl_model_loop_fourbar(sc.m, 0, &fb), KL_EKIND);
  ck_assert_int_eq(kl_model_loop_fourbar(f.m, 1, &fb), KL_EID);
  ck_assert_int_eq(kl_model_loop_fourbar(f.m, -1, &fb), KL_EID);
  ck_assert_int_eq(kl_model_loop_fourbar(open, 0, &fb), KL_ESTATE);
  ck_assert_int_eq(kl_model_loop_fourbar(NULL, 0, &fb), KL_EINVAL);
  ck_assert_int_eq(kl_model_loop_fourbar(f.m, 0, NULL), KL_EINVAL);
  fb.size = 0;
  ck_assert_int_eq(kl_model_loop_fourbar(f.m, 0, &fb), KL_EINVAL);
  /* an older, shorter struct is filled no further than its size */
  memset(&small, 0xff, sizeof small);
  small.size = offsetof(kl_fourbar, input);
  ck_assert_int_eq(kl_model_loop_fourbar(f.m, 0, (kl_fourbar *)&small),
                   KL_OK);
  ck_assert_int_eq(small.loop, 0);
  kl_model_free(sc.m);
  kl_model_free(f.m);
  kl_model_free(open);
}
END_TEST

/* Norton, Design of Machinery, the transmission angle of a four-bar from
 * the law of cosines on the diagonal from the crank pin to the rocker's
 * pivot: cos mu = (b^2 + c^2 - a^2 - d^2 + 2 a d cos theta2) / (2 b c). */
static double law_of_cosines_mu(const fourbar *f, double t2) {
  return acos((f->b * f->b + f->c * f->c - f->a * f->a - f->d * f->d +
               2 * f->a * f->d * cos(t2)) /
              (2 * f->b * f->c));
}

START_TEST(fourbar_site_is_the_coupler_rocker_pin) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_solver *s = kl_solver_new(f.m);
  kl_output site[2];
  kl_transmission_skip skipped[2];
  int k;
  ck_assert_int_eq(kl_model_transmissions(f.m, site, 2), 1);
  ck_assert_int_eq(site[0].kind, KL_OUTPUT_TRANSMISSION);
  ck_assert_int_eq(site[0].id, f.rocker_pin);
  ck_assert_int_eq(site[0].line_a, f.crank_pin);   /* on the coupler */
  ck_assert_int_eq(site[0].line_b, f.rocker_pivot); /* on the rocker */
  ck_assert_int_eq(kl_model_transmission_skips(f.m, skipped, 2), 1);
  ck_assert_int_eq(skipped[0].joint, f.crank_pin);
  ck_assert_int_eq(skipped[0].loop, 0);
  ck_assert_int_eq(skipped[0].link, f.crank);
  ck_assert_int_eq(skipped[0].reason, KL_TRANSMISSION_SKIP_INPUT_CRANK);
  kl_set_link_angle(s, f.coupler, 0.6);
  kl_set_link_angle(s, f.rocker, 1.1);
  for (k = 0; k <= 36; k++) {
    double u = k * 10 * DEG, mu;
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    ck_assert_int_eq(kl_output_value(s, &site[0], &mu), KL_OK);
    ck_assert_msg(fabs(mu - law_of_cosines_mu(&f, u)) < CLOSED_FORM_TOL,
                  "crank %d deg: %.15g, closed form %.15g", 10 * k, mu,
                  law_of_cosines_mu(&f, u));
  }
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

START_TEST(slider_crank_has_no_site) {
  /* the crank pin is on the crank the input turns; the block pin drives
   * the slider, whose pressure angle is measured instead (even with the pin
   * on the slide point, as the builder puts it) */
  slider_crank sc = build_slider_crank(40, 120, 10);
  kl_transmission_skip skipped[4];
  int k;
  ck_assert_int_eq(kl_model_transmissions(sc.m, NULL, 0), 0);
  ck_assert_int_eq(kl_model_transmission_skips(sc.m, skipped, 4), 2);
  ck_assert_int_eq(skipped[0].joint + skipped[1].joint,
                   sc.crank_pin + sc.block_pin);
  for (k = 0; k < 2; k++) {
    if (skipped[k].joint == sc.crank_pin) {
      ck_assert_int_eq(skipped[k].reason, KL_TRANSMISSION_SKIP_INPUT_CRANK);
      ck_assert_int_eq(skipped[k].link, sc.crank);
    } else {
      ck_assert_int_eq(skipped[k].reason, KL_TRANSMISSION_SKIP_SLIDER);
      ck_assert_int_eq(skipped[k].link, sc.block);
    }
  }
  kl_model_free(sc.m);
}
END_TEST

/*
 * The pressure angle of the offset slider-crank (crank r, rod l, offset e;
 * standard kinematics, as tests/test_position.c): the rod stands at phi
 * with sin phi = (e - r sin t) / l against the slide's axis, which is the
 * signed angle from the direction of motion to the rod, with slope
 * -r cos t / (l cos phi); over a turn it runs from asin((e - r) / l) at
 * t = pi / 2 to asin((e + r) / l) at t = 3 pi / 2. The pin stands on the
 * slide point of the block, and the angle still measures.
 */
START_TEST(slider_pressure_angle_matches_the_closed_form) {
  slider_crank sc = build_slider_crank(30, 100, 12);
  kl_solver *s = kl_solver_new(sc.m);
  kl_output site[2], bad;
  kl_range range;
  double v, d;
  int k;
  ck_assert_int_eq(kl_model_pressure_sites(sc.m, site, 2), 1);
  ck_assert_int_eq(site[0].kind, KL_OUTPUT_PRESSURE);
  ck_assert_int_eq(site[0].id, sc.slide_joint);
  ck_assert_int_eq(site[0].line_a, sc.block_pin);
  ck_assert_int_eq(site[0].line_b, sc.crank_pin);
  kl_set_link_angle(s, sc.rod, -0.1);
  kl_set_joint_slide(s, sc.slide_joint, 120.0);
  for (k = 0; k < 36; k++) {
    double t = k * 10 * DEG, phi = asin((sc.e - sc.r * sin(t)) / sc.l);
    double slope = -sc.r * cos(t) / (sc.l * cos(phi));
    ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
    ck_assert_int_eq(kl_output_value(s, &site[0], &v), KL_OK);
    ck_assert_msg(fabs(v - phi) < CLOSED_FORM_TOL,
                  "crank %d deg: %.15g, closed form %.15g", 10 * k, v, phi);
    ck_assert_int_eq(kl_output_deriv(s, &site[0], 0, &d), KL_OK);
    ck_assert_msg(fabs(d - slope) < 1e-9, "crank %d deg: slope %.15g, closed "
                  "form %.15g", 10 * k, d, slope);
  }
  range.size = sizeof range;
  ck_assert_int_eq(kl_output_range(s, 0, 0.0, 2 * PI, 72, &site[0], &range),
                   KL_OK);
  ck_assert_double_le(fabs(range.max - asin((sc.e + sc.r) / sc.l)), 1e-9);
  ck_assert_double_le(fabs(range.input_at_max - 1.5 * PI), 1e-6);
  ck_assert_double_le(fabs(range.min - asin((sc.e - sc.r) / sc.l)), 1e-9);
  ck_assert_double_le(fabs(range.input_at_min - 0.5 * PI), 1e-6);
  /* refused: a revolute joint, a pin not on the slider, a line off the rod */
  bad = site[0];
  bad.id = sc.block_pin;
  ck_assert_int_eq(kl_output_value(s, &bad, &v), KL_EKIND);
  bad = site[0];
  bad.line_a = sc.crank_pin;
  ck_assert_int_eq(kl_output_value(s, &bad, &v), KL_EKIND);
  bad = site[0];
  bad.line_b = sc.pivot;
  ck_assert_int_eq(kl_output_value(s, &bad, &v), KL_EKIND);
  kl_solver_free(s);
  kl_model_free(sc.m);
}
END_TEST

/*
 * A Scotch yoke: the crank's pin runs in a slot of the yoke square to the
 * yoke's guide. Walking the loop, the slot has a revolute neighbour (the
 * crank's ground pivot), but past it lies the frame, which drives nothing:
 * no rod-and-guide pressure angle exists there (common practice, no source:
 * the pin pushes square to the slot, along the guide). The frame as "rod"
 * gave a constant 0 that looked like a measured figure.
 */
START_TEST(frame_is_no_rod_for_a_pressure_angle) {
  kl_model *m = kl_model_new();
  int crank = kl_add_link(m, "crank"), yoke = kl_add_link(m, "yoke");
  int shaft = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  ck_assert_int_ge(kl_add_prismatic(m, KL_GROUND, 100, 0, 0.0, yoke, 70, 0), 0);
  ck_assert_int_ge(kl_add_slot(m, yoke, 30, 0, PI / 2, crank, 30, 0), 0);
  ck_assert_int_ge(kl_add_input(m, shaft), 0);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ck_assert_int_eq(kl_model_pressure_sites(m, NULL, 0), 0);
  kl_model_free(m);
}
END_TEST

/* Every revolute joint off ground and not an input is met exactly once,
 * as a site or as a skip, and every site is an output the library takes. */
static void check_cover(kl_model *m) {
  kl_output sites[MAX_JOINTS];
  kl_transmission_skip skips[MAX_JOINTS];
  int seen[MAX_JOINTS] = {0};
  int ns = kl_model_transmissions(m, sites, MAX_JOINTS);
  int nk = kl_model_transmission_skips(m, skips, MAX_JOINTS), j, i, k;
  kl_solver *s = kl_solver_new(m);
  ck_assert_int_ge(ns, 1);
  ck_assert_int_le(ns + nk, kl_model_joint_count(m));
  for (k = 0; k < ns; k++) {
    double v;
    seen[sites[k].id]++;
    ck_assert_int_eq(kl_output_value(s, &sites[k], &v), KL_OK);
  }
  for (k = 0; k < nk; k++)
    seen[skips[k].joint]++;
  for (j = 0; j < kl_model_joint_count(m); j++) {
    int links[2], input = 0;
    kl_model_joint_links(m, j, links, NULL, NULL);
    for (i = 0; i < kl_model_input_count(m); i++)
      input |= kl_model_input_joint(m, i) == j;
    ck_assert_int_eq(seen[j], kl_model_joint_kind(m, j) == KL_JOINT_REVOLUTE &&
                                  links[0] != KL_GROUND &&
                                  links[1] != KL_GROUND && !input);
  }
  kl_solver_free(s);
}

START_TEST(six_bars_cover_each_joint_once) {
  pin_linkage watt = watt_sixbar(), stephenson = stephenson_sixbar();
  kl_model *mw = build_pin_linkage(&watt, 0);
  kl_model *ms = build_pin_linkage(&stephenson, 1);
  check_cover(mw);
  check_cover(ms);
  kl_model_free(mw);
  kl_model_free(ms);
}
END_TEST

/* A four-bar whose coupler is a ternary link built of three bars pinned in
 * a triangle (t1 from the crank pin to the rocker pin, t2 from the rocker
 * pin to the apex, t3 from the apex back to t1; geometry chosen for this
 * test; the rocker pinned 20 along t2): the triangle's pins never turn (a triangle of bars is rigid,
 * Gruebler's count 3 (3 - 1) - 2 3 = 0), so they are no sites; the pin
 * where the coupler drives the rocker still is one. */
START_TEST(rigid_triangle_pins_are_no_sites) {
  kl_model *m = kl_model_new();
  int crank = kl_add_link(m, "crank"), t1 = kl_add_link(m, "t1");
  int t2 = kl_add_link(m, "t2"), t3 = kl_add_link(m, "t3");
  int rocker = kl_add_link(m, "rocker"), k, rigid = 0;
  double side = hypot(60.0, 40.0), back = hypot(40.0, 40.0);
  int pivot = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  int crank_pin = kl_add_revolute(m, crank, 40, 0, t1, 0, 0);
  int t1_t2 = kl_add_revolute(m, t1, 120, 0, t2, 0, 0);
  int t2_t3 = kl_add_revolute(m, t2, side, 0, t3, 0, 0);
  int t3_t1 = kl_add_revolute(m, t3, back, 0, t1, 20, 0);
  int drive = kl_add_revolute(m, t2, 20, 0, rocker, 80, 0);
  kl_output sites[8];
  kl_transmission_skip skips[8];
  int ns, nk;
  kl_add_revolute(m, rocker, 0, 0, KL_GROUND, 100, 0);
  kl_add_input(m, pivot);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ns = kl_model_transmissions(m, sites, 8);
  nk = kl_model_transmission_skips(m, skips, 8);
  ck_assert_int_eq(ns, 1);
  ck_assert_int_eq(sites[0].id, drive);
  for (k = 0; k < nk; k++) {
    int j = skips[k].joint;
    if (j == crank_pin) {
      ck_assert_int_eq(skips[k].reason, KL_TRANSMISSION_SKIP_INPUT_CRANK);
      continue;
    }
    ck_assert_int_eq(skips[k].reason, KL_TRANSMISSION_SKIP_RIGID);
    ck_assert(j == t1_t2 || j == t2_t3 || j == t3_t1);
    /* the third bar of the triangle */
    ck_assert_int_eq(skips[k].link, j == t1_t2 ? t3 : j == t2_t3 ? t1 : t2);
    rigid++;
  }
  ck_assert_int_eq(rigid, 3);
  check_cover(m);
  kl_model_free(m);
}
END_TEST

START_TEST(sites_refuse_what_they_cannot_give) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  kl_model *open = kl_model_new();
  kl_output sentinel[2];
  kl_transmission_skip skip_sentinel[1];
  memset(sentinel, 0x5a, sizeof sentinel);
  /* cap 0 counts without writing */
  ck_assert_int_eq(kl_model_transmissions(f.m, sentinel, 0), 1);
  ck_assert_int_eq(sentinel[0].id, 0x5a5a5a5a);
  ck_assert_int_eq(kl_model_transmissions(f.m, NULL, 1), KL_EINVAL);
  ck_assert_int_eq(kl_model_transmissions(f.m, sentinel, -1), KL_EINVAL);
  ck_assert_int_eq(kl_model_transmissions(NULL, sentinel, 1), KL_EINVAL);
  ck_assert_int_eq(kl_model_transmissions(open, sentinel, 1), KL_ESTATE);
  ck_assert_int_eq(kl_model_transmission_skips(f.m, NULL, 1), KL_EINVAL);
  ck_assert_int_eq(kl_model_transmission_skips(open, skip_sentinel, 1),
                   KL_ESTATE);
  ck_assert_int_eq(kl_model_transmission_skips(f.m, NULL, 0), 1);
  kl_model_free(f.m);
  kl_model_free(open);
}
END_TEST

/* The angle at the crank pin B between the crank (to the pivot A) and the
 * coupler (to C), from the law of cosines on the diagonal BD to the rocker's
 * pivot (common practice, no source): BD^2 = a^2 + d^2 - 2 a d cos theta2,
 * then angle ABD in triangle ABD and angle DBC in triangle BCD. With the
 * crank above the ground line and the open assembly, A and C lie on either
 * side of BD, so the angle is their sum, folded into [0, pi]. */
static double law_of_cosines_crank_pin(const fourbar *f, double t2) {
  double bd2 = f->a * f->a + f->d * f->d - 2 * f->a * f->d * cos(t2);
  double bd = sqrt(bd2);
  double abd = acos((f->a * f->a + bd2 - f->d * f->d) / (2 * f->a * bd));
  double dbc = acos((bd2 + f->b * f->b - f->c * f->c) / (2 * bd * f->b));
  return acos(cos(abd + dbc));
}

START_TEST(named_lines_add_and_replace_sites) {
  fourbar f = build_fourbar_open(40, 120, 80, 100);
  kl_solver *s;
  kl_output site[3];
  kl_transmission_skip skipped[2];
  int line_a = -1, line_b = -1, k;
  /* the crank pin, which the rule passes over, named: lines given in
   * either order, kept with line_a on the joint's link a (the crank) */
  ck_assert_int_eq(kl_model_set_transmission_lines(f.m, f.crank_pin,
                                                   f.rocker_pin, f.pivot),
                   KL_OK);
  /* the rule's own site named again, lines reversed: replaced, not added */
  ck_assert_int_eq(kl_model_set_transmission_lines(f.m, f.rocker_pin,
                                                   f.rocker_pivot,
                                                   f.crank_pin),
                   KL_OK);
  ck_assert_int_eq(kl_model_transmission_lines(f.m, f.crank_pin, &line_a,
                                               &line_b),
                   KL_OK);
  ck_assert_int_eq(line_a, f.pivot);
  ck_assert_int_eq(line_b, f.rocker_pin);
  ck_assert_int_eq(kl_model_transmission_lines(f.m, f.pivot, &line_a,
                                               &line_b),
                   KL_EID);
  ck_assert_int_eq(kl_model_finalize(f.m), KL_OK);
  ck_assert_int_eq(kl_model_transmissions(f.m, site, 3), 2);
  ck_assert_int_eq(site[0].id, f.rocker_pin);
  ck_assert_int_eq(site[0].line_a, f.crank_pin);
  ck_assert_int_eq(site[0].line_b, f.rocker_pivot);
  ck_assert_int_eq(site[1].kind, KL_OUTPUT_TRANSMISSION);
  ck_assert_int_eq(site[1].id, f.crank_pin);
  ck_assert_int_eq(site[1].line_a, f.pivot);
  ck_assert_int_eq(site[1].line_b, f.rocker_pin);
  ck_assert_int_eq(kl_model_transmission_skips(f.m, skipped, 2), 0);
  s = kl_solver_new(f.m);
  kl_set_link_angle(s, f.coupler, 0.6);
  kl_set_link_angle(s, f.rocker, 1.1);
  for (k = 1; k <= 17; k++) {
    double u = k * 10 * DEG, mu, want = law_of_cosines_crank_pin(&f, u);
    ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
    ck_assert_int_eq(kl_output_value(s, &site[1], &mu), KL_OK);
    ck_assert_msg(fabs(mu - want) < CLOSED_FORM_TOL,
                  "crank %d deg: %.15g, closed form %.15g", 10 * k, mu, want);
    ck_assert_int_eq(kl_output_value(s, &site[0], &mu), KL_OK);
    ck_assert_msg(fabs(mu - law_of_cosines_mu(&f, u)) < CLOSED_FORM_TOL,
                  "crank %d deg: %.15g, closed form %.15g", 10 * k, mu,
                  law_of_cosines_mu(&f, u));
  }
  ck_assert_int_eq(kl_model_set_transmission_lines(f.m, f.crank_pin, f.pivot,
                                                   f.rocker_pin),
                   KL_ESTATE);
  kl_solver_free(s);
  kl_model_free(f.m);
}
END_TEST

/* Refused with its own status and message, the model as it was. */
static void expect_lines_refused(fourbar *f, int joint, int line_a,
                                 int line_b, int status) {
  int a = -1, b = -1;
  ck_assert_int_eq(kl_model_set_transmission_lines(f->m, joint, line_a,
                                                   line_b),
                   status);
  ck_assert_msg(strstr(kl_model_error(f->m), "set transmission lines") !=
                    NULL,
                "message: %s", kl_model_error(f->m));
  /* the crank pin keeps the lines named before */
  ck_assert_int_eq(kl_model_transmission_lines(f->m, f->crank_pin, &a, &b),
                   KL_OK);
  ck_assert_int_eq(a, f->pivot);
  ck_assert_int_eq(b, f->rocker_pin);
  if (joint >= 0 && joint < kl_model_joint_count(f->m) &&
      joint != f->crank_pin)
    ck_assert_int_eq(kl_model_transmission_lines(f->m, joint, &a, &b),
                     KL_EID);
}

START_TEST(named_lines_refuse_bad_input) {
  fourbar f = build_fourbar_open(40, 120, 80, 100);
  int slider = kl_add_link(f.m, "slider");
  int guide = kl_add_prismatic(f.m, f.rocker, 10, 0, 0.0, slider, 0, 0);
  /* a pin on the coupler at the crank pin's own point */
  int twin = kl_add_revolute(f.m, f.coupler, 0, 0, slider, 5, 0);
  ck_assert_int_ge(guide, 0);
  ck_assert_int_ge(twin, 0);
  ck_assert_int_eq(kl_model_set_transmission_lines(f.m, f.crank_pin, f.pivot,
                                                   f.rocker_pin),
                   KL_OK);
  ck_assert_int_eq(kl_model_set_transmission_lines(NULL, f.crank_pin,
                                                   f.pivot, f.rocker_pin),
                   KL_EINVAL);
  expect_lines_refused(&f, -1, f.pivot, f.rocker_pin, KL_EID);
  expect_lines_refused(&f, 99, f.pivot, f.rocker_pin, KL_EID);
  expect_lines_refused(&f, f.crank_pin, 99, f.rocker_pin, KL_EID);
  expect_lines_refused(&f, f.crank_pin, f.pivot, -3, KL_EID);
  expect_lines_refused(&f, guide, f.rocker_pin, f.rocker_pivot, KL_EKIND);
  expect_lines_refused(&f, f.crank_pin, f.crank_pin, f.rocker_pin,
                       KL_EKIND);
  /* both on the coupler, none on the rocker */
  expect_lines_refused(&f, f.rocker_pin, f.crank_pin, f.crank_pin,
                       KL_EKIND);
  /* the rocker's pivot is on neither the crank nor the coupler */
  expect_lines_refused(&f, f.crank_pin, f.pivot, f.rocker_pivot, KL_EKIND);
  expect_lines_refused(&f, f.crank_pin, f.pivot, twin, KL_EZEROLENGTH);
  kl_model_free(f.m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("loops");
  TCase *tc = tcase_create("loops");
  tcase_add_test(tc, fourbar_loop_reads_links_lengths_and_class);
  tcase_add_test(tc, fourbar_loop_driven_at_either_pivot);
  tcase_add_test(tc, fourbar_loop_classes_follow_grashof);
  tcase_add_test(tc, fourbar_loop_in_a_larger_model);
  tcase_add_test(tc, fourbar_loop_refuses_what_it_cannot_read);
  tcase_add_test(tc, fourbar_site_is_the_coupler_rocker_pin);
  tcase_add_test(tc, slider_crank_has_no_site);
  tcase_add_test(tc, slider_pressure_angle_matches_the_closed_form);
  tcase_add_test(tc, frame_is_no_rod_for_a_pressure_angle);
  tcase_add_test(tc, six_bars_cover_each_joint_once);
  tcase_add_test(tc, sites_refuse_what_they_cannot_give);
  tcase_add_test(tc, rigid_triangle_pins_are_no_sites);
  tcase_add_test(tc, named_lines_add_and_replace_sites);
  tcase_add_test(tc, named_lines_refuse_bad_input);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
