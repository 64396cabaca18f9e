// Reading rtline's SVG pictures back in tests: tests/ref/svg_read.py parses the file with Python's
// XML parser; these helpers turn its tick labels into axis mappings and find series and markers.
#pragma once

#include <doctest/doctest.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <stdexcept>
#include <string>
#include <vector>

#include "rtline/units.hpp"
#include "support.hpp"
#include "svg.hpp"

namespace rtline::test::svgread {

using Json = nlohmann::json;
using rtline::test::python_ref;
using rtline::test::read_file;
using rtline::test::run_rtline;
using rtline::test::TempPath;
using rtline::test::write_file;
using Args = std::vector<std::string>;
namespace svg = rtline::cli::svg;

inline Args with(Args a, const Args& more) {
    a.insert(a.end(), more.begin(), more.end());
    return a;
}

// Our own thermistor: beta model R25 = 10 kΩ, B = 3950 K.
inline const Args kThermistor{"--r25", "10k", "--beta", "3950"};

inline Json read_svg(const std::string& path) { return python_ref("svg_read.py", {{"path", path}}); }

// Runs rtline with --format json and --svg into `picture`; returns the JSON document.
inline Json run_with_svg(const Args& args, const TempPath& picture) {
    const auto r = run_rtline(with(args, {"--format", "json", "--svg", picture.str()}));
    INFO("stderr: " << r.err);
    REQUIRE(r.code == 0);
    REQUIRE(std::filesystem::exists(picture.str()));
    return Json::parse(r.out);
}

// A tick label as a number: the typographic minus, SI prefixes, or (resistance axes) the letter code.
inline double label_value(const std::string& label, bool resistance) {
    std::string s;
    const std::string minus = "\xE2\x88\x92";
    for (std::size_t i = 0; i < label.size();) {
        if (label.compare(i, minus.size(), minus) == 0) {
            s += '-';
            i += minus.size();
        } else {
            s += label[i++];
        }
    }
    if (resistance) return rtline::parse_resistance(s, "tick");
    double scale = 1.0;
    if (s.size() > 2 && s.compare(s.size() - 2, 2, "\xC2\xB5") == 0) {
        scale = 1e-6;
        s.erase(s.size() - 2);
    } else if (!s.empty() && (s.back() == 'k' || s.back() == 'M' || s.back() == 'm')) {
        scale = s.back() == 'k' ? 1e3 : s.back() == 'M' ? 1e6 : 1e-3;
        s.pop_back();
    }
    return std::stod(s) * scale;
}

// The value at a pixel position along an axis, from its first and last tick labels (linear, or in
// log10 of the value on a log axis).
struct AxisMap {
    double p0 = 0.0, v0 = 0.0, p1 = 1.0, v1 = 1.0;
    bool log = false;
    [[nodiscard]] double value(double pos) const {
        const double u = v0 + (pos - p0) * (v1 - v0) / (p1 - p0);
        return log ? std::pow(10.0, u) : u;
    }
};

inline AxisMap axis_map(const Json& ticks, bool log = false, bool resistance = false) {
    REQUIRE(ticks.size() >= 2);
    AxisMap m;
    m.log = log;
    m.p0 = ticks.front()["pos"].get<double>();
    m.p1 = ticks.back()["pos"].get<double>();
    m.v0 = label_value(ticks.front()["label"].get<std::string>(), resistance);
    m.v1 = label_value(ticks.back()["label"].get<std::string>(), resistance);
    if (log) {
        m.v0 = std::log10(m.v0);
        m.v1 = std::log10(m.v1);
    }
    REQUIRE(m.p0 != m.p1);
    return m;
}

// The series whose label contains `part`.
inline const Json& series(const Json& plot, const std::string& part) {
    for (const Json& s : plot["series"]) {
        if (s["label"].get<std::string>().find(part) != std::string::npos) return s;
    }
    FAIL("no series labelled ..." << part << "... in " << plot["series"].dump());
    throw std::logic_error("unreachable");
}

inline const Json& markers(const Json& plot, const std::string& part) {
    for (const Json& m : plot["markers"]) {
        if (m["label"].get<std::string>().find(part) != std::string::npos) return m;
    }
    FAIL("no markers labelled ..." << part << "...");
    throw std::logic_error("unreachable");
}

inline std::vector<std::array<double, 2>> vertices(const Json& s) {
    std::vector<std::array<double, 2>> v;
    for (const Json& line : s["polylines"]) {
        for (const Json& p : line) v.push_back({p[0].get<double>(), p[1].get<double>()});
    }
    return v;
}

inline bool inside(const Json& area, double x, double y) {
    const double slack = 0.01;  // coordinates are written to 0.01 px
    return x >= area["x"].get<double>() - slack && x <= area["x"].get<double>() + area["w"].get<double>() + slack &&
           y >= area["y"].get<double>() - slack && y <= area["y"].get<double>() + area["h"].get<double>() + slack;
}

inline bool has_text(const Json& texts, const std::string& part) {
    return std::any_of(texts.begin(), texts.end(),
                       [&](const Json& t) { return t.get<std::string>().find(part) != std::string::npos; });
}

// |a − b| ≤ tol, with both values in the message.
#define CHECK_NEAR(a, b, tol)                                              \
    do {                                                                   \
        const double got_ = (a);                                           \
        const double want_ = (b);                                          \
        INFO("got " << got_ << ", want " << want_ << " within " << (tol)); \
        CHECK(std::abs(got_ - want_) <= (tol));                            \
    } while (false)

// Pixel positions are written to 0.01 px and the axes are about 250 px (y) and 700 px (x) long, so
// a value read back is good to about 1e-4 of the axis range; 1e-3 of the range leaves room.
inline constexpr double kReadBack = 1e-3;

}  // namespace rtline::test::svgread
