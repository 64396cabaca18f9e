#include "markdown.hpp"

#include "common.hpp"

namespace rtline::cli {

std::string facts_text(const Facts& facts, std::size_t column, const std::string& suffix) {
    std::string out;
    for (const Fact& f : facts) {
        const std::string label = f.label.empty() ? "" : f.label + suffix;
        const std::size_t used = width(label);
        out += label + std::string(column > used ? column - used : 1, ' ') + f.value + "\n";
    }
    return out;
}

Markdown::Markdown(const std::string& title) : out_("# " + markdown_escape(title) + "\n") {}

void Markdown::section(const std::string& title) { out_ += "\n## " + markdown_escape(title) + "\n"; }

void Markdown::paragraph(const std::string& text) { out_ += "\n" + markdown_escape(text) + "\n"; }

void Markdown::facts(const Facts& facts) {
    if (facts.empty()) return;
    out_ += "\n";
    bool open = false;
    for (const Fact& f : facts) {
        if (f.label.empty() && open) {
            out_ += "; " + markdown_escape(f.value);
            continue;
        }
        if (open) out_ += "\n";
        out_ += "- " + (f.label.empty() ? "" : "**" + markdown_escape(f.label) + ":** ") + markdown_escape(f.value);
        open = true;
    }
    out_ += "\n";
}

void Markdown::list(const std::vector<std::string>& items) {
    if (items.empty()) return;
    out_ += "\n";
    for (const std::string& item : items) out_ += "- " + markdown_escape(item) + "\n";
}

void Markdown::code(const std::string& text) {
    std::size_t begin = text.find_first_not_of('\n');
    if (begin == std::string::npos) return;
    std::string body = text.substr(begin);
    if (body.back() != '\n') body += '\n';
    out_ += "\n```text\n" + body + "```\n";
}

void Markdown::table(const Table& table) { out_ += "\n" + table.markdown(); }

std::string Markdown::str(const std::vector<std::string>& extra_warnings) const {
    std::string out = out_;
    std::vector<std::string> all = warnings();
    all.insert(all.end(), extra_warnings.begin(), extra_warnings.end());
    if (!all.empty()) {
        out += "\n";
        for (std::size_t i = 0; i < all.size(); ++i) {
            out += std::string(i == 0 ? "" : ">\n") + "> **Warning:** " + markdown_escape(all[i]) + "\n";
        }
    }
    std::string caution = kSafetyNote;
    const std::string lead = "Caution: ";
    if (caution.rfind(lead, 0) == 0) caution.erase(0, lead.size());
    out += "\n> **Caution:** " + markdown_escape(caution) + "\n";
    return out;
}

}  // namespace rtline::cli
