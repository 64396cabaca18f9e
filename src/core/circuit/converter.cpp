#include "rtline/converter.hpp"

#include <cmath>
#include <string>

#include "rtline/error.hpp"

namespace rtline {

std::string_view adc_transfer_name(AdcTransfer t) {
    switch (t) {
        case AdcTransfer::rounding: return "rounding";
        case AdcTransfer::truncating: return "truncating";
        case AdcTransfer::full_scale: return "full-scale";
    }
    return "rounding";
}

AdcTransfer parse_adc_transfer(std::string_view text, std::string_view field) {
    for (const AdcTransfer t : {AdcTransfer::rounding, AdcTransfer::truncating, AdcTransfer::full_scale}) {
        if (text == adc_transfer_name(t)) return t;
    }
    throw InputError(std::string(field), std::string(text), "choose rounding, truncating or full-scale");
}

double adc_steps(int bits, AdcTransfer t) {
    const double full = std::ldexp(1.0, bits);
    return t == AdcTransfer::full_scale ? full - 1.0 : full;
}

double code_ratio(std::int64_t code, int bits, AdcTransfer t) {
    const double k = static_cast<double>(code);
    switch (t) {
        case AdcTransfer::rounding: return std::ldexp(k, -bits);
        case AdcTransfer::truncating: return std::ldexp(k + 0.5, -bits);
        case AdcTransfer::full_scale: return k / adc_steps(bits, t);
    }
    return std::ldexp(k, -bits);
}

std::int64_t ratio_code(double ratio, int bits, AdcTransfer t) {
    const double top = std::ldexp(1.0, bits) - 1.0;
    const double x = ratio * adc_steps(bits, t);
    double k = t == AdcTransfer::truncating ? std::floor(x) : std::floor(x + 0.5);
    if (!(k > 0.0)) k = 0.0;  // NaN too
    if (k > top) k = top;
    return static_cast<std::int64_t>(k);
}

}  // namespace rtline
