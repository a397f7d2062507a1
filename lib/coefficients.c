/*
 * coefficients.c - first- and second-order kinematic coefficients: the
 * derivatives of every coordinate and point with respect to the inputs.
 */
#include <math.h>
#include <string.h>

#include "velocity.h"

static double *first_order(const kl_solver *s, int input) {
  return s->coef1 + (size_t)input * (size_t)s->ncoords;
}

static double *second_order(const kl_solver *s, int i, int j) {
  return s->coef2 + ((size_t)i * (size_t)s->ninputs + (size_t)j) *
                        (size_t)s->ncoords;
}

int kl_solve_coefficients(kl_solver *s) {
  int st, i, j;
  if (s == NULL)
    return KL_EINVAL;
  if ((st = kli_require_position(s, "solve coefficients")) != KL_OK)
    return st;
  memset(s->u_unit, 0, (size_t)s->ninputs * sizeof(double));
  for (i = 0; i < s->ninputs; i++) {
    s->u_unit[i] = 1.0;
    kli_input_terms(s, s->u_unit, s->rhs);
    kli_rate_solve(s, s->rhs, s->u_unit, first_order(s, i));
    s->u_unit[i] = 0.0;
  }
  /* d2F/du_i du_j = J q_ij + B(x_i, x_j) = 0, inputs being linear in u */
  for (i = 0; i < s->ninputs; i++)
    for (j = i; j < s->ninputs; j++) {
      memset(s->rhs, 0, (size_t)s->nrows * sizeof(double));
      kli_add_second(s, first_order(s, i), first_order(s, j), s->rhs);
      kli_rate_solve(s, s->rhs, NULL, second_order(s, i, j));
      if (j != i)
        memcpy(second_order(s, j, i), second_order(s, i, j),
               (size_t)s->ncoords * sizeof(double));
    }
  s->coefficients_solved = 1;
  return KL_OK;
}

static int have(const kl_solver *s, int input) {
  return s != NULL && s->coefficients_solved && input >= 0 &&
         input < s->ninputs;
}

double kl_link_angle_deriv(const kl_solver *s, int link, int input) {
  if (!have(s, input) || link < 0 || link >= s->model->nlinks)
    return NAN;
  return first_order(s, input)[link];
}

double kl_link_angle_deriv2(const kl_solver *s, int link, int input_i,
                            int input_j) {
  if (!have(s, input_i) || !have(s, input_j) || link < 0 ||
      link >= s->model->nlinks)
    return NAN;
  return second_order(s, input_i, input_j)[link];
}

double kl_joint_slide_deriv(const kl_solver *s, int joint, int input) {
  if (!have(s, input) || isnan(kl_joint_slide(s, joint)))
    return NAN;
  return first_order(s, input)[s->model->nlinks + joint];
}

double kl_joint_slide_deriv2(const kl_solver *s, int joint, int input_i,
                             int input_j) {
  if (!have(s, input_i) || !have(s, input_j) ||
      isnan(kl_joint_slide(s, joint)))
    return NAN;
  return second_order(s, input_i, input_j)[s->model->nlinks + joint];
}

static int point_ready(const kl_solver *s, int point, int input_i,
                       int input_j, const double *xy) {
  if (s == NULL || xy == NULL)
    return KL_EINVAL;
  if (point < 0 || point >= s->model->npoints || input_i < 0 ||
      input_i >= s->ninputs || input_j < 0 || input_j >= s->ninputs)
    return KL_EID;
  return s->coefficients_solved ? KL_OK : KL_ESTAGE;
}

int kl_point_deriv(const kl_solver *s, int point, int input, double xy[2]) {
  int st = point_ready(s, point, input, input, xy);
  if (st != KL_OK)
    return st;
  kli_chain_rate(s->model, &s->model->topo.points[point], &s->st.pose,
                 first_order(s, input), xy);
  return KL_OK;
}

int kl_point_deriv2(const kl_solver *s, int point, int input_i, int input_j,
                    double xy[2]) {
  int st = point_ready(s, point, input_i, input_j, xy);
  if (st != KL_OK)
    return st;
  kli_chain_accel(s->model, &s->model->topo.points[point], &s->st.pose,
                  first_order(s, input_i), first_order(s, input_j),
                  second_order(s, input_i, input_j), xy);
  return KL_OK;
}
