/*
 * forces_dump.c - prints each test machine (tests/machines.c) and
 * kinloop's forces at samples of its motion, for forces_reference.py to
 * check against its own solution in body coordinates.
 */
#include <stdio.h>
#include <stdlib.h>

#include "machines.h"

#define SAMPLES 6

static void describe(const machine *mc) {
  const kl_model *m = mc->m;
  double g[2];
  int l, j, i, p, k;
  kl_model_gravity(m, g);
  printf("machine %s\n", mc->name);
  printf("gravity %.17g %.17g\n", g[0], g[1]);
  for (l = 1; l < kl_model_link_count(m); l++) {
    double mass, c[2], inertia;
    kl_model_link_mass(m, l, &mass, c, &inertia);
    printf("link %d %.17g %.17g %.17g %.17g\n", l, mass, c[0], c[1], inertia);
  }
  for (j = 0; j < kl_model_joint_count(m); j++) {
    int links[2], kind = kl_model_joint_kind(m, j);
    double a[2], b[2], axis = kl_model_joint_axis(m, j);
    kl_model_joint_links(m, j, links, a, b);
    printf("joint %d %s %d %.17g %.17g %d %.17g %.17g %.17g\n", j,
           kind == KL_JOINT_REVOLUTE    ? "revolute"
           : kind == KL_JOINT_PRISMATIC ? "prismatic"
                                        : "slot",
           links[0], a[0], a[1], links[1], b[0], b[1],
           kind == KL_JOINT_REVOLUTE ? 0.0 : axis);
  }
  for (i = 0; i < kl_model_input_count(m); i++)
    printf("input %d %d\n", i, kl_model_input_joint(m, i));
  for (p = 0; p < kl_model_point_count(m); p++) {
    double xy[2];
    int link = kl_model_point_link(m, p, xy);
    printf("point %d %d %.17g %.17g\n", p, link, xy[0], xy[1]);
  }
  for (k = 0; k < mc->nloads; k++) {
    const kl_load *ld = &mc->loads[k];
    if (ld->kind == KL_LOAD_FORCE)
      printf("load force %d %.17g %.17g\n", ld->id, ld->fx, ld->fy);
    else
      printf("load torque %d %.17g\n", ld->id, ld->torque);
  }
}

static int sample(const machine *mc, kl_solver *s, int k) {
  const kl_model *m = mc->m;
  double u[MACHINE_MAX_INPUTS], ud[MACHINE_MAX_INPUTS];
  double udd[MACHINE_MAX_INPUTS], efforts[MACHINE_MAX_INPUTS], g[3];
  int st, i, l, j;
  if ((st = machine_solve(mc, s, k, SAMPLES)) != KL_OK ||
      (st = kl_solve_forces(s, mc->nloads, mc->loads, efforts)) != KL_OK) {
    fprintf(stderr, "forces_dump: %s sample %d: %s\n", mc->name, k,
            kl_solver_error(s));
    return st;
  }
  machine_sample(mc, k, SAMPLES, u, ud, udd);
  printf("sample %d\n", k);
  for (i = 0; i < mc->ninputs; i++)
    printf("drive %d %.17g %.17g %.17g\n", i, u[i], ud[i], udd[i]);
  for (l = 1; l < kl_model_link_count(m); l++) {
    double o[2];
    kl_link_origin(s, l, o);
    printf("pose %d %.17g %.17g %.17g\n", l, kl_link_angle(s, l), o[0], o[1]);
  }
  for (i = 0; i < mc->ninputs; i++)
    printf("effort %d %.17g\n", i, efforts[i]);
  for (j = 0; j < kl_model_joint_count(m); j++) {
    double f[2];
    kl_joint_force(s, j, f);
    printf("force %d %.17g %.17g %.17g\n", j, f[0], f[1],
           kl_joint_moment(s, j));
  }
  kl_ground_force(s, g);
  printf("ground %.17g %.17g %.17g\n", g[0], g[1], g[2]);
  return KL_OK;
}

int main(void) {
  int which, k, failed = 0;
  for (which = 0; which < MACHINE_COUNT; which++) {
    machine mc = build_machine(which, 1);
    kl_solver *s = machine_solver(&mc);
    describe(&mc);
    for (k = 0; k <= SAMPLES; k++)
      failed |= sample(&mc, s, k) != KL_OK;
    printf("end\n");
    kl_solver_free(s);
    kl_model_free(mc.m);
  }
  return failed ? EXIT_FAILURE : EXIT_SUCCESS;
}
