/*
 * __kinloop__.cc - the Octave gateway to kinloop: one function taking a
 * command (a kl_ name without its prefix) and its arguments. The plain
 * functions' commands are generated (kinloop_gateway.inc); this file holds
 * the handle table, the argument rule, and the commands the generator
 * leaves to hand code: freeing, solvers' making, assembly modes, sweeps,
 * the force figures over a cycle, and study runs.
 */
#include "gateway.h"

#include <strings.h>

#include <cstdlib>
#include <cstring>
#include <exception>

namespace kinloop_gateway {

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
         : k == kind::cam    ? "cam"
                             : "handle";
}

int new_id(kind what, const entry &e) {
  registry &r = table();
  int id = static_cast<int>(r.made.size());
  r.made.push_back(what);
  r.live[id] = e;
  r.live[id].what = what;
  return id;
}

void raise(const std::string &id, const std::string &message) {
  error_with_id(("kinloop:" + id).c_str(), "%s", message.c_str());
}

void raise_status(int status, const std::string &message) {
  raise(status_name(status), message.empty() ? kl_status_str(status) : message);
}

std::string str(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.17g", v);
  return buf;
}

octave_value code_name(const named_code *table, int code) {
  for (const named_code *n = table; n->name != nullptr; n++)
    if (n->code == code)
      return octave_value(n->name);
  return octave_value(code);
}

/* An enum table as a struct of names (a cell) and codes (a row). */
static octave_value enum_table(const named_code *table) {
  std::vector<const named_code *> values;
  for (const named_code *n = table; n->name != nullptr; n++)
    values.push_back(n);
  Cell names(1, values.size());
  RowVector codes(values.size());
  for (size_t k = 0; k < values.size(); k++) {
    names(k) = values[k]->name;
    codes(k) = values[k]->code;
  }
  octave_scalar_map m;
  m.assign("names", names);
  m.assign("codes", codes);
  return m;
}

/* ---- the argument rule ---- */

/* Whether a double holds an integer exactly. */
static bool exact(double, double) { return true; }
static bool exact(double d, int64_t n) {
  return d >= -9223372036854775808.0 && d < 9223372036854775808.0 &&
         static_cast<int64_t>(d) == n;
}
static bool exact(double d, uint64_t u) {
  return d < 18446744073709551616.0 && static_cast<uint64_t>(d) == u;
}

std::vector<double> call::reals(const octave_value &v, const std::string &what) const {
  if (!(v.isnumeric() || v.islogical()) || v.iscomplex())
    bad(what, "must be real numbers");
  std::vector<double> out;
  out.reserve(static_cast<size_t>(v.numel()));
  each_number(v, [&](octave_idx_type, auto x) {
    if (!exact(static_cast<double>(x), x))
      bad(what, "holds " + std::to_string(x) + ", which a double cannot hold exactly");
    out.push_back(static_cast<double>(x));
  });
  return out;
}

double call::real(const octave_value &v, const std::string &what) const {
  if (!real_scalar(v))
    bad(what, "must be a real number (a scalar)");
  return reals(v, what)[0];
}

std::string call::text(const octave_value &v, const std::string &what) const {
  if (!v.is_string() || v.rows() > 1)
    bad(what, "must be a character string (one row)");
  std::string s = v.string_value();
  size_t nul = s.find('\0');
  if (nul != std::string::npos)
    bad(what, "contains a NUL character (at " + std::to_string(nul + 1) +
                  "), which would end it there in C");
  return s;
}

const char *call::optional_text(int i, const std::string &what, std::string &keep) const {
  if (i >= count() || (arg(i).isempty() && !arg(i).is_string()))
    return nullptr;
  keep = text(arg(i), what);
  return keep.c_str();
}

void call::point(const octave_value &v, const std::string &what, double &x,
                 double &y) const {
  std::vector<double> xy = reals(v, what);
  if (xy.size() != 2)
    bad(what, "must be a point [x y] of two real numbers");
  x = xy[0];
  y = xy[1];
}

int call::code(const octave_value &v, const std::string &what,
               const named_code *table) const {
  if (!v.is_string())
    return whole<int>(v, what);
  std::string s = text(v, what), names;
  for (const named_code *n = table; n->name != nullptr; n++) {
    if (strcasecmp(s.c_str(), n->name) == 0)
      return n->code;
    names += std::string(names.empty() ? "'" : ", '") + n->name + "'";
  }
  bad(what, "'" + s + "' is not one of " + names);
}

std::vector<double> call::values(int i, int n, const std::string &what) const {
  const octave_value &v = arg(i);
  std::vector<double> u = reals(v, what);
  if (static_cast<int>(u.size()) != n || (n > 0 && v.ndims() > 2) ||
      (n > 0 && v.rows() != 1 && v.columns() != 1))
    bad(what, "must have " + std::to_string(n) + " element" + (n == 1 ? "" : "s") +
                  " (one per input, in input order); got " + std::to_string(u.size()));
  return u;
}

std::vector<double> call::rows(const octave_value &v, int columns,
                               const std::string &what) const {
  if (!(v.isnumeric() || v.islogical()) || v.iscomplex() || v.ndims() != 2 ||
      (!v.isempty() && v.columns() != columns))
    bad(what, "must be a real matrix of " + std::to_string(columns) + " columns");
  Matrix m = v.matrix_value();
  std::vector<double> out;
  out.reserve(static_cast<size_t>(m.numel()));
  for (octave_idx_type i = 0; i < m.rows(); i++)
    for (octave_idx_type k = 0; k < m.columns(); k++)
      out.push_back(m(i, k));
  return out;
}

octave_map call::structs(int i, const std::string &what) const {
  if (!arg(i).isstruct())
    bad(what, "must be a struct");
  return arg(i).map_value();
}

octave_map call::struct_list(int i, const std::string &what) const {
  return arg(i).isempty() && !arg(i).isstruct() ? octave_map() : structs(i, what);
}

int call::count(size_t n, const std::string &what) const {
  if (n > static_cast<size_t>(std::numeric_limits<int>::max()))
    bad(what, "has more elements than a C int counts");
  return static_cast<int>(n);
}

void call::too_large(const std::string &what, long n) const {
  raise_status(KL_ETOOLARGE, name + ": " + what + " " + std::to_string(n) +
                                 " is above KL_MAX_STEPS (" + str(KL_MAX_STEPS) +
                                 "), the most elements the bindings make room for");
}

octave_map call::one_struct(int i, const std::string &what) const {
  octave_map m = structs(i, what);
  if (m.numel() != 1)
    bad(what, "must be one struct, not " + std::to_string(m.numel()));
  return m;
}

void call::only_fields(const octave_map &m, const std::string &what,
                       std::initializer_list<const char *> fields, bool all) const {
  std::string list;
  for (const char *f : fields) {
    list += std::string(list.empty() ? "" : ", ") + f;
    if (all && !m.isfield(f))
      bad(what, std::string("needs the field '") + f + "' (fields: " + list + "...)");
  }
  string_vector names = m.fieldnames();
  for (octave_idx_type k = 0; k < names.numel(); k++) {
    bool known = false;
    for (const char *f : fields)
      known = known || names(k) == f;
    if (!known)
      bad(what, "has no field '" + names(k) + "' (fields: " + list + ")");
  }
}

void call::text_into(const octave_value &v, const std::string &what, char *out,
                     size_t size) const {
  std::string s = text(v, what);
  if (s.size() >= size)
    bad(what, "is longer than " + std::to_string(size - 1) + " bytes");
  std::memcpy(out, s.c_str(), s.size() + 1);
}

entry &call::handle(int i, kind want, access how) const {
  return lookup(whole<int>(arg(i), std::string(kind_name(want)) + " id"), want, how);
}

entry &call::lookup(int id, kind want, access how) const {
  registry &r = table();
  auto it = r.live.find(id);
  if (it == r.live.end()) {
    if (id > 0 && static_cast<size_t>(id) < r.made.size())
      raise("bad_handle",
            name + ": " + kind_name(r.made[id]) + " " + str(id) + " has been freed");
    raise("bad_handle", name + ": " + str(id) + " is not a kinloop " + kind_name(want) + " id");
  }
  if (it->second.what != want)
    raise("bad_handle", name + ": id " + str(id) + " is a " + kind_name(it->second.what) +
                            ", not a " + kind_name(want));
  if (how == access::write && it->second.sweeping)
    raise_status(KL_ESTATE, name + ": solver " + str(id) +
                                " is running a sweep; its callback may only read from it");
  /* the library would refuse too (the model is finalized), but write its
   * message into a model that is the study's, not ours */
  if (how == access::write && it->second.owner != 0)
    raise_status(KL_ESTATE, name + ": model " + str(id) + " belongs to study " +
                                str(it->second.owner) + " and is finalized: it cannot change");
  return it->second;
}

static std::string shown(const octave_value &v) {
  if (v.is_string())
    return "'" + v.string_value() + "'";
  if ((v.isnumeric() || v.islogical()) && v.numel() == 1 && !v.iscomplex())
    return str(v.double_value());
  return "[" + v.dims().str() + " " + v.class_name() + "]";
}

void call::check(int status, const char *message) const {
  if (status >= 0)
    return;
  if (message != nullptr)
    raise_status(status, message);
  std::string args;
  for (int i = 0; i < count(); i++)
    args += (i ? ", " : "") + shown(arg(i));
  raise_status(status, name + "(" + args + "): " + kl_status_str(status));
}

void call::check(int status, const kl_io_error &e) const {
  if (status >= 0)
    return;
  std::string msg = e.message[0] != '\0' ? e.message : kl_status_str(status);
  raise_status(status, e.line > 0 ? "line " + str(e.line) + ", column " + str(e.column) +
                                        ": " + msg
                                  : msg);
}

static octave_value row(const double *v, int n) {
  RowVector out(n);
  for (int k = 0; k < n; k++)
    out(k) = v[k];
  return out;
}

template <typename T> static octave_value row(const T *v, int n) {
  return row(std::vector<double>(v, v + n).data(), n);
}

/* n points x, y (2 n doubles) as an n-by-2 matrix. */
static octave_value pairs(const double *xy, int n) {
  Matrix out(n, 2);
  for (int k = 0; k < n; k++)
    for (int j = 0; j < 2; j++)
      out(k, j) = xy[2 * k + j];
  return out;
}

/* n enum values as a cell row of their names. */
static octave_value code_names(const named_code *table, const int *codes, int n) {
  Cell out(1, n);
  for (int k = 0; k < n; k++)
    out(k) = code_name(table, codes[k]);
  return out;
}

/* A name, or [] where the library gives NULL. */
static octave_value text_value(const char *text) {
  return text == nullptr ? octave_value(Matrix()) : octave_value(text);
}

/* kinloop_gateway.inc: the enum tables, status_name, the struct
 * converters and the plain commands, generated from include/kinloop.h */
#include "kinloop_gateway.inc"

namespace {

/* ------------------------------------------------------------------------
 * Models: letting go
 * ------------------------------------------------------------------------ */

/* Lets go of the model; its solvers and studies keep it (kl_model_free).
 * For a study's model it ends the handle only: the model is the study's. */
octave_value_list cmd_model_free(const call &c) {
  entry &m = c.model(0, access::read);
  if (m.owner == 0)
    kl_model_free(m.model);
  table().live.erase(c.whole<int>(c.arg(0), "model id"));
  return none();
}

/* ------------------------------------------------------------------------
 * Solvers: lifetime, assembly modes
 * ------------------------------------------------------------------------ */

/* kl_solver_new gives NULL without a message: say which cause it was. */
[[noreturn]] void solver_new_failed(const call &c, const entry &m) {
  if (!kl_model_is_finalized(m.model))
    raise_status(KL_ESTATE, c.name + ": model " + shown(c.arg(0)) +
                                " is not finalized; finalize it first");
  raise_status(KL_ENOMEM, c.name + ": out of memory");
}

/* A solver from the model's allocator, or placed in a block the gateway
 * allocates (malloc's alignment, as kl_solver_new_in asks) and frees after
 * kl_solver_free. Given a solver instead of a model: another solver of its
 * model, whether the model's own handle is freed or not. */
template <bool in_block> octave_value_list cmd_solver_new(const call &c) {
  int id = c.whole<int>(c.arg(0), "model id");
  auto given = table().live.find(id);
  bool sibling = given != table().live.end() && given->second.what == kind::solver;
  entry &m = sibling ? c.solver(0, access::read) : c.model(0, access::read);
  size_t size = kl_solver_bytes(m.model);
  void *block = in_block && size > 0 ? std::malloc(size) : nullptr;
  kl_solver *s = in_block ? kl_solver_new_in(m.model, block, size) : kl_solver_new(m.model);
  if (s == nullptr) {
    std::free(block);
    solver_new_failed(c, m);
  }
  entry e;
  e.model = m.model;
  e.solver = s;
  e.model_id = sibling ? m.model_id : id;
  e.block = block;
  return one(new_id(kind::solver, e));
}

octave_value_list cmd_solver_free(const call &c) {
  entry &s = c.solver(0);
  kl_solver_free(s.solver);
  std::free(s.block);
  table().live.erase(c.whole<int>(c.arg(0), "solver id"));
  return none();
}

octave_value_list cmd_solver_model(const call &c) {
  return one(c.solver(0, access::read).model_id);
}

/* Solvers the gateway made and has not handed out yet: freed unless adopted. */
struct new_solvers : std::vector<kl_solver *> {
  ~new_solvers() {
    for (kl_solver *s : *this)
      kl_solver_free(s);
  }
};

/* The assembly modes at the inputs as new solvers of the solver's model,
 * with its options, each at a solved position (as Python gives them); the
 * search is repeated when they are more than the solvers made for it. */
octave_value_list cmd_find_assemblies(const call &c) {
  entry &s = c.solver(0);
  int n = kl_model_input_count(s.model);
  std::vector<double> u = c.values(1, n, "inputs");
  kl_options o = kl_options();
  o.size = sizeof o;
  c.check(kl_solver_options(s.solver, &o));
  new_solvers modes;
  int found = 8;
  while (static_cast<int>(modes.size()) < found) {
    while (static_cast<int>(modes.size()) < found) {
      modes.push_back(kl_solver_new(s.model));
      if (modes.back() == nullptr || kl_solver_set_options(modes.back(), &o) < 0)
        raise_status(KL_ENOMEM, c.name + ": out of memory");
    }
    found = kl_solver_find_assemblies(s.solver, n > 0 ? u.data() : nullptr, modes.data(),
                                      static_cast<int>(modes.size()));
    c.check(found, kl_solver_error(s.solver));
  }
  RowVector ids(found);
  for (int k = 0; k < found; k++) {
    entry e;
    e.model = s.model;
    e.solver = modes[k];
    e.model_id = s.model_id;
    ids(k) = new_id(kind::solver, e);
    modes[k] = nullptr; /* the table's now */
  }
  return one(ids);
}

/* ---- sweeps ---- */

/* What a sweep records: the library's rows (kl_solver_row), laid out as
 * enum kl_quantity says, one per delivered step, split into a field per
 * quantity named by kl_quantity_str (one column per item) when the sweep
 * ends. Without a callback the library records them itself
 * (kl_solver_sweep_rows); with one, each step's row is read before the
 * callback sees the step. */
struct recorder {
  const kl_model *model;
  int rows = 0;
  Matrix table; /* width x steps + 1: column k is the C row of step k, as
                   kl_solver_sweep_rows writes them */
  octave_value callback;
  int solver_id = 0;
  octave::interpreter *interp = nullptr;
  std::exception_ptr failure;

  /* sized for a count the library takes: it refuses the others itself
   * (KL_EINVAL, KL_ETOOLARGE) and then writes no row */
  static bool takes(int steps) { return steps >= 1 && steps <= KL_MAX_STEPS; }

  recorder(const kl_model *m, int steps)
      : model(m), table(kl_model_row_size(m),
                        takes(steps) ? static_cast<octave_idx_type>(steps) + 1 : 0) {}

  double *row(int k) { return table.fortran_vec() + static_cast<size_t>(k) * table.rows(); }

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

  /* The delivered rows, a field per quantity, and the swept input's
   * values as `input`: one copy from C's rows to Octave's columns, whose
   * fields share (Octave slices a matrix's consecutive columns without
   * copying them), so that a sweep allocates its result once. */
  octave_scalar_map result(int input) {
    octave_scalar_map out;
    Matrix steps = (rows == table.cols() ? table : table.extract_n(0, 0, table.rows(), rows))
                       .transpose();
    auto columns = [&](int first, int count) {
      return Matrix(steps.index(idx_vector::colon, idx_vector::make_range(first, 1, count)));
    };
    int q, count, offset;
    for (q = 0; (offset = kl_model_row_offset(model, q, &count)) >= 0; q++)
      out.assign(kl_quantity_str(q), columns(offset, count));
    offset = kl_model_row_offset(model, KL_QUANTITY_INPUT_VALUE, &count);
    out.assign("input", columns(offset + input, 1));
    return out;
  }
};

extern "C" int record_step(const kl_solver *s, int step, double input, void *user) {
  recorder *r = static_cast<recorder *>(user);
  kl_solver_row(s, r->row(r->rows++));
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
  int input = c.whole<int>(c.arg(1), "input");
  double from = c.real(c.arg(2), "from"), to = c.real(c.arg(3), "to");
  int steps = c.whole<int>(c.arg(4), "steps");
  recorder rec(s.model, steps);
  rec.solver_id = c.whole<int>(c.arg(0), "solver id");
  rec.interp = &c.interp;
  if (c.given(5)) {
    if (!c.arg(5).is_function_handle())
      c.bad("callback", "must be a function handle f(solver_id, step, input)");
    rec.callback = c.arg(5);
  }
  kl_sweep_result res = kl_sweep_result();
  res.size = sizeof res;
  int st;
  if (rec.callback.is_undefined() && recorder::takes(steps)) {
    /* the library fills the rows at C speed */
    st = kl_solver_sweep_rows(s.solver, input, from, to, steps, rec.row(0), &res);
    rec.rows = res.steps_done > 0 ? res.steps_done : 0;
  } else {
    sweeping_guard guard(s);
    st = kl_solver_sweep(s.solver, input, from, to, steps, record_step, &rec, &res);
  }
  if (rec.failure)
    std::rethrow_exception(rec.failure);
  /* a sweep that delivered nothing has no result to give */
  if (st < 0 && res.steps_done == 0)
    c.check(st, kl_solver_error(s.solver));
  octave_scalar_map out = rec.result(input < 0 ? 0 : input), outcome = to_octave(res);
  for (auto it = outcome.begin(); it != outcome.end(); it++)
    out.assign(outcome.key(it), outcome.contents(it));
  out.assign("message", st == KL_OK        ? std::string()
                        : st == KL_STOPPED ? std::string(kl_status_str(st))
                                           : std::string(kl_solver_error(s.solver)));
  return one(out);
}

/* ------------------------------------------------------------------------
 * The force figures over a cycle
 * ------------------------------------------------------------------------ */

/* The arguments both cycle commands take: (solver, cycle, loads), the
 * cycle a struct of any of kl_cycle's fields (the rest keep
 * kl_cycle_default's values; [] keeps them all), the loads a struct array
 * of kl_load's fields (or []). */
struct cycle_arguments {
  kl_cycle cycle;
  std::vector<kl_load> loads;
  int nloads = 0;

  explicit cycle_arguments(const call &c) {
    kl_cycle_default(&cycle);
    if (c.given(1)) {
      octave_map given = c.one_struct(1, "cycle");
      from_octave(c, given, 0, "cycle", cycle, false);
    }
    octave_map list = c.count() > 2 ? c.struct_list(2, "loads") : octave_map();
    loads.assign(static_cast<size_t>(list.numel()), kl_load());
    for (octave_idx_type k = 0; k < list.numel(); k++)
      from_octave(c, list, k, "loads", loads[static_cast<size_t>(k)], false);
    nloads = c.count(loads.size(), "loads");
  }
  const kl_load *load_array() const { return loads.empty() ? nullptr : loads.data(); }
};

/* A row-major C array as a rows x columns matrix. */
Matrix from_rows(const std::vector<double> &v, long rows, int columns) {
  Matrix out(rows, columns);
  for (long i = 0; i < rows; i++)
    for (int k = 0; k < columns; k++)
      out(i, k) = v[static_cast<size_t>(i) * columns + k];
  return out;
}

/* kl_cycle_table as a struct of named columns, one row per sample: input,
 * effort (a column per input), joint_fx, joint_fy, joint_moment (a column
 * per joint), ground_fx, ground_fy, ground_moment, kinetic_energy, work;
 * and rows, the table whole as the C rows lay it out. */
octave_value_list cmd_cycle_table(const call &c) {
  entry &s = c.solver(0);
  cycle_arguments a(c);
  int ni = kl_model_input_count(s.model), nj = kl_model_joint_count(s.model);
  int width = kl_cycle_columns(s.model);
  c.check(width);
  /* sized for a valid cycle; the library judges the steps itself */
  size_t samples = recorder::takes(a.cycle.steps)
                       ? static_cast<size_t>(a.cycle.steps) + 1 : 1;
  std::vector<double> rows(samples * static_cast<size_t>(width));
  int done = 0;
  c.check(kl_cycle_table(s.solver, &a.cycle, a.nloads, a.load_array(), rows.data(),
                         rows.size(), &done),
          kl_solver_error(s.solver));
  Matrix table = from_rows(rows, done, width);
  octave_scalar_map out;
  /* columns first, first + stride, ... (count of them) under `name` */
  auto take = [&](const char *name, int first, int count, int stride) {
    Matrix m(done, count);
    for (int i = 0; i < done; i++)
      for (int k = 0; k < count; k++)
        m(i, k) = table(i, first + k * stride);
    out.assign(name, m);
  };
  int ground = 1 + ni + 3 * nj;
  take("input", 0, 1, 1);
  take("effort", 1, ni, 1);
  take("joint_fx", 1 + ni, nj, 3);
  take("joint_fy", 2 + ni, nj, 3);
  take("joint_moment", 3 + ni, nj, 3);
  take("ground_fx", ground, 1, 1);
  take("ground_fy", ground + 1, 1, 1);
  take("ground_moment", ground + 2, 1, 1);
  take("kinetic_energy", ground + 3, 1, 1);
  take("work", ground + 4, 1, 1);
  out.assign("rows", table);
  return one(out);
}

/* ------------------------------------------------------------------------
 * Design studies
 * ------------------------------------------------------------------------ */

/* The study's borrowed model handle goes with it; solvers made from that
 * handle keep working (the library keeps the model for them). */
octave_value_list cmd_study_free(const call &c) {
  entry &st = c.study(0);
  table().live.erase(st.model_id);
  kl_study_free(st.study);
  table().live.erase(c.whole<int>(c.arg(0), "study id"));
  return none();
}

/* The study's model as a borrowed handle: one per study (made again if
 * its handle was freed), ended with the study. */
octave_value_list cmd_study_model(const call &c) {
  entry &st = c.study(0);
  if (table().live.count(st.model_id) == 0) {
    entry e;
    /* writes through it are refused (entry::owner), so the const the
     * library gives is kept */
    e.model = const_cast<kl_model *>(kl_study_model(st.study));
    e.owner = c.whole<int>(c.arg(0), "study id");
    st.model_id = new_id(kind::model, e);
  }
  return one(st.model_id);
}

/* ------------------------------------------------------------------------
 * The gateway's own commands and the dispatch
 * ------------------------------------------------------------------------ */

octave_value_list cmd_status_name(const call &c) {
  return one(std::string(status_name(c.whole<int>(c.arg(0), "status"))));
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

octave_value_list cmd_cam_free(const call &c) {
  kl_cam_free(c.cam(0).cam);
  table().live.erase(c.whole<int>(c.arg(0), "cam id"));
  return none();
}

const command hand_commands[] = {
    {"commands", 0, 0, "()", cmd_commands},
    {"handles", 0, 0, "()", cmd_handles},
    {"status_name", 1, 1, "(status)", cmd_status_name},
    {"model_free", 1, 1, "(model)", cmd_model_free},
    {"solver_new", 1, 1, "(model)", cmd_solver_new<false>},
    {"solver_new_in", 1, 1, "(model)", cmd_solver_new<true>},
    {"solver_free", 1, 1, "(solver)", cmd_solver_free},
    {"solver_model", 1, 1, "(solver)", cmd_solver_model},
    {"solver_find_assemblies", 2, 2, "(solver, inputs)", cmd_find_assemblies},
    {"solver_sweep", 5, 6, "(solver, input, from, to, steps, [callback])", cmd_sweep},
    {"cycle_table", 1, 3, "(solver, [cycle], [loads])", cmd_cycle_table},
    {"study_free", 1, 1, "(study)", cmd_study_free},
    {"study_model", 1, 1, "(study)", cmd_study_model},
    {"cam_free", 1, 1, "(cam)", cmd_cam_free},
    {nullptr, 0, 0, nullptr, nullptr}};

const command *const all_commands[] = {generated_commands, hand_commands, extra_commands};

Cell names_of(std::initializer_list<const command *> tables) {
  std::vector<std::string> names;
  for (const command *table : tables)
    for (const command *cmd = table; cmd->name != nullptr; cmd++)
      names.push_back(cmd->name);
  Cell out(1, names.size());
  for (size_t k = 0; k < names.size(); k++)
    out(k) = names[k];
  return out;
}

/* The commands' names: the library's (generated and hand-written), and
 * those a test build adds. */
octave_value_list cmd_commands(const call &) {
  octave_value_list out;
  out(0) = names_of({generated_commands, hand_commands});
  out(1) = names_of({extra_commands});
  return out;
}

const command *find_command(const std::string &name) {
  for (const command *table : all_commands)
    for (const command *cmd = table; cmd->name != nullptr; cmd++)
      if (name == cmd->name)
        return cmd;
  return nullptr;
}

} // namespace
} // namespace kinloop_gateway

using namespace kinloop_gateway;

DEFMETHOD_DLD(__kinloop__, interp, args, nargout,
              "-*- texinfo -*-\n"
              "@deftypefn {} {[@dots{}] =} __kinloop__ (@var{command}, @dots{})\n"
              "The gateway to the kinloop C library: @var{command} is a kinloop "
              "function name without its @code{kl_} prefix.\n"
              "@code{__kinloop__ (\"commands\")} lists them. Use the "
              "@code{kinloop.Model}, @code{kinloop.Solver} and @code{kinloop.Study} "
              "classes rather than calling this directly.\n"
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
    raise("EINVAL", "__kinloop__: the first argument must be a command name; "
                    "__kinloop__('commands') lists them");
  std::string name = args(0).string_value();
  const command *cmd = find_command(name);
  if (cmd == nullptr)
    raise("EINVAL", "__kinloop__: unknown command '" + name +
                        "'; __kinloop__('commands') lists them");
  int n = args.length() - 1;
  if (n < cmd->min_args || n > cmd->max_args)
    raise("EINVAL", name + ": takes " +
                        (cmd->min_args == cmd->max_args
                             ? str(cmd->min_args)
                             : str(cmd->min_args) + " to " + str(cmd->max_args)) +
                        " argument" + (cmd->max_args == 1 ? "" : "s") + " " + cmd->usage +
                        ", got " + str(n));
  call c(name, args, nargout, interp);
  return cmd->run(c);
}
