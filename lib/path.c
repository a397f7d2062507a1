/*
 * path.c - a path follower: two point inputs drive their point along a
 * polyline at a given speed, by continuation from one arc length to
 * another, with rates and accelerations where it arrives.
 */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "describe.h"
#include "velocity.h"

/* Continuation steps are no longer than this fraction of the model's
 * scale, so that the tangent predictor keeps each on its branch. */
#define KLI_PATH_STEP 0.02
/* Halvings of a step that fails before its end is called a limit. */
#define KLI_PATH_HALVINGS 40

typedef struct {
  int n;
  const double *x, *y;
  double length;
} polyline;

/* The point at arc length a along the polyline, and its unit tangent
 * (the next segment's at a vertex; zero-length segments skipped). */
static void locate(const polyline *p, double a, double at[2], double t[2]) {
  int k;
  for (k = 0; k < p->n - 1; k++) {
    double dx = p->x[k + 1] - p->x[k], dy = p->y[k + 1] - p->y[k];
    double len = hypot(dx, dy);
    if (len == 0.0)
      continue;
    if (a < len || k == p->n - 2) {
      double f = fmin(a, len) / len;
      at[0] = p->x[k] + f * dx;
      at[1] = p->y[k] + f * dy;
      t[0] = dx / len;
      t[1] = dy / len;
      return;
    }
    a -= len;
  }
}

static int check_path(kl_solver *s, int input_x, int input_y, int npoints,
                      const double *path_x, const double *path_y,
                      double speed, polyline *p) {
  static const char what[] = "follow path";
  const kl_model *m = s->model;
  int k, axis[2], inputs[2];
  char lx[KLI_LABEL_SIZE], ly[KLI_LABEL_SIZE];
  inputs[0] = input_x;
  inputs[1] = input_y;
  for (k = 0; k < 2; k++) {
    if (inputs[k] < 0 || inputs[k] >= m->ninputs)
      return kli_fail_index(s->error, what, "input", inputs[k], m->ninputs);
    if (kli_point_input_of(m, inputs[k]) == NULL)
      return kli_fail(s->error, KL_EKIND,
                      "%s: %s is a joint's, not a point's coordinate", what,
                      kli_input_label(m, inputs[k], lx, sizeof lx));
    axis[k] = kli_point_input_of(m, inputs[k])->axis;
  }
  if (axis[0] != 0 || axis[1] != 1 ||
      kli_point_input_of(m, input_x)->point !=
          kli_point_input_of(m, input_y)->point)
    return kli_fail(s->error, KL_EINVAL,
                    "%s: %s and %s must be the x and the y of one point",
                    what, kli_input_label(m, input_x, lx, sizeof lx),
                    kli_input_label(m, input_y, ly, sizeof ly));
  if (npoints < 2 || path_x == NULL || path_y == NULL)
    return kli_fail(s->error, KL_EINVAL,
                    "%s: a path needs at least 2 points (%d given)", what,
                    npoints);
  if (!isfinite(speed))
    return kli_fail(s->error, KL_ENONFINITE, "%s: the speed is %g", what,
                    speed);
  p->n = npoints;
  p->x = path_x;
  p->y = path_y;
  p->length = 0.0;
  for (k = 0; k < npoints; k++) {
    if (!isfinite(path_x[k]) || !isfinite(path_y[k]))
      return kli_fail(s->error, KL_ENONFINITE,
                      "%s: the path's point index %d (0-based) is NaN or "
                      "infinite",
                      what, k);
    if (k > 0)
      p->length += hypot(path_x[k] - path_x[k - 1], path_y[k] - path_y[k - 1]);
  }
  if (!(p->length > 0.0))
    return kli_fail(s->error, KL_EZEROLENGTH,
                    "%s: the path's %d points all coincide", what, npoints);
  if (!s->st.position_solved || !s->st.inputs_known)
    return kli_fail(s->error, KL_ESTAGE,
                    "%s needs a solved position first (the path starts from "
                    "it, and the other inputs keep their values)",
                    what);
  return KL_OK;
}

/* Solves the position at arc a; KL_OK or the position's status. */
static int reach_arc(kl_solver *s, const polyline *p, int ix, int iy,
                     double a) {
  double at[2], t[2];
  memcpy(s->sweep_u, s->st.u, (size_t)s->ninputs * sizeof(double));
  locate(p, a, at, t);
  s->sweep_u[ix] = at[0];
  s->sweep_u[iy] = at[1];
  return kl_solve_position(s, s->sweep_u);
}

/* Rates and accelerations at arc a: the point moves at `speed` along the
 * segment's tangent, the other inputs stand still. */
static int rates_at(kl_solver *s, const polyline *p, int ix, int iy,
                    double a, double speed) {
  double at[2], t[2];
  int st;
  locate(p, a, at, t);
  memset(s->sweep_rate, 0, (size_t)s->ninputs * sizeof(double));
  memset(s->sweep_zero, 0, (size_t)s->ninputs * sizeof(double));
  s->sweep_rate[ix] = speed * t[0];
  s->sweep_rate[iy] = speed * t[1];
  if ((st = kl_solve_velocity(s, s->sweep_rate)) != KL_OK)
    return st;
  return kl_solve_acceleration(s, s->sweep_zero);
}

int kl_solver_follow_path(kl_solver *s, int input_x, int input_y,
                          int npoints, const double *path_x,
                          const double *path_y, double from_arc,
                          double to_arc, double speed,
                          kl_path_result *result) {
  kl_path_result out;
  polyline p;
  double done, hop, dir;
  int st;
  if (s == NULL || (result != NULL && result->size < sizeof out))
    return KL_EINVAL;
  memset(&out, 0, sizeof out);
  out.size = sizeof out;
  out.limit_arc = NAN;
  if ((st = check_path(s, input_x, input_y, npoints, path_x, path_y, speed,
                       &p)) != KL_OK)
    return st;
  if (!isfinite(from_arc) || !isfinite(to_arc))
    return kli_fail(s->error, KL_ENONFINITE,
                    "follow path: an arc length is NaN or infinite");
  from_arc = fmin(fmax(from_arc, 0.0), p.length);
  to_arc = fmin(fmax(to_arc, 0.0), p.length);
  hop = KLI_PATH_STEP * s->model->topo.scale;
  dir = to_arc >= from_arc ? 1.0 : -1.0;
  done = from_arc;
  out.arc_done = done;
  /* continuation along the path, the first step from the solver's state */
  for (;;) {
    double step = fmin(hop, fabs(to_arc - done));
    int halvings = 0, first = done == from_arc;
    if (step == 0.0 && !first)
      break;
    while ((st = reach_arc(s, &p, input_x, input_y, done + dir * step)) !=
               KL_OK &&
           halvings++ < KLI_PATH_HALVINGS)
      step *= 0.5;
    if (st != KL_OK) {
      char at[KLI_LABEL_SIZE], of[KLI_LABEL_SIZE];
      out.limit_arc = done;
      out.status = st == KL_ESINGULAR ? KL_ESINGULAR : KL_LIMIT;
      kli_fail(s->error, out.status,
               "follow path: the point %s at arc length %s of %s",
               st == KL_ESINGULAR ? "meets a singular position"
                                  : "leaves the workspace",
               kli_length_value(s->model, done, 10, at, sizeof at),
               kli_length_value(s->model, p.length, 10, of, sizeof of));
      goto finish;
    }
    done += dir * step;
    out.arc_done = done;
    if (step == 0.0)
      break;
  }
  out.status = rates_at(s, &p, input_x, input_y, done, dir * speed);
finish:
  if (result != NULL)
    memcpy(result, &out, sizeof out);
  return out.status;
}
