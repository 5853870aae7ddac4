// `murk run CASE -o OUT.h5`: the case's sweep, written as detection maps.
#include "cases/input/case_reader.hpp"
#include "cases/sweep/sweep_runner.hpp"
#include "tools/murk/commands.hpp"

#include <omp.h>

namespace murk::cli {

int run_command(const RunArgs& args, const std::string& command_line) {
    if (args.threads > 0) omp_set_num_threads(args.threads);
    const CaseSpec spec = read_case_file(args.case_path);
    RunOptions options;
    options.output_path = args.output_path;
    options.command_line = command_line;
    options.resume = args.resume;
    options.force = args.force;
    options.quiet = args.quiet;
    install_stop_handlers();
    return run_sweep(spec, options) == RunOutcome::complete ? 0 : 1;
}

}  // namespace murk::cli
