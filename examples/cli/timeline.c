/*
 * timeline.c - the timeline command: the model's motion profile in time,
 * one CSV row per time step with every quantity and its rate,
 * acceleration and jerk per second, second squared and second cubed.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

const char cli_timeline_help[] =
    "usage: kinloop timeline [MODEL] [--profile TEXT] [--steps N] [--charts "
    "DIR]\n"
    "                        [--all-digits] [-o FILE]\n"
    "\n"
    "Runs the model's motion profile in time (its 'segment' or 'timetable'\n"
    "lines, docs/model-format.md) and writes one CSV row per time step: the\n"
    "time in s, then the driven input, each moving link's angle, each\n"
    "slide and each point's x and y, every one with its rate, acceleration\n"
    "and jerk (per s, s^2 and s^3), in the model's units. The profile's\n"
    "other inputs stay at the model's start, at rest.\n"
    "\n"
    "options:\n"
    "  --profile TEXT    'segment' or 'timetable' statements of the model\n"
    "                    format, ';' between them, read after the model's\n"
    "                    own lines (they extend its segments), e.g.\n"
    "                    \"segment motor rise cycloidal 0.5 0 30; segment\n"
    "                    motor dwell 0.25 30\"; an error in one is reported\n"
    "                    as '--profile statement N:COLUMN' and exits with 3\n"
    "  --steps N         time steps over the profile (default 200)\n"
    "  --charts DIR      write SVG charts over time into DIR (made if\n"
    "                    missing): the driven input's and each point's x and\n"
    "                    y value, rate, acceleration and jerk, one chart each\n"
    "  --all-digits      write every number with 17 significant digits\n"
    "                    (default 9)\n"
    "  -o, --output FILE write to FILE instead of standard output\n"
    "\n"
    "A model without a profile (and no --profile) exits with 3; a step that does not solve\n"
    "(a motion limit or singular position on the way) with 4.\n";

/* One quantity followed through the four orders. */
typedef struct {
  char name[200];
  const char *unit; /* of the value */
  double factor;    /* model unit per library unit */
  int at[4];        /* its place in a row at each order */
} track;

static void add_track(track *t, int *n, const char *name, const char *what,
                      const char *unit, double factor, const int at[4]) {
  track *k = &t[(*n)++];
  snprintf(k->name, sizeof k->name, "%s%s", name, what);
  k->unit = unit;
  k->factor = factor;
  memcpy(k->at, at, sizeof k->at);
}

/* Where item `item` of quantity q sits in a row of model m. */
static int place(const kl_model *m, int q, int item) {
  return kl_model_row_offset(m, q, NULL) + item;
}

/* Every quantity the CSV follows: returns how many. */
static int tracks(const cli_model *cm, int input, track *t) {
  const kl_model *m = cm->model;
  const char *len = cm->length_unit;
  int n = 0, i, axis, at[4];
  at[0] = place(m, KL_QUANTITY_INPUT_VALUE, input);
  at[1] = place(m, KL_QUANTITY_INPUT_RATE, input);
  at[2] = place(m, KL_QUANTITY_INPUT_ACCEL, input);
  at[3] = place(m, KL_QUANTITY_INPUT_JERK, input);
  add_track(t, &n, cli_input_name(cm, input), "", cli_input_unit(cm, input),
            cli_input_factor(cm, input), at);
  for (i = 1; i < cm->nlinks; i++) {
    at[0] = place(m, KL_QUANTITY_LINK_ANGLE, i);
    at[1] = place(m, KL_QUANTITY_LINK_RATE, i);
    at[2] = place(m, KL_QUANTITY_LINK_ACCEL, i);
    at[3] = place(m, KL_QUANTITY_LINK_JERK, i);
    add_track(t, &n, cm->link_names[i], " angle", cm->angle_unit,
              cm->angle_factor, at);
  }
  for (i = 0; i < cm->nslides; i++) {
    int j = cm->slides[i];
    at[0] = place(m, KL_QUANTITY_JOINT_SLIDE, j);
    at[1] = place(m, KL_QUANTITY_JOINT_SLIDE_RATE, j);
    at[2] = place(m, KL_QUANTITY_JOINT_SLIDE_ACCEL, j);
    at[3] = place(m, KL_QUANTITY_JOINT_SLIDE_JERK, j);
    add_track(t, &n, cm->joint_names[j], " slide", len, 1.0, at);
  }
  for (i = 0; i < cm->npoints; i++)
    for (axis = 0; axis < 2; axis++) {
      at[0] = place(m, KL_QUANTITY_POINT_X + axis, i);
      at[1] = place(m, KL_QUANTITY_POINT_VX + axis, i);
      at[2] = place(m, KL_QUANTITY_POINT_AX + axis, i);
      at[3] = place(m, KL_QUANTITY_POINT_JX + axis, i);
      add_track(t, &n, cm->point_names[i], axis == 0 ? " x" : " y", len, 1.0,
                at);
    }
  return n;
}

static const char *const order_word[4] = {"", " rate", " accel", " jerk"};
static const char *const per_time[4] = {"", "/s", "/s^2", "/s^3"};

/* Track i's order-k values over the run (table: `width` numbers a row,
 * the time first, then 4 per track) as a chart over time, into `path`. */
static int write_chart(const cli_model *cm, const track *t, int i, int k,
                       const double *table, int rows, int width,
                       const char *path) {
  char text[400], y_title[400];
  chart ch;
  FILE *f;
  int r;
  chart_frame(&ch);
  ch.x.lo = table[0];
  ch.x.hi = table[(size_t)(rows - 1) * (size_t)width];
  ch.y.lo = ch.y.hi = table[1 + 4 * i + k];
  for (r = 0; r < rows; r++) {
    double v = table[(size_t)r * (size_t)width + 1 + 4 * i + k];
    ch.y.lo = fmin(ch.y.lo, v);
    ch.y.hi = fmax(ch.y.hi, v);
  }
  ch.ystep = chart_round_out(&ch.y, 6);
  ch.xstep = chart_tick_step(ch.x.hi - ch.x.lo, 8, 0);
  if ((f = cli_open_output(path)) == NULL)
    return CLI_EXIT_OUTPUT;
  chart_begin(f, &ch);
  snprintf(text, sizeof text, "%s%s over the motion profile, %d steps",
           t[i].name, order_word[k], rows - 1);
  chart_title(f, &ch, cm->label, text);
  chart_panel(f, &ch);
  chart_ticks(f, &ch);
  chart_curve_begin(f, svg_colour(k));
  fprintf(f, "<polyline points=\"");
  for (r = 0; r < rows; r++) {
    const double *row = table + (size_t)r * (size_t)width;
    fprintf(f, "%.2f,%.2f ", chart_map(&ch.x, row[0]),
            chart_map(&ch.y, row[1 + 4 * i + k]));
  }
  fprintf(f, "\"/>\n");
  chart_curve_end(f);
  snprintf(y_title, sizeof y_title, "%s%s (%s%s)", t[i].name, order_word[k],
           t[i].unit, per_time[k]);
  chart_axis_titles(f, &ch, "time (s)", y_title);
  svg_end(f);
  return cli_close_output(f, path);
}

/* The charts of the driven input (track 0) and of every point's x and y
 * (the last 2 npoints tracks) into o->charts. */
static int write_charts(const cli_model *cm, const cli_options *o,
                        const track *t, int ntracks, const double *table,
                        int rows, int width) {
  static const char *const file_order[4] = {"value", "rate", "accel", "jerk"};
  int i, k, st = cli_make_dir(o->charts);
  for (i = 0; st == CLI_EXIT_OK && i < ntracks; i++) {
    char word[48], path[4200];
    if (i > 0 && i < ntracks - 2 * cm->npoints)
      continue;
    cli_file_word(t[i].name, word, sizeof word);
    for (k = 0; st == CLI_EXIT_OK && k < 4; k++) {
      snprintf(path, sizeof path, "%s/%s-%s.svg", o->charts, word,
               file_order[k]);
      st = write_chart(cm, t, i, k, table, rows, width, path);
    }
  }
  return st;
}

static void header(FILE *f, const track *t, int n) {
  const char *const *order = order_word, *const *per = per_time;
  int i, k;
  fputs("time s", f);
  for (i = 0; i < n; i++)
    for (k = 0; k < 4; k++) {
      char name[300];
      snprintf(name, sizeof name, "%s%s %s%s", t[i].name, order[k], t[i].unit,
               per[k]);
      fputc(',', f);
      cli_csv_field(f, name);
    }
  fputc('\n', f);
}

int cli_cmd_timeline(const cli_model *cm, const cli_options *o) {
  const kl_model *m = cm->model;
  int input = kl_model_profile_input(m), steps = o->have_steps ? o->steps : 200;
  int ntracks, k, i, q, st = CLI_EXIT_OK;
  double duration = kl_model_profile_duration(m), *row, *start, *table = NULL;
  const char *format = cli_number_format(o, "%.9g");
  int width, rows = 0;
  track *t;
  kl_solver *s;
  FILE *f;
  if (input < 0) {
    cli_error("%s has no motion profile in time: add 'segment' or "
              "'timetable' lines (docs/model-format.md)",
              cm->label);
    return CLI_EXIT_MODEL;
  }
  t = malloc((size_t)(1 + cm->nlinks + cm->nslides + 2 * cm->npoints) *
             sizeof *t);
  row = malloc((size_t)cm->row_size * sizeof *row);
  start = malloc((size_t)(cm->ninputs > 0 ? cm->ninputs : 1) * sizeof *start);
  s = kl_solver_new(m);
  if (t == NULL || row == NULL || start == NULL || s == NULL) {
    cli_error("out of memory");
    st = CLI_EXIT_MEMORY;
    goto done;
  }
  ntracks = tracks(cm, input, t);
  width = 1 + 4 * ntracks;
  if (o->charts != NULL &&
      (table = malloc((size_t)(steps + 1) * (size_t)width * sizeof *table)) ==
          NULL) {
    cli_error("out of memory");
    st = CLI_EXIT_MEMORY;
    goto done;
  }
  /* the other inputs at the model's start, the profile's at its time 0 */
  {
    double first[4];
    char why[300];
    kl_model_start_inputs(m, start);
    kl_model_profile_motion(m, 0.0, first);
    start[input] = first[0];
    if (cli_reach(s, cm, start, why, sizeof why) != KL_OK) {
      cli_error("the profile's start does not solve: %s", why);
      st = CLI_EXIT_SOLVE;
      goto done;
    }
  }
  if ((f = cli_open_output(o->output)) == NULL) {
    st = CLI_EXIT_OUTPUT;
    goto done;
  }
  header(f, t, ntracks);
  for (k = 0; k <= steps; k++) {
    double time = k == steps ? duration : duration * k / steps;
    int solved = kl_solve_at_time(s, time);
    if (solved != KL_OK) {
      cli_error("at time %.6g s the profile stops: %s", time,
                kl_solver_error(s));
      st = CLI_EXIT_SOLVE;
      break;
    }
    kl_solver_row(s, row);
    fprintf(f, format, time);
    if (table != NULL)
      table[(size_t)rows * (size_t)width] = time;
    for (i = 0; i < ntracks; i++)
      for (q = 0; q < 4; q++) {
        double v = row[t[i].at[q]] * t[i].factor;
        fputc(',', f);
        fprintf(f, format, v);
        if (table != NULL)
          table[(size_t)rows * (size_t)width + 1 + 4 * i + q] = v;
      }
    fputc('\n', f);
    rows++;
  }
  if (cli_close_output(f, o->output) != CLI_EXIT_OK && st == CLI_EXIT_OK)
    st = CLI_EXIT_OUTPUT;
  if (st == CLI_EXIT_OK && table != NULL)
    st = write_charts(cm, o, t, ntracks, table, rows, width);
done:
  kl_solver_free(s);
  free(table);
  free(start);
  free(row);
  free(t);
  return st;
}
