// Reference lines and deviations from them: the endpoint (terminal) line, the least-squares best-fit
// line and the minimax line (smallest largest deviation). Nonlinearity in %FSD follows Bentley,
// Principles of Measurement Systems, §2.1: deviation / |O(x_hi) − O(x_lo)| × 100.
#pragma once

#include <span>
#include <string_view>

namespace rtline {

enum class LineKind { endpoint, best_fit, minimax };

[[nodiscard]] std::string_view line_name(LineKind k);  // "endpoint", "least-squares", "minimax"
// Parses a line name; throws InputError naming `field`.
[[nodiscard]] LineKind parse_line(std::string_view text, std::string_view field);

// y = slope·x + intercept.
struct Line {
    double slope = 0.0;
    double intercept = 0.0;
    [[nodiscard]] double at(double x) const { return slope * x + intercept; }
};

// The reference line of kind `k` through (x, y); x strictly ascending, at least two points.
[[nodiscard]] Line reference_line(std::span<const double> x, std::span<const double> y, LineKind k);

// The line through the first and last points.
[[nodiscard]] Line endpoint_line(std::span<const double> x, std::span<const double> y);
// The least-squares line (computed about the means, which keeps it well-conditioned).
[[nodiscard]] Line least_squares_line(std::span<const double> x, std::span<const double> y);
// The line minimizing max |y − line|: exact, from the convex hull of the points. The spread
// max(y − m·x) − min(y − m·x) is convex and piecewise linear in m with its breaks at the slopes of hull
// edges, so its minimum is found by binary search over those slopes; the intercept then centres the
// strip, which makes the largest positive and negative deviations equal.
[[nodiscard]] Line minimax_line(std::span<const double> x, std::span<const double> y);

}  // namespace rtline

namespace rtline {

// The full-scale output |y_last − y_first| (Bentley's Omax − Omin for a monotone output).
[[nodiscard]] double full_scale(std::span<const double> y);

// The largest |y − line| over the points as %FSD of full_scale(y), against the line of kind `k`.
// Returns +infinity when the full-scale output is zero. This is the sizing objective.
[[nodiscard]] double max_nonlinearity_pct_fsd(std::span<const double> x, std::span<const double> y, LineKind k);

}  // namespace rtline
