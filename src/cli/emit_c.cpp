#include "emit_c.hpp"

#include <cctype>
#include <cstdio>
#include <stdexcept>

#include "rtline/error.hpp"

namespace rtline::cli {

void check_c_prefix(const std::string& prefix) {
    bool ok = !prefix.empty() && prefix.size() <= 32 &&
              (std::isalpha(static_cast<unsigned char>(prefix[0])) || prefix[0] == '_');
    for (const char ch : prefix) {
        if (!std::isalnum(static_cast<unsigned char>(ch)) && ch != '_') ok = false;
    }
    if (!ok) {
        throw InputError("--prefix", prefix,
                         "a C name prefix is a letter or '_' then letters, digits or '_', at most 32 characters");
    }
}

namespace {

std::string upper(std::string s) {
    for (char& ch : s) ch = static_cast<char>(std::toupper(static_cast<unsigned char>(ch)));
    return s;
}

std::string exact(double v) {
    char buffer[40];
    std::snprintf(buffer, sizeof buffer, "%.17g", v);
    return buffer;
}

// Numbers `per_line` to a line, indented, comma-separated.
template <typename T>
std::string rows(const std::vector<T>& values, std::size_t per_line, std::string (*text)(T)) {
    std::string out;
    for (std::size_t i = 0; i < values.size(); ++i) {
        out += i % per_line == 0 ? "    " : " ";
        out += text(values[i]);
        if (i + 1 < values.size()) out += ',';
        if (i % per_line == per_line - 1 || i + 1 == values.size()) out += '\n';
    }
    return out;
}

std::string code_text(std::int64_t v) { return std::to_string(v) + "u"; }
std::string temp_text(std::int32_t v) { return std::to_string(v); }
std::string double_text(double v) { return exact(v); }

}  // namespace

std::string meaning_macro(const std::string& P, CodeMeaning m) {
    switch (m) {
        case CodeMeaning::reading: return P + "READING";
        case CodeMeaning::open: return P + "OPEN";
        case CodeMeaning::short_circuit: return P + "SHORT";
        case CodeMeaning::out_of_range: return P + "OUT_OF_RANGE";
    }
    return P + "READING";
}

std::string c_header(const CHeader& h) {
    if (h.table == nullptr || h.faults == nullptr) throw std::logic_error("c_header needs a table and fault bands");
    const FixedTable& t = *h.table;
    const FaultBands& f = *h.faults;
    std::string p = h.prefix;
    if (!p.empty() && p.back() != '_') p += '_';
    const std::string P = upper(p);
    const std::string code_type = h.adc_bits <= 16 ? "uint16_t" : "uint32_t";
    const std::string temp_type = t.bits == 16 ? "int16_t" : "int32_t";
    const std::string wide = t.arithmetic_bits == 32 ? "int32_t" : "int64_t";
    const std::string unit = t.scale_per_c == 100 ? "0.01" : "0.1";
    const std::string cast = P + "CAST";

    std::string s = "/*\n";
    for (const std::string& line : h.comment) s += line.empty() ? " *\n" : " * " + line + "\n";
    s += " */\n";
    s += "#ifndef " + P + "TABLE_H\n#define " + P + "TABLE_H\n\n#include <stdint.h>\n\n";
    s += "/* Casts that C++ compilers accept under -Wold-style-cast; undefined again at the end. */\n";
    s += "#ifdef __cplusplus\n#define " + cast + "(type, value) static_cast<type>(value)\n#else\n#define " + cast +
         "(type, value) ((type)(value))\n#endif\n\n";
    s += "#define " + P + "ADC_BITS " + std::to_string(h.adc_bits) + "\n";
    s += "#define " + P + "ENTRIES " + std::to_string(t.codes.size()) + "u\n";
    s += "#define " + P + "COUNTS_PER_DEGC " + std::to_string(t.scale_per_c) + " /* temperatures in " + unit +
         " degC */\n";
    s += "#define " + P + "CODE_LO " + std::to_string(t.code_lo) + "u /* the span's first code */\n";
    s += "#define " + P + "CODE_HI " + std::to_string(t.code_hi) + "u /* the span's last code */\n";
    if (t.spacing == Spacing::power_of_two) {
        s += "#define " + P + "SHIFT " + std::to_string(t.shift) +
             "u /* breakpoints every 2^SHIFT codes from CODE_LO */\n";
    }
    s += "\n/* Breakpoints: ADC codes, ascending, and the temperature at each in " + unit + " degC. */\n";
    s += "static const " + code_type + " " + p + "code[" + P + "ENTRIES] = {\n" + rows(t.codes, 10, code_text) + "};\n";
    s += "static const " + temp_type + " " + p + "temp[" + P + "ENTRIES] = {\n" + rows(t.t, 10, temp_text) + "};\n\n";
    s += "/* Temperature in " + unit + " degC for an ADC code: linear interpolation between the breakpoints in " +
         std::to_string(t.arithmetic_bits) +
         "-bit\n * integers, halves rounded away from zero; codes outside CODE_LO..CODE_HI read as the span's ends. "
         "*/\n";
    s += "static inline int32_t " + p + "temperature(uint32_t code)\n{\n";
    s += "    uint32_t i;\n    " + wide + " num;\n    " + wide + " den;\n";
    s += "    if (code < " + P + "CODE_LO) {\n        code = " + P + "CODE_LO;\n    }\n";
    s += "    if (code > " + P + "CODE_HI) {\n        code = " + P + "CODE_HI;\n    }\n";
    if (t.spacing == Spacing::power_of_two) {
        s += "    i = (code - " + P + "CODE_LO) >> " + P + "SHIFT;\n";
        s += "    if (i > " + P + "ENTRIES - 2u) {\n        i = " + P + "ENTRIES - 2u;\n    }\n";
    } else {
        s += "    {\n        uint32_t hi = " + P + "ENTRIES - 1u;\n        i = 0u;\n";
        s += "        while (hi - i > 1u) {\n            uint32_t mid = i + (hi - i) / 2u;\n";
        s += "            if (" + cast + "(uint32_t, " + p +
             "code[mid]) <= code) {\n                i = mid;\n            } else {\n"
             "                hi = mid;\n            }\n        }\n    }\n";
    }
    s += "    num = (" + cast + "(" + wide + ", " + p + "temp[i + 1u]) - " + cast + "(" + wide + ", " + p +
         "temp[i])) *\n          " + cast + "(" + wide + ", code - " + cast + "(uint32_t, " + p + "code[i]));\n";
    s += "    den = " + cast + "(" + wide + ", " + cast + "(uint32_t, " + p + "code[i + 1u]) - " + cast +
         "(uint32_t, " + p + "code[i]));\n";
    s += "    return " + cast + "(int32_t, " + cast + "(" + wide + ", " + p +
         "temp[i]) + (num >= 0 ? num + den / 2 : num - den / 2) / den);\n}\n";

    s += "\n/* What a code means: a temperature, or a broken sensor (fault bands beyond the span plus a margin). */\n";
    s += "#define " + P + "READING 0\n#define " + P + "OPEN 1 /* open thermistor or broken wire */\n#define " + P +
         "SHORT 2 /* shorted thermistor */\n#define " + P +
         "OUT_OF_RANGE 3 /* neither a reading nor a thermistor fault: check the wiring */\n";
    s += "#define " + P + "READING_LO " + std::to_string(f.reading_lo()) +
         "u /* first code that reads as a temperature */\n";
    s += "#define " + P + "READING_HI " + std::to_string(f.reading_hi()) + "u /* last */\n\n";
    s += "static inline int " + p + "sensor_state(uint32_t code)\n{\n";
    CodeMeaning below = CodeMeaning::reading;
    CodeMeaning above = CodeMeaning::reading;
    for (const CodeBand& b : f.bands) {
        if (b.last < f.reading_lo()) below = b.meaning;
        if (b.first > f.reading_hi()) above = b.meaning;
    }
    if (below != CodeMeaning::reading) {
        s += "    if (code < " + P + "READING_LO) {\n        return " + meaning_macro(P, below) + ";\n    }\n";
    }
    if (above != CodeMeaning::reading) {
        s += "    if (code > " + P + "READING_HI) {\n        return " + meaning_macro(P, above) + ";\n    }\n";
    }
    if (below == CodeMeaning::reading && above == CodeMeaning::reading) s += "    (void)code;\n";
    s += "    return " + P + "READING;\n}\n";

    if (h.polynomial != nullptr) {
        const Polynomial& poly = *h.polynomial;
        std::vector<double> c_c = poly.coefficients_k;
        c_c[0] = kelvin_to_celsius(c_c[0]);
        s += "\n#define " + P + "POLY_DEGREE " + std::to_string(poly.degree) + "\n";
        s += "#define " + P + "POLY_CODE_LO " + std::to_string(poly.code_lo) + "u\n";
        s += "#define " + P + "POLY_CODE_HI " + std::to_string(poly.code_hi) + "u\n\n";
        s += "/* T(x) in degC = sum of " + p +
             "poly[i] * x^i, x = (2*code - (LO + HI)) / (HI - LO) in [-1, 1]\n"
             " * (" +
             std::string(fit_name(poly.fit)) + " fit). */\n";
        s += "static const double " + p + "poly[" + P + "POLY_DEGREE + 1] = {\n" + rows(c_c, 3, double_text) + "};\n\n";
        s += "/* Temperature in degC for an ADC code by the polynomial (Horner's rule); codes outside the span\n"
             " * read as its ends. */\n";
        s += "static inline double " + p + "poly_temperature(uint32_t code)\n{\n";
        s += "    double x = (2.0 * " + cast + "(double, code) - " + cast + "(double, " + P + "POLY_CODE_LO + " + P +
             "POLY_CODE_HI)) /\n"
             "               " +
             cast + "(double, " + P + "POLY_CODE_HI - " + P + "POLY_CODE_LO);\n";
        s += "    double t = 0.0;\n    int i;\n";
        s += "    if (x < -1.0) {\n        x = -1.0;\n    }\n    if (x > 1.0) {\n        x = 1.0;\n    }\n";
        s += "    for (i = " + P + "POLY_DEGREE; i >= 0; --i) {\n        t = t * x + " + p + "poly[i];\n    }\n";
        s += "    return t;\n}\n";
    }
    s += "\n#undef " + cast + "\n\n#endif /* " + P + "TABLE_H */\n";
    return s;
}

}  // namespace rtline::cli
