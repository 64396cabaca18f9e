// rtline table, the program half: the emitted C header compiled with the system compiler and run over
// every code, the JSON and CSV documents, --max-error searches, and bad input.
#include <doctest/doctest.h>

#include <cctype>
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

// What the compiled header gives at one code: the table's counts, the sensor state, and the
// polynomial when emitted.
struct CReading {
    long code;
    long counts;
    int state;
    double poly_c;
};

std::string c_compiler() { return rtline::test::have_program("cc") ? "cc" : "gcc"; }
std::string cxx_compiler() { return rtline::test::have_program("c++") ? "c++" : "g++"; }

// The warning set: C99 and C++11, -Wold-style-cast in C++ only.
const char* const kWarnings = " -Wall -Wextra -Werror -pedantic -Wconversion -Wsign-conversion -Wshadow";

std::string compile_line(bool cxx) {
    return cxx ? cxx_compiler() + " -x c++ -std=c++11" + kWarnings + " -Wold-style-cast"
               : c_compiler() + " -x c -std=c99" + kWarnings;
}

// Emits the header with `args`, compiles it (as C or C++) into a program of two translation units
// that both include it, one printing every code from `from` to `to`; runs it and reads the lines back.
std::vector<CReading> run_header(const std::vector<std::string>& args, const std::string& prefix, bool poly, long from,
                                 long to, bool cxx = false) {
    const TempPath header(".h");
    const TempPath source(".c");
    const TempPath other(".c");
    const TempPath program(".bin");
    const auto emitted = run_rtline(with(args, {"--emit", "c", "--prefix", prefix, "-o", header.str()}));
    INFO(emitted.err);
    REQUIRE(emitted.code == 0);
    // The program itself uses no casts, so the same source is clean C99 and C++11.
    std::ostringstream c;
    c << "#include <stdio.h>\n#include \"" << header.str() << "\"\n"
      << "int other_unit(void);\n"
      << "int main(void)\n{\n    uint32_t k;\n    for (k = " << from << "u; k <= " << to << "u; ++k) {\n"
      << "        unsigned long code = k;\n        long counts = " << prefix << "temperature(k);\n"
      << "        int state = " << prefix << "sensor_state(k);\n"
      << "        double poly = " << (poly ? prefix + "poly_temperature(k)" : std::string("0.0")) << ";\n"
      << "        printf(\"%lu %ld %d %.17g\\n\", code, counts, state, poly);\n"
      << "        if (k == 0xFFFFFFFFu) {\n            break;\n        }\n    }\n"
      << "    return other_unit();\n}\n";
    write_file(source.str(), c.str());
    std::string upper_prefix = prefix;
    for (char& ch : upper_prefix) ch = static_cast<char>(std::toupper(static_cast<unsigned char>(ch)));
    write_file(other.str(), "#include \"" + header.str() + "\"\nint other_unit(void);\nint other_unit(void)\n{\n" +
                                "    return " + prefix + "sensor_state(" + upper_prefix +
                                "CODE_LO) == " + upper_prefix + "READING ? 0 : 1;\n}\n");
    const std::string line = compile_line(cxx);
    const auto built = run_shell(line + " -o " + program.str() + " " + source.str() + " " + other.str());
    INFO(line);
    INFO(built.err);
    REQUIRE(built.code == 0);
    const auto ran = run_shell(program.str());
    REQUIRE(ran.code == 0);
    std::vector<CReading> out;
    std::istringstream in(ran.out);
    CReading r{};
    while (in >> r.code >> r.counts >> r.state >> r.poly_c) out.push_back(r);
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

TEST_CASE("the emitted C, compiled and run over every code, ships what rtline reports, within the target") {
    // Reference temperatures: tests/ref/adc_inverse.py (beta equation, Ohm's law, brentq), for each
    // converter transfer. The compiled program's largest error over the span must equal the reported
    // shipped error and stay within the target; as C99 and as C++11, two translation units each.
    const CCase cases[] = {
        {"12-bit divider-low, equal error, 0.01 degC, target 0.05, with a polynomial",
         divider("divider-low", "10k", 10e3, 12, 0.0, 45.0),
         {"--spacing", "error", "--max-error", "0.05", "--degree", "4"},
         0.01,
         true},
        {"10-bit divider-high, even codes, 0.1 degC, target 0.3",
         divider("divider-high", "4k7", 4.7e3, 10, -20.0, 60.0),
         {"--max-error", "0.3", "--unit", "0.1"},
         0.1,
         false},
        {"11-bit divider-low over -40..125, power-of-two segments",
         divider("divider-low", "10k", 10e3, 11, -40.0, 125.0),
         {"--spacing", "power-of-two", "--max-error", "0.2"},
         0.01,
         false},
        {"11-bit divider-high over 0..50, minimax polynomial of degree 7, 0.1 degC",
         divider("divider-high", "10k", 10e3, 11, 0.0, 50.0),
         {"--entries", "40", "--unit", "0.1", "--degree", "7", "--fit", "minimax"},
         0.1,
         true},
        {"12-bit divider-low, 25 entries given, default target left unchecked",
         divider("divider-low", "10k", 10e3, 12, -40.0, 125.0),
         {"--spacing", "error", "--entries", "25"},
         0.01,
         false},
    };
    for (const char* transfer : {"rounding", "truncating", "full-scale"}) {
        for (const CCase& k : cases) {
            for (const bool cxx : {false, true}) {
                CAPTURE(transfer);
                CAPTURE(k.name);
                CAPTURE(cxx);
                const std::vector<std::string> flags =
                    with(k.design.flags, with(k.extra, {"--adc-transfer", transfer}));
                const Json doc = run_json(flags);
                Json in = k.design.ref;
                in["transfer"] = transfer;
                const Json ref = python_ref("adc_inverse.py", in);
                const long lo = ref["code_lo"].get<long>();
                const long hi = ref["code_hi"].get<long>();
                REQUIRE(doc["reading"]["code_lo"].get<long>() == lo);
                REQUIRE(doc["reading"]["code_hi"].get<long>() == hi);
                CHECK(doc["adc_transfer"] == transfer);
                const long top = (1L << doc["adc_bits"].get<int>()) - 1;
                const auto readings = run_header(flags, "probe_", k.poly, 0, top, cxx);
                double worst = 0.0;
                double worst_poly = 0.0;
                for (const CReading& r : readings) {
                    // A code outside the span reads as the nearer end code (the reading convention).
                    const long inside = std::min(std::max(r.code, lo), hi);
                    const double exact = ref["t_c"][static_cast<std::size_t>(inside - lo)].get<double>();
                    if (r.code >= lo && r.code <= hi) {
                        worst = std::max(worst, std::abs(static_cast<double>(r.counts) * k.unit_c - exact));
                        if (k.poly) worst_poly = std::max(worst_poly, std::abs(r.poly_c - exact));
                        CHECK(r.state == 0);  // every code of the span reads as a temperature
                    }
                }
                CHECK(worst == doctest::Approx(doc["shipped"]["max_error_k"].get<double>()).epsilon(1e-9));
                if (doc["max_error_target_source"] == "--max-error") {
                    CHECK(worst <= doc["max_error_target_k"].get<double>());
                }
                if (k.poly) {
                    CHECK(worst_poly == doctest::Approx(doc["polynomial"]["max_error_k"].get<double>()).epsilon(1e-9));
                    CHECK(worst_poly <= doc["max_error_target_k"].get<double>());
                }
                CHECK(readings.front().counts == doc["table"].front()["t_fixed"].get<long>());
            }
        }
    }
}

TEST_CASE("an open and a shorted thermistor land in the bands that say so, for every topology the table reads") {
    // Reference: tests/ref/adc_inverse.py evaluates the circuit equations with R_T = 1e18 ohm (open)
    // and 1e-12 ohm (short) and quantizes them by the transfer; the compiled header's sensor_state()
    // at those codes must say open (1) and short (2). With a 100k rp the shunt-divider's open code
    // lies next to the cold end: within the margin it cannot be told, and the report says so.
    struct Topo {
        Design design;
        std::vector<std::string> extra;
        Json ref_extra;
    };
    Topo topologies[] = {
        {divider("divider-high", "10k", 10e3, 12, -20.0, 60.0), {}, Json::object()},
        {divider("divider-low", "10k", 10e3, 12, -20.0, 60.0), {}, Json::object()},
        {divider("divider-low", "10k", 10e3, 12, -20.0, 60.0), {"--load", "1M"}, {{"load_ohm", 1e6}}},
        {divider("shunt-divider", "4k7", 4.7e3, 12, 0.0, 50.0), {"--rp", "33k"}, {{"rp_ohm", 33e3}}},
    };
    for (const char* transfer : {"rounding", "truncating", "full-scale"}) {
        for (Topo& t : topologies) {
            const std::vector<std::string> flags = with(t.design.flags, with(t.extra, {"--adc-transfer", transfer}));
            Json in = t.design.ref;
            in.update(t.ref_extra);
            in["transfer"] = transfer;
            const Json ref = python_ref("adc_inverse.py", in);
            const Json doc = run_json(flags);
            const long open = ref["open_code"].get<long>();
            const long shorted = ref["short_code"].get<long>();
            CAPTURE(transfer);
            CAPTURE(flags[8]);
            CHECK(doc["faults"]["open_code"].get<long>() == open);
            CHECK(doc["faults"]["short_code"].get<long>() == shorted);
            const auto readings = run_header(flags, "f_", false, 0, 4095);
            CHECK(readings[static_cast<std::size_t>(open)].state == 1);
            CHECK(readings[static_cast<std::size_t>(shorted)].state == 2);
            CHECK(doc["faults"]["not_told_from_a_reading"].empty());
        }
    }
    // rp = 10k: the open code (ratio 4.7/14.7 of 4096, 1310 by hand) lies 242 codes below the cold end's.
    const Design weak = divider("shunt-divider", "4k7", 4.7e3, 12, 0.0, 50.0);
    const Json doc = run_json(with(weak.flags, {"--rp", "10k", "--fault-margin", "300"}));
    CHECK(doc["faults"]["open_code"] == 1310);
    CHECK(doc["faults"]["not_told_from_a_reading"] == Json::array({"open"}));
    const auto text = run_rtline(with(weak.flags, {"--rp", "10k", "--fault-margin", "300"}));
    CHECK(text.out.find("an open thermistor cannot be told from a reading") != std::string::npos);
}

TEST_CASE("over a sweep of targets a tighter target never ships a larger error") {
    // The property the issue asks for: with the fewest entries meeting each target, a tighter target
    // gets a table at least as large, so its shipped error is no larger.
    const Design d = divider("divider-low", "10k", 10e3, 12, -40.0, 30.0);
    for (const char* spacing : {"code", "error", "power-of-two"}) {
        double previous = 1e9;
        for (double target = 0.2; target >= 0.012; target *= 0.85) {
            const auto r = run_rtline(
                with(d.flags, {"--spacing", spacing, "--max-error", std::to_string(target), "--format", "json"}));
            if (r.code == 1) break;  // no table of up to 1024 entries
            REQUIRE(r.code == 0);
            const double shipped = Json::parse(r.out)["shipped"]["max_error_k"].get<double>();
            CAPTURE(spacing);
            CAPTURE(target);
            CHECK(shipped <= target);
            CHECK(shipped <= previous);
            previous = shipped;
        }
    }
}

TEST_CASE("a target the unit alone cannot meet exits 1 and says so") {
    // Hand reasoning: any reading in whole counts of 0.1 degC errs by the distance of the exact
    // temperature to the nearest count, up to 0.05 degC; the span's codes come close to that.
    const auto r = run_rtline(
        with(divider("divider-low", "10k", 10e3, 12, 0.0, 45.0).flags, {"--unit", "0.1", "--max-error", "0.04"}));
    CHECK(r.code == 1);
    CHECK(r.out.empty());
    CHECK(r.err.rfind("rtline: the 0.1 \xC2\xB0"
                      "C unit alone rounds by up to 0.0",
                      0) == 0);
}

TEST_CASE("--entries and --degree with --max-error meet the target or exit 1 saying why") {
    const Design d = divider("divider-low", "10k", 10e3, 12, -40.0, 125.0);
    const auto table = run_rtline(with(d.flags, {"--entries", "5", "--max-error", "0.1"}));
    CHECK(table.code == 1);
    CHECK(table.err.find("the 5-entry table ships") != std::string::npos);
    const auto poly = run_rtline(with(d.flags, {"--degree", "2", "--max-error", "0.5"}));
    CHECK(poly.code == 1);
    CHECK(poly.err.find("the degree-2 polynomial errs by") != std::string::npos);
    const Json ok = run_json(with(d.flags, {"--entries", "200", "--max-error", "0.5"}));
    CHECK(ok["shipped"]["max_error_k"].get<double>() <= 0.5);
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
        CHECK(std::abs(static_cast<double>(r.counts) * 0.01 - exact) <=
              doc["shipped"]["max_error_k"].get<double>() + 1e-9);
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
    const auto built = run_shell(compile_line(false) + " -c -o " + object.str() + " " + source.str());
    INFO(built.err);
    CHECK(built.code == 0);
    const auto built_cxx = run_shell(compile_line(true) + " -c -o " + object.str() + " " + source.str());
    INFO(built_cxx.err);
    CHECK(built_cxx.code == 0);
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
        CHECK(doc["interpolation_error"]["max_error_k"].get<double>() ==
              doctest::Approx(ref["table_max_error_c"].get<double>()).epsilon(1e-9));
        CHECK(doc["interpolation_error"]["at_code"].get<long>() == ref["table_at_code"].get<long>());
    }
}

TEST_CASE("the JSON document states the reading convention, ADC width, spacing and unit") {
    const Json doc = run_json(with(divider("divider-high", "10k", 10e3, 10, 0.0, 50.0).flags,
                                   {"--spacing", "error", "--unit", "0.1", "--degree", "2", "--fit", "minimax"}));
    CHECK(doc["tool"] == "rtline");
    CHECK(doc["schema"] == 2);
    CHECK(doc["command"] == "table");
    CHECK(doc["adc_bits"] == 10);
    CHECK(doc["spacing"] == "error");
    CHECK(doc["unit_k"].get<double>() == 0.1);
    CHECK(doc["adc_transfer"] == "rounding");  // the default
    CHECK(doc["reading"]["convention"].get<std::string>().find("rounding: code k is the ratio k/1024") !=
          std::string::npos);
    CHECK(doc["reading"]["temperature_rises_with_code"] == true);  // divider-high: R_T falls, the output rises
    CHECK(doc["table"].size() == doc["entries"].get<std::size_t>());
    CHECK(doc["searched"] == Json::array({"entries"}));  // the default size comes from the default target
    CHECK(doc["max_error_target_source"] == "default");
    CHECK(doc["shipped"]["max_error_k"].get<double>() <= doc["max_error_target_k"].get<double>());
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

TEST_CASE("--max-error finds the smallest table: one entry fewer ships more than the target") {
    const Design d = divider("divider-low", "10k", 10e3, 12, -20.0, 60.0);
    for (const char* spacing : {"code", "error"}) {
        const Json doc = run_json(with(d.flags, {"--spacing", spacing, "--max-error", "0.05"}));
        const int entries = doc["entries"].get<int>();
        CAPTURE(spacing);
        CHECK(doc["shipped"]["max_error_k"].get<double>() <= 0.05);
        const Json fewer = run_json(with(d.flags, {"--spacing", spacing, "--entries", std::to_string(entries - 1)}));
        CHECK(fewer["shipped"]["max_error_k"].get<double>() > 0.05);
    }
    const Json poly = run_json(with(d.flags, {"--fit", "minimax", "--max-error", "0.05"}));
    const int degree = poly["polynomial"]["degree"].get<int>();
    CHECK(poly["polynomial"]["max_error_k"].get<double>() <= 0.05);
    const Json lower = run_json(with(d.flags, {"--degree", std::to_string(degree - 1), "--fit", "minimax"}));
    CHECK(lower["polynomial"]["max_error_k"].get<double>() > 0.05);
}

TEST_CASE("an error nothing can meet exits 1 with a message and nothing on stdout") {
    const Design d = divider("divider-low", "10k", 10e3, 12, 0.0, 45.0);
    const auto table = run_rtline(with(d.flags, {"--max-error", "1e-9"}));
    CHECK(table.code == 1);
    CHECK(table.out.empty());
    CHECK(table.err.rfind("rtline: the 0.01 \xC2\xB0"
                          "C unit alone rounds by up to 0.00",
                          0) == 0);
    // Over −40 to 125 °C even degree 12 misses 0.01 °C (it gives 0.11 °C, measured).
    const Design wide = divider("divider-low", "10k", 10e3, 12, -40.0, 125.0);
    const auto poly = run_rtline(with(wide.flags, {"--fit", "minimax", "--max-error", "0.01"}));
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
         "--adc-bits '1': the span's output swing (0.935 LSB) covers 0 codes; a table takes at least 5 (the ends, "
         "the middle and one in each half): use more bits or a circuit with more swing"},
        {{"--entries", "1"}, "--entries '1': a table needs at least 2 entries"},
        {{"--entries", "5000"}, "--entries '5000': a table needs 2 to 1915 entries (the span covers 1915 codes)"},
        {{"--degree", "0"}, "--degree '0': choose a degree from 1 to 12"},
        {{"--degree", "13"}, "--degree '13': choose a degree from 1 to 12"},
        {{"--spacing", "log"},
         "--spacing 'log': unknown spacing; choose code (evenly spaced codes), error (equal "
         "error per segment) or power-of-two (every 2^s codes, found by a shift)"},
        {{"--adc-transfer", "floor"}, "--adc-transfer 'floor': choose rounding, truncating or full-scale"},
        {{"--fault-margin", "-3"}, "--fault-margin '-3': a margin must be 0 or more (codes, or degC with C)"},
        {{"--fault-margin", "2.5"},
         "--fault-margin '2.5': a margin in codes must be a whole number (or give degC with C)"},
        {{"--degree", "3", "--fit", "chebyshev"}, "--fit 'chebyshev': unknown fit; choose least-squares or minimax"},
        {{"--fit", "minimax"}, "--fit 'minimax': give --degree D, or --max-error C to find the lowest degree"},
        {{"--unit", "0.5"}, "--unit '0.5': choose 0.1 or 0.01 (" + deg + " per count of the fixed-point table)"},
        {{"--max-error", "0"}, "--max-error '0': the largest error must be positive (" + deg + ")"},
        {{"--emit", "asm"}, "--emit 'asm': the only form is c (a C99 header)"},
        {{"--emit", "c", "--prefix", "9lives"},
         "--prefix '9lives': a C name prefix is a letter or '_' then letters, "
         "digits or '_', at most 32 characters"},
        {{"--prefix", "ntc_"}, "--prefix 'ntc_': applies only with --emit c"},
        {{"--emit", "c", "--format", "json"}, "--format 'json': give either --emit c or --format, not both"},
        {{"--degree", "2", "--format", "csv"},
         "--format 'csv': CSV carries the table alone; use text or json for the "
         "polynomial"},
        // Hand calculation (beta equation, Ohm's law): at 0 degC R_T = 33.62k, so divider-low gives
        // 3.3·33.62/(33.62 + 10) = 2.543 V, past the top of a fixed 1 V reference.
        {{"--excitation", "3.3", "--adc-ref", "1.0"},
         "--adc-ref '1.0': at 0 " + deg +
             " the converter input is 2.543 of the reference, outside 0 to 1: that end of the span would read as a "
             "rail (a reference at or above the supply, or a divider whose output stays below it)"},
        {{"--current", "100u"},
         "--current '100u': a current drive is read only across a bare or shunt thermistor; a divider "
         "or bridge is read ratiometrically, against its own excitation"},
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
         "--circuit 'bare': the output is a resistance, not a voltage; a converter reads it through a "
         "current drive, against a reference in volts (give --current and --adc-ref)"},
        {"bridge",
         "--gain: a bridge's output is the difference V_A - V_B; a converter reads it through an amplifier "
         "(its gain and output offset) (give --gain and --offset, or --auto-range)"},
    };
    for (const auto& [topology, message] : circuits) {
        const auto r = run_rtline({"table", "--r25", "10k", "--beta", "3950", "--span", "0:45", "--circuit", topology});
        CHECK(r.code == 2);
        CHECK(r.err == std::string("rtline: ") + message + "\n");
    }
}

TEST_CASE("bridges through their amplifier and current-driven thermistors reach the firmware, every code checked") {
    // Reference: tests/ref/adc_inverse.py — the bridge by Kirchhoff's current law at nodes A and B
    // (numpy.linalg.solve), the current drive by Ohm's law V = I·(R_T ∥ rp ∥ load), an ideal amplifier
    // gain·v + offset over the converter's reference, inverted by scipy's brentq; open and short as
    // R_T = 1e18 and 1e-12 ohm through the same equations, quantized and held to the rails. The
    // emitted C is compiled and run over every code 0 … 2^N − 1.
    struct Case {
        const char* name;
        std::vector<std::string> flags;
        Json ref;
        double unit_c;
    };
    const Json beta = {{"r25_ohm", 10e3}, {"b_k", 3950.0}, {"t0_c", 25.0}, {"adc_bits", 12}};
    auto ref = [&beta](Json more) {
        more.update(beta);
        return more;
    };
    const std::vector<std::string> thermistor = {"table", "--r25", "10k", "--beta", "3950", "--adc-bits", "12"};
    const Case cases[] = {
        {"bridge, amplifier fitted to 5..95 % of the range",
         with(thermistor,
              {"--span", "0:50", "--circuit", "bridge", "--r1", "10k", "--auto-range", "--max-error", "0.05"}),
         ref({{"topology", "bridge"}, {"r1_ohm", 10e3}, {"r2_ohm", 10e3}, {"lo_c", 0.0}, {"hi_c", 50.0}}), 0.01},
        {"loaded shunt-bridge, inputs swapped (gain -2), equal-error spacing",
         with(thermistor, {"--span", "0:50", "--circuit", "shunt-bridge", "--r1", "10k", "--rp", "47k", "--load",
                           "100k", "--gain", "-2", "--offset", "0.05", "--max-error", "0.05", "--spacing", "error"}),
         ref({{"topology", "shunt-bridge"},
              {"r1_ohm", 10e3},
              {"r2_ohm", 10e3},
              {"rp_ohm", 47e3},
              {"load_ohm", 100e3},
              {"lo_c", 0.0},
              {"hi_c", 50.0}}),
         0.01},
        {"bare thermistor, 50 uA into a 2.5 V converter, 0.1 degC",
         with(thermistor, {"--span", "10:60", "--circuit", "bare", "--current", "50u", "--adc-ref", "2.5", "--unit",
                           "0.1", "--max-error", "0.2"}),
         ref({{"topology", "bare"}, {"current_a", 50e-6}, {"reference", 2.5}, {"lo_c", 10.0}, {"hi_c", 60.0}}), 0.1},
        {"shunt, 100 uA, single-ended amplifier into 3.3 V, power-of-two segments",
         with(thermistor,
              {"--span", "0:50", "--circuit", "shunt", "--rp", "22k", "--current", "100u", "--adc-ref", "3.3", "--gain",
               "1.5", "--offset", "0.1", "--spacing", "power-of-two", "--max-error", "0.1"}),
         ref({{"topology", "shunt"},
              {"rp_ohm", 22e3},
              {"current_a", 100e-6},
              {"reference", 3.3},
              {"gain", 1.5},
              {"offset", 0.1},
              {"lo_c", 0.0},
              {"hi_c", 50.0}}),
         0.01},
    };
    for (const char* transfer : {"rounding", "full-scale"}) {
        for (const Case& k : cases) {
            CAPTURE(transfer);
            CAPTURE(k.name);
            const std::vector<std::string> flags = with(k.flags, {"--adc-transfer", transfer});
            const Json doc = run_json(flags);
            Json in = k.ref;
            in["transfer"] = transfer;
            if (doc["circuit"]["resistors_ohm"].contains("r3")) {
                in["r3_ohm"] = doc["circuit"]["resistors_ohm"]["r3"];  // the null the bridge was completed for
            }
            const Json& amp = doc["front_end"]["amplifier"];
            if (!amp.is_null()) {
                in["gain"] = amp["gain_v_per_v"];
                in["offset"] = amp["offset"];
            }
            const Json r = python_ref("adc_inverse.py", in);
            if (!amp.is_null() && amp["auto_range"] == true) {
                // The fitted amplifier puts the span's ends at 5 % and 95 % of the range.
                CHECK(std::min(r["ratio_lo"].get<double>(), r["ratio_hi"].get<double>()) ==
                      doctest::Approx(0.05).epsilon(1e-12));
                CHECK(std::max(r["ratio_lo"].get<double>(), r["ratio_hi"].get<double>()) ==
                      doctest::Approx(0.95).epsilon(1e-12));
            }
            const long lo = r["code_lo"].get<long>();
            const long hi = r["code_hi"].get<long>();
            REQUIRE(doc["reading"]["code_lo"].get<long>() == lo);
            REQUIRE(doc["reading"]["code_hi"].get<long>() == hi);
            const auto readings = run_header(flags, "ch_", false, 0, 4095);
            double worst = 0.0;
            for (const CReading& c : readings) {
                if (c.code < lo || c.code > hi) continue;
                const double exact = r["t_c"][static_cast<std::size_t>(c.code - lo)].get<double>();
                worst = std::max(worst, std::abs(static_cast<double>(c.counts) * k.unit_c - exact));
                CHECK(c.state == 0);
            }
            CHECK(worst == doctest::Approx(doc["shipped"]["max_error_k"].get<double>()).epsilon(1e-9));
            CHECK(worst <= doc["max_error_target_k"].get<double>());
            const long open = r["open_code"].get<long>();
            const long shorted = r["short_code"].get<long>();
            CHECK(doc["faults"]["open_code"].get<long>() == open);
            CHECK(doc["faults"]["short_code"].get<long>() == shorted);
            CHECK(doc["faults"]["not_told_from_a_reading"].empty());
            CHECK(readings[static_cast<std::size_t>(open)].state == 1);
            CHECK(readings[static_cast<std::size_t>(shorted)].state == 2);
        }
    }
}

TEST_CASE("a shunt on a current source: the open code is I·rp, and within the margin it reads as a temperature") {
    // Hand calculation: an open thermistor leaves rp alone, 100 µA · 4.7 kΩ = 0.47 V, 0.47/2.5 of
    // 4096 = 770.05 LSB, code 770; the span's cold end 33.62 kΩ ∥ 4.7 kΩ = 4123 Ω is code 675. A
    // 100-code margin reaches past 770: the report says the open cannot be told, and the header's
    // sensor_state() reads it as a temperature.
    const std::vector<std::string> flags = {"table",  "--r25",     "10k",       "--beta",    "3950",
                                            "--span", "0:50",      "--circuit", "shunt",     "--rp",
                                            "4k7",    "--current", "100u",      "--adc-ref", "2.5"};
    const Json told = run_json(flags);
    CHECK(told["faults"]["open_code"] == 770);
    CHECK(told["reading"]["code_hi"] == 675);
    CHECK(told["faults"]["not_told_from_a_reading"].empty());
    CHECK(told["front_end"]["ratiometric"] == false);
    CHECK(told["front_end"]["reference"].get<double>() == 2.5);
    const std::vector<std::string> wide = with(flags, {"--fault-margin", "100"});
    const Json hidden = run_json(wide);
    CHECK(hidden["faults"]["not_told_from_a_reading"] == Json::array({"open"}));
    const auto readings = run_header(wide, "sh_", false, 0, 4095);
    CHECK(readings[770].state == 0);
    CHECK(readings[776].state == 3);  // past the readings, and no fault gives it
}

TEST_CASE("a divider on a 3.3 V supply reads the same table against its own supply and a scaled one against 2.5 V") {
    // Hand calculation (Ohm's law and the beta equation, written here): divider-high with rs = 10 kΩ
    // on 3.3 V, a converter with a fixed 2.5 V reference: code k of 4096 is the output k/4096·2.5 V,
    // the fraction y = k/4096·2.5/3.3 of the supply, R_T = rs·(1 − y)/y and
    // T = 1/(1/298.15 + ln(R_T/10k)/3950) − 273.15.
    const Design d = divider("divider-high", "10k", 10e3, 12, 0.0, 50.0);
    const std::vector<std::string> sized = with(d.flags, {"--entries", "9"});
    const Json ratiometric = run_json(sized);
    const Json own = run_json(with(sized, {"--excitation", "3.3"}));
    CHECK(own["table"] == ratiometric["table"]);
    CHECK(own["front_end"]["ratiometric"] == true);
    const Json fixed = run_json(with(sized, {"--excitation", "3.3", "--adc-ref", "2.5"}));
    CHECK(fixed["front_end"]["ratiometric"] == false);
    CHECK(fixed["front_end"]["reference"].get<double>() == 2.5);
    REQUIRE(fixed["table"].size() == 9);
    for (const Json& row : fixed["table"]) {
        const double y = row["code"].get<double>() / 4096.0 * 2.5 / 3.3;
        const double r_t = 10e3 * (1.0 - y) / y;
        const double t_c = 1.0 / (1.0 / 298.15 + std::log(r_t / 10e3) / 3950.0) - 273.15;
        CAPTURE(row.dump());
        CHECK(row["t_c"].get<double>() == doctest::Approx(t_c).epsilon(1e-9));
    }
    // The lower fixed reference spreads the span over more codes than the supply does (3.3/2.5 as many).
    CHECK(fixed["table"].back()["code"].get<long>() - fixed["table"].front()["code"].get<long>() >
          ratiometric["table"].back()["code"].get<long>() - ratiometric["table"].front()["code"].get<long>());
}
