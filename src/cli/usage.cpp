#include "usage.hpp"

#include <algorithm>
#include <cctype>

namespace rtline::cli {

namespace {

std::string see_help(const CLI::App& sub) { return " (see rtline " + sub.get_name() + " --help)"; }

std::vector<std::string> command_names(const CLI::App& app) {
    std::vector<std::string> names;
    for (const CLI::App* sub : app.get_subcommands([](const CLI::App*) { return true; })) {
        names.push_back(sub->get_name());
    }
    return names;
}

std::string command_list(const std::vector<std::string>& names) {
    std::string s;
    for (std::size_t i = 0; i < names.size(); ++i) {
        if (i > 0) s += i + 1 == names.size() ? " or " : ", ";
        s += names[i];
    }
    return s;
}

// Every spelling of every option of `sub`: --long and -s.
std::vector<std::string> option_names(const CLI::App& sub) {
    std::vector<std::string> names;
    for (const CLI::Option* opt : sub.get_options()) {
        for (const std::string& l : opt->get_lnames()) names.push_back("--" + l);
        for (const std::string& s : opt->get_snames()) names.push_back("-" + s);
    }
    return names;
}

bool takes_value(const CLI::Option* opt) { return opt->get_type_size_max() > 0 && opt->get_expected_max() > 0; }

// An argument that reads as an option name rather than a value: "--x", or "-x" for a short option the
// command has (a value may start with '-': "-30:5", "-inf:5").
bool reads_as_option(const CLI::App& sub, const std::string& a) {
    if (a.rfind("--", 0) == 0 && a.size() > 2) return true;
    return a.size() == 2 && a[0] == '-' && sub.get_option_no_throw(a) != nullptr;
}

[[noreturn]] void unknown_option(const CLI::App& sub, const std::string& name, const std::string& where) {
    const std::string near = nearest_name(name, option_names(sub));
    throw UsageError("unknown option " + name + " for " + where + (near.empty() ? "" : "; did you mean " + near + "?") +
                     see_help(sub));
}

}  // namespace

std::size_t edit_distance(const std::string& a, const std::string& b) {
    // Optimal string alignment: insertions, deletions, substitutions and swaps of two neighbours.
    std::vector<std::vector<std::size_t>> d(a.size() + 1, std::vector<std::size_t>(b.size() + 1));
    for (std::size_t i = 0; i <= a.size(); ++i) d[i][0] = i;
    for (std::size_t j = 0; j <= b.size(); ++j) d[0][j] = j;
    for (std::size_t i = 1; i <= a.size(); ++i) {
        for (std::size_t j = 1; j <= b.size(); ++j) {
            d[i][j] = std::min({d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1)});
            if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1]) {
                d[i][j] = std::min(d[i][j], d[i - 2][j - 2] + 1);
            }
        }
    }
    return d[a.size()][b.size()];
}

std::string nearest_name(const std::string& typed, const std::vector<std::string>& names) {
    // Leading dashes are not letters the user could have slipped on.
    auto letters = [](const std::string& s) { return s.substr(std::min(s.find_first_not_of('-'), s.size())); };
    const std::string t = letters(typed);
    std::string best;
    std::size_t best_d = t.size();
    for (const std::string& n : names) {
        const std::size_t d = edit_distance(t, letters(n));
        if (d < best_d) {
            best_d = d;
            best = n;
        }
    }
    return best_d * 3 <= t.size() ? best : std::string();
}

void check_program_usage(const CLI::App& app, const std::vector<std::string>& before, const std::string& command) {
    const std::vector<std::string> commands = command_names(app);
    for (const std::string& a : before) {
        if (a == "--help" || a == "-h" || a == "--help-all" || a == "--version") return;  // they need no command
        if (!a.empty() && a[0] == '-') {
            const std::string name = a.substr(0, a.find('='));
            throw UsageError("unknown option " + name + " before the command; the program takes --help and --version" +
                             std::string(" (see rtline --help)"));
        }
    }
    const std::string choose = "choose " + command_list(commands) + " (see rtline --help)";
    if (command.empty()) throw UsageError("no command given; " + choose);
    if (std::find(commands.begin(), commands.end(), command) != commands.end()) return;
    const std::string near = nearest_name(command, commands);
    throw UsageError("unknown command '" + command + "'" + (near.empty() ? "" : "; did you mean " + near + "?") + "; " +
                     choose);
}

void check_command_usage(const CLI::App& sub, const std::vector<std::string>& args, bool complete) {
    std::vector<const CLI::Option*> given;
    for (std::size_t i = 0; i < args.size(); ++i) {
        const std::string& a = args[i];
        // A value where a flag should be: a word, or a number (which may start with '-').
        const bool numeric =
            a.size() > 1 && a[0] == '-' && (std::isdigit(static_cast<unsigned char>(a[1])) || a[1] == '.');
        if (a.size() < 2 || a[0] != '-' || numeric) {
            throw UsageError("unexpected argument '" + a + "': each value follows its flag, as in --rs 10k" +
                             see_help(sub));
        }
        const std::size_t eq = a.find('=');
        const std::string name = a.substr(0, eq);
        const CLI::Option* opt = sub.get_option_no_throw(name);
        if (opt == nullptr) unknown_option(sub, name, sub.get_name());
        given.push_back(opt);
        if (!takes_value(opt)) {
            if (eq != std::string::npos) throw UsageError(name + " takes no value" + see_help(sub));
            continue;
        }
        if (eq != std::string::npos) {
            if (eq + 1 == a.size()) throw UsageError(name + " needs a value after the '='" + see_help(sub));
            continue;
        }
        if (i + 1 == args.size() || reads_as_option(sub, args[i + 1])) {
            throw UsageError(name + " needs a value" + see_help(sub));
        }
        ++i;
    }
    if (!complete) return;
    if (std::any_of(given.begin(), given.end(), [&](const CLI::Option* o) { return o == sub.get_help_ptr(); })) return;
    for (const CLI::Option* opt : sub.get_options()) {
        if (opt->get_required() && std::find(given.begin(), given.end(), opt) == given.end()) {
            throw UsageError(opt->get_name() + " is required" + see_help(sub));
        }
    }
}

UsageError rephrase(const CLI::ParseError& e, const CLI::App& sub) {
    // What check_command_usage() cannot see (a parser rule of its own): named by its class, never its text.
    if (dynamic_cast<const CLI::RequiredError*>(&e) != nullptr)
        return UsageError("a required flag is missing" + see_help(sub));
    if (dynamic_cast<const CLI::ExtrasError*>(&e) != nullptr) return UsageError("unexpected arguments" + see_help(sub));
    // A FILE flag's check (non_empty_file_name): "--svg: " and our own words.
    if (dynamic_cast<const CLI::ValidationError*>(&e) != nullptr) return UsageError(e.what() + see_help(sub));
    return UsageError("the command line cannot be read" + see_help(sub));
}

}  // namespace rtline::cli
