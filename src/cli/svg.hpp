// A small SVG writer for design-review pictures: plots stacked in one self-contained picture, each
// with linear or log axes, "nice" tick values (1-2-5 steps), axis labels with units, polylines,
// markers, a legend and a title. No scripts, no links, no fonts from outside; all text XML-escaped.
// It draws what it is given: the figures' numbers come from the commands' result structs.
#pragma once

#include <cmath>
#include <string>
#include <string_view>
#include <vector>

namespace rtline::cli::svg {

enum class Scale { linear, log10 };

// How tick values print: plain numbers (SI prefixes beyond 1e5 or below 1e-4), whole numbers in full
// (ADC codes), or resistances in the IEC 60062 letter code (4k7).
enum class Ticks { number, whole, resistance };

struct Axis {
    std::string label;  // with its unit, e.g. "temperature (°C)"
    Scale scale = Scale::linear;
    Ticks ticks = Ticks::number;
    double lo = NAN;  // NaN: from the data (x exactly, y padded by 5 % of its range)
    double hi = NAN;
};

// A secondary axis along the top of a plot, with ticks the caller places (in x units).
struct TopAxis {
    std::string label;
    std::vector<double> at;           // x positions
    std::vector<std::string> labels;  // one per position
};

// A secondary axis on the right of a plot: right value = factor × y (factor ≠ 0).
struct RightAxis {
    std::string label;
    double factor = 0.0;  // 0: no right axis
};

enum class Shape { circle, square, diamond };

struct Series {
    std::string label;         // legend entry (empty: not in the legend)
    std::vector<double> x, y;  // a non-finite y breaks the line
    std::string colour = "#1f4e9a";
    double width_px = 2.0;
    bool dashed = false;
};

struct Markers {
    std::string label;
    std::vector<double> x, y;
    std::string colour = "#c0392b";
    Shape shape = Shape::circle;
    bool filled = true;
    double size_px = 5.0;  // half-width
};

struct Plot {
    std::string title;
    Axis x, y;
    TopAxis top;  // empty `at`: none
    RightAxis right;
    std::vector<Series> lines;
    std::vector<Markers> markers;
    bool zero_line = false;  // a darker horizontal line at y = 0 when it is in range
};

struct Figure {
    std::string title;
    std::vector<std::string> notes;  // lines under the title (model, circuit, …)
    std::vector<Plot> plots;         // stacked top to bottom, the same width
    std::string description;         // goes into <desc>
    double width_px = 800.0;
    double plot_height_px = 250.0;
};

// Lines with more points than this are thinned to the smallest and largest value in each pixel
// column (so their extremes survive); the <desc> says so.
inline constexpr std::size_t kMaxVertices = 1600;

// The picture as SVG text (UTF-8). Throws std::logic_error for an empty plot or an axis without data.
[[nodiscard]] std::string render(const Figure& f);

// The 1-2-5 step (1, 2 or 5 × 10^k) that puts about `target` steps across [lo, hi]; requires lo < hi.
[[nodiscard]] double nice_step(double lo, double hi, int target);
// The multiples of nice_step(lo, hi, target) that lie in [lo, hi].
[[nodiscard]] std::vector<double> nice_ticks(double lo, double hi, int target);
// Ticks for a log axis over [lo, hi] (0 < lo < hi): m × 10^k for each mantissa m (e.g. 1, 2, 5)
// inside the range; empty when fewer than two fall inside.
[[nodiscard]] std::vector<double> log_ticks(double lo, double hi, const std::vector<int>& mantissas);
// A tick value as text, given the axis's step (for the decimals) and kind.
[[nodiscard]] std::string tick_label(double v, double step, Ticks kind);
// Text made safe for XML character data and attribute values.
[[nodiscard]] std::string escape(std::string_view text);

}  // namespace rtline::cli::svg
