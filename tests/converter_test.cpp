// The converter's transfer conventions, against hand calculations for a 3-bit converter (8 codes).
#include <doctest/doctest.h>

#include <cmath>

#include "rtline/converter.hpp"
#include "rtline/error.hpp"

using rtline::AdcTransfer;

TEST_CASE("a code stands for k/2^N, (k + 1/2)/2^N or k/(2^N - 1) by the transfer") {
    // Hand calculation, 3 bits: 2^3 = 8 steps, or 7 for full-scale.
    CHECK(rtline::code_ratio(3, 3, AdcTransfer::rounding) == 3.0 / 8.0);
    CHECK(rtline::code_ratio(3, 3, AdcTransfer::truncating) == 3.5 / 8.0);
    CHECK(rtline::code_ratio(3, 3, AdcTransfer::full_scale) == 3.0 / 7.0);
    CHECK(rtline::code_ratio(7, 3, AdcTransfer::full_scale) == 1.0);
    CHECK(rtline::adc_steps(12, AdcTransfer::rounding) == 4096.0);
    CHECK(rtline::adc_steps(12, AdcTransfer::full_scale) == 4095.0);
}

TEST_CASE("the converter's code for a ratio follows the same transfer, clamped to the codes") {
    // Rounding: transitions at (k - 1/2)/8, so 0.30 (2.4 steps) is code 2 and 0.32 (2.56 steps) code 3.
    CHECK(rtline::ratio_code(0.30, 3, AdcTransfer::rounding) == 2);
    CHECK(rtline::ratio_code(0.32, 3, AdcTransfer::rounding) == 3);
    // Truncating: code k covers [k, k + 1) steps, so 0.32 (2.56 steps) is code 2.
    CHECK(rtline::ratio_code(0.32, 3, AdcTransfer::truncating) == 2);
    // Full-scale: 7 steps, 0.32 is 2.24 steps, code 2; 0.93 is 6.51 steps, code 7.
    CHECK(rtline::ratio_code(0.32, 3, AdcTransfer::full_scale) == 2);
    CHECK(rtline::ratio_code(0.93, 3, AdcTransfer::full_scale) == 7);
    // Clamped to 0 .. 7 at both rails; NaN reads as 0.
    CHECK(rtline::ratio_code(1.2, 3, AdcTransfer::rounding) == 7);
    CHECK(rtline::ratio_code(-0.1, 3, AdcTransfer::truncating) == 0);
    CHECK(rtline::ratio_code(std::nan(""), 3, AdcTransfer::rounding) == 0);
}

TEST_CASE("every code read back through its own transfer gives the same code") {
    for (const AdcTransfer t : {AdcTransfer::rounding, AdcTransfer::truncating, AdcTransfer::full_scale}) {
        for (std::int64_t k = 0; k < 1024; ++k) {
            CHECK(rtline::ratio_code(rtline::code_ratio(k, 10, t), 10, t) == k);
        }
    }
}

TEST_CASE("a transfer is named as it is printed") {
    for (const AdcTransfer t : {AdcTransfer::rounding, AdcTransfer::truncating, AdcTransfer::full_scale}) {
        CHECK(rtline::parse_adc_transfer(rtline::adc_transfer_name(t), "transfer") == t);
    }
    CHECK_THROWS_AS((void)rtline::parse_adc_transfer("round", "transfer"), rtline::InputError);
}
