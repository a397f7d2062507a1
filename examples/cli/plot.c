/*
 * plot.c - the plot command: SVG line plots of chosen outputs, or their
 * kinematic coefficients, against the swept input, with labelled axes.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"


typedef struct {
  int column; /* of the sweep command's CSV, for the name and unit */
  int at;     /* its place in a row */
  int transmission;
  char label[400]; /* what the legend and the axis call it */
} series;

typedef struct {
  int n, nseries;
  int stride, tail; /* keep every stride-th step; the last row is held */
  double *x, *y; /* y: nseries values per row */
  const series *s;
  const double *factor;
  double xfactor;
  int x_at; /* the swept input's place in a row */
} samples;

static int find_label(char **names, int from, int n, const char *text) {
  int i;
  for (i = from; i < n; i++)
    if (strcmp(names[i], text) == 0)
      return i;
  return -1;
}

void cli_list_outputs(FILE *f, const cli_model *cm) {
  int i;
  for (i = 1; i < cm->nlinks; i++)
    fprintf(f, "  angle:%s\n", cm->link_names[i]);
  for (i = 0; i < cm->nslides; i++)
    fprintf(f, "  slide:%s\n", cm->joint_names[cm->slides[i]]);
  for (i = 0; i < cm->npoints; i++)
    fprintf(f, "  x:%s\n  y:%s\n", cm->point_names[i], cm->point_names[i]);
  for (i = 0; i < cm->nsites; i++)
    fprintf(f, "  transmission:%s\n", cm->joint_names[cm->sites[i].id]);
}

/* Reads one --show OUTPUT. Returns 0, or -1 after printing why. */
static int parse_series(const cli_model *cm, const char *spec, int order,
                        int input, series *out) {
  const char *colon = strchr(spec, ':'), *name;
  char kind[16];
  int id, k;
  cli_column *cols;
  if (colon == NULL || colon - spec >= (long)sizeof kind) {
    cli_error("--show %s: write KIND:NAME, e.g. angle:%s (kinloop plot MODEL "
              "lists them)",
              spec, cm->nlinks > 1 ? cm->link_names[1] : "LINK");
    return -1;
  }
  memcpy(kind, spec, (size_t)(colon - spec));
  kind[colon - spec] = '\0';
  name = colon + 1;
  out->transmission = 0;
  if (strcmp(kind, "angle") == 0) {
    if ((id = find_label(cm->link_names, 1, cm->nlinks, name)) < 0)
      goto unknown;
    out->column = cli_col_link(cm, id, order);
  } else if (strcmp(kind, "slide") == 0) {
    for (k = 0; k < cm->nslides; k++)
      if (strcmp(cm->joint_names[cm->slides[k]], name) == 0)
        break;
    if (k == cm->nslides)
      goto unknown;
    out->column = cli_col_slide(cm, k, order);
  } else if (strcmp(kind, "x") == 0 || strcmp(kind, "y") == 0) {
    if ((id = find_label(cm->point_names, 0, cm->npoints, name)) < 0)
      goto unknown;
    out->column = cli_col_point(cm, id, kind[0] == 'y', order);
  } else if (strcmp(kind, "transmission") == 0) {
    for (k = 0; k < cm->nsites; k++)
      if (strcmp(cm->joint_names[cm->sites[k].id], name) == 0)
        break;
    if (k == cm->nsites)
      goto unknown;
    if (order != 0) {
      cli_error("--show %s: a transmission angle is plotted as itself only "
                "(--order 0)",
                spec);
      return -1;
    }
    out->column = cli_col_site(cm, k);
    out->transmission = 1;
  } else {
    cli_error("--show %s: '%s' is not an output kind (angle, slide, x, y, "
              "transmission)",
              spec, kind);
    return -1;
  }
  cols = malloc((size_t)cli_column_count(cm) * sizeof *cols);
  if (cols == NULL) {
    cli_error("out of memory");
    return -1;
  }
  cli_columns(cm, input, cols);
  out->at = cols[out->column].at;
  {
    const cli_column *c = &cols[out->column];
    char base[300];
    snprintf(base, sizeof base, "%s", c->name);
    if (order > 0) /* the column is named "... rate" or "... accel" */
      *strrchr(base, ' ') = '\0';
    if (order == 0)
      snprintf(out->label, sizeof out->label, "%s", base);
    else if (order == 1)
      snprintf(out->label, sizeof out->label, "d(%s)/d(%s)", base,
               cli_input_name(cm, input));
    else
      snprintf(out->label, sizeof out->label, "d2(%s)/d(%s)^2", base,
               cli_input_name(cm, input));
  }
  free(cols);
  return 0;
unknown:
  cli_error("--show %s: the model has no such output; it has", spec);
  cli_list_outputs(stderr, cm);
  return -1;
}

/* Every row goes to slot n, kept (n grows) on every stride-th step, so
 * that the last row stays in slot n until the sweep ends. */
static int sample_row(void *user, int step, const double *row) {
  samples *d = user;
  int k;
  d->x[d->n] = row[d->x_at] * d->xfactor;
  for (k = 0; k < d->nseries; k++)
    d->y[d->n * d->nseries + k] = row[d->s[k].at] * d->factor[k];
  d->tail = step % d->stride != 0;
  if (!d->tail)
    d->n++;
  return 0;
}

static void write_plot(FILE *f, const cli_model *cm, const cli_range *r,
                       const series *s, int ns, const samples *d,
                       const char *yunit, const kl_sweep_result *res,
                       int order) {
  chart c;
  char text[600];
  double band_lo = 0, band_hi = 0;
  int k, i, band = 0, all_sites = 1, degrees = cli_input_is_angle(cm, r->input) &&
                                strcmp(cm->angle_unit, "deg") == 0;
  double xf = cli_input_factor(cm, r->input);
  chart_frame(&c);
  c.x.lo = fmin(r->from, r->to) * xf;
  c.x.hi = fmax(r->from, r->to) * xf;
  c.y.lo = INFINITY;
  c.y.hi = -INFINITY;
  for (i = 0; i < d->n * ns; i++)
    if (isfinite(d->y[i])) {
      c.y.lo = fmin(c.y.lo, d->y[i]);
      c.y.hi = fmax(c.y.hi, d->y[i]);
    }
  for (k = 0; k < ns; k++) {
    band |= s[k].transmission;
    all_sites &= s[k].transmission;
  }
  if (band) {
    band_lo = CLI_USUAL_LOW_DEG * CLI_PI / 180 * cm->angle_factor;
    band_hi = CLI_USUAL_HIGH_DEG * CLI_PI / 180 * cm->angle_factor;
    c.y.lo = fmin(c.y.lo, band_lo);
    c.y.hi = fmax(c.y.hi, band_hi);
  }
  c.ystep = chart_round_out(&c.y, 6);
  c.xstep = chart_tick_step(c.x.hi - c.x.lo, 8, degrees);

  chart_begin(f, &c);
  snprintf(text, sizeof text, "%s, %d steps",
           order == 0   ? "against the input"
           : order == 1 ? "first-order kinematic coefficient"
                        : "second-order kinematic coefficient",
           r->steps);
  chart_title(f, &c, cm->label, text);
  /* the key, on one line above the panel */
  {
    double x = c.x.from;
    for (k = 0; k < ns; k++) {
      svg_key(f, x, 47, svg_colour(k), NULL, s[k].label);
      x += 40 + 6.6 * (double)strlen(s[k].label);
    }
  }
  chart_panel(f, &c);
  if (band) {
    double y1 = chart_map(&c.y, band_hi), y0 = chart_map(&c.y, band_lo);
    fprintf(f,
            "<rect class=\"usual-range\" x=\"%g\" y=\"%.2f\" width=\"%g\" "
            "height=\"%.2f\" fill=\"#cfe3c4\" fill-opacity=\"0.6\"/>\n",
            c.x.from, y1, c.x.to - c.x.from, y0 - y1);
    snprintf(text, sizeof text, "usual range %g-%g deg", CLI_USUAL_LOW_DEG,
             CLI_USUAL_HIGH_DEG);
    svg_text(f, c.x.from + 6, y1 + 14, 11, "#4d7040", NULL, text);
  }
  chart_ticks(f, &c);
  /* the curves */
  for (k = 0; k < ns; k++) {
    int open = 0;
    chart_curve_begin(f, svg_colour(k));
    for (i = 0; i < d->n; i++) {
      double y = d->y[i * ns + k];
      if (!isfinite(y)) {
        if (open)
          fprintf(f, "\"/>\n");
        open = 0;
        continue;
      }
      if (!open)
        fprintf(f, "<polyline points=\"");
      open = 1;
      fprintf(f, "%.2f,%.2f ", chart_map(&c.x, d->x[i]), chart_map(&c.y, y));
    }
    if (open)
      fprintf(f, "\"/>\n");
    chart_curve_end(f);
  }
  if ((res->status == KL_LIMIT || res->status == KL_ESINGULAR) &&
      isfinite(res->limit_input)) {
    snprintf(text, sizeof text, "%s at %.6g",
             res->status == KL_LIMIT ? "motion stops" : "singular position",
             res->limit_input * xf);
    chart_mark_x(f, &c, res->limit_input * xf, CHART_ALARM, text, 0, 0);
  }
  {
    char y_title[600];
    snprintf(text, sizeof text, "%s (%s)", cli_input_name(cm, r->input),
             cli_input_unit(cm, r->input));
    snprintf(y_title, sizeof y_title, "%s (%s)",
             ns == 1      ? s[0].label
             : all_sites  ? "transmission angle"
             : order == 0 ? "value"
                          : "coefficient",
             yunit);
    chart_axis_titles(f, &c, text, y_title);
  }
  svg_end(f);
}

int cli_cmd_plot(const cli_model *cm, const cli_options *o) {
  cli_range r;
  series s[CLI_MAX_SHOW];
  double factor[CLI_MAX_SHOW];
  cli_column *cols = NULL;
  samples d;
  kl_solver *sv = NULL;
  kl_sweep_result res;
  char unit[64] = "";
  int k, st;
  FILE *f;
  memset(&d, 0, sizeof d);
  if (o->nshow == 0) {
    cli_error("plot needs at least one --show OUTPUT; %s has these:",
              cm->label);
    cli_list_outputs(stderr, cm);
    return CLI_EXIT_USAGE;
  }
  if ((st = cli_require_range(cm, o, &r, "nothing to plot against")) !=
      CLI_EXIT_OK)
    return st;
  cols = malloc((size_t)cli_column_count(cm) * sizeof *cols);
  if (cols == NULL)
    goto nomem;
  cli_columns(cm, r.input, cols);
  for (k = 0; k < o->nshow; k++) {
    char this_unit[64];
    const cli_column *c;
    if (parse_series(cm, o->show[k], o->order, r.input, &s[k]) != 0) {
      free(cols);
      return CLI_EXIT_USAGE;
    }
    c = &cols[s[k].column];
    cli_column_unit(cm, r.input, c, 1, this_unit, sizeof this_unit);
    if (k > 0 && strcmp(this_unit, unit) != 0) {
      cli_error("--show %s is in %s but %s is in %s: plot outputs of one unit "
                "together",
                o->show[k], this_unit, o->show[0], unit);
      free(cols);
      return CLI_EXIT_USAGE;
    }
    snprintf(unit, sizeof unit, "%s", this_unit);
    /* at a speed of one input unit per second, a rate is the coefficient
     * per input unit */
    factor[k] = cli_column_factor(cm, r.input, c, 1.0);
  }
  free(cols);
  cols = NULL;
  d.stride = cli_picture_stride(r.steps);
  {
    size_t rows = (size_t)(r.steps / d.stride + 2);
    d.x = malloc(rows * sizeof *d.x);
    d.y = malloc(rows * (size_t)o->nshow * sizeof *d.y);
  }
  if (d.x == NULL || d.y == NULL || (sv = cli_solver_new(cm, o)) == NULL)
    goto nomem;
  if ((st = cli_reach_start(sv, cm, o, &r)) != CLI_EXIT_OK)
    goto done;
  d.nseries = o->nshow;
  d.s = s;
  d.factor = factor;
  d.xfactor = cli_input_factor(cm, r.input);
  d.x_at = cli_row_at(cm, KL_QUANTITY_INPUT_VALUE, r.input);
  st = cli_record(sv, cm, &r, sample_row, &d, &res);
  if (d.tail)
    d.n++;
  if (st == KL_STOPPED || st == KL_ENOMEM)
    goto nomem;
  if ((st = cli_sweep_told(cm, sv, &r, &res, st, "the sweep",
                           "the curves end there")) != CLI_EXIT_OK)
    goto done;
  {
    /* NaN leaves a gap (no transmission angle there); what overflows a
     * picture's numbers is refused */
    double lo = INFINITY, hi = -INFINITY;
    for (k = 0; k < d.n * d.nseries; k++)
      if (!isnan(d.y[k])) {
        lo = fmin(lo, d.y[k]);
        hi = fmax(hi, d.y[k]);
      }
    if (lo <= hi && !isfinite(hi - lo)) {
      cli_error("the outputs span %g to %g, more than the numbers of a "
                "picture can hold; nothing written",
                lo, hi);
      st = CLI_EXIT_SOLVE;
      goto done;
    }
  }
  if ((f = cli_open_output(o->output)) == NULL) {
    st = CLI_EXIT_OUTPUT;
    goto done;
  }
  write_plot(f, cm, &r, s, o->nshow, &d, unit, &res, o->order);
  st = cli_close_output(f, o->output);
  goto done;
nomem:
  cli_error("out of memory");
  st = CLI_EXIT_MEMORY;
done:
  free(cols);
  free(d.x);
  free(d.y);
  kl_solver_free(sv);
  return st;
}
