// NTC thermistor models: the beta equation, Steinhart–Hart, and a table of R–T points interpolated
// monotonically. Each gives R(T), T(R) and alpha(T) = (1/R)·dR/dT. Temperatures in kelvin, R in ohm.
#pragma once

#include "rtline/error.hpp"

#include <string>
#include <variant>
#include <vector>

#include "rtline/units.hpp"

namespace rtline {

// One published or measured point of the R–T characteristic.
struct RtPoint {
    double t_k = 0.0;    // temperature, K
    double r_ohm = 0.0;  // resistance, ohm
};

// The temperatures an R–T point may have: far beyond any thermistor's range on both sides (our own
// choice), and well inside what the models' arithmetic keeps finite (1/T, T², the slopes of a table
// between neighbouring points; without them a point at 1e-200 K or 1e57 °C reached the results as
// infinity). A point outside is a typing mistake.
inline constexpr double kMinPointK = 1e-3;  // 1 mK
inline constexpr double kMaxPointK = 1e4;   // 10 000 K
// Why a point's temperature is refused ("is at or below absolute zero ..." or "is outside ..."), or ""
// when it lies within kMinPointK..kMaxPointK.
[[nodiscard]] std::string point_temperature_problem(double t_k);

// R(T) = r0·exp(b·(1/T − 1/t0)).
struct BetaModel {
    double r0_ohm = 10e3;       // resistance at t0, ohm
    double t0_k = k25CelsiusK;  // reference temperature, K
    double b_k = 3950.0;        // B-value, K
};

// 1/T = a + b·ln R + c·(ln R)³ (Steinhart & Hart, Deep-Sea Research 15(4), 1968).
struct SteinhartHart {
    double a = 0.0;
    double b = 0.0;
    double c = 0.0;
};

// Monotone piecewise-cubic (Fritsch–Carlson) interpolation of ln R against 1/T through the points.
class TableModel {
public:
    // Requires at least two points, temperatures within kMinPointK..kMaxPointK and each once, and R
    // falling strictly as T rises; throws InputError (Input::points) otherwise, with the reason.
    explicit TableModel(std::vector<RtPoint> points);

    [[nodiscard]] double resistance(double t_k) const;
    [[nodiscard]] double temperature(double r_ohm) const;
    [[nodiscard]] double dlnr_dt(double t_k) const;
    [[nodiscard]] const std::vector<RtPoint>& points() const { return points_; }  // sorted by T
    [[nodiscard]] double t_min_k() const { return points_.front().t_k; }
    [[nodiscard]] double t_max_k() const { return points_.back().t_k; }

private:
    std::vector<RtPoint> points_;  // ascending T
    std::vector<double> x_;        // 1/T, ascending (reverse order of points_)
    std::vector<double> y_;        // ln R at x_
    std::vector<double> d_;        // dy/dx at x_
};

// A thermistor: one of the three models, behind one interface.
class Thermistor {
public:
    explicit Thermistor(BetaModel m);
    explicit Thermistor(SteinhartHart m);
    explicit Thermistor(TableModel m);

    [[nodiscard]] double resistance(double t_k) const;     // ohm
    [[nodiscard]] double temperature(double r_ohm) const;  // K
    [[nodiscard]] double alpha(double t_k) const;          // (1/R)·dR/dT, 1/K (negative for an NTC)
    // The local B-value −alpha·T², K: equal to B everywhere for the beta model.
    [[nodiscard]] double local_beta(double t_k) const;
    [[nodiscard]] std::string kind() const;  // "beta", "steinhart-hart" or "table"

    // Throws InputError (naming `input`) if the model cannot describe the span: outside a table's
    // points, Steinhart–Hart coefficients not monotonic there, or resistances that overflow a double.
    void check_span(const Span& span, Input input = Input::span) const;
    // The same, naming a field of the caller's own (a temperature the caller reads under its own name).
    void check_span(const Span& span, const std::string& field) const;

    [[nodiscard]] const std::variant<BetaModel, SteinhartHart, TableModel>& model() const { return model_; }

private:
    std::variant<BetaModel, SteinhartHart, TableModel> model_;
};

// Validates the parameters of a model; throws InputError naming the flag.
void validate(const BetaModel& m);
void validate(const SteinhartHart& m);

// The beta model written as Steinhart–Hart: a = 1/t0 − ln(r0)/B, b = 1/B, c = 0.
[[nodiscard]] SteinhartHart to_steinhart_hart(const BetaModel& m);

// R(T) of Steinhart–Hart by the closed-form (Cardano) solution of the cubic in ln R. Requires T > 0.
[[nodiscard]] double sh_resistance(const SteinhartHart& m, double t_k);
// T(R) of the beta model: 1/(1/T0 + ln(R/R0)/B).
[[nodiscard]] double beta_temperature(const BetaModel& m, double r_ohm);
// T(R) of Steinhart–Hart: 1/(a + b·ln R + c·ln³R).
[[nodiscard]] double sh_temperature(const SteinhartHart& m, double r_ohm);

// B-value between two temperatures: ln(R1/R2)/(1/T1 − 1/T2) (B25/85: 298.15 K and 358.15 K).
[[nodiscard]] double beta_between(const Thermistor& t, double t1_k, double t2_k);

// Sorts points by temperature and checks them: at least `min_count`, R > 0, T > 0, no duplicate
// temperatures, R strictly decreasing with T. Throws InputError naming `source`.
[[nodiscard]] std::vector<RtPoint> validate_points(std::vector<RtPoint> points, std::size_t min_count,
                                                   const std::string& source);

}  // namespace rtline
