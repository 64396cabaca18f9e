// Comparing topologies, and saying why a search found nothing.
#include <algorithm>

#include "rtline/error.hpp"
#include "rtline/eseries.hpp"
#include "rtline/sizing.hpp"
#include "rtline/units.hpp"

namespace rtline {

std::string drive_problem(const Circuit& c) {
    if (c.excitation.drive != Drive::current) return "";
    switch (c.topology) {
        case Topology::divider_high:
        case Topology::shunt_divider: return "a current drive makes its output I*rs, independent of the thermistor";
        case Topology::divider_low: return "a current drive makes its output I*R_T, independent of rs";
        default: return "";
    }
}

InfeasibleError infeasible(const SizingSpec& spec, const StandardSearch& s, const std::string& what) {
    const std::pair<Input, std::size_t>* worst = nullptr;
    for (const auto& r : s.removed) {
        if (r.second > 0 && (worst == nullptr || r.second > worst->second)) worst = &r;
    }
    const std::string series(series_name(spec.series));
    if (worst == nullptr && what.empty()) {
        // One topology, and no constraint removed any: every combination left the output unchanged.
        const std::vector<double> values = series_values(spec.series, spec.range_lo_ohm, spec.range_hi_ohm);
        if (values.empty()) {
            return InfeasibleError("no " + series + " value lies in the range searched");
        }
        return InfeasibleError("no " + series +
                               " combination gives an output that changes over the span; the values searched run "
                               "from " +
                               format_resistance(values.front()) + " to " + format_resistance(values.back()) +
                               " ohm, out of reach of the thermistor");
    }
    std::string msg = "no " + series + " combination " + (what.empty() ? "" : what + " ") + "meets the constraints";
    const auto key = input_placeholder;
    const std::size_t most = worst == nullptr ? 0 : worst->second;
    msg += ": " + (worst == nullptr ? std::string("no constraint") : key(worst->first)) + " removed " +
           std::to_string(most) + " of " + std::to_string(s.examined) + " combinations";
    for (const auto& r : s.removed) {
        if (r.second > 0 && &r != worst) msg += "; " + key(r.first) + " removed " + std::to_string(r.second);
    }
    return InfeasibleError(msg);
}

Comparison compare_topologies(const SizingSpec& spec, const Grid& grid, const Thermistor& model) {
    Comparison result;
    Circuit drive = spec.base;  // the drive, on a divider: the unit the least span and sensitivity are in
    drive.topology = Topology::divider_low;
    const Constraints& k = spec.constraints;
    for (const Topology t : all_topologies()) {
        if (free_resistors(t).empty()) continue;  // the bare thermistor: nothing to size
        SizingSpec one = spec;
        one.base.topology = t;
        one.top = 1;
        if (gives_resistance(t) && drive.excitation.drive == Drive::voltage) {
            result.skipped.emplace_back(t, "its output is a resistance; needs {current}");
            continue;
        }
        if (output_unit(one.base) != output_unit(drive) && (k.min_span > 0.0 || k.min_sensitivity > 0.0)) {
            // The least span and sensitivity are in the other rows' unit (V/V); this row's is ohm.
            result.skipped.emplace_back(t, "its output is in " + output_unit(one.base) + ", not the " +
                                               output_unit(drive) + " of {min_span} and {min_sensitivity}");
            continue;
        }
        if (const std::string why = drive_problem(one.base); !why.empty()) {
            result.skipped.emplace_back(t, why);
            continue;
        }
        const StandardSearch found = search_standard(one, grid, model);
        result.total.examined += found.examined;
        for (const auto& removed : found.removed) {
            auto it = std::find_if(result.total.removed.begin(), result.total.removed.end(),
                                   [&](const auto& r) { return r.first == removed.first; });
            if (it == result.total.removed.end()) {
                result.total.removed.push_back(removed);
            } else {
                it->second += removed.second;
            }
        }
        if (found.best.empty()) {
            result.skipped.emplace_back(t, "no combination meets the constraints");
            continue;
        }
        result.ranked.push_back(found.best.front());
    }
    if (result.ranked.empty()) throw infeasible(spec, result.total, "for any topology");
    std::stable_sort(result.ranked.begin(), result.ranked.end(), [](const Candidate& a, const Candidate& b) {
        return a.max_nonlinearity_pct_fsd < b.max_nonlinearity_pct_fsd;
    });
    return result;
}

}  // namespace rtline
