// The `rtline model` and `rtline fit` commands, run as a user runs them. Values are checked against
// the published equations (beta: R = R0·exp(B(1/T − 1/T0)); Steinhart & Hart 1968:
// 1/T = A + B·ln R + C·ln³R) and numpy.linalg.lstsq (tests/ref/sh_lstsq.py). R–T files are written by
// the test from coefficients of our own (a battery pack's sensor), never from a datasheet.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <sstream>
#include <string>
#include <vector>

#include "rtline/thermistor.hpp"
#include "support.hpp"

using nlohmann::json;
using rtline::test::run_rtline;
using rtline::test::TempPath;

namespace {

const rtline::SteinhartHart kPack{1.10e-3, 2.40e-4, 1.00e-7};  // our own coefficients

// An R–T file from kPack at the given °C, with every digit a double carries.
std::string rt_csv(const std::vector<double>& t_c, double scatter = 0.0) {
    std::string text = "# battery pack sensor (generated)\nt_c,r_ohm\n";
    const double pattern[] = {+1.0, -0.7, +0.3, -1.0, +0.6, 0.0, -0.4};
    for (std::size_t i = 0; i < t_c.size(); ++i) {
        const double r =
            rtline::sh_resistance(kPack, rtline::celsius_to_kelvin(t_c[i])) * (1.0 + scatter * pattern[i % 7]);
        char line[80];
        std::snprintf(line, sizeof line, "%.17g,%.17g\n", t_c[i], r);
        text += line;
    }
    return text;
}

std::vector<double> every(double lo, double hi, double step) {
    std::vector<double> t;
    for (double x = lo; x <= hi + 1e-9; x += step) t.push_back(x);
    return t;
}

// Rows of a CSV document (header first), split at commas.
std::vector<std::vector<std::string>> csv_rows(const std::string& text) {
    std::vector<std::vector<std::string>> rows;
    std::istringstream in(text);
    for (std::string line; std::getline(in, line);) {
        std::vector<std::string> fields;
        std::istringstream fs(line);
        for (std::string f; std::getline(fs, f, ',');) fields.push_back(f);
        rows.push_back(fields);
    }
    return rows;
}

// The t_c column of `rtline model … --format csv`.
std::vector<double> csv_temperatures(const std::vector<std::string>& args) {
    std::vector<std::string> full = {"model", "--r25", "10k", "--beta", "3500", "--format", "csv"};
    full.insert(full.end(), args.begin(), args.end());
    const auto r = run_rtline(full);
    REQUIRE(r.code == 0);
    std::vector<double> t;
    const auto rows = csv_rows(r.out);
    for (std::size_t i = 1; i < rows.size(); ++i) t.push_back(std::stod(rows[i][0]));
    return t;
}

json run_json(const std::vector<std::string>& args, const std::string& input = "") {
    const auto r = run_rtline(args, input);
    INFO("stderr: " << r.err);
    REQUIRE(r.code == 0);
    CHECK(r.err.empty());
    return json::parse(r.out);
}

// The beta equation, written out here from docs/sources.md.
double beta_r(double r0, double t0_k, double b, double t_k) { return r0 * std::exp(b * (1.0 / t_k - 1.0 / t0_k)); }

}  // namespace

TEST_CASE("rtline model --format json opens with tool, version, schema and command") {
    const auto r = run_rtline({"model", "--r25", "10k", "--beta", "3500", "--span", "0:10", "--format", "json"});
    REQUIRE(r.code == 0);
    const auto doc = nlohmann::ordered_json::parse(r.out);  // keeps the document's key order
    const std::vector<std::string> first = {"tool", "version", "schema", "command"};
    std::vector<std::string> keys;
    for (auto it = doc.begin(); it != doc.end() && keys.size() < 4; ++it) keys.push_back(it.key());
    CHECK(keys == first);  // docs/json.md: JSON documents open with these four keys
    CHECK(doc["tool"] == "rtline");
    CHECK(doc["version"].is_string());
    CHECK(doc["schema"] == 2);
    CHECK(doc["command"] == "model");
}

TEST_CASE("rtline model --r25 --beta gives the beta equation's R and alpha = -B/T^2 at each point") {
    const json doc =
        run_json({"model", "--r25", "10k", "--beta", "3500", "--span", "-30:5", "--step", "5", "--format", "json"});
    REQUIRE(doc["points"].size() == 8);  // -30, -25, …, 5
    for (const json& p : doc["points"]) {
        REQUIRE(p.size() == 3);
        const double t_k = p["t_c"].get<double>() + 273.15;
        INFO("at " << p["t_c"] << " degC");
        CHECK(p["r_ohm"].get<double>() == doctest::Approx(beta_r(10e3, 298.15, 3500.0, t_k)).epsilon(1e-12));
        CHECK(p["alpha_per_k"].get<double>() == doctest::Approx(-3500.0 / (t_k * t_k)).epsilon(1e-12));
    }
    // Hand calculation (thermistor_test): R(0 °C) = 10 kΩ·exp(3500 × 25/(273.15 × 298.15)) = 29 282.79 Ω.
    CHECK(doc["points"][6]["t_c"].get<double>() == doctest::Approx(0.0));
    CHECK(doc["points"][6]["r_ohm"].get<double>() == doctest::Approx(29282.79).epsilon(1e-7));
}

TEST_CASE("rtline model --t0 states R0 at another temperature") {
    // R0 = 32k6 at 0 °C: at 0 °C the model gives R0 itself (the exponent is zero).
    const json doc =
        run_json({"model", "--r25", "32k6", "--beta", "3500", "--t0", "0", "--span", "0:25", "--format", "json"});
    CHECK(doc["points"][0]["r_ohm"].get<double>() == doctest::Approx(32.6e3).epsilon(1e-14));
    CHECK(doc["model"]["t0_c"].get<double>() == doctest::Approx(0.0));
}

TEST_CASE("rtline model --span -30:5 works as typed and prints a table with units") {
    const auto r = run_rtline({"model", "--r25", "10k", "--beta", "3950", "--span", "-30:5", "--step", "5"});
    CHECK(r.code == 0);
    CHECK(r.err.empty());
    CHECK(r.out.find("T (\xC2\xB0"
                     "C)") != std::string::npos);
    CHECK(r.out.find("R (ohm)") != std::string::npos);
    // The first row is the span's low end, the last its high end.
    const std::size_t first_row = r.out.find("-30.00");
    const std::size_t last_row = r.out.rfind("\n  5.00 ");
    CHECK(first_row != std::string::npos);
    CHECK(last_row != std::string::npos);
    CHECK(first_row < last_row);
    CHECK(r.out.find('\n', last_row + 1) == r.out.size() - 1);
}

TEST_CASE("rtline model's step always includes the span's end") {
    // 0:10 step 3: 0, 3, 6, 9 and the end 10 (a shorter last interval), by the rule.
    CHECK(csv_temperatures({"--span", "0:10", "--step", "3"}) == std::vector<double>{0, 3, 6, 9, 10});
    // A step that divides the span: no extra point just before the end.
    CHECK(csv_temperatures({"--span", "0:10", "--step", "2.5"}) == std::vector<double>{0, 2.5, 5, 7.5, 10});
    // The default step of 1 °C over -30:5: 36 points, the last exactly 5.
    const auto t = csv_temperatures({"--span", "-30:5"});
    CHECK(t.size() == 36);
    CHECK(t.front() == -30.0);
    CHECK(t.back() == 5.0);
    // 0.1 °C steps, which do not add up exactly in binary: 351 points, the end exactly 5.
    const auto fine = csv_temperatures({"--span", "-30:5", "--step", "0.1"});
    CHECK(fine.size() == 351);
    CHECK(fine.back() == 5.0);
}

TEST_CASE("rtline model --format csv has a snake_case header with units") {
    const auto r = run_rtline({"model", "--r25", "10k", "--beta", "3500", "--span", "0:1", "--format", "csv"});
    CHECK(r.code == 0);
    const auto rows = csv_rows(r.out);
    REQUIRE(rows.size() == 3);
    CHECK(rows[0] == std::vector<std::string>{"t_c", "r_ohm", "alpha_per_k", "local_b_k"});
    CHECK(std::stod(rows[1][1]) == doctest::Approx(29282.79).epsilon(1e-7));  // hand calculation above
}

TEST_CASE("rtline model --sh gives resistances that satisfy the Steinhart-Hart equation") {
    const json doc =
        run_json({"model", "--sh", "1.1e-3,2.4e-4,1e-7", "--span", "-55:150", "--step", "5", "--format", "json"});
    CHECK(doc["model"]["kind"] == "steinhart-hart");
    REQUIRE(doc["points"].size() == 42);
    for (const json& p : doc["points"]) {
        const double t_k = p["t_c"].get<double>() + 273.15;
        const double l = std::log(p["r_ohm"].get<double>());
        INFO("at " << p["t_c"] << " degC");
        CHECK((1.1e-3 + 2.4e-4 * l + 1e-7 * l * l * l) * t_k == doctest::Approx(1.0).epsilon(1e-12));
    }
}

TEST_CASE("rtline model --points fits Steinhart-Hart by default and follows the points") {
    TempPath file(".csv");
    rtline::test::write_file(file.str(), rt_csv(every(-40, 120, 10)));
    const json doc =
        run_json({"model", "--points", file.str(), "--span", "-40:120", "--step", "7", "--format", "json"});
    CHECK(doc["model"]["kind"] == "steinhart-hart");
    for (const json& p : doc["points"]) {
        const double t_k = p["t_c"].get<double>() + 273.15;
        // Points generated from kPack: the fit is kPack, so R is kPack's R (Steinhart–Hart closed form).
        CHECK(p["r_ohm"].get<double>() == doctest::Approx(rtline::sh_resistance(kPack, t_k)).epsilon(1e-8));
    }
}

TEST_CASE("rtline model --points --model table passes through the table's points") {
    TempPath file(".csv");
    const std::vector<double> nodes = {-20, -10, 0, 10, 25, 40, 60};
    rtline::test::write_file(file.str(), rt_csv(nodes));
    const json doc = run_json(
        {"model", "--points", file.str(), "--model", "table", "--span", "-20:60", "--step", "5", "--format", "json"});
    CHECK(doc["model"]["kind"] == "table");
    int matched = 0;
    for (const json& p : doc["points"]) {
        const double t_c = p["t_c"].get<double>();
        for (const double n : nodes) {
            if (std::abs(t_c - n) < 1e-9) {
                CHECK(p["r_ohm"].get<double>() ==
                      doctest::Approx(rtline::sh_resistance(kPack, n + 273.15)).epsilon(1e-13));
                ++matched;
            }
        }
    }
    CHECK(matched == 7);  // every node lies on the 5 °C grid from -20
}

TEST_CASE("rtline model --points --model beta fits R0 and B and reads the points from stdin") {
    const json doc = run_json({"model", "--points", "-", "--model", "beta", "--span", "0:50", "--format", "json"},
                              rt_csv(every(0, 50, 5)));
    CHECK(doc["model"]["kind"] == "beta");
    CHECK(doc["model"]["b_k"].get<double>() >
          3000.0);  // kPack's local B runs 3685…3852 K over 0…50 °C (rtline model's local B column; 1/(B + 3C·L²))
    CHECK(doc["model"]["b_k"].get<double>() < 4500.0);
    CHECK(doc["model"]["t0_c"].get<double>() == doctest::Approx(25.0));
}

TEST_CASE("rtline fit prints Steinhart-Hart coefficients, residuals and the largest residual as JSON") {
    TempPath file(".csv");
    rtline::test::write_file(file.str(), rt_csv(every(-40, 125, 5)));
    const json doc = run_json({"fit", "--points", file.str(), "--format", "json"});
    CHECK(doc["tool"] == "rtline");
    CHECK(doc["schema"] == 2);
    CHECK(doc["command"] == "fit");
    CHECK(doc["model"]["kind"] == "steinhart-hart");
    // Points generated from kPack: the least squares recovers it (fit_test has the tolerance argument).
    CHECK(doc["model"]["a"].get<double>() == doctest::Approx(kPack.a).epsilon(1e-9));
    CHECK(doc["model"]["b"].get<double>() == doctest::Approx(kPack.b).epsilon(1e-9));
    CHECK(doc["model"]["c"].get<double>() == doctest::Approx(kPack.c).epsilon(1e-8));
    REQUIRE(doc["residuals"].size() == 34);
    for (const json& r : doc["residuals"]) {
        CHECK(r.contains("t_c"));
        CHECK(r.contains("r_ohm"));
        CHECK(std::abs(r["residual_k"].get<double>()) < 1e-6);  // below 1 µK
    }
    CHECK(doc["max_residual_k"].get<double>() < 1e-6);
}

TEST_CASE("rtline fit on scattered points matches numpy.linalg.lstsq and reports its largest residual") {
    const std::string text = rt_csv(every(-30, 100, 5), 0.002);  // ±0.2 % scatter, our own pattern
    TempPath file(".csv");
    rtline::test::write_file(file.str(), text);
    const json doc = run_json({"fit", "--points", file.str(), "--format", "json"});
    json pts = json::array();
    for (const json& r : doc["residuals"])
        pts.push_back({{"t_k", r["t_c"].get<double>() + 273.15}, {"r_ohm", r["r_ohm"]}});
    const json ref = rtline::test::python_ref("sh_lstsq.py", {{"model", "sh"}, {"points", pts}});
    CHECK(doc["model"]["a"].get<double>() == doctest::Approx(ref["a"].get<double>()).epsilon(1e-9));
    CHECK(doc["model"]["b"].get<double>() == doctest::Approx(ref["b"].get<double>()).epsilon(1e-9));
    CHECK(doc["model"]["c"].get<double>() == doctest::Approx(ref["c"].get<double>()).epsilon(1e-9));
    double largest = 0.0;
    for (const json& r : doc["residuals"]) {
        // residual = T(model at R) − T, the model's forward equation (Steinhart & Hart 1968), in kelvin.
        const double l = std::log(r["r_ohm"].get<double>());
        const double t_model =
            1.0 / (ref["a"].get<double>() + ref["b"].get<double>() * l + ref["c"].get<double>() * l * l * l);
        CHECK(r["residual_k"].get<double>() ==
              doctest::Approx(t_model - (r["t_c"].get<double>() + 273.15)).epsilon(1e-5));
        largest = std::max(largest, std::abs(r["residual_k"].get<double>()));
    }
    CHECK(doc["max_residual_k"].get<double>() == largest);
    CHECK(largest > 1e-3);  // 0.2 % in R is tens of mK: the scatter shows
}

TEST_CASE("rtline fit --model beta prints R0 at T0 and the B-value") {
    TempPath file(".csv");
    rtline::test::write_file(file.str(), rt_csv(every(0, 60, 5)));
    const json doc = run_json({"fit", "--points", file.str(), "--model", "beta", "--format", "json"});
    const json& m = doc["model"];
    CHECK(m["kind"] == "beta");
    CHECK(m["t0_c"].get<double>() == doctest::Approx(25.0));
    // R0 near kPack's R(25 °C) (the beta line cannot pass through every point; 1 % is ample).
    CHECK(m["r0_ohm"].get<double>() == doctest::Approx(rtline::sh_resistance(kPack, 298.15)).epsilon(1e-2));
    REQUIRE(doc["residuals"].size() == 13);
    // R0 and B as the document prints them against numpy.linalg.lstsq on the same weighted problem
    // (tests/ref/sh_lstsq.py, 1/T = a + (1/B)·ln R, rows weighted by T²), from the points as read back.
    json pts = json::array();
    for (const json& r : doc["residuals"])
        pts.push_back({{"t_k", r["t_c"].get<double>() + 273.15}, {"r_ohm", r["r_ohm"]}});
    const json ref = rtline::test::python_ref("sh_lstsq.py", {{"model", "beta"}, {"points", pts}, {"t0_k", 298.15}});
    CHECK(ref["rank"] == 2);
    CHECK(m["b_k"].get<double>() == doctest::Approx(ref["b_k"].get<double>()).epsilon(1e-9));
    CHECK(m["r0_ohm"].get<double>() == doctest::Approx(ref["r0_ohm"].get<double>()).epsilon(1e-9));
    CHECK(doc["max_residual_k"].get<double>() > 0.0);
}

TEST_CASE("rtline fit as text names the model and the largest residual") {
    TempPath file(".csv");
    rtline::test::write_file(file.str(), rt_csv({0, 25, 50}));
    const auto r = run_rtline({"fit", "--points", file.str()});
    CHECK(r.code == 0);
    CHECK(r.out.find("Steinhart-Hart fit to 3 points (exact through three points)") != std::string::npos);
    CHECK(r.out.find("largest |residual|") != std::string::npos);
    CHECK(r.out.find("residual (mK)") != std::string::npos);
}

TEST_CASE("rtline fit still fits when the other model cannot be fitted for comparison") {
    // Steinhart-Hart through three points is exact; the beta fit's R0 at 25 °C would be exp(2.9e7) ohm
    // (see fit_test), so the comparison is left out and the text says why.
    const std::string points = "t_k,r_ohm\n300,1e200\n300.00001,1e100\n300.00003,1\n";
    const auto text = run_rtline({"fit", "--points", "-"}, points);
    CHECK(text.code == 0);
    CHECK(text.out.find("a beta fit to the same points is not possible: the beta fit's R0 at 25") != std::string::npos);
    const auto r = run_rtline({"fit", "--points", "-", "--format", "json"}, points);
    REQUIRE(r.code == 0);
    const json doc = json::parse(r.out);
    CHECK(doc["model"]["kind"] == "steinhart-hart");
    CHECK_FALSE(doc.contains("alternative"));
    CHECK(doc["max_residual_k"].get<double>() < 1e-6);
}

TEST_CASE("-o writes the document to the file and nothing to stdout") {
    TempPath out(".json");
    const auto r =
        run_rtline({"model", "--r25", "10k", "--beta", "3500", "--span", "0:10", "--format", "json", "-o", out.str()});
    CHECK(r.code == 0);
    CHECK(r.out.empty());
    const auto direct = run_rtline({"model", "--r25", "10k", "--beta", "3500", "--span", "0:10", "--format", "json"});
    CHECK(rtline::test::read_file(out.str()) == direct.out);
}

TEST_CASE("a failing run leaves an existing -o file as it was") {
    TempPath out(".json");
    rtline::test::write_file(out.str(), "earlier result\n");
    const auto r = run_rtline({"model", "--r25", "10k", "--beta", "-1", "--span", "0:10", "-o", out.str()});
    CHECK(r.code == 2);
    CHECK(rtline::test::read_file(out.str()) == "earlier result\n");
    const auto f = run_rtline({"fit", "--points", "/nonexistent/rt.csv", "-o", out.str()});
    CHECK(f.code == 2);
    CHECK(rtline::test::read_file(out.str()) == "earlier result\n");
}

TEST_CASE("bad input exits 2 with one line on stderr naming the flag and value, and nothing on stdout") {
    TempPath two(".csv");
    rtline::test::write_file(two.str(), rt_csv({0, 25}));
    TempPath rising(".csv");
    rtline::test::write_file(rising.str(), "t_c,r_ohm\n0,10000\n25,12000\n50,3000\n");
    TempPath table(".csv");
    rtline::test::write_file(table.str(), rt_csv({0, 10, 20}));
    const std::vector<std::string> beta = {"model", "--r25", "10k", "--beta", "3500"};
    auto with = [](std::vector<std::string> base, const std::vector<std::string>& more) {
        base.insert(base.end(), more.begin(), more.end());
        return base;
    };
    struct Case {
        std::vector<std::string> args;
        std::string expected;  // the flag and value the one line must name
    };
    const Case cases[] = {
        {{"model", "--r25", "10x", "--beta", "3500", "--span", "0:10"}, "--r25 '10x'"},
        {{"model", "--r25", "10k", "--beta", "-3", "--span", "0:10"}, "--beta '-3'"},
        {{"model", "--r25", "10k", "--beta", "abc", "--span", "0:10"}, "--beta 'abc'"},
        {with(beta, {"--span", "5:-30"}), "--span '5:-30'"},
        {with(beta, {"--span", "-300:10"}), "--span '-300:10'"},
        {with(beta, {"--span", "0:10", "--step", "0"}), "--step '0'"},
        {with(beta, {"--span", "0:10", "--step", "abc"}), "--step 'abc'"},
        {with(beta, {"--span", "0:10", "--format", "xml"}), "--format 'xml'"},
        {with(beta, {"--span", "0:10", "--t0", "-300"}), "--t0 '-300'"},
        {with(beta, {"--span", "0:10", "--model", "table"}), "--model 'table'"},
        {with(beta, {"--span", "0:10", "--sh", "1e-3,2.4e-4,1e-7"}), "--sh '1e-3,2.4e-4,1e-7'"},
        {{"model", "--sh", "1,2", "--span", "0:10"}, "--sh '1,2'"},
        {{"model", "--sh", "1e-3,2.4e-4,-1e-6", "--span", "-30:5"}, "--span '-30:5'"},
        {{"model", "--points", "/nonexistent/rt.csv", "--span", "0:10"}, "--points '/nonexistent/rt.csv'"},
        {{"model", "--points", table.str(), "--model", "cubic", "--span", "0:10"}, "--model 'cubic'"},
        {{"model", "--points", table.str(), "--model", "table", "--span", "-10:10"}, "--span '-10:10'"},
        {with(beta, {"--span", "0:10", "-o", "/nonexistent/dir/out.json"}), "-o '/nonexistent/dir/out.json'"},
        {{"fit", "--points", table.str(), "--model", "table"}, "--model 'table'"},
        {{"fit", "--points", two.str()}, two.str() + " '2 points'"},
        {{"fit", "--points", rising.str()}, rising.str() + ":3:2 '12000 ohm'"},
        {{"fit", "--points", table.str(), "--t0", "warm"}, "--t0 'warm'"},
    };
    for (const Case& c : cases) {
        std::string line;
        for (const auto& a : c.args) line += a + " ";
        INFO("rtline " << line);
        const auto r = run_rtline(c.args);
        INFO("stderr: " << r.err);
        CHECK(r.code == 2);
        CHECK(r.out.empty());
        CHECK(r.err.rfind("rtline: ", 0) == 0);
        CHECK(r.err.find(c.expected) != std::string::npos);
        CHECK(r.err.find('\n') == r.err.size() - 1);  // exactly one line
    }
}

TEST_CASE("rtline model --help and rtline fit --help each show an example") {
    for (const char* command : {"model", "fit"}) {
        const auto r = run_rtline({command, "--help"});
        INFO(command);
        CHECK(r.code == 0);
        CHECK(r.out.find("Example:") != std::string::npos);
        CHECK(r.out.find(std::string("rtline ") + command + " --") != std::string::npos);
    }
}
