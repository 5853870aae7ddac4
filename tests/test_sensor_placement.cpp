// Sensor placement (cases/design/sensor_placement.hpp) on synthetic responses:
// point sensors with a dipole-like sensitivity A n.(g - s)/|g - s|^3 to a target
// at g (the shape of a reading's lead field far from a small electrode; invented
// numbers, a demo case). Greedy + exchange design after Fedorov 1972 ("Theory of
// Optimal Experiments") and Krause, Singh & Guestrin 2008 (JMLR 9:235), cited
// from memory; the detection model is Kay 1998 (Vol. II, sections 4.3-4.4), as
// in cases/detection/detectability.hpp.
#include "cases/design/sensor_placement.hpp"
#include "cases/detection/detectability.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include <Eigen/LU>  // determinant

#include <algorithm>
#include <cmath>
#include <random>
#include <string>

using namespace murk;

namespace {

struct Sensor {
    Eigen::Vector3d position, normal;
};

// One reading per sensor; gradient with respect to the target position.
CandidateReadings synthetic(const std::vector<Sensor>& sensors, const Eigen::Matrix3Xd& targets, double noise) {
    const Eigen::Index n = Eigen::Index(sensors.size()), m = targets.cols();
    CandidateReadings r;
    r.change.resize(n, m);
    r.gradient.assign(3, Eigen::MatrixXd(n, m));
    r.noise_rms = Eigen::VectorXd::Constant(n, noise);
    for (Eigen::Index c = 0; c < n; ++c) {
        r.candidate.push_back(int(c));
        const Sensor& s = sensors[std::size_t(c)];
        for (Eigen::Index i = 0; i < m; ++i) {
            const Eigen::Vector3d d = targets.col(i) - s.position;
            const double len = d.norm(), len3 = len * len * len, nr = s.normal.dot(d);
            r.change(c, i) = 1e-9 * nr / len3;
            const Eigen::Vector3d g = 1e-9 * (s.normal / len3 - 3.0 * nr * d / (len3 * len * len));
            for (int j = 0; j < 3; ++j) r.gradient[std::size_t(j)](c, i) = g(j);
        }
    }
    return r;
}

// Targets on both sides of the plane y = 0 (mirror images of each other).
Eigen::Matrix3Xd symmetric_targets() {
    std::vector<Eigen::Vector3d> pts;
    for (double x = -0.15; x <= 0.1501; x += 0.02)
        for (double y = 0.05; y <= 0.1301; y += 0.02)
            for (double z : {-0.02, 0.0, 0.02}) {
                pts.emplace_back(x, y, z);
                pts.emplace_back(x, -y, z);
            }
    Eigen::Matrix3Xd t(3, Eigen::Index(pts.size()));
    for (std::size_t i = 0; i < pts.size(); ++i) t.col(Eigen::Index(i)) = pts[i];
    return t;
}

// Candidates 2i and 2i+1 are mirror images across y = 0; the last lies on the plane.
std::vector<Sensor> symmetric_sensors() {
    std::vector<Sensor> s;
    for (double x : {-0.09, -0.04, 0.02, 0.07}) {  // uneven in x: no second symmetry
        s.push_back({Eigen::Vector3d(x, 0.03, 0), Eigen::Vector3d::UnitY()});
        s.push_back({Eigen::Vector3d(x, -0.03, 0), -Eigen::Vector3d::UnitY()});
    }
    s.push_back({Eigen::Vector3d(0.0, 0.0, 0.03), Eigen::Vector3d::UnitZ()});
    return s;
}

int mirror(int c) { return c == 8 ? 8 : (c ^ 1); }

std::vector<int> mirrored(const std::vector<int>& set) {
    std::vector<int> m;
    for (int c : set) m.push_back(mirror(c));
    std::sort(m.begin(), m.end());
    return m;
}

// Every subset of k out of n, by the test's own enumeration.
std::vector<std::vector<int>> all_subsets(int n, int k) {
    std::vector<std::vector<int>> out;
    std::vector<int> mask(std::size_t(n), 0);
    std::fill(mask.end() - k, mask.end(), 1);
    do {
        std::vector<int> s;
        for (int i = 0; i < n; ++i)
            if (mask[std::size_t(i)]) s.push_back(i);
        out.push_back(s);
    } while (std::next_permutation(mask.begin(), mask.end()));
    return out;
}

// A noise rms at which the strongest single candidate reaches the required d' at
// half of the points (the median over points of the largest |dV| / d'), so that
// detection is partial and the detectable volume discriminates between layouts.
double half_coverage_noise(const CandidateReadings& r, double snr) {
    std::vector<double> strongest;
    for (Eigen::Index i = 0; i < r.change.cols(); ++i) strongest.push_back(r.change.col(i).cwiseAbs().maxCoeff());
    std::nth_element(strongest.begin(), strongest.begin() + long(strongest.size() / 2), strongest.end());
    return strongest[strongest.size() / 2] / snr;
}

CandidateReadings with_noise(CandidateReadings r, double noise) {
    r.noise_rms.setConstant(noise);
    return r;
}

std::string listed(const std::vector<int>& set) {
    std::string s;
    for (int c : set) s += (s.empty() ? "" : ",") + std::to_string(c);
    return s;
}

bool close(double a, double b) { return std::abs(a - b) <= 1e-12 * std::max(std::abs(a), std::abs(b)); }

PlacementOptions detection_options(int budget) {
    PlacementOptions o;
    o.criterion = PlacementCriterion::detectable_volume;
    o.budget = budget;
    o.required_snr = required_snr(1e-3, 0.5);
    o.cell_volume_m3 = 0.02 * 0.02 * 0.02;
    return o;
}

PlacementOptions d_optimal_options(int budget) {
    PlacementOptions o;
    o.criterion = PlacementCriterion::mean_log_det;
    o.budget = budget;
    return o;
}

}  // namespace

TEST_CASE("sensor placement: the detectable volume counts the cells the detection model of cases/detection passes") {
    const PlacementOptions o = detection_options(3);
    const CandidateReadings unit = synthetic(symmetric_sensors(), symmetric_targets(), 1.0);
    const double sigma = half_coverage_noise(unit, o.required_snr);
    const CandidateReadings r = with_noise(unit, sigma);
    const std::vector<int> set = {0, 3, 8};
    NoiseModel noise;
    noise.kind = NoiseKind::voltage_amplifier;
    noise.voltage_noise_density_V_per_rtHz = sigma;
    noise.noise_bandwidth_Hz = 1.0;  // rms = e_n sqrt(B) = sigma
    std::size_t detected = 0;
    for (Eigen::Index i = 0; i < r.change.cols(); ++i) {
        const std::vector<double> amplitude = {r.change(0, i), r.change(3, i), r.change(8, i)};
        if (detection_probability(detectability_index(noise, amplitude), 1e-3) >= 0.5) ++detected;
    }
    MESSAGE(detected << " of " << r.change.cols() << " cells detectable with candidates 0, 3, 8");
    CHECK(detected > 0);
    CHECK(detected < std::size_t(r.change.cols()));
    CHECK(placement_criterion(r, set, o) == doctest::Approx(double(detected) * o.cell_volume_m3).epsilon(1e-14));
}

TEST_CASE("sensor placement: on a mirror-symmetric case the chosen layout respects the symmetry") {
    // Candidates and targets are symmetric about y = 0, so every criterion takes the
    // same value on a set S and on its mirror image pi(S). What "respects the
    // symmetry" means precisely, and what is checked:
    //  (1) the chosen set and its mirror image have the same criterion;
    //  (2) the optimal sets (exhaustive search) are closed under the mirror: they
    //      come in mirror pairs, or a set is its own mirror image. An optimum need
    //      not be symmetric: here the D-optimal ones come in pairs such as {4,8}
    //      and {5,8}; which of a tied pair the placement returns follows the
    //      lowest-index rule;
    //  (3) a unique optimum is its own mirror image, and when the placement
    //      reaches it (checked where it does), its output is symmetric.
    // Greedy + exchange is not guaranteed to reach the optimum; here it misses it
    // once (detectable volume, budget 4: moving a mirror pair needs two swaps at
    // once), and the message says so. Reaching the optimum is tested on 8 choose 3.
    const CandidateReadings unit = synthetic(symmetric_sensors(), symmetric_targets(), 1.0);
    const CandidateReadings r = with_noise(unit, 3 * half_coverage_noise(unit, detection_options(1).required_snr));
    int unique = 0;  // cases with one optimal set: clause (2) is exercised
    for (int budget : {2, 3, 4}) {
        for (const PlacementOptions& o : {detection_options(budget), d_optimal_options(budget)}) {
            CAPTURE(budget);
            CAPTURE(int(o.criterion));
            const PlacementResult p = place_sensors(r, o);
            const double value = placement_criterion(r, p.chosen, o);
            CHECK(close(value, placement_criterion(r, mirrored(p.chosen), o)));
            double best = -INFINITY;
            std::vector<std::vector<int>> optima;
            for (const std::vector<int>& s : all_subsets(9, budget)) {
                const double v = placement_criterion(r, s, o);
                if (optima.empty() || (v > best && !close(v, best))) best = v, optima.clear();
                if (close(v, best)) optima.push_back(s);
            }
            MESSAGE("budget " << budget << ": chosen " << listed(p.chosen) << ", criterion " << value << ", "
                              << optima.size() << " optimal set(s)");
            const bool optimal = close(value, best);
            MESSAGE("  placement " << std::string(optimal ? "reaches" : "misses") << " the optimum " << best << " ("
                                   << listed(optima.front()) << ")");
            CHECK(value <= best * (1 + 1e-12 * (best > 0 ? 1 : -1)));
            if (optima.size() == 1) {
                ++unique;
                CHECK(optima.front() == mirrored(optima.front()));
                if (optimal) CHECK(p.chosen == mirrored(p.chosen));
            }
            for (const std::vector<int>& s : optima)
                CHECK(std::find(optima.begin(), optima.end(), mirrored(s)) != optima.end());
        }
    }
    CHECK(unique > 0);
}

TEST_CASE("sensor placement: the greedy criterion never decreases as a sensor is added") {
    std::mt19937_64 random(7);
    std::uniform_real_distribution<double> u(-1.0, 1.0);
    const Eigen::Matrix3Xd targets = symmetric_targets();
    for (int instance = 0; instance < 4; ++instance) {
        std::vector<Sensor> sensors;
        for (int c = 0; c < 12; ++c) {
            const Eigen::Vector3d pos(0.1 * u(random), 0.03 * u(random), 0.03 * u(random));
            const Eigen::Vector3d n = Eigen::Vector3d(u(random), u(random), u(random)).normalized();
            sensors.push_back({pos, n});
        }
        const CandidateReadings unit = synthetic(sensors, targets, 1.0);
        const CandidateReadings r = with_noise(unit, half_coverage_noise(unit, detection_options(1).required_snr));
        for (const PlacementOptions& o : {detection_options(6), d_optimal_options(6)}) {
            CAPTURE(instance);
            CAPTURE(int(o.criterion));
            const PlacementResult p = place_sensors(r, o);
            REQUIRE(p.greedy.size() == 6);
            for (std::size_t k = 0; k < p.greedy.size(); ++k) {
                CHECK(p.greedy[k].chosen.size() == k + 1);
                CHECK(close(p.greedy[k].criterion, placement_criterion(r, p.greedy[k].chosen, o)));
                if (k > 0) CHECK(p.greedy[k].criterion >= p.greedy[k - 1].criterion);
            }
            double previous = p.greedy.back().criterion;
            for (const PlacementStep& e : p.exchanges) {
                CHECK(e.criterion >= previous * (1 - 1e-12));
                previous = e.criterion;
            }
            CHECK(p.criterion >= p.greedy.back().criterion);
        }
    }
}

TEST_CASE("sensor placement: greedy + exchange finds the exhaustive optimum on 8 choose 3") {
    // Eight candidates around a small body (a ring of radius 3 cm, normals tilted),
    // targets on a grid around it. best_placement_exhaustive is checked first
    // against the test's own enumeration.
    std::vector<Sensor> sensors;
    for (int k = 0; k < 8; ++k) {
        const double a = 2 * M_PI * k / 8 + 0.3 * std::sin(1.7 * k);
        const Eigen::Vector3d pos(0.04 * std::cos(3.0 * k), 0.03 * std::cos(a), 0.03 * std::sin(a));
        const Eigen::Vector3d n = Eigen::Vector3d(0.4 * std::sin(k), std::cos(a), std::sin(a)).normalized();
        sensors.push_back({pos, n});
    }
    const CandidateReadings unit = synthetic(sensors, symmetric_targets(), 1.0);
    const CandidateReadings r = with_noise(unit, half_coverage_noise(unit, detection_options(1).required_snr));
    for (const PlacementOptions& o : {detection_options(3), d_optimal_options(3)}) {
        CAPTURE(int(o.criterion));
        double best = -INFINITY;
        for (const std::vector<int>& s : all_subsets(8, 3)) best = std::max(best, placement_criterion(r, s, o));
        const PlacementResult exhaustive = best_placement_exhaustive(r, o);
        CHECK(close(exhaustive.criterion, best));
        const PlacementResult p = place_sensors(r, o);
        PlacementOptions single = o;
        single.every_start = false;
        const PlacementResult plain = place_sensors(r, single);
        MESSAGE("criterion " << int(o.criterion) << ": one run: greedy " << plain.greedy.back().criterion << ", after "
                             << plain.exchanges.size() << " exchange(s) " << plain.criterion << "; every start: "
                             << p.criterion << " (" << listed(p.chosen) << ", start " << p.start
                             << "); exhaustive " << best << " (" << listed(exhaustive.chosen) << ")");
        CHECK(close(p.criterion, best));
    }
    SUBCASE("bad input") {
        PlacementOptions o = detection_options(9);
        CHECK_THROWS_AS(place_sensors(r, o), InputError);
        o.budget = 2;
        CHECK_THROWS_AS(placement_criterion(r, {1, 1}, o), InputError);
        CandidateReadings bad = r;
        bad.noise_rms(2) = 0;
        CHECK_THROWS_AS(place_sensors(bad, o), InputError);
    }
}

TEST_CASE("sensor placement: the mean log-determinant is the documented formula, for 2 and 3 parameters") {
    // Computed here directly: mean over points of log det(D^-1/2 J_S D^-1/2 + prior_weight I),
    // J_S = sum over the chosen readings of g g^T / sigma^2, D = diag of all candidates' J.
    // (Three parameters take an explicit factorization in the code, other counts Eigen's LLT.)
    const CandidateReadings full = synthetic(symmetric_sensors(), symmetric_targets(), 1e-8);
    for (int parameters : {2, 3}) {
        CAPTURE(parameters);
        CandidateReadings r = full;
        r.gradient.resize(std::size_t(parameters));
        PlacementOptions o = d_optimal_options(2);
        o.prior_weight = 1e-4;
        const std::vector<int> set = {1, 6};
        double sum = 0;
        for (Eigen::Index i = 0; i < r.change.cols(); ++i) {
            Eigen::MatrixXd all = Eigen::MatrixXd::Zero(parameters, parameters), chosen = all;
            for (Eigen::Index c = 0; c < r.change.rows(); ++c) {
                Eigen::VectorXd g(parameters);
                for (int p = 0; p < parameters; ++p) g(p) = r.gradient[std::size_t(p)](c, i) / r.noise_rms(c);
                all += g * g.transpose();
                if (c == 1 || c == 6) chosen += g * g.transpose();
            }
            const Eigen::VectorXd s = all.diagonal().cwiseSqrt().cwiseInverse();
            const Eigen::MatrixXd scaled = s.asDiagonal() * chosen * s.asDiagonal() +
                                           o.prior_weight * Eigen::MatrixXd::Identity(parameters, parameters);
            sum += std::log(scaled.determinant());
        }
        const double expected = sum / double(r.change.cols());
        CHECK(placement_criterion(r, set, o) == doctest::Approx(expected).epsilon(1e-10));
    }
}

TEST_CASE("sensor placement: cells of their own size, and a given information scale") {
    // Per-point cells: the criterion is the sum of the detected points' own cells, counted
    // here with the detection model of cases/detection as above.
    PlacementOptions o = detection_options(3);
    const CandidateReadings unit = synthetic(symmetric_sensors(), symmetric_targets(), 1.0);
    const CandidateReadings r = with_noise(unit, half_coverage_noise(unit, o.required_snr));
    const std::vector<int> set = {0, 3, 8};
    const double uniform = placement_criterion(r, set, o);
    double weighted = 0;
    for (Eigen::Index i = 0; i < r.change.cols(); ++i) {
        o.cell_volumes_m3.push_back(1e-6 * double(1 + i % 7));  // uneven cells (invented)
        const std::vector<double> amplitude = {r.change(0, i), r.change(3, i), r.change(8, i)};
        NoiseModel noise;
        noise.kind = NoiseKind::voltage_amplifier;
        noise.voltage_noise_density_V_per_rtHz = r.noise_rms(0);
        noise.noise_bandwidth_Hz = 1.0;
        if (detection_probability(detectability_index(noise, amplitude), 1e-3) >= 0.5)
            weighted += o.cell_volumes_m3.back();
    }
    CHECK(weighted > 0);
    CHECK(placement_criterion(r, set, o) == doctest::Approx(weighted).epsilon(1e-12));
    CHECK(placement_criterion(r, set, o) != doctest::Approx(uniform));
    o.cell_volumes_m3.pop_back();
    CHECK_THROWS_AS(placement_criterion(r, set, o), InputError);

    // The scale D given explicitly: the same D gives the same value; 4 D for every parameter
    // scales the information by 1/4, so with a negligible prior the log-determinant of 3
    // parameters falls by 3 log 4 (det(cA) = c^n det A, common practice) at every point.
    CandidateReadings s = synthetic(symmetric_sensors(), symmetric_targets(), 1e-8);
    PlacementOptions d = d_optimal_options(4);
    d.prior_weight = 1e-12;
    const std::vector<int> four = {0, 2, 5, 8};
    const double own = placement_criterion(s, four, d);
    s.information_scale = information_diagonal(s);
    CHECK(placement_criterion(s, four, d) == own);
    s.information_scale *= 4.0;
    CHECK(placement_criterion(s, four, d) == doctest::Approx(own - 3.0 * std::log(4.0)).epsilon(1e-6));
    s.information_scale(0, 0) = 0.0;
    CHECK_THROWS_AS(placement_criterion(s, four, d), InputError);
}
