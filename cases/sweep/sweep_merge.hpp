#pragma once
// `murk merge`: the shares of a sweep (murk run --shard K/N, one per job-array
// task) joined into one result file, the same in every dataset as a run of the
// whole sweep, with the analysis (/detection, /falloff) and the sidecar made from
// the joined points. Refused, naming the files: parts of different cases, murk
// versions or share counts, two parts of one share, a point computed in two
// parts, and (unless partial) points in no part, with the shares missing.
// It streams: the perturbations are copied point by point, so parts larger than
// memory merge; only one value per point per dataset is held at once.
#include <string>
#include <vector>

namespace murk {

struct MergeOptions {
    std::string output_path;
    std::string command_line;  // added to the result's history
    bool partial = false;      // missing points stay "not computed"
    bool force = false;
    bool quiet = false;
};

void merge_results(const std::vector<std::string>& parts, const MergeOptions& options);

}  // namespace murk
