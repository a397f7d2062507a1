/*
 * replay.c - runs a fuzz target over files, without the fuzzing engine: the
 * seed corpus and every crash found so far become ordinary tests.
 */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int main(int argc, char **argv) {
  int i;
  for (i = 1; i < argc; i++) {
    FILE *f = fopen(argv[i], "rb");
    uint8_t *buf;
    long n;
    if (f == NULL) {
      fprintf(stderr, "replay: cannot open %s\n", argv[i]);
      return 2;
    }
    fseek(f, 0, SEEK_END);
    n = ftell(f);
    fseek(f, 0, SEEK_SET);
    buf = malloc((size_t)n + 1);
    if (buf == NULL || fread(buf, 1, (size_t)n, f) != (size_t)n) {
      fprintf(stderr, "replay: cannot read %s\n", argv[i]);
      return 2;
    }
    fclose(f);
    LLVMFuzzerTestOneInput(buf, (size_t)n);
    free(buf);
  }
  printf("replay: %d inputs, no failure\n", argc - 1);
  return 0;
}
