#include "solver/target_derivatives.hpp"

#include "geometry/internal_check.hpp"
#include "solver/incident_field.hpp"
#include "solver/panel_set.hpp"
#include "solver/triangle_rules.hpp"

#include <cmath>
#include <limits>

namespace murk {

namespace {

constexpr double kInv4Pi = 1.0 / (4.0 * M_PI);

// The fixed part's scattered potential as a sum over quadrature points y_q:
//   phi_s(x) = sum_q w_q [u_q dG/dn_y(x, y_q) + q_q G(x, y_q)],  G = 1/(4 pi |x - y|),
// with the scattered densities of potential_at (u - phi_inc, j/sigma_w + d phi_inc/dn).
template <class S>
struct LayerPoints {
    Eigen::Matrix3Xd y, normal;
    std::vector<S> u, q;  // weight included
    Eigen::Matrix3Xd centroid;
    Eigen::VectorXd diameter;
};

template <class S>
LayerPoints<S> layer_points(const Scene<S>& scene, const Solution<S>& solution, const IncidentField<S>& incident) {
    const TriangleRule& rule = radon7_rule();
    const std::size_t nq = rule.weight.size();
    Eigen::Index panels = 0;
    for (const auto& s : scene.surfaces) panels += static_cast<Eigen::Index>(s.mesh.size());
    LayerPoints<S> lp;
    lp.y.resize(3, panels * static_cast<Eigen::Index>(nq));
    lp.normal.resize(3, lp.y.cols());
    lp.u.resize(static_cast<std::size_t>(lp.y.cols()));
    lp.q.resize(lp.u.size());
    lp.centroid.resize(3, panels);
    lp.diameter.resize(panels);
    Eigen::Index k = 0, col = 0;
    for (std::size_t b = 0; b < scene.surfaces.size(); ++b) {
        const PanelSet set(scene.surfaces[b].mesh);
        const SurfaceSolution<S>& sol = solution.surfaces[b];
        for (Eigen::Index t = 0; t < set.size(); ++t, ++k) {
            const Vec3 c = set.centroid.col(t), n = set.normal.col(t);
            const S us = sol.outer_potential(t) - incident.potential(c);
            const S qs = sol.current_density(t) / scene.water_conductivity + incident.normal_derivative(c, n);
            lp.centroid.col(k) = c;
            lp.diameter(k) = set.diameter(t);
            for (std::size_t i = 0; i < nq; ++i, ++col) {
                const auto& l = rule.point[i];
                lp.y.col(col) = l[0] * set.p0.col(t) + l[1] * set.p1.col(t) + l[2] * set.p2.col(t);
                lp.normal.col(col) = n;
                const double w = rule.weight[i] * set.area(t);
                lp.u[col] = w * us;
                lp.q[col] = w * qs;
            }
        }
    }
    return lp;
}

// Gradient and Hessian at x of the scattered potential (without any image).
template <class S>
void layer_derivatives(const LayerPoints<S>& lp, const Vec3& x, Eigen::Matrix<S, 3, 1>& grad,
                       Eigen::Matrix<S, 3, 3>& hess) {
    grad.setZero();
    hess.setZero();
    for (Eigen::Index i = 0; i < lp.y.cols(); ++i) {
        const Vec3 r = x - lp.y.col(i);
        const Vec3 n = lp.normal.col(i);
        const double r2 = r.squaredNorm(), inv_r = 1.0 / std::sqrt(r2), inv_r2 = inv_r * inv_r;
        const double inv_r3 = inv_r * inv_r2, inv_r5 = inv_r3 * inv_r2, inv_r7 = inv_r5 * inv_r2;
        const Eigen::Matrix3d rr = r * r.transpose();
        // single layer G: grad = -r/r^3, Hessian = 3 r r^T / r^5 - I / r^3 (times 1/4pi)
        const Vec3 g_single = -r * inv_r3;
        const Eigen::Matrix3d h_single = 3.0 * rr * inv_r5 - Eigen::Matrix3d::Identity() * inv_r3;
        // double layer n.r/r^3: grad = n/r^3 - 3 (n.r) r / r^5, Hessian as in IncidentField::hessian
        const double nr = n.dot(r);
        const Vec3 g_double = n * inv_r3 - 3.0 * nr * r * inv_r5;
        const Eigen::Matrix3d nrt = n * r.transpose();
        const Eigen::Matrix3d h_double = -3.0 * (nrt + nrt.transpose() + nr * Eigen::Matrix3d::Identity()) * inv_r5 +
                                         15.0 * nr * rr * inv_r7;
        const S u = lp.u[static_cast<std::size_t>(i)], q = lp.q[static_cast<std::size_t>(i)];
        grad += u * g_double.cast<S>() + q * g_single.cast<S>();
        hess += u * h_double.cast<S>() + q * h_single.cast<S>();
    }
    grad *= S(kInv4Pi);
    hess *= S(kInv4Pi);
}


}  // namespace

template <class S>
BaselineFieldGradient<S> baseline_field_gradient(const FixedPart<S>& fixed, const Eigen::Matrix3Xd& points) {
    const Scene<S>& scene = fixed.scene();
    std::vector<std::size_t> water_sources;
    for (std::size_t i = 0; i < scene.sources.size(); ++i)
        if (enclosing_surface(scene, scene.sources[i].position) < 0) water_sources.push_back(i);
    const IncidentField<S> incident(scene, water_sources);
    const LayerPoints<S> lp = layer_points(scene, fixed.solution(), incident);
    const Eigen::Index m = points.cols();
    BaselineFieldGradient<S> out;
    out.field.resize(3, m);
    out.gradient.resize(9, m);
    out.clearance.resize(m);
    const std::vector<FieldImage<S>>& images = scene.images.terms;
#pragma omp parallel for schedule(dynamic, 16)
    for (Eigen::Index i = 0; i < m; ++i) {
        const Vec3 x = points.col(i);
        Eigen::Matrix<S, 3, 1> grad, g_image;
        Eigen::Matrix<S, 3, 3> hess, h_image;
        layer_derivatives(lp, x, grad, hess);
        for (const FieldImage<S>& t : images) {  // w f(L x + shift): gradient w L^T grad f, Hessian w L^T H L
            layer_derivatives(lp, t.of(x), g_image, h_image);
            const Eigen::Matrix<S, 3, 3> l = t.linear.template cast<S>();
            grad += t.weight * (l.transpose() * g_image);
            hess += t.weight * (l.transpose() * h_image * l);
        }
        for (int j = 0; j < 3; ++j) grad(j) += incident.normal_derivative(x, Vec3::Unit(j));
        hess += incident.hessian(x);
        out.field.col(i) = -grad;
        const Eigen::Matrix<S, 3, 3> de = -hess;
        out.gradient.col(i) = Eigen::Map<const Eigen::Matrix<S, 9, 1>>(de.data());
        double ratio = std::numeric_limits<double>::infinity();
        for (Eigen::Index k = 0; k < lp.centroid.cols(); ++k)
            ratio = std::min(ratio, (lp.centroid.col(k) - x).norm() / lp.diameter(k));
        out.clearance(i) = ratio;
    }
    return out;
}

namespace {

// Potential at y of a dipole m at c, and its gradient with respect to y.
template <class S>
S dipole_potential(const Eigen::Matrix<S, 3, 1>& m, const Vec3& r) {
    const double len = r.norm();
    return r.cast<S>().dot(m) * S(kInv4Pi / (len * len * len));
}

template <class S>
Eigen::Matrix<S, 3, 1> dipole_gradient(const Eigen::Matrix<S, 3, 1>& m, const Vec3& r) {
    const double len2 = r.squaredNorm(), len = std::sqrt(len2), inv3 = 1.0 / (len2 * len);
    const S mr = r.cast<S>().dot(m);
    return (m * S(inv3) - r.cast<S>() * (S(3.0 * inv3 / len2) * mr)) * S(kInv4Pi);
}

}  // namespace

template <class S>
TargetResponse<S> target_response(const LeadFields<S>& lead, const Eigen::Matrix3Xd& points,
                                  const Matrix3<S>& polarization,
                                  const std::vector<Matrix3<S>>& polarization_derivatives) {
    const FixedPart<S>& fixed = lead.fixed();
    const Eigen::Matrix3Xd& rows = fixed.water_row_points();
    const MatrixX<S>& l = lead.water_rows_lead();
    MURK_CHECK(l.cols() == rows.cols(), "the lead fields cover every water row");
    const BaselineFieldGradient<S> bg = baseline_field_gradient(fixed, points);
    const std::vector<FieldImage<S>>& images = fixed.scene().images.terms;

    const Eigen::Index m = points.cols(), extra = static_cast<Eigen::Index>(polarization_derivatives.size());
    const Eigen::Index per_point = 4 + extra;  // value, d/dx, d/dy, d/dz, extras
    TargetResponse<S> out;
    out.change.resize(l.rows(), m);
    out.gradient.assign(static_cast<std::size_t>(3 + extra), MatrixX<S>(l.rows(), m));
    out.clearance = bg.clearance;
    constexpr Eigen::Index kBlock = 32;  // points per product with the lead fields
    const Eigen::Index blocks = (m + kBlock - 1) / kBlock;
#pragma omp parallel for schedule(dynamic, 1)
    for (Eigen::Index blk = 0; blk < blocks; ++blk) {
        const Eigen::Index first = blk * kBlock, count = std::min(kBlock, m - first);
        MatrixX<S> b(rows.cols(), count * per_point);
        for (Eigen::Index t = 0; t < count; ++t) {
            const Eigen::Index i = first + t;
            const Vec3 x = points.col(i);
            const Eigen::Matrix<S, 3, 3> de = Eigen::Map<const Eigen::Matrix<S, 3, 3>>(bg.gradient.col(i).data());
            const Eigen::Matrix<S, 3, 1> e = bg.field.col(i);
            const Eigen::Matrix<S, 3, 1> moment = polarization * e;
            Eigen::Matrix<S, 3, Eigen::Dynamic> dm(3, 3 + extra);  // moment derivatives of every parameter
            dm.leftCols(3) = polarization * de;
            for (Eigen::Index k = 0; k < extra; ++k) dm.col(3 + k) = polarization_derivatives[std::size_t(k)] * e;
            // Each image of the dipole sits at T^-1 x = L^T (x - shift) with moment w L^T p,
            // so it moves by L^T dx (FieldImage::source_of).
            std::vector<Vec3> at_image;
            std::vector<Eigen::Matrix<S, 3, 1>> moment_image;
            std::vector<Eigen::Matrix<S, 3, Eigen::Dynamic>> dm_image;
            for (const FieldImage<S>& im : images) {
                const Eigen::Matrix<S, 3, 3> lt = im.linear.transpose().template cast<S>() * im.weight;
                at_image.push_back(im.source_of(x));
                moment_image.push_back(lt * moment);
                dm_image.push_back(lt * dm);
            }
            const Eigen::Index c0 = t * per_point;
            for (Eigen::Index r = 0; r < rows.cols(); ++r) {
                const Vec3 d = rows.col(r) - x;
                S value = dipole_potential<S>(moment, d);
                // moving the source at a fixed moment: d/dx = -grad_y
                Eigen::Matrix<S, 3, 1> move = -dipole_gradient<S>(moment, d);
                for (Eigen::Index k = 0; k < 3 + extra; ++k)
                    b(r, c0 + 1 + k) = dipole_potential<S>(Eigen::Matrix<S, 3, 1>(dm.col(k)), d);
                for (std::size_t q = 0; q < images.size(); ++q) {  // d value / dx = L (d value / d image position)
                    const Vec3 di = rows.col(r) - at_image[q];
                    value += dipole_potential<S>(moment_image[q], di);
                    move -= images[q].linear.template cast<S>() * dipole_gradient<S>(moment_image[q], di);
                    for (Eigen::Index k = 0; k < 3 + extra; ++k)
                        b(r, c0 + 1 + k) += dipole_potential<S>(Eigen::Matrix<S, 3, 1>(dm_image[q].col(k)), di);
                }
                b(r, c0) = value;
                for (Eigen::Index j = 0; j < 3; ++j) b(r, c0 + 1 + j) += move(j);
            }
        }
        const MatrixX<S> product = l * b;
        for (Eigen::Index t = 0; t < count; ++t) {
            out.change.col(first + t) = product.col(t * per_point);
            for (Eigen::Index k = 0; k < 3 + extra; ++k)
                out.gradient[std::size_t(k)].col(first + t) = product.col(t * per_point + 1 + k);
        }
    }
    return out;
}

template <class S>
Matrix3<S> polarization_size_derivative(const Matrix3<S>& polarization, double size) {
    return polarization * S(3.0 / size);
}

template <class S>
Matrix3<S> ellipsoid_polarization_conductivity_derivative(const Eigen::Vector3d& semi_axes,
                                                          const Eigen::Matrix3d& axes, S inner_conductivity,
                                                          S water_conductivity) {
    const Eigen::Vector3d n = depolarization_factors(semi_axes);
    const double volume = 4.0 / 3.0 * M_PI * semi_axes.prod();
    Eigen::Matrix<S, 3, 1> d;
    for (int i = 0; i < 3; ++i) {
        const S denominator = water_conductivity + S(n(i)) * (inner_conductivity - water_conductivity);
        d(i) = S(volume) * water_conductivity / (denominator * denominator);
    }
    const Eigen::Matrix<S, 3, 3> a = axes.cast<S>();
    return a * d.asDiagonal() * a.transpose();
}

template struct BaselineFieldGradient<double>;
template struct BaselineFieldGradient<Complex>;
template BaselineFieldGradient<double> baseline_field_gradient(const FixedPart<double>&, const Eigen::Matrix3Xd&);
template BaselineFieldGradient<Complex> baseline_field_gradient(const FixedPart<Complex>&, const Eigen::Matrix3Xd&);
template TargetResponse<double> target_response(const LeadFields<double>&, const Eigen::Matrix3Xd&,
                                                const Matrix3<double>&, const std::vector<Matrix3<double>>&);
template TargetResponse<Complex> target_response(const LeadFields<Complex>&, const Eigen::Matrix3Xd&,
                                                 const Matrix3<Complex>&, const std::vector<Matrix3<Complex>>&);
template Matrix3<double> polarization_size_derivative(const Matrix3<double>&, double);
template Matrix3<Complex> polarization_size_derivative(const Matrix3<Complex>&, double);
template Matrix3<double> ellipsoid_polarization_conductivity_derivative(const Eigen::Vector3d&, const Eigen::Matrix3d&,
                                                                        double, double);
template Matrix3<Complex> ellipsoid_polarization_conductivity_derivative(const Eigen::Vector3d&,
                                                                         const Eigen::Matrix3d&, Complex, Complex);

}  // namespace murk
