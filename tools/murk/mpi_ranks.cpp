#include "tools/murk/mpi_ranks.hpp"

#include <unistd.h>

#include <cstdlib>

#ifdef MURK_WITH_MPI
#include <mpi.h>
#endif

namespace murk::cli {

namespace {

Ranks g_ranks;
bool g_started = false;

std::string host_name() {
    char name[256] = {};
    return ::gethostname(name, sizeof name - 1) == 0 ? std::string(name) : std::string("an unknown host");
}

// Open MPI's and PMIx's launchers put these in every rank's environment; a plain
// start of murk has none of them, and then MPI is not started at all.
bool launched_by_mpi() {
    return std::getenv("OMPI_COMM_WORLD_SIZE") || std::getenv("PMIX_RANK") || std::getenv("PMI_SIZE");
}

}  // namespace

Ranks start_ranks(int& argc, char**& argv) {
    g_ranks.host = host_name();
#ifdef MURK_WITH_MPI
    if (launched_by_mpi()) {
        // Funneled: only the main thread calls MPI; the OpenMP threads compute.
        int provided = 0;
        MPI_Init_thread(&argc, &argv, MPI_THREAD_FUNNELED, &provided);
        g_started = true;
        MPI_Comm_rank(MPI_COMM_WORLD, &g_ranks.rank);
        MPI_Comm_size(MPI_COMM_WORLD, &g_ranks.size);
        MPI_Comm local;
        MPI_Comm_split_type(MPI_COMM_WORLD, MPI_COMM_TYPE_SHARED, 0, MPI_INFO_NULL, &local);
        MPI_Comm_size(local, &g_ranks.local_size);
        MPI_Comm_free(&local);
    }
#else
    (void)argc, (void)argv;
#endif
    return g_ranks;
}

void finish_ranks() {
#ifdef MURK_WITH_MPI
    if (g_started) MPI_Finalize();
#endif
    g_started = false;
}

bool on_every_rank(bool mine) {
#ifdef MURK_WITH_MPI
    if (g_started) {
        int in = mine ? 1 : 0, all = 0;
        MPI_Allreduce(&in, &all, 1, MPI_INT, MPI_MIN, MPI_COMM_WORLD);
        return all == 1;
    }
#endif
    return mine;
}

void abort_ranks(int status) {
#ifdef MURK_WITH_MPI
    if (g_started) MPI_Abort(MPI_COMM_WORLD, status);
#endif
    std::exit(status);
}

const Ranks& ranks() { return g_ranks; }

}  // namespace murk::cli
