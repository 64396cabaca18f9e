#include "spec.hpp"

#include <filesystem>
#include <sstream>

#include "rtline/error.hpp"
#include "rtline/units.hpp"

namespace rtline::cli {

namespace {

std::string key_field(const std::string& key) { return "spec key '" + key + "'"; }

// A number as its shortest round-trip text (nlohmann's formatting).
std::string number_text(const Json& v) { return v.dump(); }

// A design document rtline wrote (it opens with "tool": "rtline"): the flat spec of its design.
Json design_of(const Json& doc) {
    Json flat = Json::object();
    if (doc.contains("model") && doc["model"].is_object()) {
        const Json& m = doc["model"];
        const std::string kind = m.value("kind", "");
        if (kind == "beta") {
            flat["r25"] = m.at("r0_ohm");
            flat["beta"] = m.at("b_k");
            flat["t0"] = m.at("t0_c");
        } else if (kind == "steinhart-hart") {
            flat["sh"] = number_text(m.at("a")) + "," + number_text(m.at("b")) + "," + number_text(m.at("c"));
        } else {
            throw InputError("--spec", kind, "a design with a table model cannot be read back; give --points");
        }
    }
    if (doc.contains("span") && doc["span"].is_object()) {
        flat["span"] = number_text(doc["span"].at("lo_c")) + ":" + number_text(doc["span"].at("hi_c"));
    }
    // The circuit: from "circuit", with the resistors of the first candidate of a size result.
    Json circuit = doc.contains("circuit") ? doc["circuit"] : Json::object();
    if (doc.contains("candidates") && doc["candidates"].is_array() && !doc["candidates"].empty()) {
        circuit["resistors_ohm"] = doc["candidates"][0].at("resistors_ohm");
        circuit["topology"] = doc["candidates"][0].at("topology");
    }
    if (circuit.contains("topology")) flat["circuit"] = circuit["topology"];
    if (circuit.contains("resistors_ohm")) {
        for (const auto& [name, value] : circuit["resistors_ohm"].items()) flat[name] = value;
    }
    if (circuit.contains("load_ohm")) flat["load"] = circuit["load_ohm"];
    if (circuit.contains("drive")) {
        const Json& d = circuit["drive"];
        if (d.contains("excitation_v")) flat["excitation"] = d["excitation_v"];
        if (d.contains("current_a")) flat["current"] = d["current_a"];
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
        throw InputError(field, source,
                         "is not valid JSON (at byte " + std::to_string(e.byte) + ")");
    }
}

std::vector<std::string> spec_arguments(const Json& spec_in, const CLI::App& sub, const std::string& base_dir) {
    if (!spec_in.is_object()) throw InputError("--spec", spec_in.type_name(), "a spec must be a JSON object");
    const bool document = spec_in.contains("tool") && spec_in["tool"] == "rtline";
    const Json spec = document ? design_of(spec_in) : spec_in;
    std::vector<std::string> args;
    for (const auto& [key, value] : spec.items()) {
        if (key == "spec" || key == "jsonl") throw InputError(key_field(key), "", "is not allowed inside a spec");
        std::string flag = "--" + key;
        for (char& c : flag) {
            if (c == '_') c = '-';
        }
        const CLI::Option* opt = sub.get_option_no_throw(flag);
        if (key.find('-') != std::string::npos || opt == nullptr) {
            throw InputError(key_field(key), "", "is not a key of '" + sub.get_name() + "' (keys are the long flag names with _ for -)");
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
        if (key == "points" && !base_dir.empty() && text != "-" && !text.empty() && text.front() != '/') {
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
            const Json spec = parse_spec(line, "line " + std::to_string(line_no), "");
            std::vector<std::string> args = {command};
            for (std::string& a : spec_arguments(spec, *sub)) args.push_back(std::move(a));
            for (const std::string& a : extra) args.push_back(a);
            for (std::size_t i = 0; i < args.size(); ++i) {
                const std::string& a = args[i];
                if (a == "-o" || a == "--output" || a.rfind("--output=", 0) == 0) {
                    const std::string path = a.size() > 9 ? a.substr(9) : (i + 1 < args.size() ? args[i + 1] : "");
                    throw InputError("--output", path, "not with --jsonl: each result is one line on stdout");
                }
                if (a == "--svg" || a.rfind("--svg=", 0) == 0) {
                    const std::string path = a.size() > 6 ? a.substr(6) : (i + 1 < args.size() ? args[i + 1] : "");
                    throw InputError("--svg", path, "not with --jsonl: every line would draw over the same file");
                }
            }
            args.emplace_back("--format");
            args.emplace_back("json");
            std::vector<std::string> reversed(args.rbegin(), args.rend());
            std::string bytes;
            {
                const SinkScope scope(bytes);
                app.parse(reversed);
            }
            result = Json::parse(bytes);
        } catch (const CLI::ParseError& e) {
            result = {{"line", line_no}, {"error", e.what()}};
            code = 2;
        } catch (const InputError& e) {
            result = {{"line", line_no}, {"error", e.what()}};
            code = 2;
        } catch (const InfeasibleError& e) {
            result = {{"line", line_no}, {"error", e.what()}, {"infeasible", true}};
            if (code == 0) code = 1;
        }
        output += result.dump() + "\n";
    }
    return code;
}

}  // namespace rtline::cli
