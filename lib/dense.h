/*
 * dense.h - private: the one module that decides how the Jacobian system is
 * stored, factored and solved, and the only one that talks to LAPACK.
 */
#ifndef KINLOOP_DENSE_H
#define KINLOOP_DENSE_H

#include "memory.h"

/* Systems this small are factored by the built-in kernel in AUTO. */
#define KLI_SMALL_MAX 16

/* The sparsity pattern as the topology gives it: pairs of entries (the
 * loop Jacobian's x and y rows of a column) and single entries (a loop
 * with one kept row, the force system). Values come in that order: two per
 * pair, then one per single. */
typedef struct {
  int n;                /* unknowns = equations */
  int npairs;           /* nonzero pairs: rows (r, r + 1) of column c */
  const int *row, *col;
  int nsingles;         /* nonzero single entries: row r of column c */
  const int *single_row, *single_col;
  const int *band_row, *band_col; /* a band-reducing ordering */
  int band_lower, band_upper;
  int damped;           /* 1 if damped least-squares steps are taken */
} kli_pattern;

typedef struct {
  kli_pattern p;
  int kernel;        /* KL_KERNEL_SMALL, _DENSE or _BANDED in use */
  int two;           /* the small kernel on a 2 x 2 system (four-bars,
                        slider-cranks): factor, solve and rcond take their
                        unrolled paths first, set with the kernel */
  /* Column scales D: the matrix held is A D, with every column in length
   * units (slide columns times the model's scale), so that the condition
   * estimate does not depend on the unit of length. */
  double *colscale;
  int unscaled;      /* every column scale is 1 (no slide columns): the
                        solves skip the scaling pass */
  double *a;         /* the assembled, scaled matrix A D, column-major n x n
                        (not loaded for the banded kernel of a system
                        without damped steps) */
  double *lu;        /* small and dense kernels: LU factors of a */
  double *ab;        /* banded kernel: LAPACK band storage, ldab x n */
  int ldab;
  int *ipiv;
  double *work;      /* 4 n, for the condition estimates */
  int *iwork;        /* n */
  double *normal;    /* n x n: A^T A + lambda I for damped steps (a
                        pattern with `damped` set only) */
  /* Per value of the pattern (two per pair, then one per single), set by
   * kli_dense_init: its column, and its offsets in a and in ab. */
  int *value_col;
  size_t *a_at, *band_at;
  double anorm;      /* 1-norm of a when loaded */
  int singular;      /* factorization met an exact zero pivot */
} kli_dense;

/* Carves the arrays for an n x n system with pattern p (kept by pointer). */
void kli_dense_carve(kli_dense *d, kli_carver *c, const kli_pattern *p);
/* The values a load takes for pattern p: two per pair, then one per single. */
int kli_dense_values(const kli_pattern *p);
/* Zeroes the matrix once (entries off the pattern stay zero for good),
 * takes the column scales (n values, copied) and chooses the kernel. */
void kli_dense_init(kli_dense *d, const double *colscale, int kernel);
/* The kernel a request (an enum kl_kernel value) gives for this system:
 * AUTO chooses small up to KLI_SMALL_MAX unknowns, banded where the
 * ordered band is narrow, dense LAPACK LU otherwise. */
int kli_dense_choose(const kli_dense *d, int kernel);
/* Switches kernels; the factors must be recomputed. */
void kli_dense_use(kli_dense *d, int kernel);
/* Scatters the pattern's values of A (two per pair, then one per single)
 * into A D as the kernel in use factors it: the n x n matrix, the band, or
 * both for a system with damped steps. */
void kli_dense_load(kli_dense *d, const double *values);
/* After a caller wrote the matrix A D into d->a itself, on the pattern's
 * places (a_at) only and for the small kernel: takes its 1-norm, as
 * kli_dense_load does. */
void kli_dense_loaded(kli_dense *d);
/* LU-factors the loaded matrix; 0, or 1 if a pivot is exactly zero. */
int kli_dense_factor(kli_dense *d);
/* Reciprocal condition number (1-norm) of the factored, scaled matrix:
 * exact for the small kernel, LAPACK's dgecon / dgbcon estimate otherwise;
 * 0 when the factorization was singular. */
double kli_dense_rcond(kli_dense *d);
/* rcond, or a cheaper guaranteed lower bound on it when that shows it at
 * least `needed`: exact for the small kernel's 2 x 2 systems (closed form)
 * and as kli_dense_rcond for its others; for the LAPACK kernels a bound
 * from the factors' absolute values (one transposed pass through each),
 * and LAPACK's estimate only when the bound is below `needed`. The bound
 * never exceeds the true rcond, which never exceeds the estimate, so a
 * test rcond < t with t <= needed gives the verdict the estimate would. */
double kli_dense_rcond_at_least(kli_dense *d, double needed);
/* Sign of the determinant of the factored matrix (+1 or -1; 0 when
 * singular); the column scales are positive and do not change it. */
int kli_dense_det_sign(const kli_dense *d);
/* log |det| of the factored (scaled) matrix and its sign into *sign (0 and
 * -HUGE_VAL when singular): a smooth function of the position, whose
 * zeros along a branch are its singular positions. */
double kli_dense_log_det(const kli_dense *d, int *sign);
/* Solves A x = b in place with the factors (of A D: x = D (A D)^-1 b). */
void kli_dense_solve(const kli_dense *d, double *b);
/*
 * Damped least-squares (Levenberg-Marquardt) step in the scaled unknowns:
 * solves ((A D)^T (A D) + lambda I) y = -(A D)^T f, with lambda `damping`
 * times the mean diagonal of (A D)^T (A D), and returns dx = D y in `dx`.
 * Returns 0, or 1 if the matrix is zero or the damped matrix is not
 * positive definite (damping too small for the rounding).
 */
int kli_dense_damped_step(kli_dense *d, const double *f, double damping,
                          double *dx);
/* y = (A D)^T x, the scaled transpose, with the loaded matrix. */
void kli_dense_apply_transpose(const kli_dense *d, const double *x, double *y);
/* y = A x with the loaded matrix. */
void kli_dense_apply(const kli_dense *d, const double *x, double *y);

#endif
