// The whole rtline program declared on one CLI11 app: its description, every command with its flags,
// the exit codes in each command's help. main() parses with it; the spec fuzzer builds it too.
#include <string>

#include "commands.hpp"
#include "common.hpp"

namespace rtline::cli {

namespace {

// The exit codes `command` can give, for its --help: model, fit, check and budget never search for a design,
// so they never exit 1.
std::string exit_codes(const std::string& command) {
    const bool searches = command != "model" && command != "fit" && command != "check" && command != "budget";
    return std::string("Exit codes: 0 success, ") + (searches ? "1 no design meets the constraints, " : "") +
           "2 bad input or usage, 3 internal error (with --jsonl: the worst line's).";
}

}  // namespace

void build_program(CLI::App& app, const std::string& only) {
    app.description(
        "rtline designs NTC thermistor linearization circuits: thermistor models and fits, divider, shunt\n"
        "and bridge networks checked against a straight line, resistor sizing with standard values.");
    app.name("rtline");
    app.set_version_flag("--version", std::string("rtline ") + RTLINE_VERSION);
    app.require_subcommand(1);
    // A flag given twice keeps its last value: the command line overrides a spec file.
    app.option_defaults()->multi_option_policy(CLI::MultiOptionPolicy::TakeLast);
    app.get_formatter()->label("TEXT", "VALUE");
    app.footer(std::string("Every command also takes --spec FILE (a JSON object of flag values, '-' for stdin) and\n"
                           "--jsonl (one spec per stdin line, one JSON result per stdout line).\n"
                           "Exit codes: 0 success, 1 no design meets the constraints, 2 bad input or usage, "
                           "3 internal error;\nwith --jsonl the worst line's (3, else 2, else 1).\n\n") +
               kSafetyNote);
    // Only the command `only` when it is given: a --jsonl batch builds a fresh program for every line,
    // and declaring every command's flags each time would cost more than the sizing itself.
    const std::pair<const char*, void (*)(CLI::App&)> commands[] = {
        {"model", setup_model}, {"fit", setup_fit},     {"check", setup_check},
        {"size", setup_size},   {"table", setup_table}, {"budget", setup_budget}, {"design", setup_design},
    };
    for (const auto& command : commands) {
        if (only.empty() || only == command.first) command.second(app);
    }
    for (CLI::App* sub : app.get_subcommands({})) {
        // The exit codes go before the safety caution, which closes the help.
        std::string footer = sub->get_footer();
        const std::size_t caution = footer.find("\n\nCaution:");
        footer.insert(caution == std::string::npos ? footer.size() : caution, "\n" + exit_codes(sub->get_name()));
        sub->footer(footer);
        // Declared for --help; read_invocation() takes both out of the arguments before parsing.
        sub->add_option("--spec", "JSON spec: keys are the long flag names with _ for - ('-' reads stdin)")
            ->type_name("FILE")
            ->group("Input");
        sub->add_option("--jsonl", "Batch: one JSON spec per stdin line, one JSON result per stdout line")
            ->expected(0)
            ->group("Input");
    }
}

}  // namespace rtline::cli
