// The search kernels (src/core/circuit/search_kernels.hpp) against operate() and max_nonlinearity_pct_fsd(),
// which the circuit tests hold to ngspice and the line tests to numpy: a kernel must give their values
// bit for bit, for every topology, drive and load, or a search would rank differently from a check.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "rtline/sizing.hpp"
#include "circuit/search_kernels.hpp"

using namespace rtline;

namespace {

constexpr double kT25 = 298.15;  // 25 °C in kelvin (SI)

Thermistor beta_model(double r25, double b) { return Thermistor(BetaModel{r25, kT25, b}); }

Span span_c(double lo_c, double hi_c) { return {lo_c + 273.15, hi_c + 273.15}; }

// Same value, or both NaN (the power of a resistance output without a drive).
bool same(double a, double b) { return a == b || (std::isnan(a) && std::isnan(b)); }

struct Setting {
    const char* what;
    Excitation drive;
    double load_ohm;
};

const Setting kSettings[] = {
    {"ratiometric, no load", {Drive::ratiometric, 1.0}, kNoLoad},
    {"ratiometric, 47 kohm load", {Drive::ratiometric, 1.0}, 47e3},
    {"3.3 V, no load", {Drive::voltage, 3.3}, kNoLoad},
    {"3.3 V, 20 kohm load", {Drive::voltage, 3.3}, 20e3},
    {"100 uA, no load", {Drive::current, 100e-6}, kNoLoad},
    {"100 uA, 100 kohm load", {Drive::current, 100e-6}, 100e3},
};

// Free resistor values to try (free_resistors order; the second unused by one-resistor topologies).
const std::vector<std::vector<double>> kValues = {{1e3, 4.7e3}, {10e3, 10e3}, {68e3, 2.2e3}, {330, 1.5e6}};

}  // namespace

TEST_CASE("the scan grid holds every grid point once, the two ends first, padded with the first point") {
    const Thermistor model = beta_model(10e3, 3950);
    const Grid grid = make_grid(model, span_c(0, 100), 0.25);  // 401 points
    const kernel::ScanGrid scan = kernel::scan_grid(grid);
    REQUIRE(scan.index.size() == 401);
    CHECK(scan.index[0] == 0);
    CHECK(scan.index[1] == 400);
    CHECK(scan.index[2] == 200);  // then the middle (coarse to fine)
    std::vector<std::size_t> sorted = scan.index;
    std::sort(sorted.begin(), sorted.end());
    for (std::size_t i = 0; i < sorted.size(); ++i) CHECK(sorted[i] == i);
    CHECK(scan.size() % kernel::kBlock == 0);
    CHECK(scan.size() == 408);  // 401 rounded up to whole blocks of 8
    for (std::size_t i = 0; i < scan.size(); ++i) {
        const std::size_t g = i < 401 ? scan.index[i] : 0;
        CHECK(scan.t_k[i] == grid.t_k[g]);
        CHECK(scan.r_ohm[i] == grid.r_ohm[g]);
    }
}

TEST_CASE("every kernel gives operate()'s output and power bit for bit, for every drive and load, pairs too") {
    const Thermistor model = beta_model(10e3, 3950);
    const Grid grid = make_grid(model, span_c(-20, 60), 1);
    const kernel::ScanGrid scan = kernel::scan_grid(grid);
    for (const Topology t : all_topologies()) {
        if (t == Topology::bare) continue;
        for (const Setting& s : kSettings) {
            SizingSpec spec;
            spec.base.topology = t;
            spec.base.excitation = s.drive;
            spec.base.load_ohm = s.load_ohm;
            spec.null_at_k = 273.15 + 10.0;  // bridges null at 10 °C
            const double r_null = model.resistance(spec.null_at_k);
            const std::size_t free = free_resistors(t).size();
            int compared = 0;
            kernel::with_kernel(spec.base, r_null, scan, [&](auto k) {
                for (const std::vector<double>& v : kValues) {
                    const std::vector<double> values(v.begin(), v.begin() + static_cast<long>(free));
                    const Circuit c = sized_circuit(spec, model, values);
                    k.outer(values.front());
                    k.inner(values.back());
                    for (std::size_t i = 0; i < scan.size(); ++i) {
                        const OperatingPoint op = operate(c, scan.r_ohm[i]);
                        CAPTURE(std::string(topology_name(t)));
                        CAPTURE(s.what);
                        CAPTURE(i);
                        CHECK(k.output(i) == op.output);
                        CHECK(same(k.power(i), op.power_w));
                        ++compared;
                    }
                    // Two points at once: the same bits as one at a time.
                    for (std::size_t i = 0; i < scan.size(); i += 2) {
                        const kernel::Pair p = k.template output<kernel::Pair>(i);
                        CHECK(p[0] == k.output(i));
                        CHECK(p[1] == k.output(i + 1));
                    }
                }
            });
            CHECK(compared == static_cast<int>(kValues.size() * scan.size()));
        }
    }
}

TEST_CASE("the endpoint scan gives max_nonlinearity_pct_fsd exactly, and stops only above the limit") {
    const Thermistor model = beta_model(10e3, 3950);
    const Grid grid = make_grid(model, span_c(0, 100), 0.25);
    const kernel::ScanGrid scan = kernel::scan_grid(grid);
    SizingSpec spec;
    spec.base.topology = Topology::shunt_divider;
    kernel::with_kernel(spec.base, 0.0, scan, [&](auto k) {
        for (const std::vector<double>& v : kValues) {
            CAPTURE(v[0]);
            CAPTURE(v[1]);
            k.outer(v[0]);
            k.inner(v[1]);
            std::vector<double> y;
            for (const double r : grid.r_ohm) y.push_back(output(sized_circuit(spec, model, v), r));
            const double expected = max_nonlinearity_pct_fsd(grid.t_k, y, LineKind::endpoint);
            const kernel::Ends e = kernel::ends(k);
            CHECK_FALSE(e.unchanging);
            CHECK(kernel::endpoint_scan(k, scan.t_k, e, [](double) { return false; }).pct_fsd == expected);
            // A limit below the objective stops the scan at a value above the limit, never above the objective.
            const double limit = 0.5 * expected;
            const kernel::Scan stopped = kernel::endpoint_scan(k, scan.t_k, e, [&](double pct) { return pct > limit; });
            CHECK_FALSE(stopped.complete);
            CHECK(stopped.pct_fsd > limit);
            CHECK(stopped.pct_fsd <= expected);
            // A limit above it never stops it.
            const kernel::Scan full =
                kernel::endpoint_scan(k, scan.t_k, e, [&](double pct) { return pct > 2.0 * expected; });
            CHECK(full.complete);
            CHECK(full.pct_fsd == expected);
        }
    });
}
