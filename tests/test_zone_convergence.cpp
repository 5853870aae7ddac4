// Convergence of the electric image as a refinement zone's panels shrink: a
// small conducting sphere (radius 1.5 mm) 3 mm from the flank of a fish-like body, solved with
// a zone on the flank facing it at panel sizes 6, 3, 1.5 and 0.75 mm (halving).
// No reference value is assumed: each level is an independent solve on its own
// mesh, and the test asserts that the change from one level to the next shrinks,
// as it must when the discretization converges (a Cauchy sequence; for
// piecewise-constant collocation the error falls at least like the panel size,
// common practice for boundary elements).
#include "cases/input/case_reader.hpp"
#include "cases/scene/scene_builder.hpp"
#include "solver/bem_system.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

using namespace murk;

namespace {

struct Image {
    std::size_t panels = 0;
    double peak = 0.0;      // V, largest |change of transdermal voltage| over the skin
    double at_flank = 0.0;  // V, the change on the panel nearest the skin point facing the sphere
};

// The fish's image of the sphere with one zone of `zone_size` on the flank.
Image image_with_zone(const std::string& zone_size) {
    // 15 cm fish centred at the origin, nose toward +x: 0.3 of the length behind
    // the nose (x = 3 cm) the built-in outline is 0.05 * 15 cm = 7.5 mm wide, so
    // the flank faces +y at (3 cm, 7.5 mm, 0). The sphere (radius 1.5 mm) is centred
    // at y = 1.2 cm: its surface is 3 mm from the skin.
    const std::string text = R"(title = "zone convergence"
[water]
conductivity = "100 uS/cm"
[mesh]
panel_size = "7 mm"
[[mesh.zone]]
centre = ["3 cm", "7.5 mm", "0 cm"]
radius = "4 mm"
panel_size = ")" + zone_size + R"("
[fish]
length = "15 cm"
interior_conductivity = "1 S/m"
skin_resistance = "0.25 ohm*m^2"
[fish.organ]
from = 0.15
to = 0.85
points = 15
current = "5 uA"
[[object]]
name = "prey"
shape = "sphere"
radius = "1.5 mm"
position = ["3 cm", "1.2 cm", "0 cm"]
conductivity = "0.5 S/m"
panel_size = "0.5 mm"
)";
    const CaseSpec spec = read_case_text(text, "zone.toml");
    const QuadratureOptions quad = quadrature_options(spec);
    const Scene<double> before = build_scene<double>(spec, false);
    const Scene<double> after = build_scene<double>(spec, true);
    const SurfaceSolution<double> a = solve_scene(before, quad).surfaces[0];
    const SurfaceSolution<double> b = solve_scene(after, quad).surfaces[0];
    const TriangleMesh& skin = after.surfaces[0].mesh;
    Image image;
    image.panels = skin.size();
    double nearest = 1e300;
    for (std::size_t k = 0; k < skin.size(); ++k) {
        const double change = (b.inner_potential(k) - b.outer_potential(k)) - (a.inner_potential(k) - a.outer_potential(k));
        image.peak = std::max(image.peak, std::abs(change));
        const double d = (skin.centroid(k) - Vec3(0.03, 0.0075, 0.0)).norm();
        if (d < nearest) nearest = d, image.at_flank = change;
    }
    return image;
}

}  // namespace

TEST_CASE("mesh zones: the image of a sphere by the flank converges as the zone's panels shrink") {
    std::vector<Image> levels;
    for (const char* size : {"6 mm", "3 mm", "1.5 mm", "0.75 mm"}) levels.push_back(image_with_zone(size));
    for (std::size_t i = 1; i < levels.size(); ++i) {
        CAPTURE(i);
        CHECK(levels[i].panels > levels[i - 1].panels);
        CHECK(levels[i].peak > 0.0);
    }
    for (std::size_t i = 2; i < levels.size(); ++i) {
        CAPTURE(i);
        INFO("peaks (V): " << levels[i - 2].peak << ", " << levels[i - 1].peak << ", " << levels[i].peak);
        INFO("at the flank (V): " << levels[i - 2].at_flank << ", " << levels[i - 1].at_flank << ", " << levels[i].at_flank);
        // Each halving of the panels changes the result by at most half as much
        // as the halving before (first-order convergence would give one half).
        CHECK(std::abs(levels[i].peak - levels[i - 1].peak) < 0.5 * std::abs(levels[i - 1].peak - levels[i - 2].peak));
        CHECK(std::abs(levels[i].at_flank - levels[i - 1].at_flank) <
              0.5 * std::abs(levels[i - 1].at_flank - levels[i - 2].at_flank));
    }
    // The finest two levels agree on the peak to within 1 %.
    CHECK(std::abs(levels[3].peak / levels[2].peak - 1.0) < 0.01);
}
