/*
 * model_read.c - the model-file reader: any bytes in, a finalized model or
 * an error at a line and column out; each statement calls its builder.
 */
#include <math.h>
#include <string.h>

#include "tokens.h"

/* The model being built, beside the tokenizer's reader (whose r.m is the
 * same model, read-only, for references). */
typedef struct {
  kli_reader r;
  kl_model *m;
  int seen_items; /* a link, joint or point was declared */
} model_reader;

/* A builder's failure, placed at the statement's line. */
static int builder_failed(model_reader *mr, int status, int column) {
  kli_reader *r = &mr->r;
  return kli_read_fail(r, status, column, "%s", kl_model_error(mr->m));
}

static int read_units(model_reader *mr) {
  kli_reader *r = &mr->r;
  static const char *lengths[] = {"unstated", "mm", "m", "in"};
  kli_token t;
  int st, length = -1, i;
  if (mr->seen_items)
    return kli_read_fail(
        r, KL_ESYNTAX, 1,
        "'units' must come before the first link, joint or point");
  if ((st = kli_expect_keyword(r, "length", "after 'units'")) != KL_OK ||
      (st = kli_next_token(r, &t)) != KL_OK)
    return st;
  for (i = 0; i < 4; i++)
    if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, lengths[i]) == 0)
      length = i;
  if (length < 0)
    return kli_read_fail(
        r, KL_ESYNTAX, t.column,
        "expected a length unit (mm, m, in or unstated), found "
        "'%.60s'",
        kli_token_shown(&t));
  if ((st = kli_expect_keyword(r, "angle", "after the length unit")) != KL_OK ||
      (st = kli_next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind != KLI_TOKEN_WORD ||
      (strcmp(t.text, "deg") != 0 && strcmp(t.text, "rad") != 0))
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected an angle unit (deg or rad), found '%.60s'",
                         kli_token_shown(&t));
  r->angle_deg = strcmp(t.text, "deg") == 0;
  if ((st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_model_set_units(mr->m, length,
                          r->angle_deg ? KL_ANGLE_DEG : KL_ANGLE_RAD);
  return st == KL_OK ? KL_OK : builder_failed(mr, st, 1);
}

static int read_link(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token name_tok;
  const char *name;
  int st;
  if ((st = kli_expect_new_name(r, "link", &name_tok, &name)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_add_link(mr->m, name);
  return st >= 0 ? KL_OK : builder_failed(mr, st, name_tok.column);
}

/* revolute NAME LINK X Y LINK X Y; prismatic and slot add 'axis ANGLE'
 * after the first attachment. */
static int read_joint(model_reader *mr, int kind) {
  kli_reader *r = &mr->r;
  kli_token name_tok;
  const char *name;
  int st, a, b, joint;
  double ax, ay, bx, by, axis = 0.0;
  if ((st = kli_expect_new_name(r, "joint", &name_tok, &name)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_LINK, "the joint's first link", &a)) !=
          KL_OK ||
      (st = kli_expect_number(r, "x on the first link", &ax)) != KL_OK ||
      (st = kli_expect_number(r, "y on the first link", &ay)) != KL_OK)
    return st;
  if (kind != KL_JOINT_REVOLUTE &&
      ((st = kli_expect_keyword(r, "axis", "before the slide axis angle")) !=
           KL_OK ||
       (st = kli_expect_number(r, "the slide axis angle", &axis)) != KL_OK))
    return st;
  if ((st = kli_expect_ref(r, KLI_REF_LINK, "the joint's second link", &b)) !=
          KL_OK ||
      (st = kli_expect_number(r, "x on the second link", &bx)) != KL_OK ||
      (st = kli_expect_number(r, "y on the second link", &by)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  joint =
      kind == KL_JOINT_REVOLUTE ? kl_add_revolute(mr->m, a, ax, ay, b, bx, by)
      : kind == KL_JOINT_PRISMATIC
          ? kl_add_prismatic(mr->m, a, ax, ay, kli_angle_in(r, axis), b, bx, by)
          : kl_add_slot(mr->m, a, ax, ay, kli_angle_in(r, axis), b, bx, by);
  if (joint < 0)
    return builder_failed(mr, joint, name_tok.column);
  if (name != NULL &&
      (st = kl_model_set_joint_name(mr->m, joint, name)) != KL_OK)
    return builder_failed(mr, st, name_tok.column);
  return KL_OK;
}

static int read_point(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token name_tok;
  const char *name;
  int st, link;
  double x, y;
  if ((st = kli_expect_new_name(r, "point", &name_tok, &name)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_LINK, "the point's link", &link)) !=
          KL_OK ||
      (st = kli_expect_number(r, "the point's x", &x)) != KL_OK ||
      (st = kli_expect_number(r, "the point's y", &y)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_add_point(mr->m, link, x, y, name);
  return st >= 0 ? KL_OK : builder_failed(mr, st, name_tok.column);
}

static int read_input(model_reader *mr) {
  kli_reader *r = &mr->r;
  int st, joint;
  if ((st = kli_expect_ref(r, KLI_REF_JOINT, "the driven joint", &joint)) !=
          KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_add_input(mr->m, joint);
  return st >= 0 ? KL_OK : builder_failed(mr, st, 1);
}

static int read_loop(model_reader *mr) {
  kli_reader *r = &mr->r;
  int st, n = 0, cap = 0, *joints = NULL;
  for (;;) {
    kli_token peek;
    size_t save = r->pos;
    int joint;
    if ((st = kli_next_token(r, &peek)) != KL_OK)
      break;
    if (peek.kind == KLI_TOKEN_END)
      break;
    r->pos = save;
    if ((st = kli_expect_ref(r, KLI_REF_JOINT, "a joint of the loop",
                             &joint)) != KL_OK)
      break;
    if (kli_reserve(&mr->m->alloc, (void **)&joints, &cap, n + 1,
                    sizeof *joints) != KL_OK) {
      st = kli_read_fail(r, KL_ENOMEM, 1, "out of memory");
      break;
    }
    joints[n++] = joint;
  }
  if (st == KL_OK) {
    st = kl_add_loop(mr->m, n, joints);
    st = st >= 0 ? KL_OK : builder_failed(mr, st, 1);
  }
  kli_free(&mr->m->alloc, joints, (size_t)cap * sizeof *joints);
  return st;
}

/* sketch angle LINK VALUE | sketch slide JOINT VALUE */
static int read_sketch(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token t;
  int st, id;
  double v;
  if ((st = kli_next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "angle") == 0) {
    if ((st = kli_expect_ref(r, KLI_REF_LINK, "the sketched link", &id)) !=
            KL_OK ||
        (st = kli_expect_number(r, "the sketch angle", &v)) != KL_OK ||
        (st = kli_expect_end(r)) != KL_OK)
      return st;
    st = kl_model_set_sketch_angle(mr->m, id, kli_angle_in(r, v));
  } else if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "slide") == 0) {
    if ((st = kli_expect_ref(r, KLI_REF_JOINT, "the sketched joint", &id)) !=
            KL_OK ||
        (st = kli_expect_number(r, "the sketch slide", &v)) != KL_OK ||
        (st = kli_expect_end(r)) != KL_OK)
      return st;
    st = kl_model_set_sketch_slide(mr->m, id, v);
  } else {
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected 'angle' or 'slide' after 'sketch', found "
                         "'%.60s'",
                         kli_token_shown(&t));
  }
  return st == KL_OK ? KL_OK : builder_failed(mr, st, t.column);
}

/* sweep JOINT from V to V steps N */
static int read_sweep(model_reader *mr) {
  kli_reader *r = &mr->r;
  kl_sweep_settings sw;
  int st = kli_expect_sweep(r, &sw);
  if (st != KL_OK)
    return st;
  st = kl_model_set_sweep(mr->m, &sw);
  return st == KL_OK ? KL_OK : builder_failed(mr, st, 1);
}

/* ---- the force stage's statements: mass properties, gravity, loads, the
 * working speed, the declared redundancy ---- */

/* The column where the next token starts, the reader left before it. */
static int next_column(kli_reader *r, int *column) {
  kli_token t;
  size_t save = r->pos;
  int st = kli_next_token(r, &t);
  r->pos = save;
  *column = t.column;
  return st;
}

/* mass LINK M at X Y inertia J */
static int read_mass(model_reader *mr) {
  kli_reader *r = &mr->r;
  int st, link, link_column, mass_column, inertia_column;
  double mass, x, y, inertia;
  if ((st = next_column(r, &link_column)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_LINK, "the link with the mass", &link)) !=
          KL_OK ||
      (st = kli_expect_number_at(r, "the mass", &mass, &mass_column)) !=
          KL_OK ||
      (st = kli_expect_keyword(r, "at", "before the centre of mass")) !=
          KL_OK ||
      (st = kli_expect_number(r, "the centre of mass's x", &x)) != KL_OK ||
      (st = kli_expect_number(r, "the centre of mass's y", &y)) != KL_OK ||
      (st = kli_expect_keyword(r, "inertia", "after the centre of mass")) !=
          KL_OK ||
      (st = kli_expect_number_at(r, "the moment of inertia", &inertia,
                                 &inertia_column)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_set_link_mass(mr->m, link, mass, x, y, inertia);
  return st == KL_OK ? KL_OK
                     : builder_failed(mr, st,
                                      st == KL_EINVAL ? (mass < 0.0 ? mass_column
                                                                    : inertia_column)
                                                      : link_column);
}

/* gravity GX GY */
static int read_gravity(model_reader *mr) {
  kli_reader *r = &mr->r;
  double gx, gy;
  int st;
  if ((st = kli_expect_number(r, "gravity's x", &gx)) != KL_OK ||
      (st = kli_expect_number(r, "gravity's y", &gy)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_model_set_gravity(mr->m, gx, gy);
  return st == KL_OK ? KL_OK : builder_failed(mr, st, 1);
}

/* load force POINT FX FY | load torque LINK T */
static int read_load(model_reader *mr) {
  kl_load l;
  int st = kli_expect_load(&mr->r, &l);
  if (st != KL_OK)
    return st;
  st = kl_add_load(mr->m, &l);
  return st >= 0 ? KL_OK : builder_failed(mr, st, 1);
}

/* speed JOINT W [fluctuation CS]: W in the file's angle unit (or length
 * unit, for a sliding input) per time unit */
static int read_speed(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token t;
  int st, joint, joint_column, input, cs_column = 1;
  double speed, cs = 0.0;
  if ((st = next_column(r, &joint_column)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_JOINT, "the driven input's joint",
                           &joint)) != KL_OK ||
      (st = kli_expect_number(r, "the working speed", &speed)) != KL_OK ||
      (st = kli_next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "fluctuation") == 0) {
    if ((st = kli_expect_number_at(r, "the coefficient of speed fluctuation",
                                   &cs, &cs_column)) != KL_OK ||
        (st = kli_expect_end(r)) != KL_OK)
      return st;
  } else if (t.kind != KLI_TOKEN_END) {
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected 'fluctuation' or the end of the line after "
                         "the working speed, found '%.60s'",
                         kli_token_shown(&t));
  }
  input = kli_input_of(mr->m, joint);
  if (input < 0) {
    char label[96];
    return kli_read_fail(r, KL_EKIND, joint_column,
                         "%s is not an input; declare it with 'input' before "
                         "its working speed",
                         kli_joint_label(mr->m, joint, label, sizeof label));
  }
  if (mr->m->joints[joint].kind == KL_JOINT_REVOLUTE)
    speed = kli_angle_in(r, speed);
  st = kl_model_set_speed(mr->m, input, speed, cs);
  return st == KL_OK ? KL_OK : builder_failed(mr, st, cs_column);
}

/* redundant N: N >= 0 constraints repeat what the others impose */
static int read_redundant(model_reader *mr) {
  kli_reader *r = &mr->r;
  double n;
  int st, column;
  if ((st = kli_expect_number_at(r, "the number of redundant constraints", &n,
                                 &column)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  if (n != floor(n) || n > 1e9)
    return kli_read_fail(r, KL_ESYNTAX, column,
                         "expected a whole number (the number of redundant "
                         "constraints), found %g",
                         n);
  st = kl_model_set_redundancy(mr->m, (int)fmax(n, -1e9));
  return st == KL_OK ? KL_OK : builder_failed(mr, st, column);
}

/* ---- couplings and point inputs ---- */

/* gears JOINT1 JOINT2 R1 R2 | rack PINION RACK R | couple JOINT1 JOINT2 RATIO */
static int read_coupling(model_reader *mr, int kind) {
  kli_reader *r = &mr->r;
  int st, j1, j2, column;
  double v1, v2 = 0.0;
  if ((st = kli_expect_ref(r, KLI_REF_JOINT, "the first coupled joint",
                           &j1)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_JOINT, "the second coupled joint",
                           &j2)) != KL_OK ||
      (st = kli_expect_number_at(r,
                                 kind == KL_COUPLING_RATIO ? "the ratio"
                                                           : "a radius",
                                 &v1, &column)) != KL_OK ||
      (kind == KL_COUPLING_GEAR &&
       (st = kli_expect_number(r, "the second radius", &v2)) != KL_OK) ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kind == KL_COUPLING_GEAR   ? kl_add_gear_pair(mr->m, j1, j2, v1, v2)
       : kind == KL_COUPLING_RACK ? kl_add_rack_pinion(mr->m, j1, j2, v1)
                                  : kl_add_coupling(mr->m, j1, j2, v1);
  return st >= 0 ? KL_OK : builder_failed(mr, st, column);
}

static int read_gears(model_reader *mr) {
  return read_coupling(mr, KL_COUPLING_GEAR);
}
static int read_rack(model_reader *mr) {
  return read_coupling(mr, KL_COUPLING_RACK);
}
static int read_couple(model_reader *mr) {
  return read_coupling(mr, KL_COUPLING_RATIO);
}

/* drive POINT x|y: a point input */
static int read_drive(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token t;
  int st, point, axis;
  if ((st = kli_expect_ref(r, KLI_REF_POINT, "the driven point", &point)) !=
      KL_OK)
    return st;
  if ((st = kli_next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind != KLI_TOKEN_WORD ||
      (strcmp(t.text, "x") != 0 && strcmp(t.text, "y") != 0))
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected the driven coordinate, x or y, found "
                         "'%.60s'",
                         kli_token_shown(&t));
  axis = strcmp(t.text, "y") == 0;
  if ((st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_add_point_input(mr->m, point, axis);
  return st >= 0 ? KL_OK : builder_failed(mr, st, t.column);
}

typedef int (*statement_reader)(model_reader *mr);

/* The reader of a coupling or point-input statement word, or NULL. */
static statement_reader coupling_statement(const char *word) {
  static const struct {
    const char *word;
    statement_reader read;
  } table[] = {{"gears", read_gears},
               {"rack", read_rack},
               {"couple", read_couple},
               {"drive", read_drive}};
  size_t i;
  for (i = 0; i < sizeof table / sizeof table[0]; i++)
    if (strcmp(word, table[i].word) == 0)
      return table[i].read;
  return NULL;
}

/* The reader of a force-stage statement word, or NULL. */
static statement_reader force_statement(const char *word) {
  static const struct {
    const char *word;
    statement_reader read;
  } table[] = {{"mass", read_mass},
               {"gravity", read_gravity},
               {"load", read_load},
               {"speed", read_speed},
               {"redundant", read_redundant}};
  size_t i;
  for (i = 0; i < sizeof table / sizeof table[0]; i++)
    if (strcmp(word, table[i].word) == 0)
      return table[i].read;
  return NULL;
}

static int read_header(model_reader *mr) {
  kli_reader *r = &mr->r;
  double version;
  int column,
      st = kli_expect_number_at(r, "the format version", &version, &column);
  if (st != KL_OK)
    return st;
  if (version != KLI_FORMAT_VERSION)
    return kli_read_fail(
        r, KL_ESYNTAX, column,
        "this is format version %g; kinloop %s reads version %d", version,
        KINLOOP_VERSION, KLI_FORMAT_VERSION);
  r->seen_header = 1;
  return kli_expect_end(r);
}

static int read_statement(model_reader *mr, const kli_token *key) {
  kli_reader *r = &mr->r;
  const char *k = key->text;
  if (!r->seen_header) {
    if (key->kind == KLI_TOKEN_WORD && strcmp(k, "kinloop-model") == 0)
      return read_header(mr);
    return kli_read_fail(r, KL_ESYNTAX, key->column,
                         "expected 'kinloop-model %d' as the first statement, "
                         "found '%.60s'",
                         KLI_FORMAT_VERSION, k);
  }
  if (key->kind != KLI_TOKEN_WORD)
    return kli_read_fail(r, KL_ESYNTAX, key->column,
                         "expected a statement word, found a quoted name");
  if (strcmp(k, "units") == 0)
    return read_units(mr);
  mr->seen_items = 1;
  if (strcmp(k, "link") == 0)
    return read_link(mr);
  if (strcmp(k, "revolute") == 0)
    return read_joint(mr, KL_JOINT_REVOLUTE);
  if (strcmp(k, "prismatic") == 0)
    return read_joint(mr, KL_JOINT_PRISMATIC);
  if (strcmp(k, "slot") == 0)
    return read_joint(mr, KL_JOINT_SLOT);
  if (strcmp(k, "point") == 0)
    return read_point(mr);
  if (strcmp(k, "input") == 0)
    return read_input(mr);
  if (strcmp(k, "loop") == 0)
    return read_loop(mr);
  if (strcmp(k, "sketch") == 0)
    return read_sketch(mr);
  if (strcmp(k, "sweep") == 0)
    return read_sweep(mr);
  if (force_statement(k) != NULL)
    return force_statement(k)(mr);
  if (coupling_statement(k) != NULL)
    return coupling_statement(k)(mr);
  return kli_read_fail(
      r, KL_ESYNTAX, key->column,
      "unknown statement '%.60s' (expected units, link, "
      "revolute, prismatic, slot, point, input, drive, gears, rack, "
      "couple, loop, sketch, sweep, mass, gravity, load, speed or "
      "redundant)",
      k);
}

kl_model *kl_model_read_with_alloc(const char *text, size_t length,
                                   kl_alloc_fn fn, void *user,
                                   kl_io_error *err) {
  model_reader mr;
  kli_reader *r = &mr.r;
  int st = KL_OK;
  memset(&mr, 0, sizeof mr);
  kli_reader_start(r, text, length, err);
  if (kli_check_text(r, "model") != KL_OK)
    return NULL;
  mr.m = kl_model_new_with_alloc(fn, user);
  if (mr.m == NULL) {
    kli_read_fail(r, KL_ENOMEM, 0, "out of memory");
    return NULL;
  }
  r->m = mr.m;
  while (st == KL_OK && r->pos < r->length) {
    kli_token key;
    if ((st = kli_next_token(r, &key)) != KL_OK)
      break;
    if (key.kind != KLI_TOKEN_END)
      st = read_statement(&mr, &key);
    if (st == KL_OK)
      kli_next_line(r);
  }
  if (st == KL_OK && !r->seen_header)
    st = kli_read_fail(r, KL_ESYNTAX, 1,
                       "empty model: expected 'kinloop-model %d'",
                       KLI_FORMAT_VERSION);
  if (st == KL_OK && (st = kl_model_finalize(mr.m)) != KL_OK) {
    r->line = 0;
    kli_read_fail(r, st, 0, "%s", kl_model_error(mr.m));
  }
  if (st != KL_OK) {
    kl_model_free(mr.m);
    return NULL;
  }
  return mr.m;
}

kl_model *kl_model_read(const char *text, size_t length, kl_io_error *err) {
  return kl_model_read_with_alloc(text, length, kli_default_alloc, NULL, err);
}
