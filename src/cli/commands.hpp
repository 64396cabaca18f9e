// Each command of the rtline program declares its flags on a subcommand; its run function is called
// by CLI11 once the flags are parsed. One file per command.
#pragma once

#include <CLI/CLI.hpp>
#include <string>

namespace rtline::cli {

void setup_model(CLI::App& app);
void setup_fit(CLI::App& app);
void setup_check(CLI::App& app);
void setup_size(CLI::App& app);
void setup_table(CLI::App& app);
void setup_budget(CLI::App& app);
void setup_design(CLI::App& app);

// The whole program on `app`: every command above, each with --spec and --jsonl declared for --help.
void build_program(CLI::App& app, const std::string& only = "");

}  // namespace rtline::cli
