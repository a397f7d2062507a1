/*
 * model.c - building a model: links, joints, points, inputs and registered
 * loops, each checked as it is added, and its document data (units,
 * sketch, sweep, masses, gravity, loads, speed); and reading it back.
 */
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "describe.h"
#include "slots.h"

kl_model *kl_model_new(void) {
  return kl_model_new_with_alloc(kli_default_alloc, NULL);
}

kl_model *kl_model_new_with_alloc(kl_alloc_fn fn, void *user) {
  kli_allocator a;
  kl_model *m;
  if (fn == NULL)
    return NULL;
  a.fn = fn;
  a.user = user;
  m = kli_alloc(&a, sizeof *m);
  if (m == NULL)
    return NULL;
  memset(m, 0, sizeof *m);
  m->alloc = a;
  m->refs = 1;
  if (kli_reserve(&a, (void **)&m->links, &m->cap_links, 1,
                  sizeof *m->links) != KL_OK) {
    kli_free(&a, m, sizeof *m);
    return NULL;
  }
  memset(&m->links[0], 0, sizeof m->links[0]); /* ground: name implied */
  m->nlinks = 1;
  if (kli_lookup_grow(&a, &m->link_names) != KL_OK) {
    kl_model_free(m);
    return NULL;
  }
  kli_lookup_add(&m->link_names, kli_hash_text("ground"), KL_GROUND);
  return m;
}

static void free_name(const kl_model *m, char *name) {
  if (name != NULL)
    kli_free(&m->alloc, name, strlen(name) + 1);
}

void kli_topology_release(kl_model *m) {
  kli_free(&m->alloc, m->topo.block, m->topo.block_size);
  memset(&m->topo, 0, sizeof m->topo);
  m->finalized = 0;
}

static void destroy(kl_model *m) {
  int i;
  kli_allocator a = m->alloc;
  kli_topology_release(m);
  for (i = 0; i < m->nlinks; i++)
    free_name(m, m->links[i].name);
  for (i = 0; i < m->npoints; i++)
    free_name(m, m->points[i].name);
  for (i = 0; i < m->njoints; i++) {
    free_name(m, m->joints[i].name);
    kli_curve_free(&a, m->joints[i].curve);
    kl_cam_free(m->joints[i].cam);
  }
  kli_free(&a, m->links, (size_t)m->cap_links * sizeof *m->links);
  kli_free(&a, m->joints, (size_t)m->cap_joints * sizeof *m->joints);
  kli_free(&a, m->points, (size_t)m->cap_points * sizeof *m->points);
  kli_free(&a, m->inputs, (size_t)m->cap_inputs * sizeof *m->inputs);
  kli_free(&a, m->reg_joints, (size_t)m->cap_reg_joints * sizeof(int));
  kli_free(&a, m->reg_start, (size_t)m->cap_reg_start * sizeof(int));
  kli_free(&a, m->loads, (size_t)m->cap_loads * sizeof *m->loads);
  kli_free(&a, m->segments, (size_t)m->cap_segments * sizeof *m->segments);
  kli_free(&a, m->knots, (size_t)m->cap_knots * sizeof *m->knots);
  kli_free_couplings(m);
  kli_lookup_free(&a, &m->link_names);
  kli_lookup_free(&a, &m->joint_names);
  kli_lookup_free(&a, &m->point_names);
  kli_lookup_free(&a, &m->joint_pairs);
  kli_free(&a, m, sizeof *m);
}

#if !defined(__GNUC__)
#error "the model's reference count needs the GCC or clang __atomic builtins"
#endif

/* The count is the one field of a finalized model that changes: solvers
 * of one model are made and freed on many threads at once, so it changes
 * by atomic operations alone. The last holder to let go frees the model:
 * acquire-release ordering makes every holder's use of the model happen
 * before that. */
void kli_model_retain(const kl_model *m) {
  __atomic_add_fetch(&((kl_model *)m)->refs, 1, __ATOMIC_RELAXED);
}

void kli_model_release(const kl_model *m) {
  if (__atomic_sub_fetch(&((kl_model *)m)->refs, 1, __ATOMIC_ACQ_REL) == 0)
    destroy((kl_model *)m);
}

void kl_model_free(kl_model *m) {
  if (m != NULL)
    kli_model_release(m);
}

const char *kl_model_error(const kl_model *m) {
  return m == NULL ? "no model (NULL pointer)" : m->error;
}

/* ---- kinds ---- */

const char *kli_kind_name(int kind) {
  switch (kind) {
  case KL_JOINT_REVOLUTE: return "revolute";
  case KL_JOINT_PRISMATIC: return "prismatic";
  case KL_JOINT_ARC_SLOT: return "arc slot";
  case KL_JOINT_CURVE_SLOT: return "curve slot";
  default: return "slot";
  }
}

int kli_is_sliding(int kind) {
  return kind == KL_JOINT_PRISMATIC || kli_is_pin_slot(kind);
}

int kli_is_pin_slot(int kind) {
  return kind == KL_JOINT_SLOT || kind == KL_JOINT_ARC_SLOT ||
         kind == KL_JOINT_CURVE_SLOT;
}

int kli_input_of(const kl_model *m, int joint) {
  return m->joints[joint].input;
}

const double *kli_joint_point_on(const kl_model *m, int joint, int link) {
  const kli_joint *j = &m->joints[joint];
  return j->link[0] == link ? j->at[0] : j->at[1];
}

/* ---- builders ---- */

static int check_open(kl_model *m, const char *what) {
  if (m->finalized)
    return kli_fail(m->error, KL_ESTATE,
                    "%s: the model is finalized and can no longer change",
                    what);
  return KL_OK;
}

static int check_link(kl_model *m, int link, const char *what) {
  if (link < 0 || link >= m->nlinks)
    return kli_fail_index(m->error, what, "link", link, m->nlinks);
  return KL_OK;
}

/* A kind of named item: its table and how to read an id's name. */
typedef struct {
  const kl_model *m;
  const char *(*name_at)(const kl_model *, int);
} name_kind;

static int same_name(const void *owner, int id, const void *key) {
  const name_kind *k = owner;
  const char *name = k->name_at(k->m, id);
  return name != NULL && strcmp(name, key) == 0;
}

/* The id of the item of this kind named `name`, or -1. */
static int find_name(const kl_model *m, const kli_lookup *table,
                     const char *(*name_at)(const kl_model *, int),
                     const char *name) {
  name_kind k;
  k.m = m;
  k.name_at = name_at;
  return kli_lookup_find(table, kli_hash_text(name), same_name, &k, name);
}

/* Checks a name against the rules and against the names already taken in
 * `table` (read through `name_at`), and makes room to add it there. */
static int check_name(kl_model *m, const char *name, const char *what,
                      kli_lookup *table,
                      const char *(*name_at)(const kl_model *, int)) {
  size_t len, i;
  int other;
  if (name == NULL)
    return KL_OK;
  len = strlen(name);
  if (len == 0 || len > KLI_NAME_MAX)
    return kli_fail(m->error, KL_EINVAL,
                    "%s: a name must be 1 to %d bytes long (got %lu)", what,
                    KLI_NAME_MAX, (unsigned long)len);
  for (i = 0; i < len; i++)
    if ((unsigned char)name[i] < 0x20 || name[i] == 0x7f)
      return kli_fail(m->error, KL_EINVAL,
                      "%s: the name '%.40s' holds a control character at "
                      "byte %lu",
                      what, name, (unsigned long)i);
  if ((other = find_name(m, table, name_at, name)) >= 0)
    return kli_fail(m->error, KL_EDUPLICATE,
                    "%s: the name '%.40s' is already used by @%d", what,
                    name, other);
  if (kli_lookup_grow(&m->alloc, table) != KL_OK)
    return kli_fail(m->error, KL_ENOMEM, "%s: out of memory", what);
  return KL_OK;
}

/* Records a new item's name (room made by check_name). */
static void index_name(kli_lookup *table, const char *name, int id) {
  if (name != NULL)
    kli_lookup_add(table, kli_hash_text(name), id);
}

static int copy_name(kl_model *m, const char *name, char **out,
                     const char *what) {
  size_t len;
  *out = NULL;
  if (name == NULL)
    return KL_OK;
  len = strlen(name) + 1;
  *out = kli_alloc(&m->alloc, len);
  if (*out == NULL)
    return kli_fail(m->error, KL_ENOMEM, "%s: out of memory", what);
  memcpy(*out, name, len);
  return KL_OK;
}

int kl_add_link(kl_model *m, const char *name) {
  int st;
  char *copy;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "add link")) != KL_OK ||
      (st = check_name(m, name, "add link", &m->link_names,
                       kl_model_link_name)) != KL_OK)
    return st;
  if (kli_reserve(&m->alloc, (void **)&m->links, &m->cap_links, m->nlinks + 1,
                  sizeof *m->links) != KL_OK)
    return kli_fail(m->error, KL_ENOMEM, "add link: out of memory");
  if ((st = copy_name(m, name, &copy, "add link")) != KL_OK)
    return st;
  memset(&m->links[m->nlinks], 0, sizeof m->links[m->nlinks]);
  m->links[m->nlinks].name = copy;
  index_name(&m->link_names, copy, m->nlinks);
  return m->nlinks++;
}

/* Whether joint id joins the pair (kind, lower link, higher link). */
static int same_pair(const void *owner, int id, const void *key) {
  const kli_joint *j = &((const kl_model *)owner)->joints[id];
  const int *pair = key;
  int lo = j->link[0] < j->link[1] ? j->link[0] : j->link[1];
  int hi = j->link[0] < j->link[1] ? j->link[1] : j->link[0];
  return j->kind == pair[0] && lo == pair[1] && hi == pair[2];
}

static int add_joint(kl_model *m, int kind, int a, double ax, double ay,
                     double axis, int b, double bx, double by) {
  char what[32], la[64], lb[64], lj[48];
  int st, j, pair[3];
  unsigned pair_hash;
  kli_joint *nj;
  if (m == NULL)
    return KL_EINVAL;
  snprintf(what, sizeof what, "add %s joint", kli_kind_name(kind));
  if ((st = check_open(m, what)) != KL_OK || (st = check_link(m, a, what)) ||
      (st = check_link(m, b, what)))
    return st;
  if (a == b)
    return kli_fail(m->error, KL_ESELFJOINT, "%s: joins %s to itself", what,
                    kli_link_label(m, a, la, sizeof la));
  if (!isfinite(ax) || !isfinite(ay) || !isfinite(bx) || !isfinite(by) ||
      !isfinite(axis))
    return kli_fail(m->error, KL_ENONFINITE,
                    "%s between %s and %s: a coordinate or the axis angle is "
                    "NaN or infinite",
                    what, kli_link_label(m, a, la, sizeof la),
                    kli_link_label(m, b, lb, sizeof lb));
  pair[0] = kind;
  pair[1] = a < b ? a : b;
  pair[2] = a < b ? b : a;
  pair_hash = kli_hash_ints(pair[0], pair[1], pair[2]);
  if ((j = kli_lookup_find(&m->joint_pairs, pair_hash, same_pair, m, pair)) >=
      0)
    return kli_fail(m->error, KL_EDUPLICATE,
                    "%s: joint %s is already a %s joint between %s and %s",
                    what, kli_joint_ref(m, j, lj, sizeof lj),
                    kli_kind_name(kind),
                    kli_link_label(m, a, la, sizeof la),
                    kli_link_label(m, b, lb, sizeof lb));
  if (kli_lookup_grow(&m->alloc, &m->joint_pairs) != KL_OK ||
      kli_reserve(&m->alloc, (void **)&m->joints, &m->cap_joints,
                  m->njoints + 1, sizeof *m->joints) != KL_OK)
    return kli_fail(m->error, KL_ENOMEM, "%s: out of memory", what);
  nj = &m->joints[m->njoints];
  memset(nj, 0, sizeof *nj);
  nj->kind = kind;
  nj->link[0] = a;
  nj->link[1] = b;
  nj->at[0][0] = ax;
  nj->at[0][1] = ay;
  nj->at[1][0] = bx;
  nj->at[1][1] = by;
  nj->axis = kli_is_sliding(kind) ? axis : 0.0;
  nj->axis_cs[0] = cos(nj->axis);
  nj->axis_cs[1] = sin(nj->axis);
  nj->input = -1;
  kli_lookup_add(&m->joint_pairs, pair_hash, m->njoints);
  return m->njoints++;
}

int kl_add_revolute(kl_model *m, int a, double ax, double ay, int b, double bx,
                    double by) {
  return add_joint(m, KL_JOINT_REVOLUTE, a, ax, ay, 0.0, b, bx, by);
}

int kl_add_prismatic(kl_model *m, int a, double ax, double ay,
                     double axis_angle, int b, double bx, double by) {
  return add_joint(m, KL_JOINT_PRISMATIC, a, ax, ay, axis_angle, b, bx, by);
}

int kl_add_slot(kl_model *m, int a, double ax, double ay, double axis_angle,
                int b, double bx, double by) {
  return add_joint(m, KL_JOINT_SLOT, a, ax, ay, axis_angle, b, bx, by);
}

static int add_sliding_through(kl_model *m, int kind, int a, double ax,
                               double ay, double tx, double ty, int b,
                               double bx, double by) {
  char la[64];
  if (m == NULL)
    return KL_EINVAL;
  /* the axis angle hides an infinite point (atan2 of infinity is finite),
   * so the points themselves are checked */
  if (!isfinite(tx) || !isfinite(ty))
    return add_joint(m, kind, a, ax, ay, NAN, b, bx, by);
  if (tx == ax && ty == ay && a >= 0 && a < m->nlinks && !m->finalized)
    return kli_fail(m->error, KL_EZEROLENGTH,
                    "add %s joint: the two points giving the axis on %s "
                    "coincide at (%g, %g), so the axis has zero length",
                    kli_kind_name(kind), kli_link_label(m, a, la, sizeof la),
                    ax, ay);
  return add_joint(m, kind, a, ax, ay, atan2(ty - ay, tx - ax), b, bx, by);
}

int kl_add_prismatic_through(kl_model *m, int a, double ax, double ay,
                             double tx, double ty, int b, double bx,
                             double by) {
  return add_sliding_through(m, KL_JOINT_PRISMATIC, a, ax, ay, tx, ty, b, bx, by);
}

int kl_add_slot_through(kl_model *m, int a, double ax, double ay, double tx,
                        double ty, int b, double bx, double by) {
  return add_sliding_through(m, KL_JOINT_SLOT, a, ax, ay, tx, ty, b, bx, by);
}

int kl_add_point(kl_model *m, int link, double x, double y, const char *name) {
  int st;
  char *copy;
  char la[64];
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "add point")) != KL_OK ||
      (st = check_link(m, link, "add point")) != KL_OK)
    return st;
  if (!isfinite(x) || !isfinite(y))
    return kli_fail(m->error, KL_ENONFINITE,
                    "add point on %s: a coordinate is NaN or infinite",
                    kli_link_label(m, link, la, sizeof la));
  if ((st = check_name(m, name, "add point", &m->point_names,
                       kl_model_point_name)) != KL_OK)
    return st;
  if (kli_reserve(&m->alloc, (void **)&m->points, &m->cap_points,
                  m->npoints + 1, sizeof *m->points) != KL_OK)
    return kli_fail(m->error, KL_ENOMEM, "add point: out of memory");
  if ((st = copy_name(m, name, &copy, "add point")) != KL_OK)
    return st;
  m->points[m->npoints].link = link;
  m->points[m->npoints].at[0] = x;
  m->points[m->npoints].at[1] = y;
  m->points[m->npoints].name = copy;
  index_name(&m->point_names, copy, m->npoints);
  return m->npoints++;
}

static int check_joint(kl_model *m, int joint, const char *what) {
  if (joint < 0 || joint >= m->njoints)
    return kli_fail_index(m->error, what, "joint", joint, m->njoints);
  return KL_OK;
}

int kl_add_input(kl_model *m, int joint) {
  int st, i;
  char lj[160], li[KLI_LABEL_SIZE];
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "add input")) != KL_OK ||
      (st = check_joint(m, joint, "add input")) != KL_OK)
    return st;
  if ((i = kli_input_of(m, joint)) >= 0)
    return kli_fail(m->error, KL_EDUPLICATE,
                    "add input: %s is already %s",
                    kli_joint_label(m, joint, lj, sizeof lj),
                    kli_input_label(m, i, li, sizeof li));
  if (kli_reserve(&m->alloc, (void **)&m->inputs, &m->cap_inputs,
                  m->ninputs + 1, sizeof *m->inputs) != KL_OK)
    return kli_fail(m->error, KL_ENOMEM, "add input: out of memory");
  m->inputs[m->ninputs] = joint;
  m->joints[joint].input = m->ninputs;
  return m->ninputs++;
}

/*
 * Walks a cycle of joints: with `before` the link on which the walk arrives
 * at joints[0], each joint leads to its other link, which must be a link of
 * the next joint. On success fills links_after (may be NULL) and returns 1.
 */
static int walk_cycle(const kl_model *m, int n, const int *joints, int before,
                      int *links_after) {
  int i, cur = before;
  for (i = 0; i < n; i++) {
    const kli_joint *j = &m->joints[joints[i]];
    const kli_joint *next = &m->joints[joints[(i + 1) % n]];
    if (j->link[0] != cur && j->link[1] != cur)
      return 0;
    cur = j->link[0] == cur ? j->link[1] : j->link[0];
    if (next->link[0] != cur && next->link[1] != cur)
      return 0;
    if (links_after != NULL)
      links_after[i] = cur;
  }
  return cur == before;
}

int kli_loop_links(const kl_model *m, int n, const int *joints,
                   int *links_after) {
  const kli_joint *first = &m->joints[joints[0]];
  int side;
  for (side = 0; side < 2; side++)
    if (walk_cycle(m, n, joints, first->link[side], links_after))
      return 1;
  return 0;
}

/* Why joints[0..n) is not a simple cycle, as a status with the message set;
 * KL_OK if it is one. `links_after` has room for n links, `seen` for one
 * mark per link, all 0. */
static int check_cycle(kl_model *m, int n, const int *joints,
                       int *links_after, unsigned char *seen) {
  int i;
  char la[64], ja[48], jb[48];
  if (!kli_loop_links(m, n, joints, links_after)) {
    for (i = 0; i < n; i++) {
      const kli_joint *a = &m->joints[joints[i]];
      const kli_joint *b = &m->joints[joints[(i + 1) % n]];
      if (a->link[0] != b->link[0] && a->link[0] != b->link[1] &&
          a->link[1] != b->link[0] && a->link[1] != b->link[1])
        return kli_fail(m->error, KL_ELOOP,
                        "add loop: joints %s and %s (positions %d and %d of "
                        "the list, 0-based) do not share a link, so the walk "
                        "breaks there",
                        kli_joint_ref(m, joints[i], ja, sizeof ja),
                        kli_joint_ref(m, joints[(i + 1) % n], jb, sizeof jb),
                        i, (i + 1) % n);
    }
    return kli_fail(m->error, KL_ELOOP,
                    "add loop: walking joints %s .. %s from either link of "
                    "joint %s does not come back to where it started",
                    kli_joint_ref(m, joints[0], ja, sizeof ja),
                    kli_joint_ref(m, joints[n - 1], jb, sizeof jb), ja);
  }
  for (i = 0; i < n; i++) {
    if (seen[links_after[i]])
      return kli_fail(m->error, KL_ELOOP,
                      "add loop: the walk visits %s twice; a loop must be a "
                      "simple cycle",
                      kli_link_label(m, links_after[i], la, sizeof la));
    seen[links_after[i]] = 1;
  }
  return KL_OK;
}

int kl_add_loop(kl_model *m, int njoints, const int *joints) {
  int st, i;
  int *links_after;
  unsigned char *seen_joint, *seen_link;
  size_t bytes;
  char ref[48];
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "add loop")) != KL_OK)
    return st;
  if (joints == NULL || njoints < 2)
    return kli_fail(m->error, KL_EINVAL,
                    "add loop: a loop needs at least 2 joints (got %d%s)",
                    njoints, joints == NULL ? ", and no array" : "");
  if (m->nreg_loops == KLI_MAX_REGISTERED_LOOPS)
    return kli_fail(m->error, KL_ETOOLARGE,
                    "add loop: %d loops are registered already, the most a "
                    "model registers; leave the loops out and kinloop finds "
                    "them itself",
                    KLI_MAX_REGISTERED_LOOPS);
  if (njoints > INT_MAX - m->nreg_joints)
    return kli_fail(m->error, KL_ETOOLARGE,
                    "add loop: %d joints on top of the %d registered "
                    "already are more than a model holds",
                    njoints, m->nreg_joints);
  for (i = 0; i < njoints; i++)
    if ((st = check_joint(m, joints[i], "add loop")) != KL_OK)
      return st;
  /* a loop visits each of its joints and links once: marks, not pairs */
  bytes = (size_t)njoints * sizeof(int) + (size_t)m->njoints + (size_t)m->nlinks;
  links_after = kli_alloc(&m->alloc, bytes);
  if (links_after == NULL)
    return kli_fail(m->error, KL_ENOMEM, "add loop: out of memory");
  seen_joint = (unsigned char *)(links_after + njoints);
  seen_link = seen_joint + m->njoints;
  memset(seen_joint, 0, (size_t)m->njoints + (size_t)m->nlinks);
  for (i = 0; i < njoints && st == KL_OK; i++) {
    if (seen_joint[joints[i]]) {
      int k = 0;
      while (joints[k] != joints[i])
        k++;
      st = kli_fail(m->error, KL_ELOOP,
                    "add loop: joint %s appears twice (positions %d and %d "
                    "of the list, 0-based)",
                    kli_joint_ref(m, joints[i], ref, sizeof ref), k, i);
    }
    seen_joint[joints[i]] = 1;
  }
  if (st == KL_OK)
    st = check_cycle(m, njoints, joints, links_after, seen_link);
  kli_free(&m->alloc, links_after, bytes);
  if (st != KL_OK)
    return st;
  if (kli_reserve(&m->alloc, (void **)&m->reg_joints, &m->cap_reg_joints,
                  m->nreg_joints + njoints, sizeof(int)) != KL_OK ||
      kli_reserve(&m->alloc, (void **)&m->reg_start, &m->cap_reg_start,
                  m->nreg_loops + 2, sizeof(int)) != KL_OK)
    return kli_fail(m->error, KL_ENOMEM, "add loop: out of memory");
  if (m->nreg_loops == 0)
    m->reg_start[0] = 0;
  memcpy(m->reg_joints + m->nreg_joints, joints, (size_t)njoints * sizeof(int));
  m->nreg_joints += njoints;
  m->reg_start[m->nreg_loops + 1] = m->nreg_joints;
  return m->nreg_loops++;
}

int kl_model_set_joint_name(kl_model *m, int joint, const char *name) {
  int st;
  char *copy;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "name joint")) != KL_OK ||
      (st = check_joint(m, joint, "name joint")) != KL_OK)
    return st;
  if (name == NULL)
    return kli_fail(m->error, KL_EINVAL, "name joint: no name (NULL)");
  if (m->joints[joint].name != NULL &&
      strcmp(m->joints[joint].name, name) == 0)
    return KL_OK;
  if ((st = check_name(m, name, "name joint", &m->joint_names,
                       kl_model_joint_name)) != KL_OK ||
      (st = copy_name(m, name, &copy, "name joint")) != KL_OK)
    return st;
  if (m->joints[joint].name == NULL) {
    index_name(&m->joint_names, copy, joint);
  } else {
    int j;
    /* a rename (rare): the table is rebuilt, in the memory it has */
    free_name(m, m->joints[joint].name);
    m->joints[joint].name = NULL;
    kli_lookup_clear(&m->joint_names);
    for (j = 0; j < m->njoints; j++)
      index_name(&m->joint_names, m->joints[j].name, j);
    index_name(&m->joint_names, copy, joint);
  }
  m->joints[joint].name = copy;
  return KL_OK;
}

int kl_model_set_units(kl_model *m, int length_unit, int angle_unit) {
  int st;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "set units")) != KL_OK)
    return st;
  if (length_unit < KL_LENGTH_UNSTATED || length_unit > KL_LENGTH_IN ||
      (angle_unit != KL_ANGLE_RAD && angle_unit != KL_ANGLE_DEG))
    return kli_fail(m->error, KL_EINVAL,
                    "set units: length unit %d or angle unit %d is not one "
                    "kinloop knows",
                    length_unit, angle_unit);
  m->length_unit = length_unit;
  m->angle_unit = angle_unit;
  return KL_OK;
}

int kl_model_units(const kl_model *m, int *length_unit, int *angle_unit) {
  if (m == NULL)
    return KL_EINVAL;
  if (length_unit != NULL)
    *length_unit = m->length_unit;
  if (angle_unit != NULL)
    *angle_unit = m->angle_unit;
  return KL_OK;
}

const char *kl_length_unit_str(int length_unit) {
  switch (length_unit) {
  case KL_LENGTH_MM: return "mm";
  case KL_LENGTH_M: return "m";
  case KL_LENGTH_IN: return "in";
  default: return "";
  }
}

const char *kl_angle_unit_str(int angle_unit) {
  return angle_unit == KL_ANGLE_DEG ? "deg" : "rad";
}

int kl_model_set_sketch_angle(kl_model *m, int link, double angle) {
  int st;
  char label[KLI_LABEL_SIZE];
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "set sketch angle")) != KL_OK ||
      (st = check_link(m, link, "set sketch angle")) != KL_OK)
    return st;
  if (link == KL_GROUND)
    return kli_fail(m->error, KL_EKIND,
                    "set sketch angle: ground's angle is 0 for good");
  if (!isfinite(angle))
    return kli_fail(m->error, KL_ENONFINITE,
                    "set sketch angle: the angle of %s is NaN or infinite",
                    kli_link_label(m, link, label, sizeof label));
  m->links[link].sketch = angle;
  m->links[link].has_sketch = 1;
  return KL_OK;
}

int kl_model_set_sketch_slide(kl_model *m, int joint, double slide) {
  int st;
  char lj[160];
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "set sketch slide")) != KL_OK ||
      (st = check_joint(m, joint, "set sketch slide")) != KL_OK)
    return st;
  if (!kli_is_sliding(m->joints[joint].kind))
    return kli_fail(m->error, KL_EKIND, "set sketch slide: %s has no slide",
                    kli_joint_label(m, joint, lj, sizeof lj));
  if (!isfinite(slide))
    return kli_fail(m->error, KL_ENONFINITE,
                    "set sketch slide: the slide of %s is NaN or infinite",
                    kli_joint_label(m, joint, lj, sizeof lj));
  m->joints[joint].sketch = slide;
  m->joints[joint].has_sketch = 1;
  return KL_OK;
}

double kl_model_sketch_angle(const kl_model *m, int link) {
  if (m == NULL || link < 0 || link >= m->nlinks || !m->links[link].has_sketch)
    return NAN;
  return m->links[link].sketch;
}

double kl_model_sketch_slide(const kl_model *m, int joint) {
  if (m == NULL || joint < 0 || joint >= m->njoints ||
      !m->joints[joint].has_sketch)
    return NAN;
  return m->joints[joint].sketch;
}

int kl_model_set_sweep(kl_model *m, const kl_sweep_settings *sweep) {
  int st;
  char label[KLI_LABEL_SIZE];
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "set sweep")) != KL_OK)
    return st;
  if (sweep == NULL || sweep->size < sizeof *sweep)
    return kli_fail(m->error, KL_EINVAL, "set sweep: %s",
                    sweep == NULL ? "no settings (NULL)"
                                  : "settings size too small");
  if (sweep->steps < 1)
    return kli_fail(m->error, KL_EINVAL,
                    "set sweep: steps must be at least 1, not %d",
                    sweep->steps);
  if (sweep->steps > KL_MAX_STEPS)
    return kli_fail(m->error, KL_ETOOLARGE,
                    "set sweep: %d steps; a sweep takes at most %d "
                    "(KL_MAX_STEPS)",
                    sweep->steps, KL_MAX_STEPS);
  if (sweep->input < 0 || sweep->input >= m->ninputs)
    return kli_fail_index(m->error, "set sweep", "input", sweep->input,
                          m->ninputs);
  if (m->inputs[sweep->input] < 0)
    return kli_fail(m->error, KL_EKIND,
                    "set sweep: %s is a point input; the recorded sweep is a "
                    "joint input's (sweep a point input with "
                    "kl_solver_sweep)",
                    kli_input_label(m, sweep->input, label, sizeof label));
  if (!isfinite(sweep->from) || !isfinite(sweep->to) ||
      !isfinite(sweep->to - sweep->from))
    return kli_fail(m->error, KL_ENONFINITE,
                    "set sweep: the range is NaN or infinite, or longer "
                    "than a double holds");
  m->sweep = *sweep;
  m->sweep.size = sizeof m->sweep;
  m->has_sweep = 1;
  return KL_OK;
}

int kl_model_set_input_hold(kl_model *m, int input, double value) {
  int st;
  char label[KLI_LABEL_SIZE];
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "set input hold")) != KL_OK)
    return st;
  if (input < 0 || input >= m->ninputs)
    return kli_fail_index(m->error, "set input hold", "input", input,
                          m->ninputs);
  if (m->inputs[input] < 0)
    return kli_fail(m->error, KL_EKIND,
                    "set input hold: %s is a point input; it starts where the "
                    "sketch puts its point",
                    kli_input_label(m, input, label, sizeof label));
  if (!isfinite(value))
    return kli_fail(m->error, KL_ENONFINITE,
                    "set input hold: the value is NaN or infinite");
  m->joints[m->inputs[input]].hold = value;
  m->joints[m->inputs[input]].has_hold = 1;
  return KL_OK;
}

/* The named line of a transmission angle on `link` from `joint` to
 * `line`: refused when the two stand at one point (relative to their
 * distance from the link's origin: the model's scale is not known yet). */
static int check_line(kl_model *m, int joint, int line, int link) {
  const double *p = kli_joint_point_on(m, joint, link);
  const double *q = kli_joint_point_on(m, line, link);
  double size = fmax(hypot(p[0], p[1]), hypot(q[0], q[1]));
  char lj[160], ll[160], lk[64];
  if (hypot(p[0] - q[0], p[1] - q[1]) > 1e-12 * size)
    return KL_OK;
  return kli_fail(m->error, KL_EZEROLENGTH,
                  "set transmission lines: %s stands at %s's point on %s, so "
                  "there is no line to measure",
                  kli_joint_label(m, line, ll, sizeof ll),
                  kli_joint_label(m, joint, lj, sizeof lj),
                  kli_link_label(m, link, lk, sizeof lk));
}

static int joint_on_link(const kl_model *m, int joint, int link) {
  return m->joints[joint].link[0] == link || m->joints[joint].link[1] == link;
}

int kl_model_set_transmission_lines(kl_model *m, int joint, int line_a,
                                    int line_b) {
  const char *what = "set transmission lines";
  const kli_joint *j;
  int st, lines[2];
  char lj[160], ll[160];
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, what)) != KL_OK ||
      (st = check_joint(m, joint, what)) != KL_OK ||
      (st = check_joint(m, line_a, what)) != KL_OK ||
      (st = check_joint(m, line_b, what)) != KL_OK)
    return st;
  j = &m->joints[joint];
  if (j->kind != KL_JOINT_REVOLUTE)
    return kli_fail(m->error, KL_EKIND,
                    "%s: %s is not revolute; a slider's figure is its "
                    "pressure angle",
                    what, kli_joint_label(m, joint, lj, sizeof lj));
  if (line_a == joint || line_b == joint)
    return kli_fail(m->error, KL_EKIND,
                    "%s: a line of %s must run to another joint", what,
                    kli_joint_label(m, joint, lj, sizeof lj));
  /* one line on each link: take them in whichever order fits */
  if (joint_on_link(m, line_a, j->link[0]) &&
      joint_on_link(m, line_b, j->link[1])) {
    lines[0] = line_a;
    lines[1] = line_b;
  } else if (joint_on_link(m, line_b, j->link[0]) &&
             joint_on_link(m, line_a, j->link[1])) {
    lines[0] = line_b;
    lines[1] = line_a;
  } else {
    char la[64], lb[64], lm[160];
    return kli_fail(m->error, KL_EKIND,
                    "%s: %s and %s are not one on %s and one on %s, the "
                    "links %s joins",
                    what, kli_joint_label(m, line_a, ll, sizeof ll),
                    kli_joint_label(m, line_b, lm, sizeof lm),
                    kli_link_label(m, j->link[0], la, sizeof la),
                    kli_link_label(m, j->link[1], lb, sizeof lb),
                    kli_joint_label(m, joint, lj, sizeof lj));
  }
  if ((st = check_line(m, joint, lines[0], j->link[0])) != KL_OK ||
      (st = check_line(m, joint, lines[1], j->link[1])) != KL_OK)
    return st;
  m->joints[joint].lines[0] = lines[0];
  m->joints[joint].lines[1] = lines[1];
  m->joints[joint].has_lines = 1;
  return KL_OK;
}

int kl_model_transmission_lines(const kl_model *m, int joint, int *line_a,
                                int *line_b) {
  if (m == NULL || line_a == NULL || line_b == NULL)
    return KL_EINVAL;
  if (joint < 0 || joint >= m->njoints || !m->joints[joint].has_lines)
    return KL_EID;
  *line_a = m->joints[joint].lines[0];
  *line_b = m->joints[joint].lines[1];
  return KL_OK;
}

double kl_model_input_hold(const kl_model *m, int input) {
  if (m == NULL || input < 0 || input >= m->ninputs || m->inputs[input] < 0 ||
      !m->joints[m->inputs[input]].has_hold)
    return NAN;
  return m->joints[m->inputs[input]].hold;
}

int kl_model_sweep(const kl_model *m, kl_sweep_settings *sweep) {
  if (m == NULL || sweep == NULL || sweep->size < sizeof(sweep->size))
    return KL_EINVAL;
  if (!m->has_sweep)
    return KL_EID;
  kli_copy_sized(sweep, &m->sweep, sizeof m->sweep);
  return KL_OK;
}

/* ---- mass properties, gravity, redundancy ---- */

int kl_set_link_mass(kl_model *m, int link, double mass, double cx, double cy,
                     double inertia) {
  int st;
  char la[64];
  kli_link *l;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "set link mass")) != KL_OK ||
      (st = check_link(m, link, "set link mass")) != KL_OK)
    return st;
  if (link == KL_GROUND)
    return kli_fail(m->error, KL_EKIND,
                    "set link mass: link 0 is ground, which does not move; "
                    "mass properties belong to moving links");
  kli_link_label(m, link, la, sizeof la);
  if (!isfinite(mass) || !isfinite(cx) || !isfinite(cy) || !isfinite(inertia))
    return kli_fail(m->error, KL_ENONFINITE,
                    "set link mass: a mass property of %s is NaN or infinite "
                    "(mass %g, centre (%g, %g), inertia %g)",
                    la, mass, cx, cy, inertia);
  if (mass < 0.0 || inertia < 0.0)
    return kli_fail(m->error, KL_EINVAL,
                    "set link mass: %s is given a negative %s (%g); mass and "
                    "moment of inertia are at least 0",
                    la, mass < 0.0 ? "mass" : "moment of inertia",
                    mass < 0.0 ? mass : inertia);
  l = &m->links[link];
  l->mass = mass;
  l->centre[0] = cx;
  l->centre[1] = cy;
  l->inertia = inertia;
  l->has_mass = 1;
  return KL_OK;
}

int kl_model_link_mass(const kl_model *m, int link, double *mass,
                       double cxy[2], double *inertia) {
  const kli_link *l;
  if (m == NULL)
    return KL_EINVAL;
  if (link < 0 || link >= m->nlinks)
    return KL_EID;
  l = &m->links[link];
  if (mass != NULL)
    *mass = l->mass;
  if (cxy != NULL) {
    cxy[0] = l->centre[0];
    cxy[1] = l->centre[1];
  }
  if (inertia != NULL)
    *inertia = l->inertia;
  return KL_OK;
}

int kl_model_set_gravity(kl_model *m, double gx, double gy) {
  int st;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "set gravity")) != KL_OK)
    return st;
  if (!isfinite(gx) || !isfinite(gy))
    return kli_fail(m->error, KL_ENONFINITE,
                    "set gravity: (%g, %g) is NaN or infinite", gx, gy);
  m->gravity[0] = gx;
  m->gravity[1] = gy;
  return KL_OK;
}

int kl_model_gravity(const kl_model *m, double gxy[2]) {
  if (m == NULL || gxy == NULL)
    return KL_EINVAL;
  gxy[0] = m->gravity[0];
  gxy[1] = m->gravity[1];
  return KL_OK;
}

int kl_model_set_redundancy(kl_model *m, int redundant) {
  int st;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "set redundancy")) != KL_OK)
    return st;
  if (redundant < 0)
    return kli_fail(m->error, KL_EINVAL,
                    "set redundancy: %d redundant constraints; the count is "
                    "at least 0",
                    redundant);
  m->redundancy = redundant;
  return KL_OK;
}

int kl_model_redundancy(const kl_model *m) {
  return m == NULL ? KL_EINVAL : m->redundancy;
}

/* ---- loads and the working speed ---- */

int kli_check_load_list(const kl_model *m, char *error, int nloads,
                        const kl_load *loads, const char *stage) {
  char label[64];
  int k;
  if (nloads < 0 || (nloads > 0 && loads == NULL))
    return kli_fail(error, KL_EINVAL,
                    "%s: %d loads%s", stage, nloads,
                    nloads < 0 ? "; the count is at least 0"
                               : " but the loads array is NULL");
  for (k = 0; k < nloads; k++) {
    const kl_load *l = &loads[k];
    if (l->kind == KL_LOAD_FORCE) {
      if (l->id < 0 || l->id >= m->npoints)
        return kli_fail(error, KL_EID,
                        "%s: load index %d (0-based) acts at point index %d "
                        "(0-based), which does not exist (the model has %d "
                        "points)",
                        stage, k, l->id, m->npoints);
      if (!isfinite(l->fx) || !isfinite(l->fy))
        return kli_fail(error, KL_ENONFINITE,
                        "%s: load index %d (0-based) at %s is NaN or "
                        "infinite",
                        stage, k,
                        kli_point_label(m, l->id, label, sizeof label));
    } else if (l->kind == KL_LOAD_TORQUE) {
      if (l->id < 0 || l->id >= m->nlinks)
        return kli_fail(error, KL_EID,
                        "%s: load index %d (0-based) acts on link index %d "
                        "(0-based), which does not exist (the model has %d "
                        "links)",
                        stage, k, l->id, m->nlinks);
      if (!isfinite(l->torque))
        return kli_fail(error, KL_ENONFINITE,
                        "%s: the torque of load index %d (0-based) on %s is "
                        "NaN or infinite",
                        stage, k, kli_link_label(m, l->id, label, sizeof label));
    } else {
      return kli_fail(error, KL_EKIND,
                      "%s: load index %d (0-based) has kind %d, neither "
                      "force nor torque",
                      stage, k, l->kind);
    }
  }
  return KL_OK;
}

int kl_add_load(kl_model *m, const kl_load *load) {
  int st;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "add load")) != KL_OK)
    return st;
  if (load == NULL)
    return kli_fail(m->error, KL_EINVAL, "add load: no load (NULL)");
  if ((st = kli_check_load_list(m, m->error, 1, load, "add load")) != KL_OK)
    return st;
  if (kli_reserve(&m->alloc, (void **)&m->loads, &m->cap_loads, m->nloads + 1,
                  sizeof *m->loads) != KL_OK)
    return kli_fail(m->error, KL_ENOMEM, "add load: out of memory");
  m->loads[m->nloads] = *load;
  return m->nloads++;
}

int kl_model_load_count(const kl_model *m) {
  return m == NULL ? KL_EINVAL : m->nloads;
}

int kl_model_load(const kl_model *m, int index, kl_load *load) {
  if (m == NULL || load == NULL)
    return KL_EINVAL;
  if (index < 0 || index >= m->nloads)
    return KL_EID;
  *load = m->loads[index];
  return KL_OK;
}

int kl_model_set_speed(kl_model *m, int input, double speed,
                       double speed_fluctuation) {
  int st;
  char label[KLI_LABEL_SIZE];
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_open(m, "set speed")) != KL_OK)
    return st;
  if (input < 0 || input >= m->ninputs)
    return kli_fail_index(m->error, "set speed", "input", input, m->ninputs);
  if (m->inputs[input] < 0)
    return kli_fail(m->error, KL_EKIND,
                    "set speed: %s is a point input; the working speed is a "
                    "joint input's",
                    kli_input_label(m, input, label, sizeof label));
  if (!isfinite(speed) || !isfinite(speed_fluctuation))
    return kli_fail(m->error, KL_ENONFINITE,
                    "set speed: the speed (%g) or its fluctuation (%g) is NaN "
                    "or infinite",
                    speed, speed_fluctuation);
  if (speed_fluctuation < 0.0)
    return kli_fail(m->error, KL_EINVAL,
                    "set speed: the coefficient of speed fluctuation is %g; "
                    "it is at least 0 (0 leaves the flywheel out)",
                    speed_fluctuation);
  m->has_speed = 1;
  m->speed_input = input;
  m->speed = speed;
  m->speed_fluctuation = speed_fluctuation;
  return KL_OK;
}

int kl_model_speed(const kl_model *m, int *input, double *speed,
                   double *speed_fluctuation) {
  if (m == NULL)
    return KL_EINVAL;
  if (!m->has_speed)
    return KL_EID;
  if (input != NULL)
    *input = m->speed_input;
  if (speed != NULL)
    *speed = m->speed;
  if (speed_fluctuation != NULL)
    *speed_fluctuation = m->speed_fluctuation;
  return KL_OK;
}

/* Duplicates an array of `cap` elements of `elem` bytes; 1 if done. */
static int copy_array(const kli_allocator *a, void **to, int *to_cap,
                      const void *from, int cap, size_t elem) {
  if (cap == 0)
    return 1;
  *to = kli_alloc(a, (size_t)cap * elem);
  if (*to == NULL)
    return 0;
  memcpy(*to, from, (size_t)cap * elem);
  *to_cap = cap;
  return 1;
}

kl_model *kli_model_copy(const kl_model *src) {
  kl_model *m = kli_alloc(&src->alloc, sizeof *m);
  int i, ok;
  if (m == NULL)
    return NULL;
  /* an empty model with src's settings; every state below is freeable */
  memset(m, 0, sizeof *m);
  m->alloc = src->alloc;
  m->refs = 1;
  m->length_unit = src->length_unit;
  m->angle_unit = src->angle_unit;
  m->sweep = src->sweep;
  m->has_sweep = src->has_sweep;
  m->gravity[0] = src->gravity[0];
  m->gravity[1] = src->gravity[1];
  m->redundancy = src->redundancy;
  m->has_speed = src->has_speed;
  m->speed_input = src->speed_input;
  m->speed = src->speed;
  m->speed_fluctuation = src->speed_fluctuation;
  m->profile_input = src->profile_input;
  ok = copy_array(&m->alloc, (void **)&m->links, &m->cap_links, src->links,
                  src->cap_links, sizeof *m->links) &&
       copy_array(&m->alloc, (void **)&m->joints, &m->cap_joints, src->joints,
                  src->cap_joints, sizeof *m->joints) &&
       copy_array(&m->alloc, (void **)&m->points, &m->cap_points, src->points,
                  src->cap_points, sizeof *m->points) &&
       copy_array(&m->alloc, (void **)&m->inputs, &m->cap_inputs, src->inputs,
                  src->cap_inputs, sizeof *m->inputs) &&
       copy_array(&m->alloc, (void **)&m->reg_joints, &m->cap_reg_joints,
                  src->reg_joints, src->cap_reg_joints, sizeof(int)) &&
       copy_array(&m->alloc, (void **)&m->reg_start, &m->cap_reg_start,
                  src->reg_start, src->cap_reg_start, sizeof(int)) &&
       copy_array(&m->alloc, (void **)&m->loads, &m->cap_loads, src->loads,
                  src->cap_loads, sizeof *m->loads) &&
       copy_array(&m->alloc, (void **)&m->segments, &m->cap_segments,
                  src->segments, src->cap_segments, sizeof *m->segments) &&
       copy_array(&m->alloc, (void **)&m->knots, &m->cap_knots, src->knots,
                  src->cap_knots, sizeof *m->knots) &&
       kli_copy_couplings(m, src);
  if (ok) {
    m->nlinks = src->nlinks;
    m->njoints = src->njoints;
    m->npoints = src->npoints;
    m->ninputs = src->ninputs;
    m->nreg_joints = src->nreg_joints;
    m->nreg_loops = src->nreg_loops;
    m->nloads = src->nloads;
    m->nsegments = src->nsegments;
    m->nknots = src->nknots;
    /* the names are src's until copied: none first, then each */
    for (i = 0; i < m->nlinks; i++)
      m->links[i].name = NULL;
    for (i = 0; i < m->njoints; i++) {
      m->joints[i].name = NULL;
      m->joints[i].curve = NULL;
      m->joints[i].cam = NULL;
    }
    for (i = 0; i < m->npoints; i++)
      m->points[i].name = NULL;
    for (i = 0; ok && i < m->njoints; i++)
      ok = src->joints[i].curve == NULL ||
           (m->joints[i].curve = kli_curve_copy(&m->alloc,
                                                src->joints[i].curve)) != NULL;
    for (i = 0; ok && i < m->njoints; i++)
      ok = src->joints[i].cam == NULL ||
           (m->joints[i].cam = kli_cam_copy(&m->alloc, src->joints[i].cam)) !=
               NULL;
    for (i = 0; ok && i < m->nlinks; i++)
      ok = copy_name(m, src->links[i].name, &m->links[i].name, "copy") == KL_OK;
    for (i = 0; ok && i < m->njoints; i++)
      ok = copy_name(m, src->joints[i].name, &m->joints[i].name, "copy") ==
           KL_OK;
    for (i = 0; ok && i < m->npoints; i++)
      ok = copy_name(m, src->points[i].name, &m->points[i].name, "copy") ==
           KL_OK;
  }
  ok = ok &&
       kli_lookup_copy(&m->alloc, &m->link_names, &src->link_names) == KL_OK &&
       kli_lookup_copy(&m->alloc, &m->joint_names, &src->joint_names) ==
           KL_OK &&
       kli_lookup_copy(&m->alloc, &m->point_names, &src->point_names) ==
           KL_OK &&
       kli_lookup_copy(&m->alloc, &m->joint_pairs, &src->joint_pairs) == KL_OK;
  if (!ok) {
    kl_model_free(m);
    return NULL;
  }
  return m;
}

/* ---- reading the record back ---- */

int kl_model_link_count(const kl_model *m) {
  return m == NULL ? KL_EINVAL : m->nlinks;
}
int kl_model_joint_count(const kl_model *m) {
  return m == NULL ? KL_EINVAL : m->njoints;
}
int kl_model_point_count(const kl_model *m) {
  return m == NULL ? KL_EINVAL : m->npoints;
}
int kl_model_input_count(const kl_model *m) {
  return m == NULL ? KL_EINVAL : m->ninputs;
}

const char *kl_model_link_name(const kl_model *m, int link) {
  if (m == NULL || link < 0 || link >= m->nlinks)
    return NULL;
  return link == KL_GROUND ? "ground" : m->links[link].name;
}

const char *kl_model_joint_name(const kl_model *m, int joint) {
  if (m == NULL || joint < 0 || joint >= m->njoints)
    return NULL;
  return m->joints[joint].name;
}

int kl_model_find_joint(const kl_model *m, const char *name) {
  int id;
  if (m == NULL || name == NULL)
    return KL_EINVAL;
  id = find_name(m, &m->joint_names, kl_model_joint_name, name);
  return id >= 0 ? id : KL_EID;
}

const char *kl_model_point_name(const kl_model *m, int point) {
  if (m == NULL || point < 0 || point >= m->npoints)
    return NULL;
  return m->points[point].name;
}

int kl_model_find_link(const kl_model *m, const char *name) {
  int id;
  if (m == NULL || name == NULL)
    return KL_EINVAL;
  id = find_name(m, &m->link_names, kl_model_link_name, name);
  return id >= 0 ? id : KL_EID;
}

int kl_model_find_point(const kl_model *m, const char *name) {
  int id;
  if (m == NULL || name == NULL)
    return KL_EINVAL;
  id = find_name(m, &m->point_names, kl_model_point_name, name);
  return id >= 0 ? id : KL_EID;
}

int kl_model_point_link(const kl_model *m, int point, double xy[2]) {
  if (m == NULL)
    return KL_EINVAL;
  if (point < 0 || point >= m->npoints)
    return KL_EID;
  if (xy != NULL) {
    xy[0] = m->points[point].at[0];
    xy[1] = m->points[point].at[1];
  }
  return m->points[point].link;
}

int kl_model_joint_kind(const kl_model *m, int joint) {
  if (m == NULL)
    return KL_EINVAL;
  if (joint < 0 || joint >= m->njoints)
    return KL_EID;
  return m->joints[joint].kind;
}

int kl_model_joint_links(const kl_model *m, int joint, int links[2], double a_xy[2],
                   double b_xy[2]) {
  const kli_joint *j;
  if (m == NULL)
    return KL_EINVAL;
  if (joint < 0 || joint >= m->njoints)
    return KL_EID;
  j = &m->joints[joint];
  if (links != NULL) {
    links[0] = j->link[0];
    links[1] = j->link[1];
  }
  if (a_xy != NULL)
    memcpy(a_xy, j->at[0], sizeof j->at[0]);
  if (b_xy != NULL)
    memcpy(b_xy, j->at[1], sizeof j->at[1]);
  return KL_OK;
}

double kl_model_joint_axis(const kl_model *m, int joint) {
  if (m == NULL || joint < 0 || joint >= m->njoints ||
      (m->joints[joint].kind != KL_JOINT_PRISMATIC &&
       m->joints[joint].kind != KL_JOINT_SLOT))
    return NAN;
  return m->joints[joint].axis;
}

/* ---- curved slots ---- */

/* A joint of a curved kind through add_joint, then its path: on any error
 * the joint is taken back, so the model is as before. */
static int add_curved(kl_model *m, int kind, int a, double ax, double ay,
                      double radius, kli_curve *curve, int b, double bx,
                      double by) {
  int j = add_joint(m, kind, a, ax, ay, 0.0, b, bx, by);
  if (j < 0) {
    kli_curve_free(&m->alloc, curve);
    return j;
  }
  m->joints[j].radius = radius;
  m->joints[j].curve = curve;
  return j;
}

int kl_add_arc_slot(kl_model *m, int a, double cx, double cy, double r, int b,
                    double bx, double by) {
  char la[64];
  if (m == NULL)
    return KL_EINVAL;
  /* the joint's own checks (state, ids, numbers) speak first */
  if (m->finalized || a < 0 || a >= m->nlinks || b < 0 || b >= m->nlinks ||
      a == b || !isfinite(cx) || !isfinite(cy) || !isfinite(bx) ||
      !isfinite(by))
    return add_joint(m, KL_JOINT_ARC_SLOT, a, cx, cy, 0.0, b, bx, by);
  if (!isfinite(r))
    return kli_fail(m->error, KL_ENONFINITE,
                    "add arc slot joint on %s: the radius is NaN or infinite",
                    kli_link_label(m, a, la, sizeof la));
  if (r <= 0.0) {
    char radius[48];
    return kli_fail(m->error, KL_ERADIUS,
                    "add arc slot joint on %s: the radius %s is not positive",
                    kli_link_label(m, a, la, sizeof la),
                    kli_length_value(m, r, 6, radius, sizeof radius));
  }
  return add_curved(m, KL_JOINT_ARC_SLOT, a, cx, cy, r, NULL, b, bx, by);
}

int kl_add_curve_slot(kl_model *m, int a, int npoints, const double *xy,
                      int closed, int b, double bx, double by) {
  kli_curve *curve;
  int st;
  if (m == NULL)
    return KL_EINVAL;
  if (m->finalized || a < 0 || a >= m->nlinks || b < 0 || b >= m->nlinks ||
      a == b || !isfinite(bx) || !isfinite(by))
    return add_joint(m, KL_JOINT_CURVE_SLOT, a, 0.0, 0.0, 0.0, b, bx, by);
  if ((st = kli_curve_new(&m->alloc, npoints, xy, closed, m->error,
                          "add curve slot joint", &curve)) != KL_OK)
    return st;
  return add_curved(m, KL_JOINT_CURVE_SLOT, a, 0.0, 0.0, 0.0, curve, b, bx,
                    by);
}

/* The most points a cam's pitch curve may take in a model. */
#define KLI_CAM_MAX_POINTS 100000

/* The checks of kl_add_cam before anything is built: the status, with
 * the message in m->error. */
static int check_cam(kl_model *m, int bearing, int follower, const kl_cam *cam,
                     int npoints, double max_pressure, const char *what) {
  char label[96];
  int st, cam_link;
  if ((st = check_open(m, what)) != KL_OK ||
      (st = check_link(m, follower, what)) != KL_OK)
    return st;
  if (cam == NULL || npoints < 8 || npoints > KLI_CAM_MAX_POINTS)
    return kli_fail(m->error, KL_EINVAL,
                    "%s: %s (8 to %d points)", what,
                    cam == NULL ? "the cam is NULL"
                                : "the number of pitch-curve points is out "
                                  "of range",
                    KLI_CAM_MAX_POINTS);
  if (!isfinite(max_pressure))
    return kli_fail(m->error, KL_ENONFINITE,
                    "%s: the pressure-angle bound is NaN or infinite", what);
  if (!(max_pressure > 0.0 && max_pressure <= KLI_PI)) {
    double unit = m->angle_unit == KL_ANGLE_DEG ? 180.0 / KLI_PI : 1.0;
    return kli_fail(m->error, KL_EINVAL,
                    "%s: the pressure-angle bound %g %s is not above 0 and "
                    "at most half a turn",
                    what, max_pressure * unit,
                    kl_angle_unit_str(m->angle_unit));
  }
  if (bearing < 0 || bearing >= m->njoints)
    return kli_fail(m->error, KL_EID, "%s: no joint %d for the bearing", what,
                    bearing + 1);
  if (m->joints[bearing].kind != KL_JOINT_REVOLUTE ||
      (m->joints[bearing].link[0] != KL_GROUND &&
       m->joints[bearing].link[1] != KL_GROUND))
    return kli_fail(m->error, KL_EKIND,
                    "%s: the bearing, %s, is not a revolute joint with ground",
                    what, kli_joint_label(m, bearing, label, sizeof label));
  cam_link = m->joints[bearing].link[0] == KL_GROUND
                 ? m->joints[bearing].link[1]
                 : m->joints[bearing].link[0];
  if (follower == cam_link)
    return kli_fail(m->error, KL_ESELFJOINT,
                    "%s: the follower is the cam link, %s", what,
                    kli_link_label(m, cam_link, label, sizeof label));
  return KL_OK;
}

/* kl_cam_check's verdict on the cam, its message in the model's angle
 * unit. */
static int cam_judged(kl_model *m, kl_cam *cam, int npoints,
                      double max_pressure, const char *what) {
  double unit = m->angle_unit == KL_ANGLE_DEG ? 180.0 / KLI_PI : 1.0;
  const char *word = kl_angle_unit_str(m->angle_unit);
  char roller[KLI_LABEL_SIZE], convex[KLI_LABEL_SIZE];
  kl_cam_report r;
  int st;
  r.size = sizeof r;
  st = kl_cam_check(cam, 4 * npoints, max_pressure, &r);
  if (st == KL_EUNDERCUT)
    return kli_fail(m->error, st,
                    "%s: the roller (radius %s) undercuts the cam at cam "
                    "angle %.6g %s, where the pitch curve's convex radius "
                    "of curvature is %s (the roller must stay below it)",
                    what,
                    kli_length_value(m, kli_cam_follower_of(cam)->roller_radius,
                                     6, roller, sizeof roller),
                    r.min_convex_angle * unit, word,
                    kli_length_value(m, r.min_convex_radius, 6, convex,
                                     sizeof convex));
  if (st == KL_EPRESSURE)
    return kli_fail(m->error, st,
                    "%s: the pressure angle reaches %.6g %s at cam angle "
                    "%.6g %s, above the bound %.6g %s",
                    what, r.max_pressure * unit, word,
                    r.max_pressure_angle * unit, word, max_pressure * unit,
                    word);
  if (st != KL_OK)
    return kli_fail(m->error, st, "%s: %s", what, kl_cam_error(cam));
  return KL_OK;
}

int kl_add_cam(kl_model *m, int bearing, int follower, double bx, double by,
               const kl_cam *cam, int npoints, double max_pressure) {
  const char *what = "add cam joint";
  const kli_joint *bj;
  kl_cam *copy;
  kli_curve *curve;
  double *xy, centre[2];
  size_t bytes;
  int st, k, cam_link, j;
  if (m == NULL)
    return KL_EINVAL;
  if ((st = check_cam(m, bearing, follower, cam, npoints, max_pressure,
                      what)) != KL_OK)
    return st;
  bj = &m->joints[bearing];
  cam_link = bj->link[0] == KL_GROUND ? bj->link[1] : bj->link[0];
  memcpy(centre, kli_joint_point_on(m, bearing, cam_link), sizeof centre);
  if ((copy = kli_cam_copy(&m->alloc, cam)) == NULL)
    return kli_fail(m->error, KL_ENOMEM, "%s: out of memory", what);
  if ((st = cam_judged(m, copy, npoints, max_pressure, what)) != KL_OK) {
    kl_cam_free(copy);
    return st;
  }
  bytes = (size_t)npoints * 2 * sizeof *xy;
  if ((xy = kli_alloc(&m->alloc, bytes)) == NULL) {
    kl_cam_free(copy);
    return kli_fail(m->error, KL_ENOMEM, "%s: out of memory", what);
  }
  kl_cam_outline(copy, npoints, xy, NULL);
  for (k = 0; k < npoints; k++) {
    xy[2 * k] += centre[0];
    xy[2 * k + 1] += centre[1];
  }
  st = kli_curve_new(&m->alloc, npoints, xy, 1, m->error, what, &curve);
  kli_free(&m->alloc, xy, bytes);
  if (st != KL_OK) {
    kl_cam_free(copy);
    return st;
  }
  j = add_curved(m, KL_JOINT_CURVE_SLOT, cam_link, 0.0, 0.0, 0.0, curve,
                 follower, bx, by);
  if (j < 0) {
    kl_cam_free(copy);
    return j;
  }
  m->joints[j].cam = copy;
  m->joints[j].cam_bearing = bearing;
  m->joints[j].cam_limit = max_pressure;
  return j;
}

int kl_model_cam_bearing(const kl_model *m, int joint) {
  if (m == NULL)
    return KL_EINVAL;
  if (joint < 0 || joint >= m->njoints)
    return KL_EID;
  return m->joints[joint].cam != NULL ? m->joints[joint].cam_bearing
                                      : KL_EKIND;
}

double kl_model_cam_limit(const kl_model *m, int joint) {
  return kl_model_cam_bearing(m, joint) >= 0 ? m->joints[joint].cam_limit
                                             : NAN;
}

double kl_model_slot_radius(const kl_model *m, int joint) {
  if (m == NULL || joint < 0 || joint >= m->njoints ||
      m->joints[joint].kind != KL_JOINT_ARC_SLOT)
    return NAN;
  return m->joints[joint].radius;
}

/* The curve of a curve slot joint, or NULL with the status in *st. */
static const kli_curve *curve_of(const kl_model *m, int joint, int *st) {
  *st = m == NULL                                       ? KL_EINVAL
        : joint < 0 || joint >= m->njoints              ? KL_EID
        : m->joints[joint].kind != KL_JOINT_CURVE_SLOT ? KL_EKIND
                                                        : KL_OK;
  return *st == KL_OK ? m->joints[joint].curve : NULL;
}

int kl_model_curve_count(const kl_model *m, int joint) {
  int st;
  const kli_curve *c = curve_of(m, joint, &st);
  return c == NULL ? st : c->n;
}

int kl_model_curve_closed(const kl_model *m, int joint) {
  int st;
  const kli_curve *c = curve_of(m, joint, &st);
  return c == NULL ? st : c->closed;
}

int kl_model_curve_point(const kl_model *m, int joint, int k, double xy[2]) {
  int st;
  const kli_curve *c = curve_of(m, joint, &st);
  if (c == NULL)
    return st;
  if (xy == NULL)
    return KL_EINVAL;
  if (k < 0 || k >= c->n)
    return KL_EID;
  xy[0] = c->xy[2 * k];
  xy[1] = c->xy[2 * k + 1];
  return KL_OK;
}

int kl_model_slot_point(const kl_model *m, int joint, double slide,
                        double out[6]) {
  const kli_joint *j;
  if (m == NULL || out == NULL)
    return KL_EINVAL;
  if (joint < 0 || joint >= m->njoints)
    return KL_EID;
  j = &m->joints[joint];
  if (!kli_is_sliding(j->kind))
    return KL_EKIND;
  if (!isfinite(slide))
    return KL_ENONFINITE;
  kli_slot_path(j, slide, out);
  out[0] += j->at[0][0];
  out[1] += j->at[0][1];
  return KL_OK;
}

int kl_model_input_joint(const kl_model *m, int input) {
  if (m == NULL)
    return KL_EINVAL;
  if (input < 0 || input >= m->ninputs)
    return KL_EID;
  return m->inputs[input] >= 0 ? m->inputs[input] : KL_EKIND;
}

int kl_model_is_finalized(const kl_model *m) {
  return m != NULL && m->finalized;
}
