/*
 * support.h - what the test suites share: a counting, fault-injecting
 * allocator, builders of the standard mechanisms, and angle helpers.
 */
#ifndef KINLOOP_TEST_SUPPORT_H
#define KINLOOP_TEST_SUPPORT_H

#include <stddef.h>

#include "kinloop.h"

#ifdef __cplusplus
extern "C" {
#endif

#define PI 3.14159265358979323846

/* ---- allocator hook that counts, and fails the Nth call on request ---- */
typedef struct {
  long calls;        /* allocations and reallocations asked for */
  long live;         /* blocks held now */
  size_t live_bytes; /* bytes held now */
  long fail_at;      /* 1-based call to refuse; 0 never */
  long failed;       /* calls refused */
} counting_alloc;

void *counting_alloc_fn(void *user, void *ptr, size_t old_size,
                        size_t new_size);
kl_model *counting_model(counting_alloc *c);

/* ---- the standard mechanisms ---- */

/* Four-bar: ground pivots O2 = (0, 0) and O4 = (d, 0); crank a from O2,
 * coupler b, rocker c from O4. Each link's local x-axis runs from its first
 * joint to its second, so the link angles are the textbook theta2, theta3,
 * theta4. Input 0 is the crank angle. */
typedef struct {
  kl_model *m;
  int crank, coupler, rocker;
  int pivot, crank_pin, rocker_pin, rocker_pivot; /* joints */
  int coupler_point; /* point at (b/2, b/4) on the coupler */
  double a, b, c, d;
} fourbar;
fourbar build_fourbar(double a, double b, double c, double d);
/* The same, built in the empty model m (e.g. one with a counting allocator). */
fourbar build_fourbar_in(kl_model *m, double a, double b, double c, double d);
/* The same, not yet finalized (for builder calls that must come first). */
fourbar build_fourbar_open(double a, double b, double c, double d);
/* The same four-bar with its one loop registered explicitly. */
fourbar build_fourbar_explicit(double a, double b, double c, double d);

/* Offset slider-crank: crank r about (0, 0), rod l, slider block pinned to
 * the rod, sliding on ground along y = e in +x. Input 0 is the crank angle.
 * Two points: one on the rod at (0.4 l, 9), one on the block at (6, -4). */
typedef struct {
  kl_model *m;
  int crank, rod, block;
  int pivot, crank_pin, block_pin, slide_joint;
  int rod_point, block_point;
  double r, l, e;
} slider_crank;
slider_crank build_slider_crank(double r, double l, double e);

/* Inverted slider-crank: crank r about O2 = (0, 0), a block pinned to the
 * crank tip, sliding along a link pivoted to ground at O4 = (d, 0); the slide
 * is measured from O4 along that link's x-axis. Input 0 is the crank angle. */
typedef struct {
  kl_model *m;
  int crank, block, guide;
  int slide_joint;
  double r, d;
} inverted_slider_crank;
inverted_slider_crank build_inverted_slider_crank(double r, double d);

/* Two-input five-bar: cranks a1 about (0, 0) and a2 about (d, 0) (inputs 0
 * and 1), links b1 and b2 meeting at point `tip`. */
typedef struct {
  kl_model *m;
  int crank1, crank2, link1, link2;
  int tip;
  double a1, a2, b1, b2, d;
} fivebar;
fivebar build_fivebar(double a1, double a2, double b1, double b2, double d);

/* Generic description of an all-revolute linkage with one crank input, for
 * the six-bars and for the body-coordinate reference solution. */
#define MAX_JOINTS 12
typedef struct {
  int nlinks;   /* with ground */
  int njoints;
  int a[MAX_JOINTS], b[MAX_JOINTS];
  double pa[MAX_JOINTS][2], pb[MAX_JOINTS][2];
  int input_joint;
  double sketch[MAX_JOINTS]; /* link angles near the wanted branch */
} pin_linkage;
pin_linkage watt_sixbar(void);
pin_linkage stephenson_sixbar(void);
kl_model *build_pin_linkage(const pin_linkage *p, int explicit_loops);

/* A chain of n four-bar loops (2n unknowns, a banded Jacobian): the crank
 * (input 0) drives loop 0; the rocker of loop k, a ternary link, carries
 * at its (a, 0) the crank pin of loop k + 1. Every loop is the crank-rocker
 * ground d = 100, crank a = 40, coupler b = 120, rocker c = 80 between
 * ground pivots at x = k d and (k + 1) d, so every loop assembles at any
 * angle of its driver. couplers[k], rockers[k] are the links of loop k. */
#define CHAIN_MAX 200
typedef struct {
  kl_model *m;
  int n;
  int crank, couplers[CHAIN_MAX], rockers[CHAIN_MAX];
} chain;
chain build_chain(int n);
/* The same chain with mass properties (crank 0.4 kg, couplers 1.2 kg,
 * rockers 0.8 kg at their middles; mm, kg, s) and gravity along -y. */
chain build_massive_chain(int n);
/* Sets sketch angles near the open branch of every loop at crank angle u. */
void sketch_chain(const chain *c, kl_solver *s, double u);

/* Freudenstein's equation (half-angle tangent form; see support.c): the
 * coupler and rocker angles of branch +1 or -1 of four-bar f at crank angle
 * t2; 0 if it does not assemble there. */
int freudenstein(const fourbar *f, double t2, int branch, double *t3,
                 double *t4);

/* The offset slider-crank's closed form with the slider running along +y
 * on the line x = offset (an eccentric disc cam's translating roller
 * follower: crank = the eccentricity, rod = disc + roller radius): the
 * slider's y at crank angle t, and dy/dt into *dy (may be NULL). */
double offset_slider_y(double crank, double rod, double offset, double t,
                       double *dy);

/* ---- solver states, compared bit for bit ---- */
#define SNAPSHOT_MAX 1024
typedef struct {
  double v[SNAPSHOT_MAX];
  int n;
} snapshot;
/* Everything a caller can read back from a solver, in a fixed order: every
 * link's angle, rate, acceleration and coefficients, every joint's angle
 * and slide with its rates and its force getters' status and values, the
 * ground force getter's, every point getter's status and values, every
 * input value. */
snapshot snap(const kl_solver *s);
/* 1 if two snapshots hold the same bits. */
int same_state(const snapshot *a, const snapshot *b);
#define assert_same_state(a, b, what)                                          \
  ck_assert_msg(same_state((a), (b)), "%s: the solver state changed", (what))

/* ---- numbers ---- */
/* a - b reduced to (-pi, pi]. */
double angle_diff(double a, double b);
/* Relative difference |a - b| / max(|b|, floor). */
double rel_diff(double a, double b, double floor);

#ifdef __cplusplus
}
#endif

#endif
