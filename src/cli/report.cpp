#include "report.hpp"

#include <algorithm>
#include <cerrno>
#include <cmath>
#include <csignal>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <random>
#include <stdexcept>
#include <string_view>

#include "rtline/error.hpp"
#include "rtline/units.hpp"

namespace rtline::cli {

Format parse_format(const std::string& text, bool markdown) {
    if (text == "text") return Format::text;
    if (text == "json") return Format::json;
    if (text == "csv") return Format::csv;
    if (text == "markdown" && markdown) return Format::markdown;
    throw InputError(
        "--format", text,
        markdown ? "unknown format; choose text, json, csv or markdown" : "unknown format; choose text, json or csv");
}

namespace {

// A resistance column prints in the letter code at any size (a value that is no resistance, zero or
// negative, as a number).
bool resistance_column(const Column& c) { return c.resistance; }

std::string text_cell(const Column& c, const Cell& cell) {
    if (const auto* s = std::get_if<std::string>(&cell)) return *s;
    const double v = std::get<double>(cell);
    if (!std::isfinite(v)) return "-";
    if (resistance_column(c)) return v > 0.0 ? format_resistance(v, c.digits) : format_significant(v, c.digits);
    // A temperature on the scale (its CSV header ends in _c) is a position, not a magnitude: fixed decimals.
    const std::string_view h = c.csv_header;
    if (c.decimals >= 0 && h.size() > 2 && h.substr(h.size() - 2) == "_c") return format_fixed(v, c.decimals);
    return c.decimals >= 0 ? format_decimals(v, c.decimals) : format_significant(v, c.digits);
}

// Where a number's decimal point is (or would be): aligned columns line these up.
std::size_t point_of(const std::string& s) {
    const std::size_t dot = s.find('.');
    if (dot != std::string::npos) return dot;
    const std::size_t e = s.find('e');
    return e != std::string::npos ? e : s.size();
}

std::string csv_cell(const Cell& cell) {
    if (const auto* s = std::get_if<std::string>(&cell)) {
        if (s->find_first_of(",\"\n") == std::string::npos) return *s;
        std::string quoted = "\"";
        for (const char ch : *s) {
            if (ch == '"') quoted += '"';
            quoted += ch;
        }
        return quoted + "\"";
    }
    const double v = std::get<double>(cell);
    return std::isfinite(v) ? format_number(v, 10) : "";
}

}  // namespace

std::string format_significant(double v, int digits) {
    if (!std::isfinite(v)) return "-";
    if (v == 0.0) return "0";
    digits = std::max(digits, 1);
    char buffer[64];
    std::snprintf(buffer, sizeof buffer, "%.*e", digits - 1, v);
    // The exponent after rounding: 9.9996 to four figures is 1.000e+01, printed 10.00.
    const int exponent = std::atoi(std::strchr(buffer, 'e') + 1);
    if (exponent < -4 || exponent >= digits) return buffer;
    std::snprintf(buffer, sizeof buffer, "%.*f", std::max(0, digits - 1 - exponent), v);
    return buffer;
}

std::string format_decimals(double v, int decimals) {
    if (!std::isfinite(v)) return "-";
    // A value the decimals would show with fewer than two figures (0.001 for 0.000866, or a bare 0.000)
    // keeps as many significant figures as there are decimals instead.
    // Whole numbers (no decimals) only give way when they would round to zero.
    const double below = decimals > 0 ? std::pow(10.0, 1 - decimals) : 0.5;
    if (v != 0.0 && std::abs(v) < below) return format_significant(v, std::max(decimals, 2));
    return format_fixed(v, decimals);
}

std::size_t width(const std::string& s) {
    std::size_t w = 0;
    for (const unsigned char ch : s) {
        if ((ch & 0xC0) != 0x80) ++w;
    }
    return w;
}

std::string Table::text() const {
    std::vector<std::vector<std::string>> cells;
    for (const auto& row : rows_) {
        std::vector<std::string> line;
        for (std::size_t c = 0; c < columns_.size(); ++c) line.push_back(text_cell(columns_[c], row[c]));
        cells.push_back(std::move(line));
    }
    // Numbers (not resistances in the letter code, not text) line up at the decimal point: each is
    // padded to the column's widest integer part on the left and widest fraction on the right.
    for (std::size_t c = 0; c < columns_.size(); ++c) {
        if (resistance_column(columns_[c])) continue;
        std::size_t left = 0;
        std::size_t right = 0;
        auto aligned = [&](std::size_t r) { return std::holds_alternative<double>(rows_[r][c]); };
        for (std::size_t r = 0; r < cells.size(); ++r) {
            if (!aligned(r)) continue;
            const std::size_t p = point_of(cells[r][c]);
            left = std::max(left, p);
            right = std::max(right, cells[r][c].size() - p);
        }
        for (std::size_t r = 0; r < cells.size(); ++r) {
            if (!aligned(r)) continue;
            std::string& s = cells[r][c];
            const std::size_t p = point_of(s);
            s = std::string(left - p, ' ') + s + std::string(right - (s.size() - p), ' ');
        }
    }
    std::vector<std::size_t> widths(columns_.size(), 0);
    for (std::size_t c = 0; c < columns_.size(); ++c) widths[c] = width(columns_[c].text_header);
    for (const auto& line : cells) {
        for (std::size_t c = 0; c < columns_.size(); ++c) widths[c] = std::max(widths[c], width(line[c]));
    }
    std::string out;
    auto put = [&](const std::vector<std::string>& line) {
        for (std::size_t c = 0; c < line.size(); ++c) {
            if (c > 0) out += "  ";
            out += std::string(widths[c] - width(line[c]), ' ') + line[c];
        }
        // A fraction's padding in the last column would trail the line.
        while (!out.empty() && out.back() == ' ') out.pop_back();
        out += '\n';
    };
    std::vector<std::string> header;
    for (const Column& c : columns_) header.push_back(c.text_header);
    put(header);
    for (const auto& line : cells) put(line);
    return out;
}

std::string Table::csv() const {
    std::string out;
    for (std::size_t c = 0; c < columns_.size(); ++c) {
        if (c > 0) out += ',';
        out += columns_[c].csv_header;
    }
    out += '\n';
    for (const auto& row : rows_) {
        for (std::size_t c = 0; c < row.size(); ++c) {
            if (c > 0) out += ',';
            out += csv_cell(row[c]);
        }
        out += '\n';
    }
    return out;
}

std::string markdown_escape(const std::string& s) {
    std::string out;
    for (const char ch : s) {
        if (ch == '\n' || ch == '\r') {
            out += ' ';
            continue;
        }
        if (std::string_view("|\\*_`<>").find(ch) != std::string_view::npos) out += '\\';
        out += ch;
    }
    return out;
}

std::string Table::markdown() const {
    std::string out = "|";
    auto put = [&out](const std::string& cell) {
        out += ' ';
        out += markdown_escape(cell);
        out += " |";
    };
    for (const Column& c : columns_) put(c.text_header);
    out += "\n|";
    for (std::size_t c = 0; c < columns_.size(); ++c) {
        // Text columns (a label in the first row) align left, numbers right.
        const bool text = !rows_.empty() && std::holds_alternative<std::string>(rows_.front()[c]);
        out += text ? " --- |" : " ---: |";
    }
    out += '\n';
    for (const auto& row : rows_) {
        out += '|';
        for (std::size_t c = 0; c < columns_.size(); ++c) put(text_cell(columns_[c], row[c]));
        out += '\n';
    }
    return out;
}

std::string unit_suffix(const std::string& output_unit) {
    if (output_unit == "V/V") return "_v_per_v";
    if (output_unit == "V") return "_v";
    if (output_unit == "ohm") return "_ohm";
    throw std::logic_error("no key suffix for the output unit " + output_unit);
}

Json document(const std::string& command) {
    Json j;
    j["tool"] = "rtline";
    j["version"] = RTLINE_VERSION;
    j["schema"] = kSchema;
    j["command"] = command;
    return j;
}

std::string format_si(double v, const std::string& unit) {
    static const char* const prefixes[] = {"p", "n", "\xC2\xB5", "m", "", "k", "M", "G"};
    if (v == 0.0 || !std::isfinite(v)) return format_number(v, 4) + " " + unit;
    int e = static_cast<int>(std::floor(std::log10(std::abs(v)) / 3.0));
    e = std::max(-4, std::min(3, e));
    return format_number(v / std::pow(1000.0, e), 4) + " " + prefixes[e + 4] + unit;
}

double echoed(double v) {
    if (!std::isfinite(v) || v == 0.0) return v;
    char buffer[64];
    std::snprintf(buffer, sizeof buffer, "%.15g", v);
    return std::strtod(buffer, nullptr);
}

Json number(double v) { return std::isfinite(v) ? Json(v) : Json(nullptr); }

void require_finite(const Json& j) {
    if (j.is_number_float() && !std::isfinite(j.get<double>())) {
        throw std::logic_error("a result is not a finite number");
    }
    if (j.is_structured()) {
        for (const auto& item : j) require_finite(item);
    }
}

namespace {
std::string* g_sink = nullptr;
std::vector<std::string> g_warnings;
std::string g_warning_prefix;
}  // namespace

void warn(const std::string& message) {
    g_warnings.push_back(message);
    std::cerr << "rtline: warning: " << g_warning_prefix << message << "\n";
}

const std::vector<std::string>& warnings() { return g_warnings; }

WarningScope::WarningScope(std::string prefix) : saved_(std::move(g_warnings)), saved_prefix_(g_warning_prefix) {
    g_warnings.clear();
    g_warning_prefix = std::move(prefix);
}

WarningScope::~WarningScope() {
    g_warnings = std::move(saved_);
    g_warning_prefix = std::move(saved_prefix_);
}

std::string dump(const Json& j) {
    require_finite(j);
    if (j.is_object() && j.contains("tool") && !g_warnings.empty() && !j.contains("warnings")) {
        Json with = j;
        with["warnings"] = g_warnings;
        return with.dump(2) + "\n";
    }
    return j.dump(2) + "\n";
}

namespace {

// A failed write to stdout: a reader that has gone away ends the program as SIGPIPE would have (quietly,
// like cat or grep), anything else is reported.
[[noreturn]] void stdout_failed(int error) {
    if (error == EPIPE) {
        std::signal(SIGPIPE, SIG_DFL);
        std::raise(SIGPIPE);
        std::_Exit(141);  // 128 + SIGPIPE, should the signal be blocked
    }
    std::string why = error != 0 ? std::strerror(error) : "an output error";
    if (!why.empty()) why[0] = static_cast<char>(std::tolower(static_cast<unsigned char>(why[0])));
    throw InputError("stdout", "", "writing failed: " + why);
}

}  // namespace

void write_stdout(const std::string& bytes) {
    errno = 0;
    std::cout.flush();
    if (std::fwrite(bytes.data(), 1, bytes.size(), stdout) != bytes.size() || std::fflush(stdout) != 0) {
        stdout_failed(errno);
    }
}

void close_stdout() {
    errno = 0;
    std::cout.flush();
    if (std::fflush(stdout) != 0 || std::ferror(stdout) != 0) stdout_failed(errno);
    if (std::fclose(stdout) != 0) stdout_failed(errno);
}

SinkScope::SinkScope(std::string& buffer) : previous_(g_sink) { g_sink = &buffer; }
SinkScope::~SinkScope() { g_sink = previous_; }

void emit(const std::string& path, const std::string& bytes) { emit_all({{path, bytes, "-o"}}); }

void emit_all(const std::vector<Output>& outputs) {
    namespace fs = std::filesystem;
    auto to_stdout = [](const Output& o) { return o.path.empty() || o.path == "-"; };
    struct Pending {
        fs::path temp;
        fs::path target;
        const Output* output;
    };
    std::vector<Pending> pending;
    auto discard = [&pending] {
        std::error_code ec;
        for (const Pending& p : pending) fs::remove(p.temp, ec);
    };
    std::random_device rd;
    for (const Output& o : outputs) {
        if (to_stdout(o)) continue;
        const fs::path target(o.path);
        // The rename below would replace a device (as root, -o /dev/null would replace the device with a
        // file), so a target that exists is a regular file (a folder is refused at the rename).
        std::error_code kind_ec;
        const fs::file_status kind = fs::status(target, kind_ec);
        if (fs::exists(kind) && !fs::is_regular_file(kind) && !fs::is_directory(kind)) {
            discard();
            throw InputError(o.flag, o.path,
                             "is not a regular file (a device, a pipe or a socket); for stdout leave the flag out");
        }
        const fs::path temp = target.parent_path() / (target.filename().string() + ".tmp" + std::to_string(rd()));
        pending.push_back({temp, target, &o});
        std::ofstream out(temp, std::ios::binary | std::ios::trunc);
        if (!out) {
            pending.pop_back();
            discard();
            throw InputError(o.flag, o.path, "cannot be written (no such folder, or no permission)");
        }
        out << o.bytes;
        out.close();
        if (!out) {
            discard();
            throw InputError(o.flag, o.path, "writing failed (disk full?)");
        }
    }
    for (std::size_t i = 0; i < pending.size(); ++i) {
        std::error_code ec;
        fs::rename(pending[i].temp, pending[i].target, ec);
        if (ec) {
            const std::string why = "cannot be replaced: " + ec.message();
            for (std::size_t j = i; j < pending.size(); ++j) fs::remove(pending[j].temp, ec);
            throw InputError(pending[i].output->flag, pending[i].output->path, why);
        }
    }
    for (const Output& o : outputs) {
        if (!to_stdout(o)) continue;
        if (g_sink != nullptr) {
            *g_sink += o.bytes;
            continue;
        }
        write_stdout(o.bytes);
    }
}

}  // namespace rtline::cli
