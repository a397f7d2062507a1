/*
 * model_io.c - the model a command works on: read from a file or the
 * embedded demo, its items named, its loops read through the library; and
 * the output files and folders commands write.
 */
#define _POSIX_C_SOURCE 200809L /* mkdir, stat, mkstemp, sigaction, fsync */
#include <errno.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/types.h>
#include <unistd.h>

#include "cli.h"

#define MAX_MODEL_BYTES (16u << 20) /* what kl_model_read accepts */

/* Reads a whole file; NULL after printing why. */
static char *read_file(const char *path, size_t *length) {
  FILE *f = fopen(path, "rb");
  char *buf = NULL;
  size_t cap = 0, len = 0;
  if (f == NULL) {
    cli_error("cannot read the model file '%s': %s", path, strerror(errno));
    return NULL;
  }
  for (;;) {
    size_t got;
    if (len == cap) {
      char *grown;
      cap = cap == 0 ? 65536 : 2 * cap;
      grown = realloc(buf, cap);
      if (grown == NULL) {
        cli_error("out of memory reading '%s'", path);
        free(buf);
        fclose(f);
        return NULL;
      }
      buf = grown;
    }
    got = fread(buf + len, 1, cap - len, f);
    len += got;
    if (ferror(f)) {
      cli_error("cannot read the model file '%s': %s", path, strerror(errno));
      free(buf);
      fclose(f);
      return NULL;
    }
    if (got == 0 || len > MAX_MODEL_BYTES)
      break;
  }
  fclose(f);
  *length = len;
  return buf;
}

static char *label_of(const char *name, int id) {
  char at[24];
  const char *text = name;
  char *copy;
  if (text == NULL) {
    snprintf(at, sizeof at, "@%d", id);
    text = at;
  }
  copy = malloc(strlen(text) + 1);
  if (copy != NULL)
    strcpy(copy, text);
  return copy;
}

static char **labels(int n, const kl_model *m,
                     const char *(*name)(const kl_model *, int)) {
  char **out = calloc((size_t)(n > 0 ? n : 1), sizeof *out);
  int i;
  if (out == NULL)
    return NULL;
  for (i = 0; i < n; i++)
    if ((out[i] = label_of(name(m, i), i)) == NULL) {
      while (i-- > 0)
        free(out[i]);
      free(out);
      return NULL;
    }
  return out;
}

/* Each input's name: its joint's, or its point's with ".x" or ".y". */
static char **input_labels(const cli_model *cm) {
  char **out = calloc((size_t)(cm->ninputs > 0 ? cm->ninputs : 1),
                      sizeof *out);
  int i;
  if (out == NULL)
    return NULL;
  for (i = 0; i < cm->ninputs; i++) {
    int joint = kl_model_input_joint(cm->model, i);
    const char *base = joint >= 0
                           ? cm->joint_names[joint]
                           : cm->point_names[kl_model_input_point(cm->model, i)];
    size_t n = strlen(base) + 3;
    out[i] = malloc(n);
    if (out[i] == NULL) {
      while (i-- > 0)
        free(out[i]);
      free(out);
      return NULL;
    }
    if (joint >= 0)
      snprintf(out[i], n, "%s", base);
    else
      snprintf(out[i], n, "%s.%c", base,
               kl_model_input_axis(cm->model, i) == 0 ? 'x' : 'y');
  }
  return out;
}

static void free_labels(char **l, int n) {
  int i;
  if (l == NULL)
    return;
  for (i = 0; i < n; i++)
    free(l[i]);
  free(l);
}

/* What the library reads from the loops: the transmission-angle sites
 * and the joints passed over, the four-bar loops; and the row layout. */
static int read_loops(cli_model *cm) {
  const kl_model *m = cm->model;
  int loop, q;
  cm->nsites = kl_model_transmissions(m, NULL, 0);
  cm->nskips = kl_model_transmission_skips(m, NULL, 0);
  cm->sites = malloc((size_t)(cm->nsites > 0 ? cm->nsites : 1) *
                     sizeof *cm->sites);
  cm->skips = malloc((size_t)(cm->nskips > 0 ? cm->nskips : 1) *
                     sizeof *cm->skips);
  cm->fourbars = malloc((size_t)(cm->nloops > 0 ? cm->nloops : 1) *
                        sizeof *cm->fourbars);
  if (cm->sites == NULL || cm->skips == NULL || cm->fourbars == NULL)
    return CLI_EXIT_MEMORY;
  kl_model_transmissions(m, cm->sites, cm->nsites);
  kl_model_transmission_skips(m, cm->skips, cm->nskips);
  for (loop = 0; loop < cm->nloops; loop++) {
    kl_fourbar *fb = &cm->fourbars[cm->nfourbars];
    fb->size = sizeof *fb;
    if (kl_model_loop_fourbar(m, loop, fb) == KL_OK)
      cm->nfourbars++;
  }
  cm->row_size = kl_model_row_size(m);
  for (q = 0; q <= KL_QUANTITY_RCOND; q++)
    cm->row_offset[q] = kl_model_row_offset(m, q, NULL);
  return CLI_EXIT_OK;
}

static int fill_tables(cli_model *cm) {
  kl_model *m = cm->model;
  int length_unit, angle_unit, j;
  cm->nlinks = kl_model_link_count(m);
  cm->njoints = kl_model_joint_count(m);
  cm->npoints = kl_model_point_count(m);
  cm->ninputs = kl_model_input_count(m);
  cm->nloops = kl_model_loop_count(m);
  kl_model_units(m, &length_unit, &angle_unit);
  cm->angle_factor = angle_unit == KL_ANGLE_DEG ? 180.0 / CLI_PI : 1.0;
  cm->angle_unit = kl_angle_unit_str(angle_unit);
  cm->length_unit = length_unit == KL_LENGTH_UNSTATED
                        ? "len"
                        : kl_length_unit_str(length_unit);
  cm->link_names = labels(cm->nlinks, m, kl_model_link_name);
  cm->joint_names = labels(cm->njoints, m, kl_model_joint_name);
  cm->point_names = labels(cm->npoints, m, kl_model_point_name);
  cm->slides = malloc((size_t)(cm->njoints > 0 ? cm->njoints : 1) *
                      sizeof *cm->slides);
  if (cm->link_names == NULL || cm->joint_names == NULL ||
      cm->point_names == NULL || cm->slides == NULL)
    return CLI_EXIT_MEMORY;
  if ((cm->input_names = input_labels(cm)) == NULL)
    return CLI_EXIT_MEMORY;
  for (j = 0; j < cm->njoints; j++)
    if (kl_model_joint_kind(m, j) != KL_JOINT_REVOLUTE)
      cm->slides[cm->nslides++] = j;
  return read_loops(cm);
}

/* The model text followed by the statements of `profile`, one a line
 * (';' becomes a line break); *lines_before the lines before the first
 * statement. NULL when out of memory. */
static char *with_profile(const char *text, size_t length, const char *profile,
                          size_t *combined_length, int *lines_before) {
  size_t extra = strlen(profile), i;
  char *combined = malloc(length + 1 + extra + 1);
  if (combined == NULL)
    return NULL;
  memcpy(combined, text, length);
  *lines_before = 1;
  for (i = 0; i < length; i++)
    *lines_before += text[i] == '\n';
  combined[length] = '\n';
  for (i = 0; i < extra; i++)
    combined[length + 1 + i] = profile[i] == ';' ? '\n' : profile[i];
  combined[length + 1 + extra] = '\n';
  *combined_length = length + 1 + extra + 1;
  return combined;
}

int cli_model_load(cli_model *cm, const char *path, const char *profile) {
  kl_io_error err;
  int st, lines_before = 0;
  memset(cm, 0, sizeof *cm);
  if (path == NULL) {
    cm->label = cli_demo_file_name;
    cm->text = (const char *)cli_demo_text;
    cm->length = cli_demo_length;
  } else {
    cm->label = path;
    cm->owned_text = read_file(path, &cm->length);
    if (cm->owned_text == NULL)
      return CLI_EXIT_MODEL;
    cm->text = cm->owned_text;
  }
  if (profile != NULL) {
    char *combined =
        with_profile(cm->text, cm->length, profile, &cm->length, &lines_before);
    if (combined == NULL) {
      cli_error("out of memory reading '%s'", cm->label);
      cli_model_free(cm);
      return CLI_EXIT_MEMORY;
    }
    free(cm->owned_text);
    cm->owned_text = combined;
    cm->text = combined;
  }
  err.size = sizeof err;
  cm->model = kl_model_read(cm->text, cm->length, &err);
  if (cm->model == NULL) {
    if (err.status == KL_ENOMEM) {
      cli_error("out of memory reading '%s'", cm->label);
      st = CLI_EXIT_MEMORY;
    } else {
      if (profile != NULL && err.line > lines_before)
        fprintf(stderr, "kinloop: --profile statement %d:%d: %s\n",
                err.line - lines_before, err.column, err.message);
      else if (err.line > 0)
        fprintf(stderr, "kinloop: %s:%d:%d: %s\n", cm->label, err.line,
                err.column, err.message);
      else
        fprintf(stderr, "kinloop: %s: %s\n", cm->label, err.message);
      st = CLI_EXIT_MODEL;
    }
    cli_model_free(cm);
    return st;
  }
  st = fill_tables(cm);
  if (st != CLI_EXIT_OK) {
    cli_error("out of memory preparing '%s'", cm->label);
    cli_model_free(cm);
  }
  return st;
}

void cli_model_free(cli_model *cm) {
  free_labels(cm->link_names, cm->nlinks);
  free_labels(cm->joint_names, cm->njoints);
  free_labels(cm->point_names, cm->npoints);
  free_labels(cm->input_names, cm->ninputs);
  free(cm->slides);
  free(cm->sites);
  free(cm->skips);
  free(cm->fourbars);
  kl_model_free(cm->model);
  free(cm->owned_text);
  memset(cm, 0, sizeof *cm);
}

const char *cli_model_comment(const cli_model *cm, int k, size_t *len) {
  size_t pos = 0;
  int line = 0;
  while (pos < cm->length) {
    size_t end = pos, start;
    while (end < cm->length && cm->text[end] != '\n')
      end++;
    start = pos;
    while (start < end && (cm->text[start] == ' ' || cm->text[start] == '\t'))
      start++;
    if (start == end || cm->text[start] != '#')
      return NULL; /* the leading block ends at the first other line */
    start++;
    if (start < end && cm->text[start] == ' ')
      start++;
    if (line == k) {
      *len = end - start;
      while (*len > 0 && cm->text[start + *len - 1] == '\r')
        (*len)--;
      return cm->text + start;
    }
    line++;
    pos = end + 1;
  }
  return NULL;
}

/* The files being written: their temporary names, for renaming when done
 * and for removal when the run is interrupted. Fixed arrays, so that the
 * signal handler touches no heap. */
#define MAX_OPEN_OUTPUTS 8
#define MAX_PATH_BYTES 4096
static struct {
  FILE *f;
  char temp[MAX_PATH_BYTES];
} open_outputs[MAX_OPEN_OUTPUTS];
static volatile sig_atomic_t handlers_set;
static int write_over;

void cli_set_write_over(int allowed) { write_over = allowed; }

/* Interrupted (SIGINT, SIGTERM, SIGHUP): removes the temporary files, so
 * that only the earlier files remain, and dies of the same signal. */
static void remove_temps_and_die(int sig) {
  int k;
  for (k = 0; k < MAX_OPEN_OUTPUTS; k++)
    if (open_outputs[k].f != NULL)
      unlink(open_outputs[k].temp);
  signal(sig, SIG_DFL);
  raise(sig);
}

static void set_handlers(void) {
  static const int signals[] = {SIGINT, SIGTERM, SIGHUP};
  size_t k;
  if (handlers_set)
    return;
  for (k = 0; k < sizeof signals / sizeof signals[0]; k++) {
    struct sigaction sa;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = remove_temps_and_die;
    sigemptyset(&sa.sa_mask);
    sigaction(signals[k], &sa, NULL);
  }
  handlers_set = 1;
}

/* Whether the file at `path` starts as a model or a study file does (its
 * first word after comments and blank lines). */
static const char *document_kind(const char *path) {
  char line[256];
  const char *kind = NULL;
  int lines = 0; /* only regular files get here; comments come first */
  FILE *f = fopen(path, "rb");
  if (f == NULL)
    return NULL;
  while (lines++ < 1000 && fgets(line, sizeof line, f) != NULL) {
    const char *p = line;
    while (*p == ' ' || *p == '\t' || *p == '\r' || *p == '\n')
      p++;
    if (*p == '\0' || *p == '#')
      continue;
    if (strncmp(p, "kinloop-model", 13) == 0)
      kind = "model";
    else if (strncmp(p, "kinloop-study", 13) == 0)
      kind = "study";
    break;
  }
  fclose(f);
  return kind;
}

FILE *cli_open_output(const char *path) {
  const char *kind;
  int k, fd;
  FILE *f;
  if (path == NULL || strcmp(path, "-") == 0)
    return stdout;
  {
    /* a device or a pipe is written as it is: no file to keep */
    struct stat info;
    if (stat(path, &info) == 0 && !S_ISREG(info.st_mode) &&
        !S_ISDIR(info.st_mode)) {
      f = fopen(path, "w");
      if (f == NULL)
        cli_error("cannot write '%s': %s", path, strerror(errno));
      return f;
    }
  }
  if (!write_over && (kind = document_kind(path)) != NULL) {
    cli_error("'%s' is a %s file; not writing over it (choose another "
              "output, or give --write-over)",
              path, kind);
    return NULL;
  }
  for (k = 0; k < MAX_OPEN_OUTPUTS && open_outputs[k].f != NULL; k++)
    ;
  if (k == MAX_OPEN_OUTPUTS ||
      (size_t)snprintf(open_outputs[k].temp, MAX_PATH_BYTES, "%s.tmp-XXXXXX",
                       path) >= MAX_PATH_BYTES) {
    cli_error("cannot write '%s': the path is too long", path);
    return NULL;
  }
  set_handlers();
  fd = mkstemp(open_outputs[k].temp);
  if (fd < 0) {
    cli_error("cannot write '%s': %s", path, strerror(errno));
    return NULL;
  }
  /* mkstemp makes it private; a finished file gets the usual mode */
  {
    mode_t mask = umask(0);
    umask(mask);
    fchmod(fd, 0666 & ~mask);
  }
  f = fdopen(fd, "w");
  if (f == NULL) {
    cli_error("cannot write '%s': %s", path, strerror(errno));
    close(fd);
    unlink(open_outputs[k].temp);
    return NULL;
  }
  open_outputs[k].f = f;
  return f;
}

static int output_slot(FILE *f) {
  int k;
  for (k = 0; k < MAX_OPEN_OUTPUTS; k++)
    if (open_outputs[k].f == f)
      return k;
  return -1;
}

void cli_abandon_output(FILE *f) {
  int k = output_slot(f);
  if (f == stdout) {
    fflush(f);
    return;
  }
  fclose(f);
  if (k >= 0) {
    unlink(open_outputs[k].temp);
    open_outputs[k].f = NULL;
  }
}

int cli_close_output(FILE *f, const char *path) {
  int failed = ferror(f) != 0, k = output_slot(f);
  if (f == stdout) {
    if (fflush(f) != 0)
      failed = 1;
  } else {
    /* a device (/dev/null) cannot sync: only a temporary file needs it */
    if (fflush(f) != 0 || (k >= 0 && fsync(fileno(f)) != 0))
      failed = 1;
    if (fclose(f) != 0)
      failed = 1;
    if (!failed && k >= 0 && rename(open_outputs[k].temp, path) != 0)
      failed = 1;
  }
  if (failed)
    cli_error("writing '%s' failed: %s",
              path == NULL ? "standard output" : path, strerror(errno));
  if (k >= 0) {
    if (failed)
      unlink(open_outputs[k].temp);
    open_outputs[k].f = NULL;
  }
  return failed ? CLI_EXIT_OUTPUT : CLI_EXIT_OK;
}

int cli_make_dir(const char *dir) {
  struct stat info;
  if (mkdir(dir, 0777) == 0)
    return CLI_EXIT_OK;
  if (errno == EEXIST && stat(dir, &info) == 0 && S_ISDIR(info.st_mode))
    return CLI_EXIT_OK;
  cli_error("cannot make the folder '%s': %s", dir,
            errno == EEXIST ? "a file of that name is in the way"
                            : strerror(errno));
  return CLI_EXIT_OUTPUT;
}

void cli_file_word(const char *name, char *buf, size_t cap) {
  size_t i;
  for (i = 0; name[i] != '\0' && i + 1 < cap && i < 40; i++) {
    char ch = name[i];
    int keep = (ch >= 'a' && ch <= 'z') || (ch >= 'A' && ch <= 'Z') ||
               (ch >= '0' && ch <= '9') || ch == '.' || ch == '-' ||
               ch == '_';
    buf[i] = keep ? ch : '_';
  }
  buf[i] = '\0';
}
