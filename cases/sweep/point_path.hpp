#pragma once
// The ways a sweep point is solved, behind one interface: each path turns placed
// points into the sensors' readings with the object there. One file each:
//   path_exact.cpp   the factored fixed part and the object coupled by GMRES
//   path_dipole.cpp  the object as the point dipole the baseline field induces
//   path_full.cpp    the whole scene assembled and factored (the reference)
// Paths only read what they share (the baselines, the moving objects), so any
// number of threads may call one path at once.
#include "cases/output/result_layout.hpp"
#include "cases/sweep/moving_object.hpp"
#include "cases/sweep/sweep_baseline.hpp"
#include "solver/coupled_solve.hpp"

#include <cmath>
#include <limits>
#include <memory>
#include <vector>

namespace murk {

// Dipole points are answered in blocks of this many right-hand sides: a fixed
// size, so that every point's arithmetic is the same for any thread count. 128
// rather than 32 saved 5 % of the dipole stage on the benchmark.
inline constexpr std::size_t kDipoleBlockSize = 128;


// A point whose object has a valid place.
template <class S>
struct PlacedPoint {
    std::size_t point = 0;  // flat index (C order over the axes)
    std::size_t water = 0;  // index into the plan's waters
    const MovingObject<S>* object = nullptr;
    Vec3 offset = Vec3::Zero();  // where the object's frame origin goes
    // Object half-extent / distance of its centre from the nearest surface that
    // stays, free source or probe point (NaN when not measured).
    double size_to_distance = std::numeric_limits<double>::quiet_NaN();

    Vec3 centre() const { return offset + object->shape->centre; }
};

template <class S>
struct PathReading {
    std::vector<S> reading;  // one per sensor
    PathCode path = PathCode::none;  // what computed it (the exact path may fall back on the full one)
};

// What every path reads.
template <class S>
struct PathContext {
    const SweepBaselines<S>* baselines = nullptr;
    const MovingObjects<S>* objects = nullptr;
    QuadratureOptions quad;
    CouplingOptions coupling;
};

template <class S>
class PointPath {
public:
    virtual ~PointPath() = default;
    // Points one call answers at most: 1, or the dipole path's fixed block.
    virtual std::size_t block_size() const { return 1; }
    // Whether one call already keeps every thread busy (its own products run in
    // parallel and read shared data once for the call): calls then run one at a
    // time instead of one per thread.
    virtual bool parallel_inside() const { return false; }
    // The readings at each point; all points of one call share a water.
    virtual std::vector<PathReading<S>> solve(const std::vector<PlacedPoint<S>>& points) const = 0;
};

template <class S>
std::unique_ptr<PointPath<S>> make_exact_path(const PathContext<S>& context);
template <class S>
std::unique_ptr<PointPath<S>> make_dipole_path(const PathContext<S>& context);
template <class S>
std::unique_ptr<PointPath<S>> make_full_path(const PathContext<S>& context);

// The scene of a placed point: the fixed part with the object added last.
template <class S>
Scene<S> point_scene(const PathContext<S>& context, const PlacedPoint<S>& p) {
    return scene_with_object(context.baselines->waters[p.water].scene(), *p.object, p.offset);
}

}  // namespace murk
