/*
 * write.c - the write command: the model in the library's canonical
 * model-file text.
 */
#include <stdlib.h>

#include "cli.h"

int cli_cmd_write(const cli_model *cm, const cli_options *o) {
  size_t needed;
  char *text;
  FILE *f;
  kl_model_write(cm->model, NULL, 0, &needed);
  text = malloc(needed + 1);
  if (text == NULL) {
    cli_error("out of memory writing the model");
    return CLI_EXIT_MEMORY;
  }
  if (kl_model_write(cm->model, text, needed + 1, NULL) != KL_OK) {
    cli_error("the library could not write the model");
    free(text);
    return CLI_EXIT_MEMORY;
  }
  f = cli_open_output(o->output);
  if (f == NULL) {
    free(text);
    return CLI_EXIT_OUTPUT;
  }
  fwrite(text, 1, needed, f);
  free(text);
  return cli_close_output(f, o->output);
}
