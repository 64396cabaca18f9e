// The standard-value search as the speed-ups left it: the same answer whatever the number of threads,
// and, for all its pruning, exactly the best combinations a full evaluation of every pair finds.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <vector>

#include "rtline/sizing.hpp"

using namespace rtline;

namespace {

constexpr double kT25 = 298.15;  // 25 °C in kelvin (SI)

Thermistor beta_model(double r25, double b) { return Thermistor(BetaModel{r25, kT25, b}); }

Span span_c(double lo_c, double hi_c) { return {lo_c + 273.15, hi_c + 273.15}; }

std::vector<double> free_values(const Candidate& c) {
    std::vector<double> v;
    for (const std::string& name : free_resistors(c.circuit.topology)) v.push_back(resistor_value(c.circuit, name));
    return v;
}

// A battery-pack shunt-bridge of our own: 3.3 V across the bridge, a 20 kohm amplifier input, at most
// 150 uW in the thermistor, over -20 to 60 C.
SizingSpec battery_bridge() {
    SizingSpec spec;
    spec.base.topology = Topology::shunt_bridge;
    spec.base.excitation = {Drive::voltage, 3.3};
    spec.base.load_ohm = 20e3;
    spec.null_at_k = 273.15 - 20.0;
    spec.series = Series::e24;
    spec.range_lo_ohm = 100.0;
    spec.range_hi_ohm = 1e6;
    spec.top = 25;
    spec.constraints.max_power_w = 150e-6;
    return spec;
}

}  // namespace

TEST_CASE("the search gives the same candidates, counts and figures whatever the number of threads") {
    const Thermistor model = beta_model(10e3, 3950);
    const Grid grid = make_grid(model, span_c(-20, 60), 0.5);
    SizingSpec spec = battery_bridge();
    spec.threads = 1;
    const StandardSearch one = search_standard(spec, grid, model);
    REQUIRE(one.best.size() == 25);
    CHECK(one.examined == 97u * 97u);  // E24 from 100 ohm to 1 Mohm: 4 decades × 24 + 1 (hand count)
    for (const std::size_t threads : {2u, 3u, 8u}) {
        CAPTURE(threads);
        spec.threads = threads;
        const StandardSearch many = search_standard(spec, grid, model);
        CHECK(many.examined == one.examined);
        CHECK(many.removed == one.removed);
        REQUIRE(many.best.size() == one.best.size());
        for (std::size_t i = 0; i < one.best.size(); ++i) {
            CAPTURE(i);
            CHECK(free_values(many.best[i]) == free_values(one.best[i]));
            CHECK(many.best[i].max_nonlinearity_pct_fsd == one.best[i].max_nonlinearity_pct_fsd);
            CHECK(many.best[i].output_span == one.best[i].output_span);
        }
    }
    // The power limit does remove some: the counts above compare something.
    REQUIRE(one.removed.size() == 4);
    CHECK(one.removed[2].first == rtline::Input::max_power);
    CHECK(one.removed[2].second > 0u);
}

TEST_CASE("the pruned search finds exactly the best pairs that scoring every pair in full finds") {
    const Thermistor model = beta_model(10e3, 3950);
    const Grid grid = make_grid(model, span_c(-20, 60), 0.5);
    SizingSpec spec = battery_bridge();
    const StandardSearch found = search_standard(spec, grid, model);
    // Every pair in full: objective() on the circuit (operate() at every point, then the endpoint line),
    // and the power limit by operate() at every point.
    const std::vector<double> values = series_values(spec.series, spec.range_lo_ohm, spec.range_hi_ohm);
    std::vector<double> objectives;
    std::size_t over_power = 0;
    for (const double rp : values) {
        for (const double r1 : values) {
            const Circuit c = sized_circuit(spec, model, {rp, r1});
            double max_power = 0.0;
            for (const double r : grid.r_ohm) max_power = std::max(max_power, operate(c, r).power_w);
            if (max_power > spec.constraints.max_power_w) {
                ++over_power;
                continue;
            }
            objectives.push_back(objective(spec, grid, c));
        }
    }
    std::sort(objectives.begin(), objectives.end());
    CHECK(found.removed[2].second == over_power);
    REQUIRE(found.best.size() == 25);
    for (std::size_t i = 0; i < found.best.size(); ++i) {
        CAPTURE(i);
        // The i-th best objective is the i-th smallest of all (ties, to 1e-9, only reorder equal values).
        CHECK(found.best[i].max_nonlinearity_pct_fsd == doctest::Approx(objectives[i]).epsilon(1e-9));
        const Circuit c = sized_circuit(spec, model, free_values(found.best[i]));
        CHECK(objective(spec, grid, c) <= objectives[24] * (1.0 + 1e-9));
    }
}

TEST_CASE("a topology comparison ranks each topology's own best and says why it left the others out") {
    // A freezer room of our own, -30 to 0 C, ratiometric: the comparison's rows must be exactly what a
    // search of each topology alone finds (the exhaustive search, checked by brute force in sizing_test).
    const Thermistor model = beta_model(10e3, 3950);
    const Grid grid = make_grid(model, span_c(-30, 0), 1);
    SizingSpec spec;
    spec.base.excitation = {Drive::ratiometric, 1.0};
    spec.series = Series::e12;
    spec.range_lo_ohm = 1e3;
    spec.range_hi_ohm = 100e3;
    const Comparison cmp = compare_topologies(spec, grid, model);
    REQUIRE(!cmp.ranked.empty());
    for (std::size_t i = 1; i < cmp.ranked.size(); ++i) {
        CHECK(cmp.ranked[i - 1].max_nonlinearity_pct_fsd <= cmp.ranked[i].max_nonlinearity_pct_fsd);
    }
    std::size_t searched = 0;
    for (const Topology t : all_topologies()) {
        if (free_resistors(t).empty()) continue;
        SizingSpec one = spec;
        one.base.topology = t;
        one.top = 1;
        const auto skipped = std::find_if(cmp.skipped.begin(), cmp.skipped.end(), [&](const auto& s) { return s.first == t; });
        const auto row = std::find_if(cmp.ranked.begin(), cmp.ranked.end(),
                                      [&](const Candidate& c) { return c.circuit.topology == t; });
        CAPTURE(topology_name(t));
        CHECK((skipped == cmp.skipped.end()) != (row == cmp.ranked.end()));  // one or the other
        if (gives_resistance(t)) {
            // A ratiometric reading of a resistance: the shunt has no V/V output to read.
            continue;
        }
        if (row == cmp.ranked.end()) continue;
        const StandardSearch alone = search_standard(one, grid, model);
        REQUIRE(!alone.best.empty());
        CHECK(free_values(*row) == free_values(alone.best.front()));
        CHECK(row->max_nonlinearity_pct_fsd == alone.best.front().max_nonlinearity_pct_fsd);
        searched += alone.examined;
    }
    CHECK(searched <= cmp.total.examined);
    CHECK(searched > 0u);
}

TEST_CASE("an infeasible search names the constraint that removed most, as an input the front end renders") {
    SizingSpec spec;
    spec.series = Series::e24;
    StandardSearch s;
    s.examined = 169;
    s.removed = {{Input::min_span, 169}, {Input::min_sensitivity, 0}, {Input::max_power, 12}, {Input::max_self_heating, 0}};
    const InfeasibleError e = infeasible(spec, s, "");
    // Composed by hand from the rule: the most first, then the others that removed any.
    CHECK(e.message() == "no E24 combination meets the constraints: {min_span} removed 169 of 169 combinations; "
                         "{max_power} removed 12");
    CHECK(std::string(e.what()) == "no E24 combination meets the constraints: the least output span removed 169 of "
                                   "169 combinations; the power limit removed 12");
}
