/*
 * demo_mechanism.h - the built-in demo: a carton flap-tucking station (a
 * scenario invented for kinloop's examples), shared by the example programs.
 */
#ifndef KINLOOP_DEMO_MECHANISM_H
#define KINLOOP_DEMO_MECHANISM_H

#include "kinloop.h"

/*
 * A motor crank drives a crank-rocker four-bar; the rocker's long arm pushes
 * the tucking plate, a slider on an overhead rail, through a rod; the tip of
 * the coupler folds the carton's flap, so its path is what the designer
 * watches. Lengths in mm, on a frame with the crank pivot at the origin.
 */
typedef struct {
  kl_model *model;
  int crank, coupler, rocker, rod, plate; /* links */
  int motor;                              /* the crank's joint: input 0 */
  int plate_slide;                        /* the plate's prismatic joint */
  int tucker_tip, plate_nose;             /* points */
  int crank_pin, rocker_pin, rocker_pivot; /* the driving four-bar's pins */
  int arm_pin, plate_pin;                 /* rocker-rod and rod-plate pins */
} demo_mechanism;

/* Builds and finalizes the demo; returns KL_OK or the failing status (the
 * model's message says why). Free d->model with kl_model_free. */
int demo_build(demo_mechanism *d);
/* The loads on the station while it tucks (invented, in N): the carton
 * flap pushes back on the tucker tip and the plate drags on its rail. */
#define DEMO_NLOADS 2
void demo_loads(const demo_mechanism *d, kl_load loads[DEMO_NLOADS]);
/* Sets the sketch angles that choose the demo's working assembly. */
void demo_sketch(const demo_mechanism *d, kl_solver *s);

#endif
