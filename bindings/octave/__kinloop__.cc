/*
 * __kinloop__.cc - the Octave gateway to kinloop: one function taking a
 * command (a kl_ name without its prefix) and its arguments; models,
 * solvers and studies are held in a table and handed to Octave as ids.
 */
#include <octave/oct.h>
#include <octave/interpreter.h>
#include <octave/oct-map.h>

#include <cmath>
#include <cstdlib>
#include <cstring>
#include <exception>
#include <limits>
#include <map>
#include <string>
#include <vector>

#include "kinloop.h"
/* the counting allocator of the test support, for models whose every
 * allocation a caller wants to see (and, on request, refuse) */
extern "C" {
#include "support.h"
}

namespace {

/* ------------------------------------------------------------------------
 * The handle table. Ids start at 1 and are never reused, so a stale id is
 * always recognised as freed rather than taken for a newer object.
 * ------------------------------------------------------------------------ */

enum class kind : unsigned char { none, model, solver, study };

/* A study's model is borrowed: its handle (made by study_model) refuses
 * every command that would change or free it, and goes with the study. */
struct entry {
  kind what = kind::none;
  kl_model *model = nullptr; /* the model, or the solver's model */
  kl_solver *solver = nullptr;
  kl_study *study = nullptr;
  int model_id = 0;      /* solver: the id of its model; study: the id of
                            its borrowed model, 0 until study_model */
  int owner = 0;         /* model: the study it belongs to, 0 if its own */
  int live_solvers = 0;  /* model: solvers not yet freed */
  void *block = nullptr; /* solver placed in a gateway-owned block */
  bool sweeping = false; /* solver: inside kl_solver_sweep's callback */
};

struct registry {
  std::map<int, entry> live;
  std::vector<kind> made{kind::none}; /* made[id]: what id was made as */
  /* counting allocators of models made with one; kept after the model is
   * freed so that a caller can see every byte came back. std::map keeps
   * each record at one address for the model's whole life. */
  std::map<int, counting_alloc> allocs;
};

/* Never destroyed: Octave may run classdef destructors that call the
 * gateway while it shuts down, after static objects would be gone. */
registry &table() {
  static registry *r = new registry;
  return *r;
}

const char *kind_name(kind k) {
  return k == kind::model    ? "model"
         : k == kind::solver ? "solver"
         : k == kind::study  ? "study"
                             : "handle";
}

/* ------------------------------------------------------------------------
 * Errors. Library failures raise 'kinloop:<status name>' with the library's
 * message; the gateway's own checks raise kinloop:bad_argument,
 * kinloop:bad_handle and kinloop:in_use.
 * ------------------------------------------------------------------------ */

const char *status_name(int status) {
  switch (status) {
  case KL_OK: return "OK";
  case KL_LIMIT: return "LIMIT";
  case KL_STOPPED: return "STOPPED";
  case KL_ENOMEM: return "ENOMEM";
  case KL_EINVAL: return "EINVAL";
  case KL_ENONFINITE: return "ENONFINITE";
  case KL_EID: return "EID";
  case KL_EKIND: return "EKIND";
  case KL_ESTATE: return "ESTATE";
  case KL_ESELFJOINT: return "ESELFJOINT";
  case KL_EDUPLICATE: return "EDUPLICATE";
  case KL_EDISCONNECTED: return "EDISCONNECTED";
  case KL_EZEROLENGTH: return "EZEROLENGTH";
  case KL_ELOOP: return "ELOOP";
  case KL_ELOOPSET: return "ELOOPSET";
  case KL_EOVERCONSTRAINED: return "EOVERCONSTRAINED";
  case KL_EDOF: return "EDOF";
  case KL_EUNDETERMINED: return "EUNDETERMINED";
  case KL_EMAXITER: return "EMAXITER";
  case KL_ENOASSEMBLY: return "ENOASSEMBLY";
  case KL_ESINGULAR: return "ESINGULAR";
  case KL_ESTAGE: return "ESTAGE";
  case KL_ESYNTAX: return "ESYNTAX";
  case KL_EIO: return "EIO";
  case KL_ETRUNCATED: return "ETRUNCATED";
  case KL_ETOOLARGE: return "ETOOLARGE";
  default: return "EUNKNOWN";
  }
}

[[noreturn]] void raise(const std::string &id, const std::string &message) {
  error_with_id(("kinloop:" + id).c_str(), "%s", message.c_str());
}

/* A library failure: its status and the message the library wrote. */
[[noreturn]] void raise_status(int status, const char *message) {
  raise(status_name(status), message != nullptr && message[0] != '\0'
                                 ? message
                                 : kl_status_str(status));
}

std::string str(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.17g", v);
  return buf;
}

std::string str(int v) { return std::to_string(v); }

/* ------------------------------------------------------------------------
 * One call: its command name and arguments, with checked conversions.
 * Argument i counts from 0 after the command name.
 * ------------------------------------------------------------------------ */

enum class access { read, write };

class call {
public:
  call(const std::string &name, const octave_value_list &args, int nargout,
       octave::interpreter &interp)
      : name(name), nargout(nargout), interp(interp), args_(args) {}

  const std::string name;
  const int nargout;
  octave::interpreter &interp;

  int count() const { return args_.length() - 1; }
  const octave_value &arg(int i) const { return args_(i + 1); }
  bool given(int i) const { return i < count() && !arg(i).isempty(); }

  [[noreturn]] void bad(const std::string &what) const {
    raise("bad_argument", name + ": " + what);
  }

  double real(int i, const char *what) const {
    const octave_value &v = arg(i);
    if (!(v.isnumeric() || v.islogical()) || v.iscomplex() || v.numel() != 1)
      bad(std::string(what) + " must be a real number");
    return v.double_value();
  }

  int integer(int i, const char *what) const {
    const octave_value &v = arg(i);
    double d;
    if (!(v.isnumeric() || v.islogical()) || v.iscomplex() || v.numel() != 1)
      bad(std::string(what) + " must be an integer");
    d = v.double_value();
    if (!(d == std::floor(d)) || d < std::numeric_limits<int>::min() ||
        d > std::numeric_limits<int>::max())
      bad(std::string(what) + " must be an integer (got " + str(d) + ")");
    return static_cast<int>(d);
  }

  std::string text(int i, const char *what) const {
    const octave_value &v = arg(i);
    if (!v.is_string() || v.rows() > 1)
      bad(std::string(what) + " must be a character string");
    return v.string_value();
  }

  /* A name for the library (NULL when absent or []): no NUL inside, which
   * would cut it short without notice. */
  bool name_arg(int i, const char *what, std::string &out) const {
    if (!given(i))
      return false;
    out = text(i, what);
    if (out.find('\0') != std::string::npos)
      bad(std::string(what) + " contains a NUL character");
    return true;
  }

  /* Exactly n real numbers (any vector shape; [] when n is 0). */
  std::vector<double> values(int i, int n, const char *what) const {
    const octave_value &v = arg(i);
    if (!(v.isnumeric() || v.islogical()) || v.iscomplex())
      bad(std::string(what) + " must be a real vector");
    if (v.numel() != n || (n > 0 && v.ndims() > 2) ||
        (n > 0 && v.rows() != 1 && v.columns() != 1))
      bad(std::string(what) + " must have " + str(n) + " element" +
          (n == 1 ? "" : "s") + " (one per input, in input order); got " +
          str(static_cast<int>(v.numel())));
    NDArray a = v.array_value();
    return std::vector<double>(a.data(), a.data() + n);
  }

  /* A sample index or count: a whole number a double holds exactly. */
  long whole(int i, const char *what) const {
    const octave_value &v = arg(i);
    if (!(v.isnumeric() || v.islogical()) || v.iscomplex() || v.numel() != 1)
      bad(std::string(what) + " must be a whole number");
    double d = v.double_value();
    if (!(d == std::floor(d)) || std::fabs(d) > 9007199254740992.0 ||
        std::fabs(d) > static_cast<double>(std::numeric_limits<long>::max()))
      bad(std::string(what) + " must be a whole number (got " + str(d) + ")");
    return static_cast<long>(d);
  }

  /* Integers: a vector of ids. */
  std::vector<int> integers(int i, const char *what) const {
    const octave_value &v = arg(i);
    if (!(v.isnumeric() || v.islogical()) || v.iscomplex())
      bad(std::string(what) + " must be a vector of integers");
    NDArray a = v.array_value();
    std::vector<int> out;
    for (octave_idx_type k = 0; k < a.numel(); k++) {
      double d = a(k);
      if (!(d == std::floor(d)) || d < std::numeric_limits<int>::min() ||
          d > std::numeric_limits<int>::max())
        bad(std::string(what) + " must hold integers (element " +
            str(static_cast<int>(k + 1)) + " is " + str(d) + ")");
      out.push_back(static_cast<int>(d));
    }
    return out;
  }

  entry &handle(int i, kind want, access how) const {
    int id = integer(i, want == kind::model    ? "model id"
                        : want == kind::solver ? "solver id"
                                               : "study id");
    registry &r = table();
    auto it = r.live.find(id);
    if (it == r.live.end()) {
      if (id > 0 && static_cast<size_t>(id) < r.made.size())
        raise("bad_handle", name + ": " + kind_name(r.made[id]) + " " +
                                str(id) + " has been freed");
      raise("bad_handle", name + ": " + str(id) + " is not a kinloop " +
                              kind_name(want) + " id");
    }
    if (it->second.what != want)
      raise("bad_handle", name + ": id " + str(id) + " is a " +
                              kind_name(it->second.what) + ", not a " +
                              kind_name(want));
    if (how == access::write && it->second.sweeping)
      raise("in_use", name + ": solver " + str(id) +
                          " is running a sweep; its callback may only read "
                          "from it");
    /* the library would refuse too (the model is finalized), but write
     * its message into a model that is the study's, not ours */
    if (how == access::write && it->second.owner != 0)
      raise(status_name(KL_ESTATE),
            name + ": model " + str(id) + " belongs to study " +
                str(it->second.owner) + " and is finalized: it cannot change");
    return it->second;
  }

  entry &model(int i, access how = access::write) const {
    return handle(i, kind::model, how);
  }
  entry &solver(int i, access how = access::write) const {
    return handle(i, kind::solver, how);
  }
  entry &study(int i, access how = access::read) const {
    return handle(i, kind::study, how);
  }

  /* An int-returning getter failed without a message of its own. */
  void quiet(int status, const std::string &about) const {
    if (status < 0)
      raise_status(
          status,
          (name + ": " + kl_status_str(status) + " (" + about + ")").c_str());
  }

private:
  const octave_value_list &args_;
};

void model_status(int status, const entry &m) {
  if (status < 0)
    raise_status(status, kl_model_error(m.model));
}

void solver_status(int status, const entry &s) {
  if (status < 0)
    raise_status(status, kl_solver_error(s.solver));
}

int new_id(kind what, const entry &e) {
  registry &r = table();
  int id = static_cast<int>(r.made.size());
  r.made.push_back(what);
  r.live[id] = e;
  r.live[id].what = what;
  return id;
}

octave_value row(const double *xy, int n) {
  RowVector v(n);
  for (int k = 0; k < n; k++)
    v(k) = xy[k];
  return v;
}

octave_value_list one(const octave_value &v) { return octave_value_list(v); }
octave_value_list none() { return octave_value_list(); }

/* Ids shaped like the argument, each mapped through `get`. */
template <typename F>
octave_value each_id(const call &c, int i, const char *what, F get) {
  std::vector<int> ids = c.integers(i, what);
  NDArray out(c.arg(i).dims());
  for (size_t k = 0; k < ids.size(); k++)
    out(k) = get(ids[k]);
  return out;
}

/* Ids, one row of `width` values each, written by `get` (a status). */
template <typename F>
octave_value rows_of(const call &c, int i, const char *what, int width, F get) {
  std::vector<int> ids = c.integers(i, what);
  Matrix out(ids.size(), width);
  double xy[2];
  for (size_t k = 0; k < ids.size(); k++) {
    get(ids[k], xy);
    for (int w = 0; w < width; w++)
      out(k, w) = xy[w];
  }
  return out;
}

/* ------------------------------------------------------------------------
 * Structs: fields checked by name, so that a mistyped field is an error
 * rather than a silently used default.
 * ------------------------------------------------------------------------ */

void only_fields(const call &c, const octave_map &m, const char *what,
                 std::initializer_list<const char *> allowed) {
  string_vector names = m.fieldnames();
  for (octave_idx_type k = 0; k < names.numel(); k++) {
    bool known = false;
    for (const char *a : allowed)
      known = known || names(k) == a;
    if (!known) {
      std::string list;
      for (const char *a : allowed)
        list += std::string(list.empty() ? "" : ", ") + a;
      c.bad(std::string(what) + " has no field '" + names(k) +
            "' (fields: " + list + ")");
    }
  }
}

/* Field `name` of element k, undefined when the struct has no such field. */
octave_value field(const octave_map &m, octave_idx_type k, const char *name) {
  if (!m.isfield(name))
    return octave_value();
  return m.contents(name)(k);
}

/* A numeric code, or a name from `names` standing for codes[k]. */
struct named_code {
  const char *name;
  int code;
};

int code_of(const call &c, const octave_value &v, const char *what,
            std::initializer_list<named_code> table) {
  if (v.is_string()) {
    std::string s = v.string_value();
    std::string list;
    for (const named_code &n : table) {
      if (s == n.name)
        return n.code;
      list += std::string(list.empty() ? "'" : ", '") + n.name + "'";
    }
    c.bad(std::string(what) + " '" + s + "' is not one of " + list);
  }
  if (!(v.isnumeric() || v.islogical()) || v.iscomplex() || v.numel() != 1 ||
      v.double_value() != std::floor(v.double_value()) ||
      std::fabs(v.double_value()) > 1e9)
    c.bad(std::string(what) + " must be a name or an integer code");
  return static_cast<int>(v.double_value());
}

int field_int(const call &c, const octave_value &v, const char *what,
              int fallback) {
  if (v.is_undefined() || v.isempty())
    return fallback;
  if (!(v.isnumeric() || v.islogical()) || v.iscomplex() || v.numel() != 1 ||
      v.double_value() != std::floor(v.double_value()) ||
      std::fabs(v.double_value()) > std::numeric_limits<int>::max())
    c.bad(std::string(what) + " must be an integer");
  return static_cast<int>(v.double_value());
}

double field_real(const call &c, const octave_value &v, const char *what,
                  double fallback) {
  if (v.is_undefined() || v.isempty())
    return fallback;
  if (!(v.isnumeric() || v.islogical()) || v.iscomplex() || v.numel() != 1)
    c.bad(std::string(what) + " must be a real number");
  return v.double_value();
}

octave_map struct_arg(const call &c, int i, const char *what) {
  const octave_value &v = c.arg(i);
  if (!v.isstruct())
    c.bad(std::string(what) + " must be a struct");
  return v.map_value();
}

kl_output output_arg(const call &c, int i) {
  octave_map m = struct_arg(c, i, "output");
  if (m.numel() != 1)
    c.bad("output must be one struct (kind, id, line_a, line_b)");
  only_fields(c, m, "output", {"kind", "id", "line_a", "line_b"});
  octave_value kind = field(m, 0, "kind");
  if (kind.is_undefined() || field(m, 0, "id").is_undefined())
    c.bad("output needs the fields kind and id");
  kl_output o;
  o.kind = code_of(c, kind, "output kind",
                   {{"link_angle", KL_OUTPUT_LINK_ANGLE},
                    {"slide", KL_OUTPUT_SLIDE},
                    {"joint_angle", KL_OUTPUT_JOINT_ANGLE},
                    {"point_x", KL_OUTPUT_POINT_X},
                    {"point_y", KL_OUTPUT_POINT_Y},
                    {"transmission", KL_OUTPUT_TRANSMISSION}});
  o.id = field_int(c, field(m, 0, "id"), "output id", -1);
  o.line_a = field_int(c, field(m, 0, "line_a"), "output line_a", -1);
  o.line_b = field_int(c, field(m, 0, "line_b"), "output line_b", -1);
  return o;
}

std::vector<kl_dimension> dimensions_arg(const call &c, int i) {
  std::vector<kl_dimension> dims;
  if (c.arg(i).isempty() && !c.arg(i).isstruct())
    return dims;
  octave_map m = struct_arg(c, i, "dimension");
  only_fields(c, m, "dimension", {"kind", "id", "axis"});
  for (octave_idx_type k = 0; k < m.numel(); k++) {
    octave_value kind = field(m, k, "kind"), axis = field(m, k, "axis");
    if (kind.is_undefined() || field(m, k, "id").is_undefined() ||
        axis.is_undefined())
      c.bad("each dimension needs the fields kind, id and axis");
    kl_dimension d;
    d.kind = code_of(c, kind, "dimension kind",
                     {{"joint_a", KL_DIMENSION_JOINT_A},
                      {"joint_b", KL_DIMENSION_JOINT_B},
                      {"point", KL_DIMENSION_POINT}});
    d.id = field_int(c, field(m, k, "id"), "dimension id", -1);
    d.axis = code_of(c, axis, "dimension axis", {{"x", 0}, {"y", 1}});
    dims.push_back(d);
  }
  return dims;
}

std::vector<kl_load> loads_arg(const call &c, int i) {
  std::vector<kl_load> loads;
  if (c.arg(i).isempty() && !c.arg(i).isstruct())
    return loads;
  octave_map m = struct_arg(c, i, "load");
  only_fields(c, m, "load", {"kind", "id", "fx", "fy", "torque"});
  for (octave_idx_type k = 0; k < m.numel(); k++) {
    octave_value kind = field(m, k, "kind");
    if (kind.is_undefined() || field(m, k, "id").is_undefined())
      c.bad("each load needs the fields kind and id");
    kl_load l;
    l.kind = code_of(c, kind, "load kind",
                     {{"force", KL_LOAD_FORCE}, {"torque", KL_LOAD_TORQUE}});
    l.id = field_int(c, field(m, k, "id"), "load id", -1);
    l.fx = field_real(c, field(m, k, "fx"), "load fx", 0.0);
    l.fy = field_real(c, field(m, k, "fy"), "load fy", 0.0);
    l.torque = field_real(c, field(m, k, "torque"), "load torque", 0.0);
    loads.push_back(l);
  }
  return loads;
}

/* A kernel by name ('auto', ...), or by its code if the header is newer
 * than these names. */
octave_value kernel_value(int kernel) {
  switch (kernel) {
  case KL_KERNEL_AUTO: return "auto";
  case KL_KERNEL_SMALL: return "small";
  case KL_KERNEL_DENSE: return "dense";
  case KL_KERNEL_BANDED: return "banded";
  default: return kernel;
  }
}

int kernel_arg(const call &c, const octave_value &v, int fallback) {
  if (v.is_undefined() || v.isempty())
    return fallback;
  return code_of(c, v, "kernel",
                 {{"auto", KL_KERNEL_AUTO},
                  {"small", KL_KERNEL_SMALL},
                  {"dense", KL_KERNEL_DENSE},
                  {"banded", KL_KERNEL_BANDED}});
}

octave_scalar_map options_struct(const kl_options &o) {
  octave_scalar_map st;
  st.assign("tolerance", o.tolerance);
  st.assign("step_tolerance", o.step_tolerance);
  st.assign("max_iterations", o.max_iterations);
  st.assign("max_backtracks", o.max_backtracks);
  st.assign("max_step", o.max_step);
  st.assign("singular_rcond", o.singular_rcond);
  st.assign("kernel", kernel_value(o.kernel));
  return st;
}

octave_scalar_map range_struct(const kl_range &r) {
  octave_scalar_map st;
  st.assign("min", r.min);
  st.assign("max", r.max);
  st.assign("input_at_min", r.input_at_min);
  st.assign("input_at_max", r.input_at_max);
  st.assign("sweep_status", r.sweep_status);
  st.assign("sweep_status_name", status_name(r.sweep_status));
  st.assign("limit_input", r.limit_input);
  return st;
}

octave_scalar_map io_error_struct(const kl_io_error &e) {
  octave_scalar_map st;
  st.assign("status", e.status);
  st.assign("status_name", status_name(e.status));
  st.assign("line", e.line);
  st.assign("column", e.column);
  st.assign("message", std::string(e.message));
  return st;
}

/* "line 3, column 7: ..." when the error has a place in the text. */
std::string io_message(const kl_io_error &e) {
  std::string msg = e.message[0] != '\0' ? e.message : kl_status_str(e.status);
  if (e.line > 0)
    return "line " + str(e.line) + ", column " + str(e.column) + ": " + msg;
  return msg;
}

/* ------------------------------------------------------------------------
 * Commands: models
 * ------------------------------------------------------------------------ */

/* A model made (or read) with the counting allocator: the record must be
 * in place before the library first calls the hook. */
counting_alloc &new_alloc_record(const call &c, int i, int id) {
  counting_alloc &a = table().allocs[id];
  std::memset(&a, 0, sizeof a);
  if (c.given(i))
    a.fail_at = c.integer(i, "fail_at");
  return a;
}

int adopt_model(kl_model *m) {
  entry e;
  e.model = m;
  return new_id(kind::model, e);
}

octave_value_list cmd_model_new(const call &) {
  kl_model *m = kl_model_new();
  if (m == nullptr)
    raise_status(KL_ENOMEM, "model_new: out of memory");
  return one(adopt_model(m));
}

octave_value_list cmd_model_new_with_alloc(const call &c) {
  int id = static_cast<int>(table().made.size());
  counting_alloc &a = new_alloc_record(c, 0, id);
  kl_model *m = kl_model_new_with_alloc(counting_alloc_fn, &a);
  if (m == nullptr) {
    table().allocs.erase(id);
    raise_status(KL_ENOMEM, "model_new_with_alloc: out of memory");
  }
  return one(adopt_model(m));
}

octave_value_list cmd_model_free(const call &c) {
  entry &m = c.model(0, access::read);
  int id = c.integer(0, "model id");
  if (m.owner != 0)
    raise("in_use", c.name + ": model " + str(id) + " belongs to study " +
                        str(m.owner) + "; it is freed with the study");
  if (m.live_solvers > 0)
    raise("in_use", c.name + ": model " + str(id) + " still has " +
                        str(m.live_solvers) + " solver" +
                        (m.live_solvers == 1 ? "" : "s") + "; free them first");
  kl_model_free(m.model);
  table().live.erase(id);
  return none();
}

octave_value_list cmd_model_error(const call &c) {
  return one(std::string(kl_model_error(c.model(0, access::read).model)));
}

octave_value_list cmd_add_link(const call &c) {
  entry &m = c.model(0);
  std::string name;
  bool named = c.name_arg(1, "name", name);
  int st = kl_add_link(m.model, named ? name.c_str() : nullptr);
  model_status(st, m);
  return one(st);
}

octave_value_list cmd_add_revolute(const call &c) {
  entry &m = c.model(0);
  int st = kl_add_revolute(m.model, c.integer(1, "link a"), c.real(2, "ax"),
                           c.real(3, "ay"), c.integer(4, "link b"),
                           c.real(5, "bx"), c.real(6, "by"));
  model_status(st, m);
  return one(st);
}

template <int (*add)(kl_model *, int, double, double, double, int, double,
                     double)>
octave_value_list cmd_add_sliding(const call &c) {
  entry &m = c.model(0);
  int st = add(m.model, c.integer(1, "link a"), c.real(2, "ax"),
               c.real(3, "ay"), c.real(4, "axis angle"), c.integer(5, "link b"),
               c.real(6, "bx"), c.real(7, "by"));
  model_status(st, m);
  return one(st);
}

template <int (*add)(kl_model *, int, double, double, double, double, int,
                     double, double)>
octave_value_list cmd_add_sliding_through(const call &c) {
  entry &m = c.model(0);
  int st = add(m.model, c.integer(1, "link a"), c.real(2, "ax"),
               c.real(3, "ay"), c.real(4, "tx"), c.real(5, "ty"),
               c.integer(6, "link b"), c.real(7, "bx"), c.real(8, "by"));
  model_status(st, m);
  return one(st);
}

octave_value_list cmd_add_point(const call &c) {
  entry &m = c.model(0);
  std::string name;
  bool named = c.name_arg(4, "name", name);
  int st = kl_add_point(m.model, c.integer(1, "link"), c.real(2, "x"),
                        c.real(3, "y"), named ? name.c_str() : nullptr);
  model_status(st, m);
  return one(st);
}

octave_value_list cmd_add_input(const call &c) {
  entry &m = c.model(0);
  int st = kl_add_input(m.model, c.integer(1, "joint"));
  model_status(st, m);
  return one(st);
}

octave_value_list cmd_add_loop(const call &c) {
  entry &m = c.model(0);
  std::vector<int> joints = c.integers(1, "joints");
  int st = kl_add_loop(m.model, static_cast<int>(joints.size()),
                       joints.empty() ? nullptr : joints.data());
  model_status(st, m);
  return one(st);
}

/* A study's model is finalized already: as for any finalized model,
 * there is nothing to do. */
octave_value_list cmd_model_finalize(const call &c) {
  entry &m = c.model(0, access::read);
  if (m.owner == 0)
    model_status(kl_model_finalize(m.model), m);
  return none();
}

octave_value_list cmd_model_is_finalized(const call &c) {
  return one(kl_model_is_finalized(c.model(0, access::read).model) != 0);
}

template <int (*get)(const kl_model *)>
octave_value_list cmd_model_count(const call &c) {
  int st = get(c.model(0, access::read).model);
  c.quiet(st, "model " + str(c.integer(0, "model id")) +
                  (st == KL_ESTATE ? " is not finalized" : ""));
  return one(st);
}

octave_value_list cmd_model_loop(const call &c) {
  const kl_model *m = c.model(0, access::read).model;
  int loop = c.integer(1, "loop");
  int n = kl_model_loop(m, loop, nullptr, 0);
  c.quiet(n, "loop " + str(loop));
  std::vector<int> joints(n > 0 ? n : 1);
  kl_model_loop(m, loop, joints.data(), n);
  RowVector out(n);
  for (int k = 0; k < n; k++)
    out(k) = joints[k];
  return one(out);
}

octave_value_list cmd_model_scale(const call &c) {
  return one(kl_model_scale(c.model(0, access::read).model));
}

octave_value_list cmd_set_joint_name(const call &c) {
  entry &m = c.model(0);
  std::string name;
  if (!c.name_arg(2, "name", name))
    c.bad("name must be given");
  model_status(kl_model_set_joint_name(m.model, c.integer(1, "joint"), name.c_str()),
               m);
  return none();
}

/* Unit names are the library's own (kl_length_unit_str): a name is looked
 * up among the codes the header defines. */
int length_unit_arg(const call &c, int i) {
  if (!c.arg(i).is_string())
    return c.integer(i, "length unit");
  std::string s = c.text(i, "length unit");
  for (int u = KL_LENGTH_UNSTATED; u <= KL_LENGTH_IN; u++)
    if (s == kl_length_unit_str(u))
      return u;
  c.bad("length unit '" + s + "' is not one kinloop knows");
}

int angle_unit_arg(const call &c, int i) {
  if (!c.arg(i).is_string())
    return c.integer(i, "angle unit");
  std::string s = c.text(i, "angle unit");
  for (int u = KL_ANGLE_RAD; u <= KL_ANGLE_DEG; u++)
    if (s == kl_angle_unit_str(u))
      return u;
  c.bad("angle unit '" + s + "' is not one kinloop knows");
}

octave_value_list cmd_model_set_units(const call &c) {
  entry &m = c.model(0);
  model_status(
      kl_model_set_units(m.model, length_unit_arg(c, 1), angle_unit_arg(c, 2)),
      m);
  return none();
}

octave_value_list cmd_model_units(const call &c) {
  int length = 0, angle = 0;
  c.quiet(kl_model_units(c.model(0, access::read).model, &length, &angle),
          "units");
  octave_value_list out;
  out(0) = length;
  out(1) = angle;
  return out;
}

octave_value_list cmd_length_unit_str(const call &c) {
  return one(std::string(kl_length_unit_str(c.integer(0, "length unit"))));
}

octave_value_list cmd_angle_unit_str(const call &c) {
  return one(std::string(kl_angle_unit_str(c.integer(0, "angle unit"))));
}

octave_value_list cmd_set_sketch_angle(const call &c) {
  entry &m = c.model(0);
  model_status(
      kl_model_set_sketch_angle(m.model, c.integer(1, "link"), c.real(2, "angle")),
      m);
  return none();
}

octave_value_list cmd_set_sketch_slide(const call &c) {
  entry &m = c.model(0);
  model_status(
      kl_model_set_sketch_slide(m.model, c.integer(1, "joint"), c.real(2, "slide")),
      m);
  return none();
}

octave_value_list cmd_sketch_angle(const call &c) {
  const kl_model *m = c.model(0, access::read).model;
  return one(
      each_id(c, 1, "links", [m](int id) { return kl_model_sketch_angle(m, id); }));
}

octave_value_list cmd_sketch_slide(const call &c) {
  const kl_model *m = c.model(0, access::read).model;
  return one(
      each_id(c, 1, "joints", [m](int id) { return kl_model_sketch_slide(m, id); }));
}

octave_value_list cmd_model_set_sweep(const call &c) {
  entry &m = c.model(0);
  octave_map s = struct_arg(c, 1, "sweep settings");
  if (s.numel() != 1)
    c.bad("sweep settings must be one struct (input, from, to, steps)");
  only_fields(c, s, "sweep settings", {"input", "from", "to", "steps"});
  if (!s.isfield("input") || !s.isfield("from") || !s.isfield("to") ||
      !s.isfield("steps"))
    c.bad("sweep settings need the fields input, from, to and steps");
  kl_sweep_settings w;
  w.size = sizeof w;
  w.input = field_int(c, field(s, 0, "input"), "sweep input", -1);
  w.from = field_real(c, field(s, 0, "from"), "sweep from", 0.0);
  w.to = field_real(c, field(s, 0, "to"), "sweep to", 0.0);
  w.steps = field_int(c, field(s, 0, "steps"), "sweep steps", 0);
  model_status(kl_model_set_sweep(m.model, &w), m);
  return none();
}

/* The recorded sweep settings, or [] when the model has none. */
octave_value_list cmd_model_sweep(const call &c) {
  kl_sweep_settings w;
  w.size = sizeof w;
  int st = kl_model_sweep(c.model(0, access::read).model, &w);
  if (st == KL_EID)
    return one(Matrix());
  c.quiet(st, "sweep settings");
  octave_scalar_map out;
  out.assign("input", w.input);
  out.assign("from", w.from);
  out.assign("to", w.to);
  out.assign("steps", w.steps);
  return one(out);
}

/* A name, or [] where the library has none (NULL). */
octave_value name_value(const char *name) {
  return name == nullptr ? octave_value(Matrix()) : octave_value(name);
}

template <const char *(*get)(const kl_model *, int)>
octave_value_list cmd_name_of(const call &c) {
  return one(
      name_value(get(c.model(0, access::read).model, c.integer(1, "id"))));
}

template <int (*find)(const kl_model *, const char *)>
octave_value_list cmd_find(const call &c) {
  std::string name = c.text(1, "name");
  int st = find(c.model(0, access::read).model, name.c_str());
  c.quiet(st, "no such name: '" + name + "'");
  return one(st);
}

octave_value_list cmd_point_link(const call &c) {
  int point = c.integer(1, "point");
  double xy[2];
  int st = kl_model_point_link(c.model(0, access::read).model, point, xy);
  c.quiet(st, "point " + str(point));
  octave_value_list out;
  out(0) = st;
  out(1) = row(xy, 2);
  return out;
}

octave_value_list cmd_joint_kind(const call &c) {
  int joint = c.integer(1, "joint");
  int st = kl_model_joint_kind(c.model(0, access::read).model, joint);
  c.quiet(st, "joint " + str(joint));
  octave_value_list out;
  out(0) = st == KL_JOINT_REVOLUTE    ? "revolute"
           : st == KL_JOINT_PRISMATIC ? "prismatic"
                                : "slot";
  out(1) = st;
  return out;
}

octave_value_list cmd_joint_links(const call &c) {
  int joint = c.integer(1, "joint"), links[2];
  double a[2], b[2], ids[2];
  int st = kl_model_joint_links(c.model(0, access::read).model, joint, links, a, b);
  c.quiet(st, "joint " + str(joint));
  ids[0] = links[0];
  ids[1] = links[1];
  octave_value_list out;
  out(0) = row(ids, 2);
  out(1) = row(a, 2);
  out(2) = row(b, 2);
  return out;
}

octave_value_list cmd_joint_axis(const call &c) {
  return one(
      kl_model_joint_axis(c.model(0, access::read).model, c.integer(1, "joint")));
}

octave_value_list cmd_input_joint(const call &c) {
  int input = c.integer(1, "input");
  int st = kl_model_input_joint(c.model(0, access::read).model, input);
  c.quiet(st, "input " + str(input));
  return one(st);
}

octave_value_list grashof_value(const call &c, int cls,
                                const std::string &about) {
  c.quiet(cls, about);
  octave_value_list out;
  out(0) = cls;
  out(1) = std::string(kl_grashof_str(cls));
  return out;
}

octave_value_list cmd_model_grashof(const call &c) {
  int id = c.integer(0, "model id");
  return grashof_value(c, kl_model_grashof(c.model(0, access::read).model),
                       "model " + str(id) +
                           " must be a finalized plain four-bar driven at a "
                           "ground pivot");
}

octave_value_list cmd_grashof(const call &c) {
  double g = c.real(0, "ground"), i = c.real(1, "input"),
         k = c.real(2, "coupler"), o = c.real(3, "output");
  return grashof_value(c, kl_grashof(g, i, k, o),
                       "lengths " + str(g) + ", " + str(i) + ", " + str(k) +
                           ", " + str(o) + " must be finite and positive");
}

octave_value_list cmd_grashof_str(const call &c) {
  return one(std::string(kl_grashof_str(c.integer(0, "class"))));
}

octave_value_list cmd_model_loop_fourbar(const call &c) {
  int loop = c.integer(1, "loop");
  kl_fourbar fb;
  std::memset(&fb, 0, sizeof fb);
  fb.size = sizeof fb;
  c.quiet(kl_model_loop_fourbar(c.model(0, access::read).model, loop, &fb),
          "loop " + str(loop) + " must be a four-bar driven at a ground pivot");
  octave_scalar_map st;
  st.assign("loop", fb.loop);
  st.assign("input", fb.input);
  st.assign("input_joint", fb.input_joint);
  st.assign("output_joint", fb.output_joint);
  st.assign("input_link", fb.input_link);
  st.assign("coupler_link", fb.coupler_link);
  st.assign("output_link", fb.output_link);
  st.assign("ground_length", fb.ground_length);
  st.assign("input_length", fb.input_length);
  st.assign("coupler_length", fb.coupler_length);
  st.assign("output_length", fb.output_length);
  st.assign("grashof", fb.grashof);
  st.assign("grashof_name", std::string(kl_grashof_str(fb.grashof)));
  return one(st);
}

/* The sites as output structs (kind, id, line_a, line_b), for output_value
 * and output_range. */
octave_value_list cmd_model_transmissions(const call &c) {
  const kl_model *m = c.model(0, access::read).model;
  int n = kl_model_transmissions(m, nullptr, 0);
  c.quiet(n, "the model must be finalized");
  std::vector<kl_output> sites(n > 0 ? n : 1);
  kl_model_transmissions(m, sites.data(), n);
  octave_map out(dim_vector(1, n));
  Cell kinds(1, n), ids(1, n), as(1, n), bs(1, n);
  for (int k = 0; k < n; k++) {
    kinds(k) = std::string("transmission");
    ids(k) = sites[k].id;
    as(k) = sites[k].line_a;
    bs(k) = sites[k].line_b;
  }
  out.setfield("kind", kinds);
  out.setfield("id", ids);
  out.setfield("line_a", as);
  out.setfield("line_b", bs);
  return one(out);
}

octave_value_list cmd_model_transmission_skips(const call &c) {
  const kl_model *m = c.model(0, access::read).model;
  int n = kl_model_transmission_skips(m, nullptr, 0);
  c.quiet(n, "the model must be finalized");
  std::vector<kl_transmission_skip> skips(n > 0 ? n : 1);
  kl_model_transmission_skips(m, skips.data(), n);
  octave_map out(dim_vector(1, n));
  Cell joints(1, n), loops(1, n), links(1, n), reasons(1, n);
  for (int k = 0; k < n; k++) {
    joints(k) = skips[k].joint;
    loops(k) = skips[k].loop;
    links(k) = skips[k].link;
    reasons(k) = std::string(skips[k].reason == KL_TRANSMISSION_SKIP_INPUT_CRANK
                                 ? "input_crank"
                                 : "no_line");
  }
  out.setfield("joint", joints);
  out.setfield("loop", loops);
  out.setfield("link", links);
  out.setfield("reason", reasons);
  return one(out);
}

octave_value_list cmd_model_start_inputs(const call &c) {
  const kl_model *m = c.model(0, access::read).model;
  int n = kl_model_input_count(m);
  std::vector<double> u(n > 0 ? n : 1);
  c.quiet(kl_model_start_inputs(m, u.data()), "start inputs");
  return one(row(u.data(), n));
}

octave_value_list cmd_quantity_str(const call &c) {
  const char *name = kl_quantity_str(c.integer(0, "quantity"));
  return one(name != nullptr ? octave_value(std::string(name)) : Matrix());
}

octave_value_list cmd_model_row_offset(const call &c) {
  int q = c.integer(1, "quantity"), count = 0;
  int offset =
      kl_model_row_offset(c.model(0, access::read).model, q, &count);
  c.quiet(offset, "quantity " + str(q));
  octave_value_list out;
  out(0) = offset;
  out(1) = count;
  return out;
}

/* ---- model files ---- */

/* A model or study read, or the reason it was not: raised, or with two
 * outputs returned as ([], error struct). */
template <typename T>
octave_value_list read_result(const call &c, T *made, int (*adopt)(T *),
                              const kl_io_error &e) {
  octave_value_list out;
  if (made == nullptr) {
    if (c.nargout < 2)
      raise_status(e.status, io_message(e).c_str());
    out(0) = Matrix();
    out(1) = io_error_struct(e);
    return out;
  }
  out(0) = adopt(made);
  out(1) = io_error_struct(e);
  return out;
}

std::string text_arg(const call &c, int i) {
  const octave_value &v = c.arg(i);
  if (!v.is_string() || (v.rows() > 1 && !v.isempty()))
    c.bad("text must be a character row vector");
  return v.string_value();
}

octave_value_list cmd_model_read(const call &c) {
  std::string text = text_arg(c, 0);
  kl_io_error e;
  e.size = sizeof e;
  kl_model *m = kl_model_read(text.data(), text.size(), &e);
  return read_result(c, m, adopt_model, e);
}

octave_value_list cmd_model_read_with_alloc(const call &c) {
  std::string text = text_arg(c, 0);
  int id = static_cast<int>(table().made.size());
  counting_alloc &a = new_alloc_record(c, 1, id);
  kl_io_error e;
  e.size = sizeof e;
  kl_model *m = kl_model_read_with_alloc(text.data(), text.size(),
                                         counting_alloc_fn, &a, &e);
  if (m == nullptr)
    table().allocs.erase(id);
  return read_result(c, m, adopt_model, e);
}

octave_value_list cmd_model_read_file(const call &c) {
  std::string path;
  if (!c.name_arg(0, "path", path))
    c.bad("path must be given");
  kl_io_error e;
  e.size = sizeof e;
  kl_model *m = kl_model_read_file(path.c_str(), &e);
  return read_result(c, m, adopt_model, e);
}

octave_value_list cmd_model_write(const call &c) {
  const kl_model *m = c.model(0, access::read).model;
  size_t needed = 0;
  (void)kl_model_write(m, nullptr, 0,
                       &needed); /* sizing: too small by design */
  std::string text(needed + 1, '\0');
  c.quiet(kl_model_write(m, &text[0], text.size(), &needed),
          "model could not be written");
  text.resize(needed);
  return one(text);
}

octave_value_list cmd_model_write_file(const call &c) {
  const kl_model *m = c.model(0, access::read).model;
  std::string path;
  if (!c.name_arg(1, "path", path))
    c.bad("path must be given");
  kl_io_error e;
  e.size = sizeof e;
  if (kl_model_write_file(m, path.c_str(), &e) != KL_OK)
    raise_status(e.status, io_message(e).c_str());
  return none();
}

/* ---- allocation records of models made with the counting allocator ---- */

counting_alloc &alloc_record(const call &c) {
  int id = c.integer(0, "model id");
  auto it = table().allocs.find(id);
  if (it == table().allocs.end())
    raise("bad_handle", c.name + ": model " + str(id) +
                            " was not made with model_new_with_alloc or "
                            "model_read_with_alloc");
  return it->second;
}

octave_value_list cmd_allocations(const call &c) {
  const counting_alloc &a = alloc_record(c);
  octave_scalar_map st;
  st.assign("calls", static_cast<double>(a.calls));
  st.assign("live", static_cast<double>(a.live));
  st.assign("live_bytes", static_cast<double>(a.live_bytes));
  st.assign("fail_at", static_cast<double>(a.fail_at));
  st.assign("failed", static_cast<double>(a.failed));
  return one(st);
}

octave_value_list cmd_set_fail_at(const call &c) {
  counting_alloc &a = alloc_record(c);
  int n = c.integer(1, "fail_at");
  if (n < 0)
    c.bad("fail_at must be 0 (never) or the 1-based allocation to refuse");
  a.fail_at = n;
  return none();
}

/* ------------------------------------------------------------------------
 * Commands: solvers
 * ------------------------------------------------------------------------ */

octave_value_list cmd_options_default(const call &) {
  kl_options o;
  kl_options_default(&o);
  return one(options_struct(o));
}

/* The same defaults, filled only as far as this gateway's struct reaches. */
octave_value_list cmd_options_init(const call &) {
  kl_options o;
  kl_options_init(&o, sizeof o);
  return one(options_struct(o));
}

/* kl_solver_new gives NULL without a message: say which cause it was. */
[[noreturn]] void solver_new_failed(const call &c, const entry &m, int id) {
  if (!kl_model_is_finalized(m.model))
    raise_status(KL_ESTATE, (c.name + ": model " + str(id) +
                             " is not finalized; finalize it first")
                                .c_str());
  raise_status(KL_ENOMEM, (c.name + ": out of memory").c_str());
}

int adopt_solver(entry &m, int model_id, kl_solver *s, void *block) {
  entry e;
  e.model = m.model;
  e.solver = s;
  e.model_id = model_id;
  e.block = block;
  m.live_solvers++;
  return new_id(kind::solver, e);
}

octave_value_list cmd_solver_new(const call &c) {
  entry &m = c.model(0, access::read);
  int id = c.integer(0, "model id");
  kl_solver *s = kl_solver_new(m.model);
  if (s == nullptr)
    solver_new_failed(c, m, id);
  return one(adopt_solver(m, id, s, nullptr));
}

octave_value_list cmd_solver_bytes(const call &c) {
  return one(
      static_cast<double>(kl_solver_bytes(c.model(0, access::read).model)));
}

/* A solver placed in a block the gateway allocates (malloc's alignment, as
 * kl_solver_new_in asks) and frees after kl_solver_free. */
octave_value_list cmd_solver_new_in(const call &c) {
  entry &m = c.model(0, access::read);
  int id = c.integer(0, "model id");
  size_t size = kl_solver_bytes(m.model);
  if (size == 0)
    solver_new_failed(c, m, id);
  void *block = std::malloc(size);
  if (block == nullptr)
    solver_new_failed(c, m, id);
  kl_solver *s = kl_solver_new_in(m.model, block, size);
  if (s == nullptr) {
    std::free(block);
    solver_new_failed(c, m, id);
  }
  return one(adopt_solver(m, id, s, block));
}

octave_value_list cmd_solver_free(const call &c) {
  entry &s = c.solver(0);
  int id = c.integer(0, "solver id");
  kl_solver_free(s.solver);
  std::free(s.block);
  auto m = table().live.find(s.model_id);
  if (m != table().live.end())
    m->second.live_solvers--;
  table().live.erase(id);
  return none();
}

octave_value_list cmd_solver_model(const call &c) {
  return one(c.solver(0, access::read).model_id);
}

octave_value_list cmd_solver_error(const call &c) {
  return one(std::string(kl_solver_error(c.solver(0, access::read).solver)));
}

/* Options given as a struct change those fields of the current options. */
octave_value_list cmd_solver_set_options(const call &c) {
  entry &s = c.solver(0);
  octave_map m = struct_arg(c, 1, "options");
  if (m.numel() != 1)
    c.bad("options must be one struct");
  only_fields(c, m, "options",
              {"tolerance", "step_tolerance", "max_iterations",
               "max_backtracks", "max_step", "singular_rcond", "kernel"});
  kl_options o;
  kl_options_default(&o);
  solver_status(kl_solver_options(s.solver, &o), s);
  o.tolerance =
      field_real(c, field(m, 0, "tolerance"), "tolerance", o.tolerance);
  o.step_tolerance = field_real(c, field(m, 0, "step_tolerance"),
                                "step_tolerance", o.step_tolerance);
  o.max_iterations = field_int(c, field(m, 0, "max_iterations"),
                               "max_iterations", o.max_iterations);
  o.max_backtracks = field_int(c, field(m, 0, "max_backtracks"),
                               "max_backtracks", o.max_backtracks);
  o.max_step = field_real(c, field(m, 0, "max_step"), "max_step", o.max_step);
  o.singular_rcond = field_real(c, field(m, 0, "singular_rcond"),
                                "singular_rcond", o.singular_rcond);
  o.kernel = kernel_arg(c, field(m, 0, "kernel"), o.kernel);
  solver_status(kl_solver_set_options(s.solver, &o), s);
  return none();
}

octave_value_list cmd_solver_get_options(const call &c) {
  entry &s = c.solver(0, access::read);
  kl_options o;
  kl_options_default(&o);
  c.quiet(kl_solver_options(s.solver, &o), "options");
  return one(options_struct(o));
}

octave_value_list cmd_set_link_angle(const call &c) {
  entry &s = c.solver(0);
  solver_status(
      kl_set_link_angle(s.solver, c.integer(1, "link"), c.real(2, "angle")), s);
  return none();
}

octave_value_list cmd_set_joint_slide(const call &c) {
  entry &s = c.solver(0);
  solver_status(
      kl_set_joint_slide(s.solver, c.integer(1, "joint"), c.real(2, "slide")),
      s);
  return none();
}

template <int (*stage)(kl_solver *, const double *)>
octave_value_list cmd_stage(const call &c) {
  entry &s = c.solver(0);
  int n = kl_model_input_count(s.model);
  const char *what = c.name == "solve_position"   ? "inputs"
                     : c.name == "solve_velocity" ? "input rates"
                                                  : "input accelerations";
  std::vector<double> u = c.values(1, n, what);
  solver_status(stage(s.solver, n > 0 ? u.data() : nullptr), s);
  return none();
}

octave_value_list cmd_solver_stats(const call &c) {
  kl_solve_stats st;
  st.size = sizeof st;
  c.quiet(kl_solver_stats(c.solver(0, access::read).solver, &st), "stats");
  octave_scalar_map out;
  out.assign("status", st.status);
  out.assign("status_name", status_name(st.status));
  out.assign("iterations", st.iterations);
  out.assign("residual_evaluations", st.residual_evaluations);
  out.assign("factorizations", st.factorizations);
  out.assign("backtracks", st.backtracks);
  out.assign("residual", st.residual);
  out.assign("step", st.step);
  out.assign("rcond", st.rcond);
  out.assign("kernel", kernel_value(st.kernel));
  return one(out);
}

template <double (*get)(const kl_solver *, int)>
octave_value_list cmd_solver_values(const call &c) {
  const kl_solver *s = c.solver(0, access::read).solver;
  return one(each_id(c, 1, "ids", [s](int id) { return get(s, id); }));
}

template <int (*get)(const kl_solver *, int, double *)>
octave_value_list cmd_solver_points(const call &c) {
  const kl_solver *s = c.solver(0, access::read).solver;
  return one(rows_of(c, 1, "ids", 2, [&c, s](int id, double *xy) {
    c.quiet(get(s, id, xy), "id " + str(id));
  }));
}

octave_value_list cmd_solve_coefficients(const call &c) {
  entry &s = c.solver(0);
  solver_status(kl_solve_coefficients(s.solver), s);
  return none();
}

template <double (*get)(const kl_solver *, int, int)>
octave_value_list cmd_deriv(const call &c) {
  const kl_solver *s = c.solver(0, access::read).solver;
  int input = c.integer(2, "input");
  return one(
      each_id(c, 1, "ids", [s, input](int id) { return get(s, id, input); }));
}

template <double (*get)(const kl_solver *, int, int, int)>
octave_value_list cmd_deriv2(const call &c) {
  const kl_solver *s = c.solver(0, access::read).solver;
  int i = c.integer(2, "input i"), j = c.integer(3, "input j");
  return one(
      each_id(c, 1, "ids", [s, i, j](int id) { return get(s, id, i, j); }));
}

octave_value_list cmd_point_deriv(const call &c) {
  const kl_solver *s = c.solver(0, access::read).solver;
  int input = c.integer(2, "input");
  return one(rows_of(c, 1, "points", 2, [&c, s, input](int id, double *xy) {
    c.quiet(kl_point_deriv(s, id, input, xy),
            "point " + str(id) + ", input " + str(input));
  }));
}

octave_value_list cmd_point_deriv2(const call &c) {
  const kl_solver *s = c.solver(0, access::read).solver;
  int i = c.integer(2, "input i"), j = c.integer(3, "input j");
  return one(rows_of(c, 1, "points", 2, [&c, s, i, j](int id, double *xy) {
    c.quiet(kl_point_deriv2(s, id, i, j, xy),
            "point " + str(id) + ", inputs " + str(i) + " and " + str(j));
  }));
}

octave_value_list cmd_solver_copy_state(const call &c) {
  entry &to = c.solver(0);
  entry &from = c.solver(1, access::read);
  solver_status(kl_solver_copy_state(to.solver, from.solver), to);
  return none();
}

octave_value_list cmd_find_assemblies(const call &c) {
  entry &s = c.solver(0);
  int n = kl_model_input_count(s.model);
  std::vector<double> u = c.values(1, n, "inputs");
  std::vector<kl_solver *> modes;
  if (c.given(2)) {
    std::vector<int> ids = c.integers(2, "mode solver ids");
    for (size_t k = 0; k < ids.size(); k++) {
      auto it = table().live.find(ids[k]);
      if (it == table().live.end() || it->second.what != kind::solver)
        raise("bad_handle", c.name + ": mode " + str(static_cast<int>(k + 1)) +
                                " (id " + str(ids[k]) +
                                ") is not a live solver");
      if (it->second.sweeping)
        raise("in_use",
              c.name + ": solver " + str(ids[k]) + " is running a sweep");
      modes.push_back(it->second.solver);
    }
  }
  int found = kl_solver_find_assemblies(s.solver, n > 0 ? u.data() : nullptr,
                                 modes.empty() ? nullptr : modes.data(),
                                 static_cast<int>(modes.size()));
  solver_status(found, s);
  return one(found);
}

/* ---- sweeps ---- */

/* What a sweep records: one row per delivered step, in matrices sized for
 * every step before the sweep starts. */
struct recorder {
  const kl_model *model;
  int nlinks, njoints, npoints, rows = 0;
  ColumnVector input;
  Matrix angle, rate, accel, slide, slide_rate, slide_accel, joint_angle;
  Matrix px, py, vx, vy, ax, ay;
  octave_value callback;
  int solver_id;
  octave::interpreter *interp;
  std::exception_ptr failure;

  recorder(const kl_model *m, int steps)
      : model(m), nlinks(kl_model_link_count(m)),
        njoints(kl_model_joint_count(m)), npoints(kl_model_point_count(m)) {
    octave_idx_type n =
        steps >= 1 ? static_cast<octave_idx_type>(steps) + 1 : 0;
    input.resize(n);
    for (Matrix *x : {&angle, &rate, &accel})
      x->resize(n, nlinks);
    for (Matrix *x : {&slide, &slide_rate, &slide_accel, &joint_angle})
      x->resize(n, njoints);
    for (Matrix *x : {&px, &py, &vx, &vy, &ax, &ay})
      x->resize(n, npoints);
  }

  void record(const kl_solver *s, double u) {
    int k = rows++;
    double xy[2];
    input(k) = u;
    for (int l = 0; l < nlinks; l++) {
      angle(k, l) = kl_link_angle(s, l);
      rate(k, l) = kl_link_rate(s, l);
      accel(k, l) = kl_link_accel(s, l);
    }
    for (int j = 0; j < njoints; j++) {
      slide(k, j) = kl_joint_slide(s, j);
      slide_rate(k, j) = kl_joint_slide_rate(s, j);
      slide_accel(k, j) = kl_joint_slide_accel(s, j);
      joint_angle(k, j) = kl_joint_angle(s, j);
    }
    for (int p = 0; p < npoints; p++) {
      bool ok = kl_point_position(s, p, xy) == KL_OK;
      px(k, p) = ok ? xy[0] : NAN;
      py(k, p) = ok ? xy[1] : NAN;
      ok = kl_point_velocity(s, p, xy) == KL_OK;
      vx(k, p) = ok ? xy[0] : NAN;
      vy(k, p) = ok ? xy[1] : NAN;
      ok = kl_point_acceleration(s, p, xy) == KL_OK;
      ax(k, p) = ok ? xy[0] : NAN;
      ay(k, p) = ok ? xy[1] : NAN;
    }
  }

  /* Octave errors are C++ exceptions: none may cross the C library's
   * frames, so a failing callback stops the sweep and is rethrown after. */
  int notify(int step, double u) {
    if (callback.is_undefined())
      return 0;
    try {
      octave_value_list args;
      args(0) = solver_id;
      args(1) = step;
      args(2) = u;
      octave_value_list r = interp->feval(callback, args, 0);
      return r.length() > 0 && r(0).is_defined() && r(0).is_true() ? 1 : 0;
    } catch (...) {
      failure = std::current_exception();
      return 1;
    }
  }

  octave_scalar_map result() {
    octave_scalar_map out;
    input.resize(rows);
    out.assign("input", input);
    const char *names[] = {
        "link_angle",       "link_rate",         "link_accel",  "joint_slide",
        "joint_slide_rate", "joint_slide_accel", "joint_angle", "point_x",
        "point_y",          "point_vx",          "point_vy",    "point_ax",
        "point_ay"};
    Matrix *parts[] = {&angle,       &rate,        &accel, &slide, &slide_rate,
                       &slide_accel, &joint_angle, &px,    &py,    &vx,
                       &vy,          &ax,          &ay};
    for (size_t k = 0; k < sizeof names / sizeof names[0]; k++) {
      parts[k]->resize(rows, parts[k]->columns());
      out.assign(names[k], *parts[k]);
    }
    return out;
  }
};

extern "C" int record_step(const kl_solver *s, int step, double input,
                           void *user) {
  recorder *r = static_cast<recorder *>(user);
  r->record(s, input);
  return r->notify(step, input);
}

/* Marks a solver as sweeping for the duration of one kl_solver_sweep. */
struct sweeping_guard {
  entry &e;
  explicit sweeping_guard(entry &e) : e(e) { e.sweeping = true; }
  ~sweeping_guard() { e.sweeping = false; }
};

octave_value_list cmd_sweep(const call &c) {
  entry &s = c.solver(0);
  int input = c.integer(1, "input");
  double from = c.real(2, "from"), to = c.real(3, "to");
  int steps = c.integer(4, "steps");
  recorder rec(s.model, steps);
  rec.solver_id = c.integer(0, "solver id");
  rec.interp = &c.interp;
  if (c.given(5)) {
    if (!c.arg(5).is_function_handle())
      c.bad("callback must be a function handle f(solver_id, step, input)");
    rec.callback = c.arg(5);
  }
  kl_sweep_result res;
  res.size = sizeof res;
  int st;
  {
    sweeping_guard guard(s);
    st = kl_solver_sweep(s.solver, input, from, to, steps, record_step, &rec, &res);
  }
  if (rec.failure)
    std::rethrow_exception(rec.failure);
  /* a sweep that delivered nothing has no result to give */
  if (st < 0 && res.steps_done == 0)
    solver_status(st, s);
  octave_scalar_map out = rec.result();
  out.assign("status", st);
  out.assign("status_name", status_name(st));
  out.assign("message", st == KL_OK ? std::string()
                        : st == KL_STOPPED
                            ? std::string(kl_status_str(st))
                            : std::string(kl_solver_error(s.solver)));
  out.assign("limit_input", res.limit_input);
  out.assign("steps_done", res.steps_done);
  out.assign("substeps", res.substeps);
  return one(out);
}

/* ---- going to a position, frames, rows ---- */

octave_value_list cmd_solver_reset(const call &c) {
  entry &s = c.solver(0);
  solver_status(kl_solver_reset(s.solver), s);
  return none();
}

octave_value_list cmd_solver_reach(const call &c) {
  entry &s = c.solver(0);
  int n = kl_model_input_count(s.model);
  std::vector<double> u = c.values(1, n, "inputs");
  kl_reach_result r;
  r.size = sizeof r;
  solver_status(kl_solver_reach(s.solver, n > 0 ? u.data() : nullptr, &r), s);
  return one(r.substeps);
}

octave_value_list cmd_link_to_global(const call &c) {
  const kl_solver *s = c.solver(0, access::read).solver;
  int link = c.integer(1, "link");
  std::vector<double> local = c.values(2, 2, "local point [x y]");
  double xy[2];
  c.quiet(kl_link_to_global(s, link, local.data(), xy), "link " + str(link));
  return one(row(xy, 2));
}

octave_value_list cmd_solver_row(const call &c) {
  entry &s = c.solver(0, access::read);
  int n = kl_model_row_size(s.model);
  std::vector<double> v(n > 0 ? n : 1);
  c.quiet(kl_solver_row(s.solver, v.data()), "row");
  return one(row(v.data(), n));
}

/* One row per step, the rows after a stop NaN; and the outcome. */
octave_value_list cmd_solver_sweep_rows(const call &c) {
  entry &s = c.solver(0);
  int input = c.integer(1, "input");
  double from = c.real(2, "from"), to = c.real(3, "to");
  int steps = c.integer(4, "steps");
  int n = kl_model_row_size(s.model);
  if (steps < 1 || steps > 100000000)
    c.bad("steps must be from 1 to 1e8");
  std::vector<double> rows((static_cast<size_t>(steps) + 1) * n);
  kl_sweep_result res;
  res.size = sizeof res;
  int st = kl_solver_sweep_rows(s.solver, input, from, to, steps, rows.data(),
                                &res);
  if (st < 0 && res.steps_done == 0)
    solver_status(st, s);
  Matrix out(steps + 1, n);
  for (int k = 0; k <= steps; k++)
    for (int q = 0; q < n; q++)
      out(k, q) = rows[static_cast<size_t>(k) * n + q];
  octave_scalar_map result;
  result.assign("status", st);
  result.assign("status_name", status_name(st));
  result.assign("message", st == KL_OK ? std::string()
                                       : std::string(kl_solver_error(s.solver)));
  result.assign("limit_input", res.limit_input);
  result.assign("steps_done", res.steps_done);
  result.assign("substeps", res.substeps);
  octave_value_list outs;
  outs(0) = out;
  outs(1) = result;
  return outs;
}

/* ---- design figures ---- */

octave_value_list cmd_output_value(const call &c) {
  const kl_solver *s = c.solver(0, access::read).solver;
  kl_output o = output_arg(c, 1);
  double v = NAN;
  c.quiet(kl_output_value(s, &o, &v),
          "output kind " + str(o.kind) + ", id " + str(o.id) + ", lines " +
              str(o.line_a) + " and " + str(o.line_b));
  return one(v);
}

template <int (*get)(kl_solver *, const kl_output *, int, double *)>
octave_value_list cmd_output_per_input(const call &c) {
  entry &s = c.solver(0);
  kl_output o = output_arg(c, 1);
  double v = NAN;
  solver_status(get(s.solver, &o, c.integer(2, "input"), &v), s);
  return one(v);
}

octave_value_list cmd_output_range(const call &c) {
  entry &s = c.solver(0);
  int input = c.integer(1, "input");
  double from = c.real(2, "from"), to = c.real(3, "to");
  int steps = c.integer(4, "steps");
  kl_output o = output_arg(c, 5);
  kl_range r;
  std::memset(&r, 0, sizeof r);
  r.size = sizeof r;
  solver_status(kl_output_range(s.solver, input, from, to, steps, &o, &r), s);
  return one(range_struct(r));
}

octave_value_list cmd_time_ratio(const call &c) {
  octave_map m = struct_arg(c, 0, "range");
  if (m.numel() != 1 || !m.isfield("input_at_min") ||
      !m.isfield("input_at_max"))
    c.bad("range must be one struct with input_at_min and input_at_max "
          "(as output_range gives)");
  kl_range r;
  std::memset(&r, 0, sizeof r);
  r.size = sizeof r;
  r.input_at_min =
      field_real(c, field(m, 0, "input_at_min"), "input_at_min", NAN);
  r.input_at_max =
      field_real(c, field(m, 0, "input_at_max"), "input_at_max", NAN);
  double ratio = NAN;
  c.quiet(kl_range_time_ratio(&r, &ratio),
          "input_at_min " + str(r.input_at_min) + ", input_at_max " +
              str(r.input_at_max) + " must be finite and differ modulo 2 pi");
  return one(ratio);
}

octave_value_list cmd_input_effort(const call &c) {
  entry &s = c.solver(0);
  std::vector<kl_load> loads = loads_arg(c, 1);
  int n = kl_model_input_count(s.model);
  std::vector<double> efforts(n > 0 ? n : 1);
  solver_status(kl_input_effort(s.solver, static_cast<int>(loads.size()),
                                loads.empty() ? nullptr : loads.data(),
                                efforts.data()),
                s);
  return one(row(efforts.data(), n));
}

octave_value_list cmd_input_effort_range(const call &c) {
  entry &s = c.solver(0);
  int input = c.integer(1, "input");
  double from = c.real(2, "from"), to = c.real(3, "to");
  int steps = c.integer(4, "steps");
  std::vector<kl_load> loads = loads_arg(c, 5);
  int effort_input = c.integer(6, "effort input");
  kl_range r;
  std::memset(&r, 0, sizeof r);
  r.size = sizeof r;
  solver_status(kl_input_effort_range(s.solver, input, from, to, steps,
                                      static_cast<int>(loads.size()),
                                      loads.empty() ? nullptr : loads.data(),
                                      effort_input, &r),
                s);
  return one(range_struct(r));
}

octave_value_list cmd_output_sensitivity(const call &c) {
  entry &s = c.solver(0);
  kl_output o = output_arg(c, 1);
  std::vector<kl_dimension> dims = dimensions_arg(c, 2);
  if (dims.size() != 1)
    c.bad("output_sensitivity takes one dimension");
  double d = NAN;
  solver_status(kl_output_sensitivity(s.solver, &o, &dims[0], &d), s);
  return one(d);
}

octave_value_list cmd_tolerance_stack(const call &c) {
  entry &s = c.solver(0);
  kl_output o = output_arg(c, 1);
  std::vector<kl_dimension> dims = dimensions_arg(c, 2);
  std::vector<double> tol = c.values(3, static_cast<int>(dims.size()),
                                     "tolerances (one per dimension)");
  double worst = NAN, rss = NAN;
  solver_status(kl_output_tolerance_stack(s.solver, &o, static_cast<int>(dims.size()),
                                   dims.empty() ? nullptr : dims.data(),
                                   tol.empty() ? nullptr : tol.data(), &worst,
                                   &rss),
                s);
  octave_value_list out;
  out(0) = worst;
  out(1) = rss;
  return out;
}

/* ------------------------------------------------------------------------
 * Commands: design studies
 * ------------------------------------------------------------------------ */

int adopt_study(kl_study *st) {
  entry e;
  e.study = st;
  return new_id(kind::study, e);
}

/* The library's study holds the model it is read against, whatever then
 * becomes of the model's handle here. */
octave_value_list cmd_study_read(const call &c) {
  std::string text = text_arg(c, 0);
  entry &m = c.model(1, access::read);
  kl_io_error e;
  e.size = sizeof e;
  kl_study *st = kl_study_read(text.data(), text.size(), m.model, &e);
  return read_result(c, st, adopt_study, e);
}

octave_value_list cmd_study_prepare(const call &c) {
  entry &st = c.study(0);
  int status = kl_study_prepare(st.study);
  if (status < 0)
    raise_status(status, kl_study_error(st.study));
  return none();
}

octave_value_list cmd_study_error(const call &c) {
  return one(std::string(kl_study_error(c.study(0).study)));
}

octave_value_list cmd_study_model_path(const call &c) {
  return one(name_value(kl_study_model_path(c.study(0).study)));
}

octave_value_list cmd_study_read_file(const call &c) {
  std::string path;
  if (!c.name_arg(0, "path", path))
    c.bad("path must be given");
  kl_io_error e;
  e.size = sizeof e;
  kl_study *st = kl_study_read_file(path.c_str(), &e);
  return read_result(c, st, adopt_study, e);
}

/* The study's borrowed model goes with it, which its solvers must not
 * outlive. */
octave_value_list cmd_study_free(const call &c) {
  entry &st = c.study(0);
  int id = c.integer(0, "study id");
  auto m = table().live.find(st.model_id);
  if (m != table().live.end()) {
    if (m->second.live_solvers > 0)
      raise("in_use", c.name + ": the model of study " + str(id) + " (model " +
                          str(st.model_id) + ") still has " +
                          str(m->second.live_solvers) + " solver" +
                          (m->second.live_solvers == 1 ? "" : "s") +
                          "; free them first");
    table().live.erase(m);
  }
  kl_study_free(st.study);
  table().live.erase(id);
  return none();
}

octave_value_list cmd_study_sample_count(const call &c) {
  return one(static_cast<double>(kl_study_sample_count(c.study(0).study)));
}

template <int (*get)(const kl_study *)>
octave_value_list cmd_study_count(const call &c) {
  return one(get(c.study(0).study));
}

template <const char *(*get)(const kl_study *, int)>
octave_value_list cmd_study_name_of(const call &c) {
  return one(name_value(get(c.study(0).study, c.integer(1, "index"))));
}

/* The study's model as a borrowed handle: one per study, made on the
 * first call, freed with the study. */
octave_value_list cmd_study_model(const call &c) {
  entry &st = c.study(0);
  if (st.model_id == 0) {
    entry e;
    /* writes through it are refused (entry::owner), so the const the
     * library gives is kept */
    e.model = const_cast<kl_model *>(kl_study_model(st.study));
    e.owner = c.integer(0, "study id");
    st.model_id = new_id(kind::model, e);
  }
  return one(st.model_id);
}

/* A row-major C array as a rows x columns matrix. */
Matrix from_rows(const std::vector<double> &v, long rows, int columns) {
  Matrix out(rows, columns);
  for (long i = 0; i < rows; i++)
    for (int k = 0; k < columns; k++)
      out(i, k) = v[static_cast<size_t>(i) * columns + k];
  return out;
}

octave_value_list cmd_study_run(const call &c) {
  const kl_study *st = c.study(0).study;
  long first = c.whole(1, "first sample"), count = c.whole(2, "count");
  int threads = c.given(3) ? c.integer(3, "threads") : 0;
  long total = kl_study_sample_count(st);
  int nout = kl_study_output_count(st), ndim = kl_study_dimension_count(st);
  bool want_dims = c.nargout >= 3;
  /* sized for a valid range; the library judges the range itself */
  long rows = count < 0 ? 0 : count > total ? total : count;
  std::vector<double> values(static_cast<size_t>(rows) * nout + 1);
  std::vector<double> dims(want_dims ? static_cast<size_t>(rows) * ndim + 1 : 0);
  std::vector<int> status(static_cast<size_t>(rows) + 1);
  c.quiet(kl_study_run(st, first, count, threads, values.data(), status.data(),
                       want_dims ? dims.data() : nullptr),
          "first " + std::to_string(first) + ", count " +
              std::to_string(count) + "; the study has samples 0 .. " +
              std::to_string(total - 1));
  octave_value_list out;
  out(0) = from_rows(values, rows, nout);
  ColumnVector codes(rows);
  for (long i = 0; i < rows; i++)
    codes(i) = status[i];
  out(1) = codes;
  if (want_dims)
    out(2) = from_rows(dims, rows, ndim);
  return out;
}

octave_value_list cmd_study_summarize(const call &c) {
  const kl_study *st = c.study(0).study;
  int k = c.integer(1, "output");
  int nout = kl_study_output_count(st);
  const octave_value &v = c.arg(2);
  if (!(v.isnumeric() || v.islogical()) || v.iscomplex() || v.ndims() != 2 ||
      (!v.isempty() && v.columns() != nout))
    c.bad("values must be a real matrix with one column per output (" +
          str(nout) + "), as study_run gives");
  Matrix values = v.matrix_value();
  long n = v.isempty() ? 0 : values.rows();
  std::vector<int> status = c.integers(3, "sample statuses");
  if (static_cast<long>(status.size()) != n)
    c.bad("sample statuses must have one element per row of values (" +
          std::to_string(n) + "); got " + str(static_cast<int>(status.size())));
  std::vector<double> rows(static_cast<size_t>(n) * nout + 1);
  for (long i = 0; i < n; i++)
    for (int j = 0; j < nout; j++)
      rows[static_cast<size_t>(i) * nout + j] = values(i, j);
  status.push_back(0); /* never empty: data() is not NULL */
  kl_study_summary s;
  s.size = sizeof s;
  c.quiet(kl_study_summarize(st, k, rows.data(), status.data(), n, &s),
          "output " + str(k) + " of " + str(nout));
  octave_scalar_map out;
  out.assign("samples", static_cast<double>(s.samples));
  out.assign("assembled", static_cast<double>(s.assembled));
  out.assign("within_limits", static_cast<double>(s.within_limits));
  out.assign("limited", static_cast<double>(s.limited));
  out.assign("nominal", s.nominal);
  out.assign("mean", s.mean);
  out.assign("std", s.std);
  out.assign("p01", s.p01);
  out.assign("p05", s.p05);
  out.assign("p50", s.p50);
  out.assign("p95", s.p95);
  out.assign("p99", s.p99);
  out.assign("min", s.min);
  out.assign("max", s.max);
  out.assign("worst", s.worst);
  out.assign("worst_sample", static_cast<double>(s.worst_sample));
  out.assign("first_order_std", s.first_order_std);
  out.assign("has_limits", s.has_limits != 0);
  out.assign("lower", s.lower);
  out.assign("upper", s.upper);
  return one(out);
}

/* ------------------------------------------------------------------------
 * Commands: the library and the gateway
 * ------------------------------------------------------------------------ */

octave_value_list cmd_version(const call &) {
  octave_value_list out;
  out(0) = std::string(kl_version());
  out(1) = std::string(KINLOOP_VERSION); /* the header compiled against */
  return out;
}

octave_value_list cmd_version_number(const call &) {
  return one(kl_version_number());
}

octave_value_list cmd_status_str(const call &c) {
  return one(std::string(kl_status_str(c.integer(0, "status"))));
}

octave_value_list cmd_status_name(const call &c) {
  return one(std::string(status_name(c.integer(0, "status"))));
}

/* Live ids and what each is, for leak checks. */
octave_value_list cmd_handles(const call &) {
  const registry &r = table();
  RowVector ids(r.live.size());
  Cell kinds(1, r.live.size());
  octave_idx_type k = 0;
  for (const auto &kv : r.live) {
    ids(k) = kv.first;
    kinds(k++) = std::string(kind_name(kv.second.what));
  }
  octave_value_list out;
  out(0) = ids;
  out(1) = kinds;
  return out;
}

octave_value_list cmd_commands(const call &);

struct command {
  const char *name;
  int min_args, max_args;
  const char *usage;
  octave_value_list (*run)(const call &);
};

const command commands[] = {
    /* the library and the gateway */
    {"version", 0, 0, "()", cmd_version},
    {"version_number", 0, 0, "()", cmd_version_number},
    {"status_str", 1, 1, "(status)", cmd_status_str},
    {"status_name", 1, 1, "(status)", cmd_status_name},
    {"commands", 0, 0, "()", cmd_commands},
    {"handles", 0, 0, "()", cmd_handles},
    {"allocations", 1, 1, "(model)", cmd_allocations},
    {"set_fail_at", 2, 2, "(model, n)", cmd_set_fail_at},
    /* building a model */
    {"model_new", 0, 0, "()", cmd_model_new},
    {"model_new_with_alloc", 0, 1, "([fail_at])", cmd_model_new_with_alloc},
    {"model_free", 1, 1, "(model)", cmd_model_free},
    {"model_error", 1, 1, "(model)", cmd_model_error},
    {"add_link", 1, 2, "(model, [name])", cmd_add_link},
    {"add_revolute", 7, 7, "(model, a, ax, ay, b, bx, by)", cmd_add_revolute},
    {"add_prismatic", 8, 8, "(model, a, ax, ay, axis_angle, b, bx, by)",
     cmd_add_sliding<kl_add_prismatic>},
    {"add_slot", 8, 8, "(model, a, ax, ay, axis_angle, b, bx, by)",
     cmd_add_sliding<kl_add_slot>},
    {"add_prismatic_through", 9, 9, "(model, a, ax, ay, tx, ty, b, bx, by)",
     cmd_add_sliding_through<kl_add_prismatic_through>},
    {"add_slot_through", 9, 9, "(model, a, ax, ay, tx, ty, b, bx, by)",
     cmd_add_sliding_through<kl_add_slot_through>},
    {"add_point", 4, 5, "(model, link, x, y, [name])", cmd_add_point},
    {"add_input", 2, 2, "(model, joint)", cmd_add_input},
    {"add_loop", 2, 2, "(model, joints)", cmd_add_loop},
    {"model_finalize", 1, 1, "(model)", cmd_model_finalize},
    {"model_is_finalized", 1, 1, "(model)", cmd_model_is_finalized},
    {"model_dof", 1, 1, "(model)", cmd_model_count<kl_model_dof>},
    {"model_loop_count", 1, 1, "(model)", cmd_model_count<kl_model_loop_count>},
    {"model_loop", 2, 2, "(model, loop)", cmd_model_loop},
    {"model_scale", 1, 1, "(model)", cmd_model_scale},
    {"model_set_joint_name", 3, 3, "(model, joint, name)", cmd_set_joint_name},
    {"model_set_units", 3, 3, "(model, length_unit, angle_unit)",
     cmd_model_set_units},
    {"model_units", 1, 1, "(model)", cmd_model_units},
    {"length_unit_str", 1, 1, "(code)", cmd_length_unit_str},
    {"angle_unit_str", 1, 1, "(code)", cmd_angle_unit_str},
    {"model_set_sketch_angle", 3, 3, "(model, link, angle)", cmd_set_sketch_angle},
    {"model_set_sketch_slide", 3, 3, "(model, joint, slide)", cmd_set_sketch_slide},
    {"model_sketch_angle", 2, 2, "(model, links)", cmd_sketch_angle},
    {"model_sketch_slide", 2, 2, "(model, joints)", cmd_sketch_slide},
    {"model_set_sweep", 2, 2, "(model, struct(input, from, to, steps))",
     cmd_model_set_sweep},
    {"model_sweep", 1, 1, "(model)", cmd_model_sweep},
    {"model_link_count", 1, 1, "(model)", cmd_model_count<kl_model_link_count>},
    {"model_joint_count", 1, 1, "(model)",
     cmd_model_count<kl_model_joint_count>},
    {"model_point_count", 1, 1, "(model)",
     cmd_model_count<kl_model_point_count>},
    {"model_input_count", 1, 1, "(model)",
     cmd_model_count<kl_model_input_count>},
    {"model_link_name", 2, 2, "(model, link)", cmd_name_of<kl_model_link_name>},
    {"model_point_name", 2, 2, "(model, point)", cmd_name_of<kl_model_point_name>},
    {"model_joint_name", 2, 2, "(model, joint)", cmd_name_of<kl_model_joint_name>},
    {"model_find_link", 2, 2, "(model, name)", cmd_find<kl_model_find_link>},
    {"model_find_joint", 2, 2, "(model, name)", cmd_find<kl_model_find_joint>},
    {"model_find_point", 2, 2, "(model, name)", cmd_find<kl_model_find_point>},
    {"model_point_link", 2, 2, "(model, point)", cmd_point_link},
    {"model_joint_kind", 2, 2, "(model, joint)", cmd_joint_kind},
    {"model_joint_links", 2, 2, "(model, joint)", cmd_joint_links},
    {"model_joint_axis", 2, 2, "(model, joint)", cmd_joint_axis},
    {"model_input_joint", 2, 2, "(model, input)", cmd_input_joint},
    {"model_grashof", 1, 1, "(model)", cmd_model_grashof},
    {"model_loop_fourbar", 2, 2, "(model, loop)", cmd_model_loop_fourbar},
    {"model_transmissions", 1, 1, "(model)", cmd_model_transmissions},
    {"model_transmission_skips", 1, 1, "(model)",
     cmd_model_transmission_skips},
    {"model_start_inputs", 1, 1, "(model)", cmd_model_start_inputs},
    {"quantity_str", 1, 1, "(quantity)", cmd_quantity_str},
    {"model_row_size", 1, 1, "(model)", cmd_model_count<kl_model_row_size>},
    {"model_row_offset", 2, 2, "(model, quantity)", cmd_model_row_offset},
    {"grashof", 4, 4, "(ground, input, coupler, output)", cmd_grashof},
    {"grashof_str", 1, 1, "(class)", cmd_grashof_str},
    /* model files */
    {"model_read", 1, 1, "(text)", cmd_model_read},
    {"model_read_with_alloc", 1, 2, "(text, [fail_at])",
     cmd_model_read_with_alloc},
    {"model_read_file", 1, 1, "(path)", cmd_model_read_file},
    {"model_write", 1, 1, "(model)", cmd_model_write},
    {"model_write_file", 2, 2, "(model, path)", cmd_model_write_file},
    /* solving */
    {"options_default", 0, 0, "()", cmd_options_default},
    {"options_init", 0, 0, "()", cmd_options_init},
    {"solver_new", 1, 1, "(model)", cmd_solver_new},
    {"solver_bytes", 1, 1, "(model)", cmd_solver_bytes},
    {"solver_new_in", 1, 1, "(model)", cmd_solver_new_in},
    {"solver_free", 1, 1, "(solver)", cmd_solver_free},
    {"solver_model", 1, 1, "(solver)", cmd_solver_model},
    {"solver_error", 1, 1, "(solver)", cmd_solver_error},
    {"solver_set_options", 2, 2, "(solver, options)", cmd_solver_set_options},
    {"solver_options", 1, 1, "(solver)", cmd_solver_get_options},
    {"set_link_angle", 3, 3, "(solver, link, angle)", cmd_set_link_angle},
    {"set_joint_slide", 3, 3, "(solver, joint, slide)", cmd_set_joint_slide},
    {"solve_position", 2, 2, "(solver, inputs)", cmd_stage<kl_solve_position>},
    {"solve_velocity", 2, 2, "(solver, input_rates)",
     cmd_stage<kl_solve_velocity>},
    {"solve_acceleration", 2, 2, "(solver, input_accels)",
     cmd_stage<kl_solve_acceleration>},
    {"solver_stats", 1, 1, "(solver)", cmd_solver_stats},
    /* results */
    {"link_angle", 2, 2, "(solver, links)", cmd_solver_values<kl_link_angle>},
    {"link_rate", 2, 2, "(solver, links)", cmd_solver_values<kl_link_rate>},
    {"link_accel", 2, 2, "(solver, links)", cmd_solver_values<kl_link_accel>},
    {"joint_slide", 2, 2, "(solver, joints)",
     cmd_solver_values<kl_joint_slide>},
    {"joint_slide_rate", 2, 2, "(solver, joints)",
     cmd_solver_values<kl_joint_slide_rate>},
    {"joint_slide_accel", 2, 2, "(solver, joints)",
     cmd_solver_values<kl_joint_slide_accel>},
    {"joint_angle", 2, 2, "(solver, joints)",
     cmd_solver_values<kl_joint_angle>},
    {"input_value", 2, 2, "(solver, inputs)",
     cmd_solver_values<kl_input_value>},
    {"link_origin", 2, 2, "(solver, links)", cmd_solver_points<kl_link_origin>},
    {"point_position", 2, 2, "(solver, points)",
     cmd_solver_points<kl_point_position>},
    {"point_velocity", 2, 2, "(solver, points)",
     cmd_solver_points<kl_point_velocity>},
    {"point_acceleration", 2, 2, "(solver, points)",
     cmd_solver_points<kl_point_acceleration>},
    /* kinematic coefficients */
    {"solve_coefficients", 1, 1, "(solver)", cmd_solve_coefficients},
    {"link_angle_deriv", 3, 3, "(solver, links, input)",
     cmd_deriv<kl_link_angle_deriv>},
    {"link_angle_deriv2", 4, 4, "(solver, links, input_i, input_j)",
     cmd_deriv2<kl_link_angle_deriv2>},
    {"joint_slide_deriv", 3, 3, "(solver, joints, input)",
     cmd_deriv<kl_joint_slide_deriv>},
    {"joint_slide_deriv2", 4, 4, "(solver, joints, input_i, input_j)",
     cmd_deriv2<kl_joint_slide_deriv2>},
    {"point_deriv", 3, 3, "(solver, points, input)", cmd_point_deriv},
    {"point_deriv2", 4, 4, "(solver, points, input_i, input_j)",
     cmd_point_deriv2},
    /* states, assembly modes, sweeps */
    {"solver_copy_state", 2, 2, "(to, from)", cmd_solver_copy_state},
    {"solver_find_assemblies", 2, 3, "(solver, inputs, [mode_solvers])",
     cmd_find_assemblies},
    {"solver_sweep", 5, 6, "(solver, input, from, to, steps, [callback])", cmd_sweep},
    {"solver_reset", 1, 1, "(solver)", cmd_solver_reset},
    {"solver_reach", 2, 2, "(solver, inputs)", cmd_solver_reach},
    {"link_to_global", 3, 3, "(solver, link, [x y])", cmd_link_to_global},
    {"joint_position", 2, 2, "(solver, joints)",
     cmd_solver_points<kl_joint_position>},
    {"link_origin_velocity", 2, 2, "(solver, links)",
     cmd_solver_points<kl_link_origin_velocity>},
    {"link_origin_accel", 2, 2, "(solver, links)",
     cmd_solver_points<kl_link_origin_accel>},
    {"solver_row", 1, 1, "(solver)", cmd_solver_row},
    {"solver_sweep_rows", 5, 5, "(solver, input, from, to, steps)",
     cmd_solver_sweep_rows},
    /* design figures */
    {"output_value", 2, 2, "(solver, output)", cmd_output_value},
    {"output_deriv", 3, 3, "(solver, output, input)",
     cmd_output_per_input<kl_output_deriv>},
    {"output_range", 6, 6, "(solver, input, from, to, steps, output)",
     cmd_output_range},
    {"range_time_ratio", 1, 1, "(range)", cmd_time_ratio},
    {"output_mechanical_advantage", 3, 3, "(solver, output, input)",
     cmd_output_per_input<kl_output_mechanical_advantage>},
    {"input_effort", 2, 2, "(solver, loads)", cmd_input_effort},
    {"input_effort_range", 7, 7,
     "(solver, input, from, to, steps, loads, effort_input)",
     cmd_input_effort_range},
    {"output_sensitivity", 3, 3, "(solver, output, dimension)",
     cmd_output_sensitivity},
    {"output_tolerance_stack", 4, 4, "(solver, output, dimensions, tolerances)",
     cmd_tolerance_stack},
    /* design studies */
    {"study_read", 2, 2, "(text, model)", cmd_study_read},
    {"study_read_file", 1, 1, "(path)", cmd_study_read_file},
    {"study_prepare", 1, 1, "(study)", cmd_study_prepare},
    {"study_error", 1, 1, "(study)", cmd_study_error},
    {"study_model_path", 1, 1, "(study)", cmd_study_model_path},
    {"study_free", 1, 1, "(study)", cmd_study_free},
    {"study_sample_count", 1, 1, "(study)", cmd_study_sample_count},
    {"study_output_count", 1, 1, "(study)",
     cmd_study_count<kl_study_output_count>},
    {"study_output_name", 2, 2, "(study, output)",
     cmd_study_name_of<kl_study_output_name>},
    {"study_model", 1, 1, "(study)", cmd_study_model},
    {"study_dimension_count", 1, 1, "(study)",
     cmd_study_count<kl_study_dimension_count>},
    {"study_dimension_name", 2, 2, "(study, dimension)",
     cmd_study_name_of<kl_study_dimension_name>},
    {"study_run", 3, 4, "(study, first, count, [threads])", cmd_study_run},
    {"study_summarize", 4, 4, "(study, output, values, sample_statuses)",
     cmd_study_summarize},
};

octave_value_list cmd_commands(const call &) {
  const size_t n = sizeof commands / sizeof commands[0];
  Cell names(1, n);
  for (size_t k = 0; k < n; k++)
    names(k) = std::string(commands[k].name);
  return one(names);
}

const command *find_command(const std::string &name) {
  for (const command &cmd : commands)
    if (name == cmd.name)
      return &cmd;
  return nullptr;
}

} // namespace

DEFMETHOD_DLD(__kinloop__, interp, args, nargout,
              "-*- texinfo -*-\n"
              "@deftypefn {} {[@dots{}] =} __kinloop__ (@var{command}, "
              "@dots{})\n"
              "The gateway to the kinloop C library: @var{command} is a "
              "kinloop function name without its @code{kl_} prefix.\n"
              "@code{__kinloop__ (\"commands\")} lists them. Use the "
              "@code{kinloop.Model} and @code{kinloop.Solver} classes "
              "rather than calling this directly.\n"
              "@end deftypefn") {
  static bool locked = false;
  if (!locked) {
    /* the table outlives any one call: stay loaded through "clear all" */
    interp.mlock();
    locked = true;
    if (kl_version_number() != KINLOOP_VERSION_NUMBER)
      raise("version", std::string("__kinloop__ was built against kinloop ") +
                           KINLOOP_VERSION + " but runs with " + kl_version());
  }
  if (args.length() < 1 || !args(0).is_string())
    raise("bad_argument",
          "__kinloop__: the first argument must be a command name; "
          "__kinloop__('commands') lists them");
  std::string name = args(0).string_value();
  const command *cmd = find_command(name);
  if (cmd == nullptr)
    raise("bad_argument", "__kinloop__: unknown command '" + name +
                              "'; __kinloop__('commands') lists them");
  int n = args.length() - 1;
  if (n < cmd->min_args || n > cmd->max_args)
    raise("bad_argument",
          name + ": takes " +
              (cmd->min_args == cmd->max_args
                   ? str(cmd->min_args)
                   : str(cmd->min_args) + " to " + str(cmd->max_args)) +
              " argument" + (cmd->max_args == 1 ? "" : "s") + " " + cmd->usage +
              ", got " + str(n));
  call c(name, args, nargout, interp);
  return cmd->run(c);
}
