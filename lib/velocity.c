/*
 * velocity.c - the velocity stage: J qdot = -(dF/du) udot with the factors of
 * the Jacobian at the converged position; link, slide and point rates.
 */
#include <math.h>
#include <string.h>

#include "velocity.h"

void kli_input_terms(kl_solver *s, const double *w, double *rhs) {
  if (s->plan.usable)
    kli_plan_input_terms(&s->plan, &s->st.pose, w, rhs);
  else
    kli_input_terms_at(s->model, &s->st.pose, w, s->xv, rhs);
}

void kli_add_second(kl_solver *s, const double *va, const double *vb,
                    double *rhs) {
  if (s->plan.usable)
    kli_plan_add_second(&s->plan, &s->st.pose, va, vb, rhs);
  else
    kli_loops_add_second(s->model, &s->st.pose, va, vb, rhs);
}

void kli_rate_solve(kl_solver *s, double *rhs, const double *w, double *out) {
  int i;
  kli_keep_rows(s->model, s->dir, rhs);
  for (i = 0; i < s->n; i++)
    rhs[i] = -rhs[i];
  kli_dense_solve(&s->dense, rhs);
  if (s->plan.usable)
    kli_plan_expand(&s->plan, rhs, w, out);
  else
    kli_expand(s->model, rhs, w, out);
}

int kl_solve_velocity(kl_solver *s, const double *input_rates) {
  int st;
  if (s == NULL)
    return KL_EINVAL;
  if ((st = kli_check_input_values(s, input_rates, "solve velocity",
                                   "input rate")) != KL_OK ||
      (st = kli_require_position(s, "solve velocity")) != KL_OK)
    return st;
  kli_input_terms(s, input_rates, s->rhs);
  kli_rate_solve(s, s->rhs, input_rates, s->st.xd);
  if (s->ninputs > 0)
    memcpy(s->st.ud, input_rates, (size_t)s->ninputs * sizeof(double));
  s->st.velocity_solved = 1;
  s->st.acceleration_solved = 0;
  s->st.jerk_solved = 0;
  s->st.forces_solved = 0;
  return KL_OK;
}

static int rate_ready(const kl_solver *s) {
  return s != NULL && s->st.velocity_solved;
}

double kl_link_rate(const kl_solver *s, int link) {
  if (!rate_ready(s) || link < 0 || link >= s->model->nlinks)
    return NAN;
  return s->st.xd[link];
}

double kl_joint_slide_rate(const kl_solver *s, int joint) {
  if (!rate_ready(s) || isnan(kl_joint_slide(s, joint)))
    return NAN;
  return s->st.xd[s->model->nlinks + joint];
}

int kl_point_velocity(const kl_solver *s, int point, double xy[2]) {
  if (s == NULL || xy == NULL)
    return KL_EINVAL;
  if (point < 0 || point >= s->model->npoints)
    return KL_EID;
  if (!s->st.velocity_solved)
    return KL_ESTAGE;
  kli_chain_rate(s->model, &s->model->topo.points[point], &s->st.pose, s->st.xd, xy);
  return KL_OK;
}

int kl_link_origin_velocity(const kl_solver *s, int link, double xy[2]) {
  if (s == NULL || xy == NULL)
    return KL_EINVAL;
  if (link < 0 || link >= s->model->nlinks)
    return KL_EID;
  if (!s->st.velocity_solved)
    return KL_ESTAGE;
  kli_chain_rate(s->model, &s->model->topo.origins[link], &s->st.pose,
                 s->st.xd, xy);
  return KL_OK;
}
