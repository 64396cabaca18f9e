// Writes rtline's bash completion script from the program's own CLI11 definition: the build runs it
// (see cmake/docs.cmake) and the package installs the script. It walks the App tree that main() parses
// with: every command, every visible option, whether an option takes a value. Which values an option
// takes is not in the tree (the commands parse their words themselves), so the choices are listed here;
// each list is checked when the script is made, and the build stops if one no longer fits:
//   - circuit names come from the core (all_topologies), E-series and line names are parsed by the core;
//   - every other choice must appear in its option's help text (of at least one command, and a command
//     offers only the ones its help names), and every file option named below must exist.
//   rtline_completion FILE
#include <CLI/CLI.hpp>
#include <cctype>
#include <fstream>
#include <iostream>
#include <map>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "commands.hpp"
#include "rtline/circuit.hpp"
#include "rtline/converter.hpp"
#include "rtline/error.hpp"
#include "rtline/eseries.hpp"
#include "rtline/linearity.hpp"

namespace {

struct Choices {
    std::vector<std::string> words;
    bool from_core = false;  // checked by the core's own parser instead of the help text
};

// Option long name -> the words it takes.
std::map<std::string, Choices> choice_table() {
    std::map<std::string, Choices> t;
    Choices circuit{{}, true};
    for (const rtline::Topology topology : rtline::all_topologies())
        circuit.words.emplace_back(rtline::topology_name(topology));
    t["--circuit"] = circuit;
    t["--series"] = {{"E3", "E6", "E12", "E24", "E48", "E96", "E192"}, true};
    t["--line"] = {{"endpoint", "least-squares", "minimax"}, true};
    t["--adc-transfer"] = {{"rounding", "truncating", "full-scale"}, true};
    t["--format"] = {{"text", "json", "csv", "markdown"}, false};
    t["--model"] = {{"sh", "beta", "table"}, false};  // fit takes the first two; see below
    t["--spacing"] = {{"code", "error", "power-of-two"}, false};
    t["--fit"] = {{"least-squares", "minimax"}, false};
    t["--emit"] = {{"c"}, false};
    t["--unit"] = {{"0.1", "0.01"}, false};
    t["--distribution"] = {{"normal", "normal-truncated", "uniform"}, false};
    t["--reading"] = {{"model", "line"}, false};
    t["--adc-ref"] = {{"excitation"}, false};  // or a voltage of the user's own
    return t;
}

// Options whose value is a file name ('-' is stdin or stdout where the help says so).
const std::set<std::string> kFileOptions = {"--points", "--output", "--svg", "--spec"};

// The core's parser accepts `word` for option `name`.
bool core_accepts(const std::string& name, const std::string& word) {
    try {
        if (name == "--circuit") (void)rtline::parse_topology(word, name);
        if (name == "--series") (void)rtline::parse_series(word, name);
        if (name == "--line") (void)rtline::parse_line(word, name);
        if (name == "--adc-transfer") (void)rtline::parse_adc_transfer(word, name);
        return true;
    } catch (const rtline::InputError&) {
        return false;
    }
}

// Whole-word search: "c" must not match inside "code".
bool mentions(const std::string& text, const std::string& word) {
    for (std::size_t at = text.find(word); at != std::string::npos; at = text.find(word, at + 1)) {
        const auto is_word = [](char c) { return std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '.'; };
        const bool starts = at == 0 || !is_word(text[at - 1]);
        const std::size_t end = at + word.size();
        const bool ends = end == text.size() || !is_word(text[end]) || (text[end] == '.' && end + 1 == text.size());
        if (starts && ends) return true;
    }
    return false;
}

struct OptionInfo {
    std::vector<std::string> names;  // -o and --output
    std::string long_name;
    bool takes_value = false;
    std::vector<std::string> choices;  // empty: any value
    bool file = false;
};

struct CommandInfo {
    std::string name;
    std::vector<OptionInfo> options;
};

std::string join(const std::vector<std::string>& words) {
    std::string s;
    for (const std::string& w : words) s += (s.empty() ? "" : " ") + w;
    return s;
}

// Reads the program's definition; returns false (with a message on stderr) when a choice list no longer
// fits the program.
bool read_program(CLI::App& app, std::vector<CommandInfo>& commands, std::vector<std::string>& top_options) {
    const auto table = choice_table();
    std::set<std::string> used;
    bool ok = true;
    for (const CLI::Option* opt : app.get_options()) {
        for (const std::string& l : opt->get_lnames()) top_options.push_back("--" + l);
        for (const std::string& s : opt->get_snames()) top_options.push_back("-" + s);
    }
    for (const CLI::App* sub : app.get_subcommands({})) {
        CommandInfo c{sub->get_name(), {}};
        for (const CLI::Option* opt : sub->get_options()) {
            if (opt->get_group().empty() || opt->get_lnames().empty()) continue;  // hidden or positional
            OptionInfo o;
            o.long_name = "--" + opt->get_lnames().front();
            for (const std::string& s : opt->get_snames()) o.names.push_back("-" + s);
            for (const std::string& l : opt->get_lnames()) o.names.push_back("--" + l);
            o.takes_value = opt->get_type_size_max() > 0 && opt->get_expected_max() > 0;
            o.file = kFileOptions.count(o.long_name) > 0;
            if (o.file) used.insert(o.long_name);
            const auto found = table.find(o.long_name);
            if (found != table.end() && o.takes_value) {
                used.insert(o.long_name);
                for (const std::string& w : found->second.words) {
                    const bool fits =
                        found->second.from_core ? core_accepts(o.long_name, w) : mentions(opt->get_description(), w);
                    if (fits) {
                        o.choices.push_back(w);
                    } else if (found->second.from_core) {
                        std::cerr << "rtline_completion: the core refuses " << o.long_name << " '" << w << "'\n";
                        ok = false;
                    }
                }
                // A help-text list must match in full for at least the command that takes them all.
                if (o.choices.empty()) {
                    std::cerr << "rtline_completion: " << c.name << " " << o.long_name
                              << ": none of the listed choices is in its help text: " << opt->get_description() << "\n";
                    ok = false;
                }
            }
            c.options.push_back(o);
        }
        commands.push_back(c);
    }
    // An option no command has any more only leaves a dead line here: a warning, not a failure.
    for (const auto& [name, choices] : table) {
        if (!used.count(name))
            std::cerr << "rtline_completion: note: no command has " << name << " (choices here: " << join(choices.words)
                      << ")\n";
    }
    for (const std::string& name : kFileOptions) {
        if (!used.count(name)) {
            std::cerr << "rtline_completion: no command has the file option " << name << "\n";
            ok = false;
        }
    }
    // Every help-text choice must be in the help of at least one command that takes the option.
    for (const auto& [name, choices] : table) {
        if (choices.from_core) continue;
        for (const std::string& w : choices.words) {
            bool somewhere = false;
            for (const CommandInfo& c : commands) {
                for (const OptionInfo& o : c.options) {
                    if (o.long_name != name) continue;
                    for (const std::string& x : o.choices) somewhere = somewhere || x == w;
                }
            }
            if (!somewhere) {
                std::cerr << "rtline_completion: " << name << " '" << w << "' is in no command's help text\n";
                ok = false;
            }
        }
    }
    return ok;
}

std::string script(const std::vector<CommandInfo>& commands, const std::vector<std::string>& top_options) {
    std::vector<std::string> names;
    for (const CommandInfo& c : commands) names.push_back(c.name);
    std::ostringstream s;
    s << "# bash completion for rtline. Generated at build time from the program's own definition by\n"
         "# tools/bash_completion.cpp; do not edit (rebuild instead).\n"
         "_rtline() {\n"
         "    local cur=${COMP_WORDS[COMP_CWORD]} prev=${COMP_WORDS[COMP_CWORD-1]} command='' i\n"
         "    for ((i = 1; i < COMP_CWORD; i++)); do\n"
         "        case ${COMP_WORDS[i]} in\n"
         "            "
      <<
        [&] {
            std::string alt;
            for (const std::string& n : names) alt += (alt.empty() ? "" : "|") + n;
            return alt;
        }()
      << ") command=${COMP_WORDS[i]}; break ;;\n"
         "        esac\n"
         "    done\n"
         "    if [[ -z $command ]]; then\n"
         "        COMPREPLY=($(compgen -W '"
      << join(names) << " " << join(top_options)
      << "' -- \"$cur\"))\n"
         "        return\n"
         "    fi\n"
         "    case \"$command $prev\" in\n";
    for (const CommandInfo& c : commands) {
        for (const OptionInfo& o : c.options) {
            if (!o.takes_value) continue;
            std::string pattern;
            for (const std::string& n : o.names) {
                if (!pattern.empty()) pattern += '|';
                pattern.append("'").append(c.name).append(" ").append(n).append("'");
            }
            s << "        " << pattern << ")\n";
            if (o.file) {
                s << "            compopt -o filenames 2>/dev/null; COMPREPLY=($(compgen -f -- \"$cur\")); return ;;\n";
            } else if (!o.choices.empty()) {
                s << "            COMPREPLY=($(compgen -W '" << join(o.choices) << "' -- \"$cur\")); return ;;\n";
            } else {
                s << "            COMPREPLY=(); return ;;  # a value of the user's own\n";
            }
        }
    }
    s << "    esac\n"
         "    local options\n"
         "    case $command in\n";
    for (const CommandInfo& c : commands) {
        std::vector<std::string> all;
        for (const OptionInfo& o : c.options) all.insert(all.end(), o.names.begin(), o.names.end());
        s << "        " << c.name << ") options='" << join(all) << "' ;;\n";
    }
    s << "    esac\n"
         "    COMPREPLY=($(compgen -W \"$options\" -- \"$cur\"))\n"
         "}\n"
         "complete -F _rtline rtline\n";
    return s.str();
}

}  // namespace

int main(int argc, char** argv) {
    if (argc != 2) {
        std::cerr << "usage: rtline_completion FILE\n";
        return 2;
    }
    CLI::App app;
    rtline::cli::build_program(app);
    std::vector<CommandInfo> commands;
    std::vector<std::string> top_options;
    if (!read_program(app, commands, top_options)) return 1;
    std::ofstream out(argv[1]);
    out << script(commands, top_options);
    out.close();
    if (!out) {
        std::cerr << "rtline_completion: cannot write " << argv[1] << "\n";
        return 1;
    }
    return 0;
}
