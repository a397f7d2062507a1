/*
 * demo.c - the built-in demo, what kinloop does with no arguments: a
 * summary of the flap-tucking station and its files in one folder.
 */
#include <math.h>
#include <string.h>

#include "cli.h"

#define DEFAULT_DIR "kinloop-demo"
#define MOTOR_DEG_PER_S 360.0 /* 60 rpm */
/* The loads on the station while it tucks (invented for the demo, in N):
 * the carton flap pushes back on the tucker tip, the rail drags the plate. */
#define FLAP_FORCE_DOWN 15.0
#define RAIL_DRAG 40.0
#define TORQUE_STEPS 360

static int find_or_fail(int id, const char *kind, const char *name) {
  if (id < 0)
    cli_error("the built-in demo has no %s '%s'", kind, name);
  return id;
}

/* The worst static motor torque over one turn, by virtual work at each
 * degree, reached by continuation so the assembly mode stays the same. */
static int worst_torque(const cli_model *cm, double *worst, double *at) {
  kl_model *m = cm->model;
  kl_solver *s = kl_solver_new(m);
  kl_load loads[2];
  kl_range r;
  cli_options none;
  cli_range turn;
  int tip = find_or_fail(kl_model_find_point(m, "tucker tip"), "point", "tucker tip");
  int nose = find_or_fail(kl_model_find_point(m, "plate nose"), "point", "plate nose");
  int st = CLI_EXIT_OK;
  if (s == NULL) {
    cli_error("out of memory");
    return CLI_EXIT_MEMORY;
  }
  if (tip < 0 || nose < 0) {
    kl_solver_free(s);
    return CLI_EXIT_MODEL;
  }
  memset(loads, 0, sizeof loads);
  loads[0].kind = KL_LOAD_FORCE;
  loads[0].id = tip;
  loads[0].fy = -FLAP_FORCE_DOWN;
  loads[1].kind = KL_LOAD_FORCE;
  loads[1].id = nose;
  loads[1].fx = -RAIL_DRAG;
  memset(&none, 0, sizeof none);
  turn.input = 0;
  turn.from = 0.0;
  turn.to = 2 * CLI_PI;
  turn.steps = TORQUE_STEPS;
  if ((st = cli_reach_start(s, cm, &none, &turn)) != CLI_EXIT_OK) {
    kl_solver_free(s);
    return st;
  }
  r.size = sizeof r;
  if (kl_input_effort_range(s, 0, turn.from, turn.to, turn.steps, 2, loads, 0,
                            &r) != KL_OK) {
    cli_error("the torque over a motor turn: %s", kl_solver_error(s));
    st = CLI_EXIT_SOLVE;
  } else if (fabs(r.max) >= fabs(r.min)) {
    *worst = r.max;
    *at = r.input_at_max;
  } else {
    *worst = r.min;
    *at = r.input_at_min;
  }
  kl_solver_free(s);
  return st;
}

static int write_model_text(const cli_model *cm, const char *path) {
  FILE *f = cli_open_output(path);
  if (f == NULL)
    return CLI_EXIT_OUTPUT;
  fwrite(cm->text, 1, cm->length, f);
  return cli_close_output(f, path);
}

typedef struct {
  const char *file, *what;
  int command, order, nshow;
  const char *show[3];
} demo_file;

static const demo_file files[] = {
    {"flap-tucker.kinloop", "the model file, to edit and run again", CLI_WRITE,
     0, 0, {NULL, NULL, NULL}},
    {"sweep.csv", "one motor turn in 5 deg steps at 60 rpm, every quantity",
     CLI_SWEEP, 0, 0, {NULL, NULL, NULL}},
    {"mechanism.svg", "the station at four motor angles, with point paths",
     CLI_DRAW, 0, 0, {NULL, NULL, NULL}},
    {"plate.svg", "the plate's slide on its rail", CLI_PLOT, 0, 1,
     {"slide:rail", NULL, NULL}},
    {"plate-ratio.svg", "d(plate slide)/d(motor), the plate's velocity ratio",
     CLI_PLOT, 1, 1, {"slide:rail", NULL, NULL}},
    {"rocker.svg", "the rocker's angle", CLI_PLOT, 0, 1,
     {"angle:rocker", NULL, NULL}},
    {"transmission.svg", "the transmission angles, with the usual band",
     CLI_PLOT, 0, 2, {"transmission:rocker_pin", "transmission:arm_pin",
                      NULL}},
};
#define NFILES ((int)(sizeof files / sizeof files[0]))

int cli_cmd_demo(const cli_model *cm, const cli_options *o) {
  const char *dir = o->dir != NULL ? o->dir : DEFAULT_DIR;
  char path[4096];
  double worst, at;
  int st, k;
  printf("kinloop %s - the built-in demo (kinloop --help lists the commands)"
         "\n\n",
         kl_version());
  fflush(stdout);
  {
    cli_options none;
    memset(&none, 0, sizeof none);
    if ((st = cli_check_report(stdout, cm, &none)) != CLI_EXIT_OK)
      return st;
  }
  if ((st = worst_torque(cm, &worst, &at)) != CLI_EXIT_OK)
    return st;
  printf("\nloads (invented): the flap pushes %g N down on the tucker tip, "
         "the rail drags the plate nose with %g N\n",
         FLAP_FORCE_DOWN, RAIL_DRAG);
  printf("  worst motor torque %.0f N mm, at motor %.0f deg (ideal linkage, "
         "by virtual work, 1 deg steps)\n",
         worst, at * 180 / CLI_PI);
  fflush(stdout);
  if ((st = cli_make_dir(dir)) != CLI_EXIT_OK)
    return st;
  for (k = 0; k < NFILES; k++) {
    cli_options fo;
    memset(&fo, 0, sizeof fo);
    if ((size_t)snprintf(path, sizeof path, "%s/%s", dir, files[k].file) >=
        sizeof path) {
      cli_error("the folder name '%s' is too long", dir);
      return CLI_EXIT_OUTPUT;
    }
    fo.command = files[k].command;
    fo.output = path;
    fo.order = files[k].order;
    fo.nshow = files[k].nshow;
    memcpy(fo.show, files[k].show, sizeof files[k].show);
    switch (files[k].command) {
    case CLI_WRITE:
      st = write_model_text(cm, path);
      break;
    case CLI_SWEEP:
      fo.have_speed = 1;
      fo.speed = MOTOR_DEG_PER_S;
      st = cli_cmd_sweep(cm, &fo);
      break;
    case CLI_DRAW:
      st = cli_cmd_draw(cm, &fo);
      break;
    default:
      st = cli_cmd_plot(cm, &fo);
      break;
    }
    if (st != CLI_EXIT_OK)
      return st;
  }
  printf("\nfiles written in %s/\n", dir);
  for (k = 0; k < NFILES; k++)
    printf("  %-20s %s\n", files[k].file, files[k].what);
  printf("\nnext: kinloop check %s/flap-tucker.kinloop, or kinloop --help\n",
         dir);
  return CLI_EXIT_OK;
}
