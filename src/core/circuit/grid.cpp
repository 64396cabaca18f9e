#include "rtline/grid.hpp"

#include <cmath>

#include "rtline/error.hpp"

namespace rtline {

std::vector<double> span_temperatures(const Span& span, double step_k) {
    if (!std::isfinite(step_k) || step_k <= 0.0) {
        throw InputError(Input::step, format_number(step_k), "the step must be a positive number of kelvin");
    }
    const double width = span.hi_k - span.lo_k;
    const double intervals = width / step_k;
    // Points: the whole intervals plus one, plus the span's end when the step does not divide it.
    if (!(std::floor(intervals + 1e-9) + 2.0 <= static_cast<double>(kMaxGridPoints)) &&
        !(std::floor(intervals + 1e-9) + 1.0 <= static_cast<double>(kMaxGridPoints) &&
          width - std::floor(intervals + 1e-9) * step_k <= 1e-9 * step_k)) {
        throw InputError(Input::step, format_number(step_k),
                         "gives more than " + std::to_string(kMaxGridPoints) + " points over the span (" +
                             format_number(width) + " K wide); use a larger step or a narrower {span}");
    }
    // A step that divides the span to rounding gives exactly the end, not a sliver before it.
    const auto whole = static_cast<std::size_t>(std::floor(intervals + 1e-9));
    std::vector<double> t;
    t.reserve(whole + 2);
    for (std::size_t i = 0; i <= whole; ++i) t.push_back(span.lo_k + static_cast<double>(i) * step_k);
    if (span.hi_k - t.back() > 1e-9 * step_k) {
        t.push_back(span.hi_k);
    } else {
        t.back() = span.hi_k;
    }
    return t;
}

void check_linearity_points(const Span& span, double step_k) {
    const std::size_t n = span_temperatures(span, step_k).size();
    if (n >= kMinLinearityPoints) return;
    const double width = span.hi_k - span.lo_k;
    throw InputError(Input::step, format_number(step_k),
                     "leaves " + std::to_string(n) + " points over the span (" + format_number(width) +
                         " K wide); judging linearity takes at least " + std::to_string(kMinLinearityPoints) +
                         " (the ends, the middle and one in each half): use a step of at most " +
                         format_number(width / static_cast<double>(kMinLinearityPoints - 1)) + " K");
}

Grid make_grid(const Thermistor& model, const Span& span, double step_k) {
    model.check_span(span, Input::span);
    Grid g;
    g.t_k = span_temperatures(span, step_k);
    g.r_ohm.reserve(g.t_k.size());
    for (const double t : g.t_k) {
        g.r_ohm.push_back(model.resistance(t));
        // Every command derives the sensitivity from the temperature coefficient, which must be a
        // number: −B/T² overflows within about 1e-154 K of absolute zero, where an R-T table can still
        // place a point (the R-T fuzzer's input had one at 8e-215 K).
        if (!std::isfinite(model.alpha(t))) {
            throw InputError(Input::span, format_span(span),
                             "the model's temperature coefficient overflows a double at " + format_number(t) +
                                 " K; keep the span well above absolute zero");
        }
    }
    return g;
}

}  // namespace rtline
