#include "cases/output/image_attributes.hpp"

#include <cstdio>

namespace murk {

void write_image_attributes(H5Group root, const WaterBoundsSummary& summary) {
    root.set_attribute("water_planes", static_cast<std::int64_t>(summary.planes));
    root.set_attribute("water_images", static_cast<std::int64_t>(summary.images));
    root.set_attribute("water_image_tolerance", summary.tolerance);
    root.set_attribute("water_image_reach_m", summary.reach_m);
}

std::string water_bounds_text(const WaterBoundsSummary& summary) {
    if (summary.planes == 0) return "unbounded";
    char line[200];
    if (summary.tolerance == 0.0)
        std::snprintf(line, sizeof line, "one plane, %d image%s (exact)", summary.images, summary.images == 1 ? "" : "s");
    else
        std::snprintf(line, sizeof line, "surface and bottom, %d images, truncation tolerance %g over %g m",
                      summary.images, summary.tolerance, summary.reach_m);
    return line;
}

}  // namespace murk
