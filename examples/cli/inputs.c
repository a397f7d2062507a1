/*
 * inputs.c - inputs in the user's units, the sweep range a command uses,
 * and positions reached by the library's continuation, told in those units.
 */
#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

#define DEFAULT_STEPS 72

int cli_parse_real(const char *text, const char **end, double *value) {
  const char *p = text;
  char *stop;
  int digits = 0;
  if (*p == '+' || *p == '-')
    p++;
  for (; *p >= '0' && *p <= '9'; p++)
    digits++;
  if (*p == '.')
    for (p++; *p >= '0' && *p <= '9'; p++)
      digits++;
  if (digits == 0)
    return -1;
  if (*p == 'e' || *p == 'E') {
    const char *q = p + 1;
    if (*q == '+' || *q == '-')
      q++;
    if (*q < '0' || *q > '9')
      return -1;
    for (; *q >= '0' && *q <= '9'; q++)
      ;
    p = q;
  }
  /* the syntax is checked: strtod reads exactly that stretch */
  *value = strtod(text, &stop);
  if (stop != p || !isfinite(*value))
    return -1; /* overflow; an underflow is the nearest number, as read */
  *end = p;
  return 0;
}

kl_solver *cli_solver_new(const cli_model *cm, const cli_options *o) {
  kl_solver *s = kl_solver_new(cm->model);
  kl_options opts;
  if (s == NULL)
    return NULL;
  kl_options_default(&opts);
  opts.pass_change_points = o->through_change_points;
  if (kl_solver_set_options(s, &opts) != KL_OK) {
    cli_error("the solver refused its options: %s", kl_solver_error(s));
    kl_solver_free(s);
    return NULL;
  }
  return s;
}

int cli_input_is_angle(const cli_model *cm, int input) {
  int joint = kl_model_input_joint(cm->model, input);
  return joint >= 0 && kl_model_joint_kind(cm->model, joint) ==
                           KL_JOINT_REVOLUTE;
}

double cli_input_factor(const cli_model *cm, int input) {
  return cli_input_is_angle(cm, input) ? cm->angle_factor : 1.0;
}

const char *cli_input_unit(const cli_model *cm, int input) {
  return cli_input_is_angle(cm, input) ? cm->angle_unit : cm->length_unit;
}

const char *cli_input_name(const cli_model *cm, int input) {
  return cm->input_names[input];
}

void cli_format_input(const cli_model *cm, int input, double value, char *buf,
                      size_t cap) {
  snprintf(buf, cap, "%s %.6g %s", cli_input_name(cm, input),
           value * cli_input_factor(cm, input), cli_input_unit(cm, input));
}

int cli_parse_inputs(const cli_model *cm, const char *list, const char *what,
                     double *u) {
  const char *p = list;
  int i;
  if (cm->ninputs == 0) {
    cli_error("%s: the model has no inputs, so no values are given", what);
    return -1;
  }
  for (i = 0; i < cm->ninputs; i++) {
    const char *end;
    double v;
    if (cli_parse_real(p, &end, &v) != 0 || (*end != ',' && *end != '\0')) {
      cli_error("%s '%s': value %d is not a number; give %d comma-separated "
                "number%s (in the model's units), one per input",
                what, list, i + 1, cm->ninputs, cm->ninputs == 1 ? "" : "s");
      return -1;
    }
    u[i] = v / cli_input_factor(cm, i);
    p = end;
    if (*p == ',')
      p++;
    if ((*end == '\0') != (i == cm->ninputs - 1)) {
      cli_error("%s '%s': the model has %d input%s, so give %d value%s", what,
                list, cm->ninputs, cm->ninputs == 1 ? "" : "s", cm->ninputs,
                cm->ninputs == 1 ? "" : "s");
      return -1;
    }
  }
  return 0;
}

static void describe_position(const cli_model *cm, const double *u,
                              char *buf, size_t cap) {
  size_t len = 0;
  int i;
  buf[0] = '\0';
  for (i = 0; i < cm->ninputs && len < cap; i++) {
    char one[320];
    cli_format_input(cm, i, u[i], one, sizeof one);
    len += (size_t)snprintf(buf + len, cap - len, "%s%s", i ? ", " : "", one);
  }
  if (cm->ninputs == 0)
    snprintf(buf, cap, "its only position");
}

int cli_start_or_at(const cli_model *cm, const cli_options *o, double *u) {
  if (o->nat > 0)
    return cli_parse_inputs(cm, o->at[0], "--at", u);
  kl_model_start_inputs(cm->model, u);
  return 0;
}

int cli_reach(kl_solver *s, const cli_model *cm, const double *target,
              char *why, size_t cap) {
  kl_reach_result r;
  char where[1024], start[320], stop[320], goal[320];
  const char *what;
  int st;
  why[0] = '\0';
  kl_solver_reset(s);
  r.size = sizeof r;
  st = kl_solver_reach(s, cm->ninputs > 0 ? target : NULL, &r);
  if (st == KL_OK)
    return st;
  what = kl_solver_error(s);
  if (r.input < 0) {
    describe_position(cm, target, where, sizeof where);
    snprintf(why, cap, "no position at %s: %s", where, what);
    return st;
  }
  cli_format_input(cm, r.input, r.from, start, sizeof start);
  cli_format_input(cm, r.input, target[r.input], goal, sizeof goal);
  cli_format_input(cm, r.input, r.limit_input, stop, sizeof stop);
  if (isnan(r.limit_input))
    snprintf(why, cap, "cannot reach %s from the start (%s): %s", goal, start,
             what);
  else if (st == KL_ESINGULAR)
    snprintf(why, cap,
             "cannot reach %s from the start (%s): the motion meets a "
             "singular position at %s",
             goal, start, stop);
  else
    snprintf(why, cap,
             "cannot reach %s from the start (%s): the motion stops at %s, "
             "a toggle or limit position",
             goal, start, stop);
  return st;
}

static int find_input(const cli_model *cm, const char *text) {
  char *end;
  long v;
  int i;
  for (i = 0; i < cm->ninputs; i++)
    if (strcmp(cli_input_name(cm, i), text) == 0)
      return i;
  errno = 0;
  v = strtol(text, &end, 10);
  if (end != text && *end == '\0' && errno == 0 && v >= 1 && v <= cm->ninputs)
    return (int)v - 1; /* numbered from 1, as everywhere in the tool */
  return -1;
}

int cli_resolve_range(const cli_model *cm, const cli_options *o,
                      cli_range *r) {
  kl_sweep_settings sw;
  int have_sweep, same, asked = o->input != NULL || o->have_from ||
                                o->have_to || o->have_steps;
  double factor;
  if (cm->ninputs == 0) {
    if (asked) {
      cli_error("the model has no input to sweep (kinloop check shows its "
                "structure)");
      return -1;
    }
    return 0;
  }
  sw.size = sizeof sw;
  have_sweep = kl_model_sweep(cm->model, &sw) == KL_OK;
  if (o->input != NULL) {
    r->input = find_input(cm, o->input);
    if (r->input < 0) {
      int i;
      fprintf(stderr, "kinloop: --input %s: no input drives a joint of that "
                      "name; the inputs are",
              o->input);
      for (i = 0; i < cm->ninputs; i++)
        fprintf(stderr, "%s %d (%s)", i ? "," : "", i + 1,
                cli_input_name(cm, i));
      fputc('\n', stderr);
      return -1;
    }
  } else {
    r->input = have_sweep ? sw.input : 0;
  }
  same = have_sweep && sw.input == r->input;
  factor = cli_input_factor(cm, r->input);
  r->from = o->have_from ? o->from / factor : same ? sw.from : 0.0;
  r->steps = o->have_steps ? o->steps : same ? sw.steps : DEFAULT_STEPS;
  if (o->have_to) {
    r->to = o->to / factor;
  } else if (same) {
    r->to = sw.to;
  } else if (cli_input_is_angle(cm, r->input)) {
    r->to = r->from + 2.0 * CLI_PI;
  } else {
    if (asked) {
      cli_error("input %d (%s) is a length (a slide or a point coordinate) "
                "and the model has no sweep line for it: "
                "give --to",
                r->input + 1, cli_input_name(cm, r->input));
      return -1;
    }
    return 0;
  }
  if (r->to == r->from) {
    cli_error("the range starts and ends at %.6g %s: give a --to that differs",
              r->from * factor, cli_input_unit(cm, r->input));
    return -1;
  }
  return 1;
}

int cli_require_range(const cli_model *cm, const cli_options *o,
                      cli_range *r, const char *nothing) {
  int found = cli_resolve_range(cm, o, r);
  if (found < 0)
    return CLI_EXIT_USAGE;
  if (found == 0) {
    cli_error("%s: %s; give --input, --from and --to", nothing,
              cm->ninputs == 0 ? "the model has no inputs"
                               : "the model has no sweep line and its input "
                                 "slides");
    return CLI_EXIT_USAGE;
  }
  return CLI_EXIT_OK;
}

int cli_reach_start(kl_solver *s, const cli_model *cm, const cli_options *o,
                    const cli_range *r) {
  double *u = malloc((size_t)(cm->ninputs > 0 ? cm->ninputs : 1) * sizeof *u);
  char why[2048];
  int st;
  if (u == NULL) {
    cli_error("out of memory");
    return CLI_EXIT_MEMORY;
  }
  if (cli_start_or_at(cm, o, u) != 0) {
    free(u);
    return CLI_EXIT_USAGE;
  }
  if (r != NULL)
    u[r->input] = r->from;
  st = cli_reach(s, cm, u, why, sizeof why);
  free(u);
  if (st != KL_OK) {
    cli_error("the start of the range: %s", why);
    return CLI_EXIT_SOLVE;
  }
  return CLI_EXIT_OK;
}

int cli_apply_rpm(const cli_model *cm, cli_options *o) {
  cli_range r;
  int found;
  if (o->have_speed) {
    cli_error("give --speed or --rpm, not both");
    return CLI_EXIT_USAGE;
  }
  found = cli_resolve_range(cm, o, &r);
  if (found < 0)
    return CLI_EXIT_USAGE;
  if (found == 0 || !cli_input_is_angle(cm, r.input)) {
    cli_error("--rpm is the speed of a turning input; %s does not turn "
              "(give its speed with --speed, its unit per second)",
              found == 0 ? "the model has no input that"
                         : cli_input_name(cm, r.input));
    return CLI_EXIT_USAGE;
  }
  /* turns a minute: 2 pi rad each, over 60 s, in the model's angle unit */
  o->speed = o->rpm * 2.0 * CLI_PI / 60.0 * cm->angle_factor;
  o->have_speed = 1;
  return CLI_EXIT_OK;
}
