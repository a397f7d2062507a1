/*
 * model_read.c - the model-file reader: any bytes in, a finalized model or
 * an error at a line and column out; each statement calls its builder.
 */
#include <math.h>
#include <string.h>

#include "describe.h"
#include "tokens.h"

/* The model being built, beside the tokenizer's reader (whose r.m is the
 * same model, read-only, for references). */
typedef struct {
  kli_reader r;
  kl_model *m;
  int seen_items; /* a link, joint or point was declared */
} model_reader;

/* A builder's failure, placed at the statement's line. */
static int builder_failed(model_reader *mr, int status, int column) {
  kli_reader *r = &mr->r;
  return kli_read_fail(r, status, column, "%s", kl_model_error(mr->m));
}

static int read_units(model_reader *mr) {
  kli_reader *r = &mr->r;
  static const char *lengths[] = {"unstated", "mm", "m", "in"};
  kli_token t;
  int st, length = -1, i;
  if (mr->seen_items)
    return kli_read_fail(
        r, KL_ESYNTAX, 1,
        "'units' must come before the first link, joint or point");
  if ((st = kli_expect_keyword(r, "length", "after 'units'")) != KL_OK ||
      (st = kli_next_token(r, &t)) != KL_OK)
    return st;
  for (i = 0; i < 4; i++)
    if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, lengths[i]) == 0)
      length = i;
  if (length < 0)
    return kli_read_fail(
        r, KL_ESYNTAX, t.column,
        "expected a length unit (mm, m, in or unstated), found "
        "'%.60s'",
        kli_token_shown(&t));
  if ((st = kli_expect_keyword(r, "angle", "after the length unit")) != KL_OK ||
      (st = kli_next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind != KLI_TOKEN_WORD ||
      (strcmp(t.text, "deg") != 0 && strcmp(t.text, "rad") != 0))
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected an angle unit (deg or rad), found '%.60s'",
                         kli_token_shown(&t));
  r->angle_deg = strcmp(t.text, "deg") == 0;
  if ((st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_model_set_units(mr->m, length,
                          r->angle_deg ? KL_ANGLE_DEG : KL_ANGLE_RAD);
  return st == KL_OK ? KL_OK : builder_failed(mr, st, 1);
}

static int read_link(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token name_tok;
  const char *name;
  int st;
  if ((st = kli_expect_new_name(r, "link", &name_tok, &name)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_add_link(mr->m, name);
  return st >= 0 ? KL_OK : builder_failed(mr, st, name_tok.column);
}

/* revolute NAME LINK X Y LINK X Y; prismatic and slot add 'axis ANGLE'
 * after the first attachment. */
static int read_joint(model_reader *mr, int kind) {
  kli_reader *r = &mr->r;
  kli_token name_tok;
  const char *name;
  int st, a, b, joint;
  double ax, ay, bx, by, axis = 0.0;
  if ((st = kli_expect_new_name(r, "joint", &name_tok, &name)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_LINK, "the joint's first link", &a)) !=
          KL_OK ||
      (st = kli_expect_number(r, "x on the first link", &ax)) != KL_OK ||
      (st = kli_expect_number(r, "y on the first link", &ay)) != KL_OK)
    return st;
  if (kind != KL_JOINT_REVOLUTE &&
      ((st = kli_expect_keyword(r, "axis", "before the slide axis angle")) !=
           KL_OK ||
       (st = kli_expect_number(r, "the slide axis angle", &axis)) != KL_OK))
    return st;
  if ((st = kli_expect_ref(r, KLI_REF_LINK, "the joint's second link", &b)) !=
          KL_OK ||
      (st = kli_expect_number(r, "x on the second link", &bx)) != KL_OK ||
      (st = kli_expect_number(r, "y on the second link", &by)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  joint =
      kind == KL_JOINT_REVOLUTE ? kl_add_revolute(mr->m, a, ax, ay, b, bx, by)
      : kind == KL_JOINT_PRISMATIC
          ? kl_add_prismatic(mr->m, a, ax, ay, kli_angle_in(r, axis), b, bx, by)
          : kl_add_slot(mr->m, a, ax, ay, kli_angle_in(r, axis), b, bx, by);
  if (joint < 0)
    return builder_failed(mr, joint, name_tok.column);
  if (name != NULL &&
      (st = kl_model_set_joint_name(mr->m, joint, name)) != KL_OK)
    return builder_failed(mr, st, name_tok.column);
  return KL_OK;
}

/* Names the joint a builder just added, if the statement named it. */
static int name_joint(model_reader *mr, int joint, const kli_token *name_tok,
                      const char *name) {
  int st;
  if (joint < 0)
    return builder_failed(mr, joint, name_tok->column);
  if (name != NULL &&
      (st = kl_model_set_joint_name(mr->m, joint, name)) != KL_OK)
    return builder_failed(mr, st, name_tok->column);
  return KL_OK;
}

/* arc-slot NAME LINK CX CY radius R LINK X Y */
static int read_arc_slot(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token name_tok;
  const char *name;
  int st, a, b;
  double cx, cy, radius, bx, by;
  if ((st = kli_expect_new_name(r, "joint", &name_tok, &name)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_LINK, "the slot's link", &a)) != KL_OK ||
      (st = kli_expect_number(r, "the slot circle's centre x", &cx)) != KL_OK ||
      (st = kli_expect_number(r, "the slot circle's centre y", &cy)) != KL_OK ||
      (st = kli_expect_keyword(r, "radius", "before the slot's radius")) !=
          KL_OK ||
      (st = kli_expect_number(r, "the slot's radius", &radius)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_LINK, "the pin's link", &b)) != KL_OK ||
      (st = kli_expect_number(r, "the pin's x", &bx)) != KL_OK ||
      (st = kli_expect_number(r, "the pin's y", &by)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  return name_joint(mr, kl_add_arc_slot(mr->m, a, cx, cy, radius, b, bx, by),
                    &name_tok, name);
}

/* curve-slot NAME LINK open|closed COUNT LINK X Y through X0 Y0 X1 Y1 ...
 * (COUNT points, all on the line) */
static int read_curve_slot(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token name_tok, shape;
  const char *name;
  int st, a, b, n, k, closed;
  double bx, by, *xy;
  size_t bytes;
  if ((st = kli_expect_new_name(r, "joint", &name_tok, &name)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_LINK, "the slot's link", &a)) != KL_OK ||
      (st = kli_next_token(r, &shape)) != KL_OK)
    return st;
  if (shape.kind != KLI_TOKEN_WORD ||
      (strcmp(shape.text, "open") != 0 && strcmp(shape.text, "closed") != 0))
    return kli_read_fail(r, KL_ESYNTAX, shape.column,
                         "expected 'open' or 'closed' for the curve, found "
                         "'%.60s'",
                         kli_token_shown(&shape));
  closed = strcmp(shape.text, "closed") == 0;
  if ((st = kli_expect_count(r, "the number of points", &n)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_LINK, "the pin's link", &b)) != KL_OK ||
      (st = kli_expect_number(r, "the pin's x", &bx)) != KL_OK ||
      (st = kli_expect_number(r, "the pin's y", &by)) != KL_OK ||
      (st = kli_expect_keyword(r, "through", "before the curve's points")) !=
          KL_OK)
    return st;
  /* each number takes at least two bytes of the text: a count beyond that
   * cannot be there, and must not size an allocation */
  if ((size_t)n > (r->length - r->pos) / 4 + 1)
    return kli_read_fail(r, KL_ESYNTAX, shape.column,
                         "%d points announced, more than the rest of the "
                         "text can hold",
                         n);
  bytes = (size_t)n * 2 * sizeof *xy;
  if ((xy = kli_alloc(&mr->m->alloc, bytes)) == NULL)
    return kli_read_fail(r, KL_ENOMEM, shape.column, "out of memory");
  for (k = 0, st = KL_OK; k < 2 * n && st == KL_OK; k++)
    st = kli_expect_number(r, k % 2 == 0 ? "a point's x" : "a point's y",
                           &xy[k]);
  if (st == KL_OK && (st = kli_expect_end(r)) == KL_OK)
    st = name_joint(mr, kl_add_curve_slot(mr->m, a, n, xy, closed, b, bx, by),
                    &name_tok, name);
  kli_free(&mr->m->alloc, xy, bytes);
  return st;
}

/* The next token as a motion law word: its enum value, or the syntax
 * error. */
static int expect_law(kli_reader *r, int *law) {
  kli_token t;
  int st;
  if ((st = kli_next_token(r, &t)) != KL_OK)
    return st;
  for (*law = 0; kli_law_word(*law) != NULL; (*law)++)
    if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, kli_law_word(*law)) == 0)
      return KL_OK;
  return kli_read_fail(r, KL_ESYNTAX, t.column,
                       "expected a motion law (harmonic, cycloidal, "
                       "poly345, poly4567, mod-trapezoid or mod-sine), "
                       "found '%.60s'",
                       kli_token_shown(&t));
}

/* The follower of a cam statement: translating base R roller R offset E |
 * oscillating base R roller R pivot X Y arm L. */
static int read_cam_follower(model_reader *mr, kl_cam_follower *f) {
  kli_reader *r = &mr->r;
  kli_token t;
  int st;
  kl_cam_follower_init(f);
  if ((st = kli_next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind != KLI_TOKEN_WORD || (strcmp(t.text, "translating") != 0 &&
                                   strcmp(t.text, "oscillating") != 0))
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected the follower's kind, translating or "
                         "oscillating, found '%.60s'",
                         kli_token_shown(&t));
  f->kind = strcmp(t.text, "translating") == 0 ? KL_CAM_TRANSLATING
                                               : KL_CAM_OSCILLATING;
  if ((st = kli_expect_keyword(r, "base", "after the follower's kind")) !=
          KL_OK ||
      (st = kli_expect_number(r, "the base circle's radius",
                              &f->base_radius)) != KL_OK ||
      (st = kli_expect_keyword(r, "roller", "after the base radius")) !=
          KL_OK ||
      (st = kli_expect_number(r, "the roller's radius", &f->roller_radius)) !=
          KL_OK)
    return st;
  if (f->kind == KL_CAM_TRANSLATING)
    return (st = kli_expect_keyword(r, "offset", "after the roller's "
                                                 "radius")) != KL_OK
               ? st
               : kli_expect_number(r, "the stem's offset", &f->offset);
  if ((st = kli_expect_keyword(r, "pivot", "after the roller's radius")) !=
          KL_OK ||
      (st = kli_expect_number(r, "the arm pivot's x", &f->pivot_x)) != KL_OK ||
      (st = kli_expect_number(r, "the arm pivot's y", &f->pivot_y)) != KL_OK ||
      (st = kli_expect_keyword(r, "arm", "after the arm's pivot")) != KL_OK)
    return st;
  return kli_expect_number(r, "the arm's length", &f->arm_length);
}

/* A cam program's segments to the end of the line: rise LAW SPAN LIFT,
 * return LAW SPAN DROP, dwell SPAN; spans (and an oscillating follower's
 * lifts) in the model's angle unit. Checks that the spans make a turn and
 * the lifts close, in the file's units, at `column`. */
static int read_cam_program(model_reader *mr, int angle_lifts, int column,
                            kl_cam_segment **out, int *n, int *cap) {
  kli_reader *r = &mr->r;
  double turn = 0.0, lift = 0.0, largest = 0.0;
  double full = r->angle_deg ? 360.0 : 2.0 * KLI_PI;
  int st;
  for (;;) {
    kli_token t;
    kl_cam_segment *g;
    int kind, span_column;
    if ((st = kli_next_token(r, &t)) != KL_OK)
      return st;
    if (t.kind == KLI_TOKEN_END)
      break;
    kind = t.kind != KLI_TOKEN_WORD            ? -1
           : strcmp(t.text, "dwell") == 0      ? KL_SEGMENT_DWELL
           : strcmp(t.text, "rise") == 0       ? KL_SEGMENT_RISE
           : strcmp(t.text, "return") == 0     ? KL_SEGMENT_RETURN
                                               : -1;
    if (kind < 0)
      return kli_read_fail(r, KL_ESYNTAX, t.column,
                           "expected a cam segment (rise, dwell or return) "
                           "or the end of the line, found '%.60s'",
                           kli_token_shown(&t));
    if (kli_reserve(&mr->m->alloc, (void **)out, cap, *n + 1, sizeof **out) !=
        KL_OK)
      return kli_read_fail(r, KL_ENOMEM, t.column, "out of memory");
    g = &(*out)[(*n)++];
    g->law = KL_LAW_HARMONIC;
    g->lift = 0.0;
    if (kind != KL_SEGMENT_DWELL && (st = expect_law(r, &g->law)) != KL_OK)
      return st;
    if ((st = kli_expect_number_at(r, "the segment's span", &g->span,
                                   &span_column)) != KL_OK ||
        (kind != KL_SEGMENT_DWELL &&
         (st = kli_expect_number(r, kind == KL_SEGMENT_RISE
                                        ? "the segment's lift"
                                        : "the segment's drop",
                                 &g->lift)) != KL_OK))
      return st;
    if (!(g->span > 0.0) || (kind != KL_SEGMENT_DWELL && !(g->lift > 0.0)))
      return kli_read_fail(r, KL_ESYNTAX, span_column,
                           "cam segment %d: the span%s must be positive",
                           *n, kind == KL_SEGMENT_DWELL ? "" : " and lift");
    turn += g->span;
    lift += kind == KL_SEGMENT_RETURN ? -g->lift : g->lift;
    largest = fmax(largest, g->lift);
    if (kind == KL_SEGMENT_RETURN)
      g->lift = -g->lift;
    g->span = kli_angle_in(r, g->span);
    if (angle_lifts)
      g->lift = kli_angle_in(r, g->lift);
  }
  if (*n == 0)
    return kli_read_fail(r, KL_ESYNTAX, column,
                         "the cam program has no segments");
  if (fabs(turn - full) > 1e-9 * full)
    return kli_read_fail(r, KL_ESYNTAX, column,
                         "the cam program's spans add up to %.12g %s, not "
                         "one turn (%g %s)",
                         turn, r->angle_deg ? "deg" : "rad", full,
                         r->angle_deg ? "deg" : "rad");
  if (fabs(lift) > 1e-9 * largest)
    return kli_read_fail(r, KL_ESYNTAX, column,
                         "the cam program's rises and returns differ by %g: "
                         "the follower must come back where it started",
                         lift);
  return KL_OK;
}

/* cam NAME BEARING FOLLOWER X Y points N FOLLOWER-KIND ... [limit A]
 * program SEGMENT ... (read_cam_follower, read_cam_program) */
static int read_cam(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token name_tok, t;
  const char *name;
  kl_cam_follower f;
  kl_cam_segment *segments = NULL;
  kl_cam *cam = NULL;
  int st, bearing, follower, npoints, nseg = 0, cap = 0, program_column;
  double bx, by, limit = KLI_PI;
  if ((st = kli_expect_new_name(r, "joint", &name_tok, &name)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_JOINT, "the cam's bearing joint",
                           &bearing)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_LINK, "the follower link", &follower)) !=
          KL_OK ||
      (st = kli_expect_number(r, "the roller centre's x", &bx)) != KL_OK ||
      (st = kli_expect_number(r, "the roller centre's y", &by)) != KL_OK ||
      (st = kli_expect_keyword(r, "points", "after the roller centre")) !=
          KL_OK ||
      (st = kli_expect_count(r, "the pitch curve's number of points",
                             &npoints)) != KL_OK ||
      (st = read_cam_follower(mr, &f)) != KL_OK ||
      (st = kli_next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "limit") == 0) {
    if ((st = kli_expect_number(r, "the pressure-angle bound", &limit)) !=
            KL_OK ||
        (st = kli_next_token(r, &t)) != KL_OK)
      return st;
    limit = kli_angle_in(r, limit);
  }
  if (t.kind != KLI_TOKEN_WORD || strcmp(t.text, "program") != 0)
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected 'limit' or 'program' after the follower, "
                         "found '%.60s'",
                         kli_token_shown(&t));
  program_column = t.column;
  st = read_cam_program(mr, f.kind == KL_CAM_OSCILLATING, program_column,
                        &segments, &nseg, &cap);
  if (st == KL_OK && (cam = kli_cam_new(&mr->m->alloc)) == NULL)
    st = kli_read_fail(r, KL_ENOMEM, program_column, "out of memory");
  if (st == KL_OK && ((st = kl_cam_set_follower(cam, &f)) != KL_OK ||
                      (st = kl_cam_set_program(cam, nseg, segments)) != KL_OK))
    st = kli_read_fail(r, st, program_column, "cam: %s", kl_cam_error(cam));
  if (st == KL_OK)
    st = name_joint(mr,
                    kl_add_cam(mr->m, bearing, follower, bx, by, cam, npoints,
                               limit),
                    &name_tok, name);
  kl_cam_free(cam);
  if (cap > 0)
    kli_free(&mr->m->alloc, segments, (size_t)cap * sizeof *segments);
  return st;
}

static int read_point(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token name_tok;
  const char *name;
  int st, link;
  double x, y;
  if ((st = kli_expect_new_name(r, "point", &name_tok, &name)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_LINK, "the point's link", &link)) !=
          KL_OK ||
      (st = kli_expect_number(r, "the point's x", &x)) != KL_OK ||
      (st = kli_expect_number(r, "the point's y", &y)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_add_point(mr->m, link, x, y, name);
  return st >= 0 ? KL_OK : builder_failed(mr, st, name_tok.column);
}

static int read_input(model_reader *mr) {
  kli_reader *r = &mr->r;
  int st, joint;
  if ((st = kli_expect_ref(r, KLI_REF_JOINT, "the driven joint", &joint)) !=
          KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_add_input(mr->m, joint);
  return st >= 0 ? KL_OK : builder_failed(mr, st, 1);
}

static int read_loop(model_reader *mr) {
  kli_reader *r = &mr->r;
  int st, n = 0, cap = 0, *joints = NULL;
  for (;;) {
    kli_token peek;
    size_t save = r->pos;
    int joint;
    if ((st = kli_next_token(r, &peek)) != KL_OK)
      break;
    if (peek.kind == KLI_TOKEN_END)
      break;
    r->pos = save;
    if ((st = kli_expect_ref(r, KLI_REF_JOINT, "a joint of the loop",
                             &joint)) != KL_OK)
      break;
    if (kli_reserve(&mr->m->alloc, (void **)&joints, &cap, n + 1,
                    sizeof *joints) != KL_OK) {
      st = kli_read_fail(r, KL_ENOMEM, 1, "out of memory");
      break;
    }
    joints[n++] = joint;
  }
  if (st == KL_OK) {
    st = kl_add_loop(mr->m, n, joints);
    st = st >= 0 ? KL_OK : builder_failed(mr, st, 1);
  }
  kli_free(&mr->m->alloc, joints, (size_t)cap * sizeof *joints);
  return st;
}

/* sketch angle LINK VALUE | sketch slide JOINT VALUE */
static int read_sketch(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token t;
  int st, id;
  double v;
  if ((st = kli_next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "angle") == 0) {
    if ((st = kli_expect_ref(r, KLI_REF_LINK, "the sketched link", &id)) !=
            KL_OK ||
        (st = kli_expect_number(r, "the sketch angle", &v)) != KL_OK ||
        (st = kli_expect_end(r)) != KL_OK)
      return st;
    st = kl_model_set_sketch_angle(mr->m, id, kli_angle_in(r, v));
  } else if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "slide") == 0) {
    if ((st = kli_expect_ref(r, KLI_REF_JOINT, "the sketched joint", &id)) !=
            KL_OK ||
        (st = kli_expect_number(r, "the sketch slide", &v)) != KL_OK ||
        (st = kli_expect_end(r)) != KL_OK)
      return st;
    st = kl_model_set_sketch_slide(mr->m, id, v);
  } else {
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected 'angle' or 'slide' after 'sketch', found "
                         "'%.60s'",
                         kli_token_shown(&t));
  }
  return st == KL_OK ? KL_OK : builder_failed(mr, st, t.column);
}

/* hold JOINT at V: an input's value at the model's start */
static int read_hold(model_reader *mr) {
  kli_reader *r = &mr->r;
  double v;
  int st, joint, column;
  if ((st = kli_expect_ref(r, KLI_REF_JOINT, "the held input's joint",
                           &joint)) != KL_OK ||
      (st = kli_expect_keyword(r, "at", "after the held joint")) != KL_OK ||
      (st = kli_expect_number_at(r, "the held value", &v, &column)) !=
          KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  if (mr->m->joints[joint].input < 0)
    return kli_read_fail(r, KL_ESYNTAX, 1,
                         "the held joint is not an input; declare it with "
                         "'input' first");
  if (mr->m->joints[joint].kind == KL_JOINT_REVOLUTE)
    v = kli_angle_in(r, v);
  st = kl_model_set_input_hold(mr->m, mr->m->joints[joint].input, v);
  return st == KL_OK ? KL_OK : builder_failed(mr, st, column);
}

/* transmission JOINT between JOINT and JOINT: the named lines of a
 * transmission angle */
static int read_transmission(model_reader *mr) {
  kli_reader *r = &mr->r;
  int st, joint, line_a, line_b;
  if ((st = kli_expect_ref(r, KLI_REF_JOINT, "the transmission angle's joint",
                           &joint)) != KL_OK ||
      (st = kli_expect_keyword(r, "between", "after the transmission angle's "
                                             "joint")) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_JOINT, "the first line's joint",
                           &line_a)) != KL_OK ||
      (st = kli_expect_keyword(r, "and", "after the first line's joint")) !=
          KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_JOINT, "the second line's joint",
                           &line_b)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_model_set_transmission_lines(mr->m, joint, line_a, line_b);
  return st == KL_OK ? KL_OK : builder_failed(mr, st, 1);
}

/* sweep JOINT from V to V steps N */
static int read_sweep(model_reader *mr) {
  kli_reader *r = &mr->r;
  kl_sweep_settings sw;
  int st = kli_expect_sweep(r, &sw);
  if (st != KL_OK)
    return st;
  st = kl_model_set_sweep(mr->m, &sw);
  return st == KL_OK ? KL_OK : builder_failed(mr, st, 1);
}

/* ---- the force stage's statements: mass properties, gravity, loads, the
 * working speed, the declared redundancy ---- */

/* The column where the next token starts, the reader left before it. */
static int next_column(kli_reader *r, int *column) {
  kli_token t;
  size_t save = r->pos;
  int st = kli_next_token(r, &t);
  r->pos = save;
  *column = t.column;
  return st;
}

/* mass LINK M at X Y inertia J */
static int read_mass(model_reader *mr) {
  kli_reader *r = &mr->r;
  int st, link, link_column, mass_column, inertia_column;
  double mass, x, y, inertia;
  if ((st = next_column(r, &link_column)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_LINK, "the link with the mass", &link)) !=
          KL_OK ||
      (st = kli_expect_number_at(r, "the mass", &mass, &mass_column)) !=
          KL_OK ||
      (st = kli_expect_keyword(r, "at", "before the centre of mass")) !=
          KL_OK ||
      (st = kli_expect_number(r, "the centre of mass's x", &x)) != KL_OK ||
      (st = kli_expect_number(r, "the centre of mass's y", &y)) != KL_OK ||
      (st = kli_expect_keyword(r, "inertia", "after the centre of mass")) !=
          KL_OK ||
      (st = kli_expect_number_at(r, "the moment of inertia", &inertia,
                                 &inertia_column)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_set_link_mass(mr->m, link, mass, x, y, inertia);
  return st == KL_OK ? KL_OK
                     : builder_failed(mr, st,
                                      st == KL_EINVAL ? (mass < 0.0 ? mass_column
                                                                    : inertia_column)
                                                      : link_column);
}

/* gravity GX GY */
static int read_gravity(model_reader *mr) {
  kli_reader *r = &mr->r;
  double gx, gy;
  int st;
  if ((st = kli_expect_number(r, "gravity's x", &gx)) != KL_OK ||
      (st = kli_expect_number(r, "gravity's y", &gy)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_model_set_gravity(mr->m, gx, gy);
  return st == KL_OK ? KL_OK : builder_failed(mr, st, 1);
}

/* load force POINT FX FY | load torque LINK T */
static int read_load(model_reader *mr) {
  kl_load l;
  int st = kli_expect_load(&mr->r, &l);
  if (st != KL_OK)
    return st;
  st = kl_add_load(mr->m, &l);
  return st >= 0 ? KL_OK : builder_failed(mr, st, 1);
}

/* speed JOINT W [fluctuation CS]: W in the file's angle unit (or length
 * unit, for a sliding input) per time unit */
static int read_speed(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token t;
  int st, joint, joint_column, input, cs_column = 1;
  double speed, cs = 0.0;
  if ((st = next_column(r, &joint_column)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_JOINT, "the driven input's joint",
                           &joint)) != KL_OK ||
      (st = kli_expect_number(r, "the working speed", &speed)) != KL_OK ||
      (st = kli_next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, "fluctuation") == 0) {
    if ((st = kli_expect_number_at(r, "the coefficient of speed fluctuation",
                                   &cs, &cs_column)) != KL_OK ||
        (st = kli_expect_end(r)) != KL_OK)
      return st;
  } else if (t.kind != KLI_TOKEN_END) {
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected 'fluctuation' or the end of the line after "
                         "the working speed, found '%.60s'",
                         kli_token_shown(&t));
  }
  input = kli_input_of(mr->m, joint);
  if (input < 0) {
    char label[96];
    return kli_read_fail(r, KL_EKIND, joint_column,
                         "%s is not an input; declare it with 'input' before "
                         "its working speed",
                         kli_joint_label(mr->m, joint, label, sizeof label));
  }
  if (mr->m->joints[joint].kind == KL_JOINT_REVOLUTE)
    speed = kli_angle_in(r, speed);
  st = kl_model_set_speed(mr->m, input, speed, cs);
  return st == KL_OK ? KL_OK : builder_failed(mr, st, cs_column);
}

/* redundant N: N >= 0 constraints repeat what the others impose */
static int read_redundant(model_reader *mr) {
  kli_reader *r = &mr->r;
  double n;
  int st, column;
  if ((st = kli_expect_number_at(r, "the number of redundant constraints", &n,
                                 &column)) != KL_OK ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  if (n != floor(n) || n > 1e9)
    return kli_read_fail(r, KL_ESYNTAX, column,
                         "expected a whole number (the number of redundant "
                         "constraints), found %g",
                         n);
  st = kl_model_set_redundancy(mr->m, (int)fmax(n, -1e9));
  return st == KL_OK ? KL_OK : builder_failed(mr, st, column);
}

/* ---- the motion profile in time: segment and timetable ---- */

/* The file's words for the motion laws, in enum kl_motion_law_kind's
 * order (shared with the writer through kli_law_word). */
static const char *const law_words[] = {"harmonic", "cycloidal", "poly345",
                                        "poly4567", "mod-trapezoid",
                                        "mod-sine"};

const char *kli_law_word(int law) {
  return law >= 0 && law < (int)(sizeof law_words / sizeof law_words[0])
             ? law_words[law]
             : NULL;
}

/* The input that `joint` (read at `column`) drives, or the status. */
static int driven_input(model_reader *mr, int joint, int column,
                        const char *what, int *input) {
  char label[96];
  *input = kli_input_of(mr->m, joint);
  if (*input < 0)
    return kli_read_fail(&mr->r, KL_EKIND, column,
                         "%s is not an input; declare it with 'input' before "
                         "its %s",
                         kli_joint_label(mr->m, joint, label, sizeof label),
                         what);
  return KL_OK;
}

/* A value of the driven joint in the file's units, in the library's. */
static double joint_value_in(model_reader *mr, int joint, double v) {
  return mr->m->joints[joint].kind == KL_JOINT_REVOLUTE
             ? kli_angle_in(&mr->r, v)
             : v;
}

/* segment JOINT dwell T V | segment JOINT rise|return LAW T FROM TO |
 * segment JOINT speed T FROM TO */
static int read_segment(model_reader *mr) {
  static const char *const kinds[] = {"dwell", "rise", "return", "speed"};
  kli_reader *r = &mr->r;
  kli_token t;
  int st, joint, joint_column, input, kind = -1, law = 0, i;
  double duration, from, to;
  if ((st = next_column(r, &joint_column)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_JOINT, "the driven input's joint",
                           &joint)) != KL_OK ||
      (st = kli_next_token(r, &t)) != KL_OK)
    return st;
  for (i = 0; i < 4; i++)
    if (t.kind == KLI_TOKEN_WORD && strcmp(t.text, kinds[i]) == 0)
      kind = i;
  if (kind < 0)
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected dwell, rise, return or speed, found "
                         "'%.60s'",
                         kli_token_shown(&t));
  if ((kind == KL_SEGMENT_RISE || kind == KL_SEGMENT_RETURN) &&
      (st = expect_law(r, &law)) != KL_OK)
    return st;
  if ((st = kli_expect_number(r, "the segment's duration", &duration)) !=
          KL_OK ||
      (st = kli_expect_number(r, "the value the segment starts at", &from)) !=
          KL_OK)
    return st;
  to = from;
  if (kind != KL_SEGMENT_DWELL &&
      (st = kli_expect_number(r, "the value the segment ends at", &to)) !=
          KL_OK)
    return st;
  if ((st = kli_expect_end(r)) != KL_OK ||
      (st = driven_input(mr, joint, joint_column, "motion profile",
                         &input)) != KL_OK)
    return st;
  st = kl_add_segment(mr->m, input, kind, law, duration,
                      joint_value_in(mr, joint, from),
                      joint_value_in(mr, joint, to));
  return st >= 0 ? KL_OK : builder_failed(mr, st, joint_column);
}

/* timetable JOINT T V T V ...: time and value pairs */
static int read_timetable(model_reader *mr) {
  kli_reader *r = &mr->r;
  const kli_allocator *a = &mr->m->alloc;
  double *pairs = NULL;
  int st, joint, joint_column, input, n = 0, cap = 0, k;
  if ((st = next_column(r, &joint_column)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_JOINT, "the driven input's joint",
                           &joint)) != KL_OK ||
      (st = driven_input(mr, joint, joint_column, "motion profile",
                         &input)) != KL_OK)
    return st;
  for (;;) {
    kli_token t;
    size_t save = r->pos;
    if ((st = kli_next_token(r, &t)) != KL_OK)
      break;
    if (t.kind == KLI_TOKEN_END)
      break;
    r->pos = save;
    if ((st = kli_reserve(a, (void **)&pairs, &cap, 2 * n + 2,
                          sizeof *pairs)) != KL_OK) {
      st = kli_read_fail(r, KL_ENOMEM, t.column, "out of memory");
      break;
    }
    if ((st = kli_expect_number(r, "a time", &pairs[2 * n])) != KL_OK ||
        (st = kli_expect_number(r, "the value at that time",
                                &pairs[2 * n + 1])) != KL_OK)
      break;
    n++;
  }
  if (st == KL_OK) {
    /* times in place of the pairs' first half, values after them */
    double *times = pairs, *values = NULL;
    if (n > 0 && (values = kli_alloc(a, (size_t)n * sizeof *values)) == NULL)
      st = kli_read_fail(r, KL_ENOMEM, joint_column, "out of memory");
    for (k = 0; st == KL_OK && k < n; k++) {
      values[k] = joint_value_in(mr, joint, pairs[2 * k + 1]);
      times[k] = pairs[2 * k];
    }
    if (st == KL_OK) {
      st = kl_model_set_profile_table(mr->m, input, n, times, values);
      if (st != KL_OK)
        st = builder_failed(mr, st, joint_column);
    }
    if (values != NULL)
      kli_free(a, values, (size_t)n * sizeof *values);
  }
  if (cap > 0)
    kli_free(a, pairs, (size_t)cap * sizeof *pairs);
  return st;
}

/* ---- couplings and point inputs ---- */

/* gears JOINT1 JOINT2 R1 R2 | rack PINION RACK R | couple JOINT1 JOINT2 RATIO */
static int read_coupling(model_reader *mr, int kind) {
  kli_reader *r = &mr->r;
  int st, j1, j2, column;
  double v1, v2 = 0.0;
  if ((st = kli_expect_ref(r, KLI_REF_JOINT, "the first coupled joint",
                           &j1)) != KL_OK ||
      (st = kli_expect_ref(r, KLI_REF_JOINT, "the second coupled joint",
                           &j2)) != KL_OK ||
      (st = kli_expect_number_at(r,
                                 kind == KL_COUPLING_RATIO ? "the ratio"
                                                           : "a radius",
                                 &v1, &column)) != KL_OK ||
      (kind == KL_COUPLING_GEAR &&
       (st = kli_expect_number(r, "the second radius", &v2)) != KL_OK) ||
      (st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kind == KL_COUPLING_GEAR   ? kl_add_gear_pair(mr->m, j1, j2, v1, v2)
       : kind == KL_COUPLING_RACK ? kl_add_rack_pinion(mr->m, j1, j2, v1)
                                  : kl_add_coupling(mr->m, j1, j2, v1);
  return st >= 0 ? KL_OK : builder_failed(mr, st, column);
}

static int read_gears(model_reader *mr) {
  return read_coupling(mr, KL_COUPLING_GEAR);
}
static int read_rack(model_reader *mr) {
  return read_coupling(mr, KL_COUPLING_RACK);
}
static int read_couple(model_reader *mr) {
  return read_coupling(mr, KL_COUPLING_RATIO);
}

/* drive POINT x|y: a point input */
static int read_drive(model_reader *mr) {
  kli_reader *r = &mr->r;
  kli_token t;
  int st, point, axis;
  if ((st = kli_expect_ref(r, KLI_REF_POINT, "the driven point", &point)) !=
      KL_OK)
    return st;
  if ((st = kli_next_token(r, &t)) != KL_OK)
    return st;
  if (t.kind != KLI_TOKEN_WORD ||
      (strcmp(t.text, "x") != 0 && strcmp(t.text, "y") != 0))
    return kli_read_fail(r, KL_ESYNTAX, t.column,
                         "expected the driven coordinate, x or y, found "
                         "'%.60s'",
                         kli_token_shown(&t));
  axis = strcmp(t.text, "y") == 0;
  if ((st = kli_expect_end(r)) != KL_OK)
    return st;
  st = kl_add_point_input(mr->m, point, axis);
  return st >= 0 ? KL_OK : builder_failed(mr, st, t.column);
}

typedef int (*statement_reader)(model_reader *mr);

/* The reader of a coupling or point-input statement word, or NULL. */
static statement_reader coupling_statement(const char *word) {
  static const struct {
    const char *word;
    statement_reader read;
  } table[] = {{"gears", read_gears},
               {"rack", read_rack},
               {"couple", read_couple},
               {"drive", read_drive}};
  size_t i;
  for (i = 0; i < sizeof table / sizeof table[0]; i++)
    if (strcmp(word, table[i].word) == 0)
      return table[i].read;
  return NULL;
}

/* The reader of a force-stage statement word, or NULL. */
static statement_reader force_statement(const char *word) {
  static const struct {
    const char *word;
    statement_reader read;
  } table[] = {{"mass", read_mass},
               {"gravity", read_gravity},
               {"load", read_load},
               {"speed", read_speed},
               {"redundant", read_redundant},
               {"segment", read_segment},
               {"timetable", read_timetable}};
  size_t i;
  for (i = 0; i < sizeof table / sizeof table[0]; i++)
    if (strcmp(word, table[i].word) == 0)
      return table[i].read;
  return NULL;
}

static int read_header(model_reader *mr) {
  kli_reader *r = &mr->r;
  double version;
  int column,
      st = kli_expect_number_at(r, "the format version", &version, &column);
  if (st != KL_OK)
    return st;
  if (version != KLI_FORMAT_VERSION)
    return kli_read_fail(
        r, KL_ESYNTAX, column,
        "this is format version %g; kinloop %s reads version %d", version,
        KINLOOP_VERSION, KLI_FORMAT_VERSION);
  r->seen_header = 1;
  return kli_expect_end(r);
}

static int read_statement(model_reader *mr, const kli_token *key) {
  kli_reader *r = &mr->r;
  const char *k = key->text;
  if (!r->seen_header) {
    if (key->kind == KLI_TOKEN_WORD && strcmp(k, "kinloop-model") == 0)
      return read_header(mr);
    return kli_read_fail(r, KL_ESYNTAX, key->column,
                         "expected 'kinloop-model %d' as the first statement, "
                         "found '%.60s'",
                         KLI_FORMAT_VERSION, k);
  }
  if (key->kind != KLI_TOKEN_WORD)
    return kli_read_fail(r, KL_ESYNTAX, key->column,
                         "expected a statement word, found a quoted name");
  if (strcmp(k, "units") == 0)
    return read_units(mr);
  mr->seen_items = 1;
  if (strcmp(k, "link") == 0)
    return read_link(mr);
  if (strcmp(k, "revolute") == 0)
    return read_joint(mr, KL_JOINT_REVOLUTE);
  if (strcmp(k, "prismatic") == 0)
    return read_joint(mr, KL_JOINT_PRISMATIC);
  if (strcmp(k, "slot") == 0)
    return read_joint(mr, KL_JOINT_SLOT);
  if (strcmp(k, "arc-slot") == 0)
    return read_arc_slot(mr);
  if (strcmp(k, "curve-slot") == 0)
    return read_curve_slot(mr);
  if (strcmp(k, "cam") == 0)
    return read_cam(mr);
  if (strcmp(k, "point") == 0)
    return read_point(mr);
  if (strcmp(k, "input") == 0)
    return read_input(mr);
  if (strcmp(k, "loop") == 0)
    return read_loop(mr);
  if (strcmp(k, "sketch") == 0)
    return read_sketch(mr);
  if (strcmp(k, "sweep") == 0)
    return read_sweep(mr);
  if (strcmp(k, "hold") == 0)
    return read_hold(mr);
  if (strcmp(k, "transmission") == 0)
    return read_transmission(mr);
  if (force_statement(k) != NULL)
    return force_statement(k)(mr);
  if (coupling_statement(k) != NULL)
    return coupling_statement(k)(mr);
  return kli_read_fail(
      r, KL_ESYNTAX, key->column,
      "unknown statement '%.60s' (expected units, link, "
      "revolute, prismatic, slot, arc-slot, curve-slot, cam, point, input, "
      "drive, gears, rack, couple, loop, sketch, hold, transmission, sweep, "
      "mass, gravity, "
      "load, speed, redundant, segment or timetable)",
      k);
}

kl_model *kl_model_read_with_alloc(const char *text, size_t length,
                                   kl_alloc_fn fn, void *user,
                                   kl_io_error *err) {
  model_reader mr;
  kli_reader *r = &mr.r;
  int st = KL_OK;
  memset(&mr, 0, sizeof mr);
  kli_reader_start(r, text, length, err);
  if (kli_check_text(r, "model") != KL_OK)
    return NULL;
  mr.m = kl_model_new_with_alloc(fn, user);
  if (mr.m == NULL) {
    kli_read_fail(r, KL_ENOMEM, 0, "out of memory");
    return NULL;
  }
  r->m = mr.m;
  while (st == KL_OK && r->pos < r->length) {
    kli_token key;
    if ((st = kli_next_token(r, &key)) != KL_OK)
      break;
    if (key.kind != KLI_TOKEN_END)
      st = read_statement(&mr, &key);
    if (st == KL_OK)
      kli_next_line(r);
  }
  if (st == KL_OK && !r->seen_header)
    st = kli_io_fail(r->err, KL_ESYNTAX, 0, 0,
                     "empty model: expected 'kinloop-model %d'",
                       KLI_FORMAT_VERSION);
  if (st == KL_OK && (st = kl_model_finalize(mr.m)) != KL_OK) {
    r->line = 0;
    kli_read_fail(r, st, 0, "%s", kl_model_error(mr.m));
  }
  if (st != KL_OK) {
    kl_model_free(mr.m);
    return NULL;
  }
  return mr.m;
}

kl_model *kl_model_read(const char *text, size_t length, kl_io_error *err) {
  return kl_model_read_with_alloc(text, length, kli_default_alloc, NULL, err);
}
