/*
 * describe.h - private: how every message of the library names a model's
 * items and writes its values, so that all of them read alike.
 *
 * Links, joints and points are named as a model file refers to them: by
 * their name, or as `@id` when unnamed (ids from 0 in order of creation,
 * ground is link @0). Inputs and loops, which have no names, are numbered
 * from 1 as `kinloop check` and `--input` number them. Input values and
 * angles are written in the model's recorded units (kl_model_set_units):
 * angles in degrees when the model says deg, lengths with the unit's
 * symbol when it is stated. A caller's out-of-range argument is the C
 * API's index, from 0, and says so ("input index 3 (0-based)").
 */
#ifndef KINLOOP_DESCRIBE_H
#define KINLOOP_DESCRIBE_H

#include <stddef.h>

#include "kinloop.h"

/* Room for any one label or value below. */
#define KLI_LABEL_SIZE 160

/* "link 'crank'", "link @3"; likewise "point 'tip'", "point @0". */
const char *kli_link_label(const kl_model *m, int link, char *buf, size_t n);
const char *kli_point_label(const kl_model *m, int point, char *buf, size_t n);
/* A joint as a model file refers to it: "'pin'" or "@3". */
const char *kli_joint_ref(const kl_model *m, int joint, char *buf, size_t n);
/* "joint 'pin' (revolute, link 'crank' to link @0)". */
const char *kli_joint_label(const kl_model *m, int joint, char *buf, size_t n);
/* "input 1 (shaft)", "input 1 (@2)" for an unnamed joint, "input 2 (tip.x)"
 * for a point input: numbered from 1, with the name the tool prints. */
const char *kli_input_label(const kl_model *m, int input, char *buf,
                            size_t n);
/* "loop 2": numbered from 1. */
const char *kli_loop_label(int loop, char *buf, size_t n);
/* A value of input i in the model's units, to `digits` significant
 * digits: "170 deg", "2.967059728 rad", "12.5 mm", or "12.5" when lengths
 * are unstated. */
const char *kli_input_value(const kl_model *m, int input, double value,
                            int digits, char *buf, size_t n);
/* "input 1 (shaft) = 170 deg" (10 digits). */
const char *kli_input_at(const kl_model *m, int input, double value,
                         char *buf, size_t n);
/* An angle given in radians, written in the model's angle unit ("30 deg"),
 * and a length with its unit's symbol when stated ("0.5 mm" or "0.5"); to
 * `digits` significant digits. */
const char *kli_angle_value(const kl_model *m, double radians, int digits,
                            char *buf, size_t n);
const char *kli_length_value(const kl_model *m, double length, int digits,
                             char *buf, size_t n);
/* A caller's index that names nothing: "input index 3 (0-based)". */
const char *kli_index_label(const char *kind, int index, char *buf, size_t n);
/* KL_EID, with "WHAT: KIND index I (0-based) does not exist (the model has
 * COUNT KINDs)" written into error (KLI_MESSAGE_SIZE bytes, or NULL). */
int kli_fail_index(char *error, const char *what, const char *kind, int index,
                   int count);

#endif
