/*
 * timed.c - the model's motion profile in time on a solver: every stage at
 * one time of the profile, and the input efforts over the whole profile.
 */
#include <math.h>
#include <string.h>

#include "forces.h"

/* Every stage at time t, from the state the solver holds now; KL_OK or
 * the status that stopped it (the solver may be part-way then). */
static int solve_at(kl_solver *s, double t) {
  const kl_model *m = s->model;
  int ni = s->ninputs, input = m->profile_input, st;
  double *u = s->time_motion, *ud = u + ni, *udd = ud + ni, *uddd = udd + ni;
  double motion[4];
  if ((st = kl_model_profile_motion(m, t, motion)) != KL_OK) {
    double total = kl_model_profile_duration(m);
    if (st == KL_EID)
      return kli_fail(s->error, st,
                      "solve at time: the model has no motion profile");
    if (st == KL_ENONFINITE)
      return kli_fail(s->error, st, "solve at time: the time is NaN or "
                                    "infinite");
    return kli_fail(s->error, st,
                    "solve at time: time %.17g is outside the profile's 0 to "
                    "%.17g",
                    t, total);
  }
  /* the other inputs hold the values last solved, at rest */
  memcpy(u, s->st.u, (size_t)ni * sizeof(double));
  memset(ud, 0, 3 * (size_t)ni * sizeof(double));
  u[input] = motion[0];
  ud[input] = motion[1];
  udd[input] = motion[2];
  uddd[input] = motion[3];
  if ((st = kl_solve_position(s, u)) != KL_OK ||
      (st = kl_solve_velocity(s, ud)) != KL_OK ||
      (st = kl_solve_acceleration(s, udd)) != KL_OK)
    return st;
  return kl_solve_jerk(s, uddd);
}

int kl_solve_at_time(kl_solver *s, double t) {
  int st;
  if (s == NULL)
    return KL_EINVAL;
  kli_state_keep(s);
  if ((st = solve_at(s, t)) < 0)
    kli_state_back(s);
  return st;
}

int kl_solver_time_efforts(kl_solver *s, int steps, int nloads,
                           const kl_load *loads, double *peaks,
                           double *peak_times, double *rms) {
  const kl_model *m;
  double total;
  int st, k, i;
  if (s == NULL || peaks == NULL || peak_times == NULL || rms == NULL)
    return KL_EINVAL;
  m = s->model;
  if (steps < 1)
    return kli_fail(s->error, KL_EINVAL,
                    "time efforts: %d steps; at least 1", steps);
  if ((st = kli_check_loads(s, nloads, loads, "time efforts")) != KL_OK ||
      (st = kli_forces_determinate(s, "time efforts")) != KL_OK)
    return st;
  total = kl_model_profile_duration(m);
  if (isnan(total))
    return kli_fail(s->error, KL_EID,
                    "time efforts: the model has no motion profile");
  kli_state_keep(s);
  for (k = 0; k <= steps; k++) {
    /* the last sample exactly at the end, not a rounding past it */
    double t = k == steps ? total : total * k / steps;
    if ((st = solve_at(s, t)) != KL_OK ||
        (st = kl_solve_forces(s, nloads, loads, s->time_efforts)) != KL_OK) {
      kli_state_back(s);
      return st;
    }
    for (i = 0; i < s->ninputs; i++)
      kli_cycle_take(s, i, s->time_efforts[i], t, k == 0);
  }
  for (i = 0; i < s->ninputs; i++) {
    kl_cycle_peak f = kli_cycle_figures(s, i, steps + 1);
    peaks[i] = f.peak;
    peak_times[i] = f.at;
    rms[i] = f.rms;
  }
  return KL_OK;
}
