#pragma once
// Included first into every file of murk_input in the fuzz build (tests/fuzz/CMakeLists.txt):
// toml++'s internal assertions compile to nothing, as in Debian's release build of
// the library that murk links (GCC, where they are neither checked nor assumed).
#define TOML_ASSERT(expr) static_cast<void>(0)
