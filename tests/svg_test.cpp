// The --svg pictures: the writer's ticks and escaping, and each command's picture read back with
// Python's XML parser (tests/ref/svg_read.py) — well-formed, self-contained, and drawing the same
// numbers the command reports, at the positions its own tick labels imply.
#include <doctest/doctest.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <filesystem>
#include <string>
#include <vector>

#include "rtline/units.hpp"
#include "support.hpp"
#include "svg.hpp"

namespace {

using Json = nlohmann::json;
using rtline::test::python_ref;
using rtline::test::read_file;
using rtline::test::run_rtline;
using rtline::test::TempPath;
using rtline::test::write_file;
using Args = std::vector<std::string>;
namespace svg = rtline::cli::svg;

Args with(Args a, const Args& more) {
    a.insert(a.end(), more.begin(), more.end());
    return a;
}

// Our own thermistor: beta model R25 = 10 kΩ, B = 3950 K.
const Args kThermistor{"--r25", "10k", "--beta", "3950"};

Json read_svg(const std::string& path) {
    return python_ref("svg_read.py", {{"path", path}});
}

// Runs rtline with --format json and --svg into `picture`; returns the JSON document.
Json run_with_svg(const Args& args, const TempPath& picture) {
    const auto r = run_rtline(with(args, {"--format", "json", "--svg", picture.str()}));
    INFO("stderr: " << r.err);
    REQUIRE(r.code == 0);
    REQUIRE(std::filesystem::exists(picture.str()));
    return Json::parse(r.out);
}

// A tick label as a number: the typographic minus, SI prefixes, or (resistance axes) the letter code.
double label_value(const std::string& label, bool resistance) {
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

AxisMap axis_map(const Json& ticks, bool log = false, bool resistance = false) {
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
const Json& series(const Json& plot, const std::string& part) {
    for (const Json& s : plot["series"]) {
        if (s["label"].get<std::string>().find(part) != std::string::npos) return s;
    }
    FAIL("no series labelled ..." << part << "... in " << plot["series"].dump());
    throw std::logic_error("unreachable");
}

const Json& markers(const Json& plot, const std::string& part) {
    for (const Json& m : plot["markers"]) {
        if (m["label"].get<std::string>().find(part) != std::string::npos) return m;
    }
    FAIL("no markers labelled ..." << part << "...");
    throw std::logic_error("unreachable");
}

std::vector<std::array<double, 2>> vertices(const Json& s) {
    std::vector<std::array<double, 2>> v;
    for (const Json& line : s["polylines"]) {
        for (const Json& p : line) v.push_back({p[0].get<double>(), p[1].get<double>()});
    }
    return v;
}

bool inside(const Json& area, double x, double y) {
    const double slack = 0.01;  // coordinates are written to 0.01 px
    return x >= area["x"].get<double>() - slack && x <= area["x"].get<double>() + area["w"].get<double>() + slack &&
           y >= area["y"].get<double>() - slack && y <= area["y"].get<double>() + area["h"].get<double>() + slack;
}

bool has_text(const Json& texts, const std::string& part) {
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
constexpr double kReadBack = 1e-3;

}  // namespace

// ------------------------------------------------------------------------------------ writer

TEST_CASE("nice_step picks 1, 2 or 5 times a power of ten near range/target") {
    struct Case {
        double lo, hi;
        int target;
        double step;
    };
    // By hand: raw = (hi − lo)/target; its mantissa r in [1, 10) rounds to 1 below 1.5, 2 below 3.5,
    // 5 below 7.5, else 10.
    const Case cases[] = {
        {0.0, 45.0, 8, 5.0},          // raw 5.625 -> 5
        {0.0, 1.0, 4, 0.2},           // raw 0.25 -> mantissa 2.5 -> 2
        {-0.0402, 0.0402, 5, 0.02},   // raw 0.01608 -> mantissa 1.608 -> 2
        {1242.0, 3156.0, 10, 200.0},  // raw 191.4 -> mantissa 1.914 -> 2
        {0.0, 7.0, 1, 5.0},           // raw 7 -> 5
        {0.0, 8.0, 1, 10.0},          // raw 8 -> 10
        {0.0, 1.4, 1, 1.0},           // raw 1.4 -> 1
    };
    for (const Case& c : cases) {
        CAPTURE(c.lo);
        CAPTURE(c.hi);
        CHECK(svg::nice_step(c.lo, c.hi, c.target) == doctest::Approx(c.step).epsilon(1e-12));
    }
}

TEST_CASE("nice_ticks are the step's multiples inside the range, with an exact zero") {
    CHECK(svg::nice_ticks(1242.0, 3156.0, 10) ==
          std::vector<double>{1400, 1600, 1800, 2000, 2200, 2400, 2600, 2800, 3000});  // step 200, 3200 > 3156
    const std::vector<double> t = svg::nice_ticks(-0.0402, 0.0402, 5);
    REQUIRE(t.size() == 5);  // −0.04 … 0.04 in steps of 0.02
    CHECK(t[0] == doctest::Approx(-0.04));
    CHECK(t[2] == 0.0);
    CHECK(std::signbit(t[2]) == false);
    CHECK(t[4] == doctest::Approx(0.04));
    CHECK(svg::nice_ticks(0.0, 45.0, 8).size() == 10);  // 0, 5, …, 45: both ends are ticks
}

TEST_CASE("log_ticks are the chosen mantissas times powers of ten inside the range") {
    CHECK(svg::log_ticks(2140.0, 34200.0, {1, 2, 5}) == std::vector<double>{5000, 10000, 20000});
    CHECK(svg::log_ticks(2140.0, 34200.0, {1, 2, 3, 5}) == std::vector<double>{3000, 5000, 10000, 20000, 30000});
    CHECK(svg::log_ticks(1e-3, 1.0, {1}) == std::vector<double>{0.001, 0.01, 0.1, 1.0});
    CHECK(svg::log_ticks(6.0, 9.0, {1, 2, 5}).empty());  // none inside: the caller falls back to linear ticks
}

TEST_CASE("tick labels: decimals from the step, a real minus sign, SI prefixes, whole codes, the letter code") {
    struct Case {
        double v, step;
        svg::Ticks kind;
        const char* label;
    };
    const Case cases[] = {
        {-0.02, 0.02, svg::Ticks::number,
         "\xE2\x88\x92"
         "0.02"},
        {1e-18, 0.02, svg::Ticks::number, "0.00"},  // rounding noise at zero prints as zero, unsigned
        {45.0, 5.0, svg::Ticks::number, "45"},
        {2.5, 0.5, svg::Ticks::number, "2.5"},
        {1.5e6, 5e5, svg::Ticks::number, "1.5M"},
        {2e-5, 1e-5, svg::Ticks::number, "20\xC2\xB5"},
        {3156.0, 1.0, svg::Ticks::whole, "3156"},
        {20000.0, 20000.0, svg::Ticks::resistance, "20k"},
        {4700.0, 100.0, svg::Ticks::resistance, "4k7"},
        {5e5, 5e5, svg::Ticks::number, "500k"},
        {0.0, 1e6, svg::Ticks::number, "0"},  // no prefix on zero
        {1e6, 1e6, svg::Ticks::resistance, "1M"},
    };
    for (const Case& c : cases) {
        CAPTURE(c.v);
        CHECK(svg::tick_label(c.v, c.step, c.kind) == c.label);
    }
}

TEST_CASE("escape makes the five XML specials and control characters safe") {
    CHECK(svg::escape("a<b & \"c\" 'd' >") == "a&lt;b &amp; &quot;c&quot; &apos;d&apos; &gt;");
    CHECK(svg::escape(std::string("bell\x07", 5)) == "bell ");
    CHECK(svg::escape("10 k\xCE\xA9, 25 \xC2\xB0"
                      "C") ==
          "10 k\xCE\xA9, 25 \xC2\xB0"
          "C");  // UTF-8 passes
}

TEST_CASE("a picture with XML specials in every text parses as XML and keeps the text") {
    svg::Figure f;
    f.title = "R < 10k & \"B\" > 3000 'K'";
    f.notes = {"note <b>not bold</b>"};
    svg::Plot p;
    p.title = "a & b";
    p.x.label = "x <unit>";
    p.y.label = "y & z";
    p.lines.push_back({"line \"one\" <&>", {0, 1, 2}, {0, 1, 4}});
    p.markers.push_back({"mark 'here'", {1}, {1}});
    f.plots.push_back(p);
    const TempPath path(".svg");
    write_file(path.str(), svg::render(f));
    const Json s = read_svg(path.str());
    CHECK(s["title"] == f.title);
    CHECK(has_text(s["texts"], "note <b>not bold</b>"));
    CHECK(s["plots"][0]["x_label"] == "x <unit>");
    CHECK(s["plots"][0]["series"][0]["label"] == "line \"one\" <&>");
    CHECK(s["plots"][0]["legend"][0] == "line \"one\" <&>");
    CHECK(s["scripts"] == 0);
    CHECK(s["links"] == 0);
}

TEST_CASE("a line of 20001 points is thinned per pixel column and keeps its extremes") {
    svg::Figure f;
    svg::Plot p;
    p.x = svg::Axis{"sample", svg::Scale::linear, svg::Ticks::whole};
    p.y = svg::Axis{"value", svg::Scale::linear, svg::Ticks::number};
    std::vector<double> x;
    std::vector<double> y;
    for (int i = 0; i <= 20000; ++i) {
        x.push_back(i);
        y.push_back(std::sin(i * 0.01));
    }
    y[12345] = 5.0;  // one spike up and one down, each a single point
    y[777] = -3.0;
    p.lines.push_back({"wiggle", x, y});
    f.plots.push_back(p);
    const TempPath path(".svg");
    const std::string text = svg::render(f);
    write_file(path.str(), text);
    const Json s = read_svg(path.str());
    const Json& plot = s["plots"][0];
    const auto v = vertices(series(plot, "wiggle"));
    CHECK(v.size() < svg::kMaxVertices);
    CHECK(v.size() <= 2 * static_cast<std::size_t>(plot["area"]["w"].get<double>() + 2));  // two per pixel column
    const AxisMap ym = axis_map(plot["y_ticks"]);
    double top = 1e300;
    double bottom = -1e300;
    for (const auto& p2 : v) {
        top = std::min(top, p2[1]);
        bottom = std::max(bottom, p2[1]);
    }
    const double range = 8.0;  // the data run from −3 to 5
    CHECK(ym.value(top) == doctest::Approx(5.0).epsilon(kReadBack * range / 5.0));
    CHECK(ym.value(bottom) == doctest::Approx(-3.0).epsilon(kReadBack * range / 3.0));
    CHECK(text.find("20001 points drawn as") != std::string::npos);  // the <desc> says it was thinned
}

// -------------------------------------------------------------------------------------- check

TEST_CASE("check --svg: output and the line, nonlinearity and error, one vertex per point at the tick-implied values") {
    const TempPath pic(".svg");
    const Json d = run_with_svg(with({"check"}, with(kThermistor, {"--span", "0:45", "--step", "0.5", "--circuit",
                                                                   "divider-low", "--rs", "5k6"})),
                                pic);
    const Json s = read_svg(pic.str());
    CHECK(s["root"]["tag"] == "{http://www.w3.org/2000/svg}svg");
    CHECK(s["root"]["width"] == "800.00");
    CHECK(s["scripts"] == 0);
    CHECK(s["links"] == 0);
    REQUIRE(s["plots"].size() == 2);
    const std::size_t n = d["points"].size();  // 0 to 45 °C in 0.5 K steps: 91 points
    REQUIRE(n == 91);

    // Top plot: the output polyline.
    const Json& top = s["plots"][0];
    CHECK(top["x_label"] ==
          "temperature (\xC2\xB0"
          "C)");
    CHECK(top["y_label"] == "output (V/V)");
    const auto out = vertices(series(top, "output"));
    REQUIRE(out.size() == n);
    const AxisMap xm = axis_map(top["x_ticks"]);
    const AxisMap ym = axis_map(top["y_ticks"]);
    double lo = 1e300, hi = -1e300;
    for (const Json& p : d["points"]) {
        lo = std::min(lo, p["output"].get<double>());
        hi = std::max(hi, p["output"].get<double>());
    }
    double p_lo = -1e300, p_hi = 1e300;  // pixel y of the smallest and largest output (y grows downwards)
    for (std::size_t i = 0; i < n; ++i) {
        CHECK(inside(top["area"], out[i][0], out[i][1]));
        CHECK_NEAR(xm.value(out[i][0]), d["points"][i]["t_c"].get<double>(), 45.0 * kReadBack);
        p_lo = std::max(p_lo, out[i][1]);
        p_hi = std::min(p_hi, out[i][1]);
    }
    CHECK_NEAR(ym.value(p_lo), lo, (hi - lo) * kReadBack);
    CHECK_NEAR(ym.value(p_hi), hi, (hi - lo) * kReadBack);
    CHECK(top["legend"][1] == "endpoint line");
    // The endpoint line runs through the outputs at the span's ends (Bentley §2.1).
    const auto line = vertices(series(top, "endpoint line"));
    REQUIRE(line.size() == 2);
    CHECK_NEAR(ym.value(line[0][1]), d["points"][0]["output"].get<double>(), (hi - lo) * kReadBack);
    CHECK_NEAR(ym.value(line[1][1]), d["points"][n - 1]["output"].get<double>(), (hi - lo) * kReadBack);

    // Bottom plot: nonlinearity on the left axis, the same points' error in °C on the right.
    const Json& bottom = s["plots"][1];
    CHECK(bottom["y_label"] == "nonlinearity (%FSD)");
    CHECK(bottom["right_label"].get<std::string>().rfind("error (\xC2\xB0"
                                                         "C",
                                                         0) == 0);
    const auto nl = vertices(series(bottom, "nonlinearity against the endpoint line"));
    REQUIRE(nl.size() == n);
    const AxisMap left = axis_map(bottom["y_ticks"]);
    const AxisMap right = axis_map(bottom["right_ticks"]);
    const double nl_max = d["summary"]["max_nonlinearity_pct_fsd"].get<double>();
    for (std::size_t i = 0; i < n; i += 9) {
        const Json& p = d["points"][i];
        CHECK_NEAR(left.value(nl[i][1]), p["nonlinearity_pct_fsd"].get<double>(), nl_max * kReadBack);
        CHECK_NEAR(right.value(nl[i][1]), p["error_c"].get<double>(),
                   d["summary"]["max_error_c"].get<double>() * kReadBack);
    }
    const Json& worst = markers(bottom, "largest |nonlinearity|");
    REQUIRE(worst["points"].size() == 1);
    CHECK(std::abs(left.value(worst["points"][0][1].get<double>())) == doctest::Approx(nl_max).epsilon(kReadBack));
    CHECK_NEAR(xm.value(worst["points"][0][0].get<double>()), d["summary"]["at_t_c"].get<double>(), 45.0 * kReadBack);
}

TEST_CASE("check --svg names the best-fit and minimax lines in the legend and the titles") {
    for (const char* line : {"best-fit", "minimax"}) {
        CAPTURE(line);
        const TempPath pic(".svg");
        (void)run_with_svg(with({"check"}, with(kThermistor, {"--span", "-20:60", "--circuit", "divider-high", "--rs",
                                                              "10k", "--line", line})),
                           pic);
        const Json s = read_svg(pic.str());
        CHECK(s["plots"][0]["legend"][1] == std::string(line) + " line");
        CHECK(s["plots"][1]["legend"][0] == std::string("nonlinearity against the ") + line + " line");
        CHECK(s["title"].get<std::string>().find(std::string("against the ") + line + " line") != std::string::npos);
    }
}

TEST_CASE("check --svg leaves the normal output as it is, on stdout or in -o") {
    const Args run = with(
        {"check"}, with(kThermistor, {"--span", "0:45", "--step", "5", "--circuit", "divider-low", "--rs", "5k6"}));
    const auto plain = run_rtline(run);
    REQUIRE(plain.code == 0);
    const TempPath pic(".svg");
    const auto both = run_rtline(with(run, {"--svg", pic.str()}));
    CHECK(both.code == 0);
    CHECK(both.out == plain.out);
    const TempPath out(".txt");
    const TempPath pic2(".svg");
    const auto to_file = run_rtline(with(run, {"-o", out.str(), "--svg", pic2.str()}));
    CHECK(to_file.code == 0);
    CHECK(to_file.out.empty());
    CHECK(read_file(out.str()) == plain.out);
    CHECK(read_file(pic2.str()).rfind("<?xml", 0) == 0);
}

TEST_CASE("a failed run leaves an existing --svg file as it was and prints nothing") {
    const TempPath pic(".svg");
    write_file(pic.str(), "old picture");
    const auto r = run_rtline(with({"check"}, with(kThermistor, {"--span", "0:45", "--circuit", "divider-low", "--rs",
                                                                 "-5", "--svg", pic.str()})));
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    CHECK(read_file(pic.str()) == "old picture");
}

TEST_CASE("--svg into a folder that does not exist fails naming --svg and writes neither file") {
    const TempPath out(".txt");
    const std::string pic = "/nonexistent-folder-for-rtline/p.svg";
    const auto r = run_rtline(with({"check"}, with(kThermistor, {"--span", "0:45", "--circuit", "divider-low", "--rs",
                                                                 "5k6", "-o", out.str(), "--svg", pic})));
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    CHECK(r.err == "rtline: --svg '" + pic + "': cannot be written (no such folder, or no permission)\n");
    CHECK_FALSE(std::filesystem::exists(out.str()));
}

TEST_CASE("--svg refuses stdout, the -o file, and size --compare") {
    const Args run = with({"check"}, with(kThermistor, {"--span", "0:45", "--circuit", "divider-low", "--rs", "5k6"}));
    const auto dash = run_rtline(with(run, {"--svg", "-"}));
    CHECK(dash.code == 2);
    CHECK(dash.out.empty());
    CHECK(dash.err == "rtline: --svg '-': the picture goes to a file; give a file name (stdout carries the report)\n");
    const TempPath same(".txt");
    const auto clash = run_rtline(with(run, {"-o", same.str(), "--svg", same.str()}));
    CHECK(clash.code == 2);
    CHECK(clash.err == "rtline: --svg '" + same.str() + "': is also the -o file; give the picture its own name\n");
    CHECK_FALSE(std::filesystem::exists(same.str()));
    const TempPath pic(".svg");
    const auto compare =
        run_rtline(with({"size"}, with(kThermistor, {"--span", "0:45", "--compare", "--svg", pic.str()})));
    CHECK(compare.code == 2);
    CHECK(compare.err ==
          "rtline: --svg '" + pic.str() + "': draws one topology's objective; leave out --compare, or --svg\n");
    CHECK_FALSE(std::filesystem::exists(pic.str()));
}

TEST_CASE("--svg comes from a spec file like any flag, and is refused per line of a --jsonl batch") {
    const TempPath pic(".svg");
    const TempPath spec(".json");
    write_file(spec.str(), Json{{"r25", "10k"},
                                {"beta", 3950},
                                {"span", "0:45"},
                                {"circuit", "divider-low"},
                                {"rs", "5k6"},
                                {"svg", pic.str()}}
                               .dump());
    const auto r = run_rtline({"check", "--spec", spec.str()});
    CHECK(r.code == 0);
    CHECK(read_svg(pic.str())["plots"].size() == 2);
    const TempPath pic2(".svg");
    const std::string line = Json{{"r25", "10k"}, {"beta", 3950},     {"span", "0:45"}, {"circuit", "divider-low"},
                                  {"rs", "5k6"},  {"svg", pic2.str()}}
                                 .dump();
    const auto batch = run_rtline({"check", "--jsonl"}, line + "\n");
    CHECK(batch.code == 2);
    CHECK(batch.out ==
          "{\"line\":1,\"error\":\"--svg '': not with --jsonl: every line would draw over the same file\"}\n");
    CHECK_FALSE(std::filesystem::exists(pic2.str()));
}

// --------------------------------------------------------------------------------------- size

TEST_CASE(
    "size --svg marks the continuous optimum at its rs, at the bottom of the curve, and the listed values on it") {
    const TempPath pic(".svg");
    const Json d = run_with_svg(with({"size"}, with(kThermistor, {"--span", "0:45", "--circuit", "divider-low"})), pic);
    const Json s = read_svg(pic.str());
    REQUIRE(s["plots"].size() == 1);
    const Json& plot = s["plots"][0];
    CHECK(plot["x_label"] == "rs (ohm, log scale)");
    CHECK(plot["title"] == "Largest |nonlinearity| against rs");
    const AxisMap xm = axis_map(plot["x_ticks"], true, true);
    const AxisMap ym = axis_map(plot["y_ticks"], true);
    const double rs = d["continuous"]["resistors_ohm"]["rs"].get<double>();
    const double best = d["continuous"]["max_nonlinearity_pct_fsd"].get<double>();
    const Json& opt = markers(plot, "continuous optimum");
    REQUIRE(opt["points"].size() == 1);
    // On a log axis about 1.2 decades over 700 px, 0.01 px is 4e-5 of the value.
    CHECK(xm.value(opt["points"][0][0].get<double>()) == doctest::Approx(rs).epsilon(1e-3));
    CHECK(ym.value(opt["points"][0][1].get<double>()) == doctest::Approx(best).epsilon(1e-3));
    // The curve: 200 log-spaced values plus the optimum itself, whose vertex is the lowest.
    const auto curve = vertices(series(plot, "objective"));
    CHECK(curve.size() == 201);
    const auto lowest =
        std::max_element(curve.begin(), curve.end(), [](const auto& a, const auto& b) { return a[1] < b[1]; });
    CHECK_NEAR((*lowest)[0], opt["points"][0][0].get<double>(), 0.011);
    // The listed E24 values are points of the same objective: each sits on the curve (within the
    // chord between the neighbouring vertices, the curve being convex on either side of its minimum).
    const Json& listed = markers(plot, "best 5 E24 values");
    REQUIRE(listed["points"].size() == d["candidates"].size());
    for (std::size_t i = 0; i < d["candidates"].size(); ++i) {
        const Json& c = d["candidates"][i];
        const double x = listed["points"][i][0].get<double>();
        const double y = listed["points"][i][1].get<double>();
        CHECK(xm.value(x) == doctest::Approx(c["resistors_ohm"]["rs"].get<double>()).epsilon(1e-3));
        CHECK(ym.value(y) == doctest::Approx(c["max_nonlinearity_pct_fsd"].get<double>()).epsilon(1e-3));
        const auto next =
            std::lower_bound(curve.begin(), curve.end(), x, [](const auto& v, double px) { return v[0] < px; });
        REQUIRE(next != curve.begin());
        REQUIRE(next != curve.end());
        const auto& a = *(next - 1);
        const auto& b = *next;
        const double chord = a[1] + (b[1] - a[1]) * (x - a[0]) / (b[0] - a[0]);
        CHECK(std::abs(chord - y) < 3.0);  // px: neighbouring vertices are 3.6 px apart along x
    }
    for (const auto& v : curve) CHECK(inside(plot["area"], v[0], v[1]));
}

TEST_CASE("size --svg for a two-resistor topology plots against the first with the second at its best, and says so") {
    const TempPath pic(".svg");
    const Json d =
        run_with_svg(with({"size"}, with(kThermistor, {"--span", "-20:60", "--circuit", "shunt-divider"})), pic);
    const Json s = read_svg(pic.str());
    const Json& plot = s["plots"][0];
    CHECK(plot["title"] == "Largest |nonlinearity| against rp, rs at its best for each rp");
    CHECK(plot["x_label"] == "rp (ohm, log scale)");
    const AxisMap xm = axis_map(plot["x_ticks"], true, true);
    const AxisMap ym = axis_map(plot["y_ticks"], true);
    const Json& opt = markers(plot, "continuous optimum");
    CHECK(xm.value(opt["points"][0][0].get<double>()) ==
          doctest::Approx(d["continuous"]["resistors_ohm"]["rp"].get<double>()).epsilon(1e-3));
    CHECK(ym.value(opt["points"][0][1].get<double>()) ==
          doctest::Approx(d["continuous"]["max_nonlinearity_pct_fsd"].get<double>()).epsilon(1e-3));
    // No vertex of the curve lies below the optimum (it is the minimum over rp of the best over rs;
    // pixel y grows downwards).
    const double opt_px = opt["points"][0][1].get<double>();
    const auto curve = vertices(series(plot, "objective"));
    for (const auto& v : curve) CHECK(v[1] <= opt_px + 0.011);
    // Each listed pair is at its own rs, so no better than rs at its best: on or above the curve.
    const Json& listed = markers(plot, "E24 combinations");
    REQUIRE(listed["points"].size() == d["candidates"].size());
    for (const Json& m : listed["points"]) {
        const double x = m[0].get<double>();
        const auto next =
            std::lower_bound(curve.begin(), curve.end(), x, [](const auto& v, double px) { return v[0] < px; });
        REQUIRE(next != curve.begin());
        REQUIRE(next != curve.end());
        CHECK(m[1].get<double>() <= std::max((next - 1)->at(1), next->at(1)) + 0.5);
    }
}

namespace {

// True when one of the series' polylines runs across pixel column x.
bool covers(const Json& s, double x) {
    for (const Json& line : s["polylines"]) {
        if (line.front()[0].get<double>() <= x && x <= line.back()[0].get<double>()) return true;
    }
    return false;
}

}  // namespace

TEST_CASE(
    "size --svg with a constraint draws the values that fail it apart, the listed values on the part that meets it") {
    // The greenhouse example: self-heating under 0.2 K at 3.3 V with 1.5 mW/K rules out the continuous optimum.
    const TempPath pic(".svg");
    const Json d =
        run_with_svg(with({"size", "--spec", rtline::test::source_dir() + "/examples/greenhouse-vent.json"}, {}), pic);
    REQUIRE(d["continuous"]["meets_constraints"] == false);
    const Json s = read_svg(pic.str());
    const Json& plot = s["plots"][0];
    const Json& meets = series(plot, "objective, meets the constraints");
    const Json& fails = series(plot, "objective, fails a constraint");
    const Json& listed = markers(plot, "best 3 E24 values");
    REQUIRE(listed["points"].size() == 3);
    for (const Json& m : listed["points"]) CHECK(covers(meets, m[0].get<double>()));
    const Json& opt = markers(plot, "continuous optimum");
    CHECK(opt["label"].get<std::string>().find("(fails --max-self-heating)") != std::string::npos);
    CHECK(covers(fails, opt["points"][0][0].get<double>()));
    CHECK_FALSE(covers(meets, opt["points"][0][0].get<double>()));
}

TEST_CASE("size --svg plots over the whole --range when one is given") {
    const TempPath pic(".svg");
    (void)run_with_svg(
        with({"size"}, with(kThermistor, {"--span", "0:45", "--circuit", "divider-low", "--range", "1k:100k"})), pic);
    const Json s = read_svg(pic.str());
    const Json& plot = s["plots"][0];
    const AxisMap xm = axis_map(plot["x_ticks"], true, true);
    const auto curve = vertices(series(plot, "objective"));
    CHECK(xm.value(curve.front()[0]) == doctest::Approx(1e3).epsilon(1e-3));
    CHECK(xm.value(curve.back()[0]) == doctest::Approx(1e5).epsilon(1e-3));
    CHECK(plot["x_ticks"].front()["label"] == "1k");
    CHECK(plot["x_ticks"].back()["label"] == "100k");
}

// -------------------------------------------------------------------------------------- table

TEST_CASE(
    "table --svg: the error curve's largest value is the reported max_error_c, breakpoints at the table's codes") {
    const TempPath pic(".svg");
    const Json d = run_with_svg(with({"table"}, with(kThermistor, {"--span", "0:45", "--circuit", "divider-low", "--rs",
                                                                   "10k", "--adc-bits", "10", "--degree", "4"})),
                                pic);
    const Json s = read_svg(pic.str());
    const Json& plot = s["plots"][0];
    CHECK(plot["x_label"] == "ADC code (10 bits)");
    CHECK(plot["y_label"] ==
          "error (\xC2\xB0"
          "C)");
    CHECK(plot["top_label"] ==
          "temperature (\xC2\xB0"
          "C)");
    const AxisMap xm = axis_map(plot["x_ticks"]);
    const AxisMap ym = axis_map(plot["y_ticks"]);
    const long lo = d["reading"]["code_lo"].get<long>();
    const long hi = d["reading"]["code_hi"].get<long>();
    const auto table = vertices(series(plot, "table, 17 entries"));
    REQUIRE(table.size() == static_cast<std::size_t>(hi - lo + 1));  // 10 bits: a few hundred codes, none thinned
    CHECK_NEAR(xm.value(table.front()[0]), static_cast<double>(lo), 0.05);
    CHECK_NEAR(xm.value(table.back()[0]), static_cast<double>(hi), 0.05);
    const auto poly = vertices(series(plot, "polynomial, least-squares degree 4"));
    REQUIRE(poly.size() == table.size());
    auto largest = [&](const std::vector<std::array<double, 2>>& v) {
        double m = 0.0;
        for (const auto& p : v) m = std::max(m, std::abs(ym.value(p[1])));
        return m;
    };
    const double table_max = d["max_error_c"].get<double>();
    const double poly_max = d["polynomial"]["max_error_c"].get<double>();
    const double range = 2.2 * std::max(table_max, poly_max);  // the y axis spans about ±max, padded by 5 %
    CHECK_NEAR(largest(table), table_max, range * kReadBack);
    CHECK_NEAR(largest(poly), poly_max, range * kReadBack);
    const Json& breaks = markers(plot, "breakpoints");
    REQUIRE(breaks["points"].size() == d["table"].size());
    for (std::size_t i = 0; i < d["table"].size(); ++i) {
        CHECK_NEAR(xm.value(breaks["points"][i][0].get<double>()), d["table"][i]["code"].get<double>(), 0.05);
        CHECK(std::abs(ym.value(breaks["points"][i][1].get<double>())) < range * kReadBack);  // exact at a breakpoint
    }
    const Json& worst = markers(plot, "largest table error");
    CHECK_NEAR(xm.value(worst["points"][0][0].get<double>()), d["at_code"].get<double>(), 0.05);
}

TEST_CASE("table --svg draws the --max-error target at plus and minus its value") {
    const TempPath pic(".svg");
    (void)run_with_svg(with({"table"}, with(kThermistor, {"--span", "-20:60", "--circuit", "divider-high", "--rs",
                                                          "10k", "--max-error", "0.1", "--spacing", "error"})),
                       pic);
    const Json s = read_svg(pic.str());
    const Json& plot = s["plots"][0];
    const AxisMap ym = axis_map(plot["y_ticks"]);
    const Json& target = series(plot,
                                "target \xC2\xB1"
                                "0.1 \xC2\xB0"
                                "C (--max-error)");
    REQUIRE(target["polylines"].size() == 2);
    const double range = 0.22;  // about ±0.1 °C, padded
    for (const Json& p : target["polylines"][0]) CHECK_NEAR(ym.value(p[1].get<double>()), 0.1, range * kReadBack);
    for (const Json& p : target["polylines"][1]) CHECK_NEAR(ym.value(p[1].get<double>()), -0.1, range * kReadBack);
}

TEST_CASE("table --svg at 16 bits thins the curve but keeps its largest error") {
    const TempPath pic(".svg");
    const Json d =
        run_with_svg(with({"table"}, with(kThermistor, {"--span", "-20:60", "--circuit", "divider-high", "--rs", "10k",
                                                        "--adc-bits", "16", "--entries", "9"})),
                     pic);
    const Json s = read_svg(pic.str());
    const Json& plot = s["plots"][0];
    const AxisMap ym = axis_map(plot["y_ticks"]);
    const auto table = vertices(series(plot, "table, 9 entries"));
    CHECK(table.size() < svg::kMaxVertices);  // tens of thousands of codes, at most two vertices per pixel column
    double m = 0.0;
    for (const auto& p : table) m = std::max(m, std::abs(ym.value(p[1])));
    const double max_c = d["max_error_c"].get<double>();
    CHECK_NEAR(m, max_c, 2.2 * max_c * kReadBack);
    CHECK(read_file(pic.str()).find("points drawn as") != std::string::npos);
}

// ---------------------------------------------------------------------------------------- docs

TEST_CASE("the pictures in docs/images are what the commands in docs/pictures.md write today") {
    const std::string root = rtline::test::source_dir();
    const std::string page = read_file(root + "/docs/pictures.md");
    const std::string exe_dir = std::filesystem::path(RTLINE_EXE).parent_path().string();
    int checked = 0;
    std::size_t start = 0;
    for (std::size_t end; (end = page.find('\n', start)) != std::string::npos; start = end + 1) {
        std::string line = page.substr(start, end - start);
        if (line.rfind("rtline ", 0) != 0) continue;
        const std::string flag = "--svg docs/images/";
        const std::size_t at = line.find(flag);
        REQUIRE(at != std::string::npos);
        const std::string image = line.substr(at + 6, line.find(' ', at + 6) - (at + 6));
        const TempPath fresh(".svg");
        line.replace(at + 6, image.size(), fresh.str());
        INFO("$ " << line);
        const auto r = rtline::test::run_shell("cd '" + root + "' && PATH='" + exe_dir + "':\"$PATH\" && " + line);
        REQUIRE(r.code == 0);
        CHECK(read_file(fresh.str()) == read_file(root + "/" + image));  // re-run the page's commands when this fails
        ++checked;
    }
    CHECK(checked == 3);  // one picture of each kind
}
