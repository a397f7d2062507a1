/*
 * machines.c - the mechanisms with mass properties shared by the force
 * tests, the reference comparison and the benchmark (geometry, masses and
 * loads chosen for the tests; mm, kg, s).
 */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "machines.h"
#include "support.h"

static void mass(machine *mc, int massive, int link, double m, double cx,
                 double cy, double inertia) {
  char name[16];
  snprintf(name, sizeof name, "G%d", link);
  if (massive)
    kl_set_link_mass(mc->m, link, m, cx, cy, inertia);
  mc->centre[link] = kl_add_point(mc->m, link, cx, cy, name);
}

static void force_at(machine *mc, int point, double fx, double fy) {
  kl_load *l = &mc->loads[mc->nloads++];
  memset(l, 0, sizeof *l);
  l->kind = KL_LOAD_FORCE;
  l->id = point;
  l->fx = fx;
  l->fy = fy;
}

static void torque_on(machine *mc, int link, double torque) {
  kl_load *l = &mc->loads[mc->nloads++];
  memset(l, 0, sizeof *l);
  l->kind = KL_LOAD_TORQUE;
  l->id = link;
  l->torque = torque;
}

static void sketch(machine *mc, int link, double angle) {
  mc->sketch_link[mc->nsketch] = link;
  mc->sketch_angle[mc->nsketch++] = angle;
}

static void motion(machine *mc, int input, double from, double to,
                   double rate, double accel) {
  mc->from[input] = from;
  mc->to[input] = to;
  mc->rate[input] = rate;
  mc->accel[input] = accel;
}

/* The crank-rocker four-bar of support.c's build_fourbar (ground 100, crank
 * 40, coupler 120, rocker 80): links 1, 2, 3, joints 0 to 3. */
static void fourbar_links(machine *mc, int massive) {
  int crank = kl_add_link(mc->m, "crank"), coupler = kl_add_link(mc->m, "coupler");
  int rocker = kl_add_link(mc->m, "rocker");
  int pivot = kl_add_revolute(mc->m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_revolute(mc->m, crank, 40, 0, coupler, 0, 0);
  kl_add_revolute(mc->m, coupler, 120, 0, rocker, 80, 0);
  kl_add_revolute(mc->m, rocker, 0, 0, KL_GROUND, 100, 0);
  kl_add_input(mc->m, pivot);
  mass(mc, massive, crank, 0.4, 20, 0, 80);
  mass(mc, massive, coupler, 1.1, 60, 12, 1600);
  mass(mc, massive, rocker, 0.8, 40, 3, 500);
}

/* The four-bar's coupler and rocker sketch at crank angle u. */
static void fourbar_sketch(machine *mc, double u) {
  fourbar f;
  double t3, t4;
  memset(&f, 0, sizeof f);
  f.a = 40;
  f.b = 120;
  f.c = 80;
  f.d = 100;
  freudenstein(&f, u, +1, &t3, &t4);
  sketch(mc, 2, t3);
  sketch(mc, 3, t4);
}

static void build_fourbar_machine(machine *mc, int massive) {
  int tool;
  mc->name = "four-bar";
  fourbar_links(mc, massive);
  tool = kl_add_point(mc->m, 2, 100, 30, "tool");
  force_at(mc, tool, 25000, -15000);
  torque_on(mc, 3, -3e5);
  fourbar_sketch(mc, 0.1);
  motion(mc, 0, 0.1, 0.1 + 2 * PI, 12, 25);
}

static void build_slider_crank_machine(machine *mc, int massive) {
  int crank = kl_add_link(mc->m, "crank"), rod = kl_add_link(mc->m, "rod");
  int block = kl_add_link(mc->m, "block"), pivot, face;
  pivot = kl_add_revolute(mc->m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_revolute(mc->m, crank, 50, 0, rod, 0, 0);
  kl_add_revolute(mc->m, rod, 180, 0, block, 0, 0);
  mc->sketch_joint = kl_add_prismatic(mc->m, KL_GROUND, 0, 0, 0.0, block, 0, 0);
  mc->sketch_slide = 230;
  kl_add_input(mc->m, pivot);
  mc->name = "slider-crank";
  mass(mc, massive, crank, 0.6, 15, 0, 150);
  mass(mc, massive, rod, 1.0, 70, 8, 3000);
  mass(mc, massive, block, 1.5, 0, 0, 0);
  face = kl_add_point(mc->m, block, 0, 0, "piston face");
  force_at(mc, face, -20000, 0);
  sketch(mc, rod, 0.0);
  motion(mc, 0, 0.0, 2 * PI, 20, 5);
}

static void build_sixbar_machine(machine *mc, int massive) {
  int rod, block, face;
  mc->name = "six-bar with slider";
  fourbar_links(mc, massive);
  rod = kl_add_link(mc->m, "rod");
  block = kl_add_link(mc->m, "block");
  kl_add_revolute(mc->m, 3, 60, 40, rod, 0, 0);
  kl_add_revolute(mc->m, rod, 150, 0, block, 0, 0);
  mc->sketch_joint =
      kl_add_prismatic(mc->m, KL_GROUND, 0, -160, 0.0, block, 0, 0);
  mc->sketch_slide = 270;
  mass(mc, massive, rod, 0.7, 75, 0, 1300);
  mass(mc, massive, block, 2.0, 0, 0, 0);
  face = kl_add_point(mc->m, block, 0, 0, "ram face");
  force_at(mc, face, -30000, 0);
  fourbar_sketch(mc, 0.1);
  sketch(mc, rod, -0.8);
  motion(mc, 0, 0.1, 0.1 + 2 * PI, 12, 25);
}

static void build_fivebar_machine(machine *mc, int massive) {
  int c1 = kl_add_link(mc->m, "left crank"), c2 = kl_add_link(mc->m, "right crank");
  int l1 = kl_add_link(mc->m, "left arm"), l2 = kl_add_link(mc->m, "right arm");
  int p1, p2, tip;
  mc->name = "five-bar";
  p1 = kl_add_revolute(mc->m, KL_GROUND, 0, 0, c1, 0, 0);
  p2 = kl_add_revolute(mc->m, KL_GROUND, 60, 0, c2, 0, 0);
  kl_add_revolute(mc->m, c1, 40, 0, l1, 0, 0);
  kl_add_revolute(mc->m, c2, 40, 0, l2, 0, 0);
  kl_add_revolute(mc->m, l1, 100, 0, l2, 100, 0);
  kl_add_input(mc->m, p1);
  kl_add_input(mc->m, p2);
  mass(mc, massive, c1, 0.3, 20, 0, 50);
  mass(mc, massive, c2, 0.3, 20, 0, 50);
  mass(mc, massive, l1, 0.6, 50, 0, 600);
  mass(mc, massive, l2, 0.6, 50, 5, 600);
  tip = kl_add_point(mc->m, l1, 100, 0, "tip");
  force_at(mc, tip, 5000, -20000);
  sketch(mc, l1, 1.0);
  sketch(mc, l2, 2.1);
  motion(mc, 0, 2.0, 2.6, 6, 3);
  motion(mc, 1, 1.0, 0.5, -5, 2);
}

static void build_quick_return_machine(machine *mc, int massive) {
  int crank = kl_add_link(mc->m, "crank"), rocker = kl_add_link(mc->m, "slotted arm");
  int pivot, tip;
  mc->name = "quick-return";
  pivot = kl_add_revolute(mc->m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_revolute(mc->m, KL_GROUND, 0, -100, rocker, 0, 0);
  mc->sketch_joint = kl_add_slot(mc->m, rocker, 0, 0, 0.0, crank, 40, 0);
  mc->sketch_slide = 107.7;
  kl_add_input(mc->m, pivot);
  mass(mc, massive, crank, 0.5, 10, 0, 100);
  mass(mc, massive, rocker, 2.0, 110, 0, 9000);
  tip = kl_add_point(mc->m, rocker, 220, 0, "arm tip");
  force_at(mc, tip, -10000, 0);
  torque_on(mc, crank, 2e4);
  sketch(mc, rocker, 1.19);
  motion(mc, 0, 0.0, 2 * PI, 8, 0);
}

static void build_luffing_machine(machine *mc, int massive) {
  int boom = kl_add_link(mc->m, "boom"), body = kl_add_link(mc->m, "cylinder");
  int rod = kl_add_link(mc->m, "piston rod"), cylinder, tip;
  mc->name = "luffing boom";
  kl_add_revolute(mc->m, KL_GROUND, 0, 0, boom, 0, 0);
  kl_add_revolute(mc->m, KL_GROUND, 120, -80, body, 0, 0);
  kl_add_revolute(mc->m, boom, 150, 0, rod, 0, 0);
  cylinder = kl_add_prismatic(mc->m, body, 0, 0, 0.0, rod, 0, 0);
  kl_add_input(mc->m, cylinder);
  mc->sketch_joint = -1;
  mass(mc, massive, boom, 8.0, 180, 10, 1.2e5);
  mass(mc, massive, body, 3.0, 60, 0, 4000);
  mass(mc, massive, rod, 1.0, -40, 0, 800);
  tip = kl_add_point(mc->m, boom, 400, 0, "hook");
  force_at(mc, tip, 0, -50000);
  sketch(mc, boom, 0.5);
  sketch(mc, body, 1.49);
  motion(mc, 0, 150, 200, 40, -10);
}

machine build_machine(int which, int massive) {
  machine mc;
  int l;
  memset(&mc, 0, sizeof mc);
  for (l = 0; l < MACHINE_MAX_LINKS; l++)
    mc.centre[l] = -1;
  mc.sketch_joint = -1;
  mc.m = kl_model_new();
  switch (which) {
  case MACHINE_FOURBAR: build_fourbar_machine(&mc, massive); break;
  case MACHINE_SLIDER_CRANK: build_slider_crank_machine(&mc, massive); break;
  case MACHINE_SIXBAR: build_sixbar_machine(&mc, massive); break;
  case MACHINE_FIVEBAR: build_fivebar_machine(&mc, massive); break;
  case MACHINE_QUICK_RETURN: build_quick_return_machine(&mc, massive); break;
  default: build_luffing_machine(&mc, massive); break;
  }
  if (massive)
    kl_model_set_gravity(mc.m, 0, -MACHINE_G);
  mc.ninputs = kl_model_input_count(mc.m);
  kl_model_finalize(mc.m);
  return mc;
}

kl_solver *machine_solver(const machine *mc) {
  kl_solver *s = kl_solver_new(mc->m);
  int k;
  for (k = 0; k < mc->nsketch; k++)
    kl_set_link_angle(s, mc->sketch_link[k], mc->sketch_angle[k]);
  if (mc->sketch_joint >= 0)
    kl_set_joint_slide(s, mc->sketch_joint, mc->sketch_slide);
  return s;
}

void machine_sample(const machine *mc, int k, int n, double *u, double *ud,
                    double *udd) {
  int i;
  for (i = 0; i < mc->ninputs; i++) {
    u[i] = mc->from[i] + (mc->to[i] - mc->from[i]) * k / n;
    ud[i] = mc->rate[i];
    udd[i] = mc->accel[i];
  }
}

int machine_solve(const machine *mc, kl_solver *s, int k, int n) {
  double u[MACHINE_MAX_INPUTS], ud[MACHINE_MAX_INPUTS], udd[MACHINE_MAX_INPUTS];
  int st;
  machine_sample(mc, k, n, u, ud, udd);
  if ((st = kl_solve_position(s, u)) != KL_OK ||
      (st = kl_solve_velocity(s, ud)) != KL_OK)
    return st;
  return kl_solve_acceleration(s, udd);
}
