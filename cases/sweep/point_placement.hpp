#pragma once
// Where the moving object goes at a sweep point, and whether it may go there.
// Built once per run from the surfaces that stay (body and unmoving objects, in
// spatial indexes), the insulating planes and the tank's walls (per fixed part: a
// boundary-distance axis moves one) and the free source and probe points;
// each point then costs a few index queries on the object's mesh, moved rigidly.
//
// A point is placed on the planar grid (grid axes), at a clearance from the body
// along the sweep direction (distance axis), or where the case puts the object.
// It is masked, with the reason, where the object would break a rule of
// cases/scene/scene_rules.hpp: touch the body or an unmoving object, reach
// through the plane or leave a [tank] (or come nearer its walls than the gap
// rule: masked as beyond_plane, the same rule turned round), come too near a
// source or probe point; or where the clearance cannot be reached along the direction. Placement reports its
// outcome; it never throws for a point.
#include "cases/input/case_spec.hpp"
#include "cases/output/result_layout.hpp"
#include "cases/scene/tank_walls.hpp"
#include "cases/sweep/sweep_plan.hpp"
#include "geometry/clearance.hpp"

#include <optional>
#include <vector>

namespace murk {

struct Placement {
    MaskReason mask = MaskReason::none;
    Vec3 offset = Vec3::Zero();  // where the object's frame origin goes
};

class PointPlacement {
public:
    // `fixed` are the surfaces that stay, the sensing body first when the case has
    // one (a tank's walls among them are recognised by their name and checked
    // the other way round). Refuses (InputError naming the case line) a sweep direction that points
    // into the body from a moving object's position.
    PointPlacement(const CaseSpec& spec, const SweepPlan& plan, std::vector<TriangleMesh> fixed);

    // The placement at a point of `object`, the moving object's mesh in its frame.
    Placement place(const std::vector<std::size_t>& index, const TriangleMesh& object) const;

    // Distance (m) from x to the nearest surface that stays in fixed part `fixed`, free
    // source point or probe point: the distance the dipole path's error depends on.
    double distance_to_fixed(const Vec3& x, std::size_t fixed) const;

    // What the distance axis measures from: the clearance (m) of an object mesh,
    // as placed, from the body's surface, or from the first source point in a
    // case without a body.
    double clearance(const TriangleMesh& object) const;

private:
    MaskReason check(const TriangleMesh& object, std::size_t fixed) const;

    const SweepPlan* plan_;
    std::vector<SurfaceIndex> fixed_;  // body first when has_body_
    bool has_body_ = false;
    std::vector<std::vector<PlaneSpec>> planes_;  // per fixed part: the water surface and bottom
    // The walls of fixed part k's [tank] (outward): tanks_[k % tanks_.size()]; one per
    // value of a wall_distance axis, else the case's one; none without a tank.
    std::vector<TankWalls> tanks_;
    const TankWalls* tank_of(std::size_t fixed) const {
        return tanks_.empty() ? nullptr : &tanks_[fixed % tanks_.size()];
    }
    std::vector<Vec3> free_points_;    // [[source]] points and probe points
    Vec3 reference_point_ = Vec3::Zero();  // without a body: the first source point
    std::vector<Vec3> start_;          // per moving object: its position in the case
    std::vector<Vec3> direction_;      // per moving object: the direction of the distance axis
};

}  // namespace murk
