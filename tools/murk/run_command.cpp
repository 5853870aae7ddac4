// `murk run CASE -o OUT.h5`: the case's sweep, written as detection maps.
#include "cases/input/case_reader.hpp"
#include "cases/input/layout_case.hpp"
#include "cases/output/xdmf_writer.hpp"
#include "cases/sweep/sweep_merge.hpp"
#include "cases/sweep/sweep_runner.hpp"
#include "geometry/input_error.hpp"
#include "tools/murk/commands.hpp"
#include "tools/murk/mpi_ranks.hpp"

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <map>
#include <filesystem>
#include <thread>
#include <algorithm>

#include <omp.h>

namespace murk::cli {

double parse_memory_size(const std::string& text, const std::string& option) {
    static const std::map<std::string, double> units = {
        {"B", 1.0},           {"kB", 1e3},           {"MB", 1e6},           {"GB", 1e9},          {"TB", 1e12},
        {"KiB", 1024.0},      {"MiB", 1048576.0},    {"GiB", 1073741824.0}, {"TiB", 1099511627776.0}};
    const char* begin = text.c_str();
    char* end = nullptr;
    const double number = std::strtod(begin, &end);
    std::string unit(end);
    unit.erase(0, unit.find_first_not_of(' '));
    const auto it = units.find(unit);
    if (end == begin || it == units.end() || !std::isfinite(number) || number <= 0)
        throw InputError(option + ": '" + text + "' is not a memory size; write a positive number and a unit, e.g. \"8 GiB\" or \"500 MB\"");
    return number * it->second;
}

// The part file of a rank of an MPI run (cases/sweep/work_shares.hpp deals the shares).
std::string part_path(const std::string& output_path, int rank, int size) {
    return output_path + ".rank-" + std::to_string(rank + 1) + "-of-" + std::to_string(size);
}

// `mpirun -np R murk run CASE -o OUT.h5`: rank r computes share r+1 of R into its part
// file, exactly as a job-array task would, and rank 0 merges the parts into OUT.h5 and
// removes them. A stopped or failed run keeps the parts and their journals; the same
// command with --resume (and the same R) finishes them. Why part files and a merge,
// rather than gathering every point to rank 0 or parallel HDF5: each rank's journal then
// works as a single run's does (kill-safe, resumable, locked), nothing of a rank's
// work travels until the end, and the merge is the one job arrays use, tested once.
int run_on_ranks(const CaseSpec& spec, RunOptions options, const RunArgs& args) {
    const Ranks& r = ranks();
    if (options.share_count > 1) throw InputError("--shard: an MPI run shares the points among its ranks itself");
    if (options.estimate_only) {
        if (r.rank == 0) run_sweep(spec, options);
        return on_every_rank(true) ? 0 : 1;
    }
    const std::string output = options.output_path;
    if (!options.force && std::filesystem::exists(output))
        throw InputError(output + " exists; pass --force to replace it");
    options.share_index = std::size_t(r.rank);
    options.share_count = std::size_t(r.size);
    options.output_path = part_path(output, r.rank, r.size);
    options.quiet = options.quiet || r.rank != 0;  // one progress line, rank 0's
    // The cores of a host are shared among its ranks, unless the threads were set.
    if (args.threads <= 0 && !std::getenv("OMP_NUM_THREADS"))
        omp_set_num_threads(std::max(1, int(std::thread::hardware_concurrency()) / std::max(1, r.local_size)));
    // A part finished before an interruption elsewhere is kept as it is.
    const bool done = options.resume && std::filesystem::exists(options.output_path) &&
                      !std::filesystem::exists(journal_path(options.output_path));
    if (!done) {
        if (options.resume && !std::filesystem::exists(journal_path(options.output_path))) options.resume = false;
        options.force = true;  // the part is this run's own; an old one from a finished run is stale
        if (run_sweep(spec, options) != RunOutcome::complete) {
            on_every_rank(false);
            if (r.rank == 0)
                std::fprintf(stderr, "murk: interrupted; the ranks keep their parts beside %s; run the same mpirun "
                                     "command with --resume to finish\n", output.c_str());
            return 1;
        }
    }
    if (!on_every_rank(true)) {
        if (r.rank == 0)
            std::fprintf(stderr, "murk: interrupted; the ranks keep their parts beside %s; run the same mpirun "
                                 "command with --resume to finish\n", output.c_str());
        return 1;
    }
    if (r.rank == 0) {
        MergeOptions merge;
        merge.output_path = output;
        merge.command_line = options.command_line;
        merge.force = args.force;
        merge.quiet = args.quiet;
        std::vector<std::string> parts;
        for (int k = 0; k < r.size; ++k) parts.push_back(part_path(output, k, r.size));
        merge_results(parts, merge);
        for (const std::string& p : parts) std::filesystem::remove(p);
        for (const std::string& p : parts) std::filesystem::remove(xdmf_sidecar_path(p));
    }
    return on_every_rank(true) ? 0 : 1;
}

int run_command(const RunArgs& args, const std::string& command_line) {
    if (args.threads > 0) omp_set_num_threads(args.threads);
    const CaseSpec spec = case_to_solve(read_case_file(args.case_path));
    RunOptions options;
    options.output_path = args.output_path;
    options.command_line = command_line;
    options.resume = args.resume;
    options.force = args.force;
    options.quiet = args.quiet;
    options.estimate_only = args.estimate;
    if (!args.memory_limit.empty()) options.memory_limit_bytes = parse_memory_size(args.memory_limit, "--memory-limit");
    if (!args.shard.empty()) {
        // "K/N" with 1 <= K <= N: shares are numbered from 1, as job-array tasks usually are not;
        // a script passes $((SLURM_ARRAY_TASK_ID + 1)) or numbers its array from 1.
        unsigned long k = 0, n = 0;
        char tail = 0;
        if (std::sscanf(args.shard.c_str(), "%lu/%lu%c", &k, &n, &tail) != 2 || n < 1 || k < 1 || k > n || n > 100000)
            throw InputError("--shard: '" + args.shard + "' is not a share; write K/N with 1 <= K <= N, e.g. 3/8");
        options.share_index = k - 1;
        options.share_count = n;
    }
    if (options.output_path.empty() && !options.estimate_only)
        throw InputError("murk run: -o OUT.h5 is required (only --estimate runs without it)");
    on_stop(OnStop::exit_at_once);  // until the result file is open (cases/output/stop_request.hpp)
    if (ranks().parallel()) return run_on_ranks(spec, options, args);
    return run_sweep(spec, options) == RunOutcome::complete ? 0 : 1;
}

}  // namespace murk::cli
