/*
 * study_mpi.c - kinloop-study-mpi: a design study over MPI processes, each
 * running one contiguous block of samples; rank 0 gathers them all and
 * prints the summary that `kinloop study` prints.
 */
#include <errno.h>
#include <limits.h>
#include <mpi.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "study_report.h"

#define PROGRAM "kinloop-study-mpi"

static const char usage[] =
    "usage: mpirun [-np P] " PROGRAM " STUDY [--threads N]\n"
    "\n"
    "Runs the design study STUDY (docs/studies.md) over the P processes of an\n"
    "MPI job: each runs one contiguous block of the samples on N threads, and\n"
    "rank 0 gathers every sample's values and prints the summary that\n"
    "`kinloop study STUDY` prints, byte for byte, but for the line that\n"
    "starts with 'throughput'.\n"
    "\n"
    "options:\n"
    "  --threads N       threads per process, 1 to 64, or 0 for every core\n"
    "                    (default 1)\n"
    "  -h, --help        this text\n"
    "\n"
    "exit status: 0 success, 1 out of memory, 2 usage error, 3 study error\n"
    "(unreadable, not in the format, bad model), 4 the study's nominal does\n"
    "not solve, 5 the summary cannot be written.\n";

typedef struct {
  const char *path;
  int threads;
  int help;
} options;

/* Every rank parses the same arguments and so decides alike; rank 0 says
 * why. Returns an exit code. */
static int parse(int argc, char **argv, int rank, options *o) {
  int i;
  o->path = NULL;
  o->threads = 1;
  o->help = 0;
  for (i = 1; i < argc; i++) {
    const char *arg = argv[i], *value = NULL;
    if (strcmp(arg, "-h") == 0 || strcmp(arg, "--help") == 0) {
      o->help = 1;
      return CLI_EXIT_OK;
    }
    if (strcmp(arg, "--threads") == 0 && i + 1 < argc)
      value = argv[++i];
    else if (strncmp(arg, "--threads=", 10) == 0)
      value = arg + 10;
    if (value != NULL) {
      char *end;
      long v;
      errno = 0;
      v = strtol(value, &end, 10);
      if (end == value || *end != '\0' || errno == ERANGE || v < 0 ||
          v > 64) {
        if (rank == 0)
          fprintf(stderr, "%s: --threads wants a whole number from 0 to 64, "
                          "not '%s'\n",
                  PROGRAM, value);
        return CLI_EXIT_USAGE;
      }
      o->threads = study_threads((int)v);
      continue;
    }
    if (arg[0] == '-' || o->path != NULL) {
      if (rank == 0)
        fprintf(stderr, "%s: %s '%s'\n(%s --help lists the options)\n",
                PROGRAM,
                arg[0] == '-' ? "unknown option, or one without its value,"
                              : "one study file at a time; one too many:",
                arg, PROGRAM);
      return CLI_EXIT_USAGE;
    }
    o->path = arg;
  }
  if (o->path == NULL) {
    if (rank == 0)
      fprintf(stderr, "%s: which study? (%s --help)\n", PROGRAM, PROGRAM);
    return CLI_EXIT_USAGE;
  }
  return CLI_EXIT_OK;
}

/* Every rank's own exit code, made one: rank 0's if it failed, else the
 * worst of the others. */
static int agree(int code) {
  int root = code, any = code;
  MPI_Bcast(&root, 1, MPI_INT, 0, MPI_COMM_WORLD);
  MPI_Allreduce(&code, &any, 1, MPI_INT, MPI_MAX, MPI_COMM_WORLD);
  return root != CLI_EXIT_OK ? root : any;
}

/* Runs this rank's block and gathers every block at rank 0, which prints
 * the report. Returns an exit code, the same on every rank. */
static int run(const kl_study *st, const options *o, int rank, int size) {
  long n = kl_study_sample_count(st), base = n / size, extra = n % size;
  long first = rank * base + (rank < extra ? rank : extra);
  long count = base + (rank < extra ? 1 : 0);
  int nout = kl_study_output_count(st), r, code = CLI_EXIT_OK;
  int *value_counts = NULL, *value_offsets = NULL, *status_counts = NULL,
      *status_offsets = NULL, *status = NULL, *all_status = NULL;
  double *values = NULL, *all_values = NULL, start, seconds;
  if ((double)n * nout > (double)INT_MAX) {
    if (rank == 0)
      fprintf(stderr, "%s: %s: %ld samples of %d outputs are more values "
                      "than one MPI gather takes\n",
              PROGRAM, o->path, n, nout);
    return CLI_EXIT_MEMORY;
  }
  values = malloc((size_t)(count > 0 ? count : 1) * (size_t)nout *
                  sizeof *values);
  status = malloc((size_t)(count > 0 ? count : 1) * sizeof *status);
  if (rank == 0) {
    all_values = malloc((size_t)(n > 0 ? n : 1) * (size_t)nout *
                        sizeof *all_values);
    all_status = malloc((size_t)(n > 0 ? n : 1) * sizeof *all_status);
    value_counts = malloc((size_t)size * sizeof *value_counts);
    value_offsets = malloc((size_t)size * sizeof *value_offsets);
    status_counts = malloc((size_t)size * sizeof *status_counts);
    status_offsets = malloc((size_t)size * sizeof *status_offsets);
    if (all_values == NULL || all_status == NULL || value_counts == NULL ||
        value_offsets == NULL || status_counts == NULL ||
        status_offsets == NULL)
      code = CLI_EXIT_MEMORY;
    else
      for (r = 0; r < size; r++) {
        long r_first = r * base + (r < extra ? r : extra);
        long r_count = base + (r < extra ? 1 : 0);
        status_counts[r] = (int)r_count;
        status_offsets[r] = (int)r_first;
        value_counts[r] = (int)(r_count * nout);
        value_offsets[r] = (int)(r_first * nout);
      }
  }
  if (values == NULL || status == NULL)
    code = CLI_EXIT_MEMORY;
  if ((code = agree(code)) != CLI_EXIT_OK) {
    if (rank == 0)
      fprintf(stderr, "%s: out of memory for %ld samples\n", PROGRAM, n);
    goto done;
  }
  MPI_Barrier(MPI_COMM_WORLD);
  start = MPI_Wtime();
  if (kl_study_run(st, first, count, o->threads, values, status, NULL) !=
      KL_OK)
    code = CLI_EXIT_MEMORY;
  if ((code = agree(code)) != CLI_EXIT_OK) {
    if (rank == 0)
      fprintf(stderr, "%s: out of memory running the samples\n", PROGRAM);
    goto done;
  }
  MPI_Gatherv(values, (int)(count * nout), MPI_DOUBLE, all_values,
              value_counts, value_offsets, MPI_DOUBLE, 0, MPI_COMM_WORLD);
  MPI_Gatherv(status, (int)count, MPI_INT, all_status, status_counts,
              status_offsets, MPI_INT, 0, MPI_COMM_WORLD);
  seconds = MPI_Wtime() - start;
  if (rank == 0) {
    if (study_report_print(stdout, st, o->path, all_values, all_status, n) !=
        KL_OK) {
      fprintf(stderr, "%s: out of memory summarizing the samples\n", PROGRAM);
      code = CLI_EXIT_MEMORY;
    } else {
      study_report_throughput(stdout, n, seconds, size, o->threads);
    }
    if (fflush(stdout) != 0)
      code = CLI_EXIT_OUTPUT;
  }
  code = agree(code);
done:
  free(values);
  free(status);
  free(all_values);
  free(all_status);
  free(value_counts);
  free(value_offsets);
  free(status_counts);
  free(status_offsets);
  return code;
}

int main(int argc, char **argv) {
  int rank, size, provided, code;
  options o;
  kl_study *st = NULL;
  kl_io_error err;
  /* the library's threads never call MPI; only this one does */
  MPI_Init_thread(&argc, &argv, MPI_THREAD_FUNNELED, &provided);
  MPI_Comm_rank(MPI_COMM_WORLD, &rank);
  MPI_Comm_size(MPI_COMM_WORLD, &size);
  code = parse(argc, argv, rank, &o);
  if (code == CLI_EXIT_OK && o.help) {
    if (rank == 0)
      fputs(usage, stdout);
    MPI_Finalize();
    return CLI_EXIT_OK;
  }
  if (code == CLI_EXIT_OK) {
    int own, root, status = KL_OK;
    err.size = sizeof err;
    st = kl_study_read_file(o.path, &err);
    if (st != NULL)
      status = kl_study_prepare(st); /* every rank's runs need the nominal */
    own = root = st == NULL        ? study_read_exit_code(&err)
                 : status != KL_OK ? study_exit_code(status)
                                   : CLI_EXIT_OK;
    MPI_Bcast(&root, 1, MPI_INT, 0, MPI_COMM_WORLD);
    /* one message: rank 0's, or those of ranks that failed where it did
     * not */
    if (own != CLI_EXIT_OK && (rank == 0 || root == CLI_EXIT_OK)) {
      if (st == NULL)
        study_read_failed(PROGRAM, o.path, &err);
      else
        study_prepare_failed(PROGRAM, o.path, st, status);
    }
    code = agree(own);
  }
  if (code == CLI_EXIT_OK)
    code = run(st, &o, rank, size);
  kl_study_free(st);
  MPI_Finalize();
  return code;
}
