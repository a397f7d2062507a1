/*
 * forces.h - private: what the cycle figures need from the force stage: the
 * forces at the committed pose for given rates, and the links' energy.
 */
#ifndef KINLOOP_FORCES_H
#define KINLOOP_FORCES_H

#include "solver.h"

/* KL_OK unless the model declares redundant constraints (then
 * KL_EINDETERMINATE with the message naming `stage`). */
int kli_forces_determinate(kl_solver *s, const char *stage);
/* KL_OK when the force stage may run on the committed state (position,
 * rates and accelerations solved at the current inputs); otherwise
 * KL_ESTAGE or KL_ESINGULAR with the message naming `stage`. */
int kli_forces_ready(kl_solver *s, const char *stage);
/*
 * The forces at the committed pose for coordinate rates xd and
 * accelerations xdd (the state's own, or scaled ones) and the loads (already
 * checked), into `out`. Factors the force system unless it was factored at
 * this pose already. KL_OK, or KL_ESINGULAR (an exactly zero pivot) with
 * the message naming `stage`; nothing is written then.
 */
int kli_forces_at(kl_solver *s, const double *xd, const double *xdd,
                  int nloads, const kl_load *loads, kli_forces *out,
                  const char *stage);
/* The links' kinetic energy at coordinate rates xd into *kinetic, and
 * their whole energy: kinetic, plus the potential of gravity, plus that of
 * the constant loads (minus their force dotted with their point's position,
 * minus their torque times their link's angle) into *total. Differences of
 * the total between two states are the work the inputs did between them. */
void kli_link_energy(kl_solver *s, const double *xd, int nloads,
                     const kl_load *loads, double *kinetic, double *total);
/* The running figures of quantity q (inputs' efforts first, then the
 * joints', the shaking force and moment) in s->cycle_sums: folds value v
 * at `at` (an input value or a time) in, starting afresh when `first`. */
void kli_cycle_take(kl_solver *s, int q, double v, double at, int first);
/* Quantity q's figures over `samples` equally spaced samples: the
 * trapezoid rule, whose end samples weigh half. */
kl_cycle_peak kli_cycle_figures(const kl_solver *s, int q, int samples);

#endif
