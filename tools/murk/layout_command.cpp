// `murk layout CASE -o OUT.h5`: the case's [[layout]] tables compared on the same
// targets (cases/layout/layout_run.hpp).
#include "cases/input/case_reader.hpp"
#include "cases/layout/layout_run.hpp"
#include "cases/output/stop_request.hpp"
#include "tools/murk/commands.hpp"

#include <omp.h>

namespace murk::cli {

int layout_command(const LayoutArgs& args, const std::string& command_line) {
    if (args.threads > 0) omp_set_num_threads(args.threads);
    LayoutOptions options;
    options.output_path = args.output_path;
    options.command_line = command_line;
    options.force = args.force;
    options.quiet = args.quiet;
    on_stop(OnStop::exit_at_once);  // nothing to keep until the result is written whole
    run_layouts(read_case_file(args.case_path), options);
    return 0;
}

}  // namespace murk::cli
