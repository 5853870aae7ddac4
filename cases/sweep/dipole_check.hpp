#pragma once
// Stage `checks` of murk run, with method "dipole" or "auto": a sample of the
// dipole points re-solved by the exact path, and the discrepancy written beside
// the map, so that every fast result comes with its measured error. Half the
// sample is where the object is largest against its distance (where the dipole
// path errs most), the rest spread evenly over the other dipole points.
#include "cases/sweep/sweep_output.hpp"
#include "cases/sweep/sweep_points.hpp"

namespace murk {

// Flat indices of the dipole points to re-solve (at most `count`), sorted.
template <class S>
std::vector<std::size_t> dipole_check_sample(const PointRoutes<S>& routes, std::size_t count);

// Re-solves the sample points of `share` (flags over all points; empty: every
// point) that the journal has no check for, and appends each check: max over
// sensors of |dipole - exact| over max over sensors of |exact| (the dipole
// values read back from the journal).
template <class S>
void check_dipole_points(const PointRoutes<S>& routes, std::size_t count, const std::vector<char>& share,
                         const PointPath<S>& exact, const SweepBaselines<S>& baselines, PointJournal& journal);

// The journal's checks as the result file lists them (in point order).
DipoleCheck dipole_check_of(const PointJournal& journal);

}  // namespace murk
