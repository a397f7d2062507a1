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

/* How numbers are printed: their digits, and the resolution below which
 * a value is 0 (the solver's tolerance times the model's scale for
 * lengths, the tolerance for angles in rad; times the largest input rate
 * for rates, and its square or the largest input acceleration for
 * accelerations), in library units. */
typedef struct {
  int digits;
  double length[3], angle[3];
} number_style;

static void style_of(const cli_model *cm, const kl_solver *s,
                     const double *rates, const double *accels, int all_digits,
                     number_style *ns) {
  kl_options opts;
  double w = 1.0, acc = 1.0, scale = kl_model_scale(cm->model);
  int i;
  kl_options_default(&opts);
  kl_solver_options(s, &opts);
  for (i = 0; i < cm->ninputs; i++) {
    w = fmax(w, fabs(rates[i]));
    acc = fmax(acc, fabs(accels[i]));
  }
  acc = fmax(acc, w * w);
  ns->digits = all_digits ? 17 : 8;
  ns->angle[0] = opts.tolerance;
  ns->angle[1] = opts.tolerance * w;
  ns->angle[2] = opts.tolerance * acc;
  for (i = 0; i < 3; i++)
    ns->length[i] = ns->angle[i] * (scale > 0 ? scale : 1.0);
}

/* A value in a column `width` wide: `raw` in library units, shown times
 * `factor`, 0 below `resolution`. */
static void put_value(FILE *f, const number_style *ns, int width, double raw,
                      double factor, double resolution) {
  fprintf(f, " %*.*g", ns->digits > 8 ? width + 9 : width, ns->digits,
          cli_shown(raw, factor, resolution));
}

static void print_solution(FILE *f, const cli_model *cm, const kl_solver *s,
                           const double *u, const double *rates,
                           const double *accels, const number_style *ns) {
  double k = cm->angle_factor;
  const char *a = cm->angle_unit, *len = cm->length_unit;
  char h1[64], h2[64], h3[64];
  kl_solve_stats stats;
  kl_options opts;
  int i, w, wide = ns->digits > 8 ? 9 : 0;
  fprintf(f, "model %s\n", cm->label);
  for (i = 0; i < cm->ninputs; i++) {
    double fi = cli_input_factor(cm, i);
    const char *ui = cli_input_unit(cm, i);
    fprintf(f, "input %s at %.*g %s, rate %.*g %s/s, acceleration %.*g "
               "%s/s^2\n",
            cli_input_name(cm, i), ns->digits, u[i] * fi, ui, ns->digits,
            rates[i] * fi, ui, ns->digits, accels[i] * fi, ui);
  }
  w = name_width(cm->link_names, 1, cm->nlinks, 12);
  snprintf(h1, sizeof h1, "angle (%s)", a);
  snprintf(h2, sizeof h2, "rate (%s/s)", a);
  snprintf(h3, sizeof h3, "accel (%s/s^2)", a);
  fprintf(f, "\n%-*s %*s %*s %*s\n", w, "link", 16 + wide, h1, 16 + wide, h2,
          16 + wide, h3);
  for (i = 1; i < cm->nlinks; i++) {
    fprintf(f, "%-*s", w, cm->link_names[i]);
    put_value(f, ns, 16, kl_link_angle(s, i), k, ns->angle[0]);
    put_value(f, ns, 16, kl_link_rate(s, i), k, ns->angle[1]);
    put_value(f, ns, 16, kl_link_accel(s, i), k, ns->angle[2]);
    fputc('\n', f);
  }
  if (cm->nslides > 0) {
    w = name_width(cm->joint_names, 0, cm->njoints, 12);
    snprintf(h1, sizeof h1, "slide (%s)", len);
    snprintf(h2, sizeof h2, "rate (%s/s)", len);
    snprintf(h3, sizeof h3, "accel (%s/s^2)", len);
    fprintf(f, "\n%-*s %*s %*s %*s\n", w, "slide", 16 + wide, h1,
            16 + wide, h2, 16 + wide, h3);
    for (i = 0; i < cm->nslides; i++) {
      int j = cm->slides[i];
      fprintf(f, "%-*s", w, cm->joint_names[j]);
      put_value(f, ns, 16, kl_joint_slide(s, j), 1.0, ns->length[0]);
      put_value(f, ns, 16, kl_joint_slide_rate(s, j), 1.0, ns->length[1]);
      put_value(f, ns, 16, kl_joint_slide_accel(s, j), 1.0, ns->length[2]);
      fputc('\n', f);
    }
  }
  if (cm->npoints > 0) {
    w = name_width(cm->point_names, 0, cm->npoints, 12);
    int c = 14 + wide;
    fprintf(f, "\n%-*s %*s %*s %*s %*s %*s %*s\n", w, "point", c, "x", c,
            "y", c, "x rate", c, "y rate", c, "x accel", c, "y accel");
    snprintf(h2, sizeof h2, "%s/s", len);
    snprintf(h3, sizeof h3, "%s/s^2", len);
    fprintf(f, "%-*s %*s %*s %*s %*s %*s %*s\n", w, "", c, len, c, len, c,
            h2, c, h2, c, h3, c, h3);
    for (i = 0; i < cm->npoints; i++) {
      double p[2], v[2], acc[2];
      int axis;
      kl_point_position(s, i, p);
      kl_point_velocity(s, i, v);
      kl_point_acceleration(s, i, acc);
      fprintf(f, "%-*s", w, cm->point_names[i]);
      for (axis = 0; axis < 2; axis++)
        put_value(f, ns, 14, p[axis], 1.0, ns->length[0]);
      for (axis = 0; axis < 2; axis++)
        put_value(f, ns, 14, v[axis], 1.0, ns->length[1]);
      for (axis = 0; axis < 2; axis++)
        put_value(f, ns, 14, acc[axis], 1.0, ns->length[2]);
      fputc('\n', f);
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
      fprintf(f, "%-*s", w, cm->joint_names[site->id]);
      put_value(f, ns, 16, mu, k, ns->angle[0]);
      fprintf(f, "   %s, %s%s\n", cm->joint_names[site->line_a],
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
  number_style ns;
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
  style_of(cm, s, rates, accels, o->all_digits, &ns);
  print_solution(f, cm, s, u, rates, accels, &ns);
  st = cli_close_output(f, o->output);
done:
  kl_solver_free(s);
  free(u);
  free(rates);
  free(accels);
  return st;
}
