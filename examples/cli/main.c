/*
 * main.c - the kinloop tool's command line: usage texts, option parsing,
 * and dispatch to the command that does the work.
 */
#include <errno.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

void cli_error(const char *fmt, ...) {
  va_list ap;
  fputs("kinloop: ", stderr);
  va_start(ap, fmt);
  vfprintf(stderr, fmt, ap);
  va_end(ap);
  fputc('\n', stderr);
}

static const char *const command_names[CLI_NCOMMANDS] = {
    "check", "solve", "sweep", "draw", "plot", "write", "demo", "study",
    "forces", "reach", "timeline", "follower"};

static const char general_usage[] =
    "kinloop %s - position, velocity and acceleration of planar linkages\n"
    "\n"
    "usage: kinloop                         the built-in demo: a summary, and\n"
    "                                       files in ./kinloop-demo/\n"
    "       kinloop COMMAND MODEL [OPTIONS]\n"
    "       kinloop study STUDY [OPTIONS]\n"
    "       kinloop COMMAND --help          the options of one command\n"
    "\n"
    "commands:\n"
    "  check   structure, loops, Grashof class, ranges over the sweep, warnings\n"
    "  solve   one position: link angles, slides, points, with rates and\n"
    "          accelerations, transmission angles, condition estimate\n"
    "  sweep   the motion over an input range, one CSV row per step\n"
    "  draw    SVG picture of the mechanism at chosen positions, with the paths\n"
    "          its points trace\n"
    "  plot    SVG plot of chosen outputs against the swept input\n"
    "  write   the model in the library's canonical model-file text\n"
    "  demo    the built-in demo (what kinloop does with no arguments)\n"
    "  study   a design study (docs/studies.md): tolerance samples or a grid of\n"
    "          designs, summarized per output, with CSV and SVG charts\n"
    "  forces  the force stage over the working cycle: motor effort, joint\n"
    "          loads, shaking, flywheel; with CSV and SVG charts\n"
    "  reach   SVG picture of the workspace of a point of a two-input linkage:\n"
    "          its boundary and singular curves, traced, and its area\n"
    "  timeline  the model's motion profile in time: every quantity with its\n"
    "          rate, acceleration and jerk per second, as CSV\n"
    "  follower  a cam follower's rise, its derivatives and the pressure angle\n"
    "          over the cam angle, from the whole model: CSV and SVG charts\n"
    "\n"
    "MODEL is a model file (docs/model-format.md); every command but demo needs\n"
    "one (kinloop demo writes the built-in demo's, a carton flap-tucking\n"
    "station, into kinloop-demo/). Angles on the command line and in messages\n"
    "are in the model's angle unit, lengths in its length unit. Inputs and loops\n"
    "are numbered from 1 everywhere (--input 1 is the first input).\n"
    "No output replaces a file until it is complete: a failed or interrupted\n"
    "run leaves the file as it was, and a file that reads as a model or study\n"
    "file is not written over without --write-over.\n"
    "\n"
    "exit status:\n"
    "  0  success\n"
    "  1  out of memory, or an unexpected library failure\n"
    "  2  usage error: unknown command or option, bad value\n"
    "  3  model error: file unreadable, not in the format, bad topology;\n"
    "     the same for a study file\n"
    "  4  solve failure: no assembly, singular position, or a motion limit\n"
    "     before a position that was asked for; a study's nominal that does\n"
    "     not solve; forces that are not determined (redundant or singular)\n"
    "  5  an output file or folder cannot be written\n";

/* check, sweep, draw and plot; forces takes the range options only */
#define THROUGH_HELP                                                           \
  "  --through-change-points  at a change point (where two branches cross)\n"  \
  "                    go on along the branch with the same tangent and\n"    \
  "                    report each passage on standard error; by default\n"   \
  "                    the motion stops there and is reported\n"

static const char range_help[] =
    "  --input JOINT     the input to sweep: its joint's name or its number\n"
    "                    (1, 2, ...); default: the model's sweep line, else 1\n"
    "  --from X          start of the range (default: the model's sweep line\n"
    "                    if it sweeps this input, else 0)\n"
    "  --to X            end of the range (default: the model's sweep line\n"
    "                    if it sweeps this input, else one full turn from the\n"
    "                    start; a sliding input then needs --to)\n"
    "  --steps N         number of equal steps, 1 to 10000000, the limit for a\n"
    "                    sweep line too (default: the model's sweep line if\n"
    "                    it sweeps this input, else 72)\n";

static const char *const command_help[CLI_NCOMMANDS] = {
    /* check */
    "usage: kinloop check MODEL [OPTIONS]\n"
    "\n"
    "Reports the model's structure (links, joints, degrees of freedom, inputs,\n"
    "loops by their joints), the Grashof class of each four-bar loop driven at a\n"
    "ground pivot, and, over the sweep range, the motion limits, the smallest\n"
    "condition estimate, the swing of links pivoted on ground, the stroke of\n"
    "each slide, time ratios, and the transmission angle ranges; then warnings\n"
    "to act on (transmission angle outside the usual 40-140 deg, a motion limit\n"
    "or singular position inside the range, no sketch angles).\n"
    "\n"
    "options:\n"
    "%s"
    THROUGH_HELP
    "  --at LIST         values of every input at the start, comma-separated\n"
    "                    (the swept input's own entry is replaced by --from)\n"
    "  -o, --output FILE write the report to FILE instead of standard output\n"
    "\n"
    "Warnings do not change the exit status; a start position that cannot be\n"
    "solved exits with 4.\n",
    /* solve */
    "usage: kinloop solve MODEL [OPTIONS]\n"
    "\n"
    "Solves one position, reached by continuation from the model's start (its\n"
    "sweep line's start, other inputs 0) so that the assembly mode is the one the\n"
    "sketch chose, and prints link angles, slides, points (position, velocity,\n"
    "acceleration), transmission angles and the condition estimate.\n"
    "\n"
    "options:\n"
    "  --at LIST         input values, comma-separated, one per input\n"
    "                    (default: the start position)\n"
    "  --rate LIST       input rates, per second (default: 1 for each input)\n"
    "  --accel LIST      input accelerations, per second squared (default: 0)\n"
    "  --all-digits      print every number with 17 significant digits\n"
    "                    (default 8)\n"
    "  -o, --output FILE write the table to FILE instead of standard output\n"
    "\n"
    "Values smaller than the model's resolution (the solver's tolerance times\n"
    "the model's scale, in the value's unit) print as 0.\n",
    /* sweep */
    "usage: kinloop sweep MODEL [OPTIONS]\n"
    "\n"
    "Sweeps one input over a range and writes CSV: a header row of names with\n"
    "units, then one row per step with the input, every link's angle, rate and\n"
    "acceleration, every slide's, every point's x and y with theirs, every\n"
    "transmission angle, and the condition estimate. The input turns at a\n"
    "constant speed; with the default speed 1 the rates and accelerations read\n"
    "as first- and second-order kinematic coefficients per input unit.\n"
    "\n"
    "options:\n"
    "%s"
    THROUGH_HELP
    "  --at LIST         values of every input at the start, comma-separated\n"
    "                    (the swept input's own entry is replaced by --from)\n"
    "  --speed W         the swept input's constant speed, its unit per second\n"
    "                    (default 1): rates scale by W, accelerations by W^2\n"
    "  --rpm N           the same for a turning input, in turns a minute\n"
    "  --all-digits      write every number with 17 significant digits\n"
    "                    (default 6)\n"
    "  --forces          add the force columns of kinloop forces --csv: every\n"
    "                    input's effort, every joint's force, the frame's,\n"
    "                    against the model's masses, gravity and loads; the\n"
    "                    speed is then the model's speed line unless --speed\n"
    "  -o, --output FILE write the CSV to FILE instead of standard output\n"
    "\n"
    "A sweep that meets a motion limit or a singular position writes the rows\n"
    "before it, says where it stopped on standard error, and exits with 0.\n"
    "With --forces, where the forces are not determined it writes nothing and\n"
    "exits with 4.\n",
    /* draw */
    "usage: kinloop draw MODEL [OPTIONS]\n"
    "\n"
    "Draws the mechanism as SVG at one or more positions (the first in full\n"
    "colour, the others faint), ground pivots and rails hatched, with the path\n"
    "of every point over the sweep range. The paths and the positions are\n"
    "swept from the start of the range with the other inputs at --at, so the\n"
    "drawn positions lie on the drawn paths.\n"
    "\n"
    "options:\n"
    "%s"
    THROUGH_HELP
    "  --at LIST         values of every input at the start, comma-separated\n"
    "                    (the swept input's own entry is replaced by --from)\n"
    "  --pose X          a position to draw: the swept input's value X,\n"
    "                    reached along the range from its start; repeat for\n"
    "                    more positions, up to 16\n"
    "  --poses N         without --pose: N positions spread over the range\n"
    "                    (default 4)\n"
    "  --no-paths        leave out the point paths\n"
    "  -o, --output FILE write the SVG to FILE instead of standard output\n",
    /* plot */
    "usage: kinloop plot MODEL --show OUTPUT [--show OUTPUT ...] [OPTIONS]\n"
    "\n"
    "Plots outputs against the swept input as SVG. OUTPUT is one of\n"
    "  angle:LINK          a link's angle\n"
    "  slide:JOINT         a prismatic or slot joint's slide\n"
    "  x:POINT, y:POINT    a point's coordinate\n"
    "  transmission:JOINT  a transmission angle (the usual 40-140 deg band is\n"
    "                      shaded)\n"
    "with LINK, JOINT and POINT by name (an unnamed one as @id, its id in the\n"
    "model file). Outputs in one plot must share a unit. Without --show,\n"
    "kinloop plot lists the outputs the model has (on standard error, exit\n"
    "status 2).\n"
    "\n"
    "options:\n"
    "%s"
    THROUGH_HELP
    "  --show OUTPUT     an output to plot; repeat for up to 8\n"
    "  --order N         0 the output itself (default), 1 its first-order\n"
    "                    kinematic coefficient d output / d input, 2 its\n"
    "                    second-order coefficient (not for transmission)\n"
    "  --at LIST         values of every input at the start, comma-separated\n"
    "                    (the swept input's own entry is replaced by --from)\n"
    "  -o, --output FILE write the SVG to FILE instead of standard output\n",
    /* write */
    "usage: kinloop write MODEL [-o FILE]\n"
    "\n"
    "Reads MODEL and writes it back in the\n"
    "library's canonical model-file text: every number with 17 significant\n"
    "digits, comments dropped. Reading the result gives the same model.\n"
    "\n"
    "options:\n"
    "  -o, --output FILE write to FILE instead of standard output\n",
    /* demo */
    "usage: kinloop demo [--dir DIR]\n"
    "       kinloop\n"
    "\n"
    "Prints a summary of the built-in demo, a carton flap-tucking station (the\n"
    "check report, and the motor and bearing figures of a turn at 60 rpm\n"
    "against its masses, gravity and the loads of the flap and the rail), and\n"
    "writes into DIR: the model file, a CSV sweep at 60 rpm, a drawing, four\n"
    "plots, the forces as CSV, and in DIR/forces the force charts.\n"
    "\n"
    "options:\n"
    "  --dir DIR         the folder to write (default kinloop-demo; made if\n"
    "                    missing)\n",
    /* study */
    "usage: kinloop study STUDY [OPTIONS]\n"
    "\n"
    "Runs every sample of a design study (docs/studies.md): each a copy of the\n"
    "study's model with its dimensions drawn within their tolerances (or set\n"
    "to one point of a grid), judged over the sweep. Prints the study's outline\n"
    "and, per output, the nominal, mean, median, standard deviation beside\n"
    "its first-order estimate, extremes, percentiles, the worst sample, how\n"
    "many samples stay within the limits, how many do not assemble and how\n"
    "many stop short of the sweep's end; then a line starting with\n"
    "'throughput' (samples per second). kinloop demo writes the built-in\n"
    "demo study, flap-tucker.study, beside its model.\n"
    "\n"
    "options:\n"
    "  --threads N       threads to run the samples on, 1 to 64, or 0 for\n"
    "                    every core (default 0)\n"
    "  --csv FILE        write one CSV row per sample: index, status, every\n"
    "                    dimension, every output\n"
    "  --charts DIR      write SVG charts into DIR (made if missing): a\n"
    "                    histogram of each output, and scatter plots of it\n"
    "                    against the two dimensions it correlates with most\n"
    "  -o, --output FILE write the summary to FILE instead of standard output\n"
    "\n"
    "Samples that do not assemble are counted, never left out silently. A\n"
    "study that cannot be read exits with 3, one whose nominal does not\n"
    "solve or move through the sweep with 4. Ctrl-C or SIGTERM stops it\n"
    "after the chunk under way: the summary and files then cover the\n"
    "samples done, marked PARTIAL, and it exits with 130 or 143.\n",
    /* forces */
    cli_forces_help,
    /* reach */
    "usage: kinloop reach MODEL --point POINT [OPTIONS]\n"
    "\n"
    "Traces the workspace of POINT (by name, an unnamed one as @id) for a\n"
    "model with two turning inputs, each over whole turns: every position the\n"
    "point takes in every assembly mode. Its boundary and the singular curves\n"
    "inside it (where the map from the two inputs to the point folds) are\n"
    "traced by continuation from a coarse grid of seeds, and drawn as SVG with\n"
    "coordinate axes in the model's length unit and the ground pivots; the\n"
    "area and extent are printed (on standard error when the SVG goes to\n"
    "standard output). The picture is a design aid: verify a machine's reach\n"
    "by physical testing; local codes and licensed engineering practice take\n"
    "precedence.\n"
    "\n"
    "options:\n"
    "  --point POINT     the point whose workspace is traced (required)\n"
    "  --grid N          seed nodes per turn of each input, 4 to 720\n"
    "                    (default 32); raise it when a small closed curve\n"
    "                    may slip between the seeds\n"
    "  -o, --output FILE write the SVG to FILE instead of standard output\n"
    "\n"
    "A model without exactly two turning inputs, or a point on ground, exits\n"
    "with 3; one that assembles nowhere on the grid with 4.\n",
    /* timeline */
    cli_timeline_help,
    /* follower */
    cli_follower_help};

enum {
  OPT_OUTPUT,
  OPT_INPUT,
  OPT_FROM,
  OPT_TO,
  OPT_STEPS,
  OPT_AT,
  OPT_RATE,
  OPT_ACCEL,
  OPT_SPEED,
  OPT_ALL_DIGITS,
  OPT_POSES,
  OPT_NO_PATHS,
  OPT_SHOW,
  OPT_ORDER,
  OPT_DIR,
  OPT_THREADS,
  OPT_CSV,
  OPT_CHARTS,
  OPT_FLUCTUATION,
  OPT_FORCES,
  OPT_POINT,
  OPT_GRID,
  OPT_THROUGH,
  OPT_WRITE_OVER,
  OPT_POSE,
  OPT_RPM,
  OPT_PROFILE,
  OPT_CAM,
  OPT_HELP
};

#define BIT(c) (1u << (c))
#define RANGE_CMDS                                                             \
  (BIT(CLI_CHECK) | BIT(CLI_SWEEP) | BIT(CLI_DRAW) | BIT(CLI_PLOT) |           \
   BIT(CLI_FORCES) | BIT(CLI_FOLLOWER))

static const struct {
  const char *name;
  char letter;
  int takes_value;
  unsigned commands;
} option_specs[] = {
    {"output", 'o', 1,
     RANGE_CMDS | BIT(CLI_SOLVE) | BIT(CLI_WRITE) | BIT(CLI_STUDY) |
         BIT(CLI_REACH) | BIT(CLI_TIMELINE)},
    {"input", 0, 1, RANGE_CMDS},
    {"from", 0, 1, RANGE_CMDS},
    {"to", 0, 1, RANGE_CMDS},
    {"steps", 0, 1, RANGE_CMDS | BIT(CLI_TIMELINE)},
    {"at", 0, 1, RANGE_CMDS | BIT(CLI_SOLVE)},
    {"rate", 0, 1, BIT(CLI_SOLVE)},
    {"accel", 0, 1, BIT(CLI_SOLVE)},
    {"speed", 0, 1, BIT(CLI_SWEEP) | BIT(CLI_FORCES)},
    {"all-digits", 0, 0,
     BIT(CLI_SWEEP) | BIT(CLI_FORCES) | BIT(CLI_SOLVE) | BIT(CLI_TIMELINE) |
         BIT(CLI_FOLLOWER)},
    {"poses", 0, 1, BIT(CLI_DRAW)},
    {"no-paths", 0, 0, BIT(CLI_DRAW)},
    {"show", 0, 1, BIT(CLI_PLOT)},
    {"order", 0, 1, BIT(CLI_PLOT)},
    {"dir", 0, 1, BIT(CLI_DEMO)},
    {"threads", 0, 1, BIT(CLI_STUDY)},
    {"csv", 0, 1, BIT(CLI_STUDY) | BIT(CLI_FORCES)},
    {"charts", 0, 1,
     BIT(CLI_STUDY) | BIT(CLI_FORCES) | BIT(CLI_TIMELINE) | BIT(CLI_FOLLOWER)},
    {"fluctuation", 0, 1, BIT(CLI_FORCES)},
    {"forces", 0, 0, BIT(CLI_SWEEP)},
    {"point", 0, 1, BIT(CLI_REACH)},
    {"grid", 0, 1, BIT(CLI_REACH)},
    {"through-change-points", 0, 0,
     BIT(CLI_CHECK) | BIT(CLI_SWEEP) | BIT(CLI_DRAW) | BIT(CLI_PLOT)},
    {"write-over", 0, 0, ~0u},
    {"pose", 0, 1, BIT(CLI_DRAW)},
    {"rpm", 0, 1, BIT(CLI_SWEEP) | BIT(CLI_FORCES)},
    {"profile", 0, 1, BIT(CLI_TIMELINE)},
    {"cam", 0, 1, BIT(CLI_FOLLOWER)},
    {"help", 'h', 0, ~0u},
};
#define NOPTIONS ((int)(sizeof option_specs / sizeof option_specs[0]))

static int usage_error(int command, const char *fmt, const char *arg) {
  fputs("kinloop: ", stderr);
  fprintf(stderr, fmt, arg);
  if (command >= 0)
    fprintf(stderr, "\n(kinloop %s --help lists its options)\n",
            command_names[command]);
  else
    fputs("\n(kinloop --help lists the commands)\n", stderr);
  return CLI_EXIT_USAGE;
}

static void print_command_help(int command) {
  printf(command_help[command], range_help);
}

static int parse_number(int command, const char *option, const char *text,
                        double *value) {
  const char *end;
  if (cli_parse_real(text, &end, value) != 0 || *end != '\0') {
    char what[160];
    snprintf(what, sizeof what,
             "--%s wants a finite decimal number (as in a model file), not "
             "'%%s'",
             option);
    return usage_error(command, what, text);
  }
  return CLI_EXIT_OK;
}

static int parse_count(int command, const char *option, const char *text,
                       int lowest, int highest, int *value) {
  char *end;
  long v;
  errno = 0;
  v = strtol(text, &end, 10);
  if (end == text || *end != '\0' || errno == ERANGE || v < lowest ||
      v > highest) {
    char what[128];
    snprintf(what, sizeof what,
             "--%s wants a whole number from %d to %d, not '%%s'", option,
             lowest, highest);
    return usage_error(command, what, text);
  }
  *value = (int)v;
  return CLI_EXIT_OK;
}

/* Finds the option an argument names; NULL value when it takes none. */
static int match_option(const char *arg, const char **inline_value) {
  int i;
  *inline_value = NULL;
  if (arg[0] == '-' && arg[1] != '-' && arg[1] != '\0' && arg[2] == '\0') {
    for (i = 0; i < NOPTIONS; i++)
      if (option_specs[i].letter == arg[1])
        return i;
    return -1;
  }
  if (strncmp(arg, "--", 2) == 0) {
    const char *name = arg + 2, *eq = strchr(name, '=');
    size_t n = eq != NULL ? (size_t)(eq - name) : strlen(name);
    for (i = 0; i < NOPTIONS; i++)
      if (strlen(option_specs[i].name) == n &&
          strncmp(option_specs[i].name, name, n) == 0) {
        if (eq != NULL)
          *inline_value = eq + 1;
        return i;
      }
  }
  return -1;
}

static int store_option(cli_options *o, int which, const char *value) {
  int c = o->command, st = CLI_EXIT_OK;
  const char *name = option_specs[which].name;
  switch (which) {
  case OPT_OUTPUT:
    o->output = value;
    break;
  case OPT_INPUT:
    o->input = value;
    break;
  case OPT_FROM:
    o->have_from = 1;
    st = parse_number(c, name, value, &o->from);
    break;
  case OPT_TO:
    o->have_to = 1;
    st = parse_number(c, name, value, &o->to);
    break;
  case OPT_STEPS:
    o->have_steps = 1;
    st = parse_count(c, name, value, 1, KL_MAX_STEPS, &o->steps);
    break;
  case OPT_AT:
    if (o->nat == 1)
      return usage_error(c, "--at is given once (again: %s)", value);
    o->at[o->nat++] = value;
    break;
  case OPT_POSE:
    if (o->npose == CLI_MAX_POSES)
      return usage_error(c, "at most 16 positions (--pose %s)", value);
    st = parse_number(c, name, value, &o->pose[o->npose]);
    o->npose++;
    break;
  case OPT_THROUGH:
    o->through_change_points = 1;
    break;
  case OPT_WRITE_OVER:
    o->write_over = 1;
    break;
  case OPT_RATE:
    o->rate = value;
    break;
  case OPT_ACCEL:
    o->accel = value;
    break;
  case OPT_SPEED:
    o->have_speed = 1;
    st = parse_number(c, name, value, &o->speed);
    if (st == CLI_EXIT_OK && o->speed == 0.0 && c == CLI_SWEEP)
      return usage_error(c, "--speed cannot be 0 (%s)", value);
    break;
  case OPT_RPM:
    o->have_rpm = 1;
    st = parse_number(c, name, value, &o->rpm);
    if (st == CLI_EXIT_OK && o->rpm == 0.0 && c == CLI_SWEEP)
      return usage_error(c, "--rpm cannot be 0 (%s)", value);
    break;
  case OPT_PROFILE:
    o->profile = value;
    break;
  case OPT_CAM:
    o->cam = value;
    break;
  case OPT_ALL_DIGITS:
    o->all_digits = 1;
    break;
  case OPT_POSES:
    st = parse_count(c, name, value, 1, CLI_MAX_POSES, &o->poses);
    break;
  case OPT_NO_PATHS:
    o->no_paths = 1;
    break;
  case OPT_SHOW:
    if (o->nshow == CLI_MAX_SHOW)
      return usage_error(c, "at most 8 outputs in one plot (--show %s)",
                         value);
    o->show[o->nshow++] = value;
    break;
  case OPT_ORDER:
    st = parse_count(c, name, value, 0, 2, &o->order);
    break;
  case OPT_DIR:
    o->dir = value;
    break;
  case OPT_THREADS:
    st = parse_count(c, name, value, 0, 64, &o->threads);
    break;
  case OPT_CSV:
    o->csv = value;
    break;
  case OPT_CHARTS:
    o->charts = value;
    break;
  case OPT_FLUCTUATION:
    o->have_fluctuation = 1;
    st = parse_number(c, name, value, &o->fluctuation);
    if (st == CLI_EXIT_OK && o->fluctuation < 0.0)
      return usage_error(c, "--fluctuation cannot be negative (%s)", value);
    break;
  case OPT_FORCES:
    o->forces = 1;
    break;
  case OPT_POINT:
    o->point = value;
    break;
  case OPT_GRID:
    st = parse_count(c, name, value, 4, 720, &o->grid);
    break;
  default:
    break;
  }
  return st;
}

/* Parses the arguments after the command word. Returns -1 when help was
 * printed, else an exit code. */
static int parse_options(cli_options *o, int argc, char **argv) {
  int i;
  for (i = 0; i < argc; i++) {
    const char *arg = argv[i], *value;
    int which;
    if (arg[0] != '-' || arg[1] == '\0') {
      if (o->model_path != NULL)
        return usage_error(o->command,
                           o->command == CLI_STUDY
                               ? "one study file at a time; '%s' is one too "
                                 "many"
                               : "one model file at a time; '%s' is one too "
                                 "many",
                           arg);
      if (o->command == CLI_DEMO)
        return usage_error(o->command,
                           "demo takes no model file ('%s'); try kinloop "
                           "check FILE",
                           arg);
      o->model_path = arg;
      continue;
    }
    which = match_option(arg, &value);
    if (which < 0)
      return usage_error(o->command, "unknown option '%s'", arg);
    if ((option_specs[which].commands & BIT(o->command)) == 0)
      return usage_error(o->command, "this command takes no option '%s'",
                         arg);
    if (which == OPT_HELP) {
      print_command_help(o->command);
      return -1;
    }
    if (option_specs[which].takes_value) {
      if (value == NULL) {
        if (i + 1 == argc)
          return usage_error(o->command, "option '%s' needs a value", arg);
        value = argv[++i];
      }
    } else if (value != NULL) {
      return usage_error(o->command, "option '%s' takes no value", arg);
    }
    if (store_option(o, which, value) != CLI_EXIT_OK)
      return CLI_EXIT_USAGE;
  }
  if (o->command == CLI_DRAW && o->npose > 0 && o->poses > 0)
    return usage_error(o->command, "give --pose positions or --poses%s, not "
                                   "both",
                       "");
  if (o->command != CLI_DEMO && o->model_path == NULL)
    return usage_error(o->command,
                       o->command == CLI_STUDY
                           ? "kinloop %s needs a study file (kinloop demo "
                             "writes the built-in one into kinloop-demo/)"
                           : "kinloop %s needs a model file (kinloop demo "
                             "writes the built-in one into kinloop-demo/)",
                       command_names[o->command]);
  cli_set_write_over(o->write_over);
  return CLI_EXIT_OK;
}

/* The commands on a model, in enum cli_command's order (study reads a
 * study file instead: its entry is never called). */
typedef int (*model_command)(const cli_model *cm, const cli_options *o);
static const model_command model_commands[CLI_NCOMMANDS] = {
    cli_cmd_check,  cli_cmd_solve,  cli_cmd_sweep,  cli_cmd_draw,
    cli_cmd_plot,   cli_cmd_write,  cli_cmd_demo,   NULL,
    cli_cmd_forces, cli_cmd_reach,  cli_cmd_timeline, cli_cmd_follower};

static int run(cli_options *o) {
  cli_model cm;
  int st;
  if (o->command == CLI_STUDY)
    return cli_cmd_study(o);
  st = cli_model_load(&cm, o->model_path, o->profile);
  if (st != CLI_EXIT_OK)
    return st;
  if (o->have_rpm && (st = cli_apply_rpm(&cm, o)) != CLI_EXIT_OK) {
    cli_model_free(&cm);
    return st;
  }
  st = model_commands[o->command](&cm, o);
  cli_model_free(&cm);
  return st;
}

int main(int argc, char **argv) {
  cli_options o;
  int i, st;
  memset(&o, 0, sizeof o);
  o.command = CLI_DEMO;
  if (argc >= 2) {
    const char *word = argv[1];
    if (strcmp(word, "--help") == 0 || strcmp(word, "-h") == 0 ||
        strcmp(word, "help") == 0) {
      if (argc >= 3)
        for (i = 0; i < CLI_NCOMMANDS; i++)
          if (strcmp(argv[2], command_names[i]) == 0) {
            print_command_help(i);
            return CLI_EXIT_OK;
          }
      if (argc >= 3)
        return usage_error(-1, "no command '%s' to explain", argv[2]);
      printf(general_usage, kl_version());
      return CLI_EXIT_OK;
    }
    if (strcmp(word, "--version") == 0) {
      printf("kinloop %s\n", kl_version());
      return CLI_EXIT_OK;
    }
    o.command = -1;
    for (i = 0; i < CLI_NCOMMANDS; i++)
      if (strcmp(word, command_names[i]) == 0)
        o.command = i;
    if (o.command < 0) {
      const char *value;
      if (word[0] == '-' && match_option(word, &value) >= 0)
        return usage_error(-1, "'%s' needs a command before it", word);
      if (word[0] == '-')
        return usage_error(-1, "unknown option '%s'", word);
      if (strchr(word, '.') != NULL || strchr(word, '/') != NULL)
        return usage_error(-1,
                           "unknown command '%s'; to look at a model file, "
                           "try kinloop check FILE",
                           word);
      return usage_error(-1, "unknown command '%s'", word);
    }
  }
  st = parse_options(&o, argc > 2 ? argc - 2 : 0, argv + 2);
  if (st < 0)
    return CLI_EXIT_OK;
  if (st != CLI_EXIT_OK)
    return st;
  return run(&o);
}
