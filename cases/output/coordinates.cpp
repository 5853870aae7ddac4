#include "cases/output/coordinates.hpp"

#include "cases/output/result_layout.hpp"

#include <cstdint>
#include <stdexcept>
#include <string>
#include <vector>

namespace murk {

void index_coordinate(const H5Group& group, const char* name, std::size_t count, std::string_view long_name) {
    if (group.exists(name)) {
        const H5Dataset existing = group.dataset(name);
        if (existing.shape() != H5Shape{count})
            throw std::invalid_argument(existing.path() + " has another length than the " + std::to_string(count) +
                                        " its group's data need");
        return;
    }
    std::vector<std::int32_t> index(count);
    for (std::size_t k = 0; k < count; ++k) index[k] = static_cast<std::int32_t>(k);
    group.write_coordinate(name, index, "1", long_name);
}

void xyz_coordinate(const H5Group& group) {
    if (!group.exists(layout::kXyz))
        group.write_label_coordinate(layout::kXyz, {"x", "y", "z"}, "Cartesian component");
}

}  // namespace murk
