#pragma once
// Accuracy switches of the panel integrals. Distances are measured from the
// target point to the panel centroid, in units of the panel diameter (longest edge).
namespace murk {

struct QuadratureOptions {
    // Below this ratio the closed-form integrals are used (exact for flat panels).
    double near_ratio = 3.0;
    // Between near_ratio and this ratio the 7-point Radon rule is used (relative
    // error below about 1e-5 at ratio 3); beyond it the one-point centroid rule
    // (relative error about 1e-3 / ratio^2).
    double far_ratio = 10.0;
};

}  // namespace murk
