// Every number rtline writes says its unit: the key rule of docs/json.md ("Keys and their units"),
// written once here and checked over every command's JSON documents (with the main option variants) and
// every CSV header. A numeric key either ends in a unit suffix, or is one of the listed keys without a
// suffix (counts, codes, coefficients, values in the circuit's output unit), or sits in an object whose
// key carries the unit for it ("resistors_ohm": {"rs": ...}). `_c` is a point on the Celsius scale
// only, from the listed temperature keys: a temperature difference (an error, a tolerance, a step) is
// `_k`, the one suffix for differences. The list here and the table in docs/json.md must agree.
#include <doctest/doctest.h>

#include <algorithm>
#include <cstdlib>
#include <map>
#include <nlohmann/json.hpp>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "support.hpp"

namespace {

using nlohmann::json;
using rtline::test::read_file;
using rtline::test::run_rtline;
using rtline::test::source_dir;
using rtline::test::TempPath;
using rtline::test::write_file;
using Args = std::vector<std::string>;

// The unit suffixes (docs/json.md). `_k` is kelvin: a B-value, or a temperature difference.
const std::vector<std::string> kSuffixes = {"_ohm",   "_c",         "_k",        "_w",       "_v",   "_a",
                                            "_f",     "_s",         "_lsb",      "_v_per_v", "_pct", "_pct_fsd",
                                            "_per_k", "_ppm_per_k", "_mw_per_k", "_per_code", "_codes", "_codes_per_k"};

// The keys without a suffix, by kind; docs/json.md has the same table.
const std::map<std::string, std::string> kPlainKeys = {
    // counts, bits, codes and indices
    {"schema", "count"},
    {"adc_bits", "count"},
    {"arithmetic_bits", "count"},
    {"bits", "count"},
    {"seed", "count"},
    {"trials", "count"},
    {"entries", "count"},
    {"examined", "count"},
    {"budgeted", "count"},
    {"rank", "count"},
    {"ranked", "count"},
    {"degree", "count"},
    {"parts", "count"},
    {"points", "count"},
    {"code", "code"},
    {"code_lo", "code"},
    {"code_hi", "code"},
    {"at_code", "code"},
    {"first_code", "code"},
    {"last_code", "code"},
    {"open_code", "code"},
    {"short_code", "code"},
    {"margin_codes_above", "code"},
    {"margin_codes_below", "code"},
    {"t_fixed", "code"},
    // ratios and coefficients
    {"sigmas_per_tolerance", "ratio"},
    {"a", "coefficient"},
    {"b", "coefficient"},
    {"c", "coefficient"},
    {"coefficients", "coefficient"},
    // in the circuit's output unit ("output_unit": V/V, V or ohm)
    {"output", "output unit"},
    {"ideal", "output unit"},
    {"deviation", "output unit"},
    {"output_span", "output unit"},
    {"min_output_span", "output unit"},
    {"intercept", "output unit"},
    {"offset", "output unit"},
    {"full_scale", "output unit"},
    {"lsb_size", "output unit"},
    {"reference", "output unit"},
    {"converter_input", "output unit"},
    {"converter_input_at_lo", "output unit"},
    {"converter_input_at_hi", "output unit"},
};

// The `_c` keys: temperatures on the Celsius scale (never a difference, never an output value).
const std::set<std::string> kCelsiusKeys = {"t_c",
                                            "lo_c",
                                            "hi_c",
                                            "t0_c",
                                            "at_t_c",
                                            "centre_c",
                                            "coefficients_from_c",
                                            "offset_from_c",
                                            "r25_at_t_c",
                                            "cable_lo_c",
                                            "cable_hi_c",
                                            "stated_at_c",
                                            "p99_7_at_t_c",
                                            "max_source_at_t_c",
                                            "t_at_code_lo_c",
                                            "t_at_code_hi_c"};

// The output-unit keys a CSV header carries with the unit's suffix (CSV has no "output_unit" field);
// the sensitivity columns are in output units per kelvin.
const std::set<std::string> kCsvOutputStems = {"output", "ideal", "deviation", "output_span", "converter_input"};
const std::set<std::string> kCsvPerKelvinStems = {"sensitivity_min", "sensitivity_max"};

std::string suffix_of(const std::string& key) {
    std::string best;
    for (const std::string& s : kSuffixes) {
        if (key.size() > s.size() && key.compare(key.size() - s.size(), s.size(), s) == 0 && s.size() > best.size()) {
            best = s;
        }
    }
    return best;
}

// Why the numeric key `key`, inside the object held by `parent` ("" at the top), breaks the rule, or
// "" when it keeps it.
std::string judge(const std::string& key, const std::string& parent) {
    const std::string own = suffix_of(key);
    const std::string from_parent = suffix_of(parent);
    if (!own.empty()) {
        if (own == "_c" && kCelsiusKeys.count(key) == 0) {
            return "ends in _c but is not a temperature on the scale (a difference is _k)";
        }
        if (!from_parent.empty()) return "has its own unit inside an object whose key gives one (" + parent + ")";
        return "";
    }
    if (kPlainKeys.count(key) != 0) return "";
    if (!from_parent.empty()) {
        if (from_parent == "_c" && kCelsiusKeys.count(parent) == 0) {
            return "takes _c from " + parent + ", which is not a temperature on the scale";
        }
        return "";
    }
    return "has no unit suffix and is not a listed key without one";
}

// The key names that hold something other than a number somewhere (a null there is not a number left out).
void non_numbers(const json& j, const std::string& key, std::set<std::string>& out) {
    if (j.is_object()) {
        if (!key.empty()) out.insert(key);
        for (auto it = j.begin(); it != j.end(); ++it) non_numbers(it.value(), it.key(), out);
    } else if (j.is_array()) {
        for (const json& item : j) {
            if (!item.is_number() && !item.is_null()) out.insert(key);
            non_numbers(item, key, out);
        }
    } else if (j.is_string() || j.is_boolean()) {
        out.insert(key);
    }
}

// Every numeric (or null) key of `j` that breaks the rule, as "path: why". A design document's
// "flags" are the spec it reads back as: their keys are the command's flag names (units as the flags take them).
void walk(const json& j, const std::string& path, const std::string& key, const std::string& parent,
          const std::set<std::string>& not_numbers, std::vector<std::string>& bad) {
    if (j.is_object()) {
        for (auto it = j.begin(); it != j.end(); ++it) {
            if (path.empty() && it.key() == "flags") continue;
            walk(it.value(), path + "." + it.key(), it.key(), key, not_numbers, bad);
        }
    } else if (j.is_array()) {
        for (const json& item : j) walk(item, path + "[]", key, parent, not_numbers, bad);
    } else if (j.is_number() || (j.is_null() && not_numbers.count(key) == 0)) {
        const std::string why = judge(key, parent);
        if (!why.empty()) bad.push_back(path + ": " + why);
    }
}

// A key that holds an object, or null when it does not apply (a design that meets its target has no
// shortfall; one that falls short is not written, so the object never shows in a document walked here).
const std::set<std::string> kObjectOrNull = {"shortfall"};

// `not_numbers`: the keys that hold something other than a number in any document walked (an absent
// Monte Carlo is "mc": null beside "mc": {...} in another run).
std::vector<std::string> violations(const json& doc, std::set<std::string> not_numbers = {}) {
    non_numbers(doc, "", not_numbers);
    not_numbers.insert(kObjectOrNull.begin(), kObjectOrNull.end());
    std::vector<std::string> bad;
    walk(doc, "", "", "", not_numbers, bad);
    std::sort(bad.begin(), bad.end());
    bad.erase(std::unique(bad.begin(), bad.end()), bad.end());
    return bad;
}

std::string suffix_for_unit(const std::string& output_unit) {
    if (output_unit == "V/V") return "_v_per_v";
    if (output_unit == "V") return "_v";
    if (output_unit == "ohm") return "_ohm";
    return "_?";
}

// Every numeric column of a CSV whose header breaks the rule; the circuit's output unit `unit` must be
// named in the header of each column in output units (a suffix, or an "output_unit" column that names it
// row by row where topologies of different units share the table).
std::vector<std::string> csv_violations(const std::string& csv, const std::string& unit) {
    std::istringstream in(csv);
    std::string line;
    std::getline(in, line);
    std::vector<std::string> headers;
    std::stringstream hs(line);
    for (std::string h; std::getline(hs, h, ',');) headers.push_back(h);
    std::vector<bool> numeric(headers.size(), false);
    while (std::getline(in, line)) {
        std::stringstream cs(line);
        std::size_t c = 0;
        for (std::string cell; std::getline(cs, cell, ',') && c < headers.size(); ++c) {
            char* end = nullptr;
            std::strtod(cell.c_str(), &end);
            if (!cell.empty() && end == cell.c_str() + cell.size()) numeric[c] = true;
        }
    }
    std::vector<std::string> bad;
    const std::string us = suffix_for_unit(unit);
    const bool unit_column = std::find(headers.begin(), headers.end(), "output_unit") != headers.end();
    for (std::size_t c = 0; c < headers.size(); ++c) {
        if (!numeric[c]) continue;
        const std::string& h = headers[c];
        bool named = false;
        for (const std::string& stem : kCsvOutputStems) {
            if (h == stem && !unit_column)
                bad.push_back(h + ": in the output unit without naming it (" + stem + us + ")");
            for (const std::string s : {"_v_per_v", "_v", "_ohm"}) {
                if (h == stem + s && s != us) bad.push_back(h + ": names " + s + " but the output is in " + unit);
            }
            named = named || h == stem || h == stem + us;
        }
        for (const std::string& stem : kCsvPerKelvinStems) {
            if (h == stem + "_per_k") bad.push_back(h + ": per kelvin of the output unit without naming it");
            named = named || h == stem + "_per_k" || h == stem + us + "_per_k";
        }
        if (named) continue;
        if (kPlainKeys.count(h) != 0 && kPlainKeys.at(h) == "output unit" && !unit_column) {
            bad.push_back(h + ": in the output unit without naming it");
            continue;
        }
        const std::string why = judge(h, "");
        if (!why.empty()) bad.push_back(h + ": " + why);
    }
    return bad;
}

Args with(Args a, const Args& more) {
    a.insert(a.end(), more.begin(), more.end());
    return a;
}

const Args kThermistor = {"--r25", "10k", "--beta", "3950"};
const Args kPoints = {"--points", "examples/freezer-room-rt.csv"};

struct Variant {
    std::string name;
    Args args;
    bool csv = true;  // the command also writes CSV for these flags
};

// Our own parts file for design (two plausible thermistors, not any maker's).
const char* const kParts =
    "label,r25_ohm,b_k,r25_tol_pct,b_tol_pct\n"
    "loose-bead,10k,3435,3,3\n"
    "tight-chip,10k,3950,0.5,0.5\n";

std::vector<Variant> variants(const std::string& parts) {
    const Args check = with(with({"check"}, kThermistor), {"--span", "-20:60", "--step", "5"});
    const Args size = with(with({"size"}, kThermistor), {"--span", "0:45", "--step", "5"});
    const Args budget = with(with({"budget"}, kThermistor),
                             {"--span", "0:45", "--step", "5", "--circuit", "divider-low", "--rs", "10k"});
    const Args table = with(with({"table"}, kThermistor), {"--span", "0:45"});
    const Args design = {"--span", "-20:60", "--step", "5", "--max-error", "1", "--adc-bits", "12", "--trials", "500"};
    return {
        {"model", with(with({"model"}, kThermistor), {"--span", "-30:5", "--step", "5"})},
        {"model of a table", with(with({"model"}, kPoints), {"--model", "table", "--span", "-30:5", "--step", "5"})},
        {"fit", with({"fit"}, kPoints)},
        {"fit beta", with({"fit"}, with(kPoints, {"--model", "beta"}))},
        {"check", with(check, {"--circuit", "divider-low", "--rs", "10k"})},
        {"check driven", with(check, {"--circuit", "divider-low", "--rs", "10k", "--excitation", "3.3", "--dissipation",
                                      "1.5", "--lead", "2"})},
        {"check bare", with(check, {"--circuit", "bare"})},
        {"check bridge, loaded",
         with(check, {"--circuit", "bridge", "--r1", "10k", "--load", "100k", "--excitation", "3.3"})},
        {"check front end", with(check, {"--circuit", "bridge", "--r1", "10k", "--excitation", "3.3", "--auto-range",
                                         "--sample-cap", "10p", "--acquisition", "1u", "--amp-output", "100"})},
        {"check current drive",
         with(check, {"--circuit", "bare", "--current", "20u", "--gain", "2", "--adc-ref", "2.5"})},
        {"size", with(size, {"--circuit", "divider-low"})},
        {"size compare", with(size, {"--compare", "--excitation", "3.3", "--dissipation", "1.5", "--max-self-heating",
                                     "0.2", "--max-power", "1m", "--min-span", "0.5"})},
        {"size tradeoff", with(size, {"--circuit", "divider-low", "--tradeoff"})},
        {"size by total error", with(size, {"--circuit", "divider-low", "--objective", "total-error", "--adc-bits",
                                            "12", "--confidence", "95", "--trials", "500"})},
        {"size by resolution",
         with(size, {"--circuit", "divider-low", "--objective", "resolution", "--adc-bits", "12"})},
        {"budget Monte Carlo", with(budget, {"--adc-bits", "12", "--trials", "500"})},
        {"budget every cause",
         with(budget, {"--trials",     "0",    "--excitation", "3.3", "--dissipation", "1.5", "--adc-bits",    "12",
                       "--adc-ref",    "3.0",  "--ref-tol",    "0.5", "--ref-tc",      "50",  "--resistor-tc", "25",
                       "--board-temp", "0:50", "--lead",       "1",   "--lead-tol",    "10",  "--cable-temp",  "0:40",
                       "--adc-offset", "2",    "--adc-gain",   "0.1", "--adc-inl",     "1",   "--adc-error",   "1",
                       "--drift",      "0.5"})},
        {"budget interchangeability and model error",
         with(budget, {"--trials", "500", "--dt-tol", "0.2", "--dt-range", "0:70", "--part-sh", "1.1e-3,2.4e-4,7e-8"})},
        {"table", with(table, {"--circuit", "divider-low", "--rs", "10k", "--adc-bits", "12", "--entries", "17"})},
        {"table least-squares polynomial",
         with(table, {"--circuit", "divider-low", "--rs", "10k", "--adc-bits", "12", "--degree", "3"}), false},
        {"table minimax polynomial",
         with(table,
              {"--circuit", "divider-low", "--rs", "10k", "--adc-bits", "12", "--degree", "3", "--fit", "minimax"}),
         false},
        {"table bridge", with(table, {"--circuit", "bridge", "--r1", "10k", "--auto-range", "--max-error", "0.05"})},
        {"table current drive",
         with(table, {"--circuit", "bare", "--current", "50u", "--adc-ref", "2.5", "--max-error", "0.2"})},
        {"table faults, error spacing", with(table, {"--circuit", "divider-high", "--rs", "10k", "--max-error", "0.1",
                                                     "--spacing", "error", "--fault-margin", "2C"})},
        {"design", with(with({"design"}, kThermistor), design), false},
        {"design with a parts file", with({"design", "--candidates", parts}, design), false},
        {"design on a drive with self-heating",
         with(with(with({"design"}, kThermistor), design),
              {"--excitation", "3.3", "--adc-ref", "excitation", "--dissipation", "1.5", "--max-error", "1.5"}),
         false},
        {"budget of a bridge through an amplifier with its errors",
         with(with({"budget"}, kThermistor),
              {"--span", "0:45", "--step", "5", "--circuit", "bridge", "--r1", "10k", "--auto-range", "--excitation", "3.3", "--adc-ref",
                       "excitation", "--adc-bits", "12", "--trials", "500", "--amp-gain-tol", "0.5", "--amp-offset",
                       "1m", "--amp-offset-drift", "5u", "--amp-bias", "20n", "--amp-offset-current", "5n"})},
        {"size through an amplifier with codes constraints",
         {"size", "--r25", "10k", "--beta", "3950", "--span", "0:50", "--step", "5", "--circuit", "divider-low",
          "--gain", "2", "--adc-bits", "12", "--objective", "resolution", "--min-span", "2500", "--min-sensitivity",
          "20"}},
    };
}

}  // namespace

TEST_CASE("the key rule catches a number without a unit, a difference named _c and an output value named _c") {
    const json doc = {{"tool", "rtline"},
                      {"error", 1.5},
                      {"tol", 5},
                      {"span", {{"lo_c", 0}, {"hi_c", 45}}},
                      {"points", {{{"t_c", 0}, {"error_c", 0.1}, {"output", 0.5}}}},
                      {"line_coefficients", {{"intercept_at_0_c", 0.4}}},
                      {"resistors_ohm", {{"rs", 1e4}, {"rp_ohm", 2e4}}},
                      {"drift_c", {{"min", -0.1}, {"max", 0.1}}},
                      {"spare", nullptr}};
    const std::vector<std::string> want = {
        ".drift_c.max: takes _c from drift_c, which is not a temperature on the scale",
        ".drift_c.min: takes _c from drift_c, which is not a temperature on the scale",
        ".error: has no unit suffix and is not a listed key without one",
        ".line_coefficients.intercept_at_0_c: ends in _c but is not a temperature on the scale (a difference is _k)",
        ".points[].error_c: ends in _c but is not a temperature on the scale (a difference is _k)",
        ".resistors_ohm.rp_ohm: has its own unit inside an object whose key gives one (resistors_ohm)",
        ".spare: has no unit suffix and is not a listed key without one",
        ".tol: has no unit suffix and is not a listed key without one"};
    CHECK(violations(doc) == want);
    CHECK(csv_violations("t_c,output,error_c,line\n0,0.5,0.1,endpoint\n", "V/V") ==
          std::vector<std::string>{"output: in the output unit without naming it (output_v_per_v)",
                                   "error_c: ends in _c but is not a temperature on the scale (a difference is _k)"});
    CHECK(csv_violations("t_c,output_v,sensitivity_min_per_k\n0,0.5,0.01\n", "V") ==
          std::vector<std::string>{"sensitivity_min_per_k: per kelvin of the output unit without naming it"});
    CHECK(csv_violations("t_c,output_v,sensitivity_min_v_per_k,line\n0,0.5,0.01,endpoint\n", "V").empty());
}

TEST_CASE("every number in every command's JSON and CSV says its unit") {
    const TempPath parts(".csv");
    write_file(parts.str(), kParts);
    struct Ran {
        const Variant* variant;
        json doc;
    };
    const std::vector<Variant> all = variants(parts.str());
    std::vector<Ran> ran;
    std::set<std::string> not_numbers;
    for (const Variant& v : all) {
        INFO(v.name);
        // The commands read examples/ relative to the source tree.
        std::string command = "cd '" + source_dir() + "' && '" + RTLINE_EXE + "'";
        for (const std::string& a : with(v.args, {"--format", "json"})) command += " '" + a + "'";
        const auto run = rtline::test::run_shell(command);
        INFO(run.err);
        REQUIRE(run.code == 0);
        ran.push_back({&v, json::parse(run.out)});
        non_numbers(ran.back().doc, "", not_numbers);
    }
    int documents = 0;
    int csvs = 0;
    for (const Ran& r : ran) {
        const Variant& v = *r.variant;
        const json& doc = r.doc;
        INFO(v.name);
        CHECK(doc["schema"] == 2);
        const std::vector<std::string> bad = violations(doc, not_numbers);
        std::string listed;
        for (const std::string& b : bad) listed += b + "\n";
        INFO(listed);
        CHECK(bad.empty());
        ++documents;
        if (!v.csv) continue;
        std::string csv_command = "cd '" + source_dir() + "' && '" + RTLINE_EXE + "'";
        for (const std::string& a : with(v.args, {"--format", "csv"})) csv_command += " '" + a + "'";
        const auto csv = rtline::test::run_shell(csv_command);
        REQUIRE(csv.code == 0);
        std::string unit = "V/V";
        if (doc.contains("circuit") && doc["circuit"].contains("output_unit")) unit = doc["circuit"]["output_unit"];
        const std::vector<std::string> csv_bad = csv_violations(csv.out, unit);
        std::string csv_listed;
        for (const std::string& b : csv_bad) csv_listed += b + "\n";
        INFO(csv.out.substr(0, csv.out.find('\n')));
        INFO(csv_listed);
        CHECK(csv_bad.empty());
        ++csvs;
    }
    CHECK(documents == 29);
    CHECK(csvs == 24);
}

TEST_CASE("docs/json.md lists the same suffixes, keys without a suffix and temperature keys as the rule") {
    // The table under "## Keys and their units": | `key` | kind |, one row a key or suffix.
    const std::string page = read_file(source_dir() + "/docs/json.md");
    const std::size_t at = page.find("## Keys and their units");
    REQUIRE(at != std::string::npos);
    std::istringstream in(page.substr(at));
    std::set<std::string> suffixes;
    std::map<std::string, std::string> plain;
    std::set<std::string> celsius;
    std::string line;
    std::getline(in, line);  // the heading itself
    while (std::getline(in, line)) {
        if (line.rfind("## ", 0) == 0) break;
        if (line.rfind("| `", 0) != 0) continue;
        const std::size_t close = line.find('`', 3);
        const std::string key = line.substr(3, close - 3);
        const std::size_t bar = line.find('|', close);
        std::string kind = line.substr(bar + 1);
        kind = kind.substr(0, kind.find('|'));
        while (!kind.empty() && kind.front() == ' ') kind.erase(0, 1);
        while (!kind.empty() && kind.back() == ' ') kind.pop_back();
        if (kind == "suffix") {
            suffixes.insert(key);
        } else if (kind == "temperature") {
            celsius.insert(key);
        } else {
            plain[key] = kind;
        }
    }
    CHECK(suffixes == std::set<std::string>(kSuffixes.begin(), kSuffixes.end()));
    CHECK(plain == kPlainKeys);
    CHECK(celsius == kCelsiusKeys);
}
