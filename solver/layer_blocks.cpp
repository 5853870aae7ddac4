#include "solver/layer_blocks.hpp"

#include "geometry/internal_check.hpp"
#include "solver/triangle_integrals.hpp"
#include "solver/triangle_rules.hpp"

#include <cmath>

namespace murk {

namespace {
constexpr double kInvFourPi = 1.0 / (4.0 * M_PI);

// Column k: every target against one source panel. The first loop applies the
// centroid rule to all targets (branch-free, so it vectorizes); the second loop
// revisits only the targets close enough to need a better rule.
void fill_column(const Eigen::Matrix3Xd& targets, const PanelSet& src, Eigen::Index k,
                 const QuadratureOptions& options, bool targets_are_centroids, Eigen::Index first_target,
                 double* single, double* dbl) {
    const Eigen::Index m = targets.cols();
    const double cx = src.centroid(0, k), cy = src.centroid(1, k), cz = src.centroid(2, k);
    const double nx = src.normal(0, k), ny = src.normal(1, k), nz = src.normal(2, k);
    const double a = src.area(k) * kInvFourPi;
    const double* t = targets.data();
    for (Eigen::Index i = 0; i < m; ++i) {
        const double dx = t[3 * i] - cx, dy = t[3 * i + 1] - cy, dz = t[3 * i + 2] - cz;
        const double inv_r = 1.0 / std::sqrt(dx * dx + dy * dy + dz * dz);
        single[i] = a * inv_r;
        dbl[i] = a * (nx * dx + ny * dy + nz * dz) * inv_r * inv_r * inv_r;
    }

    const double far2 = std::pow(options.far_ratio * src.diameter(k), 2);
    const double near2 = std::pow(options.near_ratio * src.diameter(k), 2);
    const Vec3 p0 = src.p0.col(k), p1 = src.p1.col(k), p2 = src.p2.col(k);
    const Vec3 n = src.normal.col(k);
    for (Eigen::Index i = 0; i < m; ++i) {
        const Vec3 x = targets.col(i);
        const double d2 = (x - src.centroid.col(k)).squaredNorm();
        if (d2 >= far2) continue;
        if (targets_are_centroids && i + first_target == k) {
            single[i] = single_layer_triangle(x, p0, p1, p2);
            dbl[i] = 0.0;  // principal value at a flat panel's own centroid
        } else if (d2 < near2) {
            single[i] = single_layer_triangle(x, p0, p1, p2);
            dbl[i] = double_layer_triangle(x, p0, p1, p2);
        } else {
            const LayerValues v = radon7_layers(x, p0, p1, p2, n, src.area(k));
            single[i] = v.single;
            dbl[i] = v.dbl;
        }
    }
}
}  // namespace

void assemble_layer_blocks(const Eigen::Matrix3Xd& targets, const PanelSet& sources,
                           const QuadratureOptions& options, bool targets_are_centroids,
                           Eigen::MatrixXd& single, Eigen::MatrixXd& dbl) {
    single.resize(targets.cols(), sources.size());
    dbl.resize(targets.cols(), sources.size());
    assemble_layer_blocks(targets, sources, options, targets_are_centroids, 0, Eigen::Ref<Eigen::MatrixXd>(single),
                          Eigen::Ref<Eigen::MatrixXd>(dbl));
}

void assemble_layer_blocks(const Eigen::Matrix3Xd& targets, const PanelSet& sources,
                           const QuadratureOptions& options, bool targets_are_centroids, Eigen::Index first_target,
                           Eigen::Ref<Eigen::MatrixXd> single, Eigen::Ref<Eigen::MatrixXd> dbl) {
    const Eigen::Index m = targets.cols(), n = sources.size();
    MURK_CHECK(single.rows() == m && single.cols() == n && dbl.rows() == m && dbl.cols() == n,
               "the caller's storage holds one row per target and one column per source panel");
    // Self terms and the Gauss's-law diagonal below index panel i + first_target.
    MURK_CHECK(!targets_are_centroids || (first_target >= 0 && first_target + m <= n),
               "a strip of centroid targets lies within the source panels");
#pragma omp parallel for schedule(dynamic, 16)
    for (Eigen::Index k = 0; k < n; ++k)
        fill_column(targets, sources, k, options, targets_are_centroids, first_target, single.col(k).data(),
                    dbl.col(k).data());

    // Gauss's law: seen from a point of a smooth closed surface, the surface
    // subtends 2 pi, so each row of its own double layer sums to -1/2 exactly.
    // The quadrature rules of distant panels miss this by up to ~1e-3, and that
    // error multiplies the (large) mean potential of the surface; replacing the
    // principal value 0 on the diagonal by what closes the sum makes constant
    // potentials exact again. With every pair in closed form the correction is
    // at rounding level.
    if (targets_are_centroids) {
        const Eigen::VectorXd row_sum = dbl.rowwise().sum();
        for (Eigen::Index i = 0; i < m; ++i) {
            const Eigen::Index k = i + first_target;
            dbl(i, k) = -0.5 - (row_sum(i) - dbl(i, k));
        }
    }
}

LayerValues layer_pair(const Vec3& x, const PanelSet& src, Eigen::Index k, const QuadratureOptions& options,
                       bool is_self) {
    const Vec3 c = src.centroid.col(k);
    const Vec3 p0 = src.p0.col(k), p1 = src.p1.col(k), p2 = src.p2.col(k);
    LayerValues v;
    if (is_self) {
        v.single = single_layer_triangle(x, p0, p1, p2);
        return v;
    }
    const double d2 = (x - c).squaredNorm();
    const double diameter = src.diameter(k);
    if (d2 >= std::pow(options.far_ratio * diameter, 2)) {  // the centroid rule, as fill_column writes it
        const double dx = x(0) - c(0), dy = x(1) - c(1), dz = x(2) - c(2);
        const double inv_r = 1.0 / std::sqrt(dx * dx + dy * dy + dz * dz);
        const double a = src.area(k) * kInvFourPi;
        v.single = a * inv_r;
        v.dbl = a * (src.normal(0, k) * dx + src.normal(1, k) * dy + src.normal(2, k) * dz) * inv_r * inv_r * inv_r;
    } else if (d2 < std::pow(options.near_ratio * diameter, 2)) {
        v.single = single_layer_triangle(x, p0, p1, p2);
        v.dbl = double_layer_triangle(x, p0, p1, p2);
    } else {
        v = radon7_layers(x, p0, p1, p2, src.normal.col(k), src.area(k));
    }
    return v;
}

Eigen::VectorXd double_layer_row_sums(const PanelSet& panels, const QuadratureOptions& options) {
    const Eigen::Index n = panels.size();
    Eigen::VectorXd sums(n);
    const double* c = panels.centroid.data();
    const double* nrm = panels.normal.data();
    Eigen::VectorXd scaled_area = panels.area * kInvFourPi;
    Eigen::VectorXd far2 = (options.far_ratio * panels.diameter).array().square();
    const double* a = scaled_area.data();
#pragma omp parallel for schedule(dynamic, 64)
    for (Eigen::Index i = 0; i < n; ++i) {
        const double x = c[3 * i], y = c[3 * i + 1], z = c[3 * i + 2];
        // The centroid rule on every other panel (branch-free, vectorized), then
        // the near panels' better rules replace their centroid values.
        double sum = 0.0;
        auto centroid_term = [&](Eigen::Index k) {
            const double dx = x - c[3 * k], dy = y - c[3 * k + 1], dz = z - c[3 * k + 2];
            const double inv_r = 1.0 / std::sqrt(dx * dx + dy * dy + dz * dz);
            return a[k] * (nrm[3 * k] * dx + nrm[3 * k + 1] * dy + nrm[3 * k + 2] * dz) * inv_r * inv_r * inv_r;
        };
        for (Eigen::Index k = 0; k < i; ++k) sum += centroid_term(k);
        for (Eigen::Index k = i + 1; k < n; ++k) sum += centroid_term(k);
        const Vec3 xi(x, y, z);
        for (Eigen::Index k = 0; k < n; ++k) {
            if (k == i) continue;
            const double dx = x - c[3 * k], dy = y - c[3 * k + 1], dz = z - c[3 * k + 2];
            if (dx * dx + dy * dy + dz * dz >= far2[k]) continue;
            sum += layer_pair(xi, panels, k, options, false).dbl - centroid_term(k);
        }
        sums(i) = sum;
    }
    return sums;
}

}  // namespace murk
