/*
 * suite.h - running a Check suite, as every test program's main does.
 */
#ifndef KINLOOP_TEST_SUITE_H
#define KINLOOP_TEST_SUITE_H

#include <check.h>

/* Runs every test of `suite` (and frees it): the process's exit status, 0
 * when all passed. */
int run_suite(Suite *suite);

#endif
