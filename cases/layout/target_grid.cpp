#include "cases/layout/target_grid.hpp"

#include "cases/input/case_limits.hpp"
#include "cases/scene/scene_builder.hpp"
#include "geometry/input_error.hpp"
#include "geometry/message_text.hpp"
#include "solver/polarization.hpp"

#include <algorithm>
#include <cmath>

namespace murk {

namespace {

std::string sweep_where(const CaseSpec& spec, const std::string& key) {
    const int line = spec.sweep ? spec.sweep->line : 0;
    return spec.path + (line > 0 ? ":" + std::to_string(line) : std::string()) + ": " + key;
}

// The semi-axes (hull frame of the object) of a target of the given size.
Eigen::Vector3d semi_axes_at(const ObjectSpec& o, double size) {
    Eigen::Vector3d a;
    switch (o.shape.kind) {
        case ShapeKind::sphere: a = Eigen::Vector3d::Constant(o.shape.radius_m); break;
        default: a = Eigen::Vector3d(o.shape.semi_axes_m[0], o.shape.semi_axes_m[1], o.shape.semi_axes_m[2]); break;
    }
    return a * (size / a.maxCoeff());
}

}  // namespace

TargetGrid target_grid(const CaseSpec& spec) {
    if (!spec.sweep || !spec.sweep->grid)
        throw InputError(sweep_where(spec, spec.sweep ? "sweep.grid" : "sweep") +
                         ": murk layout needs a [sweep] with a [sweep.grid] of target positions");
    const SweepSpec& s = *spec.sweep;
    if (!s.alternatives.empty() || !s.water_conductivity_S_per_m.empty() || !s.conductivity_S_per_m.empty() ||
        !s.distance_m.empty())
        throw InputError(sweep_where(spec, "sweep") +
                         ": murk layout varies only the target's position (sweep.grid) and size; remove the "
                         "alternatives, water_conductivity, conductivity and distance axes");
    const std::string name = s.object.empty() ? spec.objects.front().name : s.object;
    const auto it = std::find_if(spec.objects.begin(), spec.objects.end(), [&](const ObjectSpec& o) { return o.name == name; });
    const ObjectSpec& o = *it;  // the reader checked the name
    if (o.shape.kind != ShapeKind::sphere && o.shape.kind != ShapeKind::spheroid && o.shape.kind != ShapeKind::ellipsoid)
        throw InputError(o.source.where() + ".shape: murk layout's target is a sphere, spheroid or ellipsoid (its "
                                            "polarization is known in closed form)");
    if (o.membrane)
        throw InputError(o.source.where() + ".membrane_resistance: murk layout's target has no membrane");

    TargetGrid g;
    g.object = name;
    const SweepGridSpec& sg = *s.grid;
    g.u_m = sg.u_m;
    g.v_m = sg.v_m;
    g.origin = Eigen::Vector3d(sg.origin_m[0], sg.origin_m[1], sg.origin_m[2]);
    g.u_direction = Eigen::Vector3d(sg.u_direction[0], sg.u_direction[1], sg.u_direction[2]).normalized();
    g.v_direction = Eigen::Vector3d(sg.v_direction[0], sg.v_direction[1], sg.v_direction[2]).normalized();
    g.w_m = sg.w_m;
    g.w_direction = Eigen::Vector3d(sg.w_direction[0], sg.w_direction[1], sg.w_direction[2]).normalized();
    // Checked one factor at a time, so that the product cannot overflow.
    std::size_t count = 1;
    for (const std::size_t n : {g.u_m.size(), g.v_m.size(), g.nw()}) {
        if (n > kMaxLayoutTargets / count)
            throw InputError(sweep_where(spec, "sweep.grid") + ": murk layout takes at most " +
                             std::to_string(kMaxLayoutTargets) + " target positions; the grid has more");
        count *= n;
    }
    g.points.resize(3, static_cast<Eigen::Index>(count));
    const std::size_t nv = g.v_m.size(), nw = g.nw();
    for (std::size_t i = 0; i < g.u_m.size(); ++i)
        for (std::size_t j = 0; j < nv; ++j)
            for (std::size_t l = 0; l < nw; ++l)
                g.points.col(static_cast<Eigen::Index>((i * nv + j) * nw + l)) =
                    g.origin + g.u_m[i] * g.u_direction + g.v_m[j] * g.v_direction +
                    (g.planar() ? 0.0 : g.w_m[l]) * g.w_direction;

    const double own_size = o.shape.kind == ShapeKind::sphere ? o.shape.radius_m
                                                              : std::max({o.shape.semi_axes_m[0], o.shape.semi_axes_m[1],
                                                                          o.shape.semi_axes_m[2]});
    g.size_m = s.size_m.empty() ? std::vector<double>{own_size} : s.size_m;
    const Eigen::Matrix3d axes = orientation_matrix(o.orientation);
    const double water = spec.water.conductivity_S_per_m;
    for (double size : g.size_m) {
        const Eigen::Vector3d a = semi_axes_at(o, size);
        if (o.material == Material::conductor) g.polarization.push_back(conducting_ellipsoid_polarization(a, axes));
        else
            g.polarization.push_back(ellipsoid_polarization<double>(
                a, axes, o.material == Material::insulator ? 0.0 : o.conductivity_S_per_m, water));
    }
    return g;
}

}  // namespace murk
