// The converter's transfer: which output ratio an N-bit code stands for, and which code a ratio gives.
// Three conventions are common in practice (no formal source; a converter's own data states which):
//   rounding    code k is the ratio k/2^N; the converter's transitions lie at (k − ½) LSB
//   truncating  code k covers [k, k + 1) LSB of 2^N steps, so it stands for (k + ½)/2^N
//   full-scale  the top code is the reference: code k is k/(2^N − 1), transitions at (k − ½) steps
// Ratios are of the converter's reference (the excitation, for a ratiometric reading).
#pragma once

#include <cstdint>
#include <string_view>

namespace rtline {

enum class AdcTransfer { rounding, truncating, full_scale };

[[nodiscard]] std::string_view adc_transfer_name(AdcTransfer t);  // "rounding", "truncating", "full-scale"
// Parses a name as adc_transfer_name prints it; throws InputError naming `field`.
[[nodiscard]] AdcTransfer parse_adc_transfer(std::string_view text, std::string_view field);

// Steps of the reference one code is: 2^bits, or 2^bits − 1 for full-scale. Requires 1 ≤ bits ≤ 62.
[[nodiscard]] double adc_steps(int bits, AdcTransfer t);

// The ratio (0..1 of the reference) that code k stands for.
[[nodiscard]] double code_ratio(std::int64_t code, int bits, AdcTransfer t);

// The code an ideal converter gives for `ratio`, clamped to 0 … 2^bits − 1 (a ratio that is not a
// number gives 0).
[[nodiscard]] std::int64_t ratio_code(double ratio, int bits, AdcTransfer t);

}  // namespace rtline
