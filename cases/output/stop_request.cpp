#include "cases/output/stop_request.hpp"

#include <unistd.h>

#include <atomic>
#include <csignal>
#include <cstring>

namespace murk {

namespace {

std::atomic<int> g_signal{0};
std::atomic<int> g_mode{static_cast<int>(OnStop::exit_at_once)};
// The file to remove on an immediate exit: a fixed buffer, as a handler may not allocate.
char g_remove[4096] = {};
std::atomic<bool> g_remove_set{false};

extern "C" void handle_stop(int signal) {
    g_signal = signal;
    if (g_mode.load() == static_cast<int>(OnStop::exit_at_once)) {
        // Only async-signal-safe calls here: unlink(2), write(2) and _exit(2).
        if (g_remove_set.load()) ::unlink(g_remove);
        static const char message[] = "murk: stopped by a signal before anything was written\n";
        const ssize_t ignored = write(STDERR_FILENO, message, sizeof message - 1);
        (void)ignored;
        _exit(128 + signal);
    }
}

}  // namespace

void on_stop(OnStop mode, const std::string& remove_on_exit) {
    g_remove_set = false;
    if (mode == OnStop::exit_at_once && !remove_on_exit.empty() && remove_on_exit.size() < sizeof g_remove) {
        std::memcpy(g_remove, remove_on_exit.c_str(), remove_on_exit.size() + 1);
        g_remove_set = true;
    }
    std::signal(SIGXFSZ, SIG_IGN);
    g_mode = static_cast<int>(mode);
    std::signal(SIGINT, handle_stop);
    std::signal(SIGTERM, handle_stop);
}

bool stop_requested() { return g_signal.load() != 0; }

int stop_signal() { return g_signal.load(); }

}  // namespace murk
