#include "cases/layout/layout_localization.hpp"

#include "cases/design/localization_bound.hpp"
#include "solver/target_derivatives.hpp"

#include <cmath>

namespace murk {

static_assert(static_cast<int>(LocalizationStatus::singular) == static_cast<int>(BoundStatus::singular));

void localize_targets(SizeQuantities& s, const LeadFields<double>& lead, const Eigen::Matrix3Xd& points,
                      const Eigen::Matrix3d& polarization, std::optional<double> unknown_size,
                      double channel_noise, double accuracy_m) {
    const Eigen::Index n = points.cols();
    s.bound_status.assign(static_cast<std::size_t>(n), static_cast<std::uint8_t>(LocalizationStatus::not_computed));
    s.position_sd = Eigen::Matrix3Xd::Constant(3, n, NAN);
    s.semi_axes = Eigen::Matrix3Xd::Constant(3, n, NAN);
    s.axes = Eigen::MatrixXd::Constant(9, n, NAN);
    s.within_accuracy.assign(static_cast<std::size_t>(n), 0);
    if (unknown_size) s.size_sd.assign(static_cast<std::size_t>(n), NAN);

    // Only where the target fits: elsewhere the point may lie inside the hull.
    std::vector<Eigen::Index> free;
    for (Eigen::Index j = 0; j < n; ++j)
        if (!s.blocked[static_cast<std::size_t>(j)]) free.push_back(j);
    if (free.empty()) return;
    Eigen::Matrix3Xd at(3, static_cast<Eigen::Index>(free.size()));
    for (std::size_t k = 0; k < free.size(); ++k) at.col(static_cast<Eigen::Index>(k)) = points.col(free[k]);
    std::vector<Eigen::Matrix3d> derivatives;  // of M with respect to the extra parameters
    if (unknown_size) derivatives.push_back(polarization_size_derivative(polarization, *unknown_size));
    const TargetResponse<double> response = target_response(lead, at, polarization, derivatives);

    std::vector<Eigen::Index> trusted;  // columns of `at`
    for (Eigen::Index k = 0; k < at.cols(); ++k)
        if (response.clearance[k] >= kMinBoundClearance) trusted.push_back(k);
    if (trusted.empty()) return;
    const std::size_t parameters = response.gradient.size();  // x, y, z, then the size when unknown
    std::vector<Eigen::MatrixXd> gradient(parameters, Eigen::MatrixXd(response.change.rows(), trusted.size()));
    for (std::size_t p = 0; p < parameters; ++p)
        for (std::size_t k = 0; k < trusted.size(); ++k)
            gradient[p].col(static_cast<Eigen::Index>(k)) = response.gradient[p].col(trusted[k]);
    const Eigen::VectorXd noise = Eigen::VectorXd::Constant(response.change.rows(), channel_noise);
    BoundOptions options;
    options.position_parameters = 3;
    const BoundMap map = localization_bound_map(gradient, noise, accuracy_m, 1.0, options);  // area: by the caller
    for (std::size_t k = 0; k < trusted.size(); ++k) {
        const Eigen::Index j = free[static_cast<std::size_t>(trusted[k])];
        const Eigen::Index c = static_cast<Eigen::Index>(k);
        const std::size_t jj = static_cast<std::size_t>(j);
        s.bound_status[jj] = static_cast<std::uint8_t>(map.status[k]);
        s.position_sd.col(j) = map.standard_deviation.col(c).head<3>();
        s.semi_axes.col(j) = map.semi_axes.col(c);
        s.axes.col(j) = map.axes.col(c);  // column-major 3 x 3: semi-axis k's direction in rows 3k .. 3k+2
        s.within_accuracy[jj] = map.within_accuracy[k];
        if (unknown_size) s.size_sd[jj] = map.standard_deviation(3, c);
    }
}

}  // namespace murk
