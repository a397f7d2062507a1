/*
 * demo.c - solves the built-in flap-tucking station over one motor turn:
 * a table of positions, rates and accelerations, then a summary of the
 * design figures (motion limits, stroke, time ratio, transmission angles,
 * worst motor torque).
 */
#include <math.h>
#include <stdio.h>

#include "demo_mechanism.h"

#define PI 3.14159265358979323846
#define DEG (PI / 180.0)

static int print_table(const demo_mechanism *d, kl_solver *s) {
  const double motor_rate = 2.0 * PI; /* 60 rpm, rad/s */
  const double motor_accel = 0.0;
  int st = KL_OK, step;
  printf("%6s %9s %9s %9s %9s %9s %10s %9s %9s %9s\n", "motor", "coupler",
         "rocker", "rocker", "plate", "plate", "plate", "tip x", "tip y",
         "tip");
  printf("%6s %9s %9s %9s %9s %9s %10s %9s %9s %9s\n", "deg", "deg", "deg",
         "rad/s", "mm", "mm/s", "mm/s^2", "mm", "mm", "mm/s");
  for (step = 0; step <= 12; step++) {
    double u = step * 30 * DEG, tip[2], tip_v[2];
    if ((st = kl_solve_position(s, &u)) != KL_OK ||
        (st = kl_solve_velocity(s, &motor_rate)) != KL_OK ||
        (st = kl_solve_acceleration(s, &motor_accel)) != KL_OK) {
      fprintf(stderr, "kinloop-demo: motor at %d deg: %s\n", step * 30,
              kl_solver_error(s));
      return st;
    }
    kl_point_position(s, d->tucker_tip, tip);
    kl_point_velocity(s, d->tucker_tip, tip_v);
    printf("%6d %9.3f %9.3f %9.4f %9.3f %9.1f %10.0f %9.3f %9.3f %9.1f\n",
           step * 30, kl_link_angle(s, d->coupler) / DEG,
           kl_link_angle(s, d->rocker) / DEG, kl_link_rate(s, d->rocker),
           kl_joint_slide(s, d->plate_slide),
           kl_joint_slide_rate(s, d->plate_slide),
           kl_joint_slide_accel(s, d->plate_slide), tip[0], tip[1],
           hypot(tip_v[0], tip_v[1]));
  }
  return KL_OK;
}

/* Transmission angle range over a motor turn, with the usual warning. */
static int print_transmission(kl_solver *s, const char *where, int joint,
                              int line_a, int line_b) {
  kl_output mu;
  kl_range r;
  int st;
  mu.kind = KL_OUT_TRANSMISSION;
  mu.id = joint;
  mu.line_a = line_a;
  mu.line_b = line_b;
  r.size = sizeof r;
  if ((st = kl_output_range(s, 0, 0.0, 2 * PI, 72, &mu, &r)) < 0)
    return st;
  printf("  transmission angle at %-18s %6.1f to %6.1f deg (motor %5.1f and "
         "%5.1f deg)%s\n",
         where, r.min / DEG, r.max / DEG, r.input_at_min / DEG,
         r.input_at_max / DEG,
         r.min < 40 * DEG || r.max > 140 * DEG
             ? "  outside the usual 40-140"
             : "");
  return KL_OK;
}

static int print_summary(const demo_mechanism *d, kl_solver *s) {
  kl_output plate;
  kl_range r;
  kl_sweep_result sw;
  kl_load loads[DEMO_NLOADS];
  double ratio, worst = 0.0, worst_at = 0.0;
  int st, step;
  sw.size = sizeof sw;
  r.size = sizeof r;
  printf("\nSummary over one motor turn\n");
  printf("  driving four-bar (ground 220, crank 60, coupler 200, rocker "
         "150): %s\n",
         kl_grashof_str(kl_grashof(220, 60, 200, 150)));
  if ((st = kl_sweep(s, 0, 0.0, 2 * PI, 360, NULL, NULL, &sw)) < 0)
    return st;
  if (st == KL_LIMIT)
    printf("  motion limit of the motor at %.6f deg\n", sw.limit_input / DEG);
  else
    printf("  motion: full turns, no dead point (%d steps, %d sub-steps)\n",
           sw.steps_done, sw.substeps);
  plate.kind = KL_OUT_SLIDE;
  plate.id = d->plate_slide;
  if ((st = kl_output_range(s, 0, 0.0, 2 * PI, 72, &plate, &r)) < 0 ||
      (st = kl_time_ratio(&r, &ratio)) < 0)
    return st;
  printf("  plate stroke %.3f mm, from %.3f (motor %.2f deg) to %.3f mm "
         "(motor %.2f deg)\n",
         r.max - r.min, r.min, r.input_at_min / DEG, r.max,
         r.input_at_max / DEG);
  printf("  time ratio, outward over return stroke: %.4f\n", ratio);
  if ((st = print_transmission(s, "coupler-rocker pin", d->rocker_pin,
                               d->crank_pin, d->rocker_pivot)) < 0 ||
      (st = print_transmission(s, "rocker-rod pin", d->arm_pin,
                               d->rocker_pivot, d->plate_pin)) < 0)
    return st;
  demo_loads(d, loads);
  for (step = 0; step < 360; step++) {
    double u = step * DEG, torque;
    if ((st = kl_solve_position(s, &u)) != KL_OK ||
        (st = kl_input_effort(s, DEMO_NLOADS, loads, &torque)) != KL_OK)
      return st;
    if (fabs(torque) > fabs(worst)) {
      worst = torque;
      worst_at = u;
    }
  }
  printf("  worst motor torque against the flap (15 N) and the rail drag "
         "(40 N): %.0f N mm at motor %.0f deg\n",
         worst, worst_at / DEG);
  return KL_OK;
}

int main(void) {
  demo_mechanism d;
  kl_solver *s;
  int st;
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
  st = print_table(&d, s);
  if (st == KL_OK && (st = print_summary(&d, s)) < 0)
    fprintf(stderr, "kinloop-demo: %s\n", kl_solver_error(s));
  kl_solver_free(s);
  kl_model_free(d.model);
  return st < 0 ? 1 : 0;
}
