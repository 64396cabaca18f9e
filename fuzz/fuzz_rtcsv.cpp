// Fuzz target: the R-T CSV reader, and what the commands do next with its points (validation, the
// table model, the Steinhart-Hart and beta fits, a grid over the points' span and a divider analysed
// on it). Properties: points come back sorted, T within kMinPointK..kMaxPointK and rising strictly, R
// finite, positive and falling strictly; a refusal is an InputError; whatever is accepted gives finite
// coefficients, resistances, residuals and analysis figures (the numbers every command prints).
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string_view>
#include <vector>

#include "check.hpp"
#include "rtline/analysis.hpp"
#include "rtline/error.hpp"
#include "rtline/fit.hpp"
#include "rtline/rtcsv.hpp"
#include "rtline/thermistor.hpp"

namespace {

// An accepted fit gives back every point's temperature as a finite positive number.
void check_residuals(const rtline::Thermistor& t, const std::vector<rtline::Residual>& rs, double max_residual_k) {
    for (const rtline::Residual& r : rs) {
        FUZZ_CHECK(std::isfinite(r.residual_k));
        const double t_model = t.temperature(r.r_ohm);
        FUZZ_CHECK(std::isfinite(t_model) && t_model > 0.0);
    }
    FUZZ_CHECK(std::isfinite(max_residual_k));
}

// What check does with a model over the points' span: a grid of 21 points and a divider-low whose rs is
// the resistance at the span's centre. The model may refuse the span; if not, every figure is finite.
void analyse(const rtline::Thermistor& t, const std::vector<rtline::RtPoint>& points) {
    try {
        const rtline::Span span{points.front().t_k, points.back().t_k};
        const rtline::Grid grid = rtline::make_grid(t, span, (span.hi_k - span.lo_k) / 20.0);
        for (const double r : grid.r_ohm) FUZZ_CHECK(std::isfinite(r) && r > 0.0);
        rtline::Circuit c;
        c.topology = rtline::Topology::divider_low;
        c.rs = t.resistance(span.centre_k());
        const rtline::Analysis a = rtline::analyze(grid, t, c, rtline::LineKind::minimax, 1e-3);
        for (const rtline::PointResult& p : a.points) {
            FUZZ_CHECK(std::isfinite(p.output) && std::isfinite(p.nonlinearity_pct_fsd) && std::isfinite(p.error_k));
            FUZZ_CHECK(std::isfinite(p.sensitivity_per_k) && std::isfinite(p.power_w) &&
                       std::isfinite(p.self_heating_k));
        }
        FUZZ_CHECK(std::isfinite(a.summary.max_nonlinearity_pct_fsd) && std::isfinite(a.summary.max_error_k));
    } catch (const rtline::InputError&) {
    }
}

void use(const std::vector<rtline::RtPoint>& points) {
    // The table model (what --model table builds), between and at its points.
    try {
        const rtline::Thermistor t(rtline::TableModel(rtline::validate_points(points, 2, "fuzz")));
        analyse(t, points);
        for (std::size_t i = 0; i + 1 < points.size(); ++i) {
            const double mid = 0.5 * (points[i].t_k + points[i + 1].t_k);
            const double r = t.resistance(mid);
            FUZZ_CHECK(std::isfinite(r) && r > 0.0);
            FUZZ_CHECK(std::isfinite(t.alpha(mid)));
        }
    } catch (const rtline::InputError&) {
    }
    try {
        const rtline::ShFit fit = rtline::fit_steinhart_hart(rtline::validate_points(points, 3, "fuzz"));
        FUZZ_CHECK(std::isfinite(fit.model.a) && std::isfinite(fit.model.b) && std::isfinite(fit.model.c));
        check_residuals(rtline::Thermistor(fit.model), fit.residuals, fit.max_residual_k);
        analyse(rtline::Thermistor(fit.model), points);
    } catch (const rtline::InputError&) {
    }
    try {
        const rtline::BetaFit fit = rtline::fit_beta(rtline::validate_points(points, 2, "fuzz"), 298.15);
        FUZZ_CHECK(std::isfinite(fit.model.b_k) && fit.model.b_k > 0.0);
        FUZZ_CHECK(std::isfinite(fit.model.r0_ohm) && fit.model.r0_ohm > 0.0);
        check_residuals(rtline::Thermistor(fit.model), fit.residuals, fit.max_residual_k);
        analyse(rtline::Thermistor(fit.model), points);
    } catch (const rtline::InputError&) {
    }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string_view text(reinterpret_cast<const char*>(data), size);
    std::vector<rtline::RtPoint> points;
    try {
        points = rtline::read_rt_points(text, "fuzz.csv");
    } catch (const rtline::InputError& e) {
        FUZZ_CHECK(e.field().rfind("fuzz.csv", 0) == 0);  // every message names the file first
        return 0;
    }
    FUZZ_CHECK(!points.empty());
    for (std::size_t i = 0; i < points.size(); ++i) {
        FUZZ_CHECK(points[i].t_k >= rtline::kMinPointK && points[i].t_k <= rtline::kMaxPointK);
        FUZZ_CHECK(std::isfinite(points[i].r_ohm) && points[i].r_ohm > 0.0);
        if (i > 0) {
            FUZZ_CHECK(points[i].t_k > points[i - 1].t_k);
            FUZZ_CHECK(points[i].r_ohm < points[i - 1].r_ohm);
        }
    }
    use(points);
    return 0;
}
