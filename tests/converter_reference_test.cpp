// The converter-reference rule a budget reads a circuit by; each expectation is the rule as
// rtline/budget.hpp states it, worked by hand.
#include <doctest/doctest.h>

#include "rtline/budget.hpp"
#include "rtline/error.hpp"

using namespace rtline;

namespace {
Circuit driven(Drive d, double value) {
    Circuit c;
    c.topology = Topology::divider_low;
    c.rs = 10e3;
    c.excitation = {d, value};
    return c;
}
}  // namespace

TEST_CASE("unstated, the converter reads as the drive implies; a fixed reference needs a drive") {
    BudgetSpec s;
    set_converter_reference(s, driven(Drive::voltage, 3.3), {});
    CHECK_FALSE(s.ratiometric);
    CHECK(s.adc.full_scale == 3.3);  // the drive's own voltage
    CHECK(default_excitation_tolerance(s, driven(Drive::voltage, 3.3)) == 0.01);

    BudgetSpec r;
    set_converter_reference(r, driven(Drive::ratiometric, 1.0), {});
    CHECK(r.ratiometric);
    CHECK(r.adc.full_scale == 1.0);
    CHECK(default_excitation_tolerance(r, driven(Drive::ratiometric, 1.0)) == 0.0);

    BudgetSpec e;
    set_converter_reference(e, driven(Drive::voltage, 5.0), {ConverterReference::Kind::excitation, 0.0});
    CHECK(e.ratiometric);  // read against the drive: its tolerance cancels
    CHECK(default_excitation_tolerance(e, driven(Drive::voltage, 5.0)) == 0.0);

    BudgetSpec f;
    set_converter_reference(f, driven(Drive::current, 100e-6), {ConverterReference::Kind::fixed, 2.5});
    CHECK(f.adc.full_scale == 2.5);
    CHECK_FALSE(f.ratiometric);

    BudgetSpec bad;
    CHECK_THROWS_AS(set_converter_reference(bad, driven(Drive::ratiometric, 1.0), {ConverterReference::Kind::fixed, 2.5}),
                    InputError);
    CHECK_THROWS_AS(set_converter_reference(bad, driven(Drive::voltage, 3.3), {ConverterReference::Kind::fixed, 0.0}),
                    InputError);
    bad.adc.bits = 12;
    try {
        set_converter_reference(bad, driven(Drive::current, 100e-6), {});
        FAIL("a current drive with a converter and no reference was accepted");
    } catch (const InputError& err) {
        CHECK(err.input() == Input::reference);
    }
}
