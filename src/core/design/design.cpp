// Design from requirements (design.hpp): sizing's shortlists, each budgeted at the confidence, the best
// one's table sized to the share of the target its analog errors leave.
#include "rtline/design.hpp"

#include <algorithm>
#include <cmath>
#include <tuple>

#include "rtline/error.hpp"
#include "rtline/grid.hpp"

namespace rtline {

namespace {

const std::vector<Topology> kDividers = {Topology::divider_high, Topology::divider_low, Topology::shunt_divider};

bool is_divider(Topology t) { return std::find(kDividers.begin(), kDividers.end(), t) != kDividers.end(); }

// The budget of part `p` in circuit `c`: the spec's, with the part's tolerances and dissipation, the
// model reading (the firmware's table inverts the model) and the converter reference set for `c`.
BudgetSpec part_budget(const DesignSpec& spec, const DesignPart& p, const Circuit& c, std::uint64_t trials) {
    BudgetSpec b = spec.budget;
    b.tolerance.r25 = p.tol_r25;
    b.tolerance.beta = p.tol_beta;
    b.dissipation_w_per_k = p.dissipation_w_per_k;
    b.reading = Reading::model;
    b.trials = trials;
    b.threads = spec.threads;
    set_converter_reference(b, c, spec.reference);
    return b;
}

// The ranking key: figures in tie classes of kDesignTieK, then the coarser series, fewer resistors,
// the exact figure, the part's order and the values (a total order, so the result does not depend on
// the order options are found in).
auto rank_key(const DesignOption& o) {
    const Circuit& c = o.candidate.circuit;
    return std::make_tuple(std::floor(o.analog_k / kDesignTieK), static_cast<int>(o.series), o.resistor_count(),
                           o.analog_k, o.part, static_cast<int>(c.topology), c.rs, c.rp);
}

}  // namespace

void validate(const DesignSpec& spec) {
    if (!(spec.max_error_k > 0.0) || !std::isfinite(spec.max_error_k)) {
        throw InputError(Input::max_error, describe(spec.max_error_k),
                         "the target must be a positive temperature difference");
    }
    if (spec.budget.adc.bits <= 0) {
        throw InputError(Input::adc_bits, "", "a design is read through a converter; give its resolution in bits");
    }
    if (spec.confidence != Confidence::worst_case && spec.budget.trials == 0) {
        throw InputError(Input::trials, "0", "a Monte Carlo confidence needs trials; give some, or choose the worst case");
    }
    if (spec.parts.empty()) throw InputError(Input::model, "", "there is no thermistor to choose from");
    if (spec.drive.drive == Drive::current) {
        throw InputError(Input::current, describe(spec.drive.value),
                         "a design reads a divider, which a current source cannot drive; give {excitation} V or "
                         "leave the drive out (ratiometric)");
    }
    for (const Topology t : spec.topologies) {
        if (!is_divider(t)) {
            throw InputError(Input::topology, std::string(topology_name(t)),
                             "a design chooses among the dividers (divider-high, divider-low, shunt-divider), which "
                             "the converter reads directly; a bridge needs an amplifier and a bare or shunt "
                             "thermistor a current source");
        }
    }
    for (const DesignPart& p : spec.parts) p.model.check_span(spec.span);
}

Design design(const DesignSpec& spec) {
    validate(spec);
    const std::vector<Topology>& topologies = spec.topologies.empty() ? kDividers : spec.topologies;
    std::vector<Series> series = spec.series;
    std::sort(series.begin(), series.end());
    series.erase(std::unique(series.begin(), series.end()), series.end());
    const bool mc = spec.confidence != Confidence::worst_case;

    Design d;
    std::vector<Grid> grids;
    StandardSearch total;  // the searches' counts, for the refusal when none has a design
    SizingSpec last;
    std::optional<InputError> refused;  // a budget refused for every candidate is the run's error
    for (std::size_t pi = 0; pi < spec.parts.size(); ++pi) {
        const DesignPart& part = spec.parts[pi];
        grids.push_back(make_grid(part.model, spec.span, spec.step_k));
        const Grid& grid = grids.back();
        for (const Series s : series) {
            for (const Topology t : topologies) {
                SizingSpec ss;
                ss.base.topology = t;
                ss.base.excitation = spec.drive;
                ss.series = s;
                ss.range_lo_ohm = spec.range_lo_ohm;
                ss.range_hi_ohm = spec.range_hi_ohm;
                ss.top = spec.shortlist;
                ss.constraints = spec.constraints;
                ss.dissipation_w_per_k = part.dissipation_w_per_k;
                ss.threads = spec.threads;
                last = ss;
                const StandardSearch found = search_standard(ss, grid, part.model);
                total.examined += found.examined;
                if (total.removed.empty()) total.removed = found.removed;
                else
                    for (std::size_t i = 0; i < found.removed.size(); ++i) total.removed[i].second += found.removed[i].second;
                for (const Candidate& c : found.best) {
                    try {
                        const Budget b = compute_budget(grid, part.model, c.circuit, part_budget(spec, part, c.circuit, 0));
                        const TotalError e = total_error(b, Confidence::worst_case);
                        d.ranked.push_back({pi, s, c, e.error_k, e.at_t_k, e.error_k, false});
                    } catch (const InputError& e) {
                        if (!refused) refused = e;
                    }
                }
            }
        }
    }
    d.examined = total.examined;
    if (d.ranked.empty()) {
        if (refused) throw *refused;
        throw infeasible(last, total, "for any part, series and topology");
    }
    auto order = [](const DesignOption& a, const DesignOption& b) { return rank_key(a) < rank_key(b); };
    std::sort(d.ranked.begin(), d.ranked.end(), order);
    if (mc) {
        // The Monte Carlo for the finalists by worst case; they rank ahead of the rest, by its figure.
        const std::size_t n = std::min(spec.finalists, d.ranked.size());
        for (std::size_t i = 0; i < n; ++i) {
            DesignOption& o = d.ranked[i];
            const DesignPart& part = spec.parts[o.part];
            const Budget b = compute_budget(grids[o.part], part.model, o.candidate.circuit,
                                            part_budget(spec, part, o.candidate.circuit, spec.budget.trials));
            const TotalError e = total_error(b, spec.confidence);
            o.analog_k = e.error_k;
            o.analog_at_k = e.at_t_k;
            o.monte_carlo = true;
        }
        std::sort(d.ranked.begin(), d.ranked.begin() + static_cast<std::ptrdiff_t>(n), order);
    }

    // The chosen design in full: its budget with the Monte Carlo (for the report, whatever the
    // confidence), the channel the converter reads, and the table.
    const DesignOption& best = d.ranked.front();
    const DesignPart& part = spec.parts[best.part];
    const Circuit& circuit = best.candidate.circuit;
    d.grid = grids[best.part];
    d.budget_spec = part_budget(spec, part, circuit, spec.budget.trials);
    d.budget = compute_budget(grids[best.part], part.model, circuit, d.budget_spec);
    const double volts = circuit.excitation.drive == Drive::voltage ? circuit.excitation.value : 1.0;
    d.channel = {circuit, std::nullopt, d.budget_spec.ratiometric ? volts : d.budget_spec.adc.full_scale};
    d.map = map_codes(part.model, d.channel, spec.span, d.budget_spec.adc.bits, d.budget_spec.adc.transfer);
    d.rounding_floor_k = rounding_floor_k(*d.map, spec.scale_per_c);
    d.table_target_k = spec.max_error_k - best.analog_k;
    d.total_k = best.analog_k;
    if (!(d.table_target_k > 0.0)) {
        d.shortfall = Shortfall::analog;
        const BudgetPoint* at = &d.budget.points.front();
        for (const BudgetPoint& p : d.budget.points) {
            if (p.t_k == best.analog_at_k) at = &p;
        }
        d.cause_at_k = at->t_k;
        for (std::size_t c = 0; c < kCauses; ++c) {
            const double v = at->components.k[c];
            if (std::isfinite(v) && v > d.cause_k) {
                d.cause_k = v;
                d.cause = static_cast<Cause>(c);
            }
        }
        return d;
    }
    try {
        d.table = smallest_table(*d.map, d.table_target_k, spec.spacing, spec.scale_per_c);
    } catch (const InfeasibleError&) {
        d.shortfall = Shortfall::table;
        return d;
    }
    d.total_k = best.analog_k + d.table->fixed.max_error_k;
    d.met = d.total_k <= spec.max_error_k;
    if (!d.met) d.shortfall = Shortfall::table;
    return d;
}

std::vector<ResistorPower> resistor_powers(const Circuit& c, const Grid& grid) {
    std::vector<ResistorPower> out;
    for (const std::string& name : resistor_names(c.topology)) out.push_back({name, 0.0});
    if (c.excitation.drive != Drive::voltage) {
        for (ResistorPower& p : out) p.max_w = NAN;
        return out;
    }
    const double v = c.excitation.value;
    for (std::size_t i = 0; i < grid.size(); ++i) {
        const double r_t = grid.r_ohm[i];
        const OperatingPoint op = operate(c, r_t);
        // The thermistor's arm (its wires, and rp across both in the shunt-divider) has the voltage the
        // thermistor has, scaled by the wires; rs has the rest of the drive (no load on the output).
        const double v_arm = op.thermistor_v * (r_t + c.lead_ohm) / r_t;
        for (ResistorPower& p : out) {
            double w = 0.0;
            if (p.name == "rs") {
                const double v_rs = v - v_arm;
                w = v_rs * v_rs / c.rs;
            } else if (p.name == "rp") {
                w = v_arm * v_arm / c.rp;
            }
            p.max_w = std::max(p.max_w, w);
        }
    }
    return out;
}

}  // namespace rtline
