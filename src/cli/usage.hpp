// Argument mistakes in rtline's own words: an unknown command or option (with the nearest real name),
// a flag without its value, a stray argument, a required flag left out. Checked before the parser sees
// the arguments, so none of the parser's own wording reaches the user.
#pragma once

#include <CLI/CLI.hpp>
#include <stdexcept>
#include <string>
#include <vector>

namespace rtline::cli {

// A usage mistake (exit 2): one lower-case line that names the thing and points at the --help to read.
class UsageError : public std::runtime_error {
public:
    explicit UsageError(const std::string& what) : std::runtime_error(what) {}
};

// The edit distance between two names: insertions, deletions, substitutions and swaps of neighbours.
[[nodiscard]] std::size_t edit_distance(const std::string& a, const std::string& b);

// The closest of `names` to `typed`, or "" when none is close enough to be a likely slip (at most a third
// of the typed name's letters differ, and at least one letter is the same).
[[nodiscard]] std::string nearest_name(const std::string& typed, const std::vector<std::string>& names);

// The arguments before the command (`before`) and the command name as typed (`command`, "" when none):
// throws UsageError for no command, an unknown one, or an option the program does not have.
void check_program_usage(const CLI::App& app, const std::vector<std::string>& before, const std::string& command);

// `args` are a command's arguments after its name. Throws UsageError for an unknown option, a flag
// missing its value, a value given to a flag that takes none, a stray argument, or (when
// `complete`: not the flags a --jsonl batch adds to every line) a required flag left out.
void check_command_usage(const CLI::App& sub, const std::vector<std::string>& args, bool complete = true);

// A parse error CLI11 still raised, in our words (the arguments passed check_command_usage()).
[[nodiscard]] UsageError rephrase(const CLI::ParseError& e, const CLI::App& sub);

}  // namespace rtline::cli
