/*
 * fuzz_study_read.c - fuzz target for the study-file reader: any bytes,
 * read against one fixed model (the examples' flap-tucker.kinloop, which
 * the seed corpus names), give a study or a located error; a study read
 * answers every query about itself, and one that prepares runs its first
 * samples and summarizes them (one that does not says why, and refuses to
 * run).
 *
 * The reader opens no file, so every byte of the input reaches it. Inputs
 * with a step or sample count above KLI_FUZZ_MAX_COUNT are passed over:
 * what they do is no error, merely a long run.
 */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "counts.h"
#include "kinloop.h"

#define KLI_FUZZ_MAX_COUNT 2000
#define KLI_FUZZ_SAMPLES 2

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

/* The model every input is read against, read once and kept for the
 * process. */
static const kl_model *fixed_model(void) {
  static kl_model *m;
  if (m == NULL) {
    kl_io_error err;
    err.size = sizeof err;
    m = kl_model_read_file(KINLOOP_MODEL_DIR "/flap-tucker.kinloop", &err);
    if (m == NULL)
      abort(); /* the examples' model is missing or broken */
  }
  return m;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
  const char *text = (const char *)data;
  double values[KLI_FUZZ_SAMPLES * 64], dims[KLI_FUZZ_SAMPLES * 64];
  int status[KLI_FUZZ_SAMPLES];
  kl_study_summary summary;
  kl_io_error err;
  kl_study *st;
  long n;
  int k, outputs, dimensions, prepared;
  if (kli_fuzz_count_above(text, size, "steps", KLI_FUZZ_MAX_COUNT) ||
      kli_fuzz_count_above(text, size, "samples", KLI_FUZZ_MAX_COUNT))
    return 0;
  err.size = sizeof err;
  st = kl_study_read(text, size, fixed_model(), &err);
  if (st == NULL) {
    if (err.status >= 0 || err.message[0] == '\0')
      abort(); /* a failure always says why */
    return 0;
  }
  outputs = kl_study_output_count(st);
  dimensions = kl_study_dimension_count(st);
  if (outputs < 1 || dimensions < 0 || kl_study_model(st) != fixed_model())
    abort();
  if (kl_study_model_path(st) != NULL && kl_study_model_path(st)[0] == '\0')
    abort(); /* a 'model' statement always has a path */
  for (k = 0; k < outputs; k++)
    if (kl_study_output_name(st, k) == NULL)
      abort();
  for (k = 0; k < dimensions; k++)
    if (kl_study_dimension_name(st, k) == NULL)
      abort();
  n = kl_study_sample_count(st);
  n = n < KLI_FUZZ_SAMPLES ? n : KLI_FUZZ_SAMPLES;
  prepared = kl_study_prepare(st);
  if (prepared != KL_OK && (prepared >= 0 || kl_study_error(st)[0] == '\0'))
    abort(); /* a failure always says why */
  if (prepared != KL_OK) {
    if (kl_study_run(st, 0, n, 1, values, status, dims) != KL_ESTAGE)
      abort(); /* no run before the nominal is prepared */
  } else if (outputs <= 64 && dimensions <= 64) {
    /* (the cap on the buffers: a study with more columns is only read) */
    if (kl_study_run(st, 0, n, 1, values, status, dims) != KL_OK)
      abort(); /* a study that prepares, runs */
    summary.size = sizeof summary;
    for (k = 0; k < outputs; k++)
      if (kl_study_summarize(st, k, values, status, n, &summary) != KL_OK)
        abort();
  }
  kl_study_free(st);
  return 0;
}
