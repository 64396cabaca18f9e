// `rtline check` as a user runs it: its documented JSON keys, the reference line named in every
// format, the bridge null, CSV shape, and one-line errors for bad input (exit 2, nothing on stdout).
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "support.hpp"

namespace {

using nlohmann::json;
using rtline::test::run_rtline;
using Args = std::vector<std::string>;

// Our own thermistor: beta model R25 = 10 kΩ, B = 3950 K (support.hpp).
Args check(const Args& more) { return rtline::test::check_args(more); }

json run_json(const Args& args) {
    const auto r = run_rtline(args);
    INFO("stderr: " << r.err);
    REQUIRE(r.code == 0);
    return json::parse(r.out);
}

std::set<std::string> keys(const json& j) {
    std::set<std::string> k;
    for (const auto& [key, value] : j.items()) k.insert(key);
    return k;
}

// Beta equation, our part: R(t_c) = 10000·exp(3950·(1/T − 1/298.15)).
double r_beta(double t_c) { return 10e3 * std::exp(3950.0 * (1.0 / (t_c + 273.15) - 1.0 / 298.15)); }

std::vector<std::string> lines_of(const std::string& text) {
    std::vector<std::string> out;
    std::istringstream in(text);
    for (std::string l; std::getline(in, l);) out.push_back(l);
    return out;
}

std::vector<std::string> fields(const std::string& line) {
    std::vector<std::string> f;
    std::istringstream in(line);
    for (std::string s; std::getline(in, s, ',');) f.push_back(s);
    if (!line.empty() && line.back() == ',') f.emplace_back();
    return f;
}

}  // namespace

TEST_CASE("check --format json carries exactly the documented keys (docs/json.md, docs/check.md)") {
    const json d = run_json(check({"--span", "0:40", "--step", "10", "--circuit", "divider-low", "--rs", "10k",
                                   "--excitation", "3.3", "--dissipation", "2", "--format", "json"}));
    CHECK(d["tool"] == "rtline");
    CHECK(d["schema"] == 2);
    CHECK(d["command"] == "check");
    CHECK(d["circuit"]["topology"] == "divider-low");
    CHECK(keys(d["circuit"]["resistors_ohm"]) == std::set<std::string>{"rs"});
    CHECK(d["circuit"]["resistors_ohm"]["rs"] == 10000.0);
    CHECK(d["line"] == "endpoint");
    CHECK(keys(d["summary"]) == std::set<std::string>{"max_nonlinearity_pct_fsd", "at_t_c", "max_error_k",
                                                      "output_span", "sensitivity_per_k", "max_power_w",
                                                      "max_self_heating_k"});
    CHECK(keys(d["summary"]["sensitivity_per_k"]) == std::set<std::string>{"min", "max"});
    REQUIRE(d["points"].size() == 5);  // 0, 10, 20, 30, 40 °C
    for (const json& p : d["points"]) {
        for (const char* k :
             {"t_c", "r_t_ohm", "output", "ideal", "deviation", "nonlinearity_pct_fsd", "error_k", "power_w"}) {
            CAPTURE(k);
            CHECK(p[k].is_number());
        }
    }
    CHECK(d["points"][2]["t_c"] == 20.0);
    CHECK(d["points"][2]["r_t_ohm"].get<double>() == doctest::Approx(r_beta(20.0)).epsilon(1e-12));
    // Largest power: V²/(4·rs) where R_T = rs, here at 25 °C, between grid points; 3.3²/40000 bounds it.
    CHECK(d["summary"]["max_power_w"].get<double>() < 3.3 * 3.3 / 40e3);
    CHECK(d["summary"]["max_self_heating_k"].get<double>() ==
          doctest::Approx(d["summary"]["max_power_w"].get<double>() / 2e-3).epsilon(1e-12));
}

TEST_CASE("the JSON resistor keys are the flag names of the circuit's own resistors") {
    const Args base{"--span", "0:40", "--step", "10", "--format", "json"};
    auto resistors = [&](const Args& circuit) {
        Args a = base;
        a.insert(a.end(), circuit.begin(), circuit.end());
        return keys(run_json(check(a))["circuit"]["resistors_ohm"]);
    };
    CHECK(resistors({"--circuit", "bare"}).empty());
    CHECK(resistors({"--circuit", "shunt", "--rp", "22k"}) == std::set<std::string>{"rp"});
    CHECK(resistors({"--circuit", "shunt-divider", "--rs", "10k", "--rp", "22k"}) == std::set<std::string>{"rs", "rp"});
    CHECK(resistors({"--circuit", "bridge", "--r1", "10k"}) == std::set<std::string>{"r1", "r2", "r3"});
    CHECK(resistors({"--circuit", "shunt-bridge", "--r1", "10k", "--rp", "33k"}) ==
          std::set<std::string>{"rp", "r1", "r2", "r3"});
}

TEST_CASE("the reference line is named in text, JSON and CSV output") {
    const Args base{"--span", "0:40", "--step", "10", "--circuit", "divider-high", "--rs", "6k8"};
    auto with = [&](const Args& more) {
        Args a = base;
        a.insert(a.end(), more.begin(), more.end());
        return run_rtline(check(a));
    };
    const auto text = with({});
    CHECK(text.out.find("endpoint line") != std::string::npos);  // the default
    const auto mm = with({"--line", "minimax"});
    CHECK(mm.out.find("minimax line") != std::string::npos);
    CHECK(mm.out.find("against the minimax line") != std::string::npos);
    // least-squares is the line's one name; best-fit, its earlier name, is still read as the same line.
    for (const char* name : {"least-squares", "best-fit"}) {
        CHECK(run_json(check([&] {
                  Args a = base;
                  a.insert(a.end(), {"--line", name, "--format", "json"});
                  return a;
              }()))["line"] == "least-squares");
    }
    const auto csv = lines_of(with({"--line", "minimax", "--format", "csv"}).out);
    const std::vector<std::string> header = fields(csv.at(0));
    const auto col = std::find(header.begin(), header.end(), "line");
    REQUIRE(col != header.end());
    for (std::size_t i = 1; i < csv.size(); ++i) CHECK(fields(csv[i]).at(col - header.begin()) == "minimax");
}

TEST_CASE("check --format csv has a header row and one row per point") {
    const auto r = run_rtline(
        check({"--span", "-10:35", "--step", "5", "--circuit", "divider-low", "--rs", "4k7", "--format", "csv"}));
    REQUIRE(r.code == 0);
    const auto rows = lines_of(r.out);
    REQUIRE(rows.size() == 1 + 10);  // −10, −5, …, 35 °C
    const std::vector<std::string> header = fields(rows[0]);
    for (const char* k : {"t_c", "r_t_ohm", "output_v_per_v", "ideal_v_per_v", "deviation_v_per_v", "nonlinearity_pct_fsd",
                          "error_k"}) {
        CAPTURE(k);
        CHECK(std::find(header.begin(), header.end(), k) != header.end());
    }
    // Ratiometric: no drive, so no power or self-heating figures.
    CHECK(std::find(header.begin(), header.end(), "power_w") == header.end());
    CHECK(std::find(header.begin(), header.end(), "self_heating_k") == header.end());
    for (std::size_t i = 1; i < rows.size(); ++i) CHECK(fields(rows[i]).size() == header.size());
    CHECK(std::stod(fields(rows[1])[0]) == -10.0);
    CHECK(std::stod(fields(rows.back())[0]) == 35.0);
}

TEST_CASE("check's text table carries units in its headers and is aligned") {
    const auto r = run_rtline(check({"--span", "0:40", "--step", "10", "--circuit", "divider-low", "--rs", "10k"}));
    REQUIRE(r.code == 0);
    for (const char* h : {"T (\xC2\xB0"
                          "C)",
                          "R_T (ohm)", "output (V/V)", "nonlinearity (%FSD)",
                          "error (\xC2\xB0"
                          "C)"}) {
        CAPTURE(h);
        CHECK(r.out.find(h) != std::string::npos);
    }
    // The table: the lines from the header to the next blank line share one display width.
    auto width = [](const std::string& s) {
        return std::count_if(s.begin(), s.end(), [](char c) { return (static_cast<unsigned char>(c) & 0xC0) != 0x80; });
    };
    const auto ls = lines_of(r.out);
    const auto head = std::find_if(ls.begin(), ls.end(),
                                   [](const std::string& l) { return l.find("R_T (ohm)") != std::string::npos; });
    REQUIRE(head != ls.end());
    int rows = 0;
    for (auto it = head; it != ls.end() && !it->empty(); ++it, ++rows) CHECK(width(*it) == width(*head));
    CHECK(rows == 1 + 5);  // the header and 0, 10, 20, 30, 40 °C
}

TEST_CASE("a bridge reads zero at --null-at, and by default at the span's low end") {
    const Args base{"--span", "0:40", "--step", "10", "--circuit", "bridge", "--r1", "10k", "--format", "json"};
    auto run = [&](const Args& more) {
        Args a = base;
        a.insert(a.end(), more.begin(), more.end());
        return run_json(check(a));
    };
    const json dflt = run({});
    CHECK(dflt["circuit"]["resistors_ohm"]["r2"] == 10000.0);  // r2 = r1
    CHECK(dflt["circuit"]["resistors_ohm"]["r3"].get<double>() == doctest::Approx(r_beta(0.0)).epsilon(1e-12));
    CHECK(std::abs(dflt["points"][0]["output"].get<double>()) < 1e-15);
    const json at20 = run({"--null-at", "20"});
    CHECK(at20["circuit"]["resistors_ohm"]["r3"].get<double>() == doctest::Approx(r_beta(20.0)).epsilon(1e-12));
    CHECK(std::abs(at20["points"][2]["output"].get<double>()) < 1e-15);
    CHECK(std::abs(at20["points"][0]["output"].get<double>()) > 0.01);
    // A given r2 keeps the null at --null-at: r3 = r2·R_T/r1 (the Wheatstone balance).
    const json r2 = run({"--r2", "12k", "--null-at", "20"});
    CHECK(r2["circuit"]["resistors_ohm"]["r3"].get<double>() == doctest::Approx(1.2 * r_beta(20.0)).epsilon(1e-12));
    CHECK(std::abs(r2["points"][2]["output"].get<double>()) < 1e-15);
    // Given r2 and r3 are kept.
    const json given = run({"--r2", "12k", "--r3", "15k"});
    CHECK(given["circuit"]["resistors_ohm"]["r2"] == 12000.0);
    CHECK(given["circuit"]["resistors_ohm"]["r3"] == 15000.0);
}

namespace {

// Our own R–T table, computed from the beta equation above at 0, 10, …, 60 °C.
std::string table_csv() {
    std::ostringstream s;
    s.precision(10);
    s << "t_c,r_ohm\n";
    for (int t = 0; t <= 60; t += 10) s << t << "," << r_beta(t) << "\n";
    return s.str();
}

}  // namespace

TEST_CASE("a bridge on a table model may null at the table's last temperature") {
    const rtline::test::TempPath table(".csv");
    rtline::test::write_file(table.str(), table_csv());
    const json d = run_json({"check", "--points", table.str(), "--model", "table", "--span", "0:60", "--step", "15",
                             "--circuit", "bridge", "--r1", "10k", "--null-at", "60", "--format", "json"});
    CHECK(std::abs(d["points"][4]["output"].get<double>()) < 1e-15);
}

TEST_CASE("bad input to check is one line on stderr naming the flag and the value, exit 2, nothing on stdout") {
    const rtline::test::TempPath table(".csv");
    rtline::test::write_file(table.str(), table_csv());
    const Args span{"--span", "0:40", "--step", "10"};
    struct Case {
        std::string what;
        Args args;
        std::string flag;
        std::string value;  // as the message quotes it
    };
    const Case cases[] = {
        {"missing resistor", {"--circuit", "divider-low"}, "--rs", "divider-low"},
        {"missing bridge arm", {"--circuit", "bridge"}, "--r1", "bridge"},
        {"zero resistor", {"--circuit", "divider-low", "--rs", "0"}, "--rs", "'0'"},
        {"negative resistor", {"--circuit", "shunt", "--rp", "-4k7"}, "--rp", "'-4k7'"},
        {"zero bridge arm", {"--circuit", "bridge", "--r1", "10k", "--r3", "0"}, "--r3", "'0'"},
        {"resistor the circuit lacks", {"--circuit", "divider-low", "--rs", "10k", "--rp", "1k"}, "--rp", "'1k'"},
        {"zero output span", {"--circuit", "divider-high", "--rs", "1e30"}, "--circuit", "'divider-high'"},
        {"unknown circuit", {"--circuit", "wheatstone"}, "--circuit", "'wheatstone'"},
        {"unknown line", {"--circuit", "divider-low", "--rs", "10k", "--line", "straight"}, "--line", "'straight'"},
        {"voltage and current",
         {"--circuit", "divider-low", "--rs", "10k", "--excitation", "3.3", "--current", "1m"},
         "--current",
         "'1m'"},
        {"voltage on bare", {"--circuit", "bare", "--excitation", "5"}, "--excitation", "'5'"},
        {"voltage on shunt", {"--circuit", "shunt", "--rp", "10k", "--excitation", "5"}, "--excitation", "'5'"},
        {"null with r3 given",
         {"--circuit", "bridge", "--r1", "10k", "--r3", "15k", "--null-at", "20"},
         "--null-at",
         "'20'"},
        {"null on a divider", {"--circuit", "divider-low", "--rs", "10k", "--null-at", "10"}, "--null-at", "'10'"},
        {"zero load", {"--circuit", "divider-low", "--rs", "10k", "--load", "0"}, "--load", "'0'"},
        {"zero current", {"--circuit", "bare", "--current", "0"}, "--current", "'0'"},
        {"negative dissipation", {"--circuit", "bare", "--dissipation", "-1"}, "--dissipation", "'-1'"},
    };
    for (const Case& c : cases) {
        CAPTURE(c.what);
        Args a = span;
        a.insert(a.end(), c.args.begin(), c.args.end());
        const auto r = run_rtline(check(a));
        CAPTURE(r.err);
        CHECK(r.code == 2);
        CHECK(r.out.empty());
        CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
        CHECK(r.err.find(c.flag) != std::string::npos);
        CHECK(r.err.find(c.value) != std::string::npos);
    }
    // A table model's range, and the point limit (10⁶), with their own spans.
    const Args tab{"check", "--points", table.str(), "--model", "table", "--circuit", "bridge", "--r1", "10k"};
    struct Span {
        std::string what;
        Args args;
        std::string flag, value;
    };
    const Span spans[] = {
        {"span beyond the table", {"--span", "-20:40"}, "--span", "'-20:40'"},
        {"null beyond the table", {"--span", "0:40", "--null-at", "80"}, "--null-at", "'80'"},
    };
    for (const Span& c : spans) {
        CAPTURE(c.what);
        Args a = tab;
        a.insert(a.end(), c.args.begin(), c.args.end());
        const auto r = run_rtline(a);
        CAPTURE(r.err);
        CHECK(r.code == 2);
        CHECK(r.out.empty());
        CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
        CHECK(r.err.find(c.flag) != std::string::npos);
        CHECK(r.err.find(c.value) != std::string::npos);
        CHECK(r.err.find("0 to 60") != std::string::npos);  // and says what the table covers
    }
    const auto many =
        run_rtline(check({"--span", "0:40", "--step", "2e-5", "--circuit", "divider-low", "--rs", "10k"}));
    CAPTURE(many.err);
    CHECK(many.code == 2);
    CHECK(many.out.empty());
    CHECK(std::count(many.err.begin(), many.err.end(), '\n') == 1);
    CHECK(many.err.find("--step") != std::string::npos);
    CHECK(many.err.find("1000000 points") != std::string::npos);
}
