// The command line's name for each of the core's inputs: the flag that sets it.
#include <string>

#include "common.hpp"

namespace rtline::cli {

std::string flag_name(Input input) {
    switch (input) {
        case Input::points: return "--points";
        case Input::r0: return "--r25";
        case Input::b_value: return "--beta";
        case Input::t0: return "--t0";
        case Input::sh_coefficients: return "--sh";
        case Input::model: return "--model";
        case Input::part: return "--part-points";
        case Input::span: return "--span";
        case Input::step: return "--step";
        case Input::topology: return "--circuit";
        case Input::lead: return "--lead";
        case Input::load: return "--load";
        case Input::excitation: return "--excitation";
        case Input::current: return "--current";
        case Input::gain: return "--gain";
        case Input::offset: return "--offset";
        case Input::amp_output: return "--amp-output";
        case Input::headroom: return "--headroom";
        case Input::output_range: return "--auto-range";
        case Input::reference: return "--adc-ref";
        case Input::adc_bits: return "--adc-bits";
        case Input::sample_cap: return "--sample-cap";
        case Input::acquisition: return "--acquisition";
        case Input::entries: return "--entries";
        case Input::degree: return "--degree";
        case Input::unit: return "--unit";
        case Input::max_error: return "--max-error";
        case Input::tol_r0: return "--r25-tol";
        case Input::tol_b: return "--beta-tol";
        case Input::tol_resistors: return "--resistor-tol";
        case Input::tol_excitation: return "--excitation-tol";
        case Input::drift: return "--drift";
        case Input::tol_lead: return "--lead-tol";
        case Input::tol_reference: return "--ref-tol";
        case Input::resistor_tc: return "--resistor-tc";
        case Input::reference_tc: return "--ref-tc";
        case Input::board_temperature: return "--board-temp";
        case Input::cable_temperature: return "--cable-temp";
        case Input::tol_dt: return "--dt-tol";
        case Input::dt_range: return "--dt-range";
        case Input::lead_compensation: return "--lead-compensation";
        case Input::adc_offset: return "--adc-offset";
        case Input::adc_gain: return "--adc-gain";
        case Input::adc_inl: return "--adc-inl";
        case Input::adc_error: return "--adc-error";
        case Input::amp_gain_tol: return "--amp-gain-tol";
        case Input::amp_offset: return "--amp-offset";
        case Input::amp_offset_drift: return "--amp-offset-drift";
        case Input::amp_bias: return "--amp-bias";
        case Input::amp_offset_current: return "--amp-offset-current";
        case Input::dissipation: return "--dissipation";
        case Input::trials: return "--trials";
        case Input::threads: return "--threads";
        case Input::min_span: return "--min-span";
        case Input::min_sensitivity: return "--min-sensitivity";
        case Input::max_power: return "--max-power";
        case Input::max_self_heating: return "--max-self-heating";
        case Input::rs: return "--rs";
        case Input::rp: return "--rp";
        case Input::r1: return "--r1";
        case Input::r2: return "--r2";
        case Input::r3: return "--r3";
    }
    return std::string(input_key(input));  // unreachable with every enumerator handled (-Wswitch)
}

std::string message(const Error& e) { return e.render(flag_name); }

}  // namespace rtline::cli
