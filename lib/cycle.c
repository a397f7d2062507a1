/*
 * cycle.c - the force figures over a motion at constant input speed: the
 * forces at every sample of a sweep, the motor and bearing figures, the
 * frame's shaking, the energy fluctuation and the flywheel it calls for.
 */
#include <math.h>
#include <string.h>

#include "describe.h"
#include "forces.h"

/* The first kl_cycle ends after speed_fluctuation: callers' structs are at
 * least this long, and fields past a caller's size keep their defaults. */
#define KLI_CYCLE_V1_SIZE                                                      \
  (offsetof(kl_cycle, speed_fluctuation) + sizeof(double))

/* What each quantity keeps over the samples, KLI_CYCLE_SUMS numbers. */
enum { SUM, SUM_SQUARES, FIRST, LAST, PEAK, PEAK_AT };

/* One pass over a cycle. */
typedef struct {
  kl_solver *s;
  kl_cycle c;              /* the caller's, completed with the defaults */
  int nloads;
  const kl_load *loads;
  int with_forces;         /* solve the forces at every sample */
  int samples;             /* samples taken */
  double first_u, last_u;  /* the driven input at the first and last */
  double energy0;          /* the links' whole energy at the first */
  double work;             /* the driven input's work up to the last */
  double mean_effort;      /* its mean effort, from a first pass */
  double energy_min, energy_max, energy_min_at, energy_max_at;
  double *rows;            /* the table, or NULL */
  int width;               /* numbers per row */
  int status;              /* why a sample stopped the sweep */
  const char *stage;
} cycle_run;

void kl_cycle_default(kl_cycle *c) {
  if (c == NULL)
    return;
  memset(c, 0, sizeof *c);
  c->size = sizeof *c;
  c->input = 0;
  c->from = 0.0;
  c->to = 2.0 * KLI_PI;
  c->steps = 360;
  c->speed = 1.0;
  c->speed_fluctuation = 0.0;
}

int kl_model_cycle(const kl_model *m, kl_cycle *c) {
  kl_cycle full;
  if (m == NULL || c == NULL || c->size < sizeof c->size)
    return KL_EINVAL;
  if (!m->has_speed)
    return KL_EID;
  kl_cycle_default(&full);
  full.input = m->speed_input;
  full.speed = m->speed;
  full.speed_fluctuation = m->speed_fluctuation;
  if (m->has_sweep && m->sweep.input == m->speed_input) {
    full.from = m->sweep.from;
    full.to = m->sweep.to;
    full.steps = m->sweep.steps;
  }
  kli_copy_sized(c, &full, sizeof full);
  return KL_OK;
}

int kl_cycle_columns(const kl_model *m) {
  if (m == NULL)
    return KL_EINVAL;
  if (!m->finalized)
    return KL_ESTATE;
  return 1 + m->ninputs + 3 * m->njoints + 5;
}

void kli_cycle_take(kl_solver *s, int q, double v, double u, int first) {
  double *a = s->cycle_sums + (size_t)q * KLI_CYCLE_SUMS;
  if (first) {
    a[SUM] = a[SUM_SQUARES] = 0.0;
    a[FIRST] = a[PEAK] = v;
    a[PEAK_AT] = u;
  }
  a[SUM] += v;
  a[SUM_SQUARES] += v * v;
  a[LAST] = v;
  if (fabs(v) > fabs(a[PEAK])) {
    a[PEAK] = v;
    a[PEAK_AT] = u;
  }
}

kl_cycle_peak kli_cycle_figures(const kl_solver *s, int q, int samples) {
  const double *a = s->cycle_sums + (size_t)q * KLI_CYCLE_SUMS;
  int intervals = samples - 1;
  double squares;
  kl_cycle_peak out;
  out.peak = a[PEAK];
  out.at = a[PEAK_AT];
  if (intervals == 0) {
    out.mean = a[FIRST];
    out.rms = fabs(a[FIRST]);
    return out;
  }
  out.mean = (a[SUM] - 0.5 * (a[FIRST] + a[LAST])) / intervals;
  squares = (a[SUM_SQUARES] - 0.5 * (a[FIRST] * a[FIRST] + a[LAST] * a[LAST])) /
            intervals;
  out.rms = sqrt(fmax(squares, 0.0));
  return out;
}

/* The figures of one sample at the forces in s->cycle_forces. */
static void tally(cycle_run *r, double u, double kinetic) {
  kl_solver *s = r->s;
  const kli_forces *f = &s->cycle_forces;
  int ni = s->ninputs, nj = s->model->njoints, i, first = r->samples == 0;
  double excess;
  for (i = 0; i < ni; i++)
    kli_cycle_take(s, i, f->effort[i], u, first);
  for (i = 0; i < nj; i++)
    kli_cycle_take(s, ni + i, hypot(f->force[2 * i], f->force[2 * i + 1]), u,
                   first);
  kli_cycle_take(s, ni + nj, hypot(f->ground[0], f->ground[1]), u, first);
  kli_cycle_take(s, ni + nj + 1, f->ground[2], u, first);
  /* the energy the driven input puts in above its mean rate of work */
  excess = r->work - r->mean_effort * (u - r->first_u);
  if (first || excess < r->energy_min) {
    r->energy_min = excess;
    r->energy_min_at = u;
  }
  if (first || excess > r->energy_max) {
    r->energy_max = excess;
    r->energy_max_at = u;
  }
  if (r->rows != NULL) {
    double *row = r->rows + (size_t)r->samples * (size_t)r->width;
    *row++ = u;
    for (i = 0; i < ni; i++)
      *row++ = f->effort[i];
    for (i = 0; i < nj; i++) {
      *row++ = f->force[2 * i];
      *row++ = f->force[2 * i + 1];
      *row++ = f->moment[i];
    }
    *row++ = f->ground[0];
    *row++ = f->ground[1];
    *row++ = f->ground[2];
    *row++ = kinetic;
    *row = r->work;
  }
}

/* The sweep's callback: the sample's unit-rate rates and accelerations
 * scaled to the working speed (u' = w, u'' = 0 give x' = w x_u and
 * x'' = w^2 x_uu), its energy, and its forces. */
static int sample(const kl_solver *cs, int step, double u, void *user) {
  cycle_run *r = user;
  kl_solver *s = r->s; /* the same solver, which this pass owns */
  double w = r->c.speed, kinetic, total;
  int c, st;
  (void)step;
  for (c = 0; c < s->ncoords; c++) {
    s->scaled_xd[c] = w * cs->st.xd[c];
    s->scaled_xdd[c] = w * w * cs->st.xdd[c];
  }
  kli_link_energy(s, s->scaled_xd, r->nloads, r->loads, &kinetic, &total);
  if (r->samples == 0) {
    r->energy0 = total;
    r->first_u = u;
  }
  r->work = total - r->energy0;
  r->last_u = u;
  if (r->with_forces) {
    st = kli_forces_at(s, s->scaled_xd, s->scaled_xdd, r->nloads, r->loads,
                       &s->cycle_forces, r->stage);
    if (st != KL_OK) {
      r->status = st;
      return 1;
    }
    tally(r, u, kinetic);
  }
  r->samples++;
  return 0;
}

/* One sweep over the cycle from the solver's state on entry. KL_OK or
 * KL_LIMIT with the samples taken; otherwise the status, the message
 * written and the solver back at its state on entry. */
static int pass(cycle_run *r, int with_forces) {
  kl_solver *s = r->s;
  int st;
  r->with_forces = with_forces;
  r->samples = 0;
  r->status = KL_OK;
  kli_state_back(s);
  st = kl_solver_sweep(s, r->c.input, r->c.from, r->c.to, r->c.steps, sample,
                       r, NULL);
  if (st == KL_OK || st == KL_LIMIT)
    return st;
  if (st == KL_STOPPED)
    st = r->status; /* a sample's own failure, its message written */
  kli_state_back(s);
  return st;
}

/* The checks every cycle call makes, and the run set up for it. */
static int begin(kl_solver *s, const kl_cycle *c, int nloads,
                 const kl_load *loads, const char *stage, cycle_run *r) {
  int st;
  memset(r, 0, sizeof *r);
  r->s = s;
  r->nloads = nloads;
  r->loads = loads;
  r->stage = stage;
  if (c == NULL || c->size < KLI_CYCLE_V1_SIZE)
    return kli_fail(s->error, KL_EINVAL, "%s: %s; start from "
                    "kl_cycle_default()", stage,
                    c == NULL ? "no cycle (NULL)" : "cycle size too small");
  kl_cycle_default(&r->c);
  memcpy((char *)&r->c + sizeof r->c.size, (const char *)c + sizeof c->size,
         (c->size < sizeof r->c ? c->size : sizeof r->c) - sizeof c->size);
  if ((st = kli_forces_determinate(s, stage)) != KL_OK ||
      (st = kli_check_loads(s, nloads, loads, stage)) != KL_OK)
    return st;
  if (r->c.input < 0 || r->c.input >= s->ninputs)
    return kli_fail_index(s->error, stage, "input", r->c.input, s->ninputs);
  if (!isfinite(r->c.from) || !isfinite(r->c.to) || !isfinite(r->c.speed) ||
      !isfinite(r->c.speed_fluctuation))
    return kli_fail(s->error, KL_ENONFINITE,
                    "%s: the range, speed or speed fluctuation of the cycle "
                    "is NaN or infinite",
                    stage);
  if (r->c.steps > KL_MAX_STEPS)
    return kli_fail(s->error, KL_ETOOLARGE,
                    "%s: %d steps; a cycle takes at most %d (KL_MAX_STEPS)",
                    stage, r->c.steps, KL_MAX_STEPS);
  if (r->c.steps < 1 || r->c.speed_fluctuation < 0.0)
    return kli_fail(s->error, KL_EINVAL,
                    "%s: %s", stage,
                    r->c.steps < 1 ? "a cycle needs at least 1 step"
                                   : "the coefficient of speed fluctuation "
                                     "is negative");
  kli_state_keep(s);
  return KL_OK;
}

int kl_cycle_summarize(kl_solver *s, const kl_cycle *c, int nloads,
                       const kl_load *loads, kl_cycle_summary *sum,
                       kl_cycle_peak *input_peaks,
                       kl_cycle_peak *joint_peaks) {
  static const char stage[] = "cycle figures";
  cycle_run r;
  kl_cycle_summary out;
  int st, i, ni, nj;
  size_t n;
  double span, w2;
  if (s == NULL)
    return KL_EINVAL;
  if (sum == NULL || sum->size < sizeof sum->size)
    return kli_fail(s->error, KL_EINVAL,
                    "%s: no summary to fill (NULL, or its size not set)",
                    stage);
  if ((st = begin(s, c, nloads, loads, stage, &r)) != KL_OK)
    return st;
  /* the driven input's mean effort over the whole cycle first: the energy
   * above it at each sample needs it */
  if ((st = pass(&r, 0)) != KL_OK && st != KL_LIMIT)
    return st;
  span = r.last_u - r.first_u;
  r.mean_effort = span != 0.0 ? r.work / span : 0.0;
  if ((st = pass(&r, 1)) != KL_OK && st != KL_LIMIT)
    return st;
  ni = s->ninputs;
  nj = s->model->njoints;
  for (i = 0; input_peaks != NULL && i < ni; i++)
    input_peaks[i] = kli_cycle_figures(s, i, r.samples);
  for (i = 0; joint_peaks != NULL && i < nj; i++)
    joint_peaks[i] = kli_cycle_figures(s, ni + i, r.samples);
  memset(&out, 0, sizeof out);
  out.size = sum->size;
  out.sweep_status = st;
  out.steps_done = r.samples;
  out.limit_input = st == KL_LIMIT ? r.last_u : NAN;
  out.shaking_force = kli_cycle_figures(s, ni + nj, r.samples);
  out.shaking_moment = kli_cycle_figures(s, ni + nj + 1, r.samples);
  out.energy_fluctuation = r.energy_max - r.energy_min;
  out.energy_min_at = r.energy_min_at;
  out.energy_max_at = r.energy_max_at;
  w2 = r.c.speed * r.c.speed;
  out.flywheel_inertia = r.c.speed_fluctuation > 0.0 && w2 > 0.0
                             ? out.energy_fluctuation /
                                   (r.c.speed_fluctuation * w2)
                             : NAN;
  n = sum->size < sizeof out ? sum->size : sizeof out;
  memcpy(sum, &out, n);
  return st;
}

int kl_cycle_table(kl_solver *s, const kl_cycle *c, int nloads,
                   const kl_load *loads, double *rows, size_t cap,
                   int *rows_done) {
  static const char stage[] = "cycle table";
  cycle_run r;
  int st;
  if (s == NULL)
    return KL_EINVAL;
  if ((st = begin(s, c, nloads, loads, stage, &r)) != KL_OK)
    return st;
  r.width = kl_cycle_columns(s->model);
  if (rows == NULL || cap / (size_t)r.width < (size_t)r.c.steps + 1)
    return kli_fail(s->error, KL_EINVAL,
                    "%s: the rows array holds %lu numbers; %ld samples of %d "
                    "columns need %lu",
                    stage, rows == NULL ? 0ul : (unsigned long)cap,
                    (long)r.c.steps + 1, r.width,
                    (unsigned long)(((size_t)r.c.steps + 1) * (size_t)r.width));
  r.rows = rows;
  st = pass(&r, 1);
  if (rows_done != NULL)
    *rows_done = st == KL_OK || st == KL_LIMIT ? r.samples : 0;
  return st;
}
