// The C writer: a lookup table, a sensor-fault classification (and optionally a polynomial) as a
// self-contained header for firmware, with `static const` arrays and small `static inline` functions.
// Names are plain words behind a prefix the user chooses. Clean as C99 and as C++11 under -Wall
// -Wextra -Werror -pedantic -Wconversion -Wsign-conversion -Wshadow (and -Wold-style-cast in C++: the
// casts go through a macro that is static_cast in C++), in any number of translation units.
#pragma once

#include <string>
#include <vector>

#include "rtline/correction.hpp"

namespace rtline::cli {

struct CHeader {
    std::string prefix = "ntc_";       // a C identifier; "_" is added when it does not end in one
    std::vector<std::string> comment;  // lines for the header's opening comment (ASCII)
    int adc_bits = 12;
    const FixedTable* table = nullptr;       // required
    const FaultBands* faults = nullptr;      // required: <prefix>sensor_state()
    const Polynomial* polynomial = nullptr;  // optional: also emit <prefix>poly_temperature()
};

// Throws InputError ("--prefix") unless `prefix` is a C identifier of at most 32 characters.
void check_c_prefix(const std::string& prefix);

// The header's text.
[[nodiscard]] std::string c_header(const CHeader& h);

}  // namespace rtline::cli
