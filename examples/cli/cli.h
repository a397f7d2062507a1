/*
 * cli.h - what the modules of the kinloop command-line tool share: exit
 * codes, the parsed options, the loaded model with its derived tables.
 */
#ifndef KINLOOP_CLI_H
#define KINLOOP_CLI_H

#include <stddef.h>
#include <stdio.h>

#include "kinloop.h"

#define CLI_PI 3.14159265358979323846
/* The transmission angle's usual range, deg (rule of thumb: common
 * practice, no source). */
#define CLI_USUAL_LOW_DEG 40.0
#define CLI_USUAL_HIGH_DEG 140.0

/* Exit codes, as documented in the usage text and docs/cli.md. */
enum cli_exit {
  CLI_EXIT_OK = 0,
  CLI_EXIT_MEMORY = 1, /* out of memory, or a library call failed unexpectedly */
  CLI_EXIT_USAGE = 2,  /* bad command line */
  CLI_EXIT_MODEL = 3,  /* model file unreadable, not in the format, bad topology */
  CLI_EXIT_SOLVE = 4,  /* a position asked for cannot be solved */
  CLI_EXIT_OUTPUT = 5  /* an output file cannot be written */
};

enum cli_command {
  CLI_CHECK,
  CLI_SOLVE,
  CLI_SWEEP,
  CLI_DRAW,
  CLI_PLOT,
  CLI_WRITE,
  CLI_DEMO,
  CLI_STUDY,
  CLI_FORCES,
  CLI_REACH,
  CLI_TIMELINE,
  CLI_FOLLOWER,
  CLI_NCOMMANDS
};

#define CLI_MAX_POSES 16
#define CLI_MAX_SHOW 8

/* The command line after parsing; numbers given per input stay text until
 * the model (and so the number of inputs and their units) is known. */
typedef struct {
  int command;
  const char *model_path; /* required but for demo, which uses its own */
  const char *output;     /* NULL or "-": standard output */
  const char *input;      /* the input to sweep: joint name or index */
  int have_from, have_to, have_steps;
  double from, to; /* in the swept input's unit */
  int steps;
  int nat;
  const char *at[CLI_MAX_POSES];
  const char *rate, *accel;
  int have_speed;
  double speed; /* swept input's speed, its unit per second */
  int all_digits;
  int poses;
  int no_paths;
  int nshow;
  const char *show[CLI_MAX_SHOW];
  int order;
  const char *dir;
  int threads;        /* study: threads to run on, 0 for every core */
  const char *csv;    /* study: where to write one row per sample */
  const char *charts; /* study: the folder for its charts */
  int have_fluctuation; /* forces: the coefficient of speed fluctuation */
  double fluctuation;
  int forces;           /* sweep: the force columns too */
  const char *point;    /* reach: the point whose workspace is traced */
  int grid;             /* reach: seed nodes per turn, 0 for the default */
  int through_change_points; /* pass change points on the smooth branch */
  int write_over; /* outputs may replace model and study files */
  int npose;
  double pose[CLI_MAX_POSES]; /* draw: the swept input's values to draw */
  int have_rpm;         /* sweep, forces: the speed in turns a minute */
  double rpm;
  const char *profile; /* timeline: profile statements, ';' between them */
  const char *cam;     /* follower: the cam's joint, name or number */
} cli_options;

typedef struct {
  kl_model *model;
  const char *label; /* the path given, or the demo's file name */
  const char *text;  /* the model text as read */
  size_t length;
  char *owned_text;
  int nlinks, njoints, npoints, ninputs, nloops;
  char **link_names, **joint_names, **point_names; /* "@id" when unnamed */
  char **input_names; /* the joint's name, or "point.x" for a point input */
  double angle_factor;     /* model angle unit per radian */
  const char *angle_unit;  /* "deg" or "rad" */
  const char *length_unit; /* "mm", "m", "in", or "len" when unstated */
  int nslides;
  int *slides; /* the prismatic and slot joints, in id order */
  /* what the library reads from the loops */
  int nsites;
  kl_output *sites; /* transmission-angle sites */
  int nskips;
  kl_transmission_skip *skips;
  int nfourbars;
  kl_fourbar *fourbars;
  /* where each quantity's block starts in a row (kl_solver_row) */
  int row_size;
  int row_offset[KL_QUANTITY_RCOND + 1];
} cli_model;

/* A sweep of one input, in library units (rad or length). */
typedef struct {
  int input;
  double from, to;
  int steps;
} cli_range;

/* ---- main.c: messages ---- */
void cli_error(const char *fmt, ...)
#ifdef __GNUC__
    __attribute__((format(printf, 1, 2)))
#endif
    ;

/* ---- model_io.c: model text in and out, output files ---- */
extern const unsigned char cli_demo_text[];
extern const size_t cli_demo_length;
extern const char cli_demo_file_name[];
extern const unsigned char cli_demo_study_text[];
extern const size_t cli_demo_study_length;
extern const char cli_demo_study_file_name[];
/* Loads the file at `path`, or the built-in demo when NULL, with the
 * model-format statements of `profile` (NULL for none; ';' between
 * statements) read after the file's own lines. Prints why it failed and
 * returns an exit code. */
int cli_model_load(cli_model *cm, const char *path, const char *profile);
void cli_model_free(cli_model *cm);
/* The model's leading comment block, one line per call: returns the start
 * of line `k` (0-based) and its length, or NULL when there are no more. */
const char *cli_model_comment(const cli_model *cm, int k, size_t *len);
/* Output files are written whole or not at all: cli_open_output opens a
 * temporary file beside `path` (standard output for NULL or "-"), which
 * cli_close_output renames into place once written, and
 * cli_abandon_output removes, leaving any earlier file at `path` as it
 * was. Unless cli_set_write_over(1), a `path` that reads as a model or
 * study file is refused. Both print why they failed; cli_close_output
 * returns an exit code. */
FILE *cli_open_output(const char *path);
int cli_close_output(FILE *f, const char *path);
void cli_abandon_output(FILE *f);
void cli_set_write_over(int allowed);
/* Makes the folder `dir` unless it is one already (its parent must
 * exist). Returns an exit code after printing why it failed. */
int cli_make_dir(const char *dir);
/* A name as part of a file name: letters, digits, '.', '-' and '_' kept,
 * anything else '_', at most 40 bytes. */
void cli_file_word(const char *name, char *buf, size_t cap);

/* ---- inputs.c: inputs in the user's units, ranges, going to positions ---- */
/* A number as a model file writes one: decimal digits with an optional
 * sign, point and exponent; no hex, no infinity or NaN, no overflow.
 * Returns 0 with *end after it, or -1. */
int cli_parse_real(const char *text, const char **end, double *value);
/* A solver for the model with the command's options (pass change points
 * with --through-change-points), or NULL when memory runs out. */
kl_solver *cli_solver_new(const cli_model *cm, const cli_options *o);
int cli_input_is_angle(const cli_model *cm, int input);
double cli_input_factor(const cli_model *cm, int input); /* unit per lib unit */
const char *cli_input_unit(const cli_model *cm, int input);
const char *cli_input_name(const cli_model *cm, int input);
/* Parses "v1,v2,..." (one value per input, model units) into library units.
 * Returns 0, or -1 after printing why. */
int cli_parse_inputs(const cli_model *cm, const char *list, const char *what,
                     double *u);
/* The inputs of --at, or the model's start when it is not given. Returns
 * 0, or -1 after printing why. */
int cli_start_or_at(const cli_model *cm, const cli_options *o, double *u);
/* Brings the solver to `target` from the model's start (kl_solver_reset,
 * kl_solver_reach). Returns a KL status; on failure `why` says what
 * happened in the user's units. */
int cli_reach(kl_solver *s, const cli_model *cm, const double *target,
              char *why, size_t cap);
/* The range from the options, the model's sweep settings, or a full turn of
 * input 0. Returns 1 with a range, 0 when there is none, or -1 after
 * printing a usage error. */
int cli_resolve_range(const cli_model *cm, const cli_options *o,
                      cli_range *r);
/* As cli_resolve_range for a command that needs a range: an exit code,
 * after saying "NOTHING: why" when there is none. */
int cli_require_range(const cli_model *cm, const cli_options *o,
                      cli_range *r, const char *nothing);
/* Reaches the start of the range (other inputs at --at or the start).
 * Returns an exit code after printing why it failed. */
int cli_reach_start(kl_solver *s, const cli_model *cm, const cli_options *o,
                    const cli_range *r);
/* --rpm N as the swept input's speed in its unit per second, into
 * o->speed; a usage error (exit 2, after saying why) with --speed too or
 * for an input that does not turn. */
int cli_apply_rpm(const cli_model *cm, cli_options *o);
/* A value in the model's units for messages: "123.4 deg". */
void cli_format_input(const cli_model *cm, int input, double value, char *buf,
                      size_t cap);

/* ---- record.c: a sweep's rows streamed, and the columns shown of them ---- */
/* Where item `item` of a quantity sits in a row. */
int cli_row_at(const cli_model *cm, int quantity, int item);
enum cli_dim { CLI_DIM_INPUT, CLI_DIM_ANGLE, CLI_DIM_LENGTH, CLI_DIM_PLAIN };
typedef struct {
  char name[300];
  int dim, order; /* order 0 value, 1 rate, 2 acceleration */
  int at;         /* the value's place in a row */
} cli_column;
/* The columns of the sweep command's CSV, in order: the swept input, each
 * moving link's angle, rate and acceleration, each slide's, each point's x
 * and y with theirs, each transmission angle, the condition estimate. */
int cli_column_count(const cli_model *cm);
void cli_columns(const cli_model *cm, int input, cli_column *cols);
int cli_col_link(const cli_model *cm, int link, int order);
int cli_col_slide(const cli_model *cm, int slide_index, int order);
int cli_col_point(const cli_model *cm, int point, int axis, int order);
int cli_col_site(const cli_model *cm, int site);
/* Factor from raw values (rad, length, per rad or length of input) to the
 * model's units, with rates per second at the given input speed. */
double cli_column_factor(const cli_model *cm, int input, const cli_column *c,
                         double speed);
/* Below what raw value (library units, per unit input rate) a column's
 * value is rounding and shows as 0: the solver's tolerance, times the
 * model's scale for lengths; 0 for the input and the condition estimate. */
double cli_column_resolution(const cli_model *cm, const cli_column *c);
/* A value as printed: `raw` (library units) times `factor`, or exactly 0
 * when |raw| is below `resolution`, so rounding never shows as 1e-13. */
double cli_shown(double raw, double factor, double resolution);
/* The printf format of a written number: 17 significant digits (every bit
 * of a double) with --all-digits, otherwise the command's own `plain`. */
const char *cli_number_format(const cli_options *o, const char *plain);
/* The resolutions of cli_column_resolution for a position: lengths (and
 * curve parameters) and angles. */
double cli_length_resolution(const cli_model *cm);
double cli_angle_resolution(void);
/* The column's unit: per second (per_input 0) or per input unit (1). */
void cli_column_unit(const cli_model *cm, int input, const cli_column *c,
                     int per_input, char *buf, size_t cap);
/* A picture (draw, plot) keeps every stride-th step of a sweep and its
 * last, at most CLI_PICTURE_POINTS + 1 rows whatever the step count: more
 * than a page's width of pixels, so nothing visible is lost. */
#define CLI_PICTURE_POINTS 4000
int cli_picture_stride(int steps);
typedef int (*cli_row_fn)(void *user, int step, const double *row);
/* Sweeps `r` from the solver's state, handing each step's row
 * (kl_solver_row) to `fn` (non-zero stops). Returns what kl_solver_sweep
 * returned, or KL_ENOMEM. */
int cli_record(kl_solver *s, const cli_model *cm, const cli_range *r,
               cli_row_fn fn, void *user, kl_sweep_result *res);
/* A note for a sweep that stopped early, in the user's units. */
void cli_sweep_note(const cli_model *cm, const cli_range *r,
                    const kl_sweep_result *res, char *buf, size_t cap);
/* Tells how a sweep (`what`) that returned `status` ended: "note: ...;
 * THEN" for one that stopped early (exit 0), its failure (exit 4). */
int cli_sweep_told(const cli_model *cm, const kl_solver *s,
                   const cli_range *r, const kl_sweep_result *res, int status,
                   const char *what, const char *then);

/* ---- check.c ---- */
int cli_cmd_check(const cli_model *cm, const cli_options *o);
/* The check report into f: what the check command and the demo print. */
int cli_check_report(FILE *f, const cli_model *cm, const cli_options *o);

/* ---- solve.c ---- */
int cli_cmd_solve(const cli_model *cm, const cli_options *o);

/* ---- sweep.c ---- */
int cli_cmd_sweep(const cli_model *cm, const cli_options *o);
/* A CSV field, quoted when a comma, quote or line break would split it. */
void cli_csv_field(FILE *f, const char *text);

/* ---- timeline.c: the model's motion profile in time ---- */
extern const char cli_timeline_help[];
int cli_cmd_timeline(const cli_model *cm, const cli_options *o);

/* ---- follower.c: a cam follower's motion over the cam angle ---- */
extern const char cli_follower_help[];
int cli_cmd_follower(const cli_model *cm, const cli_options *o);

/* ---- write.c ---- */
int cli_cmd_write(const cli_model *cm, const cli_options *o);

/* ---- svg.c: what the drawing, the plots and the study charts share ---- */
#define SVG_FONT "DejaVu Sans, Verdana, sans-serif"
#define SVG_INK "#2f2a24"   /* lines and text */
#define SVG_MUTED "#6a6256" /* subtitles, secondary text */
#define SVG_PAPER "#f7f4ec" /* the page */
void svg_begin(FILE *f, double width, double height, const char *background);
void svg_end(FILE *f);
void svg_escaped(FILE *f, const char *s);
const char *svg_colour(int k);
/* A text element at (x, y): its start tag, with `attrs` (NULL for none)
 * added, for a caller that writes the content and "</text>"; or all of it
 * with `text` escaped. */
void svg_text_open(FILE *f, double x, double y, double size,
                   const char *colour, const char *attrs);
void svg_text(FILE *f, double x, double y, double size, const char *colour,
              const char *attrs, const char *text);
/* A key entry: a short line (dashed with `dash`, NULL for solid) and its
 * text, the text's baseline at y. */
void svg_key(FILE *f, double x, double y, const char *colour,
             const char *dash, const char *text);
/* 1, 2 or 5 times a power of ten: the least not below v (up), or the
 * greatest not above it. For ticks and scale bars. */
double svg_round_125(double v, int up);

/* The panel of a plot or chart, in data coordinates. */
#define CHART_WIDTH 760.0
#define CHART_HEIGHT 470.0
#define CHART_PANEL "#fffdf8"
#define CHART_ALARM "#a3312a" /* marks what stops or fails */
typedef struct {
  double lo, hi;   /* the data values at the two ends */
  double from, to; /* where they are drawn, in screen units */
} chart_axis;
typedef struct {
  chart_axis x, y;
  double xstep, ystep; /* tick spacing, in data units */
} chart;
/* Places the panel: sets the screen ends of both axes. */
void chart_frame(chart *c);
/* A tick step giving about `want` intervals over `span`: 1, 2 or 5 times a
 * power of ten, or for degrees of input a divisor of a turn. */
double chart_tick_step(double span, int want, int degrees);
/* Makes a range that is empty, or not finite, one that can be drawn. */
void chart_widen(chart_axis *a);
/* Widens the range as chart_widen does, rounds it out to whole ticks of
 * about `want` intervals and returns the tick step. */
double chart_round_out(chart_axis *a, int want);
double chart_map(const chart_axis *a, double v);
/* The document and the clip path "panel" of the panel's area. */
void chart_begin(FILE *f, const chart *c);
void chart_title(FILE *f, const chart *c, const char *title,
                 const char *subtitle);
void chart_panel(FILE *f, const chart *c);
/* Grid lines, ticks and tick labels of both axes. */
void chart_ticks(FILE *f, const chart *c);
/* The group of one curve's polylines, clipped to the panel, in `colour`;
 * chart_curve_end closes it. */
void chart_curve_begin(FILE *f, const char *colour);
void chart_curve_end(FILE *f);
/* A dashed line across the panel at x = v, labelled at its left (or
 * right) in text row `row` from the top (0, 1, ...). */
void chart_mark_x(FILE *f, const chart *c, double v, const char *colour,
                  const char *label, int label_right, int row);
/* A dashed line across the panel at y = v, labelled above its right end. */
void chart_mark_y(FILE *f, const chart *c, double v, const char *colour,
                  const char *label);
void chart_axis_titles(FILE *f, const chart *c, const char *x_title,
                       const char *y_title);

/* ---- draw.c ---- */
int cli_cmd_draw(const cli_model *cm, const cli_options *o);

/* ---- plot.c ---- */
int cli_cmd_plot(const cli_model *cm, const cli_options *o);
/* Prints the output names `--show` accepts for this model. */
void cli_list_outputs(FILE *f, const cli_model *cm);

/* ---- demo.c ---- */
int cli_cmd_demo(const cli_model *cm, const cli_options *o);

/* ---- forces.c: the force stage over the working cycle ---- */
extern const char cli_forces_help[];
/* The units forces are shown in: masses in kg, times in seconds, lengths
 * in the model's unit; forces in N and torques (moments, energies) in N
 * times the length unit, or the unstated unit's own combination. */
typedef struct {
  double per_model; /* shown units per model unit: 1e-3 for mm (mN to N) */
  double metres;    /* metres per length unit, 0 when unstated */
  char force[24], torque[24], inertia[24];
} cli_force_units;
void cli_force_units_of(const cli_model *cm, cli_force_units *u);
/* A working cycle and its force figures. */
typedef struct {
  cli_range r;
  double speed;       /* the driven input's, rad or length per second */
  double fluctuation; /* coefficient of speed fluctuation, 0 for none */
  int nloads;
  kl_load *loads; /* the model's */
  int status;     /* KL_OK, or KL_LIMIT: the figures of the part reached */
  kl_cycle_summary sum;
  kl_cycle_peak *inputs, *joints;
  int rows, width;
  double *table; /* kl_cycle_table's rows, or NULL */
} cli_cycle;
/* The cycle: `range`, or (NULL) the range options, or the model's working
 * cycle; the speed and fluctuation of the options or the model's speed
 * line; the model's loads. Returns an exit code after saying why not. */
int cli_cycle_setup(const cli_model *cm, const cli_options *o,
                    const cli_range *range, cli_cycle *c);
/* Reaches the cycle's start (--at for the other inputs) and computes its
 * figures, and its table when `table`. Returns an exit code after saying
 * why not; where the forces are not determined, it says so. */
int cli_cycle_compute(const cli_model *cm, const cli_options *o, int table,
                      cli_cycle *c);
void cli_cycle_free(cli_cycle *c);
/* A figure's mean, 0 where it is rounding beside its peak (a conservative
 * cycle's mean effort). */
double cli_peak_mean(const kl_cycle_peak *p);
/* The figures as text; `brief`: the motor, the three largest joint loads,
 * the frame and the flywheel, without the outline. */
void cli_cycle_report(FILE *f, const cli_model *cm, const cli_cycle *c,
                      int brief);
/* The force columns of a CSV: their names and row k's numbers, each
 * after a comma. */
void cli_cycle_csv_header(FILE *f, const cli_model *cm, const cli_cycle *c);
void cli_cycle_csv_row(FILE *f, const cli_model *cm, const cli_cycle *c,
                       int k, const char *format);
/* One line of the check report on the model's force data (none without). */
void cli_forces_outline(FILE *f, const cli_model *cm);
int cli_cmd_forces(const cli_model *cm, const cli_options *o);

/* ---- force_charts.c ---- */
/* Writes into `dir` each input's effort over the cycle and, as polar plots
 * of the force vector, each joint's load and the frame's; counts the files
 * in *files. Returns an exit code. */
int cli_force_charts(const cli_model *cm, const cli_cycle *c, const char *dir,
                     int *files);

/* ---- reach.c: the workspace of a point ---- */
int cli_cmd_reach(const cli_model *cm, const cli_options *o);

/* ---- study.c: the study command, which reads a study, not a model ---- */
int cli_cmd_study(const cli_options *o);

/* ---- study_charts.c ---- */
/* The samples of a study run, in sample order. */
typedef struct {
  const kl_study *st;
  const char *label;    /* the study file's name, for titles */
  long n;
  const double *values; /* n x outputs */
  const int *status;    /* n */
  const double *dims;   /* n x dimensions */
} cli_study_samples;
/* Output k's name with its unit: "stroke (mm)". */
void cli_study_output_titled(const kl_study *st, int k, char *buf,
                             size_t cap);
/* Whether sample i has a value of output k: it assembled, and (if its
 * motion stopped) reached where the output is taken. */
int cli_study_has_value(const cli_study_samples *s, long i, int k);
/* Writes into `dir` a histogram of every output and its scatter plots
 * against the two dimensions that correlate with it most, counting the
 * files in *histograms and *scatters. Returns an exit code. */
int cli_study_charts(const cli_study_samples *s, const char *dir,
                     int *histograms, int *scatters);

#endif
