// Fuzz target: the spec reader. The text is parsed as a spec (parse_spec) and turned into flag
// arguments for every real subcommand of the program (spec_arguments, on the app main() builds);
// the two quick commands, model and check, then run on them as `rtline model --spec` would.
// Properties: a refusal is an InputError; accepted arguments are the subcommand's own long flags,
// each followed by a value unless it is a switch; a run ends in a result with no NaN or infinity in
// it, or in bad input or no feasible design — never in another exception (exit code 3).
#include <cctype>
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "check.hpp"
#include "commands.hpp"
#include "rtline/error.hpp"
#include "rtline/units.hpp"
#include "spec.hpp"

namespace {

CLI::App& program() {
    static CLI::App app;
    static const bool built = (rtline::cli::build_program(app), true);
    (void)built;
    return app;
}

void check_arguments(const std::vector<std::string>& args, const CLI::App& sub) {
    std::size_t i = 0;
    while (i < args.size()) {
        FUZZ_CHECK(args[i].rfind("--", 0) == 0);
        const CLI::Option* opt = sub.get_option_no_throw(args[i]);
        FUZZ_CHECK(opt != nullptr);
        FUZZ_CHECK(args[i] != "--spec" && args[i] != "--jsonl");
        i += opt->get_expected_max() == 0 ? 1 : 2;
    }
    FUZZ_CHECK(i == args.size());
}

// True when `text` holds the word nan or inf (any case): a non-finite number printed as a result.
bool has_non_finite(const std::string& text) {
    std::string word;
    for (std::size_t i = 0; i <= text.size(); ++i) {
        const unsigned char c = i < text.size() ? static_cast<unsigned char>(text[i]) : ' ';
        if (std::isalpha(c)) {
            word += static_cast<char>(std::tolower(c));
            continue;
        }
        if (word == "nan" || word == "inf" || word == "infinity") return true;
        word.clear();
    }
    return false;
}

// The value after `flag` in `args` (the last one: the last given wins), or `fallback`.
std::string value_of(const std::vector<std::string>& args, const std::string& flag, const std::string& fallback) {
    std::string v = fallback;
    for (std::size_t i = 0; i + 1 < args.size(); ++i) {
        if (args[i] == flag) v = args[i + 1];
    }
    return v;
}

// False when the grid would hold more than 5000 points: such runs take seconds, and find nothing a
// smaller grid would not (the grid's own limit is tested by the catalogue).
bool small_grid(const std::vector<std::string>& args) {
    try {
        const rtline::Span span = rtline::parse_span(value_of(args, "--span", ""), "--span");
        std::string step = value_of(args, "--step", "1");
        if (!step.empty() && (step.back() == 'K' || step.back() == 'C')) step.pop_back();
        return (span.hi_k - span.lo_k) / rtline::parse_number(step, "--step") <= 5000.0;
    } catch (const rtline::InputError&) {
        return true;  // the run itself refuses it, quickly
    }
}

// Runs `command` with `args` on a fresh program, its output collected instead of printed.
void run(const std::string& command, const std::vector<std::string>& args) {
    for (const std::string& a : args) {
        if (a == "--points" || a == "--output" || a == "--svg") return;  // fuzzed input names no files to read or write
    }
    if (!small_grid(args)) return;
    CLI::App app;
    rtline::cli::build_program(app);
    std::vector<std::string> reversed(args.rbegin(), args.rend());
    reversed.push_back(command);
    std::string bytes;
    try {
        const rtline::cli::SinkScope scope(bytes);
        app.parse(reversed);
    } catch (const CLI::ParseError&) {
        return;
    } catch (const rtline::InputError&) {
        return;
    } catch (const rtline::InfeasibleError&) {
        return;
    }
    FUZZ_CHECK(!has_non_finite(bytes));
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string text(reinterpret_cast<const char*>(data), size);
    rtline::cli::Json spec;
    try {
        spec = rtline::cli::parse_spec(text, "--spec", "fuzz.json");
    } catch (const rtline::InputError& e) {
        FUZZ_CHECK(e.field() == "--spec");
        return 0;
    }
    for (CLI::App* sub : program().get_subcommands({})) {
        std::vector<std::string> args;
        try {
            args = rtline::cli::spec_arguments(spec, *sub);
            check_arguments(args, *sub);
        } catch (const rtline::InputError& e) {
            FUZZ_CHECK(!e.field().empty() && !e.why().empty());
            continue;
        }
        if (sub->get_name() == "model" || sub->get_name() == "check") run(sub->get_name(), args);
    }
    return 0;
}
