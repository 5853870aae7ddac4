#pragma once
// A tank: a closed insulating surface around the water and everything in it
// (DEVELOPERS.md, "The formulation in one paragraph"). Its panels carry only the
// water-side potential u (j = 0). Its mesh is stored with the normals pointing
// into the water, so the water's representation formula is the same sum over
// every surface as in open water; only its own double layer's Gauss's-law
// diagonal differs (rows sum to +1/2 seen from inside: bem_system_impl.hpp).
//
// Closed insulating walls make the water an interior Neumann problem: the
// potential is defined up to a constant, and a solution exists only if the net
// current injected into the water is zero (the divergence theorem). murk fixes
// the constant by the reference "the area-weighted mean of the potential over
// the tank walls is zero", one extra row bordering the system with one extra
// unknown (SystemLayout::reference).
#include "geometry/input_error.hpp"
#include "solver/scene.hpp"

#include <cmath>
#include <string>

namespace murk {

// The reference every tank solution is given in (written to result files).
inline const char* tank_reference_text() { return "mean over the tank walls is zero"; }

// Index of the scene's tank, or -1.
template <class S>
int tank_index(const Scene<S>& scene) {
    for (std::size_t s = 0; s < scene.surfaces.size(); ++s)
        if (scene.surfaces[s].encloses_water) return static_cast<int>(s);
    return -1;
}

// The tank surface of a closed mesh oriented outward (as every generator and
// reader of geometry/ gives it): its triangles are turned to face the water.
template <class S>
Surface<S> make_tank_surface(TriangleMesh outward) {
    for (auto& t : outward.triangles) std::swap(t[1], t[2]);
    Surface<S> surface;
    surface.mesh = std::move(outward);
    surface.kind = InterfaceKind::sealed;
    surface.panel_electrode.assign(surface.mesh.size(), -1);
    surface.encloses_water = true;
    return surface;
}

// Whether some electrode is held at a potential (voltage-driven or fixed): then the
// reference unknown shifts those electrodes' potentials together (in a closed tank only
// their differences are imposed); else it enters every wall row with coefficient 1.
// The dense assembly (add_reference_border) and the compressed border (system_entries)
// both follow this.
template <class S>
bool holds_electrode_potential(const Scene<S>& scene) {
    for (const auto& e : scene.electrodes)
        if (e.drive == ElectrodeDrive::voltage || e.drive == ElectrodeDrive::fixed_potential) return true;
    return false;
}

// Net current (A) the scene injects into the water whatever the solution: its
// point sources (in the water or inside bodies, whose current leaves through
// their surfaces) and its current-driven electrodes. Voltage-driven and
// potential-held electrodes adjust their currents; floating ones carry none.
template <class S>
S net_injected_current(const Scene<S>& scene) {
    S net{};
    for (const auto& src : scene.sources) net += src.current;
    for (const auto& e : scene.electrodes)
        if (e.drive == ElectrodeDrive::current) net += e.value;
    return net;
}

// Whether the net injected current is zero to rounding: within 1e-9 of the sum
// of the magnitudes of the injected currents.
template <class S>
bool net_current_balanced(const Scene<S>& scene) {
    double scale = 0.0;
    for (const auto& src : scene.sources) scale += std::abs(src.current);
    for (const auto& e : scene.electrodes)
        if (e.drive == ElectrodeDrive::current) scale += std::abs(e.value);
    return std::abs(net_injected_current(scene)) <= 1e-9 * scale;
}

// What a solver needs of a scene with a tank (InputError otherwise; the case
// reader and scene builder check the same with file and key in the message).
template <class S>
void check_tank(const Scene<S>& scene) {
    const int tank = tank_index(scene);
    if (tank < 0) return;
    for (std::size_t s = std::size_t(tank) + 1; s < scene.surfaces.size(); ++s)
        if (scene.surfaces[s].encloses_water) throw InputError("scene: more than one tank");
    const Surface<S>& t = scene.surfaces[std::size_t(tank)];
    if (t.kind != InterfaceKind::sealed) throw InputError("tank '" + t.mesh.name + "': must be sealed");
    for (int e : t.panel_electrode)
        if (e >= 0) throw InputError("tank '" + t.mesh.name + "': its walls carry no electrodes");
    if (!scene.images.bounds.empty()) throw InputError("scene: a tank cannot be combined with an insulating plane (its top stands for the water surface)");
    if (scene.uniform_field.norm() > 0) throw InputError("scene: a uniform far field cannot be combined with a tank");
    if (!net_current_balanced(scene))
        throw InputError("scene: the sources inject a net current into the closed tank '" + t.mesh.name +
                         "'; inside insulating walls it must be zero");
}

}  // namespace murk
