// The program's outer behaviour: version, help, exit codes for usage errors.
#include <doctest/doctest.h>

#include <string>
#include <vector>

#include "support.hpp"

using rtline::test::run_rtline;

TEST_CASE("rtline --version prints the name and version") {
    const auto r = run_rtline({"--version"});
    CHECK(r.code == 0);
    CHECK(r.out.rfind("rtline ", 0) == 0);
}

TEST_CASE("an unknown command is a usage error with exit code 2 and nothing on stdout") {
    const auto r = run_rtline({"linearize"});
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    CHECK(r.err.find("rtline:") != std::string::npos);
}

TEST_CASE("the top-level help lists the exit codes and carries the safety caution") {
    const auto r = run_rtline({"--help"});
    CHECK(r.code == 0);
    CHECK(r.out.find("2 bad input or usage") != std::string::npos);
    CHECK(r.out.find("not a protective device") != std::string::npos);
}

TEST_CASE("each command's help states the exit codes that command can give") {
    // model, fit and check analyse what they are given and never search, so they never exit 1.
    const std::string searching =
        "Exit codes: 0 success, 1 no design meets the constraints, 2 bad input or usage, "
        "3 internal error (with --jsonl: the worst line's).";
    const std::string analysing =
        "Exit codes: 0 success, 2 bad input or usage, 3 internal error (with --jsonl: the "
        "worst line's).";
    for (const char* command : {"model", "fit", "check", "size", "table"}) {
        const std::string name = command;
        INFO("rtline " << name << " --help");
        const auto r = run_rtline({name, "--help"});
        CHECK(r.code == 0);
        const bool searches = name == "size" || name == "table";
        CHECK(r.out.find(searches ? searching : analysing) != std::string::npos);
        CHECK(r.out.find(searches ? analysing : searching) == std::string::npos);
    }
}

TEST_CASE("model, fit and check give exit code 0 on success, and size and table 1 when nothing meets the target") {
    const std::vector<std::string> beta = {"--r25", "10k", "--beta", "3950", "--span", "0:50", "--step", "10"};
    auto with = [&](std::vector<std::string> a) {
        a.insert(a.begin() + 1, beta.begin(), beta.end());
        return a;
    };
    CHECK(run_rtline(with({"model"})).code == 0);
    CHECK(run_rtline(with({"check", "--circuit", "divider-low", "--rs", "10k"})).code == 0);
    // A ratiometric divider spans at most 1 V/V, so --min-span 2 cannot be met.
    CHECK(run_rtline(with({"size", "--circuit", "divider-low", "--min-span", "2"})).code == 1);
    // 1e-9 °C is out of reach of the largest table the search tries (1024 entries): the span's ~2000
    // codes leave segments about 2 codes long, whose interpolation error is about h²/8·|T''| with
    // |T''| ≈ (50 °C / 2000 codes) / 2000 codes ≈ 1e-5 °C per code², i.e. about 5e-6 °C (by hand).
    const auto table = run_rtline({"table", "--r25", "10k", "--beta", "3950", "--span", "0:50", "--circuit",
                                   "divider-low", "--rs", "10k", "--max-error", "1e-9"});
    CHECK(table.code == 1);
    CHECK(table.out.empty());
}

namespace {

// The --circuit line of a command's --help.
std::string circuit_help(const std::string& command) {
    const auto r = run_rtline({command, "--help"});
    const std::size_t at = r.out.find("--circuit");
    REQUIRE(at != std::string::npos);
    return r.out.substr(at, r.out.find('\n', at) - at);
}

// The flags that give each topology what it needs, on a 10k B3950 thermistor over 0 to 50 degC.
std::vector<std::string> run_with(const std::string& command, const std::string& topology,
                                  const std::vector<std::string>& more) {
    std::vector<std::string> a = {command, "--r25", "10k", "--beta", "3950", "--span", "0:50", "--circuit", topology};
    a.insert(a.end(), more.begin(), more.end());
    return a;
}

}  // namespace

TEST_CASE("the --help of table, budget and size names exactly the circuits each runs") {
    // Each circuit the help line names runs (exit 0) with the flags it names; the ones it leaves out
    // are refused (exit 2). Which ones: table reads every voltage output through its channel; budget
    // reads each network's output directly or through an amplifier (a bridge here through --auto-range);
    // size has nothing to size in a bare thermistor.
    const std::vector<std::string> all = {"bare",          "divider-high", "divider-low", "shunt",
                                          "shunt-divider", "bridge",       "shunt-bridge"};
    auto parts = [](const std::string& t) -> std::vector<std::string> {
        if (t == "divider-high" || t == "divider-low") return {"--rs", "10k"};
        if (t == "shunt-divider") return {"--rs", "10k", "--rp", "47k"};
        if (t == "bridge") return {"--r1", "10k"};
        if (t == "shunt-bridge") return {"--r1", "10k", "--rp", "47k"};
        if (t == "shunt") return {"--rp", "47k"};
        return {};
    };
    for (const std::string& command : {std::string("table"), std::string("budget"), std::string("size")}) {
        const std::string help = circuit_help(command);
        CAPTURE(help);
        for (const std::string& t : all) {
            CAPTURE(command);
            CAPTURE(t);
            std::vector<std::string> more = command == "size" ? std::vector<std::string>{} : parts(t);
            const bool current = t == "bare" || t == "shunt";
            if (command == "table") {
                if (current) more.insert(more.end(), {"--current", "50u", "--adc-ref", "2.5"});
                if (t == "bridge" || t == "shunt-bridge") more.push_back("--auto-range");
            }
            if (command == "budget") {
                more.insert(more.end(), {"--step", "10", "--trials", "0"});
                if (current) more.insert(more.end(), {"--current", "50u", "--adc-ref", "2.5", "--adc-bits", "12"});
                if (t == "bridge" || t == "shunt-bridge") more.push_back("--auto-range");
            }
            if (command == "size") more.insert(more.end(), {"--step", "5"});
            // A name in the help line, not inside another name (divider-low inside shunt-divider).
            const bool listed = help.find(" " + t + ",") != std::string::npos ||
                                help.find(" " + t + " ") != std::string::npos ||
                                help.find(" " + t + ";") != std::string::npos;
            const bool excluded = help.find("(" + t + " has no") != std::string::npos;
            const auto r = run_rtline(run_with(command, t, more));
            INFO(r.err);
            CHECK(r.code == (listed && !excluded ? 0 : 2));
        }
    }
}
