/**
 * @file kinloop.h
 * @brief The one public header of kinloop, an embeddable C99 library for
 * the position, velocity and acceleration of planar multi-loop linkages.
 *
 * Conventions that hold for every function below:
 *  - Angles are in radians, measured counter-clockwise from the global x-axis
 *    (link angles) or from a link's local x-axis (axis angles). Lengths are in
 *    any one consistent unit chosen by the caller; rates are per the caller's
 *    time unit.
 *  - Ids are non-negative ints, each kind numbered from 0 in order of
 *    creation. Link 0 is ground (KL_GROUND) and exists from the start.
 *  - Every call that can fail returns an int status: KL_OK (0) on success, a
 *    positive value for success with a remark, a negative KL_E* value on
 *    failure. A failed call changes nothing: the model or solver stays exactly
 *    as it was before the call.
 *  - The handle that failed keeps a message naming the offending items
 *    (kl_model_error, kl_solver_error), written by every failing call
 *    that takes a non-const handle and kept until the next such failure;
 *    calls on a const handle (getters) return their status and write no
 *    message. The library never prints, exits, aborts or uses global
 *    mutable state.
 *  - Messages read as the model's file does, whatever the call: links,
 *    joints and points by name ("link 'crank'") or, unnamed, by the file's
 *    reference "@id" (the id above, from 0; ground is link 'ground');
 *    inputs and loops, which have no names, numbered from 1 as the
 *    command-line tool numbers them ("input 1 (motor)", "loop 2"); an
 *    input's value in the model's recorded units (kl_model_set_units):
 *    "input 1 (motor) = 170 deg" when angles are deg, "= 2.967059728 rad"
 *    otherwise, lengths with the unit's symbol when one is stated. An
 *    argument that names nothing is the caller's C index, and says so:
 *    "input index 3 (0-based) does not exist (the model has 2 inputs)";
 *    so are items with no name of their own (loads, couplings, segments,
 *    array entries: "load index 1 (0-based)").
 *  - Memory: models and solvers allocate only through the allocator given at
 *    model creation. No call on a solver allocates after kl_solver_new.
 *  - Threads: a finalized model is immutable and may be shared by solvers on
 *    any number of threads; a solver or an unfinalized model is used by one
 *    thread at a time.
 *
 * Names follow one grammar (docs/CHANGELOG.md lists the renames of 0.2):
 *  - kl_HANDLE_VERB: what acts on a whole handle or its document data:
 *    kl_model_new, kl_model_finalize, kl_model_set_units / kl_model_units,
 *    kl_solver_sweep, kl_solver_options, kl_study_run. A getter has no
 *    "get": the noun alone reads (kl_model_units), kl_..._set_... writes.
 *  - kl_model_ITEM_PROPERTY: what the model records about one link,
 *    joint, point or input (kl_model_joint_kind, kl_model_link_name); the
 *    model's document data (names, units, sketch, sweep settings) is read
 *    and written only through kl_model_*.
 *  - kl_ITEM_QUANTITY(solver, id): a result of the solver's state
 *    (kl_link_angle, kl_joint_slide_rate, kl_point_velocity). Quantities
 *    are angle, slide, rate, accel, jerk, deriv, deriv2; a vector result
 *    fills an xy array and returns a status.
 *  - kl_add_ITEM: a builder (returns the new id); kl_solve_STAGE: a
 *    stage of the solver (position, velocity, acceleration, ...);
 *    kl_set_link_angle / kl_set_joint_slide set the solver's sketch.
 *  - kl_STRUCT_VERB for the figures computed on a value struct:
 *    kl_output_range, kl_output_sensitivity, kl_range_time_ratio.
 *  - kl_ENUM_str: the text of an enum value (kl_status_str).
 *  - Enum values are KL_ENUM_VALUE (KL_JOINT_REVOLUTE,
 *    KL_GRASHOF_CRANK_ROCKER, KL_OUTPUT_SLIDE); statuses are KL_OK, the
 *    remarks KL_LIMIT and KL_STOPPED, and the errors KL_E*.
 * The names the architecture fixed (kl_solve_acceleration,
 * kl_point_acceleration, kl_set_link_mass) keep their spelling; every other
 * name says "accel".
 */
#ifndef KINLOOP_H
#define KINLOOP_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/** Marks the library's exported symbols (the rest stay hidden). */
#if defined(KINLOOP_BUILDING) && defined(__GNUC__)
#define KL_API __attribute__((visibility("default")))
#else
#define KL_API
#endif

/* ------------------------------------------------------------------------
 * Version
 * ------------------------------------------------------------------------ */

/** Major version: changes when the API or ABI breaks. */
#define KINLOOP_VERSION_MAJOR 0
/** Minor version: new functions, nothing existing changed. */
#define KINLOOP_VERSION_MINOR 2
/** Patch version: fixes only. */
#define KINLOOP_VERSION_PATCH 0
/** The version as a string, "MAJOR.MINOR.PATCH"; the build reads it here. */
#define KINLOOP_VERSION "0.2.0"
/** MAJOR * 10000 + MINOR * 100 + PATCH, for compile-time comparisons. */
#define KINLOOP_VERSION_NUMBER                                                 \
  (KINLOOP_VERSION_MAJOR * 10000 + KINLOOP_VERSION_MINOR * 100 +               \
   KINLOOP_VERSION_PATCH)

/**
 * The library's version string, "MAJOR.MINOR.PATCH". Compare it (or
 * kl_version_number()) with KINLOOP_VERSION to check that the header a program
 * was compiled against matches the library it runs with.
 * Never fails; the string is static and owned by the library.
 */
KL_API const char *kl_version(void);

/** The library's KINLOOP_VERSION_NUMBER, the runtime twin of the macro. */
KL_API int kl_version_number(void);

/* ------------------------------------------------------------------------
 * Status codes
 * ------------------------------------------------------------------------ */

/** Statuses every fallible call returns: 0 success, positive success with
 * a remark, negative failure (see kl_status_str for the texts). */
enum kl_status {
  KL_OK = 0,               /**< success */
  KL_LIMIT = 1,            /**< success with a remark: a motion limit was reached */
  KL_STOPPED = 2,          /**< success with a remark: a callback asked to stop */
  KL_ENOMEM = -1,          /**< the allocator returned NULL */
  KL_EINVAL = -2,          /**< invalid argument: NULL pointer, bad count or option */
  KL_ENONFINITE = -3,      /**< a number is NaN or infinite */
  KL_EID = -4,             /**< unknown or negative id */
  KL_EKIND = -5,           /**< id of the wrong kind (e.g. a slide of a revolute joint) */
  KL_ESTATE = -6,          /**< call not allowed in this state (e.g. builder after finalize) */
  KL_ESELFJOINT = -7,      /**< a joint joins a link to itself */
  KL_EDUPLICATE = -8,      /**< duplicate joint, input or name */
  KL_EDISCONNECTED = -9,   /**< a link is not connected to ground */
  KL_EZEROLENGTH = -10,    /**< zero-length link or zero-length slide axis */
  KL_ELOOP = -11,          /**< a registered loop is not a simple cycle of joints */
  KL_ELOOPSET = -12,       /**< registered loops are not independent or not a full set */
  KL_EOVERCONSTRAINED = -13, /**< more constraints than the links can take */
  KL_EDOF = -14,           /**< number of inputs differs from the degrees of freedom */
  KL_EUNDETERMINED = -15,  /**< an unknown that no equation determines */
  KL_EMAXITER = -16,       /**< position: no convergence within the iteration limit */
  KL_ENOASSEMBLY = -17,    /**< position: the loops cannot close at these inputs */
  KL_ESINGULAR = -18,      /**< singular Jacobian: dead point, toggle or change point */
  KL_ESTAGE = -19,         /**< a stage called before the stage it needs succeeded */
  KL_ESYNTAX = -20,        /**< model file: not in the format (line and column given) */
  KL_EIO = -21,            /**< a file could not be read or written */
  KL_ETRUNCATED = -22,     /**< the caller's buffer is too small: the text was cut */
  KL_ETOOLARGE = -23,      /**< the request exceeds a documented bound of the library */
  KL_EINDETERMINATE = -24, /**< forces: the structure is statically indeterminate
                                (redundant constraints), so the joint forces are
                                not determined by equilibrium alone */
  /* curved slots and cams */
  KL_EFEWPOINTS = -25,     /**< a curve has too few points */
  KL_EREPEATED = -26,      /**< a curve repeats a point (a zero-length piece) */
  KL_ERADIUS = -27,        /**< a radius is zero or negative (a slot's, a cam's,
                                a gear's pitch radius), or a rack's is zero */
  KL_EUNDERCUT = -28,      /**< cam: the roller is larger than the pitch curve's
                                smallest convex radius of curvature */
  KL_EPRESSURE = -29,      /**< cam: the pressure angle exceeds the bound set */
  /* motion profiles */
  KL_EJOIN = -30,          /**< a motion profile's segment does not start
                                where the one before it ended */
  /* couplings (kl_add_gear_pair, kl_add_rack_pinion, kl_add_coupling) */
  KL_ENOMESH = -31,        /**< gear pair: the centre distance fits neither
                                radius1 + radius2 nor |radius1 - radius2| */
  KL_ENOCOMMON = -32,      /**< gear pair or rack: the two joints share no link */
  KL_ESELFCOUPLING = -33   /**< a joint coupled with itself */
};

/**
 * A short constant English text for a status, e.g. "no assembly". Unknown
 * values give "unknown status". Never fails; the string is static.
 */
KL_API const char *kl_status_str(int status);

/* ------------------------------------------------------------------------
 * Building a model
 * ------------------------------------------------------------------------ */

/** Link id of ground, the fixed link whose frame is the global frame. */
#define KL_GROUND 0

/** Joint kinds, as returned by kl_model_joint_kind(). */
enum kl_joint_kind {
  KL_JOINT_REVOLUTE = 0,  /**< pin: the two attachment points coincide */
  KL_JOINT_PRISMATIC = 1, /**< slider: b's point runs on a line of a; b keeps a's angle */
  KL_JOINT_SLOT = 2,      /**< pin in slot: b's point runs on a line of a; b may turn */
  KL_JOINT_ARC_SLOT = 3,  /**< pin in a circular-arc slot of a (kl_add_arc_slot) */
  KL_JOINT_CURVE_SLOT = 4 /**< pin in a slot of a along a spline (kl_add_curve_slot) */
};

/**
 * Allocator hook, realloc-style: resize the block `ptr` of `old_size` bytes
 * to `new_size` bytes and return it. `ptr` NULL means allocate; `new_size` 0
 * means free `ptr` and return NULL. Return NULL when memory is exhausted
 * (the library then fails with KL_ENOMEM and leaves everything as it was).
 * Blocks handed out must be aligned for any C object, as malloc's are.
 * `user` is the pointer given with the hook. A model and all its solvers call
 * the hook; if solvers of one model run on several threads, the hook must be
 * thread-safe.
 */
typedef void *(*kl_alloc_fn)(void *user, void *ptr, size_t old_size,
                             size_t new_size);

/** A mechanism description (opaque): built, finalized, then immutable. */
typedef struct kl_model kl_model;

/**
 * A new, empty model holding only ground (link 0, named "ground"), using
 * malloc/realloc/free. Returns NULL when memory is exhausted. Free with
 * kl_model_free().
 */
KL_API kl_model *kl_model_new(void);

/**
 * As kl_model_new(), with every allocation of the model and of its solvers
 * made through `fn` with `user`. Returns NULL if `fn` is NULL or fails.
 */
KL_API kl_model *kl_model_new_with_alloc(kl_alloc_fn fn, void *user);

/**
 * Lets go of the caller's handle to the model. The model and everything it
 * owns are freed at once if no solver or study made from it is left;
 * otherwise when the last of them is freed (kl_solver_free, kl_study_free),
 * so those keep working. Either way the caller must not use `m` after this
 * call. NULL does nothing. Thread-safe against solvers of the same model
 * being made and freed on other threads at the same time (the count of
 * holders changes by atomic operations); the model's allocator hook is
 * called by whichever thread lets go last.
 */
KL_API void kl_model_free(kl_model *m);

/**
 * The message of the model's last failed call, naming the items involved
 * as the conventions above say; "" if none failed yet. Owned by the model; valid until the next
 * call on the model. A NULL model gives a fixed text.
 */
KL_API const char *kl_model_error(const kl_model *m);

/**
 * Adds a moving link. `name` may be NULL (the link is then called by its id
 * alone); otherwise it is copied and must be 1 to 255 bytes without control
 * characters and not used by another link.
 * Returns the new link id (>= 1), or KL_EINVAL (bad name), KL_EDUPLICATE (name
 * taken), KL_ESTATE (model finalized), KL_ENOMEM.
 */
KL_API int kl_add_link(kl_model *m, const char *name);

/**
 * Adds a revolute (pin) joint: point (ax, ay) in link a's frame coincides with
 * point (bx, by) in link b's frame. Its joint coordinate is the relative angle
 * angle(b) - angle(a).
 * Returns the new joint id, or KL_EID (unknown link), KL_ESELFJOINT (a == b),
 * KL_ENONFINITE, KL_EDUPLICATE (another joint of the same kind already joins
 * the same two links), KL_ESTATE (finalized), KL_ENOMEM.
 */
KL_API int kl_add_revolute(kl_model *m, int a, double ax, double ay, int b,
                           double bx, double by);

/**
 * Adds a prismatic (slider) joint: point (bx, by) of link b lies on the line
 * of link a through (ax, ay) at `axis_angle` (radians, in a's frame), and b
 * keeps a's orientation, so b's local points are given in a frame parallel to
 * a's. The joint coordinate, the slide s, is the signed distance from a's
 * point to b's point along the axis direction (cos axis_angle, sin axis_angle).
 * Returns the new joint id or the statuses of kl_add_revolute().
 */
KL_API int kl_add_prismatic(kl_model *m, int a, double ax, double ay,
                            double axis_angle, int b, double bx, double by);

/**
 * Adds a slot (pin-in-slot) joint: as kl_add_prismatic() without the rotation
 * lock, so b may turn against a (two freedoms). Its slide is the coordinate an
 * input prescribes; its relative angle stays free.
 * Returns the new joint id or the statuses of kl_add_revolute().
 */
KL_API int kl_add_slot(kl_model *m, int a, double ax, double ay,
                       double axis_angle, int b, double bx, double by);

/**
 * As kl_add_prismatic(), with the slide line of link a given by two of its
 * points: the slide is measured from (ax, ay) toward (tx, ty).
 * Returns as kl_add_prismatic(), and KL_EZEROLENGTH if the two points coincide.
 */
KL_API int kl_add_prismatic_through(kl_model *m, int a, double ax, double ay,
                                    double tx, double ty, int b, double bx,
                                    double by);

/** As kl_add_prismatic_through(), for a slot joint. */
KL_API int kl_add_slot_through(kl_model *m, int a, double ax, double ay,
                               double tx, double ty, int b, double bx,
                               double by);

/**
 * Adds a named point (x, y) in the frame of `link` (ground allowed): a coupler
 * point, a tool tip. `name` follows the rules of kl_add_link() among points.
 * Returns the new point id, or KL_EID, KL_ENONFINITE, KL_EINVAL,
 * KL_EDUPLICATE, KL_ESTATE, KL_ENOMEM.
 */
KL_API int kl_add_point(kl_model *m, int link, double x, double y,
                        const char *name);

/**
 * Makes the coordinate of `joint` an input (driver): the relative angle of a
 * revolute joint, the slide of a prismatic or slot joint. Inputs are numbered
 * from 0 in the order added, and that is the order of every inputs array.
 * Returns the input's index, or KL_EID, KL_EDUPLICATE (already an input),
 * KL_ESTATE, KL_ENOMEM.
 */
KL_API int kl_add_input(kl_model *m, int joint);

/**
 * Registers a loop: `njoints` (>= 2) joint ids in the order a walk around one
 * simple cycle meets them; consecutive joints (and the last with the first)
 * must share a link, and no link may be visited twice. If any loop is
 * registered, the registered loops must form a full independent set
 * (checked by kl_model_finalize); if none is, kinloop finds them itself.
 * A model registers at most 1024 loops (their independence check grows with
 * the square of their number); kinloop finds any number itself.
 * Returns the loop's index, or KL_EINVAL (NULL or njoints < 2), KL_EID,
 * KL_ELOOP (not a simple cycle), KL_ETOOLARGE (a 1025th loop), KL_ESTATE,
 * KL_ENOMEM. Takes time linear in njoints and the model's size.
 */
KL_API int kl_add_loop(kl_model *m, int njoints, const int *joints);

/**
 * Checks the topology and prepares the equations. After success the model is
 * immutable: builders fail with KL_ESTATE, and solvers may be made.
 * Checks, each with its own status and a message naming the items:
 *  KL_EDISCONNECTED  a link not connected to ground through joints
 *  KL_ELOOPSET       registered loops not independent, or not a full set
 *  KL_EOVERCONSTRAINED  Gruebler's count plus the declared redundancy
 *                    (kl_model_set_redundancy) below zero, or a link angle
 *                    fixed twice over by prismatic joints and revolute inputs
 *  KL_EDOF           number of inputs differs from the degrees of freedom
 *                    (Gruebler's count plus the declared redundancy)
 *  KL_EZEROLENGTH    a link whose joints all stand at one point, so that its
 *                    angle is undetermined
 *  KL_EUNDETERMINED  an angle or slide that no loop equation can determine
 *  KL_ETOOLARGE      the loops and the paths from ground to every link and
 *                    point would need more than 64 terms per item of the
 *                    model plus 2^22 (a model thousands of links deep):
 *                    refused rather than given memory quadratic in its size
 *  KL_ENOMEM
 * On failure the model stays unfinalized and may be changed and finalized
 * again. Calling it on a finalized model returns KL_OK and does nothing.
 */
KL_API int kl_model_finalize(kl_model *m);

/** 1 if the model is finalized, 0 if not (or NULL). */
KL_API int kl_model_is_finalized(const kl_model *m);

/**
 * Degrees of freedom: Gruebler's (Kutzbach's) count for planar linkages,
 * 3 (links - 1) - 2 (revolute + prismatic joints) - (slot joints), plus the
 * redundant constraints the model declares (kl_model_set_redundancy; 0
 * unless declared), which a finalized model's number of inputs equals;
 * KL_ESTATE before finalize, KL_EINVAL for NULL.
 */
KL_API int kl_model_dof(const kl_model *m);

/** Number of independent loops (registered or found); KL_ESTATE before finalize. */
KL_API int kl_model_loop_count(const kl_model *m);

/**
 * The joints of loop `loop` in walking order: writes up to `cap` ids into
 * `joints` (may be NULL when cap is 0) and returns the loop's joint count, or
 * KL_ESTATE (not finalized), KL_EID, KL_EINVAL.
 */
KL_API int kl_model_loop(const kl_model *m, int loop, int *joints, int cap);

/**
 * The model's length scale: the largest distance between two joint
 * attachment points on one link (1 if every link is of zero size). Position
 * tolerances are relative to it. NaN before finalize and for NULL.
 */
KL_API double kl_model_scale(const kl_model *m);

/**
 * Names joint `joint` (the builders leave joints unnamed). `name` follows the
 * rules of kl_add_link() among joints. Returns KL_OK, KL_EID, KL_EINVAL,
 * KL_EDUPLICATE, KL_ESTATE (finalized), KL_ENOMEM.
 */
KL_API int kl_model_set_joint_name(kl_model *m, int joint, const char *name);

/** Units of length a model can record (the numbers are not converted). */
enum kl_length_unit {
  KL_LENGTH_UNSTATED = 0, /**< any consistent unit, not recorded */
  KL_LENGTH_MM = 1,
  KL_LENGTH_M = 2,
  KL_LENGTH_IN = 3
};
/** Units in which a model file gives its angles (the API is in radians). */
enum kl_angle_unit { KL_ANGLE_RAD = 0, KL_ANGLE_DEG = 1 };

/**
 * Records the units of the model's numbers, for model files and reports:
 * lengths stay as given (in `length_unit`); angles at the API are always
 * radians, and `angle_unit` is the unit a model file writes them in.
 * Returns KL_OK, KL_EINVAL (unknown unit), KL_ESTATE (finalized).
 */
KL_API int kl_model_set_units(kl_model *m, int length_unit, int angle_unit);
/** The recorded units into either pointer (may be NULL). KL_OK, KL_EINVAL. */
KL_API int kl_model_units(const kl_model *m, int *length_unit,
                          int *angle_unit);
/** "mm", "m", "in", or "" when unstated (static text). */
KL_API const char *kl_length_unit_str(int length_unit);
/** "deg" for KL_ANGLE_DEG, "rad" otherwise (static text). */
KL_API const char *kl_angle_unit_str(int angle_unit);

/**
 * Records a sketch angle (radians) for a moving link in the model, so that
 * every new solver starts from it (as if kl_set_link_angle had been called
 * in order of link id); it chooses the assembly mode of the first solve.
 * Returns KL_OK, KL_EID, KL_EKIND (ground), KL_ENONFINITE, KL_ESTATE.
 */
KL_API int kl_model_set_sketch_angle(kl_model *m, int link, double angle);
/** As kl_model_set_sketch_angle, for the slide of a prismatic or slot joint. */
KL_API int kl_model_set_sketch_slide(kl_model *m, int joint, double slide);
/** The recorded sketch angle of a link, NaN if none (or unknown id). */
KL_API double kl_model_sketch_angle(const kl_model *m, int link);
/** The recorded sketch slide of a joint, NaN if none (or unknown id). */
KL_API double kl_model_sketch_slide(const kl_model *m, int joint);

/* ------------------------------------------------------------------------
 * The step bound (one limit for steps wherever they come from)
 * ------------------------------------------------------------------------ */

/**
 * The most steps one sweep takes, wherever the count comes from:
 * kl_solver_sweep and every call that sweeps (kl_solver_sweep_rows,
 * kl_output_range, kl_input_effort_range, the cycle figures), the sweep
 * settings of kl_model_set_sweep, a kl_cycle's `steps`, and the `steps` of
 * model and study files (and a study's `at` outputs, reached in steps no
 * longer than its sweep's). Beyond it a call returns KL_ETOOLARGE and a
 * reader KL_ESYNTAX at the number, each message naming this limit. Ten
 * million steps keep a sweep's work and a table of its rows bounded
 * (docs/guarantees.md) while far finer than any drawing or plot needs.
 */
#define KL_MAX_STEPS 10000000

/** Sweep settings a model may carry (for tools that run it). */
typedef struct kl_sweep_settings {
  size_t size; /**< sizeof(kl_sweep_settings), set by the caller */
  int input;   /**< which input sweeps */
  double from; /**< start: rad, or length for a sliding input */
  double to;   /**< end, in the same unit */
  int steps;   /**< 1 <= steps <= KL_MAX_STEPS */
} kl_sweep_settings;

/**
 * Records sweep settings in the model. Returns KL_OK, KL_EINVAL (NULL,
 * size too small, steps < 1), KL_ETOOLARGE (steps > KL_MAX_STEPS), KL_EID
 * (no such input), KL_EKIND (a point input: the recorded sweep drives a
 * joint), KL_ENONFINITE (an end NaN or infinite, or to - from beyond a
 * double), KL_ESTATE (finalized).
 */
KL_API int kl_model_set_sweep(kl_model *m, const kl_sweep_settings *sweep);
/** The recorded sweep settings; KL_OK, KL_EID if there are none, KL_EINVAL. */
KL_API int kl_model_sweep(const kl_model *m, kl_sweep_settings *sweep);

/* ---- Held inputs: the start values of inputs other than the swept one ---- */
/**
 * Records the value input `input` holds at the model's start (rad, or length
 * for a sliding input): kl_model_start_inputs gives it, so a sweep of another
 * input keeps it there (model-file statement `hold JOINT at VALUE`). The
 * swept input's own start is its sweep settings' start. Returns KL_OK,
 * KL_EINVAL (NULL model), KL_EID (no such input), KL_EKIND (a point input), KL_ENONFINITE, KL_ESTATE
 * (finalized).
 */
KL_API int kl_model_set_input_hold(kl_model *m, int input, double value);
/** The value recorded by kl_model_set_input_hold, NaN if none (or unknown
 * input). */
KL_API double kl_model_input_hold(const kl_model *m, int input);
/* ---- end of held inputs ---- */

/* Mass properties, gravity and redundancy: model document data for the
 * force stage, set before finalize and readable at any time. Units: any one
 * consistent system; forces come out in mass x length / time^2 (kg, m, s
 * give N; kg, mm, s give mN, since 1 kg mm / s^2 = 1e-3 N), moments in that
 * force times the length unit. */

/**
 * Sets the mass properties of a moving link: `mass` (>= 0), the centre of
 * mass (cx, cy) in the link's frame, and the moment of inertia about the
 * centre of mass (`inertia` >= 0, mass x length^2). A link never given them
 * is massless (mass 0, centre (0, 0), inertia 0); a later call replaces
 * the earlier one. Returns KL_OK, KL_EINVAL (NULL model, or a negative mass
 * or inertia), KL_ENONFINITE (a NaN or infinite number), KL_EID (unknown
 * link), KL_EKIND (ground: it does not move), KL_ESTATE (finalized). On
 * failure the model is unchanged. Never allocates.
 */
KL_API int kl_set_link_mass(kl_model *m, int link, double mass, double cx,
                            double cy, double inertia);
/**
 * The mass properties of a link into `mass`, `cxy` (the centre of mass in
 * the link's frame) and `inertia` (about the centre of mass); each pointer
 * may be NULL. Ground and links never given them read as massless.
 * Returns KL_OK, KL_EID, KL_EINVAL (NULL model).
 */
KL_API int kl_model_link_mass(const kl_model *m, int link, double *mass,
                              double cxy[2], double *inertia);
/**
 * Sets gravity, the acceleration (gx, gy) of free fall in the global frame
 * (length / time^2; (0, -9.81) for metres and seconds with y up, (0, -9810)
 * for millimetres); (0, 0), the default, leaves it out. Returns KL_OK,
 * KL_ENONFINITE, KL_ESTATE (finalized), KL_EINVAL (NULL).
 */
KL_API int kl_model_set_gravity(kl_model *m, double gx, double gy);
/** The model's gravity into `gxy`. KL_OK, KL_EINVAL (NULL). */
KL_API int kl_model_gravity(const kl_model *m, double gxy[2]);
/**
 * Declares that the model is over-constrained by design: `redundant` (>= 0)
 * of its constraints repeat what the others already impose, given its
 * special proportions (a parallelogram with a third parallel crank, a link
 * doubled for strength). Gruebler's count then understates the mobility by
 * that number, and kl_model_finalize expects inputs = Gruebler's count +
 * `redundant`. The loop equations have `redundant` more rows than
 * unknowns; the position stage solves the rest and checks that those rows
 * close too (KL_ENOASSEMBLY naming the loop when the proportions are not
 * the special ones), and the force stage reports KL_EINDETERMINATE: the
 * joint forces of such a structure depend on its elasticity, not on
 * equilibrium alone. Default 0. Returns KL_OK, KL_EINVAL (negative, or
 * NULL), KL_ESTATE (finalized).
 */
KL_API int kl_model_set_redundancy(kl_model *m, int redundant);
/** The declared number of redundant constraints, or KL_EINVAL for NULL. */
KL_API int kl_model_redundancy(const kl_model *m);

/* Reading a model back. Getters that return an int give KL_EID for an unknown
 * id and KL_EINVAL for NULL pointers; they never set the model's message. */

KL_API int kl_model_link_count(const kl_model *m);  /**< links including ground */
KL_API int kl_model_joint_count(const kl_model *m); /**< joints added so far */
KL_API int kl_model_point_count(const kl_model *m); /**< points added so far */
KL_API int kl_model_input_count(const kl_model *m); /**< inputs added so far */

/** The link's name, "ground" for link 0, NULL if unnamed or unknown. */
KL_API const char *kl_model_link_name(const kl_model *m, int link);
/** The point's name, NULL if unnamed or unknown. */
KL_API const char *kl_model_point_name(const kl_model *m, int point);
/** The id of the link named `name`, or KL_EID if there is none. */
KL_API int kl_model_find_link(const kl_model *m, const char *name);
/** The joint's name, NULL if unnamed or unknown. */
KL_API const char *kl_model_joint_name(const kl_model *m, int joint);
/** The id of the joint named `name`, or KL_EID if there is none. */
KL_API int kl_model_find_joint(const kl_model *m, const char *name);
/** The id of the point named `name`, or KL_EID if there is none. */
KL_API int kl_model_find_point(const kl_model *m, const char *name);
/** The link a point belongs to, and its local coordinates into `xy` (may be NULL). */
KL_API int kl_model_point_link(const kl_model *m, int point, double xy[2]);
/** An enum kl_joint_kind value, or KL_EID. */
KL_API int kl_model_joint_kind(const kl_model *m, int joint);
/**
 * The joint's links into `links` ([0] = a, [1] = b) and its attachment points
 * into `a_xy` and `b_xy` (each may be NULL). Returns KL_OK or KL_EID.
 */
KL_API int kl_model_joint_links(const kl_model *m, int joint, int links[2],
                          double a_xy[2], double b_xy[2]);
/** The slide axis angle of a prismatic or (straight) slot joint in a's frame;
 * NaN otherwise. */
KL_API double kl_model_joint_axis(const kl_model *m, int joint);
/** The joint an input drives, or KL_EID; KL_EKIND for a point input
 * (kl_add_point_input). */
KL_API int kl_model_input_joint(const kl_model *m, int input);

/* ------------------------------------------------------------------------
 * The model's start position, and the layout of a row of every quantity
 * ------------------------------------------------------------------------ */

/**
 * The model's start position into `inputs` (one per input): the start of
 * its sweep settings for the input they sweep, for a point input (after
 * finalize) its point's coordinate where the model's sketch puts it, for
 * the others the value kl_model_set_input_hold recorded, else 0.
 * kl_solver_reach starts there. Returns KL_OK, or
 * KL_EINVAL (NULL model, or NULL inputs for a model with inputs). Works
 * before and after finalize; never allocates.
 */
KL_API int kl_model_start_inputs(const kl_model *m, double *inputs);

/**
 * The quantities of a row (kl_solver_row), in the order a row holds them:
 * one block per quantity, and in each block one value per item: per input
 * in input order, per link by id (ground, link 0, included), per joint by
 * id, per point by id, per transmission site in the order of
 * kl_model_transmissions, or one value for the whole state. The values are
 * those of the single getters named below, NaN where they give NaN or a
 * status other than KL_OK (a stage not solved, a slide of a revolute
 * joint). Later versions add quantities after the last; find a block with
 * kl_model_row_offset, never by counting by hand.
 */
enum kl_quantity {
  KL_QUANTITY_INPUT_VALUE = 0,        /**< kl_input_value */
  KL_QUANTITY_INPUT_RATE = 1,         /**< the rates kl_solve_velocity was
                                           given at this position */
  KL_QUANTITY_INPUT_ACCEL = 2,        /**< the accelerations
                                           kl_solve_acceleration was given */
  KL_QUANTITY_LINK_ANGLE = 3,         /**< kl_link_angle */
  KL_QUANTITY_LINK_RATE = 4,          /**< kl_link_rate */
  KL_QUANTITY_LINK_ACCEL = 5,         /**< kl_link_accel */
  KL_QUANTITY_JOINT_ANGLE = 6,        /**< kl_joint_angle */
  KL_QUANTITY_JOINT_SLIDE = 7,        /**< kl_joint_slide */
  KL_QUANTITY_JOINT_SLIDE_RATE = 8,   /**< kl_joint_slide_rate */
  KL_QUANTITY_JOINT_SLIDE_ACCEL = 9,  /**< kl_joint_slide_accel */
  KL_QUANTITY_POINT_X = 10,           /**< x of kl_point_position */
  KL_QUANTITY_POINT_Y = 11,           /**< y of kl_point_position */
  KL_QUANTITY_POINT_VX = 12,          /**< x of kl_point_velocity */
  KL_QUANTITY_POINT_VY = 13,          /**< y of kl_point_velocity */
  KL_QUANTITY_POINT_AX = 14,          /**< x of kl_point_acceleration */
  KL_QUANTITY_POINT_AY = 15,          /**< y of kl_point_acceleration */
  KL_QUANTITY_TRANSMISSION = 16,      /**< kl_output_value of each site */
  KL_QUANTITY_RCOND = 17,             /**< one value: the reciprocal
                                           condition number of the Jacobian
                                           at the position solved, estimated
                                           as kl_solve_stats' rcond is; NaN
                                           if none is solved */
  KL_QUANTITY_INPUT_JERK = 18,        /**< the jerks kl_solve_jerk was
                                           given */
  KL_QUANTITY_LINK_JERK = 19,         /**< kl_link_jerk */
  KL_QUANTITY_JOINT_SLIDE_JERK = 20,  /**< kl_joint_slide_jerk */
  KL_QUANTITY_POINT_JX = 21,          /**< x of kl_point_jerk */
  KL_QUANTITY_POINT_JY = 22           /**< y of kl_point_jerk */
};

/**
 * "input_value", "link_angle", ... "rcond": a quantity's name, its enum
 * value's in lower case without the prefix (usable as a field name), or
 * NULL for a number that is no quantity. Static text.
 */
KL_API const char *kl_quantity_str(int quantity);

/**
 * The number of values in a row of the finalized model: the sum of every
 * quantity's block. Returns it, or KL_ESTATE (not finalized), KL_EINVAL.
 */
KL_API int kl_model_row_size(const kl_model *m);

/**
 * Where quantity `quantity`'s block starts in a row, with its number of
 * values into `*count` (may be NULL). Returns the offset (>= 0), or KL_EID
 * for a number that is no quantity (the quantities are numbered from 0
 * without gaps, so the first KL_EID marks the end), KL_ESTATE (not
 * finalized), KL_EINVAL.
 */
KL_API int kl_model_row_offset(const kl_model *m, int quantity, int *count);

/* ------------------------------------------------------------------------
 * Model files (the format is described in docs/model-format.md)
 * ------------------------------------------------------------------------ */

/** Where and why reading or writing a model file failed. */
typedef struct kl_io_error {
  size_t size;       /**< sizeof(kl_io_error), set by the caller */
  int status;        /**< KL_OK, or why it failed */
  int line;          /**< 1-based line of a syntax or statement error; 0 for
                          the model as a whole or none */
  int column;        /**< 1-based column in that line; 0 if none */
  char message[256]; /**< what was expected, and what was found */
} kl_io_error;

/**
 * Reads a model from `length` bytes of text at `text` (any bytes: no NUL
 * needed, none allowed) and finalizes it. Returns the new model, or NULL
 * with `err` (may be NULL) telling why: KL_ESYNTAX with line, column and
 * what was expected; the builders' and kl_model_finalize's statuses with
 * the line of the statement involved (so KL_ETOOLARGE for sweep steps
 * above KL_MAX_STEPS, at the number); KL_EINVAL (line 0) for input longer
 * than 16 MiB, the documented size limit of model and study texts;
 * KL_ESYNTAX (line 0) for a text with no statement; KL_ENOMEM. Lines end
 * with LF, CR LF or CR. The reader never reads past `length`, and
 * allocates and takes time in proportion to the input.
 */
KL_API kl_model *kl_model_read(const char *text, size_t length,
                               kl_io_error *err);
/** As kl_model_read, with every allocation through `fn` and `user`. */
KL_API kl_model *kl_model_read_with_alloc(const char *text, size_t length,
                                          kl_alloc_fn fn, void *user,
                                          kl_io_error *err);
/** As kl_model_read, from the file at `path` (KL_EIO if it cannot be read). */
KL_API kl_model *kl_model_read_file(const char *path, kl_io_error *err);

/**
 * Writes the model as model-file text into `buf` (at most `cap` bytes, NUL
 * included; buf may be NULL when cap is 0) and the length it needs, without
 * the NUL, into `*needed` (may be NULL): call once to size, once to write.
 * Reading the text back gives the same model (numbers are written with 17
 * significant digits; angles in degrees convert to within a rounding).
 * Returns KL_OK (also for the sizing call with buf NULL and cap 0), or
 * KL_EINVAL (NULL model, or buf NULL with cap > 0), or KL_ETRUNCATED (buf
 * too small: the text is cut at cap - 1 bytes and NUL-terminated, and
 * *needed still says the whole length).
 */
KL_API int kl_model_write(const kl_model *m, char *buf, size_t cap,
                          size_t *needed);
/** Writes the model to the file at `path`: KL_OK, KL_EIO, KL_ENOMEM, KL_EINVAL. */
KL_API int kl_model_write_file(const kl_model *m, const char *path,
                               kl_io_error *err);

/* ------------------------------------------------------------------------
 * Solving
 * ------------------------------------------------------------------------ */

/** A solver for one finalized model (opaque): its state and all the memory
 * its calls need. One thread at a time. */
typedef struct kl_solver kl_solver;

/** How the linear systems of a solver are factored (kl_options.kernel). */
enum kl_kernel {
  KL_KERNEL_AUTO = 0,   /**< choose by size and structure (the default) */
  KL_KERNEL_SMALL = 1,  /**< built-in LU with partial pivoting, for a few unknowns */
  KL_KERNEL_DENSE = 2,  /**< LAPACK's dense LU */
  KL_KERNEL_BANDED = 3  /**< banded LU in LAPACK's band storage, with the
                             results of its dgbtrf, after a band-reducing
                             ordering (docs/theory.md says how each kernel
                             works) */
};

/**
 * Solver options. Always start from kl_options_default(), which sets `size`;
 * fields added in later versions come after the existing ones.
 */
typedef struct kl_options {
  size_t size;             /**< sizeof(kl_options), set by kl_options_default */
  double tolerance;        /**< residual |F|inf <= tolerance * scale; default 1e-12 */
  double step_tolerance;   /**< Newton step |dq|inf (rad, slides / scale); default 1e-10 */
  int max_iterations;      /**< Newton iterations per position solve; default 50 */
  int max_backtracks;      /**< line-search halvings per iteration; default 40 */
  double max_step;         /**< largest Newton step: rad, or scale units for slides; default 1 */
  double singular_rcond;   /**< rcond below this at the solution is singular; default 1e-8 */
  int kernel;              /**< enum kl_kernel; default KL_KERNEL_AUTO, which chooses by
                                size and band (docs/theory.md). All give the same answers
                                to rounding. */
  int pass_change_points;  /**< sweeps at a change point (where two branches cross):
                                0 stop there and report it (KL_ESINGULAR, the default);
                                1 go on through it on the branch that continues with
                                the same tangent, counting each passage
                                (kl_sweep_result.passages) */
} kl_options;

/** Fills `o` with the default options (and `o->size`) as this header
 * declares the struct. NULL does nothing. */
KL_API void kl_options_default(kl_options *o);

/**
 * Fills at most `size` bytes of `o` with the default options and sets
 * `o->size` to that size: for callers whose kl_options may be older (shorter)
 * than the library's, e.g. bindings that mirror the struct. Fields the
 * caller's struct lacks keep their defaults in kl_solver_set_options.
 */
KL_API void kl_options_init(kl_options *o, size_t size);

/**
 * A new solver for a finalized model, with all the memory every later call
 * needs, taken here from the model's allocator. Its state starts with every
 * link angle and slide at 0 (set sketch values with kl_set_link_angle and
 * kl_set_joint_slide before the first solve). Returns NULL if `m` is NULL, not
 * finalized (see kl_model_is_finalized), or memory is exhausted.
 * The solver (like one made by kl_solver_new_in) holds the model: the model
 * lives until the solver is freed, even after the caller's kl_model_free,
 * and kl_solver_model gives it back meanwhile. Holding it is the one change
 * a solver makes to the model, an atomic count, so many threads may make
 * and free solvers of one model at once.
 */
KL_API kl_solver *kl_solver_new(const kl_model *m);

/**
 * Bytes a solver for `m` needs inside a caller-supplied block, or 0 if `m` is
 * NULL or not finalized. A model whose solver would need more bytes than a
 * size_t holds gives SIZE_MAX (the sizes saturate, never wrap), which no
 * block holds: kl_solver_new then returns NULL, and kl_solver_new_in
 * refuses it.
 */
KL_API size_t kl_solver_bytes(const kl_model *m);

/**
 * A new solver placed inside the caller's `block` of `size` bytes (at least
 * kl_solver_bytes(m)), so that no heap is used at
 * all; the block must stay valid until kl_solver_free, which then frees
 * nothing. The block must be aligned for a double. Returns NULL if an
 * argument is bad, the block is too small or misaligned.
 */
KL_API kl_solver *kl_solver_new_in(const kl_model *m, void *block, size_t size);

/** Frees a solver (nothing for one made by kl_solver_new_in). NULL does nothing. */
KL_API void kl_solver_free(kl_solver *s);

/** The model the solver was made for. */
KL_API const kl_model *kl_solver_model(const kl_solver *s);

/**
 * The message of the solver's last failed call, in the model's units and
 * numbering (the conventions above); "" if none failed yet. Owned by the
 * solver; valid until the next call on it.
 */
KL_API const char *kl_solver_error(const kl_solver *s);

/**
 * Sets the solver's options (copied). Returns KL_OK, or KL_EINVAL for NULL, a
 * `size` that is too small, a tolerance not in (0, 1e-3], a step tolerance
 * not in (0, 1e-2], fewer than 1 or more than 10000 iterations, backtracks
 * not in [0, 100], a max_step not in (0, 100], or a singular_rcond not in
 * [0, 1e-3), or an unknown kernel. KL_ENONFINITE for NaN or infinite
 * values. Never allocates.
 */
KL_API int kl_solver_set_options(kl_solver *s, const kl_options *o);

/** Copies the solver's options into `o` (up to o->size bytes if set, else all). */
KL_API int kl_solver_options(const kl_solver *s, kl_options *o);

/**
 * Sketch: sets a link's angle (radians) in the solver's state, the starting
 * guess that chooses the assembly mode of the next position solve; whole
 * turns do not matter. A link whose angle follows another's through a
 * prismatic joint or a revolute input moves that other link so that this one
 * gets `angle` at the last inputs solved (or zero inputs before any solve); a
 * link whose angle the inputs alone set (a crank driven from ground) keeps
 * it, as the next solve sets it exactly anyway.
 * Invalidates the solved position. Returns KL_OK, KL_EID, KL_EKIND (ground),
 * KL_ENONFINITE, KL_EINVAL (NULL solver).
 */
KL_API int kl_set_link_angle(kl_solver *s, int link, double angle);

/**
 * Sketch: sets the slide of a prismatic or slot joint in the solver's state
 * (an input slide keeps its value: the next solve sets it exactly).
 * Invalidates the solved position. Returns KL_OK, KL_EID, KL_EKIND (revolute
 * joint), KL_ENONFINITE, KL_EINVAL (NULL solver).
 */
KL_API int kl_set_joint_slide(kl_solver *s, int joint, double slide);

/**
 * Position stage: solves the loop-closure equations at `inputs` (one per
 * input, in input order; may be NULL when the model has none) by
 * Newton-Raphson with LAPACK LU and a backtracking line search, starting from
 * the solver's current state, which thereby chooses the assembly mode. The
 * driven coordinates are set exactly before iterating.
 * Returns KL_OK, and on failure leaves the state exactly as it was:
 *  KL_ENONFINITE    an input is NaN or infinite
 *  KL_ENOASSEMBLY   the loops cannot close at these inputs (the residual
 *                   stalls at a positive minimum)
 *  KL_EMAXITER      no convergence within max_iterations
 *  KL_ESINGULAR     converged to a position where the Jacobian is singular
 *                   (rcond < singular_rcond): dead point, toggle, change point
 *  KL_EINVAL        NULL solver, or NULL inputs for a model with inputs
 * Never allocates. kl_solver_stats() describes the attempt either way.
 */
KL_API int kl_solve_position(kl_solver *s, const double *inputs);

/**
 * Velocity stage: link rates, slide rates and point velocities for the
 * `input_rates` (per input, rad or length per time unit; NULL when the model
 * has none), at the position last solved. Uses the LU factors of the
 * Jacobian at the converged position.
 * Returns KL_OK, KL_ESTAGE (no position solved at the current inputs),
 * KL_ESINGULAR (the Jacobian is singular there), KL_ENONFINITE, KL_EINVAL.
 * On failure the state is unchanged. Never allocates.
 */
KL_API int kl_solve_velocity(kl_solver *s, const double *input_rates);

/**
 * Acceleration stage: link, slide and point accelerations for the
 * `input_accels` (NULL when the model has none), at the position and rates
 * last solved. Includes every second-order term (centripetal terms of the
 * rotating link vectors, the Coriolis term 2 sdot omega of each slide on a
 * rotating link). Returns KL_OK, KL_ESTAGE (no velocity solved at the current
 * position), KL_ESINGULAR, KL_ENONFINITE, KL_EINVAL. Never allocates.
 */
KL_API int kl_solve_acceleration(kl_solver *s, const double *input_accels);

/**
 * Statistics of the last position solve attempt, successful or not. Fill
 * `size` with sizeof(kl_solve_stats) first; fields past it are not written.
 */
typedef struct kl_solve_stats {
  size_t size;              /**< sizeof(kl_solve_stats), set by the caller */
  int status;               /**< what kl_solve_position returned */
  int iterations;           /**< Newton iterations taken */
  int residual_evaluations; /**< evaluations of the loop equations */
  int factorizations;       /**< LU factorizations of the Jacobian */
  int backtracks;           /**< line-search step reductions, all iterations */
  double residual;          /**< |F|inf at the final iterate, length units */
  double step;              /**< |dq|inf of the last Newton step */
  double rcond;             /**< reciprocal condition number (1-norm, slide columns scaled to
                                 lengths) at the last factored iterate, the solution or
                                 one quadratically converged Newton step before it: exact
                                 for 2 x 2 systems, else an estimate or, far from singular
                                 (at least 1e-6 and singular_rcond), a guaranteed lower
                                 bound (docs/theory.md 5.6); 0 if singular */
  int kernel;               /**< the enum kl_kernel that factored the system */
} kl_solve_stats;

/** Copies the statistics of the last position attempt. KL_OK or KL_EINVAL. */
KL_API int kl_solver_stats(const kl_solver *s, kl_solve_stats *st);

/* ------------------------------------------------------------------------
 * Results. They read the solver's current state: the position last solved
 * (or the sketch set since), and the rates and accelerations last solved at
 * that position. A rate or acceleration not solved at the current position
 * reads as NaN (getters returning double) or KL_ESTAGE (getters returning an
 * int); an unknown id reads as NaN or KL_EID. Getters never allocate.
 * ------------------------------------------------------------------------ */

KL_API double kl_link_angle(const kl_solver *s, int link);  /**< rad, absolute */
KL_API double kl_link_rate(const kl_solver *s, int link);   /**< rad per time */
KL_API double kl_link_accel(const kl_solver *s, int link);  /**< rad per time^2 */
/** Slide of a prismatic or slot joint (length); NaN for revolute joints. */
KL_API double kl_joint_slide(const kl_solver *s, int joint);
/** Slide rate of a prismatic or slot joint (length per time). */
KL_API double kl_joint_slide_rate(const kl_solver *s, int joint);
/** Slide acceleration of a prismatic or slot joint (length per time^2). */
KL_API double kl_joint_slide_accel(const kl_solver *s, int joint);
/** Relative angle angle(b) - angle(a) of a joint (rad; 0 for prismatic). */
KL_API double kl_joint_angle(const kl_solver *s, int joint);
/** The value of input `input` at the position last solved; NaN before any. */
KL_API double kl_input_value(const kl_solver *s, int input);

/**
 * Global position of a link's frame origin into `xy`: with kl_link_angle it
 * places every local point of the link. KL_OK, KL_EID, KL_EINVAL.
 */
KL_API int kl_link_origin(const kl_solver *s, int link, double xy[2]);
/** Global position of a point into `xy`. KL_OK, KL_EID, KL_EINVAL. */
KL_API int kl_point_position(const kl_solver *s, int point, double xy[2]);
/** Global velocity of a point. KL_OK, KL_EID, KL_EINVAL, KL_ESTAGE. */
KL_API int kl_point_velocity(const kl_solver *s, int point, double xy[2]);
/**
 * Global acceleration of a point, its tangential and normal parts included.
 * KL_OK, KL_EID, KL_EINVAL, KL_ESTAGE.
 */
KL_API int kl_point_acceleration(const kl_solver *s, int point, double xy[2]);

/* ------------------------------------------------------------------------
 * Jerk (issue 18): third time derivatives of every coordinate and point,
 * from the factors the velocity and acceleration stages use
 * (docs/theory.md, "Jerk", gives the right-hand side).
 * ------------------------------------------------------------------------ */

/**
 * Jerk stage: link, slide and point jerks for the `input_jerks` (the
 * inputs' third time derivatives; NULL when the model has none), at the
 * position, rates and accelerations last solved. J qddd = -((dF/du) uddd +
 * the third-order terms of the rates and accelerations), with the LU factors
 * of the Jacobian the rate stages use. Returns KL_OK, KL_ESTAGE (no
 * acceleration solved at the current position and rates, or no position),
 * KL_ESINGULAR, KL_ENONFINITE, KL_EINVAL. On failure the state is unchanged.
 * Never allocates.
 */
KL_API int kl_solve_jerk(kl_solver *s, const double *input_jerks);
/** Link jerk (rad per time^3); NaN before kl_solve_jerk at this state. */
KL_API double kl_link_jerk(const kl_solver *s, int link);
/** Slide jerk of a prismatic or slot joint (length per time^3); NaN for a
 * revolute joint or before kl_solve_jerk at this state. */
KL_API double kl_joint_slide_jerk(const kl_solver *s, int joint);
/** Global jerk of a point (length per time^3). KL_OK, KL_EID, KL_EINVAL,
 * KL_ESTAGE (no jerk solved at this state). */
KL_API int kl_point_jerk(const kl_solver *s, int point, double xy[2]);
/** Global jerk of a link's frame origin (kl_link_origin). KL_OK, KL_EID,
 * KL_EINVAL, KL_ESTAGE. */
KL_API int kl_link_origin_jerk(const kl_solver *s, int link, double xy[2]);

/* ------------------------------------------------------------------------
 * The force stage: inverse dynamics (kinetostatics) at a solved state, and
 * the force figures over a motion at constant input speed
 * (docs/theory.md section 8 gives the equations and the sign rules).
 * Links are ideal: rigid, joints without friction or clearance.
 * ------------------------------------------------------------------------ */

/** Load kinds for kl_solve_forces and kl_input_effort. */
enum kl_load_kind {
  KL_LOAD_FORCE = 0, /**< force (fx, fy), global frame, applied at point `id` */
  KL_LOAD_TORQUE = 1 /**< torque (counter-clockwise positive) on link `id` */
};

/** An applied load. A load on ground (a point of ground, or a torque on
 * link 0) acts on the frame directly and changes no force of the stage. */
typedef struct kl_load {
  int kind;      /**< enum kl_load_kind */
  int id;        /**< point (force) or link (torque) */
  double fx;     /**< force, global x (KL_LOAD_FORCE) */
  double fy;     /**< force, global y (KL_LOAD_FORCE) */
  double torque; /**< torque, counter-clockwise (KL_LOAD_TORQUE) */
} kl_load;

/**
 * Force stage: the joint forces and input efforts that move the linkage
 * through the position, velocity and acceleration last solved, against the
 * loads, gravity (kl_model_set_gravity) and the links' inertia
 * (kl_set_link_mass), by Newton-Euler equations for every moving link with
 * the joint reactions as unknowns (d'Alembert). `efforts[i]` (may be NULL)
 * receives what input i's actuator applies: for a revolute input a torque
 * on its joint's link b, reacting on link a, counter-clockwise positive;
 * for a prismatic or slot input a force on link b along the slide axis
 * (positive toward increasing slide), reacting on link a. `loads` (may be
 * NULL when `nloads` is 0) act at the state solved. The results stay
 * readable (kl_joint_force, kl_joint_moment, kl_ground_force) until the
 * state changes: a position, velocity or acceleration solve, a sketch.
 * For statics, solve velocity and acceleration with zero rates first.
 * Calls at one position reuse the factors of the force system: several
 * load cases, or other speeds at that position, cost a solve each.
 * Returns KL_OK, and on failure leaves the state exactly as it was:
 *  KL_EINDETERMINATE  the model declares redundant constraints
 *                   (kl_model_set_redundancy): the forces are not determined
 *  KL_EINVAL        NULL solver, nloads < 0, or NULL loads with nloads > 0
 *  KL_EID, KL_EKIND, KL_ENONFINITE  a load names no point or link, has an
 *                   unknown kind, or holds a NaN or infinite number
 *  KL_ESTAGE        no acceleration solved at the current position and rates
 *  KL_ESINGULAR     the position is singular (dead point, toggle, change
 *                   point): the force system is singular exactly where the
 *                   loop Jacobian is, so the test is the position's: its
 *                   condition estimate below singular_rcond, a singular
 *                   last position solve, or an exactly zero pivot; the
 *                   forces there are not determined
 * Never allocates.
 */
KL_API int kl_solve_forces(kl_solver *s, int nloads, const kl_load *loads,
                           double *efforts);

/**
 * The whole force that link a exerts on link b through `joint` (global
 * frame, force units), from the last successful kl_solve_forces at the
 * current state: the constraint force, plus an input's actuator force along
 * its slide. Link b exerts the opposite force on link a. For a revolute
 * joint it acts at the pin; for a prismatic or slot joint at link b's
 * attachment point, across the slide (plus, for an input, along it).
 * Returns KL_OK, KL_EID, KL_EINVAL (NULL), KL_ESTAGE (no forces solved at
 * the current state).
 */
KL_API int kl_joint_force(const kl_solver *s, int joint, double fxy[2]);

/**
 * The moment about link b's attachment point that link a exerts on link b
 * through `joint` (counter-clockwise positive): a prismatic joint's
 * constraint moment (what keeps b from turning against a); a revolute
 * input's actuator torque; 0 for other revolute and for slot joints. NaN
 * for an unknown joint or when no forces are solved at the current state.
 */
KL_API double kl_joint_moment(const kl_solver *s, int joint);

/**
 * What the moving links exert on ground through all its joints (the frame's
 * load, its shaking force and moment): fxy_m[0], fxy_m[1] the force, global
 * frame, and fxy_m[2] its moment about the global origin, counter-clockwise
 * positive. Loads applied to ground itself are not in it. Returns KL_OK,
 * KL_EINVAL (NULL), KL_ESTAGE (no forces solved at the current state).
 */
KL_API int kl_ground_force(const kl_solver *s, double fxy_m[3]);

/**
 * A motion for the force figures: input `input` driven at the constant
 * speed `speed` from `from` to `to` in `steps` equal steps (as
 * kl_solver_sweep sweeps it), every other input at rest at its value last
 * solved. Start from kl_cycle_default's values, which set `size`.
 */
typedef struct kl_cycle {
  size_t size;        /**< sizeof(kl_cycle), set by kl_cycle_default */
  int input;          /**< the input driven; default 0 */
  double from;        /**< its first value, rad or length; default 0 */
  double to;          /**< its last value; default 2 pi (one crank turn) */
  int steps;          /**< steps >= 1; default 360 */
  double speed;       /**< its constant speed, rad or length per time unit
                           (any sign; the forces depend on its square; 0
                           gives the quasi-static cycle); default 1 */
  double speed_fluctuation; /**< coefficient of speed fluctuation Cs for
                           the flywheel, (max - min speed) / mean speed,
                           > 0; 0 (the default) leaves the flywheel out */
} kl_cycle;

/** Fills `c` with the defaults (and `c->size`). NULL does nothing. */
KL_API void kl_cycle_default(kl_cycle *c);

/** The figures of one quantity over a cycle (the samples of the sweep). */
typedef struct kl_cycle_peak {
  double peak; /**< the sampled value of largest magnitude: signed for an
                    input effort and the shaking moment, a magnitude for a
                    joint load and the shaking force */
  double at;   /**< the driven input's value there */
  double mean; /**< the mean over the cycle (trapezoid rule in the input,
                    which at constant speed is the mean over time) */
  double rms;  /**< the root mean square over the cycle, likewise */
} kl_cycle_peak;

/** The force figures of a cycle. Set `size` to sizeof(kl_cycle_summary). */
typedef struct kl_cycle_summary {
  size_t size;              /**< sizeof(kl_cycle_summary), set by the caller */
  int sweep_status;         /**< KL_OK, or KL_LIMIT: the figures cover the
                                 part of the range the motion reached */
  int steps_done;           /**< samples the figures cover */
  double limit_input;       /**< with KL_LIMIT, where the motion stopped;
                                 NaN otherwise */
  kl_cycle_peak shaking_force;  /**< magnitude of the ground force */
  kl_cycle_peak shaking_moment; /**< its moment about the global origin */
  double energy_fluctuation;    /**< the largest minus the least of the
                                     work the driven input does above its
                                     mean effort, over the cycle (energy:
                                     force x length) */
  double energy_min_at;     /**< the driven input's value at the least */
  double energy_max_at;     /**< and at the largest */
  double flywheel_inertia;  /**< energy_fluctuation / (Cs speed^2): the
                                 moment of inertia (mass x length^2) that
                                 holds a crank's speed within Cs (for a
                                 sliding input, the equivalent mass); NaN
                                 when Cs or the speed is 0 */
} kl_cycle_summary;

/**
 * The force figures of a cycle: with the motion of `c` and the constant
 * loads, at every sample of the sweep the forces as kl_solve_forces gives
 * them (the rates and accelerations are the sweep's unit-rate ones scaled
 * by speed and speed^2), and from them: per input (`input_peaks`, one per
 * input, may be NULL) its effort's peak, where, mean and RMS (the motor
 * sizing figures); per joint (`joint_peaks`, one per joint, may be NULL)
 * the peak magnitude of kl_joint_force and where, mean and RMS; the
 * shaking force and moment; the energy fluctuation of the driven input
 * over the cycle and the flywheel inertia it calls for at coefficient Cs,
 * I = dE / (Cs w^2) (common practice). Peaks are sampled values: take
 * enough steps. The energy comes from a first, kinematic sweep (the work
 * the input does up to each sample, by the energy balance, exact at the
 * samples for constant loads), so the range is swept twice.
 * On success the solver is left at the end of the sweep (with the unit-rate
 * rates and no forces solved); a failure leaves it exactly as it was.
 * Returns KL_OK or KL_LIMIT (the motion stopped inside the range: figures
 * over the reachable part), or KL_EINVAL (NULL, a size too small, steps <
 * 1, a negative Cs), KL_ENONFINITE, KL_EINDETERMINATE, the load statuses
 * of kl_solve_forces, the statuses of kl_solver_sweep (KL_ESINGULAR also
 * when a sample's force system is singular). Never allocates.
 */
KL_API int kl_cycle_summarize(kl_solver *s, const kl_cycle *c, int nloads,
                              const kl_load *loads, kl_cycle_summary *sum,
                              kl_cycle_peak *input_peaks,
                              kl_cycle_peak *joint_peaks);

/** The numbers in one row of kl_cycle_table for model `m`:
 * 1 + inputs + 3 joints + 5, or KL_EINVAL (NULL), KL_ESTATE (not
 * finalized). */
KL_API int kl_cycle_columns(const kl_model *m);

/**
 * The forces over a cycle, sample by sample, into `rows` (row-major,
 * kl_cycle_columns numbers per row, one row per sample, at most
 * c->steps + 1 rows): the driven input's value; every input's effort; per
 * joint the force x, force y and moment of kl_joint_force and
 * kl_joint_moment; the ground force x, y and moment; the kinetic energy of
 * the links (mass x length^2 / time^2); the work the driven input has done
 * since the first sample (by the energy balance). `cap` is the number of
 * doubles `rows` holds, at least (c->steps + 1) times the columns. The
 * rows delivered go to `*rows_done` (may be NULL). The solver is left as
 * kl_cycle_summarize leaves it. Returns as kl_cycle_summarize, and
 * KL_EINVAL for a `rows` array too small. Never allocates.
 */
KL_API int kl_cycle_table(kl_solver *s, const kl_cycle *c, int nloads,
                          const kl_load *loads, double *rows, size_t cap,
                          int *rows_done);

/* Loads and the working speed recorded in the model: what the machine
 * works against and how fast it runs, model document data for tools (the
 * model file's load and speed statements), set before finalize and
 * readable at any time. The force stage and the cycle figures take their
 * loads and motion as arguments: these change no result by themselves. */

/**
 * Records a load in the model, of the kind kl_solve_forces takes: a force
 * at a point (global frame) or a torque on a link, in the model's force unit
 * (mass x length / time^2; its torque times the length unit). Returns the
 * load's index (0, 1, ... in the order recorded), or KL_EINVAL (NULL model
 * or load), KL_EKIND (a kind neither force nor torque), KL_EID (no
 * such point or link), KL_ENONFINITE, KL_ESTATE (finalized), KL_ENOMEM. On
 * failure the model is unchanged. Allocates (the model's load list).
 */
KL_API int kl_add_load(kl_model *m, const kl_load *load);
/** The number of loads the model records, or KL_EINVAL for NULL. */
KL_API int kl_model_load_count(const kl_model *m);
/** The recorded load `index` into `*load`. Returns KL_OK, KL_EID (no such
 * load), KL_EINVAL (NULL). */
KL_API int kl_model_load(const kl_model *m, int index, kl_load *load);
/**
 * Records the working speed: input `input` driven at the constant `speed`
 * (rad or length per time unit, any sign; 0 gives the quasi-static
 * cycle), and the coefficient of speed fluctuation Cs the flywheel is
 * sized for (`speed_fluctuation` >= 0; 0 leaves the flywheel out). A later
 * call replaces it. Returns KL_OK, KL_EID (no such input), KL_EKIND (a
 * point input), KL_ENONFINITE, KL_EINVAL (a negative speed_fluctuation, or
 * NULL), KL_ESTATE (finalized). Never allocates.
 */
KL_API int kl_model_set_speed(kl_model *m, int input, double speed,
                              double speed_fluctuation);
/** The recorded working speed into `input`, `speed` and
 * `speed_fluctuation` (each may be NULL). Returns KL_OK, KL_EID (none
 * recorded), KL_EINVAL (NULL model). */
KL_API int kl_model_speed(const kl_model *m, int *input, double *speed,
                          double *speed_fluctuation);
/**
 * The model's working cycle, for kl_cycle_summarize and kl_cycle_table:
 * kl_cycle_default's values, with the input, speed and speed fluctuation
 * of the working speed (kl_model_set_speed), and the range and steps of
 * the sweep settings (kl_model_set_sweep) when they sweep that input. Set
 * `c->size` first (kl_cycle_default sets it); fields past it are left as
 * they are. Returns KL_OK, KL_EID (no working speed recorded), KL_EINVAL
 * (NULL, or a size too small). Never allocates.
 */
KL_API int kl_model_cycle(const kl_model *m, kl_cycle *c);

/* ------------------------------------------------------------------------
 * Motion profiles in time (issue 18): one input of a model driven by
 * segments built on the motion laws, or by a table of times and values;
 * every stage at a time of it, and the input efforts over it. Times are in
 * the caller's time unit (seconds in the tool); rates, accelerations and
 * jerks then come per that unit, per its square and per its cube.
 * ------------------------------------------------------------------------ */

/** Segment kinds of a motion profile. */
enum kl_segment_kind {
  KL_SEGMENT_DWELL = 0, /**< the input holds its value (from == to) */
  KL_SEGMENT_RISE = 1,  /**< from up to to (to > from) by a motion law */
  KL_SEGMENT_RETURN = 2, /**< from down to to (to < from) by a motion law */
  KL_SEGMENT_SPEED = 3  /**< from to to at the constant rate (to - from) /
                             duration */
};

/** A segment as kl_model_segment reads it. Set `size` first. */
typedef struct kl_segment {
  size_t size;     /**< sizeof(kl_segment), set by the caller */
  int kind;        /**< enum kl_segment_kind */
  int law;         /**< enum kl_motion_law_kind of a rise or return; 0
                        otherwise */
  double duration; /**< time units, > 0 */
  double from;     /**< the input's value at its start (rad, or length
                        units for a sliding input) */
  double to;       /**< and at its end */
} kl_segment;

/**
 * Appends a segment to the motion profile of input `input` (model data,
 * before finalize): over `duration` (> 0) the input goes from `from` to
 * `to`, a rise or return by motion law `law` (kl_motion_law: value from +
 * (to - from) s(x), rate (to - from) s'(x) / duration, and so on, x the
 * fraction of the segment's time), a dwell holding still, a constant-speed
 * segment at one rate. A segment starts where the one before ended (within
 * 1e-9 of the larger value, or of 1); it starts at the time the one before
 * ends. Rise and return laws start and end at rest, so a constant-speed
 * segment meets them with a step in the rate: the profile is then evaluated
 * on the later segment at the joint. Returns the segment's index (>= 0),
 * or KL_EJOIN (from is not where the last segment ended), KL_EINVAL
 * (duration not positive, no such kind or law, a dwell that moves, a rise
 * that does not go up, a return that does not go down), KL_ENONFINITE,
 * KL_EID (no such input), KL_EKIND (a point input), KL_EDUPLICATE (the profile drives another input),
 * KL_ESTATE (finalized, or the profile is a table), KL_ENOMEM; on failure
 * the model is unchanged and kl_model_error says why.
 */
KL_API int kl_add_segment(kl_model *m, int input, int kind, int law,
                          double duration, double from, double to);
/**
 * Makes the motion profile of input `input` the natural cubic spline (zero
 * second derivative at both ends) through the `n` (>= 2) points (times[k],
 * values[k]), times strictly increasing: C2, so its jerk is piecewise
 * constant. The profile's time 0 is times[0]. Replaces an earlier table.
 * Returns KL_OK, KL_EINVAL (fewer than 2 points, times not increasing,
 * NULL), KL_ENONFINITE, KL_EID, KL_EDUPLICATE, KL_ESTATE (finalized, or the
 * profile holds segments), KL_ENOMEM; on failure the model is unchanged.
 */
KL_API int kl_model_set_profile_table(kl_model *m, int input, int n,
                                      const double *times,
                                      const double *values);
/** The input the model's profile drives, KL_EID if it has none, or
 * KL_EINVAL. */
KL_API int kl_model_profile_input(const kl_model *m);
/** The profile's duration in time units; NaN if the model has none. */
KL_API double kl_model_profile_duration(const kl_model *m);
/** Segments of the profile (0 for none or a table), or KL_EINVAL. */
KL_API int kl_model_segment_count(const kl_model *m);
/** Segment `index` of the profile into `segment` (up to segment->size
 * bytes). KL_OK, KL_EID, KL_EINVAL. */
KL_API int kl_model_segment(const kl_model *m, int index, kl_segment *segment);
/** Points of the profile's table (0 for none or segments), or KL_EINVAL. */
KL_API int kl_model_table_count(const kl_model *m);
/** Point `index` of the profile's table. KL_OK, KL_EID, KL_EINVAL. */
KL_API int kl_model_table_point(const kl_model *m, int index, double *time,
                                double *value);
/**
 * The profile at time t (0 <= t <= kl_model_profile_duration): the input's
 * value, rate, acceleration and jerk into out[0..3]. Returns KL_OK, KL_EID
 * (no profile), KL_EINVAL (t outside, NULL), KL_ENONFINITE. Never
 * allocates.
 */
KL_API int kl_model_profile_motion(const kl_model *m, double t,
                                   double out[4]);

/**
 * Every stage at time t of the model's profile: position, velocity,
 * acceleration and jerk, the profiled input at its value, rate,
 * acceleration and jerk there, the other inputs at the values last solved
 * (0 before any) and at rest. The position is solved from the state the
 * solver holds, so a sweep over time walks in steps small enough for the
 * motion to follow. Returns KL_OK, KL_EID (no profile), KL_EINVAL (t
 * outside the profile), KL_ENONFINITE, and the statuses of the stages; on
 * failure the solver is as it was. Never allocates.
 */
KL_API int kl_solve_at_time(kl_solver *s, double t);
/**
 * The force stage over the model's profile: at steps + 1 equally spaced
 * times from 0 to the duration (steps >= 1), kl_solve_at_time and
 * kl_solve_forces with the loads; per input, the effort of largest
 * magnitude (signed) into peaks[i], its time into peak_times[i], and the
 * root mean square over time (trapezoid rule) into rms[i]: for a servo
 * cycle, the peak and RMS motor torque. On success the solver holds the
 * profile's end. Returns KL_OK, KL_EID (no profile), KL_EINVAL,
 * KL_EINDETERMINATE, the load checks' statuses and those of the stages at
 * the sample that failed (the solver then as it was). Never allocates.
 */
KL_API int kl_solver_time_efforts(kl_solver *s, int steps, int nloads,
                                  const kl_load *loads, double *peaks,
                                  double *peak_times, double *rms);

/* ------------------------------------------------------------------------
 * Kinematic (influence) coefficients: derivatives of the position with
 * respect to the inputs, the velocity ratios and their rates of change.
 * ------------------------------------------------------------------------ */

/**
 * Computes the first- and second-order kinematic coefficients at the
 * position last solved, for every coordinate and point and every input:
 * d q / d u_i and d^2 q / (d u_i d u_j). Uses the factors of the converged
 * position; leaves the velocity and acceleration results untouched.
 * Returns KL_OK, KL_ESTAGE (no position solved at the current inputs),
 * KL_ESINGULAR, KL_EINVAL. Never allocates.
 */
KL_API int kl_solve_coefficients(kl_solver *s);

/** d angle(link) / d u_input (rad per input unit); NaN if not computed. */
KL_API double kl_link_angle_deriv(const kl_solver *s, int link, int input);
/** d^2 angle(link) / (d u_i d u_j); NaN if not computed. */
KL_API double kl_link_angle_deriv2(const kl_solver *s, int link, int input_i,
                                   int input_j);
/** d slide(joint) / d u_input; NaN for revolute joints or if not computed. */
KL_API double kl_joint_slide_deriv(const kl_solver *s, int joint, int input);
/** d^2 slide(joint) / (d u_i d u_j). */
KL_API double kl_joint_slide_deriv2(const kl_solver *s, int joint, int input_i,
                                    int input_j);
/** d position(point) / d u_input into `xy`. KL_OK, KL_EID, KL_EINVAL, KL_ESTAGE. */
KL_API int kl_point_deriv(const kl_solver *s, int point, int input,
                          double xy[2]);
/** d^2 position(point) / (d u_i d u_j) into `xy`. As kl_point_deriv. */
KL_API int kl_point_deriv2(const kl_solver *s, int point, int input_i,
                           int input_j, double xy[2]);

/* ------------------------------------------------------------------------
 * States and assembly modes
 * ------------------------------------------------------------------------ */

/**
 * Copies the whole state (position, rates, accelerations, inputs) of `from`
 * into `to`, a solver of the same model: a way to keep a position and come
 * back to it, or to hand one assembly mode to another solver.
 * Returns KL_OK, KL_EINVAL (NULL, or solvers of different models). Never
 * allocates.
 */
KL_API int kl_solver_copy_state(kl_solver *to, const kl_solver *from);

/**
 * Finds the assembly modes (branches) at `inputs`: the distinct solutions
 * Newton's method reaches from a fixed grid of starts over every free angle
 * and slide (the grid: docs/figures.md section 2). Two solutions are the same when
 * every angle agrees within 1e-6 rad (modulo 2 pi) and every slide within
 * 1e-6 times the scale; singular solutions are left out. The i-th distinct solution is
 * written into modes[i] (solvers of the same model, i < cap) as a solved
 * position, angles reduced to (-pi, pi]; `s` serves as the workspace and
 * keeps its state.
 * Returns the number of distinct solutions found (which may exceed cap;
 * only cap are written), or KL_EINVAL (NULL or foreign solvers, cap < 0),
 * KL_ENONFINITE, or KL_ETOOLARGE if the model has too many free
 * coordinates for the grid (more than 20000 starts). Never allocates.
 */
KL_API int kl_solver_find_assemblies(kl_solver *s, const double *inputs,
                              kl_solver *const *modes, int cap);

/* ------------------------------------------------------------------------
 * Sweeps: tracing the motion over an input range
 * ------------------------------------------------------------------------ */

/**
 * Called once per delivered sweep step, with the solver at that step
 * (position, and the rates, accelerations and jerks of a unit rate and
 * zero acceleration and jerk of the swept input, the other inputs at rest:
 * so the rates read as first-order, the accelerations as second-order and
 * the jerks as third-order kinematic coefficients). Return 0 to go on, non-zero to stop the sweep.
 */
typedef int (*kl_sweep_fn)(const kl_solver *s, int step, double input,
                           void *user);

/** Outcome of a sweep. Set `size` to sizeof(kl_sweep_result) first. */
typedef struct kl_sweep_result {
  size_t size;        /**< sizeof(kl_sweep_result), set by the caller */
  int status;         /**< what kl_solver_sweep returned */
  int steps_done;     /**< steps delivered to the callback */
  double limit_input; /**< the located motion limit (status KL_LIMIT) or
                           singular position (KL_ESINGULAR); NaN otherwise */
  int substeps;       /**< continuation steps taken, sub-steps included */
  int passages;       /**< change points passed through (option
                           pass_change_points); 0 otherwise */
  double passage_input; /**< where the last one was passed, located to
                             1e-9 (rad, or length units); NaN if none */
} kl_sweep_result;

/**
 * Sweeps input `input` over steps + 1 equally spaced values from `from` to
 * `to` (steps >= 1), the other inputs held at the values last solved (0
 * before any solve). Each step is reached by continuation from the last:
 * a predictor from the rates, Newton as corrector, and sub-steps halved where
 * the corrector struggles; a step is refused if it changes the sign of the
 * Jacobian's determinant or lands far from the prediction, so the assembly
 * mode never flips. The first step starts from the solver's current state.
 *
 * Returns, and writes into `result` (may be NULL):
 *  KL_OK        every step delivered
 *  KL_LIMIT     the motion cannot go on (a toggle or dead point of this
 *               input): the steps before it are delivered, and the limit is
 *               located to 1e-10 (rad, or length units for a slide input)
 *  KL_STOPPED   the callback returned non-zero
 *  KL_ESINGULAR the motion reaches a change point, where two branches
 *               cross, and the option pass_change_points is 0: reported
 *               with its location (to 1e-9), not passed through; or a
 *               singular position where no branch goes on with the same
 *               tangent (located only to the sub-step that stopped there).
 *               With pass_change_points 1 a change point is passed on the
 *               branch that continues with the same tangent (docs/figures.md
 *               section 1), counted in `result` and by kl_solver_passages;
 *               a step that falls within a sample's span of the point is
 *               delivered from the branch's samples on both sides.
 *  KL_EMAXITER  a step needs more than 10000 sub-steps (a range of a great
 *               many turns in one step): the steps before it are delivered
 *  and the errors of kl_solve_position for the first step, KL_EID for an
 *  unknown input, KL_ENONFINITE (a range end NaN or infinite, or a range
 *  whose length overflows a double), KL_EINVAL (steps < 1), KL_ETOOLARGE
 *  (steps > KL_MAX_STEPS; nothing solved, the solver unchanged).
 * Afterwards the solver holds the last delivered step (or, if none was, its
 * state from before): a sweep that fails part-way is the one call that
 * leaves the solver changed, at the last good step it delivered, so that
 * the motion can go on from there (docs/guarantees.md). Never allocates.
 */
KL_API int kl_solver_sweep(kl_solver *s, int input, double from, double to,
                    int steps, kl_sweep_fn fn, void *user,
                    kl_sweep_result *result);

/**
 * The change points the sweep under way (or the last one) has passed with
 * the option pass_change_points into `count`, and where it passed the last
 * one into `last_input` (NaN if none); either pointer may be NULL.
 * Readable inside the sweep's callback, so that each passage can be
 * reported as it happens. Returns KL_OK, or KL_EINVAL for a NULL solver.
 * Never allocates.
 */
KL_API int kl_solver_passages(const kl_solver *s, int *count,
                              double *last_input);

/* ------------------------------------------------------------------------
 * Going to a position; frames of links and joints; rows of every quantity
 * ------------------------------------------------------------------------ */

/**
 * Puts the solver back in the state kl_solver_new gave it: the model's
 * sketch (as kl_model_set_sketch_angle and kl_model_set_sketch_slide
 * recorded it), no position, rates or coefficients solved, no inputs
 * known, the statistics cleared. The options and the last message stay.
 * Returns KL_OK, or KL_EINVAL for NULL. Never allocates.
 */
KL_API int kl_solver_reset(kl_solver *s);

/** Outcome of kl_solver_reach. Set `size` to sizeof(kl_reach_result) first. */
typedef struct kl_reach_result {
  size_t size;        /**< sizeof(kl_reach_result), set by the caller */
  int status;         /**< what kl_solver_reach returned */
  int input;          /**< the input whose move stopped, or -1 when none
                           did (the target reached, or no position to
                           move from) */
  double from;        /**< where that input's move began (NaN if none) */
  double limit_input; /**< where it stopped: the motion limit or singular
                           position the sweep located (NaN otherwise) */
  int substeps;       /**< continuation steps of every move, sub-steps
                           included */
} kl_reach_result;

/**
 * Brings the solver to the target `inputs` (one per input; NULL when the
 * model has none) by continuation, so that the assembly mode stays the one
 * it starts in: from the position last solved, or, when none is (a new or
 * reset solver, or one whose sketch changed since), from a position solved
 * from the solver's sketch at the model's start inputs
 * (kl_model_start_inputs); when even that does not solve, the target is
 * solved directly from the sketch. Each input moves in turn, in input
 * order, the others held, swept as kl_solver_sweep does (branch guard
 * included) in steps of at most 2 degrees of a turning input or 0.02 of the
 * model's scale of a sliding one (a move longer than 100000 such steps takes
 * 100000 longer ones, so that a far target costs bounded work); then the position is solved at the target
 * itself, and no rates are solved there.
 * Fills `result` (may be NULL). Returns KL_OK, or on failure leaves the
 * state exactly as it was and returns:
 *  KL_ENOASSEMBLY  a move stops at a motion limit (a toggle or dead point
 *                  of that input; result->input, from and limit_input say
 *                  where), or no position solves at the start nor directly
 *                  at the target
 *  KL_ESINGULAR    a move meets a singular position (a change point) it
 *                  cannot pass without choosing a branch at random
 *                  (result as above), or the target itself is singular
 *  KL_EMAXITER, KL_ENONFINITE, KL_EINVAL: as kl_solver_sweep and
 *                  kl_solve_position.
 * The message names the input and where its move stopped. Never
 * allocates. kl_solver_reset followed by kl_solver_reach goes to the
 * target from the model's start, whatever the solver did before.
 */
KL_API int kl_solver_reach(kl_solver *s, const double *inputs,
                           kl_reach_result *result);

/**
 * Global position of the point `local` of link `link`'s frame (local and
 * xy may be the same array), at the solver's current state. KL_OK, KL_EID,
 * KL_EINVAL.
 */
KL_API int kl_link_to_global(const kl_solver *s, int link,
                             const double local[2], double xy[2]);

/**
 * Global position of a joint: its attachment point on its link b (for a
 * revolute joint at a solved position, the same as on a; for a sliding
 * joint, the point that runs on the line). KL_OK, KL_EID, KL_EINVAL.
 */
KL_API int kl_joint_position(const kl_solver *s, int joint, double xy[2]);

/** Global velocity of a link's frame origin (kl_link_origin). KL_OK,
 * KL_EID, KL_EINVAL, KL_ESTAGE. */
KL_API int kl_link_origin_velocity(const kl_solver *s, int link,
                                   double xy[2]);

/** Global acceleration of a link's frame origin. KL_OK, KL_EID,
 * KL_EINVAL, KL_ESTAGE. */
KL_API int kl_link_origin_accel(const kl_solver *s, int link, double xy[2]);

/**
 * Every quantity of the solver's current state into `row`, laid out as
 * enum kl_quantity says (kl_model_row_size values): one call instead of a
 * getter per value, for recorders, files and bindings. Returns KL_OK or
 * KL_EINVAL (NULL). Never allocates.
 */
KL_API int kl_solver_row(const kl_solver *s, double *row);

/**
 * kl_solver_sweep without a callback: the row of every delivered step
 * (kl_solver_row at that step, with its unit-rate velocity and
 * acceleration) into rows[k * kl_model_row_size(m) ...] for step k, so that
 * a sweep is read at C speed. `rows` has room for steps + 1 rows; when
 * steps >= 1, the rows of steps not delivered (after a limit or a failure)
 * are NaN. Returns, and writes into `result` (may be NULL), what
 * kl_solver_sweep does (never KL_STOPPED), and KL_EINVAL for NULL rows.
 * Never allocates.
 */
KL_API int kl_solver_sweep_rows(kl_solver *s, int input, double from,
                                double to, int steps, double *rows,
                                kl_sweep_result *result);

/* ------------------------------------------------------------------------
 * Design figures
 * ------------------------------------------------------------------------ */

/** Four-bar classes by the Grashof condition, relative to the input link. */
enum kl_grashof_class {
  KL_GRASHOF_CRANK_ROCKER = 1,  /**< Grashof, input shortest: input turns fully, output rocks */
  KL_GRASHOF_ROCKER_CRANK = 2,  /**< Grashof, output shortest: output turns fully, input rocks */
  KL_GRASHOF_DOUBLE_CRANK = 3,  /**< Grashof, ground shortest (drag link) */
  KL_GRASHOF_DOUBLE_ROCKER = 4, /**< Grashof, coupler shortest */
  KL_GRASHOF_CHANGE_POINT = 5,  /**< s + l = p + q (within 1e-12 l): can fold into a line */
  KL_GRASHOF_TRIPLE_ROCKER = 6, /**< non-Grashof, s + l > p + q: no link turns fully */
  KL_GRASHOF_NO_ASSEMBLY = 7    /**< l >= s + p + q (within 1e-12 l): the loop
                                     cannot close, or closes only stretched in
                                     one line and cannot move */
};

/**
 * The Grashof class of a four-bar from its link lengths: ground (between
 * the two ground pivots), input (the driven link at one ground pivot),
 * coupler, output (at the other ground pivot). With s the shortest, l the
 * longest and p, q the others: Grashof when s + l < p + q; no assembly at
 * all when l >= s + p + q.
 * Returns a kl_grashof_class, KL_ENONFINITE, or KL_EINVAL (a length <= 0).
 */
KL_API int kl_grashof(double ground, double input, double coupler,
                      double output);

/** "crank-rocker", ... for a kl_grashof_class; "not a class" otherwise. */
KL_API const char *kl_grashof_str(int cls);

/**
 * The Grashof class of a finalized model that is a four-bar: ground and
 * three moving links joined in one loop by four revolute joints, its one
 * input at a ground pivot (kl_model_loop_fourbar reads the same class for
 * that loop). Returns a kl_grashof_class, KL_EKIND (not such a four-bar),
 * KL_ESTATE (not finalized), KL_EINVAL (NULL, or a link length of 0).
 */
KL_API int kl_model_grashof(const kl_model *m);

/** What a design figure measures. */
enum kl_output_kind {
  KL_OUTPUT_LINK_ANGLE = 0,   /**< angle of link `id` (rad) */
  KL_OUTPUT_SLIDE = 1,        /**< slide of prismatic or slot joint `id` */
  KL_OUTPUT_JOINT_ANGLE = 2,  /**< relative angle of joint `id` (rad) */
  KL_OUTPUT_POINT_X = 3,      /**< x of point `id` */
  KL_OUTPUT_POINT_Y = 4,      /**< y of point `id` */
  KL_OUTPUT_TRANSMISSION = 5, /**< transmission angle at revolute joint `id` (rad) */
  KL_OUTPUT_PRESSURE = 6      /**< pressure angle at sliding joint `id` (rad) */
};

/**
 * A scalar output of the mechanism. For KL_OUTPUT_TRANSMISSION, `id` is a
 * revolute joint between links a and b, and the angle, in [0, pi], is taken
 * between the line on a from that joint to joint `line_a` (another joint on
 * a) and the line on b from it to joint `line_b` (another joint on b): for a
 * four-bar, the coupler-rocker pin with the crank pin and the rocker's
 * ground pivot. Rule of thumb (common practice, no source): keep it within
 * 40 to 140 degrees. For KL_OUTPUT_PRESSURE, `id` is a prismatic or slot
 * joint, `line_a` a revolute joint on one of its two links (the pin through
 * which a rod drives the slider) and `line_b` another joint on the pin's
 * other link (the rod); the angle, in (-pi/2, pi/2), is taken from the
 * slide's direction of motion to the rod's line from `line_a` to `line_b`
 * (either way along each line: atan of cross over dot product), positive
 * counter-clockwise, so its sign says which face of the guide the rod
 * presses the slider against and it stays smooth through 0. Its magnitude
 * is the pressure angle: 0 when the rod pushes straight along the guide
 * (the ideal; common practice, no source). It still measures when the pin
 * stands on the slide point. `line_a` and `line_b` are ignored by other kinds.
 */
typedef struct kl_output {
  int kind;   /**< enum kl_output_kind */
  int id;     /**< the link, joint or point the output is of */
  int line_a; /**< transmission angle: another joint on the joint's link a */
  int line_b; /**< transmission angle: another joint on the joint's link b */
} kl_output;

/**
 * The output's value at the current state into `value`. Returns KL_OK,
 * KL_EID (unknown ids), KL_EKIND (wrong kind of joint or lines not on the
 * joint's links), KL_EINVAL.
 */
KL_API int kl_output_value(const kl_solver *s, const kl_output *o,
                           double *value);

/**
 * d output / d u_input at the position last solved (computes the kinematic
 * coefficients if they are not current). Returns KL_OK, the statuses of
 * kl_output_value, and of kl_solve_coefficients.
 */
KL_API int kl_output_deriv(kl_solver *s, const kl_output *o, int input,
                           double *deriv);

/** Extremes of an output over a sweep. Set `size` first. */
typedef struct kl_range {
  size_t size;         /**< sizeof(kl_range), set by the caller */
  double min;          /**< the smallest value found */
  double max;          /**< the largest value found */
  double input_at_min; /**< input value where the minimum occurs */
  double input_at_max; /**< input value where the maximum occurs */
  int sweep_status;    /**< how the sweep ended (KL_OK, KL_LIMIT, or
                            KL_ESINGULAR from kl_output_range) */
  double limit_input;  /**< with KL_LIMIT: where the motion stopped; with
                            KL_ESINGULAR: the change point */
} kl_range;

/**
 * Extremes of output `o` while input `input` sweeps from `from` to `to` in
 * `steps` steps (as kl_solver_sweep): where the output's slope (from the unit-rate
 * velocity) changes sign between neighbouring steps, false position on the
 * slope finds the turning point to 1e-13 in the input, so an extreme
 * between samples is found too (docs/figures.md section 5). The samples,
 * the ends of the range and the motion limit count as candidates as well.
 * On success the solver is left at the end of the sweep; a failure leaves it
 * exactly as it was (coefficients included). Returns KL_OK or KL_LIMIT (the
 * range is what was reachable), or the statuses of kl_solver_sweep and
 * kl_output_value. With KL_ESINGULAR, a change point met on the way after
 * the first step, `range` still receives the extremes of the part swept
 * before it, sweep_status KL_ESINGULAR and limit_input the change point's
 * location (the solver goes back as for any failure); on other failures
 * `range` is not written. Never allocates.
 */
KL_API int kl_output_range(kl_solver *s, int input, double from, double to,
                           int steps, const kl_output *o, kl_range *range);

/* ---- Issue 14: many outputs' ranges from one sweep ---- */

/**
 * Extremes of `n` outputs while input `input` sweeps from `from` to `to` in
 * `steps` steps (as kl_solver_sweep), from one sweep: its cost stays
 * within about five sweeps whatever n (docs/performance.md section 8),
 * where calling kl_output_range per output costs a sweep or more each. Where any output's slope
 * changes sign between two steps, the positions at three interior points of
 * that step (Chebyshev-Lobatto spacing) are solved once, and each output
 * turning there is refined to 1e-13 of the step on the Hermite interpolant
 * of degree 9 through its values and slopes at the step's five points
 * (docs/figures.md section 5); the samples, the ends and the motion limit
 * count as candidates as in kl_output_range, whose results it matches to
 * the interpolant's accuracy (better than 1e-10 in the input for steps of
 * a degree or so, closer with shorter steps). Set ranges[i].size for each
 * of the n ranges first; ranges[i] receives output i's range. On success
 * the solver is left at the end of the sweep; a failure leaves it as it
 * was. Allocates a scratch solver and O(n) working memory through the
 * model's allocator, freed before it returns. Returns KL_OK, KL_LIMIT (the
 * ranges of the reachable part), KL_ENOMEM, KL_EINVAL (NULL, n < 0, a
 * range's size unset), the statuses of kl_output_value for each output,
 * and the errors of kl_solver_sweep.
 */
KL_API int kl_output_ranges(kl_solver *s, int input, double from, double to,
                            int steps, int n, const kl_output *outputs,
                            kl_range *ranges);

/**
 * Time ratio of a quick-return mechanism driven at constant speed by a
 * crank turning in the positive sense: with the output's extremes at crank
 * angles input_at_min and input_at_max (from kl_output_range over one full
 * turn), the crank angle from minimum to maximum, A, in (0, 2 pi), over the
 * angle back, 2 pi - A. Returns KL_OK, KL_EINVAL (NULL, or equal angles
 * modulo 2 pi), KL_ENONFINITE.
 */
KL_API int kl_range_time_ratio(const kl_range *range, double *ratio);

/* ---- Issue 14: the time ratio by the trade's quick-return convention ---- */

/** Which stroke of an output between its extremes takes the longer part of
 * the input's turn (kl_range_quick_return). */
enum kl_stroke {
  KL_STROKE_EQUAL = 0,   /**< both take half a turn (within 1e-12 rad) */
  KL_STROKE_RISING = 1,  /**< from the minimum to the maximum */
  KL_STROKE_FALLING = 2  /**< from the maximum back to the minimum */
};

/**
 * Time ratio of a quick-return mechanism as the trade states it (common
 * practice, no source): the slower stroke's time over the faster's, so
 * >= 1, for a crank turning in the positive sense at constant speed. With
 * the output's extremes at crank angles input_at_min and input_at_max
 * (kl_output_range over one full turn), the rising stroke takes A, the
 * angle from minimum to maximum in (0, 2 pi), the falling stroke 2 pi - A;
 * the ratio is the larger over the smaller. *slower says which stroke is
 * the slower (enum kl_stroke) and *slower_angle its crank angle (rad);
 * either may be NULL. kl_range_time_ratio gives the rising stroke over the
 * falling one, which may be below 1. Returns KL_OK, KL_EINVAL (NULL range
 * or ratio, or equal angles modulo 2 pi), KL_ENONFINITE.
 */
KL_API int kl_range_quick_return(const kl_range *range, double *ratio,
                                 int *slower, double *slower_angle);

/** "rising", "falling", "equal" for an enum kl_stroke; "not a stroke"
 * otherwise. */
KL_API const char *kl_stroke_str(int stroke);

/**
 * Mechanical advantage of an ideal (frictionless, massless) linkage: output
 * effort over input effort, the inverse of d output / d u_input (by virtual
 * work), into `ma`; infinite at a dead point of the output. Returns as
 * kl_output_deriv.
 */
KL_API int kl_output_mechanical_advantage(kl_solver *s, const kl_output *o,
                                   int input, double *ma);

/**
 * Static input effort by virtual work: the torque or force each input must
 * apply to hold the linkage in quasi-static equilibrium against the loads
 * (frictionless, massless links), efforts[i] = -sum (F . dp/du_i +
 * T dtheta/du_i), into `efforts` (one per input; a torque for a revolute
 * input, a force along the slide for a sliding one). Computes the kinematic
 * coefficients if they are not current. Returns KL_OK, KL_EID, KL_EKIND,
 * KL_ENONFINITE, KL_EINVAL, and the statuses of kl_solve_coefficients.
 */
KL_API int kl_input_effort(kl_solver *s, int nloads, const kl_load *loads,
                           double *efforts);

/** Which dimension a sensitivity is taken against. */
enum kl_dimension_kind {
  KL_DIMENSION_JOINT_A = 0, /**< joint `id`'s attachment point on its link a */
  KL_DIMENSION_JOINT_B = 1, /**< joint `id`'s attachment point on its link b */
  KL_DIMENSION_POINT = 2,   /**< point `id`'s local coordinates */
  KL_DIMENSION_RADIUS = 3   /**< coupling `id`'s pitch radius: axis 0 the
                                 first (a gear pair's radius1, a rack's
                                 radius), axis 1 a gear pair's radius2; the
                                 centres held, the count from the sketch */
};

/** A dimension: one local coordinate (axis 0 = x, 1 = y) of a point. */
typedef struct kl_dimension {
  int kind; /**< enum kl_dimension_kind */
  int id;   /**< the joint or point */
  int axis; /**< 0 for the local x coordinate, 1 for y */
} kl_dimension;

/**
 * Dimensional sensitivity: d output / d dimension at the position last
 * solved with the inputs held, from one more solve with the factored
 * Jacobian, into `deriv`. Returns KL_OK, KL_EID, KL_EKIND, KL_EINVAL, and
 * the statuses of the position requirement (KL_ESTAGE, KL_ESINGULAR).
 * Never allocates.
 */
KL_API int kl_output_sensitivity(kl_solver *s, const kl_output *o,
                                 const kl_dimension *dim, double *deriv);

/**
 * Tolerance stack-up of an output at the position last solved, to first
 * order: worst case sum |d_k| t_k and root-sum-square sqrt(sum (d_k t_k)^2)
 * over `n` dimensions with tolerances t_k >= 0 (same length unit). Either
 * result pointer may be NULL. Returns as kl_output_sensitivity, and
 * KL_EINVAL for a negative tolerance, KL_ENONFINITE for a NaN or infinite
 * one.
 */
KL_API int kl_output_tolerance_stack(kl_solver *s, const kl_output *o, int n,
                              const kl_dimension *dims,
                              const double *tolerances, double *worst,
                              double *rss);

/* ------------------------------------------------------------------------
 * What a designer reads from the loops: four-bar loops, transmission-angle
 * sites, and the input effort over a sweep
 * ------------------------------------------------------------------------ */

/** A loop that is a four-bar, as kl_model_loop_fourbar reads it. */
typedef struct kl_fourbar {
  size_t size;           /**< sizeof(kl_fourbar), set by the caller */
  int loop;              /**< the loop */
  int input;             /**< the input that drives it */
  int input_joint;       /**< the ground pivot that input drives */
  int output_joint;      /**< the other ground pivot */
  int input_link;        /**< the link the input turns */
  int coupler_link;      /**< the link opposite ground */
  int output_link;       /**< the link pivoted at output_joint */
  double ground_length;  /**< between the two ground pivots */
  double input_length;   /**< between the input link's two joints */
  double coupler_length; /**< between the coupler's two joints */
  double output_length;  /**< between the output link's two joints */
  int grashof;           /**< kl_grashof of the four lengths: a
                              kl_grashof_class, or KL_EINVAL if one is 0 */
} kl_fourbar;

/**
 * Reads loop `loop` of a finalized model as a four-bar: a loop of four
 * revolute joints, ground one of its links, and an input at one of the two
 * ground pivots (at both: the first in the loop's walk). The lengths are
 * between the loop's joints on each link (other joints a link may carry do
 * not count), the class is Grashof's on them, relative to the input link.
 * Fills `fourbar` up to fourbar->size bytes. Returns KL_OK, KL_EKIND (the
 * loop is not such a four-bar), KL_EID (no such loop), KL_ESTATE (not
 * finalized), KL_EINVAL (NULL, or size too small). Never allocates.
 */
KL_API int kl_model_loop_fourbar(const kl_model *m, int loop,
                                 kl_fourbar *fourbar);

/**
 * The model's transmission-angle sites, chosen once at finalize: walking
 * the loops in order, each revolute joint on neither ground nor an input
 * is a site where a loop first meets it, with the lines to its two
 * neighbours in that loop's walk (line_a the one on the joint's link a), so
 * that for a four-bar the site is the coupler-output pin, with lines to the
 * input pin and the output's ground pivot. A joint on a link that a
 * revolute input turns from ground, with a line of no length, or inside a
 * rigid triangle of revolute joints (a ternary link built of three bars,
 * where no link drives another) is no site (kl_model_transmission_skips
 * says which and why). Lines named with kl_model_set_transmission_lines
 * replace the rule's at their joint, or add a site after the rule's. Writes
 * up to `cap`
 * outputs of kind KL_OUTPUT_TRANSMISSION into `sites` (may be NULL when cap
 * is 0), for kl_output_value and kl_output_range, and returns how many
 * sites there are (which may exceed cap), or KL_ESTATE (not finalized),
 * KL_EINVAL. Never allocates.
 */
KL_API int kl_model_transmissions(const kl_model *m, kl_output *sites,
                                  int cap);

/** Why the transmission-angle rule gives a joint no site. */
enum kl_transmission_skip_reason {
  KL_TRANSMISSION_SKIP_INPUT_CRANK = 1, /**< `link` is turned from ground by a
                                             revolute input, so the angle
                                             says nothing of how force gets
                                             through */
  KL_TRANSMISSION_SKIP_NO_LINE = 2,     /**< on `link`, the neighbour in the
                                             loop stands at the joint's own
                                             point (within 1e-12 of the
                                             scale): no line to measure */
  KL_TRANSMISSION_SKIP_RIGID = 3,       /**< the joint's two links and `link`
                                             are joined pairwise by revolute
                                             joints: a rigid triangle, one
                                             ternary link built of three
                                             bars, whose pins never turn, so
                                             no link drives another there */
  KL_TRANSMISSION_SKIP_SLIDER = 4       /**< `link` is a slider whose
                                             pressure angle, at its sliding
                                             joint (kl_model_pressure_sites),
                                             is measured instead */
};

/* ---- Issue 14: pressure angles of sliders ---- */

/**
 * The model's pressure-angle sites, chosen once at finalize by the walk of
 * kl_model_transmissions: each prismatic or slot joint that is not an input
 * nor a cam joint (kl_add_cam: its pressure angle is the follower's, from
 * kl_cam_follower_state) and has, next to it in a loop's walk, a revolute
 * joint (the pin) whose other link, a moving one, goes on to a further joint
 * of the walk (the rod's line), where the loops first meet it. Writes up to `cap` outputs of kind
 * KL_OUTPUT_PRESSURE into `sites` (may be NULL when cap is 0) and returns
 * how many there are, or KL_ESTATE (not finalized), KL_EINVAL. The pin itself
 * is then no transmission-angle site (KL_TRANSMISSION_SKIP_SLIDER): the
 * angle between rod and block says nothing a press designer reads. Never
 * allocates.
 */
KL_API int kl_model_pressure_sites(const kl_model *m, kl_output *sites,
                                   int cap);

/** A joint the transmission-angle rule meets but does not measure. */
typedef struct kl_transmission_skip {
  int joint;  /**< the revolute joint */
  int loop;   /**< the loop whose walk met it first */
  int link;   /**< the joint's link the reason concerns */
  int reason; /**< enum kl_transmission_skip_reason */
} kl_transmission_skip;

/**
 * The joints the rule of kl_model_transmissions meets and passes over, in
 * the order met: writes up to `cap` of them into `skips` (may be NULL when
 * cap is 0) and returns how many there are, or KL_ESTATE, KL_EINVAL. Never
 * allocates.
 */
KL_API int kl_model_transmission_skips(const kl_model *m,
                                       kl_transmission_skip *skips, int cap);

/* ---- Issue 14: named transmission-angle lines ---- */

/**
 * Names the two lines of the transmission angle at revolute joint `joint`
 * (model-file statement `transmission JOINT between JOINT and JOINT`): the lines from
 * `joint` to joint `line_a` and to joint `line_b`, each another joint on
 * one of `joint`'s two links, one on each (given in either order; the site
 * keeps line_a on the joint's link a). At finalize the named site replaces
 * the one the rule of kl_model_transmissions picks for that joint, or is
 * added after the rule's sites where the rule picks none (a joint on ground
 * or an input, or one the rule passes over: it then leaves
 * kl_model_transmission_skips). Naming the joint again replaces its lines.
 * Returns KL_OK, KL_EINVAL (NULL model), KL_ESTATE (finalized), KL_EID (no
 * such joint), KL_EKIND (`joint` not revolute; a line joint that is `joint`
 * itself, on neither of its links, or both on one link), KL_EZEROLENGTH (a
 * line joint stands at `joint`'s own point on their link, within 1e-12 of
 * the larger of the two points' distances from the link's origin: no line).
 * On error the model is unchanged and kl_model_error says why.
 */
KL_API int kl_model_set_transmission_lines(kl_model *m, int joint,
                                           int line_a, int line_b);

/**
 * The lines named for joint `joint` by kl_model_set_transmission_lines,
 * into *line_a (on the joint's link a) and *line_b. Returns KL_OK, KL_EID
 * (no such joint, or none named for it), KL_EINVAL (NULL argument).
 */
KL_API int kl_model_transmission_lines(const kl_model *m, int joint,
                                       int *line_a, int *line_b);
/* ---- end of named transmission-angle lines ---- */

/**
 * Extremes of the static input effort (kl_input_effort) of input
 * `effort_input` against the loads, while input `input` sweeps from `from`
 * to `to` in `steps` steps as kl_solver_sweep does (with its branch guard),
 * taken at the delivered steps. Fills `range` (set its size first): min and
 * max with the swept input's values where they occur, the sweep's status and
 * where the motion stopped. Returns KL_OK, or KL_LIMIT (the extremes of the
 * part the motion reached) with the solver at the last delivered step as
 * kl_output_range leaves it; on failure the state is left as it was:
 * KL_EID (unknown input, effort input, or a load's point or link),
 * KL_EKIND (a load of no known kind), KL_ENONFINITE, KL_EINVAL, and the
 * errors of kl_solver_sweep (a change point on the way, the first step's
 * position errors). Never allocates.
 */
KL_API int kl_input_effort_range(kl_solver *s, int input, double from,
                                 double to, int steps, int nloads,
                                 const kl_load *loads, int effort_input,
                                 kl_range *range);

/* ------------------------------------------------------------------------
 * Workspace of a point: where a point of a two-input linkage can go, its
 * boundary and the singular curves inside it, traced by continuation
 * (docs/theory.md, "Workspace of a point"). Results are a design aid:
 * verify a machine's reach by physical testing; local codes and licensed
 * engineering practice take precedence.
 * ------------------------------------------------------------------------ */

/** What a stretch of a workspace curve is (kl_solver_workspace's kinds). */
enum kl_workspace_kind {
  KL_WORKSPACE_BOUNDARY = 0, /**< on the workspace's boundary: the point can
                                  go on one side of it and not the other */
  KL_WORKSPACE_FOLD = 1      /**< a singular curve inside the workspace:
                                  the map from the two inputs to the point
                                  folds there (d(x, y)/d(u1, u2) singular),
                                  but other assemblies reach both sides */
};

/** "boundary" or "fold" for an enum kl_workspace_kind; "not a kind"
 * otherwise (static text). */
KL_API const char *kl_workspace_kind_str(int kind);

/**
 * How kl_solver_workspace seeds and steps. Start from
 * kl_workspace_options_default(), which sets `size`.
 */
typedef struct kl_workspace_options {
  size_t size;  /**< sizeof(kl_workspace_options), set by the default */
  int grid;     /**< seed nodes per turn of each input, 4 to 720; default
                     32. A curve that crosses no edge of the grid (a
                     closed curve smaller than a cell in the inputs'
                     plane) is missed: raise it when in doubt */
  double step;  /**< the longest step along a curve, as a fraction of the
                     model's scale (kl_model_scale), in (0, 0.5];
                     default 0.01. The area's error from the curves'
                     chords falls with its square */
} kl_workspace_options;

/** Fills `o` with the defaults (and `o->size`). NULL does nothing. */
KL_API void kl_workspace_options_default(kl_workspace_options *o);

/** What kl_solver_workspace found. Set `size` to
 * sizeof(kl_workspace_result) first. */
typedef struct kl_workspace_result {
  size_t size;    /**< sizeof(kl_workspace_result), set by the caller */
  int vertices;   /**< vertices written into the caller's arrays */
  int curves;     /**< curves traced (numbered 0 .. curves - 1) */
  int closed;     /**< of them, curves that close on themselves; the others
                       end where the linkage stops assembling on their
                       branch and go on in another assembly mode */
  int seeds;      /**< grid edges on which a curve was found */
  double area;    /**< the workspace's area (length units squared): the
                     region the boundary stretches enclose, holes left
                     out */
  double xmin;    /**< the boundary's extent, global frame: least x (NaN
                       when there is no boundary) */
  double ymin;    /**< least y (NaN when there is no boundary) */
  double xmax;    /**< greatest x (NaN when there is no boundary) */
  double ymax;    /**< greatest y (NaN when there is no boundary) */
} kl_workspace_result;

/**
 * The workspace of `point` for a model with two turning inputs (revolute
 * joints, each over whole turns): every position the point takes in every
 * assembly mode. Its boundary lies on the fold curves of the map from the
 * inputs (u1, u2) to the point's (x, y), where d(x, y)/d(u1, u2) is
 * singular: a coarse grid of the inputs (o->grid per turn) in every
 * assembly mode (kl_solver_find_assemblies) seeds them, where that
 * determinant changes sign along a grid edge swept on one branch; each
 * curve is then traced by predictor-corrector continuation in the
 * inputs' plane, the corrector Newton's method on the determinant (its
 * gradient from the second-order coefficients, kl_point_deriv2), until it
 * closes or the linkage stops assembling on its branch. Each stretch is
 * then classed by counting the assemblies that reach each side of it
 * (a fold adds two on the side it bends to), and the area is the
 * polygon area of the boundary stretches.
 *
 * Vertex k of the curves goes to xy[2k], xy[2k + 1] (global frame, the
 * model's length unit), its curve's number to curves[k] (a curve's
 * vertices are consecutive, in order along it; a closed curve repeats its
 * first vertex at its end) and to kinds[k] the enum kl_workspace_kind of
 * the stretch from vertex k to k + 1 (the last vertex of a curve repeats
 * the kind before it). `cap` is the number of vertices the arrays hold
 * (xy holds 2 cap doubles); a few thousand suffice at the defaults. The
 * arrays are the caller's; `result` (may be NULL) gets the counts, the
 * area and the extent. The solver's options steer every position solve;
 * its state is left as it was.
 *
 * Returns KL_OK, or on failure leaves the solver as it was (its message
 * says why) and returns:
 *  KL_EDOF        the model has not exactly two inputs
 *  KL_EKIND       an input is not a revolute joint (a sliding or a point input), or the point is on
 *                 ground (it does not move)
 *  KL_EID         no such point
 *  KL_EINVAL      NULL solver, options or arrays, a size too small, cap
 *                 < 2, grid outside 4 to 720, step outside (0, 0.5]
 *  KL_ENONFINITE  step NaN or infinite
 *  KL_ETRUNCATED  the curves need more than `cap` vertices (what was
 *                 traced stays in the arrays; no area)
 *  KL_ENOASSEMBLY the linkage assembles at no node of the grid
 *  KL_ENOMEM
 * Allocates: 38 solvers and scratch of about 64 bytes per vertex of cap
 * through the model's allocator, all freed before it returns. Time grows
 * with grid^2 and with the vertices traced; the classing with their
 * square.
 */
KL_API int kl_solver_workspace(kl_solver *s, int point,
                               const kl_workspace_options *o, double *xy,
                               int *curves, int *kinds, int cap,
                               kl_workspace_result *result);

/* ------------------------------------------------------------------------
 * Motion laws: the published rise laws of cams and servo profiles
 * ------------------------------------------------------------------------ */

/** The motion laws kl_motion_law evaluates (docs/theory.md gives each
 * one's formula and source). */
enum kl_motion_law_kind {
  KL_LAW_HARMONIC = 0,      /**< simple harmonic: s = (1 - cos pi x) / 2 */
  KL_LAW_CYCLOIDAL = 1,     /**< cycloidal: s = x - sin(2 pi x) / (2 pi) */
  KL_LAW_POLY345 = 2,       /**< 3-4-5 polynomial: 10x^3 - 15x^4 + 6x^5 */
  KL_LAW_POLY4567 = 3,      /**< 4-5-6-7 polynomial: 35x^4 - 84x^5 + 70x^6 - 20x^7 */
  KL_LAW_MOD_TRAPEZOID = 4, /**< modified trapezoidal: sine ramps to a held
                                 peak acceleration of 8 pi / (pi + 2) */
  KL_LAW_MOD_SINE = 5       /**< modified sine: a sine quarter, then a sine of
                                 a third the frequency; peak acceleration
                                 4 pi^2 / (pi + 4) */
};

/**
 * A published motion law, normalised: for x in [0, 1] (the fraction of the
 * rise's duration or cam angle) the rise s, 0 at x = 0 and 1 at x = 1, and
 * its derivatives, into out = s, ds/dx, d2s/dx2, d3s/dx3. A rise of height
 * h over a duration T takes h s(t / T), with velocity h s' / T,
 * acceleration h s'' / T^2 and jerk h s''' / T^3. Where a law's derivative
 * jumps (the simple harmonic law's acceleration at both ends, the
 * 3-4-5 polynomial's and the cycloidal law's jerk at both ends, the
 * modified laws' jerk at the joints of their pieces) the value is the one
 * inside [0, 1], or of the piece on the left of an inner joint.
 * Returns KL_OK, KL_ENONFINITE (x NaN or infinite), or KL_EINVAL (NULL
 * out, x outside [0, 1], or an unknown law). Never allocates; no handle.
 */
KL_API int kl_motion_law(int law, double x, double out[4]);

/** "cycloidal", ... for an enum kl_motion_law_kind; "not a law" otherwise
 * (static text). */
KL_API const char *kl_motion_law_str(int law);

/* ------------------------------------------------------------------------
 * Design studies: tolerance Monte Carlo and design grids (the study file is
 * described in docs/studies.md)
 * ------------------------------------------------------------------------ */

/** A design study (opaque): a nominal model, the dimensions that vary and
 * how, the outputs judged and their limits. Read, then prepared (the
 * nominal solved) once; after that its calls only read it, so
 * kl_study_run's threads and the getters may share it. */
typedef struct kl_study kl_study;

/**
 * Reads a study from `length` bytes of text (any bytes: no NUL needed, none
 * allowed) against `model`, a finalized model whose links, joints and
 * points the text names. The text's `model PATH` statement, if any, is
 * recorded (kl_study_model_path) but not opened: this call touches no
 * file and solves nothing (kl_study_prepare solves the nominal). The
 * study holds the model (as a solver does, see kl_model_free), so the
 * caller may free its handle at once. Every allocation of the study, here
 * and in later calls, goes through the model's allocator.
 * Returns the study, or NULL with `err` (may be NULL) telling why:
 * KL_ESYNTAX with line and column as for model files; KL_EID, KL_EKIND or
 * KL_EINVAL (line 0) for an output or dimension the model does not have
 * in that kind; KL_ETOOLARGE for steps above KL_MAX_STEPS (at the number)
 * and for an `at` output whose continuation from the sweep's start would
 * take more (line 0); KL_EINVAL for a NULL model or text longer than 16 MiB;
 * KL_ESTATE for a model not finalized; KL_ENOMEM. Allocates in proportion
 * to the text. Thread-safe against other calls on the same model.
 */
KL_API kl_study *kl_study_read(const char *text, size_t length,
                               const kl_model *model, kl_io_error *err);
/**
 * Reads the study file at `path` and the model file its `model` statement
 * names (relative to the study file's folder unless absolute), then reads
 * the study as kl_study_read against that model. Needs the `model`
 * statement before any statement that names links, joints or points. Like
 * kl_study_read it solves nothing. Returns the study, or NULL with `err`
 * (may be NULL): kl_study_read's statuses; KL_ESYNTAX (line 0) if the study
 * names no model; KL_EIO if a file cannot be read, or the model's path
 * joined to the folder is longer than 1023 bytes, with the `model`
 * statement's line and column for the model file; the model file's own
 * errors at that place, with the model file's line and column in the
 * message. Allocates through malloc (the model read from the file has the
 * default allocator; the study uses it as kl_study_read says).
 */
KL_API kl_study *kl_study_read_file(const char *path, kl_io_error *err);
/**
 * Solves the nominal design at the start of the study's sweep, its
 * judged outputs, and their first-order estimates (kl_study_summary's
 * nominal and first_order_std). kl_study_run and kl_study_summarize need
 * it. A second call after success does nothing and returns KL_OK.
 * Returns KL_OK, or KL_EINVAL (NULL study), KL_ENOMEM, the position
 * stage's status if the nominal does not solve at the sweep's start
 * (KL_ENOASSEMBLY, KL_ESINGULAR, KL_EMAXITER), or KL_ENOASSEMBLY if its
 * motion stops inside the sweep; each failure writes kl_study_error and
 * leaves the study as it was (a later call may succeed). Allocates three
 * solvers and two arrays of the outputs through the model's allocator.
 * Call it before the study is shared between threads.
 */
KL_API int kl_study_prepare(kl_study *st);
/**
 * The message of the study's last failed call, naming what failed ("the
 * nominal model: ..."); "" if none failed yet. Owned by the study; valid
 * until the next call on it. A NULL study gives a fixed text. Allocates
 * nothing.
 */
KL_API const char *kl_study_error(const kl_study *st);
/** Frees a study and lets go of its model (freed with it if the caller
 * freed its handle already). NULL does nothing. */
KL_API void kl_study_free(kl_study *st);

/** The number of samples: `samples` of a tolerance study, every
 * combination of the grid values of a grid study. */
KL_API long kl_study_sample_count(const kl_study *st);
/** The number of outputs judged (the columns of the results). */
KL_API int kl_study_output_count(const kl_study *st);
/** The name of output `k`, NULL if there is none. */
KL_API const char *kl_study_output_name(const kl_study *st, int k);
/* ---- What a study output measures, for its unit ---- */
/** The kind of quantity a study output is (kl_study_output_quantity). */
enum kl_study_quantity {
  KL_STUDY_ANGLE = 0,  /**< an angle, in the model's angle unit */
  KL_STUDY_LENGTH = 1, /**< a length, in the model's length unit */
  KL_STUDY_FORCE = 2,  /**< a force: mass x length / time^2 of the model's units */
  KL_STUDY_TORQUE = 3  /**< a torque: force x length */
};
/**
 * What output `k` measures (enum kl_study_quantity), so that tools can give
 * its unit: a link, joint or transmission angle, or the reach of a turning
 * input, is an angle; a slide, a point's coordinate or the reach of a
 * sliding input a length; the effort of a turning input a torque, of a
 * sliding input a force. Returns KL_EINVAL for a NULL study, KL_EID for no
 * output k. Never allocates.
 */
KL_API int kl_study_output_quantity(const kl_study *st, int k);
/* ---- end of study output quantities ---- */

/** The nominal model: the one the study was read against, held by the
 * study, so valid until kl_study_free even if the caller freed its own
 * handle. Make solvers of it (kl_solver_new), or write it out
 * (kl_model_write) and read the text back for a copy to change; never
 * cast away `const`: kl_study_run's threads read it at the same time. */
KL_API const kl_model *kl_study_model(const kl_study *st);
/** The path the text's `model` statement gives, as written (owned by the
 * study, valid until kl_study_free), or NULL if the text has none or `st`
 * is NULL. Allocates nothing. */
KL_API const char *kl_study_model_path(const kl_study *st);
/** The number of dimensions that vary. */
KL_API int kl_study_dimension_count(const kl_study *st);
/** A short text naming dimension `k` ("rocker_pin b x"), NULL if none. */
KL_API const char *kl_study_dimension_name(const kl_study *st, int k);

/** Sample outcomes (sample_status of kl_study_run). */
enum kl_sample_status {
  KL_SAMPLE_OK = 0,          /**< every output computed over the whole sweep */
  KL_SAMPLE_NO_ASSEMBLY = 1, /**< the perturbed linkage does not assemble at
                                  the sweep's start (or a solve fails): its
                                  outputs are NaN */
  KL_SAMPLE_LIMITED = 2      /**< it assembles, but its motion stops at a
                                  limit inside the sweep: outputs over the
                                  reachable part, NaN for an input value
                                  beyond it; never within limits */
};

/**
 * Runs samples first .. first + count - 1 on `threads` threads (0: all the
 * cores), writing sample i's outputs into values[(i - first) * outputs + k]
 * and its enum kl_sample_status into sample_status[i - first]; the
 * dimensions it used into dims[(i - first) * dimensions + d] when `dims` is
 * not NULL. Sample i's numbers depend on the seed and i alone (a
 * counter-based random stream), never on the thread or process that ran
 * it. Each sample works on its own copy of the model, made through the
 * model's allocator on the thread that runs it (a hook must then be
 * thread-safe). Returns KL_OK, KL_ESTAGE (not prepared: kl_study_prepare),
 * KL_EINVAL (NULL study, NULL arrays, or a range that does not exist:
 * first or count negative, first + count beyond the samples, checked
 * without overflow, so a count near LONG_MAX is refused and nothing is
 * written), KL_ENOMEM.
 */
KL_API int kl_study_run(const kl_study *st, long first, long count,
                        int threads, double *values, int *sample_status,
                        double *dims);

/** The summary of one output over the samples. */
typedef struct kl_study_summary {
  size_t size;          /**< sizeof(kl_study_summary), set by the caller */
  long samples;         /**< samples summarized */
  long assembled;       /**< samples whose linkage assembled (limited ones
                             included) */
  long within_limits;   /**< samples that moved through the whole sweep
                             with the output within its limits (all such
                             samples when it has none) */
  double nominal;       /**< the output of the nominal model */
  double mean;          /**< over the samples that assembled */
  double std;           /**< standard deviation (n - 1) */
  double p01;           /**< 1st percentile (linear interpolation) */
  double p05;           /**< 5th percentile */
  double p50;           /**< the median */
  double p95;           /**< 95th percentile */
  double p99;           /**< 99th percentile */
  double min;           /**< the least value over the samples */
  double max;           /**< the greatest value over the samples */
  double worst;         /**< the value furthest outside its limits, or
                             furthest from the nominal when it has none */
  long worst_sample;    /**< the row of `values` that gave it (-1 if none
                             assembled) */
  double first_order_std; /**< the standard deviation first-order
                               sensitivities at the nominal predict (NaN
                               where they are not estimated: grid studies,
                               reach and effort outputs, or a nominal that
                               cannot be solved there) */
  int has_limits;       /**< whether the study gives limits */
  double lower;         /**< the lower limit (NaN without limits) */
  double upper;         /**< the upper limit (NaN without limits) */
  long limited;         /**< samples whose motion stopped inside the sweep */
} kl_study_summary;

/**
 * Summarizes output `k` of `n` samples (values and statuses as kl_study_run
 * wrote them for samples 0 .. n - 1, in order), into `summary`: the
 * statistics are over the samples that assembled and have a value. The result
 * depends only on the values, so runs split over threads or processes give
 * identical summaries. Allocates a sorted copy for the percentiles through
 * the model's allocator. Returns KL_OK, KL_EID (no output k), KL_ESTAGE
 * (not prepared: the nominal is part of the summary), KL_EINVAL,
 * KL_ENOMEM.
 */
KL_API int kl_study_summarize(const kl_study *st, int k, const double *values,
                              const int *sample_status, long n,
                              kl_study_summary *summary);

/* ------------------------------------------------------------------------
 * Curved slots and cams (issue 17). Curved slots are joints like the
 * others: every stage (position, rates, coefficients, sweeps, forces)
 * works through them. The cam functions need no model: they turn a
 * follower motion program into the cam's pitch curve and surface.
 * ------------------------------------------------------------------------ */

/**
 * Adds a pin in a circular slot: link b's point (bx, by) runs along the
 * circle of centre (cx, cy) and radius r in link a's frame, and b may turn
 * (a slot joint: two freedoms, one constraint). The joint's slide is the
 * arc length r * phi, phi the pin's polar angle about the centre from a's
 * x axis (unwrapped: it goes on past a full turn). The circle is the whole
 * slot: the slide has no ends.
 * Returns the joint's id, or KL_EID (unknown link), KL_ESELFJOINT (a == b),
 * KL_ENONFINITE, KL_ERADIUS (r <= 0), KL_EDUPLICATE (an arc slot between
 * these links already), KL_ESTATE (finalized), KL_ENOMEM; the model is
 * unchanged on error.
 */
KL_API int kl_add_arc_slot(kl_model *m, int a, double cx, double cy, double r,
                           int b, double bx, double by);

/**
 * Adds a pin in a slot along a curve: link b's point (bx, by) runs along the
 * C2 cubic spline through the `npoints` points xy = (x0, y0, x1, y1, ...) of
 * link a's frame, in a uniform parameter t (t = k at point k). A closed curve
 * (closed != 0) is the periodic spline through the points and back to the
 * first (t in [0, npoints), and on around: t is unwrapped); an open one has
 * natural ends (zero curvature) and runs for t in [0, npoints - 1]: a
 * position whose pin lies beyond an end gets KL_ENOASSEMBLY, and a sweep
 * that reaches an end stops there with KL_LIMIT, located like any other
 * limit. The joint's slide is t; its rates are per unit of t. The points
 * are copied. An input on this joint prescribes t; its effort
 * (kl_solve_forces) is the force along the curve's tangent.
 * Returns the joint's id, or KL_EID, KL_ESELFJOINT, KL_EINVAL (NULL xy),
 * KL_EFEWPOINTS (fewer than 2 points open, 3 closed), KL_ENONFINITE (a
 * coordinate NaN or infinite), KL_EREPEATED (two consecutive points equal,
 * the last and the first included for a closed curve), KL_EDUPLICATE,
 * KL_ESTATE, KL_ENOMEM (npoints above 1e7 included); the model is unchanged
 * on error.
 */
KL_API int kl_add_curve_slot(kl_model *m, int a, int npoints, const double *xy,
                             int closed, int b, double bx, double by);

/** The radius of an arc slot joint; NaN for any other joint or a bad id. */
KL_API double kl_model_slot_radius(const kl_model *m, int joint);

/** The number of points of a curve slot joint, or KL_EID, KL_EKIND (not a
 * curve slot), KL_EINVAL (NULL). */
KL_API int kl_model_curve_count(const kl_model *m, int joint);
/** 1 if a curve slot joint's curve is closed, 0 if open, or KL_EID,
 * KL_EKIND, KL_EINVAL. */
KL_API int kl_model_curve_closed(const kl_model *m, int joint);
/** Point k (from 0) of a curve slot joint, in its link a's frame, into xy.
 * Returns KL_OK, KL_EID (unknown joint or k out of range), KL_EKIND,
 * KL_EINVAL. */
KL_API int kl_model_curve_point(const kl_model *m, int joint, int k,
                                double xy[2]);

/**
 * Where the slot of a sliding joint (prismatic, slot, arc or curve slot)
 * runs at slide value `slide`, in link a's frame: out = x, y of the point,
 * its first derivative dx/ds, dy/ds and its second derivative with respect
 * to the slide. A curve slot's spline costs O(1) here (no search along the
 * points); beyond an open curve's end the curve goes on along its end
 * tangent (the natural ends have zero curvature, so this stays C2).
 * Returns KL_OK, KL_EID, KL_EKIND (a revolute joint), KL_ENONFINITE (slide
 * NaN or infinite) or KL_EINVAL (NULL pointer).
 */
KL_API int kl_model_slot_point(const kl_model *m, int joint, double slide,
                               double out[6]);

/** How a cam's follower moves. */
enum kl_cam_follower_kind {
  KL_CAM_TRANSLATING = 0, /**< a roller on a stem sliding along a line (in-line
                               or offset from the cam's centre) */
  KL_CAM_OSCILLATING = 1  /**< a roller on an arm turning about a fixed pivot */
};

/** The follower of a cam. Lengths in any consistent unit. The cam turns
 * counter-clockwise about the global origin; at cam angle 0 the follower
 * stands as described here. */
typedef struct kl_cam_follower {
  size_t size;          /**< sizeof(kl_cam_follower), set by kl_cam_follower_init */
  int kind;             /**< enum kl_cam_follower_kind */
  double base_radius;   /**< base circle: the smallest radius of the cam surface, > 0 */
  double roller_radius; /**< > 0; the prime circle has radius base + roller */
  double offset;        /**< translating: the stem's line is x = offset, the
                             roller rising along +y; 0 for in-line */
  double pivot_x;       /**< oscillating: the arm's pivot (global frame) */
  double pivot_y;       /**< oscillating: the pivot's y */
  double arm_length;    /**< oscillating: pivot to roller centre, > 0; the arm
                             turns counter-clockwise as the follower rises */
} kl_cam_follower;

/** Fills `f` with a translating in-line follower, base radius 1, roller
 * 0.25 (an example to change), and sets its size. No-op on NULL. */
KL_API void kl_cam_follower_init(kl_cam_follower *f);

/** One segment of a follower motion program. */
typedef struct kl_cam_segment {
  double span;  /**< the cam angle it takes, rad, > 0 */
  double lift;  /**< the follower's travel over it: length (translating) or
                     arm angle in rad (oscillating); > 0 a rise, < 0 a
                     return, 0 a dwell */
  int law;      /**< enum kl_motion_law_kind (ignored for a dwell) */
} kl_cam_segment;

/** A cam: a follower and a motion program (opaque). */
typedef struct kl_cam kl_cam;

/** A new cam, with the follower of kl_cam_follower_init and a program of one
 * full-turn dwell; NULL when memory runs out. Allocates. */
KL_API kl_cam *kl_cam_new(void);
/** Frees the cam; NULL does nothing. */
KL_API void kl_cam_free(kl_cam *c);
/** The message of the cam's last failure ("" if none); owned by the cam. */
KL_API const char *kl_cam_error(const kl_cam *c);

/**
 * Sets the cam's follower. Returns KL_OK, or KL_EINVAL (NULL, size too
 * small, unknown kind, an oscillating arm that cannot reach the prime
 * circle from its pivot, a pivot inside the prime circle), KL_ENONFINITE,
 * KL_ERADIUS (a radius or the arm length zero or negative), each with a
 * message; the cam is unchanged on error.
 */
KL_API int kl_cam_set_follower(kl_cam *c, const kl_cam_follower *f);

/**
 * Sets the motion program: `nsegments` segments in cam-angle order from
 * angle 0. Their spans must add up to one turn (2 pi, to 1e-9) and their
 * lifts to zero (the follower comes back, to 1e-9 of the largest lift).
 * Returns KL_OK, or KL_EINVAL (NULL, nsegments < 1 or above 10000, an
 * unknown law, spans not a turn, lifts not closing, span <= 0),
 * KL_ENONFINITE; with a message naming the segment by its index (0-based)
 * and giving angles in degrees; the cam is unchanged on error. The segments are copied (allocates).
 */
KL_API int kl_cam_set_program(kl_cam *c, int nsegments,
                              const kl_cam_segment *segments);

/**
 * The follower's displacement from its lowest position at cam angle `theta`
 * (rad; any value, taken modulo one turn) and its derivatives with respect
 * to the cam angle: out = s, ds/dtheta, d2s/dtheta2, d3s/dtheta3 (times
 * omega, omega^2, omega^3 for time rates at constant cam speed omega).
 * Returns KL_OK, KL_EINVAL (NULL), KL_ENONFINITE.
 */
KL_API int kl_cam_motion(const kl_cam *c, double theta, double out[4]);

/** What kl_cam_sample gives at one cam angle (indexes into its out array). */
enum kl_cam_sample_index {
  KL_CAM_PITCH_X = 0,    /**< pitch curve (roller centre), cam frame */
  KL_CAM_PITCH_Y = 1,    /**< (its y) */
  KL_CAM_SURFACE_X = 2,  /**< cam surface (contact point), cam frame */
  KL_CAM_SURFACE_Y = 3,  /**< (its y) */
  KL_CAM_PRESSURE = 4,   /**< pressure angle, rad, signed: positive when the
                              normal leans against the rise */
  KL_CAM_CURVATURE = 5,  /**< radius of curvature of the pitch curve:
                              positive convex, negative concave, infinite
                              where straight */
  KL_CAM_SAMPLE_SIZE = 6 /**< the numbers kl_cam_sample gives */
};

/**
 * The cam at cam angle `theta` (rad), into out (KL_CAM_SAMPLE_SIZE = 6
 * numbers, indexed by enum kl_cam_sample_index): the roller centre and the contact
 * point in the cam's own frame (the cam frame coincides with the global
 * frame at angle 0), the pressure angle (between the pitch curve's normal
 * and the follower's direction of motion) and the pitch curve's radius of
 * curvature. Returns KL_OK, KL_EINVAL (NULL), KL_ENONFINITE. No allocation.
 */
KL_API int kl_cam_sample(const kl_cam *c, double theta, double out[6]);

/**
 * The pitch curve and the cam surface as n points each at the cam angles
 * 2 pi k / n, k = 0 .. n - 1 (in the cam frame, 2 numbers a point; either
 * array may be NULL): ready for kl_add_curve_slot with closed = 1, where
 * t = k stands for cam angle 2 pi k / n. The cam turns counter-clockwise,
 * so the points run clockwise around it. Returns KL_OK, KL_EINVAL (NULL
 * cam, n < 3).
 */
KL_API int kl_cam_outline(const kl_cam *c, int n, double *pitch_xy,
                          double *surface_xy);

/** What kl_cam_check finds over the cycle. */
typedef struct kl_cam_report {
  size_t size;                /**< sizeof(kl_cam_report), set by the caller */
  double max_pressure;        /**< the largest |pressure angle|, rad */
  double max_pressure_angle;  /**< the cam angle where it is, rad */
  double min_convex_radius;   /**< the smallest positive radius of curvature
                                   of the pitch curve (infinite if none) */
  double min_convex_angle;    /**< the cam angle where it is (NaN if none) */
} kl_cam_report;

/**
 * Checks the cam over one turn at `nsamples` cam angles (>= 8), each
 * extreme refined to 1e-9 rad between its neighbours by golden-section
 * search: fills `report` (may be NULL) and then judges, in this order,
 * the roller against the pitch curve (common practice: the roller radius
 * must stay below the smallest convex radius of curvature, or the surface
 * undercuts) and the pressure angle against `max_pressure` (rad, > 0; the
 * rule of thumb is 30 degrees for a translating follower, 35 to 45 for an
 * oscillating one: common practice, no source).
 * Returns KL_OK, KL_EUNDERCUT or KL_EPRESSURE with a message giving the
 * cam angle in degrees, or KL_EINVAL (NULL cam, nsamples < 8, a report
 * whose size is too small, max_pressure not positive), KL_ENONFINITE.
 * No allocation.
 */
KL_API int kl_cam_check(kl_cam *c, int nsamples, double max_pressure,
                        kl_cam_report *report);

/* ------------------------------------------------------------------------
 * Cams in a model (issue 17): a cam program as the curve slot its roller
 * runs in, and the follower's motion and pressure angle read from a solved
 * model, so that a cam-driven linkage is analysed as a whole.
 * ------------------------------------------------------------------------ */

/**
 * Adds a cam to the model: link `follower`'s point (bx, by), the roller
 * centre, runs in the pitch curve of `cam` on the cam link, the link that
 * revolute joint `bearing` hinges to ground. The cam's centre is the
 * bearing, its frame the cam link's axes (at cam link angle 0 the cam
 * stands at cam angle 0), and the cam's follower geometry (stem offset, arm
 * pivot) is read in the ground frame about the bearing: the model's
 * follower joints should put the roller there (kl_add_cam cannot check it,
 * as the guide may come later: kl_cam_guide_error measures it at a solved
 * position).
 * The pitch curve becomes a closed curve slot (kl_add_curve_slot) through
 * `npoints` points at the cam angles 2 pi k / npoints, its slide t = k at
 * cam angle 2 pi k / npoints; the cam's follower and program are copied
 * with it, for kl_cam_set_from_model and the model file's writer. Before
 * adding, the cam is checked as kl_cam_check does with 4 npoints samples
 * and the bound `max_pressure` (rad, in (0, pi]; pi bounds nothing a
 * working cam reaches).
 * Returns the joint's id, or KL_EINVAL (NULL cam or model, npoints below 8
 * or above 1e5, max_pressure outside (0, pi]), KL_ENONFINITE, KL_EID (no
 * such joint or link), KL_EKIND (bearing not a revolute joint with
 * ground), KL_ESELFJOINT (the follower is the cam link), KL_EUNDERCUT,
 * KL_EPRESSURE (both with the cam angle in degrees in the message),
 * KL_EDUPLICATE, KL_ESTATE (finalized), KL_ENOMEM; the model is unchanged
 * on error.
 */
KL_API int kl_add_cam(kl_model *m, int bearing, int follower, double bx,
                      double by, const kl_cam *cam, int npoints,
                      double max_pressure);

/** The bearing joint of a cam joint (kl_add_cam), or KL_EKIND (another
 * joint), KL_EID, KL_EINVAL (NULL). */
KL_API int kl_model_cam_bearing(const kl_model *m, int joint);

/** The pressure-angle bound (rad) a cam joint was added with; NaN for
 * another joint or a bad id. */
KL_API double kl_model_cam_limit(const kl_model *m, int joint);

/**
 * Gives the cam `c` the follower and program of cam joint `joint` of the
 * model (kl_add_cam). Returns KL_OK, KL_EINVAL (NULL), KL_EID, KL_EKIND
 * (not a cam joint), KL_ENOMEM; the cam is unchanged on error. Allocates.
 */
KL_API int kl_cam_set_from_model(kl_cam *c, const kl_model *m, int joint);

/** What kl_cam_follower_state gives (indexes into its out array). */
enum kl_cam_state_index {
  KL_CAM_STATE_ANGLE = 0,    /**< cam angle: the cam link's angle, rad */
  KL_CAM_STATE_RISE = 1,     /**< the follower's coordinate: its guide's
                                  slide (length) or its link's angle (rad) */
  KL_CAM_STATE_D1 = 2,       /**< d rise / d cam angle */
  KL_CAM_STATE_D2 = 3,       /**< d2 rise / d cam angle^2 */
  KL_CAM_STATE_D3 = 4,       /**< d3 rise / d cam angle^3 */
  KL_CAM_STATE_RATE = 5,     /**< d rise / dt at the solved rates */
  KL_CAM_STATE_ACCEL = 6,    /**< d2 rise / dt2 */
  KL_CAM_STATE_JERK = 7,     /**< d3 rise / dt3 */
  KL_CAM_STATE_PRESSURE = 8, /**< pressure angle, rad, signed as
                                  KL_CAM_PRESSURE of kl_cam_sample */
  KL_CAM_STATE_SIZE = 9      /**< the numbers kl_cam_follower_state gives */
};

/**
 * A cam pair's state at the solver's solved position, rates, accelerations
 * and jerks (kl_solve_jerk last): joint `joint` is a pin-in-slot joint
 * (a cam joint of kl_add_cam, or any arc, curve or straight slot) whose
 * slot link (a, the cam) turns on a revolute joint with ground and whose
 * pin link (b, the follower) is guided by ground through a prismatic joint
 * (a translating follower: its coordinate is that joint's slide of the
 * follower along the axis) or a revolute joint (an oscillating one: its
 * coordinate is the follower link's angle). Into out (KL_CAM_STATE_SIZE
 * numbers, enum kl_cam_state_index): the cam angle, the coordinate, its
 * derivatives over the cam angle (by the chain rule from the time rates,
 * so exact whatever drives the cam), its time rates, and the pressure
 * angle: between the pitch curve's normal at the pin and the direction the
 * follower's coordinate moves the pin. A sweep's callback (kl_sweep_fn)
 * reads it at each step. Returns KL_OK, KL_EINVAL (NULL), KL_EID, KL_EKIND
 * (not a pin-in-slot joint between moving links, or no bearing or guide
 * with ground), KL_ESTAGE (no jerk solved at this state), KL_ESINGULAR
 * (the cam does not turn at the solved rates: nothing is per cam angle).
 * Like the other getters it writes no message. Never allocates.
 */
KL_API int kl_cam_follower_state(const kl_solver *s, int joint,
                                 double out[9]);

/**
 * How far the model's follower guide stands from the follower the cam of
 * cam joint `joint` (kl_add_cam) was made for, at the solver's solved
 * position: the cam's pitch curve gives its program's motion only to a
 * follower guided as its kl_cam_follower says (read in the ground frame
 * about the bearing), and kl_add_cam cannot check the guide, which may be
 * added after it. Into out[2]:
 *   - out[0], length: translating, the roller centre's distance from the
 *     stem's line x = offset about the bearing; oscillating, the larger of
 *     the guide pivot's distance from the declared pivot and the roller
 *     centre's distance from its circle of radius arm_length about it;
 *   - out[1], rad: translating, the angle between the guide's direction
 *     of sliding and the stem's (+y or -y, whichever is nearer);
 *     oscillating, 0 (pivot and arm fix the direction).
 * Both are 0, to rounding, for a guide built as the cam says.
 * Returns KL_OK, KL_EINVAL (NULL), KL_EID, KL_EKIND (not a cam joint, or
 * its follower has no revolute or prismatic guide with ground, or one of
 * the other kind than the cam's follower), KL_ESTAGE (no position solved).
 * Writes no message; never allocates.
 */
KL_API int kl_cam_guide_error(const kl_solver *s, int joint, double out[2]);

/* ------------------------------------------------------------------------
 * Couplings and point inputs: rows beyond loop closure
 *
 * Each coupling and each point input adds one scalar equation and no
 * unknown. A coupling is linear in two joint coordinates, counted from the
 * model's sketch (a link without a sketch angle counts from 0, a joint
 * without a sketch slide from 0); a point input sets one global coordinate
 * of a point. The mobility count takes a coupling as a higher pair (one
 * constraint) and a point input as an input like a joint's.
 * ------------------------------------------------------------------------ */

/** What a coupling relates (kl_model_coupling). */
enum kl_coupling_kind {
  KL_COUPLING_GEAR = 0,  /**< a gear pair (kl_add_gear_pair) */
  KL_COUPLING_RACK = 1,  /**< a rack and pinion (kl_add_rack_pinion) */
  KL_COUPLING_RATIO = 2  /**< two joint coordinates by a ratio (kl_add_coupling) */
};

/**
 * Couples two revolute joints on one common link (the carrier) as a gear
 * pair: the gear on joint k's other link has pitch radius `radiusk` (> 0,
 * length units) about joint k's centre. The centres on the carrier lie
 * radius1 + radius2 apart for an external mesh (the gears turn against the
 * carrier in opposite senses: r1 dphi1 = -r2 dphi2) or |radius1 - radius2|
 * apart for an internal mesh (same sense: r1 dphi1 = r2 dphi2), to within
 * 1e-9 of the larger of the distance and the radii; phik is gear k's angle
 * against the carrier. The sketch angles are a meshing pose. Returns the
 * coupling's id (>= 0, couplings numbered from 0 in order added), or
 * KL_EID (no such joint), KL_EKIND (a joint not revolute), KL_ESELFCOUPLING
 * (joint1 == joint2), KL_ENOCOMMON (the joints share no link),
 * KL_ENONFINITE, KL_ERADIUS (a radius <= 0), KL_ENOMESH (the centre
 * distance fits neither mesh, or an internal pair of equal radii),
 * KL_ESTATE (finalized), KL_ENOMEM. The model is unchanged on failure.
 */
KL_API int kl_add_gear_pair(kl_model *m, int joint1, int joint2,
                            double radius1, double radius2);

/**
 * Couples a revolute joint (the pinion) with a prismatic joint (the rack)
 * on one common link: the rack's slide changes by `radius` times the
 * pinion's turn against that link (rad), counted from the sketch; the sign
 * of radius says which way. Returns the coupling's id, or KL_EID, KL_EKIND
 * (pinion not revolute or rack not prismatic), KL_ESELFCOUPLING,
 * KL_ENOCOMMON, KL_ENONFINITE, KL_ERADIUS (radius 0), KL_ESTATE,
 * KL_ENOMEM. The model is unchanged on failure.
 */
KL_API int kl_add_rack_pinion(kl_model *m, int pinion_joint, int rack_joint,
                              double radius);

/**
 * Couples any two joints: coordinate2 changes by `ratio` times
 * coordinate1's change, counted from the sketch (a revolute joint's
 * coordinate is its relative angle in rad, a sliding joint's its slide), for
 * belts and chains, coupled screws, linked cams. Returns the coupling's id,
 * or KL_EID, KL_ESELFCOUPLING, KL_ENONFINITE, KL_EINVAL (ratio 0: that is
 * no coupling but a locked joint), KL_ESTATE, KL_ENOMEM. The model is
 * unchanged on failure.
 */
KL_API int kl_add_coupling(kl_model *m, int joint1, int joint2, double ratio);

/**
 * Makes the global x (axis 0) or y (axis 1) of `point` an input (inverse
 * kinematics): two on one point drive it along a path. The input is
 * numbered with the joint inputs (kl_add_input), in the order added; its
 * value is in length units. Returns the input's index, or KL_EID (no such
 * point), KL_EINVAL (axis not 0 or 1), KL_EKIND (a point on ground, which
 * no input moves), KL_EDUPLICATE (this axis of this point is already an
 * input), KL_ESTATE, KL_ENOMEM. The model is unchanged on failure.
 */
KL_API int kl_add_point_input(kl_model *m, int point, int axis);

/** The number of couplings, or KL_EINVAL. */
KL_API int kl_model_coupling_count(const kl_model *m);

/** A coupling as recorded (kl_model_coupling). */
typedef struct kl_coupling_info {
  size_t size;    /**< sizeof(kl_coupling_info), set by the caller */
  int kind;       /**< an enum kl_coupling_kind value */
  int joint1;     /**< the first joint (a gear's, the pinion's, the driver's) */
  int joint2;     /**< the second joint (a gear's, the rack's, the driven) */
  double value1;  /**< radius1; the pinion's radius; the ratio */
  double value2;  /**< radius2; 0; 0 */
  int carrier;    /**< the common link of a gear pair or rack, -1 otherwise */
  int internal;   /**< 1 for an internal gear mesh, else 0 */
} kl_coupling_info;

/**
 * Fills `info` (its size set by the caller) with coupling `coupling`.
 * Returns KL_OK, KL_EINVAL (NULL, size too small), KL_EID.
 */
KL_API int kl_model_coupling(const kl_model *m, int coupling,
                             kl_coupling_info *info);

/** The point a point input drives, or KL_EID; KL_EKIND for a joint input. */
KL_API int kl_model_input_point(const kl_model *m, int input);

/** The axis (0 x, 1 y) a point input drives, or KL_EID; KL_EKIND for a
 * joint input. */
KL_API int kl_model_input_axis(const kl_model *m, int input);

/**
 * The force coupling `coupling` carries, from the last kl_solve_forces():
 * a gear pair's tooth force, which gear 2 receives at the pitch point along
 * the common tangent (pressure angle 0), the direction 90 degrees
 * counter-clockwise from the line of centres, gear 1 to gear 2 (gear 1
 * receives its opposite); a rack's tooth force, which the rack receives
 * along its slide axis at the pinion's pitch point; a ratio coupling's
 * torque (revolute) or push (sliding) on joint 2's link b along its
 * coordinate. The tooth forces enter the joint forces of the gears'
 * bearings. NaN when the forces are not solved, or for an unknown id.
 */
KL_API double kl_coupling_force(const kl_solver *s, int coupling);

/** Outcome of kl_solver_follow_path. Set `size` first. */
typedef struct kl_path_result {
  size_t size;       /**< sizeof(kl_path_result), set by the caller */
  int status;        /**< what kl_solver_follow_path returned */
  double arc_done;   /**< the arc length the solver's position is at */
  double limit_arc;  /**< with KL_LIMIT or KL_ESINGULAR: the arc length of
                          the last position reached before it (as
                          arc_done); NaN otherwise */
} kl_path_result;

/**
 * A path follower: moves the point of point inputs `input_x` (its x) and
 * `input_y` (its y) along the polyline through (path_x[k], path_y[k]),
 * k < npoints (>= 2), from arc length `from_arc`, where the solver's
 * position has it, to `to_arc` (both clamped to the path), by continuation
 * (steps of at most 2% of the model's scale, halved where one fails; the
 * other inputs held), then solves the velocity there with the point moving
 * at `speed` (length per time unit) along the path toward to_arc (along the
 * segment's direction; at a vertex, the next segment's) and the
 * acceleration with zero input accelerations (a polyline's corners are
 * jumps of velocity). Call it sample by sample: the rates, accelerations
 * and motor angles of each sample are then the solver's. Returns KL_OK,
 * KL_LIMIT (the path leaves the workspace: limit_arc says where, the
 * solver there), KL_ESINGULAR (a singular position on the path, likewise),
 * KL_EID, KL_EKIND (an input not a point's), KL_EINVAL (not the x and y of
 * one point, npoints < 2, NULL arrays, a short result), KL_ENONFINITE,
 * KL_EZEROLENGTH (the points all coincide), KL_ESTAGE (no solved position
 * to start from); writes `result` (may be NULL). Never allocates.
 */
KL_API int kl_solver_follow_path(kl_solver *s, int input_x, int input_y,
                                 int npoints, const double *path_x,
                                 const double *path_y, double from_arc,
                                 double to_arc, double speed,
                                 kl_path_result *result);

#ifdef __cplusplus
}
#endif

#endif /* KINLOOP_H */
