/*
 * study.c - design studies: each sample a perturbed copy of the nominal
 * model, started from the nominal solution and traced by continuation;
 * samples on threads, a counter-based random stream, exact summaries.
 */
#define _POSIX_C_SOURCE 200809L
#include <math.h>
#include <pthread.h>
#include <stdio.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "study.h"


/* ---- the random stream: a value for every (seed, sample, draw) ---- */

/* SplitMix64's finalizer: a bijective 64-bit mix with good avalanche. */
static uint64_t mix(uint64_t z) {
  z += 0x9e3779b97f4a7c15u;
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9u;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebu;
  return z ^ (z >> 31);
}

/* A uniform number in (0, 1) that depends on the seed, the sample and the
 * draw alone: no state, so any thread or process draws the same. */
static double uniform_at(uint64_t seed, long sample, int draw) {
  uint64_t h = mix(mix(seed ^ mix((uint64_t)sample)) + (uint64_t)draw);
  return ((double)(h >> 11) + 0.5) * (1.0 / 9007199254740992.0);
}

/* The value of dimension d in sample i (i < 0: the nominal). */
static double dimension_value(const kl_study *st, int d, long i) {
  const kli_vary *v = &st->vary[d];
  if (i < 0)
    return v->nominal;
  if (v->how == KLI_VARY_GRID) {
    long digit = i;
    int k;
    for (k = 0; k < d; k++)
      digit /= st->vary[k].steps + 1;
    digit %= v->steps + 1;
    return v->steps == 0 ? v->from
                         : v->from + (v->to - v->from) * (double)digit / v->steps;
  }
  {
    double u1 = uniform_at(st->seed, i, 2 * d);
    double u2 = uniform_at(st->seed, i, 2 * d + 1);
    if (v->how == KLI_VARY_UNIFORM)
      return v->nominal + v->tolerance * (2.0 * u1 - 1.0);
    /* Box-Muller; the tolerance is three standard deviations */
    return v->nominal + v->tolerance / 3.0 * sqrt(-2.0 * log(u1)) *
                            cos(2.0 * KLI_PI * u2);
  }
}

static double *dimension_slot(kl_model *m, const kli_vary *v) {
  if (v->where.joint < 0)
    return &m->points[v->where.point].at[v->where.axis];
  return &m->joints[v->where.joint]
              .at[v->dim.kind == KL_DIMENSION_JOINT_A ? 0 : 1][v->where.axis];
}

/* ---- one sample ---- */

/* An input's value at the start when the study does not sweep it: the
 * model's `hold`, else 0. */
static double held(const kl_model *m, int input) {
  double hold = kl_model_input_hold(m, input);
  return isnan(hold) ? 0.0 : hold;
}

/* The solver at the start of the sweep, sketched from the nominal. */
static int start_at_sweep(const kl_study *st, kl_solver *s) {
  const kl_model *m = st->model;
  double u[64];
  int l, j, i;
  for (l = 1; l < m->nlinks; l++)
    kl_set_link_angle(s, l, kl_link_angle(st->nominal, l));
  for (j = 0; j < m->njoints; j++)
    if (kli_is_sliding(m->joints[j].kind))
      kl_set_joint_slide(s, j, kl_joint_slide(st->nominal, j));
  for (i = 0; i < m->ninputs && i < 64; i++)
    u[i] = i == st->sweep.input ? st->sweep.from : held(m, i);
  return kl_solve_position(s, u);
}

double kli_study_steps_to(const kl_study *st, double u) {
  double full = fabs(st->sweep.to - st->sweep.from);
  double part = fabs(u - st->sweep.from);
  double n = full > 0.0 ? ceil(st->sweep.steps * (part / full)) : 1.0;
  return n < 1.0 ? 1.0 : n;
}

/* kli_study_steps_to as a sweep's steps: in range before the cast (the
 * reader refuses an 'at' beyond KL_MAX_STEPS; should one get here, the
 * sweep refuses KL_MAX_STEPS + 1 rather than run a count it was not
 * given). */
static int steps_to(const kl_study *st, double u) {
  double n = kli_study_steps_to(st, u);
  return n <= KL_MAX_STEPS ? (int)n : KL_MAX_STEPS + 1;
}

/* One judged output of a solver at the sweep's start (which it may move). */
static int judge_one(const kl_study *st, const kli_judge *j, kl_solver *s,
                     double *value) {
  const kl_sweep_settings *sw = &st->sweep;
  kl_range r;
  kl_sweep_result res;
  int status;
  r.size = sizeof r;
  res.size = sizeof res;
  switch (j->how) {
  case KLI_JUDGE_SWING:
  case KLI_JUDGE_MIN:
  case KLI_JUDGE_MAX:
    status = kl_output_range(s, sw->input, sw->from, sw->to, sw->steps,
                             &j->what, &r);
    if (status < 0)
      return status;
    *value = j->how == KLI_JUDGE_SWING ? r.max - r.min
             : j->how == KLI_JUDGE_MIN ? r.min
                                       : r.max;
    break;
  case KLI_JUDGE_AT:
    status = kl_solver_sweep(s, sw->input, sw->from, j->at, steps_to(st, j->at),
                      NULL, NULL, &res);
    if (status < 0)
      return status;
    *value = status == KL_LIMIT ? NAN : kli_output_value(s, &j->what);
    break;
  case KLI_JUDGE_REACH:
    status = kl_solver_sweep(s, sw->input, sw->from, sw->to, sw->steps, NULL, NULL,
                      &res);
    if (status < 0)
      return status;
    *value = status == KL_LIMIT ? res.limit_input : sw->to;
    break;
  default: /* KLI_JUDGE_EFFORT: the worst over the reachable part */
    status = kl_input_effort_range(s, sw->input, sw->from, sw->to, sw->steps,
                                   st->nloads, st->loads, sw->input, &r);
    if (status < 0)
      return status;
    *value = fabs(r.max) >= fabs(r.min) ? r.max : r.min;
  }
  *value *= j->to_file;
  /* KL_LIMIT: the value covers the part of the sweep the motion reached */
  return status == KL_LIMIT ? KL_LIMIT : KL_OK;
}

/* Sample i (i < 0: the nominal): its outputs, status and dimensions. */
static int run_sample(const kl_study *st, long i, double *values, int *status,
                      double *dims) {
  kl_model *m = kli_model_copy(st->model);
  kl_solver *s = NULL, *start = NULL;
  int d, k, result = KL_OK;
  *status = KL_SAMPLE_NO_ASSEMBLY;
  for (k = 0; k < st->njudge; k++)
    values[k] = NAN;
  if (m == NULL)
    return KL_ENOMEM;
  for (d = 0; d < st->nvary; d++) {
    double v = dimension_value(st, d, i);
    *dimension_slot(m, &st->vary[d]) = v;
    if (dims != NULL)
      dims[d] = v;
  }
  if ((d = kl_model_finalize(m)) != KL_OK) {
    if (d == KL_ENOMEM)
      result = KL_ENOMEM;
    goto done; /* else a perturbation made a link zero-length, say */
  }
  s = kl_solver_new(m);
  start = kl_solver_new(m);
  if (s == NULL || start == NULL) {
    result = KL_ENOMEM;
    goto done;
  }
  if (start_at_sweep(st, s) != KL_OK)
    goto done;
  kl_solver_copy_state(start, s);
  *status = KL_SAMPLE_OK;
  for (k = 0; k < st->njudge; k++) {
    int judged;
    kl_solver_copy_state(s, start);
    judged = judge_one(st, &st->judge[k], s, &values[k]);
    if (judged < 0) {
      for (k = 0; k < st->njudge; k++)
        values[k] = NAN;
      *status = KL_SAMPLE_NO_ASSEMBLY;
      goto done;
    }
    if (judged == KL_LIMIT)
      *status = KL_SAMPLE_LIMITED;
  }
done:
  kl_solver_free(s);
  kl_solver_free(start);
  kl_model_free(m);
  return result;
}

/* ---- running samples on threads ---- */

typedef struct {
  const kl_study *st;
  long first, count;
  int stride, offset;
  double *values, *dims;
  int *status;
  int result;
} work;

static void *run_share(void *arg) {
  work *w = arg;
  long i;
  size_t nout = (size_t)w->st->njudge, nd = (size_t)w->st->nvary;
  w->result = KL_OK;
  /* i < count <= samples - first, so first + i and the offsets (bounded
   * by run_range_ok) never overflow */
  for (i = w->offset; i < w->count; i += w->stride) {
    int r = run_sample(w->st, w->first + i, w->values + (size_t)i * nout,
                       w->status + i,
                       w->dims == NULL ? NULL : w->dims + (size_t)i * nd);
    if (r != KL_OK)
      w->result = r;
  }
  return NULL;
}

/* Whether samples first .. first + count - 1 exist, and their arrays'
 * sizes fit a size_t: checked without forming a sum or product that could
 * overflow (first + count wraps for a count near LONG_MAX). */
static int run_range_ok(const kl_study *st, long first, long count) {
  size_t widest = (size_t)(st->njudge > st->nvary ? st->njudge : st->nvary);
  if (first < 0 || count < 0 || first > st->samples ||
      count > st->samples - first)
    return 0;
  return widest == 0 ||
         (size_t)count <= SIZE_MAX / sizeof(double) / widest;
}

int kl_study_run(const kl_study *st, long first, long count, int threads,
                 double *values, int *sample_status, double *dims) {
  work shares[64];
  pthread_t ids[64];
  int t, started = 0, result = KL_OK;
  if (st == NULL)
    return KL_EINVAL;
  if (!st->prepared)
    return KL_ESTAGE;
  if (!run_range_ok(st, first, count) ||
      (count > 0 && (values == NULL || sample_status == NULL)))
    return KL_EINVAL;
  if (threads <= 0)
    threads = (int)sysconf(_SC_NPROCESSORS_ONLN);
  if (threads < 1)
    threads = 1;
  if (threads > 64)
    threads = 64;
  if (threads > count)
    threads = count > 0 ? (int)count : 1;
  for (t = 0; t < threads; t++) {
    shares[t].st = st;
    shares[t].first = first;
    shares[t].count = count;
    shares[t].stride = threads;
    shares[t].offset = t;
    shares[t].values = values;
    shares[t].dims = dims;
    shares[t].status = sample_status;
  }
  /* the last share runs on this thread */
  for (t = 0; t + 1 < threads; t++)
    if (pthread_create(&ids[t], NULL, run_share, &shares[t]) == 0)
      started++;
    else
      break;
  /* shares whose thread could not start run here too */
  for (; t < threads; t++)
    run_share(&shares[t]);
  for (t = 0; t < started; t++)
    pthread_join(ids[t], NULL);
  for (t = 0; t < threads; t++)
    if (shares[t].result != KL_OK)
      result = shares[t].result;
  return result;
}

/* ---- the nominal and first-order estimates ---- */

/* The standard deviation of dimension d's distribution. */
static double dimension_std(const kli_vary *v) {
  return v->how == KLI_VARY_UNIFORM ? v->tolerance / sqrt(3.0)
                                    : v->tolerance / 3.0;
}

/* First-order standard deviation of output j at the nominal: the
 * sensitivities at the input where the output is taken (for an extreme,
 * the envelope theorem: at its argument). NaN where not estimated. */
static double first_order(kl_study *st, const kli_judge *j, kl_solver *s,
                          const kl_solver *start) {
  const kl_sweep_settings *sw = &st->sweep;
  double at[2], sum = 0.0;
  int points = 1, d, p;
  kl_range r;
  kl_sweep_result res;
  if (st->grid || j->how == KLI_JUDGE_REACH || j->how == KLI_JUDGE_EFFORT)
    return NAN;
  r.size = sizeof r;
  res.size = sizeof res;
  if (j->how == KLI_JUDGE_AT) {
    at[0] = j->at;
  } else {
    kl_solver_copy_state(s, start);
    if (kl_output_range(s, sw->input, sw->from, sw->to, sw->steps, &j->what,
                        &r) < 0)
      return NAN;
    at[0] = j->how == KLI_JUDGE_MIN ? r.input_at_min : r.input_at_max;
    at[1] = r.input_at_min;
    points = j->how == KLI_JUDGE_SWING ? 2 : 1;
  }
  for (d = 0; d < st->nvary; d++) {
    double deriv = 0.0;
    for (p = 0; p < points; p++) {
      double dp;
      kl_solver_copy_state(s, start);
      if (kl_solver_sweep(s, sw->input, sw->from, at[p], steps_to(st, at[p]), NULL,
                   NULL, &res) != KL_OK ||
          kl_output_sensitivity(s, &j->what, &st->vary[d].dim, &dp) != KL_OK)
        return NAN;
      deriv += p == 0 ? dp : -dp; /* the swing: at the max minus at the min */
    }
    sum += deriv * dimension_std(&st->vary[d]) * deriv *
           dimension_std(&st->vary[d]);
  }
  return sqrt(sum) * fabs(j->to_file);
}

int kli_study_resolve(kl_study *st, char *buf) {
  const kl_model *m = st->model;
  int k, d, status, revolute;
  double deg = m->angle_unit == KL_ANGLE_DEG ? KLI_PI / 180.0 : 1.0;
  if (st->sweep.input < 0 || st->sweep.input >= m->ninputs || m->ninputs > 64)
    return kli_fail(buf, KL_EINVAL,
                    "the sweep's input does not exist (or the model has "
                    "more than 64 inputs)");
  revolute = kli_input_is_angle(m, st->sweep.input);
  for (k = 0; k < st->njudge; k++) {
    kli_judge *j = &st->judge[k];
    if (j->how == KLI_JUDGE_AT && revolute)
      j->at *= deg; /* read in the file's angle unit */
    if (j->how == KLI_JUDGE_REACH && revolute)
      j->to_file = 1.0 / deg;
    if (j->how != KLI_JUDGE_REACH && j->how != KLI_JUDGE_EFFORT &&
        (status = kli_output_check(m, &j->what, buf)) != KL_OK)
      return status;
  }
  for (d = 0; d < st->nvary; d++) {
    kli_vary *v = &st->vary[d];
    static const char *const axes = "xy";
    if ((status = kli_dim_resolve(m, &v->dim, &v->where, buf)) != KL_OK)
      return status;
    v->nominal = *dimension_slot((kl_model *)m, v); /* read, not written */
    if (v->where.joint >= 0)
      snprintf(v->name, sizeof v->name, "%.40s %c %c",
               m->joints[v->where.joint].name != NULL
                   ? m->joints[v->where.joint].name
                   : "joint",
               v->dim.kind == KL_DIMENSION_JOINT_A ? 'a' : 'b',
               axes[v->where.axis]);
    else
      snprintf(v->name, sizeof v->name, "%.40s %c",
               m->points[v->where.point].name != NULL
                   ? m->points[v->where.point].name
                   : "point",
               axes[v->where.axis]);
  }
  return KL_OK;
}

int kl_study_prepare(kl_study *st) {
  const kl_model *m;
  const kli_allocator *a;
  kl_solver *s, *start;
  double *values, *spread, u[64];
  size_t bytes;
  int k, i, status, nominal_status;
  if (st == NULL)
    return KL_EINVAL;
  if (st->prepared)
    return KL_OK;
  m = st->model;
  a = &m->alloc;
  bytes = (size_t)st->njudge * sizeof(double);
  st->nominal = kl_solver_new(m);
  s = kl_solver_new(m);
  start = kl_solver_new(m);
  values = kli_alloc(a, bytes);
  spread = kli_alloc(a, bytes);
  if (st->nominal == NULL || s == NULL || start == NULL || values == NULL ||
      spread == NULL) {
    status = kli_fail(st->error, KL_ENOMEM, "the nominal model: out of memory");
    goto done;
  }
  for (i = 0; i < m->ninputs; i++)
    u[i] = i == st->sweep.input ? st->sweep.from : held(m, i);
  if ((status = kl_solve_position(st->nominal, u)) != KL_OK) {
    kli_fail(st->error, status, "the nominal model: %s",
             kl_solver_error(st->nominal));
    goto done;
  }
  if ((status = run_sample(st, -1, values, &nominal_status, NULL)) != KL_OK) {
    kli_fail(st->error, status, "the nominal model: out of memory");
    goto done;
  }
  if (nominal_status != KL_SAMPLE_OK) {
    status = kli_fail(st->error, KL_ENOASSEMBLY,
                      "the nominal model: it cannot move through the whole "
                      "sweep, so its outputs cannot be judged (shorten the "
                      "sweep to the nominal's motion)");
    goto done;
  }
  kl_solver_copy_state(start, st->nominal);
  for (k = 0; k < st->njudge; k++)
    spread[k] = first_order(st, &st->judge[k], s, start);
  st->nominal_values = values;
  st->first_order_std = spread;
  values = spread = NULL;
  st->prepared = 1;
done:
  if (!st->prepared) {
    kl_solver_free(st->nominal);
    st->nominal = NULL;
  }
  kl_solver_free(s);
  kl_solver_free(start);
  kli_free(a, values, bytes);
  kli_free(a, spread, bytes);
  return status;
}

/* ---- summaries ---- */

static int by_value(const void *a, const void *b) {
  double x = *(const double *)a, y = *(const double *)b;
  return x < y ? -1 : x > y;
}

/* Percentile q of n sorted values, by linear interpolation. */
static double percentile(const double *sorted, long n, double q) {
  double at = q * (double)(n - 1);
  long lo = (long)floor(at);
  double frac = at - (double)lo;
  if (lo + 1 >= n)
    return sorted[n - 1];
  return sorted[lo] + frac * (sorted[lo + 1] - sorted[lo]);
}

int kl_study_summarize(const kl_study *st, int k, const double *values,
                       const int *sample_status, long n,
                       kl_study_summary *summary) {
  kl_study_summary out;
  const kli_judge *j;
  double *sorted, sum = 0.0, squares = 0.0, badness = -HUGE_VAL;
  long i, ok = 0;
  size_t bytes;
  if (st == NULL || summary == NULL || summary->size < sizeof summary->size ||
      n < 0 || (n > 0 && (values == NULL || sample_status == NULL)))
    return KL_EINVAL;
  if (k < 0 || k >= st->njudge)
    return KL_EID;
  if (!st->prepared)
    return KL_ESTAGE;
  j = &st->judge[k];
  memset(&out, 0, sizeof out);
  out.size = summary->size;
  out.samples = n;
  out.nominal = st->nominal_values[k];
  out.first_order_std = st->first_order_std[k];
  out.has_limits = j->has_limits;
  out.lower = j->has_limits ? j->lower : NAN;
  out.upper = j->has_limits ? j->upper : NAN;
  out.worst_sample = -1;
  bytes = (size_t)(n > 0 ? n : 1) * sizeof *sorted;
  sorted = kli_alloc(&st->model->alloc, bytes);
  if (sorted == NULL)
    return KL_ENOMEM;
  for (i = 0; i < n; i++) {
    double v = values[i * st->njudge + k], bad;
    if (sample_status[i] == KL_SAMPLE_NO_ASSEMBLY)
      continue;
    out.assembled++;
    out.limited += sample_status[i] == KL_SAMPLE_LIMITED;
    if (isnan(v))
      continue;
    sorted[ok++] = v;
    sum += v;
    if (sample_status[i] == KL_SAMPLE_OK &&
        (!j->has_limits || (v >= j->lower && v <= j->upper)))
      out.within_limits++;
    /* with limits: how far outside them (negative: the margin inside);
     * without: how far from the nominal */
    bad = j->has_limits ? fmax(j->lower - v, v - j->upper)
                        : fabs(v - out.nominal);
    if (bad > badness) {
      badness = bad;
      out.worst = v;
      out.worst_sample = i;
    }
  }
  if (ok > 0) {
    out.mean = sum / (double)ok;
    for (i = 0; i < ok; i++)
      squares += (sorted[i] - out.mean) * (sorted[i] - out.mean);
    out.std = ok > 1 ? sqrt(squares / (double)(ok - 1)) : 0.0;
    qsort(sorted, (size_t)ok, sizeof *sorted, by_value);
    out.min = sorted[0];
    out.max = sorted[ok - 1];
    out.p01 = percentile(sorted, ok, 0.01);
    out.p05 = percentile(sorted, ok, 0.05);
    out.p50 = percentile(sorted, ok, 0.50);
    out.p95 = percentile(sorted, ok, 0.95);
    out.p99 = percentile(sorted, ok, 0.99);
  } else {
    out.mean = out.std = out.min = out.max = out.worst = NAN;
    out.p01 = out.p05 = out.p50 = out.p95 = out.p99 = NAN;
  }
  kli_free(&st->model->alloc, sorted, bytes);
  memcpy(summary, &out,
         summary->size < sizeof out ? summary->size : sizeof out);
  return KL_OK;
}

/* ---- the study itself ---- */

kl_study *kli_study_new(const kl_model *m) {
  kl_study *st = kli_alloc(&m->alloc, sizeof *st);
  if (st == NULL)
    return NULL;
  memset(st, 0, sizeof *st);
  st->model = m;
  kli_model_retain(m);
  return st;
}

void kl_study_free(kl_study *st) {
  const kl_model *m;
  const kli_allocator *a;
  size_t bytes;
  if (st == NULL)
    return;
  m = st->model;
  a = &m->alloc;
  bytes = (size_t)st->njudge * sizeof(double);
  kl_solver_free(st->nominal);
  kli_free(a, st->vary, (size_t)st->cap_vary * sizeof *st->vary);
  kli_free(a, st->judge, (size_t)st->cap_judge * sizeof *st->judge);
  kli_free(a, st->loads, (size_t)st->cap_loads * sizeof *st->loads);
  kli_free(a, st->nominal_values, bytes);
  kli_free(a, st->first_order_std, bytes);
  if (st->model_path != NULL)
    kli_free(a, st->model_path, strlen(st->model_path) + 1);
  kli_free(a, st, sizeof *st);
  kli_model_release(m); /* last: its allocator freed the rest */
}

const char *kl_study_error(const kl_study *st) {
  return st == NULL ? "no study (NULL pointer)" : st->error;
}

const char *kl_study_model_path(const kl_study *st) {
  return st == NULL ? NULL : st->model_path;
}

long kl_study_sample_count(const kl_study *st) {
  return st == NULL ? KL_EINVAL : st->samples;
}

int kl_study_output_count(const kl_study *st) {
  return st == NULL ? KL_EINVAL : st->njudge;
}

const char *kl_study_output_name(const kl_study *st, int k) {
  return st == NULL || k < 0 || k >= st->njudge ? NULL : st->judge[k].name;
}

int kl_study_output_quantity(const kl_study *st, int k) {
  const kli_judge *j;
  int turning;
  if (st == NULL)
    return KL_EINVAL;
  if (k < 0 || k >= st->njudge)
    return KL_EID;
  j = &st->judge[k];
  turning = st->sweep.input >= 0 && st->sweep.input < st->model->ninputs &&
            kli_input_is_angle(st->model, st->sweep.input);
  if (j->how == KLI_JUDGE_REACH)
    return turning ? KL_STUDY_ANGLE : KL_STUDY_LENGTH;
  if (j->how == KLI_JUDGE_EFFORT)
    return turning ? KL_STUDY_TORQUE : KL_STUDY_FORCE;
  switch (j->what.kind) {
  case KL_OUTPUT_LINK_ANGLE:
  case KL_OUTPUT_JOINT_ANGLE:
  case KL_OUTPUT_TRANSMISSION:
    return KL_STUDY_ANGLE;
  default:
    return KL_STUDY_LENGTH;
  }
}

const kl_model *kl_study_model(const kl_study *st) {
  return st == NULL ? NULL : st->model;
}

int kl_study_dimension_count(const kl_study *st) {
  return st == NULL ? KL_EINVAL : st->nvary;
}

const char *kl_study_dimension_name(const kl_study *st, int k) {
  return st == NULL || k < 0 || k >= st->nvary ? NULL : st->vary[k].name;
}
