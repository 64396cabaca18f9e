// `--format markdown` for check, size, budget and table, read back by tests/ref/markdown_read.py (the
// standard library only, by the GFM spec's pipe-table rules): every table has its header's cell count
// in every row, and every number in it matches the same run's `--format json` figure. The JSON is the
// reference (docs/json.md); the Markdown prints its numbers rounded, so each cell must agree to within
// half a unit of its last printed digit.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdlib>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "rtline/budget.hpp"
#include "markdown_reading.hpp"
#include "support.hpp"

namespace {

using nlohmann::json;
using rtline::test::python_ref;
using rtline::test::run_rtline;
using rtline::test::table_under;
using rtline::test::column;
using rtline::test::stands_for;
using rtline::test::check_column;
using rtline::test::rkm;
using rtline::test::resistors_of;
using Args = std::vector<std::string>;

// Our own thermistor for every case: beta model R25 = 10 kΩ, B = 3950 K.
Args rtline_args(const std::string& command, const Args& more) {
    Args a{command, "--r25", "10k", "--beta", "3950"};
    a.insert(a.end(), more.begin(), more.end());
    return a;
}

Args with(Args a, const Args& more) {
    a.insert(a.end(), more.begin(), more.end());
    return a;
}

struct Page {
    json md;   // the Markdown as markdown_read.py reads it
    json doc;  // the same run's JSON document: the reference
    std::string err;
};

Page run_both(const Args& args) {
    const auto md = run_rtline(with(args, {"--format", "markdown"}));
    INFO("stderr: " << md.err);
    REQUIRE(md.code == 0);
    const auto js = run_rtline(with(args, {"--format", "json"}));
    REQUIRE(js.code == 0);
    return {python_ref("markdown_read.py", {{"text", md.out}}), json::parse(js.out), md.err};
}

std::vector<json> pluck(const json& rows, const std::vector<std::string>& path, double scale = 1.0) {
    std::vector<json> out;
    for (const json& r : rows) {
        json v = r;
        for (const std::string& key : path) v = v.at(key);
        out.push_back(v.is_null() || scale == 1.0 ? v : json(scale * v.get<double>()));
    }
    return out;
}

bool has_caution(const json& md) {
    for (const json& q : md["quotes"]) {
        if (q.get<std::string>().rfind("Caution: rtline designs measurement circuits", 0) == 0) return true;
    }
    return false;
}

}  // namespace

TEST_CASE("markdown_read.py reads an escaped pipe as text and refuses a row of the wrong width") {
    // The GFM spec's own example: "\|" inside a cell is a pipe in the cell, not a cell boundary.
    const json ok = python_ref("markdown_read.py", {{"text", "# t\n\n| a | b |\n| --- | ---: |\n| x \\| y | 2 |\n"}});
    REQUIRE(ok["tables"].size() == 1);
    CHECK(ok["tables"][0]["rows"][0] == json::array({"x | y", "2"}));
    CHECK(ok["tables"][0]["align"] == json::array({"none", "right"}));
    const auto bad =
        rtline::test::run_shell("/usr/bin/python3 " + rtline::test::source_dir() + "/tests/ref/markdown_read.py",
                                json{{"text", "| a | b |\n| --- | --- |\n| x | y | z |\n"}}.dump());
    CHECK(bad.code != 0);
    CHECK(bad.err.find("line 3: a row of 3 cells under a header of 2") != std::string::npos);
}

TEST_CASE("check --format markdown: the points table holds the JSON's points, row by row") {
    const Page p = run_both(rtline_args("check", {"--span", "-10:50", "--step", "5", "--circuit", "divider-low", "--rs",
                                                  "5k6", "--excitation", "3.3", "--dissipation", "2"}));
    CHECK(p.md["headings"][0]["text"] ==
          "rtline check: divider-low, -10 to 50 \xC2\xB0"
          "C");
    const json& t = table_under(p.md, "Points");
    const json& pts = p.doc["points"];
    const std::string deg =
        "\xC2\xB0"
        "C";
    check_column(t, "T (" + deg + ")", pluck(pts, {"t_c"}));
    check_column(t, "R_T (ohm)", pluck(pts, {"r_t_ohm"}));
    check_column(t, "output (V)", pluck(pts, {"output"}));
    check_column(t, "ideal (V)", pluck(pts, {"ideal"}));
    check_column(t, "deviation (V)", pluck(pts, {"deviation"}));
    check_column(t, "nonlinearity (%FSD)", pluck(pts, {"nonlinearity_pct_fsd"}));
    check_column(t, "error (" + deg + ")", pluck(pts, {"error_k"}));
    check_column(t, "power (mW)", pluck(pts, {"power_w"}, 1e3));
    check_column(t, "self-heating (K)", pluck(pts, {"self_heating_k"}));
    // The summary list opens with the JSON's figure.
    bool found = false;
    for (const json& item : p.md["items"]) {
        if (item["label"] != "largest |nonlinearity|") continue;
        const std::string text = item["text"];
        found = stands_for(text.substr(0, text.find(' ')), p.doc["summary"]["max_nonlinearity_pct_fsd"]);
    }
    CHECK(found);
    CHECK(has_caution(p.md));
}

TEST_CASE("size --format markdown: the candidates, their resistors and figures, as the JSON lists them") {
    const Page p = run_both(
        rtline_args("size", {"--span", "-20:60", "--circuit", "shunt-divider", "--series", "E12", "--top", "4"}));
    const json& t = table_under(p.md, "Best E12 values");
    const json& cs = p.doc["candidates"];
    REQUIRE(t["rows"].size() == cs.size());
    const std::size_t r = column(t, "resistors");
    for (std::size_t i = 0; i < cs.size(); ++i) {
        const json got = resistors_of(t["rows"][i][r]);
        for (const auto& item : cs[i]["resistors_ohm"].items()) {
            // a named variable, not a structured binding: clang 14 cannot capture one in INFO's lambda
            const std::string name = item.key();
            const json& ohm = item.value();
            if (!got.contains(name)) continue;  // the table lists the free resistors only
            INFO(name << " in row " << i);
            CHECK(got[name].get<double>() == doctest::Approx(ohm.get<double>()).epsilon(1e-9));
        }
        CHECK(got.size() == 2);
    }
    check_column(t, "nonlinearity (%FSD)", pluck(cs, {"max_nonlinearity_pct_fsd"}));
    check_column(t,
                 "error (\xC2\xB0"
                 "C)",
                 pluck(cs, {"max_error_k"}));
    check_column(t, "span (V/V)", pluck(cs, {"output_span"}));
    check_column(t, "min sens (V/V/K)", pluck(cs, {"sensitivity_per_k", "min"}));
    check_column(t, "max sens (V/V/K)", pluck(cs, {"sensitivity_per_k", "max"}));
    CHECK(has_caution(p.md));
}

TEST_CASE("size --compare --format markdown: one row per topology the JSON compares") {
    const Page p = run_both(rtline_args("size", {"--span", "0:45", "--compare", "--series", "E12"}));
    const json& t = table_under(p.md, "Best of each topology");
    const json& cs = p.doc["comparison"];
    REQUIRE(t["rows"].size() == cs.size());
    for (std::size_t i = 0; i < cs.size(); ++i) CHECK(t["rows"][i][column(t, "circuit")] == cs[i]["topology"]);
    check_column(t, "nonlinearity (%FSD)", pluck(cs, {"max_nonlinearity_pct_fsd"}));
    check_column(t, "span", pluck(cs, {"output_span"}));
}

TEST_CASE("size --format markdown quotes the run's warnings, which still go to stderr") {
    // Over 20 to 22 °C a divider's output moves by far less than 10 % of its excitation.
    const Page p = run_both(
        rtline_args("size", {"--span", "20:22", "--step", "0.5", "--circuit", "divider-low", "--excitation", "3.3"}));
    REQUIRE(p.doc.contains("warnings"));
    const std::string w = p.doc["warnings"][0];
    CHECK(p.err.find("rtline: warning: " + w) != std::string::npos);
    bool quoted = false;
    for (const json& q : p.md["quotes"]) quoted = quoted || q == "Warning: " + w;
    CHECK(quoted);
}

TEST_CASE("budget --format markdown: the error and split tables hold the JSON's points, escaped pipes and all") {
    const Page p = run_both(rtline_args("budget", {"--span", "-20:60", "--step", "10", "--circuit", "divider-low",
                                                   "--rs", "10k", "--adc-bits", "12", "--trials", "4000"}));
    const std::string deg =
        " (\xC2\xB0"
        "C)";
    const json& pts = p.doc["points"];
    const json& e = table_under(p.md, "Error per temperature");
    check_column(e, "T" + deg, pluck(pts, {"t_c"}));
    check_column(e, "worst low" + deg, pluck(pts, {"worst_low_k"}));
    check_column(e, "worst high" + deg, pluck(pts, {"worst_high_k"}));
    check_column(e, "MC mean" + deg, pluck(pts, {"mc", "mean_k"}));
    check_column(e, "MC std" + deg, pluck(pts, {"mc", "std_k"}));
    check_column(e, "0.135 %" + deg, pluck(pts, {"mc", "p0_135_k"}));
    check_column(e, "2.5 %" + deg, pluck(pts, {"mc", "p2_5_k"}));
    check_column(e, "97.5 %" + deg, pluck(pts, {"mc", "p97_5_k"}));
    check_column(e, "99.865 %" + deg, pluck(pts, {"mc", "p99_865_k"}));
    // These two headers carry a '|' each, escaped in the Markdown.
    check_column(e, "|e| 99.7 %" + deg, pluck(pts, {"mc", "p99_7_k"}));
    check_column(e, "MC max |e|" + deg, pluck(pts, {"mc", "max_abs_k"}));

    const json& s = table_under(p.md, "Each cause alone (largest |change of error| over its tolerance)");
    std::size_t causes = 0;
    for (std::size_t c = 0; c < rtline::kCauses; ++c) {
        const auto cause = static_cast<rtline::Cause>(c);
        const std::string key = std::string(rtline::cause_key(cause)) + "_k";
        if (pts[0]["components"][key].is_null()) continue;
        check_column(s, std::string(rtline::cause_label(cause)) + deg, pluck(pts, {"components", key}));
        ++causes;
    }
    CHECK(causes >= 4);  // R25, B, resistors, quantization
    check_column(s,
                 "resolution (\xC2\xB0"
                 "C/LSB)",
                 pluck(pts, {"resolution_k_per_lsb"}));
    CHECK(s["header"].size() == causes + 2);
    CHECK(has_caution(p.md));
}

TEST_CASE("table --format markdown: the breakpoints and the polynomial's coefficients as the JSON has them") {
    const Page p = run_both(rtline_args("table", {"--span", "-20:60", "--circuit", "divider-high", "--rs", "10k",
                                                  "--adc-bits", "10", "--degree", "4"}));
    const json& t = table_under(p.md, "Breakpoints");
    const json& rows = p.doc["table"];
    check_column(t, "code", pluck(rows, {"code"}));
    check_column(t,
                 "T (\xC2\xB0"
                 "C)",
                 pluck(rows, {"t_c"}));
    check_column(t,
                 "T (0.01 \xC2\xB0"
                 "C)",
                 pluck(rows, {"t_fixed"}));
    const json& c = table_under(p.md, "Polynomial");
    std::vector<json> coefficients(p.doc["polynomial"]["coefficients"].begin(),
                                   p.doc["polynomial"]["coefficients"].end());
    check_column(c, "c_i", coefficients);
    REQUIRE(c["rows"].size() == 5);
    CHECK(has_caution(p.md));
}

TEST_CASE("--format markdown leaves --emit c alone: the two are refused together as any format is") {
    const auto r = run_rtline(rtline_args(
        "table", {"--span", "0:45", "--circuit", "divider-low", "--rs", "10k", "--emit", "c", "--format", "markdown"}));
    CHECK(r.code == 2);
    CHECK(r.err == "rtline: --format 'markdown': give either --emit c or --format, not both\n");
    CHECK(r.out.empty());
}

TEST_CASE("check --format markdown quotes the front end's warning as stderr has it, the front end in a code block") {
    const auto r = run_rtline(rtline_args(
        "check", {"--span", "-40:20", "--step", "10", "--circuit", "divider-low", "--rs", "47k", "--adc-bits", "12",
                  "--sample-cap", "15p", "--acquisition", "1u", "--format", "markdown"}));
    REQUIRE(r.code == 0);
    const json md = python_ref("markdown_read.py", {{"text", r.out}});
    CHECK(md["code_blocks"] == 1);
    const std::string prefix = "rtline: warning: ";
    REQUIRE(r.err.rfind(prefix, 0) == 0);
    const std::string w = r.err.substr(prefix.size(), r.err.find('\n') - prefix.size());
    bool quoted = false;
    for (const json& q : md["quotes"]) quoted = quoted || q == "Warning: " + w;
    CHECK(quoted);
}
