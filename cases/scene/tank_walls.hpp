#pragma once
// The [tank] of a case (cases/README.md): its walls' mesh, and the rules by which
// everything must lie inside it. These are the plane rules of scene_rules.hpp
// turned round: a surface must lie inside the walls, at least the usual gap
// (kMinGapInPanels of the finer panel size) from them; a source or probe point
// inside, at least kMinSourceDepthInPanels of the wall panel size from them.
// The scene builder refuses a case that breaks one; a sweep masks the point.
#include "cases/input/case_spec.hpp"
#include "geometry/clearance.hpp"
#include "geometry/mesh.hpp"

#include <string>

namespace murk {

// The walls, oriented outward (as geometry/ makes every mesh; the solver's
// make_tank_surface turns them to face the water), named "tank", placed in the
// world and checked valid. InputError at the tank's key.
TriangleMesh tank_walls_mesh(const TankSpec& tank);

// The walls prepared for many queries (a sweep's placements).
class TankWalls {
public:
    TankWalls(const TankSpec& tank, TriangleMesh outward_walls);
    const TriangleMesh& mesh() const { return index_.mesh(); }
    // Empty when the surface lies inside the walls and keeps the gap; else why not.
    std::string breaks(const TriangleMesh& surface) const;
    // The same for a source or probe point.
    std::string breaks(const Vec3& x) const;
    // Least distance (m) from x to the walls.
    double distance_to(const Vec3& x) const { return index_.distance_to(x); }

private:
    SurfaceIndex index_;
    double point_gap_;
};

// Refuses (InputError naming the file, the tank's line and key) a case whose
// tank does not hold `what` (a surface or a point), labelled like "object 'prey'".
void require_inside_tank(const TankWalls& walls, const TankSpec& tank, const TriangleMesh& surface,
                         const std::string& label);
void require_inside_tank(const TankWalls& walls, const TankSpec& tank, const Vec3& x, const std::string& label);

// Refuses a case whose sources inject a net current into the tank (the
// solvability of the closed Neumann problem, solver/tank.hpp): one line naming
// the file and every injecting part with its current. `electrodes` are the
// scene's current-driven electrodes (name, A).
void require_zero_net_current(const CaseSpec& spec, const std::vector<std::pair<std::string, double>>& electrodes);

}  // namespace murk
