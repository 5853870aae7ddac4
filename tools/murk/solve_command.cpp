// `murk solve CASE -o OUT.h5`: one configuration of a case (cases/solve/solve_run.hpp).
#include "cases/input/case_reader.hpp"
#include "cases/solve/solve_run.hpp"
#include "tools/murk/commands.hpp"

#include <omp.h>

namespace murk::cli {

int solve_command(const SolveArgs& args, const std::string& command_line) {
    if (args.threads > 0) omp_set_num_threads(args.threads);
    SolveOptions options;
    options.output_path = args.output_path;
    options.command_line = command_line;
    options.force = args.force;
    options.quiet = args.quiet;
    if (!args.memory_limit.empty()) options.memory_limit_bytes = parse_memory_size(args.memory_limit, "--memory-limit");
    run_solve(read_case_file(args.case_path), options);
    return 0;
}

}  // namespace murk::cli
