/*
 * cam_state.c - a cam pair read from a solved model: the cam angle, the
 * follower's coordinate with its derivatives over the cam angle and in
 * time, and the pressure angle.
 */
#include <math.h>

#include "model.h"
#include "solver.h"

/* The joint other than `except` that joins `link` to ground with one of
 * the kinds wanted (revolute, and prismatic when `sliding`), or -1. */
static int joint_to_ground(const kl_model *m, int link, int except,
                           int sliding) {
  int i;
  for (i = 0; i < m->njoints; i++) {
    const kli_joint *g = &m->joints[i];
    if (i == except ||
        (g->kind != KL_JOINT_REVOLUTE &&
         !(sliding && g->kind == KL_JOINT_PRISMATIC)))
      continue;
    if ((g->link[0] == link && g->link[1] == KL_GROUND) ||
        (g->link[1] == link && g->link[0] == KL_GROUND))
      return i;
  }
  return -1;
}

/* J v: v turned a quarter counter-clockwise. */
static void quarter(const double v[2], double out[2]) {
  out[0] = -v[1];
  out[1] = v[0];
}

/* The follower's coordinate and its three time derivatives: the follower
 * link's angle on a revolute guide, its slide along a prismatic one; and
 * dp/dq, how the pin at p moves per unit of the coordinate. */
static void follower_coordinate(const kl_solver *s, int guide, int follower,
                                const double p[2], double q[4],
                                double dp[2]) {
  const kli_joint *g = &s->model->joints[guide];
  if (g->kind == KL_JOINT_REVOLUTE) {
    double pivot[2], arm[2];
    q[0] = kl_link_angle(s, follower);
    q[1] = kl_link_rate(s, follower);
    q[2] = kl_link_accel(s, follower);
    q[3] = kl_link_jerk(s, follower);
    kl_joint_position(s, guide, pivot);
    arm[0] = p[0] - pivot[0];
    arm[1] = p[1] - pivot[1];
    quarter(arm, dp);
  } else {
    /* the slide moves b along a's axis: the follower as b moves with it,
     * the follower as a against it */
    double sign = g->link[1] == follower ? 1.0 : -1.0;
    double turn = kl_link_angle(s, g->link[0]);
    q[0] = sign * kl_joint_slide(s, guide);
    q[1] = sign * kl_joint_slide_rate(s, guide);
    q[2] = sign * kl_joint_slide_accel(s, guide);
    q[3] = sign * kl_joint_slide_jerk(s, guide);
    dp[0] = cos(turn) * g->axis_cs[0] - sin(turn) * g->axis_cs[1];
    dp[1] = sin(turn) * g->axis_cs[0] + cos(turn) * g->axis_cs[1];
  }
}

/* The cam pair of pin-in-slot joint `joint` of s's model: the cam link's
 * bearing and the follower link's guide with ground. Returns KL_OK,
 * KL_EINVAL (NULL s), KL_EID, KL_EKIND (no such pair). */
static int cam_pair(const kl_solver *s, int joint, int *bearing, int *guide) {
  const kl_model *m;
  const kli_joint *j;
  if (s == NULL)
    return KL_EINVAL;
  m = s->model;
  if (joint < 0 || joint >= m->njoints)
    return KL_EID;
  j = &m->joints[joint];
  if (!kli_is_pin_slot(j->kind) || j->link[0] == KL_GROUND ||
      j->link[1] == KL_GROUND)
    return KL_EKIND;
  *bearing = j->cam != NULL ? j->cam_bearing
                            : joint_to_ground(m, j->link[0], joint, 0);
  *guide = joint_to_ground(m, j->link[1], joint, 1);
  return *bearing < 0 || *guide < 0 ? KL_EKIND : KL_OK;
}

int kl_cam_follower_state(const kl_solver *s, int joint, double out[9]) {
  double th[4], q[4], p[2], c[2], o[2], vo[2], r[2], jr[2], t[2], jt[2],
      dp[2], w;
  int bearing, guide, cam, follower, i, st;
  if (out == NULL)
    return KL_EINVAL;
  if ((st = cam_pair(s, joint, &bearing, &guide)) != KL_OK)
    return st;
  cam = s->model->joints[joint].link[0];
  follower = s->model->joints[joint].link[1];
  th[0] = kl_link_angle(s, cam);
  th[1] = kl_link_rate(s, cam);
  th[2] = kl_link_accel(s, cam);
  th[3] = kl_link_jerk(s, cam);
  if (isnan(th[3]) || isnan(kl_link_jerk(s, follower)))
    return KL_ESTAGE;
  if (th[1] == 0.0)
    return KL_ESINGULAR;
  kl_joint_position(s, joint, p);
  kl_joint_position(s, bearing, c);
  follower_coordinate(s, guide, follower, p, q, dp);
  out[KL_CAM_STATE_ANGLE] = th[0];
  out[KL_CAM_STATE_RISE] = q[0];
  out[KL_CAM_STATE_D1] = q[1] / th[1];
  out[KL_CAM_STATE_D2] =
      (q[2] - out[KL_CAM_STATE_D1] * th[2]) / (th[1] * th[1]);
  out[KL_CAM_STATE_D3] = (q[3] - 3.0 * out[KL_CAM_STATE_D2] * th[1] * th[2] -
                          out[KL_CAM_STATE_D1] * th[3]) /
                         (th[1] * th[1] * th[1]);
  out[KL_CAM_STATE_RATE] = q[1];
  out[KL_CAM_STATE_ACCEL] = q[2];
  out[KL_CAM_STATE_JERK] = q[3];
  /* the pin's motion against the cam per unit cam angle: its velocity as
   * a point of the follower less the cam's point under it, over the cam's
   * rate; the pitch curve runs along it, its outward normal J t */
  kl_link_origin(s, follower, o);
  kl_link_origin_velocity(s, follower, vo);
  w = kl_link_rate(s, follower);
  r[0] = p[0] - o[0];
  r[1] = p[1] - o[1];
  quarter(r, jr);
  for (i = 0; i < 2; i++)
    t[i] = (vo[i] + w * jr[i] - th[1] * (i == 0 ? c[1] - p[1] : p[0] - c[0])) /
           th[1];
  quarter(t, jt);
  out[KL_CAM_STATE_PRESSURE] =
      atan2(t[0] * dp[0] + t[1] * dp[1], jt[0] * dp[0] + jt[1] * dp[1]);
  return KL_OK;
}

int kl_cam_guide_error(const kl_solver *s, int joint, double out[2]) {
  const kli_joint *j;
  const kl_cam_follower *f;
  double p[2], c[2], q[4], dp[2];
  int bearing, guide, revolute, st;
  if (out == NULL)
    return KL_EINVAL;
  if ((st = cam_pair(s, joint, &bearing, &guide)) != KL_OK)
    return st;
  j = &s->model->joints[joint];
  if (j->cam == NULL)
    return KL_EKIND;
  f = kli_cam_follower_of(j->cam);
  revolute = s->model->joints[guide].kind == KL_JOINT_REVOLUTE;
  if (revolute != (f->kind == KL_CAM_OSCILLATING))
    return KL_EKIND;
  if (!s->st.position_solved)
    return KL_ESTAGE;
  kl_joint_position(s, joint, p);
  kl_joint_position(s, bearing, c);
  if (revolute) {
    double pivot[2];
    kl_joint_position(s, guide, pivot);
    out[0] = fmax(hypot(pivot[0] - c[0] - f->pivot_x,
                        pivot[1] - c[1] - f->pivot_y),
                  fabs(hypot(p[0] - pivot[0], p[1] - pivot[1]) -
                       f->arm_length));
    out[1] = 0.0;
  } else {
    /* the stem's direction (0, 1) against the unit direction of sliding */
    follower_coordinate(s, guide, j->link[1], p, q, dp);
    out[0] = fabs(p[0] - c[0] - f->offset);
    out[1] = atan2(fabs(dp[0]), fabs(dp[1]));
  }
  return KL_OK;
}
