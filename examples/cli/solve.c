/*
 * solve.c - the solve command: one position reached from the model's
 * start, with its rates, accelerations and transmission angles.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

static int name_width(char **names, int from, int to, int least) {
  int i, w = least;
  for (i = from; i < to; i++)
    if ((int)strlen(names[i]) > w)
      w = (int)strlen(names[i]);
  return w;
}

static void print_solution(FILE *f, const cli_model *cm, const kl_solver *s,
                           const double *u, const double *rates,
                           const double *accels) {
  double k = cm->angle_factor;
  const char *a = cm->angle_unit, *len = cm->length_unit;
  char h1[64], h2[64], h3[64];
  kl_solve_stats stats;
  kl_options opts;
  int i, w;
  fprintf(f, "model %s\n", cm->label);
  for (i = 0; i < cm->ninputs; i++) {
    double fi = cli_input_factor(cm, i);
    const char *ui = cli_input_unit(cm, i);
    fprintf(f, "input %s at %.6g %s, rate %.6g %s/s, acceleration %.6g %s/s^2\n",
            cli_input_name(cm, i), u[i] * fi, ui, rates[i] * fi, ui,
            accels[i] * fi, ui);
  }
  w = name_width(cm->link_names, 1, cm->nlinks, 12);
  snprintf(h1, sizeof h1, "angle (%s)", a);
  snprintf(h2, sizeof h2, "rate (%s/s)", a);
  snprintf(h3, sizeof h3, "accel (%s/s^2)", a);
  fprintf(f, "\n%-*s %16s %16s %16s\n", w, "link", h1, h2, h3);
  for (i = 1; i < cm->nlinks; i++)
    fprintf(f, "%-*s %16.8g %16.8g %16.8g\n", w, cm->link_names[i],
            kl_link_angle(s, i) * k, kl_link_rate(s, i) * k,
            kl_link_accel(s, i) * k);
  if (cm->nslides > 0) {
    w = name_width(cm->joint_names, 0, cm->njoints, 12);
    snprintf(h1, sizeof h1, "slide (%s)", len);
    snprintf(h2, sizeof h2, "rate (%s/s)", len);
    snprintf(h3, sizeof h3, "accel (%s/s^2)", len);
    fprintf(f, "\n%-*s %16s %16s %16s\n", w, "slide", h1, h2, h3);
    for (i = 0; i < cm->nslides; i++) {
      int j = cm->slides[i];
      fprintf(f, "%-*s %16.8g %16.8g %16.8g\n", w, cm->joint_names[j],
              kl_joint_slide(s, j), kl_joint_slide_rate(s, j),
              kl_joint_slide_accel(s, j));
    }
  }
  if (cm->npoints > 0) {
    w = name_width(cm->point_names, 0, cm->npoints, 12);
    fprintf(f, "\n%-*s %14s %14s %14s %14s %14s %14s\n", w, "point", "x",
            "y", "x rate", "y rate", "x accel", "y accel");
    snprintf(h2, sizeof h2, "%s/s", len);
    snprintf(h3, sizeof h3, "%s/s^2", len);
    fprintf(f, "%-*s %14s %14s %14s %14s %14s %14s\n", w, "", len, len, h2,
            h2, h3, h3);
    for (i = 0; i < cm->npoints; i++) {
      double p[2], v[2], acc[2];
      kl_point_position(s, i, p);
      kl_point_velocity(s, i, v);
      kl_point_acceleration(s, i, acc);
      fprintf(f, "%-*s %14.8g %14.8g %14.8g %14.8g %14.8g %14.8g\n", w,
              cm->point_names[i], p[0], p[1], v[0], v[1], acc[0], acc[1]);
    }
  }
  if (cm->nsites > 0) {
    w = name_width(cm->joint_names, 0, cm->njoints, 12);
    snprintf(h1, sizeof h1, "angle (%s)", a);
    fprintf(f, "\n%-*s %16s   lines to\n", w, "transmission", h1);
    for (i = 0; i < cm->nsites; i++) {
      const kl_output *site = &cm->sites[i];
      double mu = NAN, deg;
      kl_output_value(s, site, &mu);
      deg = mu * 180 / CLI_PI;
      fprintf(f, "%-*s %16.8g   %s, %s%s\n", w, cm->joint_names[site->id],
              mu * k, cm->joint_names[site->line_a],
              cm->joint_names[site->line_b],
              deg < CLI_USUAL_LOW_DEG || deg > CLI_USUAL_HIGH_DEG
                  ? "  (outside the usual 40-140 deg)"
                  : "");
    }
  }
  stats.size = sizeof stats;
  kl_solver_stats(s, &stats);
  kl_options_default(&opts);
  kl_solver_options(s, &opts);
  fprintf(f, "\ncondition estimate (rcond) %.4g; positions below %.3g count as "
             "singular\n",
          stats.rcond, opts.singular_rcond);
}

static int fill_inputs(const cli_model *cm, const char *list, const char *what,
                       double fallback_in_model_units, double *u) {
  int i;
  if (list != NULL)
    return cli_parse_inputs(cm, list, what, u);
  for (i = 0; i < cm->ninputs; i++)
    u[i] = fallback_in_model_units / cli_input_factor(cm, i);
  return 0;
}

int cli_cmd_solve(const cli_model *cm, const cli_options *o) {
  size_t n = (size_t)(cm->ninputs > 0 ? cm->ninputs : 1);
  double *u = malloc(n * sizeof *u), *rates = malloc(n * sizeof *rates),
         *accels = malloc(n * sizeof *accels);
  kl_solver *s = kl_solver_new(cm->model);
  char why[2048];
  FILE *f;
  int st;
  if (u == NULL || rates == NULL || accels == NULL || s == NULL) {
    cli_error("out of memory");
    st = CLI_EXIT_MEMORY;
    goto done;
  }
  if (cli_start_or_at(cm, o, u) != 0) {
    st = CLI_EXIT_USAGE;
    goto done;
  }
  if (fill_inputs(cm, o->rate, "--rate", 1.0, rates) != 0 ||
      fill_inputs(cm, o->accel, "--accel", 0.0, accels) != 0) {
    st = CLI_EXIT_USAGE;
    goto done;
  }
  st = cli_reach(s, cm, u, why, sizeof why);
  if (st == KL_OK && ((st = kl_solve_velocity(s, cm->ninputs ? rates : NULL)) !=
                          KL_OK ||
                      (st = kl_solve_acceleration(
                           s, cm->ninputs ? accels : NULL)) != KL_OK))
    snprintf(why, sizeof why, "%s", kl_solver_error(s));
  if (st != KL_OK) {
    cli_error("%s", why);
    st = CLI_EXIT_SOLVE;
    goto done;
  }
  if ((f = cli_open_output(o->output)) == NULL) {
    st = CLI_EXIT_OUTPUT;
    goto done;
  }
  print_solution(f, cm, s, u, rates, accels);
  st = cli_close_output(f, o->output);
done:
  kl_solver_free(s);
  free(u);
  free(rates);
  free(accels);
  return st;
}
