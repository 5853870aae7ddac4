// `murk run CASE -o OUT.h5`: the case's sweep, written as detection maps.
#include "cases/input/case_reader.hpp"
#include "cases/sweep/sweep_runner.hpp"
#include "geometry/input_error.hpp"
#include "tools/murk/commands.hpp"

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <map>

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

int run_command(const RunArgs& args, const std::string& command_line) {
    if (args.threads > 0) omp_set_num_threads(args.threads);
    const CaseSpec spec = read_case_file(args.case_path);
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
    return run_sweep(spec, options) == RunOutcome::complete ? 0 : 1;
}

}  // namespace murk::cli
