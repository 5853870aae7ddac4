#include "solver/memory_budget.hpp"

#include <unistd.h>

#include <cstdio>

namespace murk {

double default_memory_limit_bytes() {
    const long pages = sysconf(_SC_PHYS_PAGES), page = sysconf(_SC_PAGESIZE);
    return pages > 0 && page > 0 ? 0.8 * double(pages) * double(page) : 0.0;
}

std::string memory_text(double b) {
    char buf[64];
    if (b >= 1024.0 * 1024 * 1024) std::snprintf(buf, sizeof buf, "%.1f GiB", b / (1024.0 * 1024 * 1024));
    else if (b >= 1024.0 * 1024) std::snprintf(buf, sizeof buf, "%.0f MiB", b / (1024.0 * 1024));
    else std::snprintf(buf, sizeof buf, "%.0f KiB", b / 1024.0);
    return buf;
}

}  // namespace murk
