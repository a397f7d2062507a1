/*
 * no_hooks.cc - the shipped gateway adds no commands of its own: the test
 * hooks (tests/gateway_hooks.cc) take this file's place in the test build.
 */
#include "gateway.h"

namespace kinloop_gateway {
const command extra_commands[] = {{nullptr, 0, 0, nullptr, nullptr}};
}
