#include "cases/sweep/run_options.hpp"

#include <unistd.h>

namespace murk {

double default_memory_limit_bytes() {
    const long pages = sysconf(_SC_PHYS_PAGES), page = sysconf(_SC_PAGESIZE);
    return pages > 0 && page > 0 ? 0.8 * double(pages) * double(page) : 0.0;
}

}  // namespace murk
