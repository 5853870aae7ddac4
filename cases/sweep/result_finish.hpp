#pragma once
// What a result file gets once it holds every point of its sweep: the analysis
// (/detection, /falloff), the strongest electric image, and the XDMF sidecar
// that shows the body's fields in ParaView. Worked out from the file alone, so
// that a single run and murk merge (which has no scene, only the shares' files)
// finish a result the same way.
#include "cases/output/hdf5_file.hpp"
#include "cases/output/xdmf_writer.hpp"
#include "cases/sweep/sweep_axes.hpp"

#include <string>
#include <vector>

namespace murk {

// The sweep axes of a result file, in order, from /sweep's `axes` attribute and
// the axes' coordinates. InputError naming the file when they are missing.
std::vector<SweepAxis> axes_in_file(const H5Group& root);

// Adds the analysis and the strongest image, and returns the surfaces the
// sidecar shows (none in a case without a body).
std::vector<XdmfSurface> finish_result(H5Group root);

}  // namespace murk
