// rtline table, the program half: the emitted C header compiled with the system compiler and run over
// every code, the JSON and CSV documents, --max-error searches, and bad input.
#include <doctest/doctest.h>

#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include "support.hpp"

using rtline::test::python_ref;
using rtline::test::read_file;
using rtline::test::run_rtline;
using rtline::test::run_shell;
using rtline::test::TempPath;
using rtline::test::write_file;
using Json = nlohmann::json;

namespace {

// A design as flags and as the input of tests/ref/adc_inverse.py (the same numbers twice).
struct Design {
    std::vector<std::string> flags;
    Json ref;
};

Design divider(const std::string& topology, const std::string& rs, double rs_ohm, int bits, double lo_c, double hi_c) {
    const std::string span = std::to_string(lo_c) + ":" + std::to_string(hi_c);
    return {{"table", "--r25", "10k", "--beta", "3950", "--span", span, "--circuit", topology, "--rs", rs, "--adc-bits",
             std::to_string(bits)},
            {{"r25_ohm", 10e3},
             {"b_k", 3950.0},
             {"t0_c", 25.0},
             {"topology", topology},
             {"rs_ohm", rs_ohm},
             {"adc_bits", bits},
             {"lo_c", lo_c},
             {"hi_c", hi_c}}};
}

std::vector<std::string> with(std::vector<std::string> a, const std::vector<std::string>& more) {
    a.insert(a.end(), more.begin(), more.end());
    return a;
}

Json run_json(const std::vector<std::string>& args) {
    const auto r = run_rtline(with(args, {"--format", "json"}));
    INFO(r.err);
    REQUIRE(r.code == 0);
    return Json::parse(r.out);
}

// What the compiled header gives at one code: the table's counts, and the polynomial when emitted.
struct CReading {
    long code;
    long counts;
    double poly_c;
};

std::string compiler() { return rtline::test::have_program("cc") ? "cc" : "gcc"; }

// Emits the header with `args`, compiles it into a program that prints every code from `from` to
// `to`, runs it and reads the lines back.
std::vector<CReading> run_header(const std::vector<std::string>& args, const std::string& prefix, bool poly, long from,
                                 long to) {
    const TempPath header(".h");
    const TempPath source(".c");
    const TempPath program(".bin");
    const auto emitted = run_rtline(with(args, {"--emit", "c", "--prefix", prefix, "-o", header.str()}));
    INFO(emitted.err);
    REQUIRE(emitted.code == 0);
    std::ostringstream c;
    c << "#include <stdio.h>\n#include \"" << header.str() << "\"\n"
      << "int main(void)\n{\n    long k;\n    for (k = " << from << "L; k <= " << to << "L; ++k) {\n"
      << "        printf(\"%ld %ld %.17g\\n\", k, (long)" << prefix << "temperature((uint32_t)k), "
      << (poly ? prefix + "poly_temperature((uint32_t)k)" : std::string("0.0")) << ");\n    }\n    return 0;\n}\n";
    write_file(source.str(), c.str());
    // The compiler line: the header must compile warning-free as strict C99.
    const auto built =
        run_shell(compiler() + " -std=c99 -Wall -Wextra -Werror -pedantic -o " + program.str() + " " + source.str());
    INFO(built.err);
    REQUIRE(built.code == 0);
    const auto ran = run_shell(program.str());
    REQUIRE(ran.code == 0);
    std::vector<CReading> out;
    std::istringstream in(ran.out);
    CReading r{};
    while (in >> r.code >> r.counts >> r.poly_c) out.push_back(r);
    REQUIRE(out.size() == static_cast<std::size_t>(to - from + 1));
    return out;
}

struct CCase {
    const char* name;
    Design design;
    std::vector<std::string> extra;
    double unit_c;
    bool poly;
};

}  // namespace

TEST_CASE("the emitted C header, compiled and run over every code, stays within the reported error") {
    // Reference temperatures: tests/ref/adc_inverse.py (beta equation, Ohm's law, brentq). The C
    // table may exceed the interpolation error by the fixed-point rounding, at most one unit (each
    // entry rounds by unit/2, and so does the interpolated result); the program must also agree
    // exactly with the fixed-point error rtline reports.
    const CCase cases[] = {
        {"12-bit divider-low, equal error, 0.01 degC, with a polynomial",
         divider("divider-low", "10k", 10e3, 12, 0.0, 45.0),
         {"--spacing", "error", "--degree", "4"},
         0.01,
         true},
        {"10-bit divider-high, even codes, 0.1 degC",
         divider("divider-high", "4k7", 4.7e3, 10, -20.0, 60.0),
         {"--entries", "9", "--unit", "0.1"},
         0.1,
         false},
        {"11-bit divider-low over -40..125, minimax polynomial",
         divider("divider-low", "10k", 10e3, 11, -40.0, 125.0),
         {"--spacing", "error", "--entries", "25", "--degree", "7", "--fit", "minimax"},
         0.01,
         true},
    };
    for (const CCase& k : cases) {
        CAPTURE(k.name);
        const Json doc = run_json(with(k.design.flags, k.extra));
        const Json ref = python_ref("adc_inverse.py", k.design.ref);
        const long lo = ref["code_lo"].get<long>();
        const long hi = ref["code_hi"].get<long>();
        REQUIRE(doc["reading"]["code_lo"].get<long>() == lo);
        REQUIRE(doc["reading"]["code_hi"].get<long>() == hi);
        const long top = (1L << doc["adc_bits"].get<int>()) - 1;
        const auto readings = run_header(with(k.design.flags, k.extra), "probe_", k.poly, 0, top);
        const double max_error = doc["max_error_c"].get<double>();
        double worst = 0.0;
        double worst_poly = 0.0;
        for (const CReading& r : readings) {
            // A code outside the span reads as the nearer end code (the reading convention).
            const long inside = std::min(std::max(r.code, lo), hi);
            const double exact = ref["t_c"][static_cast<std::size_t>(inside - lo)].get<double>();
            const double err = std::abs(static_cast<double>(r.counts) * k.unit_c - exact);
            CHECK(err <= max_error + k.unit_c + 1e-9);
            worst = std::max(worst, err);
            if (k.poly) worst_poly = std::max(worst_poly, std::abs(r.poly_c - exact));
        }
        CHECK(worst == doctest::Approx(doc["fixed_point"]["max_error_c"].get<double>()).epsilon(1e-9));
        CHECK(readings.front().counts == doc["table"].front()["t_fixed"].get<long>());
        CHECK(readings.back().counts == doc["table"].back()["t_fixed"].get<long>());
        if (k.poly) CHECK(worst_poly == doctest::Approx(doc["polynomial"]["max_error_c"].get<double>()).epsilon(1e-9));
    }
}

TEST_CASE("a wide ADC's header holds its codes as uint32_t and a hot span's temperatures as int32_t") {
    // uint16_t holds codes below 2^16 and int16_t counts up to 32767 (C99 §7.18.1.1); 17 bits and
    // 350 °C (35000 counts of 0.01 °C) need the wider types. A 1 °C span keeps the 17-bit run short.
    Design wide = divider("divider-low", "10k", 10e3, 17, 20.0, 21.0);
    const Json doc = run_json(wide.flags);
    const long lo = doc["reading"]["code_lo"].get<long>();
    const long hi = doc["reading"]["code_hi"].get<long>();
    const Json ref = python_ref("adc_inverse.py", wide.ref);
    const auto readings = run_header(wide.flags, "w_", false, lo - 5, hi + 5);
    for (const CReading& r : readings) {
        const long inside = std::min(std::max(r.code, lo), hi);
        const double exact = ref["t_c"][static_cast<std::size_t>(inside - lo)].get<double>();
        CHECK(std::abs(static_cast<double>(r.counts) * 0.01 - exact) <= doc["max_error_c"].get<double>() + 0.01 + 1e-9);
    }
    const TempPath h(".h");
    REQUIRE(run_rtline(with(wide.flags, {"--emit", "c", "-o", h.str()})).code == 0);
    CHECK(read_file(h.str()).find("static const uint32_t ntc_code[NTC_ENTRIES]") != std::string::npos);

    const auto hot = run_rtline({"table", "--r25", "1M", "--beta", "4500", "--span", "250:350", "--circuit",
                                 "divider-low", "--rs", "200", "--emit", "c"});
    REQUIRE(hot.code == 0);
    CHECK(hot.out.find("static const int32_t ntc_temp[NTC_ENTRIES]") != std::string::npos);
}

TEST_CASE("the header alone compiles cleanly in a file that uses none of it") {
    // Unused `static const` arrays and functions must not warn under -Wall -Wextra -Werror -pedantic.
    const TempPath header(".h");
    const TempPath source(".c");
    const TempPath object(".o");
    Design d = divider("shunt-divider", "4k7", 4.7e3, 12, 0.0, 50.0);
    REQUIRE(run_rtline(with(d.flags, {"--rp", "33k", "--degree", "3", "--emit", "c", "-o", header.str()})).code == 0);
    write_file(source.str(), "#include \"" + header.str() + "\"\ntypedef int unused_translation_unit;\n");
    const auto built =
        run_shell(compiler() + " -std=c99 -Wall -Wextra -Werror -pedantic -c -o " + object.str() + " " + source.str());
    INFO(built.err);
    CHECK(built.code == 0);
}

TEST_CASE("the reported table error is the largest over every code, as numpy.interp finds it") {
    // Reference: tests/ref/adc_inverse.py interpolates the JSON table with numpy.interp at every code.
    Design d = divider("divider-low", "10k", 10e3, 12, -40.0, 125.0);
    for (const char* spacing : {"code", "error"}) {
        const Json doc = run_json(with(d.flags, {"--spacing", spacing, "--entries", "17"}));
        Json in = d.ref;
        in["table"] = doc["table"];
        const Json ref = python_ref("adc_inverse.py", in);
        CAPTURE(spacing);
        CHECK(doc["max_error_c"].get<double>() ==
              doctest::Approx(ref["table_max_error_c"].get<double>()).epsilon(1e-9));
        CHECK(doc["at_code"].get<long>() == ref["table_at_code"].get<long>());
    }
}

TEST_CASE("the JSON document states the reading convention, ADC width, spacing and unit") {
    const Json doc = run_json(with(divider("divider-high", "10k", 10e3, 10, 0.0, 50.0).flags,
                                   {"--spacing", "error", "--unit", "0.1", "--degree", "2", "--fit", "minimax"}));
    CHECK(doc["tool"] == "rtline");
    CHECK(doc["schema"] == 1);
    CHECK(doc["command"] == "table");
    CHECK(doc["adc_bits"] == 10);
    CHECK(doc["spacing"] == "error");
    CHECK(doc["unit_c"].get<double>() == 0.1);
    CHECK(doc["reading"]["convention"].get<std::string>().rfind("ratiometric: code k is the output ratio k/1024", 0) ==
          0);
    CHECK(doc["reading"]["temperature_rises_with_code"] == true);  // divider-high: R_T falls, the output rises
    CHECK(doc["table"].size() == 17);
    CHECK(doc["entries"] == 17);
    for (const Json& row : doc["table"]) {
        CHECK(row.size() == 3);
        CHECK(row["t_fixed"].get<long>() == std::lround(row["t_c"].get<double>() * 10.0));
    }
    CHECK(doc["polynomial"]["degree"] == 2);
    CHECK(doc["polynomial"]["fit"] == "minimax");
    CHECK(doc["polynomial"]["coefficients"].size() == 3);
}

TEST_CASE("CSV carries one row per breakpoint under snake_case headers") {
    const auto r = run_rtline(
        with(divider("divider-low", "10k", 10e3, 10, 0.0, 45.0).flags, {"--entries", "5", "--format", "csv"}));
    REQUIRE(r.code == 0);
    std::istringstream in(r.out);
    std::string line;
    std::getline(in, line);
    CHECK(line == "code,t_c,t_fixed");
    int rows = 0;
    while (std::getline(in, line)) ++rows;
    CHECK(rows == 5);
}

TEST_CASE("--max-error finds the smallest table: one entry fewer misses it") {
    const Design d = divider("divider-low", "10k", 10e3, 12, -20.0, 60.0);
    for (const char* spacing : {"code", "error"}) {
        const Json doc = run_json(with(d.flags, {"--spacing", spacing, "--max-error", "0.05"}));
        const int entries = doc["entries"].get<int>();
        CAPTURE(spacing);
        CHECK(doc["max_error_c"].get<double>() <= 0.05);
        const Json fewer = run_json(with(d.flags, {"--spacing", spacing, "--entries", std::to_string(entries - 1)}));
        CHECK(fewer["max_error_c"].get<double>() > 0.05);
    }
    const Json poly = run_json(with(d.flags, {"--entries", "9", "--fit", "minimax", "--max-error", "0.05"}));
    const int degree = poly["polynomial"]["degree"].get<int>();
    CHECK(poly["polynomial"]["max_error_c"].get<double>() <= 0.05);
    const Json lower = run_json(with(d.flags, {"--degree", std::to_string(degree - 1), "--fit", "minimax"}));
    CHECK(lower["polynomial"]["max_error_c"].get<double>() > 0.05);
}

TEST_CASE("an error nothing can meet exits 1 with a message and nothing on stdout") {
    const Design d = divider("divider-low", "10k", 10e3, 12, 0.0, 45.0);
    const auto table = run_rtline(with(d.flags, {"--max-error", "1e-9"}));
    CHECK(table.code == 1);
    CHECK(table.out.empty());
    CHECK(table.err.rfind("rtline: no table of up to 1024 entries meets 1e-09 \xC2\xB0"
                          "C",
                          0) == 0);
    // Over −40 to 125 °C even degree 12 misses 0.01 °C (it gives 0.11 °C, measured).
    const Design wide = divider("divider-low", "10k", 10e3, 12, -40.0, 125.0);
    const auto poly = run_rtline(with(wide.flags, {"--entries", "9", "--fit", "minimax", "--max-error", "0.01"}));
    CHECK(poly.code == 1);
    CHECK(poly.out.empty());
    CHECK(poly.err.rfind("rtline: no polynomial of degree up to 12 meets 0.01 \xC2\xB0"
                         "C",
                         0) == 0);
}

TEST_CASE("a failed run leaves an existing -o file as it was") {
    const TempPath out(".h");
    write_file(out.str(), "previous\n");
    const auto r = run_rtline(with(divider("divider-low", "10k", 10e3, 12, 0.0, 45.0).flags,
                                   {"--entries", "1", "--emit", "c", "-o", out.str()}));
    CHECK(r.code == 2);
    CHECK(read_file(out.str()) == "previous\n");
}

TEST_CASE("bad input exits 2 with one line naming the flag and the value") {
    const std::vector<std::string> base = {"table", "--r25",     "10k",         "--beta", "3950", "--span",
                                           "0:45",  "--circuit", "divider-low", "--rs",   "10k"};  // 12 bits by default
    struct Bad {
        std::vector<std::string> args;
        std::string message;
    };
    const std::string deg =
        "\xC2\xB0"
        "C";
    const Bad cases[] = {
        {{"--adc-bits", "0"}, "--adc-bits '0': an ADC has 1 to 24 bits"},
        {{"--adc-bits", "25"}, "--adc-bits '25': an ADC has 1 to 24 bits"},
        {{"--adc-bits", "12.5"}, "--adc-bits '12.5': a bit count must be a whole number"},
        {{"--adc-bits", "1"},
         "--adc-bits '1': the span's output swing (0.935 LSB) covers fewer than two codes; use more "
         "bits or a circuit with more swing"},
        {{"--entries", "1"}, "--entries '1': a table needs at least 2 entries"},
        {{"--entries", "5000"}, "--entries '5000': a table needs 2 to 1915 entries (the span covers 1915 codes)"},
        {{"--degree", "0"}, "--degree '0': choose a degree from 1 to 12"},
        {{"--degree", "13"}, "--degree '13': choose a degree from 1 to 12"},
        {{"--spacing", "log"},
         "--spacing 'log': unknown spacing; choose code (evenly spaced codes) or error (equal "
         "error per segment)"},
        {{"--degree", "3", "--fit", "chebyshev"}, "--fit 'chebyshev': unknown fit; choose least-squares or minimax"},
        {{"--fit", "minimax"}, "--fit 'minimax': give --degree D, or --max-error C to find the lowest degree"},
        {{"--unit", "0.5"}, "--unit '0.5': choose 0.1 or 0.01 (" + deg + " per count of the fixed-point table)"},
        {{"--max-error", "0"}, "--max-error '0': the largest error must be positive (" + deg + ")"},
        {{"--max-error", "0.1", "--entries", "9"},
         "--max-error '0.1': nothing left to choose; leave out --entries (and --degree) to find the smallest"},
        {{"--emit", "asm"}, "--emit 'asm': the only form is c (a C99 header)"},
        {{"--emit", "c", "--prefix", "9lives"},
         "--prefix '9lives': a C name prefix is a letter or '_' then letters, "
         "digits or '_', at most 32 characters"},
        {{"--prefix", "ntc_"}, "--prefix 'ntc_': applies only with --emit c"},
        {{"--emit", "c", "--format", "json"}, "--format 'json': give either --emit c or --format, not both"},
        {{"--degree", "2", "--format", "csv"},
         "--format 'csv': CSV carries the table alone; use text or json for the "
         "polynomial"},
        {{"--excitation", "3.3"},
         "--excitation '3.3': the table reads the ADC ratiometrically (its reference is the "
         "excitation), so the supply voltage does not matter; leave --excitation out"},
        {{"--current", "100u"},
         "--current '100u': a current drive is not ratiometric; the table needs a divider read "
         "against its own excitation"},
    };
    for (const Bad& b : cases) {
        const auto r = run_rtline(with(base, b.args));
        CAPTURE(b.message);
        CHECK(r.code == 2);
        CHECK(r.out.empty());
        CHECK(r.err == "rtline: " + b.message + "\n");
    }
    const std::pair<const char*, const char*> circuits[] = {
        {"bare",
         "--circuit 'bare': the output is a resistance, not a voltage an ADC reads; use divider-high, "
         "divider-low or shunt-divider"},
        {"bridge",
         "--circuit 'bridge': a bridge's differential output needs an amplifier whose gain and offset the "
         "table does not know; use divider-high, divider-low or shunt-divider (node A of the bridge alone is "
         "a divider-low with rs = r1)"},
    };
    for (const auto& [topology, message] : circuits) {
        const auto r = run_rtline({"table", "--r25", "10k", "--beta", "3950", "--span", "0:45", "--circuit", topology});
        CHECK(r.code == 2);
        CHECK(r.err == std::string("rtline: ") + message + "\n");
    }
}
