#include "cases/output/stop_request.hpp"

#include <unistd.h>

#include <atomic>
#include <csignal>

namespace murk {

namespace {

std::atomic<int> g_signal{0};
std::atomic<int> g_mode{static_cast<int>(OnStop::exit_at_once)};

extern "C" void handle_stop(int signal) {
    g_signal = signal;
    if (g_mode.load() == static_cast<int>(OnStop::exit_at_once)) {
        // Only async-signal-safe calls here: write(2) and _exit(2).
        static const char message[] = "murk: stopped by a signal before anything was written\n";
        const ssize_t ignored = write(STDERR_FILENO, message, sizeof message - 1);
        (void)ignored;
        _exit(128 + signal);
    }
}

}  // namespace

void on_stop(OnStop mode) {
    g_mode = static_cast<int>(mode);
    std::signal(SIGINT, handle_stop);
    std::signal(SIGTERM, handle_stop);
}

bool stop_requested() { return g_signal.load() != 0; }

int stop_signal() { return g_signal.load(); }

}  // namespace murk
