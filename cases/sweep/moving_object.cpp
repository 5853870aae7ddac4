#include "cases/sweep/moving_object.hpp"

#include "cases/scene/scene_builder.hpp"
#include "geometry/input_error.hpp"
#include "geometry/mesh_io.hpp"
#include "geometry/transform.hpp"

#include <algorithm>
#include <cmath>

namespace murk {

double shape_size(const ShapeSpec& s) {
    switch (s.kind) {
        case ShapeKind::sphere: return s.radius_m;
        case ShapeKind::spheroid:
        case ShapeKind::ellipsoid: return *std::max_element(s.semi_axes_m.begin(), s.semi_axes_m.end());
        case ShapeKind::capsule: return 0.5 * s.overall_length_m;
        case ShapeKind::box: return 0.5 * *std::max_element(s.size_m.begin(), s.size_m.end());
        case ShapeKind::mesh: {
            const TriangleMesh m = read_mesh(s.mesh_file, s.file_unit_m);
            Vec3 lo = Vec3::Constant(INFINITY), hi = -lo;
            for (const Vec3& v : m.vertices) lo = lo.cwiseMin(v), hi = hi.cwiseMax(v);
            return 0.5 * (hi - lo).maxCoeff();
        }
    }
    return 0.0;
}

namespace {

void scale_shape(ShapeSpec& s, double factor) {
    s.radius_m *= factor;
    s.overall_length_m *= factor;
    for (double& v : s.semi_axes_m) v *= factor;
    for (double& v : s.size_m) v *= factor;
    s.file_unit_m *= factor;
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
    const ObjectSpec& o = object.shape->spec;
    const ShapeSpec& shape = o.shape;
    if (o.membrane ||
        (shape.kind != ShapeKind::sphere && shape.kind != ShapeKind::spheroid && shape.kind != ShapeKind::ellipsoid))
        return std::nullopt;
    const Eigen::Vector3d semi = shape.kind == ShapeKind::sphere
                                     ? Eigen::Vector3d::Constant(shape.radius_m)
                                     : Eigen::Vector3d(shape.semi_axes_m[0], shape.semi_axes_m[1], shape.semi_axes_m[2]);
    const Eigen::Matrix3d axes = orientation_matrix(o.orientation);
    switch (object.material) {
        case Material::conductor: return Matrix3<S>(conducting_ellipsoid_polarization(semi, axes).cast<S>());
        case Material::insulator: return ellipsoid_polarization<S>(semi, axes, S(0), object.water);
        case Material::conducting: return ellipsoid_polarization<S>(semi, axes, object.inner_conductivity, object.water);
    }
    return std::nullopt;
}

}  // namespace

template <class S>
Surface<S> MovingObject<S>::surface(const Vec3& offset, int electrode_index) const {
    Surface<S> s;
    s.mesh = shape->mesh;
    translate(s.mesh, offset);
    s.kind = kind;
    s.inner_conductivity = inner_conductivity;
    s.membrane_resistance = membrane_resistance;
    if (kind == InterfaceKind::sealed) s.panel_electrode.assign(s.mesh.size(), electrode ? electrode_index : -1);
    return s;
}

template <class S>
MovingObjects<S>::MovingObjects(const CaseSpec& spec, const SweepPlan& plan) : plan_(&plan) {
    const int size_axis = plan.axis(AxisKind::size), conductivity_axis = plan.axis(AxisKind::conductivity);
    sizes_ = size_axis >= 0 ? plan.axes[size_axis].values.size() : 1;
    conductivities_ = conductivity_axis >= 0 ? plan.axes[conductivity_axis].values.size() : 1;
    waters_ = plan.fixed_count();  // a form per fixed part (water, frequency, boundary distance)
    const int permittivity_axis = plan.axis(AxisKind::permittivity);
    permittivities_ = permittivity_axis >= 0 ? plan.axes[permittivity_axis].values.size() : 1;
    const double forms =
        double(plan.moving.size()) * double(sizes_) * double(conductivities_) * double(permittivities_) * double(waters_);
    if (forms > double(kMaxForms))
        throw InputError(plan.where + ": the sweep gives the object " + std::to_string(std::size_t(forms)) +
                         " forms (objects x sizes x conductivities x permittivities x water conductivities x "
                         "frequencies), more than " +
                         std::to_string(kMaxForms) + "; split it into several runs");
    // The case at each fixed part's frequency (a copy of the few fields that matter, not the
    // case's text): the water and the object take their admittivity from it.
    std::vector<CaseSpec> at_frequency(waters_);
    for (std::size_t w = 0; w < waters_; ++w) {
        at_frequency[w].path = spec.path;
        at_frequency[w].water = spec.water;
        at_frequency[w].mesh = spec.mesh;
        at_frequency[w].frequency_Hz = plan.fixed_frequency(w, spec.frequency_Hz);
    }
    for (std::size_t m : plan.moving) {
        const ObjectSpec& original = spec.objects[m];
        const double original_size = size_axis >= 0 ? shape_size(original.shape) : 0.0;
        for (std::size_t z = 0; z < sizes_; ++z) {
            auto shape = std::make_unique<ObjectShape>();
            shape->spec = original;
            shape->spec.position_m = {0.0, 0.0, 0.0};
            if (size_axis >= 0) {
                const double factor = plan.axes[size_axis].values[z] / original_size;
                scale_shape(shape->spec.shape, factor);
                if (shape->spec.panel_size_m) *shape->spec.panel_size_m *= factor;
            }
            shape->mesh = object_mesh(spec, shape->spec);  // once per shape and size
            if (shape->spec.shape.kind == ShapeKind::mesh) {
                for (const Vec3& v : shape->mesh.vertices) shape->centre += v;
                shape->centre /= double(shape->mesh.vertices.size());
            }
            for (const Vec3& v : shape->mesh.vertices)
                shape->half_extent = std::max(shape->half_extent, (v - shape->centre).norm());
            for (std::size_t c = 0; c < conductivities_ * permittivities_; ++c)
                for (std::size_t w = 0; w < waters_; ++w) {
                    ObjectSpec material = shape->spec;
                    if (conductivity_axis >= 0)
                        set_material(material, plan.axes[conductivity_axis].values[c / permittivities_]);
                    if (permittivity_axis >= 0)
                        material.permittivity_relative = plan.axes[permittivity_axis].values[c % permittivities_];
                    // The material as the scene builder makes it (a surface without panels):
                    // the water decides whether a contrast is solved as its limit.
                    Scene<S> holder;
                    const CaseSpec& at = at_frequency[w];
                    holder.water_conductivity = water_admittivity<S>(at, plan.fixed_water(w));
                    add_object_surface(holder, at, material, TriangleMesh{});
                    const Surface<S>& built = holder.surfaces.front();
                    auto form = std::make_unique<MovingObject<S>>();
                    form->shape = shape.get();
                    form->kind = built.kind;
                    form->inner_conductivity = built.inner_conductivity;
                    form->membrane_resistance = built.membrane_resistance;
                    if (!holder.electrodes.empty()) form->electrode = holder.electrodes.front();
                    form->material = built.kind != InterfaceKind::sealed ? Material::conducting
                                     : form->electrode                   ? Material::conductor
                                                                         : Material::insulator;
                    form->water = holder.water_conductivity;
                    forms_.push_back(std::move(form));
                }
            shapes_.push_back(std::move(shape));
        }
    }
}

template <class S>
const MovingObject<S>& MovingObjects<S>::at(const std::vector<std::size_t>& index) const {
    const SweepPlan& plan = *plan_;
    const int size_axis = plan.axis(AxisKind::size), conductivity_axis = plan.axis(AxisKind::conductivity);
    const std::size_t z = size_axis >= 0 ? index[size_axis] : 0;
    const int permittivity_axis = plan.axis(AxisKind::permittivity);
    const std::size_t c = (conductivity_axis >= 0 ? index[conductivity_axis] : 0) * permittivities_ +
                          (permittivity_axis >= 0 ? index[permittivity_axis] : 0);
    const std::size_t k =
        ((plan.moving_of(index) * sizes_ + z) * conductivities_ * permittivities_ + c) * waters_ + plan.water_of(index);
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
    scene.surfaces.push_back(object.surface(offset, static_cast<int>(scene.electrodes.size())));
    if (object.electrode) scene.electrodes.push_back(*object.electrode);
    return scene;
}

template <class S>
Scene<S> object_alone(const MovingObject<S>& object) {
    Scene<S> alone;
    alone.water_conductivity = object.water;
    alone.surfaces.push_back(object.surface(Vec3::Zero(), 0));
    if (object.electrode) alone.electrodes.push_back(*object.electrode);
    return alone;
}

template class MovingObjects<double>;
template class MovingObjects<Complex>;
template struct MovingObject<double>;
template struct MovingObject<Complex>;
template Scene<double> scene_with_object(const Scene<double>&, const MovingObject<double>&, const Vec3&);
template Scene<Complex> scene_with_object(const Scene<Complex>&, const MovingObject<Complex>&, const Vec3&);
template Scene<double> object_alone(const MovingObject<double>&);
template Scene<Complex> object_alone(const MovingObject<Complex>&);

}  // namespace murk
