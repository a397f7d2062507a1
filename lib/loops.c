/*
 * loops.c - what a designer reads from the model's loops: four-bar loops
 * with their Grashof class, and the joints where transmission angles count.
 */
#include <math.h>

#include "model.h"

/* A line on a link shorter than this, relative to the model's scale, has
 * no direction to measure an angle against. */
#define KLI_NO_LINE 1e-12

/* ---- Grashof ---- */

int kl_grashof(double ground, double input, double coupler, double output) {
  double len[4], s, l, sum = 0.0;
  int i, shortest = 0;
  len[0] = ground;
  len[1] = input;
  len[2] = coupler;
  len[3] = output;
  for (i = 0; i < 4; i++) {
    if (!isfinite(len[i]))
      return KL_ENONFINITE;
    if (!(len[i] > 0.0))
      return KL_EINVAL;
    sum += len[i];
  }
  s = l = len[0];
  for (i = 1; i < 4; i++) {
    if (len[i] < s) {
      s = len[i];
      shortest = i;
    }
    if (len[i] > l)
      l = len[i];
  }
  /* a loop closes only if its longest side is shorter than the other
   * three together (stretched in line, it closes but cannot move) */
  if (l >= (sum - l) - 1e-12 * l)
    return KL_GRASHOF_NO_ASSEMBLY;
  /* s + l against p + q = sum - s - l, equality within rounding of l */
  if (fabs((s + l) - (sum - s - l)) <= 1e-12 * l)
    return KL_GRASHOF_CHANGE_POINT;
  if (s + l > sum - s - l)
    return KL_GRASHOF_TRIPLE_ROCKER;
  switch (shortest) {
  case 0: return KL_GRASHOF_DOUBLE_CRANK;
  case 1: return KL_GRASHOF_CRANK_ROCKER;
  case 2: return KL_GRASHOF_DOUBLE_ROCKER;
  default: return KL_GRASHOF_ROCKER_CRANK;
  }
}

const char *kl_grashof_str(int cls) {
  switch (cls) {
  case KL_GRASHOF_CRANK_ROCKER: return "crank-rocker";
  case KL_GRASHOF_ROCKER_CRANK: return "rocker-crank";
  case KL_GRASHOF_DOUBLE_CRANK: return "double-crank";
  case KL_GRASHOF_DOUBLE_ROCKER: return "double-rocker";
  case KL_GRASHOF_CHANGE_POINT: return "change point";
  case KL_GRASHOF_TRIPLE_ROCKER: return "triple-rocker";
  case KL_GRASHOF_NO_ASSEMBLY: return "no assembly";
  default: return "not a class";
  }
}

/* Distance on `link` between the attachments of two of its joints. */
static double span(const kl_model *m, int link, int j1, int j2) {
  const double *p = kli_joint_point_on(m, j1, link);
  const double *q = kli_joint_point_on(m, j2, link);
  return hypot(p[0] - q[0], p[1] - q[1]);
}

/* ---- four-bar loops ---- */

/*
 * Loop `loop` as a four-bar: four revolute joints, ground one of its links,
 * an input at one of ground's two joints. links[k] is the link between
 * joints[k] and joints[k + 1], so ground lies between joints[g] and
 * joints[g + 1]; walking on from the driven pivot meets the input link,
 * the coupler and the output link.
 */
static int loop_fourbar(const kl_model *m, int loop, kl_fourbar *fb) {
  const kli_topology *t = &m->topo;
  const int *joints = t->loop_joints + t->loop_joint_start[loop];
  const int *links = t->loop_links + t->loop_joint_start[loop];
  int k, g = -1, side, j[4], l[4];
  if (t->loop_joint_start[loop + 1] - t->loop_joint_start[loop] != 4)
    return KL_EKIND;
  for (k = 0; k < 4; k++) {
    if (m->joints[joints[k]].kind != KL_JOINT_REVOLUTE)
      return KL_EKIND;
    if (links[k] == KL_GROUND)
      g = k;
  }
  if (g < 0)
    return KL_EKIND;
  /* side 0: the input drives joints[g], side 1: joints[g + 1] */
  side = kli_input_of(m, joints[g]) >= 0 ? 0
         : kli_input_of(m, joints[(g + 1) % 4]) >= 0 ? 1
                                                 : -1;
  if (side < 0)
    return KL_EKIND;
  /* the joints from the driven pivot around the loop away from ground, and
   * the link after each: input link, coupler, output link, ground */
  for (k = 0; k < 4; k++) {
    int at = side == 0 ? (g + 4 - k) % 4 : (g + 1 + k) % 4;
    j[k] = joints[at];
    l[k] = side == 0 ? links[(at + 3) % 4] : links[at];
  }
  fb->loop = loop;
  fb->input = kli_input_of(m, j[0]);
  fb->input_joint = j[0];
  fb->output_joint = j[3];
  fb->input_link = l[0];
  fb->coupler_link = l[1];
  fb->output_link = l[2];
  fb->ground_length = span(m, KL_GROUND, j[3], j[0]);
  fb->input_length = span(m, l[0], j[0], j[1]);
  fb->coupler_length = span(m, l[1], j[1], j[2]);
  fb->output_length = span(m, l[2], j[2], j[3]);
  fb->grashof = kl_grashof(fb->ground_length, fb->input_length,
                           fb->coupler_length, fb->output_length);
  return KL_OK;
}

int kl_model_loop_fourbar(const kl_model *m, int loop, kl_fourbar *fourbar) {
  kl_fourbar fb;
  int st;
  if (m == NULL || fourbar == NULL || fourbar->size < sizeof(fourbar->size))
    return KL_EINVAL;
  if (!m->finalized)
    return KL_ESTATE;
  if (loop < 0 || loop >= m->topo.nloops)
    return KL_EID;
  if ((st = loop_fourbar(m, loop, &fb)) != KL_OK)
    return st;
  kli_copy_sized(fourbar, &fb, sizeof fb);
  return KL_OK;
}

int kl_model_grashof(const kl_model *m) {
  kl_fourbar fb;
  int st;
  if (m == NULL)
    return KL_EINVAL;
  if (!m->finalized)
    return KL_ESTATE;
  if (m->nlinks != 4 || m->njoints != 4 || m->ninputs != 1 ||
      m->topo.nloops != 1)
    return KL_EKIND;
  if ((st = loop_fourbar(m, 0, &fb)) != KL_OK)
    return st;
  return fb.grashof;
}

/* ---- transmission-angle sites ---- */

enum { KLI_PLAIN = 0, KLI_INPUT = 1, KLI_DONE = 2, KLI_NAMED = 3 };

static void skip(kli_topology *t, int joint, int loop, int link, int reason) {
  kl_transmission_skip *k = &t->skips[t->nskips++];
  k->joint = joint;
  k->loop = loop;
  k->link = link;
  k->reason = reason;
}

/* Bit of a link's scratch mark: a revolute neighbour of the link under
 * test (bit 0 is "turned by a revolute input from ground"). */
#define KLI_NEIGHBOUR 2

/*
 * A third link that closes a triangle of revolute joints with links a and
 * b (a joint to each), or -1: the three then form one rigid ternary link,
 * and the pin between a and b never turns. Linear in the joints.
 */
static int rigid_triangle(const kl_model *m, int a, int b, int *link_mark) {
  int i, third = -1;
  for (i = 0; i < m->njoints; i++) {
    const kli_joint *j = &m->joints[i];
    if (j->kind == KL_JOINT_REVOLUTE && (j->link[0] == a || j->link[1] == a))
      link_mark[j->link[0] == a ? j->link[1] : j->link[0]] |= KLI_NEIGHBOUR;
  }
  for (i = 0; i < m->njoints && third < 0; i++) {
    const kli_joint *j = &m->joints[i];
    int other = j->link[0] == b ? j->link[1] : j->link[0];
    if (j->kind == KL_JOINT_REVOLUTE && (j->link[0] == b || j->link[1] == b) &&
        other != a && (link_mark[other] & KLI_NEIGHBOUR))
      third = other;
  }
  for (i = 0; i < m->nlinks; i++)
    link_mark[i] &= ~KLI_NEIGHBOUR;
  return third;
}

/*
 * The pressure-angle sites: walking the loops in order, each sliding joint
 * that is no input and no cam joint, where a loop first meets it with a
 * revolute neighbour (the pin) off ground on the slider's side, and past
 * the pin a further joint at some distance on the pin's other link, a
 * moving one (the rod). The pin is
 * then passed over as a transmission-angle site (marked done).
 */
static void find_pressure_sites(const kl_model *m, kli_topology *t,
                                int *mark, double tiny) {
  int loop;
  t->npressure = 0;
  for (loop = 0; loop < t->nloops; loop++) {
    int first = t->loop_joint_start[loop];
    int n = t->loop_joint_start[loop + 1] - first, k, way;
    const int *walk = t->loop_joints + first, *after = t->loop_links + first;
    for (k = 0; k < n && n >= 3; k++) {
      int slide = walk[k];
      /* a cam joint's pressure angle is its follower's, from the cam's
       * pitch curve (kl_cam_follower_state), not a rod's against a guide */
      if (!kli_is_sliding(m->joints[slide].kind) || mark[slide] != KLI_PLAIN ||
          m->joints[slide].cam != NULL)
        continue;
      /* way +1: the pin after the slide in the walk, -1: before it; the
       * link between slide and pin is the slider, the next one the rod */
      for (way = 1; way >= -1; way -= 2) {
        int pin = walk[(k + way + n) % n], beyond = walk[(k + 2 * way + 2 * n) % n];
        int slider = after[way > 0 ? k : (k + n - 1) % n];
        int rod = after[way > 0 ? (k + 1) % n : (k + n - 2) % n];
        kl_output *site;
        /* the frame drives nothing: a "rod" that is ground would give a
         * constant angle with no meaning */
        if (m->joints[pin].kind != KL_JOINT_REVOLUTE || slider == KL_GROUND ||
            rod == KL_GROUND || rod == slider ||
            span(m, rod, pin, beyond) <= tiny)
          continue;
        mark[slide] = KLI_DONE;
        site = &t->pressure[t->npressure++];
        site->kind = KL_OUTPUT_PRESSURE;
        site->id = slide;
        site->line_a = pin;
        site->line_b = beyond;
        if (mark[pin] == KLI_PLAIN && m->joints[pin].link[0] != KL_GROUND &&
            m->joints[pin].link[1] != KL_GROUND) {
          mark[pin] = KLI_DONE;
          skip(t, pin, loop, slider, KL_TRANSMISSION_SKIP_SLIDER);
        }
        break;
      }
    }
  }
}

/* The link a revolute joint on ground turns, or -1 for other joints. */
static int ground_crank(const kl_model *m, int joint) {
  const kli_joint *j = &m->joints[joint];
  if (j->kind != KL_JOINT_REVOLUTE)
    return -1;
  return j->link[0] == KL_GROUND   ? j->link[1]
         : j->link[1] == KL_GROUND ? j->link[0]
                                   : -1;
}

/* A link on a ground pivot that a gear pair or a ratio coupling ties to a
 * crank is turned by the input as directly as that crank (through the
 * gears): passes until no coupling adds one, at most one per coupling. */
static void mark_geared_cranks(const kl_model *m, int *crank) {
  int changed = 1, pass, i;
  for (pass = 0; changed && pass <= m->ncouplings; pass++) {
    changed = 0;
    for (i = 0; i < m->ncouplings; i++) {
      int l1 = ground_crank(m, m->couplings[i].joint[0]);
      int l2 = ground_crank(m, m->couplings[i].joint[1]);
      if (l1 < 0 || l2 < 0 || crank[l1] == crank[l2])
        continue;
      crank[l1] = crank[l2] = 1;
      changed = 1;
    }
  }
}

/*
 * The lines a user named (kl_model_set_transmission_lines) win over the
 * rule: they replace the rule's lines at a site, turn a passed-over joint
 * into a site (its skip dropped), or add a site after the rule's. Linear in
 * the joints.
 */
static void apply_named_lines(const kl_model *m, kli_topology *t, int *mark) {
  int i, kept = 0;
  for (i = 0; i < t->nsites; i++) {
    const kli_joint *j = &m->joints[t->sites[i].id];
    if (!j->has_lines)
      continue;
    t->sites[i].line_a = j->lines[0];
    t->sites[i].line_b = j->lines[1];
    mark[t->sites[i].id] = KLI_NAMED;
  }
  for (i = 0; i < t->nskips; i++)
    if (!m->joints[t->skips[i].joint].has_lines)
      t->skips[kept++] = t->skips[i];
  t->nskips = kept;
  for (i = 0; i < m->njoints; i++) {
    kl_output *site;
    if (!m->joints[i].has_lines || mark[i] == KLI_NAMED)
      continue;
    site = &t->sites[t->nsites++];
    site->kind = KL_OUTPUT_TRANSMISSION;
    site->id = i;
    site->line_a = m->joints[i].lines[0];
    site->line_b = m->joints[i].lines[1];
  }
}

/*
 * The rule: walking the loops in order, each revolute joint that is on
 * neither ground nor an input, where a loop first meets it, measured
 * between the lines to its two neighbours in that walk. The scratch holds
 * a mark per joint (input, done) and one per link (turned by a revolute
 * input from ground), so the walk stays linear in the loops' size.
 */
void kli_find_transmissions(const kl_model *m, kli_topology *t,
                            int *scratch) {
  int *crank = scratch, *mark = scratch + m->nlinks;
  double tiny = KLI_NO_LINE * t->scale;
  int i, loop;
  t->nsites = t->nskips = 0;
  for (i = 0; i < m->nlinks; i++)
    crank[i] = 0;
  for (i = 0; i < m->njoints; i++)
    mark[i] = KLI_PLAIN;
  for (i = 0; i < m->ninputs; i++) {
    const kli_joint *j;
    if (m->inputs[i] < 0)
      continue; /* a point input */
    j = &m->joints[m->inputs[i]];
    mark[m->inputs[i]] = KLI_INPUT;
    if (j->kind == KL_JOINT_REVOLUTE && j->link[0] == KL_GROUND)
      crank[j->link[1]] = 1;
    if (j->kind == KL_JOINT_REVOLUTE && j->link[1] == KL_GROUND)
      crank[j->link[0]] = 1;
  }
  mark_geared_cranks(m, crank);
  find_pressure_sites(m, t, mark, tiny);
  for (loop = 0; loop < t->nloops; loop++) {
    int first = t->loop_joint_start[loop];
    int n = t->loop_joint_start[loop + 1] - first, k;
    const int *walk = t->loop_joints + first, *after = t->loop_links + first;
    for (k = 0; k < n; k++) {
      int joint = walk[k], prev = walk[(k + n - 1) % n];
      int next = walk[(k + 1) % n], side;
      const kli_joint *j = &m->joints[joint];
      kl_output *site;
      if (j->kind != KL_JOINT_REVOLUTE || j->link[0] == KL_GROUND ||
          j->link[1] == KL_GROUND || mark[joint] != KLI_PLAIN)
        continue;
      mark[joint] = KLI_DONE;
      /* a pin inside a rigid triangle joins lines of one ternary link:
       * no link drives another through it */
      if ((side = rigid_triangle(m, j->link[0], j->link[1], crank)) >= 0) {
        skip(t, joint, loop, side, KL_TRANSMISSION_SKIP_RIGID);
        continue;
      }
      /* the walk arrives from prev over the link before this joint: that
       * line lies on it */
      if (after[(k + n - 1) % n] != j->link[0]) {
        int swap = prev;
        prev = next;
        next = swap;
      }
      for (side = 0; side < 2 && !(crank[j->link[side]] & 1); side++)
        ;
      if (side < 2) {
        skip(t, joint, loop, j->link[side], KL_TRANSMISSION_SKIP_INPUT_CRANK);
        continue;
      }
      for (side = 0; side < 2; side++)
        if (span(m, j->link[side], joint, side == 0 ? prev : next) <= tiny)
          break;
      if (side < 2) {
        skip(t, joint, loop, j->link[side], KL_TRANSMISSION_SKIP_NO_LINE);
        continue;
      }
      site = &t->sites[t->nsites++];
      site->kind = KL_OUTPUT_TRANSMISSION;
      site->id = joint;
      site->line_a = prev;
      site->line_b = next;
    }
  }
  apply_named_lines(m, t, mark);
}

int kl_model_transmissions(const kl_model *m, kl_output *sites, int cap) {
  int i;
  if (m == NULL || cap < 0 || (cap > 0 && sites == NULL))
    return KL_EINVAL;
  if (!m->finalized)
    return KL_ESTATE;
  for (i = 0; i < m->topo.nsites && i < cap; i++)
    sites[i] = m->topo.sites[i];
  return m->topo.nsites;
}

int kl_model_pressure_sites(const kl_model *m, kl_output *sites, int cap) {
  int i;
  if (m == NULL || cap < 0 || (cap > 0 && sites == NULL))
    return KL_EINVAL;
  if (!m->finalized)
    return KL_ESTATE;
  for (i = 0; i < m->topo.npressure && i < cap; i++)
    sites[i] = m->topo.pressure[i];
  return m->topo.npressure;
}

int kl_model_transmission_skips(const kl_model *m, kl_transmission_skip *skips,
                                int cap) {
  int i;
  if (m == NULL || cap < 0 || (cap > 0 && skips == NULL))
    return KL_EINVAL;
  if (!m->finalized)
    return KL_ESTATE;
  for (i = 0; i < m->topo.nskips && i < cap; i++)
    skips[i] = m->topo.skips[i];
  return m->topo.nskips;
}
