/*
 * equations.h - private: the vector-loop closure equations, their Jacobian
 * values on the sparsity pattern, and the first- and second-order terms that
 * the rate stages and the point getters need.
 */
#ifndef KINLOOP_EQUATIONS_H
#define KINLOOP_EQUATIONS_H

#include "model.h"

/* A configuration: coordinates x and the cosine and sine of each link angle,
 * last taken at the angles in trig_at (NaN: never). */
typedef struct {
  double *x, *c, *s, *trig_at;
} kli_pose;

/* x = E q + G u: every coordinate from the unknowns and the inputs. Either of
 * q and u may be NULL for zeros, so the same map serves positions, rates and
 * accelerations. */
void kli_expand(const kl_model *m, const double *q, const double *u,
                double *x);
/* The two halves of kli_expand, for callers that hold u fixed: base = G u,
 * then x = base + E q (base and x may be the same array). */
void kli_expand_inputs(const kl_model *m, const double *u, double *base);
void kli_add_unknowns(const kl_model *m, const double *base, const double *q,
                      double *x);
/* Unknowns from coordinates (the inverse of kli_expand on the unknowns). */
void kli_gather(const kl_model *m, const double *x, double *q);
/* Updates p->c and p->s from p->x, for the links whose angle changed. */
void kli_pose_trig(const kl_model *m, kli_pose *p);
/* Marks p's trig as never taken. */
void kli_pose_forget_trig(const kl_model *m, kli_pose *p);

/* Sum of a chain at pose p. */
void kli_chain_value(const kl_model *m, const kli_chain *ch, const kli_pose *p,
                     double out[2]);
/* Derivative of a chain's sum along coordinate rates v: (dF/dx) v. */
void kli_chain_rate(const kl_model *m, const kli_chain *ch, const kli_pose *p,
                    const double *v, double out[2]);
/* The symmetric second-order form B(va, vb) of a chain; B(v, v) holds the
 * centripetal and Coriolis terms of its second time derivative. */
void kli_chain_second(const kl_model *m, const kli_chain *ch,
                      const kli_pose *p, const double *va, const double *vb,
                      double out[2]);

/* Second derivative of a chain's sum: (dF/dx) vdd + B(va, vb); with va = vb
 * = xdot and vdd = xddot, the acceleration of an open chain's end point. */
void kli_chain_accel(const kl_model *m, const kli_chain *ch, const kli_pose *p,
                     const double *va, const double *vb, const double *vdd,
                     double out[2]);

/* The third-order terms of a chain's third time derivative at rates v and
 * accelerations a: the part that does not multiply the jerks. */
void kli_chain_third(const kl_model *m, const kli_chain *ch,
                     const kli_pose *p, const double *v, const double *a,
                     double out[2]);
/* Third derivative of a chain's sum: (dF/dx) j + the third-order terms;
 * with v, a, j = xdot, xddot, xdddot, the jerk of an open chain's end. */
void kli_chain_jerk(const kl_model *m, const kli_chain *ch, const kli_pose *p,
                    const double *v, const double *a, const double *j,
                    double out[2]);

/* Derivative of a chain's sum with respect to local coordinate `axis` (0 x,
 * 1 y) of the attachment of `joint` on `link`, or, with joint -1, of the
 * chain's own end point (a point's local coordinates, on `link`). */
void kli_chain_dimension(const kl_model *m, const kli_chain *ch,
                         const kli_pose *p, int joint, int link, int axis,
                         double out[2]);
/* kli_chain_dimension over every row: the loops (joint >= 0), and the
 * extra rows: a point input's row moves with the attachments on its
 * point's path and, for joint -1, with its own point's local coordinates
 * (point == its point); with coupling >= 0 (joint -1), only that
 * coupling's row moves, with its radius `axis` (0 radius1, 1 radius2). */
void kli_loops_dimension(const kl_model *m, const kli_pose *p, int joint,
                         int link, int axis, int point, int coupling,
                         double *out);

/* The residuals of every loop, 2 per loop; returns |F|inf. */
double kli_residual(const kl_model *m, const kli_pose *p, double *f);
/* (dF/dx) G w over every loop: the loop-rate terms of input rates w (NULL
 * for none), with v as scratch for the coordinate rates G w. */
void kli_input_terms_at(const kl_model *m, const kli_pose *p, const double *w,
                        double *v, double *out);
/* (dF/dx) v over every loop. */
void kli_loops_rate(const kl_model *m, const kli_pose *p, const double *v,
                    double *out);
/* B(va, vb) over every loop, added to out. */
void kli_loops_add_second(const kl_model *m, const kli_pose *p,
                          const double *va, const double *vb, double *out);
/* The third-order terms of every loop at rates v and accelerations a,
 * added to out. */
void kli_loops_add_third(const kl_model *m, const kli_pose *p,
                         const double *v, const double *a, double *out);
/* Jacobian values dF/dq at p, two per nonzero pair of the pattern. */
void kli_jacobian_pairs(const kl_model *m, const kli_pose *p, double *pairs);

/* The kept rows of a model with redundant constraints (topology.c chooses
 * them). A loop keeping one row keeps its component along a direction,
 * 2 numbers per loop in `dir`: the unit vector of its lead unknown's
 * Jacobian column, from the pair values at a pose (x-axis if that column
 * is zero). */
void kli_row_directions(const kl_model *m, const double *pairs, double *dir);
/* Reduces loop rows (2 per loop) to the kept rows, in place. */
void kli_keep_rows(const kl_model *m, const double *dir, double *rows);
/* The kept system's values from the Jacobian pair values. */
void kli_keep_pairs(const kl_model *m, const double *dir, const double *pairs,
                    double *values);
/* The largest residual of the dropped rows (the component across `dir` of
 * a loop keeping one row, both rows of a loop keeping none) in the loop
 * rows `rows`, and the loop it is in (-1 if no row is dropped). */
double kli_dropped_residual(const kl_model *m, const double *dir,
                            const double *rows, int *loop);

#endif
