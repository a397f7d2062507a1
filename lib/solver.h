/*
 * solver.h - private: a solver's state and its working memory, all carved
 * from one block sized at creation, so that no later call allocates.
 */
#ifndef KINLOOP_SOLVER_H
#define KINLOOP_SOLVER_H

#include "dense.h"
#include "equations.h"
#include "plan.h"

/* What the force stage finds: per joint the force a exerts on b (2) and
 * the moment about b's attachment point (1), per input its effort, and
 * the load on ground (force x, y, moment about the origin). */
typedef struct {
  double *force, *moment, *effort, *ground;
  double *coupling; /* each coupling's force (kl_coupling_force) */
} kli_forces;

/* What a caller sees: a position, its rates and accelerations, the forces
 * there, and which of them are solved. */
typedef struct {
  kli_pose pose;          /* x, cos, sin */
  double *xd, *xdd;       /* coordinate rates and accelerations */
  double *xddd;           /* coordinate jerks */
  double *u, *ud, *udd;   /* inputs, their rates and accelerations */
  double *uddd;           /* and their jerks */
  kli_forces forces;      /* the force stage's results */
  int position_solved;    /* pose closes the loops at u (not a sketch) */
  int inputs_known;       /* u holds inputs of a successful solve */
  int velocity_solved, acceleration_solved;
  int jerk_solved;        /* xddd holds the jerk at these rates and accels */
  int forces_solved;      /* forces hold the force stage at this state */
  int last_attempt;       /* status of the last position solve */
  double rcond;           /* condition estimate of the factors at pose */
} kli_state;

/* Numbers the cycle figures keep per quantity (cycle.c). */
#define KLI_CYCLE_SUMS 6

/* Distinct assembly modes kl_solver_find_assemblies can tell apart. */
#define KLI_MAX_MODES 64

struct kl_solver {
  const kl_model *model;
  kl_options opt;
  void *block; /* everything below points into it */
  size_t block_size;
  int owns_block;
  int n, ncoords, ninputs;
  int nrows;              /* loop rows: n, plus the redundant ones */

  kli_state st;           /* the committed state */
  kli_state saved;        /* a copy the sweep keeps while it explores */
  kli_state delivered;    /* the sweep's last delivered step */
  kli_state extreme[2];   /* states at the brackets of a range's extremes */
  kli_state previous;     /* the range search's step before the last */
  kli_state kept;         /* what a call of several solves returns to when
                             it fails (kli_state_keep) */
  int kept_coefficients;  /* and whether its coefficients were solved */
  kli_state crossing[4];  /* samples around a change point: two on the
                             approach, two beyond it, on one branch */
  double singular_rcond;  /* the singular test in effect: the option's, or
                             the sweep's lower one while it runs */
  int passages;           /* change points the sweep under way has passed */
  double last_passage;    /* where it passed the last one (NaN: none) */
  int coefficients_solved;
  int factors_current;    /* dense holds the factors at pose */
  int factors_near;       /* ... or at most one converging step from it */
  double *coef1;          /* ncoords x ninputs: d x / d u_i */
  double *coef2;          /* ncoords x ninputs x ninputs: d2 x / du_i du_j */

  /* Working memory of the stages. */
  kli_pose trial[2];      /* Newton's current and trial iterates */
  double *u_trial;
  double *x_base;         /* ncoords: the coordinates the inputs alone give */
  /* The coordinates an unknown moves (a group's links share one) and its
   * unknown, listed once at creation for the position stage's updates. */
  int *moving_coord, *moving_var, nmoving;
  double *u_unit;         /* a unit input vector for the coefficients */
  double *q, *dq, *q_next;
  double *f, *f_next, *grad;
  double *pairs;          /* Jacobian values on the pattern */
  /* With redundant constraints: the direction of each loop that keeps one
   * row (2 per loop), chosen when a solve starts or the rates factor at a
   * solved position, and the kept system's values. */
  double *dir;
  double *kept_values;
  double *rhs;            /* nrows: loop rows, reduced to n in place */
  double *xv;             /* ncoords scratch for the rate stages */
  double *x_pred;         /* ncoords: the sweep's predicted position */
  double *x_previous;     /* ncoords: the sweep's position before the last */
  double u_previous;      /* its input */
  int have_previous;
  double *sweep_u, *sweep_rate, *sweep_zero; /* inputs for the sweep */
  double *time_motion;    /* 4 x ninputs: the inputs, rates, accelerations
                             and jerks at a time of the model's profile */
  double *time_efforts;   /* ninputs: the efforts at one such time */
  double *modes;          /* KLI_MAX_MODES x n: assembly modes found */
  kli_dense dense;
  kli_plan plan;          /* the flat evaluation plan, when the model fits */

  /* The force stage: its system (factored at the coordinates force_at,
   * reused while the position stays), values and right side; the motion
   * of each link's centre of mass (2 per link); and for the cycle figures,
   * rates scaled to the working speed, forces, and per quantity (inputs,
   * joints, shaking force and moment) its sums, first and last values. */
  kli_dense force;
  double *force_values, *force_rhs, *force_at;
  double *force_geometry; /* per joint at force_at: the arms from a's and
                             b's centres to its point, its slide axis; then
                             the same per extra row */
  double *extra_points;   /* per extra row: where its force acts (2) */
  int force_factored;
  double *centre_velocity, *centre_accel;
  double *scaled_xd, *scaled_xdd;
  kli_forces cycle_forces;
  double *cycle_sums;
  kl_solve_stats stats;
  char error[KLI_MESSAGE_SIZE];
};

/* Copies pose `from` into `to` (coordinates and trig). */
void kli_pose_copy(const kl_solver *s, kli_pose *to, const kli_pose *from);
/* Copies a whole state. */
void kli_state_copy(const kl_solver *s, kli_state *to, const kli_state *from);
/* Makes `from` the committed state; the factors and coefficients of the
 * old one no longer apply. */
void kli_state_restore(kl_solver *s, const kli_state *from);
/* KL_OK if `values` holds one finite number per input (NULL allowed when
 * there are none); else KL_EINVAL or KL_ENONFINITE with a message naming
 * the stage, what the values are, and the input. */
int kli_check_input_values(kl_solver *s, const double *values,
                           const char *stage, const char *what);
/* Marks the committed position as changed: every rate is stale. */
void kli_state_changed(kl_solver *s);
/* Keeps the committed state, so that a call of several solves that fails
 * can leave the solver as it found it with kli_state_back. Between the
 * two, nothing may write the coefficients. */
void kli_state_keep(kl_solver *s);
void kli_state_back(kl_solver *s);
/* KL_OK if the loads are valid for this model (nloads >= 0, loads not NULL
 * when nloads > 0, each an existing point or link with finite numbers);
 * else KL_EINVAL, KL_EID, KL_EKIND or KL_ENONFINITE with a message naming
 * the stage and the load. */
int kli_check_loads(kl_solver *s, int nloads, const kl_load *loads,
                    const char *stage);

#endif
