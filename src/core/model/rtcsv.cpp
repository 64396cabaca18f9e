#include "rtline/rtcsv.hpp"

#include <algorithm>
#include <cmath>

#include "rtline/error.hpp"

namespace rtline {

namespace {

std::vector<std::string_view> split_fields(std::string_view line) {
    std::vector<std::string_view> fields;
    const bool has_comma = line.find(',') != std::string_view::npos;
    std::size_t i = 0;
    while (i <= line.size()) {
        if (has_comma) {
            const std::size_t comma = std::min(line.find(',', i), line.size());
            std::string_view f = line.substr(i, comma - i);
            while (!f.empty() && (f.front() == ' ' || f.front() == '\t')) f.remove_prefix(1);
            while (!f.empty() && (f.back() == ' ' || f.back() == '\t')) f.remove_suffix(1);
            fields.push_back(f);
            i = comma + 1;
        } else {
            while (i < line.size() && (line[i] == ' ' || line[i] == '\t')) ++i;
            if (i >= line.size()) break;
            std::size_t j = i;
            while (j < line.size() && line[j] != ' ' && line[j] != '\t') ++j;
            fields.push_back(line.substr(i, j - i));
            i = j;
        }
    }
    return fields;
}

struct Located {
    RtPoint point;
    std::size_t line = 0;
};

}  // namespace

std::vector<RtPoint> read_rt_points(std::string_view text, const std::string& source) {
    if (const std::size_t nul = text.find('\0'); nul != std::string_view::npos) {
        const std::size_t previous_nl = text.rfind('\n', nul);
        const std::size_t line_start = previous_nl == std::string_view::npos ? 0 : previous_nl + 1;
        const auto line = 1 + std::count(text.begin(), text.begin() + static_cast<std::ptrdiff_t>(nul), '\n');
        throw InputError(
            source + ":" + std::to_string(line), "",
            "is not a text file (a NUL byte at byte " + std::to_string(nul - line_start + 1) + " of the line)");
    }
    if (text.substr(0, 3) == "\xEF\xBB\xBF") text.remove_prefix(3);  // UTF-8 byte-order mark

    enum class TUnit { celsius, kelvin };
    enum class RUnit { ohm, kohm };
    bool have_header = false;
    std::size_t t_col = 0;
    std::size_t r_col = 1;
    TUnit t_unit = TUnit::celsius;
    RUnit r_unit = RUnit::ohm;
    std::vector<Located> rows;

    std::size_t line_no = 0;
    std::size_t pos = 0;
    bool first_content = true;
    while (pos <= text.size()) {
        const std::size_t nl = std::min(text.find('\n', pos), text.size());
        std::string_view line = text.substr(pos, nl - pos);
        pos = nl + 1;
        ++line_no;
        if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
        if (const std::size_t hash = line.find('#'); hash != std::string_view::npos) line = line.substr(0, hash);
        const auto fields = split_fields(line);
        const bool blank = std::all_of(fields.begin(), fields.end(), [](std::string_view f) { return f.empty(); });
        if (blank) {
            if (nl >= text.size()) break;
            continue;
        }
        const std::string where = source + ":" + std::to_string(line_no);
        if (first_content) {
            first_content = false;
            const char c0 = fields[0].empty() ? ' ' : fields[0][0];
            const bool numeric = (c0 >= '0' && c0 <= '9') || c0 == '-' || c0 == '+' || c0 == '.';
            if (!numeric) {
                have_header = true;
                bool t_found = false;
                bool r_found = false;
                for (std::size_t k = 0; k < fields.size(); ++k) {
                    const std::string name(fields[k]);
                    const std::string at = where + ":" + std::to_string(k + 1);
                    if (name == "t_c" || name == "t_k") {
                        if (t_found) throw InputError(at, name, "a second temperature column");
                        t_found = true;
                        t_col = k;
                        t_unit = name == "t_c" ? TUnit::celsius : TUnit::kelvin;
                    } else if (name == "r_ohm" || name == "r_kohm") {
                        if (r_found) throw InputError(at, name, "a second resistance column");
                        r_found = true;
                        r_col = k;
                        r_unit = name == "r_ohm" ? RUnit::ohm : RUnit::kohm;
                    } else {
                        throw InputError(at, name, "unknown column; the header names t_c or t_k and r_ohm or r_kohm");
                    }
                }
                if (!t_found || !r_found) {
                    throw InputError(where, std::string(line),
                                     "the header must name a temperature (t_c or t_k) and a resistance "
                                     "(r_ohm or r_kohm) column");
                }
                if (nl >= text.size()) break;
                continue;
            }
        }
        const std::size_t want = have_header ? std::max(t_col, r_col) + 1 : 2;
        if (fields.size() != want) {
            // The column is the first extra field, or the first missing one.
            const std::size_t col = fields.size() > want ? want + 1 : fields.size() + 1;
            throw InputError(where + ":" + std::to_string(col), std::string(line),
                             "expected " + std::to_string(want) + " fields, found " + std::to_string(fields.size()));
        }
        const std::string t_at = where + ":" + std::to_string(t_col + 1);
        const std::string r_at = where + ":" + std::to_string(r_col + 1);
        double t_k = 0.0;
        try {
            const double t = parse_number(fields[t_col], t_at);
            t_k = t_unit == TUnit::celsius ? celsius_to_kelvin(t) : t;
        } catch (const InputError&) {
            throw InputError(t_at, std::string(fields[t_col]), "expected a temperature (a plain number)");
        }
        if (const std::string why = point_temperature_problem(t_k); !why.empty()) {
            throw InputError(t_at, std::string(fields[t_col]), why);
        }
        double r = 0.0;
        if (r_unit == RUnit::ohm) {
            r = parse_resistance(fields[r_col], r_at);
        } else {
            r = parse_number(fields[r_col], r_at) * 1e3;
            if (!(r > 0.0)) throw InputError(r_at, std::string(fields[r_col]), "a resistance must be positive");
            if (!std::isfinite(r)) throw InputError(r_at, std::string(fields[r_col]), "too large for a resistance");
        }
        rows.push_back({{t_k, r}, line_no});
        if (nl >= text.size()) break;
    }
    if (rows.empty()) throw InputError(source, "", "contains no R-T points");

    std::stable_sort(rows.begin(), rows.end(),
                     [](const Located& a, const Located& b) { return a.point.t_k < b.point.t_k; });
    for (std::size_t i = 1; i < rows.size(); ++i) {
        const std::string at = source + ":" + std::to_string(rows[i].line) + ":";
        const std::string t_text = format_number(kelvin_to_celsius(rows[i].point.t_k)) + " C";
        if (rows[i].point.t_k == rows[i - 1].point.t_k) {
            throw InputError(at + std::to_string(t_col + 1), t_text,
                             "duplicate temperature (also on line " + std::to_string(rows[i - 1].line) + ")");
        }
        if (!(rows[i].point.r_ohm < rows[i - 1].point.r_ohm)) {
            throw InputError(at + std::to_string(r_col + 1), format_number(rows[i].point.r_ohm) + " ohm",
                             "the resistance at " + t_text + " does not fall below that at " +
                                 format_number(kelvin_to_celsius(rows[i - 1].point.t_k)) + " C (line " +
                                 std::to_string(rows[i - 1].line) + "); an NTC's must fall strictly");
        }
    }
    std::vector<RtPoint> points;
    points.reserve(rows.size());
    for (const Located& l : rows) points.push_back(l.point);
    return points;
}

}  // namespace rtline
