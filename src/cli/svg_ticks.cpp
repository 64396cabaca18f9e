// Tick values and labels, and XML escaping, for the SVG writer (svg.hpp).
#include <algorithm>
#include <cmath>

#include "rtline/units.hpp"
#include "svg.hpp"

namespace rtline::cli::svg {

namespace {
constexpr const char* kMinus = "\xE2\x88\x92";  // U+2212, the typographic minus sign
}  // namespace

// ------------------------------------------------------------------------------------- text

std::string escape(std::string_view text) {
    std::string out;
    out.reserve(text.size());
    for (const char c : text) {
        switch (c) {
            case '&': out += "&amp;"; break;
            case '<': out += "&lt;"; break;
            case '>': out += "&gt;"; break;
            case '"': out += "&quot;"; break;
            case '\'': out += "&apos;"; break;
            default:
                // XML 1.0 allows no control characters but tab, newline and carriage return.
                if (static_cast<unsigned char>(c) < 0x20 && c != '\t' && c != '\n' && c != '\r') {
                    out += ' ';
                } else {
                    out += c;
                }
        }
    }
    return out;
}

// ------------------------------------------------------------------------------------ ticks

double nice_step(double lo, double hi, int target) {
    const double raw = (hi - lo) / std::max(1, target);
    const double mag = std::pow(10.0, std::floor(std::log10(raw)));
    const double r = raw / mag;
    const double m = r < 1.5 ? 1.0 : r < 3.5 ? 2.0 : r < 7.5 ? 5.0 : 10.0;
    return m * mag;
}

std::vector<double> nice_ticks(double lo, double hi, int target) {
    const double step = nice_step(lo, hi, target);
    std::vector<double> ticks;
    const double slack = 1e-9 * step;
    for (double k = std::ceil((lo - slack) / step); k * step <= hi + slack; k += 1.0) {
        const double v = k * step;
        ticks.push_back(std::abs(v) < slack ? 0.0 : v);
    }
    return ticks;
}

std::vector<double> log_ticks(double lo, double hi, const std::vector<int>& mantissas) {
    std::vector<double> ticks;
    const double slack = 1e-9;
    for (int e = static_cast<int>(std::floor(std::log10(lo))) - 1; e <= static_cast<int>(std::ceil(std::log10(hi)));
         ++e) {
        for (const int m : mantissas) {
            // 10^e exactly for e < 0 (a division; pow(10, -3) is not 1e-3 to the last bit).
            const double v = e >= 0 ? m * std::pow(10.0, e) : m / std::pow(10.0, -e);
            if (v >= lo * (1 - slack) && v <= hi * (1 + slack)) ticks.push_back(v);
        }
    }
    if (ticks.size() < 2) ticks.clear();
    return ticks;
}

std::string tick_label(double v, double step, Ticks kind) {
    if (std::abs(v) < 1e-9 * std::abs(step)) v = 0.0;
    std::string s;
    if (kind == Ticks::whole) {
        s = format_fixed(v, 0);
    } else if (kind == Ticks::resistance) {
        const int digits = std::max(
            1, static_cast<int>(std::floor(std::log10(std::abs(v)) + 1e-9) - std::floor(std::log10(step) + 1e-9)) + 1);
        s = format_resistance(v, std::min(digits, 6));
    } else if (step >= 1e5 || step < 1e-4) {
        static constexpr const char* prefixes[] = {"p", "n", "\xC2\xB5", "m", "", "k", "M", "G", "T"};
        // The prefix suits each value (500k, 1M, 1.5M); the decimals follow the step.
        const double size = v == 0.0 ? step : std::abs(v);
        const int e3 = std::clamp(static_cast<int>(std::floor(std::log10(size) / 3.0 + 1e-12)), -4, 4);
        const double scale = std::pow(10.0, 3 * e3);
        const int decimals = std::max(0, -static_cast<int>(std::floor(std::log10(step / scale) + 1e-9)));
        s = v == 0.0 ? "0" : format_fixed(v / scale, decimals) + prefixes[e3 + 4];
    } else {
        s = format_fixed(v, std::max(0, -static_cast<int>(std::floor(std::log10(step) + 1e-9))));
    }
    if (!s.empty() && s.front() == '-') s = kMinus + s.substr(1);
    return s;
}

}  // namespace rtline::cli::svg
