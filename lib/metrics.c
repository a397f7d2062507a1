/*
 * metrics.c - the design figures: outputs and their derivatives, extremes
 * over a sweep, time ratio, mechanical advantage, static input effort by
 * virtual work, dimensional sensitivity and tolerance stack-up.
 */
#include <math.h>
#include <string.h>

#include "describe.h"
#include "outputs.h"
#include "velocity.h"

#define KLI_TWO_PI (2.0 * KLI_PI)
/* Crank angles this close (modulo a turn) are the same position. */
#define KLI_SAME_ANGLE 1e-12
/* Refined extremes stop when the bracket is this narrow (input units). */
#define KLI_EXTREME_BRACKET 1e-13

/* ---- outputs ---- */

int kl_output_value(const kl_solver *s, const kl_output *o, double *value) {
  int st;
  if (s == NULL || value == NULL)
    return KL_EINVAL;
  if ((st = kli_output_check(s->model, o, NULL)) != KL_OK)
    return st;
  *value = kli_output_value(s, o);
  return KL_OK;
}

/* The coefficients at the committed position, computed if stale. */
static int need_coefficients(kl_solver *s) {
  return s->coefficients_solved ? KL_OK : kl_solve_coefficients(s);
}

static int check_input(kl_solver *s, int input, const char *what) {
  if (input < 0 || input >= s->ninputs)
    return kli_fail_index(s->error, what, "input", input, s->ninputs);
  return KL_OK;
}

int kl_output_deriv(kl_solver *s, const kl_output *o, int input,
                    double *deriv) {
  int st;
  if (s == NULL || deriv == NULL)
    return KL_EINVAL;
  if ((st = kli_output_check(s->model, o, s->error)) != KL_OK ||
      (st = check_input(s, input, "output derivative")) != KL_OK ||
      (st = need_coefficients(s)) != KL_OK)
    return st;
  *deriv = kli_output_change(
      s, o, s->coef1 + (size_t)input * (size_t)s->ncoords, NULL);
  return KL_OK;
}

int kl_output_mechanical_advantage(kl_solver *s, const kl_output *o, int input,
                            double *ma) {
  double d;
  int st;
  if (ma == NULL)
    return KL_EINVAL;
  if ((st = kl_output_deriv(s, o, input, &d)) != KL_OK)
    return st;
  *ma = 1.0 / d; /* virtual work: T_out dO = T_in du */
  return KL_OK;
}

/* ---- extremes over a sweep ---- */

/*
 * What a range search keeps while the sweep delivers its steps. Every step
 * gives the output's value and, from the unit-rate velocity, its slope;
 * where the slope changes sign between two steps a turning point lies
 * between them. The best such bracket for the minimum and for the maximum
 * (by the larger or smaller of its two sampled values) is kept, with the
 * state at its left end in s->extreme[i]; the ends of the range are
 * candidates too.
 */
typedef struct {
  kl_solver *s;
  const kl_output *o;
  int steps;              /* steps delivered */
  double direction;       /* +1 for a sweep up the input, -1 down */
  double v, g, u;         /* the last step: value, slope, input */
  double first_v, first_u;
  int found[2];           /* [0] a minimum's bracket, [1] a maximum's */
  double sampled[2];      /* its better sampled value */
  double sampled_at[2];   /* and where */
  double lo[2], hi[2];    /* its inputs */
} range_search;

static int track_extremes(const kl_solver *cs, int step, double input,
                          void *user) {
  range_search *r = user;
  kl_solver *s = r->s; /* the same solver, which this search owns */
  double v = kli_output_value(cs, r->o);
  /* the slope along the way the sweep goes, which may be downward */
  double g = kli_output_change(cs, r->o, cs->st.xd, NULL) * r->direction;
  int i;
  (void)step;
  if (r->steps == 0) {
    r->first_v = v;
    r->first_u = input;
  } else {
    for (i = 0; i < 2; i++) {
      /* a minimum where the slope turns from falling to rising */
      int turns = i == 0 ? (r->g <= 0.0 && g >= 0.0) : (r->g >= 0.0 && g <= 0.0);
      int later = i == 0 ? v < r->v : v > r->v;
      double best = later ? v : r->v;
      if (turns && (!r->found[i] || (i == 0 ? best < r->sampled[i]
                                            : best > r->sampled[i]))) {
        r->found[i] = 1;
        r->sampled[i] = best;
        r->sampled_at[i] = later ? input : r->u;
        r->lo[i] = r->u;
        r->hi[i] = input;
        kli_state_copy(s, &s->extreme[i], &s->previous);
      }
    }
  }
  kli_state_copy(s, &s->previous, &s->st);
  r->v = v;
  r->g = g;
  r->u = input;
  r->steps++;
  return 0;
}

/* d output / d input at `u`, solved from the state kept in `from`; 0 and
 * *ok = 0 if u cannot be reached from there. */
static double slope_at(kl_solver *s, int input, const kl_output *o, double u,
                       const kli_state *from, int *ok) {
  kli_state_restore(s, from);
  memcpy(s->sweep_u, s->st.u, (size_t)s->ninputs * sizeof(double));
  s->sweep_u[input] = u;
  *ok = kl_solve_position(s, s->sweep_u) == KL_OK &&
        kl_solve_velocity(s, s->sweep_rate) == KL_OK;
  return *ok ? kli_output_change(s, o, s->st.xd, NULL) : 0.0;
}

/*
 * The turning point in the bracket [a, b] (the slope changes sign there),
 * by false position (Illinois) on the slope, solved from the state kept
 * at a; its value into *value and its input into *at. 0 if a solve fails.
 */
static int refine_extreme(kl_solver *s, int input, const kl_output *o,
                          int which, double a, double b, double *value,
                          double *at) {
  const kli_state *from = &s->extreme[which];
  double ga, gb;
  int ok, side = 0, iter;
  ga = slope_at(s, input, o, a, from, &ok);
  if (!ok)
    return 0;
  gb = slope_at(s, input, o, b, from, &ok);
  if (!ok)
    return 0;
  for (iter = 0; iter < 100 && fabs(b - a) > KLI_EXTREME_BRACKET &&
                 ga != 0.0 && gb != 0.0 && ga * gb < 0.0;
       iter++) {
    double c = (a * gb - b * ga) / (gb - ga), gc;
    gc = slope_at(s, input, o, c, from, &ok);
    if (!ok)
      return 0;
    if (ga * gc < 0.0) {
      b = c, gb = gc;
      if (side == -1)
        ga *= 0.5;
      side = -1;
    } else {
      a = c, ga = gc;
      if (side == 1)
        gb *= 0.5;
      side = 1;
    }
  }
  *at = ga == 0.0 ? a : gb == 0.0 ? b : 0.5 * (a + b);
  slope_at(s, input, o, *at, from, &ok);
  if (ok)
    *value = kli_output_value(s, o);
  return ok;
}

/* The extremes found by the search `r` of a sweep that ended with status
 * `st` (where the motion stopped: `limit`): the ends of what was swept and
 * each bracketed turn, refined. */
static void collect_extremes(kl_solver *s, int input, const kl_output *o,
                             const range_search *r, int st, double limit,
                             kl_range *out) {
  int i;
  memset(out, 0, sizeof *out);
  out->sweep_status = st;
  out->limit_input = limit;
  out->min = out->max = r->first_v;
  out->input_at_min = out->input_at_max = r->first_u;
  if (r->v < out->min)
    out->min = r->v, out->input_at_min = r->u;
  if (r->v > out->max)
    out->max = r->v, out->input_at_max = r->u;
  for (i = 0; i < 2; i++) {
    double value, at;
    if (!r->found[i])
      continue;
    /* A turn that lands on a sample can leave both re-solved slopes of its
     * bracket on one side (rounding), so refinement cannot go below the
     * bracket's own samples: they are candidates too. */
    if (!refine_extreme(s, input, o, i, r->lo[i], r->hi[i], &value, &at) ||
        (i == 0 ? r->sampled[i] < value : r->sampled[i] > value))
      value = r->sampled[i], at = r->sampled_at[i];
    if (i == 0 && value < out->min)
      out->min = value, out->input_at_min = at;
    if (i == 1 && value > out->max)
      out->max = value, out->input_at_max = at;
  }
}

int kl_output_range(kl_solver *s, int input, double from, double to,
                    int steps, const kl_output *o, kl_range *range) {
  range_search r;
  kl_sweep_result sw;
  kl_range out;
  int st;
  if (s == NULL || range == NULL || range->size < sizeof(range->size))
    return KL_EINVAL;
  if ((st = kli_output_check(s->model, o, s->error)) != KL_OK)
    return st;
  memset(&r, 0, sizeof r);
  r.s = s;
  r.o = o;
  r.direction = to >= from ? 1.0 : -1.0;
  sw.size = sizeof sw;
  kli_state_keep(s);
  st = kl_solver_sweep(s, input, from, to, steps, track_extremes, &r, &sw);
  if (st == KL_ESINGULAR && r.steps > 0 && isfinite(sw.limit_input)) {
    /* a change point on the way: the range up to it is kept for the
     * caller, the solver goes back, and the sweep's message stays */
    char message[KLI_MESSAGE_SIZE];
    memcpy(message, s->error, sizeof message);
    collect_extremes(s, input, o, &r, st, sw.limit_input, &out);
    kli_copy_sized(range, &out, sizeof out);
    kli_state_back(s);
    memcpy(s->error, message, sizeof message);
    return st;
  }
  if (st != KL_OK && st != KL_LIMIT) {
    kli_state_back(s);
    return st;
  }
  if (st == KL_LIMIT) {
    /* the motion's last reachable position counts too */
    double inside = sw.limit_input - (to > from ? 1.0 : -1.0) * KLI_LIMIT_INSIDE;
    kl_sweep_result tail;
    tail.size = sizeof tail;
    kl_solver_sweep(s, input, r.u, inside, 1, track_extremes, &r, &tail);
  }
  kli_state_copy(s, &s->delivered, &s->st); /* where the sweep ended */
  collect_extremes(s, input, o, &r, st, sw.limit_input, &out);
  kli_state_restore(s, &s->delivered);
  kli_copy_sized(range, &out, sizeof out);
  return st;
}

/* The crank angle from the output's minimum to its maximum, in (0, 2 pi),
 * for a crank turning in the positive sense. */
static int rising_angle(const kl_range *range, double *rising) {
  double a;
  if (!isfinite(range->input_at_min) || !isfinite(range->input_at_max))
    return KL_ENONFINITE;
  a = fmod(range->input_at_max - range->input_at_min, KLI_TWO_PI);
  if (a < 0.0)
    a += KLI_TWO_PI;
  /* extremes a whole turn apart (to rounding) are no stroke at all */
  if (!(a > KLI_SAME_ANGLE) || !(a < KLI_TWO_PI - KLI_SAME_ANGLE))
    return KL_EINVAL;
  *rising = a;
  return KL_OK;
}

int kl_range_time_ratio(const kl_range *range, double *ratio) {
  double a;
  int st;
  if (range == NULL || ratio == NULL)
    return KL_EINVAL;
  if ((st = rising_angle(range, &a)) != KL_OK)
    return st;
  *ratio = a / (KLI_TWO_PI - a);
  return KL_OK;
}

int kl_range_quick_return(const kl_range *range, double *ratio, int *slower,
                          double *slower_angle) {
  double a, back;
  int st;
  if (range == NULL || ratio == NULL)
    return KL_EINVAL;
  if ((st = rising_angle(range, &a)) != KL_OK)
    return st;
  back = KLI_TWO_PI - a;
  *ratio = a >= back ? a / back : back / a;
  if (slower != NULL)
    *slower = fabs(a - back) <= KLI_SAME_ANGLE ? KL_STROKE_EQUAL
              : a > back                       ? KL_STROKE_RISING
                                               : KL_STROKE_FALLING;
  if (slower_angle != NULL)
    *slower_angle = fmax(a, back);
  return KL_OK;
}

const char *kl_stroke_str(int stroke) {
  switch (stroke) {
  case KL_STROKE_EQUAL: return "equal";
  case KL_STROKE_RISING: return "rising";
  case KL_STROKE_FALLING: return "falling";
  default: return "not a stroke";
  }
}

/* ---- input effort by virtual work ---- */


/* The effort of the input whose first-order coefficients are dx: the
 * input's virtual work balances the loads'. */
static double effort_along(const kl_solver *s, const double *dx, int nloads,
                           const kl_load *loads) {
  const kl_model *m = s->model;
  double work = 0.0;
  int k;
  for (k = 0; k < nloads; k++) {
    const kl_load *l = &loads[k];
    if (l->kind == KL_LOAD_FORCE) {
      double dp[2];
      kli_chain_rate(m, &m->topo.points[l->id], &s->st.pose, dx, dp);
      work += l->fx * dp[0] + l->fy * dp[1];
    } else {
      work += l->torque * dx[l->id];
    }
  }
  return -work;
}

int kl_input_effort(kl_solver *s, int nloads, const kl_load *loads,
                    double *efforts) {
  int st, i;
  if (s == NULL || efforts == NULL)
    return KL_EINVAL;
  if ((st = kli_check_loads(s, nloads, loads, "input effort")) != KL_OK ||
      (st = need_coefficients(s)) != KL_OK)
    return st;
  for (i = 0; i < s->ninputs; i++)
    efforts[i] = effort_along(s, s->coef1 + (size_t)i * (size_t)s->ncoords,
                              nloads, loads);
  return KL_OK;
}

/* What an effort range keeps while the sweep delivers its steps. */
typedef struct {
  kl_solver *s;
  int input, effort_input, nloads, steps;
  const kl_load *loads;
  double min, max, at_min, at_max;
} effort_search;

static int track_effort(const kl_solver *cs, int step, double input,
                        void *user) {
  effort_search *e = user;
  kl_solver *s = e->s; /* the same solver, which this search owns */
  const double *dx = s->st.xd;
  double effort;
  (void)cs;
  (void)step;
  /* the sweep's unit-rate velocity is the swept input's first-order
   * coefficient; another input's is one more solve with the same factors,
   * kept out of the coefficient arrays so that a failure can restore them */
  if (e->effort_input != e->input) {
    memset(s->u_unit, 0, (size_t)s->ninputs * sizeof(double));
    s->u_unit[e->effort_input] = 1.0;
    kli_input_terms(s, s->u_unit, s->rhs);
    kli_rate_solve(s, s->rhs, s->u_unit, s->xv);
    dx = s->xv;
  }
  effort = effort_along(s, dx, e->nloads, e->loads);
  if (e->steps == 0 || effort < e->min)
    e->min = effort, e->at_min = input;
  if (e->steps == 0 || effort > e->max)
    e->max = effort, e->at_max = input;
  e->steps++;
  return 0;
}

int kl_input_effort_range(kl_solver *s, int input, double from, double to,
                          int steps, int nloads, const kl_load *loads,
                          int effort_input, kl_range *range) {
  effort_search e;
  kl_sweep_result sw;
  kl_range out;
  int st;
  if (s == NULL || range == NULL || range->size < sizeof(range->size) ||
      nloads < 0 || (nloads > 0 && loads == NULL))
    return KL_EINVAL;
  if ((st = check_input(s, effort_input, "input effort range")) != KL_OK ||
      (st = kli_check_loads(s, nloads, loads, "input effort range")) != KL_OK)
    return st;
  memset(&e, 0, sizeof e);
  e.s = s;
  e.input = input;
  e.effort_input = effort_input;
  e.nloads = nloads;
  e.loads = loads;
  sw.size = sizeof sw;
  kli_state_keep(s);
  st = kl_solver_sweep(s, input, from, to, steps, track_effort, &e, &sw);
  if (st != KL_OK && st != KL_LIMIT) {
    kli_state_back(s);
    return st;
  }
  memset(&out, 0, sizeof out);
  out.min = e.min;
  out.max = e.max;
  out.input_at_min = e.at_min;
  out.input_at_max = e.at_max;
  out.sweep_status = st;
  out.limit_input = sw.limit_input;
  kli_copy_sized(range, &out, sizeof out);
  return st;
}

/* ---- dimensional sensitivity ---- */

static int sensitivity(kl_solver *s, const kl_output *o,
                       const kl_dimension *d, double *deriv) {
  kli_dim dim;
  int st;
  if ((st = kli_dim_resolve(s->model, d, &dim, s->error)) != KL_OK)
    return st;
  /* loops and extra rows: J dq = -dF/dp with the inputs held */
  kli_loops_dimension(s->model, &s->st.pose, dim.joint, dim.link, dim.axis,
                      dim.point, dim.coupling, s->rhs);
  kli_rate_solve(s, s->rhs, NULL, s->xv);
  *deriv = kli_output_change(s, o, s->xv, &dim);
  return KL_OK;
}

int kl_output_sensitivity(kl_solver *s, const kl_output *o,
                          const kl_dimension *dim, double *deriv) {
  int st;
  if (s == NULL || deriv == NULL)
    return KL_EINVAL;
  if ((st = kli_output_check(s->model, o, s->error)) != KL_OK ||
      (st = kli_require_position(s, "sensitivity")) != KL_OK)
    return st;
  return sensitivity(s, o, dim, deriv);
}

int kl_output_tolerance_stack(kl_solver *s, const kl_output *o, int n,
                       const kl_dimension *dims, const double *tolerances,
                       double *worst, double *rss) {
  double sum = 0.0, squares = 0.0;
  int st, k;
  if (s == NULL || n < 0 || (n > 0 && (dims == NULL || tolerances == NULL)))
    return KL_EINVAL;
  for (k = 0; k < n; k++) {
    if (!isfinite(tolerances[k]))
      return kli_fail(s->error, KL_ENONFINITE,
                      "tolerance stack: tolerance index %d (0-based) is NaN "
                      "or infinite",
                      k);
    if (tolerances[k] < 0.0)
      return kli_fail(s->error, KL_EINVAL,
                      "tolerance stack: tolerance index %d (0-based) is "
                      "negative (%g)",
                      k, tolerances[k]);
  }
  if ((st = kli_output_check(s->model, o, s->error)) != KL_OK ||
      (st = kli_require_position(s, "tolerance stack")) != KL_OK)
    return st;
  for (k = 0; k < n; k++) {
    double d;
    if ((st = sensitivity(s, o, &dims[k], &d)) != KL_OK)
      return st;
    sum += fabs(d) * tolerances[k];
    squares += d * tolerances[k] * d * tolerances[k];
  }
  if (worst != NULL)
    *worst = sum;
  if (rss != NULL)
    *rss = sqrt(squares);
  return KL_OK;
}
