/*
 * test_threads.c - a finalized model shared by solvers on several threads:
 * each thread's answers are bit for bit those of a lone solver; the model's
 * handle freed while threads make and free its solvers leaves them working
 * and the last one frees the model. Run under ThreadSanitizer by
 * scripts/test-all.sh.
 */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <math.h>
#include <pthread.h>
#include <stdlib.h>
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

/* ---- a model freed while its solvers come and go on threads ---- */

#define CHURN 400

/* malloc, realloc and free, counting the blocks held; thread-safe. */
static void *counted_alloc(void *user, void *ptr, size_t old_size,
                           size_t new_size) {
  long *live = user;
  void *p;
  (void)old_size;
  if (new_size == 0) {
    if (ptr != NULL)
      __atomic_sub_fetch(live, 1, __ATOMIC_RELAXED);
    free(ptr);
    return NULL;
  }
  p = realloc(ptr, new_size);
  if (p != NULL && ptr == NULL)
    __atomic_add_fetch(live, 1, __ATOMIC_RELAXED);
  return p;
}

typedef struct {
  pthread_mutex_t lock;
  pthread_cond_t changed;
  int started; /* threads that made their first solver */
  int freed;   /* the model's handle is gone */
} churn_shared;

typedef struct {
  churn_shared *shared;
  kl_solver *own; /* made before the handle goes; the thread frees it */
  const fourbar *f;
  int made, wrong;
} churn;

static void note(churn_shared *sh, int *flag) {
  pthread_mutex_lock(&sh->lock);
  (*flag)++;
  pthread_cond_broadcast(&sh->changed);
  pthread_mutex_unlock(&sh->lock);
}

/* Makes, solves and frees solvers of its own solver's model, half of them
 * before the handle is freed (while the main thread frees it) and half
 * after; then frees its own solver, the last of which frees the model. */
static void *churn_solvers(void *arg) {
  churn *w = arg;
  const kl_model *m = kl_solver_model(w->own);
  int k;
  for (k = 0; k < CHURN; k++) {
    kl_solver *s = kl_solver_new(m);
    double u = k * 2 * PI / CHURN, t3, t4[2];
    if (s == NULL) {
      w->wrong++;
      continue;
    }
    w->made++;
    kl_set_link_angle(s, w->f->coupler, 0.3);
    kl_set_link_angle(s, w->f->rocker, 1.5);
    /* Freudenstein's equation: the rocker on one of its two branches */
    if (kl_solve_position(s, &u) != KL_OK ||
        !freudenstein(w->f, u, 1, &t3, &t4[0]) ||
        !freudenstein(w->f, u, -1, &t3, &t4[1]) ||
        (fabs(angle_diff(kl_link_angle(s, w->f->rocker), t4[0])) > 1e-9 &&
         fabs(angle_diff(kl_link_angle(s, w->f->rocker), t4[1])) > 1e-9))
      w->wrong++;
    kl_solver_free(s);
    if (k == 0)
      note(w->shared, &w->shared->started);
    if (k == CHURN / 2) {
      pthread_mutex_lock(&w->shared->lock);
      while (!w->shared->freed)
        pthread_cond_wait(&w->shared->changed, &w->shared->lock);
      pthread_mutex_unlock(&w->shared->lock);
    }
  }
  kl_solver_free(w->own);
  return NULL;
}

START_TEST(a_model_freed_while_solvers_come_and_go) {
  static churn_shared shared = {PTHREAD_MUTEX_INITIALIZER,
                                PTHREAD_COND_INITIALIZER, 0, 0};
  static churn work_of[THREADS];
  pthread_t threads[THREADS];
  long live = 0;
  fourbar f = build_fourbar_in(kl_model_new_with_alloc(counted_alloc, &live),
                               40, 120, 80, 100);
  int t;
  ck_assert(kl_model_is_finalized(f.m));
  for (t = 0; t < THREADS; t++) {
    work_of[t].shared = &shared;
    work_of[t].own = kl_solver_new(f.m);
    work_of[t].f = &f;
    ck_assert_ptr_nonnull(work_of[t].own);
  }
  for (t = 0; t < THREADS; t++)
    ck_assert_int_eq(
        pthread_create(&threads[t], NULL, churn_solvers, &work_of[t]), 0);
  /* every thread is making solvers: let go of the handle now */
  pthread_mutex_lock(&shared.lock);
  while (shared.started < THREADS)
    pthread_cond_wait(&shared.changed, &shared.lock);
  pthread_mutex_unlock(&shared.lock);
  kl_model_free(f.m);
  note(&shared, &shared.freed);
  for (t = 0; t < THREADS; t++) {
    ck_assert_int_eq(pthread_join(threads[t], NULL), 0);
    ck_assert_int_eq(work_of[t].made, CHURN);
    ck_assert_int_eq(work_of[t].wrong, 0);
  }
  /* the last solver freed gave back the model's every block */
  ck_assert_int_eq(__atomic_load_n(&live, __ATOMIC_RELAXED), 0);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("threads");
  TCase *tc = tcase_create("threads");
  tcase_set_timeout(tc, 120);
  tcase_add_test(tc, shared_model_many_solvers);
  tcase_add_test(tc, a_model_freed_while_solvers_come_and_go);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
