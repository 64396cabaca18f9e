// The --svg pictures of check, size and table read back with Python's XML parser
// (tests/ref/svg_read.py): each draws the numbers its command reports, at the positions its own tick
// labels imply; the picture is written only when the run succeeds, beside the normal output.
#include <doctest/doctest.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <filesystem>
#include <string>
#include <vector>

#include "svg_reading.hpp"

using namespace rtline::test::svgread;  // NOLINT(google-build-using-namespace): the test helpers

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
        CHECK_NEAR(right.value(nl[i][1]), p["error_k"].get<double>(),
                   d["summary"]["max_error_k"].get<double>() * kReadBack);
    }
    const Json& worst = markers(bottom, "largest |nonlinearity|");
    REQUIRE(worst["points"].size() == 1);
    CHECK(std::abs(left.value(worst["points"][0][1].get<double>())) == doctest::Approx(nl_max).epsilon(kReadBack));
    CHECK_NEAR(xm.value(worst["points"][0][0].get<double>()), d["summary"]["at_t_c"].get<double>(), 45.0 * kReadBack);
}

TEST_CASE("check --svg names the least-squares and minimax lines in the legend and the titles") {
    for (const char* line : {"least-squares", "minimax"}) {
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
    CHECK(batch.out == "{\"line\":1,\"error\":\"--svg '" + pic2.str() +
                           "': not with --jsonl: every line would draw over the same file\"}\n");
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
    "table --svg: the shipped error curve's largest value is the reported one, breakpoints at the table's codes") {
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
    const auto table = vertices(series(plot, "shipped: the integer code"));
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
    const double table_max = d["shipped"]["max_error_k"].get<double>();
    const double poly_max = d["polynomial"]["max_error_k"].get<double>();
    const double range = 2.2 * std::max(table_max, poly_max);  // the y axis spans about ±max, padded by 5 %
    CHECK_NEAR(largest(table), table_max, range * kReadBack);
    CHECK_NEAR(largest(poly), poly_max, range * kReadBack);
    const Json& breaks = markers(plot, "breakpoints");
    REQUIRE(breaks["points"].size() == d["table"].size());
    for (std::size_t i = 0; i < d["table"].size(); ++i) {
        CHECK_NEAR(xm.value(breaks["points"][i][0].get<double>()), d["table"][i]["code"].get<double>(), 0.05);
        // At a breakpoint only the entry's rounding is left: at most half a unit (0.005 °C).
        CHECK(std::abs(ym.value(breaks["points"][i][1].get<double>())) < 0.005 + range * kReadBack);
    }
    const Json& worst = markers(plot, "largest shipped error");
    CHECK_NEAR(xm.value(worst["points"][0][0].get<double>()), d["shipped"]["at_code"].get<double>(), 0.05);
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
    const auto table = vertices(series(plot,
                                       "shipped: the integer code in 0.01 \xC2\xB0"
                                       "C, 9 entries"));
    CHECK(table.size() < svg::kMaxVertices);  // tens of thousands of codes, at most two vertices per pixel column
    double m = 0.0;
    for (const auto& p : table) m = std::max(m, std::abs(ym.value(p[1])));
    const double max_c = d["shipped"]["max_error_k"].get<double>();
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
    CHECK(checked == 4);  // one picture of each kind
}

TEST_CASE("budget --svg: the signed worst-case and 99.865 % curves reach the reported values") {
    const TempPath pic(".svg");
    const Json d = run_with_svg(with({"budget"}, with(kThermistor, {"--span", "0:45", "--step", "5", "--circuit",
                                                                    "divider-low", "--rs", "9k1", "--trials", "4000"})),
                                pic);
    const Json s = read_svg(pic.str());
    const Json& plot = s["plots"][0];
    CHECK(plot["y_label"] ==
          "error (\xC2\xB0"
          "C)");
    const AxisMap xm = axis_map(plot["x_ticks"]);
    const AxisMap ym = axis_map(plot["y_ticks"]);
    auto largest = [&](const std::string& name) {
        double m = 0.0;
        for (const auto& p : vertices(series(plot, name))) m = std::max(m, ym.value(p[1]));
        return m;
    };
    const double wc = d["summary"]["worst_case_k"].get<double>();
    const double range = 2.2 * wc;  // the y axis spans about ±worst case, padded by 5 %
    double p99865 = -INFINITY;
    for (const Json& p : d["points"]) p99865 = std::max(p99865, p["mc"]["p99_865_k"].get<double>());
    CHECK_NEAR(largest("worst case"), d["summary"]["worst_high_k"].get<double>(), range * kReadBack);
    CHECK_NEAR(largest("99.865 %"), p99865, range * kReadBack);
    const auto wc_line = vertices(series(plot, "worst case"));
    REQUIRE(wc_line.size() == d["points"].size());  // one vertex per temperature of the span
    CHECK_NEAR(xm.value(wc_line.front()[0]), 0.0, 45.0 * kReadBack);
    CHECK_NEAR(xm.value(wc_line.back()[0]), 45.0, 45.0 * kReadBack);
}
