/*
 * jerk.c - the jerk stage: J qddd = -((dF/du) uddd + the third-order terms
 * of the rates and accelerations), with the same factors as the velocity and
 * acceleration stages; link, slide and point jerks.
 */
#include <math.h>
#include <string.h>

#include "velocity.h"

int kl_solve_jerk(kl_solver *s, const double *input_jerks) {
  int st;
  if (s == NULL)
    return KL_EINVAL;
  if ((st = kli_check_input_values(s, input_jerks, "solve jerk",
                                   "input jerk")) != KL_OK ||
      (st = kli_require_position(s, "solve jerk")) != KL_OK)
    return st;
  if (!s->st.acceleration_solved)
    return kli_fail(s->error, KL_ESTAGE,
                    "solve jerk needs the acceleration solved at the current "
                    "position and rates first");
  kli_input_terms(s, input_jerks, s->rhs);
  kli_loops_add_third(s->model, &s->st.pose, s->st.xd, s->st.xdd, s->rhs);
  kli_rate_solve(s, s->rhs, input_jerks, s->st.xddd);
  if (s->ninputs > 0)
    memcpy(s->st.uddd, input_jerks, (size_t)s->ninputs * sizeof(double));
  s->st.jerk_solved = 1;
  return KL_OK;
}

static int jerk_ready(const kl_solver *s) {
  return s != NULL && s->st.jerk_solved;
}

double kl_link_jerk(const kl_solver *s, int link) {
  if (!jerk_ready(s) || link < 0 || link >= s->model->nlinks)
    return NAN;
  return s->st.xddd[link];
}

double kl_joint_slide_jerk(const kl_solver *s, int joint) {
  if (!jerk_ready(s) || isnan(kl_joint_slide(s, joint)))
    return NAN;
  return s->st.xddd[s->model->nlinks + joint];
}

/* The jerk of chain ch's end point, or the status that stops it. */
static int chain_jerk(const kl_solver *s, const kli_chain *ch, double xy[2]) {
  if (!s->st.jerk_solved)
    return KL_ESTAGE;
  kli_chain_jerk(s->model, ch, &s->st.pose, s->st.xd, s->st.xdd, s->st.xddd,
                 xy);
  return KL_OK;
}

int kl_point_jerk(const kl_solver *s, int point, double xy[2]) {
  if (s == NULL || xy == NULL)
    return KL_EINVAL;
  if (point < 0 || point >= s->model->npoints)
    return KL_EID;
  return chain_jerk(s, &s->model->topo.points[point], xy);
}

int kl_link_origin_jerk(const kl_solver *s, int link, double xy[2]) {
  if (s == NULL || xy == NULL)
    return KL_EINVAL;
  if (link < 0 || link >= s->model->nlinks)
    return KL_EID;
  return chain_jerk(s, &s->model->topo.origins[link], xy);
}
