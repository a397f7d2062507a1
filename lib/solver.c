/*
 * solver.c - creating (and resetting) a solver in one sized block, its
 * options, the sketch setters, the getters of the committed position.
 */
#include <math.h>
#include <stdint.h>
#include <string.h>

#include "describe.h"
#include "solver.h"

/* The first options struct ended before `kernel`: callers' structs are at
 * least this long, and fields past a caller's size keep their defaults. */
#define KLI_OPTIONS_V1_SIZE offsetof(kl_options, kernel)

static void all_defaults(kl_options *o) {
  memset(o, 0, sizeof *o);
  o->size = sizeof *o;
  o->tolerance = 1e-12;
  o->step_tolerance = 1e-10;
  o->max_iterations = 50;
  o->max_backtracks = 40;
  o->max_step = 1.0;
  o->singular_rcond = 1e-8;
  o->kernel = KL_KERNEL_AUTO;
  o->pass_change_points = 0;
}

void kl_options_init(kl_options *o, size_t size) {
  kl_options d;
  if (o == NULL || size < sizeof o->size)
    return;
  all_defaults(&d);
  if (size > sizeof d)
    size = sizeof d;
  d.size = size;
  memcpy(o, &d, size);
}

void kl_options_default(kl_options *o) { kl_options_init(o, sizeof *o); }

static void carve_pose(kli_pose *p, kli_carver *c, int ncoords, int nlinks) {
  p->x = kli_carve(c, (size_t)ncoords, sizeof(double));
  p->c = kli_carve(c, (size_t)nlinks, sizeof(double));
  p->s = kli_carve(c, (size_t)nlinks, sizeof(double));
  p->trig_at = kli_carve(c, (size_t)nlinks, sizeof(double));
}

static void carve_forces(kli_forces *f, kli_carver *c, const kl_model *m) {
  f->force = kli_carve(c, 2 * (size_t)m->njoints, sizeof(double));
  f->moment = kli_carve(c, (size_t)m->njoints, sizeof(double));
  f->effort = kli_carve(c, (size_t)m->ninputs, sizeof(double));
  f->ground = kli_carve(c, 3, sizeof(double));
  f->coupling = kli_carve(c, (size_t)m->ncouplings, sizeof(double));
}

static void carve_state(kli_state *st, kli_carver *c, const kl_model *m) {
  int ncoords = m->topo.ncoords, ninputs = m->ninputs;
  carve_pose(&st->pose, c, ncoords, m->nlinks);
  st->xd = kli_carve(c, (size_t)ncoords, sizeof(double));
  st->xdd = kli_carve(c, (size_t)ncoords, sizeof(double));
  st->xddd = kli_carve(c, (size_t)ncoords, sizeof(double));
  st->u = kli_carve(c, (size_t)ninputs, sizeof(double));
  st->ud = kli_carve(c, (size_t)ninputs, sizeof(double));
  st->udd = kli_carve(c, (size_t)ninputs, sizeof(double));
  st->uddd = kli_carve(c, (size_t)ninputs, sizeof(double));
  carve_forces(&st->forces, c, m);
}

/* Lays the solver out in c; returns the solver (NULL on the sizing pass). */
static kl_solver *carve_solver(const kl_model *m, kli_carver *c) {
  kl_solver *s = kli_carve(c, 1, sizeof(kl_solver));
  kl_solver sizing;
  kl_solver *t = s != NULL ? s : &sizing;
  const kli_topology *top = &m->topo;
  const kli_force_pattern *fp = &top->forces;
  int n = top->nvars, nc = top->ncoords, nl = m->nlinks;
  int ni = m->ninputs, nr = top->nrows, i;
  kli_pattern p;
  carve_state(&t->st, c, m);
  carve_state(&t->saved, c, m);
  carve_state(&t->delivered, c, m);
  carve_state(&t->extreme[0], c, m);
  carve_state(&t->extreme[1], c, m);
  carve_state(&t->previous, c, m);
  carve_state(&t->kept, c, m);
  for (i = 0; i < 4; i++)
    carve_state(&t->crossing[i], c, m);
  t->coef1 = kli_carve(c, kli_size_mul((size_t)nc, (size_t)ni), sizeof(double));
  t->coef2 = kli_carve(c, kli_size_mul(kli_size_mul((size_t)nc, (size_t)ni), (size_t)ni),
                       sizeof(double));
  carve_pose(&t->trial[0], c, nc, nl);
  carve_pose(&t->trial[1], c, nc, nl);
  t->u_trial = kli_carve(c, (size_t)ni, sizeof(double));
  t->x_base = kli_carve(c, (size_t)nc, sizeof(double));
  t->moving_coord = kli_carve(c, (size_t)nc, sizeof(int));
  t->moving_var = kli_carve(c, (size_t)nc, sizeof(int));
  t->u_unit = kli_carve(c, (size_t)ni, sizeof(double));
  t->q = kli_carve(c, (size_t)n, sizeof(double));
  t->dq = kli_carve(c, (size_t)n, sizeof(double));
  t->q_next = kli_carve(c, (size_t)n, sizeof(double));
  /* residuals hold every loop row before the kept ones are taken */
  t->f = kli_carve(c, (size_t)nr, sizeof(double));
  t->f_next = kli_carve(c, (size_t)nr, sizeof(double));
  t->grad = kli_carve(c, (size_t)n, sizeof(double));
  t->pairs = kli_carve(c, 2 * (size_t)top->nnz_pairs +
                              (size_t)top->nextra_entries,
                       sizeof(double));
  t->dir = kli_carve(c, 2 * (size_t)top->nloops, sizeof(double));
  t->kept_values = kli_carve(
      c, top->redundancy > 0 ? 2 * (size_t)top->nkept_pairs + (size_t)top->nkept_singles : 0,
      sizeof(double));
  t->rhs = kli_carve(c, (size_t)nr, sizeof(double));
  t->xv = kli_carve(c, (size_t)nc, sizeof(double));
  t->x_pred = kli_carve(c, (size_t)nc, sizeof(double));
  t->x_previous = kli_carve(c, (size_t)nc, sizeof(double));
  t->sweep_u = kli_carve(c, (size_t)ni, sizeof(double));
  t->sweep_rate = kli_carve(c, (size_t)ni, sizeof(double));
  t->sweep_zero = kli_carve(c, (size_t)ni, sizeof(double));
  t->time_motion = kli_carve(c, 4 * (size_t)ni, sizeof(double));
  t->time_efforts = kli_carve(c, (size_t)ni, sizeof(double));
  t->modes = kli_carve(c, (size_t)KLI_MAX_MODES * (size_t)n, sizeof(double));
  p.n = n;
  p.npairs = top->nkept_pairs;
  p.row = top->kept_pair_row;
  p.col = top->kept_pair_col;
  p.nsingles = top->nkept_singles;
  p.single_row = top->kept_single_row;
  p.single_col = top->kept_single_col;
  p.band_row = top->band_row;
  p.band_col = top->band_col;
  p.band_lower = top->band_lower;
  p.band_upper = top->band_upper;
  p.damped = 1;
  kli_dense_carve(&t->dense, c, &p);
  kli_plan_carve(&t->plan, c, m);
  /* the force system: single entries only, no damped steps */
  p.n = fp->n;
  p.npairs = 0;
  p.row = p.col = NULL;
  p.nsingles = fp->nentries;
  p.single_row = fp->row;
  p.single_col = fp->col;
  p.band_row = fp->band_row;
  p.band_col = fp->band_col;
  p.band_lower = fp->band_lower;
  p.band_upper = fp->band_upper;
  p.damped = 0;
  kli_dense_carve(&t->force, c, &p);
  t->force_values = kli_carve(c, (size_t)fp->nentries, sizeof(double));
  t->force_rhs = kli_carve(c, (size_t)fp->n, sizeof(double));
  t->force_at = kli_carve(c, (size_t)nc, sizeof(double));
  t->force_geometry = kli_carve(
      c, 6 * ((size_t)m->njoints + (size_t)top->nextra), sizeof(double));
  t->extra_points = kli_carve(c, 2 * (size_t)top->nextra, sizeof(double));
  t->centre_velocity = kli_carve(c, 2 * (size_t)nl, sizeof(double));
  t->centre_accel = kli_carve(c, 2 * (size_t)nl, sizeof(double));
  t->scaled_xd = kli_carve(c, (size_t)nc, sizeof(double));
  t->scaled_xdd = kli_carve(c, (size_t)nc, sizeof(double));
  carve_forces(&t->cycle_forces, c, m);
  t->cycle_sums = kli_carve(
      c, KLI_CYCLE_SUMS * ((size_t)ni + (size_t)m->njoints + 2), sizeof(double));
  return s;
}

size_t kl_solver_bytes(const kl_model *m) {
  kli_carver c = {NULL, 0};
  if (m == NULL || !m->finalized)
    return 0;
  carve_solver(m, &c);
  return c.used;
}

/* The state a new solver starts in: the model's sketch, in id order as
 * the caller's would be, and nothing solved. */
static void start_state(kl_solver *s) {
  const kl_model *m = s->model;
  size_t nc = (size_t)s->ncoords * sizeof(double);
  size_t ni = (size_t)s->ninputs * sizeof(double);
  int i;
  memset(s->st.xd, 0, nc);
  memset(s->st.xdd, 0, nc);
  memset(s->st.xddd, 0, nc);
  memset(s->st.u, 0, ni);
  memset(s->st.ud, 0, ni);
  memset(s->st.udd, 0, ni);
  memset(s->st.uddd, 0, ni);
  s->st.position_solved = s->st.inputs_known = 0;
  s->st.velocity_solved = s->st.acceleration_solved = 0;
  s->st.jerk_solved = 0;
  s->st.rcond = 0.0;
  s->coefficients_solved = 0;
  s->factors_current = s->factors_near = 0;
  s->have_previous = 0;
  kli_pose_forget_trig(m, &s->st.pose);
  kli_expand(m, NULL, NULL, s->st.pose.x);
  kli_pose_trig(m, &s->st.pose);
  for (i = 1; i < m->nlinks; i++)
    if (m->links[i].has_sketch)
      kl_set_link_angle(s, i, m->links[i].sketch);
  for (i = 0; i < m->njoints; i++)
    if (m->joints[i].has_sketch)
      kl_set_joint_slide(s, i, m->joints[i].sketch);
  s->st.last_attempt = KL_OK;
  memset(&s->stats, 0, sizeof s->stats);
  s->stats.size = sizeof s->stats;
}

static kl_solver *place(const kl_model *m, void *block, size_t size,
                        int owns) {
  kli_carver c;
  kl_solver *s;
  int i;
  memset(block, 0, size);
  c.base = block;
  c.used = 0;
  s = carve_solver(m, &c);
  s->model = m;
  s->block = block;
  s->block_size = size;
  s->owns_block = owns;
  s->n = m->topo.nvars;
  s->nrows = m->topo.nrows;
  s->ncoords = m->topo.ncoords;
  s->ninputs = m->ninputs;
  kl_options_default(&s->opt);
  s->singular_rcond = s->opt.singular_rcond;
  s->last_passage = NAN;
  s->nmoving = 0;
  for (i = 0; i < s->ncoords; i++)
    if (m->topo.coord_var[i] >= 0) {
      s->moving_coord[s->nmoving] = i;
      s->moving_var[s->nmoving++] = m->topo.coord_var[i];
    }
  kli_plan_build(&s->plan, m, s->moving_coord, s->moving_var, s->nmoving,
                 s->xv, s->u_unit);
  /* slide columns of the Jacobian are unitless: scale them to lengths */
  for (i = 0; i < s->n; i++)
    s->rhs[i] = m->topo.var_coord[i] < m->nlinks ? 1.0 : m->topo.scale;
  kli_dense_init(&s->dense, s->rhs, s->opt.kernel);
  if (s->plan.usable)
    kli_plan_place(&s->plan, &s->dense);
  /* moment columns of the force system (a prismatic joint's moment, a
   * revolute input's torque) are lengths times forces: scale them to
   * forces, as the moment rows are (docs/theory.md section 8) */
  for (i = 0; i < m->topo.forces.n; i++)
    s->force_rhs[i] = 1.0;
  for (i = 0; i < m->njoints; i++) {
    const kli_joint *j = &m->joints[i];
    if (m->topo.forces.n == 0)
      break;
    if (j->kind == KL_JOINT_PRISMATIC)
      s->force_rhs[m->topo.forces.joint_col[i] + 1] = m->topo.scale;
    if (j->kind == KL_JOINT_REVOLUTE && j->input >= 0)
      s->force_rhs[m->topo.forces.input_col[j->input]] = m->topo.scale;
  }
  kli_dense_init(&s->force, s->force_rhs, s->opt.kernel);
  for (i = 0; i < 2; i++)
    kli_pose_forget_trig(m, &s->trial[i]);
  start_state(s);
  kli_model_retain(m);
  return s;
}

kl_solver *kl_solver_new(const kl_model *m) {
  size_t size = kl_solver_bytes(m);
  void *block;
  if (size == 0)
    return NULL;
  block = kli_alloc(&m->alloc, size);
  return block == NULL ? NULL : place(m, block, size, 1);
}

kl_solver *kl_solver_new_in(const kl_model *m, void *block, size_t size) {
  size_t need = kl_solver_bytes(m);
  if (need == 0 || need == SIZE_MAX || block == NULL || size < need ||
      ((size_t)block % sizeof(double)) != 0)
    return NULL;
  return place(m, block, need, 0);
}

void kl_solver_free(kl_solver *s) {
  const kl_model *m;
  if (s == NULL)
    return;
  m = s->model;
  if (s->owns_block)
    kli_free(&m->alloc, s->block, s->block_size);
  kli_model_release(m);
}

int kl_solver_reset(kl_solver *s) {
  if (s == NULL)
    return KL_EINVAL;
  start_state(s);
  return KL_OK;
}

const kl_model *kl_solver_model(const kl_solver *s) {
  return s == NULL ? NULL : s->model;
}

const char *kl_solver_error(const kl_solver *s) {
  return s == NULL ? "no solver (NULL pointer)" : s->error;
}

static int out_of(double v, double lo, double hi) {
  return !(v > lo && v <= hi);
}

int kl_solver_set_options(kl_solver *s, const kl_options *o) {
  kl_options next;
  if (s == NULL)
    return KL_EINVAL;
  if (o == NULL || o->size < KLI_OPTIONS_V1_SIZE)
    return kli_fail(s->error, KL_EINVAL,
                    "set options: %s; start from kl_options_default()",
                    o == NULL ? "no options (NULL)" : "options size too small");
  /* the caller's fields over the defaults, no further than its size */
  all_defaults(&next);
  memcpy((char *)&next + sizeof next.size, (const char *)o + sizeof o->size,
         (o->size < sizeof next ? o->size : sizeof next) - sizeof o->size);
  if (!isfinite(next.tolerance) || !isfinite(next.step_tolerance) ||
      !isfinite(next.max_step) || !isfinite(next.singular_rcond))
    return kli_fail(s->error, KL_ENONFINITE,
                    "set options: a tolerance, max_step or singular_rcond is "
                    "NaN or infinite");
  if (out_of(next.tolerance, 0.0, 1e-3))
    return kli_fail(s->error, KL_EINVAL,
                    "set options: tolerance %g is not in (0, 1e-3]",
                    next.tolerance);
  if (out_of(next.step_tolerance, 0.0, 1e-2))
    return kli_fail(s->error, KL_EINVAL,
                    "set options: step_tolerance %g is not in (0, 1e-2]",
                    next.step_tolerance);
  if (next.max_iterations < 1 || next.max_iterations > 10000)
    return kli_fail(s->error, KL_EINVAL,
                    "set options: max_iterations %d is not in [1, 10000]",
                    next.max_iterations);
  if (next.max_backtracks < 0 || next.max_backtracks > 100)
    return kli_fail(s->error, KL_EINVAL,
                    "set options: max_backtracks %d is not in [0, 100]",
                    next.max_backtracks);
  if (out_of(next.max_step, 0.0, 100.0))
    return kli_fail(s->error, KL_EINVAL,
                    "set options: max_step %g is not in (0, 100]",
                    next.max_step);
  if (next.singular_rcond < 0.0 || next.singular_rcond >= 1e-3)
    return kli_fail(s->error, KL_EINVAL,
                    "set options: singular_rcond %g is not in [0, 1e-3)",
                    next.singular_rcond);
  if (next.kernel < KL_KERNEL_AUTO || next.kernel > KL_KERNEL_BANDED)
    return kli_fail(s->error, KL_EINVAL,
                    "set options: kernel %d is not a kl_kernel", next.kernel);
  if (next.pass_change_points != 0 && next.pass_change_points != 1)
    return kli_fail(s->error, KL_EINVAL,
                    "set options: pass_change_points %d is neither 0 (stop "
                    "at a change point) nor 1 (go on through it)",
                    next.pass_change_points);
  if (next.kernel != s->opt.kernel) {
    kli_dense_use(&s->dense, next.kernel);
    kli_dense_use(&s->force, next.kernel);
    s->factors_current = s->factors_near = 0;
    s->force_factored = 0;
  }
  s->opt = next;
  s->singular_rcond = next.singular_rcond;
  return KL_OK;
}

int kl_solver_options(const kl_solver *s, kl_options *o) {
  size_t n;
  if (s == NULL || o == NULL)
    return KL_EINVAL;
  n = o->size >= sizeof(o->size) && o->size < sizeof *o ? o->size : sizeof *o;
  memcpy(o, &s->opt, n);
  o->size = n;
  return KL_OK;
}

int kl_solver_stats(const kl_solver *s, kl_solve_stats *st) {
  if (s == NULL || st == NULL || st->size < sizeof(st->size))
    return KL_EINVAL;
  kli_copy_sized(st, &s->stats, sizeof s->stats);
  return KL_OK;
}

void kli_pose_copy(const kl_solver *s, kli_pose *to, const kli_pose *from) {
  memcpy(to->x, from->x, (size_t)s->ncoords * sizeof(double));
  memcpy(to->c, from->c, (size_t)s->model->nlinks * sizeof(double));
  memcpy(to->s, from->s, (size_t)s->model->nlinks * sizeof(double));
  memcpy(to->trig_at, from->trig_at, (size_t)s->model->nlinks * sizeof(double));
}

int kli_check_input_values(kl_solver *s, const double *values,
                           const char *stage, const char *what) {
  int i;
  char lj[160];
  if (s->ninputs > 0 && values == NULL)
    return kli_fail(s->error, KL_EINVAL,
                    "%s: the model has %d input%s but the %s array is NULL",
                    stage, s->ninputs, s->ninputs == 1 ? "" : "s", what);
  for (i = 0; i < s->ninputs; i++)
    if (!isfinite(values[i]))
      return kli_fail(s->error, KL_ENONFINITE,
                      "%s: the %s value for %s is NaN or infinite", stage,
                      what, kli_input_label(s->model, i, lj, sizeof lj));
  return KL_OK;
}

void kli_state_copy(const kl_solver *s, kli_state *to, const kli_state *from) {
  size_t nc = (size_t)s->ncoords * sizeof(double);
  size_t ni = (size_t)s->ninputs * sizeof(double);
  kli_pose_copy(s, &to->pose, &from->pose);
  memcpy(to->xd, from->xd, nc);
  memcpy(to->xdd, from->xdd, nc);
  memcpy(to->xddd, from->xddd, nc);
  memcpy(to->u, from->u, ni);
  memcpy(to->ud, from->ud, ni);
  memcpy(to->udd, from->udd, ni);
  memcpy(to->uddd, from->uddd, ni);
  /* the forces only when they hold results: the sweep copies states at
   * every sub-step */
  if (from->forces_solved) {
    const kl_model *m = s->model;
    memcpy(to->forces.force, from->forces.force,
           2 * (size_t)m->njoints * sizeof(double));
    memcpy(to->forces.moment, from->forces.moment,
           (size_t)m->njoints * sizeof(double));
    memcpy(to->forces.effort, from->forces.effort, ni);
    memcpy(to->forces.ground, from->forces.ground, 3 * sizeof(double));
    if (s->model->ncouplings > 0)
      memcpy(to->forces.coupling, from->forces.coupling,
             (size_t)s->model->ncouplings * sizeof(double));
  }
  to->forces_solved = from->forces_solved;
  to->position_solved = from->position_solved;
  to->inputs_known = from->inputs_known;
  to->velocity_solved = from->velocity_solved;
  to->acceleration_solved = from->acceleration_solved;
  to->jerk_solved = from->jerk_solved;
  to->last_attempt = from->last_attempt;
  to->rcond = from->rcond;
}

void kli_state_restore(kl_solver *s, const kli_state *from) {
  kli_state_copy(s, &s->st, from);
  s->factors_current = s->factors_near = 0;
  s->coefficients_solved = 0;
}

void kli_state_changed(kl_solver *s) {
  s->st.velocity_solved = 0;
  s->st.acceleration_solved = 0;
  s->st.jerk_solved = 0;
  s->st.forces_solved = 0;
  s->coefficients_solved = 0;
}

void kli_state_keep(kl_solver *s) {
  kli_state_copy(s, &s->kept, &s->st);
  s->kept_coefficients = s->coefficients_solved;
}

void kli_state_back(kl_solver *s) {
  kli_state_restore(s, &s->kept);
  /* the coefficient arrays were left alone: they still hold the kept
   * position's */
  s->coefficients_solved = s->kept_coefficients;
}

int kli_check_loads(kl_solver *s, int nloads, const kl_load *loads,
                    const char *stage) {
  return kli_check_load_list(s->model, s->error, nloads, loads, stage);
}

/* A sketch moves the state off the solved position. */
static void sketch_changed(kl_solver *s) {
  kli_expand(s->model, s->q, s->st.u, s->st.pose.x);
  kli_pose_trig(s->model, &s->st.pose);
  s->st.position_solved = 0;
  s->factors_current = s->factors_near = 0;
  kli_state_changed(s);
}

int kl_set_link_angle(kl_solver *s, int link, double angle) {
  const kli_topology *t;
  int l;
  double offset = 0.0;
  char la[64];
  if (s == NULL)
    return KL_EINVAL;
  t = &s->model->topo;
  if (link < 0 || link >= s->model->nlinks)
    return kli_fail_index(s->error, "set link angle", "link", link,
                          s->model->nlinks);
  if (link == KL_GROUND)
    return kli_fail(s->error, KL_EKIND,
                    "set link angle: link index 0 is ground; its angle is 0 "
                    "for good");
  if (!isfinite(angle))
    return kli_fail(s->error, KL_ENONFINITE,
                    "set link angle: the angle of %s is NaN or infinite",
                    kli_link_label(s->model, link, la, sizeof la));
  /* climb to the group's representative, adding up the known offsets */
  for (l = link; t->angle_parent[l] >= 0; l = t->angle_parent[l])
    if (t->angle_input[l] >= 0)
      offset += t->angle_sign[l] * s->st.u[t->angle_input[l]];
  kli_gather(s->model, s->st.pose.x, s->q);
  if (t->angle_var[l] >= 0)
    s->q[t->angle_var[l]] = angle - offset;
  sketch_changed(s);
  return KL_OK;
}

int kl_set_joint_slide(kl_solver *s, int joint, double slide) {
  const kli_topology *t;
  char lj[160];
  if (s == NULL)
    return KL_EINVAL;
  t = &s->model->topo;
  if (joint < 0 || joint >= s->model->njoints)
    return kli_fail_index(s->error, "set joint slide", "joint", joint,
                          s->model->njoints);
  if (!kli_is_sliding(s->model->joints[joint].kind))
    return kli_fail(s->error, KL_EKIND,
                    "set joint slide: %s has no slide",
                    kli_joint_label(s->model, joint, lj, sizeof lj));
  if (!isfinite(slide))
    return kli_fail(s->error, KL_ENONFINITE,
                    "set joint slide: the slide of %s is NaN or infinite",
                    kli_joint_label(s->model, joint, lj, sizeof lj));
  kli_gather(s->model, s->st.pose.x, s->q);
  if (t->slide_var[joint] >= 0)
    s->q[t->slide_var[joint]] = slide;
  sketch_changed(s);
  return KL_OK;
}

/* ---- the committed position ---- */

static int valid_link(const kl_solver *s, int link) {
  return s != NULL && link >= 0 && link < s->model->nlinks;
}

static int valid_slide(const kl_solver *s, int joint) {
  return s != NULL && joint >= 0 && joint < s->model->njoints &&
         kli_is_sliding(s->model->joints[joint].kind);
}

double kl_link_angle(const kl_solver *s, int link) {
  return valid_link(s, link) ? s->st.pose.x[link] : NAN;
}

double kl_joint_slide(const kl_solver *s, int joint) {
  return valid_slide(s, joint) ? s->st.pose.x[s->model->nlinks + joint] : NAN;
}

double kl_joint_angle(const kl_solver *s, int joint) {
  const kli_joint *j;
  if (s == NULL || joint < 0 || joint >= s->model->njoints)
    return NAN;
  j = &s->model->joints[joint];
  return s->st.pose.x[j->link[1]] - s->st.pose.x[j->link[0]];
}

double kl_input_value(const kl_solver *s, int input) {
  if (s == NULL || input < 0 || input >= s->ninputs || !s->st.inputs_known)
    return NAN;
  return s->st.u[input];
}

int kl_point_position(const kl_solver *s, int point, double xy[2]) {
  if (s == NULL || xy == NULL)
    return KL_EINVAL;
  if (point < 0 || point >= s->model->npoints)
    return KL_EID;
  kli_chain_value(s->model, &s->model->topo.points[point], &s->st.pose, xy);
  return KL_OK;
}

int kl_link_origin(const kl_solver *s, int link, double xy[2]) {
  if (s == NULL || xy == NULL)
    return KL_EINVAL;
  if (link < 0 || link >= s->model->nlinks)
    return KL_EID;
  kli_chain_value(s->model, &s->model->topo.origins[link], &s->st.pose, xy);
  return KL_OK;
}

int kl_link_to_global(const kl_solver *s, int link, const double local[2],
                      double xy[2]) {
  double origin[2], x, y, c, sn;
  if (s == NULL || local == NULL || xy == NULL)
    return KL_EINVAL;
  if (link < 0 || link >= s->model->nlinks)
    return KL_EID;
  x = local[0]; /* local and xy may be the same array */
  y = local[1];
  kli_chain_value(s->model, &s->model->topo.origins[link], &s->st.pose,
                  origin);
  c = s->st.pose.c[link];
  sn = s->st.pose.s[link];
  xy[0] = origin[0] + c * x - sn * y;
  xy[1] = origin[1] + sn * x + c * y;
  return KL_OK;
}

int kl_joint_position(const kl_solver *s, int joint, double xy[2]) {
  const kli_joint *j;
  if (s == NULL || xy == NULL)
    return KL_EINVAL;
  if (joint < 0 || joint >= s->model->njoints)
    return KL_EID;
  j = &s->model->joints[joint];
  return kl_link_to_global(s, j->link[1], j->at[1], xy);
}

int kl_solver_copy_state(kl_solver *to, const kl_solver *from) {
  if (to == NULL || from == NULL)
    return KL_EINVAL;
  if (to->model != from->model)
    return kli_fail(to->error, KL_EINVAL,
                    "copy state: the solvers belong to different models");
  if (to != from)
    kli_state_restore(to, &from->st);
  return KL_OK;
}
