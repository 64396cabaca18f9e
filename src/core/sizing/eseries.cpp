#include "rtline/eseries.hpp"

#include <cmath>
#include <string>

#include "rtline/error.hpp"

namespace rtline {

namespace {

// IEC 60063:2015, in hundredths.
constexpr int kE3[] = {100, 220, 470};
constexpr int kE6[] = {100, 150, 220, 330, 470, 680};
constexpr int kE12[] = {100, 120, 150, 180, 220, 270, 330, 390, 470, 560, 680, 820};
constexpr int kE24[] = {100, 110, 120, 130, 150, 160, 180, 200, 220, 240, 270, 300,
                        330, 360, 390, 430, 470, 510, 560, 620, 680, 750, 820, 910};

struct Entry {
    Series series;
    std::string_view name;
    int size;
    double tolerance_pct;
};

constexpr Entry kSeries[] = {
    {Series::e3, "E3", 3, 20.0},      {Series::e6, "E6", 6, 20.0},   {Series::e12, "E12", 12, 10.0},
    {Series::e24, "E24", 24, 5.0},    {Series::e48, "E48", 48, 2.0}, {Series::e96, "E96", 96, 1.0},
    {Series::e192, "E192", 192, 0.5},
};

const Entry& entry(Series s) {
    for (const Entry& e : kSeries) {
        if (e.series == s) return e;
    }
    return kSeries[3];
}

// Mantissas in hundredths (integers, so values are exact multiples of the decade).
std::vector<int> hundredths(Series s) {
    switch (s) {
        case Series::e3: return {std::begin(kE3), std::end(kE3)};
        case Series::e6: return {std::begin(kE6), std::end(kE6)};
        case Series::e12: return {std::begin(kE12), std::end(kE12)};
        case Series::e24: return {std::begin(kE24), std::end(kE24)};
        case Series::e48:
        case Series::e96:
        case Series::e192: {
            const int n = entry(s).size;
            const int stride = 192 / n;  // E96 is every second E192 value, E48 every fourth
            std::vector<int> v;
            for (int i = 0; i < 192; i += stride) {
                int h = static_cast<int>(std::lround(100.0 * std::pow(10.0, i / 192.0)));
                if (i == 185) h = 920;  // IEC 60063: the one value that departs from the rule (9.19)
                v.push_back(h);
            }
            return v;
        }
    }
    return {};
}

}  // namespace

std::string_view series_name(Series s) { return entry(s).name; }

Series parse_series(std::string_view text, std::string_view field) {
    for (const Entry& e : kSeries) {
        if (text == e.name || (text.size() == e.name.size() && text[0] == 'e' && text.substr(1) == e.name.substr(1))) {
            return e.series;
        }
    }
    throw InputError(std::string(field), std::string(text),
                     "unknown series; choose E3, E6, E12, E24, E48, E96 or E192");
}

int series_size(Series s) { return entry(s).size; }

double nominal_tolerance_pct(Series s) { return entry(s).tolerance_pct; }

std::vector<double> series_mantissas(Series s) {
    std::vector<double> m;
    for (const int h : hundredths(s)) m.push_back(h / 100.0);
    return m;
}

std::vector<double> series_values(Series s, double lo_ohm, double hi_ohm) {
    std::vector<double> out;
    const std::vector<int> h = hundredths(s);
    // Decades from 10^-2 (0.01 ohm mantissa 1.00) upward; values built as integer hundredths × 10^d.
    for (int d = -2; d <= 12; ++d) {
        for (const int m : h) {
            const double v = d >= 0 ? m * std::pow(10.0, d) / 100.0 : m / (100.0 * std::pow(10.0, -d));
            if (v >= lo_ohm * (1 - 1e-12) && v <= hi_ohm * (1 + 1e-12)) out.push_back(v);
        }
    }
    return out;
}

}  // namespace rtline
