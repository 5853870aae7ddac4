#pragma once
// The [[layout]] tables of a case: candidate electrode layouts on one robot hull,
// compared by `murk layout`. The hull's electrodes ([[robot.electrode]]) are sites
// defined once; a layout names which sites emit (with their drive), which sense,
// and how the sensors are read. Sites a layout does not name are bare hull there.
#include "solver/scene.hpp"

#include <string>
#include <utility>
#include <vector>

namespace murk {

// How a layout's sensors are read (cases/README.md, [[layout]]).
enum class LayoutReading {
    reference,  // potential of each sensor minus that of one floating reference electrode
    pairs,      // the differences of pairs the user names: V(first) - V(second)
    current,    // current into each sensor held at one fixed potential
};

// One emitter of a layout: a site and its drive (current into the water or potential).
struct LayoutEmitter {
    std::string electrode;  // a [[robot.electrode]] name
    ElectrodeDrive drive = ElectrodeDrive::current;  // current or voltage
    double value = 0.0;                              // A or V
};

struct LayoutSpec {
    std::string name;  // unique; letters, digits, '_' and '-' (it names a result group)
    std::vector<LayoutEmitter> emitters;
    LayoutReading reading = LayoutReading::reference;
    std::vector<std::string> sensors;  // reference, current: the sensors in reading order
    std::string reference;             // reference: the floating reference electrode
    std::vector<std::pair<std::string, std::string>> pairs;  // pairs: (first, second), in order
    double sensor_potential_V = 0.0;   // current: the potential the sensors are held at
    double noise_density = 0.0;        // > 0: replaces [detection]'s amplifier noise density for
                                       // this layout (V/sqrt(Hz), or A/sqrt(Hz) for current)
    int line = 0;                      // line of the [[layout]] table
    std::string key;                   // "layout[k]"
};

}  // namespace murk
