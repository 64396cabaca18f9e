// The converter-reference rule a budget reads a circuit by (declared in rtline/budget.hpp).
#include "rtline/budget.hpp"
#include "rtline/error.hpp"

namespace rtline {

void set_converter_reference(BudgetSpec& spec, const Circuit& circuit, const ConverterReference& ref) {
    const Drive drive = circuit.excitation.drive;
    switch (ref.kind) {
        case ConverterReference::Kind::unstated:
            if (drive == Drive::current && spec.adc.bits > 0) {
                throw InputError(Input::reference, "", "a current-driven circuit needs the converter's reference in volts");
            }
            spec.ratiometric = drive == Drive::ratiometric;
            spec.adc.full_scale = drive == Drive::voltage ? circuit.excitation.value : 1.0;
            return;
        case ConverterReference::Kind::excitation: spec.ratiometric = true; return;
        case ConverterReference::Kind::fixed:
            if (!(ref.volts > 0.0)) {
                throw InputError(Input::reference, describe(ref.volts),
                                 "give excitation (ratiometric) or a positive voltage");
            }
            if (drive == Drive::ratiometric) {
                throw InputError(Input::reference, describe(ref.volts),
                                 "a fixed reference needs a drive; give {excitation} V or {current} A");
            }
            spec.ratiometric = false;
            spec.adc.full_scale = ref.volts;
            return;
    }
}

double default_excitation_tolerance(const BudgetSpec& spec, const Circuit& circuit) {
    const bool volts = circuit.excitation.drive != Drive::ratiometric && !spec.ratiometric;
    return volts ? 0.01 : 0.0;
}

}  // namespace rtline
