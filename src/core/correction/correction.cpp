#include "rtline/correction.hpp"

#include <algorithm>
#include <cmath>
#include <string>

#include "rtline/error.hpp"
#include "rtline/grid.hpp"

namespace rtline {

// ------------------------------------------------------------------------------ the exact inverse

double CodeMap::temperature(std::int64_t code) const {
    const std::int64_t k = std::clamp(code, code_lo, code_hi);
    return t_k[static_cast<std::size_t>(k - code_lo)];
}

CodeMap map_codes(const Thermistor& model, const Channel& channel, const Span& span, int adc_bits,
                  AdcTransfer transfer) {
    if (adc_bits < 1 || adc_bits > kMaxAdcBits) {
        throw InputError(Input::adc_bits, std::to_string(adc_bits),
                         "an ADC has 1 to " + std::to_string(kMaxAdcBits) + " bits");
    }
    validate(channel);
    model.check_span(span, Input::span);
    const double v_a = channel_ratio(channel, model.resistance(span.lo_k));
    const double v_b = channel_ratio(channel, model.resistance(span.hi_k));
    for (const auto& [v, t_k] : {std::pair{v_a, span.lo_k}, std::pair{v_b, span.hi_k}}) {
        if (!(v >= 0.0 && v <= 1.0)) {
            // What to change: the amplifier's gain, else the drive (a current, or a supply above a fixed
            // reference).
            const bool amp = channel.amplifier.has_value();
            const bool current = channel.circuit.excitation.drive == Drive::current;
            const Input input = amp ? Input::gain : current ? Input::current : Input::reference;
            const double value = amp ? channel.amplifier->gain : current ? channel.circuit.excitation.value
                                                                         : channel.reference;
            const char* hint = amp       ? " (lower the gain, or use {output_range})"
                               : current ? " (lower the current)"
                                         : " (a reference at or above the supply, or a divider whose output stays below it)";
            throw InputError(input, describe(value),
                             "at " + format_number(kelvin_to_celsius(t_k), 4) +
                                 " \xC2\xB0"
                                 "C the converter input is " +
                                 format_number(v, 4) +
                                 " of the reference, outside 0 to 1: that end of the span would read as a rail" + hint);
        }
    }
    // Code k stands for (k + offset)/steps: offset ½ for truncating, else 0 (converter.hpp).
    const double steps = adc_steps(adc_bits, transfer);
    const double offset = transfer == AdcTransfer::truncating ? 0.5 : 0.0;
    const double top = std::ldexp(1.0, adc_bits) - 1.0;
    // A code exactly at a span end (to rounding) counts as inside.
    auto lo = static_cast<std::int64_t>(std::ceil(std::min(v_a, v_b) * steps - offset - 1e-9));
    auto hi = static_cast<std::int64_t>(std::floor(std::max(v_a, v_b) * steps - offset + 1e-9));
    lo = std::max<std::int64_t>(lo, 1);
    hi = std::min<std::int64_t>(hi, static_cast<std::int64_t>(top) - 1);
    // A table over fewer codes than the grid rule's points cannot show how the line bends (grid.hpp).
    if (hi - lo + 1 < static_cast<std::int64_t>(kMinLinearityPoints)) {
        const std::int64_t n = std::max<std::int64_t>(hi - lo + 1, 0);
        throw InputError(Input::adc_bits, std::to_string(adc_bits),
                         "the span's output swing (" + format_number(std::abs(v_b - v_a) * steps, 3) + " LSB) covers " +
                             std::to_string(n) + (n == 1 ? " code" : " codes") + "; a table takes at least " +
                             std::to_string(kMinLinearityPoints) +
                             " (the ends, the middle and one in each half): use more bits or a circuit with more "
                             "swing");
    }
    CodeMap map;
    map.adc_bits = adc_bits;
    map.transfer = transfer;
    map.code_lo = lo;
    map.code_hi = hi;
    map.t_k.reserve(static_cast<std::size_t>(hi - lo + 1));
    for (std::int64_t k = lo; k <= hi; ++k) {
        const double t = model.temperature(channel_resistance(channel, code_ratio(k, adc_bits, transfer)));
        map.t_k.push_back(std::clamp(t, span.lo_k, span.hi_k));
    }
    return map;
}

// ------------------------------------------------------------------------------------ tables

std::string_view spacing_name(Spacing s) {
    switch (s) {
        case Spacing::code: return "code";
        case Spacing::error: return "error";
        case Spacing::power_of_two: return "power-of-two";
    }
    return "code";
}

Spacing parse_spacing(std::string_view text, std::string_view field) {
    for (const Spacing s : {Spacing::code, Spacing::error, Spacing::power_of_two}) {
        if (text == spacing_name(s)) return s;
    }
    throw InputError(std::string(field), std::string(text),
                     "unknown spacing; choose code (evenly spaced codes), error (equal error per segment) or "
                     "power-of-two (every 2^s codes, found by a shift)");
}

double LookupTable::interpolate(std::int64_t code) const {
    code = std::clamp(code, code_lo, code_hi);
    if (code <= codes.front()) return t_k.front();
    if (code >= codes.back()) return t_k.back();
    const auto it = std::upper_bound(codes.begin(), codes.end(), code);
    const auto i = static_cast<std::size_t>(it - codes.begin()) - 1;
    const double f = static_cast<double>(code - codes[i]) / static_cast<double>(codes[i + 1] - codes[i]);
    return t_k[i] + (t_k[i + 1] - t_k[i]) * f;
}

namespace {

// The breakpoints placed on a subset of the span's codes (every code up to kPlacementSamples, evenly
// strided beyond, so a 24-bit span stays quick); the error is always measured over every code.
constexpr std::size_t kPlacementSamples = 65537;

struct Samples {
    std::vector<std::int64_t> code;
    std::vector<double> t_k;
};

Samples placement_samples(const CodeMap& map) {
    Samples s;
    const std::size_t n = map.size();
    const std::size_t stride = n <= kPlacementSamples ? 1 : (n - 1 + kPlacementSamples - 2) / (kPlacementSamples - 1);
    for (std::size_t i = 0; i < n; i += stride) {
        s.code.push_back(map.code_lo + static_cast<std::int64_t>(i));
        s.t_k.push_back(map.t_k[i]);
    }
    if (s.code.back() != map.code_hi) {
        s.code.push_back(map.code_hi);
        s.t_k.push_back(map.t_k.back());
    }
    return s;
}

// The largest |chord − T| over the samples strictly between a and b, and where.
struct SegmentError {
    double error;
    std::size_t at;
};

SegmentError segment_error(const Samples& s, std::size_t a, std::size_t b) {
    SegmentError worst{0.0, a};
    const double slope = (s.t_k[b] - s.t_k[a]) / static_cast<double>(s.code[b] - s.code[a]);
    for (std::size_t j = a + 1; j < b; ++j) {
        const double e = std::abs(s.t_k[a] + slope * static_cast<double>(s.code[j] - s.code[a]) - s.t_k[j]);
        if (e > worst.error) worst = {e, j};
    }
    return worst;
}

// Breakpoints (sample indices) placed greedily: each segment runs as far as the target error allows,
// found by doubling then bisecting its length.
std::vector<std::size_t> greedy_breakpoints(const Samples& s, double target) {
    const std::size_t last = s.code.size() - 1;
    std::vector<std::size_t> points{0};
    std::size_t a = 0;
    while (a < last) {
        std::size_t good = a + 1;
        std::size_t bad = last + 1;
        for (std::size_t len = 2;; len *= 2) {
            const std::size_t b = std::min(a + len, last);
            if (segment_error(s, a, b).error <= target) {
                good = b;
                if (b == last) break;
            } else {
                bad = b;
                break;
            }
        }
        while (bad <= last && bad - good > 1) {
            const std::size_t mid = good + (bad - good) / 2;
            (segment_error(s, a, mid).error <= target ? good : bad) = mid;
        }
        points.push_back(good);
        a = good;
    }
    return points;
}

// Equal-error breakpoints: the smallest target error whose greedy placement needs at most
// entries − 1 segments (bisection), then the worst segments split at their largest error until the
// table has exactly `entries` breakpoints.
std::vector<std::int64_t> equal_error_codes(const CodeMap& map, std::size_t entries) {
    const Samples s = placement_samples(map);
    const std::size_t segments = entries - 1;
    double lo = 0.0;
    double hi = segment_error(s, 0, s.code.size() - 1).error;
    std::vector<std::size_t> best = greedy_breakpoints(s, hi);
    for (int iter = 0; iter < 100 && hi - lo > 1e-12 * std::max(hi, 1e-300); ++iter) {
        const double mid = 0.5 * (lo + hi);
        std::vector<std::size_t> p = greedy_breakpoints(s, mid);
        if (p.size() - 1 <= segments) {
            hi = mid;
            best = std::move(p);
        } else {
            lo = mid;
        }
    }
    while (best.size() - 1 < segments) {
        std::size_t worst_seg = 0;
        SegmentError worst{-1.0, 0};
        for (std::size_t i = 0; i + 1 < best.size(); ++i) {
            if (best[i + 1] - best[i] < 2) continue;
            const SegmentError e = segment_error(s, best[i], best[i + 1]);
            if (e.error > worst.error) {
                worst = e;
                worst_seg = i;
            }
        }
        // A segment without error (a straight run) splits in the middle.
        const std::size_t at =
            worst.at > best[worst_seg] ? worst.at : best[worst_seg] + (best[worst_seg + 1] - best[worst_seg]) / 2;
        best.insert(best.begin() + static_cast<std::ptrdiff_t>(worst_seg) + 1, at);
    }
    std::vector<std::int64_t> codes;
    codes.reserve(best.size());
    for (const std::size_t i : best) codes.push_back(s.code[i]);
    return codes;
}

std::vector<std::int64_t> even_codes(const CodeMap& map, std::size_t entries) {
    std::vector<std::int64_t> codes;
    const double last = static_cast<double>(map.size() - 1);
    for (std::size_t i = 0; i < entries; ++i) {
        const double f = static_cast<double>(i) / static_cast<double>(entries - 1);
        codes.push_back(map.code_lo + std::llround(f * last));
    }
    return codes;
}

// The error approx − exact at every code of the span (kept in `error_k` unless it is null), its
// largest magnitude and the first code where that occurs.
template <typename F>
void measure(const CodeMap& map, F approx, std::vector<double>* error_k, double& max_error_k, std::int64_t& at_code) {
    if (error_k != nullptr) error_k->resize(map.size());
    max_error_k = 0.0;
    at_code = map.code_lo;
    for (std::size_t i = 0; i < map.size(); ++i) {
        const std::int64_t code = map.code_lo + static_cast<std::int64_t>(i);
        const double e = approx(code) - map.t_k[i];
        if (error_k != nullptr) (*error_k)[i] = e;
        if (std::abs(e) > max_error_k) {
            max_error_k = std::abs(e);
            at_code = code;
        }
    }
}

}  // namespace

namespace {

void finish(LookupTable& t, const CodeMap& map) {
    measure(
        map, [&t](std::int64_t c) { return t.interpolate(c); }, &t.error_k, t.max_error_k, t.at_code);
}

// Breakpoints needed for 2^shift-code segments from code_lo through code_hi.
std::size_t power_of_two_entries(const CodeMap& map, int shift) {
    const std::int64_t width = map.code_hi - map.code_lo;
    const std::int64_t step = std::int64_t{1} << shift;
    return static_cast<std::size_t>((width + step - 1) / step) + 1;
}

}  // namespace

LookupTable power_of_two_table(const CodeMap& map, int shift) {
    LookupTable t;
    t.spacing = Spacing::power_of_two;
    t.shift = shift;
    t.code_lo = map.code_lo;
    t.code_hi = map.code_hi;
    const std::int64_t step = std::int64_t{1} << shift;
    const std::size_t n = power_of_two_entries(map, shift);
    for (std::size_t i = 0; i < n; ++i) {
        const std::int64_t c = map.code_lo + static_cast<std::int64_t>(i) * step;
        t.codes.push_back(c);
        t.t_k.push_back(map.temperature(c));
    }
    // The last breakpoint lies at or past code_hi: give it the chord through the exact temperature at
    // code_hi, so the last segment interpolates like any other up to the span's end.
    if (n >= 2 && t.codes.back() > map.code_hi) {
        const double t_prev = t.t_k[n - 2];
        const double f = static_cast<double>(step) / static_cast<double>(map.code_hi - t.codes[n - 2]);
        t.t_k.back() = t_prev + (map.t_k.back() - t_prev) * f;
    }
    finish(t, map);
    return t;
}

LookupTable make_table(const CodeMap& map, std::size_t entries, Spacing spacing) {
    const std::size_t limit = std::min(map.size(), kMaxTableEntries);
    if (entries < 2 || entries > limit) {
        throw InputError(Input::entries, std::to_string(entries),
                         "a table needs 2 to " + std::to_string(limit) + " entries (" +
                             (limit == map.size() ? "the span covers " + std::to_string(map.size()) + " codes"
                                                  : std::string("a sane limit")) +
                             ")");
    }
    if (spacing == Spacing::power_of_two) {
        int shift = 0;
        while (shift < 30 && power_of_two_entries(map, shift) > entries) ++shift;
        return power_of_two_table(map, shift);
    }
    LookupTable t;
    t.spacing = spacing;
    t.code_lo = map.code_lo;
    t.code_hi = map.code_hi;
    t.codes = spacing == Spacing::code ? even_codes(map, entries) : equal_error_codes(map, entries);
    for (const std::int64_t c : t.codes) t.t_k.push_back(map.temperature(c));
    finish(t, map);
    return t;
}

}  // namespace rtline
