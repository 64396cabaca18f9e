// The span sampled once: temperatures from lo to hi (the end always included) and the thermistor's
// resistance at each, computed once and reused by every later step.
#pragma once

#include <cstddef>
#include <vector>

#include "rtline/thermistor.hpp"
#include "rtline/units.hpp"

namespace rtline {

inline constexpr std::size_t kMaxGridPoints = 1'000'000;  // a sane limit on points in one span
// The fewest points that can judge a line's fit (common practice): the two ends, the middle and one in
// each half, so that a deviation that bows one way in each half of the span is seen at all.
inline constexpr std::size_t kMinLinearityPoints = 5;

struct Grid {
    std::vector<double> t_k;    // ascending, K
    std::vector<double> r_ohm;  // thermistor resistance at each t_k, ohm
    [[nodiscard]] std::size_t size() const { return t_k.size(); }
};

// Temperatures lo, lo+step, … and hi itself (a last interval shorter than step when step does not
// divide the span). Requires step > 0 and at most kMaxGridPoints points; the model must cover the span
// (Thermistor::check_span) with a finite temperature coefficient at every point. Throws InputError
// naming Input::step or Input::span.
[[nodiscard]] Grid make_grid(const Thermistor& model, const Span& span, double step_k);

// Throws InputError naming Input::step when `span` at `step_k` gives fewer than kMinLinearityPoints points,
// with the largest step that would do.
void check_linearity_points(const Span& span, double step_k);

// The temperatures alone, as make_grid places them.
[[nodiscard]] std::vector<double> span_temperatures(const Span& span, double step_k);

}  // namespace rtline
