#pragma once
// The coordinates that name the dimensions of murk's datasets (cases/RESULT_LAYOUT.md): each
// group holds the coordinates of every dimension its datasets use, because netCDF-4 readers
// (xarray, ncdump) look for a dimension's coordinate only in the dataset's own group and its
// parents. Writers that add datasets to a group call these first; a coordinate that is already
// there is reused.
#include "cases/output/hdf5_file.hpp"

#include <cstddef>
#include <string_view>

namespace murk {

// Indices 0 .. count-1 (int32, units "1") as the coordinate `name`: panels, vertices, sensors.
// An existing coordinate of another length is a std::invalid_argument.
void index_coordinate(const H5Group& group, const char* name, std::size_t count, std::string_view long_name);

// The labels "x", "y", "z" of the last dimension of positions, normals and fields.
void xyz_coordinate(const H5Group& group);

}  // namespace murk
