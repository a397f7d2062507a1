/*
 * couplings.c - the builders and getters of the rows beyond loop closure:
 * gear pairs, racks, ratio couplings and point inputs, checked as called.
 */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "describe.h"
#include "model.h"

/* The centre distance must match a mesh to this fraction of the larger of
 * the distance and the radii: a sketch typed from a drawing's rounded
 * numbers still meshes, a pair drawn at the wrong distance does not. */
#define KLI_MESH_TOLERANCE 1e-9

static int check_builder(kl_model *m, const char *what) {
  if (m->finalized)
    return kli_fail(m->error, KL_ESTATE,
                    "%s: the model is finalized and can no longer change",
                    what);
  return KL_OK;
}

static int check_joint_id(kl_model *m, int joint, const char *what) {
  if (joint < 0 || joint >= m->njoints)
    return kli_fail_index(m->error, what, "joint", joint, m->njoints);
  return KL_OK;
}

static int check_kind(kl_model *m, int joint, int kind, const char *role,
                      const char *what) {
  char lj[160];
  if (m->joints[joint].kind == kind)
    return KL_OK;
  return kli_fail(m->error, KL_EKIND, "%s: the %s, %s, is a %s joint, not %s",
                  what, role, kli_joint_label(m, joint, lj, sizeof lj),
                  kli_kind_name(m->joints[joint].kind), kli_kind_name(kind));
}

/* The two joints exist, differ, and (when `common` is not NULL) share a
 * link, written into *common. */
static int check_pair(kl_model *m, int joint1, int joint2, int *common,
                      const char *what) {
  const kli_joint *j1, *j2;
  char l1[160], l2[160];
  int st, a, b;
  if ((st = check_builder(m, what)) != KL_OK ||
      (st = check_joint_id(m, joint1, what)) != KL_OK ||
      (st = check_joint_id(m, joint2, what)) != KL_OK)
    return st;
  if (joint1 == joint2)
    return kli_fail(m->error, KL_ESELFCOUPLING,
                    "%s: %s is coupled with itself", what,
                    kli_joint_label(m, joint1, l1, sizeof l1));
  if (common == NULL)
    return KL_OK;
  j1 = &m->joints[joint1];
  j2 = &m->joints[joint2];
  for (a = 0; a < 2; a++)
    for (b = 0; b < 2; b++)
      if (j1->link[a] == j2->link[b]) {
        *common = j1->link[a];
        return KL_OK;
      }
  return kli_fail(m->error, KL_ENOCOMMON,
                  "%s: %s and %s share no link; the pair turns on one common "
                  "link (the carrier)",
                  what, kli_joint_label(m, joint1, l1, sizeof l1),
                  kli_joint_label(m, joint2, l2, sizeof l2));
}

static int push_coupling(kl_model *m, const kli_coupling *c,
                         const char *what) {
  if (kli_reserve(&m->alloc, (void **)&m->couplings, &m->cap_couplings,
                  m->ncouplings + 1, sizeof *m->couplings) != KL_OK)
    return kli_fail(m->error, KL_ENOMEM, "%s: out of memory", what);
  m->couplings[m->ncouplings] = *c;
  return m->ncouplings++;
}

int kl_add_gear_pair(kl_model *m, int joint1, int joint2, double radius1,
                     double radius2) {
  static const char what[] = "add gear pair";
  kli_coupling c;
  const double *p1, *p2;
  double d, tol, outer, inner;
  char la[64];
  int st, carrier = -1;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_pair(m, joint1, joint2, &carrier, what)) != KL_OK ||
      (st = check_kind(m, joint1, KL_JOINT_REVOLUTE, "first joint", what)) !=
          KL_OK ||
      (st = check_kind(m, joint2, KL_JOINT_REVOLUTE, "second joint", what)) !=
          KL_OK)
    return st;
  if (!isfinite(radius1) || !isfinite(radius2))
    return kli_fail(m->error, KL_ENONFINITE,
                    "%s: a radius is NaN or infinite (%g, %g)", what, radius1,
                    radius2);
  if (!(radius1 > 0.0) || !(radius2 > 0.0)) {
    char r1[48], r2[48];
    return kli_fail(m->error, KL_ERADIUS,
                    "%s: pitch radii must be positive, not %s and %s", what,
                    kli_length_value(m, radius1, 6, r1, sizeof r1),
                    kli_length_value(m, radius2, 6, r2, sizeof r2));
  }
  p1 = kli_joint_point_on(m, joint1, carrier);
  p2 = kli_joint_point_on(m, joint2, carrier);
  d = hypot(p1[0] - p2[0], p1[1] - p2[1]);
  outer = radius1 + radius2;
  inner = fabs(radius1 - radius2);
  tol = KLI_MESH_TOLERANCE * fmax(d, fmax(radius1, radius2));
  memset(&c, 0, sizeof c);
  c.kind = KL_COUPLING_GEAR;
  c.joint[0] = joint1;
  c.joint[1] = joint2;
  c.value[0] = radius1;
  c.value[1] = radius2;
  c.carrier = carrier;
  if (fabs(d - outer) <= tol)
    c.internal = 0;
  else if (inner > tol && fabs(d - inner) <= tol)
    c.internal = 1;
  else
  {
    char apart[KLI_LABEL_SIZE], r1[KLI_LABEL_SIZE], r2[KLI_LABEL_SIZE],
        ext[KLI_LABEL_SIZE], in[KLI_LABEL_SIZE];
    return kli_fail(m->error, KL_ENOMESH,
                    "%s: the centres lie %s apart on %s, but radii %s and %s "
                    "mesh at %s (external) or %s (internal, unequal radii "
                    "only)",
                    what, kli_length_value(m, d, 12, apart, sizeof apart),
                    kli_link_label(m, carrier, la, sizeof la),
                    kli_length_value(m, radius1, 6, r1, sizeof r1),
                    kli_length_value(m, radius2, 6, r2, sizeof r2),
                    kli_length_value(m, outer, 12, ext, sizeof ext),
                    kli_length_value(m, inner, 12, in, sizeof in));
  }
  return push_coupling(m, &c, what);
}

int kl_add_rack_pinion(kl_model *m, int pinion_joint, int rack_joint,
                       double radius) {
  static const char what[] = "add rack and pinion";
  kli_coupling c;
  int st, carrier = -1;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_pair(m, pinion_joint, rack_joint, &carrier, what)) !=
          KL_OK ||
      (st = check_kind(m, pinion_joint, KL_JOINT_REVOLUTE, "pinion", what)) !=
          KL_OK ||
      (st = check_kind(m, rack_joint, KL_JOINT_PRISMATIC, "rack", what)) !=
          KL_OK)
    return st;
  if (!isfinite(radius))
    return kli_fail(m->error, KL_ENONFINITE, "%s: the radius is %g", what,
                    radius);
  if (radius == 0.0)
    return kli_fail(m->error, KL_ERADIUS,
                    "%s: the pinion's radius is 0 (its sign says which way "
                    "the rack runs; its size must not be 0)",
                    what);
  memset(&c, 0, sizeof c);
  c.kind = KL_COUPLING_RACK;
  c.joint[0] = pinion_joint;
  c.joint[1] = rack_joint;
  c.value[0] = radius;
  c.carrier = carrier;
  return push_coupling(m, &c, what);
}

int kl_add_coupling(kl_model *m, int joint1, int joint2, double ratio) {
  static const char what[] = "add coupling";
  kli_coupling c;
  char j1[48], j2[48];
  int st;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_pair(m, joint1, joint2, NULL, what)) != KL_OK)
    return st;
  if (!isfinite(ratio))
    return kli_fail(m->error, KL_ENONFINITE, "%s: the ratio is %g", what,
                    ratio);
  if (ratio == 0.0)
    return kli_fail(m->error, KL_EINVAL,
                    "%s: a ratio of 0 locks joint %s rather than coupling it "
                    "with joint %s",
                    what, kli_joint_ref(m, joint2, j2, sizeof j2),
                    kli_joint_ref(m, joint1, j1, sizeof j1));
  memset(&c, 0, sizeof c);
  c.kind = KL_COUPLING_RATIO;
  c.joint[0] = joint1;
  c.joint[1] = joint2;
  c.value[0] = ratio;
  c.carrier = -1;
  return push_coupling(m, &c, what);
}

int kl_add_point_input(kl_model *m, int point, int axis) {
  static const char what[] = "add point input";
  char lp[160], li[KLI_LABEL_SIZE];
  int st, k;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_builder(m, what)) != KL_OK)
    return st;
  if (point < 0 || point >= m->npoints)
    return kli_fail_index(m->error, what, "point", point, m->npoints);
  if (axis != 0 && axis != 1)
    return kli_fail(m->error, KL_EINVAL,
                    "%s: axis %d is neither 0 (x) nor 1 (y)", what, axis);
  if (m->points[point].link == KL_GROUND)
    return kli_fail(m->error, KL_EKIND,
                    "%s: %s is on ground, where no input can move it", what,
                    kli_point_label(m, point, lp, sizeof lp));
  for (k = 0; k < m->npoint_inputs; k++)
    if (m->point_inputs[k].point == point && m->point_inputs[k].axis == axis)
      return kli_fail(m->error, KL_EDUPLICATE,
                      "%s: the %c of %s is already %s", what,
                      axis == 0 ? 'x' : 'y',
                      kli_point_label(m, point, lp, sizeof lp),
                      kli_input_label(m, m->point_inputs[k].input, li,
                                      sizeof li));
  if (kli_reserve(&m->alloc, (void **)&m->point_inputs, &m->cap_point_inputs,
                  m->npoint_inputs + 1, sizeof *m->point_inputs) != KL_OK ||
      kli_reserve(&m->alloc, (void **)&m->inputs, &m->cap_inputs,
                  m->ninputs + 1, sizeof *m->inputs) != KL_OK)
    return kli_fail(m->error, KL_ENOMEM, "%s: out of memory", what);
  m->point_inputs[m->npoint_inputs].point = point;
  m->point_inputs[m->npoint_inputs].axis = axis;
  m->point_inputs[m->npoint_inputs].input = m->ninputs;
  m->npoint_inputs++;
  m->inputs[m->ninputs] = -1;
  return m->ninputs++;
}

/* ---- reading them back ---- */

int kl_model_coupling_count(const kl_model *m) {
  return m == NULL ? KL_EINVAL : m->ncouplings;
}

int kl_model_coupling(const kl_model *m, int coupling,
                      kl_coupling_info *info) {
  kl_coupling_info out;
  const kli_coupling *c;
  if (m == NULL || info == NULL || info->size < sizeof out)
    return KL_EINVAL;
  if (coupling < 0 || coupling >= m->ncouplings)
    return KL_EID;
  c = &m->couplings[coupling];
  memset(&out, 0, sizeof out);
  out.size = sizeof out;
  out.kind = c->kind;
  out.joint1 = c->joint[0];
  out.joint2 = c->joint[1];
  out.value1 = c->value[0];
  out.value2 = c->value[1];
  out.carrier = c->carrier;
  out.internal = c->internal;
  memcpy(info, &out, sizeof out);
  return KL_OK;
}

const kli_point_input *kli_point_input_of(const kl_model *m, int input) {
  int k;
  if (m->inputs[input] >= 0)
    return NULL;
  for (k = 0; k < m->npoint_inputs; k++)
    if (m->point_inputs[k].input == input)
      return &m->point_inputs[k];
  return NULL;
}

int kl_model_input_point(const kl_model *m, int input) {
  const kli_point_input *p;
  if (m == NULL)
    return KL_EINVAL;
  if (input < 0 || input >= m->ninputs)
    return KL_EID;
  p = kli_point_input_of(m, input);
  return p != NULL ? p->point : KL_EKIND;
}

int kl_model_input_axis(const kl_model *m, int input) {
  const kli_point_input *p;
  if (m == NULL)
    return KL_EINVAL;
  if (input < 0 || input >= m->ninputs)
    return KL_EID;
  p = kli_point_input_of(m, input);
  return p != NULL ? p->axis : KL_EKIND;
}

int kli_input_is_angle(const kl_model *m, int input) {
  return m->inputs[input] >= 0 &&
         m->joints[m->inputs[input]].kind == KL_JOINT_REVOLUTE;
}

int kli_copy_couplings(kl_model *m, const kl_model *src) {
  if (src->ncouplings > 0) {
    if (kli_reserve(&m->alloc, (void **)&m->couplings, &m->cap_couplings,
                    src->ncouplings, sizeof *m->couplings) != KL_OK)
      return 0;
    memcpy(m->couplings, src->couplings,
           (size_t)src->ncouplings * sizeof *m->couplings);
    m->ncouplings = src->ncouplings;
  }
  if (src->npoint_inputs > 0) {
    if (kli_reserve(&m->alloc, (void **)&m->point_inputs,
                    &m->cap_point_inputs, src->npoint_inputs,
                    sizeof *m->point_inputs) != KL_OK)
      return 0;
    memcpy(m->point_inputs, src->point_inputs,
           (size_t)src->npoint_inputs * sizeof *m->point_inputs);
    m->npoint_inputs = src->npoint_inputs;
  }
  return 1;
}

void kli_free_couplings(kl_model *m) {
  kli_free(&m->alloc, m->couplings,
           (size_t)m->cap_couplings * sizeof *m->couplings);
  kli_free(&m->alloc, m->point_inputs,
           (size_t)m->cap_point_inputs * sizeof *m->point_inputs);
  m->couplings = NULL;
  m->point_inputs = NULL;
  m->ncouplings = m->cap_couplings = 0;
  m->npoint_inputs = m->cap_point_inputs = 0;
}
