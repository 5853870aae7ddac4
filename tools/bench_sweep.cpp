// murk-bench: the fast sweep paths against the naive way, on a fixed case of our
// own (tools/bench/fish_grid.toml: a fish-like body of about 3,000 skin panels
// with an electric organ, a 3 mm conducting sphere on a 50 x 40 grid beside it).
// It asserts nothing; the goals of issue 4 are read from what it prints.
//
// Three runs of the real runner (`murk run`, quiet), each writing its HDF5 file:
//   naive   method "full": the whole system assembled and factored at every
//           point, on a 3 x 3 subset of the grid (enough for a stable time);
//   exact   method "exact" on the whole grid;
//   dipole  method "dipole" on the whole grid (no check points, so that its time
//           is the dipole path's alone).
// Per-point time = (run wall time - set-up time) / points computed, all threads
// busy; set-up is the plan, the baseline or the body's assembly and
// factorization, and opening the file. The relative difference of a point is
// max over skin panels |fast - naive| / max over skin panels |naive|, taken on
// the subset's points (for the dipole path only where the sphere's centre is at
// least five radii from the skin). The last two lines are
//   exact: speedup S x over naive, max relative difference E
//   dipole: speedup S x over naive, max relative difference E
//
// Two last sections measure the choices inside the paths. The exact path's
// coupling by GMRES (one body solve per iteration) against forming the Schur
// complement (one body solve per object unknown, blocked), at one point. The
// dipole path's readout on the same body two ways:
// a blocked solve against the factors (what a fish's thousands of skin panels
// need) and lead fields by reciprocity for 4 sensors (what a robot with a few
// electrodes gets), per point and with the lead fields' set-up.
//
// Usage: murk-bench [CASE]   (default: the shipped tools/bench/fish_grid.toml)
//
// murk-bench --harmonics K [CASE] instead times an emitter waveform of K harmonics
// ([signal] harmonics, every one kept) against the one-frequency sweep at its fundamental,
// both by the exact path on a 10 x 4 subset of the grid and in complex arithmetic (the
// skin is given a membrane capacitance so that the one-frequency case is complex too). It
// prints both wall times, their ratio (ideally at most K: K fixed parts and K times the
// points) and the time of the synthesis alone (computed again on the finished file).

#include "cases/input/case_reader.hpp"
#include "cases/output/hdf5_file.hpp"
#include "cases/scene/scene_builder.hpp"
#include "cases/sweep/sweep_runner.hpp"
#include "cases/sweep/waveform_synthesis.hpp"
#include "geometry/input_error.hpp"
#include "geometry/triangle_distance.hpp"
#include "solver/coupled_solve.hpp"
#include "solver/dipole_path.hpp"

#include <omp.h>
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <cstdlib>
#include <cstdio>
#include <filesystem>
#include <string>
#include <vector>

using namespace murk;

namespace {

struct Perturbations {
    std::vector<std::size_t> shape;  // nu, nv, sensors
    std::vector<double> values;
    std::vector<double> position;    // nu, nv, 3
    std::vector<std::uint8_t> status;
};

Perturbations read_perturbations(const std::string& path) {
    const H5File file = H5File::open_readonly(path);
    const H5Group root = file.root();
    Perturbations p;
    const auto values = root.read<double>("sweep/perturbation");
    p.shape.assign(values.shape.begin(), values.shape.end());
    p.values = values.values;
    p.position = root.read<double>("sweep/object_position").values;
    p.status = root.read<std::uint8_t>("sweep/status").values;
    return p;
}

double per_point(const RunStats& s) {
    const std::size_t points = s.exact_points + s.dipole_points + s.full_points;
    return (s.wall_seconds - s.setup_seconds - s.check_seconds) / double(points);
}

RunStats run(const CaseSpec& spec, const std::string& output) {
    RunOptions options;
    options.output_path = output;
    options.command_line = "murk-bench";
    options.force = true;
    options.quiet = true;
    RunStats stats;
    run_sweep(spec, options, &stats);
    return stats;
}

// The waveform of K harmonics against one frequency (see the top of this file).
int harmonics_bench(CaseSpec spec, int harmonics, const std::filesystem::path& dir) {
    using Clock = std::chrono::steady_clock;
    const double fundamental = 500.0;
    spec.fish->skin_capacitance_F_per_m2 = 1e-2;  // invented; makes both runs complex
    spec.sweep->method = SweepMethod::exact;
    SweepGridSpec& grid = *spec.sweep->grid;
    std::vector<double> u, v;
    for (std::size_t k = 0; k < 10; ++k) u.push_back(grid.u_m[k * grid.u_m.size() / 10]);
    for (std::size_t k = 0; k < 4; ++k) v.push_back(grid.v_m[k * grid.v_m.size() / 4]);
    grid.u_m = u, grid.v_m = v;
    CaseSpec one = spec;
    one.frequency_Hz = fundamental;
    CaseSpec wave = spec;
    WaveformSpec w;
    w.fundamental_Hz = fundamental;
    for (int n = 1; n <= harmonics; ++n) w.harmonics.push_back({n, 1.0 / n, 0.0, 0.5 / (double(n) * n)});
    w.energy_fraction = 1e-12;
    w.synthesis_samples = std::max(64, 4 * harmonics);
    w.synthesize_all = true;
    wave.waveform = w;
    std::printf("murk-bench --harmonics %d: %zu positions, exact path, %d threads\n", harmonics, u.size() * v.size(),
                omp_get_max_threads());
    std::fflush(stdout);
    const RunStats t_one = run(one, (dir / "one.h5").string());
    const RunStats t_wave = run(wave, (dir / "wave.h5").string());
    // The synthesis alone, again on the finished file.
    double synthesis_seconds = 0;
    {
        const H5File file = H5File::open_readwrite((dir / "wave.h5").string());
        const H5Group root = file.root();
        const H5Group sweep = root.open_group("sweep");
        for (const char* name : {"fundamental_amplitude", "fundamental_phase", "fundamental_phase_shift",
                                 "peak_ratio_change", "waveform_position", "time", "waveform_perturbation"})
            sweep.remove(name);
        const auto t0 = Clock::now();
        SweepSpec with_frequency = *wave.sweep;
        for (int n = 1; n <= harmonics; ++n) with_frequency.frequency_Hz.push_back(n * fundamental);
        write_waveform_synthesis(root, sweep_axes(with_frequency));
        synthesis_seconds = std::chrono::duration<double>(Clock::now() - t0).count();
    }
    std::filesystem::remove_all(dir);
    std::printf("one frequency: %zu points, wall %.2f s (body %.2f s)\n", t_one.exact_points + t_one.full_points,
                t_one.wall_seconds, t_one.assembly_seconds + t_one.factor_seconds);
    std::printf("%d harmonics:  %zu points, wall %.2f s (bodies %.2f s), synthesis alone %.3f s\n", harmonics,
                t_wave.exact_points + t_wave.full_points, t_wave.wall_seconds,
                t_wave.assembly_seconds + t_wave.factor_seconds, synthesis_seconds);
    std::printf("harmonics: ratio %.2f for K = %d (goal: at most K plus the synthesis)\n",
                t_wave.wall_seconds / t_one.wall_seconds, harmonics);
    return 0;
}

}  // namespace

int main(int argc, char** argv) {
    try {
        if (argc > 2 && std::string(argv[1]) == "--harmonics") {
            const int k = std::atoi(argv[2]);
            if (k < 1 || k > 64) {
                std::fprintf(stderr, "murk-bench: --harmonics needs a count from 1 to 64\n");
                return 2;
            }
            const std::string path = argc > 3 ? argv[3] : std::string(MURK_SOURCE_DIR) + "/tools/bench/fish_grid.toml";
            const CaseSpec spec = read_case_file(path);
            if (!spec.sweep || !spec.sweep->grid || !spec.fish) {
                std::fprintf(stderr, "murk-bench: %s: needs a fish and a [sweep.grid]\n", path.c_str());
                return 2;
            }
            const std::filesystem::path dir = std::filesystem::temp_directory_path() /
                                              ("murk-bench-" + std::to_string(::getpid()));
            std::filesystem::create_directories(dir);
            return harmonics_bench(spec, k, dir);
        }
        const std::string case_path = argc > 1 ? argv[1] : std::string(MURK_SOURCE_DIR) + "/tools/bench/fish_grid.toml";
        const CaseSpec spec = read_case_file(case_path);
        if (!spec.sweep || !spec.sweep->grid || !spec.fish || spec.objects.size() != 1 ||
            spec.objects[0].shape.kind != ShapeKind::sphere) {
            std::fprintf(stderr, "murk-bench: %s: needs a fish, one sphere and a [sweep.grid]\n", case_path.c_str());
            return 2;
        }
        const std::filesystem::path dir = std::filesystem::temp_directory_path() /
                                          ("murk-bench-" + std::to_string(::getpid()));
        std::filesystem::create_directories(dir);
        const SweepGridSpec& grid = *spec.sweep->grid;
        const std::size_t nu = grid.u_m.size(), nv = grid.v_m.size();
        const Scene<double> body = build_scene<double>(spec, false);
        const Scene<double> with_object = build_scene<double>(spec, true);
        const double radius = spec.objects[0].shape.radius_m;
        std::printf("murk-bench: case %s\n", case_path.c_str());
        std::printf("  body %zu skin panels (%zu unknowns), sphere of radius %.2g m with %zu panels, grid %zu x %zu = %zu "
                    "positions, %d threads\n",
                    body.surfaces[0].mesh.size(), 2 * body.surfaces[0].mesh.size(), radius,
                    with_object.surfaces[1].mesh.size(), nu, nv, nu * nv, omp_get_max_threads());

        // naive: a 3 x 3 subset of the grid, from near the body to far from it
        const std::vector<std::size_t> iu = {nu / 6, nu / 2, 5 * nu / 6}, iv = {0, nv / 4, 3 * nv / 4};
        CaseSpec naive = spec;
        naive.sweep->method = SweepMethod::full;
        naive.sweep->grid->u_m.clear(), naive.sweep->grid->v_m.clear();
        for (std::size_t i : iu) naive.sweep->grid->u_m.push_back(grid.u_m[i]);
        for (std::size_t j : iv) naive.sweep->grid->v_m.push_back(grid.v_m[j]);
        std::printf("running the naive full re-solve on %zu points ...\n", iu.size() * iv.size());
        std::fflush(stdout);
        const RunStats t_naive = run(naive, (dir / "naive.h5").string());
        std::printf("running the exact path on the whole grid ...\n");
        std::fflush(stdout);
        CaseSpec exact = spec;
        exact.sweep->method = SweepMethod::exact;
        const RunStats t_exact = run(exact, (dir / "exact.h5").string());
        std::printf("running the dipole path on the whole grid ...\n");
        std::fflush(stdout);
        CaseSpec dipole = spec;
        dipole.sweep->method = SweepMethod::dipole;
        dipole.sweep->dipole_checks = 0;
        const RunStats t_dipole = run(dipole, (dir / "dipole.h5").string());

        const Perturbations p_naive = read_perturbations((dir / "naive.h5").string());
        const Perturbations p_exact = read_perturbations((dir / "exact.h5").string());
        const Perturbations p_dipole = read_perturbations((dir / "dipole.h5").string());
        const std::size_t sensors = p_naive.shape[2];
        const TriangleMesh& skin = body.surfaces[0].mesh;
        double exact_diff = 0, dipole_diff = 0;
        std::size_t common = 0, far = 0;
        for (std::size_t a = 0; a < iu.size(); ++a)
            for (std::size_t b = 0; b < iv.size(); ++b) {
                const std::size_t n = a * iv.size() + b, g = iu[a] * nv + iv[b];
                if (p_naive.status[n] != 1) continue;  // masked: the sphere would touch the body
                ++common;
                double size = 0, de = 0, dd = 0;
                for (std::size_t k = 0; k < sensors; ++k) {
                    const double ref = p_naive.values[n * sensors + k];
                    size = std::max(size, std::abs(ref));
                    de = std::max(de, std::abs(p_exact.values[g * sensors + k] - ref));
                    dd = std::max(dd, std::abs(p_dipole.values[g * sensors + k] - ref));
                }
                exact_diff = std::max(exact_diff, de / size);
                const Vec3 centre(p_naive.position[3 * n], p_naive.position[3 * n + 1], p_naive.position[3 * n + 2]);
                double distance = INFINITY;
                for (std::size_t t = 0; t < skin.size(); ++t)
                    distance = std::min(distance, point_triangle_distance(centre, skin.corner(t, 0), skin.corner(t, 1),
                                                                          skin.corner(t, 2)));
                std::printf("  point (%.3f, %.3f) m: centre %.1f radii from the skin, exact %.2e, dipole %.2e\n",
                            centre.x(), centre.y(), distance / radius, de / size, dd / size);
                if (distance >= 5 * radius) dipole_diff = std::max(dipole_diff, dd / size), ++far;
            }
        std::filesystem::remove_all(dir);

        // Exact path: GMRES coupling against the Schur complement's blocked solve.
        const QuadratureOptions quad = quadrature_options(spec);
        const FixedPart<double> fixed(body, quad, solver_options(spec));
        using Clock = std::chrono::steady_clock;
        auto seconds = [](Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); };
        const MovingBlock<double> moving = factor_moving_block(with_object, {1}, quad);
        (void)solve_coupled(with_object, {1}, fixed, moving, quad, CouplingOptions{});  // warm the buffers
        auto t0 = Clock::now();
        const CoupledSolution<double> coupled = solve_coupled(with_object, {1}, fixed, moving, quad, CouplingOptions{});
        const double gmres_seconds = seconds(t0);
        const SystemLayout layout = system_layout(with_object);
        const std::vector<Eigen::Index> object_unknowns = part_unknowns(with_object, layout, {1});
        const std::vector<Eigen::Index> body_unknowns = part_unknowns(with_object, layout, {0});
        const Eigen::MatrixXd c_fm = assemble_block(with_object, layout, quad, body_unknowns, object_unknowns).matrix;
        t0 = Clock::now();
        const Eigen::MatrixXd schur_solve = fixed.solve(c_fm);  // A_FF^-1 C_FM: the Schur complement's main cost
        const double schur_seconds = seconds(t0);

        // Dipole readout: blocked solve against lead fields, 4 skin panels as sensors.
        std::vector<PointDipole<double>> dipoles;
        for (std::size_t k = 0; k < 32; ++k)
            dipoles.push_back({Vec3(-0.06 + 0.004 * double(k), 0.03, 0.0), Vec3(1e-9, 2e-9, 0.0)});
        t0 = Clock::now();
        const Eigen::MatrixXd blocked = unknowns_with_dipoles(fixed, dipoles);
        const double blocked_point = seconds(t0) / double(dipoles.size());
        Eigen::MatrixXd readout = Eigen::MatrixXd::Zero(4, fixed.size());
        const Surface<double>& skin_surface = body.surfaces[0];
        const auto& block = fixed.layout().surfaces[0];
        for (Eigen::Index k = 0; k < 4; ++k)  // transdermal voltage = rho_s sigma_w q of a panel
            readout(k, block.offset + block.panels + k * 700) =
                skin_surface.membrane_resistance * body.water_conductivity;
        t0 = Clock::now();
        const LeadFields<double> lead(fixed, readout);
        const double lead_setup = seconds(t0);
        t0 = Clock::now();
        const Eigen::MatrixXd change = lead.readings_change(dipoles);
        const double lead_point = seconds(t0) / double(dipoles.size());
        double agreement = 0;
        const Eigen::MatrixXd through_solve = readout * (blocked.colwise() - fixed.unknowns());
        agreement = (change - through_solve).cwiseAbs().maxCoeff() / through_solve.cwiseAbs().maxCoeff();

        const double naive_point = per_point(t_naive), exact_point = per_point(t_exact), dipole_point = per_point(t_dipole);
        std::printf("body (once per run): assembly %.2f s, factorization %.2f s, factors %.0f MiB\n",
                    t_exact.assembly_seconds, t_exact.factor_seconds, t_exact.factor_bytes / 1048576.0);
        std::printf("naive:  %zu points, %.3f s per point (set-up %.2f s)\n", t_naive.full_points, naive_point,
                    t_naive.setup_seconds);
        std::printf("exact:  %zu points, %.4f s per point (set-up %.2f s, %zu fell back on the full solve), "
                    "whole grid %.1f s, peak memory %.0f MiB\n",
                    t_exact.exact_points + t_exact.full_points, exact_point, t_exact.setup_seconds,
                    std::size_t(t_exact.fallbacks), t_exact.wall_seconds, t_exact.peak_memory_MiB);
        std::printf("dipole: %zu points, %.5f s per point (set-up %.2f s), whole map %.1f s including the body "
                    "factorization, peak memory %.0f MiB\n",
                    t_dipole.dipole_points, dipole_point, t_dipole.setup_seconds, t_dipole.wall_seconds,
                    t_dipole.peak_memory_MiB);
        std::printf("exact coupling at one point: GMRES %d iterations, %.3f s in all; the Schur complement's "
                    "A^-1 C alone (%ld right-hand sides) %.3f s\n",
                    coupled.gmres.iterations, gmres_seconds, long(schur_solve.cols()), schur_seconds);
        std::printf("dipole readout, 32 points: blocked solve %.3f ms per point; lead fields for 4 sensors %.4f ms per "
                    "point after %.2f s of set-up (agree to %.1g)\n",
                    1e3 * blocked_point, 1e3 * lead_point, lead_setup, agreement);
        std::printf("differences on %zu common points (%zu at least 5 radii from the skin)\n", common, far);
        std::printf("exact: speedup %.0f x over naive, max relative difference %.2g\n", naive_point / exact_point,
                    exact_diff);
        std::printf("dipole: speedup %.0f x over naive, max relative difference %.2g\n", naive_point / dipole_point,
                    dipole_diff);
        return 0;
    } catch (const InputError& e) {
        std::fprintf(stderr, "murk-bench: %s\n", e.what());
        return 2;
    } catch (const std::exception& e) {
        std::fprintf(stderr, "murk-bench: %s\n", e.what());
        return 1;
    }
}
