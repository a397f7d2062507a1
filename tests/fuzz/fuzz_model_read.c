/*
 * fuzz_model_read.c - fuzz target for the model-file reader: any bytes give
 * a model or a located error; a model read is written and read back, and
 * must give the same text.
 */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "kinloop.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
  kl_io_error err;
  kl_model *m, *again;
  size_t n, n2;
  char *text, *text2;
  err.size = sizeof err;
  m = kl_model_read((const char *)data, size, &err);
  if (m == NULL) {
    if (err.status >= 0 || err.message[0] == '\0')
      abort(); /* a failure always says why */
    return 0;
  }
  kl_model_write(m, NULL, 0, &n);
  text = malloc(n + 1);
  if (text == NULL || kl_model_write(m, text, n + 1, NULL) != KL_OK)
    abort();
  again = kl_model_read(text, n, &err);
  if (again == NULL)
    abort(); /* what the writer writes, the reader reads */
  kl_model_write(again, NULL, 0, &n2);
  text2 = malloc(n2 + 1);
  if (text2 == NULL || kl_model_write(again, text2, n2 + 1, NULL) != KL_OK ||
      n2 != n || memcmp(text, text2, n) != 0)
    abort(); /* and the text is canonical */
  free(text);
  free(text2);
  kl_model_free(again);
  kl_model_free(m);
  return 0;
}
