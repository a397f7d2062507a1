/*
 * counts.c - the fuzz targets' test for counts that would make a long run.
 */
#include <stdlib.h>
#include <string.h>

#include "counts.h"

int kli_fuzz_count_above(const char *text, size_t size, const char *word,
                         double cap) {
  size_t w = strlen(word), i;
  for (i = 0; i + w < size; i++) {
    char digits[32];
    size_t k = i + w, d = 0;
    if (memcmp(text + i, word, w) != 0)
      continue;
    while (k < size && (text[k] == ' ' || text[k] == '\t'))
      k++;
    while (k < size && d + 1 < sizeof digits &&
           strchr("0123456789.eE+-", text[k]) != NULL)
      digits[d++] = text[k++];
    digits[d] = '\0';
    if (d > 0 && !(strtod(digits, NULL) <= cap))
      return 1;
  }
  return 0;
}
