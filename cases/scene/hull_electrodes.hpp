#pragma once
// A robot's patch electrodes (and rings on hulls that are not meshed on their
// stations) cut into its hull mesh (geometry/electrode_cut.hpp), and the true
// area of every such electrode where the hull is analytic.
//
// Which path an electrode takes: rings on a generated capsule, sphere or box are
// meshed on stations (geometry/electrode_hulls.hpp, hull_conforms_to_rings); every
// other ring and every patch is cut; region electrodes are the mesh file's own.
#include "cases/input/case_spec.hpp"
#include "geometry/mesh.hpp"

#include <cstddef>
#include <optional>
#include <vector>

namespace murk {

// True when the robot's hull is meshed on its ring electrodes' edges: a generated
// capsule, sphere or box carrying rings.
bool hull_conforms_to_rings(const RobotSpec& robot);

// True when electrode `e` of `robot` is cut into the hull (above).
bool electrode_is_cut(const RobotSpec& robot, const ElectrodeSpec& e);

// The true area (m^2) of a cut electrode on a generated hull, nullopt on an
// imported one: spheres in closed form, a patch on a box as a disc on its face,
// capsules and ellipsoids by quadrature (geometry/electrode_areas.hpp). InputError
// "file:line: robot.electrode[k]: ..." for a patch on a box that does not lie on
// a single face (crossing a face edge is not supported).
std::optional<double> cut_electrode_area(const RobotSpec& robot, const ElectrodeSpec& e);

// Cuts `hull` (hull frame, as the scene builder made it, panel size `panel`) along
// every cut electrode of the robot, graded from mesh.electrode_edge (default
// kElectrodeEdgeFraction of the panel size), and returns per electrode of
// robot.electrodes its panels (nullopt for one that is not cut). InputError naming
// the electrode for one that lies off the hull, covers all of it, overlaps another,
// or would make the mesh too large.
std::vector<std::optional<std::vector<std::size_t>>> cut_hull_electrodes(TriangleMesh& hull, const CaseSpec& spec,
                                                                        double panel);

}  // namespace murk
