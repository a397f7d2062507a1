/*
 * machine.c - the report of what served the run: date, kinloop's version,
 * the CPU, and the LAPACK, BLAS and GSL libraries mapped into the process.
 */
#define _GNU_SOURCE /* dladdr, sched_getaffinity */

#include <dlfcn.h>
#include <limits.h>
#include <sched.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "bench.h"

/* Libraries the report names when they are mapped: kinloop, LAPACK and its
 * C interface, the BLAS implementations Debian offers, GSL and its BLAS. */
static const char *const watched[] = {
    "libkinloop", "liblapack", "libblas", "libopenblas", "libcblas",
    "libatlas",   "libblis",   "libmkl",  "libgsl",      "libgfortran"};

static int is_watched(const char *path) {
  const char *base = strrchr(path, '/');
  size_t i;
  base = base != NULL ? base + 1 : path;
  for (i = 0; i < sizeof watched / sizeof watched[0]; i++)
    if (strncmp(base, watched[i], strlen(watched[i])) == 0)
      return 1;
  return 0;
}

static void mapped_libraries(FILE *out) {
  char line[4096], seen[32][512];
  int nseen = 0, i;
  FILE *maps = fopen("/proc/self/maps", "r");
  if (maps == NULL) {
    fprintf(out, "  (cannot read /proc/self/maps)\n");
    return;
  }
  while (fgets(line, sizeof line, maps) != NULL) {
    char *path = strchr(line, '/');
    int known = 0;
    if (path == NULL)
      continue;
    path[strcspn(path, "\n")] = '\0';
    if (!is_watched(path))
      continue;
    for (i = 0; i < nseen; i++)
      known |= strcmp(seen[i], path) == 0;
    if (known || nseen == 32)
      continue;
    snprintf(seen[nseen++], sizeof seen[0], "%s", path);
    fprintf(out, "  %s\n", path);
  }
  fclose(maps);
}

/* The file of the library that defines `symbol` first in the global lookup
 * order, which is where the dynamic linker binds every library's calls to
 * it; symbolic links (Debian's alternatives) resolved. */
static const char *defined_in(void *self, const char *symbol, char *file) {
  Dl_info info;
  void *at = dlsym(self, symbol);
  if (at == NULL || dladdr(at, &info) == 0 || info.dli_fname == NULL)
    return "(not found)";
  if (realpath(info.dli_fname, file) == NULL)
    return info.dli_fname;
  return file;
}

/* A function of a library found at run time (object to function pointer by
 * copying, as ISO C has no cast between them). */
static void *function_bits(void *self, const char *symbol, void *fn,
                           size_t size) {
  void *at = dlsym(self, symbol);
  if (at != NULL)
    memcpy(fn, &at, size);
  return at;
}

/* OpenBLAS would split a large dgetrf over the cores; the figures here are
 * process CPU time of one solver per thread, so it is kept to one thread. */
static void openblas_report(FILE *out, void *self) {
  char *(*config)(void) = NULL, *(*core)(void) = NULL;
  int (*get_threads)(void) = NULL;
  void (*set_threads)(int) = NULL;
  if (function_bits(self, "openblas_get_config", &config, sizeof config) ==
      NULL) {
    fprintf(out, "OpenBLAS: not loaded\n");
    return;
  }
  function_bits(self, "openblas_get_num_threads", &get_threads,
                sizeof get_threads);
  function_bits(self, "openblas_set_num_threads", &set_threads,
                sizeof set_threads);
  function_bits(self, "openblas_get_corename", &core, sizeof core);
  fprintf(out, "OpenBLAS: %s; kernels for core: %s\n", config(),
          core != NULL ? core() : "(not reported)");
  if (get_threads != NULL && set_threads != NULL) {
    int before = get_threads();
    set_threads(1);
    fprintf(out,
            "OpenBLAS threads: %d (was %d; set to 1 by the benchmark so "
            "that LAPACK runs in the calling thread)\n",
            get_threads(), before);
  }
}

static void cpu_report(FILE *out) {
  char line[512], model[256] = "(unknown)";
  int processors = 0;
  cpu_set_t usable;
  FILE *info = fopen("/proc/cpuinfo", "r");
  if (info != NULL) {
    while (fgets(line, sizeof line, info) != NULL) {
      char *colon = strchr(line, ':');
      if (strncmp(line, "processor", 9) == 0)
        processors++;
      if (strncmp(line, "model name", 10) == 0 && colon != NULL &&
          processors == 1) {
        snprintf(model, sizeof model, "%s", colon + 2);
        model[strcspn(model, "\n")] = '\0';
      }
    }
    fclose(info);
  }
  CPU_ZERO(&usable);
  sched_getaffinity(0, sizeof usable, &usable);
  fprintf(out, "CPU: %s; %d processors, nproc %d\n", model, processors,
          CPU_COUNT(&usable));
}

void machine_load(FILE *out, const char *when) {
  char line[256];
  FILE *load = fopen("/proc/loadavg", "r");
  if (load == NULL)
    return;
  if (fgets(line, sizeof line, load) != NULL) {
    line[strcspn(line, "\n")] = '\0';
    fprintf(out, "load average %s (1, 5, 15 min; runnable/all tasks): %s\n",
            when, line);
  }
  fclose(load);
}

void machine_report(FILE *out, const bench_plan *plan) {
  static const char *const lapack[] = {"dgetrf_", "dgbtrf_"};
  static const char *const blas[] = {"dgemm_", "dtrsm_"};
  static const char *const gsl_blas[] = {"cblas_dgemv", "cblas_dger",
                                         "cblas_dtrsv", "cblas_dnrm2"};
  char date[64], file[PATH_MAX];
  time_t now = time(NULL);
  struct tm utc;
  void *self = dlopen(NULL, RTLD_LAZY);
  size_t i;
  gmtime_r(&now, &utc);
  strftime(date, sizeof date, "%Y-%m-%d %H:%M:%S UTC", &utc);
  fprintf(out, "kinloop-bench: kinloop %s (header %s), %s\n", kl_version(),
          KINLOOP_VERSION, date);
  cpu_report(out);
  machine_load(out, "at start");
#if defined(__VERSION__)
  fprintf(out, "benchmark compiled by %s%s\n", __VERSION__,
#if defined(__OPTIMIZE__)
          ", optimized"
#else
          ", NOT optimized"
#endif
  );
#endif
  fprintf(out, "libraries mapped into the process:\n");
  mapped_libraries(out);
  fprintf(out, "symbols bound (first definition in the global lookup "
               "order):\n");
  for (i = 0; i < sizeof lapack / sizeof lapack[0]; i++)
    fprintf(out, "  %-12s (kinloop's LAPACK kernels) -> %s\n", lapack[i],
            defined_in(self, lapack[i], file));
  for (i = 0; i < sizeof blas / sizeof blas[0]; i++)
    fprintf(out, "  %-12s (Fortran BLAS interface)   -> %s\n", blas[i],
            defined_in(self, blas[i], file));
  for (i = 0; i < sizeof gsl_blas / sizeof gsl_blas[0]; i++)
    fprintf(out, "  %-12s (GSL's linear algebra)     -> %s\n", gsl_blas[i],
            defined_in(self, gsl_blas[i], file));
  openblas_report(out, self);
  if (plan->quick)
    fprintf(out, "timing: QUICK MODE, one call per method, figures are not "
                 "for reporting\n");
  else
    fprintf(out,
            "timing: %d interleaved rounds, one sample of at least "
            "%.0f ms per method and round; medians, and ratios as "
            "medians of per-round ratios; single-threaded figures on "
            "CLOCK_PROCESS_CPUTIME_ID, the thread figures on "
            "CLOCK_MONOTONIC\n",
            plan->samples, 1e3 * plan->sample_seconds);
  if (self != NULL)
    dlclose(self);
}
