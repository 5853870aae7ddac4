#include "cases/layout/layout_readout.hpp"

#include "cases/input/layout_case.hpp"
#include "geometry/internal_check.hpp"

#include <algorithm>

namespace murk {

LayoutReadout layout_readout(const LayoutSpec& layout, const FixedPart<double>& fixed) {
    const SystemLayout& sys = fixed.layout();
    const Scene<double>& scene = fixed.scene();
    const auto electrode = [&](const std::string& name) {
        for (std::size_t e = 0; e < scene.electrodes.size(); ++e)
            if (scene.electrodes[e].name == name) return static_cast<Eigen::Index>(e);
        MURK_CHECK(false, "layout_case put every electrode of the layout into the scene");
        return Eigen::Index{0};
    };
    // The potential of an electrode is its own unknown.
    const auto potential = [&](const std::string& name) {
        Eigen::RowVectorXd r = Eigen::RowVectorXd::Zero(fixed.size());
        r(sys.electrode_offset + electrode(name)) = 1.0;
        return r;
    };
    LayoutReadout out;
    std::vector<Eigen::RowVectorXd> rows;
    switch (layout.reading) {
        case LayoutReading::reference:
            out.units = "V";
            for (const std::string& s : layout.sensors) {
                rows.push_back(potential(s) - potential(layout.reference));
                out.names.push_back(s + "-" + layout.reference);
            }
            break;
        case LayoutReading::pairs:
            out.units = "V";
            for (const auto& [a, b] : layout.pairs) {
                rows.push_back(potential(a) - potential(b));
                out.names.push_back(a + "-" + b);
            }
            break;
        case LayoutReading::current:
            // The current into the water through a held electrode: sigma_w times the
            // area-weighted sum of q = j / sigma_w over its panels (as the sweep reads it).
            out.units = "A";
            for (const std::string& s : layout.sensors) {
                const Eigen::Index e = electrode(s);
                Eigen::RowVectorXd r = Eigen::RowVectorXd::Zero(fixed.size());
                for (std::size_t k = 0; k < scene.surfaces.size(); ++k) {
                    if (sys.surfaces[k].two_sided) continue;
                    for (std::size_t t = 0; t < scene.surfaces[k].mesh.size(); ++t)
                        if (scene.surfaces[k].panel_electrode[t] == e)
                            r(sys.surfaces[k].offset + static_cast<Eigen::Index>(t)) =
                                scene.water_conductivity * scene.surfaces[k].mesh.area(t);
                }
                rows.push_back(r);
                out.names.push_back(s);
            }
            break;
    }
    out.rows.resize(static_cast<Eigen::Index>(rows.size()), fixed.size());
    for (std::size_t k = 0; k < rows.size(); ++k) out.rows.row(static_cast<Eigen::Index>(k)) = rows[k];
    return out;
}

}  // namespace murk
