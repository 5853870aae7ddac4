#pragma once
// Progress of a sweep on stderr: a live line on a terminal, a plain line every
// 10 s otherwise (a batch job's log), nothing when quiet.
#include <chrono>
#include <cstddef>

namespace murk {

class SweepProgress {
public:
    SweepProgress(std::size_t total, std::size_t already_done, bool quiet);
    void point_done();

private:
    using Clock = std::chrono::steady_clock;
    std::size_t total_, done_, start_done_;
    bool quiet_, tty_;
    Clock::time_point start_ = Clock::now();
    double last_print_ = -1e9;
};

}  // namespace murk
