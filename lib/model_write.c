/*
 * model_write.c - the model-file writer: a model as the text that the model
 * reader reads back to the same model.
 */
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>

#include "slots.h"
#include "tokens.h"

typedef struct {
  char *buf;
  size_t cap, len;
} sink;

static void put(sink *o, const char *fmt, ...)
#ifdef __GNUC__
    __attribute__((format(printf, 2, 3)))
#endif
    ;

static void put(sink *o, const char *fmt, ...) {
  va_list ap;
  int n;
  char *at = o->len < o->cap ? o->buf + o->len : NULL;
  size_t room = o->len < o->cap ? o->cap - o->len : 0;
  va_start(ap, fmt);
  n = vsnprintf(at, room, fmt, ap);
  va_end(ap);
  if (n > 0)
    o->len += (size_t)n;
}

/* A name as the reader reads it back: a word, or a quoted string. */
static void put_name(sink *o, const char *name) {
  const char *c;
  if (name == NULL) {
    put(o, " -");
    return;
  }
  if (kli_is_identifier(name) && strcmp(name, "ground") != 0) {
    put(o, " %s", name);
    return;
  }
  put(o, " \"");
  for (c = name; *c != '\0'; c++)
    put(o, "%s%c", (*c == '"' || *c == '\\') ? "\\" : "", *c);
  put(o, "\"");
}

static void put_link_ref(sink *o, const kl_model *m, int link) {
  if (link == KL_GROUND)
    put(o, " ground");
  else if (m->links[link].name != NULL)
    put_name(o, m->links[link].name);
  else
    put(o, " @%d", link);
}

static void put_joint_ref(sink *o, const kl_model *m, int joint) {
  if (m->joints[joint].name != NULL)
    put_name(o, m->joints[joint].name);
  else
    put(o, " @%d", joint);
}

static void put_point_ref(sink *o, const kl_model *m, int point) {
  if (m->points[point].name != NULL)
    put_name(o, m->points[point].name);
  else
    put(o, " @%d", point);
}

static double angle_out(const kl_model *m, double v) {
  return m->angle_unit == KL_ANGLE_DEG ? v * (180.0 / KLI_PI) : v;
}

/* The force stage's statements: mass properties, gravity, loads, the
 * working speed, the declared redundancy. */
static void write_force_data(const kl_model *m, sink *o) {
  int i;
  for (i = 1; i < m->nlinks; i++)
    if (m->links[i].has_mass) {
      const kli_link *l = &m->links[i];
      put(o, "mass");
      put_link_ref(o, m, i);
      put(o, " %.17g at %.17g %.17g inertia %.17g\n", l->mass, l->centre[0],
          l->centre[1], l->inertia);
    }
  if (m->gravity[0] != 0.0 || m->gravity[1] != 0.0)
    put(o, "gravity %.17g %.17g\n", m->gravity[0], m->gravity[1]);
  for (i = 0; i < m->nloads; i++) {
    const kl_load *l = &m->loads[i];
    if (l->kind == KL_LOAD_FORCE) {
      put(o, "load force");
      put_point_ref(o, m, l->id);
      put(o, " %.17g %.17g\n", l->fx, l->fy);
    } else {
      put(o, "load torque");
      put_link_ref(o, m, l->id);
      put(o, " %.17g\n", l->torque);
    }
  }
  if (m->has_speed) {
    int joint = m->inputs[m->speed_input];
    put(o, "speed");
    put_joint_ref(o, m, joint);
    put(o, " %.17g", m->joints[joint].kind == KL_JOINT_REVOLUTE
                         ? angle_out(m, m->speed)
                         : m->speed);
    if (m->speed_fluctuation > 0.0)
      put(o, " fluctuation %.17g", m->speed_fluctuation);
    put(o, "\n");
  }
  if (m->redundancy > 0)
    put(o, "redundant %d\n", m->redundancy);
}

/* arc-slot and curve-slot statements (model_read.c gives their form). */
static void write_curved_slot(const kl_model *m, int joint, sink *o) {
  const kli_joint *j = &m->joints[joint];
  int k;
  put(o, j->kind == KL_JOINT_ARC_SLOT ? "arc-slot" : "curve-slot");
  put_name(o, j->name);
  put_link_ref(o, m, j->link[0]);
  if (j->kind == KL_JOINT_ARC_SLOT)
    put(o, " %.17g %.17g radius %.17g", j->at[0][0], j->at[0][1], j->radius);
  else
    put(o, " %s %d", j->curve->closed ? "closed" : "open", j->curve->n);
  put_link_ref(o, m, j->link[1]);
  put(o, " %.17g %.17g", j->at[1][0], j->at[1][1]);
  if (j->kind == KL_JOINT_CURVE_SLOT) {
    put(o, " through");
    for (k = 0; k < 2 * j->curve->n; k++)
      put(o, " %.17g", j->curve->xy[k]);
  }
  put(o, "\n");
}

/* A cam statement (model_read.c's read_cam gives its form). */
static void write_cam(const kl_model *m, int joint, sink *o) {
  const kli_joint *j = &m->joints[joint];
  const kl_cam_follower *f = kli_cam_follower_of(j->cam);
  int k, n, angle_lifts = f->kind == KL_CAM_OSCILLATING;
  const kl_cam_segment *g = kli_cam_program_of(j->cam, &n);
  put(o, "cam");
  put_name(o, j->name);
  put_joint_ref(o, m, j->cam_bearing);
  put_link_ref(o, m, j->link[1]);
  put(o, " %.17g %.17g points %d", j->at[1][0], j->at[1][1], j->curve->n);
  put(o, " %s base %.17g roller %.17g",
      angle_lifts ? "oscillating" : "translating", f->base_radius,
      f->roller_radius);
  if (angle_lifts)
    put(o, " pivot %.17g %.17g arm %.17g", f->pivot_x, f->pivot_y,
        f->arm_length);
  else
    put(o, " offset %.17g", f->offset);
  if (j->cam_limit < KLI_PI)
    put(o, " limit %.17g", angle_out(m, j->cam_limit));
  put(o, " program");
  for (k = 0; k < n; k++) {
    double lift = angle_lifts ? angle_out(m, g[k].lift) : g[k].lift;
    if (g[k].lift == 0.0)
      put(o, " dwell %.17g", angle_out(m, g[k].span));
    else
      put(o, " %s %s %.17g %.17g", g[k].lift > 0.0 ? "rise" : "return",
          kli_law_word(g[k].law), angle_out(m, g[k].span), fabs(lift));
  }
  put(o, "\n");
}

/* A value of the profile's joint in the file's units. */
static double joint_value_out(const kl_model *m, int joint, double v) {
  return m->joints[joint].kind == KL_JOINT_REVOLUTE ? angle_out(m, v) : v;
}

/* The motion profile: its segments or its timetable. */
static void write_profile(const kl_model *m, sink *o) {
  static const char *const kinds[] = {"dwell", "rise", "return", "speed"};
  int joint, k;
  if (m->nsegments == 0 && m->nknots == 0)
    return;
  joint = m->inputs[m->profile_input];
  for (k = 0; k < m->nsegments; k++) {
    const kli_segment *g = &m->segments[k];
    put(o, "segment");
    put_joint_ref(o, m, joint);
    put(o, " %s", kinds[g->kind]);
    if (g->kind == KL_SEGMENT_RISE || g->kind == KL_SEGMENT_RETURN)
      put(o, " %s", kli_law_word(g->law));
    put(o, " %.17g %.17g", g->duration, joint_value_out(m, joint, g->from));
    if (g->kind != KL_SEGMENT_DWELL)
      put(o, " %.17g", joint_value_out(m, joint, g->to));
    put(o, "\n");
  }
  if (m->nknots > 0) {
    put(o, "timetable");
    put_joint_ref(o, m, joint);
    for (k = 0; k < m->nknots; k++)
      put(o, " %.17g %.17g", m->knots[k].t,
          joint_value_out(m, joint, m->knots[k].y));
    put(o, "\n");
  }
}

static void write_model(const kl_model *m, sink *o) {
  int i, k;
  put(o, "kinloop-model %d\n", KLI_FORMAT_VERSION);
  put(o, "units length %s angle %s\n",
      m->length_unit == KL_LENGTH_UNSTATED ? "unstated"
                                           : kl_length_unit_str(m->length_unit),
      kl_angle_unit_str(m->angle_unit));
  for (i = 1; i < m->nlinks; i++) {
    put(o, "link");
    put_name(o, m->links[i].name);
    put(o, "\n");
  }
  for (i = 0; i < m->njoints; i++) {
    const kli_joint *j = &m->joints[i];
    if (j->cam != NULL) {
      write_cam(m, i, o);
      continue;
    }
    if (j->kind == KL_JOINT_ARC_SLOT || j->kind == KL_JOINT_CURVE_SLOT) {
      write_curved_slot(m, i, o);
      continue;
    }
    put(o, "%s", kli_kind_name(j->kind));
    put_name(o, j->name);
    put_link_ref(o, m, j->link[0]);
    put(o, " %.17g %.17g", j->at[0][0], j->at[0][1]);
    if (kli_is_sliding(j->kind))
      put(o, " axis %.17g", angle_out(m, j->axis));
    put_link_ref(o, m, j->link[1]);
    put(o, " %.17g %.17g\n", j->at[1][0], j->at[1][1]);
  }
  for (i = 0; i < m->npoints; i++) {
    put(o, "point");
    put_name(o, m->points[i].name);
    put_link_ref(o, m, m->points[i].link);
    put(o, " %.17g %.17g\n", m->points[i].at[0], m->points[i].at[1]);
  }
  for (i = 0; i < m->ninputs; i++) {
    const kli_point_input *pi = kli_point_input_of(m, i);
    if (pi != NULL) {
      put(o, "drive");
      put_point_ref(o, m, pi->point);
      put(o, " %c\n", pi->axis == 0 ? 'x' : 'y');
      continue;
    }
    put(o, "input");
    put_joint_ref(o, m, m->inputs[i]);
    put(o, "\n");
  }
  for (i = 0; i < m->ncouplings; i++) {
    const kli_coupling *c = &m->couplings[i];
    put(o, "%s", c->kind == KL_COUPLING_GEAR   ? "gears"
                 : c->kind == KL_COUPLING_RACK ? "rack"
                                               : "couple");
    put_joint_ref(o, m, c->joint[0]);
    put_joint_ref(o, m, c->joint[1]);
    put(o, " %.17g", c->value[0]);
    if (c->kind == KL_COUPLING_GEAR)
      put(o, " %.17g", c->value[1]);
    put(o, "\n");
  }
  for (i = 0; i < m->nreg_loops; i++) {
    put(o, "loop");
    for (k = m->reg_start[i]; k < m->reg_start[i + 1]; k++)
      put_joint_ref(o, m, m->reg_joints[k]);
    put(o, "\n");
  }
  for (i = 1; i < m->nlinks; i++)
    if (m->links[i].has_sketch) {
      put(o, "sketch angle");
      put_link_ref(o, m, i);
      put(o, " %.17g\n", angle_out(m, m->links[i].sketch));
    }
  for (i = 0; i < m->njoints; i++)
    if (m->joints[i].has_sketch) {
      put(o, "sketch slide");
      put_joint_ref(o, m, i);
      put(o, " %.17g\n", m->joints[i].sketch);
    }
  for (i = 0; i < m->ninputs; i++) {
    const kli_joint *j;
    if (m->inputs[i] < 0)
      continue; /* a point input has no hold */
    j = &m->joints[m->inputs[i]];
    if (!j->has_hold)
      continue;
    put(o, "hold");
    put_joint_ref(o, m, m->inputs[i]);
    put(o, " at %.17g\n",
        j->kind == KL_JOINT_REVOLUTE ? angle_out(m, j->hold) : j->hold);
  }
  for (i = 0; i < m->njoints; i++)
    if (m->joints[i].has_lines) {
      put(o, "transmission");
      put_joint_ref(o, m, i);
      put(o, " between");
      put_joint_ref(o, m, m->joints[i].lines[0]);
      put(o, " and");
      put_joint_ref(o, m, m->joints[i].lines[1]);
      put(o, "\n");
    }
  if (m->has_sweep) {
    int joint = m->inputs[m->sweep.input];
    int angle = m->joints[joint].kind == KL_JOINT_REVOLUTE;
    put(o, "sweep");
    put_joint_ref(o, m, joint);
    put(o, " from %.17g to %.17g steps %d\n",
        angle ? angle_out(m, m->sweep.from) : m->sweep.from,
        angle ? angle_out(m, m->sweep.to) : m->sweep.to, m->sweep.steps);
  }
  write_force_data(m, o);
  write_profile(m, o);
}

int kl_model_write(const kl_model *m, char *buf, size_t cap, size_t *needed) {
  sink o;
  if (m == NULL || (buf == NULL && cap > 0))
    return KL_EINVAL;
  o.buf = buf;
  o.cap = cap;
  o.len = 0;
  write_model(m, &o);
  if (needed != NULL)
    *needed = o.len;
  if (buf == NULL)
    return KL_OK; /* the sizing call */
  return o.len < cap ? KL_OK : KL_ETRUNCATED;
}
