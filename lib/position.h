/*
 * position.h - private: what the rate stages need from the position stage.
 */
#ifndef KINLOOP_POSITION_H
#define KINLOOP_POSITION_H

#include "solver.h"

/* Assembles and LU-factors the Jacobian at pose p; 1 if exactly singular. */
int kli_factor_at(kl_solver *s, const kli_pose *p);
/*
 * KL_OK when the committed position was solved at the current inputs and
 * the factors of its Jacobian are in place and not singular; otherwise the
 * status (KL_ESTAGE, KL_ESINGULAR) with the message naming `stage`.
 */
int kli_require_position(kl_solver *s, const char *stage);
/* Takes the committed position down to the rounding floor with plain Newton
 * steps (a few at most, each kept only if it lowers |F|), for positions so
 * near a singular one that the tolerance leaves them ill-determined. The
 * rates and accelerations become stale. Returns the steps kept. */
int kli_polish_position(kl_solver *s);

#endif
