/*
 * tokens.c - the tokenizer the model and study readers share: tokens of a
 * line, what a statement expects next, and errors at a line and column.
 */
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "tokens.h"

static int io_vfail(kl_io_error *err, int status, int line, int column,
                    const char *fmt, va_list ap) {
  kl_io_error e;
  if (err == NULL || err->size < sizeof(err->size))
    return status;
  memset(&e, 0, sizeof e);
  e.size = err->size;
  e.status = status;
  e.line = line;
  e.column = column;
  vsnprintf(e.message, sizeof e.message, fmt, ap);
  memcpy(err, &e, err->size < sizeof e ? err->size : sizeof e);
  return status;
}

int kli_io_fail(kl_io_error *err, int status, int line, int column,
                const char *fmt, ...) {
  va_list ap;
  va_start(ap, fmt);
  status = io_vfail(err, status, line, column, fmt, ap);
  va_end(ap);
  return status;
}

int kli_read_fail(kli_reader *r, int status, int column, const char *fmt, ...) {
  va_list ap;
  va_start(ap, fmt);
  status = io_vfail(r->err, status, r->line, column, fmt, ap);
  va_end(ap);
  return status;
}

void kli_reader_start(kli_reader *r, const char *text, size_t length,
                      kl_io_error *err) {
  memset(r, 0, sizeof *r);
  r->text = text;
  r->length = length;
  r->line = 1;
  r->err = err;
  kli_io_clear(err);
}

static int column_of(const kli_reader *r, size_t pos) {
  return (int)(pos - r->line_start) + 1;
}

/* The bytes of the line break at pos: 2 for CR LF, 1 for LF or a CR alone
 * (old Mac files: CR ends a line too), 0 for none. */
static size_t line_break_at(const char *text, size_t length, size_t pos) {
  if (pos >= length)
    return 0;
  if (text[pos] == '\n')
    return 1;
  if (text[pos] == '\r')
    return pos + 1 < length && text[pos + 1] == '\n' ? 2 : 1;
  return 0;
}

/* The next token on the current line; KLI_TOKEN_END at a newline, a comment
 * or the end of the input. */
int kli_next_token(kli_reader *r, kli_token *t) {
  size_t start;
  while (r->pos < r->length &&
         (r->text[r->pos] == ' ' || r->text[r->pos] == '\t'))
    r->pos++;
  t->length = 0;
  t->text[0] = '\0';
  t->column = column_of(r, r->pos);
  if (r->pos >= r->length || line_break_at(r->text, r->length, r->pos) > 0 ||
      r->text[r->pos] == '#') {
    t->kind = KLI_TOKEN_END;
    return KL_OK;
  }
  start = r->pos;
  if (r->text[r->pos] == '"') {
    r->pos++;
    t->kind = KLI_TOKEN_STRING;
    for (;;) {
      char c;
      if (r->pos >= r->length || line_break_at(r->text, r->length, r->pos) > 0)
        return kli_read_fail(
            r, KL_ESYNTAX, t->column,
            "the quoted name starting here has no closing quote");
      c = r->text[r->pos++];
      if (c == '"')
        break;
      if (c == '\\') {
        if (r->pos >= r->length ||
            (r->text[r->pos] != '"' && r->text[r->pos] != '\\'))
          return kli_read_fail(
              r, KL_ESYNTAX, column_of(r, r->pos - 1),
              "expected \\\" or \\\\ after a backslash in a name");
        c = r->text[r->pos++];
      } else if ((unsigned char)c < 0x20 || c == 0x7f) {
        return kli_read_fail(r, KL_ESYNTAX, column_of(r, r->pos - 1),
                             "a control character cannot stand in a name");
      }
      if (t->length == KLI_TOKEN_MAX)
        return kli_read_fail(r, KL_ESYNTAX, t->column,
                             "a name is at most %d bytes long", KLI_TOKEN_MAX);
      t->text[t->length++] = c;
    }
  } else {
    t->kind = KLI_TOKEN_WORD;
    while (r->pos < r->length && r->text[r->pos] != ' ' &&
           r->text[r->pos] != '\t' && r->text[r->pos] != '\r' &&
           r->text[r->pos] != '\n' && r->text[r->pos] != '#') {
      unsigned char c = (unsigned char)r->text[r->pos];
      if (c < 0x20 || c == 0x7f)
        return kli_read_fail(r, KL_ESYNTAX, column_of(r, r->pos),
                             "unexpected control character (byte 0x%02x)", c);
      if (r->pos - start == KLI_TOKEN_MAX)
        return kli_read_fail(r, KL_ESYNTAX, t->column,
                             "a word is at most %d bytes long", KLI_TOKEN_MAX);
      t->text[t->length++] = (char)c;
      r->pos++;
    }
  }
  t->text[t->length] = '\0';
  return KL_OK;
}

/* Skips to the start of the next line. */
void kli_next_line(kli_reader *r) {
  while (r->pos < r->length && line_break_at(r->text, r->length, r->pos) == 0)
    r->pos++;
  r->pos += line_break_at(r->text, r->length, r->pos);
  r->line++;
  r->line_start = r->pos;
}

const char *kli_token_shown(const kli_token *t) {
  return t->kind == KLI_TOKEN_END ? "the end of the line" : t->text;
}

int kli_expect_end(kli_reader *r) {
  kli_token t;
  int st = kli_next_token(r, &t);
  if (st != KL_OK)
    return st;
  if (t.kind != KLI_TOKEN_END)
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected the end of the statement, found '%.60s'",
                         t.text);
  return KL_OK;
}

int kli_expect_keyword(kli_reader *r, const char *word, const char *why) {
  kli_token t;
  int st = kli_next_token(r, &t);
  if (st != KL_OK)
    return st;
  if (t.kind != KLI_TOKEN_WORD || strcmp(t.text, word) != 0)
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected '%s' %s, found '%.60s'", word, why,
                         kli_token_shown(&t));
  return KL_OK;
}

/* A decimal number: digits, one point, an exponent; no NaN or infinity.
 * Its column goes to *column when that is not NULL. */
int kli_expect_number_at(kli_reader *r, const char *what, double *value,
                         int *column) {
  kli_token t;
  char *end;
  size_t i;
  int st = kli_next_token(r, &t);
  if (st != KL_OK)
    return st;
  if (column != NULL)
    *column = t.column;
  for (i = 0; i < t.length && t.kind == KLI_TOKEN_WORD; i++)
    if (strchr("0123456789+-.eE", t.text[i]) == NULL)
      break;
  if (t.kind != KLI_TOKEN_WORD || t.length == 0 || i < t.length)
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected a number (%s), found "
                         "'%.60s'",
                         what, kli_token_shown(&t));
  *value = strtod(t.text, &end);
  if (*end != '\0')
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected a number (%s), found '%.60s'", what, t.text);
  /* only overflow is an error: strtod's ERANGE also flags underflow, to a
   * subnormal number or zero, which is read as that value */
  if (!isfinite(*value))
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "the number '%.60s' (%s) is out of range", t.text,
                         what);
  return KL_OK;
}

int kli_expect_number(kli_reader *r, const char *what, double *value) {
  return kli_expect_number_at(r, what, value, NULL);
}

int kli_expect_count(kli_reader *r, const char *what, int *value) {
  double v;
  int column, st = kli_expect_number_at(r, what, &v, &column);
  if (st != KL_OK)
    return st;
  if (v != floor(v) || v < 1 || v > 1e9)
    return kli_read_fail(r, KL_ESYNTAX, column,
                         "expected a whole number from 1 to 1000000000 (%s), "
                         "found %.15g",
                         what, v);
  *value = (int)v;
  return KL_OK;
}

int kli_expect_steps(kli_reader *r, int *value) {
  double v;
  int column, st = kli_expect_number_at(r, "the number of steps", &v, &column);
  if (st != KL_OK)
    return st;
  /* %.15g shows every whole number up to the limit and well past it */
  if (v != floor(v) || v < 1)
    return kli_read_fail(r, KL_ESYNTAX, column,
                         "expected a whole number of steps from 1 to %d, "
                         "found %.15g",
                         KL_MAX_STEPS, v);
  if (v > KL_MAX_STEPS)
    return kli_read_fail(r, KL_ETOOLARGE, column,
                         "%.15g steps; a sweep takes at most %d "
                         "(KL_MAX_STEPS)",
                         v, KL_MAX_STEPS);
  *value = (int)v;
  return KL_OK;
}

int kli_is_identifier(const char *s) {
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
int kli_expect_new_name(kli_reader *r, const char *what, kli_token *t,
                        const char **name) {
  int st = kli_next_token(r, t);
  if (st != KL_OK)
    return st;
  if (t->kind == KLI_TOKEN_WORD && strcmp(t->text, "-") == 0) {
    *name = NULL;
    return KL_OK;
  }
  if (t->kind == KLI_TOKEN_STRING ||
      (t->kind == KLI_TOKEN_WORD && kli_is_identifier(t->text))) {
    *name = t->text;
    return KL_OK;
  }
  return kli_read_fail(
      r, KL_ESYNTAX, t->column,
      "expected the %s's name (a word, a quoted name, or - for "
      "none), found '%.60s'",
      what, kli_token_shown(t));
}

/* A reference to an existing link, joint or point: its name, or @id. */
int kli_expect_ref(kli_reader *r, int kind, const char *what, int *id) {
  kli_token t;
  static const char *const nouns[] = {"link", "joint", "point"};
  const char *noun = nouns[kind];
  int count = kind == KLI_REF_LINK    ? r->m->nlinks
              : kind == KLI_REF_JOINT ? r->m->njoints
                                      : r->m->npoints,
      found;
  int st = kli_next_token(r, &t);
  if (st != KL_OK)
    return st;
  if (t.kind == KLI_TOKEN_END)
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected a %s (%s), found the end of the line", noun,
                         what);
  if (t.kind == KLI_TOKEN_WORD && t.text[0] == '@') {
    char *end;
    long v = strtol(t.text + 1, &end, 10);
    if (t.text[1] == '\0' || *end != '\0' || v < 0 || v >= count)
      return kli_read_fail(r, KL_ESYNTAX, t.column,
                           "'%.60s' is not the id of a %s (%s; there are %d)",
                           t.text, noun, what, count);
    *id = (int)v;
    return KL_OK;
  }
  found = kind == KLI_REF_LINK    ? kl_model_find_link(r->m, t.text)
          : kind == KLI_REF_JOINT ? kl_model_find_joint(r->m, t.text)
                                  : kl_model_find_point(r->m, t.text);
  if (found < 0)
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "no %s is named '%.60s' (%s); %ss must be declared "
                         "before they are used",
                         noun, t.text, what, noun);
  *id = found;
  return KL_OK;
}

double kli_angle_in(const kli_reader *r, double v) {
  return r->angle_deg ? v * (KLI_PI / 180.0) : v;
}

int kli_expect_load(kli_reader *r, kl_load *l) {
  kli_token t;
  int st;
  memset(l, 0, sizeof *l);
  if ((st = kli_next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "force") == 0) {
    l->kind = KL_LOAD_FORCE;
    if ((st = kli_expect_ref(r, KLI_REF_POINT, "the loaded point", &l->id)) !=
            KL_OK ||
        (st = kli_expect_number(r, "the force's x", &l->fx)) != KL_OK ||
        (st = kli_expect_number(r, "the force's y", &l->fy)) != KL_OK)
      return st;
  } else if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "torque") == 0) {
    l->kind = KL_LOAD_TORQUE;
    if ((st = kli_expect_ref(r, KLI_REF_LINK, "the loaded link", &l->id)) !=
            KL_OK ||
        (st = kli_expect_number(r, "the torque", &l->torque)) != KL_OK)
      return st;
  } else {
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected 'force' or 'torque', found '%.60s'",
                         kli_token_shown(&t));
  }
  return kli_expect_end(r);
}

/* JOINT from V to V steps N, JOINT being an input's joint: into *sw, the
 * range in API units. */
int kli_expect_sweep(kli_reader *r, kl_sweep_settings *sw) {
  int st, joint, i;
  if ((st = kli_expect_ref(r, KLI_REF_JOINT, "the swept input's joint",
                           &joint)) != KL_OK ||
      (st = kli_expect_keyword(r, "from", "after the swept joint")) != KL_OK ||
      (st = kli_expect_number(r, "the start of the sweep", &sw->from)) !=
          KL_OK ||
      (st = kli_expect_keyword(r, "to", "after the start")) != KL_OK ||
      (st = kli_expect_number(r, "the end of the sweep", &sw->to)) != KL_OK ||
      (st = kli_expect_keyword(r, "steps", "after the end")) != KL_OK ||
      (st = kli_expect_steps(r, &sw->steps)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  sw->size = sizeof *sw;
  sw->input = -1;
  for (i = 0; i < r->m->ninputs; i++)
    if (r->m->inputs[i] == joint)
      sw->input = i;
  if (sw->input < 0)
    return kli_read_fail(r, KL_ESYNTAX, 1,
                         "the swept joint is not an input; declare it with "
                         "'input' first");
  if (!isfinite(sw->to - sw->from))
    return kli_read_fail(r, KL_ENONFINITE, 1,
                         "the sweep from %g to %g is longer than a number "
                         "holds",
                         sw->from, sw->to);
  if (r->m->joints[joint].kind == KL_JOINT_REVOLUTE) {
    sw->from = kli_angle_in(r, sw->from);
    sw->to = kli_angle_in(r, sw->to);
  }
  return KL_OK;
}

void kli_io_clear(kl_io_error *err) {
  if (err != NULL && err->size >= sizeof(err->size)) {
    kl_io_error e;
    memset(&e, 0, sizeof e);
    e.size = err->size;
    memcpy(err, &e, err->size < sizeof e ? err->size : sizeof e);
  }
}

/* What both readers refuse before reading a statement: no text or too much
 * (line 0: the text as a whole), or a NUL byte (located: it is no text
 * file). r->text and r->length are set; r->line is 1 after it. */
int kli_check_text(kli_reader *r, const char *what) {
  const char *nul;
  size_t at, i;
  /* errors of the text as a whole have line 0 */
  r->line = 0;
  if (r->text == NULL && r->length > 0)
    return kli_read_fail(r, KL_EINVAL, 0, "no %s text (NULL) for %lu bytes",
                         what, (unsigned long)r->length);
  if (r->length > KLI_MAX_INPUT)
    return kli_read_fail(r, KL_EINVAL, 0,
                         "the %s text is %lu bytes; at most %u are read", what,
                         (unsigned long)r->length, KLI_MAX_INPUT);
  r->line = 1;
  nul = r->length > 0 ? memchr(r->text, '\0', r->length) : NULL;
  if (nul == NULL)
    return KL_OK;
  at = (size_t)(nul - r->text);
  for (i = 0; i < at;) {
    size_t brk = line_break_at(r->text, r->length, i);
    i += brk > 0 ? brk : 1;
    if (brk > 0) {
      r->line++;
      r->line_start = i;
    }
  }
  return kli_read_fail(r, KL_ESYNTAX, column_of(r, at),
                       "a NUL byte: this is not a text file");
}
