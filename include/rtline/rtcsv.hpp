// Reading R–T points from CSV text: a header naming the columns, comma- or whitespace-separated
// fields, '#' comments, CRLF tolerated. Errors name the source, line and column.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "rtline/thermistor.hpp"

namespace rtline {

// Parses R–T points from `text`. Columns: temperature `t_c` (°C) or `t_k` (K); resistance `r_ohm`
// (a number or a letter-code value such as 4k7) or `r_kohm`. Without a header the columns are taken
// as t_c, r_ohm. Returns the points sorted by temperature; throws InputError naming
// "`source`:line:column" (column = field number, from 1) for a malformed field, a wrong field count,
// a duplicate temperature or a resistance that does not fall with temperature; "`source`:line" for a
// NUL byte (not a text file); "`source`" for a file with no points.
[[nodiscard]] std::vector<RtPoint> read_rt_points(std::string_view text, const std::string& source);

}  // namespace rtline
