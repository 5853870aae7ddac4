#pragma once
// Eigen's core, included the one way murk includes it: every file that uses Eigen
// includes this header before any other Eigen header.
//
// Why: with -march=native on an AVX-512 machine, Eigen's packet code calls GCC 12's
// _mm512_undefined_* intrinsics, which make their "undefined" value by initialising
// a variable with itself. After inlining, GCC 12 reports each use as
// -Wmaybe-uninitialized (about 1,500 times in a Release build; at -O1, as in a Sanitize
// build for this CPU, some as -Wuninitialized), although the value is undefined on
// purpose and never read. GCC attaches the warning to the intrinsic's line in
// <immintrin.h>, which Eigen/Core includes first; silencing both warnings for the
// lines included here silences exactly those reports and leaves them on for murk's
// own code (a variable of ours read before it is set is still reported).
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"
#pragma GCC diagnostic ignored "-Wuninitialized"
#include <Eigen/Core>
#pragma GCC diagnostic pop
