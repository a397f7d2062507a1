/*
 * describe.c - the labels and values every library message uses: items by
 * name or @id, inputs and loops from 1, values in the model's units.
 */
#include <stdio.h>

#include "describe.h"
#include "model.h"

/* "'name'" or "@id": the model file's reference to an item. */
static const char *reference(const char *name, int id, char *buf, size_t n) {
  if (name != NULL)
    snprintf(buf, n, "'%.40s'", name);
  else
    snprintf(buf, n, "@%d", id);
  return buf;
}

const char *kli_link_label(const kl_model *m, int link, char *buf, size_t n) {
  char ref[48];
  snprintf(buf, n, "link %s",
           reference(kl_model_link_name(m, link), link, ref, sizeof ref));
  return buf;
}

const char *kli_point_label(const kl_model *m, int point, char *buf,
                            size_t n) {
  char ref[48];
  snprintf(buf, n, "point %s",
           reference(kl_model_point_name(m, point), point, ref, sizeof ref));
  return buf;
}

const char *kli_joint_ref(const kl_model *m, int joint, char *buf,
                          size_t n) {
  return reference(m->joints[joint].name, joint, buf, n);
}

const char *kli_joint_label(const kl_model *m, int joint, char *buf,
                            size_t n) {
  char la[56], lb[56], ref[48];
  const kli_joint *j = &m->joints[joint];
  snprintf(buf, n, "joint %s (%s, %s to %s)",
           kli_joint_ref(m, joint, ref, sizeof ref), kli_kind_name(j->kind),
           kli_link_label(m, j->link[0], la, sizeof la),
           kli_link_label(m, j->link[1], lb, sizeof lb));
  return buf;
}

const char *kli_input_label(const kl_model *m, int input, char *buf,
                            size_t n) {
  const kli_point_input *p = kli_point_input_of(m, input);
  if (p == NULL) {
    int joint = m->inputs[input];
    const char *name = m->joints[joint].name;
    if (name != NULL)
      snprintf(buf, n, "input %d (%.40s)", input + 1, name);
    else
      snprintf(buf, n, "input %d (@%d)", input + 1, joint);
  } else {
    const char *name = m->points[p->point].name;
    char axis = p->axis == 0 ? 'x' : 'y';
    if (name != NULL)
      snprintf(buf, n, "input %d (%.40s.%c)", input + 1, name, axis);
    else
      snprintf(buf, n, "input %d (@%d.%c)", input + 1, p->point, axis);
  }
  return buf;
}

const char *kli_loop_label(int loop, char *buf, size_t n) {
  snprintf(buf, n, "loop %d", loop + 1);
  return buf;
}

const char *kli_angle_value(const kl_model *m, double radians, int digits,
                            char *buf, size_t n) {
  if (m->angle_unit == KL_ANGLE_DEG)
    snprintf(buf, n, "%.*g deg", digits, radians * (180.0 / KLI_PI));
  else
    snprintf(buf, n, "%.*g rad", digits, radians);
  return buf;
}

const char *kli_length_value(const kl_model *m, double length, int digits,
                             char *buf, size_t n) {
  if (m->length_unit == KL_LENGTH_UNSTATED)
    snprintf(buf, n, "%.*g", digits, length);
  else
    snprintf(buf, n, "%.*g %s", digits, length,
             kl_length_unit_str(m->length_unit));
  return buf;
}

const char *kli_input_value(const kl_model *m, int input, double value,
                            int digits, char *buf, size_t n) {
  return kli_input_is_angle(m, input)
             ? kli_angle_value(m, value, digits, buf, n)
             : kli_length_value(m, value, digits, buf, n);
}

const char *kli_input_at(const kl_model *m, int input, double value,
                         char *buf, size_t n) {
  char label[KLI_LABEL_SIZE], v[48];
  snprintf(buf, n, "%s = %s", kli_input_label(m, input, label, sizeof label),
           kli_input_value(m, input, value, 10, v, sizeof v));
  return buf;
}

const char *kli_index_label(const char *kind, int index, char *buf,
                            size_t n) {
  snprintf(buf, n, "%s index %d (0-based)", kind, index);
  return buf;
}

int kli_fail_index(char *error, const char *what, const char *kind, int index,
                   int count) {
  char label[64];
  return kli_fail(error, KL_EID,
                  "%s: %s does not exist (the model has %d %s%s)", what,
                  kli_index_label(kind, index, label, sizeof label), count,
                  kind, count == 1 ? "" : "s");
}
