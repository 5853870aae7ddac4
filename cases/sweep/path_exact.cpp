// The exact path: the fixed part stays factored and the object is coupled to it
// by GMRES (solver/coupled_solve.hpp), each iteration one solve against the
// stored factors. Nothing is approximated beyond the discretization. An object
// almost touching the body can keep GMRES from converging: that point falls back
// on the full path, and says so (on a compressed body, the point's whole scene
// compressed, since a dense LU of it would not fit). Points come in batches of one water whose
// GMRES iterations share their solves against the factors.
#include "cases/sweep/point_path.hpp"

#include "geometry/internal_check.hpp"
#include "solver/bem_system.hpp"

namespace murk {

namespace {

template <class S>
class ExactPath : public PointPath<S> {
public:
    explicit ExactPath(const PathContext<S>& context) : c_(context), full_(make_full_path(context)) {}

    // The points of one water, solved as one batch (solve_coupled_together).
    std::vector<PathReading<S>> solve(const std::vector<PlacedPoint<S>>& points) const override {
        if (points.empty()) return {};
        const std::size_t water = points.front().water;
        const FixedPart<S>& fixed = *c_.baselines->waters[water].fixed;
        std::vector<Scene<S>> scenes;
        scenes.reserve(points.size());  // the problems point into it
        std::vector<std::shared_ptr<const MovingBlock<S>>> blocks;
        std::vector<CoupledProblem<S>> problems;
        for (const PlacedPoint<S>& p : points) {
            MURK_CHECK(p.water == water, "an exact batch holds points of one water");
            scenes.push_back(point_scene(c_, p));
            const Scene<S>& scene = scenes.back();
            const std::size_t moving = scene.surfaces.size() - 1;
            // The object's own block moves with it, unless images of the water's
            // bounds move differently: then it is the point's own.
            blocks.push_back(scene.images.has_terms()
                                 ? std::make_shared<const MovingBlock<S>>(factor_moving_block(scene, {moving}, c_.quad))
                                 : c_.objects->block(*p.object, c_.quad));
            problems.push_back({&scene, {moving}, blocks.back().get()});
        }
        // c_.coupling.max_iterations: after these a point falls back on its whole scene.
        const std::vector<CoupledSolution<S>> coupled = solve_coupled_together(problems, fixed, c_.quad, c_.coupling);
        std::vector<PathReading<S>> out;
        for (std::size_t k = 0; k < points.size(); ++k) {
            if (!coupled[k].gmres.converged) {
                out.push_back(whole_point(points[k], scenes[k], fixed));
                continue;
            }
            out.push_back(
                {sensor_readings(c_.baselines->sensors, scenes[k], coupled[k].solution, c_.quad), PathCode::exact});
        }
        return out;
    }

    // On a compressed body each GMRES step is a blocked product with the whole
    // operator (gigabytes), parallel inside; batches side by side would each
    // read it on one thread.
    bool parallel_inside() const override {
        for (const auto& water : c_.baselines->waters)
            if (water.fixed->compressed()) return true;
        return false;
    }

private:
    // A point solved as its whole scene. On a compressed body the full path's
    // dense LU would need the square of the body's unknowns (80 GB at 100,000):
    // the whole scene is compressed instead, the object then inside both the
    // operator and its preconditioner.
    PathReading<S> whole_point(const PlacedPoint<S>& point, const Scene<S>& scene, const FixedPart<S>& fixed) const {
        const SolverOptions* body = fixed.compressed_options();
        if (!body) return full_->solve({point}).front();
        SolverOptions options = *body;
        options.choice = SystemSolver::compressed;
        const FixedPart<S> whole(scene, c_.quad, options);
        return {sensor_readings(c_.baselines->sensors, scene, whole.solution(), c_.quad), PathCode::full};
    }

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
