/*
 * ordering.h - private: a band-reducing ordering (Cuthill-McKee) of a sparse
 * square system whose rows come in groups: a loop's rows, a link's rows.
 */
#ifndef KINLOOP_ORDERING_H
#define KINLOOP_ORDERING_H

#include "memory.h"

/* A pattern by groups of rows. Group g holds the natural rows
 * group_start[g] .. group_start[g + 1] - 1 (a group may hold none); each
 * entry names a natural row and a column, and is taken to fill every row of
 * its row's group, so that the ordering keeps a group's rows together. */
typedef struct {
  int ngroups;
  const int *group_start; /* ngroups + 1 */
  const int *row_group;   /* the group of each natural row */
  int nentries;
  const int *entry_row, *entry_col;
  int ncols;
} kli_block_pattern;

/*
 * Cuthill-McKee over the groups (two groups are neighbours when they share
 * a column): each component from a group of least degree, neighbours in
 * order of degree. A group's rows follow its place; each column takes the
 * next place when its first group comes. Writes the place of every natural
 * row (band_row) and column (band_col, -1 for a column no entry holds) and
 * the lower and upper bandwidths of the ordered matrix. Scratch memory
 * comes from `a`; returns KL_OK or KL_ENOMEM.
 */
int kli_band_order(const kli_allocator *a, const kli_block_pattern *p,
                   int *band_row, int *band_col, int *lower, int *upper);

#endif
