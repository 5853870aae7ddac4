// The full path: the point's whole scene assembled and LU-factored, as if the
// sweep were many separate solves. The reference the other paths are tested against.
#include "cases/sweep/point_path.hpp"

#include "solver/bem_system.hpp"

namespace murk {

namespace {

template <class S>
class FullPath : public PointPath<S> {
public:
    explicit FullPath(const PathContext<S>& context) : c_(context) {}

    std::vector<PathReading<S>> solve(const std::vector<PlacedPoint<S>>& points) const override {
        std::vector<PathReading<S>> out;
        for (const PlacedPoint<S>& p : points) {
            const Scene<S> scene = point_scene(c_, p);
            const Solution<S> solution = solve_scene(scene, c_.quad);
            out.push_back({sensor_readings(c_.baselines->sensors, scene, solution, c_.quad), PathCode::full});
        }
        return out;
    }

private:
    PathContext<S> c_;
};

}  // namespace

template <class S>
std::unique_ptr<PointPath<S>> make_full_path(const PathContext<S>& context) {
    return std::make_unique<FullPath<S>>(context);
}

template std::unique_ptr<PointPath<double>> make_full_path(const PathContext<double>&);
template std::unique_ptr<PointPath<Complex>> make_full_path(const PathContext<Complex>&);

}  // namespace murk
