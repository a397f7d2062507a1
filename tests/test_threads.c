/*
 * test_threads.c - a finalized model shared by solvers on several threads:
 * each thread's answers are bit for bit those of a lone solver. Run under
 * ThreadSanitizer by scripts/test-all.sh.
 */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <pthread.h>
#include <string.h>

#include "suite.h"
#include "support.h"

#define THREADS 4
#define STEPS 720

typedef struct {
  const kl_model *m;
  const fourbar *f;
  double angles[STEPS][2];
  int status;
} work;

/* Each thread makes its own solver from the shared model and sweeps. */
static void *sweep_on_thread(void *arg) {
  work *w = arg;
  kl_solver *s = kl_solver_new(w->m);
  int k;
  w->status = s == NULL ? KL_ENOMEM : KL_OK;
  if (s == NULL)
    return NULL;
  kl_set_link_angle(s, w->f->coupler, 0.3);
  kl_set_link_angle(s, w->f->rocker, 1.5);
  for (k = 0; k < STEPS && w->status == KL_OK; k++) {
    double u = k * 2 * PI / STEPS, rate = 1.0;
    if ((w->status = kl_solve_position(s, &u)) == KL_OK)
      w->status = kl_solve_velocity(s, &rate);
    w->angles[k][0] = kl_link_angle(s, w->f->rocker);
    w->angles[k][1] = kl_link_rate(s, w->f->rocker);
  }
  kl_solver_free(s);
  return NULL;
}

START_TEST(shared_model_many_solvers) {
  fourbar f = build_fourbar(40, 120, 80, 100);
  static work alone, many[THREADS];
  pthread_t threads[THREADS];
  int t;
  alone.m = f.m;
  alone.f = &f;
  sweep_on_thread(&alone);
  ck_assert_int_eq(alone.status, KL_OK);
  for (t = 0; t < THREADS; t++) {
    many[t].m = f.m;
    many[t].f = &f;
    ck_assert_int_eq(pthread_create(&threads[t], NULL, sweep_on_thread, &many[t]), 0);
  }
  for (t = 0; t < THREADS; t++) {
    ck_assert_int_eq(pthread_join(threads[t], NULL), 0);
    ck_assert_int_eq(many[t].status, KL_OK);
    ck_assert_int_eq(memcmp(many[t].angles, alone.angles, sizeof alone.angles), 0);
  }
  kl_model_free(f.m);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("threads");
  TCase *tc = tcase_create("threads");
  tcase_set_timeout(tc, 120);
  tcase_add_test(tc, shared_model_many_solvers);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
