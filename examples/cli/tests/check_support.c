/*
 * check_support.c - the helpers of check_support.h.
 */
#include "check_support.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>

static int failures;

char *check_read_file(const char *path, size_t *length) {
  FILE *f = fopen(path, "rb");
  char *buf;
  long n;
  if (f == NULL || fseek(f, 0, SEEK_END) != 0 || (n = ftell(f)) < 0 ||
      fseek(f, 0, SEEK_SET) != 0) {
    fprintf(stderr, "cannot read %s\n", path);
    exit(2);
  }
  buf = malloc((size_t)n + 1);
  if (buf == NULL || fread(buf, 1, (size_t)n, f) != (size_t)n) {
    fprintf(stderr, "cannot read %s\n", path);
    exit(2);
  }
  fclose(f);
  buf[n] = '\0';
  if (length != NULL)
    *length = (size_t)n;
  return buf;
}

void check_fail(const char *fmt, ...) {
  va_list ap;
  fputs("FAIL: ", stderr);
  va_start(ap, fmt);
  vfprintf(stderr, fmt, ap);
  va_end(ap);
  fputc('\n', stderr);
  failures++;
}

int check_failures(void) { return failures; }

kl_model *check_model(const char *path) {
  kl_io_error err;
  kl_model *m;
  err.size = sizeof err;
  m = kl_model_read_file(path, &err);
  if (m == NULL) {
    fprintf(stderr, "%s:%d:%d: %s\n", path, err.line, err.column, err.message);
    exit(2);
  }
  return m;
}

static void label(const char *name, int id, char *buf, size_t cap) {
  if (name != NULL)
    snprintf(buf, cap, "%s", name);
  else
    snprintf(buf, cap, "@%d", id);
}

void check_link_label(const kl_model *m, int link, char *buf, size_t cap) {
  label(kl_model_link_name(m, link), link, buf, cap);
}
void check_joint_label(const kl_model *m, int joint, char *buf, size_t cap) {
  label(kl_model_joint_name(m, joint), joint, buf, cap);
}
void check_point_label(const kl_model *m, int point, char *buf, size_t cap) {
  label(kl_model_point_name(m, point), point, buf, cap);
}

int check_reach(kl_solver *s, const kl_model *m, const double *target) {
  int n = kl_model_input_count(m), i, st;
  double home[16];
  kl_sweep_settings sw;
  if (n > 16)
    return KL_EINVAL;
  for (i = 0; i < n; i++)
    home[i] = 0.0;
  sw.size = sizeof sw;
  if (n > 0 && kl_model_sweep(m, &sw) == KL_OK)
    home[sw.input] = sw.from;
  if ((st = kl_solve_position(s, n > 0 ? home : NULL)) != KL_OK)
    return st;
  for (i = 0; i < n; i++) {
    int joint = kl_model_input_joint(m, i);
    double step = kl_model_joint_kind(m, joint) == KL_JOINT_REVOLUTE
                      ? CHECK_PI / 180
                      : 0.01 * kl_model_scale(m);
    int steps = (int)ceil(fabs(target[i] - home[i]) / step);
    if (steps == 0)
      continue;
    st = kl_solver_sweep(s, i, home[i], target[i], steps, NULL, NULL, NULL);
    if (st != KL_OK)
      return st;
  }
  return kl_solve_position(s, n > 0 ? target : NULL);
}

void check_joint_xy(const kl_solver *s, const kl_model *m, int joint,
                    double xy[2]) {
  int links[2];
  double b[2], origin[2], t;
  kl_model_joint_links(m, joint, links, NULL, b);
  kl_link_origin(s, links[1], origin);
  t = kl_link_angle(s, links[1]);
  xy[0] = origin[0] + cos(t) * b[0] - sin(t) * b[1];
  xy[1] = origin[1] + sin(t) * b[0] + cos(t) * b[1];
}

int check_split_csv(char *line, char **fields, int cap) {
  int n = 0;
  char *p = line;
  while (n < cap) {
    char *out;
    fields[n++] = p;
    if (*p == '"') { /* quoted: "" stands for a quote */
      out = p;
      for (p++; *p != '\0'; p++) {
        if (*p == '"' && p[1] == '"')
          p++;
        else if (*p == '"')
          break;
        *out++ = *p;
      }
      if (*p == '"')
        p++;
      *out = '\0';
      if (*p == ',')
        p++;
      else
        break;
      continue;
    }
    while (*p != ',' && *p != '\0' && *p != '\n' && *p != '\r')
      p++;
    if (*p != ',') {
      *p = '\0';
      break;
    }
    *p++ = '\0';
  }
  return n;
}
