/*
 * acceleration.c - the acceleration stage: J qddot = -((dF/du) uddot +
 * centripetal and Coriolis terms), with the same factors as the velocity.
 */
#include <math.h>
#include <string.h>

#include "velocity.h"

/* Inputs that do not accelerate (cranks turning steadily) give a plan's
 * input terms as exact zeros (+0, as a sum from +0 of zero products is):
 * the stage then writes them without evaluating the terms. */
static int all_zero(const double *values, int n) {
  int i;
  for (i = 0; i < n; i++)
    if (values[i] != 0.0)
      return 0;
  return 1;
}

int kl_solve_acceleration(kl_solver *s, const double *input_accels) {
  int st;
  if (s == NULL)
    return KL_EINVAL;
  if ((st = kli_check_input_values(s, input_accels, "solve acceleration",
                                   "input acceleration")) != KL_OK ||
      (st = kli_require_position(s, "solve acceleration")) != KL_OK)
    return st;
  if (!s->st.velocity_solved)
    return kli_fail(s->error, KL_ESTAGE,
                    "solve acceleration needs the velocity solved at the "
                    "current position first");
  if (s->plan.usable && all_zero(input_accels, s->ninputs))
    memset(s->rhs, 0, (size_t)s->nrows * sizeof(double));
  else
    kli_input_terms(s, input_accels, s->rhs);
  kli_add_second(s, s->st.xd, s->st.xd, s->rhs);
  kli_rate_solve(s, s->rhs, input_accels, s->st.xdd);
  if (s->ninputs > 0)
    memcpy(s->st.udd, input_accels, (size_t)s->ninputs * sizeof(double));
  s->st.acceleration_solved = 1;
  s->st.jerk_solved = 0;
  s->st.forces_solved = 0;
  return KL_OK;
}

static int accel_ready(const kl_solver *s) {
  return s != NULL && s->st.acceleration_solved;
}

double kl_link_accel(const kl_solver *s, int link) {
  if (!accel_ready(s) || link < 0 || link >= s->model->nlinks)
    return NAN;
  return s->st.xdd[link];
}

double kl_joint_slide_accel(const kl_solver *s, int joint) {
  if (!accel_ready(s) || isnan(kl_joint_slide(s, joint)))
    return NAN;
  return s->st.xdd[s->model->nlinks + joint];
}

int kl_point_acceleration(const kl_solver *s, int point, double xy[2]) {
  if (s == NULL || xy == NULL)
    return KL_EINVAL;
  if (point < 0 || point >= s->model->npoints)
    return KL_EID;
  if (!s->st.acceleration_solved)
    return KL_ESTAGE;
  /* the tangential and slide parts come with xdd, the normal and Coriolis
   * parts with the rates */
  kli_chain_accel(s->model, &s->model->topo.points[point], &s->st.pose, s->st.xd,
                  s->st.xd, s->st.xdd, xy);
  return KL_OK;
}

int kl_link_origin_accel(const kl_solver *s, int link, double xy[2]) {
  if (s == NULL || xy == NULL)
    return KL_EINVAL;
  if (link < 0 || link >= s->model->nlinks)
    return KL_EID;
  if (!s->st.acceleration_solved)
    return KL_ESTAGE;
  kli_chain_accel(s->model, &s->model->topo.origins[link], &s->st.pose,
                  s->st.xd, s->st.xd, s->st.xdd, xy);
  return KL_OK;
}
