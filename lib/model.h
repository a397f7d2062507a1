/*
 * model.h - private: the model as the builders record it and as the topology
 * module completes it at finalize. Shared by every module down the chain.
 */
#ifndef KINLOOP_MODEL_H
#define KINLOOP_MODEL_H

#include "kinloop.h"
#include "lookup.h"
#include "memory.h"

#define KLI_MESSAGE_SIZE 320
#define KLI_PI 3.14159265358979323846
#define KLI_NAME_MAX 255
/* Loops a model may register (kl_add_loop); their independence check is
 * quadratic in this count. Models with more have kinloop find them. */
#define KLI_MAX_REGISTERED_LOOPS 1024
/* Terms of loop and tree chains finalize builds at most: per item of the
 * model, plus a floor (kl_model_finalize's KL_ETOOLARGE). */
#define KLI_TERMS_PER_ITEM 64L
#define KLI_TERMS_FLOOR (1L << 22)

typedef struct {
  char *name;     /* owned; NULL when unnamed */
  double sketch;  /* starting angle for new solvers, when has_sketch */
  int has_sketch;
  /* mass properties (kl_set_link_mass); all 0 for a massless link */
  double mass, centre[2], inertia;
  int has_mass;
} kli_link;

typedef struct {
  char *name;         /* owned; NULL when unnamed */
  double sketch;      /* starting slide for new solvers, when has_sketch */
  int has_sketch;
  double hold;   /* an input joint's value at the model's start, when has_hold */
  int has_hold;
  /* the transmission lines named for a revolute joint
   * (kl_model_set_transmission_lines), line on link a first, when has_lines */
  int lines[2];
  int has_lines;
  int kind;           /* enum kl_joint_kind */
  int link[2];        /* a, b */
  double at[2][2];    /* attachment in a's frame, in b's frame */
  double axis;        /* slide axis angle in a's frame (sliding joints) */
  double axis_cs[2];  /* cos, sin of axis */
  int input;          /* the input that drives it (its index), or -1 */
  /* curved slots (slots.c): an arc slot's radius (its centre is at[0]); a
   * curve slot's spline (owned; at[0] is a's origin), NULL otherwise */
  double radius;
  struct kli_curve *curve;
  /* a cam joint's (kl_add_cam) program (owned), bearing joint and
   * pressure-angle bound; cam NULL for any other joint */
  kl_cam *cam;
  int cam_bearing;
  double cam_limit;
} kli_joint;

typedef struct {
  int link;
  double at[2];
  char *name; /* owned; NULL when unnamed */
} kli_point;

/*
 * One term of a vector chain. A link term adds R(angle(link)) v; a slide term
 * adds sign * R(angle(link)) g(s) for the slide s of `joint`, whose guide is
 * `link`, g the slot's path in the guide's frame (slots.c: s times the axis
 * for a straight one). Loops are closed chains (their sum is the residual);
 * points are open chains from the global origin (their sum is the position).
 */
typedef struct {
  int link;      /* link whose angle turns the term */
  int joint;     /* sliding joint for a slide term; -1 for a link term */
  /* A link term runs from the attachment of from_joint on `link` to that of
   * to_joint; -1 stands for the global origin (from) or a point (to). */
  int from_joint, to_joint;
  double v[2];   /* local vector of a link term */
  double sign;   /* +1 or -1 for a slide term */
  int nz_angle;  /* Jacobian entry pair for the angle's unknown, or -1 */
  int nz_slide;  /* Jacobian entry pair for the slide's unknown, or -1 */
} kli_term;

typedef struct {
  int first, count; /* range in the term array */
} kli_chain;

/* A coupling as the builders record it (couplings.c). */
typedef struct {
  int kind;          /* enum kl_coupling_kind */
  int joint[2];
  double value[2];   /* radii; the pinion's radius; the ratio */
  int carrier;       /* common link, or -1 */
  int internal;      /* internal gear mesh */
} kli_coupling;

/* A point input: input `input` sets global coordinate `axis` of `point`. */
typedef struct {
  int point, axis, input;
} kli_point_input;

/*
 * One extra scalar row (one equation, no unknown) after the loop rows:
 *   F = sum_k coef[k] x[coord[k]] - offset + (chain's component `axis`)
 *       - (u[input] when input >= 0)
 * A coupling row has the linear part only (offset from the sketch); a point
 * input row has the chain from the origin to its point and its input.
 */
#define KLI_EXTRA_COEFS 4
typedef struct {
  int ncoef;
  int coord[KLI_EXTRA_COEFS];
  double coef[KLI_EXTRA_COEFS];
  int entry[KLI_EXTRA_COEFS]; /* its single entry in the extra pattern, or -1 */
  double offset;
  kli_chain chain;            /* count 0 for a coupling */
  int axis, input;            /* input -1 for a coupling */
} kli_extra;

/* Which coefficient an entry of the force system holds (reactions.c lays
 * the entries out, forces.c fills them): r is the arm from the link's
 * centre of mass to the joint's point, n the slide's normal and d its axis
 * direction; each times the side's sign (-1 on link a, +1 on link b). */
enum {
  KLI_COEF_UNIT,     /* 1: a force on its own row, a moment on the moment row */
  KLI_COEF_ARM_FX,   /* -r_y: the moment of a force's x part */
  KLI_COEF_ARM_FY,   /* r_x: the moment of its y part */
  KLI_COEF_NORMAL_X, /* n_x, n_y, r x n: a force across the slide */
  KLI_COEF_NORMAL_Y,
  KLI_COEF_NORMAL_M,
  KLI_COEF_AXIS_X,   /* d_x, d_y, r x d: a force along the slide */
  KLI_COEF_AXIS_Y,
  KLI_COEF_AXIS_M
};

/* The force system (reactions.c): 3 rows per moving link, 3 (link - 1) +
 * 0, 1, 2 for its force x, force y and moment about its centre of mass,
 * and its unknowns joint by joint: fx, fy of a revolute joint; the normal
 * force and the moment of a prismatic joint; the normal force of a slot
 * joint; each followed by the effort when the joint is an input. */
typedef struct {
  int n;             /* unknowns = rows; 0 when the model is redundant */
  int *joint_col;    /* the first unknown of each joint */
  int *input_col;    /* the effort unknown of each input */
  int nentries;
  int *entry_start;  /* njoints + 1: each joint's entries, in order */
  /* The rows beyond loop closure: each coupling's force unknown (a gear's
   * or rack's tooth force, a ratio coupling's generalised force) and each
   * point input's effort (in input_col); their entries, after the joints',
   * from extra_entry_start (nextra + 1), each with the geometry it takes
   * (a joint's, or njoints + e for extra row e's) and a weight. */
  int *coupling_col;
  int *extra_entry_start;
  int *geom;
  double *weight;
  int *row, *col;    /* each entry's row and unknown */
  unsigned char *coef; /* its KLI_COEF_* */
  unsigned char *side; /* 0: on link a's rows, 1: on link b's */
  /* a band-reducing ordering over the links (as for the loops) */
  int *band_row, *band_col;
  int band_lower, band_upper;
} kli_force_pattern;

/* What finalize derives from the builders' record. */
typedef struct {
  void *block; /* one allocation holding every array below */
  size_t block_size;
  int nloops;
  int *loop_joint_start;  /* nloops + 1 offsets into loop_joints */
  int *loop_joints;       /* each loop's joints in walking order */
  int *loop_links;        /* the link after each of those joints */
  kli_chain *loops;       /* nloops closed chains */
  kli_chain *points;      /* one open chain per point */
  kli_chain *origins;     /* one open chain per link: its frame origin */
  kli_term *terms;
  int nterms;

  /* Coordinates: x[link] is a link angle, x[nlinks + joint] a slide. */
  int ncoords;
  /* Unknowns q after eliminating prismatic locks and inputs. */
  int nvars;
  int *var_coord;        /* coordinate each unknown stands for */
  /* How each link angle follows from q and the inputs u:
   * angle = q[var] when angle_var >= 0; otherwise
   * angle = angle(angle_parent) + angle_sign * u[angle_input] (input >= 0)
   *       = angle(angle_parent)                                (input <  0)
   * and 0 for ground. Links are listed parents first in angle_order. */
  int *angle_var, *angle_parent, *angle_input;
  double *angle_sign;
  int *angle_order;
  /* How each slide follows: q[slide_var] or u[slide_input]; -1 when neither. */
  int *slide_var, *slide_input;
  /* The unknown that moves each coordinate one for one, or -1: x is its
   * value from the inputs alone plus q[coord_var]. */
  int *coord_var;

  /* Jacobian pattern: nz pairs (x row, y row) of one loop and one unknown. */
  int nnz_pairs;
  int *nz_row;   /* first (x) row of the pair */
  int *nz_col;

  /* Rows: 2 per loop, `redundancy` more than the unknowns when the model
   * declares redundant constraints. The rows the structural matching leaves
   * unmatched are dropped from the Newton system (and checked after each
   * solve): per loop, loop_kept of its rows stay, from kept row
   * loop_first_kept on (nloops + 1 offsets). A loop keeping one row keeps
   * its component along the Jacobian column of the unknown matched to it,
   * the values of nz pair loop_lead (-1 otherwise). */
  int redundancy;
  int nrows;
  int *loop_kept, *loop_first_kept, *loop_lead;
  /* The pattern of the kept system: pairs (a loop's two kept rows) and
   * singles (a loop's one kept row); with no redundancy the nz pairs
   * themselves and no singles. With redundancy, pair_slot maps each nz pair
   * to its values in the kept system: 2 values from pair_slot on for a
   * pair, 1 for a single, none (-1) for a dropped loop. */
  int nkept_pairs, nkept_singles;
  int *kept_pair_row, *kept_pair_col, *kept_single_row, *kept_single_col;
  int *pair_slot;
  /* A band-reducing ordering of the kept pattern (Cuthill-McKee over loops
   * that share unknowns): the position of each row and each unknown, and
   * the lower and upper bandwidths of the matrix so ordered. */
  int *band_row, *band_col;
  int band_lower, band_upper;
  /* Extra rows (couplings first, then point inputs), after the 2 nloops
   * loop rows; their Jacobian entries are single entries (row e, col),
   * valued after the loop pairs. Kept, they follow the kept loop rows. */
  int nextra;
  kli_extra *extra;
  int nextra_entries;
  int *extra_entry_row, *extra_entry_col;
  int dof;       /* Gruebler's count plus the redundancy: the inputs */
  double scale;
  /* The transmission-angle sites and the joints the rule passes over
   * (loops.c), in the order the loops meet them; at most one per joint. */
  kl_output *sites;
  int nsites;
  kl_transmission_skip *skips;
  int nskips;
  /* The pressure-angle sites of sliders (loops.c), one per sliding joint
   * at most. */
  kl_output *pressure;
  int npressure;
  kli_force_pattern forces;
} kli_topology;

/* A motion profile's segment, laid out in time from `start`. */
typedef struct {
  int kind, law;
  double start, duration, from, to;
} kli_segment;
/* A table's knot: time, value, the spline's second derivative there, and
 * scratch for the solve that finds it. */
typedef struct {
  double t, y, m, work;
} kli_knot;

struct kl_model {
  kli_allocator alloc;
  /* Holders of the model: the caller's handle, each solver and each study
   * made from it (kli_model_retain / kli_model_release). The one field of
   * a finalized model that changes, and only by atomic operations. */
  int refs;

  kli_link *links;
  int nlinks, cap_links;
  kli_joint *joints;
  int njoints, cap_joints;
  kli_point *points;
  int npoints, cap_points;
  int *inputs;
  int ninputs, cap_inputs;
  /* Registered loops, concatenated. */
  int *reg_joints;
  int nreg_joints, cap_reg_joints;
  int *reg_start; /* nreg_loops + 1 offsets */
  int nreg_loops, cap_reg_start;

  /* Names of links (ground's "ground" included), joints and points, and the
   * joints by (kind, lower link, higher link): constant-time lookups, so
   * that building a model of n items takes time linear in n. */
  kli_lookup link_names, joint_names, point_names, joint_pairs;

  int length_unit, angle_unit;
  kl_sweep_settings sweep;
  int has_sweep;
  double gravity[2];
  int redundancy; /* constraints declared redundant */
  /* the loads and the working speed recorded for tools (kl_add_load,
   * kl_model_set_speed) */
  kl_load *loads;
  int nloads, cap_loads;
  int has_speed, speed_input;
  double speed, speed_fluctuation;
  /* the motion profile in time of one input (profile.c): segments, or a
   * table's knots; none while both counts are 0 */
  int profile_input;
  kli_segment *segments;
  int nsegments, cap_segments;
  kli_knot *knots;
  int nknots, cap_knots;
  /* couplings and point inputs (couplings.c); inputs[i] is -1 for a
   * point input */
  kli_coupling *couplings;
  int ncouplings, cap_couplings;
  kli_point_input *point_inputs;
  int npoint_inputs, cap_point_inputs;

  int finalized;
  kli_topology topo;
  char error[KLI_MESSAGE_SIZE];
};

/* Messages: formats into buf (KLI_MESSAGE_SIZE bytes; NULL for callers that
 * cannot keep a message) and returns status. */
int kli_fail(char *buf, int status, const char *fmt, ...)
#ifdef __GNUC__
    __attribute__((format(printf, 3, 4)))
#endif
    ;
const char *kli_kind_name(int kind);

/* The attachment of `joint` on `link` (one of its two links). */
const double *kli_joint_point_on(const kl_model *m, int joint, int link);
/* The link after each joint when walking joints[0..n) as a cycle: 1 and
 * links_after filled (may be NULL) if the walk closes, else 0. */
int kli_loop_links(const kl_model *m, int n, const int *joints,
                   int *links_after);
/* 1 for joints with a slide: prismatic, slot, arc slot and curve slot. */
int kli_is_sliding(int kind);
/* 1 for the pin-in-slot kinds (one constraint, two freedoms): slot, arc
 * slot and curve slot. */
int kli_is_pin_slot(int kind);
/* KL_OK when every load of loads[0..nloads) names a point (a force) or a
 * link (a torque) of m and holds finite numbers; else its status, with a
 * message naming `stage` and the load written into `error` (may be NULL). */
int kli_check_load_list(const kl_model *m, char *error, int nloads,
                        const kl_load *loads, const char *stage);
/* The input that drives `joint`, or -1. */
int kli_input_of(const kl_model *m, int joint);
/* The point input record of input i, or NULL for a joint input. */
const kli_point_input *kli_point_input_of(const kl_model *m, int input);
/* 1 when input i turns a revolute joint (an angle), 0 for a slide or a
 * point coordinate (a length). */
int kli_input_is_angle(const kl_model *m, int input);
/* Copies src's couplings and point inputs into the empty arrays of m;
 * 0 when memory runs out. Frees them (kli_free_couplings). */
int kli_copy_couplings(kl_model *m, const kl_model *src);
void kli_free_couplings(kl_model *m);
/* An unfinalized copy of m's record (links, joints, points, inputs,
 * registered loops, names, units, sketch, sweep, mass properties,
 * gravity, redundancy, loads, working speed), with m's allocator;
 * NULL when memory runs out. */
kl_model *kli_model_copy(const kl_model *m);
/* A new cam (kl_cam_new) made with allocator a (cam.c). */
kl_cam *kli_cam_new(const kli_allocator *a);
/* A copy of cam `c` made with allocator a (kl_cam_free frees it), or NULL
 * when memory runs out (cam.c). */
kl_cam *kli_cam_copy(const kli_allocator *a, const kl_cam *c);
/* A cam's follower, and its program's segments with their count in *n. */
const kl_cam_follower *kli_cam_follower_of(const kl_cam *c);
const kl_cam_segment *kli_cam_program_of(const kl_cam *c, int *n);
/* A solver or study made from m holds it: m is freed when the last holder
 * (the caller's handle included) lets go. Thread-safe. */
void kli_model_retain(const kl_model *m);
void kli_model_release(const kl_model *m);
/* Frees what finalize derived and marks the model unfinalized. */
void kli_topology_release(kl_model *m);
/* Fills t->sites and t->skips (room for one per joint) from t's loops and
 * scale, with `scratch` room for links + joints ints (loops.c). */
void kli_find_transmissions(const kl_model *m, kli_topology *t,
                            int *scratch);

#endif
