#include "cases/sweep/sweep_progress.hpp"

#include <unistd.h>

#include <algorithm>
#include <cstdio>

namespace murk {

SweepProgress::SweepProgress(std::size_t total, std::size_t already_done, bool quiet)
    : total_(total), done_(already_done), start_done_(already_done), quiet_(quiet), tty_(isatty(STDERR_FILENO)) {}

void SweepProgress::point_done() {
    ++done_;
    if (quiet_) return;
    const double elapsed = std::chrono::duration<double>(Clock::now() - start_).count();
    if (!tty_ && elapsed - last_print_ < 10.0 && done_ < total_) return;
    last_print_ = elapsed;
    const double rate = (done_ - start_done_) / std::max(elapsed, 1e-9);
    const double left = rate > 0 ? (total_ - done_) / rate : 0.0;
    std::fprintf(stderr, "%spoints %zu/%zu, %.2f points/s, %.0f s left%s", tty_ ? "\r" : "", done_, total_, rate, left,
                 tty_ ? "   " : "\n");
    if (tty_ && done_ == total_) std::fprintf(stderr, "\n");
}

}  // namespace murk
