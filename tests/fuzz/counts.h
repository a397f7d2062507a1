/*
 * counts.h - what the fuzz targets of study texts pass over: an input
 * whose counts would make a long run (no error, merely slow).
 */
#ifndef KINLOOP_FUZZ_COUNTS_H
#define KINLOOP_FUZZ_COUNTS_H

#include <stddef.h>

/* Whether `word` in the text is followed by a number above `cap` (or by
 * one no double compares with, such as NaN). */
int kli_fuzz_count_above(const char *text, size_t size, const char *word,
                         double cap);

#endif
