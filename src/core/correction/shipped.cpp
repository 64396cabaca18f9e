// The shipped table: the integer arithmetic the emitted C runs, its error over every code, and the
// search for the fewest entries whose shipped error meets a target (see rtline/correction.hpp).
#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <string>

#include "rtline/correction.hpp"
#include "rtline/error.hpp"

namespace rtline {

namespace {

const char* const kDegC =
    "\xC2\xB0"
    "C";

std::string unit_words(int scale_per_c) { return scale_per_c == 100 ? "0.01" : "0.1"; }

}  // namespace

std::int32_t FixedTable::interpolate(std::int64_t code) const {
    code = std::clamp(code, code_lo, code_hi);
    std::size_t i = 0;
    if (spacing == Spacing::power_of_two) {
        i = static_cast<std::size_t>((code - code_lo) >> shift);
        if (i + 1 >= codes.size()) i = codes.size() - 2;
    } else {
        const auto it = std::upper_bound(codes.begin(), codes.end(), code);
        i = std::min(static_cast<std::size_t>(it - codes.begin()), codes.size() - 1) - 1;
    }
    const std::int64_t num = static_cast<std::int64_t>(t[i + 1] - t[i]) * (code - codes[i]);
    const std::int64_t den = codes[i + 1] - codes[i];
    // Integer division truncates toward zero (C99 §6.5.5 and C++11 alike); adding half the divisor
    // with the numerator's sign first rounds halves away from zero.
    const std::int64_t q = (num >= 0 ? num + den / 2 : num - den / 2) / den;
    return t[i] + static_cast<std::int32_t>(q);
}

FixedTable to_fixed(const LookupTable& table, const CodeMap& map, int scale_per_c) {
    if (scale_per_c != 10 && scale_per_c != 100) {
        throw InputError(Input::unit, format_number(1.0 / scale_per_c), std::string("choose 0.1 or 0.01 (") + kDegC + ")");
    }
    FixedTable f;
    f.scale_per_c = scale_per_c;
    f.spacing = table.spacing;
    f.shift = table.shift;
    f.code_lo = table.code_lo;
    f.code_hi = table.code_hi;
    f.codes = table.codes;
    f.bits = 16;
    for (const double t_k : table.t_k) {
        const long long counts = std::llround(kelvin_to_celsius(t_k) * scale_per_c);
        if (counts < -32768 || counts > 32767) f.bits = 32;
        f.t.push_back(static_cast<std::int32_t>(counts));
    }
    // The largest |num| of a segment is at its far end, |Δt|·den; adding den/2 before the division
    // must stay within int32 too.
    f.arithmetic_bits = 32;
    for (std::size_t i = 0; i + 1 < f.codes.size(); ++i) {
        const std::int64_t den = f.codes[i + 1] - f.codes[i];
        const std::int64_t dt = std::abs(static_cast<std::int64_t>(f.t[i + 1]) - f.t[i]);
        if (dt * den + den / 2 > std::numeric_limits<std::int32_t>::max()) f.arithmetic_bits = 64;
    }
    const double per_count = 1.0 / scale_per_c;
    f.error_k.resize(map.size());
    f.max_error_k = 0.0;
    f.at_code = map.code_lo;
    for (std::size_t i = 0; i < map.size(); ++i) {
        const std::int64_t code = map.code_lo + static_cast<std::int64_t>(i);
        const double e = celsius_to_kelvin(f.interpolate(code) * per_count) - map.t_k[i];
        f.error_k[i] = e;
        if (std::abs(e) > f.max_error_k) {
            f.max_error_k = std::abs(e);
            f.at_code = code;
        }
    }
    return f;
}

double rounding_floor_k(const CodeMap& map, int scale_per_c) {
    double worst = 0.0;
    for (const double t_k : map.t_k) {
        const double x = kelvin_to_celsius(t_k) * scale_per_c;
        worst = std::max(worst, std::abs(x - std::round(x)));
    }
    return worst / scale_per_c;
}

namespace {

ShippedTable shipped(const CodeMap& map, std::size_t entries, Spacing spacing, int scale) {
    ShippedTable s{make_table(map, entries, spacing), {}};
    s.fixed = to_fixed(s.table, map, scale);
    return s;
}

[[noreturn]] void none_meets(const std::string& what, double target_k, const FixedTable& best, double best_floor_k) {
    throw InfeasibleError("no table of up to " + what + " meets " + format_number(target_k, 4) + " " + kDegC +
                          " once rounded to " + unit_words(best.scale_per_c) + " " + kDegC + " (" +
                          std::to_string(best.codes.size()) + " entries ship " + format_number(best.max_error_k, 4) +
                          " " + kDegC + "; the unit alone rounds by up to " + format_number(best_floor_k, 4) + " " +
                          kDegC + "); give {entries} to build a larger table");
}

ShippedTable smallest_power_of_two(const CodeMap& map, double target_k, int scale) {
    // The largest shift first: fewer entries. A shift whose table has more than kMaxSearchEntries is
    // not tried.
    int shift = 0;
    while ((std::int64_t{1} << shift) < map.code_hi - map.code_lo) ++shift;
    std::optional<ShippedTable> last;
    for (; shift >= 0; --shift) {
        const LookupTable t = power_of_two_table(map, shift);
        if (t.codes.size() > kMaxSearchEntries) break;
        ShippedTable s{t, to_fixed(t, map, scale)};
        if (s.fixed.max_error_k <= target_k) return s;
        last = std::move(s);
    }
    none_meets(std::to_string(kMaxSearchEntries) + " entries every 2^s codes", target_k, last->fixed,
               rounding_floor_k(map, scale));
}

}  // namespace

ShippedTable smallest_table(const CodeMap& map, double max_error_k, Spacing spacing, int scale_per_c) {
    const double floor_k = rounding_floor_k(map, scale_per_c);
    if (max_error_k < floor_k) {
        throw InfeasibleError("the " + unit_words(scale_per_c) + " " + kDegC + " unit alone rounds by up to " +
                              format_number(floor_k, 4) + " " + kDegC + " over the span, more than the " +
                              format_number(max_error_k, 4) + " " + kDegC + " target; use " +
                              (scale_per_c == 10 ? "{unit} 0.01 or " : "") + "a larger {max_error}");
    }
    if (spacing == Spacing::power_of_two) return smallest_power_of_two(map, max_error_k, scale_per_c);
    const std::size_t limit = std::min(map.size(), kMaxSearchEntries);
    const double unit_k = 1.0 / scale_per_c;
    const double skip_above = max_error_k + unit_k;  // a table erring more than this cannot ship within target
    // The bracket: `fails` errs by more than skip_above before rounding, `upper` does not.
    std::size_t fails = 1;
    std::size_t upper = limit;
    for (std::size_t m = 2; m < limit; m *= 2) {
        if (make_table(map, m, spacing).max_error_k <= skip_above) {
            upper = m;
            break;
        }
        fails = m;
    }
    while (upper - fails > 1) {
        const std::size_t mid = fails + (upper - fails) / 2;
        (make_table(map, mid, spacing).max_error_k <= skip_above ? upper : fails) = mid;
    }
    // Every count from the first within skip_above, in turn: the shipped error need not fall with
    // every added entry.
    std::optional<ShippedTable> last;
    for (std::size_t m = fails + 1; m <= limit; ++m) {
        ShippedTable s = shipped(map, m, spacing, scale_per_c);
        if (s.fixed.max_error_k <= max_error_k) return s;
        last = std::move(s);
    }
    none_meets(std::to_string(limit) + " entries", max_error_k, last->fixed, floor_k);
}

}  // namespace rtline
