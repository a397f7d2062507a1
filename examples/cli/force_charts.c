/*
 * force_charts.c - SVG charts of a working cycle's forces: each input's
 * effort over the cycle, and polar plots of each joint's and the frame's load.
 */
#include <math.h>
#include <string.h>

#include "cli.h"

#define POLAR_WIDTH 640.0
#define POLAR_HEIGHT 660.0
#define POLAR_RADIUS 230.0 /* screen units of the outer ring */
#define POLAR_CX 320.0
#define POLAR_CY 340.0
#define POLAR_MARKS 4      /* dots at the quarters of the cycle */

/* The driven input's value at sample k, in the model's unit. */
static double input_at(const cli_model *cm, const cli_cycle *c, int k) {
  return c->table[(size_t)k * (size_t)c->width] *
         cli_input_factor(cm, c->r.input);
}

/* The effort of input i over the cycle, with its peak, RMS and mean. */
static int write_effort(const cli_model *cm, const cli_cycle *c, int input,
                        const char *path) {
  cli_force_units u;
  const kl_cycle_peak *p = &c->inputs[input];
  const char *unit;
  char text[600], x_title[400], y_title[400];
  double xf = cli_input_factor(cm, c->r.input);
  int k, degrees = cli_input_is_angle(cm, c->r.input) &&
                   strcmp(cm->angle_unit, "deg") == 0;
  chart ch;
  FILE *f;
  cli_force_units_of(cm, &u);
  unit = cli_input_is_angle(cm, input) ? u.torque : u.force;
  chart_frame(&ch);
  ch.x.lo = fmin(c->r.from, c->r.to) * xf;
  ch.x.hi = fmax(c->r.from, c->r.to) * xf;
  ch.y.lo = 0.0;
  ch.y.hi = 0.0;
  for (k = 0; k < c->rows; k++) {
    double e = c->table[(size_t)k * (size_t)c->width + 1 + input] * u.per_model;
    ch.y.lo = fmin(ch.y.lo, e);
    ch.y.hi = fmax(ch.y.hi, e);
  }
  ch.ystep = chart_round_out(&ch.y, 6);
  ch.xstep = chart_tick_step(ch.x.hi - ch.x.lo, 8, degrees);
  if ((f = cli_open_output(path)) == NULL)
    return CLI_EXIT_OUTPUT;
  chart_begin(f, &ch);
  snprintf(text, sizeof text, "%s effort at %.6g %s/s, %d steps",
           cli_input_name(cm, input), c->speed * xf,
           cli_input_unit(cm, c->r.input), c->r.steps);
  chart_title(f, &ch, cm->label, text);
  svg_key(f, ch.x.from, 47, svg_colour(0), NULL,
          cli_input_is_angle(cm, input) ? "input torque" : "input force");
  svg_key(f, ch.x.from + 150, 47, svg_colour(1), "5,4", "RMS");
  svg_key(f, ch.x.from + 240, 47, svg_colour(2), "5,4", "mean");
  chart_panel(f, &ch);
  chart_ticks(f, &ch);
  chart_curve_begin(f, svg_colour(0));
  fprintf(f, "<polyline points=\"");
  for (k = 0; k < c->rows; k++)
    fprintf(f, "%.2f,%.2f ", chart_map(&ch.x, input_at(cm, c, k)),
            chart_map(&ch.y, c->table[(size_t)k * (size_t)c->width + 1 +
                                      input] *
                                 u.per_model));
  fprintf(f, "\"/>\n");
  chart_curve_end(f);
  snprintf(text, sizeof text, "RMS %.4g %s", p->rms * u.per_model, unit);
  chart_mark_y(f, &ch, p->rms * u.per_model, svg_colour(1), text);
  chart_mark_y(f, &ch, -p->rms * u.per_model, svg_colour(1), "");
  snprintf(text, sizeof text, "mean %.4g %s", cli_peak_mean(p) * u.per_model,
           unit);
  chart_mark_y(f, &ch, cli_peak_mean(p) * u.per_model, svg_colour(2), text);
  {
    double x = chart_map(&ch.x, p->at * xf), y = chart_map(&ch.y, p->peak * u.per_model);
    fprintf(f, "<circle cx=\"%.2f\" cy=\"%.2f\" r=\"4.5\" fill=\"%s\"/>\n", x,
            y, CHART_ALARM);
    snprintf(text, sizeof text, "peak %.4g %s at %.6g", p->peak * u.per_model,
             unit, p->at * xf);
    svg_text(f, x + (x > 0.5 * (ch.x.from + ch.x.to) ? -8 : 8),
             y + (p->peak >= 0 ? -8 : 16), 11, CHART_ALARM,
             x > 0.5 * (ch.x.from + ch.x.to) ? "text-anchor=\"end\"" : NULL,
             text);
  }
  if (c->status == KL_LIMIT) {
    snprintf(text, sizeof text, "motion stops at %.6g",
             c->sum.limit_input * xf);
    chart_mark_x(f, &ch, c->sum.limit_input * xf, CHART_ALARM, text, 0, 0);
  }
  snprintf(x_title, sizeof x_title, "%s (%s)", cli_input_name(cm, c->r.input),
           cli_input_unit(cm, c->r.input));
  snprintf(y_title, sizeof y_title, "%s %s (%s)", cli_input_name(cm, input),
           cli_input_is_angle(cm, input) ? "torque" : "force", unit);
  chart_axis_titles(f, &ch, x_title, y_title);
  svg_end(f);
  return cli_close_output(f, path);
}

/* The force at sample k: joint j's (j >= 0), or the frame's (j < 0). */
static void force_at(const cli_model *cm, const cli_cycle *c, int j, int k,
                     double xy[2]) {
  const double *row = c->table + (size_t)k * (size_t)c->width + 1 + cm->ninputs;
  const double *v = j >= 0 ? row + 3 * j : row + 3 * cm->njoints;
  xy[0] = v[0];
  xy[1] = v[1];
}

/* The locus of a force vector's tip over the cycle, on rings of equal
 * magnitude about the origin (a polar plot of a bearing load: common
 * practice, no source), with dots at the quarters of the cycle and the
 * peak drawn as the vector it is. `j` is a joint, or -1 for the frame. */
static int write_polar(const cli_model *cm, const cli_cycle *c, int j,
                       const char *path) {
  cli_force_units u;
  const kl_cycle_peak *p = j >= 0 ? &c->joints[j] : &c->sum.shaking_force;
  double top = 0.0, ring, scale, xy[2], xf = cli_input_factor(cm, c->r.input);
  char text[700];
  int k, links[2], m, rings;
  FILE *f;
  cli_force_units_of(cm, &u);
  for (k = 0; k < c->rows; k++) {
    force_at(cm, c, j, k, xy);
    top = fmax(top, hypot(xy[0], xy[1]) * u.per_model);
  }
  if (!(top > 0.0))
    top = 1.0;
  ring = svg_round_125(top / 5.0, 1);
  rings = (int)ceil(top / ring - 1e-9);
  if (rings < 1)
    rings = 1;
  scale = POLAR_RADIUS / (rings * ring);
  if ((f = cli_open_output(path)) == NULL)
    return CLI_EXIT_OUTPUT;
  svg_begin(f, POLAR_WIDTH, POLAR_HEIGHT, SVG_PAPER);
  if (j >= 0) {
    kl_model_joint_links(cm->model, j, links, NULL, NULL);
    snprintf(text, sizeof text, "load on joint %s", cm->joint_names[j]);
  } else {
    snprintf(text, sizeof text, "shaking force on the frame");
  }
  svg_text(f, 24, 28, 16, SVG_INK, "font-weight=\"bold\"", text);
  if (j >= 0)
    snprintf(text, sizeof text,
             "the force %s exerts on %s, in the global frame; %s at %.6g %s/s",
             cm->link_names[links[0]], cm->link_names[links[1]],
             cli_input_name(cm, c->r.input), c->speed * xf,
             cli_input_unit(cm, c->r.input));
  else
    snprintf(text, sizeof text,
             "what the moving links exert on ground, in the global frame; %s "
             "at %.6g %s/s",
             cli_input_name(cm, c->r.input), c->speed * xf,
             cli_input_unit(cm, c->r.input));
  svg_text(f, 24, 48, 12, SVG_MUTED, NULL, text);
  fprintf(f, "<circle cx=\"%g\" cy=\"%g\" r=\"%g\" fill=\"%s\" stroke=\"%s\"/>\n",
          POLAR_CX, POLAR_CY, POLAR_RADIUS, CHART_PANEL, "#e4dccd");
  for (m = 1; m <= rings; m++) { /* labelled along the lower right diagonal */
    double at = m * ring * scale * sqrt(0.5);
    fprintf(f, "<circle cx=\"%g\" cy=\"%g\" r=\"%.2f\" fill=\"none\" "
               "stroke=\"#e4dccd\"/>\n",
            POLAR_CX, POLAR_CY, m * ring * scale);
    snprintf(text, sizeof text, "%g %s", m * ring, u.force);
    svg_text(f, POLAR_CX + at + 3, POLAR_CY + at - 3, 10, SVG_MUTED, NULL,
             text);
  }
  fprintf(f, "<line x1=\"%g\" y1=\"%g\" x2=\"%g\" y2=\"%g\" stroke=\"#b7ab97\"/>\n"
             "<line x1=\"%g\" y1=\"%g\" x2=\"%g\" y2=\"%g\" stroke=\"#b7ab97\"/>\n",
          POLAR_CX - POLAR_RADIUS, POLAR_CY, POLAR_CX + POLAR_RADIUS, POLAR_CY,
          POLAR_CX, POLAR_CY - POLAR_RADIUS, POLAR_CX, POLAR_CY + POLAR_RADIUS);
  svg_text(f, POLAR_CX + POLAR_RADIUS + 8, POLAR_CY + 4, 12, SVG_INK, NULL, "x");
  svg_text(f, POLAR_CX - 4, POLAR_CY - POLAR_RADIUS - 8, 12, SVG_INK, NULL, "y");
  /* the locus */
  fprintf(f, "<polyline fill=\"none\" stroke=\"%s\" stroke-width=\"2.2\" "
             "stroke-linejoin=\"round\" points=\"",
          svg_colour(0));
  for (k = 0; k < c->rows; k++) {
    force_at(cm, c, j, k, xy);
    fprintf(f, "%.2f,%.2f ", POLAR_CX + xy[0] * u.per_model * scale,
            POLAR_CY - xy[1] * u.per_model * scale);
  }
  fprintf(f, "\"/>\n");
  /* the quarters of the cycle, labelled by the driven input */
  for (m = 0; m < POLAR_MARKS && c->rows > 1; m++) {
    int at = (int)((long)m * (c->rows - 1) / POLAR_MARKS);
    double x, y;
    force_at(cm, c, j, at, xy);
    x = POLAR_CX + xy[0] * u.per_model * scale;
    y = POLAR_CY - xy[1] * u.per_model * scale;
    fprintf(f, "<circle cx=\"%.2f\" cy=\"%.2f\" r=\"3.5\" fill=\"%s\"/>\n", x,
            y, svg_colour(0));
    snprintf(text, sizeof text, "%.4g", input_at(cm, c, at));
    svg_text(f, x + 6, y - 6, 10, svg_colour(0), NULL, text);
  }
  /* the peak, as the vector it is */
  for (k = 0; k < c->rows; k++)
    if (input_at(cm, c, k) == p->at * xf)
      break;
  if (k < c->rows) {
    double x, y;
    force_at(cm, c, j, k, xy);
    x = POLAR_CX + xy[0] * u.per_model * scale;
    y = POLAR_CY - xy[1] * u.per_model * scale;
    fprintf(f, "<line x1=\"%g\" y1=\"%g\" x2=\"%.2f\" y2=\"%.2f\" stroke=\"%s\" "
               "stroke-width=\"2\"/>\n<circle cx=\"%.2f\" cy=\"%.2f\" r=\"4.5\" "
               "fill=\"%s\"/>\n",
            POLAR_CX, POLAR_CY, x, y, CHART_ALARM, x, y, CHART_ALARM);
  }
  snprintf(text, sizeof text, "peak %.4g %s at %s %.6g %s; RMS %.4g %s",
           p->peak * u.per_model, u.force, cli_input_name(cm, c->r.input),
           p->at * xf, cli_input_unit(cm, c->r.input), p->rms * u.per_model,
           u.force);
  svg_text(f, 24, POLAR_HEIGHT - 40, 12, CHART_ALARM, NULL, text);
  snprintf(text, sizeof text,
           "the curve is the tip of the force vector over the cycle; dots "
           "at the quarters, labelled in %s",
           cli_input_unit(cm, c->r.input));
  svg_text(f, 24, POLAR_HEIGHT - 20, 11, SVG_MUTED, NULL, text);
  svg_end(f);
  return cli_close_output(f, path);
}

int cli_force_charts(const cli_model *cm, const cli_cycle *c, const char *dir,
                     int *files) {
  char path[4400], word[48];
  int k, st = cli_make_dir(dir);
  *files = 0;
  for (k = 0; k < cm->ninputs && st == CLI_EXIT_OK; k++) {
    cli_file_word(cli_input_name(cm, k), word, sizeof word);
    snprintf(path, sizeof path, "%s/effort-%d-%s.svg", dir, k, word);
    if ((st = write_effort(cm, c, k, path)) == CLI_EXIT_OK)
      ++*files;
  }
  for (k = 0; k < cm->njoints && st == CLI_EXIT_OK; k++) {
    cli_file_word(cm->joint_names[k], word, sizeof word);
    snprintf(path, sizeof path, "%s/load-%d-%s.svg", dir, k, word);
    if ((st = write_polar(cm, c, k, path)) == CLI_EXIT_OK)
      ++*files;
  }
  if (st == CLI_EXIT_OK) {
    snprintf(path, sizeof path, "%s/load-frame.svg", dir);
    if ((st = write_polar(cm, c, -1, path)) == CLI_EXIT_OK)
      ++*files;
  }
  return st;
}
