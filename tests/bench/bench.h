/*
 * bench.h - what the parts of kinloop-bench share: the timing harness, the
 * machine report, and the three measured scenarios with their figures.
 */
#ifndef KINLOOP_BENCH_H
#define KINLOOP_BENCH_H

#include <stdio.h>
#include <time.h>

#include "support.h"

/* Every measured method is a function of its own that is never inlined or
 * merged with a look-alike, so that a profiler can select it by name
 * (callgrind's --toggle-collect=bench_fourbar_kinloop_small); in --quick
 * mode each runs exactly once. */
#if defined(__GNUC__) && !defined(__clang__)
#define BENCH_ENTRY __attribute__((noinline, noipa))
#elif defined(__GNUC__)
#define BENCH_ENTRY __attribute__((noinline))
#else
#define BENCH_ENTRY
/* ---- part 5: a design study's sample ---- */

typedef struct {
  double sample_over_sweep; /* one study sample / one plain sweep, 1 thread */
  int valid;                /* the sweep and every sample went through */
} study_figures;

void bench_study(FILE *out, const bench_plan *plan, study_figures *fig);

#endif

/* |F|inf every method must reach, in length units (absolute). */
#define BENCH_RESIDUAL 1e-12
/* A kinloop result further than this from the closed form (rad) is wrong,
 * and a target is not met on wrong results. */
#define BENCH_MAX_ERROR 1e-9
/* Iterations a GSL solver may take per step before the step counts as
 * failed (kinloop keeps its default limit of 50). */
#define BENCH_GSL_MAX_ITERATIONS 100

/* ---- timing ---- */

#define BENCH_MAX_SAMPLES 32

typedef struct {
  int samples;           /* rounds of samples, at most BENCH_MAX_SAMPLES */
  double sample_seconds; /* each sample repeats a call to last this long */
  int quick;             /* exactly one call per method, no calibration */
} bench_plan;

/* One method to time: fn(ctx) is one call (a pass over all the steps). */
typedef struct {
  void (*fn)(void *);
  void *ctx;
  /* results */
  int calls;                         /* calls per sample */
  int rounds;                        /* samples taken */
  double seconds[BENCH_MAX_SAMPLES]; /* time of one call, per round */
  double median;                     /* median of seconds */
  double spread;                     /* (slowest - fastest) / median */
} bench_method;

double bench_clock(clockid_t clock);
/* Times the n methods on `clock` in interleaved rounds, one sample of each
 * per round. Outside quick mode a first call per method (which also tells
 * how many calls fill a sample) is not counted. */
void bench_run(bench_method *methods, int n, clockid_t clock,
               const bench_plan *plan);
/* The median over rounds of a's time over b's time in the same round. */
double bench_ratio(const bench_method *a, const bench_method *b);
double bench_median(double *values, int n); /* sorts values */
/* calloc that ends the program with a message when memory runs out */
void *bench_calloc(size_t n, size_t size);

/* ---- machine report ---- */

/* Prints the date, kinloop's version, the CPU, and the LAPACK, BLAS and
 * GSL libraries that serve the run; keeps OpenBLAS to one thread. */
void machine_report(FILE *out, const bench_plan *plan);
/* The load average now, `when` naming the moment. */
void machine_load(FILE *out, const char *when);

/* ---- kinloop set up for the benchmark ---- */

/* A solver held to BENCH_RESIDUAL with `kernel` (ends the program if it
 * cannot be made). */
kl_solver *bench_solver_new(const kl_model *m, int kernel);
/* "small", "dense LAPACK", "banded LAPACK" for an enum kl_kernel. */
const char *bench_kernel_name(int kernel);

/* ---- part 1: the four-bar ---- */

#define FOURBAR_STEPS 3600
#define FOURBAR_STEP_DEG 0.1

/* One method's pass over the steps, and what it found at each step. */
typedef struct {
  const fourbar *f;
  int steps;
  /* kinloop methods: the solver, and the state at crank angle 0 it starts
   * from on every pass */
  kl_solver *s;
  const kl_solver *start;
  int with_rates;
  int kernel; /* the kernel that factored the last step (kl_solve_stats) */
  /* results of the last pass */
  double *t3, *t4; /* coupler and rocker angles */
  double *w3, *w4; /* their rates (with_rates) */
  double *a3, *a4; /* their accelerations (with_rates) */
  long iterations;
  int failures;
} fourbar_run;

fourbar_run *fourbar_run_kinloop(const fourbar *f, const kl_solver *start,
                                 int kernel, int with_rates);
void fourbar_run_free(fourbar_run *r);
/* One pass of the kinloop position stage (and the rate stages if the run
 * has them) over the steps, from the run's start. */
void fourbar_kinloop_pass(fourbar_run *r);

typedef struct {
  fourbar f;          /* the model, shared with part 3 */
  kl_solver *start;   /* kinloop's solution at crank angle 0 */
  fourbar_run *small; /* the small kernel's pass, which part 3 compares with */
  double small_ns;    /* kinloop position, AUTO: median ns per position */
  /* ratios paired over rounds: kinloop position and kinloop position +
   * velocity + acceleration over the closed form, GSL hybridsj over kinloop
   * position */
  double small_ratio, rates_ratio, hybridsj_ratio;
  /* kinloop position over the hand-written Newton iteration, and kinloop
   * position + velocity + acceleration over the hand-written Newton with
   * its hand-written rate and acceleration formulas */
  double hand_ratio, hand_rates_ratio;
  /* no failed step and errors within BENCH_MAX_ERROR */
  int small_valid, rates_valid, hand_valid;
} fourbar_figures;

/* Runs and prints part 1; fig keeps the model, the start and the small
 * kernel's pass until fourbar_done. */
void bench_fourbar(FILE *out, const bench_plan *plan, fourbar_figures *fig);
void fourbar_done(fourbar_figures *fig);

/* ---- part 2: the chain of four-bar loops ---- */

typedef struct {
  double gsl_over_auto_100; /* GSL hybridsj / kinloop AUTO at N = 100 */
  /* cost exponents p, t ~ N^p: log(t(100) / t(10)) / log(10) */
  double growth_auto, growth_dense, growth_gsl;
  int kinloop_valid; /* no failed step, errors within bounds, every size */
} chain_figures;

void bench_chain(FILE *out, const bench_plan *plan, chain_figures *fig);

/* ---- part 3: threads ---- */

typedef struct {
  double throughput_ratio; /* 2 threads over 1 thread */
  int results_identical;   /* both threads' results equal part 1's */
} thread_figures;

void bench_threads(FILE *out, const bench_plan *plan,
                   const fourbar_figures *fourbar, thread_figures *fig);

/* ---- part 4: the force stage ---- */

typedef struct {
  double fourbar_position_ns; /* one position solve, ns per step */
  double fourbar_force_ns;    /* the force stage after the rates, ns */
  double fourbar_ratio;       /* force stage / one position solve */
  double chain_position_ns[2], chain_force_ns[2]; /* N = 10 and 100 */
  double growth_position, growth_forces; /* exponents p, t ~ N^p */
  int valid;                  /* no step failed */
} force_figures;

void bench_forces(FILE *out, const bench_plan *plan, force_figures *fig);

/* ---- part 5: a design study's sample ---- */

typedef struct {
  double sample_over_sweep; /* one study sample / one plain sweep, 1 thread */
  int valid;                /* the sweep and every sample went through */
} study_figures;

void bench_study(FILE *out, const bench_plan *plan, study_figures *fig);
/* ---- part 6: kinloop check against one sweep ---- */
typedef struct {
  double check_over_sweep_500; /* kinloop check / kinloop sweep, N = 500 */
  int valid;                   /* every run of the tool succeeded */
} check_figures;
/* Runs and prints part 6: the tool (KINLOOP_TOOL, set by the build) on
 * model files of chains of 10 to 500 loops. */
void bench_check(FILE *out, const bench_plan *plan, check_figures *fig);
/* ---- part 7: the jerk stage ---- */

typedef struct {
  double fourbar_jerk_ns, chain_jerk_ns; /* jerk stage after acceleration */
  double fourbar_ratio, chain_ratio;     /* ... over one position solve */
  int valid;                             /* no step failed */
} jerk_figures;

void bench_jerk(FILE *out, const bench_plan *plan, jerk_figures *fig);
/* Part 8: the model reader's time per item, 1,000 to 900,000 items. */
typedef struct {
  double ratio_largest; /* time per item at 900,000 over that at 1,000 */
} reader_figures;
void bench_reader(FILE *out, const bench_plan *plan, reader_figures *fig);
/* ---- part 9: coupled linkages (issue 17) ---- */
typedef struct {
  /* time per solve per unknown over the four-bar's, paired over rounds */
  double geared_per_unknown, cam_per_unknown;
  long allocations; /* allocator calls in all passes after kl_solver_new */
  int valid; /* no failed step, errors within bounds, no allocation */
} coupling_figures;
/* A geared five-bar and a disc cam with a roller follower against the
 * four-bar, per unknown, with the allocations of their passes. */
void bench_couplings(FILE *out, const bench_plan *plan, coupling_figures *fig);
/* ---- part 10: the five-bar's inverse kinematics along a path ---- */

#define IK_POINTS 1000

typedef struct {
  double kinloop_ns, closed_form_ns; /* per path point */
  double ratio;                /* kinloop / closed form, paired over rounds */
  double max_angle_difference; /* largest |crank angle difference|, rad */
  int valid; /* no point failed, angles within BENCH_MAX_ERROR */
} inverse_figures;

/* Runs and prints part 10: the two-input five-bar's tool point along a path
 * of IK_POINTS points, kinloop against two circle intersections. */
void bench_inverse(FILE *out, const bench_plan *plan, inverse_figures *fig);

#endif
