/*
 * io.c - the one module that reads and writes files: the model-file
 * reader (any bytes in, a finalized model or a line-and-column error out)
 * and the writer that gives the same model back as text.
 */
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "model.h"
#include "study.h"

#define KLI_MAX_INPUT (16u << 20) /* bytes a model file may have */
#define KLI_TOKEN_MAX 255         /* bytes in a name or a number */
#define KLI_FORMAT_VERSION 1

/* ------------------------------------------------------------------------
 * Reading
 * ------------------------------------------------------------------------ */

enum { TOKEN_END, TOKEN_WORD, TOKEN_STRING };

typedef struct {
  int kind;
  int column;
  size_t length;
  char text[KLI_TOKEN_MAX + 1];
} token;

typedef struct {
  const char *text;
  size_t length, pos;
  int line;
  size_t line_start;
  kl_model *m;
  kl_io_error *err;
  int angle_deg;
  int seen_header, seen_items;
} reader;

static int fail_at(reader *r, int status, int column, const char *fmt, ...)
#ifdef __GNUC__
    __attribute__((format(printf, 4, 5)))
#endif
    ;

static int fail_at(reader *r, int status, int column, const char *fmt, ...) {
  va_list ap;
  kl_io_error e;
  if (r->err == NULL || r->err->size < sizeof(r->err->size))
    return status;
  memset(&e, 0, sizeof e);
  e.size = r->err->size;
  e.status = status;
  e.line = r->line;
  e.column = column;
  va_start(ap, fmt);
  vsnprintf(e.message, sizeof e.message, fmt, ap);
  va_end(ap);
  memcpy(r->err, &e, r->err->size < sizeof e ? r->err->size : sizeof e);
  return status;
}

static int column_of(const reader *r, size_t pos) {
  return (int)(pos - r->line_start) + 1;
}

/* Next token on the current line; TOKEN_END at a newline, a comment or the
 * end of the input. */
static int next_token(reader *r, token *t) {
  size_t start;
  while (r->pos < r->length &&
         (r->text[r->pos] == ' ' || r->text[r->pos] == '\t' ||
          r->text[r->pos] == '\r'))
    r->pos++;
  t->length = 0;
  t->text[0] = '\0';
  t->column = column_of(r, r->pos);
  if (r->pos >= r->length || r->text[r->pos] == '\n' ||
      r->text[r->pos] == '#') {
    t->kind = TOKEN_END;
    return KL_OK;
  }
  start = r->pos;
  if (r->text[r->pos] == '"') {
    r->pos++;
    t->kind = TOKEN_STRING;
    for (;;) {
      char c;
      if (r->pos >= r->length || r->text[r->pos] == '\n')
        return fail_at(r, KL_ESYNTAX, t->column,
                       "the quoted name starting here has no closing quote");
      c = r->text[r->pos++];
      if (c == '"')
        break;
      if (c == '\\') {
        if (r->pos >= r->length ||
            (r->text[r->pos] != '"' && r->text[r->pos] != '\\'))
          return fail_at(r, KL_ESYNTAX, column_of(r, r->pos - 1),
                         "expected \\\" or \\\\ after a backslash in a name");
        c = r->text[r->pos++];
      } else if ((unsigned char)c < 0x20 || c == 0x7f) {
        return fail_at(r, KL_ESYNTAX, column_of(r, r->pos - 1),
                       "a control character cannot stand in a name");
      }
      if (t->length == KLI_TOKEN_MAX)
        return fail_at(r, KL_ESYNTAX, t->column,
                       "a name is at most %d bytes long", KLI_TOKEN_MAX);
      t->text[t->length++] = c;
    }
  } else {
    t->kind = TOKEN_WORD;
    while (r->pos < r->length && r->text[r->pos] != ' ' &&
           r->text[r->pos] != '\t' && r->text[r->pos] != '\r' &&
           r->text[r->pos] != '\n' && r->text[r->pos] != '#') {
      unsigned char c = (unsigned char)r->text[r->pos];
      if (c < 0x20 || c == 0x7f)
        return fail_at(r, KL_ESYNTAX, column_of(r, r->pos),
                       "unexpected control character (byte 0x%02x)", c);
      if (r->pos - start == KLI_TOKEN_MAX)
        return fail_at(r, KL_ESYNTAX, t->column,
                       "a word is at most %d bytes long", KLI_TOKEN_MAX);
      t->text[t->length++] = (char)c;
      r->pos++;
    }
  }
  t->text[t->length] = '\0';
  return KL_OK;
}

/* Skips to the start of the next line. */
static void next_line(reader *r) {
  while (r->pos < r->length && r->text[r->pos] != '\n')
    r->pos++;
  if (r->pos < r->length)
    r->pos++;
  r->line++;
  r->line_start = r->pos;
}

static const char *shown(const token *t) {
  return t->kind == TOKEN_END ? "the end of the line" : t->text;
}

static int expect_end(reader *r) {
  token t;
  int st = next_token(r, &t);
  if (st != KL_OK)
    return st;
  if (t.kind != TOKEN_END)
    return fail_at(r, KL_ESYNTAX, t.column,
                   "expected the end of the statement, found '%.60s'",
                   t.text);
  return KL_OK;
}

static int expect_keyword(reader *r, const char *word, const char *why) {
  token t;
  int st = next_token(r, &t);
  if (st != KL_OK)
    return st;
  if (t.kind != TOKEN_WORD || strcmp(t.text, word) != 0)
    return fail_at(r, KL_ESYNTAX, t.column,
                   "expected '%s' %s, found '%.60s'", word, why, shown(&t));
  return KL_OK;
}

/* A decimal number: digits, one point, an exponent; no NaN or infinity.
 * Its column goes to *column when that is not NULL. */
static int expect_number_at(reader *r, const char *what, double *value,
                            int *column) {
  token t;
  char *end;
  size_t i;
  int st = next_token(r, &t);
  if (st != KL_OK)
    return st;
  if (column != NULL)
    *column = t.column;
  for (i = 0; i < t.length && t.kind == TOKEN_WORD; i++)
    if (strchr("0123456789+-.eE", t.text[i]) == NULL)
      break;
  if (t.kind != TOKEN_WORD || t.length == 0 || i < t.length)
    return fail_at(r, KL_ESYNTAX, t.column, "expected a number (%s), found "
                                            "'%.60s'",
                   what, shown(&t));
  errno = 0;
  *value = strtod(t.text, &end);
  if (*end != '\0')
    return fail_at(r, KL_ESYNTAX, t.column,
                   "expected a number (%s), found '%.60s'", what, t.text);
  if (!isfinite(*value) || errno == ERANGE)
    return fail_at(r, KL_ESYNTAX, t.column,
                   "the number '%.60s' (%s) is out of range", t.text, what);
  return KL_OK;
}

static int expect_number(reader *r, const char *what, double *value) {
  return expect_number_at(r, what, value, NULL);
}

static int expect_count(reader *r, const char *what, int *value) {
  double v;
  int column, st = expect_number_at(r, what, &v, &column);
  if (st != KL_OK)
    return st;
  if (v != floor(v) || v < 1 || v > 1e9)
    return fail_at(r, KL_ESYNTAX, column,
                   "expected a whole number from 1 (%s), found %g", what, v);
  *value = (int)v;
  return KL_OK;
}

static int is_identifier(const char *s) {
  size_t i;
  if (!((s[0] >= 'A' && s[0] <= 'Z') || (s[0] >= 'a' && s[0] <= 'z') ||
        s[0] == '_'))
    return 0;
  for (i = 1; s[i] != '\0'; i++)
    if (!((s[i] >= 'A' && s[i] <= 'Z') || (s[i] >= 'a' && s[i] <= 'z') ||
          (s[i] >= '0' && s[i] <= '9') || s[i] == '_' || s[i] == '.' ||
          s[i] == '-'))
      return 0;
  return 1;
}

/* A new item's name: an identifier, a quoted string, or '-' for none. */
static int expect_new_name(reader *r, const char *what, token *t,
                           const char **name) {
  int st = next_token(r, t);
  if (st != KL_OK)
    return st;
  if (t->kind == TOKEN_WORD && strcmp(t->text, "-") == 0) {
    *name = NULL;
    return KL_OK;
  }
  if (t->kind == TOKEN_STRING || (t->kind == TOKEN_WORD && is_identifier(t->text))) {
    *name = t->text;
    return KL_OK;
  }
  return fail_at(r, KL_ESYNTAX, t->column,
                 "expected the %s's name (a word, a quoted name, or - for "
                 "none), found '%.60s'",
                 what, shown(t));
}

enum { REF_LINK, REF_JOINT, REF_POINT };

/* A reference to an existing link, joint or point: its name, or @id. */
static int expect_ref(reader *r, int kind, const char *what, int *id) {
  token t;
  static const char *const nouns[] = {"link", "joint", "point"};
  const char *noun = nouns[kind];
  int count = kind == REF_LINK    ? r->m->nlinks
              : kind == REF_JOINT ? r->m->njoints
                                  : r->m->npoints,
      found;
  int st = next_token(r, &t);
  if (st != KL_OK)
    return st;
  if (t.kind == TOKEN_END)
    return fail_at(r, KL_ESYNTAX, t.column,
                   "expected a %s (%s), found the end of the line", noun,
                   what);
  if (t.kind == TOKEN_WORD && t.text[0] == '@') {
    char *end;
    long v = strtol(t.text + 1, &end, 10);
    if (t.text[1] == '\0' || *end != '\0' || v < 0 || v >= count)
      return fail_at(r, KL_ESYNTAX, t.column,
                     "'%.60s' is not the id of a %s (%s; there are %d)",
                     t.text, noun, what, count);
    *id = (int)v;
    return KL_OK;
  }
  found = kind == REF_LINK    ? kl_model_find_link(r->m, t.text)
          : kind == REF_JOINT ? kl_model_find_joint(r->m, t.text)
                              : kl_model_find_point(r->m, t.text);
  if (found < 0)
    return fail_at(r, KL_ESYNTAX, t.column,
                   "no %s is named '%.60s' (%s); %ss must be declared "
                   "before they are used",
                   noun, t.text, what, noun);
  *id = found;
  return KL_OK;
}

static double angle_in(const reader *r, double v) {
  return r->angle_deg ? v * (KLI_PI / 180.0) : v;
}

/* A builder's failure, placed at the statement's line. */
static int builder_failed(reader *r, int status, int column) {
  return fail_at(r, status, column, "%s", kl_model_error(r->m));
}

static int read_units(reader *r) {
  static const char *lengths[] = {"unstated", "mm", "m", "in"};
  token t;
  int st, length = -1, i;
  if (r->seen_items)
    return fail_at(r, KL_ESYNTAX, 1,
                   "'units' must come before the first link, joint or point");
  if ((st = expect_keyword(r, "length", "after 'units'")) != KL_OK ||
      (st = next_token(r, &t)) != KL_OK)
    return st;
  for (i = 0; i < 4; i++)
    if (t.kind == TOKEN_WORD && strcmp(t.text, lengths[i]) == 0)
      length = i;
  if (length < 0)
    return fail_at(r, KL_ESYNTAX, t.column,
                   "expected a length unit (mm, m, in or unstated), found "
                   "'%.60s'",
                   shown(&t));
  if ((st = expect_keyword(r, "angle", "after the length unit")) != KL_OK ||
      (st = next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind != TOKEN_WORD ||
      (strcmp(t.text, "deg") != 0 && strcmp(t.text, "rad") != 0))
    return fail_at(r, KL_ESYNTAX, t.column,
                   "expected an angle unit (deg or rad), found '%.60s'",
                   shown(&t));
  r->angle_deg = strcmp(t.text, "deg") == 0;
  if ((st = expect_end(r)) != KL_OK)
    return st;
  st = kl_model_set_units(r->m, length,
                          r->angle_deg ? KL_ANGLE_DEG : KL_ANGLE_RAD);
  return st == KL_OK ? KL_OK : builder_failed(r, st, 1);
}

static int read_link(reader *r) {
  token name_tok;
  const char *name;
  int st;
  if ((st = expect_new_name(r, "link", &name_tok, &name)) != KL_OK ||
      (st = expect_end(r)) != KL_OK)
    return st;
  st = kl_add_link(r->m, name);
  return st >= 0 ? KL_OK : builder_failed(r, st, name_tok.column);
}

/* revolute NAME LINK X Y LINK X Y; prismatic and slot add 'axis ANGLE'
 * after the first attachment. */
static int read_joint(reader *r, int kind) {
  token name_tok;
  const char *name;
  int st, a, b, joint;
  double ax, ay, bx, by, axis = 0.0;
  if ((st = expect_new_name(r, "joint", &name_tok, &name)) != KL_OK ||
      (st = expect_ref(r, REF_LINK, "the joint's first link", &a)) != KL_OK ||
      (st = expect_number(r, "x on the first link", &ax)) != KL_OK ||
      (st = expect_number(r, "y on the first link", &ay)) != KL_OK)
    return st;
  if (kind != KL_JOINT_REVOLUTE &&
      ((st = expect_keyword(r, "axis", "before the slide axis angle")) !=
           KL_OK ||
       (st = expect_number(r, "the slide axis angle", &axis)) != KL_OK))
    return st;
  if ((st = expect_ref(r, REF_LINK, "the joint's second link", &b)) != KL_OK ||
      (st = expect_number(r, "x on the second link", &bx)) != KL_OK ||
      (st = expect_number(r, "y on the second link", &by)) != KL_OK ||
      (st = expect_end(r)) != KL_OK)
    return st;
  joint = kind == KL_JOINT_REVOLUTE ? kl_add_revolute(r->m, a, ax, ay, b, bx, by)
          : kind == KL_JOINT_PRISMATIC
              ? kl_add_prismatic(r->m, a, ax, ay, angle_in(r, axis), b, bx, by)
              : kl_add_slot(r->m, a, ax, ay, angle_in(r, axis), b, bx, by);
  if (joint < 0)
    return builder_failed(r, joint, name_tok.column);
  if (name != NULL && (st = kl_model_set_joint_name(r->m, joint, name)) != KL_OK)
    return builder_failed(r, st, name_tok.column);
  return KL_OK;
}

static int read_point(reader *r) {
  token name_tok;
  const char *name;
  int st, link;
  double x, y;
  if ((st = expect_new_name(r, "point", &name_tok, &name)) != KL_OK ||
      (st = expect_ref(r, REF_LINK, "the point's link", &link)) != KL_OK ||
      (st = expect_number(r, "the point's x", &x)) != KL_OK ||
      (st = expect_number(r, "the point's y", &y)) != KL_OK ||
      (st = expect_end(r)) != KL_OK)
    return st;
  st = kl_add_point(r->m, link, x, y, name);
  return st >= 0 ? KL_OK : builder_failed(r, st, name_tok.column);
}

static int read_input(reader *r) {
  int st, joint;
  if ((st = expect_ref(r, REF_JOINT, "the driven joint", &joint)) != KL_OK ||
      (st = expect_end(r)) != KL_OK)
    return st;
  st = kl_add_input(r->m, joint);
  return st >= 0 ? KL_OK : builder_failed(r, st, 1);
}

static int read_loop(reader *r) {
  int st, n = 0, cap = 0, *joints = NULL;
  for (;;) {
    token peek;
    size_t save = r->pos;
    int joint;
    if ((st = next_token(r, &peek)) != KL_OK)
      break;
    if (peek.kind == TOKEN_END)
      break;
    r->pos = save;
    if ((st = expect_ref(r, REF_JOINT, "a joint of the loop", &joint)) !=
        KL_OK)
      break;
    if (kli_reserve(&r->m->alloc, (void **)&joints, &cap, n + 1,
                    sizeof *joints) != KL_OK) {
      st = fail_at(r, KL_ENOMEM, 1, "out of memory");
      break;
    }
    joints[n++] = joint;
  }
  if (st == KL_OK) {
    st = kl_add_loop(r->m, n, joints);
    st = st >= 0 ? KL_OK : builder_failed(r, st, 1);
  }
  kli_free(&r->m->alloc, joints, (size_t)cap * sizeof *joints);
  return st;
}

/* sketch angle LINK VALUE | sketch slide JOINT VALUE */
static int read_sketch(reader *r) {
  token t;
  int st, id;
  double v;
  if ((st = next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind == TOKEN_WORD && strcmp(t.text, "angle") == 0) {
    if ((st = expect_ref(r, REF_LINK, "the sketched link", &id)) != KL_OK ||
        (st = expect_number(r, "the sketch angle", &v)) != KL_OK ||
        (st = expect_end(r)) != KL_OK)
      return st;
    st = kl_model_set_sketch_angle(r->m, id, angle_in(r, v));
  } else if (t.kind == TOKEN_WORD && strcmp(t.text, "slide") == 0) {
    if ((st = expect_ref(r, REF_JOINT, "the sketched joint", &id)) != KL_OK ||
        (st = expect_number(r, "the sketch slide", &v)) != KL_OK ||
        (st = expect_end(r)) != KL_OK)
      return st;
    st = kl_model_set_sketch_slide(r->m, id, v);
  } else {
    return fail_at(r, KL_ESYNTAX, t.column,
                   "expected 'angle' or 'slide' after 'sketch', found "
                   "'%.60s'",
                   shown(&t));
  }
  return st == KL_OK ? KL_OK : builder_failed(r, st, t.column);
}

/* JOINT from V to V steps N, JOINT being an input's joint: into *sw, the
 * range in API units. */
static int parse_sweep(reader *r, kl_sweep_settings *sw) {
  int st, joint, i;
  if ((st = expect_ref(r, REF_JOINT, "the swept input's joint", &joint)) !=
          KL_OK ||
      (st = expect_keyword(r, "from", "after the swept joint")) != KL_OK ||
      (st = expect_number(r, "the start of the sweep", &sw->from)) != KL_OK ||
      (st = expect_keyword(r, "to", "after the start")) != KL_OK ||
      (st = expect_number(r, "the end of the sweep", &sw->to)) != KL_OK ||
      (st = expect_keyword(r, "steps", "after the end")) != KL_OK ||
      (st = expect_count(r, "the number of steps", &sw->steps)) != KL_OK ||
      (st = expect_end(r)) != KL_OK)
    return st;
  sw->size = sizeof *sw;
  sw->input = -1;
  for (i = 0; i < r->m->ninputs; i++)
    if (r->m->inputs[i] == joint)
      sw->input = i;
  if (sw->input < 0)
    return fail_at(r, KL_ESYNTAX, 1,
                   "the swept joint is not an input; declare it with "
                   "'input' first");
  if (r->m->joints[joint].kind == KL_JOINT_REVOLUTE) {
    sw->from = angle_in(r, sw->from);
    sw->to = angle_in(r, sw->to);
  }
  return KL_OK;
}

/* sweep JOINT from V to V steps N */
static int read_sweep(reader *r) {
  kl_sweep_settings sw;
  int st = parse_sweep(r, &sw);
  if (st != KL_OK)
    return st;
  st = kl_model_set_sweep(r->m, &sw);
  return st == KL_OK ? KL_OK : builder_failed(r, st, 1);
}

static int read_header(reader *r) {
  double version;
  int column, st = expect_number_at(r, "the format version", &version, &column);
  if (st != KL_OK)
    return st;
  if (version != KLI_FORMAT_VERSION)
    return fail_at(r, KL_ESYNTAX, column,
                   "this is format version %g; kinloop %s reads version %d",
                   version, KINLOOP_VERSION, KLI_FORMAT_VERSION);
  r->seen_header = 1;
  return expect_end(r);
}

static int read_statement(reader *r, const token *key) {
  const char *k = key->text;
  if (!r->seen_header) {
    if (key->kind == TOKEN_WORD && strcmp(k, "kinloop-model") == 0)
      return read_header(r);
    return fail_at(r, KL_ESYNTAX, key->column,
                   "expected 'kinloop-model %d' as the first statement, "
                   "found '%.60s'",
                   KLI_FORMAT_VERSION, k);
  }
  if (key->kind != TOKEN_WORD)
    return fail_at(r, KL_ESYNTAX, key->column,
                   "expected a statement word, found a quoted name");
  if (strcmp(k, "units") == 0)
    return read_units(r);
  r->seen_items = 1;
  if (strcmp(k, "link") == 0)
    return read_link(r);
  if (strcmp(k, "revolute") == 0)
    return read_joint(r, KL_JOINT_REVOLUTE);
  if (strcmp(k, "prismatic") == 0)
    return read_joint(r, KL_JOINT_PRISMATIC);
  if (strcmp(k, "slot") == 0)
    return read_joint(r, KL_JOINT_SLOT);
  if (strcmp(k, "point") == 0)
    return read_point(r);
  if (strcmp(k, "input") == 0)
    return read_input(r);
  if (strcmp(k, "loop") == 0)
    return read_loop(r);
  if (strcmp(k, "sketch") == 0)
    return read_sketch(r);
  if (strcmp(k, "sweep") == 0)
    return read_sweep(r);
  return fail_at(r, KL_ESYNTAX, key->column,
                 "unknown statement '%.60s' (expected units, link, "
                 "revolute, prismatic, slot, point, input, loop, sketch or "
                 "sweep)",
                 k);
}

static void clear_error(kl_io_error *err) {
  if (err != NULL && err->size >= sizeof(err->size)) {
    kl_io_error e;
    memset(&e, 0, sizeof e);
    e.size = err->size;
    memcpy(err, &e, err->size < sizeof e ? err->size : sizeof e);
  }
}

/* What both readers refuse before reading a statement: no text, too much,
 * or a NUL byte (located: it is no text file). r->text and r->length are
 * set, r->line is 1. */
static int check_text(reader *r, const char *what) {
  const char *nul;
  size_t at, i;
  if (r->text == NULL && r->length > 0)
    return fail_at(r, KL_EINVAL, 0, "no %s text (NULL) for %lu bytes", what,
                   (unsigned long)r->length);
  if (r->length > KLI_MAX_INPUT)
    return fail_at(r, KL_EINVAL, 0,
                   "the %s text is %lu bytes; at most %u are read", what,
                   (unsigned long)r->length, KLI_MAX_INPUT);
  nul = r->length > 0 ? memchr(r->text, '\0', r->length) : NULL;
  if (nul == NULL)
    return KL_OK;
  at = (size_t)(nul - r->text);
  for (i = 0; i < at; i++)
    if (r->text[i] == '\n') {
      r->line++;
      r->line_start = i + 1;
    }
  return fail_at(r, KL_ESYNTAX, column_of(r, at),
                 "a NUL byte: this is not a text file");
}

kl_model *kl_model_read_with_alloc(const char *text, size_t length,
                                   kl_alloc_fn fn, void *user,
                                   kl_io_error *err) {
  reader r;
  int st = KL_OK;
  memset(&r, 0, sizeof r);
  r.text = text;
  r.length = length;
  r.line = 1;
  r.err = err;
  clear_error(err);
  if (check_text(&r, "model") != KL_OK)
    return NULL;
  r.m = kl_model_new_with_alloc(fn, user);
  if (r.m == NULL) {
    fail_at(&r, KL_ENOMEM, 0, "out of memory");
    return NULL;
  }
  while (st == KL_OK && r.pos < r.length) {
    token key;
    if ((st = next_token(&r, &key)) != KL_OK)
      break;
    if (key.kind != TOKEN_END)
      st = read_statement(&r, &key);
    if (st == KL_OK)
      next_line(&r);
  }
  if (st == KL_OK && !r.seen_header)
    st = fail_at(&r, KL_ESYNTAX, 1,
                 "empty model: expected 'kinloop-model %d'",
                 KLI_FORMAT_VERSION);
  if (st == KL_OK && (st = kl_model_finalize(r.m)) != KL_OK) {
    r.line = 0;
    fail_at(&r, st, 0, "%s", kl_model_error(r.m));
  }
  if (st != KL_OK) {
    kl_model_free(r.m);
    return NULL;
  }
  return r.m;
}

kl_model *kl_model_read(const char *text, size_t length, kl_io_error *err) {
  return kl_model_read_with_alloc(text, length, kli_default_alloc, NULL, err);
}

static void io_fail(kl_io_error *err, int status, const char *fmt,
                    const char *path, const char *why) {
  reader r;
  memset(&r, 0, sizeof r);
  r.err = err;
  fail_at(&r, status, 0, fmt, path, why);
}

/* The bytes of a file, up to one more than the readers take (so that one
 * too long is told apart), in a buffer of *cap bytes from the default
 * allocator; KL_OK, or a status with err set. */
static int read_whole_file(const char *path, char **buf, int *cap,
                           size_t *len, kl_io_error *err) {
  kli_allocator a;
  FILE *f;
  int n = 0, st = KL_OK;
  a.fn = kli_default_alloc;
  a.user = NULL;
  *buf = NULL;
  *cap = 0;
  if (path == NULL) {
    io_fail(err, KL_EINVAL, "read: no path (NULL)%s%s", "", "");
    return KL_EINVAL;
  }
  f = fopen(path, "rb");
  if (f == NULL) {
    io_fail(err, KL_EIO, "cannot open '%.120s': %.80s", path, strerror(errno));
    return KL_EIO;
  }
  for (;;) {
    size_t got;
    int want = n + 65536 > (int)KLI_MAX_INPUT + 1 ? (int)KLI_MAX_INPUT + 1
                                                   : n + 65536;
    if (kli_reserve(&a, (void **)buf, cap, want, 1) != KL_OK) {
      io_fail(err, KL_ENOMEM, "read '%.120s': out of memory%s", path, "");
      st = KL_ENOMEM;
      break;
    }
    got = fread(*buf + n, 1, (size_t)(want - n), f);
    n += (int)got;
    if (ferror(f)) {
      io_fail(err, KL_EIO, "cannot read '%.120s': %.80s", path,
              strerror(errno));
      st = KL_EIO;
      break;
    }
    if (got == 0 || n > (int)KLI_MAX_INPUT)
      break;
  }
  fclose(f);
  *len = (size_t)n;
  if (st != KL_OK) {
    kli_free(&a, *buf, (size_t)*cap);
    *buf = NULL;
  }
  return st;
}

static void free_file_text(char *buf, int cap) {
  kli_allocator a;
  a.fn = kli_default_alloc;
  a.user = NULL;
  kli_free(&a, buf, (size_t)cap);
}

kl_model *kl_model_read_file(const char *path, kl_io_error *err) {
  char *buf;
  int cap;
  size_t len;
  kl_model *m;
  clear_error(err);
  if (read_whole_file(path, &buf, &cap, &len, err) != KL_OK)
    return NULL;
  m = kl_model_read(buf, len, err);
  free_file_text(buf, cap);
  return m;
}

/* ------------------------------------------------------------------------
 * Reading a study
 * ------------------------------------------------------------------------ */

typedef struct {
  reader r;
  kl_study *st;
  kli_allocator a;
  const char *base_dir;
  /* the lines of the statements a study gives once (0: not yet) */
  int seed_line, samples_line, sweep_line;
} study_reader;

/* A statement a study gives at most once: its first line is kept. */
static int given_once(study_reader *sr, int *line, const char *what) {
  if (*line != 0)
    return fail_at(&sr->r, KL_ESYNTAX, 1,
                   "%s is given already, on line %d: a study gives it once",
                   what, *line);
  *line = sr->r.line;
  return KL_OK;
}

static int study_needs_model(study_reader *sr, int column) {
  if (sr->st->model == NULL)
    return fail_at(&sr->r, KL_ESYNTAX, column,
                   "'model' must come first: the study needs its model to "
                   "name links, joints and points");
  return KL_OK;
}

/* model PATH, relative to the study's directory */
static int read_study_model(study_reader *sr) {
  token t;
  char path[1024];
  kl_io_error inner;
  int st, n;
  if (sr->st->model != NULL)
    return fail_at(&sr->r, KL_ESYNTAX, 1, "a study has one 'model'");
  if ((st = next_token(&sr->r, &t)) != KL_OK)
    return st;
  if (t.kind == TOKEN_END)
    return fail_at(&sr->r, KL_ESYNTAX, t.column,
                   "expected the model file's path, found the end of the "
                   "line");
  if ((st = expect_end(&sr->r)) != KL_OK)
    return st;
  if (t.text[0] == '/' || sr->base_dir == NULL || sr->base_dir[0] == '\0')
    n = snprintf(path, sizeof path, "%s", t.text);
  else
    n = snprintf(path, sizeof path, "%s%s%s", sr->base_dir,
                 sr->base_dir[strlen(sr->base_dir) - 1] == '/' ? "" : "/",
                 t.text);
  if (n < 0 || (size_t)n >= sizeof path)
    return fail_at(&sr->r, KL_EIO, t.column,
                   "the model's path is longer than %d characters",
                   (int)sizeof path - 1);
  inner.size = sizeof inner;
  sr->st->model = kl_model_read_file(path, &inner);
  if (sr->st->model == NULL && inner.line > 0)
    return fail_at(&sr->r, inner.status, t.column,
                   "the model '%.200s', line %d, column %d: %.300s", path,
                   inner.line, inner.column, inner.message);
  if (sr->st->model == NULL)
    return fail_at(&sr->r, inner.status, t.column, "the model '%.200s': %.300s",
                   path, inner.message);
  sr->r.m = sr->st->model;
  sr->r.angle_deg = sr->st->model->angle_unit == KL_ANGLE_DEG;
  if (sr->st->model->has_sweep)
    sr->st->sweep = sr->st->model->sweep;
  return KL_OK;
}

static int read_study_count(study_reader *sr, const char *what, long *out) {
  double v;
  int column, st = expect_number_at(&sr->r, what, &v, &column);
  if (st != KL_OK)
    return st;
  if (v != floor(v) || v < 0 || v > 9007199254740992.0)
    return fail_at(&sr->r, KL_ESYNTAX, column,
                   "expected a whole number from 0 (%s), found %g", what, v);
  *out = (long)v;
  return expect_end(&sr->r);
}

/* joint REF a|b x|y, or point REF x|y; its column into *column */
static int read_dimension(study_reader *sr, kl_dimension *d, int *column) {
  token t;
  int st;
  if ((st = next_token(&sr->r, &t)) != KL_OK)
    return st;
  *column = t.column;
  if (t.kind == TOKEN_WORD && strcmp(t.text, "joint") == 0) {
    token side;
    if ((st = expect_ref(&sr->r, REF_JOINT, "the joint that moves", &d->id)) !=
            KL_OK ||
        (st = next_token(&sr->r, &side)) != KL_OK)
      return st;
    if (side.kind != TOKEN_WORD ||
        (strcmp(side.text, "a") != 0 && strcmp(side.text, "b") != 0))
      return fail_at(&sr->r, KL_ESYNTAX, side.column,
                     "expected the joint's side, a or b, found '%.60s'",
                     shown(&side));
    d->kind = side.text[0] == 'a' ? KL_DIMENSION_JOINT_A : KL_DIMENSION_JOINT_B;
  } else if (t.kind == TOKEN_WORD && strcmp(t.text, "point") == 0) {
    if ((st = expect_ref(&sr->r, REF_POINT, "the point that moves", &d->id)) !=
        KL_OK)
      return st;
    d->kind = KL_DIMENSION_POINT;
  } else {
    return fail_at(&sr->r, KL_ESYNTAX, t.column,
                   "expected 'joint' or 'point' (the dimension that varies), "
                   "found '%.60s'",
                   shown(&t));
  }
  if ((st = next_token(&sr->r, &t)) != KL_OK)
    return st;
  if (t.kind != TOKEN_WORD ||
      (strcmp(t.text, "x") != 0 && strcmp(t.text, "y") != 0))
    return fail_at(&sr->r, KL_ESYNTAX, t.column,
                   "expected the local axis, x or y, found '%.60s'", shown(&t));
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
      return fail_at(&sr->r, KL_ESYNTAX, column,
                     "this dimension varies already, on line %d: a study "
                     "varies each dimension once",
                     sr->st->vary[i].line);
  }
  v->line = sr->r.line;
  return KL_OK;
}

static int push_vary(study_reader *sr, kli_vary **v) {
  if (kli_reserve(&sr->a, (void **)&sr->st->vary, &sr->st->cap_vary,
                  sr->st->nvary + 1, sizeof **v) != KL_OK)
    return fail_at(&sr->r, KL_ENOMEM, 0, "out of memory");
  *v = &sr->st->vary[sr->st->nvary];
  memset(*v, 0, sizeof **v);
  return KL_OK;
}

/* vary DIMENSION tolerance T normal|uniform */
static int read_vary(study_reader *sr) {
  kli_vary *v;
  token how;
  int st, column;
  if ((st = study_needs_model(sr, 1)) != KL_OK || (st = push_vary(sr, &v)) ||
      (st = read_dimension(sr, &v->dim, &column)) != KL_OK ||
      (st = varied_once(sr, v, column)) != KL_OK ||
      (st = expect_keyword(&sr->r, "tolerance", "after the dimension")) !=
          KL_OK ||
      (st = expect_number_at(&sr->r, "the tolerance", &v->tolerance,
                             &column)) != KL_OK ||
      (st = next_token(&sr->r, &how)) != KL_OK)
    return st;
  if (!(v->tolerance >= 0.0))
    return fail_at(&sr->r, KL_ESYNTAX, column,
                   "a tolerance is not negative (found %g)", v->tolerance);
  if (how.kind == TOKEN_WORD && strcmp(how.text, "normal") == 0)
    v->how = KLI_VARY_NORMAL;
  else if (how.kind == TOKEN_WORD && strcmp(how.text, "uniform") == 0)
    v->how = KLI_VARY_UNIFORM;
  else
    return fail_at(&sr->r, KL_ESYNTAX, how.column,
                   "expected the distribution, normal or uniform, found "
                   "'%.60s'",
                   shown(&how));
  if ((st = expect_end(&sr->r)) != KL_OK)
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
      (st = expect_keyword(&sr->r, "from", "after the dimension")) != KL_OK ||
      (st = expect_number(&sr->r, "the first value", &v->from)) != KL_OK ||
      (st = expect_keyword(&sr->r, "to", "after the first value")) != KL_OK ||
      (st = expect_number(&sr->r, "the last value", &v->to)) != KL_OK ||
      (st = expect_keyword(&sr->r, "steps", "after the last value")) !=
          KL_OK ||
      (st = expect_count(&sr->r, "the number of steps", &v->steps)) != KL_OK ||
      (st = expect_end(&sr->r)) != KL_OK)
    return st;
  v->how = KLI_VARY_GRID;
  sr->st->nvary++;
  return KL_OK;
}

/* load force POINT FX FY | load torque LINK T */
static int read_load(study_reader *sr) {
  kl_load l;
  token t;
  int st;
  memset(&l, 0, sizeof l);
  if ((st = study_needs_model(sr, 1)) != KL_OK ||
      (st = next_token(&sr->r, &t)) != KL_OK)
    return st;
  if (t.kind == TOKEN_WORD && strcmp(t.text, "force") == 0) {
    l.kind = KL_LOAD_FORCE;
    if ((st = expect_ref(&sr->r, REF_POINT, "the loaded point", &l.id)) ||
        (st = expect_number(&sr->r, "the force's x", &l.fx)) != KL_OK ||
        (st = expect_number(&sr->r, "the force's y", &l.fy)) != KL_OK)
      return st;
  } else if (t.kind == TOKEN_WORD && strcmp(t.text, "torque") == 0) {
    l.kind = KL_LOAD_TORQUE;
    if ((st = expect_ref(&sr->r, REF_LINK, "the loaded link", &l.id)) ||
        (st = expect_number(&sr->r, "the torque", &l.torque)) != KL_OK)
      return st;
  } else {
    return fail_at(&sr->r, KL_ESYNTAX, t.column,
                   "expected 'force' or 'torque', found '%.60s'", shown(&t));
  }
  if ((st = expect_end(&sr->r)) != KL_OK)
    return st;
  if (kli_reserve(&sr->a, (void **)&sr->st->loads, &sr->st->cap_loads,
                  sr->st->nloads + 1, sizeof l) != KL_OK)
    return fail_at(&sr->r, KL_ENOMEM, 0, "out of memory");
  sr->st->loads[sr->st->nloads++] = l;
  return KL_OK;
}

/* angle LINK | slide JOINT | joint-angle JOINT | x POINT | y POINT |
 * transmission JOINT JOINT JOINT */
static int read_output_spec(study_reader *sr, kli_judge *j) {
  token t;
  int st;
  kl_output *o = &j->what;
  double deg = sr->r.angle_deg ? 180.0 / KLI_PI : 1.0;
  if ((st = next_token(&sr->r, &t)) != KL_OK)
    return st;
  j->to_file = 1.0;
  o->line_a = o->line_b = 0;
  if (t.kind == TOKEN_WORD && strcmp(t.text, "angle") == 0) {
    o->kind = KL_OUTPUT_LINK_ANGLE;
    j->to_file = deg;
    return expect_ref(&sr->r, REF_LINK, "the link", &o->id);
  }
  if (t.kind == TOKEN_WORD && strcmp(t.text, "slide") == 0) {
    o->kind = KL_OUTPUT_SLIDE;
    return expect_ref(&sr->r, REF_JOINT, "the sliding joint", &o->id);
  }
  if (t.kind == TOKEN_WORD && strcmp(t.text, "joint-angle") == 0) {
    o->kind = KL_OUTPUT_JOINT_ANGLE;
    j->to_file = deg;
    return expect_ref(&sr->r, REF_JOINT, "the joint", &o->id);
  }
  if (t.kind == TOKEN_WORD && (strcmp(t.text, "x") == 0 || strcmp(t.text, "y") == 0)) {
    o->kind = t.text[0] == 'x' ? KL_OUTPUT_POINT_X : KL_OUTPUT_POINT_Y;
    return expect_ref(&sr->r, REF_POINT, "the point", &o->id);
  }
  if (t.kind == TOKEN_WORD && strcmp(t.text, "transmission") == 0) {
    o->kind = KL_OUTPUT_TRANSMISSION;
    j->to_file = deg;
    if ((st = expect_ref(&sr->r, REF_JOINT, "the revolute joint", &o->id)) ||
        (st = expect_ref(&sr->r, REF_JOINT, "the joint of link a's line",
                         &o->line_a)) ||
        (st = expect_ref(&sr->r, REF_JOINT, "the joint of link b's line",
                         &o->line_b)))
      return st;
    return KL_OK;
  }
  return fail_at(&sr->r, KL_ESYNTAX, t.column,
                 "expected what to measure (angle, slide, joint-angle, x, y "
                 "or transmission), found '%.60s'",
                 shown(&t));
}

/* output NAME swing|min|max SPEC | output NAME at VALUE SPEC |
 * output NAME reach | output NAME effort */
static int read_output(study_reader *sr) {
  token name, how;
  kli_judge *j;
  int st, i;
  if ((st = study_needs_model(sr, 1)) != KL_OK ||
      (st = next_token(&sr->r, &name)) != KL_OK)
    return st;
  if (!((name.kind == TOKEN_WORD && is_identifier(name.text)) ||
        name.kind == TOKEN_STRING) ||
      name.length >= sizeof j->name)
    return fail_at(&sr->r, KL_ESYNTAX, name.column,
                   "expected the output's name (a word or a quoted name of "
                   "at most %d bytes), found '%.60s'",
                   (int)sizeof j->name - 1, shown(&name));
  for (i = 0; i < sr->st->njudge; i++)
    if (strcmp(sr->st->judge[i].name, name.text) == 0)
      return fail_at(&sr->r, KL_ESYNTAX, name.column,
                     "the output name '%.60s' is already used", name.text);
  if (kli_reserve(&sr->a, (void **)&sr->st->judge, &sr->st->cap_judge,
                  sr->st->njudge + 1, sizeof *j) != KL_OK)
    return fail_at(&sr->r, KL_ENOMEM, 0, "out of memory");
  j = &sr->st->judge[sr->st->njudge];
  memset(j, 0, sizeof *j);
  j->to_file = 1.0; /* angles set their own when the spec is read */
  memcpy(j->name, name.text, name.length + 1);
  if ((st = next_token(&sr->r, &how)) != KL_OK)
    return st;
  if (how.kind == TOKEN_WORD && strcmp(how.text, "swing") == 0)
    j->how = KLI_JUDGE_SWING;
  else if (how.kind == TOKEN_WORD && strcmp(how.text, "min") == 0)
    j->how = KLI_JUDGE_MIN;
  else if (how.kind == TOKEN_WORD && strcmp(how.text, "max") == 0)
    j->how = KLI_JUDGE_MAX;
  else if (how.kind == TOKEN_WORD && strcmp(how.text, "at") == 0)
    j->how = KLI_JUDGE_AT;
  else if (how.kind == TOKEN_WORD && strcmp(how.text, "reach") == 0)
    j->how = KLI_JUDGE_REACH;
  else if (how.kind == TOKEN_WORD && strcmp(how.text, "effort") == 0)
    j->how = KLI_JUDGE_EFFORT;
  else
    return fail_at(&sr->r, KL_ESYNTAX, how.column,
                   "expected how to judge (swing, min, max, at, reach or "
                   "effort), found '%.60s'",
                   shown(&how));
  if (j->how == KLI_JUDGE_AT &&
      (st = expect_number(&sr->r, "the input value", &j->at)) != KL_OK)
    return st;
  if (j->how != KLI_JUDGE_REACH && j->how != KLI_JUDGE_EFFORT &&
      (st = read_output_spec(sr, j)) != KL_OK)
    return st;
  if ((st = expect_end(&sr->r)) != KL_OK)
    return st;
  sr->st->njudge++;
  return KL_OK;
}

/* limit NAME LOWER UPPER */
static int read_limit(study_reader *sr) {
  token name;
  int st, i, column;
  double lower, upper;
  if ((st = next_token(&sr->r, &name)) != KL_OK)
    return st;
  for (i = 0; i < sr->st->njudge; i++)
    if (strcmp(sr->st->judge[i].name, name.text) == 0)
      break;
  if (i == sr->st->njudge)
    return fail_at(&sr->r, KL_ESYNTAX, name.column,
                   "no output is named '%.60s'; declare it with 'output' "
                   "first",
                   shown(&name));
  if ((st = given_once(sr, &sr->st->judge[i].limit_line,
                       "this output's 'limit'")) != KL_OK ||
      (st = expect_number(&sr->r, "the lower limit", &lower)) != KL_OK ||
      (st = expect_number_at(&sr->r, "the upper limit", &upper, &column)) !=
          KL_OK ||
      (st = expect_end(&sr->r)) != KL_OK)
    return st;
  if (!(upper >= lower))
    return fail_at(&sr->r, KL_ESYNTAX, column,
                   "the upper limit %g is below the lower %g", upper, lower);
  sr->st->judge[i].has_limits = 1;
  sr->st->judge[i].lower = lower;
  sr->st->judge[i].upper = upper;
  return KL_OK;
}

static int read_study_statement(study_reader *sr, const token *key) {
  reader *r = &sr->r;
  const char *k = key->text;
  kl_sweep_settings sw;
  int st;
  long n;
  if (!r->seen_header) {
    double version;
    int column;
    if (key->kind != TOKEN_WORD || strcmp(k, "kinloop-study") != 0)
      return fail_at(r, KL_ESYNTAX, key->column,
                     "expected 'kinloop-study %d' as the first statement, "
                     "found '%.60s'",
                     KLI_FORMAT_VERSION, k);
    if ((st = expect_number_at(r, "the format version", &version, &column)))
      return st;
    if (version != KLI_FORMAT_VERSION)
      return fail_at(r, KL_ESYNTAX, column,
                     "this is study version %g; kinloop %s reads version %d",
                     version, KINLOOP_VERSION, KLI_FORMAT_VERSION);
    r->seen_header = 1;
    return expect_end(r);
  }
  if (key->kind == TOKEN_WORD && strcmp(k, "model") == 0)
    return read_study_model(sr);
  if (key->kind == TOKEN_WORD && strcmp(k, "seed") == 0) {
    if ((st = given_once(sr, &sr->seed_line, "'seed'")) != KL_OK ||
        (st = read_study_count(sr, "the seed", &n)) != KL_OK)
      return st;
    sr->st->seed = (unsigned long long)n;
    return KL_OK;
  }
  if (key->kind == TOKEN_WORD && strcmp(k, "samples") == 0) {
    if ((st = given_once(sr, &sr->samples_line, "'samples'")) != KL_OK)
      return st;
    return read_study_count(sr, "the number of samples", &sr->st->samples);
  }
  if (key->kind == TOKEN_WORD && strcmp(k, "vary") == 0)
    return read_vary(sr);
  if (key->kind == TOKEN_WORD && strcmp(k, "grid") == 0)
    return read_grid(sr);
  if (key->kind == TOKEN_WORD && strcmp(k, "load") == 0)
    return read_load(sr);
  if (key->kind == TOKEN_WORD && strcmp(k, "output") == 0)
    return read_output(sr);
  if (key->kind == TOKEN_WORD && strcmp(k, "limit") == 0)
    return read_limit(sr);
  if (key->kind == TOKEN_WORD && strcmp(k, "sweep") == 0) {
    if ((st = study_needs_model(sr, key->column)) != KL_OK ||
        (st = given_once(sr, &sr->sweep_line, "'sweep'")) != KL_OK ||
        (st = parse_sweep(r, &sw)) != KL_OK)
      return st;
    sr->st->sweep = sw;
    return KL_OK;
  }
  return fail_at(r, KL_ESYNTAX, key->column,
                 "unknown statement '%.60s' (expected model, seed, samples, "
                 "vary, grid, load, output, limit or sweep)",
                 k);
}

/* What the statements together must say. */
static int check_study(study_reader *sr) {
  kl_study *st = sr->st;
  int i, grids = 0;
  sr->r.line = 0;
  if (st->model == NULL)
    return fail_at(&sr->r, KL_ESYNTAX, 0, "the study names no model");
  if (st->njudge == 0)
    return fail_at(&sr->r, KL_ESYNTAX, 0, "the study judges no output");
  if (st->sweep.size == 0)
    return fail_at(&sr->r, KL_ESYNTAX, 0,
                   "the study needs sweep settings (a 'sweep' statement here "
                   "or in its model)");
  for (i = 0; i < st->nvary; i++)
    grids += st->vary[i].how == KLI_VARY_GRID;
  if (grids > 0 && grids < st->nvary)
    return fail_at(&sr->r, KL_ESYNTAX, 0,
                   "a study is either a grid or tolerances: this one mixes "
                   "%d grid and %d tolerance dimensions",
                   grids, st->nvary - grids);
  st->grid = grids > 0;
  if (st->grid) {
    double count = 1.0;
    if (sr->samples_line != 0)
      return fail_at(&sr->r, KL_ESYNTAX, 0,
                     "a grid study has as many samples as grid points: "
                     "leave 'samples' out");
    for (i = 0; i < st->nvary; i++)
      count *= st->vary[i].steps + 1;
    if (count > 1e9)
      return fail_at(&sr->r, KL_ESYNTAX, 0,
                     "the grid has %.3g points; at most 1e9", count);
    st->samples = (long)count;
  } else if (sr->samples_line == 0) {
    return fail_at(&sr->r, KL_ESYNTAX, 0,
                   "a tolerance study says how many 'samples' to draw");
  }
  for (i = 0; i < st->njudge; i++)
    if (st->judge[i].how == KLI_JUDGE_EFFORT && st->nloads == 0)
      return fail_at(&sr->r, KL_ESYNTAX, 0,
                     "output '%.60s' judges the input effort, but the study "
                     "gives no 'load'",
                     st->judge[i].name);
  return KL_OK;
}

kl_study *kl_study_read(const char *text, size_t length, const char *base_dir,
                        kl_io_error *err) {
  study_reader sr;
  int st = KL_OK;
  memset(&sr, 0, sizeof sr);
  sr.r.text = text;
  sr.r.length = length;
  sr.r.line = 1;
  sr.r.err = err;
  sr.base_dir = base_dir;
  sr.a.fn = kli_default_alloc;
  sr.a.user = NULL;
  clear_error(err);
  if (check_text(&sr.r, "study") != KL_OK)
    return NULL;
  sr.st = kli_alloc(&sr.a, sizeof *sr.st);
  if (sr.st == NULL) {
    fail_at(&sr.r, KL_ENOMEM, 0, "out of memory");
    return NULL;
  }
  memset(sr.st, 0, sizeof *sr.st);
  while (st == KL_OK && sr.r.pos < sr.r.length) {
    token key;
    if ((st = next_token(&sr.r, &key)) != KL_OK)
      break;
    if (key.kind != TOKEN_END)
      st = read_study_statement(&sr, &key);
    if (st == KL_OK)
      next_line(&sr.r);
  }
  if (st == KL_OK && !sr.r.seen_header)
    st = fail_at(&sr.r, KL_ESYNTAX, 1,
                 "empty study: expected 'kinloop-study %d'",
                 KLI_FORMAT_VERSION);
  if (st == KL_OK)
    st = check_study(&sr);
  if (st == KL_OK) {
    char why[KLI_MESSAGE_SIZE];
    st = kli_study_prepare(sr.st, why);
    if (st != KL_OK)
      fail_at(&sr.r, st, 0, "the nominal model: %s", why);
  }
  if (st != KL_OK) {
    kl_study_free(sr.st);
    return NULL;
  }
  return sr.st;
}

kl_study *kl_study_read_file(const char *path, kl_io_error *err) {
  char dir[1024];
  const char *slash;
  kl_study *st;
  char *text;
  int cap;
  size_t len;
  clear_error(err);
  if (read_whole_file(path, &text, &cap, &len, err) != KL_OK)
    return NULL;
  slash = strrchr(path, '/');
  if (slash != NULL && (size_t)(slash - path) >= sizeof dir) {
    free_file_text(text, cap);
    io_fail(err, KL_EIO, "read '%.120s': %s", path,
            "its directory is too long for a study's base directory");
    return NULL;
  }
  /* the directory part, keeping the root of "/name" */
  snprintf(dir, sizeof dir, "%.*s",
           slash == NULL ? 1 : slash == path ? 1 : (int)(slash - path),
           slash == NULL ? "." : path);
  st = kl_study_read(text, len, dir, err);
  free_file_text(text, cap);
  return st;
}

/* ------------------------------------------------------------------------
 * Writing
 * ------------------------------------------------------------------------ */

typedef struct {
  char *buf;
  size_t cap, len;
} sink;

static void put(sink *o, const char *fmt, ...)
#ifdef __GNUC__
    __attribute__((format(printf, 2, 3)))
#endif
    ;

static void put(sink *o, const char *fmt, ...) {
  va_list ap;
  int n;
  char *at = o->len < o->cap ? o->buf + o->len : NULL;
  size_t room = o->len < o->cap ? o->cap - o->len : 0;
  va_start(ap, fmt);
  n = vsnprintf(at, room, fmt, ap);
  va_end(ap);
  if (n > 0)
    o->len += (size_t)n;
}

/* A name as the reader reads it back: a word, or a quoted string. */
static void put_name(sink *o, const char *name) {
  const char *c;
  if (name == NULL) {
    put(o, " -");
    return;
  }
  if (is_identifier(name) && strcmp(name, "ground") != 0) {
    put(o, " %s", name);
    return;
  }
  put(o, " \"");
  for (c = name; *c != '\0'; c++)
    put(o, "%s%c", (*c == '"' || *c == '\\') ? "\\" : "", *c);
  put(o, "\"");
}

static void put_link_ref(sink *o, const kl_model *m, int link) {
  if (link == KL_GROUND)
    put(o, " ground");
  else if (m->links[link].name != NULL)
    put_name(o, m->links[link].name);
  else
    put(o, " @%d", link);
}

static void put_joint_ref(sink *o, const kl_model *m, int joint) {
  if (m->joints[joint].name != NULL)
    put_name(o, m->joints[joint].name);
  else
    put(o, " @%d", joint);
}

static double angle_out(const kl_model *m, double v) {
  return m->angle_unit == KL_ANGLE_DEG ? v * (180.0 / KLI_PI) : v;
}

static void write_model(const kl_model *m, sink *o) {
  int i, k;
  put(o, "kinloop-model %d\n", KLI_FORMAT_VERSION);
  put(o, "units length %s angle %s\n",
      m->length_unit == KL_LENGTH_UNSTATED ? "unstated"
                                            : kl_length_unit_str(m->length_unit),
      kl_angle_unit_str(m->angle_unit));
  for (i = 1; i < m->nlinks; i++) {
    put(o, "link");
    put_name(o, m->links[i].name);
    put(o, "\n");
  }
  for (i = 0; i < m->njoints; i++) {
    const kli_joint *j = &m->joints[i];
    put(o, "%s", kli_kind_name(j->kind));
    put_name(o, j->name);
    put_link_ref(o, m, j->link[0]);
    put(o, " %.17g %.17g", j->at[0][0], j->at[0][1]);
    if (kli_is_sliding(j->kind))
      put(o, " axis %.17g", angle_out(m, j->axis));
    put_link_ref(o, m, j->link[1]);
    put(o, " %.17g %.17g\n", j->at[1][0], j->at[1][1]);
  }
  for (i = 0; i < m->npoints; i++) {
    put(o, "point");
    put_name(o, m->points[i].name);
    put_link_ref(o, m, m->points[i].link);
    put(o, " %.17g %.17g\n", m->points[i].at[0], m->points[i].at[1]);
  }
  for (i = 0; i < m->ninputs; i++) {
    put(o, "input");
    put_joint_ref(o, m, m->inputs[i]);
    put(o, "\n");
  }
  for (i = 0; i < m->nreg_loops; i++) {
    put(o, "loop");
    for (k = m->reg_start[i]; k < m->reg_start[i + 1]; k++)
      put_joint_ref(o, m, m->reg_joints[k]);
    put(o, "\n");
  }
  for (i = 1; i < m->nlinks; i++)
    if (m->links[i].has_sketch) {
      put(o, "sketch angle");
      put_link_ref(o, m, i);
      put(o, " %.17g\n", angle_out(m, m->links[i].sketch));
    }
  for (i = 0; i < m->njoints; i++)
    if (m->joints[i].has_sketch) {
      put(o, "sketch slide");
      put_joint_ref(o, m, i);
      put(o, " %.17g\n", m->joints[i].sketch);
    }
  if (m->has_sweep) {
    int joint = m->inputs[m->sweep.input];
    int angle = m->joints[joint].kind == KL_JOINT_REVOLUTE;
    put(o, "sweep");
    put_joint_ref(o, m, joint);
    put(o, " from %.17g to %.17g steps %d\n",
        angle ? angle_out(m, m->sweep.from) : m->sweep.from,
        angle ? angle_out(m, m->sweep.to) : m->sweep.to, m->sweep.steps);
  }
}

int kl_model_write(const kl_model *m, char *buf, size_t cap, size_t *needed) {
  sink o;
  if (m == NULL || (buf == NULL && cap > 0))
    return KL_EINVAL;
  o.buf = buf;
  o.cap = cap;
  o.len = 0;
  write_model(m, &o);
  if (needed != NULL)
    *needed = o.len;
  if (buf == NULL)
    return KL_OK; /* the sizing call */
  return o.len < cap ? KL_OK : KL_ETRUNCATED;
}

int kl_model_write_file(const kl_model *m, const char *path,
                        kl_io_error *err) {
  size_t len;
  char *text;
  FILE *f;
  int st = KL_OK;
  clear_error(err);
  if (m == NULL || path == NULL) {
    io_fail(err, KL_EINVAL, "write model: no %s%s", m == NULL ? "model" : "path",
            " (NULL)");
    return KL_EINVAL;
  }
  kl_model_write(m, NULL, 0, &len);
  text = kli_alloc(&m->alloc, len + 1);
  if (text == NULL) {
    io_fail(err, KL_ENOMEM, "write model '%.120s': out of memory%s", path, "");
    return KL_ENOMEM;
  }
  kl_model_write(m, text, len + 1, NULL);
  f = fopen(path, "wb");
  if (f == NULL) {
    io_fail(err, KL_EIO, "cannot create '%.120s': %.80s", path,
            strerror(errno));
    st = KL_EIO;
  } else {
    if (fwrite(text, 1, len, f) != len)
      st = KL_EIO;
    if (fclose(f) != 0)
      st = KL_EIO;
    if (st != KL_OK)
      io_fail(err, KL_EIO, "cannot write '%.120s': %.80s", path,
              strerror(errno));
  }
  kli_free(&m->alloc, text, len + 1);
  return st;
}
