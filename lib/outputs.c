/*
 * outputs.c - scalar outputs: checking what they name, their values at the
 * committed pose, and their first-order changes along coordinate and
 * dimension changes (the basis of coefficients, ranges and sensitivities).
 */
#include <math.h>
#include <stdio.h>

#include "describe.h"
#include "outputs.h"

static int joint_on(const kl_model *m, int joint, int link) {
  return joint >= 0 && joint < m->njoints &&
         (m->joints[joint].link[0] == link || m->joints[joint].link[1] == link);
}


/* The rod of a pressure angle: the pin's link other than the slider's. */
static int pressure_rod(const kl_model *m, const kl_output *o) {
  const kli_joint *slide = &m->joints[o->id], *pin = &m->joints[o->line_a];
  int block = pin->link[0] == slide->link[0] || pin->link[0] == slide->link[1]
                  ? pin->link[0]
                  : pin->link[1];
  return pin->link[0] == block ? pin->link[1] : pin->link[0];
}

/* KL_EID with its message when line_a or line_b names no joint. */
static int check_line_ids(const kl_model *m, const kl_output *o, char *buf) {
  if (o->line_a < 0 || o->line_a >= m->njoints)
    return kli_fail_index(buf, "output: line_a", "joint", o->line_a,
                          m->njoints);
  if (o->line_b < 0 || o->line_b >= m->njoints)
    return kli_fail_index(buf, "output: line_b", "joint", o->line_b,
                          m->njoints);
  return KL_OK;
}

static int pressure_check(const kl_model *m, const kl_output *o, char *buf) {
  const kli_joint *slide = &m->joints[o->id];
  char la[48], lb[48], lj[48], ll[64];
  int st;
  if (!kli_is_sliding(slide->kind))
    return kli_fail(buf, KL_EKIND, "output: a pressure angle needs a "
                                   "prismatic or slot joint; joint %s is "
                                   "revolute",
                    kli_joint_ref(m, o->id, lj, sizeof lj));
  if ((st = check_line_ids(m, o, buf)) != KL_OK)
    return st;
  if (m->joints[o->line_a].kind != KL_JOINT_REVOLUTE ||
      !(joint_on(m, o->line_a, slide->link[0]) ||
        joint_on(m, o->line_a, slide->link[1])))
    return kli_fail(buf, KL_EKIND, "output: line_a (joint %s) is not a "
                                   "revolute joint on a link of sliding "
                                   "joint %s",
                    kli_joint_ref(m, o->line_a, la, sizeof la),
                    kli_joint_ref(m, o->id, lj, sizeof lj));
  if (o->line_b == o->line_a || !joint_on(m, o->line_b, pressure_rod(m, o)))
    return kli_fail(buf, KL_EKIND, "output: line_b (joint %s) is not another "
                                   "joint on %s, the rod at pin %s",
                    kli_joint_ref(m, o->line_b, lb, sizeof lb),
                    kli_link_label(m, pressure_rod(m, o), ll, sizeof ll),
                    kli_joint_ref(m, o->line_a, la, sizeof la));
  return KL_OK;
}

int kli_output_check(const kl_model *m, const kl_output *o, char *buf) {
  const kli_joint *j;
  char lj[48], la[48], lb[48], ll[64];
  int st;
  if (o == NULL)
    return kli_fail(buf, KL_EINVAL, "output: none given (NULL)");
  switch (o->kind) {
  case KL_OUTPUT_LINK_ANGLE:
    if (o->id < 0 || o->id >= m->nlinks)
      return kli_fail_index(buf, "output", "link", o->id, m->nlinks);
    return KL_OK;
  case KL_OUTPUT_POINT_X:
  case KL_OUTPUT_POINT_Y:
    if (o->id < 0 || o->id >= m->npoints)
      return kli_fail_index(buf, "output", "point", o->id, m->npoints);
    return KL_OK;
  case KL_OUTPUT_SLIDE:
  case KL_OUTPUT_JOINT_ANGLE:
  case KL_OUTPUT_TRANSMISSION:
  case KL_OUTPUT_PRESSURE:
    break;
  default:
    return kli_fail(buf, KL_EINVAL, "output: kind %d is not an output kind",
               o->kind);
  }
  if (o->id < 0 || o->id >= m->njoints)
    return kli_fail_index(buf, "output", "joint", o->id, m->njoints);
  j = &m->joints[o->id];
  if (o->kind == KL_OUTPUT_SLIDE && !kli_is_sliding(j->kind))
    return kli_fail(buf, KL_EKIND, "output: joint %s is revolute and has no "
                              "slide",
               kli_joint_ref(m, o->id, lj, sizeof lj));
  if (o->kind == KL_OUTPUT_PRESSURE)
    return pressure_check(m, o, buf);
  if (o->kind != KL_OUTPUT_TRANSMISSION)
    return KL_OK;
  if (j->kind != KL_JOINT_REVOLUTE)
    return kli_fail(buf, KL_EKIND, "output: a transmission angle needs a revolute "
                              "joint; joint %s is not",
               kli_joint_ref(m, o->id, lj, sizeof lj));
  if ((st = check_line_ids(m, o, buf)) != KL_OK)
    return st;
  if (o->line_a == o->id || !joint_on(m, o->line_a, j->link[0]))
    return kli_fail(buf, KL_EKIND, "output: line_a (joint %s) is not another "
                              "joint on %s, joint's link a",
               kli_joint_ref(m, o->line_a, la, sizeof la),
               kli_link_label(m, j->link[0], ll, sizeof ll));
  if (o->line_b == o->id || !joint_on(m, o->line_b, j->link[1]))
    return kli_fail(buf, KL_EKIND, "output: line_b (joint %s) is not another "
                              "joint on %s, joint's link b",
               kli_joint_ref(m, o->line_b, lb, sizeof lb),
               kli_link_label(m, j->link[1], ll, sizeof ll));
  return KL_OK;
}

int kli_dim_resolve(const kl_model *m, const kl_dimension *d, kli_dim *out,
                    char *buf) {
  if (d == NULL)
    return kli_fail(buf, KL_EINVAL, "dimension: none given (NULL)");
  if (d->axis != 0 && d->axis != 1)
    return kli_fail(buf, KL_EINVAL, "dimension: axis %d is neither 0 (x) nor 1 "
                               "(y)",
               d->axis);
  out->axis = d->axis;
  out->coupling = -1;
  if (d->kind == KL_DIMENSION_RADIUS) {
    if (d->id < 0 || d->id >= m->ncouplings)
      return kli_fail_index(buf, "dimension", "coupling", d->id,
                            m->ncouplings);
    if (m->couplings[d->id].kind == KL_COUPLING_RATIO ||
        (m->couplings[d->id].kind == KL_COUPLING_RACK && d->axis != 0))
      return kli_fail(buf, KL_EKIND,
                      "dimension: coupling index %d (0-based) has no radius "
                      "%d (a gear pair has radii 0 and 1, a rack radius 0)",
                      d->id, d->axis);
    out->joint = out->point = -1;
    out->link = -1;
    out->coupling = d->id;
    return KL_OK;
  }
  if (d->kind == KL_DIMENSION_POINT) {
    if (d->id < 0 || d->id >= m->npoints)
      return kli_fail_index(buf, "dimension", "point", d->id, m->npoints);
    out->joint = -1;
    out->point = d->id;
    out->link = m->points[d->id].link;
    return KL_OK;
  }
  if (d->kind != KL_DIMENSION_JOINT_A && d->kind != KL_DIMENSION_JOINT_B)
    return kli_fail(buf, KL_EINVAL, "dimension: kind %d is not a dimension "
                               "kind",
               d->kind);
  if (d->id < 0 || d->id >= m->njoints)
    return kli_fail_index(buf, "dimension", "joint", d->id, m->njoints);
  out->joint = d->id;
  out->point = -1;
  out->link = m->joints[d->id].link[d->kind == KL_DIMENSION_JOINT_A ? 0 : 1];
  return KL_OK;
}

/* The line of a transmission angle on one side: its global vector, and the
 * local vector it comes from. */
static void transmission_line(const kl_solver *s, int joint, int line,
                              int link, double w[2], double local[2]) {
  const kl_model *m = s->model;
  const double *from = kli_joint_point_on(m, joint, link);
  const double *to = kli_joint_point_on(m, line, link);
  double c = s->st.pose.c[link], sn = s->st.pose.s[link];
  local[0] = to[0] - from[0];
  local[1] = to[1] - from[1];
  w[0] = c * local[0] - sn * local[1];
  w[1] = sn * local[0] + c * local[1];
}

/* The slide's direction of motion: its axis on its link a, turned with it. */
static void slide_direction(const kl_solver *s, int joint, double d[2]) {
  const kli_joint *j = &s->model->joints[joint];
  double c = s->st.pose.c[j->link[0]], sn = s->st.pose.s[j->link[0]];
  d[0] = c * j->axis_cs[0] - sn * j->axis_cs[1];
  d[1] = sn * j->axis_cs[0] + c * j->axis_cs[1];
}

double kli_output_value(const kl_solver *s, const kl_output *o) {
  const kl_model *m = s->model;
  const double *x = s->st.pose.x;
  double xy[2], wa[2], wb[2], la[2], lb[2];
  const kli_joint *j;
  switch (o->kind) {
  case KL_OUTPUT_LINK_ANGLE:
    return x[o->id];
  case KL_OUTPUT_SLIDE:
    return x[m->nlinks + o->id];
  case KL_OUTPUT_JOINT_ANGLE:
    j = &m->joints[o->id];
    return x[j->link[1]] - x[j->link[0]];
  case KL_OUTPUT_POINT_X:
  case KL_OUTPUT_POINT_Y:
    kli_chain_value(m, &m->topo.points[o->id], &s->st.pose, xy);
    return xy[o->kind == KL_OUTPUT_POINT_X ? 0 : 1];
  case KL_OUTPUT_PRESSURE:
    slide_direction(s, o->id, wa);
    transmission_line(s, o->line_a, o->line_b, pressure_rod(m, o), wb, lb);
    /* atan(cross / dot): the same whichever way either line points */
    {
      double cross = wa[0] * wb[1] - wa[1] * wb[0];
      double dot = wa[0] * wb[0] + wa[1] * wb[1];
      return atan2(dot < 0.0 ? -cross : cross, fabs(dot));
    }
  default: /* KL_OUTPUT_TRANSMISSION */
    j = &m->joints[o->id];
    transmission_line(s, o->id, o->line_a, j->link[0], wa, la);
    transmission_line(s, o->id, o->line_b, j->link[1], wb, lb);
    return atan2(fabs(wa[0] * wb[1] - wa[1] * wb[0]),
                 wa[0] * wb[0] + wa[1] * wb[1]);
  }
}

/* Change of a transmission line's global vector w (local vector `local` on
 * `link`) for coordinate changes dx and a unit change of dim. */
static void line_change(const kl_solver *s, int joint, int line, int link,
                        const double w[2], const double *dx,
                        const kli_dim *dim, double dw[2]) {
  double turn = dx[link], c = s->st.pose.c[link], sn = s->st.pose.s[link];
  double moved = 0.0;
  dw[0] = -turn * w[1];
  dw[1] = turn * w[0];
  if (dim == NULL || dim->joint < 0 || dim->link != link)
    return;
  if (dim->joint == line)
    moved += 1.0;
  if (dim->joint == joint)
    moved -= 1.0;
  dw[0] += moved * (dim->axis == 0 ? c : -sn);
  dw[1] += moved * (dim->axis == 0 ? sn : c);
}

double kli_output_change(const kl_solver *s, const kl_output *o,
                         const double *dx, const kli_dim *dim) {
  const kl_model *m = s->model;
  const kli_joint *j;
  double xy[2], wa[2], wb[2], la[2], lb[2], dwa[2], dwb[2], cross, dot;
  switch (o->kind) {
  case KL_OUTPUT_LINK_ANGLE:
    return dx[o->id];
  case KL_OUTPUT_SLIDE:
    return dx[m->nlinks + o->id];
  case KL_OUTPUT_JOINT_ANGLE:
    j = &m->joints[o->id];
    return dx[j->link[1]] - dx[j->link[0]];
  case KL_OUTPUT_POINT_X:
  case KL_OUTPUT_POINT_Y: {
    const kli_chain *ch = &m->topo.points[o->id];
    double change;
    kli_chain_rate(m, ch, &s->st.pose, dx, xy);
    change = xy[o->kind == KL_OUTPUT_POINT_X ? 0 : 1];
    if (dim != NULL && (dim->joint >= 0 || dim->point == o->id)) {
      kli_chain_dimension(m, ch, &s->st.pose, dim->joint, dim->link,
                          dim->axis, xy);
      change += xy[o->kind == KL_OUTPUT_POINT_X ? 0 : 1];
    }
    return change;
  }
  case KL_OUTPUT_PRESSURE: { /* atan((d x w) / (d . w)) */
    int rod = pressure_rod(m, o), guide = m->joints[o->id].link[0];
    double turn = dx[guide], dcross, ddot;
    slide_direction(s, o->id, wa);
    transmission_line(s, o->line_a, o->line_b, rod, wb, lb);
    line_change(s, o->line_a, o->line_b, rod, wb, dx, dim, dwb);
    dwa[0] = -turn * wa[1];
    dwa[1] = turn * wa[0];
    cross = wa[0] * wb[1] - wa[1] * wb[0];
    dot = wa[0] * wb[0] + wa[1] * wb[1];
    dcross = dwa[0] * wb[1] - dwa[1] * wb[0] + wa[0] * dwb[1] - wa[1] * dwb[0];
    ddot = dwa[0] * wb[0] + dwa[1] * wb[1] + wa[0] * dwb[0] + wa[1] * dwb[1];
    return (dcross * dot - cross * ddot) / (cross * cross + dot * dot);
  }
  default: /* KL_OUTPUT_TRANSMISSION: mu = atan2(|wa x wb|, wa . wb) */
    j = &m->joints[o->id];
    transmission_line(s, o->id, o->line_a, j->link[0], wa, la);
    transmission_line(s, o->id, o->line_b, j->link[1], wb, lb);
    line_change(s, o->id, o->line_a, j->link[0], wa, dx, dim, dwa);
    line_change(s, o->id, o->line_b, j->link[1], wb, dx, dim, dwb);
    cross = wa[0] * wb[1] - wa[1] * wb[0];
    dot = wa[0] * wb[0] + wa[1] * wb[1];
    {
      double dcross = dwa[0] * wb[1] - dwa[1] * wb[0] + wa[0] * dwb[1] -
                      wa[1] * dwb[0];
      double ddot = dwa[0] * wb[0] + dwa[1] * wb[1] + wa[0] * dwb[0] +
                    wa[1] * dwb[1];
      double sign = cross < 0.0 ? -1.0 : 1.0;
      return (sign * dcross * dot - fabs(cross) * ddot) /
             (cross * cross + dot * dot);
    }
  }
}
