#pragma once
// Checks of a robot's electrode sites that the geometry of a generated hull can
// tell before any mesh is made: a site that falls off the hull, or two that
// overlap. Applied to the sites of a case with [[layout]] tables, where every
// site must be usable by any layout. (A legacy case keeps the scene builder's
// check alone: no two electrodes may share a panel, each must cover one.)
#include "cases/input/case_spec.hpp"

namespace murk {

// Throws InputError "file:line: robot.electrode[k]: ..." naming the site (and the
// other site of an overlap). Rings: the band [from, to] must meet the hull's
// extent along its x axis. Patches: the disc's centre must lie within its radius
// of the hull's surface (sphere, capsule, box exactly; spheroid and ellipsoid by
// the distance along the ray from the centre, which is exact on the axes).
// Overlaps: two rings whose bands meet, a ring and a patch whose disc reaches
// into the band along x, two patches closer (centre to centre) than the sum of
// their radii, two region sites of the same region. An imported hull's rings and
// patches are left to the scene builder (a site that covers no panel is refused
// there).
void check_electrode_sites(const RobotSpec& robot);

}  // namespace murk
