/*
 * fuzz_study_run.c - fuzz target for running studies: a model text, a
 * study text and a range of samples, all from the input, read, prepared
 * and run. Whatever the texts say, and whatever the range (negative, near
 * LONG_MAX, past the samples), kl_study_run runs exactly the samples that
 * exist or refuses with KL_EINVAL and writes nothing; a run's statuses are
 * sample statuses and its values numbers or NaN.
 *
 * Input: 16 bytes, the first sample and the count (two little-endian
 * 64-bit integers, taken modulo a long), then the model text, a line
 * "%%study", and the study text (read against the model; its 'model'
 * statement opens nothing). Inputs whose steps, samples or 'at' values
 * exceed KLI_FUZZ_MAX_COUNT are passed over: a long run is no error.
 */
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "counts.h"
#include "kinloop.h"

#define KLI_FUZZ_MAX_COUNT 2000
#define KLI_FUZZ_SAMPLES 3
#define KLI_FUZZ_COLUMNS 16
#define KLI_FUZZ_SEPARATOR "\n%%study\n"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static long long_at(const uint8_t *p) {
  uint64_t v = 0;
  int k;
  for (k = 7; k >= 0; k--)
    v = v << 8 | p[k];
  return (long)(int64_t)v;
}

/* Whether samples first .. first + count - 1 of n exist (no overflow). */
static int range_exists(long first, long count, long n) {
  return first >= 0 && count >= 0 && first <= n && count <= n - first;
}

static void run_range(const kl_study *st, long first, long count) {
  double values[KLI_FUZZ_SAMPLES * KLI_FUZZ_COLUMNS];
  double dims[KLI_FUZZ_SAMPLES * KLI_FUZZ_COLUMNS];
  int status[KLI_FUZZ_SAMPLES], k, got;
  long n = kl_study_sample_count(st);
  int outputs = kl_study_output_count(st);
  int dimensions = kl_study_dimension_count(st);
  if (outputs > KLI_FUZZ_COLUMNS || dimensions > KLI_FUZZ_COLUMNS)
    return; /* wider than the buffers: only read */
  for (k = 0; k < KLI_FUZZ_SAMPLES; k++)
    status[k] = -99;
  if (!range_exists(first, count, n)) {
    if (kl_study_run(st, first, count, 1, values, status, dims) != KL_EINVAL)
      abort(); /* a range that does not exist is refused */
    for (k = 0; k < KLI_FUZZ_SAMPLES; k++)
      if (status[k] != -99)
        abort(); /* ... and nothing is written */
    return;
  }
  if (count > KLI_FUZZ_SAMPLES)
    count = KLI_FUZZ_SAMPLES;
  got = kl_study_run(st, first, count, 2, values, status, dims);
  if (got != KL_OK && got != KL_ENOMEM)
    abort(); /* a prepared study runs any range of its samples */
  for (k = 0; got == KL_OK && k < count; k++)
    if (status[k] != KL_SAMPLE_OK && status[k] != KL_SAMPLE_NO_ASSEMBLY &&
        status[k] != KL_SAMPLE_LIMITED)
      abort();
  for (k = 0; got == KL_OK && k < count * outputs; k++)
    if (isinf(values[k]))
      abort(); /* an output is a number, or NaN where not reached */
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
  const char *text, *split;
  size_t length, model_length;
  long first, count;
  kl_io_error err;
  kl_model *m;
  kl_study *st;
  if (size < 16)
    return 0;
  first = long_at(data);
  count = long_at(data + 8);
  text = (const char *)data + 16;
  length = size - 16;
  split = NULL;
  {
    size_t w = strlen(KLI_FUZZ_SEPARATOR), i;
    for (i = 0; split == NULL && i + w <= length; i++)
      if (memcmp(text + i, KLI_FUZZ_SEPARATOR, w) == 0)
        split = text + i;
  }
  if (split == NULL ||
      kli_fuzz_count_above(text, length, "steps", KLI_FUZZ_MAX_COUNT) ||
      kli_fuzz_count_above(text, length, "samples", KLI_FUZZ_MAX_COUNT) ||
      kli_fuzz_count_above(text, length, " at", KLI_FUZZ_MAX_COUNT))
    return 0;
  model_length = (size_t)(split - text);
  err.size = sizeof err;
  m = kl_model_read(text, model_length, &err);
  if (m == NULL) {
    if (err.status >= 0 || err.message[0] == '\0')
      abort(); /* a failure always says why */
    return 0;
  }
  split += strlen(KLI_FUZZ_SEPARATOR);
  st = kl_study_read(split, length - (size_t)(split - text), m, &err);
  kl_model_free(m); /* the study holds its own reference */
  if (st == NULL) {
    if (err.status >= 0 || err.message[0] == '\0')
      abort();
    return 0;
  }
  if (kl_study_prepare(st) == KL_OK)
    run_range(st, first, count);
  else if (kl_study_run(st, 0, 0, 1, NULL, NULL, NULL) != KL_ESTAGE)
    abort(); /* no run before the nominal is prepared */
  kl_study_free(st);
  return 0;
}
