/*
 * check.c - the check command: the model's structure, its ranges over the
 * sweep, and warnings to act on.
 */
#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

#define MAX_WARNINGS 64
#define LABEL "  %-14s"

typedef struct {
  int count;
  char text[MAX_WARNINGS][640];
} warnings;

static void warn(warnings *w, const char *fmt, ...)
#ifdef __GNUC__
    __attribute__((format(printf, 2, 3)))
#endif
    ;

static void warn(warnings *w, const char *fmt, ...) {
  va_list ap;
  if (w->count == MAX_WARNINGS)
    return;
  va_start(ap, fmt);
  vsnprintf(w->text[w->count++], sizeof w->text[0], fmt, ap);
  va_end(ap);
}

static void print_names(FILE *f, char **names, int from, int to) {
  int i;
  for (i = from; i < to; i++)
    fprintf(f, "%s%s", i > from ? ", " : "", names[i]);
}

static int is_input_joint(const cli_model *cm, int joint) {
  int i;
  for (i = 0; i < cm->ninputs; i++)
    if (kl_model_input_joint(cm->model, i) == joint)
      return 1;
  return 0;
}

static int has_sketch(const cli_model *cm) {
  int l, k;
  for (l = 1; l < cm->nlinks; l++)
    if (!isnan(kl_model_sketch_angle(cm->model, l)))
      return 1;
  for (k = 0; k < cm->nslides; k++)
    if (!isnan(kl_model_sketch_slide(cm->model, cm->slides[k])))
      return 1;
  return 0;
}

/* One line per coupling: what it joins, its radii or ratio, and the mesh. */
static void print_couplings(FILE *f, const cli_model *cm) {
  int n = kl_model_coupling_count(cm->model), i;
  if (n <= 0)
    return;
  fprintf(f, LABEL "%d (each takes one freedom)\n", "couplings", n);
  for (i = 0; i < n; i++) {
    kl_coupling_info c;
    c.size = sizeof c;
    kl_model_coupling(cm->model, i, &c);
    if (c.kind == KL_COUPLING_GEAR)
      fprintf(f, LABEL "gear pair %s (r %g) with %s (r %g) on %s, %s mesh, "
                 "ratio %.6g\n",
              "", cm->joint_names[c.joint1], c.value1,
              cm->joint_names[c.joint2], c.value2, cm->link_names[c.carrier],
              c.internal ? "internal" : "external",
              (c.internal ? 1.0 : -1.0) * c.value1 / c.value2);
    else if (c.kind == KL_COUPLING_RACK)
      fprintf(f, LABEL "rack %s driven by pinion %s (r %g) on %s\n", "",
              cm->joint_names[c.joint2], cm->joint_names[c.joint1], c.value1,
              cm->link_names[c.carrier]);
    else
      fprintf(f, LABEL "%s follows %s times %.6g\n", "",
              cm->joint_names[c.joint2], cm->joint_names[c.joint1], c.value1);
  }
}

static void print_structure(FILE *f, const cli_model *cm) {
  const kl_model *m = cm->model;
  int kinds[5] = {0, 0, 0, 0, 0}, j, i, loop;
  const char *comment;
  size_t len;
  fprintf(f, "model %s\n", cm->label);
  for (i = 0; (comment = cli_model_comment(cm, i, &len)) != NULL; i++)
    fprintf(f, "  | %.*s\n", (int)len, comment);
  fprintf(f, "\nstructure\n");
  fprintf(f, LABEL "%d: ground", "links", cm->nlinks);
  if (cm->nlinks > 1) {
    fprintf(f, ", ");
    print_names(f, cm->link_names, 1, cm->nlinks);
  }
  for (j = 0; j < cm->njoints; j++)
    kinds[kl_model_joint_kind(m, j)]++;
  fprintf(f, "\n" LABEL "%d: %d revolute, %d prismatic, %d slot", "joints",
          cm->njoints, kinds[KL_JOINT_REVOLUTE], kinds[KL_JOINT_PRISMATIC], kinds[KL_JOINT_SLOT]);
  if (kinds[KL_JOINT_ARC_SLOT] + kinds[KL_JOINT_CURVE_SLOT] > 0)
    fprintf(f, ", %d arc slot, %d curve slot", kinds[KL_JOINT_ARC_SLOT],
            kinds[KL_JOINT_CURVE_SLOT]);
  fprintf(f, "\n");
  fprintf(f, LABEL "%d%s", "points", cm->npoints, cm->npoints ? ": " : "");
  print_names(f, cm->point_names, 0, cm->npoints);
  fprintf(f, "\n" LABEL "lengths in %s, angles in %s\n", "units",
          strcmp(cm->length_unit, "len") == 0 ? "an unstated unit"
                                              : cm->length_unit,
          cm->angle_unit);
  fprintf(f, LABEL "%d degree%s of freedom (Gruebler's count), %d input%s",
          "mobility", kl_model_dof(m), kl_model_dof(m) == 1 ? "" : "s",
          cm->ninputs, cm->ninputs == 1 ? "" : "s");
  for (i = 0; i < cm->ninputs; i++)
    fprintf(f, "%s%s (%s)", i ? ", " : ": ", cli_input_name(cm, i),
            kl_model_input_joint(m, i) < 0 ? "point coordinate"
            : cli_input_is_angle(cm, i)    ? "turning"
                                           : "sliding");
  fputc('\n', f);
  print_couplings(f, cm);
  fprintf(f, LABEL "%d independent loop%s\n", "loops", cm->nloops,
          cm->nloops == 1 ? "" : "s");
  for (loop = 0; loop < cm->nloops; loop++) {
    int walk[256], n = kl_model_loop(m, loop, walk, 256), k;
    char label[32];
    snprintf(label, sizeof label, "loop %d", loop + 1);
    fprintf(f, LABEL, label);
    for (k = 0; k < n && k < 256; k++)
      fprintf(f, "%s%s", k ? " > " : "", cm->joint_names[walk[k]]);
    fputc('\n', f);
  }
  for (i = 0; i < cm->nfourbars; i++) {
    const kl_fourbar *fb = &cm->fourbars[i];
    fprintf(f,
            LABEL "loop %d, driven at %s: %s (ground %.6g, input %.6g, "
                  "coupler %.6g, output %.6g %s)\n",
            "four-bar", fb->loop + 1, cm->joint_names[fb->input_joint],
            fb->grashof > 0 ? kl_grashof_str(fb->grashof) : "not classified",
            fb->ground_length, fb->input_length, fb->coupler_length,
            fb->output_length, cm->length_unit);
  }
}

/*
 * The ranges of every output the report reads, from one sweep that starts
 * at `base`'s state (kl_output_ranges: the cost of a few sweeps at most,
 * whatever the model's size). Outputs: each ground pivot's link angle (-1
 * where the joint is no such pivot), each slide's, each transmission
 * site's, then the `npressure` pressure-angle sites already in outs after
 * room for those, in that order; ranges[i] receives output i's. Returns
 * the count, or -1 when the ranges cannot be measured.
 */
static int measure_all(kl_solver *work, const kl_solver *base,
                       const cli_model *cm, const cli_range *r, int *pivot_of,
                       const kl_output *pressure, int npressure,
                       kl_output *outs, kl_range *ranges) {
  const kl_model *m = cm->model;
  int n = 0, j, i;
  for (j = 0; j < cm->njoints; j++) {
    int links[2];
    pivot_of[j] = -1;
    kl_model_joint_links(m, j, links, NULL, NULL);
    if (kl_model_joint_kind(m, j) != KL_JOINT_REVOLUTE ||
        is_input_joint(cm, j) ||
        (links[0] != KL_GROUND && links[1] != KL_GROUND))
      continue;
    memset(&outs[n], 0, sizeof outs[n]);
    outs[n].kind = KL_OUTPUT_LINK_ANGLE;
    outs[n].id = links[0] == KL_GROUND ? links[1] : links[0];
    pivot_of[j] = n++;
  }
  for (i = 0; i < cm->nslides; i++) {
    memset(&outs[n], 0, sizeof outs[n]);
    outs[n].kind = KL_OUTPUT_SLIDE;
    outs[n++].id = cm->slides[i];
  }
  for (i = 0; i < cm->nsites; i++)
    outs[n++] = cm->sites[i];
  for (i = 0; i < npressure; i++)
    outs[n++] = pressure[i];
  for (i = 0; i < n; i++)
    ranges[i].size = sizeof ranges[i];
  kl_solver_copy_state(work, base);
  if (kl_output_ranges(work, r->input, r->from, r->to, r->steps, n, outs,
                       ranges) < 0)
    return -1;
  return n;
}

/* Tracks the smallest condition estimate of a sweep and where it occurs. */
typedef struct {
  int col, input_at; /* places in a row */
  double rcond, at;
} rcond_sink;

static int rcond_row(void *user, int step, const double *row) {
  rcond_sink *k = user;
  if (step == 0 || row[k->col] < k->rcond) {
    k->rcond = row[k->col];
    k->at = row[k->input_at];
  }
  return 0;
}

/* "; time ratio 1.36 (slower: the rise to the maximum, over 208 deg of
 * motor)": the quick-return ratio as the trade states it, slower stroke
 * over faster, and which stroke is the slower. */
static void print_time_ratio(FILE *f, const cli_model *cm, int input,
                             const kl_range *range) {
  double ratio, angle;
  int slower;
  if (kl_range_quick_return(range, &ratio, &slower, &angle) != KL_OK)
    return;
  fprintf(f, "; time ratio %.4f", ratio);
  if (slower == KL_STROKE_EQUAL)
    fprintf(f, " (both strokes take half a turn)");
  else
    fprintf(f, " (slower: the %s, over %.6g %s of %s)",
            slower == KL_STROKE_RISING ? "rise to the maximum"
                                       : "return to the minimum",
            angle * cli_input_factor(cm, input), cli_input_unit(cm, input),
            cli_input_name(cm, input));
}

/* "at motor 35.2 and 222 deg": where a range has its two extremes. */
static void at_pair(const cli_model *cm, int input, double a, double b,
                    char *buf, size_t cap) {
  double k = cli_input_factor(cm, input);
  snprintf(buf, cap, "at %s %.6g and %.6g %s", cli_input_name(cm, input),
           a * k, b * k, cli_input_unit(cm, input));
}

/* The pressure angle of a cam over a sweep (kl_cam_follower_state). */
typedef struct {
  int joint, status;
  double min, max, worst, worst_at;
} cam_sink;

static int cam_row(const kl_solver *s, int step, double input, void *user) {
  cam_sink *c = user;
  double state[KL_CAM_STATE_SIZE], p;
  (void)step;
  if ((c->status = kl_cam_follower_state(s, c->joint, state)) != KL_OK)
    return 1;
  p = state[KL_CAM_STATE_PRESSURE];
  c->min = fmin(c->min, p);
  c->max = fmax(c->max, p);
  if (fabs(p) > c->worst) {
    c->worst = fabs(p);
    c->worst_at = input;
  }
  return 0;
}

/* Warns when a cam line's follower is guided otherwise than the cam was
 * made for (kl_cam_guide_error at `base`'s solved position): its pitch
 * curve then gives another motion than the program. */
static void check_cam_guide(const cli_model *cm, const kl_solver *base,
                            int joint, warnings *w) {
  double off[2];
  int st = kl_cam_guide_error(base, joint, off);
  const char *cam = cm->joint_names[joint];
  if (st == KL_EKIND)
    warn(w, "cam %s was made for another kind of follower than its guide "
            "with ground (a prismatic joint for a translating follower, a "
            "revolute pivot for an oscillating one): its follower will not "
            "move as the program says; change the guide or the cam line",
         cam);
  else if (st == KL_OK && (off[0] > cli_length_resolution(cm) ||
                           off[1] > cli_angle_resolution()))
    warn(w, "the follower of cam %s is guided %.4g %s and %.4g %s away from "
            "the follower its cam line describes (stem offset, or pivot and "
            "arm, about the bearing): it will not move as the program says; "
            "move the guide or change the cam line's follower",
         cam, cli_shown(off[0], 1.0, cli_length_resolution(cm)),
         cm->length_unit,
         cli_shown(off[1], cm->angle_factor, cli_angle_resolution()),
         cm->angle_unit);
}

/* Each cam line's follower pressure angle over the range (at least 360
 * steps: a cam's largest pressure angle is narrow), from `base`'s state,
 * and its guide against the cam's follower. */
static void print_cams(FILE *f, const cli_model *cm, const kl_solver *base,
                       kl_solver *work, const cli_range *r, warnings *w) {
  double k = cm->angle_factor;
  int j;
  for (j = 0; j < cm->njoints; j++) {
    int bearing = kl_model_cam_bearing(cm->model, j);
    double limit = kl_model_cam_limit(cm->model, j);
    kl_sweep_result res;
    cam_sink c;
    char at[320];
    if (bearing < 0)
      continue;
    check_cam_guide(cm, base, j, w);
    memset(&c, 0, sizeof c);
    c.joint = j;
    c.min = INFINITY;
    c.max = -INFINITY;
    kl_solver_copy_state(work, base);
    res.size = sizeof res;
    kl_solver_sweep(work, r->input, r->from, r->to,
                    r->steps < 360 ? 360 : r->steps, cam_row, &c, &res);
    if (c.status != KL_OK || !isfinite(c.min)) {
      fprintf(f, LABEL "cam on %s: its follower has no guide with ground; "
                       "its pressure angle is not measured\n",
              cm->joint_names[j], cm->joint_names[bearing]);
      continue;
    }
    cli_format_input(cm, r->input, c.worst_at, at, sizeof at);
    fprintf(f, LABEL "cam on %s: follower pressure angle %.4g to %.4g %s, "
                     "largest at %s",
            cm->joint_names[j], cm->joint_names[bearing], c.min * k,
            c.max * k, cm->angle_unit, at);
    if (limit < CLI_PI)
      fprintf(f, " (bound %.4g %s)", limit * k, cm->angle_unit);
    fputc('\n', f);
  }
}

static void print_ranges(FILE *f, const cli_model *cm, kl_solver *base,
                         kl_solver *work, const cli_range *r,
                         const kl_sweep_result *res, warnings *w) {
  double k = cm->angle_factor;
  char lo[320], hi[320], both[700];
  int full_turn = cli_input_is_angle(cm, r->input) &&
                  fabs(r->to - r->from - 2 * CLI_PI) < 1e-12 * 2 * CLI_PI &&
                  res->status == KL_OK;
  int npressure = kl_model_pressure_sites(cm->model, NULL, 0);
  size_t most = (size_t)(cm->njoints + cm->nslides + cm->nsites + npressure);
  int *pivot_of = malloc((size_t)cm->njoints * sizeof *pivot_of + 1);
  kl_output *outs = malloc(most * sizeof *outs + 1);
  kl_output *pressure = malloc((size_t)npressure * sizeof *pressure + 1);
  kl_range *ranges = malloc(most * sizeof *ranges + 1);
  int j, i, n, at;
  if (pressure != NULL)
    kl_model_pressure_sites(cm->model, pressure, npressure);
  if (pivot_of == NULL || outs == NULL || ranges == NULL || pressure == NULL ||
      (n = measure_all(work, base, cm, r, pivot_of, pressure, npressure, outs,
                       ranges)) < 0) {
    if (pivot_of == NULL || outs == NULL || ranges == NULL || pressure == NULL)
      warn(w, "out of memory: the ranges were not measured");
    else
      warn(w, "the ranges could not be measured: %s", kl_solver_error(work));
    free(pivot_of);
    free(outs);
    free(pressure);
    free(ranges);
    return;
  }
  for (j = 0; j < cm->njoints; j++) {
    const kl_range *range;
    int link;
    if (pivot_of[j] < 0)
      continue;
    range = &ranges[pivot_of[j]];
    link = outs[pivot_of[j]].id;
    at_pair(cm, r->input, range->input_at_min, range->input_at_max, both,
            sizeof both);
    if (range->max - range->min >= 2 * CLI_PI - 1e-6) {
      fprintf(f, LABEL "turns fully about %s\n", cm->link_names[link],
              cm->joint_names[j]);
      continue;
    }
    fprintf(f, LABEL "swings about %s from %.6g to %.6g %s, %s",
            cm->link_names[link], cm->joint_names[j],
            cli_shown(range->min, k, cli_angle_resolution()),
            cli_shown(range->max, k, cli_angle_resolution()), cm->angle_unit,
            both);
    if (full_turn)
      print_time_ratio(f, cm, r->input, range);
    fputc('\n', f);
  }
  at = n - npressure - cm->nsites - cm->nslides;
  for (i = 0; i < cm->nslides; i++) {
    const kl_range *range = &ranges[at + i];
    const char *unit;
    double resolution = cli_length_resolution(cm);
    if (is_input_joint(cm, cm->slides[i]))
      continue;
    at_pair(cm, r->input, range->input_at_min, range->input_at_max, both,
            sizeof both);
    /* a curve slot's slide is the spline's parameter, not a length */
    unit = kl_model_joint_kind(cm->model, cm->slides[i]) == KL_JOINT_CURVE_SLOT
               ? "(curve parameter)"
               : cm->length_unit;
    fprintf(f, LABEL "stroke %.6g %s, from %.6g to %.6g %s, %s",
            cm->joint_names[cm->slides[i]],
            cli_shown(range->max - range->min, 1.0, resolution), unit,
            cli_shown(range->min, 1.0, resolution),
            cli_shown(range->max, 1.0, resolution), unit, both);
    if (full_turn)
      print_time_ratio(f, cm, r->input, range);
    fputc('\n', f);
  }
  at = n - npressure - cm->nsites;
  for (i = 0; i < cm->nsites; i++) {
    const kl_output *site = &cm->sites[i];
    const kl_range *range = &ranges[at + i];
    int named_a, named_b;
    int named = kl_model_transmission_lines(cm->model, site->id, &named_a,
                                            &named_b) == KL_OK;
    cli_format_input(cm, r->input, range->input_at_min, lo, sizeof lo);
    cli_format_input(cm, r->input, range->input_at_max, hi, sizeof hi);
    at_pair(cm, r->input, range->input_at_min, range->input_at_max, both,
            sizeof both);
    fprintf(f,
            LABEL "transmission angle %.4g to %.4g %s, %s (lines to %s and "
                  "%s%s)\n",
            cm->joint_names[site->id], range->min * k, range->max * k,
            cm->angle_unit, both, cm->joint_names[site->line_a],
            cm->joint_names[site->line_b], named ? ", as the model names" : "");
    if (range->min * 180 / CLI_PI < CLI_USUAL_LOW_DEG)
      warn(w,
           "the transmission angle at %s falls to %.4g %s (at %s), below the "
           "usual %g deg: the joint pushes weakly there; change link lengths "
           "or keep the motion out of that part of the range",
           cm->joint_names[site->id], range->min * k, cm->angle_unit, lo,
           CLI_USUAL_LOW_DEG);
    if (range->max * 180 / CLI_PI > CLI_USUAL_HIGH_DEG)
      warn(w,
           "the transmission angle at %s rises to %.4g %s (at %s), above the "
           "usual %g deg: the joint pushes weakly there; change link lengths "
           "or keep the motion out of that part of the range",
           cm->joint_names[site->id], range->max * k, cm->angle_unit, hi,
           CLI_USUAL_HIGH_DEG);
  }
  at = n - npressure;
  for (i = 0; i < npressure; i++) {
    const kl_output *site = &pressure[i];
    const kl_range *range = &ranges[at + i];
    /* the complement of the usual lowest transmission angle */
    double usual = 90.0 - CLI_USUAL_LOW_DEG;
    int low = -range->min > range->max; /* the larger magnitude */
    double worst = low ? -range->min : range->max;
    cli_format_input(cm, r->input,
                     low ? range->input_at_min : range->input_at_max, hi,
                     sizeof hi);
    at_pair(cm, r->input, range->input_at_min, range->input_at_max, both,
            sizeof both);
    fprintf(f,
            LABEL "pressure angle %.4g to %.4g %s, %s (rod from %s to %s "
                  "against the slide; signed, 0 ideal)\n",
            cm->joint_names[site->id], range->min * k, range->max * k,
            cm->angle_unit, both, cm->joint_names[site->line_a],
            cm->joint_names[site->line_b]);
    if (worst * 180 / CLI_PI > usual)
      warn(w,
           "the pressure angle at %s reaches %.4g %s (at %s), beyond the "
           "usual %g deg: the rod pushes the slider across its guide there; "
           "change link lengths or the slide's offset, or keep the motion "
           "out of that part of the range",
           cm->joint_names[site->id], worst * k, cm->angle_unit, hi, usual);
  }
  free(pivot_of);
  free(outs);
  free(pressure);
  free(ranges);
  print_cams(f, cm, base, work, r, w);
  for (i = 0; i < cm->nskips; i++) {
    const kl_transmission_skip *u = &cm->skips[i];
    if (u->reason == KL_TRANSMISSION_SKIP_INPUT_CRANK)
      fprintf(f,
              LABEL "no transmission angle: the input turns link %s directly\n",
              cm->joint_names[u->joint], cm->link_names[u->link]);
    else if (u->reason == KL_TRANSMISSION_SKIP_SLIDER)
      fprintf(f,
              LABEL "no transmission angle: it drives slider %s, whose "
                    "pressure angle is given instead\n",
              cm->joint_names[u->joint], cm->link_names[u->link]);
    else if (u->reason == KL_TRANSMISSION_SKIP_RIGID)
      fprintf(f,
              LABEL "no transmission angle: its links and link %s form a "
                    "rigid triangle (one ternary link), so the pin never "
                    "turns\n",
              cm->joint_names[u->joint], cm->link_names[u->link]);
    else
      fprintf(f,
              LABEL "no transmission angle: its neighbour in loop %d stands "
                    "at the same point of link %s, so there is no line to "
                    "measure\n",
              cm->joint_names[u->joint], u->loop + 1, cm->link_names[u->link]);
  }
}

int cli_check_report(FILE *f, const cli_model *cm, const cli_options *o) {
  warnings *w = calloc(1, sizeof *w);
  kl_solver *base = cli_solver_new(cm, o), *work = cli_solver_new(cm, o);
  cli_range r;
  int st = CLI_EXIT_OK, found, i;
  if (w == NULL || base == NULL || work == NULL) {
    cli_error("out of memory");
    st = CLI_EXIT_MEMORY;
    goto done;
  }
  found = cli_resolve_range(cm, o, &r);
  if (found < 0) {
    st = CLI_EXIT_USAGE;
    goto done;
  }
  print_structure(f, cm);
  cli_forces_outline(f, cm);
  if (!has_sketch(cm) && cm->nlinks > 1)
    warn(w, "no sketch angles: the assembly mode is whichever one Newton's "
            "method reaches from zero angles; add 'sketch angle LINK VALUE' "
            "lines to choose it");
  if (found == 0) {
    fprintf(f, "\nno range to check: %s\n",
            cm->ninputs == 0 ? "the model has no inputs"
                             : "input 1 is a length (a slide or a point "
                               "coordinate) and the model has no sweep "
                               "line; give --from and --to");
  } else {
    char a[320], why[2048];
    double *u = malloc((size_t)cm->ninputs * sizeof *u);
    kl_sweep_result res;
    rcond_sink rc;
    if (u == NULL) {
      cli_error("out of memory");
      st = CLI_EXIT_MEMORY;
      goto done;
    }
    if (cli_start_or_at(cm, o, u) != 0) {
      free(u);
      st = CLI_EXIT_USAGE;
      goto done;
    }
    u[r.input] = r.from;
    fprintf(f, "\nover %s %.6g to %.6g %s in %d steps\n",
            cli_input_name(cm, r.input), r.from * cli_input_factor(cm, r.input),
            r.to * cli_input_factor(cm, r.input), cli_input_unit(cm, r.input),
            r.steps);
    st = cli_reach(base, cm, u, why, sizeof why);
    free(u);
    if (st != KL_OK) {
      fprintf(f, LABEL "the start position cannot be solved\n", "motion");
      warn(w, "the start of the range: %s; check the lengths, the sketch "
              "angles and --at",
           why);
      st = CLI_EXIT_SOLVE;
    } else {
      kl_solver_copy_state(work, base);
      rc.col = cli_row_at(cm, KL_QUANTITY_RCOND, 0);
      rc.input_at = cli_row_at(cm, KL_QUANTITY_INPUT_VALUE, r.input);
      rc.rcond = 1.0;
      rc.at = r.from;
      st = cli_record(work, cm, &r, rcond_row, &rc, &res);
      if (st == KL_OK) {
        fprintf(f, LABEL "the whole range, no motion limit or singular "
                         "position\n",
                "motion");
      } else if (st == KL_LIMIT || st == KL_ESINGULAR) {
        char note[1024];
        cli_sweep_note(cm, &r, &res, note, sizeof note);
        fprintf(f, LABEL "%s\n", "motion", note);
        if (st == KL_LIMIT)
          warn(w, "%s, inside the range %.6g to %.6g %s: narrow the range "
                  "(the model's sweep line, or --from and --to) or change "
                  "link lengths so the input can move on",
               note, r.from * cli_input_factor(cm, r.input),
               r.to * cli_input_factor(cm, r.input),
               cli_input_unit(cm, r.input));
        else
          warn(w, "%s: the linkage could take either branch there; keep the "
                  "range short of it or change link lengths",
               note);
      } else {
        fprintf(f, LABEL "the sweep failed: %s\n", "motion",
                kl_solver_error(work));
        warn(w, "the sweep failed: %s", kl_solver_error(work));
      }
      if (st == KL_OK || st == KL_LIMIT || st == KL_ESINGULAR) {
        cli_range measured = r;
        cli_format_input(cm, r.input, rc.at, a, sizeof a);
        fprintf(f, LABEL "smallest condition estimate %.3g (at %s)\n",
                "conditioning", rc.rcond, a);
        if (st == KL_ESINGULAR) {
          /* measure up to just short of the change point */
          double span = r.to - r.from, part;
          measured.to = res.limit_input - 1e-6 * span;
          part = (measured.to - r.from) / span;
          measured.steps = part * r.steps < 1 ? 1 : (int)ceil(part * r.steps);
        }
        if (st != KL_ESINGULAR || (measured.to - r.from) * (r.to - r.from) > 0)
          print_ranges(f, cm, base, work, &measured, &res, w);
      }
      st = CLI_EXIT_OK;
    }
  }
  fprintf(f, "\nwarnings%s\n", w->count ? "" : ": none");
  for (i = 0; i < w->count; i++)
    fprintf(f, "  - %s\n", w->text[i]);
done:
  kl_solver_free(base);
  kl_solver_free(work);
  free(w);
  return st;
}

int cli_cmd_check(const cli_model *cm, const cli_options *o) {
  FILE *f = cli_open_output(o->output);
  int st, closed;
  if (f == NULL)
    return CLI_EXIT_OUTPUT;
  st = cli_check_report(f, cm, o);
  closed = cli_close_output(f, o->output);
  return st != CLI_EXIT_OK ? st : closed;
}
