#pragma once
// Stage `checks` of murk run, with method "dipole" or "auto": a sample of the
// dipole points re-solved by the exact path, and the discrepancy written beside
// the map, so that every fast result comes with its measured error. Half the
// sample is where the object is largest against its distance (where the dipole
// path errs most), the rest spread evenly over the other dipole points.
#include "cases/sweep/sweep_points.hpp"

namespace murk {

// Flat indices of the dipole points to re-solve (at most `count`), sorted.
template <class S>
std::vector<std::size_t> path_check_sample(const PointRoutes<S>& routes, std::size_t count);

// Re-solves the sample exactly and measures, per point, max over sensors of
// |dipole - exact| over max over sensors of |exact| (the dipole values read back
// from the file).
template <class S>
PathCheck check_dipole_points(const PointRoutes<S>& routes, std::size_t count, const PointPath<S>& exact,
                              const SweepBaselines<S>& baselines, const SweepFile<S>& file);

}  // namespace murk
