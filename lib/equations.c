/*
 * equations.c - vector chains evaluated at a pose: loop residuals, Jacobian
 * values on the sparsity pattern, rates along coordinate velocities and the
 * second-order (centripetal and Coriolis) terms.
 */
#include "sincos.h"

#include <math.h>
#include <string.h>

#include "equations.h"
#include "slots.h"

void kli_expand_inputs(const kl_model *m, const double *u, double *base) {
  const kli_topology *t = &m->topo;
  int i, j;
  for (i = 0; i < m->nlinks; i++) {
    int l = t->angle_order[i], parent = t->angle_parent[l];
    if (parent < 0)
      base[l] = 0.0; /* ground, or a group's own unknown */
    else
      base[l] = base[parent] + (t->angle_input[l] >= 0 && u != NULL
                                    ? t->angle_sign[l] * u[t->angle_input[l]]
                                    : 0.0);
  }
  for (j = 0; j < m->njoints; j++)
    base[m->nlinks + j] = t->slide_input[j] >= 0 && u != NULL
                              ? u[t->slide_input[j]]
                              : 0.0;
  /* a point input's value is a coordinate of its own, after the slides */
  for (j = 0; j < m->npoint_inputs; j++)
    base[m->nlinks + m->njoints + j] =
        u != NULL ? u[m->point_inputs[j].input] : 0.0;
}

void kli_add_unknowns(const kl_model *m, const double *base, const double *q,
                      double *x) {
  const int *var = m->topo.coord_var;
  int c;
  for (c = 0; c < m->topo.ncoords; c++)
    x[c] = var[c] >= 0 && q != NULL ? base[c] + q[var[c]] : base[c];
}

void kli_expand(const kl_model *m, const double *q, const double *u,
                double *x) {
  kli_expand_inputs(m, u, x);
  kli_add_unknowns(m, x, q, x);
}

void kli_gather(const kl_model *m, const double *x, double *q) {
  int v;
  for (v = 0; v < m->topo.nvars; v++)
    q[v] = x[m->topo.var_coord[v]];
}

void kli_pose_trig(const kl_model *m, kli_pose *p) {
  int l;
  /* in a Newton iteration only the unknown angles move: the others keep
   * their cosine and sine (a NaN in trig_at never compares equal) */
  for (l = 0; l < m->nlinks; l++)
    if (p->x[l] != p->trig_at[l]) {
      kli_sincos(p->x[l], &p->s[l], &p->c[l]);
      p->trig_at[l] = p->x[l];
    }
}

void kli_pose_forget_trig(const kl_model *m, kli_pose *p) {
  int l;
  for (l = 0; l < m->nlinks; l++)
    p->trig_at[l] = NAN;
}

/* A slide term's path at pose p, turned into the global frame: its vector
 * g(s) from the guide's attachment to the pin, dg/ds and d2g/ds2 (slots.c),
 * each times the term's sign. */
static void slide_path(const kl_model *m, const kli_term *t, const kli_pose *p,
                       double r[6]) {
  double local[6], c = p->c[t->link], s = p->s[t->link];
  int i;
  kli_slot_path(&m->joints[t->joint], p->x[m->nlinks + t->joint], local);
  for (i = 0; i < 6; i += 2) {
    r[i] = t->sign * (c * local[i] - s * local[i + 1]);
    r[i + 1] = t->sign * (s * local[i] + c * local[i + 1]);
  }
}

/* R(angle) v for a link term. */
static void rotated(const kli_term *t, const kli_pose *p, double r[2]) {
  double c = p->c[t->link], s = p->s[t->link];
  r[0] = c * t->v[0] - s * t->v[1];
  r[1] = s * t->v[0] + c * t->v[1];
}

void kli_chain_value(const kl_model *m, const kli_chain *ch, const kli_pose *p,
                     double out[2]) {
  const kli_term *t = m->topo.terms + ch->first;
  int k;
  out[0] = out[1] = 0.0;
  for (k = 0; k < ch->count; k++, t++) {
    double r[2];
    if (t->joint < 0) {
      rotated(t, p, r);
    } else {
      double g[6];
      slide_path(m, t, p, g);
      r[0] = g[0];
      r[1] = g[1];
    }
    out[0] += r[0];
    out[1] += r[1];
  }
}

void kli_chain_rate(const kl_model *m, const kli_chain *ch, const kli_pose *p,
                    const double *v, double out[2]) {
  const kli_term *t = m->topo.terms + ch->first;
  int k;
  out[0] = out[1] = 0.0;
  for (k = 0; k < ch->count; k++, t++) {
    double r[2], w = v[t->link];
    if (t->joint < 0) {
      rotated(t, p, r);
      out[0] -= w * r[1];
      out[1] += w * r[0];
    } else {
      double g[6], sd = v[m->nlinks + t->joint];
      slide_path(m, t, p, g);
      /* d/dt R g(s) = sdot R g' + omega (R g)-perp */
      out[0] += sd * g[2] - w * g[1];
      out[1] += sd * g[3] + w * g[0];
    }
  }
}

void kli_chain_second(const kl_model *m, const kli_chain *ch,
                      const kli_pose *p, const double *va, const double *vb,
                      double out[2]) {
  const kli_term *t = m->topo.terms + ch->first;
  int k;
  out[0] = out[1] = 0.0;
  for (k = 0; k < ch->count; k++, t++) {
    double r[2], wa = va[t->link], wb = vb[t->link];
    if (t->joint < 0) {
      /* centripetal: -omega^2 R v */
      rotated(t, p, r);
      out[0] -= wa * wb * r[0];
      out[1] -= wa * wb * r[1];
    } else {
      int si = m->nlinks + t->joint;
      /* Coriolis (sdot_a omega_b + sdot_b omega_a) (R g')-perp, the
       * centripetal part -omega_a omega_b R g of the slide's vector, and
       * the path's own curvature sdot_a sdot_b R g'' */
      double g[6], cor = va[si] * wb + vb[si] * wa, cen = wa * wb,
                   curv = va[si] * vb[si];
      slide_path(m, t, p, g);
      out[0] += -cor * g[3] - cen * g[0] + curv * g[4];
      out[1] += cor * g[2] - cen * g[1] + curv * g[5];
    }
  }
}

void kli_chain_accel(const kl_model *m, const kli_chain *ch, const kli_pose *p,
                     const double *va, const double *vb, const double *vdd,
                     double out[2]) {
  double second[2];
  kli_chain_rate(m, ch, p, vdd, out);
  kli_chain_second(m, ch, p, va, vb, second);
  out[0] += second[0];
  out[1] += second[1];
}

/* The third-order part of one term's third time derivative: everything
 * but (dF/dx) xddd, from the rates v and accelerations a. Each term kind
 * adds its piece here and nowhere else (docs/theory.md, "jerk"). */
static void term_third(const kl_model *m, const kli_term *t,
                       const kli_pose *p, const double *v, const double *a,
                       double out[2]) {
  double r[2], w = v[t->link], al = a[t->link];
  if (t->joint < 0) {
    /* d3/dt3 R v = zeta R' v - 3 omega alpha R v - omega^3 R' v, R' v the
     * vector turned a quarter: its zeta part is linear, the rest is here */
    double along = -3.0 * w * al, across = -w * w * w;
    rotated(t, p, r);
    out[0] += along * r[0] - across * r[1];
    out[1] += along * r[1] + across * r[0];
  } else {
    /* F = R g(s), G_k = R d^k g/ds^k, J a quarter turn: the third
     * derivative is zeta J F + sddd G_1 (linear) plus
     * -3 omega alpha F - omega^3 J F - 3 sd omega^2 G_1
     * + 3 (sd alpha + sdd omega) J G_1 + 3 sd sdd G_2
     * + 3 sd^2 omega J G_2 + sd^3 G_3 (docs/theory.md, jerk) */
    int si = m->nlinks + t->joint;
    double sd = v[si], sdd = a[si], g[6], local3[2], g3[2];
    double c = p->c[t->link], sn = p->s[t->link];
    double f0 = -3.0 * w * al, f1 = -w * w * w;
    double a1 = -3.0 * sd * w * w, b1 = 3.0 * (sd * al + sdd * w);
    double a2 = 3.0 * sd * sdd, b2 = 3.0 * sd * sd * w, a3 = sd * sd * sd;
    slide_path(m, t, p, g);
    kli_slot_path_third(&m->joints[t->joint], p->x[si], local3);
    g3[0] = t->sign * (c * local3[0] - sn * local3[1]);
    g3[1] = t->sign * (sn * local3[0] + c * local3[1]);
    out[0] += f0 * g[0] - f1 * g[1] + a1 * g[2] - b1 * g[3] + a2 * g[4] -
              b2 * g[5] + a3 * g3[0];
    out[1] += f0 * g[1] + f1 * g[0] + a1 * g[3] + b1 * g[2] + a2 * g[5] +
              b2 * g[4] + a3 * g3[1];
  }
}

void kli_chain_third(const kl_model *m, const kli_chain *ch,
                     const kli_pose *p, const double *v, const double *a,
                     double out[2]) {
  const kli_term *t = m->topo.terms + ch->first;
  int k;
  out[0] = out[1] = 0.0;
  for (k = 0; k < ch->count; k++, t++)
    term_third(m, t, p, v, a, out);
}

void kli_chain_jerk(const kl_model *m, const kli_chain *ch, const kli_pose *p,
                    const double *v, const double *a, const double *j,
                    double out[2]) {
  double third[2];
  kli_chain_rate(m, ch, p, j, out);
  kli_chain_third(m, ch, p, v, a, third);
  out[0] += third[0];
  out[1] += third[1];
}

void kli_chain_dimension(const kl_model *m, const kli_chain *ch,
                         const kli_pose *p, int joint, int link, int axis,
                         double out[2]) {
  const kli_term *t = m->topo.terms + ch->first;
  int k;
  out[0] = out[1] = 0.0;
  for (k = 0; k < ch->count; k++, t++) {
    /* R(angle) e_axis, with the sign of the end that moves */
    double c = p->c[t->link], s = p->s[t->link], sign = 0.0;
    if (t->joint >= 0 || t->link != link)
      continue;
    if (t->to_joint == joint)
      sign += 1.0;
    if (t->from_joint == joint && joint >= 0)
      sign -= 1.0;
    out[0] += sign * (axis == 0 ? c : -s);
    out[1] += sign * (axis == 0 ? s : c);
  }
}

/* A joint's coordinate in coordinates x: angle(b) - angle(a), or its
 * slide. */
static double joint_coordinate(const kl_model *m, const double *x,
                               int joint) {
  const kli_joint *j = &m->joints[joint];
  return j->kind == KL_JOINT_REVOLUTE ? x[j->link[1]] - x[j->link[0]]
                                      : x[m->nlinks + joint];
}

/* The same at the model's sketch (0 where it gives none). */
static double sketch_coordinate(const kl_model *m, int joint) {
  const kli_joint *j = &m->joints[joint];
  if (j->kind != KL_JOINT_REVOLUTE)
    return j->has_sketch ? j->sketch : 0.0;
  return (m->links[j->link[1]].has_sketch ? m->links[j->link[1]].sketch
                                          : 0.0) -
         (m->links[j->link[0]].has_sketch ? m->links[j->link[0]].sketch
                                          : 0.0);
}

/* d F / d radius of a gear pair's or rack's row: its joint's turn against
 * the carrier since the sketch, with the row's sign for that radius. */
static double radius_term(const kl_model *m, const kli_pose *p, int coupling,
                          int which) {
  const kli_coupling *c = &m->couplings[coupling];
  int joint = c->joint[c->kind == KL_COUPLING_GEAR ? which : 0];
  double turn = joint_coordinate(m, p->x, joint) - sketch_coordinate(m, joint);
  double against = m->joints[joint].link[0] == c->carrier ? 1.0 : -1.0;
  if (c->kind == KL_COUPLING_RACK)
    return -against * turn;
  return (which == 1 && c->internal ? -1.0 : 1.0) * against * turn;
}

void kli_loops_dimension(const kl_model *m, const kli_pose *p, int joint,
                         int link, int axis, int point, int coupling,
                         double *out) {
  int i, rows = 2 * m->topo.nloops;
  for (i = 0; i < m->topo.nloops; i++)
    kli_chain_dimension(m, &m->topo.loops[i], p, joint, link, axis,
                        out + 2 * i);
  for (i = 0; i < m->topo.nextra; i++) {
    const kli_extra *e = &m->topo.extra[i];
    double d[2] = {0.0, 0.0};
    if (i < m->ncouplings) {
      out[rows + i] = i == coupling ? radius_term(m, p, i, axis) : 0.0;
      continue;
    }
    if (joint >= 0 ||
        (coupling < 0 && m->point_inputs[i - m->ncouplings].point == point))
      kli_chain_dimension(m, &e->chain, p, joint, link, axis, d);
    out[rows + i] = d[e->axis];
  }
}

/* ---- extra rows: F = sum coef x - offset + (chain's component axis) ---- */

static double extra_value(const kl_model *m, const kli_extra *e,
                          const kli_pose *p) {
  double sum = -e->offset, c[2];
  int k;
  for (k = 0; k < e->ncoef; k++)
    sum += e->coef[k] * p->x[e->coord[k]];
  if (e->chain.count > 0) {
    kli_chain_value(m, &e->chain, p, c);
    sum += c[e->axis];
  }
  return sum;
}

static double extra_rate(const kl_model *m, const kli_extra *e,
                         const kli_pose *p, const double *v) {
  double sum = 0.0, c[2];
  int k;
  for (k = 0; k < e->ncoef; k++)
    sum += e->coef[k] * v[e->coord[k]];
  if (e->chain.count > 0) {
    kli_chain_rate(m, &e->chain, p, v, c);
    sum += c[e->axis];
  }
  return sum;
}

/* The Jacobian values of extra row e, added to `values` (one per extra
 * entry). */
static void extra_jacobian(const kl_model *m, const kli_extra *e,
                           const kli_pose *p, double *values) {
  const kli_term *t = m->topo.terms + e->chain.first;
  int k, ax = e->axis;
  for (k = 0; k < e->ncoef; k++)
    if (e->entry[k] >= 0)
      values[e->entry[k]] += e->coef[k];
  for (k = 0; k < e->chain.count; k++, t++) {
    double r[2];
    if (t->joint < 0) {
      if (t->nz_angle < 0)
        continue;
      rotated(t, p, r);
      values[t->nz_angle] += ax == 0 ? -r[1] : r[0];
    } else {
      double g[6]; /* the slot's path, signed, in the global frame */
      slide_path(m, t, p, g);
      if (t->nz_slide >= 0)
        values[t->nz_slide] += g[2 + ax];
      if (t->nz_angle >= 0)
        values[t->nz_angle] += ax == 0 ? -g[1] : g[0];
    }
  }
}

double kli_residual(const kl_model *m, const kli_pose *p, double *f) {
  double norm = 0.0;
  int i, rows = 2 * m->topo.nloops;
  for (i = 0; i < m->topo.nloops; i++) {
    kli_chain_value(m, &m->topo.loops[i], p, f + 2 * i);
    norm = fmax(norm, fmax(fabs(f[2 * i]), fabs(f[2 * i + 1])));
  }
  for (i = 0; i < m->topo.nextra; i++) {
    f[rows + i] = extra_value(m, &m->topo.extra[i], p);
    norm = fmax(norm, fabs(f[rows + i]));
  }
  return norm;
}

void kli_input_terms_at(const kl_model *m, const kli_pose *p, const double *w,
                        double *v, double *out) {
  kli_expand(m, NULL, w, v);
  kli_loops_rate(m, p, v, out);
}

void kli_loops_rate(const kl_model *m, const kli_pose *p, const double *v,
                    double *out) {
  int i, rows = 2 * m->topo.nloops;
  for (i = 0; i < m->topo.nloops; i++)
    kli_chain_rate(m, &m->topo.loops[i], p, v, out + 2 * i);
  for (i = 0; i < m->topo.nextra; i++)
    out[rows + i] = extra_rate(m, &m->topo.extra[i], p, v);
}

/* A chain's terms of one order beyond the Jacobian's (second or third,
 * from two vectors of rates): kli_chain_second or kli_chain_third. */
typedef void (*chain_terms_fn)(const kl_model *m, const kli_chain *ch,
                               const kli_pose *p, const double *x,
                               const double *y, double out[2]);

/* Adds `terms` over every loop row and every extra row: a coupling row is
 * linear (nothing to add), a point row takes its chain's component. */
static void add_terms(const kl_model *m, const kli_pose *p, chain_terms_fn terms,
                      const double *x, const double *y, double *out) {
  int i, rows = 2 * m->topo.nloops;
  for (i = 0; i < m->topo.nloops; i++) {
    double b[2];
    terms(m, &m->topo.loops[i], p, x, y, b);
    out[2 * i] += b[0];
    out[2 * i + 1] += b[1];
  }
  for (i = 0; i < m->topo.nextra; i++) {
    const kli_extra *e = &m->topo.extra[i];
    double b[2];
    if (e->chain.count == 0)
      continue;
    terms(m, &e->chain, p, x, y, b);
    out[rows + i] += b[e->axis];
  }
}

void kli_loops_add_second(const kl_model *m, const kli_pose *p,
                          const double *va, const double *vb, double *out) {
  add_terms(m, p, kli_chain_second, va, vb, out);
}

void kli_loops_add_third(const kl_model *m, const kli_pose *p,
                         const double *v, const double *a, double *out) {
  add_terms(m, p, kli_chain_third, v, a, out);
}

void kli_jacobian_pairs(const kl_model *m, const kli_pose *p, double *pairs) {
  const kli_topology *top = &m->topo;
  int i, k;
  memset(pairs, 0,
         ((size_t)top->nnz_pairs * 2 + (size_t)top->nextra_entries) *
             sizeof *pairs);
  for (i = 0; i < top->nextra; i++)
    extra_jacobian(m, &top->extra[i], p, pairs + 2 * top->nnz_pairs);
  for (i = 0; i < top->nloops; i++) {
    const kli_term *t = top->terms + top->loops[i].first;
    for (k = 0; k < top->loops[i].count; k++, t++) {
      double r[2];
      if (t->joint < 0) {
        if (t->nz_angle < 0)
          continue;
        rotated(t, p, r);
        pairs[2 * t->nz_angle] -= r[1];
        pairs[2 * t->nz_angle + 1] += r[0];
      } else {
        double g[6];
        slide_path(m, t, p, g);
        if (t->nz_slide >= 0) {
          pairs[2 * t->nz_slide] += g[2];
          pairs[2 * t->nz_slide + 1] += g[3];
        }
        if (t->nz_angle >= 0) {
          pairs[2 * t->nz_angle] -= g[1];
          pairs[2 * t->nz_angle + 1] += g[0];
        }
      }
    }
  }
}

void kli_row_directions(const kl_model *m, const double *pairs, double *dir) {
  const kli_topology *t = &m->topo;
  int loop;
  for (loop = 0; loop < t->nloops; loop++) {
    int p = t->loop_lead[loop];
    double x, y, norm;
    if (p < 0)
      continue;
    x = pairs[2 * p];
    y = pairs[2 * p + 1];
    norm = hypot(x, y);
    dir[2 * loop] = norm > 0.0 ? x / norm : 1.0;
    dir[2 * loop + 1] = norm > 0.0 ? y / norm : 0.0;
  }
}

void kli_keep_rows(const kl_model *m, const double *dir, double *rows) {
  const kli_topology *t = &m->topo;
  int loop, e;
  if (t->redundancy == 0)
    return;
  /* each loop's kept rows come at or before its own: in place, in order */
  for (loop = 0; loop < t->nloops; loop++) {
    double x = rows[2 * loop], y = rows[2 * loop + 1];
    int first = t->loop_first_kept[loop];
    if (t->loop_kept[loop] == 2) {
      rows[first] = x;
      rows[first + 1] = y;
    } else if (t->loop_kept[loop] == 1) {
      rows[first] = dir[2 * loop] * x + dir[2 * loop + 1] * y;
    }
  }
  /* the extra rows follow the kept loop rows whole */
  for (e = 0; e < t->nextra; e++)
    rows[t->loop_first_kept[t->nloops] + e] = rows[2 * t->nloops + e];
}

void kli_keep_pairs(const kl_model *m, const double *dir, const double *pairs,
                    double *values) {
  const kli_topology *t = &m->topo;
  int p;
  for (p = 0; p < t->nnz_pairs; p++) {
    int loop = t->nz_row[p] / 2, slot = t->pair_slot[p];
    if (t->loop_kept[loop] == 2) {
      values[slot] = pairs[2 * p];
      values[slot + 1] = pairs[2 * p + 1];
    } else if (t->loop_kept[loop] == 1) {
      values[slot] = dir[2 * loop] * pairs[2 * p] +
                     dir[2 * loop + 1] * pairs[2 * p + 1];
    }
  }
  /* the extra entries close the kept system's singles */
  memcpy(values + 2 * t->nkept_pairs + t->nkept_singles - t->nextra_entries,
         pairs + 2 * t->nnz_pairs,
         (size_t)t->nextra_entries * sizeof *values);
}

double kli_dropped_residual(const kl_model *m, const double *dir,
                            const double *rows, int *loop) {
  const kli_topology *t = &m->topo;
  double worst = 0.0;
  int k;
  *loop = -1;
  for (k = 0; k < t->nloops; k++) {
    double x = rows[2 * k], y = rows[2 * k + 1], r;
    if (t->loop_kept[k] == 2)
      continue;
    r = t->loop_kept[k] == 1
            ? fabs(dir[2 * k] * y - dir[2 * k + 1] * x)
            : fmax(fabs(x), fabs(y));
    if (*loop < 0 || !(r <= worst)) {
      worst = r;
      *loop = k;
    }
  }
  return worst;
}
