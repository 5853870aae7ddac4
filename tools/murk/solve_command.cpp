// `murk solve CASE -o OUT.h5`: one configuration of a case (cases/solve/solve_run.hpp).
#include "cases/input/case_reader.hpp"
#include "cases/input/layout_case.hpp"
#include "cases/output/stop_request.hpp"
#include "cases/solve/solve_run.hpp"
#include "tools/murk/commands.hpp"

#include <omp.h>

#include <cstdio>

namespace murk::cli {

int solve_command(const SolveArgs& args, const std::string& command_line) {
    if (args.threads > 0) omp_set_num_threads(args.threads);
    SolveOptions options;
    options.output_path = args.output_path;
    options.command_line = command_line;
    options.force = args.force;
    options.quiet = args.quiet;
    if (!args.memory_limit.empty()) options.memory_limit_bytes = parse_memory_size(args.memory_limit, "--memory-limit");
    on_stop(OnStop::exit_at_once);  // nothing to keep until the result is written
    run_solve(case_to_solve(read_case_file(args.case_path)), options);
    if (stop_requested()) {  // arrived while the finished result was written: it is complete
        std::fprintf(stderr, "murk: stopped by a signal; the result %s was complete and is kept\n",
                     args.output_path.c_str());
        return 128 + stop_signal();
    }
    return 0;
}

}  // namespace murk::cli
