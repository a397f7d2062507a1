/*
 * workspace.c - the workspace of a point of a two-input linkage: its fold
 * curves seeded on a grid and traced by continuation, classed, and its area.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "describe.h"
#include "solver.h"

/* Assembly modes taken at one grid node: more than a two-input linkage of
 * a few loops has. */
#define KLI_WS_MODES 16
/* The solvers of a run: six for the grid and the tracing, and two sets of
 * assembly modes (the grid's, and where a curve stops). */
#define KLI_WS_SOLVERS (6 + 2 * KLI_WS_MODES)
/* Bisections that bring a grid edge's sign change to a seed: 1/1024 of a
 * cell, well within the corrector's reach. */
#define KLI_WS_BISECTIONS 10
/* Newton steps of the corrector, and the distance to the curve (rad, from
 * the determinant over its gradient) that ends them. */
#define KLI_WS_CORRECTIONS 12
#define KLI_WS_ON_CURVE 1e-11
/* A continuation step is refused when the tangent turns more than this
 * (rad) or the corrector moves more than this fraction of the step. */
#define KLI_WS_TURN 0.3
#define KLI_WS_CORRECTION 0.3
/* Where the image turns more than this (rad) from one stretch to the
 * next (a corner where two fold curves cross, a cusp), steps shrink to this
 * fraction of the longest, so that the corner is cut by a chord no further
 * from it than the image's second derivative times its square. */
#define KLI_WS_IMAGE_TURN 1.0
#define KLI_WS_CORNER 1e-4
/* The shortest step (rad) before a curve is taken to end on its branch,
 * and how far along it (fraction of the longest step) the next branch is
 * looked for. */
#define KLI_WS_MIN_STEP 1e-9
#define KLI_WS_HANDOVER 1e-3
/* Branch check of a predicted move: a link angle may miss its first-order
 * prediction by this fraction of the largest predicted move, plus this
 * fraction of the inputs' move (second-order terms). */
#define KLI_WS_BRANCH_FIT 0.3
#define KLI_WS_BRANCH_SLACK 0.1
/* Offset (fraction of the stretch) of the two probes beside it. */
#define KLI_WS_PROBE 0.1
/* A fold's second derivative beyond this many times its median over the
 * curve is taken as the blow-up beside a change of assembly mode. */
#define KLI_WS_WILD 20.0
/* Lines across the workspace for its area: the midpoint rule's error at
 * the round ends of a region falls as their number to the power 1.5. */
#define KLI_WS_ROWS 4000

/* A line's crossing of a fold stretch, and how the count changes there. */
typedef struct {
  double x;
  int inc;
} ws_cross;

/* The map's first and second derivatives at a solved state. */
typedef struct {
  double p[2];    /* the point */
  double d[2][2]; /* d[i] = d p / d u_i */
  double g;       /* det d(x, y)/d(u1, u2) */
  double grad[2]; /* its gradient in the inputs */
  double w[2];    /* second derivative along the kernel: the side a fold
                     bends to */
} fold_eval;

typedef struct {
  kl_solver *s; /* the caller's: options and the message */
  const kl_model *m;
  int point;
  double scale;
  double step;     /* longest step along a curve in the point's plane */
  double max_du;   /* longest step in the inputs' plane (rad) */
  int grid;
  kl_solver *modes[KLI_WS_MODES];
  kl_solver *turn[KLI_WS_MODES]; /* the assemblies where a curve stops */
  kl_solver *work, *lo, *hi, *cur, *trial, *before;
  double *xy;
  int *curves, *kinds;
  int cap, n;
  double *u, *w; /* per vertex: the inputs, and the fold's side */
  ws_cross *cross; /* per vertex: a line's crossings */
  double *side;    /* per stretch: the side its fold bends to */
  int ncurves, nclosed, seeds;
} ws_run;

static const kl_workspace_options ws_defaults = {
    sizeof(kl_workspace_options), 32, 0.01};

void kl_workspace_options_default(kl_workspace_options *o) {
  if (o != NULL)
    *o = ws_defaults;
}

const char *kl_workspace_kind_str(int kind) {
  switch (kind) {
  case KL_WORKSPACE_BOUNDARY:
    return "boundary";
  case KL_WORKSPACE_FOLD:
    return "fold";
  default:
    return "not a kind";
  }
}

static double wrap(double a) {
  return a - 2.0 * KLI_PI * floor(a / (2.0 * KLI_PI) + 0.5);
}

/* The derivatives of the point at the solver's solved position. */
static int evaluate(const ws_run *r, kl_solver *t, fold_eval *e) {
  double h[3][2], k[2], n;
  int st = kl_solve_coefficients(t);
  if (st != KL_OK)
    return st;
  kl_point_position(t, r->point, e->p);
  kl_point_deriv(t, r->point, 0, e->d[0]);
  kl_point_deriv(t, r->point, 1, e->d[1]);
  kl_point_deriv2(t, r->point, 0, 0, h[0]);
  kl_point_deriv2(t, r->point, 0, 1, h[1]);
  kl_point_deriv2(t, r->point, 1, 1, h[2]);
  e->g = e->d[0][0] * e->d[1][1] - e->d[0][1] * e->d[1][0];
  e->grad[0] = h[0][0] * e->d[1][1] + e->d[0][0] * h[1][1] -
               h[0][1] * e->d[1][0] - e->d[0][1] * h[1][0];
  e->grad[1] = h[1][0] * e->d[1][1] + e->d[0][0] * h[2][1] -
               h[1][1] * e->d[1][0] - e->d[0][1] * h[2][0];
  /* the kernel of the map is normal to its longer row */
  if (hypot(e->d[0][0], e->d[1][0]) >= hypot(e->d[0][1], e->d[1][1])) {
    k[0] = -e->d[1][0];
    k[1] = e->d[0][0];
  } else {
    k[0] = -e->d[1][1];
    k[1] = e->d[0][1];
  }
  n = hypot(k[0], k[1]);
  if (n > 0.0) {
    k[0] /= n;
    k[1] /= n;
  } else {
    k[0] = 1.0;
    k[1] = 0.0;
  }
  for (int c = 0; c < 2; c++)
    e->w[c] = k[0] * k[0] * h[0][c] + 2.0 * k[0] * k[1] * h[1][c] +
              k[1] * k[1] * h[2][c];
  return KL_OK;
}

/* Whether `to`, solved at inputs moved by du from `from` (which holds its
 * coefficients), is on from's branch: every link angle and slide within
 * reach of its first-order prediction. */
static int same_branch(const ws_run *r, const kl_solver *from,
                       const kl_solver *to, const double du[2]) {
  double miss = 0.0, move = 0.0;
  double dumax = fmax(fabs(du[0]), fabs(du[1]));
  int nl = kl_model_link_count(r->m), nj = kl_model_joint_count(r->m);
  for (int l = 1; l < nl; l++) {
    double d = kl_link_angle_deriv(from, l, 0) * du[0] +
               kl_link_angle_deriv(from, l, 1) * du[1];
    double off = wrap(kl_link_angle(to, l) - kl_link_angle(from, l) - d);
    move = fmax(move, fabs(d));
    miss = fmax(miss, fabs(off));
  }
  for (int j = 0; j < nj; j++) {
    double d, off;
    if (kl_model_joint_kind(r->m, j) == KL_JOINT_REVOLUTE)
      continue;
    d = (kl_joint_slide_deriv(from, j, 0) * du[0] +
         kl_joint_slide_deriv(from, j, 1) * du[1]) / r->scale;
    off = (kl_joint_slide(to, j) - kl_joint_slide(from, j)) / r->scale - d;
    move = fmax(move, fabs(d));
    miss = fmax(miss, fabs(off));
  }
  return miss <= KLI_WS_BRANCH_FIT * move + KLI_WS_BRANCH_SLACK * dumax;
}

/* Newton's method on the determinant along its gradient, from the solved
 * state of t at u: t ends on the curve, u and e with it. */
static int correct(const ws_run *r, kl_solver *t, double u[2],
                   fold_eval *e) {
  for (int it = 0; it < KLI_WS_CORRECTIONS; it++) {
    double n2, du[2];
    if (evaluate(r, t, e) != KL_OK)
      return KL_ESINGULAR;
    n2 = e->grad[0] * e->grad[0] + e->grad[1] * e->grad[1];
    if (!(n2 > 0.0))
      return KL_ESINGULAR;
    if (fabs(e->g) <= KLI_WS_ON_CURVE * sqrt(n2))
      return KL_OK;
    du[0] = -e->g * e->grad[0] / n2;
    du[1] = -e->g * e->grad[1] / n2;
    if (fmax(fabs(du[0]), fabs(du[1])) > r->max_du)
      return KL_EMAXITER;
    u[0] += du[0];
    u[1] += du[1];
    if (kl_solve_position(t, u) != KL_OK)
      return KL_ENOASSEMBLY;
  }
  return KL_EMAXITER;
}

/* Appends a vertex of curve `curve`. */
static int push(ws_run *r, const fold_eval *e, const double u[2],
                int curve) {
  if (r->n >= r->cap)
    return KL_ETRUNCATED;
  r->xy[2 * r->n] = e->p[0];
  r->xy[2 * r->n + 1] = e->p[1];
  r->u[2 * r->n] = u[0];
  r->u[2 * r->n + 1] = u[1];
  r->w[2 * r->n] = e->w[0];
  r->w[2 * r->n + 1] = e->w[1];
  r->curves[r->n] = curve;
  r->kinds[r->n] = KL_WORKSPACE_FOLD;
  r->n++;
  return KL_OK;
}

/* Distance from q to the segment a-b. */
static double segment_distance(const double q[2], const double a[2],
                               const double b[2]) {
  double d[2] = {b[0] - a[0], b[1] - a[1]};
  double l2 = d[0] * d[0] + d[1] * d[1];
  double s = l2 > 0.0 ? ((q[0] - a[0]) * d[0] + (q[1] - a[1]) * d[1]) / l2
                      : 0.0;
  s = s < 0.0 ? 0.0 : s > 1.0 ? 1.0 : s;
  return hypot(a[0] + s * d[0] - q[0], a[1] + s * d[1] - q[1]);
}

/* Whether a curve traced already passes through u (its stretches from
 * vertex `skip` on left out): near it in the inputs (whole turns apart
 * counting as the same) and in the point. */
static int traced(const ws_run *r, const double u[2], const double p[2],
                  int skip) {
  double near_u = 0.05 * 2.0 * KLI_PI / r->grid;
  for (int k = 0; k + 1 < r->n; k++) {
    double a[2], b[2], o[2] = {0.0, 0.0};
    if (k >= skip)
      break;
    if (r->curves[k] != r->curves[k + 1])
      continue;
    a[0] = wrap(r->u[2 * k] - u[0]);
    a[1] = wrap(r->u[2 * k + 1] - u[1]);
    b[0] = a[0] + r->u[2 * k + 2] - r->u[2 * k];
    b[1] = a[1] + r->u[2 * k + 3] - r->u[2 * k + 1];
    if (segment_distance(o, a, b) < near_u &&
        segment_distance(p, r->xy + 2 * k, r->xy + 2 * k + 2) <
            2.0 * r->step)
      return 1;
  }
  return 0;
}

/* The unit tangent of the curve at e, turned to agree with `along`. */
static void tangent(const fold_eval *e, const double along[2],
                    double t[2]) {
  double n = hypot(e->grad[0], e->grad[1]);
  t[0] = -e->grad[1] / n;
  t[1] = e->grad[0] / n;
  if (t[0] * along[0] + t[1] * along[1] < 0.0) {
    t[0] = -t[0];
    t[1] = -t[1];
  }
}

/* Where a curve stops on its branch, either the linkage's own Jacobian is
 * singular and the fold curve goes on in the assembly mode that meets
 * this one there, or another fold curve crosses it (the determinant's
 * gradient vanishes, and the corrector cannot choose). Either way the
 * curve is looked for a little further along its tangent, on this branch
 * and then in each assembly there: the first position that corrects onto
 * a fold next to the stop, ahead of it and turning less than a step may,
 * becomes r->cur. */
static int hand_over(ws_run *r, const double u[2], const double t[2],
                     const fold_eval *e) {
  for (int tries = 0; tries < 3; tries++) {
    double ahead = pow(10.0, tries) * KLI_WS_HANDOVER * r->max_du;
    double ut[2] = {u[0] + ahead * t[0], u[1] + ahead * t[1]};
    int nm = kl_solver_find_assemblies(r->work, ut, r->turn, KLI_WS_MODES);
    if (nm > KLI_WS_MODES)
      nm = KLI_WS_MODES;
    for (int q = -1; q < nm; q++) {
      double un[2] = {ut[0], ut[1]}, tn[2];
      fold_eval en;
      if (q < 0) {
        double du[2] = {ut[0] - u[0], ut[1] - u[1]};
        kl_solver_copy_state(r->trial, r->cur);
        if (kl_solve_position(r->trial, un) != KL_OK ||
            !same_branch(r, r->cur, r->trial, du))
          continue;
      } else {
        kl_solver_copy_state(r->trial, r->turn[q]);
      }
      if (correct(r, r->trial, un, &en) != KL_OK ||
          hypot(en.p[0] - e->p[0], en.p[1] - e->p[1]) > r->step ||
          (un[0] - u[0]) * t[0] + (un[1] - u[1]) * t[1] <= 0.0)
        continue;
      tangent(&en, t, tn);
      if (t[0] * tn[0] + t[1] * tn[1] < cos(KLI_WS_TURN))
        continue;
      kl_solver_copy_state(r->cur, r->trial);
      return 1;
    }
  }
  return 0;
}

/* Traces the curve through r->cur (on it, at u0 with e0) one way (`dir`
 * +1 or -1 along its tangent), appending vertices after the seed's.
 * Returns 1 when the curve closed (its seed repeated at the end), 0 when
 * it ended, or KL_ETRUNCATED. */
static int trace_way(ws_run *r, const double u0[2], const fold_eval *e0,
                     int dir, int curve, int skip) {
  double u[2] = {u0[0], u0[1]}, t[2], along[2], travelled = 0.0;
  double h = 0.25 * r->max_du, back[2] = {0.0, 0.0};
  /* the vertex before the last, to step again from when the image turned
   * inside the last step (last_h 0: none to go back to) */
  double prev_u[2] = {0.0, 0.0}, prev_t[2] = {0.0, 0.0};
  double prev_back[2] = {0.0, 0.0}, last_h = 0.0;
  fold_eval e = *e0, en, prev_e = *e0;
  int first = r->n;
  along[0] = -dir * e0->grad[1];
  along[1] = dir * e0->grad[0];
  tangent(&e, along, t);
  while (h >= KLI_WS_MIN_STEP) {
    double un[2], du[2], tn[2], image, dp;
    kl_solver *swap;
    image = hypot(e.d[0][0] * t[0] + e.d[1][0] * t[1],
                  e.d[0][1] * t[0] + e.d[1][1] * t[1]);
    if (image * h > r->step)
      h = r->step / image;
    un[0] = u[0] + h * t[0];
    un[1] = u[1] + h * t[1];
    du[0] = un[0] - u[0];
    du[1] = un[1] - u[1];
    kl_solver_copy_state(r->trial, r->cur);
    if (kl_solve_position(r->trial, un) != KL_OK ||
        !same_branch(r, r->cur, r->trial, du) ||
        correct(r, r->trial, un, &en) != KL_OK) {
      h *= 0.5;
      if (h < KLI_WS_MIN_STEP && hand_over(r, u, t, &e)) {
        first = r->n;
        last_h = 0.0;
        h = KLI_WS_HANDOVER * r->max_du;
      }
      continue;
    }
    tangent(&en, t, tn);
    dp = hypot(en.p[0] - e.p[0], en.p[1] - e.p[1]);
    if (t[0] * tn[0] + t[1] * tn[1] < cos(KLI_WS_TURN) ||
        hypot(un[0] - u[0] - du[0], un[1] - u[1] - du[1]) >
            KLI_WS_CORRECTION * h ||
        dp > 1.5 * r->step ||
        (h > KLI_WS_CORNER * r->max_du &&
         (en.p[0] - e.p[0]) * back[0] + (en.p[1] - e.p[1]) * back[1] >
             -cos(KLI_WS_IMAGE_TURN) * dp * hypot(back[0], back[1]))) {
      h *= 0.5;
      continue;
    }
    if (last_h > KLI_WS_CORNER * r->max_du &&
        (en.p[0] - e.p[0]) * back[0] + (en.p[1] - e.p[1]) * back[1] >
            -cos(KLI_WS_IMAGE_TURN) * dp * hypot(back[0], back[1])) {
      /* the image turned back between the last two vertices: its corner
       * lies inside the last step, which is taken again shorter */
      r->n--;
      kl_solver_copy_state(r->cur, r->before);
      u[0] = prev_u[0];
      u[1] = prev_u[1];
      e = prev_e;
      t[0] = prev_t[0];
      t[1] = prev_t[1];
      back[0] = prev_back[0];
      back[1] = prev_back[1];
      h = 0.5 * last_h;
      last_h = 0.0;
      continue;
    }
    kl_solver_copy_state(r->before, r->cur);
    prev_u[0] = u[0];
    prev_u[1] = u[1];
    prev_e = e;
    prev_t[0] = t[0];
    prev_t[1] = t[1];
    prev_back[0] = back[0];
    prev_back[1] = back[1];
    last_h = hypot(un[0] - u[0], un[1] - u[1]);
    back[0] = e.p[0] - en.p[0];
    back[1] = e.p[1] - en.p[1];
    travelled += hypot(un[0] - u[0], un[1] - u[1]);
    u[0] = un[0];
    u[1] = un[1];
    e = en;
    t[0] = tn[0];
    t[1] = tn[1];
    swap = r->cur;
    r->cur = r->trial;
    r->trial = swap;
    if (push(r, &e, u, curve) != KL_OK)
      return KL_ETRUNCATED;
    /* a fold curve passes from one assembly mode to the next where the
     * linkage's own Jacobian is singular; when a step went across, it may
     * run onto a stretch traced before (from another seed, or this one's
     * other way): the two join here */
    if (traced(r, u, e.p, skip))
      return 0;
    /* back at the seed (in whole turns of the inputs) after going round */
    if (r->n - first >= 3 && travelled > 2.0 * h &&
        fabs(wrap(u[0] - u0[0])) < 1.5 * h &&
        fabs(wrap(u[1] - u0[1])) < 1.5 * h &&
        hypot(e.p[0] - e0->p[0], e.p[1] - e0->p[1]) < 2.0 * r->step) {
      double home[2] = {u[0] + wrap(u0[0] - u[0]), u[1] + wrap(u0[1] - u[1])};
      return push(r, e0, home, curve) == KL_OK ? 1 : KL_ETRUNCATED;
    }
    h = fmin(1.5 * h, r->max_du);
  }
  return 0;
}

/* Reverses the vertices [from, to) in place (the first way of a curve, so
 * that the second way continues it). */
static void reverse(ws_run *r, int from, int to) {
  for (int i = from, j = to - 1; i < j; i++, j--) {
    for (int c = 0; c < 2; c++) {
      double t = r->xy[2 * i + c];
      r->xy[2 * i + c] = r->xy[2 * j + c];
      r->xy[2 * j + c] = t;
      t = r->u[2 * i + c];
      r->u[2 * i + c] = r->u[2 * j + c];
      r->u[2 * j + c] = t;
      t = r->w[2 * i + c];
      r->w[2 * i + c] = r->w[2 * j + c];
      r->w[2 * j + c] = t;
    }
  }
}

/* A curve from the seed in r->cur at u: both ways unless it closes. */
static int trace_curve(ws_run *r, double u[2]) {
  fold_eval e0;
  int first = r->n, got;
  if (correct(r, r->cur, u, &e0) != KL_OK || traced(r, u, e0.p, r->n))
    return KL_OK;
  kl_solver_copy_state(r->lo, r->cur);
  if (push(r, &e0, u, r->ncurves) != KL_OK)
    return KL_ETRUNCATED;
  got = trace_way(r, u, &e0, 1, r->ncurves, first);
  if (got < 0)
    return got;
  if (got == 0) {
    reverse(r, first, r->n);
    kl_solver_copy_state(r->cur, r->lo);
    /* the stretches beside the seed are where this way starts */
    got = trace_way(r, u, &e0, -1, r->ncurves,
                    r->n - 3 > first ? r->n - 3 : first);
    if (got < 0)
      return got;
  } else {
    r->nclosed++;
  }
  r->ncurves++;
  return KL_OK;
}

/* The grid edge from the solved state of r->lo (at u) along input k:
 * where the determinant changes sign on lo's branch, a seed. */
static int scan_edge(ws_run *r, const double u[2], int k) {
  double a[2] = {u[0], u[1]}, b[2] = {u[0], u[1]};
  fold_eval ea, eb;
  b[k] += 2.0 * KLI_PI / r->grid;
  if (evaluate(r, r->lo, &ea) != KL_OK)
    return KL_OK;
  kl_solver_copy_state(r->hi, r->lo);
  if (kl_solver_sweep(r->hi, k, a[k], b[k], 1, NULL, NULL, NULL) != KL_OK ||
      evaluate(r, r->hi, &eb) != KL_OK || (ea.g > 0.0) == (eb.g > 0.0))
    return KL_OK;
  for (int i = 0; i < KLI_WS_BISECTIONS; i++) {
    double mid[2] = {a[0], a[1]};
    fold_eval em;
    mid[k] = 0.5 * (a[k] + b[k]);
    kl_solver_copy_state(r->cur, r->lo);
    if (kl_solver_sweep(r->cur, k, a[k], mid[k], 1, NULL, NULL, NULL) !=
            KL_OK ||
        evaluate(r, r->cur, &em) != KL_OK)
      return KL_OK;
    if ((em.g > 0.0) == (ea.g > 0.0)) {
      kl_solver_copy_state(r->lo, r->cur);
      a[k] = mid[k];
    } else {
      b[k] = mid[k];
    }
  }
  r->seeds++;
  kl_solver_copy_state(r->cur, r->lo);
  return trace_curve(r, a);
}

/* Seeds from every node of the grid in every assembly mode there. */
static int seed(ws_run *r) {
  int assembled = 0;
  for (int i = 0; i < r->grid; i++)
    for (int j = 0; j < r->grid; j++) {
      /* off the grid's symmetric values, where special positions sit */
      double u[2] = {2.0 * KLI_PI * (i + 0.1234) / r->grid,
                     2.0 * KLI_PI * (j + 0.2345) / r->grid};
      int nm = kl_solver_find_assemblies(r->work, u, r->modes, KLI_WS_MODES);
      if (nm > KLI_WS_MODES)
        nm = KLI_WS_MODES;
      for (int q = 0; q < nm; q++) {
        assembled = 1;
        for (int k = 0; k < 2; k++) {
          int st;
          kl_solver_copy_state(r->lo, r->modes[q]);
          if ((st = scan_edge(r, u, k)) != KL_OK)
            return st;
        }
      }
    }
  return assembled ? KL_OK : KL_ENOASSEMBLY;
}

/* The fold stretch k's crossing of the line y = q[1] left of q[0], if
 * any, into *x; returns the change of the count of assemblies going +x
 * across it: a fold adds two on the side it bends to. */
static int crossing(const ws_run *r, int k, double y, double *x) {
  const double *a = r->xy + 2 * k, *b = a + 2;
  int left;
  if (r->curves[k] != r->curves[k + 1] ||
      !((a[1] <= y && y < b[1]) || (b[1] <= y && y < a[1])))
    return 0;
  *x = a[0] + (y - a[1]) * (b[0] - a[0]) / (b[1] - a[1]);
  /* going +x crosses toward the stretch's left when it runs down */
  left = r->side[k] > 0.0;
  return (b[1] - a[1] < 0.0) == left ? 2 : -2;
}

static int by_x(const void *a, const void *b) {
  double xa = ((const ws_cross *)a)->x, xb = ((const ws_cross *)b)->x;
  return (xa > xb) - (xa < xb);
}

/* Which side of each stretch its fold bends to (+1 its left, -1 its
 * right), into r->side, from the second derivative w at its two ends: the
 * side of w. Where the image turns back (a cusp, a corner where two folds
 * cross) w stays right. Beside a change of assembly mode it grows without
 * bound and its sign is not to be trusted: there, where w exceeds
 * KLI_WS_WILD times its median over the curve or the two ends disagree,
 * the side is carried from the nearest stretch before (else after) whose
 * side is known; the curve does not turn back there. */
static void fold_sides(ws_run *r) {
  int from = 0;
  while (from + 1 < r->n) {
    int to = from + 1, m = 0;
    double median;
    while (to < r->n && r->curves[to] == r->curves[from])
      to++;
    for (int k = from; k < to; k++)
      r->cross[m++].x = hypot(r->w[2 * k], r->w[2 * k + 1]);
    qsort(r->cross, (size_t)m, sizeof *r->cross, by_x);
    median = r->cross[m / 2].x;
    for (int k = from; k + 1 < to; k++) {
      const double *a = r->xy + 2 * k, *w = r->w + 2 * k;
      double nl[2] = {a[1] - a[3], a[2] - a[0]};
      double sa = nl[0] * w[0] + nl[1] * w[1];
      double sb = nl[0] * w[2] + nl[1] * w[3];
      int wild = hypot(w[0], w[1]) > KLI_WS_WILD * median ||
                 hypot(w[2], w[3]) > KLI_WS_WILD * median;
      r->side[k] = wild || (sa > 0.0) != (sb > 0.0) ? 0.0
                   : sa > 0.0                       ? 1.0
                                                    : -1.0;
    }
    for (int pass = 0; pass < 2; pass++)
      for (int i = 1; i + 1 < to - from; i++) {
        int k = pass == 0 ? from + i : to - 2 - i, j = pass == 0 ? k - 1 : k + 1;
        if (r->side[k] == 0.0)
          r->side[k] = r->side[j];
      }
    from = to;
  }
}

/* The assemblies that reach q, counted along the ray from -x to q. */
static int reach_count(const ws_run *r, const double q[2]) {
  int count = 0;
  for (int k = 0; k + 1 < r->n; k++) {
    double x;
    int inc = crossing(r, k, q[1], &x);
    if (inc != 0 && x < q[0])
      count += inc;
  }
  return count;
}


/* The area where some assembly reaches: on KLI_WS_ROWS lines across the
 * curves' extent, the length where the count is positive, by the midpoint
 * rule. Curves traced twice over (two assemblies folding on one circle)
 * count twice, as they should, so no stretch needs to be told apart. */
static double reach_area(const ws_run *r, ws_cross *cross) {
  double lo = INFINITY, hi = -INFINITY, area = 0.0, dy;
  for (int k = 0; k < r->n; k++) {
    lo = fmin(lo, r->xy[2 * k + 1]);
    hi = fmax(hi, r->xy[2 * k + 1]);
  }
  if (!(hi > lo))
    return 0.0;
  dy = (hi - lo) / KLI_WS_ROWS;
  for (int i = 0; i < KLI_WS_ROWS; i++) {
    double y = lo + (i + 0.5) * dy;
    int nc = 0, count = 0;
    for (int k = 0; k + 1 < r->n; k++) {
      int inc = crossing(r, k, y, &cross[nc].x);
      if (inc != 0)
        cross[nc++].inc = inc;
    }
    qsort(cross, (size_t)nc, sizeof *cross, by_x);
    for (int c = 0; c + 1 < nc; c++) {
      count += cross[c].inc;
      if (count > 0)
        area += (cross[c + 1].x - cross[c].x) * dy;
    }
  }
  return area;
}

/* Whether the count of assemblies is positive on one side of stretch k
 * and not on the other, with the probes `eps` off its middle. */
static int on_boundary(const ws_run *r, int k, double eps) {
  const double *a = r->xy + 2 * k, *b = a + 2;
  double d[2] = {b[0] - a[0], b[1] - a[1]}, l = hypot(d[0], d[1]);
  double ql[2], qr[2];
  ql[0] = 0.5 * (a[0] + b[0]) - eps * d[1] / l;
  ql[1] = 0.5 * (a[1] + b[1]) + eps * d[0] / l;
  qr[0] = 0.5 * (a[0] + b[0]) + eps * d[1] / l;
  qr[1] = 0.5 * (a[1] + b[1]) - eps * d[0] / l;
  return (reach_count(r, ql) > 0) != (reach_count(r, qr) > 0);
}

/* Classes every stretch by the assemblies that reach its two sides, and
 * takes the boundary's extent. Two pairs of probes: a tenth of a step off
 * the stretch's middle, beyond the chords of a curve traced twice over;
 * and a tenth of the stretch off, short of a corner it ends at. Either
 * pair finding the two sides apart makes the stretch boundary. */
static void classify(ws_run *r, kl_workspace_result *res) {
  double box[4] = {NAN, NAN, NAN, NAN};
  for (int k = 0; k < r->n; k++) {
    const double *a = r->xy + 2 * k, *b = a + 2;
    double l;
    if (k + 1 == r->n || r->curves[k] != r->curves[k + 1]) {
      if (k > 0 && r->curves[k] == r->curves[k - 1])
        r->kinds[k] = r->kinds[k - 1];
      continue;
    }
    l = hypot(b[0] - a[0], b[1] - a[1]);
    if (!(l > 0.0) || !(on_boundary(r, k, KLI_WS_PROBE * r->step) ||
                        on_boundary(r, k, KLI_WS_PROBE * fmin(r->step, l))))
      continue;
    r->kinds[k] = KL_WORKSPACE_BOUNDARY;
    for (int c = 0; c < 2; c++) {
      double lo = fmin(a[c], b[c]), hi = fmax(a[c], b[c]);
      box[c] = isnan(box[c]) ? lo : fmin(box[c], lo);
      box[2 + c] = isnan(box[2 + c]) ? hi : fmax(box[2 + c], hi);
    }
  }
  res->xmin = box[0];
  res->ymin = box[1];
  res->xmax = box[2];
  res->ymax = box[3];
}

static int check(kl_solver *s, int point, const kl_workspace_options *o,
                 const double *xy, const int *curves, const int *kinds,
                 int cap, const kl_workspace_result *res) {
  const kl_model *m = s->model;
  const char *stage = "workspace";
  int n = kl_model_input_count(m);
  if (o == NULL || o->size < sizeof(kl_workspace_options))
    return kli_fail(s->error, KL_EINVAL,
                    "%s: %s; start from kl_workspace_options_default()",
                    stage, o == NULL ? "no options (NULL)"
                                     : "options size too small");
  if (res != NULL && res->size < sizeof(kl_workspace_result))
    return kli_fail(s->error, KL_EINVAL,
                    "%s: result size too small; set it to "
                    "sizeof(kl_workspace_result)",
                    stage);
  if (xy == NULL || curves == NULL || kinds == NULL || cap < 2)
    return kli_fail(s->error, KL_EINVAL,
                    "%s: the vertex arrays are NULL or hold fewer than 2 "
                    "(cap %d)",
                    stage, cap);
  if (n != 2)
    return kli_fail(s->error, KL_EDOF,
                    "%s: needs a model with two inputs; this one has %d",
                    stage, n);
  for (int i = 0; i < 2; i++) {
    int j = kl_model_input_joint(m, i);
    char li[KLI_LABEL_SIZE];
    if (j < 0)
      return kli_fail(s->error, KL_EKIND,
                      "%s: %s is a point input; the workspace takes turning "
                      "inputs over whole turns",
                      stage, kli_input_label(m, i, li, sizeof li));
    if (kl_model_joint_kind(m, j) != KL_JOINT_REVOLUTE) {
      char label[KLI_LABEL_SIZE];
      return kli_fail(s->error, KL_EKIND,
                      "%s: %s drives %s, a sliding joint; the workspace "
                      "takes turning inputs over whole turns",
                      stage, kli_input_label(m, i, li, sizeof li),
                      kli_joint_label(m, j, label, sizeof label));
    }
  }
  if (point < 0 || point >= kl_model_point_count(m))
    return kli_fail_index(s->error, stage, "point", point,
                          kl_model_point_count(m));
  if (kl_model_point_link(m, point, NULL) == KL_GROUND) {
    char label[96];
    return kli_fail(s->error, KL_EKIND,
                    "%s: %s is on ground: it does not move", stage,
                    kli_point_label(m, point, label, sizeof label));
  }
  if (!isfinite(o->step))
    return kli_fail(s->error, KL_ENONFINITE,
                    "%s: the step is NaN or infinite", stage);
  if (o->grid < 4 || o->grid > 720 || !(o->step > 0.0) || o->step > 0.5)
    return kli_fail(s->error, KL_EINVAL,
                    "%s: grid %d (4 to 720) or step %g (over 0, at most "
                    "0.5) out of range",
                    stage, o->grid, o->step);
  return KL_OK;
}

/* The solvers and scratch of a run, from the model's allocator; NULL
 * pointers are skipped on the way out. */
static kl_solver **run_solver(ws_run *r, int k) {
  kl_solver **all[KLI_WS_SOLVERS] = {&r->work, &r->lo,    &r->hi,
                                     &r->cur,  &r->trial, &r->before};
  for (int q = 0; q < KLI_WS_MODES; q++) {
    all[6 + q] = &r->modes[q];
    all[6 + KLI_WS_MODES + q] = &r->turn[q];
  }
  return all[k];
}

static void release(ws_run *r) {
  const kli_allocator *al = &r->m->alloc;
  for (int k = 0; k < KLI_WS_SOLVERS; k++)
    kl_solver_free(*run_solver(r, k));
  kli_free(al, r->u, 2 * sizeof(double) * (size_t)r->cap);
  kli_free(al, r->w, 2 * sizeof(double) * (size_t)r->cap);
  kli_free(al, r->cross, sizeof(ws_cross) * (size_t)r->cap);
  kli_free(al, r->side, sizeof(double) * (size_t)r->cap);
}

static int acquire(ws_run *r) {
  const kli_allocator *al = &r->m->alloc;
  kl_options opt;
  kl_options_default(&opt);
  kl_solver_options(r->s, &opt);
  for (int k = 0; k < KLI_WS_SOLVERS; k++) {
    kl_solver **p = run_solver(r, k);
    if ((*p = kl_solver_new(r->m)) == NULL)
      return KL_ENOMEM;
    kl_solver_set_options(*p, &opt);
  }
  r->u = kli_alloc(al, 2 * sizeof(double) * (size_t)r->cap);
  r->w = kli_alloc(al, 2 * sizeof(double) * (size_t)r->cap);
  r->cross = kli_alloc(al, sizeof(ws_cross) * (size_t)r->cap);
  r->side = kli_alloc(al, sizeof(double) * (size_t)r->cap);
  return r->u == NULL || r->w == NULL || r->cross == NULL || r->side == NULL
             ? KL_ENOMEM
             : KL_OK;
}

int kl_solver_workspace(kl_solver *s, int point,
                        const kl_workspace_options *o, double *xy,
                        int *curves, int *kinds, int cap,
                        kl_workspace_result *result) {
  ws_run r;
  kl_workspace_result res;
  int st;
  if (s == NULL)
    return KL_EINVAL;
  if ((st = check(s, point, o, xy, curves, kinds, cap, result)) != KL_OK)
    return st;
  memset(&r, 0, sizeof r);
  r.s = s;
  r.m = s->model;
  r.point = point;
  r.scale = kl_model_scale(r.m);
  r.step = o->step * r.scale;
  r.grid = o->grid;
  r.max_du = KLI_PI / o->grid;
  r.xy = xy;
  r.curves = curves;
  r.kinds = kinds;
  r.cap = cap;
  st = acquire(&r);
  if (st == KL_OK)
    st = seed(&r);
  memset(&res, 0, sizeof res);
  res.size = sizeof res;
  res.vertices = r.n;
  res.curves = r.ncurves;
  res.closed = r.nclosed;
  res.seeds = r.seeds;
  res.area = NAN;
  res.xmin = res.ymin = res.xmax = res.ymax = NAN;
  if (st == KL_OK) {
    fold_sides(&r);
    classify(&r, &res);
    res.area = reach_area(&r, r.cross);
  }
  release(&r);
  if (result != NULL)
    *result = res;
  switch (st) {
  case KL_OK:
    return KL_OK;
  case KL_ENOMEM:
    return kli_fail(s->error, st, "workspace: out of memory");
  case KL_ETRUNCATED:
    return kli_fail(s->error, st,
                    "workspace: the curves need more than %d vertices; "
                    "give larger arrays or a longer step",
                    cap);
  default:
    return kli_fail(s->error, st,
                    "workspace: the linkage assembles at no node of the "
                    "%d x %d grid of its inputs",
                    r.grid, r.grid);
  }
}
