// Spec files and JSON Lines batches. A spec is a JSON object whose keys are a command's long option
// names with '-' turned into '_' and whose values are numbers or the strings the flags take; it becomes
// flag arguments placed before the command line's own, so flags given on the command line win. A
// design document that rtline wrote (check, size or design JSON) is accepted too: its model, span and circuit
// are taken from it.
#pragma once

#include <CLI/CLI.hpp>
#include <string>
#include <vector>

#include "report.hpp"

namespace rtline::cli {

// The flag arguments for subcommand `sub` that `spec` stands for. Throws InputError naming the key
// (as "spec key 'name'") for an unknown key, a wrong type or a non-object spec.
// A relative "points" path is taken from `base_dir` (the spec file's folder; empty: the working folder).
[[nodiscard]] std::vector<std::string> spec_arguments(const Json& spec, const CLI::App& sub,
                                                      const std::string& base_dir = "");

// Parses spec text; throws InputError naming `field` and where the JSON is malformed.
[[nodiscard]] Json parse_spec(const std::string& text, const std::string& field, const std::string& source);

// Runs a JSON Lines batch for `command`: one spec per line of `input`, one compact JSON result per line
// of the returned text, in order; a bad line becomes {"line": N, "error": "..."}. `extra` are the
// command line's own flags (they override each line's). `build` makes a fresh program to parse with.
// Returns the exit code: 3 when any line met an internal error (reported as {"line": N, "error":
// "internal error: ..."}), else 2 when any was bad input, else 1 when any had no feasible design, else 0.
int run_batch(const std::string& command, const std::vector<std::string>& extra, const std::string& input,
              const std::function<void(CLI::App&)>& build, std::string& output);

}  // namespace rtline::cli
