/*
 * reader.c - kinloop-bench part 8: the model reader's time per item from
 * 1,000 items to 900,000, as a ratio to its time per item at 1,000 (flat when
 * reading and finalizing are linear).
 *
 * The model: n unnamed links, each joined to ground by a revolute joint at
 * the origin that refers to it by @id, and an input on each joint by @id
 * (3 items per link): short statements, so that a million items fit the
 * 16 MiB a model text may have. Name lookups (a hash probe each, like the
 * ids' checks) are timed by test_model's names_found_among_many.
 */
#define _POSIX_C_SOURCE 200809L /* clock_gettime */

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "bench.h"

/* The text of a model of `links` links (3 items each); *length its bytes. */
static char *star_model(long links, size_t *length) {
  size_t cap = 64 + (size_t)links * 64, n = 0;
  char *text = bench_calloc(cap, 1);
  long k;
  n += (size_t)snprintf(text + n, cap - n, "kinloop-model 1\n");
  for (k = 1; k <= links; k++)
    n += (size_t)snprintf(text + n, cap - n, "link -\n");
  for (k = 1; k <= links; k++)
    n += (size_t)snprintf(text + n, cap - n, "revolute - @0 0 0 @%ld 0 0\n", k);
  for (k = 0; k < links; k++)
    n += (size_t)snprintf(text + n, cap - n, "input @%ld\n", k);
  *length = n;
  return text;
}

/* Seconds per read: reads repeated to fill at least `least` seconds. */
static double read_seconds(const char *text, size_t length, double least) {
  double begin = bench_clock(CLOCK_MONOTONIC), took;
  int reads = 0;
  do {
    kl_io_error err;
    kl_model *m;
    err.size = sizeof err;
    m = kl_model_read(text, length, &err);
    if (m == NULL) {
      fprintf(stderr, "kinloop-bench: the reader's model: %s\n", err.message);
      exit(EXIT_FAILURE);
    }
    kl_model_free(m);
    reads++;
    took = bench_clock(CLOCK_MONOTONIC) - begin;
  } while (took < least);
  return took / reads;
}

void bench_reader(FILE *out, const bench_plan *plan, reader_figures *fig) {
  /* 1,000,000 items of this shape take 16.0005 MiB, just over the limit */
  static const long items[] = {1000, 10000, 100000, 900000};
  double first = 0.0;
  size_t i;
  fprintf(out, "\n== model reader: time per item (link, joint, input) ==\n");
  fprintf(out, "%10s %10s %12s %14s %10s\n", "items", "MiB", "read (ms)",
          "per item (us)", "x 1000's");
  for (i = 0; i < sizeof items / sizeof *items; i++) {
    size_t length;
    char *text = star_model(items[i] / 3, &length);
    double t = read_seconds(text, length, plan->quick ? 0.0 : 0.2);
    double per = t / (double)(items[i] / 3 * 3);
    if (i == 0)
      first = per;
    fprintf(out, "%10ld %10.2f %12.2f %14.3f %10.2f\n", items[i] / 3 * 3,
            (double)length / (1 << 20), 1e3 * t, 1e6 * per, per / first);
    fig->ratio_largest = per / first;
    free(text);
  }
}
