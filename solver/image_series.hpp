#pragma once
// The images that make the Green's function of bounded water (Scene::images):
// one plane exactly, or two parallel horizontal planes (surface and bottom) as a
// truncated image series.
//
// Two planes, depth H = surface_z - bottom_z, bottom reflection coefficient r
// (1: insulating; r = (sigma_w - sigma_b) / (sigma_w + sigma_b) for a sediment,
// complex admittivities at a frequency). Reflecting a source at z0 back and forth
// gives (method of images; Jackson 1999, Classical Electrodynamics, §2.1, applied
// to each plane in turn):
//   translations  z0 + 2kH,         k = +-1, +-2, ...   weight r^|k|
//   reflections   2 s - z0 + 2jH,   j = 0, +-1, +-2, ... weight r^|j|
// |r| < 1: the series converges geometrically and is truncated where the
// remainder is below the tolerance; the potential vanishes far away.
// r = 1 (two insulating planes): each image adds about 1/(2kH), and the plain
// series diverges (the slab's potential is defined up to a constant). Each image
// then carries its constant subtracted: 1/d, with d the distance from a point of
// the mid-plane z = (s + b)/2 to its own image (2|k|H for the translations,
// (2m+1)H for the reflections). The pairs' remainders then fall like 1/k^3, and
// the images beyond the explicit ones are folded into one equivalent pair per
// family (position and weight chosen so that the pair's quadratic and quartic
// terms equal those of all the images it stands for), which leaves an error of
// order 1/M^6 after M explicit pairs.
// Reference of the potential with two insulating planes: the images' part of G
// (G minus the direct 1/(4 pi |x - y|)) is zero for x = y on the mid-plane. A
// scene whose currents sum to zero (electrodes of a body, an organ's points) does
// not see this constant at all.
//
// The number of images is the least for which the series differs from a much
// longer one (itself converged to far below the tolerance) by at most
// tolerance / (4 pi D) at every sampled pair of points between the planes within
// the horizontal reach; D = sqrt(reach^2 + H^2) is the largest separation there,
// so the error is at most `tolerance` relative to the direct kernel at the
// scene's largest distance.
#include "solver/scene.hpp"

#include <optional>

namespace murk {

// One plane: a single image, the reflection across it, of the given weight.
template <class S>
ImageSeries<S> plane_images(const BoundingPlane& plane, S weight = S(1));

// Horizontal bounds of the water. At least one plane; with both, surface_z > bottom_z.
struct WaterLayer {
    std::optional<double> surface_z;  // insulating water surface (water below)
    std::optional<double> bottom_z;   // bottom (water above), reflection coefficient given apart
    double tolerance = 1e-6;          // relative truncation error of the two-plane series
    double reach = 0.0;               // m, horizontal extent of the scene the series must serve
};

// Most images the two-plane series may hold (a bound on cost); a
// tolerance that needs more throws InputError naming the numbers.
constexpr int kMaxImages = 4000;

// The images of the layer; bottom_reflection is r above (1 for an insulating bottom).
// Throws InputError when the planes are not in order or the tolerance cannot be
// reached within kMaxImages images (|r| very near 1).
template <class S>
ImageSeries<S> layer_images(const WaterLayer& layer, S bottom_reflection);

// r = (sigma_water - sigma_bottom) / (sigma_water + sigma_bottom).
template <class S>
S reflection_coefficient(S sigma_water, S sigma_bottom);

// The images' part of 4 pi G: sum_k w_k / |T_k x - y| - constant (1/m).
template <class S>
S image_kernel(const ImageSeries<S>& series, const Vec3& x, const Vec3& y);

}  // namespace murk
