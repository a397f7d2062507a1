/*
 * loops.c - what the tool reads from the model's loops: the joints where it
 * measures transmission angles, and the four-bar loops it classifies.
 */
#include <math.h>
#include <stdlib.h>

#include "cli.h"

static int is_input(const kl_model *m, int joint) {
  int i, n = kl_model_input_count(m);
  for (i = 0; i < n; i++)
    if (kl_model_input_joint(m, i) == joint)
      return 1;
  return 0;
}

/* The attachment of `joint` on `link` (one of its two links). */
static void attachment(const kl_model *m, int joint, int link, double xy[2]) {
  int links[2];
  double a[2], b[2];
  kl_model_joint_links(m, joint, links, a, b);
  xy[0] = links[0] == link ? a[0] : b[0];
  xy[1] = links[0] == link ? a[1] : b[1];
}

static int on_link(const kl_model *m, int joint, int link) {
  int links[2];
  kl_model_joint_links(m, joint, links, NULL, NULL);
  return links[0] == link || links[1] == link;
}

/* Distance on `link` between the attachments of two of its joints. */
static double span(const kl_model *m, int link, int j1, int j2) {
  double p[2], q[2];
  attachment(m, j1, link, p);
  attachment(m, j2, link, q);
  return hypot(q[0] - p[0], q[1] - p[1]);
}

static int already_site(const cli_model *cm, int joint) {
  int i;
  for (i = 0; i < cm->nsites; i++)
    if (cm->sites[i].joint == joint)
      return 1;
  for (i = 0; i < cm->nunmeasured; i++)
    if (cm->unmeasured[i].joint == joint)
      return 1;
  return 0;
}

/* 1 if a revolute input turns `link` from ground. */
static int is_input_crank(const kl_model *m, int link) {
  int i, n = kl_model_input_count(m), links[2];
  for (i = 0; i < n; i++) {
    int joint = kl_model_input_joint(m, i);
    kl_model_joint_links(m, joint, links, NULL, NULL);
    if (kl_model_joint_kind(m, joint) == KL_JOINT_REVOLUTE &&
        ((links[0] == KL_GROUND && links[1] == link) ||
         (links[1] == KL_GROUND && links[0] == link)))
      return 1;
  }
  return 0;
}

static void add_unmeasured(cli_model *cm, int joint, int loop, int link,
                           int reason) {
  cli_unmeasured *u = &cm->unmeasured[cm->nunmeasured++];
  u->joint = joint;
  u->loop = loop;
  u->link = link;
  u->reason = reason;
}

/* One site per revolute joint that is neither on ground nor an input, in
 * the order the loops first meet it; the lines run to its neighbours in the
 * walk. A joint on a crank the input turns, or with a line of no length,
 * is listed as unmeasured instead. */
static void add_sites(cli_model *cm, int loop, const int *walk, int n) {
  const kl_model *m = cm->model;
  double tiny = 1e-12 * kl_model_scale(m);
  int k;
  for (k = 0; k < n; k++) {
    int joint = walk[k], prev = walk[(k + n - 1) % n], next = walk[(k + 1) % n];
    int links[2], side;
    kl_model_joint_links(m, joint, links, NULL, NULL);
    if (kl_model_joint_kind(m, joint) != KL_JOINT_REVOLUTE || links[0] == KL_GROUND ||
        links[1] == KL_GROUND || is_input(m, joint) || already_site(cm, joint))
      continue;
    /* the walk reaches `joint` from prev over one of its links and leaves
     * over the other: prev's line lies on the link they share */
    if (!on_link(m, prev, links[0]) || !on_link(m, next, links[1])) {
      int t = prev;
      prev = next;
      next = t;
    }
    for (side = 0; side < 2; side++)
      if (is_input_crank(m, links[side])) {
        add_unmeasured(cm, joint, loop, links[side], CLI_INPUT_CRANK);
        break;
      }
    if (side < 2)
      continue;
    for (side = 0; side < 2; side++) {
      int other = side == 0 ? prev : next;
      if (span(m, links[side], joint, other) <= tiny) {
        add_unmeasured(cm, joint, loop, links[side], CLI_NO_LINE);
        break;
      }
    }
    if (side == 2) {
      cli_site *s = &cm->sites[cm->nsites++];
      s->joint = joint;
      s->line_a = prev;
      s->line_b = next;
      s->loop = loop;
    }
  }
}

/* A loop of four revolute joints, two of them on ground, one of those an
 * input: classified by Grashof's condition on its measured lengths. */
static void add_fourbar(cli_model *cm, int loop, const int *walk, int n) {
  const kl_model *m = cm->model;
  int k, ground_at = -1, input_side, input_joint, output_joint;
  int links[2], input_link, output_link, coupler_joint_in, coupler_joint_out;
  cli_fourbar *fb;
  if (n != 4)
    return;
  for (k = 0; k < 4; k++) {
    if (kl_model_joint_kind(m, walk[k]) != KL_JOINT_REVOLUTE)
      return;
    /* ground sits between walk[k] and walk[k + 1] */
    if (on_link(m, walk[k], KL_GROUND) && on_link(m, walk[(k + 1) % 4], KL_GROUND))
      ground_at = k;
  }
  if (ground_at < 0)
    return;
  input_side = is_input(m, walk[ground_at]) ? 0
               : is_input(m, walk[(ground_at + 1) % 4]) ? 1
                                                        : -1;
  if (input_side < 0)
    return;
  input_joint = walk[(ground_at + (input_side == 0 ? 0 : 1)) % 4];
  output_joint = walk[(ground_at + (input_side == 0 ? 1 : 0)) % 4];
  /* walking away from ground past the input joint reaches the coupler */
  coupler_joint_in = walk[(ground_at + (input_side == 0 ? 3 : 2)) % 4];
  coupler_joint_out = walk[(ground_at + (input_side == 0 ? 2 : 3)) % 4];
  kl_model_joint_links(m, input_joint, links, NULL, NULL);
  input_link = links[0] == KL_GROUND ? links[1] : links[0];
  kl_model_joint_links(m, output_joint, links, NULL, NULL);
  output_link = links[0] == KL_GROUND ? links[1] : links[0];
  fb = &cm->fourbars[cm->nfourbars++];
  fb->loop = loop;
  fb->input_joint = input_joint;
  fb->input_link = input_link;
  fb->output_link = output_link;
  kl_model_joint_links(m, coupler_joint_in, links, NULL, NULL);
  fb->coupler_link = links[0] == input_link ? links[1] : links[0];
  fb->ground = span(m, KL_GROUND, input_joint, output_joint);
  fb->input = span(m, input_link, input_joint, coupler_joint_in);
  fb->coupler = span(m, fb->coupler_link, coupler_joint_in, coupler_joint_out);
  fb->output = span(m, output_link, coupler_joint_out, output_joint);
  fb->cls = kl_grashof(fb->ground, fb->input, fb->coupler, fb->output);
}

int cli_analyse_loops(cli_model *cm) {
  int loop, total = 0, *walk;
  for (loop = 0; loop < cm->nloops; loop++)
    total += kl_model_loop(cm->model, loop, NULL, 0);
  walk = malloc((size_t)(total > 0 ? total : 1) * sizeof *walk);
  cm->sites = malloc((size_t)(total > 0 ? total : 1) * sizeof *cm->sites);
  cm->unmeasured =
      malloc((size_t)(total > 0 ? total : 1) * sizeof *cm->unmeasured);
  cm->fourbars = malloc((size_t)(cm->nloops > 0 ? cm->nloops : 1) *
                        sizeof *cm->fourbars);
  if (walk == NULL || cm->sites == NULL || cm->unmeasured == NULL ||
      cm->fourbars == NULL) {
    free(walk);
    return CLI_EXIT_MEMORY;
  }
  for (loop = 0; loop < cm->nloops; loop++) {
    int n = kl_model_loop(cm->model, loop, walk, total);
    add_sites(cm, loop, walk, n);
    add_fourbar(cm, loop, walk, n);
  }
  free(walk);
  return CLI_EXIT_OK;
}

double cli_site_value(const kl_solver *s, const cli_site *site) {
  kl_output o;
  double v = NAN;
  o.kind = KL_OUTPUT_TRANSMISSION;
  o.id = site->joint;
  o.line_a = site->line_a;
  o.line_b = site->line_b;
  if (kl_output_value(s, &o, &v) != KL_OK)
    return NAN;
  return v;
}
