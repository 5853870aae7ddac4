#pragma once
// The ranks of an MPI run, `mpirun -np R murk run ...`: each rank computes a
// share of the sweep (as a job-array task would, cases/sweep/work_shares.hpp)
// into a part file, and rank 0 merges the parts into the one result. murk is an
// ordinary single process when it was not started by mpirun, or was built
// without MPI (then these do nothing and there is one rank).
#include <string>

namespace murk::cli {

struct Ranks {
    int rank = 0, size = 1;
    int local_size = 1;  // ranks on this host
    std::string host;
    bool parallel() const { return size > 1; }
};

// Starts MPI when the process was launched by an MPI launcher (its environment
// says so); otherwise, and without MPI, one rank.
Ranks start_ranks(int& argc, char**& argv);
void finish_ranks();
// True on every rank when `mine` is true on every rank (a collective: all ranks call it).
bool on_every_rank(bool mine);
// Ends every rank at once with `status`, after this one said why.
[[noreturn]] void abort_ranks(int status);

// This process's ranks (one when there is no MPI run).
const Ranks& ranks();

}  // namespace murk::cli
