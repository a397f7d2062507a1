/*
 * draw.c - the draw command: an SVG picture of the mechanism at chosen
 * positions, in model coordinates under one y-flipping transform, with the
 * paths its points trace over the sweep.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

#define CANVAS_WIDTH 860.0
#define MAX_HEIGHT 900.0
#define MARGIN 34.0
#define HEADER 58.0
#define FOOTER 46.0
#define JOINT_PX 5.5 /* joint marker radius */
#define BAR_PX 7.0   /* binary link width */
#define OUTLINE_PX 3.0 /* stroke of a plate-shaped link */
#define GHOST_OPACITY 0.3
#define JOINT_NAME_COLOUR "#8a8174"
#define MESH_VALUES 8 /* per coupling in a pose's mesh */

/* A position as drawn, every place global (from the library's frames). */
typedef struct {
  double *inputs;     /* library units */
  double *joint_xy;   /* 2 per joint */
  double *point_xy;   /* 2 per point */
  double *slide;      /* per joint (NaN for revolute) */
  double *outline_xy; /* 2 per outline point of every link, in turn */
  double *rail;       /* 4 per sliding joint: link a's frame (its origin,
                         and the cosine and sine of its angle), which
                         carries the slot's path */
  double *mesh;       /* MESH_VALUES per coupling: a gear pair's two pitch
                         circles, each its centre and the end of a radius
                         fixed to its gear; a rack's pinion the same, then
                         the rack's pitch point and its unit direction */
} pose;

typedef struct {
  int n;
  int stride, tail; /* keep every stride-th step; the last row is held */
  double *xy;    /* 2 per point per row */
  double *slide; /* per sliding joint per row */
  int npoints, nslides;
} paths;

typedef struct {
  int n;         /* points of the outline */
  int first;     /* where they start in a pose's outline_xy */
  double *local; /* 2 per point, the convex hull in the link's frame */
} outline;

typedef struct {
  double s, tx, ty; /* screen = (tx + s x, ty - s y) */
} view;

/* ---- gathering ---- */

typedef struct {
  paths *p;
  const cli_model *cm;
} path_sink;

/* Every row goes to slot n, kept (n grows) on every stride-th step, so
 * that the last row stays in slot n until the sweep ends. */
static int path_row(void *user, int step, const double *row) {
  path_sink *k = user;
  paths *p = k->p;
  int i;
  for (i = 0; i < p->npoints; i++) {
    p->xy[2 * (p->n * p->npoints + i)] =
        row[cli_row_at(k->cm, KL_QUANTITY_POINT_X, i)];
    p->xy[2 * (p->n * p->npoints + i) + 1] =
        row[cli_row_at(k->cm, KL_QUANTITY_POINT_Y, i)];
  }
  for (i = 0; i < p->nslides; i++)
    p->slide[p->n * p->nslides + i] =
        row[cli_row_at(k->cm, KL_QUANTITY_JOINT_SLIDE, k->cm->slides[i])];
  p->tail = step % p->stride != 0;
  if (!p->tail)
    p->n++;
  return 0;
}

static int pose_alloc(pose *q, const cli_model *cm, int outline_points) {
  size_t ni = (size_t)(cm->ninputs + 1), nj = (size_t)(cm->njoints + 1),
         np = (size_t)(cm->npoints + 1), no = (size_t)(outline_points + 1),
         ns = (size_t)(cm->nslides + 1),
         nc = (size_t)(kl_model_coupling_count(cm->model) + 1);
  q->inputs = malloc(ni * sizeof(double));
  q->joint_xy = malloc(2 * nj * sizeof(double));
  q->point_xy = malloc(2 * np * sizeof(double));
  q->slide = malloc(nj * sizeof(double));
  q->outline_xy = malloc(2 * no * sizeof(double));
  q->rail = malloc(4 * ns * sizeof(double));
  q->mesh = malloc(MESH_VALUES * nc * sizeof(double));
  return q->inputs && q->joint_xy && q->point_xy && q->slide &&
         q->outline_xy && q->rail && q->mesh;
}

static void pose_free(pose *q) {
  free(q->inputs);
  free(q->joint_xy);
  free(q->point_xy);
  free(q->slide);
  free(q->outline_xy);
  free(q->rail);
  free(q->mesh);
}

/* Where sliding joint `joint` is in cm->slides. */
static int slide_index(const cli_model *cm, int joint) {
  int k;
  for (k = 0; k < cm->nslides; k++)
    if (cm->slides[k] == joint)
      return k;
  return -1;
}

static void rail_point(const cli_model *cm, const pose *q, int k, double v,
                       double xy[2], double dir[2]);

/* The gear on revolute joint `joint` (on the link that is not the
 * carrier): its centre and the end of one radius fixed to it, so that its
 * turning shows. Returns +1 when the carrier is the joint's first link (the
 * gear's turn against the carrier is then the joint's angle), else -1. */
static int gear_take(const kl_solver *s, const kl_model *m, int joint,
                     int carrier, double radius, double out[4]) {
  int links[2], gear;
  double a[2], b[2], tip[2];
  kl_model_joint_links(m, joint, links, a, b);
  gear = links[0] == carrier ? 1 : 0;
  tip[0] = (gear ? b : a)[0] + fabs(radius);
  tip[1] = (gear ? b : a)[1];
  kl_link_to_global(s, links[gear], gear ? b : a, out);
  kl_link_to_global(s, links[gear], tip, out + 2);
  return gear ? 1 : -1;
}

/* Coupling k's pitch circles (and a rack's pitch point and direction) in
 * pose q, whose joints and rails are already taken. */
static void mesh_take(pose *q, const cli_model *cm, const kl_solver *s,
                      int k) {
  const kl_model *m = cm->model;
  double *out = q->mesh + MESH_VALUES * k, at[2], *d = out + 6, n[2];
  kl_coupling_info c;
  int rack_links[2], pinion_sense, rack_sense;
  c.size = sizeof c;
  kl_model_coupling(m, k, &c);
  if (c.kind == KL_COUPLING_GEAR) {
    gear_take(s, m, c.joint1, c.carrier, c.value1, out);
    gear_take(s, m, c.joint2, c.carrier, c.value2, out + 4);
    return;
  }
  if (c.kind != KL_COUPLING_RACK) {
    /* a ratio coupling has no pitch geometry to draw */
    memset(out, 0, MESH_VALUES * sizeof *out);
    return;
  }
  pinion_sense = gear_take(s, m, c.joint1, c.carrier, c.value1, out);
  kl_model_joint_links(m, c.joint2, rack_links, NULL, NULL);
  rack_sense = rack_links[0] == c.carrier ? 1 : -1;
  rail_point(cm, q, slide_index(cm, c.joint2), q->slide[c.joint2], at, d);
  /* Against the carrier, the rack runs along d at rack_sense times the
   * slide's rate and the pinion turns at pinion_sense times its joint's
   * rate; a pinion point at -rho n (n = d turned a quarter left) runs
   * along d at rho times the pinion's rate. The rolling condition
   * (slide = radius times turn) puts the pitch point at rho = pinion_sense
   * rack_sense radius. d becomes the way the rack runs as the slide grows. */
  n[0] = -d[1];
  n[1] = d[0];
  out[4] = out[0] - pinion_sense * rack_sense * c.value1 * n[0];
  out[5] = out[1] - pinion_sense * rack_sense * c.value1 * n[1];
  d[0] *= rack_sense;
  d[1] *= rack_sense;
}

static void pose_take(pose *q, const cli_model *cm, const outline *o,
                      const kl_solver *s) {
  const kl_model *m = cm->model;
  int i, k;
  for (i = 0; i < cm->ninputs; i++)
    q->inputs[i] = kl_input_value(s, i);
  for (i = 0; i < cm->njoints; i++) {
    kl_joint_position(s, i, q->joint_xy + 2 * i);
    q->slide[i] = kl_joint_slide(s, i);
  }
  for (i = 0; i < cm->npoints; i++)
    kl_point_position(s, i, q->point_xy + 2 * i);
  for (i = 1; i < cm->nlinks; i++)
    for (k = 0; k < o[i].n; k++)
      kl_link_to_global(s, i, o[i].local + 2 * k,
                        q->outline_xy + 2 * (o[i].first + k));
  for (k = 0; k < cm->nslides; k++) {
    int joint = cm->slides[k], links[2];
    static const double origin[2] = {0.0, 0.0}, unit[2] = {1.0, 0.0};
    double *rail = q->rail + 4 * k;
    kl_model_joint_links(m, joint, links, NULL, NULL);
    kl_link_to_global(s, links[0], origin, rail);
    kl_link_to_global(s, links[0], unit, rail + 2);
    rail[2] -= rail[0];
    rail[3] -= rail[1];
  }
  for (k = 0; k < kl_model_coupling_count(m); k++)
    mesh_take(q, cm, s, k);
}

/* ---- link outlines: convex hull of a link's joints and points ---- */

static double cross(const double *o, const double *a, const double *b) {
  return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);
}

static int by_xy(const void *pa, const void *pb) {
  const double *a = pa, *b = pb;
  if (a[0] != b[0])
    return a[0] < b[0] ? -1 : 1;
  if (a[1] != b[1])
    return a[1] < b[1] ? -1 : 1;
  return 0;
}

/* Andrew's monotone chain over n points (2 doubles each) in place; returns
 * the hull's size, its points first in `pts`, counter-clockwise. */
static int hull(double *pts, int n, double *out) {
  int i, k = 0, lower;
  qsort(pts, (size_t)n, 2 * sizeof(double), by_xy);
  for (i = 0; i < n; i++) { /* drop repeats */
    if (k > 0 && pts[2 * i] == pts[2 * (k - 1)] &&
        pts[2 * i + 1] == pts[2 * (k - 1) + 1])
      continue;
    pts[2 * k] = pts[2 * i];
    pts[2 * k + 1] = pts[2 * i + 1];
    k++;
  }
  n = k;
  if (n <= 2) {
    memcpy(out, pts, (size_t)n * 2 * sizeof(double));
    return n;
  }
  k = 0;
  for (i = 0; i < n; i++) {
    while (k >= 2 && cross(out + 2 * (k - 2), out + 2 * (k - 1), pts + 2 * i) <= 0)
      k--;
    out[2 * k] = pts[2 * i];
    out[2 * k + 1] = pts[2 * i + 1];
    k++;
  }
  lower = k + 1;
  for (i = n - 2; i >= 0; i--) {
    while (k >= lower &&
           cross(out + 2 * (k - 2), out + 2 * (k - 1), pts + 2 * i) <= 0)
      k--;
    out[2 * k] = pts[2 * i];
    out[2 * k + 1] = pts[2 * i + 1];
    k++;
  }
  return k - 1; /* the last repeats the first */
}

/* The outline of every moving link; returns their total number of points,
 * or -1 when memory runs out. */
static int make_outlines(const cli_model *cm, outline *o) {
  const kl_model *m = cm->model;
  int cap = 2 * (cm->njoints + cm->npoints) + 2, l, j, p, total = 0;
  double *pts = malloc((size_t)cap * 2 * sizeof *pts);
  if (pts == NULL)
    return -1;
  for (l = 1; l < cm->nlinks; l++) {
    int n = 0;
    for (j = 0; j < cm->njoints; j++) {
      int links[2];
      double a[2], b[2];
      kl_model_joint_links(m, j, links, a, b);
      if (links[0] == l) {
        pts[2 * n] = a[0];
        pts[2 * n + 1] = a[1];
        n++;
      }
      if (links[1] == l) {
        pts[2 * n] = b[0];
        pts[2 * n + 1] = b[1];
        n++;
      }
    }
    for (p = 0; p < cm->npoints; p++) {
      double xy[2];
      if (kl_model_point_link(m, p, xy) == l) {
        pts[2 * n] = xy[0];
        pts[2 * n + 1] = xy[1];
        n++;
      }
    }
    o[l].local = malloc((size_t)(n + 2) * 2 * sizeof(double));
    if (o[l].local == NULL) {
      free(pts);
      return -1;
    }
    o[l].n = n > 0 ? hull(pts, n, o[l].local) : 0;
    o[l].first = total;
    total += o[l].n;
  }
  free(pts);
  return total;
}

/* ---- bounds and the view ---- */

typedef struct {
  double x0, y0, x1, y1;
  int empty;
} box;

static void grow(box *b, double x, double y) {
  if (!isfinite(x) || !isfinite(y))
    return;
  if (b->empty) {
    b->x0 = b->x1 = x;
    b->y0 = b->y1 = y;
    b->empty = 0;
    return;
  }
  if (x < b->x0)
    b->x0 = x;
  if (x > b->x1)
    b->x1 = x;
  if (y < b->y0)
    b->y0 = y;
  if (y > b->y1)
    b->y1 = y;
}

/* Whether a sliding joint's slot is curved (an arc or curve slot). */
static int is_curved(const cli_model *cm, int joint) {
  int kind = kl_model_joint_kind(cm->model, joint);
  return kind == KL_JOINT_ARC_SLOT || kind == KL_JOINT_CURVE_SLOT;
}

/* The stretch of a guide to draw: a curved slot whole (the circle, the
 * curve from end to end); a straight one over every slide seen, plus a
 * margin. */
static void rail_span(const cli_model *cm, const pose *poses, int nposes,
                      const paths *p, int slide_index, double pad,
                      double *lo, double *hi) {
  int joint = cm->slides[slide_index], k;
  if (kl_model_joint_kind(cm->model, joint) == KL_JOINT_ARC_SLOT) {
    *lo = 0.0;
    *hi = 2.0 * CLI_PI * kl_model_slot_radius(cm->model, joint);
    return;
  }
  if (kl_model_joint_kind(cm->model, joint) == KL_JOINT_CURVE_SLOT) {
    int n = kl_model_curve_count(cm->model, joint);
    *lo = 0.0;
    *hi = kl_model_curve_closed(cm->model, joint) ? n : n - 1;
    return;
  }
  *lo = *hi = poses[0].slide[joint];
  for (k = 1; k < nposes; k++) {
    double v = poses[k].slide[joint];
    *lo = v < *lo ? v : *lo;
    *hi = v > *hi ? v : *hi;
  }
  for (k = 0; k < p->n; k++) {
    double v = p->slide[k * p->nslides + slide_index];
    *lo = v < *lo ? v : *lo;
    *hi = v > *hi ? v : *hi;
  }
  *lo -= pad;
  *hi += pad;
}

/* The point of sliding joint k's slot at slide v, for pose q, and the
 * unit direction the slide grows in there (dir may be NULL). */
static void rail_point(const cli_model *cm, const pose *q, int k, double v,
                       double xy[2], double dir[2]) {
  const double *rail = q->rail + 4 * k;
  double path[6], len;
  kl_model_slot_point(cm->model, cm->slides[k], v, path);
  xy[0] = rail[0] + rail[2] * path[0] - rail[3] * path[1];
  xy[1] = rail[1] + rail[3] * path[0] + rail[2] * path[1];
  if (dir == NULL)
    return;
  len = hypot(path[2], path[3]);
  dir[0] = (rail[2] * path[2] - rail[3] * path[3]) / len;
  dir[1] = (rail[3] * path[2] + rail[2] * path[3]) / len;
}

/* ---- writing ---- */

static void put_xy(FILE *f, const double xy[2]) {
  fprintf(f, "%.9g,%.9g ", xy[0], xy[1]);
}

static void draw_ground_pivot(FILE *f, const double *xy, double u) {
  double x = xy[0], y = xy[1], h = 2.6 * u, w = 1.7 * u;
  int k;
  fprintf(f,
          "<polygon points=\"%.9g,%.9g %.9g,%.9g %.9g,%.9g\" fill=\"#d9d2c3\" "
          "stroke=\"%s\" stroke-width=\"%.9g\" stroke-linejoin=\"round\"/>\n",
          x, y, x - w, y - h, x + w, y - h, SVG_INK, 0.25 * u);
  fprintf(f,
          "<line x1=\"%.9g\" y1=\"%.9g\" x2=\"%.9g\" y2=\"%.9g\" "
          "stroke=\"%s\" stroke-width=\"%.9g\"/>\n",
          x - 1.6 * w, y - h, x + 1.6 * w, y - h, SVG_INK, 0.3 * u);
  for (k = 0; k < 6; k++) {
    double hx = x - 1.6 * w + (k + 0.5) * (3.2 * w / 6);
    fprintf(f,
            "<line x1=\"%.9g\" y1=\"%.9g\" x2=\"%.9g\" y2=\"%.9g\" "
            "stroke=\"%s\" stroke-width=\"%.9g\"/>\n",
            hx, y - h, hx - 0.7 * u, y - h - 0.9 * u, SVG_INK, 0.18 * u);
  }
}

/* A curved slot as a channel: a dark band with a light core, sampled
 * finely enough to look smooth. */
static void draw_channel(FILE *f, const cli_model *cm, const pose *q, int k,
                         double lo, double hi, double u) {
  enum { SAMPLES = 240 };
  int pass, i;
  for (pass = 0; pass < 2; pass++) {
    fprintf(f, "<polyline class=\"slot\" points=\"");
    for (i = 0; i <= SAMPLES; i++) {
      double xy[2];
      rail_point(cm, q, k, lo + (hi - lo) * i / SAMPLES, xy, NULL);
      put_xy(f, xy);
    }
    fprintf(f,
            "\" fill=\"none\" stroke=\"%s\" stroke-width=\"%.9g\" "
            "stroke-linecap=\"round\" stroke-linejoin=\"round\"/>\n",
            pass == 0 ? SVG_INK : "#fffdf7", (pass == 0 ? 1.9 : 1.3) * u);
  }
}

/* A cam (a 'cam' line): its surface as a plate on the cam link, the pitch
 * curve the roller centre runs along as a thin dashed line, and the roller
 * about the pin. Returns 0, or -1 (nothing drawn) when memory runs out. */
static int draw_cam(FILE *f, const cli_model *cm, const pose *q, int k,
                    double u) {
  enum { SAMPLES = 360 };
  int joint = cm->slides[k], bearing, links[2], pass, i;
  double centre[2], at_zero[KL_CAM_SAMPLE_SIZE], roller, pin[2];
  double *surface = malloc(2 * SAMPLES * sizeof *surface);
  const double *rail = q->rail + 4 * k;
  kl_cam *cam = kl_cam_new();
  bearing = kl_model_cam_bearing(cm->model, joint);
  kl_model_joint_links(cm->model, joint, links, NULL, NULL);
  if (surface == NULL || cam == NULL ||
      kl_cam_set_from_model(cam, cm->model, joint) != KL_OK) {
    free(surface);
    kl_cam_free(cam);
    return -1;
  }
  /* the cam's centre is the bearing's point on the cam link */
  {
    int bl[2];
    double ba[2], bb[2];
    kl_model_joint_links(cm->model, bearing, bl, ba, bb);
    memcpy(centre, bl[0] == links[0] ? ba : bb, sizeof centre);
  }
  kl_cam_outline(cam, SAMPLES, NULL, surface);
  kl_cam_sample(cam, 0.0, at_zero);
  roller = hypot(at_zero[KL_CAM_PITCH_X] - at_zero[KL_CAM_SURFACE_X],
                 at_zero[KL_CAM_PITCH_Y] - at_zero[KL_CAM_SURFACE_Y]);
  fprintf(f, "<polygon class=\"cam\" points=\"");
  for (i = 0; i < SAMPLES; i++) {
    double x = centre[0] + surface[2 * i], y = centre[1] + surface[2 * i + 1],
           xy[2];
    xy[0] = rail[0] + rail[2] * x - rail[3] * y;
    xy[1] = rail[1] + rail[3] * x + rail[2] * y;
    put_xy(f, xy);
  }
  fprintf(f,
          "\" fill=\"#e6dcc8\" stroke=\"%s\" stroke-width=\"%.9g\" "
          "stroke-linejoin=\"round\"/>\n",
          SVG_INK, 0.3 * u);
  fprintf(f, "<polyline class=\"pitch\" points=\"");
  for (pass = 0; pass <= SAMPLES; pass++) {
    double xy[2];
    rail_point(cm, q, k, (double)kl_model_curve_count(cm->model, joint) *
                             pass / SAMPLES,
               xy, NULL);
    put_xy(f, xy);
  }
  fprintf(f,
          "\" fill=\"none\" stroke=\"%s\" stroke-width=\"%.9g\" "
          "stroke-dasharray=\"1.2,0.8\"/>\n",
          SVG_MUTED, 0.15 * u);
  rail_point(cm, q, k, q->slide[joint], pin, NULL);
  fprintf(f,
          "<circle class=\"roller\" cx=\"%.9g\" cy=\"%.9g\" r=\"%.9g\" "
          "fill=\"#fffdf7\" stroke=\"%s\" stroke-width=\"%.9g\"/>\n",
          pin[0], pin[1], roller, SVG_INK, 0.3 * u);
  free(surface);
  kl_cam_free(cam);
  return 0;
}

/* Draws a guide line; a rail on ground gets hatching on the side away
 * from `centre`, where the linkage is not. */
static void draw_rail(FILE *f, const cli_model *cm, const pose *q,
                      int slide_index, double lo, double hi, double u,
                      int on_ground, const double centre[2]) {
  double p0[2], p1[2], dx, dy, len, nx, ny;
  int k, marks;
  if (kl_model_cam_bearing(cm->model, cm->slides[slide_index]) >= 0) {
    if (draw_cam(f, cm, q, slide_index, u) == 0)
      return;
    cli_error("out of memory: the cam at %s is drawn as its pitch curve "
              "only",
              cm->joint_names[cm->slides[slide_index]]);
  }
  if (is_curved(cm, cm->slides[slide_index])) {
    draw_channel(f, cm, q, slide_index, lo, hi, u);
    return;
  }
  rail_point(cm, q, slide_index, lo, p0, NULL);
  rail_point(cm, q, slide_index, hi, p1, NULL);
  fprintf(f,
          "<line x1=\"%.9g\" y1=\"%.9g\" x2=\"%.9g\" y2=\"%.9g\" stroke=\"%s\" "
          "stroke-width=\"%.9g\" stroke-linecap=\"round\"%s/>\n",
          p0[0], p0[1], p1[0], p1[1], SVG_INK, (on_ground ? 0.3 : 0.22) * u,
          on_ground ? "" : " stroke-dasharray=\"1.2,0.6\"");
  if (!on_ground)
    return;
  dx = p1[0] - p0[0];
  dy = p1[1] - p0[1];
  len = hypot(dx, dy);
  if (len == 0)
    return;
  nx = dy / len;
  ny = -dx / len;
  if (nx * (centre[0] - p0[0]) + ny * (centre[1] - p0[1]) > 0) {
    nx = -nx;
    ny = -ny;
  }
  marks = (int)(len / (1.4 * u));
  if (marks > 400)
    marks = 400;
  for (k = 0; k <= marks; k++) {
    double t = marks ? (double)k / marks : 0.0;
    double x = p0[0] + t * dx + nx * 1.2 * u, y = p0[1] + t * dy + ny * 1.2 * u;
    fprintf(f,
            "<line x1=\"%.9g\" y1=\"%.9g\" x2=\"%.9g\" y2=\"%.9g\" "
            "stroke=\"%s\" stroke-width=\"%.9g\"/>\n",
            x - nx * 1.2 * u, y - ny * 1.2 * u, x - 0.8 * u * dx / len,
            y - 0.8 * u * dy / len, SVG_INK, 0.16 * u);
  }
}

/* The link a coupled joint's gear (or rack) is on: not the carrier. */
static int coupled_link(const kl_model *m, int joint, int carrier) {
  int links[2];
  kl_model_joint_links(m, joint, links, NULL, NULL);
  return links[0] == carrier ? links[1] : links[0];
}

static const char *link_colour(int link) {
  return link == KL_GROUND ? SVG_INK : svg_colour(link - 1);
}

/* The ends of rack coupling c's pitch line in pose q: the stretch of the
 * rack that passes the pinion over every slide drawn, and a pinion radius
 * beyond either end. */
static void rack_ends(const cli_model *cm, const pose *q, const pose *poses,
                      int nposes, const paths *p, const kl_coupling_info *c,
                      int coupling, double ends[4]) {
  const double *g = q->mesh + MESH_VALUES * coupling;
  double lo, hi, sq = q->slide[c->joint2], pad = fabs(c->value1);
  rail_span(cm, poses, nposes, p, slide_index(cm, c->joint2), 0.0, &lo, &hi);
  ends[0] = g[4] + (sq - lo + pad) * g[6];
  ends[1] = g[5] + (sq - lo + pad) * g[7];
  ends[2] = g[4] + (sq - hi - pad) * g[6];
  ends[3] = g[5] + (sq - hi - pad) * g[7];
}

/* A gear's pitch circle as a chain line (the drafting convention for pitch
 * circles; common practice, no source), with the radius that turns with
 * it. g: its centre and that radius's end. */
static void draw_pitch_circle(FILE *f, const cli_model *cm, int joint,
                              int link, const double *g, double u) {
  const char *colour = link_colour(link);
  fprintf(f, "<circle class=\"pitch-circle\" data-joint=\"");
  svg_escaped(f, cm->joint_names[joint]);
  fprintf(f,
          "\" cx=\"%.17g\" cy=\"%.17g\" r=\"%.17g\" fill=\"none\" "
          "stroke=\"%s\" stroke-width=\"%.9g\" "
          "stroke-dasharray=\"%.9g,%.9g,%.9g,%.9g\"/>\n",
          g[0], g[1], hypot(g[2] - g[0], g[3] - g[1]), colour, 0.3 * u,
          2.4 * u, 0.5 * u, 0.4 * u, 0.5 * u);
  fprintf(f, "<line class=\"pitch-radius\" data-joint=\"");
  svg_escaped(f, cm->joint_names[joint]);
  fprintf(f,
          "\" x1=\"%.17g\" y1=\"%.17g\" x2=\"%.17g\" y2=\"%.17g\" "
          "stroke=\"%s\" stroke-width=\"%.9g\"/>\n",
          g[0], g[1], g[2], g[3], colour, 0.2 * u);
}

/* Gears as pitch circles, racks as pitch lines (chain lines too). */
static void draw_meshes(FILE *f, const cli_model *cm, const pose *q,
                        const pose *poses, int nposes, const paths *p,
                        double u) {
  const kl_model *m = cm->model;
  int k;
  for (k = 0; k < kl_model_coupling_count(m); k++) {
    const double *g = q->mesh + MESH_VALUES * k;
    kl_coupling_info c;
    double ends[4];
    c.size = sizeof c;
    kl_model_coupling(m, k, &c);
    if (c.kind == KL_COUPLING_RATIO)
      continue;
    draw_pitch_circle(f, cm, c.joint1, coupled_link(m, c.joint1, c.carrier),
                      g, u);
    if (c.kind == KL_COUPLING_GEAR) {
      draw_pitch_circle(f, cm, c.joint2,
                        coupled_link(m, c.joint2, c.carrier), g + 4, u);
      continue;
    }
    rack_ends(cm, q, poses, nposes, p, &c, k, ends);
    fprintf(f, "<line class=\"pitch-line\" data-joint=\"");
    svg_escaped(f, cm->joint_names[c.joint2]);
    fprintf(f,
            "\" x1=\"%.17g\" y1=\"%.17g\" x2=\"%.17g\" y2=\"%.17g\" "
            "stroke=\"%s\" stroke-width=\"%.9g\" "
            "stroke-dasharray=\"%.9g,%.9g,%.9g,%.9g\"/>\n",
            ends[0], ends[1], ends[2], ends[3],
            link_colour(coupled_link(m, c.joint2, c.carrier)), 0.3 * u,
            2.4 * u, 0.5 * u, 0.4 * u, 0.5 * u);
  }
}

static void draw_pose(FILE *f, const cli_model *cm, const pose *q,
                      const outline *o, const pose *poses, int nposes,
                      const paths *p, double u, int main_pose) {
  const kl_model *m = cm->model;
  int l, j, k, i;
  fprintf(f, "<g class=\"pose\" data-inputs=\"");
  for (i = 0; i < cm->ninputs; i++)
    fprintf(f, "%s%.17g", i ? " " : "", q->inputs[i]);
  if (main_pose)
    fprintf(f, "\">\n");
  else
    fprintf(f, "\" opacity=\"%g\">\n", GHOST_OPACITY);
  for (k = 0; k < cm->nslides; k++) {
    int links[2];
    double lo, hi;
    kl_model_joint_links(m, cm->slides[k], links, NULL, NULL);
    if (links[0] == KL_GROUND)
      continue;
    rail_span(cm, poses, nposes, p, k, 3 * u, &lo, &hi);
    draw_rail(f, cm, q, k, lo, hi, u, 0, NULL);
  }
  for (l = 1; l < cm->nlinks; l++) {
    const char *colour = svg_colour(l - 1);
    if (o[l].n >= 3) {
      fprintf(f, "<polygon class=\"link\" data-link=\"");
      svg_escaped(f, cm->link_names[l]);
      fprintf(f, "\" points=\"");
      for (k = 0; k < o[l].n; k++)
        put_xy(f, q->outline_xy + 2 * (o[l].first + k));
      fprintf(f,
              "\" fill=\"%s\" fill-opacity=\"0.22\" stroke=\"%s\" "
              "stroke-width=\"%.9g\" stroke-linejoin=\"round\"/>\n",
              colour, colour, OUTLINE_PX / JOINT_PX * u);
    } else if (o[l].n == 2) {
      const double *xy = q->outline_xy + 2 * o[l].first;
      fprintf(f, "<line class=\"link\" data-link=\"");
      svg_escaped(f, cm->link_names[l]);
      fprintf(f,
              "\" x1=\"%.9g\" y1=\"%.9g\" x2=\"%.9g\" y2=\"%.9g\" "
              "stroke=\"%s\" stroke-width=\"%.9g\" stroke-linecap=\"round\"/>\n",
              xy[0], xy[1], xy[2], xy[3], colour, BAR_PX / JOINT_PX * u);
    }
  }
  draw_meshes(f, cm, q, poses, nposes, p, u);
  /* slider blocks of prismatic joints, along their axis */
  for (k = 0; k < cm->nslides; k++) {
    int joint = cm->slides[k], links[2];
    double at[2], dir[2], c, s, cx, cy;
    double hl = 2.6 * u, hw = 1.6 * u;
    if (kl_model_joint_kind(m, joint) != KL_JOINT_PRISMATIC)
      continue;
    rail_point(cm, q, k, q->slide[joint], at, dir);
    c = dir[0];
    s = dir[1];
    kl_model_joint_links(m, joint, links, NULL, NULL);
    cx = q->joint_xy[2 * joint];
    cy = q->joint_xy[2 * joint + 1];
    fprintf(f,
            "<polygon class=\"block\" points=\"%.9g,%.9g %.9g,%.9g %.9g,%.9g "
            "%.9g,%.9g\" fill=\"%s\" stroke=\"%s\" stroke-width=\"%.9g\"/>\n",
            cx - hl * c + hw * s, cy - hl * s - hw * c, cx + hl * c + hw * s,
            cy + hl * s - hw * c, cx + hl * c - hw * s, cy + hl * s + hw * c,
            cx - hl * c - hw * s, cy - hl * s + hw * c,
            svg_colour(links[1] - 1), SVG_INK, 0.25 * u);
  }
  for (j = 0; j < cm->njoints; j++) {
    fprintf(f, "<circle class=\"joint\" data-joint=\"");
    svg_escaped(f, cm->joint_names[j]);
    fprintf(f,
            "\" cx=\"%.17g\" cy=\"%.17g\" r=\"%.9g\" fill=\"#fffdf7\" "
            "stroke=\"%s\" stroke-width=\"%.9g\"><title>",
            q->joint_xy[2 * j], q->joint_xy[2 * j + 1],
            kl_model_joint_kind(m, j) == KL_JOINT_REVOLUTE ? u : 0.6 * u, SVG_INK,
            0.3 * u);
    svg_escaped(f, cm->joint_names[j]);
    fprintf(f, "</title></circle>\n");
  }
  for (i = 0; i < cm->npoints; i++) {
    fprintf(f, "<circle class=\"point\" data-point=\"");
    svg_escaped(f, cm->point_names[i]);
    fprintf(f,
            "\" cx=\"%.17g\" cy=\"%.17g\" r=\"%.9g\" fill=\"%s\" "
            "stroke=\"#fffdf7\" stroke-width=\"%.9g\"/>\n",
            q->point_xy[2 * i], q->point_xy[2 * i + 1], 0.8 * u,
            svg_colour(i + 4), 0.25 * u);
  }
  fprintf(f, "</g>\n");
}

static void screen(const view *v, const double xy[2], double *sx, double *sy) {
  *sx = v->tx + v->s * xy[0];
  *sy = v->ty - v->s * xy[1];
}

/* Coordinate axes along the left and bottom edges of the drawing box b,
 * with ticks at a round step and their values in the model's length unit,
 * so that a position (a point's path above all) can be read off the
 * picture. Drawn first, under the linkage. */
static void draw_axes(FILE *f, const cli_model *cm, const view *v,
                      const box *b) {
  double step = svg_round_125((b->x1 - b->x0) / 6, 1), c[2], left, bottom,
         right, top, t;
  char text[64];
  c[0] = b->x0;
  c[1] = b->y0;
  screen(v, c, &left, &bottom);
  c[0] = b->x1;
  c[1] = b->y1;
  screen(v, c, &right, &top);
  fprintf(f,
          "<g class=\"axes\" stroke=\"%s\" stroke-width=\"0.8\" "
          "fill=\"none\">\n"
          "<polyline points=\"%.2f,%.2f %.2f,%.2f %.2f,%.2f\"/>\n",
          SVG_MUTED, left, top, left, bottom, right, bottom);
  for (t = ceil(b->x0 / step) * step; t <= b->x1; t += step) {
    double sx = v->tx + v->s * t;
    fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\"/>\n",
            sx, bottom, sx, bottom - 5);
  }
  for (t = ceil(b->y0 / step) * step; t <= b->y1; t += step) {
    double sy = v->ty - v->s * t;
    fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\"/>\n",
            left, sy, left + 5, sy);
  }
  fprintf(f, "</g>\n");
  /* values inside the box, beside their ticks; 0 shown as 0, not -0 */
  for (t = ceil(b->x0 / step) * step; t <= b->x1; t += step) {
    snprintf(text, sizeof text, "%g", fabs(t) < 1e-9 * step ? 0.0 : t);
    svg_text(f, v->tx + v->s * t, bottom - 8, 9, SVG_MUTED,
             "text-anchor=\"middle\"", text);
  }
  for (t = ceil(b->y0 / step) * step; t <= b->y1; t += step) {
    snprintf(text, sizeof text, "%g", fabs(t) < 1e-9 * step ? 0.0 : t);
    svg_text(f, left + 8, v->ty - v->s * t + 3, 9, SVG_MUTED, NULL, text);
  }
  snprintf(text, sizeof text, "x (%s)", cm->length_unit);
  svg_text(f, right, bottom + 12, 10, SVG_MUTED, "text-anchor=\"end\"", text);
  snprintf(text, sizeof text, "y (%s)", cm->length_unit);
  svg_text(f, left + 8, top + 10, 10, SVG_MUTED, NULL, text);
}

/* Where the picture goes on the page. */
typedef struct {
  box b;
  view v;
  double width, height, u, centre[2];
} layout;

static int finite_xy(const double *xy, int n) {
  int k;
  for (k = 0; k < 2 * n; k++)
    if (!isfinite(xy[k]))
      return 0;
  return 1;
}

/* Fits every position and path to the page. Returns 0, or -1 when a
 * coordinate, the picture's extent or its scale is not a finite number:
 * no SVG may hold an inf or a nan. */
static int lay_out(const cli_model *cm, const pose *poses, int nposes,
                   const paths *p, const outline *o, int outline_points,
                   layout *L) {
  const kl_model *m = cm->model;
  box b;
  view v;
  double draw_w, draw_h, u;
  int k, i, j;
  for (k = 0; k < nposes; k++)
    if (!finite_xy(poses[k].joint_xy, cm->njoints) ||
        !finite_xy(poses[k].point_xy, cm->npoints) ||
        !finite_xy(poses[k].outline_xy, outline_points) ||
        !finite_xy(poses[k].rail, 2 * cm->nslides) ||
        !finite_xy(poses[k].mesh,
                   MESH_VALUES / 2 * kl_model_coupling_count(m)))
      return -1;
  if (!finite_xy(p->xy, p->n * p->npoints))
    return -1;
  b.empty = 1;
  b.x0 = b.y0 = b.x1 = b.y1 = 0;
  for (k = 0; k < nposes; k++) {
    for (j = 0; j < cm->njoints; j++)
      grow(&b, poses[k].joint_xy[2 * j], poses[k].joint_xy[2 * j + 1]);
    for (i = 0; i < cm->npoints; i++)
      grow(&b, poses[k].point_xy[2 * i], poses[k].point_xy[2 * i + 1]);
    for (i = 1; i < cm->nlinks; i++)
      for (j = 0; j < o[i].n; j++) {
        const double *xy = poses[k].outline_xy + 2 * (o[i].first + j);
        grow(&b, xy[0], xy[1]);
      }
  }
  for (k = 0; k < p->n * p->npoints; k++)
    grow(&b, p->xy[2 * k], p->xy[2 * k + 1]);
  /* curved slots are drawn whole: room for them in every position */
  for (i = 0; i < cm->nslides; i++) {
    double lo, hi, xy[2];
    if (!is_curved(cm, cm->slides[i]))
      continue;
    rail_span(cm, poses, nposes, p, i, 0.0, &lo, &hi);
    for (k = 0; k < nposes; k++)
      for (j = 0; j <= 64; j++) {
        rail_point(cm, &poses[k], i, lo + (hi - lo) * j / 64, xy, NULL);
        grow(&b, xy[0], xy[1]);
      }
  }
  /* pitch circles and pitch lines */
  for (i = 0; i < kl_model_coupling_count(m); i++) {
    kl_coupling_info c;
    c.size = sizeof c;
    kl_model_coupling(m, i, &c);
    for (k = 0; k < nposes && c.kind != KL_COUPLING_RATIO; k++) {
      const double *g = poses[k].mesh + MESH_VALUES * i;
      double ends[4];
      for (j = 0; j < (c.kind == KL_COUPLING_GEAR ? 2 : 1); j++) {
        double r = hypot(g[4 * j + 2] - g[4 * j], g[4 * j + 3] - g[4 * j + 1]);
        grow(&b, g[4 * j] - r, g[4 * j + 1] - r);
        grow(&b, g[4 * j] + r, g[4 * j + 1] + r);
      }
      if (c.kind == KL_COUPLING_RACK) {
        rack_ends(cm, &poses[k], poses, nposes, p, &c, i, ends);
        grow(&b, ends[0], ends[1]);
        grow(&b, ends[2], ends[3]);
      }
    }
  }
  if (b.empty) {
    b.x0 = b.y0 = -1;
    b.x1 = b.y1 = 1;
  }
  if (b.x1 - b.x0 < 1e-9 * (1 + fabs(b.x0)) &&
      b.y1 - b.y0 < 1e-9 * (1 + fabs(b.y0))) {
    double pad = kl_model_scale(m);
    b.x0 -= pad;
    b.x1 += pad;
    b.y0 -= pad;
    b.y1 += pad;
  }
  /* room for ground symbols and rails below and beside the linkage */
  {
    double ext = fmax(b.x1 - b.x0, b.y1 - b.y0), pad = 0.08 * ext;
    b.x0 -= pad;
    b.x1 += pad;
    b.y0 -= pad;
    b.y1 += pad;
  }
  /* the extent and the scale must be numbers before anything is divided
   * by them */
  if (!isfinite(b.x1 - b.x0) || !isfinite(b.y1 - b.y0))
    return -1;
  L->width = CANVAS_WIDTH;
  draw_w = L->width - 2 * MARGIN;
  v.s = draw_w / (b.x1 - b.x0);
  draw_h = v.s * (b.y1 - b.y0);
  if (draw_h + HEADER + FOOTER > MAX_HEIGHT) {
    draw_h = MAX_HEIGHT - HEADER - FOOTER;
    v.s = draw_h / (b.y1 - b.y0);
  }
  if (!(v.s > 0) || !isfinite(v.s))
    return -1;
  L->height = HEADER + draw_h + FOOTER;
  v.tx = MARGIN + 0.5 * (draw_w - v.s * (b.x1 - b.x0)) - v.s * b.x0;
  v.ty = HEADER + v.s * b.y1;
  u = JOINT_PX / v.s; /* one joint radius, in model units */
  L->b = b;
  L->v = v;
  L->u = u;
  L->centre[0] = 0.5 * (b.x0 + b.x1);
  L->centre[1] = 0.5 * (b.y0 + b.y1);
  /* the offsets and the farthest rail or marker must be numbers */
  if (!isfinite(v.tx) || !isfinite(v.ty) || !isfinite(u) ||
      !isfinite(fmax(fabs(b.x0), fabs(b.x1)) + 1000 * u) ||
      !isfinite(fmax(fabs(b.y0), fabs(b.y1)) + 1000 * u))
    return -1;
  return 0;
}

static void write_svg(FILE *f, const cli_model *cm, const pose *poses,
                      int nposes, const paths *p, const outline *o,
                      const cli_range *r, int have_range, const layout *L) {
  const kl_model *m = cm->model;
  box b = L->b;
  view v = L->v;
  double width = L->width, height = L->height, u = L->u, bar, bx, by;
  const double *centre = L->centre;
  char text[320];
  int k, i, j;

  svg_begin(f, width, height, SVG_PAPER);
  svg_text(f, MARGIN, 26, 17, SVG_INK, "font-weight=\"bold\"", cm->label);
  svg_text_open(f, MARGIN, 45, 12, SVG_MUTED, NULL);
  if (cm->ninputs == 1) {
    svg_escaped(f, cli_input_name(cm, 0));
    fprintf(f, " at");
    for (k = 0; k < nposes; k++)
      fprintf(f, "%s%.6g", k ? ", " : " ",
              poses[k].inputs[0] * cli_input_factor(cm, 0));
    fprintf(f, " %s", cli_input_unit(cm, 0));
  } else {
    fprintf(f, "%s", nposes > 1 ? "positions" : "position");
    for (k = 0; k < nposes; k++) {
      fprintf(f, "%s", k ? "; " : " ");
      for (i = 0; i < cm->ninputs; i++) {
        cli_format_input(cm, i, poses[k].inputs[i], text, sizeof text);
        fprintf(f, "%s", i ? ", " : "");
        svg_escaped(f, text);
      }
      if (cm->ninputs == 0)
        fprintf(f, "the only one");
    }
  }
  if (nposes > 1)
    fprintf(f, " (the first in full colour)");
  if (have_range && p->n > 1 && cm->npoints > 0) {
    fprintf(f, "; paths over ");
    svg_escaped(f, cli_input_name(cm, r->input));
    fprintf(f, " %.6g to %.6g %s", r->from * cli_input_factor(cm, r->input),
            r->to * cli_input_factor(cm, r->input),
            cli_input_unit(cm, r->input));
  }
  fprintf(f, "</text>\n");
  draw_axes(f, cm, &v, &b);

  fprintf(f,
          "<g class=\"model\" transform=\"matrix(%.17g 0 0 %.17g %.17g "
          "%.17g)\">\n",
          v.s, -v.s, v.tx, v.ty);
  /* ground: rails and pivots, the same in every position */
  for (k = 0; k < cm->nslides; k++) {
    int links[2];
    double lo, hi;
    kl_model_joint_links(m, cm->slides[k], links, NULL, NULL);
    if (links[0] != KL_GROUND)
      continue;
    rail_span(cm, poses, nposes, p, k, 3 * u, &lo, &hi);
    draw_rail(f, cm, &poses[0], k, lo, hi, u, 1, centre);
  }
  for (j = 0; j < cm->njoints; j++) {
    int links[2];
    double a[2], bb[2];
    kl_model_joint_links(m, j, links, a, bb);
    if (kl_model_joint_kind(m, j) != KL_JOINT_REVOLUTE)
      continue;
    if (links[0] == KL_GROUND)
      draw_ground_pivot(f, a, u);
    else if (links[1] == KL_GROUND)
      draw_ground_pivot(f, bb, u);
  }
  for (i = 0; i < p->npoints && p->n > 1; i++) {
    fprintf(f, "<polyline class=\"path\" data-point=\"");
    svg_escaped(f, cm->point_names[i]);
    fprintf(f, "\" fill=\"none\" stroke=\"%s\" stroke-width=\"%.9g\" "
               "stroke-dasharray=\"%.9g,%.9g\" points=\"",
            svg_colour(i + 4), 0.28 * u, 1.0 * u, 0.5 * u);
    for (k = 0; k < p->n; k++)
      put_xy(f, p->xy + 2 * (k * p->npoints + i));
    fprintf(f, "\"/>\n");
  }
  for (k = nposes - 1; k >= 0; k--)
    draw_pose(f, cm, &poses[k], o, poses, nposes, p, u, k == 0);
  fprintf(f, "</g>\n");

  /* names beside the first position, in screen coordinates */
  for (i = 0; i < cm->npoints; i++) {
    double sx, sy;
    screen(&v, poses[0].point_xy + 2 * i, &sx, &sy);
    svg_text(f, sx + 8, sy - 7, 12, svg_colour(i + 4), "font-style=\"italic\"",
             cm->point_names[i]);
  }
  for (j = 0; j < cm->njoints; j++) {
    double sx, sy, ox, oy;
    int below = 0; /* joints drawn at the same spot get their names stacked */
    screen(&v, poses[0].joint_xy + 2 * j, &sx, &sy);
    for (i = 0; i < j; i++) {
      screen(&v, poses[0].joint_xy + 2 * i, &ox, &oy);
      if (fabs(ox - sx) < 2 && fabs(oy - sy) < 2)
        below++;
    }
    svg_text(f, sx + 7, sy + 15 + 11 * below, 10, JOINT_NAME_COLOUR, NULL,
             cm->joint_names[j]);
  }
  /* footer: a scale bar and the key to the paths */
  bar = svg_round_125((b.x1 - b.x0) / 5, 0);
  bx = width - MARGIN - bar * v.s;
  by = height - 20;
  fprintf(f,
          "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" stroke=\"%s\" "
          "stroke-width=\"3\"/>\n",
          bx, by, bx + bar * v.s, by, SVG_INK);
  snprintf(text, sizeof text, "%g %s", bar, cm->length_unit);
  svg_text(f, bx + 0.5 * bar * v.s, by - 7, 11, SVG_INK,
           "text-anchor=\"middle\"", text);
  if (p->n > 1)
    for (i = 0; i < cm->npoints && i < 6; i++) {
      snprintf(text, sizeof text, "path of %s", cm->point_names[i]);
      svg_key(f, MARGIN + 150.0 * i, by, svg_colour(i + 4), "6,3", text);
    }
  svg_end(f);
}

static int no_row(const kl_solver *s, int step, double input, void *user) {
  (void)s;
  (void)step;
  (void)input;
  (void)user;
  return 0;
}

/* Brings the solver to the swept input's value `x` as the paths go: from
 * the start of the range (other inputs at --at) along the range's steps.
 * Returns an exit code after saying why it cannot. */
static int reach_along(kl_solver *s, const cli_model *cm,
                       const cli_options *o, const cli_range *r, double x) {
  kl_sweep_result res;
  cli_range to_x = *r;
  double part;
  int st;
  if ((st = cli_reach_start(s, cm, o, r)) != CLI_EXIT_OK || x == r->from)
    return st;
  part = fabs((x - r->from) / (r->to - r->from));
  to_x.to = x;
  to_x.steps = part * r->steps < 1 ? 1 : (int)ceil(part * r->steps);
  if (to_x.steps > KL_MAX_STEPS)
    to_x.steps = KL_MAX_STEPS;
  res.size = sizeof res;
  st = kl_solver_sweep(s, r->input, r->from, x, to_x.steps, no_row, NULL,
                       &res);
  if (st != KL_OK) {
    char at[320], note[1024];
    cli_format_input(cm, r->input, x, at, sizeof at);
    if (st == KL_LIMIT || st == KL_ESINGULAR)
      cli_sweep_note(cm, &to_x, &res, note, sizeof note);
    else
      snprintf(note, sizeof note, "%s", kl_solver_error(s));
    cli_error("the position %s cannot be reached from the start of the "
              "range: %s",
              at, note);
    return CLI_EXIT_SOLVE;
  }
  return CLI_EXIT_OK;
}

int cli_cmd_draw(const cli_model *cm, const cli_options *o) {
  cli_range r;
  paths p;
  path_sink sink;
  pose poses[CLI_MAX_POSES];
  outline *outlines = NULL;
  kl_solver *s = NULL;
  layout L;
  int found, nposes = 0, st = CLI_EXIT_OK, k, outline_points = -1, reached = 0;
  FILE *f;
  memset(&p, 0, sizeof p);
  memset(poses, 0, sizeof poses);
  found = cli_resolve_range(cm, o, &r);
  if (found < 0)
    return CLI_EXIT_USAGE;
  if (!found && o->npose > 0) {
    cli_error("--pose needs a range to move along: %s",
              cm->ninputs == 0 ? "the model has no inputs"
                               : "give --input, --from and --to");
    return CLI_EXIT_USAGE;
  }
  p.npoints = cm->npoints;
  p.nslides = cm->nslides;
  p.stride = found ? cli_picture_stride(r.steps) : 1;
  if (found) {
    size_t rows = (size_t)(r.steps / p.stride + 2);
    p.xy = malloc(rows * 2 * (size_t)(p.npoints + 1) * sizeof *p.xy);
    p.slide = malloc(rows * (size_t)(p.nslides + 1) * sizeof *p.slide);
    if (p.xy == NULL || p.slide == NULL)
      goto nomem;
  }
  s = cli_solver_new(cm, o);
  outlines = calloc((size_t)cm->nlinks, sizeof *outlines);
  if (s == NULL || outlines == NULL ||
      (outline_points = make_outlines(cm, outlines)) < 0)
    goto nomem;
  /* the paths, which also tell how far the motion reaches */
  if (found) {
    kl_sweep_result res;
    if ((st = cli_reach_start(s, cm, o, &r)) != CLI_EXIT_OK)
      goto done;
    sink.p = &p;
    sink.cm = cm;
    st = cli_record(s, cm, &r, path_row, &sink, &res);
    if (p.tail)
      p.n++;
    if (st == KL_STOPPED || st == KL_ENOMEM)
      goto nomem;
    reached = res.steps_done;
    if ((st = cli_sweep_told(cm, s, &r, &res, st, "the sweep for the paths",
                             "the paths end there")) != CLI_EXIT_OK)
      goto done;
  }
  nposes = o->npose > 0 ? o->npose : found ? (o->poses > 0 ? o->poses : 4) : 1;
  for (k = 0; k < nposes; k++) {
    if (!pose_alloc(&poses[k], cm, outline_points))
      goto nomem;
    if (!found) {
      char why[2048];
      if (cli_start_or_at(cm, o, poses[k].inputs) != 0) {
        st = CLI_EXIT_USAGE;
        goto done;
      }
      if (cli_reach(s, cm, poses[k].inputs, why, sizeof why) != KL_OK) {
        cli_error("%s", why);
        st = CLI_EXIT_SOLVE;
        goto done;
      }
    } else {
      double x;
      if (o->npose > 0) {
        x = o->pose[k] / cli_input_factor(cm, r.input);
      } else {
        /* spread over the steps the sweep reached; a closed turn would
         * draw its first position twice */
        int closed = cli_input_is_angle(cm, r.input) && reached == r.steps + 1 &&
                     fabs(fabs(r.to - r.from) - 2 * CLI_PI) < 1e-9;
        int last = reached > 0 ? reached - 1 : 0, at;
        at = nposes == 1 ? 0
             : closed    ? (int)floor((double)k * last / nposes + 0.5)
                         : (int)floor((double)k * last / (nposes - 1) + 0.5);
        x = r.from + (r.to - r.from) * at / r.steps;
      }
      if ((st = reach_along(s, cm, o, &r, x)) != CLI_EXIT_OK)
        goto done;
    }
    pose_take(&poses[k], cm, outlines, s);
  }
  if (o->no_paths)
    p.n = 0;
  if (lay_out(cm, poses, nposes, &p, outlines, outline_points, &L) != 0) {
    cli_error("the drawing's coordinates are too large to draw (beyond the "
              "numbers an SVG file can hold); nothing written: check the "
              "model's lengths");
    st = CLI_EXIT_MODEL;
    goto done;
  }
  if ((f = cli_open_output(o->output)) == NULL) {
    st = CLI_EXIT_OUTPUT;
    goto done;
  }
  write_svg(f, cm, poses, nposes, &p, outlines, &r, found, &L);
  st = cli_close_output(f, o->output);
  goto done;
nomem:
  cli_error("out of memory");
  st = CLI_EXIT_MEMORY;
done:
  for (k = 0; k < CLI_MAX_POSES; k++)
    pose_free(&poses[k]);
  if (outlines != NULL)
    for (k = 0; k < cm->nlinks; k++)
      free(outlines[k].local);
  free(outlines);
  free(p.xy);
  free(p.slide);
  kl_solver_free(s);
  return st;
}
