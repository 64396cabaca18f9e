// -o FILE: every command writes its result to a temporary file beside FILE and renames it
// into place once complete, so a failed run — bad input, no feasible design, a file that cannot be
// replaced — leaves an existing FILE exactly as it was, and no temporary file stays behind.
#include <doctest/doctest.h>

#include <filesystem>
#include <string>
#include <vector>

#include "support.hpp"

using rtline::test::read_file;
using rtline::test::run_rtline;
using rtline::test::write_file;

namespace fs = std::filesystem;

namespace {

// A fresh folder, removed with its contents when the object dies.
class TempDir {
public:
    TempDir() : path_(rtline::test::TempPath(".d").str()) { fs::create_directory(path_); }
    ~TempDir() {
        std::error_code ec;
        fs::remove_all(path_, ec);
    }
    TempDir(const TempDir&) = delete;
    TempDir& operator=(const TempDir&) = delete;
    [[nodiscard]] std::string file(const std::string& name) const { return path_ + "/" + name; }
    // The names in the folder.
    [[nodiscard]] std::vector<std::string> names() const {
        std::vector<std::string> n;
        for (const auto& e : fs::directory_iterator(path_)) n.push_back(e.path().filename().string());
        return n;
    }

private:
    std::string path_;
};

struct Command {
    const char* name;
    std::vector<std::string> good;  // succeeds
    std::vector<std::string> bad;   // fails once the flags are parsed
    int bad_code;                   // its exit code
};

const std::vector<std::string> kBeta = {"--r25", "10k", "--beta", "3950", "--span", "0:50"};

std::vector<std::string> with(std::vector<std::string> a, const std::vector<std::string>& b) {
    a.insert(a.end(), b.begin(), b.end());
    return a;
}

const std::vector<Command> kCommands = {
    {"model", with(with({"model"}, kBeta), {"--step", "10"}), with(with({"model"}, kBeta), {"--step", "0"}), 2},
    {"fit",
     {"fit", "--points", rtline::test::source_dir() + "/examples/freezer-room-rt.csv"},
     {"fit", "--points", rtline::test::source_dir() + "/examples/no-such-file.csv"},
     2},
    {"check", with(with({"check"}, kBeta), {"--circuit", "divider-low", "--rs", "10k", "--step", "10"}),
     with(with({"check"}, kBeta), {"--circuit", "divider-low", "--rs", "10k", "--line", "straight"}), 2},
    // --min-span 2 V/V is out of reach of any ratiometric divider (it spans at most 1 V/V): exit 1.
    {"size", with(with({"size"}, kBeta), {"--circuit", "divider-low", "--step", "10"}),
     with(with({"size"}, kBeta), {"--circuit", "divider-low", "--min-span", "2"}), 1},
    {"table", with(with({"table"}, kBeta), {"--circuit", "divider-low", "--rs", "10k", "--emit", "c"}),
     with(with({"table"}, kBeta), {"--circuit", "divider-low", "--rs", "10k", "--adc-bits", "25"}), 2},
};

const std::string kPrevious = "the previous design review, which must survive a failed run\n";

}  // namespace

TEST_CASE("a failed run leaves an existing -o file as it was, for every command") {
    for (const Command& c : kCommands) {
        INFO("command: " << std::string(c.name));
        const TempDir dir;
        const std::string out = dir.file("result.txt");
        write_file(out, kPrevious);
        const auto r = run_rtline(with(c.bad, {"-o", out}));
        CHECK(r.code == c.bad_code);
        CHECK(r.out.empty());
        CHECK(read_file(out) == kPrevious);
        CHECK(dir.names() == std::vector<std::string>{"result.txt"});
    }
}

TEST_CASE("a successful run replaces the -o file with what it would print, for every command") {
    for (const Command& c : kCommands) {
        INFO("command: " << std::string(c.name));
        const auto printed = run_rtline(c.good);
        REQUIRE(printed.code == 0);
        const TempDir dir;
        const std::string out = dir.file("result.txt");
        write_file(out, kPrevious);
        const auto r = run_rtline(with(c.good, {"-o", out}));
        CHECK(r.code == 0);
        CHECK(r.out.empty());
        CHECK(r.err.empty());
        CHECK(read_file(out) == printed.out);
        CHECK(dir.names() == std::vector<std::string>{"result.txt"});
    }
}

TEST_CASE("a successful run creates the -o file when it does not exist yet") {
    const TempDir dir;
    const auto r = run_rtline(with(kCommands[0].good, {"-o", dir.file("new.txt")}));
    CHECK(r.code == 0);
    CHECK(read_file(dir.file("new.txt")) == run_rtline(kCommands[0].good).out);
    CHECK(dir.names() == std::vector<std::string>{"new.txt"});
}

TEST_CASE("an -o file in a folder that does not exist is bad input, and nothing is written") {
    const TempDir dir;
    const std::string out = dir.file("missing/result.txt");
    const auto r = run_rtline(with(kCommands[0].good, {"-o", out}));
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    CHECK(r.err == "rtline: -o '" + out + "': cannot be written (no such folder, or no permission)\n");
    CHECK(dir.names().empty());
}

TEST_CASE("an -o that names a folder is bad input, and no temporary file stays beside it") {
    const TempDir dir;
    fs::create_directory(dir.file("reports"));
    const auto r = run_rtline(with(kCommands[0].good, {"-o", dir.file("reports")}));
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    CHECK(r.err.rfind("rtline: -o '" + dir.file("reports") + "': cannot be replaced: ", 0) == 0);
    CHECK(dir.names() == std::vector<std::string>{"reports"});
    CHECK(fs::is_empty(dir.file("reports")));
}

// /dev/full accepts opening and fails every write with ENOSPC (Linux null(4)): a full disk without root.
TEST_CASE("a result that cannot be written to stdout is a failure, in every format, and says so") {
    std::string exe = RTLINE_EXE;
    exe.insert(0, 1, '\'');
    exe.push_back('\'');
    for (const Command& c : kCommands) {
        for (const char* format : {"text", "json", "csv"}) {
            std::string line = exe;
            for (const std::string& a : c.good) line += " '" + a + "'";
            if (std::string(c.name) != "table") line += std::string(" --format ") + format;
            INFO(line);
            const auto r = rtline::test::run_shell(line + " >/dev/full");
            CHECK(r.code == 2);
            CHECK(r.err == "rtline: stdout: writing failed: no space left on device\n");
        }
    }
    // The help, too.
    const auto help = rtline::test::run_shell(exe + " model --help >/dev/full");
    CHECK(help.code == 2);
    CHECK(help.err == "rtline: stdout: writing failed: no space left on device\n");
}

TEST_CASE("a reader that goes away ends the run quietly, as SIGPIPE does for Unix tools") {
    // 0 to 50 °C at 1 mK is 50001 lines, far more than one pipe buffer; head reads one and leaves.
    std::string line = RTLINE_EXE;
    line.insert(0, 1, '\'');
    line.append("' model --r25 10k --beta 3950 --span 0:50 --step 0.001 | head -n 1");
    const auto r = rtline::test::run_shell(line);
    CHECK(r.code == 0);
    CHECK(r.out == "beta model: R25 = 10k ohm, B = 3950 K\n");
    CHECK(r.err.empty());
}

TEST_CASE("-o refuses a device as the target: the rename would replace it") {
    // /dev/null is a character device on every Linux system (POSIX requires it); as root the rename
    // of the temporary file would have replaced it with a plain file.
    const std::string target = "/dev/null";
    const auto r = run_rtline({"model", "--r25", "10k", "--beta", "3950", "--span", "0:50", "-o", target});
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    CHECK(r.err ==
          "rtline: -o '/dev/null': is not a regular file (a device, a pipe or a socket); for stdout leave the flag out\n");
    CHECK(std::filesystem::is_character_file("/dev/null"));
}
