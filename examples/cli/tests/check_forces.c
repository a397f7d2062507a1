/*
 * check_forces.c - checks the force columns `kinloop forces --csv` (or
 * `kinloop sweep --forces`) writes: each named with its unit, one row per
 * step, every number the library's own force stage at that step (the model's
 * speed, masses, gravity and loads; position by the library's continuation,
 * velocity at the speed, no acceleration of the input), shown in N and N
 * times the length unit; and the input work the integral of the effort over
 * the input by the trapezoid rule (the energy balance in the table's own
 * numbers, within the rule's error).
 *
 * usage: check_forces MODEL CSV STEPS
 *   STEPS   steps of the cycle: the rows are STEPS + 1 over the model's
 *           sweep range (which must sweep the speed line's input)
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "check_support.h"

#define MAX_COLS 2048

static int find(char **header, int n, const char *name, const char *unit) {
  char want[700];
  int i;
  snprintf(want, sizeof want, "%s (%s)", name, unit);
  for (i = 0; i < n; i++)
    if (strcmp(header[i], want) == 0)
      return i;
  check_fail("no column '%s'", want);
  return -1;
}

/* value (shown) against want (model units) times the unit factor, to the
 * six digits the CSV keeps, relative to the row's scale */
static void same(const char *what, int row, double shown, double want,
                 double factor, double scale) {
  double w = want * factor;
  if (!(fabs(shown - w) <= 1e-5 * fmax(fabs(w), scale * factor) + 1e-12))
    check_fail("row %d, %s: the CSV has %.9g, the library gives %.9g", row,
               what, shown, w);
}

int main(int argc, char **argv) {
  kl_model *m;
  kl_solver *s;
  kl_sweep_settings sw;
  kl_load *loads;
  char *text, *line, *next, *header[MAX_COLS], name[400], full[500];
  char force_unit[32], torque_unit[32];
  double per, speed, *data;
  int steps, nfields, nrows = 0, cols, lu, au, input, nloads, ni, nj, k, i;
  int *effort_col, *joint_col, frame_col, work_col;
  if (argc != 4) {
    fprintf(stderr, "usage: check_forces MODEL CSV STEPS\n");
    return 2;
  }
  m = check_model(argv[1]);
  text = check_read_file(argv[2], NULL);
  steps = atoi(argv[3]);
  sw.size = sizeof sw;
  if (kl_model_sweep(m, &sw) != KL_OK ||
      kl_model_speed(m, &input, &speed, NULL) != KL_OK || input != sw.input) {
    fprintf(stderr, "the model needs a sweep and a speed line of one input\n");
    return 2;
  }
  kl_model_units(m, &lu, &au);
  /* docs/cli.md: masses in kg, seconds; kg mm / s^2 = 1e-3 N */
  per = lu == KL_LENGTH_MM ? 1e-3 : lu == KL_LENGTH_IN ? 0.0254 : 1.0;
  snprintf(force_unit, sizeof force_unit, "%s",
           lu == KL_LENGTH_UNSTATED ? "kg len/s^2" : "N");
  if (lu == KL_LENGTH_UNSTATED)
    snprintf(torque_unit, sizeof torque_unit, "kg len^2/s^2");
  else
    snprintf(torque_unit, sizeof torque_unit, "N %s", kl_length_unit_str(lu));
  ni = kl_model_input_count(m);
  nj = kl_model_joint_count(m);
  nloads = kl_model_load_count(m);
  loads = malloc((size_t)(nloads + 1) * sizeof *loads);
  effort_col = malloc((size_t)(ni + 1) * sizeof *effort_col);
  joint_col = malloc((size_t)(nj + 1) * sizeof *joint_col);
  for (k = 0; k < nloads; k++)
    kl_model_load(m, k, &loads[k]);

  /* the header */
  next = strchr(text, '\n');
  if (next == NULL) {
    check_fail("no header line");
    return 1;
  }
  *next = '\0';
  nfields = check_split_csv(text, header, MAX_COLS);
  cols = nfields;
  for (i = 0; i < ni; i++) {
    int joint = kl_model_input_joint(m, i);
    check_joint_label(m, joint, name, sizeof name);
    snprintf(full, sizeof full, "%s effort", name);
    effort_col[i] = find(header, nfields, full,
                         kl_model_joint_kind(m, joint) == KL_JOINT_REVOLUTE
                             ? torque_unit
                             : force_unit);
  }
  for (i = 0; i < nj; i++) {
    check_joint_label(m, i, name, sizeof name);
    snprintf(full, sizeof full, "%s force x", name);
    joint_col[i] = find(header, nfields, full, force_unit);
    snprintf(full, sizeof full, "%s force y", name);
    if (find(header, nfields, full, force_unit) != joint_col[i] + 1)
      check_fail("%s: force y does not follow force x", name);
    snprintf(full, sizeof full, "%s force", name);
    if (find(header, nfields, full, force_unit) != joint_col[i] + 2)
      check_fail("%s: the force's size does not follow its y", name);
  }
  frame_col = find(header, nfields, "frame force x", force_unit);
  if (find(header, nfields, "frame moment", torque_unit) != frame_col + 3)
    check_fail("the frame's moment is not after its force x, y and size");
  work_col = find(header, nfields, "input work", torque_unit);
  if (check_failures())
    return 1;

  /* the rows */
  data = malloc((size_t)(steps + 1) * (size_t)cols * sizeof *data);
  for (line = next + 1; *line != '\0'; line = next + 1) {
    char *fields[MAX_COLS];
    int n;
    next = strchr(line, '\n');
    if (next == NULL) {
      check_fail("row %d does not end with a line break", nrows + 2);
      break;
    }
    *next = '\0';
    n = check_split_csv(line, fields, MAX_COLS);
    if (n != cols)
      check_fail("row %d has %d fields, expected %d", nrows + 2, n, cols);
    for (k = 0; nrows <= steps && k < cols && k < n; k++)
      data[(size_t)nrows * (size_t)cols + (size_t)k] = strtod(fields[k], NULL);
    nrows++;
  }
  if (nrows != steps + 1) {
    check_fail("%d rows after the header, expected %d", nrows, steps + 1);
    return 1;
  }

  /* every row against the library's force stage there */
  s = kl_solver_new(m);
  for (k = 0; k <= steps; k++) {
    const double *row = data + (size_t)k * (size_t)cols;
    double u[8] = {0}, rate[8] = {0}, accel[8] = {0}, efforts[8], fxy[2],
           frame[3], scale = 0.0, step;
    kl_model_start_inputs(m, u);
    u[input] = sw.from + (sw.to - sw.from) * k / steps;
    rate[input] = speed;
    if (check_reach(s, m, u) != KL_OK ||
        kl_solve_velocity(s, rate) != KL_OK ||
        kl_solve_acceleration(s, accel) != KL_OK ||
        kl_solve_forces(s, nloads, loads, efforts) != KL_OK) {
      check_fail("row %d: the library solves nothing there: %s", k + 2,
                 kl_solver_error(s));
      continue;
    }
    for (i = 0; i < nj; i++) {
      kl_joint_force(s, i, fxy);
      scale = fmax(scale, hypot(fxy[0], fxy[1]));
    }
    for (i = 0; i < ni; i++)
      same("effort", k + 2, row[effort_col[i]], efforts[i], per,
           fabs(efforts[i]));
    for (i = 0; i < nj; i++) {
      kl_joint_force(s, i, fxy);
      check_joint_label(m, i, name, sizeof name);
      same(name, k + 2, row[joint_col[i]], fxy[0], per, scale);
      same(name, k + 2, row[joint_col[i] + 1], fxy[1], per, scale);
      same(name, k + 2, row[joint_col[i] + 2], hypot(fxy[0], fxy[1]), per,
           scale);
    }
    kl_ground_force(s, frame);
    same("frame force x", k + 2, row[frame_col], frame[0], per, scale);
    same("frame force y", k + 2, row[frame_col + 1], frame[1], per, scale);
    /* the work against the trapezoid rule over the input: its error over
     * a span L is at most L h^2 / 12 max|f''| (the rule's error bound),
     * f'' taken from the column's own second differences (times 2 for
     * their own error), plus the CSV's six digits */
    if (k > 0) {
      double integral = 0.0, bend = 0.0, span;
      int j;
      step = (sw.to - sw.from) / steps;
      span = fabs(step) * k;
      for (j = 1; j <= k; j++)
        integral += 0.5 * step * (data[(size_t)j * (size_t)cols + effort_col[input]] +
                                  data[(size_t)(j - 1) * (size_t)cols + effort_col[input]]);
      for (j = 1; j < steps; j++)
        bend = fmax(bend, fabs(data[(size_t)(j + 1) * (size_t)cols + effort_col[input]] -
                               2 * data[(size_t)j * (size_t)cols + effort_col[input]] +
                               data[(size_t)(j - 1) * (size_t)cols + effort_col[input]]));
      if (!(fabs(row[work_col] - integral) <=
            2.0 * span * bend / 12.0 + 1e-5 * (fabs(integral) + 1.0)))
        check_fail("row %d: input work %.9g, the effort's integral %.9g",
                   k + 2, row[work_col], integral);
    }
  }
  kl_solver_free(s);
  free(data);
  free(loads);
  free(effort_col);
  free(joint_col);
  free(text);
  kl_model_free(m);
  if (check_failures() == 0)
    printf("check_forces: %d rows agree with the library\n", nrows);
  return check_failures() ? 1 : 0;
}
