#include "rtline/thermistor.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>

#include "rtline/error.hpp"

namespace rtline {

namespace {

// "1 point", "3 points": the count of points for an error message.
std::string count_points(std::size_t n) { return std::to_string(n) + (n == 1 ? " point" : " points"); }

template <class... Ts>
struct Overloaded : Ts... {
    using Ts::operator()...;
};
template <class... Ts>
Overloaded(Ts...) -> Overloaded<Ts...>;

int sign(double v) { return (v > 0.0) - (v < 0.0); }

// Derivative at an end of a monotone cubic (the one-sided three-point formula with the
// Fritsch–Carlson shape-preserving limits; the same rule as scipy's PchipInterpolator).
double pchip_end_slope(double h0, double h1, double m0, double m1) {
    double d = ((2.0 * h0 + h1) * m0 - h0 * m1) / (h0 + h1);
    if (sign(d) != sign(m0)) {
        d = 0.0;
    } else if (sign(m0) != sign(m1) && std::abs(d) > 3.0 * std::abs(m0)) {
        d = 3.0 * m0;
    }
    return d;
}

// The checks of validate_points, blaming `source`: an Input or a caller's field (both build an InputError).
template <class Source>
std::vector<RtPoint> checked_points(std::vector<RtPoint> points, std::size_t min_count, const Source& source) {
    if (points.size() < min_count) {
        throw InputError(source, count_points(points.size()),
                         "this model needs at least " + std::to_string(min_count) + " R-T points");
    }
    for (const RtPoint& p : points) {
        if (!std::isfinite(p.r_ohm) || p.r_ohm <= 0.0) {
            throw InputError(source, describe(p.r_ohm) + " ohm", "resistances must be positive");
        }
        if (const std::string why = point_temperature_problem(p.t_k); !why.empty()) {
            throw InputError(source, describe(kelvin_to_celsius(p.t_k)) + " C", why);
        }
    }
    std::sort(points.begin(), points.end(), [](const RtPoint& a, const RtPoint& b) { return a.t_k < b.t_k; });
    for (std::size_t i = 1; i < points.size(); ++i) {
        if (points[i].t_k == points[i - 1].t_k) {
            throw InputError(source, describe(kelvin_to_celsius(points[i].t_k)) + " C", "duplicate temperature");
        }
        if (!(points[i].r_ohm < points[i - 1].r_ohm)) {
            throw InputError(source, describe(kelvin_to_celsius(points[i].t_k)) + " C",
                             "an NTC's resistance must fall strictly as temperature rises");
        }
    }
    return points;
}

}  // namespace

// ---------------------------------------------------------------------------------------- table

TableModel::TableModel(std::vector<RtPoint> points) : points_(checked_points(std::move(points), 2, Input::points)) {
    const std::size_t n = points_.size();
    x_.resize(n);
    y_.resize(n);
    for (std::size_t i = 0; i < n; ++i) {
        const RtPoint& p = points_[n - 1 - i];
        x_[i] = 1.0 / p.t_k;
        y_[i] = std::log(p.r_ohm);
    }
    d_.assign(n, 0.0);
    if (n < 2) return;
    std::vector<double> h(n - 1);
    std::vector<double> m(n - 1);
    for (std::size_t k = 0; k + 1 < n; ++k) {
        h[k] = x_[k + 1] - x_[k];
        m[k] = (y_[k + 1] - y_[k]) / h[k];
    }
    if (n == 2) {
        d_[0] = d_[1] = m[0];
        return;
    }
    for (std::size_t k = 1; k + 1 < n; ++k) {
        if (sign(m[k - 1]) * sign(m[k]) <= 0) {
            d_[k] = 0.0;
        } else {
            // Weighted harmonic mean (Fritsch & Butland, 1984).
            const double w1 = 2.0 * h[k] + h[k - 1];
            const double w2 = h[k] + 2.0 * h[k - 1];
            d_[k] = (w1 + w2) / (w1 / m[k - 1] + w2 / m[k]);
        }
    }
    d_[0] = pchip_end_slope(h[0], h[1], m[0], m[1]);
    d_[n - 1] = pchip_end_slope(h[n - 2], h[n - 3], m[n - 2], m[n - 3]);
}

namespace {

struct Hermite {
    double y;
    double dy;
};

Hermite hermite(double x0, double x1, double y0, double y1, double d0, double d1, double x) {
    const double h = x1 - x0;
    const double t = (x - x0) / h;
    const double t2 = t * t;
    const double t3 = t2 * t;
    const double h00 = 2 * t3 - 3 * t2 + 1;
    const double h10 = t3 - 2 * t2 + t;
    const double h01 = -2 * t3 + 3 * t2;
    const double h11 = t3 - t2;
    const double y = h00 * y0 + h10 * h * d0 + h01 * y1 + h11 * h * d1;
    const double dy =
        ((6 * t2 - 6 * t) * y0 + (3 * t2 - 4 * t + 1) * h * d0 + (-6 * t2 + 6 * t) * y1 + (3 * t2 - 2 * t) * h * d1) /
        h;
    return {y, dy};
}

}  // namespace

double TableModel::resistance(double t_k) const {
    const double x = 1.0 / t_k;
    const std::size_t n = x_.size();
    if (x <= x_.front()) return std::exp(y_.front() + d_.front() * (x - x_.front()));
    if (x >= x_.back()) return std::exp(y_.back() + d_.back() * (x - x_.back()));
    const std::size_t k = static_cast<std::size_t>(std::upper_bound(x_.begin(), x_.end(), x) - x_.begin()) - 1;
    const std::size_t j = std::min(k, n - 2);
    return std::exp(hermite(x_[j], x_[j + 1], y_[j], y_[j + 1], d_[j], d_[j + 1], x).y);
}

double TableModel::dlnr_dt(double t_k) const {
    const double x = 1.0 / t_k;
    const std::size_t n = x_.size();
    double dydx = 0.0;
    if (x <= x_.front()) {
        dydx = d_.front();
    } else if (x >= x_.back()) {
        dydx = d_.back();
    } else {
        const std::size_t k = static_cast<std::size_t>(std::upper_bound(x_.begin(), x_.end(), x) - x_.begin()) - 1;
        const std::size_t j = std::min(k, n - 2);
        dydx = hermite(x_[j], x_[j + 1], y_[j], y_[j + 1], d_[j], d_[j + 1], x).dy;
    }
    return -dydx / (t_k * t_k);
}

double TableModel::temperature(double r_ohm) const {
    const double y = std::log(r_ohm);
    const std::size_t n = y_.size();
    if (y <= y_.front()) return 1.0 / (x_.front() + (y - y_.front()) / d_.front());
    if (y >= y_.back()) return 1.0 / (x_.back() + (y - y_.back()) / d_.back());
    const std::size_t k = static_cast<std::size_t>(std::upper_bound(y_.begin(), y_.end(), y) - y_.begin()) - 1;
    const std::size_t j = std::min(k, n - 2);
    // The segment's cubic is monotone: bisection to the last bit of x.
    double lo = x_[j];
    double hi = x_[j + 1];
    for (int i = 0; i < 200 && hi - lo > 0.0; ++i) {
        const double mid = 0.5 * (lo + hi);
        if (mid <= lo || mid >= hi) break;
        if (hermite(x_[j], x_[j + 1], y_[j], y_[j + 1], d_[j], d_[j + 1], mid).y < y) {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    return 1.0 / (0.5 * (lo + hi));
}

// ------------------------------------------------------------------------------------------ beta

double beta_temperature(const BetaModel& m, double r_ohm) {
    const double ratio = r_ohm / m.r0_ohm;
    // ln R − ln R0 when the ratio leaves the doubles (R and R0 hundreds of decades apart); otherwise the
    // ratio's one logarithm, which is the more accurate.
    const double l = std::isnormal(ratio) ? std::log(ratio) : std::log(r_ohm) - std::log(m.r0_ohm);
    return 1.0 / (1.0 / m.t0_k + l / m.b_k);
}

// ------------------------------------------------------------------------------ Steinhart–Hart

double sh_temperature(const SteinhartHart& m, double r_ohm) {
    const double l = std::log(r_ohm);
    return 1.0 / (m.a + m.b * l + m.c * l * l * l);
}

double sh_resistance(const SteinhartHart& m, double t_k) {
    // c·L³ + b·L + (a − 1/T) = 0, i.e. L³ + p·L + q = 0 with p = b/c, q = (a − 1/T)/c.
    const double rhs = 1.0 / t_k - m.a;
    const double linear = rhs / m.b;  // the root when c = 0
    if (m.c == 0.0 || std::abs(3.0 * m.c * linear * linear) < 1e-15 * std::abs(m.b)) {
        if (m.c == 0.0) return std::exp(linear);
        // c·L³ is below double precision next to b·L: one correction step is exact to rounding.
        const double l = linear - m.c * linear * linear * linear / m.b;
        return std::exp(l);
    }
    const double p = m.b / m.c;
    const double q = -rhs / m.c;
    const double p3 = p / 3.0;
    const double disc = p3 * p3 * p3 + 0.25 * q * q;
    if (disc >= 0.0) {
        // Cardano: L = cbrt(y − q/2) − cbrt(y + q/2), y = sqrt(disc); written as −q/(u² + uv + v²),
        // which is the same number without the cancellation of the difference.
        const double y = std::sqrt(disc);
        const double u = std::cbrt(y - 0.5 * q);
        const double v = std::cbrt(y + 0.5 * q);
        const double den = u * u + u * v + v * v;
        const double l = den == 0.0 ? 0.0 : -q / den;
        // With c < 0 the single real root lies outside the monotone branch |L| < sqrt(−p/3).
        // (With c > 0 and b < 0 the single root is beyond the turning points, where it is monotone.)
        if (m.c < 0.0 && l * l >= -p3) return std::nan("");
        return std::exp(l);
    }
    // Three real roots (only with c < 0): the trigonometric form; keep the one on the monotone branch.
    const double r = std::sqrt(-p3);
    const double arg = std::clamp((1.5 * q / p) * std::sqrt(-3.0 / p), -1.0, 1.0);
    const double theta = std::acos(arg) / 3.0;
    for (int k = 0; k < 3; ++k) {
        const double l = 2.0 * r * std::cos(theta - 2.0 * std::numbers::pi * k / 3.0);
        if (l * l < -p3) return std::exp(l);
    }
    return std::nan("");
}

SteinhartHart to_steinhart_hart(const BetaModel& m) {
    return {1.0 / m.t0_k - std::log(m.r0_ohm) / m.b_k, 1.0 / m.b_k, 0.0};
}

// ------------------------------------------------------------------------------------ validation

void validate(const BetaModel& m) {
    if (!std::isfinite(m.r0_ohm) || m.r0_ohm <= 0.0) {
        throw InputError(Input::r0, describe(m.r0_ohm), "the resistance at T0 must be positive");
    }
    if (!std::isfinite(m.b_k) || m.b_k <= 0.0) {
        throw InputError(Input::b_value, describe(m.b_k), "the B-value of an NTC must be positive (kelvin)");
    }
    if (!std::isfinite(m.t0_k) || m.t0_k <= 0.0) {
        throw InputError(Input::t0, describe(m.t0_k), "T0 must be above absolute zero");
    }
}

void validate(const SteinhartHart& m) {
    const std::string text = describe(m.a) + "," + describe(m.b) + "," + describe(m.c);
    if (!std::isfinite(m.a) || !std::isfinite(m.b) || !std::isfinite(m.c)) {
        throw InputError(Input::sh_coefficients, text, "the coefficients must be finite numbers");
    }
    if (m.b == 0.0 && m.c == 0.0) {
        throw InputError(Input::sh_coefficients, text, "B and C cannot both be zero: T would not depend on R");
    }
}

std::string point_temperature_problem(double t_k) {
    if (!(t_k > 0.0)) return "is at or below absolute zero (-273.15 C)";
    if (!(t_k >= kMinPointK && t_k <= kMaxPointK)) {
        return "is outside the range of an R-T point, " + format_number(kMinPointK) + " to " +
               format_number(kMaxPointK) + " K (a typing mistake?)";
    }
    return "";
}


std::vector<RtPoint> validate_points(std::vector<RtPoint> points, std::size_t min_count, const std::string& source) {
    return checked_points(std::move(points), min_count, source);
}

// ------------------------------------------------------------------------------------ thermistor

Thermistor::Thermistor(BetaModel m) : model_(m) { validate(m); }
Thermistor::Thermistor(SteinhartHart m) : model_(m) { validate(m); }
Thermistor::Thermistor(TableModel m) : model_(std::move(m)) {}

double Thermistor::resistance(double t_k) const {
    return std::visit(Overloaded{
                          [&](const BetaModel& m) { return m.r0_ohm * std::exp(m.b_k * (1.0 / t_k - 1.0 / m.t0_k)); },
                          [&](const SteinhartHart& m) { return sh_resistance(m, t_k); },
                          [&](const TableModel& m) { return m.resistance(t_k); },
                      },
                      model_);
}

double Thermistor::temperature(double r_ohm) const {
    return std::visit(Overloaded{
                          [&](const BetaModel& m) { return beta_temperature(m, r_ohm); },
                          [&](const SteinhartHart& m) { return sh_temperature(m, r_ohm); },
                          [&](const TableModel& m) { return m.temperature(r_ohm); },
                      },
                      model_);
}

double Thermistor::alpha(double t_k) const {
    return std::visit(Overloaded{
                          [&](const BetaModel& m) { return -m.b_k / (t_k * t_k); },
                          [&](const SteinhartHart& m) {
                              const double l = std::log(sh_resistance(m, t_k));
                              return -1.0 / (t_k * t_k * (m.b + 3.0 * m.c * l * l));
                          },
                          [&](const TableModel& m) { return m.dlnr_dt(t_k); },
                      },
                      model_);
}

double Thermistor::local_beta(double t_k) const { return -alpha(t_k) * t_k * t_k; }

std::string Thermistor::kind() const {
    return std::visit(Overloaded{
                          [](const BetaModel&) { return std::string("beta"); },
                          [](const SteinhartHart&) { return std::string("steinhart-hart"); },
                          [](const TableModel&) { return std::string("table"); },
                      },
                      model_);
}

void Thermistor::check_span(const Span& span, Input field) const {
    const std::string text = format_span(span);
    if (const auto* table = std::get_if<TableModel>(&model_)) {
        const double tol = 1e-9;
        if (span.lo_k < table->t_min_k() - tol || span.hi_k > table->t_max_k() + tol) {
            throw InputError(field, text,
                             "outside the R-T table, which covers " +
                                 format_number(kelvin_to_celsius(table->t_min_k())) + " to " +
                                 format_number(kelvin_to_celsius(table->t_max_k())) +
                                 " \xC2\xB0"
                                 "C");
        }
        return;
    }
    if (const auto* sh = std::get_if<SteinhartHart>(&model_)) {
        // 1/T must fall strictly as ln R rises over the span: d(1/T)/dL = b + 3c·L² > 0. L² is
        // largest at an end of the span's L-interval and smallest at an end or at 0.
        const double r_lo = sh_resistance(*sh, span.lo_k);
        const double r_hi = sh_resistance(*sh, span.hi_k);
        bool ok = std::isnormal(r_lo) && std::isnormal(r_hi) && r_lo > r_hi;
        if (ok) {
            const double l_lo = std::log(r_lo);
            const double l_hi = std::log(r_hi);
            for (const double l : {l_lo, l_hi, (l_hi < 0.0 && l_lo > 0.0) ? 0.0 : l_hi}) {
                if (!(sh->b + 3.0 * sh->c * l * l > 0.0)) ok = false;
            }
        }
        if (!ok) {
            throw InputError(field, text,
                             "the Steinhart-Hart coefficients do not give a resistance that falls "
                             "monotonically with temperature over this span");
        }
        return;
    }
    const double r_lo = resistance(span.lo_k);
    const double r_hi = resistance(span.hi_k);
    if (!std::isnormal(r_lo) || !std::isnormal(r_hi) || r_lo > 1e300) {
        throw InputError(field, text, "the model's resistance overflows a double over this span");
    }
}

void Thermistor::check_span(const Span& span, const std::string& field) const {
    try {
        check_span(span);
    } catch (const InputError& e) {
        throw InputError(field, e.value(), e.why());
    }
}

double beta_between(const Thermistor& t, double t1_k, double t2_k) {
    return std::log(t.resistance(t1_k) / t.resistance(t2_k)) / (1.0 / t1_k - 1.0 / t2_k);
}

}  // namespace rtline
