/*
 * topology.c - finalize: connectivity, loops (registered or found from a
 * spanning tree), mobility, elimination of locked angles and inputs, the
 * vector chains of loops and points, the rows kept, the Jacobian's
 * sparsity pattern, and the transmission-angle sites (their rule is in
 * loops.c).
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "describe.h"
#include "ordering.h"
#include "reactions.h"

/* Working arrays of one finalize call, carved from one temporary block. */
typedef struct {
  int *adj_start, *adj_joint;       /* joints at each link (CSR) */
  int *tree_joint, *tree_parent;    /* spanning tree from ground */
  int *depth, *bfs;                 /* depth in the tree; visiting order */
  int *group_of;                    /* union-find over angle relations */
  int *group_var;                   /* unknown moving each link's angle */
  int *col_nz;                      /* per unknown: its pair in this loop */
  int *match_row;                   /* matching: unknown -> row */
  int *row_match;                   /* matching: row -> unknown */
  int *seen;
  int *path_a, *path_b;             /* tree paths while finding loops */
  int *loop_joints, *loop_start;    /* loops before they are final */
  int nloops, nloop_joints, cap_loop_joints;
  double *rank_work;
  int *marks;                       /* links + joints: the transmission rule's */
  double *scale_points;             /* 2 per joint end: a link's points */
  int *hull;                        /* 1 per joint end: their convex hull */
} work;

static int union_find(int *parent, int x) {
  while (parent[x] != x) {
    parent[x] = parent[parent[x]];
    x = parent[x];
  }
  return x;
}

static int other_link(const kli_joint *j, int link) {
  return j->link[0] == link ? j->link[1] : j->link[0];
}

static void build_adjacency(const kl_model *m, work *w) {
  int j, l, side;
  memset(w->adj_start, 0, (size_t)(m->nlinks + 1) * sizeof(int));
  for (j = 0; j < m->njoints; j++)
    for (side = 0; side < 2; side++)
      w->adj_start[m->joints[j].link[side] + 1]++;
  for (l = 0; l < m->nlinks; l++)
    w->adj_start[l + 1] += w->adj_start[l];
  for (l = 0; l < m->nlinks; l++)
    w->seen[l] = w->adj_start[l];
  for (j = 0; j < m->njoints; j++)
    for (side = 0; side < 2; side++)
      w->adj_joint[w->seen[m->joints[j].link[side]]++] = j;
}

/* Breadth-first spanning tree from ground; fails on an unreached link. */
static int spanning_tree(kl_model *m, work *w) {
  int head = 0, tail = 0, l, k;
  char la[64];
  for (l = 0; l < m->nlinks; l++) {
    w->tree_joint[l] = -1;
    w->tree_parent[l] = -1;
    w->depth[l] = -1;
  }
  w->depth[KL_GROUND] = 0;
  w->bfs[tail++] = KL_GROUND;
  while (head < tail) {
    int cur = w->bfs[head++];
    for (k = w->adj_start[cur]; k < w->adj_start[cur + 1]; k++) {
      int j = w->adj_joint[k], next = other_link(&m->joints[j], cur);
      if (w->depth[next] >= 0)
        continue;
      w->depth[next] = w->depth[cur] + 1;
      w->tree_joint[next] = j;
      w->tree_parent[next] = cur;
      w->bfs[tail++] = next;
    }
  }
  for (l = 0; l < m->nlinks; l++)
    if (w->depth[l] < 0)
      return kli_fail(m->error, KL_EDISCONNECTED,
                      "finalize: %s is not connected to ground through any "
                      "chain of joints",
                      kli_link_label(m, l, la, sizeof la));
  return KL_OK;
}

static int push_loop_joint(kl_model *m, work *w, int joint) {
  if (kli_reserve(&m->alloc, (void **)&w->loop_joints, &w->cap_loop_joints,
                  w->nloop_joints + 1, sizeof(int)) != KL_OK)
    return KL_ENOMEM;
  w->loop_joints[w->nloop_joints++] = joint;
  return KL_OK;
}

/* The joints from `link` up the tree to `top`, into path; returns the count. */
static int climb(const work *w, int link, int top, int *path) {
  int n = 0;
  while (link != top) {
    path[n++] = w->tree_joint[link];
    link = w->tree_parent[link];
  }
  return n;
}

/* The most terms of loop and tree chains finalize builds for a model: in
 * proportion to its items, with room for any practical linkage (a few
 * thousand links deep in its tree). A model past it (a hostile file's
 * thousands of long loops) is refused rather than allowed to take
 * memory quadratic in its size. */
static long term_budget(const kl_model *m) {
  return KLI_TERMS_PER_ITEM *
             ((long)m->nlinks + (long)m->njoints + (long)m->npoints) +
         KLI_TERMS_FLOOR;
}

static int too_large(kl_model *m, long terms) {
  return kli_fail(m->error, KL_ETOOLARGE,
                  "finalize: the loops and the paths from ground to every "
                  "link and point need more than %ld terms (%ld and counting "
                  "for %d links, %d joints, %d points): the model is too "
                  "large or too deep for kinloop",
                  term_budget(m), terms, m->nlinks, m->njoints, m->npoints);
}

/* One fundamental cycle per joint outside the tree: the chord from a to b,
 * then the tree path from b up to the common ancestor and down to a. */
static int find_loops(kl_model *m, work *w) {
  int j, i;
  w->nloops = 0;
  w->nloop_joints = 0;
  for (j = 0; j < m->njoints; j++) {
    int a = m->joints[j].link[0], b = m->joints[j].link[1], top_a, top_b;
    int na, nb;
    if (w->tree_joint[b] == j || w->tree_joint[a] == j)
      continue;
    for (top_a = a, top_b = b; top_a != top_b;) {
      if (w->depth[top_a] >= w->depth[top_b])
        top_a = w->tree_parent[top_a];
      else
        top_b = w->tree_parent[top_b];
    }
    nb = climb(w, b, top_b, w->path_b);
    na = climb(w, a, top_a, w->path_a);
    if (2L * ((long)w->nloop_joints + na + nb + 1) > term_budget(m))
      return too_large(m, 2L * ((long)w->nloop_joints + na + nb + 1));
    w->loop_start[w->nloops] = w->nloop_joints;
    if (push_loop_joint(m, w, j) != KL_OK)
      return kli_fail(m->error, KL_ENOMEM, "finalize: out of memory");
    for (i = 0; i < nb; i++)
      if (push_loop_joint(m, w, w->path_b[i]) != KL_OK)
        return kli_fail(m->error, KL_ENOMEM, "finalize: out of memory");
    for (i = na - 1; i >= 0; i--)
      if (push_loop_joint(m, w, w->path_a[i]) != KL_OK)
        return kli_fail(m->error, KL_ENOMEM, "finalize: out of memory");
    w->nloops++;
  }
  w->loop_start[w->nloops] = w->nloop_joints;
  return KL_OK;
}

/* Rank of the registered loops' signed joint-incidence rows. A cycle is
 * fixed by its signed use of the chords (the joints outside the spanning
 * tree: each fundamental cycle holds one), so the rank over the chord
 * columns alone is the rank: a nloops x nloops matrix, whatever the
 * number of joints. */
static int loop_rank(const kl_model *m, work *w, int nloops) {
  int rows = nloops, cols = nloops, r, c, rank = 0, i, k, j, chord = 0;
  double *a = w->rank_work;
  int *column = w->match_row; /* chord joint -> column, -1 for tree joints */
  for (j = 0; j < m->njoints; j++) {
    int a0 = m->joints[j].link[0], b0 = m->joints[j].link[1];
    column[j] = w->tree_joint[a0] == j || w->tree_joint[b0] == j ? -1
                                                                 : chord++;
  }
  memset(a, 0, (size_t)rows * (size_t)cols * sizeof(double));
  for (r = 0; r < rows; r++) {
    int n = m->reg_start[r + 1] - m->reg_start[r];
    const int *js = m->reg_joints + m->reg_start[r];
    int before;
    kli_loop_links(m, n, js, w->seen);
    before = w->seen[n - 1];
    for (i = 0; i < n; i++) {
      if (column[js[i]] >= 0)
        a[r * cols + column[js[i]]] =
            m->joints[js[i]].link[0] == before ? 1.0 : -1.0;
      before = w->seen[i];
    }
  }
  /* entries start at +-1 and stay moderate rationals: a pivot below 1e-9
   * is a rounded zero */
  for (c = 0; c < cols && rank < rows; c++) {
    int piv = -1;
    double best = 1e-9;
    for (r = rank; r < rows; r++)
      if (fabs(a[r * cols + c]) > best) {
        best = fabs(a[r * cols + c]);
        piv = r;
      }
    if (piv < 0)
      continue;
    for (k = 0; k < cols; k++) {
      double t = a[piv * cols + k];
      a[piv * cols + k] = a[rank * cols + k];
      a[rank * cols + k] = t;
    }
    for (r = rank + 1; r < rows; r++) {
      double f = a[r * cols + c] / a[rank * cols + c];
      if (f != 0.0)
        for (k = c; k < cols; k++)
          a[r * cols + k] -= f * a[rank * cols + k];
    }
    rank++;
  }
  return rank;
}

static int registered_loops(kl_model *m, work *w, int expected) {
  int rank;
  if (m->nreg_loops != expected)
    return kli_fail(m->error, KL_ELOOPSET,
                    "finalize: %d loop%s registered, but the model has %d "
                    "independent loops (%d joints - %d links + 1); register "
                    "all of them or none",
                    m->nreg_loops, m->nreg_loops == 1 ? " is" : "s are",
                    expected, m->njoints, m->nlinks);
  rank = loop_rank(m, w, m->nreg_loops);
  if (rank < m->nreg_loops)
    return kli_fail(m->error, KL_ELOOPSET,
                    "finalize: the %d registered loops are not independent: "
                    "only %d of them are (a loop is a combination of "
                    "others)",
                    m->nreg_loops, rank);
  w->nloops = m->nreg_loops;
  w->nloop_joints = 0;
  return KL_OK;
}

/* Gruebler's criterion with higher pairs: a slot joint and each coupling
 * (a gear mesh, a rack, a belt) take one freedom, a lower pair two. */
static int mobility(kl_model *m, int *dof) {
  int lower = 0, slots = 0, j, count;
  for (j = 0; j < m->njoints; j++) {
    if (kli_is_pin_slot(m->joints[j].kind))
      slots++;
    else
      lower++;
  }
  count = 3 * (m->nlinks - 1) - 2 * lower - slots - m->ncouplings;
  *dof = count + m->redundancy;
  if (*dof < 0)
    return kli_fail(m->error, KL_EOVERCONSTRAINED,
                    "finalize: over-constrained: Gruebler's count gives "
                    "mobility %d (3 x %d moving links - 2 x %d revolute and "
                    "prismatic joints - %d slot joints - %d couplings)%s",
                    count, m->nlinks - 1, lower, slots, m->ncouplings,
                    m->redundancy > 0 ? ", below zero even with the "
                                        "redundant constraints declared"
                                      : "");
  if (*dof != m->ninputs) {
    char declared[96] = "";
    if (m->redundancy > 0)
      snprintf(declared, sizeof declared,
               " (Gruebler's count %d plus %d redundant constraint%s "
               "declared)",
               count, m->redundancy, m->redundancy == 1 ? "" : "s");
    return kli_fail(m->error, KL_EDOF,
                    "finalize: the model has %d degree%s of freedom%s but %d "
                    "input%s; give exactly one input per degree of freedom",
                    *dof, *dof == 1 ? "" : "s", declared, m->ninputs,
                    m->ninputs == 1 ? "" : "s");
  }
  return KL_OK;
}

/* A joint fixes b's angle against a's: a prismatic lock or a revolute input. */
static int relates_angles(const kl_model *m, int joint) {
  int kind = m->joints[joint].kind;
  return kind == KL_JOINT_PRISMATIC ||
         (kind == KL_JOINT_REVOLUTE && kli_input_of(m, joint) >= 0);
}

/*
 * Groups links whose angles differ by known amounts and lists, for each, how
 * its angle follows from its group's representative (ground, or the group's
 * lowest id). Fills angle_parent/input/sign/order and group_var.
 */
static int angle_groups(kl_model *m, work *w, kli_topology *t) {
  int j, l, head, tail, nvars = 0;
  char la[64], lb[64], lj[160];
  for (l = 0; l < m->nlinks; l++)
    w->group_of[l] = l;
  for (j = 0; j < m->njoints; j++) {
    int ra, rb;
    if (!relates_angles(m, j))
      continue;
    ra = union_find(w->group_of, m->joints[j].link[0]);
    rb = union_find(w->group_of, m->joints[j].link[1]);
    if (ra == rb)
      return kli_fail(m->error, KL_EOVERCONSTRAINED,
                      "finalize: over-constrained: %s fixes the angle of %s "
                      "against %s, which other prismatic joints or revolute "
                      "inputs already fix",
                      kli_joint_label(m, j, lj, sizeof lj),
                      kli_link_label(m, m->joints[j].link[1], la, sizeof la),
                      kli_link_label(m, m->joints[j].link[0], lb, sizeof lb));
    /* the lower id becomes the root, so ground roots its group */
    if (ra < rb)
      w->group_of[rb] = ra;
    else
      w->group_of[ra] = rb;
  }
  for (l = 0; l < m->nlinks; l++) {
    t->angle_parent[l] = -1;
    t->angle_input[l] = -1;
    t->angle_sign[l] = 0.0;
    t->angle_var[l] = -1;
    w->seen[l] = 0;
  }
  /* breadth-first over the relating joints, from each group's root */
  tail = 0;
  for (l = 0; l < m->nlinks; l++) {
    if (union_find(w->group_of, l) != l)
      continue;
    if (l != KL_GROUND)
      t->angle_var[l] = nvars++;
    w->seen[l] = 1;
    head = tail;
    t->angle_order[tail++] = l;
    while (head < tail) {
      int cur = t->angle_order[head++], k;
      for (k = w->adj_start[cur]; k < w->adj_start[cur + 1]; k++) {
        int jj = w->adj_joint[k];
        int next = other_link(&m->joints[jj], cur);
        if (!relates_angles(m, jj) || w->seen[next])
          continue;
        w->seen[next] = 1;
        t->angle_parent[next] = cur;
        t->angle_input[next] =
            m->joints[jj].kind == KL_JOINT_REVOLUTE ? kli_input_of(m, jj) : -1;
        t->angle_sign[next] = m->joints[jj].link[0] == cur ? 1.0 : -1.0;
        t->angle_order[tail++] = next;
      }
    }
  }
  for (l = 0; l < m->nlinks; l++) {
    w->group_var[l] = t->angle_var[union_find(w->group_of, l)];
    t->coord_var[l] = w->group_var[l];
  }
  for (j = 0; j < m->njoints; j++) {
    t->slide_var[j] = -1;
    t->slide_input[j] = -1;
    if (!kli_is_sliding(m->joints[j].kind))
      continue;
    t->slide_input[j] = kli_input_of(m, j);
    if (t->slide_input[j] < 0)
      t->slide_var[j] = nvars++;
  }
  for (j = 0; j < m->njoints; j++)
    t->coord_var[m->nlinks + j] = t->slide_var[j];
  for (j = 0; j < m->npoint_inputs; j++)
    t->coord_var[m->nlinks + m->njoints + j] = -1; /* an input's value */
  t->nvars = nvars;
  return KL_OK;
}

static void fill_var_coords(const kl_model *m, kli_topology *t) {
  int l, j;
  for (l = 0; l < m->nlinks; l++)
    if (t->angle_var[l] >= 0)
      t->var_coord[t->angle_var[l]] = l;
  for (j = 0; j < m->njoints; j++)
    if (t->slide_var[j] >= 0)
      t->var_coord[t->slide_var[j]] = m->nlinks + j;
}

/* Zero vectors are kept: they add nothing to the position or the Jacobian,
 * but a dimension moving one end of them does. */
static void push_link_term(const kl_model *m, kli_topology *t, int link,
                           int from_joint, int to_joint, const double *end) {
  static const double origin[2] = {0.0, 0.0};
  const double *from =
      from_joint < 0 ? origin : kli_joint_point_on(m, from_joint, link);
  const double *to = to_joint < 0 ? end : kli_joint_point_on(m, to_joint, link);
  kli_term *term = &t->terms[t->nterms++];
  term->link = link;
  term->joint = -1;
  term->from_joint = from_joint;
  term->to_joint = to_joint;
  term->v[0] = to[0] - from[0];
  term->v[1] = to[1] - from[1];
  term->sign = 0.0;
  term->nz_angle = term->nz_slide = -1;
}

/* The slide term of crossing `joint` when arriving on link `from`. */
static void push_crossing(const kl_model *m, kli_topology *t, int joint,
                          int from) {
  const kli_joint *j = &m->joints[joint];
  kli_term *term;
  if (!kli_is_sliding(j->kind))
    return;
  term = &t->terms[t->nterms++];
  term->link = j->link[0];
  term->joint = joint;
  term->from_joint = term->to_joint = -1;
  term->v[0] = term->v[1] = 0.0;
  term->sign = from == j->link[0] ? 1.0 : -1.0;
  term->nz_angle = term->nz_slide = -1;
}

static void build_loop_chain(const kl_model *m, kli_topology *t, int loop) {
  int first = t->loop_joint_start[loop];
  int n = t->loop_joint_start[loop + 1] - first, i;
  const int *js = t->loop_joints + first, *ls = t->loop_links + first;
  t->loops[loop].first = t->nterms;
  for (i = 0; i < n; i++) {
    int before = ls[(i + n - 1) % n], link = ls[i];
    push_crossing(m, t, js[i], before);
    push_link_term(m, t, link, js[i], js[(i + 1) % n], NULL);
  }
  t->loops[loop].count = t->nterms - t->loops[loop].first;
}

/* The chain from the global origin down the spanning tree to `at` on `link`. */
static void build_path_chain(const kl_model *m, work *w, kli_topology *t,
                             int link, const double *at, kli_chain *chain) {
  int n = climb(w, link, KL_GROUND, w->path_a), i;
  int cur = KL_GROUND, from_joint = -1;
  chain->first = t->nterms;
  /* path_a lists the tree joints from `link` up; walk them downward */
  for (i = n - 1; i >= 0; i--) {
    int joint = w->path_a[i];
    push_link_term(m, t, cur, from_joint, joint, NULL);
    push_crossing(m, t, joint, cur);
    cur = other_link(&m->joints[joint], cur);
    from_joint = joint;
  }
  push_link_term(m, t, cur, from_joint, -1, at);
  chain->count = t->nterms - chain->first;
}

/* Pairs of Jacobian entries, one per loop and unknown the loop touches. */
static void build_pattern(work *w, kli_topology *t) {
  int loop, k, v;
  t->nnz_pairs = 0;
  for (v = 0; v < t->nvars; v++)
    w->col_nz[v] = -1;
  for (loop = 0; loop < t->nloops; loop++) {
    const kli_chain *c = &t->loops[loop];
    for (k = c->first; k < c->first + c->count; k++) {
      kli_term *term = &t->terms[k];
      int cols[2], *slots[2], i;
      /* a zero vector does not turn with its link */
      cols[0] = term->joint < 0 && term->v[0] == 0.0 && term->v[1] == 0.0
                    ? -1
                    : w->group_var[term->link];
      cols[1] = term->joint >= 0 ? t->slide_var[term->joint] : -1;
      slots[0] = &term->nz_angle;
      slots[1] = &term->nz_slide;
      for (i = 0; i < 2; i++) {
        if (cols[i] < 0)
          continue;
        if (w->col_nz[cols[i]] < 0) {
          w->col_nz[cols[i]] = t->nnz_pairs;
          t->nz_row[t->nnz_pairs] = 2 * loop;
          t->nz_col[t->nnz_pairs] = cols[i];
          t->nnz_pairs++;
        }
        *slots[i] = w->col_nz[cols[i]];
      }
    }
    for (k = c->first; k < c->first + c->count; k++) {
      const kli_term *term = &t->terms[k];
      if (w->group_var[term->link] >= 0)
        w->col_nz[w->group_var[term->link]] = -1; /* reset for the next loop */
      if (term->joint >= 0 && t->slide_var[term->joint] >= 0)
        w->col_nz[t->slide_var[term->joint]] = -1;
    }
  }
}

/* ---- extra rows: couplings and point inputs ---- */

/* The coordinate a sketch gives: a link's sketch angle, a joint's slide. */
static double sketch_coord(const kl_model *m, int coord) {
  if (coord < m->nlinks)
    return m->links[coord].has_sketch ? m->links[coord].sketch : 0.0;
  return m->joints[coord - m->nlinks].has_sketch
             ? m->joints[coord - m->nlinks].sketch
             : 0.0;
}

static void add_coef(kli_extra *e, int coord, double coef) {
  int k;
  for (k = 0; k < e->ncoef; k++)
    if (e->coord[k] == coord) {
      e->coef[k] += coef;
      return;
    }
  e->coord[e->ncoef] = coord;
  e->coef[e->ncoef++] = coef;
}

/* coef times the joint's coordinate: angle(b) - angle(a), or its slide. */
static void add_joint_coef(const kl_model *m, kli_extra *e, int joint,
                           double coef) {
  const kli_joint *j = &m->joints[joint];
  if (j->kind == KL_JOINT_REVOLUTE) {
    add_coef(e, j->link[1], coef);
    add_coef(e, j->link[0], -coef);
  } else {
    add_coef(e, m->nlinks + joint, coef);
  }
}

/* +1 when joint's coordinate is its other link's angle against `carrier`
 * (carrier is link a), -1 when carrier is link b. */
static double against(const kl_model *m, int joint, int carrier) {
  return m->joints[joint].link[0] == carrier ? 1.0 : -1.0;
}

/* The linear part of a coupling's row, in length units: a gear pair
 * r1 dphi1 +- r2 dphi2, a rack ds - r dphi, a ratio coupling
 * dq2 - ratio dq1 (times the model's scale when q2 is an angle). */
static void coupling_row(const kl_model *m, const kli_coupling *c,
                         double scale, kli_extra *e) {
  int k;
  e->ncoef = 0;
  if (c->kind == KL_COUPLING_GEAR) {
    add_joint_coef(m, e, c->joint[0],
                   c->value[0] * against(m, c->joint[0], c->carrier));
    add_joint_coef(m, e, c->joint[1],
                   (c->internal ? -1.0 : 1.0) * c->value[1] *
                       against(m, c->joint[1], c->carrier));
  } else if (c->kind == KL_COUPLING_RACK) {
    add_joint_coef(m, e, c->joint[1], 1.0);
    add_joint_coef(m, e, c->joint[0],
                   -c->value[0] * against(m, c->joint[0], c->carrier));
  } else {
    double weight =
        m->joints[c->joint[1]].kind == KL_JOINT_REVOLUTE ? scale : 1.0;
    add_joint_coef(m, e, c->joint[1], weight);
    add_joint_coef(m, e, c->joint[0], -weight * c->value[0]);
  }
  e->offset = 0.0;
  for (k = 0; k < e->ncoef; k++)
    e->offset += e->coef[k] * sketch_coord(m, e->coord[k]);
}

/* The entry of extra row `row` in column `col`, made on first use (col_nz
 * maps columns to this row's entries until reset). */
static int extra_entry(work *w, kli_topology *t, int row, int col) {
  if (col < 0)
    return -1;
  if (w->col_nz[col] < 0) {
    w->col_nz[col] = t->nextra_entries;
    t->extra_entry_row[t->nextra_entries] = row;
    t->extra_entry_col[t->nextra_entries++] = col;
  }
  return w->col_nz[col];
}

static void build_extra_rows(const kl_model *m, work *w, kli_topology *t) {
  int e, k, first;
  t->nextra_entries = 0;
  for (e = 0; e < t->nextra; e++) {
    kli_extra *x = &t->extra[e];
    first = t->nextra_entries;
    memset(x, 0, sizeof *x);
    x->input = -1;
    if (e < m->ncouplings) {
      coupling_row(m, &m->couplings[e], t->scale, x);
      for (k = 0; k < x->ncoef; k++)
        x->entry[k] = extra_entry(w, t, e, t->coord_var[x->coord[k]]);
    } else {
      const kli_point_input *pi = &m->point_inputs[e - m->ncouplings];
      const kli_point *pt = &m->points[pi->point];
      x->axis = pi->axis;
      x->input = pi->input;
      x->ncoef = 1;
      x->coord[0] = m->nlinks + m->njoints + (e - m->ncouplings);
      x->coef[0] = -1.0;
      x->entry[0] = -1;
      build_path_chain(m, w, t, pt->link, pt->at, &x->chain);
      for (k = x->chain.first; k < x->chain.first + x->chain.count; k++) {
        kli_term *term = &t->terms[k];
        int zero = term->joint < 0 && term->v[0] == 0.0 && term->v[1] == 0.0;
        term->nz_angle =
            zero ? -1 : extra_entry(w, t, e, w->group_var[term->link]);
        term->nz_slide = term->joint >= 0
                             ? extra_entry(w, t, e, t->slide_var[term->joint])
                             : -1;
      }
    }
    for (k = first; k < t->nextra_entries; k++)
      w->col_nz[t->extra_entry_col[k]] = -1; /* reset for the next row */
  }
}

/* Augmenting path for unknown `col` in the bipartite graph unknown -> rows. */
static int augment(const kli_topology *t, work *w, int col, int stamp) {
  int p, side;
  for (p = 0; p < t->nnz_pairs; p++) {
    if (t->nz_col[p] != col)
      continue;
    for (side = 0; side < 2; side++) {
      int row = t->nz_row[p] + side;
      if (w->seen[row] == stamp)
        continue;
      w->seen[row] = stamp;
      if (w->row_match[row] < 0 ||
          augment(t, w, w->row_match[row], stamp)) {
        w->row_match[row] = col;
        w->match_row[col] = row;
        return 1;
      }
    }
  }
  for (p = 0; p < t->nextra_entries; p++) {
    int row = 2 * t->nloops + t->extra_entry_row[p];
    if (t->extra_entry_col[p] != col || w->seen[row] == stamp)
      continue;
    w->seen[row] = stamp;
    if (w->row_match[row] < 0 || augment(t, w, w->row_match[row], stamp)) {
      w->row_match[row] = col;
      w->match_row[col] = row;
      return 1;
    }
  }
  return 0;
}

/* A link with two or more joints, all at one point of it. */
static int is_zero_length(const kl_model *m, const work *w, int link) {
  int k, n = w->adj_start[link + 1] - w->adj_start[link];
  const double *p0;
  if (n < 2)
    return 0;
  p0 = kli_joint_point_on(m, w->adj_joint[w->adj_start[link]], link);
  for (k = w->adj_start[link] + 1; k < w->adj_start[link + 1]; k++) {
    const double *p = kli_joint_point_on(m, w->adj_joint[k], link);
    if (p[0] != p0[0] || p[1] != p0[1])
      return 0;
  }
  return 1;
}

/* A moving link joined only by revolute joints that all stand at one point
 * of it carries nothing from one joint to the next: a crank whose pins
 * coincide drives nothing, whatever its input does. (A slider block's pin
 * on its slide point is no such link: its prismatic or slot joint carries
 * the motion.) */
static int pinned_at_one_point(kl_model *m, const work *w) {
  int l, k;
  char la[64];
  for (l = 1; l < m->nlinks; l++) {
    const double *at;
    if (!is_zero_length(m, w, l))
      continue;
    for (k = w->adj_start[l]; k < w->adj_start[l + 1]; k++)
      if (m->joints[w->adj_joint[k]].kind != KL_JOINT_REVOLUTE)
        break;
    if (k < w->adj_start[l + 1])
      continue;
    at = kli_joint_point_on(m, w->adj_joint[w->adj_start[l]], l);
    return kli_fail(m->error, KL_EZEROLENGTH,
                    "finalize: %s has zero length: its %d revolute joints "
                    "all stand at (%g, %g) of it, so it carries no motion "
                    "from one to the next; give the joints their distinct "
                    "attachment points",
                    kli_link_label(m, l, la, sizeof la),
                    w->adj_start[l + 1] - w->adj_start[l], at[0], at[1]);
  }
  return KL_OK;
}

/* Every unknown must be matched to its own equation row, or the Jacobian is
 * singular whatever the geometry. */
static int structural_check(kl_model *m, work *w, const kli_topology *t) {
  int v, r, l;
  char la[64], lj[160];
  for (r = 0; r < 2 * t->nloops + t->nextra; r++) {
    w->row_match[r] = -1;
    w->seen[r] = -1;
  }
  for (v = 0; v < t->nvars; v++) {
    int coord = t->var_coord[v];
    w->match_row[v] = -1;
    if (augment(t, w, v, v))
      continue;
    if (coord < m->nlinks) {
      for (l = 0; l < m->nlinks; l++)
        if (w->group_var[l] == v && is_zero_length(m, w, l))
          return kli_fail(m->error, KL_EZEROLENGTH,
                          "finalize: %s has zero length: all its joints are "
                          "at one point of it, so its angle is undetermined",
                          kli_link_label(m, l, la, sizeof la));
      return kli_fail(m->error, KL_EUNDETERMINED,
                      "finalize: the angle of %s is not determined by any "
                      "loop equation; give it an input or close a loop "
                      "through it",
                      kli_link_label(m, coord, la, sizeof la));
    }
    return kli_fail(m->error, KL_EUNDETERMINED,
                    "finalize: the slide of %s is not determined by any loop "
                    "equation; make it an input or close a loop through it",
                    kli_joint_label(m, coord - m->nlinks, lj, sizeof lj));
  }
  return KL_OK;
}

/* The extra rows stay whole after the kept loop rows: their entries follow
 * the kept system's singles. */
static void keep_extra_entries(kli_topology *t) {
  int e, first = t->loop_first_kept[t->nloops];
  for (e = 0; e < t->nextra_entries; e++) {
    t->kept_single_row[t->nkept_singles + e] = first + t->extra_entry_row[e];
    t->kept_single_col[t->nkept_singles + e] = t->extra_entry_col[e];
  }
  t->nkept_singles += t->nextra_entries;
}

/* The coupling or point input behind extra row e, for a message. */
static const char *extra_label(const kl_model *m, int e, char *buf,
                               size_t n) {
  if (e < m->ncouplings)
    return kli_index_label("coupling", e, buf, n);
  return kli_input_label(m, m->point_inputs[e - m->ncouplings].input, buf, n);
}

/* With redundancy, the matching may leave an extra row out; the declared
 * redundancy must lie in the loops, so that is refused. */
static int extra_rows_matched(kl_model *m, const work *w,
                              const kli_topology *t) {
  int e;
  char label[KLI_LABEL_SIZE];
  for (e = 0; e < t->nextra; e++)
    if (w->row_match[2 * t->nloops + e] < 0)
      return kli_fail(m->error, KL_EOVERCONSTRAINED,
                      "finalize: over-constrained: %s repeats what the "
                      "loops and the other rows already fix; the declared "
                      "redundancy must lie in the loops",
                      extra_label(m, e, label, sizeof label));
  return KL_OK;
}

/*
 * The rows the structural matching leaves unmatched, one per redundant
 * constraint, leave the Newton system: per loop, how many rows stay, and
 * for a loop that keeps one, the nz pair of the unknown matched to it (the
 * kept row is the loop's component along that unknown's column). The kept
 * system's pattern follows: the nz pairs of loops keeping both rows, and
 * one single entry per nz pair of a loop keeping one.
 */
static void keep_rows(const work *w, kli_topology *t) {
  int loop, p, kept = 0, pairs = 0, singles = 0;
  for (loop = 0; loop < t->nloops; loop++) {
    int x = w->row_match[2 * loop] >= 0, y = w->row_match[2 * loop + 1] >= 0;
    t->loop_kept[loop] = x + y;
    t->loop_first_kept[loop] = kept;
    t->loop_lead[loop] = -1;
    kept += x + y;
  }
  t->loop_first_kept[t->nloops] = kept;
  if (t->redundancy == 0) {
    t->nkept_pairs = t->nnz_pairs;
    t->nkept_singles = 0;
    t->kept_pair_row = t->nz_row;
    t->kept_pair_col = t->nz_col;
    keep_extra_entries(t);
    return;
  }
  for (p = 0; p < t->nnz_pairs; p++)
    pairs += t->loop_kept[t->nz_row[p] / 2] == 2;
  t->nkept_pairs = pairs;
  pairs = 0;
  for (p = 0; p < t->nnz_pairs; p++) {
    int at = t->nz_row[p] / 2, row = t->loop_first_kept[at];
    t->pair_slot[p] = -1;
    if (t->loop_kept[at] == 2) {
      t->pair_slot[p] = 2 * pairs;
      t->kept_pair_row[pairs] = row;
      t->kept_pair_col[pairs++] = t->nz_col[p];
    } else if (t->loop_kept[at] == 1) {
      int matched = w->row_match[t->nz_row[p]] >= 0 ? w->row_match[t->nz_row[p]]
                                                     : w->row_match[t->nz_row[p] + 1];
      if (t->nz_col[p] == matched)
        t->loop_lead[at] = p;
      t->pair_slot[p] = 2 * t->nkept_pairs + singles;
      t->kept_single_row[singles] = row;
      t->kept_single_col[singles++] = t->nz_col[p];
    }
  }
  t->nkept_singles = singles;
  keep_extra_entries(t);
}

/* The band-reducing ordering of the kept system, over the loops. */
static int order_loops(kl_model *m, kli_topology *t) {
  int n = t->nvars, ne = t->nkept_pairs + t->nkept_singles, loop, r, e, st;
  int ngroups = t->nloops + t->nextra;
  size_t bytes = (size_t)(n + 2 * ne + ngroups + 2) * sizeof(int);
  int *scratch = kli_alloc(&m->alloc, bytes), *row_group, *entry_row, *entry_col;
  int *group_start;
  kli_block_pattern bp;
  if (scratch == NULL)
    return KL_ENOMEM;
  row_group = scratch;
  entry_row = row_group + n;
  entry_col = entry_row + ne;
  group_start = entry_col + ne;
  /* each loop's kept rows a group, each extra row a group of its own */
  for (loop = 0; loop <= t->nloops; loop++)
    group_start[loop] = t->loop_first_kept[loop];
  for (e = 1; e <= t->nextra; e++)
    group_start[t->nloops + e] = t->loop_first_kept[t->nloops] + e;
  for (loop = 0; loop < ngroups; loop++)
    for (r = group_start[loop]; r < group_start[loop + 1]; r++)
      row_group[r] = loop;
  for (e = 0; e < t->nkept_pairs; e++) {
    entry_row[e] = t->kept_pair_row[e];
    entry_col[e] = t->kept_pair_col[e];
  }
  for (e = 0; e < t->nkept_singles; e++) {
    entry_row[t->nkept_pairs + e] = t->kept_single_row[e];
    entry_col[t->nkept_pairs + e] = t->kept_single_col[e];
  }
  bp.ngroups = ngroups;
  bp.group_start = group_start;
  bp.row_group = row_group;
  bp.nentries = ne;
  bp.entry_row = entry_row;
  bp.entry_col = entry_col;
  bp.ncols = n;
  st = kli_band_order(&m->alloc, &bp, t->band_row, t->band_col,
                      &t->band_lower, &t->band_upper);
  kli_free(&m->alloc, scratch, bytes);
  return st;
}

/* Links with more joints than this have their farthest pair found on the
 * convex hull: every pair checked would make finalize quadratic in a
 * link's joints (a ground carrying 10^5 pivots). */
#define KLI_SCALE_ALL_PAIRS 32

static double distance(const double *p, const double *q) {
  return hypot(p[0] - q[0], p[1] - q[1]);
}

static int by_x_then_y(const void *a, const void *b) {
  const double *p = a, *q = b;
  if (p[0] != q[0])
    return p[0] < q[0] ? -1 : 1;
  return p[1] < q[1] ? -1 : p[1] > q[1];
}

/* Twice the signed area of triangle o, a, b (> 0 counter-clockwise). */
static double turn(const double *o, const double *a, const double *b) {
  return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);
}

/* The largest distance between n points (x, y pairs, sorted here): the
 * convex hull by the monotone chain, then its antipodal pairs by rotating
 * calipers (Shamos; from memory). The farthest pair is a pair of hull
 * vertices, so the result is the all-pairs maximum to the bit. */
static double diameter(double *pts, int n, int *hull) {
  int h = 0, k, i, j, lower;
  double best = 0.0;
  qsort(pts, (size_t)n, 2 * sizeof *pts, by_x_then_y);
  for (k = 0; k < n; k++) { /* lower hull */
    while (h >= 2 && turn(pts + 2 * hull[h - 2], pts + 2 * hull[h - 1],
                          pts + 2 * k) <= 0)
      h--;
    hull[h++] = k;
  }
  lower = h + 1;
  for (k = n - 2; k >= 0; k--) { /* upper hull */
    while (h >= lower && turn(pts + 2 * hull[h - 2], pts + 2 * hull[h - 1],
                              pts + 2 * k) <= 0)
      h--;
    hull[h++] = k;
  }
  h--; /* the first point closes the chain */
  if (h < 3) {
    for (i = 0; i < h; i++)
      for (j = i + 1; j < h; j++)
        best = fmax(best, distance(pts + 2 * hull[i], pts + 2 * hull[j]));
    return best;
  }
  for (i = 0, j = 1; i < h; i++) {
    const double *a = pts + 2 * hull[i], *b = pts + 2 * hull[(i + 1) % h];
    while (turn(a, b, pts + 2 * hull[(j + 1) % h]) >
           turn(a, b, pts + 2 * hull[j]))
      j = (j + 1) % h;
    best = fmax(best, fmax(distance(a, pts + 2 * hull[j]),
                           distance(b, pts + 2 * hull[j])));
  }
  return best;
}

static double model_scale(const kl_model *m, const work *w) {
  double scale = 0.0;
  int l, i, k;
  for (l = 0; l < m->nlinks; l++) {
    int first = w->adj_start[l], n = w->adj_start[l + 1] - first;
    if (n > KLI_SCALE_ALL_PAIRS) {
      for (i = 0; i < n; i++)
        memcpy(w->scale_points + 2 * i,
               kli_joint_point_on(m, w->adj_joint[first + i], l),
               2 * sizeof(double));
      scale = fmax(scale, diameter(w->scale_points, n, w->hull));
      continue;
    }
    for (i = first; i < first + n; i++)
      for (k = i + 1; k < first + n; k++) {
        double d = distance(kli_joint_point_on(m, w->adj_joint[i], l),
                            kli_joint_point_on(m, w->adj_joint[k], l));
        if (d > scale)
          scale = d;
      }
  }
  return scale > 0.0 ? scale : 1.0;
}

static void *carve_work(const kl_model *m, work *w, kli_carver *c) {
  int nl = m->nlinks, nj = m->njoints;
  /* rows of the loop equations, at most 2 (J-N+1), and the extra rows */
  int rows = 2 * (nj + 1) + m->ncouplings + m->npoint_inputs;
  size_t rank = (size_t)(m->nreg_loops > 0 ? m->nreg_loops : 1) *
                (size_t)(m->nreg_loops > 0 ? m->nreg_loops : 1);
  int big = nl + nj + rows + 1;
  w->adj_start = kli_carve(c, (size_t)nl + 1, sizeof(int));
  w->adj_joint = kli_carve(c, 2 * (size_t)nj, sizeof(int));
  w->tree_joint = kli_carve(c, (size_t)nl, sizeof(int));
  w->tree_parent = kli_carve(c, (size_t)nl, sizeof(int));
  w->depth = kli_carve(c, (size_t)nl, sizeof(int));
  w->bfs = kli_carve(c, (size_t)nl, sizeof(int));
  w->group_of = kli_carve(c, (size_t)nl, sizeof(int));
  w->group_var = kli_carve(c, (size_t)nl, sizeof(int));
  w->col_nz = kli_carve(c, (size_t)big, sizeof(int));
  w->match_row = kli_carve(c, (size_t)big, sizeof(int));
  w->row_match = kli_carve(c, (size_t)big, sizeof(int));
  w->seen = kli_carve(c, (size_t)big, sizeof(int));
  w->path_a = kli_carve(c, (size_t)nl, sizeof(int));
  w->path_b = kli_carve(c, (size_t)nl, sizeof(int));
  w->loop_start = kli_carve(c, (size_t)nj + 2, sizeof(int));
  w->rank_work = kli_carve(c, rank, sizeof(double));
  w->marks = kli_carve(c, (size_t)(nl + nj), sizeof(int));
  w->scale_points = kli_carve(c, 4 * (size_t)nj, sizeof(double));
  w->hull = kli_carve(c, 2 * (size_t)nj + 1, sizeof(int));
  return c->base;
}

/* Arrays of the topology, sized from the loops and the tree. */
static void carve_topology(const kl_model *m, const work *w, kli_topology *t,
                           kli_carver *c, int nterm_bound, int nextra_bound) {
  int nvars = m->nlinks + m->njoints; /* a bound: the count comes later */
  int nl = m->nlinks, nj = m->njoints, nlj = w->loop_start[w->nloops];
  t->loop_joint_start = kli_carve(c, (size_t)w->nloops + 1, sizeof(int));
  t->loop_joints = kli_carve(c, (size_t)nlj, sizeof(int));
  t->loop_links = kli_carve(c, (size_t)nlj, sizeof(int));
  t->loops = kli_carve(c, (size_t)w->nloops, sizeof(kli_chain));
  t->points = kli_carve(c, (size_t)m->npoints, sizeof(kli_chain));
  t->origins = kli_carve(c, (size_t)nl, sizeof(kli_chain));
  t->terms = kli_carve(c, (size_t)nterm_bound, sizeof(kli_term));
  t->var_coord = kli_carve(c, (size_t)nvars, sizeof(int));
  t->angle_var = kli_carve(c, (size_t)nl, sizeof(int));
  t->angle_parent = kli_carve(c, (size_t)nl, sizeof(int));
  t->angle_input = kli_carve(c, (size_t)nl, sizeof(int));
  t->angle_order = kli_carve(c, (size_t)nl, sizeof(int));
  t->angle_sign = kli_carve(c, (size_t)nl, sizeof(double));
  t->slide_var = kli_carve(c, (size_t)nj, sizeof(int));
  t->slide_input = kli_carve(c, (size_t)nj, sizeof(int));
  t->coord_var = kli_carve(c, (size_t)(nl + nj + m->npoint_inputs),
                          sizeof(int));
  /* a loop term touches at most two unknowns */
  t->nz_row = kli_carve(c, (size_t)nlj * 4, sizeof(int));
  t->nz_col = kli_carve(c, (size_t)nlj * 4, sizeof(int));
  t->band_row = kli_carve(c, (size_t)w->nloops * 2 + (size_t)t->nextra,
                         sizeof(int));
  t->band_col = kli_carve(c, (size_t)nvars, sizeof(int));
  t->sites = kli_carve(c, (size_t)nj, sizeof(kl_output));
  t->skips = kli_carve(c, (size_t)nj, sizeof(kl_transmission_skip));
  t->pressure = kli_carve(c, (size_t)nj, sizeof(kl_output));
  t->loop_kept = kli_carve(c, (size_t)w->nloops, sizeof(int));
  t->loop_first_kept = kli_carve(c, (size_t)w->nloops + 1, sizeof(int));
  t->loop_lead = kli_carve(c, (size_t)w->nloops, sizeof(int));
  t->extra = kli_carve(c, (size_t)t->nextra, sizeof(kli_extra));
  t->extra_entry_row = kli_carve(c, (size_t)nextra_bound, sizeof(int));
  t->extra_entry_col = kli_carve(c, (size_t)nextra_bound, sizeof(int));
  {
    size_t singles = (m->redundancy > 0 ? (size_t)nlj * 4 : 0) +
                     (size_t)nextra_bound;
    t->kept_single_row = kli_carve(c, singles, sizeof(int));
    t->kept_single_col = kli_carve(c, singles, sizeof(int));
  }
  if (m->redundancy > 0) {
    t->kept_pair_row = kli_carve(c, (size_t)nlj * 4, sizeof(int));
    t->kept_pair_col = kli_carve(c, (size_t)nlj * 4, sizeof(int));
    t->pair_slot = kli_carve(c, (size_t)nlj * 4, sizeof(int));
  }
  kli_carve_reactions(m, &t->forces, c);
}

/* Loop joints as found or registered, with the link after each joint. */
static void copy_loops(const kl_model *m, const work *w, kli_topology *t) {
  int loop;
  t->nloops = w->nloops;
  for (loop = 0; loop <= w->nloops; loop++)
    t->loop_joint_start[loop] = w->loop_start[loop];
  for (loop = 0; loop < w->nloops; loop++) {
    int first = w->loop_start[loop], n = w->loop_start[loop + 1] - first;
    const int *src = m->nreg_loops > 0 ? m->reg_joints + m->reg_start[loop]
                                       : w->loop_joints + first;
    memcpy(t->loop_joints + first, src, (size_t)n * sizeof(int));
    kli_loop_links(m, n, t->loop_joints + first, t->loop_links + first);
  }
}

int kl_model_finalize(kl_model *m) {
  work w;
  kli_carver wc = {NULL, 0}, tc = {NULL, 0};
  kli_topology t;
  int st, dof, expected_loops, l, p, nterm_bound;
  long terms, extra_bound;
  if (m == NULL)
    return KL_EINVAL;
  if (m->finalized)
    return KL_OK;
  memset(&w, 0, sizeof w);
  memset(&t, 0, sizeof t);
  carve_work(m, &w, &wc);
  wc.base = kli_alloc(&m->alloc, wc.used);
  if (wc.base == NULL)
    return kli_fail(m->error, KL_ENOMEM, "finalize: out of memory");
  wc.used = 0;
  carve_work(m, &w, &wc);

  build_adjacency(m, &w);
  expected_loops = m->njoints - m->nlinks + 1;
  if ((st = spanning_tree(m, &w)) != KL_OK || (st = mobility(m, &dof)) != KL_OK)
    goto done;
  if (m->nreg_loops > 0) {
    if ((st = registered_loops(m, &w, expected_loops)) != KL_OK)
      goto done;
    for (l = 0; l <= m->nreg_loops; l++)
      w.loop_start[l] = m->reg_start[l];
  } else if ((st = find_loops(m, &w)) != KL_OK) {
    goto done;
  }

  /* a chain of d tree joints has at most d + 1 link and d slide terms */
  terms = 2L * w.loop_start[w.nloops];
  for (l = 0; l < m->nlinks; l++)
    terms += 2L * (w.depth[l] + 1);
  for (p = 0; p < m->npoints; p++)
    terms += 2L * (w.depth[m->points[p].link] + 1);
  /* a point input's row walks its point's chain once more; a coupling row
   * has at most KLI_EXTRA_COEFS entries, a point row one per unknown */
  extra_bound = KLI_EXTRA_COEFS * m->ncouplings;
  for (p = 0; p < m->npoint_inputs; p++) {
    long chain = 2L * (w.depth[m->points[m->point_inputs[p].point].link] + 1);
    terms += chain;
    extra_bound += 2L * chain;
  }
  if (terms > term_budget(m)) {
    st = too_large(m, terms);
    goto done;
  }
  nterm_bound = (int)terms;
  t.nextra = m->ncouplings + m->npoint_inputs;
  carve_topology(m, &w, &t, &tc, nterm_bound, (int)extra_bound);
  t.block_size = tc.used;
  t.block = kli_alloc(&m->alloc, tc.used);
  if (t.block == NULL) {
    st = kli_fail(m->error, KL_ENOMEM, "finalize: out of memory");
    goto done;
  }
  tc.base = t.block;
  tc.used = 0;
  carve_topology(m, &w, &t, &tc, nterm_bound, (int)extra_bound);

  if ((st = angle_groups(m, &w, &t)) != KL_OK)
    goto done;
  fill_var_coords(m, &t);
  copy_loops(m, &w, &t);
  t.nterms = 0;
  for (l = 0; l < t.nloops; l++)
    build_loop_chain(m, &t, l);
  build_pattern(&w, &t);
  for (p = 0; p < m->npoints; p++)
    build_path_chain(m, &w, &t, m->points[p].link, m->points[p].at,
                     &t.points[p]);
  for (l = 0; l < m->nlinks; l++) {
    static const double origin[2] = {0.0, 0.0};
    build_path_chain(m, &w, &t, l, origin, &t.origins[l]);
  }
  t.scale = model_scale(m, &w);
  build_extra_rows(m, &w, &t);
  if ((st = pinned_at_one_point(m, &w)) != KL_OK ||
      (st = structural_check(m, &w, &t)) != KL_OK ||
      (st = extra_rows_matched(m, &w, &t)) != KL_OK)
    goto done;
  t.redundancy = m->redundancy;
  t.nrows = 2 * t.nloops + t.nextra;
  keep_rows(&w, &t);
  if (order_loops(m, &t) != KL_OK || kli_build_reactions(m, &t) != KL_OK) {
    st = kli_fail(m->error, KL_ENOMEM, "finalize: out of memory");
    goto done;
  }
  t.ncoords = m->nlinks + m->njoints + m->npoint_inputs;
  t.dof = dof;
  kli_find_transmissions(m, &t, w.marks);
  m->topo = t;
  m->finalized = 1;
  t.block = NULL;
  st = KL_OK;
done:
  kli_free(&m->alloc, t.block, t.block_size);
  kli_free(&m->alloc, w.loop_joints, (size_t)w.cap_loop_joints * sizeof(int));
  kli_free(&m->alloc, wc.base, wc.used);
  return st;
}

int kl_model_dof(const kl_model *m) {
  if (m == NULL)
    return KL_EINVAL;
  return m->finalized ? m->topo.dof : KL_ESTATE;
}

int kl_model_loop_count(const kl_model *m) {
  if (m == NULL)
    return KL_EINVAL;
  return m->finalized ? m->topo.nloops : KL_ESTATE;
}

int kl_model_loop(const kl_model *m, int loop, int *joints, int cap) {
  int first, n, i;
  if (m == NULL || cap < 0 || (cap > 0 && joints == NULL))
    return KL_EINVAL;
  if (!m->finalized)
    return KL_ESTATE;
  if (loop < 0 || loop >= m->topo.nloops)
    return KL_EID;
  first = m->topo.loop_joint_start[loop];
  n = m->topo.loop_joint_start[loop + 1] - first;
  for (i = 0; i < n && i < cap; i++)
    joints[i] = m->topo.loop_joints[first + i];
  return n;
}

double kl_model_scale(const kl_model *m) {
  return m != NULL && m->finalized ? m->topo.scale : NAN;
}
