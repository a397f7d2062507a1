/*
 * dense.c - assembly of the sparse Jacobian values into a dense column-major
 * matrix, LAPACK LU (dgetrf/dgetrs), and its condition estimate (dgecon).
 */
#include <string.h>

#include <lapacke.h>

#include "dense.h"

/* The pivot array is handed to LAPACK as it is: LP64 LAPACKE only. */
typedef char lapack_int_is_int[sizeof(lapack_int) == sizeof(int) ? 1 : -1];

void kli_dense_carve(kli_dense *d, kli_carver *c, int n, int npairs,
                     const int *row, const int *col) {
  size_t nn = (size_t)n * (size_t)n;
  d->n = n;
  d->npairs = npairs;
  d->row = row;
  d->col = col;
  d->colscale = kli_carve(c, (size_t)n, sizeof(double));
  d->a = kli_carve(c, nn, sizeof(double));
  d->lu = kli_carve(c, nn, sizeof(double));
  d->ipiv = kli_carve(c, (size_t)n, sizeof(int));
  d->work = kli_carve(c, 4 * (size_t)n, sizeof(double));
  d->iwork = kli_carve(c, (size_t)n, sizeof(int));
  d->normal = kli_carve(c, nn, sizeof(double));
}

void kli_dense_init(kli_dense *d, const double *colscale) {
  memcpy(d->colscale, colscale, (size_t)d->n * sizeof(double));
  memset(d->a, 0, (size_t)d->n * (size_t)d->n * sizeof(double));
  d->anorm = 0.0;
  d->singular = 1;
}

void kli_dense_load(kli_dense *d, const double *pairs) {
  int p;
  for (p = 0; p < d->npairs; p++) {
    double *at = d->a + (size_t)d->col[p] * (size_t)d->n + (size_t)d->row[p];
    double scale = d->colscale[d->col[p]];
    at[0] = pairs[2 * p] * scale;
    at[1] = pairs[2 * p + 1] * scale;
  }
}

int kli_dense_factor(kli_dense *d) {
  lapack_int info;
  int n = d->n;
  if (n == 0) {
    d->singular = 0;
    return 0;
  }
  memcpy(d->lu, d->a, (size_t)n * (size_t)n * sizeof(double));
  d->anorm = LAPACKE_dlange_work(LAPACK_COL_MAJOR, '1', n, n, d->a, n, NULL);
  info = LAPACKE_dgetrf_work(LAPACK_COL_MAJOR, n, n, d->lu, n, d->ipiv);
  d->singular = info != 0;
  return d->singular;
}

double kli_dense_rcond(kli_dense *d) {
  double rcond = 0.0;
  if (d->n == 0)
    return 1.0;
  if (d->singular || d->anorm == 0.0)
    return 0.0;
  if (LAPACKE_dgecon_work(LAPACK_COL_MAJOR, '1', d->n, d->lu, d->n, d->anorm,
                          &rcond, d->work, d->iwork) != 0)
    return 0.0;
  return rcond;
}

int kli_dense_det_sign(const kli_dense *d) {
  int i, sign = 1;
  if (d->singular)
    return 0;
  for (i = 0; i < d->n; i++) {
    double pivot = d->lu[(size_t)i * (size_t)d->n + (size_t)i];
    if (pivot < 0.0)
      sign = -sign;
    if (d->ipiv[i] != i + 1) /* LAPACK's pivots count from 1 */
      sign = -sign;
  }
  return sign;
}

void kli_dense_solve(const kli_dense *d, double *b) {
  int i;
  if (d->n == 0)
    return;
  LAPACKE_dgetrs_work(LAPACK_COL_MAJOR, 'N', d->n, 1, d->lu, d->n, d->ipiv, b,
                      d->n);
  for (i = 0; i < d->n; i++)
    b[i] *= d->colscale[i];
}

int kli_dense_damped_step(kli_dense *d, const double *f, double damping,
                          double *dx) {
  int n = d->n, i, j, k;
  double trace = 0.0, lambda;
  if (n == 0)
    return 1;
  for (j = 0; j < n; j++) {
    const double *cj = d->a + (size_t)j * (size_t)n;
    for (i = j; i < n; i++) {
      const double *ci = d->a + (size_t)i * (size_t)n;
      double sum = 0.0;
      for (k = 0; k < n; k++)
        sum += ci[k] * cj[k];
      d->normal[(size_t)j * (size_t)n + (size_t)i] = sum;
    }
    trace += d->normal[(size_t)j * (size_t)n + (size_t)j];
  }
  if (!(trace > 0.0))
    return 1;
  lambda = damping * trace / n;
  for (j = 0; j < n; j++)
    d->normal[(size_t)j * (size_t)n + (size_t)j] += lambda;
  kli_dense_apply_transpose(d, f, dx);
  for (i = 0; i < n; i++)
    dx[i] = -dx[i];
  if (LAPACKE_dpotrf_work(LAPACK_COL_MAJOR, 'L', n, d->normal, n) != 0)
    return 1;
  LAPACKE_dpotrs_work(LAPACK_COL_MAJOR, 'L', n, 1, d->normal, n, dx, n);
  for (i = 0; i < n; i++)
    dx[i] *= d->colscale[i];
  return 0;
}

void kli_dense_apply_transpose(const kli_dense *d, const double *x,
                               double *y) {
  int i, k, n = d->n;
  for (i = 0; i < n; i++) {
    const double *col = d->a + (size_t)i * (size_t)n;
    double sum = 0.0;
    for (k = 0; k < n; k++)
      sum += col[k] * x[k];
    y[i] = sum;
  }
}

void kli_dense_apply(const kli_dense *d, const double *x, double *y) {
  int i, k, n = d->n;
  for (k = 0; k < n; k++)
    y[k] = 0.0;
  for (i = 0; i < n; i++) {
    const double *col = d->a + (size_t)i * (size_t)n;
    double xi = x[i] / d->colscale[i];
    for (k = 0; k < n; k++)
      y[k] += col[k] * xi;
  }
}
