// The program's outer behaviour: version, help, exit codes for usage errors.
#include <doctest/doctest.h>

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
