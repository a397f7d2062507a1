/*
 * study_charts.c - the study command's SVG charts: a histogram of each
 * output with its limits, and scatter plots against the dimensions.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

#define MIN_BINS 5
#define MAX_BINS 60
#define SCATTERS_PER_OUTPUT 2
#define NEAR_SPANS 3.0 /* a limit this many data spans away stays in view */
#define EDGE_ROOM 0.03 /* of the span, so that no dot sits on the edge */
#define LIMIT_COLOUR CHART_ALARM
#define NOMINAL_COLOUR "#6a6256"

void cli_study_output_titled(const kl_study *st, int k, char *buf,
                             size_t cap) {
  int length_unit, angle_unit;
  const char *len;
  kl_model_units(kl_study_model(st), &length_unit, &angle_unit);
  len = length_unit == KL_LENGTH_UNSTATED ? "len"
                                          : kl_length_unit_str(length_unit);
  switch (kl_study_output_quantity(st, k)) {
  case KL_STUDY_ANGLE:
    snprintf(buf, cap, "%s (%s)", kl_study_output_name(st, k),
             kl_angle_unit_str(angle_unit));
    break;
  case KL_STUDY_FORCE: /* masses in kg, times in s (docs/studies.md) */
    snprintf(buf, cap, "%s (kg %s/s^2)", kl_study_output_name(st, k), len);
    break;
  case KL_STUDY_TORQUE:
    snprintf(buf, cap, "%s (kg %s^2/s^2)", kl_study_output_name(st, k), len);
    break;
  default:
    snprintf(buf, cap, "%s (%s)", kl_study_output_name(st, k), len);
    break;
  }
}

int cli_study_has_value(const cli_study_samples *s, long i, int k) {
  return s->status[i] != KL_SAMPLE_NO_ASSEMBLY &&
         !isnan(s->values[i * kl_study_output_count(s->st) + k]);
}

/* The values of output k, and their range. */
typedef struct {
  double *v;
  long count;
  double min, max;
} column;

static int collect(const cli_study_samples *s, int k, column *c) {
  int nout = kl_study_output_count(s->st);
  long i;
  c->v = malloc((size_t)(s->n > 0 ? s->n : 1) * sizeof *c->v);
  c->count = 0;
  c->min = INFINITY;
  c->max = -INFINITY;
  if (c->v == NULL)
    return -1;
  for (i = 0; i < s->n; i++)
    if (cli_study_has_value(s, i, k)) {
      double v = s->values[i * nout + k];
      c->v[c->count++] = v;
      c->min = fmin(c->min, v);
      c->max = fmax(c->max, v);
    }
  return 0;
}

/* The range to show: the data, widened when flat, and each limit that
 * lies near it (one far away would squeeze the data into a sliver), with
 * a little room at both ends. */
static void value_range(const column *c, const kl_study_summary *sum,
                        chart_axis *a) {
  double span;
  a->lo = c->min;
  a->hi = c->max;
  chart_widen(a);
  span = a->hi - a->lo;
  if (sum->has_limits) {
    double limit[2];
    int which;
    limit[0] = sum->lower;
    limit[1] = sum->upper;
    for (which = 0; which < 2; which++) {
      if (limit[which] < a->lo && limit[which] >= a->lo - NEAR_SPANS * span)
        a->lo = limit[which];
      if (limit[which] > a->hi && limit[which] <= a->hi + NEAR_SPANS * span)
        a->hi = limit[which];
    }
  }
  span = EDGE_ROOM * (a->hi - a->lo);
  a->lo -= span;
  a->hi += span;
}

static int outside(const kl_study_summary *sum, double v) {
  return sum->has_limits && (v < sum->lower || v > sum->upper);
}

/* A sample drawn as failing its limits: outside them, or stopped short
 * (which the library never counts as within). */
static int failing(const cli_study_samples *s, long i, int k,
                   const kl_study_summary *sum) {
  return s->status[i] == KL_SAMPLE_LIMITED ||
         outside(sum, s->values[i * kl_study_output_count(s->st) + k]);
}

/* Marks the limits on the value axis (x for histograms, y for scatter
 * plots), and notes those out of view in the panel's top corners, below
 * the rows of the marks' labels. */
static void mark_limits(FILE *f, const chart *c, const kl_study_summary *sum,
                        int on_x) {
  const chart_axis *a = on_x ? &c->x : &c->y;
  char label[96];
  int which;
  if (!sum->has_limits)
    return;
  for (which = 0; which < 2; which++) {
    double v = which == 0 ? sum->lower : sum->upper;
    const char *name = which == 0 ? "lower" : "upper";
    if (v >= a->lo && v <= a->hi) {
      snprintf(label, sizeof label, "%s limit %.8g", name, v);
      if (on_x)
        chart_mark_x(f, c, v, LIMIT_COLOUR, label, which == 0, 0);
      else
        chart_mark_y(f, c, v, LIMIT_COLOUR, label);
    } else {
      int low_side = v < a->lo;
      snprintf(label, sizeof label, "%s limit %.8g lies %s, out of view",
               name, v,
               low_side ? (on_x ? "further left" : "further down")
                        : (on_x ? "further right" : "further up"));
      fprintf(f, "<text x=\"%.2f\" y=\"%.2f\" font-size=\"11\" fill=\"%s\" "
                 "text-anchor=\"%s\">",
              low_side ? c->x.from + 6 : c->x.to - 6, c->y.to + 14 + 2 * 14,
              LIMIT_COLOUR, low_side ? "start" : "end");
      svg_escaped(f, label);
      fputs("</text>\n", f);
    }
  }
}

static int write_histogram(const cli_study_samples *s, int k,
                           const column *c, const kl_study_summary *sum,
                           const char *path) {
  const char *name = kl_study_output_name(s->st, k);
  long counts[MAX_BINS], i, most = 0;
  int bins = (int)ceil(sqrt((double)c->count)), b;
  double lo, width;
  char text[256];
  chart ch;
  FILE *f;
  bins = bins < MIN_BINS ? MIN_BINS : bins > MAX_BINS ? MAX_BINS : bins;
  chart_frame(&ch);
  value_range(c, sum, &ch.x);
  /* the bins cover the data; a flat output gets them over its widened
   * range, so that its one value stands in the middle bin */
  {
    chart_axis data;
    data.lo = c->min;
    data.hi = c->max;
    chart_widen(&data);
    lo = data.lo;
    width = (data.hi - data.lo) / bins;
  }
  memset(counts, 0, sizeof counts);
  for (i = 0; i < c->count; i++) {
    b = (int)floor((c->v[i] - lo) / width);
    b = b < 0 ? 0 : b >= bins ? bins - 1 : b;
    if (++counts[b] > most)
      most = counts[b];
  }
  ch.xstep = chart_tick_step(ch.x.hi - ch.x.lo, 8, 0);
  ch.y.lo = 0;
  ch.y.hi = most > 0 ? (double)most : 1.0;
  ch.ystep = chart_round_out(&ch.y, 6);
  if (ch.ystep < 1) { /* counts are whole */
    ch.ystep = 1;
    ch.y.hi = ceil(ch.y.hi);
  }
  if ((f = cli_open_output(path)) == NULL)
    return CLI_EXIT_OUTPUT;
  chart_begin(f, &ch);
  snprintf(text, sizeof text, "%.60s: %ld samples in %d bins%s", name,
           c->count, bins,
           c->count < s->n ? ", the others have no value" : "");
  chart_title(f, &ch, s->label, text);
  chart_panel(f, &ch);
  chart_ticks(f, &ch);
  fprintf(f, "<g class=\"bins\" stroke=\"%s\" stroke-width=\"0.5\">\n",
          CHART_PANEL);
  for (b = 0; b < bins; b++) {
    double x0 = chart_map(&ch.x, lo + b * width);
    double x1 = chart_map(&ch.x, lo + (b + 1) * width);
    double top = chart_map(&ch.y, (double)counts[b]);
    if (counts[b] == 0)
      continue;
    fprintf(f, "<rect x=\"%.2f\" y=\"%.2f\" width=\"%.2f\" height=\"%.2f\" "
               "fill=\"%s\"><title>%ld</title></rect>\n",
            x0, top, x1 - x0, ch.y.from - top,
            outside(sum, lo + (b + 0.5) * width) ? LIMIT_COLOUR
                                                  : svg_colour(0),
            counts[b]);
  }
  fputs("</g>\n", f);
  snprintf(text, sizeof text, "nominal %.8g", sum->nominal);
  if (sum->nominal >= ch.x.lo && sum->nominal <= ch.x.hi)
    chart_mark_x(f, &ch, sum->nominal, NOMINAL_COLOUR, text, 1, 1);
  mark_limits(f, &ch, sum, 1);
  cli_study_output_titled(s->st, k, text, sizeof text);
  chart_axis_titles(f, &ch, text, "samples per bin");
  svg_end(f);
  return cli_close_output(f, path);
}

/* Pearson's correlation of dimension d with output k over the samples
 * with a value; NaN when either does not vary. */
static double correlation(const cli_study_samples *s, int k, int d) {
  int nout = kl_study_output_count(s->st);
  int ndim = kl_study_dimension_count(s->st);
  double mx = 0, my = 0, sxx = 0, syy = 0, sxy = 0;
  long i, m = 0;
  for (i = 0; i < s->n; i++)
    if (cli_study_has_value(s, i, k)) {
      mx += s->dims[i * ndim + d];
      my += s->values[i * nout + k];
      m++;
    }
  if (m < 2)
    return NAN;
  mx /= (double)m;
  my /= (double)m;
  for (i = 0; i < s->n; i++)
    if (cli_study_has_value(s, i, k)) {
      double dx = s->dims[i * ndim + d] - mx;
      double dy = s->values[i * nout + k] - my;
      sxx += dx * dx;
      syy += dy * dy;
      sxy += dx * dy;
    }
  if (!(sxx > 0) || !(syy > 0))
    return NAN;
  return sxy / sqrt(sxx * syy);
}

static int write_scatter(const cli_study_samples *s, int k, int d,
                         double r, const column *c,
                         const kl_study_summary *sum, const char *path) {
  const char *name = kl_study_output_name(s->st, k);
  const char *dim = kl_study_dimension_name(s->st, d);
  int nout = kl_study_output_count(s->st);
  int ndim = kl_study_dimension_count(s->st), length_unit;
  long i, failed = 0;
  char text[256];
  chart ch;
  FILE *f;
  chart_frame(&ch);
  ch.x.lo = INFINITY;
  ch.x.hi = -INFINITY;
  for (i = 0; i < s->n; i++) {
    ch.x.lo = fmin(ch.x.lo, s->dims[i * ndim + d]);
    ch.x.hi = fmax(ch.x.hi, s->dims[i * ndim + d]);
  }
  chart_widen(&ch.x);
  {
    double room = EDGE_ROOM * (ch.x.hi - ch.x.lo);
    ch.x.lo -= room;
    ch.x.hi += room;
  }
  ch.xstep = chart_tick_step(ch.x.hi - ch.x.lo, 8, 0);
  value_range(c, sum, &ch.y);
  ch.ystep = chart_round_out(&ch.y, 6);
  if ((f = cli_open_output(path)) == NULL)
    return CLI_EXIT_OUTPUT;
  chart_begin(f, &ch);
  snprintf(text, sizeof text, "%.60s against %.60s: correlation %.3f", name,
           dim, r);
  chart_title(f, &ch, s->label, text);
  chart_panel(f, &ch);
  chart_ticks(f, &ch);
  snprintf(text, sizeof text, "nominal %.8g", sum->nominal);
  if (sum->nominal >= ch.y.lo && sum->nominal <= ch.y.hi)
    chart_mark_y(f, &ch, sum->nominal, NOMINAL_COLOUR, text);
  mark_limits(f, &ch, sum, 0);
  fprintf(f, "<g class=\"samples\" clip-path=\"url(#panel)\" "
             "fill-opacity=\"0.55\">\n");
  for (i = 0; i < s->n; i++) {
    double x = chart_map(&ch.x, s->dims[i * ndim + d]);
    if (!cli_study_has_value(s, i, k)) {
      /* no value to place it by: a cross on the bottom edge */
      double y = ch.y.from - 6;
      fprintf(f, "<path d=\"M%.2f %.2fl6 6m0 -6l-6 6\" stroke=\"%s\" "
                 "stroke-width=\"1.2\"/>\n",
              x - 3, y - 3, LIMIT_COLOUR);
      failed++;
      continue;
    }
    fprintf(f, "<circle cx=\"%.2f\" cy=\"%.2f\" r=\"2.2\" fill=\"%s\"/>\n", x,
            chart_map(&ch.y, s->values[i * nout + k]),
            failing(s, i, k, sum) ? LIMIT_COLOUR : svg_colour(0));
  }
  fputs("</g>\n", f);
  if (failed > 0) {
    snprintf(text, sizeof text,
             "crosses: %ld samples without a value (not assembled, or "
             "stopped short)",
             failed);
    fprintf(f, "<text x=\"%.2f\" y=\"%.2f\" font-size=\"11\" fill=\"%s\">",
            ch.x.from + 6, ch.y.from - 16, LIMIT_COLOUR);
    svg_escaped(f, text);
    fputs("</text>\n", f);
  }
  kl_model_units(kl_study_model(s->st), &length_unit, NULL);
  snprintf(text, sizeof text, "%.200s (%s)", dim,
           length_unit == KL_LENGTH_UNSTATED ? "len"
                                             : kl_length_unit_str(length_unit));
  {
    char y_title[300];
    cli_study_output_titled(s->st, k, y_title, sizeof y_title);
    chart_axis_titles(f, &ch, text, y_title);
  }
  svg_end(f);
  return cli_close_output(f, path);
}

/* The dimensions that correlate most with output k, strongest first:
 * up to SCATTERS_PER_OUTPUT of them, those that do not vary left out. */
static int strongest(const cli_study_samples *s, int k, int *best,
                     double *r) {
  int ndim = kl_study_dimension_count(s->st), d, j, found = 0;
  for (d = 0; d < ndim; d++) {
    double rd = correlation(s, k, d);
    if (isnan(rd))
      continue;
    for (j = found; j > 0 && fabs(rd) > fabs(r[j - 1]); j--)
      if (j < SCATTERS_PER_OUTPUT) {
        best[j] = best[j - 1];
        r[j] = r[j - 1];
      }
    if (j < SCATTERS_PER_OUTPUT) {
      best[j] = d;
      r[j] = rd;
      if (found < SCATTERS_PER_OUTPUT)
        found++;
    }
  }
  return found;
}

int cli_study_charts(const cli_study_samples *s, const char *dir,
                     int *histograms, int *scatters) {
  int k, nout = kl_study_output_count(s->st), st = cli_make_dir(dir);
  char path[4400];
  *histograms = *scatters = 0;
  for (k = 0; k < nout && st == CLI_EXIT_OK; k++) {
    kl_study_summary sum;
    column c;
    char word[48], dim_word[48];
    int best[SCATTERS_PER_OUTPUT], found, j;
    double r[SCATTERS_PER_OUTPUT];
    sum.size = sizeof sum;
    if (collect(s, k, &c) != 0 ||
        kl_study_summarize(s->st, k, s->values, s->status, s->n, &sum) !=
            KL_OK) {
      free(c.v);
      cli_error("out of memory drawing the charts");
      return CLI_EXIT_MEMORY;
    }
    cli_file_word(kl_study_output_name(s->st, k), word, sizeof word);
    snprintf(path, sizeof path, "%s/out%d-%s-histogram.svg", dir, k + 1,
             word);
    if ((st = write_histogram(s, k, &c, &sum, path)) == CLI_EXIT_OK)
      ++*histograms;
    found = st == CLI_EXIT_OK ? strongest(s, k, best, r) : 0;
    for (j = 0; j < found && st == CLI_EXIT_OK; j++) {
      cli_file_word(kl_study_dimension_name(s->st, best[j]), dim_word,
                sizeof dim_word);
      snprintf(path, sizeof path, "%s/out%d-%s-vs-dim%d-%s.svg", dir, k + 1,
               word, best[j] + 1, dim_word);
      if ((st = write_scatter(s, k, best[j], r[j], &c, &sum, path)) ==
          CLI_EXIT_OK)
        ++*scatters;
    }
    free(c.v);
  }
  return st;
}
