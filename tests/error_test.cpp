// The core's errors: one base type, inputs named by a stable key, rendered in the core's words or in
// a front end's. The expected messages are written out by hand from the rule in error.hpp.
#include <doctest/doctest.h>

#include <set>
#include <string>

#include "common.hpp"
#include "rtline/error.hpp"
#include "rtline/grid.hpp"
#include "rtline/thermistor.hpp"
#include "support.hpp"

using namespace rtline;

TEST_CASE("every input has a distinct key and noun, and its key finds it again") {
    std::set<std::string> keys;
    std::set<std::string> nouns;
    REQUIRE(all_inputs().size() == kInputCount);
    for (const Input input : all_inputs()) {
        const std::string key(input_key(input));
        CAPTURE(key);
        CHECK(keys.insert(key).second);
        CHECK(nouns.insert(std::string(input_noun(input))).second);
        CHECK(input_from_key(key) == input);
        CHECK(key.find_first_of("{}- ") == std::string::npos);  // usable as a "{key}" in a message
    }
    CHECK_FALSE(input_from_key("no_such_input").has_value());
}

TEST_CASE("an input error reads in the core's words, and in a front end's when rendered") {
    const InputError e(Input::step, "0", "must be positive; or give a narrower {span}");
    CHECK(std::string(e.what()) == "the step '0': must be positive; or give a narrower the span");
    CHECK(e.input() == Input::step);
    CHECK(e.field() == "step");
    CHECK(e.why() == "must be positive; or give a narrower {span}");
    CHECK(e.render([](Input i) { return "<" + std::string(input_key(i)) + ">"; }) ==
          "<step> '0': must be positive; or give a narrower <span>");
    // Braces that name no input, and the quoted value, are left as they are.
    const InputError odd(Input::span, "{step}", "a {brace} stays");
    CHECK(odd.render([](Input) { return std::string("X"); }) == "X '{step}': a {brace} stays");
    // with_value keeps the input.
    CHECK(e.with_value("0.0").render(cli::flag_name) == "--step '0.0': must be positive; or give a narrower --span");
}

TEST_CASE("a field the caller names is kept as given; the rest of the message is still rendered") {
    const InputError e("pts.csv", "", "needs {b_value}");
    CHECK_FALSE(e.input().has_value());
    CHECK(std::string(e.what()) == "pts.csv: needs the B-value");
    CHECK(cli::message(e) == "pts.csv: needs --beta");
    const InfeasibleError none("nothing meets {min_span}");
    const Error& base = none;  // one base type for everything the core throws
    CHECK(std::string(base.what()) == "nothing meets the least output span");
    CHECK(cli::message(base) == "nothing meets --min-span");
}

TEST_CASE("every input maps to a flag the program has") {
    // The program's own help lists its flags: each command's --help is its definition.
    std::string help;
    for (const char* cmd : {"model", "fit", "check", "size", "table", "budget"}) {
        help += rtline::test::run_rtline({cmd, "--help"}).out;
    }
    REQUIRE(!help.empty());
    for (const Input input : all_inputs()) {
        const std::string flag = cli::flag_name(input);
        CAPTURE(flag);
        CHECK(flag.rfind("--", 0) == 0);
        CHECK(help.find(flag + " ") != std::string::npos);
    }
}

TEST_CASE("a table model refuses a repeated temperature where it is built, with that reason") {
    try {
        (void)TableModel({{273.15, 30e3}, {298.15, 10e3}, {298.15, 9e3}});
        FAIL("a repeated temperature was accepted");
    } catch (const InputError& e) {
        CHECK(e.input() == Input::points);
        CHECK(std::string(e.what()) == "the R-T points '25 C': duplicate temperature");
    }
    CHECK_THROWS_AS((void)TableModel({{298.15, 10e3}}), InputError);                     // one point
    CHECK_THROWS_AS((void)TableModel({{273.15, 10e3}, {298.15, 20e3}}), InputError);     // rising R
    CHECK_NOTHROW((void)TableModel({{298.15, 10e3}, {273.15, 30e3}}));                   // any order
}
