/*
 * check_joints.c - checks a drawing by the kinloop tool: every joint marker
 * of every drawn position stands where the library solves that joint, and
 * the markers on each link keep the link's own distances.
 *
 * usage: check_joints MODEL SVG [POSES]
 * POSES, if given, is the number of positions the drawing must hold.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "check_support.h"

/* The library and the tool reach each position by continuation along
 * different step sizes; both end with Newton converged to 1e-12 of the
 * scale from a neighbouring solution, so they agree far inside this. */
#define POSITION_TOL 1e-9

#define MAX_JOINTS 256

/* The value of attribute `name` in the element starting at `tag`, with
 * XML's five escapes undone, into buf. Returns 0 if absent. */
static int attribute(const char *tag, const char *name, char *buf,
                     size_t cap) {
  const char *end = strchr(tag, '>'), *p = tag;
  size_t n = strlen(name), k = 0;
  for (;;) {
    p = strstr(p, name);
    if (p == NULL || (end != NULL && p > end))
      return 0;
    if (p[-1] == ' ' && p[n] == '=' && p[n + 1] == '"')
      break;
    p += n;
  }
  for (p += n + 2; *p != '"' && *p != '\0' && k + 1 < cap; p++) {
    static const char *const from[] = {"&amp;", "&lt;", "&gt;", "&quot;",
                                       "&apos;"};
    static const char to[] = "&<>\"'";
    int e, matched = 0;
    for (e = 0; e < 5 && *p == '&'; e++)
      if (strncmp(p, from[e], strlen(from[e])) == 0) {
        buf[k++] = to[e];
        p += strlen(from[e]) - 1;
        matched = 1;
        break;
      }
    if (!matched)
      buf[k++] = *p;
  }
  buf[k] = '\0';
  return 1;
}

static int find_joint(const kl_model *m, const char *label) {
  int j, n = kl_model_joint_count(m);
  char buf[300];
  for (j = 0; j < n; j++) {
    check_joint_label(m, j, buf, sizeof buf);
    if (strcmp(buf, label) == 0)
      return j;
  }
  return -1;
}

/* Every pair of markers on one link must be as far apart as the link's
 * attachment points (a rigid body keeps its distances). A revolute marker
 * lies on both its links; a sliding joint's marker only on its link b. */
static void check_rigid(const kl_model *m, const double *xy, const int *seen,
                        int pose) {
  int nl = kl_model_link_count(m), nj = kl_model_joint_count(m), l, i, k;
  double scale = kl_model_scale(m);
  for (l = 0; l < nl; l++)
    for (i = 0; i < nj; i++)
      for (k = i + 1; k < nj; k++) {
        int li[2], lk[2];
        double ai[2], bi[2], ak[2], bk[2], pi[2], pk[2], local, drawn;
        kl_model_joint_links(m, i, li, ai, bi);
        kl_model_joint_links(m, k, lk, ak, bk);
        if (!seen[i] || !seen[k])
          continue;
        if (li[1] == l) {
          pi[0] = bi[0];
          pi[1] = bi[1];
        } else if (li[0] == l && kl_model_joint_kind(m, i) == KL_JOINT_REVOLUTE) {
          pi[0] = ai[0];
          pi[1] = ai[1];
        } else {
          continue;
        }
        if (lk[1] == l) {
          pk[0] = bk[0];
          pk[1] = bk[1];
        } else if (lk[0] == l && kl_model_joint_kind(m, k) == KL_JOINT_REVOLUTE) {
          pk[0] = ak[0];
          pk[1] = ak[1];
        } else {
          continue;
        }
        local = hypot(pk[0] - pi[0], pk[1] - pi[1]);
        drawn = hypot(xy[2 * k] - xy[2 * i], xy[2 * k + 1] - xy[2 * i + 1]);
        if (fabs(local - drawn) > POSITION_TOL * scale)
          check_fail("position %d, link %d: joints %d and %d drawn %.17g "
                     "apart, %.17g on the link",
                     pose, l, i, k, drawn, local);
      }
}

int main(int argc, char **argv) {
  kl_model *m;
  kl_solver *s;
  char *svg, *p, value[1024];
  int poses = 0, want = argc > 3 ? atoi(argv[3]) : -1;
  int nj, ni;
  double t[6];
  if (argc < 3) {
    fprintf(stderr, "usage: check_joints MODEL SVG [POSES]\n");
    return 2;
  }
  m = check_model(argv[1]);
  s = kl_solver_new(m);
  svg = check_read_file(argv[2], NULL);
  nj = kl_model_joint_count(m);
  ni = kl_model_input_count(m);
  if (s == NULL || nj > MAX_JOINTS || ni > 16) {
    fprintf(stderr, "model too large for this check\n");
    return 2;
  }
  /* one group in model coordinates, flipped so that y runs up */
  p = strstr(svg, "<g class=\"model\"");
  if (p == NULL || !attribute(p, "transform", value, sizeof value) ||
      sscanf(value, "matrix(%lf %lf %lf %lf %lf %lf)", &t[0], &t[1], &t[2],
             &t[3], &t[4], &t[5]) != 6)
    check_fail("no model group with a matrix transform");
  else if (!(t[0] > 0 && t[3] == -t[0] && t[1] == 0 && t[2] == 0))
    check_fail("the model group's transform is not a y-flipping scale: %s",
               value);
  for (p = strstr(svg, "<g class=\"pose\""); p != NULL;
       p = strstr(p + 1, "<g class=\"pose\"")) {
    double target[16], xy[2 * MAX_JOINTS], solved[2];
    int seen[MAX_JOINTS] = {0}, k, st, markers = 0;
    char *end = strstr(p, "</g>"), *q, *cursor;
    poses++;
    if (!attribute(p, "data-inputs", value, sizeof value)) {
      check_fail("position %d has no data-inputs", poses);
      continue;
    }
    cursor = value;
    for (k = 0; k < ni; k++)
      target[k] = strtod(cursor, &cursor);
    /* a new solver each time, so that each starts from the sketch */
    kl_solver_free(s);
    if ((s = kl_solver_new(m)) == NULL) {
      fprintf(stderr, "out of memory\n");
      return 2;
    }
    st = check_reach(s, m, target);
    if (st != KL_OK) {
      check_fail("position %d (%s): the library cannot solve it: %s", poses,
                 value, kl_solver_error(s));
      continue;
    }
    for (q = strstr(p, "<circle class=\"joint\""); q != NULL && q < end;
         q = strstr(q + 1, "<circle class=\"joint\"")) {
      char name[300], cx[64], cy[64];
      int j;
      if (!attribute(q, "data-joint", name, sizeof name) ||
          !attribute(q, "cx", cx, sizeof cx) ||
          !attribute(q, "cy", cy, sizeof cy)) {
        check_fail("position %d: a joint marker lacks data-joint, cx or cy",
                   poses);
        continue;
      }
      if ((j = find_joint(m, name)) < 0) {
        check_fail("position %d: marker for unknown joint '%s'", poses, name);
        continue;
      }
      xy[2 * j] = strtod(cx, NULL);
      xy[2 * j + 1] = strtod(cy, NULL);
      seen[j] = 1;
      markers++;
      check_joint_xy(s, m, j, solved);
      if (fabs(xy[2 * j] - solved[0]) > POSITION_TOL ||
          fabs(xy[2 * j + 1] - solved[1]) > POSITION_TOL)
        check_fail("position %d, joint %s: drawn at (%.17g, %.17g), solved "
                   "at (%.17g, %.17g)",
                   poses, name, xy[2 * j], xy[2 * j + 1], solved[0],
                   solved[1]);
    }
    if (markers != nj)
      check_fail("position %d: %d joint markers for %d joints", poses,
                 markers, nj);
    check_rigid(m, xy, seen, poses);
  }
  if (poses == 0)
    check_fail("no drawn positions");
  if (want >= 0 && poses != want)
    check_fail("%d positions drawn, %d expected", poses, want);
  printf("%d positions, %d joints each, checked\n", poses, nj);
  free(svg);
  kl_solver_free(s);
  kl_model_free(m);
  return check_failures() ? 1 : 0;
}
