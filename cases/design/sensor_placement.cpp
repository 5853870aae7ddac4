// Greedy and exchange selection of sensor readings; contracts and sources in
// sensor_placement.hpp.
#include "cases/design/sensor_placement.hpp"

#include "cases/detection/detectability.hpp"
#include "geometry/input_error.hpp"

#include <Eigen/Cholesky>
#include <algorithm>
#include <cmath>
#include <string>

namespace murk {

namespace {

constexpr int kMaxParameters = 8;
using SmallMatrix = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, 0, kMaxParameters, kMaxParameters>;

// A set's value: compared by `primary`, then by `secondary` (detectable_volume's
// saturated coverage; zero for mean_log_det).
struct Score {
    double primary = 0, secondary = 0;
};

bool same(double a, double b) { return std::abs(a - b) <= 1e-12 * std::max(std::abs(a), std::abs(b)); }

bool better(const Score& a, const Score& b) {
    if (!same(a.primary, b.primary)) return a.primary > b.primary;
    if (!same(a.secondary, b.secondary)) return a.secondary > b.secondary;
    return false;
}

// Each candidate's additive contribution at every point: for detectable_volume
// its d'^2 (1 x points), for mean_log_det its scaled information, packed as the
// lower triangle of a P x P matrix column by column (packed x points).
class Evaluator {
public:
    Evaluator(const CandidateReadings& r, const PlacementOptions& o) : options_(o) {
        const Eigen::Index readings = r.change.rows(), points = r.change.cols();
        if (readings == 0 || points == 0) throw InputError("placement needs at least one reading and one point");
        if (r.noise_rms.size() != readings || Eigen::Index(r.candidate.size()) != readings)
            throw InputError("placement: noise and candidate index must be given for each of the " +
                             std::to_string(readings) + " readings");
        if (!r.change.allFinite()) throw InputError("placement: a reading change is not finite");
        for (Eigen::Index k = 0; k < readings; ++k)
            if (!(r.noise_rms(k) > 0) || !std::isfinite(r.noise_rms(k)))
                throw InputError("placement: the noise rms of reading " + std::to_string(k) +
                                 " must be positive and finite");
        const int candidates = *std::max_element(r.candidate.begin(), r.candidate.end()) + 1;
        std::vector<int> count(std::size_t(std::max(candidates, 0)), 0);
        for (int c : r.candidate) {
            if (c < 0) throw InputError("placement: a candidate index is negative");
            ++count[std::size_t(c)];
        }
        for (int c = 0; c < candidates; ++c)
            if (count[std::size_t(c)] == 0)
                throw InputError("placement: candidate " + std::to_string(c) + " has no reading");
        if (o.budget < 1 || o.budget > candidates)
            throw InputError("placement: the budget must lie between 1 and the " + std::to_string(candidates) +
                             " candidates (got " + std::to_string(o.budget) + ")");
        if (o.max_exchange_passes < 0) throw InputError("placement: exchange passes must not be negative");
        candidates_ = candidates;
        points_ = points;
        if (o.criterion == PlacementCriterion::detectable_volume) {
            if (!(o.required_snr > 0) || !std::isfinite(o.required_snr))
                throw InputError("placement: the required d' must be positive and finite");
            if (!(o.cell_volume_m3 > 0) || !std::isfinite(o.cell_volume_m3))
                throw InputError("placement: the cell volume must be positive and finite");
            if (!o.cell_volumes_m3.empty() && Eigen::Index(o.cell_volumes_m3.size()) != points)
                throw InputError("placement: give one cell volume per point (" + std::to_string(points) + ")");
            for (double v : o.cell_volumes_m3)
                if (!(v >= 0) || !std::isfinite(v))
                    throw InputError("placement: a cell volume must be finite and not negative");
            packed_ = 1;
            contribution_.assign(std::size_t(candidates), Eigen::MatrixXd::Zero(1, points));
            for (Eigen::Index k = 0; k < readings; ++k)
                contribution_[std::size_t(r.candidate[std::size_t(k)])].row(0) +=
                    (r.change.row(k) / r.noise_rms(k)).array().square().matrix();
            return;
        }
        const int p = int(r.gradient.size());
        if (p < 1 || p > kMaxParameters)
            throw InputError("placement: mean_log_det needs between 1 and " + std::to_string(kMaxParameters) +
                             " parameters' gradients (got " + std::to_string(p) + ")");
        for (const Eigen::MatrixXd& g : r.gradient) {
            if (g.rows() != readings || g.cols() != points)
                throw InputError("placement: every gradient must be readings x points like the changes");
            if (!g.allFinite()) throw InputError("placement: a gradient is not finite");
        }
        if (!(o.prior_weight > 0) || !std::isfinite(o.prior_weight))
            throw InputError("placement: the prior weight must be positive and finite");
        parameters_ = p;
        packed_ = p * (p + 1) / 2;
        // Scale of each parameter at each point: the diagonal of all candidates' information,
        // or the one given (positive where given: checked here).
        if (r.information_scale.size() > 0 &&
            (r.information_scale.rows() != p || r.information_scale.cols() != points ||
             !(r.information_scale.array() > 0).all() || !r.information_scale.allFinite()))
            throw InputError("placement: a given information scale must be positive and finite, parameters x points");
        const Eigen::MatrixXd diag = r.information_scale.size() > 0 ? r.information_scale : information_diagonal(r);
        const Eigen::MatrixXd scale = diag.array().sqrt().inverse().matrix();
        contribution_.assign(std::size_t(candidates), Eigen::MatrixXd::Zero(packed_, points));
        for (Eigen::Index k = 0; k < readings; ++k) {
            Eigen::MatrixXd& c = contribution_[std::size_t(r.candidate[std::size_t(k)])];
            int row = 0;
            for (int b = 0; b < p; ++b)
                for (int a = b; a < p; ++a, ++row)
                    c.row(row) += (r.gradient[std::size_t(a)].row(k).array() * scale.row(a).array() *
                                   r.gradient[std::size_t(b)].row(k).array() * scale.row(b).array())
                                      .matrix() /
                                  (r.noise_rms(k) * r.noise_rms(k));
        }
    }

    int candidates() const { return candidates_; }

    Eigen::MatrixXd total(const std::vector<int>& set, int skip = -1) const {
        Eigen::MatrixXd t = Eigen::MatrixXd::Zero(packed_, points_);
        for (int c : set)
            if (c != skip) t += contribution_[std::size_t(c)];
        return t;
    }

    // The score of `base` plus candidate `add` (none when add < 0).
    Score score(const Eigen::MatrixXd& base, int add) const {
        Score s;
        if (options_.criterion == PlacementCriterion::detectable_volume) {
            const double need = options_.required_snr * options_.required_snr;
            std::size_t count = 0;
            for (Eigen::Index i = 0; i < points_; ++i) {
                const double d2 = base(0, i) + (add >= 0 ? contribution_[std::size_t(add)](0, i) : 0.0);
                if (d2 >= need) ++count;
                s.secondary += std::min(d2, need);
            }
            s.primary = double(count) * options_.cell_volume_m3;
            if (!options_.cell_volumes_m3.empty()) {
                s.primary = 0;
                for (Eigen::Index i = 0; i < points_; ++i) {
                    const double d2 = base(0, i) + (add >= 0 ? contribution_[std::size_t(add)](0, i) : 0.0);
                    if (d2 >= need) s.primary += options_.cell_volumes_m3[std::size_t(i)];
                }
            }
            return s;
        }
        if (parameters_ == 3) return log_det_3(base, add);
        SmallMatrix j(parameters_, parameters_);
        double sum = 0;
        for (Eigen::Index i = 0; i < points_; ++i) {
            int row = 0;
            for (int b = 0; b < parameters_; ++b)
                for (int a = b; a < parameters_; ++a, ++row) {
                    const double v = base(row, i) + (add >= 0 ? contribution_[std::size_t(add)](row, i) : 0.0);
                    j(a, b) = v;
                    j(b, a) = v;
                }
            j.diagonal().array() += options_.prior_weight;
            const Eigen::LLT<SmallMatrix> llt(j);  // positive definite: a PSD sum plus prior_weight I
            sum += 2.0 * llt.matrixLLT().diagonal().array().log().sum();
        }
        s.primary = sum / double(points_);
        return s;
    }

    Score score_of(const std::vector<int>& set) const { return score(total(set), -1); }

private:
    // The common case (position only) by an explicit 3 x 3 factorization, several
    // times faster than the general one; the matrix is positive definite (a sum of
    // semidefinite terms plus prior_weight I).
    Score log_det_3(const Eigen::MatrixXd& base, int add) const {
        const double eps = options_.prior_weight;
        const double* b = base.data();
        const double* c = add >= 0 ? contribution_[std::size_t(add)].data() : nullptr;
        double sum = 0;
        for (Eigen::Index i = 0; i < points_; ++i) {
            double v[6];  // packed lower triangle, column by column: 00 10 20 11 21 22
            for (int k = 0; k < 6; ++k) v[k] = b[6 * i + k] + (c ? c[6 * i + k] : 0.0);
            const double a00 = v[0] + eps, a10 = v[1], a20 = v[2], a11 = v[3] + eps, a21 = v[4], a22 = v[5] + eps;
            // LDL^T by hand (backward stable, unlike the cofactor expansion when J is
            // nearly singular); the pivots are >= about prior_weight, the floor only
            // guards against rounding.
            const double d0 = a00, l10 = a10 / d0, l20 = a20 / d0;
            const double d1 = a11 - l10 * a10, m21 = a21 - l20 * a10;
            const double d2 = a22 - l20 * a20 - m21 * m21 / d1;
            const double floor = 1e-3 * eps;
            sum += std::log(std::max(d0, floor)) + std::log(std::max(d1, floor)) + std::log(std::max(d2, floor));
        }
        Score s;
        s.primary = sum / double(points_);
        return s;
    }

public:

private:
    PlacementOptions options_;
    int candidates_ = 0, parameters_ = 0, packed_ = 1;
    Eigen::Index points_ = 0;
    std::vector<Eigen::MatrixXd> contribution_;
};

std::vector<int> sorted(std::vector<int> v) {
    std::sort(v.begin(), v.end());
    return v;
}

}  // namespace

double required_snr(double false_alarm_probability, double detection_level) {
    return inverse_gaussian_tail(false_alarm_probability) - inverse_gaussian_tail(detection_level);
}

Eigen::MatrixXd information_diagonal(const CandidateReadings& r) {
    const int p = int(r.gradient.size());
    const Eigen::Index points = r.change.cols();
    Eigen::MatrixXd diag = Eigen::MatrixXd::Zero(p, points);
    for (Eigen::Index k = 0; k < r.change.rows(); ++k)
        for (int a = 0; a < p; ++a)
            diag.row(a) += (r.gradient[std::size_t(a)].row(k) / r.noise_rms(k)).array().square().matrix();
    return (diag.array() > 0).select(diag.array(), Eigen::ArrayXXd::Ones(p, points)).matrix();
}

double placement_criterion(const CandidateReadings& readings, const std::vector<int>& chosen,
                           const PlacementOptions& options) {
    PlacementOptions o = options;
    o.budget = 1;  // any set size is allowed here
    const Evaluator eval(readings, o);
    std::vector<char> seen(std::size_t(eval.candidates()), 0);
    for (int c : chosen) {
        if (c < 0 || c >= eval.candidates())
            throw InputError("placement: candidate " + std::to_string(c) + " does not exist");
        if (seen[std::size_t(c)]++) throw InputError("placement: candidate " + std::to_string(c) + " is listed twice");
    }
    return eval.score_of(chosen).primary;
}

namespace {

// One greedy + exchange run; `first` >= 0 forces the first candidate.
PlacementResult greedy_and_exchange(const Evaluator& eval, const PlacementOptions& options, int first,
                                    Score& final_score) {
    const int n = eval.candidates();
    PlacementResult result;
    std::vector<int> chosen;
    std::vector<char> in(std::size_t(n), 0);
    std::vector<Score> scores(static_cast<std::size_t>(n));
    for (int step = 0; step < options.budget; ++step) {
        const Eigen::MatrixXd base = eval.total(chosen);
        int best = -1;
        if (step == 0 && first >= 0) {
            best = first;
        } else {
#pragma omp parallel for schedule(dynamic, 1)
            for (int c = 0; c < n; ++c)
                if (!in[std::size_t(c)]) scores[std::size_t(c)] = eval.score(base, c);
            for (int c = 0; c < n; ++c)
                if (!in[std::size_t(c)] && (best < 0 || better(scores[std::size_t(c)], scores[std::size_t(best)])))
                    best = c;
        }
        chosen.push_back(best);
        in[std::size_t(best)] = 1;
        result.greedy.push_back({sorted(chosen), eval.score_of(chosen).primary, best, -1});
    }
    Score current = eval.score_of(chosen);
    const std::size_t k = chosen.size();
    std::vector<Score> swap(k * std::size_t(n));
    for (int pass = 0; pass < options.max_exchange_passes; ++pass) {
#pragma omp parallel for schedule(dynamic, 1)
        for (std::size_t i = 0; i < k; ++i) {
            const Eigen::MatrixXd base = eval.total(chosen, chosen[i]);
            for (int c = 0; c < n; ++c)
                if (!in[std::size_t(c)]) swap[i * std::size_t(n) + std::size_t(c)] = eval.score(base, c);
        }
        int best_out = -1, best_in = -1;
        Score best_score = current;
        for (std::size_t i = 0; i < k; ++i)
            for (int c = 0; c < n; ++c)
                if (!in[std::size_t(c)] && better(swap[i * std::size_t(n) + std::size_t(c)], best_score))
                    best_out = int(i), best_in = c, best_score = swap[i * std::size_t(n) + std::size_t(c)];
        if (best_out < 0) break;
        const int removed = chosen[std::size_t(best_out)];
        in[std::size_t(removed)] = 0;
        in[std::size_t(best_in)] = 1;
        chosen[std::size_t(best_out)] = best_in;
        current = eval.score_of(chosen);
        result.exchanges.push_back({sorted(chosen), current.primary, best_in, removed});
    }
    result.chosen = sorted(chosen);
    result.criterion = current.primary;
    final_score = current;
    return result;
}

}  // namespace

PlacementResult place_sensors(const CandidateReadings& readings, const PlacementOptions& options) {
    const Evaluator eval(readings, options);
    Score best_score;
    PlacementResult best = greedy_and_exchange(eval, options, -1, best_score);
    best.start = -1;
    if (!options.every_start) return best;
    for (int first = 0; first < eval.candidates(); ++first) {
        Score s;
        PlacementResult r = greedy_and_exchange(eval, options, first, s);
        if (better(s, best_score)) best = std::move(r), best.start = first, best_score = s;
    }
    return best;
}

PlacementResult best_placement_exhaustive(const CandidateReadings& readings, const PlacementOptions& options) {
    const Evaluator eval(readings, options);
    const int n = eval.candidates(), k = options.budget;
    double subsets = 1;
    for (int i = 0; i < k; ++i) subsets = subsets * double(n - i) / double(i + 1);
    if (subsets > 1e6)
        throw InputError("placement: exhaustive search over " + std::to_string(std::llround(subsets)) +
                         " subsets refused (at most 10^6)");
    std::vector<int> set(static_cast<std::size_t>(k));
    for (int i = 0; i < k; ++i) set[std::size_t(i)] = i;
    PlacementResult result;
    Score best;
    bool first = true;
    while (true) {
        const Score s = eval.score_of(set);
        if (first || better(s, best)) best = s, result.chosen = set, first = false;
        // next combination in lexicographic order
        int i = k - 1;
        while (i >= 0 && set[std::size_t(i)] == n - k + i) --i;
        if (i < 0) break;
        ++set[std::size_t(i)];
        for (int j = i + 1; j < k; ++j) set[std::size_t(j)] = set[std::size_t(j - 1)] + 1;
    }
    result.criterion = best.primary;
    return result;
}

}  // namespace murk
