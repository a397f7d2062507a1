/*
 * study.h - private: a design study as the reader records it
 * (study_read.c) and the engine runs it (study.c).
 */
#ifndef KINLOOP_STUDY_H
#define KINLOOP_STUDY_H

#include "outputs.h"

enum { KLI_VARY_NORMAL, KLI_VARY_UNIFORM, KLI_VARY_GRID };

/* One dimension that varies. */
typedef struct {
  kl_dimension dim;
  kli_dim where;     /* what it moves */
  int how;           /* KLI_VARY_* */
  double tolerance;  /* normal: three standard deviations; uniform: the
                        half-width of the interval */
  double from, to;   /* grid values: steps + 1 of them from `from` to `to` */
  int steps;
  double nominal;    /* the model's own value */
  int line;          /* of the study file, to name it in messages */
  char name[96];
} kli_vary;

enum {
  KLI_JUDGE_SWING,   /* max - min of an output over the sweep */
  KLI_JUDGE_MIN,
  KLI_JUDGE_MAX,
  KLI_JUDGE_AT,      /* an output at one value of the swept input */
  KLI_JUDGE_REACH,   /* how far the swept input gets (its limit, or the end) */
  KLI_JUDGE_EFFORT   /* the largest input effort against the loads */
};

/* One output judged. Values are in the file's units: to_file converts the
 * API's (radians to degrees where the model's angles are degrees). */
typedef struct {
  char name[64];
  int how;           /* KLI_JUDGE_* */
  kl_output what;
  double at;         /* KLI_JUDGE_AT: the input value, API units */
  double to_file;
  int has_limits;
  int limit_line;    /* of its 'limit' statement (0: none yet) */
  double lower, upper;
} kli_judge;

struct kl_study {
  const kl_model *model;  /* held (kli_model_retain) until kl_study_free */
  char *model_path;       /* the text's 'model' statement; NULL if none */
  kl_solver *nominal;     /* prepared: solved at the start of the sweep */
  int prepared;           /* kl_study_prepare succeeded */
  kl_sweep_settings sweep;
  unsigned long long seed;
  long samples;
  int grid;               /* the dimensions are a grid, not tolerances */
  kli_vary *vary;
  int nvary, cap_vary;
  kli_judge *judge;
  int njudge, cap_judge;
  kl_load *loads;
  int nloads, cap_loads;
  double *nominal_values; /* prepared: njudge of them */
  double *first_order_std;
  char error[KLI_MESSAGE_SIZE];
};

/* A new empty study of the finalized model m, holding m; every later
 * allocation of the study goes through m's allocator. NULL when memory
 * runs out. */
kl_study *kli_study_new(const kl_model *m);
/* Once the reader has recorded the study: checks the judged outputs and
 * the varied dimensions against the model, takes the dimensions' nominal
 * values and names, and turns the file's input values into API units.
 * KL_OK, or a status with buf saying why. Solves nothing. */
int kli_study_resolve(kl_study *st, char *buf);
/* The steps of a continuation from the sweep's start to input u (API
 * units) in steps no longer than the sweep's, as a double: at least 1,
 * and NaN or beyond any int for a u far outside the sweep. */
double kli_study_steps_to(const kl_study *st, double u);

/* The study reader's first pass, for the file module: the path of the
 * text's 'model' statement (into path, cap bytes; a path has at most 255)
 * and its line and column, reading the statements before it as
 * kl_study_read does. KL_OK, or a status with err set as kl_study_read
 * sets it. */
int kli_study_find_model(const char *text, size_t length, char *path,
                         size_t cap, int *line, int *column,
                         kl_io_error *err);

#endif
