/*
 * plot.c - the plot command: SVG line plots of chosen outputs, or their
 * kinematic coefficients, against the swept input, with labelled axes.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

#define WIDTH 760.0
#define HEIGHT 470.0
#define LEFT 84.0
#define RIGHT 26.0
#define TOP 62.0
#define BOTTOM 60.0
#define PAPER "#f7f4ec"
#define PANEL "#fffdf8"
#define GRID "#e4dccd"
#define USUAL_LOW_DEG 40.0  /* transmission angle rule of thumb      */
#define USUAL_HIGH_DEG 140.0 /* (common practice, no source)          */

typedef struct {
  int column;
  int transmission;
  char label[400]; /* what the legend and the axis call it */
} series;

typedef struct {
  int n, cap, nseries;
  double *x, *y; /* y: nseries values per row */
  const series *s;
  const double *factor;
  double xfactor;
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
    fprintf(f, "  transmission:%s\n", cm->joint_names[cm->sites[i].joint]);
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
      if (strcmp(cm->joint_names[cm->sites[k].joint], name) == 0)
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

static int sample_row(void *user, int step, const double *row) {
  samples *d = user;
  int k;
  (void)step;
  if (d->n == d->cap) {
    int cap = d->cap == 0 ? 256 : 2 * d->cap;
    double *x = realloc(d->x, (size_t)cap * sizeof *x), *y;
    if (x == NULL)
      return 1;
    d->x = x;
    y = realloc(d->y, (size_t)cap * (size_t)d->nseries * sizeof *y);
    if (y == NULL)
      return 1;
    d->y = y;
    d->cap = cap;
  }
  d->x[d->n] = row[0] * d->xfactor;
  for (k = 0; k < d->nseries; k++)
    d->y[d->n * d->nseries + k] = row[d->s[k].column] * d->factor[k];
  d->n++;
  return 0;
}

/* A tick step giving about `want` intervals over `span`: 1, 2 or 5 times a
 * power of ten, or for degrees of input a divisor of a turn. */
static double tick_step(double span, int want, int degrees) {
  static const double turn[] = {15, 30, 45, 90, 180};
  double raw = span / want, p = pow(10, floor(log10(raw)));
  int i;
  if (degrees && span >= 60)
    for (i = 0; i < 5; i++)
      if (span / turn[i] <= want + 2)
        return turn[i];
  if (raw <= p)
    return p;
  if (raw <= 2 * p)
    return 2 * p;
  if (raw <= 5 * p)
    return 5 * p;
  return 10 * p;
}

typedef struct {
  double lo, hi; /* data range */
  double x0, x1, y0, y1; /* screen */
} axis;

static double map(const axis *a, double v) {
  return a->x0 + (v - a->lo) / (a->hi - a->lo) * (a->x1 - a->x0);
}

static void write_tick_label(FILE *f, double v, double step) {
  /* as many decimals as the step needs, and no "-0" */
  int decimals = step >= 1 ? 0 : (int)ceil(-log10(step) - 1e-9);
  if (fabs(v) < 1e-9 * step)
    v = 0.0;
  fprintf(f, "%.*f", decimals > 10 ? 10 : decimals, v);
}

static void write_plot(FILE *f, const cli_model *cm, const cli_range *r,
                       const series *s, int ns, const samples *d,
                       const char *yunit, const kl_sweep_result *res,
                       int order) {
  axis ax, ay;
  double xstep, ystep, v, band_lo = 0, band_hi = 0;
  int k, i, band = 0, all_sites = 1, degrees = cli_input_is_angle(cm, r->input) &&
                                strcmp(cm->angle_unit, "deg") == 0;
  double xf = cli_input_factor(cm, r->input);
  ax.lo = fmin(r->from, r->to) * xf;
  ax.hi = fmax(r->from, r->to) * xf;
  ax.x0 = LEFT;
  ax.x1 = WIDTH - RIGHT;
  ay.lo = INFINITY;
  ay.hi = -INFINITY;
  for (i = 0; i < d->n * ns; i++)
    if (isfinite(d->y[i])) {
      ay.lo = fmin(ay.lo, d->y[i]);
      ay.hi = fmax(ay.hi, d->y[i]);
    }
  for (k = 0; k < ns; k++) {
    band |= s[k].transmission;
    all_sites &= s[k].transmission;
  }
  if (band) {
    band_lo = USUAL_LOW_DEG * CLI_PI / 180 * cm->angle_factor;
    band_hi = USUAL_HIGH_DEG * CLI_PI / 180 * cm->angle_factor;
    ay.lo = fmin(ay.lo, band_lo);
    ay.hi = fmax(ay.hi, band_hi);
  }
  if (!isfinite(ay.lo)) {
    ay.lo = -1;
    ay.hi = 1;
  }
  if (ay.hi - ay.lo <= 1e-12 * fmax(1.0, fabs(ay.hi))) {
    double pad = fmax(1.0, fabs(ay.hi)) * 0.1;
    ay.lo -= pad;
    ay.hi += pad;
  }
  ystep = tick_step(ay.hi - ay.lo, 6, 0);
  ay.lo = floor(ay.lo / ystep + 1e-9) * ystep;
  ay.hi = ceil(ay.hi / ystep - 1e-9) * ystep;
  ay.x0 = HEIGHT - BOTTOM; /* screen y runs down: lo at the bottom */
  ay.x1 = TOP;
  xstep = tick_step(ax.hi - ax.lo, 8, degrees);

  svg_begin(f, WIDTH, HEIGHT, PAPER);
  fprintf(f, "<defs><clipPath id=\"panel\"><rect x=\"%g\" y=\"%g\" "
             "width=\"%g\" height=\"%g\"/></clipPath></defs>\n",
          LEFT, TOP, WIDTH - LEFT - RIGHT, HEIGHT - TOP - BOTTOM);
  fprintf(f, "<text x=\"%g\" y=\"24\" font-size=\"16\" font-weight=\"bold\" "
             "fill=\"%s\">",
          LEFT, SVG_INK);
  svg_escaped(f, cm->label);
  fprintf(f, "<tspan dx=\"12\" font-size=\"12\" font-weight=\"normal\" "
             "fill=\"#6a6256\">%s, %d steps</tspan></text>\n",
          order == 0   ? "against the input"
          : order == 1 ? "first-order kinematic coefficient"
                       : "second-order kinematic coefficient",
          r->steps);
  /* the key, on one line above the panel */
  {
    double x = LEFT;
    for (k = 0; k < ns; k++) {
      fprintf(f,
              "<line x1=\"%.2f\" y1=\"43\" x2=\"%.2f\" y2=\"43\" stroke=\"%s\" "
              "stroke-width=\"2.5\"/><text x=\"%.2f\" y=\"47\" "
              "font-size=\"12\" fill=\"%s\">",
              x, x + 22, svg_colour(k), x + 27, SVG_INK);
      svg_escaped(f, s[k].label);
      fprintf(f, "</text>\n");
      x += 40 + 6.6 * (double)strlen(s[k].label);
    }
  }
  fprintf(f, "<rect x=\"%g\" y=\"%g\" width=\"%g\" height=\"%g\" fill=\"%s\" "
             "stroke=\"%s\" stroke-width=\"1\"/>\n",
          LEFT, TOP, WIDTH - LEFT - RIGHT, HEIGHT - TOP - BOTTOM, PANEL, GRID);
  if (band) {
    double y1 = map(&ay, band_hi), y0 = map(&ay, band_lo);
    fprintf(f,
            "<rect class=\"usual-range\" x=\"%g\" y=\"%.2f\" width=\"%g\" "
            "height=\"%.2f\" fill=\"#cfe3c4\" fill-opacity=\"0.6\"/>\n"
            "<text x=\"%.2f\" y=\"%.2f\" font-size=\"11\" fill=\"#4d7040\">"
            "usual range %g-%g deg</text>\n",
            LEFT, y1, WIDTH - LEFT - RIGHT, y0 - y1, LEFT + 6, y1 + 14,
            USUAL_LOW_DEG, USUAL_HIGH_DEG);
  }
  /* grid, ticks and their labels */
  for (v = ceil(ax.lo / xstep - 1e-9) * xstep; v <= ax.hi + 1e-9 * xstep;
       v += xstep) {
    double x = map(&ax, v);
    fprintf(f, "<line x1=\"%.2f\" y1=\"%g\" x2=\"%.2f\" y2=\"%g\" "
               "stroke=\"%s\"/>\n",
            x, TOP, x, HEIGHT - BOTTOM, GRID);
    fprintf(f, "<line x1=\"%.2f\" y1=\"%g\" x2=\"%.2f\" y2=\"%g\" "
               "stroke=\"%s\"/>\n",
            x, HEIGHT - BOTTOM, x, HEIGHT - BOTTOM + 5, SVG_INK);
    fprintf(f, "<text x=\"%.2f\" y=\"%g\" font-size=\"11\" "
               "text-anchor=\"middle\" fill=\"%s\">",
            x, HEIGHT - BOTTOM + 18, SVG_INK);
    write_tick_label(f, v, xstep);
    fprintf(f, "</text>\n");
  }
  for (v = ay.lo; v <= ay.hi + 1e-9 * ystep; v += ystep) {
    double y = map(&ay, v);
    int zero = fabs(v) < 1e-9 * ystep;
    fprintf(f, "<line x1=\"%g\" y1=\"%.2f\" x2=\"%g\" y2=\"%.2f\" "
               "stroke=\"%s\"/>\n",
            LEFT, y, WIDTH - RIGHT, y, zero ? "#b7ab97" : GRID);
    fprintf(f, "<line x1=\"%g\" y1=\"%.2f\" x2=\"%g\" y2=\"%.2f\" "
               "stroke=\"%s\"/>\n",
            LEFT - 5, y, LEFT, y, SVG_INK);
    fprintf(f, "<text x=\"%g\" y=\"%.2f\" font-size=\"11\" "
               "text-anchor=\"end\" fill=\"%s\">",
            LEFT - 8, y + 4, SVG_INK);
    write_tick_label(f, v, ystep);
    fprintf(f, "</text>\n");
  }
  /* the curves */
  for (k = 0; k < ns; k++) {
    int open = 0;
    fprintf(f, "<g clip-path=\"url(#panel)\" fill=\"none\" stroke=\"%s\" "
               "stroke-width=\"2.2\" stroke-linejoin=\"round\">\n",
            svg_colour(k));
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
      fprintf(f, "%.2f,%.2f ", map(&ax, d->x[i]), map(&ay, y));
    }
    if (open)
      fprintf(f, "\"/>\n");
    fprintf(f, "</g>\n");
  }
  if ((res->status == KL_LIMIT || res->status == KL_ESINGULAR) &&
      isfinite(res->limit_input)) {
    double x = map(&ax, res->limit_input * xf);
    fprintf(f,
            "<line x1=\"%.2f\" y1=\"%g\" x2=\"%.2f\" y2=\"%g\" stroke=\"#a3312a\" "
            "stroke-width=\"1.5\" stroke-dasharray=\"5,4\"/>\n<text x=\"%.2f\" "
            "y=\"%g\" font-size=\"11\" fill=\"#a3312a\" text-anchor=\"end\">%s "
            "at %.6g</text>\n",
            x, TOP, x, HEIGHT - BOTTOM, x - 4, TOP + 14,
            res->status == KL_LIMIT ? "motion stops" : "singular position",
            res->limit_input * xf);
  }
  /* axis titles */
  fprintf(f, "<text x=\"%.2f\" y=\"%g\" font-size=\"13\" "
             "text-anchor=\"middle\" fill=\"%s\">",
          0.5 * (LEFT + WIDTH - RIGHT), HEIGHT - 16, SVG_INK);
  svg_escaped(f, cli_input_name(cm, r->input));
  fprintf(f, " (%s)</text>\n", cli_input_unit(cm, r->input));
  fprintf(f, "<text transform=\"translate(20 %.2f) rotate(-90)\" "
             "font-size=\"13\" text-anchor=\"middle\" fill=\"%s\">",
          0.5 * (TOP + HEIGHT - BOTTOM), SVG_INK);
  if (ns == 1)
    svg_escaped(f, s[0].label);
  else if (all_sites)
    fprintf(f, "transmission angle");
  else
    fprintf(f, "%s", order == 0 ? "value" : "coefficient");
  fprintf(f, " (");
  svg_escaped(f, yunit);
  fprintf(f, ")</text>\n");
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
  int found, k, st;
  FILE *f;
  memset(&d, 0, sizeof d);
  if (o->nshow == 0) {
    cli_error("plot needs at least one --show OUTPUT; %s has these:",
              cm->label);
    cli_list_outputs(stderr, cm);
    return CLI_EXIT_USAGE;
  }
  found = cli_resolve_range(cm, o, &r);
  if (found < 0)
    return CLI_EXIT_USAGE;
  if (found == 0) {
    cli_error("nothing to plot against: %s; give --input, --from and --to",
              cm->ninputs == 0 ? "the model has no inputs"
                               : "the model has no sweep line and its input "
                                 "slides");
    return CLI_EXIT_USAGE;
  }
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
  if ((sv = kl_solver_new(cm->model)) == NULL)
    goto nomem;
  if ((st = cli_reach_start(sv, cm, o, &r)) != CLI_EXIT_OK)
    goto done;
  d.nseries = o->nshow;
  d.s = s;
  d.factor = factor;
  d.xfactor = cli_input_factor(cm, r.input);
  st = cli_record(sv, cm, &r, sample_row, &d, &res);
  if (st == KL_STOPPED || st == KL_ENOMEM)
    goto nomem;
  if (st == KL_LIMIT || st == KL_ESINGULAR) {
    char note[1024];
    cli_sweep_note(cm, &r, &res, note, sizeof note);
    cli_error("note: %s; the curves end there", note);
  } else if (st != KL_OK) {
    cli_error("the sweep failed: %s", kl_solver_error(sv));
    st = CLI_EXIT_SOLVE;
    goto done;
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
