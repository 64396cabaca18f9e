// The writers of `rtline design`: the report as text, JSON and Markdown, the words for a design that
// misses its target, and the review package (report.md, design.json, the C header, the SVG pictures).
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "budget_flags.hpp"
#include "report.hpp"
#include "rtline/design.hpp"

namespace rtline::cli {

// A design run: what was asked, what came of it, and what the writers need to say how.
struct DesignRun {
    DesignSpec spec;
    Design design;
    std::size_t runners_up = 5;
    BudgetFlags flags;            // the budget's flags as typed (design.json gives them back)
    std::string candidates_file;  // --candidates, when given
    std::string max_error_text;
    std::string prefix;  // the C header's prefix
};

[[nodiscard]] Json design_json(const DesignRun& r);
[[nodiscard]] std::string design_text(const DesignRun& r);
// `package`: the report.md of a review package (it links the SVG files written beside it).
[[nodiscard]] std::string design_markdown(const DesignRun& r, bool package);
// A missed target in words: "the B-value tolerance alone gives 0.61 °C at -40 °C ...".
[[nodiscard]] std::string shortfall_words(const DesignRun& r);
// The chosen design in one line: "thermistor in divider-low, rs = 10k (E24): 1.2 °C at -20 °C".
[[nodiscard]] std::string chosen_words(const DesignRun& r);
// The package's files: name → bytes.
[[nodiscard]] std::vector<std::pair<std::string, std::string>> design_package(const DesignRun& r);

}  // namespace rtline::cli
