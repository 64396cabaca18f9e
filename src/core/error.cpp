#include "rtline/error.hpp"

#include <cstdio>
#include <utility>

namespace rtline {

namespace {

struct InputName {
    Input input;
    std::string_view key;
    std::string_view noun;
};

// One row per Input, in declaration order (checked by the static_assert below and by error_test).
constexpr std::array<InputName, kInputCount> kInputs = {{
    {Input::points, "points", "the R-T points"},
    {Input::r0, "r0", "the resistance at T0"},
    {Input::b_value, "b_value", "the B-value"},
    {Input::t0, "t0", "T0"},
    {Input::sh_coefficients, "sh_coefficients", "the Steinhart-Hart coefficients"},
    {Input::model, "model", "the model"},
    {Input::part, "part", "the part's own curve"},
    {Input::span, "span", "the span"},
    {Input::step, "step", "the step"},
    {Input::topology, "topology", "the topology"},
    {Input::lead, "lead", "the lead resistance"},
    {Input::load, "load", "the load resistance"},
    {Input::excitation, "excitation", "the excitation voltage"},
    {Input::current, "current", "the excitation current"},
    {Input::gain, "gain", "the amplifier gain"},
    {Input::offset, "offset", "the amplifier offset"},
    {Input::amp_output, "amp_output", "the amplifier's output resistance"},
    {Input::headroom, "headroom", "the headroom"},
    {Input::output_range, "output_range", "the amplifier range"},
    {Input::reference, "reference", "the converter reference"},
    {Input::adc_bits, "adc_bits", "the converter resolution"},
    {Input::sample_cap, "sample_cap", "the sampling capacitance"},
    {Input::acquisition, "acquisition", "the acquisition time"},
    {Input::entries, "entries", "the table entries"},
    {Input::degree, "degree", "the polynomial degree"},
    {Input::unit, "unit", "the table unit"},
    {Input::max_error, "max_error", "the error limit"},
    {Input::tol_r0, "tol_r0", "the R0 tolerance"},
    {Input::tol_b, "tol_b", "the B-value tolerance"},
    {Input::tol_resistors, "tol_resistors", "the resistor tolerance"},
    {Input::tol_excitation, "tol_excitation", "the excitation tolerance"},
    {Input::drift, "drift", "the thermistor drift"},
    {Input::tol_lead, "tol_lead", "the lead resistance tolerance"},
    {Input::tol_reference, "tol_reference", "the reference tolerance"},
    {Input::resistor_tc, "resistor_tc", "the resistors' temperature coefficient"},
    {Input::reference_tc, "reference_tc", "the reference's temperature coefficient"},
    {Input::board_temperature, "board_temperature", "the board temperature range"},
    {Input::cable_temperature, "cable_temperature", "the cable temperature range"},
    {Input::tol_dt, "tol_dt", "the interchangeability"},
    {Input::dt_range, "dt_range", "the interchangeability range"},
    {Input::lead_compensation, "lead_compensation", "the lead compensation"},
    {Input::adc_offset, "adc_offset", "the converter offset"},
    {Input::adc_gain, "adc_gain", "the converter gain error"},
    {Input::adc_inl, "adc_inl", "the converter INL"},
    {Input::adc_error, "adc_error", "the converter error"},
    {Input::dissipation, "dissipation", "the dissipation constant"},
    {Input::trials, "trials", "the trial count"},
    {Input::threads, "threads", "the thread count"},
    {Input::min_span, "min_span", "the least output span"},
    {Input::min_sensitivity, "min_sensitivity", "the least sensitivity"},
    {Input::max_power, "max_power", "the power limit"},
    {Input::max_self_heating, "max_self_heating", "the self-heating limit"},
    {Input::rs, "rs", "the series resistor"},
    {Input::rp, "rp", "the parallel resistor"},
    {Input::r1, "r1", "the bridge resistor r1"},
    {Input::r2, "r2", "the bridge resistor r2"},
    {Input::r3, "r3", "the bridge resistor r3"},
    {Input::amp_gain_tol, "amp_gain_tol", "the amplifier's gain error"},
    {Input::amp_offset, "amp_offset", "the amplifier's input offset"},
    {Input::amp_offset_drift, "amp_offset_drift", "the amplifier's offset drift"},
    {Input::amp_bias, "amp_bias", "the amplifier's bias current"},
    {Input::amp_offset_current, "amp_offset_current", "the amplifier's offset current"},
}};

constexpr bool in_order() {
    for (std::size_t i = 0; i < kInputs.size(); ++i) {
        if (static_cast<std::size_t>(kInputs[i].input) != i) return false;
    }
    return kInputCount == kInputs.size();
}
static_assert(in_order(), "kInputs must list every Input once, in declaration order");

std::string core_noun(Input input) { return std::string(input_noun(input)); }

std::string compose(const std::string& head, const std::string& value, const std::string& why) {
    std::string text = head;
    if (!value.empty()) text += " '" + value + "'";
    return text + ": " + why;
}

std::string head_of(const std::optional<Input>& input, const std::string& field, const InputNamer& name) {
    return input ? name(*input) : field;
}

}  // namespace

const std::array<Input, kInputCount>& all_inputs() {
    static const std::array<Input, kInputCount> all = [] {
        std::array<Input, kInputCount> a{};
        for (std::size_t i = 0; i < a.size(); ++i) a[i] = kInputs[i].input;
        return a;
    }();
    return all;
}

std::string_view input_key(Input input) { return kInputs.at(static_cast<std::size_t>(input)).key; }
std::string_view input_noun(Input input) { return kInputs.at(static_cast<std::size_t>(input)).noun; }

std::string input_placeholder(Input input) {
    std::string text(1, '{');
    text.append(input_key(input));
    text.push_back('}');
    return text;
}

std::optional<Input> input_from_key(std::string_view key) {
    for (const InputName& n : kInputs) {
        if (n.key == key) return n.input;
    }
    return std::nullopt;
}

std::string render_inputs(const std::string& text, const InputNamer& name) {
    std::string out;
    out.reserve(text.size());
    std::size_t i = 0;
    while (i < text.size()) {
        const std::size_t open = text.find('{', i);
        if (open == std::string::npos) break;
        const std::size_t close = text.find('}', open + 1);
        if (close == std::string::npos) break;
        out.append(text, i, open - i);
        const auto input = input_from_key(std::string_view(text).substr(open + 1, close - open - 1));
        if (input) {
            out += name(*input);
        } else {
            out.append(text, open, close + 1 - open);
        }
        i = close + 1;
    }
    out.append(text, i, std::string::npos);
    return out;
}

Error::Error(std::string message) : std::runtime_error(render_inputs(message, core_noun)), message_(std::move(message)) {}

Error::Error(std::string what, std::string message) : std::runtime_error(std::move(what)), message_(std::move(message)) {}

std::string Error::render(const InputNamer& name) const { return render_inputs(message_, name); }

InputError::InputError(Input input, std::string value, std::string why)
    : Error(compose(core_noun(input), value, render_inputs(why, core_noun)),
            compose(input_placeholder(input), value, why)),
      input_(input),
      field_(input_key(input)),
      value_(std::move(value)),
      why_(std::move(why)) {}

InputError::InputError(std::string field, std::string value, std::string why)
    : Error(compose(field, value, render_inputs(why, core_noun)), compose(field, value, why)),
      field_(std::move(field)),
      value_(std::move(value)),
      why_(std::move(why)) {}

InputError InputError::with_value(std::string value) const {
    return input_ ? InputError(*input_, std::move(value), why_) : InputError(field_, std::move(value), why_);
}

std::string InputError::render(const InputNamer& name) const {
    return compose(head_of(input_, field_, name), value_, render_inputs(why_, name));
}

std::string describe(double value) {
    char buffer[32];
    std::snprintf(buffer, sizeof buffer, "%.6g", value);
    return buffer;
}

}  // namespace rtline
