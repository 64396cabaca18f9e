// Each topology's circuit algebra lives in circuit.cpp (operate), and again, specialised for speed, in
// the search kernels (kernel_test holds them to operate bit for bit), the budget's channel and the
// correction's inverse. This test walks every Topology enumerator through the paths that take it, so
// a topology added to one and not the others fails here: the inverse must give back the temperature
// operate() was evaluated at, and the budget's nominal endpoint line (its own channel's reading at the
// span's ends) must pass through operate()'s outputs there, with no error when nothing is uncertain.
#include <doctest/doctest.h>

#include <cmath>
#include <set>

#include "rtline/budget.hpp"
#include "rtline/correction.hpp"
#include "rtline/frontend.hpp"
#include "rtline/grid.hpp"
#include "rtline/sizing.hpp"

using namespace rtline;

namespace {

Circuit design(Topology t) {
    Circuit c;
    c.topology = t;
    c.rs = 8.2e3;
    c.rp = 33e3;
    c.r1 = 12e3;
    c.r2 = 12e3;
    c.r3 = 10e3;
    c.excitation = {Drive::ratiometric, 1.0};
    if (gives_resistance(t)) c.excitation = {Drive::current, 100e-6};
    return c;
}

}  // namespace

TEST_CASE("every topology goes through the correction's inverse and the budget and agrees with operate()") {
    // A greenhouse of our own, 0 to 45 C, a 10k B3950 beta model.
    const Thermistor model(BetaModel{10e3, 298.15, 3950});
    const Span span{273.15, 318.15};
    const Grid grid = make_grid(model, span, 5);
    std::set<Topology> inverted;
    std::set<Topology> budgeted;
    REQUIRE(!all_topologies().empty());
    for (const Topology t : all_topologies()) {
        CAPTURE(topology_name(t));
        const Circuit c = design(t);
        // The channel to the converter: bridges through an amplifier that fills 90 % of the range,
        // current drives against a 5 V reference (100 uA through at most 33k stays under it).
        Channel ch{c, std::nullopt, 1.0};
        if (is_bridge(t)) ch.amplifier = fit_range(c, grid, 1.0, 0.05).amplifier;
        if (c.excitation.drive == Drive::current) ch.reference = 5.0;
        bool readable = true;
        try {
            validate(ch);
        } catch (const InputError&) {
            readable = false;
        }
        if (readable) {
            // The correction's inverse: the 16-bit code nearest the channel's ratio maps back to within
            // that code's width in temperature (one LSB over the local slope), at every grid point; the
            // ratio itself is operate()'s output through the amplifier, over the reference.
            const CodeMap map = map_codes(model, ch, span, 16);
            REQUIRE(map.size() > 2);
            for (std::size_t i = 1; i + 1 < grid.size(); ++i) {
                const double out = operate(c, grid.r_ohm[i]).output;
                const double in = ch.amplifier ? ch.amplifier->gain * out + ch.amplifier->offset : out;
                const double ratio = channel_ratio(ch, grid.r_ohm[i]);
                CHECK(ratio == doctest::Approx(in / ch.reference).epsilon(1e-12));
                const std::int64_t code = ratio_code(ratio, 16, AdcTransfer::rounding);
                const double t_code = map.temperature(code);
                const double slope =
                    std::abs(channel_ratio(ch, model.resistance(grid.t_k[i] + 0.01)) - ratio) / 0.01;
                CHECK(std::abs(t_code - grid.t_k[i]) <= 1.0 / 65536.0 / slope + 1e-9);
            }
            inverted.insert(t);
        }
        // The budget with nothing uncertain: no error at any temperature.
        BudgetSpec s;
        s.tolerance.r25 = 0.0;
        s.tolerance.beta = 0.0;
        s.tolerance.resistors = 0.0;
        s.trials = 0;
        ConverterReference ref;
        if (c.excitation.drive == Drive::current) ref = {ConverterReference::Kind::fixed, 2.5};
        set_converter_reference(s, c, ref);
        const Budget b = compute_budget(grid, model, c, s);
        REQUIRE(b.points.size() == grid.size());
        for (const std::size_t end : {std::size_t{0}, grid.size() - 1}) {
            const double out = operate(c, grid.r_ohm[end]).output;
            CHECK(b.line.at(grid.t_k[end]) == doctest::Approx(out).epsilon(1e-12));
        }
        for (const BudgetPoint& p : b.points) CHECK(std::abs(p.worst_case_k) < 1e-9);
        budgeted.insert(t);
    }
    CHECK(budgeted.size() == all_topologies().size());
    CHECK(inverted.size() == all_topologies().size());  // every topology reaches the converter
}
