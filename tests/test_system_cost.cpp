// The memory and time model of the fixed part under each solver
// (solver/system_cost.hpp, cases/sweep/cost_model.hpp). Expected values are worked
// out by hand from the model's stated formulas (300 n log2 n + (512 + 12 sqrt(n)) n / 2
// entries for the compressed system, the preconditioner's in single precision;
// n^2 for the dense one), not taken from the code.
#include "cases/sweep/cost_model.hpp"
#include "solver/system_cost.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <utility>

using namespace murk;

TEST_CASE("system cost: compressed entries follow 300 n log2 n + (512 + 12 sqrt(n)) n / 2, never more than dense") {
    // n = 1024: log2 n = 10, so 300 * 1024 * 10 = 3,072,000 exceeds 1024^2 and is
    // held at 1,048,576; plus (512 + 12 * 32) * 1024 / 2 = 458,752.
    CHECK(compressed_system_entries(1024) == doctest::Approx(1507328.0));
    CHECK(system_entries(1024, false) == doctest::Approx(1048576.0));  // 1024^2
    // n = 100: 300 * 100 * log2(100) = 199,316 and (512 + 120) * 100 = 63,200 both exceed
    // 100^2, so each part is held at the dense size: 10,000 + 10,000 / 2.
    CHECK(compressed_system_entries(100) == doctest::Approx(15000.0));
    // n = 65536: log2 n = 16 and sqrt(n) = 256, 300 * 16 + (512 + 12 * 256) / 2 = 6592
    // entries per unknown, against 65536 dense.
    CHECK(system_entries(65536, true) / system_entries(65536, false) == doctest::Approx(6592.0 / 65536.0));
}

TEST_CASE("system cost: the sweep's memory counts the compressed system only when compressed") {
    CostModel cost;
    cost.rates = reference_rates(1);
    cost.sizes.fixed_unknowns = 65536;
    cost.sizes.waters = 2;
    // Dense, nothing per thread: 1.1 x (2 waters x 65536^2 x 8 bytes) + 24 MiB.
    const double overhead = 24.0 * 1024 * 1024;
    CHECK(cost.memory_bytes(false, false) == doctest::Approx(1.1 * 2 * 65536.0 * 65536.0 * 8 + overhead));
    cost.sizes.compressed = true;
    CHECK(cost.memory_bytes(false, false) == doctest::Approx(1.1 * 2 * 6592.0 * 65536.0 * 8 + overhead));
    // The compressed fixed part's time: compression at the entry rate, the
    // preconditioner twice as long, then one solve of 6 iterations, each reading
    // the 6592 x 65536 x 8 bytes once.
    const double bytes = 6592.0 * 65536.0 * 8;
    CHECK(cost.fixed_part_seconds() ==
          doctest::Approx(2 * (3 * 6592.0 * 65536.0 / cost.rates.entry_rate + 6 * bytes / cost.rates.solve_byte_rate)));
}

TEST_CASE("system cost: a compressed body's exact batches are larger and run one at a time") {
    CostModel cost;
    cost.rates = reference_rates(2);
    cost.sizes.fixed_unknowns = 91580;  // the benchmark's 45,790-panel fish
    cost.sizes.moving_unknowns = 640;   // a 320-panel sphere
    // One point's coupling blocks: 91,580 x 640 x 8 = 468,889,600 bytes. Dense
    // bodies: 512 MiB per thread holds 1 point; compressed: 4 GiB holds 9.
    CHECK(exact_batch_size(cost.sizes) == 1);
    const double dense_held = cost.memory_bytes(true, false) - cost.memory_bytes(false, false);
    cost.sizes.compressed = true;
    CHECK(exact_batch_size(cost.sizes) == 9);
    const double compressed_held = cost.memory_bytes(true, false) - cost.memory_bytes(false, false);
    // 1.1 x (2 threads x 1 point) against 1.1 x (one batch of 9 points).
    CHECK(dense_held == doctest::Approx(1.1 * 2 * 468889600.0));
    CHECK(compressed_held == doctest::Approx(1.1 * 9 * 468889600.0));
}

TEST_CASE("system cost: the water's images scale the assembly, not the factorization") {
    CostModel cost;
    cost.rates = reference_rates(1);
    cost.sizes.fixed_unknowns = 4000;
    const double n = 4000.0;
    const double lu = 2.0 / 3.0 * n * n * n / cost.rates.lu_flop_rate;
    CHECK(cost.fixed_part_seconds() == doctest::Approx(n * n / cost.rates.entry_rate + lu));
    // One image (a plane's mirror): entries 1.15 times dearer. 36 images (a slab):
    // 1 + 0.15 + 0.09 x 35 = 4.3 times. The LU is the same.
    cost.sizes.images = 1;
    CHECK(cost.fixed_part_seconds() == doctest::Approx(1.15 * n * n / cost.rates.entry_rate + lu));
    cost.sizes.images = 36;
    CHECK(cost.fixed_part_seconds() == doctest::Approx(4.3 * n * n / cost.rates.entry_rate + lu));
    // The rule against build/murk-bench-images' assembly times (10,240 unknowns, quiet
    // machine, 2026-12-03): 2.30 / 2.03 with one image, 7.75 / 2.03 with 36, 17.9 / 2.03
    // with 77; the rule stays within 15 % of each.
    for (const auto& [images, measured] :
         {std::pair{1, 2.298 / 2.027}, std::pair{36, 7.749 / 2.027}, std::pair{77, 17.895 / 2.027}}) {
        cost.sizes.images = images;
        CHECK(std::abs(cost.image_factor() / measured - 1.0) < 0.15);
    }
}

TEST_CASE("system cost: a compressed body's exact point is six shared steps plus its own coupling blocks") {
    CostModel cost;
    cost.rates = reference_rates(2);
    cost.sizes.fixed_unknowns = 91580;
    cost.sizes.moving_unknowns = 640;
    cost.sizes.compressed = true;
    // One GMRES on the whole system (solver/coupled_solve.hpp): 6 steps, each
    // reading the fixed part once for the batch of 9 and the point's two coupling
    // blocks (91,580 x 640 x 8 bytes) once; plus assembling those blocks, 2 n m
    // entries at 10 times the entry rate. No dependence on the object's distance.
    const double n = 91580, m = 640;
    const double steps = 6 * (cost.fixed_part_bytes() / 9 + n * m * 8) / cost.rates.solve_byte_rate;
    const double coupling = 2 * n * m / (10 * cost.rates.entry_rate);
    CHECK(cost.exact_point_seconds(0.05) == doctest::Approx(steps + coupling));
    CHECK(cost.exact_point_seconds(0.5) == doctest::Approx(steps + coupling));
}
