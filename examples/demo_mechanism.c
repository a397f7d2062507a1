/*
 * demo_mechanism.c - builds the flap-tucking station of demo_mechanism.h.
 */
#include "demo_mechanism.h"

int demo_build(demo_mechanism *d) {
  kl_model *m = kl_model_new();
  int st;
  d->model = m;
  if (m == NULL)
    return KL_ENOMEM;
  d->crank = kl_add_link(m, "crank");
  d->coupler = kl_add_link(m, "coupler");
  d->rocker = kl_add_link(m, "rocker");
  d->rod = kl_add_link(m, "rod");
  d->plate = kl_add_link(m, "plate");
  d->motor = kl_add_revolute(m, KL_GROUND, 0, 0, d->crank, 0, 0);
  d->crank_pin = kl_add_revolute(m, d->crank, 60, 0, d->coupler, 0, 0);
  d->rocker_pin = kl_add_revolute(m, d->coupler, 200, 0, d->rocker, 150, 0);
  d->rocker_pivot = kl_add_revolute(m, d->rocker, 0, 0, KL_GROUND, 220, 0);
  d->arm_pin = kl_add_revolute(m, d->rocker, 250, 0, d->rod, 0, 0);
  d->plate_pin = kl_add_revolute(m, d->rod, 180, 0, d->plate, 0, 0);
  d->plate_slide = kl_add_prismatic(m, KL_GROUND, 0, 260, 0.0, d->plate, 0, 0);
  d->tucker_tip = kl_add_point(m, d->coupler, 100, 40, "tucker tip");
  d->plate_nose = kl_add_point(m, d->plate, 35, 0, "plate nose");
  kl_add_input(m, d->motor);
  st = kl_model_finalize(m);
  return st;
}

void demo_loads(const demo_mechanism *d, kl_load loads[DEMO_NLOADS]) {
  loads[0].kind = KL_LOAD_FORCE; /* the flap resists the tip, downward */
  loads[0].id = d->tucker_tip;
  loads[0].fx = 0.0;
  loads[0].fy = -15.0;
  loads[0].torque = 0.0;
  loads[1].kind = KL_LOAD_FORCE; /* rail drag on the plate, against +x */
  loads[1].id = d->plate_nose;
  loads[1].fx = -40.0;
  loads[1].fy = 0.0;
  loads[1].torque = 0.0;
}

void demo_sketch(const demo_mechanism *d, kl_solver *s) {
  kl_set_link_angle(s, d->coupler, 0.5);
  kl_set_link_angle(s, d->rocker, 1.8);
  kl_set_link_angle(s, d->rod, 0.1);
  kl_set_joint_slide(s, d->plate_slide, 340);
}
