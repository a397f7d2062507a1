/*
 * chart.c - what the line plots and the study charts share: a titled panel
 * in data coordinates, with ticks, grid, axis titles and marked values.
 */
#include <math.h>

#include "cli.h"

#define CHART_LEFT 84.0
#define CHART_RIGHT 26.0
#define CHART_TOP 62.0
#define CHART_BOTTOM 60.0
#define CHART_GRID "#e4dccd"
#define CHART_ZERO "#b7ab97"

void chart_frame(chart *c) {
  c->x.from = CHART_LEFT;
  c->x.to = CHART_WIDTH - CHART_RIGHT;
  c->y.from = CHART_HEIGHT - CHART_BOTTOM; /* screen y runs down */
  c->y.to = CHART_TOP;
}

double chart_tick_step(double span, int want, int degrees) {
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

void chart_widen(chart_axis *a) {
  if (!isfinite(a->lo) || !isfinite(a->hi)) {
    a->lo = -1;
    a->hi = 1;
  }
  if (a->hi - a->lo <= 1e-12 * fmax(1.0, fabs(a->hi))) {
    double pad = fmax(1.0, fabs(a->hi)) * 0.1;
    a->lo -= pad;
    a->hi += pad;
  }
}

double chart_round_out(chart_axis *a, int want) {
  double step;
  chart_widen(a);
  step = chart_tick_step(a->hi - a->lo, want, 0);
  a->lo = floor(a->lo / step + 1e-9) * step;
  a->hi = ceil(a->hi / step - 1e-9) * step;
  return step;
}

double chart_map(const chart_axis *a, double v) {
  return a->from + (v - a->lo) / (a->hi - a->lo) * (a->to - a->from);
}

/* As many decimals as the step needs, and no "-0". */
static void tick_label(FILE *f, double v, double step) {
  int decimals = step >= 1 ? 0 : (int)ceil(-log10(step) - 1e-9);
  if (fabs(v) < 1e-9 * step)
    v = 0.0;
  fprintf(f, "%.*f", decimals > 10 ? 10 : decimals, v);
}

void chart_begin(FILE *f, const chart *c) {
  svg_begin(f, CHART_WIDTH, CHART_HEIGHT, CHART_PAPER);
  fprintf(f, "<defs><clipPath id=\"panel\"><rect x=\"%g\" y=\"%g\" "
             "width=\"%g\" height=\"%g\"/></clipPath></defs>\n",
          c->x.from, c->y.to, c->x.to - c->x.from, c->y.from - c->y.to);
}

void chart_title(FILE *f, const chart *c, const char *title,
                 const char *subtitle) {
  fprintf(f, "<text x=\"%g\" y=\"24\" font-size=\"16\" font-weight=\"bold\" "
             "fill=\"%s\">",
          c->x.from, SVG_INK);
  svg_escaped(f, title);
  fprintf(f, "<tspan dx=\"12\" font-size=\"12\" font-weight=\"normal\" "
             "fill=\"#6a6256\">");
  svg_escaped(f, subtitle);
  fprintf(f, "</tspan></text>\n");
}

void chart_panel(FILE *f, const chart *c) {
  fprintf(f, "<rect x=\"%g\" y=\"%g\" width=\"%g\" height=\"%g\" fill=\"%s\" "
             "stroke=\"%s\" stroke-width=\"1\"/>\n",
          c->x.from, c->y.to, c->x.to - c->x.from, c->y.from - c->y.to,
          CHART_PANEL, CHART_GRID);
}

void chart_ticks(FILE *f, const chart *c) {
  double v, top = c->y.to, bottom = c->y.from;
  for (v = ceil(c->x.lo / c->xstep - 1e-9) * c->xstep;
       v <= c->x.hi + 1e-9 * c->xstep; v += c->xstep) {
    double x = chart_map(&c->x, v);
    fprintf(f, "<line x1=\"%.2f\" y1=\"%g\" x2=\"%.2f\" y2=\"%g\" "
               "stroke=\"%s\"/>\n",
            x, top, x, bottom, CHART_GRID);
    fprintf(f, "<line x1=\"%.2f\" y1=\"%g\" x2=\"%.2f\" y2=\"%g\" "
               "stroke=\"%s\"/>\n",
            x, bottom, x, bottom + 5, SVG_INK);
    fprintf(f, "<text x=\"%.2f\" y=\"%g\" font-size=\"11\" "
               "text-anchor=\"middle\" fill=\"%s\">",
            x, bottom + 18, SVG_INK);
    tick_label(f, v, c->xstep);
    fprintf(f, "</text>\n");
  }
  for (v = c->y.lo; v <= c->y.hi + 1e-9 * c->ystep; v += c->ystep) {
    double y = chart_map(&c->y, v);
    int zero = fabs(v) < 1e-9 * c->ystep;
    fprintf(f, "<line x1=\"%g\" y1=\"%.2f\" x2=\"%g\" y2=\"%.2f\" "
               "stroke=\"%s\"/>\n",
            c->x.from, y, c->x.to, y, zero ? CHART_ZERO : CHART_GRID);
    fprintf(f, "<line x1=\"%g\" y1=\"%.2f\" x2=\"%g\" y2=\"%.2f\" "
               "stroke=\"%s\"/>\n",
            c->x.from - 5, y, c->x.from, y, SVG_INK);
    fprintf(f, "<text x=\"%g\" y=\"%.2f\" font-size=\"11\" "
               "text-anchor=\"end\" fill=\"%s\">",
            c->x.from - 8, y + 4, SVG_INK);
    tick_label(f, v, c->ystep);
    fprintf(f, "</text>\n");
  }
}

void chart_mark_x(FILE *f, const chart *c, double v, const char *colour,
                  const char *label, int label_right, int row) {
  double x = chart_map(&c->x, v);
  fprintf(f,
          "<line x1=\"%.2f\" y1=\"%g\" x2=\"%.2f\" y2=\"%g\" stroke=\"%s\" "
          "stroke-width=\"1.5\" stroke-dasharray=\"5,4\"/>\n<text x=\"%.2f\" "
          "y=\"%g\" font-size=\"11\" fill=\"%s\" text-anchor=\"%s\">",
          x, c->y.to, x, c->y.from, colour, label_right ? x + 4 : x - 4,
          c->y.to + 14 + 14 * row, colour, label_right ? "start" : "end");
  svg_escaped(f, label);
  fprintf(f, "</text>\n");
}

void chart_mark_y(FILE *f, const chart *c, double v, const char *colour,
                  const char *label) {
  double y = chart_map(&c->y, v);
  fprintf(f,
          "<line x1=\"%g\" y1=\"%.2f\" x2=\"%g\" y2=\"%.2f\" stroke=\"%s\" "
          "stroke-width=\"1.5\" stroke-dasharray=\"5,4\"/>\n<text x=\"%g\" "
          "y=\"%.2f\" font-size=\"11\" fill=\"%s\" text-anchor=\"end\">",
          c->x.from, y, c->x.to, y, colour, c->x.to - 4, y - 4, colour);
  svg_escaped(f, label);
  fprintf(f, "</text>\n");
}

void chart_axis_titles(FILE *f, const chart *c, const char *x_title,
                       const char *y_title) {
  fprintf(f, "<text x=\"%.2f\" y=\"%g\" font-size=\"13\" "
             "text-anchor=\"middle\" fill=\"%s\">",
          0.5 * (c->x.from + c->x.to), CHART_HEIGHT - 16, SVG_INK);
  svg_escaped(f, x_title);
  fprintf(f, "</text>\n");
  fprintf(f, "<text transform=\"translate(20 %.2f) rotate(-90)\" "
             "font-size=\"13\" text-anchor=\"middle\" fill=\"%s\">",
          0.5 * (c->y.to + c->y.from), SVG_INK);
  svg_escaped(f, y_title);
  fprintf(f, "</text>\n");
}
