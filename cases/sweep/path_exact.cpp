// The exact path: the fixed part stays factored and the object is coupled to it
// by GMRES (solver/coupled_solve.hpp), each iteration one solve against the
// stored factors. Nothing is approximated beyond the discretization. An object
// almost touching the body can keep GMRES from converging: that point falls back
// on the full path, and says so.
#include "cases/sweep/point_path.hpp"

#include "solver/bem_system.hpp"

namespace murk {

namespace {

// Iterations after which a point falls back on the full solve; two or three
// suffice unless the object nearly touches the body (tools/bench_sweep.cpp).
constexpr int kMaxCouplingIterations = 80;

template <class S>
class ExactPath : public PointPath<S> {
public:
    explicit ExactPath(const PathContext<S>& context) : c_(context), full_(make_full_path(context)) {}

    std::vector<PathReading<S>> solve(const std::vector<PlacedPoint<S>>& points) const override {
        std::vector<PathReading<S>> out;
        for (const PlacedPoint<S>& p : points) {
            const FixedPart<S>& fixed = *c_.baselines->waters[p.water].fixed;
            const Scene<S> scene = point_scene(c_, p);
            const std::size_t moving = scene.surfaces.size() - 1;
            // The object's own block moves with it, unless a plane's images move
            // differently: then it is the point's own.
            const std::shared_ptr<const MovingBlock<S>> block =
                scene.plane ? std::make_shared<const MovingBlock<S>>(factor_moving_block(scene, {moving}, c_.quad))
                            : c_.objects->block(*p.object, c_.quad);
            CouplingOptions coupling = c_.coupling;
            coupling.max_iterations = kMaxCouplingIterations;
            const CoupledSolution<S> coupled = solve_coupled(scene, {moving}, fixed, *block, c_.quad, coupling);
            if (!coupled.gmres.converged) {
                out.push_back(full_->solve({p}).front());
                continue;
            }
            out.push_back(
                {sensor_readings(c_.baselines->sensors, scene, coupled.solution, c_.quad), PathCode::exact});
        }
        return out;
    }

private:
    PathContext<S> c_;
    std::unique_ptr<PointPath<S>> full_;
};

}  // namespace

template <class S>
std::unique_ptr<PointPath<S>> make_exact_path(const PathContext<S>& context) {
    return std::make_unique<ExactPath<S>>(context);
}

template std::unique_ptr<PointPath<double>> make_exact_path(const PathContext<double>&);
template std::unique_ptr<PointPath<Complex>> make_exact_path(const PathContext<Complex>&);

}  // namespace murk
