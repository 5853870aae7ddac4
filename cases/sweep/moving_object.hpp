#pragma once
// The object a sweep moves, in every form its axes give it. Each distinct shape
// and size is meshed once, in the object's own frame (turned by its orientation,
// its reference point at the origin); each conductivity and water gives it its
// material. A sweep point then places that surface rigidly beside the fixed part:
// no case copy, no rebuilt body. The object's own factored block (exact path)
// and its polarization tensor (dipole path) depend only on the form, not on where
// it is, so each is computed once per form, when first asked for.
#include "cases/input/case_spec.hpp"
#include "cases/sweep/sweep_plan.hpp"
#include "solver/coupled_solve.hpp"
#include "solver/polarization.hpp"

#include <memory>
#include <mutex>
#include <optional>
#include <vector>

namespace murk {

// Largest half-extent of a shape: the length the size axis sets (cases/README.md,
// [sweep] size). An imported mesh is read for its bounding box.
double shape_size(const ShapeSpec& shape);

// One shape and size of a moving object, meshed once.
struct ObjectShape {
    ObjectSpec spec;   // resized, its reference point at the origin, material as the case gives it
    TriangleMesh mesh;  // in the object's frame
    Vec3 centre = Vec3::Zero();  // where the induced dipole sits, in the frame: the origin for
                                 // generated shapes, the mean vertex of an imported mesh
    double half_extent = 0;      // largest distance of a vertex from `centre` (m)
};

// A shape with its material in one water: what a point places.
template <class S>
struct MovingObject {
    const ObjectShape* shape = nullptr;
    Material material = Material::conducting;  // as solved: a contrast beyond the scene rules' limit
                                               // is its limit (cases/scene/scene_rules.hpp)
    InterfaceKind kind = InterfaceKind::contact;
    S inner_conductivity{}, membrane_resistance{};
    std::optional<Electrode<S>> electrode;  // a perfect conductor's floating electrode
    S water{};                              // water admittivity of this form

    // The surface in the frame, moved by `offset`; a conductor's panels name electrode `electrode_index`.
    Surface<S> surface(const Vec3& offset, int electrode_index) const;

    // Computed once, on first use (thread-safe).
    mutable std::once_flag tensor_once, block_once;
    mutable Matrix3<S> tensor;
    mutable std::shared_ptr<const MovingBlock<S>> block;
};

template <class S>
class MovingObjects {
public:
    // Meshes every (object, size) shape of the plan once; an object that cannot be
    // meshed at a size is an InputError naming its table. Refuses a plan with more
    // forms (objects x sizes x conductivities x waters) than kMaxForms.
    MovingObjects(const CaseSpec& spec, const SweepPlan& plan);
    static constexpr std::size_t kMaxForms = 100000;

    // The form at a point (by its per-axis index).
    const MovingObject<S>& at(const std::vector<std::size_t>& index) const;

    // The object's polarization tensor: closed form for a plain sphere, spheroid
    // or ellipsoid, boundary elements (the object alone) for anything else.
    const Matrix3<S>& tensor(const MovingObject<S>& object, const QuadratureOptions& quad) const;
    // The object's own block of the system, factored, from the object alone at
    // the origin, so that every point (and thread) gets the identical block.
    std::shared_ptr<const MovingBlock<S>> block(const MovingObject<S>& object, const QuadratureOptions& quad) const;

    std::size_t size() const { return forms_.size(); }
    const MovingObject<S>& form(std::size_t k) const { return *forms_.at(k); }

private:
    const SweepPlan* plan_;
    std::vector<std::unique_ptr<ObjectShape>> shapes_;     // C order over (moving, size)
    std::vector<std::unique_ptr<MovingObject<S>>> forms_;  // C order over (moving, size, conductivity,
                                                        // permittivity, water and frequency)
    std::size_t sizes_ = 1, conductivities_ = 1, permittivities_ = 1, waters_ = 1;  // waters_: fixed parts
};

// A point's scene: the fixed part's scene with the object appended last, moved by
// `offset` (its frame origin goes there), and its electrode after the fixed part's.
template <class S>
Scene<S> scene_with_object(const Scene<S>& fixed, const MovingObject<S>& object, const Vec3& offset);

// The object alone in unbounded water, in its frame.
template <class S>
Scene<S> object_alone(const MovingObject<S>& object);

extern template class MovingObjects<double>;
extern template class MovingObjects<Complex>;

}  // namespace murk
