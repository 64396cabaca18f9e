// Markdown documents for design reviews (`--format markdown`): a heading, the inputs as a list, each
// data table as a pipe table (Table::markdown()), the run's warnings and the safety caution as block
// quotes. Facts are the labelled lines a report opens and closes with, shared by the text output so
// that both say the same thing in one place.
#pragma once

#include <string>
#include <vector>

#include "report.hpp"

namespace rtline::cli {

// A labelled line of a report: "model: beta model ...". An empty label continues the previous fact on
// a line of its own.
struct Fact {
    std::string label;
    std::string value;
};
using Facts = std::vector<Fact>;

// The facts as text lines: each label (with `suffix`, e.g. ":") padded to `column` characters, then
// the value; a continuation is indented to the column.
[[nodiscard]] std::string facts_text(const Facts& facts, std::size_t column, const std::string& suffix = ":");

class Markdown {
public:
    // Starts the document with a level-1 heading.
    explicit Markdown(const std::string& title);
    // A level-2 heading.
    void section(const std::string& title);
    // A paragraph of running text (escaped).
    void paragraph(const std::string& text);
    // The facts as a bulleted list, "**label:** value"; a continuation joins its fact with "; ".
    void facts(const Facts& facts);
    // A bulleted list of plain items.
    void list(const std::vector<std::string>& items);
    // Preformatted text (a report block in the text output's layout) as a fenced code block.
    void code(const std::string& text);
    // A pipe table (Table::markdown()).
    void table(const Table& table);
    // The finished document: the run's warnings() and `extra_warnings` as one block quote, then the
    // safety caution as another.
    [[nodiscard]] std::string str(const std::vector<std::string>& extra_warnings = {}) const;

private:
    std::string out_;
};

}  // namespace rtline::cli
