#pragma once
// The water's bounds in result files and messages: how many images the Green's
// function holds and the truncation tolerance of a two-plane series
// (solver/image_series.hpp; root attributes in cases/RESULT_LAYOUT.md).
#include "cases/output/hdf5_file.hpp"
#include "solver/scene.hpp"

#include <string>

namespace murk {

struct WaterBoundsSummary {
    int planes = 0;          // planes bounding the water (0, 1 or 2)
    int images = 0;          // images in the Green's function
    double tolerance = 0.0;  // relative truncation error aimed at; 0: exact
    double reach_m = 0.0;    // horizontal extent over which it was checked
};

template <class S>
WaterBoundsSummary water_bounds_summary(const ImageSeries<S>& series) {
    WaterBoundsSummary s;
    s.planes = static_cast<int>(series.bounds.size());
    s.images = static_cast<int>(series.terms.size());
    s.tolerance = series.tolerance;
    s.reach_m = series.reach;
    return s;
}

// Root attributes water_planes, water_images, water_image_tolerance, water_image_reach_m.
void write_image_attributes(H5Group root, const WaterBoundsSummary& summary);

// One line: "unbounded", "one plane, 1 image (exact)", or "surface and bottom:
// 44 images, truncation tolerance 1e-06 over 0.3 m".
std::string water_bounds_text(const WaterBoundsSummary& summary);

}  // namespace murk
