/*
 * test_forces.c - the force stage against what it does not compute itself:
 * the power balance and every link's Newton-Euler equilibrium (written
 * here, apart from lib/), the slider-crank's crank torque by free bodies,
 * the static effort by virtual work, direct solves against the cycle's
 * scaled ones; stage order, singular positions, indeterminate structures
 * and bad input, each with its own status and the state unchanged.
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "machines.h"
#include "suite.h"
#include "support.h"

/* Residuals of the balances, relative to the largest force (or moment, or
 * power) in them: the rounding of sums of a few dozen products of numbers
 * up to 1e6, well above 1e-16 and far below any modelling error. */
#define BALANCE_TOL 1e-10

/* ---- reading a link's state through the API ---- */

typedef struct {
  double mass, inertia, c[2];
  double g[2], vg[2], ag[2]; /* centre of mass: position, velocity, accel */
  double angle, omega, alpha;
} link_state;

static link_state read_link(const kl_solver *s, const machine *mc, int l) {
  const kl_model *m = kl_solver_model(s);
  link_state ls;
  ck_assert_int_eq(kl_model_link_mass(m, l, &ls.mass, ls.c, &ls.inertia),
                   KL_OK);
  ck_assert_int_eq(kl_point_position(s, mc->centre[l], ls.g), KL_OK);
  ck_assert_int_eq(kl_point_velocity(s, mc->centre[l], ls.vg), KL_OK);
  ck_assert_int_eq(kl_point_acceleration(s, mc->centre[l], ls.ag), KL_OK);
  ls.angle = kl_link_angle(s, l);
  ls.omega = kl_link_rate(s, l);
  ls.alpha = kl_link_accel(s, l);
  return ls;
}

static double cross(const double a[2], const double b[2]) {
  return a[0] * b[1] - a[1] * b[0];
}

/* Global position of joint j's point: link b's attachment point, placed by
 * b's frame origin and angle (where a joint's force acts). */
static void joint_point(const kl_solver *s, int j, double p[2]) {
  const kl_model *m = kl_solver_model(s);
  int links[2];
  double a_xy[2], b_xy[2], origin[2], t;
  kl_model_joint_links(m, j, links, a_xy, b_xy);
  kl_link_origin(s, links[1], origin);
  t = kl_link_angle(s, links[1]);
  p[0] = origin[0] + cos(t) * b_xy[0] - sin(t) * b_xy[1];
  p[1] = origin[1] + sin(t) * b_xy[0] + cos(t) * b_xy[1];
}

/*
 * Newton-Euler for every moving link with the reported joint forces (the
 * force of a on b at b's attachment point, and a moment, each link a
 * feeling the opposite), gravity at the centre of mass and the loads:
 * sum F = m a_G and sum M_G = I alpha. Then the whole linkage: the ground
 * force equals gravity and loads less the links' m a_G, its moment likewise
 * about the origin. Written here from the definitions, apart from lib/.
 */
static void check_equilibrium(const kl_solver *s, const machine *mc,
                              int nloads, const kl_load *loads,
                              const char *what) {
  const kl_model *m = kl_solver_model(s);
  int nl = kl_model_link_count(m), nj = kl_model_joint_count(m), l, j, k;
  double gravity[2], scale = kl_model_scale(m), force_scale = 0.0;
  double total[3] = {0, 0, 0}, ground[3];
  kl_model_gravity(m, gravity);
  for (j = 0; j < nj; j++) {
    double f[2];
    ck_assert_int_eq(kl_joint_force(s, j, f), KL_OK);
    force_scale = fmax(force_scale, hypot(f[0], f[1]));
    force_scale = fmax(force_scale, fabs(kl_joint_moment(s, j)) / scale);
  }
  for (l = 1; l < nl; l++) {
    link_state ls = read_link(s, mc, l);
    double f[2], moment = 0.0, inertia_force[2];
    f[0] = ls.mass * gravity[0];
    f[1] = ls.mass * gravity[1];
    inertia_force[0] = ls.mass * ls.ag[0];
    inertia_force[1] = ls.mass * ls.ag[1];
    for (k = 0; k < nloads; k++) {
      if (loads[k].kind == KL_LOAD_FORCE) {
        double xy[2], q[2], r[2], lf[2];
        int on = kl_model_point_link(m, loads[k].id, xy);
        if (on != l)
          continue;
        kl_point_position(s, loads[k].id, q);
        r[0] = q[0] - ls.g[0];
        r[1] = q[1] - ls.g[1];
        lf[0] = loads[k].fx;
        lf[1] = loads[k].fy;
        f[0] += lf[0];
        f[1] += lf[1];
        moment += cross(r, lf);
        total[2] += cross(q, lf);
      } else if (loads[k].id == l) {
        moment += loads[k].torque;
        total[2] += loads[k].torque;
      }
    }
    total[0] += f[0] - inertia_force[0];
    total[1] += f[1] - inertia_force[1];
    total[2] += ls.mass * cross(ls.g, gravity) - cross(ls.g, inertia_force) -
                ls.inertia * ls.alpha;
    for (j = 0; j < nj; j++) {
      int links[2];
      double jf[2], p[2], r[2], sign;
      kl_model_joint_links(m, j, links, NULL, NULL);
      if (links[0] != l && links[1] != l)
        continue;
      sign = links[1] == l ? 1.0 : -1.0;
      kl_joint_force(s, j, jf);
      joint_point(s, j, p);
      r[0] = p[0] - ls.g[0];
      r[1] = p[1] - ls.g[1];
      f[0] += sign * jf[0];
      f[1] += sign * jf[1];
      moment += sign * (cross(r, jf) + kl_joint_moment(s, j));
    }
    force_scale = fmax(force_scale, hypot(inertia_force[0], inertia_force[1]));
    force_scale = fmax(force_scale, ls.mass * hypot(gravity[0], gravity[1]));
    force_scale = fmax(force_scale, ls.inertia * fabs(ls.alpha) / scale);
    ck_assert_msg(hypot(f[0] - inertia_force[0], f[1] - inertia_force[1]) <=
                      BALANCE_TOL * force_scale,
                  "%s: link %d's forces miss m a_G by %g (scale %g)", what, l,
                  hypot(f[0] - inertia_force[0], f[1] - inertia_force[1]),
                  force_scale);
    ck_assert_msg(fabs(moment - ls.inertia * ls.alpha) <=
                      BALANCE_TOL * force_scale * scale,
                  "%s: link %d's moments miss I alpha by %g (scale %g)", what,
                  l, moment - ls.inertia * ls.alpha, force_scale * scale);
  }
  ck_assert_int_eq(kl_ground_force(s, ground), KL_OK);
  ck_assert_msg(fabs(ground[0] - total[0]) <= BALANCE_TOL * force_scale &&
                    fabs(ground[1] - total[1]) <= BALANCE_TOL * force_scale,
                "%s: the ground force (%g, %g) is not the links' balance "
                "(%g, %g)",
                what, ground[0], ground[1], total[0], total[1]);
  ck_assert_msg(fabs(ground[2] - total[2]) <=
                    BALANCE_TOL * force_scale * 10 * scale,
                "%s: the ground moment %g is not the links' balance %g", what,
                ground[2], total[2]);
}

/*
 * The power balance, independent of the force solve but for the efforts:
 * sum effort_i u_i' + loads' and gravity's power = d/dt of the kinetic
 * energy = sum m v_G . a_G + I omega alpha (the joints are ideal and do no
 * work). The rates and accelerations are kinloop's kinematics.
 */
static void check_power(const kl_solver *s, const machine *mc,
                        const double *efforts, const double *ud, int nloads,
                        const kl_load *loads, const char *what) {
  const kl_model *m = kl_solver_model(s);
  int nl = kl_model_link_count(m), l, i, k;
  double gravity[2], in = 0.0, kinetic = 0.0, size = 0.0;
  kl_model_gravity(m, gravity);
  for (i = 0; i < kl_model_input_count(m); i++) {
    in += efforts[i] * ud[i];
    size += fabs(efforts[i] * ud[i]);
  }
  for (k = 0; k < nloads; k++) {
    double p;
    if (loads[k].kind == KL_LOAD_FORCE) {
      double v[2];
      kl_point_velocity(s, loads[k].id, v);
      p = loads[k].fx * v[0] + loads[k].fy * v[1];
    } else {
      p = loads[k].torque * kl_link_rate(s, loads[k].id);
    }
    in += p;
    size += fabs(p);
  }
  for (l = 1; l < nl; l++) {
    link_state ls = read_link(s, mc, l);
    double pg = ls.mass * (gravity[0] * ls.vg[0] + gravity[1] * ls.vg[1]);
    double dk = ls.mass * (ls.vg[0] * ls.ag[0] + ls.vg[1] * ls.ag[1]) +
                ls.inertia * ls.omega * ls.alpha;
    in += pg;
    kinetic += dk;
    size += fabs(pg) + fabs(dk);
  }
  ck_assert_msg(fabs(in - kinetic) <= BALANCE_TOL * size,
                "%s: power in %.12g, rate of kinetic energy %.12g", what, in,
                kinetic);
}

/* Every balance at the solver's state after kl_solve_forces with loads. */
static void check_balances_with(const kl_solver *s, const machine *mc,
                                const double *efforts, const double *ud,
                                int nloads, const kl_load *loads,
                                const char *what) {
  check_equilibrium(s, mc, nloads, loads, what);
  check_power(s, mc, efforts, ud, nloads, loads, what);
}

/* The same with the machine's own loads. */
static void check_balances(const kl_solver *s, const machine *mc,
                           const double *efforts, const double *ud,
                           const char *what) {
  check_balances_with(s, mc, efforts, ud, mc->nloads, mc->loads, what);
}

/* ---- every machine over its motion ---- */

#define SAMPLES 48

START_TEST(balances_hold_at_every_sample) {
  machine mc = build_machine(_i, 1);
  kl_solver *s = machine_solver(&mc);
  int k;
  for (k = 0; k <= SAMPLES; k++) {
    double u[2], ud[2], udd[2], efforts[2];
    char what[80];
    snprintf(what, sizeof what, "%s, sample %d", mc.name, k);
    ck_assert_msg(machine_solve(&mc, s, k, SAMPLES) == KL_OK, "%s: %s", what,
                  kl_solver_error(s));
    machine_sample(&mc, k, SAMPLES, u, ud, udd);
    ck_assert_msg(kl_solve_forces(s, mc.nloads, mc.loads, efforts) == KL_OK,
                  "%s: %s", what, kl_solver_error(s));
    check_balances(s, &mc, efforts, ud, what);
  }
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

/* The efforts kl_solve_forces returns are the ones kinloop keeps: a
 * revolute input's torque is its joint's moment, a sliding input's force
 * its joint force's part along the slide. */
START_TEST(efforts_are_the_joint_actuation) {
  machine mc = build_machine(_i, 1);
  kl_solver *s = machine_solver(&mc);
  const kl_model *m = mc.m;
  double efforts[2], u[2], ud[2], udd[2];
  int i;
  ck_assert_int_eq(machine_solve(&mc, s, 3, SAMPLES), KL_OK);
  ck_assert_int_eq(kl_solve_forces(s, mc.nloads, mc.loads, efforts), KL_OK);
  machine_sample(&mc, 3, SAMPLES, u, ud, udd);
  check_balances(s, &mc, efforts, ud, mc.name);
  for (i = 0; i < mc.ninputs; i++) {
    int j = kl_model_input_joint(m, i), links[2];
    if (kl_model_joint_kind(m, j) == KL_JOINT_REVOLUTE) {
      ck_assert_double_eq(kl_joint_moment(s, j), efforts[i]);
    } else {
      double f[2], t;
      kl_model_joint_links(m, j, links, NULL, NULL);
      t = kl_link_angle(s, links[0]) + kl_model_joint_axis(m, j);
      kl_joint_force(s, j, f);
      ck_assert_double_eq_tol(f[0] * cos(t) + f[1] * sin(t), efforts[i],
                              1e-12 * fabs(efforts[i]));
    }
  }
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

/* ---- the slider-crank against its free bodies ---- */

/*
 * Crank torque of an in-line slider-crank at constant crank speed, by free
 * bodies (derived here; it is the textbook kinetostatic analysis). Crank
 * r about O2 = 0 at angle t, rod l at angle p from the crank pin B to the
 * block pin C = (x, 0) on the slide line, block mass m4. Kinematics:
 *   l sin p = -r sin t,  x = r cos t + l cos p,
 *   p' = -r cos t w / (l cos p),
 *   p'' = (r sin t w^2 + l sin p p'^2) / (l cos p)   (t'' = 0),
 *   x'' = -r cos t w^2 - l cos p p'^2 - l sin p p''.
 * Block: the rod's pin force F34 on it and the gas force -P along x give
 *   F34x - P = m4 x'' (gravity and the slide's reaction are across the
 *   slide): F34x = m4 x'' + P.
 * Rod (mass m3, centre G3 = B + R(p) g3, inertia I3): F23 - F34 + m3 g =
 *   m3 a_G3, so F23 = F34 + m3 (a_G3 - g); moments about G3:
 *   (B - G3) x F23 - (C - G3) x F34 = I3 p'', which with F23 gives
 *   (B - C) x F34 = I3 p'' - m3 (B - G3) x (a_G3 - g), linear in F34y.
 * Crank (about its fixed pivot, t'' = 0): T - B x F23 + G2 x m2 g = 0, so
 *   T = B x F23 - G2 x m2 g.
 * T is kinloop's input effort, F23 its crank-pin force (crank on rod), F34
 * its block-pin force (rod on block).
 */
START_TEST(slider_crank_torque_closed_form) {
  machine mc = build_machine(MACHINE_SLIDER_CRANK, 1);
  kl_solver *s = machine_solver(&mc);
  const kl_model *m = mc.m;
  double r = 50, l = 180, w = 20, zero = 0.0, g[2];
  double m2, m3, m4, i3, g2[2], g3[2];
  double gas = -mc.loads[0].fx;
  int k;
  kl_model_link_mass(m, 1, &m2, g2, NULL);
  kl_model_link_mass(m, 2, &m3, g3, &i3);
  kl_model_link_mass(m, 3, &m4, NULL, NULL);
  kl_model_gravity(m, g);
  for (k = 0; k < 72; k++) {
    double t = k * 5.0 * PI / 180.0 + 0.01, efforts[1];
    double sp = -r * sin(t) / l, cp = sqrt(1 - sp * sp);
    double pd = -r * cos(t) * w / (l * cp);
    double pdd = (r * sin(t) * w * w + l * sp * pd * pd) / (l * cp);
    double xdd = -r * cos(t) * w * w - l * cp * pd * pd - l * sp * pdd;
    double b[2], c[2], arm[2], ab[2], ag3[2], f34[2], f23[2], torque, rel[2];
    double got[2];
    b[0] = r * cos(t);
    b[1] = r * sin(t);
    c[0] = r * cos(t) + l * cp;
    c[1] = 0.0;
    arm[0] = cp * g3[0] - sp * g3[1]; /* R(p) g3, from B to G3 */
    arm[1] = sp * g3[0] + cp * g3[1];
    ab[0] = -r * w * w * cos(t);
    ab[1] = -r * w * w * sin(t);
    ag3[0] = ab[0] - pdd * arm[1] - pd * pd * arm[0];
    ag3[1] = ab[1] + pdd * arm[0] - pd * pd * arm[1];
    f34[0] = m4 * xdd + gas;
    rel[0] = ag3[0] - g[0];
    rel[1] = ag3[1] - g[1];
    {
      /* (B - C) x F34 = I3 p'' - m3 (B - G3) x (a_G3 - g) */
      double bc[2], bg[2], rhs;
      bc[0] = b[0] - c[0];
      bc[1] = b[1] - c[1];
      bg[0] = -arm[0];
      bg[1] = -arm[1];
      rhs = i3 * pdd - m3 * cross(bg, rel);
      f34[1] = (rhs + bc[1] * f34[0]) / bc[0];
    }
    f23[0] = f34[0] + m3 * rel[0];
    f23[1] = f34[1] + m3 * rel[1];
    {
      double g2w[2], m2g[2];
      g2w[0] = cos(t) * g2[0] - sin(t) * g2[1];
      g2w[1] = sin(t) * g2[0] + cos(t) * g2[1];
      m2g[0] = m2 * g[0];
      m2g[1] = m2 * g[1];
      torque = cross(b, f23) - cross(g2w, m2g);
    }
    ck_assert_int_eq(kl_solve_position(s, &t), KL_OK);
    ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(s, &zero), KL_OK);
    ck_assert_int_eq(kl_solve_forces(s, mc.nloads, mc.loads, efforts), KL_OK);
    check_balances(s, &mc, efforts, &w, "slider-crank by free bodies");
    ck_assert_msg(fabs(efforts[0] - torque) <= 1e-9 * fabs(torque) + 1e-6,
                  "crank %g: torque %.12g, free bodies %.12g", t, efforts[0],
                  torque);
    kl_joint_force(s, 1, got);
    ck_assert_msg(hypot(got[0] - f23[0], got[1] - f23[1]) <=
                      1e-9 * hypot(f23[0], f23[1]),
                  "crank %g: crank pin force (%g, %g), free bodies (%g, %g)",
                  t, got[0], got[1], f23[0], f23[1]);
    kl_joint_force(s, 2, got);
    ck_assert_msg(hypot(got[0] - f34[0], got[1] - f34[1]) <=
                      1e-9 * hypot(f34[0], f34[1]),
                  "crank %g: block pin force (%g, %g), free bodies (%g, %g)",
                  t, got[0], got[1], f34[0], f34[1]);
  }
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

/* ---- massless and weightless: the static effort by virtual work ---- */

START_TEST(massless_forces_equal_virtual_work) {
  machine mc = build_machine(_i, 0);
  kl_solver *s = machine_solver(&mc);
  int k, i;
  for (k = 0; k <= 12; k++) {
    double forces[2], virtual_work[2], u[2], ud[2], udd[2];
    ck_assert_int_eq(machine_solve(&mc, s, k, 12), KL_OK);
    ck_assert_int_eq(kl_solve_forces(s, mc.nloads, mc.loads, forces), KL_OK);
    machine_sample(&mc, k, 12, u, ud, udd);
    check_balances(s, &mc, forces, ud, "massless links");
    ck_assert_int_eq(kl_input_effort(s, mc.nloads, mc.loads, virtual_work),
                     KL_OK);
    for (i = 0; i < mc.ninputs; i++)
      ck_assert_msg(fabs(forces[i] - virtual_work[i]) <=
                        1e-10 * fabs(virtual_work[i]) + 1e-9,
                    "%s sample %d input %d: forces %.12g, virtual work %.12g",
                    mc.name, k, i, forces[i], virtual_work[i]);
  }
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

/* ---- reuse of the factors, superposition ---- */

START_TEST(load_cases_at_one_position) {
  machine mc = build_machine(MACHINE_SIXBAR, 1);
  kl_solver *s = machine_solver(&mc);
  kl_load half[MACHINE_MAX_LOADS];
  double e_all[1], e_none[1], e_half[1], e_again[1], f_all[2], f_again[2];
  double u[1], ud[1], udd[1];
  int k;
  ck_assert_int_eq(machine_solve(&mc, s, 5, SAMPLES), KL_OK);
  machine_sample(&mc, 5, SAMPLES, u, ud, udd);
  ck_assert_int_eq(kl_solve_forces(s, mc.nloads, mc.loads, e_all), KL_OK);
  check_balances(s, &mc, e_all, ud, "all loads");
  kl_joint_force(s, 4, f_all);
  ck_assert_int_eq(kl_solve_forces(s, 0, NULL, e_none), KL_OK);
  check_balances_with(s, &mc, e_none, ud, 0, NULL, "no loads");
  for (k = 0; k < mc.nloads; k++) {
    half[k] = mc.loads[k];
    half[k].fx *= 0.5;
    half[k].fy *= 0.5;
    half[k].torque *= 0.5;
  }
  ck_assert_int_eq(kl_solve_forces(s, mc.nloads, half, e_half), KL_OK);
  check_balances_with(s, &mc, e_half, ud, mc.nloads, half, "half loads");
  /* the forces are affine in the loads */
  ck_assert_double_eq_tol(e_half[0], 0.5 * (e_all[0] + e_none[0]),
                          1e-10 * fabs(e_all[0]));
  /* the same case again gives the same bits */
  ck_assert_int_eq(kl_solve_forces(s, mc.nloads, mc.loads, e_again), KL_OK);
  kl_joint_force(s, 4, f_again);
  ck_assert(e_again[0] == e_all[0] && f_again[0] == f_all[0] &&
            f_again[1] == f_all[1]);
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

/* ---- kernels ---- */

/* The kernel AUTO chooses for the force system, seen in the bits it
 * gives: the same as the small kernel's on the four-bar (9 unknowns), the
 * same as the banded kernel's on a chain of 100 loops (603 unknowns; the
 * loop system is banded there under AUTO too, so the positions agree to
 * the bit and any difference would be the force system's). */
static void forces_with_kernel(const kl_model *m, const chain *c,
                               const machine *mc, int kernel, double *out,
                               int *n) {
  kl_solver *s = c != NULL ? kl_solver_new(m) : machine_solver(mc);
  kl_options o;
  double u = 0.3, w = 9.0, a = 0.0, f[2];
  int j, nj = kl_model_joint_count(m);
  kl_options_default(&o);
  o.kernel = kernel;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_OK);
  if (c != NULL)
    sketch_chain(c, s, u);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &a), KL_OK);
  ck_assert_int_eq(kl_solve_forces(s, c != NULL ? 0 : mc->nloads,
                                   c != NULL ? NULL : mc->loads, out),
                   KL_OK);
  *n = 1;
  for (j = 0; j < nj; j++) {
    kl_joint_force(s, j, f);
    out[(*n)++] = f[0];
    out[(*n)++] = f[1];
  }
  kl_solver_free(s);
}

START_TEST(force_system_kernels) {
  static double auto_run[1024], chosen[1024];
  machine mc = build_machine(MACHINE_FOURBAR, 1);
  chain c = build_massive_chain(100);
  int n1, n2;
  forces_with_kernel(mc.m, NULL, &mc, KL_KERNEL_AUTO, auto_run, &n1);
  forces_with_kernel(mc.m, NULL, &mc, KL_KERNEL_SMALL, chosen, &n2);
  ck_assert_int_eq(n1, n2);
  ck_assert_msg(memcmp(auto_run, chosen, (size_t)n1 * sizeof(double)) == 0,
                "the four-bar's forces under AUTO are not the small kernel's");
  forces_with_kernel(c.m, &c, NULL, KL_KERNEL_AUTO, auto_run, &n1);
  forces_with_kernel(c.m, &c, NULL, KL_KERNEL_BANDED, chosen, &n2);
  ck_assert_int_eq(n1, n2);
  ck_assert_msg(memcmp(auto_run, chosen, (size_t)n1 * sizeof(double)) == 0,
                "the 100-loop chain's forces under AUTO are not the banded "
                "kernel's");
  /* and the dense kernel agrees to rounding */
  forces_with_kernel(c.m, &c, NULL, KL_KERNEL_DENSE, chosen, &n2);
  ck_assert_double_eq_tol(chosen[0], auto_run[0], 1e-9 * fabs(auto_run[0]));
  kl_model_free(mc.m);
  kl_model_free(c.m);
}
END_TEST

/* ---- the cycle figures ---- */

/* The cycle's forces, from the sweep's unit-rate rates scaled by w and
 * w^2, against direct solves at speed w and no input acceleration. */
START_TEST(cycle_scaling_matches_direct_solves) {
  machine mc = build_machine(_i == 0 ? MACHINE_FOURBAR : MACHINE_QUICK_RETURN, 1);
  kl_solver *s = machine_solver(&mc), *d = machine_solver(&mc);
  int cols = kl_cycle_columns(mc.m), nj = kl_model_joint_count(mc.m);
  int steps = 36, done = -1, k, j;
  double *rows = calloc((size_t)(steps + 1) * (size_t)cols, sizeof(double));
  kl_cycle c;
  ck_assert_int_eq(machine_solve(&mc, s, 0, 1), KL_OK);
  ck_assert_int_eq(machine_solve(&mc, d, 0, 1), KL_OK);
  kl_cycle_default(&c);
  c.from = mc.from[0];
  c.to = mc.to[0];
  c.steps = steps;
  c.speed = 14.0;
  ck_assert_int_eq(kl_cycle_table(s, &c, mc.nloads, mc.loads, rows,
                                  (size_t)(steps + 1) * (size_t)cols, &done),
                   KL_OK);
  ck_assert_int_eq(done, steps + 1);
  for (k = 0; k <= steps; k++) {
    const double *row = rows + (size_t)k * (size_t)cols;
    double u = row[0], w = c.speed, zero = 0.0, effort[1], g[3];
    ck_assert_double_eq_tol(u, c.from + (c.to - c.from) * k / steps, 1e-12);
    ck_assert_int_eq(kl_solve_position(d, &u), KL_OK);
    ck_assert_int_eq(kl_solve_velocity(d, &w), KL_OK);
    ck_assert_int_eq(kl_solve_acceleration(d, &zero), KL_OK);
    ck_assert_int_eq(kl_solve_forces(d, mc.nloads, mc.loads, effort), KL_OK);
    check_balances(d, &mc, effort, &w, "direct solve of a cycle sample");
    ck_assert_msg(fabs(row[1] - effort[0]) <= 1e-9 * fabs(effort[0]) + 1e-6,
                  "sample %d: cycle effort %.12g, direct %.12g", k, row[1],
                  effort[0]);
    for (j = 0; j < nj; j++) {
      double f[2];
      kl_joint_force(d, j, f);
      ck_assert_msg(hypot(row[2 + 3 * j] - f[0], row[3 + 3 * j] - f[1]) <=
                        1e-9 * hypot(f[0], f[1]) + 1e-6,
                    "sample %d joint %d: cycle (%g, %g), direct (%g, %g)", k,
                    j, row[2 + 3 * j], row[3 + 3 * j], f[0], f[1]);
    }
    kl_ground_force(d, g);
    ck_assert_double_eq_tol(row[2 + 3 * nj], g[0], 1e-9 * hypot(g[0], g[1]) + 1e-6);
    ck_assert_double_eq_tol(row[4 + 3 * nj], g[2], 1e-9 * fabs(g[2]) + 1e-3);
  }
  free(rows);
  kl_solver_free(s);
  kl_solver_free(d);
  kl_model_free(mc.m);
}
END_TEST

/* The summary against figures worked out here from the table: peaks and
 * where, trapezoid means and RMS; the table's work column against
 * Simpson's rule on the driven input's effort (fourth order in the step:
 * 1e-7 with 720 steps), and the energy fluctuation from that column and
 * its mean; the flywheel by dE / (Cs w^2) (common practice, no source). */
START_TEST(cycle_summary_matches_its_table) {
  machine mc = build_machine(_i == 0 ? MACHINE_FOURBAR : MACHINE_SIXBAR, 1);
  kl_solver *s = machine_solver(&mc);
  int cols = kl_cycle_columns(mc.m), nj = kl_model_joint_count(mc.m);
  int steps = 720, done, k, j;
  double *rows = calloc((size_t)(steps + 1) * (size_t)cols, sizeof(double));
  double simpson = 0.0, mean, e_min = 0.0, e_max = 0.0, peak = 0.0, sq = 0.0;
  double sum = 0.0, h, worst_work = 0.0, work_size = 0.0, span;
  kl_cycle c;
  kl_cycle_summary sum_out;
  kl_cycle_peak inputs[1], joints[8];
  ck_assert_int_eq(machine_solve(&mc, s, 0, 1), KL_OK);
  kl_cycle_default(&c);
  c.from = mc.from[0];
  c.to = mc.to[0];
  c.steps = steps;
  c.speed = 15.0;
  c.speed_fluctuation = 0.02;
  ck_assert_int_eq(kl_cycle_table(s, &c, mc.nloads, mc.loads, rows,
                                  (size_t)(steps + 1) * (size_t)cols, &done),
                   KL_OK);
  ck_assert_int_eq(machine_solve(&mc, s, 0, 1), KL_OK);
  sum_out.size = sizeof sum_out;
  ck_assert_int_eq(kl_cycle_summarize(s, &c, mc.nloads, mc.loads, &sum_out,
                                      inputs, joints),
                   KL_OK);
  ck_assert_int_eq(sum_out.sweep_status, KL_OK);
  ck_assert_int_eq(sum_out.steps_done, steps + 1);
  span = c.to - c.from;
  h = span / steps;
  for (k = 0; k <= steps; k++) {
    const double *row = rows + (size_t)k * (size_t)cols;
    double wgt = k == 0 || k == steps ? 0.5 : 1.0;
    if (k >= 2 && k % 2 == 0) {
      simpson += h / 3.0 * (row[1 - 2 * cols] + 4.0 * row[1 - cols] + row[1]);
      worst_work = fmax(worst_work, fabs(row[cols - 1] - simpson));
      work_size = fmax(work_size, fabs(simpson));
    }
    if (fabs(row[1]) > fabs(peak))
      peak = row[1];
    sum += wgt * row[1];
    sq += wgt * row[1] * row[1];
  }
  ck_assert_double_eq(inputs[0].peak, peak);
  ck_assert_double_eq_tol(inputs[0].mean, sum / steps, 1e-9 * fabs(peak));
  ck_assert_double_eq_tol(inputs[0].rms, sqrt(sq / steps), 1e-9 * fabs(peak));
  ck_assert_msg(worst_work <= 1e-7 * work_size,
                "the table's work column differs from Simpson's integral of "
                "the effort by %g (of %g)",
                worst_work, work_size);
  mean = rows[(size_t)steps * (size_t)cols + (size_t)cols - 1] / span;
  for (k = 0; k <= steps; k++) {
    const double *row = rows + (size_t)k * (size_t)cols;
    double excess = row[cols - 1] - mean * (row[0] - c.from);
    e_min = fmin(e_min, excess);
    e_max = fmax(e_max, excess);
  }
  ck_assert_msg(fabs(sum_out.energy_fluctuation - (e_max - e_min)) <=
                    1e-9 * (e_max - e_min),
                "energy fluctuation %.12g, from the table %.12g",
                sum_out.energy_fluctuation, e_max - e_min);
  ck_assert_double_eq_tol(sum_out.flywheel_inertia,
                          sum_out.energy_fluctuation /
                              (c.speed_fluctuation * c.speed * c.speed),
                          1e-12 * sum_out.flywheel_inertia);
  for (j = 0; j < nj; j++) {
    double big = 0.0;
    for (k = 0; k <= steps; k++) {
      const double *row = rows + (size_t)k * (size_t)cols;
      big = fmax(big, hypot(row[2 + 3 * j], row[3 + 3 * j]));
    }
    ck_assert_double_eq_tol(joints[j].peak, big, 1e-9 * big);
  }
  {
    double big = 0.0;
    for (k = 0; k <= steps; k++) {
      const double *row = rows + (size_t)k * (size_t)cols;
      big = fmax(big, hypot(row[2 + 3 * nj], row[3 + 3 * nj]));
    }
    ck_assert_double_eq_tol(sum_out.shaking_force.peak, big, 1e-9 * big);
  }
  free(rows);
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

/* Gravity alone over a full crank turn is conservative: the motor's mean
 * torque is zero (to the trapezoid rule's error), and at a standstill
 * speed the flywheel is undefined. */
START_TEST(cycle_of_a_conservative_machine) {
  machine mc = build_machine(MACHINE_FOURBAR, 1);
  kl_solver *s = machine_solver(&mc);
  kl_cycle c;
  kl_cycle_summary sum;
  kl_cycle_peak inputs[1];
  ck_assert_int_eq(machine_solve(&mc, s, 0, 1), KL_OK);
  kl_cycle_default(&c);
  c.from = 0.1;
  c.to = 0.1 + 2 * PI;
  c.speed = 10;
  c.speed_fluctuation = 0.05;
  sum.size = sizeof sum;
  ck_assert_int_eq(kl_cycle_summarize(s, &c, 0, NULL, &sum, inputs, NULL),
                   KL_OK);
  ck_assert_msg(fabs(inputs[0].mean) <= 1e-3 * inputs[0].rms,
                "mean torque %g against RMS %g", inputs[0].mean,
                inputs[0].rms);
  ck_assert(sum.energy_fluctuation > 0.0);
  ck_assert(isfinite(sum.flywheel_inertia));
  ck_assert(isnan(sum.limit_input));
  c.speed = 0.0;
  ck_assert_int_eq(kl_cycle_summarize(s, &c, 0, NULL, &sum, NULL, NULL),
                   KL_OK);
  ck_assert(isnan(sum.flywheel_inertia));
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

/* A cycle that meets a motion limit (the luffing cylinder cannot stretch
 * beyond its pivot's distance from the boom pin, 150 + |(120, -80)|, about
 * 294) reports KL_LIMIT with the figures of the part it reached. */
START_TEST(cycle_to_a_motion_limit) {
  machine mc = build_machine(MACHINE_LUFFING, 1);
  kl_solver *s = machine_solver(&mc);
  kl_cycle c;
  kl_cycle_summary sum;
  ck_assert_int_eq(machine_solve(&mc, s, 0, 1), KL_OK);
  kl_cycle_default(&c);
  c.input = 0;
  c.from = 150;
  c.to = 400;
  c.steps = 100;
  c.speed = 30;
  sum.size = sizeof sum;
  ck_assert_int_eq(kl_cycle_summarize(s, &c, mc.nloads, mc.loads, &sum, NULL,
                                      NULL),
                   KL_LIMIT);
  ck_assert_int_eq(sum.sweep_status, KL_LIMIT);
  ck_assert_int_gt(sum.steps_done, 1);
  ck_assert_int_lt(sum.steps_done, 101);
  ck_assert_msg(fabs(sum.limit_input - (150 + sqrt(120.0 * 120 + 80 * 80))) <
                    3.0,
                "limit at %g", sum.limit_input);
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

/* ---- stage order ---- */

START_TEST(forces_need_the_acceleration) {
  machine mc = build_machine(MACHINE_FOURBAR, 1);
  kl_solver *s = machine_solver(&mc);
  double u = 0.4, w = 3.0, a = 0.0, e[1], f[2], g[3];
  snapshot before;
  ck_assert_int_eq(kl_solve_forces(s, 0, NULL, e), KL_ESTAGE);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "solve forces needs"));
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  before = snap(s);
  ck_assert_int_eq(kl_solve_forces(s, 0, NULL, e), KL_ESTAGE);
  {
    snapshot after = snap(s);
    assert_same_state(&before, &after, "forces before the velocity");
  }
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_forces(s, 0, NULL, e), KL_ESTAGE);
  ck_assert_int_eq(kl_solve_acceleration(s, &a), KL_OK);
  ck_assert_int_eq(kl_joint_force(s, 0, f), KL_ESTAGE);
  ck_assert(isnan(kl_joint_moment(s, 0)));
  ck_assert_int_eq(kl_ground_force(s, g), KL_ESTAGE);
  ck_assert_int_eq(kl_solve_forces(s, 0, NULL, NULL), KL_OK);
  ck_assert_int_eq(kl_joint_force(s, 0, f), KL_OK);
  ck_assert_int_eq(kl_ground_force(s, g), KL_OK);
  ck_assert(isfinite(kl_joint_moment(s, 0)));
  /* a new velocity, acceleration or position makes them stale */
  ck_assert_int_eq(kl_solve_acceleration(s, &a), KL_OK);
  ck_assert_int_eq(kl_joint_force(s, 0, f), KL_ESTAGE);
  ck_assert_int_eq(kl_solve_forces(s, 0, NULL, NULL), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_joint_force(s, 0, f), KL_ESTAGE);
  ck_assert_int_eq(kl_solve_acceleration(s, &a), KL_OK);
  ck_assert_int_eq(kl_solve_forces(s, 0, NULL, NULL), KL_OK);
  u = 0.5;
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_joint_force(s, 0, f), KL_ESTAGE);
  ck_assert_int_eq(kl_ground_force(s, g), KL_ESTAGE);
  /* unknown ids and NULL */
  ck_assert_int_eq(kl_joint_force(s, 4, f), KL_EID);
  ck_assert_int_eq(kl_joint_force(s, -1, f), KL_EID);
  ck_assert_int_eq(kl_joint_force(s, 0, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_joint_force(NULL, 0, f), KL_EINVAL);
  ck_assert_int_eq(kl_ground_force(s, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_ground_force(NULL, g), KL_EINVAL);
  ck_assert(isnan(kl_joint_moment(NULL, 0)));
  ck_assert(isnan(kl_joint_moment(s, 9)));
  ck_assert_int_eq(kl_solve_forces(NULL, 0, NULL, NULL), KL_EINVAL);
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

/* A copied state carries its forces; a sketch makes them stale. */
START_TEST(forces_travel_with_the_state) {
  machine mc = build_machine(MACHINE_FOURBAR, 1);
  kl_solver *s = machine_solver(&mc), *t = machine_solver(&mc);
  double f[2], g[2];
  snapshot a, b;
  ck_assert_int_eq(machine_solve(&mc, s, 2, SAMPLES), KL_OK);
  ck_assert_int_eq(kl_solve_forces(s, mc.nloads, mc.loads, NULL), KL_OK);
  ck_assert_int_eq(kl_solver_copy_state(t, s), KL_OK);
  a = snap(s);
  b = snap(t);
  assert_same_state(&a, &b, "a copied state");
  kl_joint_force(t, 1, g);
  kl_joint_force(s, 1, f);
  ck_assert(f[0] == g[0] && f[1] == g[1]);
  ck_assert_int_eq(kl_set_link_angle(t, 2, 0.3), KL_OK);
  ck_assert_int_eq(kl_joint_force(t, 1, g), KL_ESTAGE);
  kl_solver_free(s);
  kl_solver_free(t);
  kl_model_free(mc.m);
}
END_TEST

/* ---- singular positions ---- */

/* A parallelogram four-bar at its change point, sketched exactly there:
 * the position solve reports the singular Jacobian, and the force stage
 * refuses too, with the state (and forces solved before) unchanged. */
START_TEST(forces_at_a_change_point) {
  kl_model *m = kl_model_new();
  int crank = kl_add_link(m, "crank"), coupler = kl_add_link(m, "coupler");
  int rocker = kl_add_link(m, "rocker"), pivot;
  kl_solver *s;
  double u = 0.8, w = 1.0, a = 0.0, zero = 0.0;
  snapshot before, after;
  pivot = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_revolute(m, crank, 40, 0, coupler, 0, 0);
  kl_add_revolute(m, coupler, 100, 0, rocker, 40, 0);
  kl_add_revolute(m, rocker, 0, 0, KL_GROUND, 100, 0);
  kl_add_input(m, pivot);
  kl_set_link_mass(m, coupler, 1.0, 50, 0, 900);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  kl_set_link_angle(s, coupler, 0.0);
  kl_set_link_angle(s, rocker, 0.8);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &a), KL_OK);
  ck_assert_int_eq(kl_solve_forces(s, 0, NULL, NULL), KL_OK);
  kl_set_link_angle(s, coupler, 0.0);
  kl_set_link_angle(s, rocker, 0.0);
  ck_assert_int_eq(kl_solve_position(s, &zero), KL_ESINGULAR);
  before = snap(s);
  ck_assert_int_eq(kl_solve_forces(s, 0, NULL, NULL), KL_ESINGULAR);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "singular"));
  after = snap(s);
  assert_same_state(&before, &after, "forces at a change point");
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* A slider-crank driven by its slide, a hair from the dead centre: solved
 * under the default singular test, then refused by the force stage once
 * the test is raised above the position's condition estimate. */
START_TEST(forces_at_a_dead_point) {
  kl_model *m = kl_model_new();
  int crank = kl_add_link(m, "crank"), rod = kl_add_link(m, "rod");
  int block = kl_add_link(m, "block"), slide;
  kl_solver *s;
  kl_options o;
  kl_solve_stats st;
  double u = 229.9999999, w = 1.0, a = 0.0;
  snapshot before, after;
  kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_revolute(m, crank, 50, 0, rod, 0, 0);
  kl_add_revolute(m, rod, 180, 0, block, 0, 0);
  slide = kl_add_prismatic(m, KL_GROUND, 0, 0, 0.0, block, 0, 0);
  kl_add_input(m, slide);
  kl_set_link_mass(m, rod, 1.0, 90, 0, 2000);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  kl_set_link_angle(s, crank, 0.05);
  kl_set_link_angle(s, rod, -0.01);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  st.size = sizeof st;
  kl_solver_stats(s, &st);
  ck_assert_msg(st.rcond > 1e-8 && st.rcond < 1e-3, "rcond %g", st.rcond);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &a), KL_OK);
  kl_options_default(&o);
  o.singular_rcond = 0.999e-3;
  ck_assert_int_eq(kl_solver_set_options(s, &o), KL_OK);
  before = snap(s);
  ck_assert_int_eq(kl_solve_forces(s, 0, NULL, NULL), KL_ESINGULAR);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "rcond"));
  after = snap(s);
  assert_same_state(&before, &after, "forces at a dead point");
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* ---- indeterminate structures ---- */

/* The parallelogram with a third parallel crank (one redundant
 * constraint): every force call refuses with its own status, saying how
 * many constraints are redundant, and changes nothing. */
START_TEST(indeterminate_structure) {
  kl_model *m = kl_model_new();
  int c1 = kl_add_link(m, "crank 1"), cp = kl_add_link(m, "coupler");
  int c2 = kl_add_link(m, "crank 2"), c3 = kl_add_link(m, "crank 3"), pivot;
  kl_solver *s;
  double u = 0.6, w = 2.0, a = 0.0, rows[64];
  kl_cycle c;
  kl_cycle_summary sum;
  snapshot before, after;
  pivot = kl_add_revolute(m, KL_GROUND, 0, 0, c1, 0, 0);
  kl_add_revolute(m, c1, 50, 0, cp, 0, 0);
  kl_add_revolute(m, cp, 100, 0, c2, 50, 0);
  kl_add_revolute(m, c2, 0, 0, KL_GROUND, 100, 0);
  kl_add_revolute(m, cp, 200, 0, c3, 50, 0);
  kl_add_revolute(m, c3, 0, 0, KL_GROUND, 200, 0);
  kl_add_input(m, pivot);
  kl_set_link_mass(m, cp, 2.0, 100, 0, 8000);
  ck_assert_int_eq(kl_model_set_redundancy(m, 1), KL_OK);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  s = kl_solver_new(m);
  kl_set_link_angle(s, cp, 0.0);
  kl_set_link_angle(s, c2, 0.6);
  kl_set_link_angle(s, c3, 0.6);
  ck_assert_int_eq(kl_solve_position(s, &u), KL_OK);
  ck_assert_int_eq(kl_solve_velocity(s, &w), KL_OK);
  ck_assert_int_eq(kl_solve_acceleration(s, &a), KL_OK);
  before = snap(s);
  ck_assert_int_eq(kl_solve_forces(s, 0, NULL, NULL), KL_EINDETERMINATE);
  ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "1 redundant constraint"));
  ck_assert_str_eq(kl_status_str(KL_EINDETERMINATE),
                   "statically indeterminate: forces not determined");
  kl_cycle_default(&c);
  c.steps = 4;
  sum.size = sizeof sum;
  ck_assert_int_eq(kl_cycle_summarize(s, &c, 0, NULL, &sum, NULL, NULL),
                   KL_EINDETERMINATE);
  ck_assert_int_eq(kl_cycle_table(s, &c, 0, NULL, rows, 64, NULL),
                   KL_EINDETERMINATE);
  after = snap(s);
  assert_same_state(&before, &after, "forces of an indeterminate structure");
  kl_solver_free(s);
  kl_model_free(m);
}
END_TEST

/* ---- bad input ---- */

START_TEST(bad_mass_properties) {
  kl_model *m = kl_model_new();
  int link = kl_add_link(m, "arm");
  double mass, c[2], inertia, g[2];
  ck_assert_int_eq(kl_set_link_mass(m, link, 2.0, 1.0, -3.0, 5.0), KL_OK);
  ck_assert_int_eq(kl_set_link_mass(m, link, -1.0, 0, 0, 1.0), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "negative mass"));
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "'arm'"));
  ck_assert_int_eq(kl_set_link_mass(m, link, 1.0, 0, 0, -2.0), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "moment of inertia"));
  ck_assert_int_eq(kl_set_link_mass(m, link, NAN, 0, 0, 1.0), KL_ENONFINITE);
  ck_assert_int_eq(kl_set_link_mass(m, link, 1.0, INFINITY, 0, 1.0),
                   KL_ENONFINITE);
  ck_assert_int_eq(kl_set_link_mass(m, link, 1.0, 0, NAN, 1.0), KL_ENONFINITE);
  ck_assert_int_eq(kl_set_link_mass(m, link, 1.0, 0, 0, -INFINITY),
                   KL_ENONFINITE);
  ck_assert_int_eq(kl_set_link_mass(m, KL_GROUND, 1.0, 0, 0, 1.0), KL_EKIND);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "ground"));
  ck_assert_int_eq(kl_set_link_mass(m, 7, 1.0, 0, 0, 1.0), KL_EID);
  ck_assert_int_eq(kl_set_link_mass(m, -1, 1.0, 0, 0, 1.0), KL_EID);
  ck_assert_int_eq(kl_set_link_mass(NULL, 1, 1.0, 0, 0, 1.0), KL_EINVAL);
  /* every refusal left the first call's values */
  ck_assert_int_eq(kl_model_link_mass(m, link, &mass, c, &inertia), KL_OK);
  ck_assert(mass == 2.0 && c[0] == 1.0 && c[1] == -3.0 && inertia == 5.0);
  /* a link never given them is massless; ground too */
  ck_assert_int_eq(kl_model_link_mass(m, KL_GROUND, &mass, c, &inertia), KL_OK);
  ck_assert(mass == 0.0 && c[0] == 0.0 && c[1] == 0.0 && inertia == 0.0);
  ck_assert_int_eq(kl_model_link_mass(m, link, NULL, NULL, NULL), KL_OK);
  ck_assert_int_eq(kl_model_link_mass(m, 5, &mass, c, &inertia), KL_EID);
  ck_assert_int_eq(kl_model_link_mass(NULL, 1, &mass, c, &inertia), KL_EINVAL);
  /* zero mass and inertia are allowed */
  ck_assert_int_eq(kl_set_link_mass(m, link, 0.0, 0, 0, 0.0), KL_OK);
  /* gravity */
  ck_assert_int_eq(kl_model_gravity(m, g), KL_OK);
  ck_assert(g[0] == 0.0 && g[1] == 0.0);
  ck_assert_int_eq(kl_model_set_gravity(m, 0.0, -9.81), KL_OK);
  ck_assert_int_eq(kl_model_set_gravity(m, NAN, 0.0), KL_ENONFINITE);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "gravity"));
  ck_assert_int_eq(kl_model_set_gravity(m, 0.0, INFINITY), KL_ENONFINITE);
  ck_assert_int_eq(kl_model_set_gravity(NULL, 0.0, 1.0), KL_EINVAL);
  ck_assert_int_eq(kl_model_gravity(m, g), KL_OK);
  ck_assert(g[0] == 0.0 && g[1] == -9.81);
  ck_assert_int_eq(kl_model_gravity(m, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_model_gravity(NULL, g), KL_EINVAL);
  /* redundancy */
  ck_assert_int_eq(kl_model_set_redundancy(m, -1), KL_EINVAL);
  ck_assert_int_eq(kl_model_redundancy(m), 0);
  ck_assert_int_eq(kl_model_set_redundancy(NULL, 1), KL_EINVAL);
  ck_assert_int_eq(kl_model_redundancy(NULL), KL_EINVAL);
  /* after finalize: readable, not writable */
  kl_add_input(m, kl_add_revolute(m, KL_GROUND, 0, 0, link, 0, 0));
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ck_assert_int_eq(kl_set_link_mass(m, link, 1.0, 0, 0, 1.0), KL_ESTATE);
  ck_assert_int_eq(kl_model_set_gravity(m, 1.0, 0.0), KL_ESTATE);
  ck_assert_int_eq(kl_model_set_redundancy(m, 1), KL_ESTATE);
  ck_assert_int_eq(kl_model_link_mass(m, link, &mass, c, &inertia), KL_OK);
  ck_assert(mass == 0.0);
  ck_assert_int_eq(kl_model_gravity(m, g), KL_OK);
  ck_assert(g[1] == -9.81);
  kl_model_free(m);
}
END_TEST

/* Loads and the working speed recorded in the model: read back as given,
 * refused with their own status (the model unchanged), and the working
 * cycle composed from the speed and the sweep settings. */
START_TEST(recorded_loads_and_working_speed) {
  kl_model *m = kl_model_new();
  kl_load bad, back;
  kl_sweep_settings sw;
  kl_cycle c, direct;
  double speed, cs;
  int link, joint, point, input;
  link = kl_add_link(m, "arm");
  joint = kl_add_revolute(m, KL_GROUND, 0, 0, link, 0, 0);
  point = kl_add_point(m, link, 50, 0, "tip");
  ck_assert_int_eq(kl_model_load_count(m), 0);
  memset(&bad, 0, sizeof bad);
  bad.kind = KL_LOAD_FORCE;
  bad.id = point;
  bad.fy = -3.0;
  ck_assert_int_eq(kl_add_load(m, &bad), 0);
  bad.kind = KL_LOAD_TORQUE;
  bad.id = link;
  bad.torque = 7.0;
  ck_assert_int_eq(kl_add_load(m, &bad), 1);
  /* refusals, each its own status, the list unchanged */
  bad.id = 5;
  ck_assert_int_eq(kl_add_load(m, &bad), KL_EID);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "link index 5 (0-based)"));
  bad.id = link;
  bad.torque = NAN;
  ck_assert_int_eq(kl_add_load(m, &bad), KL_ENONFINITE);
  bad.kind = 3;
  ck_assert_int_eq(kl_add_load(m, &bad), KL_EKIND);
  bad.kind = KL_LOAD_FORCE;
  bad.id = 1;
  ck_assert_int_eq(kl_add_load(m, &bad), KL_EID);
  ck_assert_int_eq(kl_add_load(m, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_add_load(NULL, &bad), KL_EINVAL);
  ck_assert_int_eq(kl_model_load_count(m), 2);
  ck_assert_int_eq(kl_model_load(m, 0, &back), KL_OK);
  ck_assert(back.kind == KL_LOAD_FORCE && back.id == point && back.fy == -3.0);
  ck_assert_int_eq(kl_model_load(m, 1, &back), KL_OK);
  ck_assert(back.kind == KL_LOAD_TORQUE && back.torque == 7.0);
  ck_assert_int_eq(kl_model_load(m, 2, &back), KL_EID);
  ck_assert_int_eq(kl_model_load(m, -1, &back), KL_EID);
  ck_assert_int_eq(kl_model_load(m, 0, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_model_load_count(NULL), KL_EINVAL);
  /* the working speed */
  kl_cycle_default(&c);
  ck_assert_int_eq(kl_model_speed(m, &input, &speed, &cs), KL_EID);
  ck_assert_int_eq(kl_model_cycle(m, &c), KL_EID);
  ck_assert_int_eq(kl_model_set_speed(m, 0, 2.0, 0.0), KL_EID); /* no input yet */
  kl_add_input(m, joint);
  ck_assert_int_eq(kl_model_set_speed(m, 0, NAN, 0.0), KL_ENONFINITE);
  ck_assert_int_eq(kl_model_set_speed(m, 0, 2.0, INFINITY), KL_ENONFINITE);
  ck_assert_int_eq(kl_model_set_speed(m, 0, 2.0, -0.1), KL_EINVAL);
  ck_assert_ptr_nonnull(strstr(kl_model_error(m), "speed fluctuation"));
  ck_assert_int_eq(kl_model_speed(m, NULL, NULL, NULL), KL_EID);
  ck_assert_int_eq(kl_model_set_speed(m, 0, -12.5, 0.03), KL_OK);
  ck_assert_int_eq(kl_model_speed(m, &input, &speed, &cs), KL_OK);
  ck_assert(input == 0 && speed == -12.5 && cs == 0.03);
  ck_assert_int_eq(kl_model_speed(m, NULL, NULL, NULL), KL_OK);
  ck_assert_int_eq(kl_model_speed(NULL, &input, &speed, &cs), KL_EINVAL);
  /* the cycle: the defaults' range without a sweep of that input, the
   * sweep's with one */
  ck_assert_int_eq(kl_model_cycle(m, &c), KL_OK);
  kl_cycle_default(&direct);
  ck_assert(c.input == 0 && c.speed == -12.5 && c.speed_fluctuation == 0.03);
  ck_assert(c.from == direct.from && c.to == direct.to && c.steps == direct.steps);
  sw.size = sizeof sw;
  sw.input = 0;
  sw.from = 1.0;
  sw.to = 3.0;
  sw.steps = 40;
  kl_model_set_sweep(m, &sw);
  ck_assert_int_eq(kl_model_cycle(m, &c), KL_OK);
  ck_assert(c.from == 1.0 && c.to == 3.0 && c.steps == 40);
  c.size = sizeof c.size;
  ck_assert_int_eq(kl_model_cycle(m, &c), KL_OK); /* no field past size */
  ck_assert_int_eq(kl_model_cycle(m, NULL), KL_EINVAL);
  c.size = 0;
  ck_assert_int_eq(kl_model_cycle(m, &c), KL_EINVAL);
  ck_assert_int_eq(kl_model_finalize(m), KL_OK);
  ck_assert_int_eq(kl_add_load(m, &back), KL_ESTATE);
  ck_assert_int_eq(kl_model_set_speed(m, 0, 1.0, 0.0), KL_ESTATE);
  ck_assert_int_eq(kl_model_load_count(m), 2);
  kl_model_free(m);
}
END_TEST

START_TEST(bad_loads_change_nothing) {
  machine mc = build_machine(MACHINE_FOURBAR, 1);
  kl_solver *s = machine_solver(&mc);
  kl_load bad[6];
  int expect[6] = {KL_EID, KL_EID, KL_EKIND, KL_ENONFINITE, KL_ENONFINITE,
                   KL_ENONFINITE};
  const char *said[6] = {"point index 9 (0-based)", "link index 11 (0-based)",
                         "kind 7", "NaN or infinite",
                         "NaN or infinite", "NaN or infinite"};
  double e[1];
  int k;
  snapshot before, after;
  ck_assert_int_eq(machine_solve(&mc, s, 1, SAMPLES), KL_OK);
  ck_assert_int_eq(kl_solve_forces(s, mc.nloads, mc.loads, e), KL_OK);
  for (k = 0; k < 6; k++)
    bad[k] = mc.loads[0];
  bad[0].id = 9;
  bad[1].kind = KL_LOAD_TORQUE;
  bad[1].id = 11;
  bad[2].kind = 7;
  bad[3].fx = NAN;
  bad[4].fy = -INFINITY;
  bad[5].kind = KL_LOAD_TORQUE;
  bad[5].id = 2;
  bad[5].torque = NAN;
  before = snap(s);
  for (k = 0; k < 6; k++) {
    kl_load two[2];
    two[0] = mc.loads[1];
    two[1] = bad[k];
    ck_assert_int_eq(kl_solve_forces(s, 2, two, e), expect[k]);
    ck_assert_msg(strstr(kl_solver_error(s), said[k]) != NULL,
                  "case %d: %s", k, kl_solver_error(s));
    ck_assert_ptr_nonnull(strstr(kl_solver_error(s), "load index 1 (0-based)"));
    after = snap(s);
    assert_same_state(&before, &after, "a bad load");
  }
  ck_assert_int_eq(kl_solve_forces(s, -1, mc.loads, e), KL_EINVAL);
  ck_assert_int_eq(kl_solve_forces(s, 1, NULL, e), KL_EINVAL);
  after = snap(s);
  assert_same_state(&before, &after, "a bad load count");
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

START_TEST(bad_cycles_change_nothing) {
  machine mc = build_machine(MACHINE_FOURBAR, 1);
  kl_solver *s = machine_solver(&mc);
  int cols = kl_cycle_columns(mc.m);
  double rows[2048];
  kl_cycle c, good;
  kl_cycle_summary sum;
  snapshot before, after;
  int k;
  ck_assert_int_eq(cols, 1 + 1 + 3 * 4 + 5);
  ck_assert_int_eq(kl_cycle_columns(NULL), KL_EINVAL);
  ck_assert_int_eq(machine_solve(&mc, s, 1, SAMPLES), KL_OK);
  ck_assert_int_eq(kl_solve_forces(s, mc.nloads, mc.loads, NULL), KL_OK);
  kl_cycle_default(&good);
  good.steps = 8;
  sum.size = sizeof sum;
  before = snap(s);
  for (k = 0; k < 8; k++) {
    int want;
    c = good;
    switch (k) {
    case 0: c.size = 8; want = KL_EINVAL; break;
    case 1: c.steps = 0; want = KL_EINVAL; break;
    case 2: c.speed = NAN; want = KL_ENONFINITE; break;
    case 3: c.to = INFINITY; want = KL_ENONFINITE; break;
    case 4: c.speed_fluctuation = -0.1; want = KL_EINVAL; break;
    case 5: c.input = 1; want = KL_EID; break;
    case 6: c.input = -1; want = KL_EID; break;
    default: c.steps = 200; want = KL_EINVAL; break; /* rows too small */
    }
    if (k < 7)
      ck_assert_int_eq(kl_cycle_summarize(s, &c, 0, NULL, &sum, NULL, NULL),
                       want);
    ck_assert_int_eq(kl_cycle_table(s, &c, 0, NULL, rows, 2048, NULL), want);
    ck_assert_msg(kl_solver_error(s)[0] != '\0', "case %d has no message", k);
    after = snap(s);
    assert_same_state(&before, &after, "a bad cycle");
  }
  ck_assert_int_eq(kl_cycle_summarize(s, NULL, 0, NULL, &sum, NULL, NULL),
                   KL_EINVAL);
  ck_assert_int_eq(kl_cycle_summarize(s, &good, 0, NULL, NULL, NULL, NULL),
                   KL_EINVAL);
  ck_assert_int_eq(kl_cycle_table(s, &good, 0, NULL, NULL, 0, NULL), KL_EINVAL);
  ck_assert_int_eq(kl_cycle_summarize(NULL, &good, 0, NULL, &sum, NULL, NULL),
                   KL_EINVAL);
  ck_assert_int_eq(kl_cycle_table(NULL, &good, 0, NULL, rows, 2048, NULL),
                   KL_EINVAL);
  ck_assert_int_eq(kl_cycle_summarize(s, &good, -2, NULL, &sum, NULL, NULL),
                   KL_EINVAL);
  after = snap(s);
  assert_same_state(&before, &after, "a bad cycle call");
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

/* A cycle that cannot start (the start does not assemble) puts the solver
 * back, forces included. */
START_TEST(failed_cycle_puts_the_state_back) {
  machine mc = build_machine(MACHINE_LUFFING, 1);
  kl_solver *s = machine_solver(&mc);
  double rows[4096];
  kl_cycle c;
  snapshot before, after;
  ck_assert_int_eq(machine_solve(&mc, s, 0, 1), KL_OK);
  ck_assert_int_eq(kl_solve_forces(s, mc.nloads, mc.loads, NULL), KL_OK);
  kl_cycle_default(&c);
  c.from = 1000.0; /* the cylinder cannot stretch that far */
  c.to = 1100.0;
  c.steps = 10;
  before = snap(s);
  ck_assert_int_eq(kl_cycle_table(s, &c, mc.nloads, mc.loads, rows, 4096, NULL),
                   KL_ENOASSEMBLY);
  after = snap(s);
  assert_same_state(&before, &after, "a cycle that cannot start");
  kl_solver_free(s);
  kl_model_free(mc.m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("forces");
  TCase *tc = tcase_create("balances");
  TCase *bad = tcase_create("bad input");
  tcase_set_timeout(tc, 120);
  tcase_add_loop_test(tc, balances_hold_at_every_sample, 0, MACHINE_COUNT);
  tcase_add_loop_test(tc, efforts_are_the_joint_actuation, 0, MACHINE_COUNT);
  tcase_add_loop_test(tc, massless_forces_equal_virtual_work, 0,
                      MACHINE_COUNT);
  tcase_add_test(tc, slider_crank_torque_closed_form);
  tcase_add_test(tc, load_cases_at_one_position);
  tcase_add_test(tc, force_system_kernels);
  tcase_add_loop_test(tc, cycle_scaling_matches_direct_solves, 0, 2);
  tcase_add_loop_test(tc, cycle_summary_matches_its_table, 0, 2);
  tcase_add_test(tc, cycle_of_a_conservative_machine);
  tcase_add_test(tc, cycle_to_a_motion_limit);
  suite_add_tcase(suite, tc);
  tcase_add_test(bad, forces_need_the_acceleration);
  tcase_add_test(bad, forces_travel_with_the_state);
  tcase_add_test(bad, forces_at_a_change_point);
  tcase_add_test(bad, forces_at_a_dead_point);
  tcase_add_test(bad, indeterminate_structure);
  tcase_add_test(bad, bad_mass_properties);
  tcase_add_test(bad, recorded_loads_and_working_speed);
  tcase_add_test(bad, bad_loads_change_nothing);
  tcase_add_test(bad, bad_cycles_change_nothing);
  tcase_add_test(bad, failed_cycle_puts_the_state_back);
  suite_add_tcase(suite, bad);
  return run_suite(suite);
}
