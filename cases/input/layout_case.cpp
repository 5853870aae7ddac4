#include "cases/input/layout_case.hpp"

#include "geometry/internal_check.hpp"

#include <algorithm>

namespace murk {

std::vector<std::string> layout_sensor_electrodes(const LayoutSpec& layout) {
    if (layout.reading != LayoutReading::pairs) return layout.sensors;
    std::vector<std::string> names;
    for (const auto& [a, b] : layout.pairs)
        for (const std::string& n : {a, b})
            if (std::find(names.begin(), names.end(), n) == names.end()) names.push_back(n);
    return names;
}

CaseSpec layout_case(const CaseSpec& spec, std::size_t index) {
    MURK_CHECK(spec.robot && index < spec.layouts.size(), "layouts exist only on a robot, and the index is one of them");
    const LayoutSpec& layout = spec.layouts[index];
    CaseSpec out = spec;
    out.layouts.clear();
    if (out.sweep) out.sweep->electrode_pairs = false;
    const auto site = [&](const std::string& name) {
        for (const ElectrodeSpec& e : spec.robot->electrodes)
            if (e.name == name) return e;
        MURK_CHECK(false, "the reader checked every name a layout uses");
        return ElectrodeSpec{};
    };
    std::vector<ElectrodeSpec> electrodes;
    for (const LayoutEmitter& em : layout.emitters) {
        ElectrodeSpec e = site(em.electrode);
        e.drive = em.drive;
        e.value = em.value;
        electrodes.push_back(e);
    }
    for (const std::string& name : layout_sensor_electrodes(layout)) {
        ElectrodeSpec e = site(name);
        e.drive = layout.reading == LayoutReading::current ? ElectrodeDrive::fixed_potential : ElectrodeDrive::floating;
        e.value = layout.reading == LayoutReading::current ? layout.sensor_potential_V : 0.0;
        electrodes.push_back(e);
    }
    if (layout.reading == LayoutReading::reference) {
        ElectrodeSpec e = site(layout.reference);
        e.drive = ElectrodeDrive::floating;
        e.value = 0.0;
        electrodes.push_back(e);
    }
    out.robot->electrodes = std::move(electrodes);
    return out;
}

CaseSpec case_to_solve(const CaseSpec& spec) { return spec.layouts.empty() ? spec : layout_case(spec, 0); }

}  // namespace murk
