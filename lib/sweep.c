/*
 * sweep.c - continuation over an input range: predictor from the rates,
 * Newton as corrector, adaptive sub-steps, branch guard, limit location.
 */
#include <limits.h>
#include <math.h>
#include <string.h>

#include "describe.h"
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
/* The least singular test a sweep's corrector makes, whatever the option:
 * closer to a change point than this the determinant's sign, which keeps
 * the branch, is no longer reliable (the position's rounding error times
 * the condition number); a change point is located from samples further
 * away (cross_with). */
#define KLI_SWEEP_RCOND 1e-10
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
/* A sub-step whose secant differs from the mean of its end rates by more
 * than this fraction of the rates left its branch: over a sub-step short
 * enough for the predictor, a smooth branch keeps the difference to a few
 * per cent, and far less at the sweep's usual steps. */
#define KLI_TANGENT_FIT 0.25
/* Internal outcome of a sub-step: the corrector changed branch. */
#define KLI_BRANCH_JUMP 100
/* Internal outcome of a stretch of sub-steps: the motion cannot go on past
 * a bracket of KLI_LIMIT_BRACKET on this branch. */
#define KLI_STUCK 101
/* Half-widths tried for the samples around a change point (rad, or scale
 * units for a sliding input): wide enough that the positions there are well
 * conditioned and that the point lies inside, narrow enough that a
 * second-order prediction across it lands on the branch it continues. */
static const double kli_cross_spans[3] = {1e-3, 1e-4, 1e-2};
/* A prediction across a change point is on the same branch when Newton's
 * correction is at most this fraction of the predicted move, and the rates
 * beyond differ from their second-order prediction by at most this fraction
 * of their size: the branch that crosses differs in tangent by order one. */
#define KLI_CROSS_FIT 0.05

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
 * Whether the sub-step from s->saved to the committed state, `delta` long in
 * the input, stayed on one smooth branch: the secant of every unknown
 * agrees with the trapezoid of its rates at both ends, as a smooth curve's
 * does to second order. A target that lands (to within the tolerance) on a
 * change point solves to a position whose determinant's sign is a coin
 * toss and whose rates mix both branches; this test, not the sign, refuses
 * it.
 */
static int same_tangent(const kl_solver *s, double delta) {
  const kl_model *m = s->model;
  double worst = 0.0, size = 0.0;
  int v;
  if (delta == 0.0)
    return 1; /* no sub-step (a target already reached): no secant to test */
  for (v = 0; v < s->n; v++) {
    int c = m->topo.var_coord[v];
    double unit = c >= m->nlinks ? 1.0 / m->topo.scale : 1.0;
    double secant = (s->st.pose.x[c] - s->saved.pose.x[c]) / delta * unit;
    double before = s->saved.xd[c] * unit, after = s->st.xd[c] * unit;
    worst = fmax(worst, fabs(secant - 0.5 * (before + after)));
    size = fmax(size, fmax(fabs(secant), fmax(fabs(before), fabs(after))));
  }
  return worst <= KLI_TANGENT_FIT * size;
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
    else if ((st = kl_solve_velocity(s, s->sweep_rate)) == KL_OK &&
             !same_tangent(s, delta))
      st = KLI_BRANCH_JUMP;
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

/* The stretch of sub-steps from the committed state to `target`: each
 * sub-step `*h` long (sign included), halved where it fails, doubled again
 * after easy corrections, up to `full`. Returns KL_OK at the target;
 * KLI_STUCK when a sub-step shorter than KLI_LIMIT_BRACKET still fails,
 * with the bracket [*stuck_at, *refused] and the solver at *stuck_at;
 * KL_EMAXITER after KLI_MAX_SUBSTEPS sub-steps. */
static int advance(kl_solver *s, int input, double target, double full,
                   int det_sign, double *h, int *substeps, double *stuck_at,
                   double *refused) {
  int taken = 0, easy_before = 0;
  if ((*h > 0.0) != (target > s->st.u[input]))
    *h = -*h; /* a stretch may go back, as the samples of a crossing do */
  while (s->st.u[input] != target) {
    double cur = s->st.u[input], trial = cur + *h;
    int r;
    if (taken++ == KLI_MAX_SUBSTEPS)
      return KL_EMAXITER;
    /* not past the target, nor a rounding error short of it: cur + h
     * can fall an ulp below a target that the step was sized to reach,
     * which would cost one more, empty, sub-step */
    if ((*h > 0.0 && trial > target) || (*h < 0.0 && trial < target) ||
        fabs(target - trial) <= KLI_SNAP_FRACTION * fabs(*h))
      trial = target;
    r = substep(s, input, trial, det_sign);
    if (*substeps < INT_MAX) /* a count, saturated in the longest sweeps */
      (*substeps)++;
    if (r == KL_OK) {
      /* grow after two easy corrections in a row, so that a sub-step
       * halved near a hard spot does not crawl through the rest */
      int easy = s->stats.iterations <= KLI_EASY_ITERATIONS;
      if (easy && easy_before && fabs(2.0 * *h) <= fabs(full))
        *h *= 2.0;
      easy_before = easy;
      continue;
    }
    easy_before = 0;
    if (fabs(trial - cur) > KLI_LIMIT_BRACKET) {
      *h = 0.5 * (trial - cur);
      continue;
    }
    *stuck_at = cur;
    *refused = trial;
    return KLI_STUCK;
  }
  return KL_OK;
}

/* Solves the unit-rate acceleration at the committed position (the
 * delivered steps carry it) and keeps the state and its log |det|. */
static int keep_sample(kl_solver *s, kli_state *into, double *log_det,
                       int *sign) {
  int st;
  /* near the change point the tolerance leaves the position ill-determined
   * along the branches' crossing direction: polish it before the rates */
  kli_polish_position(s);
  if ((st = kl_solve_velocity(s, s->sweep_rate)) != KL_OK ||
      (st = kl_solve_acceleration(s, s->sweep_zero)) != KL_OK)
    return st;
  kli_state_copy(s, into, &s->st);
  /* the velocity stage left the factors of the solution in place */
  *log_det = kli_dense_log_det(&s->dense, sign);
  return KL_OK;
}

/* Lagrange weights of the four samples' inputs at u. */
static void cubic_weights(const double *at, double u, double w[4]) {
  int i, j;
  for (i = 0; i < 4; i++) {
    w[i] = 1.0;
    for (j = 0; j < 4; j++)
      if (j != i)
        w[i] *= (u - at[j]) / (at[i] - at[j]);
  }
}

static double cubic_at(const double *at, const double *g, double u) {
  double w[4];
  cubic_weights(at, u, w);
  return w[0] * g[0] + w[1] * g[1] + w[2] * g[2] + w[3] * g[3];
}

/* The input of every crossing sample. */
static void crossing_inputs(const kl_solver *s, int input, double at[4]) {
  int i;
  for (i = 0; i < 4; i++)
    at[i] = s->crossing[i].u[input];
}

/* Tries samples of half-width `span` around `near`, two on each side of
 * the change point on this branch, the far ones reached by one
 * second-order prediction across it. On success the point, the zero of the
 * determinant along the branch (a cubic through the four samples), goes to
 * *where and the solver is at the sample just beyond it. */
static int cross_with(kl_solver *s, int input, double near, double span,
                      double dir, int det_sign, int *substeps,
                      double *where) {
  double targets[4], log_det[4], g[4], at[4], biggest = -HUGE_VAL, h, lo, hi;
  double move, correction, rate_gap, rate_size, stuck_at, refused;
  int sign[4], i, c;
  targets[0] = near - dir * span;
  targets[1] = near - dir * 0.5 * span;
  targets[2] = near + dir * 0.5 * span;
  targets[3] = near + dir * span;
  /* the two samples before it, by continuation from the delivered step */
  kli_state_restore(s, &s->delivered);
  s->have_previous = 0;
  for (i = 0; i < 2; i++) {
    h = 0.5 * span * dir;
    if (advance(s, input, targets[i], span, det_sign, &h, substeps, &stuck_at,
                &refused) != KL_OK ||
        keep_sample(s, &s->crossing[i], &log_det[i], &sign[i]) != KL_OK ||
        sign[i] != det_sign)
      return KL_ESINGULAR;
  }
  /* across: x + x' h + x'' h^2 / 2 from the second sample */
  h = targets[2] - targets[1];
  for (c = 0; c < s->ncoords; c++)
    s->x_pred[c] = s->st.pose.x[c] + s->st.xd[c] * h +
                   0.5 * s->st.xdd[c] * h * h;
  move = unknown_distance(s, s->x_pred, s->st.pose.x);
  memcpy(s->st.pose.x, s->x_pred, (size_t)s->ncoords * sizeof(double));
  s->factors_current = s->factors_near = 0;
  s->sweep_u[input] = targets[2];
  if (kl_solve_position(s, s->sweep_u) != KL_OK ||
      keep_sample(s, &s->crossing[2], &log_det[2], &sign[2]) != KL_OK ||
      sign[2] != -det_sign)
    return KL_ESINGULAR;
  correction = unknown_distance(s, s->st.pose.x, s->x_pred);
  for (c = 0; c < s->ncoords; c++)
    s->x_pred[c] = s->crossing[1].xd[c] + s->crossing[1].xdd[c] * h;
  rate_gap = unknown_distance(s, s->st.xd, s->x_pred);
  for (c = 0; c < s->ncoords; c++)
    s->x_pred[c] = 0.0;
  rate_size = unknown_distance(s, s->crossing[1].xd, s->x_pred);
  if (!(correction <= KLI_CROSS_FIT * move) ||
      !(rate_gap <= KLI_CROSS_FIT * rate_size))
    return KL_ESINGULAR; /* the prediction found the other branch */
  h = 0.5 * span * dir;
  s->have_previous = 0;
  if (advance(s, input, targets[3], span, -det_sign, &h, substeps, &stuck_at,
              &refused) != KL_OK ||
      keep_sample(s, &s->crossing[3], &log_det[3], &sign[3]) != KL_OK ||
      sign[3] != -det_sign)
    return KL_ESINGULAR;
  /* the determinant along the branch, scaled to its largest sample */
  for (i = 0; i < 4; i++)
    biggest = fmax(biggest, log_det[i]);
  for (i = 0; i < 4; i++)
    g[i] = sign[i] * exp(log_det[i] - biggest);
  crossing_inputs(s, input, at);
  lo = at[1];
  hi = at[2];
  for (i = 0; i < 200 && lo != hi; i++) {
    double mid = 0.5 * (lo + hi);
    if (mid == lo || mid == hi)
      break;
    if ((cubic_at(at, g, mid) > 0.0) == (g[1] > 0.0))
      lo = mid;
    else
      hi = mid;
  }
  *where = 0.5 * (lo + hi);
  kli_state_restore(s, &s->crossing[2]);
  return KL_OK;
}

/* Locates the change point near `near`, met going `dir` with determinant
 * sign det_sign, to well inside 1e-9: KL_OK with *where and the solver
 * just beyond it on the same branch (samples in s->crossing), or
 * KL_ESINGULAR when no span gives a consistent crossing. */
static int cross(kl_solver *s, int input, double near, double dir,
                 int det_sign, int *substeps, double *where) {
  double unit =
      kli_input_is_angle(s->model, input) ? 1.0 : s->model->topo.scale;
  int k;
  for (k = 0; k < 3; k++)
    if (cross_with(s, input, near, kli_cross_spans[k] * unit, dir, det_sign,
                   substeps, where) == KL_OK)
      return KL_OK;
  return KL_ESINGULAR;
}

/* Whether `target`, going `dir`, lies between the two inner samples of the
 * last crossing, where positions are too ill-conditioned to solve for. */
static int inside_crossing(const kl_solver *s, int input, double target,
                           double dir) {
  return s->passages > 0 &&
         dir * (target - s->crossing[1].u[input]) > 0.0 &&
         dir * (target - s->crossing[2].u[input]) < 0.0;
}

/* The state at `target` inside a crossing, by cubic interpolation of the
 * four samples on the branch (its error is that of a cubic over the
 * samples' span, far below the tolerances), committed as solved. */
static void interpolate_crossing(kl_solver *s, int input, double target) {
  double at[4], w[4];
  int c, i;
  crossing_inputs(s, input, at);
  cubic_weights(at, target, w);
  for (c = 0; c < s->ncoords; c++) {
    double x = 0.0, xd = 0.0, xdd = 0.0;
    for (i = 0; i < 4; i++) {
      x += w[i] * s->crossing[i].pose.x[c];
      xd += w[i] * s->crossing[i].xd[c];
      xdd += w[i] * s->crossing[i].xdd[c];
    }
    s->st.pose.x[c] = x;
    s->st.xd[c] = xd;
    s->st.xdd[c] = xdd;
  }
  kli_pose_trig(s->model, &s->st.pose);
  memcpy(s->st.u, s->crossing[2].u, (size_t)s->ninputs * sizeof(double));
  s->st.u[input] = target;
  s->st.position_solved = s->st.inputs_known = 1;
  s->st.velocity_solved = s->st.acceleration_solved = 1;
  s->st.jerk_solved = 0;
  s->st.forces_solved = 0;
  s->st.last_attempt = KL_OK;
  s->st.rcond = 0.0; /* at (or next to) a singular position */
  s->stats.rcond = 0.0;
  s->factors_current = s->factors_near = 0;
  s->coefficients_solved = 0;
}

static void finish(const kl_solver *s, kl_sweep_result *result, int status,
                   int steps_done, double limit, int substeps) {
  kl_sweep_result r;
  if (result == NULL || result->size < sizeof(result->size))
    return;
  r.status = status;
  r.steps_done = steps_done;
  r.limit_input = limit;
  r.substeps = substeps;
  r.passages = s->passages;
  r.passage_input = s->last_passage;
  kli_copy_sized(result, &r, sizeof r);
}

static int check_sweep(kl_solver *s, int input, double from, double to,
                       int steps) {
  char label[KLI_LABEL_SIZE], a[48], b[48];
  if (input < 0 || input >= s->ninputs)
    return kli_fail_index(s->error, "sweep", "input", input, s->ninputs);
  kli_input_label(s->model, input, label, sizeof label);
  if (!isfinite(from) || !isfinite(to))
    return kli_fail(s->error, KL_ENONFINITE,
                    "sweep: the range of %s is NaN or infinite", label);
  if (!isfinite(to - from))
    return kli_fail(s->error, KL_ENONFINITE,
                    "sweep: the range of %s, %s to %s, is longer than a "
                    "double holds",
                    label,
                    kli_input_value(s->model, input, from, 10, a, sizeof a),
                    kli_input_value(s->model, input, to, 10, b, sizeof b));
  if (steps < 1)
    return kli_fail(s->error, KL_EINVAL,
                    "sweep: %d steps; a sweep needs at least 1", steps);
  if (steps > KL_MAX_STEPS)
    return kli_fail(s->error, KL_ETOOLARGE,
                    "sweep: %d steps; a sweep takes at most %d (KL_MAX_STEPS)",
                    steps, KL_MAX_STEPS);
  return KL_OK;
}

/* Hands the committed state to the callback as step `step`, at `value` of
 * input `input`. */
static int hand_over(kl_solver *s, int input, int step, double value,
                     kl_sweep_fn fn, void *user) {
  char at[2 * KLI_LABEL_SIZE];
  kli_state_copy(s, &s->delivered, &s->st);
  if (fn != NULL && fn(s, step, value, user) != 0)
    return kli_fail(s->error, KL_STOPPED,
                    "sweep: the callback stopped it at step %d (%s)", step,
                    kli_input_at(s->model, input, value, at, sizeof at));
  return KL_OK;
}

/* Delivers one step: acceleration and jerk at zero input acceleration and
 * jerk (the second- and third-order coefficients), callback. */
static int deliver(kl_solver *s, int input, int step, double value,
                   kl_sweep_fn fn, void *user) {
  int st = kl_solve_acceleration(s, s->sweep_zero);
  if (st == KL_OK)
    st = kl_solve_jerk(s, s->sweep_zero);
  return st != KL_OK ? st : hand_over(s, input, step, value, fn, user);
}

/* The motion cannot go on past [cur, trial]: a limit if no assembly lies
 * just beyond; otherwise a change point, located and, with the option,
 * passed. KL_OK when passed (the solver just beyond it, *det_sign
 * flipped); otherwise the status that ends the sweep, its message written,
 * the solver back at the delivered step and *where the location. */
static int stuck(kl_solver *s, int input, double cur, double trial, int k,
                 int *det_sign, int *substeps, double *where) {
  double dir = trial > cur ? 1.0 : -1.0;
  int beyond = assembles_beyond(s, input, trial + dir * KLI_LOOK_BEYOND);
  char label[KLI_LABEL_SIZE], at[48];
  kli_input_label(s->model, input, label, sizeof label);
  *where = 0.5 * (cur + trial);
  if (!beyond) {
    kli_state_restore(s, &s->delivered);
    return kli_fail(s->error, KL_LIMIT,
                    "sweep: %s reaches a motion limit at %s (no assembly "
                    "beyond it); %d steps delivered",
                    label, kli_input_value(s->model, input, *where, 12, at,
                                           sizeof at), k);
  }
  if (cross(s, input, *where, dir, *det_sign, substeps, where) != KL_OK) {
    kli_state_restore(s, &s->delivered);
    *where = 0.5 * (cur + trial);
    return kli_fail(s->error, KL_ESINGULAR,
                    "sweep: %s meets a singular position near %s where the "
                    "motion could go on along more than one branch, none "
                    "continuing with the same tangent; %d steps delivered",
                    label, kli_input_value(s->model, input, *where, 12, at,
                                           sizeof at), k);
  }
  if (!s->opt.pass_change_points) {
    kli_state_restore(s, &s->delivered);
    return kli_fail(s->error, KL_ESINGULAR,
                    "sweep: %s meets a change point at %s (two branches "
                    "cross there; the option pass_change_points goes on "
                    "along the branch with the same tangent); %d steps "
                    "delivered",
                    label, kli_input_value(s->model, input, *where, 12, at,
                                           sizeof at), k);
  }
  s->passages++;
  s->last_passage = *where;
  *det_sign = -*det_sign;
  return KL_OK;
}

static int sweep(kl_solver *s, int input, double from, double to, int steps,
                 kl_sweep_fn fn, void *user, kl_sweep_result *result) {
  int st, k, substeps = 0, det_sign, delivered = 0;
  double full, h, dir = to >= from ? 1.0 : -1.0;
  for (k = 0; k < s->ninputs; k++) {
    s->sweep_u[k] = s->st.inputs_known ? s->st.u[k] : 0.0;
    s->sweep_rate[k] = k == input ? 1.0 : 0.0;
    s->sweep_zero[k] = 0.0;
  }
  s->sweep_u[input] = from;
  s->passages = 0;
  s->last_passage = NAN;
  kli_state_copy(s, &s->delivered, &s->st); /* to fall back on */
  if ((st = kl_solve_position(s, s->sweep_u)) != KL_OK ||
      (st = kl_solve_velocity(s, s->sweep_rate)) != KL_OK) {
    kli_state_restore(s, &s->delivered);
    finish(s, result, st, 0, NAN, 0);
    return st;
  }
  det_sign = kli_dense_det_sign(&s->dense);
  s->have_previous = 0;
  st = deliver(s, input, 0, from, fn, user);
  delivered = st == KL_OK || st == KL_STOPPED;
  full = (to - from) / steps;
  h = full;
  for (k = 1; k <= steps && st == KL_OK; k++) {
    /* each target from the range itself, so that no error accumulates */
    double target = k == steps ? to : from + (to - from) * ((double)k / steps);
    double stuck_at, refused, where;
    while (!inside_crossing(s, input, target, dir) &&
           (st = advance(s, input, target, full, det_sign, &h, &substeps,
                         &stuck_at, &refused)) == KLI_STUCK) {
      st = stuck(s, input, stuck_at, refused, k, &det_sign, &substeps,
                 &where);
      if (st != KL_OK) {
        finish(s, result, st, k, where, substeps);
        return st;
      }
      h = full;
    }
    if (st == KL_EMAXITER) {
      char label[KLI_LABEL_SIZE], to_value[48];
      kli_state_restore(s, &s->delivered);
      st = kli_fail(s->error, KL_EMAXITER,
                    "sweep: step %d of %s (to %s) takes more than %d "
                    "sub-steps; sweep it in more, shorter steps",
                    k, kli_input_label(s->model, input, label, sizeof label),
                    kli_input_value(s->model, input, target, 10, to_value,
                                    sizeof to_value),
                    KLI_MAX_SUBSTEPS);
      finish(s, result, st, k, NAN, substeps);
      return st;
    }
    if (inside_crossing(s, input, target, dir)) {
      /* too near the change point to solve for: the branch's samples */
      interpolate_crossing(s, input, target);
      st = hand_over(s, input, k, target, fn, user);
      kli_state_restore(s, &s->crossing[2]);
    } else {
      st = deliver(s, input, k, target, fn, user);
    }
    if (st == KL_OK || st == KL_STOPPED)
      delivered = k + 1;
  }
  if (st != KL_OK && st != KL_STOPPED)
    kli_state_restore(s, &s->delivered);
  finish(s, result, st, delivered, NAN, substeps);
  return st;
}

int kl_solver_sweep(kl_solver *s, int input, double from, double to, int steps,
             kl_sweep_fn fn, void *user, kl_sweep_result *result) {
  int st;
  if (s == NULL)
    return KL_EINVAL;
  if ((st = check_sweep(s, input, from, to, steps)) != KL_OK) {
    finish(s, result, st, 0, NAN, 0);
    return st;
  }
  /* The option itself is left alone: a callback reading the options sees
   * the caller's. */
  s->singular_rcond = fmax(s->opt.singular_rcond, KLI_SWEEP_RCOND);
  st = sweep(s, input, from, to, steps, fn, user, result);
  s->singular_rcond = s->opt.singular_rcond;
  return st;
}

int kl_solver_passages(const kl_solver *s, int *count, double *last_input) {
  if (s == NULL)
    return KL_EINVAL;
  if (count != NULL)
    *count = s->passages;
  if (last_input != NULL)
    *last_input = s->last_passage;
  return KL_OK;
}
