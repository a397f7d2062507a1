/*
 * study_read.c - the study-file reader: any bytes and a finalized model in,
 * a study of that model or a located error out; opens and solves nothing.
 */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "study.h"
#include "tokens.h"

/* What kli_study_find_model's pass over the text stops at. */
#define FOUND_MODEL 100

typedef struct {
  kli_reader r;
  kl_study *st;
  /* Finding the model statement (kli_study_find_model): no model yet
   * (r.m NULL), and the statement's path goes here. */
  int finding;
  char *found_path;
  size_t found_cap;
  int found_column;
  /* the lines of the statements a study gives once (0: not yet) */
  int seed_line, samples_line, sweep_line, model_line;
} study_reader;

/* A statement a study gives at most once: its first line is kept. */
static int given_once(study_reader *sr, int *line, const char *what) {
  if (*line != 0)
    return kli_read_fail(
        &sr->r, KL_ESYNTAX, 1,
        "%s is given already, on line %d: a study gives it once", what, *line);
  *line = sr->r.line;
  return KL_OK;
}

/* Only while the model is still to be found, on the way to its statement:
 * kl_study_read_file opens the model the statement names. */
static int study_needs_model(study_reader *sr, int column) {
  if (sr->r.m == NULL)
    return kli_read_fail(
        &sr->r, KL_ESYNTAX, column,
        "'model' must come first: the study needs its model to "
        "name links, joints and points");
  return KL_OK;
}

/* model PATH: recorded (a file's path, relative to the study's folder; the
 * reader opens nothing) */
static int read_study_model(study_reader *sr) {
  kli_token t;
  int st;
  if (sr->model_line != 0)
    return kli_read_fail(&sr->r, KL_ESYNTAX, 1, "a study has one 'model'");
  if ((st = kli_next_token(&sr->r, &t)) != KL_OK)
    return st;
  if (t.kind == KLI_TOKEN_END)
    return kli_read_fail(&sr->r, KL_ESYNTAX, t.column,
                         "expected the model file's path, found the end of the "
                         "line");
  if ((st = kli_expect_end(&sr->r)) != KL_OK)
    return st;
  sr->model_line = sr->r.line;
  if (sr->finding) {
    snprintf(sr->found_path, sr->found_cap, "%s", t.text);
    sr->found_column = t.column;
    return FOUND_MODEL;
  }
  sr->st->model_path = kli_alloc(&sr->st->model->alloc, t.length + 1);
  if (sr->st->model_path == NULL)
    return kli_read_fail(&sr->r, KL_ENOMEM, 0, "out of memory");
  memcpy(sr->st->model_path, t.text, t.length + 1);
  return KL_OK;
}

static int read_study_count(study_reader *sr, const char *what, long *out) {
  double v;
  int column, st = kli_expect_number_at(&sr->r, what, &v, &column);
  if (st != KL_OK)
    return st;
  if (v != floor(v) || v < 0 || v > 9007199254740992.0)
    return kli_read_fail(&sr->r, KL_ESYNTAX, column,
                         "expected a whole number from 0 (%s), found %g", what,
                         v);
  *out = (long)v;
  return kli_expect_end(&sr->r);
}

/* joint REF a|b x|y, or point REF x|y; its column into *column */
static int read_dimension(study_reader *sr, kl_dimension *d, int *column) {
  kli_token t;
  int st;
  if ((st = kli_next_token(&sr->r, &t)) != KL_OK)
    return st;
  *column = t.column;
  if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "joint") == 0) {
    kli_token side;
    if ((st = kli_expect_ref(&sr->r, KLI_REF_JOINT, "the joint that moves",
                             &d->id)) != KL_OK ||
        (st = kli_next_token(&sr->r, &side)) != KL_OK)
      return st;
    if (side.kind != KLI_TOKEN_WORD ||
        (strcmp(side.text, "a") != 0 && strcmp(side.text, "b") != 0))
      return kli_read_fail(&sr->r, KL_ESYNTAX, side.column,
                           "expected the joint's side, a or b, found '%.60s'",
                           kli_token_shown(&side));
    d->kind = side.text[0] == 'a' ? KL_DIMENSION_JOINT_A : KL_DIMENSION_JOINT_B;
  } else if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "point") == 0) {
    if ((st = kli_expect_ref(&sr->r, KLI_REF_POINT, "the point that moves",
                             &d->id)) != KL_OK)
      return st;
    d->kind = KL_DIMENSION_POINT;
  } else {
    return kli_read_fail(
        &sr->r, KL_ESYNTAX, t.column,
        "expected 'joint' or 'point' (the dimension that varies), "
        "found '%.60s'",
        kli_token_shown(&t));
  }
  if ((st = kli_next_token(&sr->r, &t)) != KL_OK)
    return st;
  if (t.kind != KLI_TOKEN_WORD ||
      (strcmp(t.text, "x") != 0 && strcmp(t.text, "y") != 0))
    return kli_read_fail(&sr->r, KL_ESYNTAX, t.column,
                         "expected the local axis, x or y, found '%.60s'",
                         kli_token_shown(&t));
  d->axis = t.text[0] == 'x' ? 0 : 1;
  return KL_OK;
}

/* The dimension of the vary or grid statement being read, new to the study:
 * one that varied twice would have only its later value used. */
static int varied_once(study_reader *sr, kli_vary *v, int column) {
  const kl_dimension *d = &v->dim;
  int i;
  for (i = 0; i < sr->st->nvary; i++) {
    const kl_dimension *e = &sr->st->vary[i].dim;
    if (e->kind == d->kind && e->id == d->id && e->axis == d->axis)
      return kli_read_fail(&sr->r, KL_ESYNTAX, column,
                           "this dimension varies already, on line %d: a study "
                           "varies each dimension once",
                           sr->st->vary[i].line);
  }
  v->line = sr->r.line;
  return KL_OK;
}

static int push_vary(study_reader *sr, kli_vary **v) {
  if (kli_reserve(&sr->st->model->alloc, (void **)&sr->st->vary,
                  &sr->st->cap_vary, sr->st->nvary + 1, sizeof **v) != KL_OK)
    return kli_read_fail(&sr->r, KL_ENOMEM, 0, "out of memory");
  *v = &sr->st->vary[sr->st->nvary];
  memset(*v, 0, sizeof **v);
  return KL_OK;
}

/* vary DIMENSION tolerance T normal|uniform */
static int read_vary(study_reader *sr) {
  kli_vary *v;
  kli_token how;
  int st, column;
  if ((st = study_needs_model(sr, 1)) != KL_OK || (st = push_vary(sr, &v)) ||
      (st = read_dimension(sr, &v->dim, &column)) != KL_OK ||
      (st = varied_once(sr, v, column)) != KL_OK ||
      (st = kli_expect_keyword(&sr->r, "tolerance", "after the dimension")) !=
          KL_OK ||
      (st = kli_expect_number_at(&sr->r, "the tolerance", &v->tolerance,
                                 &column)) != KL_OK ||
      (st = kli_next_token(&sr->r, &how)) != KL_OK)
    return st;
  if (!(v->tolerance >= 0.0))
    return kli_read_fail(&sr->r, KL_ESYNTAX, column,
                         "a tolerance is not negative (found %g)",
                         v->tolerance);
  if (how.kind == KLI_TOKEN_WORD && strcmp(how.text, "normal") == 0)
    v->how = KLI_VARY_NORMAL;
  else if (how.kind == KLI_TOKEN_WORD && strcmp(how.text, "uniform") == 0)
    v->how = KLI_VARY_UNIFORM;
  else
    return kli_read_fail(&sr->r, KL_ESYNTAX, how.column,
                         "expected the distribution, normal or uniform, found "
                         "'%.60s'",
                         kli_token_shown(&how));
  if ((st = kli_expect_end(&sr->r)) != KL_OK)
    return st;
  sr->st->nvary++;
  return KL_OK;
}

/* grid DIMENSION from A to B steps N */
static int read_grid(study_reader *sr) {
  kli_vary *v;
  int st, column;
  if ((st = study_needs_model(sr, 1)) != KL_OK || (st = push_vary(sr, &v)) ||
      (st = read_dimension(sr, &v->dim, &column)) != KL_OK ||
      (st = varied_once(sr, v, column)) != KL_OK ||
      (st = kli_expect_keyword(&sr->r, "from", "after the dimension")) !=
          KL_OK ||
      (st = kli_expect_number(&sr->r, "the first value", &v->from)) != KL_OK ||
      (st = kli_expect_keyword(&sr->r, "to", "after the first value")) !=
          KL_OK ||
      (st = kli_expect_number(&sr->r, "the last value", &v->to)) != KL_OK ||
      (st = kli_expect_keyword(&sr->r, "steps", "after the last value")) !=
          KL_OK ||
      (st = kli_expect_steps(&sr->r, &v->steps)) !=
          KL_OK ||
      (st = kli_expect_end(&sr->r)) != KL_OK)
    return st;
  v->how = KLI_VARY_GRID;
  sr->st->nvary++;
  return KL_OK;
}

/* load force POINT FX FY | load torque LINK T */
static int read_load(study_reader *sr) {
  kl_load l;
  int st;
  if ((st = study_needs_model(sr, 1)) != KL_OK ||
      (st = kli_expect_load(&sr->r, &l)) != KL_OK)
    return st;
  if (kli_reserve(&sr->st->model->alloc, (void **)&sr->st->loads,
                  &sr->st->cap_loads, sr->st->nloads + 1, sizeof l) != KL_OK)
    return kli_read_fail(&sr->r, KL_ENOMEM, 0, "out of memory");
  sr->st->loads[sr->st->nloads++] = l;
  return KL_OK;
}

/* angle LINK | slide JOINT | joint-angle JOINT | x POINT | y POINT |
 * transmission JOINT JOINT JOINT */
static int read_output_spec(study_reader *sr, kli_judge *j) {
  kli_token t;
  int st;
  kl_output *o = &j->what;
  double deg = sr->r.angle_deg ? 180.0 / KLI_PI : 1.0;
  if ((st = kli_next_token(&sr->r, &t)) != KL_OK)
    return st;
  j->to_file = 1.0;
  o->line_a = o->line_b = 0;
  if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "angle") == 0) {
    o->kind = KL_OUTPUT_LINK_ANGLE;
    j->to_file = deg;
    return kli_expect_ref(&sr->r, KLI_REF_LINK, "the link", &o->id);
  }
  if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "slide") == 0) {
    o->kind = KL_OUTPUT_SLIDE;
    return kli_expect_ref(&sr->r, KLI_REF_JOINT, "the sliding joint", &o->id);
  }
  if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "joint-angle") == 0) {
    o->kind = KL_OUTPUT_JOINT_ANGLE;
    j->to_file = deg;
    return kli_expect_ref(&sr->r, KLI_REF_JOINT, "the joint", &o->id);
  }
  if (t.kind == KLI_TOKEN_WORD &&
      (strcmp(t.text, "x") == 0 || strcmp(t.text, "y") == 0)) {
    o->kind = t.text[0] == 'x' ? KL_OUTPUT_POINT_X : KL_OUTPUT_POINT_Y;
    return kli_expect_ref(&sr->r, KLI_REF_POINT, "the point", &o->id);
  }
  if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "transmission") == 0) {
    o->kind = KL_OUTPUT_TRANSMISSION;
    j->to_file = deg;
    if ((st = kli_expect_ref(&sr->r, KLI_REF_JOINT, "the revolute joint",
                             &o->id)) ||
        (st = kli_expect_ref(&sr->r, KLI_REF_JOINT,
                             "the joint of link a's line", &o->line_a)) ||
        (st = kli_expect_ref(&sr->r, KLI_REF_JOINT,
                             "the joint of link b's line", &o->line_b)))
      return st;
    return KL_OK;
  }
  return kli_read_fail(
      &sr->r, KL_ESYNTAX, t.column,
      "expected what to measure (angle, slide, joint-angle, x, y "
      "or transmission), found '%.60s'",
      kli_token_shown(&t));
}

/* output NAME swing|min|max SPEC | output NAME at VALUE SPEC |
 * output NAME reach | output NAME effort */
static int read_output(study_reader *sr) {
  kli_token name, how;
  kli_judge *j;
  int st, i;
  if ((st = study_needs_model(sr, 1)) != KL_OK ||
      (st = kli_next_token(&sr->r, &name)) != KL_OK)
    return st;
  if (!((name.kind == KLI_TOKEN_WORD && kli_is_identifier(name.text)) ||
        name.kind == KLI_TOKEN_STRING) ||
      name.length >= sizeof j->name)
    return kli_read_fail(
        &sr->r, KL_ESYNTAX, name.column,
        "expected the output's name (a word or a quoted name of "
        "at most %d bytes), found '%.60s'",
        (int)sizeof j->name - 1, kli_token_shown(&name));
  for (i = 0; i < sr->st->njudge; i++)
    if (strcmp(sr->st->judge[i].name, name.text) == 0)
      return kli_read_fail(&sr->r, KL_ESYNTAX, name.column,
                           "the output name '%.60s' is already used",
                           name.text);
  if (kli_reserve(&sr->st->model->alloc, (void **)&sr->st->judge,
                  &sr->st->cap_judge, sr->st->njudge + 1, sizeof *j) != KL_OK)
    return kli_read_fail(&sr->r, KL_ENOMEM, 0, "out of memory");
  j = &sr->st->judge[sr->st->njudge];
  memset(j, 0, sizeof *j);
  j->to_file = 1.0; /* angles set their own when the spec is read */
  memcpy(j->name, name.text, name.length + 1);
  if ((st = kli_next_token(&sr->r, &how)) != KL_OK)
    return st;
  if (how.kind == KLI_TOKEN_WORD && strcmp(how.text, "swing") == 0)
    j->how = KLI_JUDGE_SWING;
  else if (how.kind == KLI_TOKEN_WORD && strcmp(how.text, "min") == 0)
    j->how = KLI_JUDGE_MIN;
  else if (how.kind == KLI_TOKEN_WORD && strcmp(how.text, "max") == 0)
    j->how = KLI_JUDGE_MAX;
  else if (how.kind == KLI_TOKEN_WORD && strcmp(how.text, "at") == 0)
    j->how = KLI_JUDGE_AT;
  else if (how.kind == KLI_TOKEN_WORD && strcmp(how.text, "reach") == 0)
    j->how = KLI_JUDGE_REACH;
  else if (how.kind == KLI_TOKEN_WORD && strcmp(how.text, "effort") == 0)
    j->how = KLI_JUDGE_EFFORT;
  else
    return kli_read_fail(&sr->r, KL_ESYNTAX, how.column,
                         "expected how to judge (swing, min, max, at, reach or "
                         "effort), found '%.60s'",
                         kli_token_shown(&how));
  if (j->how == KLI_JUDGE_AT &&
      (st = kli_expect_number(&sr->r, "the input value", &j->at)) != KL_OK)
    return st;
  if (j->how != KLI_JUDGE_REACH && j->how != KLI_JUDGE_EFFORT &&
      (st = read_output_spec(sr, j)) != KL_OK)
    return st;
  if ((st = kli_expect_end(&sr->r)) != KL_OK)
    return st;
  sr->st->njudge++;
  return KL_OK;
}

/* limit NAME LOWER UPPER */
static int read_limit(study_reader *sr) {
  kli_token name;
  int st, i, column;
  double lower, upper;
  if ((st = kli_next_token(&sr->r, &name)) != KL_OK)
    return st;
  for (i = 0; i < sr->st->njudge; i++)
    if (strcmp(sr->st->judge[i].name, name.text) == 0)
      break;
  if (i == sr->st->njudge)
    return kli_read_fail(&sr->r, KL_ESYNTAX, name.column,
                         "no output is named '%.60s'; declare it with 'output' "
                         "first",
                         kli_token_shown(&name));
  if ((st = given_once(sr, &sr->st->judge[i].limit_line,
                       "this output's 'limit'")) != KL_OK ||
      (st = kli_expect_number(&sr->r, "the lower limit", &lower)) != KL_OK ||
      (st = kli_expect_number_at(&sr->r, "the upper limit", &upper, &column)) !=
          KL_OK ||
      (st = kli_expect_end(&sr->r)) != KL_OK)
    return st;
  if (!(upper >= lower))
    return kli_read_fail(&sr->r, KL_ESYNTAX, column,
                         "the upper limit %g is below the lower %g", upper,
                         lower);
  sr->st->judge[i].has_limits = 1;
  sr->st->judge[i].lower = lower;
  sr->st->judge[i].upper = upper;
  return KL_OK;
}

static int read_study_statement(study_reader *sr, const kli_token *key) {
  kli_reader *r = &sr->r;
  const char *k = key->text;
  kl_sweep_settings sw;
  int st;
  long n;
  if (!r->seen_header) {
    double version;
    int column;
    if (key->kind != KLI_TOKEN_WORD || strcmp(k, "kinloop-study") != 0)
      return kli_read_fail(
          r, KL_ESYNTAX, key->column,
          "expected 'kinloop-study %d' as the first statement, "
          "found '%.60s'",
          KLI_FORMAT_VERSION, k);
    if ((st = kli_expect_number_at(r, "the format version", &version, &column)))
      return st;
    if (version != KLI_FORMAT_VERSION)
      return kli_read_fail(
          r, KL_ESYNTAX, column,
          "this is study version %g; kinloop %s reads version %d", version,
          KINLOOP_VERSION, KLI_FORMAT_VERSION);
    r->seen_header = 1;
    return kli_expect_end(r);
  }
  if (key->kind == KLI_TOKEN_WORD && strcmp(k, "model") == 0)
    return read_study_model(sr);
  if (key->kind == KLI_TOKEN_WORD && strcmp(k, "seed") == 0) {
    if ((st = given_once(sr, &sr->seed_line, "'seed'")) != KL_OK ||
        (st = read_study_count(sr, "the seed", &n)) != KL_OK)
      return st;
    sr->st->seed = (unsigned long long)n;
    return KL_OK;
  }
  if (key->kind == KLI_TOKEN_WORD && strcmp(k, "samples") == 0) {
    if ((st = given_once(sr, &sr->samples_line, "'samples'")) != KL_OK)
      return st;
    return read_study_count(sr, "the number of samples", &sr->st->samples);
  }
  if (key->kind == KLI_TOKEN_WORD && strcmp(k, "vary") == 0)
    return read_vary(sr);
  if (key->kind == KLI_TOKEN_WORD && strcmp(k, "grid") == 0)
    return read_grid(sr);
  if (key->kind == KLI_TOKEN_WORD && strcmp(k, "load") == 0)
    return read_load(sr);
  if (key->kind == KLI_TOKEN_WORD && strcmp(k, "output") == 0)
    return read_output(sr);
  if (key->kind == KLI_TOKEN_WORD && strcmp(k, "limit") == 0)
    return read_limit(sr);
  if (key->kind == KLI_TOKEN_WORD && strcmp(k, "sweep") == 0) {
    if ((st = study_needs_model(sr, key->column)) != KL_OK ||
        (st = given_once(sr, &sr->sweep_line, "'sweep'")) != KL_OK ||
        (st = kli_expect_sweep(r, &sw)) != KL_OK)
      return st;
    sr->st->sweep = sw;
    return KL_OK;
  }
  return kli_read_fail(
      r, KL_ESYNTAX, key->column,
      "unknown statement '%.60s' (expected model, seed, samples, "
      "vary, grid, load, output, limit or sweep)",
      k);
}

/* What the statements together must say. */
static int check_study(study_reader *sr) {
  kl_study *st = sr->st;
  int i, grids = 0;
  sr->r.line = 0;
  if (st->njudge == 0)
    return kli_read_fail(&sr->r, KL_ESYNTAX, 0, "the study judges no output");
  if (st->sweep.size == 0)
    return kli_read_fail(
        &sr->r, KL_ESYNTAX, 0,
        "the study needs sweep settings (a 'sweep' statement here "
        "or in its model)");
  for (i = 0; i < st->nvary; i++)
    grids += st->vary[i].how == KLI_VARY_GRID;
  if (grids > 0 && grids < st->nvary)
    return kli_read_fail(
        &sr->r, KL_ESYNTAX, 0,
        "a study is either a grid or tolerances: this one mixes "
        "%d grid and %d tolerance dimensions",
        grids, st->nvary - grids);
  st->grid = grids > 0;
  if (st->grid) {
    double count = 1.0;
    if (sr->samples_line != 0)
      return kli_read_fail(&sr->r, KL_ESYNTAX, 0,
                           "a grid study has as many samples as grid points: "
                           "leave 'samples' out");
    for (i = 0; i < st->nvary; i++)
      count *= st->vary[i].steps + 1;
    if (count > 1e9)
      return kli_read_fail(&sr->r, KL_ESYNTAX, 0,
                           "the grid has %.3g points; at most 1e9", count);
    st->samples = (long)count;
  } else if (sr->samples_line == 0) {
    return kli_read_fail(&sr->r, KL_ESYNTAX, 0,
                         "a tolerance study says how many 'samples' to draw");
  }
  for (i = 0; i < st->njudge; i++)
    if (st->judge[i].how == KLI_JUDGE_EFFORT && st->nloads == 0)
      return kli_read_fail(
          &sr->r, KL_ESYNTAX, 0,
          "output '%.60s' judges the input effort, but the study "
          "gives no 'load'",
          st->judge[i].name);
  return KL_OK;
}

/* Each 'at' output within reach: its continuation from the sweep's start
 * takes no more than KL_MAX_STEPS steps (checked once the values are in
 * API units, so in doubles: never an oversized cast). */
static int check_at_outputs(study_reader *sr) {
  const kl_study *st = sr->st;
  int k;
  for (k = 0; k < st->njudge; k++) {
    const kli_judge *j = &st->judge[k];
    double steps;
    if (j->how != KLI_JUDGE_AT)
      continue;
    steps = kli_study_steps_to(st, j->at);
    if (!(steps <= KL_MAX_STEPS)) {
      sr->r.line = 0;
      return kli_read_fail(
          &sr->r, KL_ETOOLARGE, 0,
          "output '%.60s': its input value lies so far outside the sweep "
          "that reaching it from the sweep's start in steps no longer than "
          "the sweep's takes %.3g steps; at most %d (KL_MAX_STEPS)",
          j->name, steps, KL_MAX_STEPS);
    }
  }
  return KL_OK;
}

/* Every statement, then the header's presence: KL_OK, FOUND_MODEL, or a
 * status with the error located. */
static int read_statements(study_reader *sr) {
  int st = KL_OK;
  while (st == KL_OK && sr->r.pos < sr->r.length) {
    kli_token key;
    if ((st = kli_next_token(&sr->r, &key)) != KL_OK)
      break;
    if (key.kind != KLI_TOKEN_END)
      st = read_study_statement(sr, &key);
    if (st == KL_OK)
      kli_next_line(&sr->r);
  }
  if (st == KL_OK && !sr->r.seen_header)
    st = kli_io_fail(sr->r.err, KL_ESYNTAX, 0, 0,
                     "empty study: expected 'kinloop-study %d'",
                       KLI_FORMAT_VERSION);
  return st;
}

int kli_study_find_model(const char *text, size_t length, char *path,
                         size_t cap, int *line, int *column, kl_io_error *err) {
  study_reader sr;
  kl_study none; /* what the statements before 'model' record */
  int st;
  memset(&sr, 0, sizeof sr);
  memset(&none, 0, sizeof none);
  kli_reader_start(&sr.r, text, length, err);
  sr.st = &none;
  sr.finding = 1;
  sr.found_path = path;
  sr.found_cap = cap;
  if ((st = kli_check_text(&sr.r, "study")) != KL_OK)
    return st;
  st = read_statements(&sr);
  if (st == FOUND_MODEL) {
    *line = sr.model_line;
    *column = sr.found_column;
    return KL_OK;
  }
  if (st == KL_OK) {
    sr.r.line = 0;
    st = kli_read_fail(&sr.r, KL_ESYNTAX, 0, "the study names no model");
  }
  return st;
}

kl_study *kl_study_read(const char *text, size_t length, const kl_model *model,
                        kl_io_error *err) {
  study_reader sr;
  int st;
  memset(&sr, 0, sizeof sr);
  kli_reader_start(&sr.r, text, length, err);
  if (model == NULL || !model->finalized) {
    kli_io_fail(err, model == NULL ? KL_EINVAL : KL_ESTATE, 0, 0,
                "read study: %s",
                model == NULL ? "no model (NULL)"
                              : "the model is not finalized; a study "
                                "is read against a finalized model");
    return NULL;
  }
  if (kli_check_text(&sr.r, "study") != KL_OK)
    return NULL;
  sr.st = kli_study_new(model);
  if (sr.st == NULL) {
    kli_read_fail(&sr.r, KL_ENOMEM, 0, "out of memory");
    return NULL;
  }
  sr.r.m = model;
  sr.r.angle_deg = model->angle_unit == KL_ANGLE_DEG;
  if (model->has_sweep)
    sr.st->sweep = model->sweep;
  st = read_statements(&sr);
  if (st == KL_OK)
    st = check_study(&sr);
  if (st == KL_OK) {
    char why[KLI_MESSAGE_SIZE];
    st = kli_study_resolve(sr.st, why);
    if (st != KL_OK)
      kli_read_fail(&sr.r, st, 0, "the nominal model: %s", why);
  }
  if (st == KL_OK)
    st = check_at_outputs(&sr);
  if (st != KL_OK) {
    kl_study_free(sr.st);
    return NULL;
  }
  return sr.st;
}
