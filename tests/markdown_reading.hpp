// Reading rtline's Markdown back in tests: the tables tests/ref/markdown_read.py returns, and the
// rounded numbers and resistor cells in them, against the same run's JSON figures.
#pragma once

#include <doctest/doctest.h>

#include <cmath>
#include <cstdlib>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

namespace rtline::test {

using nlohmann::json;

inline const json& table_under(const json& md, const std::string& heading) {
    for (const json& t : md["tables"]) {
        if (t["heading"] == heading) return t;
    }
    FAIL("no table under the heading '" << heading << "'");
    static const json none;
    return none;
}

inline std::size_t column(const json& table, const std::string& header) {
    for (std::size_t i = 0; i < table["header"].size(); ++i) {
        if (table["header"][i] == header) return i;
    }
    FAIL("no column '" << header << "' in " << table["header"].dump());
    return 0;
}

// A resistance in the RKM code of IEC 60062 ("8k2" is 8.2 kΩ, "100" is 100 Ω): the letter stands for
// the decimal point and the multiplier.
inline double rkm(const std::string& text) {
    const std::string letters = "RkMG";
    const double scales[] = {1.0, 1e3, 1e6, 1e9};
    for (std::size_t i = 0; i < letters.size(); ++i) {
        const std::size_t at = text.find(letters[i]);
        if (at == std::string::npos) continue;
        std::string number = text;
        number[at] = '.';
        return std::strtod(number.c_str(), nullptr) * scales[i];
    }
    return std::strtod(text.c_str(), nullptr);
}

// True when `cell`, a number printed rounded ("0.0132", "4498", "1.2e-05", "-" for none), stands
// for `value` (null for none): within half a unit of its last printed digit.
inline bool stands_for(const std::string& cell, const json& value) {
    if (cell == "-") return value.is_null();
    if (value.is_null()) return false;
    const double v = value.get<double>();
    // A resistance in the letter code ("33k621": 33.621 kΩ): half a unit of its last figure.
    const std::size_t letter = cell.find_first_of("RkMG");
    if (letter != std::string::npos) {
        const double scale = cell[letter] == 'k' ? 1e3 : cell[letter] == 'M' ? 1e6 : cell[letter] == 'G' ? 1e9 : 1.0;
        const int figures_after = static_cast<int>(cell.size() - letter - 1);
        return std::abs(rkm(cell) - v) <= 0.5 * scale * std::pow(10.0, -figures_after) * (1.0 + 1e-9);
    }
    char* end = nullptr;
    const double x = std::strtod(cell.c_str(), &end);
    if (end == cell.c_str() || *end != '\0') return false;
    if (cell == "0" || cell == "-0") return std::abs(v) <= 1e-12;
    const std::size_t e = cell.find_first_of("eE");
    const std::string mantissa = cell.substr(0, e);
    const std::size_t dot = mantissa.find('.');
    const int decimals = dot == std::string::npos ? 0 : static_cast<int>(mantissa.size() - dot - 1);
    const int exponent = e == std::string::npos ? 0 : std::atoi(cell.c_str() + e + 1);
    const double half_unit = 0.5 * std::pow(10.0, exponent - decimals);
    return std::abs(x - v) <= half_unit * (1.0 + 1e-9) + 1e-12 * std::abs(v);
}

// Every row of `header`'s column against the reference figures, in order.
inline void check_column(const json& table, const std::string& header, const std::vector<json>& expected) {
    const std::size_t c = column(table, header);
    REQUIRE(table["rows"].size() == expected.size());
    for (std::size_t i = 0; i < expected.size(); ++i) {
        const std::string cell = table["rows"][i][c];
        INFO(header << ", row " << i << ": '" << cell << "' against " << expected[i].dump());
        CHECK(stands_for(cell, expected[i]));
    }
}

// "rs = 8k2, rp = 47k" as name -> ohm.
inline json resistors_of(const std::string& cell) {
    json r = json::object();
    std::size_t at = 0;
    while (at < cell.size()) {
        const std::size_t eq = cell.find(" = ", at);
        const std::size_t comma = cell.find(", ", eq);
        const std::string value = cell.substr(eq + 3, comma == std::string::npos ? std::string::npos : comma - eq - 3);
        r[cell.substr(at, eq - at)] = rkm(value);
        at = comma == std::string::npos ? cell.size() : comma + 2;
    }
    return r;
}

}  // namespace rtline::test
