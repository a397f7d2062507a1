/*
 * outputs.h - private: scalar outputs of a mechanism (angles, slides, point
 * coordinates, transmission angles), their values and first-order changes.
 */
#ifndef KINLOOP_OUTPUTS_H
#define KINLOOP_OUTPUTS_H

#include "solver.h"

/* Where a sweep stopped at a limit, a range's last value is taken this far
 * inside it (the limit is located to 1e-11). */
#define KLI_LIMIT_INSIDE 1e-10

/* A dimension resolved to what moves: local coordinate `axis` of joint
 * `joint`'s attachment on `link`, or (joint -1) point `point`'s own. */
typedef struct {
  int joint, link, axis, point;
  int coupling; /* a coupling's radius (joint and point -1), or -1 */
} kli_dim;

/* KL_OK if o names existing items of the right kinds; KL_EID, KL_EKIND or
 * KL_EINVAL otherwise, with the reason in buf when buf is not NULL. */
int kli_output_check(const kl_model *m, const kl_output *o, char *buf);
/* KL_OK and *out, or KL_EID / KL_EKIND / KL_EINVAL with the reason in buf. */
int kli_dim_resolve(const kl_model *m, const kl_dimension *d, kli_dim *out,
                    char *buf);
/* The output's value at the committed pose. */
double kli_output_value(const kl_solver *s, const kl_output *o);
/* Its first-order change for coordinate changes dx and, when dim is not
 * NULL, a unit change of that dimension. */
double kli_output_change(const kl_solver *s, const kl_output *o,
                         const double *dx, const kli_dim *dim);

#endif
