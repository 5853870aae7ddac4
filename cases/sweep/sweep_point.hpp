#pragma once
// One point of a sweep: the case with the swept object resized, given its
// conductivity and moved to its place (on a planar grid, or at a clearance from
// the body). A point where the object would touch or enter the body, another
// object or the plane is masked, not an error: the map records it as such.
#include "cases/input/case_spec.hpp"
#include "cases/sweep/sweep_axes.hpp"
#include "geometry/mesh.hpp"

#include <string>
#include <vector>

namespace murk {

struct PointSetup {
    CaseSpec spec;          // the case at this point
    Vec3 object_centre = Vec3::Zero();
    bool masked = false;
    std::string mask_reason;
};

// Index of the swept object in spec.objects (sweep.object, or the first);
// InputError when the case has no such object.
std::size_t swept_object_index(const CaseSpec& spec, const SweepSpec& sweep);

// What the distance axis measures from: the sensing body's surface, or, in a
// case without a body, the first source point (a point-like emitter).
struct DistanceReference {
    const TriangleMesh* body = nullptr;  // as placed in the scene; null without a body
    Vec3 point = Vec3::Zero();           // used when body is null

    double clearance(const TriangleMesh& object) const;
    Vec3 nearest_to(const Vec3& x) const;  // a point of the reference near x
};

// The case at one point of the sweep.
PointSetup configure_point(const CaseSpec& spec, const SweepSpec& sweep, const std::vector<SweepAxis>& axes,
                           const std::vector<std::size_t>& index, const DistanceReference& reference);

}  // namespace murk
