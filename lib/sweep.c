/*
 * sweep.c - continuation over an input range (predictor from the rates,
 * Newton as corrector, adaptive sub-steps, branch guard, limit location)
 * and the search for the assembly modes at one input.
 */
#include <math.h>
#include <string.h>

#include "velocity.h"

/* A sub-step shorter than this (rad, or length units) brackets a limit:
 * its midpoint is within half of it, well inside the promised 1e-10. */
#define KLI_LIMIT_BRACKET 2e-11
/* A corrector landing further than this from its prediction (rad, slides in
 * scale units), beyond twice the predicted move, is taken as a jump. */
#define KLI_MAX_CORRECTION 0.2
/* Sub-steps grow again only after corrections this easy. */
#define KLI_EASY_ITERATIONS 3
/* Below this condition estimate the predictor uses positions, not rates. */
#define KLI_PREDICT_RCOND 1e-6
/* The corrector's singular threshold within a sweep. */
#define KLI_SWEEP_RCOND 1e-14
/* How far past a bracketed stop the sweep looks for an assembly, to tell a
 * limit (none there) from a change point (the motion goes on). */
#define KLI_LOOK_BEYOND 1e-6
/* Sub-steps one step may take. A sweep's work stays bounded: a full turn
 * needs tens, a step spanning a hundred turns a few thousand; a range far
 * beyond that (1e100 rad) is refused at this count rather than run for
 * ever. */
#define KLI_MAX_SUBSTEPS 10000
/* A sub-step ending this fraction of itself short of its step's target is
 * taken to the target. */
#define KLI_SNAP_FRACTION 1e-9
/* Internal outcome of a sub-step: the corrector changed branch. */
#define KLI_BRANCH_JUMP 100

/* |a - b|inf over the unknowns, slides in units of the model's scale. */
static double unknown_distance(const kl_solver *s, const double *a,
                               const double *b) {
  const kl_model *m = s->model;
  double dist = 0.0;
  int v;
  for (v = 0; v < s->n; v++) {
    int c = m->topo.var_coord[v];
    double d = fabs(a[c] - b[c]);
    if (c >= m->nlinks)
      d /= m->topo.scale;
    if (!(d <= dist))
      dist = d;
  }
  return dist;
}

/*
 * From the committed (good) state at the current input, tries to reach
 * `target` for input `input`: predicts from the unit-rate velocity, corrects
 * with Newton, checks the branch, and solves the unit-rate velocity there.
 * On success the solver is at target; otherwise it is back where it was and
 * the reason is returned.
 */
static int substep(kl_solver *s, int input, double target, int det_sign) {
  double delta = target - s->st.u[input], moved, correction;
  int st, c;
  kli_state_copy(s, &s->saved, &s->st);
  /* near a singular position the rates are ill-determined (the position's
   * own error, within tolerance, is amplified by the condition number), but
   * the positions are not: predict along the secant of the last two */
  if (s->st.rcond < KLI_PREDICT_RCOND && s->have_previous &&
      s->u_previous != s->st.u[input]) {
    double ratio = delta / (s->st.u[input] - s->u_previous);
    for (c = 0; c < s->ncoords; c++)
      s->x_pred[c] = s->st.pose.x[c] +
                     (s->st.pose.x[c] - s->x_previous[c]) * ratio;
  } else {
    for (c = 0; c < s->ncoords; c++)
      s->x_pred[c] = s->st.pose.x[c] + s->st.xd[c] * delta;
  }
  moved = unknown_distance(s, s->x_pred, s->st.pose.x);
  if (moved > s->opt.max_step) {
    /* near a limit the rates grow without bound: trust the slope less */
    double shrink = s->opt.max_step / moved;
    for (c = 0; c < s->ncoords; c++)
      s->x_pred[c] = s->st.pose.x[c] +
                     (s->x_pred[c] - s->st.pose.x[c]) * shrink;
    moved = s->opt.max_step;
  }
  memcpy(s->st.pose.x, s->x_pred, (size_t)s->ncoords * sizeof(double));
  s->factors_current = s->factors_near = 0; /* the start is predicted already */
  s->sweep_u[input] = target;
  st = kl_solve_position(s, s->sweep_u);
  if (st == KL_OK) {
    correction = unknown_distance(s, s->st.pose.x, s->x_pred);
    if (kli_dense_det_sign(&s->dense) != det_sign ||
        correction > fmax(KLI_MAX_CORRECTION, 2.0 * moved))
      st = KLI_BRANCH_JUMP;
    else
      st = kl_solve_velocity(s, s->sweep_rate);
  }
  if (st != KL_OK) {
    kli_state_restore(s, &s->saved);
    s->sweep_u[input] = s->st.u[input];
  } else {
    memcpy(s->x_previous, s->saved.pose.x, (size_t)s->ncoords * sizeof(double));
    s->u_previous = s->saved.u[input];
    s->have_previous = 1;
  }
  return st;
}

/* Whether the loops close at input value u, on any branch, starting from
 * the committed state; the state is kept either way. */
static int assembles_beyond(kl_solver *s, int input, double u) {
  int st;
  kli_state_copy(s, &s->saved, &s->st);
  s->sweep_u[input] = u;
  st = kl_solve_position(s, s->sweep_u);
  kli_state_restore(s, &s->saved);
  s->sweep_u[input] = s->st.u[input];
  return st == KL_OK || st == KL_ESINGULAR;
}

static void finish(kl_sweep_result *result, int status, int steps_done,
                   double limit, int substeps) {
  kl_sweep_result r;
  if (result == NULL || result->size < sizeof(result->size))
    return;
  r.status = status;
  r.steps_done = steps_done;
  r.limit_input = limit;
  r.substeps = substeps;
  kli_copy_sized(result, &r, sizeof r);
}

static int check_sweep(kl_solver *s, int input, double from, double to,
                       int steps) {
  if (input < 0 || input >= s->ninputs)
    return kli_fail(s->error, KL_EID,
                    "sweep: input %d does not exist (the model has %d)", input,
                    s->ninputs);
  if (!isfinite(from) || !isfinite(to))
    return kli_fail(s->error, KL_ENONFINITE,
                    "sweep: the range of input %d is NaN or infinite", input);
  if (steps < 1)
    return kli_fail(s->error, KL_EINVAL,
                    "sweep: %d steps; a sweep needs at least 1", steps);
  return KL_OK;
}

/* Delivers one step: acceleration at zero input acceleration, callback. */
static int deliver(kl_solver *s, int step, double input, kl_sweep_fn fn,
                   void *user) {
  int st = kl_solve_acceleration(s, s->sweep_zero);
  if (st != KL_OK)
    return st;
  kli_state_copy(s, &s->delivered, &s->st);
  if (fn != NULL && fn(s, step, input, user) != 0)
    return kli_fail(s->error, KL_STOPPED,
                    "sweep: the callback stopped it at step %d (input %.12g)",
                    step, input);
  return KL_OK;
}

static int sweep(kl_solver *s, int input, double from, double to, int steps,
                 kl_sweep_fn fn, void *user, kl_sweep_result *result) {
  int st, k, substeps = 0, det_sign, delivered = 0;
  double full, h;
  for (k = 0; k < s->ninputs; k++) {
    s->sweep_u[k] = s->st.inputs_known ? s->st.u[k] : 0.0;
    s->sweep_rate[k] = k == input ? 1.0 : 0.0;
    s->sweep_zero[k] = 0.0;
  }
  s->sweep_u[input] = from;
  kli_state_copy(s, &s->delivered, &s->st); /* to fall back on */
  if ((st = kl_solve_position(s, s->sweep_u)) != KL_OK ||
      (st = kl_solve_velocity(s, s->sweep_rate)) != KL_OK) {
    kli_state_restore(s, &s->delivered);
    finish(result, st, 0, NAN, 0);
    return st;
  }
  det_sign = kli_dense_det_sign(&s->dense);
  s->have_previous = 0;
  st = deliver(s, 0, from, fn, user);
  delivered = st == KL_OK || st == KL_STOPPED;
  full = (to - from) / steps;
  h = full;
  for (k = 1; k <= steps && st == KL_OK; k++) {
    /* each target from the range itself, so that no error accumulates */
    double target = k == steps ? to : from + (to - from) * ((double)k / steps);
    int failures = 0, beyond, taken = 0;
    while (s->st.u[input] != target) {
      double cur = s->st.u[input], trial = cur + h;
      int r;
      if (taken++ == KLI_MAX_SUBSTEPS) {
        kli_state_restore(s, &s->delivered);
        st = kli_fail(s->error, KL_EMAXITER,
                      "sweep: step %d of input %d (to %.12g) takes more than "
                      "%d sub-steps; sweep it in more, shorter steps",
                      k, input, target, KLI_MAX_SUBSTEPS);
        finish(result, st, k, NAN, substeps);
        return st;
      }
      /* not past the target, nor a rounding error short of it: cur + h
       * can fall an ulp below a target that the step was sized to reach,
       * which would cost one more, empty, sub-step */
      if ((h > 0.0 && trial > target) || (h < 0.0 && trial < target) ||
          fabs(target - trial) <= KLI_SNAP_FRACTION * fabs(h))
        trial = target;
      r = substep(s, input, trial, det_sign);
      substeps++;
      if (r == KL_OK) {
        if (failures == 0 && s->stats.iterations <= KLI_EASY_ITERATIONS &&
            fabs(2.0 * h) <= fabs(full))
          h *= 2.0;
        continue;
      }
      failures++;
      if (fabs(trial - cur) > KLI_LIMIT_BRACKET) {
        h = 0.5 * (trial - cur);
        continue;
      }
      /* the motion cannot go on past [cur, trial] on this branch: a limit
       * if no assembly lies just beyond, a change point if one does */
      beyond = assembles_beyond(s, input, trial + (trial - cur > 0.0 ? 1.0 : -1.0) *
                                                     KLI_LOOK_BEYOND);
      kli_state_restore(s, &s->delivered);
      if (!beyond) {
        st = KL_LIMIT;
        kli_fail(s->error, KL_LIMIT,
                 "sweep: input %d reaches a motion limit at %.12g (no "
                 "assembly beyond it); %d steps delivered",
                 input, 0.5 * (cur + trial), k);
      } else {
        st = kli_fail(s->error, KL_ESINGULAR,
                      "sweep: input %d meets a singular position at %.12g (a "
                      "change point: going on would choose a branch at "
                      "random); %d steps delivered",
                      input, 0.5 * (cur + trial), k);
      }
      finish(result, st, k, 0.5 * (cur + trial), substeps);
      return st;
    }
    st = deliver(s, k, target, fn, user);
    if (st == KL_OK || st == KL_STOPPED)
      delivered = k + 1;
  }
  if (st != KL_OK && st != KL_STOPPED)
    kli_state_restore(s, &s->delivered);
  finish(result, st, delivered, NAN, substeps);
  return st;
}

int kl_solver_sweep(kl_solver *s, int input, double from, double to, int steps,
             kl_sweep_fn fn, void *user, kl_sweep_result *result) {
  double singular_rcond;
  int st;
  if (s == NULL)
    return KL_EINVAL;
  if ((st = check_sweep(s, input, from, to, steps)) != KL_OK) {
    finish(result, st, 0, NAN, 0);
    return st;
  }
  /* Near a change point rcond shrinks only linearly with the distance, so
   * the corrector's singular test would stop the sweep early; there the
   * determinant's change of sign finds the point, to the bracket. */
  singular_rcond = s->opt.singular_rcond;
  s->opt.singular_rcond = fmin(singular_rcond, KLI_SWEEP_RCOND);
  st = sweep(s, input, from, to, steps, fn, user, result);
  s->opt.singular_rcond = singular_rcond;
  return st;
}

/* ---- assembly modes ---- */

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
