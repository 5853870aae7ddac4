// The induced-dipole path (solver/dipole_path.hpp): the object becomes the point
// dipole M E_b(c) that the baseline field E_b induces at its centre c, and the
// fixed part answers a block of such dipoles with one blocked solve, or, for a
// few electrode sensors, through lead fields by reciprocity.
#include "cases/sweep/point_path.hpp"

#include "solver/bem_system.hpp"
#include "solver/dipole_path.hpp"

namespace murk {

namespace {

template <class S>
class DipolePath : public PointPath<S> {
public:
    explicit DipolePath(const PathContext<S>& context) : c_(context) {}

    std::size_t block_size() const override { return kDipoleBlockSize; }

    std::vector<PathReading<S>> solve(const std::vector<PlacedPoint<S>>& points) const override {
        const WaterBaseline<S>& base = c_.baselines->waters[points.front().water];
        const FixedPart<S>& fixed = *base.fixed;
        const SensorLayout& sensors = c_.baselines->sensors;
        Eigen::Matrix3Xd centres(3, points.size());
        for (std::size_t k = 0; k < points.size(); ++k) centres.col(k) = points[k].centre();
        const Eigen::Matrix<S, 3, Eigen::Dynamic> field = baseline_field(fixed, centres, c_.quad);
        std::vector<PointDipole<S>> dipoles;
        for (std::size_t k = 0; k < points.size(); ++k)
            dipoles.push_back({points[k].centre(), c_.objects->tensor(*points[k].object, c_.quad) * field.col(k)});

        std::vector<PathReading<S>> out(points.size());
        if (base.leads) {  // reciprocity: the fixed part's reading plus L b(dipole)
            const MatrixX<S> change = base.leads->readings_change(dipoles);
            for (std::size_t k = 0; k < points.size(); ++k) {
                out[k] = {base.readings, PathCode::dipole};
                for (std::size_t i = 0; i < out[k].reading.size(); ++i)
                    out[k].reading[i] += change(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(k));
            }
            return out;
        }
        const MatrixX<S> x = unknowns_with_dipoles(fixed, dipoles);
        for (std::size_t k = 0; k < points.size(); ++k) {
            const Solution<S> solution = unpack_solution(fixed.scene(), fixed.layout(), VectorX<S>(x.col(k)));
            if (sensors.probes) {  // the dipole's own potential reaches the probes directly
                Scene<S> with_dipole = fixed.scene();
                with_dipole.dipoles.push_back(dipoles[k]);
                out[k] = {sensor_readings(sensors, with_dipole, solution, c_.quad), PathCode::dipole};
            } else {
                out[k] = {sensor_readings(sensors, fixed.scene(), solution, c_.quad), PathCode::dipole};
            }
        }
        return out;
    }

private:
    PathContext<S> c_;
};

}  // namespace

template <class S>
std::unique_ptr<PointPath<S>> make_dipole_path(const PathContext<S>& context) {
    return std::make_unique<DipolePath<S>>(context);
}

template std::unique_ptr<PointPath<double>> make_dipole_path(const PathContext<double>&);
template std::unique_ptr<PointPath<Complex>> make_dipole_path(const PathContext<Complex>&);

}  // namespace murk
