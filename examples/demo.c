/*
 * demo.c - solves the built-in flap-tucking station over one motor turn and
 * prints positions, rates and accelerations as a table.
 */
#include <math.h>
#include <stdio.h>

#include "demo_mechanism.h"

#define DEG (3.14159265358979323846 / 180.0)

int main(void) {
  demo_mechanism d;
  kl_solver *s;
  const double motor_rate = 2.0 * 3.14159265358979323846; /* 60 rpm, rad/s */
  const double motor_accel = 0.0;
  int st, step;
  if ((st = demo_build(&d)) != KL_OK) {
    fprintf(stderr, "kinloop-demo: %s\n", kl_model_error(d.model));
    kl_model_free(d.model);
    return 1;
  }
  s = kl_solver_new(d.model);
  if (s == NULL) {
    fprintf(stderr, "kinloop-demo: out of memory\n");
    kl_model_free(d.model);
    return 1;
  }
  demo_sketch(&d, s);
  printf("kinloop %s - flap-tucking station (built-in demo)\n", kl_version());
  printf("%d links, %d joints, %d loops, %d degree of freedom; "
         "motor at 60 rpm, lengths in mm\n\n",
         kl_model_link_count(d.model), kl_model_joint_count(d.model),
         kl_model_loop_count(d.model), kl_model_dof(d.model));
  printf("%6s %9s %9s %9s %9s %9s %10s %12s %9s %9s\n", "motor", "coupler",
         "rocker", "rocker", "plate", "plate", "plate", "tip x", "tip y",
         "tip");
  printf("%6s %9s %9s %9s %9s %9s %10s %12s %9s %9s\n", "deg", "deg", "deg",
         "rad/s", "mm", "mm/s", "mm/s^2", "mm", "mm", "mm/s");
  for (step = 0; step <= 12; step++) {
    double u = step * 30 * DEG, tip[2], tip_v[2];
    if ((st = kl_solve_position(s, &u)) != KL_OK ||
        (st = kl_solve_velocity(s, &motor_rate)) != KL_OK ||
        (st = kl_solve_acceleration(s, &motor_accel)) != KL_OK) {
      fprintf(stderr, "kinloop-demo: motor at %d deg: %s\n", step * 30,
              kl_solver_error(s));
      break;
    }
    kl_point_position(s, d.tucker_tip, tip);
    kl_point_velocity(s, d.tucker_tip, tip_v);
    printf("%6d %9.3f %9.3f %9.4f %9.3f %9.1f %10.0f %12.3f %9.3f %9.1f\n",
           step * 30, kl_link_angle(s, d.coupler) / DEG,
           kl_link_angle(s, d.rocker) / DEG, kl_link_rate(s, d.rocker),
           kl_joint_slide(s, d.plate_slide),
           kl_joint_slide_rate(s, d.plate_slide),
           kl_joint_slide_accel(s, d.plate_slide), tip[0], tip[1],
           hypot(tip_v[0], tip_v[1]));
  }
  kl_solver_free(s);
  kl_model_free(d.model);
  return st == KL_OK ? 0 : 1;
}
