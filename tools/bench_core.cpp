// murk-bench-core: speed of the solver core, printed as tables (it asserts nothing;
// performance goals are read from its output, never from a timed test).
//
//   1. cost per panel pair of each panel-integral kernel on one core, and of the
//      whole layer-block assembly with the default quadrature switches against the
//      naive way (every pair in closed form);
//   2. system assembly and dense LU for about 1k, 2k, 4k and 8k unknowns, real and
//      complex;
//   3. Eigen's PartialPivLU (what solve_dense uses) against OpenBLAS through
//      LAPACKE getrf on the same matrices, with the residuals of both solutions,
//      on all threads and (3b) on one thread each;
//   4. a summary.
//
// Every figure is a median of a few repetitions. The machine may be shared with
// other builds, so the load average is read before and after each part and printed.
//
// Usage: murk-bench-core [--quick | --full]
//   --quick  LU at 1k and 2k unknowns only (a smoke run)
//   --full   also complex LU at 8k unknowns (adds about a minute)

// GCC 12 reports a false "may be used uninitialized" inside Eigen's AVX-512 GEMM
// packing (_mm256_undefined_pd in gemm_pack_rhs), instantiated here by the dense LU.
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"

#include "geometry/eigen_core.hpp"
#include "geometry/shapes.hpp"
#include "solver/bem_system.hpp"
#include "solver/layer_blocks.hpp"
#include "solver/panel_set.hpp"
#include "solver/quadrature_options.hpp"
#include "solver/triangle_integrals.hpp"
#include "solver/triangle_rules.hpp"

#include <Eigen/LU>
#include <omp.h>
#include <sys/resource.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <complex>
#include <cstdio>
#include <cstring>
#include <fstream>
#include <string>
#include <thread>
#include <type_traits>
#include <vector>

#ifdef MURK_BENCH_LAPACKE
#include <lapacke.h>
extern "C" {
// OpenBLAS's own queries (declared in its cblas.h, which Debian may point elsewhere).
int openblas_get_num_threads(void);
void openblas_set_num_threads(int threads);
char* openblas_get_config(void);
char* openblas_get_corename(void);
}
#endif

using namespace murk;

namespace {

using Clock = std::chrono::steady_clock;

double seconds_between(Clock::time_point a, Clock::time_point b) {
    return std::chrono::duration<double>(b - a).count();
}

double median(std::vector<double> v) {
    std::sort(v.begin(), v.end());
    const std::size_t m = v.size() / 2;
    return v.size() % 2 ? v[m] : 0.5 * (v[m - 1] + v[m]);
}

// ---------------------------------------------------------------- machine load

std::vector<double> g_load_samples;  // 1-minute load averages seen during the run

double read_load_1min(std::string* line = nullptr) {
    std::ifstream in("/proc/loadavg");
    std::string text;
    std::getline(in, text);
    if (line) *line = text;
    double one = 0.0;
    std::sscanf(text.c_str(), "%lf", &one);
    g_load_samples.push_back(one);
    return one;
}

// CPU seconds (all cores) spent busy by the whole machine, from /proc/stat, and by
// this process (all its threads). Their difference over an interval is what other
// processes took: a direct reading of sharing, unlike the lagging load average.
struct CpuSample {
    double machine_busy = 0, machine_total = 0, own = 0;
};

CpuSample sample_cpu() {
    CpuSample c;
    std::ifstream in("/proc/stat");
    std::string cpu;
    double user = 0, nice = 0, system = 0, idle = 0, iowait = 0, irq = 0, softirq = 0, steal = 0;
    in >> cpu >> user >> nice >> system >> idle >> iowait >> irq >> softirq >> steal;
    const double tick = static_cast<double>(sysconf(_SC_CLK_TCK));
    c.machine_busy = (user + nice + system + irq + softirq + steal) / tick;
    c.machine_total = c.machine_busy + (idle + iowait) / tick;
    rusage usage{};
    getrusage(RUSAGE_SELF, &usage);
    c.own = usage.ru_utime.tv_sec + usage.ru_stime.tv_sec + 1e-6 * (usage.ru_utime.tv_usec + usage.ru_stime.tv_usec);
    return c;
}

CpuSample g_last_cpu;
std::vector<double> g_other_share;  // fraction of all cores used by other processes, per part
const Clock::time_point g_start = Clock::now();

// Once the benchmark runs, the load average counts its own two threads as well, so
// only the first reading is judged by it; later ones are judged by what the other
// processes took (more than a quarter of all cores, i.e. half a core here).
constexpr double kSharedLoad = 1.5, kSharedOtherShare = 0.25;

void print_load(const char* when) {
    std::string line;
    const double one = read_load_1min(&line);
    const bool first = g_last_cpu.machine_total == 0;
    std::printf("load average (/proc/loadavg, 1/5/15 min, runnable/total, last pid) %s: %s%s\n", when,
                line.c_str(),
                first ? (one > kSharedLoad ? "   -> machine shared (1-min load > 1.5)" : "   -> quiet (<= 1.5)")
                      : "   (includes this benchmark's own threads)");
    const CpuSample now = sample_cpu();
    if (g_last_cpu.machine_total > 0) {
        const double span = now.machine_total - g_last_cpu.machine_total;
        const double others = (now.machine_busy - g_last_cpu.machine_busy) - (now.own - g_last_cpu.own);
        const double share = span > 0 ? std::max(0.0, others / span) : 0.0;
        g_other_share.push_back(share);
        std::printf("other processes used %.0f %% of all cores since the previous reading (/proc/stat), "
                    "%.0f s into the run%s\n",
                    100.0 * share, seconds_between(g_start, Clock::now()),
                    share > kSharedOtherShare ? "   -> machine shared" : "");
    }
    g_last_cpu = now;
}

// Worker threads of OpenBLAS keep spinning for a while after a call returns (about
// 0.1 s), and libgomp's for a shorter while; a pause before each timed run of a
// parallel code keeps one back end's idle spinners from stealing a core from the next.
void settle(int ms = 100) { std::this_thread::sleep_for(std::chrono::milliseconds(ms)); }

volatile double g_sink = 0.0;  // keeps the kernels' results observable

// ---------------------------------------------------------------- part 1: kernels

constexpr double kInvFourPi = 1.0 / (4.0 * M_PI);

// Each kernel loop below visits pairs the way layer_blocks.cpp does: source panel
// k outer, targets i inner, results stored into one column. Returns a checksum.

double loop_closed_single(const PanelSet& ps, std::vector<double>& col) {
    const Eigen::Index n = ps.size();
    double check = 0.0;
    for (Eigen::Index k = 0; k < n; ++k) {
        const Vec3 a = ps.p0.col(k), b = ps.p1.col(k), c = ps.p2.col(k);
        for (Eigen::Index i = 0; i < n; ++i) {
            if (i == k) continue;
            col[i] = single_layer_triangle(ps.centroid.col(i), a, b, c);
        }
        check += col[(k + 1) % n];
    }
    return check;
}

double loop_closed_double(const PanelSet& ps, std::vector<double>& col) {
    const Eigen::Index n = ps.size();
    double check = 0.0;
    for (Eigen::Index k = 0; k < n; ++k) {
        const Vec3 a = ps.p0.col(k), b = ps.p1.col(k), c = ps.p2.col(k);
        for (Eigen::Index i = 0; i < n; ++i) {
            if (i == k) continue;
            col[i] = double_layer_triangle(ps.centroid.col(i), a, b, c);
        }
        check += col[(k + 1) % n];
    }
    return check;
}

double loop_closed_both(const PanelSet& ps, std::vector<double>& s, std::vector<double>& d) {
    const Eigen::Index n = ps.size();
    double check = 0.0;
    for (Eigen::Index k = 0; k < n; ++k) {
        const Vec3 a = ps.p0.col(k), b = ps.p1.col(k), c = ps.p2.col(k);
        for (Eigen::Index i = 0; i < n; ++i) {
            if (i == k) continue;
            const Vec3 x = ps.centroid.col(i);
            s[i] = single_layer_triangle(x, a, b, c);
            d[i] = double_layer_triangle(x, a, b, c);
        }
        check += s[(k + 1) % n] + d[(k + 1) % n];
    }
    return check;
}

// 7-point Radon rule for both layers, written as the middle band of layer_blocks.cpp
// (quadrature points recomputed per target).
double loop_radon_both(const PanelSet& ps, std::vector<double>& s_out, std::vector<double>& d_out) {
    const Eigen::Index n = ps.size();
    double check = 0.0;
    for (Eigen::Index k = 0; k < n; ++k) {
        const Vec3 p0 = ps.p0.col(k), p1 = ps.p1.col(k), p2 = ps.p2.col(k);
        const Vec3 nk = ps.normal.col(k);
        for (Eigen::Index i = 0; i < n; ++i) {
            if (i == k) continue;
            const LayerValues v = radon7_layers(ps.centroid.col(i), p0, p1, p2, nk, ps.area(k));
            s_out[i] = v.single;
            d_out[i] = v.dbl;
        }
        check += s_out[(k + 1) % n] + d_out[(k + 1) % n];
    }
    return check;
}

// Centroid rule for both layers, the branch-free loop of layer_blocks.cpp that the
// compiler vectorizes (it runs over every target, the panel's own centroid included).
double loop_centroid_both(const PanelSet& ps, std::vector<double>& s, std::vector<double>& d) {
    const Eigen::Index n = ps.size();
    const double* t = ps.centroid.data();
    double check = 0.0;
    for (Eigen::Index k = 0; k < n; ++k) {
        const double cx = ps.centroid(0, k), cy = ps.centroid(1, k), cz = ps.centroid(2, k);
        const double nx = ps.normal(0, k), ny = ps.normal(1, k), nz = ps.normal(2, k);
        const double a = ps.area(k) * kInvFourPi;
        double* sp = s.data();
        double* dp = d.data();
        for (Eigen::Index i = 0; i < n; ++i) {
            const double dx = t[3 * i] - cx, dy = t[3 * i + 1] - cy, dz = t[3 * i + 2] - cz;
            const double inv_r = 1.0 / std::sqrt(dx * dx + dy * dy + dz * dz);
            sp[i] = a * inv_r;
            dp[i] = a * (nx * dx + ny * dy + nz * dz) * inv_r * inv_r * inv_r;
        }
        check += s[(k + 1) % n] + d[(k + 1) % n];
    }
    return check;
}

// Median time of one call of f, in seconds: f is repeated within each timed
// repetition until the repetition lasts at least min_seconds.
template <class F>
double median_call_seconds(F&& f, int reps, double min_seconds) {
    auto t0 = Clock::now();
    g_sink = g_sink + f();  // warm-up, and a first estimate
    const double once = std::max(1e-9, seconds_between(t0, Clock::now()));
    const int calls = std::max(1, static_cast<int>(std::ceil(min_seconds / once)));
    std::vector<double> t;
    for (int r = 0; r < reps; ++r) {
        t0 = Clock::now();
        for (int c = 0; c < calls; ++c) g_sink = g_sink + f();
        t.push_back(seconds_between(t0, Clock::now()) / calls);
    }
    return median(t);
}

struct KernelFigures {
    double single_ns = 0, double_ns = 0, both_ns = 0, radon_ns = 0, centroid_ns = 0;
};

struct AssemblyFigures {
    int level = 0;
    Eigen::Index panels = 0;
    int threads = 0;
    double default_ns = 0, naive_ns = 0, default_ms = 0, naive_ms = 0;
};

// Every pair (target = centroid i, source panel k != i) of a mesh, classified as the
// default QuadratureOptions would: distance to the source centroid / source diameter.
void describe_pairs(const PanelSet& ps, const QuadratureOptions& opt) {
    const Eigen::Index n = ps.size();
    std::vector<double> ratio;
    ratio.reserve(static_cast<std::size_t>(n * (n - 1)));
    long near = 0, mid = 0, far = 0;
    for (Eigen::Index k = 0; k < n; ++k)
        for (Eigen::Index i = 0; i < n; ++i) {
            if (i == k) continue;
            const double r = (ps.centroid.col(i) - ps.centroid.col(k)).norm() / ps.diameter(k);
            ratio.push_back(r);
            if (r < opt.near_ratio) ++near;
            else if (r < opt.far_ratio) ++mid;
            else ++far;
        }
    const double total = static_cast<double>(ratio.size());
    const double lo = *std::min_element(ratio.begin(), ratio.end());
    const double hi = *std::max_element(ratio.begin(), ratio.end());
    const double med = median(ratio);
    std::printf("  pairs: %.0f (every panel centroid against every other panel)\n", total);
    std::printf("  distance / panel diameter: min %.2f, median %.1f, max %.1f\n", lo, med, hi);
    std::printf("  with the default switches (near_ratio %.0f, far_ratio %.0f): closed form %.2f %%, "
                "Radon %.2f %%, centroid %.2f %% of pairs\n",
                opt.near_ratio, opt.far_ratio, 100.0 * near / total, 100.0 * mid / total, 100.0 * far / total);
}

KernelFigures bench_kernels() {
    const double radius = 0.01;
    const TriangleMesh mesh = make_icosphere(radius, 3);
    const PanelSet ps(mesh);
    const Eigen::Index n = ps.size();
    std::printf("\n== 1a. Panel-integral kernels, cost per panel pair (one core) ==\n");
    std::printf("  geometry: icosphere, radius %.0f mm, subdivision level 3, %ld panels, "
                "mean panel diameter %.2f mm\n",
                radius * 1e3, static_cast<long>(n), ps.diameter.mean() * 1e3);
    describe_pairs(ps, QuadratureOptions{});
    const double pairs = static_cast<double>(n) * (n - 1);
    const double all_pairs = static_cast<double>(n) * n;  // the centroid loop includes i == k
    std::vector<double> s(n), d(n);
    const int reps = 5;
    const double min_s = 0.2;
    KernelFigures f;
    f.single_ns = 1e9 / pairs * median_call_seconds([&] { return loop_closed_single(ps, s); }, reps, min_s);
    f.double_ns = 1e9 / pairs * median_call_seconds([&] { return loop_closed_double(ps, d); }, reps, min_s);
    f.both_ns = 1e9 / pairs * median_call_seconds([&] { return loop_closed_both(ps, s, d); }, reps, min_s);
    f.radon_ns = 1e9 / pairs * median_call_seconds([&] { return loop_radon_both(ps, s, d); }, reps, min_s);
    f.centroid_ns =
        1e9 / all_pairs * median_call_seconds([&] { return loop_centroid_both(ps, s, d); }, reps, min_s);

    std::printf("  median of %d repetitions of >= %.1f s each; 'both' = single and double layer of one pair\n\n",
                reps, min_s);
    std::printf("  %-58s %12s %22s\n", "kernel", "ns per pair", "speed vs closed both");
    auto row = [&](const char* name, double ns, bool ratio) {
        if (ratio) std::printf("  %-58s %12.2f %21.1fx\n", name, ns, f.both_ns / ns);
        else std::printf("  %-58s %12.2f %22s\n", name, ns, "");
    };
    row("closed-form single layer (single_layer_triangle)", f.single_ns, false);
    row("closed-form double layer (double_layer_triangle)", f.double_ns, false);
    row("closed-form both (what a near pair costs)", f.both_ns, true);
    row("7-point Radon rule, both (as in layer_blocks.cpp)", f.radon_ns, true);
    row("centroid rule, both (vectorized loop over targets)", f.centroid_ns, true);
    return f;
}

std::vector<AssemblyFigures> bench_layer_blocks() {
    std::printf("\n== 1b. assemble_layer_blocks on a sphere (collocation: targets = own centroids) ==\n");
    std::printf("  effective cost = wall time / (panels^2); default QuadratureOptions vs. the naive way, every pair\n"
                "  in closed form (near_ratio = far_ratio = 1e9: both must be huge, since the far test comes first)\n");
    std::printf("  median of 3 repetitions\n\n");
    QuadratureOptions naive;
    naive.near_ratio = 1e9;
    naive.far_ratio = 1e9;
    const QuadratureOptions standard;
    const int max_threads = omp_get_max_threads();
    std::vector<AssemblyFigures> out;
    std::printf("  %-24s %8s %13s %15s %14s %16s %14s\n", "mesh", "threads", "default ms", "default ns/pair",
                "closed-form ms", "closed ns/pair", "naive/default");
    for (int level : {3, 4}) {
        const TriangleMesh mesh = make_icosphere(0.01, level);
        const PanelSet ps(mesh);
        const Eigen::Index n = ps.size();
        const double pairs = static_cast<double>(n) * n;
        Eigen::MatrixXd single, dbl;
        // One thread and all threads on the small mesh; all threads only on the large
        // one, whose naive run takes seconds.
        std::vector<int> thread_counts{max_threads};
        if (level == 3 && max_threads > 1) thread_counts.insert(thread_counts.begin(), 1);
        for (int threads : thread_counts) {
            omp_set_num_threads(threads);
            auto time_it = [&](const QuadratureOptions& opt) {
                std::vector<double> t;
                for (int r = 0; r < 3; ++r) {
                    settle();
                    const auto t0 = Clock::now();
                    assemble_layer_blocks(ps.centroid, ps, opt, true, single, dbl);
                    t.push_back(seconds_between(t0, Clock::now()));
                    g_sink = g_sink + single(0, n - 1) + dbl(n - 1, 0);
                }
                return median(t);
            };
            AssemblyFigures a;
            a.level = level;
            a.panels = n;
            a.threads = threads;
            const double t_default = time_it(standard);
            const double t_naive = time_it(naive);
            a.default_ms = 1e3 * t_default;
            a.naive_ms = 1e3 * t_naive;
            a.default_ns = 1e9 * t_default / pairs;
            a.naive_ns = 1e9 * t_naive / pairs;
            char name[64];
            std::snprintf(name, sizeof name, "icosphere L%d, %ld panels", level, static_cast<long>(n));
            std::printf("  %-24s %8d %13.1f %15.2f %14.1f %16.2f %13.1fx\n", name, threads, a.default_ms,
                        a.default_ns, a.naive_ms, a.naive_ns, t_naive / t_default);
            out.push_back(a);
        }
    }
    omp_set_num_threads(max_threads);
    return out;
}

// ---------------------------------------------------------------- part 2/3: systems and LU

template <class S>
S conductivity(double re, double im) {
    if constexpr (std::is_same_v<S, double>) {
        (void)im;
        return re;
    } else {
        return S(re, im);
    }
}

template <class S>
const char* scalar_name() {
    return std::is_same_v<S, double> ? "double" : "complex";
}

// Real flops of an LU with partial pivoting, leading term: 2/3 n^3 real, 8/3 n^3
// complex (a complex multiply-add is 8 real flops).
template <class S>
double lu_flops(Eigen::Index n) {
    const double c = std::is_same_v<S, double> ? 2.0 / 3.0 : 8.0 / 3.0;
    return c * static_cast<double>(n) * n * n;
}

// A contact sphere (an object in water: 2 unknowns per panel) meshed as a
// latitude/longitude sphere (make_capsule with zero cylinder), whose panel count
// can be steered more finely than the icosphere's factors of 4. Returns the mesh
// whose unknown count is closest to `unknowns`.
TriangleMesh sphere_near(double radius, Eigen::Index unknowns) {
    TriangleMesh best;
    double best_gap = 1e300;
    for (double edge = radius; edge > radius / 200; edge *= 0.985) {
        TriangleMesh m = make_capsule(radius, 0.0, edge);
        const double count = 2.0 * static_cast<double>(m.size());
        const double gap = std::abs(count - static_cast<double>(unknowns));
        if (gap < best_gap) {
            best_gap = gap;
            best = std::move(m);
        }
        if (count > 1.3 * static_cast<double>(unknowns)) break;  // finer meshes only get farther
    }
    return best;
}

template <class S>
Scene<S> contact_sphere_scene(const TriangleMesh& mesh, double radius) {
    Scene<S> scene;
    // Fresh water (100 uS/cm) around a tissue-like sphere; the complex case adds
    // displacement currents at about 10 kHz (invented demo values).
    scene.water_conductivity = conductivity<S>(0.01, 4.4e-5);
    Surface<S> surface;
    surface.mesh = mesh;
    surface.mesh.name = "sphere";
    surface.kind = InterfaceKind::contact;
    surface.inner_conductivity = conductivity<S>(0.3, 0.1);
    scene.surfaces.push_back(std::move(surface));
    PointSource<S> source;
    source.position = Vec3(3.0 * radius, 0.0, 0.0);
    source.current = conductivity<S>(1e-6, 0.0);
    scene.sources.push_back(source);
    return scene;
}

#ifdef MURK_BENCH_LAPACKE
// std::complex<double> and LAPACKE's C99 complex are both two doubles, real first
// (the C++ standard guarantees this array layout for std::complex).
lapack_complex_double* as_lapack(std::complex<double>* z) { return reinterpret_cast<lapack_complex_double*>(z); }
const lapack_complex_double* as_lapack(const std::complex<double>* z) {
    return reinterpret_cast<const lapack_complex_double*>(z);
}

lapack_int lapacke_getrf(Eigen::Index n, double* a, lapack_int* ipiv) {
    const auto m = static_cast<lapack_int>(n);
    return LAPACKE_dgetrf(LAPACK_COL_MAJOR, m, m, a, m, ipiv);
}
lapack_int lapacke_getrf(Eigen::Index n, std::complex<double>* a, lapack_int* ipiv) {
    const auto m = static_cast<lapack_int>(n);
    return LAPACKE_zgetrf(LAPACK_COL_MAJOR, m, m, as_lapack(a), m, ipiv);
}
lapack_int lapacke_getrs(Eigen::Index n, const double* a, const lapack_int* ipiv, double* b) {
    const auto m = static_cast<lapack_int>(n);
    return LAPACKE_dgetrs(LAPACK_COL_MAJOR, 'N', m, 1, a, m, ipiv, b, m);
}
lapack_int lapacke_getrs(Eigen::Index n, const std::complex<double>* a, const lapack_int* ipiv,
                         std::complex<double>* b) {
    const auto m = static_cast<lapack_int>(n);
    return LAPACKE_zgetrs(LAPACK_COL_MAJOR, 'N', m, 1, as_lapack(a), m, ipiv, as_lapack(b), m);
}
#endif

struct SizeFigures {
    const char* scalar = "";
    Eigen::Index panels = 0, n = 0;
    int reps = 0;
    double assemble_s = 0, blocks_s = 0, zero_s = 0;
    double eigen_s = 0, eigen_min_s = 0, eigen_max_s = 0;
    double solve_dense_s = 0;
    double blas_s = 0, blas_min_s = 0, blas_max_s = 0;  // 0 when OpenBLAS is absent
    double resid_eigen = 0, resid_blas = 0, solution_diff = 0;
    double flops = 0;
};

// ||A x - b|| / (||A||_F ||x||): of order n * 1e-16 for a backward-stable solve.
template <class S>
double relative_residual(const MatrixX<S>& a, const VectorX<S>& x, const VectorX<S>& b) {
    return (a * x - b).norm() / (a.norm() * x.norm());
}

// Work buffer for the factorizations, allocated and touched once (first touch of
// fresh memory is slow in these VMs) and reused by every size.
template <class S>
std::vector<S>& work_buffer(Eigen::Index n) {
    static std::vector<S> buffer;
    const auto need = static_cast<std::size_t>(n * n);
    if (buffer.size() < need) buffer.assign(need, S(0));
    return buffer;
}

// Times of Eigen's PartialPivLU and of LAPACKE getrf on copies of sys.matrix, and the
// solutions of each (from the last repetition made).
template <class S>
struct LuRuns {
    std::vector<double> eigen, blas;  // seconds per factorization; blas empty without OpenBLAS
    VectorX<S> x_eigen, x_blas;
};

template <class S>
LuRuns<S> time_lu(const LinearSystem<S>& sys, int reps, double budget_s) {
    const Eigen::Index n = sys.matrix.rows();
    std::vector<S>& buffer = work_buffer<S>(n);
    Eigen::Map<MatrixX<S>> work(buffer.data(), n, n);
    LuRuns<S> runs;
#ifdef MURK_BENCH_LAPACKE
    std::vector<lapack_int> ipiv(static_cast<std::size_t>(n));
#endif
    // Eigen and OpenBLAS alternate so that both see the same load on a shared machine.
    // On a busy machine a size may take far longer than planned: after the time budget
    // no further repetition starts (the tables print how many were made).
    const auto lu_start = Clock::now();
    for (int r = 0; r < reps; ++r) {
        if (r > 0 && seconds_between(lu_start, Clock::now()) > budget_s) break;
        work = sys.matrix;
        settle(300);
        auto t0 = Clock::now();
        Eigen::PartialPivLU<Eigen::Ref<MatrixX<S>>> lu(work);  // in place; same algorithm as solve_dense
        runs.eigen.push_back(seconds_between(t0, Clock::now()));
        runs.x_eigen = lu.solve(sys.rhs);  // untimed
#ifdef MURK_BENCH_LAPACKE
        work = sys.matrix;
        settle();
        t0 = Clock::now();
        const lapack_int info = lapacke_getrf(n, work.data(), ipiv.data());
        runs.blas.push_back(seconds_between(t0, Clock::now()));
        if (info != 0) std::printf("  warning: getrf returned info = %d at n = %ld\n", info, static_cast<long>(n));
        runs.x_blas = sys.rhs;
        lapacke_getrs(n, work.data(), ipiv.data(), runs.x_blas.data());
#endif
    }
    return runs;
}

template <class S>
SizeFigures bench_size(Eigen::Index unknowns_goal, int reps) {
    const double radius = 0.01;
    const TriangleMesh mesh = sphere_near(radius, unknowns_goal);
    const Scene<S> scene = contact_sphere_scene<S>(mesh, radius);
    const QuadratureOptions options;
    SizeFigures f;
    f.scalar = scalar_name<S>();
    f.panels = static_cast<Eigen::Index>(mesh.size());
    f.reps = reps;
    std::fprintf(stderr, "  measuring %s, %ld panels ...\n", f.scalar, static_cast<long>(f.panels));

    // Assembly (fresh system each time, as a run does), and its layer-block part.
    LinearSystem<S> sys;
    std::vector<double> t_asm, t_blocks;
    for (int r = 0; r < reps; ++r) {
        sys = LinearSystem<S>();  // release the previous matrix before timing a new one
        settle();
        const auto t0 = Clock::now();
        sys = assemble_system(scene, options);
        t_asm.push_back(seconds_between(t0, Clock::now()));
    }
    {
        const PanelSet ps(scene.surfaces[0].mesh);
        Eigen::MatrixXd single, dbl;
        for (int r = 0; r < reps; ++r) {
            settle();
            const auto t0 = Clock::now();
            assemble_layer_blocks(ps.centroid, ps, options, true, single, dbl);
            t_blocks.push_back(seconds_between(t0, Clock::now()));
        }
    }
    // What a fresh n x n matrix costs before anything is written into it: the
    // assembly starts with setZero on newly allocated memory.
    std::vector<double> t_zero;
    for (int r = 0; r < reps; ++r) {
        MatrixX<S> fresh;
        settle();
        const auto t0 = Clock::now();
        fresh.setZero(sys.matrix.rows(), sys.matrix.cols());
        t_zero.push_back(seconds_between(t0, Clock::now()));
        g_sink = g_sink + std::abs(fresh(fresh.rows() - 1, 0));
    }
    f.assemble_s = median(t_asm);
    f.blocks_s = median(t_blocks);
    f.zero_s = median(t_zero);
    const Eigen::Index n = sys.matrix.rows();
    f.n = n;
    f.flops = lu_flops<S>(n);

    const LuRuns<S> runs = time_lu(sys, reps, 20.0);
    f.reps = static_cast<int>(runs.eigen.size());
    f.eigen_s = median(runs.eigen);
    f.eigen_min_s = *std::min_element(runs.eigen.begin(), runs.eigen.end());
    f.eigen_max_s = *std::max_element(runs.eigen.begin(), runs.eigen.end());
    f.resid_eigen = relative_residual<S>(sys.matrix, runs.x_eigen, sys.rhs);
    if (!runs.blas.empty()) {
        f.blas_s = median(runs.blas);
        f.blas_min_s = *std::min_element(runs.blas.begin(), runs.blas.end());
        f.blas_max_s = *std::max_element(runs.blas.begin(), runs.blas.end());
        f.resid_blas = relative_residual<S>(sys.matrix, runs.x_blas, sys.rhs);
        f.solution_diff = (runs.x_blas - runs.x_eigen).norm() / runs.x_eigen.norm();
    }

    // The solver's own call once: copy into a fresh matrix, factor, one solve.
    settle();
    const auto t0 = Clock::now();
    const VectorX<S> x = solve_dense(sys);
    f.solve_dense_s = seconds_between(t0, Clock::now());
    g_sink = g_sink + std::abs(x(0));
    return f;
}

// Both back ends restricted to one thread: the per-core efficiency of each, which a
// busy machine disturbs far less than the two-thread runs.
struct OneThreadFigures {
    const char* scalar = "";
    Eigen::Index n = 0;
    int reps = 0;
    double eigen_s = 0, blas_s = 0, flops = 0;
};

template <class S>
OneThreadFigures bench_one_thread(Eigen::Index unknowns_goal, int reps) {
    const double radius = 0.01;
    const Scene<S> scene = contact_sphere_scene<S>(sphere_near(radius, unknowns_goal), radius);
    const LinearSystem<S> sys = assemble_system(scene, QuadratureOptions{});
    const int omp_threads = omp_get_max_threads();
    omp_set_num_threads(1);
#ifdef MURK_BENCH_LAPACKE
    const int blas_threads = openblas_get_num_threads();
    openblas_set_num_threads(1);
#endif
    const LuRuns<S> runs = time_lu(sys, reps, 20.0);
    omp_set_num_threads(omp_threads);
#ifdef MURK_BENCH_LAPACKE
    openblas_set_num_threads(blas_threads);
#endif
    OneThreadFigures f;
    f.scalar = scalar_name<S>();
    f.n = sys.matrix.rows();
    f.reps = static_cast<int>(runs.eigen.size());
    f.flops = lu_flops<S>(f.n);
    f.eigen_s = median(runs.eigen);
    f.blas_s = runs.blas.empty() ? 0.0 : median(runs.blas);
    return f;
}

void print_size_tables(const std::vector<SizeFigures>& all, bool have_blas) {
    std::printf("\n== 2. System assembly and dense LU (Eigen PartialPivLU, as used by solve_dense) ==\n");
    std::printf("  scene: one contact sphere (object in water, radius 10 mm, 2 unknowns per panel) meshed as a\n"
                "  latitude/longitude sphere (make_capsule with zero cylinder) whose panel count is closest to\n"
                "  half of 1k/2k/4k/8k unknowns, default QuadratureOptions, one point source in the water.\n"
                "  LU flops: 2/3 n^3 (double), 8/3 n^3 real flops (complex). Medians; 'reps' = LU repetitions made.\n"
                "  'LU s' factors a preallocated copy in place (solve_dense's algorithm, without allocation);\n"
                "  'solve_dense s' is one call of the solver's own function (fresh copy + LU + one solve).\n"
                "  Parts of 'assemble s' measured alone: 'layer blocks s' = assemble_layer_blocks of the sphere\n"
                "  on itself; 'fresh zeros s' = setZero of a newly allocated n x n matrix (first touch of memory).\n\n");
    std::printf("  %-8s %7s %9s %5s %11s %15s %15s %9s %11s %14s\n", "scalar", "panels", "unknowns", "reps",
                "assemble s", "layer blocks s", "fresh zeros s", "LU s", "LU GFLOP/s", "solve_dense s");
    for (const auto& f : all)
        std::printf("  %-8s %7ld %9ld %5d %11.3f %15.3f %15.3f %9.3f %11.1f %14.3f\n", f.scalar,
                    static_cast<long>(f.panels), static_cast<long>(f.n), f.reps, f.assemble_s, f.blocks_s,
                    f.zero_s, f.eigen_s, f.flops / f.eigen_s * 1e-9, f.solve_dense_s);

    std::printf("\n== 3. LU back end: Eigen PartialPivLU vs. OpenBLAS (LAPACKE_dgetrf / LAPACKE_zgetrf) ==\n");
    if (!have_blas) {
        std::printf("  skipped: OpenBLAS/LAPACKE were not found when the benchmark was configured\n"
                    "  (apt-get install -y --no-install-recommends libopenblas-dev liblapacke-dev, then re-run cmake)\n");
        return;
    }
    std::printf("  same matrices, same work buffer, runs alternated; GFLOP/s as median (range over reps).\n"
                "  speed-up = Eigen time / OpenBLAS time (> 1: OpenBLAS faster). residual = ||A x - b|| /\n"
                "  (||A||_F ||x||) of each back end's solution; 'differ' = ||x_OpenBLAS - x_Eigen|| / ||x_Eigen||.\n\n");
    std::printf("  %-8s %9s %5s %10s %19s %12s %19s %9s %12s %12s %10s\n", "scalar", "unknowns", "reps", "Eigen s",
                "Eigen GFLOP/s", "OpenBLAS s", "OpenBLAS GFLOP/s", "speed-up", "resid Eigen", "resid OBLAS",
                "differ");
    for (const auto& f : all) {
        char e_rate[40], b_rate[40];
        std::snprintf(e_rate, sizeof e_rate, "%.1f (%.0f-%.0f)", f.flops / f.eigen_s * 1e-9,
                      f.flops / f.eigen_max_s * 1e-9, f.flops / f.eigen_min_s * 1e-9);
        std::snprintf(b_rate, sizeof b_rate, "%.1f (%.0f-%.0f)", f.flops / f.blas_s * 1e-9,
                      f.flops / f.blas_max_s * 1e-9, f.flops / f.blas_min_s * 1e-9);
        std::printf("  %-8s %9ld %5d %10.3f %19s %12.3f %19s %8.2fx %12.1e %12.1e %10.1e\n", f.scalar,
                    static_cast<long>(f.n), f.reps, f.eigen_s, e_rate, f.blas_s, b_rate, f.eigen_s / f.blas_s,
                    f.resid_eigen, f.resid_blas, f.solution_diff);
    }
}

void print_one_thread_table(const std::vector<OneThreadFigures>& all) {
    std::printf("\n== 3b. Same comparison with one thread each (per-core efficiency; less sensitive to load) ==\n\n");
    std::printf("  %-8s %9s %5s %10s %14s %12s %17s %9s\n", "scalar", "unknowns", "reps", "Eigen s", "Eigen GFLOP/s",
                "OpenBLAS s", "OpenBLAS GFLOP/s", "speed-up");
    for (const auto& f : all)
        std::printf("  %-8s %9ld %5d %10.3f %14.1f %12.3f %17.1f %8.2fx\n", f.scalar, static_cast<long>(f.n), f.reps,
                    f.eigen_s, f.flops / f.eigen_s * 1e-9, f.blas_s, f.flops / f.blas_s * 1e-9, f.eigen_s / f.blas_s);
}

}  // namespace

int main(int argc, char** argv) {
    bool quick = false, full = false;
    for (int i = 1; i < argc; ++i) {
        if (std::strcmp(argv[i], "--quick") == 0) quick = true;
        else if (std::strcmp(argv[i], "--full") == 0) full = true;
        else {
            std::fprintf(stderr, "usage: murk-bench-core [--quick | --full]\n");
            return 2;
        }
    }
    const auto start = Clock::now();
    std::setvbuf(stdout, nullptr, _IOLBF, 0);  // keep the order with the progress lines on stderr

    std::printf("murk-bench-core: speed of the boundary-element solver core%s\n",
                quick ? " (--quick: small sizes only)" : "");
    std::string cpu = "unknown";
    {
        std::ifstream in("/proc/cpuinfo");
        for (std::string line; std::getline(in, line);)
            if (line.rfind("model name", 0) == 0) {
                cpu = line.substr(line.find(':') + 2);
                break;
            }
    }
    std::printf("cpu: %s, %u hardware threads; OpenMP threads (assembly, Eigen LU): %d\n", cpu.c_str(),
                std::thread::hardware_concurrency(), omp_get_max_threads());
#ifdef MURK_BENCH_LAPACKE
    const bool have_blas = true;
    std::printf("OpenBLAS: %s, core %s, %d threads\n", openblas_get_config(), openblas_get_corename(),
                openblas_get_num_threads());
#else
    const bool have_blas = false;
    std::printf("OpenBLAS: not linked (comparison skipped)\n");
#endif
    print_load("at start");

    const KernelFigures kernels = bench_kernels();
    const std::vector<AssemblyFigures> blocks = bench_layer_blocks();
    print_load("after part 1");

    // (unknowns goal, repetitions)
    std::vector<std::pair<Eigen::Index, int>> real_sizes{{1000, 5}, {2000, 5}, {4000, 3}, {8000, 3}};
    std::vector<std::pair<Eigen::Index, int>> complex_sizes{{1000, 5}, {2000, 5}, {4000, 3}};
    if (full) complex_sizes.push_back({8000, 1});
    if (quick) {
        real_sizes = {{1000, 3}, {2000, 3}};
        complex_sizes = {{1000, 3}};
    }
    std::vector<SizeFigures> sizes;
    std::vector<OneThreadFigures> single_thread;
    for (const auto& [goal, reps] : real_sizes) sizes.push_back(bench_size<double>(goal, reps));
    single_thread.push_back(bench_one_thread<double>(2000, 3));
    work_buffer<double>(0) = std::vector<double>();  // hand the real buffer back before the complex one
    print_load("after the real systems");
    for (const auto& [goal, reps] : complex_sizes) sizes.push_back(bench_size<Complex>(goal, reps));
    single_thread.push_back(bench_one_thread<Complex>(2000, 3));
    work_buffer<Complex>(0) = std::vector<Complex>();
    print_size_tables(sizes, have_blas);
    if (have_blas) print_one_thread_table(single_thread);
    print_load("at end");

    // ---------------------------------------------------------------- summary
    const double start_load = g_load_samples.front();
    std::printf("\n== 4. Summary ==  (speed-up = Eigen time / OpenBLAS time; > 1: OpenBLAS faster)\n");
    std::printf("  kernels, ns per panel pair on one core: closed single %.1f, closed double %.1f, closed both %.1f,\n"
                "    Radon-7 both %.1f, centroid both %.2f\n",
                kernels.single_ns, kernels.double_ns, kernels.both_ns, kernels.radon_ns, kernels.centroid_ns);
    for (const auto& a : blocks)
        std::printf("  assemble_layer_blocks, %ld panels, %d thread(s): %.2f ns/pair default vs %.2f all closed form"
                    " -> %.1fx faster\n",
                    static_cast<long>(a.panels), a.threads, a.default_ns, a.naive_ns, a.naive_ns / a.default_ns);
    for (const auto& f : sizes) {
        std::printf("  %-7s n = %5ld: assemble %.3f s, Eigen LU %.3f s = %.1f GFLOP/s", f.scalar,
                    static_cast<long>(f.n), f.assemble_s, f.eigen_s, f.flops / f.eigen_s * 1e-9);
        if (have_blas)
            std::printf(", OpenBLAS %.3f s = %.1f GFLOP/s (speed-up %.2fx)", f.blas_s,
                        f.flops / f.blas_s * 1e-9, f.eigen_s / f.blas_s);
        std::printf("\n");
    }
    if (have_blas)
        for (const auto& f : single_thread)
            std::printf("  %-7s n = %5ld, one thread each: Eigen %.1f GFLOP/s, OpenBLAS %.1f GFLOP/s (speed-up %.2fx)\n",
                        f.scalar, static_cast<long>(f.n), f.flops / f.eigen_s * 1e-9, f.flops / f.blas_s * 1e-9,
                        f.eigen_s / f.blas_s);
    const double max_share =
        g_other_share.empty() ? 0.0 : *std::max_element(g_other_share.begin(), g_other_share.end());
    const bool shared = start_load > kSharedLoad || max_share > kSharedOtherShare;
    std::printf("  machine: 1-minute load average at start %.2f; other processes took up to %.0f %% of all cores\n"
                "    during a part of the run -> %s\n",
                start_load, 100.0 * max_share,
                shared ? "SHARED with other work: figures may be low and noisy" : "quiet");
    std::printf("  total run time: %.0f s\n", seconds_between(start, Clock::now()));
    return 0;
}
