/*
 * follower.c - the follower command: a cam follower's motion and pressure
 * angle over the cam angle, read from the whole model at each step of a
 * sweep (kl_cam_follower_state), as CSV and SVG charts.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

const char cli_follower_help[] =
    "usage: kinloop follower MODEL [--cam JOINT] [--input I] [--from V]\n"
    "                        [--to V] [--steps N] [--at V,...] [--charts DIR]\n"
    "                        [--all-digits] [-o FILE]\n"
    "\n"
    "Sweeps the model (by default input 1 over a full turn, or the model's\n"
    "'sweep' line) and writes one CSV row per step: the swept input, then\n"
    "for each cam its cam angle, the follower's rise above its lowest\n"
    "position over the run (its guide's slide, or its arm's angle), the\n"
    "rise's first, second and third derivatives over the cam angle, with\n"
    "the model's 'speed' line on the swept input also the follower's\n"
    "velocity, acceleration and jerk in time, and the pressure angle; in\n"
    "the model's units. A cam is the pin-in-slot joint of a 'cam' line\n"
    "(docs/model-format.md), or any slot whose link turns on a revolute\n"
    "joint with ground and whose pin's link is guided by ground (a\n"
    "revolute or prismatic joint).\n"
    "\n"
    "options:\n"
    "  --cam JOINT       the cam's joint (name or number from 1); by default\n"
    "                    every 'cam' line's joint\n"
    "  --input, --from, --to, --steps, --at   the sweep, as for 'sweep'\n"
    "                    (default 360 steps)\n"
    "  --charts DIR      write SVG charts over the cam angle into DIR (made\n"
    "                    if missing): for each cam the rise and its three\n"
    "                    derivatives (in time too with a speed line), and the\n"
    "                    pressure angle with its largest size marked\n"
    "  --all-digits      write every number with 17 significant digits\n"
    "                    (default 9)\n"
    "  -o, --output FILE write to FILE instead of standard output\n"
    "\n"
    "A model without a cam (and no --cam) exits with 3; a step that does not\n"
    "solve with 4 (a motion limit on the way ends the rows there, noted).\n";

/* What a row holds per cam: the state of kl_cam_follower_state. */
#define PER_CAM KL_CAM_STATE_SIZE

typedef struct {
  const cli_model *cm;
  int ncams;
  const int *cams;
  double *table; /* rows of 1 + PER_CAM ncams: the input, then each cam's */
  int width, rows, status, failed_cam;
} run;

static int take_row(const kl_solver *s, int step, double input, void *user) {
  run *r = user;
  double *row = r->table + (size_t)r->rows * (size_t)r->width;
  int c, st;
  (void)step;
  row[0] = input;
  for (c = 0; c < r->ncams; c++)
    if ((st = kl_cam_follower_state(s, r->cams[c], row + 1 + PER_CAM * c)) !=
        KL_OK) {
      r->status = st;
      r->failed_cam = c;
      return 1;
    }
  r->rows++;
  return 0;
}

/* The cams: --cam's joint, or every 'cam' line's. Returns how many (into
 * cams, room for every joint), or -1 after saying why there are none. */
static int find_cams(const cli_model *cm, const cli_options *o, int *cams) {
  int n = 0, j;
  if (o->cam != NULL) {
    const char *end;
    double v;
    j = kl_model_find_joint(cm->model, o->cam);
    if (j < 0 && cli_parse_real(o->cam, &end, &v) == 0 && *end == '\0' &&
        v == floor(v) && v >= 1 && v <= cm->njoints)
      j = (int)v - 1;
    if (j < 0) {
      cli_error("--cam %s: no such joint in %s", o->cam, cm->label);
      return -1;
    }
    cams[0] = j;
    return 1;
  }
  for (j = 0; j < cm->njoints; j++)
    if (kl_model_cam_bearing(cm->model, j) >= 0)
      cams[n++] = j;
  if (n == 0)
    cli_error("%s has no 'cam' line (docs/model-format.md); name a slot "
              "joint with --cam to read it as a cam",
              cm->label);
  return n > 0 ? n : -1;
}

/* A quantity of a cam's row block, as charted and written. */
typedef struct {
  int index;        /* enum kl_cam_state_index */
  const char *name; /* column and chart title */
  const char *file; /* chart file's ending */
  int per_angle;    /* powers of the angle unit it is per */
  int per_second;   /* powers of the second */
} quantity;

static const quantity quantities[] = {
    {KL_CAM_STATE_RISE, "rise", "rise", 0, 0},
    {KL_CAM_STATE_D1, "rise per cam angle", "d1", 1, 0},
    {KL_CAM_STATE_D2, "rise per cam angle^2", "d2", 2, 0},
    {KL_CAM_STATE_D3, "rise per cam angle^3", "d3", 3, 0},
    {KL_CAM_STATE_RATE, "velocity", "velocity", 0, 1},
    {KL_CAM_STATE_ACCEL, "acceleration", "accel", 0, 2},
    {KL_CAM_STATE_JERK, "jerk", "jerk", 0, 3},
    {KL_CAM_STATE_PRESSURE, "pressure angle", "pressure", 0, 0}};
#define NQUANTITIES ((int)(sizeof quantities / sizeof quantities[0]))

/* How a cam's follower moves: 1 when its coordinate is an angle. */
static int turns(const cli_model *cm, int cam) {
  int links[2], j, other;
  kl_model_joint_links(cm->model, cam, links, NULL, NULL);
  for (j = 0; j < cm->njoints; j++) {
    int l[2];
    if (j == cam || kl_model_joint_links(cm->model, j, l, NULL, NULL) != KL_OK)
      continue;
    other = l[0] == links[1] ? l[1] : l[1] == links[1] ? l[0] : -1;
    if (other == KL_GROUND &&
        kl_model_joint_kind(cm->model, j) == KL_JOINT_PRISMATIC)
      return 0;
  }
  return 1;
}

/* Quantity q of a cam in the model's units: its factor from library units
 * (rad, length, per rad, per time unit at `speed`) and its unit's text. */
static double factor_of(const cli_model *cm, const quantity *q, int angle_rise,
                        double speed, char *unit, size_t cap) {
  const char *rise = angle_rise ? cm->angle_unit : cm->length_unit;
  double f = angle_rise ? cm->angle_factor : 1.0;
  static const char *const powers[] = {"", "", "^2", "^3"};
  if (q->index == KL_CAM_STATE_PRESSURE) {
    snprintf(unit, cap, "%s", cm->angle_unit);
    return cm->angle_factor;
  }
  if (q->per_angle > 0) {
    snprintf(unit, cap, "%s/%s%s", rise, cm->angle_unit, powers[q->per_angle]);
    return f / pow(cm->angle_factor, q->per_angle);
  }
  if (q->per_second > 0) {
    snprintf(unit, cap, "%s/s%s", rise, powers[q->per_second]);
    return f * pow(speed, q->per_second);
  }
  snprintf(unit, cap, "%s", rise);
  return f;
}

/* One chart of quantity q of cam c over its cam angle, into `path`. */
static int write_chart(const cli_model *cm, const run *r, int c,
                       const quantity *q, double factor, const char *unit,
                       double low, double limit, const char *path) {
  const double *col = r->table + 1 + PER_CAM * c;
  const char *name = cm->joint_names[r->cams[c]];
  char text[400], y_title[400];
  double peak = 0.0, peak_at = 0.0;
  int k, worst = -1;
  chart ch;
  FILE *f;
  chart_frame(&ch);
  ch.x.lo = ch.x.hi = col[KL_CAM_STATE_ANGLE] * cm->angle_factor;
  ch.y.lo = ch.y.hi = (col[q->index] - low) * factor;
  for (k = 0; k < r->rows; k++) {
    const double *row = col + (size_t)k * (size_t)r->width;
    double x = row[KL_CAM_STATE_ANGLE] * cm->angle_factor,
           y = (row[q->index] - low) * factor;
    ch.x.lo = fmin(ch.x.lo, x);
    ch.x.hi = fmax(ch.x.hi, x);
    ch.y.lo = fmin(ch.y.lo, y);
    ch.y.hi = fmax(ch.y.hi, y);
    if (fabs(y) > peak) {
      peak = fabs(y);
      peak_at = x;
      worst = k;
    }
  }
  if (q->index == KL_CAM_STATE_PRESSURE && isfinite(limit)) {
    ch.y.lo = fmin(ch.y.lo, -limit);
    ch.y.hi = fmax(ch.y.hi, limit);
  }
  ch.ystep = chart_round_out(&ch.y, 6);
  chart_widen(&ch.x);
  ch.xstep = chart_tick_step(ch.x.hi - ch.x.lo, 8,
                             strcmp(cm->angle_unit, "deg") == 0);
  if ((f = cli_open_output(path)) == NULL)
    return CLI_EXIT_OUTPUT;
  chart_begin(f, &ch);
  snprintf(text, sizeof text, "%s: follower %s over the cam angle, %d steps",
           name, q->name, r->rows - 1);
  chart_title(f, &ch, cm->label, text);
  chart_panel(f, &ch);
  chart_ticks(f, &ch);
  chart_curve_begin(f, svg_colour(0));
  fprintf(f, "<polyline points=\"");
  for (k = 0; k < r->rows; k++) {
    const double *row = col + (size_t)k * (size_t)r->width;
    fprintf(f, "%.2f,%.2f ",
            chart_map(&ch.x, row[KL_CAM_STATE_ANGLE] * cm->angle_factor),
            chart_map(&ch.y, (row[q->index] - low) * factor));
  }
  fprintf(f, "\"/>\n");
  chart_curve_end(f);
  if (q->index == KL_CAM_STATE_PRESSURE && worst >= 0) {
    char label[200];
    snprintf(label, sizeof label, "largest %.4g %s at %.5g %s", peak, unit,
             peak_at, cm->angle_unit);
    chart_mark_x(f, &ch, peak_at, CHART_ALARM, label, 0, 0);
    if (isfinite(limit)) {
      snprintf(label, sizeof label, "bound %.4g %s", limit, unit);
      chart_mark_y(f, &ch, limit, SVG_MUTED, label);
      snprintf(label, sizeof label, "bound %.4g %s", -limit, unit);
      chart_mark_y(f, &ch, -limit, SVG_MUTED, label);
    }
  }
  snprintf(y_title, sizeof y_title, "%s (%s)", q->name, unit);
  {
    char x_title[64];
    snprintf(x_title, sizeof x_title, "cam angle (%s)", cm->angle_unit);
    chart_axis_titles(f, &ch, x_title, y_title);
  }
  svg_end(f);
  return cli_close_output(f, path);
}

/* The CSV and (with --charts) the charts of the run's rows. */
static int write_outputs(const cli_model *cm, const cli_options *o,
                         const run *r, int input, double speed, int timed) {
  const char *format = cli_number_format(o, "%.9g");
  double *low = malloc((size_t)r->ncams * sizeof *low);
  int c, k, i, st = CLI_EXIT_OK;
  FILE *f;
  if (low == NULL) {
    cli_error("out of memory");
    return CLI_EXIT_MEMORY;
  }
  /* the rise counts from the lowest position the run reaches */
  for (c = 0; c < r->ncams; c++) {
    low[c] = INFINITY;
    for (k = 0; k < r->rows; k++)
      low[c] = fmin(low[c], r->table[(size_t)k * (size_t)r->width + 1 +
                                     PER_CAM * c + KL_CAM_STATE_RISE]);
  }
  if ((f = cli_open_output(o->output)) == NULL) {
    free(low);
    return CLI_EXIT_OUTPUT;
  }
  {
    char name[400];
    snprintf(name, sizeof name, "%s (%s)", cli_input_name(cm, input),
             cli_input_unit(cm, input));
    cli_csv_field(f, name);
  }
  for (c = 0; c < r->ncams; c++) {
    const char *cam = cm->joint_names[r->cams[c]];
    char name[400];
    snprintf(name, sizeof name, "%s cam angle (%s)", cam, cm->angle_unit);
    fputc(',', f);
    cli_csv_field(f, name);
    for (i = 0; i < NQUANTITIES; i++) {
      char unit[64];
      if (quantities[i].per_second > 0 && !timed)
        continue;
      factor_of(cm, &quantities[i], turns(cm, r->cams[c]), speed, unit,
                sizeof unit);
      snprintf(name, sizeof name, "%s %s (%s)", cam, quantities[i].name, unit);
      fputc(',', f);
      cli_csv_field(f, name);
    }
  }
  fputc('\n', f);
  for (k = 0; k < r->rows; k++) {
    const double *row = r->table + (size_t)k * (size_t)r->width;
    fprintf(f, format, row[0] * cli_input_factor(cm, input));
    for (c = 0; c < r->ncams; c++) {
      const double *cam = row + 1 + PER_CAM * c;
      char unit[64];
      fputc(',', f);
      fprintf(f, format, cam[KL_CAM_STATE_ANGLE] * cm->angle_factor);
      for (i = 0; i < NQUANTITIES; i++) {
        const quantity *q = &quantities[i];
        double shift = q->index == KL_CAM_STATE_RISE ? low[c] : 0.0;
        if (q->per_second > 0 && !timed)
          continue;
        fputc(',', f);
        fprintf(f, format,
                (cam[q->index] - shift) *
                    factor_of(cm, q, turns(cm, r->cams[c]), speed, unit,
                              sizeof unit));
      }
    }
    fputc('\n', f);
  }
  st = cli_close_output(f, o->output);
  if (st == CLI_EXIT_OK && o->charts != NULL)
    st = cli_make_dir(o->charts);
  for (c = 0; st == CLI_EXIT_OK && o->charts != NULL && c < r->ncams; c++) {
    double limit = kl_model_cam_limit(cm->model, r->cams[c]);
    char word[48];
    cli_file_word(cm->joint_names[r->cams[c]], word, sizeof word);
    /* a bound of half a turn or more bounds nothing: no line for it */
    limit = limit < CLI_PI ? limit * cm->angle_factor : NAN;
    for (i = 0; st == CLI_EXIT_OK && i < NQUANTITIES; i++) {
      const quantity *q = &quantities[i];
      char unit[64], path[4200];
      double factor;
      if (q->per_second > 0 && !timed)
        continue;
      factor = factor_of(cm, q, turns(cm, r->cams[c]), speed, unit,
                         sizeof unit);
      snprintf(path, sizeof path, "%s/%s-%s.svg", o->charts, word, q->file);
      st = write_chart(cm, r, c, q, factor, unit,
                       q->index == KL_CAM_STATE_RISE ? low[c] : 0.0, limit,
                       path);
    }
  }
  free(low);
  return st;
}

int cli_cmd_follower(const cli_model *cm, const cli_options *o) {
  const kl_model *m = cm->model;
  cli_range range;
  kl_sweep_result res;
  kl_solver *s = NULL;
  int *cams, st, speed_input = -1, timed;
  double speed = 0.0, fluctuation;
  run r;
  memset(&r, 0, sizeof r);
  if ((cams = malloc((size_t)(cm->njoints > 0 ? cm->njoints : 1) *
                     sizeof *cams)) == NULL) {
    cli_error("out of memory");
    return CLI_EXIT_MEMORY;
  }
  if ((r.ncams = find_cams(cm, o, cams)) < 0) {
    free(cams);
    return CLI_EXIT_MODEL;
  }
  if ((st = cli_require_range(cm, o, &range, "nothing to sweep")) !=
      CLI_EXIT_OK) {
    free(cams);
    return st;
  }
  if (!o->have_steps && !o->have_from && !o->have_to)
    range.steps = 360;
  /* per time at the model's working speed, when it drives the swept input */
  timed = kl_model_speed(m, &speed_input, &speed, &fluctuation) == KL_OK &&
          speed_input == range.input;
  r.cm = cm;
  r.cams = cams;
  r.width = 1 + PER_CAM * r.ncams;
  r.table = malloc((size_t)(range.steps + 1) * (size_t)r.width *
                   sizeof *r.table);
  s = cli_solver_new(cm, o);
  if (r.table == NULL || s == NULL) {
    cli_error("out of memory");
    st = CLI_EXIT_MEMORY;
    goto done;
  }
  if ((st = cli_reach_start(s, cm, o, &range)) != CLI_EXIT_OK)
    goto done;
  res.size = sizeof res;
  st = kl_solver_sweep(s, range.input, range.from, range.to, range.steps,
                       take_row, &r, &res);
  if (r.status != KL_OK) {
    cli_error("%s cannot be read as a cam: %s", cm->joint_names[cams[r.failed_cam]],
              r.status == KL_EKIND
                  ? "it is not a pin in a slot whose link turns on a "
                    "revolute joint with ground, with the pin's link "
                    "guided by ground"
                  : "the cam does not turn as the input moves");
    st = CLI_EXIT_MODEL;
    goto done;
  }
  st = cli_sweep_told(cm, s, &range, &res, st, "the follower's sweep",
                      "the rows before it are written");
  if (st == CLI_EXIT_OK)
    st = write_outputs(cm, o, &r, range.input, speed, timed);
done:
  kl_solver_free(s);
  free(r.table);
  free(cams);
  return st;
}
