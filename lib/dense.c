/*
 * dense.c - assembly of the sparse Jacobian values and its factorization by
 * the kernel that suits the system: a built-in LU for small systems, LAPACK
 * LU (dgetrf) for general dense ones, banded LU in LAPACK's storage (the
 * operations of its dgbtf2, built in) for long chains; solves, condition
 * watches and estimates, and damped least-squares steps.
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
  d->value_col = kli_carve(c, (size_t)kli_dense_values(p), sizeof(int));
  d->a_at = kli_carve(c, (size_t)kli_dense_values(p), sizeof(size_t));
  d->band_at = kli_carve(c, (size_t)kli_dense_values(p), sizeof(size_t));
}

int kli_dense_values(const kli_pattern *p) {
  return 2 * p->npairs + p->nsingles;
}

/* Where value k of the pattern lands: its column, and its place in A D
 * and in the ordered band (LAPACK's band storage), worked out once so
 * that a load is one pass of stores. */
static void place_value(kli_dense *d, int k, int row, int col) {
  int i = d->p.band_row[row], j = d->p.band_col[col];
  d->value_col[k] = col;
  d->a_at[k] = (size_t)col * (size_t)d->p.n + (size_t)row;
  /* AB(kl + ku + 1 + i - j, j), counted from 1 */
  d->band_at[k] = (size_t)(d->p.band_lower + d->p.band_upper + i - j) +
                  (size_t)j * (size_t)d->ldab;
}

static void place_values(kli_dense *d) {
  int p;
  for (p = 0; p < d->p.npairs; p++) {
    place_value(d, 2 * p, d->p.row[p], d->p.col[p]);
    place_value(d, 2 * p + 1, d->p.row[p] + 1, d->p.col[p]);
  }
  for (p = 0; p < d->p.nsingles; p++)
    place_value(d, 2 * d->p.npairs + p, d->p.single_row[p],
                d->p.single_col[p]);
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
  d->two = d->kernel == KL_KERNEL_SMALL && d->p.n == 2;
  d->singular = 1;
}

void kli_dense_init(kli_dense *d, const double *colscale, int kernel) {
  int i;
  memcpy(d->colscale, colscale, (size_t)d->p.n * sizeof(double));
  d->unscaled = 1;
  for (i = 0; i < d->p.n; i++)
    d->unscaled &= colscale[i] == 1.0;
  memset(d->a, 0, (size_t)d->p.n * (size_t)d->p.n * sizeof(double));
  d->anorm = 0.0;
  place_values(d);
  kli_dense_use(d, kernel);
}

void kli_dense_load(kli_dense *d, const double *values) {
  int k, n = d->p.n, count = kli_dense_values(&d->p);
  /* the 1-norm from the same pass: column sums over the pattern */
  double *colsum = d->work;
  for (k = 0; k < n; k++)
    colsum[k] = 0.0;
  /* the held matrix A D, which the small and dense kernels factor and the
   * damped steps read, and the band the banded kernel factors (a system
   * without damped steps factored by the banded kernel never touches its
   * n x n matrix) */
  if (d->kernel != KL_KERNEL_BANDED) {
    for (k = 0; k < count; k++) {
      int col = d->value_col[k];
      double v = values[k] * d->colscale[col];
      d->a[d->a_at[k]] = v;
      colsum[col] += fabs(v);
    }
  } else {
    memset(d->ab, 0, (size_t)d->ldab * (size_t)n * sizeof(double));
    for (k = 0; k < count; k++) {
      int col = d->value_col[k];
      double v = values[k] * d->colscale[col];
      if (d->p.damped)
        d->a[d->a_at[k]] = v;
      d->ab[d->band_at[k]] = v;
      colsum[col] += fabs(v);
    }
  }
  d->anorm = 0.0;
  for (k = 0; k < n; k++)
    if (colsum[k] > d->anorm)
      d->anorm = colsum[k];
}

void kli_dense_loaded(kli_dense *d) {
  int i, j, n = d->p.n;
  if (n == 2) { /* four-bars and slider-cranks, unrolled */
    double first = fabs(d->a[0]) + fabs(d->a[1]);
    double second = fabs(d->a[2]) + fabs(d->a[3]);
    d->anorm = first > 0.0 ? first : 0.0; /* a NaN sum counts as 0 */
    if (second > d->anorm)
      d->anorm = second;
    return;
  }
  d->anorm = 0.0;
  for (j = 0; j < n; j++) {
    double sum = 0.0;
    for (i = 0; i < n; i++)
      sum += fabs(d->a[(size_t)j * (size_t)n + (size_t)i]);
    if (sum > d->anorm)
      d->anorm = sum;
  }
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

/* The 2 x 2 solve unrolled: small_solve's operations for n = 2. */
static void small_solve2(const kli_dense *d, double *b) {
  const double *lu = d->lu;
  double b0 = d->ipiv[0] == 2 ? b[1] : b[0];
  double b1 = (d->ipiv[0] == 2 ? b[0] : b[1]) - lu[1] * b0;
  b[1] = b1 / lu[3];
  b[0] = (b0 - lu[2] * b[1]) / lu[0];
}

/* Solves (A D) y = b in place with the small kernel's factors. */
static void small_solve(const kli_dense *d, double *b) {
  int n = d->p.n, i, k;
  const double *lu = d->lu;
  if (d->two) {
    small_solve2(d, b);
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

/* ---- the banded kernel: LAPACK's band storage and unblocked band LU ----
 *
 * dgbtrf factors bands as narrow as a chain's (kl below LAPACK's block
 * size) with its unblocked dgbtf2, calling a BLAS routine for each column's
 * pivot search, scaling and update: for such short columns the calls cost
 * more than the arithmetic. band_factor and band_solve do dgbtf2's and
 * dgbtrs' operations in the same order with the same roundings (the pivot
 * is the first of largest magnitude, the multipliers are scaled by the
 * pivot's reciprocal, an update adds x * (-y)), so that the factors and
 * solutions are LAPACK's to the last bit, and dgbcon reads the factors as
 * its own. */

#define AB(row, col) d->ab[(size_t)(row) + (size_t)(col) * ld]

static int band_factor(kli_dense *d) {
  int n = d->p.n, kl = d->p.band_lower, ku = d->p.band_upper, kv = kl + ku;
  int i, j, c, ju = 0, singular = 0;
  size_t ld = (size_t)d->ldab;
  for (j = ku + 1; j < (kv < n ? kv : n); j++) /* fill-in above the band */
    for (i = kv - j; i < kl; i++)
      AB(i, j) = 0.0;
  for (j = 0; j < n; j++) {
    int km = kl < n - 1 - j ? kl : n - 1 - j, jp = 0;
    double best;
    if (j + kv < n)
      for (i = 0; i < kl; i++)
        AB(i, j + kv) = 0.0;
    best = fabs(AB(kv, j));
    for (i = 1; i <= km; i++)
      if (fabs(AB(kv + i, j)) > best) {
        best = fabs(AB(kv + i, j));
        jp = i;
      }
    d->ipiv[j] = jp + j + 1; /* LAPACK counts from 1 */
    if (AB(kv + jp, j) == 0.0) {
      singular = 1;
      continue;
    }
    if (j + ku + jp > ju)
      ju = j + ku + jp < n - 1 ? j + ku + jp : n - 1;
    if (jp != 0) /* the rows along the band: one place up per column */
      for (c = 0; c <= ju - j; c++) {
        double t = AB(kv + jp - c, j + c);
        AB(kv + jp - c, j + c) = AB(kv - c, j + c);
        AB(kv - c, j + c) = t;
      }
    if (km > 0) {
      double r = 1.0 / AB(kv, j);
      for (i = 1; i <= km; i++)
        AB(kv + i, j) = r * AB(kv + i, j);
      for (c = 1; c <= ju - j; c++) {
        double y = AB(kv - c, j + c);
        if (y != 0.0) {
          double t = -1.0 * y;
          for (i = 1; i <= km; i++)
            AB(kv + i - c, j + c) = AB(kv + i - c, j + c) + AB(kv + i, j) * t;
        }
      }
    }
  }
  return singular;
}

/* Solves the ordered band system in place with band_factor's factors. */
static void band_solve(const kli_dense *d, double *b) {
  int n = d->p.n, kl = d->p.band_lower, kv = kl + d->p.band_upper, i, j;
  size_t ld = (size_t)d->ldab;
  for (j = 0; j < n - 1 && kl > 0; j++) {
    int lm = kl < n - 1 - j ? kl : n - 1 - j, l = d->ipiv[j] - 1;
    if (l != j) {
      double t = b[l];
      b[l] = b[j];
      b[j] = t;
    }
    if (b[j] != 0.0) {
      double t = -1.0 * b[j];
      for (i = 1; i <= lm; i++)
        b[j + i] = b[j + i] + AB(kv + i, j) * t;
    }
  }
  for (j = n - 1; j >= 0; j--) {
    if (b[j] != 0.0) {
      double t;
      b[j] = b[j] / AB(kv, j);
      t = b[j];
      for (i = j - 1; i >= 0 && i >= j - kv; i--)
        b[i] = b[i] - t * AB(kv + i - j, j);
    }
  }
}

#undef AB

int kli_dense_factor(kli_dense *d) {
  int n = d->p.n;
  lapack_int info = 0;
  if (d->two)
    return d->singular = small_factor2(d);
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
    d->singular = band_factor(d);
    return d->singular;
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

/*
 * An upper bound on |(A D)^-1|_1 from the LAPACK kernels' factors, with
 * absolute values throughout (docs/theory.md, "Watching the condition"):
 * for A D = P L U, |(A D)^-1| <= M(U)^-1 |L^-1| entrywise, M(U) being U
 * with its off-diagonal entries negated in absolute value, so e^T of that
 * product, one transposed triangular pass through each factor, bounds
 * every column sum. Inf when it overflows (or a pivot is zero).
 */
static double dense_inverse_bound(kli_dense *d) {
  int n = d->p.n, i, j;
  const double *lu = d->lu;
  double *y = d->work, bound = 0.0;
  for (j = 0; j < n; j++) { /* M(U)^T y = e */
    double sum = 1.0;
    for (i = 0; i < j; i++)
      sum += fabs(lu[i + (size_t)j * (size_t)n]) * y[i];
    y[j] = sum / fabs(lu[j + (size_t)j * (size_t)n]);
  }
  for (i = n - 1; i >= 0; i--) { /* M(L)^T z = y, unit diagonal */
    double sum = y[i];
    for (j = i + 1; j < n; j++)
      sum += fabs(lu[j + (size_t)i * (size_t)n]) * y[j];
    y[i] = sum;
    bound = fmax(bound, sum);
  }
  return bound;
}

/* The same bound from dgbtrf's band: U has kl + ku bands above its
 * diagonal; L is the product of the elimination steps, each a row
 * interchange and one column of at most kl multipliers, gone through in
 * reverse as dgbtrs does for the transposed system. */
static double band_inverse_bound(kli_dense *d) {
  int n = d->p.n, kl = d->p.band_lower, kv = kl + d->p.band_upper, i, j;
  const double *ab = d->ab;
  size_t ld = (size_t)d->ldab;
  double *y = d->work, bound = 0.0;
  for (j = 0; j < n; j++) { /* M(U)^T y = e */
    double sum = 1.0;
    for (i = j - kv > 0 ? j - kv : 0; i < j; i++)
      sum += fabs(ab[(size_t)(kv + i - j) + (size_t)j * ld]) * y[i];
    y[j] = sum / fabs(ab[(size_t)kv + (size_t)j * ld]);
  }
  for (j = n - 2; j >= 0; j--) { /* each step's |L_j^-1| P_j, reversed */
    int rows = kl < n - 1 - j ? kl : n - 1 - j, piv = d->ipiv[j] - 1;
    double sum = y[j], t;
    for (i = 1; i <= rows; i++)
      sum += fabs(ab[(size_t)(kv + i) + (size_t)j * ld]) * y[j + i];
    y[j] = sum;
    t = y[j];
    y[j] = y[piv];
    y[piv] = t;
  }
  for (i = 0; i < n; i++)
    bound = fmax(bound, y[i]);
  return bound;
}

/* The exact 1-norm condition of a 2 x 2 matrix: its inverse is the
 * adjugate over the determinant, whose column sums are A's row sums. */
static double small_rcond2(const kli_dense *d) {
  const double *a = d->a;
  double det = fabs(d->lu[0] * d->lu[3]);
  double first = fabs(a[0]) + fabs(a[2]), second = fabs(a[1]) + fabs(a[3]);
  /* fmax's choice, NaN included, without the call */
  double rows = isnan(first) || second > first ? second : first;
  return det / (d->anorm * rows);
}

double kli_dense_rcond_at_least(kli_dense *d, double needed) {
  double bound;
  if (d->p.n == 0)
    return 1.0;
  if (d->singular || d->anorm == 0.0)
    return 0.0;
  switch (d->kernel) {
  case KL_KERNEL_SMALL:
    return d->two ? small_rcond2(d) : kli_dense_rcond(d);
  case KL_KERNEL_BANDED:
    bound = band_inverse_bound(d);
    break;
  default:
    bound = dense_inverse_bound(d);
  }
  bound = 1.0 / (d->anorm * bound); /* 0 when the bound overflowed */
  return bound >= needed ? bound : kli_dense_rcond(d);
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
  if (d->two && d->unscaled) { /* a four-bar's solve, without the rest */
    small_solve2(d, b);
    return;
  }
  if (n == 0)
    return;
  switch (d->kernel) {
  case KL_KERNEL_SMALL:
    small_solve(d, b);
    break;
  case KL_KERNEL_BANDED:
    for (i = 0; i < n; i++)
      tmp[d->p.band_row[i]] = b[i];
    band_solve(d, tmp);
    for (i = 0; i < n; i++)
      b[i] = tmp[d->p.band_col[i]];
    break;
  default:
    LAPACKE_dgetrs_work(LAPACK_COL_MAJOR, 'N', n, 1, d->lu, n, d->ipiv, b, n);
  }
  for (i = 0; i < n && !d->unscaled; i++)
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
