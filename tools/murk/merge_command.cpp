// `murk merge PARTS... -o OUT.h5`: the shares of a sweep joined (cases/sweep/sweep_merge.hpp).
#include "cases/sweep/sweep_merge.hpp"
#include "tools/murk/commands.hpp"

namespace murk::cli {

int merge_command(const MergeArgs& args, const std::string& command_line) {
    MergeOptions options;
    options.output_path = args.output_path;
    options.command_line = command_line;
    options.partial = args.partial;
    options.force = args.force;
    options.quiet = args.quiet;
    merge_results(args.parts, options);
    return 0;
}

}  // namespace murk::cli
