/*
 * ordering.c - a band-reducing ordering (Cuthill-McKee) over groups of rows,
 * shared by the loop Jacobian (a loop's rows) and the force system (a
 * link's rows), so that long chains are factored by the banded kernel.
 */
#include <string.h>

#include "ordering.h"

/* Sorts v[0..n) by degree, keeping the order of equal degrees (a bottom-up
 * merge sort through tmp, n ints): O(n log n), where inserting one by one
 * made a link with many neighbours, or many unconnected groups, cost n^2. */
static void sort_by_degree(int *v, int n, const int *degree, int *tmp) {
  int width, i;
  for (width = 1; width < n; width *= 2) {
    for (i = 0; i < n; i += 2 * width) {
      int mid = i + width < n ? i + width : n;
      int end = i + 2 * width < n ? i + 2 * width : n, a = i, b = mid, k = i;
      while (a < mid && b < end)
        tmp[k++] = degree[v[b]] < degree[v[a]] ? v[b++] : v[a++];
      while (a < mid)
        tmp[k++] = v[a++];
      while (b < end)
        tmp[k++] = v[b++];
    }
    memcpy(v, tmp, (size_t)n * sizeof *v);
  }
}

int kli_band_order(const kli_allocator *a, const kli_block_pattern *p,
                   int *band_row, int *band_col, int *lower, int *upper) {
  int ng = p->ngroups, nc = p->ncols, ne = p->nentries;
  int *group_entries, *entry_start, *col_start, *col_entries, *degree;
  int *group_pos, *queue, *row_start, *fill, *by_degree;
  int i, e, k, head, tail, next_col = 0, placed = 0, next_start = 0;
  /* in size_t: the sum of the model's counts may exceed an int */
  size_t bytes = kli_size_mul(7 * (size_t)ng + 2 * (size_t)ne + 2 * (size_t)nc + 3,
                              sizeof(int));
  int *scratch = kli_alloc(a, bytes);
  if (scratch == NULL)
    return KL_ENOMEM;
  entry_start = scratch;             /* ng + 1: entries of each group */
  group_entries = entry_start + ng + 1; /* ne */
  col_start = group_entries + ne;    /* nc + 1 */
  col_entries = col_start + nc + 1;  /* ne: entries of each column */
  degree = col_entries + ne;         /* ng */
  group_pos = degree + ng;           /* ng */
  queue = group_pos + ng;            /* ng */
  row_start = queue + ng;            /* ng + 1: first ordered row of each place */
  fill = row_start + ng + 1;         /* max(ng, nc) */
  by_degree = fill + (ng > nc ? ng : nc); /* ng: the groups, fewest first */
  memset(entry_start, 0, (size_t)(ng + 1) * sizeof(int));
  memset(col_start, 0, (size_t)(nc + 1) * sizeof(int));
  for (e = 0; e < ne; e++) {
    entry_start[p->row_group[p->entry_row[e]] + 1]++;
    col_start[p->entry_col[e] + 1]++;
  }
  for (i = 0; i < ng; i++)
    entry_start[i + 1] += entry_start[i];
  for (i = 0; i < nc; i++)
    col_start[i + 1] += col_start[i];
  memcpy(fill, entry_start, (size_t)ng * sizeof(int));
  for (e = 0; e < ne; e++)
    group_entries[fill[p->row_group[p->entry_row[e]]]++] = e;
  memcpy(fill, col_start, (size_t)nc * sizeof(int));
  for (e = 0; e < ne; e++)
    col_entries[fill[p->entry_col[e]]++] = e;
  /* degree: entries in other groups that share this group's columns */
  for (i = 0; i < ng; i++) {
    degree[i] = 0;
    for (k = entry_start[i]; k < entry_start[i + 1]; k++) {
      int col = p->entry_col[group_entries[k]];
      degree[i] += col_start[col + 1] - col_start[col] - 1;
    }
    group_pos[i] = -1;
  }
  for (i = 0; i < nc; i++)
    band_col[i] = -1;
  for (i = 0; i < ng; i++)
    by_degree[i] = i;
  sort_by_degree(by_degree, ng, degree, fill);
  head = tail = 0;
  while (placed < ng) {
    /* each part starts at the unplaced group of least degree (the first
     * of equals) */
    int start;
    while (group_pos[by_degree[next_start]] >= 0)
      next_start++;
    start = by_degree[next_start];
    group_pos[start] = placed++;
    queue[tail++] = start;
    while (head < tail) {
      int group = queue[head++], first = tail;
      for (k = entry_start[group]; k < entry_start[group + 1]; k++) {
        int col = p->entry_col[group_entries[k]], c;
        if (band_col[col] < 0)
          band_col[col] = next_col++;
        for (c = col_start[col]; c < col_start[col + 1]; c++) {
          int other = p->row_group[p->entry_row[col_entries[c]]];
          if (group_pos[other] >= 0)
            continue;
          group_pos[other] = placed++;
          queue[tail++] = other;
        }
      }
      /* this group's new neighbours by degree */
      sort_by_degree(queue + first, tail - first, degree, fill);
      /* places follow the queue's order */
      for (k = first; k < tail; k++)
        group_pos[queue[k]] = placed - (tail - k);
    }
  }
  /* rows: each group's rows in order at its place */
  for (i = 0; i < ng; i++)
    fill[group_pos[i]] = i;
  row_start[0] = 0;
  for (k = 0; k < ng; k++) {
    int g = fill[k];
    row_start[k + 1] = row_start[k] + p->group_start[g + 1] - p->group_start[g];
  }
  for (i = 0; i < ng; i++) {
    int r;
    for (r = p->group_start[i]; r < p->group_start[i + 1]; r++)
      band_row[r] = row_start[group_pos[i]] + (r - p->group_start[i]);
  }
  *lower = *upper = 0;
  for (e = 0; e < ne; e++) {
    int g = p->row_group[p->entry_row[e]], col = band_col[p->entry_col[e]];
    int first_row = row_start[group_pos[g]], last_row = row_start[group_pos[g] + 1] - 1;
    if (last_row - col > *lower)
      *lower = last_row - col;
    if (col - first_row > *upper)
      *upper = col - first_row;
  }
  kli_free(a, scratch, bytes);
  return KL_OK;
}
