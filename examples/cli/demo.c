/*
 * demo.c - the built-in demo, what kinloop does with no arguments: a
 * summary of the flap-tucking station and its files in one folder.
 */
#include <math.h>
#include <string.h>

#include "cli.h"

#define DEFAULT_DIR "kinloop-demo"
#define MOTOR_DEG_PER_S 360.0 /* 60 rpm */
#define FORCE_STEPS 360       /* the force figures every degree */

/* The force figures of a motor turn at the model's speed, against its
 * masses, gravity and loads: printed briefly, and written as CSV and
 * charts into `dir`. */
static int forces(const cli_model *cm, const char *dir) {
  cli_options o;
  cli_cycle c;
  char path[4096];
  int st, files;
  memset(&o, 0, sizeof o);
  o.command = CLI_FORCES;
  o.have_steps = 1;
  o.steps = FORCE_STEPS;
  if ((size_t)snprintf(path, sizeof path, "%s/forces", dir) >= sizeof path) {
    cli_error("the folder name '%s' is too long", dir);
    return CLI_EXIT_OUTPUT;
  }
  if ((st = cli_cycle_setup(cm, &o, NULL, &c)) == CLI_EXIT_OK &&
      (st = cli_cycle_compute(cm, &o, 1, &c)) == CLI_EXIT_OK) {
    printf("\nforces over a motor turn at the working speed (masses, gravity "
           "and loads invented, in the model file)\n");
    cli_cycle_report(stdout, cm, &c, 1);
    fflush(stdout);
    st = cli_force_charts(cm, &c, path, &files);
  }
  cli_cycle_free(&c);
  return st;
}

/* The demo's own model and study files, which each run writes again. */
static int write_text(const char *text, size_t length, const char *path) {
  FILE *f;
  int st;
  cli_set_write_over(1);
  f = cli_open_output(path);
  cli_set_write_over(0);
  if (f == NULL)
    return CLI_EXIT_OUTPUT;
  fwrite(text, 1, length, f);
  st = cli_close_output(f, path);
  return st;
}

typedef struct {
  const char *file, *what;
  int command, order, nshow;
  const char *show[3];
} demo_file;

static const demo_file files[] = {
    {"flap-tucker.kinloop", "the model file, to edit and run again", CLI_WRITE,
     0, 0, {NULL, NULL, NULL}},
    {"flap-tucker.study", "a tolerance study of it, for kinloop study",
     CLI_STUDY, 0, 0, {NULL, NULL, NULL}},
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
    {"forces.csv", "the forces of a motor turn at 60 rpm, every 5 deg",
     CLI_SWEEP, 0, 0, {NULL, NULL, NULL}},
};
#define NFILES ((int)(sizeof files / sizeof files[0]))

int cli_cmd_demo(const cli_model *cm, const cli_options *o) {
  const char *dir = o->dir != NULL ? o->dir : DEFAULT_DIR;
  char path[4096];
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
  if ((st = cli_make_dir(dir)) != CLI_EXIT_OK || (st = forces(cm, dir)) != CLI_EXIT_OK)
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
      st = write_text(cm->text, cm->length, path);
      break;
    case CLI_STUDY:
      st = write_text((const char *)cli_demo_study_text,
                      cli_demo_study_length, path);
      break;
    case CLI_SWEEP:
      fo.have_speed = 1;
      fo.speed = MOTOR_DEG_PER_S;
      fo.forces = strcmp(files[k].file, "forces.csv") == 0;
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
  printf("  %-20s %s\n", "forces/",
         "the motor torque over a turn; each bearing's load and the frame's "
         "as polar plots");
  printf("\nnext: kinloop check %s/flap-tucker.kinloop, kinloop forces "
         "%s/flap-tucker.kinloop,\nor kinloop --help\n",
         dir, dir);
  return CLI_EXIT_OK;
}
