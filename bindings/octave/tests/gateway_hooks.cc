/*
 * gateway_hooks.cc - commands only the test build of the Octave gateway
 * has: models made through the counting allocator of tests/support.c, whose
 * every allocation a test can see and, on request, refuse.
 */
#include "gateway.h"

#include <cstring>

extern "C" {
#include "support.h"
}

namespace kinloop_gateway {
namespace {

/* Kept after the model is freed so that a test can see every byte came
 * back; std::map keeps each record at one address for the model's life. */
std::map<int, counting_alloc> &records() {
  static std::map<int, counting_alloc> *r = new std::map<int, counting_alloc>;
  return *r;
}

/* The record is in place before the library first calls the hook; it is
 * keyed by the id the model will get. */
counting_alloc &new_record(const call &c, int i) {
  int id = static_cast<int>(table().made.size());
  counting_alloc &a = records()[id];
  std::memset(&a, 0, sizeof a);
  if (c.given(i))
    a.fail_at = c.whole<int>(c.arg(i), "fail_at");
  return a;
}

octave_value_list made(kl_model *m, counting_alloc &a, const kl_io_error *e) {
  if (m == nullptr) {
    for (auto it = records().begin(); it != records().end(); it++)
      if (&it->second == &a) {
        records().erase(it);
        break;
      }
    raise_status(e != nullptr && e->status != KL_OK ? e->status : KL_ENOMEM,
                 e != nullptr && e->message[0] ? e->message : "out of memory");
  }
  entry held;
  held.model = m;
  return one(new_id(kind::model, held));
}

octave_value_list cmd_model_new_with_alloc(const call &c) {
  counting_alloc &a = new_record(c, 0);
  return made(kl_model_new_with_alloc(counting_alloc_fn, &a), a, nullptr);
}

octave_value_list cmd_model_read_with_alloc(const call &c) {
  std::string text = c.text(c.arg(0), "text");
  counting_alloc &a = new_record(c, 1);
  kl_io_error e = kl_io_error();
  e.size = sizeof e;
  kl_model *m = kl_model_read_with_alloc(text.data(), text.size(), counting_alloc_fn, &a, &e);
  return made(m, a, &e);
}

counting_alloc &record_of(const call &c) {
  int id = c.whole<int>(c.arg(0), "model id");
  auto it = records().find(id);
  if (it == records().end())
    raise("bad_handle", c.name + ": model " + str(id) + " was not made with a counting "
                                                          "allocator");
  return it->second;
}

octave_value_list cmd_allocations(const call &c) {
  const counting_alloc &a = record_of(c);
  octave_scalar_map st;
  st.assign("calls", static_cast<double>(a.calls));
  st.assign("live", static_cast<double>(a.live));
  st.assign("live_bytes", static_cast<double>(a.live_bytes));
  st.assign("fail_at", static_cast<double>(a.fail_at));
  st.assign("failed", static_cast<double>(a.failed));
  return one(st);
}

octave_value_list cmd_set_fail_at(const call &c) {
  counting_alloc &a = record_of(c);
  a.fail_at = c.whole<int>(c.arg(1), "fail_at");
  return none();
}

} // namespace

const command extra_commands[] = {
    {"model_new_with_alloc", 0, 1, "([fail_at])", cmd_model_new_with_alloc},
    {"model_read_with_alloc", 1, 2, "(text, [fail_at])", cmd_model_read_with_alloc},
    {"allocations", 1, 1, "(model)", cmd_allocations},
    {"set_fail_at", 2, 2, "(model, n)", cmd_set_fail_at},
    {nullptr, 0, 0, nullptr, nullptr}};

} // namespace kinloop_gateway
