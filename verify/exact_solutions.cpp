#include "verify/exact_solutions.hpp"

#include <cmath>

namespace murk::exact {

template <class S>
S sphere_point_source_perturbation(double a, double d, S sigma_in, S sigma_out, S current) {
    S sum = 0;
    const double ratio = (a / d) * (a / d);
    double power = a / (d * d);  // a^(2n+1) / d^(2n+2) at n = 0
    for (int n = 1; n < 100000; ++n) {
        power *= ratio;
        const S term = double(n) * (sigma_out - sigma_in) / (double(n) * sigma_in + double(n + 1) * sigma_out) * power;
        sum += term;
        if (std::abs(term) < 1e-16 * std::abs(sum)) break;
    }
    return current / (4.0 * M_PI * sigma_out) * sum;
}

template double sphere_point_source_perturbation(double, double, double, double, double);
template Complex sphere_point_source_perturbation(double, double, Complex, Complex, Complex);

double maxwell_wagner_relaxation_time(double sigma_in, double eps_in, double sigma_out, double eps_out) {
    return (eps_in + 2.0 * eps_out) / (sigma_in + 2.0 * sigma_out);
}

Complex maxwell_wagner_dipole_factor(double sigma_in, double eps_in, double sigma_out, double eps_out, double omega) {
    const double k_low = (sigma_in - sigma_out) / (sigma_in + 2.0 * sigma_out);
    const double k_high = (eps_in - eps_out) / (eps_in + 2.0 * eps_out);
    const double tau = maxwell_wagner_relaxation_time(sigma_in, eps_in, sigma_out, eps_out);
    return k_high + (k_low - k_high) / Complex(1.0, omega * tau);
}

double membrane_charging_time(double R, double g_m, double C_m, double sigma_in, double sigma_out) {
    const double access = 1.0 / sigma_in + 1.0 / (2.0 * sigma_out);  // ohm m: the two media in series
    return R * C_m * access / (1.0 + R * g_m * access);
}

Complex membrane_voltage_at_frequency(double E, double R, double g_m, double C_m, double sigma_in,
                                      double sigma_out, double omega) {
    const double access = 1.0 / sigma_in + 1.0 / (2.0 * sigma_out);
    const double direct = 1.5 * E * R / (1.0 + R * g_m * access);
    return direct / Complex(1.0, omega * membrane_charging_time(R, g_m, C_m, sigma_in, sigma_out));
}

double spheroid_axial_depolarization(double polar, double equatorial) {
    if (std::abs(polar - equatorial) < 1e-12 * polar) return 1.0 / 3.0;
    if (polar > equatorial) {  // prolate
        const double e = std::sqrt(1.0 - (equatorial * equatorial) / (polar * polar));
        return (1.0 - e * e) / (e * e * e) * (std::atanh(e) - e);
    }
    const double e = std::sqrt((equatorial * equatorial) / (polar * polar) - 1.0);  // oblate
    return (1.0 + e * e) / (e * e * e) * (e - std::atan(e));
}

}  // namespace murk::exact

#include <boost/math/special_functions/bessel.hpp>

namespace murk::exact {

double insulating_slab_kernel(double h, double rho, double z, double z0) {
    double sum = -std::log(rho);
    for (int n = 1; n < 1000000; ++n) {
        const double k = boost::math::cyl_bessel_k(0, n * M_PI * rho / h);
        sum += 2.0 * std::cos(n * M_PI * z / h) * std::cos(n * M_PI * z0 / h) * k;
        if (k < 1e-18 * std::abs(sum) + 1e-300) break;
    }
    return 2.0 / h * sum;
}

}  // namespace murk::exact
