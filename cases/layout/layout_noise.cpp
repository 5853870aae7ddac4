#include "cases/layout/layout_noise.hpp"

#include "geometry/input_error.hpp"

#include <string>

namespace murk {

NoiseModel layout_noise(const CaseSpec& spec, const LayoutSpec& layout) {
    const std::string where = spec.path + ":" + std::to_string(layout.line) + ": " + layout.key;
    if (!spec.detection) throw InputError(spec.path + ": detection: murk layout needs a [detection] noise model");
    const DetectionSpec& d = *spec.detection;
    if (d.noise == DetectionSpec::Noise::receptors)
        throw InputError(spec.path + ":" + std::to_string(d.line) +
                         ": detection: a robot's layouts need an amplifier noise, not receptor_noise");
    if (d.channels != DetectionSpec::Channels::quadratures)
        throw InputError(spec.path + ":" + std::to_string(d.line) +
                         ": detection.channels: murk layout rates layouts by both quadratures; amplitude and phase "
                         "channels are read by murk run only");
    const bool current = layout.reading == LayoutReading::current;
    NoiseModel m;
    m.kind = current ? NoiseKind::current_amplifier : NoiseKind::voltage_amplifier;
    m.noise_bandwidth_Hz = noise_bandwidth_of_average(d.integration_time_s);
    const bool matches = current == (d.noise == DetectionSpec::Noise::current_amplifier);
    const double density = layout.noise_density > 0 ? layout.noise_density : matches ? d.noise_density : -1;
    if (density < 0)
        throw InputError(where + ": this layout reads " + (current ? "currents" : "voltages") +
                         " but [detection] gives a " + (current ? "voltage" : "current") +
                         " noise; give the layout its own noise = \"...\" (" +
                         (current ? "A/sqrt(Hz)" : "V/sqrt(Hz)") + ")");
    (current ? m.current_noise_density_A_per_rtHz : m.voltage_noise_density_V_per_rtHz) = density;
    return m;
}

}  // namespace murk
