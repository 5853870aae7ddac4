// `murk layout CASE -o OUT.h5`: the case's [[layout]] tables compared on the same
// targets (cases/layout/layout_run.hpp).
#include "cases/input/case_reader.hpp"
#include "cases/layout/layout_run.hpp"
#include "cases/output/hdf5_file.hpp"
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
    // Nothing to keep until the result is written whole: a stop ends the run at once and
    // takes the unfinished OUT.h5.partial with it (OUT.h5 appears only complete, by rename).
    on_stop(OnStop::exit_at_once, H5Output::partial_path(args.output_path));
    run_layouts(read_case_file(args.case_path), options);
    return 0;
}

}  // namespace murk::cli
