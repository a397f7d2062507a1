/*
 * forces.c - the forces command and what other commands take of it: the
 * force figures over the working cycle, their units, report and CSV columns.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

#define LABEL "  %-20s"

const char cli_forces_help[] =
    "usage: kinloop forces MODEL [OPTIONS]\n"
    "\n"
    "The force stage over the working cycle (docs/cli.md): the driven input\n"
    "at a constant speed over its range, the model's masses, gravity and\n"
    "loads, every other input at rest. Reports what sizes the motor (each\n"
    "input's peak, RMS and mean effort), the bearings (each joint's peak load,\n"
    "where, its RMS and mean), the frame's shaking force and moment, and the\n"
    "energy fluctuation with the flywheel inertia it calls for. Forces are in N\n"
    "and torques in N times the length unit (masses in kg, times in seconds).\n"
    "\n"
    "options:\n"
    "%s"
    "  --at LIST         values of every input at the start, comma-separated\n"
    "                    (the driven input's own entry is replaced by --from)\n"
    "  --speed W         the driven input's speed, its unit per second\n"
    "                    (default: the model's speed line)\n"
    "  --rpm N           the same for a turning input, in turns a minute\n"
    "  --fluctuation CS  the coefficient of speed fluctuation the flywheel is\n"
    "                    sized for (default: the model's speed line's)\n"
    "  --csv FILE        write the forces at every step as CSV\n"
    "  --charts DIR      write SVG charts into DIR (made if missing): each\n"
    "                    input's effort over the cycle, each joint's load and\n"
    "                    the frame's as a polar plot of the force vector\n"
    "  --all-digits      write every CSV number with 17 significant digits\n"
    "  -o, --output FILE write the report to FILE instead of standard output\n"
    "\n"
    "Without range options the cycle is the model's: its speed line's input,\n"
    "over the sweep line's range when that sweeps the same input, else one\n"
    "turn in 360 steps. Peaks are sampled: take enough steps. Where the forces\n"
    "are not determined (a declared redundancy, a singular position on the\n"
    "way) kinloop says so, prints no figures and exits with 4.\n";

/* ---- units ---- */

void cli_force_units_of(const cli_model *cm, cli_force_units *u) {
  const char *len = cm->length_unit;
  /* metres per length unit (0: unstated); kg len / s^2 is that many N */
  u->metres = strcmp(len, "mm") == 0   ? 1e-3
              : strcmp(len, "in") == 0 ? 0.0254
              : strcmp(len, "m") == 0  ? 1.0
                                       : 0.0;
  u->per_model = u->metres > 0.0 ? u->metres : 1.0;
  if (strcmp(len, "len") == 0) {
    snprintf(u->force, sizeof u->force, "kg len/s^2");
    snprintf(u->torque, sizeof u->torque, "kg len^2/s^2");
  } else {
    snprintf(u->force, sizeof u->force, "N");
    snprintf(u->torque, sizeof u->torque, "N %s", len);
  }
  snprintf(u->inertia, sizeof u->inertia, "kg %s^2", len);
}

/* The unit of input i's effort: a torque, or a force along a slide. */
static const char *effort_unit(const cli_model *cm, const cli_force_units *u,
                               int input) {
  return cli_input_is_angle(cm, input) ? u->torque : u->force;
}

/* Whether a joint can carry a moment: a prismatic joint, or an input that
 * turns (its actuator's torque). */
static int carries_moment(const cli_model *cm, int joint) {
  int kind = kl_model_joint_kind(cm->model, joint), i;
  if (kind == KL_JOINT_PRISMATIC)
    return 1;
  for (i = 0; kind == KL_JOINT_REVOLUTE && i < cm->ninputs; i++)
    if (kl_model_input_joint(cm->model, i) == joint)
      return 1;
  return 0;
}

/* ---- the cycle ---- */

static int any_range_option(const cli_options *o) {
  return o->input != NULL || o->have_from || o->have_to || o->have_steps;
}

int cli_cycle_setup(const cli_model *cm, const cli_options *o,
                    const cli_range *range, cli_cycle *c) {
  kl_cycle mc;
  int have_model_cycle, k;
  memset(c, 0, sizeof *c);
  kl_cycle_default(&mc);
  have_model_cycle = kl_model_cycle(cm->model, &mc) == KL_OK;
  if (range != NULL) {
    c->r = *range;
  } else if (!any_range_option(o) && have_model_cycle) {
    c->r.input = mc.input;
    c->r.from = mc.from;
    c->r.to = mc.to;
    c->r.steps = mc.steps;
    if (!cli_input_is_angle(cm, mc.input)) {
      kl_sweep_settings sw;
      sw.size = sizeof sw;
      if (kl_model_sweep(cm->model, &sw) != KL_OK || sw.input != mc.input) {
        cli_error("the working cycle: input %s slides and the model has no "
                  "sweep line for it; give --from and --to",
                  cli_input_name(cm, mc.input));
        return CLI_EXIT_USAGE;
      }
    }
  } else {
    cli_options chosen = *o;
    char index[16];
    int st;
    if (o->input == NULL && have_model_cycle) {
      /* the speed line's input, unless the options name another */
      snprintf(index, sizeof index, "%d", mc.input + 1); /* numbered from 1 */
      chosen.input = index;
    }
    if ((st = cli_require_range(cm, &chosen, &c->r,
                                "no cycle to take the forces over")) !=
        CLI_EXIT_OK)
      return st;
  }
  if (o->have_speed) {
    c->speed = o->speed / cli_input_factor(cm, c->r.input);
  } else if (have_model_cycle && mc.input == c->r.input) {
    c->speed = mc.speed;
  } else {
    cli_error("no working speed for input %s: give --speed W (its unit per "
              "second), or add 'speed %s W' to the model",
              cli_input_name(cm, c->r.input), cli_input_name(cm, c->r.input));
    return CLI_EXIT_USAGE;
  }
  c->fluctuation = o->have_fluctuation ? o->fluctuation
                   : have_model_cycle  ? mc.speed_fluctuation
                                       : 0.0;
  c->nloads = kl_model_load_count(cm->model);
  c->loads = malloc((size_t)(c->nloads > 0 ? c->nloads : 1) * sizeof *c->loads);
  if (c->loads == NULL) {
    cli_error("out of memory");
    return CLI_EXIT_MEMORY;
  }
  for (k = 0; k < c->nloads; k++)
    kl_model_load(cm->model, k, &c->loads[k]);
  return CLI_EXIT_OK;
}

void cli_cycle_free(cli_cycle *c) {
  free(c->loads);
  free(c->inputs);
  free(c->joints);
  free(c->table);
  memset(c, 0, sizeof *c);
}

/* Why the forces were not computed, for the user; the exit code. */
static int cycle_failed(const cli_model *cm, const kl_solver *s, int status) {
  if (status == KL_EINDETERMINATE)
    cli_error("the forces are not determined: %s; the joint forces of a "
              "structure with redundant constraints depend on its "
              "elasticity, so kinloop prints none",
              kl_solver_error(s));
  else if (status == KL_ESINGULAR)
    cli_error("the forces are not determined: %s; at a singular position "
              "(a dead point or change point) equilibrium does not fix them, "
              "so kinloop prints none; keep the range short of it",
              kl_solver_error(s));
  else if (status == KL_ENOMEM)
    cli_error("out of memory");
  else
    cli_error("the force cycle of %s failed: %s", cm->label,
              kl_solver_error(s));
  return status == KL_ENOMEM ? CLI_EXIT_MEMORY : CLI_EXIT_SOLVE;
}

int cli_cycle_compute(const cli_model *cm, const cli_options *o, int table,
                      cli_cycle *c) {
  kl_solver *s = kl_solver_new(cm->model), *start = kl_solver_new(cm->model);
  kl_cycle cycle;
  int st;
  c->inputs = malloc((size_t)(cm->ninputs > 0 ? cm->ninputs : 1) *
                     sizeof *c->inputs);
  c->joints = malloc((size_t)(cm->njoints > 0 ? cm->njoints : 1) *
                     sizeof *c->joints);
  c->width = kl_cycle_columns(cm->model);
  if (table)
    c->table = malloc(((size_t)c->r.steps + 1) * (size_t)c->width *
                      sizeof *c->table);
  if (s == NULL || start == NULL || c->inputs == NULL || c->joints == NULL ||
      (table && c->table == NULL)) {
    cli_error("out of memory");
    st = CLI_EXIT_MEMORY;
    goto done;
  }
  if ((st = cli_reach_start(start, cm, o, &c->r)) != CLI_EXIT_OK)
    goto done;
  kl_cycle_default(&cycle);
  cycle.input = c->r.input;
  cycle.from = c->r.from;
  cycle.to = c->r.to;
  cycle.steps = c->r.steps;
  cycle.speed = c->speed;
  cycle.speed_fluctuation = c->fluctuation;
  c->sum.size = sizeof c->sum;
  kl_solver_copy_state(s, start);
  st = kl_cycle_summarize(s, &cycle, c->nloads, c->loads, &c->sum, c->inputs,
                          c->joints);
  if ((st == KL_OK || st == KL_LIMIT) && table) {
    kl_solver_copy_state(s, start);
    st = kl_cycle_table(s, &cycle, c->nloads, c->loads, c->table,
                        ((size_t)c->r.steps + 1) * (size_t)c->width, &c->rows);
  }
  if (st != KL_OK && st != KL_LIMIT) {
    st = cycle_failed(cm, s, st);
    goto done;
  }
  c->status = c->sum.sweep_status;
  st = CLI_EXIT_OK;
done:
  kl_solver_free(s);
  kl_solver_free(start);
  return st;
}

/* ---- the report ---- */

double cli_peak_mean(const kl_cycle_peak *p) {
  return fabs(p->mean) <= 1e-9 * fabs(p->peak) ? 0.0 : p->mean;
}

/* "motor 123.4 deg" */
static void at_text(const cli_model *cm, int input, double u, char *buf,
                    size_t cap) {
  cli_format_input(cm, input, u, buf, cap);
}

static void put_peak(FILE *f, const cli_model *cm, const cli_cycle *c,
                     const char *name, const kl_cycle_peak *p,
                     double factor, const char *unit, int with_mean) {
  char at[320];
  at_text(cm, c->r.input, p->at, at, sizeof at);
  fprintf(f, LABEL "peak %.4g %s at %s; RMS %.4g %s", name, p->peak * factor,
          unit, at, p->rms * factor, unit);
  if (with_mean)
    fprintf(f, "; mean %.4g %s", cli_peak_mean(p) * factor, unit);
  fputc('\n', f);
}

/* A joint and its peak load, to list the joints by it. */
typedef struct {
  int joint;
  double peak;
} ranked;

static int largest_first(const void *a, const void *b) {
  const ranked *x = a, *y = b;
  return x->peak < y->peak ? 1 : x->peak > y->peak ? -1 : x->joint - y->joint;
}

void cli_cycle_report(FILE *f, const cli_model *cm, const cli_cycle *c,
                      int brief) {
  cli_force_units u;
  double xf = cli_input_factor(cm, c->r.input);
  const char *in_unit = cli_input_unit(cm, c->r.input);
  ranked *order;
  int i, n;
  cli_force_units_of(cm, &u);
  fprintf(f, LABEL "%s %.6g to %.6g %s in %d steps at %.6g %s/s", "cycle",
          cli_input_name(cm, c->r.input), c->r.from * xf, c->r.to * xf,
          in_unit, c->r.steps, c->speed * xf, in_unit);
  if (cli_input_is_angle(cm, c->r.input))
    fprintf(f, " (%.4g rpm)", c->speed * 60.0 / (2.0 * CLI_PI));
  fprintf(f, "%s\n", cm->ninputs > 1 ? ", the other inputs at rest" : "");
  if (c->status == KL_LIMIT) {
    char at[320];
    at_text(cm, c->r.input, c->sum.limit_input, at, sizeof at);
    fprintf(f, LABEL "the motion stops at %s: the figures cover the part "
                     "before it (%d steps)\n",
            "note", at, c->sum.steps_done - 1);
  }
  if (!brief) {
    double g[2];
    int massive = 0;
    for (i = 1; i < cm->nlinks; i++) {
      double mass;
      kl_model_link_mass(cm->model, i, &mass, NULL, NULL);
      massive += mass > 0.0;
    }
    kl_model_gravity(cm->model, g);
    fprintf(f, LABEL "%d of %d moving links; ", "masses", massive,
            cm->nlinks - 1);
    if (g[0] != 0.0 || g[1] != 0.0)
      fprintf(f, "gravity (%g, %g) %s/s^2\n", g[0], g[1], cm->length_unit);
    else
      fprintf(f, "no gravity\n");
    fprintf(f, LABEL "%d", "loads", c->nloads);
    for (i = 0; i < c->nloads; i++) {
      const kl_load *l = &c->loads[i];
      if (l->kind == KL_LOAD_FORCE)
        fprintf(f, "%s(%.4g, %.4g) %s at %s", i ? "; " : ": ",
                l->fx * u.per_model, l->fy * u.per_model, u.force,
                cm->point_names[l->id]);
      else
        fprintf(f, "%s%.4g %s on %s", i ? "; " : ": ",
                l->torque * u.per_model, u.torque, cm->link_names[l->id]);
    }
    fputc('\n', f);
    fprintf(f, LABEL "masses in kg, lengths in %s, seconds: forces in %s, "
                     "torques and energies in %s%s\n",
            "units", cm->length_unit, u.force, u.torque,
            strcmp(cm->length_unit, "mm") == 0
                ? " (the model's own are mN and mN mm)"
                : "");
  }
  fprintf(f, "\ninput effort (what the motor must give)\n");
  for (i = 0; i < cm->ninputs; i++)
    put_peak(f, cm, c, cli_input_name(cm, i), &c->inputs[i], u.per_model,
             effort_unit(cm, &u, i), 1);
  n = cm->njoints;
  order = malloc((size_t)(n > 0 ? n : 1) * sizeof *order);
  if (order != NULL) {
    for (i = 0; i < n; i++) {
      order[i].joint = i;
      order[i].peak = c->joints[i].peak;
    }
    qsort(order, (size_t)n, sizeof *order, largest_first);
  }
  fprintf(f, "\njoint loads (what the bearings carry), the largest first\n");
  for (i = 0; i < n && (!brief || i < 3); i++) {
    int j = order != NULL ? order[i].joint : i;
    put_peak(f, cm, c, cm->joint_names[j], &c->joints[j], u.per_model, u.force,
             0);
  }
  if (brief && n > 3)
    fprintf(f, LABEL "(%d more: kinloop forces)\n", "", n - 3);
  free(order);
  fprintf(f, "\nframe (what the moving links shake it with)\n");
  put_peak(f, cm, c, "shaking force", &c->sum.shaking_force, u.per_model,
           u.force, 0);
  put_peak(f, cm, c, "shaking moment", &c->sum.shaking_moment, u.per_model,
           u.torque, 0);
  fprintf(f, "\nflywheel\n");
  {
    char lo[320], hi[320];
    at_text(cm, c->r.input, c->sum.energy_min_at, lo, sizeof lo);
    at_text(cm, c->r.input, c->sum.energy_max_at, hi, sizeof hi);
    fprintf(f, LABEL "%.4g %s, between %s and %s\n", "energy fluctuation",
            c->sum.energy_fluctuation * u.per_model, u.torque, lo, hi);
  }
  if (isnan(c->sum.flywheel_inertia))
    fprintf(f, LABEL "%s\n", "flywheel inertia",
            c->fluctuation > 0.0
                ? "none at zero speed"
                : "give a coefficient of speed fluctuation (--fluctuation, "
                  "or 'fluctuation' on the model's speed line)");
  else if (cli_input_is_angle(cm, c->r.input)) {
    char si[64] = "";
    if (u.metres != 1.0 && u.metres > 0.0) /* mm or in: kg m^2 too */
      snprintf(si, sizeof si, " (%.4g kg m^2)",
               c->sum.flywheel_inertia * u.metres * u.metres);
    fprintf(f, LABEL "%.4g %s%s at the %s shaft, for a coefficient of speed "
                     "fluctuation of %g (on a shaft geared n times faster, "
                     "divide by n^2)\n",
            "flywheel inertia", c->sum.flywheel_inertia, u.inertia, si,
            cli_input_name(cm, c->r.input), c->fluctuation);
  }
  else
    fprintf(f, LABEL "%.4g kg moving with the %s, for a coefficient of speed "
                     "fluctuation of %g\n",
            "flywheel mass", c->sum.flywheel_inertia,
            cli_input_name(cm, c->r.input), c->fluctuation);
  fprintf(f, "\nan ideal linkage (rigid links, joints without friction or "
             "clearance): a design aid;\nreal machines need margins and "
             "testing, and local codes and licensed engineering practice "
             "decide\n");
}

/* ---- CSV ---- */

void cli_cycle_csv_header(FILE *f, const cli_model *cm, const cli_cycle *c) {
  cli_force_units u;
  char name[400];
  int i;
  (void)c;
  cli_force_units_of(cm, &u);
  for (i = 0; i < cm->ninputs; i++) {
    snprintf(name, sizeof name, "%s effort (%s)", cli_input_name(cm, i),
             effort_unit(cm, &u, i));
    fputc(',', f);
    cli_csv_field(f, name);
  }
  for (i = 0; i < cm->njoints; i++) {
    static const char *const parts[] = {"force x", "force y", "force"};
    int k;
    for (k = 0; k < 3; k++) {
      snprintf(name, sizeof name, "%s %s (%s)", cm->joint_names[i], parts[k],
               u.force);
      fputc(',', f);
      cli_csv_field(f, name);
    }
    if (carries_moment(cm, i)) {
      snprintf(name, sizeof name, "%s moment (%s)", cm->joint_names[i],
               u.torque);
      fputc(',', f);
      cli_csv_field(f, name);
    }
  }
  fprintf(f, ",frame force x (%s),frame force y (%s),frame force (%s),"
             "frame moment (%s),kinetic energy (%s),input work (%s)",
          u.force, u.force, u.force, u.torque, u.torque, u.torque);
}

void cli_cycle_csv_row(FILE *f, const cli_model *cm, const cli_cycle *c,
                       int k, const char *format) {
  cli_force_units u;
  const double *row = c->table + (size_t)k * (size_t)c->width;
  const double *joint = row + 1 + cm->ninputs, *frame = joint + 3 * cm->njoints;
  double v[4];
  int i, n;
  cli_force_units_of(cm, &u);
  for (i = 0; i < cm->ninputs; i++) {
    fputc(',', f);
    fprintf(f, format, row[1 + i] * u.per_model);
  }
  for (i = 0; i < cm->njoints; i++) {
    const double *j = joint + 3 * i;
    v[0] = j[0];
    v[1] = j[1];
    v[2] = hypot(j[0], j[1]);
    v[3] = j[2];
    for (n = 0; n < (carries_moment(cm, i) ? 4 : 3); n++) {
      fputc(',', f);
      fprintf(f, format, v[n] * u.per_model);
    }
  }
  v[0] = frame[0];
  v[1] = frame[1];
  v[2] = hypot(frame[0], frame[1]);
  v[3] = frame[2];
  for (n = 0; n < 4; n++) {
    fputc(',', f);
    fprintf(f, format, v[n] * u.per_model);
  }
  for (n = 3; n < 5; n++) {
    fputc(',', f);
    fprintf(f, format, frame[n] * u.per_model);
  }
}

/* ---- what check says of the force data ---- */

void cli_forces_outline(FILE *f, const cli_model *cm) {
  kl_cycle c;
  double g[2];
  int massive = 0, i, loads = kl_model_load_count(cm->model);
  int redundant = kl_model_redundancy(cm->model), speed;
  for (i = 1; i < cm->nlinks; i++) {
    double mass;
    kl_model_link_mass(cm->model, i, &mass, NULL, NULL);
    massive += mass > 0.0;
  }
  kl_model_gravity(cm->model, g);
  kl_cycle_default(&c);
  speed = kl_model_cycle(cm->model, &c) == KL_OK;
  if (massive == 0 && loads == 0 && !speed && g[0] == 0.0 && g[1] == 0.0 &&
      redundant == 0)
    return;
  fprintf(f, "  %-14s%d link%s with mass, %s, %d load%s", "force data",
          massive, massive == 1 ? "" : "s",
          g[0] != 0.0 || g[1] != 0.0 ? "gravity" : "no gravity", loads,
          loads == 1 ? "" : "s");
  if (speed) {
    double xf = cli_input_factor(cm, c.input);
    fprintf(f, ", working speed %s %.6g %s/s", cli_input_name(cm, c.input),
            c.speed * xf, cli_input_unit(cm, c.input));
  }
  if (redundant > 0)
    fprintf(f, "; %d redundant constraint%s declared: the joint forces are "
               "not determined",
            redundant, redundant == 1 ? "" : "s");
  else
    fprintf(f, " (kinloop forces reports them)");
  fputc('\n', f);
}

/* ---- the command ---- */

int cli_cmd_forces(const cli_model *cm, const cli_options *o) {
  cli_cycle c;
  FILE *f;
  int st, closed, files = 0;
  if ((st = cli_cycle_setup(cm, o, NULL, &c)) != CLI_EXIT_OK)
    goto done;
  if ((st = cli_cycle_compute(cm, o, o->csv != NULL || o->charts != NULL,
                              &c)) != CLI_EXIT_OK)
    goto done;
  if (o->csv != NULL) {
    const char *format = cli_number_format(o, "%.6g");
    char name[400];
    int k;
    if ((f = cli_open_output(o->csv)) == NULL) {
      st = CLI_EXIT_OUTPUT;
      goto done;
    }
    snprintf(name, sizeof name, "%s (%s)", cli_input_name(cm, c.r.input),
             cli_input_unit(cm, c.r.input));
    cli_csv_field(f, name);
    cli_cycle_csv_header(f, cm, &c);
    fputc('\n', f);
    for (k = 0; k < c.rows; k++) {
      fprintf(f, format,
              c.table[(size_t)k * (size_t)c.width] *
                  cli_input_factor(cm, c.r.input));
      cli_cycle_csv_row(f, cm, &c, k, format);
      fputc('\n', f);
    }
    if ((st = cli_close_output(f, o->csv)) != CLI_EXIT_OK)
      goto done;
  }
  if (o->charts != NULL &&
      (st = cli_force_charts(cm, &c, o->charts, &files)) != CLI_EXIT_OK)
    goto done;
  if ((f = cli_open_output(o->output)) == NULL) {
    st = CLI_EXIT_OUTPUT;
    goto done;
  }
  fprintf(f, "forces of %s\n", cm->label);
  cli_cycle_report(f, cm, &c, 0);
  if (o->csv != NULL)
    fprintf(f, "\nforces at every step written to %s\n", o->csv);
  if (o->charts != NULL)
    fprintf(f, "%d chart%s written in %s/\n", files, files == 1 ? "" : "s",
            o->charts);
  closed = cli_close_output(f, o->output);
  st = closed;
done:
  cli_cycle_free(&c);
  return st;
}
