#include "spec.hpp"

#include "common.hpp"
#include "usage.hpp"

#include <algorithm>
#include <filesystem>
#include <sstream>

#include "rtline/error.hpp"
#include "rtline/units.hpp"

namespace rtline::cli {

namespace {

std::string key_field(const std::string& key) { return "spec key '" + key + "'"; }

// A number as its shortest round-trip text (nlohmann's formatting).
std::string number_text(const Json& v) { return v.dump(); }

// doc[key] of an rtline document, where it must be a JSON object (when `key` is absent: null).
const Json* object_at(const Json& doc, const std::string& key, const std::string& path) {
    if (!doc.contains(key)) return nullptr;
    if (!doc[key].is_object()) throw InputError(key_field(path), doc[key].dump(), "expected a JSON object");
    return &doc[key];
}

// The number doc[key] of an rtline document, which must be there.
const Json& number_at(const Json& doc, const std::string& key, const std::string& path) {
    if (!doc.contains(key)) throw InputError(key_field(path), "", "is missing from the rtline document");
    if (!doc[key].is_number()) throw InputError(key_field(path), doc[key].dump(), "expected a number");
    return doc[key];
}

// A design document rtline wrote (it opens with "tool": "rtline"): the flat spec of its design.
Json design_of(const Json& doc) {
    Json flat = Json::object();
    if (const Json* m = object_at(doc, "model", "model")) {
        const Json kind = m->contains("kind") ? (*m)["kind"] : Json("");
        if (kind == "beta") {
            flat["r25"] = number_at(*m, "r0_ohm", "model.r0_ohm");
            flat["beta"] = number_at(*m, "b_k", "model.b_k");
            flat["t0"] = number_at(*m, "t0_c", "model.t0_c");
        } else if (kind == "steinhart-hart") {
            flat["sh"] = number_text(number_at(*m, "a", "model.a")) + "," + number_text(number_at(*m, "b", "model.b")) +
                         "," + number_text(number_at(*m, "c", "model.c"));
        } else if (kind == "table") {
            throw InputError("--spec", "table", "a design with a table model cannot be read back; give --points");
        } else {
            throw InputError(key_field("model.kind"), kind.is_string() ? kind.get<std::string>() : kind.dump(),
                             "expected beta, steinhart-hart or table");
        }
    }
    if (const Json* span = object_at(doc, "span", "span")) {
        flat["span"] = number_text(number_at(*span, "lo_c", "span.lo_c")) + ":" +
                       number_text(number_at(*span, "hi_c", "span.hi_c"));
    }
    // The circuit: from "circuit", with the resistors of the first candidate of a size result.
    Json circuit = doc.contains("circuit") ? *object_at(doc, "circuit", "circuit") : Json::object();
    if (doc.contains("candidates") && doc["candidates"].is_array() && !doc["candidates"].empty()) {
        const Json& first = doc["candidates"][0];
        if (!first.is_object()) throw InputError(key_field("candidates"), first.dump(), "expected JSON objects");
        if (!first.contains("resistors_ohm") || !first.contains("topology")) {
            throw InputError(key_field("candidates"), "", "the first candidate has no topology and resistors_ohm");
        }
        circuit["resistors_ohm"] = first["resistors_ohm"];
        circuit["topology"] = first["topology"];
    }
    if (circuit.contains("topology")) flat["circuit"] = circuit["topology"];
    if (const Json* r = object_at(circuit, "resistors_ohm", "resistors_ohm")) {
        for (const auto& [name, value] : r->items()) flat[name] = value;
    }
    if (circuit.contains("load_ohm")) flat["load"] = circuit["load_ohm"];
    if (const Json* d = object_at(circuit, "drive", "circuit.drive")) {
        if (d->contains("excitation_v")) flat["excitation"] = (*d)["excitation_v"];
        if (d->contains("current_a")) flat["current"] = (*d)["current_a"];
    }
    if (doc.contains("line") && doc["line"].is_string()) flat["line"] = doc["line"];
    return flat;
}

}  // namespace

Json parse_spec(const std::string& text, const std::string& field, const std::string& source) {
    if (text.find('\0') != std::string::npos) throw InputError(field, source, "is not a text file (NUL bytes)");
    try {
        return Json::parse(text);
    } catch (const nlohmann::json::parse_error& e) {
        throw InputError(field, source, "is not valid JSON (at byte " + std::to_string(e.byte) + ")");
    } catch (const nlohmann::json::out_of_range& e) {
        // nlohmann's only range error while parsing: a number beyond a double ("... parsing '1e400'").
        const std::string what = e.what();
        const std::size_t open = what.find("parsing '");
        const std::string number =
            open == std::string::npos ? std::string() : what.substr(open + 9, what.size() - open - 10);
        throw InputError(field, source,
                         "holds a number too large for a double" + (number.empty() ? "" : " (" + number + ")"));
    }
}

std::vector<std::string> spec_arguments(const Json& spec_in, const CLI::App& sub, const std::string& base_dir) {
    if (!spec_in.is_object()) throw InputError("--spec", spec_in.type_name(), "a spec must be a JSON object");
    const bool document = spec_in.contains("tool") && spec_in["tool"] == "rtline";
    Json spec = document ? design_of(spec_in) : spec_in;
    // A design document's "flags" are the settings it was made with (tolerances, converter, table
    // target); each command takes those it has a flag for and leaves the others.
    if (document) {
        if (const Json* flags = object_at(spec_in, "flags", "flags")) {
            for (const auto& [key, value] : flags->items()) {
                std::string flag = "--" + key;
                for (char& c : flag) {
                    if (c == '_') c = '-';
                }
                if (sub.get_option_no_throw(flag) != nullptr && !spec.contains(key)) spec[key] = value;
            }
        }
        // A design reads back into size (which chooses the resistors itself) as into budget and table.
        if (spec_in.contains("command") && spec_in["command"] == "design") {
            Json known = Json::object();
            for (const auto& [key, value] : spec.items()) {
                std::string flag = "--" + key;
                for (char& c : flag) {
                    if (c == '_') c = '-';
                }
                if (sub.get_option_no_throw(flag) != nullptr) known[key] = value;
            }
            spec = known;
        }
    }
    std::vector<std::string> args;
    for (const auto& [key, value] : spec.items()) {
        if (key == "spec" || key == "jsonl") throw InputError(key_field(key), "", "is not allowed inside a spec");
        std::string flag = "--" + key;
        for (char& c : flag) {
            if (c == '_') c = '-';
        }
        const CLI::Option* opt = sub.get_option_no_throw(flag);
        if (key.find('-') != std::string::npos || opt == nullptr) {
            throw InputError(key_field(key), "",
                             "is not a key of '" + sub.get_name() + "' (keys are the long flag names with _ for -)");
        }
        const bool is_flag = opt->get_expected_max() == 0;
        if (is_flag) {
            if (!value.is_boolean()) throw InputError(key_field(key), value.dump(), "expected true or false");
            if (value.get<bool>()) args.push_back(flag);
            continue;
        }
        std::string text;
        if (value.is_string()) {
            text = value.get<std::string>();
        } else if (value.is_number()) {
            text = number_text(value);
        } else {
            throw InputError(key_field(key), value.dump(), "expected a number or a string");
        }
        // A file named in a spec file is found beside it, as a reader of the spec expects.
        const bool names_file = key == "points" || key == "part_points" || key == "candidates";
        if (names_file && !base_dir.empty() && text != "-" && !text.empty() && text.front() != '/') {
            text = (std::filesystem::path(base_dir) / text).string();
        }
        args.push_back(flag);
        args.push_back(text);
    }
    return args;
}

int run_batch(const std::string& command, const std::vector<std::string>& extra, const std::string& input,
              const std::function<void(CLI::App&)>& build, std::string& output) {
    int code = 0;
    std::istringstream in(input);
    std::size_t line_no = 0;
    for (std::string line; std::getline(in, line);) {
        ++line_no;
        if (!line.empty() && line.back() == '\r') line.pop_back();
        if (line.find_first_not_of(" \t") == std::string::npos) continue;
        Json result;
        try {
            CLI::App app;
            build(app);
            CLI::App* sub = app.get_subcommand(command);
            const std::string where = "line " + std::to_string(line_no);
            const Json spec = parse_spec(line, where, "");
            if (!spec.is_object()) throw InputError(where, spec.type_name(), "a spec must be a JSON object");
            std::vector<std::string> args = {command};
            for (std::string& a : spec_arguments(spec, *sub)) args.push_back(std::move(a));
            for (const std::string& a : extra) args.push_back(a);
            for (std::size_t i = 0; i < args.size(); ++i) {
                const std::string& a = args[i];
                if (a == "-o" || a == "--output" || a.rfind("--output=", 0) == 0) {
                    const std::string file = a.rfind("--output=", 0) == 0 ? a.substr(9)
                                             : i + 1 < args.size()        ? args[i + 1]
                                                                          : "";
                    throw InputError(a == "-o" ? "-o" : "--output", file,
                                     "not with --jsonl: each result is one line on stdout");
                }
                if (a == "--format" || a.rfind("--format=", 0) == 0) {
                    const std::string format = a.size() > 9 ? a.substr(9) : (i + 1 < args.size() ? args[i + 1] : "");
                    if (format != "json") {
                        throw InputError("--format", format,
                                         "not with --jsonl: each result is one line of JSON; leave out --format");
                    }
                }
                if (a == "--svg" || a.rfind("--svg=", 0) == 0) {
                    const std::string path = a.size() > 6 ? a.substr(6) : (i + 1 < args.size() ? args[i + 1] : "");
                    throw InputError("--svg", path, "not with --jsonl: every line would draw over the same file");
                }
            }
            check_command_usage(*sub, std::vector<std::string>(args.begin() + 1, args.end()));
            args.emplace_back("--format");
            args.emplace_back("json");
            std::vector<std::string> reversed(args.rbegin(), args.rend());
            std::string bytes;
            {
                const SinkScope scope(bytes);
                const WarningScope warnings("line " + std::to_string(line_no) + ": ");
                try {
                    app.parse(reversed);
                } catch (const CLI::ParseError& e) {
                    throw rephrase(e, *sub);
                }
            }
            result = Json::parse(bytes);
        } catch (const UsageError& e) {
            result = {{"line", line_no}, {"error", e.what()}};
            code = std::max(code, 2);
        } catch (const InputError& e) {
            result = {{"line", line_no}, {"error", message(e)}};
            code = std::max(code, 2);
        } catch (const InfeasibleError& e) {
            result = {{"line", line_no}, {"error", message(e)}, {"infeasible", true}};
            if (code == 0) code = 1;
        } catch (const std::exception& e) {
            // A fault in one line must not lose the others' results: report it and go on.
            result = {{"line", line_no}, {"error", std::string("internal error: ") + e.what()}};
            code = 3;
        }
        output += result.dump() + "\n";
    }
    return code;
}

}  // namespace rtline::cli
