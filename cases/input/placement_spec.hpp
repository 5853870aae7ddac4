#pragma once
// The [placement] table of a case (murk layout only; cases/README.md, "[placement]"):
// choose `budget` sensors out of candidate sites on the hull, with the emitters of one
// [[layout]], by a criterion over murk layout's targets. murk solve and murk run ignore it.
#include <optional>
#include <string>
#include <vector>

namespace murk {

enum class PlacementGoal {
    detectable_region,  // "detectable_area" (planar grid) or "detectable_volume" (grid with w)
    mean_log_det,       // "mean_log_det": D-optimal localization (cases/design/sensor_placement.hpp)
};

struct PlacementSpec {
    std::size_t drive = 0;                // index of the [[layout]] whose emitters drive and whose
                                          // reference every candidate is read against
    std::vector<std::string> candidates;  // [[robot.electrode]] site names (candidate_rings are added
                                          // to the robot's sites as c01, c02, ... by the reader)
    bool generated_rings = false;         // the candidates came from candidate_rings
    int budget = 1;                       // K, 1 .. candidates
    PlacementGoal goal = PlacementGoal::detectable_region;
    std::optional<double> target_size_m;  // one of the target sizes; unset: the largest
    int line = 0;                         // line of the [placement] table
};

}  // namespace murk
