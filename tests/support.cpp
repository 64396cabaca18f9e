#include "support.hpp"

#include <algorithm>
#include <cmath>

#include <doctest/doctest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <atomic>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <sstream>

#include "rtline/thermistor.hpp"
#include "rtline/units.hpp"

namespace rtline::test {

namespace {

std::string quote(const std::string& s) {
    std::string q = "'";
    for (const char c : s) {
        if (c == '\'') {
            q += "'\\''";
        } else {
            q += c;
        }
    }
    return q + "'";
}

std::atomic<int> counter{0};

}  // namespace

std::string source_dir() { return RTLINE_SOURCE_DIR; }

void write_file(const std::string& path, const std::string& text) {
    std::ofstream out(path, std::ios::binary);
    out << text;
}

std::string read_file(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

TempPath::TempPath(const std::string& suffix) {
    const auto dir = std::filesystem::temp_directory_path();
    path_ = (dir / ("rtline-test-" + std::to_string(::getpid()) + "-" + std::to_string(counter++) + suffix)).string();
}

TempPath::~TempPath() {
    std::error_code ec;
    std::filesystem::remove(path_, ec);
}

Run run_shell(const std::string& command, const std::string& input) {
    const TempPath in(".in");
    const TempPath out(".out");
    const TempPath err(".err");
    write_file(in.str(), input);
    const std::string line =
        "(" + command + ") <" + quote(in.str()) + " >" + quote(out.str()) + " 2>" + quote(err.str());
    const int status = std::system(line.c_str());
    Run r;
    r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    r.out = read_file(out.str());
    r.err = read_file(err.str());
    return r;
}

Run run_rtline(const std::vector<std::string>& args, const std::string& input) {
    std::string command = quote(RTLINE_EXE);
    for (const std::string& a : args) {
        command += ' ';
        command += quote(a);
    }
    return run_shell(command, input);
}

nlohmann::json run_json_ok(const std::vector<std::string>& args) {
    const Run r = run_rtline(args);
    INFO(r.err);
    REQUIRE(r.code == 0);
    return nlohmann::json::parse(r.out);
}

void check_worst_case(const nlohmann::json& budget, const nlohmann::json& ref) {
    REQUIRE(budget["points"].size() == ref["points"].size());
    for (std::size_t i = 0; i < budget["points"].size(); ++i) {
        const nlohmann::json& p = budget["points"][i];
        const nlohmann::json& r = ref["points"][i];
        CAPTURE(p["t_c"].get<double>());
        CHECK(p["worst_low_k"].get<double>() == doctest::Approx(r["low_k"].get<double>()).epsilon(1e-9));
        CHECK(p["worst_high_k"].get<double>() == doctest::Approx(r["high_k"].get<double>()).epsilon(1e-9));
    }
}

void check_monte_carlo(const nlohmann::json& budget, const nlohmann::json& ref, std::size_t points) {
    const double k = 4.0 * std::sqrt(2.0);
    for (std::size_t i = 0; i < points; ++i) {
        const nlohmann::json& p = budget["points"][i];
        const nlohmann::json& mc = p["mc"];
        const nlohmann::json& r = ref["points"][i];
        const double step = p["resolution_k_per_lsb"].get<double>();
        CAPTURE(p["t_c"].get<double>());
        CHECK(std::abs(mc["mean_k"].get<double>() - r["mean"].get<double>()) < k * r["mean_se"].get<double>());
        CHECK(std::abs(mc["std_k"].get<double>() - r["std"].get<double>()) < k * r["std_se"].get<double>());
        for (const char* key : {"p0_135", "p2_5", "p97_5", "p99_865", "p99_7"}) {
            CAPTURE(key);
            const double d = std::abs(mc[std::string(key) + "_k"].get<double>() - r[key].get<double>());
            CHECK(d < k * r[std::string(key) + "_se"].get<double>() + step);
        }
    }
}

nlohmann::json python_ref(const std::string& script, const nlohmann::json& input) {
    const std::string path = source_dir() + "/tests/ref/" + script;
    const Run r = run_shell("/usr/bin/python3 " + quote(path), input.dump());
    INFO("reference script " << script << " stderr: " << r.err);
    REQUIRE(r.code == 0);
    return nlohmann::json::parse(r.out);
}

bool have_program(const std::string& name) {
    return run_shell("command -v " + quote(name) + " >/dev/null 2>&1").code == 0;
}

std::vector<std::string> check_args(const std::vector<std::string>& more) {
    std::vector<std::string> a{"check", "--r25", "10k", "--beta", "3950"};
    a.insert(a.end(), more.begin(), more.end());
    return a;
}

std::string num(double v) {
    std::ostringstream s;
    s.precision(17);
    s << v;
    return s.str();
}

std::vector<double> thermistor_resistances() {
    const rtline::Thermistor t(rtline::BetaModel{10e3, rtline::k25CelsiusK, 3950.0});
    std::vector<double> r;
    for (const double t_c : {-30.0, 0.0, 25.0, 60.0, 105.0}) r.push_back(t.resistance(rtline::celsius_to_kelvin(t_c)));
    return r;
}

bool close(double got, double want, double scale) {
    return std::abs(got - want) <= 1e-12 * std::max(std::abs(want), scale);
}

}  // namespace rtline::test
