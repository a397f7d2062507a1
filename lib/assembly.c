/*
 * assembly.c - the assembly modes at one input: Newton's method from a grid
 * of starts over the free angles and slides, distinct solutions kept.
 */
#include <math.h>
#include <string.h>

#include "position.h"

#define KLI_MODE_STARTS 20000
#define KLI_MODE_SAME 1e-6

static double wrap(double a) {
  double w = fmod(a, 2.0 * KLI_PI);
  if (w > KLI_PI)
    w -= 2.0 * KLI_PI;
  if (w <= -KLI_PI)
    w += 2.0 * KLI_PI;
  return w;
}

/* Unknowns with free angles reduced to (-pi, pi]. */
static void canonical(const kl_solver *s, double *q) {
  int v;
  kli_gather(s->model, s->st.pose.x, q);
  for (v = 0; v < s->n; v++)
    if (s->model->topo.var_coord[v] < s->model->nlinks)
      q[v] = wrap(q[v]);
}

static int same_mode(const kl_solver *s, const double *a, const double *b) {
  int v;
  for (v = 0; v < s->n; v++) {
    int is_angle = s->model->topo.var_coord[v] < s->model->nlinks;
    double d = is_angle ? fabs(wrap(a[v] - b[v])) : fabs(a[v] - b[v]);
    if (d > KLI_MODE_SAME * (is_angle ? 1.0 : s->model->topo.scale))
      return 0;
  }
  return 1;
}

int kl_solver_find_assemblies(kl_solver *s, const double *inputs,
                       kl_solver *const *modes, int cap) {
  static const double slides6[6] = {-2, -1, -0.5, 0.5, 1, 2};
  static const double slides4[4] = {-2, -0.5, 0.5, 2};
  const double *slide_values = slides6;
  int na = 0, ns = 0, nav = 8, nsv = 6, found = 0, v, i, st;
  double starts = 1.0;
  long start, total;
  if (s == NULL || cap < 0 || (cap > 0 && modes == NULL))
    return KL_EINVAL;
  for (i = 0; i < cap; i++)
    if (modes[i] == NULL || modes[i]->model != s->model)
      return kli_fail(s->error, KL_EINVAL,
                      "find assemblies: modes[%d] is not a solver of this "
                      "model",
                      i);
  if ((st = kli_check_input_values(s, inputs, "find assemblies", "input")) !=
      KL_OK)
    return st;
  for (v = 0; v < s->n; v++) {
    if (s->model->topo.var_coord[v] < s->model->nlinks)
      na++;
    else
      ns++;
  }
  if (pow(8.0, na) * pow(6.0, ns) > KLI_MODE_STARTS) {
    slide_values = slides4;
    nav = nsv = 4;
  }
  starts = pow(nav, na) * pow(nsv, ns);
  if (starts > KLI_MODE_STARTS)
    return kli_fail(s->error, KL_ETOOLARGE,
                    "find assemblies: %d angles and %d slides need %.0f "
                    "starts, more than the %d this search takes",
                    na, ns, starts, KLI_MODE_STARTS);
  total = (long)starts;
  kli_state_copy(s, &s->saved, &s->st);
  for (start = 0; start < total; start++) {
    long digits = start;
    for (v = 0; v < s->n; v++) {
      int is_angle = s->model->topo.var_coord[v] < s->model->nlinks;
      int base = is_angle ? nav : nsv;
      /* angles 0.3 + k 2 pi / nav: off the exact alignments of a sketch */
      s->q[v] = is_angle
                    ? 0.3 + (double)(digits % base) * 2.0 * KLI_PI / nav
                    : slide_values[digits % base] * s->model->topo.scale;
      digits /= base;
    }
    kli_expand(s->model, s->q, inputs, s->st.pose.x);
    s->st.position_solved = 0;
    if (kl_solve_position(s, inputs) != KL_OK)
      continue;
    canonical(s, s->q);
    for (i = 0; i < found && i < KLI_MAX_MODES; i++)
      if (same_mode(s, s->q, s->modes + (size_t)i * (size_t)s->n))
        break;
    if (i < found)
      continue;
    if (found < KLI_MAX_MODES)
      memcpy(s->modes + (size_t)found * (size_t)s->n, s->q,
             (size_t)s->n * sizeof(double));
    if (found < cap) {
      kl_solver *to = modes[found];
      kli_expand(s->model, s->q, inputs, s->st.pose.x);
      kli_pose_trig(s->model, &s->st.pose);
      kli_state_restore(to, &s->st);
      kli_state_changed(to);
    }
    found++;
  }
  kli_state_restore(s, &s->saved);
  return found;
}
