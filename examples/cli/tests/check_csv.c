/*
 * check_csv.c - checks a sweep written by `kinloop sweep`: the header names
 * every quantity with its unit, there is one row per step, the values agree
 * with the library's own sweep at several rows (rates scaled by the input
 * speed, accelerations by its square), and, on a fine sweep, the rates and
 * accelerations agree with central differences of the columns before them.
 *
 * usage: check_csv MODEL CSV STEPS SPEED DIGITS SITES [fd]
 *   STEPS   steps of the sweep, over the model's own sweep range
 *   SPEED   the --speed given to the tool (1 if none)
 *   DIGITS  17 (--all-digits) or 6
 *   SITES   the transmission angles expected, "joint:line_a:line_b,...",
 *           lines to revolute joints; "-" for none
 *   fd      also run the central-difference checks
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "check_support.h"

#define MAX_COLS 2048
#define MAX_SITES 32

typedef struct {
  int joint, line_a, line_b;
} site;

typedef struct {
  const kl_model *m;
  int nsites, cols, steps;
  const site *sites;
  double speed_rad; /* the input speed in library units per second */
  double angle_k;   /* model angle unit per radian */
  double input_k;   /* input unit per library unit */
  int *wanted;      /* steps to keep */
  int nwanted;
  double *rows; /* nwanted rows of expected CSV values */
  double *state; /* the library's row of a state (kl_solver_row) */
} reference;

static void expect_name(char **fields, int nfields, int *col,
                        const char *name, const char *unit) {
  char want[700];
  snprintf(want, sizeof want, "%s (%s)", name, unit);
  if (*col >= nfields)
    check_fail("header ends before column '%s'", want);
  else if (strcmp(fields[*col], want) != 0)
    check_fail("header column %d is '%s', expected '%s'", *col + 1,
               fields[*col], want);
  (*col)++;
}

/* The transmission angle from joint positions alone: the angle between
 * the lines from the joint to its two neighbours, in [0, pi]. */
static double transmission(const kl_solver *s, const kl_model *m,
                           const site *t) {
  double p[2], a[2], b[2], wa[2], wb[2];
  check_joint_xy(s, m, t->joint, p);
  check_joint_xy(s, m, t->line_a, a);
  check_joint_xy(s, m, t->line_b, b);
  wa[0] = a[0] - p[0];
  wa[1] = a[1] - p[1];
  wb[0] = b[0] - p[0];
  wb[1] = b[1] - p[1];
  return atan2(fabs(wa[0] * wb[1] - wa[1] * wb[0]),
               wa[0] * wb[0] + wa[1] * wb[1]);
}

/* One library step in the CSV's units: a physical rate is the unit-rate
 * coefficient times the input speed, an acceleration times its square
 * (the input runs at constant speed). */
static int keep_step(const kl_solver *s, int step, double input, void *user) {
  reference *r = user;
  const kl_model *m = r->m;
  double w = r->speed_rad, k = r->angle_k, *row;
  int i, c = 0, nl = kl_model_link_count(m), nj = kl_model_joint_count(m),
         np = kl_model_point_count(m);
  for (i = 0; i < r->nwanted && r->wanted[i] != step; i++)
    ;
  if (i == r->nwanted)
    return 0;
  row = r->rows + (size_t)i * (size_t)r->cols;
  row[c++] = input * r->input_k;
  for (i = 1; i < nl; i++) {
    row[c++] = kl_link_angle(s, i) * k;
    row[c++] = kl_link_rate(s, i) * w * k;
    row[c++] = kl_link_accel(s, i) * w * w * k;
  }
  for (i = 0; i < nj; i++)
    if (kl_model_joint_kind(m, i) != KL_JOINT_REVOLUTE) {
      row[c++] = kl_joint_slide(s, i);
      row[c++] = kl_joint_slide_rate(s, i) * w;
      row[c++] = kl_joint_slide_accel(s, i) * w * w;
    }
  for (i = 0; i < np; i++) {
    double p[2], v[2], a[2];
    kl_point_position(s, i, p);
    kl_point_velocity(s, i, v);
    kl_point_acceleration(s, i, a);
    row[c++] = p[0];
    row[c++] = p[1];
    row[c++] = v[0] * w;
    row[c++] = v[1] * w;
    row[c++] = a[0] * w * w;
    row[c++] = a[1] * w * w;
  }
  for (i = 0; i < r->nsites; i++)
    row[c++] = transmission(s, m, &r->sites[i]) * k;
  /* the condition estimate has no getter of its own: the row's */
  kl_solver_row(s, r->state);
  row[c++] = r->state[kl_model_row_offset(m, KL_QUANTITY_RCOND, NULL)];
  return 0;
}

static int parse_sites(const kl_model *m, const char *text, site *sites) {
  char buf[4096], *item;
  int n = 0;
  if (strcmp(text, "-") == 0)
    return 0;
  snprintf(buf, sizeof buf, "%s", text);
  for (item = strtok(buf, ","); item != NULL && n < MAX_SITES;
       item = strtok(NULL, ",")) {
    char *a = strchr(item, ':'), *b = a ? strchr(a + 1, ':') : NULL;
    if (b == NULL) {
      fprintf(stderr, "bad site '%s'\n", item);
      exit(2);
    }
    *a++ = '\0';
    *b++ = '\0';
    sites[n].joint = kl_model_find_joint(m, item);
    sites[n].line_a = kl_model_find_joint(m, a);
    sites[n].line_b = kl_model_find_joint(m, b);
    if (sites[n].joint < 0 || sites[n].line_a < 0 || sites[n].line_b < 0) {
      fprintf(stderr, "unknown joint in site '%s'\n", item);
      exit(2);
    }
    n++;
  }
  return n;
}

/* Rates against central differences of the values before them, in time:
 * with input u (column 0, input units) at speed W, t = u / W. */
static void check_differences(double *data, int nrows, int ncols,
                              const int *value_col, const int *rate_col,
                              int npairs, double speed, char **names) {
  int k, i;
  for (k = 0; k < npairs; k++) {
    int v = value_col[k], r = rate_col[k];
    double largest = 0, worst = 0;
    int worst_at = 0;
    for (i = 0; i < nrows; i++)
      largest = fmax(largest, fabs(data[i * ncols + r]));
    for (i = 1; i + 1 < nrows; i++) {
      double dt = (data[(i + 1) * ncols] - data[(i - 1) * ncols]) / speed;
      double d = (data[(i + 1) * ncols + v] - data[(i - 1) * ncols + v]) / dt;
      double e = fabs(d - data[i * ncols + r]);
      if (e > worst) {
        worst = e;
        worst_at = i;
      }
    }
    /* the central difference errs by h^2/6 times the third derivative:
     * at 0.1 degree steps (h = 1.75e-3 rad), (n h)^2 / 6 < 5.1e-5 of the
     * amplitude of each harmonic n up to the 10th, inside 1e-4 of the
     * rate's largest value */
    if (worst > 1e-4 * largest + 1e-9)
      check_fail("column '%s' differs from the central difference of '%s' "
                 "by %.3g at row %d (largest value %.3g)",
                 names[r], names[v], worst, worst_at + 2, largest);
  }
}

int main(int argc, char **argv) {
  kl_model *m;
  kl_solver *s;
  kl_sweep_settings sw;
  reference ref;
  site sites[MAX_SITES];
  char *text, *line, *next, *header[MAX_COLS], unit_a[16], unit_l[16];
  char name[600], u_rate[40], u_acc[40], l_rate[40], l_acc[40];
  double *data, speed, home[16], tol;
  int steps, digits, nfields, col = 0, nl, nj, np, i, k, nrows = 0, cols;
  int value_col[MAX_COLS], rate_col[MAX_COLS], npairs = 0, fd;
  int wanted[5];
  if (argc < 7) {
    fprintf(stderr, "usage: check_csv MODEL CSV STEPS SPEED DIGITS SITES "
                    "[fd]\n");
    return 2;
  }
  m = check_model(argv[1]);
  text = check_read_file(argv[2], NULL);
  steps = atoi(argv[3]);
  speed = strtod(argv[4], NULL);
  digits = atoi(argv[5]);
  fd = argc > 7 && strcmp(argv[7], "fd") == 0;
  nl = kl_model_link_count(m);
  nj = kl_model_joint_count(m);
  np = kl_model_point_count(m);
  memset(&ref, 0, sizeof ref);
  ref.m = m;
  ref.sites = sites;
  ref.nsites = parse_sites(m, argv[6], sites);
  sw.size = sizeof sw;
  if (kl_model_sweep(m, &sw) != KL_OK) {
    fprintf(stderr, "the model needs a sweep line for this check\n");
    return 2;
  }
  {
    int lu, au;
    kl_model_units(m, &lu, &au);
    snprintf(unit_a, sizeof unit_a, "%s", kl_angle_unit_str(au));
    snprintf(unit_l, sizeof unit_l, "%s",
             lu == KL_LENGTH_UNSTATED ? "len" : kl_length_unit_str(lu));
    ref.angle_k = au == KL_ANGLE_DEG ? 180 / CHECK_PI : 1.0;
  }
  {
    int input_joint = kl_model_input_joint(m, sw.input);
    int turning = kl_model_joint_kind(m, input_joint) == KL_JOINT_REVOLUTE;
    ref.input_k = turning ? ref.angle_k : 1.0;
    /* SPEED is in the input's unit per second */
    ref.speed_rad = speed / ref.input_k;
    check_joint_label(m, input_joint, name, sizeof name);
  }

  /* the header */
  line = text;
  next = strchr(line, '\n');
  if (next == NULL) {
    check_fail("no header line");
    return 1;
  }
  *next = '\0';
  nfields = check_split_csv(line, header, MAX_COLS);
  expect_name(header, nfields, &col, name,
              kl_model_joint_kind(m, kl_model_input_joint(m, sw.input)) == KL_JOINT_REVOLUTE
                  ? unit_a
                  : unit_l);
  snprintf(u_rate, sizeof u_rate, "%s/s", unit_a);
  snprintf(u_acc, sizeof u_acc, "%s/s^2", unit_a);
  snprintf(l_rate, sizeof l_rate, "%s/s", unit_l);
  snprintf(l_acc, sizeof l_acc, "%s/s^2", unit_l);
  for (i = 1; i < nl; i++) {
    char base[400], full[500];
    check_link_label(m, i, base, sizeof base);
    value_col[npairs] = col;
    rate_col[npairs++] = col + 1;
    value_col[npairs] = col + 1;
    rate_col[npairs++] = col + 2;
    snprintf(full, sizeof full, "%s angle", base);
    expect_name(header, nfields, &col, full, unit_a);
    snprintf(full, sizeof full, "%s angle rate", base);
    expect_name(header, nfields, &col, full, u_rate);
    snprintf(full, sizeof full, "%s angle accel", base);
    expect_name(header, nfields, &col, full, u_acc);
  }
  for (i = 0; i < nj; i++) {
    char base[400], full[500];
    if (kl_model_joint_kind(m, i) == KL_JOINT_REVOLUTE)
      continue;
    check_joint_label(m, i, base, sizeof base);
    value_col[npairs] = col;
    rate_col[npairs++] = col + 1;
    value_col[npairs] = col + 1;
    rate_col[npairs++] = col + 2;
    snprintf(full, sizeof full, "%s slide", base);
    expect_name(header, nfields, &col, full, unit_l);
    snprintf(full, sizeof full, "%s slide rate", base);
    expect_name(header, nfields, &col, full, l_rate);
    snprintf(full, sizeof full, "%s slide accel", base);
    expect_name(header, nfields, &col, full, l_acc);
  }
  for (i = 0; i < np; i++) {
    static const char *const what[6] = {"x", "y", "x rate", "y rate",
                                        "x accel", "y accel"};
    char base[400], full[500];
    check_point_label(m, i, base, sizeof base);
    for (k = 0; k < 4; k++) {
      value_col[npairs] = col + k;
      rate_col[npairs++] = col + k + 2;
    }
    for (k = 0; k < 6; k++) {
      snprintf(full, sizeof full, "%s %s", base, what[k]);
      expect_name(header, nfields, &col, full,
                  k < 2 ? unit_l : k < 4 ? l_rate : l_acc);
    }
  }
  for (i = 0; i < ref.nsites; i++) {
    char base[400], full[500];
    check_joint_label(m, sites[i].joint, base, sizeof base);
    snprintf(full, sizeof full, "%s transmission angle", base);
    expect_name(header, nfields, &col, full, unit_a);
  }
  expect_name(header, nfields, &col, "condition estimate", "rcond");
  if (nfields != col)
    check_fail("the header has %d columns, expected %d", nfields, col);
  cols = col;

  /* the rows */
  data = malloc((size_t)(steps + 1) * (size_t)cols * sizeof *data);
  if (data == NULL)
    return 2;
  for (line = next + 1; *line != '\0'; line = next + 1) {
    char *fields[MAX_COLS];
    int n;
    next = strchr(line, '\n');
    if (next == NULL) {
      check_fail("row %d does not end with a line break", nrows + 2);
      break;
    }
    *next = '\0';
    n = check_split_csv(line, fields, MAX_COLS);
    if (n != cols)
      check_fail("row %d has %d fields, expected %d", nrows + 2, n, cols);
    if (nrows <= steps)
      for (k = 0; k < cols && k < n; k++) {
        char *end;
        data[(size_t)nrows * (size_t)cols + (size_t)k] = strtod(fields[k], &end);
        if (end == fields[k] || *end != '\0')
          check_fail("row %d, column %d: '%s' is not a number", nrows + 2,
                     k + 1, fields[k]);
      }
    nrows++;
  }
  if (nrows != steps + 1)
    check_fail("%d rows after the header, expected %d (steps + 1)", nrows,
               steps + 1);
  if (check_failures()) {
    printf("structure wrong; values not compared\n");
    return 1;
  }

  /* the library's own sweep, at a few rows */
  for (k = 0; k < 5; k++)
    wanted[k] = steps * k / 4;
  ref.wanted = wanted;
  ref.nwanted = 5;
  ref.cols = cols;
  ref.rows = malloc(5 * (size_t)cols * sizeof *ref.rows);
  ref.state = malloc((size_t)kl_model_row_size(m) * sizeof *ref.state);
  s = kl_solver_new(m);
  if (ref.rows == NULL || ref.state == NULL || s == NULL)
    return 2;
  for (k = 0; k < kl_model_input_count(m) && k < 16; k++)
    home[k] = 0.0;
  home[sw.input] = sw.from;
  if (kl_solve_position(s, home) != KL_OK ||
      kl_solver_sweep(s, sw.input, sw.from, sw.to, steps, keep_step, &ref, NULL) !=
          KL_OK) {
    check_fail("the library's sweep failed: %s", kl_solver_error(s));
    return 1;
  }
  /* 17 digits carry the value exactly; 6 round it to 5e-6 of itself */
  tol = digits >= 17 ? 1e-12 : 5e-6;
  for (k = 0; k < 5; k++)
    for (i = 0; i < cols; i++) {
      double want = ref.rows[(size_t)k * (size_t)cols + (size_t)i];
      double got = data[(size_t)wanted[k] * (size_t)cols + (size_t)i];
      if (fabs(got - want) > tol * fabs(want) + 1e-13)
        check_fail("row %d, column '%s': %.17g in the file, %.17g from the "
                   "library",
                   wanted[k] + 2, header[i], got, want);
    }
  for (k = 0; k < nrows && k <= steps; k++) {
    double rc = data[(size_t)k * (size_t)cols + (size_t)(cols - 1)];
    if (!(rc > 0 && rc <= 1))
      check_fail("row %d: condition estimate %g not in (0, 1]", k + 2, rc);
  }
  if (fd)
    check_differences(data, nrows, cols, value_col, rate_col, npairs, speed,
                      header);
  printf("%d rows of %d columns checked%s\n", nrows, cols,
         fd ? ", with central differences" : "");
  free(ref.rows);
  free(ref.state);
  free(data);
  free(text);
  kl_solver_free(s);
  kl_model_free(m);
  return check_failures() ? 1 : 0;
}
