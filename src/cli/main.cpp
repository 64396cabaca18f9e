// The rtline program: parses flags (from the command line, a --spec file or a --jsonl batch), runs one
// command, maps the outcome to an exit code.
// 0 success, 1 no design meets the constraints, 2 bad input or usage, 3 internal error.
#include <CLI/CLI.hpp>
#include <filesystem>
#include <iostream>

#include "commands.hpp"
#include "common.hpp"
#include "rtline/error.hpp"
#include "spec.hpp"
#include "usage.hpp"

namespace {

// The command line with --spec and --jsonl taken out and a spec's flags put in front of the user's.
struct Invocation {
    std::vector<std::string> args;    // in order, without the program name
    std::vector<std::string> before;  // the arguments before the command
    std::string command;
    bool jsonl = false;
    std::string spec_path;
};

Invocation read_invocation(int argc, char** argv) {
    Invocation inv;
    for (int i = 1; i < argc; ++i) {
        const std::string a = argv[i];
        if (inv.command.empty() && (a.empty() || a[0] != '-')) {
            inv.command = a;
            inv.args.push_back(a);
        } else if (inv.command.empty()) {
            inv.before.push_back(a);
            inv.args.push_back(a);
        } else if (!inv.command.empty() && a == "--jsonl") {
            inv.jsonl = true;
        } else if (!inv.command.empty() && (a == "--spec" || a.rfind("--spec=", 0) == 0)) {
            // --spec FILE or --spec=FILE; a missing or empty name would read as "no spec".
            if (a == "--spec") {
                inv.spec_path = i + 1 < argc ? argv[++i] : "";
            } else {
                inv.spec_path = a.substr(7);
            }
            if (inv.spec_path.empty()) throw rtline::InputError("--spec", "", "needs a file name ('-' for stdin)");
        } else {
            inv.args.push_back(a);
        }
    }
    return inv;
}

int run(int argc, char** argv) {
    CLI::App app;
    rtline::cli::build_program(app);
    Invocation inv = read_invocation(argc, argv);
    rtline::cli::check_program_usage(app, inv.before, inv.command);
    const bool program_help = inv.command.empty();  // --help or --version: the parser answers them
    if (inv.jsonl) {
        if (!inv.spec_path.empty())
            throw rtline::InputError("--spec", inv.spec_path, "not with --jsonl (specs come on stdin)");
        const std::vector<std::string> extra(inv.args.begin() + 1, inv.args.end());
        rtline::cli::check_command_usage(*app.get_subcommand(inv.command), extra, false);
        // Every result of a batch is a line of JSON; CSV lines would lose the errors' place.
        for (std::size_t i = 0; i < extra.size(); ++i) {
            const std::string& a = extra[i];
            const bool format = a == "--format" || a.rfind("--format=", 0) == 0;
            const std::string value = a.size() > 9 ? a.substr(9) : (i + 1 < extra.size() ? extra[i + 1] : "");
            if (format && value != "json") {
                throw rtline::InputError("--format", value,
                                         "not with --jsonl: each result is one line of JSON; leave out --format");
            }
        }
        std::string out;
        const int code = rtline::cli::run_batch(
            inv.command, extra, rtline::cli::read_text("-", "--jsonl"),
            [&](CLI::App& a) { rtline::cli::build_program(a, inv.command); }, out);
        rtline::cli::write_stdout(out);
        return code;
    }
    if (!inv.spec_path.empty()) {
        const std::string source = inv.spec_path == "-" ? std::string("stdin") : inv.spec_path;
        const auto spec = rtline::cli::parse_spec(rtline::cli::read_text(inv.spec_path, "--spec"), "--spec", source);
        const std::string base_dir =
            inv.spec_path == "-" ? std::string() : std::filesystem::path(inv.spec_path).parent_path().string();
        std::vector<std::string> from_spec =
            rtline::cli::spec_arguments(spec, *app.get_subcommand(inv.command), base_dir);
        inv.args.insert(inv.args.begin() + 1, from_spec.begin(), from_spec.end());
    }
    CLI::App* sub = program_help ? nullptr : app.get_subcommand(inv.command);
    if (sub != nullptr) {
        rtline::cli::check_command_usage(*sub, std::vector<std::string>(inv.args.begin() + 1, inv.args.end()));
    }
    std::vector<std::string> reversed(inv.args.rbegin(), inv.args.rend());
    try {
        app.parse(reversed);
    } catch (const CLI::CallForHelp& e) {
        return app.exit(e);
    } catch (const CLI::CallForAllHelp& e) {
        return app.exit(e);
    } catch (const CLI::CallForVersion& e) {
        return app.exit(e);
    } catch (const CLI::ParseError& e) {
        if (sub == nullptr) throw rtline::cli::UsageError("the command line cannot be read (see rtline --help)");
        throw rtline::cli::rephrase(e, *sub);
    }
    return 0;
}

}  // namespace

int main(int argc, char** argv) {
    try {
        const int code = run(argc, argv);
        rtline::cli::close_stdout();
        return code;
    } catch (const rtline::cli::UsageError& e) {
        std::cerr << "rtline: " << e.what() << "\n";
        return 2;
    } catch (const rtline::InputError& e) {
        std::cerr << "rtline: " << rtline::cli::message(e) << "\n";
        return 2;
    } catch (const rtline::InfeasibleError& e) {
        std::cerr << "rtline: " << rtline::cli::message(e) << "\n";
        return 1;
    } catch (const std::exception& e) {
        std::cerr << "rtline: internal error: " << e.what() << "\n";
        return 3;
    }
}
