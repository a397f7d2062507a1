/*
 * profile.c - a motion profile in time for one input of a model: its
 * value, rate, acceleration and jerk from segments built on the motion laws
 * (dwell, rise, return, constant speed), or from a table of times and
 * values through a natural cubic spline.
 */
#include <math.h>
#include <string.h>

#include "describe.h"
#include "memory.h"
#include "model.h"

static const char *const segment_names[] = {"dwell", "rise", "return",
                                            "constant speed"};

static int has_profile(const kl_model *m) {
  return m->nsegments > 0 || m->nknots > 0;
}

/* KL_OK if a profile for `input` may be recorded now; else its status. */
static int check_profile_input(kl_model *m, int input, const char *what) {
  char label[KLI_LABEL_SIZE], other[KLI_LABEL_SIZE];
  if (m->finalized)
    return kli_fail(m->error, KL_ESTATE,
                    "%s: the model is finalized and can no longer change",
                    what);
  if (input < 0 || input >= m->ninputs)
    return kli_fail_index(m->error, what, "input", input, m->ninputs);
  if (m->inputs[input] < 0)
    return kli_fail(m->error, KL_EKIND,
                    "%s: %s is a point input; a profile drives a joint's "
                    "input",
                    what, kli_input_label(m, input, label, sizeof label));
  if (has_profile(m) && input != m->profile_input)
    return kli_fail(m->error, KL_EDUPLICATE,
                    "%s: the model's profile drives %s, not %s", what,
                    kli_input_label(m, m->profile_input, other, sizeof other),
                    kli_input_label(m, input, label, sizeof label));
  return KL_OK;
}

/* What a segment of `kind` of input `input` asks of from and to. */
static int check_change(kl_model *m, int input, int kind, double from,
                        double to) {
  char a[48], b[48];
  kli_input_value(m, input, from, 15, a, sizeof a);
  kli_input_value(m, input, to, 15, b, sizeof b);
  if (kind == KL_SEGMENT_DWELL && to != from)
    return kli_fail(m->error, KL_EINVAL,
                    "add segment: a dwell holds its value, but from %s and "
                    "to %s differ",
                    a, b);
  if (kind == KL_SEGMENT_RISE && !(to > from))
    return kli_fail(m->error, KL_EINVAL,
                    "add segment: a rise goes up, but to %s is not above "
                    "from %s",
                    b, a);
  if (kind == KL_SEGMENT_RETURN && !(to < from))
    return kli_fail(m->error, KL_EINVAL,
                    "add segment: a return goes down, but to %s is not "
                    "below from %s",
                    b, a);
  return KL_OK;
}

double kl_model_profile_duration(const kl_model *m) {
  const kli_segment *last;
  if (m == NULL || !has_profile(m))
    return NAN;
  if (m->nknots > 0)
    return m->knots[m->nknots - 1].t - m->knots[0].t;
  last = &m->segments[m->nsegments - 1];
  return last->start + last->duration;
}

int kl_add_segment(kl_model *m, int input, int kind, int law,
                   double duration, double from, double to) {
  double law_out[4];
  kli_segment *k;
  int st;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_profile_input(m, input, "add segment")) != KL_OK)
    return st;
  if (m->nknots > 0)
    return kli_fail(m->error, KL_ESTATE,
                    "add segment: the profile is a table of times and values");
  if (kind < KL_SEGMENT_DWELL || kind > KL_SEGMENT_SPEED)
    return kli_fail(m->error, KL_EINVAL,
                    "add segment: %d is no segment kind", kind);
  if (!isfinite(duration) || !isfinite(from) || !isfinite(to))
    return kli_fail(m->error, KL_ENONFINITE,
                    "add segment: the %s's duration (%g), from (%g) or to "
                    "(%g) is NaN or infinite",
                    segment_names[kind], duration, from, to);
  if (!(duration > 0.0))
    return kli_fail(m->error, KL_EINVAL,
                    "add segment: the %s's duration %.17g is not positive",
                    segment_names[kind], duration);
  if ((kind == KL_SEGMENT_RISE || kind == KL_SEGMENT_RETURN) &&
      kl_motion_law(law, 0.0, law_out) != KL_OK)
    return kli_fail(m->error, KL_EINVAL,
                    "add segment: %d is no motion law for the %s", law,
                    segment_names[kind]);
  if ((st = check_change(m, input, kind, from, to)) != KL_OK)
    return st;
  if (m->nsegments > 0) {
    /* a segment starts where the last ended: the rounding of the caller's
     * arithmetic is forgiven, a gap is not */
    double end = m->segments[m->nsegments - 1].to;
    char a[48], b[48];
    if (fabs(from - end) > 1e-9 * fmax(1.0, fmax(fabs(end), fabs(from))))
      return kli_fail(m->error, KL_EJOIN,
                      "add segment: segment index %d (0-based, a %s) starts "
                      "at %s, but the one before ended at %s",
                      m->nsegments, segment_names[kind],
                      kli_input_value(m, input, from, 15, a, sizeof a),
                      kli_input_value(m, input, end, 15, b, sizeof b));
  }
  if (kli_reserve(&m->alloc, (void **)&m->segments, &m->cap_segments,
                  m->nsegments + 1, sizeof *m->segments) != KL_OK)
    return kli_fail(m->error, KL_ENOMEM, "add segment: out of memory");
  k = &m->segments[m->nsegments];
  k->kind = kind;
  k->law = kind == KL_SEGMENT_RISE || kind == KL_SEGMENT_RETURN ? law : 0;
  k->start = m->nsegments > 0 ? kl_model_profile_duration(m) : 0.0;
  k->duration = duration;
  k->from = m->nsegments > 0 ? m->segments[m->nsegments - 1].to : from;
  k->to = to;
  m->profile_input = input;
  return m->nsegments++;
}

/* The natural spline's second derivatives at the knots: the tridiagonal
 * system of the standard derivation (row i: h_{i-1} m_{i-1} + 2 (h_{i-1} +
 * h_i) m_i + h_i m_{i+1} = 6 (slope_i - slope_{i-1}), m = 0 at both ends),
 * solved by the Thomas algorithm. */
static void spline_curvature(kli_knot *k, int n) {
  int i;
  k[0].m = k[n - 1].m = 0.0;
  for (i = 1; i < n - 1; i++) {
    double h0 = k[i].t - k[i - 1].t, h1 = k[i + 1].t - k[i].t;
    k[i].work = 2.0 * (h0 + h1);
    k[i].m = 6.0 * ((k[i + 1].y - k[i].y) / h1 - (k[i].y - k[i - 1].y) / h0);
    if (i > 1) { /* eliminate the sub-diagonal h0 with the row above */
      double f = h0 / k[i - 1].work;
      k[i].work -= f * h0;
      k[i].m -= f * k[i - 1].m;
    }
  }
  for (i = n - 2; i >= 1; i--)
    k[i].m = (k[i].m - (k[i + 1].t - k[i].t) * k[i + 1].m) / k[i].work;
}

int kl_model_set_profile_table(kl_model *m, int input, int n,
                               const double *times, const double *values) {
  int st, i;
  if (m == NULL || (n > 0 && (times == NULL || values == NULL)))
    return KL_EINVAL;
  if ((st = check_profile_input(m, input, "set profile table")) != KL_OK)
    return st;
  if (m->nsegments > 0)
    return kli_fail(m->error, KL_ESTATE,
                    "set profile table: the profile holds segments");
  if (n < 2)
    return kli_fail(m->error, KL_EINVAL,
                    "set profile table: %d time%s; a table needs at least 2",
                    n, n == 1 ? "" : "s");
  for (i = 0; i < n; i++)
    if (!isfinite(times[i]) || !isfinite(values[i]))
      return kli_fail(m->error, KL_ENONFINITE,
                      "set profile table: time or value index %d (0-based) "
                      "is NaN or infinite",
                      i);
  for (i = 1; i < n; i++)
    if (!(times[i] > times[i - 1]))
      return kli_fail(m->error, KL_EINVAL,
                      "set profile table: time index %d (0-based, %.17g) "
                      "does not come after the one before (%.17g)",
                      i, times[i], times[i - 1]);
  if (kli_reserve(&m->alloc, (void **)&m->knots, &m->cap_knots, n,
                  sizeof *m->knots) != KL_OK)
    return kli_fail(m->error, KL_ENOMEM, "set profile table: out of memory");
  for (i = 0; i < n; i++) {
    m->knots[i].t = times[i];
    m->knots[i].y = values[i];
  }
  spline_curvature(m->knots, n);
  m->nknots = n;
  m->profile_input = input;
  return KL_OK;
}

int kl_model_profile_input(const kl_model *m) {
  if (m == NULL)
    return KL_EINVAL;
  return has_profile(m) ? m->profile_input : KL_EID;
}

int kl_model_segment_count(const kl_model *m) {
  return m == NULL ? KL_EINVAL : m->nsegments;
}

int kl_model_segment(const kl_model *m, int index, kl_segment *segment) {
  kl_segment out;
  const kli_segment *k;
  if (m == NULL || segment == NULL || segment->size < sizeof segment->size)
    return KL_EINVAL;
  if (index < 0 || index >= m->nsegments)
    return KL_EID;
  k = &m->segments[index];
  out.size = sizeof out;
  out.kind = k->kind;
  out.law = k->law;
  out.duration = k->duration;
  out.from = k->from;
  out.to = k->to;
  kli_copy_sized(segment, &out, sizeof out);
  return KL_OK;
}

int kl_model_table_count(const kl_model *m) {
  return m == NULL ? KL_EINVAL : m->nknots;
}

int kl_model_table_point(const kl_model *m, int index, double *time,
                         double *value) {
  if (m == NULL || time == NULL || value == NULL)
    return KL_EINVAL;
  if (index < 0 || index >= m->nknots)
    return KL_EID;
  *time = m->knots[index].t;
  *value = m->knots[index].y;
  return KL_OK;
}

/* A segment's value and derivatives at local time tau in [0, duration]. */
static void segment_motion(const kli_segment *k, double tau, double out[4]) {
  double T = k->duration, h = k->to - k->from, law[4];
  switch (k->kind) {
  case KL_SEGMENT_DWELL:
    out[0] = k->from;
    out[1] = out[2] = out[3] = 0.0;
    break;
  case KL_SEGMENT_SPEED:
    out[0] = k->from + h * tau / T;
    out[1] = h / T;
    out[2] = out[3] = 0.0;
    break;
  default: /* rise and return: the law in x = tau / T, by the chain rule */
    kl_motion_law(k->law, fmin(fmax(tau / T, 0.0), 1.0), law);
    out[0] = k->from + h * law[0];
    out[1] = h * law[1] / T;
    out[2] = h * law[2] / (T * T);
    out[3] = h * law[3] / (T * T * T);
    break;
  }
}

/* The spline's value and derivatives at time t of the table. */
static void table_motion(const kli_knot *k, int n, double t, double out[4]) {
  int lo = 0, hi = n - 1;
  double h, a, b;
  while (hi - lo > 1) { /* the interval [t_lo, t_lo+1] holding t */
    int mid = (lo + hi) / 2;
    if (t < k[mid].t)
      hi = mid;
    else
      lo = mid;
  }
  h = k[lo + 1].t - k[lo].t;
  a = (k[lo + 1].t - t) / h;
  b = (t - k[lo].t) / h;
  out[0] = a * k[lo].y + b * k[lo + 1].y +
           ((a * a * a - a) * k[lo].m + (b * b * b - b) * k[lo + 1].m) * h *
               h / 6.0;
  out[1] = (k[lo + 1].y - k[lo].y) / h -
           (3.0 * a * a - 1.0) * h * k[lo].m / 6.0 +
           (3.0 * b * b - 1.0) * h * k[lo + 1].m / 6.0;
  out[2] = a * k[lo].m + b * k[lo + 1].m;
  out[3] = (k[lo + 1].m - k[lo].m) / h;
}

int kl_model_profile_motion(const kl_model *m, double t, double out[4]) {
  double total;
  int lo, hi;
  if (m == NULL || out == NULL)
    return KL_EINVAL;
  if (!has_profile(m))
    return KL_EID;
  if (!isfinite(t))
    return KL_ENONFINITE;
  total = kl_model_profile_duration(m);
  if (t < 0.0 || t > total)
    return KL_EINVAL;
  if (m->nknots > 0) {
    table_motion(m->knots, m->nknots, m->knots[0].t + t, out);
    return KL_OK;
  }
  /* the segment holding t; at a joint, the later one */
  lo = 0;
  hi = m->nsegments - 1;
  while (lo < hi) {
    int mid = (lo + hi + 1) / 2;
    if (m->segments[mid].start <= t)
      lo = mid;
    else
      hi = mid - 1;
  }
  segment_motion(&m->segments[lo], t - m->segments[lo].start, out);
  return KL_OK;
}
