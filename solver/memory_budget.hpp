#pragma once
// How much memory a run may take: dense systems grow as the square of the
// unknowns, so a case is checked against a budget before its system is allocated.
#include <string>

namespace murk {

// The default budget: 80 % of the machine's physical memory, leaving room for
// the system and for the estimate's own error.
double default_memory_limit_bytes();

// "376 MiB", "5.9 GiB": a size for people.
std::string memory_text(double bytes);

}  // namespace murk
