/*
 * ranges.c - the extremes of many outputs from one sweep, at a cost that
 * does not grow with the number of outputs times the model's size.
 *
 * kl_output_range refines each output's turning points with solves of its
 * own, so n outputs of a model of size n cost n sweeps. Here the solves are
 * shared: where any output's slope changes sign between two steps, the
 * positions at a few fixed points inside that step are solved once (in a
 * scratch solver, so the sweep runs on undisturbed), and every output that
 * turns there is refined on the Hermite interpolant through the values
 * and slopes at those points. The work is one sweep plus at most
 * KLI_RANGE_INTERIOR solves per step, whatever the number of outputs.
 */
#include <math.h>
#include <string.h>

#include "memory.h"
#include "model.h"
#include "outputs.h"

/* Solved points inside a step where something turns; with the step's two
 * ends, a Hermite interpolant of degree 2 * (KLI_RANGE_INTERIOR + 2) - 1. */
#define KLI_RANGE_INTERIOR 3
#define KLI_RANGE_NODES (KLI_RANGE_INTERIOR + 2)
#define KLI_RANGE_TERMS (2 * KLI_RANGE_NODES)
/* Refinement on the interpolant stops at this bracket width, relative to
 * the step. */
#define KLI_RANGE_BRACKET 1e-13

/* What one output keeps: the last step's value and slope d/du, and its
 * best candidates ([0] the minimum, [1] the maximum) and where. */
typedef struct {
  double v, g;
  double best[2], at[2];
} output_track;

typedef struct {
  kl_solver *s, *scratch;
  int input, n, steps;
  const kl_output *o;
  output_track *t;
  int *turning;        /* per output: bit 0 a minimum, bit 1 a maximum */
  double *node_v, *node_g; /* KLI_RANGE_NODES per output */
  double direction;    /* +1 for a sweep up the input, -1 down */
  double u;            /* the last step's input */
} ranges_search;

static void offer(output_track *t, double v, double u) {
  if (v < t->best[0])
    t->best[0] = v, t->at[0] = u;
  if (v > t->best[1])
    t->best[1] = v, t->at[1] = u;
}

/* p(u) and p'(u) of the Newton form with coefficients c on nodes z. */
static void newton_eval(const double *c, const double *z, double u,
                        double *p, double *dp) {
  int j;
  *p = c[KLI_RANGE_TERMS - 1];
  *dp = 0.0;
  for (j = KLI_RANGE_TERMS - 2; j >= 0; j--) {
    *dp = *dp * (u - z[j]) + *p;
    *p = *p * (u - z[j]) + c[j];
  }
}

/* The Hermite interpolant through values v and slopes g at nodes t: its
 * Newton coefficients c on the doubled nodes z (confluent divided
 * differences). */
static void hermite(const double *t, const double *v, const double *g,
                    double *z, double *c) {
  double q[KLI_RANGE_TERMS];
  int i, j;
  for (i = 0; i < KLI_RANGE_TERMS; i++) {
    z[i] = t[i / 2];
    q[i] = v[i / 2];
  }
  c[0] = q[0];
  /* column by column, bottom up, so q[i] still holds column j - 1's */
  for (j = 1; j < KLI_RANGE_TERMS; j++) {
    for (i = KLI_RANGE_TERMS - 1; i >= j; i--)
      q[i] = j == 1 && i % 2 == 1 ? g[i / 2]
                                  : (q[i] - q[i - 1]) / (z[i] - z[i - j]);
    c[j] = q[j];
  }
}

/*
 * Each turning point of the interpolant between neighbouring nodes (a
 * minimum where its slope along the sweep turns from falling to rising,
 * `which` 0; a maximum, 1), by false position (Illinois) on its slope,
 * offered as a candidate.
 */
static void refine_on_interpolant(output_track *tr, const double *t,
                                  const double *v, const double *g,
                                  double direction, int which) {
  double z[KLI_RANGE_TERMS], c[KLI_RANGE_TERMS];
  double width = fabs(t[KLI_RANGE_NODES - 1] - t[0]);
  int k;
  hermite(t, v, g, z, c);
  for (k = 0; k + 1 < KLI_RANGE_NODES; k++) {
    double a = t[k], b = t[k + 1], ga = g[k] * direction, gb = g[k + 1] * direction;
    double p, dp, at;
    int side = 0, iter;
    if (which == 0 ? !(ga <= 0.0 && gb >= 0.0) : !(ga >= 0.0 && gb <= 0.0))
      continue;
    for (iter = 0; iter < 100 && fabs(b - a) > KLI_RANGE_BRACKET * width &&
                   ga != 0.0 && gb != 0.0;
         iter++) {
      double m = (a * gb - b * ga) / (gb - ga), gm;
      newton_eval(c, z, m, &p, &dp);
      gm = dp * direction;
      if (ga * gm < 0.0) {
        b = m, gb = gm;
        if (side == -1)
          ga *= 0.5;
        side = -1;
      } else {
        a = m, ga = gm;
        if (side == 1)
          gb *= 0.5;
        side = 1;
      }
    }
    at = ga == 0.0 ? a : gb == 0.0 ? b : 0.5 * (a + b);
    newton_eval(c, z, at, &p, &dp);
    offer(tr, p, at);
  }
}

/* Solves the interior nodes of the step from `a` (the state kept in
 * s->previous) to `b` in the scratch solver and refines every output that
 * turns there. A node that cannot be solved leaves the samples as the
 * candidates of this step. */
static void refine_step(ranges_search *r, double a, double b) {
  kl_solver *w = r->scratch;
  double t[KLI_RANGE_NODES], v[KLI_RANGE_NODES], g[KLI_RANGE_NODES];
  int i, k;
  if (a == b)
    return;
  kli_state_restore(w, &r->s->previous);
  memcpy(w->sweep_u, w->st.u, (size_t)w->ninputs * sizeof(double));
  for (k = 0; k < w->ninputs; k++)
    w->sweep_rate[k] = k == r->input ? 1.0 : 0.0;
  for (k = 1; k + 1 < KLI_RANGE_NODES; k++) {
    double u = a + (b - a) * 0.5 *
                       (1.0 - cos(KLI_PI * k / (KLI_RANGE_NODES - 1)));
    double delta = u - w->sweep_u[r->input];
    int c;
    /* predicted from the last solved point's unit-rate velocity, as the
     * sweep predicts its steps, so that Newton needs a step or two */
    for (c = 0; c < w->ncoords; c++)
      w->st.pose.x[c] += w->st.xd[c] * delta;
    w->factors_current = w->factors_near = 0;
    w->sweep_u[r->input] = u;
    if (kl_solve_position(w, w->sweep_u) != KL_OK ||
        kl_solve_velocity(w, w->sweep_rate) != KL_OK)
      return;
    for (i = 0; i < r->n; i++)
      if (r->turning[i]) {
        r->node_v[i * KLI_RANGE_NODES + k] = kli_output_value(w, &r->o[i]);
        r->node_g[i * KLI_RANGE_NODES + k] =
            kli_output_change(w, &r->o[i], w->st.xd, NULL);
      }
  }
  for (k = 0; k < KLI_RANGE_NODES; k++)
    t[k] = a + (b - a) * 0.5 * (1.0 - cos(KLI_PI * k / (KLI_RANGE_NODES - 1)));
  t[0] = a;
  t[KLI_RANGE_NODES - 1] = b;
  for (i = 0; i < r->n; i++) {
    int which;
    if (!r->turning[i])
      continue;
    memcpy(v, r->node_v + i * KLI_RANGE_NODES, sizeof v);
    memcpy(g, r->node_g + i * KLI_RANGE_NODES, sizeof g);
    for (which = 0; which < 2; which++)
      if (r->turning[i] & (1 << which))
        refine_on_interpolant(&r->t[i], t, v, g, r->direction, which);
  }
}

static int track_all(const kl_solver *cs, int step, double input,
                     void *user) {
  ranges_search *r = user;
  kl_solver *s = r->s; /* the same solver, which this search owns */
  int i, any = 0;
  (void)step;
  for (i = 0; i < r->n; i++) {
    output_track *tr = &r->t[i];
    double v = kli_output_value(cs, &r->o[i]);
    double g = kli_output_change(cs, &r->o[i], cs->st.xd, NULL);
    r->turning[i] = 0;
    if (r->steps == 0) {
      tr->best[0] = tr->best[1] = v;
      tr->at[0] = tr->at[1] = input;
    } else {
      double before = tr->g * r->direction, now = g * r->direction;
      r->turning[i] = (before <= 0.0 && now >= 0.0 ? 1 : 0) |
                      (before >= 0.0 && now <= 0.0 ? 2 : 0);
      if (r->turning[i]) {
        any = 1;
        r->node_v[i * KLI_RANGE_NODES] = tr->v;
        r->node_g[i * KLI_RANGE_NODES] = tr->g;
        r->node_v[i * KLI_RANGE_NODES + KLI_RANGE_NODES - 1] = v;
        r->node_g[i * KLI_RANGE_NODES + KLI_RANGE_NODES - 1] = g;
      }
      offer(tr, v, input);
    }
    tr->v = v;
    tr->g = g;
  }
  if (any)
    refine_step(r, r->u, input);
  kli_state_copy(s, &s->previous, &s->st);
  r->u = input;
  r->steps++;
  return 0;
}

/* The search's arrays, carved from one block (base NULL: only sized). */
static size_t carve_search(ranges_search *r, void *base, int n) {
  kli_carver c;
  c.base = base;
  c.used = 0;
  r->t = kli_carve(&c, (size_t)n, sizeof(output_track));
  r->turning = kli_carve(&c, (size_t)n, sizeof(int));
  r->node_v = kli_carve(&c, (size_t)n * KLI_RANGE_NODES, sizeof(double));
  r->node_g = kli_carve(&c, (size_t)n * KLI_RANGE_NODES, sizeof(double));
  return c.used;
}

int kl_output_ranges(kl_solver *s, int input, double from, double to,
                     int steps, int n, const kl_output *outputs,
                     kl_range *ranges) {
  const kl_model *m;
  ranges_search r;
  kl_sweep_result sw;
  void *block;
  size_t bytes;
  int st, i;
  if (s == NULL || n < 0 || (n > 0 && (outputs == NULL || ranges == NULL)))
    return KL_EINVAL;
  m = s->model;
  for (i = 0; i < n; i++) {
    if (ranges[i].size < sizeof(ranges[i].size))
      return kli_fail(s->error, KL_EINVAL,
                      "output ranges: range index %d (0-based) has no size "
                      "set",
                      i);
    if ((st = kli_output_check(m, &outputs[i], s->error)) != KL_OK)
      return st;
  }
  memset(&r, 0, sizeof r);
  bytes = carve_search(&r, NULL, n);
  block = kli_alloc(&m->alloc, bytes);
  r.scratch = kl_solver_new(m);
  if ((bytes > 0 && block == NULL) || r.scratch == NULL) {
    kl_solver_free(r.scratch);
    kli_free(&m->alloc, block, bytes);
    return kli_fail(s->error, KL_ENOMEM, "output ranges: out of memory");
  }
  carve_search(&r, block, n);
  r.s = s;
  r.input = input;
  r.n = n;
  r.o = outputs;
  r.direction = to >= from ? 1.0 : -1.0;
  r.scratch->opt = s->opt;
  sw.size = sizeof sw;
  kli_state_keep(s);
  r.scratch->singular_rcond = fmax(s->opt.singular_rcond, s->singular_rcond);
  st = kl_solver_sweep(s, input, from, to, steps, track_all, &r, &sw);
  if (st == KL_LIMIT) {
    /* the motion's last reachable position counts too, as in
     * kl_output_range */
    double inside = sw.limit_input - (to > from ? 1.0 : -1.0) * KLI_LIMIT_INSIDE;
    kl_sweep_result tail;
    tail.size = sizeof tail;
    kl_solver_sweep(s, input, r.u, inside, 1, track_all, &r, &tail);
  }
  if (st != KL_OK && st != KL_LIMIT) {
    kli_state_back(s);
    kl_solver_free(r.scratch);
    kli_free(&m->alloc, block, bytes);
    return st;
  }
  for (i = 0; i < n; i++) {
    kl_range out;
    memset(&out, 0, sizeof out);
    out.min = r.t[i].best[0];
    out.max = r.t[i].best[1];
    out.input_at_min = r.t[i].at[0];
    out.input_at_max = r.t[i].at[1];
    out.sweep_status = st;
    out.limit_input = sw.limit_input;
    kli_copy_sized(&ranges[i], &out, sizeof out);
  }
  kl_solver_free(r.scratch);
  kli_free(&m->alloc, block, bytes);
  return st;
}
