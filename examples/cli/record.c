/*
 * record.c - a sweep as rows of raw library values (one column per angle,
 * slide, point coordinate, rate, acceleration, transmission angle), and
 * the units those columns are shown in.
 */
#define _POSIX_C_SOURCE 200809L /* isatty, fileno */
#include <stdio.h>
#include <stdlib.h>
#include <unistd.h>

#include "cli.h"

#define PROGRESS_MIN_STEPS 2000 /* shorter sweeps finish before it helps */

static int link_base(void) { return 1; }
static int slide_base(const cli_model *cm) {
  return link_base() + 3 * (cm->nlinks - 1);
}
static int point_base(const cli_model *cm) {
  return slide_base(cm) + 3 * cm->nslides;
}
static int site_base(const cli_model *cm) {
  return point_base(cm) + 6 * cm->npoints;
}

int cli_col_link(const cli_model *cm, int link, int order) {
  (void)cm;
  return link_base() + 3 * (link - 1) + order;
}
int cli_col_slide(const cli_model *cm, int slide_index, int order) {
  return slide_base(cm) + 3 * slide_index + order;
}
int cli_col_point(const cli_model *cm, int point, int axis, int order) {
  return point_base(cm) + 6 * point + 2 * order + axis;
}
int cli_col_site(const cli_model *cm, int site) {
  return site_base(cm) + site;
}
int cli_col_rcond(const cli_model *cm) { return site_base(cm) + cm->nsites; }
int cli_column_count(const cli_model *cm) { return cli_col_rcond(cm) + 1; }

static void set(cli_column *c, int dim, int order, const char *name,
                const char *what) {
  static const char *const suffix[3] = {"", " rate", " accel"};
  c->dim = dim;
  c->order = order;
  snprintf(c->name, sizeof c->name, "%s%s%s%s", name, what[0] ? " " : "",
           what, suffix[order]);
}

void cli_columns(const cli_model *cm, int input, cli_column *cols) {
  int l, k, p, order;
  set(&cols[0], CLI_DIM_INPUT, 0, cli_input_name(cm, input), "");
  for (l = 1; l < cm->nlinks; l++)
    for (order = 0; order < 3; order++)
      set(&cols[cli_col_link(cm, l, order)], CLI_DIM_ANGLE, order,
          cm->link_names[l], "angle");
  for (k = 0; k < cm->nslides; k++)
    for (order = 0; order < 3; order++)
      set(&cols[cli_col_slide(cm, k, order)], CLI_DIM_LENGTH, order,
          cm->joint_names[cm->slides[k]], "slide");
  for (p = 0; p < cm->npoints; p++)
    for (order = 0; order < 3; order++) {
      set(&cols[cli_col_point(cm, p, 0, order)], CLI_DIM_LENGTH, order,
          cm->point_names[p], "x");
      set(&cols[cli_col_point(cm, p, 1, order)], CLI_DIM_LENGTH, order,
          cm->point_names[p], "y");
    }
  for (k = 0; k < cm->nsites; k++)
    set(&cols[cli_col_site(cm, k)], CLI_DIM_ANGLE, 0,
        cm->joint_names[cm->sites[k].joint], "transmission angle");
  set(&cols[cli_col_rcond(cm)], CLI_DIM_PLAIN, 0, "condition estimate", "");
}

static double dim_factor(const cli_model *cm, int input, int dim) {
  return dim == CLI_DIM_ANGLE   ? cm->angle_factor
         : dim == CLI_DIM_INPUT ? cli_input_factor(cm, input)
                                : 1.0;
}

double cli_column_factor(const cli_model *cm, int input, const cli_column *c,
                         double speed) {
  /* raw rates are per rad (or length) of input at unit rate: the speed in
   * library units per second is speed / input factor */
  double w = speed / cli_input_factor(cm, input), f = dim_factor(cm, input, c->dim);
  int k;
  for (k = 0; k < c->order; k++)
    f *= w;
  return f;
}

void cli_column_unit(const cli_model *cm, int input, const cli_column *c,
                     int per_input, char *buf, size_t cap) {
  const char *base = c->dim == CLI_DIM_ANGLE    ? cm->angle_unit
                     : c->dim == CLI_DIM_LENGTH ? cm->length_unit
                     : c->dim == CLI_DIM_INPUT  ? cli_input_unit(cm, input)
                                                : "rcond";
  const char *per = per_input ? cli_input_unit(cm, input) : "s";
  if (c->order == 0)
    snprintf(buf, cap, "%s", base);
  else
    snprintf(buf, cap, "%s/%s%s", base, per, c->order == 2 ? "^2" : "");
}

typedef struct {
  const cli_model *cm;
  cli_row_fn fn;
  void *user;
  double *row;
  int steps, progress, shown;
} recorder;

static int record_step(const kl_solver *s, int step, double input,
                       void *user) {
  recorder *r = user;
  const cli_model *cm = r->cm;
  kl_solve_stats stats;
  double *row = r->row;
  int l, k, p;
  row[0] = input;
  for (l = 1; l < cm->nlinks; l++) {
    row[cli_col_link(cm, l, 0)] = kl_link_angle(s, l);
    row[cli_col_link(cm, l, 1)] = kl_link_rate(s, l);
    row[cli_col_link(cm, l, 2)] = kl_link_accel(s, l);
  }
  for (k = 0; k < cm->nslides; k++) {
    row[cli_col_slide(cm, k, 0)] = kl_joint_slide(s, cm->slides[k]);
    row[cli_col_slide(cm, k, 1)] = kl_joint_slide_rate(s, cm->slides[k]);
    row[cli_col_slide(cm, k, 2)] = kl_joint_slide_accel(s, cm->slides[k]);
  }
  for (p = 0; p < cm->npoints; p++) {
    kl_point_position(s, p, row + cli_col_point(cm, p, 0, 0));
    kl_point_velocity(s, p, row + cli_col_point(cm, p, 0, 1));
    kl_point_acceleration(s, p, row + cli_col_point(cm, p, 0, 2));
  }
  for (k = 0; k < cm->nsites; k++)
    row[cli_col_site(cm, k)] = cli_site_value(s, &cm->sites[k]);
  stats.size = sizeof stats;
  kl_solver_stats(s, &stats);
  row[cli_col_rcond(cm)] = stats.rcond;
  if (r->progress) {
    int percent = (int)(100.0 * step / r->steps);
    if (percent != r->shown) {
      fprintf(stderr, "\rkinloop: sweeping, %3d%%", percent);
      r->shown = percent;
    }
  }
  return r->fn(r->user, step, row);
}

int cli_record(kl_solver *s, const cli_model *cm, const cli_range *range,
               cli_row_fn fn, void *user, kl_sweep_result *res) {
  recorder r;
  int st;
  r.cm = cm;
  r.fn = fn;
  r.user = user;
  r.steps = range->steps;
  r.shown = -1;
  r.progress = range->steps >= PROGRESS_MIN_STEPS && isatty(fileno(stderr));
  r.row = malloc((size_t)cli_column_count(cm) * sizeof *r.row);
  if (r.row == NULL)
    return KL_ENOMEM;
  res->size = sizeof *res;
  st = kl_solver_sweep(s, range->input, range->from, range->to, range->steps,
                record_step, &r, res);
  if (r.progress)
    fputs("\r                          \r", stderr);
  free(r.row);
  return st;
}

void cli_sweep_note(const cli_model *cm, const cli_range *r,
                    const kl_sweep_result *res, char *buf, size_t cap) {
  char at[320];
  cli_format_input(cm, r->input, res->limit_input, at, sizeof at);
  if (res->status == KL_LIMIT)
    snprintf(buf, cap,
             "the motion stops at %s (a toggle or limit position) after %d of "
             "%d steps",
             at, res->steps_done, r->steps + 1);
  else if (res->status == KL_ESINGULAR)
    snprintf(buf, cap,
             "the motion meets a singular position (change point) at %s, "
             "after %d of %d steps; it is not passed through",
             at, res->steps_done, r->steps + 1);
  else
    snprintf(buf, cap, "%d of %d steps", res->steps_done, r->steps + 1);
}
