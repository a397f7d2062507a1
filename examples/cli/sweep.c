/*
 * sweep.c - the sweep command: one CSV row per step of a sweep, every
 * quantity in the model's units, rates per second at the given speed, and
 * (--forces) the force columns of forces.c.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

typedef struct {
  FILE *f;
  int ncols;
  const cli_column *cols;
  const double *factor;
  const double *resolution; /* raw values below it print as 0 */
  const char *format;
  int nonfinite; /* the column of a value too large to print, or -1 */
  const cli_model *cm;
  const cli_cycle *cycle; /* the forces at each step, or NULL */
} csv_sink;

void cli_csv_field(FILE *f, const char *text) {
  const char *c;
  if (strpbrk(text, ",\"\r\n") == NULL) {
    fputs(text, f);
    return;
  }
  fputc('"', f);
  for (c = text; *c != '\0'; c++) {
    if (*c == '"')
      fputc('"', f);
    fputc(*c, f);
  }
  fputc('"', f);
}

static int put_row(void *user, int step, const double *row) {
  csv_sink *k = user;
  int i;
  for (i = 0; i < k->ncols; i++) {
    double v = cli_shown(row[k->cols[i].at], k->factor[i], k->resolution[i]);
    if (!isfinite(v)) {
      k->nonfinite = i;
      return 1; /* no file gets an inf or a nan */
    }
    if (i > 0)
      fputc(',', k->f);
    fprintf(k->f, k->format, v);
  }
  if (k->cycle != NULL && step < k->cycle->rows)
    cli_cycle_csv_row(k->f, k->cm, k->cycle, step, k->format);
  fputc('\n', k->f);
  return ferror(k->f) != 0; /* a full disk stops the sweep */
}

int cli_cmd_sweep(const cli_model *cm, const cli_options *o) {
  cli_range r;
  cli_column *cols;
  double *factor, *resolution;
  kl_solver *s;
  kl_sweep_result res;
  csv_sink sink;
  cli_cycle cycle;
  double speed = o->have_speed ? o->speed : 1.0;
  int st, i;
  memset(&cycle, 0, sizeof cycle);
  if ((st = cli_require_range(cm, o, &r, "nothing to sweep")) != CLI_EXIT_OK)
    return st;
  if (o->forces) {
    /* the forces first: where they are not determined, nothing is written */
    if ((st = cli_cycle_setup(cm, o, &r, &cycle)) != CLI_EXIT_OK ||
        (st = cli_cycle_compute(cm, o, 1, &cycle)) != CLI_EXIT_OK) {
      cli_cycle_free(&cycle);
      return st;
    }
    speed = cycle.speed * cli_input_factor(cm, r.input);
  }
  sink.ncols = cli_column_count(cm);
  cols = malloc((size_t)sink.ncols * sizeof *cols);
  factor = malloc((size_t)sink.ncols * sizeof *factor);
  resolution = malloc((size_t)sink.ncols * sizeof *resolution);
  s = cli_solver_new(cm, o);
  if (cols == NULL || factor == NULL || resolution == NULL || s == NULL) {
    cli_error("out of memory");
    st = CLI_EXIT_MEMORY;
    goto done;
  }
  cli_columns(cm, r.input, cols);
  for (i = 0; i < sink.ncols; i++) {
    factor[i] = cli_column_factor(cm, r.input, &cols[i], speed);
    resolution[i] = cli_column_resolution(cm, &cols[i]);
  }
  if ((st = cli_reach_start(s, cm, o, &r)) != CLI_EXIT_OK)
    goto done;
  if ((sink.f = cli_open_output(o->output)) == NULL) {
    st = CLI_EXIT_OUTPUT;
    goto done;
  }
  for (i = 0; i < sink.ncols; i++) {
    char name[400], unit[64];
    cli_column_unit(cm, r.input, &cols[i], 0, unit, sizeof unit);
    snprintf(name, sizeof name, "%s (%s)", cols[i].name, unit);
    if (i > 0)
      fputc(',', sink.f);
    cli_csv_field(sink.f, name);
  }
  if (o->forces)
    cli_cycle_csv_header(sink.f, cm, &cycle);
  fputc('\n', sink.f);
  sink.cm = cm;
  sink.cycle = o->forces ? &cycle : NULL;
  sink.cols = cols;
  sink.factor = factor;
  sink.resolution = resolution;
  sink.nonfinite = -1;
  sink.format = cli_number_format(o, "%.6g");
  st = cli_record(s, cm, &r, put_row, &sink, &res);
  if (st == KL_ENOMEM) {
    cli_error("out of memory");
    st = CLI_EXIT_MEMORY;
  } else if (sink.nonfinite >= 0) {
    cli_error("the column '%s' overflows the numbers a file can hold at "
              "--speed %g; nothing written (give a smaller --speed)",
              cols[sink.nonfinite].name, speed);
    st = CLI_EXIT_SOLVE;
  } else if (st == KL_STOPPED) {
    cli_error("writing '%s' failed", o->output == NULL ? "standard output"
                                                       : o->output);
    st = CLI_EXIT_OUTPUT;
  } else {
    st = cli_sweep_told(cm, s, &r, &res, st, "the sweep",
                        "the rows before it are written");
  }
  if (st == CLI_EXIT_OK)
    st = cli_close_output(sink.f, o->output);
  else
    cli_abandon_output(sink.f);
done:
  kl_solver_free(s);
  free(cols);
  free(factor);
  free(resolution);
  cli_cycle_free(&cycle);
  return st;
}
