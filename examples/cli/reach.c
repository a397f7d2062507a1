/*
 * reach.c - the reach command: the workspace of a point of a two-input
 * linkage (kl_solver_workspace) as an SVG picture with its area.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

/* The id of the point named `name` (an unnamed one as "@id"), or -1. */
static int find_point(const cli_model *cm, const char *name) {
  for (int i = 0; i < cm->npoints; i++)
    if (strcmp(cm->point_names[i], name) == 0)
      return i;
  return -1;
}

/* The traced curves: the library's arrays, grown until they fit. */
typedef struct {
  double *xy;
  int *curves, *kinds;
  kl_workspace_result res;
} traced;

static int trace(kl_solver *s, int point, int grid, traced *t) {
  kl_workspace_options opt;
  int st = KL_ETRUNCATED;
  kl_workspace_options_default(&opt);
  if (grid > 0)
    opt.grid = grid;
  memset(&t->res, 0, sizeof t->res);
  t->res.size = sizeof t->res;
  for (int cap = 4096; st == KL_ETRUNCATED && cap <= (1 << 22); cap *= 4) {
    free(t->xy);
    free(t->curves);
    free(t->kinds);
    t->xy = malloc(2 * sizeof(double) * (size_t)cap);
    t->curves = malloc(sizeof(int) * (size_t)cap);
    t->kinds = malloc(sizeof(int) * (size_t)cap);
    if (t->xy == NULL || t->curves == NULL || t->kinds == NULL)
      return KL_ENOMEM;
    st = kl_solver_workspace(s, point, &opt, t->xy, t->curves, t->kinds, cap,
                             &t->res);
  }
  return st;
}

/* The panel's data ranges with one scale on both axes, so that the
 * workspace keeps its shape, and one tick step on both, so that the grid
 * is square; the y range starts on a tick, as chart_ticks expects. */
static void equal_scale(chart *c, double xlo, double xhi, double ylo,
                        double yhi) {
  double w = c->x.to - c->x.from, h = c->y.from - c->y.to;
  double span_x = (xhi - xlo) * 1.08, span_y = (yhi - ylo) * 1.08;
  double mx = 0.5 * (xlo + xhi), my = 0.5 * (ylo + yhi);
  if (!(span_y > 0.0))
    span_y = 1.0;
  span_y = fmax(span_y, span_x * h / w);
  c->ystep = chart_tick_step(span_y, 6, 0);
  c->y.lo = floor((my - 0.5 * span_y) / c->ystep) * c->ystep;
  c->y.hi = ceil((my + 0.5 * span_y) / c->ystep) * c->ystep;
  span_x = (c->y.hi - c->y.lo) * w / h;
  c->x.lo = mx - 0.5 * span_x;
  c->x.hi = mx + 0.5 * span_x;
  c->xstep = c->ystep;
}

/* The stretches of one kind as polylines. */
static void draw_kind(FILE *f, const chart *c, const traced *t, int kind,
                      const char *colour, double width, const char *dash) {
  int open = 0, n = t->res.vertices;
  fprintf(f,
          "<g class=\"workspace-%s\" clip-path=\"url(#panel)\" fill=\"none\" "
          "stroke=\"%s\" stroke-width=\"%g\" stroke-linejoin=\"round\"%s%s%s>\n",
          kl_workspace_kind_str(kind), colour, width,
          dash ? " stroke-dasharray=\"" : "", dash ? dash : "",
          dash ? "\"" : "");
  for (int k = 0; k < n; k++) {
    int on = k + 1 < n && t->curves[k + 1] == t->curves[k] &&
             t->kinds[k] == kind;
    if (on && !open)
      fprintf(f, "<polyline points=\"");
    if (on || open)
      fprintf(f, "%.2f,%.2f ", chart_map(&c->x, t->xy[2 * k]),
              chart_map(&c->y, t->xy[2 * k + 1]));
    if (open && !on)
      fprintf(f, "\"/>\n");
    open = on;
  }
  fprintf(f, "</g>\n");
}

/* The ground pivots, for orientation. */
static void draw_pivots(FILE *f, const chart *c, const cli_model *cm) {
  for (int j = 0; j < cm->njoints; j++) {
    int links[2];
    double a[2], b[2];
    kl_model_joint_links(cm->model, j, links, a, b);
    if (kl_model_joint_kind(cm->model, j) != KL_JOINT_REVOLUTE ||
        (links[0] != KL_GROUND && links[1] != KL_GROUND))
      continue;
    {
      const double *p = links[0] == KL_GROUND ? a : b;
      fprintf(f,
              "<circle class=\"pivot\" cx=\"%.2f\" cy=\"%.2f\" r=\"5\" "
              "fill=\"%s\" stroke=\"%s\" stroke-width=\"1.5\"/>\n",
              chart_map(&c->x, p[0]), chart_map(&c->y, p[1]), SVG_PAPER,
              SVG_INK);
    }
  }
}

static void write_svg(FILE *f, const cli_model *cm, const char *point_name,
                      const traced *t) {
  chart c;
  char text[600], x_title[64], y_title[64];
  double xlo = INFINITY, xhi = -INFINITY, ylo = INFINITY, yhi = -INFINITY;
  for (int k = 0; k < t->res.vertices; k++) {
    xlo = fmin(xlo, t->xy[2 * k]);
    xhi = fmax(xhi, t->xy[2 * k]);
    ylo = fmin(ylo, t->xy[2 * k + 1]);
    yhi = fmax(yhi, t->xy[2 * k + 1]);
  }
  chart_frame(&c);
  equal_scale(&c, xlo, xhi, ylo, yhi);
  chart_begin(f, &c);
  snprintf(text, sizeof text,
           "workspace of %s: area %.6g %s^2, %d curves by continuation",
           point_name, t->res.area, cm->length_unit, t->res.curves);
  chart_title(f, &c, cm->label, text);
  svg_key(f, c.x.from, 47, svg_colour(0), NULL, "boundary");
  svg_key(f, c.x.from + 110, 47, svg_colour(1), "6 4",
          "singular curve inside");
  chart_panel(f, &c);
  chart_ticks(f, &c);
  draw_kind(f, &c, t, KL_WORKSPACE_FOLD, svg_colour(1), 1.6, "6 4");
  draw_kind(f, &c, t, KL_WORKSPACE_BOUNDARY, svg_colour(0), 2.4, NULL);
  draw_pivots(f, &c, cm);
  snprintf(x_title, sizeof x_title, "x (%s)", cm->length_unit);
  snprintf(y_title, sizeof y_title, "y (%s)", cm->length_unit);
  chart_axis_titles(f, &c, x_title, y_title);
  svg_end(f);
}

int cli_cmd_reach(const cli_model *cm, const cli_options *o) {
  traced t = {NULL, NULL, NULL, {0}};
  kl_solver *s;
  FILE *f;
  int point, st, code = CLI_EXIT_OK;
  if (o->point == NULL) {
    cli_error("reach: say which point with --point NAME");
    return CLI_EXIT_USAGE;
  }
  if ((point = find_point(cm, o->point)) < 0) {
    cli_error("reach: the model has no point '%s'", o->point);
    return CLI_EXIT_USAGE;
  }
  if ((s = kl_solver_new(cm->model)) == NULL) {
    cli_error("reach: out of memory");
    return CLI_EXIT_MEMORY;
  }
  st = trace(s, point, o->grid, &t);
  if (st != KL_OK) {
    cli_error("reach: %s", kl_solver_error(s));
    code = st == KL_ENOMEM || st == KL_ETRUNCATED ? CLI_EXIT_MEMORY
           : st == KL_ENOASSEMBLY                 ? CLI_EXIT_SOLVE
                                                  : CLI_EXIT_MODEL;
  } else if ((f = cli_open_output(o->output)) == NULL) {
    code = CLI_EXIT_OUTPUT;
  } else {
    int to_file = o->output != NULL && strcmp(o->output, "-") != 0;
    write_svg(f, cm, o->point, &t);
    code = cli_close_output(f, o->output);
    /* the figures beside the picture, never inside its stream */
    fprintf(to_file ? stdout : stderr,
            "workspace of %s: area %.9g %s^2, x %.6g to %.6g, y %.6g to "
            "%.6g, %d curves\n",
            o->point, t.res.area, cm->length_unit, t.res.xmin, t.res.xmax,
            t.res.ymin, t.res.ymax, t.res.curves);
  }
  free(t.xy);
  free(t.curves);
  free(t.kinds);
  kl_solver_free(s);
  return code;
}
