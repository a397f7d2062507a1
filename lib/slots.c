/*
 * slots.c - the path a sliding joint's pin follows in its guide link's
 * frame: a line, a circle, or a C2 cubic spline through points in a uniform
 * parameter, built once and evaluated in O(1).
 */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "slots.h"

/* More points than this are refused as out of memory (the spline's block
 * size must stay far inside size_t and int). */
#define KLI_CURVE_MAX_POINTS 10000000

size_t kli_curve_bytes(int n) {
  return sizeof(kli_curve) + (size_t)n * 4 * sizeof(double);
}

/* Solves the tridiagonal system with 1 off the diagonal and diagonal 4,
 * except `first` and `last` at its ends, for n unknowns x (rhs d; c is
 * scratch of n): the Thomas algorithm, stable here as the system is
 * diagonally dominant. */
static void solve_tridiagonal(int n, double first, double last,
                              const double *d, double *x, double *c) {
  int i;
  double den = first;
  c[0] = 1.0 / den;
  x[0] = d[0] / den;
  for (i = 1; i < n; i++) {
    den = (i == n - 1 ? last : 4.0) - c[i - 1];
    c[i] = 1.0 / den;
    x[i] = (d[i] - x[i - 1]) / den;
  }
  for (i = n - 2; i >= 0; i--)
    x[i] -= c[i] * x[i + 1];
}

/* The spline's second derivatives along one axis (stride 2 in xy and m2):
 * M[k-1] + 4 M[k] + M[k+1] = 6 (y[k+1] - 2 y[k] + y[k-1]) at every point
 * of a closed curve (indices modulo n), at the inner points of an open one
 * whose end values are 0 (the natural ends). The closed system is cyclic:
 * it is solved as a tridiagonal one plus a rank-one correction
 * (Sherman-Morrison). `work` holds 4 n doubles. */
static void second_derivatives(int n, int closed, const double *y, double *m2,
                               double *work) {
  double *d = work, *x = work + n, *z = work + 2 * n, *c = work + 3 * n;
  int k;
  if (closed) {
    const double gamma = -4.0; /* minus the first diagonal entry */
    double fact;
    for (k = 0; k < n; k++)
      d[k] = 6.0 * (y[2 * ((k + 1) % n)] - 2.0 * y[2 * k] +
                    y[2 * ((k + n - 1) % n)]);
    solve_tridiagonal(n, 4.0 - gamma, 4.0 - 1.0 / gamma, d, x, c);
    for (k = 0; k < n; k++)
      d[k] = k == 0 ? gamma : k == n - 1 ? 1.0 : 0.0;
    solve_tridiagonal(n, 4.0 - gamma, 4.0 - 1.0 / gamma, d, z, c);
    fact = (x[0] + x[n - 1] / gamma) / (1.0 + z[0] + z[n - 1] / gamma);
    for (k = 0; k < n; k++)
      m2[2 * k] = x[k] - fact * z[k];
    return;
  }
  m2[0] = m2[2 * (n - 1)] = 0.0;
  if (n < 3)
    return;
  for (k = 1; k < n - 1; k++)
    d[k - 1] = 6.0 * (y[2 * (k + 1)] - 2.0 * y[2 * k] + y[2 * (k - 1)]);
  solve_tridiagonal(n - 2, 4.0, 4.0, d, x, c);
  for (k = 1; k < n - 1; k++)
    m2[2 * k] = x[k - 1];
}

static void carve_curve(kli_curve *c, int n) {
  c->xy = (double *)(c + 1);
  c->m2 = c->xy + 2 * n;
  c->n = n;
}

int kli_curve_new(const kli_allocator *a, int n, const double *xy, int closed,
                  char *error, const char *what, kli_curve **out) {
  kli_curve *c;
  double *work;
  int k, least = closed ? 3 : 2;
  *out = NULL;
  if (xy == NULL)
    return kli_fail(error, KL_EINVAL, "%s: the points are NULL", what);
  if (n < least)
    return kli_fail(error, KL_EFEWPOINTS,
                    "%s: %d point%s given; an %s curve needs at least %d",
                    what, n, n == 1 ? "" : "s", closed ? "closed" : "open",
                    least);
  if (n > KLI_CURVE_MAX_POINTS)
    return kli_fail(error, KL_ENOMEM,
                    "%s: %d points exceed the %d a curve may hold", what, n,
                    KLI_CURVE_MAX_POINTS);
  for (k = 0; k < 2 * n; k++)
    if (!isfinite(xy[k]))
      return kli_fail(error, KL_ENONFINITE,
                      "%s: the %s coordinate of point index %d (0-based) is "
                      "NaN or infinite",
                      what, k % 2 == 0 ? "x" : "y", k / 2);
  for (k = 0; k < (closed ? n : n - 1); k++) {
    int next = (k + 1) % n;
    if (xy[2 * k] == xy[2 * next] && xy[2 * k + 1] == xy[2 * next + 1])
      return kli_fail(error, KL_EREPEATED,
                      "%s: point indices %d and %d (0-based) are the same "
                      "(%g, %g): a piece of zero length, along which the "
                      "parameter has no direction",
                      what, k, next, xy[2 * k], xy[2 * k + 1]);
  }
  c = kli_alloc(a, kli_curve_bytes(n));
  work = kli_alloc(a, (size_t)n * 4 * sizeof(double));
  if (c == NULL || work == NULL) {
    kli_free(a, c, c == NULL ? 0 : kli_curve_bytes(n));
    kli_free(a, work, work == NULL ? 0 : (size_t)n * 4 * sizeof(double));
    return kli_fail(error, KL_ENOMEM, "%s: out of memory", what);
  }
  carve_curve(c, n);
  c->closed = closed != 0;
  memcpy(c->xy, xy, (size_t)n * 2 * sizeof(double));
  second_derivatives(n, c->closed, c->xy, c->m2, work);
  second_derivatives(n, c->closed, c->xy + 1, c->m2 + 1, work);
  kli_free(a, work, (size_t)n * 4 * sizeof(double));
  *out = c;
  return KL_OK;
}

kli_curve *kli_curve_copy(const kli_allocator *a, const kli_curve *from) {
  kli_curve *c = kli_alloc(a, kli_curve_bytes(from->n));
  if (c == NULL)
    return NULL;
  carve_curve(c, from->n);
  c->closed = from->closed;
  memcpy(c->xy, from->xy, (size_t)from->n * 4 * sizeof(double));
  return c;
}

void kli_curve_free(const kli_allocator *a, kli_curve *c) {
  if (c != NULL)
    kli_free(a, c, kli_curve_bytes(c->n));
}

double kli_curve_end(const kli_curve *c) { return (double)(c->n - 1); }

/* The spline on piece k (points k and k + 1, the next modulo n) at local
 * parameter f in [0, 1]. */
static void spline_piece(const kli_curve *c, int k, double f, double out[6]) {
  int next = (k + 1) % c->n, i;
  double e = 1.0 - f;
  for (i = 0; i < 2; i++) {
    double y0 = c->xy[2 * k + i], y1 = c->xy[2 * next + i];
    double m0 = c->m2[2 * k + i], m1 = c->m2[2 * next + i];
    out[i] = e * y0 + f * y1 + ((e * e * e - e) * m0 + (f * f * f - f) * m1) / 6.0;
    out[2 + i] = y1 - y0 + ((1.0 - 3.0 * e * e) * m0 + (3.0 * f * f - 1.0) * m1) / 6.0;
    out[4 + i] = e * m0 + f * m1;
  }
}

static void spline_at(const kli_curve *c, double t, double out[6]) {
  int i;
  if (!isfinite(t) || fabs(t) > 1e15) {
    for (i = 0; i < 6; i++)
      out[i] = NAN;
    return;
  }
  if (c->closed) {
    double u = t - c->n * floor(t / c->n);
    int k = (int)u;
    if (k >= c->n) /* u rounded up to n */
      k = c->n - 1;
    spline_piece(c, k, u - k, out);
  } else if (t < 0.0 || t > c->n - 1) {
    /* along the end tangent: the natural end has zero curvature there */
    int end = t > 0.0;
    spline_piece(c, end ? c->n - 2 : 0, end ? 1.0 : 0.0, out);
    for (i = 0; i < 2; i++) {
      out[i] += (end ? t - (c->n - 1) : t) * out[2 + i];
      out[4 + i] = 0.0;
    }
  } else {
    int k = (int)t;
    if (k > c->n - 2)
      k = c->n - 2;
    spline_piece(c, k, t - k, out);
  }
}

void kli_slot_path(const kli_joint *j, double s, double out[6]) {
  if (j->kind == KL_JOINT_CURVE_SLOT) {
    spline_at(j->curve, s, out);
  } else if (j->kind == KL_JOINT_ARC_SLOT) {
    double r = j->radius, c = cos(s / r), sn = sin(s / r);
    out[0] = r * c;
    out[1] = r * sn;
    out[2] = -sn;
    out[3] = c;
    out[4] = -c / r;
    out[5] = -sn / r;
  } else {
    out[0] = s * j->axis_cs[0];
    out[1] = s * j->axis_cs[1];
    out[2] = j->axis_cs[0];
    out[3] = j->axis_cs[1];
    out[4] = out[5] = 0.0;
  }
}

void kli_slot_path_third(const kli_joint *j, double s, double out[2]) {
  out[0] = out[1] = 0.0;
  if (j->kind == KL_JOINT_CURVE_SLOT) {
    const kli_curve *c = j->curve;
    int k, i;
    if (!isfinite(s) || fabs(s) > 1e15) {
      out[0] = out[1] = NAN;
      return;
    }
    if (c->closed) {
      double u = s - c->n * floor(s / c->n);
      k = (int)u >= c->n ? c->n - 1 : (int)u;
    } else if (s < 0.0 || s > c->n - 1) {
      return; /* along the end tangent: a straight line */
    } else {
      k = (int)s > c->n - 2 ? c->n - 2 : (int)s;
    }
    for (i = 0; i < 2; i++)
      out[i] = c->m2[2 * ((k + 1) % c->n) + i] - c->m2[2 * k + i];
  } else if (j->kind == KL_JOINT_ARC_SLOT) {
    double r = j->radius;
    out[0] = sin(s / r) / (r * r);
    out[1] = -cos(s / r) / (r * r);
  }
}

int kli_slide_on_slot(const kli_joint *j, double s) {
  /* a rounding error's slack, so that a sweep's located end solves */
  const double slack = 1e-12;
  if (j->kind != KL_JOINT_CURVE_SLOT || j->curve->closed)
    return 1;
  return s >= -slack * j->curve->n &&
         s <= kli_curve_end(j->curve) * (1.0 + slack);
}
