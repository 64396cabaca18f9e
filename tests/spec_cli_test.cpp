// Spec files and JSON Lines batches: a spec fills the same flags, the command line overrides it, a
// design document is read back, bad specs name their key, and a batch answers line for line.
#include <doctest/doctest.h>

#include <nlohmann/json.hpp>
#include <sstream>

#include "support.hpp"

using nlohmann::json;
using rtline::test::run_rtline;
using rtline::test::TempPath;
using rtline::test::write_file;

namespace {

const std::vector<std::string> kSizeFlags = {"size",   "--r25",    "10k",       "--beta",      "3890",
                                             "--span", "0:45",     "--circuit", "divider-low", "--top",
                                             "2",      "--format", "json"};
const char* const kSizeSpec =
    R"({"r25": "10k", "beta": 3890, "span": "0:45", "circuit": "divider-low", "top": 2, "format": "json"})";

std::vector<std::string> lines_of(const std::string& text) {
    std::vector<std::string> out;
    std::istringstream in(text);
    for (std::string l; std::getline(in, l);) out.push_back(l);
    return out;
}

}  // namespace

TEST_CASE("a spec file gives the same result as the same flags") {
    const TempPath spec(".json");
    write_file(spec.str(), kSizeSpec);
    const auto by_flags = run_rtline(kSizeFlags);
    const auto by_spec = run_rtline({"size", "--spec", spec.str()});
    REQUIRE(by_flags.code == 0);
    CHECK(by_spec.code == 0);
    CHECK(by_spec.out == by_flags.out);
}

TEST_CASE("a spec can come on stdin") {
    const auto by_flags = run_rtline(kSizeFlags);
    const auto r = run_rtline({"size", "--spec", "-"}, kSizeSpec);
    CHECK(r.code == 0);
    CHECK(r.out == by_flags.out);
}

TEST_CASE("flags on the command line override the spec") {
    const TempPath spec(".json");
    write_file(spec.str(), kSizeSpec);
    const auto r = run_rtline({"size", "--spec", spec.str(), "--top", "1", "--series", "E12"});
    REQUIRE(r.code == 0);
    const json j = json::parse(r.out);
    CHECK(j["series"] == "E12");
    CHECK(j["candidates"].size() == 1);
}

TEST_CASE("a boolean key turns a flag on") {
    const auto r = run_rtline({"size", "--spec", "-"},
                              R"({"r25": "10k", "beta": 3890, "span": "0:45", "compare": true, "format": "json"})");
    REQUIRE(r.code == 0);
    CHECK(json::parse(r.out).contains("comparison"));
}

TEST_CASE("check's JSON output read back as a spec reproduces the same check") {
    const std::vector<std::string> flags = {"check",  "--r25",        "47k",    "--beta",   "4090", "--span",
                                            "-20:60", "--circuit",    "bridge", "--r1",     "51k",  "--load",
                                            "100k",   "--excitation", "5",      "--format", "json"};
    const auto first = run_rtline(flags);
    REQUIRE(first.code == 0);
    const TempPath doc(".json");
    write_file(doc.str(), first.out);
    const auto again = run_rtline({"check", "--spec", doc.str(), "--format", "json"});
    CHECK(again.code == 0);
    CHECK(again.out == first.out);
}

TEST_CASE("size's JSON output read back by check analyses its best candidate") {
    const auto sized = run_rtline(kSizeFlags);
    REQUIRE(sized.code == 0);
    const json s = json::parse(sized.out);
    const auto checked = run_rtline({"check", "--spec", "-", "--format", "json"}, sized.out);
    REQUIRE(checked.code == 0);
    const json c = json::parse(checked.out);
    CHECK(c["circuit"]["resistors_ohm"]["rs"] == s["candidates"][0]["resistors_ohm"]["rs"]);
    CHECK(c["summary"]["max_nonlinearity_pct_fsd"].get<double>() ==
          doctest::Approx(s["candidates"][0]["max_nonlinearity_pct_fsd"].get<double>()).epsilon(1e-12));
}

TEST_CASE("bad specs are exit 2 with one line naming the key, and nothing on stdout") {
    struct Case {
        const char* spec;
        const char* message;
    };
    const Case cases[] = {
        {R"({"r25": "10k", "colour": "red"})", "rtline: spec key 'colour': is not a key of 'size'"},
        {R"({"r25": ["10k"]})", "rtline: spec key 'r25' '[\"10k\"]': expected a number or a string"},
        {R"({"compare": "yes"})", "rtline: spec key 'compare' '\"yes\"': expected true or false"},
        {R"({"r25": "10k", )", "rtline: --spec 'stdin': is not valid JSON"},
        {R"([1, 2])", "rtline: --spec 'array': a spec must be a JSON object"},
        {R"({"max-power": 1})", "rtline: spec key 'max-power': is not a key of 'size'"},
        {R"({"r25": "10q", "beta": 3890, "span": "0:45", "circuit": "divider-low"})",
         "rtline: --r25 '10q': expected a resistance such as 470, 4k7, 10k or 1M5"},
        {"", "rtline: --spec 'stdin': is not valid JSON"},
    };
    for (const Case& c : cases) {
        const auto r = run_rtline({"size", "--spec", "-"}, c.spec);
        INFO(c.spec);
        CHECK(r.code == 2);
        CHECK(r.out.empty());
        CHECK(r.err.rfind(c.message, 0) == 0);
        CHECK(lines_of(r.err).size() == 1);
    }
}

TEST_CASE("a missing spec file is exit 2 naming it") {
    const auto r = run_rtline({"size", "--spec", "/nonexistent/spec.json"});
    CHECK(r.code == 2);
    CHECK(r.err == "rtline: --spec '/nonexistent/spec.json': cannot be opened\n");
}

TEST_CASE("a JSON Lines batch answers each line in order and goes on past a bad one") {
    const std::string input = std::string(R"({"r25": "10k", "beta": 3890, "span": "0:45", "circuit": "divider-low"})") +
                              "\n" + R"({"r25": "10k", "beta": -1, "span": "0:45", "circuit": "divider-low"})" +
                              "\n\n" + "{truncated\n" +
                              R"({"r25": "47k", "beta": 4090, "span": "-20:60", "circuit": "bridge"})" + "\n";
    const auto r = run_rtline({"size", "--jsonl", "--top", "1"}, input);
    CHECK(r.code == 2);
    const auto out = lines_of(r.out);
    REQUIRE(out.size() == 4);  // the blank line is skipped, every other line answered
    const json first = json::parse(out[0]);
    CHECK(first["command"] == "size");
    CHECK(first["candidates"].size() == 1);  // the command line's --top applies to every line
    const json second = json::parse(out[1]);
    CHECK(second["line"] == 2);
    CHECK(second["error"] == "--beta '-1': the B-value of an NTC must be positive (kelvin)");
    CHECK(json::parse(out[2])["line"] == 4);
    CHECK(json::parse(out[3])["model"]["r0_ohm"] == 47000.0);
}

TEST_CASE("a batch of good lines exits 0, and one with no feasible design exits 1") {
    const std::string good = R"({"r25": "10k", "beta": 3890, "span": "0:45", "circuit": "divider-low"})";
    const auto ok = run_rtline({"size", "--jsonl"}, good + "\n" + good + "\n");
    CHECK(ok.code == 0);
    CHECK(lines_of(ok.out).size() == 2);
    const std::string tight =
        R"({"r25": "10k", "beta": 3890, "span": "0:45", "circuit": "divider-low", "min_span": 0.99})";
    const auto infeasible = run_rtline({"size", "--jsonl"}, good + "\n" + tight + "\n");
    CHECK(infeasible.code == 1);
    const json j = json::parse(lines_of(infeasible.out).at(1));
    CHECK(j["infeasible"] == true);
    CHECK(j["line"] == 2);
}

TEST_CASE("a batch refuses -o, and --spec together with --jsonl") {
    const auto with_o = run_rtline({"size", "--jsonl", "-o", "/tmp/x.json"},
                                   R"({"r25": "10k", "beta": 3890, "span": "0:45", "circuit": "divider-low"})");
    CHECK(with_o.code == 2);
    CHECK(json::parse(with_o.out)["error"] == "-o '/tmp/x.json': not with --jsonl: each result is one line on stdout");
    const auto both = run_rtline({"size", "--jsonl", "--spec", "x.json"}, "");
    CHECK(both.code == 2);
    CHECK(both.out.empty());
}
