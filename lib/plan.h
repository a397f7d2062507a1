/*
 * plan.h - private: the flat evaluation plan of a model whose rows are all
 * loop rows of link terms and whose joints all turn (revolute loops without
 * couplings, sliding joints, point inputs or dropped rows). Worked out once when a solver is created, it
 * evaluates the residual, the Jacobian and the rate stages' terms from flat
 * lists, without the vector chains' per-term dispatch; every other model
 * keeps the general code of equations.c (docs/theory.md 5.10).
 */
#ifndef KINLOOP_PLAN_H
#define KINLOOP_PLAN_H

#include "dense.h"
#include "equations.h"
#include "memory.h"

/* R(angle(link)) v added to loop rows (row, row + 1); `pair` is the
 * Jacobian pair of the link's unknown in that loop, or -1. For a pair,
 * `at` are its two values' places in the small kernel's matrix and
 * `first` is 1 for the pair's first term, which sets them rather than
 * adding to them (kli_plan_place). */
typedef struct {
  int row, link, pair, first;
  size_t at[2];
  double v[2];
} kli_flat_term;

/* x[coord] += coef u[input]: one entry of the inputs' share G u. */
typedef struct {
  int coord, input;
  double coef;
} kli_flat_input;

/* The rate of term `term` from input `input`: coef u[input]. */
typedef struct {
  int term, input;
  double coef;
} kli_flat_rate;

typedef struct {
  int usable;          /* the model fits the plan; else nothing below is set */
  int nrows, ncoords, npairs;
  /* terms on links an unknown turns first (nmoving of them), then the
   * others, whose sum stays fixed while the inputs do */
  kli_flat_term *terms;
  int nterms, nmoving;
  /* links an unknown turns (each with that unknown; the solver's lists)
   * and the other links */
  const int *moving_link, *moving_var;
  int nmoving_links;
  int *fixed_link, nfixed_links;
  kli_flat_input *inputs;
  int ninputs;
  kli_flat_rate *rates;
  int nrates;
  double *fixed;       /* nrows: the fixed terms' sum at the inputs of the
                          solve under way (kli_plan_start) */
} kli_plan;

/* Carves the plan's arrays for model m (their sizes only on a sizing
 * pass). */
void kli_plan_carve(kli_plan *p, kli_carver *c, const kl_model *m);
/* Fills a carved plan from the finalized model m, given the coordinates
 * an unknown moves and their unknowns (nmoving; kept by pointer), with
 * scratch arrays of ncoords and ninputs numbers; p->usable tells whether m
 * fits it. */
void kli_plan_build(kli_plan *p, const kl_model *m, const int *moving_link,
                    const int *moving_var, int nmoving, double *x_scratch,
                    double *u_scratch);
/* Takes the places of the Jacobian's values in d's matrix (after
 * kli_dense_init), for kli_plan_load_small. */
void kli_plan_place(kli_plan *p, const kli_dense *d);
/* At the start of a solve whose inputs' share is in a->x: the cosine and
 * sine of every link no unknown turns (taken where their angle changed),
 * copied into pose b, and the fixed terms' sum. */
void kli_plan_start(kli_plan *p, kli_pose *a, kli_pose *b);
/* The residual at unknowns q, the inputs' share being `base`: sets the
 * angles an unknown turns in pose->x and their cosine and sine, writes the
 * nrows residuals into f and returns |f|inf (NaN propagates). */
double kli_plan_residual(const kli_plan *p, kli_pose *pose, const double *base,
                         const double *q, double *f);
/* Jacobian values dF/dq at pose (its trig current), two per nonzero pair,
 * as kli_jacobian_pairs gives them. */
void kli_plan_jacobian(const kli_plan *p, const kli_pose *pose, double *pairs);
/* The same values written straight into the small kernel's matrix
 * (every column an angle's, so unscaled), with its 1-norm. */
void kli_plan_load_small(const kli_plan *p, const kli_pose *pose,
                         kli_dense *d);
/* (dF/dx) G w over every loop: the loop-rate terms of input rates w. */
void kli_plan_input_terms(const kli_plan *p, const kli_pose *pose,
                          const double *w, double *out);
/* x = E q + G u (either NULL for zeros), as kli_expand. */
void kli_plan_expand(const kli_plan *p, const double *q, const double *u,
                     double *x);
/* B(va, vb) over every loop, added to out, as kli_loops_add_second. */
void kli_plan_add_second(const kli_plan *p, const kli_pose *pose,
                         const double *va, const double *vb, double *out);

#endif
