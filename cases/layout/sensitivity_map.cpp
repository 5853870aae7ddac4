#include "cases/layout/sensitivity_map.hpp"

#include "geometry/internal_check.hpp"

#include <cmath>

namespace murk {

SensitivityMap::SensitivityMap(const FixedPart<double>& fixed, const Eigen::MatrixXd& readout)
    : rows_(fixed.water_row_points()), images_(fixed.scene().images) {
    MURK_CHECK(readout.cols() == fixed.size(), "a readout row acts on the fixed part's unknowns");
    const Eigen::MatrixXd lt = fixed.solve_transposed(readout.transpose());  // A^-T R^T: unknowns x readings
    leads_.resize(readout.rows(), static_cast<Eigen::Index>(fixed.water_rows().size()));
    for (std::size_t i = 0; i < fixed.water_rows().size(); ++i)
        leads_.col(static_cast<Eigen::Index>(i)) = lt.row(fixed.water_rows()[i]).transpose();
}

namespace {

// Points per block: the block's dipole potentials (rows x 3 * block doubles) stay in
// the cache while one matrix product turns them into readings.
constexpr Eigen::Index kBlock = 64;

// Potential at the rows of unit dipoles along x, y, z at each point of the block:
// column 3 j + k. With images of the water's bounds, each image dipole: at T^-1 c, moment w L^T e_k.
void unit_dipole_potentials(const Eigen::Matrix3Xd& rows, const Eigen::Matrix3Xd& points, Eigen::Index first,
                            Eigen::Index count, const ImageSeries<double>& images, Eigen::MatrixXd& phi) {
    constexpr double k4pi = 1.0 / (4.0 * M_PI);
    phi.resize(rows.cols(), 3 * count);
    for (Eigen::Index j = 0; j < count; ++j) {
        const Eigen::Vector3d c = points.col(first + j);
        for (Eigen::Index i = 0; i < rows.cols(); ++i) {
            const double dx = rows(0, i) - c.x(), dy = rows(1, i) - c.y(), dz = rows(2, i) - c.z();
            const double r2 = dx * dx + dy * dy + dz * dz;
            const double w = k4pi / (r2 * std::sqrt(r2));
            phi(i, 3 * j) = dx * w;
            phi(i, 3 * j + 1) = dy * w;
            phi(i, 3 * j + 2) = dz * w;
        }
        for (const FieldImage<double>& t : images.terms) {
            const Eigen::Vector3d image = t.source_of(c);
            // The potential of the image of e_k is w g . (L^T e_k) = w (L g)_k.
            for (Eigen::Index i = 0; i < rows.cols(); ++i) {
                const Eigen::Vector3d r = rows.col(i) - image;
                const double r2 = r.squaredNorm();
                const Eigen::Vector3d g = t.linear * (r * (t.weight * k4pi / (r2 * std::sqrt(r2))));
                for (int k = 0; k < 3; ++k) phi(i, 3 * j + k) += g(k);
            }
        }
    }
}

}  // namespace

Eigen::MatrixXd SensitivityMap::at(const Eigen::Matrix3Xd& points) const {
    const Eigen::Index n = points.cols();
    Eigen::MatrixXd out(leads_.rows(), 3 * n);
    const Eigen::Index blocks = (n + kBlock - 1) / kBlock;
#pragma omp parallel
    {
        Eigen::MatrixXd phi;
#pragma omp for schedule(dynamic, 4)
        for (Eigen::Index b = 0; b < blocks; ++b) {
            const Eigen::Index first = b * kBlock, count = std::min(kBlock, n - first);
            unit_dipole_potentials(rows_, points, first, count, images_, phi);
            out.middleCols(3 * first, 3 * count).noalias() = leads_ * phi;
        }
    }
    return out;
}

}  // namespace murk
