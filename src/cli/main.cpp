// The rtline program: parses flags, runs one command, maps the outcome to an exit code.
// 0 success, 1 no design meets the constraints, 2 bad input or usage, 3 internal error.
#include <CLI/CLI.hpp>
#include <iostream>

#include "commands.hpp"
#include "common.hpp"
#include "rtline/error.hpp"

int main(int argc, char** argv) {
    CLI::App app{
        "rtline designs NTC thermistor linearization circuits: thermistor models and fits, divider, shunt\n"
        "and bridge networks checked against a straight line, resistor sizing with standard values."};
    app.name("rtline");
    app.set_version_flag("--version", std::string("rtline ") + RTLINE_VERSION);
    app.require_subcommand(1);
    app.footer(std::string("Exit codes: 0 success, 1 no design meets the constraints, 2 bad input or usage, "
                           "3 internal error.\n\n") +
               rtline::cli::kSafetyNote);
    rtline::cli::setup_model(app);
    rtline::cli::setup_fit(app);
    rtline::cli::setup_check(app);
    rtline::cli::setup_budget(app);

    try {
        app.parse(argc, argv);
    } catch (const CLI::CallForHelp& e) {
        return app.exit(e);
    } catch (const CLI::CallForAllHelp& e) {
        return app.exit(e);
    } catch (const CLI::CallForVersion& e) {
        return app.exit(e);
    } catch (const CLI::ParseError& e) {
        std::cerr << "rtline: " << e.what() << " (see rtline --help)\n";
        return 2;
    } catch (const rtline::InputError& e) {
        std::cerr << "rtline: " << e.what() << "\n";
        return 2;
    } catch (const rtline::InfeasibleError& e) {
        std::cerr << "rtline: " << e.what() << "\n";
        return 1;
    } catch (const std::exception& e) {
        std::cerr << "rtline: internal error: " << e.what() << "\n";
        return 3;
    }
    return 0;
}
