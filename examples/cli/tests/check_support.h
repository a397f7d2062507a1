/*
 * check_support.h - what the kinloop tool's C checkers share: reading
 * files, reporting failures, and solving positions through the library.
 */
#ifndef KINLOOP_CLI_CHECK_SUPPORT_H
#define KINLOOP_CLI_CHECK_SUPPORT_H

#include <stddef.h>

#include "kinloop.h"

#define CHECK_PI 3.14159265358979323846

/* The whole file as a NUL-terminated string; exits on failure. */
char *check_read_file(const char *path, size_t *length);
/* Prints a failure and counts it. */
void check_fail(const char *fmt, ...)
#ifdef __GNUC__
    __attribute__((format(printf, 1, 2)))
#endif
    ;
/* The number of failures so far; main returns 1 if any. */
int check_failures(void);
/* A model read through the library; exits on failure. */
kl_model *check_model(const char *path);
/* An item's name as the tool writes it: its name, or "@id". */
void check_link_label(const kl_model *m, int link, char *buf, size_t cap);
void check_joint_label(const kl_model *m, int joint, char *buf, size_t cap);
void check_point_label(const kl_model *m, int point, char *buf, size_t cap);
/* Brings a new solver to `target` (library units) by the library's own
 * continuation from the model's start (its sweep line's start, the other
 * inputs 0), one degree or 1/100 of the scale per step, so that the sketch
 * chooses the assembly mode. Returns a KL status. */
int check_reach(kl_solver *s, const kl_model *m, const double *target);
/* Global position of a joint's attachment on its link b. */
void check_joint_xy(const kl_solver *s, const kl_model *m, int joint,
                    double xy[2]);

/* Splits one CSV line in place into at most `cap` fields (a quoted field
 * unquoted, "" read as a quote) and returns how many it has. */
int check_split_csv(char *line, char **fields, int cap);

#endif
