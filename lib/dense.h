/*
 * dense.h - private: the one module that decides how the Jacobian system is
 * stored, factored and solved (LAPACK LU through LAPACKE) and the only one
 * that talks to LAPACK.
 */
#ifndef KINLOOP_DENSE_H
#define KINLOOP_DENSE_H

#include "memory.h"

typedef struct {
  int n;             /* unknowns = equations */
  int npairs;        /* nonzero pairs: rows (r, r + 1) of column c */
  const int *row, *col;
  double *a;         /* the assembled matrix, column-major n x n */
  double *lu;        /* LU factors of a */
  int *ipiv;
  double *work;      /* 4 n, for dgecon */
  int *iwork;        /* n, for dgecon */
  double *normal;    /* n x n: A^T A + lambda I for damped steps */
  double anorm;      /* 1-norm of a when factored */
  int singular;      /* factorization met an exact zero pivot */
} kli_dense;

/* Carves the arrays for an n x n system with the given pattern. */
void kli_dense_carve(kli_dense *d, kli_carver *c, int n, int npairs,
                     const int *row, const int *col);
/* Zeroes the matrix once; entries off the pattern stay zero for good. */
void kli_dense_init(kli_dense *d);
/* Scatters the pattern's values (two per pair) into the matrix. */
void kli_dense_load(kli_dense *d, const double *pairs);
/* LU-factors the loaded matrix; 0, or 1 if a pivot is exactly zero. */
int kli_dense_factor(kli_dense *d);
/* Reciprocal condition estimate (1-norm) of the factored matrix; 0 when
 * the factorization was singular. */
double kli_dense_rcond(kli_dense *d);
/* Solves A x = b in place with the factors. */
void kli_dense_solve(const kli_dense *d, double *b);
/*
 * Damped least-squares (Levenberg-Marquardt) step of the loaded matrix:
 * solves (A^T A + lambda I) dx = -A^T f. Returns 0, or 1 if the damped
 * matrix is not positive definite (lambda too small for the rounding).
 */
int kli_dense_damped_step(kli_dense *d, const double *f, double lambda,
                          double *dx);
/* y = A^T x with the loaded matrix. */
void kli_dense_apply_transpose(const kli_dense *d, const double *x, double *y);
/* y = A x with the loaded matrix. */
void kli_dense_apply(const kli_dense *d, const double *x, double *y);

#endif
