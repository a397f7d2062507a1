/*
 * forces.c - the force stage: the Newton-Euler equations of every moving
 * link with the joint reactions and input efforts as unknowns (d'Alembert),
 * on the pattern reactions.c lays out, solved by the dense module.
 */
#include <math.h>
#include <string.h>

#include "forces.h"
#include "slots.h"

static double cross(const double a[2], const double b[2]) {
  return a[0] * b[1] - a[1] * b[0];
}

/* R(angle of link) v at pose p. */
static void turn(const kli_pose *p, int link, const double v[2],
                 double out[2]) {
  double c = p->c[link], s = p->s[link];
  out[0] = c * v[0] - s * v[1];
  out[1] = s * v[0] + c * v[1];
}

/* The velocity (and, with xdd, the acceleration) of the centre of mass of
 * every link with mass, into s->centre_velocity and s->centre_accel: its
 * frame origin's, from the origin's chain, plus the turning of the arm
 * R c to the centre (omega (Rc)-perp; alpha (Rc)-perp - omega^2 Rc). */
static void centre_motion(kl_solver *s, const double *xd, const double *xdd) {
  const kl_model *m = s->model;
  const kli_pose *p = &s->st.pose;
  int l;
  for (l = 1; l < m->nlinks; l++) {
    const kli_link *link = &m->links[l];
    double rc[2], v[2], w = xd[l], *vg = s->centre_velocity + 2 * l;
    if (link->mass == 0.0)
      continue;
    turn(p, l, link->centre, rc);
    kli_chain_rate(m, &m->topo.origins[l], p, xd, v);
    vg[0] = v[0] - w * rc[1];
    vg[1] = v[1] + w * rc[0];
    if (xdd != NULL) {
      double a[2], alpha = xdd[l], *ag = s->centre_accel + 2 * l;
      kli_chain_accel(m, &m->topo.origins[l], p, xd, xd, xdd, a);
      ag[0] = a[0] - alpha * rc[1] - w * w * rc[0];
      ag[1] = a[1] + alpha * rc[0] - w * w * rc[1];
    }
  }
}

/* Every joint at the committed pose, into s->force_geometry (6 per
 * joint): the arm from each side's centre of mass to the point where the
 * joint's force acts (link b's attachment point; on link a, that point on
 * its slide line), and a sliding joint's axis direction d. On ground,
 * whose centre is its origin, the arm is the point itself. */
static void joint_geometry(kl_solver *s) {
  const kl_model *m = s->model;
  const kli_pose *p = &s->st.pose;
  int joint, side;
  for (joint = 0; joint < m->njoints; joint++) {
    const kli_joint *j = &m->joints[joint];
    double *arm = s->force_geometry + 6 * joint, *d = arm + 4;
    for (side = 0; side < 2; side++) {
      int link = j->link[side];
      double local[2];
      local[0] = j->at[side][0] - m->links[link].centre[0];
      local[1] = j->at[side][1] - m->links[link].centre[1];
      turn(p, link, local, arm + 2 * side);
    }
    d[0] = d[1] = 0.0;
    if (kli_is_sliding(j->kind)) {
      /* the pin's place on the slot's path, and the path's unit tangent */
      double path[6], g[2], norm;
      kli_slot_path(j, p->x[m->nlinks + joint], path);
      turn(p, j->link[0], path, g);
      arm[0] += g[0];
      arm[1] += g[1];
      norm = hypot(path[2], path[3]);
      path[2] /= norm;
      path[3] /= norm;
      turn(p, j->link[0], path + 2, d);
    }
  }
}

/* The global position of (x, y) in link's frame at pose p. */
static void global_point(const kl_model *m, const kli_pose *p, int link,
                         const double at[2], double out[2]) {
  double r[2];
  kli_chain_value(m, &m->topo.origins[link], p, out);
  turn(p, link, at, r);
  out[0] += r[0];
  out[1] += r[1];
}

/* The arm from link's centre of mass to the global point q. */
static void arm_to(const kl_model *m, const kli_pose *p, int link,
                   const double q[2], double arm[2]) {
  double g[2];
  global_point(m, p, link, m->links[link].centre, g);
  arm[0] = q[0] - g[0];
  arm[1] = q[1] - g[1];
}

/* The other link of `joint` than `link`. */
static int other_side(const kl_model *m, int joint, int link) {
  const kli_joint *j = &m->joints[joint];
  return j->link[0] == link ? j->link[1] : j->link[0];
}

/*
 * Each extra row's geometry after the joints' (6 per row): the arms from
 * the two sides' centres of mass to the point where its force acts, and
 * the force's direction; and that point, globally, into `at` (2 per row).
 * A gear pair's tooth force acts at the pitch point on the line of centres
 * (r1 from gear 1's centre, toward gear 2's unless gear 2 is the larger of
 * an internal pair), along the common tangent (pressure angle 0); a rack's
 * along the rack's axis at the pinion's pitch point, where the pinion's
 * turn moves the pitch line by radius times the turn; a point input's
 * along its axis at its point. A ratio coupling uses its joints' geometry.
 */
static void extra_geometry(kl_solver *s, double *at) {
  const kl_model *m = s->model;
  const kli_pose *p = &s->st.pose;
  int e;
  for (e = 0; e < m->topo.nextra; e++) {
    double *arm = s->force_geometry + 6 * (m->njoints + e), *d = arm + 4;
    double *q = at + 2 * e;
    int side_link[2] = {KL_GROUND, KL_GROUND};
    if (e < m->ncouplings) {
      const kli_coupling *c = &m->couplings[e];
      double c1[2];
      if (c->kind == KL_COUPLING_RATIO)
        continue;
      global_point(m, p, c->carrier, kli_joint_point_on(m, c->joint[0],
                                                       c->carrier),
                   c1);
      side_link[0] = other_side(m, c->joint[0], c->carrier);
      side_link[1] = other_side(m, c->joint[1], c->carrier);
      if (c->kind == KL_COUPLING_GEAR) {
        double c2[2], u[2], len, toward;
        global_point(m, p, c->carrier,
                     kli_joint_point_on(m, c->joint[1], c->carrier), c2);
        u[0] = c2[0] - c1[0];
        u[1] = c2[1] - c1[1];
        len = hypot(u[0], u[1]);
        toward = c->internal && c->value[1] > c->value[0] ? -1.0 : 1.0;
        q[0] = c1[0] + toward * c->value[0] * u[0] / len;
        q[1] = c1[1] + toward * c->value[0] * u[1] / len;
        d[0] = -u[1] / len;
        d[1] = u[0] / len;
      } else {
        const kli_joint *rack = &m->joints[c->joint[1]];
        double r = (rack->link[0] == c->carrier ? 1.0 : -1.0) * c->value[0];
        turn(p, rack->link[0], rack->axis_cs, d);
        q[0] = c1[0] + r * d[1];
        q[1] = c1[1] - r * d[0];
      }
    } else {
      const kli_point_input *pi = &m->point_inputs[e - m->ncouplings];
      kli_chain_value(m, &m->topo.points[pi->point], p, q);
      side_link[1] = m->points[pi->point].link;
      d[0] = pi->axis == 0 ? 1.0 : 0.0;
      d[1] = pi->axis == 0 ? 0.0 : 1.0;
    }
    arm_to(m, p, side_link[0], q, arm);
    arm_to(m, p, side_link[1], q, arm + 2);
  }
}

/* The value of coefficient `coef` with arm r and direction d. */
static double coefficient(int coef, const double r[2], const double d[2]) {
  double n[2];
  n[0] = -d[1];
  n[1] = d[0];
  switch (coef) {
  case KLI_COEF_UNIT: return 1.0;
  case KLI_COEF_ARM_FX: return -r[1];
  case KLI_COEF_ARM_FY: return r[0];
  case KLI_COEF_NORMAL_X: return n[0];
  case KLI_COEF_NORMAL_Y: return n[1];
  case KLI_COEF_NORMAL_M: return cross(r, n);
  case KLI_COEF_AXIS_X: return d[0];
  case KLI_COEF_AXIS_Y: return d[1];
  default: return cross(r, d); /* KLI_COEF_AXIS_M */
  }
}

/* The force system's values at the committed pose (its joint geometry
 * taken): each entry's coefficient (times its weight, for an extra row's)
 * times its side's sign, moment rows over the model's scale. */
static void assemble(kl_solver *s) {
  const kl_model *m = s->model;
  const kli_force_pattern *f = &m->topo.forces;
  double inv_scale = 1.0 / m->topo.scale;
  int j = 0, e;
  for (e = 0; e < f->nentries; e++) {
    const double *arm;
    double v;
    while (j < m->njoints && e >= f->entry_start[j + 1])
      j++;
    arm = s->force_geometry +
          6 * (e < f->entry_start[m->njoints] ? j : f->geom[e]);
    v = coefficient(f->coef[e], arm + 2 * f->side[e], arm + 4) * f->weight[e];
    if (f->side[e] == 0)
      v = -v; /* link a feels the opposite of what b feels */
    if (f->row[e] % 3 == 2)
      v *= inv_scale;
    s->force_values[e] = v;
  }
}

/* The right side: per moving link, m (a_G - g) and I alpha, less the
 * loads it carries (moment rows over the model's scale). */
static void right_side(kl_solver *s, const double *xdd, int nloads,
                       const kl_load *loads, double *b) {
  const kl_model *m = s->model;
  const double *g = m->gravity, *ag = s->centre_accel;
  double inv_scale = 1.0 / m->topo.scale;
  int l, k;
  for (l = 1; l < m->nlinks; l++) {
    const kli_link *link = &m->links[l];
    double *row = b + 3 * (l - 1);
    row[0] = link->mass == 0.0 ? 0.0 : link->mass * (ag[2 * l] - g[0]);
    row[1] = link->mass == 0.0 ? 0.0 : link->mass * (ag[2 * l + 1] - g[1]);
    row[2] = link->inertia * xdd[l] * inv_scale;
  }
  for (k = 0; k < nloads; k++) {
    const kl_load *load = &loads[k];
    if (load->kind == KL_LOAD_FORCE) {
      const kli_point *pt = &m->points[load->id];
      const kli_link *link = &m->links[pt->link];
      double local[2], r[2], force[2], *row;
      if (pt->link == KL_GROUND)
        continue;
      local[0] = pt->at[0] - link->centre[0];
      local[1] = pt->at[1] - link->centre[1];
      turn(&s->st.pose, pt->link, local, r);
      force[0] = load->fx;
      force[1] = load->fy;
      row = b + 3 * (pt->link - 1);
      row[0] -= force[0];
      row[1] -= force[1];
      row[2] -= cross(r, force) * inv_scale;
    } else if (load->id != KL_GROUND) {
      b[3 * (load->id - 1) + 2] -= load->torque * inv_scale;
    }
  }
}

/* Adds sign times (force at global point at, plus a moment) to the load
 * on ground. */
static void add_to_ground(kli_forces *out, double sign, const double at[2],
                          const double force[2], double moment) {
  out->ground[0] += sign * force[0];
  out->ground[1] += sign * force[1];
  out->ground[2] += sign * (cross(at, force) + moment);
}

/* The extra rows' unknowns back to coupling forces and point efforts, and
 * what ground takes of them: a toothed ground link's share of a tooth
 * force, a ratio coupling's moment or push on ground, the reaction of a
 * point input's actuator, which stands on ground. */
static void extra_results(kl_solver *s, const double *x, const double *at,
                          kli_forces *out) {
  const kl_model *m = s->model;
  const kli_force_pattern *f = &m->topo.forces;
  int e, k;
  for (e = 0; e < m->topo.nextra; e++) {
    const double *d = s->force_geometry + 6 * (m->njoints + e) + 4;
    const double *q = at + 2 * e;
    double lambda, force[2];
    if (e >= m->ncouplings) {
      const kli_point_input *pi = &m->point_inputs[e - m->ncouplings];
      lambda = x[f->input_col[pi->input]];
      out->effort[pi->input] = lambda;
      force[0] = lambda * d[0];
      force[1] = lambda * d[1];
      add_to_ground(out, -1.0, q, force, 0.0);
      continue;
    }
    lambda = x[f->coupling_col[e]];
    if (m->couplings[e].kind != KL_COUPLING_RATIO) {
      const kli_coupling *c = &m->couplings[e];
      out->coupling[e] = lambda;
      force[0] = lambda * d[0];
      force[1] = lambda * d[1];
      if (other_side(m, c->joint[0], c->carrier) == KL_GROUND)
        add_to_ground(out, -1.0, q, force, 0.0);
      if (other_side(m, c->joint[1], c->carrier) == KL_GROUND)
        add_to_ground(out, 1.0, q, force, 0.0);
      continue;
    }
    {
      const kli_extra *xr = &m->topo.extra[e];
      const kli_joint *j2 = &m->joints[m->couplings[e].joint[1]];
      /* reported: what it applies on joint 2's coordinate (a torque or a
       * push on its link b), its row's weight on that coordinate */
      out->coupling[e] =
          lambda * (j2->kind == KL_JOINT_REVOLUTE ? m->topo.scale : 1.0);
      for (k = 0; k < xr->ncoef; k++) {
        int coord = xr->coord[k];
        if (coord == KL_GROUND) {
          out->ground[2] += xr->coef[k] * lambda;
        } else if (coord >= m->nlinks) {
          const kli_joint *j = &m->joints[coord - m->nlinks];
          const double *arm = s->force_geometry + 6 * (coord - m->nlinks);
          double jd[2];
          jd[0] = xr->coef[k] * lambda * arm[4];
          jd[1] = xr->coef[k] * lambda * arm[5];
          if (j->link[0] == KL_GROUND)
            add_to_ground(out, -1.0, arm, jd, 0.0);
          if (j->link[1] == KL_GROUND)
            add_to_ground(out, 1.0, arm + 2, jd, 0.0);
        }
      }
    }
  }
}

/* The unknowns x back to joint forces and moments, efforts and the load on
 * ground (the joint geometry taken at this pose). */
static void results(kl_solver *s, const double *x, kli_forces *out) {
  const kl_model *m = s->model;
  const kli_force_pattern *f = &m->topo.forces;
  int j;
  out->ground[0] = out->ground[1] = out->ground[2] = 0.0;
  for (j = 0; j < m->njoints; j++) {
    const kli_joint *jt = &m->joints[j];
    int c = f->joint_col[j];
    int effort = jt->input >= 0 ? f->input_col[jt->input] : -1;
    const double *arm = s->force_geometry + 6 * j, *d = arm + 4;
    double force[2], moment = 0.0;
    if (jt->kind == KL_JOINT_REVOLUTE) {
      force[0] = x[c];
      force[1] = x[c + 1];
      if (effort >= 0)
        moment = x[effort];
    } else {
      /* across the slide, n = d-perp, plus an input's push along it */
      double along = effort >= 0 ? x[effort] : 0.0;
      force[0] = -x[c] * d[1] + along * d[0];
      force[1] = x[c] * d[0] + along * d[1];
      if (jt->kind == KL_JOINT_PRISMATIC)
        moment = x[c + 1];
    }
    out->force[2 * j] = force[0];
    out->force[2 * j + 1] = force[1];
    out->moment[j] = moment;
    if (effort >= 0)
      out->effort[jt->input] = x[effort];
    /* ground as link b receives the force and moment; as link a, their
     * opposites; the point is where the force acts, in global terms */
    if (jt->link[1] == KL_GROUND || jt->link[0] == KL_GROUND) {
      double sign = jt->link[1] == KL_GROUND ? 1.0 : -1.0;
      const double *at = arm + (jt->link[1] == KL_GROUND ? 2 : 0);
      add_to_ground(out, sign, at, force, moment);
    }
  }
}

int kli_forces_determinate(kl_solver *s, const char *stage) {
  const kl_model *m = s->model;
  if (m->topo.redundancy > 0)
    return kli_fail(s->error, KL_EINDETERMINATE,
                    "%s: the model declares %d redundant constraint%s, so "
                    "it is statically indeterminate: its joint forces depend "
                    "on the links' elasticity, not on equilibrium alone",
                    stage, m->topo.redundancy,
                    m->topo.redundancy == 1 ? "" : "s");
  return KL_OK;
}

int kli_forces_ready(kl_solver *s, const char *stage) {
  if (s->st.last_attempt == KL_ESINGULAR)
    return kli_fail(s->error, KL_ESINGULAR,
                    "%s: the position asked for last is singular (a dead "
                    "point, toggle or change point), where the forces are "
                    "not determined",
                    stage);
  if (!s->st.acceleration_solved || !s->st.position_solved ||
      s->st.last_attempt != KL_OK)
    return kli_fail(s->error, KL_ESTAGE,
                    "%s needs the position, velocity and acceleration solved "
                    "at the current inputs first (inverse dynamics: the "
                    "forces follow the motion)",
                    stage);
  return KL_OK;
}

int kli_forces_at(kl_solver *s, const double *xd, const double *xdd,
                  int nloads, const kl_load *loads, kli_forces *out,
                  const char *stage) {
  size_t coords = (size_t)s->ncoords * sizeof(double);
  /* the force system is singular exactly where the loop Jacobian is (both
   * state the same constraints), so the position's condition decides */
  if (s->st.rcond < s->singular_rcond)
    return kli_fail(s->error, KL_ESINGULAR,
                    "%s: the position is singular (rcond %.3g below %.3g): "
                    "a dead point, toggle or change point, where the forces "
                    "are not determined",
                    stage, s->st.rcond, s->singular_rcond);
  if (!s->force_factored || memcmp(s->force_at, s->st.pose.x, coords) != 0) {
    joint_geometry(s);
    extra_geometry(s, s->extra_points);
    assemble(s);
    kli_dense_load(&s->force, s->force_values);
    s->force_factored = 0;
    if (kli_dense_factor(&s->force))
      return kli_fail(s->error, KL_ESINGULAR,
                      "%s: the force system is singular at this position: a "
                      "dead point, where the forces are not determined",
                      stage);
    memcpy(s->force_at, s->st.pose.x, coords);
    s->force_factored = 1;
  }
  centre_motion(s, xd, xdd);
  right_side(s, xdd, nloads, loads, s->force_rhs);
  kli_dense_solve(&s->force, s->force_rhs);
  results(s, s->force_rhs, out);
  extra_results(s, s->force_rhs, s->extra_points, out);
  return KL_OK;
}

void kli_link_energy(kl_solver *s, const double *xd, int nloads,
                     const kl_load *loads, double *kinetic, double *total) {
  const kl_model *m = s->model;
  const kli_pose *p = &s->st.pose;
  double ke = 0.0, potential = 0.0;
  int l, k;
  centre_motion(s, xd, NULL);
  for (l = 1; l < m->nlinks; l++) {
    const kli_link *link = &m->links[l];
    ke += 0.5 * link->inertia * xd[l] * xd[l];
    if (link->mass > 0.0) {
      const double *vg = s->centre_velocity + 2 * l;
      double origin[2], rc[2];
      ke += 0.5 * link->mass * (vg[0] * vg[0] + vg[1] * vg[1]);
      kli_chain_value(m, &m->topo.origins[l], p, origin);
      turn(p, l, link->centre, rc);
      potential -= link->mass * (m->gravity[0] * (origin[0] + rc[0]) +
                                 m->gravity[1] * (origin[1] + rc[1]));
    }
  }
  for (k = 0; k < nloads; k++) {
    const kl_load *load = &loads[k];
    if (load->kind == KL_LOAD_FORCE) {
      double q[2];
      kli_chain_value(m, &m->topo.points[load->id], p, q);
      potential -= load->fx * q[0] + load->fy * q[1];
    } else {
      potential -= load->torque * p->x[load->id];
    }
  }
  *kinetic = ke;
  *total = ke + potential;
}

/* ---- the API ---- */

int kl_solve_forces(kl_solver *s, int nloads, const kl_load *loads,
                    double *efforts) {
  static const char stage[] = "solve forces";
  int st;
  if (s == NULL)
    return KL_EINVAL;
  if ((st = kli_forces_determinate(s, stage)) != KL_OK ||
      (st = kli_check_loads(s, nloads, loads, stage)) != KL_OK ||
      (st = kli_forces_ready(s, stage)) != KL_OK ||
      (st = kli_forces_at(s, s->st.xd, s->st.xdd, nloads, loads,
                          &s->st.forces, stage)) != KL_OK)
    return st;
  s->st.forces_solved = 1;
  if (efforts != NULL && s->ninputs > 0)
    memcpy(efforts, s->st.forces.effort, (size_t)s->ninputs * sizeof(double));
  return KL_OK;
}

static int forces_known(const kl_solver *s, int joint) {
  if (s == NULL)
    return KL_EINVAL;
  if (joint < 0 || joint >= s->model->njoints)
    return KL_EID;
  return s->st.forces_solved ? KL_OK : KL_ESTAGE;
}

int kl_joint_force(const kl_solver *s, int joint, double fxy[2]) {
  int st = forces_known(s, joint);
  if (fxy == NULL)
    return KL_EINVAL;
  if (st != KL_OK)
    return st;
  fxy[0] = s->st.forces.force[2 * joint];
  fxy[1] = s->st.forces.force[2 * joint + 1];
  return KL_OK;
}

double kl_joint_moment(const kl_solver *s, int joint) {
  return forces_known(s, joint) == KL_OK ? s->st.forces.moment[joint] : NAN;
}

int kl_ground_force(const kl_solver *s, double fxy_m[3]) {
  if (s == NULL || fxy_m == NULL)
    return KL_EINVAL;
  if (!s->st.forces_solved)
    return KL_ESTAGE;
  memcpy(fxy_m, s->st.forces.ground, 3 * sizeof(double));
  return KL_OK;
}

double kl_coupling_force(const kl_solver *s, int coupling) {
  if (s == NULL || coupling < 0 || coupling >= s->model->ncouplings ||
      !s->st.forces_solved)
    return NAN;
  return s->st.forces.coupling[coupling];
}
