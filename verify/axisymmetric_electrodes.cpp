#include "verify/axisymmetric_electrodes.hpp"

#include "geometry/input_error.hpp"

#include <Eigen/LU>
#include <boost/math/quadrature/gauss.hpp>
#include <boost/math/special_functions/ellint_rd.hpp>
#include <boost/math/special_functions/ellint_rf.hpp>

#include <algorithm>
#include <chrono>
#include <stdexcept>
#include <cmath>
#include <string>

namespace murk::axisym {

// ---- generatrix ----

void Generatrix::add_arc(double centre_x, double radius, double angle_from, double angle_to) {
    Piece p;
    p.arc = true;
    p.s0 = length();
    p.length = radius * (angle_to - angle_from);
    p.cx = centre_x;
    p.radius = radius;
    p.t0 = angle_from;
    pieces_.push_back(p);
}

void Generatrix::add_segment(double x0, double rho0, double x1, double rho1) {
    Piece p;
    p.s0 = length();
    p.length = std::hypot(x1 - x0, rho1 - rho0);
    p.x0 = x0;
    p.rho0 = rho0;
    p.dx = (x1 - x0) / p.length;
    p.drho = (rho1 - rho0) / p.length;
    pieces_.push_back(p);
}

double Generatrix::length() const { return pieces_.empty() ? 0.0 : pieces_.back().s0 + pieces_.back().length; }

MeridianPoint Generatrix::at(double s) const {
    std::size_t i = 0;
    while (i + 1 < pieces_.size() && s > pieces_[i].s0 + pieces_[i].length) ++i;
    const Piece& p = pieces_[i];
    const double u = s - p.s0;
    MeridianPoint m;
    if (p.arc) {
        const double t = p.t0 + u / p.radius;
        m.x = p.cx - p.radius * std::cos(t);
        m.rho = p.radius * std::sin(t);
        m.n_x = -std::cos(t);  // radial, away from the centre
        m.n_rho = std::sin(t);
    } else {
        m.x = p.x0 + u * p.dx;
        m.rho = p.rho0 + u * p.drho;
        m.n_x = -p.drho;  // tangent turned clockwise: away from the body when walking left to right on top
        m.n_rho = p.dx;
    }
    m.rho = std::max(m.rho, 0.0);
    return m;
}

std::vector<double> Generatrix::joints() const {
    std::vector<double> s;
    for (std::size_t i = 1; i < pieces_.size(); ++i) s.push_back(pieces_[i].s0);
    return s;
}

Generatrix sphere_generatrix(double radius) {
    Generatrix g;
    g.add_arc(0.0, radius, 0.0, M_PI);
    return g;
}

Generatrix capsule_generatrix(double radius, double cylinder_length) {
    const double h = 0.5 * cylinder_length;
    Generatrix g;
    g.add_arc(-h, radius, 0.0, 0.5 * M_PI);
    g.add_segment(-h, radius, h, radius);
    g.add_arc(h, radius, 0.5 * M_PI, M_PI);
    return g;
}

// ---- kernels ----

RingKernels ring_kernels(double x, double rho, const MeridianPoint& y) {
    // |x - y|^2 = a - b cos(theta), a = rho^2 + rho_y^2 + dz^2, b = 2 rho rho_y;
    // A = a + b, B = a - b, k^2 = 2b / A, k'^2 = B / A. Azimuthal integrals
    // (derived here from the standard form of int_0^pi (a - b cos)^(-1/2) and
    // (a - b cos)^(-3/2); checked in the tests by direct quadrature):
    //   int dtheta / R   = 4 K / sqrt(A),   int dtheta / R^3 = 4 E / (B sqrt(A)),
    //   int cos dtheta / R^3 = (a int 1/R^3 - int 1/R) / b.
    const double dz = x - y.x;
    const double A = (rho + y.rho) * (rho + y.rho) + dz * dz;
    const double B = (rho - y.rho) * (rho - y.rho) + dz * dz;
    const double kc2 = B / A, k2 = 4 * rho * y.rho / A;
    const double K = boost::math::ellint_rf(0.0, kc2, 1.0);
    const double E = K - k2 / 3 * boost::math::ellint_rd(0.0, kc2, 1.0);
    const double sqA = std::sqrt(A);
    RingKernels k;
    k.single = y.rho * K / (M_PI * sqA);
    // rho_y / (4 pi) * [n_rho (rho I_cos - rho_y I_1) + n_x dz I_1], simplified so that
    // nothing divides by rho or rho_y (both may vanish at the poles).
    k.double_layer = (y.n_rho * (E * (rho * rho - y.rho * y.rho + dz * dz) / B - K) + 2 * y.n_x * y.rho * dz * E / B) /
                     (2 * M_PI * sqA);
    return k;
}

// ---- mesh ----

namespace {

constexpr double kGrading = 4;  // s ~ t^4 at an electrode edge: the d^-1/2 current density costs O(n^-2)

double graded(double t, bool edge0, bool edge1) {
    if (edge0 && edge1) {
        const double a = std::pow(t, kGrading), b = std::pow(1 - t, kGrading);
        return a / (a + b);
    }
    if (edge0) return std::pow(t, kGrading);
    if (edge1) return 1 - std::pow(1 - t, kGrading);
    return t;
}

}  // namespace

std::vector<Element> mesh_generatrix(const AxisymmetricBody& body, double base_size, int level) {
    const double total = body.shape.length();
    const double tiny = 1e-12 * total;
    std::vector<double> cuts = {0.0, total};
    for (double s : body.shape.joints()) cuts.push_back(s);
    for (const auto& e : body.electrodes) {
        cuts.push_back(e.first);
        cuts.push_back(e.second);
    }
    std::sort(cuts.begin(), cuts.end());
    std::vector<double> points;
    for (double s : cuts)
        if (points.empty() || s - points.back() > tiny) points.push_back(std::clamp(s, 0.0, total));
    auto is_edge = [&](double s) {
        if (s < tiny || s > total - tiny) return false;  // a pole is no edge
        for (const auto& e : body.electrodes)
            if (std::abs(s - e.first) < tiny || std::abs(s - e.second) < tiny) return true;
        return false;
    };
    auto electrode_at = [&](double s) {
        for (std::size_t e = 0; e < body.electrodes.size(); ++e)
            if (s > body.electrodes[e].first && s < body.electrodes[e].second) return static_cast<int>(e);
        return -1;
    };
    std::vector<Element> elements;
    for (std::size_t i = 0; i + 1 < points.size(); ++i) {
        const double a = points[i], b = points[i + 1];
        const bool e0 = is_edge(a), e1 = is_edge(b);
        int n = std::max(2, static_cast<int>(std::ceil((b - a) / base_size - 1e-9)));
        if (e0 || e1) n *= 2;  // the graded map stretches the far elements
        n <<= level;
        const int tag = electrode_at(0.5 * (a + b));
        for (int j = 0; j < n; ++j) {
            Element el;
            el.s0 = a + (b - a) * graded(double(j) / n, e0, e1);
            el.s1 = (j + 1 == n) ? b : a + (b - a) * graded(double(j + 1) / n, e0, e1);
            el.electrode = tag;
            elements.push_back(el);
        }
    }
    return elements;
}

// ---- integration over elements ----

namespace {

template <int N, class F>
void gauss_on(double a, double b, F&& f) {
    using Rule = boost::math::quadrature::gauss<double, N>;
    static_assert(N % 2 == 0, "even rules only: abscissae come in +- pairs");
    const double mid = 0.5 * (a + b), half = 0.5 * (b - a);
    for (std::size_t i = 0; i < Rule::abscissa().size(); ++i) {
        const double w = Rule::weights()[i] * half, t = Rule::abscissa()[i] * half;
        f(mid - t, w);
        f(mid + t, w);
    }
}

// Single- and double-layer integrals over [a, b] of the generatrix at field point
// (x, rho), bisecting pieces that are close to the field point.
void integrate_piece(const Generatrix& g, double x, double rho, double a, double b, int depth, RingKernels& sum) {
    const MeridianPoint m = g.at(0.5 * (a + b));
    const double d = std::hypot(m.x - x, m.rho - rho), len = b - a;
    auto add = [&](double s, double w) {
        const RingKernels k = ring_kernels(x, rho, g.at(s));
        sum.single += w * k.single;
        sum.double_layer += w * k.double_layer;
    };
    if (d >= 4 * len) return gauss_on<4>(a, b, add);
    if (d >= 1.5 * len || depth > 60) return gauss_on<8>(a, b, add);
    const double c = 0.5 * (a + b);
    integrate_piece(g, x, rho, a, c, depth + 1, sum);
    integrate_piece(g, x, rho, c, b, depth + 1, sum);
}

// Single layer over the element holding the field point at its midpoint s_mid:
// each half mapped by s = s_mid +- L u^3, which turns the log singularity into
// u^2 log u for Gauss-Legendre.
double self_single_layer(const Generatrix& g, const MeridianPoint& p, double s0, double s_mid, double s1) {
    double sum = 0;
    for (const double L : {s1 - s_mid, s0 - s_mid}) {
        gauss_on<16>(0.0, 1.0, [&](double u, double w) {
            const MeridianPoint y = g.at(s_mid + L * u * u * u);
            // On elements a few 1e-10 m long the innermost nodes can round onto the
            // field point; their weight (~u^2) makes dropping them harmless.
            if (y.x == p.x && y.rho == p.rho) return;
            sum += w * 3 * std::abs(L) * u * u * ring_kernels(p.x, p.rho, y).single;
        });
    }
    return sum;
}

double element_area(const Generatrix& g, const Element& e) {
    double area = 0;
    gauss_on<8>(e.s0, e.s1, [&](double s, double w) { area += w * 2 * M_PI * g.at(s).rho; });
    return area;
}

}  // namespace

Eigen::MatrixXd conductance_matrix(const AxisymmetricBody& body, double sigma, const std::vector<Element>& elements) {
    const Generatrix& g = body.shape;
    const int n = static_cast<int>(elements.size());
    const int electrodes = static_cast<int>(body.electrodes.size());
    // Row i: phi_i (1 + sum_{j != i} D_ij) - sum_{j != i} D_ij phi_j + sum_j S_ij q_j = 0.
    // Unknown j is q_j on an electrode element, phi_j on an insulating one; known
    // electrode potentials go to the right-hand side, a column per electrode at 1 V.
    Eigen::MatrixXd a(n, n), rhs = Eigen::MatrixXd::Zero(n, electrodes);
#pragma omp parallel for schedule(dynamic, 8)
    for (int i = 0; i < n; ++i) {
        const double sm = 0.5 * (elements[i].s0 + elements[i].s1);
        const MeridianPoint p = g.at(sm);
        std::vector<double> d(n);
        double row_sum = 0;
        for (int j = 0; j < n; ++j) {
            RingKernels k;
            if (j == i) {
                k.single = self_single_layer(g, p, elements[j].s0, sm, elements[j].s1);
            } else {
                integrate_piece(g, p.x, p.rho, elements[j].s0, elements[j].s1, 0, k);
                row_sum += k.double_layer;
            }
            d[j] = (j == i) ? 0.0 : -k.double_layer;
            if (elements[j].electrode >= 0) a(i, j) = k.single;
        }
        d[i] = 1 + row_sum;
        for (int j = 0; j < n; ++j) {
            if (elements[j].electrode >= 0)
                rhs(i, elements[j].electrode) -= d[j];
            else
                a(i, j) = d[j];
        }
    }
    const Eigen::MatrixXd u = a.partialPivLu().solve(rhs);
    Eigen::MatrixXd conductance = Eigen::MatrixXd::Zero(electrodes, electrodes);
    for (int j = 0; j < n; ++j) {
        const int e = elements[j].electrode;
        if (e < 0) continue;
        // current leaving the electrode into the water: -sigma q per unit area
        conductance.row(e) -= sigma * element_area(g, elements[j]) * u.row(j);
    }
    return conductance;
}

double floating_pair_resistance(const Eigen::MatrixXd& conductance) {
    const Eigen::Vector2d drive(1.0, -1.0);
    const Eigen::Matrix2d g = conductance.topLeftCorner<2, 2>();
    return drive.dot(g.partialPivLu().solve(drive));
}

// ---- extrapolation ----

Extrapolated richardson(const std::vector<double>& raw) {
    if (raw.size() < 3) throw std::invalid_argument("richardson: needs at least three levels");
    Extrapolated r;
    r.raw = raw;
    const std::size_t last = raw.size() - 1;
    // Extrapolation ending at level `end` with the order observed on end-2 .. end.
    // Differences that do not shrink leave nothing to extrapolate: the last value,
    // order 0, and (below) its last change as the error.
    auto at = [&](std::size_t end, double& order) {
        const double d1 = raw[end - 1] - raw[end - 2], d2 = raw[end] - raw[end - 1];
        if (!(std::abs(d1) > std::abs(d2)) || d1 * d2 <= 0) {
            order = 0;
            return raw[end];
        }
        order = std::log2(d1 / d2);
        return raw[end] + d2 / (std::exp2(order) - 1);
    };
    r.value = at(last, r.order);
    if (r.order == 0) {
        r.error = std::abs(raw[last] - raw[last - 1]);
    } else if (raw.size() >= 4) {
        double coarser_order = 0;
        r.error = std::abs(r.value - at(last - 1, coarser_order));
    } else {
        r.error = std::abs(r.value - raw[last]);
    }
    return r;
}

// ---- capsule with two rings ----

Extrapolated capsule_ring_pair_study(double radius, double cylinder_length, double from1, double to1, double from2,
                                     double to2, double sigma, int levels) {
    const double h = 0.5 * cylinder_length;
    for (auto [from, to] : {std::pair{from1, to1}, std::pair{from2, to2}})
        if (!(from < to) || from < -h || to > h)
            throw InputError("capsule ring [" + std::to_string(from) + ", " + std::to_string(to) +
                             "] m must be a non-empty band on the cylinder, |x| <= " + std::to_string(h) + " m");
    if (std::max(from1, from2) < std::min(to1, to2)) throw InputError("capsule rings overlap");
    if (!(radius > 0) || !(sigma > 0) || levels < 3)
        throw InputError("capsule ring pair: radius and sigma must be positive and levels >= 3");
    AxisymmetricBody body;
    body.shape = capsule_generatrix(radius, cylinder_length);
    const double s_left = 0.5 * M_PI * radius + h;  // arclength of x = 0
    body.electrodes = {{s_left + from1, s_left + to1}, {s_left + from2, s_left + to2}};
    const double base = body.shape.length() / 40;
    const auto start = std::chrono::steady_clock::now();
    std::vector<double> raw;
    std::vector<int> counts;
    for (int level = 0; level < levels; ++level) {
        const std::vector<Element> elements = mesh_generatrix(body, base, level);
        raw.push_back(floating_pair_resistance(conductance_matrix(body, sigma, elements)));
        counts.push_back(static_cast<int>(elements.size()));
    }
    Extrapolated r = richardson(raw);
    r.elements = counts;
    r.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    return r;
}

double capsule_ring_pair_resistance(double radius, double cylinder_length, double from1, double to1, double from2,
                                    double to2, double sigma) {
    return capsule_ring_pair_study(radius, cylinder_length, from1, to1, from2, to2, sigma).value;
}

}  // namespace murk::axisym
