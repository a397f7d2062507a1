/*
 * record.c - a sweep streamed as the library's rows (kl_solver_row), and
 * the columns the tool shows of them: names, places in a row, units.
 */
#define _POSIX_C_SOURCE 200809L /* isatty, fileno */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <unistd.h>

#include "cli.h"

#define PROGRESS_MIN_STEPS 2000 /* shorter sweeps finish before it helps */

int cli_row_at(const cli_model *cm, int quantity, int item) {
  return cm->row_offset[quantity] + item;
}

/* The CSV's column numbers: the input, then per moving link, per slide and
 * per point the value, rate and acceleration, the sites, rcond. */
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
static int col_rcond(const cli_model *cm) { return site_base(cm) + cm->nsites; }
int cli_column_count(const cli_model *cm) { return col_rcond(cm) + 1; }

static void set(cli_column *c, int dim, int order, int at, const char *name,
                const char *what) {
  static const char *const suffix[3] = {"", " rate", " accel"};
  c->dim = dim;
  c->order = order;
  c->at = at;
  snprintf(c->name, sizeof c->name, "%s%s%s%s", name, what[0] ? " " : "",
           what, suffix[order]);
}

void cli_columns(const cli_model *cm, int input, cli_column *cols) {
  int l, k, p, order;
  set(&cols[0], CLI_DIM_INPUT, 0,
      cli_row_at(cm, KL_QUANTITY_INPUT_VALUE, input),
      cli_input_name(cm, input), "");
  for (l = 1; l < cm->nlinks; l++)
    for (order = 0; order < 3; order++)
      set(&cols[cli_col_link(cm, l, order)], CLI_DIM_ANGLE, order,
          cli_row_at(cm, KL_QUANTITY_LINK_ANGLE + order, l),
          cm->link_names[l], "angle");
  for (k = 0; k < cm->nslides; k++)
    for (order = 0; order < 3; order++)
      set(&cols[cli_col_slide(cm, k, order)], CLI_DIM_LENGTH, order,
          cli_row_at(cm, KL_QUANTITY_JOINT_SLIDE + order, cm->slides[k]),
          cm->joint_names[cm->slides[k]], "slide");
  for (p = 0; p < cm->npoints; p++)
    for (order = 0; order < 3; order++) {
      set(&cols[cli_col_point(cm, p, 0, order)], CLI_DIM_LENGTH, order,
          cli_row_at(cm, KL_QUANTITY_POINT_X + 2 * order, p),
          cm->point_names[p], "x");
      set(&cols[cli_col_point(cm, p, 1, order)], CLI_DIM_LENGTH, order,
          cli_row_at(cm, KL_QUANTITY_POINT_Y + 2 * order, p),
          cm->point_names[p], "y");
    }
  for (k = 0; k < cm->nsites; k++)
    set(&cols[cli_col_site(cm, k)], CLI_DIM_ANGLE, 0,
        cli_row_at(cm, KL_QUANTITY_TRANSMISSION, k),
        cm->joint_names[cm->sites[k].id], "transmission angle");
  set(&cols[col_rcond(cm)], CLI_DIM_PLAIN, 0,
      cli_row_at(cm, KL_QUANTITY_RCOND, 0), "condition estimate", "");
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

int cli_picture_stride(int steps) {
  return steps / CLI_PICTURE_POINTS + 1;
}

double cli_angle_resolution(void) {
  kl_options opts;
  kl_options_default(&opts);
  return opts.tolerance;
}

double cli_length_resolution(const cli_model *cm) {
  return cli_angle_resolution() * kl_model_scale(cm->model);
}

double cli_column_resolution(const cli_model *cm, const cli_column *c) {
  if (c->dim == CLI_DIM_ANGLE)
    return cli_angle_resolution();
  if (c->dim == CLI_DIM_LENGTH)
    return cli_length_resolution(cm);
  return 0.0; /* the input itself and the condition estimate as they are */
}

double cli_shown(double raw, double factor, double resolution) {
  return fabs(raw) < resolution ? 0.0 : raw * factor;
}

const char *cli_number_format(const cli_options *o, const char *plain) {
  return o->all_digits ? "%.17g" : plain;
}

typedef struct {
  cli_row_fn fn;
  void *user;
  double *row;
  int steps, progress, shown;
  const cli_model *cm;
  int input, passages; /* the swept input; passages told so far */
} recorder;

/* Tells each change point the sweep passed (--through-change-points) as
 * it happens. */
static void tell_passages(recorder *r, const kl_solver *s) {
  int count = 0;
  double at = NAN;
  char where[320];
  kl_solver_passages(s, &count, &at);
  if (count == r->passages)
    return;
  r->passages = count;
  cli_format_input(r->cm, r->input, at, where, sizeof where);
  if (r->progress)
    fputc('\n', stderr);
  cli_error("note: passage %d through a change point at %s, on the branch "
            "with the same tangent",
            count, where);
}

static int record_step(const kl_solver *s, int step, double input,
                       void *user) {
  recorder *r = user;
  (void)input;
  tell_passages(r, s);
  kl_solver_row(s, r->row);
  if (r->progress) {
    int percent = (int)(100.0 * step / r->steps);
    if (percent != r->shown) {
      fprintf(stderr, "\rkinloop: sweeping, %3d%%", percent);
      r->shown = percent;
    }
  }
  return r->fn(r->user, step, r->row);
}

int cli_record(kl_solver *s, const cli_model *cm, const cli_range *range,
               cli_row_fn fn, void *user, kl_sweep_result *res) {
  recorder r;
  int st;
  r.fn = fn;
  r.user = user;
  r.cm = cm;
  r.input = range->input;
  r.passages = 0;
  r.steps = range->steps;
  r.shown = -1;
  r.progress = range->steps >= PROGRESS_MIN_STEPS && isatty(fileno(stderr));
  r.row = malloc((size_t)cm->row_size * sizeof *r.row);
  if (r.row == NULL)
    return KL_ENOMEM;
  res->size = sizeof *res;
  st = kl_solver_sweep(s, range->input, range->from, range->to, range->steps,
                       record_step, &r, res);
  tell_passages(&r, s);
  if (r.progress)
    fputs("\r                          \r", stderr);
  free(r.row);
  return st;
}

int cli_sweep_told(const cli_model *cm, const kl_solver *s,
                   const cli_range *r, const kl_sweep_result *res, int status,
                   const char *what, const char *then) {
  char note[1024];
  if (status == KL_LIMIT || status == KL_ESINGULAR) {
    cli_sweep_note(cm, r, res, note, sizeof note);
    cli_error("note: %s; %s", note, then);
    return CLI_EXIT_OK;
  }
  if (status != KL_OK) {
    cli_error("%s failed: %s", what, kl_solver_error(s));
    return CLI_EXIT_SOLVE;
  }
  return CLI_EXIT_OK;
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
             "after %d of %d steps; it is not passed through "
             "(--through-change-points goes on along the branch with the "
             "same tangent)",
             at, res->steps_done, r->steps + 1);
  else
    snprintf(buf, cap, "%d of %d steps", res->steps_done, r->steps + 1);
}
