/*
 * dense.c - assembly of the sparse Jacobian values and its factorization by
 * the kernel that suits the system: a built-in LU for small systems, LAPACK
 * LU (dgetrf) for general dense ones, LAPACK banded LU (dgbtrf) for long
 * chains; solves, condition estimates and damped least-squares steps.
 */
#include <limits.h>
#include <math.h>
#include <string.h>

#include <lapacke.h>

#include "dense.h"

/* The pivot array is handed to LAPACK as it is: LP64 LAPACKE only. */
typedef char lapack_int_is_int[sizeof(lapack_int) == sizeof(int) ? 1 : -1];

/* The band is narrow enough for the banded kernel when it is at most this
 * fraction of the order. */
#define KLI_BAND_FRACTION 4

void kli_dense_carve(kli_dense *d, kli_carver *c, const kli_pattern *p) {
  size_t n = (size_t)p->n, nn = kli_size_mul(n, n);
  /* the band's rows: 2 lower + upper + 1 <= 3 n + 1, computed where an int
   * cannot overflow */
  size_t ldab = 2 * (size_t)p->band_lower + (size_t)p->band_upper + 1;
  d->p = *p;
  d->ldab = ldab <= (size_t)INT_MAX ? (int)ldab : INT_MAX;
  d->colscale = kli_carve(c, n, sizeof(double));
  d->a = kli_carve(c, nn, sizeof(double));
  d->lu = kli_carve(c, nn, sizeof(double));
  d->ab = kli_carve(c, kli_size_mul(ldab, n), sizeof(double));
  d->ipiv = kli_carve(c, n, sizeof(int));
  d->work = kli_carve(c, kli_size_mul(4, n), sizeof(double));
  d->iwork = kli_carve(c, n, sizeof(int));
  d->normal = p->damped ? kli_carve(c, nn, sizeof(double)) : NULL;
}

int kli_dense_choose(const kli_dense *d, int kernel) {
  int n = d->p.n, band = d->p.band_lower + d->p.band_upper + 1;
  if (kernel != KL_KERNEL_AUTO)
    return kernel;
  if (n <= KLI_SMALL_MAX)
    return KL_KERNEL_SMALL;
  return band * KLI_BAND_FRACTION <= n ? KL_KERNEL_BANDED : KL_KERNEL_DENSE;
}

void kli_dense_use(kli_dense *d, int kernel) {
  d->kernel = kli_dense_choose(d, kernel);
  d->singular = 1;
}

void kli_dense_init(kli_dense *d, const double *colscale, int kernel) {
  memcpy(d->colscale, colscale, (size_t)d->p.n * sizeof(double));
  memset(d->a, 0, (size_t)d->p.n * (size_t)d->p.n * sizeof(double));
  d->anorm = 0.0;
  kli_dense_use(d, kernel);
}

/* Places the scaled value v of entry (row, col) of A D in the ordered
 * band of the banded kernel (LAPACK's band storage). */
static void band_put(kli_dense *d, int row, int col, double v) {
  int i = d->p.band_row[row], j = d->p.band_col[col];
  /* AB(kl + ku + 1 + i - j, j), counted from 1 */
  d->ab[(size_t)(d->p.band_lower + d->p.band_upper + i - j) +
        (size_t)j * (size_t)d->ldab] = v;
}

/* Places the scaled value v of entry (row, col): in the held matrix A D,
 * which the small and dense kernels factor and the damped steps read, and
 * in the band the banded kernel factors (a system without damped steps
 * factored by the banded kernel never touches its n x n matrix). */
static void put(kli_dense *d, int row, int col, double v, double *colsum) {
  if (d->kernel != KL_KERNEL_BANDED || d->p.damped)
    d->a[(size_t)col * (size_t)d->p.n + (size_t)row] = v;
  if (d->kernel == KL_KERNEL_BANDED)
    band_put(d, row, col, v);
  colsum[col] += fabs(v);
}

void kli_dense_load(kli_dense *d, const double *pairs) {
  int p, n = d->p.n;
  /* the 1-norm from the same pass: column sums over the pattern */
  double *colsum = d->work;
  for (p = 0; p < n; p++)
    colsum[p] = 0.0;
  if (d->kernel == KL_KERNEL_BANDED)
    memset(d->ab, 0, (size_t)d->ldab * (size_t)n * sizeof(double));
  for (p = 0; p < d->p.npairs; p++) {
    int col = d->p.col[p];
    double scale = d->colscale[col];
    put(d, d->p.row[p], col, pairs[2 * p] * scale, colsum);
    put(d, d->p.row[p] + 1, col, pairs[2 * p + 1] * scale, colsum);
  }
  for (p = 0; p < d->p.nsingles; p++) {
    int col = d->p.single_col[p];
    put(d, d->p.single_row[p], col,
        pairs[2 * d->p.npairs + p] * d->colscale[col], colsum);
  }
  d->anorm = 0.0;
  for (p = 0; p < n; p++)
    if (colsum[p] > d->anorm)
      d->anorm = colsum[p];
}

/* ---- the small kernel: LU with partial pivoting, as dgetrf does it ---- */

/* The 2 x 2 case unrolled (four-bars and slider-cranks): the same partial
 * pivoting and the same operations as the loop below. */
static int small_factor2(kli_dense *d) {
  const double *a = d->a;
  double *lu = d->lu;
  int swap = fabs(a[1]) > fabs(a[0]);
  double p0 = swap ? a[1] : a[0], q0 = swap ? a[0] : a[1];
  double p1 = swap ? a[3] : a[2], q1 = swap ? a[2] : a[3];
  d->ipiv[0] = swap ? 2 : 1;
  d->ipiv[1] = 2;
  if (p0 == 0.0) {
    lu[0] = p0, lu[1] = q0, lu[2] = p1, lu[3] = q1;
    return 1;
  }
  lu[0] = p0;
  lu[1] = q0 / p0;
  lu[2] = p1;
  lu[3] = q1 - lu[1] * p1;
  return lu[3] == 0.0;
}

static int small_factor(kli_dense *d) {
  int n = d->p.n, i, j, k, singular = 0, rows, *below = d->iwork;
  double *lu = d->lu;
  if (n == 2)
    return small_factor2(d);
  memcpy(lu, d->a, (size_t)n * (size_t)n * sizeof(double));
  for (k = 0; k < n; k++) {
    int piv = k;
    double best = fabs(lu[k + k * n]);
    for (i = k + 1; i < n; i++)
      if (fabs(lu[i + k * n]) > best) {
        best = fabs(lu[i + k * n]);
        piv = i;
      }
    d->ipiv[k] = piv + 1; /* LAPACK counts from 1 */
    if (best == 0.0) {
      singular = 1;
      continue;
    }
    if (piv != k)
      for (j = 0; j < n; j++) {
        double t = lu[k + j * n];
        lu[k + j * n] = lu[piv + j * n];
        lu[piv + j * n] = t;
      }
    /* the rows with a multiplier, so that sparse systems (the force
     * system's) skip the rows an update would not change */
    rows = 0;
    for (i = k + 1; i < n; i++)
      if (lu[i + k * n] != 0.0) {
        lu[i + k * n] /= lu[k + k * n];
        below[rows++] = i;
      }
    for (j = k + 1; j < n && rows > 0; j++) {
      double ukj = lu[k + j * n];
      int r;
      if (ukj != 0.0)
        for (r = 0; r < rows; r++)
          lu[below[r] + j * n] -= lu[below[r] + k * n] * ukj;
    }
  }
  return singular;
}

/* Solves (A D) y = b in place with the small kernel's factors. */
static void small_solve(const kli_dense *d, double *b) {
  int n = d->p.n, i, k;
  const double *lu = d->lu;
  if (n == 2) {
    double b0 = d->ipiv[0] == 2 ? b[1] : b[0];
    double b1 = (d->ipiv[0] == 2 ? b[0] : b[1]) - lu[1] * b0;
    b[1] = b1 / lu[3];
    b[0] = (b0 - lu[2] * b[1]) / lu[0];
    return;
  }
  for (k = 0; k < n; k++) {
    int piv = d->ipiv[k] - 1;
    double t = b[k];
    b[k] = b[piv];
    b[piv] = t;
  }
  for (k = 0; k < n; k++)
    for (i = k + 1; i < n; i++)
      b[i] -= lu[i + k * n] * b[k];
  for (k = n - 1; k >= 0; k--) {
    b[k] /= lu[k + k * n];
    for (i = 0; i < k; i++)
      b[i] -= lu[i + k * n] * b[k];
  }
}

/* The exact 1-norm of the inverse, column by column. */
static double small_inverse_norm(kli_dense *d) {
  int n = d->p.n, i, j;
  double norm = 0.0, *column = d->work;
  for (j = 0; j < n; j++) {
    double sum = 0.0;
    for (i = 0; i < n; i++)
      column[i] = i == j ? 1.0 : 0.0;
    small_solve(d, column);
    for (i = 0; i < n; i++)
      sum += fabs(column[i]);
    if (sum > norm)
      norm = sum;
  }
  return norm;
}

int kli_dense_factor(kli_dense *d) {
  int n = d->p.n;
  lapack_int info = 0;
  if (n == 0) {
    d->singular = 0;
    return 0;
  }
  switch (d->kernel) {
  case KL_KERNEL_SMALL:
    d->singular = small_factor(d);
    return d->singular;
  case KL_KERNEL_BANDED:
    /* kli_dense_load filled the band */
    info = LAPACKE_dgbtrf_work(LAPACK_COL_MAJOR, n, n, d->p.band_lower,
                               d->p.band_upper, d->ab, d->ldab, d->ipiv);
    break;
  default:
    memcpy(d->lu, d->a, (size_t)n * (size_t)n * sizeof(double));
    info = LAPACKE_dgetrf_work(LAPACK_COL_MAJOR, n, n, d->lu, n, d->ipiv);
  }
  d->singular = info != 0;
  return d->singular;
}

double kli_dense_rcond(kli_dense *d) {
  double rcond = 0.0;
  lapack_int info;
  if (d->p.n == 0)
    return 1.0;
  if (d->singular || d->anorm == 0.0)
    return 0.0;
  switch (d->kernel) {
  case KL_KERNEL_SMALL:
    return 1.0 / (d->anorm * small_inverse_norm(d));
  case KL_KERNEL_BANDED:
    info = LAPACKE_dgbcon_work(LAPACK_COL_MAJOR, '1', d->p.n, d->p.band_lower,
                               d->p.band_upper, d->ab, d->ldab, d->ipiv,
                               d->anorm, &rcond, d->work, d->iwork);
    break;
  default:
    info = LAPACKE_dgecon_work(LAPACK_COL_MAJOR, '1', d->p.n, d->lu, d->p.n,
                               d->anorm, &rcond, d->work, d->iwork);
  }
  return info == 0 ? rcond : 0.0;
}

/* The i-th pivot of the factors, whichever kernel made them. */
static double pivot_at(const kli_dense *d, int i) {
  return d->kernel == KL_KERNEL_BANDED
             ? d->ab[(size_t)(d->p.band_lower + d->p.band_upper) +
                     (size_t)i * (size_t)d->ldab]
             : d->lu[(size_t)i * (size_t)d->p.n + (size_t)i];
}

/* The determinant's sign, and its log |det| when `log_abs` is not NULL
 * (the sweep asks for the sign at every step: no logarithms there). */
static int determinant(const kli_dense *d, double *log_abs) {
  int i, sign = 1, n = d->p.n;
  if (d->singular) {
    if (log_abs != NULL)
      *log_abs = -HUGE_VAL;
    return 0;
  }
  if (log_abs != NULL)
    *log_abs = 0.0;
  for (i = 0; i < n; i++) {
    double pivot = pivot_at(d, i);
    if (pivot < 0.0)
      sign = -sign;
    if (d->ipiv[i] != i + 1) /* a row interchange */
      sign = -sign;
    if (log_abs != NULL)
      *log_abs += log(fabs(pivot));
  }
  /* with the banded kernel this is the determinant of the ordered matrix,
   * which differs from A's by the fixed sign of the ordering: comparisons
   * within one kernel, as the sweep makes them, are unaffected */
  return sign;
}

double kli_dense_log_det(const kli_dense *d, int *sign) {
  double log_abs;
  *sign = determinant(d, &log_abs);
  return log_abs;
}

int kli_dense_det_sign(const kli_dense *d) { return determinant(d, NULL); }

void kli_dense_solve(const kli_dense *d, double *b) {
  int i, n = d->p.n;
  double *tmp = d->work;
  if (n == 0)
    return;
  switch (d->kernel) {
  case KL_KERNEL_SMALL:
    small_solve(d, b);
    break;
  case KL_KERNEL_BANDED:
    for (i = 0; i < n; i++)
      tmp[d->p.band_row[i]] = b[i];
    LAPACKE_dgbtrs_work(LAPACK_COL_MAJOR, 'N', n, d->p.band_lower,
                        d->p.band_upper, 1, d->ab, d->ldab, d->ipiv, tmp, n);
    for (i = 0; i < n; i++)
      b[i] = tmp[d->p.band_col[i]];
    break;
  default:
    LAPACKE_dgetrs_work(LAPACK_COL_MAJOR, 'N', n, 1, d->lu, n, d->ipiv, b, n);
  }
  for (i = 0; i < n; i++)
    b[i] *= d->colscale[i];
}

int kli_dense_damped_step(kli_dense *d, const double *f, double damping,
                          double *dx) {
  int n = d->p.n, i, j, k;
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
  int i, k, n = d->p.n;
  for (i = 0; i < n; i++) {
    const double *col = d->a + (size_t)i * (size_t)n;
    double sum = 0.0;
    for (k = 0; k < n; k++)
      sum += col[k] * x[k];
    y[i] = sum;
  }
}

void kli_dense_apply(const kli_dense *d, const double *x, double *y) {
  int i, k, n = d->p.n;
  for (k = 0; k < n; k++)
    y[k] = 0.0;
  for (i = 0; i < n; i++) {
    const double *col = d->a + (size_t)i * (size_t)n;
    double xi = x[i] / d->colscale[i];
    for (k = 0; k < n; k++)
      y[k] += col[k] * xi;
  }
}
