#pragma once
// The subcommands of the murk program, each in its own file. main.cpp (the only
// file that sees CLI11) parses the command line into these plain option structs.
// Each returns the process exit status: 0 success, 1 failure while running
// (or a failed check), 2 bad input.
#include <string>
#include <vector>

namespace murk::cli {

struct VerifyArgs {
    bool quick = false;
    double near_ratio = 3.0, far_ratio = 10.0;
};
int verify_command(const VerifyArgs& args);

struct SolveArgs {
    std::string case_path;
    std::string output_path;
    bool force = false;
    bool quiet = false;
    int threads = 0;  // 0: OpenMP's default
    std::string memory_limit;  // e.g. "8 GiB"; empty: 80 % of physical memory
};
int solve_command(const SolveArgs& args, const std::string& command_line);

struct LayoutArgs {
    std::string case_path;
    std::string output_path;
    bool force = false;
    bool quiet = false;
    int threads = 0;  // 0: OpenMP's default
};
int layout_command(const LayoutArgs& args, const std::string& command_line);

struct MeshArgs {
    std::string input;       // a mesh file (STL, MSH) or a case file (TOML)
    std::string convert_to;  // optional output mesh (STL or VTK), empty for none
    std::string file_unit;   // mesh files: the length of one unit of the file's coordinates, e.g. "1 mm"; default 1 m
};
int mesh_command(const MeshArgs& args);

struct InspectArgs {
    std::string path;  // a result file of murk run or murk solve
};
int inspect_command(const InspectArgs& args);

struct RunArgs {
    std::string case_path;
    std::string output_path;
    int threads = 0;        // 0: OpenMP's default
    bool resume = false;
    bool force = false;
    bool quiet = false;
    bool estimate = false;     // print the plan and its cost only
    std::string memory_limit;  // e.g. "8 GiB"; empty: 80 % of physical memory
    std::string shard;         // "K/N": compute share K of N (a job-array task); empty: all
};

struct MergeArgs {
    std::vector<std::string> parts;  // result files of murk run --shard K/N
    std::string output_path;
    bool partial = false;  // accept missing points (left "not computed")
    bool force = false;
    bool quiet = false;
};
int merge_command(const MergeArgs& args, const std::string& command_line);

// Bytes in a memory size written with its unit: "512 MiB", "8 GiB", "2.5 GB",
// "1e9 B". Throws InputError naming the option for anything else.
double parse_memory_size(const std::string& text, const std::string& option);
int run_command(const RunArgs& args, const std::string& command_line);

}  // namespace murk::cli
