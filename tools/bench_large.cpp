// murk-bench-large: the fixed part of a large body, compressed (hierarchical
// matrix + preconditioned GMRES) against dense (LU), on the built-in 15 cm fish
// at growing panel counts. It prints tables and asserts nothing; the goals of
// the large-body work are read from its output.
//
// Per size (each in a child process of its own, so that its peak memory is its
// own): panels and unknowns; for the compressed part the set-up split into
// entries (Gauss's-law row sums, border, right-hand side), compression and
// preconditioner, the stored bytes, the compression ratio and ranks, the peak
// resident memory at the end of the set-up and overall, the baseline's GMRES
// iterations, one solve to a relative residual of 1e-8 and the time per
// exact-path sweep point (eight points of a 3 mm sphere 5 mm off the flank,
// solved together as a sweep's batch is; a second batch after the first, which
// also allocates the storage of the coupling blocks that a sweep reuses); for
// the dense part (up to --dense-max unknowns) assembly, LU and the same points
// (its peak memory includes the compressed part's, which is released first but
// counted by the process's peak), and the agreement of the two: the largest difference
// of the sphere's perturbation of the transdermal voltage over all skin panels,
// relative to the largest perturbation.
//
// Usage: murk-bench-large [--sizes 2000,5000,10000,20000,50000] [--dense-max UNKNOWNS]
//                         [--tolerance T] [--preconditioner T] [--dipoles K] [--setup-only]
//   --preconditioner T  relative accuracy of the preconditioner's off-diagonal blocks
//   --dipoles K  also time K dipole-path points (blocked solves) at every size
//   --setup-only the compressed set-up alone and its peak memory (the goal's "set-up under 8 GB")
#include "cases/input/case_reader.hpp"
#include "cases/scene/scene_builder.hpp"
#include "solver/compressed_system.hpp"
#include "solver/coupled_solve.hpp"
#include "solver/dipole_path.hpp"
#include "solver/fixed_part.hpp"
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"

#include <omp.h>
#include <sys/resource.h>
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

using namespace murk;

namespace {

double seconds_since(std::chrono::steady_clock::time_point t0) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

double peak_rss_gib() {
    rusage u{};
    getrusage(RUSAGE_SELF, &u);
    return double(u.ru_maxrss) / (1024.0 * 1024.0);  // ru_maxrss is in KiB on Linux
}

std::string load_average() {
    std::ifstream in("/proc/loadavg");
    std::string one;
    in >> one;
    return one.empty() ? "unknown" : one;
}

// The fish of tools/bench/fish_grid.toml (about 3,000 panels at 3.1 mm), with
// the panel size scaled to aim at `panels` skin panels.
std::string fish_case(long panels) {
    const double size_mm = 3.1 * std::sqrt(3000.0 / double(panels));
    std::ostringstream s;
    s << "title = \"large-body benchmark\"\n[water]\nconductivity = \"100 uS/cm\"\n[mesh]\npanel_size = \""
      << size_mm << " mm\"\n"
      << "[fish]\nlength = \"15 cm\"\ncentre = [\"0 cm\", \"0 cm\", \"0 cm\"]\ninterior_conductivity = \"1 S/m\"\n"
         "skin_resistance = \"0.25 ohm*m^2\"\n[fish.organ]\nfrom = 0.15\nto = 0.85\ndistribution = \"linear\"\n"
         "points = 15\ncurrent = \"5 uA\"\n";
    return s.str();
}

Surface<double> sphere_beside(const Scene<double>& body, double radius, double gap) {
    double y_max = -1e9;  // the flank's outermost point at x near 0
    for (const Vec3& v : body.surfaces.front().mesh.vertices)
        if (std::abs(v.x()) < 0.01) y_max = std::max(y_max, v.y());
    Surface<double> s;
    s.mesh = make_icosphere(radius, 2);
    s.mesh.name = "sphere";
    translate(s.mesh, Vec3(0.0, y_max + gap + radius, 0.0));
    s.kind = InterfaceKind::contact;
    s.inner_conductivity = 0.5;
    return s;
}

// Eight exact-path points solved together, as a sweep's batch is (the sphere at
// eight places along the flank), twice: the first batch also allocates the
// coupling blocks' storage, which later batches of a sweep reuse. Returns the
// first point's transdermal perturbation over the skin; sets the seconds per
// point of the first batch and of the second (the sweep's steady cost).
Eigen::VectorXd exact_points(const Scene<double>& full, const FixedPart<double>& fixed, double* first_batch,
                             double* steady) {
    const std::size_t moving = full.surfaces.size() - 1;
    const QuadratureOptions quad{};
    const MovingBlock<double> block = factor_moving_block(full, {moving}, quad);
    constexpr int kPoints = 8;
    Eigen::VectorXd out;
    for (int batch = 0; batch < 2; ++batch) {
        std::vector<Scene<double>> scenes(kPoints, full);
        std::vector<CoupledProblem<double>> problems;
        for (int k = 0; k < kPoints; ++k) {
            translate(scenes[std::size_t(k)].surfaces.back().mesh, Vec3(0.004 * k + 0.002 * batch, 0, 0));
            problems.push_back({&scenes[std::size_t(k)], {moving}, &block});
        }
        const auto t0 = std::chrono::steady_clock::now();
        const std::vector<CoupledSolution<double>> c = solve_coupled_together(problems, fixed, quad, CouplingOptions{});
        *(batch == 0 ? first_batch : steady) = seconds_since(t0) / kPoints;
        if (batch > 0) continue;
        const auto& skin = c.front().solution.surfaces.front();
        const auto& base = fixed.solution().surfaces.front();
        out = (skin.inner_potential - skin.outer_potential) - (base.inner_potential - base.outer_potential);
    }
    return out;
}

int one_size(long target, long dense_max, double tolerance, double preconditioner, int dipoles, bool setup_only) {
    const CaseSpec spec = read_case_text(fish_case(target), "bench_large");
    const Scene<double> body = build_scene<double>(spec, false);
    const QuadratureOptions quad = quadrature_options(spec);
    Scene<double> full = body;
    full.surfaces.push_back(sphere_beside(body, 0.0015, 0.005));
    const long panels = long(body.surfaces.front().mesh.size());
    const long unknowns = long(system_layout(body).size);
    std::printf("%7ld panels %7ld unknowns | ", panels, unknowns);
    std::fflush(stdout);

    Eigen::VectorXd pert_c;
    auto t0 = std::chrono::steady_clock::now();
    {  // the compressed part is released before the dense one is built: each peak is its own
    SolverOptions c;
    c.choice = SystemSolver::compressed;
    c.compression_tolerance = tolerance;
    c.preconditioner_tolerance = preconditioner;
    t0 = std::chrono::steady_clock::now();
    const FixedPart<double> compressed(body, quad, c);
    const double setup = seconds_since(t0);
    const FixedPart<double>::SolverReport report = compressed.report();
    const CompressedSystem<double>& system = *compressed.compressed_system();
    if (setup_only) {
        std::printf("compressed set-up %.1f s, %.2f GiB stored, peak %.2f GiB\n", setup,
                    double(compressed.factor_bytes()) / (1 << 30), peak_rss_gib());
        return 0;
    }
    const double setup_peak = peak_rss_gib();
    double exact_first = 0, exact_c = 0;
    pert_c = exact_points(full, compressed, &exact_first, &exact_c);
    std::printf("compressed: set-up %.1f s (entries %.1f, compression %.1f, preconditioner %.1f), %.2f GiB stored "
                "(%.1f %% of dense), set-up peak %.2f GiB, %d iterations, exact point %.2f s (first batch %.2f s)",
                setup, system.entries_seconds(), system.compression_seconds(), system.preconditioner_seconds(),
                double(compressed.factor_bytes()) / (1 << 30), 100.0 * report.compression_ratio, setup_peak,
                report.baseline_iterations, exact_c, exact_first);
    {
        t0 = std::chrono::steady_clock::now();
        int it = 0;
        (void)system.solve_columns(system.rhs(), false, &it, 1e-8);
        std::printf(", solve to 1e-8 %.2f s (%d iterations)", seconds_since(t0), it);
    }
    {  // the two halves of one iteration, for one column and for 16 together
        for (const Eigen::Index columns : {1, 16}) {
            const Eigen::MatrixXd x = Eigen::MatrixXd::Random(system.size(), columns);
            const Eigen::MatrixXd panels = x.topRows(system.panel_unknowns());
            double product = 1e300, preconditioner = 1e300;  // the least of three runs
            for (int run = 0; run < 3; ++run) {
                t0 = std::chrono::steady_clock::now();
                (void)system.apply(x);
                product = std::min(product, seconds_since(t0));
                t0 = std::chrono::steady_clock::now();
                (void)system.preconditioner().solve(panels, false);
                preconditioner = std::min(preconditioner, seconds_since(t0));
            }
            std::printf(", %ld column%s: product %.3f s, preconditioner %.3f s", long(columns), columns > 1 ? "s" : "",
                        product, preconditioner);
        }
    }
    if (dipoles > 0) {
        std::vector<PointDipole<double>> d;
        for (int k = 0; k < dipoles; ++k)
            d.push_back({Vec3(-0.05 + 0.1 * k / std::max(1, dipoles - 1), 0.03, 0.0), Vec3(0, 1e-12, 0)});
        t0 = std::chrono::steady_clock::now();
        (void)unknowns_with_dipoles(compressed, d);
        std::printf(", %d dipole points %.2f s", dipoles, seconds_since(t0));
    }
    {
        const HMatrixStats& st = system.operator_stats();
        std::printf(", blocks %zu dense %zu low-rank (ranks mean %.1f, max %d), %.0f stored entries per n log2 n, "
                    "preconditioner %.1f s, %.2f GiB, %zu leaves, rank at most %d (%d capped)",
                    st.dense_blocks, st.low_rank_blocks, st.mean_rank, st.max_rank,
                    double(st.bytes) / sizeof(double) / (double(unknowns) * std::log2(double(unknowns))),
                    system.preconditioner_seconds(), double(system.preconditioner_stats().bytes) / (1 << 30),
                    system.preconditioner_stats().leaves, system.preconditioner_stats().max_rank,
                    system.preconditioner_stats().capped_blocks);
    }
    std::printf(", peak %.2f GiB", peak_rss_gib());
    std::fflush(stdout);
    }

    if (unknowns <= dense_max) {
        SolverOptions d;
        d.choice = SystemSolver::dense;
        t0 = std::chrono::steady_clock::now();
        const FixedPart<double> dense(body, quad, d);
        const double dense_setup = seconds_since(t0);
        double exact_first_d = 0, exact_d = 0;
        const Eigen::VectorXd pert_d = exact_points(full, dense, &exact_first_d, &exact_d);
        const double agreement = (pert_c - pert_d).cwiseAbs().maxCoeff() / pert_d.cwiseAbs().maxCoeff();
        std::printf(" | dense: set-up %.1f s (assembly %.1f, LU %.1f), %.2f GiB, exact point %.2f s, peak %.2f GiB | "
                    "agreement %.2e",
                    dense_setup, dense.assembly_seconds(), dense.factor_seconds(),
                    double(dense.factor_bytes()) / (1 << 30), exact_d, peak_rss_gib(), agreement);
    }
    std::printf("\n");
    return 0;
}

std::vector<long> parse_sizes(const std::string& text) {
    std::vector<long> out;
    std::stringstream in(text);
    std::string item;
    while (std::getline(in, item, ',')) out.push_back(std::stol(item));
    return out;
}

}  // namespace

int main(int argc, char** argv) {
    std::string sizes = "2000,5000,10000,20000,50000";
    long dense_max = 21000, one = 0;
    double tolerance = 1e-7, preconditioner = SolverOptions{}.preconditioner_tolerance;
    int dipoles = 0;
    bool setup_only = false;
    for (int i = 1; i < argc; i += 2) {
        const std::string key = argv[i];
        if (key == "--setup-only") {
            setup_only = true;
            --i;
            continue;
        }
        if (i + 1 >= argc) {
            std::fprintf(stderr, "murk-bench-large: %s needs a value\n", key.c_str());
            return 2;
        }
        const std::string value = argv[i + 1];
        if (key == "--sizes") sizes = value;
        else if (key == "--dense-max") dense_max = std::stol(value);
        else if (key == "--tolerance") tolerance = std::stod(value);
        else if (key == "--preconditioner") preconditioner = std::stod(value);
        else if (key == "--dipoles") dipoles = std::stoi(value);
        else if (key == "--one") one = std::stol(value);
        else {
            std::fprintf(stderr, "murk-bench-large: unknown option %s\n", key.c_str());
            return 2;
        }
    }
    if (one > 0) return one_size(one, dense_max, tolerance, preconditioner, dipoles, setup_only);
    std::printf("murk-bench-large: fish of 15 cm, %d threads, compression tolerance %.0e, preconditioner tolerance %.0e, dense up to %ld unknowns; "
                "load average before %s\n",
                omp_get_max_threads(), tolerance, preconditioner, dense_max, load_average().c_str());
    char exe[4096] = {};
    if (readlink("/proc/self/exe", exe, sizeof exe - 1) <= 0) return 1;
    for (long n : parse_sizes(sizes)) {
        char command[5000];
        std::snprintf(command, sizeof command, "%s --one %ld --dense-max %ld --tolerance %.3e --preconditioner %.3e --dipoles %d%s",
                      exe, n, dense_max, tolerance, preconditioner, dipoles, setup_only ? " --setup-only" : "");
        if (std::system(command) != 0) std::printf("size %ld failed\n", n);
    }
    std::printf("load average after %s\n", load_average().c_str());
    return 0;
}
