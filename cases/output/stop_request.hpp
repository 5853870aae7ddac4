#pragma once
// What SIGINT and SIGTERM do to a run, by what it has to lose. Before a run has
// anything worth keeping (reading, meshing, assembling and factoring, solving a
// single configuration) it stops at once, saying so, and nothing is left behind
// (no output file exists yet). Once a sweep's result file is open, a stop is a
// request: the points in progress finish and are written, and the partial file
// stays for --resume. While a finished result is being written, a stop waits
// until the file is complete.
#include <string>

namespace murk {

enum class OnStop {
    exit_at_once,  // nothing to keep: one line on stderr, exit status 128 + signal
    finish_work,   // set the request; the run stops at its next safe point
};

// Installs the handlers (idempotent) and sets what a stop does from now on. With
// exit_at_once, a file named by `remove_on_exit` (a journal this run just
// started, with nothing in it yet) goes too. SIGXFSZ is ignored, so that a
// file-size limit makes a write fail (and the run say so) rather than end it.
void on_stop(OnStop mode, const std::string& remove_on_exit = {});
bool stop_requested();
// The signal that asked for the stop (0 if none), for the exit status 128 + signal.
int stop_signal();

}  // namespace murk
