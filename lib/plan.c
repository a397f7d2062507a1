/*
 * plan.c - the flat evaluation plan: the loop equations of a model of
 * revolute loops, their Jacobian and the rate stages' terms as flat lists
 * worked out once, evaluated without the vector chains' dispatch.
 */
#include "sincos.h"

#include <math.h>
#include <string.h>

#include "plan.h"

/* A model fits the plan when every row is a loop row, every loop term a
 * link term, every unknown a link angle and no joint slides. */
static int fits(const kl_model *m) {
  const kli_topology *t = &m->topo;
  int i;
  if (t->nextra > 0 || t->redundancy > 0 || m->npoint_inputs > 0 ||
      t->nrows != 2 * t->nloops || t->nvars != t->nrows)
    return 0;
  for (i = 0; i < t->nloops; i++) {
    const kli_term *term = t->terms + t->loops[i].first;
    int k;
    for (k = 0; k < t->loops[i].count; k++, term++)
      if (term->joint >= 0)
        return 0;
  }
  for (i = 0; i < t->nvars; i++)
    if (t->var_coord[i] >= m->nlinks)
      return 0;
  for (i = 0; i < m->njoints; i++)
    if (kli_is_sliding(m->joints[i].kind))
      return 0;
  return 1;
}

static int loop_terms(const kl_model *m) {
  int i, n = 0;
  for (i = 0; i < m->topo.nloops; i++)
    n += m->topo.loops[i].count;
  return n;
}

void kli_plan_carve(kli_plan *p, kli_carver *c, const kl_model *m) {
  size_t terms, links = (size_t)m->nlinks, inputs = (size_t)m->ninputs;
  memset(p, 0, sizeof *p);
  if (!fits(m))
    return; /* nothing carved: the general code serves */
  terms = (size_t)loop_terms(m);
  p->terms = kli_carve(c, terms, sizeof *p->terms);
  p->fixed_link = kli_carve(c, links, sizeof(int));
  /* no joint slides: the inputs move link angles only */
  p->inputs = kli_carve(c, kli_size_mul(links, inputs), sizeof *p->inputs);
  p->rates = kli_carve(c, kli_size_mul(terms, inputs), sizeof *p->rates);
  p->fixed = kli_carve(c, (size_t)m->topo.nrows, sizeof(double));
}

/* Appends the terms of every loop on links that an unknown turns (moving
 * 1) or that none does (moving 0). */
static void add_terms(kli_plan *p, const kl_model *m, int moving) {
  const kli_topology *t = &m->topo;
  int i, k;
  for (i = 0; i < t->nloops; i++) {
    const kli_term *term = t->terms + t->loops[i].first;
    for (k = 0; k < t->loops[i].count; k++, term++) {
      kli_flat_term *f;
      if ((t->coord_var[term->link] >= 0) != moving)
        continue;
      f = &p->terms[p->nterms++];
      f->row = 2 * i;
      f->link = term->link;
      f->pair = term->nz_angle;
      f->v[0] = term->v[0];
      f->v[1] = term->v[1];
    }
  }
}

void kli_plan_build(kli_plan *p, const kl_model *m, const int *moving_link,
                    const int *moving_var, int nmoving, double *x_scratch,
                    double *u_scratch) {
  const kli_topology *t = &m->topo;
  int l, i, k;
  if (p->terms == NULL)
    return;
  p->nrows = t->nrows;
  p->ncoords = t->ncoords;
  p->npairs = t->nnz_pairs;
  p->nterms = 0;
  add_terms(p, m, 1);
  p->nmoving = p->nterms;
  add_terms(p, m, 0);
  p->moving_link = moving_link;
  p->moving_var = moving_var;
  p->nmoving_links = nmoving;
  p->nfixed_links = 0;
  for (l = 0; l < m->nlinks; l++)
    if (t->coord_var[l] < 0)
      p->fixed_link[p->nfixed_links++] = l;
  /* G column by column, from the general expansion of each unit input */
  p->ninputs = p->nrates = 0;
  for (i = 0; i < m->ninputs; i++) {
    memset(u_scratch, 0, (size_t)m->ninputs * sizeof(double));
    u_scratch[i] = 1.0;
    kli_expand(m, NULL, u_scratch, x_scratch);
    for (l = 0; l < m->nlinks; l++)
      if (x_scratch[l] != 0.0) {
        kli_flat_input *in = &p->inputs[p->ninputs++];
        in->coord = l;
        in->input = i;
        in->coef = x_scratch[l];
      }
    for (k = 0; k < p->nterms; k++)
      if (x_scratch[p->terms[k].link] != 0.0) {
        kli_flat_rate *r = &p->rates[p->nrates++];
        r->term = k;
        r->input = i;
        r->coef = x_scratch[p->terms[k].link];
      }
  }
  p->usable = 1;
}

void kli_plan_place(kli_plan *p, const kli_dense *d) {
  int k, j;
  for (k = 0; k < p->nmoving; k++) {
    kli_flat_term *t = &p->terms[k];
    if (t->pair < 0)
      continue;
    t->at[0] = d->a_at[2 * t->pair];
    t->at[1] = d->a_at[2 * t->pair + 1];
    t->first = 1;
    for (j = 0; j < k; j++)
      if (p->terms[j].pair == t->pair)
        t->first = 0;
  }
}

/* R(angle) v at the pose's trig. */
static void rotated(const kli_flat_term *t, const kli_pose *pose,
                    double r[2]) {
  double c = pose->c[t->link], s = pose->s[t->link];
  r[0] = c * t->v[0] - s * t->v[1];
  r[1] = s * t->v[0] + c * t->v[1];
}

void kli_plan_start(kli_plan *p, kli_pose *a, kli_pose *b) {
  int i, k;
  for (i = 0; i < p->nfixed_links; i++) {
    int l = p->fixed_link[i];
    if (a->x[l] != a->trig_at[l]) { /* NaN never compares equal */
      kli_sincos(a->x[l], &a->s[l], &a->c[l]);
      a->trig_at[l] = a->x[l];
    }
    b->c[l] = a->c[l];
    b->s[l] = a->s[l];
    b->trig_at[l] = a->trig_at[l];
  }
  for (i = 0; i < p->nrows; i++)
    p->fixed[i] = 0.0;
  for (k = p->nmoving; k < p->nterms; k++) {
    const kli_flat_term *t = &p->terms[k];
    double r[2];
    rotated(t, a, r);
    p->fixed[t->row] += r[0];
    p->fixed[t->row + 1] += r[1];
  }
}

double kli_plan_residual(const kli_plan *p, kli_pose *pose, const double *base,
                         const double *q, double *f) {
  double norm = 0.0;
  int i, k;
  for (i = 0; i < p->nmoving_links; i++) {
    int l = p->moving_link[i];
    double angle = base[l] + q[p->moving_var[i]];
    pose->x[l] = angle;
    if (angle != pose->trig_at[l]) {
      kli_sincos(angle, &pose->s[l], &pose->c[l]);
      pose->trig_at[l] = angle;
    }
  }
  memcpy(f, p->fixed, (size_t)p->nrows * sizeof(double));
  for (k = 0; k < p->nmoving; k++) {
    const kli_flat_term *t = &p->terms[k];
    double r[2];
    rotated(t, pose, r);
    f[t->row] += r[0];
    f[t->row + 1] += r[1];
  }
  for (i = 0; i < p->nrows; i++)
    if (!(fabs(f[i]) <= norm))
      norm = fabs(f[i]); /* NaN propagates */
  return norm;
}

void kli_plan_jacobian(const kli_plan *p, const kli_pose *pose,
                       double *pairs) {
  int k;
  memset(pairs, 0, 2 * (size_t)p->npairs * sizeof *pairs);
  for (k = 0; k < p->nmoving; k++) {
    const kli_flat_term *t = &p->terms[k];
    double r[2];
    if (t->pair < 0)
      continue;
    rotated(t, pose, r);
    pairs[2 * t->pair] -= r[1];
    pairs[2 * t->pair + 1] += r[0];
  }
}

void kli_plan_load_small(const kli_plan *p, const kli_pose *pose,
                         kli_dense *d) {
  double *a = d->a;
  int k;
  for (k = 0; k < p->nmoving; k++) {
    const kli_flat_term *t = &p->terms[k];
    double r[2];
    if (t->pair < 0)
      continue;
    rotated(t, pose, r);
    /* 0 - r and 0 + r, not -r and r: the same values, signed zeros too,
     * as adding to a zeroed entry gives */
    if (t->first) {
      a[t->at[0]] = 0.0 - r[1];
      a[t->at[1]] = 0.0 + r[0];
    } else {
      a[t->at[0]] -= r[1];
      a[t->at[1]] += r[0];
    }
  }
  kli_dense_loaded(d);
}

void kli_plan_input_terms(const kli_plan *p, const kli_pose *pose,
                          const double *w, double *out) {
  int k;
  memset(out, 0, (size_t)p->nrows * sizeof *out);
  for (k = 0; k < p->nrates; k++) {
    const kli_flat_rate *rate = &p->rates[k];
    const kli_flat_term *t = &p->terms[rate->term];
    double r[2], omega = rate->coef * w[rate->input];
    rotated(t, pose, r);
    out[t->row] -= omega * r[1];
    out[t->row + 1] += omega * r[0];
  }
}

void kli_plan_expand(const kli_plan *p, const double *q, const double *u,
                     double *x) {
  int i;
  memset(x, 0, (size_t)p->ncoords * sizeof *x);
  for (i = 0; i < p->ninputs && u != NULL; i++)
    x[p->inputs[i].coord] += p->inputs[i].coef * u[p->inputs[i].input];
  for (i = 0; i < p->nmoving_links && q != NULL; i++)
    x[p->moving_link[i]] += q[p->moving_var[i]];
}

void kli_plan_add_second(const kli_plan *p, const kli_pose *pose,
                         const double *va, const double *vb, double *out) {
  int k;
  /* centripetal: -omega_a omega_b R v, on the links that turn */
  for (k = 0; k < p->nterms; k++) {
    const kli_flat_term *t = &p->terms[k];
    double r[2], ww = va[t->link] * vb[t->link];
    if (ww == 0.0)
      continue;
    rotated(t, pose, r);
    out[t->row] -= ww * r[0];
    out[t->row + 1] -= ww * r[1];
  }
}
