#pragma once
// Template definitions of bem_system.hpp; included only by the two files that
// instantiate them for double and std::complex<double> (dense LU is slow to compile).
#include "solver/bem_system.hpp"

#include "geometry/input_error.hpp"
#include "geometry/internal_check.hpp"
#include "solver/incident_field.hpp"
#include "solver/layer_blocks.hpp"
#include "solver/panel_set.hpp"
#include "solver/tank.hpp"
#include "solver/triangle_integrals.hpp"

#include <Eigen/LU>
#include <array>
#include <cmath>
#include <limits>
#include <string>
#include <type_traits>

namespace murk {

namespace detail {

// The points x moved by an image's isometry (the field points of its layers).
template <class S>
Eigen::Matrix3Xd image_points(const FieldImage<S>& image, const Eigen::Matrix3Xd& x) {
    Eigen::Matrix3Xd m = image.linear * x;
    m.colwise() += image.shift;
    return m;
}

// Whether some image weight (or the constant) has an imaginary part: the water
// rows' layers then need an imaginary part of their own.
template <class S>
bool has_complex_weights(const ImageSeries<S>& series) {
    if (std::imag(series.constant) != 0.0) return true;
    for (const FieldImage<S>& t : series.terms)
        if (std::imag(t.weight) != 0.0) return true;
    return false;
}

template <class S>
S with_imaginary(double re, double im) {
    if constexpr (std::is_same_v<S, double>) return (void)im, re;
    else return S(re, im);
}

// Adds the images' layers at the points x to single and dbl (real parts of the
// weights) and single_im, dbl_im (imaginary parts; null when all weights are
// real), with the series' constant in the single layer (a constant kernel adds
// nothing to a double layer). scratch_*: storage of the same size.
template <class S>
void add_image_layers(const ImageSeries<S>& series, const Eigen::Matrix3Xd& x, const PanelSet& panels,
                      const QuadratureOptions& options, Eigen::Ref<Eigen::MatrixXd> single,
                      Eigen::Ref<Eigen::MatrixXd> dbl, Eigen::Ref<Eigen::MatrixXd> scratch_single,
                      Eigen::Ref<Eigen::MatrixXd> scratch_dbl, Eigen::Map<Eigen::MatrixXd>* single_im,
                      Eigen::Map<Eigen::MatrixXd>* dbl_im) {
    for (const FieldImage<S>& t : series.terms) {
        assemble_layer_blocks(image_points(t, x), panels, options, false, 0, scratch_single, scratch_dbl);
        const double re = std::real(t.weight), im = std::imag(t.weight);
        single += re * scratch_single;
        dbl += re * scratch_dbl;
        if (single_im && im != 0.0) {
            *single_im += im * scratch_single;
            *dbl_im += im * scratch_dbl;
        }
    }
    const double c_re = std::real(series.constant) / (4.0 * M_PI), c_im = std::imag(series.constant) / (4.0 * M_PI);
    for (Eigen::Index k = 0; k < panels.size(); ++k) {
        if (c_re != 0.0) single.col(k).array() -= c_re * panels.area(k);
        if (single_im && c_im != 0.0) single_im->col(k).array() -= c_im * panels.area(k);
    }
}

// Free-space potential of a point source of current I in conductivity sigma.
template <class S>
S point_source_potential(const S& current, const S& sigma, const Vec3& source, const Vec3& x) {
    return current / (S(4.0 * M_PI) * sigma * (x - source).norm());
}

// How the water-side potential and q = j/sigma_w of each panel of a surface map
// onto global unknowns: column index, or -1 when the value is identically zero.
struct PanelColumns {
    std::vector<Eigen::Index> phi;  // water-side potential
    std::vector<Eigen::Index> q;    // scaled normal current
};

template <class S>
PanelColumns panel_columns(const Scene<S>& scene, const SystemLayout& layout, std::size_t s) {
    const auto& block = layout.surfaces[s];
    PanelColumns c;
    c.phi.resize(block.panels), c.q.resize(block.panels);
    for (Eigen::Index k = 0; k < block.panels; ++k) {
        if (block.two_sided) {
            c.phi[k] = block.offset + k;
            c.q[k] = block.offset + block.panels + k;
        } else {
            const int e = scene.surfaces[s].panel_electrode[k];
            c.phi[k] = e < 0 ? block.offset + k : layout.electrode_offset + e;
            c.q[k] = e < 0 ? -1 : block.offset + k;
        }
    }
    return c;
}

template <class S>
SystemLayout make_layout(const Scene<S>& scene) {
    SystemLayout layout;
    Eigen::Index offset = 0;
    for (const auto& surface : scene.surfaces) {
        SystemLayout::Block b;
        b.offset = offset;
        b.panels = static_cast<Eigen::Index>(surface.mesh.size());
        b.two_sided = surface.kind != InterfaceKind::sealed;
        offset += b.two_sided ? 2 * b.panels : b.panels;
        layout.surfaces.push_back(b);
    }
    layout.electrode_offset = offset;
    layout.size = offset + static_cast<Eigen::Index>(scene.electrodes.size());
    if (tank_index(scene) >= 0) layout.reference = layout.size++;
    return layout;
}

// Whether `layout` is the one make_layout gives for `scene`: blocks, rows and
// solutions are indexed by a layout passed beside the scene, and one made for
// another scene would index the wrong unknowns without any error.
template <class S>
bool is_layout_of(const SystemLayout& layout, const Scene<S>& scene) {
    const SystemLayout own = make_layout(scene);
    if (own.size != layout.size || own.electrode_offset != layout.electrode_offset || own.reference != layout.reference ||
        own.surfaces.size() != layout.surfaces.size())
        return false;
    for (std::size_t s = 0; s < own.surfaces.size(); ++s)
        if (own.surfaces[s].offset != layout.surfaces[s].offset || own.surfaces[s].panels != layout.surfaces[s].panels ||
            own.surfaces[s].two_sided != layout.surfaces[s].two_sided)
            return false;
    return true;
}

template <class S>
void check_scene(const Scene<S>& scene) {
    if (scene.surfaces.empty()) throw InputError("scene: no surfaces to solve for");
    if (!scene.images.bounds.empty() && scene.uniform_field.norm() > 0)
        throw InputError("scene: a uniform far field cannot be combined with a plane bounding the water");
    for (const auto& surface : scene.surfaces) {
        if (surface.mesh.size() == 0) throw InputError("surface '" + surface.mesh.name + "': no panels");
        if (surface.kind != InterfaceKind::sealed) continue;
        if (surface.panel_electrode.size() != surface.mesh.size())
            throw InputError("surface '" + surface.mesh.name + "': electrode tags do not match its panels");
        for (int e : surface.panel_electrode)
            if (e >= static_cast<int>(scene.electrodes.size()))
                throw InputError("surface '" + surface.mesh.name + "': panel tagged with unknown electrode " +
                                 std::to_string(e));
    }
    check_tank(scene);
}

// What a point outside the water is inside of (for messages).
template <class S>
std::string not_water_text(const Scene<S>& scene, int region) {
    const Surface<S>& surface = scene.surfaces[std::size_t(region)];
    return surface.encloses_water ? "lies outside the tank '" + surface.mesh.name + "'"
                                  : "lies inside '" + surface.mesh.name + "', whose interior is not modelled";
}

// Interior potential coefficient of q on a membrane: phi_in = u + rho_s * sigma_w * q.
template <class S>
S membrane_q_factor(const Scene<S>& scene, const Surface<S>& surface) {
    return surface.kind == InterfaceKind::membrane ? surface.membrane_resistance * scene.water_conductivity
                                                   : S(0);
}

}  // namespace detail

template <class S>
int enclosing_surface(const Scene<S>& scene, const Vec3& x) {
    for (std::size_t s = 0; s < scene.surfaces.size(); ++s) {
        const TriangleMesh& mesh = scene.surfaces[s].mesh;
        Vec3 lo = Vec3::Constant(std::numeric_limits<double>::infinity()), hi = -lo;
        for (const Vec3& v : mesh.vertices) lo = lo.cwiseMin(v), hi = hi.cwiseMax(v);
        const bool tank = scene.surfaces[s].encloses_water;
        if ((x.array() < lo.array()).any() || (x.array() > hi.array()).any()) {  // outside its box
            if (tank) return static_cast<int>(s);
            continue;
        }
        double winding = 0.0;  // sum of -double_layer = Omega / (4 pi); 1 inside, 0 outside
        for (std::size_t t = 0; t < mesh.size(); ++t)
            winding -= double_layer_triangle(x, mesh.corner(t, 0), mesh.corner(t, 1), mesh.corner(t, 2));
        // A tank's normals point inward: -1 in the water it holds, 0 outside it.
        if (tank ? winding > -0.5 : winding > 0.5) return static_cast<int>(s);
    }
    return -1;
}

// Region of every point source (-1 water); a source inside a sealed surface is an error.
template <class S>
std::vector<int> source_regions(const Scene<S>& scene) {
    std::vector<int> region;
    for (const auto& src : scene.sources) {
        const int r = enclosing_surface(scene, src.position);
        if (r >= 0 && scene.surfaces[r].kind == InterfaceKind::sealed)
            throw InputError("point source at (" + std::to_string(src.position.x()) + ", " +
                             std::to_string(src.position.y()) + ", " + std::to_string(src.position.z()) +
                             ") m " + detail::not_water_text(scene, r));
        region.push_back(r);
    }
    return region;
}

template <class S>
IncidentField<S> water_incident_field(const Scene<S>& scene, const std::vector<int>& regions) {
    std::vector<std::size_t> water;
    for (std::size_t i = 0; i < regions.size(); ++i)
        if (regions[i] < 0) water.push_back(i);
    return IncidentField<S>(scene, water);
}

template <class S>
SystemLayout system_layout(const Scene<S>& scene) {
    return detail::make_layout(scene);
}

template <class S>
std::vector<Eigen::Index> part_unknowns(const Scene<S>& scene, const SystemLayout& layout,
                                        const std::vector<std::size_t>& surfaces) {
    MURK_CHECK(detail::is_layout_of(layout, scene), "the layout was made for this scene");
    std::vector<char> chosen(scene.surfaces.size(), 0);
    for (std::size_t s : surfaces) {
        MURK_CHECK(s < scene.surfaces.size(), "a part names surfaces of its scene");
        chosen[s] = 1;
    }
    std::vector<Eigen::Index> out;
    for (std::size_t s = 0; s < scene.surfaces.size(); ++s) {
        if (!chosen[s]) continue;
        const auto& b = layout.surfaces[s];
        for (Eigen::Index k = 0; k < (b.two_sided ? 2 * b.panels : b.panels); ++k) out.push_back(b.offset + k);
    }
    // An electrode belongs to the part that holds its panels.
    std::vector<char> electrode_chosen(scene.electrodes.size(), 0);
    for (std::size_t s = 0; s < scene.surfaces.size(); ++s)
        if (chosen[s] && scene.surfaces[s].kind == InterfaceKind::sealed)
            for (int e : scene.surfaces[s].panel_electrode)
                if (e >= 0 && e < static_cast<int>(scene.electrodes.size())) electrode_chosen[e] = 1;
    for (std::size_t e = 0; e < scene.electrodes.size(); ++e)
        if (electrode_chosen[e]) out.push_back(layout.electrode_offset + static_cast<Eigen::Index>(e));
    // The reference unknown belongs to the part that holds the tank.
    const int tank = tank_index(scene);
    if (tank >= 0 && chosen[std::size_t(tank)]) out.push_back(layout.reference);
    return out;
}

namespace detail {

// Global unknown -> position in a selection, or -1.
inline std::vector<Eigen::Index> local_index(Eigen::Index size, const std::vector<Eigen::Index>* selection) {
    std::vector<Eigen::Index> local(size, selection ? -1 : 0);
    if (!selection) {
        for (Eigen::Index i = 0; i < size; ++i) local[i] = i;
        return local;
    }
    for (std::size_t i = 0; i < selection->size(); ++i) {
        const Eigen::Index global = (*selection)[i];
        MURK_CHECK(global >= 0 && global < size, "selected rows and columns are unknowns of the system");
        // A repeated index would leave a row or column of the block unassembled (zero).
        MURK_CHECK(local[global] < 0, "no row or column is selected twice");
        local[global] = static_cast<Eigen::Index>(i);
    }
    return local;
}

// Whether the selection (local indices, -1 where not selected) is water rows of
// some surfaces against unknowns of other surfaces, each unknown belonging to one
// panel (not an electrode's, which its panels share): assemble_selection writes
// each entry of such a block once. `columns` are every surface's panel_columns.
inline bool is_coupling_block(const SystemLayout& layout, const std::vector<PanelColumns>& columns,
                              const std::vector<Eigen::Index>& row_of, const std::vector<Eigen::Index>& col_of) {
    const std::size_t n = std::size_t(layout.size);
    std::vector<int> panels_of_column(n, 0), surface_of_column(n, -1), surface_of_row(n, -1);
    for (std::size_t s = 0; s < columns.size(); ++s) {
        for (const auto* of : {&columns[s].phi, &columns[s].q})
            for (const Eigen::Index col : *of)
                if (col >= 0) ++panels_of_column[std::size_t(col)], surface_of_column[std::size_t(col)] = int(s);
        for (Eigen::Index k = 0; k < layout.surfaces[s].panels; ++k)
            surface_of_row[std::size_t(layout.surfaces[s].offset + k)] = int(s);  // its water rows
    }
    std::vector<char> row_surface(columns.size(), 0);
    for (std::size_t r = 0; r < n; ++r) {
        if (row_of[r] < 0) continue;
        if (surface_of_row[r] < 0) return false;
        row_surface[std::size_t(surface_of_row[r])] = 1;
    }
    for (std::size_t c = 0; c < n; ++c)
        if (col_of[c] >= 0 && (panels_of_column[c] != 1 || row_surface[std::size_t(surface_of_column[c])]))
            return false;
    return true;
}

// The tank's border (solver/tank.hpp): the reference row, mean of the wall's
// water-side potential weighted by area = 0, and the reference unknown's column.
// With voltage-driven or potential-held electrodes the column shifts all their
// potentials together (in a closed tank only their differences are imposed);
// otherwise it enters every wall row with coefficient 1, where it absorbs the
// part of the right-hand side outside the range of the singular operator (zero
// for the continuous problem when the net current is zero; a small
// discretization residue here).
template <class S, class Add>
void add_reference_border(const Scene<S>& scene, const SystemLayout& layout, const std::vector<PanelSet>& panels,
                          const std::vector<Eigen::Index>& row_of, VectorX<S>& rhs, Add& add) {
    const auto tank = std::size_t(tank_index(scene));
    const auto& block = layout.surfaces[tank];
    const double wall_area = panels[tank].area.sum();
    const Eigen::Index ref = layout.reference;
    for (Eigen::Index k = 0; k < block.panels; ++k) add(ref, block.offset + k, panels[tank].area(k) / wall_area);
    if (row_of[ref] >= 0) rhs(row_of[ref]) = S(0);
    for (std::size_t e = 0; e < scene.electrodes.size(); ++e) {
        const ElectrodeDrive d = scene.electrodes[e].drive;
        if (d == ElectrodeDrive::voltage || d == ElectrodeDrive::fixed_potential)
            add(layout.electrode_offset + static_cast<Eigen::Index>(e), ref, -1.0);
    }
    if (!holds_electrode_potential(scene))
        for (Eigen::Index k = 0; k < block.panels; ++k) add(block.offset + k, ref, 1.0);
}

// The rows `rows` and columns `cols` of the system (null: all of them). Surface
// pairs with no selected row or column are skipped, so a coupling block between
// a body and an object costs only the body-object panel pairs.
template <class S>
void assemble_selection(const Scene<S>& scene, const SystemLayout& layout, const QuadratureOptions& options,
                        const std::vector<Eigen::Index>* rows, const std::vector<Eigen::Index>* cols,
                        MatrixX<S>& matrix, VectorX<S>& rhs) {
    check_scene(scene);
    MURK_CHECK(is_layout_of(layout, scene), "the layout was made for this scene");
    const Eigen::Index n = layout.size;
    const std::vector<Eigen::Index> row_of = local_index(n, rows), col_of = local_index(n, cols);
    matrix.resize(rows ? Eigen::Index(rows->size()) : n, cols ? Eigen::Index(cols->size()) : n);  // keeps storage of equal size
    rhs.setZero(matrix.rows());
    bool written_once = false;  // decided below, before any entry is written
    auto add = [&](Eigen::Index r, Eigen::Index c, S v) {
        const Eigen::Index i = row_of[r], j = col_of[c];
        if (i < 0 || j < 0) return;
        if (written_once) matrix(i, j) = S(0) + v;
        else matrix(i, j) += v;
    };
    auto any_selected = [](const std::vector<Eigen::Index>& of, Eigen::Index from, Eigen::Index count) {
        for (Eigen::Index k = from; k < from + count; ++k)
            if (of[k] >= 0) return true;
        return false;
    };
    const S sigma_w = scene.water_conductivity;

    std::vector<PanelSet> panels;
    std::vector<PanelColumns> columns;
    std::vector<bool> has_cols;
    for (std::size_t s = 0; s < scene.surfaces.size(); ++s) {
        panels.emplace_back(scene.surfaces[s].mesh);
        columns.push_back(panel_columns(scene, layout, s));
        bool any = false;
        for (Eigen::Index c : columns.back().phi) any = any || (c >= 0 && col_of[c] >= 0);
        for (Eigen::Index c : columns.back().q) any = any || (c >= 0 && col_of[c] >= 0);
        has_cols.push_back(any);
    }
    // A coupling block of a sweep point (the water rows of some surfaces against
    // other surfaces' unknowns, each unknown one panel's) has every entry written
    // exactly once below: it is then not cleared first, which saves a pass over
    // its tens of megabytes (8 % of an exact sweep point). Each entry is then set
    // to 0 + v, the same bits as adding v to a cleared entry.
    written_once = rows && cols && is_coupling_block(layout, columns, row_of, col_of);
    if (!written_once) matrix.setZero();

    const std::vector<int> source_region = source_regions(scene);
    const IncidentField<S> incident = water_incident_field(scene, source_region);

    // Blocks (sweep couplings, many per run) write their layer blocks into
    // storage kept per thread that only grows: fresh allocations of this size
    // cost more in page faults than filling them. The full system allocates.
    thread_local std::vector<double> kept;
    Eigen::MatrixXd own;
    const bool imaged = scene.images.has_terms();
    const bool complex_weights = has_complex_weights(scene.images);
    const int layers = !imaged ? 2 : complex_weights ? 4 : 3;  // pairs: direct, image scratch, imaginary parts
    auto layer_buffers = [&](Eigen::Index m, Eigen::Index n) {
        const std::size_t size = std::size_t(m) * std::size_t(n);
        double* data;
        if (rows) {
            if (kept.size() < 2 * layers * size) kept.resize(2 * layers * size);
            data = kept.data();
        } else {
            own.resize(std::max<Eigen::Index>(1, 2 * layers * m), std::max<Eigen::Index>(1, n));
            data = own.data();
        }
        using Block = Eigen::Map<Eigen::MatrixXd>;
        auto at = [&](int j) { return data + (j < 2 * layers ? j : 0) * size; };
        return std::array<Block, 6>{Block(at(0), m, n), Block(at(1), m, n), Block(at(2), m, n),
                                    Block(at(3), m, n), Block(at(4), m, n), Block(at(5), m, n)};
    };
    // Rows of a surface go in strips: the layer blocks of a strip are all its
    // temporary storage (a few tens of MB), not a second copy of the system.
    constexpr Eigen::Index kStrip = 512;
    for (std::size_t a = 0; a < scene.surfaces.size(); ++a) {
        const auto& block = layout.surfaces[a];
        const bool water_rows = any_selected(row_of, block.offset, block.panels);
        const bool inner_rows = block.two_sided && any_selected(row_of, block.offset + block.panels, block.panels);
        if (!water_rows && !inner_rows) continue;
        const Eigen::Matrix3Xd& x = panels[a].centroid;
        for (Eigen::Index i0 = 0; i0 < block.panels; i0 += kStrip) {
            const Eigen::Index strip = std::min(kStrip, block.panels - i0);
            const Eigen::Matrix3Xd xs = x.middleCols(i0, strip);
            for (std::size_t b = 0; b < scene.surfaces.size(); ++b) {
                if (!has_cols[b] || (!water_rows && a != b)) continue;
                auto buffers = layer_buffers(strip, panels[b].size());
                auto &single = buffers[0], &dbl = buffers[1], &single_image = buffers[2], &dbl_image = buffers[3];
                auto &single_im = buffers[4], &dbl_im = buffers[5];
                assemble_layer_blocks(xs, panels[b], options, a == b, i0, single, dbl);
                // Seen from a point of a tank's wall, the wall's inward-oriented
                // double layer sums to +1/2 (Gauss's law from inside), not -1/2.
                if (a == b && scene.surfaces[a].encloses_water)
                    for (Eigen::Index i = 0; i < strip; ++i) dbl(i, i0 + i) += 1.0;
                const auto& col = columns[b];

                // Interior equation of surface a (only its own panels bound its interior):
                // 1/2 phi_in + K phi_in + (sigma_w / sigma_in) V q = interior sources.
                if (a == b && inner_rows) {
                    const Surface<S>& surface = scene.surfaces[a];
                    const S q_factor = membrane_q_factor(scene, surface);
                    const S v_factor = sigma_w / surface.inner_conductivity;
                    const Eigen::Index r0 = block.offset + block.panels + i0;
                    for (Eigen::Index k = 0; k < block.panels; ++k) {
                        const Eigen::Index cu = col.phi[k], cq = col.q[k];
                        for (Eigen::Index i = 0; i < strip; ++i) {
                            const double kk = dbl(i, k) + (i + i0 == k ? 0.5 : 0.0);
                            add(r0 + i, cu, kk);
                            add(r0 + i, cq, kk * q_factor + v_factor * single(i, k));
                        }
                    }
                }
                if (!water_rows) continue;

                // Exterior (water) equation on surface a:
                // 1/2 phi_w - sum_b Kw phi_w - sum_b Vw q = incident + water sources.
                if (imaged) {
                    if (complex_weights) single_im.setZero(), dbl_im.setZero();
                    add_image_layers(scene.images, xs, panels[b], options, single, dbl, single_image, dbl_image,
                                     complex_weights ? &single_im : nullptr, complex_weights ? &dbl_im : nullptr);
                }
                const Eigen::Index r0 = block.offset + i0;
                for (Eigen::Index k = 0; k < layout.surfaces[b].panels; ++k) {
                    const Eigen::Index cphi = col.phi[k], cq = col.q[k];
                    for (Eigen::Index i = 0; i < strip; ++i) {
                        if (complex_weights) {
                            add(r0 + i, cphi, with_imaginary<S>(-dbl(i, k), -dbl_im(i, k)));
                            if (cq >= 0) add(r0 + i, cq, with_imaginary<S>(-single(i, k), -single_im(i, k)));
                        } else {
                            add(r0 + i, cphi, -dbl(i, k));
                            if (cq >= 0) add(r0 + i, cq, -single(i, k));
                        }
                    }
                }
                if (a == b)
                    for (Eigen::Index i = 0; i < strip; ++i) add(r0 + i, col.phi[i0 + i], 0.5);
            }
        }

        // Right-hand sides of surface a.
        for (Eigen::Index i = 0; i < block.panels; ++i) {
            const Vec3 xi = x.col(i);
            if (row_of[block.offset + i] >= 0) rhs(row_of[block.offset + i]) = incident.potential(xi);
            if (!block.two_sided || row_of[block.offset + block.panels + i] < 0) continue;
            S rhs_inner = S(0);
            for (std::size_t p = 0; p < scene.sources.size(); ++p) {
                const auto& src = scene.sources[p];
                if (source_region[p] == static_cast<int>(a))
                    rhs_inner += point_source_potential(src.current, scene.surfaces[a].inner_conductivity,
                                                        src.position, xi);
            }
            rhs(row_of[block.offset + block.panels + i]) = rhs_inner;
        }
    }

    // Electrode rows. Current balance is written per reference area so that its
    // entries are of order one: sum_k (A_k / A_ref) q_k = I / (sigma_w A_ref).
    for (std::size_t e = 0; e < scene.electrodes.size(); ++e) {
        const Eigen::Index row = layout.electrode_offset + static_cast<Eigen::Index>(e);
        if (row_of[row] < 0) continue;
        const Electrode<S>& electrode = scene.electrodes[e];
        if (electrode.drive == ElectrodeDrive::voltage || electrode.drive == ElectrodeDrive::fixed_potential) {
            add(row, row, 1.0);
            rhs(row_of[row]) = electrode.value;
            continue;
        }
        double total_area = 0.0;
        for (std::size_t s = 0; s < scene.surfaces.size(); ++s)
            if (!layout.surfaces[s].two_sided)
                for (Eigen::Index k = 0; k < layout.surfaces[s].panels; ++k)
                    if (scene.surfaces[s].panel_electrode[k] == static_cast<int>(e)) total_area += panels[s].area(k);
        if (total_area <= 0.0)
            throw InputError("electrode '" + electrode.name + "' has no panels");
        for (std::size_t s = 0; s < scene.surfaces.size(); ++s)
            if (!layout.surfaces[s].two_sided)
                for (Eigen::Index k = 0; k < layout.surfaces[s].panels; ++k)
                    if (scene.surfaces[s].panel_electrode[k] == static_cast<int>(e))
                        add(row, columns[s].q[k], panels[s].area(k) / total_area);
        rhs(row_of[row]) =
            electrode.drive == ElectrodeDrive::current ? electrode.value / (sigma_w * total_area) : S(0);
    }
    if (layout.reference >= 0) add_reference_border(scene, layout, panels, row_of, rhs, add);
    // Between the centroids of checked, separated meshes every panel integral is
    // finite; a pass over the whole block is left to builds with assertions.
    MURK_ASSERT(matrix.allFinite(), "every entry of an assembled block is finite");
}

}  // namespace detail

template <class S>
LinearSystem<S> assemble_system(const Scene<S>& scene, const QuadratureOptions& options) {
    LinearSystem<S> sys;
    sys.layout = detail::make_layout(scene);
    detail::assemble_selection(scene, sys.layout, options, nullptr, nullptr, sys.matrix, sys.rhs);
    return sys;
}

template <class S>
SystemBlock<S> assemble_block(const Scene<S>& scene, const SystemLayout& layout, const QuadratureOptions& options,
                              const std::vector<Eigen::Index>& rows, const std::vector<Eigen::Index>& cols) {
    SystemBlock<S> block;
    assemble_block_into(scene, layout, options, rows, cols, block);
    return block;
}

template <class S>
void assemble_block_into(const Scene<S>& scene, const SystemLayout& layout, const QuadratureOptions& options,
                         const std::vector<Eigen::Index>& rows, const std::vector<Eigen::Index>& cols,
                         SystemBlock<S>& block) {
    detail::assemble_selection(scene, layout, options, &rows, &cols, block.matrix, block.rhs);
}

template <class S>
VectorX<S> solve_dense(LinearSystem<S>& system) {
    Eigen::PartialPivLU<MatrixX<S>> lu(system.matrix);
    VectorX<S> x = lu.solve(system.rhs);
    // LU with partial pivoting is backward stable: the residual is of the order of
    // rounding times |A| |x| (a growth factor near one in practice); 1e-8 leaves a
    // wide margin. One more product with the matrix, so only with assertions.
    MURK_ASSERT((system.matrix * x - system.rhs).norm() <=
                    1e-8 * (system.matrix.norm() * x.norm() + system.rhs.norm()),
                "the dense solve satisfies its system");
    return x;
}

template <class S>
Solution<S> unpack_solution(const Scene<S>& scene, const SystemLayout& layout, const VectorX<S>& x) {
    MURK_CHECK(detail::is_layout_of(layout, scene), "the layout was made for this scene");
    MURK_CHECK(x.size() == layout.size, "one value per unknown of the layout");
    Solution<S> sol;
    const S sigma_w = scene.water_conductivity;
    sol.electrode_potential.resize(scene.electrodes.size());
    sol.electrode_current.assign(scene.electrodes.size(), S(0));
    for (std::size_t e = 0; e < scene.electrodes.size(); ++e)
        sol.electrode_potential[e] = x(layout.electrode_offset + static_cast<Eigen::Index>(e));
    for (std::size_t s = 0; s < scene.surfaces.size(); ++s) {
        const auto& block = layout.surfaces[s];
        const Surface<S>& surface = scene.surfaces[s];
        SurfaceSolution<S> out;
        const Eigen::Index n = block.panels;
        if (block.two_sided) {
            out.outer_potential = x.segment(block.offset, n);
            out.current_density = sigma_w * x.segment(block.offset + n, n);
            out.inner_potential = out.outer_potential;
            if (surface.kind == InterfaceKind::membrane)
                out.inner_potential += surface.membrane_resistance * out.current_density;
        } else {
            out.outer_potential.resize(n);
            out.current_density.resize(n);
            for (Eigen::Index k = 0; k < n; ++k) {
                const int e = surface.panel_electrode[k];
                if (e < 0) {
                    out.outer_potential(k) = x(block.offset + k);
                    out.current_density(k) = S(0);
                } else {
                    out.outer_potential(k) = sol.electrode_potential[e];
                    out.current_density(k) = sigma_w * x(block.offset + k);
                    sol.electrode_current[e] += out.current_density(k) * surface.mesh.area(k);
                }
            }
        }
        sol.surfaces.push_back(std::move(out));
    }
    return sol;
}

template <class S>
Solution<S> solve_scene(const Scene<S>& scene, const QuadratureOptions& options) {
    if (scene.surfaces.empty()) {  // sources in open water: nothing to solve for
        (void)source_regions(scene);
        return Solution<S>{};
    }
    LinearSystem<S> system = assemble_system(scene, options);
    const VectorX<S> x = solve_dense(system);
    return unpack_solution(scene, system.layout, x);
}

template <class S>
VectorX<S> potential_at(const Scene<S>& scene, const Solution<S>& solution, const Eigen::Matrix3Xd& points,
                        const QuadratureOptions& options, bool induced_only) {
    const Eigen::Index m = points.cols();
    MURK_CHECK(solution.surfaces.size() == scene.surfaces.size(), "the solution is of this scene");
    for (std::size_t s = 0; s < scene.surfaces.size(); ++s) {
        const auto panels = static_cast<Eigen::Index>(scene.surfaces[s].mesh.size());
        const SurfaceSolution<S>& sol = solution.surfaces[s];
        MURK_CHECK(sol.outer_potential.size() == panels && sol.current_density.size() == panels &&
                       (scene.surfaces[s].kind == InterfaceKind::sealed || sol.inner_potential.size() == panels),
                   "the solution holds one value per panel of each surface");
    }
    const std::vector<int> source_region = source_regions(scene);
    const IncidentField<S> incident = water_incident_field(scene, source_region);

    // Water points: Green's representation of the scattered potential
    // phi - phi_incident, whose panel densities (u - phi_inc, q + d phi_inc/dn) are
    // of the size of the perturbation itself. Representing the total potential
    // instead would subtract large, nearly cancelling incident terms and lose the
    // small perturbation of a distant object to quadrature error.
    // Interior points: representation of the interior potential plus the
    // direct potential of the sources in that interior.
    VectorX<S> phi = VectorX<S>::Zero(m);
    std::vector<int> region(m);
    for (Eigen::Index i = 0; i < m; ++i) {
        const Vec3 xi = points.col(i);
        region[i] = enclosing_surface(scene, xi);
        if (region[i] >= 0 && scene.surfaces[region[i]].kind == InterfaceKind::sealed)
            throw InputError("point (" + std::to_string(xi.x()) + ", " + std::to_string(xi.y()) + ", " +
                             std::to_string(xi.z()) + ") m " + detail::not_water_text(scene, region[i]));
        if (induced_only) continue;
        if (region[i] < 0) {
            phi(i) = incident.potential(xi);
            continue;
        }
        for (std::size_t p = 0; p < scene.sources.size(); ++p)
            if (source_region[p] == region[i])
                phi(i) += detail::point_source_potential(scene.sources[p].current,
                                                         scene.surfaces[region[i]].inner_conductivity,
                                                         scene.sources[p].position, xi);
    }
    Eigen::MatrixXd single, dbl, single_image, dbl_image;
    for (std::size_t b = 0; b < scene.surfaces.size(); ++b) {
        const PanelSet panels(scene.surfaces[b].mesh);
        const SurfaceSolution<S>& sol = solution.surfaces[b];
        const Eigen::Index n = panels.size();
        VectorX<S> scattered_u(n), scattered_q(n);
        for (Eigen::Index k = 0; k < n; ++k) {
            const Vec3 c = panels.centroid.col(k), nk = panels.normal.col(k);
            scattered_u(k) = sol.outer_potential(k) - incident.potential(c);
            scattered_q(k) = sol.current_density(k) / scene.water_conductivity + incident.normal_derivative(c, nk);
        }
        assemble_layer_blocks(points, panels, options, false, single, dbl);
        // water: phi_s = sum_b (Kw u_s + Vw q_s), images included; interior: phi = src - K phi_in - V j / sigma_in
        VectorX<S> water = dbl.cast<S>() * scattered_u + single.cast<S>() * scattered_q;
        for (const FieldImage<S>& t : scene.images.terms) {
            assemble_layer_blocks(detail::image_points(t, points), panels, options, false, single_image, dbl_image);
            water += t.weight * (dbl_image.cast<S>() * scattered_u + single_image.cast<S>() * scattered_q);
        }
        if (scene.images.constant != S(0)) {
            S total = S(0);  // sum of area q: the constant kernel's single layer
            for (Eigen::Index k = 0; k < n; ++k) total += panels.area(k) * scattered_q(k);
            water.array() -= scene.images.constant / S(4.0 * M_PI) * total;
        }
        VectorX<S> inner;
        if (scene.surfaces[b].kind != InterfaceKind::sealed)
            inner = -(dbl.cast<S>() * sol.inner_potential +
                      single.cast<S>() * (sol.current_density / scene.surfaces[b].inner_conductivity));
        for (Eigen::Index i = 0; i < m; ++i) {
            if (region[i] < 0) phi(i) += water(i);
            else if (region[i] == static_cast<int>(b)) phi(i) += inner(i);
        }
    }
    return phi;
}

template <class S>
Eigen::Matrix<S, 3, Eigen::Dynamic> field_at(const Scene<S>& scene, const Solution<S>& solution,
                                             const Eigen::Matrix3Xd& points, const QuadratureOptions& options) {
    const Eigen::Index m = points.cols();
    const std::vector<int> source_region = source_regions(scene);
    const IncidentField<S> incident = water_incident_field(scene, source_region);
    // Six displaced copies of every point: +-step along x, y, z.
    Eigen::Matrix3Xd displaced(3, 6 * m);
    Eigen::VectorXd step(m);
    for (Eigen::Index i = 0; i < m; ++i) {
        const Vec3 x = points.col(i);
        double nearest = std::numeric_limits<double>::infinity();
        for (const auto& surface : scene.surfaces)
            for (std::size_t t = 0; t < surface.mesh.size(); ++t)
                nearest = std::min(nearest, (surface.mesh.centroid(t) - x).norm());
        step(i) = std::isfinite(nearest) ? 1e-3 * nearest : 1.0;  // no surfaces: the induced part is zero
        for (int axis = 0; axis < 3; ++axis) {
            displaced.col(6 * i + 2 * axis) = x + step(i) * Vec3::Unit(axis);
            displaced.col(6 * i + 2 * axis + 1) = x - step(i) * Vec3::Unit(axis);
        }
    }
    // Water points: surfaces' part only (the incident part is exact below);
    // interior points: the whole interior potential.
    std::vector<int> region(m);
    for (Eigen::Index i = 0; i < m; ++i) region[i] = enclosing_surface(scene, points.col(i));
    const VectorX<S> induced = potential_at(scene, solution, displaced, options, true);
    const VectorX<S> total = potential_at(scene, solution, displaced, options, false);
    Eigen::Matrix<S, 3, Eigen::Dynamic> field(3, m);
    for (Eigen::Index i = 0; i < m; ++i) {
        const VectorX<S>& phi = region[i] < 0 ? induced : total;
        for (int axis = 0; axis < 3; ++axis) {
            const S derivative = (phi(6 * i + 2 * axis) - phi(6 * i + 2 * axis + 1)) / (2.0 * step(i));
            const S incident_derivative =
                region[i] < 0 ? incident.normal_derivative(points.col(i), Vec3::Unit(axis)) : S(0);
            field(axis, i) = -(derivative + incident_derivative);
        }
    }
    return field;
}

}  // namespace murk
