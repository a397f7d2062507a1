/*
 * cam.c - cams from a follower motion program: the follower's motion over
 * the cam angle, the pitch curve and cam surface, pressure angle, radius
 * of curvature, and the undercutting and pressure-angle checks.
 */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "model.h"

/* Segments a program may hold. */
#define KLI_CAM_MAX_SEGMENTS 10000
/* How closely the spans must make a turn and the lifts close (relative). */
#define KLI_CAM_CLOSURE 1e-9
/* How finely kl_cam_check places an extreme (rad of cam angle). */
#define KLI_CAM_REFINE 1e-9

struct kl_cam {
  kli_allocator alloc;
  kl_cam_follower follower;
  /* the follower's roller centre at displacement 0: the stem's height
   * (translating) or the arm's angle (oscillating) */
  double rest;
  kl_cam_segment *segments;
  int nsegments;
  double *start; /* nsegments + 1: each segment's first cam angle */
  double *level; /* nsegments: the displacement where each one starts */
  char error[KLI_MESSAGE_SIZE];
};

void kl_cam_follower_init(kl_cam_follower *f) {
  if (f == NULL)
    return;
  memset(f, 0, sizeof *f);
  f->size = sizeof *f;
  f->kind = KL_CAM_TRANSLATING;
  f->base_radius = 1.0;
  f->roller_radius = 0.25;
}

/* The program's arrays for n segments, in one block. */
static size_t program_bytes(int n) {
  return (size_t)n * sizeof(kl_cam_segment) + (size_t)(2 * n + 1) * sizeof(double);
}

static void free_program(kl_cam *c) {
  if (c->segments != NULL)
    kli_free(&c->alloc, c->segments, program_bytes(c->nsegments));
  c->segments = NULL;
  c->nsegments = 0;
}

kl_cam *kli_cam_new(const kli_allocator *a) {
  kl_cam_segment dwell = {2.0 * KLI_PI, 0.0, KL_LAW_HARMONIC};
  kl_cam_follower f;
  kl_cam *c = kli_alloc(a, sizeof *c);
  if (c == NULL)
    return NULL;
  memset(c, 0, sizeof *c);
  c->alloc = *a;
  kl_cam_follower_init(&f);
  if (kl_cam_set_follower(c, &f) != KL_OK ||
      kl_cam_set_program(c, 1, &dwell) != KL_OK) {
    kl_cam_free(c);
    return NULL;
  }
  c->error[0] = '\0';
  return c;
}

kl_cam *kl_cam_new(void) {
  kli_allocator a = {kli_default_alloc, NULL};
  return kli_cam_new(&a);
}

void kl_cam_free(kl_cam *c) {
  if (c == NULL)
    return;
  free_program(c);
  kli_free(&c->alloc, c, sizeof *c);
}

const char *kl_cam_error(const kl_cam *c) {
  return c == NULL ? "no cam (NULL pointer)" : c->error;
}

int kl_cam_set_follower(kl_cam *c, const kl_cam_follower *f) {
  kl_cam_follower g;
  double prime, rest;
  if (c == NULL)
    return KL_EINVAL;
  if (f == NULL || f->size < sizeof(size_t))
    return kli_fail(c->error, KL_EINVAL,
                    "set follower: the follower is NULL or its size is "
                    "not set (kl_cam_follower_init sets it)");
  /* a caller built with an older, shorter struct gives fewer fields */
  kl_cam_follower_init(&g);
  memcpy((char *)&g + sizeof g.size, (const char *)f + sizeof f->size,
         (f->size < sizeof g ? f->size : sizeof g) - sizeof g.size);
  if (g.kind != KL_CAM_TRANSLATING && g.kind != KL_CAM_OSCILLATING)
    return kli_fail(c->error, KL_EINVAL, "set follower: unknown kind %d",
                    g.kind);
  if (!isfinite(g.base_radius) || !isfinite(g.roller_radius) ||
      !isfinite(g.offset) || !isfinite(g.pivot_x) || !isfinite(g.pivot_y) ||
      !isfinite(g.arm_length))
    return kli_fail(c->error, KL_ENONFINITE,
                    "set follower: a dimension is NaN or infinite");
  if (g.base_radius <= 0.0 || g.roller_radius <= 0.0 ||
      (g.kind == KL_CAM_OSCILLATING && g.arm_length <= 0.0))
    return kli_fail(c->error, KL_ERADIUS,
                    "set follower: the %s %g is not positive",
                    g.base_radius <= 0.0     ? "base radius"
                    : g.roller_radius <= 0.0 ? "roller radius"
                                             : "arm length",
                    g.base_radius <= 0.0     ? g.base_radius
                    : g.roller_radius <= 0.0 ? g.roller_radius
                                             : g.arm_length);
  prime = g.base_radius + g.roller_radius;
  if (g.kind == KL_CAM_TRANSLATING) {
    if (fabs(g.offset) >= prime)
      return kli_fail(c->error, KL_EINVAL,
                      "set follower: the offset %g reaches the prime "
                      "circle (radius %g = base + roller): the stem's line "
                      "must cross it",
                      g.offset, prime);
    rest = sqrt(prime * prime - g.offset * g.offset);
  } else {
    double d = hypot(g.pivot_x, g.pivot_y), k;
    if (d <= prime)
      return kli_fail(c->error, KL_EINVAL,
                      "set follower: the pivot (%g, %g) lies inside the "
                      "prime circle (radius %g = base + roller)",
                      g.pivot_x, g.pivot_y, prime);
    k = (prime * prime - d * d - g.arm_length * g.arm_length) /
        (2.0 * g.arm_length * d);
    if (!(fabs(k) <= 1.0))
      return kli_fail(c->error, KL_EINVAL,
                      "set follower: an arm of length %g from the pivot "
                      "%g away cannot reach the prime circle (radius %g)",
                      g.arm_length, d, prime);
    /* of the two reaches, the one from which turning counter-clockwise
     * moves the roller away from the cam */
    rest = atan2(g.pivot_y, g.pivot_x) - acos(k);
  }
  c->follower = g;
  c->rest = rest;
  return KL_OK;
}

int kl_cam_set_program(kl_cam *c, int n, const kl_cam_segment *seg) {
  double turn = 0.0, lift = 0.0, largest = 0.0, lowest = 0.0, *start, *level;
  kl_cam_segment *copy;
  unsigned char *block;
  int i;
  if (c == NULL)
    return KL_EINVAL;
  if (seg == NULL || n < 1 || n > KLI_CAM_MAX_SEGMENTS)
    return kli_fail(c->error, KL_EINVAL,
                    "set program: %s (1 to %d segments)",
                    seg == NULL ? "the segments are NULL"
                                : "the number of segments is out of range",
                    KLI_CAM_MAX_SEGMENTS);
  for (i = 0; i < n; i++) {
    if (!isfinite(seg[i].span) || !isfinite(seg[i].lift))
      return kli_fail(c->error, KL_ENONFINITE,
                      "set program: segment index %d (0-based): its span "
                      "or lift is NaN or infinite",
                      i);
    if (seg[i].span <= 0.0)
      return kli_fail(c->error, KL_EINVAL,
                      "set program: segment index %d (0-based): its span "
                      "%g deg is not positive",
                      i, seg[i].span * 180.0 / KLI_PI);
    if (seg[i].lift != 0.0 &&
        (seg[i].law < KL_LAW_HARMONIC || seg[i].law > KL_LAW_MOD_SINE))
      return kli_fail(c->error, KL_EINVAL,
                      "set program: segment index %d (0-based) has unknown "
                      "motion law %d", i,
                      seg[i].law);
    turn += seg[i].span;
    lift += seg[i].lift;
    largest = fmax(largest, fabs(seg[i].lift));
  }
  if (fabs(turn - 2.0 * KLI_PI) > KLI_CAM_CLOSURE * 2.0 * KLI_PI)
    return kli_fail(c->error, KL_EINVAL,
                    "set program: the spans add up to %.10g deg, not one "
                    "turn (360 deg)",
                    turn * 180.0 / KLI_PI);
  if (fabs(lift) > KLI_CAM_CLOSURE * largest)
    return kli_fail(c->error, KL_EINVAL,
                    "set program: the lifts add up to %g, not 0: the "
                    "follower must come back to where it started",
                    lift);
  block = kli_alloc(&c->alloc, program_bytes(n));
  if (block == NULL)
    return kli_fail(c->error, KL_ENOMEM, "set program: out of memory");
  copy = (kl_cam_segment *)block;
  start = (double *)(block + (size_t)n * sizeof *copy);
  level = start + n + 1;
  memcpy(copy, seg, (size_t)n * sizeof *copy);
  start[0] = 0.0;
  level[0] = 0.0;
  for (i = 0; i < n; i++) {
    start[i + 1] = start[i] + seg[i].span;
    if (i + 1 < n)
      level[i + 1] = level[i] + seg[i].lift;
  }
  /* the published laws are monotonic, so the lowest displacement is where
   * a segment starts: count displacements from there */
  for (i = 0; i < n; i++)
    lowest = fmin(lowest, level[i]);
  for (i = 0; i < n; i++)
    level[i] -= lowest;
  free_program(c);
  c->segments = copy;
  c->start = start;
  c->level = level;
  c->nsegments = n;
  return KL_OK;
}

/* The motion at cam angle theta (finite), as kl_cam_motion. */
static void motion_at(const kl_cam *c, double theta, double out[4]) {
  double turn = 2.0 * KLI_PI, u = theta - turn * floor(theta / turn);
  int lo = 0, hi = c->nsegments - 1;
  const kl_cam_segment *sg;
  /* the segment holding u: the last whose start is at or before it */
  while (lo < hi) {
    int mid = (lo + hi + 1) / 2;
    if (c->start[mid] <= u)
      lo = mid;
    else
      hi = mid - 1;
  }
  sg = &c->segments[lo];
  out[0] = c->level[lo];
  out[1] = out[2] = out[3] = 0.0;
  if (sg->lift != 0.0) {
    double law[4], x = (u - c->start[lo]) / sg->span, per = 1.0 / sg->span;
    kl_motion_law(sg->law, fmin(fmax(x, 0.0), 1.0), law);
    out[0] += sg->lift * law[0];
    out[1] = sg->lift * law[1] * per;
    out[2] = sg->lift * law[2] * per * per;
    out[3] = sg->lift * law[3] * per * per * per;
  }
}

int kl_cam_motion(const kl_cam *c, double theta, double out[4]) {
  if (c == NULL || out == NULL)
    return KL_EINVAL;
  if (!isfinite(theta))
    return KL_ENONFINITE;
  motion_at(c, theta, out);
  return KL_OK;
}

/* J v: v turned a quarter counter-clockwise. */
static void perp(const double v[2], double out[2]) {
  out[0] = -v[1];
  out[1] = v[0];
}

static void sample_at(const kl_cam *c, double theta, double out[6]) {
  const kl_cam_follower *f = &c->follower;
  double s[4], F[3][2], D[2], T[2], A[2], JF[2], JF1[2], JT[2], cs, sn, norm,
      cross, N[2], P[2];
  int i;
  motion_at(c, theta, s);
  /* the roller centre F and its first two derivatives over the cam angle,
   * and the follower's direction of motion D, in the global frame */
  if (f->kind == KL_CAM_TRANSLATING) {
    F[0][0] = f->offset;
    F[0][1] = c->rest + s[0];
    F[1][0] = F[2][0] = 0.0;
    F[1][1] = s[1];
    F[2][1] = s[2];
    D[0] = 0.0;
    D[1] = 1.0;
  } else {
    double psi = c->rest + s[0], u[2], l = f->arm_length;
    u[0] = cos(psi);
    u[1] = sin(psi);
    perp(u, D);
    for (i = 0; i < 2; i++) {
      F[0][i] = (i == 0 ? f->pivot_x : f->pivot_y) + l * u[i];
      F[1][i] = l * s[1] * D[i];
      F[2][i] = l * s[2] * D[i] - l * s[1] * s[1] * u[i];
    }
  }
  /* in the cam's frame the point is P = R(-theta) F; its derivatives are
   * R(-theta) T and R(-theta) A with T = F' - J F, A = F'' - 2 J F' - F */
  perp(F[0], JF);
  perp(F[1], JF1);
  for (i = 0; i < 2; i++) {
    T[i] = F[1][i] - JF[i];
    A[i] = F[2][i] - 2.0 * JF1[i] - F[0][i];
  }
  perp(T, JT);
  norm = hypot(T[0], T[1]);
  /* the cam turns counter-clockwise, so the pitch curve runs clockwise
   * in its frame: J T points out of the cam */
  N[0] = JT[0] / norm;
  N[1] = JT[1] / norm;
  cross = T[0] * A[1] - T[1] * A[0];
  cs = cos(theta);
  sn = sin(theta);
  P[0] = cs * F[0][0] + sn * F[0][1];
  P[1] = -sn * F[0][0] + cs * F[0][1];
  out[KL_CAM_PITCH_X] = P[0];
  out[KL_CAM_PITCH_Y] = P[1];
  out[KL_CAM_SURFACE_X] = P[0] - f->roller_radius * (cs * N[0] + sn * N[1]);
  out[KL_CAM_SURFACE_Y] = P[1] - f->roller_radius * (-sn * N[0] + cs * N[1]);
  out[KL_CAM_PRESSURE] = atan2(T[0] * D[0] + T[1] * D[1],
                               JT[0] * D[0] + JT[1] * D[1]);
  out[KL_CAM_CURVATURE] = cross == 0.0 ? INFINITY : -norm * norm * norm / cross;
}

int kl_cam_sample(const kl_cam *c, double theta, double out[6]) {
  if (c == NULL || out == NULL)
    return KL_EINVAL;
  if (!isfinite(theta))
    return KL_ENONFINITE;
  sample_at(c, theta, out);
  return KL_OK;
}

int kl_cam_outline(const kl_cam *c, int n, double *pitch_xy,
                   double *surface_xy) {
  int k;
  if (c == NULL || n < 3)
    return KL_EINVAL;
  for (k = 0; k < n; k++) {
    double out[KL_CAM_SAMPLE_SIZE];
    sample_at(c, 2.0 * KLI_PI * k / n, out);
    if (pitch_xy != NULL) {
      pitch_xy[2 * k] = out[KL_CAM_PITCH_X];
      pitch_xy[2 * k + 1] = out[KL_CAM_PITCH_Y];
    }
    if (surface_xy != NULL) {
      surface_xy[2 * k] = out[KL_CAM_SURFACE_X];
      surface_xy[2 * k + 1] = out[KL_CAM_SURFACE_Y];
    }
  }
  return KL_OK;
}

/* What kl_cam_check minimises: minus |pressure angle| (which = 0), or the
 * convex radius of curvature (which = 1; infinite where not convex). */
static double judged(const kl_cam *c, int which, double theta) {
  double out[KL_CAM_SAMPLE_SIZE];
  sample_at(c, theta, out);
  if (which == 0)
    return -fabs(out[KL_CAM_PRESSURE]);
  return out[KL_CAM_CURVATURE] > 0.0 ? out[KL_CAM_CURVATURE] : INFINITY;
}

/* Golden-section search for the least of `which` in [a, b]. */
static double refine(const kl_cam *c, int which, double a, double b) {
  const double g = 0.5 * (sqrt(5.0) - 1.0);
  double x1 = b - g * (b - a), x2 = a + g * (b - a);
  double f1 = judged(c, which, x1), f2 = judged(c, which, x2);
  while (b - a > KLI_CAM_REFINE) {
    if (f1 <= f2) {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - g * (b - a);
      f1 = judged(c, which, x1);
    } else {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + g * (b - a);
      f2 = judged(c, which, x2);
    }
  }
  return f1 <= f2 ? x1 : x2;
}

int kl_cam_check(kl_cam *c, int nsamples, double max_pressure,
                 kl_cam_report *report) {
  double step, best[2] = {INFINITY, INFINITY}, at[2] = {NAN, NAN}, turn;
  int k, which, worst[2] = {-1, -1};
  kl_cam_report r;
  if (c == NULL)
    return KL_EINVAL;
  if (nsamples < 8 || (report != NULL && report->size < sizeof r.size))
    return kli_fail(c->error, KL_EINVAL,
                    "check: %s",
                    nsamples < 8 ? "fewer than 8 samples"
                                 : "the report's size is not set");
  if (!isfinite(max_pressure))
    return kli_fail(c->error, KL_ENONFINITE,
                    "check: the pressure-angle bound is NaN or infinite");
  if (max_pressure <= 0.0)
    return kli_fail(c->error, KL_EINVAL,
                    "check: the pressure-angle bound %g is not positive",
                    max_pressure);
  turn = 2.0 * KLI_PI;
  step = turn / nsamples;
  for (k = 0; k < nsamples; k++)
    for (which = 0; which < 2; which++) {
      double v = judged(c, which, k * step);
      if (v < best[which]) {
        best[which] = v;
        worst[which] = k;
      }
    }
  for (which = 0; which < 2; which++) {
    double x, v;
    if (worst[which] < 0)
      continue;
    x = refine(c, which, (worst[which] - 1) * step, (worst[which] + 1) * step);
    v = judged(c, which, x);
    at[which] = worst[which] * step;
    if (v < best[which]) {
      best[which] = v;
      at[which] = x;
    }
    at[which] -= turn * floor(at[which] / turn);
  }
  memset(&r, 0, sizeof r);
  r.size = sizeof r;
  r.max_pressure = -best[0];
  r.max_pressure_angle = at[0];
  r.min_convex_radius = best[1];
  r.min_convex_angle = isfinite(best[1]) ? at[1] : NAN;
  if (report != NULL)
    kli_copy_sized(report, &r, sizeof r);
  if (isfinite(best[1]) && c->follower.roller_radius >= best[1])
    return kli_fail(c->error, KL_EUNDERCUT,
                    "check: the roller (radius %g) undercuts the cam at cam "
                    "angle %.4f deg, where the pitch curve's convex radius "
                    "of curvature is %g (the roller must stay below it)",
                    c->follower.roller_radius, at[1] * 180.0 / KLI_PI,
                    best[1]);
  if (-best[0] > max_pressure)
    return kli_fail(c->error, KL_EPRESSURE,
                    "check: the pressure angle reaches %.4f deg at cam "
                    "angle %.4f deg, above the bound %.4f deg",
                    -best[0] * 180.0 / KLI_PI, at[0] * 180.0 / KLI_PI,
                    max_pressure * 180.0 / KLI_PI);
  return KL_OK;
}

kl_cam *kli_cam_copy(const kli_allocator *a, const kl_cam *from) {
  kl_cam *c = kli_cam_new(a);
  if (c == NULL)
    return NULL;
  if (kl_cam_set_program(c, from->nsegments, from->segments) != KL_OK) {
    kl_cam_free(c);
    return NULL;
  }
  c->follower = from->follower;
  c->rest = from->rest;
  return c;
}

int kl_cam_set_from_model(kl_cam *c, const kl_model *m, int joint) {
  const kl_cam *from;
  int st;
  if (c == NULL)
    return KL_EINVAL;
  if ((st = kl_model_cam_bearing(m, joint)) < 0)
    return kli_fail(c->error, st, "set from model: %s",
                    st == KL_EKIND  ? "the joint is not a cam joint"
                    : st == KL_EID ? "no such joint in the model"
                                   : "the model is NULL");
  from = m->joints[joint].cam;
  if ((st = kl_cam_set_program(c, from->nsegments, from->segments)) != KL_OK)
    return st;
  c->follower = from->follower;
  c->rest = from->rest;
  return KL_OK;
}

const kl_cam_follower *kli_cam_follower_of(const kl_cam *c) {
  return &c->follower;
}

const kl_cam_segment *kli_cam_program_of(const kl_cam *c, int *n) {
  *n = c->nsegments;
  return c->segments;
}
