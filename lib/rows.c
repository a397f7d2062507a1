/*
 * rows.c - every quantity of a state in one row of numbers: the layout of
 * a model's rows, a state read into a row, a sweep read into rows.
 */
#include <math.h>

#include "outputs.h"

/* The names of enum kl_quantity, in its order. */
static const char *const quantity_names[] = {
    "input_value",  "input_rate",       "input_accel",
    "link_angle",   "link_rate",        "link_accel",
    "joint_angle",  "joint_slide",      "joint_slide_rate",
    "joint_slide_accel", "point_x",     "point_y",
    "point_vx",     "point_vy",         "point_ax",
    "point_ay",     "transmission",     "rcond",
    "input_jerk",   "link_jerk",        "joint_slide_jerk",
    "point_jx",     "point_jy"};
#define KLI_QUANTITIES ((int)(sizeof quantity_names / sizeof quantity_names[0]))

const char *kl_quantity_str(int quantity) {
  return quantity >= 0 && quantity < KLI_QUANTITIES ? quantity_names[quantity]
                                                    : NULL;
}

/* The number of values in quantity q's block. */
static int block_size(const kl_model *m, int q) {
  switch (q) {
  case KL_QUANTITY_INPUT_VALUE:
  case KL_QUANTITY_INPUT_RATE:
  case KL_QUANTITY_INPUT_ACCEL:
  case KL_QUANTITY_INPUT_JERK:
    return m->ninputs;
  case KL_QUANTITY_LINK_ANGLE:
  case KL_QUANTITY_LINK_RATE:
  case KL_QUANTITY_LINK_ACCEL:
  case KL_QUANTITY_LINK_JERK:
    return m->nlinks;
  case KL_QUANTITY_JOINT_ANGLE:
  case KL_QUANTITY_JOINT_SLIDE:
  case KL_QUANTITY_JOINT_SLIDE_RATE:
  case KL_QUANTITY_JOINT_SLIDE_ACCEL:
  case KL_QUANTITY_JOINT_SLIDE_JERK:
    return m->njoints;
  case KL_QUANTITY_TRANSMISSION:
    return m->topo.nsites;
  case KL_QUANTITY_RCOND:
    return 1;
  default: /* the eight point quantities */
    return m->npoints;
  }
}

int kl_model_row_size(const kl_model *m) {
  int q, n = 0;
  if (m == NULL)
    return KL_EINVAL;
  if (!m->finalized)
    return KL_ESTATE;
  for (q = 0; q < KLI_QUANTITIES; q++)
    n += block_size(m, q);
  return n;
}

int kl_model_row_offset(const kl_model *m, int quantity, int *count) {
  int q, offset = 0;
  if (m == NULL)
    return KL_EINVAL;
  if (!m->finalized)
    return KL_ESTATE;
  if (quantity < 0 || quantity >= KLI_QUANTITIES)
    return KL_EID;
  for (q = 0; q < quantity; q++)
    offset += block_size(m, q);
  if (count != NULL)
    *count = block_size(m, quantity);
  return offset;
}

/* x and y of a point getter for every point, in blocks of their own;
 * returns the row position after them. */
static double *point_blocks(const kl_solver *s,
                            int (*getter)(const kl_solver *, int, double *),
                            double *r) {
  int i, np = s->model->npoints;
  for (i = 0; i < np; i++) {
    double xy[2];
    if (getter(s, i, xy) != KL_OK)
      xy[0] = xy[1] = NAN;
    r[i] = xy[0];
    r[np + i] = xy[1];
  }
  return r + 2 * np;
}

/* An input's rate, acceleration or jerk when its stage is solved. */
static double input_stage(int solved, const double *v, int i) {
  return solved ? v[i] : NAN;
}

int kl_solver_row(const kl_solver *s, double *row) {
  int (*const point_getter[3])(const kl_solver *, int, double *) = {
      kl_point_position, kl_point_velocity, kl_point_acceleration};
  const kl_model *m;
  double *r = row;
  int i, g;
  if (s == NULL || row == NULL)
    return KL_EINVAL;
  m = s->model;
  for (i = 0; i < m->ninputs; i++)
    *r++ = kl_input_value(s, i);
  for (i = 0; i < m->ninputs; i++)
    *r++ = input_stage(s->st.velocity_solved, s->st.ud, i);
  for (i = 0; i < m->ninputs; i++)
    *r++ = input_stage(s->st.acceleration_solved, s->st.udd, i);
  for (i = 0; i < m->nlinks; i++)
    *r++ = kl_link_angle(s, i);
  for (i = 0; i < m->nlinks; i++)
    *r++ = kl_link_rate(s, i);
  for (i = 0; i < m->nlinks; i++)
    *r++ = kl_link_accel(s, i);
  for (i = 0; i < m->njoints; i++)
    *r++ = kl_joint_angle(s, i);
  for (i = 0; i < m->njoints; i++)
    *r++ = kl_joint_slide(s, i);
  for (i = 0; i < m->njoints; i++)
    *r++ = kl_joint_slide_rate(s, i);
  for (i = 0; i < m->njoints; i++)
    *r++ = kl_joint_slide_accel(s, i);
  /* x and y of each getter, in blocks of their own */
  for (g = 0; g < 3; g++)
    r = point_blocks(s, point_getter[g], r);
  for (i = 0; i < m->topo.nsites; i++)
    *r++ = kli_output_value(s, &m->topo.sites[i]);
  *r++ = s->st.position_solved ? s->st.rcond : NAN;
  for (i = 0; i < m->ninputs; i++)
    *r++ = input_stage(s->st.jerk_solved, s->st.uddd, i);
  for (i = 0; i < m->nlinks; i++)
    *r++ = kl_link_jerk(s, i);
  for (i = 0; i < m->njoints; i++)
    *r++ = kl_joint_slide_jerk(s, i);
  point_blocks(s, kl_point_jerk, r);
  return KL_OK;
}

typedef struct {
  double *rows;
  size_t size;
} row_sink;

static int put_row(const kl_solver *s, int step, double input, void *user) {
  row_sink *k = user;
  (void)input;
  kl_solver_row(s, k->rows + (size_t)step * k->size);
  return 0;
}

int kl_solver_sweep_rows(kl_solver *s, int input, double from, double to,
                         int steps, double *rows, kl_sweep_result *result) {
  kl_sweep_result sw;
  row_sink sink;
  size_t k;
  int st;
  if (s == NULL || rows == NULL)
    return KL_EINVAL;
  sink.rows = rows;
  sink.size = (size_t)kl_model_row_size(s->model);
  sw.size = sizeof sw;
  st = kl_solver_sweep(s, input, from, to, steps, put_row, &sink, &sw);
  /* the rows the sweep did not deliver, where the call was not refused
   * for its steps (which may then not say how many rows there are) */
  if (steps >= 1 && steps <= KL_MAX_STEPS)
    for (k = (size_t)sw.steps_done * sink.size;
         k < ((size_t)steps + 1) * sink.size; k++)
      rows[k] = NAN;
  if (result != NULL && result->size >= sizeof(result->size))
    kli_copy_sized(result, &sw, sizeof sw);
  return st;
}
