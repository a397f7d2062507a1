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

void kli_carve_reactions(const kl_model *m, kli_force_pattern *f,
                         kli_carver *c) {
  size_t nj = (size_t)m->njoints, entries = KLI_ENTRIES_PER_JOINT * nj;
  f->joint_col = kli_carve(c, nj, sizeof(int));
  f->input_col = kli_carve(c, (size_t)m->ninputs, sizeof(int));
  f->entry_start = kli_carve(c, nj + 1, sizeof(int));
  f->row = kli_carve(c, entries, sizeof(int));
  f->col = kli_carve(c, entries, sizeof(int));
  f->coef = kli_carve(c, entries, 1);
  f->side = kli_carve(c, entries, 1);
  f->band_row = kli_carve(c, 3 * (size_t)(m->nlinks - 1), sizeof(int));
  /* a bound: 2 unknowns per joint and an effort per input */
  f->band_col = kli_carve(c, 2 * nj + (size_t)m->ninputs, sizeof(int));
}

static void entry(kli_force_pattern *f, int row, int col, int coef,
                  int side) {
  int e = f->nentries++;
  f->row[e] = row;
  f->col[e] = col;
  f->coef[e] = (unsigned char)coef;
  f->side[e] = (unsigned char)side;
}

/* The entries of joint j on the rows of its link on `side` (a moving one),
 * whose first row is `row`: each unknown of the joint in its force and
 * moment rows. */
static void joint_entries(kli_force_pattern *f, const kli_joint *j, int col,
                          int row, int side) {
  int effort = col + (j->kind == KL_JOINT_SLOT ? 1 : 2);
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
  /* redundant constraints leave more reactions than equations; the rows
   * of couplings and point inputs have no force unknowns here yet */
  if (t->redundancy > 0 || t->nextra > 0)
    return KL_OK;
  for (j = 0; j < m->njoints; j++) {
    const kli_joint *jt = &m->joints[j];
    f->joint_col[j] = f->n;
    f->entry_start[j] = f->nentries;
    for (side = 0; side < 2; side++)
      if (jt->link[side] != KL_GROUND)
        joint_entries(f, jt, f->n, 3 * (jt->link[side] - 1), side);
    f->n += jt->kind == KL_JOINT_SLOT ? 1 : 2;
    if (jt->input >= 0)
      f->input_col[jt->input] = f->n++;
  }
  f->entry_start[m->njoints] = f->nentries;
  /* Gruebler's count with one input per freedom: 2 (revolute + prismatic)
   * + slot + inputs = 3 (links - 1), one unknown per equation */
  bytes = (size_t)(moving + 1 + rows) * sizeof(int);
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
