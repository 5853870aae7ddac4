#pragma once
// What the command line asks of a sweep run (murk run's options).
#include <cstddef>
#include <string>

namespace murk {

struct RunOptions {
    std::string output_path;   // OUT.h5
    std::string command_line;  // written into the file
    bool resume = false;
    bool force = false;
    bool quiet = false;
    bool estimate_only = false;    // print the plan and its cost, run nothing
    double memory_limit_bytes = 0;  // refuse a run estimated to need more; 0: solver/memory_budget.hpp
    std::size_t share_index = 0, share_count = 1;  // --shard K/N: share K-1 of N (cases/sweep/work_shares.hpp)
};

}  // namespace murk
