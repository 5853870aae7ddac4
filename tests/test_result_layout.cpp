// Tests of the coded values of result files (cases/output/result_layout.hpp). The expected
// words and codes are typed in from cases/RESULT_LAYOUT.md, the document readers rely on; the
// form of flag_meanings is the CF conventions' (1.8, section 3.5: blank-separated words).
#include "cases/output/result_layout.hpp"

#include <doctest/doctest.h>

#include <string>
#include <vector>

using namespace murk;

TEST_CASE("result layout: each code has the word RESULT_LAYOUT.md gives it") {
    CHECK(word_of(PointStatus::not_computed) == "not_computed");
    CHECK(word_of(PointStatus::computed) == "computed");
    CHECK(word_of(PointStatus::masked) == "masked");
    CHECK(word_of(PathCode::none) == "none");
    CHECK(word_of(PathCode::exact) == "exact");
    CHECK(word_of(PathCode::dipole) == "dipole");
    CHECK(word_of(PathCode::full) == "full");
    CHECK(word_of(MaskReason::none) == "not_masked");
    CHECK(word_of(MaskReason::touches_body) == "touches_body");
    CHECK(word_of(MaskReason::touches_object) == "touches_object");
    CHECK(word_of(MaskReason::beyond_plane) == "beyond_plane");
    CHECK(word_of(MaskReason::unreachable) == "unreachable");
    CHECK(word_of(MaskReason::near_source) == "near_source");
    CHECK(word_of(RangeStatus::no_data) == "no_point_computed");
    CHECK(word_of(RangeStatus::crossed) == "crossed");
    CHECK(word_of(RangeStatus::beyond_sweep) == "beyond_sweep");
    CHECK(word_of(RangeStatus::never) == "never_detectable");
    CHECK(word_of(FourthPower::no) == "no");
    CHECK(word_of(FourthPower::yes) == "yes");
    CHECK(word_of(FourthPower::unknown) == "unknown");
}

TEST_CASE("result layout: flag attributes list every code with one word each") {
    const FlagTable status = flags_of<PointStatus>();
    CHECK(status.values == std::vector<std::uint8_t>{0, 1, 2});
    CHECK(status.meanings == "not_computed computed masked");
    const FlagTable masks = flags_of<MaskReason>();
    CHECK(masks.values.size() == std::size_t(kMaskReasonCount));
    CHECK(masks.meanings == "not_masked touches_body touches_object beyond_plane unreachable near_source");
    CHECK(flags_of<RangeStatus>().meanings == "no_point_computed crossed beyond_sweep never_detectable");
    CHECK(flags_of<FourthPower>().values == std::vector<std::uint8_t>{0, 1, 2});
    CHECK(flags_of<PathCode>().meanings == "none exact dipole full");
}
