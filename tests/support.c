/*
 * support.c - the shared test machinery: counting allocator, mechanism
 * builders (geometry chosen for the tests), angle helpers.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "support.h"

void *counting_alloc_fn(void *user, void *ptr, size_t old_size,
                        size_t new_size) {
  counting_alloc *c = user;
  void *p;
  if (new_size == 0) {
    if (ptr != NULL) {
      c->live--;
      c->live_bytes -= old_size;
    }
    free(ptr);
    return NULL;
  }
  c->calls++;
  if (c->fail_at > 0 && c->calls == c->fail_at) {
    c->failed++;
    return NULL;
  }
  p = realloc(ptr, new_size);
  if (p == NULL)
    return NULL;
  if (ptr == NULL)
    c->live++;
  c->live_bytes += new_size - old_size;
  return p;
}

kl_model *counting_model(counting_alloc *c) {
  return kl_model_new_with_alloc(counting_alloc_fn, c);
}

static fourbar fourbar_links(kl_model *m, double a, double b, double c,
                             double d) {
  fourbar f;
  f.m = m;
  f.a = a;
  f.b = b;
  f.c = c;
  f.d = d;
  f.crank = kl_add_link(f.m, "crank");
  f.coupler = kl_add_link(f.m, "coupler");
  f.rocker = kl_add_link(f.m, "rocker");
  f.pivot = kl_add_revolute(f.m, KL_GROUND, 0, 0, f.crank, 0, 0);
  f.crank_pin = kl_add_revolute(f.m, f.crank, a, 0, f.coupler, 0, 0);
  f.rocker_pin = kl_add_revolute(f.m, f.coupler, b, 0, f.rocker, c, 0);
  f.rocker_pivot = kl_add_revolute(f.m, f.rocker, 0, 0, KL_GROUND, d, 0);
  f.coupler_point = kl_add_point(f.m, f.coupler, b / 2, b / 4, "coupler");
  kl_add_input(f.m, f.pivot);
  return f;
}

fourbar build_fourbar_in(kl_model *m, double a, double b, double c,
                         double d) {
  fourbar f = fourbar_links(m, a, b, c, d);
  kl_model_finalize(f.m);
  return f;
}

fourbar build_fourbar_open(double a, double b, double c, double d) {
  return fourbar_links(kl_model_new(), a, b, c, d);
}

fourbar build_fourbar(double a, double b, double c, double d) {
  return build_fourbar_in(kl_model_new(), a, b, c, d);
}

fourbar build_fourbar_explicit(double a, double b, double c, double d) {
  fourbar f = fourbar_links(kl_model_new(), a, b, c, d);
  int loop[4];
  loop[0] = f.pivot;
  loop[1] = f.crank_pin;
  loop[2] = f.rocker_pin;
  loop[3] = f.rocker_pivot;
  kl_add_loop(f.m, 4, loop);
  kl_model_finalize(f.m);
  return f;
}

slider_crank build_slider_crank(double r, double l, double e) {
  slider_crank s;
  s.m = kl_model_new();
  s.r = r;
  s.l = l;
  s.e = e;
  s.crank = kl_add_link(s.m, "crank");
  s.rod = kl_add_link(s.m, "rod");
  s.block = kl_add_link(s.m, "block");
  s.pivot = kl_add_revolute(s.m, KL_GROUND, 0, 0, s.crank, 0, 0);
  s.crank_pin = kl_add_revolute(s.m, s.crank, r, 0, s.rod, 0, 0);
  s.block_pin = kl_add_revolute(s.m, s.rod, l, 0, s.block, 0, 0);
  s.slide_joint = kl_add_prismatic(s.m, KL_GROUND, 0, e, 0.0, s.block, 0, 0);
  s.rod_point = kl_add_point(s.m, s.rod, 0.4 * l, 9.0, "rod mark");
  s.block_point = kl_add_point(s.m, s.block, 6.0, -4.0, "block face");
  kl_add_input(s.m, s.pivot);
  kl_model_finalize(s.m);
  return s;
}

inverted_slider_crank build_inverted_slider_crank(double r, double d) {
  inverted_slider_crank s;
  int pivot;
  s.m = kl_model_new();
  s.r = r;
  s.d = d;
  s.crank = kl_add_link(s.m, "crank");
  s.block = kl_add_link(s.m, "block");
  s.guide = kl_add_link(s.m, "guide");
  pivot = kl_add_revolute(s.m, KL_GROUND, 0, 0, s.crank, 0, 0);
  kl_add_revolute(s.m, s.crank, r, 0, s.block, 0, 0);
  kl_add_revolute(s.m, KL_GROUND, d, 0, s.guide, 0, 0);
  s.slide_joint = kl_add_prismatic(s.m, s.guide, 0, 0, 0.0, s.block, 0, 0);
  kl_add_input(s.m, pivot);
  kl_model_finalize(s.m);
  return s;
}

fivebar build_fivebar(double a1, double a2, double b1, double b2, double d) {
  fivebar f;
  int p1, p2;
  f.m = kl_model_new();
  f.a1 = a1;
  f.a2 = a2;
  f.b1 = b1;
  f.b2 = b2;
  f.d = d;
  f.crank1 = kl_add_link(f.m, "left crank");
  f.crank2 = kl_add_link(f.m, "right crank");
  f.link1 = kl_add_link(f.m, "left arm");
  f.link2 = kl_add_link(f.m, "right arm");
  p1 = kl_add_revolute(f.m, KL_GROUND, 0, 0, f.crank1, 0, 0);
  p2 = kl_add_revolute(f.m, KL_GROUND, d, 0, f.crank2, 0, 0);
  kl_add_revolute(f.m, f.crank1, a1, 0, f.link1, 0, 0);
  kl_add_revolute(f.m, f.crank2, a2, 0, f.link2, 0, 0);
  kl_add_revolute(f.m, f.link1, b1, 0, f.link2, b2, 0);
  f.tip = kl_add_point(f.m, f.link1, b1, 0, "tip");
  kl_add_input(f.m, p1);
  kl_add_input(f.m, p2);
  kl_model_finalize(f.m);
  return f;
}

static void pin(pin_linkage *p, int a, double ax, double ay, int b, double bx,
                double by) {
  int j = p->njoints++;
  p->a[j] = a;
  p->b[j] = b;
  p->pa[j][0] = ax;
  p->pa[j][1] = ay;
  p->pb[j][0] = bx;
  p->pb[j][1] = by;
}

/*
 * Watt six-bar (the two ternary links, ground and link 3, joined directly):
 * a crank-rocker four-bar 0-1-2-3 whose ternary rocker 3 drives a second
 * four-bar 3-4-5 back to ground. Geometry chosen for the test.
 */
pin_linkage watt_sixbar(void) {
  pin_linkage p = {0};
  p.nlinks = 6;
  pin(&p, 0, 0, 0, 1, 0, 0);      /* crank pivot */
  pin(&p, 1, 30, 0, 2, 0, 0);     /* crank - coupler */
  pin(&p, 2, 90, 0, 3, 70, 0);    /* coupler - ternary rocker */
  pin(&p, 3, 0, 0, 0, 80, 0);     /* rocker pivot */
  pin(&p, 3, 40, 35, 4, 0, 0);    /* rocker arm - second coupler */
  pin(&p, 4, 85, 0, 5, 60, 0);    /* second coupler - output rocker */
  pin(&p, 5, 0, 0, 0, 150, 20);   /* output pivot */
  p.input_joint = 0;
  p.sketch[1] = 0.0;
  p.sketch[2] = 1.0;
  p.sketch[3] = 1.9;
  p.sketch[4] = 0.3;
  p.sketch[5] = 1.6;
  return p;
}

/*
 * Stephenson six-bar (ternary links ground and coupler 2 not joined
 * directly): a crank-rocker four-bar 0-1-2-3 whose ternary coupler 2 drives
 * a dyad 4-5 back to ground. Geometry chosen for the test.
 */
pin_linkage stephenson_sixbar(void) {
  pin_linkage p = {0};
  p.nlinks = 6;
  pin(&p, 0, 0, 0, 1, 0, 0);      /* crank pivot */
  pin(&p, 1, 35, 0, 2, 0, 0);     /* crank - ternary coupler */
  pin(&p, 2, 110, 0, 3, 75, 0);   /* coupler - rocker */
  pin(&p, 3, 0, 0, 0, 95, 0);     /* rocker pivot */
  pin(&p, 2, 55, 40, 4, 0, 0);    /* coupler point - dyad link */
  pin(&p, 4, 80, 0, 5, 70, 0);    /* dyad joint */
  pin(&p, 5, 0, 0, 0, 20, 120);   /* dyad pivot on ground */
  p.input_joint = 0;
  p.sketch[1] = 0.0;
  p.sketch[2] = 0.6;
  p.sketch[3] = 1.7;
  p.sketch[4] = 0.2;
  p.sketch[5] = -0.5;
  return p;
}

kl_model *build_pin_linkage(const pin_linkage *p, int explicit_loops) {
  kl_model *m = kl_model_new();
  int l, j;
  for (l = 1; l < p->nlinks; l++)
    kl_add_link(m, NULL);
  for (j = 0; j < p->njoints; j++)
    kl_add_revolute(m, p->a[j], p->pa[j][0], p->pa[j][1], p->b[j],
                    p->pb[j][0], p->pb[j][1]);
  kl_add_input(m, p->input_joint);
  if (explicit_loops) {
    /* both six-bars: loop 0-1-2-3 and the loop through joints 4, 5, 6 and
     * back through the first four-bar's joints to ground */
    static const int first[4] = {0, 1, 2, 3};
    kl_add_loop(m, 4, first);
    if (p->a[4] == 3) {
      static const int watt[4] = {3, 4, 5, 6};
      kl_add_loop(m, 4, watt);
    } else {
      static const int steph[5] = {4, 5, 6, 3, 2};
      kl_add_loop(m, 5, steph);
    }
  }
  kl_model_finalize(m);
  return m;
}

static chain chain_links(int n, int massive) {
  chain c;
  int k, driver, pivot;
  c.m = kl_model_new();
  c.n = n;
  c.crank = kl_add_link(c.m, "crank");
  pivot = kl_add_revolute(c.m, KL_GROUND, 0, 0, c.crank, 0, 0);
  kl_add_input(c.m, pivot);
  driver = c.crank;
  for (k = 0; k < n; k++) {
    c.couplers[k] = kl_add_link(c.m, NULL);
    c.rockers[k] = kl_add_link(c.m, NULL);
    kl_add_revolute(c.m, driver, 40, 0, c.couplers[k], 0, 0);
    kl_add_revolute(c.m, c.couplers[k], 120, 0, c.rockers[k], 80, 0);
    kl_add_revolute(c.m, c.rockers[k], 0, 0, KL_GROUND, 100.0 * (k + 1), 0);
    if (massive) {
      kl_set_link_mass(c.m, c.couplers[k], 1.2, 60, 0, 1500);
      kl_set_link_mass(c.m, c.rockers[k], 0.8, 40, 0, 500);
    }
    driver = c.rockers[k];
  }
  if (massive) {
    kl_set_link_mass(c.m, c.crank, 0.4, 20, 0, 80);
    kl_model_set_gravity(c.m, 0, -9810);
  }
  kl_model_finalize(c.m);
  return c;
}

chain build_chain(int n) { return chain_links(n, 0); }

chain build_massive_chain(int n) { return chain_links(n, 1); }

/* e.g. Norton, Design of Machinery, the slider-crank position analysis
 * (from memory): y = crank sin t + sqrt(rod^2 - (offset - crank cos t)^2),
 * and its derivative. */
double offset_slider_y(double crank, double rod, double offset, double t,
                       double *dy) {
  double h = offset - crank * cos(t), root = sqrt(rod * rod - h * h);
  if (dy != NULL)
    *dy = crank * cos(t) - h * crank * sin(t) / root;
  return crank * sin(t) + root;
}

/*
 * Freudenstein's equation in its half-angle tangent form, as given in
 * standard machine-design texts (recalled from memory): with
 * K1 = d/a, K2 = d/c, K3 = (a^2 - b^2 + c^2 + d^2) / (2 a c),
 * A = cos t2 - K1 - K2 cos t2 + K3, B = -2 sin t2,
 * C = K1 - (K2 + 1) cos t2 + K3, the rocker angle is
 * t4 = 2 atan((-B + branch sqrt(B^2 - 4 A C)) / (2 A)).
 * The coupler angle follows from the loop. Because the form is recalled,
 * the function also checks that its angles close the loop (and returns 0
 * if they do not, which the callers assert against).
 */
int freudenstein(const fourbar *f, double t2, int branch, double *t3,
                 double *t4) {
  double a = f->a, b = f->b, c = f->c, d = f->d;
  double k1 = d / a, k2 = d / c;
  double k3 = (a * a - b * b + c * c + d * d) / (2 * a * c);
  double A = cos(t2) - k1 - k2 * cos(t2) + k3, B = -2 * sin(t2);
  double C = k1 - (k2 + 1) * cos(t2) + k3, disc = B * B - 4 * A * C;
  double ex, ey;
  if (disc < 0)
    return 0;
  *t4 = 2 * atan2(-B + branch * sqrt(disc), 2 * A);
  *t3 = atan2(c * sin(*t4) - a * sin(t2), d + c * cos(*t4) - a * cos(t2));
  ex = a * cos(t2) + b * cos(*t3) - c * cos(*t4) - d;
  ey = a * sin(t2) + b * sin(*t3) - c * sin(*t4);
  return hypot(ex, ey) < 1e-10 * d;
}

void sketch_chain(const chain *c, kl_solver *s, double u) {
  fourbar loop;
  int k;
  double t3, t4;
  loop.a = 40;
  loop.b = 120;
  loop.c = 80;
  loop.d = 100;
  for (k = 0; k < c->n; k++) {
    freudenstein(&loop, u, +1, &t3, &t4);
    kl_set_link_angle(s, c->couplers[k], t3 + 0.05);
    kl_set_link_angle(s, c->rockers[k], t4 - 0.05);
    u = t4; /* the next loop's driver */
  }
}

static void snap_put(snapshot *sn, double v) {
  if (sn->n == SNAPSHOT_MAX)
    abort(); /* a test mechanism too large for a snapshot */
  sn->v[sn->n++] = v;
}

snapshot snap(const kl_solver *s) {
  const kl_model *m = kl_solver_model(s);
  int (*const point_getter[3])(const kl_solver *, int, double *) = {
      kl_point_position, kl_point_velocity, kl_point_acceleration};
  int ni = kl_model_input_count(m), l, j, p, i, g;
  snapshot sn;
  memset(&sn, 0, sizeof sn);
  for (l = 0; l < kl_model_link_count(m); l++) {
    snap_put(&sn, kl_link_angle(s, l));
    snap_put(&sn, kl_link_rate(s, l));
    snap_put(&sn, kl_link_accel(s, l));
    for (i = 0; i < ni; i++) {
      snap_put(&sn, kl_link_angle_deriv(s, l, i));
      snap_put(&sn, kl_link_angle_deriv2(s, l, i, i));
    }
  }
  for (j = 0; j < kl_model_joint_count(m); j++) {
    double f[2] = {NAN, NAN};
    snap_put(&sn, kl_joint_angle(s, j));
    snap_put(&sn, kl_joint_slide(s, j));
    snap_put(&sn, kl_joint_slide_rate(s, j));
    snap_put(&sn, kl_joint_slide_accel(s, j));
    snap_put(&sn, (double)kl_joint_force(s, j, f));
    snap_put(&sn, f[0]);
    snap_put(&sn, f[1]);
    snap_put(&sn, kl_joint_moment(s, j));
  }
  {
    double g[3] = {NAN, NAN, NAN};
    snap_put(&sn, (double)kl_ground_force(s, g));
    for (i = 0; i < 3; i++)
      snap_put(&sn, g[i]);
  }
  for (p = 0; p < kl_model_point_count(m); p++)
    for (g = 0; g < 3; g++) {
      double xy[2] = {NAN, NAN};
      snap_put(&sn, (double)point_getter[g](s, p, xy));
      snap_put(&sn, xy[0]);
      snap_put(&sn, xy[1]);
    }
  for (i = 0; i < ni; i++)
    snap_put(&sn, kl_input_value(s, i));
  return sn;
}

int same_state(const snapshot *a, const snapshot *b) {
  return a->n == b->n &&
         memcmp(a->v, b->v, (size_t)a->n * sizeof(double)) == 0;
}

double angle_diff(double a, double b) {
  double d = fmod(a - b, 2 * PI);
  if (d > PI)
    d -= 2 * PI;
  if (d <= -PI)
    d += 2 * PI;
  return d;
}

double rel_diff(double a, double b, double floor) {
  double scale = fabs(b) > floor ? fabs(b) : floor;
  return fabs(a - b) / scale;
}
