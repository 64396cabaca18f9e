// Documentation currency, not correctness: every ```text block in README.md and docs/*.md that starts
// with "$ command" must be exactly what that command prints today (scripts/refresh-docs.py pastes it).
// A golden block only says the page is up to date; it proves no number right. The figures the pages
// show must each be held to an outside source by a test of their own (numpy/scipy scripts in
// tests/ref, ngspice, the published formulas); a figure only this test holds is a gap to close there.
#include <doctest/doctest.h>

#include <filesystem>
#include <sstream>

#include "support.hpp"

namespace {

struct Block {
    std::string command;
    std::string expected;
    int line = 0;
};

std::vector<Block> blocks_of(const std::string& text) {
    std::vector<std::string> lines;
    std::istringstream in(text);
    for (std::string l; std::getline(in, l);) lines.push_back(l);
    std::vector<Block> blocks;
    for (std::size_t i = 0; i + 1 < lines.size(); ++i) {
        if (lines[i] != "```text" || lines[i + 1].rfind("$ ", 0) != 0) continue;
        Block b;
        b.line = static_cast<int>(i + 2);
        std::size_t j = i + 1;
        b.command = lines[j].substr(2);
        while (!lines[j].empty() && lines[j].back() == '\\' && j + 1 < lines.size()) b.command += "\n" + lines[++j];
        for (++j; j < lines.size() && lines[j].rfind("```", 0) != 0; ++j) b.expected += lines[j] + "\n";
        blocks.push_back(b);
        i = j;
    }
    return blocks;
}

std::string exe_dir() { return std::filesystem::path(RTLINE_EXE).parent_path().string(); }

}  // namespace

TEST_CASE("documentation currency: every command shown in README.md and docs/ prints what the page shows") {
    const std::string root = rtline::test::source_dir();
    std::vector<std::string> pages = {root + "/README.md"};
    if (std::filesystem::exists(root + "/docs")) {
        for (const auto& e : std::filesystem::directory_iterator(root + "/docs")) {
            if (e.path().extension() == ".md") pages.push_back(e.path().string());
        }
    }
    int checked = 0;
    for (const std::string& page : pages) {
        for (const Block& b : blocks_of(rtline::test::read_file(page))) {
            const auto r =
                rtline::test::run_shell("cd '" + root + "' && PATH='" + exe_dir() + "':\"$PATH\" && " + b.command);
            std::string got = r.out;
            if (r.code != 0) got += r.err;
            while (!got.empty() && got.back() == '\n') got.pop_back();
            std::string want = b.expected;
            while (!want.empty() && want.back() == '\n') want.pop_back();
            INFO(page << ":" << b.line << ": $ " << b.command);
            CHECK(got == want);
            ++checked;
        }
    }
    CHECK(checked >= 3);  // the README's tour alone has four
}
