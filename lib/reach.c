/*
 * reach.c - bringing a solver to target inputs by continuation, from the
 * position last solved or from the model's start position.
 */
#include <math.h>
#include <string.h>

#include "describe.h"
#include "slots.h"
#include "solver.h"

/* The longest continuation step of a move: 2 degrees of a turning input,
 * 2 % of the model's scale of a sliding one (what the kinloop tool has
 * always used: short enough for the sweep's predictor on any linkage it
 * checks, few enough to cost little). */
#define KLI_REACH_ANGLE_STEP (2.0 * KLI_PI / 180.0)
#define KLI_REACH_SLIDE_STEP 0.02
/* Steps one move may take (555 turns at 2 degrees); beyond, each step
 * grows longer instead, so that a far target costs bounded work. */
#define KLI_REACH_MAX_STEPS 100000

/* A point's global coordinate `axis` at the model's sketch (a link without
 * a sketch angle at 0, a slide without a sketch slide at 0): its chain's
 * terms summed, as a new solver's start pose places it. */
static double sketch_coordinate(const kl_model *m, int point, int axis) {
  const kli_chain *ch = &m->topo.points[point];
  const kli_term *t = m->topo.terms + ch->first;
  double sum = 0.0;
  int k;
  for (k = 0; k < ch->count; k++, t++) {
    const kli_link *l = &m->links[t->link];
    double angle = l->has_sketch ? l->sketch : 0.0;
    if (t->joint < 0) {
      sum += axis == 0 ? cos(angle) * t->v[0] - sin(angle) * t->v[1]
                       : sin(angle) * t->v[0] + cos(angle) * t->v[1];
    } else {
      /* the slot's own path (line, arc or spline), as the equations take it */
      const kli_joint *j = &m->joints[t->joint];
      double g[6], c = cos(angle), s = sin(angle);
      kli_slot_path(j, j->has_sketch ? j->sketch : 0.0, g);
      sum += t->sign * (axis == 0 ? c * g[0] - s * g[1] : s * g[0] + c * g[1]);
    }
  }
  return sum;
}

int kl_model_start_inputs(const kl_model *m, double *inputs) {
  int i;
  if (m == NULL || (m->ninputs > 0 && inputs == NULL))
    return KL_EINVAL;
  for (i = 0; i < m->ninputs; i++)
    inputs[i] = m->inputs[i] >= 0 && m->joints[m->inputs[i]].has_hold
                    ? m->joints[m->inputs[i]].hold
                    : 0.0;
  /* a point input starts where the sketch puts its point (once the chains
   * exist: after finalize) */
  for (i = 0; m->finalized && i < m->npoint_inputs; i++)
    inputs[m->point_inputs[i].input] = sketch_coordinate(
        m, m->point_inputs[i].point, m->point_inputs[i].axis);
  if (m->has_sweep)
    inputs[m->sweep.input] = m->sweep.from;
  return KL_OK;
}

static void finish(kl_reach_result *result, int status, int input,
                   double from, double limit, int substeps) {
  kl_reach_result r;
  if (result == NULL || result->size < sizeof(result->size))
    return;
  r.status = status;
  r.input = input;
  r.from = from;
  r.limit_input = limit;
  r.substeps = substeps;
  kli_copy_sized(result, &r, sizeof r);
}

/* Moves input i from its value now to `target`, the others held. */
static int move(kl_solver *s, int i, double target, kl_sweep_result *sw) {
  const kl_model *m = s->model;
  double from = s->st.u[i], delta = fabs(target - from);
  double step = kli_input_is_angle(m, i)
                    ? KLI_REACH_ANGLE_STEP
                    : KLI_REACH_SLIDE_STEP * m->topo.scale;
  int steps = delta / step > KLI_REACH_MAX_STEPS ? KLI_REACH_MAX_STEPS
                                                  : (int)ceil(delta / step);
  char lj[KLI_LABEL_SIZE], at[48], a[48], b[48];
  int st;
  sw->size = sizeof *sw;
  st = kl_solver_sweep(s, i, from, target, steps, NULL, NULL, sw);
  if (st == KL_LIMIT || st == KL_ESINGULAR)
    return kli_fail(s->error, st == KL_LIMIT ? KL_ENOASSEMBLY : KL_ESINGULAR,
                    "reach: %s %s at %s on its way from %s to %s",
                    kli_input_label(m, i, lj, sizeof lj),
                    st == KL_LIMIT ? "stops at a motion limit"
                                   : "meets a singular position",
                    kli_input_value(m, i, sw->limit_input, 12, at, sizeof at),
                    kli_input_value(m, i, from, 12, a, sizeof a),
                    kli_input_value(m, i, target, 12, b, sizeof b));
  return st; /* the sweep's own message stands */
}

int kl_solver_reach(kl_solver *s, const double *inputs,
                    kl_reach_result *result) {
  int st, i, substeps = 0;
  if (s == NULL)
    return KL_EINVAL;
  if ((st = kli_check_input_values(s, inputs, "reach", "target")) != KL_OK) {
    finish(result, st, -1, NAN, NAN, 0);
    return st;
  }
  kli_state_keep(s);
  if (!s->st.position_solved) {
    /* nothing solved to go on from: the model's start, from the sketch */
    kl_model_start_inputs(s->model, s->sweep_u);
    if (kl_solve_position(s, s->sweep_u) != KL_OK) {
      /* no start either: the sketch alone must choose the branch */
      kli_state_back(s);
      st = kl_solve_position(s, inputs);
      if (st != KL_OK)
        kli_state_back(s);
      finish(result, st, -1, NAN, NAN, 0);
      return st;
    }
  }
  for (i = 0; i < s->ninputs; i++) {
    double from = s->st.u[i];
    kl_sweep_result sw;
    if (inputs[i] == from)
      continue;
    st = move(s, i, inputs[i], &sw);
    substeps += sw.substeps;
    if (st != KL_OK) {
      kli_state_back(s);
      finish(result, st, i, from, sw.limit_input, substeps);
      return st;
    }
  }
  /* a move ends on its target, with the sweep's unit rates: solve the
   * position alone there, as after any position solve */
  st = kl_solve_position(s, inputs);
  if (st != KL_OK)
    kli_state_back(s);
  finish(result, st, -1, NAN, NAN, substeps);
  return st;
}
