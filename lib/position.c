/*
 * position.c - the position stage: Newton-Raphson on the loop-closure
 * equations with LU factors and a backtracking (Armijo) line search.
 */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "describe.h"
#include "position.h"
#include "slots.h"
#include "velocity.h"

/* Sufficient decrease of 0.5 |F|^2 asked of each step (Armijo). */
#define KLI_ARMIJO 1e-4
/* Newton's direction is given up for a damped step when the line search
 * would cut it below this fraction: it then points mostly off the way down. */
#define KLI_NEWTON_ALPHA_MIN 1e-2
/* Stopping after a step without factoring again: the step is this small
 * (rad, slides in scale units) and this much smaller than the one before. */
#define KLI_QUADRATIC_STEP 1e-5
#define KLI_QUADRATIC_RATIO 1e-2
/* The largest first-order move of a start (rad, slides in scale units). */
#define KLI_TANGENT_MAX 0.1
/* Damping factors tried, each ten times the last, before giving up. */
#define KLI_DAMPING_TRIES 16
/* Newton steps at most that polish a solved position down to the
 * rounding floor. */
#define KLI_POLISH_ITERATIONS 4
/* Iterations in a row that leave |F| above this fraction of its value
 * before them mean the residual has stalled at a positive minimum. */
#define KLI_STALL_RATIO 0.999
#define KLI_STALL_ITERATIONS 4

/* Above this rcond a position is far from every test the library makes
 * of it (the option singular_rcond is below 1e-3 and is taken as well;
 * the sweep changes its predictor below 1e-6), so that a guaranteed lower
 * bound at least this large stands in for the condition estimate. */
#define KLI_RCOND_FAR 1e-6

/* |v|inf with slides measured in units of the model's scale. */
static double scaled_norm(const kl_solver *s, const double *v) {
  const kl_model *m = s->model;
  double norm = 0.0;
  int i, angles_only = s->plan.usable; /* a plan's unknowns are angles */
  for (i = 0; i < s->n; i++) {
    double a = fabs(v[i]);
    /* the scale's reciprocal only for a slide, not at every call */
    if (!angles_only && m->topo.var_coord[i] >= m->nlinks)
      a *= 1.0 / m->topo.scale;
    if (!(a <= norm))
      norm = a; /* NaN propagates */
  }
  return norm;
}

static double half_square(const double *f, int n) {
  double sum = 0.0;
  int i;
  for (i = 0; i < n; i++)
    sum += f[i] * f[i];
  return 0.5 * sum;
}

/* The residual of the kept rows at unknowns q (every loop row is computed
 * into f first), the inputs' share of x being s->x_base; returns its
 * |.|inf. */
static double evaluate(kl_solver *s, kli_pose *p, const double *q, double *f) {
  double norm;
  int i;
  s->stats.residual_evaluations++;
  if (s->plan.usable)
    return kli_plan_residual(&s->plan, p, s->x_base, q, f);
  /* the other coordinates are the inputs' share, set by start_poses */
  for (i = 0; i < s->nmoving; i++) {
    int c = s->moving_coord[i];
    p->x[c] = s->x_base[c] + q[s->moving_var[i]];
  }
  kli_pose_trig(s->model, p);
  norm = kli_residual(s->model, p, f);
  if (s->model->topo.redundancy == 0)
    return norm;
  kli_keep_rows(s->model, s->dir, f);
  norm = 0.0;
  for (i = 0; i < s->n; i++)
    if (!(fabs(f[i]) <= norm))
      norm = fabs(f[i]); /* NaN propagates */
  return norm;
}

/* Both trial poses take the inputs' share s->x_base whole, once per solve,
 * so that each evaluation writes only the unknowns' coordinates; with the
 * plan, also the trig of the links no unknown turns and their terms' sum. */
static void start_poses(kl_solver *s) {
  size_t bytes = (size_t)s->ncoords * sizeof(double);
  memcpy(s->trial[0].x, s->x_base, bytes);
  memcpy(s->trial[1].x, s->x_base, bytes);
  if (s->plan.usable)
    kli_plan_start(&s->plan, &s->trial[0], &s->trial[1]);
}

int kli_factor_at(kl_solver *s, const kli_pose *p) {
  const kl_model *m = s->model;
  if (s->plan.usable && s->dense.kernel == KL_KERNEL_SMALL) {
    kli_plan_load_small(&s->plan, p, &s->dense);
    return kli_dense_factor(&s->dense);
  }
  if (s->plan.usable)
    kli_plan_jacobian(&s->plan, p, s->pairs);
  else
    kli_jacobian_pairs(m, p, s->pairs);
  if (m->topo.redundancy > 0) {
    kli_keep_pairs(m, s->dir, s->pairs, s->kept_values);
    kli_dense_load(&s->dense, s->kept_values);
  } else {
    kli_dense_load(&s->dense, s->pairs);
  }
  return kli_dense_factor(&s->dense);
}

/*
 * The factors' rcond as far as the tests of it need: a cheap guaranteed
 * lower bound where that already clears them, LAPACK's estimate otherwise
 * (kli_dense_rcond_at_least). With redundant constraints the dropped rows
 * are held to a tolerance over rcond, so they get the estimate itself.
 */
static double watch_condition(kl_solver *s) {
  double needed = s->model->topo.redundancy > 0
                      ? HUGE_VAL
                      : fmax(s->singular_rcond, KLI_RCOND_FAR);
  return kli_dense_rcond_at_least(&s->dense, needed);
}

/* With redundant constraints: a loop keeping one row keeps it along the
 * Jacobian column of its lead unknown at pose p, so that the kept system
 * is not singular where that unknown moves across a fixed axis. */
static void choose_directions(kl_solver *s, const kli_pose *p) {
  if (s->model->topo.redundancy == 0)
    return;
  kli_jacobian_pairs(s->model, p, s->pairs);
  kli_row_directions(s->model, s->pairs, s->dir);
}

/* The derivative of 0.5 |F|^2 along dq: F . (J dq). */
static double slope_along(kl_solver *s, const double *f, const double *dq) {
  double sum = 0.0;
  int i;
  kli_dense_apply(&s->dense, dq, s->rhs);
  for (i = 0; i < s->n; i++)
    sum += f[i] * s->rhs[i];
  return sum;
}

/*
 * Continuation built in: from a solved position whose factors are still at
 * hand, the first-order change of the unknowns for the change of inputs,
 * dq = -J^-1 (dF/du) du, moves the start along its branch. Used only when
 * that move is small, so that it cannot carry the start to another branch.
 */
static void predict_from_tangent(kl_solver *s, double *q) {
  int i, moved = 0;
  if (!s->st.position_solved || s->st.last_attempt != KL_OK ||
      !s->factors_near || s->dense.singular)
    return;
  for (i = 0; i < s->ninputs; i++) {
    s->u_unit[i] = s->u_trial[i] - s->st.u[i];
    moved |= s->u_unit[i] != 0.0;
  }
  if (!moved || s->n == 0)
    return;
  kli_input_terms(s, s->u_unit, s->rhs);
  kli_keep_rows(s->model, s->dir, s->rhs);
  for (i = 0; i < s->n; i++)
    s->rhs[i] = -s->rhs[i];
  kli_dense_solve(&s->dense, s->rhs);
  if (scaled_norm(s, s->rhs) > KLI_TANGENT_MAX)
    return;
  for (i = 0; i < s->n; i++)
    q[i] += s->rhs[i];
}

/* The loop furthest from closing at pose p, for messages (every loop row
 * into s->rhs). */
static int worst_loop(kl_solver *s, const kli_pose *p) {
  int i, worst = 0;
  double big = -1.0, *f = s->rhs;
  kli_residual(s->model, p, f);
  for (i = 0; i < s->model->topo.nloops; i++) {
    double r = fmax(fabs(f[2 * i]), fabs(f[2 * i + 1]));
    if (r > big) {
      big = r;
      worst = i;
    }
  }
  return worst;
}

/* "input 1 (shaft) = 170 deg, input 2 (@3) = 12.5 mm" (the first few),
 * into buf. */
static const char *input_list(const kl_solver *s, const double *u, char *buf,
                              size_t n) {
  size_t used = 0;
  int i;
  char one[KLI_LABEL_SIZE];
  buf[0] = '\0';
  if (s->ninputs == 0)
    snprintf(buf, n, "no inputs");
  for (i = 0; i < s->ninputs && i < 4 && used < n; i++)
    used += (size_t)snprintf(buf + used, n - used, "%s%s", i > 0 ? ", " : "",
                             kli_input_at(s->model, i, u[i], one, sizeof one));
  if (s->ninputs > 4 && used < n)
    snprintf(buf + used, n - used, ", ...");
  return buf;
}

typedef struct {
  kli_pose *cur, *next;
  double *q, *q_next, *f, *f_next;
  double fnorm;
} newton_iterate;

static void accept_trial(newton_iterate *it, double fnorm) {
  kli_pose *p = it->cur;
  double *t;
  it->cur = it->next;
  it->next = p;
  t = it->q;
  it->q = it->q_next;
  it->q_next = t;
  t = it->f;
  it->f = it->f_next;
  it->f_next = t;
  it->fnorm = fnorm;
}

/* Backtracking along dq until 0.5 |F|^2 (phi0 = its value at it->q)
 * decreases enough, down to a step fraction alpha_min; 1 if a step was
 * accepted. */
static int line_search(kl_solver *s, newton_iterate *it, const double *dq,
                       double phi0, double slope, double alpha_min) {
  double alpha = 1.0;
  int back, i;
  for (back = 0; back <= s->opt.max_backtracks && alpha >= alpha_min;
       back++) {
    double fnorm, phi, next_alpha;
    for (i = 0; i < s->n; i++)
      it->q_next[i] = it->q[i] + alpha * dq[i];
    fnorm = evaluate(s, it->next, it->q_next, it->f_next);
    phi = half_square(it->f_next, s->n);
    if (isfinite(phi) && phi <= phi0 + KLI_ARMIJO * alpha * slope) {
      accept_trial(it, fnorm);
      return 1;
    }
    /* minimum of the quadratic through phi0, slope and phi(alpha) */
    next_alpha = isfinite(phi)
                     ? -slope * alpha * alpha / (2.0 * (phi - phi0 - slope * alpha))
                     : 0.1 * alpha;
    alpha = fmin(fmax(next_alpha, 0.1 * alpha), 0.5 * alpha);
    s->stats.backtracks++;
  }
  return 0;
}

/* Caps dq at max_step and searches along it; 1 if a step was accepted.
 * Newton's step solves J dq = -F, so its slope is -|F|^2 without a product
 * with J. */
static int step_along(kl_solver *s, newton_iterate *it, double *dq,
                      double step, double alpha_min, int newton);

/*
 * Levenberg-Marquardt steps with growing damping, from Gauss-Newton toward
 * short steepest-descent steps, until one decreases 0.5 |F|^2 enough.
 * 0 when none does: the residual sits at a stationary point.
 */
static int damped_step(kl_solver *s, newton_iterate *it) {
  double damping = 1e-6;
  int tries;
  for (tries = 0; tries < KLI_DAMPING_TRIES; tries++, damping *= 10.0)
    if (kli_dense_damped_step(&s->dense, it->f, damping, s->dq) == 0 &&
        step_along(s, it, s->dq, scaled_norm(s, s->dq), 1.0, 0))
      return 1;
  return 0;
}

static int step_along(kl_solver *s, newton_iterate *it, double *dq,
                      double step, double alpha_min, int newton) {
  double slope, shrink = 1.0, phi0 = half_square(it->f, s->n);
  int i;
  if (step > s->opt.max_step) {
    shrink = s->opt.max_step / step;
    for (i = 0; i < s->n; i++)
      dq[i] *= shrink;
  }
  slope = newton ? -2.0 * shrink * phi0 : slope_along(s, it->f, dq);
  return slope < 0.0 && line_search(s, it, dq, phi0, slope, alpha_min);
}

static int fail_stalled(kl_solver *s, const newton_iterate *it, int iters) {
  char in[200], miss[48], loop[24];
  return kli_fail(s->error, KL_ENOASSEMBLY,
                  "solve position: the loops cannot close at %s: they stay "
                  "%s apart after %d iterations, %s furthest from closing; "
                  "the inputs are beyond a motion limit, or the start is too "
                  "far from any assembly (try another sketch)",
                  input_list(s, s->u_trial, in, sizeof in),
                  kli_length_value(s->model, it->fnorm, 3, miss, sizeof miss),
                  iters, kli_loop_label(worst_loop(s, it->cur), loop,
                                        sizeof loop));
}

/*
 * The rows dropped for the declared redundancy must close at the solution
 * of the kept ones. The kept rows settle the position to within their
 * tolerance over the condition estimate, so the dropped rows are held to
 * that: rounding passes, proportions other than the special ones the
 * redundancy needs do not.
 */
static int check_dropped_rows(kl_solver *s, const kli_pose *p, double ftol) {
  const kl_model *m = s->model;
  double allowed = ftol / s->stats.rcond, miss;
  int loop, first, n, i;
  char in[200], joints[96], ref[48], label[24], by[48], most[48];
  size_t used = 0;
  kli_residual(m, p, s->rhs);
  miss = kli_dropped_residual(m, s->dir, s->rhs, &loop);
  if (!(miss > allowed))
    return KL_OK;
  first = m->topo.loop_joint_start[loop];
  n = m->topo.loop_joint_start[loop + 1] - first;
  joints[0] = '\0';
  for (i = 0; i < n && used < sizeof joints; i++)
    used += (size_t)snprintf(
        joints + used, sizeof joints - used, "%s%s", i > 0 ? " " : "",
        kli_joint_ref(m, m->topo.loop_joints[first + i], ref, sizeof ref));
  return kli_fail(s->error, KL_ENOASSEMBLY,
                  "solve position: at %s the redundant constraints do not "
                  "close: %s (joints %s) misses by %s (allowed %s); the "
                  "model declares %d redundant constraint%s, which holds "
                  "only for the special proportions that make them repeat "
                  "the others",
                  input_list(s, s->u_trial, in, sizeof in),
                  kli_loop_label(loop, label, sizeof label), joints,
                  kli_length_value(m, miss, 3, by, sizeof by),
                  kli_length_value(m, allowed, 3, most, sizeof most),
                  m->topo.redundancy, m->topo.redundancy == 1 ? "" : "s");
}

/* A pin beyond an open curve slot's end has left the slot: the loops do
 * not close there (a sweep locates that end as a motion limit). */
static int check_slot_ends(kl_solver *s, const kli_pose *p) {
  const kl_model *m = s->model;
  int j;
  char lj[160], in[200];
  if (s->plan.usable)
    return KL_OK; /* no joint of the plan's models slides */
  for (j = 0; j < m->njoints; j++) {
    double t = p->x[m->nlinks + j];
    if (kli_is_sliding(m->joints[j].kind) &&
        !kli_slide_on_slot(&m->joints[j], t))
      return kli_fail(s->error, KL_ENOASSEMBLY,
                      "solve position: at %s the pin of %s would be at "
                      "t = %.9g, beyond its open curve's ends 0 and %.9g",
                      input_list(s, s->u_trial, in, sizeof in),
                      kli_joint_label(m, j, lj, sizeof lj), t,
                      kli_curve_end(m->joints[j].curve));
  }
  return KL_OK;
}

static void commit(kl_solver *s, const kli_pose *p, double rcond,
                   int factored_at_solution) {
  kli_pose_copy(s, &s->st.pose, p);
  memcpy(s->st.u, s->u_trial, (size_t)s->ninputs * sizeof(double));
  s->st.position_solved = 1;
  s->st.inputs_known = 1;
  s->factors_current = factored_at_solution;
  s->factors_near = 1;
  s->st.rcond = rcond;
  kli_state_changed(s);
}

int kl_solve_position(kl_solver *s, const double *inputs) {
  newton_iterate it;
  double ftol, prev_step = HUGE_VAL, step = HUGE_VAL, before;
  int st, iter, singular = 0, slow = 0, backtracks, moved, full_newton;
  int factored_at_solution = 1;
  char in[200];
  if (s == NULL)
    return KL_EINVAL;
  memset(&s->stats, 0, sizeof s->stats);
  s->stats.size = sizeof s->stats;
  s->stats.kernel = s->dense.kernel;
  if ((st = kli_check_input_values(s, inputs, "solve position", "input")) !=
      KL_OK) {
    s->stats.status = st;
    return st; /* the last attempt stands: nothing was tried */
  }
  if (s->ninputs > 0)
    memcpy(s->u_trial, inputs, (size_t)s->ninputs * sizeof(double));
  ftol = s->opt.tolerance * s->model->topo.scale;
  it.cur = &s->trial[0];
  it.next = &s->trial[1];
  it.q = s->q;
  it.q_next = s->q_next;
  it.f = s->f;
  it.f_next = s->f_next;
  kli_gather(s->model, s->st.pose.x, it.q);
  predict_from_tangent(s, it.q);
  if (s->plan.usable)
    kli_plan_expand(&s->plan, NULL, s->u_trial, s->x_base);
  else
    kli_expand_inputs(s->model, s->u_trial, s->x_base);
  start_poses(s);
  if (s->model->topo.redundancy > 0) {
    kli_add_unknowns(s->model, s->x_base, it.q, it.cur->x);
    kli_pose_trig(s->model, it.cur);
    choose_directions(s, it.cur);
  }
  it.fnorm = evaluate(s, it.cur, it.q, it.f);
  s->factors_current = s->factors_near = 0;
  for (iter = 0;; iter++) {
    int i;
    singular = kli_factor_at(s, it.cur);
    s->stats.factorizations++;
    if (!singular) {
      for (i = 0; i < s->n; i++)
        s->dq[i] = -it.f[i];
      kli_dense_solve(&s->dense, s->dq);
      step = scaled_norm(s, s->dq);
    }
    if (it.fnorm <= ftol &&
        (singular || step <= s->opt.step_tolerance ||
         (iter > 0 && step > 0.9 * prev_step)))
      break;
    if (iter == s->opt.max_iterations) {
      st = kli_fail(s->error, KL_EMAXITER,
                    "solve position: no convergence at %s within %d "
                    "iterations (residual %.3g, tolerance %.3g); raise "
                    "max_iterations or start nearer the solution",
                    input_list(s, s->u_trial, in, sizeof in), iter, it.fnorm,
                    ftol);
      goto failed;
    }
    /* Newton's step first; where the Jacobian is (nearly) singular its step
     * is useless, and damped least-squares steps take over. */
    before = it.fnorm;
    backtracks = s->stats.backtracks;
    moved = !singular && isfinite(step) &&
            step_along(s, &it, s->dq, step, KLI_NEWTON_ALPHA_MIN, 1);
    full_newton = moved && s->stats.backtracks == backtracks &&
                  step <= s->opt.max_step;
    if (!moved && !damped_step(s, &it)) {
      /* no step decreases the residual: within tolerance that is the
       * rounding floor of a solution (no step was taken, so the factors
       * are at it.cur); above it, a positive minimum */
      if (it.fnorm <= ftol)
        break;
      st = fail_stalled(s, &it, iter + 1);
      goto failed;
    }
    /* progress that dies away: the same two cases */
    slow = it.fnorm > KLI_STALL_RATIO * before ? slow + 1 : 0;
    if (slow == KLI_STALL_ITERATIONS) {
      if (it.fnorm <= ftol) {
        singular = kli_factor_at(s, it.cur);
        s->stats.factorizations++;
        break;
      }
      st = fail_stalled(s, &it, iter + 1);
      goto failed;
    }
    /* Quadratic convergence seen: a full Newton step, at most a hundredth
     * of the one before, has brought the residual within tolerance, so the
     * next would be below rounding. Stop without factoring once more: the
     * factors one such step back serve the singular test and the next
     * solve's predictor; the rate stages factor at the solution. (Near a
     * singular position convergence is linear and this never holds.) */
    if (full_newton && iter > 0 && it.fnorm <= ftol &&
        step <= KLI_QUADRATIC_STEP && step <= KLI_QUADRATIC_RATIO * prev_step) {
      iter++;
      factored_at_solution = 0;
      break;
    }
    prev_step = step;
    s->stats.iterations = iter + 1;
  }
  s->stats.iterations = iter;
  s->stats.residual = it.fnorm;
  s->stats.step = singular ? NAN : step;
  s->stats.rcond = watch_condition(s);
  if (singular || s->stats.rcond < s->singular_rcond) {
    st = kli_fail(s->error, KL_ESINGULAR,
                  "solve position: the Jacobian is singular at the solution "
                  "for %s (rcond %.3g below %.3g): a dead point, toggle or "
                  "change point, where the rates are not determined",
                  input_list(s, s->u_trial, in, sizeof in), s->stats.rcond,
                  s->singular_rcond);
    goto failed_stats;
  }
  if (s->model->topo.redundancy > 0 &&
      (st = check_dropped_rows(s, it.cur, ftol)) != KL_OK)
    goto failed_stats;
  if ((st = check_slot_ends(s, it.cur)) != KL_OK)
    goto failed_stats;
  commit(s, it.cur, s->stats.rcond, factored_at_solution);
  s->st.last_attempt = s->stats.status = KL_OK;
  return KL_OK;
failed:
  s->stats.iterations = iter + 1 > s->opt.max_iterations ? iter : iter + 1;
  s->stats.residual = it.fnorm;
  s->stats.step = step;
  s->stats.rcond = singular ? 0.0 : kli_dense_rcond(&s->dense);
failed_stats:
  s->st.last_attempt = s->stats.status = st;
  return st;
}

int kli_polish_position(kl_solver *s) {
  kli_pose *cur = &s->trial[0], *next = &s->trial[1];
  double fnorm;
  int iter, i;
  if (!s->st.position_solved || s->st.last_attempt != KL_OK)
    return 0;
  kli_pose_copy(s, cur, &s->st.pose);
  kli_gather(s->model, cur->x, s->q);
  kli_expand_inputs(s->model, s->st.u, s->x_base);
  start_poses(s);
  fnorm = evaluate(s, cur, s->q, s->f);
  for (iter = 0; iter < KLI_POLISH_ITERATIONS; iter++) {
    double next_norm;
    if (kli_factor_at(s, cur))
      break;
    for (i = 0; i < s->n; i++)
      s->dq[i] = -s->f[i];
    kli_dense_solve(&s->dense, s->dq);
    for (i = 0; i < s->n; i++)
      s->q_next[i] = s->q[i] + s->dq[i];
    next_norm = evaluate(s, next, s->q_next, s->f_next);
    if (!(next_norm < fnorm))
      break; /* the rounding floor */
    memcpy(s->q, s->q_next, (size_t)s->n * sizeof(double));
    memcpy(s->f, s->f_next, (size_t)s->n * sizeof(double));
    fnorm = next_norm;
    kli_pose_copy(s, cur, next);
  }
  kli_pose_copy(s, &s->st.pose, cur);
  s->factors_current = s->factors_near = 0;
  kli_state_changed(s);
  return iter;
}

int kli_require_position(kl_solver *s, const char *stage) {
  if (!s->st.position_solved)
    return kli_fail(s->error, KL_ESTAGE,
                    "%s needs a solved position first (none has been "
                    "solved, or a sketch changed the state since)",
                    stage);
  if (s->st.last_attempt == KL_ESINGULAR)
    return kli_fail(s->error, KL_ESINGULAR,
                    "%s: the Jacobian is singular at the position asked for "
                    "last, so the rates there are not determined",
                    stage);
  if (s->st.last_attempt != KL_OK)
    return kli_fail(s->error, KL_ESTAGE,
                    "%s needs a position solved at the current inputs; the "
                    "last position solve failed",
                    stage);
  if (!s->factors_current) {
    choose_directions(s, &s->st.pose);
    kli_factor_at(s, &s->st.pose);
    s->st.rcond = watch_condition(s);
    s->factors_current = 1;
  }
  if (s->st.rcond < s->singular_rcond || s->dense.singular)
    return kli_fail(s->error, KL_ESINGULAR,
                    "%s: the Jacobian is singular at the current position "
                    "(rcond %.3g)",
                    stage, s->st.rcond);
  return KL_OK;
}
