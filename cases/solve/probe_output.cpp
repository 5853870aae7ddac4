#include "cases/solve/probe_output.hpp"

#include "cases/output/coordinates.hpp"
#include "cases/output/result_layout.hpp"
#include "cases/output/surface_output.hpp"
#include "solver/bem_system.hpp"

#include <cmath>
#include <string>
#include <vector>

namespace murk {

template <class S>
ProbeValues<S> evaluate_probes(const CaseSpec& spec, const Scene<S>& scene, const Solution<S>& solution,
                               const QuadratureOptions& quad) {
    ProbeValues<S> out;
    const std::size_t n = spec.probe_points.size();
    if (n == 0) return out;
    Eigen::Matrix3Xd points(3, n);
    for (std::size_t i = 0; i < n; ++i)
        for (int k = 0; k < 3; ++k) points(k, i) = spec.probe_points[i].position_m[k];
    const VectorX<S> phi = potential_at(scene, solution, points, quad);
    const Eigen::Matrix<S, 3, Eigen::Dynamic> e = field_at(scene, solution, points, quad);
    for (std::size_t i = 0; i < n; ++i) {
        out.potential.push_back(phi(i));
        out.field.push_back({e(0, i), e(1, i), e(2, i)});
    }
    return out;
}

namespace {

double distance(const Point3& a, const Point3& b) {
    return std::sqrt((a[0] - b[0]) * (a[0] - b[0]) + (a[1] - b[1]) * (a[1] - b[1]) + (a[2] - b[2]) * (a[2] - b[2]));
}

// The coordinates of a probe's dimensions in its group, and their names: a point has one
// dimension of one index; a line's points lie along it, a grid's along and across, at the
// distances (m) from the probe's first point that the coordinates hold.
std::vector<std::string> probe_dimensions(const H5Group& group, const CaseSpec& spec, const ProbeSpec& probe) {
    if (probe.form == ProbeForm::point) {
        index_coordinate(group, "point", 1, "probe point index");
        return {"point"};
    }
    const std::size_t across = probe.shape.size() > 1 ? probe.shape[1] : 1;
    const Point3& first = spec.probe_points[probe.first_point].position_m;
    std::vector<double> along_m, across_m;
    for (std::size_t i = 0; i < probe.shape[0]; ++i)
        along_m.push_back(distance(spec.probe_points[probe.first_point + i * across].position_m, first));
    group.write_coordinate("along", along_m, "m", "distance from the probe's first point along it");
    if (probe.shape.size() == 1) return {"along"};
    for (std::size_t j = 0; j < across; ++j)
        across_m.push_back(distance(spec.probe_points[probe.first_point + j].position_m, first));
    group.write_coordinate("across", across_m, "m", "distance from the probe's first point across the grid");
    return {"along", "across"};
}

}  // namespace

template <class S>
void write_probes(H5Group& root, const CaseSpec& spec, const ProbeValues<S>& baseline, const ProbeValues<S>& perturbed) {
    for (const ProbeSpec& probe : spec.probes) {
        H5Group g = root.group("probes/" + surface_group_name(probe.name));
        H5Shape shape(probe.shape.begin(), probe.shape.end()), shape3 = shape;
        shape3.push_back(3);
        const std::vector<std::string> dims = probe_dimensions(g, spec, probe);
        std::vector<std::string> dims3 = dims;
        dims3.push_back(layout::kXyz);
        xyz_coordinate(g);
        std::vector<double> position;
        std::vector<S> phi[3], field[3];
        for (std::size_t i = probe.first_point; i < probe.first_point + probe.point_count; ++i) {
            for (int k = 0; k < 3; ++k) position.push_back(spec.probe_points[i].position_m[k]);
            phi[0].push_back(baseline.potential[i]);
            phi[1].push_back(perturbed.potential[i]);
            phi[2].push_back(perturbed.potential[i] - baseline.potential[i]);
            for (int k = 0; k < 3; ++k) {
                field[0].push_back(baseline.field[i][k]);
                field[1].push_back(perturbed.field[i][k]);
                field[2].push_back(perturbed.field[i][k] - baseline.field[i][k]);
            }
        }
        g.write("position", position, shape3, "m", "probe point position").label_dimensions(dims3);
        const char* which[3] = {"baseline", "perturbed", "difference"};
        const char* what[3] = {"without the objects", "with the objects", "change caused by the objects"};
        for (int w = 0; w < 3; ++w) {
            g.write(std::string(which[w]) + "_potential", phi[w], shape, "V", std::string("potential ") + what[w])
                .label_dimensions(dims);
            g.write(std::string(which[w]) + "_field", field[w], shape3, "V m-1", std::string("electric field ") + what[w])
                .label_dimensions(dims3);
        }
    }
}

template ProbeValues<double> evaluate_probes(const CaseSpec&, const Scene<double>&, const Solution<double>&,
                                             const QuadratureOptions&);
template ProbeValues<Complex> evaluate_probes(const CaseSpec&, const Scene<Complex>&, const Solution<Complex>&,
                                              const QuadratureOptions&);
template void write_probes(H5Group&, const CaseSpec&, const ProbeValues<double>&, const ProbeValues<double>&);
template void write_probes(H5Group&, const CaseSpec&, const ProbeValues<Complex>&, const ProbeValues<Complex>&);

}  // namespace murk
