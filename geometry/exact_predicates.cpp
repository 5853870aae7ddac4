#include "geometry/exact_predicates.hpp"

// GCC 12 reports -Wmaybe-uninitialized inside Boost.Multiprecision once
// boost::rational's normalisation of a cpp_int is inlined here: cpp_int keeps its
// limbs in a union and chooses the member in use by a flag, and GCC flags the member
// that is not in use. The report is false and attached to Boost's own lines, so it
// is silenced for those lines alone.
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"
#include <boost/multiprecision/cpp_int.hpp>
#pragma GCC diagnostic pop
#include <cmath>

namespace murk {
namespace {

using boost::multiprecision::cpp_rational;

// Bounds on the relative error of the plain evaluations below, taken generously
// above Shewchuk's (1997) errboundA constants (3.3e-16 for 2-D, 7.8e-16 for 3-D).
constexpr double kBound2 = 1e-15;
constexpr double kBound3 = 2e-15;

template <class T>
int sign_of(const T& v) {
    return v > 0 ? 1 : (v < 0 ? -1 : 0);
}

}  // namespace

int orient2d(const Vec2& a, const Vec2& b, const Vec2& c) {
    const double l = (b.x() - a.x()) * (c.y() - a.y());
    const double r = (b.y() - a.y()) * (c.x() - a.x());
    const double det = l - r;
    if (std::abs(det) > kBound2 * (std::abs(l) + std::abs(r))) return sign_of(det);
    const cpp_rational ax(a.x()), ay(a.y());
    const cpp_rational e = (cpp_rational(b.x()) - ax) * (cpp_rational(c.y()) - ay) -
                           (cpp_rational(b.y()) - ay) * (cpp_rational(c.x()) - ax);
    return sign_of(e);
}

int orient3d(const Vec3& a, const Vec3& b, const Vec3& c, const Vec3& d) {
    const Vec3 ad = a - d, bd = b - d, cd = c - d;
    const double m1 = bd.y() * cd.z(), m2 = bd.z() * cd.y();
    const double m3 = bd.z() * cd.x(), m4 = bd.x() * cd.z();
    const double m5 = bd.x() * cd.y(), m6 = bd.y() * cd.x();
    const double det = ad.x() * (m1 - m2) + ad.y() * (m3 - m4) + ad.z() * (m5 - m6);
    const double perm = std::abs(ad.x()) * (std::abs(m1) + std::abs(m2)) + std::abs(ad.y()) * (std::abs(m3) + std::abs(m4)) +
                        std::abs(ad.z()) * (std::abs(m5) + std::abs(m6));
    if (std::abs(det) > kBound3 * perm) return sign_of(det);
    cpp_rational A[3], B[3], C[3];
    for (int k = 0; k < 3; ++k) {
        const cpp_rational dk(d[k]);
        A[k] = cpp_rational(a[k]) - dk;
        B[k] = cpp_rational(b[k]) - dk;
        C[k] = cpp_rational(c[k]) - dk;
    }
    const cpp_rational e = A[0] * (B[1] * C[2] - B[2] * C[1]) + A[1] * (B[2] * C[0] - B[0] * C[2]) +
                           A[2] * (B[0] * C[1] - B[1] * C[0]);
    return sign_of(e);
}

}  // namespace murk
