/*
 * files.c - the one module that touches files: a model or study file read
 * whole and handed to its reader, and a model's text written to a file.
 */
#include <errno.h>
#include <stdio.h>
#include <string.h>

#include "study.h"
#include "tokens.h"

/* The text of files comes from malloc: a model read from a file gets its
 * own allocator only once it exists. */
static const kli_allocator file_alloc = {kli_default_alloc, NULL};

/* The bytes of a file, up to one more than the readers take (so that one
 * too long is told apart), in a buffer of *cap bytes; KL_OK, or a status
 * with err set. */
static int read_whole_file(const char *path, char **buf, int *cap, size_t *len,
                           kl_io_error *err) {
  FILE *f;
  int n = 0, st = KL_OK;
  *buf = NULL;
  *cap = 0;
  if (path == NULL)
    return kli_io_fail(err, KL_EINVAL, 0, 0, "read: no path (NULL)");
  f = fopen(path, "rb");
  if (f == NULL)
    return kli_io_fail(err, KL_EIO, 0, 0, "cannot open '%.120s': %.80s", path,
                       strerror(errno));
  for (;;) {
    size_t got;
    int want =
        n + 65536 > (int)KLI_MAX_INPUT + 1 ? (int)KLI_MAX_INPUT + 1 : n + 65536;
    if (kli_reserve(&file_alloc, (void **)buf, cap, want, 1) != KL_OK) {
      st = kli_io_fail(err, KL_ENOMEM, 0, 0, "read '%.120s': out of memory",
                       path);
      break;
    }
    got = fread(*buf + n, 1, (size_t)(want - n), f);
    n += (int)got;
    if (ferror(f)) {
      st = kli_io_fail(err, KL_EIO, 0, 0, "cannot read '%.120s': %.80s", path,
                       strerror(errno));
      break;
    }
    if (got == 0 || n > (int)KLI_MAX_INPUT)
      break;
  }
  fclose(f);
  *len = (size_t)n;
  if (st != KL_OK) {
    kli_free(&file_alloc, *buf, (size_t)*cap);
    *buf = NULL;
  }
  return st;
}

kl_model *kl_model_read_file(const char *path, kl_io_error *err) {
  char *text;
  int cap;
  size_t len;
  kl_model *m;
  kli_io_clear(err);
  if (read_whole_file(path, &text, &cap, &len, err) != KL_OK)
    return NULL;
  m = kl_model_read(text, len, err);
  kli_free(&file_alloc, text, (size_t)cap);
  return m;
}

/* The model file a study names, read relative to the study's folder `dir`;
 * failures are placed at the path in the study (line, column). */
static kl_model *read_study_model(const char *dir, const char *name, int line,
                                  int column, kl_io_error *err) {
  char path[1024];
  kl_io_error inner;
  kl_model *m;
  int n;
  if (name[0] == '/' || dir[0] == '\0')
    n = snprintf(path, sizeof path, "%s", name);
  else
    n = snprintf(path, sizeof path, "%s%s%s", dir,
                 dir[strlen(dir) - 1] == '/' ? "" : "/", name);
  if (n < 0 || (size_t)n >= sizeof path) {
    kli_io_fail(err, KL_EIO, line, column,
                "the model's path is longer than %d characters",
                (int)sizeof path - 1);
    return NULL;
  }
  inner.size = sizeof inner;
  m = kl_model_read_file(path, &inner);
  if (m == NULL && inner.line > 0)
    kli_io_fail(err, inner.status, line, column,
                "the model '%.200s', line %d, column %d: %.300s", path,
                inner.line, inner.column, inner.message);
  else if (m == NULL)
    kli_io_fail(err, inner.status, line, column, "the model '%.200s': %.300s",
                path, inner.message);
  return m;
}

kl_study *kl_study_read_file(const char *path, kl_io_error *err) {
  char dir[1024], name[KLI_TOKEN_MAX + 1];
  const char *slash;
  kl_study *st = NULL;
  kl_model *m;
  char *text;
  int cap, line, column;
  size_t len;
  kli_io_clear(err);
  if (read_whole_file(path, &text, &cap, &len, err) != KL_OK)
    return NULL;
  slash = strrchr(path, '/');
  if (slash != NULL && (size_t)(slash - path) >= sizeof dir) {
    kli_io_fail(err, KL_EIO, 0, 0,
                "read '%.120s': its directory is too long for a study's "
                "base directory",
                path);
  } else if (kli_study_find_model(text, len, name, sizeof name, &line, &column,
                                  err) == KL_OK) {
    /* the directory part, keeping the root of "/name" */
    snprintf(dir, sizeof dir, "%.*s",
             slash == NULL   ? 1
             : slash == path ? 1
                             : (int)(slash - path),
             slash == NULL ? "." : path);
    m = read_study_model(dir, name, line, column, err);
    if (m != NULL) {
      st = kl_study_read(text, len, m, err);
      kl_model_free(m); /* the study holds it */
    }
  }
  kli_free(&file_alloc, text, (size_t)cap);
  return st;
}

int kl_model_write_file(const kl_model *m, const char *path, kl_io_error *err) {
  size_t len;
  char *text;
  FILE *f;
  int st = KL_OK;
  kli_io_clear(err);
  if (m == NULL || path == NULL)
    return kli_io_fail(err, KL_EINVAL, 0, 0, "write model: no %s (NULL)",
                       m == NULL ? "model" : "path");
  kl_model_write(m, NULL, 0, &len);
  text = kli_alloc(&m->alloc, len + 1);
  if (text == NULL)
    return kli_io_fail(err, KL_ENOMEM, 0, 0,
                       "write model '%.120s': out of memory", path);
  kl_model_write(m, text, len + 1, NULL);
  f = fopen(path, "wb");
  if (f == NULL) {
    st = kli_io_fail(err, KL_EIO, 0, 0, "cannot create '%.120s': %.80s", path,
                     strerror(errno));
  } else {
    if (fwrite(text, 1, len, f) != len)
      st = KL_EIO;
    if (fclose(f) != 0)
      st = KL_EIO;
    if (st != KL_OK)
      kli_io_fail(err, KL_EIO, 0, 0, "cannot write '%.120s': %.80s", path,
                  strerror(errno));
  }
  kli_free(&m->alloc, text, len + 1);
  return st;
}
