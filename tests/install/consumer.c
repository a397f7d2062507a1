/*
 * consumer.c - a program outside the project, built against an installed
 * kinloop to prove the header, libraries, pkg-config file and CMake package.
 * It checks that header and library agree and solves a four-bar.
 */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include <kinloop.h>

int main(void) {
  kl_model *m = kl_model_new();
  kl_solver *s;
  int crank = kl_add_link(m, "crank"), coupler = kl_add_link(m, "coupler");
  int rocker = kl_add_link(m, "rocker");
  int pivot = kl_add_revolute(m, KL_GROUND, 0, 0, crank, 0, 0);
  double u = 1.0;
  int st;
  if (strcmp(kl_version(), KINLOOP_VERSION) != 0) {
    fprintf(stderr, "header %s, library %s\n", KINLOOP_VERSION, kl_version());
    return 1;
  }
  kl_add_revolute(m, crank, 40, 0, coupler, 0, 0);
  kl_add_revolute(m, coupler, 120, 0, rocker, 80, 0);
  kl_add_revolute(m, rocker, 0, 0, KL_GROUND, 100, 0);
  kl_add_input(m, pivot);
  if (kl_model_finalize(m) != KL_OK) {
    fprintf(stderr, "%s\n", kl_model_error(m));
    return 1;
  }
  s = kl_solver_new(m);
  kl_set_link_angle(s, coupler, 0.3);
  kl_set_link_angle(s, rocker, 1.5);
  st = kl_solve_position(s, &u);
  printf("consumer: %s, rocker at %.6f rad\n", kl_status_str(st),
         kl_link_angle(s, rocker));
  st = st == KL_OK && isfinite(kl_link_angle(s, rocker)) ? 0 : 1;
  kl_solver_free(s);
  kl_model_free(m);
  return st;
}
