#include "cases/sweep/stop_request.hpp"

#include <atomic>
#include <csignal>

namespace murk {

namespace {
std::atomic<bool> g_stop_requested{false};
extern "C" void request_stop(int) { g_stop_requested = true; }
}  // namespace

void install_stop_handlers() {
    std::signal(SIGINT, request_stop);
    std::signal(SIGTERM, request_stop);
}

bool stop_requested() { return g_stop_requested; }

}  // namespace murk
