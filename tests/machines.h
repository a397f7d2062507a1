/*
 * machines.h - the mechanisms with mass properties that the force tests,
 * the reference comparison and the benchmark share: models, loads, and a
 * path of sampled motions. Geometry, masses and loads are chosen for the
 * tests (lengths in mm, masses in kg, times in s: forces in mN).
 */
#ifndef KINLOOP_TEST_MACHINES_H
#define KINLOOP_TEST_MACHINES_H

#include "kinloop.h"

#ifdef __cplusplus
extern "C" {
#endif

#define MACHINE_MAX_LINKS 8
#define MACHINE_MAX_LOADS 4
#define MACHINE_MAX_INPUTS 2
/* gravity, mm / s^2, y up */
#define MACHINE_G 9810.0

enum {
  MACHINE_FOURBAR,      /* crank-rocker, a tool force on the coupler, a
                           torque on the rocker */
  MACHINE_SLIDER_CRANK, /* in-line, a gas force on the block */
  MACHINE_SIXBAR,       /* Watt six-bar: the four-bar's ternary rocker drives
                           a rod and a slider block */
  MACHINE_FIVEBAR,      /* two cranks (two inputs) and a tool at the tip */
  MACHINE_QUICK_RETURN, /* crank pin in the slot of a rocker (slot joint) */
  MACHINE_LUFFING,      /* a boom lifted by a cylinder (a prismatic input) */
  MACHINE_COUNT
};

typedef struct {
  const char *name;
  kl_model *m;                     /* finalized */
  int centre[MACHINE_MAX_LINKS];   /* the point at each link's centre of
                                      mass (-1 for ground) */
  int nloads;
  kl_load loads[MACHINE_MAX_LOADS];
  int ninputs;
  /* sketch of the first sample's assembly mode */
  int nsketch;
  int sketch_link[MACHINE_MAX_LINKS];
  double sketch_angle[MACHINE_MAX_LINKS];
  int sketch_joint;                /* a slide to sketch, or -1 */
  double sketch_slide;
  /* the motion: u = from + (to - from) k / n at sample k of n, with the
   * rates and accelerations given */
  double from[MACHINE_MAX_INPUTS], to[MACHINE_MAX_INPUTS];
  double rate[MACHINE_MAX_INPUTS], accel[MACHINE_MAX_INPUTS];
} machine;

/* Builds machine `which` (with gravity and masses when `massive`, massless
 * and without gravity otherwise; the loads either way). */
machine build_machine(int which, int massive);
/* A new solver of the machine, sketched near its first sample. */
kl_solver *machine_solver(const machine *mc);
/* The inputs, rates and accelerations of sample k of n. */
void machine_sample(const machine *mc, int k, int n, double *u, double *ud,
                    double *udd);
/* Solves position, velocity and acceleration at sample k of n (from the
 * solver's state); the first failing status, or KL_OK. */
int machine_solve(const machine *mc, kl_solver *s, int k, int n);

#ifdef __cplusplus
}
#endif

#endif
