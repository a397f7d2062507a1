/*
 * velocity.h - private: the linear solves every rate stage shares, with the
 * factors of the Jacobian at the committed position.
 */
#ifndef KINLOOP_VELOCITY_H
#define KINLOOP_VELOCITY_H

#include "position.h"

/* rhs = (dF/dx) G w: the loop-rate terms of input rates w (NULL for none). */
void kli_input_terms(kl_solver *s, const double *w, double *rhs);
/* rhs += B(va, vb) at the committed position: the centripetal and Coriolis
 * terms of rates va and vb over every row. */
void kli_add_second(kl_solver *s, const double *va, const double *vb,
                    double *rhs);
/* Solves J q = -rhs for the loop rows in rhs (2 per loop, reduced to the
 * kept rows in place) and writes out = E q + G w. */
void kli_rate_solve(kl_solver *s, double *rhs, const double *w, double *out);

#endif
