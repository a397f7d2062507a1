/*
 * slots.h - private: the path a sliding joint's pin follows in its guide
 * link's frame (a line, a circle, a cubic spline), evaluated in O(1).
 */
#ifndef KINLOOP_SLOTS_H
#define KINLOOP_SLOTS_H

#include "model.h"

/* A curve slot's spline: the points and the spline's second derivatives
 * there (2 numbers each, x then y), in one allocation of kli_curve_bytes. */
typedef struct kli_curve {
  int n, closed;
  double *xy, *m2;
} kli_curve;

size_t kli_curve_bytes(int n);
/* Checks and builds the spline through n points xy into a new curve (NULL
 * in *out on error, with the status and message in `error`). */
int kli_curve_new(const kli_allocator *a, int n, const double *xy, int closed,
                  char *error, const char *what, kli_curve **out);
/* A copy of c with allocator a, or NULL when memory runs out. */
kli_curve *kli_curve_copy(const kli_allocator *a, const kli_curve *c);
void kli_curve_free(const kli_allocator *a, kli_curve *c);

/* The slot path of sliding joint j at slide s, in a's frame relative to
 * a's attachment point: out = g, dg/ds, d2g/ds2 (x, y each). */
void kli_slot_path(const kli_joint *j, double s, double out[6]);
/* d3g/ds3 of the same path at slide s (x, y): what the jerk stage needs
 * beyond kli_slot_path (constant on each piece of a spline, 0 on a line). */
void kli_slot_path_third(const kli_joint *j, double s, double out[2]);
/* Whether slide s lies on the slot (beyond an open curve's ends it does
 * not); every other sliding joint's slide is unbounded. */
int kli_slide_on_slot(const kli_joint *j, double s);
/* The last parameter of an open curve (n - 1). */
double kli_curve_end(const kli_curve *c);

#endif
