/*
 * gateway.h - what the parts of the Octave gateway share: the handle table,
 * one call's arguments under the argument rule, errors, and commands.
 */
#ifndef KINLOOP_GATEWAY_H
#define KINLOOP_GATEWAY_H

#include <octave/interpreter.h>
#include <octave/oct-map.h>
#include <octave/oct.h>

#include <cmath>
#include <cstdint>
#include <limits>
#include <map>
#include <string>
#include <vector>

#include "kinloop.h"

namespace kinloop_gateway {

/* Models, solvers and studies are held here and handed to Octave as ids.
 * Ids start at 1 and are never reused, so a stale id is always recognised
 * as freed rather than taken for a newer object. */
enum class kind : unsigned char { none, model, solver, study, cam };

/* A study's model is borrowed: its handle (made by study_model) refuses
 * every command that would change it, and goes with the study. A model or
 * study may go while solvers of its model live: the library keeps the model
 * for them (kl_model_free), so a solver's `model` stays valid. */
struct entry {
  kind what = kind::none;
  kl_model *model = nullptr; /* the model, or the solver's model */
  kl_solver *solver = nullptr;
  kl_study *study = nullptr;
  kl_cam *cam = nullptr;
  int model_id = 0;      /* solver: the id its model was made under; study:
                            its borrowed model's id, 0 until study_model */
  int owner = 0;         /* model: the study it belongs to, 0 if its own */
  void *block = nullptr; /* solver placed in a gateway-owned block */
  bool sweeping = false; /* solver: inside kl_solver_sweep's callback */
};

struct registry {
  std::map<int, entry> live;
  std::vector<kind> made{kind::none}; /* made[id]: what id was made as */
};

registry &table();
const char *kind_name(kind k);
int new_id(kind what, const entry &e);

/* Errors raise 'kinloop:<status name>': the library's own message for its
 * failures, EINVAL for arguments the rule refuses, ESTATE for a change
 * the handle cannot take now; kinloop:bad_handle for ids that are not (or
 * no longer) usable. */
[[noreturn]] void raise(const std::string &id, const std::string &message);
[[noreturn]] void raise_status(int status, const std::string &message);
const char *status_name(int status); /* generated */
std::string str(double v);

/* An enum value's name (kinloop_gateway.inc has a table per enum). */
struct named_code {
  const char *name;
  int code;
};
octave_value code_name(const named_code *table, int code);

enum class access { read, write };

/* One call: its command name and arguments (counted from 0 after the
 * command name), each taken under the argument rule: integers whole and
 * within their C type's range, reals real and exactly a double, strings
 * without NUL. A refusal raises kinloop:EINVAL naming the command and the
 * argument; nothing reaches C changed. */
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

  [[noreturn]] void bad(const std::string &what, const std::string &why) const {
    raise("EINVAL", name + ": " + what + " " + why);
  }

  template <typename T> T whole(const octave_value &v, const std::string &what) const {
    if (!real_scalar(v))
      bad(what, "must be an integer (a real scalar)");
    return wholes<T>(v, what)[0];
  }
  template <typename T>
  std::vector<T> wholes(const octave_value &v, const std::string &what) const;
  double real(const octave_value &v, const std::string &what) const;
  std::vector<double> reals(const octave_value &v, const std::string &what) const;
  std::string text(const octave_value &v, const std::string &what) const;
  /* NULL when argument i is absent or [], else its text kept in `keep`. */
  const char *optional_text(int i, const std::string &what, std::string &keep) const;
  void point(const octave_value &v, const std::string &what, double &x, double &y) const;
  /* An enum value by name (any case) or by its code. */
  int code(const octave_value &v, const std::string &what, const named_code *table) const;
  /* A table read row by row: a real matrix of `columns` columns (or []). */
  std::vector<double> rows(const octave_value &v, int columns, const std::string &what) const;
  /* Exactly n reals, one per input (any vector shape; [] when n is 0). */
  std::vector<double> values(int i, int n, const std::string &what) const;
  /* Ids shaped like argument i, each mapped through `get`. */
  template <typename F> octave_value each_id(int i, const std::string &what, F get) const {
    std::vector<int> ids = wholes<int>(arg(i), what);
    NDArray out(arg(i).dims());
    for (size_t k = 0; k < ids.size(); k++)
      out(k) = get(ids[k]);
    return out;
  }
  octave_map one_struct(int i, const std::string &what) const;
  octave_map structs(int i, const std::string &what) const;
  /* A struct array, or none for []. */
  octave_map struct_list(int i, const std::string &what) const;
  /* The length of an array as the C int that counts it. */
  int count(size_t n, const std::string &what) const;
  /* A whole number sizing an array the gateway makes for the library to
   * fill: at most KL_MAX_STEPS elements, else KL_ETOOLARGE, so a huge value
   * is refused before any memory is asked for. */
  template <typename T> T array_size(const octave_value &v, const std::string &what) const {
    T n = whole<T>(v, what);
    if (n > KL_MAX_STEPS)
      too_large(what, n);
    return n;
  }
  [[noreturn]] void too_large(const std::string &what, long n) const;
  void only_fields(const octave_map &m, const std::string &what,
                   std::initializer_list<const char *> fields, bool all) const;
  void text_into(const octave_value &v, const std::string &what, char *out,
                 size_t size) const;

  entry &handle(int i, kind want, access how) const;
  entry &lookup(int id, kind want, access how) const;
  entry &model(int i, access how = access::write) const { return handle(i, kind::model, how); }
  entry &solver(int i, access how = access::write) const { return handle(i, kind::solver, how); }
  entry &study(int i, access how = access::read) const { return handle(i, kind::study, how); }
  entry &cam(int i, access how = access::write) const { return handle(i, kind::cam, how); }

  /* A failed call raises its status with `message`, or, for calls that
   * leave none (getters on a const handle), the command and its arguments. */
  void check(int status, const char *message = nullptr) const;
  /* A failure reported in a kl_io_error, its place (line, column) first. */
  void check(int status, const kl_io_error &e) const;

private:
  const octave_value_list &args_;
  static bool real_scalar(const octave_value &v) {
    return (v.isnumeric() || v.islogical()) && !v.iscomplex() && v.numel() == 1;
  }
};

/* Integer classes are read exactly (int64 beyond 2^53 too); doubles must be
 * whole and within [-2^N, 2^N) for a type of N value bits. */
template <typename T> struct whole_rule {
  typedef std::numeric_limits<T> limits;
  const call &c;
  const std::string &what;
  const char *ctype() const {
    return sizeof(T) == sizeof(int) && limits::is_signed ? "int"
           : limits::is_signed                          ? "long"
                                                        : "size_t";
  }
  double high() const { return std::ldexp(1.0, limits::digits); }
  double low() const { return limits::is_signed ? -high() : 0; }
  [[noreturn]] void range(const std::string &got) const {
    c.bad(what, std::string("must be within the range of a C ") + ctype() + ", " +
                    std::to_string(limits::min()) + " to " +
                    std::to_string(limits::max()) + "; got " + got);
  }
  T of(uint64_t u) const {
    if (u > static_cast<uint64_t>(limits::max()))
      range(std::to_string(u));
    return static_cast<T>(u);
  }
  T of(int64_t n) const {
    if (n < 0 ? !limits::is_signed || n < static_cast<int64_t>(limits::min())
              : static_cast<uint64_t>(n) > static_cast<uint64_t>(limits::max()))
      range(std::to_string(n));
    return static_cast<T>(n);
  }
  T of(double d) const {
    if (!(d == std::floor(d)))
      c.bad(what, "must be a whole number; got " + str(d));
    if (!(d >= low() && d < high()))
      range(str(d));
    return static_cast<T>(d);
  }
};

/* Each element k of a real array as its class holds it: uint64_t, int64_t
 * (the other integer classes) or double. */
template <typename F> void each_number(const octave_value &v, F f) {
  octave_idx_type n = v.numel();
  if (v.is_uint64_type()) {
    uint64NDArray a = v.uint64_array_value();
    for (octave_idx_type k = 0; k < n; k++)
      f(k, static_cast<uint64_t>(a(k).value()));
  } else if (v.isinteger()) {
    int64NDArray a = v.int64_array_value();
    for (octave_idx_type k = 0; k < n; k++)
      f(k, static_cast<int64_t>(a(k).value()));
  } else {
    NDArray a = v.array_value();
    for (octave_idx_type k = 0; k < n; k++)
      f(k, a(k));
  }
}

template <typename T>
std::vector<T> call::wholes(const octave_value &v, const std::string &what) const {
  if (!(v.isnumeric() || v.islogical()) || v.iscomplex())
    bad(what, "must be an integer or a vector of integers");
  std::vector<T> out;
  /* element k as its own argument, named what(k) in a vector */
  each_number(v, [&](octave_idx_type k, auto value) {
    std::string at = v.numel() > 1 ? what + "(" + std::to_string(k + 1) + ")" : what;
    out.push_back(whole_rule<T>{*this, at}.of(value));
  });
  return out;
}

struct command {
  const char *name;
  int min_args, max_args;
  const char *usage;
  octave_value_list (*run)(const call &);
};

/* Commands a test build adds (tests/gateway_hooks.cc); none when shipped. */
extern const command extra_commands[];

inline octave_value_list one(const octave_value &v) { return octave_value_list(v); }
inline octave_value_list none() { return octave_value_list(); }

} // namespace kinloop_gateway

#endif /* KINLOOP_GATEWAY_H */
