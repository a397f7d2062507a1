/*
 * embedded_loop.c - kinloop inside a fixed-step control loop, as a firmware
 * simulator would run it: the solver lives in a static block, the model's
 * allocator hook counts every call, and the loop proves that none happens
 * once it runs. The scenario (invented): a bench-top punch press, a
 * slider-crank with a 25 mm crank, a 110 mm rod and a ram on a vertical
 * guide, its motor following a trapezoidal speed profile at 1 kHz.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include "kinloop.h"

#define PI 3.14159265358979323846
#define TICK 1e-3          /* s: the control loop's fixed step */
#define RAMP 0.25          /* s: motor run-up and run-down */
#define CRUISE 1.5         /* s: at full speed */
#define TOP_SPEED (4 * PI) /* rad/s: 120 rpm */

static long allocator_calls;

/* The model's hook: malloc, realloc and free, counted. */
static void *counting_hook(void *user, void *ptr, size_t old_size,
                           size_t new_size) {
  (void)user;
  (void)old_size;
  allocator_calls++;
  if (new_size == 0) {
    free(ptr);
    return NULL;
  }
  return realloc(ptr, new_size);
}

/* Trapezoidal motor profile: angle, speed and acceleration at time t. */
static void motor_at(double t, double *angle, double *speed, double *accel) {
  double a = TOP_SPEED / RAMP, t1 = RAMP, t2 = RAMP + CRUISE;
  double at_t1 = 0.5 * a * t1 * t1, at_t2 = at_t1 + TOP_SPEED * CRUISE;
  if (t < t1) {
    *accel = a, *speed = a * t, *angle = 0.5 * a * t * t;
  } else if (t < t2) {
    *accel = 0.0, *speed = TOP_SPEED, *angle = at_t1 + TOP_SPEED * (t - t1);
  } else {
    double d = t - t2;
    *accel = -a, *speed = TOP_SPEED - a * d;
    *angle = at_t2 + TOP_SPEED * d - 0.5 * a * d * d;
  }
}

static kl_model *build_press(int *ram_slide) {
  kl_model *m = kl_model_new_with_alloc(counting_hook, NULL);
  int crank, rod, ram, motor;
  if (m == NULL)
    return NULL;
  crank = kl_add_link(m, "crank");
  rod = kl_add_link(m, "rod");
  ram = kl_add_link(m, "ram");
  motor = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  kl_add_revolute(m, crank, 25, 0, rod, 0, 0);
  kl_add_revolute(m, rod, 110, 0, ram, 0, 0);
  /* the ram runs down a vertical guide through the crank pivot */
  *ram_slide = kl_add_prismatic(m, KL_GROUND, 0, 0, -PI / 2, ram, 0, 0);
  kl_add_input(m, motor);
  kl_model_set_sketch_angle(m, rod, -PI / 2 + 0.2);
  kl_model_set_sketch_slide(m, *ram_slide, -100);
  if (kl_model_finalize(m) != KL_OK) {
    fprintf(stderr, "embedded-loop: %s\n", kl_model_error(m));
    kl_model_free(m);
    return NULL;
  }
  return m;
}

int main(void) {
  static double block[4096]; /* the solver's memory: no heap */
  kl_model *m;
  kl_solver *s;
  kl_solve_stats stats;
  int ram_slide, worst_iterations = 0, tick, ticks;
  long calls_at_start, calls_in_loop;
  double nearest = HUGE_VAL, farthest = -HUGE_VAL, fastest = 0.0;
  m = build_press(&ram_slide);
  if (m == NULL)
    return 1;
  if (kl_solver_bytes(m) > sizeof block) {
    fprintf(stderr, "embedded-loop: the solver needs %lu bytes, the block has "
                    "%lu\n",
            (unsigned long)kl_solver_bytes(m), (unsigned long)sizeof block);
    return 1;
  }
  s = kl_solver_new_in(m, block, sizeof block);
  stats.size = sizeof stats;
  calls_at_start = allocator_calls;
  ticks = (int)((2 * RAMP + CRUISE) / TICK + 0.5);
  for (tick = 0; tick <= ticks; tick++) {
    double u, w, a;
    motor_at(tick * TICK, &u, &w, &a);
    if (kl_solve_position(s, &u) != KL_OK || kl_solve_velocity(s, &w) != KL_OK ||
        kl_solve_acceleration(s, &a) != KL_OK) {
      fprintf(stderr, "embedded-loop: tick %d: %s\n", tick, kl_solver_error(s));
      return 1;
    }
    kl_solver_stats(s, &stats);
    if (stats.iterations > worst_iterations)
      worst_iterations = stats.iterations;
    /* the slide runs down the guide from the crank pivot */
    nearest = fmin(nearest, kl_joint_slide(s, ram_slide));
    farthest = fmax(farthest, kl_joint_slide(s, ram_slide));
    fastest = fmax(fastest, fabs(kl_joint_slide_rate(s, ram_slide)));
  }
  calls_in_loop = allocator_calls - calls_at_start;
  printf("embedded-loop: %d ticks at %.0f Hz, solver in a static block of %lu "
         "bytes\n",
         ticks + 1, 1.0 / TICK, (unsigned long)kl_solver_bytes(m));
  printf("  worst-case Newton iterations per tick: %d\n", worst_iterations);
  printf("  ram: stroke %.3f mm (%.3f to %.3f mm below the crank pivot), top "
         "speed %.1f mm/s\n",
         farthest - nearest, nearest, farthest, fastest);
  printf("  allocator calls during the loop: %ld\n", calls_in_loop);
  kl_solver_free(s);
  kl_model_free(m);
  return calls_in_loop == 0 ? 0 : 1;
}
