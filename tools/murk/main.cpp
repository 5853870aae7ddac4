// The murk command line: parses arguments (the only file that includes CLI11,
// which is slow to compile) and hands each subcommand a plain options struct.
#include "geometry/input_error.hpp"
#include "geometry/message_text.hpp"
#include "geometry/internal_check.hpp"
#include "tools/murk/commands.hpp"
#include "tools/murk/mpi_ranks.hpp"

#include <CLI/CLI.hpp>
#include <cstdio>
#include <cstdlib>
#include <exception>

namespace {

std::string joined(int argc, char** argv) {
    std::string s;
    for (int i = 0; i < argc; ++i) s += (i ? " " : "") + std::string(argv[i]);
    return s;
}

}  // namespace

int main(int argc, char** argv) {
    murk::cli::start_ranks(argc, argv);
    CLI::App app{"murk: near-field electrosensing by boundary elements"};
    app.require_subcommand(1);

    murk::cli::VerifyArgs verify;
    auto* verify_cmd = app.add_subcommand("verify", "compare murk with exact solutions; ends with 'N passed, M failed'");
    verify_cmd->add_flag("--quick", verify.quick, "coarse meshes, no refinement study (a few seconds)");
    verify_cmd->add_option("--near-ratio", verify.near_ratio, "closed-form integrals below this distance/panel size")
        ->check(CLI::PositiveNumber);
    verify_cmd->add_option("--far-ratio", verify.far_ratio, "centroid rule beyond this distance/panel size")
        ->check(CLI::PositiveNumber);

    murk::cli::RunArgs run;
    auto* run_cmd = app.add_subcommand("run", "solve the case's sweep and write detection maps");
    run_cmd->add_option("case", run.case_path, "case file (TOML) with a [sweep] section")->required();
    run_cmd->add_option("-o,--output", run.output_path, "result file (HDF5); not needed with --estimate");
    run_cmd->add_flag("--resume", run.resume, "finish the points an interrupted run left in OUT.h5.partial");
    run_cmd->add_flag("--force", run.force, "replace an existing result file");
    run_cmd->add_flag("--quiet", run.quiet, "no progress lines");
    run_cmd->add_option("--threads", run.threads, "worker threads (default: all cores)")->check(CLI::PositiveNumber);
    run_cmd->add_flag("--estimate", run.estimate, "print the points per path, memory and time the run would take; run nothing");
    run_cmd->add_option("--shard", run.shard,
                        "K/N: compute share K of N of the points (a job-array task; join the shares with murk merge)");
    run_cmd->add_option("--memory-limit", run.memory_limit,
                        "refuse a run estimated to need more memory, e.g. \"8 GiB\" (default: 80 % of physical memory)");

    murk::cli::MergeArgs merge;
    auto* merge_cmd = app.add_subcommand("merge", "join the shares of a sweep (murk run --shard K/N) into one result");
    merge_cmd->add_option("parts", merge.parts, "result files of the shares")->required();
    merge_cmd->add_option("-o,--output", merge.output_path, "result file (HDF5)")->required();
    merge_cmd->add_flag("--partial", merge.partial, "accept missing points: they stay marked not computed");
    merge_cmd->add_flag("--force", merge.force, "replace an existing result file");
    merge_cmd->add_flag("--quiet", merge.quiet, "print nothing but errors");

    murk::cli::InspectArgs inspect;
    auto* inspect_cmd = app.add_subcommand("inspect", "a readable summary of a result file");
    inspect_cmd->add_option("file", inspect.path, "result file (HDF5) of murk run or murk solve")->required();

    murk::cli::SolveArgs solve;
    auto* solve_cmd = app.add_subcommand("solve", "solve one configuration of a case: baseline, with objects, difference");
    solve_cmd->add_option("case", solve.case_path, "case file (TOML)")->required();
    solve_cmd->add_option("-o,--output", solve.output_path, "result file (HDF5)")->required();
    solve_cmd->add_flag("--force", solve.force, "replace an existing result file");
    solve_cmd->add_flag("--quiet", solve.quiet, "print nothing but errors");
    solve_cmd->add_option("--threads", solve.threads, "worker threads (default: all cores)")->check(CLI::PositiveNumber);
    solve_cmd->add_option("--memory-limit", solve.memory_limit,
                          "refuse a case whose system needs more memory, e.g. \"8 GiB\" (default: 80 % of physical memory)");

    murk::cli::LayoutArgs layout;
    auto* layout_cmd = app.add_subcommand("layout", "compare the case's electrode layouts on the same targets and noise");
    layout_cmd->add_option("case", layout.case_path, "case file (TOML) with [[layout]] tables and a [sweep.grid]")->required();
    layout_cmd->add_option("-o,--output", layout.output_path, "result file (HDF5)")->required();
    layout_cmd->add_flag("--force", layout.force, "replace an existing result file");
    layout_cmd->add_flag("--quiet", layout.quiet, "print nothing but errors");
    layout_cmd->add_option("--threads", layout.threads, "worker threads (default: all cores)")->check(CLI::PositiveNumber);

    murk::cli::MeshArgs mesh;
    auto* mesh_cmd = app.add_subcommand("mesh", "mesh statistics and quality report; conversion to STL or VTK");
    mesh_cmd->add_option("input", mesh.input, "mesh file (.stl, .msh) or case file (.toml)")->required();
    mesh_cmd->add_option("--convert", mesh.convert_to, "write the mesh to this file (.stl or .vtk)");
    mesh_cmd->add_option("--file-unit", mesh.file_unit,
                         "mesh files: the length of one unit of the file's coordinates, e.g. \"1 mm\" (default: 1 m)");

    try {
        app.parse(argc, argv);
    } catch (const CLI::ParseError& e) {
        if (e.get_exit_code() == 0) return app.exit(e);  // --help
        // CLI11 quotes the offending arguments as given: one printable line of them.
        std::fprintf(stderr, "murk: %s (see murk --help)\n", murk::printable(e.what(), 200).c_str());
        return 2;
    }

    // An error ends every rank of an MPI run (the others would wait for this one),
    // after this rank has said where it happened.
    const auto fail = [](int status, const std::string& message) {
        const murk::cli::Ranks& r = murk::cli::ranks();
        if (r.parallel()) {
            std::fprintf(stderr, "murk: rank %d of %d on %s: %s\n", r.rank, r.size, r.host.c_str(), message.c_str());
            murk::cli::abort_ranks(status);
        }
        std::fprintf(stderr, "murk: %s\n", message.c_str());
        return status;
    };
    int status = 0;
    try {
        // The one way to make a correct murk fail an internal check, so that
        // tests/cli/internal_error.sh sees how such a failure reaches the user.
        MURK_CHECK(std::getenv("MURK_TEST_INTERNAL_ERROR") == nullptr, "set only by the test of internal errors");
        if (*run_cmd) status = murk::cli::run_command(run, joined(argc, argv));
        else if (*inspect_cmd) status = murk::cli::inspect_command(inspect);
        else if (*merge_cmd) status = murk::cli::merge_command(merge, joined(argc, argv));
        else if (*verify_cmd) status = murk::cli::verify_command(verify);
        else if (*solve_cmd) status = murk::cli::solve_command(solve, joined(argc, argv));
        else if (*layout_cmd) status = murk::cli::layout_command(layout, joined(argc, argv));
        else if (*mesh_cmd) status = murk::cli::mesh_command(mesh);
    } catch (const murk::InputError& e) {
        return fail(2, e.what());
    } catch (const murk::InternalError& e) {  // "internal error at FILE:LINE: CONDITION (WHY)"
        return fail(1, e.what());
    } catch (const std::bad_alloc&) {
        return fail(1, "out of memory (try a coarser mesh: a larger panel_size)");
    } catch (const std::exception& e) {
        return fail(1, std::string("failed: ") + e.what());
    }
    murk::cli::finish_ranks();
    return status;
}
