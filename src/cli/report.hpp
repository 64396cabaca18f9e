// Writers for the rtline program: aligned text tables, CSV, JSON documents, and the one place that
// puts bytes on stdout or into an -o file (via a temporary file and a rename, so a failed run never
// truncates an existing file). The core never formats; commands hand their result structs to these.
#pragma once

#include <nlohmann/json.hpp>
#include <string>
#include <variant>
#include <vector>

namespace rtline::cli {

using Json = nlohmann::ordered_json;

enum class Format { text, json, csv, markdown };

// Parses --format; `markdown` says whether the command writes Markdown. Throws InputError.
[[nodiscard]] Format parse_format(const std::string& text, bool markdown = false);

// A column: its header in text (with the unit) and in CSV (snake_case with a unit suffix), and how
// its numbers print in text: `decimals` ≥ 0 fixed decimals, otherwise `digits` significant figures
// (format_decimals, format_significant); a `resistance` column prints in the IEC 60062 letter code
// with `digits` figures at any size ("253M4", never 2.53391e+08).
struct Column {
    std::string text_header;
    std::string csv_header;
    int decimals = -1;
    int digits = 6;
    bool resistance = false;
};

using Cell = std::variant<double, std::string>;

class Table {
public:
    explicit Table(std::vector<Column> columns) : columns_(std::move(columns)) {}
    void add_row(std::vector<Cell> row) { rows_.push_back(std::move(row)); }
    [[nodiscard]] bool empty() const { return rows_.empty(); }
    // Right-aligned columns, two spaces apart, numbers aligned at the decimal point; NaN prints as "-".
    [[nodiscard]] std::string text() const;
    // A header row and one row per entry, numbers with 10 significant figures; NaN is an empty field.
    [[nodiscard]] std::string csv() const;
    // A pipe table as GitHub-flavoured Markdown renders it (a header row with the text headers and their
    // units, a delimiter row, numbers right-aligned and printed as in text(); '|' in a cell is escaped).
    [[nodiscard]] std::string markdown() const;

private:
    std::vector<Column> columns_;
    std::vector<std::vector<Cell>> rows_;
};

// `s` made safe inside a Markdown table cell or running text: '|', '\\', '*', '_', '`', '<' and '>'
// are backslash-escaped and line breaks become spaces.
[[nodiscard]] std::string markdown_escape(const std::string& s);

// The numbers of text tables and summaries. `format_significant`: `digits` significant figures,
// trailing zeros kept so a column's figures count alike ("0.06230"), in exponent form below 1e-4 or
// from 10^digits up ("3.613e-06"); zero is "0". `format_decimals`: `decimals` fixed decimals, except
// that a value they would show with fewer than two figures keeps `decimals` significant figures
// instead ("0.000412", never "0.000" or "0.001" for it); exactly zero is "0.000". A table column of
// temperatures on the scale (CSV header ending in _c) keeps fixed decimals: 0.02 °C is a position.
// Both print a non-finite value as "-".
[[nodiscard]] std::string format_significant(double v, int digits);
[[nodiscard]] std::string format_decimals(double v, int decimals);

// Display width of UTF-8 text (the bytes that start a code point), for padding labels like "T (°C)".
[[nodiscard]] std::size_t width(const std::string& s);

// The JSON schema's version: 2 since keys carry their units throughout (docs/json.md lists the changes).
inline constexpr int kSchema = 2;

// The key suffix of an output unit ("V/V" -> "_v_per_v", "V" -> "_v", "ohm" -> "_ohm"): CSV has no
// output_unit field, so its headers in the output unit carry it ("output_v_per_v").
[[nodiscard]] std::string unit_suffix(const std::string& output_unit);

// A JSON document's opening keys: tool, version, schema, command.
[[nodiscard]] Json document(const std::string& command);
// A number for JSON: NaN and infinities become null (JSON has neither).
[[nodiscard]] Json number(double v);
// A value with an SI prefix and its unit, 4 figures: 8.191e-08 F -> "81.91 nF", 1e-05 A -> "10 µA".
[[nodiscard]] std::string format_si(double v, const std::string& unit);

// An input echoed back after a unit conversion (100 x a fraction, 1e6 x a coefficient, the table
// model's points through ln R), rounded to 15 significant figures so that the conversion's last-bit
// dust does not show: --ref-tc 50 echoes as 50, not 49.99999999999999.
[[nodiscard]] double echoed(double v);
// Throws std::logic_error if any number in `j` is not finite (the writers' last guard).
void require_finite(const Json& j);
// The document as text, two-space indented, with a final newline; a document (an object with a
// "tool" key) gets the run's warnings() as "warnings" when there are any.
[[nodiscard]] std::string dump(const Json& j);

// While alive, emit() to stdout appends to `buffer` instead (JSON Lines batches collect each result).
class SinkScope {
public:
    explicit SinkScope(std::string& buffer);
    ~SinkScope();
    SinkScope(const SinkScope&) = delete;
    SinkScope& operator=(const SinkScope&) = delete;

private:
    std::string* previous_;
};

// Writes `bytes` to stdout (path empty or "-") or to `path` through a temporary file beside it,
// renamed into place once complete. Throws InputError ("-o") when the file cannot be written.
void emit(const std::string& path, const std::string& bytes);

// Writes `bytes` to stdout and flushes it. Throws InputError ("stdout") when the bytes cannot be
// written (a full disk, /dev/full); a reader that has gone away (EPIPE) ends the program quietly by
// SIGPIPE, as Unix tools do.
void write_stdout(const std::string& bytes);
// Flushes and closes stdout at the end of a run, with write_stdout()'s errors.
void close_stdout();

// The one warning channel: every warning goes to stderr as "rtline: warning: ..." at once (never into
// the data on stdout), and JSON documents carry the run's warnings in a "warnings" array (dump() adds
// it to a document when there are any).
void warn(const std::string& message);
[[nodiscard]] const std::vector<std::string>& warnings();

// While alive, warnings are collected afresh and printed with `prefix` ("line 3: " in a batch).
class WarningScope {
public:
    explicit WarningScope(std::string prefix);
    ~WarningScope();
    WarningScope(const WarningScope&) = delete;
    WarningScope& operator=(const WarningScope&) = delete;

private:
    std::vector<std::string> saved_;
    std::string saved_prefix_;
};

// One output of a run: stdout (path empty or "-") or a file, and the flag that named it.
struct Output {
    std::string path;
    std::string bytes;
    std::string flag = "-o";
};
// Writes all outputs or none: every file goes to a temporary file beside it first, and only when all
// of them are complete are they renamed into place and stdout written. Throws InputError naming the
// flag of the file that cannot be written (the other temporary files are removed).
void emit_all(const std::vector<Output>& outputs);

}  // namespace rtline::cli
