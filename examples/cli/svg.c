/*
 * svg.c - what the drawing, the plots and the study charts share: the
 * document, text, colours, round numbers, and the panel with its axes.
 */
#include <math.h>

#include "cli.h"

void svg_begin(FILE *f, double width, double height, const char *background) {
  fprintf(f,
          "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
          "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%.0f\" "
          "height=\"%.0f\" viewBox=\"0 0 %.0f %.0f\" font-family=\"%s\">\n"
          "<rect width=\"100%%\" height=\"100%%\" fill=\"%s\"/>\n",
          width, height, width, height, SVG_FONT, background);
}

void svg_end(FILE *f) { fputs("</svg>\n", f); }

/* Length of the UTF-8 sequence starting at s, or 0 if it is not one. */
static int utf8_length(const unsigned char *s) {
  int n, i;
  if (s[0] < 0x80)
    return 1;
  n = (s[0] & 0xe0) == 0xc0 ? 2 : (s[0] & 0xf0) == 0xe0 ? 3
      : (s[0] & 0xf8) == 0xf0                           ? 4
                                                        : 0;
  if (n == 2 && s[0] < 0xc2)
    return 0; /* overlong */
  for (i = 1; i < n; i++)
    if ((s[i] & 0xc0) != 0x80)
      return 0;
  return n;
}

/* Model names are bytes; XML wants well-formed UTF-8 without markup. */
void svg_escaped(FILE *f, const char *text) {
  const unsigned char *s = (const unsigned char *)text;
  while (*s != '\0') {
    int n = utf8_length(s);
    if (n == 0) {
      fputc('?', f);
      s++;
      continue;
    }
    if (n > 1) {
      fwrite(s, 1, (size_t)n, f);
      s += n;
      continue;
    }
    switch (*s) {
    case '&':
      fputs("&amp;", f);
      break;
    case '<':
      fputs("&lt;", f);
      break;
    case '>':
      fputs("&gt;", f);
      break;
    case '"':
      fputs("&quot;", f);
      break;
    case '\'':
      fputs("&apos;", f);
      break;
    default:
      fputc(*s < 0x20 ? '?' : *s, f);
      break;
    }
    s++;
  }
}

const char *svg_colour(int k) {
  static const char *const palette[] = {"#1f7a74", "#b4532a", "#3b5aa6",
                                        "#b08a18", "#8c3d78", "#5f7d2e",
                                        "#6b4b3a", "#2f8fbf"};
  return palette[k % (int)(sizeof palette / sizeof palette[0])];
}

void svg_text_open(FILE *f, double x, double y, double size,
                   const char *colour, const char *attrs) {
  fprintf(f, "<text x=\"%.2f\" y=\"%.2f\" font-size=\"%g\"%s%s fill=\"%s\">",
          x, y, size, attrs != NULL ? " " : "", attrs != NULL ? attrs : "",
          colour);
}

void svg_text(FILE *f, double x, double y, double size, const char *colour,
              const char *attrs, const char *text) {
  svg_text_open(f, x, y, size, colour, attrs);
  svg_escaped(f, text);
  fputs("</text>\n", f);
}

void svg_key(FILE *f, double x, double y, const char *colour,
             const char *dash, const char *text) {
  fprintf(f,
          "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
          "stroke=\"%s\" stroke-width=\"%s\"",
          x, y - 4, x + 24, y - 4, colour, dash != NULL ? "2" : "2.5");
  if (dash != NULL)
    fprintf(f, " stroke-dasharray=\"%s\"", dash);
  fputs("/>\n", f);
  svg_text(f, x + 30, y, 12, SVG_INK, NULL, text);
}

double svg_round_125(double v, int up) {
  double p = pow(10, floor(log10(v)));
  if (up)
    return v <= p ? p : v <= 2 * p ? 2 * p : v <= 5 * p ? 5 * p : 10 * p;
  return 5 * p <= v ? 5 * p : 2 * p <= v ? 2 * p : p;
}

/* ---- the panel of a plot or chart, in data coordinates ---- */

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
  int i;
  if (degrees && span >= 60)
    for (i = 0; i < 5; i++)
      if (span / turn[i] <= want + 2)
        return turn[i];
  return svg_round_125(span / want, 1);
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
static void tick_label(char *buf, size_t cap, double v, double step) {
  int decimals = step >= 1 ? 0 : (int)ceil(-log10(step) - 1e-9);
  if (fabs(v) < 1e-9 * step)
    v = 0.0;
  snprintf(buf, cap, "%.*f", decimals > 10 ? 10 : decimals, v);
}

void chart_begin(FILE *f, const chart *c) {
  svg_begin(f, CHART_WIDTH, CHART_HEIGHT, SVG_PAPER);
  fprintf(f, "<defs><clipPath id=\"panel\"><rect x=\"%g\" y=\"%g\" "
             "width=\"%g\" height=\"%g\"/></clipPath></defs>\n",
          c->x.from, c->y.to, c->x.to - c->x.from, c->y.from - c->y.to);
}

void chart_title(FILE *f, const chart *c, const char *title,
                 const char *subtitle) {
  svg_text_open(f, c->x.from, 24, 16, SVG_INK, "font-weight=\"bold\"");
  svg_escaped(f, title);
  fprintf(f, "<tspan dx=\"12\" font-size=\"12\" font-weight=\"normal\" "
             "fill=\"%s\">",
          SVG_MUTED);
  svg_escaped(f, subtitle);
  fprintf(f, "</tspan></text>\n");
}

void chart_panel(FILE *f, const chart *c) {
  fprintf(f, "<rect x=\"%g\" y=\"%g\" width=\"%g\" height=\"%g\" fill=\"%s\" "
             "stroke=\"%s\" stroke-width=\"1\"/>\n",
          c->x.from, c->y.to, c->x.to - c->x.from, c->y.from - c->y.to,
          CHART_PANEL, CHART_GRID);
}

void chart_curve_begin(FILE *f, const char *colour) {
  fprintf(f, "<g clip-path=\"url(#panel)\" fill=\"none\" stroke=\"%s\" "
             "stroke-width=\"2.2\" stroke-linejoin=\"round\">\n",
          colour);
}

void chart_curve_end(FILE *f) { fprintf(f, "</g>\n"); }

void chart_ticks(FILE *f, const chart *c) {
  double v, top = c->y.to, bottom = c->y.from;
  char label[64];
  for (v = ceil(c->x.lo / c->xstep - 1e-9) * c->xstep;
       v <= c->x.hi + 1e-9 * c->xstep; v += c->xstep) {
    double x = chart_map(&c->x, v);
    fprintf(f, "<line x1=\"%.2f\" y1=\"%g\" x2=\"%.2f\" y2=\"%g\" "
               "stroke=\"%s\"/>\n",
            x, top, x, bottom, CHART_GRID);
    fprintf(f, "<line x1=\"%.2f\" y1=\"%g\" x2=\"%.2f\" y2=\"%g\" "
               "stroke=\"%s\"/>\n",
            x, bottom, x, bottom + 5, SVG_INK);
    tick_label(label, sizeof label, v, c->xstep);
    svg_text(f, x, bottom + 18, 11, SVG_INK, "text-anchor=\"middle\"", label);
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
    tick_label(label, sizeof label, v, c->ystep);
    svg_text(f, c->x.from - 8, y + 4, 11, SVG_INK, "text-anchor=\"end\"",
             label);
  }
}

void chart_mark_x(FILE *f, const chart *c, double v, const char *colour,
                  const char *label, int label_right, int row) {
  double x = chart_map(&c->x, v);
  fprintf(f,
          "<line x1=\"%.2f\" y1=\"%g\" x2=\"%.2f\" y2=\"%g\" stroke=\"%s\" "
          "stroke-width=\"1.5\" stroke-dasharray=\"5,4\"/>\n",
          x, c->y.to, x, c->y.from, colour);
  svg_text(f, label_right ? x + 4 : x - 4, c->y.to + 14 + 14 * row, 11, colour,
           label_right ? "text-anchor=\"start\"" : "text-anchor=\"end\"",
           label);
}

void chart_mark_y(FILE *f, const chart *c, double v, const char *colour,
                  const char *label) {
  double y = chart_map(&c->y, v);
  fprintf(f,
          "<line x1=\"%g\" y1=\"%.2f\" x2=\"%g\" y2=\"%.2f\" stroke=\"%s\" "
          "stroke-width=\"1.5\" stroke-dasharray=\"5,4\"/>\n",
          c->x.from, y, c->x.to, y, colour);
  svg_text(f, c->x.to - 4, y - 4, 11, colour, "text-anchor=\"end\"", label);
}

void chart_axis_titles(FILE *f, const chart *c, const char *x_title,
                       const char *y_title) {
  svg_text(f, 0.5 * (c->x.from + c->x.to), CHART_HEIGHT - 16, 13, SVG_INK,
           "text-anchor=\"middle\"", x_title);
  fprintf(f, "<text transform=\"translate(20 %.2f) rotate(-90)\" "
             "font-size=\"13\" text-anchor=\"middle\" fill=\"%s\">",
          0.5 * (c->y.to + c->y.from), SVG_INK);
  svg_escaped(f, y_title);
  fprintf(f, "</text>\n");
}
