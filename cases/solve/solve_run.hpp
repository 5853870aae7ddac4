#pragma once
// `murk solve`: one configuration of a case, without and with its objects, written
// to HDF5 (cases/solve/solve_output.hpp, probe_output.hpp) with an XDMF sidecar,
// and summarized on stdout unless quiet.
#include "cases/input/case_spec.hpp"

#include <string>

namespace murk {

struct SolveOptions {
    std::string output_path;
    std::string command_line;  // written into the file
    bool force = false;        // replace an existing result
    bool quiet = false;
    double memory_limit_bytes = 0;  // refuse a case whose system needs more; 0: a share of physical memory
};

void run_solve(const CaseSpec& spec, const SolveOptions& options);

}  // namespace murk
