/*
 * tokens.h - private: the tokenizer the two text formats (model files and
 * study files) share: tokens, what a statement expects, located errors.
 */
#ifndef KINLOOP_TOKENS_H
#define KINLOOP_TOKENS_H

#include "model.h"

#define KLI_MAX_INPUT (16u << 20) /* bytes a model or study text may have */
#define KLI_TOKEN_MAX 255         /* bytes in a name or a number */
#define KLI_FORMAT_VERSION 1      /* of both formats */

enum { KLI_TOKEN_END, KLI_TOKEN_WORD, KLI_TOKEN_STRING };

typedef struct {
  int kind;   /* KLI_TOKEN_* */
  int column; /* 1-based */
  size_t length;
  char text[KLI_TOKEN_MAX + 1];
} kli_token;

/* Where a reader is in its text, and what its statements refer to. */
typedef struct {
  const char *text;
  size_t length, pos;
  int line;          /* 1-based; 0 while the text as a whole is judged */
  size_t line_start;
  const kl_model *m; /* resolves names and @ids; NULL while there is none */
  kl_io_error *err;  /* the caller's, may be NULL */
  int angle_deg;     /* angles in the text are degrees */
  int seen_header;
} kli_reader;

/* What a reference names (kli_expect_ref). */
enum { KLI_REF_LINK, KLI_REF_JOINT, KLI_REF_POINT };

/* Clears the caller's error struct to "no error" (err may be NULL). */
void kli_io_clear(kl_io_error *err);
/* Writes status, line, column and message into err (may be NULL, or
 * shorter than the library's struct: no further than its size); returns
 * status. */
int kli_io_fail(kl_io_error *err, int status, int line, int column,
                const char *fmt, ...)
#ifdef __GNUC__
    __attribute__((format(printf, 5, 6)))
#endif
    ;
/* kli_io_fail at the reader's line. */
int kli_read_fail(kli_reader *r, int status, int column, const char *fmt, ...)
#ifdef __GNUC__
    __attribute__((format(printf, 4, 5)))
#endif
    ;

/* A reader at the start of `length` bytes of text, err cleared. */
void kli_reader_start(kli_reader *r, const char *text, size_t length,
                      kl_io_error *err);
/* What both readers refuse before reading a statement: no text, too much,
 * or a NUL byte (located: it is no text file). `what` names the format. */
int kli_check_text(kli_reader *r, const char *what);

/* The next token on the current line; KLI_TOKEN_END at a newline, a
 * comment or the end of the text. */
int kli_next_token(kli_reader *r, kli_token *t);
/* Skips to the start of the next line. */
void kli_next_line(kli_reader *r);
/* A token as a message shows it. */
const char *kli_token_shown(const kli_token *t);
/* Whether s is a word that stands as a name unquoted. */
int kli_is_identifier(const char *s);

int kli_expect_end(kli_reader *r);
int kli_expect_keyword(kli_reader *r, const char *word, const char *why);
/* A decimal number (no NaN or infinity); its column into *column when that
 * is not NULL. */
int kli_expect_number_at(kli_reader *r, const char *what, double *value,
                         int *column);
int kli_expect_number(kli_reader *r, const char *what, double *value);
/* A sweep's or grid's number of steps: a whole number from 1 to
 * KL_MAX_STEPS (KL_ETOOLARGE beyond it, at the number). */
int kli_expect_steps(kli_reader *r, int *value);
/* A whole number from 1 to 1e9 (`what` names it in the message). */
int kli_expect_count(kli_reader *r, const char *what, int *value);
/* A new item's name: an identifier, a quoted string, or '-' for none
 * (*name NULL); *name points into *t. */
int kli_expect_new_name(kli_reader *r, const char *what, kli_token *t,
                        const char **name);
/* A reference to an existing link, joint or point of r->m: its name, or
 * @id. */
int kli_expect_ref(kli_reader *r, int kind, const char *what, int *id);
/* An angle of the text in radians. */
double kli_angle_in(const kli_reader *r, double v);
/* The model file's word for motion law `law` (enum kl_motion_law_kind), or
 * NULL for a number that is no law. */
const char *kli_law_word(int law);
/* force POINT FX FY | torque LINK T, and the end of the line: into *l
 * (the 'load' statement of both formats, after its first word). */
int kli_expect_load(kli_reader *r, kl_load *l);
/* JOINT from V to V steps N, JOINT an input's joint: into *sw, the range
 * in API units (the 'sweep' statement of both formats). */
int kli_expect_sweep(kli_reader *r, kl_sweep_settings *sw);

#endif
