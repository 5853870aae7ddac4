#pragma once
// An independent reference for electrodes on an insulating body of revolution:
// ring-shaped (axisymmetric) perfect-conductor electrodes held at given potentials
// on a body in unbounded water of conductivity sigma, the rest of the surface
// insulating. It answers the electrode currents, hence drive resistances, to
// better than 1e-4 relative after Richardson extrapolation.
//
// Formulation. Direct boundary integral equation for the exterior potential phi
// (phi -> 0 at infinity), G = 1 / (4 pi |x - y|), n the outward normal of the body
// (into the water), q = d phi / d n:
//     phi(x) = int_S (phi(y) - phi(x)) dG/dn_y dS_y - int_S G q dS_y   (x on S).
// This is Green's representation at a smooth boundary point, (1/2) phi(x) =
// int phi dG/dn - int G q, with the free term and the principal value of the double
// layer replaced by Gauss's law, int_S dG/dn_y dS_y = -1/2 on S (Kellogg 1929,
// "Foundations of Potential Theory", ch. VI; from memory). On electrodes phi is
// known and q unknown; on the insulator q = 0 and phi unknown.
// Axisymmetry reduces S to its generatrix (meridian curve, pole to pole): the
// azimuthal integrals of G and dG/dn are complete elliptic integrals (the ring
// source; e.g. Gray, Garzon, Mantic & Graciani 2006, "Galerkin boundary integral
// analysis for the axisymmetric Laplace equation", Int. J. Numer. Meth. Engng;
// the closed forms used here are written out in ring_kernels and checked in the
// tests against direct azimuthal quadrature). K and E come from Carlson's forms
// K = R_F(0, k'^2, 1), E = R_F - (k^2/3) R_D(0, k'^2, 1) (NIST DLMF 19.25.1) with
// Boost.Math's ellint_rf / ellint_rd, so that k'^2 enters directly and stays
// accurate next to the singular point.
//
// Discretization: one constant value per element of the generatrix, collocation
// at the element's arclength midpoint, exact (curved) geometry. The self element's
// logarithmic singularity is integrated by splitting it at the collocation point
// and mapping each half by s = s_mid +- L u^3 (Gauss-Legendre in u sees u^2 log u);
// nearby elements are bisected until each piece is at least 1.5 of its length
// away. Elements are graded algebraically (s ~ t^4 in a uniform parameter t)
// toward every electrode edge, where the current density is singular like
// d^-1/2; the same map at every level makes the error a power series in the
// element count, so Richardson extrapolation over levels applies.
//
// Why this is independent of murk's 3-D solver: nothing of murk's panel code is
// used. The surface is not triangulated (exact generatrix, no flat panels, no area
// error at electrode edges, which here are element boundaries), the azimuthal
// integral is analytic (elliptic integrals) instead of panel quadrature, the
// singular and near-singular integrals use graded Gauss rules instead of closed-
// form flat-triangle integrals, the mesh is graded toward electrode edges, and
// the result is extrapolated to zero element size. What it shares with murk is
// only mathematics: Laplace's equation and Green's representation theorem.
#include "geometry/eigen_core.hpp"

#include <utility>
#include <vector>

namespace murk::axisym {

// A point of the generatrix in the meridian half-plane: axial coordinate x,
// distance rho >= 0 from the axis, outward unit normal (n_x, n_rho).
struct MeridianPoint {
    double x = 0, rho = 0, n_x = 0, n_rho = 0;
};

// The meridian curve of a body of revolution, from the pole at its left end to the
// pole at its right end, as circular arcs and straight segments joined end to end
// and parametrized by arclength s.
class Generatrix {
public:
    // Arc of a circle centred on the axis at x = centre_x: the point at polar
    // angle t is (centre_x - radius cos t, radius sin t), t from angle_from to
    // angle_to (radians, increasing; 0 is the left pole, pi the right one).
    void add_arc(double centre_x, double radius, double angle_from, double angle_to);
    void add_segment(double x0, double rho0, double x1, double rho1);

    double length() const;
    MeridianPoint at(double s) const;
    // Arclengths where pieces join (curvature jumps there), interior ones only.
    std::vector<double> joints() const;

private:
    struct Piece {
        bool arc = false;
        double s0 = 0, length = 0;
        double cx = 0, radius = 0, t0 = 0;      // arc
        double x0 = 0, rho0 = 0, dx = 0, drho = 0;  // segment: unit direction (dx, drho)
    };
    std::vector<Piece> pieces_;
};

Generatrix sphere_generatrix(double radius);
// Capsule along x centred at 0: cylinder of the given length, hemispherical caps.
Generatrix capsule_generatrix(double radius, double cylinder_length);

// Azimuthal integrals of the ring source, per unit arclength of the generatrix:
// for the ring through source point y (radius rho_y, axial x_y, normal n_y),
//   single = rho_y int_0^2pi G dtheta,   double = rho_y int_0^2pi dG/dn_y dtheta
// at the field point (x, rho), G = 1 / (4 pi |x - y|).
struct RingKernels {
    double single = 0, double_layer = 0;
};
RingKernels ring_kernels(double x, double rho, const MeridianPoint& y);

// Body with its electrodes as arclength intervals [from, to] of the generatrix.
struct AxisymmetricBody {
    Generatrix shape;
    std::vector<std::pair<double, double>> electrodes;
};

struct Element {
    double s0 = 0, s1 = 0;
    int electrode = -1;  // -1: insulating
};

// Elements at refinement `level` (element counts x 2^level), graded toward
// electrode edges. base_size: element length at level 0 away from edges.
std::vector<Element> mesh_generatrix(const AxisymmetricBody& body, double base_size, int level);

// Conductance matrix (S): column l holds the currents leaving each electrode into
// the water when electrode l is at 1 V and the others at 0 V (potential 0 at
// infinity).
Eigen::MatrixXd conductance_matrix(const AxisymmetricBody& body, double sigma, const std::vector<Element>& elements);

// Resistance (ohm) between electrodes 0 and 1 of a two-electrode body when a
// current I enters one and leaves by the other (no net current to infinity):
// [1 -1] G^-1 [1 -1]^T.
double floating_pair_resistance(const Eigen::MatrixXd& conductance);

// Richardson extrapolation of values computed at levels 0, 1, ..., each doubling
// the element counts (at least three levels).
struct Extrapolated {
    double value = 0;   // extrapolated from the last two levels with the observed order
    double error = 0;   // |value - the same extrapolation one level coarser|
    double order = 0;   // observed order from the last three levels
    std::vector<double> raw;
    std::vector<int> elements;
    double seconds = 0;  // wall time of the whole study
};
Extrapolated richardson(const std::vector<double>& raw);

// Extrapolated floating-pair resistance (ohm) between two rings at axial
// coordinates [from1, to1] and [from2, to2] (m, on the cylinder: |x| <= L/2) of an
// insulating capsule (radius, cylinder_length in m) in water of conductivity sigma
// (S/m). levels >= 3; the default 5 (80 to 1280 elements on the 30 cm capsule of
// the tests, about 5 s) leaves an error estimate near 1e-7 relative there; 4 levels
// (about 1 s) leave about 7e-5. InputError for rings off the cylinder or
// overlapping, a non-positive radius or sigma, or fewer than 3 levels.
Extrapolated capsule_ring_pair_study(double radius, double cylinder_length, double from1, double to1, double from2,
                                     double to2, double sigma, int levels = 5);
double capsule_ring_pair_resistance(double radius, double cylinder_length, double from1, double to1, double from2,
                                    double to2, double sigma);

}  // namespace murk::axisym
