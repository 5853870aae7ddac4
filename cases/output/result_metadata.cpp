#include "cases/output/result_metadata.hpp"
#include "solver/tank.hpp"

#include "cases/output/result_layout.hpp"
#include "cases/output/solver_attributes.hpp"

#include <openssl/evp.h>

#include <ctime>
#include <stdexcept>

namespace murk {

std::string sha256_hex(const std::string& text) {
    unsigned char digest[EVP_MAX_MD_SIZE];
    unsigned int length = 0;
    if (EVP_Digest(text.data(), text.size(), digest, &length, EVP_sha256(), nullptr) != 1)
        throw std::runtime_error("SHA-256 of the case text failed");
    static const char* hex = "0123456789abcdef";
    std::string out;
    for (unsigned int i = 0; i < length; ++i) {
        out += hex[digest[i] >> 4];
        out += hex[digest[i] & 15];
    }
    return out;
}

std::string utc_now_iso8601() {
    const std::time_t now = std::time(nullptr);
    std::tm tm{};
    gmtime_r(&now, &tm);
    char buffer[32];
    std::strftime(buffer, sizeof buffer, "%Y-%m-%dT%H:%M:%SZ", &tm);
    return buffer;
}

std::string history_line(const std::string& utc_time, const std::string& command) {
    return utc_time + " " + command;
}

void write_result_metadata(H5Group root, const CaseSpec& spec, const std::string& command,
                           const std::string& approximation, const QuadratureOptions& quadrature) {
    const std::string now = utc_now_iso8601();
    // CF conventions 1.8, section 2.6.2: the conventions followed, and the history of the file.
    root.set_attribute("Conventions", layout::kConventions);
    root.set_attribute("history", history_line(now, command));
    root.set_attribute("murk_version", MURK_VERSION);
    root.set_attribute("title", spec.title);
    root.set_attribute("case", spec.text);
    root.set_attribute("case_path", spec.path);
    root.set_attribute("case_sha256", sha256_hex(spec.text));
    root.set_attribute("created_utc", now);
    root.set_attribute("command", command);
    root.set_attribute("approximation", approximation);
    root.set_attribute("near_ratio", quadrature.near_ratio);
    root.set_attribute("far_ratio", quadrature.far_ratio);
    root.set_attribute("frequency_Hz", spec.frequency_Hz.value_or(0.0));
    write_solver_options(root, spec.mesh.solver);
    // Closed insulating walls define the potential only up to a constant: say which one (solver/tank.hpp).
    if (spec.tank) root.set_attribute("reference", tank_reference_text());
}

}  // namespace murk
