/*
 * reactions.c - finalize, for the force stage: the unknowns (the reactions
 * each joint carries, the effort of each input), the three rows of every
 * moving link, the entries that join them, and a band-reducing ordering.
 */
#include <string.h>

#include "ordering.h"
#include "reactions.h"

/* Entries one joint may have: 7 on each of its two links (a prismatic
 * input's normal force, moment and effort). */
#define KLI_ENTRIES_PER_JOINT 14
/* A coupling's force: 3 on each of two links for a tooth force; for a
 * ratio coupling a moment on each side of a revolute joint, or a force
 * along a slide on each side (3 + 3), for each of its two joints. */
#define KLI_ENTRIES_PER_COUPLING 12

void kli_carve_reactions(const kl_model *m, kli_force_pattern *f,
                         kli_carver *c) {
  size_t nj = (size_t)m->njoints,
         entries = KLI_ENTRIES_PER_JOINT * nj +
                   KLI_ENTRIES_PER_COUPLING * (size_t)m->ncouplings +
                   3 * (size_t)m->npoint_inputs;
  f->joint_col = kli_carve(c, nj, sizeof(int));
  f->input_col = kli_carve(c, (size_t)m->ninputs, sizeof(int));
  f->entry_start = kli_carve(c, nj + 1, sizeof(int));
  f->row = kli_carve(c, entries, sizeof(int));
  f->col = kli_carve(c, entries, sizeof(int));
  f->coef = kli_carve(c, entries, 1);
  f->side = kli_carve(c, entries, 1);
  f->geom = kli_carve(c, entries, sizeof(int));
  f->weight = kli_carve(c, entries, sizeof(double));
  f->band_row = kli_carve(c, 3 * (size_t)(m->nlinks - 1), sizeof(int));
  /* a bound: 2 unknowns per joint, an effort per input, a force per
   * coupling */
  f->band_col = kli_carve(c, 2 * nj + (size_t)m->ninputs +
                                 (size_t)m->ncouplings,
                          sizeof(int));
  f->coupling_col = kli_carve(c, (size_t)m->ncouplings, sizeof(int));
  f->extra_entry_start = kli_carve(
      c, (size_t)(m->ncouplings + m->npoint_inputs) + 1, sizeof(int));
}

static void entry(kli_force_pattern *f, int row, int col, int coef,
                  int side) {
  int e = f->nentries++;
  f->row[e] = row;
  f->col[e] = col;
  f->coef[e] = (unsigned char)coef;
  f->side[e] = (unsigned char)side;
  f->geom[e] = -1;
  f->weight[e] = 1.0;
}

/* A force along a direction at a point, on the rows of `link` (if it
 * moves), with geometry `geom` and weight w. */
static void force_entries(kli_force_pattern *f, int link, int col, int side,
                          int geom, double w) {
  int k, row = 3 * (link - 1);
  if (link == KL_GROUND)
    return;
  for (k = 0; k < 3; k++) {
    entry(f, row + k, col, KLI_COEF_AXIS_X + k, side);
    f->geom[f->nentries - 1] = geom;
    f->weight[f->nentries - 1] = w;
  }
}

/* The unknowns and entries of the extra rows: a gear's or rack's tooth
 * force between the two toothed links at the pitch point (geometry
 * njoints + e); a ratio coupling's generalised force, a moment c lambda on
 * each link angle of coefficient c, a force c lambda along each slide of
 * coefficient c (that joint's geometry); a point input's effort along its
 * axis at its point. */
static void extra_entries(const kl_model *m, kli_topology *t) {
  kli_force_pattern *f = &t->forces;
  int e, k;
  for (e = 0; e < t->nextra; e++) {
    f->extra_entry_start[e] = f->nentries;
    if (e < m->ncouplings) {
      const kli_coupling *c = &m->couplings[e];
      const kli_extra *x = &t->extra[e];
      int col = f->coupling_col[e] = f->n++;
      if (c->kind != KL_COUPLING_RATIO) {
        const kli_joint *j1 = &m->joints[c->joint[0]];
        const kli_joint *j2 = &m->joints[c->joint[1]];
        int l1 = j1->link[0] == c->carrier ? j1->link[1] : j1->link[0];
        int l2 = j2->link[0] == c->carrier ? j2->link[1] : j2->link[0];
        force_entries(f, l1, col, 0, m->njoints + e, 1.0);
        force_entries(f, l2, col, 1, m->njoints + e, 1.0);
        continue;
      }
      for (k = 0; k < x->ncoef; k++) {
        int coord = x->coord[k];
        if (coord < m->nlinks) {
          if (coord != KL_GROUND) {
            entry(f, 3 * (coord - 1) + 2, col, KLI_COEF_UNIT, 1);
            f->weight[f->nentries - 1] = x->coef[k];
          }
        } else {
          const kli_joint *j = &m->joints[coord - m->nlinks];
          force_entries(f, j->link[0], col, 0, coord - m->nlinks, x->coef[k]);
          force_entries(f, j->link[1], col, 1, coord - m->nlinks, x->coef[k]);
        }
      }
    } else {
      const kli_point_input *pi = &m->point_inputs[e - m->ncouplings];
      int col = f->input_col[pi->input] = f->n++;
      force_entries(f, m->points[pi->point].link, col, 1, m->njoints + e,
                    1.0);
    }
  }
  f->extra_entry_start[t->nextra] = f->nentries;
}

/* The entries of joint j on the rows of its link on `side` (a moving one),
 * whose first row is `row`: each unknown of the joint in its force and
 * moment rows. */
static void joint_entries(kli_force_pattern *f, const kli_joint *j, int col,
                          int row, int side) {
  int effort = col + (kli_is_pin_slot(j->kind) ? 1 : 2);
  if (j->kind == KL_JOINT_REVOLUTE) {
    entry(f, row, col, KLI_COEF_UNIT, side);
    entry(f, row + 2, col, KLI_COEF_ARM_FX, side);
    entry(f, row + 1, col + 1, KLI_COEF_UNIT, side);
    entry(f, row + 2, col + 1, KLI_COEF_ARM_FY, side);
  } else {
    entry(f, row, col, KLI_COEF_NORMAL_X, side);
    entry(f, row + 1, col, KLI_COEF_NORMAL_Y, side);
    entry(f, row + 2, col, KLI_COEF_NORMAL_M, side);
    if (j->kind == KL_JOINT_PRISMATIC)
      entry(f, row + 2, col + 1, KLI_COEF_UNIT, side);
  }
  if (j->input < 0)
    return;
  if (j->kind == KL_JOINT_REVOLUTE) {
    entry(f, row + 2, effort, KLI_COEF_UNIT, side);
  } else {
    entry(f, row, effort, KLI_COEF_AXIS_X, side);
    entry(f, row + 1, effort, KLI_COEF_AXIS_Y, side);
    entry(f, row + 2, effort, KLI_COEF_AXIS_M, side);
  }
}

int kli_build_reactions(kl_model *m, kli_topology *t) {
  kli_force_pattern *f = &t->forces;
  int moving = m->nlinks - 1, rows = 3 * moving, j, r, side, st;
  size_t bytes;
  int *scratch, *group_start, *row_group;
  kli_block_pattern bp;
  f->n = 0;
  f->nentries = 0;
  f->band_lower = f->band_upper = 0;
  memset(f->entry_start, 0, (size_t)(m->njoints + 1) * sizeof(int));
  /* redundant constraints leave more reactions than equations */
  if (t->redundancy > 0)
    return KL_OK;
  for (j = 0; j < m->njoints; j++) {
    const kli_joint *jt = &m->joints[j];
    f->joint_col[j] = f->n;
    f->entry_start[j] = f->nentries;
    for (side = 0; side < 2; side++)
      if (jt->link[side] != KL_GROUND)
        joint_entries(f, jt, f->n, 3 * (jt->link[side] - 1), side);
    f->n += kli_is_pin_slot(jt->kind) ? 1 : 2;
    if (jt->input >= 0)
      f->input_col[jt->input] = f->n++;
  }
  f->entry_start[m->njoints] = f->nentries;
  extra_entries(m, t);
  /* Gruebler's count with one input per freedom: 2 (revolute + prismatic)
   * + slot + inputs = 3 (links - 1), one unknown per equation */
  bytes = kli_size_mul((size_t)moving + 1 + (size_t)rows, sizeof(int));
  scratch = kli_alloc(&m->alloc, bytes);
  if (scratch == NULL)
    return KL_ENOMEM;
  group_start = scratch;
  row_group = group_start + moving + 1;
  for (r = 0; r <= moving; r++)
    group_start[r] = 3 * r;
  for (r = 0; r < rows; r++)
    row_group[r] = r / 3;
  bp.ngroups = moving;
  bp.group_start = group_start;
  bp.row_group = row_group;
  bp.nentries = f->nentries;
  bp.entry_row = f->row;
  bp.entry_col = f->col;
  bp.ncols = f->n;
  st = kli_band_order(&m->alloc, &bp, f->band_row, f->band_col,
                      &f->band_lower, &f->band_upper);
  kli_free(&m->alloc, scratch, bytes);
  return st;
}
