#include "cases/sweep/moving_object.hpp"

#include "cases/scene/scene_builder.hpp"
#include "geometry/input_error.hpp"
#include "geometry/mesh_io.hpp"
#include "geometry/transform.hpp"

#include <algorithm>
#include <cmath>

namespace murk {

namespace {

// Largest half-extent of a shape: the length the size axis sets.
double size_of(const ShapeSpec& s) {
    switch (s.kind) {
        case ShapeKind::sphere: return s.radius_m;
        case ShapeKind::spheroid:
        case ShapeKind::ellipsoid: return *std::max_element(s.semi_axes_m.begin(), s.semi_axes_m.end());
        case ShapeKind::capsule: return 0.5 * s.length_m;
        case ShapeKind::box: return 0.5 * *std::max_element(s.size_m.begin(), s.size_m.end());
        case ShapeKind::mesh: {
            const TriangleMesh m = read_mesh(s.mesh_file, s.mesh_scale_m);
            Vec3 lo = Vec3::Constant(INFINITY), hi = -lo;
            for (const Vec3& v : m.vertices) lo = lo.cwiseMin(v), hi = hi.cwiseMax(v);
            return 0.5 * (hi - lo).maxCoeff();
        }
    }
    return 0.0;
}

void scale_shape(ShapeSpec& s, double factor) {
    s.radius_m *= factor;
    s.length_m *= factor;
    for (double& v : s.semi_axes_m) v *= factor;
    for (double& v : s.size_m) v *= factor;
    s.mesh_scale_m *= factor;
}

void set_material(ObjectSpec& o, double sigma) {
    if (sigma == kInsulatorConductivity) o.material = Material::insulator;
    else if (std::isinf(sigma)) o.material = Material::conductor;
    else o.material = Material::conducting, o.conductivity_S_per_m = sigma;
}

// The exact tensor of a homogeneous sphere, spheroid or ellipsoid (no membrane),
// with the conductivities the scene builder gave its surface.
template <class S>
std::optional<Matrix3<S>> closed_form_tensor(const MovingObject<S>& object) {
    const ObjectSpec& o = object.spec;
    const ShapeSpec& shape = o.shape;
    if (o.membrane ||
        (shape.kind != ShapeKind::sphere && shape.kind != ShapeKind::spheroid && shape.kind != ShapeKind::ellipsoid))
        return std::nullopt;
    const Eigen::Vector3d semi = shape.kind == ShapeKind::sphere
                                     ? Eigen::Vector3d::Constant(shape.radius_m)
                                     : Eigen::Vector3d(shape.semi_axes_m[0], shape.semi_axes_m[1], shape.semi_axes_m[2]);
    const Eigen::Matrix3d axes = orientation_matrix(o.orientation);
    switch (o.material) {
        case Material::conductor: return Matrix3<S>(conducting_ellipsoid_polarization(semi, axes).cast<S>());
        case Material::insulator: return ellipsoid_polarization<S>(semi, axes, S(0), object.water);
        case Material::conducting:
            return ellipsoid_polarization<S>(semi, axes, object.surface.inner_conductivity, object.water);
    }
    return std::nullopt;
}

}  // namespace

template <class S>
MovingObjects<S>::MovingObjects(const CaseSpec& spec, const SweepPlan& plan) : plan_(&plan) {
    const int size_axis = plan.axis(AxisKind::size), conductivity_axis = plan.axis(AxisKind::conductivity);
    sizes_ = size_axis >= 0 ? plan.axes[size_axis].values.size() : 1;
    conductivities_ = conductivity_axis >= 0 ? plan.axes[conductivity_axis].values.size() : 1;
    waters_ = plan.waters.size();
    for (std::size_t m : plan.moving) {
        const ObjectSpec& original = spec.objects[m];
        const double original_size = size_axis >= 0 ? size_of(original.shape) : 0.0;
        for (std::size_t z = 0; z < sizes_; ++z) {
            ObjectSpec sized = original;
            sized.position_m = {0.0, 0.0, 0.0};
            if (size_axis >= 0) {
                const double factor = plan.axes[size_axis].values[z] / original_size;
                scale_shape(sized.shape, factor);
                if (sized.panel_size_m) *sized.panel_size_m *= factor;
            }
            const TriangleMesh mesh = object_mesh(spec, sized);  // once per shape and size
            Vec3 centre = Vec3::Zero();
            if (sized.shape.kind == ShapeKind::mesh) {
                for (const Vec3& v : mesh.vertices) centre += v;
                centre /= double(mesh.vertices.size());
            }
            double half_extent = 0;
            for (const Vec3& v : mesh.vertices) half_extent = std::max(half_extent, (v - centre).norm());
            for (std::size_t c = 0; c < conductivities_; ++c)
                for (std::size_t w = 0; w < waters_; ++w) {
                    auto form = std::make_unique<MovingObject<S>>();
                    form->spec = sized;
                    if (conductivity_axis >= 0) set_material(form->spec, plan.axes[conductivity_axis].values[c]);
                    Scene<S> holder;  // the water decides whether a contrast is solved as its limit
                    holder.water_conductivity = water_admittivity<S>(spec, plan.waters[w]);
                    add_object_surface(holder, spec, form->spec, mesh);
                    form->surface = std::move(holder.surfaces.front());
                    if (!holder.electrodes.empty()) form->electrode = holder.electrodes.front();
                    // A contrast beyond the scene rules' limit was built as that limit;
                    // the tensor must see the same material.
                    if (form->surface.kind == InterfaceKind::sealed)
                        form->spec.material = form->electrode ? Material::conductor : Material::insulator;
                    form->water = holder.water_conductivity;
                    form->centre = centre;
                    form->half_extent = half_extent;
                    forms_.push_back(std::move(form));
                }
        }
    }
}

template <class S>
const MovingObject<S>& MovingObjects<S>::at(const std::vector<std::size_t>& index) const {
    const SweepPlan& plan = *plan_;
    const int size_axis = plan.axis(AxisKind::size), conductivity_axis = plan.axis(AxisKind::conductivity);
    const std::size_t z = size_axis >= 0 ? index[size_axis] : 0;
    const std::size_t c = conductivity_axis >= 0 ? index[conductivity_axis] : 0;
    const std::size_t k = ((plan.moving_of(index) * sizes_ + z) * conductivities_ + c) * waters_ + plan.water_of(index);
    return *forms_.at(k);
}

template <class S>
const Matrix3<S>& MovingObjects<S>::tensor(const MovingObject<S>& object, const QuadratureOptions& quad) const {
    std::call_once(object.tensor_once, [&] {
        const std::optional<Matrix3<S>> closed = closed_form_tensor(object);
        object.tensor = closed ? *closed : computed_polarization(object_alone(object), 0, quad);
    });
    return object.tensor;
}

template <class S>
std::shared_ptr<const MovingBlock<S>> MovingObjects<S>::block(const MovingObject<S>& object,
                                                              const QuadratureOptions& quad) const {
    std::call_once(object.block_once, [&] {
        object.block = std::make_shared<const MovingBlock<S>>(factor_moving_block(object_alone(object), {0}, quad));
    });
    return object.block;
}

template <class S>
Scene<S> scene_with_object(const Scene<S>& fixed, const MovingObject<S>& object, const Vec3& offset) {
    Scene<S> scene = fixed;
    Surface<S> surface = object.surface;
    translate(surface.mesh, offset);
    if (object.electrode) {
        std::fill(surface.panel_electrode.begin(), surface.panel_electrode.end(), static_cast<int>(scene.electrodes.size()));
        scene.electrodes.push_back(*object.electrode);
    }
    scene.surfaces.push_back(std::move(surface));
    return scene;
}

template <class S>
Scene<S> object_alone(const MovingObject<S>& object) {
    Scene<S> alone;
    alone.water_conductivity = object.water;
    alone.surfaces.push_back(object.surface);
    if (object.electrode) alone.electrodes.push_back(*object.electrode);
    return alone;
}

template class MovingObjects<double>;
template class MovingObjects<Complex>;
template Scene<double> scene_with_object(const Scene<double>&, const MovingObject<double>&, const Vec3&);
template Scene<Complex> scene_with_object(const Scene<Complex>&, const MovingObject<Complex>&, const Vec3&);
template Scene<double> object_alone(const MovingObject<double>&);
template Scene<Complex> object_alone(const MovingObject<Complex>&);

}  // namespace murk
